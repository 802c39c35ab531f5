"""``realquad unit --method subexp`` and ``classgroup --method subexp`` on real fields.

References: the continued fraction's unit and regulator (unconditional) and
the cycle method's class groups; the compact file checked with the evaluator
printed in docs/pell.md.
"""

from __future__ import annotations

import sqlite3

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from realquad.classgroup import class_group
from realquad.units import fundamental_unit, regulator
from realquad.units import subexp as units_subexp
from tests.cli.support import check_subexp_options, interrupted, run, run_json
from tests.equations.test_pell import _evaluator_from_the_docs
from tests.markers import HEAVY

#: Q(√(10¹⁰ + 19)): h = 1, h⁺ = 2, R = 147160.386… (the cycle method and the continued fraction)
D = 4 * (10**10 + 19)


def test_unit_and_group_agree_with_the_unconditional_methods(capsys) -> None:  # type: ignore[no-untyped-def]
    data = run_json(
        capsys,
        "unit",
        "--disc",
        str(D),
        "--method",
        "subexp",
        "--digits",
        "40",
        "--max-digits",
        "0",
    )
    reference = fundamental_unit(D, method="cfrac")
    assert data["regulator"]["value"] == str(regulator(D, 40, method="cfrac"))
    assert data["norm"] == reference.norm and data["proof"] == "GRH"
    assert data["number"]["x"] == reference.x
    group = run_json(capsys, "classgroup", "--disc", str(D), "--method", "subexp")
    exact = class_group(D, method="exact")
    assert (group["class_number"], group["narrow_class_number"]) == (1, 2)
    assert group["narrow_invariants"] == exact.narrow_invariants
    assert group["proof"] == "GRH" and group["method"].startswith("index calculus")


def test_a_power_product_is_summarised_and_written(capsys, tmp_path, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    # a unit kept as a product of relation generators (when the walk cannot reach O): one
    # line on screen, every factor in the file (a unit of about 10⁹ digits, written in
    # compact form even with --output)
    def no_walk(*args: object, **kwargs: object) -> None:
        raise ArithmeticError("O not near")

    monkeypatch.setattr(units_subexp, "exact_principal_at", no_walk)  # the product stays
    path = tmp_path / "unit.txt"
    large = 1000000000000000009  # prime ≡ 1 (mod 4)
    code, out, err = run(
        capsys,
        "unit",
        "--disc",
        str(large),
        "--method",
        "subexp",
        "--compact",
        "--max-digits",
        "10",
        "--output",
        str(path),
    )
    assert code == 0, err
    assert "too many to print" in out and len(out.splitlines()) < 12
    text = path.read_text()
    m = 998244353
    x, y = _evaluator_from_the_docs()(text, m)
    n = int(next(line.split()[1] for line in text.splitlines() if line.startswith("n ")))
    assert (x * x - large * y * y - n) % m == 0 and n in (4, -4)


def test_an_order_of_conductor_3(capsys) -> None:  # type: ignore[no-untyped-def]
    # the field's unit, then its least power in the order: against the order's continued fraction
    data = run_json(capsys, "unit", "--disc", str(9 * D), "--method", "subexp", "--digits", "30")
    reference = fundamental_unit(9 * D, method="cfrac")
    assert data["regulator"]["value"] == str(regulator(9 * D, 30, method="cfrac"))
    assert data["norm"] == reference.norm and data["proof"] == "GRH"
    assert "least power of the field's unit" in data["method"]


def test_bad_options(capsys) -> None:  # type: ignore[no-untyped-def]
    cases = [
        (["unit", "61", "--workers", "2"], "--method subexp"),
        (["unit", "61", "--method", "subexp"], "10¹⁰"),
        (["unit", "--disc", str(D), "--method", "subexp", "--workers", "0"], "--workers"),
    ]
    for args, needle in cases:
        code, out, err = run(capsys, *args)
        assert code == 2 and out == "", args
        assert err.startswith("realquad: error:") and needle in err, (args, err)
        assert len(err.strip().splitlines()) == 1


@HEAVY
@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=12)
@given(
    st.one_of(st.text(max_size=12), st.integers(10**10, 10**13).map(str)),
    st.one_of(st.none(), st.text(max_size=4), st.integers(-3, 3).map(str)),
    st.sampled_from([None, "", "nowhere:1", "tcp://"]),
)
def test_fuzz_subexp_options(capsys, text: str, workers: str | None, scheduler: str | None) -> None:  # type: ignore[no-untyped-def]
    check_subexp_options(capsys, "unit", text, workers, scheduler)


@HEAVY
def test_relation_file_resumes_with_the_same_unit(capsys, tmp_path) -> None:  # type: ignore[no-untyped-def]
    path = str(tmp_path / "rel.sqlite")
    args = ["unit", "--disc", "100000000000000000129", "--method", "subexp", "--relations", path]
    first = run_json(capsys, *args)
    again = run_json(capsys, *args)
    assert first["regulator"]["value"] == again["regulator"]["value"]
    assert (
        first["regulator"]["value"][:12] == "19323786743."
    )  # baby-step giant-step, docs/classgroup.md


@HEAVY
def test_ctrl_c_during_the_sieve_of_a_real_field(tmp_path) -> None:
    """SIGINT while a 55-digit real field is sieved: status 130, nothing on stdout, relations kept."""
    path = tmp_path / "rel.sqlite"
    D = "10000000000000000000000000000000000000000000000000000021"  # prime ≡ 1 (mod 4)
    code, out, err = interrupted(
        ["unit", "--disc", D, "--method", "subexp", "--relations", str(path), "--json"],
        after=6.0,
    )
    assert code == 130, (code, err)
    assert out == "" and err.strip().splitlines()[-1] == "realquad: interrupted"
    assert "Traceback" not in err
    with sqlite3.connect(path) as db:
        assert db.execute("SELECT count(*) FROM families").fetchone()[0] > 0
