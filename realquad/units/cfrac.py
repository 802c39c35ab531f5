"""Fundamental units and regulators of real quadratic orders by continued fractions.

The continued fraction of ``ω = (D mod 2 + √D)/2`` runs through the principal
cycle of reduced quadratic irrationals ``(P + √D)/Q`` of discriminant ``D``.
That cycle is a palindrome, so the walk stops at its symmetry point, half-way
through the period ``l``:

* ``l = 2m``   (``P_m = P_{m+1}``): ``ε = ψ_m² / (Q_m/2)``,
* ``l = 2m+1`` (``Q_m = Q_{m+1}``): ``ε = ψ_m ψ_{m+1} / (Q_{m+1}/2)``,

where ``ψ_k = p_{k−1} − q_{k−1} ω'`` is built from the convergents ``p/q`` of
``ω`` and has norm ``±Q_k/2``. The convergents are multiplied out in a balanced
product tree (quasi-linear in the size of ``ε``), and the regulator
``log ε`` comes from the same tree evaluated in rounded arithmetic, with a
rigorous error bound, without forming ``ε``.

>>> eps = fundamental_unit_cfrac(Order(5))
>>> str(eps.expand()), eps.norm
('(1 + √5)/2', -1)
>>> str(fundamental_unit_cfrac(Order(52)).expand())   # conductor 2: ((3 + √13)/2)³
'18 + 5√13'
>>> str(regulator_cfrac(Order(8), 25))
'0.8813735870195430252326093'

References: H. C. Williams, *Édouard Lucas and Primality Testing*, Wiley 1998
(continued fraction of ``ω``, symmetry of the period); M. J. Jacobson Jr. and
H. C. Williams, *Solving the Pell Equation*, CMS Books, Springer 2009, ch. 3–5.
"""

from __future__ import annotations

from dataclasses import dataclass

import gmpy2
import mpmath

from realquad._backend import COMPILED, call_kernel, kernels, pure
from realquad.core.lfunction import estimated_period
from realquad.core.linalg import matrix_product, matrix_product_column
from realquad.core.orders import Order
from realquad.errors import TooLargeError
from realquad.textio import about, shown
from realquad.units.results import NO_UNIT_OF_INFINITE_ORDER, Regulator, Unit

#: Default largest period the continued fraction walks before refusing.
DEFAULT_MAX_PERIOD = 100_000_000

#: Partial quotients per leaf of the product tree (exact Python-int recurrence).
_LEAF = 48

METHOD = "continued fraction (half period, product tree)"


@dataclass(frozen=True)
class PrincipalHalfCycle:
    """The first half of the principal cycle of discriminant ``D``."""

    discriminant: int
    quotients: list[int]
    parity: int  # period mod 2
    q_mid: int
    period_length: int

    @property
    def norm(self) -> int:
        """Norm of the fundamental unit: ``(−1)^l``."""
        return -1 if self.parity else 1


def principal_half_cycle(D: int, max_period: int = DEFAULT_MAX_PERIOD) -> PrincipalHalfCycle:
    """Walk the principal cycle of discriminant ``D`` to its symmetry point.

    Raises :class:`TooLargeError` when the period exceeds ``max_period``.
    """
    quotients, parity, q_mid, steps = _walk("principal_half_cycle", D, max_period)
    return PrincipalHalfCycle(D, list(quotients), parity, q_mid, steps)


def principal_regulator_walk(D: int, max_period: int = DEFAULT_MAX_PERIOD) -> tuple:
    """The half-cycle walk of ``D`` with the regulator accumulated in floating point.

    ``(steps, parity, q_mid, mantissa, exponent, log_error)`` of the kernel
    ``principal_regulator``: ``R = log(mantissa·2^exponent) + log(q_mid/2)``
    within ``log_error``. Refuses a period longer than ``max_period``.

    >>> principal_regulator_walk(4 * 61)[:3]
    (11, 1, 10)
    """
    return _walk("principal_regulator", D, max_period)


#: A period estimated beyond this many times the limit is refused without walking it all: the
#: estimate assumes h = 1, and a class number of 100 or more would be needed to bring it within
#: reach. Short periods (a regulator small for its discriminant, as for d = n² + 4) are found
#: first by a walk of :data:`FIRST_STEPS` steps, whatever the estimate says.
HOPELESS_FACTOR = 100
FIRST_STEPS = 100_000


def check_period_reach(D: int, max_period: int) -> None:
    """Refuse at once a walk whose period is estimated far beyond ``max_period``.

    >>> check_period_reach(4 * 61, 100)
    >>> try:
    ...     check_period_reach(4 * (10**32 + 49), 10**8)
    ... except TooLargeError as exc:
    ...     print(str(exc)[:48])
    the period of the continued fraction of discrimi
    """
    if estimated_period(D, 2_000) > HOPELESS_FACTOR * max_period:
        raise TooLargeError(_too_long_message(D, max_period))


def _walk(kernel: str, D: int, max_period: int) -> tuple:
    """Run the walk ``kernel`` (compiled if possible, the pure twin beyond its word size).

    A first walk of :data:`FIRST_STEPS` steps finds every short period at once; only
    then is a period estimated hopelessly long refused without walking it.
    """
    found = call_kernel(kernel, D, min(max_period, FIRST_STEPS))
    if found is None and max_period > FIRST_STEPS:
        check_period_reach(D, max_period)
        found = call_kernel(kernel, D, max_period)
    if found is None:
        raise TooLargeError(_too_long_message(D, max_period))
    return found


def _too_long_message(D: int, max_period: int) -> str:
    return (
        f"the period of the continued fraction of discriminant {shown(D)} exceeds "
        f"{max_period:,} steps ({about(estimated_period(D, 2_000))} expected if the class number is 1); "
        "the continued fraction cannot finish in reasonable time. "
        "Baby-step giant-step in the infrastructure is the method for this size."
    )


#: Partial quotients per leaf for the compiled kernel, which multiplies each
#: block exactly in machine words: larger leaves mean fewer conversions and a
#: shallower tree (256 measured best for d = 1000000000091, docs/performance.md).
_LEAF_COMPILED = 256


def _leaves(cycle: PrincipalHalfCycle) -> list[tuple[int, int, int, int]]:
    """Exact leaf matrices of the product tree over the half cycle's quotients."""
    if "convergent_leaves" in COMPILED:
        try:
            return kernels.convergent_leaves(cycle.quotients, _LEAF_COMPILED)
        except OverflowError:  # a quotient beyond 64 bits (D ≥ 2^63)
            pass
    return pure.convergent_leaves(cycle.quotients, _LEAF)


def _half_matrix(cycle: PrincipalHalfCycle, convert: object = gmpy2.mpz) -> tuple:
    """``(p, p', q, q')`` of the half cycle; for an even period only ``(p, ·, q, ·)``."""
    leaves = _leaves(cycle)
    if cycle.parity:
        return matrix_product(leaves, convert)
    p, q = matrix_product_column(leaves, convert)
    return (p, None, q, None)


def _psi_pairs(cycle: PrincipalHalfCycle, M: tuple) -> list[tuple]:
    """The coordinates ``(2p − q·(D mod 2), q)`` of ``2ψ`` at the symmetry point."""
    w = cycle.discriminant & 1
    p, pp, q, qq = M
    if cycle.parity:  # need ψ_m (p_{m−1}) and ψ_{m+1} (p_m)
        return [(2 * pp - qq * w, qq), (2 * p - q * w, q)]
    return [(2 * p - q * w, q)]


#: A Mersenne prime for the cheap exact check of the norm of the expanded unit.
_CHECK_MODULUS = gmpy2.mpz(2**127 - 1)


def expand_unit(cycle: PrincipalHalfCycle) -> tuple[int, int]:
    """Exact ``(u, v)`` with ``ε = (u + v√D)/2``, from the half cycle."""
    D = cycle.discriminant
    pairs = _psi_pairs(cycle, _half_matrix(cycle))
    Q = gmpy2.mpz(cycle.q_mid)
    if cycle.parity:
        (a1, b1), (a2, b2) = pairs
        aa, bb = a1 * a2, b1 * b2
        X = aa + D * bb
        Y = (a1 + b1) * (a2 + b2) - aa - bb  # a1 b2 + a2 b1 with three products
    else:
        ((a, b),) = pairs
        X = a * a + D * b * b
        Y = 2 * a * b
    u, v = gmpy2.divexact(X, Q), gmpy2.divexact(Y, Q)
    # u² − D v² = ±4 is cheap to confirm modulo a large prime, exactly.
    m = _CHECK_MODULUS
    um, vm = u % m, v % m
    if (um * um - D * vm * vm - 4 * cycle.norm) % m:
        raise ArithmeticError("internal check failed: expanded unit does not have norm ±1")
    return int(u), int(v)


def regulator_from_cycle(cycle: PrincipalHalfCycle, digits: int) -> Regulator:
    """``log ε`` to ``digits`` significant digits from rounded products.

    Leaves of the product tree are exact; they are rounded to ``prec`` bits
    (gmpy2 ``mpfr``, round to nearest, unit ``u = 2^−prec``) and multiplied
    up the tree. All entries are positive, so relative errors only add: one
    rounding per leaf entry and two (product, sum) per tree node give at most
    ``3n`` roundings for ``n`` leaves. With ``ψ = p + q |ω'|`` (``ω' < 0``,
    no cancellation) and ``R = 2 log ψ_m − log(Q_m/2)`` (even period) or
    ``log ψ_m + log ψ_{m+1} − log(Q_{m+1}/2)`` (odd), the absolute error is
    below ``(6n + 30 + 4R + 2 log₂ D) u``, the bound recorded.
    """
    D = cycle.discriminant
    leaves = _leaves(cycle)
    n = max(1, len(leaves))
    prec = int(digits * 3.3220) + (6 * n + 40).bit_length() + 12
    with gmpy2.context(precision=prec):
        if cycle.parity:
            M = matrix_product(leaves, gmpy2.mpfr)
        else:
            p0, q0 = matrix_product_column(leaves, gmpy2.mpfr)
            M = (p0, None, q0, None)
        conj = (gmpy2.sqrt(gmpy2.mpfr(D)) - (D & 1)) / 2  # |ω'|

        def log_psi(p: gmpy2.mpfr, q: gmpy2.mpfr) -> gmpy2.mpfr:
            return gmpy2.log(p + q * conj)

        p, pp, q, qq = M
        half_q = gmpy2.log(gmpy2.mpfr(cycle.q_mid) / 2)
        if cycle.parity:
            value = log_psi(pp, qq) + log_psi(p, q) - half_q
        else:
            value = 2 * log_psi(p, q) - half_q
        mantissa, exponent = value.as_mantissa_exp()
    bound_units = 6 * n + 30 + 4 * (int(value) + 1) + 2 * D.bit_length()
    with mpmath.workprec(prec + 8):
        exact_value = mpmath.mpf((int(mantissa), int(exponent)))
        bound = mpmath.mpf(bound_units) * mpmath.mpf(2) ** (-prec) * mpmath.mpf("1.01")
    return Regulator(exact_value, digits, bound, METHOD + ", rounded product tree")


#: Most digits asked of the accumulated walk before the product tree is used.
ACCUMULATED_DIGITS = 17

METHOD_ACCUMULATED = "continued fraction (half period, accumulated product of complete quotients)"


def _regulator_accumulated(order: Order, digits: int, max_period: int) -> Regulator | None:
    """``log ε`` from the walk alone, multiplying the complete quotients in floating point.

    No partial quotient is stored. The kernel returns its product as an exact
    ``mantissa · 2^exponent`` with a rigorous bound on the error of its log
    (long double in the compiled kernel, about 19 significant digits at
    period 10⁶; double in the pure twin, about 15); ``None`` when that bound
    does not give ``digits`` correct digits (the caller then uses the tree).
    """
    D = order.discriminant
    _steps, _parity, q_mid, mantissa, exponent, log_error = principal_regulator_walk(D, max_period)
    prec = 3 * 64 + D.bit_length()
    with mpmath.workprec(prec):
        value = mpmath.log(mantissa) + exponent * mpmath.ln2 + mpmath.log(mpmath.mpf(q_mid) / 2)
        bound = mpmath.mpf(log_error) + abs(value) * mpmath.mpf(2) ** (8 - prec)
        if bound * 20 * mpmath.mpf(10) ** digits > value:
            return None
    return Regulator(value, digits, bound, METHOD_ACCUMULATED)


def _cycle_unit(order: Order, cycle: PrincipalHalfCycle) -> Unit:
    return Unit(
        order=order,
        norm=cycle.norm,
        period_length=cycle.period_length,
        method=METHOD,
        proof="unconditional",
        _expander=lambda: expand_unit(cycle),
        _regulator=lambda digits: regulator_from_cycle(cycle, digits),
    )


def fundamental_unit_cfrac(order: Order | int, max_period: int = DEFAULT_MAX_PERIOD) -> Unit:
    """The fundamental unit ``ε > 1`` of an order (given as :class:`Order` or its discriminant).

    >>> u = fundamental_unit_cfrac(4 * 61)
    >>> (u.x, u.y, u.denominator, u.norm)
    (29718, 3805, 1, -1)
    """
    order = Order.of(order).require_real(NO_UNIT_OF_INFINITE_ORDER)
    return _cycle_unit(order, principal_half_cycle(order.discriminant, max_period))


def regulator_cfrac(
    order: Order | int, digits: int = 30, max_period: int = DEFAULT_MAX_PERIOD
) -> Regulator:
    """The regulator ``log ε`` of an order to ``digits`` significant digits.

    Up to :data:`ACCUMULATED_DIGITS` digits the walk alone gives it (no
    partial quotient stored, see ``_regulator_accumulated``) whenever its
    error bound allows; otherwise the rounded product tree does.

    >>> str(regulator_cfrac(5, 20))
    '0.48121182505960344750'
    >>> str(regulator_cfrac(4 * 61, 12)), regulator_cfrac(4 * 61, 12).method.endswith("complete quotients)")
    ('10.9926553827', True)
    """
    order = Order.of(order).require_real(NO_UNIT_OF_INFINITE_ORDER)
    if digits <= ACCUMULATED_DIGITS:
        found = _regulator_accumulated(order, digits, max_period)
        if found is not None:
            return found
    return fundamental_unit_cfrac(order, max_period).regulator(digits)


def unit_index_in_order(field_unit: Unit, order: Order) -> int:
    """The least ``k ≥ 1`` with ``ε₀^k`` in ``order`` (``ε₀`` the field's fundamental unit).

    Writing elements of the maximal order as ``s + t ω₀`` with
    ``ω₀ = (σ + √D₀)/2``, ``σ = D₀ mod 2``, an element lies in the order of
    conductor ``f`` exactly when ``f | t``; so the powers are taken in
    ``Z[ω₀]/f`` only. ``k`` divides ``f ∏_{p | f} (1 − (D₀/p)/p)``, the order
    of ``(O/fO)^× / (Z/fZ)^×`` (Cohen, *A Course in Computational Algebraic
    Number Theory*, Prop. 5.2.12 context; Jacobson–Williams 2009, §5.6).

    >>> unit_index_in_order(fundamental_unit_cfrac(5), Order(20))
    3
    """
    f = order.conductor
    if f == 1:
        return 1
    D0 = field_unit.order.discriminant
    sigma = D0 & 1
    c = (D0 - sigma) // 4  # ω₀² = σ ω₀ + c
    u0, v0 = field_unit.half_integer_coordinates()
    s0, t0 = ((u0 - v0 * sigma) // 2) % f, v0 % f
    s, t = s0, t0
    k = 1
    limit = 3 * f + 3
    while t % f:
        # (s + tω)(s0 + t0ω) = s s0 + c t t0 + (s t0 + t s0 + σ t t0) ω
        s, t = (s * s0 + c * t * t0) % f, (s * t0 + t * s0 + sigma * t * t0) % f
        k += 1
        if k > limit:  # pragma: no cover - impossible by the group order
            raise ArithmeticError("unit index search did not terminate")
    return k
