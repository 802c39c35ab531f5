"""Pure-Python twin of ``survey_kernels.c``: the numbers behind one survey row, for many fields per call.

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

import math

from gmpy2 import is_prime

from realquad._kernels.cfrac_kernels import principal_regulator
from realquad._kernels.class_kernels import form_class_numbers


def _proper_factor(n: int) -> int:
    """A proper factor of the odd squarefree composite ``n`` (Pollard's rho).

    >>> _proper_factor(1009 * 1013) in (1009, 1013)
    True
    """
    c = 1
    while True:
        x = y = 2
        g = 1
        while g == 1:
            x = (x * x + c) % n
            y = (y * y + c) % n
            y = (y * y + c) % n
            g = math.gcd(abs(x - y), n)
        if g != n:
            return g
        c += 1


def _prime_signature(d: int) -> tuple[int, int]:
    """``(t, 1 if no prime ≡ 3 (mod 4) divides D else 0)`` for ``D = disc Q(√d)``.

    ``t`` is the number of primes dividing ``D``. Trial division of the odd
    part ``m`` of ``d`` while ``p³ ≤ m``; ``m`` then has at most two prime
    factors (both at least ``p``): a prime, or two primes of which exactly one is
    ``≡ 3 (mod 4)`` when ``m ≡ 3 (mod 4)``, else split by Pollard's rho.

    >>> _prime_signature(79), _prime_signature(34), _prime_signature(5 * 13 * 17)
    ((2, 0), (2, 1), (3, 1))
    """
    t = 0 if d % 4 == 1 else 1  # D = 4d: the prime 2
    no_three = 1
    m, p = (d if d % 2 else d // 2), 3
    while p * p * p <= m:
        if m % p == 0:
            m //= p
            t += 1
            no_three &= int(p % 4 != 3)
        p += 2
    if m > 1:
        if is_prime(m):
            t += 1
            no_three &= int(m % 4 != 3)
        elif m % 4 == 3:
            t, no_three = t + 2, 0
        else:
            t += 2
            no_three &= int(_proper_factor(m) % 4 != 3)
    return t, no_three


def survey_numbers(
    radicands: list[int], primes: list[int], max_period: int, max_forms: int
) -> list[tuple[int, int, int, int, int, tuple[int, int, int, int, int, float] | None] | None]:
    """For each squarefree ``d > 1``: ``(D, t, j₃, h⁺, j, walk)``, or ``None`` beyond ``max_forms``.

    ``D = disc Q(√d)``; ``t`` and ``j₃`` as in :func:`_prime_signature`;
    ``(h⁺, j)`` of :func:`form_class_numbers` with conductor 1 and ``primes``
    (all primes below ``√max(radicands) + 2`` at least); ``walk`` is
    :func:`principal_regulator` of ``D`` (``None`` beyond ``max_period``).

    >>> survey_numbers([79], [2, 3, 5, 7], 100, 1000)[0][:5]
    (316, 2, 0, 6, 0)
    """
    out: list[tuple[int, int, int, int, int, tuple[int, int, int, int, int, float] | None] | None]
    out = []
    for d in radicands:
        if d < 2:
            raise ValueError("a radicand must be at least 2")
        D = d if d % 4 == 1 else 4 * d
        t, no_three = _prime_signature(d)
        found = form_class_numbers(D, 1, primes, max_forms)
        if found is None:
            out.append(None)
            continue
        out.append((D, t, no_three, found[0], found[1], principal_regulator(D, max_period)))
    return out
