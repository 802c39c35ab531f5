"""``realquad unit d`` / ``--disc D``: fundamental unit and regulator."""

from __future__ import annotations

import click
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import (
    Command,
    IntegerRange,
    Sizer,
    check_output_path,
    emit,
    json_option,
    size_options,
    write_atomically,
)
from realquad_cli.progress import ProgressLine

from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.textio import MINUS, plural, terms_text, to_decimal
from realquad.units import METHODS, fundamental_unit


@click.command("unit", cls=Command)
@order_arguments
@click.option(
    "--digits",
    type=IntegerRange(1, 100_000),
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
    payload = eps.to_dict(expand=expanded, with_compact=compact, regulator_digits=digits)
    sizer = Sizer(max_digits)
    r = order.radicand
    n_digits = payload["digits"]
    c = payload["number"]["denominator"] if expanded else None
    shape = f"x + y√{r}" if c == 1 else f"(x + y√{r})/{c or 'c, c ∈ {1, 2}'}"
    lines = [
        f"order of discriminant {sizer.text(order.discriminant)} in Q(√{sizer.text(r)}), "
        f"conductor {sizer.text(order.conductor)}",
        f"fundamental unit ε = {shape}",
    ]
    if expanded:
        exact = eps.expand()
        lines += [f"  x = {sizer.text(int(exact.x))}", f"  y = {sizer.text(int(exact.y))}"]
    else:
        limit = f"--max-digits {max_digits}" if max_digits else f"{OUTPUT_DIGITS_LIMIT:,}"
        lines.append(
            f"  not expanded: about {plural(n_digits, 'digit')}, more than {limit}"
            " (--compact prints the compact form)"
        )
    period = "" if eps.period_length is None else f"; period length {eps.period_length:,}"
    about = "" if payload["digits_exact"] else "about "
    lines += [
        f"norm {signed_unit(eps.norm)}; x has {about}{plural(n_digits, 'digit')}{period}",
        f"regulator log ε = {reg}",
        f"method: {eps.method}; proof: {eps.proof}",
    ]
    if compact and form is not None:
        lines.append(_compact_text(form))
    if output is not None and expanded:
        exact = eps.expand()
        write_atomically(
            output,
            f"# fundamental unit of discriminant {order.discriminant}: (x + y sqrt({r}))/{c}\nx = {to_decimal(exact.x)}\ny = {to_decimal(exact.y)}\n",
        )
        payload["output"] = output
        lines.append(f"full values written to {output}")
    emit(payload, "\n".join(lines), as_json, max_digits)


def signed_unit(norm: int) -> str:
    """``+1`` or ``−1``."""
    return "+1" if norm > 0 else f"{MINUS}1"


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


def _compact_text(form: CompactRepresentation) -> str:
    D = form.discriminant
    sign = MINUS if form.sign < 0 else ""
    lines = [
        f"compact form: ε = {sign}∏ αᵢ^eᵢ over {plural(form.size, 'factor')} αᵢ = (x + y√{D})/z:"
    ]
    for chain in form.chains:
        for a, e in chain.factors:
            number = terms_text([(int(a.x), ""), (int(a.y), f"√{D}")])
            lines.append(f"  ({number})/{a.c} ^ {e}")
    return "\n".join(lines)
