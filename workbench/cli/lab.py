"""The ``workbench lab`` command: JupyterLab on the notebooks folder, opening the demo notebook."""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
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
    return subprocess.call(lab_command(folder, arguments.notebook, arguments.port))


def register(commands: Any) -> None:
    """Add the ``lab`` sub-command to an argparse sub-parsers object."""
    parser = commands.add_parser("lab", help="open JupyterLab on the demo notebook")
    parser.add_argument("--folder", default=str(NOTEBOOKS), help="notebooks folder")
    parser.add_argument("--notebook", default="demo.ipynb", help="notebook to open")
    parser.add_argument("--port", type=int, default=None, help="port for the server")
    parser.set_defaults(run=_command_lab)
