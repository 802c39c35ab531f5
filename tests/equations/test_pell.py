"""Pell equations x² − dy² = N, N ∈ {1, −1, 4, −4}, against outside references."""

from __future__ import annotations

import math
import random

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad import InputError, pell
from realquad.core.integers import is_square
from realquad.core.orders import Order
from realquad.core.primes import factorize


def test_oeis_a002350_a002349(oeis):
    """x and y of the least solution of x² − ny² = 1: OEIS A002350 and A002349."""
    xs = oeis["A002350"]["terms"]  # OEIS A002350 (offset 1)
    ys = oeis["A002349"]["terms"]  # OEIS A002349 (offset 1)
    for n in range(1, min(len(xs), len(ys)) + 1):
        sol = pell(n)
        if is_square(n):
            # OEIS convention for squares: x = 1, y = 0.
            assert (xs[n - 1], ys[n - 1]) == (1, 0)
            assert (sol.x, sol.y) == (1, 0)
        else:
            assert (sol.x, sol.y) == (xs[n - 1], ys[n - 1]), n


def _sympy_least(d: int, N: int) -> tuple[int, int] | None:
    from sympy.solvers.diophantine.diophantine import diop_DN

    sols = [(abs(int(x)), abs(int(y))) for x, y in diop_DN(d, N)]
    sols = [s for s in sols if s[1] > 0]
    return min(sols, key=lambda t: (t[1], t[0])) if sols else None


def test_against_sympy_all_d_up_to_2000():
    """Reference library: sympy's diop_DN(d, ±1) for every non-square d ≤ 2000."""
    for d in range(2, 2001):
        if is_square(d):
            continue
        for N in (1, -1):
            ref = _sympy_least(d, N)
            sol = pell(d, N)
            if ref is None:
                assert not sol.solvable, (d, N)
            else:
                assert (sol.x, sol.y) == ref, (d, N)


def test_against_sympy_sample():
    """Quick sample of the full sympy comparison (sympy diop_DN)."""
    for d in list(range(2, 120)) + [409, 661, 991, 1000, 1997]:
        if is_square(d):
            continue
        for N in (1, -1):
            ref = _sympy_least(d, N)
            sol = pell(d, N)
            assert (ref is None) == (not sol.solvable), (d, N)
            if ref is not None:
                assert (sol.x, sol.y) == ref, (d, N)


def _brute_least(d: int, N: int, ymax: int) -> tuple[int, int] | None:
    for y in range(1, ymax + 1):
        x2 = N + d * y * y
        if x2 >= 0:
            x = math.isqrt(x2)
            if x * x == x2:
                return (x, y)
    return None


def test_brute_force_minimality():
    """Independent brute force over y: the answer is the least positive solution."""
    for d in range(2, 200):
        if is_square(d):
            continue
        for N in (1, -1, 4, -4):
            sol = pell(d, N)
            found = _brute_least(d, N, 3000)
            if sol.solvable:
                assert sol.x * sol.x - d * sol.y * sol.y == N
                if found is not None:
                    assert (sol.x, sol.y) == found, (d, N)
                else:
                    assert sol.y > 3000
            else:
                assert found is None, (d, N)


@given(st.integers(2, 10**12), st.sampled_from([1, -1, 4, -4]))
@example(1000000000091, 1)
@example(10**12 + 1, -1)  # period 1: d = k² + 1
@example(5, -4)
def test_solution_satisfies_equation(d, N):
    if is_square(d):
        return
    try:
        sol = pell(d, N, max_period=200_000)
    except Exception as exc:  # only the size refusal is acceptable
        assert type(exc).__name__ == "TooLargeError"
        return
    if sol.solvable:
        assert sol.x > 0 and sol.y > 0
        assert sol.x * sol.x - d * sol.y * sol.y == N
    # N = −1 solvable exactly when the period of the unit is odd (when the continued fraction ran;
    # beyond max_period the infrastructure decides from the norm of the unit)
    if N == -1 and sol.period_length is not None:
        assert sol.solvable == (sol.period_length % 2 == 1)


def test_known_small_cases():
    assert (pell(61).x, pell(61).y) == (1766319049, 226153980)  # OEIS A002350/A002349, n = 61
    assert (pell(61, -1).x, pell(61, -1).y) == (
        29718,
        3805,
    )  # 29718² − 61·3805² = −1, checked below
    assert 29718**2 - 61 * 3805**2 == -1
    assert (pell(13, -4).x, pell(13, -4).y) == (3, 1)  # 9 − 13 = −4
    assert (pell(5, 4).x, pell(5, 4).y) == (3, 1)  # 9 − 5 = 4
    assert not pell(3, -1).solvable  # −1 is not a square mod 3
    assert not pell(
        34, -1
    ).solvable  # period of √34 is even (4), though −1 is a square mod 34... by brute force above
    assert not pell(7, -4).solvable


def test_k_th_solutions_and_iterator():
    s = pell(2)
    assert [s.solution(k) for k in range(0, 4)] == [(1, 0), (3, 2), (17, 12), (99, 70)]
    it = s.solutions()
    assert [next(it) for _ in range(3)] == [(3, 2), (17, 12), (99, 70)]
    neg = pell(2, -1)
    assert [neg.solution(k) for k in (1, 2, 3)] == [(1, 1), (7, 5), (41, 29)]
    for x, y in [neg.solution(k) for k in (1, 2, 3)]:
        assert x * x - 2 * y * y == -1
    four = pell(5, 4)
    sols = [four.solution(k) for k in range(1, 6)]
    assert all(x * x - 5 * y * y == 4 for x, y in sols)
    # every solution of x² − 5y² = 4 with y ≤ 2000, by brute force, appears in order
    brute = [(math.isqrt(4 + 5 * y * y), y) for y in range(1, 2001) if is_square(4 + 5 * y * y)]
    gen = four.solutions()
    listed = []
    while True:
        t = next(gen)
        if t[1] > 2000:
            break
        listed.append(t)
    assert listed == brute


def test_d_not_congruent_for_norm_four():
    # d ≡ 2, 3 (mod 4): solutions of ±4 are twice those of ±1
    for d in (2, 3, 6, 7, 10, 11, 14):
        s1, s4 = pell(d, 1), pell(d, 4)
        assert (s4.x, s4.y) == (2 * s1.x, 2 * s1.y)


def test_square_d_finite():
    s = pell(9, 1)
    assert s.solvable and (s.x, s.y) == (1, 0) and s.finite_solutions == [(1, 0)]
    assert "perfect square" in s.reason
    assert pell(1, -1).finite_solutions == [(0, 1)]  # 0 − 1 = −1
    assert not pell(4, -1).solvable
    assert pell(4, -4).finite_solutions == [(0, 1)]


@pytest.mark.parametrize("bad", [0, "x", "2.5", True])
def test_bad_d(bad):
    with pytest.raises(InputError):
        pell(bad)


@pytest.mark.parametrize("d", [-1, -2, -5, -7, -163])
@pytest.mark.parametrize("norm", [1, -1, 4, -4])
def test_negative_d_has_the_finite_answer(d, norm):
    # x² + |d|y² = N: brute force over the box |x|, |y| ≤ 2 (it holds every solution for N ≤ 4)
    sol = pell(d, norm)
    brute = sorted(
        {(x, y) for x in range(0, 3) for y in range(0, 3) if x * x - d * y * y == norm},
        key=lambda t: (t[1], t[0]),
    )
    assert sol.finite_solutions == brute and sol.solvable == bool(brute)
    if sol.solvable:
        assert sol.x * sol.x - d * sol.y * sol.y == norm


@pytest.mark.parametrize("norm", [0, 2, -2, 3, 5, 16])
def test_bad_norm(norm):
    with pytest.raises(InputError):
        pell(7, norm)


# -- beyond the continued fraction: the infrastructure decides, the solution stays compact -------


#: ``pell`` takes the infrastructure path only where its giant steps run compiled
giant_steps_compiled = pytest.mark.skipif(
    __import__("realquad._backend")._backend.BACKEND != "compiled",
    reason="pell uses the infrastructure where its giant steps run compiled (the pure twin would take minutes)",
)


@giant_steps_compiled
def test_large_d_decided_by_the_infrastructure() -> None:
    # d ≈ 10³⁰: the continued fraction is hopeless; the norm of ε (compact) decides N = −1
    d = 10**30 + 57
    minus = pell(d, -1)
    plus = pell(d, 1)
    assert minus.method == plus.method == "infrastructure baby-step giant-step"
    assert minus.proof == "unconditional"
    if minus.solvable:  # x + y√d = ε, and x² − dy² = −1 modulo several primes
        for m in (10**9 + 7, 998244353, 2**61 - 1):
            X, Y = minus.compact.modulo(m)
            # compact numbers are (u + v√D)/2 with D = 4d: x = u/2, y = v
            x, y = X % m, (2 * Y) % m
            assert (x * x - d * y * y + 1) % m == 0
        assert (
            plus.digits is not None and plus.digits > 2 * minus.digits - 2
        )  # ε² has twice the digits
    else:
        assert "norm +1" in minus.reason


def test_compact_solutions_agree_with_the_continued_fraction() -> None:
    # d where both methods run: the digit count of the compact solution (from the regulator)
    # equals that of the continued fraction's expanded solution (counted by gmpy2)
    import importlib

    from realquad.core.orders import Order
    from realquad.textio import decimal_digits
    from realquad.units import fundamental_unit

    pell_module = importlib.import_module("realquad.equations.pell")
    for d in (1000000007, 1000000009, 999999937):
        for n in (1, -1):
            expanded = pell(d, n)
            if not expanded.solvable:
                continue
            unit = fundamental_unit(Order(4 * d), "bsgs")
            compact = pell_module.PellSolution(
                d, n, True, None, None, None, unit.method, _unit=unit
            )
            pell_module._count_digits(compact, unit)
            assert compact.digits == decimal_digits(expanded.x) and compact.digits_exact


def _forced_compact(d: int, n: int, monkeypatch: pytest.MonkeyPatch):
    """The solution as the infrastructure leaves it for huge d: compact, never expanded."""
    import importlib

    pell_module = importlib.import_module("realquad.equations.pell")
    monkeypatch.setattr(pell_module, "MAX_EXPANDED_DIGITS", 0)
    return pell_module.pell(d, n, max_period=10)


@giant_steps_compiled
def test_residues_and_leading_digits_of_compact_solutions(monkeypatch: pytest.MonkeyPatch) -> None:
    # independent check: the continued fraction's expanded solution, reduced and cut by Python itself
    rng = random.Random(20261202)
    checked = 0
    for d in rng.sample(range(2, 10**7), 25):
        for n in (1, -1, 4, -4):
            full = pell(d, n)
            if not full.solvable or full.x is None:
                continue
            compact = _forced_compact(d, n, monkeypatch)
            assert compact.x is None and compact.compact is not None
            for m in (10**9 + 7, 999983, 2**61 - 1):
                assert compact.residues(m) == (full.x % m, full.y % m)
            assert compact.leading_digits(8) == (str(full.x)[:8], str(full.y)[:8])
            checked += 1
    assert checked >= 20


@giant_steps_compiled
def test_residues_for_moduli_sharing_the_denominators(monkeypatch: pytest.MonkeyPatch) -> None:
    # moduli with the primes of 2 and of the compact factors' denominators (reduced p-adically),
    # against the continued fraction's expanded solution reduced by Python itself
    rng = random.Random(20261203)
    checked = 0
    for d in [1000003, *rng.sample(range(2, 10**6), 8)]:
        for n in (1, -1, 4, -4):
            full = pell(d, n)
            if not full.solvable or full.x is None:
                continue
            compact = _forced_compact(d, n, monkeypatch)
            assert compact.compact is not None
            primes = {
                p
                for chain in compact.compact.chains
                for a, _ in chain.factors
                for p in factorize(int(a.c))
            }
            moduli = [
                2**20,
                10**9,
                3**15,
                2 * 3 * 5 * 7 * 11 * 13,
                *(p**6 for p in sorted(primes)[:6]),
            ]
            for m in moduli:
                assert compact.residues(m) == (full.x % m, full.y % m), (d, n, m)
            checked += 1
    assert checked >= 10


@giant_steps_compiled
def test_leading_digits_at_10_to_the_30() -> None:
    # x = y·√d·(1 + O(ε⁻²)) exactly, and √d = 10¹⁵·(1 + 28.5·10⁻³⁰ + …): the two prefixes
    # computed from x and y separately, must satisfy x₄₀² · 10³⁰ ≈ y₄₀² · d to truncation error
    # (relative 10⁻³⁹; equal prefixes would miss by a relative 5.7·10⁻²⁹)
    d = 10**30 + 57
    s = pell(d, -1)
    lead = s.leading_digits(40)
    assert lead is not None and len(lead[0]) == len(lead[1]) == 40
    x40, y40 = int(lead[0]), int(lead[1])
    assert abs(x40**2 * 10**30 - y40**2 * d) <= 10**72
    with pytest.raises(InputError):
        s.leading_digits(0)


def _evaluator_from_the_docs():
    """The pure-Python evaluator printed in docs/pell.md (*Compact files*), run as a reader would."""
    import pathlib
    import re

    page = (pathlib.Path(__file__).parents[2] / "docs" / "pell.md").read_text(encoding="utf-8")
    code = re.search(r"```python\n(def evaluate.*?)```", page, re.S)
    assert code is not None
    namespace: dict = {}
    exec(code.group(1), namespace)
    return namespace["evaluate"]


@giant_steps_compiled
def test_compact_files_evaluate_to_the_solution(monkeypatch: pytest.MonkeyPatch) -> None:
    # independent check: the continued fraction's expanded solution
    evaluate = _evaluator_from_the_docs()
    rng = random.Random(7)
    checked = 0
    for d in rng.sample(range(10**6, 10**7), 12):
        for n in (1, -1, 4, -4):
            full = pell(d, n)
            if not full.solvable or full.x is None:
                continue
            compact = _forced_compact(d, n, monkeypatch)
            if compact.compact is None:  # the search met the unit among its baby steps
                continue
            text = compact.compact_file()
            assert evaluate(text) == (full.x, full.y)
            m = 2**61 - 1
            assert evaluate(text, m) == (full.x % m, full.y % m)
            checked += 1
    assert checked >= 10
    with pytest.raises(InputError):
        pell(61).compact_file()


@giant_steps_compiled
def test_compact_file_at_10_to_the_30_checks_modulo_primes() -> None:
    evaluate = _evaluator_from_the_docs()
    d = 10**30 + 57
    solution = pell(d, -1)
    text = solution.compact_file()
    for m in (10**9 + 7, 2**61 - 1):
        x, y = evaluate(text, m)
        assert (x * x - d * y * y + 1) % m == 0 and (x, y) == solution.residues(m)


#: OEIS A003814, numbers d such that x² − dy² = −1 is solvable, the terms 2 … 197 (from memory;
#: the test checks them against the parity of the period of √d computed here as well).
A003814 = [2, 5, 10, 13, 17, 26, 29, 37, 41, 50, 53, 58, 61, 65, 73, 74, 82, 85, 89, 97, 101]
A003814 += [106, 109, 113, 122, 125, 130, 137, 145, 149, 157, 170, 173, 181, 185, 193, 197]


def _odd_period(d: int) -> bool:
    """Whether the continued fraction of √d has an odd period (a loop written here)."""
    a0 = math.isqrt(d)
    m, q, a, n = 0, 1, a0, 0
    while True:
        m = a * q - m
        q = (d - m * m) // q
        a = (a0 + m) // q
        n += 1
        if a == 2 * a0:
            return n % 2 == 1


@giant_steps_compiled
def test_oeis_a003814_by_both_paths() -> None:
    # x² − dy² = −1 solvable for d < 200: the continued fraction's answer, the infrastructure's
    # (the unit's norm, never expanded) and the period parity all give OEIS A003814
    nonsquares = [d for d in range(2, 200) if not is_square(d)]
    assert [d for d in nonsquares if _odd_period(d)] == A003814
    assert [d for d in nonsquares if pell(d, -1).solvable] == A003814
    from realquad.units import fundamental_unit

    # the infrastructure's decision, as pell takes it beyond the continued fraction: the norm
    # of the fundamental unit of Z[√d] found by baby-step giant-step
    by_search = [d for d in nonsquares if fundamental_unit(Order(4 * d), "bsgs").norm == -1]
    assert by_search == A003814
    forced = pell(61, -1, max_period=5)  # period 11 > 5: the infrastructure decides
    assert forced.method == "infrastructure baby-step giant-step" and forced.solvable
