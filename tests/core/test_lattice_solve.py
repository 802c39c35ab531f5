"""Vectors of a lattice written on its rows, against sympy's rank and Smith form and known images.

Outside references: sympy ``invariant_factors`` and ``rank`` decide membership in
small lattices (``t ∈ L`` exactly when adding ``t`` as a row keeps the rank and the
product of the invariant factors); the class-group-like lattices of
``tests/core/test_lattice.py`` are, by construction, the kernel of a known map to
``⊕ Z/m``, which decides membership independently; every combination returned is
multiplied out against the rows in plain integers.
"""

from __future__ import annotations

import math
import random

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from sympy import Matrix
from sympy.matrices.normalforms import invariant_factors

from realquad.core.lattice import LatticeSolver, lattice_quotient, lattice_solve
from realquad.errors import InputError
from tests.core.test_lattice import add, class_group_like
from tests.core.test_lattice_kernel import combination

Row = dict[int, int]


def sympy_member(rows: list[Row], n: int, target: Row) -> bool:
    """``target ∈ L`` by sympy: the same rank and product of invariant factors with it added."""
    if not target:
        return True
    if not rows:
        return False

    def shape(rs: list[Row]) -> tuple[int, int]:
        M = Matrix([[r.get(j, 0) for j in range(n)] for r in rs])
        factors = [abs(int(x)) for x in invariant_factors(M) if x]
        return M.rank(), math.prod(factors)

    return shape(rows) == shape([*rows, target])


@st.composite
def small_cases(draw: st.DrawFn) -> tuple[list[Row], int, Row]:
    n = draw(st.integers(1, 5))
    m = draw(st.integers(0, 8))
    entry = st.one_of(st.sampled_from([0, 0, 1, -1, 2, -2]), st.integers(-30, 30))
    rows = [{j: x for j in range(n) if (x := draw(entry))} for _ in range(m)]
    if rows and draw(st.booleans()):  # a member: a random combination of the rows
        target: Row = {}
        for r in rows:
            target = add(target, r, draw(st.integers(-3, 3)))
    else:
        target = {j: x for j in range(n) if (x := draw(entry))}
    return rows, n, target


@settings(max_examples=150, deadline=None)
@given(small_cases())
def test_small_lattices_against_sympy(case: tuple[list[Row], int, Row]) -> None:
    rows, n, target = case
    found = lattice_solve(rows, n, target)
    assert (found is not None) == sympy_member(rows, n, target)
    if found is not None:
        assert combination(found, rows) == {j: x for j, x in target.items() if x}


def member(images: list[list[int]], moduli: list[int], target: Row) -> bool:
    """Membership by the construction: the target's image in ``⊕ Z/m`` is zero."""
    return all(
        sum(x * images[j][i] for j, x in target.items()) % m == 0 for i, m in enumerate(moduli)
    )


@pytest.mark.parametrize(("n", "moduli", "seed"), [(60, [6, 30], 1), (300, [2, 4, 360], 2)])
def test_class_group_like(n: int, moduli: list[int], seed: int) -> None:
    """Members (sums of rows, and random vectors times the exponent) and non-members."""
    rows, images = class_group_like(n, moduli, seed)
    Q = lattice_quotient(rows, n)
    assert Q is not None
    rng = random.Random(seed)
    exponent = moduli[-1]
    for trial in range(12):
        target: Row = {}
        if trial % 3 == 0:
            for i in rng.sample(range(len(rows)), 5):
                target = add(target, rows[i], rng.choice([1, -1, 2]))
        else:
            target = {j: rng.randint(-9, 9) for j in rng.sample(range(n), 6)}
            if trial % 3 == 1:
                target = {j: exponent * x for j, x in target.items()}
        expected = member(images, moduli, target)
        found = lattice_solve(rows, n, target, seed=trial, quotient=Q)
        assert (found is not None) == expected
        if found is not None:
            assert combination(found, rows) == {j: x for j, x in target.items() if x}
        if not expected:  # without the quotient: every core row is tried, then refused
            assert lattice_solve(rows, n, target, seed=trial) is None


@pytest.mark.parametrize(("n", "moduli", "seed"), [(300, [2, 4, 360], 3)])
def test_one_solver_for_many_targets(n: int, moduli: list[int], seed: int) -> None:
    """The kept elimination and core system answer every target as a fresh solve would."""
    rows, images = class_group_like(n, moduli, seed)
    solver = LatticeSolver(rows, n, seed)
    rng = random.Random(seed)
    for trial in range(15):
        target: Row = {}
        if trial % 2 == 0:
            for i in rng.sample(range(len(rows)), 5):
                target = add(target, rows[i], rng.choice([1, -1, 3]))
        else:
            target = {j: rng.randint(-9, 9) for j in rng.sample(range(n), 6)}
        found = solver.solve(target)
        assert (found is not None) == member(images, moduli, target)
        if found is not None:
            assert combination(found, rows) == {j: x for j, x in target.items() if x}


def test_edge_cases() -> None:
    assert lattice_solve([], 0, {}) == {}
    assert lattice_solve([{0: 2}], 1, {0: 0}) == {}
    assert lattice_solve([], 2, {1: 1}) is None
    assert lattice_solve([{0: 1}, {0: 1}], 1, {0: 5}) in ({0: 5}, {1: 5})
    with pytest.raises(InputError):
        lattice_solve([{0: 1}], 1, {3: 1})
    with pytest.raises(InputError):
        lattice_solve([{0: 1}], -1, {})
