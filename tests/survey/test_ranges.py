"""Ranges and chunks of a survey, checked against sympy and brute force."""

from __future__ import annotations

import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st

from realquad.core.primes import primes_below
from realquad.errors import InputError
from realquad.survey.ranges import Chunk, SurveyRange, fundamental_discriminants_in, squarefree_in


def _squarefree_by_sympy(n: int) -> bool:
    return all(e == 1 for e in sympy.factorint(n).values())


def test_squarefree_matches_sympy() -> None:
    # squarefree numbers, OEIS A005117; the test decides with sympy.factorint
    assert squarefree_in(2, 3000) == [n for n in range(2, 3001) if _squarefree_by_sympy(n)]
    assert squarefree_in(10**6, 10**6 + 500) == [
        n for n in range(10**6, 10**6 + 501) if _squarefree_by_sympy(n)
    ]


def test_fundamental_discriminants_by_definition() -> None:
    # OEIS A003658 (fundamental discriminants > 1): D ≡ 1 (mod 4) squarefree, or D = 4m, m ≡ 2, 3 (mod 4) squarefree
    expected = [
        D
        for D in range(2, 2001)
        if (D % 4 == 1 and _squarefree_by_sympy(D))
        or (D % 4 == 0 and (D // 4) % 4 in (2, 3) and _squarefree_by_sympy(D // 4))
    ]
    assert fundamental_discriminants_in(1, 2000) == expected
    assert fundamental_discriminants_in(1, 30) == [
        5,
        8,
        12,
        13,
        17,
        21,
        24,
        28,
        29,
    ]  # OEIS A003658, from memory


def test_primes_match_sympy() -> None:
    assert primes_below(5001) == list(sympy.primerange(2, 5001))  # sympy primerange


@given(st.integers(1, 10**6), st.integers(0, 5000), st.integers(1, 700))
def test_chunks_partition_the_range(lo: int, width: int, size: int) -> None:
    hi = lo + width
    try:
        rng = SurveyRange("d", lo, hi)
    except InputError:
        assert not squarefree_in(lo, hi)
        return
    chunks = list(rng.chunks(size))
    assert chunks[0].lo == max(lo, 1) and chunks[-1].hi == hi
    for a, b in zip(chunks, chunks[1:], strict=False):
        assert a.hi + 1 == b.lo and b.lo % size == 0
    assert [d for c in chunks for d in c.radicands()] == squarefree_in(lo, hi)


def test_discriminant_chunks_give_the_fields_of_their_discriminants() -> None:
    chunk = Chunk("D", 1, 100)
    assert [d if d % 4 == 1 else 4 * d for d in chunk.radicands()] == fundamental_discriminants_in(
        1, 100
    )


@pytest.mark.parametrize(("lo", "hi"), [(10, 5), (1, 1), (4, 4), (0, 1), (25, 25), (-9, -9)])
def test_empty_ranges_are_refused(lo: int, hi: int) -> None:
    with pytest.raises(InputError, match="empty range"):
        SurveyRange("d", lo, hi)


@given(st.sampled_from("dD"), st.integers(-(10**5), 10**5), st.integers(0, 3000))
def test_chunk_size_counts_the_radicands(kind, lo, width):
    # the count without the list equals the length of the list (the sieve twice)
    hi = lo + width
    if lo < 0:
        hi = min(hi, -1)
    elif lo < 2:
        return
    assert Chunk(kind, lo, hi).size() == len(Chunk(kind, lo, hi).radicands())
