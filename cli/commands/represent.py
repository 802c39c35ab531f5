"""``realquad represent FORM``: which primes a binary quadratic form represents, and the criterion for all."""

from __future__ import annotations

from typing import Any

import click
from realquad_cli.formtext import polynomial, read_form
from realquad_cli.output import (
    Command,
    Sizer,
    emit,
    json_option,
    max_digits_option,
    prime_options,
    read_primes,
)

from realquad.core.forms import Form
from realquad.errors import TooLargeError
from realquad.splitting import FormPrimes, PrimeRepresentation, form_primes
from realquad.splitting.representation import RepresentationCriterion
from realquad.textio import plural, signed

#: Largest bound accepted by --primes-up-to.
MAX_BOUND = 10**6


def _line(r: PrimeRepresentation, F: Form, D: int, sizer: Sizer) -> str:
    if r.reason == "divides_conductor":
        return f"p = {r.p}: no — it divides the conductor (no primitive form represents it)"
    if r.reason == "inert":
        return f"p = {r.p}: no — ({signed(D)}/{r.p}) = −1, no form of discriminant {signed(D)} represents it"
    if r.represented:
        assert r.x is not None and r.y is not None
        return f"p = {r.p}: yes, {r.p} = {polynomial(F)} at x = {sizer.text(r.x)}, y = {sizer.text(r.y)}"
    G = r.representing_form
    assert G is not None and r.representing_x is not None and r.representing_y is not None
    ideals = "its prime ideal lies" if r.kind == "ramified" else "its prime ideals lie"
    return (
        f"p = {r.p}: no — {r.kind}, {ideals} in another class: {r.p} = {polynomial(G)} "
        f"at x = {sizer.text(r.representing_x)}, y = {sizer.text(r.representing_y)}"
    )


def _residues_text(c: RepresentationCriterion) -> str:
    if c.residues is None:
        chars = ", ".join(f"{n} = {signed(v)}" for n, v in c.characters)
        return f"the genus characters {chars}"
    shown = ", ".join(str(r) for r in c.residues)
    return f"p ≡ {shown} (mod {c.modulus})"


def criterion_lines(c: RepresentationCriterion, F: Form, sizer: Sizer) -> list[str]:
    """The criterion in words: the condition, its scope, the primes dividing ``D``."""
    D = c.discriminant
    form = polynomial(F)
    dividing = ", ".join(str(q) for q in c.dividing_represented) or "none"
    lines = []
    if c.kind == "congruences":
        lines.append(
            f"criterion: a prime p ∤ {signed(D)} is {form} exactly when {_residues_text(c)}"
        )
    elif c.kind == "genus":
        lines.append(
            f"criterion (necessary only): a prime p ∤ {signed(D)} that is {form} has {_residues_text(c)}; "
            f"the same genus holds {plural(len(c.undistinguished), 'other class', 'other classes')}, "
            "which no congruence separates"
        )
    else:
        assert c.polynomial is not None
        H = c.polynomial
        split = (
            "has a root"
            if c.factor_degree == 1
            else f"splits into irreducible factors of degree {c.factor_degree}"
        )
        word = "exactly when" if c.exact else "only if"
        lines.append(
            f"criterion: a prime p ∤ {signed(D)}·disc(H) is {form} {word} ({signed(D)}/p) = 1, "
            f"{_residues_text(c)} and H(X) mod p {split}, where H is the ring class polynomial of "
            f"degree {H.degree}:"
        )
        lines.append("  H(X) = " + _poly_text(H.coefficients, sizer))
        if c.undistinguished:
            others = ", ".join(polynomial(G) for G in c.undistinguished)
            lines.append(f"  not sufficient: {others} share the genus and the order of the class")
    lines.append(f"primes dividing {signed(D)} that {form} represents: {dividing}")
    lines.append(f"scope: {c.scope}")
    lines.append(f"criterion method: {c.method}; proof: {c.proof}")
    return lines


def _poly_text(coefficients: list[int], sizer: Sizer) -> str:
    """``X³ + 3491750X² − …`` with every coefficient through ``--max-digits``."""
    superscript = str.maketrans("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹")
    parts: list[str] = []
    for k in range(len(coefficients) - 1, -1, -1):
        c = coefficients[k]
        if c == 0:
            continue
        monomial = "" if k == 0 else ("X" if k == 1 else "X" + str(k).translate(superscript))
        body = monomial if abs(c) == 1 and monomial else sizer.text(abs(c)) + monomial
        sign = "−" if c < 0 else "+"
        parts.append(f"{sign} {body}" if parts else ("−" if c < 0 else "") + body)
    return " ".join(parts) or "0"


@click.command("represent", cls=Command)
@click.argument("form_text", metavar="FORM")
@prime_options
@click.option(
    "--no-criterion",
    "skip_criterion",
    is_flag=True,
    help="Only the primes asked for, without the statement for all primes.",
)
@max_digits_option
@json_option
def command(
    form_text: str,
    bound: str | None,
    prime: str | None,
    skip_criterion: bool,
    max_digits: int,
    as_json: bool,
) -> None:
    """Which primes the form FORM represents, with x and y, and a criterion for all primes.

    FORM is written as people write it, e.g. "x^2 + 5y^2" or "2x^2 + 2xy + 3y^2" (either sign
    of discriminant; positive definite or indefinite, primitive). Each prime is represented or
    not, with the reason and the form of its class otherwise. The criterion: congruences when
    the genus of the form holds only its class and the inverse; else, for D < 0, the ring class
    polynomial. Example: realquad represent "x^2 + 27y^2" --primes-up-to 100
    """
    F = read_form(form_text)
    B, P = read_primes(bound, prime, MAX_BOUND)
    try:
        result = form_primes(F, B, prime=P, criterion=not skip_criterion)
    except TooLargeError as exc:
        raise TooLargeError(f"{exc}; --no-criterion answers the primes alone") from None
    payload: dict[str, Any] = result.to_dict()
    emit(payload, _text(result, Sizer(max_digits)), as_json, max_digits, result.to_latex_display)


def _text(result: FormPrimes, sizer: Sizer) -> str:
    F, D = result.form, result.discriminant
    kind = "positive definite" if D < 0 else "indefinite"
    group = "h" if D < 0 else "h⁺"
    lines = [
        f"{polynomial(F)}: {kind}, discriminant {signed(D)}, reduced form {polynomial(result.reduced)}; "
        f"{group} = {result.class_number}, "
        f"{plural(result.classes_per_genus, 'class', 'classes')} per genus",
    ]
    lines += [_line(r, F, D, sizer) for r in result.primes]
    lines.append(f"method: {result.method}; proof: {result.proof}")
    if result.criterion is not None:
        lines += criterion_lines(result.criterion, F, sizer)
    return "\n".join(lines)
