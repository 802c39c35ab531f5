"""The invariants of one field, as stored in a survey row.

For each squarefree ``d`` the survey records the fundamental discriminant,
the class number ``h`` and narrow class number ``h⁺`` with the structure of
both class groups (from :func:`realquad.classgroup.class_group`), and, from
:func:`realquad.units.fundamental_unit`, the norm of the fundamental unit,
the period length of the continued fraction, the number of decimal digits of
``x`` in ``ε = (x + y√d)/c`` and the regulator.

The regulator is computed here from the exact unit ``ε = (u + v√D)/2``
(which the digit count needs anyway, and which costs a quarter of the
rounded product tree at survey sizes): ``R = log((u + v·√D)/2)`` in binary
floating point with ``p = 96`` bits. ``u``, ``v`` and ``D`` are converted
with one rounding each, ``√D``, the product, the sum (of two positive
numbers, so no cancellation) and the halving add at most four more, so
``ε`` is known to relative error below ``8·2^−p`` and ``R`` to absolute
error below ``8·2^−p + R·2^−p < 10^−24`` for ``R < 10^4``; the stored
decimal keeps 17 significant digits, all but the last certainly correct.

>>> row = survey_field(79)
>>> (row.discriminant, row.unit_norm, row.period_length, row.unit_digits, row.regulator)
(316, 1, 4, 2, '5.0751347504448099')
>>> survey_field(5).regulator   # log((1 + √5)/2)
'0.48121182505960345'

Reference: the regulator of Q(√79) is log(80 + 9√79) (Jacobson–Williams,
*Solving the Pell Equation*, 2009, Table of small fundamental solutions; the
equation 80² − 79·9² = 1 is checked directly in the tests).
"""

from __future__ import annotations

import json
from dataclasses import asdict, dataclass
from typing import Any

import gmpy2

from realquad.arith import Order, fundamental_discriminant_of
from realquad.classgroup import class_group
from realquad.results import Proof
from realquad.survey.ranges import Chunk
from realquad.units import fundamental_unit

#: Binary precision of the regulator evaluation (see the module docstring).
REGULATOR_BITS = 96
#: Significant digits of the stored regulator.
REGULATOR_DIGITS = 17
_CONTEXT = gmpy2.context(precision=REGULATOR_BITS)


@dataclass(frozen=True)
class FieldRecord:
    """One survey row: the invariants of ``Q(√d)``.

    ``class_group`` and ``narrow_class_group`` are the invariant factors
    ``d1 | d2 | …`` as a JSON list (``[]`` for the trivial group).
    """

    d: int
    discriminant: int
    class_number: int
    narrow_class_number: int
    class_group: str
    narrow_class_group: str
    unit_norm: int
    regulator: str
    period_length: int
    unit_digits: int
    method: str
    proof: Proof

    def as_dict(self) -> dict[str, Any]:
        return asdict(self)


def _regulator_text(u: int, v: int, D: int) -> str:
    """``log((u + v√D)/2)`` to :data:`REGULATOR_DIGITS` significant digits."""
    c, p = _CONTEXT, REGULATOR_BITS
    eps = c.div(c.add(gmpy2.mpfr(u, p), c.mul(gmpy2.mpfr(v, p), c.sqrt(gmpy2.mpfr(D, p)))), 2)
    return f"{c.log(eps):.{REGULATOR_DIGITS}g}"


def _class_group_columns(order: Order) -> tuple[int, int, str, str, str, Proof, int]:
    """``h, h⁺``, both structures, method, proof and unit norm, from the class-group module."""
    group = class_group(order)
    return (
        int(group.class_number),
        int(group.narrow_class_number),
        json.dumps([int(x) for x in group.invariants]),
        json.dumps([int(x) for x in group.narrow_invariants]),
        str(group.method),
        group.proof,
        int(group.unit_norm),
    )


def survey_field(d: int) -> FieldRecord:
    """The survey row of ``Q(√d)``, ``d > 1`` squarefree."""
    D = fundamental_discriminant_of(d)
    order = Order(D)
    unit = fundamental_unit(order)
    u, v = unit.half_integer_coordinates()
    h, h_plus, cl, cl_plus, cl_method, cl_proof, cl_unit_norm = _class_group_columns(order)
    if cl_unit_norm != unit.norm:  # two independent routes to the sign of N(ε)
        raise ArithmeticError(f"internal check failed: unit norms disagree for d = {d}")
    proof: Proof = "unconditional" if unit.proof == cl_proof == "unconditional" else "GRH"
    return FieldRecord(
        d=d,
        discriminant=D,
        class_number=h,
        narrow_class_number=h_plus,
        class_group=cl,
        narrow_class_group=cl_plus,
        unit_norm=unit.norm,
        regulator=_regulator_text(u, v, D),
        period_length=int(unit.period_length or 0),
        unit_digits=unit.digits,
        method=f"unit: {unit.method}; class group: {cl_method}",
        proof=proof,
    )


def survey_chunk(chunk: Chunk) -> list[FieldRecord]:
    """The rows of every field in ``chunk`` (run in a worker process or on a Dask worker)."""
    return [survey_field(d) for d in chunk.radicands()]
