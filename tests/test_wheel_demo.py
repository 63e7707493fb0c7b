"""The wheel ships the demo notebook and its case, and ``workbench lab`` outside a checkout
copies them into a working folder.

The wheel is built from this source tree with hatchling (the project's build backend) and
unpacked into a scratch folder; the unpacked package is then imported from that folder, away
from the checkout, as an installed copy would be.
"""

from __future__ import annotations

import json
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def unpacked_wheel(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("wheel")
    subprocess.run(
        [sys.executable, "-m", "hatchling", "build", "-t", "wheel", "-d", str(out / "dist")],
        cwd=ROOT,
        check=True,
        capture_output=True,
        timeout=300,
    )
    (wheel,) = (out / "dist").glob("workbench-*.whl")
    site = out / "site"
    with zipfile.ZipFile(wheel) as archive:
        names = set(archive.namelist())
        assert {"workbench/notebooks/demo.ipynb", "workbench/cases/press_drive.json"} <= names
        archive.extractall(site)
    return site


def _run(site: Path, cwd: Path, code: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-c", code],
        cwd=cwd,
        env={"PYTHONPATH": str(site), "PATH": "/usr/bin:/bin", "HOME": str(cwd)},
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )


def test_lab_outside_a_checkout_copies_the_demo_into_a_working_folder(
    unpacked_wheel: Path, tmp_path: Path
) -> None:
    code = (
        "import workbench.cli.lab as lab, sys\n"
        "assert not lab.in_checkout(), lab.PACKAGE\n"
        "folder = lab.demo_folder(None)\n"
        "print(folder)\n"
        "print(lab.lab_command(folder)[-1])\n"
    )
    done = _run(unpacked_wheel, tmp_path, code)
    assert done.returncode == 0, done.stderr
    folder_line, notebook_line = done.stdout.splitlines()
    folder = Path(folder_line)
    assert folder == tmp_path / "workbench-demo"
    assert Path(notebook_line) == folder / "demo.ipynb"
    assert (folder / "demo.ipynb").read_bytes() == (ROOT / "notebooks" / "demo.ipynb").read_bytes()
    # The notebook opens the case by the name it ships under.
    assert '"press_drive.json"' in (folder / "demo.ipynb").read_text("utf-8").replace('\\"', '"')
    json.loads((folder / "press_drive.json").read_text("utf-8"))
    assert "copied demo.ipynb" in done.stderr
    # A second run keeps what the user changed.
    (folder / "press_drive.json").write_text('{"edited": true}', encoding="utf-8")
    again = _run(unpacked_wheel, tmp_path, code)
    assert again.returncode == 0, again.stderr
    assert (folder / "press_drive.json").read_text("utf-8") == '{"edited": true}'


def test_in_a_checkout_lab_opens_the_notebooks_folder() -> None:
    from workbench.cli import lab

    assert lab.in_checkout()
    assert lab.demo_folder(None) == ROOT / "notebooks"
