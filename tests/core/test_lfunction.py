"""The h·R interval under GRH (Belabas–Friedman's explicit Euler-product bound) against exact h·R.

Reference for h·R: the exact class number (cycles of reduced forms,
:func:`realquad.classgroup.class_numbers`) times the regulator from the
continued fraction (:func:`realquad.units.regulator`), neither of which uses
the infrastructure or any assumption. A wrong reading of the bound (or of its
approximant) would show here as an exact h·R outside the interval.
"""

from __future__ import annotations

import math

import gmpy2
import pytest
from hypothesis import assume, example, given, settings
from hypothesis import strategies as st

from realquad.classgroup.exact import class_numbers
from realquad.core.lfunction import hR_interval
from realquad.core.orders import Order
from realquad.errors import TooLargeError
from realquad.units.cfrac import regulator_cfrac as regulator


def is_fundamental(D: int) -> bool:
    return D % 4 in (0, 1) and not gmpy2.is_square(D) and Order(D).conductor == 1


def exact_hR(D: int) -> float:
    return class_numbers(D)[0] * float(regulator(Order(D), 20).value)


def test_every_field_below_3000_lies_in_its_interval() -> None:
    worst = 0.0
    for D in range(5, 3000):
        if not is_fundamental(D):
            continue
        iv = hR_interval(D, 10_000)
        hR = exact_hR(D)
        assert iv.contains(hR), D
        worst = max(worst, abs(math.log(2 * hR / math.sqrt(D)) - iv.log_L) / iv.error)
    assert worst < 0.5  # the bound is far from tight (about 5 % of it is used at most here)


@given(st.integers(5, 10**10).filter(is_fundamental), st.sampled_from([100, 10_000, 200_000]))
@example(10**10 + 37, 69)
def test_random_fields_lie_in_their_interval(D: int, X: int) -> None:
    iv = hR_interval(D, X)
    assert iv.contains(exact_hR(D)) and iv.proof == "GRH"


@pytest.mark.slow
@settings(max_examples=10)
@given(st.integers(10**11, 10**13).filter(is_fundamental))
@example(10**12 + 1)
@example(4 * (10**12 + 39))
def test_large_fields_lie_in_their_interval(D: int) -> None:
    try:
        hR = exact_hR(D)
    except TooLargeError:  # more reduced forms than the exact method stores
        assume(False)
    iv = hR_interval(D)
    assert iv.contains(hR)
    assert iv.error < 0.012  # X = 10⁶ keeps h·R within about 1.2 %


def test_interval_needs_x_at_least_69() -> None:
    with pytest.raises(ValueError):
        hR_interval(5, 68)
