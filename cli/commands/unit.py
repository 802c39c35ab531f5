"""``realquad unit d`` / ``--disc D``: fundamental unit and regulator."""

from __future__ import annotations

from typing import Any

import click
import mpmath
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import (
    ACCEPT_NEGATIVE,
    check_output_path,
    emit,
    integer_text,
    json_option,
    put_integers,
    size_options,
    write_atomically,
)
from realquad_cli.progress import ProgressLine

from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.textio import decimal_digits, to_decimal
from realquad.units import METHODS, fundamental_unit
from realquad.units.results import Unit


@click.command("unit", context_settings=ACCEPT_NEGATIVE)
@order_arguments
@click.option(
    "--digits",
    type=click.IntRange(1, 100_000),
    default=30,
    show_default=True,
    help="Significant digits of the regulator.",
)
@click.option(
    "--method",
    type=click.Choice(METHODS),
    default="auto",
    show_default=True,
    help="cfrac: continued fraction; bsgs: baby-step giant-step in the infrastructure; auto: by size.",
)
@click.option(
    "--compact",
    is_flag=True,
    help="Also print the unit in compact form (a short product of small numbers).",
)
@json_option
@size_options
def command(
    d: str | None,
    disc: str | None,
    digits: int,
    method: str,
    compact: bool,
    as_json: bool,
    max_digits: int,
    output: str | None,
) -> None:
    """Fundamental unit ε = (x + y√d)/c and regulator log ε of Q(√d), or of the order of discriminant D.

    Example: realquad unit 94; realquad unit --disc 52; realquad unit --disc 100000000000000000129
    """
    order = order_from_options(d, disc)
    check_output_path(output)
    if compact and method == "cfrac":
        raise InputError(
            "the compact form comes from the infrastructure: use --method bsgs or auto"
        )
    if compact:
        method = "bsgs"
    with ProgressLine() as progress:
        eps = fundamental_unit(order, method, progress=progress)
        reg = eps.regulator(digits)
    form = eps.compact()
    expanded = form is None or _fits(form, max_digits, output)
    payload: dict[str, Any] = {
        "radicand": order.radicand,
        "discriminant": order.discriminant,
        "conductor": order.conductor,
    }
    unit_obj: dict[str, Any] = {}
    r = order.radicand
    if expanded:
        exact = eps.expand()
        x, y, c = int(exact.x), int(exact.y), int(exact.c)
        cut = put_integers(unit_obj, {"x": x, "y": y}, max_digits)
        n_digits = decimal_digits(x)
    else:
        x = y = 0
        c = None
        n_digits = _digits_from_regulator(eps)
        unit_obj.update(x=None, y=None, x_summary={"digits": n_digits, "exact": False})
        cut = True
    unit_obj["denominator"] = c
    payload["unit"] = unit_obj
    payload["norm"] = eps.norm
    payload["regulator"] = str(reg)
    payload["digits"] = n_digits
    payload["period_length"] = eps.period_length
    payload["truncated"] = cut
    payload["method"] = eps.method
    payload["proof"] = eps.proof
    shape = f"x + y√{r}" if c == 1 else f"(x + y√{r})/{c or 'c, c ∈ {1, 2}'}"
    lines = [
        f"order of discriminant {order.discriminant} in Q(√{r}), conductor {order.conductor}",
        f"fundamental unit ε = {shape}",
    ]
    if expanded:
        lines += [f"  x = {integer_text(x, max_digits)}", f"  y = {integer_text(y, max_digits)}"]
    else:
        limit = f"--max-digits {max_digits}" if max_digits else f"{OUTPUT_DIGITS_LIMIT:,}"
        lines.append(
            f"  not expanded: about {n_digits} digits, more than {limit}"
            " (--compact prints the compact form)"
        )
    period = "" if eps.period_length is None else f"; period length {eps.period_length}"
    lines += [
        f"norm {eps.norm:+d}; x has {'about ' if not expanded else ''}{n_digits} digits{period}",
        f"regulator log ε = {reg}",
        f"method: {eps.method}; proof: {eps.proof}",
    ]
    if compact:
        payload["compact"] = _compact_payload(form)
        lines.append(_compact_text(form))
    if output is not None and expanded:
        write_atomically(
            output,
            f"# fundamental unit of discriminant {order.discriminant}: (x + y sqrt({r}))/{c}\nx = {to_decimal(x)}\ny = {to_decimal(y)}\n",
        )
        payload["output"] = output
        lines.append(f"full values written to {output}")
    emit(payload, "\n".join(lines), as_json)


#: Largest unit expanded for ``--output`` when ``--max-digits`` is smaller.
OUTPUT_DIGITS_LIMIT = 20_000_000


def _fits(form: CompactRepresentation, max_digits: int, output: str | None) -> bool:
    n = form.digits_estimate()
    if output is not None:
        if n > OUTPUT_DIGITS_LIMIT:
            raise TooLargeError(
                f"the unit has about {n} digits, too many to write out "
                f"(limit {OUTPUT_DIGITS_LIMIT:,}); --compact prints it in compact form"
            )
        return True
    return max_digits == 0 and n <= OUTPUT_DIGITS_LIMIT or n <= max_digits


def _digits_from_regulator(eps: Unit) -> int:
    """Decimal digits of ``ε ≈ x`` from ``log ε`` (``x`` may have one digit fewer when ``c = 1``)."""
    with mpmath.workdps(40):
        return int(mpmath.floor(eps.regulator(40).value / mpmath.log(10))) + 1


def _compact_payload(form: CompactRepresentation) -> dict[str, Any]:
    return {
        "sign": form.sign,
        "chains": [
            {
                "power": chain.power,
                "factors": [
                    {"x": int(a.x), "y": int(a.y), "denominator": int(a.c), "exponent": e}
                    for a, e in chain.factors
                ],
            }
            for chain in form.chains
        ],
        "meaning": "ε = sign · ∏ over chains (∏ ((x + y√D)/denominator)^exponent)^power, D the discriminant",
    }


def _compact_text(form: CompactRepresentation) -> str:
    D = form.discriminant
    sign = "−" if form.sign < 0 else ""
    lines = [f"compact form: ε = {sign}∏ αᵢ^eᵢ over {form.size} factor(s) αᵢ = (x + y√{D})/z:"]
    for chain in form.chains:
        for a, e in chain.factors:
            op = "−" if a.y < 0 else "+"
            lines.append(f"  ({a.x} {op} {abs(a.y)}√{D})/{a.c} ^ {e}")
    return "\n".join(lines)
