"""Continued-fraction workloads for the benchmark runner (``tests/benchmarks/run.py``).

The principal cycle of D = 4·1000000000091 (period 1,103,310): the kernels
in use (compiled unless ``REALQUAD_PURE=1``) against the pure-Python twin in
the same process. Each walk stops at the symmetry point of the period, so
one run takes 551,655 steps; the rates count those steps. Targets (issue 7):
the period walk at ≥ 50 M steps/s; with the regulator accumulated ≥ 20 M
steps/s and ≥ 8× the pure twin.
"""

from __future__ import annotations

from typing import Any

from realquad._backend import kernels, pure

D = 4 * 1000000000091
STEPS = 1103310 // 2
LIMIT = 10**8


def workloads() -> list[dict[str, Any]]:
    quotients = pure.principal_half_cycle(D, LIMIT)[0]  # type: ignore[index]
    return [
        {
            "name": "cfrac: period walk, d = 1000000000091",
            "run": lambda: kernels.principal_period(D, LIMIT),
            "reference": lambda: pure.principal_period(D, LIMIT),
            "reference_name": "pure-Python twin",
            "repeat": 7,
            "reference_repeat": 3,
            "count": STEPS,
            "unit": "steps",
            "target": "≥ 50 M steps/s",
        },
        {
            "name": "cfrac: period walk + regulator accumulation, d = 1000000000091",
            "run": lambda: kernels.principal_regulator(D, LIMIT),
            "reference": lambda: pure.principal_regulator(D, LIMIT),
            "reference_name": "pure-Python twin",
            "repeat": 7,
            "reference_repeat": 3,
            "count": STEPS,
            "unit": "steps",
            "target": "≥ 20 M steps/s, ≥ 8× pure",
        },
        {
            "name": "cfrac: half-cycle walk storing quotients, d = 1000000000091",
            "run": lambda: kernels.principal_half_cycle(D, LIMIT),
            "reference": lambda: pure.principal_half_cycle(D, LIMIT),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "reference_repeat": 3,
            "count": STEPS,
            "unit": "steps",
        },
        {
            "name": "cfrac: product-tree leaves of 48 quotients, d = 1000000000091",
            "run": lambda: kernels.convergent_leaves(quotients, 48),
            "reference": lambda: pure.convergent_leaves(quotients, 48),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "reference_repeat": 3,
            "count": len(quotients),
            "unit": "quotients",
        },
    ]
