"""The compiled sieve kernel against its pure twin, and both against brute force.

``sieve_family`` must return exactly the twin's list (same candidates, same
order, same hits) or raise ``OverflowError`` beyond its word-size range
(then :func:`realquad._backend.call_kernel` runs the twin). The references:
the pure twin on random inputs (hypothesis), and brute force on families of
polynomials built from their definition for small discriminants: every value
``f_k(x)`` over the interval is divided by every prime, and the candidates
must be exactly the ``x`` whose dividing primes' logarithms reach the
threshold, with those primes as hits. The compiled comparisons are skipped
when the extension is not built.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import example, given
from hypothesis import strategies as st
from sympy.ntheory import sqrt_mod

from realquad._backend import COMPILED, call_kernel, kernels, pure

needs_compiled = pytest.mark.skipif(
    "sieve_family" not in COMPILED, reason="compiled kernels not built or REALQUAD_PURE set"
)

SMALL_PRIMES = [p for p in range(2, 400) if all(p % q for q in range(2, math.isqrt(p) + 1))]
#: Primes on both sides of the compiled kernel's size classes (2¹³: sieved across the whole array)
#: and of its range (2³¹).
LARGER_PRIMES = [8191, 8209, 32749, 32771, 65521, 65537, 1000003, 2**31 - 1]


def _same(*args):
    """The compiled result equals the twin's (reference: the pure twin), or the compiled kernel declines."""
    want = pure.sieve_family(*args)
    try:
        got = kernels.sieve_family(*args)
    except OverflowError:
        got = want
    assert got == want, args
    assert call_kernel("sieve_family", *args) == want
    return want


# -- random inputs against the twin -------------------------------------------------


@st.composite
def sieve_inputs(draw, max_M: int = 600):
    n = draw(st.integers(0, 12))
    primes = draw(st.lists(st.sampled_from(SMALL_PRIMES + LARGER_PRIMES), min_size=n, max_size=n))
    logs, budget = [], 255  # no sum above 255: the kernel's sums are bytes (the twin's docstring)
    for _ in primes:
        lg = draw(st.integers(0, min(20, budget)))
        logs.append(lg)
        budget -= lg
    roots1, roots2 = [], []
    for p in primes:
        shape = draw(st.sampled_from(["two", "two", "two", "one", "out"]))
        r = draw(st.integers(0, p - 1))
        if shape == "out":
            roots1.append(draw(st.integers(-3, -1)))
            roots2.append(draw(st.integers(-1, p - 1)))  # never read: the prime is left out
        else:
            roots1.append(r)
            roots2.append(r if shape == "one" else draw(st.integers(0, p - 1)))
    rows = draw(st.integers(0, 3))
    shifts = [[draw(st.integers(-3 * p, 3 * p)) for p in primes] for _ in range(rows)]
    steps = (
        draw(st.lists(st.integers(1, rows).flatmap(lambda l: st.sampled_from([l, -l])), max_size=7))
        if rows
        else []
    )
    M = draw(st.integers(1, 40) | st.integers(1, max_M))
    threshold = draw(st.integers(-2, 260) | st.sampled_from([1, 8, 20, 40, 256]))
    return primes, logs, roots1, roots2, shifts, steps, M, threshold


@needs_compiled
@given(sieve_inputs())
@example(([5, 7], [2, 3], [0, 1], [4, 5], [], [], 8, 5))  # the twin's doctests
@example(([5, 7], [2, 3], [0, 1], [4, 5], [[1, 1]], [1], 3, 3))
@example(([1, 2, 3], [1, 2, 3], [0, 0, 2], [0, 1, 1], [[0, 1, 2]], [1, -1, 1], 5, 6))  # p = 1
@example(([], [], [], [], [[]], [1, -1], 4, 0))  # no primes: every x once the threshold is 0
def test_compiled_equals_twin(args):
    _same(*args)


@needs_compiled
def test_blocks_and_large_primes():
    """An interval of three cache blocks, primes in every size class (reference: the pure twin)."""
    primes = [41, 43, 101, 4099, 8191, 8209, 32749, 65537, 70001, 1000003]
    logs = [5, 5, 6, 12, 13, 13, 15, 16, 16, 20]
    roots1 = [3, 0, 50, 4000, 17, 8208, 0, 65536, 5, 999999]
    roots2 = [40, 0, 7, 11, 17, 1, 32748, 2, 70000, 3]
    shifts = [[7, 1, 33, 2048, 99, 8000, 32000, 12345, 1, 500000], [1, 2, 3, 4, 5, 6, 7, 8, 9, 10]]
    for M in (2**15 + 17, 2**16):
        for threshold in (13, 18, 25):
            found = _same(primes, logs, roots1, roots2, shifts, [1, 2, -1], M, threshold)
            assert found


# -- families of polynomials against brute force -------------------------------------


def _family(D: int, bound: int, a_primes: list[int]):
    """The polynomials ``(a, b_k, c_k)`` of one ``a`` in Gray-code order, and the kernel's inputs.

    ``b² ≡ D (mod 4a)`` by the Chinese remainder theorem from square roots of
    ``D`` modulo each ``q | a``; ``b_k`` flips one ``±2B_l`` at a time. The
    roots of the first polynomial modulo ``p`` are found by trying every
    residue (``p`` small) or from sympy's square roots of ``D`` (checked);
    primes dividing ``2a`` and primes without roots are left out. The shifts
    ``B_l·a⁻¹ mod p`` follow the kernel's definition of a step.
    """
    a = math.prod(a_primes)
    B = []
    for q in a_primes:
        t = min(sqrt_mod(D, q, all_roots=True))
        A = a // q
        B.append(A * (t * pow(A, -1, q) % q))
    b = sum(B) + (a if (sum(B) - D) % 2 else 0)
    bs, steps, positive = [b], [], [True] * len(B)
    for i in range(1, 2 ** (len(B) - 1)):
        v = (i & -i).bit_length() - 1
        b = b - 2 * B[v] if positive[v] else b + 2 * B[v]
        steps.append(-(v + 1) if positive[v] else v + 1)
        positive[v] = not positive[v]
        bs.append(b)
    polys = [(a, b, (b * b - D) // (4 * a)) for b in bs]
    assert all(b * b - 4 * a * c == D for a, b, c in polys)
    primes = [p for p in range(2, bound) if all(p % q for q in range(2, math.isqrt(p) + 1))]
    roots1, roots2, shifts = [], [], [[] for _ in B]
    a0, b0, c0 = polys[0]
    for p in primes:
        if p < 200:
            roots = [x for x in range(p) if (a0 * x * x + b0 * x + c0) % p == 0]
        else:
            inv = pow(2 * a0, -1, p) if a0 % p else 0
            roots = sorted({(t - b0) * inv % p for t in sqrt_mod(D, p, all_roots=True) or []})
            assert all((a0 * x * x + b0 * x + c0) % p == 0 for x in roots)
        if p == 2 or a % p == 0 or not roots:
            roots1.append(-1)
            roots2.append(-1)
            for row in shifts:
                row.append(0)
            continue
        roots1.append(roots[0])
        roots2.append(roots[-1])
        for row, Bl in zip(shifts, B, strict=True):
            row.append(Bl * pow(a, -1, p) % p)
    return polys, primes, roots1, roots2, shifts, steps


def _brute_force(polys, primes, logs, roots1, M, threshold):
    """Every ``(k, x, hits)`` by dividing each value ``f_k(x)`` by each prime left in."""
    out = []
    kept = [j for j, r in enumerate(roots1) if r >= 0]
    for k, (a, b, c) in enumerate(polys):
        for x in range(-M, M):
            value = a * x * x + b * x + c
            hits = [j for j in kept if value % primes[j] == 0]
            if sum(logs[j] for j in hits) >= threshold:
                out.append((k, x, hits))
    return out


@pytest.mark.parametrize(
    "D, a_primes, M, threshold",
    [
        (-1000003, [13, 19], 1500, 14),  # a = product of two primes: two polynomials
        (-(10**9 + 7), [29, 31, 43], 1000, 18),  # three primes: four, steps ±1, ±2
        (-4 * 3 * 5 * 7 * 11 * 10007, [23, 37, 41], 700, 12),  # 3, 5, 7, 11 | D: one root each
    ],
)
def test_family_against_brute_force(D, a_primes, M, threshold):
    polys, primes, roots1, roots2, shifts, steps = _family(D, 400, a_primes)
    logs = [0 if p < 7 else round(math.log2(p)) for p in primes]  # the smallest primes not sieved
    args = (primes, logs, roots1, roots2, shifts, steps, M, threshold)
    want = _brute_force(polys, primes, logs, roots1, M, threshold)  # reference: brute force
    assert want, "the example must report something"
    assert pure.sieve_family(*args) == want
    assert call_kernel("sieve_family", *args) == want
    for k, x, hits in want:  # every hit divides its value (reference: the definition of f_k)
        a, b, c = polys[k]
        assert all((a * x * x + b * x + c) % primes[j] == 0 for j in hits)


@needs_compiled
def test_larger_family_hits_divide():
    """Several blocks and primes above 2¹³: compiled equals twin, every hit divides its value."""
    D = -(10**20 + 3)
    polys, primes, roots1, roots2, shifts, steps = _family(D, 9000, [101, 107, 109])
    logs = [0 if p < 30 else round(math.log2(p) / 2) for p in primes]
    M, threshold = 20000, 22
    args = (primes, logs, roots1, roots2, shifts, steps, M, threshold)
    found = _same(*args)
    assert len({k for k, _, _ in found}) == len(polys)  # every polynomial reports candidates
    for k, x, hits in found:
        a, b, c = polys[k]
        value = a * x * x + b * x + c
        assert all(value % primes[j] == 0 for j in hits)
        dividing = [j for j, r in enumerate(roots1) if r >= 0 and value % primes[j] == 0]
        assert hits == dividing
        assert sum(logs[j] for j in hits) >= threshold


# -- the range of the compiled kernel and malformed input ----------------------------


@needs_compiled
def test_out_of_range_arguments_fall_back_to_the_twin():
    base = ([5, 7], [2, 3], [0, 1], [4, 5], [[1, 1]], [1, -1], 8, 2)
    for change in (
        {0: [2**31, 7], 2: [2**31 - 5, 1]},  # a prime of 2³¹
        {0: [2**40 + 15, 7], 2: [3, 1], 3: [2**39, 5]},
        {1: [256, 3]},  # a logarithm beyond a byte
        {1: [-1, 3]},
        {2: [5, 1]},  # a root outside [0, p)
        {3: [4, -2]},
        {4: [[2**64, 1]]},  # a shift beyond 64 bits
        {6: 0},  # an empty interval
        {6: -3},
    ):
        args = list(base)
        for i, value in change.items():
            args[i] = value
        with pytest.raises(OverflowError):
            kernels.sieve_family(*args)
        assert call_kernel("sieve_family", *args) == pure.sieve_family(*args)
    with pytest.raises(OverflowError):  # beyond 2²⁶ (not run on the twin: 2²⁷ sums)
        kernels.sieve_family(*base[:6], 2**26 + 1, 300)
    # the largest prime and threshold the compiled kernel takes
    _same([2**31 - 1, 7], [2, 3], [2**31 - 2, 1], [0, 5], [[2**31 - 3, 1]], [1, -1], 8, 2)
    _same([5, 7], [2, 3], [0, 1], [4, 5], [], [], 8, 2**70)
    _same([5, 7], [2, 3], [0, 1], [4, 5], [], [], 3, -(2**70))


@needs_compiled
def test_malformed_input_raises_as_the_twin():
    P, L, R1, R2 = [5, 7], [2, 3], [0, 1], [4, 5]
    for args in (
        (P, L, [0], R2, [], [], 8, 2),  # roots1 short
        (P, [2], R1, R2, [], [], 8, 2),  # logs short
        (P, L, R1, [4], [], [], 8, 2),  # roots2 short
        (P, L, R1, R2, [[1, 1]], [2], 8, 2),  # a step beyond the rows
        (P, L, R1, R2, [[1, 1]], [-(2**80)], 8, 2),
        (P, L, R1, R2, [], [0], 8, 2),  # step 0 with no rows
        (P, L, R1, R2, [[1]], [1], 8, 2),  # a row too short
    ):
        with pytest.raises(IndexError):
            pure.sieve_family(*args)
        with pytest.raises(IndexError):
            kernels.sieve_family(*args)
    with pytest.raises(ValueError):  # the twin divides by zero
        kernels.sieve_family([0, 7], L, R1, R2, [], [], 8, 2)
    with pytest.raises(TypeError):
        kernels.sieve_family(P, L, R1, R2, [], ["1"], 8, 2)
    # what the twin accepts: longer lists, step 0 (the last row), left-out primes not read
    _same(P, L + [9], R1 + [3, 4], R2 + [7], [[1, 1, 5], [2, 3]], [1, 0, -2, 2], 8, 2)
    _same(["x", 7], [None, 3], [-1, 1], ["y", 5], [["z", 1]], [1], 8, 2)
    _same([3], [1], [-1], [0], [7], [1, -1], 4, 0)  # no prime left in: no row is read
