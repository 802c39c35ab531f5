"""Index calculus for both signs: relations collected until the relation lattice is certified.

The classes of the prime ideals of norm up to ``4 log² |D|`` generate the
class group under GRH (:func:`realquad.core.lfunction.generating_bound`);
the factor base holds them and, from about 50 digits on, primes up to twice
as far (:func:`~realquad.relations.collect.factor_base_bound`).
Relations come from the sieve (:mod:`~realquad.relations.collect`); the
matrix (:func:`relation_matrix`) has a column per prime up to the generating
bound and per prime beyond it that two relations meet, a row per relation
whose primes are all columns, and one ``P_p² = (p)`` per ramified prime. ``Z^n`` modulo its rows
(:func:`realquad.core.lattice.lattice_quotient`) has order ``h* = k·h`` once
the rows have full rank.

* ``D < 0``: relations are added until ``h*`` falls in the GRH-explicit
  interval for ``h = w√|D|·L(1, χ)/(2π)``
  (:func:`~realquad.core.lfunction.class_number_interval`, upper end below
  twice the lower), where the only multiple of ``h`` is ``h``. For an
  imaginary order of conductor ``f > 1`` the factor base leaves out the
  primes dividing ``f``, no relation may have a value sharing a factor with
  ``f``, the interval is the field's times ``f·∏(1 − (D₀/p)/p)`` over the
  unit index (:func:`class_number_range`), and no generating bound is
  assumed: :func:`realquad.classgroup.subexp.check_injective` shows that the
  quotient's generators are independent, so the factor base's subgroup has
  ``h*`` classes and ``h* = h``.
* ``D > 0``: the kernel of the matrix gives units
  (:mod:`~realquad.relations.regulator`) and their gcd ``R* = k'·R``;
  relations are added until ``h*·R*`` falls in the interval for ``h·R =
  √D·L(1, χ)/2`` (:func:`~realquad.core.lfunction.hR_interval`), where
  ``k = k' = 1``. The narrow group is ``Z^{n+1}`` modulo the rows with one
  more entry, ``1`` when the relation's generator has negative norm, and
  ``2·e_{n+1}``: the extra generator is the class of the principal ideals
  with a generator of negative norm (trivial in ``Cl⁺`` exactly when the
  fundamental unit has norm −1). A real order of conductor ``f > 1`` comes
  with its class number and unit norm, found from its field
  (:mod:`realquad.classgroup.orders`): relations are added until ``h* =
  h``, and the caller shows that the factor base generates the group.

Running time ``L(|D|)^{c}`` with ``L(x) = exp(√(log x·log log x))``
(J. Buchmann, Séminaire de Théorie des Nombres, Paris 1988–89; J. L. Hafner
and K. S. McCurley, *J. AMS* 2 (1989), 837–850; M. J. Jacobson Jr., *Math.
Comp.* 68 (1999), 859–867).

>>> found = index_calculus(Order(4 * (10**10 + 19)))
>>> found.quotient.order, found.unit.norm, mpmath.nstr(found.unit.log, 12)
(1, 1, '147160.386106')
"""

from __future__ import annotations

import contextlib
import functools
import math
import os
from collections import Counter
from collections.abc import Iterator
from dataclasses import dataclass, field
from fractions import Fraction

import mpmath

from realquad.core.executors import InProcessExecutor, make_executor
from realquad.core.lattice import LatticeQuotient, lattice_quotient, lattice_quotient_and_kernel
from realquad.core.lfunction import class_number_interval, hR_interval
from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.primes import factorize, kronecker
from realquad.core.progress import Progress
from realquad.errors import DomainError, InputError, TooLargeError
from realquad.relations.collect import Collector, factor_base_bound, sieve_parameters
from realquad.relations.factor_base import FactorBase, factor_base
from realquad.relations.regulator import (
    KernelUnit,
    a_primes,
    ramified_generator,
    relation_generator,
    unit_from_kernel,
)
from realquad.relations.smooth import Relation
from realquad.relations.store import RelationStore

#: Fields from this ``|D|`` on (smaller ones are the exact method's; the sieve needs room).
MIN_DISCRIMINANT = 10**10

#: Largest ``|D|`` the method is started for (100 digits: the published frontier; 80 digits take
#: three to five minutes on two cores, docs/performance.md).
MAX_DISCRIMINANT = 10**100

#: ``|D|`` from which the sieving runs on every core by default (below, starting processes costs more).
PARALLEL_FROM = 10**50

#: Kernel vectors asked of the linear algebra for the units (``D > 0``).
KERNEL_VECTORS = 10

Source = Relation | int  # a relation, or a ramified prime p (the row P_p² = (p))


@dataclass
class RelationMatrix:
    """Sparse rows on ``columns`` (factor-base primes, then large primes), each with its source."""

    rows: list[dict[int, int]]
    columns: list[int]
    sources: list[Source]


def relation_matrix(fb: FactorBase, relations: list[Relation], need: int) -> RelationMatrix:
    """The rows for the linear algebra: the columns of the primes up to the generating bound, then
    the primes beyond it (the factor base's and the large ones) that two relations or more meet.

    A relation goes in when each of its primes is a column. When the
    relations on the first columns alone meet every one of them and number at
    least ``need`` and half as many again as those columns, only they go to
    the linear algebra: every one that meets a prime no earlier one met, then
    others up to that number (fewer rows, faster elimination). A relation
    whose exponents repeat an earlier one's, or their negatives, is left out:
    it adds nothing to the lattice, and for ``D > 0`` the unit of the pair is
    often ``±1`` (small fields meet the same generator from many
    polynomials), which would crowd out the kernel's other vectors.
    """
    relations = _distinct(relations)
    g, first = fb.generating, fb.generating_count
    ramified = [p for p, r in zip(fb.primes, fb.ramified, strict=True) if r]
    full = [rel for rel in relations if max(rel.exponents) <= g]
    limit = max(need, first + first // 2) + 50
    if len(full) >= limit:
        met: set[int] = set()
        chosen = []
        for rel in full:
            if not met.issuperset(rel.exponents):
                met.update(rel.exponents)
                chosen.append(rel)
        if len(met) == first:
            kept = {id(rel) for rel in chosen}
            chosen += [rel for rel in full if id(rel) not in kept][: max(0, limit - len(chosen))]
            low = [p for p in ramified if p <= g]
            rows = [{fb.index[p]: 2} for p in low]
            rows += [{fb.index[p]: e for p, e in rel.exponents.items()} for rel in chosen]
            return RelationMatrix(rows, fb.primes[:first], [*low, *chosen])
    partial = [rel for rel in relations if max(rel.exponents) > g]
    while True:  # a prime beyond the bound that one kept relation meets takes it out, and so on
        beyond = Counter(p for rel in partial for p in rel.exponents if p > g)
        fewer = [rel for rel in partial if all(beyond[p] >= 2 for p in rel.exponents if p > g)]
        if len(fewer) == len(partial):
            break
        partial = fewer
    columns = fb.primes[:first] + sorted(beyond)
    index = {p: j for j, p in enumerate(columns)}
    low = [p for p in ramified if p in index]
    rows = [{index[p]: 2} for p in low]
    sources: list[Source] = list(low)
    for rel in full + partial:
        rows.append({index[p]: e for p, e in rel.exponents.items()})
        sources.append(rel)
    return RelationMatrix(rows, columns, sources)


def _distinct(relations: list[Relation]) -> list[Relation]:
    seen: set[tuple[tuple[int, int], ...]] = set()
    out = []
    for rel in relations:
        key = tuple(rel.exponents.items())
        if key[0][1] < 0:
            key = tuple((p, -e) for p, e in key)
        if key not in seen:
            seen.add(key)
            out.append(rel)
    return out


def _missing(fb: FactorBase, collector: Collector, need: int) -> int:
    """Rows still wanted: ``need`` beyond the large-prime columns, and one per prime not yet met.

    The primes up to the generating bound that no row of the matrix meets go
    to the collector, whose next leading coefficients take them.
    """
    m = relation_matrix(fb, collector.relations, need)
    met = {j for row in m.rows for j in row}
    absent = [p for j, p in enumerate(m.columns[: fb.generating_count]) if j not in met]
    collector.want(absent)
    return max(need + len(m.columns) - fb.generating_count - len(m.rows), len(absent))


@dataclass
class IndexCalculus:
    """The certified outcome: the quotient (``Cl``), for ``D > 0`` the unit and ``Cl⁺``'s quotient.

    ``generators[i]``/``negative[i]``: for ``D > 0``, a generator of row ``i``'s
    principal ideal and whether its norm is negative (rows in the unit's
    support and those of the narrow group's sign column).
    """

    order: Order
    factor_base: FactorBase
    matrix: RelationMatrix
    quotient: LatticeQuotient
    relations: list[Relation]
    unit: KernelUnit | None = None
    narrow: LatticeQuotient | None = None
    generators: dict[int, QuadraticNumber] = field(default_factory=dict)
    negative: list[bool] = field(default_factory=list)


def row_generator(found: IndexCalculus, i: int) -> QuadraticNumber:
    """A generator of the principal ideal ``∏ P_p^{r_p}`` of row ``i`` (``D > 0``), kept in
    ``found.generators``: the relation's (:func:`~realquad.relations.regulator.relation_generator`)
    or ``p`` for a ramified prime's row ``P_p² = (p)``."""
    if i not in found.generators:
        source = found.matrix.sources[i]
        fb = found.factor_base
        if isinstance(source, int):
            found.generators[i] = ramified_generator(fb.discriminant, source)
        else:
            found.generators[i] = relation_generator(fb, source)[0]
    return found.generators[i]


class _Generators:
    """Generators of the rows' ideals for ``D > 0``, computed once per relation."""

    def __init__(self, fb: FactorBase) -> None:
        self.fb = fb
        self.known: dict[int, tuple[QuadraticNumber, bool]] = {}
        self.a_primes: dict[int, list[int]] = {}

    def of(self, source: Source) -> tuple[QuadraticNumber, bool]:
        key = id(source)
        if key not in self.known:
            if isinstance(source, int):
                self.known[key] = (ramified_generator(self.fb.discriminant, source), False)
            else:
                primes = self.a_primes.get(source.a)
                if primes is None:
                    primes = self.a_primes[source.a] = a_primes(self.fb, source.a)
                self.known[key] = relation_generator(self.fb, source, primes)
        return self.known[key]

    def negative(self, source: Source) -> bool:
        """Whether the generator's norm is negative: the sign of ``n = f(x, 1)``."""
        if isinstance(source, int):
            return False
        return source.value(self.fb.discriminant) < 0


def refuse_sieve_options(chosen: str, *options: object) -> None:
    """Refuse workers, a scheduler or a relation file given to a method other than index calculus."""
    if any(x is not None for x in options):
        raise InputError(
            "workers, a scheduler and a relation file belong to the sieve of method='subexp' "
            f"(this order takes the {chosen} method)"
        )


def check_reach(D: int) -> None:
    """Refuse, before starting, a discriminant below or beyond the method's range.

    >>> check_reach(10**40 + 121)
    >>> try:
    ...     check_reach(10**101 + 1)
    ... except TooLargeError as exc:
    ...     print(str(exc)[:50])
    D has 102 digits: beyond reach of the sub-exponent
    """
    if abs(D) < MIN_DISCRIMINANT:
        raise DomainError(
            f"the sub-exponential method starts at |D| = 10¹⁰; D = {D} is the exact method's"
        )
    if abs(D) > MAX_DISCRIMINANT:
        raise TooLargeError(
            f"D has {len(str(abs(D)))} digits: beyond reach of the sub-exponential method "
            "(at most 100 digits; 80 take minutes on two cores)"
        )


def index_calculus(
    order: Order,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
    class_number: int | None = None,
    unit_norm: int | None = None,
) -> IndexCalculus:
    """Relations for the field ``order`` until its class group (and regulator) are certified.

    A real order of conductor ``> 1`` needs its ``class_number`` and the norm
    of its unit (``unit_norm``), found from its field's
    (:mod:`realquad.classgroup.orders`): the relations are collected until
    ``h*`` is that class number, and the caller shows that the factor base
    generates the class group.

    The sieving runs in ``workers`` local processes (default: one below
    ``|D| = 10⁵⁰``, every core beyond) or on the Dask cluster at
    ``scheduler``; with ``relations_file`` every relation is saved as it
    comes, and a run stopped at any moment resumes from the file.
    """
    D = order.discriminant
    check_reach(D)
    if order.conductor != 1 and D > 0 and (class_number is None or unit_norm is None):
        raise DomainError(
            f"index calculus on the real order of discriminant {D} (conductor "
            f"{order.conductor}) needs its class number and unit norm, found from its field "
            "by class_group(D, method='subexp') and fundamental_unit(D, method='subexp')"
        )
    bound = factor_base_bound(D)
    fb = factor_base(D, bound, order.conductor)
    params = sieve_parameters(D, bound)
    if workers is None and scheduler is None:
        workers = 1 if abs(D) < PARALLEL_FROM else (os.cpu_count() or 1)
    with contextlib.ExitStack() as stack:
        store = (
            stack.enter_context(RelationStore(relations_file, D, bound)) if relations_file else None
        )
        executor = stack.enter_context(make_executor(workers, scheduler))
        collector = Collector(fb, params, seed, store)
        if D < 0:
            return _imaginary(order, fb, collector, executor, workers or 4, progress)
        if class_number is not None and unit_norm is not None and order.conductor != 1:
            rounds = _matrices(
                fb, collector, executor, workers or 4, progress, *_row_targets(fb.generating_count)
            )
            return _real_order(order, fb, collector, rounds, class_number, unit_norm)
        return _real(order, fb, collector, executor, workers or 4, progress)


def _matrices(
    fb: FactorBase,
    collector: Collector,
    executor: InProcessExecutor,
    workers: int,
    progress: Progress | None,
    need: int,
    step: int,
) -> Iterator[RelationMatrix]:
    """The relation matrix after each round of sieving; each round wants ``step`` more rows."""
    while True:
        collector.collect(
            functools.partial(_missing, fb, collector, need), executor, workers, progress
        )
        matrix = relation_matrix(fb, collector.relations, need)
        yield matrix
        need = max(need, len(matrix.rows) - (len(matrix.columns) - fb.generating_count)) + step


def _imaginary(
    order: Order,
    fb: FactorBase,
    collector: Collector,
    executor: InProcessExecutor,
    workers: int,
    progress: Progress | None,
) -> IndexCalculus:
    """``h* = h`` once ``h*`` is in the class number interval ``[lo, hi]`` (``hi < 2·lo``).

    For an order of conductor ``f > 1`` that is ``h* = k·|G|`` with ``G`` the
    subgroup the factor base generates; ``G = Cl`` is checked by the caller
    (:func:`realquad.classgroup.subexp.class_group_subexp`).
    """
    lo, hi = class_number_range(order)
    if hi >= 2 * lo:  # pragma: no cover - the bound is far tighter at these sizes
        raise ArithmeticError(f"internal check failed: the interval [{lo}, {hi}] is too wide")
    need, step = _row_targets(fb.generating_count)
    for matrix in _matrices(fb, collector, executor, workers, progress, need, step):
        found = lattice_quotient(matrix.rows, len(matrix.columns))
        if found is not None and found.order <= hi:
            if found.order < lo:
                raise ArithmeticError(
                    f"internal check failed: the relations give {found.order} classes, below the "
                    f"class number interval [{lo}, {hi}] (GRH?)"
                )
            return IndexCalculus(order, fb, matrix, found, collector.relations)
    raise AssertionError("unreachable: the rounds never end")  # pragma: no cover


def class_number_range(order: Order) -> tuple[int, int]:
    """``[lo, hi]`` holding the class number of the imaginary order, under GRH.

    For the field, :func:`~realquad.core.lfunction.class_number_interval`;
    for the order of conductor ``f``, ``h(O) = h_K·f·∏_{p | f}(1 − (D₀/p)/p)
    / [O_K^× : O^×]`` (Cox, *Primes of the form x² + ny²*, Theorem 7.24;
    the unit index is 3 for ``D₀ = −3``, 2 for ``D₀ = −4``, else 1).

    >>> class_number_range(Order(-3 * 7**2))     # h(−147) = 1·7·(1 − 1/7)/3 = 2
    (2, 2)
    >>> class_number_range(Order(-4 * 10**2))    # h(−400) = 1·10·(1 − 0/2)(1 − 1/5)/2 = 4
    (4, 4)
    """
    D0, f = order.fundamental_discriminant, order.conductor
    w = {-3: 6, -4: 4}.get(D0, 2)
    lo, hi = class_number_interval(D0, w, 10**5 if -D0 < 10**30 else 10**6).integers()
    if f == 1:
        return lo, hi
    factor = Fraction(f, w // 2)
    for p in factorize(f):
        factor *= 1 - Fraction(kronecker(D0, p), p)
    return math.ceil(lo * factor), math.floor(hi * factor)


def _real(
    order: Order,
    fb: FactorBase,
    collector: Collector,
    executor: InProcessExecutor,
    workers: int,
    progress: Progress | None,
) -> IndexCalculus:
    """``h*·R* = h·R`` once it is in the ``h·R`` interval (upper end below twice the lower)."""
    D = order.discriminant
    interval = hR_interval(D, 10**5 if D < 10**30 else 10**6)
    if interval.upper >= 2 * interval.lower:  # pragma: no cover - far tighter at these sizes
        raise ArithmeticError(f"internal check failed: the h·R interval {interval} is too wide")
    gens = _Generators(fb)
    first = fb.generating_count
    need = first + max(20 + KERNEL_VECTORS, first // 20)
    step = max(10, first // 10)
    rounds = _matrices(fb, collector, executor, workers, progress, need, step)
    for attempt, matrix in enumerate(rounds, start=1):
        count = min(4, attempt) * KERNEL_VECTORS  # more vectors when the first were not enough
        found, kernel = lattice_quotient_and_kernel(
            matrix.rows, len(matrix.columns), count, attempt, kernel_if_finite=True
        )
        unit = None
        if found is not None and kernel:
            support = sorted({i for c in kernel for i in c})
            generators = {i: gens.of(matrix.sources[i])[0] for i in support}
            negative = [gens.negative(s) for s in matrix.sources]
            unit = _unit(generators, negative, kernel)
        if found is not None and unit is not None:
            hR = found.order * unit.log
            if hR <= interval.upper:
                if hR < interval.lower:
                    raise ArithmeticError(
                        f"internal check failed: the relations give h·R = {mpmath.nstr(hR, 12)}, "
                        f"below the interval [{interval.lower}, {interval.upper}] (GRH?)"
                    )
                narrow = found
                if unit.norm == 1:
                    narrow = _narrow_quotient(matrix, negative, found.order)
                return IndexCalculus(
                    order,
                    fb,
                    matrix,
                    found,
                    collector.relations,
                    unit,
                    narrow,
                    generators,
                    negative,
                )
    raise AssertionError("unreachable: the rounds never end")  # pragma: no cover


def _row_targets(first: int) -> tuple[int, int]:
    """Rows wanted for the first matrix, and more for each next one (no kernel needed)."""
    return first + max(20, first // 20), max(10, first // 20)


def _real_order(
    order: Order,
    fb: FactorBase,
    collector: Collector,
    rounds: Iterator[RelationMatrix],
    h: int,
    unit_norm: int,
) -> IndexCalculus:
    """A real order whose class number ``h`` is known: rounds until ``h* = h`` (module notes)."""
    gens = _Generators(fb)
    for matrix in rounds:
        found = lattice_quotient(matrix.rows, len(matrix.columns))
        if found is None or found.order > h:
            continue
        if found.order < h:
            raise ArithmeticError(
                f"the factor base of D = {order.discriminant} generates a subgroup of "
                f"{found.order} classes, not all {h}: the class group is not certified"
            )
        negative = [gens.negative(s) for s in matrix.sources]
        narrow = _narrow_quotient(matrix, negative, h) if unit_norm == 1 else found
        relations = collector.relations
        return IndexCalculus(order, fb, matrix, found, relations, None, narrow, {}, negative)
    raise AssertionError("unreachable: the rounds never end")  # pragma: no cover


def _unit(
    generators: dict[int, QuadraticNumber],
    negative: list[bool],
    kernel: list[dict[int, int]],
) -> KernelUnit | None:
    index = sorted(generators)
    position = {i: k for k, i in enumerate(index)}
    local = [{position[i]: v for i, v in c.items()} for c in kernel]
    found = unit_from_kernel([generators[i] for i in index], [negative[i] for i in index], local)
    if found is None:
        return None
    exponents = {index[k]: v for k, v in found.exponents.items()}
    return KernelUnit(exponents, found.log, found.error, found.norm)


def _narrow_quotient(matrix: RelationMatrix, negative: list[bool], h: int) -> LatticeQuotient:
    """``Cl⁺`` when the fundamental unit has norm +1: one more column for the sign (module notes)."""
    n = len(matrix.columns)
    rows = [{**r, n: 1} if neg else r for r, neg in zip(matrix.rows, negative, strict=True)]
    rows.append({n: 2})
    found = lattice_quotient(rows, n + 1)
    if found is None or found.order != 2 * h:
        raise ArithmeticError(
            "internal check failed: the narrow class group from the relations does not have "
            f"order 2h = {2 * h}"
        )
    return found
