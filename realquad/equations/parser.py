"""Quadratic equations in ``x`` and ``y`` written the way people write them.

Accepted: integers, ``x`` and ``y``, ``+ - * / ^ **``, parentheses, implicit
multiplication (``3x``, ``5xy``, ``2(x + 1)``), Unicode superscripts
(``x²``), the Unicode minus ``−`` and the multiplication signs ``·`` and ``×``,
terms on both sides of ``=`` (a missing ``=`` means ``= 0``). Division is by
non-zero constants only; the equation is then multiplied through by the
common denominator. The result is ``(a, b, c, d, e, f)`` with
``a x² + b xy + c y² + d x + e y + f = 0``.

>>> parse_equation("x^2 - 13y^2 = -4")
(1, 0, -13, 0, 0, 4)
>>> parse_equation("3x² + 5xy − 7y² = 11")
(3, 5, -7, 0, 0, -11)
>>> parse_equation("x^2 - 2y^2 + 3x - 5y = 7")
(1, 0, -2, 3, -5, -7)
>>> parse_equation("(x + 1)(y + 1) = 0")
(0, 1, 0, 1, 1, 1)
>>> parse_equation("x^2/2 = y")
(1, 0, 0, 0, -2, 0)
>>> parse_equation("x^2 - 13y^^2 = -4")
Traceback (most recent call last):
...
realquad.errors.InputError: cannot read the equation at position 11 ('^2 = -4'): expected a non-negative integer exponent
"""

from __future__ import annotations

from fractions import Fraction
from math import lcm

from realquad.core.tokens import TokenCursor
from realquad.errors import InputError

#: Longest equation text accepted.
MAX_LENGTH = 10_000
#: Longest integer literal (decimal digits).
MAX_DIGITS = 4000
#: Largest exponent.
MAX_EXPONENT = 64
#: Deepest nesting of parentheses.
MAX_NESTING = 100

_SUPERSCRIPTS = {"⁰": 0, "¹": 1, "²": 2, "³": 3, "⁴": 4, "⁵": 5, "⁶": 6, "⁷": 7, "⁸": 8, "⁹": 9}
_ALIASES = {"−": "-", "–": "-", "·": "*", "×": "*", "⋅": "*", "X": "x", "Y": "y"}

Poly = dict[tuple[int, int], Fraction]


class _Parser(TokenCursor):
    def __init__(self, text: str) -> None:
        super().__init__(text)
        self._tokenize()

    # -- tokens ---------------------------------------------------------------
    def _tokenize(self) -> None:
        t, i, n = self.text, 0, len(self.text)
        while i < n:
            ch = _ALIASES.get(t[i], t[i])
            if ch.isspace():
                i += 1
            elif ch.isascii() and ch.isdigit():
                j = i
                while j < n and t[j].isascii() and t[j].isdigit():
                    j += 1
                if j - i > MAX_DIGITS:
                    raise self._error(i, f"an integer of at most {MAX_DIGITS} digits")
                self.tokens.append(("num", t[i:j], i))
                i = j
            elif ch in _SUPERSCRIPTS:
                j = i
                while j < n and t[j] in _SUPERSCRIPTS:
                    j += 1
                self.tokens.append(("sup", t[i:j], i))
                i = j
            elif ch == "*" and i + 1 < n and _ALIASES.get(t[i + 1], t[i + 1]) == "*":
                self.tokens.append(("op", "^", i))
                i += 2
            elif ch in "xy":
                self.tokens.append(("var", ch, i))
                i += 1
            elif ch in "+-*/^()=":
                self.tokens.append(("op", ch, i))
                i += 1
            else:
                raise self._error(i, "a number, x, y or one of + - * / ^ ( ) =")

    def _error(self, pos: int, what: str) -> InputError:
        rest = self.text[pos : pos + 12]
        shown = f" ({rest!r})" if rest else " (the end)"
        return InputError(f"cannot read the equation at position {pos + 1}{shown}: expected {what}")

    def fail(self, what: str) -> InputError:
        return self._error(self.peek()[2], what)

    # -- grammar --------------------------------------------------------------
    def equation(self) -> Poly:
        if not self.tokens:
            raise self.fail("an equation")
        left = self.expr()
        if self.is_op("="):
            self.take()
            right = self.expr()
        else:
            right = {}
        if self.peek()[0] != "end":
            what = "an operator or the end" if not self.is_op("=") else "only one '='"
            raise self.fail(what)
        return _add(left, right, -1)

    def expr(self) -> Poly:
        sign = 1
        if self.is_op("+") or self.is_op("-"):
            sign = -1 if self.take()[1] == "-" else 1
        acc = _scale(self.term(), sign)
        while self.is_op("+") or self.is_op("-"):
            s = -1 if self.take()[1] == "-" else 1
            acc = _add(acc, self.term(), s)
        return acc

    def term(self) -> Poly:
        acc = self.power()
        while True:
            kind, tok, _ = self.peek()
            if kind == "op" and tok == "*":
                self.take()
                acc = _mul(acc, self.power())
            elif kind == "op" and tok == "/":
                self.take()
                pos = self.peek()[2]
                divisor = self.power()
                if set(divisor) - {(0, 0)} or not divisor.get((0, 0)):
                    raise self._error(pos, "a non-zero constant divisor")
                acc = _scale(acc, 1 / divisor[(0, 0)])
            elif kind == "var" or (kind == "op" and tok == "("):
                acc = _mul(acc, self.power())  # implicit multiplication
            else:
                return acc

    def power(self) -> Poly:
        if self.is_op("-") or self.is_op("+"):
            sign = -1 if self.take()[1] == "-" else 1
            return _scale(self.power(), sign)
        base = self.atom()
        kind, tok, pos = self.peek()
        if kind == "sup":
            self.take()
            k = int("".join(str(_SUPERSCRIPTS[ch]) for ch in tok))
        elif kind == "op" and tok == "^":
            self.take()
            k = self.exponent()
        else:
            return base
        if k > MAX_EXPONENT:
            raise self._error(pos, f"an exponent of at most {MAX_EXPONENT}")
        out: Poly = {(0, 0): Fraction(1)}
        for _ in range(k):
            out = _mul(out, base)
        return out

    def exponent(self) -> int:
        if self.is_op("("):
            self.take()
            k = self.exponent()
            if not self.is_op(")"):
                raise self.fail("')'")
            self.take()
            return k
        kind, tok, _ = self.peek()
        if kind != "num":
            raise self.fail("a non-negative integer exponent")
        self.take()
        if len(tok) > 3:
            raise self._error(self.tokens[self.i - 1][2], f"an exponent of at most {MAX_EXPONENT}")
        return int(tok)

    def atom(self) -> Poly:
        kind, tok, pos = self.peek()
        if kind == "num":
            self.take()
            return {(0, 0): Fraction(int(tok))}
        if kind == "var":
            self.take()
            return {(1, 0) if tok == "x" else (0, 1): Fraction(1)}
        if kind == "op" and tok == "(":
            self.take()
            self.depth += 1
            if self.depth > MAX_NESTING:
                raise self._error(pos, f"at most {MAX_NESTING} nested parentheses")
            inner = self.expr()
            if not self.is_op(")"):
                raise self.fail("')'")
            self.take()
            self.depth -= 1
            return inner
        raise self.fail("a number, x, y or '('")


def _add(p: Poly, q: Poly, sign: int = 1) -> Poly:
    out = dict(p)
    for k, v in q.items():
        out[k] = out.get(k, Fraction(0)) + sign * v
    return {k: v for k, v in out.items() if v}


def _scale(p: Poly, s: Fraction | int) -> Poly:
    return {k: v * s for k, v in p.items() if v * s}


def _mul(p: Poly, q: Poly) -> Poly:
    out: Poly = {}
    for (i, j), v in p.items():
        for (k, m), w in q.items():
            if i + j + k + m > 2 * MAX_EXPONENT:
                raise InputError("the equation's degree is far above 2")
            key = (i + k, j + m)
            out[key] = out.get(key, Fraction(0)) + v * w
    return {k: v for k, v in out.items() if v}


def parse_equation(text: str) -> tuple[int, int, int, int, int, int]:
    """``(a, b, c, d, e, f)`` of ``a x² + b xy + c y² + d x + e y + f = 0`` from its text."""
    if not isinstance(text, str):
        raise InputError("the equation must be a string")
    if len(text) > MAX_LENGTH:
        raise InputError(f"the equation is longer than {MAX_LENGTH} characters")
    poly = _Parser(text).equation()
    degree = max((i + j for i, j in poly), default=0)
    if degree > 2:
        raise InputError(
            f"the equation has degree {degree}; only equations of degree at most 2 in x and y are solved"
        )
    den = 1
    for v in poly.values():
        den = lcm(den, v.denominator)
    order = [(2, 0), (1, 1), (0, 2), (1, 0), (0, 1), (0, 0)]
    return tuple(int(poly.get(k, Fraction(0)) * den) for k in order)  # type: ignore[return-value]
