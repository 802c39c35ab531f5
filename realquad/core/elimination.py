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
elimination on the rows before it.

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

import heapq
import time
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

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
    """Structured Gaussian elimination with pivots ``±1``."""
    rows = [dict(r) for r in rows]
    steps: list[tuple[int, list[tuple[int, int]]]] = []
    zero: list[int] = []
    where: list[set[int]] = [set() for _ in range(n)]
    for i, r in enumerate(rows):
        for j in r:
            where[j].add(i)
    alive = set(range(len(rows)))
    top = [max(abs(x) for x in r.values()) for r in rows]  # upper bounds on the rows' entries
    active = [True] * n
    heap = [(len(where[j]), j) for j in range(n)]
    heapq.heapify(heap)
    log: list[tuple[int, dict[int, int]]] = []
    nonzeros = sum(len(r) for r in rows)
    clock = time.monotonic()
    while heap:
        w, c = heapq.heappop(heap)
        if not active[c] or len(where[c]) != w:
            if active[c]:
                heapq.heappush(heap, (len(where[c]), c))
            continue
        columns = n - len(log)
        if w > 1 and nonzeros > DENSITY_LIMIT * columns * len(alive):
            break
        best, size = -1, 0
        for i in where[c]:
            row = rows[i]
            if (row[c] == 1 or row[c] == -1) and (best < 0 or len(row) < size):
                best, size = i, len(row)
        if best < 0 or (w - 1) * (size - 1) > COST_LIMIT:
            continue  # back on the heap when one of its rows changes
        pivot = rows[best]
        for i in where[c]:
            if abs(rows[i][c]) * top[best] + top[i] > ENTRY_LIMIT:
                top[i] = max(abs(x) for x in rows[i].values())
        if w > 1 and any(
            abs(rows[i][c]) * top[best] + top[i] > ENTRY_LIMIT for i in where[c] if i != best
        ):
            continue
        eps = pivot[c]
        for j in pivot:
            where[j].discard(best)
        alive.discard(best)
        nonzeros -= len(pivot)
        updates: list[tuple[int, int]] = []
        steps.append((best, updates))
        for i in list(where[c]):
            row = rows[i]
            f = row[c] * eps
            updates.append((i, f))
            before, top[i] = len(row), top[i] + abs(f) * top[best]
            for j, x in pivot.items():
                y = row.get(j, 0) - f * x
                if y:
                    if j not in row:
                        where[j].add(i)
                    row[j] = y
                else:
                    row.pop(j, None)
                    where[j].discard(i)
            nonzeros += len(row) - before
            if not row:
                alive.discard(i)
                zero.append(i)
        active[c] = False
        log.append((c, pivot))
        for j in pivot:
            if active[j]:
                heapq.heappush(heap, (len(where[j]), j))
        if progress is not None and time.monotonic() - clock > 0.5:
            clock = time.monotonic()
            progress("columns eliminated", len(log), n)
    core_columns = [j for j in range(n) if active[j]]
    return Elimination(log, steps, rows, core_columns, sorted(alive), zero)


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
