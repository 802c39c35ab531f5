"""Ring class polynomials against textbook values, mpmath's j, and brute force modulo primes."""

from __future__ import annotations

import time
from math import isqrt

import gmpy2
import mpmath
import pytest

from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.core.primes import kronecker, primes_below
from realquad.errors import DomainError, TooLargeError
from realquad.splitting import ring_class_polynomial
from realquad.splitting.class_polynomial import J_TAIL_BOUND, MAX_CLASS_NUMBER, j_invariant
from realquad.splitting.representation import factor_degrees_are

# Hilbert class polynomials, coefficient of X^k at index k (from memory: Cox, Primes of the Form
# x² + ny², §13.A, and the j-values of the Heegner discriminants; each is also checked below
# against the brute-force representation test, so memory is not trusted alone)
KNOWN = {
    -3: [0, 1],
    -4: [-1728, 1],
    -7: [3375, 1],
    -8: [-8000, 1],
    -11: [32768, 1],
    -15: [-121287375, 191025, 1],
    -20: [-681472000, -1264000, 1],
    -23: [12771880859375, -5151296875, 3491750, 1],
    # Heegner numbers (class number 1) and j((1 + √−d)/2) = −(cube): Cox, Theorem 7.30 and §12.C
    -19: [96**3, 1],
    -43: [960**3, 1],
    -67: [5280**3, 1],
    -163: [640320**3, 1],
}


@pytest.mark.parametrize("D", sorted(KNOWN, reverse=True))
def test_known_polynomials(D: int) -> None:
    H = ring_class_polynomial(D)
    assert H.coefficients == KNOWN[D]
    assert H.degree == class_group(D).class_number
    assert H.proof == "unconditional" and H.method


def brute_principal(D: int, p: int) -> bool:
    """Brute force: the principal form of discriminant D takes the value p."""
    F = Form.identity(D)
    a, b, c = F.a, F.b, F.c
    for y in range(isqrt(4 * p // -D) + 2):
        disc = (b * y) ** 2 - 4 * a * (c * y * y - p)
        if disc >= 0 and isqrt(disc) ** 2 == disc:
            r = isqrt(disc)
            if (-b * y + r) % 2 == 0 or (-b * y - r) % 2 == 0:
                return True
    return False


def roots_mod(coefficients: list[int], p: int) -> int:
    """Brute force: the number of roots of the polynomial modulo p (Horner at every residue)."""
    count = 0
    for t in range(p):
        v = 0
        for c in reversed(coefficients):
            v = (v * t + c) % p
        count += v == 0
    return count


@pytest.mark.parametrize("D", [-15, -20, -23, -56, -108, -256, -68, -84, -4 * 26, -71])
def test_roots_mod_p_decide_the_principal_form(D: int) -> None:
    # Cox, Theorem 9.2 (and 9.4 for any order): for p ∤ D with p ∤ disc(H), p is represented by the
    # principal form ⇔ (D/p) = 1 and H_D has a root mod p; brute force on both sides
    H = ring_class_polynomial(D).coefficients
    h = len(H) - 1
    for p in primes_below(700):
        if D % p == 0:
            continue
        roots = roots_mod(H, p)
        principal = brute_principal(D, p)
        if kronecker(D, p) == 1:
            # a split prime never divides disc(H) (Deuring; from memory) and H splits completely
            # mod p exactly when p is principal
            assert roots in (0, h) or not principal, (D, p)
            assert (roots == h) == principal, (D, p)
            assert factor_degrees_are(H, p, 1) == principal, (D, p)
        else:
            assert not principal


def test_j_against_mpmath_kleinj() -> None:
    # mpmath's Klein invariant J = j/1728, an independent evaluation (theta functions)
    mpmath.mp.prec = 200
    try:
        for tau in (mpmath.mpc(0.1, 1.3), mpmath.mpc(-0.5, 0.9), mpmath.mpc(0.37, 2.2)):
            ours = j_invariant(tau)
            theirs = 1728 * mpmath.kleinj(tau)
            assert abs(ours - theirs) < mpmath.mpf(10) ** -40 * abs(theirs)
        # j(i) = 1728, j(e^{2πi/3}) = 0 (Cox, §10 / Theorem 11.2 from memory)
        assert abs(j_invariant(mpmath.mpc(0, 1)) - 1728) < 1e-50
        assert abs(j_invariant(mpmath.mpc(-0.5, mpmath.sqrt(3) / 2))) < 1e-50
        # the tail bound |j − 1/q| ≤ 2079 at the lowest point Im τ = √3/2 (positive q-coefficients)
        q = mpmath.exp(-mpmath.pi * mpmath.sqrt(3))
        assert j_invariant(mpmath.mpc(0, mpmath.sqrt(3) / 2)).real - 1 / q < J_TAIL_BOUND
    finally:
        mpmath.mp.prec = 53


@pytest.mark.parametrize("D", [-56, -4 * 17, -4 * 41, -191, -4 * 101, -3 * 4 * 41])
def test_constant_term_is_a_cube_when_three_does_not_divide_D(D: int) -> None:
    # Cox, Theorem 12.2 (from memory): for 3 ∤ D, j(O) = γ₂(O)³ with Q(γ₂) = Q(j), so H_D(0) = ±N(γ₂)³
    H = ring_class_polynomial(D).coefficients
    if D % 3:
        assert gmpy2.iroot(abs(H[0]), 3)[1], D


def test_h_about_one_hundred_within_five_seconds() -> None:
    # the speed target: h(−4n) ≈ 100
    n = 20_011
    G = class_group(-4 * n)
    assert 80 <= G.class_number <= 130
    start = time.perf_counter()
    H = ring_class_polynomial(-4 * n, G)
    elapsed = time.perf_counter() - start
    assert H.degree == G.class_number and H.coefficients[-1] == 1
    assert elapsed < 5, elapsed
    # brute force on a few split primes: roots ⇔ the principal form represents p
    for p in primes_below(400):
        if kronecker(-4 * n, p) == 1:
            assert factor_degrees_are(H.coefficients, p, 1) == brute_principal(-4 * n, p), p


def test_refusals() -> None:
    with pytest.raises(DomainError, match="imaginary"):
        ring_class_polynomial(316)
    big = -4 * 1_000_003
    assert class_group(big).class_number > MAX_CLASS_NUMBER
    with pytest.raises(TooLargeError, match="degree h"):
        ring_class_polynomial(big)
