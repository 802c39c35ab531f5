"""Statistics of a survey: class number one, Cohen–Lenstra, unit norms, regulators.

:func:`survey_report` reads the store once and returns a :class:`SurveyReport`:

* the number and share of fields with ``h = 1``;
* among the prime ``d ≡ 1 (mod 4)`` (so ``D = d`` is prime, and ``h`` is odd
  by genus theory), the share with ``h = 1``, against the Cohen–Lenstra
  prediction :data:`COHEN_LENSTRA_PRIME_SHARE` ≈ 75.446 %;
* the distribution of ``h`` and of its odd part;
* the share of fields whose fundamental unit has norm −1;
* the fields with the largest regulators;
* the parts of the surveyed ranges that are missing (chunks not computed,
  after an interrupted run), from :meth:`SurveyStore.missing`.

Those are over the real fields; the imaginary fields (``d < 0``) of the same
rows get their own section, an :class:`ImaginaryReport`: the fields with
``h = 1`` (by Heegner, Baker and Stark exactly ``d = −1, −2, −3, −7, −11,
−19, −43, −67, −163``), the distribution of ``h``, and the share with
``3 | h`` against the Cohen–Lenstra prediction for imaginary quadratic
fields, ``1 − ∏_{k ≥ 1} (1 − 3^−k) = 0.4398739…``
(:data:`COHEN_LENSTRA_THREE_DIVIDES`, Cohen–Lenstra 1984, as above; the
tests recompute the product), with the running share for the plot.

The prediction is the Cohen–Lenstra probability that the odd part of the
class group of a real quadratic field is trivial,
``∏_{p odd prime} ∏_{k ≥ 2} (1 − p^−k) = 0.754458…`` (H. Cohen and
H. W. Lenstra Jr., "Heuristics on class groups of number fields", *Number
Theory Noordwijkerhout 1983*, Lecture Notes in Math. 1068, Springer 1984,
pp. 33–62, where the 75.446 % for prime discriminants is stated; the tests
recompute the product). The share converges slowly: in small ranges it
lies well above the prediction.

>>> odd_part(12), odd_part(7), odd_part(16)
(3, 7, 1)
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from typing import Any

from realquad.core.primes import primes_below
from realquad.core.results import JSONObject
from realquad.survey.ranges import Interval
from realquad.survey.store import RowFilter, SurveyStore

#: Cohen–Lenstra: the predicted share of ``h = 1`` among real quadratic fields of prime discriminant.
COHEN_LENSTRA_PRIME_SHARE = 0.75445817
#: Cohen–Lenstra: the predicted share of ``3 | h`` among imaginary quadratic fields.
COHEN_LENSTRA_THREE_DIVIDES = 0.43987392


def _decimal(value: float | None) -> str | None:
    """A share as a decimal string (the JSON convention for real numbers), 8 places."""
    return None if value is None else f"{value:.8f}"


def missing_json(parts: list[Interval]) -> list[dict[str, Any]]:
    """The parts of a survey not computed, as SurveyRange objects (``docs/json.md``).

    >>> missing_json([("d", 4001, 10000)])
    [{'kind': 'd', 'min': 4001, 'max': 10000}]
    """
    return [{"kind": kind, "min": lo, "max": hi} for kind, lo, hi in parts]


def missing_text(parts: list[Interval]) -> str | None:
    """One line naming the parts not computed, or ``None`` when nothing is missing.

    >>> missing_text([("d", 4001, 6000), ("d", 8001, 10000)])
    "incomplete: d in [4001, 6000], [8001, 10000] not computed yet (rerun 'realquad survey run' over that range)"
    """
    if not parts:
        return None
    pieces = []
    for kind in ("d", "D"):
        spans = [f"[{lo}, {hi}]" for k, lo, hi in parts if k == kind]
        if spans:
            pieces.append(f"{kind} in " + ", ".join(spans))
    return (
        "incomplete: "
        + "; ".join(pieces)
        + " not computed yet (rerun 'realquad survey run' over that range)"
    )


def odd_part(n: int) -> int:
    """``n`` with every factor 2 removed."""
    while n and n % 2 == 0:
        n //= 2
    return n


@dataclass(frozen=True)
class SurveyReport:
    """Counts and shares over the rows of a survey (see the module docstring)."""

    fields: int
    d_min: int | None
    d_max: int | None
    class_number_one: int
    prime_fields: int
    prime_class_number_one: int
    unit_norm_minus_one: int
    class_number_counts: dict[int, int]
    odd_part_counts: dict[int, int]
    largest_regulators: list[dict[str, Any]]
    proof: str
    prediction: float = COHEN_LENSTRA_PRIME_SHARE
    prediction_source: str = (
        "Cohen and Lenstra, Heuristics on class groups of number fields, LNM 1068 (1984)"
    )
    running_prime_share: list[tuple[int, float]] = field(default_factory=list, repr=False)
    missing: list[Interval] = field(default_factory=list)
    imaginary: ImaginaryReport | None = None

    def to_dict(self) -> JSONObject:
        """The JSON shape of a survey report (``docs/json.md``, *SurveyReport*): shares as decimal strings."""
        return {
            "fields": self.fields,
            "d_min": self.d_min,
            "d_max": self.d_max,
            "class_number_one": {
                "count": self.class_number_one,
                "share": _decimal(self.class_number_one_share),
            },
            "prime_discriminants": {
                "fields": self.prime_fields,
                "class_number_one": self.prime_class_number_one,
                "share": _decimal(self.prime_share),
                "cohen_lenstra_prediction": _decimal(self.prediction),
                "prediction_source": self.prediction_source,
            },
            "class_number_distribution": {str(k): v for k, v in self.class_number_counts.items()},
            "odd_part_distribution": {str(k): v for k, v in self.odd_part_counts.items()},
            "unit_norm_minus_one": {
                "count": self.unit_norm_minus_one,
                "share": _decimal(self.unit_norm_minus_one_share),
            },
            "largest_regulators": list(self.largest_regulators),
            "proof": self.proof,
            "missing": missing_json(self.missing),
            "imaginary": None if self.imaginary is None else self.imaginary.to_dict(),
        }

    @staticmethod
    def _share(part: int, whole: int) -> float | None:
        return part / whole if whole else None

    @property
    def class_number_one_share(self) -> float | None:
        return self._share(self.class_number_one, self.fields)

    @property
    def prime_share(self) -> float | None:
        return self._share(self.prime_class_number_one, self.prime_fields)

    @property
    def unit_norm_minus_one_share(self) -> float | None:
        return self._share(self.unit_norm_minus_one, self.fields)


@dataclass(frozen=True)
class ImaginaryReport:
    """Counts and shares over the imaginary fields of a survey (see the module docstring)."""

    fields: int
    d_min: int
    d_max: int
    class_number_one: list[int]
    three_divides: int
    class_number_counts: dict[int, int]
    largest_class_numbers: list[dict[str, Any]]
    prediction: float = COHEN_LENSTRA_THREE_DIVIDES
    running_three_share: list[tuple[int, float]] = field(default_factory=list, repr=False)

    @property
    def three_share(self) -> float:
        return self.three_divides / self.fields

    def to_dict(self) -> JSONObject:
        """The JSON shape (``docs/json.md``, *ImaginaryReport*)."""
        return {
            "fields": self.fields,
            "d_min": self.d_min,
            "d_max": self.d_max,
            "class_number_one": list(self.class_number_one),
            "three_divides": {
                "count": self.three_divides,
                "share": _decimal(self.three_share),
                "cohen_lenstra_prediction": _decimal(self.prediction),
                "prediction_source": SurveyReport.prediction_source,
            },
            "class_number_distribution": {str(k): v for k, v in self.class_number_counts.items()},
            "largest_class_numbers": list(self.largest_class_numbers),
        }


def _imaginary_report(rows: list[tuple[Any, ...]], top: int) -> ImaginaryReport | None:
    """The imaginary section over ``(d, D, h, …)`` rows with ``d < 0``, by increasing ``|D|``."""
    if not rows:
        return None
    ordered = sorted(rows, key=lambda r: -r[1])
    counts: Counter[int] = Counter()
    three = 0
    running: list[tuple[int, float]] = []
    step = max(1, len(ordered) // 2000)  # about 2000 points for the plot
    for i, (_d, D, h, *_rest) in enumerate(ordered, 1):
        counts[h] += 1
        three += h % 3 == 0
        if i % step == 0 or i == len(ordered):
            running.append((-D, three / i))
    ranked = sorted(ordered, key=lambda r: (-r[2], -r[1]))[:top]
    return ImaginaryReport(
        fields=len(rows),
        d_min=min(r[0] for r in rows),
        d_max=max(r[0] for r in rows),
        class_number_one=sorted((r[0] for r in rows if r[2] == 1), reverse=True),
        three_divides=three,
        class_number_counts=dict(sorted(counts.items())),
        largest_class_numbers=[
            {"radicand": d, "discriminant": D, "class_number": h} for d, D, h, *_ in ranked
        ],
        running_three_share=running,
    )


def survey_report(
    store: SurveyStore, where: RowFilter | None = None, top: int = 10
) -> SurveyReport:
    """The statistics of the rows of ``store`` matching ``where``, and what of its range is missing."""
    every = store.column_values(
        ["d", "discriminant", "class_number", "unit_norm", "regulator", "proof"], where
    )
    rows = [r for r in every if r[0] > 0]
    imaginary = _imaginary_report([r for r in every if r[0] < 0], top)
    d_max = rows[-1][0] if rows else 0
    prime = bytearray(d_max + 1)
    for p in primes_below(d_max + 1):
        prime[p] = 1
    h_counts: Counter[int] = Counter()
    odd_counts: Counter[int] = Counter()
    h1 = minus = primes = primes_h1 = 0
    running: list[tuple[int, float]] = []
    for d, _D, h, norm, _reg, _proof in rows:
        h_counts[h] += 1
        odd_counts[odd_part(h)] += 1
        h1 += h == 1
        minus += norm == -1
        if d % 4 == 1 and prime[d]:
            primes += 1
            primes_h1 += h == 1
            running.append((d, primes_h1 / primes))
    ranked = sorted(rows, key=lambda r: float(r[4]), reverse=True)[:top]
    largest = [
        {"radicand": d, "discriminant": D, "regulator": reg, "class_number": h}
        for d, D, h, _n, reg, _p in ranked
    ]
    return SurveyReport(
        fields=len(rows),
        d_min=rows[0][0] if rows else None,
        d_max=rows[-1][0] if rows else None,
        class_number_one=h1,
        prime_fields=primes,
        prime_class_number_one=primes_h1,
        unit_norm_minus_one=minus,
        class_number_counts=dict(sorted(h_counts.items())),
        odd_part_counts=dict(sorted(odd_counts.items())),
        largest_regulators=largest,
        proof="GRH" if any(r[5] == "GRH" for r in every) else "unconditional",
        running_prime_share=running,
        imaginary=imaginary,
        missing=store.missing(where.d_min, where.d_max) if where else store.missing(),
    )
