"""realquad: exact computation in real quadratic fields and orders.

>>> import realquad
>>> realquad.pell(13).x
649
>>> str(realquad.fundamental_unit(realquad.field(94)).expand())
'2143295 + 221064√94'
"""

from realquad._backend import BACKEND
from realquad.arith import Order, field, kronecker
from realquad.cfrac import (
    ContinuedFraction,
    QuadraticIrrational,
    continued_fraction,
    convergents,
    from_periodic,
)
from realquad.classgroup import ClassGroup, class_group, class_numbers
from realquad.conics import solve_quadratic
from realquad.dispatch import fundamental_unit, regulator
from realquad.errors import DomainError, InputError, RealquadError, TooLargeError
from realquad.forms import Form
from realquad.norm_equations import NormEquationSolution, solve_norm_equation
from realquad.pell import PellSolution, pell
from realquad.quadratic_number import QuadraticNumber
from realquad.results import Regulator, Unit
from realquad.splitting import PrimeDecomposition, decompose_prime, split_primes

__version__ = "0.1.0"

__all__ = [
    "BACKEND",
    "ClassGroup",
    "ContinuedFraction",
    "DomainError",
    "Form",
    "InputError",
    "NormEquationSolution",
    "Order",
    "PellSolution",
    "PrimeDecomposition",
    "QuadraticIrrational",
    "QuadraticNumber",
    "RealquadError",
    "Regulator",
    "TooLargeError",
    "Unit",
    "class_group",
    "class_numbers",
    "continued_fraction",
    "convergents",
    "decompose_prime",
    "field",
    "from_periodic",
    "fundamental_unit",
    "kronecker",
    "solve_norm_equation",
    "solve_quadratic",
    "pell",
    "regulator",
    "split_primes",
]
