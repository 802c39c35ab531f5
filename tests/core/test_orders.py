"""Discriminants, Kronecker symbols, factoring and exact quadratic numbers."""

from __future__ import annotations

import math
from fractions import Fraction

import mpmath
import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st

from realquad import Order, QuadraticNumber, field, kronecker
from realquad.core.integers import as_integer
from realquad.core.primes import factorize, squarefree_decomposition
from realquad.errors import InputError
from realquad.textio import decimal_digits


@given(st.integers(-(10**6), 10**6), st.integers(1, 10**4))
def test_kronecker_against_sympy(a, n):
    # sympy's jacobi_symbol for odd n (reference library); Kronecker extends it multiplicatively
    if n % 2:
        assert kronecker(a, n) == sympy.jacobi_symbol(a, n)


def test_kronecker_at_two():
    # (D/2) for D ≡ 1 (mod 8) is 1, for D ≡ 5 (mod 8) is −1, 0 for even D (Cohen 1993, Def. 1.4.8)
    assert [kronecker(D, 2) for D in (17, 5, 8, 12)] == [1, -1, 0, 0]


@given(st.integers(1, 10**15))
def test_factorize_against_sympy(n):
    assert factorize(n) == {int(p): int(e) for p, e in sympy.factorint(n).items()}


def test_squarefree_decomposition():
    for n in range(1, 3000):
        s, f = squarefree_decomposition(n)
        assert s * f * f == n and all(e == 1 for e in sympy.factorint(s).values())


@given(st.integers(5, 10**12))
def test_order_decomposition(D):
    if D % 4 not in (0, 1) or math.isqrt(D) ** 2 == D:
        return
    O = Order(D)
    D0, f = O.fundamental_discriminant, O.conductor
    assert D0 * f * f == D
    assert D0 % 4 == 1 or (D0 % 16 in (8, 12))
    d = O.radicand
    assert all(e == 1 for e in sympy.factorint(d).values())
    assert field(d) == Order(D0)


def test_as_integer():
    assert as_integer("  42 ") == 42 and as_integer("-7") == -7 and as_integer(10**30) == 10**30
    assert as_integer("1" * 4000) == int("1" * 4000)
    with pytest.raises(InputError, match="5,000 digits"):
        as_integer("1" * 5000)
    assert as_integer("1" * 5000, max_digits=6000) == int("1" * 4000) * 10**1000 + int("1" * 1000)
    for bad in ("", "1e3", "0x10", "--1", "1.0", None, 2.0, "١٢"):
        with pytest.raises(InputError):
            as_integer(bad)


@given(
    st.integers(-1000, 1000),
    st.integers(-1000, 1000),
    st.integers(1, 50),
    st.sampled_from([2, 3, 5, 13, 61, 94]),
)
def test_quadratic_number_field_laws(x, y, c, d):
    a = QuadraticNumber(x, y, c, d)
    b = QuadraticNumber(y + 1, x, c + 1, d)
    assert (a * b).norm() == a.norm() * b.norm()
    assert (a + b).trace() == a.trace() + b.trace()
    assert a.conjugate().conjugate() == a
    if a:
        assert a * a.inverse() == 1
        assert (a / b) * b == a if b else True
    # exact sign against high-precision evaluation
    with mpmath.workdps(60):
        value = (x + y * mpmath.sqrt(d)) / c
        expected = (value > 0) - (value < 0)
    assert a.sign() == expected
    assert (a < b) == ((a - b).sign() < 0)


def test_powers_and_log():
    e = QuadraticNumber(1, 1, 2, 5)  # golden ratio
    assert e**10 == QuadraticNumber(123, 55, 2, 5)  # Lucas L10 = 123, Fibonacci F10 = 55
    assert e ** (-1) == QuadraticNumber(-1, 1, 2, 5)
    tiny = e ** (-200)
    assert tiny.log_abs(15).startswith("-96.242365011920")  # −200 log φ
    assert e.norm() == Fraction(-1)


def test_decimal_digits_big():
    assert decimal_digits(10**9999) == 10000
    assert decimal_digits(10**9999 - 1) == 9999
    assert decimal_digits(0) == 1
