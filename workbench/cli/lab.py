"""The ``workbench lab`` command: JupyterLab on the notebooks folder, opening the demo notebook."""

from __future__ import annotations

import argparse
import os
import signal
import subprocess
import sys
import threading
from pathlib import Path
from typing import Any

#: The demo notebooks (a scenario of our own), beside the package in a source checkout.
NOTEBOOKS = Path(__file__).resolve().parents[2] / "notebooks"

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
    folder = Path(arguments.folder).resolve()
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
    parser.add_argument("--folder", default=str(NOTEBOOKS), help="notebooks folder")
    parser.add_argument("--notebook", default="demo.ipynb", help="notebook to open")
    parser.add_argument("--port", type=int, default=None, help="port for the server")
    parser.set_defaults(run=_command_lab)
