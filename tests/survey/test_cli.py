"""``realquad survey run/query/report`` in-process: output, bad input, fuzzing, report numbers."""

from __future__ import annotations

import csv
import hashlib
import io
import json
import math
from collections import Counter
from pathlib import Path

import pytest
import sympy
from hypothesis import given
from hypothesis import strategies as st
from realquad_cli.main import main

from realquad.survey.stats import COHEN_LENSTRA_PRIME_SHARE


def run_cli(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    status = main(list(args))
    out, err = capsys.readouterr()
    return status, out, err


@pytest.fixture(scope="module")
def db(tmp_path_factory: pytest.TempPathFactory) -> str:
    path = str(tmp_path_factory.mktemp("cli") / "survey.sqlite")
    assert (
        main(
            [
                "survey",
                "run",
                "--d-max",
                "3000",
                "--db",
                path,
                "--workers",
                "2",
                "--json",
                "--chunk-size",
                "700",
            ]
        )
        == 0
    )
    return path


def _all_rows(capsys: pytest.CaptureFixture[str], db: str) -> list[dict]:  # type: ignore[type-arg]
    status, out, _ = run_cli(capsys, "survey", "query", "--db", db, "--json", "--limit", "0")
    assert status == 0
    return json.loads(out)["rows"]  # type: ignore[no-any-return]


def test_run_json_and_resume(capsys: pytest.CaptureFixture[str], db: str) -> None:
    status, out, err = run_cli(capsys, "survey", "run", "--d-max", "3000", "--db", db, "--json")
    payload = json.loads(out)
    assert status == 0 and err == ""  # nothing extra with --json
    assert (
        payload["fields"] == 1823 and payload["computed"] == 0 and payload["skipped"] == 1823
    )  # squarefree 2..3000 (sympy count below)
    assert 1823 == sum(
        1 for n in range(2, 3001) if sympy.factorint(n) and max(sympy.factorint(n).values()) == 1
    )


def test_run_prints_plain_progress_when_not_a_terminal(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    status, out, err = run_cli(
        capsys,
        "survey",
        "run",
        "--d-max",
        "200",
        "--db",
        str(tmp_path / "p.sqlite"),
        "--workers",
        "1",
    )
    assert status == 0
    assert "survey of 121 fields" in out
    assert err.strip().startswith("survey: 121/121 fields (100.0%)")


def test_query_json_rows_have_the_promised_keys(
    capsys: pytest.CaptureFixture[str], db: str, oeis
) -> None:  # type: ignore[no-untyped-def]
    status, out, _ = run_cli(
        capsys, "survey", "query", "--db", db, "--class-number", "1", "--d-max", "101", "--json"
    )
    rows = json.loads(out)["rows"]
    assert status == 0
    assert [r["radicand"] for r in rows] == oeis["A003172"]["terms"]  # OEIS A003172
    for key in (
        "radicand",
        "discriminant",
        "class_number",
        "narrow_class_number",
        "unit_norm",
        "regulator",
    ):
        assert all(key in r for r in rows)


def test_query_filters_and_csv(capsys: pytest.CaptureFixture[str], db: str) -> None:
    rows = _all_rows(capsys, db)
    query = ["survey", "query", "--db", db]
    status, out, _ = run_cli(
        capsys, *query, *"--unit-norm -1 --narrow-class-number 2 --csv --limit 0".split()
    )
    parsed = list(csv.DictReader(io.StringIO(out)))
    expected = [r for r in rows if r["unit_norm"] == -1 and r["narrow_class_number"] == 2]
    assert status == 0 and [int(r["radicand"]) for r in parsed] == [r["radicand"] for r in expected]
    status, out, _ = run_cli(capsys, *query, *"--class-number 3 --d-min 500 --d-max 600".split())
    assert status == 0
    shown = [int(line.split()[0]) for line in out.splitlines()[1:-1]]
    assert shown == [
        r["radicand"] for r in rows if r["class_number"] == 3 and 500 <= r["radicand"] <= 600
    ]


def test_query_limit_says_what_it_left_out(capsys: pytest.CaptureFixture[str], db: str) -> None:
    status, out, _ = run_cli(capsys, "survey", "query", "--db", db, "--limit", "5", "--json")
    payload = json.loads(out)
    assert status == 0 and payload["shown"] == 5 and payload["matching"] == 1823


def _odd(n: int) -> int:
    return n // (n & -n)


def test_report_numbers_recomputed_independently(
    capsys: pytest.CaptureFixture[str], db: str
) -> None:
    rows = _all_rows(capsys, db)
    status, out, _ = run_cli(capsys, "survey", "report", "--db", db, "--json", "--top", "5")
    report = json.loads(out)
    assert status == 0 and report["fields"] == len(rows)
    assert report["class_number_one"]["count"] == sum(r["class_number"] == 1 for r in rows)
    # primality by sympy
    primes = [r for r in rows if r["radicand"] % 4 == 1 and sympy.isprime(r["radicand"])]
    assert report["prime_discriminants"]["fields"] == len(primes)
    assert report["prime_discriminants"]["class_number_one"] == sum(
        r["class_number"] == 1 for r in primes
    )
    assert all(r["class_number"] % 2 == 1 for r in primes)  # genus theory: h is odd for prime D
    assert report["class_number_distribution"] == {
        str(k): v for k, v in sorted(Counter(r["class_number"] for r in rows).items())
    }
    assert report["odd_part_distribution"] == {
        str(k): v for k, v in sorted(Counter(_odd(r["class_number"]) for r in rows).items())
    }
    assert report["unit_norm_minus_one"]["count"] == sum(r["unit_norm"] == -1 for r in rows)
    top = sorted(rows, key=lambda r: float(r["regulator"]), reverse=True)[:5]
    assert [r["radicand"] for r in report["largest_regulators"]] == [r["radicand"] for r in top]
    assert (
        float(report["prime_discriminants"]["cohen_lenstra_prediction"])
        == COHEN_LENSTRA_PRIME_SHARE
    )
    shares = [report[k]["share"] for k in ("class_number_one", "unit_norm_minus_one")]
    assert shares == [
        f"{report[k]['count'] / len(rows):.8f}" for k in ("class_number_one", "unit_norm_minus_one")
    ]
    assert (
        report["prime_discriminants"]["share"]
        == f"{report['prime_discriminants']['class_number_one'] / len(primes):.8f}"
    )


def test_cohen_lenstra_constant_from_its_product() -> None:
    # ∏_{p odd} ∏_{k≥2} (1 − p^−k) (Cohen–Lenstra 1984); p < 10⁵ and the tail estimate −Σ_{p>P} p^−2 ≈ −1/(P ln P)
    P = 10**5
    log_sum = sum(
        math.log1p(-(p**-k)) for p in sympy.primerange(3, P) for k in range(2, 40) if p**-k > 1e-300
    )
    value = math.exp(log_sum - 1 / (P * math.log(P)))
    assert abs(value - COHEN_LENSTRA_PRIME_SHARE) < 3e-7
    assert round(100 * value, 3) == 75.446  # the 75.446 % quoted by Cohen and Lenstra


def test_report_plot_writes_a_png(
    capsys: pytest.CaptureFixture[str], db: str, tmp_path: Path
) -> None:
    pytest.importorskip("matplotlib")
    target = tmp_path / "survey.png"
    status, out, _ = run_cli(capsys, "survey", "report", "--db", db, "--plot", str(target))
    assert status == 0 and "Cohen–Lenstra prediction 75.446%" in out
    assert target.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def _digest(path: str) -> str:
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()


@pytest.mark.parametrize(
    "args",
    [
        ["run", "--d-min", "100", "--d-max", "50"],  # reversed
        ["run", "--d-min", "4", "--d-max", "4"],  # empty: 4 is not squarefree
        ["run"],  # no --d-max
        ["run", "--d-max", "x"],
        ["run", "--d-max", "-7"],
        ["run", "--d-max", "100", "--workers", "0"],
        ["run", "--d-max", "100", "--chunk-size", "0"],
        [
            "run",
            "--d-max",
            "100",
            "--scheduler",
            "tcp://127.0.0.1:9",
        ],  # nothing listens on the discard port
        ["run", "--d-max", "100", "--scheduler", "tcp://127.0.0.1:9", "--workers", "2"],
        ["query", "--unit-norm", "2"],
        ["query", "--d-min", "9", "--d-max", "3"],
        ["query", "--csv", "--json"],
        ["report", "--plot", "picture.jpg"],
        ["report", "--d-min", "100000", "--d-max", "100001"],  # nothing surveyed there
    ],
)
def test_bad_input_is_one_line_and_leaves_the_database_untouched(
    capsys: pytest.CaptureFixture[str], db: str, args: list[str]
) -> None:
    before = _digest(db)
    status, out, err = run_cli(capsys, "survey", *args, "--db", db)
    assert status == 2 and out == ""
    assert err.startswith("realquad: error: ") and err.count("\n") == 1, err
    assert _digest(db) == before


def test_foreign_database_is_refused_untouched(
    capsys: pytest.CaptureFixture[str], tmp_path: Path
) -> None:
    other = tmp_path / "notes.sqlite"
    other.write_text("my notes\n")
    for command in (["run", "--d-max", "50"], ["query"], ["report"]):
        status, _, err = run_cli(capsys, "survey", *command, "--db", str(other))
        assert status == 2 and "not a survey database" in err
    assert other.read_text() == "my notes\n"
    assert not (tmp_path / "missing.sqlite").exists()


_TOKENS = st.one_of(
    st.sampled_from(
        ["run", "query", "report", "--d-min", "--d-max", "--class-number", "--unit-norm"]
        + ["--narrow-class-number", "--csv", "--json", "--limit", "--top", "--discriminants"]
        + [
            "--chunk-size",
            "--workers",
            "--plot",
            "-1",
            "+1",
            "0",
            "1",
            "12",
            "1e3",
            "",
            " ",
            "x.png",
        ]
    ),
    st.text(max_size=8),
    st.integers(-1000, 1000).map(str),  # small enough that any run finishes at once
    st.integers(10**15 + 1, 10**30).map(str),  # refused by size
)


@given(st.lists(_TOKENS, max_size=7))
def test_fuzzed_arguments_never_give_a_traceback(args: list[str]) -> None:
    import contextlib
    import os
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        db = os.path.join(tmp, "fuzz.sqlite")
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            status = main(
                ["survey", *args, "--db", db, "--workers", "1"]
                if args[:1] == ["run"]
                else ["survey", *args, "--db", db]
            )
        assert status in (0, 2), (args, err.getvalue())
        assert "Traceback" not in err.getvalue()
        if status == 2:
            assert err.getvalue().startswith("realquad: error: ") or "Usage" in err.getvalue()


def test_discriminant_ranges(capsys: pytest.CaptureFixture[str], tmp_path: Path, oeis) -> None:  # type: ignore[no-untyped-def]
    path = str(tmp_path / "disc.sqlite")
    terms = oeis["A003656"]["terms"]  # OEIS A003656: fundamental D > 0 with h = 1
    status, out, _ = run_cli(
        capsys,
        "survey",
        "run",
        "--discriminants",
        "--d-max",
        str(terms[-1]),
        "--db",
        path,
        "--workers",
        "1",
        "--json",
    )
    assert status == 0 and json.loads(out)["range"]["kind"] == "D"
    rows = _all_rows(capsys, path)
    assert sorted(r["discriminant"] for r in rows if r["class_number"] == 1) == terms


def test_a_second_run_on_a_database_in_use_is_refused(
    capsys: pytest.CaptureFixture[str], db: str
) -> None:
    from realquad.survey.store import SurveyStore

    with SurveyStore.open_for_writing(db):
        # (opening a writer switches the journal to WAL, closing it switches back: the
        # file's header changes with them, so the digest is taken while it is open)
        before = _digest(db)
        status, out, err = run_cli(capsys, "survey", "run", "--d-max", "3000", "--db", db)
        assert status == 2 and "another survey run" in err and out == ""
        status, out, _ = run_cli(capsys, "survey", "query", "--db", db, "--limit", "1", "--json")
        assert status == 0 and json.loads(out)["matching"] == 1823  # readers are welcome
        assert _digest(db) == before


def test_progress_bar_on_a_terminal() -> None:
    from realquad.survey.progress import SurveyProgress, choose_mode

    class Terminal(io.StringIO):
        def isatty(self) -> bool:
            return True

    screen = Terminal()
    assert choose_mode(False, screen) == "bar" and choose_mode(True, screen) == "quiet"
    assert choose_mode(False, io.StringIO()) == "lines"
    with SurveyProgress(50, "bar", stream=screen) as bar:
        bar.advance(50)
    assert "50/50" in screen.getvalue()


@given(st.text(max_size=40))
def test_fuzzed_scheduler_addresses_give_one_error_line(address: str) -> None:
    import contextlib
    import os
    import socket
    import tempfile
    from unittest import mock

    def nobody_listens(*args: object, **kwargs: object) -> socket.socket:
        raise ConnectionRefusedError(111, "Connection refused")

    with (
        tempfile.TemporaryDirectory() as tmp,
        mock.patch.object(socket, "create_connection", nobody_listens),
    ):
        db = os.path.join(tmp, "fuzz.sqlite")
        err = io.StringIO()
        with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(err):
            status = main(["survey", "run", "--d-max", "50", "--db", db, "--scheduler", address])
        assert (
            status == 2
            and err.getvalue().startswith("realquad: error: ")
            and err.getvalue().count("\n") == 1
        )
        assert not os.path.exists(db)
