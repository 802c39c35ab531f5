"""Sphinx configuration of the API reference (built from the docstrings).

Build: ``python -m sphinx -W --keep-going -b html docs/api DIR`` (``.ci/run``
does this with a temporary ``DIR``; the output is never committed).
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from realquad._version import __version__  # noqa: E402

project = "realquad"
author = "the realquad developers"
copyright = "the realquad developers, MIT licence"
release = version = __version__

extensions = ["sphinx.ext.autodoc"]  # the examples are doctested by pytest, not here
autodoc_member_order = "bysource"
autodoc_typehints = "signature"
autodoc_default_options = {"members": True, "show-inheritance": True}
# Cross-references that do not resolve (names of other packages' private helpers,
# types from gmpy2 or the standard library) stay plain text instead of failing the build.
nitpicky = False
default_role = "literal"
exclude_patterns = ["_build"]
html_theme = "alabaster"
html_title = f"realquad {release} API reference"
html_show_sourcelink = False
