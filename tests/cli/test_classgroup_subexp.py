"""``realquad classgroup --method subexp``: answers against the exact method, options, fuzz, Ctrl-C, resuming."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from realquad.classgroup import class_group
from realquad.classgroup.imaginary import class_group_imaginary
from realquad.core.orders import Order
from tests.cli.support import check_subexp_options, interrupted, run, run_json
from tests.markers import HEAVY

#: −p for the least prime p ≡ 3 (mod 4) above 10⁴⁵ (a field; Order needs no factoring).
LARGE = "-1000000000000000000000000000000000000000000439"


@HEAVY
def test_agrees_with_the_exact_method(capsys) -> None:  # type: ignore[no-untyped-def]
    # reference: every reduced form, one per class (unconditional)
    for D in (-1000000000011, -(4 * 250000000001)):
        data = run_json(capsys, "classgroup", "--disc", str(D), "--method", "subexp")
        exact = class_group_imaginary(Order(D))
        assert data["class_number"] == exact.class_number
        assert data["invariants"] == exact.invariants
        assert data["proof"] == "GRH" and data["method"].startswith("index calculus")


def test_orders_of_both_signs(capsys) -> None:  # type: ignore[no-untyped-def]
    # references: the reduced forms (D < 0) and the cycles of reduced forms (D > 0), unconditional
    for D in (-4 * 9 * (10**10 + 19), 9 * 4 * (10**10 + 19)):
        data = run_json(capsys, "classgroup", "--disc", str(D), "--method", "subexp")
        exact = class_group(D, method="exact")
        assert data["invariants"] == exact.invariants
        assert data["narrow_invariants"] == exact.narrow_invariants
        assert data["proof"] == "GRH" and data["method"].startswith("index calculus")


@HEAVY
def test_relation_file_and_workers(capsys, tmp_path) -> None:  # type: ignore[no-untyped-def]
    path = str(tmp_path / "rel.sqlite")
    args = ["classgroup", "--disc", "-1000000000000000000003", "--method", "subexp"]
    first = run_json(capsys, *args, "--relations", path, "--workers", "2")
    again = run_json(capsys, *args, "--relations", path)
    assert first["invariants"] == again["invariants"]
    code, out, err = run(
        capsys,
        "classgroup",
        "--disc",
        "-1000000000000000000011",
        "--method",
        "subexp",
        "--relations",
        path,
    )
    assert code == 2 and out == "" and "belongs to D" in err and len(err.strip().splitlines()) == 1


def test_bad_options(capsys) -> None:  # type: ignore[no-untyped-def]
    cases = [
        (["classgroup", "79", "--workers", "2"], "--method subexp"),
        (["classgroup", "-5", "--relations", "x.sqlite"], "--method subexp"),
        (["classgroup", "--disc", LARGE, "--workers", "0"], "--workers"),
        (
            ["classgroup", "--disc", LARGE, "--workers", "2", "--scheduler", "tcp://127.0.0.1:1"],
            "not both",
        ),
        (["classgroup", "--disc", LARGE, "--scheduler", " "], "--scheduler"),
        (["classgroup", "61", "--method", "subexp"], "10¹⁰"),
    ]
    for args, needle in cases:
        code, out, err = run(capsys, *args)
        assert code == 2 and out == "", args
        assert err.startswith("realquad: error:") and needle in err, (args, err)
        assert len(err.strip().splitlines()) == 1


@HEAVY
@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=30)
@given(
    st.one_of(st.text(max_size=12), st.integers(-(10**14), -(10**10)).map(str)),
    st.one_of(st.none(), st.text(max_size=4), st.integers(-3, 3).map(str)),
    st.sampled_from([None, "", "nowhere:1", "tcp://"]),
)
def test_fuzz_subexp_options(capsys, text: str, workers: str | None, scheduler: str | None) -> None:  # type: ignore[no-untyped-def]
    check_subexp_options(capsys, "classgroup", text, workers, scheduler)


@HEAVY
def test_ctrl_c_during_the_sieve(tmp_path) -> None:
    """SIGINT while a 55-digit field is sieved: status 130, nothing on stdout, the file keeps what was found."""
    path = tmp_path / "rel.sqlite"
    D = "-10000000000000000000000000000000000000000000000000000339"
    code, out, err = interrupted(
        ["classgroup", "--disc", D, "--method", "subexp", "--relations", str(path), "--json"],
        after=6.0,
    )
    assert code == 130, (code, err)
    assert out == "" and err.strip().splitlines()[-1] == "realquad: interrupted"
    assert "Traceback" not in err
    import sqlite3

    with sqlite3.connect(path) as db:
        assert db.execute("SELECT count(*) FROM families").fetchone()[0] > 0
