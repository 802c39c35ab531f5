"""Pictures of a survey (needs matplotlib: ``pip install 'realquad[plot]'``).

:func:`plot_report` draws three panels into one PNG file: the running share
of ``h = 1`` among prime ``d ≡ 1 (mod 4)`` against the Cohen–Lenstra
prediction, the histogram of ``h``, and the regulator against ``√D`` on
logarithmic axes (the regulator grows at most like ``√D log D``, and
``h·R ≈ √D`` on average by the class number formula). For imaginary fields a
second row: the running share of ``3 | h`` against the Cohen–Lenstra
prediction 43.987 %, the histogram of ``h``, and ``h`` against ``√|D|``
(``h = w·√|D|·L(1, χ)/(2π)``, so ``h/√|D|`` stays between slowly varying
bounds). The file is written through a temporary file and a rename, so it is
never half-written.
"""

from __future__ import annotations

import math
import os
import tempfile
from typing import Any

from realquad.errors import InputError
from realquad.survey.stats import ImaginaryReport, SurveyReport
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


def _real_panels(report: SurveyReport, rows: list[tuple[Any, ...]], left, middle, right) -> None:  # type: ignore[no-untyped-def]
    """Class number one among prime discriminants, the distribution of h, regulators against √D."""
    _share_panel(
        left,
        report.running_prime_share,
        report.prediction,
        "Cohen–Lenstra 75.446 %",
        ("prime d ≡ 1 (mod 4) up to", "share with h = 1 (%)"),
        "class number one, prime discriminants",
    )
    _distribution_panel(middle, report.class_number_counts, report.fields)
    _log_scatter(
        right,
        [math.sqrt(D) for _, D, _, _ in rows],
        [float(r) for *_, r in rows],
        ("√D", "regulator R"),
        "regulator against √D",
    )


def _imaginary_panels(
    part: ImaginaryReport, rows: list[tuple[Any, ...]], left, middle, right
) -> None:  # type: ignore[no-untyped-def]
    """The share of 3 | h, the distribution of h, and h against √|D| (imaginary fields)."""
    _share_panel(
        left,
        part.running_three_share,
        part.prediction,
        "Cohen–Lenstra 43.987 %",
        ("|D| up to", "share with 3 | h (%)"),
        "3 divides h, imaginary fields",
    )
    _distribution_panel(middle, part.class_number_counts, part.fields)
    _log_scatter(
        right,
        [math.sqrt(-D) for _, D, _, _ in rows],
        [h for _, _, h, _ in rows],
        ("√|D|", "class number h"),
        "h against √|D| (imaginary fields)",
    )


def _share_panel(  # type: ignore[no-untyped-def]
    axis,
    running: list[tuple[int, float]],
    prediction: float,
    label: str,
    labels: tuple[str, str],
    title: str,
) -> None:
    """A running share (in per cent) against its predicted value."""
    if running:
        axis.plot([x for x, _ in running], [100 * y for _, y in running], lw=1, label="survey")
    axis.axhline(100 * prediction, color="red", ls="--", lw=1, label=label)
    axis.set_xlabel(labels[0])
    axis.set_ylabel(labels[1])
    axis.set_title(title)
    axis.legend(loc="best")


def _log_scatter(
    axis, xs: list[float], ys: list[float], labels: tuple[str, str], title: str
) -> None:  # type: ignore[no-untyped-def]
    """Points on logarithmic axes (none drawn for an empty list)."""
    if xs:
        axis.scatter(xs, ys, s=1, alpha=0.4)
        axis.set_xscale("log")
        axis.set_yscale("log")
    axis.set_xlabel(labels[0])
    axis.set_ylabel(labels[1])
    axis.set_title(title)


def _distribution_panel(axis, counts: dict[int, int], fields: int) -> None:  # type: ignore[no-untyped-def]
    if counts:
        axis.bar(list(counts), list(counts.values()), width=0.8)
        axis.set_yscale("log")
    axis.set_xlabel("class number h")
    axis.set_ylabel("fields")
    axis.set_title(f"distribution of h ({fields:,} fields)")


def plot_report(
    report: SurveyReport, store: SurveyStore, path: str, where: RowFilter | None = None
) -> None:
    """Draw the panels of ``report`` (and the regulators or class numbers of ``store``) into ``path``.

    One row of three panels for the real fields and one for the imaginary
    fields, for those the report holds.
    """
    check_plot_path(path)
    plt = _pyplot()
    parts = (["real"] if report.fields else []) + (["imaginary"] if report.imaginary else [])
    figure, axes = plt.subplots(len(parts), 3, figsize=(16, 4.8 * len(parts)), squeeze=False)
    values = store.column_values(["d", "discriminant", "class_number", "regulator"], where)
    for row, part in zip(axes, parts, strict=True):
        if part == "real":
            _real_panels(report, [v for v in values if v[0] > 0], *row)
        else:
            assert report.imaginary is not None
            _imaginary_panels(report.imaginary, [v for v in values if v[0] < 0], *row)
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
