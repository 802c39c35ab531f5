"""The principal ideal test against the cycle of reduced forms (realquad.forms) and brute force."""

from __future__ import annotations

import gmpy2
import pytest
from hypothesis import given
from hypothesis import strategies as st

from realquad.core.forms import Form
from realquad.errors import DomainError, InputError
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.principal import principal_ideal_test


def discriminant_near(n: int) -> int:
    D = max(n, 5)
    while D % 4 not in (0, 1) or gmpy2.is_square(D):
        D += 1
    return D


def ideals_above_small_primes(D: int, count: int) -> list[tuple[int, int]]:
    """Prime ideals [p, (b + √D)/2] for split primes p, and products of two of them."""
    cyc = Cycle(D)
    primes = []
    p = 2
    while len(primes) < count and p < 10_000:
        p = int(gmpy2.next_prime(p))
        if D % p == 0:
            continue
        for b in range(D & 1, 2 * p, 2):
            if (b * b - D) % (4 * p) == 0:
                primes.append((p, b))
                break
    out = list(primes)
    for (a1, b1), (a2, b2) in zip(primes, primes[1:], strict=False):
        d, a3, b3 = cyc.multiply(a1, b1, a2, b2)
        if d == 1:
            out.append((a3, b3))
    return out


def principal_by_forms(D: int, a: int, b: int) -> bool:
    """Brute force: the ideal is principal iff its cycle of reduced forms has a form with |a| = 1."""
    cycle = Form.from_ab(a, b, D).reduced().cycle()
    return any(abs(f.a) == 1 for f in cycle)


def generator_is_correct(D: int, a: int, b: int, uv: tuple[int, int]) -> bool:
    """ν = (u + v√D)/2 lies in [a, (b + √D)/2] and has norm ±a: then νO = I (norms agree)."""
    u, v = uv
    if (u * u - D * v * v) not in (4 * a, -4 * a):
        return False
    # ν = s·a + t·(b + √D)/2 with t = v, s = (u − v b)/(2a) integral
    return (u - v * b) % (2 * a) == 0


@given(st.integers(5, 10**5))
def test_principal_test_matches_form_cycles(n: int) -> None:
    D = discriminant_near(n)
    for a, b in ideals_above_small_primes(D, 6):
        res = principal_ideal_test(D, a, b)
        assert res.principal == principal_by_forms(D, a, b), (D, a, b)
        if res.principal:
            assert res.generator is not None
            assert abs(res.generator.norm) == a
            assert generator_is_correct(D, a, b, res.generator.expand())


@pytest.mark.parametrize("D", [4 * (10**9 + 7), 10**10 + 1, 4 * 10**9 + 1, 10**12 + 37])
def test_principal_test_on_larger_fields(D: int) -> None:
    for a, b in ideals_above_small_primes(D, 4):
        res = principal_ideal_test(D, a, b)
        assert res.principal == principal_by_forms(D, a, b), (D, a, b)
        if res.principal:
            assert res.generator is not None
            for p in (10**9 + 7, 998244353):  # primes (from memory)
                try:
                    x, y = res.generator.modulo(p)
                except DomainError:
                    continue
                assert (x * x - D * y * y - res.generator.norm) % p == 0


def test_order_itself_is_principal() -> None:
    D = 4 * (10**9 + 7)
    res = principal_ideal_test(D, 1, Cycle(D).principal[1])
    assert res.principal and res.generator is not None and abs(res.generator.norm) == 1


def test_bad_ideals_are_refused() -> None:
    with pytest.raises(InputError):
        principal_ideal_test(316, 0, 2)
    with pytest.raises(DomainError):
        principal_ideal_test(316, 5, 2)


@given(st.integers(-10, 10**8), st.integers(-100, 10**6), st.integers(-(10**6), 10**6))
def test_fuzz_principal_ideal_test_raises_only_clean_errors(D: int, a: int, b: int) -> None:
    from realquad.errors import RealquadError

    try:
        res = principal_ideal_test(D, a, b)
    except RealquadError:
        return
    assert res.principal == principal_by_forms(D, a, b)


def test_the_search_table_is_extended_for_a_sweep_over_the_period() -> None:
    # D = 10²⁴ + 49: the regulator search keeps a table for its short sweep (a few 10⁵ ideals);
    # the test's sweep over R wants about √(6·1.19·R) of distance. The generators found then
    # have norm ±p (exact, from the compact form's factors: independent of the float search).
    from realquad.infrastructure.principal import _search
    from realquad.infrastructure.regulator_search import search_regulator
    from realquad.units.bsgs import regulator_from_search

    D = 10**24 + 49
    plain = search_regulator(D, 20)
    found = _search(D)
    assert found.table is not None and plain.table is not None
    assert found.table.distance > 2 * plain.table.distance
    assert str(regulator_from_search(found)) == str(regulator_from_search(plain))
    for p, b in ideals_above_small_primes(D, 3)[:3]:
        res = principal_ideal_test(D, p, b)
        if res.principal:
            assert res.generator is not None and abs(res.generator.norm) == p
