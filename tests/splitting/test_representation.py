"""Which primes a form represents: every answer against brute force, textbook criteria, OEIS A000926."""

from __future__ import annotations

from math import gcd, isqrt

import pytest

from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.core.primes import primes_below
from realquad.errors import DomainError
from realquad.splitting import form_primes, representation_criterion, represents_prime

PRIMES = primes_below(10_000)


def brute_definite(F: Form, p: int) -> bool:
    """Brute force: F(x, y) = p for some integers (D < 0): 4a·p = (2ax + by)² + |D|y² bounds |y|."""
    Y = isqrt(4 * F.a * p // -F.discriminant)
    return any(_integer_x(F, y, p) for y in range(-Y - 1, Y + 2))


def _integer_x(F: Form, y: int, p: int) -> bool:
    """Whether ax² + bxy + cy² = p has an integer root x for this y (a ≠ 0)."""
    a, b, c = F.a, F.b, F.c
    disc = (b * y) ** 2 - 4 * a * (c * y * y - p)
    if disc < 0 or isqrt(disc) ** 2 != disc:
        return False
    r = isqrt(disc)
    return (-b * y + r) % (2 * a) == 0 or (-b * y - r) % (2 * a) == 0


def least_unit_v(D: int) -> int:
    """Brute force: the least v > 0 with D·v² + 4 a square (t² − Dv² = 4, the automorphs)."""
    v = 1
    while isqrt(D * v * v + 4) ** 2 != D * v * v + 4:
        v += 1
    return v


def brute_indefinite(F: Form, p: int, v: int) -> bool:
    """Brute force for D > 0, a > 0: every orbit of solutions of (2ax + by)² − Dy² = 4ap under the
    automorphs holds one with |y| ≤ v·√(ap) (the unit (t + v√D)/2 moves u + y√D into [√N, √N·ε))."""
    Y = v * isqrt(F.a * p) + v + 1
    return any(_integer_x(F, y, p) for y in range(-Y, Y + 1))


DEFINITE = [
    Form(1, 0, 5),
    Form(2, 2, 3),
    Form(1, 0, 14),
    Form(3, 2, 5),
    Form(2, 0, 7),
    Form(1, 0, 27),
    Form(1, 1, 6),
    Form(2, 1, 3),
    Form(1, 0, 64),
    Form(4, 4, 17),
    Form(2, 1, 25),  # Cl(−199) ≅ C9: the criterion is only necessary (four classes share it)
]
INDEFINITE = [Form(1, 0, -79), Form(3, 2, -26), Form(1, 1, -5), Form(2, 0, -7), Form(5, 14, -6)]


@pytest.mark.parametrize("F", DEFINITE + INDEFINITE, ids=str)
def test_every_prime_below_ten_thousand_against_brute_force(F: Form) -> None:
    D = F.discriminant
    v = least_unit_v(D) if D > 0 else 0
    result = form_primes(F, PRIMES[-1], criterion=False)
    assert [r.p for r in result.primes] == PRIMES
    for r in result.primes:
        brute = brute_definite(F, r.p) if D < 0 else brute_indefinite(F, r.p, v)
        assert r.represented == brute, (F, r.p)
        if r.represented:
            assert F.value(r.x, r.y) == r.p
        if r.eligible:
            G = r.representing_form
            assert G.value(r.representing_x, r.representing_y) == r.p
            assert G.discriminant == D and G.is_primitive()
        else:
            assert r.reason in ("inert", "divides_conductor") and not brute


@pytest.mark.parametrize("F", DEFINITE + INDEFINITE, ids=str)
def test_the_criterion_against_brute_force(F: Form) -> None:
    D = F.discriminant
    v = least_unit_v(D) if D > 0 else 0
    c = representation_criterion(F)
    bound = 3000 if c.kind == "class_polynomial" else 10_000
    for p in primes_below(bound):
        brute = brute_definite(F, p) if D < 0 else brute_indefinite(F, p, v)
        verdict = c.holds(p)
        if c.exact and c.kind != "class_polynomial":
            assert verdict == brute, (F, p)
        elif verdict is not None:
            assert verdict == brute or (verdict is False and not brute), (F, p)
        if brute:
            assert verdict is not False, (F, p)  # a necessary condition never fails on a value


def test_x2_plus_5y2_textbook() -> None:
    # Cox, Primes of the Form x² + ny², §1 (Euler's conjecture, proved by Lagrange):
    # p ≠ 5 is x² + 5y² ⇔ p ≡ 1, 9 (mod 20)
    F = Form(1, 0, 5)
    c = representation_criterion(F)
    assert (c.kind, c.modulus, c.residues, c.dividing_represented) == (
        "congruences",
        20,
        [1, 9],
        [5],
    )
    for p in PRIMES:
        assert brute_definite(F, p) == (p == 5 or p % 20 in (1, 9)), p


def test_x2_plus_27y2_gauss() -> None:
    # Cox, Theorem 4.15 (Gauss): p = x² + 27y² ⇔ p ≡ 1 (mod 3) and 2 is a cubic residue mod p
    F = Form(1, 0, 27)
    c = representation_criterion(F)
    assert c.kind == "class_polynomial" and c.exact and c.factor_degree == 1
    for p in PRIMES:
        gauss = p % 3 == 1 and any(pow(t, 3, p) == 2 % p for t in range(p))
        assert brute_definite(F, p) == gauss, p
        if p < 3000:
            assert c.holds(p) in (gauss, None), p


def test_x2_plus_64y2_biquadratic() -> None:
    # Cox, §4 (Gauss; from memory: Theorem 4.23 / exercise): p = x² + 64y² ⇔ p ≡ 1 (mod 4)
    # and 2 is a biquadratic (fourth-power) residue mod p
    F = Form(1, 0, 64)
    c = representation_criterion(F)
    for p in PRIMES[1:]:
        quartic = p % 4 == 1 and pow(2, (p - 1) // 4, p) == 1
        assert brute_definite(F, p) == quartic, p
        if p < 3000:
            assert c.holds(p) in (quartic, None), p


def test_x2_plus_14y2_by_its_class_polynomial() -> None:
    # Cox, Theorem 9.2 with f = H_{−56}: p ∤ 56·disc is x² + 14y² ⇔ (−56/p) = 1 and H has a root
    sympy = pytest.importorskip("sympy")
    F = Form(1, 0, 14)
    c = representation_criterion(F)
    assert c.kind == "class_polynomial" and c.exact and c.polynomial.degree == 4
    X = sympy.Symbol("X")
    H = sympy.Poly(list(reversed(c.polynomial.coefficients)), X)
    for p in primes_below(3000):
        if 56 % p == 0:
            continue
        roots = len(sympy.Poly(H.as_expr(), X, modulus=p).ground_roots())
        has_root = roots > 0
        assert brute_definite(F, p) == (sympy.jacobi_symbol(-56 % p, p) == 1 and has_root), p


# OEIS A000926, idoneal numbers (from memory: the 65 known, of which these are ≤ 100)
IDONEAL = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 12, 13, 15, 16, 18, 21, 22, 24, 25, 28, 30, 33, 37, 40}
IDONEAL |= {42, 45, 48, 57, 58, 60, 70, 72, 78, 85, 88, 93}


def test_idoneal_numbers_give_congruences() -> None:
    # OEIS A000926: n is idoneal ⇔ every genus of forms of discriminant −4n has one class
    # (Cox, Theorem 3.22); then the criterion for x² + ny² is congruences
    for n in range(1, 101):
        c = representation_criterion(Form(1, 0, n))
        assert (c.kind == "congruences") == (n in IDONEAL), n
        assert (class_group(-4 * n).genus.classes_per_genus == 1) == (n in IDONEAL), n
        if n in IDONEAL:
            for p in primes_below(1500):
                assert c.holds(p) == brute_definite(Form(1, 0, n), p), (n, p)


def test_a_criterion_that_is_only_necessary() -> None:
    # Cl(−199) is cyclic of order 9, one genus: the six classes of order 9 are three pairs g^{±k},
    # which the degree of the factors of H mod p cannot tell apart
    c = representation_criterion(Form(2, 1, 25))
    assert c.kind == "class_polynomial" and not c.exact and c.factor_degree == 9
    assert len(c.undistinguished) == 4
    for p in primes_below(2000):
        assert c.holds(p) is not True


def test_ramified_and_conductor_primes() -> None:
    # brute force: x² + 9y² (conductor 3) never represents 3; 2x² + 2xy + 3y² represents 2
    assert represents_prime(Form(1, 0, 9), 3).reason == "divides_conductor"
    assert represents_prime(Form(2, 2, 3), 2).represented
    assert represents_prime(Form(1, 0, 5), 11).reason == "inert"


def test_non_primitive_forms_are_refused() -> None:
    with pytest.raises(DomainError, match="not primitive"):
        represents_prime(Form(2, 0, 4), 3)
    assert gcd(2, 4) == 2


@pytest.mark.slow
@pytest.mark.parametrize("F", [Form(1, 0, 14), Form(3, 2, 5), Form(1, 0, -79)], ids=str)
def test_every_prime_below_one_hundred_thousand(F: Form) -> None:
    # the same brute force as above, ten times further
    D = F.discriminant
    v = least_unit_v(D) if D > 0 else 0
    for r in form_primes(F, 100_000, criterion=False).primes:
        brute = brute_definite(F, r.p) if D < 0 else brute_indefinite(F, r.p, v)
        assert r.represented == brute, (F, r.p)
        if r.represented:
            assert F.value(r.x, r.y) == r.p
