"""Class groups under GRH (baby-step giant-step in the infrastructure) for the benchmark runner.

Target (realquad issue 5): class number and structure, Cl and Cl⁺, of a field with D ≈ 10²⁰ in
≤ 10 s on the 2-core machine. Fields: the least primes D ≡ 1 (mod 4) above 10¹⁶, 10¹⁸, 10²⁰
(h = 1, 3, 1: the regulator is as large as it gets), and three with h > 1 near 10²⁰:
8·(10¹⁹ + 1) (Cl = Z/14, Cl⁺ = Z/2 × Z/14), 4·(10²⁰ + 7) (Cl = (Z/2)², Cl⁺ = (Z/2)³) and
4·(10²⁰ + 3) (Cl = Z/2 × Z/112, the cost grows with the cyclic orders). Near 10¹² the exact
cycle method is the reference (the same invariants; it stops near 10¹³).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import gmpy2

from realquad.classgroup import class_group
from realquad.classgroup.exact import class_invariants


def prime_discriminant(k: int) -> int:
    """The least prime ``p ≡ 1 (mod 4)`` above ``10^k``."""
    p = gmpy2.next_prime(10**k)
    while p % 4 != 1:
        p = gmpy2.next_prime(p)
    return int(p)


def _grh(D: int) -> Callable[[], Any]:
    def run() -> tuple[int, list[int], list[int]]:
        G = class_group(D, method="bsgs")
        return G.class_number, G.invariants, G.narrow_invariants

    return run


def workloads() -> list[dict[str, Any]]:
    fields = [(k, prime_discriminant(k)) for k in (16, 18, 20)]
    out: list[dict[str, Any]] = [
        {
            "name": "classgroup-grh: Cl and Cl⁺ by baby-step giant-step, D = 10¹² + 1 (h = 50280)",
            "run": _grh(10**12 + 1),
            "reference": lambda: class_invariants(10**12 + 1),
            "reference_name": "exact cycle method (class_invariants)",
            "repeat": 1,
        },
        {
            "name": "classgroup-grh: Cl and Cl⁺ by baby-step giant-step, D = 4·(10¹² + 39) (h = 1)",
            "run": _grh(4 * (10**12 + 39)),
            "reference": lambda: class_invariants(4 * (10**12 + 39)),
            "reference_name": "exact cycle method (class_invariants)",
            "repeat": 1,
        },
    ]
    for k, D in fields:
        out.append(
            {
                "name": f"classgroup-grh: Cl and Cl⁺ by baby-step giant-step, D = {D} (≈ 10^{k})",
                "run": _grh(D),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
                "target": "≤ 10 s" if k == 20 else "",
            }
        )
    for label, D in (
        ("8·(10¹⁹ + 1), h = 14", 8 * (10**19 + 1)),
        ("4·(10²⁰ + 7), h = 4", 4 * (10**20 + 7)),
        ("4·(10²⁰ + 3), h = 224", 4 * (10**20 + 3)),
    ):
        out.append(
            {
                "name": f"classgroup-grh: Cl and Cl⁺ by baby-step giant-step, D = {label}",
                "run": _grh(D),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
                "target": "≤ 10 s",
            }
        )
    return out
