"""realquad: exact computation in real (and imaginary) quadratic fields and orders.

The library is organised by problem, one package each, its public function in
the package's ``__init__`` choosing among the methods beneath it
(``docs/architecture.md``):

* :mod:`realquad.cfrac` — continued fractions;
* :mod:`realquad.units` — fundamental units and regulators, roots of unity;
* :mod:`realquad.classgroup` — class numbers and class groups;
* :mod:`realquad.formclasses` — reduce, compare, compose, power, cycle and locate forms;
* :mod:`realquad.splitting` — decomposition of primes and their classes; which primes a
  form represents; ring class polynomials;
* :mod:`realquad.equations` — Pell, norm, binary-form and general quadratic equations;
* :mod:`realquad.survey` — tabulation over ranges of fields;

on top of the shared :mod:`realquad.core` (orders, numbers, forms, ideals,
primes, linear algebra) and :mod:`realquad.infrastructure` (reduced principal
ideals with distances). The names below are the public API.

>>> import realquad
>>> realquad.pell(13).x
649
>>> str(realquad.fundamental_unit(realquad.field(94)).expand())
'2143295 + 221064√94'
"""

from realquad._backend import BACKEND
from realquad._version import __version__
from realquad.cfrac import (
    ContinuedFraction,
    QuadraticIrrational,
    continued_fraction,
    convergents,
    from_periodic,
)
from realquad.classgroup import ClassGroup, class_group, class_numbers
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order, field
from realquad.core.primes import kronecker
from realquad.equations import (
    NormEquationSolution,
    PellSolution,
    parse_equation,
    pell,
    solve_binary_form,
    solve_norm_equation,
    solve_quadratic,
)
from realquad.errors import DomainError, InputError, RealquadError, TooLargeError
from realquad.formclasses import (
    FormClass,
    FormComposition,
    FormCycle,
    FormEquivalence,
    FormPower,
    FormReduction,
    compose_forms,
    equivalence,
    form_class,
    form_cycle,
    form_power,
    reduce_form,
)
from realquad.splitting import (
    ClassPolynomial,
    FormPrimes,
    PrimeDecomposition,
    PrimeRepresentation,
    RepresentationCriterion,
    decompose_prime,
    form_primes,
    representation_criterion,
    represents_prime,
    ring_class_polynomial,
    split_primes,
)
from realquad.units import Regulator, Unit, UnitGroup, fundamental_unit, regulator, unit_group

__all__ = [
    "__version__",
    "BACKEND",
    "ClassGroup",
    "ClassPolynomial",
    "ContinuedFraction",
    "DomainError",
    "Form",
    "FormClass",
    "FormComposition",
    "FormCycle",
    "FormEquivalence",
    "FormPower",
    "FormPrimes",
    "FormReduction",
    "Ideal",
    "InputError",
    "NormEquationSolution",
    "Order",
    "PellSolution",
    "PrimeDecomposition",
    "PrimeRepresentation",
    "QuadraticIrrational",
    "QuadraticNumber",
    "RealquadError",
    "RepresentationCriterion",
    "Regulator",
    "TooLargeError",
    "Unit",
    "UnitGroup",
    "class_group",
    "class_numbers",
    "compose_forms",
    "continued_fraction",
    "convergents",
    "decompose_prime",
    "equivalence",
    "field",
    "form_class",
    "form_cycle",
    "form_power",
    "form_primes",
    "from_periodic",
    "fundamental_unit",
    "kronecker",
    "parse_equation",
    "pell",
    "reduce_form",
    "regulator",
    "representation_criterion",
    "represents_prime",
    "ring_class_polynomial",
    "solve_binary_form",
    "solve_norm_equation",
    "solve_quadratic",
    "split_primes",
    "unit_group",
]
