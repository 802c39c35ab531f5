"""Imaginary class-group workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 14): the exact class group of any order with |D| up to 10¹² in
well under a second (compiled kernels); imaginary fields to |D| ≈ 10³⁰
under GRH in seconds.
"""

from __future__ import annotations

from typing import Any

from realquad.classgroup import class_group

#: Fundamental discriminants −(10^k + 3) (conductor 1 for these k).
EXACT_FIELDS = [-(10**8) - 3, -(10**10) - 3, -(10**12) - 3, -(10**13) - 3]
GRH_FIELDS = [-(10**20) - 3, -(10**24) - 3, -(10**28) - 3, -(10**30) - 3]


def workloads() -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = [
        {
            "name": f"imaginary: class_group exact, D = {D}",
            "run": (lambda D=D: class_group(D, method="exact")),
            "reference": (lambda D=D: class_group(D, method="bsgs")),
            "reference_name": "baby-step giant-step under GRH",
            "repeat": 3,
        }
        for D in EXACT_FIELDS
    ]
    out += [
        {
            "name": f"imaginary: class_group under GRH, D = {D}",
            "run": (lambda D=D: class_group(D, method="bsgs")),
            "reference": None,
            "reference_name": None,
            "repeat": 1,
        }
        for D in GRH_FIELDS
    ]
    return out
