"""The operations on classes of forms against brute force, published values and each other.

Brute force here means: enumerating the reduced forms of a discriminant from the
definition, searching small matrices of SL₂(Z) and GL₂(Z), searching the
values a form takes in a box, and solving t² − Du² = 4 by trying u = 1, 2, ….
"""

from __future__ import annotations

from functools import cache
from itertools import product
from math import gcd, isqrt

import pytest
from hypothesis import assume, example, given
from hypothesis import strategies as st

from realquad.core.forms import Form, prime_form
from realquad.core.linalg import matrix_multiply
from realquad.errors import DomainError, InputError, TooLargeError
from realquad.formclasses import (
    compose_forms,
    element_order,
    equivalence,
    form_class,
    form_cycle,
    form_power,
    reduce_form,
)

# -- brute force -----------------------------------------------------------------------------


def definite_reduced_forms(D: int) -> list[Form]:
    """Every primitive reduced positive definite form of discriminant D < 0, from the definition."""
    out = []
    for a in range(1, isqrt(-D // 3) + 1):
        for b in range(-a + 1, a + 1):
            if (b * b - D) % (4 * a):
                continue
            c = (b * b - D) // (4 * a)
            if c < a or (c == a and b < 0) or gcd(gcd(a, b), c) != 1:
                continue
            out.append(Form(a, b, c))
    return out


def indefinite_reduced_forms(D: int) -> list[Form]:
    """Every primitive reduced indefinite form of discriminant D > 0: |√D − 2|a|| < b < √D."""
    out = []
    for b in range(1, isqrt(D) + 1):
        if b * b >= D or (b * b - D) % 4:
            continue
        for a in range(-D, D + 1):
            if a == 0 or (b * b - D) % (4 * a):
                continue
            # |√D − 2|a|| < b  ⇔  (√D − b)/2 < |a| < (√D + b)/2, compared exactly on squares
            lo, hi = 2 * abs(a) - b, 2 * abs(a) + b
            if (lo < 0 or lo * lo < D) and hi * hi > D:
                c = (b * b - D) // (4 * a)
                if gcd(gcd(a, b), c) == 1:
                    out.append(Form(a, b, c))
    return out


def minimum(F: Form) -> int:
    """The least value of a positive definite form at (x, y) ≠ (0, 0), by brute force over y.

    Every point with F(x, y) ≤ F(1, 0) has |y| ≤ √(4a·a/|D|) (F ≥ |D|y²/4a); for each y,
    F is a convex parabola in x, least at one of the two integers around −by/2a.
    """
    a, b, D = F.a, F.b, -F.discriminant
    best = a
    for y in range(-(isqrt(4 * a * a // D) + 1), isqrt(4 * a * a // D) + 2):
        x0 = (-b * y) // (2 * a)
        best = min([best] + [F.value(x, y) for x in (x0, x0 + 1) if x or y])
    return best


def _box(F: Form, n: int) -> list[tuple[int, int]]:
    """Every point where the positive definite F can be ≤ n: F ≥ |D|y²/4a and F ≥ |D|x²/4c."""
    D = -F.discriminant
    bx, by = isqrt(4 * F.c * n // D) + 1, isqrt(4 * F.a * n // D) + 1
    return list(product(range(-bx, bx + 1), range(-by, by + 1)))


def represents(F: Form, n: int) -> bool:
    """Whether the positive definite form F takes the value n (every point that can, searched)."""
    return any(F.value(x, y) == n for x, y in _box(F, n))


def small_matrix(F: Form, G: Form, bound: int, det: int) -> bool:
    """Whether some [[α, β], [γ, δ]] of determinant det with entries in [−bound, bound] carries F to G."""
    r = range(-bound, bound + 1)
    return any(
        al * de - be * ga == det and F.act((al, be, ga, de)) == G
        for al, be, ga, de in product(r, repeat=4)
    )


@cache
def least_norm_one_unit(D: int) -> tuple[int, int]:
    """The least t, u > 0 with t² − Du² = 4, by trying u = 1, 2, …."""
    for u in range(1, 10**6):
        t2 = D * u * u + 4
        t = isqrt(t2)
        if t * t == t2:
            return t, u
    raise AssertionError(f"no solution with u < 10⁶ for D = {D}: pick a smaller D")


definite_discriminants = st.integers(3, 400).map(lambda n: -n).filter(lambda D: D % 4 in (0, 1))


def _word(steps: list[int]) -> tuple[int, int, int, int]:
    """∏ Tᵏ·S over the steps, T = [[1, 1], [0, 1]], S = [[0, −1], [1, 0]]: any matrix of SL₂(Z)."""
    M = (1, 0, 0, 1)
    for k in steps:
        M = matrix_multiply(matrix_multiply(M, (1, k, 0, 1)), (0, -1, 1, 0))
    return M


sl2 = st.lists(st.integers(-4, 4), max_size=4).map(_word)


# -- reduction -------------------------------------------------------------------------------


@given(D=definite_discriminants, data=st.data())
def test_definite_reduction_matches_the_minimum(D: int, data: st.DataObject) -> None:
    forms = definite_reduced_forms(D)
    G = data.draw(st.sampled_from(forms))
    F = G.act(data.draw(sl2))
    r = reduce_form(F)
    al, be, ga, de = r.matrix
    assert al * de - be * ga == 1 and F.act(r.matrix) == r.reduced
    assert r.reduced == G  # one reduced form per class (Cohen, §5.3)
    assert r.reduced.a == minimum(F)  # a reduced form's a is the least value (brute force)


@given(D=st.integers(5, 1000).filter(lambda D: D % 4 in (0, 1) and isqrt(D) ** 2 != D))
def test_indefinite_reduction_lands_in_the_enumerated_forms(D: int) -> None:
    forms = set(indefinite_reduced_forms(D))
    F = Form.identity(D).act((2, 7, 1, 4))
    r = reduce_form(F)
    assert r.reduced in forms and F.act(r.matrix) == r.reduced
    assert r.proof == "unconditional" and "rho" in r.method


# -- equivalence -----------------------------------------------------------------------------


@given(
    F=st.tuples(st.integers(-40, 40), st.integers(-40, 40), st.integers(-40, 40)),
    M=sl2,
)
@example(F=(1, 0, -3), M=(2, 3, 1, 2))
def test_a_transformed_form_is_found_equivalent(F: tuple[int, int, int], M: tuple) -> None:
    a, b, c = F
    D = b * b - 4 * a * c
    assume(D > 0 and isqrt(D) ** 2 != D or D < 0 and a > 0)
    F0 = Form(a, b, c)
    G = F0.act(M)
    e = equivalence(F0, G)
    assert e.properly_equivalent and F0.act(e.matrix) == G
    if e.improperly_equivalent:  # then the form is improperly equivalent to itself
        al, be, ga, de = e.improper_matrix
        assert al * de - be * ga == -1 and F0.act(e.improper_matrix) == G


@pytest.mark.parametrize("D", [-23, -47, -56, -71, -84, -20, -39])
def test_definite_equivalence_agrees_with_a_matrix_search(D: int) -> None:
    # independent: a reduced pair is equivalent by a matrix with entries ≤ 3 or not at all here
    forms = definite_reduced_forms(D)
    for F, G in product(forms, repeat=2):
        e = equivalence(F, G)
        assert e.properly_equivalent == small_matrix(F, G, 3, 1) == (F == G)
        assert e.improperly_equivalent == small_matrix(F, G, 3, -1)


def test_indefinite_non_equivalence() -> None:
    # x² − 3y² ≡ x² (mod 3) never takes −1 (brute-force residues), so it is not −x² + 3y²
    assert {(x * x - 3 * y * y) % 3 for x in range(3) for y in range(3)} == {0, 1}
    e = equivalence(Form(1, 0, -3), Form(-1, 0, 3))
    assert not e.properly_equivalent and not e.improperly_equivalent and e.matrix is None
    # x² − 2y² takes −1 (1 − 2): it is properly equivalent to −x² + 2y²
    e = equivalence(Form(1, 0, -2), Form(-1, 0, 2))
    assert e.properly_equivalent and Form(1, 0, -2).act(e.matrix) == Form(-1, 0, 2)


def test_equivalence_of_different_discriminants_is_an_answer() -> None:
    e = equivalence(Form(1, 0, 1), Form(1, 0, 2))
    assert not e.properly_equivalent and "different discriminants" in e.reason
    assert e.to_dict()["discriminants"] == [-4, -8]


def test_equivalence_refuses_a_cycle_beyond_the_limit() -> None:
    with pytest.raises(TooLargeError):
        equivalence(Form(1, 0, -(10**12 + 39)), Form(-1, 0, 10**12 + 39), max_forms=100)


# -- composition and powers ------------------------------------------------------------------


@pytest.mark.parametrize(
    ("D", "h"),
    # class numbers h(D) from memory (−3, −4, −7, −8 are among Heegner's class-number-one
    # discriminants; Cox, Primes of the Form x² + ny², §2.A has h(−56) = 4), each also
    # checked by the brute-force count of reduced forms below
    [(-3, 1), (-4, 1), (-7, 1), (-8, 1), (-15, 2), (-20, 2), (-23, 3), (-56, 4), (-71, 7)],
)
def test_composition_makes_a_group_of_the_published_order(D: int, h: int) -> None:
    forms = definite_reduced_forms(D)
    assert len(forms) == h  # brute-force count against the published class number
    identity = Form.identity(D)
    for F in forms:
        assert form_power(F, 0).reduced == identity
        assert form_power(F, h).reduced == identity  # Lagrange
        assert compose_forms(F, F.inverse()).reduced == identity
        for G in forms:
            assert compose_forms(F, G).reduced in forms


def test_x2_plus_14y2() -> None:
    # Cox §2.A: the classes of discriminant −56 are x² + 14y², 2x² + 7y², 3x² ± 2xy + 5y² (Z/4)
    F = Form(3, 2, 5)
    assert [form_power(F, k).reduced for k in range(1, 5)] == [
        Form(3, 2, 5),
        Form(2, 0, 7),
        Form(3, -2, 5),
        Form(1, 0, 14),
    ]


@given(D=definite_discriminants, data=st.data())
def test_the_composite_represents_products(D: int, data: st.DataObject) -> None:
    # Dirichlet composition: F(x₁, y₁)·G(x₂, y₂) is a value of F∘G (brute-force search)
    forms = definite_reduced_forms(D)
    F, G = data.draw(st.sampled_from(forms)), data.draw(st.sampled_from(forms))
    x1, y1, x2, y2 = data.draw(st.tuples(*[st.integers(-3, 3)] * 4))
    m, n = F.value(x1, y1), G.value(x2, y2)
    assume(m and n)
    c = compose_forms(F, G)
    assert represents(c.reduced, m * n) and represents(c.composite, m * n)
    assert c.reduced == compose_forms(F, G, method="nucomp").reduced


@given(D=definite_discriminants, data=st.data())
def test_composition_is_associative_and_commutative(D: int, data: st.DataObject) -> None:
    forms = definite_reduced_forms(D)
    F, G, H = (data.draw(st.sampled_from(forms)) for _ in range(3))
    left = compose_forms(compose_forms(F, G).reduced, H).reduced
    right = compose_forms(F, compose_forms(G, H).reduced).reduced
    assert left == right and compose_forms(F, G).reduced == compose_forms(G, F).reduced


def test_indefinite_powers_of_the_prime_form_above_3_in_q_sqrt_79() -> None:
    # h⁺(4·79) = 6 with Cl⁺ cyclic, h(Q(√79)) = 3 (from memory)
    F = prime_form(316, 3)
    principal = Form.identity(316)
    orders = [
        k
        for k in range(1, 7)
        if equivalence(form_power(F, k).reduced, principal).properly_equivalent
    ]
    assert orders == [6]
    nu = compose_forms(F, F, method="nucomp").reduced
    assert equivalence(nu, compose_forms(F, F).reduced).properly_equivalent


def test_composition_refuses_what_has_no_class() -> None:
    with pytest.raises(DomainError, match="primitive"):
        compose_forms(Form(2, 2, 4), Form(1, 0, 3))
    with pytest.raises(DomainError, match="different discriminants"):
        compose_forms(Form(1, 0, 1), Form(1, 0, 2))
    with pytest.raises(InputError):
        compose_forms(Form(1, 0, 1), Form(1, 0, 1), method="gauss")


# -- cycles ----------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("d", "x", "y"),
    # least solutions of x² − dy² = 1, OEIS A002350 (x) and A002349 (y)
    [(2, 3, 2), (3, 2, 1), (13, 649, 180), (29, 9801, 1820), (61, 1766319049, 226153980)],
)
def test_the_principal_cycle_gives_the_least_pell_solution(d: int, x: int, y: int) -> None:
    c = form_cycle(Form(1, 0, -d))  # discriminant 4d: (t + u√(4d))/2 = x + y√d
    assert c.principal and c.unit.to_dict()["x"] == x and c.unit.to_dict()["y"] == y


@given(D=st.integers(5, 90).filter(lambda D: D % 4 in (0, 1) and isqrt(D) ** 2 != D))
def test_cycles_partition_the_reduced_forms_and_units_are_least(D: int) -> None:
    forms = set(indefinite_reduced_forms(D))
    seen: set[Form] = set()
    for F in sorted(forms, key=lambda f: (f.a, f.b)):
        if F in seen:
            continue
        c = form_cycle(F)
        assert set(c.cycle) <= forms and not set(c.cycle) & seen and len(c.cycle) % 2 == 0
        seen |= set(c.cycle)
        A = c.automorph
        assert F.act(A) == F and A[0] * A[3] - A[1] * A[2] == 1
        t, u = least_norm_one_unit(D)  # brute force
        assert A[0] + A[3] == t and A[2] == F.a * u
    assert seen == forms


def test_cycle_of_a_non_primitive_form_uses_its_primitive_part() -> None:
    c = form_cycle(Form(2, 0, -6))  # 2·(x² − 3y²): the unit 2 + √3 of Z[√3]
    assert str(c.unit) == "2 + √3"


def test_cycle_limits() -> None:
    with pytest.raises(DomainError, match="positive definite"):
        form_cycle(Form(1, 1, 1))
    with pytest.raises(TooLargeError):
        form_cycle(Form(1, 0, -(10**12 + 39)), max_forms=100)


# -- the class in the group ------------------------------------------------------------------


def test_x2_plus_14y2_classes_located() -> None:
    orders = {G: form_class(G).narrow_order for G in definite_reduced_forms(-56)}
    assert orders == {Form(1, 0, 14): 1, Form(2, 0, 7): 2, Form(3, 2, 5): 4, Form(3, -2, 5): 4}
    # genus theory (Cox §3): x² + 14y² and 2x² + 7y² share the principal genus
    assert all(v == 1 for _, v in form_class(Form(2, 0, 7)).genus)
    assert any(v == -1 for _, v in form_class(Form(3, 2, 5)).genus)


@given(D=st.sampled_from([-84, -231, -260, -399, 316, 1300, 4 * 82, 229]), data=st.data())
def test_location_is_a_homomorphism_and_names_the_class(D: int, data: st.DataObject) -> None:
    forms = definite_reduced_forms(D) if D < 0 else indefinite_reduced_forms(D)
    F, G = data.draw(st.sampled_from(forms)), data.draw(st.sampled_from(forms))
    cF, cG, cFG = form_class(F), form_class(G), form_class(compose_forms(F, G).reduced)
    n = cF.group.narrow_invariants
    assert cFG.narrow_class == [
        (x + y) % d for x, y, d in zip(cF.narrow_class, cG.narrow_class, n, strict=True)
    ]
    # the generators raised to the coordinates give the class of F back (checked by a matrix)
    P = Form.identity(D)
    for g, e in zip(cF.group.narrow_generators, cF.narrow_class, strict=True):
        P = compose_forms(P, form_power(g, e).reduced).reduced
    assert equivalence(P, F).properly_equivalent
    assert cF.narrow_order == element_order(cF.narrow_class, n)
    principal = form_cycle(Form.identity(D)).cycle if D > 0 else [Form.identity(D)]
    assert form_power(F, cF.narrow_order).reduced in principal


def test_location_refuses_non_primitive_forms_and_large_groups() -> None:
    with pytest.raises(DomainError, match="primitive"):
        form_class(Form(2, 0, 2))
    with pytest.raises(TooLargeError):
        form_class(Form(1, 1, -(10**15)), max_forms=1000)


@pytest.mark.parametrize("D", [13, 17, 28, 40, 60, 85])
def test_indefinite_equivalence_agrees_with_a_matrix_search(D: int) -> None:
    # one-way brute force: a matrix with entries ≤ 2 carrying F to G means the answer is yes
    forms = indefinite_reduced_forms(D)
    for F, G in product(forms, repeat=2):
        e = equivalence(F, G)
        if small_matrix(F, G, 2, 1):
            assert e.properly_equivalent
        if small_matrix(F, G, 2, -1):
            assert e.improperly_equivalent
        if e.properly_equivalent:
            assert F.act(e.matrix) == G
            assert G in form_cycle(F).cycle  # reduced forms of one class share its cycle


def test_a_non_maximal_order() -> None:
    # discriminant −36 = 3²·(−4): the classes x² + 9y² and 2x² + 2xy + 5y² (brute-force count)
    forms = definite_reduced_forms(-36)
    assert forms == [Form(1, 0, 9), Form(2, 2, 5)]
    c = form_class(Form(2, 2, 5))
    assert c.narrow_order == 2 and c.group.order.conductor == 3
    assert form_power(Form(2, 2, 5), 2).reduced == Form(1, 0, 9)


def test_power_refuses_work_beyond_its_budget() -> None:
    huge = Form(1, 1, -(10**2000))
    with pytest.raises(TooLargeError, match="budget"):
        form_power(huge, 2**200)
    assert form_power(Form(2, 1, 3), 10**30).reduced == Form(
        2, 1, 3
    )  # h(−23) = 3, 10³⁰ ≡ 1 (mod 3)


big = st.integers(-(10**50), 10**50)


@given(a=big, b=big, c=big)
@example(a=1, b=10**50, c=-1)
@example(a=10**50, b=1, c=10**50)
def test_large_forms_reduce_and_square_consistently(a: int, b: int, c: int) -> None:
    D = b * b - 4 * a * c
    assume(D != 0 and not (D > 0 and isqrt(D) ** 2 == D))
    if D < 0 and a < 0:
        a, b, c = -a, -b, -c
    F = Form(a, b, c)
    r = reduce_form(F)
    al, be, ga, de = r.matrix
    assert al * de - be * ga == 1 and F.act(r.matrix) == r.reduced and r.reduced.is_reduced()
    if F.is_primitive():
        square, composite = form_power(F, 2).reduced, compose_forms(F, F).reduced
        assert square.discriminant == composite.discriminant == D
        if D < 0:  # one reduced form per class (a long cycle for D > 0 is left to small D)
            assert square == composite
