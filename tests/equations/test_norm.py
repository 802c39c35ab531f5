"""x² − d y² = n: classes, fundamental solutions, completeness (brute force, sympy, literature)."""

from __future__ import annotations

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad.core.integers import is_square, isqrt
from realquad.core.primes import root_count_bound, square_roots_mod
from realquad.equations.norm import norm_classes, solve_norm_equation
from realquad.errors import InputError, TooLargeError


def brute_force(d: int, n: int, B: int) -> set[tuple[int, int]]:
    """Every (x, y) with |x|, |y| ≤ B and x² − d y² = n, by trying every y (independent check)."""
    out = set()
    for y in range(-B, B + 1):
        v = n + d * y * y
        if v >= 0 and is_square(v):
            x = isqrt(v)
            if x <= B:
                out.update({(x, y), (-x, y)})
    return out


def same_class(d: int, n: int, p: tuple[int, int], q: tuple[int, int]) -> bool:
    """Nagell's criterion: x x' − d y y' ≡ 0 and x y' − x' y ≡ 0 (mod n)."""
    (x, y), (u, v) = p, q
    return (x * u - d * y * v) % n == 0 and (x * v - u * y) % n == 0


@given(st.integers(-40, 120), st.integers(-300, 300))
@example(13, -4)
@example(2, 7)
@example(5, 4)
@example(8, 1)
@example(-1, 25)
@example(49, 0)
@example(12, 0)
def test_box_matches_brute_force(d: int, n: int) -> None:
    # brute force over |x|, |y| ≤ 400 is the reference
    if d == 0:
        return
    s = solve_norm_equation(d, n)
    if s.families and s.families[0].kind == "line":
        return
    assert set(s.bounded(400)) == brute_force(d, n, 400)


def test_thousands_of_small_equations() -> None:
    # every (d, n) with 2 ≤ d ≤ 60 non-square, |n| ≤ 60, against brute force over a box
    for d in range(2, 61):
        if is_square(d):
            continue
        for n in range(-60, 61):
            if n == 0:
                continue
            s = solve_norm_equation(d, n)
            assert set(s.bounded(150)) == brute_force(d, n, 150), (d, n)


@given(st.integers(2, 500), st.integers(-2000, 2000).filter(bool))
def test_fundamental_solutions_are_nagells(d: int, n: int) -> None:
    # Nagell 1951 §58: one class each, least y ≥ 0, x ≥ 0 when the class is its own conjugate;
    # checked against every solution of the class found by brute force in a box
    if is_square(d):
        return
    s = solve_norm_equation(d, n)
    funds = [f.fundamental for f in s.families]
    for i, p in enumerate(funds):
        assert p[0] ** 2 - d * p[1] ** 2 == n
        for q in funds[i + 1 :]:
            assert not same_class(d, n, p, q)
    for sol in brute_force(d, n, 300):
        owners = [p for p in funds if same_class(d, n, p, sol)]
        assert len(owners) == 1
        p = owners[0]
        assert p[1] >= 0 and p[1] <= abs(sol[1])
        if p[1] == abs(sol[1]) and p[0] != sol[0] and same_class(d, n, (-p[0], p[1]), p):
            assert p[0] >= 0


def test_nagell_bounds() -> None:
    # Nagell 1951 Thm 108/108a: 0 ≤ y ≤ y1·√|n|/√(2(x1 ± 1)) with (x1, y1) = pell(d)
    from realquad.equations.pell import pell

    for d in (2, 3, 13, 61, 94, 109):
        x1, y1 = pell(d).x, pell(d).y
        for n in (-31, -20, -4, -1, 1, 4, 7, 20, 31, 2 * 3 * 5 * 7):
            for f in solve_norm_equation(d, n).families:
                x, y = f.fundamental
                den = 2 * (x1 + 1) if n > 0 else 2 * (x1 - 1)
                assert y * y * den <= y1 * y1 * abs(n)


def test_worked_examples() -> None:
    # x² − 13y² = −4: (3, 1) and (−3, 1) (from memory: (3 + √13)/2 is the fundamental unit of
    # Q(√13), of norm −1), and 2·(18, 5) from the norm −1 unit 18 + 5√13 of Z[√13]
    assert norm_classes(13, -4)[0] == [(-3, 1), (3, 1), (36, 10)]
    # x² − 2445y² = −20: 445² − 2445·9² = −20 (the example in Matthews, Expositiones 2000, from memory)
    classes = norm_classes(2445, -20)[0]
    assert (445, 9) in classes and (-445, 9) in classes and len(classes) == 3
    # Pell: x² − 61y² = 1, 1766319049 + 226153980√61 (OEIS A002350/A002349 at d = 61)
    s = solve_norm_equation(61, 1)
    assert s.families[0].fundamental == (1, 0)
    assert s.families[0].solution(1) == (1766319049, 226153980)
    # x² − 2y² = 7: classes (3, 1) and (−3, 1) (Nagell 1951 §58 example, from memory)
    assert norm_classes(2, 7)[0] == [(-3, 1), (3, 1)]


SYMPY_CASES = [
    (13, -4),
    (2445, -20),
    (61, 1),
    (61, -1),
    (7, 9),
    (10, 9),
    (29, -100),
    (41, 5 * 8),
    (157, 12),
    (2, 49),
]


@pytest.mark.parametrize(("d", "n"), SYMPY_CASES)
def test_against_sympy_diop_dn(d: int, n: int) -> None:
    # sympy's diop_DN (reference library) returns one solution per class, not necessarily Nagell's
    from sympy.solvers.diophantine.diophantine import diop_DN

    ours = [f.fundamental for f in solve_norm_equation(d, n).families]
    theirs = [tuple(int(t) for t in s) for s in diop_DN(d, n)]
    for s in theirs:
        assert s[0] ** 2 - d * s[1] ** 2 == n
        assert sum(same_class(d, n, p, s) for p in ours) == 1
    # every class of ours is one of sympy's (diop_DN lists each class once; all agree here)
    for p in ours:
        assert sum(same_class(d, n, p, s) for s in theirs) == 1


def test_finite_cases() -> None:
    # d < 0: x² + 5y² = 9 by hand: (±3, 0), (±2, ±1)
    assert solve_norm_equation(-5, 9).solutions == [
        (-2, -1),
        (-2, 1),
        (2, -1),
        (2, 1),
        (-3, 0),
        (3, 0),
    ]
    # x² + y² = 25: 12 = 4·(1 + 1 + 1) representations (sum of two squares r₂(25) = 12, OEIS A004018)
    assert len(solve_norm_equation(-1, 25).solutions) == 12
    # d square: (x − 3y)(x + 3y) = 7
    assert solve_norm_equation(9, 7).solutions == [(-4, -1), (-4, 1), (4, -1), (4, 1)]
    assert solve_norm_equation(3, -1).finite and not solve_norm_equation(3, -1).families
    assert solve_norm_equation(7, 0).solutions == [(0, 0)]
    assert solve_norm_equation(9, 0).bounded(3) == [(0, 0), (-3, -1), (-3, 1), (3, -1), (3, 1)]


def test_sums_of_two_squares_count() -> None:
    # r₂(n), the number of representations as a sum of two squares (OEIS A004018), n = 0..30
    a004018 = [
        1,
        4,
        4,
        0,
        4,
        8,
        0,
        0,
        4,
        4,
        8,
        0,
        0,
        8,
        0,
        0,
        4,
        8,
        4,
        0,
        8,
        0,
        0,
        0,
        0,
        12,
        8,
        0,
        0,
        8,
        0,
    ]
    assert [len(solve_norm_equation(-1, n).solutions) for n in range(31)] == a004018


def test_square_roots_mod_against_brute_force() -> None:
    for m in range(1, 200):
        for d in (-7, 0, 1, 2, 13, 45, 72):
            assert square_roots_mod(d, m) == [z for z in range(m) if (z * z - d) % m == 0]


def test_k_th_solution_and_reflection() -> None:
    fam = solve_norm_equation(2, 7).families[1]
    assert fam.fundamental == (3, 1)
    assert fam.solution(1) == (13, 9) and fam.solution(-1) == (5, -3)  # (3 + √2)(3 ± 2√2)
    assert fam.solution(1, reflected=True) == (-13, -9)


def test_unfactorable_n_is_refused() -> None:
    import gmpy2

    # a product of two primes of 41 and 36 digits: 76 digits, past the 60-digit factoring limit
    n = int(gmpy2.next_prime(10**40) * gmpy2.next_prime(10**35))
    with pytest.raises(TooLargeError, match="60 digits"):
        solve_norm_equation(2, n)


def test_bad_arguments() -> None:
    with pytest.raises(InputError):
        solve_norm_equation("x", 3)  # type: ignore[arg-type]
    with pytest.raises(InputError):
        solve_norm_equation(2, 7).bounded(-1)


def test_shortcut_and_cycle_table_agree() -> None:
    # for |m| < √d both routes apply: the convergents of √d and the LMM reduction must give the
    # same classes (each checked against brute force elsewhere)
    from realquad.core.primes import factorize
    from realquad.equations.norm import (
        _primitive_lmm,
        _primitive_short,
        balanced_representative,
        pell_units,
    )

    for d in range(5, 400):
        if is_square(d):
            continue
        u = pell_units(d)
        for m in range(-isqrt(d), isqrt(d) + 1):
            if m == 0:
                continue
            canon = {
                balanced_representative(v, u.plus, u.log_plus, m, d) for v in _primitive_short(d, m)
            }
            other = {
                balanced_representative(v, u.plus, u.log_plus, m, d)
                for v in _primitive_lmm(d, m, factorize(m) if abs(m) > 1 else {})
            }
            assert canon == other, (d, m)


def test_root_count_bound_holds() -> None:
    # the a-priori bound used to refuse hopeless inputs never undercounts (brute force, m < 600)
    from realquad.core.primes import factorize

    for d in range(-30, 60):
        for m in range(2, 600):
            bound = 1
            for p, e in factorize(m).items():
                bound *= root_count_bound(d, p, e)
            assert sum((z * z - d) % m == 0 for z in range(m)) <= bound


def test_too_many_square_roots_refused() -> None:
    import math

    n = math.prod(p for p in range(3, 200) if all(p % q for q in range(2, p)))  # 45 odd primes
    with pytest.raises(TooLargeError, match="square roots"):
        solve_norm_equation(2, n)
    # x² − 2y² = 2²⁰⁰ needs no roots at all: only 2¹⁰⁰·(x² − 2y² = 1)
    assert [f.fundamental for f in solve_norm_equation(2, 2**200).families] == [(2**100, 0)]


def test_large_d_against_brute_force_in_y() -> None:
    # d up to 10⁷, |n| up to 10⁹ (half of them with a planted solution): every solution with
    # |y| ≤ 1500, found by trying each y (independent check), must be in the families
    import random

    rng = random.Random(11)
    for _ in range(60):
        d = rng.randint(2, 10**7)
        if is_square(d):
            continue
        n = rng.choice([1, -1]) * rng.randint(1, 10**9)
        if rng.random() < 0.5:
            y0, x0 = rng.randint(1, 500), rng.randint(0, 10**6)
            n = x0 * x0 - d * y0 * y0
            if n == 0:
                continue
        expected = set()
        for y in range(-1500, 1501):
            v = n + d * y * y
            if v >= 0 and is_square(v):
                expected.update({(isqrt(v), y), (-isqrt(v), y)})
        got = {p for p in solve_norm_equation(d, n).bounded(10**40) if abs(p[1]) <= 1500}
        assert got == expected, (d, n)


def test_sweep_against_sympy_diop_dn() -> None:
    # sympy's diop_DN over 2 ≤ d < 20 (non-square), 0 < |n| ≤ 20: one solution per class, each a
    # solution, as many classes as ours. A wider sweep (d < 60, |n| ≤ 60, also d < 0 and square d)
    # run while writing this module found no disagreement to record.
    from sympy.solvers.diophantine.diophantine import diop_DN

    for d in range(2, 20):
        if is_square(d):
            continue
        for n in range(-20, 21):
            if n == 0:
                continue
            ours = [f.fundamental for f in solve_norm_equation(d, n).families]
            theirs = [tuple(int(t) for t in s) for s in diop_DN(d, n)]
            assert len(theirs) == len(ours), (d, n)
            for s in theirs:
                assert s[0] ** 2 - d * s[1] ** 2 == n
                assert sum(same_class(d, n, p, s) for p in ours) == 1, (d, n, s)
