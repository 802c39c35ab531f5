"""Roots of unity of quadratic orders, and exact arithmetic in imaginary fields."""

from __future__ import annotations

from fractions import Fraction

import pytest

from realquad.core.numbers import QuadraticNumber
from realquad.errors import DomainError
from realquad.units import fundamental_unit, unit_group


@pytest.mark.parametrize(
    ("D", "w"),
    # Cox, Primes of the Form x² + ny², Exercise 7.9 (w = 6, 4, 2) — orders of Q(i), Q(√−3) included
    [(-3, 6), (-4, 4), (-7, 2), (-8, 2), (-12, 2), (-16, 2), (-27, 2), (-20, 2), (-163, 2)],
)
def test_roots_of_unity(D, w):
    G = unit_group(D)
    assert G.roots_of_unity == w and G.rank == 0 and G.proof == "unconditional"
    z = G.generator
    # brute force: z has order exactly w and norm 1
    assert z**w == 1 and all(z**k != 1 for k in range(1, w))
    assert z.norm() == 1 and z.is_integral()


def test_real_orders_have_plus_minus_one_and_rank_one():
    G = unit_group(5)
    assert (G.roots_of_unity, G.rank, G.generator) == (2, 1, -1)


def test_fundamental_unit_keeps_refusing_imaginary_orders():
    with pytest.raises(DomainError, match="roots of unity"):
        fundamental_unit(-4)


def test_arithmetic_in_an_imaginary_field():
    i = QuadraticNumber(0, 1, 1, -1)
    assert i * i == -1 and (1 + i) * (1 - i) == 2 and (1 + i).norm() == Fraction(2)
    z = QuadraticNumber(1, 1, 2, -3)  # (1 + √−3)/2
    assert z * z - z + 1 == 0  # a root of x² − x + 1 (the sixth cyclotomic polynomial)
    assert z.inverse() == z.conjugate() and str(z) == "(1 + √−3)/2"
    for refused in (z.sign, lambda: z < 1, z.log_abs):
        with pytest.raises(DomainError):
            refused()
