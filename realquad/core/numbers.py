"""Exact elements ``(x + y√d)/c`` of a quadratic field (real for ``d > 1``, imaginary for ``d < 0``).

Arithmetic is exact (integers only); sign and comparison are decided without
floating point, using ``x + y√d > 0  ⇔`` a comparison of ``x²`` with ``d y²``.
Sign, order and ``log_abs`` belong to real fields: for ``d < 0`` they raise
:class:`~realquad.errors.DomainError`, while arithmetic, norm and trace work
as for ``d > 1``.

>>> e = QuadraticNumber(1, 1, 1, 2)      # 1 + √2
>>> e.norm()
Fraction(-1, 1)
>>> e * e
QuadraticNumber(3, 2, 1, 2)
>>> (e ** -1)
QuadraticNumber(-1, 1, 1, 2)
>>> str(QuadraticNumber(1, 1, 2, 5))
'(1 + √5)/2'
>>> e.log_abs(20)
'0.88137358701954302523'
>>> z = QuadraticNumber(1, 1, 2, -3)     # a primitive sixth root of unity in Q(√−3)
>>> str(z), z**3, z.norm()
('(1 + √−3)/2', QuadraticNumber(-1, 0, 1, -3), Fraction(1, 1))
"""

from __future__ import annotations

from fractions import Fraction
from functools import total_ordering
from typing import Any

import gmpy2
import mpmath

from realquad.core.results import JSONObject
from realquad.errors import DomainError, InputError
from realquad.latex import MAX_DIGITS, Display, brief, surd
from realquad.textio import signed, terms_text, to_decimal

Rational = int | Fraction


def _sign_of(x: int, y: int, d: int) -> int:
    """Exact sign of x + y√d for d > 0 not a square."""
    if y == 0:
        return (x > 0) - (x < 0)
    if x == 0:
        return 1 if y > 0 else -1
    if (x > 0) == (y > 0):
        return 1 if x > 0 else -1
    # opposite signs: compare x² with d y²
    bigger_x = x * x > d * y * y
    return (1 if x > 0 else -1) if bigger_x else (1 if y > 0 else -1)


@total_ordering
class QuadraticNumber(Display):
    """The number ``(x + y√d)/c`` with integers ``x, y``, ``c > 0`` and ``d > 1`` or ``d < 0``.

    Stored in lowest terms (``gcd(x, y, c) = 1``). ``d`` need not be
    squarefree, but must not be a perfect square.
    """

    __slots__ = ("x", "y", "c", "d")

    def __init__(self, x: int, y: int, c: int = 1, d: int = 2) -> None:
        if c == 0:
            raise ZeroDivisionError("denominator is zero")
        if d in (0, 1) or (d > 0 and gmpy2.is_square(d)):
            raise DomainError(f"√{d} is not a quadratic irrationality")
        x, y, c = gmpy2.mpz(x), gmpy2.mpz(y), gmpy2.mpz(c)
        if c < 0:
            x, y, c = -x, -y, -c
        # gcd with the (usually tiny) denominator first: gcd(x, y) of two huge
        # numbers would cost far more than the rest of a unit computation.
        g = gmpy2.gcd(c, x)
        if g != 1:
            g = gmpy2.gcd(g, y)
        if g != 1:
            x, y, c = x // g, y // g, c // g
        self.x, self.y, self.c, self.d = x, y, c, int(d)

    # -- construction -------------------------------------------------------
    @classmethod
    def rational(cls, q: Rational, d: int) -> QuadraticNumber:
        q = Fraction(q)
        return cls(q.numerator, 0, q.denominator, d)

    def _coerce(self, other: object) -> QuadraticNumber | None:
        if isinstance(other, QuadraticNumber):
            if other.d != self.d:
                raise DomainError(f"cannot combine elements of Q(√{self.d}) and Q(√{other.d})")
            return other
        if isinstance(other, Fraction):
            return QuadraticNumber.rational(other, self.d)
        if isinstance(other, int) or type(other).__name__ == "mpz":
            return QuadraticNumber.rational(int(other), self.d)  # type: ignore[call-overload]
        return None

    # -- arithmetic ---------------------------------------------------------
    def __add__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return QuadraticNumber(
            self.x * o.c + o.x * self.c, self.y * o.c + o.y * self.c, self.c * o.c, self.d
        )

    __radd__ = __add__

    def __neg__(self) -> QuadraticNumber:
        return QuadraticNumber(-self.x, -self.y, self.c, self.d)

    def __sub__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return self + (-o)

    def __rsub__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return o - self

    def __mul__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return QuadraticNumber(
            self.x * o.x + self.d * self.y * o.y,
            self.x * o.y + self.y * o.x,
            self.c * o.c,
            self.d,
        )

    __rmul__ = __mul__

    def inverse(self) -> QuadraticNumber:
        """``1/self``; raises ``ZeroDivisionError`` for zero."""
        n = self.x * self.x - self.d * self.y * self.y  # c² · norm
        if n == 0:
            raise ZeroDivisionError("inverse of zero")
        # 1/((x+y√d)/c) = c (x − y√d) / (x² − d y²)
        return QuadraticNumber(self.c * self.x, -self.c * self.y, n, self.d)

    def __truediv__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return self * o.inverse()

    def __rtruediv__(self, other: object) -> QuadraticNumber:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return o * self.inverse()

    def __pow__(self, k: int) -> QuadraticNumber:
        if not isinstance(k, int):
            raise InputError("exponent must be an integer")
        if k < 0:
            return self.inverse() ** (-k)
        if k == 1:
            return self
        # binary powering on the numerator, the denominator separately
        rx, ry = gmpy2.mpz(1), gmpy2.mpz(0)
        bx, by = self.x, self.y
        d = self.d
        e = k
        while e:
            if e & 1:
                rx, ry = rx * bx + d * ry * by, rx * by + ry * bx
            e >>= 1
            if e:
                bx, by = bx * bx + d * by * by, 2 * bx * by
        return QuadraticNumber(rx, ry, self.c**k, d)

    # -- invariants ----------------------------------------------------------
    def conjugate(self) -> QuadraticNumber:
        return QuadraticNumber(self.x, -self.y, self.c, self.d)

    def norm(self) -> Fraction:
        return Fraction(int(self.x * self.x - self.d * self.y * self.y), int(self.c * self.c))

    def trace(self) -> Fraction:
        return Fraction(int(2 * self.x), int(self.c))

    def is_integral(self) -> bool:
        """Whether the number is an algebraic integer."""
        return self.trace().denominator == 1 and self.norm().denominator == 1

    def _require_real(self, what: str) -> None:
        if self.d < 0:
            raise DomainError(
                f"{what} is defined in real quadratic fields only, not in Q(√{self.d})"
            )

    def sign(self) -> int:
        self._require_real("the sign")
        return _sign_of(int(self.x), int(self.y), self.d)

    def __eq__(self, other: object) -> bool:
        try:
            o = self._coerce(other)
        except DomainError:
            return False
        if o is None:
            return NotImplemented
        return (self.x, self.y, self.c) == (o.x, o.y, o.c)

    def __hash__(self) -> int:
        return hash((int(self.x), int(self.y), int(self.c), self.d))

    def __lt__(self, other: object) -> bool:
        o = self._coerce(other)
        if o is None:
            return NotImplemented
        return (self - o).sign() < 0

    def __bool__(self) -> bool:
        return self.x != 0 or self.y != 0

    def log_abs(self, digits: int = 30) -> str:
        """``log |self|`` as a decimal string with ``digits`` significant digits.

        Works for numbers of any size: only the leading bits of ``x`` and
        ``y`` enter the floating-point evaluation, with enough guard bits.
        """
        if not self:
            raise DomainError("log of zero")
        self._require_real("log |x + y√d|")
        return mpmath.nstr(self.log_abs_mpf(digits), digits, strip_zeros=False)

    def log_abs_mpf(self, digits: int = 30) -> mpmath.mpf:
        self._require_real("log |x + y√d|")
        prec = int(digits * 3.33) + 64
        with mpmath.workprec(prec):
            # For cancelling x, y√d (tiny conjugate-type numbers) use the norm.
            x, y = self.x, self.y
            if x != 0 and y != 0 and (x > 0) != (y > 0):
                n = x * x - self.d * y * y
                return (
                    mpmath.log(abs(mpmath.mpf(n)))
                    - _log_abs_sum(-x, -y, self.d, prec)
                    - mpmath.log(mpmath.mpf(self.c))
                )
            return _log_abs_sum(x, y, self.d, prec) - mpmath.log(mpmath.mpf(self.c))

    # -- display -------------------------------------------------------------
    def to_dict(self) -> JSONObject:
        """The JSON shape of ``(x + y√radicand)/denominator`` (``docs/json.md``, *Number*).

        >>> QuadraticNumber(1, 1, 2, 5).to_dict()
        {'x': 1, 'y': 1, 'denominator': 2, 'radicand': 5}
        """
        return {"x": int(self.x), "y": int(self.y), "denominator": int(self.c), "radicand": self.d}

    def __repr__(self) -> str:
        """``QuadraticNumber(x, y, c, d)``; integers of more than 60 digits by their ends and length."""
        return "QuadraticNumber(" + ", ".join(map(brief, (self.x, self.y, self.c, self.d))) + ")"

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """``(x + y√d)/c`` in LaTeX, integers beyond ``max_digits`` digits summarised.

        >>> QuadraticNumber(1, 1, 2, 5).to_latex(), QuadraticNumber(0, 1, 1, -1).to_latex()
        ('\\\\frac{1 + \\\\sqrt{5}}{2}', '\\\\sqrt{-1}')
        """
        return surd(int(self.x), int(self.y), int(self.c), self.d, max_digits)

    def __str__(self) -> str:
        """``(x + y√d)/c`` in the house style (minus sign ``−``), exact at any size.

        >>> str(QuadraticNumber(-1, 1, 2, 5)), str(QuadraticNumber(1, 1, 2, -3))
        ('(−1 + √5)/2', '(1 + √−3)/2')
        """
        root = f"√{signed(self.d)}"
        body = terms_text([(int(self.x), ""), (int(self.y), root)])
        return body if self.c == 1 else f"({body})/{to_decimal(self.c)}"


def _log_abs_sum(x: Any, y: Any, d: int, prec: int) -> mpmath.mpf:
    """log |x + y√d| for x, y of equal sign (no cancellation), at ``prec`` bits."""
    x, y = abs(gmpy2.mpz(x)), abs(gmpy2.mpz(y))
    shift = max(0, max(x.bit_length(), y.bit_length()) - prec - 16)
    xs = mpmath.mpf(int(x >> shift))
    ys = mpmath.mpf(int(y >> shift))
    val = xs + ys * mpmath.sqrt(d)
    return mpmath.log(val) + shift * mpmath.log(2)


Pair = tuple[Any, Any]


def pair_multiply(a: Pair, b: Pair, d: int, den: int = 1) -> Pair:
    """``(a₀ + a₁√d)(b₀ + b₁√d)/den`` on coordinate pairs (exact when ``den`` divides both parts).

    For hot loops that do not need :class:`QuadraticNumber`'s normalisation.

    >>> pair_multiply((3, 2), (3, 2), 2)        # (3 + 2√2)² = 17 + 12√2
    (17, 12)
    """
    return ((a[0] * b[0] + d * a[1] * b[1]) // den, (a[0] * b[1] + a[1] * b[0]) // den)


def pair_power(e: Pair, k: int, d: int, den: int = 1) -> Pair:
    """``(G, H)`` with ``((e₀ + e₁√d)/den)^k = (G + H√d)/den`` (``e`` of norm ``den²``, any ``k``).

    >>> pair_power((3, 1), 2, 13, 2), pair_power((3, 2), -1, 2)
    ((11, 3), (3, -2))
    """
    if k < 0:
        e, k = (e[0], -e[1]), -k
    out: Pair = (den, 0)
    base = e
    while k:
        if k & 1:
            out = pair_multiply(out, base, d, den)
        base = pair_multiply(base, base, d, den)
        k >>= 1
    return out
