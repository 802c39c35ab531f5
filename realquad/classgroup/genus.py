"""Genus theory of the narrow class group: genus characters, genera, the 2-rank.

For a discriminant ``D`` the *assigned characters* are ``χ_p(m) = (m/p)`` for
the odd primes ``p | D`` and, when ``D = 4n``, according to ``n`` modulo 8:
``δ(m) = (−1)^{(m−1)/2}`` for ``n ≡ 3 (mod 4)`` or ``n ≡ 4 (mod 8)``,
``ε(m) = (−1)^{(m²−1)/8}`` for ``n ≡ 2 (mod 8)``, ``δε`` for ``n ≡ 6 (mod 8)``,
both ``δ`` and ``ε`` for ``n ≡ 0 (mod 8)``, none for ``n ≡ 1 (mod 4)``.
Each character, evaluated at any number ``m`` prime to ``2D`` represented by
a form, depends only on its class; with ``μ`` characters there are
``2^{μ−1}`` genera, the principal genus is ``Cl⁺²``, so the 2-rank of
``Cl⁺`` is ``μ − 1`` (for fundamental ``D``, ``μ`` is the number of prime
divisors of ``D``).

>>> from realquad.classgroup import class_group
>>> g = class_group(4 * 15).genus           # Q(√15): D = 60 = 4·3·5
>>> g.characters, g.number_of_genera, g.two_rank
(['(·/3)', '(·/5)', 'δ'], 4, 2)

The same characters serve ``D < 0`` (Cox's setting) and ``D > 0``; for
``D < 0``, ``D/4 = −n`` and the cases above are Cox's read for ``−n``.

References: D. A. Cox, *Primes of the Form x² + ny²*, Wiley 1989, §3.B
(Theorem 3.15, assigned characters; stated there for D < 0, the same for
D > 0 and proper equivalence); D. A. Buell, *Binary Quadratic Forms*,
Springer 1989, ch. 4; C. F. Gauss, *Disquisitiones Arithmeticae*, art. 229–287.
"""

from __future__ import annotations

from dataclasses import dataclass
from math import gcd
from typing import TYPE_CHECKING

from realquad.core.forms import Form
from realquad.core.primes import factorize, kronecker
from realquad.core.results import JSONObject

if TYPE_CHECKING:
    from realquad.classgroup.group import ClassGroup


#: Imaginary groups up to this many classes get the characters of every class (from the table).
LISTED_IMAGINARY_CLASSES = 100_000


@dataclass(frozen=True)
class Genera:
    """The genus characters of ``D``, the character vector of every narrow class (or generator), the genera."""

    discriminant: int
    characters: list[str]
    class_characters: list[tuple[int, ...]]
    number_of_genera: int
    two_rank: int
    narrow_class_number: int = 0

    @property
    def classes_per_genus(self) -> int:
        return self.narrow_class_number // self.number_of_genera

    def to_dict(self) -> JSONObject:
        """The JSON shape of the genera (``docs/json.md``, *Genera*)."""
        return {
            "characters": list(self.characters),
            "number_of_genera": self.number_of_genera,
            "two_rank": self.two_rank,
        }


def assigned_characters(D: int) -> list[str]:
    """Names of the assigned characters of ``D``: ``'(·/p)'``, ``'δ'``, ``'ε'``, ``'δε'``.

    >>> assigned_characters(8), assigned_characters(24), assigned_characters(5 * 13)
    (['ε'], ['(·/3)', 'δε'], ['(·/5)', '(·/13)'])
    """
    names = [f"(·/{p})" for p in sorted(factorize(D)) if p != 2]
    if D % 4 == 0:
        n = D // 4
        if n % 4 == 3 or n % 8 == 4:
            names.append("δ")
        elif n % 8 == 2:
            names.append("ε")
        elif n % 8 == 6:
            names.append("δε")
        elif n % 8 == 0:
            names += ["δ", "ε"]
    return names


def character_value(name: str, m: int) -> int:
    """The value ``±1`` of an assigned character at an integer ``m`` prime to ``2D``."""
    if name == "δ":
        return -1 if m % 4 == 3 else 1
    if name == "ε":
        return -1 if m % 8 in (3, 5) else 1
    if name == "δε":
        return character_value("δ", m) * character_value("ε", m)
    p = int(name[3:-1])
    return kronecker(m, p)


def represented_prime_to(form: Form, modulus: int) -> int:
    """A value ``F(x, y)`` with ``gcd(x, y) = 1`` prime to ``modulus`` (a primitive form has one)."""
    bound = 1
    while True:
        for x in range(0, bound + 1):
            for y in range(-bound, bound + 1):
                if max(abs(x), abs(y)) == bound and gcd(x, y) == 1:
                    m = form.value(x, y)
                    if m and gcd(m, modulus) == 1:
                        return m
        bound += 1


def genera(group: ClassGroup) -> Genera:
    """Genus characters of every narrow class of ``group``, and the genus count.

    A group found without listing its classes (baby-step giant-step) gets
    the characters of its narrow generators instead; the genera are then
    counted as the span of those character vectors. So does an imaginary
    group of more than :data:`LISTED_IMAGINARY_CLASSES` classes whose table
    is not built yet (the generators suffice, and the table would cost far
    more than the group).

    >>> from realquad.classgroup import class_group
    >>> g = class_group(-4 * 5 * 3 * 7).genus       # D = −420: Cl ≅ (Z/2)³, every class its own genus
    >>> g.characters, g.number_of_genera, len(set(g.class_characters))
    (['(·/3)', '(·/5)', '(·/7)', 'δ'], 8, 8)
    """
    D = group.discriminant
    names = assigned_characters(D)
    listed = group.lists_classes and not (
        group.is_imaginary
        and group.class_number > LISTED_IMAGINARY_CLASSES
        and not group.table_is_built
    )
    forms = (
        [Form._raw(*rep) for rep in group.table.representatives]
        if listed
        else group.narrow_generators
    )
    vectors = []
    for F in forms:
        m = represented_prime_to(F, 2 * D)
        vectors.append(tuple(character_value(name, m) for name in names))
    two_rank = sum(1 for d in group.narrow_invariants if d % 2 == 0)
    count = len(set(vectors)) if listed else len(_span(vectors, len(names)))
    if count != 2 ** (len(names) - 1) or count != 2**two_rank:
        raise ArithmeticError(
            f"internal check failed: {count} genera, {len(names)} characters and 2-rank "
            f"{two_rank} of discriminant {D} disagree with genus theory"
        )
    return Genera(D, names, vectors, count, two_rank, group.narrow_class_number)


def _span(vectors: list[tuple[int, ...]], length: int) -> set[tuple[int, ...]]:
    """The subgroup of ``{±1}^length`` generated by the vectors."""
    span = {(1,) * length}
    for v in vectors:
        span |= {tuple(x * y for x, y in zip(s, v, strict=True)) for s in span}
    return span
