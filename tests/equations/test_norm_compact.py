"""x² − d y² = n by principal ideal tests in the infrastructure (realquad.equations.norm_compact).

Checked against the continued-fraction method (an independent algorithm: the
LMM walk of the principal cycle, itself checked against brute force and sympy
in test_norm.py), against the convergents of √d computed here from their
textbook recurrence, and, for compact solutions, modulo primes and by their
logarithms.
"""

from __future__ import annotations

import math
import random
import time

import gmpy2
import mpmath
import pytest

from realquad._backend import BACKEND
from realquad.core.integers import is_square, isqrt
from realquad.core.primes import factorize
from realquad.equations.families import CompactOrbitFamily
from realquad.equations.norm import choose_norm_method, solve_norm_equation
from realquad.errors import InputError, TooLargeError

giant_steps_compiled = pytest.mark.skipif(
    BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)

#: Primes for the residue checks (Mersenne and NTT primes, from memory; gmpy2 confirms them below).
PRIMES = [2**61 - 1, 2**31 - 1, 998244353, 10**9 + 7]


def nagell_same_class(d: int, n: int, p: tuple[int, int], q: tuple[int, int]) -> bool:
    """Nagell's criterion (Introduction to Number Theory, §57): x x' − d y y' ≡ x y' − x' y ≡ 0 (mod n)."""
    (x, y), (u, v) = p, q
    return (x * u - d * y * v) % n == 0 and (x * v - u * y) % n == 0


def convergents(d: int, count: int) -> list[tuple[int, int]]:
    """The first convergents p/q of √d, by the recurrence m, q, a of the textbooks (independent)."""
    a0 = isqrt(d)
    m, den, a = 0, 1, a0
    p_prev, p = 1, a0
    q_prev, q = 0, 1
    out = [(p, q)]
    for _ in range(count - 1):
        m = den * a - m
        den = (d - m * m) // den
        a = (a0 + m) // den
        p_prev, p = p, a * p + p_prev
        q_prev, q = q, a * q + q_prev
        out.append((p, q))
    return out


def fundamentals(d: int, n: int, method: str) -> list[tuple[int, int]]:
    return sorted(
        (f.solution(0) if isinstance(f, CompactOrbitFamily) else f.fundamental)
        for f in solve_norm_equation(d, n, method).families
    )


def random_cases(rng: random.Random, count: int) -> list[tuple[int, int]]:
    """(d, n) with d up to 10¹²; half the n are norms of a random x + y√d (so solvable)."""
    cases = []
    while len(cases) < count:
        d = rng.randrange(2, 10 ** rng.choice([2, 3, 5, 8, 12]))
        if is_square(d):
            continue
        if rng.random() < 0.5:
            n = rng.choice([1, -1]) * rng.randrange(1, 5000)
        else:
            y = rng.randrange(1, 50)
            x = isqrt(d * y * y) + rng.randrange(-3, 4)
            n = x * x - d * y * y
            if n == 0 or abs(n) > 10**9:
                continue
        cases.append((d, n))
    return cases


def test_primes_of_the_residue_checks() -> None:
    assert all(gmpy2.is_prime(p) for p in PRIMES)


@giant_steps_compiled
def test_infrastructure_matches_the_continued_fraction() -> None:
    # same classes, same fundamental solutions after expansion
    for d, n in random_cases(random.Random(20261203), 30):
        assert fundamentals(d, n, "infrastructure") == fundamentals(d, n, "cfrac"), (d, n)


@giant_steps_compiled
@pytest.mark.slow
@pytest.mark.parametrize("part", range(4))  # 2000 cases in four parts: the test workers share them
def test_infrastructure_matches_the_continued_fraction_thousands(part: int) -> None:
    for d, n in random_cases(random.Random(16), 2000)[part::4]:
        assert fundamentals(d, n, "infrastructure") == fundamentals(d, n, "cfrac"), (d, n)


def test_small_cases_on_either_kernel() -> None:
    # x² − 13y² = −4 (Nagell's example, from memory: classes (±3, 1) and (36, 10))
    assert fundamentals(13, -4, "infrastructure") == [(-3, 1), (3, 1), (36, 10)]
    # x² − 2y² = 7·2²: the imprimitive classes 2·(±3, 1) among them
    assert fundamentals(2, 28, "infrastructure") == fundamentals(2, 28, "cfrac")
    # x² − 3y² = −1 has no solution: the unit of Z[√3] has norm +1
    assert solve_norm_equation(3, -1, "infrastructure").families == []


@giant_steps_compiled
def test_bounded_lists_agree_with_the_continued_fraction() -> None:
    for d, n in [(61, 1), (61, -3 * 5 * 13), (1000003, 3), (2, 7 * 49)]:
        ours = solve_norm_equation(d, n, "infrastructure").bounded(10**60)
        assert ours == solve_norm_equation(d, n, "cfrac").bounded(10**60), (d, n)


def _check_compact_family(fam: CompactOrbitFamily, d: int, n: int) -> None:
    """x² − dy² = n and t² − du² = 1 modulo primes; the logarithms balanced and consistent."""
    assert fam.generator.norm == n and fam.unit.norm == 1
    for p in PRIMES:
        x, y = fam.residues(p)
        assert (x * x - d * y * y - n) % p == 0
        a, b = fam.unit.modulo(p)  # t + u√d = (A + B√(4d))/… reduced: t ≡ a, u ≡ 2b
        assert (a * a - d * (2 * b) ** 2 - 1) % p == 0
        member = fam.member(3).modulo(p)  # α ε³ has norm n as well
        assert (member[0] ** 2 - 4 * d * member[1] ** 2 - n) % p == 0
    with mpmath.workdps(60):
        log_alpha, error = fam.generator.log(60)
        assert abs(log_alpha - fam.log_generator) < 1e-30 + error
        log_conjugate = mpmath.log(abs(n)) - log_alpha
        # Nagell's fundamental solution sits at the balance point: |α|/|α'| within ε^{±1}
        assert abs(log_alpha - log_conjugate) <= fam.log_unit + 1e-20


@giant_steps_compiled
def test_compact_solutions_at_d_near_10_to_the_24() -> None:
    d = 10**24 + 49
    primes = [p for p in (5, 7, 41) if gmpy2.legendre(d % p, p) == 1]
    n = -math.prod(primes)
    start = time.perf_counter()
    sol = solve_norm_equation(d, n)
    assert time.perf_counter() - start < 20
    assert sol.method.startswith("principal ideal test") and sol.proof == "unconditional"
    assert len(sol.families) <= 2 ** len(primes)
    for fam in sol.families:
        assert isinstance(fam, CompactOrbitFamily)
        _check_compact_family(fam, d, n)
    # the fundamental unit of Z[√d] has about R/ln 10 digits; R from the unit command's search
    assert sol.families[0].unit_digits() > 10**11


@pytest.mark.parametrize(("d", "count"), [(10**20 + 3, 40), (10**24 + 49, 8)])
@giant_steps_compiled
def test_norms_of_convergents_are_solvable(d: int, count: int) -> None:
    _convergents_found(d, range(1, count))


@giant_steps_compiled
@pytest.mark.slow
def test_norms_of_convergents_are_solvable_at_10_to_the_30() -> None:
    # each principal ideal test takes seconds here: two convergents whose norm is ± a product
    # of two distinct primes (four ideals each)
    _convergents_found(10**30 + 57, range(1, 40), max_factors=2, enough=2)


def _convergents_found(d: int, indices: range, max_factors: int = 3, enough: int = 0) -> None:
    """Each convergent p/q of √d whose norm n has at most ``max_factors`` prime factors lies in a
    class found (the first ``enough`` of them, if given)."""
    assert choose_norm_method(d) == "infrastructure"
    checked = 0
    for k, (p, q) in enumerate(convergents(d, max(indices) + 1)):
        n = p * p - d * q * q
        factors = factorize(n)
        if k not in indices or len(factors) > max_factors or (enough and checked >= enough):
            continue
        if enough and any(e > 1 for e in factors.values()):
            continue  # a square factor multiplies the ideals to test
        fams = solve_norm_equation(d, n).families
        points = [f.fundamental for f in fams if f.fundamental is not None]
        assert any(nagell_same_class(d, n, v, (p, q)) for v in points), (d, k, n)
        assert all(v[0] ** 2 - d * v[1] ** 2 == n for v in points)
        checked += 1
    assert checked >= 2


@giant_steps_compiled
def test_bound_lists_the_small_members_of_a_huge_class() -> None:
    d = 10**24 + 49
    x0 = isqrt(d) + 1
    n = x0 * x0 - d  # (x0, ±1) solve it; the other members have hundreds of billions of digits
    sol = solve_norm_equation(d, n)
    listed = sol.bounded(10**15)
    assert {(x0, 1), (x0, -1), (-x0, 1), (-x0, -1)} <= set(listed)
    assert all(x * x - d * y * y == n for x, y in listed)
    big = [f for f in sol.families if f.fundamental is None]
    for fam in big:
        with pytest.raises(TooLargeError, match="compact form"):
            fam.solution(0)


def test_refusals_are_immediate() -> None:
    for d in (10**60 + 7, 10**45 + 3):
        start = time.perf_counter()
        with pytest.raises(TooLargeError):
            solve_norm_equation(d, 3)
        assert time.perf_counter() - start < 1.0
    with pytest.raises(InputError, match="method"):
        solve_norm_equation(13, 3, "sieve")


def random_forms(rng: random.Random, count: int) -> list[tuple[int, int, int, int]]:
    """Primitive indefinite forms (a, b, c) with a non-square discriminant up to about 10⁸, and n;
    half the n are values of the form (so solvable)."""
    cases = []
    while len(cases) < count:
        a = rng.choice([1, -1]) * rng.randrange(1, 30)
        b = rng.randrange(-40, 40)
        c = rng.choice([1, -1]) * rng.randrange(1, 10 ** rng.choice([1, 3, 6]))
        D = b * b - 4 * a * c
        if math.gcd(math.gcd(a, b), c) != 1 or D <= 0 or is_square(D):
            continue
        if rng.random() < 0.5:
            x, y = rng.randrange(-20, 20), rng.randrange(1, 20)
            n = a * x * x + b * x * y + c * y * y
        else:
            n = rng.choice([1, -1]) * rng.randrange(1, 3000)
        if n:
            cases.append((a, b, c, n))
    return cases


def form_fundamentals_both_ways(a: int, b: int, c: int, n: int) -> tuple[list, list]:
    from realquad.equations.binary import solve_binary_form
    from realquad.equations.norm_compact import form_families_infrastructure

    cf = sorted(f.fundamental for f in solve_binary_form(a, b, c, n).families)
    fams, _, proof = form_families_infrastructure(a, b, c, n)
    assert proof == "unconditional"
    return cf, sorted(f.solution(0) for f in fams)


@giant_steps_compiled
def test_forms_by_the_infrastructure_match_the_continued_fraction() -> None:
    # ax² + bxy + cy² = n: same families, same fundamental solutions after expansion
    for a, b, c, n in random_forms(random.Random(20261204), 40):
        cf, infrastructure = form_fundamentals_both_ways(a, b, c, n)
        assert cf == infrastructure, (a, b, c, n)


@giant_steps_compiled
@pytest.mark.slow
@pytest.mark.parametrize("part", range(4))  # 1000 forms in four parts, as above
def test_forms_by_the_infrastructure_match_the_continued_fraction_many(part: int) -> None:
    for a, b, c, n in random_forms(random.Random(17), 1000)[part::4]:
        cf, infrastructure = form_fundamentals_both_ways(a, b, c, n)
        assert cf == infrastructure, (a, b, c, n)


@giant_steps_compiled
def test_a_form_beyond_the_continued_fraction() -> None:
    # 3x² + xy − (10²⁴ + 49)y² = n: Δ ≈ 1.2·10²⁵, the families in compact form
    from realquad.equations.binary import solve_binary_form

    a, b, c = 3, 1, -(10**24 + 49)
    n = 3 * 5 * 5 + 5 * 2 + c * 4  # the value at (5, 2), so at least one family
    sol = solve_binary_form(a, b, c, n)
    assert sol.proof == "unconditional" and sol.method.startswith("principal ideal test")
    assert sol.families and all(isinstance(f, CompactOrbitFamily) for f in sol.families)
    assert (5, 2) in sol.bounded(10)
    for fam in sol.families:
        assert isinstance(fam, CompactOrbitFamily)
        assert fam.generator.norm == a * n and fam.unit.norm == 1
        for p in PRIMES:
            x, y = fam.residues(p)
            assert (a * x * x + b * x * y + c * y * y - n) % p == 0
            assert fam.member(-2).norm == a * n


@pytest.mark.parametrize(
    ("form", "n"),
    [((1, 0, -(10**6 + 3)), -2), ((1, 0, -61), 3), ((3, 5, -7), -9), ((2, 3, -40), -35)],
)
def test_digit_counts_of_members_are_exact(form: tuple[int, int, int], n: int) -> None:
    # the count from logarithms against the members written out (decimal digits of |x|)
    from realquad.equations.families import expand_point
    from realquad.equations.norm_compact import form_families_infrastructure

    families, _, _ = form_families_infrastructure(*form, n)
    assert families
    for fam in families:
        for k in range(-4, 5):
            x, _ = expand_point(fam.member(k), fam.a, fam.b)
            assert fam.digits(k) == len(str(abs(x))) and fam.digits_exact(k), (form, n, k)
        u = fam.unit.expand()[0]  # ε = (u + v√D)/2: t = u/2 for x² − dy² (D = 4d), else u
        t = u // 2 if (fam.a, fam.b) == (1, 0) else u
        assert fam.unit_digits() == len(str(t)) and fam.unit_digits_exact()
