"""The compiled definite-form kernels against their pure twins, at the word-size boundaries too.

Each compiled kernel must return exactly its twin's result, or raise
``OverflowError`` (then :func:`realquad._backend.call_kernel` runs the twin).
The twins themselves are checked against brute force in tests/core and
tests/classgroup.
"""

from __future__ import annotations

from math import isqrt

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from realquad._backend import COMPILED, call_kernel, kernels, pure
from realquad.core.orders import Order
from realquad.core.primes import primes_below

needs_compiled = pytest.mark.skipif(
    "definite_reduce" not in COMPILED, reason="compiled kernels not built or REALQUAD_PURE set"
)
BOUNDARIES = [2**31 - 1, 2**31, 2**62 - 1, 2**62, 2**63 - 1, 2**63]


def _same(name: str, *args):
    """The compiled result equals the twin's, or the compiled kernel declines with OverflowError."""
    want = getattr(pure, name)(*args)
    try:
        got = getattr(kernels, name)(*args)
    except OverflowError:
        got = want
    assert got == want, (name, args)
    assert call_kernel(name, *args) == want


@st.composite
def definite_triples(draw):
    size = draw(st.sampled_from([10**3, 2**31, 2**62, 2**63, 2**64]))
    a = draw(st.integers(1, size) | st.sampled_from(BOUNDARIES))
    c = draw(st.integers(1, size) | st.sampled_from(BOUNDARIES))
    bound = 2 * isqrt(a * c)
    b = draw(st.integers(-bound, bound))
    if b * b >= 4 * a * c:
        b = 0
    return a, b, c


@needs_compiled
@given(definite_triples())
@example((2**62, 2**31 - 1, 2**62 + 1))
@example((2**63 - 1, 2**32 + 1, 2**63 - 1))
@example((1, 2**31, 2**62))
@example((2**31 - 1, -(2**31 - 1), 2**31 - 1))
def test_reduce_compiled_equals_twin(f):
    _same("definite_reduce", *f)


@needs_compiled
@given(st.integers(3, 2**64), st.integers(0, 10**6), st.integers(0, 10**6))
@example(2**62 - 1, 5, 7)
@example(2**62 + 3, 5, 7)
@example(2**31 - 1, 1, 2)
def test_compose_reduce_compiled_equals_twin(n, j, k):
    D = -n if -n % 4 in (0, 1) else -4 * n
    ps = [p for p in (2, 3, 5, 7, 11, 13, 17, 19) if pure.prime_form_b(D, p) >= 0]
    if not ps:
        return
    p, q = ps[j % len(ps)], ps[k % len(ps)]
    b1, b2 = pure.prime_form_b(D, p), pure.prime_form_b(D, q)
    f = pure.definite_reduce(p, b1, (b1 * b1 - D) // (4 * p))
    g = pure.definite_reduce(q, b2, (b2 * b2 - D) // (4 * q))
    for _ in range(3):
        _same("definite_compose_reduce", f[0], f[1], g[0], g[1], D)
        f = pure.definite_compose_reduce(f[0], f[1], g[0], g[1], D)


@needs_compiled
@given(st.integers(3, 10**7))
@example(2**31 - 1)
@example(4 * 2**20)
def test_class_walk_compiled_equals_twin(n):
    D = -n if -n % 4 in (0, 1) else -4 * n
    f = Order(D).conductor
    primes = primes_below(isqrt(-D // 3) + 2)
    _same("definite_class_candidates", D, f, primes)
    candidates = pure.definite_class_candidates(D, f, primes)
    _same("definite_class_table", D, candidates, 10**6, None)
    _same("definite_class_relations", D, f, primes, 10**6)
    _same("definite_class_relations", D, f, primes, 3)  # None beyond max_forms, both
    h = pure.definite_class_relations(D, f, primes, 10**6)[0]
    for target in {1, 2, h // 2, h}:  # stopped early (the class number known): same cut, both
        _same("definite_class_relations", D, f, primes, 10**6, target)
    for power in {2, 3, h // 2 or 1, h}:  # walks among the powers, both
        _same("definite_class_relations", D, f, primes, 10**6, 0, power)


@needs_compiled
def test_prime_form_b_takes_negative_discriminants():
    for D in (-3, -4, -20, -23, -56, -(2**62) + 4, -(2**61) - 3, -(10**12) - 3):
        for p in primes_below(200):
            _same("prime_form_b", D, p)


@needs_compiled
def test_out_of_range_arguments_fall_back_to_the_twin():
    D = -(2**62) - 4  # beyond the class kernels' range
    with pytest.raises(OverflowError):
        kernels.definite_class_candidates(D, 1, [2, 3, 5])
    assert call_kernel("definite_class_candidates", D, 1, [2, 3, 5]) == (
        pure.definite_class_candidates(D, 1, [2, 3, 5])
    )
    with pytest.raises(OverflowError):
        kernels.definite_reduce(2**64, 1, 1)


def test_progress_hears_the_class_count():
    heard: list[int] = []
    D = -4 * 10**8 - 4 * 7
    f = Order(D).conductor
    candidates = call_kernel("definite_class_candidates", D, f, primes_below(isqrt(-D // 3) + 2))
    table = call_kernel("definite_class_table", D, candidates, 10**6, heard.append)
    assert heard and heard[0] == 1000 and len(table[1]) >= heard[-1]


def _fundamental_near(n: int) -> int:
    """A fundamental discriminant −|D| ≤ −n (sympy's factorint decides squarefreeness)."""
    from sympy import factorint

    while True:
        D = -n
        m = D if D % 4 == 1 else D // 4
        if D % 4 in (0, 1) and (D % 4 == 1 or m % 4 in (2, 3)):
            if all(e == 1 for e in factorint(-m).values()):
                return D
        n += 1


@needs_compiled
@given(st.integers(3, 10**9))
@example(3)
@example(4)
@example(2**31 - 1)
def test_class_number_count_compiled_equals_twin(n):
    D = _fundamental_near(n)
    primes = primes_below(isqrt(-D // 3) + 2)
    _same("definite_class_number", D, primes)


def test_class_number_count_refuses_beyond_its_reach():
    with pytest.raises(ValueError):
        call_kernel("definite_class_number", -(10**14 + 3), [2, 3])
    with pytest.raises(ValueError):  # the primes must cover √(|D|/3)
        call_kernel("definite_class_number", -(10**6 + 3), [2, 3])
