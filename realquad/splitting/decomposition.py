"""How a prime decomposes in a quadratic order, and which class its prime ideals lie in.

For a prime ``p`` not dividing the conductor ``f`` of the order of
discriminant ``D``, the Kronecker symbol decides:

* ``(D/p) = 1``: *split*, ``pO = 𝔭𝔭'`` with ``𝔭 = [p, (−b + √D)/2]``, ``b² ≡ D (mod 4p)``,
  ``𝔭'`` its conjugate (the inverse class);
* ``(D/p) = 0``: *ramified*, ``pO = 𝔭²``;
* ``(D/p) = −1``: *inert*, ``pO`` is prime, of norm ``p²``, principal.

A prime ideal of norm ``p`` corresponds to the prime form ``(p, b, c)``; its
narrow class is trivial exactly when the principal form
``x² + b₀xy + c₀y²`` (:meth:`realquad.forms.Form.identity`) takes the value
``p`` — a prime can pass the residue test ``(D/p) = 1`` and still not be
represented, when its class is not principal. For ``p | f`` no invertible
ideal has norm ``p`` and no primitive form of discriminant ``D`` represents
``p``; the result says so (``divides_conductor``) and gives the behaviour in
the maximal order (``field_kind``).

>>> s = decompose_prime(316, 5)            # Q(√79): 5 splits, its class has order 3 in Cl⁺ ≅ Z/6
>>> s.kind, [str(i) for i in s.ideals], s.classes, s.represented_by_principal
('split', ['[5, (−4 + √316)/2]', '[5, (4 + √316)/2]'], [[2], [4]], False)
>>> s.form, s.form.value(s.x, s.y)
(Form(5, 14, -6), 5)
>>> t = decompose_prime(316, 2)            # 2 ramifies into a narrowly principal ideal
>>> t.kind, t.represented_by_principal, (t.x, t.y), Form.identity(316).value(t.x, t.y)
('ramified', True, (1, 1), 2)

For an imaginary order (``D < 0``) narrow and wide classes agree; the
class of a prime form is trivial exactly when it reduces to the principal
form, and then the reduction matrix ``M`` (``F·M = (1, b₀, c₀)``) gives
``p = x² + b₀xy + c₀y²`` at ``(x, y) = (M₂₂, −M₂₁)`` — the answer to "which
primes are ``x² + ny²``" for the order of discriminant ``−4n`` (Cox, §7).

>>> u = decompose_prime(-56, 23)           # Z[√−14]: 23 = 3² + 14·1²
>>> u.kind, u.represented_by_principal, (abs(u.x), abs(u.y)), u.classes
('split', True, (3, 1), [[0], [0]])
>>> v = decompose_prime(-56, 3)            # 3 splits into ideals of order 4
>>> v.represented_by_principal, v.form, v.form.value(v.x, v.y), v.classes
(False, Form(3, 2, 5), 3, [[1], [3]])

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.2 (Proposition 5.1.4 for the decomposition of primes);
D. A. Cox, *Primes of the Form x² + ny²*, Wiley 1989, §1–3 and §7.
"""

from __future__ import annotations

from dataclasses import dataclass

import gmpy2

from realquad.classgroup import ClassGroup, class_group
from realquad.core.forms import Form, prime_form
from realquad.core.ideals import Ideal
from realquad.core.integers import as_integer
from realquad.core.linalg import Matrix, matrix_inverse, matrix_multiply
from realquad.core.orders import Order
from realquad.core.primes import kronecker, primes_below
from realquad.core.results import JSONObject
from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.latex import MAX_DIGITS, Display, clauses, integer, lines, point, text
from realquad.splitting.prime_classes import (
    coordinate_digits,
    inverse_class,
    locate,
    principal_generator,
    small_generator,
)

KINDS = {1: "split", 0: "ramified", -1: "inert"}

#: Most digits of a generator written out as ``(x, y)``; a larger one stays in compact form.
EXPANDED_DIGITS = 20_000


@dataclass(frozen=True)
class PrimeDecomposition(Display):
    """The prime ideals above ``p`` and their classes.

    ``classes[i]`` is the narrow class of ``ideals[i]`` as coordinates on
    the group's ``narrow_generators`` (``wide_classes`` on ``generators``).
    ``form`` is a reduced form of the class of ``ideals[0]`` with
    ``form.value(x, y) = p``; when ``represented_by_principal`` the pair
    ``(x, y)`` instead solves ``x² + b₀xy + c₀y² = p`` for the principal
    form ``Form.identity(D) = (1, b₀, c₀)``.
    """

    p: int
    kind: str
    divides_conductor: bool
    field_kind: str
    ideals: list[Ideal]
    classes: list[list[int]]
    wide_classes: list[list[int]]
    represented_by_principal: bool
    form: Form | None
    x: int | None
    y: int | None
    compact: CompactRepresentation | None = None

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``pO = 𝔭𝔭̄`` (or ``𝔭²``, or prime), the ideal ``𝔭``, its class as exponents on the
        generators of the (narrow) class group, and ``p`` as the value of a form of that class.

        >>> from realquad.core.orders import Order
        >>> print(decompose_prime(Order(-56), 3).to_latex())
        \begin{gathered}3\mathcal{O} = \mathfrak{p}\bar{\mathfrak{p}},\quad \mathfrak{p} = \left[3, \frac{-2 + \sqrt{-56}}{2}\right],\quad [\mathfrak{p}] = (1),\\
        3 = 3x^{2} + 2xy + 5y^{2}\ \text{at}\ (x, y) = (1, 0)\end{gathered}
        """
        p = integer(self.p, max_digits)
        if self.divides_conductor:
            return rf"p = {p}\quad {text('divides the conductor')}"
        if self.kind == "inert":
            return rf"{p}\mathcal{{O}}\ {text('is prime (inert)')}"
        shape = (
            r"\mathfrak{p}^{2}" if self.kind == "ramified" else r"\mathfrak{p}\bar{\mathfrak{p}}"
        )
        ideal = self.ideals[0]
        coordinates = point(self.classes[0], max_digits)
        F = self.form if not self.represented_by_principal else Form.identity(ideal.discriminant)
        assert F is not None
        if self.compact is not None:  # a generator too large to write out
            value = rf"{p} = N(\alpha),\quad \alpha = {self.compact.to_latex(max_digits)}"
        else:
            assert self.x is not None and self.y is not None
            value = rf"{p} = {F.to_latex(max_digits)}\ {text('at')}\ (x, y) = {point((self.x, self.y), max_digits)}"
        parts = [
            rf"{p}\mathcal{{O}} = {shape}",
            rf"\mathfrak{{p}} = {ideal.to_latex(max_digits)}",
            rf"[\mathfrak{{p}}] = {coordinates}",
            value,
        ]
        return lines(clauses(parts))

    def to_dict(self) -> JSONObject:
        """The JSON shape of a prime's decomposition (``docs/json.md``, *PrimeDecomposition*)."""
        return {
            "p": self.p,
            "kind": self.kind,
            "divides_conductor": self.divides_conductor,
            "field_kind": self.field_kind,
            "ideals": [ideal.to_dict() for ideal in self.ideals],
            "classes": [list(c) for c in self.classes],
            "wide_classes": [list(c) for c in self.wide_classes],
            "represented_by_principal": self.represented_by_principal,
            "form": None if self.form is None else self.form.to_dict(),
            "x": self.x,
            "y": self.y,
            "compact": None if self.compact is None else self.compact.to_dict(),
        }


class _PrincipalCycle:
    """The reduced forms ``G`` of the principal class with ``N``, ``(1, b₀, c₀)·N = G``.

    The matrices grow like the fundamental unit along the cycle, so they are
    made lazily: only as far along the cycle as a principal prime needs.
    """

    def __init__(self, D: int) -> None:
        self.position = {G: k for k, G in enumerate(Form.identity(D).cycle())}
        self.walk = Form.identity(D).cycle_matrices()
        self.matrices: list[Matrix] = []

    def matrix(self, G: Form) -> Matrix:
        k = self.position[G]
        while len(self.matrices) <= k:
            self.matrices.append(next(self.walk)[1])
        return self.matrices[k]


def _check_prime(p: object) -> int:
    value = as_integer(p, "p")
    if value < 2 or not gmpy2.is_prime(value, 40):
        raise InputError(f"p must be a prime, got {value}")
    return value


def decompose_prime(
    order: Order | int,
    p: int,
    group: ClassGroup | None = None,
    _cycle: _PrincipalCycle | None = None,
) -> PrimeDecomposition:
    """The decomposition of the prime ``p`` in an order, with the classes of its prime ideals."""
    if not isinstance(order, Order):
        order = Order(order)
    p = _check_prime(p)
    D, f = order.discriminant, order.conductor
    group = group if group is not None else group_for_primes(order)
    kind = KINDS[kronecker(D, p)]
    field_kind = KINDS[kronecker(order.fundamental_discriminant, p)]
    if f % p == 0:
        return PrimeDecomposition(p, kind, True, field_kind, [], [], [], False, None, None, None)
    if kind == "inert":
        unit = Ideal.of_order(D)
        zero = [0] * len(group.narrow_invariants)
        inert = Ideal(D, p, unit.a, unit.b)
        return PrimeDecomposition(
            p,
            kind,
            False,
            field_kind,
            [inert],
            [zero],
            [[0] * len(group.invariants)],
            False,
            None,
            None,
            None,
        )
    F = prime_form(D, p)
    assert F is not None  # p ∤ f and (D/p) ≠ −1
    forms = [F] if kind == "ramified" else [F, F.inverse()]
    ideals = [Ideal.from_form(G) for G in forms]
    if not group.locates_classes:
        return _by_tests(group, p, kind, field_kind, ideals, F)
    classes = [group.narrow_class_of(G) for G in forms]
    wide = [group.class_of(G) for G in forms]
    G, M = F.reduce()  # F·M = G, so G(M⁻¹ (1, 0)) = F(1, 0) = p
    principal = group.is_narrowly_principal(F)
    if principal and D < 0:  # G is the principal form: it represents p at M⁻¹(1, 0)
        x, y = M[3], -M[2]
    elif principal and not group.lists_classes:  # index calculus: one test gives the generator
        gx, gy, compact = _principal_representation(group, F)
        return PrimeDecomposition(
            p, kind, False, field_kind, ideals, classes, wide, principal, G, gx, gy, compact
        )
    elif principal:
        cycle = _cycle if _cycle is not None else _PrincipalCycle(D)
        N = matrix_multiply(cycle.matrix(G), matrix_inverse(M))  # (1, b₀, c₀)·N = F
        x, y = N[0], N[2]
    else:
        x, y = M[3], -M[2]
    return PrimeDecomposition(p, kind, False, field_kind, ideals, classes, wide, principal, G, x, y)


def group_for_primes(order: Order) -> ClassGroup:
    """The class group the classes of prime ideals refer to: exact within the cycle method's reach,
    else (fields only, under GRH) index calculus, whose classes are located by relations (a
    principal prime ideal of a real field gets its generator from one principal ideal test)."""
    try:
        return class_group(order, method="exact")
    except TooLargeError:
        if order.conductor != 1:
            raise
        return class_group(order, method="subexp")


def _by_tests(
    group: ClassGroup, p: int, kind: str, field_kind: str, ideals: list[Ideal], F: Form
) -> PrimeDecomposition:
    """The decomposition when the group has no table: classes by principal ideal tests."""
    narrow = locate(group, F, narrow=True)
    same = (
        group.unit_norm == -1  # Cl⁺ = Cl: one search serves both, if on the same generators
        and group.narrow_invariants == group.invariants
        and group.narrow_generators == group.generators
    )
    wide = narrow if same else locate(group, F, narrow=False)
    classes, wides = [narrow], [wide]
    if kind == "split":  # the conjugate ideal lies in the inverse class
        classes.append(inverse_class(group, narrow, narrow=True))
        wides.append(inverse_class(group, wide, narrow=False))
    principal = not any(narrow)
    G, M = F.reduce()  # F·M = G, so G(M⁻¹ (1, 0)) = F(1, 0) = p
    x: int | None = M[3]
    y: int | None = -M[2]
    compact = None
    if principal:
        x, y, compact = _principal_representation(group, F)
    return PrimeDecomposition(
        p, kind, False, field_kind, ideals, classes, wides, principal, G, x, y, compact
    )


def _principal_representation(
    group: ClassGroup, F: Form
) -> tuple[int | None, int | None, CompactRepresentation | None]:
    """``(x, y)`` with ``x² + b₀xy + c₀y² = p`` from a generator of norm ``p`` of ``F``'s ideal,
    or the generator in compact form when it has more than :data:`EXPANDED_DIGITS` digits."""
    D, p = F.discriminant, F.a
    _, _, nu = principal_generator(D, p, F.b, group.unit_norm)
    _, _, nu_conjugate = principal_generator(D, p, -F.b, group.unit_norm)
    assert nu is not None and nu_conjugate is not None
    eps = group.unit.compact() if group.unit is not None and group.unit_norm == -1 else None
    alpha = small_generator([nu, nu_conjugate.conjugate()], p, eps)
    if coordinate_digits(alpha) > EXPANDED_DIGITS:
        return None, None, alpha
    u, v = alpha.expand()  # α = (u + v√D)/2 = x + y(b₀ + √D)/2
    b0 = Form.identity(D).b
    return (u - b0 * v) // 2, v, None


def split_primes(
    order: Order | int, bound: int, group: ClassGroup | None = None
) -> list[PrimeDecomposition]:
    """:func:`decompose_prime` for every prime ``p ≤ bound``.

    >>> [s.kind for s in split_primes(5, 11)]
    ['inert', 'inert', 'ramified', 'inert', 'split']
    """
    if not isinstance(order, Order):
        order = Order(order)
    bound = as_integer(bound, "bound")
    if bound < 2:
        raise InputError(f"the bound must be at least 2, got {bound}")
    group = group if group is not None else group_for_primes(order)
    real_table = order.discriminant > 0 and group.lists_classes  # else no cycle is walked
    cycle = _PrincipalCycle(order.discriminant) if real_table else None
    return [decompose_prime(order, p, group, cycle) for p in primes_below(bound + 1)]
