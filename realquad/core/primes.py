"""Primes and what is built on them: one sieve, factoring, square roots modulo n, Kronecker symbols.

* :func:`primes_below` — the one sieve of Eratosthenes of the package (cached, grown on demand);
* :func:`factorize` — trial division, gmpy2's primality test and sympy's ``factorint`` (Pollard
  rho, p − 1, ECM and the quadratic sieve) for what is left, refusing an unfactored composite
  part of more than :data:`MAX_HARD_DIGITS` digits with a clear message (factoring is the one
  step whose cost is not polynomial in the size of the input);
* :func:`square_roots_mod` — every square root modulo ``m`` by Hensel lifting and the CRT, with
  its count bounded before anything is enumerated; :func:`square_root_mod_prime` for one prime;
* :func:`kronecker` — the Kronecker symbol.

>>> primes_below(20)
[2, 3, 5, 7, 11, 13, 17, 19]
>>> factorize(360), factorize(-7)
({2: 3, 3: 2, 5: 1}, {7: 1})
>>> square_roots_mod(13, 4 * 3 * 17)
[25, 43, 59, 77, 127, 145, 161, 179]
>>> square_roots_mod(2, 8), divisors(12)
([], [1, 2, 3, 4, 6, 12])

References: H. Cohen, *A Course in Computational Algebraic Number Theory*
(Springer 1993), §1.4 (Kronecker symbol), §1.5 (square roots modulo p and
Hensel lifting), §8 (factoring).
"""

from __future__ import annotations

import itertools
from bisect import bisect_left

import gmpy2

from realquad._backend import call_kernel
from realquad.errors import InputError, TooLargeError
from realquad.textio import decimal_digits

_PRIMES: list[int] = [2, 3, 5, 7]


def primes_below(n: int) -> list[int]:
    """All primes ``p < n``, from one sieve of Eratosthenes kept for the process and grown on demand.

    >>> len(primes_below(10**4))      # π(10⁴) = 1229, OEIS A006880
    1229
    """
    if _PRIMES[-1] < n:
        limit = max(n, 2 * _PRIMES[-1])
        sieve = bytearray([1]) * (limit + 1)
        sieve[0:2] = b"\x00\x00"
        for i in range(2, int(gmpy2.isqrt(limit)) + 1):
            if sieve[i]:
                sieve[i * i :: i] = bytearray(len(range(i * i, limit + 1, i)))
        _PRIMES[:] = itertools.compress(range(limit + 1), sieve)
    return _PRIMES[: bisect_left(_PRIMES, n)]


def kronecker(a: int, n: int) -> int:
    """The Kronecker symbol (a/n), for any integers ``a`` and ``n``.

    >>> [kronecker(-4, p) for p in (3, 5, 7)]
    [-1, 1, -1]
    """
    return int(gmpy2.kronecker(a, n))


#: Largest unfactored composite cofactor (in decimal digits) we hand to sympy.
MAX_HARD_DIGITS = 60

#: Trial division by the primes below this bound before anything else.
_TRIAL_LIMIT = 10_000


def factorize(n: int) -> dict[int, int]:
    """Return the prime factorisation of ``|n|`` as ``{prime: exponent}``.

    Raises :class:`~realquad.errors.InputError` for ``n == 0`` and
    :class:`~realquad.errors.TooLargeError` when a composite part of more than
    :data:`MAX_HARD_DIGITS` digits remains after the cheap methods.
    """
    n = abs(int(n))
    if n == 0:
        raise InputError("cannot factor 0")
    result: dict[int, int] = {}
    m = gmpy2.mpz(n)
    for p in primes_below(_TRIAL_LIMIT):
        if p * p > m:
            break
        if m % p == 0:
            e = 0
            while m % p == 0:
                m //= p
                e += 1
            result[p] = e
    if m > 1:
        if gmpy2.is_prime(m, 30):
            result[int(m)] = result.get(int(m), 0) + 1
        else:
            if gmpy2.is_square(m):
                root = int(gmpy2.isqrt(m))
                for p, e in factorize(root).items():
                    result[p] = result.get(p, 0) + 2 * e
                return dict(sorted(result.items()))
            if gmpy2.num_digits(m, 10) > MAX_HARD_DIGITS:
                raise TooLargeError(
                    f"cannot factor a {gmpy2.num_digits(m, 10)}-digit composite part in "
                    f"reasonable time (limit {MAX_HARD_DIGITS} digits)"
                )
            from sympy import factorint  # imported here: sympy costs 0.3 s of every start-up

            for p, e in factorint(int(m)).items():
                result[int(p)] = result.get(int(p), 0) + int(e)
    return dict(sorted(result.items()))


def squarefree_decomposition(n: int) -> tuple[int, int]:
    """Write ``n > 0`` as ``s * f**2`` with ``s`` squarefree; return ``(s, f)``.

    >>> squarefree_decomposition(72)
    (2, 6)
    """
    s, f = 1, 1
    for p, e in factorize(n).items():
        f *= p ** (e // 2)
        if e % 2:
            s *= p
    return s, f


def square_factor(n: int, trial_limit: int = 10_000) -> tuple[int, int]:
    """``n = k²·s`` with ``k²`` the largest square factor found by trial division below ``trial_limit``.

    >>> square_factor(72), square_factor(61), square_factor(8 * 10007**2)
    ((6, 2), (1, 61), (2, 200280098))
    """
    k, s = 1, n
    for p in primes_below(trial_limit):
        if p * p > s:
            break
        while s % (p * p) == 0:
            s //= p * p
            k *= p
    return k, s


def divisors_from_factorization(factors: dict[int, int]) -> list[int]:
    """All positive divisors, sorted, of the number with this factorisation.

    >>> divisors_from_factorization({2: 2, 3: 1})
    [1, 2, 3, 4, 6, 12]
    """
    divs = [1]
    for p, e in factors.items():
        divs = [d * p**k for d in divs for k in range(e + 1)]
    return sorted(divs)


#: Most square roots of d modulo ``|m|`` the solvers examine.
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
            f"z² ≡ d has up to {bound:,} square roots modulo the {decimal_digits(m)}-digit |m| "
            f"(limit {MAX_ROOTS:,}); too many classes to examine"
        )
    from sympy.ntheory import sqrt_mod  # imported here: sympy costs 0.3 s of every start-up

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


def square_root_mod_prime(n: int, p: int) -> int | None:
    """A square root of ``n`` modulo the prime ``p`` (Tonelli–Shanks), or ``None``.

    >>> square_root_mod_prime(10, 13) in (6, 7)
    True
    """
    t = call_kernel("sqrt_mod_prime", n, p)
    return None if t < 0 else int(t)
