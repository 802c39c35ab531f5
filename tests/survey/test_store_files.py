"""What ``--db`` may name, and what a survey leaves beside its store.

Checked against the file system itself (directory listings before and after,
``os.stat``) and SQLite's own file format (the header layout of
https://www.sqlite.org/fileformat.html: bytes 18–19 are 2 in WAL mode, 1 in
rollback mode).
"""

from __future__ import annotations

import hashlib
import json
import os
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest
from realquad_cli.main import main

from realquad.survey import compute, dbfile
from realquad.survey.ranges import Chunk, SurveyRange
from realquad.survey.store import SurveyStore
from realquad.survey.tabulate import tabulate
from tests.survey.test_helpers import stored_table

COMMANDS = [["run", "--d-max", "60", "--workers", "1"], ["query"], ["report"]]


def run_cli(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    status = main(list(args))
    out, err = capsys.readouterr()
    return status, out, err


def listing(directory: Path) -> list[str]:
    return sorted(os.listdir(directory))


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.fixture
def store(tmp_path: Path) -> Path:
    """A finished survey of 2 ≤ d ≤ 600 in a directory of its own."""
    path = tmp_path / "store" / "s.sqlite"
    path.parent.mkdir()
    with SurveyStore.open_for_writing(str(path)) as s:
        tabulate(SurveyRange("d", 2, 600), s, chunk_size=100)
    return path


def _refused(capsys: pytest.CaptureFixture[str], directory: Path, db: str, match: str) -> None:
    """Every survey command refuses ``db`` in one line with status 2 and changes nothing in ``directory``."""
    before = listing(directory)
    for command in COMMANDS:
        status, out, err = run_cli(capsys, "survey", *command, "--db", db)
        assert status == 2 and out == "", (command, err)
        assert err.startswith("realquad: error: ") and err.count("\n") == 1, err
        assert match in err, err
        assert listing(directory) == before, command


@pytest.mark.parametrize(
    ("db", "match"),
    [
        ("", "needs a file name"),
        ("   ", "needs a file name"),
        (":memory:", "not ':memory:'"),
        ("file:x.sqlite", "not the URI"),
        ("file:x?mode=memory", "not the URI"),
        ("FILE:x?mode=memory&cache=shared", "not the URI"),
    ],
)
def test_names_sqlite_does_not_take_as_files_are_refused(
    capsys: pytest.CaptureFixture[str],
    tmp_path: Path,
    monkeypatch: pytest.MonkeyPatch,
    db: str,
    match: str,
) -> None:
    monkeypatch.chdir(tmp_path)
    _refused(capsys, tmp_path, db, match)
    assert listing(tmp_path) == []


def test_devices_directories_and_broken_links_are_refused(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    (tmp_path / "dir.sqlite").mkdir()
    (tmp_path / "dangling.sqlite").symlink_to(tmp_path / "nowhere" / "x.sqlite")
    _refused(capsys, tmp_path, os.devnull, "is a device")
    _refused(capsys, tmp_path, str(tmp_path / "dir.sqlite"), "is a directory")
    _refused(capsys, tmp_path, str(tmp_path / "dangling.sqlite"), "broken symbolic link")
    status, _, err = run_cli(
        capsys, "survey", *COMMANDS[0], "--db", str(tmp_path / "no" / "x.sqlite")
    )
    assert status == 2 and "no such directory" in err
    assert listing(tmp_path) == ["dangling.sqlite", "dir.sqlite"]


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="FIFOs are POSIX")
def test_a_fifo_is_refused_without_hanging(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.sqlite"
    os.mkfifo(fifo)
    for command in COMMANDS:
        # in a child process with a time limit: opening a FIFO for reading would block forever
        done = subprocess.run(
            [sys.executable, "-m", "realquad", "survey", *command, "--db", str(fifo)],
            capture_output=True,
            text=True,
            timeout=60,
        )
        assert done.returncode == 2 and done.stdout == "", done.stderr
        assert done.stderr == f"realquad: error: {str(fifo)!r} is a FIFO, not a survey database\n"
    assert listing(tmp_path) == ["pipe.sqlite"]


def _damage(path: Path, offset: int, length: int) -> None:
    with open(path, "r+b") as fh:
        fh.seek(offset)
        fh.write(b"\xa5" * length)


@pytest.mark.parametrize("how", ["pages", "truncated", "header-only"])
def test_a_damaged_store_is_one_line_and_left_as_it_is(
    capsys: pytest.CaptureFixture[str], store: Path, how: str
) -> None:
    page = sqlite3.connect(store).execute("PRAGMA page_size").fetchone()[0]
    if how == "pages":
        _damage(store, 2 * page, 3 * page)  # the b-tree pages after the schema page
    elif how == "truncated":
        with open(store, "r+b") as fh:
            fh.truncate(2 * page + 17)
    else:
        store.write_bytes(store.read_bytes()[:100])  # a header and nothing else
    before = store.read_bytes()
    for command in [*COMMANDS[1:], COMMANDS[0]]:
        status, out, err = run_cli(capsys, "survey", *command, "--db", str(store))
        assert status == 2 and out == "" and err.count("\n") == 1, err
        assert err.startswith("realquad: error: ") and "internal error" not in err, err
        assert "damaged" in err or "not a survey database" in err, err
        if command != COMMANDS[0]:
            assert store.read_bytes() == before  # readers change nothing at all
    # a run that opened the file before finding the damage has switched its journal to WAL
    # and back: SQLite's change counter and version stamp in the header (bytes 24–27 and
    # 92–99 of the file format) may differ, nothing else
    after = store.read_bytes()
    assert len(after) == len(before)
    assert {i for i in range(len(after)) if after[i] != before[i]} <= {
        *range(24, 28),
        *range(92, 100),
    }
    assert listing(store.parent) == ["s.sqlite"]


def test_no_side_files_after_a_normal_run_a_query_and_a_report(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    db = str(tmp_path / "s.sqlite")
    for command in (
        ["run", "--d-max", "400", "--workers", "2", "--chunk-size", "100"],
        ["query"],
        ["report"],
    ):
        status, _, err = run_cli(capsys, "survey", *command, "--db", db)
        assert status == 0, err
        assert listing(tmp_path) == ["s.sqlite"], command
    header = Path(db).read_bytes()[:100]
    assert header[18:20] == b"\x01\x01"  # rollback mode: nothing needs a -wal file


def test_a_run_failing_on_its_first_chunk_leaves_no_database(
    capsys: pytest.CaptureFixture[str], tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    def fail(ds: list[int]) -> list[compute.FieldRecord]:
        raise MemoryError

    monkeypatch.setattr(compute, "survey_fields", fail)
    status, out, err = run_cli(
        capsys,
        "survey",
        "run",
        "--d-max",
        "500",
        "--workers",
        "1",
        "--db",
        str(tmp_path / "s.sqlite"),
    )
    assert status == 2 and out == "" and err == "realquad: error: out of memory\n"
    assert listing(tmp_path) == []


def test_a_run_failing_later_keeps_its_chunks_and_no_side_files(
    capsys: pytest.CaptureFixture[str], tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    real = compute.survey_fields

    def fail_past_300(ds: list[int]) -> list[compute.FieldRecord]:
        if ds and ds[0] > 300:
            raise MemoryError
        return real(ds)

    monkeypatch.setattr(compute, "survey_fields", fail_past_300)
    db = tmp_path / "s.sqlite"
    args = [
        "survey",
        "run",
        "--d-max",
        "500",
        "--workers",
        "1",
        "--chunk-size",
        "100",
        "--db",
        str(db),
    ]
    status, _, err = run_cli(capsys, *args)
    assert status == 2 and err == "realquad: error: out of memory\n"
    assert listing(tmp_path) == ["s.sqlite"]
    with SurveyStore.open_for_reading(str(db)) as s:
        assert s.count() == len(Chunk("d", 2, 299).radicands())
        assert s.missing() == [("d", 300, 500)]
    assert listing(tmp_path) == ["s.sqlite"]
    monkeypatch.setattr(compute, "survey_fields", real)
    assert run_cli(capsys, *args)[0] == 0
    with SurveyStore.open_for_reading(str(db)) as s:
        assert s.count() == len(Chunk("d", 2, 500).radicands()) and s.missing() == []


def test_a_refused_second_writer_leaves_no_side_file(tmp_path: Path, store: Path) -> None:
    from realquad.errors import InputError

    with SurveyStore.open_for_writing(str(store)):
        with pytest.raises(InputError, match="another survey run"):
            SurveyStore.open_for_writing(str(store))
        new = tmp_path / "store" / "new.sqlite"
        with SurveyStore.open_for_writing(str(new)):  # a second store beside it is fine
            pass
        assert not new.exists()  # created, never written: removed
    assert listing(store.parent) == ["s.sqlite"]


def _wal_copy(store: Path, target: Path) -> None:
    """A copy of ``store`` whose header says WAL mode (as a copy taken during a run would)."""
    c = sqlite3.connect(store)
    c.execute("PRAGMA journal_mode = WAL")
    c.close()  # the last connection: everything checkpointed into the file, -wal removed
    target.write_bytes(store.read_bytes())
    assert target.read_bytes()[18:20] == b"\x02\x02"


def test_read_only_stores_are_read_without_locks_or_side_files(
    capsys: pytest.CaptureFixture[str], store: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Tests run as root in CI, and root may write any file whatever its mode, so the
    # read-only case is made real by telling the code that nothing here is writable
    # (os.access is what it asks); test_read_only_for_real does the same with chmod.
    expected = stored_table(store)
    ro = tmp_path / "ro"
    ro.mkdir()
    _wal_copy(store, ro / "wal.sqlite")
    (ro / "plain.sqlite").write_bytes(store.read_bytes())
    real_access = os.access
    monkeypatch.setattr(
        os, "access", lambda p, mode, **kw: False if mode & os.W_OK else real_access(p, mode, **kw)
    )
    for name in ("wal.sqlite", "plain.sqlite"):
        db = str(ro / name)
        status, out, err = run_cli(capsys, "survey", "query", "--db", db, "--json", "--limit", "0")
        assert status == 0, err
        payload = json.loads(out)
        assert [r["radicand"] for r in payload["rows"]] == [row[0] for row in expected]
        assert payload["missing"] == []
        status, out, err = run_cli(capsys, "survey", "report", "--db", db, "--json")
        assert status == 0 and json.loads(out)["fields"] == len(expected), err
        status, _, err = run_cli(capsys, "survey", "run", "--d-max", "700", "--db", db)
        assert status == 2 and "permission denied" in err
        assert listing(ro) == ["plain.sqlite", "wal.sqlite"]


@pytest.mark.skipif(
    not hasattr(os, "geteuid") or os.geteuid() == 0, reason="root ignores file modes"
)
def test_read_only_for_real(
    capsys: pytest.CaptureFixture[str], store: Path, tmp_path: Path
) -> None:
    ro = tmp_path / "ro"
    ro.mkdir()
    _wal_copy(store, ro / "wal.sqlite")
    (ro / "wal.sqlite").chmod(0o444)
    ro.chmod(0o555)
    try:
        status, out, err = run_cli(
            capsys, "survey", "query", "--db", str(ro / "wal.sqlite"), "--json"
        )
        assert status == 0 and json.loads(out)["matching"] == len(stored_table(store)), err
        assert listing(ro) == ["wal.sqlite"]
    finally:
        ro.chmod(0o755)


def test_missing_parts_are_reported(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    db = tmp_path / "s.sqlite"
    with SurveyStore.open_for_writing(str(db)) as s:
        chunks = list(SurveyRange("d", 2, 1000).chunks(100))
        s.begin_run(SurveyRange("d", 2, 1000))
        for chunk in chunks[:3] + chunks[5:6]:  # as an interrupted run leaves it
            s.save_chunk(chunk, compute.survey_chunk(chunk), 0.0)
    status, out, _ = run_cli(capsys, "survey", "report", "--db", str(db), "--json")
    expected = [{"kind": "d", "min": 300, "max": 499}, {"kind": "d", "min": 600, "max": 1000}]
    assert status == 0 and json.loads(out)["missing"] == expected
    status, out, _ = run_cli(capsys, "survey", "report", "--db", str(db))
    assert "incomplete: d in [300, 499], [600, 1000] not computed yet" in out.splitlines()[-1]
    status, out, _ = run_cli(capsys, "survey", "query", "--db", str(db), "--d-max", "550", "--json")
    assert json.loads(out)["missing"] == expected[:1]
    status, out, _ = run_cli(capsys, "survey", "query", "--db", str(db), "--d-max", "250")
    assert (
        json.loads(
            run_cli(capsys, "survey", "query", "--db", str(db), "--d-max", "250", "--json")[1]
        )["missing"]
        == []
    )
    assert "incomplete" not in out
    status, out, err = run_cli(capsys, "survey", "query", "--db", str(db), "--csv", "--limit", "0")
    assert status == 0 and "incomplete" not in out  # the CSV stays data only
    assert err.startswith("realquad: incomplete: d in [300, 499], [600, 1000] not computed yet")
    assert (
        run_cli(
            capsys,
            "survey",
            "run",
            "--d-max",
            "1000",
            "--chunk-size",
            "100",
            "--workers",
            "1",
            "--db",
            str(db),
        )[0]
        == 0
    )
    status, out, _ = run_cli(capsys, "survey", "report", "--db", str(db), "--json")
    assert json.loads(out)["missing"] == []


def test_missing_parts_of_discriminant_ranges(tmp_path: Path) -> None:
    db = tmp_path / "s.sqlite"
    with SurveyStore.open_for_writing(str(db)) as s:
        s.begin_run(SurveyRange("D", 5, 400))
        s.save_chunk(Chunk("D", 5, 99), compute.survey_chunk(Chunk("D", 5, 99)), 0.0)
        assert s.missing() == [("D", 100, 400)]
        assert s.missing(d_max=50) == [("D", 100, 200)]  # the D of fields with d ≤ 50 are ≤ 200
        assert s.missing(d_min=1000) == []


def test_a_store_from_before_the_ranges_table_reports_holes_between_its_chunks(
    tmp_path: Path,
) -> None:
    db = tmp_path / "s.sqlite"
    with SurveyStore.open_for_writing(str(db)) as s:
        for chunk in (Chunk("d", 2, 99), Chunk("d", 300, 399)):
            s.save_chunk(chunk, compute.survey_chunk(chunk), 0.0)
        s.connection.execute("DROP TABLE ranges")
        assert s.missing() == [("d", 100, 299)]


def test_gaps_without_fields_are_not_missing() -> None:
    from realquad.survey.ranges import has_fields, subtract_intervals

    # 48, 49, 50: 48 = 2⁴·3, 49 = 7², 50 = 2·5² are not squarefree (OEIS A013929, from memory)
    assert subtract_intervals([(2, 60)], [(2, 47), (51, 60)]) == [(48, 50)]
    assert not has_fields("d", 48, 50) and has_fields("d", 47, 50)


def test_uri_escapes_every_special_character(tmp_path: Path) -> None:
    name = tmp_path / "odd ?name#%&=.sqlite"
    uri = dbfile.uri(str(name), mode="ro")
    assert "?" not in uri.split("?mode=")[0] and "#" not in uri
    with SurveyStore.open_for_writing(str(name)) as s:
        s.save_chunk(Chunk("d", 2, 20), compute.survey_chunk(Chunk("d", 2, 20)), 0.0)
    assert listing(tmp_path) == [name.name]
    with SurveyStore.open_for_reading(str(name)) as s:
        assert s.count() == 12  # squarefree 2 ≤ d ≤ 20: 2 3 5 6 7 10 11 13 14 15 17 19


def test_a_read_only_copy_taken_mid_run_is_read_with_its_journal(
    capsys: pytest.CaptureFixture[str], store: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # A copy of a store and its -wal/-shm taken while a run writes (as a kill -9 leaves
    # them): the last chunk lives only in the -wal, so reading the file alone
    # (immutable=1) would miss it; without write access SQLite's read-only mode reads it.
    writer = SurveyStore.open_for_writing(str(store))
    writer.connection.execute("PRAGMA wal_autocheckpoint = 0")
    writer.save_chunk(Chunk("d", 601, 700), compute.survey_chunk(Chunk("d", 601, 700)), 0.0)
    ro = tmp_path / "ro"
    ro.mkdir()
    for suffix in ("", "-wal", "-shm"):
        (ro / ("s.sqlite" + suffix)).write_bytes(Path(str(store) + suffix).read_bytes())
    writer.close()
    assert (ro / "s.sqlite-wal").stat().st_size > 0
    real_access = os.access
    monkeypatch.setattr(  # as root every file is writable: see the test above
        os, "access", lambda p, mode, **kw: False if mode & os.W_OK else real_access(p, mode, **kw)
    )
    status, out, err = run_cli(capsys, "survey", "query", "--db", str(ro / "s.sqlite"), "--json")
    assert status == 0, err
    assert json.loads(out)["matching"] == len(Chunk("d", 2, 700).radicands())
