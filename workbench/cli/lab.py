"""The ``workbench lab`` command: JupyterLab on the demo notebook.

In a source checkout it opens ``notebooks/`` as it is. Installed from a wheel, the demo notebook
and its case ship inside the package (``workbench/notebooks/demo.ipynb``,
``workbench/cases/press_drive.json``), where they are not meant to be edited: the command copies
them into a working folder (``workbench-demo`` in the current folder, or ``--folder``) and opens
that; files already there are kept as they are, so edits and saved cases survive the next run.
"""

from __future__ import annotations

import argparse
import os
import shutil
import signal
import subprocess
import sys
import threading
from pathlib import Path
from typing import Any

#: The package folder (``workbench/``).
PACKAGE = Path(__file__).resolve().parents[1]
#: The demo notebooks (a scenario of our own), beside the package in a source checkout.
NOTEBOOKS = PACKAGE.parent / "notebooks"
#: The demo notebook and its case as the wheel ships them (see pyproject.toml, force-include).
SHIPPED_DEMO = (PACKAGE / "notebooks" / "demo.ipynb", PACKAGE / "cases" / "press_drive.json")
#: The working folder made for the demo when run outside a checkout (in the current folder).
WORKING_FOLDER = "workbench-demo"


def in_checkout() -> bool:
    """Whether this package runs from a source checkout (its ``notebooks/`` beside it)."""
    return (NOTEBOOKS / "demo.ipynb").is_file() and (PACKAGE.parent / "pyproject.toml").is_file()


def demo_folder(folder: str | None) -> Path:
    """The folder to open: ``folder``; else the checkout's ``notebooks/``; else a working copy.

    Outside a checkout the shipped demo notebook and case are copied into ``folder`` (default
    :data:`WORKING_FOLDER` in the current folder) unless a file of that name is already there.
    """
    if folder is None and in_checkout():
        return NOTEBOOKS
    target = Path(folder or WORKING_FOLDER).resolve()
    if folder is not None and in_checkout():
        return target
    if not all(path.is_file() for path in SHIPPED_DEMO):
        return target
    target.mkdir(parents=True, exist_ok=True)
    for source in SHIPPED_DEMO:
        if not (target / source.name).exists():
            shutil.copyfile(source, target / source.name)
            sys.stderr.write(f"copied {source.name} into {target}\n")
    return target


#: Flags that keep JupyterLab from reaching the network (no news, no update checks).
OFFLINE_FLAGS = (
    "--LabApp.news_url=None",
    "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
)


def lab_command(folder: Path, notebook: str = "demo.ipynb", port: int | None = None) -> list[str]:
    """The command line that starts JupyterLab on ``folder`` with ``notebook`` open."""
    command = [sys.executable, "-m", "jupyterlab", f"--ServerApp.root_dir={folder}", *OFFLINE_FLAGS]
    if port is not None:
        command.append(f"--port={port}")
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        command.append("--allow-root")
    command.append(str(folder / notebook))
    return command


def _command_lab(arguments: argparse.Namespace) -> int:
    try:
        folder = demo_folder(arguments.folder)
    except OSError as error:
        sys.stderr.write(f"--folder: cannot make the working folder: {error.strerror or error}\n")
        return 2
    if not (folder / arguments.notebook).is_file():
        sys.stderr.write(f"{folder / arguments.notebook}: no such notebook\n")
        return 2
    return run_until_stopped(lab_command(folder, arguments.notebook, arguments.port))


def run_until_stopped(command: list[str]) -> int:
    """Run ``command``; when this process is told to stop (SIGTERM, SIGHUP), stop it too.

    Without this a SIGTERM ends ``workbench lab`` at once and leaves JupyterLab running with
    no parent. The child gets SIGTERM, then SIGKILL if it has not ended within 10 s; the exit
    status is then 128 + the signal's number, as a shell reports it.
    """
    child = subprocess.Popen(command)
    received: list[int] = []

    def stop(signal_number: int, _frame: object) -> None:
        # Only signal here: the main thread is inside child.wait() and holds its lock.
        received.append(signal_number)
        child.terminate()
        timer = threading.Timer(10.0, child.kill)
        timer.daemon = True
        timer.start()

    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), stop)
    try:
        status = child.wait()
    except KeyboardInterrupt:  # Ctrl-C reaches the child too (same process group)
        status = child.wait()
    return 128 + received[0] if received else status


def register(commands: Any) -> None:
    """Add the ``lab`` sub-command to an argparse sub-parsers object."""
    parser = commands.add_parser("lab", help="open JupyterLab on the demo notebook")
    parser.add_argument(
        "--folder",
        default=None,
        help="notebooks folder (default: the checkout's notebooks/, else a working copy of the "
        f"demo in ./{WORKING_FOLDER})",
    )
    parser.add_argument("--notebook", default="demo.ipynb", help="notebook to open")
    parser.add_argument("--port", type=int, default=None, help="port for the server")
    parser.set_defaults(run=_command_lab)
