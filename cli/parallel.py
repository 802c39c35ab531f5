"""The options that say where long computations run: ``--workers N`` and ``--scheduler ADDRESS``.

Shared by ``survey run`` (chunks of fields) and the sub-exponential methods
(batches of sieve polynomials); the library's
:func:`realquad.core.executors.make_executor` turns them into an executor.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, TypeVar

import click

from realquad.core.integers import as_integer
from realquad.errors import InputError

Decorated = TypeVar("Decorated", bound=Callable[..., Any])

#: More worker processes than this is a typing slip, not a machine.
MAX_WORKERS = 1024


def parallel_options(what: str) -> Callable[[Decorated], Decorated]:
    """``--workers N`` and ``--scheduler ADDRESS`` for a command that sends out ``what``."""

    def decorate(f: Decorated) -> Decorated:
        f = click.option(
            "--scheduler",
            type=str,
            default=None,
            metavar="ADDRESS",
            help=f"Run the {what} on the Dask cluster of this scheduler.",
        )(f)
        return click.option(
            "--workers",
            type=str,
            default=None,
            metavar="N",
            help="Local worker processes (default: all cores).",
        )(f)

    return decorate


def parse_parallel(workers: str | None, scheduler: str | None) -> tuple[int | None, str | None]:
    """``(workers, scheduler)`` checked: a count from 1 to 1024, a non-empty address.

    >>> parse_parallel("2", None), parse_parallel(None, "tcp://127.0.0.1:8786")
    ((2, None), (None, 'tcp://127.0.0.1:8786'))
    """
    count = None
    if workers is not None:
        count = as_integer(workers, "--workers")
        if count < 1:
            raise InputError(f"--workers must be a positive integer, got {count}")
        if count > MAX_WORKERS:
            raise InputError(f"--workers must be at most {MAX_WORKERS}, got {count}")
    if scheduler is not None and not scheduler.strip():
        raise InputError("--scheduler needs an address such as tcp://127.0.0.1:8786")
    if count is not None and scheduler is not None:
        raise InputError("give --workers or --scheduler, not both")
    return count, scheduler


def relations_option(f: Decorated) -> Decorated:
    """``--relations FILE``: the resumable relation file of ``--method subexp``."""
    return click.option(
        "--relations",
        "relations_file",
        type=str,
        default=None,
        metavar="FILE",
        help="With --method subexp: keep the relations in this file; a run stopped at any moment "
        "resumes from it.",
    )(f)


def refuse_sieve_options(chosen: str, relations_file: str | None, *parallel: object) -> None:
    """Refuse ``--relations``, ``--workers`` or ``--scheduler`` when the chosen method is not subexp."""
    if chosen != "subexp" and (relations_file is not None or any(x is not None for x in parallel)):
        raise InputError(
            "--relations, --workers and --scheduler belong to the sieve of --method subexp "
            f"(this order takes the {chosen} method)"
        )
