"""The compiled elimination kernel against its pure twin, and both against the definition.

``eliminate_rows`` must return exactly the twin's tuple (the same pivots in
the same order, the same updates, final rows, core and zero rows) or raise
``OverflowError`` beyond its range (then :func:`realquad._backend.call_kernel`
runs the twin). The references: the pure twin on random inputs (hypothesis)
and on the relation matrix of a field; the definition of the steps checked in
plain integers: replaying the logged updates on the input rows gives the final
rows, each pivot row has ``±1`` in its column, no row left in the core has an
entry in an eliminated column, and the zero rows are zero. The compiled
comparisons are skipped when the extension is not built.
"""

from __future__ import annotations

import random

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import COMPILED, call_kernel, kernels, pure
from tests.benchmarks.bench_lattice import kernel_instance

needs_compiled = pytest.mark.skipif(
    "eliminate_rows" not in COMPILED, reason="compiled kernels not built or REALQUAD_PURE set"
)

LIMITS = (2**16, 20_000)


def _same(rows, n, entry_limit=LIMITS[0], cost_limit=LIMITS[1], density=0.25):
    """The compiled result equals the twin's (reference: the pure twin), or the kernel declines."""
    want = pure.eliminate_rows(rows, n, entry_limit, cost_limit, density)
    if "eliminate_rows" in COMPILED:
        try:
            got = kernels.eliminate_rows(rows, n, entry_limit, cost_limit, density)
        except OverflowError:
            got = want
        assert got == want
    assert call_kernel("eliminate_rows", rows, n, entry_limit, cost_limit, density) == want
    return want


def check_definition(rows, n, out) -> None:
    """The steps, replayed on the input rows in plain integers, give the final rows."""
    columns, pivots, updates, final, core_columns, core_rows, zero = out
    work = [dict(r) for r in rows]
    for c, p, done in zip(columns, pivots, updates, strict=True):
        assert work[p][c] in (1, -1)
        for i, f in done:
            for j, x in work[p].items():
                y = work[i].get(j, 0) - f * x
                if y:
                    work[i][j] = y
                else:
                    work[i].pop(j, None)
            assert c not in work[i]
    assert work == final
    eliminated = set(columns)
    assert sorted(set(range(n)) - eliminated) == core_columns
    assert not set(core_rows) & set(pivots) and not set(core_rows) & set(zero)
    assert set(core_rows) | set(pivots) | set(zero) == set(range(len(rows)))
    for i in core_rows:
        assert final[i] and not set(final[i]) & eliminated
    for i in zero:
        assert final[i] == {}


@st.composite
def sparse_rows(draw, max_n: int = 30):
    n = draw(st.integers(1, max_n))
    m = draw(st.integers(0, 45))
    entry = st.one_of(st.sampled_from([1, -1, 1, -1, 2, -2, 3]), st.integers(-(2**20), 2**20))
    rows = []
    for _ in range(m):
        support = draw(st.lists(st.integers(0, n - 1), min_size=1, max_size=6, unique=True))
        rows.append({j: x for j in support if (x := draw(entry))} or {support[0]: 1})
    return rows, n


@settings(max_examples=300, deadline=None)
@given(sparse_rows(), st.sampled_from([0.25, 0.5, 1.0]), st.sampled_from([2**16, 2**8, 2**62]))
def test_random_rows_against_the_twin_and_the_definition(case, density, entry_limit) -> None:
    rows, n = case
    out = _same(rows, n, entry_limit, LIMITS[1], density)
    check_definition(rows, n, out)


@pytest.mark.parametrize("n", [300, 2000])
def test_relation_like_matrices(n: int) -> None:
    """Rows drawn in the kernel of random images (the lattice benchmark's builder)."""
    rows = kernel_instance(n, n)
    out = _same(rows, n)
    check_definition(rows, n, out)
    assert len(out[0]) > n // 2  # most columns go


def test_the_relation_matrix_of_a_field() -> None:
    from realquad.core.orders import Order
    from realquad.relations.system import index_calculus

    found = index_calculus(Order(-(10**30 + 99)))  # 10³⁰ + 99 is prime (sympy)
    rows, n = found.matrix.rows, len(found.matrix.columns)
    out = _same(rows, n)
    check_definition(rows, n, out)


def test_limits_and_bad_input() -> None:
    rows = [{0: 1, 1: 2**40}, {0: 3, 1: 1}, {1: 5}]
    blocked = _same(rows, 2, 2**16, LIMITS[1], 1.0)  # the update would pass the entry limit
    assert blocked[0] == [] and blocked[4] == [0, 1]  # both columns wait: nothing eliminated
    huge = [{0: 1, 1: 2**70}, {0: 3}]
    want = pure.eliminate_rows(huge, 2, 2**80, LIMITS[1], 1.0)
    assert call_kernel("eliminate_rows", huge, 2, 2**80, LIMITS[1], 1.0) == want
    for bad, error in (([{0: 0}], ValueError), ([{2: 1}], IndexError), ([{-1: 1}], IndexError)):
        with pytest.raises(error):
            pure.eliminate_rows(bad, 2, *LIMITS, 0.25)
        with pytest.raises(error):
            call_kernel("eliminate_rows", bad, 2, *LIMITS, 0.25)


@needs_compiled
def test_compiled_declines_beyond_its_range() -> None:
    with pytest.raises(OverflowError):
        kernels.eliminate_rows([{0: 2**63}], 1, *LIMITS, 0.25)
    with pytest.raises(OverflowError):
        kernels.eliminate_rows([{0: 1}], 1, 2**63, LIMITS[1], 0.25)
    with pytest.raises(TypeError):
        kernels.eliminate_rows([[1]], 1, *LIMITS, 0.25)


def test_input_rows_are_not_changed() -> None:
    rng = random.Random(3)
    rows = [{j: rng.choice([1, -1, 2]) for j in rng.sample(range(20), 3)} for _ in range(25)]
    copy = [dict(r) for r in rows]
    _same(rows, 20, density=1.0)
    assert rows == copy
