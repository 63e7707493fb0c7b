"""The demo notebook in real JupyterLab (headless Debian Chromium): the panel renders and follows.

Starts a private JupyterLab on 127.0.0.1 (free port, token, temporary config and runtime dirs,
announcements off, no update checks), opens the demo notebook, runs all cells, changes a
diameter through the page and checks that a chart path and a result value change.
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
from collections.abc import Iterator
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
ARTIFACTS = ROOT / "test-artifacts"
CHROMIUM = "/usr/bin/chromium"
FLAGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


@pytest.fixture
def lab(tmp_path: Path) -> Iterator[tuple[str, str]]:
    folder = tmp_path / "notebooks"
    folder.mkdir()
    for name in ("demo.ipynb", "press_drive.json"):
        shutil.copy(ROOT / "notebooks" / name, folder / name)
    environment = dict(os.environ)
    for key, name in (
        ("JUPYTER_CONFIG_DIR", "config"),
        ("JUPYTER_RUNTIME_DIR", "runtime"),
        ("JUPYTERLAB_WORKSPACES_DIR", "workspaces"),
        ("JUPYTERLAB_SETTINGS_DIR", "settings"),
    ):
        (tmp_path / name).mkdir()
        environment[key] = str(tmp_path / name)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(ROOT), environment.get("PYTHONPATH", "")) if part
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
    port, token = _free_port(), secrets.token_hex(16)
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
        yield base, token
    finally:
        server.terminate()
        try:
            server.wait(timeout=10)
        except subprocess.TimeoutExpired:
            server.kill()


@pytest.mark.browser
def test_demo_notebook_in_lab(lab: tuple[str, str], tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    base, token = lab
    ARTIFACTS.mkdir(exist_ok=True)
    with sync_playwright() as playwright:
        context = playwright.chromium.launch_persistent_context(
            str(tmp_path / "browser"),
            executable_path=CHROMIUM,
            headless=True,
            args=FLAGS,
            viewport={"width": 1400, "height": 1000},
        )
        try:
            page = context.new_page()
            page.goto(f"{base}/lab/tree/demo.ipynb?reset&token={token}")
            page.get_by_text("Python 3 (ipykernel) | Idle").wait_for(timeout=30000)
            page.locator("li.lm-Menu-item, div.lm-MenuBar-itemLabel").get_by_text(
                "Run", exact=True
            ).first.click()
            page.locator("li.lm-Menu-item[data-command='runmenu:run-all']").click()
            figures = page.locator(".wb-charts .bqplot.figure")
            figures.first.wait_for(timeout=30000)
            assert figures.count() >= 5
            stress_path = page.locator(".wb-chart-stress path.line").last
            stress_path.wait_for(timeout=15000)
            value = page.locator(".wb-summary td.wb-value").nth(1)
            before_d, before_value = stress_path.get_attribute("d"), value.inner_text()
            entry = page.locator(".wb-panel .widget-text input").nth(1)  # first diameter
            entry.fill("80")
            entry.press("Enter")
            page.wait_for_function(
                "([selector, old]) => { const paths = document.querySelectorAll(selector);"
                " return paths.length && paths[paths.length - 1].getAttribute('d') !== old; }",
                arg=[".wb-chart-stress path.line", before_d],
                timeout=15000,
            )
            assert stress_path.get_attribute("d") != before_d
            page.wait_for_function(
                "([old]) => document.querySelectorAll('.wb-summary td.wb-value')[1]"
                ".innerText !== old",
                arg=[before_value],
                timeout=15000,
            )
            assert value.inner_text() != before_value
            page.screenshot(path=str(ARTIFACTS / "lab_panel.png"), full_page=True)
        finally:
            context.close()
