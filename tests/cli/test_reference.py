"""docs/reference.md is generated from the parser and must match it."""

from __future__ import annotations

from pathlib import Path

from realquad_cli.reference import render

from tests.cli.support import COMMAND_NAMES


def test_reference_page_is_up_to_date():
    page = Path(__file__).resolve().parents[2] / "docs" / "reference.md"
    assert page.read_text(encoding="utf-8") == render(), (
        "docs/reference.md is stale: run python -m realquad_cli.reference > docs/reference.md"
    )


def test_reference_names_every_command():
    text = render()
    for name in COMMAND_NAMES:
        assert f"`realquad {name}`" in text
