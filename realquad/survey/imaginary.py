"""Survey rows of imaginary quadratic fields ``Q(√d)``, ``d < 0``, and the batch class numbers.

An imaginary field has no unit of infinite order: its row holds ``D``, ``h``
(``= h⁺``), the structure of ``Cl`` (``= Cl⁺``) and ``w``, the number of
roots of unity (6 for ``D = −3``, 4 for ``D = −4``, else 2); the unit
columns are empty.

**Two routes, both exact and unconditional.**

* *Batch* (a run computes it once for all its chunks, :func:`with_class_numbers`):
  the class numbers of every field up to ``|D|`` come at once from theta
  series (:mod:`realquad.classgroup.theta`: the sums of three squares for
  ``D ≢ 1 (mod 8)``, three other ternary forms for ``D ≡ 1 (mod 8)`` unless
  3, 5 and 7 all split);
  with ``h`` known, the structure needs only the Sylow subgroups of order
  ``p^e``, ``e ≥ 2``, walked alone
  (:func:`~realquad.classgroup.imaginary.class_invariants_from_class_number`).
* *Field by field*: for the fields the series do not give (``D ≡ 1 (mod 8)``
  with 3, 5, 7 split, about one in 24), and for every field when the batch is
  not used, ``h`` by counting the reduced forms without building them
  (:func:`~realquad.classgroup.imaginary.count_reduced_forms`, about
  ``√|D|`` word operations), then the structure as above.

>>> rows = imaginary_fields([-1, -3, -5, -14, -23])
>>> [(r.discriminant, r.class_number, r.class_group, r.roots_of_unity) for r in rows]
[(-4, 1, '[]', 4), (-3, 1, '[]', 6), (-20, 2, '[2]', 2), (-56, 4, '[4]', 2), (-23, 3, '[3]', 2)]
>>> rows[2].unit_norm, rows[2].regulator, rows[2].proof
(None, None, 'unconditional')
>>> chunk = with_class_numbers([Chunk("d", -320, -1)])[0]
>>> known = dict(zip(chunk.radicands(), chunk_class_numbers(chunk)))
>>> known[-314], known[-313], known[-311]   # 3, 5 and 7 split in Q(√−311): 0, field by field
(26, 8, 0)

References: A. S. Mosunov and M. J. Jacobson Jr., "Unconditional class group
tabulation of imaginary quadratic fields to ``|Δ|`` < 2⁴⁰", *Math. Comp.* 85
(2016), 1983–2009 (class numbers from theta series, then the structure from
the factorisation of ``h``).
"""

from __future__ import annotations

import json
from collections.abc import Sequence
from dataclasses import dataclass, replace
from functools import lru_cache
from typing import overload

from realquad.classgroup.imaginary import (
    COUNT_METHOD,
    structures_of_discriminants,
)
from realquad.classgroup.theta import MAX_TERMS, theta_counts
from realquad.classgroup.theta import METHOD as THETA_METHOD
from realquad.core.executors import InProcessExecutor
from realquad.core.integers import isqrt
from realquad.core.orders import fundamental_discriminant_of
from realquad.core.primes import primes_below
from realquad.survey.compute import FieldRecord
from realquad.survey.ranges import Chunk

#: The method of a row whose class number came from the batch.
METHOD_BATCH = (
    f"class number: {THETA_METHOD}; structure: the Sylow subgroups of the reduced forms, h known"
)
#: The method of a row computed alone.
METHOD_ALONE = (
    f"class number: {COUNT_METHOD}; structure: the Sylow subgroups of the reduced forms, h known"
)
#: The methods of the rows (:attr:`ImaginaryRows.method` indexes them).
METHODS = (METHOD_BATCH, METHOD_ALONE)
#: ``w`` of the two fields with more roots of unity than ``±1`` (:func:`realquad.units.unit_group`).
ROOTS_OF_UNITY = {-3: 6, -4: 4}


def imaginary_fields(ds: list[int], class_numbers: Sequence[int] = ()) -> list[FieldRecord]:
    """The survey rows of ``Q(√d)`` for the squarefree ``d < 0`` in ``ds``, in order.

    ``class_numbers`` (as :func:`chunk_class_numbers` gives them): ``h`` of each field
    where the batch proved it, ``0`` where it did not; empty: none known.
    """
    return list(imaginary_rows(ds, class_numbers))


def imaginary_rows(ds: list[int], class_numbers: Sequence[int] = ()) -> ImaginaryRows:
    """The rows of :func:`imaginary_fields` in columns (what a survey's workers send)."""
    if not ds:
        return ImaginaryRows((), (), (), (), ())
    primes = primes_below(isqrt(-4 * min(ds) // 3) + 2)
    known = list(class_numbers) or [0] * len(ds)
    discriminants = [d if d % 4 == 1 else 4 * d for d in ds]  # the range sieved d squarefree
    # genus theory: the 2-rank is t − 1, t = ω(d), and one more when d ≡ 3 (mod 4)
    two_ranks = [
        t + (d % 4 == 3) - 1
        for d, t in zip(ds, _prime_counts([-d for d in ds], primes), strict=True)
    ]
    hs, structures = structures_of_discriminants(discriminants, known, two_ranks, primes)
    return ImaginaryRows(
        tuple(ds),
        tuple(discriminants),
        tuple(hs),
        tuple(map(_text, structures)),
        tuple(0 if h else 1 for h in known),
    )


@lru_cache(maxsize=65536)
def _text(invariants: tuple[int, ...]) -> str:
    """The JSON of a structure (few distinct ones: each written once)."""
    return json.dumps(list(invariants))


@dataclass(frozen=True)
class ImaginaryRows(Sequence[FieldRecord]):  # a RowColumns (survey.compute)
    """The rows of imaginary fields in columns: a survey sends millions of them from its
    workers to the store (about 1 µs a row, against 6 µs as :class:`FieldRecord` objects).

    Indexing gives :class:`FieldRecord` objects; ``method`` indexes :data:`METHODS`.
    """

    d: tuple[int, ...]
    discriminant: tuple[int, ...]
    class_number: tuple[int, ...]
    class_group: tuple[str, ...]
    method: tuple[int, ...]

    def __len__(self) -> int:
        return len(self.d)

    @overload
    def __getitem__(self, index: int) -> FieldRecord: ...

    @overload
    def __getitem__(self, index: slice) -> list[FieldRecord]: ...

    def __getitem__(self, index: int | slice) -> FieldRecord | list[FieldRecord]:
        if isinstance(index, slice):
            return [self[i] for i in range(*index.indices(len(self)))]
        D, h, text = self.discriminant[index], self.class_number[index], self.class_group[index]
        return FieldRecord(
            d=self.d[index],
            discriminant=D,
            class_number=h,
            narrow_class_number=h,
            class_group=text,
            narrow_class_group=text,
            roots_of_unity=ROOTS_OF_UNITY.get(D, 2),
            unit_norm=None,
            regulator=None,
            period_length=None,
            unit_digits=None,
            method=METHODS[self.method[index]],
            proof="unconditional",
        )

    def methods(self) -> set[str]:
        """The methods of the rows."""
        return {METHODS[i] for i in set(self.method)}

    def store_values(self, method_ids: dict[str, int], chunk: int) -> list[tuple[object, ...]]:
        """The rows as the store inserts them: ``(d, D, h, structure, w, method id, chunk)``."""
        ids = [method_ids.get(m, 0) for m in METHODS]
        return [
            (d, D, h, text, ROOTS_OF_UNITY.get(D, 2), ids[m], chunk)
            for d, D, h, text, m in zip(
                self.d, self.discriminant, self.class_number, self.class_group, self.method
            )
        ]


#: Numbers farther apart than this are sieved in separate segments.
_SEGMENT_GAP = 1 << 16


def _prime_counts(ns: list[int], primes: list[int]) -> list[int]:
    """The number of distinct prime factors of each ``n`` in ``ns`` (positive, squarefree;
    ``primes`` reach ``√max(ns)``), by a sieve over the segments of nearby ``n``.

    >>> _prime_counts([1, 2, 30, 1001, 10**6 + 1, 3 * 10**6 + 3], primes_below(2000))
    [0, 1, 3, 3, 2, 3]
    """
    import numpy as np

    if not ns:
        return []
    order = sorted(range(len(ns)), key=ns.__getitem__)
    counts = [0] * len(ns)
    start = 0
    while start < len(order):
        stop = start + 1
        while stop < len(order) and ns[order[stop]] - ns[order[stop - 1]] <= _SEGMENT_GAP:
            stop += 1
        lo, hi = ns[order[start]], ns[order[stop - 1]]
        rest = np.arange(lo, hi + 1, dtype=np.int64)
        found = np.zeros(hi - lo + 1, dtype=np.int64)
        for p in primes:
            if p * p > hi:
                break
            first = (-lo) % p
            found[first::p] += 1
            rest[first::p] //= p  # squarefree: p once
        found += rest > 1
        for i in order[start:stop]:
            counts[i] = int(found[ns[i] - lo])
        start = stop
    return counts


def imaginary_chunk(chunk: Chunk) -> ImaginaryRows:
    """The rows of every field of an imaginary chunk (with its batch class numbers, if any)."""
    ds = chunk.radicands()
    return imaginary_rows(ds, chunk_class_numbers(chunk, ds))


def with_class_numbers(
    chunks: list[Chunk], executor: InProcessExecutor | None = None, fields: int | None = None
) -> list[Chunk]:
    """The imaginary ``chunks`` with the class numbers the batch proves attached.

    One series up to the largest ``|D|`` of the chunks serves them all. It
    pays when the chunks hold a fair share of the fields below that ``|D|``
    (at least one in :data:`BATCH_SHARE`; a full range holds about 3 in 10);
    a few fields far out, or more than
    :data:`~realquad.classgroup.theta.MAX_TERMS` terms, go field by field.
    ``executor`` computes the series side by side (see
    :func:`~realquad.classgroup.theta.theta_counts`); ``fields`` is the
    number of fields of the chunks if the caller knows it. Each chunk gets
    the slice of the series it needs (:attr:`Chunk.theta`); its worker reads
    the class numbers (:func:`chunk_class_numbers`).
    """
    if not chunks:
        return chunks
    largest = largest_discriminant(chunks)
    if fields is None:
        fields = sum(len(chunk.radicands()) for chunk in chunks)
    if not batch_pays(largest, fields):
        return chunks
    counts = theta_counts(largest, executor)
    return [replace(chunk, theta=counts.window(*_theta_range(chunk))) for chunk in chunks]


def _theta_range(chunk: Chunk) -> tuple[tuple[int, int], tuple[int, int]]:
    """The odd ``|D|`` and the ``|D|/4`` of the fields of an imaginary chunk (intervals)."""
    odd = (-chunk.hi, -chunk.lo)
    return odd, (odd if chunk.kind == "d" else (-chunk.hi // 4, -chunk.lo // 4))


def chunk_class_numbers(chunk: Chunk, radicands: list[int] | None = None) -> tuple[int, ...]:
    """The class numbers the batch proved for the fields of ``chunk`` (in the order of its
    radicands, ``0`` where it gives none), read from its slice of the theta series; empty
    when the batch was not used. ``radicands``: the chunk's, when the caller has them."""
    if chunk.class_numbers or chunk.theta is None:
        return chunk.class_numbers
    ds = chunk.radicands() if radicands is None else radicands
    return tuple(chunk.theta.class_numbers([fundamental_discriminant_of(d) for d in ds]))


#: The batch is used when the fields to compute are at least ``1/BATCH_SHARE`` of ``max |D|``.
BATCH_SHARE = 40


def batch_pays(largest: int, fields: int) -> bool:
    """Whether one series to ``|D| = largest`` is worth it for ``fields`` fields (see above).

    >>> batch_pays(10**6, 303_968), batch_pays(8 * 10**6, 607), batch_pays(10**9, 10**9)
    (True, False, False)
    """
    return 0 < largest <= MAX_TERMS and fields * BATCH_SHARE >= largest


def largest_discriminant(chunks: list[Chunk]) -> int:
    """The largest ``|D|`` the imaginary ``chunks`` can hold (``4|d|`` for a range of ``d``).

    >>> largest_discriminant([Chunk("d", -30, -21), Chunk("D", -50, -41)])
    120
    """
    return max((-c.lo * (4 if c.kind == "d" else 1) for c in chunks), default=0)
