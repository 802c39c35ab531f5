"""Indefinite binary quadratic forms: reduction, rho, cycles, composition.

Independent checks: the reduced-form condition and equivalence are tested
against brute force over matrices and over all reduced forms; the
composition law against the class counts of ``tests/test_classgroup.py``.
"""

from __future__ import annotations

from math import gcd

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad.core.forms import Form, prime_form
from realquad.core.integers import is_square, isqrt
from realquad.core.linalg import matrix_multiply
from realquad.core.primes import square_root_mod_prime
from realquad.errors import DomainError, InputError


def discriminants(limit: int = 5000):
    return st.integers(5, limit).filter(lambda D: D % 4 in (0, 1) and not is_square(D))


@st.composite
def primitive_forms(draw, D=None):
    """A random primitive form of a random (or given) discriminant."""
    if D is None:
        D = draw(discriminants())
    r = isqrt(D)
    for _ in range(50):
        b = draw(st.integers(-3 * r - 3, 3 * r + 3))
        if (b - D) % 2:
            b += 1
        n = (b * b - D) // 4
        if n == 0:
            continue
        divisors = [a for a in range(1, min(abs(n), 200) + 1) if n % a == 0]
        a = draw(st.sampled_from(divisors)) * draw(st.sampled_from([1, -1]))
        c = n // a
        if gcd(gcd(a, b), c) == 1:
            return Form(a, b, c)
    return Form.identity(D)


def brute_force_reduced(D: int) -> set[Form]:
    """Every reduced form of discriminant D, straight from the definition."""
    r = isqrt(D)
    out = set()
    for b in range(1, r + 1):
        if (b - D) % 2:
            continue
        n = (b * b - D) // 4
        for a in range(1, abs(n) + 1):
            if n % a == 0:
                for sa in (a, -a):
                    # |√D − 2|a|| < b  ⟺  (√D − b)² < 4a² < (√D + b)², tested in floats with margin
                    if abs(D**0.5 - 2 * a) < b:
                        out.add(Form(sa, b, n // sa))
    return out


def test_bad_forms():
    with pytest.raises(DomainError):
        Form(-1, 0, -1)  # negative definite (positive definite forms are accepted)
    with pytest.raises(DomainError):
        Form(1, 2, 1)  # discriminant 0
    with pytest.raises(DomainError):
        Form(1, 2, 0)  # square discriminant 4
    with pytest.raises(InputError):
        Form.from_ab(2, 1, 13)
    with pytest.raises(DomainError):
        Form.identity(16)
    with pytest.raises(InputError):
        prime_form(13, 15)  # not a prime


@pytest.mark.parametrize("D", [5, 8, 12, 13, 60, 316, 892, 1001, 2021])
def test_reduced_test_matches_definition(D):
    # brute force over the defining inequalities (floats are exact enough here: D < 10⁴)
    reduced = brute_force_reduced(D)
    assert all(F.is_reduced() for F in reduced)
    # rho permutes the reduced forms; the union of cycles is all of them
    seen: set[Form] = set()
    for F in reduced:
        if F not in seen:
            cyc = F.cycle()
            assert len(cyc) % 2 == 0
            seen.update(cyc)
    assert seen == reduced


@given(primitive_forms())
@example(Form(1, 0, -79))
@example(Form(1_000_003, 2_000_001, -999_999))
def test_reduce_matrix(F):
    G, M = F.reduce()
    assert G.is_reduced()
    assert M[0] * M[3] - M[1] * M[2] == 1
    assert F.act(M) == G
    assert G == F.reduced()


@given(primitive_forms())
def test_rho_matrix(F):
    G, M = F.rho()
    assert F.act(M) == G
    assert G.discriminant == F.discriminant


@given(st.data())
def test_composition_associative_and_class_respecting(data):
    D = data.draw(discriminants(3000))
    F, G, H = (data.draw(primitive_forms(D)) for _ in range(3))
    left = F.compose(G).compose(H)
    right = F.compose(G.compose(H))
    assert left.equivalent(right) is not None
    # respects equivalence: replacing F by an equivalent form keeps the class
    F2 = F.act((2, 1, 1, 1)) if F.act((2, 1, 1, 1)).is_primitive() else F
    assert F2.compose(G).equivalent(F.compose(G)) is not None
    # commutative, identity, inverse
    assert F.compose(G).equivalent(G.compose(F)) is not None
    assert F.compose(Form.identity(D)).equivalent(F) is not None
    assert F.compose(F.inverse()).equivalent(Form.identity(D)) is not None


@given(st.data())
def test_nucomp_agrees_with_dirichlet(data):
    D = data.draw(discriminants(10**9))
    F = data.draw(primitive_forms(D))
    G = data.draw(primitive_forms(D))
    N = F.nucomp(G)
    assert N.discriminant == D
    assert N.equivalent(F.compose(G)) is not None


@given(st.data())
def test_power(data):
    D = data.draw(discriminants(3000))
    F = data.draw(primitive_forms(D))
    k = data.draw(st.integers(-6, 6))
    expected = Form.identity(D)
    for _ in range(abs(k)):
        expected = expected.compose(F if k > 0 else F.inverse())
    assert F.power(k).equivalent(expected) is not None


def test_equivalence_brute_force():
    # every pair of reduced forms of D = 316 (Q(√79)): equivalent exactly when in one cycle
    reduced = sorted(brute_force_reduced(316), key=lambda f: (f.a, f.b))
    for F in reduced:
        cyc = set(F.cycle())
        for G in reduced:
            M = F.equivalent(G)
            assert (M is not None) == (G in cyc)
            if M is not None:
                assert F.act(M) == G
                assert matrix_multiply(M, (1, 0, 0, 1)) == M


@given(
    st.integers(3, 2000).filter(lambda p: all(p % q for q in range(2, isqrt(p) + 1))),
    st.integers(0, 10**6),
)
def test_square_root_mod_prime(p, n):
    t = square_root_mod_prime(n, p)
    squares = {x * x % p for x in range(p)} if p < 2000 else set()
    if t is None:
        assert n % p not in squares
    else:
        assert t * t % p == n % p


@pytest.mark.parametrize("D", [5, 8, 12, 13, 17, 21, 28, 40, 45, 60, 85, 316, 1001])
def test_prime_forms(D):
    for p in (2, 3, 5, 7, 11, 13):
        F = prime_form(D, p)
        if F is not None:
            assert F.discriminant == D and F.a == p and F.is_primitive()
        elif D % p:
            # no form: p inert (brute-force residue test)
            assert all((b * b - D) % (4 * p) for b in range(2 * p))


@given(
    st.integers(-(10**30), 10**30), st.integers(-(10**30), 10**30), st.integers(-(10**30), 10**30)
)
def test_fuzz_constructor(a, b, c):
    # any integer triple: a valid indefinite or positive definite form, or one clear realquad error
    from realquad.errors import RealquadError

    try:
        F = Form(a, b, c)
    except RealquadError:
        return
    assert F.discriminant > 0 or F.a > 0
    if F.is_primitive() and a:
        G, M = F.reduce()
        assert F.act(M) == G and G.is_reduced()


@given(st.text(max_size=12), st.text(max_size=12))
def test_fuzz_from_ab(a, b):
    from realquad.errors import RealquadError

    try:
        F = Form.from_ab(a, b, 316)
    except RealquadError:
        return
    assert F.discriminant == 316
