"""Relations of the sub-exponential method: checked by composition of forms and by brute force."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import BACKEND, COMPILED, kernels, pure
from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.core.lfunction import bach_bound, generating_bound
from realquad.core.orders import field
from realquad.relations.collect import Collector, sieve_parameters
from realquad.relations.factor_base import factor_base, prime_b
from realquad.relations.families import family, sieve_inputs
from realquad.relations.smooth import Relation, relation_at


def holds(D: int, rel: Relation) -> bool:
    """Whether ∏ P_p^{e_p} is principal: composition and reduction (D < 0), the exact class
    group's principal test (D > 0, wide group: n and −n are norms of ideals of one class)."""
    F = Form.identity(D)
    for p, e in rel.exponents.items():
        b = prime_b(D, p)
        P = Form._raw(p, b, (b * b - D) // (4 * p))
        F = F.compose(P.power(e) if e > 0 else P.inverse().power(-e))
    if D < 0:
        return F.reduced() == Form.identity(D).reduced()
    return class_group(D, method="exact").is_principal(F)


def _disc(d: int) -> int:
    return field(d).discriminant


def odd_split(fb):
    return [p for p, r in zip(fb.primes, fb.ramified, strict=True) if p > 2 and not r]


@pytest.mark.parametrize(
    "d", [-(10**6) - 19, -(10**8) - 7, -2 * (10**7 + 1), 10**6 + 3, 10**8 + 41, 3 * 10**5 + 7]
)
def test_every_smooth_value_of_a_family_gives_a_true_relation(d):
    # every x in a window, every polynomial of the family: the relation found holds in Cl
    D = _disc(d)
    fb = factor_base(D, 80)
    fam = family(fb, odd_split(fb)[-4:-1])
    assert all((b * b - D) % (4 * fam.a) == 0 for b in fam.bs)
    assert len(set(fam.bs)) == len(fam.bs) == 4
    found = 0
    for k in range(len(fam.bs)):
        for x in range(-200, 200):
            rel = relation_at(fb, fam, k, x, 10**4)
            if rel is not None:
                found += 1
                assert holds(D, rel), (D, k, x, rel)
                b = fam.bs[k]
                value = abs(fam.a * x * x + b * x + (b * b - D) // (4 * fam.a))
                # the primes of the value (brute force), with the large prime if any
                assert (
                    math.prod(
                        p ** abs(e) for p, e in rel.exponents.items() if p not in fam.a_primes
                    )
                    <= value
                )
    assert found > 10


@pytest.mark.parametrize("d", [-(10**6) - 19, -(10**12) - 11, 10**8 + 41, 10**12 + 39])
def test_sieve_reports_exactly_the_dividing_primes(d):
    # the twin's hits against brute-force divisibility of every candidate value
    D = _disc(d)
    fb = factor_base(D, 200)
    fam = family(fb, odd_split(fb)[-4:-1])
    r1, r2, shifts = sieve_inputs(fb, fam)
    found = pure.sieve_family(fb.primes, fb.logs(1.0), r1, r2, shifts, fam.steps, 400, 14)
    assert found
    for k, x, hits in found:
        b = fam.bs[k]
        value = fam.a * x * x + b * x + (b * b - D) // (4 * fam.a)
        expected = [
            j
            for j, p in enumerate(fb.primes)
            if value % p == 0 and p != 2 and p not in fam.a_primes
        ]
        assert hits == expected
        assert sum(fb.logs(1.0)[j] for j in hits) >= 14


def test_generating_bound_is_a_third_of_bachs():
    # Grenié–Molteni 2022: (4 − 1/(3n)) log² Δ < 4 log² Δ; Bach 1990: 12 log² Δ
    for D in (-(10**20), 10**40, -(10**80)):
        assert generating_bound(D) == int(4 * math.log(abs(D)) ** 2)
        assert 2.9 < bach_bound(D) / generating_bound(D) <= 3.01


def test_factor_base_holds_the_split_and_ramified_primes():
    # Kronecker symbol by sympy's legendre/jacobi against the factor base of D = −(10¹² + 11)
    from sympy import jacobi_symbol

    D = _disc(-(10**12) - 11)
    fb = factor_base(D, 500)
    for p in range(3, 500, 2):
        from sympy import isprime

        if isprime(p):
            assert (p in fb.index) == (jacobi_symbol(D % p, p) != -1)
    for p, b in zip(fb.primes, fb.b, strict=True):
        assert (b * b - D) % (4 * p) == 0 and 0 <= b <= p


@settings(max_examples=15 if BACKEND == "compiled" else 2, deadline=None)
@given(st.integers(min_value=10**8, max_value=10**10), st.sampled_from([-1, 1]))
def test_collected_relations_hold(n, sign):
    # a few families of the real collector (threshold, large primes, signs) for random fields
    if math.isqrt(n) ** 2 == n:  # not a quadratic field
        return
    D = _disc(sign * n)
    if abs(D) < 10**8:
        return
    bound = 300
    fb = factor_base(D, bound)
    collector = Collector(fb, sieve_parameters(D, bound), seed=n % 97)
    rounds = collector.rounds()
    rels = next(rounds) + next(rounds)
    for rel in rels[:4]:
        assert holds(D, rel), (D, rel)


@pytest.mark.skipif("sieve_family" not in COMPILED, reason="compiled kernels not built")
def test_compiled_and_pure_collectors_find_the_same_relations():
    D = _disc(-(10**24) - 7)
    bound = generating_bound(D)
    fb = factor_base(D, bound)
    P = sieve_parameters(D, bound)
    fam = family(fb, Collector(fb, P, seed=3).choose_a())
    r1, r2, shifts = sieve_inputs(fb, fam)
    logs = Collector(fb, P).logs
    args = (fb.primes, logs, r1, r2, shifts, fam.steps, 4096, P.threshold)
    assert kernels.sieve_family(*args) == pure.sieve_family(*args)


@pytest.mark.parametrize("d", [-(10**8) - 7, 10**8 + 41])
def test_two_large_primes_give_true_relations(d):
    # every value of a window whose cofactor splits into two primes beyond the factor base,
    # checked by composition (D < 0) or the exact class group (D > 0); the cofactor's
    # primes are found again by sympy's factorint
    from sympy import factorint

    D = _disc(d)
    fb = factor_base(D, 60)
    fam = family(fb, odd_split(fb)[-4:-1])
    doubles = 0
    for k in range(len(fam.bs)):
        for x in range(-300, 300):
            rel = relation_at(fb, fam, k, x, 5000, double=True)
            if rel is None or rel.large == 1 or len(factorint(rel.large)) == 1:
                continue
            doubles += 1
            p, q = sorted(factorint(rel.large))
            assert fb.bound < p <= q <= 5000 and p in rel.exponents and q in rel.exponents
            assert relation_at(fb, fam, k, x, 5000) is None  # one large prime: refused
            assert holds(D, rel), (D, k, x, rel)
    assert doubles > 5


def test_index_calculus_with_two_large_primes(monkeypatch):
    # the class group of D = −(10³⁰ + 99) with relations of two large primes allowed
    # equals the one found without them (and the exact class number of the GRH interval)
    from realquad.classgroup.subexp import check_relation, class_group_subexp
    from realquad.core.orders import Order
    from realquad.relations import collect
    from realquad.relations.system import index_calculus

    D = -(10**30 + 99)
    plain = class_group_subexp(Order(D))
    monkeypatch.setattr(collect, "DOUBLE_FROM", 25)
    assert collect.sieve_parameters(D, 1000).double
    found = index_calculus(Order(D))
    doubles = [r for r in found.relations if r.large > 1 and len(factorint_(r.large)) == 2]
    assert doubles and all(check_relation(D, r) for r in doubles[:20])
    assert found.quotient.invariants == plain.invariants


def factorint_(n):
    from sympy import factorint

    return factorint(n)
