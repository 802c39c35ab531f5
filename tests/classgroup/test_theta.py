"""Class numbers from the sums of three squares, against OEIS, brute force and the reduced forms."""

from __future__ import annotations

from math import isqrt

from hypothesis import given, settings
from hypothesis import strategies as st

from realquad.classgroup.imaginary import (
    class_group_imaginary,
    class_invariants_from_class_number,
    class_relations_imaginary,
)
from realquad.classgroup.theta import (
    TERNARY_FORMS,
    binary_theta,
    theta_class_numbers,
    theta_counts,
    three_square_counts,
)
from realquad.core.orders import Order
from tests.conftest import load_reference

OEIS = load_reference("oeis_imaginary.json")


def brute_three_squares(n: int) -> int:
    """r₃(n) by counting every (x, y, z) with x² + y² + z² = n (no project arithmetic)."""
    r = isqrt(n)
    return sum(
        1
        for x in range(-r, r + 1)
        for y in range(-r, r + 1)
        if x * x + y * y <= n and isqrt(n - x * x - y * y) ** 2 == n - x * x - y * y
        for _ in ((1,) if n == x * x + y * y else (1, 1))
    )


def negative_fundamental(limit: int) -> list[int]:
    """The fundamental D with −limit ≤ D < 0, in decreasing order (definition, trial division)."""

    def squarefree(m: int) -> bool:
        return all(m % (k * k) for k in range(2, isqrt(m) + 1))

    out = []
    for n in range(3, limit + 1):
        D = -n
        if D % 4 == 1 and squarefree(n):
            out.append(D)
        elif D % 4 == 0 and (n // 4) % 4 in (1, 2) and squarefree(n // 4):
            out.append(D)
    return out


def test_three_square_counts_by_brute_force() -> None:
    # r₃ is OEIS A005875: 1, 6, 12, 8, 6, 24, 24, 0, 12, 30, 24, 24, 8, 24, 48, 0, 6, …
    counts = three_square_counts(600)
    assert counts[:17].tolist() == [1, 6, 12, 8, 6, 24, 24, 0, 12, 30, 24, 24, 8, 24, 48, 0, 6]
    assert [int(c) for c in counts] == [brute_three_squares(n) for n in range(601)]


def _all_split(D: int) -> bool:
    """Whether 3, 5 and 7 all split in Q(√D) (Euler's criterion, no project arithmetic)."""
    return D % 8 == 1 and all(D % q and pow(D % q, (q - 1) // 2, q) == 1 for q in (3, 5, 7))


def test_theta_class_numbers_against_oeis_a006641() -> None:
    # OEIS A006641: h(−A003657(n)); the series give every term but those where 3, 5, 7 split
    terms = OEIS["A006641"]["terms"]
    discriminants = negative_fundamental(4000)[: len(terms)]
    found = theta_class_numbers(discriminants[-1])
    for D, h in zip(discriminants, terms, strict=True):
        if _all_split(D):
            assert D not in found
        else:
            assert found[D] == h, D


def test_theta_class_numbers_against_the_reduced_forms() -> None:
    # every fundamental D with |D| ≤ 20000: the series and the full walk agree
    found = theta_class_numbers(-20000)
    expected = [D for D in negative_fundamental(20000) if not _all_split(D)]
    assert sorted(found) == sorted(expected)
    for D, h in found.items():
        assert class_relations_imaginary(Order(D))[0] == h, D


def test_ternary_constants_against_the_reduced_forms() -> None:
    # r_Q(m) = k_q (1 − (−m/q)) h(−m) for every squarefree m ≡ 7 (mod 8), 7 < m ≤ 2·10⁵,
    # and every q = 3, 5, 7 (also where another q gives h): the constants the module states
    counts = theta_counts(200_000)
    for D in negative_fundamental(200_000):
        if D % 8 != 1:
            continue
        h = class_relations_imaginary(Order(D))[0]
        for index, (q, _, k) in enumerate(TERNARY_FORMS):
            symbol = 0 if D % q == 0 else (1 if pow(D % q, (q - 1) // 2, q) == 1 else -1)
            assert counts.ternary_count(index, -D) == k * (1 - symbol) * h, (D, q)


def test_binary_theta_by_brute_force() -> None:
    for a, b, c in ((1, 1, 1), (2, 2, 3), (1, 1, 2), (1, 0, 1), (3, 2, 7)):
        values = binary_theta(a, b, c, 300).tolist()
        expected = [0] * 301
        for x in range(-40, 41):
            for y in range(-40, 41):
                n = a * x * x + b * x * y + c * y * y
                if n <= 300:
                    expected[n] += 1
        assert values == expected, (a, b, c)


def test_the_series_refuse_nothing_silently() -> None:
    counts = theta_counts(400)
    assert counts.class_number(-311) is None  # 3, 5, 7 split in Q(√−311)
    assert counts.class_number(-3) == counts.class_number(-4) == 1


@settings(max_examples=60, deadline=None)
@given(st.integers(3, 10**7), st.integers(1, 6))
def test_structure_from_the_class_number_equals_the_full_walk(n: int, f: int) -> None:
    # the Sylow walks with h known give the invariants of the whole walk, orders included
    D0 = -n if -n % 4 in (0, 1) else -4 * n
    D = D0 * f * f
    if -D > 10**8:
        return
    G = class_group_imaginary(Order(D))
    assert class_invariants_from_class_number(Order(D), G.class_number) == list(G.invariants)


def test_structures_with_large_sylow_subgroups() -> None:
    # Cl(−4·5·3·7) ≅ (Z/2)³ and Cl(−3299) ≅ Z/3 × Z/9, from memory; checked by the full walk too
    for D in (-420, -3299, -4 * 3 * 5 * 7 * 11 * 13, -(3 * 10**7 + 11)):
        G = class_group_imaginary(Order(D))
        assert class_invariants_from_class_number(Order(D), G.class_number) == list(G.invariants)
