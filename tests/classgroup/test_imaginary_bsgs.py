"""Class groups of imaginary fields under GRH against the exact method, OEIS and the GRH interval."""

from __future__ import annotations

from math import prod

import pytest
from hypothesis import given
from hypothesis import strategies as st

from realquad.classgroup import class_group
from realquad.classgroup.imaginary_bsgs import METHOD, class_group_imaginary_bsgs
from realquad.core.lfunction import class_number_interval
from realquad.core.orders import Order
from realquad.errors import DomainError, TooLargeError
from tests.classgroup.test_imaginary import OEIS, brute_reduced_forms, is_fundamental


def _w(D: int) -> int:
    return {-3: 6, -4: 4}.get(D, 2)


def test_interval_holds_the_class_number_of_every_small_field():
    # brute force (reduced forms counted in the test) against the GRH interval, |D| < 3000
    for D in range(-3, -3000, -1):
        if is_fundamental(D):
            h = len(brute_reduced_forms(D))
            iv = class_number_interval(D, _w(D), 10_000)
            assert iv.contains(h), (D, h, iv.lower, iv.upper)


def test_oeis_a006641_under_grh():
    # OEIS A006641: h by negative fundamental discriminant, every listed term, by the GRH method
    terms = OEIS["A006641"]["terms"]
    discs = [-n for n in range(3, 2000) if is_fundamental(-n)][: len(terms)]
    got = [class_group(D, method="bsgs").class_number for D in discs]
    assert got == terms


@given(st.integers(3, 10**12))
def test_agrees_with_the_exact_method(n):
    D = -n
    if not is_fundamental(D):
        return
    G = class_group_imaginary_bsgs(Order(D))
    E = class_group(D, method="exact")
    assert (G.class_number, G.invariants) == (E.class_number, E.invariants)
    assert G.proof == "GRH" and G.method == METHOD
    assert class_number_interval(D, _w(D), 10**5).contains(E.class_number)


@pytest.mark.parametrize(
    "D", [-3299, -1155, -4 * 1365, -(10**12) - 3, -(10**13) - 3, -8 * 3 * 5 * 7 * 11 * 13]
)
def test_structures_agree_with_the_exact_method(D):
    G, E = class_group(D, method="bsgs"), class_group(D, method="exact")
    assert G.invariants == E.invariants
    for g, d in zip(G.generators, G.invariants, strict=True):
        assert g.power(d) == g.power(0)  # each generator has order dividing its invariant
    assert G.genus.number_of_genera == E.genus.number_of_genera


def test_large_fields_are_consistent():
    # beyond the exact method: h lies in the GRH interval, the generators have the stated orders
    for D in (-(10**16) - 3, -(10**20) - 3):
        G = class_group(D)
        assert G.proof == "GRH" and prod(G.invariants) == G.class_number
        assert class_number_interval(D, 2, 10**5).contains(G.class_number)
        one = G.generators[0].power(0)
        for g, d in zip(G.generators, G.invariants, strict=True):
            assert g.power(d) == one and g.power(d // 2) != one
        assert G.genus.two_rank == sum(1 for d in G.invariants if d % 2 == 0)


def test_refusals():
    with pytest.raises(DomainError, match="fields"):
        class_group_imaginary_bsgs(Order(-4 * 9 * 5))
    with pytest.raises(DomainError, match="fields"):
        class_group_imaginary_bsgs(Order(5))
    with pytest.raises(TooLargeError):
        class_group_imaginary_bsgs(Order(-(10**33) - 3))
    with pytest.raises(DomainError, match="exact"):
        class_group(-(10**20) - 3).class_of(class_group(-(10**20) - 3).generators[0])
