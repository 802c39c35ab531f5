"""``realquad unit d`` / ``--disc D``: fundamental unit and regulator."""

from __future__ import annotations

import click
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import (
    Command,
    IntegerRange,
    Sizer,
    check_output_path,
    compact_text,
    emit,
    json_option,
    size_options,
    write_atomically,
)
from realquad_cli.parallel import (
    parallel_options,
    parse_parallel,
    refuse_sieve_options,
    relations_option,
)
from realquad_cli.progress import ProgressLine

from realquad.core.orders import Order
from realquad.errors import InputError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.latex import display, lines, text
from realquad.textio import MINUS, plural, signed, to_decimal
from realquad.units import (
    METHODS,
    UNIT_PERIOD_LIMIT,
    Unit,
    choose_method,
    fundamental_unit,
    unit_group,
)


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
    help="cfrac: continued fraction; bsgs: baby-step giant-step in the infrastructure "
    "(unconditional); subexp: index calculus with a sieve (fields from 10¹⁰ on, under GRH); "
    "auto: by size.",
)
@click.option(
    "--compact",
    is_flag=True,
    help="Also print the unit in compact form (a short product of small numbers).",
)
@relations_option
@parallel_options("sieving")
@json_option
@size_options
def command(
    d: str | None,
    disc: str | None,
    digits: int,
    method: str,
    compact: bool,
    relations_file: str | None,
    workers: str | None,
    scheduler: str | None,
    as_json: bool,
    max_digits: int,
    output: str | None,
) -> None:
    """Fundamental unit ε = (x + y√d)/c and regulator log ε of Q(√d), or of the order of discriminant D.

    Example: realquad unit 94; realquad unit --disc 52; realquad unit --disc 100000000000000000129;
    realquad unit 10000000000000000000000000000000000000121 --method subexp
    """
    order = order_from_options(d, disc)
    if not order.is_real:
        _roots_of_unity(order, as_json)
        return
    check_output_path(output)
    if compact and method == "cfrac":
        raise InputError(
            "the compact form comes from the infrastructure: use --method bsgs or auto"
        )
    chosen = choose_method(order, method, UNIT_PERIOD_LIMIT)
    if compact and chosen == "cfrac":
        method = chosen = "bsgs"
    count, scheduler = parse_parallel(workers, scheduler)
    refuse_sieve_options(chosen, relations_file, count, scheduler)
    with ProgressLine() as progress:
        eps = fundamental_unit(
            order,
            method,
            progress=progress,
            workers=count,
            scheduler=scheduler,
            relations_file=relations_file,
        )
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
    if compact and form is not None and form.size > SHOWN_FACTORS:
        lines.append(
            f"compact form: ε is a product of {plural(form.size, 'power')} of numbers "
            "(x + y√D)/z, too many to print; --output FILE writes them"
        )
    elif compact and form is not None:
        lines.append(compact_text(form, "ε"))
    if output is not None and expanded:
        exact = eps.expand()
        write_atomically(
            output,
            f"# fundamental unit of discriminant {order.discriminant}: (x + y sqrt({r}))/{c}\nx = {to_decimal(exact.x)}\ny = {to_decimal(exact.y)}\n",
        )
        payload["output"] = output
        lines.append(f"full values written to {output}")
    elif output is not None and form is not None:
        D = order.discriminant
        write_atomically(output, form.to_text(D, 2, f"fundamental unit (x + y*sqrt(d))/2, d = {D}"))
        payload["output"] = output
        lines.append(f"the compact form of 2ε = x + y√{sizer.text(D)} written to {output}")
    emit(
        payload,
        "\n".join(lines),
        as_json,
        max_digits,
        latex=lambda md: _latex(eps, digits, compact, md),
    )


def _roots_of_unity(order: Order, as_json: bool) -> None:
    """An imaginary order: its units are the roots of unity; the regulator is 0 by convention."""
    group = unit_group(order)
    text = "\n".join(
        [
            f"imaginary order of discriminant {signed(order.discriminant)} in "
            f"Q(√{signed(order.radicand)}), conductor {order.conductor}",
            f"no unit of infinite order: the units are the {group.roots_of_unity} roots of unity, "
            f"generated by {group.generator}",
            "regulator 0 (by convention, for a unit group of rank 0)",
            f"method: {group.method}; proof: {group.proof}",
        ]
    )
    emit(group.to_dict(), text, as_json, latex=group.to_latex_display)


def _latex(eps: Unit, digits: int, compact: bool, max_digits: int) -> str:
    """The unit, its norm and regulator; the compact form too with ``--compact`` or when the
    unit is not expanded."""
    body = eps.to_latex(max_digits, digits)
    form = eps.compact()
    if form is not None and form.size > SHOWN_FACTORS:
        body = lines([body, text(f"compact form: a product of {form.size} powers (see --output)")])
    elif form is not None and (compact or not eps.expands_within(max_digits)):
        body = lines([body, rf"\varepsilon = {form.to_latex(max_digits)}"])
    return display(body, eps.latex_note())


def signed_unit(norm: int) -> str:
    """``+1`` or ``−1``."""
    return "+1" if norm > 0 else f"{MINUS}1"


#: Most factors of a compact form printed with ``--compact`` (index calculus gives thousands).
SHOWN_FACTORS = 100

#: Largest unit expanded for ``--output`` when ``--max-digits`` is smaller.
OUTPUT_DIGITS_LIMIT = 20_000_000


def _fits(form: CompactRepresentation, max_digits: int, output: str | None) -> bool:
    n = form.digits_estimate()
    if output is not None:
        return n <= OUTPUT_DIGITS_LIMIT  # beyond: the compact file is written instead
    return max_digits == 0 and n <= OUTPUT_DIGITS_LIMIT or n <= max_digits
