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
from realquad.errors import DomainError, InputError, RealquadError, TooLargeError
from realquad.pell import PellSolution, pell
from realquad.quadratic_number import QuadraticNumber
from realquad.results import Regulator, Unit
from realquad.dispatch import fundamental_unit, regulator

__version__ = "0.1.0"

__all__ = [
    "BACKEND",
    "ContinuedFraction",
    "DomainError",
    "InputError",
    "Order",
    "PellSolution",
    "QuadraticIrrational",
    "QuadraticNumber",
    "RealquadError",
    "Regulator",
    "TooLargeError",
    "Unit",
    "continued_fraction",
    "convergents",
    "field",
    "from_periodic",
    "fundamental_unit",
    "kronecker",
    "pell",
    "regulator",
]
