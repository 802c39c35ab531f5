"""The command reference page, generated from the parser itself.

``python -m realquad_cli.reference > docs/reference.md`` rewrites
``docs/reference.md``; a test checks that the page is up to date.
"""

from __future__ import annotations

import click
from realquad_cli.main import cli

WIDTH = 88


def _context(command: click.Command, name: str, parent: click.Context | None) -> click.Context:
    # make_context applies each command's own context settings (help option names, ...)
    ctx = command.make_context(name, [], parent=parent, resilient_parsing=True)
    ctx.terminal_width = WIDTH
    ctx.max_content_width = WIDTH
    return ctx


def _walk(
    command: click.Command, path: list[str], parent: click.Context | None, out: list[str]
) -> None:
    ctx = _context(command, path[-1], parent)
    level = "#" * min(len(path) + 1, 4)
    out.append(f"{level} `{' '.join(path)}`\n\n```\n{ctx.get_help()}\n```\n")
    if isinstance(command, click.Group):
        for name in sorted(command.list_commands(ctx)):
            sub = command.get_command(ctx, name)
            if sub is not None:
                _walk(sub, [*path, name], ctx, out)


def render() -> str:
    """The Markdown text of the command reference."""
    out = [
        "# Command reference\n",
        "Generated from the command-line parser by `python -m realquad_cli.reference`;",
        "do not edit by hand. The user guide (index.md) explains each command with examples.\n",
    ]
    _walk(cli, ["realquad"], None, out)
    return "\n".join(out)


if __name__ == "__main__":
    click.echo(render(), nl=False)
