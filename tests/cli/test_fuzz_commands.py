"""Every command fuzzed: random argument lists (words of the command line and random strings, of
random sizes) give an answer (exit 0) or one error line (exit 2), never a traceback."""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.cli.support import COMMAND_NAMES, run

#: Words a command line is made of, to mix with random text.
WORDS = [
    "--json", "--latex", "--disc", "--norm", "--digits", "--max-digits", "--output", "--method", "--forms",
    "--prime", "--primes-up-to", "--bound", "--member", "--max-terms", "--convergents", "--best",
    "--compact", "--d-min", "--d-max", "--db", "--limit", "--csv", "--top", "--class-number",
    "auto", "exact", "bsgs", "cfrac", "-1", "-5", "0", "1", "2", "4", "61", "79", "-20", "1300",
    "10^6", "x^2 - 2y^2 = 1", "sqrt(61)", "(1+sqrt(13))/2", "−3", "٣", "--", "-", "=", "",
    "x^2 - 79y^2", "2x^2 + 2xy + 3y^2", "(3, 7, -2)", "1,0,5", "--max-forms", "nucomp",
]  # fmt: skip

arguments = st.lists(
    st.one_of(
        st.sampled_from(WORDS),
        st.text(max_size=12),
        st.integers(-(10**30), 10**30).map(str),
    ),
    max_size=6,
)


@pytest.mark.parametrize("command", COMMAND_NAMES)
@settings(
    suppress_health_check=[HealthCheck.function_scoped_fixture], max_examples=25, deadline=None
)
@given(args=arguments)
def test_random_arguments(capsys, monkeypatch, tmp_path, command: str, args: list[str]) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.chdir(tmp_path)
    words = [a for a in args if "--output" not in a and "--db" not in a]  # no files from a fuzz run
    if command.startswith("survey") and "--db" not in words:
        words += ["--db", str(tmp_path / "missing.sqlite")]
    if command == "survey run":
        words += ["--d-max", "50"]
    code, out, err = run(capsys, *command.split(), *words)
    assert code in (0, 2), (code, err[:300])
    assert "Traceback" not in err and "internal error" not in err, err[:300]
    if code == 2:
        assert err.startswith("realquad: error:") and err.count("\n") == 1, err[:300]
