"""Result types for quadratic equations in two integer unknowns.

The integer solutions of a quadratic equation in ``x, y`` are a finite set
plus finitely many *families*, each generated from one point:

* :class:`OrbitFamily` — the orbit ``{T^k(P) : k ∈ Z}`` of a fundamental
  solution ``P`` under an affine automorph ``T(v) = M v + t`` (``det M = 1``,
  hyperbolic), together with the mirrored orbit ``{2C − T^k(P)}`` when
  ``reflection`` is set (``C`` the centre of the conic; for ``x² − dy² = n``
  this is ``±(x, y)``);
* :class:`LineFamily` — the points ``(x₀ + t·dx, y₀ + t·dy)``, ``t ∈ Z``;
* :class:`ParabolaFamily` — the points ``(x(t), y(t))`` for two integer
  polynomials of degree at most two.

:class:`QuadraticSolutions` collects them with the finite solutions and says
how they were found (``method``) and how sure the answer is (``proof``).

>>> T = AffineMap((3, 4, 2, 3))             # multiplication by 3 + 2√2 on (x, y)
>>> fam = OrbitFamily((1, 0), T, (Fraction(0), Fraction(0)), reflection=True)
>>> [fam.solution(k) for k in (-1, 0, 1, 2)]
[(3, -2), (1, 0), (3, 2), (17, 12)]
>>> fam.bounded(20)
[(-1, 0), (1, 0), (-3, -2), (-3, 2), (3, -2), (3, 2), (-17, -12), (-17, 12), (17, -12), (17, 12)]
>>> LineFamily((-1, 0), (0, 1)).bounded(1)
[(-1, -1), (-1, 0), (-1, 1)]
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from fractions import Fraction
from functools import partial
from math import floor

import mpmath

from realquad.core.integers import isqrt
from realquad.core.linalg import matrix_multiply
from realquad.core.results import JSONObject, Proof
from realquad.errors import InputError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation
from realquad.latex import (
    MAX_DIGITS,
    MAX_TERMS,
    POINTS_PER_ROW,
    ROW_WIDTH,
    Display,
    brief_repr,
    integer_rows,
    lines,
    matrix,
    named_set,
    parenthesised,
    point,
    sqrt,
    surd,
    terms,
    text,
    width,
)
from realquad.textio import decimal_digits, terms_text

Point = tuple[int, int]

#: The monomials of ``a x² + b xy + c y² + d x + e y + f``, in the order of the coefficients.
MONOMIALS = ("x²", "xy", "y²", "x", "y", "")


def equation_text(coefficients: Sequence[int]) -> str:
    """``x² − 13y² + 4 = 0`` from ``(1, 0, -13, 0, 0, 4)``.

    >>> equation_text((1, 0, -13, 0, 0, 4)), equation_text((0,) * 6)
    ('x² − 13y² + 4 = 0', '0 = 0')
    """
    return terms_text(zip(coefficients, MONOMIALS, strict=True)) + " = 0"


#: The monomials in LaTeX, in the order of the coefficients.
MONOMIALS_LATEX = ("x^{2}", "xy", "y^{2}", "x", "y", "")

#: Most points :meth:`bounded` will list before refusing.
MAX_LISTED = 1_000_000


@dataclass(frozen=True)
class AffineMap:
    """``v ↦ M v + t`` with ``M = (m11, m12, m21, m22)`` of determinant 1."""

    matrix: tuple[int, int, int, int]
    translation: tuple[int, int] = (0, 0)

    def __call__(self, v: tuple) -> tuple:
        a, b, c, d = self.matrix
        return (
            a * v[0] + b * v[1] + self.translation[0],
            c * v[0] + d * v[1] + self.translation[1],
        )

    def inverse(self) -> AffineMap:
        a, b, c, d = self.matrix
        t1, t2 = self.translation
        return AffineMap((d, -b, -c, a), (-(d * t1 - b * t2), -(-c * t1 + a * t2)))

    def compose(self, other: AffineMap) -> AffineMap:
        """``self ∘ other``."""
        t = self(other.translation)
        return AffineMap(matrix_multiply(self.matrix, other.matrix), (int(t[0]), int(t[1])))

    def to_dict(self) -> JSONObject:
        """The JSON shape of ``v ↦ M v + t`` (``docs/json.md``, *Automorph*)."""
        return {"matrix": list(self.matrix), "translation": list(self.translation)}

    def power(self, k: int) -> AffineMap:
        base = self if k >= 0 else self.inverse()
        k = abs(k)
        out = AffineMap((1, 0, 0, 1))
        while k:
            if k & 1:
                out = out.compose(base)
            base = base.compose(base)
            k >>= 1
        return out


def point_dict(p: tuple[int, int]) -> JSONObject:
    """The JSON shape of a point or a vector of the plane: ``{"x": …, "y": …}``."""
    return {"x": int(p[0]), "y": int(p[1])}


def _sort_key(p: Point) -> tuple[int, int, int]:
    return (max(abs(p[0]), abs(p[1])), p[0], p[1])


def sort_points(points: set[Point] | list[Point]) -> list[Point]:
    """Points sorted by ``max(|x|, |y|)``, then ``x``, then ``y``."""
    return sorted(set(points), key=_sort_key)


def check_bound(B: int) -> int:
    if isinstance(B, bool) or not isinstance(B, int) or B < 0:
        raise InputError(f"the bound must be a non-negative integer, got {B!r}")
    return B


@dataclass(frozen=True)
class OrbitFamily:
    """The orbit of ``fundamental`` under ``automorph`` (and its mirror image through ``center``).

    ``unit`` is ``(t, u, D)`` when the automorph is multiplication by
    ``t + u√D`` on ``x + y√D`` (norm equations), else ``None``.
    """

    fundamental: Point
    automorph: AffineMap
    center: tuple[Fraction, Fraction]
    reflection: bool = False
    unit: tuple[int, int, int] | None = None
    kind: str = field(default="orbit", init=False, repr=False)

    def to_dict(self) -> JSONObject:
        """The JSON shape of an orbit family (``docs/json.md``, *Family*)."""
        t, u, D = self.unit if self.unit is not None else (0, 0, 0)
        return {
            "kind": self.kind,
            "fundamental": point_dict(self.fundamental),
            "automorph": self.automorph.to_dict(),
            "unit": None
            if self.unit is None
            else {"x": t, "y": u, "denominator": 1, "radicand": D},
            "mirrored": self.reflection,
        }

    def to_latex(
        self, max_digits: int = MAX_DIGITS, named_unit: bool = False, index: int | None = None
    ) -> str:
        r"""Every member: ``x + y√D = ±(x₀ + y₀√D)(t + u√D)^k`` for a norm equation, else
        ``(x, y)ᵀ = T^k (x₀, y₀)ᵀ`` (or its mirror image ``2C − T^k(…)``) with the automorph ``T``.

        ``named_unit`` writes the unit as ``ε`` (:meth:`unit_rows` defines it); a fundamental
        solution too long for the row is named ``α`` (``α_index``) and written on rows below.

        >>> T = AffineMap((3, 4, 2, 3))
        >>> print(OrbitFamily((1, 0), T, (Fraction(0), Fraction(0)), True, (3, 2, 2)).to_latex())
        x + y\sqrt{2} = \pm\left(3 + 2\sqrt{2}\right)^{k},\quad k \in \mathbb{Z}
        """
        zero = self.center == (0, 0)
        if self._multiplies() and (zero or not self.reflection):
            assert self.unit is not None
            t, u, D = self.unit
            x0, y0 = self.fundamental
            first = surd(x0, y0, 1, D, max_digits)
            first = "" if first == "1" else parenthesised(first)
            defining: list[str] = []
            if width(first) > ROW_WIDTH // 2:
                alpha = r"\alpha" if index is None else rf"\alpha_{{{index}}}"
                first = alpha
                x, y = (f"{v}_{{{index or 0}}}" for v in "xy")
                defining = [
                    rf"{alpha} = {x} + {y}{sqrt(D, max_digits)}",
                    *integer_rows(x, x0, max_digits),
                    *integer_rows(y, y0, max_digits),
                ]
            sign = r"\pm" if self.reflection else ""
            unit = r"\varepsilon" if named_unit else parenthesised(surd(t, u, 1, D, max_digits))
            every = (
                rf"x + y{sqrt(D, max_digits)} = {sign}{first}{unit}^{{k}},\quad k \in \mathbb{{Z}}"
            )
            return lines([every, *defining])
        start = matrix(self.fundamental, max_digits)
        orbit = rf"T^{{k}}{start}"
        if self.reflection:
            twice = (int(2 * self.center[0]), int(2 * self.center[1]))
            mirror = "" if zero else matrix(twice, max_digits) + " "
            orbit += rf"\ {text('or')}\ {mirror}-T^{{k}}{start}"
        M, shift = self.automorph.matrix, self.automorph.translation
        T = rf"T(v) = {matrix(M, max_digits)}v"
        if shift != (0, 0):
            T += f" + {matrix(shift, max_digits)}"
        return rf"\begin{{pmatrix}} x \\ y \end{{pmatrix}} = {orbit},\quad k \in \mathbb{{Z}},\quad {T}"

    def unit_rows(self, max_digits: int = MAX_DIGITS) -> list[str]:
        r"""``ε = t + u√D``, its coordinates on rows of their own when they are long.

        >>> T = AffineMap((3, 4, 2, 3))
        >>> OrbitFamily((1, 0), T, (Fraction(0), Fraction(0)), True, (3, 2, 2)).unit_rows()
        ['\\varepsilon = 3 + 2\\sqrt{2}']
        """
        assert self.unit is not None
        t, u, D = self.unit
        row = rf"\varepsilon = {surd(t, u, 1, D, max_digits)}"
        if width(row) <= ROW_WIDTH:
            return [row]
        shape = rf"\varepsilon = t + u{sqrt(D, max_digits)}"
        return [shape, *integer_rows("t", t, max_digits), *integer_rows("u", u, max_digits)]

    def _multiplies(self) -> bool:
        """Whether the automorph is multiplication by ``t + u√D`` on ``x + y√D`` (``unit``)."""
        if self.unit is None:
            return False
        t, u, D = self.unit
        return self.automorph == AffineMap((t, u * D, u, t))

    def mirror(self, v: Point) -> Point:
        """``2C − v``, the point reflection through the centre."""
        return (int(2 * self.center[0] - v[0]), int(2 * self.center[1] - v[1]))

    def solution(self, k: int, reflected: bool = False) -> Point:
        """``T^k(P)`` (or its mirror image), for any integer ``k``."""
        if isinstance(k, bool) or not isinstance(k, int):
            raise InputError("k must be an integer")
        if reflected and not self.reflection:
            raise InputError("this family has no mirrored half")
        p = self.automorph.power(k)(self.fundamental)
        v = (int(p[0]), int(p[1]))
        return self.mirror(v) if reflected else v

    def _walk(self, start: Point, step: AffineMap, B: int, out: set[Point]) -> None:
        # |y − y_c| along an orbit is A λ^k + B' λ^−k in absolute value: unimodal in k.
        # Once it exceeds B + |y_c| while not decreasing, every later point is outside.
        yc = Fraction(self.center[1])
        num, den = yc.numerator, yc.denominator  # work with den·(y − y_c), in integers
        limit = den * B + abs(num)
        (a, b, c, d), (t1, t2) = step.matrix, step.translation
        x, y = start
        prev = None
        count = 0
        while True:
            g = abs(den * y - num)
            if -B <= x <= B and -B <= y <= B:
                out.add((x, y))
                count += 1
                if count > MAX_LISTED:
                    raise TooLargeError(f"more than {MAX_LISTED:,} solutions in the box")
            if prev is not None and g > limit and g >= prev:
                return
            prev = g
            x, y = a * x + b * y + t1, c * x + d * y + t2

    def bounded(self, B: int) -> list[Point]:
        """Every member with ``|x|, |y| ≤ B``, sorted (generated from the orbit, no box scan)."""
        B = check_bound(B)
        out: set[Point] = set()
        starts = [self.fundamental]
        if self.reflection:
            starts.append(self.mirror(self.fundamental))
        for s in starts:
            self._walk(s, self.automorph, B, out)
            self._walk(s, self.automorph.inverse(), B, out)
        return sort_points(out)


def _interval(lo: Fraction, hi: Fraction, x0: int, dx: int, B: int) -> tuple[Fraction, Fraction]:
    if dx == 0:
        return (lo, hi) if abs(x0) <= B else (Fraction(1), Fraction(0))
    a, b = Fraction(-B - x0, dx), Fraction(B - x0, dx)
    if a > b:
        a, b = b, a
    return max(lo, a), min(hi, b)


@dataclass(frozen=True)
class LineFamily:
    """The integer points ``(x₀ + t·dx, y₀ + t·dy)``, ``t ∈ Z``."""

    point: Point
    direction: Point
    kind: str = field(default="line", init=False, repr=False)

    @property
    def fundamental(self) -> Point:
        return self.point

    def to_dict(self) -> JSONObject:
        """The JSON shape of a line family (``docs/json.md``, *Family*)."""
        return {
            "kind": self.kind,
            "fundamental": point_dict(self.point),
            "direction": point_dict(self.direction),
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``(x, y) = (x₀ + t·dx, y₀ + t·dy)``, ``t ∈ Z``.

        >>> print(LineFamily((-1, 0), (0, 1)).to_latex())
        (x, y) = (-1, t),\quad t \in \mathbb{Z}
        """
        x = terms([(self.direction[0], "t"), (self.point[0], "")], max_digits)
        y = terms([(self.direction[1], "t"), (self.point[1], "")], max_digits)
        return rf"(x, y) = ({x}, {y}),\quad t \in \mathbb{{Z}}"

    def solution(self, k: int) -> Point:
        return (self.point[0] + k * self.direction[0], self.point[1] + k * self.direction[1])

    def bounded(self, B: int) -> list[Point]:
        B = check_bound(B)
        big = Fraction(10) ** 9999
        lo, hi = _interval(-big, big, self.point[0], self.direction[0], B)
        lo, hi = _interval(lo, hi, self.point[1], self.direction[1], B)
        if lo > hi:
            return []
        t0, t1 = -floor(-lo), floor(hi)
        if t1 - t0 + 1 > MAX_LISTED:
            raise TooLargeError(
                f"{t1 - t0 + 1} points of a line lie in the box (limit {MAX_LISTED:,})"
            )
        return sort_points([self.solution(t) for t in range(t0, t1 + 1)])


@dataclass(frozen=True)
class ParabolaFamily:
    """The points ``(x(t), y(t))``, ``t ∈ Z``, with ``x(t) = x₂t² + x₁t + x₀`` (likewise ``y``)."""

    x_polynomial: tuple[int, int, int]
    y_polynomial: tuple[int, int, int]
    kind: str = field(default="parabola", init=False, repr=False)

    @property
    def fundamental(self) -> Point:
        return self.solution(0)

    def to_dict(self) -> JSONObject:
        """The JSON shape of a parabola family (``docs/json.md``, *Family*)."""
        return {
            "kind": self.kind,
            "fundamental": point_dict(self.fundamental),
            "x_polynomial": list(self.x_polynomial),
            "y_polynomial": list(self.y_polynomial),
        }

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        r"""``(x, y) = (x(t), y(t))``, ``t ∈ Z``.

        >>> print(ParabolaFamily((1, 0, 0), (0, 2, 1)).to_latex())
        (x, y) = (t^{2}, 2t + 1),\quad t \in \mathbb{Z}
        """
        x, y = (
            terms(zip(p, ("t^{2}", "t", ""), strict=True), max_digits)
            for p in (self.x_polynomial, self.y_polynomial)
        )
        return rf"(x, y) = ({x}, {y}),\quad t \in \mathbb{{Z}}"

    def solution(self, k: int) -> Point:
        x2, x1, x0 = self.x_polynomial
        y2, y1, y0 = self.y_polynomial
        return (x2 * k * k + x1 * k + x0, y2 * k * k + y1 * k + y0)

    def bounded(self, B: int) -> list[Point]:
        B = check_bound(B)
        c2, c1, c0 = self.x_polynomial if self.x_polynomial[0] else self.y_polynomial
        if c2 == 0:  # pragma: no cover - constructed only with a quadratic coordinate
            raise InputError("not a parabola")
        # |c2 t² + c1 t + c0| ≤ B forces |t| ≤ T
        T = (abs(c1) + isqrt(c1 * c1 + 4 * abs(c2) * (B + abs(c0))) + 1) // (2 * abs(c2)) + 1
        if 2 * T + 1 > 4 * MAX_LISTED:
            raise TooLargeError(
                f"about {2 * T + 1} points of a parabola lie in the box (limit {MAX_LISTED:,})"
            )
        pts = (self.solution(t) for t in range(-T, T + 1))
        return sort_points([p for p in pts if abs(p[0]) <= B and abs(p[1]) <= B])


#: Most digits of a member of a compact family that :meth:`CompactOrbitFamily.solution` writes out.
MAX_MEMBER_DIGITS = 1_000_000

#: Working precision (decimal digits after the point) of a compact family's logarithms.
_LOG_DIGITS = 40


def expand_point(number: CompactRepresentation, a: int = 1, b: int = 0) -> Point:
    """``(x, y)`` with ``number = ax + y(b + √D)/2`` (``D`` its discriminant; for ``a = 1``,
    ``b = 0`` and ``D = 4d``: ``number = x + y√d``).

    >>> from realquad.core.numbers import QuadraticNumber
    >>> three = CompactRepresentation.from_factors(52, [], QuadraticNumber(3, 1, 1, 52), 43)
    >>> expand_point(three), expand_point(three, 1, 2)   # 3 + √52 = 3 + 2√13 = 1 + 2·(2 + √52)/2
    ((3, 2), (1, 2))
    """
    u, v = number.expand()  # number = (u + v√D)/2
    x, r = divmod(u - b * v, 2 * a)
    if r:
        raise ArithmeticError("internal check failed: the number is not in [a, (b + √D)/2]")
    return x, v


@dataclass(frozen=True)
class CompactOrbitFamily:
    """The class ``{±α·εᵏ : k ∈ Z}`` of solutions of ``x² − d y² = n`` with ``α`` and ``ε`` in compact form.

    For a form, ``a x² + bxy + cy² = n`` (``a > 0``), the same with ``α = ax +
    y(b + √D)/2`` of norm ``a·n`` and ``ε`` the least unit of norm +1 of the
    order of discriminant ``D = b² − 4ac`` (fields ``a``, ``b``; then ``d = D``).

    ``generator`` is Nagell's fundamental solution ``α = x + y√d`` (the member
    with the least ``|y|``, then ``|x|``, then ``y ≥ 0``, ``x ≥ 0``), ``unit``
    the least unit ``ε = t + u√d > 1`` of norm +1 of ``Z[√d]``, both compact
    over the discriminant ``4d``; ``fundamental`` is ``(x, y)`` written out
    when it has at most ``expanded_digits`` digits, else ``None``.
    ``log_generator`` and ``log_unit`` are ``log |α|`` and ``log ε`` to
    :data:`_LOG_DIGITS` digits after the point: they place every member
    without expanding it (``|α εᵏ| = e^{log|α| + k log ε}``, and its conjugate
    is ``n`` divided by it).
    """

    d: int
    n: int
    generator: CompactRepresentation
    unit: CompactRepresentation
    log_generator: mpmath.mpf
    log_unit: mpmath.mpf
    fundamental: Point | None
    a: int = 1
    b: int = 0
    kind: str = field(default="compact_orbit", init=False, repr=False)

    @property
    def reflection(self) -> bool:
        """``−(x, y)`` belongs to the family with ``(x, y)``."""
        return True

    def _logs(self, k: int) -> tuple[mpmath.mpf, mpmath.mpf]:
        """``(log |α εᵏ|, log |(α εᵏ)'|)``."""
        with mpmath.workdps(_LOG_DIGITS + len(str(abs(k))) + len(str(int(self.log_unit))) + 10):
            big = self.log_generator + k * self.log_unit
            return big, mpmath.log(self.generator.absolute_norm) - big

    def digits(self, k: int = 0) -> int:
        """How many decimal digits ``x`` of the member ``α εᵏ`` has: exactly for a fundamental
        solution written out or when its logarithm decides it (:meth:`digits_exact`), else
        about (±1)."""
        return self._x_digits(k)[0]

    def digits_exact(self, k: int = 0) -> bool:
        """Whether :meth:`digits` is exact for the member ``α εᵏ``."""
        return self._x_digits(k)[1]

    def _x_digits(self, k: int) -> tuple[int, bool]:
        """``(digits of x, exact)`` for the member ``β = α εᵏ``.

        With ``x = c₁β + c₂β' + c₀`` (:meth:`_linear_form`; for ``β = ax + y(b +
        √D)/2``, ``2a√D·x = β(√D − b) + β'(√D + b)``), when ``|β| > |β'|``,
        ``log|x| = log|β| + log|c₁| + log(1 + ρ)`` with ``|ρ| ≤ (|β'/β|·|c₂| +
        |c₀/β|)/|c₁|`` (the other way round when ``|β'| > |β|``), and
        ``|log(1 + ρ)| ≤ 2|ρ|`` for ``|ρ| ≤ 1/2``. The
        count ``⌊log₁₀|x|⌋ + 1`` is exact when the interval of ``log₁₀|x|`` holds
        no integer; else the member is written out when it is small enough.
        """
        if k == 0 and self.fundamental is not None:
            return decimal_digits(self.fundamental[0]), True
        big, small = self._logs(k)
        with mpmath.workdps(_LOG_DIGITS + len(str(int(abs(big)))) + 20):
            c1, c2, c0 = self._linear_form()
            if big >= small:
                top, near, far = big, c1, c2
            else:
                top, near, far = small, c2, c1
            rho = (mpmath.exp(-abs(big - small)) * abs(far) + abs(c0) * mpmath.exp(-top)) / abs(
                near
            )
            error = (1 + abs(k)) * mpmath.mpf(10) ** (-_LOG_DIGITS) + 2 * rho
            value = (top + mpmath.log(abs(near))) / mpmath.log(10)
            low, high = value - error / mpmath.log(10), value + error / mpmath.log(10)
            estimate = max(1, int(mpmath.floor(value)) + 1)
            if rho <= 0.5 and mpmath.floor(low) == mpmath.floor(high):
                return estimate, True
        if estimate <= MAX_MEMBER_DIGITS:
            return decimal_digits(self._point(self.member(k))[0]), True
        return estimate, False

    def _linear_form(self) -> tuple[mpmath.mpf, mpmath.mpf, mpmath.mpf]:
        """``(c₁, c₂, c₀)`` with ``x = c₁β + c₂β' + c₀`` for a member ``β`` (at the working
        precision): ``2a√D·x = β(√D − b) + β'(√D + b)``."""
        a, b = self.a, self.b
        D = 4 * self.d if (a, b) == (1, 0) else self.d
        root = mpmath.sqrt(D)
        return (root - b) / (2 * a * root), (root + b) / (2 * a * root), mpmath.mpf(0)

    def _point(self, member: CompactRepresentation) -> Point:
        """``(x, y)`` of a member, written out."""
        return expand_point(member, self.a, self.b)

    def unit_digits(self) -> int:
        """How many decimal digits ``t`` of the unit has, ``ε = t + u√d`` (for a form,
        ``(t + u√D)/2``): ``t = (ε + ε⁻¹)/2`` (for a form ``ε + ε⁻¹``), so ``log t = log ε −
        log 2 + log(1 + ε⁻²)`` (without ``log 2``); exact unless ``log₁₀ t`` is within the
        error of its logarithm of an integer (:meth:`unit_digits_exact`)."""
        return self._t_digits()[0]

    def unit_digits_exact(self) -> bool:
        """Whether :meth:`unit_digits` is exact."""
        return self._t_digits()[1]

    def _t_digits(self) -> tuple[int, bool]:
        with mpmath.workdps(_LOG_DIGITS + len(str(int(self.log_unit))) + 20):
            correction = mpmath.exp(-2 * self.log_unit)  # log(1 + ε⁻²) ∈ [0, ε⁻²]
            half = mpmath.log(2) if (self.a, self.b) == (1, 0) else 0
            value = (self.log_unit - half + correction / 2) / mpmath.log(10)
            error = (mpmath.mpf(10) ** (-_LOG_DIGITS) + correction) / mpmath.log(10)
            exact = mpmath.floor(value - error) == mpmath.floor(value + error)
            return max(1, int(mpmath.floor(value)) + 1), bool(exact)

    def member(self, k: int) -> CompactRepresentation:
        """``α εᵏ`` in compact form."""
        return self.generator if k == 0 else self.generator * self.unit.power(k)

    def solution(self, k: int) -> Point:
        """``(x, y)`` of ``α εᵏ``; refused beyond :data:`MAX_MEMBER_DIGITS` digits."""
        if isinstance(k, bool) or not isinstance(k, int):
            raise InputError("k must be an integer")
        if k == 0 and self.fundamental is not None:
            return self.fundamental
        size = self.digits(k)
        if size > MAX_MEMBER_DIGITS:
            raise TooLargeError(
                f"member k = {k} of the family has about {size:,} digits, more than "
                f"{MAX_MEMBER_DIGITS:,}; it stays in compact form"
            )
        return self._point(self.member(k))

    def residues(self, m: int) -> Point:
        """``(x mod m, y mod m)`` for the fundamental solution, from the compact form (any
        ``m``: :meth:`CompactRepresentation.coordinates_modulo`)."""
        if self.fundamental is not None:
            return self.fundamental[0] % m, self.fundamental[1] % m
        # α = (u + v√D)/2 = a·x + y(b + √D)/2: y = v and x = (u − bv)/(2a)
        M = 2 * abs(self.a) * m
        u, v = self.generator.coordinates_modulo(M)
        X = (u - self.b * v) % M
        if X % (2 * abs(self.a)):
            raise ArithmeticError("internal check failed: the solution is not integral")
        return X // (2 * self.a) % m, v % m

    def bounded(self, B: int) -> list[Point]:
        """Every member with ``|x|, |y| ≤ B``, sorted; only members that can lie in the box are expanded.

        ``|y| = |β − β'|/√D ≥ (e^L − e^{L'})/√D`` for ``β = ±α εᵏ`` with
        ``L ≥ L'`` its larger log and ``e^{L'} ≤ √|N(α)|``, so a member with
        ``e^L > B√D + √|N(α)|`` lies outside; ``L`` grows with ``|k|`` on
        either side of ``k = 0`` (the fundamental solution is balanced).
        """
        B = check_bound(B)
        with mpmath.workdps(_LOG_DIGITS + 20):
            D, norm = self.generator.discriminant, self.generator.absolute_norm
            limit = mpmath.log(B * mpmath.sqrt(D) + isqrt(norm) + 2)
        out: set[Point] = set()
        for step in (1, -1):
            k = 0 if step == 1 else -1
            while max(self._logs(k)) <= limit:
                x, y = self.solution(k)
                for p in ((x, y), (-x, -y)):
                    if abs(p[0]) <= B and abs(p[1]) <= B:
                        out.add(p)
                if len(out) > MAX_LISTED:
                    raise TooLargeError(f"more than {MAX_LISTED:,} solutions in the box")
                k += step
        return sort_points(out)

    def to_latex(self, max_digits: int = MAX_DIGITS, with_unit: bool = True) -> str:
        r"""``x + y√d = ±α εᵏ``, ``α`` written out when it is, else in compact form; ``ε`` compact
        (left to the caller with ``with_unit=False``, when families share it)."""
        a, b = self.a, self.b  # α = ax + y(b + √D)/2 = (2ax + by + y√D)/2 for a form
        if self.fundamental is not None and (a, b) == (1, 0):
            alpha = parenthesised(surd(*self.fundamental, 1, self.d, max_digits))
            alpha = "" if alpha == "1" else alpha  # the class of the units themselves
        elif self.fundamental is not None:
            x0, y0 = self.fundamental
            alpha = parenthesised(surd(2 * a * x0 + b * y0, y0, 2, self.d, max_digits))
        else:
            alpha = r"\alpha"
        if (a, b) == (1, 0):
            lhs = rf"x + y{sqrt(self.d, max_digits)}"
        else:
            lhs = rf"{a}x + y\frac{{{b} + {sqrt(self.d, max_digits)}}}{{2}}"
        every = rf"{lhs} = \pm{alpha}\varepsilon^{{k}},\quad k \in \mathbb{{Z}}"
        rows = [every]
        if self.fundamental is None:
            rows.append(rf"\alpha = {self.generator.to_latex(max_digits)}")
        if with_unit:
            rows.append(rf"\varepsilon = {self.unit.to_latex(max_digits)}")
        return lines(rows)

    def to_dict(self) -> JSONObject:
        """The JSON shape of a compact family (``docs/json.md``, *Family*)."""
        return {
            "kind": self.kind,
            "fundamental": None if self.fundamental is None else point_dict(self.fundamental),
            "digits": self.digits(),
            "digits_exact": self.digits_exact(),
            "compact": self.generator.to_dict(),
            "unit_compact": self.unit.to_dict(),
            "unit_digits": self.unit_digits(),
            "unit_digits_exact": self.unit_digits_exact(),
            "mirrored": True,
        }


Family = OrbitFamily | LineFamily | ParabolaFamily | CompactOrbitFamily


@dataclass(repr=False)
class QuadraticSolutions(Display):
    """All integer solutions of ``a x² + b xy + c y² + d x + e y + f = 0``.

    ``coefficients`` is ``(a, b, c, d, e, f)``; ``solutions`` lists the
    solutions outside every family (all of them when ``finite``), sorted.
    """

    coefficients: tuple[int, int, int, int, int, int]
    finite: bool
    families: list[Family]
    solutions: list[Point]
    method: str
    proof: Proof = "unconditional"
    notes: list[str] = field(default_factory=list)

    def bounded(self, B: int) -> list[Point]:
        """Every solution with ``|x|, |y| ≤ B``, sorted by ``max(|x|, |y|)``, then ``x``, ``y``."""
        B = check_bound(B)
        out = {p for p in self.solutions if abs(p[0]) <= B and abs(p[1]) <= B}
        for fam in self.families:
            out.update(fam.bounded(B))
        return sort_points(out)

    def to_dict(self, bound: int | None = None) -> JSONObject:
        """The JSON shape of the solutions (``docs/json.md``, *QuadraticSolutions*).

        ``solutions`` lists every solution with ``|x|, |y| ≤ bound`` when a
        bound is given, all of them when they are finitely many, else ``None``.

        >>> s = QuadraticSolutions((1, 0, 1, 0, 0, -25), True, [], [(-5, 0), (5, 0)], "demo")
        >>> s.to_dict()["equation"]
        {'coefficients': {'a': 1, 'b': 0, 'c': 1, 'd': 0, 'e': 0, 'f': -25}, 'text': 'x² + y² − 25 = 0'}
        """
        listed = (
            self.bounded(bound) if bound is not None else (self.solutions if self.finite else None)
        )
        return {
            "equation": {
                "coefficients": dict(zip("abcdef", self.coefficients, strict=True)),
                "text": equation_text(self.coefficients),
            },
            "finite": self.finite,
            "families": [family.to_dict() for family in self.families],
            "solutions": None if listed is None else [point_dict(p) for p in listed],
            "bound": bound,
            "notes": list(self.notes),
            "method": self.method,
            "proof": self.proof,
        }

    def __repr__(self) -> str:
        return brief_repr(
            type(self).__name__,
            equation=self.equation_text(),
            finite=self.finite,
            families=len(self.families),
            solutions=self.solutions,
            method=self.method,
            proof=self.proof,
        )

    def latex_note(self) -> str | None:
        """The method and proof, then the notes, one a line."""
        return "\n".join([super().latex_note() or "", *(f"note: {n}" for n in self.notes)])

    def equation_text(self) -> str:
        """The equation as text: ``ax² + bxy + cy² + dx + ey + f = 0`` (:func:`equation_text`)."""
        return equation_text(self.coefficients)

    def equation_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """The equation in LaTeX: ``ax² + bxy + cy² + dx + ey + f = 0``."""
        return terms(zip(self.coefficients, MONOMIALS_LATEX, strict=True), max_digits) + " = 0"

    def to_latex(self, max_digits: int = MAX_DIGITS, max_terms: int = MAX_TERMS) -> str:
        r"""The equation and its solutions: each family on a line, then the other solutions.

        At most ``max_terms`` single solutions are written (0: all).

        >>> s = QuadraticSolutions((1, 0, 1, 0, 0, -25), True, [], [(-5, 0), (5, 0)], "demo")
        >>> print(s.to_latex())
        x^{2} + y^{2} - 25 = 0:\quad (x, y) \in \{(-5, 0), (5, 0)\}
        >>> print(QuadraticSolutions((1, 0, 1, 0, 0, -25), True, [], [(-5, 0), (-4, -3), (-4, 3),
        ...     (-3, -4), (-3, 4), (0, -5), (0, 5), (3, -4)], "demo").to_latex())
        \begin{gathered}x^{2} + y^{2} - 25 = 0:\quad (x, y) \in S\\
        S = \{(-5, 0), (-4, -3), (-4, 3), (-3, -4), (-3, 4), (0, -5),\\
        (0, 5), (3, -4)\}\end{gathered}
        """
        first = self.equation_latex(max_digits)
        if self.finite and not self.solutions:
            return rf"{first}\quad {text('has no integer solution')}"
        write = partial(point, max_digits=max_digits)
        S, defining = named_set("S", self.solutions, write, POINTS_PER_ROW, max_terms)
        if self.finite:
            return lines([rf"{first}:\quad (x, y) \in {S}", *defining])
        rows = [first + ":", *self._family_rows(max_digits)]
        if self.solutions:
            rows += [rf"{text('and')}\ (x, y) \in {S}", *defining]
        return lines(rows)

    def _family_rows(self, max_digits: int) -> list[str]:
        """One row per family; a unit that families share, once after them all (always in
        compact form, and when written out if it would make a row too wide)."""
        compact = [f for f in self.families if isinstance(f, CompactOrbitFamily)]
        shared = len(compact) > 1 and all(f.unit == compact[0].unit for f in compact)
        orbits = [f for f in self.families if isinstance(f, OrbitFamily) and f._multiplies()]
        named = (
            bool(orbits)
            and all(f.unit == orbits[0].unit for f in orbits)
            and any(width(f.to_latex(max_digits)) > ROW_WIDTH for f in orbits)
        )
        rows = []
        for i, f in enumerate(self.families, 1):
            if shared and isinstance(f, CompactOrbitFamily):
                rows.append(f.to_latex(max_digits, with_unit=False))
            elif isinstance(f, OrbitFamily):
                rows.append(f.to_latex(max_digits, named and f in orbits, index=i))
            else:
                rows.append(f.to_latex(max_digits))
        if shared:
            rows.append(rf"\varepsilon = {compact[0].unit.to_latex(max_digits)}")
        if named:
            rows += orbits[0].unit_rows(max_digits)
        return rows

    def satisfies(self, x: int, y: int) -> bool:
        a, b, c, d, e, f = self.coefficients
        return a * x * x + b * x * y + c * y * y + d * x + e * y + f == 0
