"""The classgroup and split commands: in-process, subprocess smoke tests, bad input, fuzz."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from realquad_cli.commands import split as split_command
from realquad_cli.main import main

import realquad.classgroup.exact as classgroup_module
from tests.cli.support import run, run_json


def test_classgroup_79(capsys):
    # Q(√79): h = 3, h⁺ = 6 (from memory)
    data = run_json(capsys, "classgroup", "79")
    for key in (
        "order",
        "class_number",
        "narrow_class_number",
        "invariants",
        "narrow_invariants",
        "generators",
        "unit_norm",
        "regulator",
        "method",
        "proof",
    ):
        assert key in data
    order = data["order"]
    assert (order["radicand"], order["discriminant"], order["conductor"]) == (79, 316, 1)
    assert (data["class_number"], data["narrow_class_number"]) == (3, 6)
    assert data["invariants"] == [3] and data["narrow_invariants"] == [6]
    assert data["unit_norm"] == 1 and data["proof"] == "unconditional"
    assert data["regulator"]["value"].startswith("5.0751347")  # log(80 + 9√79), mpmath
    form = data["generators"][0]["form"]
    a, b, c = form["a"], form["b"], form["c"]
    assert b * b - 4 * a * c == 316


def test_classgroup_text_and_forms(capsys):
    code, out, err = run(capsys, "classgroup", "--disc", "1300", "--forms")
    assert code == 0, err
    assert "h = 6" in out and "class 5:" in out
    data = run_json(capsys, "classgroup", "10", "--forms")
    # Q(√10): h = 2 with a unit of norm −1 (from memory); two narrow classes listed
    assert data["class_number"] == 2 and data["unit_norm"] == -1 and len(data["classes"]) == 2


def test_classgroup_q_sqrt3(capsys):
    # Q(√3): h = 1, h⁺ = 2 (from memory)
    data = run_json(capsys, "classgroup", "3")
    assert (data["class_number"], data["narrow_class_number"], data["invariants"]) == (1, 2, [])


def test_split_79(capsys):
    data = run_json(capsys, "split", "79", "--primes-up-to", "30")
    primes = data["primes"]
    assert [e["p"] for e in primes] == [2, 3, 5, 7, 11, 13, 17, 19, 23, 29]
    for e in primes:
        assert set(e) >= {"p", "kind", "ideals", "classes", "represented_by_principal", "x", "y"}
        if e["kind"] != "inert":
            form = e["form"] if not e["represented_by_principal"] else data["principal_form"]
            a, b, c = form["a"], form["b"], form["c"]
            x, y = e["x"], e["y"]
            assert a * x * x + b * x * y + c * y * y == e["p"]
    # (D/p) by hand for D = 316: 2 and 79 ramify; 11 is inert (316 ≡ 8 mod 11, not a square)
    kinds = {e["p"]: e["kind"] for e in primes}
    assert kinds[2] == "ramified" and kinds[11] == "inert" and kinds[3] == "split"


def test_split_single_prime_and_conductor(capsys):
    data = run_json(capsys, "split", "--disc", "45", "--prime", "3")
    (entry,) = data["primes"]
    assert entry["divides_conductor"] is True and entry["ideals"] == []
    code, out, _ = run(capsys, "split", "--disc", "45", "--prime", "3")
    assert code == 0 and "divides the conductor" in out


@pytest.mark.parametrize(
    ("args", "needle"),
    [
        (["classgroup", "--disc", "-80", "--method", "bsgs"], "fields"),
        (["classgroup", "16"], "square"),
        (["classgroup", "--disc", "7"], "0 or 1 mod 4"),
        (["classgroup", "5", "--disc", "5"], "either"),
        (["classgroup"], "either"),
        (["classgroup", "abc"], "integer"),
        (["split", "79", "--prime", "9"], "prime"),
        (["split", "79", "--prime", "-3"], "prime"),
        (["split", "79", "--primes-up-to", "-3"], "between"),
        (["split", "79", "--primes-up-to", "10", "--prime", "3"], "not both"),
        (["split", "-79", "--prime", "9"], "prime"),
    ],
)
def test_bad_input(capsys, args, needle):
    code, out, err = run(capsys, *args)
    assert code == 2
    assert err.startswith("realquad: error:") and needle in err
    assert "Traceback" not in err and out == ""


def test_too_large_is_refused(capsys, monkeypatch):
    monkeypatch.setattr(classgroup_module, "DEFAULT_MAX_FORMS", 50)
    code, _, err = run(capsys, "classgroup", "1000003", "--method", "exact")
    assert code == 2 and "baby-step giant-step" in err.lower()
    # "auto" moves on to baby-step giant-step (under GRH) instead
    data = run_json(capsys, "classgroup", "1000003")
    assert data["proof"] == "GRH" and "baby-step giant-step" in data["method"]


@pytest.fixture
def capsys_fuzz(capsys):
    return capsys


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=60)
@given(
    st.lists(
        st.one_of(
            st.text(max_size=10),
            st.integers(-(10**6), 10**6).map(str),
            st.sampled_from(
                ["--disc", "--prime", "--primes-up-to", "--forms", "--json", "--max-digits"]
            ),
        ),
        max_size=5,
    ),
    st.sampled_from(["classgroup", "split"]),
)
def test_fuzz_commands(capsys_fuzz, args, command):
    # keep every run short: small limits on stored forms and on the prime bound
    classgroup_module.DEFAULT_MAX_FORMS, saved = 20_000, classgroup_module.DEFAULT_MAX_FORMS
    split_command.MAX_BOUND, saved_bound = 2000, split_command.MAX_BOUND
    try:
        code = main([command, *args])
    finally:
        classgroup_module.DEFAULT_MAX_FORMS = saved
        split_command.MAX_BOUND = saved_bound
    _, err = capsys_fuzz.readouterr()
    assert code in (0, 2)
    assert "Traceback" not in err
    if code == 2:
        assert err.startswith("realquad: error:") or "Usage" in err


@pytest.mark.parametrize(
    "args", [["classgroup", "223", "--json"], ["split", "79", "--primes-up-to", "20"]]
)
def test_subprocess_smoke(args):
    proc = subprocess.run(
        [sys.executable, "-m", "realquad", *args],
        capture_output=True,
        text=True,
        env=dict(os.environ),
        timeout=120,
    )
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.strip()
    if "--json" in args:
        assert json.loads(proc.stdout)["class_number"] == 3  # Q(√223): h = 3 (from memory)
