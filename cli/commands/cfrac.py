"""``realquad cfrac EXPR``: continued fraction of a rational or quadratic irrational.

With ``--convergents K`` also its first ``K`` convergents, with ``--best B``
its best rational approximations with denominator at most ``B``.
"""

from __future__ import annotations

import itertools
from collections.abc import Iterable, Iterator
from typing import Any

import click
from realquad_cli.output import (
    Command,
    IntegerRange,
    Sizer,
    check_output_path,
    emit,
    json_option,
    max_digits_option,
    write_atomically,
)

from realquad.cfrac import Approximation, best_approximations, continued_fraction, convergents
from realquad.core.integers import as_integer
from realquad.errors import InputError, TooLargeError
from realquad.latex import display, integer, rational
from realquad.latex import lines as lines_latex
from realquad.textio import MINUS, plural, signed, to_decimal

KIND_NAMES = {
    1: "first kind (closest p/q: convergents and intermediate fractions)",
    2: "second kind (smallest |qx − p|: convergents)",
}
#: Most decimal digits of all the fractions of one list together (kept in memory, then printed).
MAX_LIST_DIGITS = 100_000_000
MAX_LIST_BITS = int(MAX_LIST_DIGITS * 3.3219280948873626)  # log₂ 10
DIGITS_ADVICE = "(long integers summarised; --max-digits 0 or --output FILE for all)"


class _FractionWriter:
    """Fractions as JSON objects and text, integers beyond ``--max-digits`` summarised."""

    def __init__(self, max_digits: int) -> None:
        self.sizer = Sizer(max_digits)

    def entry(self, p: int, q: int, **extra: Any) -> dict[str, Any]:
        """``{"p": …, "q": …}``; a too-long integer becomes its summary object in place."""
        return {**self.sizer.bounded({"p": p, "q": q}), **extra}

    def integer(self, n: int) -> str:
        summary = self.sizer.summary(n)
        if summary is None:
            return signed(n)
        self.sizer.cut = True
        sign = MINUS if n < 0 else ""
        return f"{sign}{summary['leading']}…{summary['trailing']} ({summary['digits']:,} digits)"

    def text(self, p: int, q: int) -> str:
        return f"{self.integer(p)}/{self.integer(q)}"


def _first(items: Iterable[Any], max_terms: int) -> tuple[list[Any], bool]:
    """The first ``max_terms`` items (all for 0) and whether there were more."""
    if max_terms == 0:
        return list(items), False
    kept = list(itertools.islice(items, max_terms + 1))
    return kept[:max_terms], len(kept) > max_terms


def _within_budget(fractions: Iterable[Any], option: str) -> Iterator[Any]:
    """The fractions ``(p, q, …)``, stopping with TooLargeError past MAX_LIST_DIGITS digits in all."""
    bits = 0
    for item in fractions:
        bits += item[0].bit_length() + item[1].bit_length()
        if bits > MAX_LIST_BITS:
            raise TooLargeError(
                f"the fractions asked for hold more than {MAX_LIST_DIGITS:,} digits in all; "
                f"give a smaller {option} (or a smaller --max-terms)"
            )
        yield item


def _positive(text: str, name: str) -> int:
    n = as_integer(text, name)
    if n < 1:
        raise InputError(f"{name} must be a positive integer, got {signed(n)}")
    return n


def _file_line(name: str, pairs: Iterable[tuple[int, int]]) -> str:
    """``name p/q p/q …`` with integers of any size in full (not through ``str``)."""
    return name + " " + " ".join(f"{to_decimal(p)}/{to_decimal(q)}" for p, q in pairs)


@click.command("cfrac", cls=Command)
@click.argument("expr", type=str)
@click.option(
    "--max-terms",
    type=IntegerRange(0),
    default=1000,
    show_default=True,
    help="Most partial quotients, convergents or approximations printed (0 = no limit).",
)
@click.option(
    "--convergents",
    "n_convergents",
    type=str,
    default=None,
    metavar="K",
    help="Also print the first K convergents p/q.",
)
@click.option(
    "--best",
    "best",
    type=str,
    default=None,
    metavar="B",
    help="Also print the best rational approximations with denominator at most B.",
)
@click.option(
    "--kind",
    type=IntegerRange(1, 2),
    default=1,
    show_default=True,
    help="With --best: 1 = closest p/q (convergents and intermediate fractions), "
    "2 = smallest |qx − p| (convergents).",
)
@max_digits_option
@click.option(
    "--output",
    type=str,
    default=None,
    metavar="FILE",
    help="Write all partial quotients (and the fractions asked for, in full) to FILE.",
)
@json_option
def command(
    expr: str,
    max_terms: int,
    n_convergents: str | None,
    best: str | None,
    kind: int,
    max_digits: int,
    output: str | None,
    as_json: bool,
) -> None:
    """Continued fraction of d (meaning √d), sqrt(d), (P+sqrt(D))/Q or a/b.

    Example: realquad cfrac "(1+sqrt(13))/2"; realquad cfrac 61 --convergents 12 --best 1000
    """
    count = None if n_convergents is None else _positive(n_convergents, "--convergents")
    bound = None if best is None else _positive(best, "--best")
    check_output_path(output)
    cf = continued_fraction(expr)
    n_terms = len(cf.preperiod) + len(cf.period)
    cut = max_terms != 0 and n_terms > max_terms
    payload = {"expression": expr, **cf.to_dict(max_terms), "truncated": cut}
    value = str(cf.value).replace("-", MINUS)
    if cut:
        shown = ", ".join(signed(a) for a in (cf.preperiod + cf.period)[:max_terms])
        text = f"{value} = [{shown}, …]  (first {max_terms:,} of {n_terms:,} terms; --max-terms 0 for all)"
    else:
        text = f"{value} = {str(cf).replace('-', MINUS)}"
    lines = [
        text,
        f"a rational number: {plural(len(cf.preperiod), 'partial quotient')}, no period"
        if cf.is_rational
        else f"pre-period length {len(cf.preperiod):,}, period length {len(cf.period):,}",
    ]
    file_lines = [
        "preperiod " + " ".join(map(str, cf.preperiod)),
        "period " + " ".join(map(str, cf.period)),
    ]
    writer = _FractionWriter(max_digits)
    latex_rows = [lambda md: cf.to_latex(md, max_terms)]
    if count is not None:
        wanted = _within_budget(convergents(cf.value, count), "--convergents")
        every = list(wanted) if output is not None else None
        pairs, more = _first(every if every is not None else wanted, max_terms)
        payload["convergents"] = [writer.entry(p, q) for p, q in pairs]
        payload["convergents_truncated"] = more
        lines.append(
            f"convergents p_k/q_k, k = 0..{len(pairs) - 1}"
            + (f" (first {len(pairs):,}; --max-terms 0 for all {count:,})" if more else "")
            + ":"
        )
        lines += [f"{k:>6}  {writer.text(p, q)}" for k, (p, q) in enumerate(pairs)]
        latex_rows.append(lambda md: _fractions_latex(r"\frac{p_{k}}{q_{k}}", pairs, more, md))
        if every is not None:
            file_lines.append(_file_line("convergents", every))
    if bound is not None:
        found = _within_budget(
            best_approximations(cf.value, bound, 1 if kind == 1 else 2), "--best"
        )
        every_best = list(found) if output is not None else None
        approx, more = _first(every_best if every_best is not None else found, max_terms)
        payload["best_approximations"] = [_approximation_entry(writer, a) for a in approx]
        payload["best_approximations_kind"] = kind
        payload["best_approximations_truncated"] = more
        lines.append(
            f"best approximations of the {KIND_NAMES[kind]} with q ≤ {writer.integer(bound)}"
            + (f" (first {len(approx):,}; --max-terms 0 for all)" if more else "")
            + ":"
        )
        lines += [
            f"  {writer.text(a.p, a.q)}"
            + ("" if a.is_convergent else f"  (intermediate, t = {a.t} of a_{a.k} = {a.a})")
            for a in approx
        ]
        chosen = [(a.p, a.q) for a in approx]
        latex_rows.append(
            lambda md: _fractions_latex(rf"q \le {integer(bound, md)}", chosen, more, md)
        )
        if every_best is not None:
            file_lines.append(_file_line("best", ((a.p, a.q) for a in every_best)))
    if writer.sizer.cut:
        lines.append(DIGITS_ADVICE)
    if output is not None:
        write_atomically(output, "\n".join(file_lines) + "\n")
        payload["output"] = output
        lines.append(f"all terms written to {output}")
    emit(
        payload,
        "\n".join(lines),
        as_json,
        latex=lambda md: display(lines_latex([row(md) for row in latex_rows]), cf.latex_note()),
    )


#: Fractions written on one line of the LaTeX.
FRACTIONS_PER_ROW = 8


def _fractions_latex(label: str, pairs: list[tuple[int, int]], more: bool, max_digits: int) -> str:
    r"""``label:\ \frac{p}{q}, …`` over rows (``\ldots`` when the list was cut)."""
    cells = [rational(p, q, max_digits) for p, q in pairs] + ([r"\ldots"] if more else [])
    step = FRACTIONS_PER_ROW
    rows = [",\\ ".join(cells[i : i + step]) for i in range(0, len(cells), step)] or [""]
    rows = [row + "," for row in rows[:-1]] + rows[-1:]
    return lines_latex([rf"{label}:\quad {rows[0]}", *rows[1:]])


def _approximation_entry(writer: _FractionWriter, a: Approximation) -> dict[str, Any]:
    return writer.entry(a.p, a.q, convergent=a.is_convergent)
