"""LaTeX of the package's results, and their display in a notebook.

Every result type writes itself as LaTeX math (``to_latex()``) that can be
pasted into a paper between ``\\[`` and ``\\]``; what the formula cannot
say (the method and the proof) is :meth:`Display.latex_note`. The pieces are
here: integers, with those longer than ``max_digits`` summarised by their
ends and their length as on the terminal (:func:`integer`); surds
(:func:`surd`); forms (:func:`form`); finite abelian groups as products of
cyclic groups (:func:`group`); continued fractions with the period under a bar
(:func:`continued_fraction`); 2×2 matrices (:func:`matrix`); tables
(:func:`table`). The LaTeX needs ``amsmath`` and ``amssymb`` (for
``\\mathbb{Z}``) and nothing else, and is ASCII (Unicode stays in the notes).

>>> surd(1, 1, 2, 5)
'\\\\frac{1 + \\\\sqrt{5}}{2}'
>>> print(group([2, 6]), continued_fraction([4], [1, 3, 1, 8]))
C_{2} \\times C_{6} [4; \\overline{1, 3, 1, 8}]
>>> print(integer(2**200, max_digits=30))
\\underbrace{16069380442589902755\\ldots 02993782792835301376}_{61\\text{ digits}}

:class:`Display` gives a result type ``_repr_latex_`` and ``_repr_html_``
(what a notebook shows) from its ``to_latex()`` and its note.
"""

from __future__ import annotations

import html
import re
from collections.abc import Callable, Iterable, Sequence
from typing import Any

from realquad.textio import integer_summary, summarise_numbers, terms_text, to_decimal

#: The longest integer written in full by default (the command line's ``--max-digits``).
MAX_DIGITS = 1000
#: The most terms (partial quotients, solutions) written in full by default.
MAX_TERMS = 1000
#: Points ``(x, y)`` written on one line; a longer set is named and written over rows.
POINTS_PER_ROW = 6
#: Partial quotients written on one line; a longer expansion is written over rows.
TERMS_PER_ROW = 24
#: The width of a row of displayed maths, in digits (about a page of 10-point type).
ROW_WIDTH = 62
#: The width of a symbol or operator macro with its spaces, in digits (1 when not listed).
_MACRO_WIDTH = {
    "quad": 2, "cdot": 2, "times": 2, "cong": 2, "iff": 4, "implies": 4, "equiv": 2, "in": 2,
    "nmid": 2, "mid": 2, "le": 2, "ge": 2, "pmod": 5, "bmod": 4, "ldots": 2, "log": 3,
}  # fmt: skip
#: Macros that take one group and show it (their own mark aside).
_SHOWN = {"text", "operatorname", "mathrm", "mathbb", "mathcal", "mathfrak", "overline", "bar"}


def integer(n: int, max_digits: int = MAX_DIGITS) -> str:
    """``n`` in full, or beyond ``max_digits`` digits (0: no limit) its ends and its length.

    >>> integer(-1234), integer(10**40 + 1, 25)[-30:]
    ('-1234', '0000000001}_{41\\\\text{ digits}}')
    """
    found = integer_summary(n, max_digits)
    if found is None:
        return to_decimal(n)
    k, leading, trailing = found
    sign = "-" if n < 0 else ""
    return rf"{sign}\underbrace{{{leading}\ldots {trailing}}}_{{{k}\text{{ digits}}}}"


#: Digits a row of a long integer holds, in groups of five.
DIGITS_PER_ROW = 50


def integer_rows(name: str, n: int, max_digits: int = MAX_DIGITS) -> list[str]:
    r"""``name = n`` on one row, or an integer too long for one over rows of fifty digits,
    grouped by five with thin spaces (as tables of long numbers are printed).

    >>> integer_rows("x", 12345)
    ['x = 12345']
    >>> for row in integer_rows("x", 7**100):
    ...     print(row)
    x = 32344\,76509\,62475\,79913\,44647\,76910\,02168\,10857\,20319\,89046
    25400\,93389\,53313\,91691\,45963\,69280\,60001
    """
    text = integer(n, max_digits)
    if width(f"{name} = {text}") <= ROW_WIDTH or r"\underbrace" in text:
        return [f"{name} = {text}"]
    sign, digits = ("-", text[1:]) if text.startswith("-") else ("", text)
    groups = [digits[i : i + 5] for i in range(0, len(digits), 5)]
    step = DIGITS_PER_ROW // 5
    rows = [r"\,".join(groups[i : i + step]) for i in range(0, len(groups), step)]
    return [f"{name} = {sign}{rows[0]}", *rows[1:]]


def terms(pairs: Iterable[tuple[int, str]], max_digits: int = MAX_DIGITS) -> str:
    """``a m₁ + b m₂ + …`` in LaTeX (monomials given as LaTeX; coefficients ±1 left out).

    >>> terms([(1, "x^{2}"), (0, "xy"), (-13, "y^{2}"), (4, "")])
    'x^{2} - 13y^{2} + 4'
    """
    return terms_text(pairs, lambda n: integer(n, max_digits), "-")


def sqrt(d: int, max_digits: int = MAX_DIGITS) -> str:
    r"""``\sqrt{d}`` (``d`` may be negative).

    >>> sqrt(-3)
    '\\sqrt{-3}'
    """
    return rf"\sqrt{{{integer(d, max_digits)}}}"


def fraction(numerator: str, denominator: int, max_digits: int = MAX_DIGITS) -> str:
    r"""``\frac{numerator}{denominator}``, or the numerator alone over 1.

    >>> fraction("x", 1), fraction("x + 1", 3)
    ('x', '\\frac{x + 1}{3}')
    """
    if denominator == 1:
        return numerator
    return rf"\frac{{{numerator}}}{{{integer(denominator, max_digits)}}}"


def surd(x: int, y: int, c: int, d: int, max_digits: int = MAX_DIGITS) -> str:
    """``(x + y√d)/c`` in LaTeX.

    >>> surd(-1, 1, 2, 5), surd(3, -2, 1, 2), surd(7, 0, 2, 2)
    ('\\\\frac{-1 + \\\\sqrt{5}}{2}', '3 - 2\\\\sqrt{2}', '\\\\frac{7}{2}')
    """
    return fraction(terms([(x, ""), (y, sqrt(d, max_digits))], max_digits), c, max_digits)


def parenthesised(body: str) -> str:
    r"""``\left(body\right)``, or ``body`` itself when it is one integer or one letter.

    >>> parenthesised("3"), parenthesised("1 + \\sqrt{2}")
    ('3', '\\left(1 + \\sqrt{2}\\right)')
    """
    if body.isdigit() or (len(body) == 1 and body.isalpha()):
        return body
    return rf"\left({body}\right)"


def form(a: int, b: int, c: int, max_digits: int = MAX_DIGITS) -> str:
    """The form ``ax² + bxy + cy²`` as a polynomial.

    >>> form(3, 7, -2), form(1, 0, 5)
    ('3x^{2} + 7xy - 2y^{2}', 'x^{2} + 5y^{2}')
    """
    return terms([(a, "x^{2}"), (b, "xy"), (c, "y^{2}")], max_digits)


def group(invariants: Sequence[int]) -> str:
    """A finite abelian group from its invariants ``d₁ | d₂ | …``; ``1`` when trivial.

    >>> group([2, 6]), group([])
    ('C_{2} \\\\times C_{6}', '1')
    """
    return r" \times ".join(f"C_{{{integer(d, 0)}}}" for d in invariants) if invariants else "1"


def sequence(items: Sequence[int], max_terms: int, max_digits: int = MAX_DIGITS) -> str:
    r"""``a, b, c`` — the first ``max_terms`` items (0: all), then ``\ldots``.

    >>> sequence([1, 2, 3, 4], 2)
    '1, 2, \\ldots'
    """
    shown = list(items if max_terms == 0 else items[:max_terms])
    text = ", ".join(integer(a, max_digits) for a in shown)
    return text + (r", \ldots" if len(shown) < len(items) else "")


def set_rows(
    name: str,
    cells: Sequence[str],
    per_row: int,
    total: int | None = None,
    brackets: tuple[str, str] = (r"\{", r"\}"),
) -> list[str]:
    r"""``name = \{c_1, c_2, …\}`` over as many rows as it needs, at most ``per_row`` cells
    and :data:`ROW_WIDTH` of width a row.

    ``total`` (when the cells are the first of more) ends the set with ``\ldots`` and the
    count; ``brackets`` ``("(", ")")`` writes a tuple instead.

    >>> set_rows("R", ["1", "5", "9", "13", "21"], 3)
    ['R = \\{1, 5, 9,', '13, 21\\}']
    """
    cells = list(cells)
    if total is not None and total > len(cells):
        cells.append(rf"\ldots\ ({total}\text{{ in all}})")
    rows = pack(cells, ", ", ROW_WIDTH - width(name) - 3, per_row) or [""]
    rows[0] = f"{name} = {brackets[0]}" + rows[0]
    rows[-1] += brackets[1]
    return [row + ("," if i < len(rows) - 1 else "") for i, row in enumerate(rows)]


def named_set(
    name: str,
    items: Sequence[Any],
    write: Callable[[Any], str],
    per_row: int,
    max_terms: int = MAX_TERMS,
) -> tuple[str, list[str]]:
    r"""A set written in place when it fits on a row, else by its ``name`` and :func:`set_rows`.

    Returns ``(what to write in place, the rows that define the name)``; at
    most ``max_terms`` items are written (0: all).

    >>> named_set("S", [(1, 0), (-1, 0)], point, 6)
    ('\\{(1, 0), (-1, 0)\\}', [])
    >>> named_set("S", list(range(5)), str, 3)
    ('S', ['S = \\{0, 1, 2,', '3, 4\\}'])
    """
    if not items:
        return r"\emptyset", []
    shown = list(items if max_terms == 0 else items[:max_terms])
    cells = [write(item) for item in shown]
    if len(cells) <= per_row and len(shown) == len(items):
        return r"\{" + ", ".join(cells) + r"\}", []
    return name, set_rows(name, cells, per_row, len(items))


def continued_fraction(
    preperiod: Sequence[int],
    period: Sequence[int],
    max_terms: int = MAX_TERMS,
    max_digits: int = MAX_DIGITS,
) -> str:
    r"""``[a_0; a_1, …, \overline{a_k, …}]``: the period under a bar, at most ``max_terms`` terms.

    A cut list ends in ``\ldots`` and says its length.

    >>> continued_fraction([3], [1, 2, 1, 6])
    '[3; \\overline{1, 2, 1, 6}]'
    >>> continued_fraction([], [1]), continued_fraction([2, 3], [])
    ('[\\overline{1}]', '[2; 3]')
    >>> continued_fraction([1], list(range(1, 9)), max_terms=4)
    '[1; \\overline{1, 2, 3, \\ldots}]\\quad(\\text{period length } 8)'
    """
    everything = list(preperiod) + list(period)
    budget = len(everything) if max_terms == 0 else min(max_terms, len(everything))
    pre = list(preperiod)[:budget]
    per = list(period)[: budget - len(pre)]
    cut = budget < len(everything)
    if per:
        head = pre[1:] if pre else []
        tail = sequence(per, 0, max_digits) + (r", \ldots" if cut else "")
        inner = ", ".join([*(integer(a, max_digits) for a in head), rf"\overline{{{tail}}}"])
        body = f"[{integer(pre[0], max_digits)}; {inner}]" if pre else f"[{inner}]"
    else:
        rest = sequence(pre[1:], 0, max_digits) + (r", \ldots" if cut else "")
        body = (
            f"[{integer(pre[0], max_digits)}; {rest}]"
            if len(pre) > 1 or cut
            else f"[{integer(pre[0], max_digits)}]"
        )
    if cut:
        what = "period length" if period else "length"
        body += rf"\quad(\text{{{what} }} {len(period) if period else len(preperiod)})"
    return body


def continued_fraction_rows(
    preperiod: Sequence[int],
    period: Sequence[int],
    max_terms: int = MAX_TERMS,
    max_digits: int = MAX_DIGITS,
    per_row: int = TERMS_PER_ROW,
) -> list[str]:
    r"""The expansion on one row when it fits, else its shape in ``a_i`` and the terms over rows.

    >>> continued_fraction_rows([3], [1, 2, 1, 6])
    ['[3; \\overline{1, 2, 1, 6}]']
    >>> for row in continued_fraction_rows([10], [1, 2, 3, 4, 5, 20], per_row=4):
    ...     print(row)
    [a_{0}; \overline{a_{1}, \ldots, a_{6}}]
    (a_{0}, \ldots, a_{6}) = (10, 1, 2, 3,
    4, 5, 20)
    """
    n, m, length = len(preperiod) + len(period), len(preperiod), len(period)
    if n <= per_row:
        return [continued_fraction(preperiod, period, max_terms, max_digits)]

    def a(i: int) -> str:
        return f"a_{{{i}}}"

    head = [a(i) for i in range(m)] if m <= 4 else [a(0), a(1), r"\ldots", a(m - 1)]
    if length:
        bar = [a(i) for i in range(m, m + length)] if length <= 3 else [a(m), r"\ldots", a(n - 1)]
        tail = [rf"\overline{{{', '.join(bar)}}}"]
    else:
        head, tail = [a(0)], [a(1), r"\ldots", a(n - 1)]
    shape = ", ".join([*head[1:], *tail])
    shape = f"[{head[0]}; {shape}]" if head else f"[{shape}]"
    shown = [*preperiod, *period][: max_terms or n]
    cells = [integer(t, max_digits) for t in shown]
    name = rf"({a(0)}, \ldots, {a(n - 1)})"
    return [shape, *set_rows(name, cells, per_row, n, ("(", ")"))]


def matrix(entries: Sequence[int], max_digits: int = MAX_DIGITS) -> str:
    r"""The 2×2 matrix ``(a b; c d)`` from ``(a, b, c, d)``, or a column from ``(x, y)``.

    >>> matrix((3, 4, 2, 3))
    '\\begin{pmatrix} 3 & 4 \\\\ 2 & 3 \\end{pmatrix}'
    >>> matrix((1, -2))
    '\\begin{pmatrix} 1 \\\\ -2 \\end{pmatrix}'
    """
    cells = [integer(v, max_digits) for v in entries]
    rows = [cells[0:2], cells[2:4]] if len(cells) == 4 else [[v] for v in cells]
    return r"\begin{pmatrix} " + r" \\ ".join(" & ".join(r) for r in rows) + r" \end{pmatrix}"


def point(p: Sequence[int], max_digits: int = MAX_DIGITS) -> str:
    """``(x, y)``.

    >>> point((3, -2))
    '(3, -2)'
    """
    return "(" + ", ".join(integer(v, max_digits) for v in p) + ")"


def _group(latex: str, start: int) -> tuple[str, int]:
    """The group ``{…}`` at ``start`` (or the one character there): its inside and the index after."""
    if start >= len(latex):
        return "", start
    if latex[start] != "{":
        return latex[start], start + 1
    depth = 0
    for j in range(start, len(latex)):
        depth += {"{": 1, "}": -1}.get(latex[j], 0)
        if depth == 0:
            return latex[start + 1 : j], j + 1
    return latex[start + 1 :], len(latex)


def width(latex: str) -> float:
    r"""About how wide ``latex`` is when typeset, in digits: a fraction as wide as its wider
    part, a brace's label not counted, exponents smaller, operators with their spaces.

    >>> width("x^{2} + 5y^{2}"), width(r"\frac{1 + \sqrt{5}}{2}"), width(integer(10**80, 30))
    (6.4, 5.0, 42.0)
    """
    total, i = 0.0, 0
    while i < len(latex):
        c = latex[i]
        if c == "\\":
            name = re.match(r"[A-Za-z]*", latex[i + 1 :])[0]  # type: ignore[index]
            i += 1 + max(len(name), 1)
            if name == "frac":
                top, i = _group(latex, i)
                bottom, i = _group(latex, i)
                total += max(width(top), width(bottom))
            elif name == "underbrace":
                inside, i = _group(latex, i)
                total += width(inside)
                i = _group(latex, i + 1)[1]  # the label under the brace
            elif name in _SHOWN or name == "sqrt":
                inside, i = _group(latex, i)
                total += width(inside) + (1 if name == "sqrt" else 0)
            elif name in ("begin", "end"):
                i = _group(latex, i)[1]
            elif name not in ("left", "right"):
                total += _MACRO_WIDTH.get(name, 1)
        elif c in "^_":
            inside, i = _group(latex, i + 1)
            total += 0.7 * width(inside)
        elif c in "{}& ":
            i += 1
        else:
            total += 2 if c in "+-=" else 1
            i += 1
    return round(total, 1)


def pack(
    cells: Sequence[str], separator: str, budget: float = ROW_WIDTH, most: int | None = None
) -> list[str]:
    """The cells joined by ``separator`` into rows of at most ``budget`` digits of width
    (:func:`width`; a cell wider than that has a row of its own) and at most ``most`` cells.

    >>> pack(["1", "2", "3"], ", ", 4), pack(["1", "2", "3"], ", ", most=2)
    (['1, 2', '3'], ['1, 2', '3'])
    """
    rows: list[list[str]] = []
    used = 0.0
    for cell in cells:
        size = width(cell) + width(separator)
        if rows and used + size <= budget and (most is None or len(rows[-1]) < most):
            rows[-1].append(cell)
            used += size
        else:
            rows.append([cell])
            used = size
    return [separator.join(row) for row in rows]


def clauses(parts: Sequence[str], budget: float = ROW_WIDTH) -> list[str]:
    r"""Statements ``a,\quad b,\quad …`` over as few rows as fit ``budget``, a comma ending each
    row that the next continues.

    >>> clauses(["h = 3", "h^{+} = 6"]), clauses(["h = 3", "h^{+} = 6"], 8)
    (['h = 3,\\quad h^{+} = 6'], ['h = 3,', 'h^{+} = 6'])
    """
    rows = pack(parts, ",\\quad ", budget)
    return [row + "," for row in rows[:-1]] + rows[-1:]


def sum_rows(lead: str, summands: str, budget: float = ROW_WIDTH) -> list[str]:
    r"""``lead`` then the sum ``summands`` over rows, broken before a ``+`` or ``-`` between terms.

    >>> sum_rows("H(X) = ", "X^{2} + 3491750X - 5151296875", 20)
    ['H(X) = X^{2} + 3491750X', '- 5151296875']
    """
    cells = re.split(r" (?=[+-] )", summands)
    rows = pack(cells, " ", budget - width(lead))
    return [lead + rows[0], *rows[1:]]


def product(factors: Sequence[str], budget: float = ROW_WIDTH) -> str:
    r"""``f_1 \cdot f_2 \cdot …``, over the rows of an ``aligned`` block when wider than ``budget``.

    >>> product(["a", "b"])
    'a \\cdot b'
    >>> print(product(["a", "b", "c"], 6))
    \begin{aligned}&a \cdot b\\
    &\quad\cdot c\end{aligned}
    """
    rows = pack(factors, " \\cdot ", budget)
    if len(rows) <= 1:
        return rows[0] if rows else "1"
    return r"\begin{aligned}&" + "\\\\\n&\\quad\\cdot ".join(rows) + r"\end{aligned}"


def factor(base: str, exponent: int = 1, max_digits: int = MAX_DIGITS) -> str:
    r"""``base^{e}`` as a factor of a product: a sum in parentheses even to the power 1.

    >>> factor("79 - 4\\sqrt{376}"), factor(r"\frac{1 + \sqrt{5}}{2}"), factor("7", 3)
    ('\\left(79 - 4\\sqrt{376}\\right)', '\\frac{1 + \\sqrt{5}}{2}', '7^{3}')
    """
    if exponent != 1:
        return power(base, exponent, max_digits)
    whole_fraction = base.startswith(r"\frac{") and _group(base, _group(base, 5)[1])[1] == len(base)
    return base if whole_fraction else parenthesised(base)


def power(base: str, exponent: int, max_digits: int = MAX_DIGITS) -> str:
    r"""``base^{e}`` with the base in parentheses when it needs them; the base alone for ``e = 1``.

    >>> power(r"1 + \sqrt{2}", 2), power("x", 1)
    ('\\left(1 + \\sqrt{2}\\right)^{2}', 'x')
    """
    if exponent == 1:
        return base
    return f"{parenthesised(base)}^{{{integer(exponent, max_digits)}}}"


def rational(p: int, q: int, max_digits: int = MAX_DIGITS) -> str:
    r"""``p/q`` as ``\frac{p}{q}`` (the sign in front), an integer when ``q = 1``.

    >>> rational(-7, 3), rational(5, 1)
    ('-\\frac{7}{3}', '5')
    """
    sign = "-" if (p < 0) != (q < 0) and p != 0 else ""
    return sign + fraction(integer(abs(p), max_digits), abs(q), max_digits)


def table(
    align: str, header: Sequence[str], rows: Iterable[Sequence[str]], narrow: bool = False
) -> str:
    r"""A ``tabular`` with ruled header; cells are LaTeX in text mode (``$…$`` for maths).

    ``narrow`` sets it in small type with less space between the columns (a wide table).

    >>> print(table("rr", ["$d$", "$h$"], [["5", "1"]]))
    \begin{tabular}{rr}
    \hline
    $d$ & $h$ \\
    \hline
    5 & 1 \\
    \hline
    \end{tabular}
    """
    body = [" & ".join(row) + r" \\" for row in rows]
    out = [rf"\begin{{tabular}}{{{align}}}", r"\hline", " & ".join(header) + r" \\", r"\hline"]
    text = "\n".join([*out, *body, r"\hline", r"\end{tabular}"])
    return "{\\small\\setlength{\\tabcolsep}{3pt}\n" + text + "}" if narrow else text


def escape(words: str) -> str:
    r"""``words`` with LaTeX's special characters escaped, for text mode.

    >>> escape("50% of {p}")
    '50\\% of \\{p\\}'
    """
    special = {c: "\\" + c for c in "#$%&_{}"}
    special.update({"\\": r"\textbackslash{}", "~": r"\textasciitilde{}", "^": r"\^{}"})
    return "".join(special.get(c, c) for c in words)


def text(words: str) -> str:
    r"""``\text{words}`` with LaTeX's special characters escaped (:func:`escape`).

    The command line's LaTeX keeps to ASCII here; a notebook's MathJax also
    reads Unicode (the notes of :class:`Display`).

    >>> text("50% of {p}")
    '\\text{50\\% of \\{p\\}}'
    """
    return r"\text{" + escape(words) + "}"


def lines(rows: Sequence[str]) -> str:
    r"""One formula per row, centred (``gathered``); a single row as it is.

    >>> lines(["a = 1"]), lines(["a", "b"])
    ('a = 1', '\\begin{gathered}a\\\\\nb\\end{gathered}')
    >>> lines(["a", lines(["b", "c"])]) == lines(["a", "b", "c"])   # one block, not nested
    True
    """
    if len(rows) == 1:
        return rows[0]
    begin, end = r"\begin{gathered}", r"\end{gathered}"
    flat = [
        row[len(begin) : -len(end)]
        if row.startswith(begin) and row.endswith(end) and row.count(begin) == 1
        else row
        for row in rows
    ]
    return begin + "\\\\\n".join(flat) + end


def display(body: str, note: str | None) -> str:
    r"""``body`` as displayed maths ``\[ … \]``, the note after it as a LaTeX comment line.

    >>> print(display("x = 1", "method: demo; proof: unconditional"))
    \[
    x = 1
    \]
    % method: demo; proof: unconditional
    """
    out = "\\[\n" + body + "\n\\]"
    if note:
        out += "\n" + "\n".join("% " + line for line in note.splitlines())
    return out


def brief(value: Any, limit: int = 60) -> str:
    """``repr`` of a field for :func:`brief_repr`: long integers by their ends, long lists cut.

    >>> brief(10**70), brief(list(range(20)), 20)
    ('10000000000000000000…00000000000000000000 (71 digits)', '[0, 1, 2, 3, 4, 5, …20 items]')
    """
    if isinstance(value, bool) or value is None:
        return repr(value)
    if isinstance(value, int) or type(value).__name__ == "mpz":
        return summarise_numbers(to_decimal(value))
    if isinstance(value, (list, tuple)):
        parts: list[str] = []
        for item in value:
            parts.append(brief(item, limit))
            if sum(len(p) + 2 for p in parts) > limit:
                parts[-1] = f"…{len(value)} items"
                break
        body = ", ".join(parts)
        return f"[{body}]" if isinstance(value, list) else f"({body})"
    return summarise_numbers(repr(value) if isinstance(value, str) else str(value))


def brief_repr(name: str, **fields: Any) -> str:
    """``Name(field=value, …)`` that stays short whatever the size of the values.

    >>> brief_repr("PellSolution", d=61, x=10**80, method="continued fraction")
    "PellSolution(d=61, x=10000000000000000000…00000000000000000000 (81 digits), method='continued fraction')"
    """
    return f"{name}(" + ", ".join(f"{k}={brief(v)}" for k, v in fields.items()) + ")"


class Display:
    """``_repr_latex_`` and ``_repr_html_`` for a result type with ``to_latex()``.

    A result type defines ``to_latex(max_digits)``; its note says its
    ``method`` and ``proof`` when it has them (values such as forms have none).

    >>> from realquad.core.forms import Form
    >>> Form(1, 0, 5)._repr_latex_()
    '$$x^{2} + 5y^{2}$$'
    >>> Form(1, 0, 5)._repr_html_()
    '<div class="realquad">$$x^{2} + 5y^{2}$$</div>'
    """

    __slots__ = ()

    def to_latex(self, max_digits: int = MAX_DIGITS) -> str:
        """The LaTeX math of the result (each type gives its own)."""
        raise NotImplementedError(f"{type(self).__name__} does not define to_latex")

    def latex_note(self) -> str | None:
        """``method: …; proof: …`` (``None`` for a value without either)."""
        method, proof = getattr(self, "method", None), getattr(self, "proof", None)
        if method is None or proof is None:
            return None
        return f"method: {method}; proof: {proof}"

    def to_latex_display(self, max_digits: int = MAX_DIGITS) -> str:
        r"""The result as ``\[ … \]`` and its note as a comment line (what ``--latex`` prints)."""
        return display(self.to_latex(max_digits), self.latex_note())

    def _repr_latex_(self) -> str:
        """``$$ … $$`` with the note on a last line (IPython's ``text/latex``)."""
        body = self.to_latex()
        note = self.latex_note()
        if note:
            body = lines([body, text(note)])
        return f"$${body}$$"

    def _repr_html_(self) -> str:
        """The same formula for an HTML renderer that typesets ``$$ … $$``, the note beneath."""
        note = self.latex_note()
        out = f'<div class="realquad">$${html.escape(self.to_latex())}$$'
        if note:
            out += f'<div style="font-size: smaller">{html.escape(note)}</div>'
        return out + "</div>"
