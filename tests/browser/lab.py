"""A private JupyterLab and a headless Chromium, for the browser tests and the benchmarks.

:func:`jupyter_lab` starts JupyterLab on 127.0.0.1 (a free port, a random token, config, runtime,
workspace and settings dirs in a scratch folder, the announcements plugin off, no news or update
checks) on a folder holding copies of the given files. :func:`chromium` opens the Debian
Chromium through Playwright (never ``playwright install``, which downloads).
:func:`open_and_run_all` opens a notebook in the page and runs all its cells.
"""

from __future__ import annotations

import os
import secrets
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from collections.abc import Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from workbench.record.pdf import CHROMIUM_FLAGS

ROOT = Path(__file__).resolve().parents[2]
CHROMIUM = "/usr/bin/chromium"
#: Chromium's switches: headless, offline, no sandbox or GPU (the ones the record prints with).
FLAGS = list(CHROMIUM_FLAGS)
#: Files the demo notebook needs beside it.
DEMO_FILES = (ROOT / "notebooks" / "demo.ipynb", ROOT / "notebooks" / "press_drive.json")


@dataclass(frozen=True)
class Lab:
    """A running JupyterLab: its address, token and the folder it serves."""

    base: str
    token: str
    folder: Path

    def notebook_url(self, name: str) -> str:
        """The address that opens notebook ``name`` alone (``?reset`` drops restored tabs)."""
        return f"{self.base}/lab/tree/{name}?reset&token={self.token}"


def free_port() -> int:
    """A TCP port free on 127.0.0.1 just now."""
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


@contextmanager
def jupyter_lab(
    scratch: Path, files: Iterable[Path] = DEMO_FILES, root: Path = ROOT
) -> Iterator[Lab]:
    """Run JupyterLab on ``scratch/notebooks`` (holding copies of ``files``) until the block ends.

    ``root``: the project tree whose ``workbench`` the kernels import (first on their path).
    """
    folder = scratch / "notebooks"
    folder.mkdir()
    for source in files:
        shutil.copy(source, folder / source.name)
    environment = dict(os.environ)
    for key, name in (
        ("JUPYTER_CONFIG_DIR", "config"),
        ("JUPYTER_RUNTIME_DIR", "runtime"),
        ("JUPYTERLAB_WORKSPACES_DIR", "workspaces"),
        ("JUPYTERLAB_SETTINGS_DIR", "settings"),
    ):
        (scratch / name).mkdir()
        environment[key] = str(scratch / name)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(root), environment.get("PYTHONPATH", "")) if part
    )
    subprocess.run(
        [
            sys.executable,
            "-m",
            "jupyter",
            "labextension",
            "disable",
            "@jupyterlab/apputils-extension:announcements",
        ],
        env=environment,
        check=True,
        capture_output=True,
    )
    port, token = free_port(), secrets.token_hex(16)
    server = subprocess.Popen(
        [
            sys.executable,
            "-m",
            "jupyterlab",
            "--no-browser",
            "--ip=127.0.0.1",
            f"--port={port}",
            f"--IdentityProvider.token={token}",
            "--allow-root",
            f"--ServerApp.root_dir={folder}",
            "--LabApp.news_url=None",
            "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
        ],
        env=environment,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 30
        while True:
            try:
                urllib.request.urlopen(f"{base}/api/status?token={token}", timeout=1)
                break
            except OSError:
                if time.monotonic() > deadline or server.poll() is not None:
                    raise
                time.sleep(0.3)
        yield Lab(base, token, folder)
    finally:
        server.terminate()
        try:
            server.wait(timeout=10)
        except subprocess.TimeoutExpired:
            server.kill()
            server.wait(timeout=10)


@contextmanager
def chromium(playwright: Any, profile: Path) -> Iterator[Any]:
    """A headless Chromium context (its profile in ``profile``), closed when the block ends."""
    context = playwright.chromium.launch_persistent_context(
        str(profile),
        executable_path=CHROMIUM,
        headless=True,
        args=FLAGS,
        viewport={"width": 1400, "height": 1000},
    )
    try:
        yield context
    finally:
        context.close()


def open_and_run_all(page: Any, lab: Lab, notebook: str = "demo.ipynb") -> None:
    """Open ``notebook``, wait for an idle kernel, run all cells and wait for the panel's charts."""
    page.goto(lab.notebook_url(notebook))
    page.get_by_text("Python 3 (ipykernel) | Idle").wait_for(timeout=30000)
    page.locator("li.lm-Menu-item, div.lm-MenuBar-itemLabel").get_by_text(
        "Run", exact=True
    ).first.click()
    page.locator("li.lm-Menu-item[data-command='runmenu:run-all']").click()
    page.locator(".wb-charts .bqplot.figure").first.wait_for(timeout=30000)
    page.locator(".wb-chart-stress path.line").last.wait_for(timeout=15000)
