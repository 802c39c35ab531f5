"""The unit command's infrastructure options: --method, --compact, --max-digits refusals, fuzz."""

from __future__ import annotations

import json
import subprocess
import sys

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from realquad.units.cfrac import regulator_cfrac
from tests.cli.support import interrupted, run, run_json


def test_methods_agree_on_small_fields(capsys) -> None:  # type: ignore[no-untyped-def]
    for d in ("94", "61", "13", "1000000007"):
        a = run_json(capsys, "unit", d, "--method", "cfrac", "--max-digits", "0")
        b = run_json(capsys, "unit", d, "--method", "bsgs", "--max-digits", "0")
        assert (
            a["number"] == b["number"]
            and a["regulator"]["value"] == b["regulator"]["value"]
            and a["norm"] == b["norm"]
        )
        assert (
            a["method"].startswith("continued fraction") and "baby-step giant-step" in b["method"]
        )
        assert a["proof"] == b["proof"] == "unconditional"


def test_small_fields_keep_the_continued_fraction_output(capsys) -> None:  # type: ignore[no-untyped-def]
    data = run_json(capsys, "unit", "94")
    # Q(√94): ε = 2143295 + 221064√94 (from memory; the realquad package doctest)
    assert data["number"] == {"x": 2143295, "y": 221064, "denominator": 1, "radicand": 94}
    assert data["period_length"] == 16 and data["truncated"] is False


def test_large_discriminant_by_infrastructure(capsys) -> None:  # type: ignore[no-untyped-def]
    D = 4 * (10**12 + 39)
    data = run_json(capsys, "unit", "--disc", str(D))
    assert data["method"] == "continued fraction (half period, product tree)"  # period 532572 < 10⁷
    data = run_json(capsys, "unit", "--disc", str(D), "--method", "bsgs")
    assert data["regulator"]["value"] == str(regulator_cfrac(D, 30))
    assert data["number"] is None and data["digits_exact"] is True  # counted from R exactly
    assert data["digits"] == 274428 and data["period_length"] is None


def test_compact_output(capsys) -> None:  # type: ignore[no-untyped-def]
    D = 4 * (10**9 + 7)
    data = run_json(capsys, "unit", "--disc", str(D), "--compact", "--max-digits", "50")
    form = data["compact"]
    assert form["sign"] in (1, -1) and len(form["chains"]) == 1
    exponents = [f["exponent"] for f in form["chains"][0]["factors"]]
    assert exponents == sorted(exponents, reverse=True) and exponents[-1] == 1
    assert all(e & (e - 1) == 0 for e in exponents)  # powers of two
    code, out, _ = run(capsys, "unit", "--disc", str(D), "--compact", "--max-digits", "50")
    assert code == 0 and "compact form" in out and "not expanded" in out


def test_bad_method_and_conflicts(capsys) -> None:  # type: ignore[no-untyped-def]
    code, out, err = run(capsys, "unit", "5", "--method", "nope")
    assert code == 2 and err.startswith("realquad: error:") and out == ""
    code, out, err = run(capsys, "unit", "5", "--method", "cfrac", "--compact")
    assert code == 2 and "compact" in err and out == ""


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.text(max_size=30), st.sampled_from(["auto", "cfrac", "bsgs", "x", ""]), st.booleans())
def test_fuzz_unit_options(capsys, text: str, method: str, compact: bool) -> None:  # type: ignore[no-untyped-def]
    args = ["unit", "--disc", text, "--method", method, "--max-digits", "20"]
    if compact:
        args.append("--compact")
    code, _, err = run(capsys, *args)
    assert code in (0, 2)
    if code == 2:
        assert err.startswith("realquad: error:") and "Traceback" not in err


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=15)
@given(st.integers(5, 10**12), st.sampled_from(["bsgs", "auto"]))
def test_fuzz_unit_sizes(capsys, D: int, method: str) -> None:  # type: ignore[no-untyped-def]
    code, _, err = run(capsys, "unit", "--disc", str(D), "--method", method, "--max-digits", "30")
    assert code in (0, 2)
    if code == 2:
        assert err.startswith("realquad: error:")


def test_subprocess_smoke() -> None:
    out = subprocess.run(
        [
            sys.executable,
            "-m",
            "realquad",
            "unit",
            "--disc",
            "4000000028",
            "--method",
            "bsgs",
            "--json",
        ],
        capture_output=True,
        text=True,
        timeout=60,
        check=True,
    )
    assert json.loads(out.stdout)["method"] == "infrastructure baby-step giant-step"


def test_interrupt_during_the_search_exits_cleanly(capsys, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    import realquad.units.bsgs as bsgs

    def interrupted(*args: object, **kwargs: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(bsgs, "search_regulator", interrupted)
    code, out, err = run(capsys, "unit", "--disc", "4000000028", "--method", "bsgs", "--json")
    assert code == 130 and out == "" and "interrupted" in err


def test_progress_callback_sees_the_search(capsys) -> None:  # type: ignore[no-untyped-def]
    from realquad.infrastructure.regulator_search import search_regulator

    seen: list[float] = []
    # no estimate to go by (10 ≪ R): the giant steps sweep all the way to R, about 10⁴ of them
    search_regulator(
        10**18 + 9,
        20,
        max_table=20000,
        estimate=10.0,
        progress=lambda what, x, *expected: seen.append(x),
    )
    assert seen and seen == sorted(seen)  # giant steps only move forward


def test_results_are_labelled_unconditional_not_grh(capsys) -> None:  # type: ignore[no-untyped-def]
    # No infrastructure result rests on GRH: the hR estimate only sizes the search.
    for method in ("bsgs", "auto", "cfrac"):
        data = run_json(
            capsys, "unit", "--disc", "4000000028", "--method", method, "--max-digits", "10"
        )
        assert data["proof"] == "unconditional"


def test_out_of_reach_is_refused_before_starting(capsys) -> None:  # type: ignore[no-untyped-def]
    code, out, err = run(capsys, "unit", "--disc", str(10**60 + 1), "--method", "bsgs")
    assert code == 2 and out == "" and err.startswith("realquad: error:") and "beyond reach" in err


def test_ctrl_c_during_the_infrastructure_search() -> None:
    """SIGINT during a long baby-step giant-step search: status 130, one line, nothing on stdout."""
    # the least prime D ≡ 1 (mod 4) above 10³³: beyond the compiled kernels' 2¹⁰⁶, a search
    # of minutes in the pure twin (the in-process test of the compiled loop's Ctrl-C is in
    # test_infrastructure_kernels.py)
    D = 1000000000000000000000000000000061
    code, out, err = interrupted(["unit", "--disc", str(D), "--method", "bsgs", "--json"])
    assert code == 130, (code, err)
    assert out == "" and err.strip() == "realquad: interrupted"
