"""Conics with linear terms in compact form (the infrastructure's path) against the continued
fraction's families, brute force, and Python's own arithmetic at sizes the continued
fraction cannot reach.

The continued fraction's conic families are themselves checked against brute force over
boxes in tests/equations/test_conics.py.
"""

from __future__ import annotations

import random

import gmpy2
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad.equations.conics import normalize, solve_quadratic
from realquad.equations.conics_compact import CompactConicFamily, compact_conic_families
from tests.equations.test_pell import giant_steps_compiled


def _transformed(co: tuple[int, ...]) -> tuple[tuple[int, ...], tuple[int, int], int, int] | None:
    a, b, c, d, e, f = normalize(co)  # type: ignore[arg-type]
    Delta = b * b - 4 * a * c
    if a == 0 or Delta <= 0 or gmpy2.is_square(Delta) or (d == 0 and e == 0):
        return None
    K = (2 * a * e - b * d) ** 2 + Delta * (4 * a * f - d * d)
    if K == 0:
        return None
    return (0, Delta, 2 * a, b), (b * d - 2 * a * e, d), Delta, K


def _compare(co: tuple[int, ...]) -> int:
    """The compact families of the conic ``co`` equal the continued fraction's: as many, the
    same fundamental solutions, the same solutions in a box of side 2·10¹²."""
    found = _transformed(co)
    if found is None:
        return 0
    S, s0, Delta, K = found
    reference = solve_quadratic(*normalize(co))  # type: ignore[arg-type]
    families = compact_conic_families(S, s0, Delta, K)  # type: ignore[arg-type]
    assert len(families) == len(reference.families), co
    assert sorted(f.fundamental for f in families) == sorted(
        f.fundamental for f in reference.families
    )
    B = 10**12
    got = {p for fam in families for p in fam.bounded(B)}
    want = {p for fam in reference.families for p in fam.bounded(B)}
    assert got == want, co
    a, b, c, d, e, f = normalize(co)  # type: ignore[arg-type]
    for x, y in got:  # independent check of each listed point
        assert a * x * x + b * x * y + c * y * y + d * x + e * y + f == 0
    for fam in families:
        for m in (2**20, 10**9 + 7, 360):
            assert fam.residues(m) == (fam.fundamental[0] % m, fam.fundamental[1] % m)
    return len(families)


@giant_steps_compiled
@settings(max_examples=25, deadline=None)
@given(
    st.integers(1, 6),
    st.integers(-7, 7),
    st.integers(-3000, -1),
    st.integers(-30, 30),
    st.integers(-30, 30),
    st.integers(-300, 300),
)
def test_random_conics_agree_with_the_continued_fraction(a, b, c, d, e, f):
    _compare((a, b, c, d, e, f))


@giant_steps_compiled
def test_mirrored_families_and_every_shape_of_automorph():
    # conics centred at integer points (mirrored families), Δ ≡ 5 (mod 8) (ε = η³) and
    # automorphs −η^{p/2} all occur in these seeded samples
    rng = random.Random(20261203)
    total = 0
    for _ in range(40):
        a, b, c = rng.randint(1, 6), rng.randint(-7, 7), rng.randint(-2000, -1)
        h, k, n = rng.randint(-9, 9), rng.randint(-9, 9), rng.randint(-500, 500)
        co = (
            a,
            b,
            c,
            -2 * a * h - b * k,
            -b * h - 2 * c * k,
            a * h * h + b * h * k + c * k * k - n,
        )
        total += _compare(co)
    for co in [(1, 1, -1, 3, -5, -7), (1, 3, -1, 2, 2, -9), (1, 0, -2, 3, -5, -7)]:
        total += _compare(co)
    assert total > 20


@giant_steps_compiled
def test_a_conic_beyond_the_continued_fraction():
    # Δ = 4(10²⁴ + 49): the continued fraction refuses; the family of (−1, 0) is found with
    # its automorph in compact form, and a far member satisfies the equation modulo m
    d = 10**24 + 49
    sol = solve_quadratic(1, 0, -d, 2, 3, 1)  # x² − dy² + 2x + 3y + 1 = 0
    assert sol.method.startswith("P² − ΔQ² = K by principal ideal tests")
    assert sol.proof == "unconditional"
    fams = [f for f in sol.families if isinstance(f, CompactConicFamily)]
    assert len(fams) == len(sol.families) == 1 and fams[0].fundamental == (-1, 0)
    fam = fams[0]
    assert fam.unit_digits() > 10**11  # the automorph is far beyond writing out
    member = fam.member(1)  # P + Q√Δ, reduced modulo m without expanding it
    m = 10**40
    U, V = member.coordinates_modulo(2 * m)
    P, Q = U // 2 % m, V % m
    assert (P * P - fam.d * Q * Q - fam.n) % m == 0
    assert sol.bounded(10**6) == [(-1, 0)]


def test_refusal_beyond_the_infrastructure_says_why():
    from realquad.errors import TooLargeError

    with pytest.raises(TooLargeError, match="beyond the continued fraction"):
        solve_quadratic(1, 0, -(2**110 + 1), 2, 3, 1)
