"""The demo notebook runs headless from top to bottom, teaches the fix, and ends with a passing design.

As shipped the demo fails its keyseat check; the notebook must say so from the solver's own
numbers, size the failing segment as ``workbench size`` does, apply that size in the panel and
end with every check passing, leaving that case as the output the calculation record reads.

Outside checks: τ_nom = 16·T/(π·d³) for a solid round (Gere & Goodno, *Mechanics of Materials*,
8th ed., §3.3, eq. 3-13); Kts = 3.0 for an end-milled keyseat, first-iteration estimate
(Shigley's *Mechanical Engineering Design*, 10th ed., Table 7-1); allowable shear Sy/√3/FoS by
the distortion-energy theory (Shigley, 10th ed., §5-5).
"""

from __future__ import annotations

import copy
import json
import math
import shutil
from pathlib import Path
from typing import Any

import nbformat
import pytest
from nbclient import NotebookClient

from workbench.cli import main
from workbench.design.caution import CAUTION
from workbench.design.checks import CHECK_QUANTITIES, run_checks
from workbench.panel import CASE_MIME_TYPE
from workbench.solver.analysis import solve
from workbench.solver.io import load_case, parse_case

NOTEBOOKS = Path(__file__).resolve().parents[1] / "notebooks"
KEYSEAT_KTS = 3.0  # Shigley, 10th ed., Table 7-1 (end-milled keyseat, first iteration)


@pytest.fixture(scope="module")
def executed(tmp_path_factory: pytest.TempPathFactory) -> tuple[nbformat.NotebookNode, Path]:
    """The demo notebook run top to bottom in a kernel, in a folder of its own."""
    folder = tmp_path_factory.mktemp("demo")
    for name in ("demo.ipynb", "press_drive.json"):
        shutil.copy(NOTEBOOKS / name, folder / name)
    notebook = nbformat.read(folder / "demo.ipynb", as_version=4)
    client = NotebookClient(
        notebook,
        kernel_name="python3",
        store_widget_state=True,
        timeout=120,
        resources={"metadata": {"path": str(folder)}},
    )
    client.execute()
    return notebook, folder


def cell(notebook: nbformat.NotebookNode, cell_id: str) -> nbformat.NotebookNode:
    return next(c for c in notebook.cells if c.get("id") == cell_id)


def printed(notebook: nbformat.NotebookNode, cell_id: str) -> str:
    return "".join(output.get("text", "") for output in cell(notebook, cell_id).outputs)


def last_case(notebook: nbformat.NotebookNode) -> dict[str, Any]:
    """The last case output of the panel: the one the record exporter takes."""
    cases = [
        output["data"][CASE_MIME_TYPE]
        for c in notebook.cells
        if c.cell_type == "code"
        for output in c.outputs
        if CASE_MIME_TYPE in output.get("data", {})
    ]
    assert cases, "the panel must leave its case output"
    return json.loads(json.dumps(cases[-1]))


def verdict_lines(passes: bool, kind: str, shaft: str, segment: int, result: str, u: float) -> str:
    return (
        f"verdict: {'every check passes' if passes else 'SOME CHECKS FAIL'}\n"
        f"governing: {kind} on {shaft} segment {segment} in {result!r}, utilisation {u:.2f}\n"
    )


def test_demo_notebook_is_committed_without_outputs() -> None:
    notebook = nbformat.read(NOTEBOOKS / "demo.ipynb", as_version=4)
    for c in notebook.cells:
        if c.cell_type == "code":
            assert c.outputs == [] and c.execution_count is None


def test_demo_notebook_executes(executed: tuple[nbformat.NotebookNode, Path]) -> None:
    notebook, _ = executed
    outputs = [output for c in notebook.cells if c.cell_type == "code" for output in c.outputs]
    assert not [output for output in outputs if output.output_type == "error"]
    last_case(notebook)
    widgets = notebook.metadata["widgets"]["application/vnd.jupyter.widget-state+json"]["state"]
    assert any(state["model_name"] == "FigureModel" for state in widgets.values())


def test_the_notebook_states_the_failing_check(
    executed: tuple[nbformat.NotebookNode, Path],
) -> None:
    notebook, folder = executed
    words = " ".join(c.source for c in notebook.cells if c.cell_type == "markdown")
    assert "fails one check: the keyseat" in words and "Kts = 3" in words
    shipped = run_checks(solve(load_case(folder / "press_drive.json")))  # the file is not saved
    worst = shipped.governing
    assert worst is not None and not shipped.passes and worst.kind == "keyseat_stress"
    shown = printed(notebook, "verdict")
    expected = verdict_lines(
        False, worst.kind, worst.shaft, worst.segment or 0, worst.result, worst.utilisation
    )
    assert shown.startswith(expected)
    # Kts printed from the two computed stresses, not typed in.
    assert f"Kts {KEYSEAT_KTS:.3g} × nominal" in shown
    assert "crosses 1 near" in printed(notebook, "sweep")


def test_the_notebook_ends_with_the_size_the_command_gives_and_every_check_passing(
    executed: tuple[nbformat.NotebookNode, Path], capsys: pytest.CaptureFixture[str]
) -> None:
    notebook, folder = executed
    capsys.readouterr()
    status = main(["size", str(folder / "press_drive.json"), "--segment", "auger:0", "--json"])
    sized = json.loads(capsys.readouterr().out)["segments"][0]
    assert status == 0 and sized["diameter_after"] > sized["diameter_before"]
    expected = json.loads((folder / "press_drive.json").read_text(encoding="utf-8"))
    auger = next(n for n, shaft in enumerate(expected["shafts"]) if shaft["id"] == "auger")
    expected = copy.deepcopy(expected)
    expected["shafts"][auger]["segments"][0]["section"]["diameter"] = sized["diameter_after"]
    final = parse_case(last_case(notebook))
    assert final == parse_case(expected)  # that one diameter changed, nothing else
    report = run_checks(solve(final))
    assert report.passes and all(check.passes for check in report.checks)
    worst = report.governing
    assert worst is not None
    shown = printed(notebook, "final")
    expected_lines = verdict_lines(
        True, worst.kind, worst.shaft, worst.segment or 0, worst.result, worst.utilisation
    )
    assert shown.startswith(expected_lines)
    assert CAUTION in shown


def test_the_final_keyseat_stress_is_the_handbook_peak_under_the_allowable(
    executed: tuple[nbformat.NotebookNode, Path],
) -> None:
    notebook, _ = executed
    final = parse_case(last_case(notebook))
    results = solve(final)
    report = run_checks(results)
    keyseat = next(
        c
        for c in report.checks
        if c.kind == "keyseat_stress" and c.shaft == "auger" and c.result == "jam, factored"
    )
    assert keyseat.kind in CHECK_QUANTITIES
    auger = results["jam, factored"].shafts["auger"]
    section = final.shaft("auger").segments[0].layers[0].section
    diameter = section.diameter  # m
    segment_end = final.shaft("auger").segments[0].length
    inside = auger.x <= segment_end
    torque = float(abs(auger.torque[inside]).max())  # N·m
    nominal = 16.0 * torque / (math.pi * diameter**3)  # Gere & Goodno eq. 3-13
    assert keyseat.value == pytest.approx(KEYSEAT_KTS * nominal, rel=1e-9)
    yield_strength = final.shaft("auger").segments[0].layers[0].material.yield_strength
    allowable = yield_strength / math.sqrt(3.0) / final.design.factor_of_safety
    assert keyseat.limit == pytest.approx(allowable, rel=1e-9)
    assert keyseat.value < allowable
