"""Collecting relations: families of sieve polynomials until the relations cover the factor base.

Each round picks a leading coefficient ``a`` (a product of factor-base
primes near the size that balances the values over the sieve interval, one of
them a prime no relation has touched yet, so every column is reached),
sieves its ``2^(s−1)`` polynomials with the ``sieve_family`` kernel
(compiled, with its pure twin) and turns the candidates into relations
(:mod:`~realquad.relations.smooth`). Relations with one large prime are
kept, and from 72 digits those with two (the sieve's threshold leaves room
for them); the large primes that two relations or more meet become columns,
and the linear algebra combines their relations by elimination.

The parameters (:func:`sieve_parameters`) depend on the size of ``D`` only,
and the choices of ``a`` on a seeded generator, so one seed gives one set of
relations with either kernel.

The work goes out in batches of families (:class:`SieveBatch`, computed by
:func:`sieve_batch` in this process, local processes or on a Dask cluster,
:mod:`realquad.core.executors`); the process that chooses the ``a`` collects
the relations and saves each finished batch to the relation file when there
is one (:mod:`~realquad.relations.store`), so a search stopped at any moment
resumes with every relation it had.
"""

from __future__ import annotations

import bisect
import math
import random
from collections import Counter
from collections.abc import Callable, Iterator
from dataclasses import dataclass

from realquad._backend import call_kernel
from realquad.core.executors import InProcessExecutor
from realquad.core.lfunction import generating_bound
from realquad.core.progress import Progress
from realquad.relations.factor_base import FactorBase, factor_base
from realquad.relations.families import Family, family, sieve_inputs
from realquad.relations.smooth import Relation, relation_at
from realquad.relations.store import RelationStore


@dataclass(frozen=True)
class SieveParameters:
    """The sieve interval ``[−M, M)``, the large-prime bound, the threshold and the target ``a``."""

    M: int
    large_bound: int
    threshold: int
    scale: float
    log_a: float
    factors: int
    small: int
    batch: int = 64
    double: bool = False  # two large primes per relation (the threshold leaves room for them)


def factor_base_bound(D: int) -> int:
    """The factor base's bound: the generating bound ``4 log² |D|``, times a factor growing with ``D``.

    Beyond about 50 digits a larger factor base gives more relations a second
    per column (more values are smooth); its price is the linear algebra,
    whose elimination runs in Python. Measured (docs/performance.md): twice
    the bound at 60 and 70 digits was as fast as or faster than once, four
    times slower at 70. The factor: ``(digits − 45)/7.5`` between 1 and 2.

    >>> factor_base_bound(-(10**30 + 3)) == generating_bound(-(10**30 + 3))
    True
    >>> factor_base_bound(-(10**70 + 3)) // generating_bound(-(10**70 + 3))
    2
    """
    digits = math.log10(abs(D))
    factor = min(2.0, max(1.0, (digits - 45) / 7.5))
    return int(generating_bound(D) * factor)


#: The threshold's room for the large primes, in bits of one large prime (``log₂`` of the
#: large-prime bound, times 0.9): once below 55 digits, 1.3 times from there (more values
#: tried pays off), and from 72 digits 1.9 times, with two large primes allowed
#: (docs/performance.md: 80 digits in 280 s with 1.9, about 320 s with 1.6, over 400 s
#: with 2.2 and 446 s with one large prime).
ROOM_FROM, ROOM = 55, 1.3
DOUBLE_FROM, DOUBLE_ROOM = 72, 1.9


def sieve_parameters(D: int, bound: int) -> SieveParameters:
    """Parameters for ``D`` and a factor base up to ``bound`` (tuned on this project's benchmarks).

    >>> P = sieve_parameters(-(10**40 + 3), 33_932)
    >>> P.M, P.factors, P.large_bound
    (32768, 5, 1696600)
    """
    digits = math.log10(abs(D))
    sizes = ((14, 12), (20, 13), (26, 14), (50, 15), (75, 16), (math.inf, 17))
    M = 2 ** next(e for limit, e in sizes if digits < limit)
    root = math.sqrt(abs(D))
    if D < 0:
        log_a = math.log(root / (2 * M))
        typical = math.log2(M * root * 0.7)
    else:
        log_a = math.log(math.sqrt(abs(D) / 2) / M)
        typical = math.log2(M * root / (2 * math.sqrt(2)) * 0.5)
    large_bound = 50 * bound
    double = digits >= DOUBLE_FROM
    room = DOUBLE_ROOM if double else ROOM if digits >= ROOM_FROM else 1.0
    scale = min(1.0, 240.0 / (typical + 20))
    slack = math.log2(large_bound) * 0.9 * room + 4  # large primes, small primes not sieved
    threshold = max(1, round(scale * (typical - slack)))
    factors = max(2, min(11, round(log_a / math.log(2000))))
    batch = 2 if digits < 30 else 64
    return SieveParameters(M, large_bound, threshold, scale, log_a, factors, 40, batch, double)


def sieve_logs(fb: FactorBase, params: SieveParameters) -> list[int]:
    """The sieve's logarithms: ``round(scale·log₂ p)``, ``0`` (not sieved) below ``params.small``."""
    return [
        0 if p < params.small else x for p, x in zip(fb.primes, fb.logs(params.scale), strict=True)
    ]


def family_relations(
    fb: FactorBase, params: SieveParameters, logs: list[int], fam: Family
) -> list[Relation]:
    """The relations of the polynomials of one family (the ``sieve_family`` kernel, then trial division)."""
    roots1, roots2, shifts = sieve_inputs(fb, fam)
    found = call_kernel(
        "sieve_family",
        fb.primes,
        logs,
        roots1,
        roots2,
        shifts,
        fam.steps,
        params.M,
        params.threshold,
    )
    out = []
    for k, x, hits in found:
        rel = relation_at(fb, fam, k, x, params.large_bound, hits, params.double)
        if rel is not None:
            out.append(rel)
    return out


@dataclass(frozen=True)
class SieveBatch:
    """Families of polynomials to sieve, by the primes of their ``a``: one piece of work."""

    discriminant: int
    bound: int
    params: SieveParameters
    families: tuple[tuple[int, ...], ...]
    number: int
    conductor: int = 1

    @property
    def label(self) -> str:
        return f"sieve batch {self.number} of D = {self.discriminant}"


_FACTOR_BASES: dict[tuple[int, int], tuple[FactorBase, list[int]]] = {}


def sieve_batch(batch: SieveBatch) -> list[Relation]:
    """The relations of every family of a batch (in a worker: the factor base is built once)."""
    key = (batch.discriminant, batch.bound)
    if key not in _FACTOR_BASES:
        _FACTOR_BASES.clear()
        fb = factor_base(batch.discriminant, batch.bound, batch.conductor)
        _FACTOR_BASES[key] = fb, sieve_logs(fb, batch.params)
    fb, logs = _FACTOR_BASES[key]
    out = []
    for primes in batch.families:
        out += family_relations(fb, batch.params, logs, family(fb, list(primes)))
    return out


class Collector:
    """Chooses the families and keeps the relations found (module notes)."""

    def __init__(
        self,
        fb: FactorBase,
        params: SieveParameters,
        seed: int = 1,
        store: RelationStore | None = None,
    ) -> None:
        self.fb = fb
        self.params = params
        self.rng = random.Random(seed)
        self.counts: Counter[int] = Counter()  # relations meeting each prime
        self.relations: list[Relation] = []
        self.absent: list[int] = []  # primes the relation matrix has no row for yet (see system.py)
        self.used: set[int] = set()
        self.store = store
        if store is not None:
            self.used = store.families()
            self._keep(store.relations())
        self.pool = [p for p, r in zip(fb.primes, fb.ramified, strict=True) if p > 30 and not r]
        self.waiting = [p for p in self.pool if p <= fb.generating]  # primes that must be met
        self._must = set(self.waiting)
        self.logs = sieve_logs(fb, params)
        self._batches = 0
        self._gained = 0  # rows gained by collect() so far, and the most wanted at once
        self._goal = 0

    def _keep(self, relations: list[Relation]) -> None:
        """Keep relations and count the primes they meet."""
        self.relations += relations
        for rel in relations:
            self.counts.update(rel.exponents.keys())

    def want(self, primes: list[int]) -> None:
        """Primes with no row in the relation matrix yet: the next leading coefficients take them."""
        self.absent = [p for p in primes if p in self._must]

    def choose_a(self) -> list[int]:
        """The primes of the next ``a``: one the relation matrix still lacks, the rest near the balancing size.

        One such prime per family (one no relation meets, if there is one;
        before the first matrix, any prime up to the generating bound no
        relation meets): any relation of the family then expresses its class by
        the others (two new primes would need two relations). The others are
        drawn from a window around the size that leaves the same share of
        ``log a`` to each, and the last one makes the product nearest the
        target; a product more than a tenth of ``log a`` off the target (or
        twice the logarithm of the least prime) is drawn again: the values, and
        so the yield, depend on it.
        """
        P = self.params
        pool = self.pool
        tolerance = max(0.1 * P.log_a, 2 * math.log(pool[0]))  # small D: the least primes are far
        for attempt in range(400):
            spread = 1 + attempt // 25  # wider choices while the near ones are used up
            chosen: list[int] = []
            log_left = P.log_a
            waiting = [p for p in self.absent or self.waiting if not self.counts[p]] or self.absent
            for p in self.rng.sample(waiting, min(1, len(waiting))):
                if math.log(p) < log_left - math.log(pool[0]):
                    chosen.append(p)
                    log_left -= math.log(p)
            rest = max(1, P.factors - len(chosen))
            while rest > 1:
                i = bisect.bisect_left(pool, math.exp(log_left / rest))
                width = max(8, i // 4) * spread
                lo, hi = max(0, i - width), min(len(pool), i + width)
                p = pool[self.rng.randrange(lo, hi)] if hi > lo else pool[-1]
                if p not in chosen:
                    chosen.append(p)
                    log_left -= math.log(p)
                    rest -= 1
            i = bisect.bisect_left(pool, math.exp(log_left))
            near = [p for p in pool[max(0, i - 2 * spread) : i + 2 * spread] if p not in chosen]
            if near:
                chosen.append(near[self.rng.randrange(len(near))])
            a = math.prod(chosen)
            if abs(math.log(a) - P.log_a) > tolerance * spread or len(chosen) < 2:
                continue
            if a not in self.used:
                self.used.add(a)
                return sorted(chosen)
        raise ArithmeticError("internal check failed: no new leading coefficient for the sieve")

    def sieve(self, fam: Family) -> list[Relation]:
        """The relations of one family, kept."""
        rels = family_relations(self.fb, self.params, self.logs, fam)
        self._keep(rels)
        return rels

    def rounds(self) -> Iterator[list[Relation]]:
        """Families one after another in this process, forever: the relations each gives."""
        while True:
            yield self.sieve(family(self.fb, self.choose_a()))

    def collect(
        self,
        missing: Callable[[], int],
        executor: InProcessExecutor | None = None,
        workers: int = 1,
        progress: Progress | None = None,
    ) -> None:
        """Sieve batches of families on ``executor`` until ``missing()`` (rows still wanted) is 0.

        Each round sends at least ``2·workers`` batches, as many families as the
        rows gained per family so far say will end near the goal instead of far
        past it (at most ``2·workers·32`` families a round: ``missing()`` builds
        the relation matrix, which costs when rounds are short).
        ``progress`` hears, after each round, the rows gained against the rows
        wanted (a relation with a large prime met once is no row yet).
        """
        executor = executor if executor is not None else InProcessExecutor()
        per_batch = max(1, min(self.params.batch, 256 >> (self.params.factors - 1)))
        parts = 2 * workers
        rate = 0.0  # rows gained per family
        short = missing()
        self._goal = max(self._goal, self._gained + short)
        while short > 0:
            most = parts * max(per_batch, 32)  # a round of a few seconds at most: missing() costs
            want = parts if rate <= 0 else max(parts, min(most, math.ceil(1.2 * short / rate)))
            count = max(parts, math.ceil(want / per_batch))
            sizes = [want // count + (k < want % count) for k in range(count)]
            batches = []
            for size in filter(None, sizes):
                self._batches += 1
                families = tuple(tuple(self.choose_a()) for _ in range(size))
                batches.append(
                    SieveBatch(
                        self.fb.discriminant,
                        self.fb.bound,
                        self.params,
                        families,
                        self._batches,
                        self.fb.conductor,
                    )
                )
            for batch, rels, _ in executor.map_unordered(batches, sieve_batch):
                self._keep(rels)
                if self.store is not None:
                    self.store.add(rels, [math.prod(f) for f in batch.families])
            now = missing()
            gained, short = short - now, now
            if gained > 0:
                rate = max(rate, gained / want)
                self._gained += gained
            if progress is not None:
                progress("relation rows found", self._gained, self._goal)
