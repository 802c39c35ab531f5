"""Norm-equation workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 4): for d ≈ 10¹² and n with 12 distinct odd prime factors
(2¹² square roots of d mod n), all families of x² − dy² = n in ≤ 2 s; every
solution with |x|, |y| ≤ 10¹⁰⁰ of x² − 61y² = n for ten n in ≤ 0.1 s per n.

The cost of the first is dominated by the size of the answer: a fundamental
solution can be as large as √ε·√|n| (Nagell's bound), so the d chosen matters.
Three values are measured, each with n = −(product of the 12 least odd primes
that split), which has ~1 400 classes: 10¹² + 1 234 567 (period of √d:
74 272), 10¹² + 3·10⁶ (period 145 436) and the prime 10¹² + 39 (period
532 572, fundamental solutions up to 137 000 digits); and +n for the last, which
has no solution at all (every generator has norm −n).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from realquad.core.primes import kronecker
from realquad.equations.conics import solve_quadratic
from realquad.equations.norm import _cycle_leaves, _principal_cycle, pell_units, solve_norm_equation

LARGE = [(10**12 + 1234567, -1), (10**12 + 3 * 10**6, -1), (10**12 + 39, -1), (10**12 + 39, 1)]

#: Ten right-hand sides for x² − 61y² = n: Pell (±1), small primes that split, products of
#: them (with squares, so imprimitive classes too), and one with no solution.
N61 = [1, -1, 3, -3, 15, -39, 3 * 5 * 13 * 19, -(3**2) * 5**2 * 13, 3 * 5 * 13 * 19 * 41 * 47, 7]


def split_primes(d: int, count: int) -> list[int]:
    """The ``count`` least odd primes ``p ∤ d`` with ``(d/p) = 1``."""
    from sympy import nextprime

    out, p = [], 2
    while len(out) < count:
        p = int(nextprime(p))
        if d % p and kronecker(d, p) == 1:
            out.append(p)
    return out


def twelve_prime_n(d: int) -> int:
    n = 1
    for p in split_primes(d, 12):
        n *= p
    return n


def _families(d: int, n: int) -> Callable[[], Any]:
    def run() -> int:
        _principal_cycle.cache_clear()
        pell_units.cache_clear()
        _cycle_leaves.cache_clear()
        return len(solve_norm_equation(d, n).families)

    return run


def _bounded(n: int) -> Callable[[], Any]:
    def run() -> int:
        return len(solve_norm_equation(61, n).bounded(10**100))

    return run


def _sympy_dn(d: int, n: int) -> Callable[[], Any]:
    def run() -> int:
        from sympy.solvers.diophantine.diophantine import diop_DN

        return len(diop_DN(d, n))

    return run


#: Issue 16: d ≈ 10²⁴, n the product of the 6 least primes that split (2⁶ = 64 ideals to test).
HUGE_D = 10**24 + 49


def _infrastructure(d: int, n: int) -> Callable[[], Any]:
    def run() -> int:
        from realquad.infrastructure import principal

        principal._search.cache_clear()  # the regulator search and its table count too
        return len(solve_norm_equation(d, n).families)

    return run


def workloads() -> list[dict[str, Any]]:
    n6 = 1
    for p in split_primes(HUGE_D, 6):
        n6 *= p
    out: list[dict[str, Any]] = [
        {
            "name": f"norm equations: x² − (10²⁴ + 49)y² = {n6} (6 split primes, 64 ideals, infrastructure)",
            "run": _infrastructure(HUGE_D, n6),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
            "target": "≤ 60 s (issue 16)",
        }
    ]
    out.append(
        {
            "name": "norm equations: conic x² − (10²⁴ + 49)y² + 2x + 3y + 1 = 0 with its "
            "families (infrastructure)",
            "run": lambda: len(solve_quadratic(1, 0, -HUGE_D, 2, 3, 1).families),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
            "target": "issue 16: conics at every size",
        }
    )
    for d, sign in LARGE:
        n = sign * twelve_prime_n(d)
        out.append(
            {
                "name": f"norm equations: all families of x² − {d}y² = n, n = {n} (12 split primes)",
                "run": _families(d, n),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
                "target": "≤ 2 s",
            }
        )
    for n in N61:
        out.append(
            {
                "name": f"norm equations: x² − 61y² = {n}, every solution with |x|, |y| ≤ 10¹⁰⁰",
                "run": _bounded(n),
                "reference": _sympy_dn(61, n),
                "reference_name": "sympy diop_DN (fundamental solutions only)",
                "repeat": 5,
                "reference_repeat": 1,
                "target": "≤ 0.1 s",
            }
        )
    return out
