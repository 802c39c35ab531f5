"""Class groups of imaginary orders (conductor > 1) by index calculus.

Sources: the exact method (one reduced form per class, unconditional, an
independent algorithm) where it runs; beyond it, the class number formula for
orders, ``h(O) = h_K·f·∏_{p | f}(1 − (D₀/p)/p)/[O_K^× : O^×]`` (D. A. Cox,
*Primes of the form x² + ny²*, Theorem 7.24), with ``h_K`` from the exact
method; and composition of forms for the generators' orders.
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import pytest

from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.imaginary import class_group_imaginary
from realquad.classgroup.subexp import check_injective, check_relation, class_group_subexp
from realquad.core.forms import Form
from realquad.core.orders import Order, field
from realquad.core.primes import factorize, kronecker
from realquad.errors import DomainError
from realquad.relations.collect import Collector, sieve_parameters
from realquad.relations.factor_base import factor_base
from realquad.relations.families import family
from realquad.relations.smooth import relation_at
from tests.markers import HEAVY


def _assert_orders(G, D: int) -> None:
    """Each generator has exactly the order of its invariant (composition of forms)."""
    one = Form.identity(D).reduced()
    assert math.prod(G.invariants) == G.class_number
    for F, d in zip(G.generators, G.invariants, strict=True):
        assert F.power(d).reduced() == one
        for p in factorize(d):
            assert F.power(d // p).reduced() != one
    assert G.proof == "GRH" and "independence" in G.method


def _formula(D0: int, f: int) -> int:
    """Cox, Theorem 7.24, with ``h_K`` from the exact method."""
    h = Fraction(class_group_imaginary(Order(D0)).class_number * f, {-3: 3, -4: 2}.get(D0, 1))
    for p in factorize(f):
        h *= 1 - Fraction(kronecker(D0, p), p)
    assert h.denominator == 1
    return int(h)


def _orders(seed: int, count: int, low: int, high: int) -> list[int]:
    """Random orders ``D₀·f²`` with ``low ≤ |D| ≤ high``: conductors from 2 to about 10³."""
    rng = random.Random(seed)
    found = []
    while len(found) < count:
        f = rng.choice([2, 3, 4, 6, 9, 10, 12, 15, 30, 49, 121, 210, rng.randrange(2, 1000)])
        D0 = field(-rng.randrange(max(3, low // f**2), high // f**2)).discriminant
        if low <= -D0 * f * f <= high:
            found.append(D0 * f * f)
    return found


@pytest.mark.parametrize("D", _orders(7, 12, 10**10, 10**12))
def test_agrees_with_the_exact_method(D):
    order = Order(D)
    assert order.conductor > 1
    G = class_group_subexp(order, seed=abs(D) % 97)
    E = class_group_imaginary(order)
    assert (G.class_number, G.invariants) == (E.class_number, E.invariants), D
    _assert_orders(G, D)


@HEAVY
@pytest.mark.parametrize("D", _orders(11, 12, 10**12, 10**14))
def test_agrees_with_the_exact_method_larger(D):
    G = class_group_subexp(Order(D), seed=3)
    E = class_group_imaginary(Order(D))
    assert (G.class_number, G.invariants) == (E.class_number, E.invariants), D
    _assert_orders(G, D)


@pytest.mark.parametrize(
    "D0, f",
    [
        (-4, 1000003),  # Z[i·1000003]: unit index 2
        (-3, 300007),  # unit index 3
        (-(10**8 + 7), 1009 * 1013),
        (-(10**10 + 19), 10007),  # a prime conductor met by the sieve as a large prime
        (-(10**9 + 7) * 4, 2 * 3 * 5 * 7 * 11 * 13),
    ],
)
def test_class_number_formula_beyond_the_exact_method(D0, f):
    D0 = field(D0).discriminant
    D = D0 * f * f
    G = class_group(D, method="subexp")
    assert G.class_number == _formula(D0, f)
    _assert_orders(G, D)


def test_relations_of_an_order_hold_and_avoid_the_conductor():
    # D₀ = −(10¹⁰ + 19)... with the conductor 10007 beyond the factor base but within the
    # large-prime bound: no relation may use it (its prime ideals are not invertible)
    D0 = field(-(10**10 + 19)).discriminant
    f = 10007
    D = D0 * f * f
    fb = factor_base(D, 3000, f)
    assert f not in fb.primes and 10007 <= sieve_parameters(D, 3000).large_bound
    c = Collector(fb, sieve_parameters(D, 3000), seed=2)
    rels = next(c.rounds())
    assert len(rels) > 10
    for rel in rels[:60]:
        assert f not in rel.exponents and math.gcd(rel.value(D), f) == 1
        assert check_relation(D, rel)


def test_values_divisible_by_the_conductor_give_no_relation():
    # p | f divides D to the square, so a value divisible by p is divisible by p²: with two
    # large primes allowed, f·f would pass as a pair of large primes; it must not
    D0 = field(-(10**10 + 19)).discriminant
    f = 10007
    D = D0 * f * f
    fb = factor_base(D, 3000, f)
    large = sieve_parameters(D, 3000).large_bound
    assert 3000 < f <= large
    fam = family(fb, [fb.primes[40], fb.primes[60]])
    a, b = fam.a, fam.bs[0]
    c = (b * b - D) // (4 * a)
    roots = [x for x in range(f) if (a * x * x + b * x + c) % f == 0]
    smooth_multiples = 0
    for x in (r + k * f for r in roots for k in range(-20000, 20000)):
        value = abs(a * x * x + b * x + c)
        assert value % (f * f) == 0
        assert relation_at(fb, fam, 0, x, large, double=True) is None
        m = value // (f * f)
        for p in fb.primes:
            while m % p == 0:
                m //= p
        smooth_multiples += m == 1
    assert smooth_multiples > 0  # the check above was not vacuous


def test_factor_base_leaves_out_the_conductor():
    fb = factor_base(-20 * 21**2, 50, 21)
    assert 3 not in fb.primes and 7 not in fb.primes and 2 in fb.primes and 5 in fb.primes


def test_injectivity_check_sees_a_missing_relation():
    # Cl(−4·10007²·…): a generator with the wrong invariant (twice its order) is caught
    D = field(-(10**10 + 19)).discriminant * 9
    G = class_group_subexp(Order(D))
    assert check_injective(D, G.generators, list(G.invariants))
    doubled = list(G.invariants)
    doubled[-1] *= 2
    assert not check_injective(D, G.generators, doubled)


def test_dispatch():
    # beyond the exact method (|D| > 10¹⁴) an imaginary order goes to index calculus
    assert choose_class_group_method(Order(-4 * 9 * (10**15 + 37))) == "subexp"
    assert choose_class_group_method(Order(-4 * 9 * (10**11 + 3))) == "exact"
    with pytest.raises(DomainError, match="real order"):
        class_group_subexp(
            Order(4 * 9 * (10**11 + 3))
        )  # class_group() finds h from the field first


def test_class_of_locates_forms_of_an_order():
    # reference: composition of the generators' powers against the form (reduced forms of D < 0)
    D = field(-(10**10 + 19)).discriminant * 36
    G = class_group_subexp(Order(D))
    E = class_group_imaginary(Order(D))
    assert E.generators and G.invariants == E.invariants
    rng = random.Random(4)
    for g in E.generators:
        F = g.power(rng.randrange(2, 1000))
        H = Form.identity(D)
        for gen, e in zip(G.generators, G.class_of(F), strict=True):
            H = H.compose(gen.power(e))
        assert H.reduced() == F.reduced()
