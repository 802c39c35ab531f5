"""Square roots modulo m and divisor lists, with limits stated before anything is enumerated.

>>> square_roots_mod(13, 4 * 3 * 17)
[25, 43, 59, 77, 127, 145, 161, 179]
>>> square_roots_mod(2, 8)
[]
>>> divisors(12)
[1, 2, 3, 4, 6, 12]

Reference: H. Cohen, *A Course in Computational Algebraic Number Theory*
(Springer 1993), §1.5 (square roots modulo p and Hensel lifting).
"""

from __future__ import annotations

import gmpy2

from realquad.errors import TooLargeError
from realquad.factoring import divisors_from_factorization, factorize

#: Most square roots of d modulo |m| the solvers examine.
MAX_ROOTS = 1 << 20
#: Most divisors the factorisation cases enumerate.
MAX_DIVISORS = 1 << 22


def root_count_bound(d: int, p: int, e: int) -> int:
    """An upper bound for the number of square roots of ``d`` modulo ``p^e``.

    ``p ∤ d``: 2 (4 for ``p = 2``). ``v = v_p(d) ≥ e``: ``z ≡ 0 (mod p^⌈e/2⌉)``,
    ``p^⌊e/2⌋`` roots. ``v < e``: none for odd ``v``; else ``z = p^(v/2) w`` with
    ``w`` a root of a unit, at most ``4 p^(v/2)``.
    """
    if d % p:
        return 4 if p == 2 else 2
    if d == 0:
        return p ** (e // 2)
    v = 0
    while d and d % p == 0 and v < e:
        d //= p
        v += 1
    if v >= e:
        return p ** (e // 2)
    return 0 if v % 2 else 4 * p ** (v // 2)


def square_roots_mod(d: int, m: int, factors: dict[int, int] | None = None) -> list[int]:
    """All ``z`` in ``[0, m)`` with ``z² ≡ d (mod m)``, by Hensel lifting and the CRT (``m ≥ 1``).

    >>> square_roots_mod(-1, 25)
    [7, 18]
    """
    from sympy.ntheory import sqrt_mod

    if m == 1:
        return [0]
    if factors is None:
        factors = factorize(m)
    bound = 1
    for p, e in factors.items():
        bound *= root_count_bound(d, p, e)
    if bound == 0:
        return []
    if bound > MAX_ROOTS:
        raise TooLargeError(
            f"z² ≡ d has up to {bound:,} square roots modulo the {len(str(m))}-digit |m| "
            f"(limit {MAX_ROOTS:,}); too many classes to examine"
        )
    roots, modulus = [0], 1
    for p, e in factors.items():
        q = p**e
        local = sqrt_mod(d % q, q, all_roots=True) or []
        if not local:
            return []
        # CRT: z ≡ r (mod modulus), z ≡ s (mod q)
        inv = int(gmpy2.invert(modulus, q))
        new = []
        for s in local:
            for r in roots:
                new.append(r + modulus * (((int(s) - r) * inv) % q))
        roots, modulus = new, modulus * q
    return sorted(roots)


def divisors(n: int) -> list[int]:
    """The positive divisors of ``n ≠ 0``; refuses more than :data:`MAX_DIVISORS` of them."""
    factors = factorize(n)
    count = 1
    for e in factors.values():
        count *= e + 1
    if count > MAX_DIVISORS:
        raise TooLargeError(f"{n} has {count:,} divisors (limit {MAX_DIVISORS:,})")
    return divisors_from_factorization(factors)


def valuation(f: int, p: int) -> int:
    k = 0
    while f % p == 0:
        f //= p
        k += 1
    return k
