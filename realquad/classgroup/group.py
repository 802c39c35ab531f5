"""The class groups ``Cl`` and ``Cl⁺`` of an order as every method returns them.

:class:`ClassGroup` is the one result type of :func:`realquad.classgroup.class_group`
whichever method ran (its ``method`` and ``proof`` say which); :class:`ClassTable`
lists every narrow class with its reduced forms, for the methods that walk them all.

**Imaginary orders** (``D < 0``). Every non-zero element has positive norm,
so the narrow and wide class groups coincide: a :class:`ClassGroup` of an
imaginary order has ``narrow_* = `` the wide values, ``unit_norm = 1`` (the
norm of every unit, a root of unity), ``unit = None`` (no unit of infinite
order; :attr:`ClassGroup.regulator` refuses), ``roots_of_unity`` ``w = 2, 4, 6``,
and each class holds exactly one reduced form (its "cycle").

>>> from realquad.classgroup import class_group
>>> G = class_group(4 * 79)
>>> G.class_number, G.narrow_invariants, G.generators, G.lists_classes
(3, [6], [Form(3, 14, -10)], True)
>>> I = class_group(-56)
>>> I.class_number, I.invariants, I.generators, I.narrow_invariants, I.unit, I.roots_of_unity
(4, [4], [Form(3, 2, 5)], [4], None, 2)

References: H. Cohen, *A Course in Computational Algebraic Number Theory*,
Springer 1993, §5.2 (narrow and wide class groups), §2.4.4 (Smith normal form).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from dataclasses import field as dataclass_field
from functools import cached_property

from realquad.classgroup.genus import Genera, genera
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.core.linalg import SmithForm
from realquad.core.orders import Order
from realquad.core.results import JSONObject, Proof
from realquad.errors import DomainError
from realquad.infrastructure.principal import PrincipalityResult, principal_ideal_test
from realquad.latex import MAX_DIGITS, Display, brief_repr, clauses, group, integer, lines, text
from realquad.units import NO_UNIT_OF_INFINITE_ORDER, Regulator, Unit

Triple = tuple[int, int, int]


@dataclass
class ClassTable:
    """Every narrow class of ``D``: its reduced forms, a representative, its exponent vector.

    ``index`` maps each reduced form ``(a, b)`` to its class number;
    ``vectors[i]`` writes class ``i`` on ``generators`` (raw, not Smith);
    ``relations`` are the triangular relations among the raw generators.
    """

    D: int
    index: dict[tuple[int, int], int]
    representatives: list[Triple]
    vectors: list[tuple[int, ...]]
    generators: list[Triple]
    relations: list[list[int]]
    principal_cycle_length: int

    @property
    def narrow_class_number(self) -> int:
        return len(self.representatives)

    @property
    def j_is_principal(self) -> bool:
        """Whether ``(−1, b₀, c₀)`` lies in the principal cycle (``N(ε) = −1``)."""
        return self.index.get((-1, Form.identity(self.D).b)) == 0

    def class_index(self, form: Form | Ideal) -> int:
        """The class number of a primitive form (or invertible ideal) of discriminant ``D``."""
        if not isinstance(form, Form):
            form = form.form()
        if form.discriminant != self.D or not form.is_primitive():
            raise DomainError(f"{form} is not a primitive form of discriminant {self.D}")
        G = form.reduced()
        return self.index[(G.a, G.b)]


def _generator(form: Form) -> JSONObject:
    """A generator of a class group: its reduced form and the ideal of that form."""
    return {"form": form.to_dict(), "ideal": Ideal.from_form(form).to_dict()}


def forms_from_vectors(
    D: int, generators: list[Triple], vectors: list[list[int]], modulus: int
) -> list[Form]:
    """The reduced forms ``∏ gᵢ^{eᵢ}`` for each exponent vector (exponents taken mod ``modulus``).

    >>> forms_from_vectors(316, [(3, 2, -26)], [[3], [0]], 6)
    [Form(-2, 14, 15), Form(1, 16, -15)]
    """
    out = []
    for vec in vectors:
        F: Form | None = None
        for e, g in zip(vec, generators, strict=False):
            e %= modulus
            if e:
                G = Form._raw(*g)
                G = G if e == 1 else G.power(e)
                F = G if F is None else F.compose(G)
        out.append(F if F is not None else Form.identity(D))
    return out


@dataclass(eq=False)
class ClassGroup(Display):
    """``Cl(D)`` and ``Cl⁺(D)`` of an order: orders, invariants ``d₁ | d₂ | …`` and generators.

    ``generators[t]`` is a reduced form whose class has order ``invariants[t]``
    in the wide group (likewise ``narrow_generators`` in ``Cl⁺``).
    ``unit_norm`` is the norm of the fundamental unit, which decides
    ``h⁺ = h`` (norm −1) or ``h⁺ = 2h`` (norm +1). For an imaginary order
    (module notes) the narrow values repeat the wide ones, ``unit_norm`` is
    1, ``unit`` is ``None`` and ``roots_of_unity`` is ``w``.
    """

    order: Order
    class_number: int
    narrow_class_number: int
    invariants: list[int]
    narrow_invariants: list[int]
    generators: list[Form]
    narrow_generators: list[Form]
    unit_norm: int
    method: str
    proof: Proof
    unit: Unit | None = dataclass_field(repr=False)
    _raw_generators: list[Triple] = dataclass_field(repr=False)
    _narrow_smith: SmithForm = dataclass_field(repr=False)
    _wide_smith: SmithForm = dataclass_field(repr=False)
    _table_source: Callable[[], ClassTable] | None = dataclass_field(default=None, repr=False)
    _table: ClassTable | None = dataclass_field(default=None, repr=False)
    roots_of_unity: int = 2
    #: Coordinates of a form's class without a table (index calculus: a relation through it).
    _locate: Callable[[Form, bool], list[int]] | None = dataclass_field(default=None, repr=False)
    #: The principal ideal test ``(a, b) ↦ result`` from the group's relations (index calculus).
    _principal: Callable[[int, int], PrincipalityResult] | None = dataclass_field(
        default=None, repr=False
    )

    @classmethod
    def definite(
        cls,
        order: Order,
        h: int,
        invariants: list[int],
        generators: list[Form],
        smith: SmithForm,
        raw_generators: list[Triple],
        method: str,
        proof: Proof,
        roots_of_unity: int,
        table_source: Callable[[], ClassTable] | None = None,
        table: ClassTable | None = None,
        locate: Callable[[Form, bool], list[int]] | None = None,
    ) -> ClassGroup:
        """The group of an imaginary order: narrow and wide are one group (no unit of norm −1)."""
        return cls(
            order=order,
            class_number=h,
            narrow_class_number=h,
            invariants=list(invariants),
            narrow_invariants=list(invariants),
            generators=generators,
            narrow_generators=list(generators),
            unit_norm=1,
            method=method,
            proof=proof,
            unit=None,
            _raw_generators=raw_generators,
            _narrow_smith=smith,
            _wide_smith=smith,
            _table_source=table_source,
            _table=table,
            roots_of_unity=roots_of_unity,
            _locate=locate,
        )

    @property
    def table(self) -> ClassTable:
        """Every narrow class with its reduced forms (built on first use: lookups, genera, --forms).

        Only a method that lists the classes (the exact cycle method) can give it.
        """
        if self._table is None:
            if self._table_source is None:
                raise DomainError(
                    "listing every class (and locating a form in the group) needs the exact cycle "
                    f"method; this group was found by {self.method}"
                )
            table = self._table_source()
            if [tuple(g) for g in table.generators] != [tuple(g) for g in self._raw_generators]:
                raise ArithmeticError("internal check failed: class table and relations disagree")
            self._table = table
        return self._table

    @property
    def table_is_built(self) -> bool:
        """Whether :attr:`table` has been built already (so using it costs nothing more)."""
        return self._table is not None

    @property
    def locates_classes(self) -> bool:
        """Whether :meth:`class_of` answers for any form: from the table, or by index calculus."""
        return self.lists_classes or self._locate is not None

    @property
    def lists_classes(self) -> bool:
        """Whether :attr:`table` (every class with its forms) is available for this group."""
        return self._table is not None or self._table_source is not None

    @cached_property
    def regulator(self) -> Regulator:
        """The regulator ``log ε`` (30 significant digits), from the same continued fraction.

        An imaginary order has none (:class:`DomainError`).
        """
        if self.unit is None:
            raise DomainError(NO_UNIT_OF_INFINITE_ORDER)
        return self.unit.regulator(30)

    @property
    def is_imaginary(self) -> bool:
        """Whether the order is imaginary (``D < 0``: narrow = wide, no regulator)."""
        return self.order.discriminant < 0

    @property
    def discriminant(self) -> int:
        return self.order.discriminant

    def _located(self, form: Form | Ideal, narrow: bool = False) -> list[int]:
        """Coordinates from the group's locator (index calculus), for a form of this discriminant."""
        assert self._locate is not None
        F = form if isinstance(form, Form) else form.form()
        if F.discriminant != self.discriminant or not F.is_primitive():
            raise DomainError(f"{F} is not a primitive form of discriminant {self.discriminant}")
        return self._locate(F, narrow)

    def narrow_class_of(self, form: Form | Ideal) -> list[int]:
        """Coordinates of the class of ``form`` on :attr:`narrow_generators` (mod the invariants)."""
        if self._locate is not None and self._table is None:
            return self._located(form, narrow=True)
        return self._narrow_smith.coordinates(
            list(self.table.vectors[self.table.class_index(form)])
        )

    def class_of(self, form: Form | Ideal) -> list[int]:
        """Coordinates of the wide class of ``form`` on :attr:`generators`."""
        if self._locate is not None and self._table is None:
            return self._located(form)
        return self._wide_smith.coordinates(list(self.table.vectors[self.table.class_index(form)]))

    def is_narrowly_principal(self, form: Form | Ideal) -> bool:
        if self._locate is not None and self._table is None:
            return not any(self._located(form, narrow=True))
        return self.table.class_index(form) == 0

    def is_principal(self, form: Form | Ideal) -> bool:
        return not any(self.class_of(form))

    def principal_generator(self, ideal: Form | Ideal) -> PrincipalityResult:
        """Whether a primitive ideal of a real order is principal, and a generator in compact form.

        A form stands for its ideal ``[a, (−b + √D)/2]``. Groups from index
        calculus answer from their relations (a principal answer is checked
        exactly, so unconditional; "not principal" holds under GRH); the
        others by baby-step giant-step in the infrastructure (unconditional).
        The result's ``a``, ``b`` name the ideal as ``[a, (b + √D)/2]``.
        """
        if self.is_imaginary:
            raise DomainError(
                "generators in compact form are for real orders; is_principal() decides for D < 0"
            )
        I = Ideal.from_form(ideal) if isinstance(ideal, Form) else ideal
        if I.discriminant != self.discriminant:
            raise DomainError(
                f"{I} is not an ideal of the order of discriminant {self.discriminant}"
            )
        if I.scale != 1:
            raise DomainError(
                f"{I} is not primitive; {I.scale}·J is principal exactly when J is: test J"
            )
        if self._principal is not None:
            return self._principal(I.a, -I.b)
        return principal_ideal_test(self.discriminant, I.a, -I.b)

    def narrow_classes(self) -> list[list[Form]]:
        """The reduced forms of every narrow class (its cycle; one form for ``D < 0``), principal first."""
        return [Form._raw(*rep).cycle() for rep in self.table.representatives]

    def ideal_generators(self, narrow: bool = False) -> list[Ideal]:
        """The generators as ideals ``[a, (−b + √D)/2]`` (``a > 0``) of the order."""
        forms = self.narrow_generators if narrow else self.generators
        return [Ideal.from_form(F) for F in forms]

    def __repr__(self) -> str:
        return brief_repr(
            "ClassGroup",
            discriminant=self.discriminant,
            class_number=self.class_number,
            invariants=self.invariants,
            narrow_class_number=self.narrow_class_number,
            narrow_invariants=self.narrow_invariants,
            method=self.method,
            proof=self.proof,
        )

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``Cl(D) ≅ C_{d₁} × …`` with ``h`` and the classes of the generators; ``Cl⁺(D)`` for ``D > 0``.

        >>> from realquad.classgroup import class_group
        >>> print(class_group(-56).to_latex())
        \operatorname{Cl}(-56) \cong C_{4},\quad h = 4,\quad \text{generated by}\ [3x^{2} + 2xy + 5y^{2}]
        """
        D = integer(self.discriminant, max_digits)
        name = rf"\operatorname{{Cl}}({D})"
        rows = clauses(_group_parts(name, "h", self.invariants, self.generators))
        if not self.is_imaginary:
            name = rf"\operatorname{{Cl}}^{{+}}({D})"
            parts = _group_parts(name, "h^{+}", self.narrow_invariants, self.narrow_generators)
            rows += clauses([*parts, rf"N(\varepsilon) = {self.unit_norm}"])
        return lines(rows)

    def to_dict(self, with_classes: bool = False) -> JSONObject:
        """The JSON shape of the class groups (``docs/json.md``, *ClassGroup*).

        ``generators[t]`` has order ``invariants[t]`` (likewise narrow);
        ``with_classes`` adds every narrow class as the list of its reduced forms.

        >>> from realquad.classgroup import class_group
        >>> d = class_group(4 * 79).to_dict()
        >>> d["class_number"], d["invariants"], d["generators"][0]["form"], d["genus"]["number_of_genera"]
        (3, [3], {'a': 3, 'b': 14, 'c': -10}, 2)
        """
        out: JSONObject = {
            "order": self.order.to_dict(),
            "class_number": self.class_number,
            "narrow_class_number": self.narrow_class_number,
            "invariants": list(self.invariants),
            "narrow_invariants": list(self.narrow_invariants),
            "generators": [_generator(F) for F in self.generators],
            "narrow_generators": [_generator(F) for F in self.narrow_generators],
            "unit_norm": self.unit_norm,
            "regulator": None if self.is_imaginary else self.regulator.to_dict(),
            "imaginary": self.is_imaginary,
            "roots_of_unity": self.roots_of_unity,
            "genus": self.genus.to_dict(),
        }
        if with_classes:
            out["classes"] = [[F.to_dict() for F in cycle] for cycle in self.narrow_classes()]
        out["method"] = self.method
        out["proof"] = self.proof
        return out

    @cached_property
    def genus(self) -> Genera:
        """Genus characters and genera of ``Cl⁺`` (:class:`realquad.classgroup.genus.Genera`)."""
        return genera(self)


def _group_parts(name: str, h: str, invariants: list[int], generators: list[Form]) -> list[str]:
    """``name ≅ C_{d₁} × …``, ``h = n``, ``generated by [F₁], …`` (the classes of the generators)."""
    order = 1
    for d in invariants:
        order *= d
    parts = [rf"{name} \cong {group(invariants)}", rf"{h} = {integer(order, 0)}"]
    if generators:
        classes = ", ".join(f"[{F.to_latex()}]" for F in generators)
        parts.append(rf"{text('generated by')}\ {classes}")
    return parts
