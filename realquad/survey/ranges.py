"""Ranges of real quadratic fields and their division into chunks.

A survey runs over the squarefree radicands ``d`` in an interval, or over the
fundamental discriminants ``D`` in an interval; both name the same fields
(``D = d`` when ``d ≡ 1 (mod 4)``, ``D = 4d`` otherwise). The interval is cut
into chunks aligned to multiples of the chunk size, so the same command always
produces the same chunks, and two overlapping ranges share their inner chunks.

>>> squarefree_in(2, 20)
[2, 3, 5, 6, 7, 10, 11, 13, 14, 15, 17, 19]
>>> fundamental_discriminants_in(5, 30)
[5, 8, 12, 13, 17, 21, 24, 28, 29]
>>> [(c.lo, c.hi) for c in SurveyRange("d", 2, 25).chunks(10)]
[(2, 9), (10, 19), (20, 25)]

Reference: the squarefree numbers are OEIS A005117 and the positive
fundamental discriminants OEIS A003658.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import Literal

from realquad.core.integers import isqrt
from realquad.core.primes import primes_below
from realquad.errors import InputError

Kind = Literal["d", "D"]

#: Default width of a chunk (in ``d`` or in ``D``).
DEFAULT_CHUNK_SIZE = 2000


def squarefree_in(lo: int, hi: int) -> list[int]:
    """The squarefree integers ``d`` with ``max(lo, 2) ≤ d ≤ hi``, by a segmented sieve."""
    lo = max(lo, 2)
    if hi < lo:
        return []
    marks = bytearray([1]) * (hi - lo + 1)
    for p in primes_below(isqrt(hi) + 1):
        q = p * p
        first = -(-lo // q) * q
        if first <= hi:
            marks[first - lo :: q] = bytearray(len(range(first, hi + 1, q)))
    return [lo + i for i, keep in enumerate(marks) if keep]


def fundamental_discriminants_in(lo: int, hi: int) -> list[int]:
    """The fundamental discriminants ``D > 1`` with ``lo ≤ D ≤ hi``, in increasing order."""
    odd = [d for d in squarefree_in(lo, hi) if d % 4 == 1]
    even = [4 * d for d in squarefree_in(-(-lo // 4), hi // 4) if d % 4 in (2, 3)]
    return sorted(odd + even)


@dataclass(frozen=True)
class Chunk:
    """One unit of work: the interval ``[lo, hi]`` of ``d`` (kind ``"d"``) or of ``D`` (kind ``"D"``)."""

    kind: Kind
    lo: int
    hi: int

    def radicands(self) -> list[int]:
        """The squarefree ``d`` of the fields in this chunk, in the chunk's order."""
        if self.kind == "d":
            return squarefree_in(self.lo, self.hi)
        return [D if D % 4 == 1 else D // 4 for D in fundamental_discriminants_in(self.lo, self.hi)]


@dataclass(frozen=True)
class SurveyRange:
    """The fields of a survey: ``d`` (kind ``"d"``) or ``D`` (kind ``"D"``) in ``[lo, hi]``."""

    kind: Kind
    lo: int
    hi: int

    def __post_init__(self) -> None:
        name = "d" if self.kind == "d" else "D"
        if self.kind not in ("d", "D"):
            raise InputError(f"unknown range kind {self.kind!r}")
        if self.lo > self.hi:
            raise InputError(
                f"empty range: {name}-min {self.lo} is larger than {name}-max {self.hi}"
            )
        if self.lo < 2 and self.hi < 2:
            raise InputError(f"empty range: no real quadratic field has {name} ≤ {self.hi}")
        if not self.count_hint():
            raise InputError(
                f"empty range: no real quadratic field has {name} in [{self.lo}, {self.hi}]"
            )

    def count_hint(self) -> bool:
        """Whether the range holds at least one field (checked on a short prefix only if large)."""
        if self.hi - self.lo < 64:
            return bool(Chunk(self.kind, self.lo, self.hi).radicands())
        return True  # any 64 consecutive integers ≥ 2 hold squarefree d of both kinds

    def chunks(self, size: int = DEFAULT_CHUNK_SIZE) -> Iterator[Chunk]:
        """The chunks covering the range, aligned to multiples of ``size``."""
        if size < 1:
            raise InputError(f"chunk size must be at least 1, got {size}")
        start = max(self.lo, 1)
        while start <= self.hi:
            stop = min((start // size + 1) * size - 1, self.hi)
            yield Chunk(self.kind, start, stop)
            start = stop + 1
