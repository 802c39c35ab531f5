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
of any form is found by a smooth form in its coset (:class:`ClassLocator`).

Imaginary orders of conductor ``f > 1`` take the same road over the prime
ideals prime to ``f``; instead of a generating bound, the generators are
shown independent by their ``q``-torsion (:func:`check_injective`): the
subgroup they generate then has ``h*`` classes, and ``h*`` in the interval
for ``h(O)`` (``hi < 2·lo``) leaves no room for a larger group.

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

import math
import random

from realquad.classgroup.group import ClassGroup, Triple, forms_from_vectors
from realquad.core.forms import Form, prime_form_coefficients
from realquad.core.linalg import diagonal_smith
from realquad.core.orders import Order
from realquad.core.primes import factorize
from realquad.core.progress import Progress
from realquad.core.results import Proof
from realquad.errors import TooLargeError
from realquad.relations.principal import ColumnFactoring, PrincipalTest
from realquad.relations.smooth import Relation
from realquad.relations.system import IndexCalculus, index_calculus
from realquad.units.results import Unit
from realquad.units.subexp import unit_from_relations

METHOD = (
    "index calculus: relations among the {n} prime ideals of norm ≤ {bound} from a "
    "self-initialising sieve, Smith normal form of the relation lattice, h certified by the "
    "analytic class number formula"
)

#: Added for an order of conductor > 1 (no generating bound is used: :func:`check_injective`).
ORDER_CHECK = ", the structure certified by the generators' independence (q-torsion)"

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


class ClassLocator:
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

    def _prime_to_conductor(self, G: Form) -> Form:
        """For a real order, the first form from ``G`` on along its cycle with ``a`` prime to ``f``.

        Reduction lands far more often than by chance on forms like ``(p², ·, ·)``
        for ``p | f`` (those have a tiny first coefficient and many are
        reduced); their ideals do not factor over prime ideals. A step of
        ``ρ`` (a proper equivalence) leaves them.
        """
        f = self.found.order.conductor
        if f == 1 or self.D < 0:
            return G
        for _ in range(64):
            if math.gcd(G.a, f) == 1:
                break
            G = G.rho()[0]
        return G

    def __call__(self, F: Form, narrow: bool = False, tries: int = 3_000_000) -> list[int]:
        rng = random.Random(F.a ^ F.b)
        # the shifts below compose with it: reduced, and for an order with a first
        # coefficient prime to the conductor
        F = self._prime_to_conductor(F.reduced())
        G, shift = F, dict[int, int]()
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
            G = self._prime_to_conductor(G.reduced())
        raise TooLargeError(f"no smooth form found in the class of {F} after {tries:,} tries")


#: The most elements a ``q``-torsion check stores (``q^{r−1}`` for ``q``-rank ``r``).
MAX_TORSION = 1 << 20


def check_injective(D: int, forms: list[Form], invariants: list[int]) -> bool:
    """Whether ``⊕ Z/d_i → Cl(D)``, ``e_i ↦ [forms[i]]``, is one-to-one (``D < 0``).

    Each ``forms[i]`` has order dividing ``invariants[i] = d_i``. The map is
    one-to-one when no element of prime order ``q`` is in its kernel, that
    is when the classes ``E_i = F_i^{d_i/q}`` (``q | d_i``) generate a group
    of ``q^r`` classes: each ``E_i`` lies outside the group of the ones
    before it. That is checked for every prime ``q`` dividing ``d_r``; then
    the forms generate a subgroup of ``∏ d_i`` classes.

    Cl(−56) ≅ Z/4 (the exact method): ``(3, 2, 5)`` has order 4, ``(2, 0, 7)`` order 2.

    >>> check_injective(-56, [Form(3, 2, 5)], [4]), check_injective(-56, [Form(2, 0, 7)], [4])
    (True, False)
    """
    if not invariants:
        return True
    identity = Form.identity(D).reduced()
    for q in factorize(invariants[-1]):
        socle = [
            F.power(d // q).reduced() for F, d in zip(forms, invariants, strict=True) if d % q == 0
        ]
        if q ** (len(socle) - 1) > MAX_TORSION:
            raise TooLargeError(
                f"the {q}-rank {len(socle)} of the class group is too large to check its structure"
            )
        seen = {identity}
        for k, E in enumerate(socle):
            if E in seen:
                return False
            if k + 1 < len(socle):  # the group of E_0 … E_k, for the next one
                layer, grown = list(seen), set(seen)
                for _ in range(q - 1):
                    layer = [G.compose(E).reduced() for G in layer]
                    grown.update(layer)
                seen = grown
    return True


def class_group_subexp(
    order: Order,
    progress: Progress | None = None,
    seed: int = 1,
    workers: int | None = None,
    scheduler: str | None = None,
    relations_file: str | None = None,
) -> ClassGroup:
    """The class group of a quadratic field or imaginary order by index calculus, under GRH (module notes).

    ``workers``, ``scheduler`` and ``relations_file`` are those of
    :func:`~realquad.relations.system.index_calculus` (local processes, a
    Dask cluster, a resumable relation file).
    """
    found = index_calculus(order, progress, seed, workers, scheduler, relations_file)
    return group_from_relations(found, seed)


def group_from_relations(
    found: IndexCalculus,
    seed: int = 1,
    unit: Unit | None = None,
    method: str | None = None,
    proof: Proof = "GRH",
) -> ClassGroup:
    """The :class:`ClassGroup` of a finished index calculus (module notes).

    For a real order of conductor ``> 1`` its ``unit`` and the ``method``
    text come from :mod:`realquad.classgroup.orders` (the relations carry no
    unit of their own, so principal ideal tests fall back to the infrastructure).
    """
    order = found.order
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
    locate = ClassLocator(found)
    if D < 0:
        method = METHOD.format(n=found.factor_base.size, bound=found.factor_base.bound)
        if order.conductor != 1:
            # h* = k·|G| and h = j·|G| for the subgroup G of the factor base; one-to-one means
            # |G| ≥ h*, so k = 1, and h* in [lo, hi] (hi < 2·lo) then leaves j = 1.
            if not check_injective(D, forms, list(wide.invariants)):
                raise ArithmeticError(
                    f"internal check failed: the factor base of {D} generates a proper "
                    "subgroup of its class group"
                )
            method += ORDER_CHECK
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
    principal = None if unit is not None else PrincipalTest(found)
    if unit is None:
        unit = unit_from_relations(found)
    if method is None:
        method = METHOD_REAL.format(n=found.factor_base.size, bound=found.factor_base.bound)
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
        method=method,
        proof=proof,
        unit=unit,
        _raw_generators=raw,
        _narrow_smith=diagonal_smith(list(narrow.invariants)),
        _wide_smith=diagonal_smith(list(wide.invariants)),
        _locate=locate,
        _principal=principal,
    )
