"""``realquad cfrac EXPR``: continued fraction of a rational or quadratic irrational."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.output import (
    ACCEPT_NEGATIVE,
    check_output_path,
    emit,
    json_option,
    write_atomically,
)

from realquad.cfrac import continued_fraction


@click.command("cfrac", context_settings=ACCEPT_NEGATIVE)
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
    payload: dict[str, Any] = {"expression": expr, "value": str(cf.value)}
    if not cf.is_rational:
        v = cf.value
        payload["normal_form"] = {"P": v.P, "D": v.D, "Q": v.Q}  # type: ignore[union-attr]
    if cut:
        keep_pre = cf.preperiod[:max_terms]
        keep_per = cf.period[: max(0, max_terms - len(keep_pre))]
        payload["preperiod"] = keep_pre
        payload["period"] = keep_per
    else:
        payload["preperiod"] = cf.preperiod
        payload["period"] = cf.period
    payload["preperiod_length"] = len(cf.preperiod)
    payload["period_length"] = len(cf.period)
    payload["truncated"] = cut
    payload["method"] = (
        "exact recurrence P' = aQ − P, Q' = (D − P'²)/Q"
        if not cf.is_rational
        else "Euclidean algorithm"
    )
    payload["proof"] = "unconditional"
    if cut:
        shown = ", ".join(map(str, (cf.preperiod + cf.period)[:max_terms]))
        text = f"{cf.value} = [{shown}, …]  (first {max_terms} of {n_terms} terms; --max-terms 0 for all)"
    else:
        text = f"{cf.value} = {cf}"
    lines = [text, f"pre-period length {len(cf.preperiod)}, period length {len(cf.period)}"]
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
