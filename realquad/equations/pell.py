"""The Pell equations ``x² − d y² = N`` for ``N ∈ {1, −1, 4, −4}``.

Their positive solutions are the units of norm ``N/|N|`` of an order, written
in coordinates: for ``N = ±1`` the units ``x + y√d`` of ``Z[√d]``
(discriminant ``4d``); for ``N = ±4`` the units ``(x + y√d)/2`` of the order
of discriminant ``d`` when ``d ≡ 0, 1 (mod 4)``, and twice the ``±1``
solutions otherwise. ``N = −1`` and ``N = −4`` are solvable exactly when that
unit has norm −1, i.e. when its period is odd.

>>> s = pell(61)
>>> (s.x, s.y)
(1766319049, 226153980)
>>> pell(61, -1).x, pell(3, -1).solvable
(29718, False)
>>> pell(13, -4).x, pell(13, -4).y
(3, 1)
>>> [pell(2).solution(k) for k in range(1, 4)]
[(3, 2), (17, 12), (99, 70)]

References: H. W. Lenstra Jr., "Solving the Pell equation", *Notices AMS* 49
(2002) 182–192; M. J. Jacobson Jr. and H. C. Williams, *Solving the Pell
Equation*, Springer 2009.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field
from fractions import Fraction
from functools import partial

import mpmath

from realquad.core.integers import as_integer, is_square, isqrt
from realquad.core.lfunction import estimated_period
from realquad.core.numbers import QuadraticNumber
from realquad.core.orders import Order
from realquad.core.results import JSONObject, Proof
from realquad.equations.families import Point, point_dict
from realquad.equations.finite import definite_solutions, square_solutions
from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.infrastructure.table import compiled_table
from realquad.latex import (
    MAX_DIGITS,
    POINTS_PER_ROW,
    ROW_WIDTH,
    Display,
    brief_repr,
    fraction,
    integer,
    integer_rows,
    lines,
    named_set,
    pack,
    parenthesised,
    point,
    sqrt,
    surd,
    terms,
    text,
    width,
)
from realquad.textio import about, decimal_digits, shown, signed, to_decimal
from realquad.units import DEFAULT_MAX_PERIOD, Regulator, Unit, fundamental_unit
from realquad.units.bsgs import check_reach
from realquad.units.results import trace_digits

PELL_NORMS = (1, -1, 4, -4)


@dataclass
class PellSolution(Display):
    """The answer to ``x² − d y² = norm``: solvability and the fundamental solution.

    ``x`` and ``y`` are the least positive solution (``y > 0``), or ``None``
    when there is none. For a square ``d`` (or ``d < 0``) the equation has
    finitely many solutions, listed in ``finite_solutions`` (those with
    ``x, y ≥ 0``). Beyond the continued fraction's reach the solution is kept
    in compact form (``compact``: ``x + y√d``, or ``(x + y√d)/2`` for
    ``N = ±4``, as a product of small numbers) when it has more than
    :data:`MAX_EXPANDED_DIGITS` digits; ``digits`` is then counted from the
    regulator (``digits_exact`` says whether that count is certain).
    """

    d: int
    norm: int
    solvable: bool
    x: int | None
    y: int | None
    period_length: int | None
    method: str
    proof: Proof = "unconditional"
    reason: str | None = None
    finite_solutions: list[tuple[int, int]] | None = None
    compact: CompactRepresentation | None = None
    digits: int | None = None
    digits_exact: bool = True
    _unit: Unit | None = field(default=None, repr=False)

    @property
    def discriminant(self) -> int | None:
        return self._unit.order.discriminant if self._unit else None

    def _base(self) -> QuadraticNumber:
        """The fundamental unit ``ε = (u + v√D)/2`` of the order of discriminant ``D``.

        Written over ``√D`` itself, not over the squarefree radicand: no factoring of ``d``.
        """
        assert self._unit is not None
        u, v = self._unit.half_integer_coordinates()
        return QuadraticNumber(u, v, 2, self._unit.order.discriminant)

    def _coords(self, q: QuadraticNumber) -> tuple[int, int]:
        """``(x, y)`` with ``q = x + y√d`` (``N = ±1``) or ``(x + y√d)/2`` (``N = ±4``)."""
        # q = (X + Y√D)/c with D = k²d, k = 1 or 2
        scale = 1 if abs(self.norm) == 1 else 2
        k = isqrt(q.d // self.d)
        X, Y, c = int(q.x) * scale, int(q.y) * scale * k, int(q.c)
        assert X % c == 0 and Y % c == 0
        return X // c, Y // c

    def to_dict(self) -> JSONObject:
        """The JSON shape of the answer (``docs/json.md``, *PellSolution*): ``x² − d y² = n``.

        >>> pell(61, -1).to_dict()["x"], pell(3, -1).to_dict()["solvable"]
        (29718, False)
        """
        return {
            "d": self.d,
            "n": self.norm,
            "solvable": self.solvable,
            "x": self.x,
            "y": self.y,
            "digits": self.digits if self.x is None else decimal_digits(self.x),
            "digits_exact": self.digits_exact,
            "compact": None if self.compact is None else self.compact.to_dict(),
            "period_length": self.period_length,
            "reason": self.reason,
            "finite_solutions": None
            if self.finite_solutions is None
            else [point_dict(p) for p in self.finite_solutions],
            "method": self.method,
            "proof": self.proof,
        }

    def __repr__(self) -> str:
        return brief_repr(
            "PellSolution",
            d=self.d,
            norm=self.norm,
            solvable=self.solvable,
            x=self.x,
            y=self.y,
            digits=self.digits if self.x is None else decimal_digits(self.x),
            method=self.method,
            proof=self.proof,
        )

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""The equation, its least solution and every solution from it (the family of powers).

        >>> print(pell(2, -1).to_latex())
        \begin{gathered}x^{2} - 2y^{2} = -1:\quad (x_{1}, y_{1}) = (1, 1)\\
        x + y\sqrt{2} = \pm\left(1 + \sqrt{2}\right)^{2k + 1},\quad k \in \mathbb{Z}\end{gathered}
        >>> print(pell(3, -1).to_latex())
        x^{2} - 3y^{2} = -1\quad \text{has no integer solution}
        """
        equation = terms([(1, "x^{2}"), (-self.d, "y^{2}")], max_digits)
        equation += f" = {integer(self.norm)}"
        if self.finite_solutions is not None:
            write = partial(point, max_digits=max_digits)
            S, defining = named_set("S", self.finite_solutions, write, POINTS_PER_ROW)
            return lines([rf"{equation},\quad x, y \ge 0:\quad (x, y) \in {S}", *defining])
        if not self.solvable:
            return rf"{equation}\quad {text('has no integer solution')}"
        r = sqrt(self.d, max_digits)
        half = abs(self.norm) == 4
        exponent = "2k + 1" if self.norm < 0 else "k"
        eta = fraction(f"x_{{1}} + y_{{1}}{r}", 2 if half else 1)
        if self.x is not None and self.y is not None:
            rows = [rf"{equation}:\quad (x_{{1}}, y_{{1}}) = {point((self.x, self.y), max_digits)}"]
            if width(rows[0]) > ROW_WIDTH:  # x₁ and y₁ on rows of their own
                x = integer_rows("x_{1}", self.x, max_digits)
                y = integer_rows("y_{1}", self.y, max_digits)
                rows = [f"{equation}:", *(pack([*x, *y], ",\\quad ") if len(x) == 1 else x + y)]
            base = surd(self.x, self.y, 2 if half else 1, self.d, max_digits)
        else:
            assert self.compact is not None
            about = "" if self.digits_exact else r"\approx "
            size = rf"{text('with')}\ {about}{integer(self.digits or 0, 0)}\ {text('digits')}"
            rows = [rf"{equation}:\quad {eta} = {self.compact.to_latex(max_digits)}"]
            rows.append(rf"x_{{1}}\ {size}")
            base = eta
        family = fraction(f"x + y{r}", 2 if half else 1)
        every = rf"{family} = \pm{parenthesised(base)}^{{{exponent}}},\quad k \in \mathbb{{Z}}"
        if width(every) > ROW_WIDTH:  # the least solution by its name
            every = rf"{family} = \pm{parenthesised(eta)}^{{{exponent}}},\quad k \in \mathbb{{Z}}"
        return lines([*rows, every])

    def solution(self, k: int) -> tuple[int, int]:
        """The k-th positive solution (k ≥ 1; k = 0 gives the trivial one for N > 0)."""
        k = as_integer(k, "k")
        if not self.solvable:
            raise InputError(f"x² − {self.d}y² = {self.norm} has no solution")
        if self._unit is None:
            sols = self.finite_solutions or []
            if not 0 <= k < len(sols):
                raise InputError(f"there are only {len(sols)} solutions with x, y ≥ 0")
            return sols[k]
        if k < 0:
            raise InputError("k must be non-negative")
        eps = self._base()
        if self.norm > 0:
            if k == 0:
                return (1, 0) if self.norm == 1 else (2, 0)
            step = eps if self._unit.norm == 1 else eps * eps
            return self._coords(step**k)
        if k == 0:
            raise InputError("k must be at least 1 for a negative norm")
        return self._coords(eps ** (2 * k - 1))

    def _argument(self, value: int, name: str, low: int, what: str) -> int:
        """``value`` as an integer ``≥ low`` for a question about the solution, which must exist."""
        value = as_integer(value, name)
        if value < low:
            raise InputError(f"{what} must be at least {low}, got {value}")
        if not self.solvable:
            raise InputError(f"x² − {self.d}y² = {self.norm} has no solution")
        return value

    def residues(self, m: int) -> tuple[int, int]:
        """``(x mod m, y mod m)`` for the least solution, without expanding a compact one.

        A compact solution is reduced factor by factor modulo ``m`` (any ``m``:
        the primes it shares with 2 and the factors' denominators ``p``-adically,
        :meth:`CompactRepresentation.coordinates_modulo`).

        >>> pell(61).residues(1000)
        (49, 980)
        """
        m = self._argument(m, "m", 2, "the modulus")
        if self.x is not None and self.y is not None:
            return self.x % m, self.y % m
        assert self.compact is not None and self._unit is not None
        # x + y√d = s·(u + v√D)/2 with D = k²d (s = 2 for N = ±4): x = su/2, y = skv/2
        u, v = self.compact.coordinates_modulo(2 * m)
        scale = 1 if abs(self.norm) == 1 else 2
        k = isqrt(self.compact.discriminant // self.d)
        X, Y = scale * u % (2 * m), scale * k * v % (2 * m)
        if X % 2 or Y % 2:
            raise ArithmeticError("internal check failed: the solution is not integral")
        return X // 2, Y // 2

    def leading_digits(self, count: int) -> tuple[str, str] | None:
        """The first ``count`` decimal digits of ``x`` and of ``y``, from the regulator.

        ``x = s(η + N/η)/2`` and ``y = s(η − N/η)/(2√d)`` with ``η = e^R``
        (``s = 2`` for ``N = ±4``, else 1), evaluated with ``R``'s rigorous
        error bound; ``None`` when that bound leaves a digit undecided even
        with extra precision.

        >>> pell(61).leading_digits(4)
        ('1766', '2261')
        """
        count = self._argument(count, "count", 1, "the number of leading digits")
        if self.x is not None and self.y is not None:
            return to_decimal(self.x)[:count], to_decimal(self.y)[:count]
        assert self._unit is not None
        k = 2 if self.norm > 0 and self._unit.norm == -1 else 1
        eta_norm = self._unit.norm**k
        for extra in (count + 20, 2 * count + 60):
            reg = self._unit.precise_regulator(extra)
            magnitude = max(1, int(float(reg.value) * k)).bit_length() // 3 + 1
            with mpmath.workdps(magnitude + extra + 20):
                R, error = reg.value * k, reg.error_bound * k  # exact: k is 1 or 2
                half = mpmath.log10(mpmath.mpf(1 if abs(self.norm) == 1 else 2) / 2)
                base = half + R / mpmath.log(10)
                tail = mpmath.exp(-2 * R)
                x_log = base + mpmath.log10(1 + eta_norm * tail)
                y_log = base + mpmath.log10(1 - eta_norm * tail) - mpmath.log10(self.d) / 2
                spread = error / mpmath.log(10) + mpmath.mpf(10) ** (-(extra + 5))
                x_digits = _leading(x_log, spread, count, extra - 10)
                y_digits = _leading(y_log, spread, count, extra - 10)
            if x_digits is not None and y_digits is not None:
                return x_digits, y_digits
        return None

    def compact_file(self) -> str:
        """The least solution in compact form as plain text (format in ``docs/pell.md``).

        ``x + y√d = scale · sign · ∏_chains (∏_factors ((a + b√d)/c)^e)^power``,
        one ``chain POWER`` line per chain followed by its ``factor A B C E``
        lines, with ``scale`` 2 for ``N = ±4`` (else 1); ``#`` starts a comment.
        """
        if self.compact is None:
            raise InputError("the solution is not in compact form (it is written out in full)")
        scale = 1 if abs(self.norm) == 1 else 2
        return self.compact.to_text(self.d, scale, "least solution of x^2 - d*y^2 = n")

    def solutions(self) -> Iterator[tuple[int, int]]:
        """Iterate over the positive solutions in increasing order."""
        if self._unit is None:
            yield from (s for s in self.finite_solutions or [] if s[1] > 0)
            return
        eps = self._base()
        step = eps if self._unit.norm == 1 else eps * eps
        current = eps if self.norm < 0 else step
        while True:
            yield self._coords(current)
            current = current * step


def _square_case(d: int, N: int) -> PellSolution:
    s = isqrt(d)
    reason = (
        f"d = {shown(d)} = {shown(s)}² is a perfect square, so x² − dy² = (x − {shown(s)}y)(x + {shown(s)}y) "
        f"= {signed(N)} has only finitely many solutions"
    )
    return _finite_case(
        d, N, square_solutions(s, N), "factorisation of the norm (square d)", reason
    )


def _definite_case(d: int, N: int) -> PellSolution:
    reason = (
        f"d = {shown(d)} < 0, so x² − dy² = x² + {shown(-d)}y² is positive definite and "
        f"= {signed(N)} has only finitely many solutions"
    )
    method = "square roots of d mod |N| and reduction of positive definite forms"
    return _finite_case(d, N, definite_solutions(d, N), method, reason)


def _finite_case(d: int, N: int, solutions: list[Point], method: str, reason: str) -> PellSolution:
    """The answer when there are finitely many solutions: those with ``x, y ≥ 0``, least ``y > 0`` first."""
    ordered = sorted(
        {(x, y) for x, y in solutions if x >= 0 and y >= 0}, key=lambda t: (t[1], t[0])
    )
    positive = [t for t in ordered if t[1] > 0]
    best = positive[0] if positive else (ordered[0] if ordered else None)
    return PellSolution(
        d=d,
        norm=N,
        solvable=bool(ordered),
        x=best[0] if best else None,
        y=best[1] if best else None,
        period_length=None,
        method=method,
        reason=f"{reason}: {len(ordered)} with x, y ≥ 0",
        finite_solutions=ordered,
    )


def pell_discriminant(d: int, N: int) -> int:
    """Discriminant of the order whose units give the solutions of ``x² − dy² = N``."""
    if abs(N) == 1:
        return 4 * d
    return d if d % 4 in (0, 1) else 4 * d


def pell(d: int, norm: int = 1, max_period: int = DEFAULT_MAX_PERIOD) -> PellSolution:
    """Solve ``x² − d y² = norm`` for ``norm ∈ {1, −1, 4, −4}`` and integer ``d > 0``."""
    d = as_integer(d, "d")
    N = as_integer(norm, "norm")
    if N not in PELL_NORMS:
        raise InputError(f"norm must be one of 1, -1, 4, -4, got {N}")
    if d == 0:
        raise InputError("d must not be 0 (x² = N holds for every y)")
    if d < 0:
        return _definite_case(d, N)
    if is_square(d):
        return _square_case(d, N)
    D = pell_discriminant(d, N)
    try:
        unit = fundamental_unit(Order(D), "cfrac", max_period=max_period)
    except TooLargeError:
        check_reach(D)  # beyond the infrastructure too: say so, naming the size
        if not compiled_table(D):
            raise TooLargeError(
                f"x² − {shown(d)}y² = {signed(N)}: the continued fraction would need "
                f"{about(estimated_period(D, 2_000))} steps (limit {max_period:,}), and the "
                "infrastructure's giant steps run compiled only for D < 2¹⁰⁶ (here in pure "
                "Python, minutes to hours); `realquad unit --disc "
                f"{shown(D)}` runs that search if you can wait"
            ) from None
        unit = fundamental_unit(Order(D), "bsgs")  # refuses, naming the size, beyond its reach
    solvable = N > 0 or unit.norm == -1
    result = PellSolution(
        d=d,
        norm=N,
        solvable=solvable,
        x=None,
        y=None,
        period_length=unit.period_length,
        method=unit.method,
        proof=unit.proof,
        _unit=unit,
    )
    if not solvable:
        period = "" if unit.period_length is None else f" (even period {unit.period_length:,})"
        result.reason = (
            f"the fundamental unit of discriminant {shown(unit.order.discriminant)} has norm +1"
            f"{period}, so no unit has norm −1"
        )
        return result
    if unit.compact() is not None:
        _count_digits(result, unit)
        if result.digits is not None and result.digits > MAX_EXPANDED_DIGITS:
            return result
    result.x, result.y = result.solution(1)
    result.compact = None
    return result


def _leading(
    log10_value: mpmath.mpf, spread: mpmath.mpf, count: int, exact_below: int = 0
) -> str | None:
    """The first ``count`` digits of the integer ``10^v``, the same for every ``v`` within ``spread`` of ``log10_value``.

    An integer of at most ``max(count, exact_below)`` digits is the nearest
    integer to ``10^v`` (``exact_below`` below the working precision: no
    boundary case); a longer one starts with ``⌊10^{v − e + count − 1}⌋`` (``e = ⌊v⌋``).
    ``None`` when the two ends of the interval disagree.
    """
    ends = []
    for v in (log10_value - spread, log10_value + spread):
        exponent = int(mpmath.floor(v))
        if exponent < max(count, exact_below):
            ends.append((exponent, int(mpmath.nint(mpmath.power(10, v)))))
        else:
            ends.append((exponent, int(mpmath.floor(mpmath.power(10, v - exponent + count - 1)))))
    if ends[0] != ends[1]:
        return None
    return str(ends[0][1])[:count]


#: Largest solution expanded from a compact representation (decimal digits of x).
MAX_EXPANDED_DIGITS = 1_000_000


def _count_digits(result: PellSolution, unit: Unit) -> None:
    """The least solution in compact form, and the digits of ``x`` from the regulator.

    The least solution is ``η = ε`` or ``ε²`` (``ε²`` when ``N > 0`` and
    ``N(ε) = −1``), and ``x = s·(η + N(η)/η)/2`` with ``s = 1`` for ``N = ±1``,
    ``2`` for ``N = ±4``.
    """
    eps = unit.compact()
    assert eps is not None
    k = 2 if result.norm > 0 and unit.norm == -1 else 1
    result.compact = eps if k == 1 else eps.power(2)
    reg = unit.precise_regulator()
    with mpmath.workdps(reg.digits + 30):  # doubling R must not round it to 53 bits
        value, error = reg.value * k, reg.error_bound * k
    regulator = Regulator(value, reg.digits, error, reg.method, reg.proof)
    scale = 1 if abs(result.norm) == 1 else 2
    digits = trace_digits(regulator, unit.norm**k, Fraction(scale, 2))
    result.digits_exact = digits is not None
    if digits is None:
        with mpmath.workdps(40):
            digits = int(mpmath.floor(regulator.value / mpmath.log(10))) + 1
    result.digits = digits
