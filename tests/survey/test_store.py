"""The survey store: schema, chunk transactions, writer lock, foreign files, filters."""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path

import pytest

from realquad.errors import InputError
from realquad.survey.compute import survey_chunk
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.store import APPLICATION_ID, COLUMNS, SCHEMA_VERSION, RowFilter, SurveyStore
from realquad.survey.tabulate import tabulate


def _digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.fixture(scope="module")
def small_db(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("store") / "small.sqlite"
    with SurveyStore.open_for_writing(str(path)) as store:
        tabulate(SurveyRange("d", 2, 1500), store, chunk_size=250)
    return path


def test_schema_is_documented_and_versioned(small_db: Path) -> None:
    c = sqlite3.connect(small_db)
    assert c.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
    assert c.execute("PRAGMA application_id").fetchone()[0] == APPLICATION_ID
    # the run has ended: the file is back in rollback mode, with nothing beside it
    assert c.execute("PRAGMA journal_mode").fetchone()[0] == "delete"
    assert sorted(p.name for p in small_db.parent.iterdir()) == [small_db.name]
    meta = dict(c.execute("SELECT key, value FROM meta"))
    assert meta["schema_version"] == str(SCHEMA_VERSION)
    columns = [r[1] for r in c.execute("PRAGMA table_info(fields)")]
    assert columns == [*(("method_id" if k == "method" else k) for k in COLUMNS), "chunk"]
    assert [r[1] for r in c.execute("PRAGMA table_info(field_rows)")] == COLUMNS
    assert (
        c.execute("SELECT COUNT(*) FROM methods").fetchone()[0] == 1
    )  # one method for all these fields
    chunks = c.execute("SELECT kind, lo, hi, fields FROM chunks ORDER BY lo").fetchall()
    assert [(k, lo, hi) for k, lo, hi, _ in chunks] == [("d", 2, 249)] + [
        ("d", 250 * i, 250 * i + 249) for i in range(1, 6)
    ] + [("d", 1500, 1500)]
    assert sum(n for *_, n in chunks) == c.execute("SELECT COUNT(*) FROM fields").fetchone()[0]
    c.close()


def test_rows_equal_a_direct_computation(small_db: Path) -> None:
    with SurveyStore.open_for_reading(str(small_db)) as store:
        stored = list(store.rows())
    assert stored == [r.as_dict() for r in survey_chunk(Chunk("d", 2, 1500))]


def test_filters_equal_python_filters(small_db: Path) -> None:
    with SurveyStore.open_for_reading(str(small_db)) as store:
        everything = list(store.rows())
        for where in [
            RowFilter(class_number=1),
            RowFilter(narrow_class_number=2, unit_norm=1),
            RowFilter(unit_norm=-1, d_min=100, d_max=900),
            RowFilter(class_number=3, d_max=1000),
        ]:
            expected = [
                r
                for r in everything
                if (where.class_number is None or r["class_number"] == where.class_number)
                and (
                    where.narrow_class_number is None
                    or r["narrow_class_number"] == where.narrow_class_number
                )
                and (where.unit_norm is None or r["unit_norm"] == where.unit_norm)
                and (where.d_min is None or r["d"] >= where.d_min)
                and (where.d_max is None or r["d"] <= where.d_max)
            ]
            assert list(store.rows(where)) == expected
            assert store.count(where) == len(expected)


def test_a_failing_chunk_leaves_nothing(tmp_path: Path) -> None:
    path = str(tmp_path / "s.sqlite")
    rows = survey_chunk(Chunk("d", 2, 50))
    with SurveyStore.open_for_writing(path) as store:
        broken = [*rows[:5], "not a row"]
        with pytest.raises(AttributeError):
            store.save_chunk(Chunk("d", 2, 50), broken, 0.0)  # type: ignore[arg-type]
        assert store.count() == 0 and not store.is_done(Chunk("d", 2, 50))
        assert store.save_chunk(Chunk("d", 2, 50), rows, 0.0) == len(rows)
        assert (
            store.save_chunk(Chunk("d", 2, 50), rows, 0.0) == 0
        )  # already complete: nothing twice
        assert store.count() == len(rows)


def test_a_second_writer_is_refused_and_readers_are_not(tmp_path: Path) -> None:
    path = str(tmp_path / "s.sqlite")
    with SurveyStore.open_for_writing(path) as first:
        first.save_chunk(Chunk("d", 2, 20), survey_chunk(Chunk("d", 2, 20)), 0.0)
        with pytest.raises(InputError, match="another survey run"):
            SurveyStore.open_for_writing(path)
        with SurveyStore.open_for_reading(path) as reader:
            assert reader.count() == 12  # squarefree 2 ≤ d ≤ 20
    with SurveyStore.open_for_writing(path) as again:  # the lock is released on close
        assert again.count() == 12


def test_an_empty_file_left_by_a_killed_creation_is_adopted(tmp_path: Path) -> None:
    path = tmp_path / "cut-short.sqlite"
    path.write_bytes(b"")  # sqlite3.connect creates the file before the schema transaction
    with SurveyStore.open_for_writing(str(path)) as store:
        assert store.count() == 0
    with SurveyStore.open_for_reading(str(path)) as store:
        assert store.count() == 0


@pytest.mark.parametrize("content", [b"hello, this is not a database\n" * 100, b"x"])
def test_foreign_files_are_refused_untouched(tmp_path: Path, content: bytes) -> None:
    path = tmp_path / "other.sqlite"
    path.write_bytes(content)
    before = _digest(path)
    for opener in (SurveyStore.open_for_writing, SurveyStore.open_for_reading):
        with pytest.raises(InputError, match="not a survey database"):
            opener(str(path))
    assert _digest(path) == before


def test_database_of_another_schema_is_refused_untouched(tmp_path: Path) -> None:
    path = tmp_path / "other.sqlite"
    c = sqlite3.connect(path)
    c.execute("CREATE TABLE fields (d INTEGER)")
    c.commit()
    c.close()
    before = _digest(path)
    with pytest.raises(InputError, match="another schema"):
        SurveyStore.open_for_writing(str(path))
    assert _digest(path) == before
    c = sqlite3.connect(path)
    c.execute(f"PRAGMA application_id = {APPLICATION_ID}")
    c.execute(f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    c.commit()
    c.close()
    before = _digest(path)
    with pytest.raises(InputError, match="schema version"):
        SurveyStore.open_for_writing(str(path))
    assert _digest(path) == before


def test_missing_database_is_refused_for_reading(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="no survey database"):
        SurveyStore.open_for_reading(str(tmp_path / "missing.sqlite"))
    assert not (tmp_path / "missing.sqlite").exists()
