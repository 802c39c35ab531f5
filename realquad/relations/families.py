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
    """
    a, b0 = fam.a, fam.bs[0]
    in_a = set(fam.a_primes)
    roots1: list[int] = []
    roots2: list[int] = []
    shifts: list[list[int]] = [[] for _ in fam.B]
    for p, bp in zip(fb.primes, fb.b, strict=True):
        if p == 2 or p in in_a:
            roots1.append(-1)
            roots2.append(-1)
            for row in shifts:
                row.append(0)
            continue
        ainv = pow(a % p, -1, p)
        half = ainv * ((p + 1) // 2) % p  # (2a)⁻¹
        t = bp % p
        roots1.append((t - b0) * half % p)
        roots2.append((-t - b0) * half % p)
        for row, Bl in zip(shifts, fam.B, strict=True):
            row.append(Bl % p * ainv % p)
    return roots1, roots2, shifts
