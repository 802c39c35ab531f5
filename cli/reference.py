"""The command reference page, generated from the parser itself.

``python -m realquad_cli.reference > docs/reference.md`` rewrites
``docs/reference.md``; a test checks that the page is up to date.
"""

from __future__ import annotations

import click
from realquad_cli.main import cli


def _help(command: click.Command, path: list[str], parent: click.Context | None) -> str:
    ctx = click.Context(
        command, info_name=path[-1], parent=parent, terminal_width=88, max_content_width=88
    )
    return ctx.get_help()


def _walk(
    command: click.Command, path: list[str], parent: click.Context | None, out: list[str]
) -> None:
    level = "#" * min(len(path) + 1, 4)
    out.append(f"{level} `{' '.join(path)}`\n\n```\n{_help(command, path, parent)}\n```\n")
    if isinstance(command, click.Group):
        ctx = click.Context(command, info_name=path[-1], parent=parent)
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
