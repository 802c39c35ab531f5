"""Pure-Python twin of ``cfrac_kernels.c``: the principal cycle of ω = (D mod 2 + √D)/2.

The walks behind units, regulators and Pell equations, and the exact leaf
matrices of the convergents' product tree. The one exception to "the same
results" is :func:`principal_regulator`, whose rounded product is computed in
double here and in long double there: both return a rigorous error bound,
and the two values agree within the sum of their bounds.

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

import math

from gmpy2 import isqrt

#: Largest discriminant every compiled kernel accepts (the pure twin has no limit).
MAX_WORD_DISCRIMINANT = (1 << 62) - 1

#: Largest discriminant the compiled continued-fraction walks accept.
MAX_CFRAC_DISCRIMINANT = (1 << 63) - 1


def principal_half_cycle(D: int, max_steps: int) -> tuple[list[int], int, int, int] | None:
    """Walk the continued fraction of ω = (D mod 2 + √D)/2 to the cycle's symmetry point.

    The principal cycle of reduced quadratic irrationals (P + √D)/Q (Q = 2
    marking the principal ideal) is a palindrome, so half of it determines
    the fundamental unit. Returns ``(quotients, parity, q_mid, steps)``:

    * ``parity`` 1: the period ``l = 2m + 1`` is odd (found where
      ``Q_m = Q_{m+1}``); ``quotients`` holds ``a_0 … a_m`` and
      ``q_mid = Q_{m+1}``;
    * ``parity`` 0: the period ``l = 2m`` is even (found where
      ``P_m = P_{m+1}``, ``m ≥ 1``); ``quotients`` holds ``a_0 … a_{m-1}``
      and ``q_mid = Q_m``;

    ``steps`` is the period length ``l``. Returns ``None`` when more than
    ``max_steps`` steps would be needed. ``D`` must be a positive non-square
    (``ValueError`` otherwise).

    >>> principal_half_cycle(4 * 61, 100)
    ([7, 1, 4, 3, 1, 2], 1, 10, 11)
    """
    r = _check_walk(D)
    P = D & 1
    Q = 2
    a = (P + r) // Q
    quotients = [a]
    append = quotients.append
    P1 = a * Q - P
    Q1 = (D - P1 * P1) // Q
    # P1 == P cannot hold at k = 0 unless Q1 == Q (only D = 5), tested first.
    for k in range(max_steps // 2 + 2):
        if Q1 == Q:
            return quotients, 1, Q1, 2 * k + 1
        if P1 == P:
            quotients.pop()
            return quotients, 0, Q, 2 * k
        a = (P1 + r) // Q1
        append(a)
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


def _check_walk(D: int) -> int:
    if D <= 0:
        raise ValueError("the discriminant must be positive")
    r = int(isqrt(D))
    if r * r == D:
        raise ValueError("the discriminant must not be a square")
    return r


def principal_period(D: int, max_steps: int) -> tuple[int, int, int] | None:
    """Period length, its parity and ``q_mid`` of the principal cycle, without quotients.

    The same walk and the same results as :func:`principal_half_cycle`
    (``(steps, parity, q_mid)``), storing nothing: for period lengths alone.

    >>> principal_period(4 * 61, 100)
    (11, 1, 10)
    """
    r = _check_walk(D)
    P = D & 1
    Q = 2
    P1 = ((P + r) // Q) * Q - P
    Q1 = (D - P1 * P1) // Q
    for k in range(max_steps // 2 + 2):
        if Q1 == Q:
            return 2 * k + 1, 1, Q1
        if P1 == P:
            return 2 * k, 0, Q
        a = (P1 + r) // Q1
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


#: Unit roundoff of the floating type the pure regulator walk uses (double).
_UNIT_ROUNDOFF = 2.0**-53

#: Roundings in one complete quotient θ = (P + s)/Q: s = √D from float(D)
#: (2, counting the conversion of ``D`` and the square root), the sum and
#: the quotient.
_THETA_ROUNDINGS = 4

#: The running product is renormalised (exactly, by a power of 2) above this.
_RENORMALISE = 2.0**900


def principal_regulator(D: int, max_steps: int) -> tuple[int, int, int, int, int, float] | None:
    """The half-cycle walk with the regulator accumulated in floating point.

    Returns ``(steps, parity, q_mid, mantissa, exponent, log_error)``: the
    regulator is ``R = log(mantissa · 2^exponent) + log(q_mid / 2)`` up to an
    absolute error of at most ``log_error``, which rigorously bounds every
    rounding made here. The rounded product is
    ``∏_{i=1}^{m} θ_i² · θ_{m+1}^{parity}`` of the complete quotients
    ``θ_i = (P_i + √D)/Q_i`` of ω (``l = 2m + parity``): the palindrome of the
    period gives ``ε = ∏_{i=1}^{l} θ_i = (∏_{i=1}^{m} θ_i)² θ_{m+1}^{parity} · Q_{mid}/2``.
    Returns ``None`` beyond ``max_steps``.

    >>> steps, parity, q, mant, exp, err = principal_regulator(4 * 61, 100)
    >>> abs(math.log(mant) + exp * math.log(2) + math.log(q / 2) - 10.992655382659) < 1e-9
    True
    """
    r = _check_walk(D)
    s = math.sqrt(D)
    P = D & 1
    Q = 2
    P1 = ((P + r) // Q) * Q - P
    Q1 = (D - P1 * P1) // Q
    prod = 1.0
    exponent = 0
    frexp = math.frexp
    for k in range(max_steps // 2 + 2):
        if Q1 == Q or P1 == P:
            parity = 1 if Q1 == Q else 0
            mant, e = frexp(prod)
            value = mant * mant  # in [1/4, 1): exact exponent bookkeeping below
            exponent = 2 * (exponent + e)
            if parity:
                value *= (P1 + s) / Q1
            mant, e = frexp(value)
            exponent += e - 53
            roundings = 2 * k * (_THETA_ROUNDINGS + 1) + 1 + parity * (_THETA_ROUNDINGS + 1)
            return (
                2 * k + parity,
                parity,
                Q1 if parity else Q,
                int(mant * 2.0**53),
                exponent,
                _log_error(roundings, _UNIT_ROUNDOFF),
            )
        prod *= (P1 + s) / Q1
        if prod > _RENORMALISE:
            prod, e = frexp(prod)
            exponent += e
        a = (P1 + r) // Q1
        P2 = a * Q1 - P1
        Q, Q1 = Q1, Q + a * (P1 - P2)
        P, P1 = P1, P2
    return None


def _log_error(roundings: int, unit: float) -> float:
    """A bound on ``|log ∏(1 + δ_j)|`` for ``roundings`` factors with ``|δ_j| ≤ unit``.

    ``|log(1 + δ)| ≤ unit/(1 − unit)``; the factor 1.001 absorbs the rounding
    of this float computation itself.
    """
    return roundings * unit / (1.0 - unit) * 1.001


def convergent_leaves(quotients: list[int], chunk: int) -> list[tuple[int, int, int, int]]:
    """Products of ``[[a, 1], [1, 0]]`` over consecutive blocks of ``chunk`` quotients.

    Each block's product ``[[p, p'], [q, q']]`` is returned as ``(p, p', q, q')``.

    >>> convergent_leaves([1, 2, 3, 4, 5], 2)
    [(3, 1, 2, 1), (13, 3, 4, 1), (5, 1, 1, 0)]
    """
    out: list[tuple[int, int, int, int]] = []
    append = out.append
    n = len(quotients)
    for start in range(0, n, chunk):
        p, pp, q, qq = 1, 0, 0, 1
        for a in quotients[start : start + chunk]:
            p, pp = a * p + pp, p
            q, qq = a * q + qq, q
        append((p, pp, q, qq))
    return out
