"""Class groups of quadratic fields by index calculus (sub-exponential), under GRH.

The relations and their certification are
:func:`realquad.relations.system.index_calculus`: the classes of the prime
ideals of norm up to ``4 log² |D|`` generate the class group under GRH;
relations among them come from smooth values of forms found by a
self-initialising sieve; the group is ``Z^n`` modulo the lattice of
relations (:func:`realquad.core.lattice.lattice_quotient`: structured
Gaussian elimination, then Hermite and Smith normal forms), certified by the
GRH-explicit interval for ``h`` (``D < 0``) or, with the regulator from the
units of the relation kernel, for ``h·R`` (``D > 0``). This module turns the
quotient into a :class:`~realquad.classgroup.group.ClassGroup`: each
generator is a product of prime forms (for ``D < 0`` checked by composition
to have the order of its invariant, and a sample of relations checked to be
principal); for ``D > 0`` the narrow group has one more column, the class of
the principal ideals with a generator of negative norm (the form
``(−1, b₀, −c₀)``), and the unit comes in :attr:`ClassGroup.unit`. The class
of any form is found by a smooth form in its coset (:class:`_Locator`).

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
>>> H = class_group_subexp(Order(4 * (10**10 + 19)))      # Q(√(10¹⁰ + 19)): h = 1, h⁺ = 2
>>> H.class_number, H.narrow_invariants, H.unit_norm, str(H.regulator)[:12]
(1, [2], 1, '147160.38610')
"""

from __future__ import annotations

import functools
import random

from realquad.classgroup.group import ClassGroup, Triple, forms_from_vectors
from realquad.core.forms import Form, prime_form_coefficients
from realquad.core.linalg import diagonal_smith
from realquad.core.orders import Order
from realquad.core.progress import Progress
from realquad.errors import TooLargeError
from realquad.relations.principal import ColumnFactoring, principal_ideal_relations
from realquad.relations.smooth import Relation
from realquad.relations.system import IndexCalculus, index_calculus
from realquad.units.subexp import unit_from_relations

METHOD = (
    "index calculus: relations among the {n} prime ideals of norm ≤ {bound} from a "
    "self-initialising sieve, Smith normal form of the relation lattice, h certified by the "
    "analytic class number formula"
)

METHOD_REAL = (
    "index calculus: relations among the {n} prime ideals of norm ≤ {bound} from a "
    "self-initialising sieve, Smith normal form of the relation lattice, the regulator from the "
    "units of its kernel, h·R certified by the analytic class number formula"
)


def _prime_form(D: int, p: int) -> Form:
    found = prime_form_coefficients(D, p)
    assert found is not None  # p splits or ramifies: it is in a relation
    return Form._raw(*found)


def _form_of(
    D: int, columns: list[int], vector: dict[int, int], modulus: int, extra: Form | None = None
) -> Form:
    """The reduced form ``∏ P_{columns[j]}^{vector[j]}`` (exponents taken modulo ``modulus``).

    Column ``len(columns)`` (the narrow group's sign column) is the form ``extra``.
    """
    support = sorted(vector)
    forms = [extra if j == len(columns) else _prime_form(D, columns[j]) for j in support]
    primes = [(F.a, F.b, F.c) for F in forms if F is not None]
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


class _Locator:
    """The coordinates of a class on the generators: a smooth reduced form in the class's coset.

    ``F·∏ P_j^{e_j}`` for random small exponents on a few factor-base primes
    is reduced to ``(a, b, c)``; when ``|a|`` factors over the matrix's
    columns, the ideal ``[|a|, (−b + √D)/2]`` is ``M·∏ P_p^{v_p}``
    (:class:`~realquad.relations.principal.ColumnFactoring`), which writes
    ``[F]`` on the columns, and the quotient's coordinate map does the rest.
    For ``D > 0`` the narrow class also counts the sign of ``a``: a form with
    ``a < 0`` is, in ``Cl⁺``, its ideal's class times that of the principal
    ideals with a generator of negative norm (the narrow quotient's last
    column). The expected number of tries is the inverse of the chance that a
    number of size ``√|D|`` is smooth over the factor base: hundreds at 40
    digits, about 10⁵ at 60.
    """

    def __init__(self, found: IndexCalculus) -> None:
        self.found = found
        fb = found.factor_base
        self.D = fb.discriminant
        self.factoring = ColumnFactoring(found)
        self.index = {p: j for j, p in enumerate(found.matrix.columns)}
        self.small = [p for p, r in zip(fb.primes, fb.ramified, strict=True) if not r][:30]

    def __call__(self, F: Form, narrow: bool = False, tries: int = 3_000_000) -> list[int]:
        rng = random.Random(F.a ^ F.b)
        G, shift = F.reduced(), dict[int, int]()
        for _ in range(tries):
            found = self.factoring.exponents(G.a, G.b)
            if found is not None:
                vector = found[0]
                for p, e in shift.items():
                    j = self.index[p]
                    vector[j] = vector.get(j, 0) - e
                if not narrow or self.found.narrow is None:
                    return self.found.quotient.coordinates(vector)
                if G.a < 0:
                    vector[len(self.index)] = 1
                if self.found.narrow is self.found.quotient:
                    vector.pop(len(self.index), None)
                return self.found.narrow.coordinates(vector)
            shift = {p: rng.randrange(1, 4) for p in rng.sample(self.small, 3)}
            G = F
            for p, e in shift.items():
                G = G.compose(_prime_form(self.D, p).power(e))
            G = G.reduced()
        raise TooLargeError(f"no smooth form found in the class of {F} after {tries:,} tries")


def class_group_subexp(
    order: Order,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> ClassGroup:
    """The class group of a quadratic field by index calculus, under GRH (module notes).

    ``workers``, ``scheduler`` and ``relations_file`` are those of
    :func:`~realquad.relations.system.index_calculus` (local processes, a
    Dask cluster, a resumable relation file).
    """
    found = index_calculus(order, progress, seed, workers, scheduler, relations_file)
    D = order.discriminant
    if D < 0:
        for rel in random.Random(seed).sample(found.relations, min(10, len(found.relations))):
            if not check_relation(D, rel):
                raise ArithmeticError(
                    f"internal check failed: a relation of {D} does not hold: {rel}"
                )
    wide = found.quotient
    columns = found.matrix.columns
    exponent = wide.invariants[-1] if wide.invariants else 1  # every class's order divides it
    forms = [_form_of(D, columns, g, exponent) for g in wide.generators]
    if D < 0:
        for F, d in zip(forms, wide.invariants, strict=True):
            if not F.power(d).reduced() == Form.identity(D).reduced():
                raise ArithmeticError(
                    f"internal check failed: {F} does not have order dividing {d}"
                )
    raw: list[Triple] = [(F.a, F.b, F.c) for F in forms]
    locate = _Locator(found)
    if D < 0:
        method = METHOD.format(n=found.factor_base.size, bound=found.factor_base.bound)
        smith = diagonal_smith(list(wide.invariants))
        return ClassGroup.definite(
            order,
            wide.order,
            list(wide.invariants),
            forms,
            smith,
            raw,
            method,
            "GRH",
            2,
            locate=locate,
        )
    unit = unit_from_relations(found)
    narrow = found.narrow
    assert narrow is not None
    if narrow is wide:
        narrow_forms = list(forms)
    else:
        negative = Form.identity(D)
        negative = Form._raw(-negative.a, negative.b, -negative.c)
        narrow_forms = [_form_of(D, columns, g, 2 * exponent, negative) for g in narrow.generators]
    return ClassGroup(
        order=order,
        class_number=wide.order,
        narrow_class_number=narrow.order,
        invariants=list(wide.invariants),
        narrow_invariants=list(narrow.invariants),
        generators=forms,
        narrow_generators=narrow_forms,
        unit_norm=unit.norm,
        method=METHOD_REAL.format(n=found.factor_base.size, bound=found.factor_base.bound),
        proof="GRH",
        unit=unit,
        _raw_generators=raw,
        _narrow_smith=diagonal_smith(list(narrow.invariants)),
        _wide_smith=diagonal_smith(list(wide.invariants)),
        _locate=locate,
        _principal=functools.partial(principal_ideal_relations, found),
    )
