"""Saves are whole or absent, and a save killed midway leaves nothing behind for long.

A real writer process is stopped between writing its temporary and renaming it (its ``fsync``
blocks), then killed with SIGKILL: the target keeps its old bytes, the temporary of the full size
stays — and the next save of the same file removes it, while it never touches the temporary of
a writer that still runs, nor one of another file.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from workbench.case import files
from workbench.case.files import (
    STALE_AFTER,
    atomic_file,
    remove_stale_temporaries,
    temporary_prefix,
)
from workbench.case.save import write_json_atomic

ROOT = Path(__file__).resolve().parents[1]

#: A writer that stops after writing its temporary, before the rename (its fsync blocks).
STALLED_WRITER = textwrap.dedent(
    """
    import os, sys, time
    from workbench.case.save import write_json_atomic

    def stall(descriptor):
        sys.stdout.write("written\\n")
        sys.stdout.flush()
        time.sleep(600)

    os.fsync = stall
    write_json_atomic(sys.argv[1], {"title": "new", "padding": "x" * int(sys.argv[2])})
    """
)

PADDING = 4_000_000  # characters: a temporary of a sizeable case file


def _hidden(folder: Path) -> list[Path]:
    return sorted(path for path in folder.iterdir() if path.name.startswith("."))


def _start_stalled_writer(target: Path) -> subprocess.Popen[str]:
    environment = {**os.environ, "PYTHONPATH": str(ROOT)}
    writer = subprocess.Popen(
        [sys.executable, "-c", STALLED_WRITER, str(target), str(PADDING)],
        stdout=subprocess.PIPE,
        text=True,
        env=environment,
    )
    assert writer.stdout is not None
    assert writer.stdout.readline() == "written\n"  # its temporary is whole, not yet renamed
    return writer


def _dead_pid() -> int:
    """The number of a process that has ended (and been reaped)."""
    ended = subprocess.Popen([sys.executable, "-c", "pass"])
    ended.wait()
    return ended.pid


def _left_behind(target: Path, pid: int, host: str = files._HOST, age: float = 0.0) -> Path:
    """A temporary of ``target`` as a writer ``pid`` on ``host`` leaves it, ``age`` s old."""
    path = target.parent / f"{temporary_prefix(target, pid, host)}abcd1234.tmp"
    path.write_bytes(b"{" * 1000)
    stamp = time.time() - age
    os.utime(path, (stamp, stamp))
    return path


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL (POSIX)")
def test_a_save_killed_midway_is_cleaned_up_by_the_next_save(tmp_path):
    target = tmp_path / "case.json"
    write_json_atomic(target, {"title": "old"})
    writer = _start_stalled_writer(target)
    try:
        (temporary,) = _hidden(tmp_path)
        assert temporary.name.startswith(temporary_prefix(target, writer.pid))
        assert temporary.stat().st_size > PADDING
        # While its writer runs, no save removes its temporary.
        write_json_atomic(target, {"title": "meanwhile"})
        assert _hidden(tmp_path) == [temporary]
    finally:
        writer.send_signal(signal.SIGKILL)
        writer.wait()
        writer.stdout.close()  # type: ignore[union-attr]
    assert writer.returncode == -signal.SIGKILL
    assert json.loads(target.read_text("utf-8")) == {"title": "meanwhile"}  # never half written
    assert _hidden(tmp_path) == [temporary]  # a killed writer cannot clean up
    write_json_atomic(target, {"title": "next"})
    assert _hidden(tmp_path) == []
    assert json.loads(target.read_text("utf-8")) == {"title": "next"}


def test_only_the_target_s_own_stale_temporaries_are_removed(tmp_path):
    target, other = tmp_path / "case.json", tmp_path / "other.json"
    dead, alive = _dead_pid(), os.getppid()
    stale = _left_behind(target, dead)
    live = _left_behind(target, alive, age=10 * STALE_AFTER)  # old, but its writer runs
    not_ours = _left_behind(other, dead)
    assert remove_stale_temporaries(target) == [stale]
    assert sorted(_hidden(tmp_path)) == sorted([live, not_ours])


def test_temporaries_whose_writer_cannot_be_asked_go_when_untouched_long(tmp_path):
    target = tmp_path / "case.json"
    foreign_fresh = _left_behind(target, 4321, host="0badf00d", age=STALE_AFTER / 2)
    foreign_old = _left_behind(target, 4322, host="0badf00d", age=STALE_AFTER + 60)
    without_pid_old = tmp_path / ".case.json.k2j4h6g8.tmp"  # an earlier version's naming
    without_pid_old.write_bytes(b"{")
    stamp = time.time() - STALE_AFTER - 60
    os.utime(without_pid_old, (stamp, stamp))
    assert foreign_old.exists() and without_pid_old.exists()
    write_json_atomic(target, {"title": "saved"})
    assert _hidden(tmp_path) == [foreign_fresh]


def test_a_failed_write_leaves_the_target_and_no_temporary(tmp_path):
    target = tmp_path / "case.json"
    target.write_text("old", "utf-8")
    with pytest.raises(RuntimeError), atomic_file(target) as stream:
        stream.write(b"half")
        raise RuntimeError("disk full")
    assert target.read_text("utf-8") == "old"
    assert _hidden(tmp_path) == []


def test_a_save_keeps_the_mode_of_the_file_it_replaces(tmp_path):
    target = tmp_path / "case.json"
    target.write_text("{}", "utf-8")
    target.chmod(0o640)
    write_json_atomic(target, {"title": "saved"})
    assert target.stat().st_mode & 0o777 == 0o640
