"""Which primes a binary quadratic form represents: prime by prime, and as a statement for all primes.

A primitive form ``F`` of discriminant ``D`` represents a prime ``p`` exactly
when ``F`` is properly equivalent to a form ``(p, b, c)``, that is when the
class of ``F`` is the class of a prime ideal above ``p`` or of its conjugate
(the inverse class): ``(p, ±b, c)`` are the forms of the two prime ideals
(Cox, *Primes of the Form x² + ny²*, Wiley 1989, Lemma 2.3 and Theorem 7.7;
narrow classes for ``D > 0``). So ``p`` is *eligible* when ``(D/p) ≠ −1`` and
``p`` does not divide the conductor, and then represented by the forms of one
class and its inverse; an explicit ``(x, y)`` comes from the matrix ``M`` with
``F·M = (p, b, c)``: ``F(M₁₁, M₂₁) = p``.

>>> r = represents_prime(Form(1, 0, 5), 29)                # 29 = 3² + 5·2²
>>> r.represented, Form(1, 0, 5).value(r.x, r.y)
(True, 29)
>>> s = represents_prime(Form(1, 0, 5), 3)                 # eligible, but in the other class
>>> s.reason, s.representing_form, s.representing_form.value(s.representing_x, s.representing_y)
('other_class', Form(2, 2, 3), 3)

**For all primes** (:func:`representation_criterion`). Genus theory: the
assigned characters (:mod:`realquad.classgroup.genus`) are characters modulo
``m | D``; a prime ``p ∤ D`` is represented by some form of the genus whose
characters it satisfies (Cox, Theorem 3.15 and Corollary 3.14). When the genus
of ``F`` holds only the classes of ``F`` and ``F⁻¹`` (always when every genus
has one class: ``x² + ny²`` with ``n`` idoneal), the residues modulo ``m``
decide: kind ``"congruences"``. Otherwise, for ``D < 0``, the ring class
polynomial ``H_D`` (:mod:`realquad.splitting.class_polynomial`) decides: the
Frobenius of ``p`` in the ring class field has the order ``k`` of the class of
a prime above ``p``, and the irreducible factors of ``H_D`` mod ``p`` all have
degree ``k`` (Cox, Theorem 9.2 for the principal form, ``k = 1``: a root).
Then ``F`` represents ``p ∤ D·disc(H_D)`` iff ``p`` satisfies the genus
characters of ``F`` and the factors have degree ``k = ord[F]`` — exact when
no other class of that genus has order ``k`` besides ``[F]^{±1}``; otherwise
the criterion is a necessary condition and says which classes it cannot
separate. For ``D > 0`` with several classes per genus only the genus
condition is given (kind ``"genus"``, necessary). Primes dividing ``D`` are
answered one by one.

>>> c = representation_criterion(Form(1, 0, 5))
>>> c.kind, c.modulus, c.residues, c.dividing_represented
('congruences', 20, [1, 9], [5])
>>> c = representation_criterion(Form(1, 0, 27))          # p = x² + 27y² (Gauss; Cox Thm 4.15)
>>> c.kind, c.exact, str(c.polynomial), c.factor_degree
('class_polynomial', True, 'X³ − 151013228706000X² + 224179462188000000X − 1879994705688000000000', 1)

References (theorem numbers from memory; the statements are tested by brute
force in tests/splitting): D. A. Cox, *Primes of the Form x² + ny²*, Wiley 1989, §2–3
(genus theory), §7 (forms and ideals), §9 (Theorem 9.2), §13; C. F. Gauss,
*Disquisitiones Arithmeticae*, art. 229–233.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import partial
from math import gcd, lcm

import gmpy2

from realquad.classgroup import ClassGroup, class_group
from realquad.classgroup.genus import character_value, represented_prime_to
from realquad.core.forms import Form, prime_form
from realquad.core.integers import as_integer
from realquad.core.orders import Order
from realquad.core.primes import factorize, kronecker, primes_below
from realquad.core.results import JSONObject, Proof
from realquad.errors import DomainError, InputError
from realquad.latex import (
    MAX_DIGITS,
    MAX_TERMS,
    Display,
    brief_repr,
    integer,
    lines,
    named_set,
    pack,
    point,
    sequence,
    sum_rows,
    text,
)
from realquad.splitting.class_polynomial import ClassPolynomial, ring_class_polynomial
from realquad.splitting.decomposition import decompose_prime
from realquad.textio import signed

#: Residues of the criterion written on one line of its LaTeX; more go into a set over rows.
RESIDUES_PER_ROW = 12
#: Primes with their ``(x, y)`` written on one line of the LaTeX.
VALUES_PER_ROW = 4

#: Why a prime is or is not represented.
REASONS = ("represented", "inert", "divides_conductor", "other_class")

#: Largest modulus whose residues are listed (beyond, the characters alone state the condition).
MAX_LISTED_MODULUS = 10**6

METHOD = "class of a prime ideal above p against the class of the form"


def _form(form: Form | tuple[int, int, int]) -> Form:
    F = form if isinstance(form, Form) else Form(*form)
    if not F.is_primitive():
        g = gcd(gcd(F.a, F.b), F.c)
        raise DomainError(
            f"the form {F} is not primitive (its coefficients share the factor {g}): it "
            f"represents only multiples of {g}; give its primitive part "
            f"({F.a // g}, {F.b // g}, {F.c // g})"
        )
    return F


@dataclass(frozen=True)
class PrimeRepresentation:
    """Whether ``F`` represents ``p``, with ``F(x, y) = p``, or why not and which form does.

    ``reason``: ``"represented"``, ``"inert"`` (``(D/p) = −1``: no form of
    discriminant ``D`` represents ``p``), ``"divides_conductor"`` (no
    primitive form does), ``"other_class"`` (eligible: ``representing_form``,
    reduced, takes the value ``p`` at ``(representing_x, representing_y)``).
    """

    p: int
    kind: str
    eligible: bool
    represented: bool
    reason: str
    x: int | None
    y: int | None
    representing_form: Form | None
    representing_x: int | None
    representing_y: int | None

    def to_dict(self) -> JSONObject:
        """The JSON shape (``docs/json.md``, *PrimeRepresentation*)."""
        return {
            "p": self.p,
            "kind": self.kind,
            "eligible": self.eligible,
            "represented": self.represented,
            "reason": self.reason,
            "x": self.x,
            "y": self.y,
            "representing_form": None
            if self.representing_form is None
            else self.representing_form.to_dict(),
            "representing_x": self.representing_x,
            "representing_y": self.representing_y,
        }


def represents_prime(
    form: Form | tuple[int, int, int], p: int, group: ClassGroup | None = None
) -> PrimeRepresentation:
    """Whether the primitive form represents the prime ``p`` (module notes), with ``x, y``.

    >>> r = represents_prime(Form(3, 2, -26), 7)            # D = 316 > 0: narrow classes
    >>> r.reason, (r.x, r.y), Form(3, 2, -26).value(r.x, r.y)
    ('represented', (-3, -1), 7)
    >>> represents_prime(Form(3, 2, -26), 5).reason, represents_prime(Form(3, 2, -26), 11).reason
    ('other_class', 'inert')
    """
    F = _form(form)
    D = F.discriminant
    order = Order(D)
    group = group if group is not None else class_group(order, method="exact")
    s = decompose_prime(order, p, group)
    p = s.p
    if s.divides_conductor or s.kind == "inert":
        reason = "divides_conductor" if s.divides_conductor else "inert"
        return PrimeRepresentation(p, s.kind, False, False, reason, None, None, None, None, None)
    G = Form.identity(D) if s.represented_by_principal else s.form
    gx, gy = s.x, s.y
    assert G is not None  # eligible: decompose_prime gives a form of the class
    mine = group.narrow_class_of(F)
    if mine not in s.classes:
        return PrimeRepresentation(p, s.kind, True, False, "other_class", None, None, G, gx, gy)
    P = prime_form(D, p)
    assert P is not None  # eligible
    target = P if s.classes[0] == mine else P.inverse()
    M = F.equivalent(target)
    if M is None:
        raise ArithmeticError(f"internal check failed: {F} is not equivalent to {target}")
    x, y = M[0], M[2]
    if F.value(x, y) != p:
        raise ArithmeticError(f"internal check failed: {F} at ({x}, {y}) is not {p}")
    return PrimeRepresentation(p, s.kind, True, True, "represented", x, y, G, gx, gy)


@dataclass(frozen=True)
class RepresentationCriterion(Display):
    """Which primes ``F`` represents, for all primes at once (module notes).

    ``characters``: the assigned genus characters with the values of ``F``'s
    genus; ``modulus`` and ``residues``: the residues modulo ``modulus`` of the
    primes ``p ∤ D`` satisfying them (``None`` beyond :data:`MAX_LISTED_MODULUS`).
    ``kind`` ``"class_polynomial"``: also ``H_D`` mod ``p`` splits into factors
    of degree ``factor_degree``. ``exact``: the condition is also sufficient;
    else ``undistinguished`` lists reduced forms of the other classes that it
    cannot tell from ``F``. The primes dividing ``D`` are answered one by one.
    """

    discriminant: int
    kind: str
    exact: bool
    characters: list[tuple[str, int]]
    modulus: int
    residues: list[int] | None
    polynomial: ClassPolynomial | None
    factor_degree: int | None
    undistinguished: list[Form]
    dividing_primes: list[int]
    dividing_represented: list[int]
    scope: str
    method: str
    proof: Proof

    def satisfies_characters(self, p: int) -> bool:
        """Whether ``p ∤ D`` has the genus character values of ``F``."""
        if self.residues is not None:
            return p % self.modulus in self._residue_set
        return all(character_value(name, p) == v for name, v in self.characters)

    @property
    def _residue_set(self) -> frozenset[int]:
        return frozenset(self.residues or ())

    def holds(self, p: int) -> bool | None:
        """The criterion at the prime ``p``: ``True``/``False``, or ``None`` where it does not decide.

        ``None``: ``p`` divides ``disc(H_D)``, or the condition holds but is
        only necessary (``exact`` false).

        >>> c = representation_criterion(Form(1, 0, 14))
        >>> [p for p in primes_below(200) if c.holds(p)]        # p = x² + 14y²
        [23, 127, 137, 151]
        """
        p = as_integer(p, "p")
        if p < 2 or not gmpy2.is_prime(p):
            raise InputError(f"the criterion is a statement about primes, got {p}")
        if self.discriminant % p == 0:
            return p in self.dividing_represented
        if not self.satisfies_characters(p):
            return False
        if self.kind == "congruences":
            return True
        if self.kind == "genus" or self.polynomial is None or self.factor_degree is None:
            return None
        degrees = factor_degrees_are(self.polynomial.coefficients, p, self.factor_degree)
        if degrees is None or not degrees:
            return degrees
        return True if self.exact else None

    def to_latex(self, max_digits: int = MAX_DIGITS, max_terms: int = MAX_TERMS) -> str:
        r"""The criterion for ``p ∤ D`` (``\iff``, or ``\implies`` when only necessary), the class
        polynomial on its own line, and the primes dividing ``D`` that are represented.

        >>> print(representation_criterion(Form(1, 0, 5)).to_latex())
        \begin{gathered}p \nmid -20:\quad p = F(x, y) \iff p \equiv 1, 9 \pmod{20}\\
        p \mid -20:\quad p = F(x, y) \iff p \in \{5\}\end{gathered}
        """
        D = integer(self.discriminant, max_digits)
        modulus = integer(self.modulus, max_digits)
        residue_rows: list[str] = []
        if self.residues is not None and len(self.residues) > RESIDUES_PER_ROW:
            write = partial(integer, max_digits=max_digits)
            R, residue_rows = named_set("R", self.residues, write, RESIDUES_PER_ROW, max_terms)
            conditions = [rf"p \bmod {modulus} \in {R}"]
        elif self.residues is not None:
            conditions = [rf"p \equiv {sequence(self.residues, max_terms)} \pmod{{{modulus}}}"]
        else:
            conditions = [f"{_character_latex(n)} = {v}" for n, v in self.characters]
        arrow = r"\iff" if self.exact else r"\implies"
        where = rf"p \nmid {D}"
        rows = []
        if self.kind == "class_polynomial" and self.polynomial is not None:
            where = rf"p \nmid {D}\operatorname{{disc}}(H)"
            split = (
                text("has a root")
                if self.factor_degree == 1
                else text(f"splits into factors of degree {self.factor_degree}")
            )
            legendre = rf"\left(\frac{{{D}}}{{p}}\right) = 1"
            conditions = [legendre, *conditions, rf"H(X) \bmod p\ {split}"]
            rows += sum_rows("H(X) = ", self.polynomial.to_latex(max_digits).split(" = ", 1)[1])
        head = rf"{where}:\quad p = F(x, y) {arrow} "
        criterion = pack([head + conditions[0], *conditions[1:]], ",\\ ")
        criterion = [row + "," for row in criterion[:-1]] + criterion[-1:]
        rows[0:0] = [*criterion, *residue_rows]
        dividing = r"\{" + sequence(self.dividing_represented, 0) + r"\}"
        if not self.dividing_represented:
            dividing = r"\emptyset"
        rows.append(rf"p \mid {D}:\quad p = F(x, y) \iff p \in {dividing}")
        return lines(rows)

    def to_dict(self) -> JSONObject:
        """The JSON shape (``docs/json.md``, *RepresentationCriterion*)."""
        return {
            "kind": self.kind,
            "exact": self.exact,
            "characters": [{"character": n, "value": v} for n, v in self.characters],
            "modulus": self.modulus,
            "residues": None if self.residues is None else list(self.residues),
            "polynomial": None if self.polynomial is None else self.polynomial.to_dict(),
            "factor_degree": self.factor_degree,
            "undistinguished": [G.to_dict() for G in self.undistinguished],
            "dividing_primes": list(self.dividing_primes),
            "dividing_represented": list(self.dividing_represented),
            "scope": self.scope,
            "method": self.method,
            "proof": self.proof,
        }


def factor_degrees_are(coefficients: list[int], p: int, k: int) -> bool | None:
    """Whether ``f`` (``coefficients[i]`` of ``X^i``, monic) is mod ``p`` a product of distinct
    irreducibles of degree ``k``; ``None`` if ``f`` is not squarefree mod ``p`` (``p | disc f``).

    ``f | X^{p^k} − X`` and ``gcd(f, X^{p^{k/q}} − X) = 1`` for each prime ``q | k``.

    >>> factor_degrees_are([1, 0, 1], 5, 1), factor_degrees_are([1, 0, 1], 7, 2)   # X² + 1
    (True, True)
    >>> factor_degrees_are([1, 0, 1], 2, 1) is None
    True
    """
    # imported here: sympy costs 0.3 s of every start-up
    from sympy.polys.domains import ZZ
    from sympy.polys.galoistools import gf_diff, gf_gcd, gf_pow_mod, gf_rem, gf_sub

    f = [c % p for c in reversed(coefficients)]
    one = [1]
    if gf_gcd(f, gf_diff(f, p, ZZ), p, ZZ) != one:
        return None
    x = gf_rem([1, 0], f, p, ZZ)
    powers = [x]  # X^{p^i} mod f
    for _ in range(k):
        powers.append(gf_pow_mod(powers[-1], p, f, p, ZZ))
    if gf_rem(gf_sub(powers[k], x, p, ZZ), f, p, ZZ):
        return False
    for q in factorize(k) if k > 1 else {}:
        if gf_gcd(f, gf_sub(powers[k // q], x, p, ZZ), p, ZZ) != one:
            return False
    return True


def _conductor(name: str) -> int:
    """The modulus of an assigned character: ``q`` for ``(·/q)``, 4 for ``δ``, 8 for ``ε``, ``δε``."""
    if name == "δ":
        return 4
    if name in ("ε", "δε"):
        return 8
    return int(name[3:-1])


def _order_of(coordinates: list[int], invariants: list[int]) -> int:
    out = 1
    for c, d in zip(coordinates, invariants, strict=True):
        out = lcm(out, d // gcd(c, d))
    return out


def representation_criterion(
    form: Form | tuple[int, int, int], group: ClassGroup | None = None
) -> RepresentationCriterion:
    """The statement for all primes of which primes the primitive form represents (module notes)."""
    F = _form(form)
    D = F.discriminant
    order = Order(D)
    group = group if group is not None else class_group(order, method="exact")
    genera = group.genus
    names = genera.characters
    mine = tuple(character_value(n, represented_prime_to(F, 2 * D)) for n in names)
    table = group.table
    i_form, i_inverse = table.class_index(F), table.class_index(F.inverse())
    listed = len(genera.class_characters) == group.narrow_class_number
    if listed:
        others = [
            i
            for i, v in enumerate(genera.class_characters)
            if v == mine and i not in (i_form, i_inverse)
        ]
    else:
        size = genera.classes_per_genus
        others = [] if size == 1 or (size == 2 and i_form != i_inverse) else [-1]
    modulus = 1
    for n in names:
        modulus = lcm(modulus, _conductor(n))
    residues = _residues(D, names, mine, modulus) if modulus <= MAX_LISTED_MODULUS else None
    dividing = sorted(factorize(abs(D)))
    represented = [q for q in dividing if represents_prime(F, q, group).represented]
    characters = list(zip(names, mine, strict=True))
    condition = (
        f"p mod {modulus} is one of the residues"
        if residues is not None
        else "p has the genus character values of the form"
    )
    genus_method = "assigned genus characters (one class and its inverse per genus)"
    if not others:
        scope = (
            f"every prime: p ∤ {signed(D)} is represented exactly when {condition} (the genus "
            f"characters of the form); the primes dividing {signed(D)} are listed"
        )
        return RepresentationCriterion(
            D, "congruences", True, characters, modulus, residues, None, None, [], dividing,
            represented, scope, genus_method, group.proof,
        )  # fmt: skip
    if D > 0:
        scope = (
            f"necessary only: p ∤ {signed(D)} represented ⇒ {condition}; the genus holds other "
            "classes, which no congruence separates"
        )
        forms = [] if -1 in others else [Form(*table.representatives[i]).reduced() for i in others]
        return RepresentationCriterion(
            D, "genus", False, characters, modulus, residues, None, None, forms, dividing,
            represented, scope, "assigned genus characters (necessary condition)", group.proof,
        )  # fmt: skip
    polynomial = ring_class_polynomial(order, group)
    k = _order_of(group.class_of(F), group.invariants)
    same = [
        Form(*table.representatives[i]).reduced()
        for i in others
        if _order_of(group.class_of(Form(*table.representatives[i])), group.invariants) == k
    ]
    split = "has a root" if k == 1 else f"splits into irreducible factors of degree {k}"
    if same:
        scope = (
            f"necessary only, for p ∤ {signed(D)}·disc(H): represented ⇒ (D/p) = 1, {condition} and H "
            f"mod p {split}; other classes of the genus share the order "
            f"{k} (undistinguished); the primes dividing {signed(D)} are listed"
        )
    else:
        scope = (
            f"every prime p ∤ {signed(D)}·disc(H) (H mod p squarefree): represented exactly when "
            f"(D/p) = 1, {condition} and H mod p {split}; the primes dividing {signed(D)} are "
            "listed"
        )
    return RepresentationCriterion(
        D, "class_polynomial", not same, characters, modulus, residues, polynomial, k, same,
        dividing, represented, scope, polynomial.method, polynomial.proof,
    )  # fmt: skip


def _residues(D: int, names: list[str], values: tuple[int, ...], modulus: int) -> list[int]:
    """The residues ``r`` mod ``modulus``, prime to it, with the character values; each checked
    to have ``(D/r′) = 1`` for a lift ``r′`` prime to ``D`` (the product of the characters is
    ``(D/·)``; Cox, §3.B)."""
    out = []
    for r in range(1, modulus + 1):
        if gcd(r, modulus) != 1:
            continue
        if all(character_value(n, r) == v for n, v in zip(names, values, strict=True)):
            lift = r
            while gcd(lift, D) != 1:
                lift += modulus
            if kronecker(D, lift) != 1:
                raise ArithmeticError(
                    f"internal check failed: residue {r} mod {modulus} has (D/{lift}) ≠ 1"
                )
            out.append(r % modulus)
    return sorted(out)


@dataclass(frozen=True)
class FormPrimes(Display):
    """Which primes a form represents: per prime, and the criterion for all primes."""

    form: Form
    reduced: Form
    discriminant: int
    class_number: int
    classes_per_genus: int
    primes: list[PrimeRepresentation]
    criterion: RepresentationCriterion | None
    method: str
    proof: Proof

    def __repr__(self) -> str:
        return brief_repr(
            "FormPrimes",
            form=self.form,
            discriminant=self.discriminant,
            represented=[r.p for r in self.primes if r.represented],
            criterion=None if self.criterion is None else self.criterion.kind,
            method=self.method,
            proof=self.proof,
        )

    def to_latex(self, max_digits: int = MAX_DIGITS, max_terms: int = MAX_TERMS) -> str:
        r"""The form, the primes asked for that it represents with ``(x, y)``, those it does not,
        and the criterion (:meth:`RepresentationCriterion.to_latex`).

        >>> print(form_primes(Form(1, 0, 5), 10, criterion=False).to_latex())
        \begin{gathered}F(x, y) = x^{2} + 5y^{2},\quad D = -20,\quad h = 2\\
        5 = F(0, -1)\\
        p \in \{2, 3, 7\}:\ \text{not represented}\end{gathered}
        """
        h = "h" if self.discriminant < 0 else "h^{+}"
        head = rf"F(x, y) = {self.form.to_latex(max_digits)},\quad D = {integer(self.discriminant)}"
        rows = [rf"{head},\quad {h} = {integer(self.class_number, 0)}"]
        yes = [r for r in self.primes if r.represented]
        no = [r.p for r in self.primes if not r.represented]
        if yes:
            shown = yes if max_terms == 0 else yes[:max_terms]
            cells = [f"{integer(r.p)} = F{point((r.x or 0, r.y or 0), max_digits)}" for r in shown]
            found = pack(cells, ",\\ ", most=VALUES_PER_ROW)
            rows += [row + "," for row in found[:-1]] + found[-1:]
            rows[-1] += r",\ \ldots" if len(shown) < len(yes) else ""
        if no:
            write = partial(integer, max_digits=max_digits)
            N, defining = named_set("N", no, write, RESIDUES_PER_ROW, max_terms)
            rows += [rf"p \in {N}:\ {text('not represented')}", *defining]
        if self.criterion is not None:
            rows.append(self.criterion.to_latex(max_digits, max_terms))
        return lines(rows)

    def latex_note(self) -> str | None:
        """The method and proof, and those of the criterion with its scope."""
        note = super().latex_note() or ""
        c = self.criterion
        if c is not None:
            note += f"\ncriterion: {c.scope}\ncriterion method: {c.method}; proof: {c.proof}"
        return note

    def to_dict(self) -> JSONObject:
        """The JSON shape (``docs/json.md``, *FormPrimes*)."""
        return {
            "form": self.form.to_dict(),
            "reduced": self.reduced.to_dict(),
            "discriminant": self.discriminant,
            "class_number": self.class_number,
            "classes_per_genus": self.classes_per_genus,
            "primes": [r.to_dict() for r in self.primes],
            "criterion": None if self.criterion is None else self.criterion.to_dict(),
            "method": self.method,
            "proof": self.proof,
        }


def form_primes(
    form: Form | tuple[int, int, int],
    bound: int | None = 50,
    prime: int | None = None,
    criterion: bool = True,
) -> FormPrimes:
    """Every prime ``p ≤ bound`` (or the one ``prime``) with :func:`represents_prime`, and the criterion.

    ``class_number`` is ``h⁺`` (narrow) for ``D > 0``.

    >>> r = form_primes(Form(1, 0, 5), 30)
    >>> [s.p for s in r.primes if s.represented], r.criterion.residues
    ([5, 29], [1, 9])
    """
    F = _form(form)
    D = F.discriminant
    group = class_group(Order(D), method="exact")
    if prime is not None:
        primes = [represents_prime(F, prime, group)]
    else:
        B = as_integer(bound if bound is not None else 50, "bound")
        if B < 2:
            raise InputError(f"the bound must be at least 2, got {B}")
        primes = [represents_prime(F, p, group) for p in primes_below(B + 1)]
    found = representation_criterion(F, group) if criterion else None
    return FormPrimes(
        F,
        F.reduced(),
        D,
        group.narrow_class_number,
        group.genus.classes_per_genus,
        primes,
        found,
        f"{METHOD}; {group.method}",
        group.proof,
    )


def _character_latex(name: str) -> str:
    r"""A genus character as LaTeX: ``(·/q)`` is the Legendre symbol ``(p/q)``, ``δ`` and ``ε`` the
    characters modulo 4 and 8 (:mod:`realquad.classgroup.genus`).

    >>> _character_latex("(·/7)"), _character_latex("δε")
    ('\\left(\\frac{p}{7}\\right)', '\\delta\\varepsilon(p)')
    """
    if name.startswith("(·/") and name.endswith(")"):
        return rf"\left(\frac{{p}}{{{name[3:-1]}}}\right)"
    letters = {"δ": r"\delta", "ε": r"\varepsilon"}
    if name and all(c in letters for c in name):
        return "".join(letters[c] for c in name) + "(p)"
    raise DomainError(f"no LaTeX for the genus character {name!r}")
