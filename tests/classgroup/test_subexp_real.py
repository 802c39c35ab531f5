"""Index calculus for real quadratic fields: class groups (wide and narrow), regulators, units.

Checked against the project's unconditional methods (the cycles of reduced
forms for Cl and Cl⁺, the continued fraction for ε and R), baby-step
giant-step in the infrastructure at sizes the cycles cannot reach, the
GRH interval for h·R (Belabas–Friedman, :mod:`realquad.core.lfunction`),
and exact arithmetic on the unit (x² − dy² = ±1 by expansion, residues
modulo primes).
"""

from __future__ import annotations

import itertools
import random

import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import BACKEND
from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.subexp import class_group_subexp
from realquad.core.forms import Form
from realquad.core.lfunction import hR_interval
from realquad.core.orders import Order, field
from realquad.errors import DomainError, InputError
from realquad.relations.regulator import relation_generator
from realquad.relations.system import MIN_DISCRIMINANT, index_calculus
from realquad.units import choose_method, fundamental_unit, regulator
from realquad.units import subexp as units_subexp
from tests.equations.test_pell import giant_steps_compiled
from tests.markers import HEAVY


def _field_above(n: int) -> Order:
    while True:
        try:
            order = Order.of(n)
        except (DomainError, InputError):  # not a discriminant (n ≡ 2, 3 mod 4, or a square)
            order = None
        if order is not None and order.conductor == 1:
            return order
        n += 1


def _generated(vectors: list[list[int]], steps: list[int], moduli: list[int]) -> int:
    """The size of the subgroup of ``⊕ Z/moduli`` that ``vectors`` generate (``steps``: their orders)."""
    seen = set()
    for ks in itertools.product(*[range(d) for d in steps]):
        seen.add(
            tuple(
                sum(k * v[i] for k, v in zip(ks, vectors, strict=True)) % m
                for i, m in enumerate(moduli)
            )
        )
    return len(seen)


@settings(max_examples=6 if BACKEND == "compiled" else 2, deadline=None)
@given(st.integers(min_value=10**10, max_value=3 * 10**10))
def test_groups_units_and_classes_agree_with_the_cycle_method(n):
    # the cycle method (every reduced form walked, unconditional) and the continued fraction
    order = _field_above(n)
    D = order.discriminant
    S = class_group_subexp(order, seed=n % 997)
    E = class_group(D, method="exact")
    assert (S.class_number, S.narrow_class_number, S.unit_norm) == (
        E.class_number,
        E.narrow_class_number,
        E.unit_norm,
    )
    assert (S.invariants, S.narrow_invariants) == (E.invariants, E.narrow_invariants)
    assert str(S.regulator)[:25] == str(regulator(D, 30, method="cfrac"))[:25]
    assert S.proof == S.unit.proof == "GRH" and S.method.startswith("index calculus")
    assert hR_interval(D, 10**5).contains(S.class_number * float(S.regulator))
    # generators: their classes (located by the exact method) generate Cl and Cl⁺ with those orders
    rng = random.Random(n)
    for narrow in (False, True):
        gens = S.narrow_generators if narrow else S.generators
        invariants = S.narrow_invariants if narrow else S.invariants
        where = E.narrow_class_of if narrow else E.class_of
        moduli = E.narrow_invariants if narrow else E.invariants
        size = S.narrow_class_number if narrow else S.class_number
        assert _generated([where(g) for g in gens], invariants, moduli) == size
        # the class of a random form, found by a smooth form in its coset
        for _ in range(3):
            ks = [rng.randrange(d) for d in invariants]
            F = Form.identity(D)
            for g, k in zip(gens, ks, strict=True):
                F = F.compose(g.power(k)) if k else F
            F = F.reduced()
            if narrow and rng.random() < 0.5:
                F = Form._raw(-F.a, F.b, -F.c)  # times the class of the negative principal form
            found = S.narrow_class_of(F) if narrow else S.class_of(F)
            G = Form.identity(D)
            for g, k in zip(gens, found, strict=True):
                G = G.compose(g.power(k)) if k else G
            assert where(F) == where(G.reduced())


def test_the_unit_is_the_continued_fractions():
    # x² − dy² = ±1 (or ±4) by the expansion, and the same number as the continued fraction's
    for n in (4 * (10**10 + 19), 10**10 + 1001, 2 * 10**10 + 21):
        order = _field_above(n)
        u = fundamental_unit(order, method="subexp")
        v = fundamental_unit(order, method="cfrac")
        assert (u.x, u.y, u.denominator, u.norm) == (v.x, v.y, v.denominator, v.norm)
        assert u.x**2 - order.radicand * u.y**2 == u.norm * u.denominator**2


def test_odd_discriminants_decide_the_denominator_without_expanding():
    # D ≡ 5 (mod 8): ε ∈ Z[√D] or not, from the relations (F₄ = O/2O), against the expansion
    seen = set()
    D = 10**10 + 5
    while len(seen) < 2 or D < 10**10 + 2000:
        D += 8
        order = Order.of(D)
        if order.conductor != 1:
            continue
        found = index_calculus(order, seed=D % 101)
        expected = fundamental_unit(D, method="cfrac").denominator
        assert units_subexp._denominator(found) == expected
        seen.add(expected)
        if len(seen) == 2:
            break


def _no_walk(*args, **kwargs):
    raise ArithmeticError("O not near")


def test_a_unit_kept_as_a_power_product(monkeypatch):
    # when the walk cannot reach O the unit stays a product of relation generators: its
    # norm, logarithm and residues agree with the continued fraction's expanded unit
    monkeypatch.setattr(units_subexp, "exact_principal_at", _no_walk)
    D = 4 * (10**10 + 19)
    u = fundamental_unit(D, method="subexp")
    v = fundamental_unit(D, method="cfrac")
    form = u.compact()
    assert form.size > 50 and form.norm == v.norm == u.norm
    assert mpmath.almosteq(u.regulator(40).value, v.regulator(40).value, 1e-35)
    assert u.digits_from_regulator() == (v.digits, True)
    ex = v.expand()  # (x + y√d)/c; as (U + V√D)/2 with D = 4d: U = 2x/c, V = y/c
    for m in (10**9 + 7, 998_244_353, 2**64, 10**12):
        U, V = 2 * int(ex.x) // int(ex.c), int(ex.y) // int(ex.c)
        assert form.coordinates_modulo(m) == (U % m, V % m)


def test_precise_walk_at_a_small_regulator(monkeypatch):
    # the walk with mpmath distances (forced below its threshold) gives the continued
    # fraction's unit in compact form
    monkeypatch.setattr(units_subexp, "INFRASTRUCTURE_LIMIT", 0)
    D = 4 * (10**10 + 19)
    form = fundamental_unit(D, method="subexp").compact()
    ex = fundamental_unit(D, method="cfrac").expand()
    assert form.size < 50
    assert form.expand() == (2 * int(ex.x) // int(ex.c), int(ex.y) // int(ex.c))


@giant_steps_compiled  # the baby-step giant-step reference at 10³⁰: 40 s on the pure kernels
@pytest.mark.parametrize("k", [30])
def test_units_beyond_10_to_the_12_in_compact_form(k):
    # R ≈ 1.3·10¹⁵: the walk with mpmath distances; the unit agrees with the baby-step
    # giant-step search's (an independent unconditional computation) modulo several moduli
    D = _field_above(10**k + 7).discriminant
    u = fundamental_unit(D, method="subexp")
    v = fundamental_unit(D, method="bsgs")
    form, other = u.compact(), v.compact()
    assert form.size < 80 and form.norm == u.norm == v.norm
    assert mpmath.almosteq(u.regulator(30).value, v.regulator(30).value, 1e-25)
    assert u.regulator(20).value > 10**12
    for m in (10**9 + 7, 2**61 - 1, 2**40, 3**25 * 5**10):
        assert form.coordinates_modulo(m) == other.coordinates_modulo(m)


@HEAVY
@pytest.mark.parametrize("k", [16, 20])
def test_agrees_with_baby_step_giant_step(k):
    # the infrastructure's baby-step giant-step (its own GRH certificate) at sizes past the cycles
    order = _field_above(10**k + 7)
    S = class_group_subexp(order)
    B = class_group(order.discriminant, method="bsgs")
    assert (S.invariants, S.narrow_invariants, S.unit_norm) == (
        B.invariants,
        B.narrow_invariants,
        B.unit_norm,
    )
    assert str(S.regulator)[:20] == str(B.regulator)[:20]


def test_every_generator_generates_its_relation_ideal():
    # |N(ρ)| = ∏ p^{r_p} for every relation's generator (the ideal norms), exactly
    found = index_calculus(Order.of(4 * (10**10 + 19)))
    fb = found.factor_base
    for rel in found.relations[:300]:
        rho, negative = relation_generator(fb, rel)
        norm = rho.norm()
        expected = 1
        for p, e in rel.exponents.items():
            expected *= p**e if e > 0 else 1
        denominator = 1
        for p, e in rel.exponents.items():
            denominator *= p**-e if e < 0 else 1
        assert abs(norm) * denominator == expected and (norm < 0) == negative


def test_dispatch_and_refusals():
    big = Order.of(10**40 + 121)
    assert choose_class_group_method(big) == "subexp" == choose_method(big)
    assert choose_class_group_method(Order.of(10**16 + 61)) == "bsgs"
    with pytest.raises(DomainError, match="10¹⁰"):
        regulator(61, method="subexp")
    with pytest.raises(DomainError, match="real order"):
        index_calculus(Order(4 * 9 * (10**11 + 3)))  # conductor 3: class_group finds h first
    with pytest.raises(InputError, match="subexp"):
        regulator(4 * 61, workers=2)
    with pytest.raises(DomainError, match="imaginary"):
        fundamental_unit(-(10**12 + 11), method="subexp")
    assert MIN_DISCRIMINANT == 10**10
    assert field(10**10 + 19).discriminant == 4 * (10**10 + 19)


def test_repeated_generators_do_not_crowd_out_the_units():
    # D = 13800466732: the sieve meets the same generators from many polynomials; before repeated
    # relations were left out, every kernel vector gave the unit ±1 and the search never ended
    order = Order.of(13800466732)
    S = class_group_subexp(order, seed=708)
    E = class_group(order.discriminant, method="exact")
    assert (S.invariants, S.narrow_invariants, S.unit_norm) == (
        E.invariants,
        E.narrow_invariants,
        E.unit_norm,
    )
    assert str(S.regulator)[:20] == str(regulator(order.discriminant, 30, method="cfrac"))[:20]


def test_genus_theory_for_discriminants_with_many_prime_factors():
    # Gauss: Cl⁺/(Cl⁺)² ≅ (Z/2)^(t−1) for a fundamental D with t prime discriminant factors;
    # beyond both the cycle method and baby-step giant-step (too many classes for R) here
    for D, t in (
        (8 * 3 * 5 * 7 * 11 * 13 * 17 * 19 * 23 * 29 * 31 * 37 * 43, 13),
        (5 * 13 * 17 * 29 * 37 * 41 * 53 * 61 * 73 * 89, 10),
    ):
        S = class_group_subexp(Order.of(D))
        assert sum(1 for d in S.narrow_invariants if d % 2 == 0) == t - 1
        assert hR_interval(D, 10**5).contains(S.class_number * float(S.regulator))
