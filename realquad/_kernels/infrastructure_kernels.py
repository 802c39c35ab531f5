"""Pure-Python twin of ``infrastructure_kernels.c``: baby steps, fused giant steps, the baby-step table and the giant-step search.

Reduced principal ideals ``[a, (b + √D)/2]``, ``b`` normalised in
``(√D − 2a, √D)``, with binary64 distances; ``r = ⌊√D⌋``, ``sq ≈ √D``; keys
identify ideals as ``a·(2r + 2) + b``.

The rules every twin keeps are in :mod:`realquad._kernels`.
"""

from __future__ import annotations

import math
import sys
from collections.abc import Callable

from realquad._kernels.form_kernels import extended_gcd


def infrastructure_baby_steps(
    D: int, r: int, sq: float, a: int, b: int, dist: float, count: int
) -> tuple[list[int], list[float], int, int, float, int]:
    """Up to ``count`` baby steps (rho) from ``(a, b)`` at distance ``dist``.

    Returns ``(keys, distances, a, b, dist, back)``: the ideals passed (keys
    and distances, in order), the last ideal and its distance, and ``back = 1``
    when the walk reached the order itself (``a = 1``, not listed) and stopped
    there. Each step adds ``log θ₁``, ``θ₁ = (b₁ + √D)/(2a₁)``, computed as
    ``2a/(√D − b₁)`` when ``b₁ < 0`` (no cancellation).
    """
    log = math.log
    width = 2 * r + 2
    keys: list[int] = []
    dists: list[float] = []
    for _ in range(count):
        two_a = 2 * a
        bt = (b + r) % two_a - r
        a = (D - bt * bt) // (2 * two_a)
        b = -bt
        if b >= 0:
            dist += log((b + sq) / (2 * a))
        else:
            dist += log(two_a / (sq - b))
        if a == 1:
            return keys, dists, a, b, dist, 1
        keys.append(a * width + b)
        dists.append(dist)
    return keys, dists, a, b, dist, 0


def infrastructure_giant_step(
    D: int, r: int, sq: float, a: int, b: int, a2: int, b2: int
) -> tuple[int, int, float]:
    """``reduce([a, b]·[a₂, b₂])``: ``(a', b', c)`` with the distance change ``c``.

    Composition: for coprime norms ``b₃ ≡ b (2a)``, ``b₃ ≡ b₂ (2a₂)``;
    otherwise Dirichlet's formula with ``d = gcd(a, a₂, (b + b₂)/2)``. The
    lattice ``[1, (b₃ + √D)/(2a₃)]`` is ``(a a₂/(d a₃))`` times the product of
    the two, then reduced by ``L' = (1/θ̃)·L`` steps (``b̃`` centred while
    ``a > √D``, normalised after); the multipliers are collected in one
    float product and ``c`` is its logarithm.
    """
    g = math.gcd(a, a2)
    if g == 1:
        a3 = a * a2
        k = ((b - b2) >> 1) * pow(a2, -1, a) % a if a > 1 else 0
        b3 = b2 + 2 * a2 * k
        d = 1
    else:
        s = (b + b2) >> 1
        g, x1, y1 = extended_gcd(a, a2)
        d, x2, w = extended_gcd(g, s)
        a3 = (a * a2) // (d * d)
        b3 = ((x1 * x2 * a * b2 + y1 * x2 * a2 * b + w * ((b * b2 + D) >> 1)) // d) % (2 * a3)
    prod = a * a2 / (d * a3)
    a, b = a3, b3
    while a > r:  # norms fall by a factor ≥ 4 per step
        two_a = 2 * a
        bt = b % two_a
        if bt > a:
            bt -= two_a
        a_new = abs(D - bt * bt) // (2 * two_a)
        if bt >= 0:
            prod *= two_a / (bt + sq)
        else:  # |b̃ + √D| = 4a·a'/(√D − b̃)
            prod *= (sq - bt) / (2 * a_new)
        a, b = a_new, -bt
    while True:
        two_a = 2 * a
        b = r - (r - b) % two_a
        t = two_a - b
        if t < 0 or t * t < D:
            return a, b, math.log(prod)
        a_new = (D - b * b) // (2 * two_a)  # > 0: |b| < √D here
        if b >= 0:
            prod *= two_a / (b + sq)
        else:
            prod *= (sq - b) / (2 * a_new)
        a, b = a_new, -b


class _BabyStepTable:
    """The twin's baby-step table: a dict from ``a·(2r + 2) + b`` to the distance."""

    __slots__ = ("D", "r", "sq", "width", "index")

    def __init__(self, D: int, r: int, sq: float) -> None:
        self.D, self.r, self.sq = D, r, sq
        self.width = 2 * r + 2
        self.index: dict[int, float] = {}


def infrastructure_table_new(D: int, r: int, sq: float, capacity: int) -> _BabyStepTable:
    """A baby-step table for the field ``(D, r, sq)`` holding ``O`` at distance 0, sized for ``capacity`` ideals.

    (The compiled table is an open-addressing hash table in a capsule; the
    twin's is a dict, and ``capacity`` is only a hint.)
    """
    table = _BabyStepTable(D, r, sq)
    table.index[table.width + r - (r - D) % 2] = 0.0  # the order itself, (1, b₀)
    return table


def infrastructure_table_size(table: _BabyStepTable) -> tuple[int, int]:
    """``(ideals stored, bytes)``: for the twin the bytes are an estimate (dict, keys, floats)."""
    n = len(table.index)
    return n, sys.getsizeof(table.index) + n * (sys.getsizeof(table.width) + 24)


def infrastructure_table_get(table: _BabyStepTable, a: int, b: int) -> float | None:
    """The stored distance of the reduced ideal ``(a, b)`` (``b`` normalised), or ``None``."""
    r = table.r
    if not 0 < a <= r or not r - 2 * a < b <= r:
        return None
    return table.index.get(a * table.width + b)


def infrastructure_table_extend(
    table: _BabyStepTable, a: int, b: int, hi: float, lo: float, count: int
) -> tuple[int, int, float, float, int]:
    """Up to ``count`` baby steps from ``(a, b)`` at distance ``hi + lo``, stored in ``table``.

    Returns ``(a, b, hi, lo, back)`` like :func:`infrastructure_baby_steps`;
    each ideal passed is stored with the distance ``hi``. The distance is
    carried as an unevaluated sum ``hi + lo`` of two doubles (TwoSum, then
    FastTwoSum), so the running sum loses nothing to rounding; only each
    step's ``log θ₁`` is rounded.
    """
    D, r, sq, width, index = table.D, table.r, table.sq, table.width, table.index
    log = math.log
    for _ in range(count):
        two_a = 2 * a
        bt = (b + r) % two_a - r
        a = (D - bt * bt) // (2 * two_a)
        b = -bt
        x = log((b + sq) / (2 * a)) if b >= 0 else log(two_a / (sq - b))
        s = hi + x
        bp = s - hi
        lo += (hi - (s - bp)) + (x - bp)
        t = s + lo
        lo -= t - s
        hi = t
        if a == 1:
            return a, b, hi, lo, 1
        index[a * width + b] = hi
    return a, b, hi, lo, 0


def infrastructure_giant_search(
    table: _BabyStepTable,
    a: int,
    b: int,
    aG: int,
    bG: int,
    s: float,
    lo_step: float,
    hi_step: float,
    base: float,
    e0: float,
    e1: float,
    clog: float,
    stop: float,
    budget: int,
    progress: Callable[[float], object] | None,
) -> tuple[int, int, int, int, float, float, float]:
    """Giant steps ``(a, b) ← reduce((a, b)·(aG, bG))`` until one meets ``table``.

    Step ``j`` is at distance ``g = base + j·s + C``, ``C`` the sum of the
    distance changes ``c`` and ``C_error`` the sum of ``ulp·(|C| + clog)``;
    it is past ``stop`` when ``g − (e0 + j·e1 + C_error + ulp·g) > stop``, and
    every step length ``s + c`` must lie in ``(lo_step, hi_step)``. Returns
    ``(status, a, b, j, C, C_error, found)``: status 0 when ``budget`` steps
    found nothing, 1 when ``(a, b)`` is in the table at distance ``found``, 2
    when its conjugate is, 3 past ``stop``, 4 a step length out of bounds.
    ``progress(g)`` is called every 4096 steps.
    """
    D, r, sq, width, index = table.D, table.r, table.sq, table.width, table.index
    ulp = 2.0**-52
    C = C_error = 0.0
    j = 0
    while j < budget:
        a, b, c = infrastructure_giant_step(D, r, sq, a, b, aG, bG)
        if not (lo_step < s + c < hi_step):
            return 4, a, b, j, C, C_error, 0.0
        j += 1
        C += c
        C_error += ulp * (abs(C) + clog)
        g = base + j * s + C
        found = index.get(a * width + b)
        if found is not None:
            return 1, a, b, j, C, C_error, found
        found = index.get(a * width + r - (r + b) % (2 * a))
        if found is not None:
            return 2, a, b, j, C, C_error, found
        if g - (e0 + j * e1 + C_error + ulp * g) > stop:
            return 3, a, b, j, C, C_error, 0.0
        if j % 4096 == 0 and progress is not None:
            progress(g)
    return 0, a, b, j, C, C_error, 0.0
