"""Lattice-quotient workloads for the benchmark runner (``tests/benchmarks/run.py``).

``Z^n`` modulo sparse relations shaped like those of the sub-exponential class
group method: rows of 5–25 entries, nearly all ±1 and ±2, the small columns
far likelier than the large ones, 1.1·n rows. *Chain* instances have a known
cyclic quotient of order about 10³⁰: a chain of columns ``c_{i+1} = d_i·c_i``
(``d_i`` in {2, 3}) closed by one relation with small digits, every other column
defined by one random sparse relation, rows then added to one another. *Kernel*
instances draw every relation at random in the kernel of random images of the
columns in ``Z/2 × Z/500`` (a random sparse combination corrected by a column
of the missing image), which leaves a dense core of a few hundred columns.
Targets (the brief of the lattice module): 2,000 columns in ≤ 1 s, 10,000 in ≤ 10 s.
Reference: sympy's Smith normal form on 24 columns of the chain kind.
"""

from __future__ import annotations

import random
from typing import Any

from realquad.core.lattice import lattice_quotient

Row = dict[int, int]


def _add(x: Row, y: Row, s: int) -> Row:
    out = dict(x)
    for j, v in y.items():
        out[j] = out.get(j, 0) + s * v
    return {j: v for j, v in out.items() if v}


def chain_instance(n: int, modulus: int, seed: int) -> list[Row]:
    """1.1·n relations on ``n`` columns with quotient ``Z/modulus`` (module notes)."""
    rng = random.Random(seed)
    steps, digits, x = [], [], modulus
    while x > 3:
        d = rng.choice([2, 3])
        steps.append(d)
        digits.append(x % d)
        x //= d
    digits.append(x)
    chain = rng.sample(range(n // 2), len(digits))
    rows: list[Row] = [{chain[i + 1]: 1, chain[i]: -d} for i, d in enumerate(steps)]
    rows.append({c: r for c, r in zip(chain, digits, strict=True) if r})
    defined = list(chain)
    weights = [1 / (j + 2) ** 0.9 for j in range(n)]
    for c in range(n):
        if c in chain:
            continue
        row: Row = {}
        for j in rng.choices(defined, [weights[j] for j in defined], k=rng.randint(3, 11)):
            row[j] = row.get(j, 0) + rng.choice([1, -1, 1, -1, 2, -2])
        rows.append({j: v for j, v in row.items() if v} | {c: rng.choice([1, -1])})
        defined.append(c)
    base = len(rows)
    for _ in range(base // 3):
        a, b = rng.sample(range(base), 2)
        rows[a] = _add(rows[a], rows[b], rng.choice([1, -1]))
    for _ in range(n // 10):
        a, b = rng.sample(range(base), 2)
        rows.append(_add(rows[a], rows[b], rng.choice([1, -1])))
    rng.shuffle(rows)
    return rows


def kernel_instance(n: int, seed: int, moduli: tuple[int, int] = (2, 500)) -> list[Row]:
    """1.05·n random sparse relations in the kernel of random images in ``⊕ Z/m`` (module notes)."""
    rng = random.Random(seed)
    images = [tuple(rng.randrange(m) for m in moduli) for _ in range(n)]
    columns_of: dict[tuple[int, ...], list[int]] = {}
    for c, image in enumerate(images):
        columns_of.setdefault(image, []).append(c)
    weights = [1 / (j + 2) ** 0.9 for j in range(n)]
    unused = list(range(n))
    rows: list[Row] = []
    while len(rows) < 1.05 * n:
        row: Row = {unused[-1]: rng.choice([1, -1])} if unused else {}
        for j in rng.choices(range(n), weights, k=rng.randint(4, 14)):
            row[j] = row.get(j, 0) + rng.choice([1, -1, 1, -1, 2, -2])
        need = tuple(
            -sum(v * images[j][i] for j, v in row.items()) % m for i, m in enumerate(moduli)
        )
        if need not in columns_of:
            continue
        c = rng.choice(columns_of[need])
        row[c] = row.get(c, 0) + 1
        if unused and unused[-1] in row:
            unused.pop()
        rows.append({j: v for j, v in row.items() if v})
    return rows


def _run(rows: list[Row], n: int, expect: list[int]) -> Any:
    def run() -> int:
        Q = lattice_quotient(rows, n)
        assert Q is not None and Q.invariants == expect, Q and Q.invariants
        return Q.order

    return run


def _sympy_reference(rows: list[Row], n: int) -> Any:
    def reference() -> int:
        from sympy import Matrix
        from sympy.matrices.normalforms import invariant_factors

        M = Matrix([[r.get(j, 0) for j in range(n)] for r in rows])
        return int(abs(invariant_factors(M)[-1]))

    return reference


def workloads() -> list[dict[str, Any]]:
    h = 10**30 + 57
    small = chain_instance(24, 4 * 3 * 5 * 7, 3)
    out = [
        {
            "name": "lattice: 24 columns, cyclic of order 420 (chain)",
            "run": _run(small, 24, [420]),
            "reference": _sympy_reference(small, 24),
            "reference_name": "sympy invariant_factors",
            "repeat": 5,
            "reference_repeat": 1,
        }
    ]
    for n, repeat, target in [(2_000, 5, "≤ 1 s"), (10_000, 2, "≤ 10 s")]:
        out.append(
            {
                "name": f"lattice: {n:,} columns, cyclic of order ~10^30 (chain)",
                "run": _run(chain_instance(n, h, n), n, [h]),
                "reference": None,
                "reference_name": None,
                "repeat": repeat,
                "target": target,
            }
        )
    for n, repeat, goal in [(2_000, 3, "≤ 1 s"), (5_000, 1, "")]:
        out.append(
            {
                "name": f"lattice: {n:,} columns, Z/2 × Z/500 (random kernel, dense core)",
                "run": _run(kernel_instance(n, n), n, [2, 500]),
                "reference": None,
                "reference_name": None,
                "repeat": repeat,
                "target": goal,
            }
        )
    return out
