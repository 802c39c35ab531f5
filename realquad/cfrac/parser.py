"""Parsing of real numbers written as people write them: ``sqrt(61)``, ``(1+sqrt(13))/2``, ``1 + 2/3``.

The text is an arithmetic expression in integers and square roots, read with
the usual precedence (``*`` and ``/`` before ``+`` and ``−``, parentheses,
signs), and evaluated exactly in ``Q(√D)``: at most one square root (up to
rational factors: ``√8`` and ``√2`` are the same root) may appear. A bare
non-negative integer ``d`` means ``√d``. Digits are ASCII ``0``–``9``; the
minus sign may be ``-`` or ``−`` (U+2212); ``√``, ``sqrt(…)`` and implicit
products (``2√7``, ``2sqrt(7)``) are understood.

>>> parse_real_quadratic("sqrt(61)")
(0, 1, 61, 1)
>>> parse_real_quadratic("(1 + sqrt(13))/2")
(1, 1, 13, 2)
>>> parse_real_quadratic("(3-2*√7)/5")
(3, -2, 7, 5)
>>> parse_real_quadratic("1+sqrt(13)/2")               # precedence: 1 + (√13)/2
(2, 1, 13, 2)
>>> parse_real_quadratic("355/113"), parse_real_quadratic("1+2/3")
(Fraction(355, 113), Fraction(5, 3))
>>> parse_real_quadratic("61")
(0, 1, 61, 1)
>>> parse_real_quadratic("sqrt(")
Traceback (most recent call last):
...
realquad.errors.InputError: cannot read 'sqrt(' at position 6: expected an integer, sqrt(...) or '('
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction
from math import lcm

from realquad.core.integers import is_square, isqrt
from realquad.core.primes import square_factor
from realquad.core.tokens import TokenCursor
from realquad.errors import InputError

_TOKEN = re.compile(r"\s*(?:([0-9]+)|(sqrt|√)|(.))")
_MAX_LEN = 10_000
#: Longest integer literal (the numbers are exact; this bounds the work of one expression).
_MAX_DIGITS = 4000
#: Deepest nesting of parentheses.
_MAX_NESTING = 100


@dataclass(frozen=True)
class _Surd:
    """``a + b√D`` with rational ``a``, ``b`` (``D = 0`` when ``b = 0``: a rational)."""

    a: Fraction
    b: Fraction = Fraction(0)
    D: int = 0

    def _common(self, other: _Surd) -> tuple[_Surd, _Surd, int]:
        """Both on one root ``√D`` (``√D₂ = (s/D₁)·√D₁`` when ``D₁D₂ = s²``), or :class:`InputError`."""
        if not self.b or not other.b or self.D == other.D:
            D = self.D or other.D
            return self, other, D
        product = self.D * other.D
        if not is_square(product):
            raise InputError("only one square root may appear (up to rational factors)")
        factor = Fraction(isqrt(product), self.D)
        return self, _Surd(other.a, other.b * factor, self.D), self.D

    def __add__(self, other: _Surd) -> _Surd:
        x, y, D = self._common(other)
        return _Surd(x.a + y.a, x.b + y.b, D).normal()

    def __neg__(self) -> _Surd:
        return _Surd(-self.a, -self.b, self.D)

    def __mul__(self, other: _Surd) -> _Surd:
        x, y, D = self._common(other)
        return _Surd(x.a * y.a + x.b * y.b * D, x.a * y.b + x.b * y.a, D).normal()

    def inverse(self) -> _Surd:
        norm = self.a * self.a - self.b * self.b * self.D
        if norm == 0:
            raise InputError("division by zero")
        return _Surd(self.a / norm, -self.b / norm, self.D).normal()

    def normal(self) -> _Surd:
        return _Surd(self.a) if self.b == 0 else self


def _root(n: int) -> _Surd:
    """``√n = k√s`` for an integer ``n ≥ 0`` (square factors below 10⁴ taken out)."""
    if is_square(n):
        return _Surd(Fraction(isqrt(n)))
    k, s = square_factor(n)
    return _Surd(Fraction(0), Fraction(k), s)


class _Reader(TokenCursor):
    def __init__(self, text: str) -> None:
        super().__init__(text)
        for m in _TOKEN.finditer(text):
            if m.group(1):
                self.tokens.append(("int", m.group(1), m.start(1)))
            elif m.group(2):
                self.tokens.append(("sqrt", m.group(2), m.start(2)))
            elif m.group(3):
                op = "-" if m.group(3) == "−" else m.group(3)
                self.tokens.append(("op", op, m.start(3)))

    def fail(self, what: str) -> InputError:
        pos = self.peek()[2] + 1
        shown = self.text if len(self.text) <= 60 else self.text[:57] + "..."
        return InputError(f"cannot read {shown!r} at position {pos}: expected {what}")

    def integer(self) -> int:
        kind, tok, _ = self.peek()
        if kind != "int":
            raise self.fail("an integer")
        if len(tok) > _MAX_DIGITS:
            raise self.fail(f"an integer of at most {_MAX_DIGITS} digits")
        self.take()
        return int(tok)

    # expr := term (('+' | '-') term)*;  term := factor (('*' | '/' | implicit) factor)*
    # factor := ('+' | '-') factor | atom;  atom := int | sqrt atom | '(' expr ')'
    def expression(self) -> _Surd:
        value = self.term()
        while self.is_op("+", "-"):
            sign = self.take()[1]
            right = self.term()
            value = value + (-right if sign == "-" else right)
        return value

    def term(self) -> _Surd:
        value = self.factor()
        while True:
            if self.is_op("*"):
                self.take()
                value = value * self.factor()
            elif self.is_op("/"):
                self.take()
                value = value * self.factor().inverse()
            elif self.peek()[0] == "sqrt" or self.is_op("("):
                value = value * self.factor()  # implicit product: 2√7, 2sqrt(7), 3(1 + √2)
            else:
                return value

    def factor(self) -> _Surd:
        if self.is_op("+", "-"):
            sign = self.take()[1]
            inner = self.factor()
            return -inner if sign == "-" else inner
        return self.atom()

    def atom(self) -> _Surd:
        kind, _, pos = self.peek()
        if kind == "int":
            return _Surd(Fraction(self.integer()))
        if kind == "sqrt":
            self.take()
            radicand = self.atom()
            if radicand.b or radicand.a.denominator != 1:
                raise self.fail("an integer under the square root")
            if radicand.a < 0:
                raise InputError("square root of a negative number")
            return _root(int(radicand.a))
        if self.is_op("("):
            self.take()
            self.depth += 1
            if self.depth > _MAX_NESTING:
                raise self.fail(f"at most {_MAX_NESTING} nested parentheses")
            value = self.expression()
            if not self.is_op(")"):
                raise self.fail("')'")
            self.take()
            self.depth -= 1
            return value
        raise self.fail("an integer, sqrt(...) or '('")


def parse_real_quadratic(text: str) -> tuple[int, int, int, int] | Fraction:
    """Parse ``(p + k√D)/q`` (returned as ``(p, k, D, q)``, ``q > 0`` least) or a rational.

    A bare non-negative integer ``d`` means ``√d``; a perfect square under the
    root gives a rational.
    """
    if not isinstance(text, str):
        raise InputError("expected a string")
    if len(text) > _MAX_LEN:
        raise InputError(f"expression longer than {_MAX_LEN} characters")
    stripped = text.strip()
    if re.fullmatch(r"[0-9]+", stripped):
        if len(stripped) > _MAX_DIGITS:
            raise InputError(f"d has {len(stripped):,} digits: at most {_MAX_DIGITS:,} are read")
        value = _root(int(stripped))
    elif re.fullmatch(r"[-−][0-9]+", stripped):
        raise InputError(
            f"a bare integer d means √d, which is not real for d = {stripped.replace('−', '-')[:40]} < 0; "
            "write a rational as a fraction, e.g. -5/1"
        )
    else:
        reader = _Reader(text)
        if reader.peek()[0] == "end":
            raise reader.fail("an expression")
        value = reader.expression()
        if reader.peek()[0] != "end":
            raise reader.fail("an operator or the end")
    if not value.b:
        return value.a
    q = lcm(value.a.denominator, value.b.denominator)
    return (int(value.a * q), int(value.b * q), value.D, q)
