"""Run a survey: compute every field of a range into the store, resumably.

:func:`tabulate` skips the chunks the store has already completed, sends the
others to an executor (this process, local processes or Dask) and writes
each finished chunk in one transaction from this process. Interrupting it
(Ctrl-C, or a kill at any instant) loses at most the chunks in flight; the
same call again resumes.

>>> import os, tempfile
>>> path = os.path.join(tempfile.mkdtemp(), "demo.sqlite")
>>> with SurveyStore.open_for_writing(path) as store:
...     first = tabulate(SurveyRange("d", 2, 30), store, chunk_size=10)
...     again = tabulate(SurveyRange("d", 2, 30), store, chunk_size=10)
>>> (first.total_fields, first.computed_fields, first.computed_chunks)
(18, 18, 4)
>>> (again.computed_fields, again.skipped_fields, again.skipped_chunks)
(0, 18, 4)
"""

from __future__ import annotations

import contextlib
import time
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from realquad.core.executors import InProcessExecutor
from realquad.survey.compute import survey_chunk
from realquad.survey.imaginary import (
    batch_pays,
    imaginary_chunk,
    largest_discriminant,
    with_class_numbers,
)
from realquad.survey.progress import Mode, SurveyProgress, note
from realquad.survey.ranges import Chunk, SurveyRange, default_chunk_size
from realquad.survey.store import BULK_FIELDS, SurveyStore


@dataclass
class SurveyOutcome:
    """What a run did: ``computed`` fields in ``seconds``, ``skipped`` ones found in the store."""

    database: str
    total_fields: int
    computed_fields: int = 0
    skipped_fields: int = 0
    computed_chunks: int = 0
    skipped_chunks: int = 0
    seconds: float = 0.0
    executor: str = ""

    @property
    def rate(self) -> float:
        return self.computed_fields / self.seconds if self.seconds > 0 else 0.0


class SurveyInterrupted(KeyboardInterrupt):
    """Ctrl-C during :func:`tabulate`; ``outcome`` says what was saved before it."""

    def __init__(self, outcome: SurveyOutcome) -> None:
        super().__init__("survey interrupted")
        self.outcome = outcome


def tabulate(
    survey_range: SurveyRange,
    store: SurveyStore,
    executor: InProcessExecutor | None = None,
    chunk_size: int | None = None,
    progress: Mode = "quiet",
    chunk_function: Callable[[Chunk], Any] | None = None,
) -> SurveyOutcome:
    """Compute the missing chunks of ``survey_range`` into ``store``.

    ``store`` must be open for writing (it holds the writer lock); the range
    is recorded in it with the first chunk saved (so ``survey report`` can say
    what is missing), and the executor is closed at the end. On ``KeyboardInterrupt`` the executor's
    workers are ended and the interrupt is raised again: every chunk saved
    so far stays saved. The chunks are computed by ``chunk_function``, by
    default :func:`~realquad.survey.compute.survey_chunk` for real fields and
    :func:`~realquad.survey.imaginary.imaginary_chunk` for imaginary ones,
    whose chunks first get the class numbers of the batch method
    (:func:`~realquad.survey.imaginary.with_class_numbers`, in this process).
    """
    executor = executor or InProcessExecutor()
    if chunk_function is None:
        chunk_function = imaginary_chunk if survey_range.imaginary else survey_chunk
    try:
        chunks = list(survey_range.chunks(chunk_size or default_chunk_size(survey_range.imaginary)))
        counts = {c: c.size() for c in chunks}
        todo = [c for c in chunks if not store.is_done(c)]
        if survey_range.imaginary and chunk_function is imaginary_chunk and todo:
            largest = largest_discriminant(todo)
            # seconds or minutes before the first chunk: say what happens
            loud = batch_pays(largest, sum(counts[c] for c in todo)) and largest > 10**6
            if loud:
                note(
                    progress, f"survey: class numbers to |D| = {largest:,} from theta series first"
                )
            begun = time.perf_counter()
            todo = with_class_numbers(todo, executor, sum(counts[c] for c in todo))
            if loud:
                note(progress, f"survey: theta series done in {time.perf_counter() - begun:.1f} s")
        store.begin_run(survey_range)
        outcome = SurveyOutcome(store.path, sum(counts.values()), executor=executor.description)
        outcome.skipped_chunks = len(chunks) - len(todo)
        outcome.skipped_fields = outcome.total_fields - sum(counts[c] for c in todo)
        start = time.perf_counter()
        bulk = sum(counts[c] for c in todo) >= BULK_FIELDS
        with SurveyProgress(outcome.total_fields, progress, done=outcome.skipped_fields) as bar:
            try:
                with store.bulk_writes() if bulk else contextlib.nullcontext():
                    for chunk, rows, seconds in executor.map_unordered(todo, chunk_function):
                        outcome.computed_fields += store.save_chunk(chunk, rows, seconds)
                        outcome.computed_chunks += 1
                        bar.advance(len(rows))
                    if bulk:
                        note(progress, "survey: indexing the class numbers")
            except KeyboardInterrupt:
                raise SurveyInterrupted(outcome) from None
            finally:
                outcome.seconds = time.perf_counter() - start
    finally:
        executor.close()
    return outcome
