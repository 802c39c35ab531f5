"""Rendering shared by every command: JSON, LaTeX, bounded integers, atomic output files.

Every command builds its ``--json`` from the result objects' ``to_dict()``
(``docs/json.md``) and passes it through :class:`Sizer`: an integer of more
than ``--max-digits`` decimal digits is replaced, wherever it stands, by a
summary object ``{"digits": k, "leading": "…", "trailing": "…"}``, and the
payload says ``"truncated": true``. Text output uses the same sizes
(:meth:`Sizer.text`) and the house style of :mod:`realquad.textio`. With
``--latex`` a command prints its result as LaTeX instead (:mod:`realquad.latex`,
integers beyond ``--max-digits`` summarised the same way).
"""

from __future__ import annotations

import json
import os
import re
import stat
import tempfile
from collections.abc import Callable
from typing import Any, TypeVar

import click

from realquad.core.integers import as_integer
from realquad.errors import InputError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.latex import MAX_DIGITS
from realquad.textio import MINUS, integer_summary, plural, signed, terms_text, to_decimal

F = TypeVar("F", bound=Callable[..., Any])

#: A token that is a negative number (``-5``, ``-1/2``), not an option: no option starts with a digit.
_NEGATIVE = re.compile(r"-[0-9]")


class Command(click.Command):
    """A command whose arguments may be negative numbers, and whose options are checked strictly.

    A token such as ``-5`` is a value, never an option (its minus becomes the
    minus sign ``−``, which every parser of the package reads as minus); an
    unknown option is "no such option" with the nearest name; an option given
    twice is an error instead of the last one silently winning.
    """

    def invoke(self, ctx: click.Context) -> Any:
        """Run the command, once ``--latex`` is known not to clash with ``--json`` or ``--csv``."""
        if ctx.meta.get(LATEX) and (ctx.params.get("as_json") or ctx.params.get("as_csv")):
            other = "--json" if ctx.params.get("as_json") else "--csv"
            raise InputError(f"give --latex or {other}, not both")
        return super().invoke(ctx)

    def parse_args(self, ctx: click.Context, args: list[str]) -> list[str]:
        args = [MINUS + a[1:] if _NEGATIVE.match(a) else a for a in args]
        self._refuse_repeats(args)
        return super().parse_args(ctx, args)

    def _refuse_repeats(self, args: list[str]) -> None:
        names: dict[str, str] = {}
        for param in self.params:
            if isinstance(param, click.Option) and not param.multiple and not param.count:
                for name in (*param.opts, *param.secondary_opts):
                    names[name] = param.opts[0]
        seen: set[str] = set()
        for arg in args:
            if arg == "--":
                break
            option = names.get(arg.split("=", 1)[0])
            if option is not None:
                if option in seen:
                    raise click.UsageError(f"option {option} is given more than once")
                seen.add(option)


class IntegerRange(click.ParamType):
    """An integer option read like every integer of the package (:func:`realquad.core.integers.as_integer`:
    ASCII digits only, ``−`` as minus), within ``[low, high]``."""

    name = "integer"

    def __init__(self, low: int | None = None, high: int | None = None) -> None:
        self.low, self.high = low, high

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> int:
        if isinstance(value, int):
            number = value
        else:
            name = param.opts[0] if isinstance(param, click.Option) else "value"
            try:
                number = as_integer(value, name)
            except InputError as exc:
                self.fail(str(exc), param, ctx)
        if (self.low is not None and number < self.low) or (
            self.high is not None and number > self.high
        ):
            self.fail(f"{number} is not in the range {self._range()}", param, ctx)
        return number

    def _range(self) -> str:
        low = "" if self.low is None else f"{self.low} ≤ "
        high = "" if self.high is None else f" ≤ {self.high}"
        return f"{low}x{high}"

    def __repr__(self) -> str:
        return f"IntegerRange({self.low}, {self.high})"

    def get_metavar(self, param: click.Parameter, ctx: click.Context | None = None) -> str:  # type: ignore[override]
        return f"INTEGER RANGE [{self._range()}]"


class Group(click.Group):
    """A group of :class:`Command` subcommands (``command_class``)."""

    command_class = Command


def dumps(obj: Any) -> str:
    """JSON text of ``obj`` with integers of any size written exactly."""
    return Sizer(0).json(obj)


class Sizer:
    """``--max-digits`` for many integers at once: each distinct integer is sized once.

    The leading and trailing digits of a long integer come from one division
    and one remainder instead of a full decimal conversion, and an integer
    shared by many places (the automorph of every family of a norm equation)
    is sized and converted once.
    """

    def __init__(self, max_digits: int) -> None:
        self.max_digits = max_digits
        self.cut = False
        self._summaries: dict[int, tuple[int, dict[str, Any] | None]] = {}
        self._decimals: dict[int, tuple[int, str]] = {}

    def summary(self, n: int) -> dict[str, Any] | None:
        """``None`` if ``n`` has at most ``max_digits`` digits (0: no limit), else its summary."""
        if self.max_digits == 0 or -(10**18) < n < 10**18:  # the quick case of integer_summary
            return None
        hit = self._summaries.get(id(n))
        if hit is not None and hit[0] is n:
            return hit[1]
        found = integer_summary(n, self.max_digits)
        out = None
        if found is not None:
            k, leading, trailing = found
            out = {"digits": k, "leading": leading, "trailing": trailing}
        self._summaries[id(n)] = (n, out)
        return out

    def bounded(self, obj: Any) -> Any:
        """``obj`` with every integer beyond ``max_digits`` replaced by its summary (sets :attr:`cut`)."""
        if isinstance(obj, dict):
            return {k: self.bounded(v) for k, v in obj.items()}
        if isinstance(obj, (list, tuple)):
            return [self.bounded(v) for v in obj]
        if isinstance(obj, int) and not isinstance(obj, bool) or type(obj).__name__ == "mpz":
            summary = self.summary(obj)
            if summary is not None:
                self.cut = True
                return summary
        return obj

    def digits(self, n: int) -> str:
        """The decimal digits of ``n``, converted once per distinct big integer."""
        if -(10**1000) < n < 10**1000:
            return to_decimal(n)
        hit = self._decimals.get(id(n))
        if hit is None or hit[0] is not n:
            hit = (n, to_decimal(n))
            self._decimals[id(n)] = hit
        return hit[1]

    def json(self, obj: Any) -> str:
        """JSON text of ``obj``, each big integer converted exactly and once."""
        if obj is None or isinstance(obj, (bool, str, float)):
            return json.dumps(obj, ensure_ascii=False)
        if isinstance(obj, int) or type(obj).__name__ == "mpz":
            return self.digits(obj)
        if isinstance(obj, dict):
            return (
                "{"
                + ", ".join(f"{json.dumps(str(k))}: {self.json(v)}" for k, v in obj.items())
                + "}"
            )
        if isinstance(obj, (list, tuple)):
            return "[" + ", ".join(self.json(v) for v in obj) + "]"
        return json.dumps(str(obj), ensure_ascii=False)

    def text(self, n: int) -> str:
        """The integer in full (minus sign ``−``), or its leading and trailing digits and digit count."""
        summary = self.summary(n)
        sign = MINUS if n < 0 else ""
        if summary is None:
            return sign + self.digits(abs(n))
        return (
            f"{sign}{summary['leading']}…{summary['trailing']} ({summary['digits']:,} digits; "
            "--max-digits 0 or --output FILE for all)"
        )


def integer_text(n: int, max_digits: int) -> str:
    """The integer in full, or its leading and trailing digits and digit count (:meth:`Sizer.text`)."""
    return Sizer(max_digits).text(n)


def _target(path: str) -> str:
    """The file ``--output`` writes: ``path``, or the file a symbolic link points to."""
    return os.path.realpath(path) if os.path.islink(path) else path


def write_atomically(path: str, text: str) -> None:
    """Write ``text`` to ``path`` through a temporary file and a rename (never half-written).

    An existing regular file is replaced and keeps its permission bits; a new
    one gets the umask's; a symbolic link keeps pointing where it did, and the
    file it points to is written. Anything that fails is one
    :class:`~realquad.errors.InputError` line, and no temporary file is left.
    """
    check_output_path(path)
    target = _target(path)
    directory = os.path.dirname(os.path.abspath(target)) or "."
    try:
        mode = stat.S_IMODE(os.stat(target).st_mode) if os.path.exists(target) else _new_file_mode()
        fd, tmp = tempfile.mkstemp(prefix=".realquad-", dir=directory)
    except OSError as exc:
        raise InputError(f"cannot write {path!r}: {exc.strerror or exc}") from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise InputError(f"cannot write {path!r}: {exc.strerror or exc}") from None
        raise


def _new_file_mode() -> int:
    """``0o666`` less the process's umask (read without changing it for good)."""
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def check_output_path(path: str | None) -> None:
    """Fail early (before computing) if ``path`` cannot be written as a regular file.

    Refused: an empty name, a directory, a device node, a FIFO, a socket, a
    path in a missing or unwritable directory, a name the system refuses.
    """
    if path is None:
        return
    if not path.strip():
        raise InputError("--output needs a file name")
    target = _target(path)
    try:
        if os.path.exists(target):
            info = os.stat(target)
            if stat.S_ISDIR(info.st_mode):
                raise InputError(f"cannot write {path!r}: it is a directory")
            if not stat.S_ISREG(info.st_mode):
                raise InputError(
                    f"cannot write {path!r}: not a regular file (a device, FIFO or socket is "
                    "never replaced)"
                )
        directory = os.path.dirname(os.path.abspath(target)) or "."
        if not os.path.isdir(directory):
            raise InputError(f"cannot write {path!r}: no such directory")
        if not os.access(directory, os.W_OK):
            raise InputError(f"cannot write {path!r}: permission denied")
        name_max = os.pathconf(directory, "PC_NAME_MAX")
    except OSError as exc:
        raise InputError(f"cannot write {path!r}: {exc.strerror or exc}") from None
    if len(os.path.basename(target).encode()) > name_max:
        raise InputError(f"cannot write {path!r}: the file name is longer than {name_max} bytes")


#: The key of ``click.Context.meta`` that holds the ``--latex`` flag (read by :func:`emit`).
LATEX = "realquad.latex"


def _remember_latex(ctx: click.Context, param: click.Parameter, value: bool) -> None:
    ctx.meta[LATEX] = value


def json_option(f: F) -> F:
    """``--json`` and ``--latex``: the two other forms of every command's output.

    ``--json`` reaches the command as ``as_json``; ``--latex`` is kept in the
    context for :func:`emit`, so that a command only passes its LaTeX there.
    """
    f = click.option(
        "--latex",
        is_flag=True,
        expose_value=False,
        callback=_remember_latex,
        help="Print the result as LaTeX (amsmath, amssymb) to paste into a paper.",
    )(f)
    return click.option(
        "--json", "as_json", is_flag=True, help="Print one JSON object instead of text."
    )(f)


def latex_wanted() -> bool:
    """Whether the running command was given ``--latex``."""
    ctx = click.get_current_context(silent=True)
    return bool(ctx is not None and ctx.meta.get(LATEX))


def max_digits_option(f: F) -> F:
    """``--max-digits K``: the longest integer printed in full (0 = no limit)."""
    return click.option(
        "--max-digits",
        type=IntegerRange(0),
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


def prime_options(f: F) -> F:
    """``--primes-up-to B`` or ``--prime P``: the primes a command answers for (read by :func:`read_primes`)."""
    f = click.option(
        "--prime", "prime", type=str, default=None, metavar="P", help="Only the prime P."
    )(f)
    return click.option(
        "--primes-up-to",
        "bound",
        type=str,
        default=None,
        metavar="B",
        help="Every prime p ≤ B (default 50).",
    )(f)


def read_primes(bound: str | None, prime: str | None, max_bound: int) -> tuple[int, int | None]:
    """``(B, P)`` from :func:`prime_options`: ``P`` alone when given, else every prime ``≤ B`` (default 50)."""
    if bound is not None and prime is not None:
        raise InputError("give either --primes-up-to B or --prime P, not both")
    if prime is not None:
        return 50, as_integer(prime, "--prime")
    B = 50 if bound is None else as_integer(bound, "--primes-up-to")
    if B < 2 or B > max_bound:
        raise InputError(f"--primes-up-to must be between 2 and {max_bound:,}, got {B}")
    return B, None


def emit(
    payload: dict[str, Any],
    text: str,
    as_json: bool,
    max_digits: int | None = None,
    latex: Callable[[int], str] | None = None,
) -> None:
    """Print the JSON object, the LaTeX (``--latex``) or the text form.

    A command with ``--max-digits`` passes it: integers beyond it are
    summarised and the payload gets ``"truncated"`` (whether anything was).
    ``latex(max_digits)`` writes the result as LaTeX (a command without
    ``--max-digits`` gets :data:`realquad.latex.MAX_DIGITS`); a file written
    by ``--output`` is named in a comment after it.
    """
    if latex_wanted():
        if latex is None:  # pragma: no cover - every command passes its LaTeX
            raise InputError("this command has no LaTeX form")
        written = payload.get("output")
        note = f"\n% full values written to {written}" if written else ""
        click.echo(latex(MAX_DIGITS if max_digits is None else max_digits) + note)
        return
    if not as_json:
        click.echo(text)
        return
    sizer = Sizer(max_digits or 0)
    bounded = sizer.bounded(payload)
    if max_digits is not None:
        bounded["truncated"] = sizer.cut
    click.echo(sizer.json(bounded))


def compact_text(form: CompactRepresentation, name: str) -> str:
    """The compact representation as lines: ``name = ±∏ αᵢ^eᵢ`` and one line per factor."""
    D = form.discriminant
    sign = MINUS if form.sign < 0 else ""
    lines = [
        f"compact form: {name} = {sign}∏ αᵢ^eᵢ over {plural(form.size, 'factor')} αᵢ = (x + y√{D})/z:"
    ]
    for chain in form.chains:
        if chain.power != 1:
            count = plural(len(chain.factors), "factor")
            lines.append(
                f"  the product of the next {count}, raised to the power {signed(chain.power)}:"
            )
        for a, e in chain.factors:
            number = terms_text([(int(a.x), ""), (int(a.y), f"√{D}")])
            lines.append(f"  ({number})/{a.c} ^ {e}")
    return "\n".join(lines)
