"""Which primes are x² + ny²: the splitting of primes in imaginary orders against brute force."""

from __future__ import annotations

from math import isqrt

import pytest

from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.core.primes import primes_below
from realquad.splitting import decompose_prime, split_primes


def represented(n: int, p: int) -> bool:
    """Brute force: whether p = x² + ny² for some integers x, y."""
    return any(isqrt(p - n * y * y) ** 2 == p - n * y * y for y in range(isqrt(p // n) + 1))


@pytest.mark.parametrize("n", [1, 2, 3, 5, 6, 7, 14, 17, 21, 27, 30, 64])
def test_primes_of_the_form_x2_plus_ny2(n):
    # Cox, Primes of the Form x² + ny², Theorem 7.7 and Corollary: p ∤ 2n (p odd, not dividing n)
    # is x² + ny² exactly when its prime ideal in the order of discriminant −4n is principal
    D = -4 * n
    principal = Form.identity(D)
    for s in split_primes(D, 400):
        p = s.p
        if s.divides_conductor:
            continue
        brute = represented(n, p)
        if s.kind == "inert":
            assert not brute, (n, p)
            continue
        assert s.represented_by_principal == brute, (n, p)
        if brute:
            assert principal.value(s.x, s.y) == p
        else:
            assert s.form is not None and s.form.value(s.x, s.y) == p


def test_classes_of_the_conjugate_ideals_are_inverse():
    for D in (-56, -84, -3299, -4 * 1155):
        for p in primes_below(200):
            s = decompose_prime(D, p)
            if s.kind == "split":
                first, second = s.wide_classes
                assert s.classes == s.wide_classes  # narrow = wide for D < 0
                # the two ideals above p multiply to (p): coordinates add to 0
                inv = class_group(D).invariants
                assert [(x + y) % d for x, y, d in zip(first, second, inv, strict=True)] == [
                    0
                ] * len(inv)
