"""The principal ideal test from relations, against expansion, baby-step giant-step and the class group.

Outside references: each generator ``ν = (u + v√D)/2`` of moderate size is
expanded and checked in plain integers to lie in ``I = [a, (b + √D)/2]``
(``ν = x·a + v·(b + √D)/2`` with ``x = (u − v·b)/(2a)`` an integer) with norm
``(u² − Dv²)/4 = ±a`` — together these say ``νO = I``; the answers are compared
with the infrastructure's baby-step giant-step test (an independent method of
the project) and with the class group's order (``P^h`` is principal).
"""

from __future__ import annotations

import random

import mpmath
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from sympy import primerange

from realquad.classgroup import class_group
from realquad.core.forms import Form, prime_form_coefficients
from realquad.core.ideals import Ideal
from realquad.core.orders import Order
from realquad.errors import DomainError, InputError, RealquadError, TooLargeError
from realquad.infrastructure.principal import principal_ideal_test
from realquad.relations.principal import (
    ColumnFactoring,
    PrincipalTest,
    principal_ideal_relations,
)
from realquad.relations.system import index_calculus

#: Fields near 10¹⁰ with h > 1 and regulators near 10⁴ (generators of a few thousand digits).
SMALL = [10000000013, 10000000021, 10000000061, 10000000117]


def ideals(D: int, count: int, seed: int, power: int = 1) -> list[tuple[int, int]]:
    """Random products of prime ideals of small norm, as ``(a, b)`` for ``[a, (b + √D)/2]``."""
    rng = random.Random(seed)
    primes = [p for p in primerange(2, 400) if prime_form_coefficients(D, p)][:25]
    out = []
    for _ in range(count):
        F = Form.identity(D)
        for p in rng.sample(primes, 3):
            F = F.compose(Form(*prime_form_coefficients(D, p)).power(rng.randint(1, 3)))
        F = F.power(power).reduced()
        I = Ideal.from_form(F)
        out.append((I.a, -I.b))
    return out


def check_generator(D: int, a: int, b: int, generator) -> None:
    u, v = generator.expand()
    assert (u - v * b) % (2 * a) == 0  # ν ∈ I
    assert (u * u - D * v * v) % 4 == 0 and abs(u * u - D * v * v) // 4 == a  # |N(ν)| = a


@pytest.fixture(scope="module", params=SMALL)
def small_field(request):
    return request.param, index_calculus(Order(request.param))


def test_generators_expand_into_the_ideal(small_field) -> None:
    D, found = small_field
    h = found.quotient.order
    principal = 0
    tester = PrincipalTest(found)  # one lattice solver for all ten ideals
    for k, (a, b) in enumerate(ideals(D, 6, D, 1) + ideals(D, 4, D + 1, h)):
        test = tester(a, b)
        bsgs = principal_ideal_test(D, a, b)
        assert test.principal == bsgs.principal
        if k >= 6:
            assert test.principal  # P^h
        if test.principal:
            principal += 1
            assert test.proof == "unconditional"
            check_generator(D, a, b, test.generator)
            assert test.generator.norm == bsgs.generator.norm
        else:
            assert test.proof == "GRH" and test.generator is None
    assert principal >= 4


@pytest.mark.parametrize("D", [30000000024800000004389, 300000000001240000000000481])
def test_larger_fields_against_baby_step_giant_step(D: int) -> None:
    """``h = 24`` and ``h = 2`` (both methods); generators differ by a unit: ``log`` mod ``R``."""
    found = index_calculus(Order(D))
    R = found.unit.log
    for a, b in ideals(D, 3, 7) + ideals(D, 3, 8, found.quotient.order):
        test = principal_ideal_relations(found, a, b)
        bsgs = principal_ideal_test(D, a, b)
        assert test.principal == bsgs.principal
        if test.principal:
            assert test.generator.norm == bsgs.generator.norm
            ratio = (test.generator.log(40)[0] - bsgs.generator.log(40)[0]) / R
            assert abs(ratio - mpmath.nint(ratio)) < 1e-20


def test_short_cycles_walk_the_principal_cycle(monkeypatch: pytest.MonkeyPatch) -> None:
    """``D = 10¹⁰ + 1 = 101·3541·27961``, ``R ≈ 12.2``: with no norm taken as smooth the
    ideals' cycles close, and the principal cycle is searched instead."""
    D = 10**10 + 1
    found = index_calculus(Order(D))
    monkeypatch.setattr(ColumnFactoring, "exponents", lambda self, a, B: None)
    h = found.quotient.order
    for a, b in ideals(D, 4, 3) + ideals(D, 4, 4, h):
        test = principal_ideal_relations(found, a, b)
        assert test.method.startswith("the ideal's cycle closes")
        assert test.proof == "unconditional"
        assert test.principal == principal_ideal_test(D, a, b).principal
        if test.principal:
            check_generator(D, a, b, test.generator)
    with pytest.raises(TooLargeError):  # a long cycle: no smooth norm within the steps allowed
        principal_ideal_relations(
            index_calculus(Order(SMALL[0])), *ideals(SMALL[0], 1, 5)[0], max_steps=50
        )


def test_class_group_answers_from_its_relations() -> None:
    D = SMALL[1]
    G = class_group(D, method="subexp")
    E = class_group(D, method="exact")
    P = Form(*next(f for p in primerange(2, 99) if (f := prime_form_coefficients(D, p))))
    for k in range(1, 8):
        F = P.power(k)
        test, exact = G.principal_generator(F), E.principal_generator(F)
        assert test.principal == exact.principal == E.is_principal(F)
        assert test.method != exact.method
        if test.principal:
            I = Ideal.from_form(F)
            check_generator(D, I.a, -I.b, test.generator)
    with pytest.raises(DomainError):
        G.principal_generator(Ideal(D, 2, P.a, P.b))  # 2·P: not primitive
    with pytest.raises(DomainError):
        class_group(-(10**10 + 19)).principal_generator(Form.identity(-(10**10 + 19)))


def test_bad_ideals_are_refused() -> None:
    D = SMALL[0]
    found = index_calculus(Order(D))
    with pytest.raises(InputError):
        principal_ideal_relations(found, 0, 1)
    with pytest.raises(DomainError):
        principal_ideal_relations(found, 7, 2)  # 28 does not divide 4 − D
    imaginary = index_calculus(Order(-(10**10 + 19)))
    with pytest.raises(DomainError):
        principal_ideal_relations(imaginary, 1, 1)


@settings(max_examples=60, deadline=None)
@given(st.integers(-(10**6), 10**30), st.integers(-(10**30), 10**30))
def test_any_pair_gives_an_answer_or_a_clear_error(a: int, b: int) -> None:
    if not _FOUND:
        _FOUND["f"] = index_calculus(Order(SMALL[0]))
    found = _FOUND["f"]
    try:
        test = principal_ideal_relations(found, a, b)
    except RealquadError:
        return
    if test.principal:
        assert test.generator.norm in (a, -a)


_FOUND: dict = {}
