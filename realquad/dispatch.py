"""Fundamental units and regulators: one public function each, choosing the method by size.

* ``"cfrac"`` — the half-period continued fraction (:mod:`realquad.units`):
  exact and unconditional, cost proportional to the period ``l ≈ R/1.19``;
* ``"bsgs"`` — baby-step giant-step in the infrastructure
  (:mod:`realquad.infrastructure`): unconditional, cost about ``√R`` steps,
  the unit kept in compact form;
* ``"auto"`` — the continued fraction while the estimated period is short,
  the infrastructure beyond. The period is estimated through ``R ≤ h·R``,
  the analytic class number formula's estimate
  (:mod:`realquad.lfunction`), divided by Lévy's constant.

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

Both methods return the same :class:`~realquad.results.Unit` and
:class:`~realquad.results.Regulator`, whose ``method`` says which one ran.

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

from realquad import lfunction, units
from realquad._backend import BACKEND, kernels
from realquad.arith import Order
from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.regulator_bsgs import (
    DEFAULT_MAX_TABLE,
    BSGSResult,
    Progress,
    regulator_bsgs,
)
from realquad.infrastructure.regulator_bsgs import METHOD as BSGS_METHOD
from realquad.lfunction import estimate_hR
from realquad.results import Regulator, Unit

Method = Literal["auto", "cfrac", "bsgs"]
METHODS = ("auto", "cfrac", "bsgs")

#: Estimated period up to which ``regulator(..., method="auto")`` walks the continued fraction
#: with the pure-Python kernels, and with the compiled ones (benchmark, docs/performance.md).
REGULATOR_PERIOD_LIMIT = 40_000
REGULATOR_PERIOD_LIMIT_COMPILED = 300_000

#: Estimated period up to which ``fundamental_unit(..., method="auto")`` walks the continued fraction.
UNIT_PERIOD_LIMIT = 10_000_000

#: Discriminants this small always have a short period (``l < 2√D``-ish).
_SMALL_DISCRIMINANT = 10**8


def estimated_period(D: int) -> float:
    """An estimate (an upper one, up to the Euler product's error) of the period length."""
    return lfunction.estimated_period(D, 20_000)


def _regulator_limit(D: int) -> int:
    compiled = BACKEND == "compiled" and D <= getattr(kernels, "MAX_CFRAC_DISCRIMINANT", 0)
    return REGULATOR_PERIOD_LIMIT_COMPILED if compiled else REGULATOR_PERIOD_LIMIT


def choose_method(order: Order, method: str = "auto", limit: int | None = None) -> str:
    """``"cfrac"`` or ``"bsgs"``, resolving ``"auto"`` by the estimated period against ``limit``.

    The default ``limit`` is the regulator's cut-off for the kernels in use.
    """
    if method not in METHODS:
        raise InputError(f"method must be one of {', '.join(METHODS)}, got {method!r}")
    if method != "auto":
        return method
    D = order.discriminant
    if limit is None:
        limit = _regulator_limit(D)
    if D < _SMALL_DISCRIMINANT or estimated_period(D) <= limit:
        return "cfrac"
    return "bsgs"


def _as_order(order: Order | int) -> Order:
    return order if isinstance(order, Order) else Order(order)


#: Largest number of giant steps the infrastructure search is started for (hours of work).
MAX_GIANT_STEPS = 10**9

#: Largest unit (decimal digits) :meth:`Unit.expand` writes out from a compact representation.
MAX_EXPANDED_DIGITS = 50_000_000


def check_reach(D: int) -> None:
    """Refuse, before starting, a search that would need more than :data:`MAX_GIANT_STEPS` giant steps.

    >>> check_reach(10**20 + 129)   # about 10⁴ giant steps: fine
    >>> try:
    ...     check_reach(10**60 + 1)
    ... except TooLargeError as exc:
    ...     print(str(exc)[:60])
    the regulator of D = 100000000000000000000000000000000000000
    """
    E = estimate_hR(D, 2_000).value
    steps = E / (2 * 1.19 * DEFAULT_MAX_TABLE)
    if steps > MAX_GIANT_STEPS:
        raise TooLargeError(
            f"the regulator of D = {D} needs about {steps:.1e} giant steps of baby-step "
            f"giant-step (R may be near {E:.1e}); this is beyond reach of the methods "
            "implemented here (subexponential methods are planned)"
        )


def _bsgs_unit(order: Order, progress: Progress | None) -> Unit:
    D = order.discriminant
    check_reach(D)
    return unit_from_search(order, regulator_bsgs(D, 30, progress=progress))


def unit_from_search(order: Order, found: BSGSResult) -> Unit:
    """The :class:`Unit` of a finished baby-step giant-step regulator search (unit kept compact)."""
    D = order.discriminant
    eps = CompactRepresentation.from_factors(D, found.factors)
    first = found.regulator

    def regulator_to(digits: int) -> Regulator:
        if digits <= first.digits:
            return first if digits == first.digits else _rounded(first, digits)
        value, bound = eps.log(digits)
        return Regulator(value, digits, bound, BSGS_METHOD, "unconditional")

    return Unit(
        order=order,
        norm=eps.norm,
        period_length=None,
        method=BSGS_METHOD,
        proof="unconditional",
        _expander=lambda: eps.expand(MAX_EXPANDED_DIGITS),
        _regulator=regulator_to,
        _compact=lambda: eps,
    )


def _rounded(reg: Regulator, digits: int) -> Regulator:
    return Regulator(reg.value, digits, reg.error_bound, reg.method, reg.proof)


def fundamental_unit(
    order: Order | int,
    method: Method | str = "auto",
    *,
    max_period: int | None = None,
    progress: Progress | None = None,
) -> Unit:
    """The fundamental unit ``ε > 1`` of an order (an :class:`Order` or its discriminant).

    >>> u = fundamental_unit(4 * 61)
    >>> (u.x, u.y, u.norm)
    (29718, 3805, -1)
    """
    order = _as_order(order)
    if choose_method(order, method, UNIT_PERIOD_LIMIT) == "cfrac":
        if max_period is None:
            return units.fundamental_unit(order)
        return units.fundamental_unit(order, max_period)
    return _bsgs_unit(order, progress)


def regulator(
    order: Order | int,
    digits: int = 30,
    method: Method | str = "auto",
    *,
    max_period: int | None = None,
    progress: Progress | None = None,
) -> Regulator:
    """The regulator ``log ε`` of an order to ``digits`` significant digits.

    >>> str(regulator(5, 20))
    '0.48121182505960344750'
    >>> str(regulator(4 * (10**12 + 39), method="bsgs"))[:12]
    '631893.23081'
    """
    order = _as_order(order)
    if choose_method(order, method) == "cfrac":
        if max_period is None:
            return units.regulator(order, digits)
        return units.regulator(order, digits, max_period)
    D = order.discriminant
    check_reach(D)
    return regulator_bsgs(D, digits, progress=progress).regulator
