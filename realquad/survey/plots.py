"""Pictures of a survey (needs matplotlib: ``pip install 'realquad[plot]'``).

:func:`plot_report` draws three panels into one PNG file: the running share
of ``h = 1`` among prime ``d ≡ 1 (mod 4)`` against the Cohen–Lenstra
prediction, the histogram of ``h``, and the regulator against ``√D`` on
logarithmic axes (the regulator grows at most like ``√D log D``, and
``h·R ≈ √D`` on average by the class number formula). The file is written
through a temporary file and a rename, so it is never half-written.
"""

from __future__ import annotations

import math
import os
import tempfile

from realquad.errors import InputError
from realquad.survey.stats import SurveyReport
from realquad.survey.store import RowFilter, SurveyStore


def _pyplot():  # type: ignore[no-untyped-def]
    try:
        import matplotlib

        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:
        raise InputError(
            "--plot needs the package 'matplotlib' (pip install 'realquad[plot]')"
        ) from None
    return plt


def check_plot_path(path: str) -> None:
    """Fail early unless ``path`` names a writable ``.png`` file."""
    if not path.lower().endswith(".png"):
        raise InputError(f"--plot writes PNG images: give a file name ending in .png, got {path!r}")
    directory = os.path.dirname(os.path.abspath(path))
    if not os.path.isdir(directory):
        raise InputError(f"cannot write {path!r}: no such directory")
    if os.path.isdir(path):
        raise InputError(f"cannot write {path!r}: it is a directory")
    _pyplot()


def plot_report(
    report: SurveyReport, store: SurveyStore, path: str, where: RowFilter | None = None
) -> None:
    """Draw the three panels of ``report`` (and the regulators of ``store``) into ``path``."""
    check_plot_path(path)
    plt = _pyplot()
    figure, (left, middle, right) = plt.subplots(1, 3, figsize=(16, 4.8))

    if report.running_prime_share:
        xs = [d for d, _ in report.running_prime_share]
        ys = [100 * s for _, s in report.running_prime_share]
        left.plot(xs, ys, lw=1, label="survey")
    left.axhline(
        100 * report.prediction, color="red", ls="--", lw=1, label="Cohen–Lenstra 75.446 %"
    )
    left.set_xlabel("prime d ≡ 1 (mod 4) up to")
    left.set_ylabel("share with h = 1 (%)")
    left.set_title("class number one, prime discriminants")
    left.legend(loc="best")

    counts = report.class_number_counts
    if counts:
        middle.bar(list(counts), list(counts.values()), width=0.8)
        middle.set_yscale("log")
    middle.set_xlabel("class number h")
    middle.set_ylabel("fields")
    middle.set_title(f"distribution of h ({report.fields:,} fields)")

    rows = store.column_values(["discriminant", "regulator"], where)
    if rows:
        right.scatter([math.sqrt(D) for D, _ in rows], [float(r) for _, r in rows], s=1, alpha=0.4)
        right.set_xscale("log")
        right.set_yscale("log")
    right.set_xlabel("√D")
    right.set_ylabel("regulator R")
    right.set_title("regulator against √D")

    figure.tight_layout()
    directory = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=".realquad-", suffix=".png", dir=directory)
    os.close(fd)
    try:
        figure.savefig(tmp, dpi=110, format="png")
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    finally:
        plt.close(figure)
