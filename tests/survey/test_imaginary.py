"""Surveys of imaginary fields: rows against OEIS and the reduced forms, the store, the report."""

from __future__ import annotations

import json
import sqlite3
from math import prod
from pathlib import Path

import pytest

from realquad.classgroup.imaginary import class_group_imaginary
from realquad.core.orders import Order
from realquad.errors import InputError
from realquad.survey.imaginary import (
    METHOD_ALONE,
    METHOD_BATCH,
    chunk_class_numbers,
    imaginary_fields,
    imaginary_rows,
    with_class_numbers,
)
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.stats import COHEN_LENSTRA_THREE_DIVIDES, survey_report
from realquad.survey.store import COLUMNS, SCHEMA_VERSION, RowFilter, SurveyStore
from realquad.survey.tabulate import tabulate
from tests.conftest import load_reference

OEIS = load_reference("oeis_imaginary.json")

#: Heegner, Baker, Stark: the imaginary quadratic fields of class number one.
HEEGNER = [-1, -2, -3, -7, -11, -19, -43, -67, -163]


@pytest.fixture(scope="module")
def imaginary_db(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("imaginary") / "s.sqlite"
    with SurveyStore.open_for_writing(str(path)) as store:
        tabulate(SurveyRange("d", -3000, -1), store, chunk_size=400)
    return path


def test_rows_against_oeis_a000924(imaginary_db: Path) -> None:
    # OEIS A000924: h(Q(√−n)) for the squarefree n = 1, 2, 3, 5, …
    terms = OEIS["A000924"]["terms"]
    with SurveyStore.open_for_reading(str(imaginary_db)) as store:
        rows = list(store.rows(RowFilter(d_max=-1), None, sort="d", descending=True))
    assert [r["class_number"] for r in rows[: len(terms)]] == terms


def test_rows_against_the_full_walk_and_both_routes_agree() -> None:
    ds = [d for d in range(-2500, 0) if all(d % (k * k) for k in range(2, 50))]
    chunk = with_class_numbers([Chunk("d", -2500, -1)])[0]
    assert chunk.radicands() == ds
    batch = imaginary_fields(ds, chunk_class_numbers(chunk))
    alone = imaginary_fields(ds)
    for a, b, known in zip(batch, alone, chunk_class_numbers(chunk), strict=True):
        D = a.discriminant
        G = class_group_imaginary(Order(D))
        assert (a.class_number, json.loads(a.class_group)) == (G.class_number, list(G.invariants))
        assert (b.class_number, b.class_group) == (a.class_number, a.class_group)
        assert a.method == (METHOD_BATCH if known else METHOD_ALONE)
        # the series give h unless D ≡ 1 (mod 8) and 3, 5, 7 all split (Euler's criterion)
        split = D % 8 == 1 and all(D % q and pow(D % q, (q - 1) // 2, q) == 1 for q in (3, 5, 7))
        assert bool(known) != split
        assert b.method == METHOD_ALONE
        assert a.narrow_class_number == a.class_number and a.proof == "unconditional"
        assert (a.unit_norm, a.regulator, a.period_length, a.unit_digits) == (None,) * 4
        assert a.roots_of_unity == {-4: 4, -3: 6}.get(D, 2)


def test_class_number_one_and_the_report(imaginary_db: Path) -> None:
    with SurveyStore.open_for_reading(str(imaginary_db)) as store:
        report = survey_report(store)
        assert store.count(RowFilter(class_number=1)) == len(HEEGNER)
    assert report.fields == 0  # no real fields
    part = report.imaginary
    assert part is not None and part.class_number_one == HEEGNER  # Heegner–Baker–Stark
    assert part.fields == sum(part.class_number_counts.values())
    assert part.three_divides == sum(v for h, v in part.class_number_counts.items() if h % 3 == 0)
    assert part.d_min == -2999 and part.d_max == -1
    data = report.to_dict()["imaginary"]
    assert data["three_divides"]["cohen_lenstra_prediction"] == "0.43987392"


def test_cohen_lenstra_three_divides_constant() -> None:
    # 1 − ∏_{k ≥ 1} (1 − 3^−k), recomputed (Cohen–Lenstra 1984)
    value = 1 - prod(1 - 3.0**-k for k in range(1, 60))
    assert abs(value - COHEN_LENSTRA_THREE_DIVIDES) < 5e-9


def test_a_store_holds_both_signs(tmp_path: Path) -> None:
    path = str(tmp_path / "both.sqlite")
    with SurveyStore.open_for_writing(path) as store:
        tabulate(SurveyRange("d", 2, 200), store, chunk_size=100)
        tabulate(SurveyRange("D", -400, -3), store, chunk_size=100)
        assert store.missing() == []
    with SurveyStore.open_for_reading(path) as store:
        report = survey_report(store)
        negative = list(store.rows(RowFilter(d_max=-1)))
    assert report.fields == 121 and report.imaginary is not None  # squarefree 2…200: OEIS A005117
    assert [r["d"] for r in negative] == sorted(r["d"] for r in negative)  # increasing d
    assert all(r["d"] < 0 and r["roots_of_unity"] in (2, 4, 6) for r in negative)
    assert all(r["discriminant"] >= -400 for r in negative)
    # A003657: 3, 4, 7, 8, 11, 15, 19, 20, 23, 24, … — the fundamental |D| ≤ 400 (122 of them)
    assert report.imaginary.fields == len(negative) == 122


def test_mixed_and_empty_ranges_are_refused() -> None:
    with pytest.raises(InputError, match="both signs"):
        SurveyRange("d", -10, 10)
    with pytest.raises(InputError, match="empty range"):
        SurveyRange("D", -6, -5)
    assert SurveyRange("d", -5, 1).hi == -1


_VERSION_1_FIELDS = """CREATE TABLE fields (
    d INTEGER PRIMARY KEY, discriminant INTEGER NOT NULL UNIQUE, class_number INTEGER NOT NULL,
    narrow_class_number INTEGER NOT NULL, class_group TEXT NOT NULL, narrow_class_group TEXT NOT NULL,
    unit_norm INTEGER NOT NULL CHECK (unit_norm IN (-1, 1)), regulator TEXT NOT NULL,
    period_length INTEGER NOT NULL, unit_digits INTEGER NOT NULL,
    method_id INTEGER NOT NULL REFERENCES methods (id),
    proof TEXT NOT NULL CHECK (proof IN ('unconditional', 'GRH')),
    chunk INTEGER NOT NULL REFERENCES chunks (id))"""


def _make_version_1(path: str) -> None:
    """Turn a new store of real fields into the layout of schema version 1 (no w, units NOT NULL)."""
    c = sqlite3.connect(path, isolation_level=None)
    old = [k for k in COLUMNS if k not in ("method", "roots_of_unity")]
    c.execute("BEGIN")
    c.execute("DROP VIEW field_rows")
    c.execute("ALTER TABLE fields RENAME TO fields_new")
    c.execute(_VERSION_1_FIELDS)
    cols = ", ".join(old + ["method_id", "chunk"])
    c.execute(f"INSERT INTO fields ({cols}) SELECT {cols} FROM fields_new")
    c.execute("DROP TABLE fields_new")
    c.execute("CREATE INDEX fields_class_number ON fields (class_number)")
    view = ", ".join("methods.method" if k == "method" else "fields." + k for k in ["d", *old[1:]])
    c.execute(
        f"CREATE VIEW field_rows AS SELECT {view}, methods.method FROM fields "
        "JOIN methods ON methods.id = fields.method_id"
    )
    c.execute("UPDATE meta SET value = '1' WHERE key = 'schema_version'")
    c.execute("PRAGMA user_version = 1")
    c.execute("COMMIT")
    c.close()


def test_a_version_1_store_is_read_and_then_upgraded(tmp_path: Path) -> None:
    path = str(tmp_path / "old.sqlite")
    with SurveyStore.open_for_writing(path) as store:
        tabulate(SurveyRange("d", 2, 100), store, chunk_size=50)
    with SurveyStore.open_for_reading(path) as store:
        before = list(store.rows())
    _make_version_1(path)
    with SurveyStore.open_for_reading(path) as store:  # read as it is: w = 2 for every row
        assert list(store.rows()) == before
    assert sqlite3.connect(path).execute("PRAGMA user_version").fetchone()[0] == 1
    with SurveyStore.open_for_writing(path) as store:  # the next run upgrades it
        tabulate(SurveyRange("d", -50, -1), store, chunk_size=50)
    c = sqlite3.connect(path)
    assert c.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    with SurveyStore.open_for_reading(path) as store:
        rows = list(store.rows())
    assert [r for r in rows if r["d"] > 0] == before
    assert len([r for r in rows if r["d"] < 0]) == 31  # squarefree n ≤ 50: OEIS A005117


def _cli(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    from realquad_cli.main import main

    status = main(list(args))
    out, err = capsys.readouterr()
    return status, out, err


def test_the_commands_on_negative_ranges(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    db = str(tmp_path / "cli.sqlite")
    status, out, _ = _cli(
        capsys, "survey", "run", "--d-min", "-700", "--d-max", "-1", "--db", db, "--json"
    )
    squarefree = [n for n in range(1, 701) if all(n % (k * k) for k in range(2, 27))]  # brute force
    assert status == 0 and json.loads(out)["fields"] == len(squarefree)
    status, out, _ = _cli(capsys, "survey", "query", "--db", db, "--class-number", "1")
    assert status == 0
    assert [line.split()[0] for line in out.splitlines()[1:-1]] == [
        str(d).replace("-", "−") for d in sorted(HEEGNER)
    ]
    status, out, _ = _cli(capsys, "survey", "report", "--db", db)
    assert status == 0
    assert "class number 1: 9 (d = −1, −2, −3, −7, −11, −19, −43, −67, −163)" in out
    assert "Cohen–Lenstra prediction 43.987%" in out
    status, out, _ = _cli(capsys, "survey", "query", "--db", db, "--d-max", "-690", "--csv")
    assert status == 0 and out.splitlines()[1].split(",")[:7] == [
        "-699", "-699", "10", "10", "[10]", "[10]", "2"
    ]  # fmt: skip
    assert class_group_imaginary(Order(-699)).class_number == 10  # the full walk agrees


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--d-max", "-5"], "give --d-min"),
        (["--d-min", "-5", "--d-max", "10"], "both signs"),
        (["--d-min", "-9", "--d-max", "-9"], "empty range"),
        (["--d-min", "-99999999999999999999999", "--d-max", "-1"], "--d-min must be at most"),
    ],
)
def test_bad_negative_ranges(
    capsys: pytest.CaptureFixture[str], tmp_path: Path, args: list[str], message: str
) -> None:
    db = tmp_path / "bad.sqlite"
    status, out, err = _cli(capsys, "survey", "run", *args, "--db", str(db))
    assert status == 2 and out == "" and not db.exists()
    assert err.startswith("realquad: error: ") and message in err and err.count("\n") == 1


def test_a_few_fields_far_out_go_field_by_field(tmp_path: Path) -> None:
    # 600 fields near d = −2·10⁶ would need the series to |D| = 8·10⁶: not worth it
    path = str(tmp_path / "far.sqlite")
    with SurveyStore.open_for_writing(path) as store:
        tabulate(SurveyRange("d", -2_000_000, -1_999_000), store, chunk_size=500)
    with SurveyStore.open_for_reading(path) as store:
        rows = list(store.rows())
    assert len(rows) > 500 and {r["method"] for r in rows} == {METHOD_ALONE}
    for r in rows[:20]:  # the full walk agrees
        assert class_group_imaginary(Order(r["discriminant"])).class_number == r["class_number"]


def test_the_plot_of_a_store_with_both_signs(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    db, picture = str(tmp_path / "both.sqlite"), tmp_path / "both.png"
    assert _cli(capsys, "survey", "run", "--d-max", "300", "--db", db)[0] == 0
    assert _cli(capsys, "survey", "run", "--d-min", "-300", "--d-max", "-1", "--db", db)[0] == 0
    status, out, _ = _cli(capsys, "survey", "report", "--db", db, "--plot", str(picture))
    assert status == 0 and f"plot written to {picture}" in out
    assert picture.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_rows_sent_in_columns_are_stored_as_the_records(tmp_path: Path) -> None:
    # the columns route (what workers send) and the FieldRecord route store the same rows
    chunk = with_class_numbers([Chunk("D", -3000, -1)])[0]
    columns = imaginary_rows(chunk.radicands(), chunk_class_numbers(chunk))
    assert list(columns) == imaginary_fields(chunk.radicands(), chunk_class_numbers(chunk))
    assert columns[1:3] == [columns[1], columns[2]] and len(columns) == len(chunk.radicands())
    stored = []
    for name, rows in (("columns", columns), ("records", list(columns))):
        path = str(tmp_path / f"{name}.sqlite")
        with SurveyStore.open_for_writing(path) as store:
            assert store.save_chunk(chunk, rows, 1.0) == len(columns)
        with SurveyStore.open_for_reading(path) as store:
            stored.append(list(store.rows(sort="d")))
    assert stored[0] == stored[1] and len(stored[0]) == len(columns)


def test_a_large_run_builds_the_class_number_index_at_the_end(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # a run of BULK_FIELDS fields or more writes without the index on h and builds it at the
    # end; a run stopped before the end leaves it to the next run that opens the store
    import importlib

    monkeypatch.setattr(importlib.import_module("realquad.survey.tabulate"), "BULK_FIELDS", 100)
    path = str(tmp_path / "bulk.sqlite")

    def has_index() -> bool:
        with sqlite3.connect(path) as connection:
            names = connection.execute("SELECT name FROM sqlite_master WHERE type = 'index'")
            return "fields_class_number" in {name for (name,) in names}

    with SurveyStore.open_for_writing(path) as store:
        tabulate(SurveyRange("d", -2000, -1), store, chunk_size=500)
    assert has_index()
    with SurveyStore.open_for_writing(path) as store:
        with pytest.raises(KeyboardInterrupt):
            with store.bulk_writes():
                raise KeyboardInterrupt
    assert not has_index()
    with SurveyStore.open_for_writing(path):
        pass
    assert has_index()
    with SurveyStore.open_for_reading(path) as store:
        assert len(list(store.rows(RowFilter(class_number=1)))) == 9  # Heegner–Baker–Stark
