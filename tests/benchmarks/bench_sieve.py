"""The sieve kernel for the benchmark runner (``tests/benchmarks/run.py``).

One family of 64 polynomials ``a·x² + b_k·x + c_k`` of discriminant
``D = −(10⁶⁰ + 7)`` (``a`` a product of seven factor-base primes, the
``b_k`` in Gray-code order) sieved over ``−2¹⁶ ≤ x < 2¹⁶`` with the first
3000 primes that split or ramify, as the relation search of the
sub-exponential class group method sieves it; against the pure-Python twin.
The inputs are built here from the definitions (square roots of ``D`` modulo
each prime, the roots ``(±t − b)·(2a)⁻¹`` and their shifts ``B_l·a⁻¹``), not
through the relation search, so the workload stays the same when that code
changes.
"""

from __future__ import annotations

import math
from typing import Any

from realquad._backend import kernels, pure
from realquad.core.primes import kronecker, primes_below

D = -(10**60 + 7)
PRIMES = 3000
M = 2**16
FACTORS = 7  # 2⁶ = 64 polynomials


def family_inputs() -> tuple[list[Any], int]:
    """The arguments of ``sieve_family`` for the workload's family, and its polynomial count."""
    primes: list[int] = []
    roots: list[int] = []  # a square root t of D modulo p
    for p in primes_below(10**6):
        if kronecker(D, p) == -1:
            continue
        b = pure.prime_form_b(D, p)  # b² ≡ D (mod 4p)
        primes.append(p)
        roots.append(b % p)
        if len(primes) == PRIMES:
            break
    # the leading coefficient: seven consecutive split primes near the size that balances the values
    size = math.exp(math.log(math.isqrt(-D) / (2 * M)) / FACTORS)
    pool = [i for i, p in enumerate(primes) if p > size and D % p]
    chosen = pool[:FACTORS]
    a = math.prod(primes[i] for i in chosen)
    B = []
    for i in chosen:
        q, t = primes[i], roots[i]
        A = a // q
        B.append(A * (t * pow(A, -1, q) % q))
    b = sum(B)
    if (b - D) % 2:
        b += a
    steps: list[int] = []
    positive = [True] * FACTORS
    for i in range(1, 2 ** (FACTORS - 1)):
        v = (i & -i).bit_length() - 1  # Gray code: b_k ∓ 2·B_v
        steps.append(-(v + 1) if positive[v] else v + 1)
        positive[v] = not positive[v]
    left_out = {primes[i] for i in chosen} | {2}
    roots1, roots2, shifts = [], [], [[] for _ in B]
    for p, t in zip(primes, roots, strict=True):
        if p in left_out:
            roots1.append(-1)
            roots2.append(-1)
            for row in shifts:
                row.append(0)
            continue
        ainv = pow(a, -1, p)
        half = ainv * ((p + 1) // 2) % p  # (2a)⁻¹ mod p
        roots1.append((t - b) * half % p)
        roots2.append((-t - b) * half % p)
        for row, Bl in zip(shifts, B, strict=True):
            row.append(Bl * ainv % p)
    # logarithms and threshold: log₂ of the primes scaled so every sum stays below 256, the
    # primes below 40 not sieved; the threshold leaves room for one prime up to 50× the largest
    typical = math.log2(M * math.isqrt(-D) * 0.7)
    scale = min(1.0, 240.0 / (typical + 20))
    logs = [0 if p < 40 else max(1, round(scale * math.log2(p))) for p in primes]
    slack = math.log2(50 * primes[-1]) * 0.9 + 4
    threshold = max(1, round(scale * (typical - slack)))
    return [primes, logs, roots1, roots2, shifts, steps, M, threshold], len(steps) + 1


def workloads() -> list[dict[str, Any]]:
    args, count = family_inputs()
    return [
        {
            "name": f"sieve: family of {count} polynomials, {PRIMES:,} primes, M = 2¹⁶",
            "run": lambda: kernels.sieve_family(*args),
            "reference": lambda: pure.sieve_family(*args),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "reference_repeat": 1,
            "count": count,
            "unit": "polynomials",
        },
    ]
