"""Files written whole or not at all, and the temporaries a killed writer left behind.

:func:`atomic_file` writes into a hidden temporary in the target's folder, forces it to disk and
renames it over the target, so a reader sees the old file or the new one, never half of one. A
writer killed before the rename (SIGKILL, a power cut) cannot remove its temporary, which holds
up to a whole file; the next write of the same target removes such leftovers.

A temporary is named ``.{target}.{host}-{pid}.{random}.tmp`` (``host``: 8 hex digits of a hash of
the machine's name), so that a later writer can tell whether its writer still runs. It is
removed only when no process can still be writing it:

* written on this machine by a process that no longer exists (``os.kill(pid, 0)`` finds none);
  a live process, or one this user may not signal, keeps its file, even after a pid is reused;
* written on another machine sharing the folder, or by a version that put no pid in the name
  (``.{target}.{random}.tmp``), when nothing has been written to it for :data:`STALE_AFTER`
  seconds: a live writer writes without pause from the temporary's creation to its rename.
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import re
import socket
import tempfile
import time
from collections.abc import Iterator
from pathlib import Path
from typing import BinaryIO

__all__ = ["STALE_AFTER", "atomic_file", "remove_stale_temporaries", "temporary_prefix"]

#: Seconds a temporary must lie untouched before a writer that cannot be asked is taken as gone.
STALE_AFTER = 600.0
#: Characters of the target's name kept in its temporaries' names (names are ≤ 255 bytes).
_NAME_KEPT = 200
#: The machine's tag in temporaries' names.
_HOST = hashlib.sha256(socket.gethostname().encode("utf-8", "replace")).hexdigest()[:8]


def temporary_prefix(path: Path, pid: int | None = None, host: str = _HOST) -> str:
    """``.{target}.{host}-{pid}.``: how this process's temporaries of ``path`` begin."""
    return f".{path.name[:_NAME_KEPT]}.{host}-{os.getpid() if pid is None else pid}."


def _pattern(path: Path) -> re.Pattern[str]:
    """A temporary of ``path``: with host and pid, or (an earlier writer's) without."""
    name = re.escape(f".{path.name[:_NAME_KEPT]}.")
    return re.compile(name + r"(?:(?P<host>[0-9a-f]{8})-(?P<pid>[0-9]{1,10})\.)?[a-z0-9_]{8}\.tmp")


def _process_gone(pid: int) -> bool:
    """Whether no process of this number exists on this machine (one we may not signal exists)."""
    if pid <= 0:
        return False  # 0 and negatives name process groups, not a writer
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return True
    except OSError:  # PermissionError: it exists, under another user; else we cannot tell
        return False
    return False


def _stale(found: re.Match[str], modified: float, now: float) -> bool:
    host, pid = found["host"], found["pid"]
    if host == _HOST and pid is not None:
        return _process_gone(int(pid))
    return now - modified >= STALE_AFTER


def remove_stale_temporaries(path: str | os.PathLike[str]) -> list[Path]:
    """Remove the temporaries of ``path`` no process can still be writing; return them.

    Parameters
    ----------
    path
        The target file (its folder is searched for temporaries of its name only).

    Notes
    -----
    Best effort: a temporary that cannot be examined or removed (gone meanwhile, no
    permission) is left as it is; a write never fails for the leftovers of another.
    """
    target = Path(path)
    pattern, now = _pattern(target), time.time()
    removed: list[Path] = []
    try:
        entries = list(os.scandir(target.parent))
    except OSError:
        return removed
    for entry in entries:
        found = pattern.fullmatch(entry.name)
        if found is None:
            continue
        try:
            if not entry.is_file(follow_symlinks=False):
                continue
            if _stale(found, entry.stat(follow_symlinks=False).st_mtime, now):
                os.unlink(entry.path)
                removed.append(Path(entry.path))
        except OSError:
            continue
    return removed


@contextlib.contextmanager
def atomic_file(path: str | os.PathLike[str]) -> Iterator[BinaryIO]:
    """A binary stream whose bytes replace ``path`` whole when the block ends without error.

    The temporary lies in the target's folder (a rename within one file system is atomic), is
    forced to disk before the rename and takes the mode of the file it replaces. On an error the
    temporary is removed and the target left as it was. Stale temporaries of the same target
    (:func:`remove_stale_temporaries`) are removed first.
    """
    target = Path(path)
    remove_stale_temporaries(target)
    handle, temporary = tempfile.mkstemp(
        prefix=temporary_prefix(target), suffix=".tmp", dir=target.parent
    )
    try:
        with os.fdopen(handle, "wb") as stream:
            yield stream
            stream.flush()
            os.fsync(stream.fileno())
        if target.exists():
            os.chmod(temporary, target.stat().st_mode & 0o777)
        os.replace(temporary, target)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
