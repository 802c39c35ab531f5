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
of ``O`` there, whose distance ``x = kR`` is then a multiple of ``R`` (when
``h = 1`` usually ``R`` itself). The main search then sweeps only to
``B = x/M`` (``M`` balances the two costs below, ``M = 2`` for small fields):
a match there is the first one, hence ``R``. Otherwise no ``R ≤ B`` exists,
so every prime factor ``p`` of ``k`` has ``p < x/B``, and each such ``p`` is
found by looking for ``O`` near ``x/p`` (a doubling walk) and divided out; a
prime left in ``k`` would have put ``O`` at ``x/p`` when ``p`` was tested, so
the final ``x`` is ``R``. A wrong estimate finds nothing and costs 4 % of a
sweep, which then runs to ``R``. When the search runs past what the table was
sized for, the table is doubled and the search goes on.

Once a multiple is pinned, the copy of ``O`` near it is re-reached by an exact
doubling walk (:mod:`distances`), which yields the unit in compact form and
``R`` to any precision with a rigorous error bound.

The baby-step table and both loops live in the kernels
(:mod:`realquad.infrastructure.table`): compiled for ``D < 2¹⁰⁶``, the pure
twin beyond, with the same steps and the same distances. The table is held to
:data:`~realquad.infrastructure.table.MEMORY_BUDGET` bytes (``max_table``
ideals); distances carry rigorous error bounds, which enter only the window in
which the final exact walk looks for ``O``.

>>> res = search_regulator(4 * (10**9 + 7), 30)
>>> mpmath.nstr(res.value, 30)
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
from dataclasses import dataclass, field

import mpmath

from realquad.core.lfunction import estimate_hR
from realquad.core.primes import primes_below
from realquad.core.progress import expecting
from realquad.core.results import Proof
from realquad.infrastructure.distances import (
    Factors,
    exact_principal_at,
    log_of_product,
    principal_near,
    walk_to,
)
from realquad.infrastructure.ideals import Cycle
from realquad.infrastructure.table import (
    CHECKPOINT,
    MEMORY_BUDGET,
    BabyStepTable,
    Hit,
    Progress,
    compiled_table,
    max_ideals,
)

METHOD = "infrastructure baby-step giant-step"

#: Most reduced ideals kept in the baby-step table by default: what :data:`MEMORY_BUDGET`
#: (2 GiB) holds — about 47 million with the compiled table (24-byte slots), 16 million
#: in the pure twin's dict.
DEFAULT_MAX_TABLE = max_ideals(MEMORY_BUDGET)

#: Measured cost of a giant step over a baby step, for sizing the table: about 9 in the
#: pure twin, 12 compiled (a giant step composes and reduces ≈ 25 times at D ≈ 10³⁰).
_GIANT_OVER_BABY_PURE = 9.0
_GIANT_OVER_BABY_COMPILED = 12.0

_ULP = 2.0**-52


@dataclass
class BSGSResult:
    """The regulator found by baby-step giant-step, with the unit in compact form.

    ``value`` is ``R`` to about ``digits`` significant digits with
    ``|value − R| ≤ error_bound`` (rigorous); ``factors`` give the fundamental
    unit ``ε`` exactly (a doubling walk, see :mod:`distances`).
    """

    value: mpmath.mpf
    error_bound: mpmath.mpf
    digits: int
    factors: Factors
    baby_steps: int
    giant_steps: int
    estimate: float | None
    table: BabyStepTable | None = field(default=None, repr=False)
    proof: Proof = "unconditional"


def _ratio(D: int) -> float:
    return _GIANT_OVER_BABY_COMPILED if compiled_table(D) else _GIANT_OVER_BABY_PURE


def _table_target(
    cycle: Cycle, estimate: float | None, max_table: int, ratio: float | None = None
) -> float:
    """Baby-step coverage ``δ_B`` balancing baby and giant work for ``R ≈ estimate``."""
    margin = 16 * math.log(cycle.discriminant) + 16
    if estimate is None:
        estimate = math.sqrt(cycle.discriminant)
    if ratio is None:
        ratio = _ratio(cycle.discriminant)
    coverage = math.sqrt(1.19 * estimate * ratio / 2)
    return max(8 * margin, min(coverage, 1.19 * max_table))


def search_regulator(
    D: int,
    digits: int = 30,
    *,
    estimate: float | None = None,
    max_table: int | None = None,
    progress: Progress | None = None,
) -> BSGSResult:
    """The regulator of the order of discriminant ``D`` by baby-step giant-step.

    ``estimate`` (an approximation of ``h·R``, computed when not given) only
    sizes the baby-step table. ``max_table`` caps the ideals stored (default:
    what :data:`~realquad.infrastructure.table.MEMORY_BUDGET` holds).
    ``progress`` is called now and then with the distance covered, first by
    the baby steps, then by the giant steps (increasing).
    """
    cycle = Cycle(D)
    if estimate is None:
        estimate = estimate_hR(cycle.discriminant).value
    if max_table is None:
        max_table = max_ideals(MEMORY_BUDGET, cycle.discriminant)
    target = _table_target(cycle, _planned_distance(cycle, estimate, max_table), max_table)
    table = BabyStepTable(
        cycle, capacity=min(max_table, int(target / 1.1)) + CHECKPOINT, max_ideals=max_table
    )
    progress = expecting(progress, _planned_distance(cycle, estimate, max_table))
    table.extend(target, progress)
    giant = 0
    if table.period is not None:
        multiple, window = table.period, 16 * table.error + 1e-6
    else:
        probe = _probe(cycle, table, estimate)
        if probe is None:
            found, window, giant = _giant_steps(cycle, table, max_table, progress)
            assert found is not None  # with no stopping distance, the search ends on a match
            multiple = found
        else:
            multiple, window, giant = _certify(cycle, table, max_table, progress, probe)
    return _finish(cycle, table, multiple, window, digits, giant, estimate)


def extend_for_sweep(result: BSGSResult, distance: float) -> BabyStepTable:
    """The search's baby-step table, extended to balance giant steps over ``distance``.

    The search sizes its table for its own short sweep; a walk of giant steps
    over a whole period (a principal ideal test) wants a larger one. Bounded
    by the default memory budget.
    """
    table = result.table
    assert table is not None
    D = table.cycle.discriminant
    cap = max_ideals(MEMORY_BUDGET, D)
    target = _table_target(table.cycle, distance, cap)
    if table.period is None and target > table.distance:
        table.max_ideals = max(cap, table.max_ideals or 0)
        table.extend(target)
    return table


#: Cost of one test "is O at distance y?" (a doubling walk, in Python) in giant steps,
#: measured (≈ 3–6 ms against ≈ 1 µs compiled and ≈ 15 µs pure giant steps).
_WALK_OVER_GIANT_COMPILED = 4000.0
_WALK_OVER_GIANT_PURE = 300.0


def _prime_bound(x: float, cover: float, D: int) -> int:
    """``M`` balancing a sweep to ``x/M`` against tests of ``x/p`` for the primes ``p < M``.

    The sweep costs ``x/(2·δ_B·M)`` giant steps, the tests ``π(M) ≈ M/log M``
    walks; ``M = 2`` (no test) when the sweep to ``x/2`` is cheap.
    """
    walk = _WALK_OVER_GIANT_COMPILED if compiled_table(D) else _WALK_OVER_GIANT_PURE
    scale = x / (2 * cover * walk)
    M = 2.0
    for _ in range(6):
        M = max(2.0, math.sqrt(scale * max(1.0, math.log(M))))
    return int(M)


def _planned_distance(cycle: Cycle, estimate: float, max_table: int) -> float:
    """The distance the giant steps are expected to cover: the probe, then a sweep to ``E/M``."""
    cover = _table_target(cycle, estimate / 2, max_table)
    for _ in range(2):
        M = _prime_bound(estimate, cover, cycle.discriminant)
        planned = 2 * _PROBE_WIDTH * estimate + estimate / M
        cover = _table_target(cycle, planned, max_table)
    return planned


def _certify(
    cycle: Cycle,
    table: BabyStepTable,
    max_table: int,
    progress: Progress | None,
    probe: tuple[float, float, int],
) -> tuple[float, float, int]:
    """``R`` from a multiple ``x = kR`` found by the probe: ``(R, error window, giant steps)``.

    Giant steps sweep to ``B = x/M`` (:func:`_prime_bound`); a match there
    is ``R`` itself (the first match, as in :func:`_giant_steps`). Otherwise
    ``R > B``, and :func:`_divide_out_primes` removes the prime factors of
    ``k``, all below ``x/B``.
    """
    x, err, steps = probe
    swept = x / _prime_bound(x, table.distance, cycle.discriminant) + 1.0
    found, window, steps = _giant_steps(cycle, table, max_table, progress, swept, steps)
    if found is not None:
        return found, window, steps
    x, err = _divide_out_primes(cycle, x, err, swept)
    return x, err, steps


def _divide_out_primes(cycle: Cycle, x: float, err: float, swept: float) -> tuple[float, float]:
    """``R`` from ``x ≈ kR`` (within ``err``) when no ``R ≤ swept`` exists: ``(R, error)``.

    A prime ``q | k`` has ``R ≤ x/q``, so ``q < (x + err)/swept``. The primes
    below that are tested in turn for a copy of ``O`` near ``x/p``; a copy
    found is a multiple of ``R`` (whatever ``p``), ``x`` becomes its distance
    and the tests start again. When none is found, ``k = 1``: a prime ``q | k``
    would have put ``O`` at ``x/q``.
    """
    p_index = 0
    primes = primes_below(int((x + err) / swept) + 2)
    while p_index < len(primes) and primes[p_index] < (x + err) / swept:
        p = primes[p_index]
        window = err / p + 1e-12 * x / p + 1.0  # with the walk's own float error, 1e-12·x/p
        found = principal_near(cycle, x / p, window)
        if found:
            x = found[0]
            err = 1e-12 * x + 1e-9  # the doubling walk's float distance (as in _finish)
            p_index = 0
        else:
            p_index += 1
    return x, err


#: Half-width of the window searched around the estimate of ``h·R``, relative to it.
_PROBE_WIDTH = 0.02


def _margin(cycle: Cycle) -> float:
    return 8 * math.log(cycle.discriminant) + 8


def _probe(cycle: Cycle, table: BabyStepTable, estimate: float) -> tuple[float, float, int] | None:
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
    G = table.giant(_margin(cycle))
    near = walk_to(cycle, lo)
    (a, b), g = near.ideal, near.distance
    e0 = 1e-12 * hi + table.error  # the doubling walk's float distance, the table's
    start = _start_hit(cycle, table, a, b, g)
    if start is not None:
        return _multiple(cycle, table, start, e0), e0, 0
    hit = table.search(
        a, b, G, base=g, lo_step=1.0, hi_step=2 * cover - 4 * table.error - 1.0, stop=hi + G.s
    )
    if hit.status in ("direct", "conjugate"):
        err = _hit_error(hit, G.error, e0)
        return _multiple(cycle, table, hit, err), err, hit.steps
    return None


def _hit_error(hit: Hit, s_error: float, e0: float) -> float:
    """Bound on the error of a search's distance ``g = base + j·s + C`` (``e0``: base and table)."""
    return e0 + hit.steps * s_error + hit.C_error + 2 * _ULP * abs(hit.distance)


def _start_hit(cycle: Cycle, table: BabyStepTable, a: int, b: int, g: float) -> Hit | None:
    """The reduced ideal ``(a, b)`` at distance ``g`` as a search result, if it is in the table."""
    found = table.lookup(a, b)
    if found is not None:
        return Hit("direct", a, b, 0, 0.0, 0.0, found, g)
    found = table.lookup(a, cycle.conjugate(a, b))
    if found is not None:
        return Hit("conjugate", a, b, 0, 0.0, 0.0, found, g)
    return None


def _giant_steps(
    cycle: Cycle,
    table: BabyStepTable,
    max_table: int,
    progress: Progress | None,
    stop: float = math.inf,
    steps: int = 0,
) -> tuple[float | None, float, int]:
    """Giant steps from ``O`` until a match: ``(multiple of R, error window, steps)``.

    The first match gives ``R`` (see the module's docstring). With a finite
    ``stop`` the search gives up once ``g > stop + δ_B``, returning ``None``
    for the multiple: then no ``R ≤ stop`` exists, since it would have matched
    by then (at the first ``g ≥ R − δ_B``, which is ``< R + δ_B``).
    """
    margin = _margin(cycle)
    ratio = _ratio(cycle.discriminant)
    # current giant ideal (a, b) at distance base (error ≤ base_error)
    a, b = cycle.principal
    base, base_error = 0.0, 0.0
    while True:
        cover = table.distance
        G = table.giant(margin)
        if not (cover < G.s - 1.0 and G.s < 2 * cover - 1.0):  # pragma: no cover - by the margin
            raise ArithmeticError("internal error: giant step outside the baby-step window")
        full = len(table) >= max_table
        budget = 1 << 62 if full else max(64, int(4 * len(table) / ratio))
        e0 = base_error + table.error
        hit = table.search(
            a,
            b,
            G,
            base=base,
            lo_step=1.0,
            hi_step=2 * cover - 4 * table.error - 1.0,
            e0=e0,
            stop=stop + table.distance,
            budget=budget,
            progress=progress,
        )
        err = _hit_error(hit, G.error, e0)
        if hit.status in ("direct", "conjugate"):
            return _multiple(cycle, table, hit, err), err, steps + hit.steps
        if hit.status == "stop":
            return None, err, steps + hit.steps
        # the table was too small for R: double it and continue from here
        steps += hit.steps
        a, b = hit.a, hit.b
        base, base_error = hit.distance, err - table.error
        table.extend(table.distance * min(2.0, max_table / len(table)))
        if table.period is not None:  # pragma: no cover - R ≤ new coverage
            return table.period, 16 * table.error + 1e-6, steps
        # the current giant ideal is checked again against the larger table
        again = _start_hit(cycle, table, a, b, base)
        if again is not None:
            err = base_error + table.error
            return _multiple(cycle, table, again, err), err, steps


def _multiple(cycle: Cycle, table: BabyStepTable, hit: Hit, err: float) -> float:
    """The multiple of ``R`` given by a giant ideal found in the table."""
    if hit.status == "direct":
        x = hit.distance - hit.found
    else:
        x = _divide_conjugate_multiple(
            cycle, table, hit.distance + hit.found + math.log(hit.a), err
        )
    if not x > table.distance:  # pragma: no cover - giant steps start beyond the table
        raise ArithmeticError("internal error: a giant step matched inside the baby-step table")
    return x


def _divide_conjugate_multiple(cycle: Cycle, table: BabyStepTable, x: float, err: float) -> float:
    """``x = kR`` with ``k ≤ 3`` from a conjugate match: return ``R``."""
    for k in (3, 2):
        if x / k > table.distance and principal_near(cycle, x / k, err / k + 1.0):
            return x / k
    return x


def _finish(
    cycle: Cycle,
    table: BabyStepTable,
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
        value = +value
    return BSGSResult(value, bound, digits, factors, len(table), giant, estimate, table)
