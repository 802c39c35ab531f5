"""Units from kernel vectors (``realquad.relations.regulator``): Euclid on logarithms, norms.

Reference values: φ = (1 + √5)/2 has norm −1 and log φ = 0.4812118250596034… (the golden
ratio; digits from memory, checked here against mpmath's own log).
"""

from __future__ import annotations

import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.relations.regulator import unit_from_kernel

PHI = QuadraticNumber(1, 1, 2, 5)


def test_huge_multiples_keep_their_parity():
    # φ^(2⁶⁰+1) and φ^(2⁶⁰): the unit they generate is φ, of norm −1; the multiple 2⁶⁰ + 1 is
    # odd, which a binary64 quotient would round to the even 2⁶⁰
    found = unit_from_kernel([PHI], [True], [{0: 2**60 + 1}, {0: 2**60}, {0: -(2**70) - 1}])
    assert found is not None and found.exponents == {0: 1} and found.norm == -1
    assert mpmath.almosteq(found.log, mpmath.log((1 + mpmath.sqrt(5)) / 2), 1e-15)


def test_units_that_are_plus_or_minus_one_give_nothing():
    assert unit_from_kernel([PHI, PHI], [True, True], [{0: 1, 1: -1}]) is None
    assert unit_from_kernel([PHI], [True], []) is None


def test_the_gcd_of_several_powers():
    # φ⁶, φ¹⁰, φ¹⁵: gcd(6, 10, 15) = 1, so φ itself
    gens = [PHI**6, PHI**10, PHI**15]
    found = unit_from_kernel(gens, [False, False, True], [{0: 1}, {1: 1}, {2: 1}])
    assert found is not None and found.norm == -1
    assert mpmath.almosteq(found.log, mpmath.log((1 + mpmath.sqrt(5)) / 2), 1e-15)
