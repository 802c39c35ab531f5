"""Families of sieve polynomials: the forms ``(a, b_k, c_k)`` with ``a`` a product of factor-base primes.

For ``a = q₁⋯q_s`` (distinct odd split primes of the factor base) the forms
``f = (a, b, c)`` of discriminant ``D`` number ``2^s``: ``b`` is fixed modulo
``2a`` by a choice of square root ``±t_l`` of ``D`` modulo each ``q_l``. With
``A_l = a/q_l`` and ``B_l = A_l·(t_l·A_l⁻¹ mod q_l)``, ``b = ε·a + Σ ±B_l``
(``ε ∈ {0, 1}`` fixing the parity ``b ≡ D (mod 2)``); the last sign is kept
(the other half are the inverse forms) and the others run through a Gray
code, so that consecutive polynomials differ by one ``±2B_l``
(self-initialisation: S. Contini, *Factoring integers with the
self-initializing quadratic sieve*, M.A. thesis, Georgia 1997).

The class of ``f`` is ``∏ P_{q_l}^{σ_l}`` with ``σ_l = +1`` when
``b ≡ b_{q_l} (mod q_l)`` and ``−1`` otherwise (Dirichlet composition of
forms with coprime first coefficients and a common middle coefficient).

>>> from realquad.relations.factor_base import factor_base
>>> fb = factor_base(-(10**20 + 3), 200)     # 10²⁰ + 3 ≡ 3 (mod 4): D = −(10²⁰ + 3)
>>> fam = family(fb, [113, 151])
>>> fam.a, len(fam.bs), fam.steps
(17063, 2, [-1])
>>> all((b * b - fb.discriminant) % (4 * fam.a) == 0 for b in fam.bs)
True
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from realquad.relations.factor_base import FactorBase


@dataclass(frozen=True)
class Family:
    """The ``2^(s−1)`` polynomials of one ``a``: their ``b``, the Gray-code steps and the ``B_l``."""

    discriminant: int
    a: int
    a_primes: list[int]
    B: list[int]
    bs: list[int]
    steps: list[int]

    def signs(self, k: int, fb: FactorBase) -> list[int]:
        """``σ_l`` of polynomial ``k``: its class is ``∏ P_{q_l}^{σ_l}``."""
        b = self.bs[k]
        return [1 if (b - fb.b[fb.index[q]]) % q == 0 else -1 for q in self.a_primes]


def family(fb: FactorBase, a_primes: list[int]) -> Family:
    """The family of ``a = ∏ a_primes`` (distinct odd split primes of ``fb``; module notes)."""
    D = fb.discriminant
    a = math.prod(a_primes)
    B = []
    for q in a_primes:
        A = a // q
        t = fb.b[fb.index[q]] % q
        gamma = t * pow(A % q, -1, q) % q
        if 2 * gamma > q:
            gamma = q - gamma
        B.append(A * gamma)
    b = sum(B)
    if (b - D) % 2:
        b += a
    bs = [b]
    steps: list[int] = []
    s = len(a_primes)
    positive = [True] * s
    for i in range(1, 2 ** (s - 1)):
        v = (i & -i).bit_length() - 1  # the Gray code flips B_v
        if positive[v]:
            b -= 2 * B[v]
            steps.append(-(v + 1))
        else:
            b += 2 * B[v]
            steps.append(v + 1)
        positive[v] = not positive[v]
        bs.append(b)
    return Family(D, a, list(a_primes), B, bs, steps)


def sieve_inputs(fb: FactorBase, fam: Family) -> tuple[list[int], list[int], list[list[int]]]:
    """``roots1, roots2, shifts`` of the first polynomial for the sieve kernel.

    Roots of ``a·x² + b·x + c ≡ 0 (mod p)``: ``x ≡ (±t_p − b)·(2a)⁻¹``; one
    root for ``p | D``; ``−1`` (left out) for ``p = 2`` and ``p | a``, whose
    powers the caller divides out itself. Changing ``b`` by ``+2B_l`` moves
    each root by ``−B_l·a⁻¹`` (the kernel's step ``+(l + 1)``).

    Computed for all primes at once in ``numpy`` words (primes below ``2³¹``:
    products of two residues below ``2⁶²``): residues of the big integers
    ``a``, ``b``, ``B_l`` by Horner's rule on their 30-bit digits, ``a⁻¹`` as
    ``a^(p−2)`` (Fermat), one square-and-multiply for every prime together.

    >>> from realquad.relations.factor_base import factor_base
    >>> fb = factor_base(-(10**20 + 3), 200)
    >>> r1, r2, shifts = sieve_inputs(fb, family(fb, [113, 151]))
    >>> fb.primes[:4], r1[:4], r2[:4], shifts[0][:4]
    ([7, 13, 19, 41], [5, 1, 4, 38], [6, 12, 16, 23], [5, 0, 12, 22])
    """
    import numpy as np

    if fb.primes and fb.primes[-1] >= 2**31:
        raise OverflowError("sieve_inputs takes primes below 2^31")
    p = np.array(fb.primes, dtype=np.int64)
    left_out = (p == 2) | np.isin(p, fam.a_primes)
    q = np.where(left_out, 3, p)  # any odd modulus where the answer is thrown away

    def residue(n: int) -> Any:
        digits = []
        n = abs(n)
        while n:
            digits.append(n & (2**30 - 1))
            n >>= 30
        r = np.zeros_like(q)
        for d in reversed(digits):
            r = ((r << 30) + d) % q
        return r

    def signed(n: int) -> Any:
        r = residue(n)
        return (q - r) % q if n < 0 else r

    a = residue(fam.a)
    ainv = np.ones_like(q)  # a^(q − 2) mod q, the bits of every exponent together
    e = q - 2
    base = a.copy()
    while e.any():
        odd = (e & 1).astype(bool)
        ainv = np.where(odd, ainv * base % q, ainv)
        base = base * base % q
        e >>= 1
    half = ainv * ((q + 1) // 2) % q  # (2a)⁻¹
    t = np.array(fb.b, dtype=np.int64) % q
    b0 = signed(fam.bs[0])
    roots1 = np.where(left_out, -1, (t - b0) % q * half % q)
    roots2 = np.where(left_out, -1, (-t - b0) % q * half % q)
    shifts = [np.where(left_out, 0, residue(Bl) * ainv % q).tolist() for Bl in fam.B]
    return roots1.tolist(), roots2.tolist(), shifts
