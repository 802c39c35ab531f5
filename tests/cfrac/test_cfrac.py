"""Continued fractions of rationals and quadratic irrationals."""

from __future__ import annotations

import math
from fractions import Fraction

import mpmath
import pytest
from hypothesis import given
from hypothesis import strategies as st

from realquad import continued_fraction, convergents, from_periodic
from realquad.cfrac import QuadraticIrrational
from realquad.cfrac.parser import parse_real_quadratic
from realquad.core.integers import is_square
from realquad.errors import InputError, RealquadError


def test_sqrt_examples_from_textbooks():
    # √61 and √13 (classical examples, from memory; re-derived by the inverse map below)
    assert continued_fraction("sqrt(61)").period == [1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14]
    assert continued_fraction("sqrt(13)").period == [1, 1, 1, 1, 6]
    assert continued_fraction("61").preperiod == [7]
    assert continued_fraction("sqrt(2)").period == [2]
    assert str(continued_fraction("(1+sqrt(5))/2")) == "[(1)]"


def test_period_lengths_oeis_a003285():
    # OEIS A003285: period of the continued fraction of √n (0 for squares), n = 1..30
    a003285 = [
        0,
        1,
        2,
        0,
        1,
        2,
        4,
        2,
        0,
        1,
        2,
        2,
        5,
        4,
        2,
        0,
        1,
        2,
        6,
        2,
        6,
        6,
        4,
        2,
        0,
        1,
        2,
        4,
        5,
        2,
    ]
    for n, length in enumerate(a003285, start=1):
        cf = continued_fraction(f"sqrt({n})")
        assert len(cf.period) == length, n


def test_rationals():
    assert continued_fraction("355/113").preperiod == [3, 7, 16]
    assert continued_fraction("-7/3").preperiod == [-3, 1, 2]
    assert from_periodic([3, 7, 16], []) == Fraction(355, 113)


def _float_value(preperiod: list[int], period: list[int]) -> mpmath.mpf:
    # at least 200 partial quotients: the slowest convergence (all 1s, φ^−2n) gains 10⁻⁴¹ by then
    terms = list(preperiod) + list(period) * -(-200 // max(1, len(period)))
    with mpmath.workdps(50):
        x = mpmath.mpf(terms[-1])
        for a in reversed(terms[:-1]):
            x = a + 1 / x
        return x


@given(
    st.integers(-50, 50),
    st.integers(1, 6),
    st.integers(2, 500),
    st.integers(-40, 40).filter(lambda q: q != 0),
)
def test_expansion_and_inverse_roundtrip(p, k, n, q):
    if is_square(n):
        return
    text = f"({p} + {k}*sqrt({n}))/{q}"
    cf = continued_fraction(text)
    assert cf.period, text
    with mpmath.workdps(50):
        value = (p + k * mpmath.sqrt(n)) / q
        assert abs(_float_value(cf.preperiod, cf.period) - value) < mpmath.mpf(10) ** -30
    back = from_periodic(cf.preperiod, cf.period)
    assert isinstance(back, QuadraticIrrational)
    assert back.same_number(QuadraticIrrational.normalize(p, k, n, q))
    # the first complete quotient of the period is reduced (Galois)
    assert cf.period[-1] >= 1


@given(
    st.lists(st.integers(1, 30), min_size=0, max_size=5),
    st.lists(st.integers(1, 30), min_size=1, max_size=6),
    st.integers(-5, 5),
)
def test_inverse_then_expand(pre, per, a0):
    preperiod = [a0, *pre]
    x = from_periodic(preperiod, per)
    cf = continued_fraction(x)
    # the expansion is the shortest form of the same sequence
    seq1 = list(preperiod) + per * 4
    seq2 = list(cf.preperiod) + cf.period * (len(seq1) + 1)
    assert seq2[: len(seq1)] == seq1


def test_convergents():
    assert list(convergents("sqrt(2)", 5)) == [(1, 1), (3, 2), (7, 5), (17, 12), (41, 29)]
    for p, q in convergents("sqrt(7)", bound=10**6):
        assert abs(p * p - 7 * q * q) < 2 * math.isqrt(7) + 2  # |p² − 7q²| < 2√7 + 1 (Lagrange)
    assert list(convergents("22/7")) == [(3, 1), (22, 7)]


@pytest.mark.parametrize(
    "text,expected",
    [
        ("sqrt(61)", (0, 1, 61, 1)),
        ("√61", (0, 1, 61, 1)),
        ("(1+sqrt(13))/2", (1, 1, 13, 2)),
        ("( 1 - 2*sqrt(7) ) / -3", (-1, 2, 7, 3)),  # the same number, denominator made positive
        ("3+sqrt(2)", (3, 1, 2, 1)),
        ("2sqrt(3)", (0, 2, 3, 1)),
        ("sqrt(9)", Fraction(3)),
        ("((1))", Fraction(1)),
        ("1+2/3", Fraction(5, 3)),  # a + b/c is a + (b/c), not (a + b)/c
        ("1+sqrt(13)/2", (2, 1, 13, 2)),  # 1 + √13/2
        ("sqrt(8) + sqrt(2)", (0, 3, 2, 1)),  # 2√2 + √2
        ("1/(1 + sqrt(2))", (-1, 1, 2, 1)),  # √2 − 1
        ("3 − √5", (3, -1, 5, 1)),  # the Unicode minus
    ],
)
def test_parser(text, expected):
    assert parse_real_quadratic(text) == expected


@pytest.mark.parametrize(
    "text",
    [
        "",
        "sqrt(",
        "(1+sqrt(2)",
        "1//2",
        "sqrt(-3)",
        "x",
        "1/0",
        "sqrt(2)+sqrt(3)",
        "٣/4",
        "-5",
        "1/(sqrt(2)-sqrt(2))",
    ],
)
def test_parser_errors(text):
    with pytest.raises(InputError):
        continued_fraction(text)


@given(st.text(max_size=40))
def test_parser_fuzz(text):
    try:
        continued_fraction(text, max_terms=10_000)
    except RealquadError:
        pass


def test_reducedness():
    assert QuadraticIrrational(0, 61, 1).is_reduced() is False  # √61: conjugate ≈ −7.8
    assert QuadraticIrrational(7, 61, 1).is_reduced() is True  # 7 + √61 ≈ 14.8, conjugate ≈ −0.81
    assert (
        QuadraticIrrational(7, 61, 12).is_reduced() is True
    )  # (7 + √61)/12 ≈ 1.23, conjugate ≈ −0.07
    assert QuadraticIrrational(1, 5, 2).is_reduced() is True


_terms = st.one_of(
    # every term in parentheses: one value each (and never a bare integer, which means √d)
    st.integers(-50, 50).map(lambda n: (f"({n})", Fraction(n), Fraction(0))),
    st.integers(-9, 9).map(lambda k: (f"({k}*sqrt(7))", Fraction(0), Fraction(k))),
    st.integers(-9, 9).map(lambda k: (f"({k}√28/2)", Fraction(0), Fraction(k))),  # √28 = 2√7
)


@given(st.lists(st.tuples(_terms, st.sampled_from(["+", "-", "*", "/"])), min_size=1, max_size=5))
def test_parser_agrees_with_exact_arithmetic(parts):
    """Expressions in integers and √7 against Fraction arithmetic in Q(√7) (an independent evaluator).

    The reference follows Python's precedence: products and quotients first, left to right.
    """
    text = ""
    pieces = []
    for i, ((written, a, b), op) in enumerate(parts):
        text += written
        pieces.append((a, b))
        if i < len(parts) - 1:
            text += f" {op} "
            pieces.append(op)

    def mul(x, y):
        return (x[0] * y[0] + 7 * x[1] * y[1], x[0] * y[1] + x[1] * y[0])

    def inv(x):
        n = x[0] * x[0] - 7 * x[1] * x[1]
        return (x[0] / n, -x[1] / n)

    # reduce the products first (standard precedence), then the sums
    sums: list = [pieces[0]]
    signs = [1]
    try:
        for op, value in zip(pieces[1::2], pieces[2::2], strict=True):
            if op in "*/":
                sums[-1] = mul(sums[-1], value if op == "*" else inv(value))
            else:
                sums.append(value)
                signs.append(1 if op == "+" else -1)
    except ZeroDivisionError:
        with pytest.raises(InputError):
            parse_real_quadratic(text)
        return
    a = sum((s * v[0] for s, v in zip(signs, sums, strict=True)), Fraction(0))
    b = sum((s * v[1] for s, v in zip(signs, sums, strict=True)), Fraction(0))
    got = parse_real_quadratic(text)
    if b == 0:
        assert got == a
    else:
        p, k, D, q = got
        assert D == 7 and Fraction(p, q) == a and Fraction(k, q) == b
