"""Classes of binary quadratic forms of either sign: reduce, compare, compose, walk, locate.

The operations on forms one asks for by hand, each returning a typed result
with its ``method`` and ``proof`` (:mod:`realquad.formclasses.results`):

* :func:`reduce_form` — a reduced form of the class and the matrix that carries the form to it;
* :func:`equivalence` — proper and improper equivalence of two forms, with the matrices;
* :func:`compose_forms` — the composite of two classes, by Dirichlet composition or NUCOMP;
* :func:`form_power` — the ``k``-th power of a class;
* :func:`form_cycle` — the cycle of reduced forms of an indefinite form's class and its automorph;
* :func:`form_class` — the coordinates, order and genus of the class in ``Cl⁺`` and ``Cl``.

The forms themselves and their arithmetic are :class:`realquad.core.forms.Form`;
this problem sits above the class groups because :func:`form_class` locates a
form in the group :func:`realquad.classgroup.class_group` returns.

>>> F = Form(2, 2, 3)                                   # x² + 5y²'s other class, D = −20
>>> reduce_form(F).reduced, form_power(F, 2).reduced, form_class(F).narrow_class
(Form(2, 2, 3), Form(1, 0, 5), [1])
"""

from __future__ import annotations

from realquad.core.forms import Form
from realquad.formclasses.composition import COMPOSITION_METHODS, compose_forms, form_power
from realquad.formclasses.cycles import form_cycle
from realquad.formclasses.location import element_order, form_class
from realquad.formclasses.reduction import equivalence, reduce_form
from realquad.formclasses.results import (
    FormClass,
    FormComposition,
    FormCycle,
    FormEquivalence,
    FormPower,
    FormReduction,
)

__all__ = [
    "COMPOSITION_METHODS",
    "Form",
    "FormClass",
    "FormComposition",
    "FormCycle",
    "FormEquivalence",
    "FormPower",
    "FormReduction",
    "compose_forms",
    "element_order",
    "equivalence",
    "form_class",
    "form_cycle",
    "form_power",
    "reduce_form",
]
