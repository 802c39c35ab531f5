"""``realquad split d`` / ``--disc D``: how primes decompose and where their prime ideals lie."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.orders import order_arguments, order_from_options
from realquad_cli.output import (
    Command,
    IntegerRange,
    Sizer,
    emit,
    json_option,
    prime_options,
    read_primes,
)

from realquad.classgroup import ClassGroup
from realquad.core.forms import Form
from realquad.latex import display
from realquad.latex import lines as lines_latex
from realquad.splitting import PrimeDecomposition, decompose_prime, split_primes
from realquad.splitting.decomposition import group_for_primes
from realquad.splitting.prime_classes import METHOD_LOCATED, coordinate_digits
from realquad.textio import group_text, plural, signed, terms_text

#: Largest bound accepted by --primes-up-to.
MAX_BOUND = 10**7


def _form_text(F: Form) -> str:
    return f"({signed(F.a)}, {signed(F.b)}, {signed(F.c)})"


def _polynomial(F: Form) -> str:
    """``x² + bxy + cy²`` written out with signs."""
    return terms_text([(F.a, "x²"), (F.b, "xy"), (F.c, "y²")])


def _line(s: PrimeDecomposition, principal: Form, sizer: Sizer) -> str:
    if s.divides_conductor:
        return f"p = {s.p}: divides the conductor (no invertible prime ideal of norm {s.p}; {s.field_kind} in the field)"
    ideals = " · ".join(str(i) for i in s.ideals)
    if s.kind == "inert":
        return f"p = {s.p}: inert, pO = {ideals} (principal)"
    coords = ", ".join(str(c) for c in s.classes)
    x = sizer.text(s.x or 0)
    y = sizer.text(s.y or 0)
    narrowly = "" if principal.discriminant < 0 else "narrowly "  # D < 0: narrow = wide
    if s.represented_by_principal and s.compact is not None:
        how = (
            f"{narrowly}principal: {s.p} = {_polynomial(principal)} at x + y(b₀ + √D)/2 = α, "
            f"α in compact form ({plural(s.compact.size, 'factor')}, about "
            f"{coordinate_digits(s.compact):,} digits)"
        )
    elif s.represented_by_principal:
        how = f"{narrowly}principal: {s.p} = {_polynomial(principal)} at x = {x}, y = {y}"
    else:
        assert s.form is not None
        how = f"not {narrowly}principal; {_form_text(s.form)} represents {s.p} at x = {x}, y = {y}"
    kinds = "narrow classes" if narrowly else "classes"
    return f"p = {s.p}: {s.kind}, ideals {ideals}; {kinds} {coords}; {how}"


def _method(G: ClassGroup) -> str:
    if G.lists_classes:
        return G.method
    if G.locates_classes:
        return f"{G.method}; classes of prime ideals by relations through them"
    return f"{G.method}; {METHOD_LOCATED}"


@click.command("split", cls=Command)
@order_arguments
@prime_options
@click.option(
    "--max-digits",
    type=IntegerRange(0),
    default=1000,
    show_default=True,
    help="Longest x, y printed in full; longer ones are summarised (0 = no limit).",
)
@json_option
def command(
    d: str | None,
    disc: str | None,
    bound: str | None,
    prime: str | None,
    max_digits: int,
    as_json: bool,
) -> None:
    """Decomposition of primes in Q(√d) (or the order of discriminant D) and the classes of their prime ideals.

    Classes are coordinates on the generators printed by `realquad classgroup`.
    For d < 0 a prime p is x² + b₀xy + c₀y² exactly when its class is principal.
    Example: realquad split 79 --primes-up-to 30; realquad split --disc 316 --prime 5;
    realquad split -14 --primes-up-to 30
    """
    order = order_from_options(d, disc)
    B, p = read_primes(bound, prime, MAX_BOUND)
    G = group_for_primes(order)
    results = [decompose_prime(order, p, G)] if p is not None else split_primes(order, B, G)
    principal = Form.identity(order.discriminant)
    payload: dict[str, Any] = {
        "order": order.to_dict(),
        "principal_form": principal.to_dict(),
        "class_group": G.to_dict(),
        "primes": [s.to_dict() for s in results],
        "method": _method(G),
        "proof": G.proof,
    }
    gens = ", ".join(
        f"{_form_text(F)} of order {n}"
        for F, n in zip(G.narrow_generators, G.narrow_invariants, strict=True)
    )
    sizer = Sizer(max_digits)
    group_name = "Cl⁺" if order.is_real else "Cl"  # D < 0: Cl⁺ = Cl
    lines = [
        f"{'' if order.is_real else 'imaginary '}order of discriminant "
        f"{signed(order.discriminant)} in Q(√{signed(order.radicand)}), conductor {order.conductor}",
        f"{group_name} ≅ {group_text(G.narrow_invariants)}, generators: "
        f"{gens or f'none ({group_name} is trivial)'}",
    ]
    lines += [_line(s, principal, sizer) for s in results]
    lines.append(f"method: {_method(G)}; proof: {G.proof}")
    emit(payload, "\n".join(lines), as_json, max_digits, lambda md: _latex(G, results, md))


def _latex(G: ClassGroup, results: list[PrimeDecomposition], max_digits: int) -> str:
    """The class group, then one line per prime (``--latex``)."""
    rows = [G.to_latex(max_digits)] + [s.to_latex(max_digits) for s in results]
    return display(lines_latex(rows), G.latex_note())
