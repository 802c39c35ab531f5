"""An estimate of ``h·R`` from a truncated Euler product of ``L(1, χ_D)``.

For the order of discriminant ``D > 0`` the analytic class number formula
gives ``h·R = (√D/2)·L(1, χ_D)`` with ``χ_D(n) = (D/n)`` the Kronecker symbol
(Dirichlet; for orders see Cohen, *A Course in Computational Algebraic Number
Theory*, §5.6 and Jacobson–Williams 2009, §9.4). Truncating the Euler product
``L(1, χ) = ∏_p (1 − χ(p)/p)^{−1}`` at ``P`` leaves a relative error that is
``O(log(PD)/√P)``-small under GRH (E. Bach, "Improved approximations for
Euler products", CMS Conf. Proc. 15, 1995) and typically far smaller; the
value here is used only to size searches (the regulator's and the class
group's baby-step giant-step), never to decide an answer, so no error bound
is claimed for it: the explicit constants of such GRH bounds could not be
checked against their source here, and none is invented. The class number
under GRH comes from the group itself
(:mod:`realquad.infrastructure.class_group_bsgs`), not from ``h·R``.

>>> e = estimate_hR(4 * (10**9 + 7))
>>> e.primes, round(e.value / 14693.62, 1)    # h = 1 for this field (from the cycle)
(303, 1.0)
>>> 1e5 < estimated_period(4 * 1000000000091, 2_000) < 1e7    # the period is 1,103,310
True
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from realquad._backend import kernels
from realquad._kernels import _pure


@dataclass(frozen=True)
class HREstimate:
    """``value ≈ h·R`` from the Euler product over the primes below ``bound``."""

    discriminant: int
    value: float
    bound: int
    primes: int


@lru_cache(maxsize=4)
def primes_below(n: int) -> tuple[int, ...]:
    """The primes ``< n`` (sieve of Eratosthenes).

    >>> primes_below(20)
    (2, 3, 5, 7, 11, 13, 17, 19)
    """
    if n < 3:
        return ()
    sieve = bytearray([1]) * n
    sieve[0] = sieve[1] = 0
    for p in range(2, math.isqrt(n - 1) + 1):
        if sieve[p]:
            sieve[p * p :: p] = bytearray(len(range(p * p, n, p)))
    return tuple(i for i, flag in enumerate(sieve) if flag)


def estimate_hR(D: int, bound: int | None = None) -> HREstimate:
    """``(√D/2)·∏_{p<bound} (1 − (D/p)/p)^{−1}``, an approximation of ``h·R``.

    The default ``bound`` grows like ``D^{1/4}`` (between 2000 and 100000),
    keeping the cost far below that of the searches it sizes.
    """
    if bound is None:
        bound = min(100_000, max(2_000, 4 * math.isqrt(math.isqrt(D))))
    primes = primes_below(bound)
    try:
        symbols = kernels.kronecker_symbols(D, list(primes))
    except OverflowError:
        symbols = _pure.kronecker_symbols(D, list(primes))
    log_product = 0.0
    for p, chi in zip(primes, symbols, strict=True):
        if chi:
            log_product -= math.log1p(-chi / p)
    value = math.exp(0.5 * math.log(D) - math.log(2) + log_product)
    return HREstimate(D, value, bound, len(primes))


#: Average growth of ``log ε`` per continued-fraction step (Lévy's constant π²/(12 log 2)).
LEVY = math.pi**2 / (12 * math.log(2))


def estimated_period(D: int, bound: int | None = None) -> float:
    """Period length of the continued fraction expected if the class number were 1.

    ``R ≤ h·R``, and ``R`` grows by Lévy's constant per step on average, so
    this is about ``h`` times the period; an estimate for planning and
    messages, never a result.
    """
    return estimate_hR(D, bound).value / LEVY
