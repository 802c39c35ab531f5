"""Class numbers and class groups against published tables, brute force and classical formulas."""

from __future__ import annotations

from math import prod

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from sympy import factorint

from realquad.classgroup import class_group
from realquad.classgroup.exact import class_numbers
from realquad.core.forms import Form
from realquad.core.integers import is_square
from realquad.core.linalg import smith_normal_form
from realquad.core.orders import Order, field
from realquad.core.primes import kronecker, primes_below
from realquad.errors import InputError, TooLargeError
from realquad.units.cfrac import fundamental_unit_cfrac as fundamental_unit
from realquad.units.cfrac import unit_index_in_order
from tests.core.test_forms import brute_force_reduced


def brute_force_classes(D: int) -> tuple[int, int]:
    """(h, h⁺) by listing every primitive reduced form (divisor search) and its rho cycle.

    Independent of the generation argument: no prime forms, no composition.
    Wide classes are the cycles up to F ↦ (−a, b, −c).
    """
    forms = {(F.a, F.b, F.c) for F in brute_force_reduced(D) if F.is_primitive()}
    cycle_of: dict[tuple[int, int, int], int] = {}
    count = 0
    for F in forms:
        if F not in cycle_of:
            for G in Form(*F).cycle():
                cycle_of[(G.a, G.b, G.c)] = count
            count += 1
    wide = {frozenset((cycle_of[F], cycle_of[(-F[0], F[1], -F[2])])) for F in forms}
    return len(wide), count


def fundamental_discriminants(limit: int) -> list[int]:
    out = []
    for D in range(5, limit + 1):
        if D % 4 == 1 and all(e == 1 for e in factorint(D).values()):
            out.append(D)
        elif (
            D % 4 == 0
            and (D // 4) % 4 in (2, 3)
            and all(e == 1 for e in factorint(D // 4).values())
        ):
            out.append(D)
    return out


def test_oeis_class_number_one_radicands(oeis):
    # OEIS A003172: squarefree n > 1 with Q(√n) of class number 1
    terms = oeis["A003172"]["terms"]
    top = terms[-1]
    found = [
        d
        for d in range(2, top + 1)
        if all(e == 1 for e in factorint(d).values()) and class_numbers(field(d))[0] == 1
    ]
    assert found == terms


def test_oeis_class_number_one_discriminants(oeis):
    # OEIS A003656: fundamental discriminants D > 0 with class number 1
    terms = oeis["A003656"]["terms"]
    found = [D for D in fundamental_discriminants(terms[-1]) if class_numbers(D)[0] == 1]
    assert found == terms


@pytest.mark.parametrize(
    ("d", "h", "h_plus", "norm", "source"),
    [
        (79, 3, 6, 1, "from memory (Q(√79): h = 3; unit 80 + 9√79 of norm +1)"),
        (223, 3, 6, 1, "from memory (Q(√223): h = 3)"),
        (10, 2, 2, -1, "from memory (Q(√10): h = 2, unit 3 + √10 of norm −1)"),
        (3, 1, 2, 1, "from memory (Q(√3): h = 1, unit 2 + √3 of norm +1)"),
        (5, 1, 1, -1, "from memory"),
        (82, 4, 4, -1, "from memory (Q(√82): h = 4, unit 9 + √82)"),
        (226, 8, 8, -1, "from memory (Q(√226): h = 8)"),
        (229, 3, 3, -1, "from memory (Q(√229): h = 3)"),
    ],
)
def test_literature_cases(d, h, h_plus, norm, source):
    G = class_group(field(d))
    assert (G.class_number, G.narrow_class_number, G.unit_norm) == (h, h_plus, norm), source


def test_brute_force_small():
    # every discriminant up to 600 in the default run (the slow test goes to 6000)
    for D in range(5, 601):
        if D % 4 in (0, 1) and not is_square(D):
            assert class_numbers(D)[:2] == brute_force_classes(D), D


@pytest.mark.slow
def test_brute_force_all_discriminants_to_6000():
    for D in range(601, 6001):
        if D % 4 in (0, 1) and not is_square(D):
            assert class_numbers(D)[:2] == brute_force_classes(D), D


def order_class_number_formula(D: int) -> tuple[int, int]:
    """h and h⁺ of the order of discriminant f²D₀ from those of the maximal order.

    h(f²D₀) = h(D₀) f ∏_{p|f} (1 − (D₀/p)/p) / [O₀* : O*] — D. A. Cox, *Primes of
    the Form x² + ny²*, Wiley 1989, Theorem 7.24 and its real-quadratic form
    (Exercise 7.30; the exact exercise number is from memory); for the narrow group
    the same with the totally positive units in the index (from memory).
    """
    order = Order(D)
    D0, f = order.fundamental_discriminant, order.conductor
    h0, h0_plus, _ = class_numbers(D0)
    psi = f
    for p in factorint(f):
        psi = psi * (p - kronecker(D0, p)) // p
    eps0 = fundamental_unit(D0)
    k = unit_index_in_order(eps0, order)  # ε = ε₀^k
    h = h0 * psi // k
    # totally positive units: powers of ε₀ (if N(ε₀) = +1) or of ε₀²; in O of ε = ε₀^k or ε²
    if eps0.norm == 1:
        k_plus = k
    else:
        k_plus = k // 2 if k % 2 == 0 else k
    h_plus = h0_plus * psi // k_plus
    return h, h_plus


@pytest.mark.parametrize("D0", [5, 8, 12, 13, 17, 21, 24, 28, 29, 40, 60, 61, 65, 85, 229, 316])
@pytest.mark.parametrize("f", [2, 3, 4, 5, 6, 7, 9, 10, 12])
def test_non_maximal_orders(D0, f):
    D = f * f * D0
    h, h_plus, _ = class_numbers(D)
    assert (h, h_plus) == order_class_number_formula(D)


@given(st.integers(5, 200_000).filter(lambda D: D % 4 in (0, 1) and not is_square(D)))
@example(4 * 79)
@example(4 * 3)
def test_narrow_versus_wide(D):
    h, h_plus, norm = class_numbers(D)
    assert norm == fundamental_unit(D).norm
    assert h_plus == (h if norm == -1 else 2 * h)


@settings(max_examples=25)
@given(st.integers(5, 100_000).filter(lambda D: D % 4 in (0, 1) and not is_square(D)))
@example(60060)
@example(4 * 226)
def test_structure(D):
    G = class_group(D)
    assert prod(G.narrow_invariants) == G.narrow_class_number
    assert prod(G.invariants) == G.class_number
    for invs in (G.invariants, G.narrow_invariants):
        assert all(x % y == 0 for x, y in zip(invs[1:], invs, strict=False))
    # each generator has exactly the stated order in the narrow group
    for g, d in zip(G.narrow_generators, G.narrow_invariants, strict=True):
        assert G.is_narrowly_principal(g.power(d))
        for q in factorint(d):
            assert not G.is_narrowly_principal(g.power(d // q))
    for g, d in zip(G.generators, G.invariants, strict=True):
        assert G.is_principal(g.power(d))
        for q in factorint(d):
            assert not G.is_principal(g.power(d // q))
    # the coordinate map is a homomorphism
    gens = G.narrow_generators
    if len(gens) >= 1:
        a = G.narrow_class_of(gens[0])
        b = G.narrow_class_of(gens[0].power(2))
        assert b == [(2 * x) % d for x, d in zip(a, G.narrow_invariants, strict=True)]


def test_j_class():
    # (−a, b, −c) is the class of (−1, b₀, c₀) times that of (a, b, c)
    for D in (12, 60, 316, 892, 5460):
        G = class_group(D)
        J = Form.identity(D).negative()
        for forms in G.narrow_classes():
            F = forms[0]
            assert F.negative().equivalent(F.compose(J)) is not None


def test_smith_against_sympy():
    # sympy's invariant factors (general-purpose reference) on random relation matrices
    import random

    from sympy import ZZ, Matrix
    from sympy.matrices.normalforms import invariant_factors

    rng = random.Random(7)
    for _ in range(200):
        n = rng.randint(1, 4)
        R = [[rng.randint(-9, 9) for _ in range(n)] for _ in range(n)]
        if Matrix(R).det() == 0:
            continue
        S = smith_normal_form(R, n)
        expected = [abs(int(x)) for x in invariant_factors(Matrix(R), domain=ZZ) if abs(int(x)) > 1]
        assert S.invariants == expected
        for row in R:
            assert S.coordinates(row) == [0] * len(S.invariants)


def test_bad_input():
    with pytest.raises(InputError):
        class_group(7)
    with pytest.raises(TooLargeError):
        class_group(field(10**6 + 3), max_forms=10, method="exact")
    # beyond the exact method's reach "auto" moves to baby-step giant-step (under GRH)
    assert class_group(field(10**6 + 3), max_forms=10).proof == "GRH"
    with pytest.raises(InputError):
        class_group(5, method="nope")


def test_primes_below():
    assert primes_below(30) == [2, 3, 5, 7, 11, 13, 17, 19, 23, 29]
    assert len(primes_below(10**4)) == 1229  # π(10⁴), OEIS A006880


@given(st.integers(5, 300_000).filter(lambda D: D % 4 in (0, 1) and not is_square(D)))
@example(4 * 79 * 9)
def test_lean_path_agrees_with_table(D):
    from realquad.classgroup.exact import class_table

    order = Order(D)
    table = class_table(D, order.conductor)
    h, h_plus, norm = class_numbers(order)
    assert h_plus == table.narrow_class_number
    assert (norm == -1) == table.j_is_principal


@pytest.mark.parametrize("D", [316, 5460, 60060, 10**6 + 1, 4 * 226 * 9])
def test_progress_path_agrees(D):
    # the full-table path (used with a progress callback) and the relations kernel agree
    seen: list[int] = []
    G1 = class_group(D, progress=lambda what, n, *expected: seen.append(n))
    G2 = class_group(D)
    assert (G1.invariants, G1.narrow_invariants) == (G2.invariants, G2.narrow_invariants)
    assert G1.generators == G2.generators and G1.narrow_generators == G2.narrow_generators
    assert G2.table.narrow_class_number == G2.narrow_class_number


def _order_statistics(invariants: list[int]) -> dict[int, int]:
    """How many elements of each order ⊕ Z/dᵢ has (by running through all elements)."""
    from itertools import product
    from math import gcd, lcm

    counts: dict[int, int] = {}
    for element in product(*(range(d) for d in invariants)):
        order = 1
        for x, d in zip(element, invariants, strict=True):
            order = lcm(order, d // gcd(x, d))
        counts[order] = counts.get(order, 0) + 1
    return counts


def test_structure_against_element_orders():
    # independent of the class table and the Smith normal form: list the narrow classes by
    # brute force (all reduced forms, their cycles), find each class's order by powering,
    # and compare the number of elements of each order with that of the stated invariants
    for D in [D for D in range(5, 1500) if D % 4 in (0, 1) and not is_square(D)]:
        forms = {F for F in brute_force_reduced(D) if F.is_primitive()}
        cycle_of: dict[Form, int] = {}
        reps = []
        for F in sorted(forms, key=lambda f: (abs(f.a), f.a, f.b)):
            if F not in cycle_of:
                for G in F.cycle():
                    cycle_of[G] = len(reps)
                reps.append(F)
        principal = cycle_of[Form.identity(D)]
        counts: dict[int, int] = {}
        for F in reps:
            k, G = 1, F.reduced()
            while cycle_of[G] != principal:
                G, k = G.compose(F), k + 1
            counts[k] = counts.get(k, 0) + 1
        assert counts == _order_statistics(class_group(D).narrow_invariants), D
