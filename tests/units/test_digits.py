"""The digit count of a unit kept compact, from its regulator, against the count of the expanded unit."""

from __future__ import annotations

import random

import pytest

from realquad.core.integers import is_square
from realquad.core.orders import Order
from realquad.units import fundamental_unit
from realquad.units.bsgs import fundamental_unit_bsgs


def _discriminants(count: int, seed: int) -> list[int]:
    rng = random.Random(seed)
    out: list[int] = []
    while len(out) < count:
        D = rng.randrange(10**6, 10**10)
        if D % 4 in (0, 1) and not is_square(D):
            out.append(D)
    return out


@pytest.mark.parametrize("D", _discriminants(40, 7) + [5 * 8 + 5, 4 * 94, 13, 10**9 + 9])
def test_digits_from_the_regulator_are_exact(D: int) -> None:
    # reference: the expanded unit of the continued fraction, its digits counted exactly (gmpy2)
    exact = fundamental_unit(Order(D), "cfrac")
    compact = fundamental_unit_bsgs(Order(D))
    digits, certain = compact.digits_from_regulator()
    if certain:
        assert digits == exact.digits, D
    else:  # only when log₁₀ x lies within the error bound of an integer: one off at most
        assert abs(digits - exact.digits) <= 1


def test_odd_discriminants_decide_the_denominator() -> None:
    # D ≡ 5 (mod 8): ε = (u + v√D)/2 with u, v odd (c = 2) or ε ∈ Z[√D] (c = 1); both occur
    seen = set()
    for D in range(10**6 + 5, 10**6 + 5 + 8 * 400, 8):
        if is_square(D):
            continue
        exact = fundamental_unit(Order(D), "cfrac")
        seen.add(exact.denominator)
        compact = fundamental_unit_bsgs(Order(D))
        digits, certain = compact.digits_from_regulator()
        assert certain and digits == exact.digits, D
        if seen == {1, 2}:
            break
    assert seen == {1, 2}
