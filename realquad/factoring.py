"""Integer factorisation with an explicit effort limit.

Factoring is the one step in this package whose cost is not polynomial in the
size of the input. :func:`factorize` uses trial division by small primes,
gmpy2's primality test and sympy's ``factorint`` (Pollard rho, p − 1, ECM and
the quadratic sieve) for what is left, and refuses numbers whose unfactored
part is larger than :data:`MAX_HARD_DIGITS` digits with a clear message.

>>> factorize(360)
{2: 3, 3: 2, 5: 1}
>>> factorize(-7)
{7: 1}
"""

from __future__ import annotations

import gmpy2

from realquad.errors import InputError, TooLargeError

#: Largest unfactored composite cofactor (in decimal digits) we hand to sympy.
MAX_HARD_DIGITS = 60

_SMALL_PRIMES: list[int] = []


def _small_primes() -> list[int]:
    if not _SMALL_PRIMES:
        sieve = bytearray([1]) * 10000
        sieve[0:2] = b"\x00\x00"
        for i in range(2, 100):
            if sieve[i]:
                sieve[i * i :: i] = bytearray(len(sieve[i * i :: i]))
        _SMALL_PRIMES.extend(i for i in range(10000) if sieve[i])
    return _SMALL_PRIMES


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
    for p in _small_primes():
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
            from sympy import factorint

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


def divisors_from_factorization(factors: dict[int, int]) -> list[int]:
    """All positive divisors, sorted, of the number with this factorisation.

    >>> divisors_from_factorization({2: 2, 3: 1})
    [1, 2, 3, 4, 6, 12]
    """
    divs = [1]
    for p, e in factors.items():
        divs = [d * p**k for d in divs for k in range(e + 1)]
    return sorted(divs)
