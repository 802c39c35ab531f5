"""Index-calculus class group workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 15, imaginary side): |D| ≈ 10⁴⁰ in ≤ 2 s, 10⁶⁰ in ≤ 20 s,
10⁸⁰ in ≤ 5 minutes on this 2-core machine. The fields are Q(√−p) for the
first prime p ≡ 3 (mod 4) above 10^k (D = −p is fundamental, and Order(D)
needs no factoring). Below 10³² the baby-step giant-step method is the
reference (the crossover sets ``AUTO_SUBEXP_IMAGINARY``).
"""

from __future__ import annotations

import math
from typing import Any

import gmpy2

from realquad.classgroup import class_group
from realquad.core.orders import Order


def prime_field(k: int) -> int:
    """``−p`` for the first prime ``p ≡ 3 (mod 4)`` above ``10^k``."""
    p = gmpy2.next_prime(10**k)
    while p % 4 != 3:
        p = gmpy2.next_prime(p)
    return -int(p)


def L(D: int) -> float:
    """``exp(√(log |D| · log log |D|))``, the scale of sub-exponential running times."""
    x = math.log(abs(D))
    return math.exp(math.sqrt(x * math.log(x)))


TARGETS = {40: "≤ 2 s", 60: "≤ 20 s", 80: "≤ 300 s"}


def workloads() -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = []
    for k in (20, 24, 28, 30):
        D = prime_field(k)
        out.append(
            {
                "name": f"subexp: class group of D = −(p ≈ 10^{k}), against baby-step giant-step",
                "run": (lambda D=D: class_group(Order(D), method="subexp")),
                "reference": (lambda D=D: class_group(Order(D), method="bsgs")),
                "reference_name": "baby-step giant-step under GRH",
                "repeat": 1,
            }
        )
    for k in (40, 50, 60, 70, 80):
        D = prime_field(k)
        out.append(
            {
                "name": f"subexp: class group of D = −(p ≈ 10^{k})",
                "run": (lambda D=D: class_group(Order(D), method="subexp")),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
                "target": TARGETS.get(k, ""),
            }
        )
    for k, f in ((30, 210), (40, 6), (60, 6)):
        D = prime_field(k) * f * f  # an order of conductor f: Order.from_conductor skips factoring
        out.append(
            {
                "name": f"subexp: class group of the order D = −{f}²·(p ≈ 10^{k})",
                "run": (
                    lambda D=D, f=f: class_group(
                        Order.from_conductor(D // (f * f), f), method="subexp"
                    )
                ),
                "reference": None,
                "reference_name": None,
                "repeat": 1,
            }
        )
    return out
