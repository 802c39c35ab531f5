"""Rendering shared by every command: JSON, bounded integers, atomic output files."""

from __future__ import annotations

import json
import os
import tempfile
from collections.abc import Callable
from typing import Any, TypeVar

import click
import gmpy2

from realquad.textio import decimal_digits, to_decimal

F = TypeVar("F", bound=Callable[..., Any])

#: Context settings of every command: a token like ``-5`` reaches the argument
#: (and its one-line error) instead of being taken for an unknown option.
ACCEPT_NEGATIVE = {"ignore_unknown_options": True}


def dumps(obj: Any) -> str:
    """JSON text of ``obj`` with integers of any size written exactly."""
    if obj is None or isinstance(obj, (bool, str, float)):
        return json.dumps(obj, ensure_ascii=False)
    if isinstance(obj, int) or type(obj).__name__ == "mpz":
        return to_decimal(obj)
    if isinstance(obj, dict):
        return "{" + ", ".join(f"{json.dumps(str(k))}: {dumps(v)}" for k, v in obj.items()) + "}"
    if isinstance(obj, (list, tuple)):
        return "[" + ", ".join(dumps(v) for v in obj) + "]"
    return json.dumps(str(obj), ensure_ascii=False)


def bounded_integer(n: int, max_digits: int) -> tuple[int | None, dict[str, Any] | None]:
    """``(n, None)`` if it has at most ``max_digits`` digits (0 = no limit), else a summary."""
    if max_digits == 0 or abs(n) < 10**18:
        return n, None
    k = decimal_digits(n)
    if k <= max_digits:
        return n, None
    text = to_decimal(abs(gmpy2.mpz(n)))
    edge = 20
    return None, {"digits": k, "leading": text[:edge], "trailing": text[-edge:]}


def integer_text(n: int, max_digits: int, hint: bool = True) -> str:
    """The integer in full, or its leading and trailing digits and digit count.

    ``hint=False`` leaves out the advice on how to see all digits (for lists,
    which give it once).
    """
    value, summary = bounded_integer(n, max_digits)
    if summary is None:
        return to_decimal(n)
    sign = "-" if n < 0 else ""
    advice = "; --max-digits 0 or --output FILE for all" if hint else ""
    return f"{sign}{summary['leading']}…{summary['trailing']} ({summary['digits']} digits{advice})"


def put_integers(payload: dict[str, Any], values: dict[str, int], max_digits: int) -> bool:
    """Store integers in ``payload``; too-long ones become ``None`` plus ``<key>_summary``.

    Returns whether anything was cut.
    """
    cut = False
    for key, n in values.items():
        value, summary = bounded_integer(n, max_digits)
        payload[key] = value
        if summary is not None:
            payload[f"{key}_summary"] = summary
            cut = True
    return cut


def write_atomically(path: str, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename (never half-written)."""
    directory = os.path.dirname(os.path.abspath(path)) or "."
    fd, tmp = tempfile.mkstemp(prefix=".realquad-", dir=directory)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


def check_output_path(path: str | None) -> None:
    """Fail early (before computing) if ``path`` cannot be written."""
    if path is None:
        return
    directory = os.path.dirname(os.path.abspath(path)) or "."
    if not os.path.isdir(directory):
        raise click.UsageError(f"cannot write {path!r}: no such directory")
    if os.path.isdir(path):
        raise click.UsageError(f"cannot write {path!r}: it is a directory")
    if not os.access(directory, os.W_OK):
        raise click.UsageError(f"cannot write {path!r}: permission denied")


def json_option(f: F) -> F:
    return click.option(
        "--json", "as_json", is_flag=True, help="Print one JSON object instead of text."
    )(f)


def max_digits_option(f: F) -> F:
    """``--max-digits K``: the longest integer printed in full (0 = no limit)."""
    return click.option(
        "--max-digits",
        type=click.IntRange(min=0),
        default=1000,
        show_default=True,
        help="Longest integer printed in full; longer ones are summarised (0 = no limit).",
    )(f)


def size_options(f: F) -> F:
    """``--max-digits K`` and ``--output FILE``, shared by commands that print big integers."""
    f = click.option(
        "--output",
        "output",
        type=str,
        default=None,
        metavar="FILE",
        help="Write the full values to FILE (whatever --max-digits says).",
    )(f)
    return max_digits_option(f)


def emit(payload: dict[str, Any], text: str, as_json: bool) -> None:
    """Print the JSON object or the text form."""
    click.echo(dumps(payload) if as_json else text)
