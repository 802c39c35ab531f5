"""The invariants of one field, as stored in a survey row.

For each squarefree ``d`` the survey records the fundamental discriminant,
the class number ``h`` and narrow class number ``h⁺`` with the structure of
both class groups (the invariants of :func:`realquad.classgroup.class_group`),
the norm of the fundamental unit, the period length of the continued
fraction, the number of decimal digits of ``x`` in ``ε = (x + y√d)/c`` and
the regulator (those of :func:`realquad.units.fundamental_unit`).

On the exact route (the fallback of the fast path below) the regulator is
computed from the exact unit ``ε = (u + v√D)/2`` (which the digit count
needs anyway): ``R = log((u + v·√D)/2)`` in binary
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

**Fast path.** Most rows need neither the class group nor the exact unit:
``h``, ``h⁺`` and ``N(ε)`` come from the class-number kernel (cycles of
reduced forms, no lists kept); the structures of ``Cl⁺`` and ``Cl`` from
genus theory whenever it forces them (:mod:`realquad.class_structure`,
which needs only the number of prime divisors of ``D`` and whether a prime
``≡ 3 (mod 4)`` divides it, and for some 2-parts the 4-rank of ``Cl⁺`` by
Rédei–Reichardt); the regulator and the digit count of ``x``
from the walk that multiplies the complete quotients in long double with a
rigorous bound (:func:`realquad.units.regulator`'s accumulated route). The
regulator text is kept only when every value within the bound — widened by
the error of the 96-bit evaluation above — prints the same 17 digits, and
the digit count only when ``log₁₀ x`` stays between two integers (and,
for ``d ≡ 5 (mod 8)``, whether ``x = u`` or ``u/2`` does not matter).
Otherwise the row falls back to the class group's relations and Smith forms
(:func:`realquad.classgroup.class_invariants`, the compiled class table) and
to the exact unit, so the row is the same either way; :data:`FALLBACKS` counts the fallbacks per
column group in this process.
"""

from __future__ import annotations

import json
import math
from collections import Counter
from dataclasses import asdict, dataclass
from functools import lru_cache
from math import isqrt
from typing import Any, Protocol, runtime_checkable

import gmpy2

from realquad._backend import call_kernel
from realquad.classgroup.exact import DEFAULT_MAX_FORMS, class_invariants, class_numbers
from realquad.classgroup.exact import METHOD as CLASS_GROUP_METHOD
from realquad.classgroup.structure import forced_structures, four_rank
from realquad.core.orders import Order, fundamental_discriminant_of
from realquad.core.primes import factorize, primes_below
from realquad.core.results import JSONObject, Proof
from realquad.survey.ranges import Chunk
from realquad.units import fundamental_unit
from realquad.units.cfrac import DEFAULT_MAX_PERIOD, METHOD_ACCUMULATED, principal_regulator_walk
from realquad.units.cfrac import METHOD as UNIT_METHOD

#: Binary precision of the regulator evaluation (see the module docstring).
REGULATOR_BITS = 96
#: Significant digits of the stored regulator.
REGULATOR_DIGITS = 17
_CONTEXT = gmpy2.context(precision=REGULATOR_BITS)

#: The survey's method, one description for every row (each row takes the fast
#: route where its bounds and genus theory decide, else the exact one).
METHOD = (
    f"unit: {METHOD_ACCUMULATED}, where its error bound decides the row, else {UNIT_METHOD}; "
    "class group: cycles of reduced forms (class numbers), the structure by genus theory "
    f"where it is forced, else {CLASS_GROUP_METHOD}"
)

#: A regulator walk: ``principal_regulator``'s (period, parity, Q, mantissa, exponent, error bound).
Walk = tuple[int, int, int, int, int, float]
#: The survey kernel's numbers of one field: ``(D, t, no_three, h⁺, j, walk)``
#: (``t`` primes divide ``D``, ``no_three`` if none is ``≡ 3 (mod 4)``, ``j = 1`` if ``N(ε) = −1``).
Numbers = tuple[int, int, int, int, int, Walk | None]

#: Fallbacks in this process: ``"class group"`` and ``"unit"`` rows that took the slow route.
FALLBACKS: Counter[str] = Counter()


@runtime_checkable
class RowColumns(Protocol):
    """Rows of imaginary fields sent in columns (:class:`realquad.survey.imaginary.ImaginaryRows`):
    what the store needs to insert them without building a :class:`FieldRecord` per row."""

    def __len__(self) -> int: ...

    def methods(self) -> set[str]:
        """The methods of the rows."""
        ...

    def store_values(self, method_ids: dict[str, int], chunk: int) -> list[tuple[object, ...]]:
        """One tuple per row: ``(d, D, h, structure, w, method id, chunk)`` (``h⁺ = h``,
        ``Cl⁺ = Cl``, no unit, unconditional)."""
        ...


@dataclass(frozen=True)
class FieldRecord:
    """One survey row: the invariants of ``Q(√d)``.

    ``class_group`` and ``narrow_class_group`` are the invariant factors
    ``d1 | d2 | …`` as a JSON list (``[]`` for the trivial group);
    ``roots_of_unity`` is ``w`` (2, or 4 and 6 for ``Q(i)`` and ``Q(√−3)``).
    An imaginary field (``d < 0``) has no fundamental unit of infinite order:
    its ``unit_norm``, ``regulator``, ``period_length`` and ``unit_digits`` are
    ``None`` (``NULL`` in the store), and ``Cl⁺ = Cl``.
    """

    d: int
    discriminant: int
    class_number: int
    narrow_class_number: int
    class_group: str
    narrow_class_group: str
    roots_of_unity: int
    unit_norm: int | None
    regulator: str | None
    period_length: int | None
    unit_digits: int | None
    method: str
    proof: Proof

    def as_dict(self) -> dict[str, Any]:
        """The row as stored: one value per column of the survey store."""
        return asdict(self)

    def to_dict(self) -> JSONObject:
        """The JSON shape of a survey row (``docs/json.md``, *SurveyRow*): the store's columns
        under the names the other objects use (``radicand``, ``invariants``, ``digits``).

        >>> row = survey_field(79).to_dict()
        >>> row["radicand"], row["invariants"], row["narrow_invariants"], row["digits"]
        (79, [3], [6], 2)
        """
        return {
            "radicand": self.d,
            "discriminant": self.discriminant,
            "class_number": self.class_number,
            "narrow_class_number": self.narrow_class_number,
            "invariants": json.loads(self.class_group),
            "narrow_invariants": json.loads(self.narrow_class_group),
            "roots_of_unity": self.roots_of_unity,
            "unit_norm": self.unit_norm,
            "regulator": self.regulator,
            "period_length": self.period_length,
            "digits": self.unit_digits,
            "method": self.method,
            "proof": self.proof,
        }


def _regulator_text(u: int, v: int, D: int) -> str:
    """``log((u + v√D)/2)`` to :data:`REGULATOR_DIGITS` significant digits."""
    c, p = _CONTEXT, REGULATOR_BITS
    eps = c.div(c.add(gmpy2.mpfr(u, p), c.mul(gmpy2.mpfr(v, p), c.sqrt(gmpy2.mpfr(D, p)))), 2)
    return f"{c.log(eps):.{REGULATOR_DIGITS}g}"


@lru_cache(maxsize=4096)
def _forced_text(h_plus: int, norm: int, t: int, no_three: bool) -> tuple[str, str] | None:
    """Both structures as stored (JSON) when genus theory forces them (few distinct inputs: cached)."""
    found = forced_structures(h_plus, norm, t, no_three)
    return None if found is None else (json.dumps(found[0]), json.dumps(found[1]))


def _class_columns(numbers: Numbers) -> tuple[int, int, str, str, int] | None:
    """``h, h⁺``, both structures and ``N(ε)`` from the kernel's numbers, or ``None`` if not forced.

    ``h = h⁺`` when ``J = (−1, b₀, c₀)`` is principal (``N(ε) = −1``), else ``h⁺/2``.
    """
    D, t, no_three, h_plus, j_principal, _ = numbers
    norm = -1 if j_principal else 1
    h = h_plus if j_principal else h_plus // 2
    found = _forced_text(h_plus, norm, t, bool(no_three))
    if found is None and h_plus % 4 == 0:  # the 2-part may need its 4-rank
        structures = forced_structures(
            h_plus, norm, t, bool(no_three), four_rank(D, list(factorize(D)))
        )
        if structures is not None:
            found = json.dumps(structures[0]), json.dumps(structures[1])
    if found is None:
        return None
    return h, h_plus, found[0], found[1], norm


_LN2 = _CONTEXT.const_log2()
_LN2_FLOAT = math.log(2)
_LN10 = math.log(10)
_LOG10_2 = math.log10(2)
#: Allowance for libm's ``exp`` and ``log1p`` in the correction term (below 0.21 in size, so
#: this tolerates errors of millions of units in the last place; glibc documents one or two).
_LIBM_SLACK = 1e-9


def _fast_unit_columns(d: int, walk: Walk) -> tuple[int, int, str, int] | None:
    """``N(ε)``, period, regulator text and digit count from the accumulated walk, or ``None``.

    The kernel gives ``log ε`` as ``log(M·2^e·Q/2)`` up to its bound ``err``;
    ``M·Q < 2^96`` is exact in 96 bits, so the 96-bit ``R`` adds at most
    ``(8 + 4R + 2|e|)·2^−96``, and the slow route's own 96-bit value lies
    within ``(16 + 2R)·2^−96`` of ``R``; the margin ``T`` (in binary64,
    rounded up generously) bounds all of them. The text is the 17-digit
    rounding of ``R``, kept only when ``[R − T, R + T]`` holds no rounding
    boundary: ``|R − v| + T`` below half a unit in the last digit of ``v``,
    the text read back in 96 bits (with 1 % to spare for the binary64 sums).

    For the digits, ``log₁₀ u = R/ln 10 + log₁₀(1 + N(ε)e^{−2R})``
    (``u = ε + N(ε)/ε``; ``R ≥ log((1 + √5)/2) = 0.481…`` for every field, so
    the second term is below 0.21 in size), in binary64: the first term is
    one correctly rounded division of ``float(R)`` (error below
    ``(R + 1)·2^−50`` with the constant's), the second term's error is
    allowed :data:`_LIBM_SLACK`; a fractional part within the sum of the
    errors of an integer goes to the exact route.

    For ``d ≡ 5 (mod 8)`` the text needs to know whether ``x = u/2``: it is
    exactly when ``ε ∈ Z[√d]``, i.e. when the order ``Z[√d]`` (discriminant
    ``4d``) has the regulator ``R`` rather than ``3R`` (its unit is ``ε`` or
    ``ε³``: ``(O/2O)^×`` has order 3 for ``d ≡ 5 (mod 8)``), which its own walk
    tells.
    """
    steps, parity, _, _, _, _ = walk
    R, T = _walk_regulator(walk)
    r = float(R)
    if r < 0.45:
        return None
    text = f"{R:.{REGULATOR_DIGITS}g}"
    # (the exponent from just below r, so it is never one too large near a power of 10)
    half_unit = 0.5 * 10.0 ** (math.floor(math.log10(r * (1 - 2.0**-40))) - REGULATOR_DIGITS + 1)
    if abs(float(_CONTEXT.sub(R, gmpy2.mpfr(text, REGULATOR_BITS)))) + T >= 0.99 * half_unit:
        return None
    norm = -1 if parity else 1
    log_u = r / _LN10 + math.log1p(norm * math.exp(-2 * r)) / _LN10
    slack = 2 * T + (r + 1) * 2.0**-48 + _LIBM_SLACK
    # x = u/2 unless D = d ≡ 5 (mod 8), where x is u or u/2 (for d ≡ 1 mod 8, u is even)
    candidates = (log_u, log_u - _LOG10_2) if d % 8 == 5 else (log_u - _LOG10_2,)
    if len(candidates) == 2 and math.floor(candidates[0]) != math.floor(candidates[1]):
        order_walk = principal_regulator_walk(4 * d, DEFAULT_MAX_PERIOD)
        # R4 is R or 3R, so R4 − 2R = ∓R: its sign is certain (R > 0.45 ≫ both error bounds)
        if _walk_regulator_float(order_walk) > 2 * r:  # ε ∉ Z[√d]: x = u
            candidates = candidates[:1]
        else:  # ε ∈ Z[√d]: x = u/2
            candidates = candidates[1:]
    floors = set()
    for value in candidates:
        k = math.floor(value)
        if value - k <= slack or k + 1 - value <= slack:
            return None
        floors.add(k)
    if len(floors) != 1:
        return None
    return norm, steps, text, floors.pop() + 1


def _walk_regulator(walk: Walk) -> tuple[Any, float]:
    """``R`` (96-bit) from a regulator walk and the margin ``T`` bounding its error (see above)."""
    _, _, q_mid, mantissa, exponent, err = walk
    c = _CONTEXT
    R = c.add(c.log(mantissa * q_mid), c.mul(exponent - 1, _LN2))
    T = (err * 1.01 + (100 + 8 * float(R) + 2 * abs(exponent)) * 2.0**-96) * 1.001
    return R, T


def _walk_regulator_float(walk: Walk) -> float:
    """``R`` of a regulator walk in binary64 (within ``10^−9·R`` of it, ample to compare ``R`` with ``3R``)."""
    _, _, q_mid, mantissa, exponent, _ = walk
    return math.log(mantissa * q_mid) + (exponent - 1) * _LN2_FLOAT


def _slow_unit_columns(D: int) -> tuple[int, int, str, int]:
    """``N(ε)``, period, regulator text and digit count from the exact unit."""
    unit = fundamental_unit(Order(D), "cfrac")
    u, v = unit.half_integer_coordinates()
    return unit.norm, int(unit.period_length or 0), _regulator_text(u, v, D), unit.digits


def _numbers(ds: list[int]) -> list[Numbers | None]:
    """The kernel's numbers for the squarefree ``ds`` (the pure twin beyond the compiled range)."""
    discriminants = [d if d % 4 == 1 else 4 * d for d in ds]
    for D in discriminants:
        if D > 4 * DEFAULT_MAX_FORMS**2:  # beyond the cycle method: its own refusal
            class_numbers(Order(D), conductor=1)
    primes = primes_below(isqrt(max(ds)) + 2)
    args = (ds, primes, DEFAULT_MAX_PERIOD, DEFAULT_MAX_FORMS)
    return call_kernel("survey_numbers", *args)  # type: ignore[no-any-return]


def _record(d: int, numbers: Numbers | None) -> FieldRecord:
    if numbers is None or numbers[5] is None:  # too large: the slow routes say why
        D = fundamental_discriminant_of(d)
        class_numbers(Order(D), conductor=1)
        principal_regulator_walk(D, DEFAULT_MAX_PERIOD)
        raise AssertionError(f"the survey kernel refused d = {d} but the slow routes did not")
    D = numbers[0]
    forced = _class_columns(numbers)
    if forced is None:
        FALLBACKS["class group"] += 1
        h, h_plus, wide, narrow, cl_norm = class_invariants(Order(D))
        cl, cl_plus = json.dumps(wide), json.dumps(narrow)
    else:
        h, h_plus, cl, cl_plus, cl_norm = forced
    unit_columns = _fast_unit_columns(d, numbers[5])
    if unit_columns is None:
        FALLBACKS["unit"] += 1
        unit_columns = _slow_unit_columns(D)
    norm, period, regulator_text, digits = unit_columns
    if cl_norm != norm:  # two independent routes to the sign of N(ε)
        raise ArithmeticError(f"internal check failed: unit norms disagree for d = {d}")
    return FieldRecord(
        d=d,
        discriminant=D,
        class_number=h,
        narrow_class_number=h_plus,
        class_group=cl,
        narrow_class_group=cl_plus,
        roots_of_unity=2,
        unit_norm=norm,
        regulator=regulator_text,
        period_length=period,
        unit_digits=digits,
        method=METHOD,
        proof="unconditional",  # every route walks whole cycles exactly
    )


def survey_fields(ds: list[int]) -> list[FieldRecord]:
    """The survey rows of ``Q(√d)`` for the squarefree ``d > 1`` in ``ds``, in order.

    >>> [row.class_number for row in survey_fields([79, 82, 85])]
    [3, 4, 2]
    """
    if not ds:
        return []
    return [_record(d, numbers) for d, numbers in zip(ds, _numbers(ds), strict=True)]


def survey_field(d: int) -> FieldRecord:
    """The survey row of ``Q(√d)``, ``d > 1`` squarefree.

    >>> survey_field(79).class_group, survey_field(79).narrow_class_group
    ('[3]', '[6]')
    """
    return survey_fields([d])[0]


def survey_chunk(chunk: Chunk) -> list[FieldRecord]:
    """The rows of every field in ``chunk`` (run in a worker process or on a Dask worker)."""
    return survey_fields(chunk.radicands())
