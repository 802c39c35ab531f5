"""Class groups by index calculus against the exact and baby-step giant-step methods, and the GRH interval."""

from __future__ import annotations

import math
import random
import sqlite3

import gmpy2
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import BACKEND
from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.imaginary import class_group_imaginary
from realquad.classgroup.subexp import check_relation, class_group_subexp
from realquad.core.forms import Form, prime_form
from realquad.core.lfunction import class_number_interval
from realquad.core.orders import Order, field
from realquad.errors import DomainError, InputError
from realquad.relations.store import RelationStore
from realquad.relations.system import MIN_DISCRIMINANT
from tests.classgroup.test_imaginary import is_fundamental
from tests.markers import HEAVY


def _order(D: int) -> Form:
    return Form.identity(D).reduced()


def _assert_group(G, D: int) -> None:
    """The generators have exactly the orders of the invariants (composition of forms) and
    h = ∏ invariants lies in the GRH interval (Belabas–Friedman bound, core.lfunction)."""
    one = _order(D)
    assert math.prod(G.invariants) == G.class_number
    for F, d in zip(G.generators, G.invariants, strict=True):
        assert F.power(d).reduced() == one
        for p in _small_primes(d):
            assert F.power(d // p).reduced() != one
    iv = class_number_interval(D, G.roots_of_unity, 10**5)
    assert iv.contains(G.class_number)
    assert G.proof == "GRH" and G.method.startswith("index calculus")


def _small_primes(d: int) -> list[int]:
    return [p for p in (2, 3, 5, 7, 11, 13) if d % p == 0]


@settings(max_examples=25 if BACKEND == "compiled" else 3, deadline=None)
@given(st.integers(min_value=10**10, max_value=10**12))
def test_agrees_with_the_exact_method(n):
    # the exact method (one reduced form per class, unconditional) on random fields 10¹⁰ … 10¹²
    D = field(-n).discriminant
    if -D < MIN_DISCRIMINANT:
        return
    G = class_group_subexp(Order(D), seed=n % 1000)
    E = class_group_imaginary(Order(D))
    assert (G.class_number, G.invariants) == (E.class_number, E.invariants)
    _assert_group(G, D)


@HEAVY
@pytest.mark.parametrize("digits", [16, 20, 24])
def test_agrees_with_baby_step_giant_step(digits):
    # baby-step giant-step with the class number formula (a different algorithm under GRH)
    rng = random.Random(digits)
    for _ in range(3):
        D = field(-rng.randrange(10**digits, 10 ** (digits + 1))).discriminant
        G = class_group_subexp(Order(D))
        B = class_group(Order(D), method="bsgs")
        assert (G.class_number, G.invariants) == (B.class_number, B.invariants), D
        _assert_group(G, D)


@HEAVY
def test_non_cyclic_groups():
    # discriminants with many prime factors: 2-rank t − 1 by genus theory (Gauss), so Cl is not cyclic
    for D in (
        -4 * 3 * 5 * 7 * 11 * 13 * 17 * 19 * 23 * 10007,
        -(3 * 5 * 7 * 11 * 13 * 17 * 19 * 23 * 29 * 31),
    ):
        if not is_fundamental(D):
            D = field(D).discriminant
        G = class_group_subexp(Order(D))
        E = class_group_imaginary(Order(D))
        assert (G.class_number, G.invariants) == (E.class_number, E.invariants)
        assert len(G.invariants) >= 5
        _assert_group(G, D)


def test_relations_hold_by_composition():
    D = field(-(10**14) - 31).discriminant
    fb_checks = 0
    from realquad.relations.collect import Collector, sieve_parameters
    from realquad.relations.factor_base import factor_base

    fb = factor_base(D, 2000)
    c = Collector(fb, sieve_parameters(D, 2000), seed=5)
    rels = next(c.rounds())
    for rel in rels[:40]:
        assert check_relation(D, rel)
        fb_checks += 1
    assert fb_checks > 10


def test_refuses_what_it_cannot_do():
    with pytest.raises(DomainError, match="real order"):
        class_group_subexp(
            Order(4 * 9 * 10**11 + 4 * 9 * 7)
        )  # conductor 3 (imaginary: test_subexp_orders)
    with pytest.raises(DomainError, match="10¹⁰"):
        class_group_subexp(Order(-(10**6) - 3))
    with pytest.raises(DomainError, match="10¹⁰"):
        class_group(field(10**6 + 3), method="subexp")
    with pytest.raises(InputError, match="subexp"):
        class_group(-20, workers=2)


def test_auto_chooses_index_calculus_for_large_fields():
    assert choose_class_group_method(Order(-(10**13) - 3)) == "exact"
    assert choose_class_group_method(field(-(10**19) - 3)) == "bsgs"
    p = gmpy2.next_prime(10**30)
    while p % 4 != 3:
        p = gmpy2.next_prime(p)
    assert choose_class_group_method(Order(-int(p))) == "subexp"


def test_relation_file_resumes(tmp_path):
    # a run saves every relation; a second run with the same file starts from them
    D = field(-(10**18) - 3).discriminant
    path = tmp_path / "rel.sqlite"
    G = class_group_subexp(Order(D), relations_file=str(path))
    with RelationStore(path, D, _bound(D)) as store:
        saved = store.relations()
    assert saved
    H = class_group_subexp(Order(D), relations_file=str(path))
    assert (G.class_number, G.invariants) == (H.class_number, H.invariants)
    with RelationStore(path, D, _bound(D)) as store:
        assert len(store.relations()) >= len(saved)
    with pytest.raises(InputError, match="belongs to D"):
        class_group_subexp(Order(field(-(10**18) - 11).discriminant), relations_file=str(path))
    bad = tmp_path / "bad.sqlite"
    bad.write_bytes(b"not a database at all" * 100)
    with pytest.raises(InputError, match="not a relation file"):
        class_group_subexp(Order(D), relations_file=str(bad))


def test_a_partial_relation_file_is_whole_batches(tmp_path):
    # what a killed run leaves: only complete batches (one transaction each); a resume finishes
    D = field(-(10**18) - 3).discriminant
    path = tmp_path / "rel.sqlite"
    class_group_subexp(Order(D), relations_file=str(path))
    with sqlite3.connect(path) as db:
        total = db.execute("SELECT count(*) FROM relations").fetchone()[0]
        db.execute("DELETE FROM relations WHERE rowid > ?", (total // 3,))
    H = class_group_subexp(Order(D), relations_file=str(path))
    E = class_group_imaginary(Order(D)) if -D <= 10**14 else class_group(Order(D), method="bsgs")
    assert H.class_number == E.class_number


def _bound(D: int) -> int:
    from realquad.core.lfunction import generating_bound

    return generating_bound(D)


def _element_order(coords: list[int], invariants: list[int]) -> int:
    return math.lcm(1, *(d // math.gcd(c, d) for c, d in zip(coords, invariants, strict=True)))


@settings(max_examples=10 if BACKEND == "compiled" else 2, deadline=None)
@given(st.integers(min_value=10**10, max_value=10**12), st.integers(min_value=1, max_value=10**9))
def test_class_of_locates_forms(n, e):
    # the class of P^e for a prime form P: its order in the group agrees with the exact method's
    # table (one reduced form per class), and class_of is additive on products
    D = field(-n).discriminant
    if -D < MIN_DISCRIMINANT:
        return
    G = class_group_subexp(Order(D))
    E = class_group_imaginary(Order(D))
    # the first two odd primes that split or ramify (the fixed lists before could all be inert)
    P, Q = [F for F in (prime_form(D, p) for p in range(3, 2000, 2) if gmpy2.is_prime(p)) if F][:2]
    F = P.power(e)
    assert _element_order(G.class_of(F), G.invariants) == _element_order(
        E.class_of(F), E.invariants
    )
    total = [
        (x + y) % d for x, y, d in zip(G.class_of(F), G.class_of(Q), G.invariants, strict=True)
    ]
    assert G.class_of(F.compose(Q)) == total
    assert G.is_principal(F.power(G.class_number)) and G.is_narrowly_principal(Form.identity(D))
    with pytest.raises(DomainError, match="discriminant"):
        G.class_of(Form(1, 1, 1))
