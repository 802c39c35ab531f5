"""Positive definite forms (D < 0): reduction, equivalence, composition and NUCOMP against brute force."""

from __future__ import annotations

from math import gcd

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad.core.forms import Form, definite_reduce_with_matrix, prime_form
from realquad.errors import DomainError
from tests.classgroup.test_imaginary import brute_compose, brute_reduce, brute_reduced_forms


def _is_reduced_by_definition(a: int, b: int, c: int) -> bool:
    # Cohen, Def. 5.3.2: |b| ≤ a ≤ c, and b ≥ 0 if |b| = a or a = c
    return abs(b) <= a <= c and not (b < 0 and (abs(b) == a or a == c))


def _det(M):
    return M[0] * M[3] - M[1] * M[2]


@st.composite
def definite_forms(draw, size=10**6):
    """A random positive definite form (a, b, c): a, c > 0 with b² < 4ac."""
    a = draw(st.integers(1, size))
    c = draw(st.integers(1, size))
    bound = 2 * int((a * c) ** 0.5)
    b = draw(st.integers(-bound, bound))
    if b * b >= 4 * a * c:
        b = 0
    return a, b, c


@given(definite_forms())
@example((3, 10, 9))
@example((2**62, 2**31 - 1, 2**62 + 1))
@example((2**63 - 1, 2**32, 2**63 - 1))
def test_reduce_gives_the_reduced_form_and_its_matrix(f):
    F = Form(*f)
    G, M = F.reduce()
    assert _det(M) == 1 and F.act(M) == G
    assert _is_reduced_by_definition(G.a, G.b, G.c) and G.is_reduced()
    assert (G.a, G.b, G.c) == brute_reduce(f)  # brute force: Gauss reduction step by step
    assert F.reduced() == G


def test_is_reduced_matches_the_definition():
    for D in range(-3, -400, -1):
        if D % 4 not in (0, 1):
            continue
        for a in range(1, 15):
            for b in range(-a - 2, a + 3):
                if (b * b - D) % (4 * a) == 0:
                    c = (b * b - D) // (4 * a)
                    assert Form(a, b, c).is_reduced() == _is_reduced_by_definition(a, b, c)


def test_one_reduced_form_per_class():
    # brute force: equivalent forms reach the same reduced form, and F·M is equivalent to F
    for D in (-23, -56, -71, -84, -420):
        for f in brute_reduced_forms(D):
            F = Form(*f)
            for M in [(1, 1, 0, 1), (2, 1, 1, 1), (3, -1, -2, 1), (5, 7, 2, 3)]:
                H = F.act(M)
                assert H.reduced() == F
                N = H.equivalent(F)
                assert N is not None and H.act(N) == F


def test_inequivalent_forms_have_no_matrix():
    forms = [Form(*f) for f in brute_reduced_forms(-420)]
    for F in forms:
        for G in forms:
            assert (F.equivalent(G) is not None) == (F == G)


def test_identity_and_prime_forms():
    # principal form (1, b, c), b = D mod 2 (Cox, §2.A)
    assert Form.identity(-4) == Form(1, 0, 1) and Form.identity(-3) == Form(1, 1, 1)
    assert Form.identity(-56) == Form(1, 0, 14) and Form.identity(-23) == Form(1, 1, 6)
    for D in (-20, -23, -56, -163, -4 * 10**9 - 28):
        for p in (2, 3, 5, 7, 11, 13, 41):
            F = prime_form(D, p)
            if F is None:
                continue
            assert F.a == p and F.discriminant == D and F.is_primitive()


def test_bad_definite_forms():
    with pytest.raises(DomainError, match="negative definite"):
        Form(-2, 1, -3)
    with pytest.raises(DomainError):
        Form(2, 1, 3).rho()
    with pytest.raises(DomainError):
        Form(2, 1, 3).negative()
    with pytest.raises(DomainError):
        list(Form(2, 1, 3).cycle_matrices())
    with pytest.raises(DomainError):
        Form(2, 1, 3).compose(Form(1, 1, 1))  # different discriminants


def test_reduction_matrix_of_the_doc_example():
    (a, b, c), M = definite_reduce_with_matrix(3, 10, 9)
    assert (a, b, c) == (1, 0, 2) and Form(3, 10, 9).act(M) == Form(1, 0, 2)


@st.composite
def class_elements(draw):
    """Three primitive forms of one discriminant D < 0 (random reduced forms)."""
    n = draw(st.integers(20, 3000))
    D = -n if -n % 4 in (0, 1) else -4 * n
    forms = brute_reduced_forms(D)
    pick = st.sampled_from(forms)
    return D, draw(pick), draw(pick), draw(pick)


@given(class_elements())
def test_composition_agrees_with_united_forms(data):
    # brute force: Dirichlet composition by united forms (Cox, Lemma 3.2), searched in the test
    _, f, g, _ = data
    F, G = Form(*f), Form(*g)
    want = brute_compose(f, g)
    assert (F.compose(G).a, F.compose(G).b, F.compose(G).c) == want
    N = F.nucomp(G)
    assert (N.a, N.b, N.c) == want


@given(class_elements())
def test_composition_is_associative_and_commutative(data):
    _, f, g, k = data
    F, G, K = Form(*f), Form(*g), Form(*k)
    assert F.compose(G).compose(K) == F.compose(G.compose(K))
    assert F.nucomp(G).nucomp(K) == F.nucomp(G.nucomp(K))
    assert F.compose(G) == G.compose(F)
    assert F.compose(F.inverse()) == Form.identity(F.discriminant)


@given(st.integers(10**20, 10**40), st.integers(0, 10**6))
def test_nucomp_agrees_with_composition_for_large_discriminants(n, k):
    D = -(4 * n + 3) if n % 2 else -4 * n - 4
    ps = [p for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31) if prime_form(D, p) is not None]
    if not ps:
        return
    F = prime_form(D, ps[k % len(ps)]).power(k + 1)
    G = prime_form(D, ps[-1]).power(2 * k + 3)
    assert F.nucomp(G) == F.compose(G)
    assert F.nucomp(F) == F.compose(F)
    assert gcd(gcd(F.a, F.b), F.c) == 1


def test_power_reaches_the_identity_at_the_class_number():
    # h(−23) = 3, h(−56) = 4 (OEIS A006641)
    F = prime_form(-23, 2)
    assert F.power(3) == Form.identity(-23) and F.power(-1) == F.inverse().reduced()
    G = prime_form(-56, 3)
    assert G.power(4) == Form.identity(-56) and G.power(2) != Form.identity(-56)
