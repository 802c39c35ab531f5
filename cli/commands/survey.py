"""``realquad survey run/query/report``: tabulate fields over a range, query the table, statistics."""

from __future__ import annotations

import csv
import io
import json
from dataclasses import replace
from functools import partial
from typing import Any

import click
from realquad_cli.output import Command, Group, IntegerRange, emit, json_option
from realquad_cli.parallel import parallel_options, parse_parallel

from realquad.core.executors import make_executor
from realquad.core.integers import as_integer
from realquad.errors import InputError
from realquad.latex import escape, group, table
from realquad.survey.compute import FieldRecord
from realquad.survey.conditions import parse_decimal, parse_group, parse_p_rank
from realquad.survey.plots import check_plot_path, plot_report
from realquad.survey.progress import choose_mode
from realquad.survey.ranges import (
    DEFAULT_CHUNK_SIZE,
    DEFAULT_IMAGINARY_CHUNK_SIZE,
    SurveyRange,
    default_chunk_size,
)
from realquad.survey.stats import ImaginaryReport, missing_json, missing_text, survey_report
from realquad.survey.store import COLUMNS, RowFilter, SurveyStore
from realquad.survey.tabulate import SurveyInterrupted, tabulate
from realquad.textio import MINUS, group_text

DEFAULT_DB = "realquad-survey.sqlite"

#: Largest d (or D) a survey accepts: rows keep d and D in SQLite's 64-bit integers.
MAX_BOUND = 10**15


def _db_option(f: Any) -> Any:
    return click.option(
        "--db",
        "db",
        type=str,
        default=DEFAULT_DB,
        show_default=True,
        metavar="FILE",
        help="The survey database (SQLite).",
    )(f)


def _bound(value: str | None, name: str, default: int | None = None) -> int | None:
    if value is None:
        return default
    n = as_integer(value, name)
    if n < 1:
        raise InputError(f"{name} must be a positive integer, got {n}")
    if n > MAX_BOUND:
        raise InputError(f"{name} must be at most {MAX_BOUND:,}, got {n}")
    return n


def _signed_bound(value: str | None, name: str) -> int | None:
    """A bound on ``d`` or ``D``: either sign (negative for imaginary fields)."""
    if value is None:
        return None
    n = as_integer(value, name)
    if abs(n) > MAX_BOUND:
        raise InputError(f"{name} must be at most {MAX_BOUND:,} in absolute value, got {n}")
    return n


def _range_options(f: Any, by_discriminant: bool = False) -> Any:
    """``--d-min`` and ``--d-max`` (with ``by_discriminant``, their meaning under ``--discriminants``)."""
    also = " (with --discriminants: {} D)" if by_discriminant else ""
    f = click.option(
        "--d-max",
        "d_max",
        type=str,
        default=None,
        metavar="N",
        help="Largest d" + also.format("largest") + ".",
    )(f)
    f = click.option(
        "--d-min",
        "d_min",
        type=str,
        default=None,
        metavar="N",
        help="Smallest d" + also.format("smallest") + ".",
    )(f)
    return f


@click.group("survey", cls=Group)
def command() -> None:
    """Tabulate every quadratic field Q(√d) in a range (d > 1 or d < 0) into a database; query it; report on it.

    Example: realquad survey run --d-max 10000; realquad survey query --class-number 1; realquad survey report
    """


@command.command("run", cls=Command)
@partial(_range_options, by_discriminant=True)
@click.option(
    "--discriminants", is_flag=True, help="Bound the fundamental discriminant D instead of d."
)
@_db_option
@parallel_options("chunks")
@click.option(
    "--chunk-size",
    type=str,
    default=None,
    metavar="N",
    help=f"Width of a chunk of d (default {DEFAULT_CHUNK_SIZE}; "
    f"{DEFAULT_IMAGINARY_CHUNK_SIZE} for imaginary fields).",
)
@json_option
def run_command(
    d_min: str | None,
    d_max: str | None,
    discriminants: bool,
    db: str,
    workers: str | None,
    scheduler: str | None,
    chunk_size: str | None,
    as_json: bool,
) -> None:
    """Compute h, h⁺, Cl⁺, unit norm, regulator, period and digits of ε for every field in the range.

    Negative bounds survey imaginary fields (h, Cl, w; no unit): --d-min -100000 --d-max -1.

    Rerun the same command to resume after an interruption: finished chunks are skipped.
    Example: realquad survey run --d-min 2 --d-max 100000 --workers 2
    """
    lo = _signed_bound(d_min, "--d-min")
    hi = _signed_bound(d_max, "--d-max")
    if hi is None:
        raise InputError("give --d-max N (the largest d of the survey)")
    if lo is None:
        if hi < 0:
            raise InputError("give --d-min N (the most negative d of a survey of imaginary fields)")
        lo = 2
    size = _bound(chunk_size, "--chunk-size", default_chunk_size(hi < 0))
    count, scheduler = parse_parallel(workers, scheduler)
    assert lo is not None and size is not None
    survey_range = SurveyRange("D" if discriminants else "d", lo, hi)
    # Check the database before anything else touches it, then reach the workers, then open it.
    SurveyStore.check_writable(db)
    executor = make_executor(count, scheduler)
    try:
        store = SurveyStore.open_for_writing(db)
    except BaseException:
        executor.close()
        raise
    with store:
        try:
            outcome = tabulate(survey_range, store, executor, size, choose_mode(as_json))
        except SurveyInterrupted as stop:
            done = stop.outcome
            click.echo(
                f"realquad: survey stopped; {done.computed_fields:,} fields of this run saved in {db} "
                f"({done.skipped_fields + done.computed_fields:,} of {done.total_fields:,} in all); "
                "rerun the same command to resume",
                err=True,
            )
            raise
    name = "D" if discriminants else "d"
    payload = {
        "database": db,
        "range": {"kind": name, "min": lo, "max": hi},
        "fields": outcome.total_fields,
        "computed": outcome.computed_fields,
        "skipped": outcome.skipped_fields,
        "chunks_computed": outcome.computed_chunks,
        "chunks_skipped": outcome.skipped_chunks,
        "seconds": f"{outcome.seconds:.3f}",
        "fields_per_second": f"{outcome.rate:.1f}",
        "executor": outcome.executor,
    }
    text = (
        f"survey of {outcome.total_fields:,} fields with {name} in [{lo}, {hi}] in {db}: "
        f"{outcome.computed_fields:,} computed in {outcome.seconds:.1f} s "
        f"({outcome.rate:,.0f} fields/s, {outcome.executor}), {outcome.skipped_fields:,} already there"
    )
    emit(payload, text, as_json, latex=lambda md: _run_latex(payload))


def _row_filter(
    class_number: str | None,
    narrow: str | None,
    unit_norm: str | None,
    d_min: str | None,
    d_max: str | None,
) -> RowFilter:
    norm = None
    if unit_norm is not None:
        norm = as_integer(unit_norm, "--unit-norm")
        if norm not in (1, -1):
            raise InputError(f"--unit-norm must be +1 or -1, got {norm}")
    lo, hi = _signed_bound(d_min, "--d-min"), _signed_bound(d_max, "--d-max")
    if lo is not None and hi is not None and lo > hi:
        raise InputError(f"empty range: --d-min {lo} is larger than --d-max {hi}")
    return RowFilter(
        class_number=_bound(class_number, "--class-number"),
        narrow_class_number=_bound(narrow, "--narrow-class-number"),
        unit_norm=norm,
        d_min=lo,
        d_max=hi,
    )


def _filter_options(f: Any) -> Any:
    f = _range_options(f)
    f = click.option(
        "--unit-norm",
        type=str,
        default=None,
        metavar="±1",
        help="Only fields whose fundamental unit has this norm.",
    )(f)
    f = click.option(
        "--narrow-class-number",
        "narrow",
        type=str,
        default=None,
        metavar="K",
        help="Only fields with h⁺ = K.",
    )(f)
    f = click.option(
        "--class-number", type=str, default=None, metavar="K", help="Only fields with h = K."
    )(f)
    return f


#: The keys of a survey row (``docs/json.md``, *SurveyRow*), in the order of the CSV columns.
ROW_KEYS = list(FieldRecord(0, 0, 0, 0, "[]", "[]", 2, 1, "", 0, 0, "", "unconditional").to_dict())
#: ``--sort`` names: the keys of a row (as printed by --json and --csv) and the store's columns.
SORT_COLUMNS = {
    **dict(zip(ROW_KEYS, COLUMNS, strict=True)),
    **{column: column for column in COLUMNS},
}


def _query_options(f: Any) -> Any:
    """The conditions only ``query`` takes (on structures, primes, regulators) and the sort."""
    for option in reversed(
        [
            click.option(
                "--class-group",
                "class_group",
                type=str,
                default=None,
                metavar="GROUP",
                help='Only fields whose class group Cl is GROUP ("C2 x C2", "2,2", "Z/2 x Z/4", "1").',
            ),
            click.option(
                "--narrow-class-group",
                "narrow_class_group",
                type=str,
                default=None,
                metavar="GROUP",
                help="Only fields whose narrow class group Cl⁺ is GROUP.",
            ),
            click.option(
                "--p-rank",
                "p_ranks",
                type=str,
                multiple=True,
                metavar="P=R",
                help="Only fields where R invariant factors of Cl are divisible by the prime P "
                "(2=2: 2-rank 2). Repeatable.",
            ),
            click.option(
                "--narrow-p-rank",
                "narrow_p_ranks",
                type=str,
                multiple=True,
                metavar="P=R",
                help="The same for Cl⁺. Repeatable.",
            ),
            click.option("--prime-d", is_flag=True, help="Only fields with d prime."),
            click.option(
                "--prime-discriminant",
                is_flag=True,
                help="Only fields whose discriminant D is prime (D = d ≡ 1 mod 4).",
            ),
            click.option(
                "--regulator-min",
                type=str,
                default=None,
                metavar="X",
                help="Only fields with regulator ≥ X (exact decimal comparison).",
            ),
            click.option(
                "--regulator-max",
                type=str,
                default=None,
                metavar="X",
                help="Only fields with regulator ≤ X (exact decimal comparison).",
            ),
            click.option(
                "--sort",
                type=str,
                default=None,
                metavar="COLUMN",
                help=f"Sort by COLUMN ({', '.join(ROW_KEYS)}) instead of d.",
            ),
            click.option("--desc", "descending", is_flag=True, help="Sort in decreasing order."),
        ]
    ):
        f = option(f)
    return f


def _query_filter(base: RowFilter, conditions: dict[str, Any]) -> RowFilter:
    """``base`` with the conditions of :func:`_query_options`, checked (bad ones raise InputError)."""
    p_ranks = tuple(parse_p_rank(text) for text in conditions["p_ranks"])
    narrow_p_ranks = tuple(parse_p_rank(text) for text in conditions["narrow_p_ranks"])
    lo = conditions["regulator_min"]
    hi = conditions["regulator_max"]
    low = None if lo is None else parse_decimal(lo, "--regulator-min")
    high = None if hi is None else parse_decimal(hi, "--regulator-max")
    if low is not None and high is not None and low > high:
        raise InputError(f"empty range: --regulator-min {lo} is larger than --regulator-max {hi}")
    groups = {
        key: None if conditions[key] is None else parse_group(conditions[key])
        for key in ("class_group", "narrow_class_group")
    }
    return replace(
        base,
        class_group=groups["class_group"],
        narrow_class_group=groups["narrow_class_group"],
        p_ranks=p_ranks,
        narrow_p_ranks=narrow_p_ranks,
        prime_d=conditions["prime_d"],
        prime_discriminant=conditions["prime_discriminant"],
        regulator_min=low,
        regulator_max=high,
    )


def _sort_column(sort: str | None) -> str | None:
    if sort is None:
        return None
    name = sort.strip()
    if name not in SORT_COLUMNS:
        raise InputError(
            f"--sort takes a key of the rows ({', '.join(ROW_KEYS)}), got {sort[:40]!r}"
        )
    return SORT_COLUMNS[name]


@command.command("query", cls=Command)
@_filter_options
@_query_options
@_db_option
@click.option(
    "--limit",
    type=IntegerRange(0),
    default=1000,
    show_default=True,
    help="Most rows printed (0 = all).",
)
@click.option(
    "--csv", "as_csv", is_flag=True, help="Print CSV (a header line, then one line per field)."
)
@json_option
def query_command(
    class_number: str | None,
    narrow: str | None,
    unit_norm: str | None,
    d_min: str | None,
    d_max: str | None,
    db: str,
    limit: int,
    as_csv: bool,
    as_json: bool,
    sort: str | None,
    descending: bool,
    **conditions: Any,
) -> None:
    """Print the surveyed fields that match every condition given, in increasing d (or --sort).

    Example: realquad survey query --class-group "C2 x C2" --prime-d --sort regulator --desc
    """
    if as_csv and as_json:
        raise InputError("give --csv or --json, not both")
    where = _query_filter(_row_filter(class_number, narrow, unit_norm, d_min, d_max), conditions)
    column = _sort_column(sort)
    with SurveyStore.open_for_reading(db) as store:
        matching = store.count(where)
        found = store.rows(where, limit or None, sort=column, descending=descending)
        rows = [FieldRecord(**row).to_dict() for row in found]
        missing = store.missing(where.d_min, where.d_max)
    incomplete = missing_text(missing)
    if as_csv:
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\n")
        writer.writerow(ROW_KEYS)
        writer.writerows([_csv_cell(row[k]) for k in ROW_KEYS] for row in rows)
        click.echo(buffer.getvalue(), nl=False)
        if len(rows) < matching:
            click.echo(
                f"realquad: {matching - len(rows):,} more rows not printed (--limit 0 prints all)",
                err=True,
            )
        if incomplete:
            click.echo(f"realquad: {incomplete}", err=True)
        return
    payload = {
        "database": db,
        "matching": matching,
        "shown": len(rows),
        "rows": rows,
        "missing": missing_json(missing),
    }
    lines = [
        f"{'d':>10} {'D':>11} {'h':>5} {'h⁺':>5} {'Cl':>12} {'Cl⁺':>12} {'w':>2} {'N(ε)':>5} {'regulator':>20} {'period':>7} {'digits':>7}"
    ]
    for r in rows:
        norm, regulator, period, digits = (
            _dash(v) for v in (r["unit_norm"], r["regulator"], r["period_length"], r["digits"])
        )
        if r["unit_norm"] is not None:
            norm = "+1" if r["unit_norm"] > 0 else f"{MINUS}1"
        lines.append(
            f"{_minus(r['radicand']):>10} {_minus(r['discriminant']):>11} {r['class_number']:>5} "
            f"{r['narrow_class_number']:>5} {group_text(r['invariants']):>12} "
            f"{group_text(r['narrow_invariants']):>12} {r['roots_of_unity']:>2} {norm:>5} "
            f"{regulator:>20} {period:>7} {digits:>7}"
        )
    lines.append(
        f"{matching:,} matching fields"
        + (f", first {len(rows):,} shown (--limit 0 for all)" if len(rows) < matching else "")
    )
    if incomplete:
        lines.append(incomplete)
    comments = [lines[-2] if incomplete else lines[-1]] + ([incomplete] if incomplete else [])
    emit(payload, "\n".join(lines), as_json, latex=lambda md: _rows_latex(rows, comments))


def _dash(value: Any) -> str:
    """A table cell: ``—`` for a value an imaginary field does not have."""
    return "—" if value is None else str(value)


def _minus(n: int) -> str:
    """An integer with the typographic minus sign."""
    return str(n).replace("-", MINUS)


def _csv_cell(value: Any) -> Any:
    """A CSV cell: invariant lists as their JSON text (``[2, 2]``), the rest as they are."""
    return json.dumps(value) if isinstance(value, list) else value


def _percent(share: float | None) -> str:
    return "—" if share is None else f"{100 * share:.3f}%"


def _distribution_text(counts: dict[int, int], total: int, shown: int = 12) -> str:
    items = list(counts.items())
    parts = [f"{k}: {v:,} ({100 * v / total:.2f}%)" for k, v in items[:shown]]
    if len(items) > shown:
        parts.append(f"… {len(items) - shown} more values up to {items[-1][0]}")
    return "; ".join(parts)


@command.command("report", cls=Command)
@_range_options
@_db_option
@click.option(
    "--top",
    type=IntegerRange(1, 1000),
    default=10,
    show_default=True,
    help="How many of the largest regulators to list.",
)
@click.option(
    "--plot",
    "plot",
    type=str,
    default=None,
    metavar="FILE.png",
    help="Also draw the statistics into a PNG file (needs matplotlib).",
)
@json_option
def report_command(
    d_min: str | None, d_max: str | None, db: str, top: int, plot: str | None, as_json: bool
) -> None:
    """Statistics of the surveyed fields: h = 1, Cohen–Lenstra, distribution of h, unit norms, regulators.

    Example: realquad survey report --plot survey.png
    """
    where = _row_filter(None, None, None, d_min, d_max)
    if plot is not None:
        check_plot_path(plot)
    with SurveyStore.open_for_reading(db) as store:
        report = survey_report(store, where, top)
        if report.fields == 0 and report.imaginary is None:
            raise InputError(f"no surveyed fields in {db!r} match the range")
        if plot is not None:
            plot_report(report, store, plot, where)
    payload = {"database": db, **report.to_dict()}
    n = report.fields
    lines = []
    if n:
        lines += [
            f"{n:,} fields with d in [{report.d_min}, {report.d_max}] ({db}); proof: {report.proof}",
            f"class number 1: {report.class_number_one:,} ({_percent(report.class_number_one_share)})",
            f"prime d ≡ 1 (mod 4): {report.prime_fields:,} fields, h = 1 for {report.prime_class_number_one:,} "
            f"({_percent(report.prime_share)}); Cohen–Lenstra prediction {100 * report.prediction:.3f}%",
            f"unit norm {MINUS}1: {report.unit_norm_minus_one:,} ({_percent(report.unit_norm_minus_one_share)})",
            "h: " + _distribution_text(report.class_number_counts, n),
            "odd part of h: " + _distribution_text(report.odd_part_counts, n),
            "largest regulators: "
            + ", ".join(
                f"d = {r['radicand']}: {r['regulator']}" for r in report.largest_regulators
            ),
        ]
    if report.imaginary is not None:
        lines += _imaginary_lines(report.imaginary, db, report.proof)
    incomplete = missing_text(report.missing)
    if incomplete:
        lines.append(incomplete)
    if plot is not None:
        payload["plot"] = plot
        lines.append(f"plot written to {plot}")
    emit(payload, "\n".join(lines), as_json, latex=lambda md: _report_latex(report, db))


def _imaginary_lines(part: ImaginaryReport, db: str, proof: str) -> list[str]:
    """The text of the imaginary section of a report."""
    n = part.fields
    ones = ", ".join(_minus(d) for d in part.class_number_one) or "none"
    largest = ", ".join(
        f"d = {_minus(r['radicand'])}: {r['class_number']:,}" for r in part.largest_class_numbers
    )
    return [
        f"{n:,} imaginary fields with d in [{_minus(part.d_min)}, {_minus(part.d_max)}] ({db}); "
        f"proof: {proof}",
        f"class number 1: {len(part.class_number_one):,} (d = {ones})",
        f"3 divides h: {part.three_divides:,} ({_percent(part.three_share)}); "
        f"Cohen–Lenstra prediction {100 * part.prediction:.3f}%",
        "h: " + _distribution_text(part.class_number_counts, n),
        "largest class numbers: " + largest,
    ]


# --latex: the tables of a paper


def _comments(lines: list[str]) -> str:
    """``% line`` for each line (what a table cannot say: counts, proof, missing chunks)."""
    return "\n".join(f"% {line}" for line in lines)


def _cell(value: Any) -> str:
    """A table cell: ``--`` for a missing value, else the value escaped."""
    return "--" if value is None else escape(str(value))


def _run_latex(payload: dict[str, Any]) -> str:
    """A survey run as a two-column table of its counts and timing."""
    span = payload["range"]
    rows = [
        [f"${span['kind']}$", f"${span['min']} \\le {span['kind']} \\le {span['max']}$"],
        ["fields", _cell(payload["fields"])],
        ["computed", _cell(payload["computed"])],
        ["already there", _cell(payload["skipped"])],
        ["seconds", _cell(payload["seconds"])],
        ["fields per second", _cell(payload["fields_per_second"])],
        ["executor", _cell(payload["executor"])],
    ]
    return (
        table("lr", ["survey", "value"], rows)
        + "\n"
        + _comments([f"database: {payload['database']}"])
    )


def _rows_latex(rows: list[dict[str, Any]], notes: list[str]) -> str:
    """The queried fields as a table: d, D, h, h⁺, Cl, Cl⁺, w, N(ε), regulator, period, digits."""
    header = [
        "$d$", "$D$", "$h$", "$h^{+}$", "$\\mathrm{Cl}$", "$\\mathrm{Cl}^{+}$", "$w$",
        "$N(\\varepsilon)$", "$R$", "period", "digits",
    ]  # fmt: skip
    body = [
        [
            *(f"${r[k]}$" for k in ("radicand", "discriminant")),
            *(_cell(r[k]) for k in ("class_number", "narrow_class_number")),
            f"${group(r['invariants'])}$",
            f"${group(r['narrow_invariants'])}$",
            _cell(r["roots_of_unity"]),
            "--" if r["unit_norm"] is None else f"${r['unit_norm']:+d}$",
            *(_cell(r[k]) for k in ("regulator", "period_length", "digits")),
        ]
        for r in rows
    ]
    return table("rrrrllrrlrr", header, body, narrow=True) + "\n" + _comments(notes)


def _share_latex(value: float | None) -> str:
    return "--" if value is None else f"{100 * value:.3f}\\%"


def _report_latex(report: Any, db: str) -> str:
    """The statistics as tables (count and share of each), real and imaginary fields apart."""
    tables: list[str] = []
    notes: list[str] = []
    if report.fields:
        rows = [
            [
                "$h = 1$",
                _cell(report.class_number_one),
                _share_latex(report.class_number_one_share),
            ],
            [
                "$h = 1$, $d \\equiv 1 \\pmod 4$ prime",
                _cell(report.prime_class_number_one),
                _share_latex(report.prime_share),
            ],
            ["Cohen--Lenstra prediction", "", _share_latex(report.prediction)],
            [
                "$N(\\varepsilon) = -1$",
                _cell(report.unit_norm_minus_one),
                _share_latex(report.unit_norm_minus_one_share),
            ],
        ]
        tables.append(table("lrr", ["real fields", "fields", "share"], rows))
        largest = ([_cell(r["radicand"]), _cell(r["regulator"])] for r in report.largest_regulators)
        tables.append(table("rl", ["$d$", "$R$"], largest))
        notes.append(f"{report.fields:,} real fields with d in [{report.d_min}, {report.d_max}]")
    part = report.imaginary
    if part is not None:
        rows = [
            [
                "$h = 1$",
                _cell(len(part.class_number_one)),
                _share_latex(len(part.class_number_one) / part.fields),
            ],
            ["$3 \\mid h$", _cell(part.three_divides), _share_latex(part.three_share)],
            ["Cohen--Lenstra prediction", "", _share_latex(part.prediction)],
        ]
        tables.append(table("lrr", ["imaginary fields", "fields", "share"], rows))
        largest = (
            [f"${r['radicand']}$", _cell(r["class_number"])] for r in part.largest_class_numbers
        )
        tables.append(table("rr", ["$d$", "$h$"], largest))
        notes.append(f"{part.fields:,} imaginary fields with d in [{part.d_min}, {part.d_max}]")
    notes.append(f"database {db}; proof: {report.proof}")
    incomplete = missing_text(report.missing)
    if incomplete:
        notes.append(incomplete)
    return "\n\n".join(tables) + "\n" + _comments(notes)
