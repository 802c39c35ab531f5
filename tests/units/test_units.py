"""Fundamental units and regulators of orders, against brute force and identities."""

from __future__ import annotations

import math

import mpmath
import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad import Order, field, fundamental_unit, regulator
from realquad.core.integers import is_square
from realquad.errors import DomainError, InputError, TooLargeError
from realquad.units.cfrac import unit_index_in_order


def discriminants(lo: int, hi: int) -> list[int]:
    return [D for D in range(lo, hi) if D % 4 in (0, 1) and not is_square(D)]


def _brute_unit(D: int, vmax: int) -> tuple[int, int] | None:
    """Least 0 < v ≤ vmax with u² − D v² = ±4 (independent brute force)."""
    for v in range(1, vmax + 1):
        for s in (-4, 4):
            u2 = D * v * v + s
            u = math.isqrt(u2)
            if u * u == u2:
                return u, v
    return None


def test_units_brute_force():
    """ε = (u + v√D)/2 with the least v: brute force (v ≤ 5000) for every D < 1000."""
    for D in discriminants(5, 1000):
        eps = fundamental_unit(D)
        u, v = eps.half_integer_coordinates()
        assert u * u - D * v * v == 4 * eps.norm
        found = _brute_unit(D, 5000)
        if v <= 5000:
            assert (u, v) == found, D
        else:
            assert found is None, D


def test_field_units_from_memory():
    # Classical examples (from memory; each one's norm is re-checked exactly here).
    cases = {
        2: ("1 + √2", -1),
        3: ("2 + √3", 1),
        5: ("(1 + √5)/2", -1),
        7: ("8 + 3√7", 1),
        13: ("(3 + √13)/2", -1),
        94: ("2143295 + 221064√94", 1),
        61: ("(39 + 5√61)/2", -1),
    }
    for d, (text, norm) in cases.items():
        eps = fundamental_unit(field(d))
        assert str(eps.expand()) == text
        assert eps.norm == norm
        assert eps.expand().norm() == norm


@given(st.integers(5, 10**13))
@example(4 * 1000000000091)
@example(4 * (10**12 + 1))
@example(5)
@example(8)
def test_regulator_is_log_of_unit(D):
    if D % 4 not in (0, 1) or is_square(D):
        return
    try:
        eps = fundamental_unit(D, max_period=100_000)
    except TooLargeError:
        return
    reg = eps.regulator(40)
    exact = eps.expand()
    assert exact.norm() == eps.norm
    assert exact.is_integral()
    with mpmath.workdps(60):
        log_eps = exact.log_abs_mpf(50)
        assert abs(reg.value - log_eps) <= reg.error_bound + mpmath.mpf(10) ** (-45) * max(
            1, abs(log_eps)
        )
        assert reg.error_bound < mpmath.mpf(10) ** (-38) * max(1, abs(log_eps))


def test_regulator_digits():
    assert (
        str(regulator(5, 30)) == "0.481211825059603447497758913424"
    )  # log((1+√5)/2), from memory; recomputed below
    with mpmath.workdps(40):
        assert (
            mpmath.nstr(mpmath.log((1 + mpmath.sqrt(5)) / 2), 30)
            == "0.481211825059603447497758913424"
        )
    assert str(regulator(8, 10)) == "0.8813735870"  # log(1 + √2) = asinh(1)
    assert len(str(regulator(4 * 61, 200)).replace(".", "")) == 200


def _least_power_in_order(D0: int, f: int) -> int:
    """Brute force: the least k with ε₀^k = (u + v√D₀)/2 having f | v."""
    eps0 = fundamental_unit(D0).expand()
    k, p = 1, eps0
    while True:
        # p = (x + y√r)/c; write as (u + v√D0)/2
        r = p.d
        scale = math.isqrt(D0 // r)
        v2 = 2 * p.y // (p.c * scale)
        if v2 % f == 0:
            return k
        k += 1
        p = p * eps0


def test_unit_of_non_maximal_order_is_least_power():
    """Unit of conductor f (directly, from its own continued fraction) = ε₀^k with the least k."""
    for D0 in (5, 8, 12, 13, 17, 21, 28, 29, 33, 61):
        eps0 = fundamental_unit(D0)
        for f in range(2, 13):
            order = Order(f * f * D0)
            eps = fundamental_unit(order)
            k = _least_power_in_order(D0, f)
            assert unit_index_in_order(eps0, order) == k
            assert eps.expand() == eps0.expand() ** k, (D0, f)


def test_order_attributes():
    O = Order(45)
    assert (O.fundamental_discriminant, O.conductor, O.radicand) == (5, 3, 5)
    O = Order(4 * 18)
    assert (O.fundamental_discriminant, O.conductor, O.radicand) == (8, 3, 2)
    assert field(12) == Order(12) and field(27) == Order(12)
    assert field(5).discriminant == 5 and field(20).discriminant == 5


@pytest.mark.parametrize("D", [0, -1, -6, 2, 3, 6, 7])
def test_bad_discriminants(D):
    with pytest.raises(InputError):
        Order(D)


@pytest.mark.parametrize("D", [4, 9, 16, 100])
def test_square_discriminants(D):
    with pytest.raises(DomainError):
        Order(D)


def test_period_limit_refuses_clearly():
    with pytest.raises(TooLargeError, match="Baby-step giant-step"):
        fundamental_unit(4 * 1000000000091, max_period=1000)


def test_large_unit_exact():
    """d = 1000000000091: period 1,103,310 and x of 568,219 digits (figures from the issue tracker, measured with the reference implementation)."""
    eps = fundamental_unit(field(1000000000091))
    assert eps.period_length == 1103310
    assert eps.digits == 568219
    u, v = eps.half_integer_coordinates()
    D = eps.order.discriminant
    m = (1 << 521) - 1
    assert (u * u - D * v * v - 4 * eps.norm) % m == 0
