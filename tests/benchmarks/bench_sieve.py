"""The sieve kernel for the benchmark runner (``tests/benchmarks/run.py``).

One family of 64 polynomials ``a·x² + b_k·x + c_k`` of discriminant
``D = −(10⁶⁰ + 7)`` (``a`` a product of seven factor-base primes near the
balancing size, the ``b_k`` in Gray-code order) sieved over ``−2¹⁶ ≤ x < 2¹⁶``
with the first 3000 primes that split or ramify, built by the relation
search's own functions (:mod:`realquad.relations`); against the pure-Python
twin.
"""

from __future__ import annotations

import bisect
import dataclasses
import math
from typing import Any

from realquad._backend import kernels, pure
from realquad.relations.collect import sieve_logs, sieve_parameters
from realquad.relations.factor_base import factor_base
from realquad.relations.families import family, sieve_inputs

D = -(10**60 + 7)
PRIMES = 3000
M = 2**16
FACTORS = 7  # 2⁶ = 64 polynomials


def family_inputs() -> tuple[list[Any], int]:
    """The arguments of ``sieve_family`` for the workload's family, and its polynomial count."""
    bound = 60_000
    fb = factor_base(D, bound)
    while fb.size < PRIMES:
        bound = bound * 5 // 4
        fb = factor_base(D, bound)
    fb = dataclasses.replace(
        fb,
        primes=fb.primes[:PRIMES],
        b=fb.b[:PRIMES],
        ramified=fb.ramified[:PRIMES],
        index={p: j for j, p in enumerate(fb.primes[:PRIMES])},
        bound=fb.primes[PRIMES - 1],
    )
    params = dataclasses.replace(sieve_parameters(D, fb.bound), M=M)
    size = math.exp(params.log_a / FACTORS)
    pool = [p for p, r in zip(fb.primes, fb.ramified, strict=True) if p > 2 and not r]
    i = bisect.bisect_left(pool, size)
    fam = family(fb, pool[i - FACTORS // 2 : i - FACTORS // 2 + FACTORS])
    roots1, roots2, shifts = sieve_inputs(fb, fam)
    args = [
        fb.primes,
        sieve_logs(fb, params),
        roots1,
        roots2,
        shifts,
        fam.steps,
        M,
        params.threshold,
    ]
    return args, len(fam.bs)


def workloads() -> list[dict[str, Any]]:
    args, count = family_inputs()
    return [
        {
            "name": f"sieve: family of {count} polynomials, {PRIMES:,} primes, M = 2¹⁶",
            "run": lambda: kernels.sieve_family(*args),
            "reference": lambda: pure.sieve_family(*args),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "reference_repeat": 1,
            "count": count,
            "unit": "polynomials",
        },
    ]
