"""Class groups by baby-step giant-step (under GRH) against the exact cycle method, and the dispatch.

The reference throughout is the project's independent exact method
(:func:`realquad.classgroup.class_invariants` and :func:`class_group` with
``method="exact"``: every cycle of reduced forms, no infrastructure, no
assumption), which runs up to D ≈ 10¹³.
"""

from __future__ import annotations

import itertools
import math

import gmpy2
import pytest
from hypothesis import assume, example, given, settings
from hypothesis import strategies as st

from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.bsgs import METHOD, bach_bound, search_class_group
from realquad.classgroup.exact import METHOD as EXACT_METHOD
from realquad.classgroup.exact import class_invariants
from realquad.core.lfunction import estimate_hR
from realquad.core.orders import Order
from realquad.errors import DomainError, InputError, TooLargeError


def is_fundamental(D: int) -> bool:
    if D % 4 not in (0, 1) or gmpy2.is_square(D):
        return False
    return Order(D).conductor == 1


def fundamental_discriminants(lo: int, hi: int) -> list[int]:
    return [D for D in range(lo, hi) if is_fundamental(D)]


def invariants(G: object) -> tuple[int, int, list[int], list[int], int]:
    return (
        G.class_number,  # type: ignore[attr-defined]
        G.narrow_class_number,  # type: ignore[attr-defined]
        G.invariants,  # type: ignore[attr-defined]
        G.narrow_invariants,  # type: ignore[attr-defined]
        G.unit_norm,  # type: ignore[attr-defined]
    )


#: Fundamental discriminants with varied groups, checked against the exact method (h from it):
#: 10¹⁰ + 1 = 101·3541·27961 (h⁺ = 6672, small R), 10¹⁰ + 37 = 103·137·708667 (Cl⁺ = Z/2 × Z/4,
#: N(ε) = +1, long cycles), 4·(10⁹ + 7) (h = 1, h⁺ = 2), 10¹² + 1 = 73·137·99990001 (h = 50280),
#: 4·79 (Q(√79), h = 3, h⁺ = 6, from memory as well), 4·3·5·7·11 (2-rank 3), 8·3·5·7·11·13,
#: 10¹¹ + 5 = 3·5·19·1627·215659 and 10¹¹ + 9 = 7·13·53·1979·10477 (large 2-ranks).
FIXED = [
    5,
    8,
    12,
    4 * 79,
    4 * 3 * 5 * 7 * 11,
    8 * 3 * 5 * 7 * 11 * 13,
    4 * (10**9 + 7),
    10**10 + 1,
    10**10 + 37,
    10**11 + 5,
    10**11 + 9,
    4 * (10**11 + 3),
]


@pytest.mark.parametrize("D", FIXED)
def test_fixed_fields_agree_with_the_exact_method(D: int) -> None:
    assert is_fundamental(D)
    assert invariants(search_class_group(D)) == class_invariants(D)


def test_every_field_below_3000_agrees_with_the_exact_method() -> None:
    fields = fundamental_discriminants(5, 3000)
    assert len(fields) > 800
    for D in fields:
        assert invariants(search_class_group(D)) == class_invariants(D), D


@given(st.integers(5, 10**9).filter(is_fundamental))
@example(10**9 + 9)
@example(4 * 223)
def test_random_fields_agree_with_the_exact_method(D: int) -> None:
    assert invariants(search_class_group(D)) == class_invariants(D)


@pytest.mark.slow
@settings(max_examples=12)
@given(st.integers(10**11, 10**13).filter(is_fundamental))
@example(10**12 + 1)
@example(4 * (10**12 + 39))
def test_large_fields_agree_with_the_exact_method(D: int) -> None:
    try:
        exact = class_invariants(D)
    except TooLargeError:  # more reduced forms than the exact method stores
        assume(False)
    assert invariants(search_class_group(D)) == exact


@pytest.mark.slow
def test_thousand_fields_near_a_million_agree() -> None:
    for D in fundamental_discriminants(10**6, 10**6 + 3300):
        assert invariants(search_class_group(D)) == class_invariants(D), D


def _order_of(coordinates: list[int], moduli: list[int]) -> int:
    order = 1
    for x, d in zip(coordinates, moduli, strict=True):
        order = math.lcm(order, d // math.gcd(x, d))
    return order


@pytest.mark.parametrize(
    "D", [4 * 79, 10**10 + 37, 4 * 3 * 5 * 7 * 11, 8 * 3 * 5 * 7 * 11 * 13, 8 * 223]
)
def test_generators_have_the_stated_orders_and_generate(D: int) -> None:
    exact = class_group(D, method="exact")
    G = class_group(D, method="bsgs")
    for forms, moduli, locate, inv in (
        (G.generators, exact.invariants, exact.class_of, G.invariants),
        (G.narrow_generators, exact.narrow_invariants, exact.narrow_class_of, G.narrow_invariants),
    ):
        coordinates = [locate(F) for F in forms]
        assert [_order_of(c, moduli) for c in coordinates] == inv
        # the subgroup they generate is the whole group (enumerated in the exact group's coordinates)
        spanned = {tuple(0 for _ in moduli)}
        for c, d in zip(coordinates, inv, strict=True):
            spanned = {
                tuple((s + k * x) % m for s, x, m in zip(v, c, moduli, strict=True))
                for v in spanned
                for k in range(d)
            }
        assert len(spanned) == math.prod(moduli)


def test_labels() -> None:
    # exact: unconditional; baby-step giant-step: GRH (Bach's generator bound), whatever the size
    small = class_group(4 * 79)
    assert small.proof == "unconditional" and small.method == EXACT_METHOD
    forced = class_group(4 * 79, method="bsgs")
    assert forced.proof == "GRH" and forced.method == METHOD
    assert class_group(4 * 79, method="exact").proof == "unconditional"
    large = class_group(10**16 + 61)
    assert large.proof == "GRH" and large.method == METHOD
    assert search_class_group(10**10 + 37).proof == "GRH"


@given(st.integers(5, 10**15).filter(is_fundamental))
def test_auto_labels_follow_the_chosen_method(D: int) -> None:
    chosen = choose_class_group_method(Order(D))
    assert chosen in ("exact", "bsgs")
    if chosen == "exact":
        assert D < 6.4 * 10**13
    if D < 10**8:
        assert chosen == "exact"


def test_orders_and_bad_methods() -> None:
    with pytest.raises(DomainError):
        search_class_group(420)  # conductor 2
    assert class_group(420).proof == "unconditional"  # auto keeps the exact method for orders
    with pytest.raises(InputError):
        class_group(420, method="fast")


def test_bach_bound() -> None:
    # 12·log²(D): Bach 1990 for number fields, as quoted by Belabas–Diaz y Diaz–Friedman 2008
    assert bach_bound(10**20) == math.floor(12 * (20 * math.log(10)) ** 2)
    G = search_class_group(10**10 + 37)
    assert G.bound == bach_bound(10**10 + 37)
    # every usable prime up to the bound was either identified or settled by a smooth relation
    usable = sum(
        1
        for p in range(2, G.bound + 1)
        if gmpy2.is_prime(p) and gmpy2.kronecker(10**10 + 37, p) != -1
    )
    assert G.identified + G.smooth == usable


@pytest.mark.slow
@pytest.mark.parametrize("k", [16, 18])
def test_large_fields_are_consistent_with_the_analytic_formula(k: int) -> None:
    # Not a proof: h·R against the truncated Euler product of (√D/2)·L(1, χ) (a rough estimate)
    D = int(gmpy2.next_prime(10**k))
    while D % 4 != 1:
        D = int(gmpy2.next_prime(D))
    G = class_group(D, method="bsgs")
    ratio = G.class_number * float(G.regulator) / estimate_hR(D, 100_000).value
    assert 0.7 < ratio < 1.4
    assert G.narrow_class_number == G.class_number * (1 if G.unit_norm == -1 else 2)


def test_relations_hold_in_the_group() -> None:
    # each relation is a principal ideal: composing the generators' forms accordingly gives the
    # principal class in the exact group (signs decide the narrow relations)
    D = 10**10 + 37
    exact = class_group(D, method="exact")
    from realquad.core.forms import Form

    found = search_class_group(D)
    forms = [Form._raw(*g) for g in found.generators]
    for row in found.relations:
        F = Form.identity(D)
        for e, g in zip(row, forms, strict=False):
            for _ in range(e % found.narrow_class_number):
                F = F.compose(g)
        assert exact.is_narrowly_principal(F)
    for row in itertools.islice(found.wide_relations, 1, None):
        F = Form.identity(D)
        for e, g in zip(row, forms, strict=False):
            for _ in range(e % found.narrow_class_number):
                F = F.compose(g)
        assert exact.is_principal(F)


def test_progress_reports_the_classes_found() -> None:
    seen: list[int] = []
    G = search_class_group(
        10**10 + 37,
        progress=lambda what, n, *expected: seen.append(n) if what == "classes found" else None,
    )
    assert seen and seen == sorted(seen) and seen[-1] == G.class_number


def test_group_object_from_the_infrastructure() -> None:
    # the same ClassGroup type; listing classes needs the exact method and says so
    D = 10**10 + 37
    G = class_group(D, method="bsgs")
    exact = class_group(D, method="exact")
    assert G.genus.number_of_genera == exact.genus.number_of_genera == 4  # 3 prime factors: 2²
    assert G.genus.two_rank == exact.genus.two_rank
    assert str(G.regulator) == str(exact.regulator)  # R unconditional both ways (30 digits)
    assert G.unit.proof == "unconditional"
    with pytest.raises(DomainError):
        G.narrow_classes()


def test_oeis_class_number_one(oeis) -> None:  # type: ignore[no-untyped-def]
    # OEIS A003656: fundamental discriminants D > 0 with class number 1 (an outside source)
    terms = oeis["A003656"]["terms"]
    found = [
        D
        for D in fundamental_discriminants(5, terms[-1] + 1)
        if search_class_group(D).class_number == 1
    ]
    assert found == terms
    # OEIS A003172: squarefree n > 1 with Q(√n) of class number 1
    terms = oeis["A003172"]["terms"]
    found = [
        n
        for n in range(2, terms[-1] + 1)
        if is_fundamental(n if n % 4 == 1 else 4 * n)
        and search_class_group(n if n % 4 == 1 else 4 * n).class_number == 1
    ]
    assert found == terms


@pytest.mark.parametrize(
    ("d", "h", "h_plus", "norm"),
    [
        (79, 3, 6, 1),  # from memory: Q(√79), h = 3, ε = 80 + 9√79 of norm +1
        (223, 3, 6, 1),  # from memory: Q(√223), h = 3
        (10, 2, 2, -1),  # from memory: Q(√10), h = 2, ε = 3 + √10
        (3, 1, 2, 1),  # from memory: Q(√3), ε = 2 + √3
        (82, 4, 4, -1),  # from memory: Q(√82), h = 4, ε = 9 + √82
    ],
)
def test_small_fields_from_memory(d: int, h: int, h_plus: int, norm: int) -> None:
    G = search_class_group(d if d % 4 == 1 else 4 * d)
    assert (G.class_number, G.narrow_class_number, G.unit_norm) == (h, h_plus, norm)
