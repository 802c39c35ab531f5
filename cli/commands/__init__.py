"""One module per command; :data:`COMMANDS` lists them for the entry point."""

from __future__ import annotations

import click
from realquad_cli.commands import (
    cfrac,
    classgroup,
    form,
    pell,
    represent,
    solve,
    split,
    survey,
    unit,
)

COMMANDS: list[click.Command] = [
    cfrac.command,
    pell.command,
    unit.command,
    survey.command,
    classgroup.command,
    split.command,
    represent.command,
    form.command,
    solve.command,
]
