"""Form and character kernels for the benchmark runner (``tests/benchmarks/run.py``).

Composition + reduction of binary quadratic forms with D < 2⁶² (target,
issue 7: ≥ 2 M per second compiled, calls from Python included), a batch of
Kronecker symbols for an Euler product, the class numbers of one field from
its cycles of reduced forms, and infrastructure baby steps at D ≈ 4·10²⁰;
each against the pure-Python twin.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from realquad._backend import kernels, pure
from realquad.core.integers import isqrt
from realquad.core.primes import kronecker

#: A discriminant just below 2⁶¹ (≡ 1 mod 4, not a square); the forms kernels take any D < 2⁶².
D = (1 << 61) + 1 + 4 * 7
COMPOSITIONS = 20_000


def _prime_form(D: int) -> tuple[int, int, int]:
    """A reduced form (p, b, c) of discriminant D for the least odd prime p with (D/p) = 1."""
    p = 3
    while True:
        if all(p % q for q in range(3, isqrt(p) + 1, 2)) and kronecker(D, p) == 1:
            for b in range(D & 1, 2 * p, 2):
                if (b * b - D) % (4 * p) == 0:
                    return p, b, (b * b - D) // (4 * p)
        p += 2


def _powers(space: Any, count: int) -> Callable[[], Any]:
    """f ← reduce(f · g), ``count`` times: one composition and one reduction per call."""
    r = isqrt(D)
    g = space.form_reduce(*_prime_form(D), D, r)

    def run() -> tuple[int, int, int]:
        compose_reduce = space.form_compose_reduce
        ga, gb = g[0], g[1]
        a, b, c = g
        for _ in range(count):
            a, b, c = compose_reduce(a, b, ga, gb, D, r)
        return a, b, c

    return run


def _primes(limit: int) -> list[int]:
    sieve = bytearray([1]) * limit
    sieve[:2] = b"\x00\x00"
    for p in range(2, isqrt(limit) + 1):
        if sieve[p]:
            sieve[p * p :: p] = bytearray(len(sieve[p * p :: p]))
    return [i for i in range(limit) if sieve[i]]


def _class_numbers(space: Any, D: int) -> Callable[[], Any]:
    from realquad.core.orders import Order

    args = (D, Order(D).conductor, _primes(isqrt(D // 4) + 2), 10**8)

    def run() -> Any:
        return space.form_class_numbers(*args)

    return run


def _baby_steps(space: Any, D: int, count: int) -> Callable[[], Any]:
    import math

    r = isqrt(D)
    b = r if (r - D) % 2 == 0 else r - 1
    args = (D, r, math.sqrt(D), 1, b, 0.0, count)
    return lambda: space.infrastructure_baby_steps(*args)


def workloads() -> list[dict[str, Any]]:
    primes = _primes(10**6)
    assert _powers(kernels, 200)() == _powers(pure, 200)()
    return [
        {
            "name": f"forms: composition + reduction, D = 2⁶¹ + 29, {COMPOSITIONS:,} steps",
            "run": _powers(kernels, COMPOSITIONS),
            "reference": _powers(pure, COMPOSITIONS),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "reference_repeat": 3,
            "count": COMPOSITIONS,
            "unit": "compositions",
            "target": "≥ 2 M/s compiled",
        },
        {
            "name": f"characters: Kronecker symbols (D/p), {len(primes):,} primes p < 10⁶",
            "run": lambda: kernels.kronecker_symbols(4 * 1000000000091, primes),
            "reference": lambda: pure.kronecker_symbols(4 * 1000000000091, primes),
            "reference_name": "pure twin (gmpy2.kronecker per prime)",
            "repeat": 5,
            "count": len(primes),
            "unit": "symbols",
        },
        {
            "name": "forms: class numbers h⁺ from cycles of reduced forms, D = 10¹⁰ + 1",
            "run": _class_numbers(kernels, 10**10 + 1),
            "reference": _class_numbers(pure, 10**10 + 1),
            "reference_name": "pure-Python twin",
            "repeat": 3,
            "count": 137216,
            "unit": "forms",
        },
        {
            "name": "infrastructure: 20,000 baby steps, D = 4·10²⁰ + 13",
            "run": _baby_steps(kernels, 4 * 10**20 + 13, 20_000),
            "reference": _baby_steps(pure, 4 * 10**20 + 13, 20_000),
            "reference_name": "pure-Python twin",
            "repeat": 5,
            "count": 20_000,
            "unit": "steps",
        },
    ]
