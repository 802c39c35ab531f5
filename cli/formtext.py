"""Forms on the command line: read as people write them, written back as polynomials.

A form is ``ax² + bxy + cy²`` with integer coefficients, written as a
polynomial in x and y (``"2x^2 + 2xy + 3y^2"``, ``"x² − 79y²"``) or as its
coefficients ``(a, b, c)``, ``[a, b, c]`` or ``a,b,c``.

>>> read_form("2x^2 + 2xy + 3y^2"), read_form("(3, 7, -2)"), read_form("1,0,−79")
(Form(2, 2, 3), Form(3, 7, -2), Form(1, 0, -79))
>>> polynomial(Form(3, 7, -2))
'3x² + 7xy − 2y²'
"""

from __future__ import annotations

import re

from realquad.core.forms import Form
from realquad.core.integers import as_integer
from realquad.equations.parser import parse_equation
from realquad.errors import InputError
from realquad.textio import terms_text

#: ``(a, b, c)``, ``[a, b, c]`` or ``a, b, c``: three comma-separated parts, brackets optional.
_TRIPLE = re.compile(r"\s*[(\[]?([^,()\[\]]*),([^,()\[\]]*),([^,()\[\]]*)[)\]]?\s*")


def read_form(text: str) -> Form:
    """The form ``ax² + bxy + cy²`` written as a polynomial (integer coefficients, no ``=``) or ``(a, b, c)``.

    >>> read_form("x^2 + 5y^2"), read_form("2x² + 2xy + 3y²"), read_form("x^2 - 79 y^2")
    (Form(1, 0, 5), Form(2, 2, 3), Form(1, 0, -79))
    """
    if "," in text:
        triple = _TRIPLE.fullmatch(text)
        if triple is None:
            raise InputError(
                f"write a form as its coefficients (a, b, c) or as a polynomial such as "
                f'"2x^2 + 2xy + 3y^2", got {text[:40]!r}'
            )
        a, b, c = (as_integer(part, name) for part, name in zip(triple.groups(), "abc"))
        return Form(a, b, c)
    if "=" in text:
        raise InputError('write the form alone, without "=" (e.g. "x^2 + 5y^2")')
    a, b, c, d, e, f = parse_equation(text)
    scale = f - parse_equation(text + " = 1")[5]  # the common denominator the parser cleared
    if scale != 1:
        raise InputError(f"the form {text!r} must have integer coefficients")
    if d or e or f:
        raise InputError(
            f"{text!r} is not a binary quadratic form ax² + bxy + cy²: it has terms of degree "
            "below 2"
        )
    if not (a or b or c):
        raise InputError(f"{text!r} is the zero form")
    return Form(a, b, c)


def polynomial(F: Form) -> str:
    """``ax² + bxy + cy²`` written out (one minus sign ``−``)."""
    return terms_text([(F.a, "x²"), (F.b, "xy"), (F.c, "y²")])
