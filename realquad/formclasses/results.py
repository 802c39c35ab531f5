"""The result types of the operations on forms: each with ``method``, ``proof`` and ``to_dict()``.

One type per operation (``docs/json.md``, section *Forms*): a reduction with
its matrix, an equivalence test with its matrices, a composite, a power, the
cycle of an indefinite form with its automorph, and the place of a form's
class in the class group. Matrices ``(α, β, γ, δ)`` stand for
``[[α, β], [γ, δ]]`` and act by ``(F·M)(x, y) = F(αx + βy, γx + δy)``
(:mod:`realquad.core.forms`); in JSON they are lists ``[α, β, γ, δ]``.

>>> from realquad.core.forms import Form
>>> FormReduction(Form(6, 5, 2), Form(2, -1, 3), (0, -1, 1, 1), "m", "unconditional").to_dict()["matrix"]
[0, -1, 1, 1]
"""

from __future__ import annotations

from dataclasses import dataclass

from realquad.classgroup import ClassGroup
from realquad.core.forms import Form
from realquad.core.linalg import Matrix
from realquad.core.numbers import QuadraticNumber
from realquad.core.results import JSONObject, Proof
from realquad.latex import MAX_DIGITS, Display, integer, lines, matrix, text
from realquad.latex import form as form_latex


def _matrix(M: Matrix | None) -> list[int] | None:
    return None if M is None else [int(x) for x in M]


def _form(F: Form, max_digits: int) -> str:
    return form_latex(F.a, F.b, F.c, max_digits)


def _acted(F: Form, M: Matrix, G: Form, max_digits: int) -> str:
    """``F(αx + βy, γx + δy) = G`` written as ``F·M = G`` with the matrix."""
    return rf"\left({_form(F, max_digits)}\right) \cdot {matrix(M, max_digits)} = {_form(G, max_digits)}"


@dataclass(frozen=True)
class FormReduction(Display):
    """A reduced form ``reduced`` properly equivalent to ``form``, with ``form·matrix = reduced``."""

    form: Form
    reduced: Form
    matrix: Matrix
    method: str
    proof: Proof

    @property
    def discriminant(self) -> int:
        return self.form.discriminant

    def to_dict(self) -> JSONObject:
        """The JSON shape of a reduction (``docs/json.md``, *FormReduction*)."""
        return {
            "discriminant": self.discriminant,
            "form": self.form.to_dict(),
            "reduced": self.reduced.to_dict(),
            "matrix": _matrix(self.matrix),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``F·M = G``, ``G`` reduced.

        >>> print(FormReduction(Form(6, 5, 2), Form(2, -1, 3), (0, -1, 1, 1), "m", "unconditional").to_latex())
        \left(6x^{2} + 5xy + 2y^{2}\right) \cdot \begin{pmatrix} 0 & -1 \\ 1 & 1 \end{pmatrix} = 2x^{2} - xy + 3y^{2}
        """
        return _acted(self.form, self.matrix, self.reduced, max_digits)


@dataclass(frozen=True)
class FormEquivalence(Display):
    """Whether ``form`` and ``other`` are equivalent, properly (``SL₂(Z)``) and in ``GL₂(Z)``.

    ``matrix`` (determinant 1) and ``improper_matrix`` (determinant −1), when
    they exist, carry ``form`` to ``other``: ``form·matrix = other``.
    ``reason`` says why they are not properly equivalent (``None`` when they are).
    """

    form: Form
    other: Form
    properly_equivalent: bool
    matrix: Matrix | None
    improperly_equivalent: bool
    improper_matrix: Matrix | None
    reason: str | None
    method: str
    proof: Proof

    def to_dict(self) -> JSONObject:
        """The JSON shape of an equivalence test (``docs/json.md``, *FormEquivalence*)."""
        return {
            "form": self.form.to_dict(),
            "other": self.other.to_dict(),
            "discriminants": [self.form.discriminant, self.other.discriminant],
            "properly_equivalent": self.properly_equivalent,
            "matrix": _matrix(self.matrix),
            "improperly_equivalent": self.improperly_equivalent,
            "improper_matrix": _matrix(self.improper_matrix),
            "reason": self.reason,
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """``F·M = G`` for each matrix found, else ``F ≁ G`` with the reason in words."""
        rows = []
        for M in (self.matrix, self.improper_matrix):
            if M is not None:
                rows.append(_acted(self.form, M, self.other, max_digits))
        if self.matrix is None:
            rows.append(
                rf"{_form(self.form, max_digits)} \not\sim {_form(self.other, max_digits)}"
                rf"\quad {text('(' + (self.reason or '') + ')')}"
            )
        return lines(rows)


@dataclass(frozen=True)
class FormComposition(Display):
    """The class ``[form]·[other]``: the composite before reduction (``None`` by NUCOMP) and reduced."""

    form: Form
    other: Form
    composite: Form | None
    reduced: Form
    method: str
    proof: Proof

    @property
    def discriminant(self) -> int:
        return self.form.discriminant

    def to_dict(self) -> JSONObject:
        """The JSON shape of a composition (``docs/json.md``, *FormComposition*)."""
        return {
            "discriminant": self.discriminant,
            "form": self.form.to_dict(),
            "other": self.other.to_dict(),
            "composite": None if self.composite is None else self.composite.to_dict(),
            "reduced": self.reduced.to_dict(),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``[F]·[G] = [H]`` with ``H`` reduced (and the composite before reduction).

        >>> from realquad.formclasses import compose_forms
        >>> print(compose_forms(Form(2, 1, 3), Form(2, 1, 3)).to_latex())
        [2x^{2} + xy + 3y^{2}] \cdot [2x^{2} + xy + 3y^{2}] = [4x^{2} - 3xy + 2y^{2}] = [2x^{2} - xy + 3y^{2}]
        """
        parts = [f"[{_form(self.form, max_digits)}] \\cdot [{_form(self.other, max_digits)}]"]
        if self.composite is not None:
            parts.append(f"[{_form(self.composite, max_digits)}]")
        parts.append(f"[{_form(self.reduced, max_digits)}]")
        return " = ".join(parts)


@dataclass(frozen=True)
class FormPower(Display):
    """A reduced form of the class ``[form]^exponent``."""

    form: Form
    exponent: int
    reduced: Form
    method: str
    proof: Proof

    @property
    def discriminant(self) -> int:
        return self.form.discriminant

    def to_dict(self) -> JSONObject:
        """The JSON shape of a power (``docs/json.md``, *FormPower*)."""
        return {
            "discriminant": self.discriminant,
            "form": self.form.to_dict(),
            "exponent": self.exponent,
            "reduced": self.reduced.to_dict(),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``[F]^k = [G]``.

        >>> from realquad.formclasses import form_power
        >>> print(form_power(Form(2, 1, 3), 3).to_latex())
        [2x^{2} + xy + 3y^{2}]^{3} = [x^{2} + xy + 6y^{2}]
        """
        k = integer(self.exponent, max_digits)
        return f"[{_form(self.form, max_digits)}]^{{{k}}} = [{_form(self.reduced, max_digits)}]"


@dataclass(frozen=True)
class FormCycle(Display):
    """The cycle of reduced forms of an indefinite form's class, and the automorph once round it.

    ``automorph`` ``A`` (determinant 1, trace ``t > 2``) fixes ``form``
    (``form·A = form``) and generates its proper automorphs up to sign;
    ``unit = (t + u√D')/2`` is the unit of norm +1 it stands for, ``D'``
    the discriminant of the primitive part of ``form``.
    """

    form: Form
    reduced: Form
    cycle: list[Form]
    principal: bool
    automorph: Matrix
    unit: QuadraticNumber
    method: str
    proof: Proof

    @property
    def discriminant(self) -> int:
        return self.form.discriminant

    def to_dict(self) -> JSONObject:
        """The JSON shape of a cycle (``docs/json.md``, *FormCycle*)."""
        return {
            "discriminant": self.discriminant,
            "form": self.form.to_dict(),
            "reduced": self.reduced.to_dict(),
            "length": len(self.cycle),
            "cycle": [G.to_dict() for G in self.cycle],
            "principal": self.principal,
            "automorph": _matrix(self.automorph),
            "unit": self.unit.to_dict(),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """The cycle as ``G₀ → G₁ → … → G₀`` (at most 12 forms, four a row), the automorph and its unit."""
        shown = [_form(G, max_digits) for G in self.cycle[:12]]
        if len(self.cycle) > 12:
            shown.append(r"\ldots " + text(f"({len(self.cycle)} forms in all)"))
        shown.append(_form(self.cycle[0], max_digits))
        rows = [r" \to ".join(shown[i : i + 4]) for i in range(0, len(shown), 4)]
        return lines(
            [
                *[row if i == 0 else r"\to " + row for i, row in enumerate(rows)],
                _acted(self.form, self.automorph, self.form, max_digits)
                + rf",\quad \varepsilon^{{+}} = {self.unit.to_latex(max_digits)}",
            ]
        )


@dataclass(frozen=True)
class FormClass(Display):
    """Where the class of a primitive form lies in ``Cl⁺`` and ``Cl`` of its order.

    ``narrow_class`` are the coordinates on the group's ``narrow_generators``
    (modulo ``narrow_invariants``), ``wide_class`` on ``generators``;
    ``narrow_order`` and ``wide_order`` the orders of the class in the two
    groups; ``genus`` the values of the assigned genus characters.
    """

    form: Form
    reduced: Form
    narrow_class: list[int]
    wide_class: list[int]
    narrow_order: int
    wide_order: int
    genus: list[tuple[str, int]]
    group: ClassGroup
    method: str
    proof: Proof

    @property
    def discriminant(self) -> int:
        return self.form.discriminant

    def to_dict(self) -> JSONObject:
        """The JSON shape of a form's class (``docs/json.md``, *FormClass*)."""
        return {
            "discriminant": self.discriminant,
            "form": self.form.to_dict(),
            "reduced": self.reduced.to_dict(),
            "narrow_class": list(self.narrow_class),
            "wide_class": list(self.wide_class),
            "narrow_order": self.narrow_order,
            "wide_order": self.wide_order,
            "narrowly_principal": self.narrow_order == 1,
            "principal": self.wide_order == 1,
            "genus": [{"character": name, "value": value} for name, value in self.genus],
            "class_group": self.group.to_dict(),
            "method": self.method,
            "proof": self.proof,
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """The class as a product of powers of the narrow generators, its order, and the group."""
        factors = [
            f"[{_form(g, max_digits)}]^{{{e}}}"
            for g, e in zip(self.group.narrow_generators, self.narrow_class, strict=True)
            if e
        ]
        cl = r"\mathrm{Cl}" if self.group.is_imaginary else r"\mathrm{Cl}^{+}"
        product = r" \cdot ".join(factors) or "1"
        return lines(
            [
                f"[{_form(self.form, max_digits)}] = {product}"
                rf"\quad {text('of order')}\ {self.narrow_order}\ {text('in')}\ {cl}",
                self.group.to_latex(max_digits),
            ]
        )
