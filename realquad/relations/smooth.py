"""From sieve candidates to relations: the smooth values of a form and the classes they give.

For the form ``f = (a, b, c)`` of a family and an integer ``x``, the value
``n = f(x, 1)`` is the first coefficient of ``f·[[x, −1], [1, 0]] =
(n, B, ·)`` with ``B = −(2ax + b)``, a form properly equivalent to ``f``.
When ``|n| = ∏ p^{e_p}`` factors over the factor base (and at most one
large prime, or two with the double large-prime variant), ``(|n|, B, ·)`` is the composition of the ``(p^{e_p}, B, ·)``,
and ``(p^e, B, ·) = P_p^{±e}`` with ``+`` when ``B ≡ b_p`` modulo ``p``
(modulo 4 for ``p = 2``). With ``[f] = ∏ P_q^{σ_q}`` over ``q | a``
(:mod:`~realquad.relations.families`) this is the relation
``Σ ±e_p·[P_p] − Σ σ_q·[P_q] = 0`` in the class group (for ``D > 0`` the
wide group, ``n`` and ``−n`` being norms of ideals in one wide class; the
element ``ax + (b + √D)/2``, of norm ``a·n``, generates the principal ideal
behind it). M. J. Jacobson Jr., "Applying sieving to the computation of
quadratic class groups", *Math. Comp.* 68 (1999), 859–867.

>>> from realquad.relations.factor_base import factor_base
>>> from realquad.relations.families import family
>>> fb = factor_base(-1000003, 60)
>>> fam = family(fb, [37, 47])            # a = 1739
>>> rel = relation_at(fb, fam, 0, 0, 10**6)   # f(0) = c = 313, a large prime
>>> rel.exponents, rel.large
({37: 1, 47: 1, 313: 1}, 313)
"""

from __future__ import annotations

from dataclasses import dataclass

import gmpy2

from realquad.relations.factor_base import FactorBase, prime_b
from realquad.relations.families import Family


@dataclass(frozen=True)
class Relation:
    """``Σ exponents[p]·[P_p] = 0`` in the class group, found at ``x`` on the form ``(a, b, ·)``.

    ``large`` is the product of the primes beyond the factor base in it (``1``: none; one
    or, with the double large-prime variant, two).
    """

    exponents: dict[int, int]
    a: int
    b: int
    x: int
    large: int = 1

    @property
    def B(self) -> int:
        """``−(2ax + b)``: the middle coefficient of ``(f(x, 1), B, ·)``."""
        return -(2 * self.a * self.x + self.b)

    def value(self, D: int) -> int:
        """``n = f(x, 1) = ax² + bx + c`` for the form ``(a, b, c)`` of discriminant ``D``."""
        return (self.a * self.x + self.b) * self.x + (self.b * self.b - D) // (4 * self.a)


def sign_of(B: int, p: int, bp: int, D: int) -> int:
    """``+1`` when ``(p^e, B, ·)`` is a power of ``P_p = (p, b_p, ·)``, ``−1`` for its inverse.

    >>> sign_of(3, 7, 3, -47), sign_of(-3, 7, 3, -47), sign_of(0, 47, 47, -47)   # ramified: +1
    (1, -1, 1)
    """
    if D % p == 0:
        return 1
    modulus = 4 if p == 2 else p
    return 1 if (B - bp) % modulus == 0 else -1


def split_cofactor(n: int, low: int, high: int) -> tuple[int, int] | None:
    """``(p, q)``, ``p ≤ q``, with ``n = p·q`` for primes ``low < p``, ``q ≤ high``; else ``None``.

    ``n`` is composite and below ``high²`` (the caller checks). Brent's
    variant of Pollard's rho (R. P. Brent, "An improved Monte Carlo
    factorization algorithm", *BIT* 20 (1980), 176–184), products of 32
    differences per gcd, a few starting constants; ``n`` is at most about
    ``10¹⁵`` here, so a factor comes after some thousands of steps.

    >>> split_cofactor(1000003 * 1000033, 1000, 2 * 10**6)
    (1000003, 1000033)
    >>> split_cofactor(1009 * 1000003, 2000, 2 * 10**6) is None      # 1009 ≤ low
    True
    """
    n = gmpy2.mpz(n)
    if n % 2 == 0:
        d = gmpy2.mpz(2)
    else:
        d = gmpy2.mpz(1)
        for c in (1, 3, 5, 7, 11):
            d = _brent(n, c)
            if 1 < d < n:
                break
        else:
            return None
    p, q = sorted((int(d), int(n // d)))
    if p <= low or q > high or not gmpy2.is_prime(p) or not gmpy2.is_prime(q):
        return None
    return p, q


def _brent(n: gmpy2.mpz, c: int) -> gmpy2.mpz:
    """A divisor of ``n`` from Brent's cycle search on ``x ↦ x² + c`` (``n`` itself on failure)."""
    y, r, q, m = gmpy2.mpz(2), 1, gmpy2.mpz(1), 32
    g = gmpy2.mpz(1)
    x = ys = y
    while g == 1:
        x = y
        for _ in range(r):
            y = (y * y + c) % n
        k = 0
        while k < r and g == 1:
            ys = y
            for _ in range(min(m, r - k)):
                y = (y * y + c) % n
                q = q * abs(x - y) % n
            g = gmpy2.gcd(q, n)
            k += m
        r *= 2
        if r > 1 << 20:  # pragma: no cover - far beyond the cofactors met
            return n
    if g == n:
        while True:
            ys = (ys * ys + c) % n
            g = gmpy2.gcd(abs(x - ys), n)
            if g > 1:
                return g
    return g


def relation_at(
    fb: FactorBase,
    fam: Family,
    k: int,
    x: int,
    large_bound: int,
    hits: list[int] | None = None,
    double: bool = False,
) -> Relation | None:
    """The relation of polynomial ``k`` of ``fam`` at ``x``, or ``None`` if the value is not smooth.

    ``hits``: the factor-base indices the sieve reports dividing the value
    (all odd primes not dividing ``a`` are tried when ``None``). At most one
    prime ``≤ large_bound`` beyond the factor base is allowed, or with
    ``double`` two (:func:`split_cofactor`).
    """
    D, a, b = fb.discriminant, fam.a, fam.bs[k]
    c = (b * b - D) // (4 * a)
    n = gmpy2.mpz(abs((a * x + b) * x + c))
    if fb.conductor > 1 and gmpy2.gcd(n, fb.conductor) > 1:
        return None  # an ideal of norm prime to the conductor only factors over the prime ideals
    B = -(2 * a * x + b)
    exponents: dict[int, int] = {}
    in_a = set(fam.a_primes)  # they and 2 are divided out below (the sieve leaves them out)
    for j in range(fb.size) if hits is None else hits:
        p = fb.primes[j]
        if p == 2 or p in in_a:
            continue
        n, e = gmpy2.remove(n, p)
        if e:
            exponents[p] = sign_of(B, p, fb.b[j], D) * e
    for p in ([2] if 2 in fb.index else []) + fam.a_primes:
        n, e = gmpy2.remove(n, p)
        if e:
            exponents[p] = sign_of(B, p, fb.b[fb.index[p]], D) * e
    large = 1
    if n != 1:
        if n <= fb.bound:
            return None
        if gmpy2.is_prime(n):
            if n > large_bound:
                return None
            primes = [int(n)]
        else:
            if not double or n > large_bound * large_bound:
                return None
            pair = split_cofactor(int(n), fb.bound, large_bound)
            if pair is None:
                return None
            primes = list(pair)
        for p in primes:
            large *= p
            exponents[p] = exponents.get(p, 0) + sign_of(B, p, prime_b(D, p), D)
            if not exponents[p]:  # pragma: no cover - p² with opposite signs cannot occur
                del exponents[p]
    for q, sigma in zip(fam.a_primes, fam.signs(k, fb), strict=True):
        e = exponents.get(q, 0) - sigma
        if e:
            exponents[q] = e
        else:
            exponents.pop(q, None)
    if not exponents:
        return None
    return Relation(dict(sorted(exponents.items())), a, b, x, large)
