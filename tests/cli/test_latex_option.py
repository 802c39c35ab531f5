"""``--latex`` on every command: present, well-formed (parsed, or compiled where an engine is
installed), refused beside ``--json`` or ``--csv``, long integers summarised as in the text."""

from __future__ import annotations

import ast
import re
from pathlib import Path
from typing import Any

import click
import pytest
from realquad_cli.main import cli, main
from sympy.solvers.diophantine.diophantine import diop_DN

from realquad._backend import BACKEND
from tests.cli.support import COMMAND_NAMES, run
from tests.latex_support import check_latex, compile_latex, latex_engine, to_sympy

COMMANDS_DIR = Path(__file__).resolve().parents[2] / "cli" / "commands"


def _commands(group: click.Group, prefix: str = "") -> dict[str, click.Command]:
    found: dict[str, click.Command] = {}
    for name, command in group.commands.items():
        if isinstance(command, click.Group):
            found.update(_commands(command, f"{prefix}{name} "))
        else:
            found[prefix + name] = command
    return found


def test_every_command_passes_its_latex() -> None:
    # emit(payload, text, as_json, max_digits, latex): a command without its LaTeX would
    # answer --latex with an error; read every call of emit in the command modules
    for path in sorted(COMMANDS_DIR.glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Call) and getattr(node.func, "id", None) == "emit":
                given = len(node.args) >= 5 or any(k.arg == "latex" for k in node.keywords)
                assert given, f"{path.name}:{node.lineno}: emit without the command's LaTeX"


def test_every_command_takes_latex() -> None:
    commands = _commands(cli)
    assert set(COMMAND_NAMES) <= set(commands)
    for name, command in commands.items():
        options = {o for p in command.params for o in getattr(p, "opts", [])}
        assert "--latex" in options, name


@pytest.fixture(scope="module")
def survey_db(tmp_path_factory: pytest.TempPathFactory) -> str:
    db = str(tmp_path_factory.mktemp("survey") / "s.sqlite")
    for low, high in (("2", "200"), ("-80", "-3")):  # real and imaginary fields
        args = ["survey", "run", "--d-min", low, "--d-max", high, "--db", db, "--workers", "1"]
        assert main(args) == 0
    return db


CASES = [
    ["cfrac", "61", "--convergents", "5", "--best", "100"],
    ["cfrac", "-7/3"],
    ["pell", "61"],
    ["pell", "3", "--norm", "-1"],
    ["pell", "9"],
    ["unit", "94"],
    ["unit", "-3"],
    ["classgroup", "79"],
    ["classgroup", "-84"],
    ["split", "79", "--primes-up-to", "30"],
    ["split", "-14", "--primes-up-to", "30"],
    ["represent", "x^2 + 14y^2", "--primes-up-to", "60"],
    ["represent", "x^2 - 79y^2"],
    ["solve", "x^2 - 13y^2 = -4", "--bound", "100"],
    ["solve", "x^2 + y^2 = 25"],
    ["solve", "x^2 - 2xy + y^2 - x = 0"],
    ["solve", "x^2 - 3xy + y^2 + x = 5"],
    ["solve", "x^2 - 13y^2 = -4", "--member", "2"],
    ["pell", "61", "--mod", "1000", "--leading", "5"],
    ["unit", "94", "--compact"],
    ["classgroup", "--disc", "316", "--forms"],
    ["unit", "1000003"],
    ["pell", "1000003"],
]


def _outputs(capsys: Any, db: str) -> list[str]:
    outs = []
    for args in [
        *CASES,
        ["survey", "query", "--db", db, "--d-min", "-20", "--d-max", "30"],
        ["survey", "report", "--db", db],
    ]:
        code, out, err = run(capsys, *args, "--latex")
        assert code == 0, (args, err)
        outs.append(out)
    return outs


def test_every_command_writes_latex_that_parses_and_compiles(
    capsys: Any, survey_db: str, tmp_path: Path
) -> None:
    outs = _outputs(capsys, survey_db)
    assert r"\mathfrak{p}" in outs[9] and "imaginary fields" in outs[-1]
    for out in outs:
        check_latex(out)
        assert "% method: " in out or "proof: " in out or r"\begin{tabular}" in out
    if latex_engine() is None:
        pytest.skip("no LaTeX engine (pdflatex, lualatex, tectonic) installed; parsed only")
    log = compile_latex(outs, tmp_path)
    assert "Overfull \\hbox" not in log  # every formula fits the width of a page


def test_pell_61_in_latex(capsys: Any) -> None:
    code, out, _ = run(capsys, "pell", "61", "--latex")
    assert code == 0
    m = re.search(r"\(x_\{1\}, y_\{1\}\) = \((\d+), (\d+)\)", out)
    assert m is not None
    # the least solution of x² − 61y² = 1 (sympy's diop_DN, an independent solver)
    assert (int(m[1]), int(m[2])) in diop_DN(61, 1)
    assert "% method: " in out and "proof: unconditional" in out


@pytest.mark.parametrize(
    "args",
    [["pell", "61", "--json"], ["classgroup", "79", "--json"], ["survey", "query", "--csv"]],
)
def test_latex_with_json_or_csv_is_refused(capsys: Any, args: list[str]) -> None:
    code, out, err = run(capsys, *args, "--latex")
    assert code == 2 and out == ""
    assert err.startswith("realquad: error: give --latex or --") and err.count("\n") == 1


def test_long_integers_are_summarised_as_in_the_text(capsys: Any) -> None:
    d = str(10**9 + 7)  # x has 6382 digits (more than --max-digits 100)
    code, text, _ = run(capsys, "pell", d, "--max-digits", "100")
    assert code == 0
    code, out, _ = run(capsys, "pell", d, "--max-digits", "100", "--latex")
    assert code == 0
    check_latex(out)
    terminal = re.search(r"x = (\d+)…(\d+) \(([\d,]+) digits", text)
    typeset = re.search(r"\\underbrace\{(\d+)\\ldots (\d+)\}_\{(\d+)\\text\{ digits\}\}", out)
    assert terminal is not None and typeset is not None
    assert typeset.groups() == (terminal[1], terminal[2], terminal[3].replace(",", ""))
    code, full, _ = run(capsys, "pell", "61", "--max-digits", "0", "--latex")
    assert code == 0 and r"\underbrace" not in full


def test_a_unit_in_compact_form(capsys: Any) -> None:
    code, out, _ = run(capsys, "unit", "--disc", "100000000000000000129", "--latex")
    assert code == 0
    check_latex(out)
    assert r"\varepsilon = " in out and "digits" in out
    # the first factor of the compact form is a number of Q(√D) written as a surd
    first = re.search(
        r"\\left\((\\frac\{[^{}]*\\sqrt\{100000000000000000129\}\}\{\d+\})\\right\)", out
    )
    assert first is not None
    assert to_sympy(first[1]).is_real


def test_members_of_the_families(capsys: Any) -> None:
    code, out, _ = run(capsys, "solve", "x^2 - 13y^2 = -4", "--member", "2", "--latex")
    assert code == 0
    row = next(line for line in out.splitlines() if line.startswith("k = 2:"))
    members = [(int(x), int(y)) for x, y in re.findall(r"\((-?\d+), (-?\d+)\)", row)]
    assert len(members) == 3 and all(x * x - 13 * y * y == -4 for x, y in members)


def test_an_output_file_is_named_in_a_comment(capsys: Any, tmp_path: Path) -> None:
    target = tmp_path / "x.txt"
    code, out, _ = run(capsys, "pell", "61", "--output", str(target), "--latex")
    assert code == 0 and target.exists()
    assert out.rstrip().endswith(f"% full values written to {target}")
    check_latex(out)


@pytest.mark.skipif(
    BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)
def test_a_family_in_compact_form(capsys: Any) -> None:
    code, out, err = run(capsys, "solve", "x^2 - 1000000000000000000000049 y^2 = 1", "--latex")
    assert code == 0, err
    check_latex(out)
    assert r"x + y\sqrt{1000000000000000000000049} = \pm\varepsilon^{k}" in out
    assert r"\varepsilon = " in out


@pytest.mark.skipif(
    BACKEND != "compiled",
    reason="the infrastructure's giant steps run compiled (the pure twin would take minutes)",
)
def test_families_in_compact_form_share_one_unit(capsys: Any) -> None:
    d = 10**24 + 49
    code, out, err = run(capsys, "solve", f"x^2 - {d} y^2 = {1 - d}", "--latex")
    assert code == 0, err
    check_latex(out)
    assert out.count(r"\varepsilon = ") == 1  # written once, after the families that share it
    family = re.escape(r"\right)\varepsilon^{k}")
    root = re.escape(rf"\sqrt{{{d}}}")
    starts = re.findall(rf"= \\pm\\left\((-?\d+) \+ {root}{family}", out)
    assert sorted(int(x) for x in starts) == [-1, 1]
    assert all(x * x - d == 1 - d for x in (-1, 1))  # (±1, 1) solve x² − dy² = 1 − d


def test_a_long_unit_over_rows_reads_back(capsys: Any) -> None:
    code, out, _ = run(capsys, "unit", "1000003", "--latex")
    assert code == 0
    rows = out.split("\\\\\n")
    start = {
        name: next(i for i, r in enumerate(rows) if r.startswith(f"{name} = ")) for name in "xy"
    }

    def read(name: str, stop: int) -> int:
        digits = " ".join(rows[start[name] : stop]).removeprefix(f"{name} = ")
        return int(re.sub(r"[^0-9]", "", digits.split(r"\end")[0]))

    x, y = read("x", start["y"]), read("y", len(rows))
    assert len(str(x)) > 200 and x * x - 1000003 * y * y == 1  # a unit of norm +1


def _digits_after(rows: list[str], name: str) -> int:
    """The integer written from the row ``name = …`` on, over the rows that continue it."""
    start = next(i for i, r in enumerate(rows) if r.startswith(f"{name} = "))
    body = [rows[start].removeprefix(f"{name} = ")]
    for row in rows[start + 1 :]:
        digits = row.split(r"\end")[0].strip()
        if not re.fullmatch(r"[\d\\,]+", digits):
            break
        body.append(digits)
    return int(re.sub(r"[^0-9]", "", " ".join(body).split(r"\end")[0]))


def test_long_solutions_and_units_are_named(capsys: Any) -> None:
    d, n = 1000003, -2
    code, out, _ = run(capsys, "solve", f"x^2 - {d} y^2 = {n}", "--latex")
    assert code == 0
    check_latex(out)
    assert r"= \pm\alpha_{1}\varepsilon^{k}" in out and r"\varepsilon = t + u\sqrt" in out
    rows = out.split("\\\\\n")
    x, y = _digits_after(rows, "x_{1}"), _digits_after(rows, "y_{1}")
    t, u = _digits_after(rows, "t"), _digits_after(rows, "u")
    assert x * x - d * y * y == n and t * t - d * u * u == 1  # read back, checked by arithmetic
