"""The installed package holds every subpackage (a package missing from pyproject.toml installs broken)."""

from __future__ import annotations

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_every_package_directory_is_listed() -> None:
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(config["tool"]["setuptools"]["packages"])
    found = set()
    for top, directory in (("realquad", ROOT / "realquad"), ("realquad_cli", ROOT / "cli")):
        for init in directory.rglob("__init__.py"):
            parts = init.parent.relative_to(directory).parts
            found.add(".".join((top, *parts)))
    assert found == listed, f"pyproject.toml packages: add {found - listed}, drop {listed - found}"
