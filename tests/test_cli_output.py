"""Output files of the command line: a bad ``-o`` is one line naming the option, exit 2.

Regression tests for writing into a missing folder, onto a folder, and into a file the system
refuses, for every command that writes a file (``size``, ``export``, ``package``).
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from workbench.cli import main
from workbench.cli.solve import DEMO_CASE

NOTEBOOK = Path(__file__).resolve().parents[1] / "notebooks" / "demo.ipynb"

COMMANDS = {
    "size": ["size", str(DEMO_CASE)],
    "export": ["export", str(NOTEBOOK), "--no-execute"],
    "package": ["package", str(NOTEBOOK)],
}


def _one_line(capsys: pytest.CaptureFixture[str]) -> str:
    lines = capsys.readouterr().err.splitlines()
    assert len(lines) == 1, lines
    assert len(lines[0]) <= 200
    return lines[0]


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_output_into_a_missing_folder(
    command: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    target = tmp_path / "no such folder" / "out.file"
    assert main([*COMMANDS[command], "-o", str(target)]) == 2
    line = _one_line(capsys)
    assert line.startswith("-o: the folder ") and line.endswith("does not exist")
    assert not target.parent.exists()


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_output_onto_a_folder(
    command: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main([*COMMANDS[command], "-o", str(tmp_path)]) == 2
    assert _one_line(capsys).endswith("is a folder; give the name of a file")


def test_output_under_a_file_taken_for_a_folder(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    plain = tmp_path / "plain.txt"
    plain.write_text("x", encoding="utf-8")
    assert main([*COMMANDS["size"], "-o", str(plain / "sized.json")]) == 2
    assert _one_line(capsys).endswith("is not a folder")


def test_a_refused_write_is_bad_input_not_a_traceback(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    """A write the system refuses (here: the file system says it is read-only) is one line."""
    import workbench.case.save as case_save

    def refuse(*_: object, **__: object) -> None:
        raise OSError(30, os.strerror(30))  # EROFS

    monkeypatch.setattr(case_save, "write_json_atomic", refuse)
    assert main([*COMMANDS["size"], "-o", str(tmp_path / "sized.json")]) == 2
    line = _one_line(capsys)
    assert line.startswith("-o: cannot write ")
    assert line.endswith("sized.json: Read-only file system")
