"""The version of realquad (one place; the package and the survey store read it here)."""

__version__ = "0.1.0"
