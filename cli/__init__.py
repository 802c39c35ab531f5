"""The ``realquad`` command line (installed as the package ``realquad_cli``)."""
