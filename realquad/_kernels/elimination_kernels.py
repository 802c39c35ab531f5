"""Pure-Python twin of ``elimination_kernels.c``: structured Gaussian elimination of sparse rows.

The rules every twin keeps are in :mod:`realquad._kernels`.

The linear algebra of index calculus (:mod:`realquad.core.elimination`)
eliminates, with unimodular row operations, every column it can from a few
thousand to tens of thousands of sparse integer rows before the dense core is
handled modulo primes. Each pivot is an entry ``±1``; columns are taken
lightest first (a binary heap of ``(weight, column)`` with stale entries
skipped), the pivot of a column is its sparsest row with an entry ``±1``
(the smallest index among equals), and a column waits while its Markowitz cost
``(weight − 1)(pivot weight − 1)`` passes ``cost_limit`` or an updated entry
could pass ``entry_limit`` (tracked by an upper bound ``top[i]`` on each row's
entries, recomputed when it blocks); the elimination stops when the active
part is more than ``density`` filled.

References: B. A. LaMacchia and A. M. Odlyzko, "Solving large sparse linear
systems over finite fields", CRYPTO '90, LNCS 537 (1991); H. M. Markowitz,
*Management Sci.* 3 (1957).
"""

from __future__ import annotations

import heapq


def eliminate_rows(
    rows: list[dict[int, int]], n: int, entry_limit: int, cost_limit: int, density: float
) -> tuple[
    list[int],
    list[int],
    list[list[tuple[int, int]]],
    list[dict[int, int]],
    list[int],
    list[int],
    list[int],
]:
    """Eliminate ``±1`` pivots from ``rows`` (columns ``0 ≤ j < n``, nonzero entries).

    Returns ``(columns, pivots, updates, final, core_columns, core_rows, zero)``:
    pivot ``t`` eliminated column ``columns[t]`` with row ``pivots[t]`` and did
    ``rows[i] −= f·rows[pivot]`` for ``(i, f)`` in ``updates[t]`` (increasing
    ``i``); ``final`` holds every row at the end (keys increasing; a pivot row
    as it was when it served); the core is the columns still active and the
    rows neither pivots nor zero (both increasing); ``zero`` lists the rows that
    became zero, in order. A zero entry raises ``ValueError``, a column outside
    ``0 … n − 1`` ``IndexError``.

    Column 0 by row 0 (row 1 −= 3·row 0), then column 2 by row 2 (row 3 −= 3·row 2);
    column 1 is left, with rows 1 and 3:

    >>> rows = [{0: 1, 1: 2}, {0: 3, 1: 1}, {1: 5, 2: 1}, {2: 3}]
    >>> eliminate_rows(rows, 3, 2**16, 20000, 1.0)
    ([0, 2], [0, 2], [[(1, 3)], [(3, 3)]], [{0: 1, 1: 2}, {1: -5}, {1: 5, 2: 1}, {1: -15}], [1], [1, 3], [])
    """
    work: list[dict[int, int]] = []
    where: list[set[int]] = [set() for _ in range(n)]
    for i, r in enumerate(rows):
        row = {}
        for j, x in r.items():
            if x == 0:
                raise ValueError(f"row {i} has a zero entry in column {j}")
            if not 0 <= j < n:
                raise IndexError(f"column {j} of row {i} is outside 0 .. {n - 1}")
            row[j] = x
            where[j].add(i)
        work.append(row)
    alive = set(range(len(work)))
    top = [max((abs(x) for x in r.values()), default=0) for r in work]
    active = [True] * n
    heap = [(len(where[j]), j) for j in range(n)]
    heapq.heapify(heap)
    columns: list[int] = []
    pivots: list[int] = []
    updates: list[list[tuple[int, int]]] = []
    zero: list[int] = []
    nonzeros = sum(len(r) for r in work)
    while heap:
        w, c = heapq.heappop(heap)
        if not active[c] or len(where[c]) != w:
            if active[c]:
                heapq.heappush(heap, (len(where[c]), c))
            continue
        if w > 1 and nonzeros > density * (n - len(columns)) * len(alive):
            break
        best, size = -1, 0
        for i in where[c]:
            row = work[i]
            if (row[c] == 1 or row[c] == -1) and (best < 0 or (len(row), i) < (size, best)):
                best, size = i, len(row)
        if best < 0 or (w - 1) * (size - 1) > cost_limit:
            continue  # back on the heap when one of its rows changes
        pivot = work[best]
        for i in where[c]:
            if abs(work[i][c]) * top[best] + top[i] > entry_limit:
                top[i] = max(abs(x) for x in work[i].values())
        if w > 1 and any(
            abs(work[i][c]) * top[best] + top[i] > entry_limit for i in where[c] if i != best
        ):
            continue
        eps = pivot[c]
        for j in pivot:
            where[j].discard(best)
        alive.discard(best)
        nonzeros -= len(pivot)
        done: list[tuple[int, int]] = []
        for i in sorted(where[c]):
            row = work[i]
            f = row[c] * eps
            done.append((i, f))
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
        columns.append(c)
        pivots.append(best)
        updates.append(done)
        for j in pivot:
            if active[j]:
                heapq.heappush(heap, (len(where[j]), j))
    final = [dict(sorted(r.items())) for r in work]
    core_columns = [j for j in range(n) if active[j]]
    return columns, pivots, updates, final, core_columns, sorted(alive), zero
