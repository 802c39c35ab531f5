"""Structured Gaussian elimination of sparse integer rows by unimodular steps.

The first stage of :mod:`realquad.core.lattice` (quotient, kernel and
membership of the lattice spanned by many sparse rows): a column with an
entry ``±1`` is eliminated with the sparsest such row as pivot (the row
expresses the column through the others); columns are taken lightest first
(singletons cost nothing), a pivot whose Markowitz cost ``(column weight −
1)(row weight − 1)`` (Markowitz 1957) passes ``COST_LIMIT`` or that would make
an entry pass ``ENTRY_LIMIT`` waits, and the elimination stops when a quarter
of the active part is filled. The row operations are unimodular, so the
remaining *core* spans, with the pivot rows, the same lattice; they are
logged, and :func:`replay` rewrites a combination of the rows after
elimination on the rows before it. The elimination runs in the kernel
``eliminate_rows`` (``realquad/_kernels/elimination_kernels.c``, with its
pure twin, the same steps: ties between pivots go to the smaller row index).

>>> rows = [{0: 1, 1: 2}, *({j: 3, j + 1: 1} for j in range(1, 9)), {9: 5}, {0: 2}]
>>> E = eliminate(rows, 10, None)
>>> E.log[0], E.steps[0], E.rows[10]       # column 0 by row 0: row 10 −= 2·row 0
((0, {0: 1, 1: 2}), (0, [(10, 2)]), {1: -4})
>>> E.columns, E.core                      # the core: its columns and rows
([1, 5, 6, 7, 8, 9], [4, 5, 6, 7, 8, 9, 10])
>>> replay(E.steps, [{10: 1}])             # row 10 now is row 10 − 2·row 0 of the input
[{10: 1, 0: -2}]

References: B. A. LaMacchia and A. M. Odlyzko, "Solving large sparse linear
systems over finite fields", CRYPTO '90, LNCS 537 (1991); H. M. Markowitz,
"The elimination form of the inverse and its application to linear
programming", *Management Sci.* 3 (1957).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from realquad._backend import call_kernel
from realquad.core.progress import Progress
from realquad.errors import InputError


def normalised_rows(
    rows: Sequence[Mapping[int, int]], n: int
) -> tuple[list[dict[int, int]], list[int], list[dict[int, int]]]:
    """The nonzero rows without zero entries, each once up to sign; checks the column range.

    Also the original index of each row kept, and the kernel vectors of the rows
    left out: ``{i: 1}`` for a zero row, ``{i: 1, j: ∓1}`` for a repeat of row ``j``.
    """
    seen: dict[tuple[tuple[int, int], ...], int] = {}
    out: list[dict[int, int]] = []
    origin: list[int] = []
    trivial: list[dict[int, int]] = []
    for i, row in enumerate(rows):
        clean = {}
        for j, x in row.items():
            j, x = int(j), int(x)
            if not 0 <= j < n:
                raise InputError(f"column {j} is outside 0 … {n - 1}")
            if x:
                clean[j] = x
        if not clean:
            trivial.append({i: 1})
            continue
        key = tuple(sorted(clean.items()))
        sign = 1
        if key[0][1] < 0:
            key, sign = tuple((j, -x) for j, x in key), -1
        if key in seen:
            first = seen[key]
            trivial.append({i: 1, origin[first]: -sign * _sign_of(out[first])})
        else:
            seen[key] = len(out)
            out.append(clean)
            origin.append(i)
    return out, origin, trivial


def _sign_of(row: Mapping[int, int]) -> int:
    """The sign of the entry in the smallest column."""
    return 1 if row[min(row)] > 0 else -1


# -- structured Gaussian elimination ---------------------------------------------------------

#: Entries of at most this size after an elimination step (the core stays cheap to lift).
ENTRY_LIMIT = 2**16
#: Largest Markowitz cost of a pivot, and the density of the active part where elimination stops.
COST_LIMIT = 20_000
DENSITY_LIMIT = 0.25


@dataclass
class Elimination:
    """What structured Gaussian elimination leaves.

    ``log``: (column, pivot row) in order; ``steps``: (pivot row's index, [(row ``i``,
    factor ``f``), …]) for ``rows[i] −= f·rows[pivot]``; ``rows``: the rows at the
    end; ``columns``, ``core``: the core's columns and rows (indices); ``zero``:
    the rows that became zero.
    """

    log: list[tuple[int, dict[int, int]]]
    steps: list[tuple[int, list[tuple[int, int]]]]
    rows: list[dict[int, int]]
    columns: list[int]
    core: list[int]
    zero: list[int]


def eliminate(rows: list[dict[int, int]], n: int, progress: Progress | None) -> Elimination:
    """Structured Gaussian elimination with pivots ``±1`` (the kernel ``eliminate_rows``).

    ``rows`` (nonzero entries, as :func:`normalised_rows` leaves them) are not
    changed; ``progress`` hears ``("columns eliminated", count, n)`` at the end.
    """
    columns, pivots, updates, final, core_columns, core_rows, zero = call_kernel(
        "eliminate_rows", rows, n, ENTRY_LIMIT, COST_LIMIT, DENSITY_LIMIT
    )
    if progress is not None:
        progress("columns eliminated", len(columns), n)
    log = [(c, final[i]) for c, i in zip(columns, pivots, strict=True)]
    steps = list(zip(pivots, updates, strict=True))
    return Elimination(log, steps, final, core_columns, core_rows, zero)


def replay(
    steps: list[tuple[int, list[tuple[int, int]]]], vectors: list[dict[int, int]]
) -> list[dict[int, int]]:
    """Combinations of the rows after elimination rewritten on the rows before it.

    A step ``rows[i] −= f·rows[pivot]`` read backwards moves ``−f·y[i]`` onto ``y[pivot]``.
    """
    state: dict[int, dict[int, int]] = {}  # row ↦ {vector: coefficient}
    for v, vector in enumerate(vectors):
        for i, x in vector.items():
            state.setdefault(i, {})[v] = x
    for pivot, updates in reversed(steps):
        target: dict[int, int] | None = None
        for i, f in updates:
            here = state.get(i)
            if here:
                if target is None:
                    target = state.setdefault(pivot, {})
                for v, x in here.items():
                    target[v] = target.get(v, 0) - f * x
    out: list[dict[int, int]] = [{} for _ in vectors]
    for i, here in state.items():
        for v, x in here.items():
            if x:
                out[v][i] = x
    return out
