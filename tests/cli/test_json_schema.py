"""Every command's ``--json`` against the objects documented in docs/json.md.

The page's tables are read as a JSON Schema (one definition per object, every
key with its type; no key that is not documented may appear, every key not
marked optional must), and the output of each command is validated with the
``jsonschema`` library, in the situations that change its shape (summarised
integers, ``--forms``, ``--member``, ``--compact``, ``--output``, finite and
infinite solution sets, the survey commands).
"""

from __future__ import annotations

import json
import re
from pathlib import Path
from typing import Any

import gmpy2
import jsonschema
import pytest

from tests.cli.support import COMMAND_NAMES, run

PAGE = Path(__file__).resolve().parents[2] / "docs" / "json.md"

_LINK = re.compile(r"\[(\w+)\]\(#\w+\)")


def _type(text: str) -> dict[str, Any]:
    """The schema of a type written in the page's grammar."""
    text = text.strip()
    if text.endswith(" or null"):
        return {"anyOf": [_type(text[: -len(" or null")]), {"type": "null"}]}
    if text.startswith("list of "):
        return {"type": "array", "items": _type(text[len("list of ") :])}
    if text == "map of string to integer":
        return {"type": "object", "additionalProperties": _type("integer")}
    link = _LINK.fullmatch(text)
    if link:
        return {"$ref": f"#/$defs/{link.group(1)}"}
    simple = {
        "integer": {"anyOf": [{"type": "integer"}, {"$ref": "#/$defs/Summary"}]},
        "string": {"type": "string"},
        "decimal": {"type": "string", "pattern": r"^-?[0-9]+(\.[0-9]+)?(e[-+]?[0-9]+)?$"},
        "boolean": {"type": "boolean"},
    }
    if text not in simple:
        raise ValueError(f"docs/json.md: unknown type {text!r}")
    return simple[text]


def page_schema() -> dict[str, Any]:
    """``{"$defs": {object: schema}}`` from the page's ``###`` sections and their tables."""
    definitions: dict[str, Any] = {}
    extends: dict[str, str] = {}
    name = None
    for line in PAGE.read_text(encoding="utf-8").splitlines():
        heading = re.fullmatch(r"### (\w+)", line)
        if heading:
            name = heading.group(1)
            definitions[name] = {
                "type": "object",
                "properties": {},
                "required": [],
                "additionalProperties": False,
            }
            continue
        if name is None:
            continue
        base = re.fullmatch(r"Extends: \[(\w+)\]\(#\w+\)\.", line)
        if base:
            extends[name] = base.group(1)
        row = re.fullmatch(r"\| `(\w+)` \| (.+?) \| .+ \|", line)
        if row:
            key, kind = row.groups()
            optional = kind.endswith("*(optional)*")
            kind = kind.replace("*(optional)*", "").strip()
            if name == "Summary" and kind == "integer":
                schema = {"type": "integer"}  # a summary's own digit count is never summarised
            else:
                schema = _type(kind)
            definitions[name]["properties"][key] = schema
            if not optional:
                definitions[name]["required"].append(key)
    for child, parent in extends.items():
        definitions[child]["properties"] = {
            **definitions[parent]["properties"],
            **definitions[child]["properties"],
        }
        definitions[child]["required"] = definitions[parent]["required"] + [
            key
            for key in definitions[child]["required"]
            if key not in definitions[parent]["required"]
        ]
    return {"$defs": definitions}


def _commands() -> dict[str, list[str]]:
    """``{"pell": ["PellOutput"], …}`` from the page's table of commands (every object a command prints)."""
    found = {}
    for line in PAGE.read_text(encoding="utf-8").splitlines():
        row = re.fullmatch(r"\| `realquad ([\w ]+)` \| (.+) \|", line)
        if row:
            found[row.group(1)] = _LINK.findall(row.group(2))
    return found


SCHEMA = page_schema()
COMMANDS = _commands()


def _validate(command: str, data: Any) -> None:
    shapes = [{"$ref": f"#/$defs/{name}"} for name in COMMANDS[command]]
    jsonschema.validate(data, {**SCHEMA, "oneOf": shapes})


def test_page_names_every_command_and_defines_every_object() -> None:
    assert set(COMMANDS) == set(COMMAND_NAMES)
    jsonschema.Draft202012Validator.check_schema({**SCHEMA, "$ref": "#/$defs/Unit"})
    for names in COMMANDS.values():
        assert names and all(name in SCHEMA["$defs"] for name in names)


CASES = [
    ["cfrac", "61"],
    ["cfrac", "355/113"],
    ["cfrac", "(1+sqrt(13))/2", "--max-terms", "1"],
    ["pell", "61"],
    ["pell", "3", "--norm", "-1"],
    ["pell", "16"],
    ["pell", "410286423278424", "--max-digits", "50"],
    ["pell", "61", "--norm", "-1", "--mod", "1000", "--leading", "3"],
    ["pell", "1000000007", "--leading", "12", "--mod", "97", "--max-digits", "20"],
    ["unit", "94"],
    ["unit", "--disc", "52"],
    ["unit", "1000000007", "--max-digits", "30"],
    ["unit", "--disc", "4000000028", "--compact", "--max-digits", "5"],
    ["unit", "-3"],
    ["unit", "--disc", "-20"],
    ["pell", "-5", "--norm", "4"],
    ["classgroup", "-5"],
    ["classgroup", "--disc", "-420", "--forms"],
    ["split", "-14", "--primes-up-to", "13"],
    ["cfrac", "sqrt(2)", "--convergents", "5", "--best", "100"],
    ["classgroup", "79"],
    ["classgroup", "--disc", "1300", "--forms"],
    ["classgroup", "--disc", "10000000037", "--method", "bsgs"],
    ["split", "79", "--primes-up-to", "30"],
    ["split", "--disc", "45", "--prime", "3"],
    ["solve", "x^2 - 13y^2 = -4", "--bound", "100", "--member", "2"],
    ["solve", "x^2 - 61y^2 = 1", "--member", "40", "--max-digits", "30"],
    ["solve", "x^2 + y^2 = 25"],
    ["solve", "xy + x + y + 1 = 0", "--bound", "2", "--member", "1"],
    ["solve", "y = x^2", "--bound", "5", "--member", "3"],
    ["solve", "x^2 - 2y^2 + 3x - 5y = 7"],
    ["form", "reduce", "6x^2 + 5xy + 2y^2"],
    ["form", "reduce", "(1, 1, -18)"],
    ["form", "equivalent", "3x^2 + 7xy - 2y^2", "(-2, 5, 6)"],
    ["form", "equivalent", "x^2 + y^2", "x^2 + 2y^2"],
    ["form", "compose", "3x^2 + 2xy + 5y^2", "2x^2 + 7y^2"],
    ["form", "compose", "(3, 2, -26)", "(3, 2, -26)", "--method", "nucomp"],
    ["form", "power", "(2, 1, 3)", "-4"],
    ["form", "cycle", "x^2 - 79y^2"],
    ["form", "cycle", "x^2 - 991y^2", "--max-digits", "10"],
    ["form", "class", "3x^2 + 2xy + 5y^2"],
    ["form", "class", "(3, 14, -10)"],
]


@pytest.mark.parametrize("args", CASES, ids=[" ".join(a) for a in CASES])
def test_command_output_matches_the_page(
    capsys: pytest.CaptureFixture[str], args: list[str]
) -> None:
    code, out, err = run(capsys, *args, "--json")
    assert code == 0, err
    data = json.loads(out, parse_int=lambda text: int(gmpy2.mpz(text)))
    _validate(" ".join(args[:2]) if args[0] == "form" else args[0], data)


def test_output_file_keys(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    for args in (
        ["pell", "61"],
        ["unit", "94"],
        ["cfrac", "61"],
        ["solve", "x^2 - 2y^2 = 7"],
    ):
        target = tmp_path / f"{args[0]}.txt"
        code, out, err = run(capsys, *args, "--output", str(target), "--json")
        assert code == 0, err
        data = json.loads(out)
        assert data["output"] == str(target)
        _validate(args[0], data)


def test_survey_commands_match_the_page(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    db = str(tmp_path / "s.sqlite")
    for args, command in (
        (["survey", "run", "--d-max", "300", "--db", db, "--workers", "1"], "survey run"),
        (["survey", "query", "--db", db, "--limit", "0"], "survey query"),
        (["survey", "report", "--db", db], "survey report"),
        # imaginary fields, into the same store: rows with empty unit keys, the report's section
        (["survey", "run", "--d-min", "-300", "--d-max", "-1", "--db", db], "survey run"),
        (["survey", "query", "--db", db, "--d-max", "-250"], "survey query"),
        (["survey", "report", "--db", db], "survey report"),
    ):
        code, out, err = run(capsys, *args, "--json")
        assert code == 0, err
        _validate(command, json.loads(out))


def test_the_schema_rejects_an_undocumented_key() -> None:
    # the validation is strict: a key the page does not name fails, so does a missing one
    good = {"discriminant": 5, "fundamental_discriminant": 5, "conductor": 1, "radicand": 5}
    jsonschema.validate(good, {**SCHEMA, "$ref": "#/$defs/Order"})
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate({**good, "d": 5}, {**SCHEMA, "$ref": "#/$defs/Order"})
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate({"discriminant": 5}, {**SCHEMA, "$ref": "#/$defs/Order"})
