"""``--output FILE``: regular files only, written atomically, with the umask; one line otherwise."""

from __future__ import annotations

import os
import stat
from pathlib import Path

import pytest

from tests.cli.support import run

COMMANDS = [["pell", "61"], ["unit", "94"], ["cfrac", "61"], ["solve", "x^2 - 2y^2 = 7"]]


def _leftovers(directory: Path) -> list[str]:
    return [name for name in os.listdir(directory) if name.startswith(".realquad-")]


@pytest.mark.parametrize("args", COMMANDS, ids=lambda a: a[0])
def test_refuses_what_is_not_a_regular_file(capsys, tmp_path: Path, args: list[str]) -> None:
    fifo = tmp_path / "fifo"
    os.mkfifo(fifo)
    for target, needle in (
        ("", "needs a file name"),
        (str(fifo), "not a regular file"),
        ("/dev/null", "not a regular file"),
        (str(tmp_path), "directory"),
        (str(tmp_path / "missing" / "x"), "no such directory"),
        (str(tmp_path / ("n" * 300)), "longer than"),
    ):
        code, out, err = run(capsys, *args, "--output", target)
        assert code == 2 and out == "", (target, err)
        assert err.startswith("realquad: error:") and needle in err and err.count("\n") == 1
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)  # untouched
    assert _leftovers(tmp_path) == []


def test_new_file_follows_the_umask_and_old_file_keeps_its_mode(capsys, tmp_path: Path) -> None:
    target = tmp_path / "x.txt"
    old = os.umask(0o027)
    try:
        assert run(capsys, "pell", "61", "--output", str(target))[0] == 0
    finally:
        os.umask(old)
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640
    os.chmod(target, 0o600)
    assert run(capsys, "pell", "13", "--output", str(target))[0] == 0
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o600
    assert "x = 649" in target.read_text()  # OEIS A002350 at n = 13: replaced atomically
    assert _leftovers(tmp_path) == []


def test_a_symbolic_link_keeps_pointing_at_its_file(capsys, tmp_path: Path) -> None:
    real = tmp_path / "real.txt"
    real.write_text("old\n")
    link = tmp_path / "link.txt"
    link.symlink_to(real)
    assert run(capsys, "pell", "61", "--output", str(link))[0] == 0
    assert link.is_symlink() and "x = 1766319049" in real.read_text()  # OEIS A002350 at 61
