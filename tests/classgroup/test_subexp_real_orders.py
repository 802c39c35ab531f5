"""Class groups of real orders of conductor > 1 by index calculus (``realquad.classgroup.orders``).

Sources: the cycle method (every class walked, exact and unconditional, an
independent algorithm) where it runs; brute force in ``(O_K/fO_K)^×`` for the
residue generators; beyond the cycle method, the class number formula for
orders ``h(O)·R(O) = h_K·R_K·f·∏(1 − (D₀/p)/p)`` (Cox, *Primes of the form
x² + ny²*, Theorem 7.24, with ``R(O) = [O_K^× : O^×]·R_K``) and the
GRH-explicit interval for ``h_K·R_K``.
"""

from __future__ import annotations

import random
from fractions import Fraction

import mpmath
import pytest

from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.orders import lift, prime_to, principal_ideal_form, residue_generators
from realquad.core.forms import Form
from realquad.core.lfunction import hR_interval
from realquad.core.orders import Order, field
from realquad.core.primes import factorize, kronecker
from realquad.units.orders import unit_group_index
from tests.markers import HEAVY
from tests.units.test_orders import random_real_orders


def _assert_same(D: int) -> None:
    G = class_group(D, method="subexp")
    E = class_group(D, method="exact")
    assert (G.invariants, G.narrow_invariants) == (E.invariants, E.narrow_invariants), D
    assert G.unit_norm == E.unit_norm
    assert str(G.regulator)[:15] == str(E.regulator)[:15]
    assert "prime to the conductor" in G.method


@pytest.mark.parametrize("D", random_real_orders(3, 16, 10**10, 10**12))
def test_agrees_with_the_cycle_method(D):
    _assert_same(D)


@HEAVY
@pytest.mark.parametrize("D", random_real_orders(4, 12, 10**12, 2 * 10**12))
def test_agrees_with_the_cycle_method_larger(D):
    _assert_same(D)


@pytest.mark.parametrize("f", [2, 3, 5])
def test_a_field_by_index_calculus_then_its_order(f):
    # D₀ ≥ 10¹⁰, so the field's group and unit come by index calculus (proof GRH)
    D0 = field(10**10 + 19).discriminant
    _assert_same(D0 * f * f)
    assert class_group(D0 * f * f, method="subexp").proof == "GRH"


def test_proof_is_unconditional_from_an_exact_field():
    D = 5 * (6 * 10**5) ** 2  # D₀ = 5: the cycle method's field and unit
    G = class_group(D, method="subexp")
    assert G.proof == "unconditional"
    assert G.class_number * G.regulator.value > 0


@HEAVY
def test_a_forty_digit_order_meets_the_class_number_formula():
    p = 10**40 + 121  # prime ≡ 1 (mod 4); Q(√p): h = 3, N(ε) = −1 (docs/classgroup.md)
    K = class_group(p)
    assert K.unit is not None
    R_K = K.unit.regulator(40).value
    for f in (6, 1009):
        G = class_group(p * f * f)
        assert G.unit is not None
        factor = Fraction(f)
        for q in factorize(f):
            factor *= 1 - Fraction(kronecker(p, q), q)
        with mpmath.workdps(40):
            hR = G.class_number * G.unit.regulator(40).value
            ratio = hR / (K.class_number * R_K)
            assert abs(ratio - mpmath.mpf(factor.numerator) / factor.denominator) < 1e-20
        iv = hR_interval(p, 10**5)
        assert iv.lower * factor <= hR <= iv.upper * factor
        assert G.proof == "GRH"


@pytest.mark.parametrize("D0, f", [(5, 10), (8, 9), (12, 15), (13, 4), (21, 14), (40, 6), (5, 49)])
def test_residue_generators_generate(D0, f):
    # brute force: the group they generate in (O_K/fO_K)^×/(Z/fZ)^× has all N elements
    n0 = (D0 * D0 - D0) // 4

    def mul(s, t):
        (u1, v1), (u2, v2) = s, t
        return ((u1 * u2 - v1 * v2 * n0) % f, (u1 * v2 + u2 * v1 + v1 * v2 * D0) % f)

    def normal(s):  # the class modulo (Z/fZ)^×: the least (k·u, k·v) over units k
        return min(((k * s[0]) % f, (k * s[1]) % f) for k in range(1, f) if gcd(k, f) == 1)

    from math import gcd

    gens = [(x % f, y % f) for x, y in residue_generators(D0, f, random.Random(1))]
    seen = {normal((1, 0))}
    frontier = list(seen)
    while frontier:
        s = frontier.pop()
        for g in gens:
            t = normal(mul(s, g))
            if t not in seen:
                seen.add(t)
                frontier.append(t)
    assert len(seen) == unit_group_index(Order(D0 * f * f))


@pytest.mark.parametrize("D0, x, y", [(5, 1, 1), (13, 7, -3), (12, 5, 2), (8, 1, 10), (40, -9, 4)])
def test_principal_ideal_form(D0, x, y):
    F = principal_ideal_form(D0, x, y)
    n0 = (D0 * D0 - D0) // 4
    assert F.discriminant == D0
    assert F.a == abs(x * x + D0 * x * y + n0 * y * y)  # N(x + yω)
    # x + yω = y·(−B + √D₀)/2 + (x + y(D₀ + B)/2): the rational part is a multiple of a
    assert (2 * x + y * (D0 + F.b)) % (2 * F.a) == 0


def test_lift_and_prime_to():
    F = prime_to(Form(3, 3, -1), 3, random.Random(2))
    assert F.discriminant == 21 and F.a % 3 != 0
    assert lift(F, 3).discriminant == 21 * 9


def test_dispatch():
    assert choose_class_group_method(Order(9 * (10**40 + 121))) == "subexp"
    # beyond the cycle method an order goes to index calculus (baby-step giant-step takes fields)
    assert choose_class_group_method(Order(4 * 9 * (10**15 + 37))) == "subexp"
    assert choose_class_group_method(Order(4 * 9 * (10**12 + 39))) == "exact"


def test_classes_and_principal_forms_of_a_real_order():
    # reference: the cycle method's own coordinates (orders of the classes agree)
    D = field(10**10 + 19).discriminant * 36
    G = class_group(D, method="subexp")
    E = class_group(D, method="exact")
    assert E.generators and G.invariants == E.invariants
    rng = random.Random(5)
    for g in E.generators:
        for k in (1, 2, rng.randrange(3, 100)):
            F = g.power(k)
            assert G.is_principal(F) == E.is_principal(F)
            assert G.is_narrowly_principal(F) == E.is_narrowly_principal(F)
