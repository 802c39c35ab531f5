"""Index-calculus workloads for real quadratic fields (``tests/benchmarks/run.py``).

Targets (issue 15, real side; class group and regulator together): D ≈ 10⁴⁰
in ≤ 5 s, 10⁶⁰ in ≤ 60 s, 10⁸⁰ in ≤ 30 minutes on this 2-core machine. The
fields are Q(√p) for the first prime p ≡ 1 (mod 4) above 10^k (D = p is
fundamental, and Order(D) needs no factoring). Below 10³⁰ baby-step
giant-step in the infrastructure is the reference: for the class group (the
crossover sets ``AUTO_SUBEXP_REAL``) and for the regulator alone (``AUTO_SUBEXP``
of ``realquad.units``).
"""

from __future__ import annotations

from typing import Any

import gmpy2

from realquad.classgroup import class_group
from realquad.core.orders import Order
from realquad.units import regulator


def prime_field(k: int) -> int:
    """``p``: the first prime ``≡ 1 (mod 4)`` above ``10^k``."""
    p = gmpy2.next_prime(10**k)
    while p % 4 != 1:
        p = gmpy2.next_prime(p)
    return int(p)


TARGETS = {40: "≤ 5 s", 60: "≤ 60 s", 80: "≤ 1800 s"}


def workloads() -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = []
    for k in (16, 20, 22):
        D = prime_field(k)
        out.append(
            {
                "name": f"subexp: real class group of D = p ≈ 10^{k}, against baby-step giant-step",
                "run": (lambda D=D: class_group(Order(D), method="subexp")),
                "reference": (lambda D=D: class_group(Order(D), method="bsgs")),
                "reference_name": "baby-step giant-step under GRH",
                "repeat": 1,
            }
        )
    for k in (24, 28, 30):
        D = prime_field(k)
        out.append(
            {
                "name": f"subexp: regulator of D = p ≈ 10^{k}, against baby-step giant-step",
                "run": (lambda D=D: regulator(Order(D), method="subexp")),
                "reference": (lambda D=D: regulator(Order(D), method="bsgs")),
                "reference_name": "baby-step giant-step (unconditional)",
                "repeat": 1,
            }
        )
    for k in (40, 50, 60, 70, 80):
        D = prime_field(k)
        out.append(
            {
                "name": f"subexp: real class group and regulator of D = p ≈ 10^{k}",
                "run": (lambda D=D: class_group(Order(D), method="subexp").regulator),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
                "target": TARGETS.get(k, ""),
            }
        )
    for k, f in ((40, 6), (60, 6)):
        p = prime_field(k)
        out.append(
            {
                "name": f"subexp: class group and regulator of the order D = {f}²·(p ≈ 10^{k})",
                "run": (
                    lambda p=p, f=f: (
                        class_group(Order.from_conductor(p, f), method="subexp").regulator
                    )
                ),
                "reference": (lambda p=p: class_group(Order(p), method="subexp").regulator),
                "reference_name": "its field alone",
                "repeat": 1,
            }
        )
    return out
