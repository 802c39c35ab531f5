"""Parsing of real numbers written as people write them: ``sqrt(61)``, ``(1+sqrt(13))/2``.

>>> parse_real_quadratic("sqrt(61)")
(0, 1, 61, 1)
>>> parse_real_quadratic("(1 + sqrt(13))/2")
(1, 1, 13, 2)
>>> parse_real_quadratic("(3-2*√7)/5")
(3, -2, 7, 5)
>>> parse_real_quadratic("355/113")
Fraction(355, 113)
>>> parse_real_quadratic("61")
(0, 1, 61, 1)
>>> parse_real_quadratic("sqrt(")
Traceback (most recent call last):
...
realquad.errors.InputError: cannot read 'sqrt(' at position 6: expected an integer
"""

from __future__ import annotations

import re
from fractions import Fraction

from realquad.core.integers import is_square, isqrt
from realquad.errors import InputError

_TOKEN = re.compile(r"\s*(?:(\d+)|(sqrt|√)|(.))")
_MAX_LEN = 10_000


class _Reader:
    def __init__(self, text: str) -> None:
        self.text = text
        self.tokens: list[tuple[str, str, int]] = []
        for m in _TOKEN.finditer(text):
            if m.group(1):
                self.tokens.append(("int", m.group(1), m.start(1)))
            elif m.group(2):
                self.tokens.append(("sqrt", m.group(2), m.start(2)))
            elif m.group(3):
                self.tokens.append(("op", m.group(3), m.start(3)))
        self.i = 0

    def peek(self) -> tuple[str, str, int]:
        if self.i < len(self.tokens):
            return self.tokens[self.i]
        return ("end", "", len(self.text))

    def take(self) -> tuple[str, str, int]:
        tok = self.peek()
        self.i += 1
        return tok

    def fail(self, what: str) -> InputError:
        pos = self.peek()[2] + 1
        shown = self.text if len(self.text) <= 60 else self.text[:57] + "..."
        return InputError(f"cannot read {shown!r} at position {pos}: expected {what}")

    def expect(self, value: str) -> None:
        kind, tok, _ = self.peek()
        if kind != "op" or tok != value:
            raise self.fail(f"'{value}'")
        self.take()

    def integer(self) -> int:
        kind, tok, _ = self.peek()
        if kind != "int":
            raise self.fail("an integer")
        self.take()
        return int(tok)


def _term(r: _Reader) -> tuple[int, int, int]:
    """A signed term: integer, sqrt(D), k*sqrt(D) or k√D. Returns (p, k, D)."""
    sign = 1
    while r.peek()[0] == "op" and r.peek()[1] in "+-−":
        if r.take()[1] in "-−":
            sign = -sign
    kind = r.peek()[0]
    if kind == "sqrt":
        r.take()
        return 0, sign, _radicand(r)
    if kind == "int":
        n = r.integer()
        if r.peek()[0] == "op" and r.peek()[1] == "*":
            r.take()
            if r.peek()[0] != "sqrt":
                raise r.fail("sqrt(...)")
        if r.peek()[0] == "sqrt":
            r.take()
            return 0, sign * n, _radicand(r)
        return sign * n, 0, 0
    raise r.fail("an integer or sqrt(...)")


def _radicand(r: _Reader) -> int:
    if r.peek()[0] == "op" and r.peek()[1] == "(":
        r.take()
        n = r.integer()
        r.expect(")")
        return n
    return r.integer()


def _sum(r: _Reader) -> tuple[int, int, int]:
    p, k, D = _term(r)
    while r.peek()[0] == "op" and r.peek()[1] in "+-−":
        p2, k2, D2 = _term(r)
        if k2:
            if k and D2 != D:
                raise InputError("only one square root may appear")
            if k:
                k += k2
            else:
                k, D = k2, D2
        p += p2
    return p, k, D


def parse_real_quadratic(text: str) -> tuple[int, int, int, int] | Fraction:
    """Parse ``(p + k√D)/q`` (returned as ``(p, k, D, q)``) or a rational ``a/b``.

    A bare non-negative integer ``d`` means ``√d``. Perfect squares under the
    root are folded into the rational part.
    """
    if not isinstance(text, str):
        raise InputError("expected a string")
    if len(text) > _MAX_LEN:
        raise InputError(f"expression longer than {_MAX_LEN} characters")
    stripped = text.strip()
    if re.fullmatch(r"\d+", stripped):
        d = int(stripped)
        if is_square(d):
            return Fraction(isqrt(d))
        return (0, 1, d, 1)
    r = _Reader(text)
    if r.peek()[0] == "op" and r.peek()[1] == "(":
        r.take()
        p, k, D = _sum(r)
        r.expect(")")
    else:
        p, k, D = _sum(r)
    q = 1
    if r.peek()[0] == "op" and r.peek()[1] == "/":
        r.take()
        sign = 1
        if r.peek()[0] == "op" and r.peek()[1] in "-−":
            r.take()
            sign = -1
        q = sign * r.integer()
        if q == 0:
            raise InputError("division by zero")
    if r.peek()[0] != "end":
        raise r.fail("end of expression")
    if k and D == 0:
        k = 0
    if k and is_square(D):
        p, k = p + k * isqrt(D), 0
    if k == 0:
        return Fraction(p, q)
    if D < 0:
        raise InputError("square root of a negative number")
    return (p, k, D, q)
