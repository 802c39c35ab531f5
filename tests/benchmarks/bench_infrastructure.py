"""Infrastructure workloads for the benchmark runner (``tests/benchmarks/run.py``).

Targets (issue 5): the regulator to 30 digits for D ≈ 10²⁰ in ≤ 1 s, D ≈ 10²⁶
in ≤ 10 s, D ≈ 10³⁰ in ≤ 60 s. The fields are the least primes D ≡ 1 (mod 4)
above 10^k, k = 12, 14, …, 30: for such D the class number is usually 1, so
R ≈ h·R is as large as it gets and the search is at its longest.

``python tests/benchmarks/run.py -k infrastructure --pure`` times the
compiled kernels and the pure twin side by side; the twin is run up to
10^:data:`PURE_MAX_K` (at 10³⁰ it takes about 40 s and 1.4 GB: its giant
steps cost ≈ 15 µs, its table ≈ 100 bytes an ideal).

Run standalone (``python tests/benchmarks/bench_infrastructure.py [max_k]``)
it prints one line per size (with the baby and giant steps made) and the
growth exponent of time against D fitted by least squares over the sizes run.
"""

from __future__ import annotations

import math
import sys
import time
from collections.abc import Callable
from typing import Any

import gmpy2

from realquad._backend import BACKEND
from realquad.infrastructure.regulator_search import search_regulator
from realquad.units.bsgs import regulator_from_search
from realquad.units.cfrac import regulator_cfrac

#: Largest 10^k the pure twin is timed at (beyond 10³⁰ it would take minutes).
PURE_MAX_K = 30

#: The issue's targets, by k.
TARGETS = {20: "≤ 1 s", 26: "≤ 10 s", 30: "≤ 60 s"}


def prime_discriminant(k: int) -> int:
    """The least prime ``p ≡ 1 (mod 4)`` above ``10^k``."""
    p = gmpy2.next_prime(10**k)
    while p % 4 != 1:
        p = gmpy2.next_prime(p)
    return int(p)


def _bsgs(D: int) -> Callable[[], Any]:
    return lambda: regulator_from_search(search_regulator(D, 30))


def _cfrac(D: int) -> Callable[[], Any]:
    return lambda: regulator_cfrac(D, 30)


def workloads(max_k: int = 30) -> list[dict[str, Any]]:
    out: list[dict[str, Any]] = []
    if BACKEND == "python":
        max_k = min(max_k, PURE_MAX_K)
    for k in range(12, max_k + 1, 2):
        D = prime_discriminant(k)
        out.append(
            {
                "name": f"infrastructure: regulator to 30 digits, D = {D} (≈ 10^{k})",
                "run": _bsgs(D),
                "reference": _cfrac(D) if k <= 12 else None,
                "reference_name": "continued fraction (realquad.units)" if k <= 12 else None,
                "repeat": 3 if k <= 20 else 1,
                "target": TARGETS.get(k),
            }
        )
    return out


def main(max_k: int) -> None:
    xs, ys = [], []
    for w in workloads(max_k):
        D = int(w["name"].split("D = ")[1].split()[0])
        t0 = time.perf_counter()
        found = search_regulator(D, 30)
        elapsed = time.perf_counter() - t0
        value = regulator_from_search(found)
        line = (
            f"{w['name']}: {elapsed:.3f} s, R = {value} "
            f"({found.baby_steps} baby, {found.giant_steps} giant steps)"
        )
        if w["reference"] is not None:
            t0 = time.perf_counter()
            ref = w["reference"]()
            line += f"; {w['reference_name']}: {time.perf_counter() - t0:.3f} s, equal: {str(ref) == str(value)}"
        print(line, flush=True)
        xs.append(math.log(D))
        ys.append(math.log(elapsed))
    if len(xs) > 1:
        mx, my = sum(xs) / len(xs), sum(ys) / len(ys)
        slope = sum((x - mx) * (y - my) for x, y in zip(xs, ys, strict=True)) / sum(
            (x - mx) ** 2 for x in xs
        )
        print(f"fitted growth: time ∝ D^{slope:.3f}")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 30)
