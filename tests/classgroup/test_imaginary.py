"""Class numbers and class groups of imaginary orders against OEIS, Heegner–Stark, brute force and Cox 7.24."""

from __future__ import annotations

from collections import Counter
from math import gcd, isqrt, prod

import pytest
from hypothesis import given
from hypothesis import strategies as st
from sympy import factorint

from realquad.classgroup import choose_class_group_method, class_group
from realquad.classgroup.imaginary import (
    MAX_DISCRIMINANT,
    class_group_imaginary,
    count_reduced_forms,
)
from realquad.core.forms import Form, prime_form
from realquad.core.orders import Order, field
from realquad.errors import DomainError, TooLargeError
from tests.conftest import load_reference

OEIS = load_reference("oeis_imaginary.json")


# -- independent helpers (brute force, no project arithmetic) ------------------------------------


def brute_reduced_forms(D: int) -> list[tuple[int, int, int]]:
    """Every primitive reduced form of D < 0, by the definition |b| ≤ a ≤ c (b ≥ 0 at the edges)."""
    out = []
    a = 1
    while 3 * a * a <= -D:
        for b in range(-a + 1, a + 1):
            if (b * b - D) % (4 * a):
                continue
            c = (b * b - D) // (4 * a)
            if c < a or (b < 0 and a == c) or gcd(gcd(a, b), c) != 1:
                continue
            out.append((a, b, c))
        a += 1
    return out


def brute_reduce(f: tuple[int, int, int]) -> tuple[int, int, int]:
    """Gauss reduction written out step by step (no kernels)."""
    a, b, c = f
    while True:
        while b > a or b <= -a:  # translate by ±1 at a time
            step = -1 if b > a else 1
            a, b, c = a, b + 2 * a * step, a * step * step + b * step + c
        if a > c:
            a, b, c = c, -b, a
            continue
        if a == c and b < 0:
            b = -b
        return a, b, c


def brute_compose(f: tuple[int, int, int], g: tuple[int, int, int]) -> tuple[int, int, int]:
    """Dirichlet composition by united forms (Cox, Lemma 3.2 and Prop. 3.8), found by search.

    ``g`` is first moved to an equivalent form whose first coefficient is prime
    to that of ``f``; then ``B`` is searched with ``B ≡ b (mod 2a)``,
    ``B ≡ b' (mod 2a')``, ``B² ≡ D (mod 4aa')``.
    """
    a, b, c = f
    D = b * b - 4 * a * c
    a2, b2, c2 = g
    found = None
    for x in range(0, 40):
        for y in range(-40, 41):
            if gcd(x, y) != 1:
                continue
            m = a2 * x * x + b2 * x * y + c2 * y * y
            if gcd(m, a) == 1:
                # complete (x, y) to a matrix [[x, u], [y, v]] of determinant 1
                _, s, t = _xgcd(x, y)  # s x + t y = 1
                u, v = -t, s
                na = m
                nb = 2 * a2 * x * u + b2 * (x * v + u * y) + 2 * c2 * y * v
                found = (na, nb)
                break
        if found:
            break
    assert found is not None
    a2, b2 = found
    for B in range(b, b + 2 * a * a2, 2 * a):  # B ≡ b (mod 2a)
        if (B - b2) % (2 * a2) == 0 and (B * B - D) % (4 * a * a2) == 0:
            return brute_reduce((a * a2, B, (B * B - D) // (4 * a * a2)))
    raise AssertionError("no united form found")


def _xgcd(x: int, y: int) -> tuple[int, int, int]:
    if y == 0:
        return (x, 1, 0) if x >= 0 else (-x, -1, 0)
    g, s, t = _xgcd(y, x % y)
    return g, t, s - (x // y) * t


def kronecker_symbol(D: int, p: int) -> int:
    """(D/p) for a prime p: Legendre by Euler's criterion, (D/2) by D mod 8."""
    if p == 2:
        return 0 if D % 2 == 0 else (1 if D % 8 in (1, 7) else -1)
    r = pow(D % p, (p - 1) // 2, p)
    return 0 if r == 0 else (1 if r == 1 else -1)


def is_fundamental(D: int) -> bool:
    """Whether D < 0 is a fundamental discriminant (sympy factorint for squarefreeness)."""
    if D % 4 == 1:
        return all(e == 1 for e in factorint(-D).values())
    if D % 4 == 0:
        m = D // 4
        return m % 4 in (2, 3) and all(e == 1 for e in factorint(-m).values())
    return False


# -- published values ----------------------------------------------------------------------------


def test_oeis_a000924_class_numbers_of_q_sqrt_minus_n():
    # OEIS A000924: h of Q(√−n), n = 1, 2, 3, 5, 6, 7, … squarefree, every listed term
    terms = OEIS["A000924"]["terms"]
    squarefree = [n for n in range(1, 1000) if all(e == 1 for e in factorint(n).values())]
    got = [class_group(field(-n)).class_number for n in squarefree[: len(terms)]]
    assert got == terms


def test_oeis_a006641_class_numbers_by_fundamental_discriminant():
    # OEIS A006641: h(−d) for the fundamental discriminants −3, −4, −7, −8, … (A003657), every term
    terms = OEIS["A006641"]["terms"]
    discs = [-n for n in range(3, 2000) if is_fundamental(-n)][: len(terms)]
    assert [class_group(D).class_number for D in discs] == terms


def test_oeis_a000003_classes_of_discriminant_minus_4n():
    # OEIS A000003: number of classes of primitive positive definite forms of discriminant −4n
    terms = OEIS["A000003"]["terms"]
    assert [class_group(-4 * n).class_number for n in range(1, len(terms) + 1)] == terms


def test_heegner_stark_class_number_one():
    # Heegner (1952), Baker and Stark (1966–67): the imaginary fields of class number 1 are
    # exactly those of discriminant −3, −4, −7, −8, −11, −19, −43, −67, −163
    nine = [-3, -4, -7, -8, -11, -19, -43, -67, -163]
    ones = [
        D for D in range(-3, -1000, -1) if is_fundamental(D) and class_group(D).class_number == 1
    ]
    assert ones == nine


def test_small_groups_from_memory():
    # from memory: Cl(−20) ≅ Z/2, Cl(−23) ≅ Z/3, Cl(−56) ≅ Z/4, Cl(−84) ≅ (Z/2)², Cl(−420) ≅ (Z/2)³
    for D, inv in [(-20, [2]), (-23, [3]), (-56, [4]), (-84, [2, 2]), (-420, [2, 2, 2])]:
        assert class_group(D).invariants == inv


# -- brute force -----------------------------------------------------------------------------------


def _discriminants(limit: int) -> list[int]:
    return [D for D in range(-3, -limit - 1, -1) if D % 4 in (0, 1)]


def test_class_numbers_against_counted_reduced_forms():
    # brute force: h(D) = number of primitive reduced forms, for every D with |D| ≤ 2000
    for D in _discriminants(2000):
        assert class_group(D).class_number == len(brute_reduced_forms(D)), D


def test_listed_classes_are_the_reduced_forms():
    # brute force: the class table lists exactly the primitive reduced forms, one per class
    for D in _discriminants(400):
        G = class_group(D)
        listed = sorted((c[0].a, c[0].b, c[0].c) for c in G.narrow_classes())
        assert listed == sorted(brute_reduced_forms(D)), D
        assert all(len(c) == 1 for c in G.narrow_classes())


def _structure_counts(invariants: list[int], h: int) -> Counter:
    """How many elements of each order ⊕ Z/dᵢ has (from the invariants)."""
    counts: Counter = Counter()
    for k in range(1, h + 1):
        if h % k == 0:
            # elements killed by k: ∏ gcd(k, dᵢ); those of order exactly k by Möbius over divisors
            counts[k] = prod(gcd(k, d) for d in invariants)
    exact: Counter = Counter()
    for k in sorted(counts):
        exact[k] = counts[k] - sum(exact[j] for j in exact if k % j == 0 and j != k)
    return exact


def test_structure_by_orders_of_elements():
    # brute force: the order of every class by repeated united-form composition (Cox 3.2),
    # compared with the number of elements of each order of ⊕ Z/dᵢ
    for D in [-56, -84, -260, -420, -455, -671, -1155, -3299, -4 * 65, -4 * 221]:
        forms = brute_reduced_forms(D)
        one = brute_reduce((1, D % 2, (D % 2 - D) // 4))
        orders: Counter = Counter()
        for f in forms:
            x, k = f, 1
            while x != one:
                x, k = brute_compose(x, f), k + 1
            orders[k] += 1
        G = class_group(D)
        assert orders == _structure_counts(G.invariants, G.class_number), D


def test_generators_have_their_orders_and_coordinates_add():
    for D in [-56, -420, -4 * 1155, -3299, -15 * 16]:
        G = class_group(D)
        for g, d in zip(G.generators, G.invariants, strict=True):
            assert g.power(d) == Form.identity(D)
            assert all(g.power(k) != Form.identity(D) for k in range(1, d))
        forms = [Form(*f) for f in brute_reduced_forms(D)]
        for F in forms[:20]:
            for H in forms[:20]:
                want = [
                    (x + y) % d
                    for x, y, d in zip(G.class_of(F), G.class_of(H), G.invariants, strict=True)
                ]
                assert G.class_of(F.compose(H)) == want


# -- non-maximal orders: Cox, Theorem 7.24 ---------------------------------------------------------


def _w(D: int) -> int:
    return {-3: 6, -4: 4}.get(D, 2)


@pytest.mark.parametrize("D0", [-3, -4, -7, -8, -15, -20, -23, -24, -39, -84, -163])
def test_class_number_formula_for_orders(D0):
    # Cox, Primes of the Form x² + ny², Theorem 7.24:
    # h(D0 f²) = h(D0) f ∏_{p | f} (1 − (D0/p)/p) / [O_K* : O*]
    h0 = class_group(D0).class_number
    for f in range(1, 31):
        D = D0 * f * f
        numerator = h0 * f
        for p in factorint(f):
            numerator = numerator * (p - kronecker_symbol(D0, p)) // p
        expected = numerator // (_w(D0) // _w(D))
        assert class_group(D).class_number == expected, (D0, f)


# -- genus theory ----------------------------------------------------------------------------------


def test_genera_for_negative_discriminants():
    # Cox, Theorem 3.15: 2^{μ−1} genera; for fundamental D, μ is the number of primes dividing D
    for D in [-20, -84, -420, -4 * 1365, -3 * 5 * 7 * 11, -8 * 3 * 5 * 7, -4, -3, -7]:
        g = class_group(D).genus
        assert g.number_of_genera == 2 ** (len(factorint(-D)) - 1), D
        assert g.two_rank == sum(1 for d in class_group(D).invariants if d % 2 == 0)


def test_genus_characters_of_minus_4n_follow_cox():
    # Cox, Theorem 3.15 (D = −4n): n ≡ 3 (mod 4): none; 1, 5 (mod 8): δ; 2 (mod 8): δε;
    # 6 (mod 8): ε; 4 (mod 8): δ; 0 (mod 8): δ and ε — besides the odd primes
    expected = {3: [], 1: ["δ"], 5: ["δ"], 2: ["δε"], 6: ["ε"], 4: ["δ"], 0: ["δ", "ε"]}
    for n in range(1, 60):
        names = class_group(-4 * n).genus.characters
        two = [x for x in names if not x.startswith("(")]
        key = n % 4 if n % 4 == 3 else n % 8
        assert two == expected[key], n


# -- the dispatch and its limits -------------------------------------------------------------------


def test_imaginary_group_conventions():
    G = class_group(-4)
    assert (G.narrow_class_number, G.unit_norm, G.unit, G.roots_of_unity) == (1, 1, None, 4)
    assert class_group(-3).roots_of_unity == 6 and class_group(-12).roots_of_unity == 2
    with pytest.raises(DomainError):
        _ = G.regulator
    assert G.is_imaginary and not class_group(5).is_imaginary


def test_methods_for_negative_discriminants():
    assert choose_class_group_method(Order(-20)) == "exact"
    assert choose_class_group_method(Order(-(10**20) - 3)) == "bsgs"
    with pytest.raises(DomainError, match="fields"):
        class_group(-80, method="bsgs")  # conductor 2
    with pytest.raises(TooLargeError, match="baby-step giant-step"):
        class_group(-(MAX_DISCRIMINANT + 4), method="exact")
    # auto: an order of conductor 3·…, beyond the exact reach, goes to index calculus
    assert choose_class_group_method(Order(-36 * (3 * 10**12 + 1))) == "subexp"
    with pytest.raises(TooLargeError, match="classes"):
        class_group_imaginary(Order(-4 * 10**6 - 4 * 3), max_classes=10)


def test_large_discriminant_against_prime_form_orders():
    # |D| near 10¹²: each generator's order divides its invariant exactly; h = ∏ invariants
    D = -4 * (10**12 + 3)
    G = class_group(D)
    assert prod(G.invariants) == G.class_number
    for g, d in zip(G.generators, G.invariants, strict=True):
        assert g.power(d) == Form.identity(D)
        assert all(g.power(d // p) != Form.identity(D) for p in factorint(d))


@given(st.integers(3, 10**6))
def test_random_prime_forms_are_located(n):
    D = -n
    if D % 4 not in (0, 1):
        return
    G = class_group(D)
    for p in (2, 3, 5, 7, 11, 13):
        F = prime_form(D, p)
        if F is None:
            continue
        coords = G.class_of(F)
        rebuilt = Form.identity(D)
        for g, e in zip(G.generators, coords, strict=True):
            rebuilt = rebuilt.compose(g.power(e))
        assert rebuilt == F.reduced()


def test_isqrt_bound_covers_every_reduced_form():
    # the generator bound √(|D|/3) is the largest a of a reduced form (brute force)
    for D in _discriminants(3000)[::7]:
        assert max(a for a, _, _ in brute_reduced_forms(D)) <= isqrt(-D // 3)


def test_oeis_a006641_by_counting_reduced_forms():
    # OEIS A006641 (every listed term) through the count that builds no form
    terms = OEIS["A006641"]["terms"]
    discs = [-n for n in range(3, 2000) if is_fundamental(-n)][: len(terms)]
    assert [count_reduced_forms(Order(D)) for D in discs] == terms


@given(st.integers(3, 10**10))
def test_counting_reduced_forms_agrees_with_the_class_walk(n):
    # the count against the walk of the whole group (independent: compositions of forms)
    D = next(-m for m in range(n, n + 1000) if is_fundamental(-m))
    assert count_reduced_forms(Order(D)) == class_group(D).class_number
