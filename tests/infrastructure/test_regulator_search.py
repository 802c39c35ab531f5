"""Baby-step giant-step regulators against the continued fraction and brute force."""

from __future__ import annotations

import math

import gmpy2
import mpmath
import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad.core.lfunction import estimate_hR
from realquad.core.primes import primes_below
from realquad.infrastructure.distances import exact_principal_at, log_of_product, walk_to
from realquad.infrastructure.ideals import Cycle, giant_step_float
from realquad.infrastructure.regulator_search import search_regulator
from realquad.infrastructure.table import compiled_table
from realquad.units.bsgs import regulator_from_search
from realquad.units.cfrac import regulator_cfrac


def discriminant_near(n: int) -> int:
    """A non-square discriminant ``≥ n`` (the first one, 0 or 1 mod 4)."""
    D = max(n, 5)
    while D % 4 not in (0, 1) or gmpy2.is_square(D):
        D += 1
    return D


def principal_cycle(cycle: Cycle) -> list[tuple[tuple[int, int], float]]:
    """Brute force: the whole principal cycle by baby steps, with float distances."""
    ideal, dist, out = cycle.principal, 0.0, []
    while True:
        out.append((ideal, dist))
        nxt = cycle.rho(*ideal)
        dist += cycle.rho_log_float(*ideal, *nxt)
        ideal = nxt
        if ideal == cycle.principal:
            return out


def two_cycle_ideals(cycle: Cycle, seed: int) -> tuple[tuple[int, int], tuple[int, int]]:
    """Two ideals of the principal cycle, ``seed mod 50`` and ``(seed >> 8) mod 70`` steps from ``O``."""
    ideals = []
    for steps in (seed % 50, (seed >> 8) % 70):
        ideal = cycle.principal
        for _ in range(steps):
            ideal = cycle.rho(*ideal)
        ideals.append(ideal)
    return ideals[0], ideals[1]


# -- regulator agreement with the continued fraction (realquad.units, independent code) --


@given(st.integers(5, 10**9))
@example(5)
@example(8)
@example(12)
@example(13)
@example(4 * 61)
@example(380)
def test_bsgs_regulator_matches_continued_fraction_small(n: int) -> None:
    D = discriminant_near(n)
    assert str(regulator_from_search(search_regulator(D, 35))) == str(regulator_cfrac(D, 35))


@given(st.integers(10**9, 10**12))
def test_bsgs_regulator_matches_continued_fraction_medium(n: int) -> None:
    D = discriminant_near(n)
    assert str(regulator_from_search(search_regulator(D, 30))) == str(regulator_cfrac(D, 30))


@pytest.mark.slow
@given(st.integers(10**12, 10**13))
def test_bsgs_regulator_matches_continued_fraction_large(n: int) -> None:
    D = discriminant_near(n)
    assert str(regulator_from_search(search_regulator(D, 30))) == str(regulator_cfrac(D, 30))


@pytest.mark.parametrize("table", [64, 300, 5000])
def test_small_tables_force_doubling_and_stay_correct(table: int) -> None:
    D = 4 * (10**12 + 39)
    res = search_regulator(D, 30, max_table=table, estimate=10.0)
    assert str(regulator_from_search(res)) == str(regulator_cfrac(D, 30))


def test_regulator_to_many_digits() -> None:
    D = 4 * (10**9 + 7)
    res = search_regulator(D, 120)
    assert str(regulator_from_search(res)) == str(regulator_cfrac(D, 120))
    assert regulator_from_search(res).error_bound < mpf_pow10(-125)
    assert regulator_from_search(res).proof == "unconditional"
    assert "baby-step giant-step" in regulator_from_search(res).method


def mpf_pow10(k: int) -> mpmath.mpf:
    return mpmath.mpf(10) ** k


def test_known_regulators() -> None:
    # Q(√94): ε = 2143295 + 221064√94 (from memory; also in realquad/__init__.py's doctest)
    assert (
        abs(
            float(regulator_from_search(search_regulator(4 * 94, 20)))
            - math.log(2143295 + 221064 * math.sqrt(94))
        )
        < 1e-9
    )
    # Z[√61]: ε = 29718 + 3805√61, the least solution of x² − 61y² = −1 (from memory)
    assert (
        abs(
            float(regulator_from_search(search_regulator(4 * 61, 20)))
            - math.log(29718 + 3805 * math.sqrt(61))
        )
        < 1e-9
    )


# -- the moves on reduced ideals --


@given(st.integers(5, 10**7))
def test_cycle_moves_are_consistent(n: int) -> None:
    D = discriminant_near(n)
    cyc = Cycle(D)
    cycle = principal_cycle(cyc)[:400]
    for (a, b), _ in cycle:
        assert cyc.is_reduced(a, b) and cyc.normalize(a, b) == b
        assert (b * b - D) % (4 * a) == 0
        assert cyc.rho_inverse(*cyc.rho(a, b)) == (a, b)
        # the conjugate of a reduced ideal is reduced (1 is a minimum of both)
        assert cyc.is_reduced(a, cyc.conjugate(a, b))


def lattice_hnf(vectors: list[tuple[int, int]]) -> tuple[int, int, int]:
    """Brute force: the Hermite normal form ``(n, m, k)`` of the Z-span of integer vectors.

    The lattice is ``Z(n, 0) + Z(m, k)`` with ``k > 0`` the gcd of the second
    coordinates and ``0 ≤ m < n``.
    """
    acc_x, acc_y = 0, 0
    for x, y in vectors:
        g, s, t = gmpy2.gcdext(acc_y, y)
        acc_x, acc_y = int(s * acc_x + t * x), int(g)
    k = acc_y
    n = 0
    for x, y in vectors:
        n = math.gcd(n, x - (y // k) * acc_x)
    return n, acc_x % n, k


def test_composition_is_ideal_multiplication() -> None:
    # Brute force: span of the four products of Z-bases versus d·[a3, (b3+√D)/2],
    # coordinates (x, y) for (x + y√D)/2.
    for D in (4000012, 10**7 + 1, 5 * 10**6 + 1, 29745716, 1001 * 4):
        cyc = Cycle(D)
        cycle = [ideal for ideal, _ in principal_cycle(cyc)][:60]
        for (a1, b1), (a2, b2) in zip(cycle, reversed(cycle), strict=False):
            d, a3, b3 = cyc.multiply(a1, b1, a2, b2)

            def mul(p: tuple[int, int], q: tuple[int, int], D: int = D) -> tuple[int, int]:
                # (x1 + y1√D)/2 · (x2 + y2√D)/2 = ((x1x2 + D y1y2)/2 + (x1y2 + x2y1)/2 √D)/2
                return ((p[0] * q[0] + D * p[1] * q[1]) // 2, (p[0] * q[1] + p[1] * q[0]) // 2)

            basis1, basis2 = [(2 * a1, 0), (b1, 1)], [(2 * a2, 0), (b2, 1)]
            product = [mul(p, q) for p in basis1 for q in basis2]
            expected = [(2 * d * a3, 0), (d * b3, d)]
            assert lattice_hnf(product) == lattice_hnf(expected)


@given(st.integers(10**6, 10**20), st.integers(0, 2**32))
def test_fused_giant_step_matches_composition_and_reduction(n: int, seed: int) -> None:
    D = discriminant_near(n)
    cyc = Cycle(D)
    I1, I2 = two_cycle_ideals(cyc, seed)
    d, a3, b3 = cyc.multiply(*I1, *I2)
    a, b, shift = cyc.reduce_float(a3, b3)
    a_, b_, mu = cyc.reduce_exact(a3, b3)
    got = giant_step_float(D, cyc.root, cyc.sqrt_float, *I1, *I2)
    assert got[:2] == (a, b) == (a_, b_)
    assert abs(got[2] - (math.log(I1[0] * I2[0] / (d * a3)) + shift)) < 1e-8
    assert abs(float(mu.log_abs_mpf(20)) - shift) < 1e-8


def test_composition_and_reduction_follow_distances() -> None:
    # Brute force: every product of two cycle ideals lands on the cycle at δ₁ + δ₂ + correction (mod R).
    for D in (4000012, 10**7 + 1, 40000076, 5000001):
        cyc = Cycle(D)
        cycle = principal_cycle(cyc)
        where = dict(cycle)
        R = float(regulator_cfrac(D, 20))
        for (I1, d1), (I2, d2) in zip(cycle[::7], cycle[3::11], strict=False):
            a, b, c = giant_step_float(D, cyc.root, cyc.sqrt_float, *I1, *I2)
            diff = (d1 + d2 + c - where[(a, b)]) % R
            assert min(diff, R - diff) < 1e-6


def test_walk_to_lands_below_target() -> None:
    cyc = Cycle(4 * (10**12 + 39))
    for x in (0.0, 3.0, 50.0, 1234.5, 98765.4):
        near = walk_to(cyc, x, exact=True)
        assert near.distance <= x + 1e-9
        nxt = cyc.rho(*near.ideal)
        assert near.distance + cyc.rho_log_float(*near.ideal, *nxt) > x - 1e-9
        assert near.factors is not None
        value, bound = log_of_product(near.factors, 30)
        assert abs(float(value) - near.distance) < 1e-6


def test_exact_principal_gives_the_unit() -> None:
    D = 4 * (10**9 + 7)
    R = float(regulator_cfrac(D, 20))
    factors = exact_principal_at(Cycle(D), R)
    value, _ = log_of_product(factors, 40)
    assert abs(value - regulator_cfrac(D, 40).value) < 1e-35


def test_estimate_of_hR_is_close_for_a_class_number_one_field() -> None:
    # h(4·(10⁹+7)) = 1: the estimate should be within a few percent of R.
    D = 4 * (10**9 + 7)
    e = estimate_hR(D)
    assert abs(e.value / float(regulator_cfrac(D, 20)) - 1) < 0.05
    assert primes_below(30) == [2, 3, 5, 7, 11, 13, 17, 19, 23, 29]  # OEIS A000040


# -- the plain-integer kernels and their twins --

WORD_EDGES = [2**31 - 1, 2**62, 2**63, 2**64, 2**126]


@given(st.one_of(st.integers(5, 10**30), st.sampled_from(WORD_EDGES)), st.integers(1, 300))
def test_baby_step_kernel_follows_rho(n: int, count: int) -> None:
    from realquad._backend import pure as _pure

    D = discriminant_near(n)
    cyc = Cycle(D)
    a, b = cyc.principal
    keys, dists, a_end, b_end, dist, back = _pure.infrastructure_baby_steps(
        D, cyc.root, cyc.sqrt_float, a, b, 0.0, count
    )
    ideal, total = cyc.principal, 0.0
    for key, d in zip(keys, dists, strict=True):
        nxt = cyc.rho(*ideal)
        total += cyc.rho_log_float(*ideal, *nxt)
        ideal = nxt
        assert key == cyc.key(*ideal) and abs(d - total) <= 1e-12 * (1 + total)
    assert (a_end, b_end) == (cyc.principal if back else ideal)


@given(st.one_of(st.integers(5, 10**30), st.sampled_from(WORD_EDGES)), st.integers(0, 2**32))
def test_compiled_twins_agree_with_pure(n: int, seed: int) -> None:
    from realquad._backend import kernels
    from realquad._backend import pure as _pure

    D = discriminant_near(n)
    cyc = Cycle(D)
    I1, I2 = two_cycle_ideals(cyc, seed)
    args = (D, cyc.root, cyc.sqrt_float)
    pure = _pure.infrastructure_giant_step(*args, *I1, *I2)
    assert giant_step_float(*args, *I1, *I2) == pure
    for name, call in (
        ("infrastructure_giant_step", lambda f: f(*args, *I1, *I2)),
        ("infrastructure_baby_steps", lambda f: f(*args, *I1, 0.0, 50)),
    ):
        compiled = getattr(kernels, name, None)
        if compiled is None or compiled is getattr(_pure, name):
            continue
        try:
            got = call(compiled)
        except OverflowError:
            continue
        assert got == call(getattr(_pure, name))


# -- published tables --


def test_regulators_match_oeis_pell_solutions(oeis) -> None:  # type: ignore[no-untyped-def]
    # OEIS A002350 / A002349: the least solution of x² − n y² = 1 is ε or ε² for the unit ε of
    # Z[√n] (discriminant 4n), as ε has norm +1 or −1.
    from realquad.infrastructure.compact import CompactRepresentation

    xs, ys = oeis["A002350"]["terms"], oeis["A002349"]["terms"]
    offset = oeis["A002350"]["offset"]
    checked = 0
    for i, (x, y) in enumerate(zip(xs, ys, strict=False)):
        n = i + offset
        if gmpy2.is_square(n):
            continue
        res = search_regulator(4 * n, 30)
        eps = CompactRepresentation.from_factors(4 * n, res.factors)
        power = 1 if eps.norm == 1 else 2
        with mpmath.workdps(40):
            assert (
                abs(power * regulator_from_search(res).value - mpmath.log(x + y * mpmath.sqrt(n)))
                < mpmath.mpf(10) ** -25
            )
        checked += 1
    assert checked > 50


def test_estimate_is_near_R_for_class_number_one(oeis) -> None:  # type: ignore[no-untyped-def]
    # OEIS A003656: fundamental discriminants with h = 1, so h·R = R. A sanity check of the
    # estimate (it sizes the search; no bound is claimed for it).
    for D in oeis["A003656"]["terms"]:
        R = float(regulator_from_search(search_regulator(D, 20)))
        assert 0.5 < estimate_hR(D).value / R < 2.0


@given(st.integers(10**6, 10**12), st.integers(16, 4000), st.floats(1.0, 1e9))
def test_any_table_size_and_estimate_give_the_same_regulator(
    n: int, table: int, estimate: float
) -> None:
    # The estimate and the table cap only change the speed (doubling, re-checks), never R.
    D = discriminant_near(n)
    res = search_regulator(D, 25, max_table=table, estimate=estimate)
    assert str(regulator_from_search(res)) == str(regulator_cfrac(D, 25))


@given(st.integers(10**9, 10**12))
def test_probe_finds_only_multiples_of_the_regulator(n: int) -> None:
    from realquad.infrastructure.regulator_search import _probe, _table_target
    from realquad.infrastructure.table import BabyStepTable

    D = discriminant_near(n)
    cyc = Cycle(D)
    R = float(regulator_cfrac(D, 20))
    E = estimate_hR(D).value
    table = BabyStepTable(cyc)
    table.extend(_table_target(cyc, E / 2, 1 << 20))
    if table.period is not None:
        return  # the baby steps already hold the whole cycle; no probe is made
    for guess in (E, E / 2, 3 * R):  # E ≈ hR; a copy of O near 3R must be found as a multiple
        found = _probe(cyc, table, guess)
        if found is not None:
            k = found[0] / R
            assert abs(k - round(k)) < 1e-6 and round(k) >= 1


@given(st.integers(10**9, 10**12), st.sampled_from([2, 3, 4, 6, 12, 35, 97]))
def test_prime_factors_of_a_multiple_are_divided_out(n: int, k: int) -> None:
    # x = kR with no R ≤ swept: the walks near x/p must bring x down to R (continued fraction).
    from realquad.infrastructure.regulator_search import _divide_out_primes

    D = discriminant_near(n)
    R = float(regulator_cfrac(D, 20))
    x, err = _divide_out_primes(Cycle(D), k * R, 1e-6, R / 2)
    assert abs(x - R) < 1e-6 * R and err < R / 4


@pytest.mark.parametrize("n", [10**12 + 244, 4 * (10**11 + 3), 4 * 999999999989, 10**10 + 1])
def test_short_sweeps_with_prime_tests_give_the_regulator(
    n: int, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Walks made to look cheap: the sweep stops far below x/2 and the prime tests do the rest
    # (the first of these fields has h = 6 by the continued fraction's R and the estimate).
    import realquad.infrastructure.regulator_search as bsgs

    monkeypatch.setattr(bsgs, "_WALK_OVER_GIANT_COMPILED", 0.01)
    monkeypatch.setattr(bsgs, "_WALK_OVER_GIANT_PURE", 0.01)
    D = discriminant_near(n)
    res = search_regulator(D, 25, max_table=4096)
    assert str(regulator_from_search(res)) == str(regulator_cfrac(D, 25))


@pytest.mark.slow
@pytest.mark.skipif(
    not compiled_table(81129638414606681695789005143657), reason="a test of the compiled kernels"
)
def test_regulator_just_below_the_compiled_limit() -> None:
    # D = the largest prime ≡ 1 (mod 4) below 2¹⁰⁶: R ≈ 6·10¹⁵ by two searches with different
    # tables (so different giant steps and sweeps); their float walks land hundreds of baby
    # steps apart, which the exact walk must absorb.
    D = 81129638414606681695789005143657
    assert gmpy2.is_prime(D) and D % 4 == 1 and D < 1 << 106 < D + 1000
    first = search_regulator(D, 30)
    second = search_regulator(D, 30, max_table=8_000_000)
    assert str(regulator_from_search(first)) == str(regulator_from_search(second))
    assert 5e15 < float(regulator_from_search(first).value) < 7e15
