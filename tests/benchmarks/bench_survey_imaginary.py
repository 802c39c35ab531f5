"""Imaginary survey workloads for the benchmark runner (``tests/benchmarks/run.py``).

Target (issue 14): every fundamental discriminant −10⁸ ≤ D < 0 (about 3·10⁷
fields, exact and unconditional) in ≤ 10 minutes on 2 cores. The workloads
time the batch class numbers (the theta series) to 10⁶ and 10⁷, samples of
about 6000 consecutive fields near |D| = 10⁶, 10⁷, 10⁸ computed from their
batch class numbers (against the same fields computed one by one from their
reduced forms), and a whole survey of −10⁶ ≤ D < 0 through the store with
two worker processes.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable
from typing import Any

from realquad.classgroup.theta import theta_counts
from realquad.core.executors import make_executor
from realquad.survey.imaginary import chunk_class_numbers, imaginary_fields, with_class_numbers
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.store import SurveyStore
from realquad.survey.tabulate import tabulate

WIDTH = 20_000
TARGET = "−10⁸ ≤ D < 0 in 10 min: ≥ 25,000 fields/s per core on average"


def _chunk(size: int) -> Chunk:
    """The fields with −size ≤ D < −size + 20000, with the class numbers the series give (the
    series to |D| = size computed here, as a survey of the whole range would: about a minute
    for 10⁸)."""
    return with_class_numbers([Chunk("D", -size, -size + WIDTH)], fields=size)[0]


def _rows(chunk: Chunk, batch: bool) -> Callable[[], Any]:
    ds = chunk.radicands()
    known = chunk_class_numbers(chunk) if batch else ()

    def run() -> int:
        return sum(row.class_number for row in imaginary_fields(ds, known))

    return run


def _whole_survey(d_min: int, workers: int) -> Callable[[], Any]:
    def run() -> int:
        with tempfile.TemporaryDirectory() as tmp:
            with SurveyStore.open_for_writing(os.path.join(tmp, "bench.sqlite")) as store:
                outcome = tabulate(
                    SurveyRange("D", d_min, -1), store, make_executor(workers), chunk_size=20_000
                )
        return outcome.computed_fields

    return run


def workloads() -> list[dict[str, Any]]:
    items: list[dict[str, Any]] = []
    for exponent in (6, 7):
        items.append(
            {
                "name": f"imaginary survey: theta series to 10^{exponent}",
                "run": lambda n=10**exponent: theta_counts(n).n_max,
                "reference": None,
                "reference_name": None,
                "repeat": 1,
            }
        )
    for exponent in (6, 7, 8):
        chunk = _chunk(10**exponent)
        items.append(
            {
                "name": f"imaginary survey: rows near |D| = 10^{exponent}",
                "run": _rows(chunk, True),
                "reference": _rows(chunk, False),
                "reference_name": "the same rows field by field (reduced forms counted)",
                "repeat": 3,
                "reference_repeat": 1,
                "count": len(chunk.radicands()),
                "unit": "fields",
                "target": TARGET,
            }
        )
    items.append(
        {
            "name": "imaginary survey: every −10^6 ≤ D < 0, store, 2 workers",
            "run": _whole_survey(-(10**6), 2),
            "reference": None,
            "reference_name": None,
            "repeat": 1,
            "count": 303_968,
            "unit": "fields",
        }
    )
    return items
