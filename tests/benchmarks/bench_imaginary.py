"""Imaginary class-group workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 14): the exact class group of any order with |D| up to 10¹² in
well under a second (compiled kernels); imaginary fields to |D| ≈ 10³⁰
under GRH in seconds; ``represent "x^2 + ny^2"`` with its ring class polynomial
for h(−4n) ≈ 100 in ≤ 5 s.
"""

from __future__ import annotations

from typing import Any

from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.splitting.representation import representation_criterion

#: Fundamental discriminants −(10^k + 3) (conductor 1 for these k).
EXACT_FIELDS = [-(10**8) - 3, -(10**10) - 3, -(10**12) - 3, -(10**13) - 3]
GRH_FIELDS = [-(10**20) - 3, -(10**24) - 3, -(10**28) - 3, -(10**30) - 3]
#: x² + ny² whose discriminant −4n has h ≈ 100 and ≈ 300 (the criterion needs the ring
#: class polynomial: more than one class per genus).
REPRESENT_N = [20011, 200007]


def _criterion(n: int) -> int:
    """The whole criterion of x² + ny² (class group, genera, ring class polynomial)."""
    found = representation_criterion(Form(1, 0, n))
    assert found.polynomial is not None
    return len(found.polynomial.coefficients)


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
    out += [
        {
            "name": f"imaginary: represent x^2 + {n}y^2 (ring class polynomial)",
            "run": (lambda n=n: _criterion(n)),
            "reference": None,
            "reference_name": None,
            "repeat": 1,
            "target": "h(−4n) ≈ 100 in ≤ 5 s",
        }
        for n in REPRESENT_N
    ]
    return out
