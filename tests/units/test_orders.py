"""Fundamental units of orders from their field's unit (``realquad.units.orders``).

Sources: the continued fraction of the order itself (exact and unconditional,
an independent algorithm) where it runs; baby-step giant-step in the order's
own infrastructure (unconditional) beyond; brute force for the size of
``(O_K/fO_K)^×/(Z/fZ)^×``; ``682² − 125·61² = −1`` by hand.
"""

from __future__ import annotations

import math
import random

import gmpy2
import pytest

from realquad.core.orders import Order, field
from realquad.errors import DomainError
from realquad.units import choose_method, fundamental_unit, regulator
from realquad.units.cfrac import fundamental_unit_cfrac
from realquad.units.orders import unit_group_index, unit_of_order
from tests.markers import HEAVY


def random_real_orders(seed: int, count: int, low: int, high: int) -> list[int]:
    """Random real orders ``D₀·f²`` with ``low ≤ D ≤ high`` and ``f > 1`` (also for the class group tests)."""
    rng = random.Random(seed)
    found: list[int] = []
    while len(found) < count:
        f = rng.choice([2, 3, 4, 5, 6, 7, 10, 12, 30, 60, 210, rng.randrange(2, 400)])
        r = rng.randrange(2, high // f**2 + 3)
        if gmpy2.is_square(r):
            continue
        D = field(r).discriminant * f * f
        if low <= D <= high:
            found.append(D)
    return found


@pytest.mark.parametrize("D", random_real_orders(5, 30, 10**10, 10**13))
def test_agrees_with_the_continued_fraction_of_the_order(D):
    order = Order(D)
    assert order.conductor > 1
    found = fundamental_unit(D, "subexp")
    reference = fundamental_unit_cfrac(order)
    assert found.expand() == reference.expand()
    assert found.norm == reference.norm
    assert str(found.regulator(25)) == str(reference.regulator(25))
    assert "least power of the field's unit" in found.method


@pytest.mark.parametrize("D", random_real_orders(8, 30, 50, 10**6))
def test_small_orders_from_the_field_unit(D):
    # below the sieve's reach the lift itself still serves any field unit
    order = Order(D)
    lifted = unit_of_order(order, fundamental_unit_cfrac(order.maximal_order()))
    reference = fundamental_unit_cfrac(order)
    assert lifted.expand() == reference.expand() and lifted.norm == reference.norm


def test_z_5_root_5():
    # Z[5√5] = Z[√125]: ε = 682 + 305√5 = 682 + 61√125, and 682² − 125·61² = −1
    u = unit_of_order(Order(500), fundamental_unit_cfrac(Order(5)))
    assert str(u.expand()) == "682 + 305√5" and u.norm == -1
    assert 682**2 - 125 * 61**2 == -1


@pytest.mark.parametrize("D0, f", [(5, 10), (8, 9), (12, 15), (13, 4), (21, 14), (40, 6)])
def test_unit_group_index_by_brute_force(D0, f):
    # |(O_K/fO_K)^×| / φ(f), counting x + yω (ω = (D₀ + √D₀)/2) with norm prime to f
    count = 0
    for x in range(f):
        for y in range(f):
            norm = x * x + D0 * x * y + (D0 * D0 - D0) // 4 * y * y
            count += math.gcd(norm, f) == 1
    phi = sum(1 for k in range(1, f + 1) if math.gcd(k, f) == 1)
    assert unit_group_index(Order(D0 * f * f)) == count // phi


@HEAVY
@pytest.mark.parametrize("f, digits", [(10, 20), (6, 21), (35, 18)])
def test_agrees_with_baby_step_giant_step_on_the_order(f, digits):
    # the field's unit by index calculus (D₀ ≥ 10¹⁰), against the order's own infrastructure
    rng = random.Random(f * digits)
    D = field(rng.randrange(10**digits, 10 ** (digits + 1))).discriminant * f * f
    found = fundamental_unit(D, "subexp")
    reference = fundamental_unit(D, "bsgs")
    assert str(found.regulator(25)) == str(reference.regulator(25))
    assert found.norm == reference.norm and found.proof == "GRH"


@HEAVY
def test_a_forty_digit_order():
    # D = 36·p, p ≈ 10⁴⁰: R(O) = m·R_K with m | N = 6·(1 − (p/2)/2)(1 − (p/3)/3)
    p = int(gmpy2.next_prime(10**40))
    while p % 4 != 1:
        p = int(gmpy2.next_prime(p))
    D = 36 * p
    u = fundamental_unit(D)
    K = fundamental_unit(p)
    N = unit_group_index(Order(D))
    ratio = u.regulator(30).value / K.regulator(30).value
    m = round(float(ratio))
    assert N % m == 0 and abs(ratio - m) < 1e-20
    assert u.norm == K.norm**m and u.proof == "GRH"
    assert str(regulator(D, 30)) == str(u.regulator(30))


def test_dispatch_and_refusals():
    assert choose_method(Order(36 * (10**40 + 7))) == "subexp"
    with pytest.raises(DomainError, match="10¹⁰"):
        fundamental_unit(500, "subexp")
