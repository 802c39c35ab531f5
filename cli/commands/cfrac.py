"""``realquad cfrac EXPR``: continued fraction of a rational or quadratic irrational."""

from __future__ import annotations

import click
from realquad_cli.output import (
    Command,
    check_output_path,
    emit,
    json_option,
    write_atomically,
)

from realquad.cfrac import continued_fraction
from realquad.textio import MINUS, plural, signed


@click.command("cfrac", cls=Command)
@click.argument("expr", type=str)
@click.option(
    "--max-terms",
    type=click.IntRange(min=0),
    default=1000,
    show_default=True,
    help="Most partial quotients printed (0 = no limit).",
)
@click.option(
    "--output", type=str, default=None, metavar="FILE", help="Write all partial quotients to FILE."
)
@json_option
def command(expr: str, max_terms: int, output: str | None, as_json: bool) -> None:
    """Continued fraction of d (meaning √d), sqrt(d), (P+sqrt(D))/Q or a/b.

    Example: realquad cfrac "(1+sqrt(13))/2"
    """
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
    if output is not None:
        write_atomically(
            output,
            "preperiod "
            + " ".join(map(str, cf.preperiod))
            + "\nperiod "
            + " ".join(map(str, cf.period))
            + "\n",
        )
        payload["output"] = output
        lines.append(f"all terms written to {output}")
    emit(payload, "\n".join(lines), as_json)
