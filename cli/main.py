"""Entry point of the ``realquad`` command line.

``main(argv)`` runs one command in-process and returns its exit status; errors
become one ``realquad: error: …`` line on stderr with status 2, never a
traceback (set ``REALQUAD_DEBUG=1`` to see one for an internal error).
"""

from __future__ import annotations

import os
import sys
from collections.abc import Sequence

import click
from realquad_cli.commands import COMMANDS

import realquad
from realquad._backend import BACKEND, BUILD_NOTE
from realquad.errors import RealquadError
from realquad.textio import summarise_numbers

CONTEXT = {"help_option_names": ["-h", "--help"], "max_content_width": 100}


def _version_text() -> str:
    note = f" ({BUILD_NOTE})" if BUILD_NOTE else ""
    return f"realquad {realquad.__version__}, kernels: {BACKEND}{note}"


@click.group(context_settings=CONTEXT)
@click.version_option(message="%(version)s", version=_version_text(), prog_name="realquad")
def cli() -> None:
    """Exact computation in real quadratic fields and orders.

    Continued fractions, Pell equations, fundamental units and regulators,
    class groups and prime splitting, binary quadratic forms (reduction,
    equivalence, composition, cycles), integer solutions of quadratic
    equations in x and y, and surveys over ranges of fields. Every command
    takes --json, and --latex for LaTeX to paste into a paper; every result
    names its method and its proof.
    """


for _command in COMMANDS:
    cli.add_command(_command)


def error(message: str) -> int:
    """One ``realquad: error: …`` line on stderr (long numbers in it summarised); status 2."""
    first = " ".join(str(message).split()) or "unknown error"
    click.echo(f"realquad: error: {summarise_numbers(first)}", err=True)
    return 2


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line on ``argv`` (default ``sys.argv[1:]``); return the exit status."""
    args = list(sys.argv[1:] if argv is None else argv)
    try:
        cli.main(args=args, prog_name="realquad", standalone_mode=False)
    except click.exceptions.NoArgsIsHelpError as exc:
        name = exc.ctx.command_path if exc.ctx else "realquad"
        return error(f"missing command: {name} needs one (see {name} --help)")
    except click.UsageError as exc:
        return error(exc.format_message())
    except click.exceptions.Exit as exc:
        return int(exc.exit_code)
    except click.Abort:
        click.echo("realquad: interrupted", err=True)
        return 130
    except click.ClickException as exc:
        return error(exc.format_message())
    except RealquadError as exc:
        return error(str(exc))
    except KeyboardInterrupt:
        click.echo("realquad: interrupted", err=True)
        return 130
    except BrokenPipeError:
        try:
            sys.stdout = open(os.devnull, "w")  # noqa: SIM115
        except OSError:
            pass
        return 0
    except RecursionError:
        return error("input nested too deeply")
    except MemoryError:
        return error("out of memory")
    except Exception as exc:  # pragma: no cover - a bug, reported without a traceback
        if os.environ.get("REALQUAD_DEBUG"):
            raise
        return error(f"internal error ({type(exc).__name__}: {exc}); please report it")
    return 0


def run() -> None:
    """Console-script entry point."""
    sys.exit(main())
