"""Fundamental units and regulators: one public function each, choosing the method by size.

* ``"cfrac"`` — the half-period continued fraction (:mod:`realquad.units.cfrac`):
  exact and unconditional, cost proportional to the period ``l ≈ R/1.19``;
* ``"bsgs"`` — baby-step giant-step in the infrastructure
  (:mod:`realquad.units.bsgs`): unconditional, cost about ``√R`` steps,
  the unit kept in compact form;
* ``"subexp"`` — index calculus (:mod:`realquad.units.subexp`),
  ``proof: "GRH"``, sub-exponential in ``log D``; the unit in compact form.
  For an order of conductor ``f > 1``, the field's unit (index calculus from
  ``D₀ = 10¹⁰``, the continued fraction below) and then its least power in
  the order (:mod:`realquad.units.orders`);
* ``"auto"`` — the continued fraction while the estimated period is short,
  the infrastructure beyond, index calculus from :data:`AUTO_SUBEXP` on. The period is estimated through ``R ≤ h·R``,
  the analytic class number formula's estimate
  (:mod:`realquad.core.lfunction`), divided by Lévy's constant.

The cut-offs differ by problem. For :func:`regulator` only ``R`` is wanted,
and the benchmark (``tests/benchmarks/bench_infrastructure.py``,
docs/performance.md) shows baby-step giant-step faster from periods of a few
ten thousand on with the pure-Python kernels (:data:`REGULATOR_PERIOD_LIMIT`) and
from a few hundred thousand on with the compiled ones
(:data:`REGULATOR_PERIOD_LIMIT_COMPILED`). For
:func:`fundamental_unit` the continued fraction also yields the period length
and the expanded unit through its product tree, so it is kept up to
:data:`UNIT_PERIOD_LIMIT` (about ``D ≈ 10¹³``, as in the design notes); past
that the unit could not be printed anyway and stays compact.

An imaginary order has no unit of infinite order; its roots of unity are
:func:`unit_group`'s (:mod:`realquad.units.roots_of_unity`).

Both methods return the same :class:`~realquad.units.results.Unit` and
:class:`~realquad.units.results.Regulator`, whose ``method`` says which one ran.

>>> fundamental_unit(5).method.startswith("continued fraction")
True
>>> regulator(4 * (10**16 + 61)).method, fundamental_unit(4 * (10**12 + 39)).period_length
('infrastructure baby-step giant-step', 532572)
>>> u = fundamental_unit(4 * (10**9 + 7), method="bsgs")
>>> u.method, u.proof, u.norm
('infrastructure baby-step giant-step', 'unconditional', 1)
>>> str(u.regulator(20)) == str(regulator(4 * (10**9 + 7), 20, method="cfrac"))
True
"""

from __future__ import annotations

from typing import Literal

from realquad._backend import BACKEND, kernels
from realquad.core.lfunction import estimated_period
from realquad.core.orders import Order
from realquad.core.progress import Progress
from realquad.core.results import check_method
from realquad.relations.system import MAX_DISCRIMINANT as MAX_SUBEXP
from realquad.relations.system import MIN_DISCRIMINANT as MIN_SUBEXP
from realquad.relations.system import check_reach, refuse_sieve_options
from realquad.units.bsgs import fundamental_unit_bsgs, regulator_bsgs
from realquad.units.cfrac import DEFAULT_MAX_PERIOD, fundamental_unit_cfrac, regulator_cfrac
from realquad.units.orders import unit_of_order
from realquad.units.results import NO_UNIT_OF_INFINITE_ORDER, Regulator, Unit
from realquad.units.roots_of_unity import UnitGroup, unit_group
from realquad.units.subexp import fundamental_unit_subexp, regulator_subexp

Method = Literal["auto", "cfrac", "bsgs", "subexp"]
METHODS = ("auto", "cfrac", "bsgs", "subexp")

#: ``D`` of a field from which ``method="auto"`` takes index calculus (under GRH) over
#: baby-step giant-step (unconditional): 3.5 s against 1.3 s at 10³⁰, the infrastructure's
#: cost growing like ``D^{1/4}`` (docs/performance.md).
AUTO_SUBEXP = 10**30

#: Estimated period up to which ``regulator(..., method="auto")`` walks the continued fraction
#: with the pure-Python kernels, and with the compiled ones (benchmark, docs/performance.md).
REGULATOR_PERIOD_LIMIT = 40_000
REGULATOR_PERIOD_LIMIT_COMPILED = 300_000

#: Estimated period up to which ``fundamental_unit(..., method="auto")`` walks the continued fraction.
UNIT_PERIOD_LIMIT = 10_000_000

#: Discriminants this small always have a short period (``l < 2√D``-ish).
_SMALL_DISCRIMINANT = 10**8


def _regulator_limit(D: int) -> int:
    compiled = BACKEND == "compiled" and D <= getattr(kernels, "MAX_CFRAC_DISCRIMINANT", 0)
    return REGULATOR_PERIOD_LIMIT_COMPILED if compiled else REGULATOR_PERIOD_LIMIT


def choose_method(order: Order, method: str = "auto", limit: int | None = None) -> str:
    """``"cfrac"``, ``"bsgs"`` or ``"subexp"``, resolving ``"auto"`` by size.

    The estimated period is compared with ``limit`` (default: the regulator's
    cut-off for the kernels in use); fields from :data:`AUTO_SUBEXP` on take
    index calculus.

    >>> choose_method(Order(4 * 61)), choose_method(Order(4 * (10**16 + 61)))
    ('cfrac', 'bsgs')
    >>> choose_method(Order(10**40 + 121))
    'subexp'
    """
    if check_method(method, METHODS) != "auto":
        return method
    D = order.discriminant
    if AUTO_SUBEXP <= D <= MAX_SUBEXP:
        return "subexp"
    if limit is None:
        limit = _regulator_limit(D)
    if D < _SMALL_DISCRIMINANT or estimated_period(D, 20_000) <= limit:
        return "cfrac"
    return "bsgs"


def fundamental_unit(
    order: Order | int,
    method: Method | str = "auto",
    *,
    max_period: int = DEFAULT_MAX_PERIOD,
    progress: Progress | None = None,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> Unit:
    """The fundamental unit ``ε > 1`` of an order (an :class:`Order` or its discriminant).

    ``max_period`` bounds the continued fraction's walk (it refuses a longer
    period); ``progress`` hears from the baby-step giant-step search and the
    sieve. ``workers``, ``scheduler`` and ``relations_file`` belong to
    ``method="subexp"`` (local processes, a Dask cluster, a resumable relation
    file; :func:`realquad.relations.system.index_calculus`).

    >>> u = fundamental_unit(4 * 61)
    >>> (u.x, u.y, u.norm)
    (29718, 3805, -1)
    """
    order = Order.of(order).require_real(NO_UNIT_OF_INFINITE_ORDER)
    chosen = choose_method(order, method, UNIT_PERIOD_LIMIT)
    if chosen == "subexp" and order.conductor != 1:
        # the field's unit (index calculus when the field is large enough), then its least
        # power in the order (realquad.units.orders)
        check_reach(order.discriminant)
        field = order.maximal_order()
        if field.discriminant >= MIN_SUBEXP:
            found = fundamental_unit_subexp(field, progress, 1, workers, scheduler, relations_file)
        else:
            refuse_sieve_options("cfrac", workers, scheduler, relations_file)
            found = fundamental_unit(field, max_period=max_period, progress=progress)
        return unit_of_order(order, found)
    if chosen == "subexp":
        return fundamental_unit_subexp(order, progress, 1, workers, scheduler, relations_file)
    refuse_sieve_options(chosen, workers, scheduler, relations_file)
    if chosen == "cfrac":
        return fundamental_unit_cfrac(order, max_period)
    return fundamental_unit_bsgs(order, progress)


def regulator(
    order: Order | int,
    digits: int = 30,
    method: Method | str = "auto",
    *,
    max_period: int = DEFAULT_MAX_PERIOD,
    progress: Progress | None = None,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> Regulator:
    """The regulator ``log ε`` of an order to ``digits`` significant digits.

    The keywords are those of :func:`fundamental_unit`.

    >>> str(regulator(5, 20))
    '0.48121182505960344750'
    >>> str(regulator(4 * (10**12 + 39), method="bsgs"))[:12]
    '631893.23081'
    """
    order = Order.of(order).require_real(NO_UNIT_OF_INFINITE_ORDER)
    chosen = choose_method(order, method)
    if chosen == "subexp" and order.conductor != 1:
        unit = fundamental_unit(
            order,
            "subexp",
            max_period=max_period,
            progress=progress,
            workers=workers,
            scheduler=scheduler,
            relations_file=relations_file,
        )
        return unit.regulator(digits)
    if chosen == "subexp":
        return regulator_subexp(order, digits, progress, 1, workers, scheduler, relations_file)
    refuse_sieve_options(chosen, workers, scheduler, relations_file)
    if chosen == "cfrac":
        return regulator_cfrac(order, digits, max_period)
    return regulator_bsgs(order, digits, progress)


__all__ = [
    "AUTO_SUBEXP",
    "DEFAULT_MAX_PERIOD",
    "METHODS",
    "NO_UNIT_OF_INFINITE_ORDER",
    "UNIT_PERIOD_LIMIT",
    "Method",
    "Regulator",
    "Unit",
    "UnitGroup",
    "choose_method",
    "fundamental_unit",
    "regulator",
    "unit_group",
]
