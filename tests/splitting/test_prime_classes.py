"""Classes of prime ideals located by principal ideal tests (realquad.splitting.prime_classes).

Checked against the exact cycle method's class table (an independent
algorithm: every reduced form walked), against brute force on the
principal form, and, for generators kept compact, modulo primes.
"""

from __future__ import annotations

import math
import random

import gmpy2
import pytest

from realquad._backend import BACKEND
from realquad.classgroup import class_group
from realquad.core.forms import Form, prime_form
from realquad.core.orders import Order
from realquad.core.primes import primes_below
from realquad.errors import TooLargeError
from realquad.splitting import decompose_prime
from realquad.splitting.decomposition import group_for_primes
from realquad.splitting.prime_classes import MAX_LOCATED_CLASSES, locate

giant_steps_compiled = pytest.mark.skipif(
    BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)


def class_order(vector: list[int], invariants: list[int]) -> int:
    return math.lcm(1, *(n // math.gcd(e, n) for e, n in zip(vector, invariants, strict=True)))


def fields(seed: int, count: int, low: int, high: int) -> list[int]:
    rng = random.Random(seed)
    out: list[int] = []
    while len(out) < count:
        D = rng.randrange(low, high)
        if D % 4 in (0, 1) and not gmpy2.is_square(D) and Order(D).conductor == 1:
            out.append(D)
    return out


@pytest.mark.parametrize("D", fields(20261203, 12, 10**4, 10**8))
def test_located_classes_agree_with_the_class_table(D: int) -> None:
    exact = class_group(D, method="exact")
    tested = class_group(D, method="bsgs")
    assert not tested.lists_classes and tested.narrow_invariants == exact.narrow_invariants
    forms = []
    for p in primes_below(40):
        mine, theirs = decompose_prime(D, p, tested), decompose_prime(D, p, exact)
        assert mine.kind == theirs.kind
        if mine.kind == "inert" or mine.divides_conductor:
            continue
        assert mine.represented_by_principal == theirs.represented_by_principal, (D, p)
        assert (not any(mine.wide_classes[0])) == (not any(theirs.wide_classes[0])), (D, p)
        narrow = tested.narrow_invariants
        assert class_order(mine.classes[0], narrow) == class_order(
            theirs.classes[0], exact.narrow_invariants
        )
        assert class_order(mine.wide_classes[0], tested.invariants) == class_order(
            theirs.wide_classes[0], exact.invariants
        )
        principal = Form.identity(D)
        if mine.represented_by_principal:
            assert mine.x is not None and mine.y is not None
            assert principal.value(mine.x, mine.y) == p  # brute-force check of the generator
        else:
            assert mine.form is not None and mine.form.value(mine.x, mine.y) == p
        forms.append(prime_form(D, p))
    # the located class is a homomorphism: the class of a product is the sum of the classes
    for F, G in zip(forms, forms[1:], strict=False):
        product = F.compose(G)
        expected = [
            (a + b) % n
            for a, b, n in zip(
                locate(tested, F, True),
                locate(tested, G, True),
                tested.narrow_invariants,
                strict=True,
            )
        ]
        assert locate(tested, product, True) == expected


@giant_steps_compiled
def test_generators_beyond_the_continued_fraction_are_compact() -> None:
    # D ≈ 10¹⁶: the units have tens of millions of digits; principal primes get a compact generator
    checked = 0
    for D in fields(7, 6, 10**16, 2 * 10**16):
        group = group_for_primes(Order(D))
        assert group.proof == "GRH" and not group.lists_classes
        for p in primes_below(30):
            s = decompose_prime(D, p, group)
            if not s.represented_by_principal or s.kind == "inert":
                continue
            if s.compact is None:  # small: written out, checked exactly
                assert s.x is not None and s.y is not None
                assert Form.identity(D).value(s.x, s.y) == p
                continue
            assert s.compact.norm == p and s.x is None
            for q in (10**9 + 7, 998244353, 2**61 - 1):  # primes (from memory)
                u, v = s.compact.modulo(q)  # α ≡ u + v√D
                assert (u * u - D * v * v - p) % q == 0
            checked += 1
    assert checked >= 1


def test_too_many_classes_are_refused_before_testing() -> None:
    D = next(
        D
        for D in fields(3, 40, 10**6, 10**7)
        if class_group(D, method="exact").narrow_class_number > 1
    )
    group = class_group(D, method="bsgs")
    F = next(prime_form(D, p) for p in primes_below(100) if prime_form(D, p) is not None)
    assert F is not None
    import realquad.splitting.prime_classes as module

    saved = module.MAX_LOCATED_CLASSES
    module.MAX_LOCATED_CLASSES = 1
    try:
        with pytest.raises(TooLargeError, match="one by one"):
            locate(group, F, narrow=True)
    finally:
        module.MAX_LOCATED_CLASSES = saved
    assert MAX_LOCATED_CLASSES >= 64


@giant_steps_compiled
def test_split_command_beyond_the_exact_method(capsys: pytest.CaptureFixture[str]) -> None:
    from tests.cli.support import run_json
    from tests.cli.test_json_schema import _validate

    data = run_json(capsys, "split", "--disc", "10000000000000061", "--primes-up-to", "12")
    _validate("split", data)
    assert data["proof"] == "GRH" and "by relations through them" in data["method"]
    for prime in data["primes"]:
        if prime["represented_by_principal"] and prime["compact"] is not None:
            assert prime["x"] is None and prime["compact"]["norm"] == prime["p"]


def test_imaginary_fields_beyond_the_exact_method_split_by_index_calculus():
    # Q(√−(10¹⁶ + 3)) is beyond the exact method: the classes come from index calculus
    # (relations through each prime ideal), checked here by composition of forms: the ideals
    # above a split prime lie in inverse classes, the form named represents p at the (x, y)
    # given (evaluated), and every class is the class the group computes for the prime form
    from realquad.core.forms import Form, prime_form
    from realquad.core.orders import field
    from realquad.splitting import split_primes
    from realquad.splitting.decomposition import group_for_primes

    order = field(-(10**16) - 3)
    D = order.discriminant
    group = group_for_primes(order)
    assert group.proof == "GRH" and group.method.startswith("index calculus")
    rows = split_primes(order, 80, group)
    split = [s for s in rows if s.kind == "split"]
    assert len(split) >= 5
    for s in split:
        a, b = s.classes
        assert all((x + y) % d == 0 for x, y, d in zip(a, b, group.invariants, strict=True))
        assert a == group.class_of(prime_form(D, s.p))
        assert s.form is not None and s.x is not None and s.y is not None
        assert Form(s.form.a, s.form.b, s.form.c).value(s.x, s.y) == s.p
