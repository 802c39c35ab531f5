"""Invariant factors from primary parts against sympy's Smith normal form."""

from __future__ import annotations

from hypothesis import given
from hypothesis import strategies as st
from sympy import Matrix
from sympy.matrices.normalforms import invariant_factors as sympy_invariants

from realquad.core.linalg import invariants_from_primary


@given(st.dictionaries(st.sampled_from([2, 3, 5, 7]), st.lists(st.integers(0, 4), max_size=4)))
def test_invariants_from_primary_equal_sympy(exponents: dict[int, list[int]]) -> None:
    powers = {p: [p**e for e in es] for p, es in exponents.items()}
    orders = [q for qs in powers.values() for q in qs]
    diagonal = Matrix.diag(*orders) if orders else Matrix([[1]])
    expected = [abs(int(x)) for x in sympy_invariants(diagonal) if abs(int(x)) > 1]  # sympy
    assert invariants_from_primary(powers) == expected
