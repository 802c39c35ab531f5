"""``realquad unit d`` / ``--disc D``: fundamental unit and regulator."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.output import (
    check_output_path,
    emit,
    integer_text,
    json_option,
    put_integers,
    size_options,
    write_atomically,
)

from realquad.arith import Order, as_integer, field
from realquad.errors import InputError
from realquad.textio import decimal_digits, to_decimal
from realquad.units import fundamental_unit

ACCEPT_NEGATIVE = {"ignore_unknown_options": True}


def order_from_options(d: str | None, disc: str | None) -> Order:
    """The order named by ``d`` (its field) or ``--disc D``; exactly one must be given."""
    if (d is None) == (disc is None):
        raise InputError("give either d (for the field Q(√d)) or --disc D (for an order), not both")
    if disc is not None:
        return Order(as_integer(disc, "--disc"))
    return field(as_integer(d, "d"))


@click.command("unit", context_settings=ACCEPT_NEGATIVE)
@click.argument("d", type=str, required=False)
@click.option(
    "--disc", type=str, default=None, metavar="D", help="Discriminant of an order instead of d."
)
@click.option(
    "--digits",
    type=click.IntRange(1, 100_000),
    default=30,
    show_default=True,
    help="Significant digits of the regulator.",
)
@json_option
@size_options
def command(
    d: str | None, disc: str | None, digits: int, as_json: bool, max_digits: int, output: str | None
) -> None:
    """Fundamental unit ε = (x + y√d)/c and regulator log ε of Q(√d), or of the order of discriminant D.

    Example: realquad unit 94; realquad unit --disc 52
    """
    order = order_from_options(d, disc)
    check_output_path(output)
    eps = fundamental_unit(order)
    reg = eps.regulator(digits)
    exact = eps.expand()
    x, y, c = int(exact.x), int(exact.y), int(exact.c)
    payload: dict[str, Any] = {
        "radicand": order.radicand,
        "discriminant": order.discriminant,
        "conductor": order.conductor,
    }
    unit_obj: dict[str, Any] = {}
    cut = put_integers(unit_obj, {"x": x, "y": y}, max_digits)
    unit_obj["denominator"] = c
    payload["unit"] = unit_obj
    payload["norm"] = eps.norm
    payload["regulator"] = str(reg)
    payload["digits"] = decimal_digits(x)
    payload["period_length"] = eps.period_length
    payload["truncated"] = cut
    payload["method"] = eps.method
    payload["proof"] = eps.proof
    r = order.radicand
    shape = f"(x + y√{r})/{c}" if c != 1 else f"x + y√{r}"
    lines = [
        f"order of discriminant {order.discriminant} in Q(√{r}), conductor {order.conductor}",
        f"fundamental unit ε = {shape}",
        f"  x = {integer_text(x, max_digits)}",
        f"  y = {integer_text(y, max_digits)}",
        f"norm {eps.norm:+d}; x has {payload['digits']} digits; period length {eps.period_length}",
        f"regulator log ε = {reg}",
        f"method: {eps.method}; proof: {eps.proof}",
    ]
    if output is not None:
        write_atomically(
            output,
            f"# fundamental unit of discriminant {order.discriminant}: (x + y sqrt({r}))/{c}\nx = {to_decimal(x)}\ny = {to_decimal(y)}\n",
        )
        payload["output"] = output
        lines.append(f"full values written to {output}")
    emit(payload, "\n".join(lines), as_json)
