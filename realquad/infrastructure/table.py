"""The baby-step table: the reduced principal ideals near ``O``, with their distances.

Baby steps walk the principal cycle from ``O`` and store every reduced ideal
``(a, b)`` passed with its distance; giant steps then look themselves up in
it. Both loops run in the kernels (``infrastructure_table_*`` and
``infrastructure_giant_search``): compiled, the table is an open-addressing
hash table of 24 bytes a slot and the loops never return to Python per step;
the pure twin keeps a dict and does the same steps in the same order, so
both give the same ideals and the same distances, bit for bit. The compiled
kernels take ``D < 2¹⁰⁶``; beyond, the twin serves.

Distances are carried as unevaluated sums of two doubles, so the running
sum of ``n`` baby steps is off only by the rounding of each step's
logarithm (at most ``4·log D`` ulp each), not by ``n`` roundings of a
large sum: :attr:`BabyStepTable.sum_error` bounds it. Each stored distance
is that sum rounded to one double (:attr:`BabyStepTable.error`).

>>> from realquad.infrastructure.ideals import Cycle, giant_step_float
>>> cyc = Cycle(4 * (10**9 + 7))
>>> table = BabyStepTable(cyc)
>>> table.extend(200.0)
>>> len(table) > 100, table.lookup(*cyc.principal)
(True, 0.0)
>>> a, b, d = table.ideal_below(100.0)
>>> abs(table.lookup(a, b) - d) < 1e-9 and d <= 100.0
True

Memory: :data:`MEMORY_BUDGET` bytes by default; :func:`max_ideals` turns it
into a number of ideals (about 46 million compiled for 2 GiB).
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass
from functools import partial
from types import ModuleType, SimpleNamespace
from typing import Any

from realquad._backend import COMPILED, kernels, pure
from realquad.core.progress import Progress
from realquad.infrastructure.ideals import Cycle, giant_step_float

#: Bytes the baby-step table may take (the compiled table's slots; the twin's dict estimated).
MEMORY_BUDGET = 2 << 30

#: Bytes a stored ideal costs in the twin's dict (entry, int key, float value), roughly.
_BYTES_PURE = 130.0

_ULP = 2.0**-52

#: Baby steps between two kept checkpoints.
CHECKPOINT = 1024

#: Checkpoints between two calls of the baby steps' progress callback (about a million steps).
PROGRESS_EVERY = 1024

_TABLE_KERNELS = (
    "infrastructure_table_new",
    "infrastructure_table_size",
    "infrastructure_table_get",
    "infrastructure_table_extend",
    "infrastructure_giant_search",
)


def _kernels_for(D: int) -> ModuleType | SimpleNamespace:
    """The compiled table kernels when they are built and take ``D``, else the twin's."""
    if all(name in COMPILED for name in _TABLE_KERNELS) and D < 1 << 106:
        return kernels
    return pure


def compiled_table(D: int) -> bool:
    """Whether a table for ``D`` runs on the compiled kernels."""
    return _kernels_for(D) is not pure


def max_ideals(budget: int = MEMORY_BUDGET, D: int = 5) -> int:
    """The number of ideals a table for ``D`` may hold within ``budget`` bytes.

    >>> max_ideals(2 << 30) in (46_974_156, 16_519_104)  # compiled (24-byte slots), or the dict
    True
    """
    if compiled_table(D):
        # slots come in powers of 2 and are filled to 70 %; a table stops within CHECKPOINT
        # ideals past its cap, so that much room is left
        slots = 1 << max(12, int(budget // 24).bit_length() - 1)
        return int(0.7 * slots) - 2 * CHECKPOINT
    return int(budget / _BYTES_PURE)


@dataclass(frozen=True)
class Hit:
    """What a giant-step search ended on (see :meth:`BabyStepTable.search`).

    ``status``: ``"budget"`` (nothing found in the steps allowed), ``"direct"``
    (``(a, b)`` is in the table at distance ``found``), ``"conjugate"`` (its
    conjugate is), ``"stop"`` (past the stopping distance). ``distance`` is
    ``base + steps·s + C``; ``C_error`` bounds the rounding of ``C``.
    """

    status: str
    a: int
    b: int
    steps: int
    C: float
    C_error: float
    found: float
    distance: float


_STATUS = {0: "budget", 1: "direct", 2: "conjugate", 3: "stop"}


class BabyStepTable:
    """Baby steps from ``O``: every reduced principal ideal with distance in ``[0, δ_B]``.

    ``capacity`` is the number of ideals to make room for at once (the table
    grows as needed); :meth:`extend` stops once ``max_ideals`` are stored
    (overshooting by less than :data:`CHECKPOINT`). ``distance`` is ``δ_B``
    (the last ideal stored; ``distance + low`` is the unrounded sum); every
    :data:`CHECKPOINT`-th ideal is also kept with its distance, to build giant
    steps from; ``period`` is ``R`` when ``O`` came back during the baby steps.
    """

    def __init__(self, cycle: Cycle, capacity: int = 0, max_ideals: int | None = None) -> None:
        self.cycle = cycle
        self.max_ideals = max_ideals
        D = cycle.discriminant
        self.ops: Any = _kernels_for(D)
        self.handle = self.ops.infrastructure_table_new(D, cycle.root, cycle.sqrt_float, capacity)
        a, b = cycle.principal
        self.checkpoints: list[tuple[int, int, float]] = [(a, b, 0.0)]
        self._lows = [0.0]  # the low parts of the checkpoints' distances
        self.a, self.b, self.distance, self.low = a, b, 0.0, 0.0
        self.sum_error = 0.0  # bound on the error of distance + low
        self.error = 0.0  # bound on the error of every stored distance
        self.period: float | None = None

    @property
    def compiled(self) -> bool:
        """Whether the compiled kernels hold this table."""
        return self.ops is not pure

    def extend(self, limit: float, progress: Progress | None = None) -> None:
        """Baby steps until the last stored distance is at least ``limit``.

        ``progress`` hears the distance reached every
        :data:`PROGRESS_EVERY` checkpoints (about a million steps).
        """
        a, b, hi, lo = self.a, self.b, self.distance, self.low
        extend, handle = self.ops.infrastructure_table_extend, self.handle
        checkpoints, lows = self.checkpoints, self._lows
        cap = math.inf if self.max_ideals is None else self.max_ideals
        while hi < limit and len(self) < cap:
            a, b, hi, lo, back = extend(handle, a, b, hi, lo, CHECKPOINT)
            if back:
                self.period = hi
                break
            checkpoints.append((a, b, hi))
            lows.append(lo)
            if progress is not None and len(checkpoints) % PROGRESS_EVERY == 0:
                progress("distance searched", hi)
        self.a, self.b, self.distance, self.low = a, b, hi, lo
        n, log_D = len(self), math.log(self.cycle.discriminant)
        # each step: its log with error ≤ 4·log D ulp; the double-double sum ≤ ulp²·δ_B
        self.sum_error = n * _ULP * (4 * log_D + _ULP * hi)
        self.error = self.sum_error + _ULP * hi  # a stored distance is the sum rounded once

    def __len__(self) -> int:
        return int(self.ops.infrastructure_table_size(self.handle)[0])

    def lookup(self, a: int, b: int) -> float | None:
        """The stored distance of the reduced ideal ``(a, b)`` (``b`` normalised), or ``None``."""
        return self.ops.infrastructure_table_get(self.handle, a, b)  # type: ignore[no-any-return]

    def _below(self, x: float) -> tuple[int, int, list[float]]:
        """The last stored ideal with distance ``≤ x``: ``(a, b, parts)``, distance ``= Σ parts``."""
        c = self.cycle
        i = bisect.bisect_right(self.checkpoints, x, key=lambda p: p[2]) - 1  # distances increase
        if i < 0:  # pragma: no cover - callers ask for 0 ≤ x
            raise ValueError("distance below the order's")
        a, b, hi = self.checkpoints[i]
        lo = self._lows[i]
        parts = [hi, lo]
        dist = hi
        while True:
            a1, b1 = c.rho(a, b)
            step = c.rho_log_float(a, b, a1, b1)
            if dist + step > x or a1 == 1:
                return a, b, parts
            a, b = a1, b1
            parts.append(step)
            dist += step  # for the decisions only: the distance is math.fsum(parts)

    def ideal_below(self, x: float) -> tuple[int, int, float]:
        """The last stored ideal with distance ``≤ x``, with its distance (``0 ≤ x ≤ δ_B``)."""
        a, b, parts = self._below(x)
        return a, b, math.fsum(parts)

    def giant(self, margin: float) -> GiantIdeal:
        """``G₁ = reduce(L_B·L_m)`` with ``δ(L_m) ≤ δ_B − margin``, ``s = δ(G₁) ≈ 2δ_B − margin``."""
        c = self.cycle
        am, bm, parts = self._below(self.distance - margin)
        walked = len(parts) - 2
        a, b, shift = giant_step_float(c.discriminant, c.root, c.sqrt_float, self.a, self.b, am, bm)
        parts += [self.distance, self.low, shift]
        # up to 32 baby steps back, prefer a norm with no prime factor below 17: most giant
        # steps then compose coprime norms (the fast Chinese-remainder case)
        back: list[float] = []
        a1, b1 = a, b
        for _ in range(32):
            if math.gcd(a1, 30030) == 1:
                a, b = a1, b1
                parts += back
                walked += len(back)
                break
            prev = c.rho_inverse(a1, b1)
            back.append(-c.rho_log_float(*prev, a1, b1))
            a1, b1 = prev
            if math.fsum(parts + back) < self.distance + margin / 2:
                break
        s = math.fsum(parts)
        log_D = math.log(c.discriminant)
        # δ_B and δ(L_m): sum_error each; each baby step walked here: 4·log D ulp; the
        # shift: a giant step's ulp·(|c| + 64·log D); s: rounded once
        error = (
            2 * self.sum_error
            + walked * 4 * log_D * _ULP
            + _ULP * (abs(shift) + 64 * log_D)
            + _ULP * s
        )
        return GiantIdeal(a, b, s, error)

    def search(
        self,
        a: int,
        b: int,
        giant: GiantIdeal,
        *,
        base: float,
        lo_step: float,
        hi_step: float,
        e0: float = 0.0,
        stop: float = math.inf,
        budget: int = 1 << 62,
        progress: Progress | None = None,
    ) -> Hit:
        """Giant steps from ``(a, b)`` at distance ``base`` until one meets the table.

        Step ``j`` is at distance ``g = base + j·s + C``; the search stops at
        the first step in the table (directly or conjugated), once
        ``g − (e0 + j·error(s) + C_error + ulp·g) > stop``, or after
        ``budget`` steps. A step length outside ``(lo_step, hi_step)`` is an
        internal error.
        """
        D = self.cycle.discriminant
        status, a, b, j, C, C_error, found = self.ops.infrastructure_giant_search(
            self.handle,
            a,
            b,
            giant.a,
            giant.b,
            giant.s,
            lo_step,
            hi_step,
            base,
            e0,
            giant.error,
            64 * math.log(D),
            stop,
            budget,
            None if progress is None else partial(progress, "distance searched"),
        )
        if status == 4:  # pragma: no cover - the margin keeps every step in bounds
            raise ArithmeticError("internal error: giant step too long for the baby-step table")
        return Hit(_STATUS[status], a, b, j, C, C_error, found, base + j * giant.s + C)


@dataclass(frozen=True)
class GiantIdeal:
    """The giant step ``G₁ = (a, b)`` with its distance ``s`` and a bound on the error of ``s``."""

    a: int
    b: int
    s: float
    error: float
