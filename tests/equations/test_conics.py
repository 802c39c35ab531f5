"""a x² + b xy + c y² + d x + e y + f = 0: every case against brute force, sympy and hand-worked examples."""

from __future__ import annotations

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from realquad.core.integers import is_square, isqrt
from realquad.equations.binary import solve_binary_form
from realquad.equations.conics import solve_quadratic
from realquad.equations.families import LineFamily, OrbitFamily
from realquad.equations.norm import solve_norm_equation
from realquad.errors import DomainError, InputError, RealquadError


def brute_force(a: int, b: int, c: int, d: int, e: int, f: int, B: int) -> set[tuple[int, int]]:
    """Every solution with |x|, |y| ≤ B: for each x, solve the quadratic in y exactly (independent check)."""
    out = set()
    for x in range(-B, B + 1):
        A, Bq, C = c, b * x + e, a * x * x + d * x + f
        if A == 0:
            if Bq == 0:
                if C == 0:
                    out.update((x, y) for y in range(-B, B + 1))
            elif C % Bq == 0 and abs(C // Bq) <= B:
                out.add((x, -C // Bq))
            continue
        disc = Bq * Bq - 4 * A * C
        if disc < 0 or not is_square(disc):
            continue
        s = isqrt(disc)
        for num in (-Bq + s, -Bq - s):
            if num % (2 * A) == 0 and abs(num // (2 * A)) <= B:
                out.add((x, num // (2 * A)))
    return out


coef = st.integers(-9, 9)


@given(coef, coef, coef, coef, coef, st.integers(-40, 40))
@example(1, 0, -2, 3, -5, -7)  # x² − 2y² + 3x − 5y = 7
@example(0, 1, 0, 1, 1, 1)  # (x + 1)(y + 1) = 0
@example(1, 2, 1, 0, 0, -4)  # (x + y)² = 4
@example(1, 0, 0, 0, -1, 0)  # y = x²
@example(4, 4, 1, 3, 5, -7)  # parabola
@example(1, 0, -4, 0, 0, 0)  # (x − 2y)(x + 2y) = 0
@example(0, 0, 0, 2, 4, -6)  # a line
@example(2, 0, -8, 1, 1, 0)  # square discriminant with linear terms
def test_general_equations_match_brute_force(
    a: int, b: int, c: int, d: int, e: int, f: int
) -> None:
    # brute force over |x|, |y| ≤ 60 is the reference
    if (a, b, c, d, e, f) == (0,) * 6:
        return
    if a == b == c == d == e == 0:
        assert solve_quadratic(a, b, c, d, e, f).bounded(5) == []
        return
    s = solve_quadratic(a, b, c, d, e, f)
    assert set(s.bounded(60)) == brute_force(a, b, c, d, e, f, 60)
    for fam in s.families:
        p = fam.fundamental
        assert s.satisfies(*p)


@given(st.integers(-30, 30), st.integers(-30, 30), st.integers(-30, 30), st.integers(-500, 500))
@example(1, 1, -1, 1)
@example(3, 5, -7, 11)
@example(3, 5, -7, -9)
@example(2, 0, 3, 35)
@example(1, 0, 1, 0)
def test_binary_forms_match_brute_force(a: int, b: int, c: int, n: int) -> None:
    # brute force over |x|, |y| ≤ 120
    if a == b == c == 0:
        return
    s = solve_binary_form(a, b, c, n)
    assert set(s.bounded(120)) == brute_force(a, b, c, 0, 0, -n, 120)


def test_many_random_equations_against_brute_force() -> None:
    import random

    rng = random.Random(20261201)  # fixed seed: a few thousand equations
    for _ in range(2000):
        co = [rng.randint(-7, 7) for _ in range(6)]
        if not any(co[:5]):
            continue
        s = solve_quadratic(*co)
        assert set(s.bounded(40)) == brute_force(*co, 40), co


def test_families_are_disjoint_orbits() -> None:
    # distinct orbit families never share a point (brute force of their members in a box)
    for co in [
        (1, 0, -2, 3, -5, -7),
        (3, 5, -7, 0, 0, 9),
        (1, 1, -1, 0, 0, -1),
        (2, 3, -4, 5, 1, -3),
    ]:
        s = solve_quadratic(*co)
        seen: set[tuple[int, int]] = set()
        for fam in s.families:
            pts = set(fam.bounded(10**6))
            assert not (pts & seen)
            seen |= pts


def test_norm_equation_agrees_with_general_solver() -> None:
    # the form route (2x)² − 4d y² = 4n must give Nagell's classes too
    for d in (2, 3, 5, 13, 61, 94):
        for n in (-20, -4, -1, 1, 4, 7, 31):
            a = sorted(f.fundamental for f in solve_norm_equation(d, n).families)
            b = sorted(f.fundamental for f in solve_quadratic(1, 0, -d, 0, 0, -n).families)
            assert a == b, (d, n)


def test_form_automorph_is_the_least_proper_automorph() -> None:
    # x² + xy − y² (Δ = 5): automorphs from t² − 5u² = 4, least (3, 1) (Buell 1989, §3.2):
    # M = [[(t − bu)/2, −cu], [au, (t + bu)/2]] = [[1, 1], [1, 2]]
    fam = solve_binary_form(1, 1, -1, 1).families[0]
    assert isinstance(fam, OrbitFamily)
    assert fam.automorph.matrix == (1, 1, 1, 2)
    # every member is a solution and the k-th one is T^k applied to the fundamental solution
    for k in range(-5, 6):
        x, y = fam.solution(k)
        assert x * x + x * y - y * y == 1


def test_worked_examples() -> None:
    # xy + x + y + 1 = (x + 1)(y + 1) = 0: the lines x = −1 and y = −1 (by hand)
    s = solve_quadratic(0, 1, 0, 1, 1, 1)
    assert not s.finite and all(isinstance(f, LineFamily) for f in s.families)
    assert (-1, 7) in s.bounded(10) and (5, -1) in s.bounded(10)
    # x² + y² = 25: twelve points (r₂(25) = 12, OEIS A004018)
    assert len(solve_quadratic(1, 0, 1, 0, 0, -25).solutions) == 12
    # y = x²: one parabola (t, t²)
    fam = solve_quadratic(1, 0, 0, 0, -1, 0).families
    assert len(fam) == 1 and fam[0].bounded(9) == [
        (0, 0),
        (-1, 1),
        (1, 1),
        (-2, 4),
        (2, 4),
        (-3, 9),
        (3, 9),
    ]
    # 3x² + 5xy − 7y² = 11 (Δ = 109): no family, and brute force finds nothing in a box either
    assert solve_binary_form(3, 5, -7, 11).families == []
    assert brute_force(3, 5, -7, 0, 0, -11, 300) == set()
    # x² − 2y² + 3x − 5y = 7: (1, −1): 1 − 2 + 3 + 5 = 7 (by hand)
    assert (1, -1) in solve_quadratic(1, 0, -2, 3, -5, -7).bounded(5)


FINITE_SYMPY = [
    (1, 0, 1, 0, 0, -25),
    (2, 1, 3, -1, 2, -40),
    (1, 0, -1, 0, 0, -15),
    (0, 1, 0, 2, 3, -7),
    (1, 1, 1, -3, 0, -20),
]


@pytest.mark.parametrize("co", FINITE_SYMPY)
def test_finite_cases_against_sympy_diophantine(co: tuple[int, ...]) -> None:
    # sympy's diophantine (reference library) lists finite solution sets completely in these cases
    from sympy import symbols
    from sympy.solvers.diophantine import diophantine

    x, y = symbols("x y", integer=True)
    a, b, c, d, e, f = co
    theirs = {
        (int(p), int(q))
        for p, q in diophantine(a * x**2 + b * x * y + c * y**2 + d * x + e * y + f)
    }
    ours = solve_quadratic(*co)
    assert ours.finite
    assert set(ours.solutions) == theirs


def test_hyperbolic_against_sympy_points() -> None:
    # sympy's diophantine parametrisations evaluated at t = 0 are solutions that our families contain
    from sympy import symbols
    from sympy.solvers.diophantine import diophantine

    x, y = symbols("x y", integer=True)
    s = solve_binary_form(3, 5, -7, -9)
    ours = set(s.bounded(10**20))
    for sol in diophantine(3 * x**2 + 5 * x * y - 7 * y**2 + 9):
        t = sorted(set().union(*(v.free_symbols for v in sol)), key=str)
        pt = tuple(int(v.subs({s_: 0 for s_ in t}).expand()) for v in sol)
        assert pt in ours


def test_degenerate_inputs() -> None:
    with pytest.raises(DomainError):
        solve_quadratic(0, 0, 0, 0, 0, 0)
    assert solve_quadratic(0, 0, 0, 0, 0, 5).finite
    with pytest.raises(InputError):
        solve_quadratic("1", "x", 0, 0, 0, 0)  # type: ignore[arg-type]
    # content: 2x² − 4y² = 6 is x² − 2y² = 3, no solutions (3 is inert in Z[√2], by hand)
    s = solve_quadratic(2, 0, -4, 0, 0, -6)
    assert s.coefficients == (1, 0, -2, 0, 0, -3) and s.finite and not s.solutions


def test_planted_solutions_with_larger_coefficients() -> None:
    # coefficients up to 300 with a planted point (so the set is never trivially empty),
    # compared with brute force over |x|, |y| ≤ 80
    import random

    rng = random.Random(7)
    for _ in range(300):
        a, b, c, d, e = (rng.randint(-300, 300) for _ in range(5))
        x0, y0 = rng.randint(-80, 80), rng.randint(-80, 80)
        f = -(a * x0 * x0 + b * x0 * y0 + c * y0 * y0 + d * x0 + e * y0)
        if not any((a, b, c, d, e)):
            continue
        s = solve_quadratic(a, b, c, d, e, f)
        pts = set(s.bounded(80))
        assert (x0, y0) in pts
        assert pts == brute_force(a, b, c, d, e, f, 80), (a, b, c, d, e, f)


def test_parabolic_equations_with_planted_solutions() -> None:
    # Δ = 0: k(αx + βy)² + dx + ey + f = 0 with a planted point, against brute force
    import random

    rng = random.Random(9)
    for _ in range(300):
        k, al, be = rng.choice([-3, -2, -1, 1, 2, 3]), rng.randint(-6, 6), rng.randint(-6, 6)
        a, b, c = k * al * al, 2 * k * al * be, k * be * be
        d, e = rng.randint(-60, 60), rng.randint(-60, 60)
        x0, y0 = rng.randint(-40, 40), rng.randint(-40, 40)
        f = -(a * x0 * x0 + b * x0 * y0 + c * y0 * y0 + d * x0 + e * y0)
        if not any((a, b, c, d, e)):
            continue
        s = solve_quadratic(a, b, c, d, e, f)
        assert set(s.bounded(60)) == brute_force(a, b, c, d, e, f, 60), (a, b, c, d, e, f)


# -- one family per orbit ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("equation", "families"),
    [
        (
            (1, -7, -7, 0, 0, 7),
            [(0, 1)],
        ),  # x² − 7xy − 7y² = −7: (7, 1) is the next member of (0, 1)
        ((1, -1, -1, -1, 0, 0), [(0, 0)]),  # x² − xy − y² = x: (1, 0) is the next member of (0, 0)
    ],
)
def test_one_orbit_is_one_family(equation, families) -> None:
    # regression: both were listed as two families
    assert [f.fundamental for f in solve_quadratic(*equation).families] == families


@settings(max_examples=60)
@given(st.tuples(*[st.integers(-3, 3)] * 6))
def test_families_are_distinct_orbits(coefficients) -> None:
    """No family's fundamental solution is a member of another family (brute force: each family's
    members in a box that holds both fundamentals, walked from its own orbit)."""
    try:
        sol = solve_quadratic(*coefficients)
    except RealquadError:
        return
    families = [f for f in sol.families if f.kind == "orbit"]
    for i, first in enumerate(families):
        for second in families[i + 1 :]:
            box = max(map(abs, (*first.fundamental, *second.fundamental)))
            assert second.fundamental not in first.bounded(box), (coefficients, first, second)
            assert first.fundamental not in second.bounded(box), (coefficients, first, second)
