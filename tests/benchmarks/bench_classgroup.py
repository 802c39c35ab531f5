"""Class-group workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 3): class number and structure of one field with D ≈ 10¹⁰ in
≤ 2 s; of every fundamental discriminant D ≤ 10⁵ in ≤ 30 s.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from realquad.classgroup import class_group
from realquad.classgroup.exact import class_numbers
from realquad.core.forms import Form, prime_form
from realquad.core.orders import Order
from realquad.core.primes import primes_below, squarefree_decomposition

#: Fundamental discriminants near 10¹⁰: 10¹⁰ + 1 = 101·3541·27961 (small regulator,
#: h⁺ = 6672) and 10¹⁰ + 37 = 103·137·708667 (h⁺ = 8, long cycles).
SINGLE_FIELDS = [10**10 + 1, 10**10 + 37]


def fundamental_discriminants(limit: int) -> list[int]:
    """Every fundamental discriminant 5 ≤ D ≤ limit."""
    out = []
    for D in range(5, limit + 1):
        if D % 4 == 1:
            if squarefree_decomposition(D)[1] == 1:
                out.append(D)
        elif D % 16 in (8, 12) and squarefree_decomposition(D // 4)[1] == 1:
            out.append(D)
    return out


def _all_groups(discriminants: list[int]) -> Callable[[], Any]:
    def run() -> int:
        return sum(class_group(Order(D)).class_number for D in discriminants)

    return run


def _all_class_numbers(discriminants: list[int]) -> Callable[[], Any]:
    def run() -> int:
        return sum(class_numbers(D)[0] for D in discriminants)

    return run


def _compositions(forms: list[Form], nucomp: bool) -> Callable[[], Any]:
    def run() -> int:
        total = 0
        F = forms[0]
        for G in forms:
            F = F.nucomp(G) if nucomp else F.compose(G)
            total += F.a
        return total

    return run


def workloads() -> list[dict[str, Any]]:
    fundamentals = fundamental_discriminants(10**5)
    D = 10**400 + 1  # composition of reduced forms with 200-digit coefficients
    small = [F for p in primes_below(500) if (F := prime_form(D, p)) is not None][:20]
    big = [F.power(1000 + k) for k, F in enumerate(small)]
    out: list[dict[str, Any]] = [
        {
            "name": f"classgroup: class_group, D = {D1}",
            "run": (lambda D1=D1: class_group(D1)),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
        }
        for D1 in SINGLE_FIELDS
    ]
    out += [
        {
            "name": f"classgroup: class_group of all {len(fundamentals)} fundamental D ≤ 10⁵",
            "run": _all_groups(fundamentals),
            "reference": _all_class_numbers(fundamentals),
            "reference_name": "class_numbers (lean path, no structure, no regulator)",
            "repeat": 1,
        },
        {
            "name": "forms: 20 NUCOMP compositions of reduced forms, D ≈ 10⁴⁰⁰",
            "run": _compositions(big, nucomp=True),
            "reference": _compositions(big, nucomp=False),
            "reference_name": "Dirichlet composition then rho reduction",
            "repeat": 3,
        },
    ]
    return out
