"""The infrastructure kernels: compiled = pure twin, bit for bit, at every word size.

The twin (``realquad._kernels._pure``) is the reference: plain Python integers
of any size. The compiled kernels take D < 2¹⁰⁶; the tests run across the
word-size boundaries 2⁶², 2⁶⁴, 2¹⁰⁰ and 2¹⁰⁶ and on random ideals of the
principal cycle, and check the twin itself against the exact composition and
reduction of :class:`realquad.infrastructure.ideals.Cycle` (independent code:
gmpy2 extended gcds, exact multipliers).
"""

from __future__ import annotations

import math
import signal

import gmpy2
import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad._backend import pure
from realquad.core.integers import is_square
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.table import BabyStepTable, compiled_table

try:
    from realquad._kernels import _ckernels as compiled
except ImportError:  # pragma: no cover - depends on the build
    compiled = None

needs_compiled = pytest.mark.skipif(
    compiled is None or not compiled_table(5), reason="compiled kernels not in use"
)

#: Powers of 2 where the compiled arithmetic changes width, and the compiled limit.
BOUNDARIES = [1 << 62, 1 << 64, 1 << 100, 1 << 106]


def _discriminant(n: int) -> int:
    """The nearest discriminant at or above ``n`` that is not a square."""
    n = max(n, 5)
    while n % 4 not in (0, 1) or is_square(n):
        n += 1
    return n


def _field(D: int) -> tuple[int, int, float]:
    return D, math.isqrt(D), float(gmpy2.sqrt(gmpy2.mpfr(D, 80)))


def _ideal_after(D: int, steps: int) -> tuple[int, int]:
    """The reduced principal ideal ``steps`` baby steps from the order."""
    cyc = Cycle(D)
    ideal = cyc.principal
    for _ in range(steps):
        ideal = cyc.rho(*ideal)
    return ideal


#: Below the compiled limit (the twin alone serves beyond it).
LIMIT = (1 << 106) - 64

near_boundaries = (
    st.sampled_from(BOUNDARIES)
    .flatmap(lambda e: st.integers(e - (1 << 40), min(e + (1 << 40), LIMIT)))
    .map(_discriminant)
)
any_size = st.integers(5, LIMIT).map(_discriminant)
sizes = st.one_of(any_size, near_boundaries)


# -- baby steps ---------------------------------------------------------------------


@needs_compiled
@given(st.integers(5, (1 << 105) - 1).map(_discriminant), st.integers(0, 300))
@example(4 * 1000000000091, 5000)
@example((1 << 62) + 1, 10)  # one above a square: short cycles
@example(10**20 + 1, 200)
def test_baby_steps_agree(D: int, count: int) -> None:
    """The compiled baby steps give the twin's keys and distances bit for bit."""
    _, r, sq = _field(D)
    b = r if (r - D) % 2 == 0 else r - 1
    args = (D, r, sq, 1, b, 0.0, count)
    first = pure.infrastructure_baby_steps(*args)
    assert compiled.infrastructure_baby_steps(*args) == first
    if first[0]:  # resume from the last ideal reached, as the search does
        _keys, _dists, a, b, dist, _back = first
        again = (D, r, sq, a, b, dist, count)
        assert compiled.infrastructure_baby_steps(*again) == pure.infrastructure_baby_steps(*again)


@needs_compiled
def test_baby_steps_refuse_beyond_106_bits() -> None:
    D = (1 << 106) + 1
    with pytest.raises(OverflowError):
        compiled.infrastructure_baby_steps(D, math.isqrt(D), math.sqrt(D), 1, 1, 0.0, 3)


# -- the giant step -------------------------------------------------------------------


@given(sizes, st.integers(0, 80), st.integers(0, 80))
@example(4 * 1000000000091, 7, 7)  # equal ideals: the non-coprime composition
@example(pure.MAX_WORD_DISCRIMINANT - 2, 1, 50)
def test_twin_giant_step_is_composition_then_reduction(D: int, k1: int, k2: int) -> None:
    """The twin's fused step against Cycle.multiply + Cycle.reduce_exact (gmpy2, exact multipliers)."""
    cyc = Cycle(D)
    I1, I2 = _ideal_after(D, k1), _ideal_after(D, k2)
    d, a3, b3 = cyc.multiply(*I1, *I2)
    a, b, mu = cyc.reduce_exact(a3, b3)
    got = pure.infrastructure_giant_step(*_field(D), *I1, *I2)
    assert got[:2] == (a, b)
    exact = math.log(I1[0] * I2[0] / (d * a3)) + float(mu.log_abs_mpf(80))
    assert abs(got[2] - exact) < 1e-9 * (1 + abs(exact))


@needs_compiled
@given(sizes, st.integers(0, 80), st.integers(0, 80))
@example(4 * 1000000000091, 7, 7)
@example(pure.MAX_WORD_DISCRIMINANT - 2, 1, 50)
@example(_discriminant(1 << 64), 30, 30)
@example(_discriminant(1 << 100), 11, 60)
@example(_discriminant((1 << 106) - 1000), 40, 3)
def test_giant_steps_agree(D: int, k1: int, k2: int) -> None:
    """reduce(𝔞·𝔟) for ideals k1 and k2 baby steps from the order: the twin's result bit for bit."""
    I1, I2 = _ideal_after(D, k1), _ideal_after(D, k2)
    for x, y in [(I1, I2), (I1, I1), (I2, I2)]:
        args = (*_field(D), *x, *y)
        assert compiled.infrastructure_giant_step(*args) == pure.infrastructure_giant_step(*args)


@needs_compiled
@given(sizes, st.integers(0, 2**40))
def test_chained_giant_steps_agree(D: int, seed: int) -> None:
    """Thirty giant steps in a row from random ideals (large norms, any gcd): the same path."""
    I1 = _ideal_after(D, seed % 97)
    G = _ideal_after(D, (seed >> 8) % 89)
    field = _field(D)
    x = y = I1
    for _ in range(30):
        *x, cx = compiled.infrastructure_giant_step(*field, *x, *G)  # type: ignore[assignment]
        *y, cy = pure.infrastructure_giant_step(*field, *y, *G)  # type: ignore[assignment]
        assert (x, cx) == (y, cy)


@needs_compiled
def test_giant_step_refuses_beyond_106_bits() -> None:
    D = (1 << 106) + 1
    with pytest.raises(OverflowError):
        compiled.infrastructure_giant_step(D, math.isqrt(D), math.sqrt(D), 1, 1, 1, 1)


# -- the table and the search -----------------------------------------------------------


def _tables(D: int, steps: int) -> tuple[object, object, tuple[int, int, float, float, int]]:
    field = _field(D)
    a, b = Cycle(D).principal
    t_c = compiled.infrastructure_table_new(*field, 16)
    t_p = pure.infrastructure_table_new(*field, 16)
    out_c = compiled.infrastructure_table_extend(t_c, a, b, 0.0, 0.0, steps)
    out_p = pure.infrastructure_table_extend(t_p, a, b, 0.0, 0.0, steps)
    assert out_c == out_p
    return t_c, t_p, out_p


@needs_compiled
@given(sizes, st.integers(1, 3000))
@example(_discriminant(1 << 64), 2000)
@example(4 * 61, 100)  # the cycle closes: back = 1
def test_tables_agree(D: int, steps: int) -> None:
    """The same ideals, distances and end state; the same answers to lookups."""
    t_c, t_p, (a, b, hi, lo, back) = _tables(D, steps)
    n = compiled.infrastructure_table_size(t_c)[0]
    assert n == pure.infrastructure_table_size(t_p)[0] == len(t_p.index)  # type: ignore[attr-defined]
    cyc = Cycle(D)
    ideal, total = cyc.principal, 0.0
    # brute force: the cycle by Cycle.rho, its distances summed exactly
    for _ in range(min(steps, 200)):
        nxt = cyc.rho(*ideal)
        total = math.fsum([total, cyc.rho_log_float(*ideal, *nxt)])
        ideal = nxt
        if ideal == cyc.principal:
            break
        got = compiled.infrastructure_table_get(t_c, *ideal)
        assert got == pure.infrastructure_table_get(t_p, *ideal)
        assert got is not None and abs(got - total) <= 1e-12 * (1 + total)
        conj = cyc.conjugate(*ideal)
        assert compiled.infrastructure_table_get(
            t_c, ideal[0], conj
        ) == pure.infrastructure_table_get(t_p, ideal[0], conj)
    if steps <= 200:  # the walk above went all the way (to O, if the cycle closed)
        assert (a, b) == ideal


@needs_compiled
@given(sizes, st.integers(64, 2000), st.integers(0, 2**40), st.integers(1, 400))
@example(4 * 1000000000091, 1500, 12345, 400)
@example(_discriminant(1 << 100), 1000, 99, 300)
def test_giant_searches_agree(D: int, steps: int, seed: int, budget: int) -> None:
    """The compiled search ends where the twin's does, with the same sums, bit for bit."""
    t_c, t_p, (a_end, b_end, hi, _lo, back) = _tables(D, steps)
    if back:
        return
    start = _ideal_after(D, seed % 3000)
    field = _field(D)
    G = pure.infrastructure_giant_step(*field, a_end, b_end, a_end, b_end)
    s = 2 * hi + G[2]
    params = (s, -1e300, 1e300, 100.0, 0.5, 1e-9, 64 * math.log(D), (budget // 2) * s)
    seen_c: list[float] = []
    seen_p: list[float] = []
    got = compiled.infrastructure_giant_search(
        t_c, *start, G[0], G[1], *params, budget, seen_c.append
    )
    want = pure.infrastructure_giant_search(t_p, *start, G[0], G[1], *params, budget, seen_p.append)
    assert got == want and seen_c == seen_p


@needs_compiled
def test_table_refuses_beyond_106_bits_and_the_twin_takes_over() -> None:
    D = _discriminant((1 << 106) + 5)
    with pytest.raises(OverflowError):
        compiled.infrastructure_table_new(*_field(D), 16)
    assert not compiled_table(D) and compiled_table((1 << 106) - 1000)
    table = BabyStepTable(Cycle(D))
    table.extend(50.0)
    assert not table.compiled and len(table) > 20


# -- the search stops on Ctrl-C and reports progress ------------------------------------


def test_search_sees_ctrl_c() -> None:
    """SIGINT during the giant steps (no progress callback) ends the search with KeyboardInterrupt."""
    from realquad.infrastructure.regulator_search import search_regulator

    def interrupt(signum: int, frame: object) -> None:
        raise KeyboardInterrupt

    old = signal.signal(signal.SIGALRM, interrupt)
    try:
        signal.setitimer(signal.ITIMER_REAL, 0.5)
        with pytest.raises(KeyboardInterrupt):
            # a tiny table: the search would take minutes of giant steps
            search_regulator(10**24 + 49, 20, max_table=2048, estimate=1e9)
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


def test_progress_callback_can_stop_the_search() -> None:
    from realquad.infrastructure.regulator_search import search_regulator

    class Stop(Exception):
        pass

    seen: list[float] = []

    def progress(what: str, g: float, expected: float | None = None) -> None:
        assert what == "distance searched"
        seen.append(g)
        if len(seen) == 3:
            raise Stop

    with pytest.raises(Stop):
        search_regulator(10**24 + 49, 20, max_table=2048, estimate=1e9, progress=progress)
    assert seen == sorted(seen) and len(seen) == 3


def test_baby_steps_report_progress(monkeypatch: pytest.MonkeyPatch) -> None:
    import realquad.infrastructure.table as table_module

    monkeypatch.setattr(table_module, "PROGRESS_EVERY", 2)
    seen: list[float] = []
    table = BabyStepTable(Cycle(10**20 + 129))
    table.extend(20_000.0, lambda what, x: seen.append(x))
    assert len(seen) >= 4 and seen == sorted(seen) and seen[-1] <= table.distance
