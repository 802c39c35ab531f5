"""The survey's fast rows equal the rows built from the class group and the exact unit.

The reference row (``_reference_row``) is the survey row as it was built
before the fast path: ``realquad.classgroup.class_group`` (Smith normal form
of the relations among prime forms) for ``h``, ``h⁺``, both structures and
``N(ε)``, and ``realquad.units.fundamental_unit`` expanded exactly for the
period, the digit count of ``x`` (decimal conversion of the exact integer)
and the regulator (96-bit evaluation of ``log((u + v√D)/2)``). The genus
shortcuts are checked against the same class groups and their prime
signatures against sympy's ``factorint``.
"""

from __future__ import annotations

import json
import math
from fractions import Fraction

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

from realquad._backend import COMPILED, kernels, pure
from realquad._kernels.survey_kernels import _prime_signature
from realquad.classgroup import class_group
from realquad.classgroup.exact import class_invariants
from realquad.classgroup.structure import forced_structures, forced_two_part, four_rank
from realquad.core.orders import Order, fundamental_discriminant_of
from realquad.core.primes import primes_below
from realquad.survey.compute import (
    FALLBACKS,
    _class_columns,
    _fast_unit_columns,
    _numbers,
    _regulator_text,
    survey_chunk,
    survey_field,
)
from realquad.survey.ranges import Chunk, squarefree_in
from realquad.textio import decimal_digits
from realquad.units.cfrac import fundamental_unit_cfrac as fundamental_unit

COMPARED = [
    "d",
    "discriminant",
    "class_number",
    "narrow_class_number",
    "class_group",
    "narrow_class_group",
    "unit_norm",
    "regulator",
    "period_length",
    "unit_digits",
    "proof",
]


def _reference_row(d: int) -> dict[str, object]:
    D = fundamental_discriminant_of(d)
    group = class_group(Order(D))
    unit = fundamental_unit(Order(D))
    u, v = unit.half_integer_coordinates()
    return {
        "d": d,
        "discriminant": D,
        "class_number": group.class_number,
        "narrow_class_number": group.narrow_class_number,
        "class_group": json.dumps(group.invariants),
        "narrow_class_group": json.dumps(group.narrow_invariants),
        "unit_norm": unit.norm,
        "regulator": _regulator_text(u, v, D),
        "period_length": unit.period_length,
        "unit_digits": decimal_digits(unit.expand().x),
        "proof": "unconditional",
    }


def _check(d: int) -> None:
    row = survey_field(d).as_dict()
    assert {k: row[k] for k in COMPARED} == _reference_row(d), d


def test_fast_rows_equal_reference_rows_small() -> None:
    for d in squarefree_in(2, 3000):
        _check(d)


def test_fast_rows_equal_reference_rows_near_1e5_and_1e6() -> None:
    for d in squarefree_in(100_000, 100_300) + squarefree_in(1_000_000, 1_000_200):
        _check(d)


@pytest.mark.slow
def test_fast_rows_equal_reference_rows_near_1e7() -> None:
    for d in squarefree_in(10_000_000, 10_000_300):
        _check(d)


@settings(max_examples=150, deadline=None)
@given(st.integers(min_value=2, max_value=3_000_000))
def test_fast_rows_equal_reference_rows_random(n: int) -> None:
    d = squarefree_in(n, n + 40)[0]  # the next squarefree d (any 40 consecutive hold one)
    _check(d)


def test_chunk_rows_equal_field_rows() -> None:
    rows = survey_chunk(Chunk("D", 5, 400))
    assert [r.as_dict() for r in rows] == [survey_field(r.d).as_dict() for r in rows]


def test_fast_path_is_taken_for_most_fields() -> None:
    FALLBACKS.clear()
    ds = squarefree_in(20_000, 21_000)
    numbers = _numbers(ds)
    class_forced = sum(1 for x in numbers if x is not None and _class_columns(x))
    unit_fast = sum(1 for d, x in zip(ds, numbers) if x and x[5] and _fast_unit_columns(d, x[5]))
    assert class_forced > 0.9 * len(ds)
    if "principal_regulator" in COMPILED:
        # the compiled walk's long-double bound decides the 17-digit text for most fields;
        # the pure twin's wider bound leaves them to the exact route (same rows, slower)
        assert unit_fast > 0.97 * len(ds)


def _kernel_signatures(ds: list[int]) -> list[tuple[int, int]]:
    """``(t, no_three)`` as the survey kernel (compiled where built) reports them."""
    rows = kernels.survey_numbers(ds, primes_below(int(max(ds) ** 0.5) + 2), 10**7, 10**7)
    return [(row[1], row[2]) for row in rows]


def test_prime_signature_against_sympy() -> None:
    # t = number of primes of D (sympy.factorint), j = no prime ≡ 3 (mod 4) divides D
    ds = squarefree_in(2, 5000) + squarefree_in(10**6, 10**6 + 3000)
    compiled = _kernel_signatures(ds)
    for d, signature in zip(ds, compiled):
        primes = sympy.factorint(fundamental_discriminant_of(d))
        expected = (len(primes), int(all(p % 4 != 3 for p in primes)))
        assert _prime_signature(d) == expected == signature, d


def test_prime_signature_two_large_primes() -> None:
    # 1009·1013 (both ≡ 1 mod 4), 1019·1031 and 100003·100019 (both ≡ 3 mod 4), 1013·1019
    # (one of each); all sympy primes. Trial division stops below them; rho splits the rest.
    pairs = [(1009, 1013), (1019, 1031), (1013, 1019), (100003, 100019)]
    for p, q in pairs:
        assert sympy.isprime(p) and sympy.isprime(q)
        for d, t in ((p * q, 2 if p * q % 4 == 1 else 3), (2 * p * q, 3)):
            expected = (t, int(p % 4 == 1 and q % 4 == 1))
            assert _prime_signature(d) == expected == _kernel_signatures([d])[0], d


@settings(max_examples=60, deadline=None)
@given(st.integers(min_value=2, max_value=2_000_000))
def test_survey_kernel_equals_its_twin(n: int) -> None:
    # compiled = pure on everything but the rounding of the regulator walk, whose
    # two values must agree within the sum of their error bounds
    ds = squarefree_in(n, n + 60)
    primes = primes_below(int(max(ds) ** 0.5) + 2)
    compiled = kernels.survey_numbers(ds, primes, 10**7, 10**7)
    twin = pure.survey_numbers(ds, primes, 10**7, 10**7)
    for c_row, p_row in zip(compiled, twin, strict=True):
        assert c_row is not None and p_row is not None
        assert c_row[:5] == p_row[:5]
        c_walk, p_walk = c_row[5], p_row[5]
        assert c_walk is not None and p_walk is not None
        assert c_walk[:3] == p_walk[:3]
        # log(M_c·2^e_c) − log(M_p·2^e_p) from the exact ratio (no cancellation in binary64)
        ratio = Fraction(c_walk[3], p_walk[3]) * Fraction(2) ** (c_walk[4] - p_walk[4])
        assert abs(math.log(ratio)) <= c_walk[5] + p_walk[5] + 1e-15


def test_forced_structures_agree_with_class_groups() -> None:
    forced = 0
    ds = squarefree_in(2, 2500)
    for d in ds:
        D = fundamental_discriminant_of(d)
        G = class_group(Order(D))
        primes = sympy.factorint(D)
        found = forced_structures(
            G.narrow_class_number, G.unit_norm, len(primes), all(p % 4 != 3 for p in primes)
        )
        if found is not None:
            forced += 1
            assert found == (G.invariants, G.narrow_invariants), d
    assert forced > 0.95 * len(ds)


def test_forced_structures_known_groups() -> None:
    # Q(√79): h = 3, h⁺ = 6 (issue 3's list of known cases, from memory; also class_group above)
    assert forced_structures(6, 1, 2, False) == ([3], [6])
    # Q(√10): h = 2 with a unit of norm −1 (issue 3's list, from memory)
    assert forced_structures(2, -1, 2, True) == ([2], [2])
    # Q(√3): h = 1, h⁺ = 2 (issue 3's list, from memory)
    assert forced_structures(2, 1, 2, False) == ([], [2])


def _partitions(a: int, r: int, largest: int) -> list[list[int]]:
    """Partitions of ``a`` into exactly ``r`` parts, each ``≤ largest`` (brute force)."""
    if r == 0:
        return [[]] if a == 0 else []
    return [
        [e, *rest] for e in range(min(a, largest), 0, -1) for rest in _partitions(a - e, r - 1, e)
    ]


def test_forced_two_part_is_unique_exactly_when_claimed() -> None:
    # abelian 2-groups of order 2^a and rank r are the partitions of a into r parts
    for a in range(0, 10):
        for r in range(0, 10):
            parts = _partitions(a, r, a)
            found = forced_two_part(a, r)
            if len(parts) == 1:
                assert found == parts[0], (a, r)
            else:
                assert found is None, (a, r)


def test_class_invariants_equal_class_groups() -> None:
    # every order (maximal or not) of discriminant D ≤ 2000, against class_group's Smith forms
    for D in range(5, 2000):
        if D % 4 in (2, 3) or sympy.sqrt(D).is_integer:
            continue
        G = class_group(D)
        assert class_invariants(D) == (
            G.class_number,
            G.narrow_class_number,
            G.invariants,
            G.narrow_invariants,
            G.unit_norm,
        ), D


def _four_rank_of(invariants: list[int]) -> int:
    return sum(1 for x in invariants if x % 4 == 0)


def test_four_rank_against_class_groups() -> None:
    # Rédei–Reichardt 4-rank against the invariants of class_group (Smith normal form)
    for d in squarefree_in(2, 3000) + squarefree_in(200_000, 200_100):
        D = fundamental_discriminant_of(d)
        G = class_group(Order(D))
        assert four_rank(D, sorted(sympy.factorint(D))) == _four_rank_of(G.narrow_invariants), d


def test_forced_structures_with_four_rank_agree_with_class_groups() -> None:
    for d in squarefree_in(2, 3000):
        D = fundamental_discriminant_of(d)
        G = class_group(Order(D))
        primes = sorted(sympy.factorint(D))
        found = forced_structures(
            G.narrow_class_number,
            G.unit_norm,
            len(primes),
            all(p % 4 != 3 for p in primes),
            four_rank(D, primes),
        )
        if found is not None:
            assert found == (G.invariants, G.narrow_invariants), d


def test_forced_two_part_with_four_rank_is_unique_exactly_when_claimed() -> None:
    # the partitions of a into r parts with exactly k parts ≥ 2 (brute force)
    for a in range(0, 11):
        for r in range(0, 11):
            for k in range(0, r + 1):
                parts = [p for p in _partitions(a, r, a) if sum(1 for e in p if e >= 2) == k]
                found = forced_two_part(a, r, k)
                if len(parts) == 1:
                    assert found == parts[0], (a, r, k)
                else:
                    assert found is None, (a, r, k)
