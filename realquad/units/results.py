"""Small result types shared by the unit, regulator and class-group algorithms.

They live low in the stack so that every algorithm module (continued
fraction, infrastructure, ...) returns the same types without importing the
others. Each result says how it was obtained (``method``) and how sure it is
(``proof``: ``"unconditional"`` or ``"GRH"``).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

import mpmath

from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.results import JSONObject, Proof
from realquad.latex import (
    MAX_DIGITS,
    ROW_WIDTH,
    Display,
    brief_repr,
    clauses,
    fraction,
    integer,
    integer_rows,
    lines,
    sqrt,
    text,
    width,
)
from realquad.textio import decimal_digits

#: Why an imaginary order is refused: its units are the roots of unity (``w = 2, 4, 6``).
NO_UNIT_OF_INFINITE_ORDER = (
    "an imaginary quadratic order has no unit of infinite order "
    "(its units are its w = 2, 4 or 6 roots of unity: unit_group)"
)


@dataclass(frozen=True)
class Regulator(Display):
    """The regulator ``R = log ε`` of an order, rounded to ``digits`` significant digits.

    ``error_bound`` bounds ``|value − R|`` rigorously (absolute error of the
    unrounded value; the decimal string adds at most half a unit in its last
    place).
    """

    value: mpmath.mpf
    digits: int
    error_bound: mpmath.mpf
    method: str
    proof: Proof = "unconditional"

    def __str__(self) -> str:
        return mpmath.nstr(
            self.value, self.digits, strip_zeros=False, min_fixed=-mpmath.inf, max_fixed=mpmath.inf
        )

    def __float__(self) -> float:
        return float(self.value)

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``R \approx 0.4812…``, rounded to its digits (the note gives the error bound).

        >>> from realquad.units import regulator
        >>> r = regulator(5, 12)
        >>> print(r.to_latex())
        R \approx 0.481211825060
        >>> r.latex_note().split("; ")[-1].split(" within ")[0]
        'rounded to 12 significant digits from a value'
        """
        return rf"R \approx {self}"

    def latex_note(self) -> str | None:
        """The method and proof, and how far the printed value may be from ``R``."""
        bound = mpmath.nstr(self.error_bound, 2)
        closeness = f"rounded to {self.digits} significant digits from a value within {bound} of R"
        return f"{super().latex_note()}; {closeness}"

    def to_dict(self) -> JSONObject:
        """The JSON shape of a regulator (``docs/json.md``, *Regulator*): decimals as strings."""
        return {
            "value": str(self),
            "digits": self.digits,
            "error_bound": mpmath.nstr(self.error_bound, 3),
            "method": self.method,
            "proof": self.proof,
        }


def trace_digits(regulator: Regulator, norm: int, factor: Fraction) -> int | None:
    """Decimal digits of ``x = factor·(η + norm/η)`` for ``η = e^R``, ``R`` given with its error bound.

    ``log₁₀ x = log₁₀ factor + R/ln 10 + log₁₀(1 + norm·e^{−2R})``; ``None``
    when ``R``'s error bound straddles a power of ten.

    >>> from realquad.units import fundamental_unit
    >>> trace_digits(fundamental_unit(4 * 94).regulator(40), 1, Fraction(1, 2))  # x = 2143295
    7
    """
    R, error = regulator.value, regulator.error_bound
    magnitude = max(1, int(float(R))).bit_length() // 3 + 1
    with mpmath.workdps(max(regulator.digits, magnitude) + 20):
        centre = (
            mpmath.log10(mpmath.mpf(factor.numerator) / factor.denominator)
            + R / mpmath.log(10)
            + mpmath.log10(1 + norm * mpmath.exp(-2 * R))
        )
        spread = error / mpmath.log(10) + mpmath.mpf(10) ** (-(regulator.digits - magnitude + 5))
        low, high = mpmath.floor(centre - spread), mpmath.floor(centre + spread)
        return int(low) + 1 if low == high else None


#: The most digits :meth:`Unit.to_latex` expands a unit to when every digit is asked for.
EXPAND_LIMIT = 20_000_000

#: Largest unit (decimal digits) :meth:`Unit.expand` writes out from a compact representation.
MAX_EXPANDED_DIGITS = 50_000_000


@dataclass(eq=False)
class Unit(Display):
    """The fundamental unit ``ε > 1`` of an order, expanded only on request.

    ``ε = (u + v√D)/2`` where ``D`` is the order's discriminant; the same
    number is ``(x + y√radicand)/denominator`` in lowest terms
    (:meth:`expand`).
    """

    order: Order
    norm: int
    period_length: int | None
    method: str
    proof: Proof
    _expander: Callable[[], tuple[int, int]] = field(repr=False)
    _regulator: Callable[[int], Regulator] = field(repr=False)
    _cache: dict[str, object] = field(default_factory=dict, repr=False)
    _compact: Callable[[], Any] | None = field(default=None, repr=False)
    _denominator: Callable[[], int] | None = field(default=None, repr=False)

    def compact(self) -> Any:
        """The compact representation of ``ε`` (units found in the infrastructure), else ``None``."""
        return None if self._compact is None else self._compact()

    def half_integer_coordinates(self) -> tuple[int, int]:
        """``(u, v)`` with ``ε = (u + v√D)/2`` and ``u² − D v² = ±4``."""
        if "uv" not in self._cache:
            self._cache["uv"] = self._expander()
        return self._cache["uv"]  # type: ignore[return-value]

    def expand(self) -> QuadraticNumber:
        """The exact unit as ``(x + y√radicand)/denominator``."""
        if "exact" not in self._cache:
            u, v = self.half_integer_coordinates()
            k = self.order.sqrt_factor
            self._cache["exact"] = QuadraticNumber(u, v * k, 2, self.order.radicand)
        return self._cache["exact"]  # type: ignore[return-value]

    @property
    def x(self) -> int:
        return int(self.expand().x)

    @property
    def y(self) -> int:
        return int(self.expand().y)

    @property
    def denominator(self) -> int:
        return int(self.expand().c)

    @property
    def digits(self) -> int:
        """Number of decimal digits of ``x`` in the expanded form."""
        if "digits" not in self._cache:
            self._cache["digits"] = decimal_digits(self.expand().x)
        return self._cache["digits"]  # type: ignore[return-value]

    def regulator(self, digits: int = 30) -> Regulator:
        """``log ε`` to ``digits`` significant digits, without expanding ``ε``."""
        key = f"regulator{digits}"
        if key not in self._cache:
            self._cache[key] = self._regulator(digits)
        return self._cache[key]  # type: ignore[return-value]

    def digits_from_regulator(self) -> tuple[int, bool]:
        """``(digits of x, exact)`` from ``log ε``, without expanding ``ε``.

        ``ε = (x + y√r)/c`` and ``ε' = N(ε)/ε``, so ``x = c·(ε + N/ε)/2`` and
        ``log₁₀ x = log₁₀(c/2) + R/ln 10 + log₁₀(1 + N·e^{−2R})``, evaluated
        with ``R``'s rigorous error bound. ``c = 1`` when ``D ≡ 0 (mod 4)``;
        for odd ``D``, ``c = 1`` exactly when ``ε ∈ Z[√D]``, which the method
        decides when it must (``_denominator``). ``exact`` is false only when
        ``log₁₀ x`` lies within the error bound of an integer.

        >>> from realquad.units import fundamental_unit
        >>> fundamental_unit(4 * 94).digits_from_regulator()       # 2143295 + 221064√94
        (7, True)
        """
        if "digits" in self._cache:
            return self._cache["digits"], True  # type: ignore[return-value]
        regulator = self.precise_regulator()
        candidates = [1] if self.order.discriminant % 4 == 0 else [1, 2]
        counts = {c: trace_digits(regulator, self.norm, Fraction(c, 2)) for c in candidates}
        if len(set(counts.values())) > 1 and self._denominator is not None:
            counts = {c: counts[c] for c in (self._denominator(),)}
        values = set(counts.values())
        if len(values) == 1 and None not in values:
            return values.pop(), True  # type: ignore[return-value]
        with mpmath.workdps(40):
            return int(mpmath.floor(regulator.value / mpmath.log(10))) + 1, False

    def precise_regulator(self, extra: int = 30) -> Regulator:
        """``log ε`` to ``extra`` digits after the decimal point (as many as its size needs)."""
        magnitude = max(1, int(float(self.regulator(20).value))).bit_length() // 3 + 1
        return self.regulator(magnitude + extra)

    def power(self, k: int) -> QuadraticNumber:
        """``ε^k`` exactly (``k`` may be negative)."""
        return self.expand() ** k

    def __repr__(self) -> str:
        return brief_repr(
            "Unit",
            discriminant=self.order.discriminant,
            norm=self.norm,
            period_length=self.period_length,
            method=self.method,
            proof=self.proof,
        )

    def expands_within(self, max_digits: int) -> bool:
        """Whether ``ε`` has at most ``max_digits`` digits (0: at most :data:`EXPAND_LIMIT`).

        Free for a unit that is expanded already or has no compact form (the
        continued fraction builds it); else counted from the regulator.
        """
        if "digits" in self._cache or self._compact is None:
            return True
        return self.digits_from_regulator()[0] <= (max_digits or EXPAND_LIMIT)

    def to_latex(self, max_digits: int = MAX_DIGITS, regulator_digits: int = 30) -> str:
        r"""``ε = (x + y√d)/c``, its norm and ``log ε``; a unit of more than ``max_digits``
        digits is not expanded (its digit count and regulator are given instead).

        >>> from realquad.units import fundamental_unit
        >>> print(fundamental_unit(5).to_latex(regulator_digits=10))
        \varepsilon = \frac{1 + \sqrt{5}}{2},\quad N(\varepsilon) = -1,\quad \log\varepsilon = 0.4812118251
        """
        reg = f"\\log\\varepsilon = {self.regulator(regulator_digits)}"
        norm = f"N(\\varepsilon) = {integer(self.norm)}"
        r = sqrt(self.order.radicand, max_digits)
        if self.expands_within(max_digits):
            number = self.expand()
            parts = [f"\\varepsilon = {number.to_latex(max_digits)}", norm, reg]
            if width(parts[0]) > ROW_WIDTH:  # x and y on rows of their own
                shape = fraction(f"x + y{r}", int(number.c))
                x = integer_rows("x", int(number.x), max_digits)
                y = integer_rows("y", int(number.y), max_digits)
                return lines([*clauses([rf"\varepsilon = {shape}", norm, reg]), *x, *y])
        else:
            digits, exact = self.digits_from_regulator()
            about = "" if exact else r"\approx "
            size = f"x {text(' has ')} {about}{integer(digits, 0)} {text(' digits')}"
            parts = [rf"\varepsilon = \frac{{x + y{r}}}{{c}}", size, norm, reg]
        return lines(clauses(parts))

    def to_dict(
        self, expand: bool = True, with_compact: bool = False, regulator_digits: int = 30
    ) -> JSONObject:
        """The JSON shape of a fundamental unit (``docs/json.md``, *Unit*).

        ``expand=False`` leaves out the expanded number (``number`` is ``None``,
        ``digits`` then estimated from the regulator); ``with_compact`` adds the
        compact representation when the method kept one; the regulator is given
        to ``regulator_digits`` significant digits.

        >>> from realquad.units import fundamental_unit
        >>> d = fundamental_unit(5).to_dict()
        >>> d["number"], d["norm"], d["digits"], d["regulator"]["value"][:8]
        ({'x': 1, 'y': 1, 'denominator': 2, 'radicand': 5}, -1, 1, '0.481211')
        """
        digits, exact = (self.digits, True) if expand else self.digits_from_regulator()
        out: JSONObject = {
            "order": self.order.to_dict(),
            "number": self.expand().to_dict() if expand else None,
            "norm": self.norm,
            "digits": digits,
            "digits_exact": exact,
            "regulator": self.regulator(regulator_digits).to_dict(),
            "period_length": self.period_length,
        }
        compact = self.compact() if with_compact else None
        out["compact"] = None if compact is None else compact.to_dict()
        out["method"] = self.method
        out["proof"] = self.proof
        return out
