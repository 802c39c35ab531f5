"""``realquad form …``: binary quadratic forms of either sign — reduce, compare, compose, powers, cycles, classes.

Every subcommand reads forms as people write them (:mod:`realquad_cli.formtext`)
and prints the ``to_dict()`` of a :mod:`realquad.formclasses` result with ``--json``.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any, Protocol

import click
from realquad_cli.formtext import polynomial, read_form
from realquad_cli.output import (
    Command,
    Group,
    IntegerRange,
    Sizer,
    emit,
    json_option,
    max_digits_option,
)

from realquad.core.forms import Form
from realquad.core.integers import as_integer
from realquad.core.linalg import Matrix
from realquad.errors import TooLargeError
from realquad.formclasses import (
    COMPOSITION_METHODS,
    FormClass,
    FormCycle,
    FormEquivalence,
    compose_forms,
    equivalence,
    form_class,
    form_cycle,
    form_power,
    reduce_form,
)
from realquad.textio import decimal_digits, group_text, plural, signed

#: Reduced forms listed in the text of ``form cycle`` (``--json`` has all).
SHOWN_FORMS = 40


#: Work (reduced forms × digits of D) a walk along a cycle takes on by default: about a second.
CYCLE_WORK = 4 * 10**7


def _max_forms_option(default: int, what: str, scaled: bool = True) -> Callable[[Any], Any]:
    scale = f", fewer for D of more than 40 digits ({CYCLE_WORK:.0e}/digits)" if scaled else ""
    return click.option(
        "--max-forms",
        type=IntegerRange(1, 10**8),
        default=None,
        help=f"Most reduced forms {what} (beyond: an error, never a long wait); default "
        f"{default:,}{scale}.",
    )


def _forms_limit(max_forms: int | None, F: Form, default: int) -> int:
    """``--max-forms``, or the default scaled down for long discriminants (each step costs more)."""
    if max_forms is not None:
        return max_forms
    return min(default, max(1000, CYCLE_WORK // decimal_digits(F.discriminant)))


@contextmanager
def _more_forms_hint(how: str = "walks further") -> Iterator[None]:
    """A cycle or a group beyond the limit: the error says what ``--max-forms`` does."""
    try:
        yield
    except TooLargeError as exc:
        raise TooLargeError(f"{exc}; --max-forms N {how}") from None


def _matrix_text(M: Matrix, sizer: Sizer) -> str:
    a, b, c, d = (sizer.text(x) for x in M)
    return f"[[{a}, {b}], [{c}, {d}]]"


def _kind(F: Form) -> str:
    D = F.discriminant
    return f"{'positive definite' if D < 0 else 'indefinite'}, discriminant {signed(D)}"


def _footer(result: Any) -> str:
    return f"method: {result.method}; proof: {result.proof}"


class _Result(Protocol):
    """What every result of :mod:`realquad.formclasses` has: its JSON shape and its LaTeX."""

    def to_dict(self) -> dict[str, Any]: ...

    def to_latex_display(self, max_digits: int = ...) -> str: ...


def _emit(result: _Result, text: str, as_json: bool, max_digits: int | None) -> None:
    emit(result.to_dict(), text, as_json, max_digits, result.to_latex_display)


@click.group("form", cls=Group)
def command() -> None:
    """Binary quadratic forms ax² + bxy + cy² of either sign: reduce, compare, compose, powers, cycles, classes.

    Positive definite (D = b² − 4ac < 0, a > 0) and indefinite (D > 0, not a square) forms.
    Example: realquad form reduce "6x^2 + 5xy + 2y^2"; realquad form cycle "x^2 - 79y^2";
    realquad form class "(3, 2, 5)"
    """


@command.command("reduce", cls=Command)
@click.argument("form_text", metavar="FORM")
@max_digits_option
@json_option
def reduce_command(form_text: str, max_digits: int, as_json: bool) -> None:
    """A reduced form properly equivalent to FORM, and the matrix M of determinant 1 with FORM·M = it.

    (F·M)(x, y) = F(αx + βy, γx + δy) for M = [[α, β], [γ, δ]]. FORM is written as
    "2x^2 + 2xy + 3y^2" or as its coefficients "(2, 2, 3)" or 2,2,3.
    Example: realquad form reduce "6x^2 + 5xy + 2y^2"
    """
    F = read_form(form_text)
    r = reduce_form(F)
    sizer = Sizer(max_digits)
    lines = [
        f"{polynomial(F)}: {_kind(F)}",
        f"reduced form: {polynomial(r.reduced)}",
        f"matrix M = {_matrix_text(r.matrix, sizer)}: F(αx + βy, γx + δy) is the reduced form",
        _footer(r),
    ]
    _emit(r, "\n".join(lines), as_json, max_digits)


@command.command("equivalent", cls=Command)
@click.argument("form_text", metavar="FORM")
@click.argument("other_text", metavar="OTHER")
@_max_forms_option(1_000_000, "walked along the cycle of FORM (D > 0)")
@max_digits_option
@json_option
def equivalent_command(
    form_text: str, other_text: str, max_forms: int | None, max_digits: int, as_json: bool
) -> None:
    """Whether FORM and OTHER are equivalent, properly (determinant 1) and improperly (determinant −1).

    Each matrix M found carries FORM to OTHER: FORM(αx + βy, γx + δy) = OTHER.
    Example: realquad form equivalent "3x^2 + 7xy - 2y^2" "(-2, 5, 6)"
    """
    F, G = read_form(form_text), read_form(other_text)
    with _more_forms_hint():
        e = equivalence(F, G, _forms_limit(max_forms, F, 1_000_000))
    _emit(e, _equivalence_text(e, Sizer(max_digits)), as_json, max_digits)


def _equivalence_text(e: FormEquivalence, sizer: Sizer) -> str:
    F, G = e.form, e.other
    lines = [f"F = {polynomial(F)} ({_kind(F)})", f"G = {polynomial(G)} ({_kind(G)})"]
    if e.matrix is not None:
        lines.append(f"properly equivalent: F·M = G with M = {_matrix_text(e.matrix, sizer)}")
    else:
        lines.append(f"not properly equivalent: {e.reason}")
    if e.improper_matrix is not None:
        lines.append(
            f"improperly equivalent: F·N = G with N = {_matrix_text(e.improper_matrix, sizer)} "
            "(determinant −1)"
        )
    else:
        lines.append("not improperly equivalent (no matrix of determinant −1)")
    lines.append(_footer(e))
    return "\n".join(lines)


@command.command("compose", cls=Command)
@click.argument("form_text", metavar="FORM")
@click.argument("other_text", metavar="OTHER")
@click.option(
    "--method",
    type=click.Choice(COMPOSITION_METHODS),
    default="dirichlet",
    show_default=True,
    help="dirichlet: united forms, the composite shown before reduction; nucomp: NUCOMP, "
    "intermediate numbers near |D|^(1/4).",
)
@max_digits_option
@json_option
def compose_command(
    form_text: str, other_text: str, method: str, max_digits: int, as_json: bool
) -> None:
    """The composite of the classes of two primitive forms of one discriminant, reduced.

    Example: realquad form compose "3x^2 + 2xy + 5y^2" "2x^2 + 7y^2"
    """
    F, G = read_form(form_text), read_form(other_text)
    c = compose_forms(F, G, method)
    lines = [f"{polynomial(F)} ∘ {polynomial(G)}: {_kind(F)}"]
    if c.composite is not None:
        lines.append(f"composite: {polynomial(c.composite)}")
    lines += [f"reduced: {polynomial(c.reduced)}", _footer(c)]
    _emit(c, "\n".join(lines), as_json, max_digits)


@command.command("power", cls=Command)
@click.argument("form_text", metavar="FORM")
@click.argument("exponent", metavar="K")
@max_digits_option
@json_option
def power_command(form_text: str, exponent: str, max_digits: int, as_json: bool) -> None:
    """A reduced form of the class of FORM raised to the power K (either sign; 0: the principal form).

    Example: realquad form power "(3, 2, 5)" 4
    """
    F = read_form(form_text)
    p = form_power(F, as_integer(exponent, "K"))
    sizer = Sizer(max_digits)
    lines = [
        f"({polynomial(F)})^{sizer.text(p.exponent)}: {_kind(F)}",
        f"reduced: {polynomial(p.reduced)}",
        _footer(p),
    ]
    _emit(p, "\n".join(lines), as_json, max_digits)


@command.command("cycle", cls=Command)
@click.argument("form_text", metavar="FORM")
@_max_forms_option(100_000, "in the cycle")
@max_digits_option
@json_option
def cycle_command(form_text: str, max_forms: int | None, max_digits: int, as_json: bool) -> None:
    """The cycle of reduced forms of the class of an indefinite FORM, and the automorph once round it.

    The automorph A (determinant 1) fixes FORM; its trace t and lower-left entry give the
    unit (t + u√D)/2 of norm +1 that generates the automorphs up to sign.
    Example: realquad form cycle "x^2 - 79y^2"
    """
    F = read_form(form_text)
    with _more_forms_hint():
        c = form_cycle(F, _forms_limit(max_forms, F, 100_000))
    _emit(c, _cycle_text(c, Sizer(max_digits)), as_json, max_digits)


def _cycle_text(c: FormCycle, sizer: Sizer) -> str:
    which = "the principal cycle" if c.principal else "not the principal cycle"
    lines = [
        f"{polynomial(c.form)}: {_kind(c.form)}; reduced form {polynomial(c.reduced)}",
        f"cycle of {plural(len(c.cycle), 'reduced form')} ({which}):",
    ]
    lines += [f"  {polynomial(G)}" for G in c.cycle[:SHOWN_FORMS]]
    if len(c.cycle) > SHOWN_FORMS:
        lines.append(f"  … {len(c.cycle) - SHOWN_FORMS:,} more (--json lists all)")
    lines.append(f"automorph A = {_matrix_text(c.automorph, sizer)}: F·A = F")
    u = c.unit
    lines.append(
        f"unit of norm +1: ({sizer.text(u.x)} + {sizer.text(u.y)}√{u.d})/{u.c}"
        if u.c != 1
        else f"unit of norm +1: {sizer.text(u.x)} + {sizer.text(u.y)}√{u.d}"
    )
    lines.append(_footer(c))
    return "\n".join(lines)


@command.command("class", cls=Command)
@click.argument("form_text", metavar="FORM")
@_max_forms_option(
    1_000_000, "(classes for D < 0) the class group's exact method stores", scaled=False
)
@json_option
def class_command(form_text: str, max_forms: int | None, as_json: bool) -> None:
    """Where the class of the primitive FORM lies: its coordinates and order in Cl⁺ and Cl, its genus.

    Coordinates are exponents on the generators printed here (and by `realquad classgroup`).
    Example: realquad form class "3x^2 + 2xy + 5y^2"
    """
    F = read_form(form_text)
    with _more_forms_hint("stores more (the exact method is what locates a form)"):
        c = form_class(F, 1_000_000 if max_forms is None else max_forms)
    _emit(c, _class_text(c), as_json, None)


def _class_text(c: FormClass) -> str:
    G = c.group
    imaginary = G.is_imaginary
    narrow = "Cl" if imaginary else "Cl⁺"
    lines = [f"{polynomial(c.form)}: {_kind(c.form)}; reduced form {polynomial(c.reduced)}"]
    gens = ", ".join(
        f"g{i + 1} = {polynomial(g)} of order {n}"
        for i, (g, n) in enumerate(zip(G.narrow_generators, G.narrow_invariants, strict=True))
    )
    lines.append(f"{narrow} ≅ {group_text(G.narrow_invariants)}; generators: {gens or 'none'}")
    lines.append(
        f"class in {narrow}: {_coordinates(c.narrow_class, 'g')}, of order {c.narrow_order}"
    )
    if not imaginary:
        wide = ", ".join(
            f"h{i + 1} = {polynomial(g)} of order {n}"
            for i, (g, n) in enumerate(zip(G.generators, G.invariants, strict=True))
        )
        lines.append(f"Cl ≅ {group_text(G.invariants)}; generators: {wide or 'none'}")
        lines.append(f"class in Cl: {_coordinates(c.wide_class, 'h')}, of order {c.wide_order}")
    genus = ", ".join(f"{name} = {signed(v)}" for name, v in c.genus)
    lines.append(f"genus: {genus or 'one genus'}")
    lines.append(_footer(c))
    return "\n".join(lines)


def _coordinates(vector: list[int], letter: str) -> str:
    """``g1^2 · g2`` from the exponents (``the principal class`` when all are 0)."""
    if not any(vector):
        return "the principal class"
    return " · ".join(
        f"{letter}{i + 1}" + ("" if e == 1 else f"^{e}") for i, e in enumerate(vector) if e
    )
