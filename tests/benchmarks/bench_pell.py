"""Pell-equation workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issues 2 and 7): the fundamental solution of x² − dy² = 1 for
d = 410286423278424 and d = 10000000147 at least 20× (issue 2) and 25×
(issue 7, d = 410286423278424) faster than sympy's ``diop_DN`` in the same
run; d = 1000000000091 (period 1,103,310, x of 568,219 digits) fully
expanded in ≤ 0.5 s on the pure-Python kernels and ≤ 0.2 s compiled.
Issue 16: ``pell d --norm -1`` for d ≈ 10³⁰ decided, with the compact
solution, in ≤ 10 s; the same with x, y modulo a prime and their first 1,000
digits.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from realquad.equations.pell import pell
from realquad.units.cfrac import fundamental_unit_cfrac as fundamental_unit

SHARED = [410286423278424, 10000000147]
LONG = 1000000000091
HUGE = 10**30 + 57  # x of x² − dy² = −1 has 562,469,516,305,763 digits


def _pell(d: int) -> Callable[[], Any]:
    def run() -> tuple[int, int]:
        s = pell(d)
        assert s.x is not None and s.y is not None
        return s.x, s.y

    return run


def _compact(d: int, extras: bool) -> Callable[[], Any]:
    def run() -> Any:
        s = pell(d, -1)
        assert s.solvable and s.compact is not None
        if extras:
            return s.residues(10**9 + 7), s.leading_digits(1000)
        return s.digits

    return run


def _sympy(d: int) -> Callable[[], Any]:
    def run() -> Any:
        from sympy.solvers.diophantine.diophantine import diop_DN

        return diop_DN(d, 1)

    return run


def _unit(D: int) -> Callable[[], Any]:
    def run() -> tuple[int, int]:
        return fundamental_unit(D).half_integer_coordinates()

    return run


def workloads() -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = [
        {
            "name": f"pell: x² − {d}y² = 1, pell(d)",
            "run": _pell(d),
            "reference": _sympy(d),
            "reference_name": "sympy diop_DN(d, 1)",
            "repeat": 5,
            "reference_repeat": 3,
            "target": "≥ 25× sympy" if d == SHARED[0] else "≥ 20× sympy",
        }
        for d in SHARED
    ]
    out += [
        {
            "name": f"pell: unit of Z[√{LONG}] expanded (568,219 digits)",
            "run": _unit(4 * LONG),
            "reference": None,
            "reference_name": None,
            "repeat": 5,
            "target": "≤ 0.2 s compiled, ≤ 0.5 s pure",
        },
        {
            "name": f"pell: x² − {LONG}y² = 1, pell(d) (public path)",
            "run": _pell(LONG),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
        },
        {
            "name": "pell: x² − (10³⁰ + 57)y² = −1 decided, compact solution",
            "run": _compact(HUGE, False),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
            "target": "≤ 10 s",
        },
        {
            "name": "pell: the same, with x, y mod 10⁹ + 7 and their first 1,000 digits",
            "run": _compact(HUGE, True),
            "reference": None,
            "reference_name": None,
            "repeat": 3,
        },
    ]
    return out
