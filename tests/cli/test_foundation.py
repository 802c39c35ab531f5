"""The cfrac, pell and unit commands: in-process, one subprocess smoke test each, bad input, fuzz."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from realquad_cli.main import main

from tests.cli.support import interrupted, run, run_json


def test_pell_61(capsys):
    data = run_json(capsys, "pell", "61")
    # OEIS A002350 / A002349 at n = 61
    assert (data["x"], data["y"], data["solvable"]) == (1766319049, 226153980, True)
    assert data["digits"] == 10 and data["period_length"] == 11
    assert data["method"] and data["proof"] == "unconditional"
    code, out, _ = run(capsys, "pell", "61")
    assert code == 0 and "1766319049" in out and "proof: unconditional" in out


def test_pell_negative_norm(capsys):
    data = run_json(capsys, "pell", "3", "--norm", "-1")
    assert data["solvable"] is False and data["x"] is None and "norm +1" in data["reason"]
    data = run_json(capsys, "pell", "13", "--norm=-4")
    assert (data["x"], data["y"]) == (3, 1)


def test_unit_94(capsys):
    data = run_json(capsys, "unit", "94")
    assert data["number"] == {
        "x": 2143295,
        "y": 221064,
        "denominator": 1,
        "radicand": 94,
    }  # 2143295² − 94·221064² = 1
    assert 2143295**2 - 94 * 221064**2 == 1
    order = data["order"]
    assert data["norm"] == 1 and order["radicand"] == 94 and order["discriminant"] == 376
    assert data["regulator"]["value"].startswith("15.27100210303118")
    assert data["proof"] == "unconditional" and data["method"]


def test_unit_disc_52(capsys):
    data = run_json(capsys, "unit", "--disc", "52")
    assert data["order"]["conductor"] == 2 and data["order"]["radicand"] == 13
    # ((3 + √13)/2)³ = 18 + 5√13
    assert data["number"] == {"x": 18, "y": 5, "denominator": 1, "radicand": 13}
    assert data["norm"] == -1


def test_cfrac(capsys):
    data = run_json(capsys, "cfrac", "(1+sqrt(13))/2")
    assert data["preperiod"] == [2] and data["period"] == [3]
    data = run_json(capsys, "cfrac", "61")
    assert data["period"] == [1, 4, 3, 1, 2, 2, 1, 3, 4, 1, 14]


def test_max_digits_and_output(capsys, tmp_path):
    out_file = tmp_path / "x.txt"
    data = run_json(
        capsys, "pell", "410286423278424", "--max-digits", "50", "--output", str(out_file)
    )
    assert isinstance(data["x"], dict) and data["truncated"] is True
    digits = data["x"]["digits"]
    assert digits == data["digits"] and digits > 1000
    text = out_file.read_text()
    x_line = next(line for line in text.splitlines() if line.startswith("x = "))
    y_line = next(line for line in text.splitlines() if line.startswith("y = "))
    x, y = int(x_line[4:].strip()) if len(x_line) < 4000 else None, None
    # check the full solution from the file with gmpy2 (beyond Python's 4300-digit str/int limit)
    import gmpy2

    X, Y = gmpy2.mpz(x_line[4:].strip()), gmpy2.mpz(y_line[4:].strip())
    assert X * X - 410286423278424 * Y * Y == 1
    assert x_line[4:24] == data["x"]["leading"]
    assert x is None and y is None
    full = run_json(capsys, "pell", "410286423278424", "--max-digits", "0")
    assert full["x"] == int(X)


def test_max_digits_text(capsys):
    code, out, _ = run(capsys, "unit", "1000000007", "--max-digits", "30")
    assert code == 0 and "digits; --max-digits 0" in out


@pytest.mark.parametrize(
    "args,needle",
    [
        (["pell", "0"], "must not be 0"),
        (["pell", "abc"], "integer"),
        (["pell", "2.5"], "integer"),
        (["pell", "7", "--norm", "3"], "norm"),
        (["pell", "7", "--norm", "x"], "integer"),
        (["unit", "9"], "perfect square"),
        (["unit", "0"], "non-zero"),
        (["unit", "--disc", "7"], "0 or 1 mod 4"),
        (["unit", "--disc", "16"], "perfect square"),
        (["unit"], "either"),
        (["unit", "5", "--disc", "5"], "either"),
        (["cfrac", "sqrt("], "position"),
        (["cfrac", "sqrt(-2)"], "negative"),
        (["pell"], "Missing argument"),
        (["nosuchcommand"], "No such command"),
        (["pell", "7", "--max-digits", "-1"], "max-digits"),
        (["pell", "7", "--output", "/nonexistent-dir/x.txt"], "no such directory"),
    ],
)
def test_bad_input(capsys, args, needle):
    code, out, err = run(capsys, *args)
    assert code == 2
    assert err.startswith("realquad: error:") and err.count("\n") == 1, err
    assert needle.lower() in err.lower()
    assert "Traceback" not in err


def test_too_long_period_is_refused(capsys, monkeypatch):
    import realquad.units as units

    monkeypatch.setattr(
        units.fundamental_unit, "__kwdefaults__", {"max_period": 1000, "progress": None}
    )
    code, _, err = run(capsys, "unit", "1000000000091")
    assert code == 2 and "Baby-step giant-step" in err


@settings(suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.text(max_size=12), max_size=5), st.sampled_from(["pell", "unit", "cfrac"]))
def test_fuzz_commands(capsys_fuzz, args, command):
    code = main([command, *args])
    _, err = capsys_fuzz.readouterr()
    assert code in (0, 2)
    assert "Traceback" not in err
    if code == 2:
        assert err.startswith("realquad: error:") or "Usage" in err


@pytest.fixture
def capsys_fuzz(capsys):
    return capsys


@pytest.mark.parametrize(
    "args",
    [["pell", "61"], ["unit", "--disc", "52", "--json"], ["cfrac", "sqrt(61)"], ["--version"]],
)
def test_subprocess_smoke(args):
    env = dict(os.environ)
    proc = subprocess.run(
        [sys.executable, "-m", "realquad", *args],
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.strip()


def test_subprocess_error_exit_status():
    proc = subprocess.run(
        [sys.executable, "-m", "realquad", "pell", "0"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert proc.returncode == 2
    assert proc.stderr.startswith("realquad: error:") and "Traceback" not in proc.stderr


def test_ctrl_c_exits_cleanly():
    """SIGINT during a long continued-fraction walk: status 130, one line, no traceback."""
    # d = 2⁶² + 135: the discriminant 4d is beyond the compiled kernels' word size, so the pure
    # twin walks a period estimated at ~10⁹ steps (within reach of the limit, not of 3 seconds)
    code, _, err = interrupted(["unit", str(2**62 + 135), "--method", "cfrac"])
    assert code == 130, (code, err)
    assert err.strip() == "realquad: interrupted"
