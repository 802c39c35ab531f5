"""``realquad classgroup --method``: choice, labels, bad input, fuzz, progress and Ctrl-C."""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import realquad.classgroup.exact as classgroup_module
from realquad.classgroup.exact import class_invariants
from tests.cli.support import interrupted, run, run_json


def test_methods_agree(capsys) -> None:  # type: ignore[no-untyped-def]
    # reference: the exact cycle method (every reduced form), against the infrastructure under GRH
    for d in ("79", "223", "--disc=10000000037"):
        args = [d] if not d.startswith("--") else d.split("=")
        a = run_json(capsys, "classgroup", *args, "--method", "exact")
        b = run_json(capsys, "classgroup", *args, "--method", "bsgs")
        for key in (
            "class_number",
            "narrow_class_number",
            "invariants",
            "narrow_invariants",
            "unit_norm",
        ):
            assert a[key] == b[key], (d, key)
        assert a["genus"] == b["genus"]
        assert a["proof"] == "unconditional" and b["proof"] == "GRH"
        assert "baby-step giant-step" in b["method"] and "Bach" in b["method"]


def test_auto_uses_the_infrastructure_for_large_fields(capsys) -> None:  # type: ignore[no-untyped-def]
    data = run_json(capsys, "classgroup", "--disc", "10000000000000061")
    assert data["proof"] == "GRH" and data["class_number"] >= 1
    assert data["narrow_class_number"] == data["class_number"] * (
        1 if data["unit_norm"] == -1 else 2
    )
    small = run_json(capsys, "classgroup", "79")
    assert small["proof"] == "unconditional"
    assert (small["class_number"], small["narrow_class_number"]) == class_invariants(4 * 79)[:2]


def test_bad_method_input(capsys) -> None:  # type: ignore[no-untyped-def]
    code, out, err = run(capsys, "classgroup", "79", "--method", "cycles")
    assert code == 2 and out == "" and err.startswith("realquad: error:")
    code, out, err = run(capsys, "classgroup", "79", "--method", "bsgs", "--forms")
    assert code == 2 and out == "" and err.startswith("realquad: error:") and "--forms" in err
    code, out, err = run(capsys, "classgroup", "--disc", "420", "--method", "bsgs")
    assert code == 2 and out == "" and err.startswith("realquad: error:") and "conductor" in err
    assert len(err.strip().splitlines()) == 1


def test_forms_with_auto_uses_the_exact_method(capsys) -> None:  # type: ignore[no-untyped-def]
    data = run_json(capsys, "classgroup", "79", "--forms")
    assert data["proof"] == "unconditional" and len(data["classes"]) == data["narrow_class_number"]


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=40)
@given(
    # (sizes to 10¹⁰: the point is the option handling; large fields have their own tests)
    st.one_of(st.text(max_size=12), st.integers(-(10**10), 10**10).map(str)),
    st.sampled_from(["auto", "exact", "bsgs", "BSGS", "", "cfrac"]),
    st.booleans(),
    st.booleans(),
)
def test_fuzz_method_option(capsys, text: str, method: str, as_disc: bool, forms: bool) -> None:  # type: ignore[no-untyped-def]
    args = ["classgroup", *(["--disc", text] if as_disc else [text]), "--method", method, "--json"]
    if forms:
        args.append("--forms")
    classgroup_module.DEFAULT_MAX_FORMS, saved = 20_000, classgroup_module.DEFAULT_MAX_FORMS
    try:
        code, _, err = run(capsys, *args)
    finally:
        classgroup_module.DEFAULT_MAX_FORMS = saved
    assert code in (0, 2)
    assert "Traceback" not in err
    if code == 2:
        assert err.startswith("realquad: error:") and len(err.strip().splitlines()) == 1


def test_ctrl_c_during_the_class_group_search() -> None:
    """SIGINT while the regulator search of a D ≈ 10²⁶ field runs: status 130, nothing on stdout."""
    D = 100000000000000000000000273  # the least prime ≡ 1 (mod 4) above 10²⁶: a long search
    code, out, err = interrupted(["classgroup", "--disc", str(D), "--method", "bsgs", "--json"])
    assert code == 130, (code, err)
    assert out == "" and err.strip().splitlines()[-1] == "realquad: interrupted"
    assert "Traceback" not in err
