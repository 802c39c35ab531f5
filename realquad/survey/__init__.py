"""Surveys: tabulate every real quadratic field in a range into a resumable SQLite store.

* :mod:`~realquad.survey.ranges` — squarefree ``d`` / fundamental discriminants, chunks;
* :mod:`~realquad.survey.compute` — the invariants of one field (one row);
* :mod:`~realquad.survey.dbfile` — which paths may hold a store, its header, the writer's lock;
* :mod:`~realquad.survey.store` — the SQLite store (schema, chunk transactions, missing parts);
* :mod:`~realquad.core.executors` — this process, local processes, Dask;
* :mod:`~realquad.survey.progress` — progress bar or periodic lines;
* :mod:`~realquad.survey.tabulate` — the resumable run;
* :mod:`~realquad.survey.stats` and :mod:`~realquad.survey.plots` — report and pictures.
"""

from realquad.core.executors import make_executor
from realquad.survey.compute import FieldRecord, survey_field
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.stats import COHEN_LENSTRA_PRIME_SHARE, SurveyReport, survey_report
from realquad.survey.store import RowFilter, SurveyStore
from realquad.survey.tabulate import SurveyOutcome, tabulate

__all__ = [
    "COHEN_LENSTRA_PRIME_SHARE",
    "Chunk",
    "FieldRecord",
    "RowFilter",
    "SurveyOutcome",
    "SurveyRange",
    "SurveyReport",
    "SurveyStore",
    "make_executor",
    "survey_field",
    "survey_report",
    "tabulate",
]
