"""Class groups of imaginary quadratic fields by index calculus (sub-exponential), under GRH.

The classes of the prime ideals of norm up to ``4 log² |D|`` generate the
class group under GRH (:func:`realquad.core.lfunction.generating_bound`);
they are the factor base. Relations among them come from smooth values of
forms found by a self-initialising sieve (:mod:`realquad.relations`); the
group is ``Z^n`` modulo the lattice of relations
(:func:`realquad.core.lattice.lattice_quotient`: structured Gaussian
elimination, then Hermite and Smith normal forms). Its order is a multiple
of ``h`` as soon as the relations have full rank; relations are added until
it falls in the GRH-explicit interval for ``h = w√|D|·L(1, χ)/(2π)``
(:func:`realquad.core.lfunction.class_number_interval`, whose upper end is
below twice its lower end), where the only multiple of ``h`` is ``h`` itself.
Then the quotient is the class group, its invariants are those of
``Cl(D)``, and each generator (a product of prime forms) is checked to have
the order of its invariant by composition.

Running time ``L(|D|)^{c}`` with ``L(x) = exp(√(log x·log log x))``
(J. Buchmann, "A subexponential algorithm for the determination of class
groups and regulators of algebraic number fields", Séminaire de Théorie des
Nombres, Paris 1988–89; J. L. Hafner and K. S. McCurley, "A rigorous
subexponential algorithm for computation of class groups", *J. AMS* 2
(1989), 837–850; sieving: M. J. Jacobson Jr., *Math. Comp.* 68 (1999),
859–867).

>>> G = class_group_subexp(Order(-(10**12 + 11)))   # compare: the exact method
>>> from realquad.classgroup.imaginary import class_group_imaginary
>>> E = class_group_imaginary(Order(-(10**12 + 11)))
>>> G.class_number == E.class_number, G.invariants == E.invariants, G.proof
(True, True, 'GRH')
"""

from __future__ import annotations

import contextlib
import functools
import math
import os
import random
from collections import Counter

import gmpy2

from realquad.classgroup.group import ClassGroup, Triple, forms_from_vectors
from realquad.core.executors import InProcessExecutor, make_executor
from realquad.core.forms import Form, prime_form_coefficients
from realquad.core.lattice import LatticeQuotient, lattice_quotient
from realquad.core.lfunction import class_number_interval, generating_bound
from realquad.core.linalg import diagonal_smith
from realquad.core.orders import Order
from realquad.core.progress import Progress
from realquad.errors import DomainError, TooLargeError
from realquad.relations.collect import Collector, sieve_parameters
from realquad.relations.factor_base import FactorBase, factor_base
from realquad.relations.smooth import Relation, sign_of
from realquad.relations.store import RelationStore
from realquad.units import unit_group

METHOD = (
    "index calculus: relations among the {n} prime ideals of norm ≤ {bound} from a "
    "self-initialising sieve, Smith normal form of the relation lattice, h certified by the "
    "analytic class number formula"
)

#: Fields from this ``|D|`` on (smaller ones are the exact method's; the sieve needs room).
MIN_DISCRIMINANT = 10**10

#: ``|D|`` from which the sieving runs on every core by default (below, starting processes costs more).
PARALLEL_FROM = 10**50


def _interval(D: int, w: int) -> tuple[int, int]:
    lo, hi = class_number_interval(D, w, 10**5 if -D < 10**30 else 10**6).integers()
    if hi >= 2 * lo:  # pragma: no cover - the bound is far tighter at these sizes
        raise ArithmeticError(f"internal check failed: the interval [{lo}, {hi}] is too wide")
    return lo, hi


def _rows(
    fb: FactorBase, relations: list[Relation], need: int
) -> tuple[list[dict[int, int]], list[int]]:
    """Sparse rows on the columns: the factor base, then the large primes met at least twice.

    When the relations without a large prime meet every prime of the factor
    base and number at least ``need`` and half the factor base again, only
    they go to the linear algebra: every one that meets a prime no earlier one
    met, then others up to that number (fewer rows, faster elimination).
    """
    rows = [{j: 2} for j, r in enumerate(fb.ramified) if r]
    full = [rel for rel in relations if rel.large == 1]
    limit = max(need, fb.size + fb.size // 2) + 50
    if len(full) >= limit:
        met: set[int] = set()
        chosen = []
        for rel in full:
            if not met.issuperset(rel.exponents):
                met.update(rel.exponents)
                chosen.append(rel)
        if len(met) == fb.size:
            kept = {id(rel) for rel in chosen}
            chosen += [rel for rel in full if id(rel) not in kept][: max(0, limit - len(chosen))]
            rows += [{fb.index[p]: e for p, e in rel.exponents.items()} for rel in chosen]
            return rows, list(fb.primes)
    large = Counter(r.large for r in relations if r.large != 1)
    columns = list(fb.primes) + sorted(q for q, k in large.items() if k >= 2)
    index = {p: j for j, p in enumerate(columns)}
    for rel in relations:
        if rel.large == 1 or large[rel.large] >= 2:
            rows.append({index[p]: e for p, e in rel.exponents.items()})
    return rows, columns


def _prime_form(D: int, p: int) -> Form:
    found = prime_form_coefficients(D, p)
    assert found is not None  # p splits or ramifies: it is in a relation
    return Form._raw(*found)


def _form_of(D: int, columns: list[int], vector: dict[int, int], modulus: int) -> Form:
    """The reduced form ``∏ P_{columns[j]}^{vector[j]}`` (exponents taken modulo ``modulus``)."""
    support = sorted(vector)
    primes = [(F.a, F.b, F.c) for F in (_prime_form(D, columns[j]) for j in support)]
    return forms_from_vectors(D, primes, [[vector[j] for j in support]], modulus)[0].reduced()


def check_relation(D: int, relation: Relation) -> bool:
    """Whether ``∏ P_p^{e_p}`` is the principal class (by composition of definite forms).

    Cl(−20) ≅ Z/2 with P₂, P₃, P₇ in the class of order 2 and P₅ principal (Cox, §2.A):

    >>> check_relation(-20, Relation({2: 1, 5: 1}, 0, 0, 0))
    False
    >>> check_relation(-20, Relation({2: 2}, 0, 0, 0)), check_relation(-20, Relation({3: 1, 7: 1}, 0, 0, 0))
    (True, True)
    """
    F = Form.identity(D)
    for p, e in relation.exponents.items():
        F = F.compose(_prime_form(D, p).power(e))
    return F.reduced() == Form.identity(D).reduced()


def _missing(fb: FactorBase, collector: Collector, need: int) -> int:
    """Rows still wanted: ``need`` beyond the large-prime columns, and one per prime not yet met."""
    rows, columns = _rows(fb, collector.relations, need)
    return max(need + len(columns) - fb.size - len(rows), len(collector.uncovered()))


class _Locator:
    """The coordinates of a class on the generators: a smooth reduced form in the class's coset.

    ``F·∏ P_j^{e_j}`` for random small exponents on a few factor-base primes
    is reduced to ``(a, b, c)``; when ``a`` factors over the factor base,
    ``(a, b, ·) = ∏ P_p^{±e_p}`` (signs from ``b`` modulo ``p``, as in
    :mod:`realquad.relations.smooth`), which writes ``[F]`` on the columns,
    and the quotient's coordinate map does the rest. The expected number of
    tries is the inverse of the chance that a number of size ``√|D|`` is
    smooth over the factor base: hundreds at 40 digits, about 10⁵ at 60.
    """

    def __init__(self, D: int, fb: FactorBase, found: LatticeQuotient, columns: list[int]) -> None:
        self.D, self.fb, self.found = D, fb, found
        self.index = {p: j for j, p in enumerate(columns)}
        self.product = gmpy2.mpz(math.prod(fb.primes))
        self.small = [p for p, r in zip(fb.primes, fb.ramified, strict=True) if not r][:30]

    def _smooth_exponents(self, a: int, b: int) -> dict[int, int] | None:
        g = gmpy2.gcd(self.product % a, a)
        rest = gmpy2.mpz(a)
        while g > 1:
            rest //= g
            g = gmpy2.gcd(rest, g)
        if rest != 1:
            return None
        out: dict[int, int] = {}
        for p, bp in zip(self.fb.primes, self.fb.b, strict=True):
            if a % p == 0:
                _, e = gmpy2.remove(a, p)
                out[p] = out.get(p, 0) + sign_of(b, p, bp, self.D) * int(e)
        return out

    def __call__(self, F: Form, tries: int = 3_000_000) -> list[int]:
        rng = random.Random(F.a ^ F.b)
        G, shift = F.reduced(), dict[int, int]()
        for _ in range(tries):
            found = self._smooth_exponents(G.a, G.b)
            if found is not None:
                for p, e in shift.items():
                    found[p] = found.get(p, 0) - e
                return self.found.coordinates({self.index[p]: e for p, e in found.items() if e})
            shift = {p: rng.randrange(1, 4) for p in rng.sample(self.small, 3)}
            G = F
            for p, e in shift.items():
                G = G.compose(_prime_form(self.D, p).power(e))
            G = G.reduced()
        raise TooLargeError(f"no smooth form found in the class of {F} after {tries:,} tries")


def _quotient(
    fb: FactorBase,
    collector: Collector,
    lo: int,
    hi: int,
    executor: InProcessExecutor,
    workers: int,
    progress: Progress | None,
) -> tuple[LatticeQuotient, list[int]]:
    """The quotient by the relations once its order is in ``[lo, hi]`` (then it is ``h``)."""
    need = fb.size + max(20, fb.size // 20)
    while True:
        collector.collect(
            functools.partial(_missing, fb, collector, need), executor, workers, progress
        )
        rows, columns = _rows(fb, collector.relations, need)
        found = lattice_quotient(rows, len(columns))
        if found is not None and found.order <= hi:
            if found.order < lo:
                raise ArithmeticError(
                    f"internal check failed: the relations give {found.order} classes, below the "
                    f"class number interval [{lo}, {hi}] (GRH?)"
                )
            return found, columns
        need = max(need, len(rows) - (len(columns) - fb.size)) + max(10, fb.size // 20)


def class_group_subexp(
    order: Order,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> ClassGroup:
    """The class group of an imaginary quadratic field by index calculus, under GRH (module notes).

    The sieving runs in ``workers`` local processes (default: one below
    ``|D| = 10⁵⁰``, every core beyond) or on the Dask cluster at ``scheduler``;
    with ``relations_file`` every relation is saved as it comes, and a run
    stopped at any moment resumes from the file.
    """
    D = order.discriminant
    if D > 0 or order.conductor != 1:
        raise DomainError(
            f"the sub-exponential method for D < 0 takes fields (fundamental discriminants), not D = {D}"
        )
    if -D < MIN_DISCRIMINANT:
        raise DomainError(
            f"the sub-exponential method starts at |D| = 10¹⁰; D = {D} is the exact method's"
        )
    w = unit_group(order).roots_of_unity
    bound = generating_bound(D)
    fb = factor_base(D, bound)
    params = sieve_parameters(D, bound)
    lo, hi = _interval(D, w)
    if workers is None and scheduler is None:
        workers = 1 if -D < PARALLEL_FROM else (os.cpu_count() or 1)
    with contextlib.ExitStack() as stack:
        store = (
            stack.enter_context(RelationStore(relations_file, D, bound)) if relations_file else None
        )
        executor = stack.enter_context(make_executor(workers, scheduler))
        collector = Collector(fb, params, seed, store)
        found, columns = _quotient(fb, collector, lo, hi, executor, workers or 4, progress)
    relations = collector.relations
    for rel in random.Random(seed).sample(relations, min(10, len(relations))):
        if not check_relation(D, rel):
            raise ArithmeticError(f"internal check failed: a relation of {D} does not hold: {rel}")
    h = found.order
    exponent = found.invariants[-1] if found.invariants else 1  # every class's order divides it
    forms = [_form_of(D, columns, g, exponent) for g in found.generators]
    for F, d in zip(forms, found.invariants, strict=True):
        if not F.power(d).reduced() == Form.identity(D).reduced():
            raise ArithmeticError(f"internal check failed: {F} does not have order dividing {d}")
    smith = diagonal_smith(list(found.invariants))
    raw: list[Triple] = [(F.a, F.b, F.c) for F in forms]
    method = METHOD.format(n=fb.size, bound=bound)
    locate = _Locator(D, fb, found, columns)
    return ClassGroup.definite(
        order, h, list(found.invariants), forms, smith, raw, method, "GRH", w, locate=locate
    )
