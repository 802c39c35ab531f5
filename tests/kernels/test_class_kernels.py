"""The compiled class-number kernels against their pure twins, at the edge of the form limit.

The compiled walk files a cycle with a centre by walking half of it and
mirroring (see ``class_kernels.c``), so its count of stored forms must still
be the twin's to the form: ``None`` exactly when the reduced forms of ``D``
outnumber ``max_forms``. The twin itself is checked against sympy-independent
brute force (every reduced form of ``D`` enumerated from its definition).
"""

from __future__ import annotations

from math import gcd, isqrt

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import COMPILED, kernels, pure
from realquad.core.orders import Order
from realquad.core.primes import primes_below


def _reduced_forms(D: int) -> int:
    """Brute force: the primitive reduced forms (a, b, c) of D, |√D − 2|a|| < b < √D, counted."""
    r = isqrt(D)
    count = 0
    for b in range(1, r + 1):
        if (b - D) % 2 or b * b >= D:
            continue
        n = (D - b * b) // 4  # = −ac
        for a in range(1, r + 1):
            primitive = gcd(a, b, n // a) == 1
            if n % a == 0 and r - b < 2 * a <= r + b and primitive:  # |√D − 2a| < b
                count += 2  # a and −a
    return count


def _discriminant(n: int) -> int | None:
    D = n if n % 4 in (0, 1) else None
    if D is None or isqrt(D) ** 2 == D:
        return None
    return D


def test_twin_files_every_reduced_form() -> None:
    # the twin's index holds every reduced form exactly once (brute force count)
    for D in range(5, 1500):
        if _discriminant(D) is None:
            continue
        primes = primes_below(isqrt(D) + 2)
        f = Order(D).conductor
        table = pure.form_class_table(D, pure.form_class_candidates(D, f, primes), 10**7)
        assert table is not None
        assert len(table[0]) == _reduced_forms(D), D


@pytest.mark.skipif("form_class_numbers" not in COMPILED, reason="compiled kernels not built")
@settings(max_examples=200, deadline=None)
@given(st.integers(min_value=5, max_value=3 * 10**7), st.sampled_from([1, 2, 3, 5]))
def test_compiled_equals_twin_at_the_form_limit(n: int, square: int) -> None:
    D = _discriminant(n * square * square)
    if D is None:
        return
    conductor = Order(D).conductor
    primes = primes_below(isqrt(D) + 2)
    table = pure.form_class_table(D, pure.form_class_candidates(D, conductor, primes), 10**8)
    assert table is not None
    total = len(table[0])
    for limit in (total - 1, total, total + 1):
        assert kernels.form_class_numbers(D, conductor, primes, limit) == pure.form_class_numbers(
            D, conductor, primes, limit
        ), (D, limit)
        assert kernels.form_class_relations(
            D, conductor, primes, limit
        ) == pure.form_class_relations(D, conductor, primes, limit), (D, limit)
    assert kernels.form_class_numbers(D, conductor, primes, total - 1) is None
