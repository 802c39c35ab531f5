"""The structures of many imaginary class groups in one call (kernel ``definite_structures``):
compiled against its pure twin, both against the whole walk of the reduced forms, and the
refusals.

The whole walk (``class_group_imaginary``: every class, Smith form of all relations) is
itself checked against brute force by orders of elements in tests/classgroup.
"""

from __future__ import annotations

from math import isqrt

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from sympy import primenu

from realquad._backend import COMPILED, call_kernel, kernels, pure
from realquad.classgroup.imaginary import class_group_imaginary, structures_of_discriminants
from realquad.core.orders import Order
from realquad.core.primes import primes_below
from tests.kernels.test_definite_kernels import _fundamental_near

needs_compiled = pytest.mark.skipif(
    "definite_structures" not in COMPILED, reason="compiled kernels not built or REALQUAD_PURE set"
)


def _two_rank(D: int) -> int:
    """Genus theory (Gauss; Cox, Primes of the Form x² + ny², Thm. 3.15): the 2-rank of
    Cl(D), D fundamental, is t − 1 with t the number of primes dividing D (sympy's primenu)."""
    return int(primenu(-D)) - 1


def _both(*args):
    want = pure.definite_structures(*args)
    try:
        got = kernels.definite_structures(*args)
    except OverflowError:
        got = want
    assert got == want, args
    return want


@needs_compiled
@settings(max_examples=40, deadline=None)
@given(st.lists(st.integers(3, 10**8), min_size=1, max_size=6), st.booleans(), st.booleans())
@example([3, 4, 420, 3299, 10**8 - 3], False, True)
@example([2**31 - 1], True, False)
def test_compiled_equals_twin_and_the_whole_walk(ns, counted, ranked):
    Ds = [_fundamental_near(n) for n in ns]
    groups = [class_group_imaginary(Order(D)) for D in Ds]
    primes = primes_below(isqrt(-min(Ds) // 3) + 2)
    hs = [0 if counted else G.class_number for G in groups]
    ranks = [_two_rank(D) if ranked else -1 for D in Ds]
    got_h, got = _both(Ds, hs, ranks, 1, primes, 64)
    assert got_h == [G.class_number for G in groups]
    assert got == [tuple(G.invariants) for G in groups]


@needs_compiled
@settings(max_examples=25, deadline=None)
@given(st.integers(3, 10**6), st.integers(2, 12), st.integers(0, 8))
def test_orders_of_conductor_above_one(n, f, first):
    # non-maximal orders: h given (the whole walk's), the 2-rank not known
    D0 = _fundamental_near(n)
    D = D0 * f * f
    G = class_group_imaginary(Order(D))
    primes = primes_below(isqrt(-D // 3) + 2)
    _, got = _both([D], [G.class_number], [-1], f, primes, first)
    assert got == [tuple(G.invariants)]


@st.composite
def sylow_relations(draw):
    """``(p, e, rows)``: lower-triangular relations with diagonal ``p^{eᵢ}``, a ``p``-group of
    order ``p^e``, ``e = Σ eᵢ``."""
    p = draw(st.sampled_from([2, 3, 5, 7]))
    exponents = draw(st.lists(st.integers(0, 4), min_size=1, max_size=4))
    rows = [
        [draw(st.integers(-50, 50)) for _ in range(i)] + [p**k] for i, k in enumerate(exponents)
    ]
    return p, sum(exponents), rows


@given(sylow_relations())
def test_sylow_smith_form_modulo_p_to_the_e_equals_sympy(case):
    # the elimination modulo p^e (the twin of the kernel's) against sympy's invariant factors
    from sympy import Matrix
    from sympy.matrices.normalforms import invariant_factors

    from realquad._kernels.definite_structure_kernels import _sylow_factors

    p, e, rows = case
    g, q = len(rows), p**e
    full = [row + [0] * (g - len(row)) for row in rows]
    expected = sorted(abs(int(x)) for x in invariant_factors(Matrix(full)) if abs(int(x)) > 1)
    if e == 0:
        assert expected == []
        return
    got = _sylow_factors([[v % q for v in row] for row in full], p, e, q)
    assert got is not None and sorted(got) == expected


def test_every_small_field_against_the_whole_walk():
    # every fundamental −3000 ≤ D < 0, h counted, 2-rank from genus theory
    Ds = sorted({_fundamental_near(n) for n in range(3, 3001)}, reverse=True)
    Ds = [D for D in Ds if D >= -3000]
    primes = primes_below(40)
    hs, got = structures_of_discriminants(Ds, [0] * len(Ds), [_two_rank(D) for D in Ds], primes)
    for D, h, invariants in zip(Ds, hs, got, strict=True):
        G = class_group_imaginary(Order(D))
        assert (h, invariants) == (G.class_number, tuple(G.invariants)), D


@pytest.mark.parametrize("name", ["kernels", "pure"])
def test_refusals(name):
    if name == "kernels" and "definite_structures" not in COMPILED:
        pytest.skip("compiled kernels not built")
    run = {"kernels": kernels, "pure": pure}[name].definite_structures
    primes = primes_below(100)
    with pytest.raises(ArithmeticError):  # 9 classes asked of Cl(−23) ≅ Z/3
        run([-23], [9], [-1], 1, primes, 4)
    with pytest.raises(ArithmeticError):  # an odd h with 2-rank 1
        run([-23], [3], [1], 1, primes, 4)
    with pytest.raises(ValueError):  # counted only for maximal orders
        run([-92], [0], [-1], 2, primes, 4)
    with pytest.raises(ValueError):
        run([-23, -31], [3], [-1, -1], 1, primes, 4)
    with pytest.raises(OverflowError):  # D beyond the count's reach
        run([-(10**15) - 3], [0], [-1], 1, primes, 4)
    with pytest.raises(OverflowError):
        run([5], [1], [-1], 1, primes, 4)


def test_call_kernel_falls_back_and_keeps_order():
    primes = primes_below(40)
    assert call_kernel("definite_structures", [], [], [], 1, primes, 4) == ([], [])
    assert call_kernel("definite_structures", [-420, -3], [0, 0], [3, 0], 1, primes, 4) == (
        [8, 1],
        [(2, 2, 2), ()],
    )
