"""Compact representations of units against the continued-fraction unit and modular checks."""

from __future__ import annotations

from fractions import Fraction

import gmpy2
import mpmath
import pytest
from hypothesis import given
from hypothesis import strategies as st

from realquad.core.primes import factorize
from realquad.errors import DomainError, TooLargeError
from realquad.infrastructure.compact import CompactRepresentation, abs_product_is_one, coprime_base
from realquad.infrastructure.regulator_search import search_regulator
from realquad.units.cfrac import fundamental_unit_cfrac as unit_cfrac
from realquad.units.cfrac import regulator_cfrac

PRIMES = [
    10**9 + 7,
    998244353,
    2**61 - 1,
    1000003,
]  # primes (from memory; gmpy2.is_prime confirms below)


def discriminant_near(n: int) -> int:
    D = max(n, 5)
    while D % 4 not in (0, 1) or gmpy2.is_square(D):
        D += 1
    return D


def compact_unit(D: int) -> CompactRepresentation:
    return CompactRepresentation.from_factors(D, search_regulator(D, 20).factors)


@given(st.integers(5, 10**8))
def test_expansion_equals_continued_fraction_unit(n: int) -> None:
    D = discriminant_near(n)
    eps = compact_unit(D)
    reference = unit_cfrac(D)  # realquad.units: independent continued-fraction code
    assert eps.expand() == reference.half_integer_coordinates()
    assert eps.norm == reference.norm


@given(st.integers(10**8, 10**16))
def test_norm_is_one_modulo_primes(n: int) -> None:
    # ε = x + y√D (mod p) must satisfy x² − D y² ≡ N(ε) for every prime p not dividing a denominator.
    D = discriminant_near(n)
    eps = compact_unit(D)
    checked = 0
    for p in PRIMES:
        assert gmpy2.is_prime(p)
        try:
            x, y = eps.modulo(p)
        except DomainError:
            continue
        assert (x * x - D * y * y - eps.norm) % p == 0
        checked += 1
    assert checked >= 2


@given(st.integers(5, 10**12))
def test_log_equals_regulator(n: int) -> None:
    D = discriminant_near(n)
    eps = compact_unit(D)
    value, bound = eps.log(40)
    reference = regulator_cfrac(D, 40)
    with mpmath.workdps(60):
        assert (
            abs(value - reference.value)
            <= bound + reference.error_bound + reference.value * mpmath.mpf(10) ** -39
        )


def test_products_and_powers_stay_consistent() -> None:
    D = 4 * (10**9 + 7)
    eps = compact_unit(D)
    u, v = eps.expand()
    cube = eps.power(3)
    assert cube.expand() == (eps * eps * eps).expand()
    p = 10**9 + 9
    x, y = eps.modulo(p)
    cx, cy = cube.modulo(p)
    # (x + y√D)³ mod p by hand
    x2, y2 = (x * x + D * y * y) % p, 2 * x * y % p
    assert (cx, cy) == ((x2 * x + D * y2 * y) % p, (x2 * y + y2 * x) % p)
    inverse = eps.power(-1)
    assert (eps * inverse).expand() == (2, 0)
    value, _ = cube.log(30)
    with mpmath.workdps(50):
        assert abs(value - 3 * regulator_cfrac(D, 30).value) < mpmath.mpf(10) ** -24
    # x from (u + v√D)/2 agrees with the mod-p reduction
    half = pow(2, -1, p)
    assert (u * half % p, v * half % p) == (x, y)


def test_log_of_a_power_with_an_exponent_of_thousands_of_bits() -> None:
    # the power products of index calculus at 80 digits have exponents beyond binary64's range;
    # reference: k·R with R from the continued fraction
    D = 4 * (10**9 + 7)
    k = 3**2000 + 1
    huge = compact_unit(D).power(k)
    value, bound = huge.log(30)
    with mpmath.workdps(1000):
        exact = k * regulator_cfrac(D, 1000).value
        assert abs(value - exact) <= bound + abs(exact) * mpmath.mpf(10) ** -29


def test_expansion_refused_beyond_max_digits() -> None:
    eps = compact_unit(4 * (10**12 + 39))
    with pytest.raises(TooLargeError, match="digits"):
        eps.expand(max_digits=1000)
    assert (
        eps.digits_estimate() == 274428
    )  # about R/log 10 with R = 631893.23… (continued fraction)


def test_compact_size_is_logarithmic() -> None:
    eps = compact_unit(10**18 + 9)
    assert eps.size <= 32  # log₂ R + 1 levels for R ≈ 5.3·10⁸
    assert all(abs(a.c) < 10**25 for chain in eps.chains for a, _ in chain.factors)


@given(st.integers(2, 10**5), st.integers(1, 10**6))
def test_any_modulus_against_sympy_pell(d: int, m: int) -> None:
    # sympy's diop_DN: the least solution (x, y) of x² − dy² = −1 (else +1), which is the
    # fundamental unit x + y√d of Z[√d], D = 4d; as (u + v√D)/2: u = 2x, v = y
    from sympy.solvers.diophantine.diophantine import diop_DN

    if gmpy2.is_square(d):
        return
    x, y = (diop_DN(d, -1) or diop_DN(d, 1))[0]
    eps = compact_unit(4 * d)
    denominators = {int(a.c) for chain in eps.chains for a, _ in chain.factors}
    for q in (m, 2**40, 10**12, *(c**3 for c in sorted(denominators)[:4])):
        assert eps.coordinates_modulo(q) == (2 * x % q, y % q)
        # ε = x + (y/2)√D: modulo() needs y/2 reducible modulo q
        if q > 1 and q % 2:
            assert eps.modulo(q) == (x % q, y * pow(2, -1, q) % q)
        elif q > 1 and y % 2 == 0:
            assert eps.modulo(q) == (x % q, y // 2 % q)
        elif q > 1:
            with pytest.raises(DomainError, match="half-integer"):
                eps.modulo(q)


def test_moduli_sharing_the_denominators_against_the_expansion() -> None:
    # every modulus up to 300 and the powers of the denominators' primes, against the
    # expanded unit and its powers (negative ones included)
    for D in (5, 8, 13, 4 * 61, 4 * 94, 1009, 8 * 1019, 9 * 4 * 61, 4 * 46, 4 * 199, 10**6 + 1):
        eps = compact_unit(D)
        primes = sorted(
            {p for chain in eps.chains for a, _ in chain.factors for p in factorize(int(a.c))}
        )
        for k in (1, -2, 3):
            beta = eps.power(k)
            u, v = beta.expand()
            for m in [*range(1, 301), *(p**e for p in primes[:5] for e in (5, 17))]:
                assert beta.coordinates_modulo(m) == (u % m, v % m), (D, k, m)


def test_even_modulus_of_half_integer_coordinates_is_refused() -> None:
    phi = compact_unit(5)  # (1 + √5)/2: x + y√5 with x = y = 1/2
    with pytest.raises(DomainError, match="half-integer"):
        phi.modulo(2)
    assert phi.coordinates_modulo(2) == (1, 1)
    eps = compact_unit(4 * 61)  # 29718 + 3805√61 (cfrac; = (59436 + 3805√244)/2)
    with pytest.raises(DomainError, match="half-integer"):
        eps.modulo(2**30)
    assert eps.coordinates_modulo(2**30) == (59436, 3805)
    assert eps.modulo(3**19) == (29718, 3805 * pow(2, -1, 3**19) % 3**19)


@given(st.lists(st.integers(1, 10**6), min_size=1, max_size=8))
def test_coprime_base_is_coprime_and_generates(numbers: list[int]) -> None:
    base = coprime_base(numbers)
    for i, a in enumerate(base):
        for b in base[i + 1 :]:
            assert gmpy2.gcd(a, b) == 1
    for n in numbers:
        for b in base:
            while n % b == 0:
                n //= b
        assert n == 1


def test_abs_product_is_one() -> None:
    assert abs_product_is_one([(Fraction(6, 5), 4), (Fraction(25, 36), 2)])
    assert not abs_product_is_one([(Fraction(6, 5), 4), (Fraction(25, 36), 3)])
    assert abs_product_is_one([(Fraction(-1, 1), 2**60)])
