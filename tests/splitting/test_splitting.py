"""Prime splitting, prime ideals and their classes; genus theory; ideals."""

from __future__ import annotations

from math import gcd

import pytest
from hypothesis import given
from hypothesis import strategies as st
from sympy import isprime
from sympy.functions.combinatorial.numbers import legendre_symbol

from realquad.classgroup import class_group
from realquad.classgroup.genus import assigned_characters, character_value, represented_prime_to
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.core.integers import is_square
from realquad.core.orders import Order, field
from realquad.core.primes import kronecker
from realquad.errors import InputError
from realquad.splitting import decompose_prime, split_primes


def brute_force_represents(F: Form, n: int, box: int = 60) -> bool:
    """Whether F(x, y) = n for some |x|, |y| ≤ box (a one-sided check: found ⇒ represented)."""
    return any(F.value(x, y) == n for x in range(-box, box + 1) for y in range(-box, box + 1))


@pytest.mark.parametrize("D", [5, 8, 12, 13, 40, 45, 60, 316, 892, 1001, 4 * 226])
def test_kinds_against_sympy(D):
    # sympy's legendre_symbol (general-purpose reference) for odd p ∤ D; 2 by D mod 8
    O = Order(D)
    for s in split_primes(O, 200):
        p = s.p
        if D % p == 0:
            assert s.kind == "ramified"
        elif p == 2:
            assert s.kind == ("split" if D % 8 == 1 else "inert")
        else:
            assert s.kind == {1: "split", -1: "inert"}[int(legendre_symbol(D % p, p))]
        assert s.divides_conductor == (O.conductor % p == 0)


@pytest.mark.parametrize("D", [12, 60, 316, 892, 1001, 5460])
def test_representation_and_classes(D):
    G = class_group(D)
    P = Form.identity(D)
    for s in split_primes(D, 150, G):
        if s.divides_conductor or s.kind == "inert":
            assert not s.represented_by_principal
            continue
        # the form listed represents p at (x, y); for a principal class the principal form does
        assert s.form is not None and s.x is not None and s.y is not None
        assert gcd(s.x, s.y) == 1
        if s.represented_by_principal:
            assert P.value(s.x, s.y) == s.p
            assert s.classes[0] == [0] * len(G.narrow_invariants)
        else:
            assert s.form.value(s.x, s.y) == s.p
            assert s.classes[0] != [0] * len(G.narrow_invariants)
        # ideals: norm p, conjugates in inverse classes
        assert all(i.norm == s.p for i in s.ideals)
        if s.kind == "split":
            a, b = s.classes
            assert all((x + y) % d == 0 for x, y, d in zip(a, b, G.narrow_invariants, strict=True))


def test_represented_by_principal_brute_force():
    # Q(√79), D = 316: the narrowly principal primes are exactly those p = x² + 16xy − 15y²
    # found by a brute-force search of small x, y (independent of the class group)
    P = Form.identity(316)
    for s in split_primes(316, 60):
        if s.kind != "inert" and not s.divides_conductor:
            assert s.represented_by_principal == brute_force_represents(P, s.p), s.p


def test_conductor_primes():
    # D = 45 = 3²·5: 3 divides the conductor; no invertible prime ideal of norm 3 (brute force:
    # no primitive form (3, b, c) of discriminant 45)
    s = decompose_prime(45, 3)
    assert s.divides_conductor and s.ideals == [] and s.field_kind == "inert"
    assert all((b * b - 45) % 12 or gcd(gcd(3, b), (b * b - 45) // 12) > 1 for b in range(6))


def test_bad_primes():
    with pytest.raises(InputError):
        decompose_prime(13, 9)
    with pytest.raises(InputError):
        decompose_prime(13, -3)
    with pytest.raises(InputError):
        split_primes(13, 1)


@given(
    st.integers(5, 20000).filter(lambda D: D % 4 in (0, 1) and not is_square(D)),
    st.integers(2, 500),
)
def test_decompose_property(D, p):
    if not isprime(p):
        return
    s = decompose_prime(D, p)
    assert s.kind == {1: "split", 0: "ramified", -1: "inert"}[kronecker(D, p)]
    if (
        s.form is not None
        and s.x is not None
        and s.y is not None
        and not s.represented_by_principal
    ):
        assert s.form.value(s.x, s.y) == p


# ---------------------------------------------------------------- genus theory


@given(st.integers(5, 20000).filter(lambda D: D % 4 in (0, 1) and not is_square(D)))
def test_genus_counts(D):
    # Gauss: 2^(μ−1) genera, principal genus = squares, so the 2-rank of Cl⁺ is μ − 1
    G = class_group(D)
    g = G.genus
    mu = len(g.characters)
    assert g.number_of_genera == 2 ** (mu - 1) == 2**g.two_rank
    assert g.classes_per_genus * g.number_of_genera == G.narrow_class_number


@pytest.mark.parametrize("D", [60, 316, 1365 * 4, 5460, 85, 136])
def test_genus_characters_are_class_functions(D):
    G = class_group(D)
    names = assigned_characters(D)
    for forms in G.narrow_classes():
        values = set()
        for F in forms[:4]:
            m = represented_prime_to(F, 2 * D)
            values.add(tuple(character_value(n, m) for n in names))
        assert len(values) == 1


def test_fundamental_two_rank():
    # for a fundamental discriminant, μ = number of prime divisors of D (Gauss)
    for d, t in [(3, 2), (5, 1), (15, 3), (105, 3), (1365, 4), (2, 1), (6, 2)]:
        O = field(d)
        assert len(assigned_characters(O.discriminant)) == t


# ---------------------------------------------------------------- ideals


def test_ideals():
    P = Ideal.from_form(Form(3, 2, -26))
    assert P.norm == 3
    Q = P * P.conjugate()
    assert Q.norm == 9 and Q.a == 1
    R = P * P
    assert R.norm == 9 and R.form().equivalent(Form(3, 2, -26).compose(Form(3, 2, -26))) is not None
    assert Ideal.of_order(316).norm == 1
    big = Ideal.from_form(
        Form(3, 2, -26)
        .compose(Form(5, 4, -15), reduce=False)
        .compose(Form(7, 6, -10), reduce=False)
    )
    small = big.reduced()
    assert small.norm**2 < 316 and small.form().equivalent(big.form()) is not None
    with pytest.raises(Exception):  # noqa: B017
        Ideal(316, 1, 3, 1)


@given(st.sampled_from([316, 892, 5460, 1001]), st.integers(2, 60), st.integers(2, 60))
def test_ideal_norm_multiplicative(D, p, q):
    from realquad.core.forms import prime_form

    if not (isprime(p) and isprime(q)):
        return
    F, G = prime_form(D, p), prime_form(D, q)
    if F is None or G is None:
        return
    I, J = Ideal.from_form(F), Ideal.from_form(G)
    assert (I * J).norm == I.norm * J.norm


@given(st.sampled_from([5, 13, 316, 1300, 60060]), st.integers(10**9, 10**12))
def test_large_primes(D, n):
    # primes far above √D: the prime form still reduces and represents p (brute-force check of F(x, y))
    from sympy import nextprime

    p = int(nextprime(n))
    s = decompose_prime(D, p)
    assert s.kind == {1: "split", 0: "ramified", -1: "inert"}[kronecker(D, p)]
    if s.kind != "inert":
        F = Form.identity(D) if s.represented_by_principal else s.form
        assert F is not None and F.value(s.x, s.y) == p


def test_classes_of_ideals():
    G = class_group(316)
    P = Ideal.from_form(Form(3, 2, -26))
    assert G.narrow_class_of(P) == G.narrow_class_of(Form(3, 2, -26))
    assert G.is_narrowly_principal(P * P.conjugate())
    from realquad.errors import DomainError

    with pytest.raises(DomainError):
        G.class_of(Form(1, 1, -1))  # discriminant 5, not 316
