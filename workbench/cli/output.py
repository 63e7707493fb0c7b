"""Output files of the command line: checked before any work, written without tracebacks.

A missing folder, a folder given where a file is meant, or a write the system refuses is bad
input of the option that named the file: one line, exit status 2.
"""

from __future__ import annotations

import contextlib
import os
from collections.abc import Iterator
from pathlib import Path

from workbench.case.errors import InputError

#: Longest path quoted in a message; longer ones are cut in the middle.
_QUOTED_PATH = 60


def _quoted(path: Path) -> str:
    text = str(path)
    if len(text) <= _QUOTED_PATH:
        return text
    half = (_QUOTED_PATH - 3) // 2
    return f"{text[:half]}...{text[-half:]}"


def output_file(text: str, option: str = "-o") -> Path:
    """The file an option names for writing, refused before any work if it cannot be written.

    Parameters
    ----------
    text
        The path as given on the command line.
    option
        The option that gave it, named in the message.

    Raises
    ------
    InputError
        The path is a folder, its folder does not exist or is not a folder, or it cannot be
        written to.
    """
    path = Path(text)
    if path.is_dir():
        raise InputError(option, f"{_quoted(path)} is a folder; give the name of a file")
    folder = path.parent
    if not folder.exists():
        raise InputError(option, f"the folder {_quoted(folder)} does not exist")
    if not folder.is_dir():
        raise InputError(option, f"{_quoted(folder)} is not a folder")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError(option, f"the folder {_quoted(folder)} is not writable")
    if path.exists() and not os.access(path, os.W_OK):
        raise InputError(option, f"{_quoted(path)} is not writable")
    return path


@contextlib.contextmanager
def writing(path: Path, option: str = "-o") -> Iterator[None]:
    """Turn a failed write to ``path`` (disk full, read-only file system) into bad input."""
    try:
        yield
    except OSError as error:
        reason = error.strerror or type(error).__name__
        raise InputError(option, f"cannot write {_quoted(path)}: {reason}") from None
