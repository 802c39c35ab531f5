"""Convergents and best rational approximations, against OEIS, sympy and brute force."""

from __future__ import annotations

import math
from fractions import Fraction
from itertools import islice

import mpmath
import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st

from realquad.cfrac import (
    best_approximations,
    convergents,
    exact_real,
    partial_quotients,
)
from realquad.cfrac.approximations import compare_distances, sign_of
from realquad.errors import InputError

# OEIS A001333 (numerators of the convergents of √2) and A000129 (Pell numbers, their
# denominators), leading terms from memory; both obey a(n) = 2a(n−1) + a(n−2), checked below.
A001333 = [1, 1, 3, 7, 17, 41, 99, 239, 577, 1393, 3363, 8119, 19601, 47321, 114243, 275807]
A000129 = [0, 1, 2, 5, 12, 29, 70, 169, 408, 985, 2378, 5741, 13860, 33461, 80782, 195025]


def test_convergents_of_sqrt2_are_oeis_a001333_over_a000129():
    for seq in (A001333, A000129):
        assert all(seq[n] == 2 * seq[n - 1] + seq[n - 2] for n in range(2, len(seq)))
    # p_k = A001333(k + 1), q_k = A000129(k + 1)
    assert list(convergents("sqrt(2)", 15)) == list(zip(A001333[1:], A000129[1:], strict=True))


def test_pell_solutions_are_convergents(oeis):
    # OEIS A002350 / A002349: the fundamental solution x/y of x² − ny² = 1 is the convergent
    # p_{l−1}/q_{l−1} (l the period, even) or p_{2l−1}/q_{2l−1} (l odd) of √n
    xs, ys = oeis["A002350"]["terms"], oeis["A002349"]["terms"]
    for n, (x, y) in enumerate(zip(xs, ys, strict=False), start=1):
        if y == 0:
            continue
        found = list(convergents(f"sqrt({n})", bound=y))
        assert found[-1] == (x, y), n
    # n = 61: 1766319049/226153980 (OEIS A002350, A002349), the 22nd convergent (period 11)
    assert list(convergents("61", 22))[-1] == (xs[60], ys[60]) == (1766319049, 226153980)


def test_partial_quotients_are_lazy():
    # √(10²⁰ + 1) = [10¹⁰; (2·10¹⁰)] (brute force: (10¹⁰)² < 10²⁰ + 1 < (10¹⁰ + 1)²)
    assert list(islice(partial_quotients(str(10**20 + 1)), 3)) == [10**10, 2 * 10**10, 2 * 10**10]
    assert list(partial_quotients("-7/3")) == [-3, 1, 2]  # −7/3 = −3 + 2/3 (brute force)


@given(
    st.integers(-40, 40),
    st.integers(2, 500),
    st.integers(1, 12),
    st.integers(-50, 50),
    st.integers(-50, 50),
)
def test_sign_of_against_sympy(P, D, Q, s, r):
    if math.isqrt(D) ** 2 == D or (D - P * P) % Q:
        return
    x = exact_real(f"({P}+sqrt({D}))/{Q}")
    exact = sympy.sign(s * (P + sympy.sqrt(D)) / Q - r)  # sympy
    assert sign_of(x, s, r) == exact
    assert sign_of(Fraction(P, Q), s, r) == sympy.sign(sympy.Rational(s * P, Q) - r)  # sympy


# -- brute force: every fraction with 1 ≤ s ≤ bound ------------------------------------------


def _brute_best(x: Fraction | mpmath.mpf, bound: int, kind: int) -> list[tuple[int, int]]:
    """Best approximations by their definition, over every r/s with s ≤ bound."""
    out: list[tuple[int, int]] = []
    smallest = None  # the smallest distance over all denominators so far
    for s in range(1, bound + 1):
        near = [math.floor(x * s) + i for i in (-1, 0, 1, 2)]
        dist = {r: abs(x - Fraction(r, s)) if kind == 1 else abs(s * x - r) for r in near}
        least = min(dist.values())
        winners = [r for r in near if dist[r] == least]
        if smallest is None or least < smallest:
            if len(winners) == 1 and math.gcd(winners[0], s) == 1:
                out.append((winners[0], s))
            smallest = least
    return out


def _quadratic(P: int, D: int, Q: int) -> tuple[str, mpmath.mpf] | None:
    if math.isqrt(D) ** 2 == D or (D - P * P) % Q:
        return None
    with mpmath.workdps(50):
        return f"({P}+sqrt({D}))/{Q}", (P + mpmath.sqrt(D)) / Q


@pytest.mark.parametrize("kind", [1, 2])
@given(st.integers(-30, 30), st.integers(1, 40), st.integers(1, 60))
def test_best_approximations_of_rationals_by_brute_force(kind, n, d, bound):
    got = [(a.p, a.q) for a in best_approximations(f"{n}/{d}", bound, kind)]
    assert got == _brute_best(Fraction(n, d), bound, kind)  # brute force


@pytest.mark.parametrize("kind", [1, 2])
@given(st.integers(-9, 9), st.integers(2, 400), st.integers(1, 6), st.integers(1, 150))
def test_best_approximations_of_quadratic_irrationals_by_brute_force(kind, P, D, Q, bound):
    number = _quadratic(P, D, Q)
    if number is None:
        return
    text, value = number
    with mpmath.workdps(50):  # brute force; distances of distinct fractions differ by ≫ 10⁻⁵⁰
        expected = _brute_best(value, bound, kind)
    assert [(a.p, a.q) for a in best_approximations(text, bound, kind)] == expected


def test_best_approximations_hand_examples():
    # 3/10 = [0; 3, 3]: 0/1, 1/2, 1/3, 2/7, 3/10 (brute force in the test above; by hand)
    assert [(a.p, a.q) for a in best_approximations("3/10", 10)] == [
        (0, 1),
        (1, 2),
        (1, 3),
        (2, 7),
        (3, 10),
    ]
    # x = a₀ + 1/2: a₀/1 and (a₀ + 1)/1 tie, neither is best (Khinchin §6, the exception)
    assert [(a.p, a.q) for a in best_approximations("7/2", 5, kind=2)] == [(7, 2)]


@given(st.integers(-9, 9), st.integers(2, 400), st.integers(1, 6), st.integers(1, 400))
def test_semiconvergent_rule_by_brute_force(P, D, Q, bound):
    # Khinchin §6: the best approximations of the first kind are the convergents and the
    # intermediate fractions (p_{k−2} + t p_{k−1})/(q_{k−2} + t q_{k−1}) with t > a_k/2, and
    # with t = a_k/2 exactly when closer than p_{k−1}/q_{k−1}; those of the second kind are
    # the convergents (but a₀/1 when a₁ = 1).
    number = _quadratic(P, D, Q)
    if number is None:
        return
    text, value = number
    terms = list(islice(partial_quotients(text), 40))
    conv = [(1, 0), *convergents(text, 40)]  # p_{−1}/q_{−1} = 1/0, then p_0/q_0 …
    rule: list[tuple[int, int]] = [(terms[0], 1)]
    with mpmath.workdps(50):
        for k in range(1, len(terms)):
            (p2, q2), (p1, q1), a = conv[k - 1], conv[k], terms[k]
            for t in range(1, a + 1):
                p, q = p2 + t * p1, q2 + t * q1
                if q > bound:
                    break
                closer = abs(value - mpmath.mpf(p) / q) < abs(value - mpmath.mpf(p1) / q1)
                if 2 * t > a or (2 * t == a and closer):
                    rule.append((p, q))
        if len(terms) > 1 and terms[1] == 1:
            rule.remove((terms[0], 1))
        expected = _brute_best(value, bound, 1)  # brute force
        second = _brute_best(value, bound, 2)  # brute force
    assert sorted(rule, key=lambda f: f[1]) == expected
    assert set(second) == {c for c in conv[1:] if c[1] <= bound} - (
        {(terms[0], 1)} if terms[1] == 1 else set()
    )
    found = [(a.p, a.q, a.is_convergent) for a in best_approximations(text, bound)]
    assert [(p, q) for p, q, _ in found] == expected
    assert all(flag == ((p, q) in conv) for p, q, flag in found)


def test_compare_distances_kinds_differ():
    x = exact_real("sqrt(2)")
    # |√2 − 4/3| ≈ 0.081 < |√2 − 3/2| ≈ 0.086, but |3√2 − 4| ≈ 0.243 > |2√2 − 3| ≈ 0.172
    assert compare_distances(x, (4, 3), (3, 2), 1) == -1  # brute force values above
    assert compare_distances(x, (4, 3), (3, 2), 2) == 1


def test_large_partial_quotient_is_lazy():
    # √(10²⁰ + 1) = [10¹⁰; (2·10¹⁰)] ≈ 10¹⁰ + 1/(2·10¹⁰) − …: after 10¹⁰/1 the intermediate
    # fractions (1 + t·10¹⁰)/t with t > a₁/2 = 10¹⁰ (t = a₁/2 is just farther than 10¹⁰/1;
    # by hand from the expansion of the root)
    first = list(islice(best_approximations(str(10**20 + 1), 10**13), 3))
    assert [(a.p, a.q) for a in first] == [(10**10, 1)] + [
        (1 + t * 10**10, t) for t in (10**10 + 1, 10**10 + 2)
    ]


@pytest.mark.parametrize(("bound", "kind"), [(0, 1), (-3, 1), (5, 3)])
def test_bad_arguments(bound, kind):
    with pytest.raises(InputError):
        best_approximations("sqrt(2)", bound, kind)
