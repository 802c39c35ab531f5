"""Pure-Python twin of ``prime_form_kernels.c``: prime forms, square roots modulo p, the class candidates.

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

import math

from gmpy2 import isqrt, kronecker

from realquad._kernels.form_kernels import principal_b


def sqrt_mod_prime(n: int, p: int) -> int:
    """A square root of ``n`` modulo the prime ``p`` (Tonelli–Shanks), or ``−1`` if none."""
    n %= p
    if p == 2 or n == 0:
        return n
    if pow(n, (p - 1) // 2, p) != 1:
        return -1
    if p % 4 == 3:
        return pow(n, (p + 1) // 4, p)
    q, e = p - 1, 0
    while q % 2 == 0:
        q //= 2
        e += 1
    z = 2
    while pow(z, (p - 1) // 2, p) != p - 1:
        z += 1
    m, cc, t, root = e, pow(z, q, p), pow(n, q, p), pow(n, (q + 1) // 2, p)
    while t != 1:
        i, t2 = 0, t
        while t2 != 1:
            t2 = t2 * t2 % p
            i += 1
        bb = pow(cc, 1 << (m - i - 1), p)
        m, cc = i, bb * bb % p
        t, root = t * cc % p, root * bb % p
    return root


def prime_form_b(D: int, p: int) -> int:
    """The ``b`` (``0 ≤ b ≤ p``) of a primitive form ``(p, b, c)`` of discriminant ``D``, or ``−1``.

    ``p`` must be prime; there is none when ``(D/p) = −1`` or ``p`` divides the conductor.
    """
    if p == 2:
        residue = D % 8
        if residue == 1:
            b = 1
        elif residue == 0:
            b = 0
        elif residue == 4:
            b = 2
        else:
            return -1
    else:
        if kronecker(D, p) < 0:  # cheaper than Euler's criterion in the square root
            return -1
        t = sqrt_mod_prime(D, p)
        b = t if (t - D) % 2 == 0 else p - t
    c = (b * b - D) // (4 * p)
    if b % p == 0 and c % p == 0:
        return -1
    return b


def form_class_candidates(D: int, conductor: int, primes: list[int]) -> list[tuple[int, int, int]]:
    """Generators of the narrow class group of ``D``: ``J``, then forms of prime-power norm ``q``, ``4q² < D``.

    ``J = (−1, b₀, c₀)``; for each prime ``p`` of ``primes`` with ``4p² < D`` not
    dividing ``conductor`` its prime form, and for ``p | conductor`` every
    primitive ``(p^k, b, c)`` with ``4p^{2k} < D``.
    """
    r = int(isqrt(D))
    b0 = principal_b(D, r)
    out = [(-1, b0, (D - b0 * b0) // 4)]
    for p in primes:
        if 4 * p * p >= D:
            break
        if conductor % p:
            b = prime_form_b(D, p)
            if b >= 0:
                out.append((p, b, (b * b - D) // (4 * p)))
            continue
        q = p
        while 4 * q * q < D:
            for b in range(-q + 1, q + 1):
                if (b - D) % 2 == 0 and (b * b - D) % (4 * q) == 0:
                    c = (b * b - D) // (4 * q)
                    if math.gcd(math.gcd(q, b), c) == 1:
                        out.append((q, b, c))
            q *= p
    return out
