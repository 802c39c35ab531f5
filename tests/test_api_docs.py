"""The API reference (docs/api, built by Sphinx in .ci/run) documents every public module."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _public_modules() -> set[str]:
    names = set()
    for path in (ROOT / "realquad").rglob("*.py"):
        parts = list(path.relative_to(ROOT).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts.pop()
        if not any(part.startswith("_") for part in parts):
            names.add(".".join(parts))
    return names


def test_every_public_module_has_a_page_entry():
    documented = set()
    for page in (ROOT / "docs" / "api").glob("*.rst"):
        documented |= set(re.findall(r"^\.\. automodule:: (\S+)", page.read_text(), re.M))
    missing = _public_modules() - documented
    assert not missing, f"add to docs/api/*.rst: {sorted(missing)}"
    assert documented <= _public_modules()  # no page names a module that is gone
