"""The regulator by baby-step giant-step in the infrastructure (Shanks, made rigorous).

Baby steps walk the principal cycle from ``O`` and store every reduced ideal
with distance in ``[0, δ_B]``. By the symmetry of the cycle under
conjugation (``δ(L̄) ≡ −δ(L) − log a``), the table also recognises every
ideal with distance in ``[R − δ_B, R]``, a window of width ``2δ_B`` around
``0 ≡ R``. Giant steps ``G_{j+1} = reduce(G_j·G₁)`` advance by at most
``2δ_B`` each (checked at every step), starting beyond ``δ_B``.

*Termination and correctness.* Let ``j`` be the first giant step with
``g_j ≥ R − δ_B``. Then ``g_j < R + δ_B``, so ``G_j`` is in the table
(directly or conjugated) and the search stops no later than step ``j``. At
the first match, ``g − δ_i = kR`` (direct) or ``g + δ_i + log a = kR``
(conjugate) with ``k ≥ 1``. A direct match has ``kR ≤ g < R + δ_B < 2R``,
so ``k = 1``. A conjugate match has ``(k − 1)R < 2δ_B + log √D``, so
``k ≤ 3``; the candidates ``x/2`` and ``x/3`` are tested exactly. No
assumption enters: the result is unconditional.

The estimate ``E ≈ hR`` (:mod:`realquad.lfunction`) only affects speed, in two ways.
It sizes the table; and giant steps across ``[0.98E, 1.02E]`` look for a copy
of ``O`` there, whose distance ``x`` is then a multiple of ``R`` — when
``h = 1`` usually ``R`` itself. The main search then stops at
``g > x/2 + δ_B``: an ``R ≤ x/2`` would have been found by then, so ``R = x``.
A wrong estimate finds nothing and costs 4 % of a sweep. When the search runs
past what the table was sized for, the table is doubled and the search goes
on.

Once a multiple is pinned, the copy of ``O`` near it is re-reached by an exact
doubling walk (:mod:`distances`), which yields the unit in compact form and
``R`` to any precision with a rigorous error bound.

>>> res = regulator_bsgs(4 * (10**9 + 7), 30)
>>> str(res.regulator)
'14693.6218553638695813127964412'
>>> res.baby_steps > 0, res.proof
(True, 'unconditional')

References: D. Shanks, "The infrastructure of a real quadratic field and its
applications", 1972; H. W. Lenstra Jr., "On the calculation of regulators and
class numbers of quadratic fields", *Journées Arithmétiques 1980*, LMS Lecture
Notes 56, 1982; Jacobson–Williams, *Solving the Pell Equation*, ch. 10.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import mpmath

from realquad._kernels import _pure
from realquad.infrastructure.distances import (
    Factors,
    exact_principal_at,
    log_of_product,
    principal_near,
    walk_to,
)
from realquad.infrastructure.ideals import Cycle, giant_step_float, infrastructure_kernel
from realquad.lfunction import estimate_hR
from realquad.results import Regulator

METHOD = "infrastructure baby-step giant-step"

#: Most reduced ideals kept in the baby-step table (memory ≈ 120 bytes each).
DEFAULT_MAX_TABLE = 1 << 20

#: Measured cost of a giant step over a baby step, for sizing the table: about 9 with the
#: pure-Python baby steps, 16 with the compiled ones (dict insertion then dominates).
_GIANT_OVER_BABY_PURE = 9.0
_GIANT_OVER_BABY_COMPILED = 16.0

_ULP = 2.0**-52

#: Baby steps between two kept checkpoints.
_CHECKPOINT = 256

Progress = Callable[[float], None]

_BABY_STEPS = infrastructure_kernel("infrastructure_baby_steps")
_GIANT_OVER_BABY = (
    _GIANT_OVER_BABY_PURE
    if _BABY_STEPS is _pure.infrastructure_baby_steps
    else _GIANT_OVER_BABY_COMPILED
)


@dataclass
class BSGSResult:
    """The regulator found by baby-step giant-step, with the unit in compact form."""

    regulator: Regulator
    factors: Factors
    baby_steps: int
    giant_steps: int
    estimate: float | None
    table: _Table | None = field(default=None, repr=False)

    @property
    def proof(self) -> str:
        return self.regulator.proof


class _Table:
    """Baby steps from ``O``: every reduced principal ideal with distance in ``[0, δ_B]``.

    ``index`` maps :meth:`Cycle.key` to the (binary64) distance; every
    ``_CHECKPOINT``-th ideal is also kept with its distance, to build giant
    steps from.
    """

    def __init__(self, cycle: Cycle) -> None:
        self.cycle = cycle
        a, b = cycle.principal
        self.index: dict[int, float] = {cycle.key(a, b): 0.0}
        self.checkpoints: list[tuple[int, int, float]] = [(a, b, 0.0)]
        self.a, self.b, self.distance = a, b, 0.0
        self.error = 0.0  # bound on the rounding error of the stored distances
        self.period: float | None = None  # R when O came back during the baby steps

    def extend(self, limit: float) -> None:
        """Baby steps until the last stored distance is at least ``limit``."""
        c = self.cycle
        D, r, sq = c.discriminant, c.root, c.sqrt_float
        a, b, dist = self.a, self.b, self.distance
        index, checkpoints = self.index, self.checkpoints
        while dist < limit:
            try:
                keys, dists, a, b, dist, back = _BABY_STEPS(D, r, sq, a, b, dist, _CHECKPOINT)
            except OverflowError:
                keys, dists, a, b, dist, back = _pure.infrastructure_baby_steps(
                    D, r, sq, a, b, dist, _CHECKPOINT
                )
            index.update(zip(keys, dists, strict=True))
            if back:
                self.period = dist
                break
            checkpoints.append((a, b, dist))
        self.a, self.b, self.distance = a, b, dist
        # each step: one rounding of the sum and a log with error ≤ 2 ulp of ≤ log D
        self.error = len(index) * (_ULP * (dist + 4 * math.log(D)))

    def __len__(self) -> int:
        return len(self.index)

    def ideal_below(self, x: float) -> tuple[int, int, float]:
        """The last stored ideal with distance ``≤ x``, with its distance (``0 ≤ x ≤ δ_B``)."""
        c = self.cycle
        a, b, dist = next(p for p in reversed(self.checkpoints) if p[2] <= x)
        while True:
            a1, b1 = c.rho(a, b)
            step = c.rho_log_float(a, b, a1, b1)
            if dist + step > x or a1 == 1:
                return a, b, dist
            a, b, dist = a1, b1, dist + step

    def giant_ideal(self, margin: float) -> tuple[int, int, float]:
        """``G₁ = reduce(L_B·L_m)`` with ``δ(L_m) ≤ δ_B − margin``: ``(a, b, s)``, ``s ≈ 2δ_B − margin``."""
        c = self.cycle
        am, bm, dm = self.ideal_below(self.distance - margin)
        aG, bG, shift = giant_step_float(
            c.discriminant, c.root, c.sqrt_float, self.a, self.b, am, bm
        )
        s = self.distance + dm + shift
        # up to 32 baby steps back, prefer a norm with no prime factor below 17: most giant
        # steps then compose coprime norms (the fast Chinese-remainder case)
        a, b, t = aG, bG, s
        for _ in range(32):
            if math.gcd(a, 30030) == 1:
                return a, b, t
            prev = c.rho_inverse(a, b)
            t -= c.rho_log_float(*prev, a, b)
            a, b = prev
            if t < self.distance + margin / 2:
                break
        return aG, bG, s


def _table_target(cycle: Cycle, estimate: float | None, max_table: int) -> float:
    """Baby-step coverage ``δ_B`` balancing baby and giant work for ``R ≈ estimate``."""
    margin = 16 * math.log(cycle.discriminant) + 16
    if estimate is None:
        estimate = math.sqrt(cycle.discriminant)
    coverage = math.sqrt(1.19 * estimate * _GIANT_OVER_BABY / 2)
    return max(8 * margin, min(coverage, 1.19 * max_table))


def regulator_bsgs(
    D: int,
    digits: int = 30,
    *,
    estimate: float | None = None,
    max_table: int = DEFAULT_MAX_TABLE,
    progress: Progress | None = None,
) -> BSGSResult:
    """The regulator of the order of discriminant ``D`` by baby-step giant-step.

    ``estimate`` (an approximation of ``h·R``, computed when not given) only
    sizes the baby-step table. ``progress`` is called now and then with the
    distance the giant steps have covered.
    """
    cycle = Cycle(D)
    if estimate is None:
        estimate = estimate_hR(cycle.discriminant).value
    table = _Table(cycle)
    # sized for a sweep to E/2: the probe below usually leaves only that much to search
    table.extend(_table_target(cycle, estimate / 2, max_table))
    giant = 0
    if table.period is not None:
        multiple, window = table.period, 16 * table.error + 1e-6
    else:
        probe = _probe(cycle, table, estimate)
        multiple, window, giant = _giant_steps(cycle, table, max_table, progress, probe)
    return _finish(cycle, table, multiple, window, digits, giant, estimate)


#: Half-width of the window searched around the estimate of ``h·R``, relative to it.
_PROBE_WIDTH = 0.02


def _probe(cycle: Cycle, table: _Table, estimate: float) -> tuple[float, float, int] | None:
    """A multiple of ``R`` near the estimate ``E`` of ``h·R``: ``(x, error, giant steps)`` or ``None``.

    Giant steps across ``[E(1 − w), E(1 + w)]``; a table match there is a copy
    of ``O``, so its distance ``x`` is a multiple of ``R`` (no assumption on
    ``E``: a poor estimate only finds nothing). When ``h = 1``, ``x = R``
    usually, and the main search need only exclude ``R ≤ x/2``.
    """
    cover = table.distance
    lo, hi = estimate * (1 - _PROBE_WIDTH), estimate * (1 + _PROBE_WIDTH)
    if lo <= 4 * cover:
        return None
    D, r, sq = cycle.discriminant, cycle.root, cycle.sqrt_float
    aG, bG, s = table.giant_ideal(8 * math.log(D) + 8)
    near = walk_to(cycle, lo)
    (a, b), g = near.ideal, near.distance
    steps = 0
    while g <= hi + s:
        err = 1e-12 * hi + steps * (2 * _ULP * hi + 1e-12) + 3 * table.error
        x = _match(cycle, table, a, b, g, err)
        if x is not None:
            return x, err, steps
        a, b, c = giant_step_float(D, r, sq, a, b, aG, bG)
        g += s + c
        steps += 1
    return None


def _giant_steps(
    cycle: Cycle,
    table: _Table,
    max_table: int,
    progress: Progress | None,
    probe: tuple[float, float, int] | None = None,
) -> tuple[float, float, int]:
    """Giant steps until a match; returns ``(multiple of R, error window, steps)``.

    With a known multiple ``x`` from :func:`_probe`, the search stops once
    ``g > x/2 + δ_B``: a regulator ``R ≤ x/2`` would have matched by then
    (at the first ``g ≥ R − δ_B``, which is ``< R + δ_B``), so ``R = x``.
    """
    D, r = cycle.discriminant, cycle.root
    margin = 8 * math.log(D) + 8
    # current giant ideal (a, b) at distance base + j·s + C
    a, b = cycle.principal
    base, base_error = 0.0, 0.0
    steps = 0 if probe is None else probe[2]
    stop = math.inf if probe is None else probe[0] / 2 + 1.0
    while True:
        cover = table.distance
        aG, bG, s = table.giant_ideal(margin)
        s_error = 3 * table.error + 64 * _ULP * (s + margin)
        if not (cover < s - 1.0 and s < 2 * cover - 1.0):  # pragma: no cover - by the margin
            raise ArithmeticError("internal error: giant step outside the baby-step window")
        lo_step, hi_step = 1.0, 2 * cover - 4 * table.error - 1.0
        j, C, C_error = 0, 0.0, 0.0
        full = len(table) >= max_table
        budget = 1 << 62 if full else max(64, int(4 * len(table) / _GIANT_OVER_BABY))
        sq = cycle.sqrt_float
        while budget > 0:
            budget -= 1
            a, b, c = giant_step_float(D, r, sq, a, b, aG, bG)
            if not (lo_step < s + c < hi_step):  # pragma: no cover - the margin covers it
                raise ArithmeticError("internal error: giant step too long for the baby-step table")
            j += 1
            C += c
            C_error += _ULP * (abs(C) + 64 * math.log(D))
            g = base + j * s + C
            if steps == 0 and j == 1 and g <= cover:  # pragma: no cover - s > cover
                raise ArithmeticError("internal error: first giant step inside the table")
            err = base_error + j * s_error + C_error + _ULP * g + table.error
            x = _match(cycle, table, a, b, g, err)
            if x is not None:
                return x, err, steps + j
            if probe is not None and g - err > stop + table.distance:
                return probe[0], probe[1], steps + j
            if progress is not None and j % 4096 == 0:
                progress(g)
        # the table was too small for R: double it and continue from here
        steps += j
        base, base_error = base + j * s + C, base_error + j * s_error + C_error
        table.extend(table.distance * min(2.0, max_table / len(table)))
        if table.period is not None:  # pragma: no cover - R ≤ new coverage
            return table.period, 16 * table.error + 1e-6, steps
        # the current giant ideal is checked again against the larger table
        x = _match(cycle, table, a, b, base, base_error + table.error)
        if x is not None:
            return x, base_error + table.error, steps


def _match(cycle: Cycle, table: _Table, a: int, b: int, g: float, err: float) -> float | None:
    """The multiple of ``R`` given by a giant ideal ``(a, b)`` at distance ``g`` found in the table."""
    r = cycle.root
    width = 2 * r + 2
    found = table.index.get(a * width + b)
    if found is not None:
        x = g - found
    else:
        found = table.index.get(a * width + r - (r + b) % (2 * a))
        if found is None:
            return None
        x = _divide_conjugate_multiple(cycle, table, g + found + math.log(a), err)
    if not x > table.distance:  # pragma: no cover - giant steps start beyond the table
        raise ArithmeticError("internal error: a giant step matched inside the baby-step table")
    return x


def _divide_conjugate_multiple(cycle: Cycle, table: _Table, x: float, err: float) -> float:
    """``x = kR`` with ``k ≤ 3`` from a conjugate match: return ``R``."""
    for k in (3, 2):
        if x / k > table.distance and principal_near(cycle, x / k, err / k + 1.0):
            return x / k
    return x


def _finish(
    cycle: Cycle,
    table: _Table,
    multiple: float,
    window: float,
    digits: int,
    giant: int,
    estimate: float | None,
) -> BSGSResult:
    """Locate ``O`` at the multiple exactly and evaluate ``R`` to ``digits`` digits."""
    if not window < multiple / 2:  # pragma: no cover - float error ≪ R
        raise ArithmeticError("internal error: rounding error too large to locate the regulator")
    window += 1e-12 * multiple + 1e-9  # the float distances of the doubling walk itself
    found = principal_near(cycle, multiple, window)
    if len(found) != 1:  # pragma: no cover - a copy of O is at R and none else within R/2
        raise ArithmeticError(
            f"internal error: expected one principal ideal near {multiple}, found {len(found)}"
        )
    factors = exact_principal_at(cycle, found[0])
    value, bound = log_of_product(factors, digits)
    if abs(float(value) - multiple) > window + 1.0:  # pragma: no cover
        raise ArithmeticError("internal error: exact walk did not reach the regulator")
    with mpmath.workdps(digits + 10):
        reg = Regulator(+value, digits, bound, METHOD, "unconditional")
    return BSGSResult(reg, factors, len(table), giant, estimate, table)
