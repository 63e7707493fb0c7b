"""The demo notebook runs headless from top to bottom and leaves the case output for the record."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import nbformat
from nbclient import NotebookClient

from workbench.design.checks import CHECK_QUANTITIES
from workbench.panel import CASE_MIME_TYPE
from workbench.solver.io import load_case, parse_case

NOTEBOOKS = Path(__file__).resolve().parents[1] / "notebooks"


def test_demo_notebook_is_committed_without_outputs() -> None:
    notebook = nbformat.read(NOTEBOOKS / "demo.ipynb", as_version=4)
    for cell in notebook.cells:
        if cell.cell_type == "code":
            assert cell.outputs == [] and cell.execution_count is None


def test_demo_notebook_executes(tmp_path: Path) -> None:
    for name in ("demo.ipynb", "press_drive.json"):
        shutil.copy(NOTEBOOKS / name, tmp_path / name)
    notebook = nbformat.read(tmp_path / "demo.ipynb", as_version=4)
    client = NotebookClient(
        notebook,
        kernel_name="python3",
        store_widget_state=True,
        timeout=120,
        resources={"metadata": {"path": str(tmp_path)}},
    )
    client.execute()
    outputs = [
        output for cell in notebook.cells if cell.cell_type == "code" for output in cell.outputs
    ]
    assert not [output for output in outputs if output.output_type == "error"]
    cases = [
        output["data"][CASE_MIME_TYPE]
        for output in outputs
        if CASE_MIME_TYPE in output.get("data", {})
    ]
    assert cases, "the panel must leave its case output"
    assert parse_case(json.loads(json.dumps(cases[-1]))) == load_case(tmp_path / "press_drive.json")
    widgets = notebook.metadata["widgets"]["application/vnd.jupyter.widget-state+json"]["state"]
    assert any(state["model_name"] == "FigureModel" for state in widgets.values())
    printed = "".join(output.get("text", "") for output in outputs).split()
    kind, utilisation = printed[-2], float(printed[-1])
    assert kind in CHECK_QUANTITIES and utilisation > 0.0
