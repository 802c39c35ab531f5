"""Ranges of quadratic fields and their division into chunks.

A survey runs over the squarefree radicands ``d`` in an interval, or over the
fundamental discriminants ``D`` in an interval; both name the same fields
(``D = d`` when ``d ≡ 1 (mod 4)``, ``D = 4d`` otherwise). A range lies on one
side of 0: the real fields (``d ≥ 2``) or the imaginary ones (``d ≤ −1``,
``D ≤ −3``). The interval is cut
into chunks aligned to multiples of the chunk size, so the same command always
produces the same chunks, and two overlapping ranges share their inner chunks.

>>> squarefree_in(2, 20)
[2, 3, 5, 6, 7, 10, 11, 13, 14, 15, 17, 19]
>>> fundamental_discriminants_in(5, 30)
[5, 8, 12, 13, 17, 21, 24, 28, 29]
>>> [(c.lo, c.hi) for c in SurveyRange("d", 2, 25).chunks(10)]
[(2, 9), (10, 19), (20, 25)]
>>> negative_radicands_in(-11, -1)
[-11, -10, -7, -6, -5, -3, -2, -1]
>>> Chunk("D", -24, -3).radicands()   # D = −24, −23, −20, −19, −15, −11, −8, −7, −4, −3
[-6, -23, -5, -19, -15, -11, -2, -7, -1, -3]

Reference: the squarefree numbers are OEIS A005117 and the positive
fundamental discriminants OEIS A003658.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any, Literal

from realquad.core.integers import isqrt
from realquad.core.orders import fundamental_discriminant_of
from realquad.core.primes import primes_below
from realquad.errors import InputError

Kind = Literal["d", "D"]

#: Default width of a chunk (in ``d`` or in ``D``) of real fields.
DEFAULT_CHUNK_SIZE = 2000
#: Default width of a chunk of imaginary fields (each takes microseconds: one store
#: transaction for thousands of them).
DEFAULT_IMAGINARY_CHUNK_SIZE = 20_000


def default_chunk_size(imaginary: bool) -> int:
    """The default chunk width of a range of real or imaginary fields."""
    return DEFAULT_IMAGINARY_CHUNK_SIZE if imaginary else DEFAULT_CHUNK_SIZE


def _squarefree_marks(lo: int, hi: int) -> bytearray:
    """``marks[n − lo]`` is 1 when ``n`` is squarefree (``2 ≤ lo ≤ n ≤ hi``): a segmented sieve."""
    marks = bytearray([1]) * (hi - lo + 1)
    for p in primes_below(isqrt(hi) + 1):
        q = p * p
        first = -(-lo // q) * q
        if first <= hi:
            marks[first - lo :: q] = bytearray(len(range(first, hi + 1, q)))
    return marks


def squarefree_in(lo: int, hi: int) -> list[int]:
    """The squarefree integers ``d`` with ``max(lo, 2) ≤ d ≤ hi``, by a segmented sieve."""
    lo = max(lo, 2)
    if hi < lo:
        return []
    return [lo + i for i, keep in enumerate(_squarefree_marks(lo, hi)) if keep]


def _squarefree_count(lo: int, hi: int, residues: tuple[int, ...] = (0, 1, 2, 3)) -> int:
    """The number of squarefree ``n`` with ``max(lo, 2) ≤ n ≤ hi`` and ``n mod 4`` in
    ``residues``: the sieve of :func:`squarefree_in` without the list."""
    lo = max(lo, 2)
    if hi < lo:
        return 0
    marks = _squarefree_marks(lo, hi)
    return sum(marks[(r - lo) % 4 :: 4].count(1) for r in residues)


def negative_radicands_in(lo: int, hi: int) -> list[int]:
    """The squarefree ``d < 0`` with ``lo ≤ d ≤ min(hi, −1)``, in increasing order."""
    hi = min(hi, -1)
    if hi < lo:
        return []
    magnitudes = squarefree_in(-hi, -lo)
    if hi == -1:
        magnitudes.insert(0, 1)
    return [-m for m in reversed(magnitudes)]


def fundamental_discriminants_in(lo: int, hi: int) -> list[int]:
    """The fundamental discriminants ``D > 1`` with ``lo ≤ D ≤ hi``, in increasing order."""
    odd = [d for d in squarefree_in(lo, hi) if d % 4 == 1]
    even = [4 * d for d in squarefree_in(-(-lo // 4), hi // 4) if d % 4 in (2, 3)]
    return sorted(odd + even)


@dataclass(frozen=True)
class Chunk:
    """One unit of work: the interval ``[lo, hi]`` of ``d`` (kind ``"d"``) or of ``D`` (kind ``"D"``).

    ``class_numbers`` (not part of the chunk's identity) may carry, for an
    imaginary chunk, the class numbers of its fields in the order of
    :meth:`radicands` as the run's batch method proved them, ``0`` where it
    gives none; ``theta`` (neither) the batch's theta series cut to the chunk,
    from which the worker reads them (see :mod:`realquad.survey.imaginary`).
    """

    kind: Kind
    lo: int
    hi: int
    class_numbers: tuple[int, ...] = field(default=(), compare=False, repr=False)
    theta: Any = field(default=None, compare=False, repr=False)

    @property
    def label(self) -> str:
        """Words for this chunk in messages."""
        return f"the chunk {self.kind} in [{self.lo}, {self.hi}]"

    def radicands(self) -> list[int]:
        """The squarefree ``d`` of the fields in this chunk, in the chunk's order."""
        if self.hi < 0:
            return self._negative_radicands()
        if self.kind == "d":
            return squarefree_in(self.lo, self.hi)
        return [D if D % 4 == 1 else D // 4 for D in fundamental_discriminants_in(self.lo, self.hi)]

    def size(self) -> int:
        """The number of fields in this chunk, ``len(self.radicands())``, without listing them.

        >>> [Chunk(k, lo, hi).size() for k, lo, hi in (("D", -24, -3), ("d", 2, 30), ("D", 5, 60))]
        [10, 18, 18]
        """
        lo, hi = self.lo, self.hi
        if hi < 0:
            if self.kind == "d":  # |d| squarefree in [-hi, -lo], 1 included
                return _squarefree_count(-hi, -lo) + (hi == -1)
            hi = min(hi, -3)  # D = d ≡ 1 (mod 4): |d| ≡ 3; D = 4d, d ≡ 2, 3: |d| ≡ 2, 1
            even_lo, even_hi = -(-lo // 4), min(hi // 4, -1)
            odd = _squarefree_count(-hi, -lo, (3,)) if hi >= lo else 0
            if even_hi < even_lo:
                return odd
            return odd + _squarefree_count(-even_hi, -even_lo, (1, 2)) + (even_hi == -1)
        if self.kind == "d":
            return _squarefree_count(lo, hi)
        return _squarefree_count(lo, hi, (1,)) + _squarefree_count(-(-lo // 4), hi // 4, (2, 3))

    def _negative_radicands(self) -> list[int]:
        if self.kind == "d":
            return negative_radicands_in(self.lo, self.hi)
        lo, hi = self.lo, min(self.hi, -3)
        odd = [d for d in negative_radicands_in(lo, hi) if d % 4 == 1]
        even = [d for d in negative_radicands_in(-(-lo // 4), hi // 4) if d % 4 in (2, 3)]
        return sorted(odd + even, key=fundamental_discriminant_of)  # in the order of D


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
        if self.lo < 0 and self.hi >= 2:
            raise InputError(
                f"the range [{self.lo}, {self.hi}] holds {name} of both signs: survey the "
                "imaginary fields (negative) and the real fields (positive) as two runs"
            )
        if self.lo < 0:  # no field has d or D in [0, 1]
            object.__setattr__(self, "hi", min(self.hi, -1))
            if not self.count_hint():
                raise InputError(
                    f"empty range: no imaginary quadratic field has {name} in [{self.lo}, {self.hi}]"
                )
            return
        if self.lo < 2 and self.hi < 2:
            raise InputError(f"empty range: no real quadratic field has {name} ≤ {self.hi}")
        if not self.count_hint():
            raise InputError(
                f"empty range: no real quadratic field has {name} in [{self.lo}, {self.hi}]"
            )

    @property
    def imaginary(self) -> bool:
        """Whether the range holds imaginary fields (``d < 0``).

        >>> SurveyRange("d", -5, 1).imaginary, SurveyRange("d", -5, 1).hi
        (True, -1)
        """
        return self.hi < 0

    def count_hint(self) -> bool:
        """Whether the range holds at least one field (checked on a short prefix only if large)."""
        return has_fields(self.kind, self.lo, self.hi)

    def chunks(self, size: int = DEFAULT_CHUNK_SIZE) -> Iterator[Chunk]:
        """The chunks covering the range, aligned to multiples of ``size``."""
        if size < 1:
            raise InputError(f"chunk size must be at least 1, got {size}")
        start = self.lo if self.hi < 0 else max(self.lo, 1)
        while start <= self.hi:
            stop = min((start // size + 1) * size - 1, self.hi)
            yield Chunk(self.kind, start, stop)
            start = stop + 1


#: A part of a range: ``(kind, lo, hi)`` with inclusive bounds.
Interval = tuple[Kind, int, int]


def merge_intervals(intervals: list[tuple[int, int]]) -> list[tuple[int, int]]:
    """The union of inclusive integer intervals, as sorted disjoint intervals (touching ones joined).

    >>> merge_intervals([(10, 19), (2, 9), (30, 40), (35, 50)])
    [(2, 19), (30, 50)]
    """
    merged: list[tuple[int, int]] = []
    for lo, hi in sorted(intervals):
        if merged and lo <= merged[-1][1] + 1:
            merged[-1] = (merged[-1][0], max(merged[-1][1], hi))
        else:
            merged.append((lo, hi))
    return merged


def clip_intervals(
    intervals: list[tuple[int, int]], lo: int | None, hi: int | None
) -> list[tuple[int, int]]:
    """The union of ``intervals`` cut to ``[lo, hi]`` (``None``: no bound on that side).

    >>> clip_intervals([(2, 100), (50, 300)], 20, None)
    [(20, 300)]
    """
    low = lo if lo is not None else -(2**63)
    high = hi if hi is not None else 2**63
    return [
        (max(a, low), min(b, high)) for a, b in merge_intervals(intervals) if a <= high and b >= low
    ]


def subtract_intervals(
    wanted: list[tuple[int, int]], done: list[tuple[int, int]]
) -> list[tuple[int, int]]:
    """The parts of ``wanted`` that no interval of ``done`` covers, sorted and disjoint.

    >>> subtract_intervals([(2, 100)], [(2, 19), (40, 59), (90, 200)])
    [(20, 39), (60, 89)]
    """
    covered = merge_intervals(done)
    gaps: list[tuple[int, int]] = []
    for lo, hi in merge_intervals(wanted):
        start = lo
        for a, b in covered:
            if b < start or a > hi:
                continue
            if a > start:
                gaps.append((start, a - 1))
            start = b + 1
            if start > hi:
                break
        if start <= hi:
            gaps.append((start, hi))
    return gaps


def has_fields(kind: Kind, lo: int, hi: int) -> bool:
    """Whether some field has ``d`` (kind ``"d"``) or ``D`` (kind ``"D"``) in ``[lo, hi]``.

    Decided exactly for short intervals; any 64 consecutive integers hold
    fields of both kinds.

    >>> has_fields("d", 4, 4), has_fields("D", 9, 11), has_fields("d", 2, 1000)
    (False, False, True)
    """
    if hi - lo >= 64:
        return True
    if hi < 0:
        return bool(Chunk(kind, lo, hi).radicands())
    return bool(Chunk(kind, max(lo, 1), hi).radicands()) if hi >= 2 else False
