"""Where a form's class lies: its coordinates in ``Cl⁺`` and ``Cl``, its order, its genus.

The class group comes from the exact method of :func:`realquad.classgroup.class_group`
(cycles of reduced forms for ``D > 0``, one reduced form per class for
``D < 0``), which lists every class and so locates any primitive form:
:meth:`realquad.classgroup.ClassGroup.narrow_class_of` gives its coordinates on
the narrow generators, :meth:`~realquad.classgroup.ClassGroup.class_of` on the
wide ones. The order of a class with coordinates ``eᵢ`` in ``⊕ Z/dᵢ`` is
``lcm dᵢ/gcd(eᵢ, dᵢ)``; the genus is the value of each assigned character at
a number the form represents prime to ``2D`` (Cox, §3).

>>> from realquad.core.forms import Form
>>> c = form_class(Form(3, 2, 5))                   # D = −56: Cl ≅ Z/4 (Cox, §2.A)
>>> c.narrow_class, c.narrow_order, c.genus
([1], 4, [('(·/7)', -1), ('ε', -1)])

References: D. A. Cox, *Primes of the Form x² + ny²*, Wiley 1989, §2–3;
H. Cohen, *A Course in Computational Algebraic Number Theory*, Springer 1993, §5.2.
"""

from __future__ import annotations

from math import gcd, lcm

from realquad.classgroup import class_group
from realquad.classgroup.genus import assigned_characters, character_value, represented_prime_to
from realquad.core.forms import Form
from realquad.core.orders import Order
from realquad.errors import DomainError
from realquad.formclasses.results import FormClass

#: Reduced forms (``D > 0``) or classes (``D < 0``) the exact method stores at most by default.
DEFAULT_MAX_FORMS = 1_000_000


def element_order(coordinates: list[int], invariants: list[int]) -> int:
    """The order of the element with these coordinates in ``⊕ Z/dᵢ``.

    >>> element_order([2, 3], [4, 12]), element_order([], []), element_order([0, 0], [2, 6])
    (4, 1, 1)
    """
    return lcm(1, *(d // gcd(e, d) for e, d in zip(coordinates, invariants, strict=True)))


def form_class(F: Form, max_forms: int = DEFAULT_MAX_FORMS) -> FormClass:
    """The place of the class of the primitive form ``F`` in the class groups of its order.

    ``max_forms`` bounds the reduced forms (the classes for ``D < 0``) the
    exact method stores (:class:`~realquad.errors.TooLargeError` beyond).

    >>> c = form_class(Form(3, 14, -10))                # D = 316, Q(√79): Cl⁺ ≅ Z/6, Cl ≅ Z/3
    >>> c.narrow_order, c.wide_order, c.group.narrow_invariants, c.group.invariants
    (6, 3, [6], [3])
    """
    if not F.is_primitive():
        raise DomainError(
            f"{F} is not primitive (its coefficients share a factor): it lies in no class of "
            "the class group"
        )
    D = F.discriminant
    group = class_group(Order(D), max_forms=max_forms, method="exact")
    narrow = group.narrow_class_of(F)
    wide = group.class_of(F)
    m = represented_prime_to(F, 2 * D)
    genus = [(name, character_value(name, m)) for name in assigned_characters(D)]
    return FormClass(
        F,
        F.reduced(),
        narrow,
        wide,
        element_order(narrow, group.narrow_invariants),
        element_order(wide, group.invariants),
        genus,
        group,
        f"the class looked up among every class of the group; group by {group.method}",
        group.proof,
    )
