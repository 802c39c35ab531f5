"""The fundamental unit of an order from its field's: the least power of ``ε_K`` in the order.

For the order ``O`` of conductor ``f`` in the real field ``K``, a unit of
``O_K`` lies in ``O = Z + f·O_K`` exactly when its class in
``A = (O_K/fO_K)^× / (Z/fZ)^×`` is trivial, so ``O^× = ⟨−1, ε_K^m⟩`` with
``m`` the order of ``ε_K`` in ``A``, a group of
``N = f·∏_{p | f}(1 − (D₀/p)/p)`` elements; ``m`` divides ``N`` (the exact
sequence behind the class number formula for orders, D. A. Cox, *Primes of
the form x² + ny²*, Theorem 7.24 and its proof). ``R(O) = m·R_K``.

``ε_K^t ∈ O`` exactly when ``O`` lies on the principal cycle of the order's
infrastructure at distance ``t·R_K``: the doubling walk there
(:func:`~realquad.infrastructure.distances.exact_principal_at`) meets it, and
its factors are the unit ``±ε_K^t`` of ``O`` in compact form, their
logarithm checked to be ``t·R_K`` (copies of ``O`` at other distances differ
by at least ``R_K``). Starting from ``t = N``, each prime ``q`` is divided
out of ``t`` while ``ε_K^{t/q}`` is still in ``O``; what is left is ``m``,
and the walk to ``m·R_K`` gives the order's unit. The proof is the field
unit's.

>>> from realquad.units.cfrac import fundamental_unit_cfrac
>>> u = unit_of_order(Order(5 * 10**2), fundamental_unit_cfrac(Order(5)))   # Z[5√5]
>>> str(u.expand()), u.norm, u.method.endswith("(m = 15)")   # ε₅ = (1 + √5)/2, ε₅¹⁵ = 682 + 305√5
('682 + 305√5', -1, True)
"""

from __future__ import annotations

import mpmath

from realquad.core.orders import Order
from realquad.core.primes import factorize, kronecker
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.distances import Factors, exact_principal_at, log_of_product
from realquad.infrastructure.ideals import Cycle
from realquad.units.results import MAX_EXPANDED_DIGITS, Regulator, Unit

#: Largest distance walked with binary64 distances (good to about ``10⁻¹²·x``); beyond,
#: the walk carries ``mpmath`` distances.
FLOAT_WALK_LIMIT = 10**12

#: How the order's unit comes from the field's, added to the field unit's method.
METHOD = "; the order's unit ε_K^m, the least power of the field's unit in the order (m = {m})"


def unit_group_index(order: Order) -> int:
    """``N = f·∏_{p | f}(1 − (D₀/p)/p)``: the order of ``(O_K/fO_K)^×/(Z/fZ)^×``, a multiple of ``m``.

    >>> unit_group_index(Order(5 * 10**2)), unit_group_index(Order(4 * 3**2 * 7))
    (15, 2)
    """
    D0, f = order.fundamental_discriminant, order.conductor
    N = f
    for p in factorize(f):
        N = N // p * (p - kronecker(D0, p))
    return N


def unit_of_order(order: Order, field_unit: Unit) -> Unit:
    """The fundamental unit of ``order`` from ``field_unit``, that of its field (module notes)."""
    return lifted_unit(order, field_unit)[0]


def lifted_unit(order: Order, field_unit: Unit) -> tuple[Unit, int]:
    """The fundamental unit of ``order`` and the unit index ``m = [O_K^× : O^×]`` (module notes)."""
    D = order.discriminant
    if order.conductor == 1:
        return field_unit, 1
    N = unit_group_index(order)
    digits = len(str(N)) + len(str(int(field_unit.regulator(10).value))) + 25
    R_K = field_unit.regulator(digits).value
    found = _power_in_order(D, N, R_K, digits)
    if found is None:
        raise ArithmeticError(
            f"internal check failed: ε_K^{N} is not in the order of discriminant {D}"
        )
    m = N
    for q, e in factorize(N).items():
        for _ in range(e):
            smaller = _power_in_order(D, m // q, R_K, digits)
            if smaller is None:
                break
            m, found = m // q, smaller
    compact = CompactRepresentation.from_factors(D, found)
    norm = field_unit.norm**m
    if compact.norm != norm:
        raise ArithmeticError("internal check failed: the order's unit has the wrong norm")
    method = field_unit.method + METHOD.format(m=m)
    proof = field_unit.proof

    def regulator_to(digits: int) -> Regulator:
        value, bound = compact.log(digits)
        return Regulator(value, digits, bound, method, proof)

    def denominator() -> int:
        """``c`` of ``ε = (x + y√D)/c`` for odd ``D``: 1 exactly when ``ε ∈ Z[√D]``."""
        R = compact.log(digits)[0]
        return 1 if D % 2 == 0 or _power_in_order(4 * D, 1, R, digits) else 2

    unit = Unit(
        order=order,
        norm=norm,
        period_length=None,
        method=method,
        proof=proof,
        _expander=lambda: compact.expand(MAX_EXPANDED_DIGITS),
        _regulator=regulator_to,
        _compact=lambda: compact,
        _denominator=denominator,
    )
    return unit, m


def _power_in_order(D: int, t: int, R: mpmath.mpf, digits: int) -> Factors | None:
    """Factors of the unit ``±ε^t`` (``log ε = R``) if ``O`` of discriminant ``D`` is at ``t·R``."""
    with mpmath.workdps(digits + len(str(t))):
        x = t * mpmath.mpf(R)
        precise = x >= FLOAT_WALK_LIMIT
        try:
            if precise:
                factors = exact_principal_at(Cycle(D), x, digits=len(str(int(x))) + 20)
            else:
                factors = exact_principal_at(Cycle(D), float(x))
        except ArithmeticError:
            return None
        value, bound = log_of_product(factors, len(str(int(x))) + 10)
        if abs(value - x) > R / 4 + bound:
            return None
    return factors
