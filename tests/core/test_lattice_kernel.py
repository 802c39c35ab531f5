"""Integer kernel vectors of sparse relations, against sympy's nullspace, Smith form and exact sums.

Outside references: sympy ``Matrix.nullspace()`` of the transpose gives the dimension
of the left kernel, sympy ``invariant_factors`` (Smith normal form) tells whether the
returned vectors generate the whole (saturated) integer kernel, and every vector is
multiplied out against the rows in plain integers (or with sympy matrices) here.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import pytest
from sympy import Matrix
from sympy.matrices.normalforms import invariant_factors
from sympy.polys.matrices import DomainMatrix

from realquad.core.lattice import (
    lattice_kernel,
    lattice_quotient,
    lattice_quotient_and_kernel,
)
from realquad.errors import InputError
from tests.benchmarks.bench_lattice import kernel_instance
from tests.core.test_lattice import add, class_group_like, expected_invariants, sympy_invariants

Row = dict[int, int]


def combination(c: Row, rows: list[Row]) -> Row:
    """``Σ c[i]·rows[i]`` in Python integers, zero entries dropped (the direct check)."""
    total: Row = {}
    for i, x in c.items():
        for j, y in rows[i].items():
            total[j] = total.get(j, 0) + x * y
    return {j: v for j, v in total.items() if v}


def matrix(rows: list[Row], n: int) -> Matrix:
    return Matrix([[r.get(j, 0) for j in range(n)] for r in rows])


def check_full_kernel(rows: list[Row], n: int, vectors: list[Row]) -> None:
    """The vectors lie in the left kernel (sympy product), their number is its dimension
    (sympy nullspace of the transpose) and they generate it over Z (sympy Smith form)."""
    m = len(rows)
    A = matrix(rows, n) if n else Matrix.zeros(m, 0)
    dimension = len(A.T.nullspace()) if m else 0  # sympy: dimension of the left kernel
    assert len(vectors) == dimension
    if not vectors:
        return
    C = Matrix([[c.get(i, 0) for i in range(m)] for c in vectors])
    if n:
        assert C * A == Matrix.zeros(len(vectors), n)  # sympy matrix product
    assert rank(C) == dimension  # independent
    # the left kernel is saturated; a full-rank sublattice equals it iff its invariants are 1
    assert all(abs(int(d)) == 1 for d in invariant_factors(C))


def rank(C: Matrix) -> int:
    """The rank over Q by sympy's fraction-free domain matrices (fast on large entries)."""
    return int(DomainMatrix.from_Matrix(C).to_field().rank())


def random_rows(rng: random.Random, n: int, m: int) -> list[Row]:
    entry = [0, 0, 0, 1, -1, 2, -2, rng.randint(-40, 40)]
    return [{j: x for j in range(n) if (x := rng.choice(entry))} for _ in range(m)]


@pytest.mark.parametrize("seed", range(40))
def test_small_random_matrices_against_sympy(seed: int) -> None:
    rng = random.Random(seed)
    n, m = rng.randint(1, 6), rng.randint(1, 10)
    rows = random_rows(rng, n, m)
    vectors = lattice_kernel(rows, n, count=m, seed=seed)
    for c in vectors:
        assert c and combination(c, rows) == {}
    check_full_kernel(rows, n, vectors)


@pytest.mark.parametrize("seed", range(6))
def test_dense_core_against_sympy(seed: int) -> None:
    """Rows with few ±1 entries: the kernel comes from the dense core (Dixon lifting)."""
    rng = random.Random(100 + seed)
    n, m = 14, 14 + rng.randint(2, 7)
    rows = [
        {j: rng.choice([2, -2, 3, -3, 5, 1]) for j in rng.sample(range(n), rng.randint(3, 7))}
        for _ in range(m)
    ]
    vectors = lattice_kernel(rows, n, count=m, seed=seed)
    check_full_kernel(rows, n, vectors)


def test_core_kernel_in_batches() -> None:
    """More extra core rows than one batch: vectors of each batch, all independent."""
    rng = random.Random(5)
    n, m = 8, 44
    rows = [{j: rng.choice([2, -2, 3, -3, 5]) for j in rng.sample(range(n), 4)} for _ in range(m)]
    vectors = lattice_kernel(rows, n, count=m)
    A = matrix(rows, n)
    assert len(vectors) == len(A.T.nullspace()) == m - n  # sympy: the left kernel's dimension
    C = Matrix([[c.get(i, 0) for i in range(m)] for c in vectors])
    assert C * A == Matrix.zeros(len(vectors), n)  # sympy
    assert rank(C) == m - n


def test_count_limits_and_small_vectors_first() -> None:
    rows, _ = class_group_like(300, [10**20 + 39], 8, excess=0.3)
    kernel = lattice_kernel(rows, 300, count=8)
    assert len(kernel) == 8
    for c in kernel:
        assert combination(c, rows) == {}  # exact integer sum
        assert max(abs(x) for x in c.values()) <= 4  # the extra rows are sums of two rows
    assert len(lattice_kernel(rows, 300, count=3)) == 3
    assert lattice_kernel(rows, 300, count=0) == []


def test_edge_cases() -> None:
    assert lattice_kernel([], 0) == []
    assert lattice_kernel([{0: 1}, {1: 1}], 2) == []  # independent
    rows: list[Row] = [{0: 2, 1: 1}, {}, {0: 0}, {0: -2, 1: -1}, {0: 2, 1: 1}]
    kernel = lattice_kernel(rows, 2)
    assert {frozenset(c.items()) for c in kernel} == {
        frozenset({(1, 1)}),  # an empty row
        frozenset({(2, 1)}),  # a row of zeros
        frozenset({(0, 1), (3, 1)}),  # r₃ = −r₀
        frozenset({(0, 1), (4, -1)}),  # r₄ = r₀
    }
    check_full_kernel(rows, 2, kernel)
    with pytest.raises(InputError):
        lattice_kernel([{2: 1}], 2)
    with pytest.raises(InputError):
        lattice_kernel([{0: 1}], 1, count=-1)


def test_rank_deficient_rows() -> None:
    """Sums of n − 1 basis rows: no finite quotient, and a kernel of dimension m − (n − 1)."""
    rng = random.Random(11)
    n = 12
    basis = [{j: rng.choice([1, -1, 2, 3]) for j in rng.sample(range(n), 5)} for _ in range(n - 1)]
    rows = []
    for _ in range(2 * n):
        row: Row = {}
        for b in rng.sample(basis, 3):
            row = add(row, b, rng.choice([1, -1, 2]))
        rows.append(row)
    Q, kernel = lattice_quotient_and_kernel(rows, n, count=len(rows))
    assert Q is None and sympy_invariants(rows, n) is None  # sympy: rank below n
    check_full_kernel(rows, n, kernel)


@pytest.mark.parametrize(
    ("n", "moduli", "seed"), [(400, [10**30 + 57], 1), (300, [3, 9, 27 * 5], 4)]
)
def test_quotient_and_kernel_together(n: int, moduli: list[int], seed: int) -> None:
    rows, _ = class_group_like(n, moduli, seed, excess=0.1)
    Q, kernel = lattice_quotient_and_kernel(rows, n, count=5)
    expected = lattice_quotient(rows, n)
    assert Q is not None and expected is not None and Q.invariants == expected.invariants
    assert len(kernel) == 5 and all(combination(c, rows) == {} for c in kernel)
    assert lattice_quotient_and_kernel(rows, n, count=0)[1] == []


@pytest.mark.parametrize("n", [300, pytest.param(2000, marks=pytest.mark.slow)])
def test_random_relations_with_a_large_core(n: int) -> None:
    """Relations drawn at random in a kernel (the benchmark's builder): a core of ~n/3 columns,
    whose kernel vectors come from a few p-adic digits and LLL."""
    rows = kernel_instance(n, n)
    Q, kernel = lattice_quotient_and_kernel(rows, n, count=8)
    expected = lattice_quotient(rows, n)
    assert Q is not None and expected is not None and Q.invariants == expected.invariants
    assert len(kernel) == 8 and all(combination(c, rows) == {} for c in kernel)
    used = sorted({i for c in kernel for i in c})
    C = Matrix([[c.get(i, 0) for i in used] for c in kernel])
    assert rank(C) == 8  # sympy: independent
    if n <= 300:  # they generate the kernel of the rows they use (sympy rank and Smith form)
        assert len(used) - rank(matrix([rows[i] for i in used], n)) == 8
        assert all(abs(int(d)) == 1 for d in invariant_factors(C))


# -- relations with real weights: the kernel's multiples of the regulator ----------------------


def weighted_relations(
    gens: list[Row], seed: int, extra: int, spread: int
) -> tuple[list[Row], list[Fraction], Fraction]:
    """Relations with weights ``ℓᵢ = Σ a_ig·ℓ_g + uᵢ·R`` over independent rows ``g``.

    Every relation is an integer combination ``a_i`` of the rows ``gens`` (the rows
    themselves, then ``extra`` combinations of ``spread`` of them) and carries a
    random multiple ``uᵢ·R`` of a random rational ``R``. For ``c`` in the kernel,
    ``Σ cᵢ·aᵢ = 0`` (the rows are independent), so ``Σ cᵢ·ℓᵢ = (Σ cᵢ·uᵢ)·R``.
    """
    rng = random.Random(seed)
    logs = [Fraction(rng.randint(1, 10**12), rng.randint(1, 10**6)) for _ in gens]
    R = Fraction(rng.randint(10**20, 10**21), rng.randint(1, 10**9))
    rows = [dict(g) for g in gens]
    weights = [ell + rng.randint(-3, 3) * R for ell in logs]
    for _ in range(extra):
        row: Row = {}
        weight = rng.randint(-3, 3) * R
        for g in rng.sample(range(len(gens)), spread):
            a = rng.choice([1, -1, 2, -2, 3])
            row = add(row, gens[g], a)
            weight += a * logs[g]
        rows.append(row)
        weights.append(weight)
    order = list(range(len(rows)))
    rng.shuffle(order)
    return [rows[i] for i in order], [weights[i] for i in order], R


def sparse_independent_rows(n: int, seed: int) -> list[Row]:
    """``n`` random rows without ±1 entries (little to eliminate), independent by sympy's rank."""
    rng = random.Random(seed)
    while True:
        rows = [
            {j: rng.choice([2, -2, 3, -3, 5]) for j in rng.sample(range(n), rng.randint(3, 6))}
            for _ in range(n)
        ]
        if matrix(rows, n).rank() == n:  # sympy
            return rows


def regulator_gcd(rows: list[Row], weights: list[Fraction], R: Fraction, n: int, seed: int) -> int:
    """The gcd of the integers ``Σ cᵢ·ℓᵢ / R`` over the returned vectors (exact rationals)."""
    multiples = []
    for c in lattice_kernel(rows, n, count=8, seed=seed):
        assert combination(c, rows) == {}
        value = sum(x * weights[i] for i, x in c.items()) / R
        assert value.denominator == 1  # a multiple of R: the ℓ_g cancel exactly
        multiples.append(int(value))
    return math.gcd(*multiples)


def test_regulator_multiples_from_eliminated_rows() -> None:
    """Extra relations of two rows each: elimination zeroes them, small vectors."""
    hits = 0
    for seed in range(10):
        gens, _ = class_group_like(120, [1009], seed, excess=0.0)  # 120 independent rows
        rows, weights, R = weighted_relations(gens, seed, 30, 2)
        hits += regulator_gcd(rows, weights, R, 120, seed) == 1
    assert hits >= 8


def test_regulator_multiples_from_the_dense_core() -> None:
    """Rows without ±1 entries: the vectors come from Dixon lifting on the core."""
    hits = 0
    for seed in range(8):
        rows, weights, R = weighted_relations(sparse_independent_rows(24, seed), seed, 10, 5)
        hits += regulator_gcd(rows, weights, R, 24, seed) == 1
    assert hits >= 6


@pytest.mark.slow
def test_regulator_multiples_large() -> None:
    gens, _ = class_group_like(1500, [10**12 + 39], 3, excess=0.0)
    rows, weights, R = weighted_relations(gens, 3, 150, 10)
    assert regulator_gcd(rows, weights, R, 1500, 3) == 1


@pytest.mark.slow
@pytest.mark.parametrize("n", [2000, 5000])
def test_class_group_like_large(n: int) -> None:
    rows, _ = class_group_like(n, [2, 4, 10**40 + 3], n, excess=0.2)
    Q, kernel = lattice_quotient_and_kernel(rows, n, count=16)
    assert Q is not None and Q.invariants == expected_invariants([2, 4, 10**40 + 3])  # sympy
    assert len(kernel) == 16 and all(combination(c, rows) == {} for c in kernel)
