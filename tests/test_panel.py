"""The workbench panel in plain pytest: set values as a user would, check what the panel shows.

Expected numbers come from the solver itself run on the same edited case (the panel must show
exactly what `parse_case` → `solve` → `run_checks` give), and from closed forms where a case is
simple enough: a solid round shaft fixed at one end with an end torque T has
τ_max = 16·T/(π·d³) and θ(L) = T·L/(G·J), J = π·d⁴/32 (Gere & Goodno, *Mechanics of Materials*,
8th ed., §3.3, eqs. 3-13 and 3-17).
"""

from __future__ import annotations

import json
import math
import shutil
from pathlib import Path

import numpy as np
import pytest

from workbench.panel import CASE_MIME_TYPE, Workbench
from workbench.panel.sweep import SweepRequest, run_sweep
from workbench.solver.analysis import solve
from workbench.solver.checks import CAUTION
from workbench.solver.io import load_case, parse_case

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "notebooks" / "press_drive.json"


def simple_case(diameter: float = 40.0, torque: float = 500.0) -> dict:
    return {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": {"shear_modulus": 80000, "yield_strength": 400}},
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {
                        "length": 1000,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": diameter},
                    }
                ],
            }
        ],
        "supports": [{"shaft": "s", "x": 0, "kind": "fixed"}],
        "load_cases": [{"name": "drive", "torques": [{"shaft": "s", "x": 1000, "torque": torque}]}],
    }


def field(panel: Workbench, path: str):
    return panel._fields[path][0]


@pytest.fixture
def panel(tmp_path: Path) -> Workbench:
    target = tmp_path / "press_drive.json"
    shutil.copy(CASE, target)
    return Workbench.open(target, show=False)


def test_closed_form_end_torque() -> None:
    panel = Workbench(simple_case())
    d, T, L, G = 0.040, 500.0, 1.0, 80e9
    tau = 16 * T / (math.pi * d**3) / 1e6
    theta = math.degrees(T * L / (G * math.pi * d**4 / 32))
    assert max(panel.charts.stress.now.y) == pytest.approx(tau, rel=1e-9)
    assert max(abs(panel.charts.angle.now.y)) == pytest.approx(theta, rel=1e-9)
    # Editing the diameter moves the curves to the new closed form.
    field(panel, "shafts[0].segments[0].section.diameter").value = 50.0
    assert max(panel.charts.stress.now.y) == pytest.approx(
        16 * T / (math.pi * 0.05**3) / 1e6, rel=1e-9
    )


def test_diameter_edit_redraws_every_chart(panel: Workbench) -> None:
    before = {
        name: np.array(chart.now.y)
        for name, chart in (
            ("T", panel.charts.torque),
            ("θ", panel.charts.angle),
            ("τ", panel.charts.stress),
        )
    }
    bars = np.array(panel.charts.bars.y)
    table = panel.check_table.value
    outline = np.array(panel.charts.segments.y)
    outer = field(panel, "shafts[0].segments[1].section.outer_diameter")
    new_outer = outer.value + 12.0
    outer.value = new_outer
    expected = solve(parse_case(panel.document))
    row = expected.index(panel.result.value)
    window = expected._window(0)
    assert np.allclose(panel.charts.torque.now.y, expected.torque[row, window])
    assert np.allclose(panel.charts.stress.now.y, expected.shear_stress[row, window] / 1e6)
    assert not np.allclose(panel.charts.stress.now.y, before["τ"])
    assert not np.allclose(panel.charts.angle.now.y, before["θ"])
    assert not np.allclose(panel.charts.bars.y, bars)
    assert panel.check_table.value != table
    assert np.max(panel.charts.segments.y) == pytest.approx(new_outer / 2)
    assert not np.allclose(panel.charts.segments.y, outline)


def test_slider_and_text_stay_in_step(panel: Workbench) -> None:
    path = "shafts[0].segments[0].section.diameter"
    panel.dimension.value = ("shafts", 0, "segments", 0, "section", "diameter")
    panel.diameter_slider.value = 52.0
    assert field(panel, path).value == 52.0
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 52


def test_bad_input_message_beside_field_and_stale(panel: Workbench) -> None:
    good = np.array(panel.charts.stress.now.y)
    inner = field(panel, "shafts[0].segments[1].section.inner_diameter")
    inner.value = 80.0
    assert panel.stale
    message = panel._messages["shafts[0].segments[1]"].value
    assert "inner_diameter" in message and "80" in message and "mm" in message
    assert "wb-stale" in panel.charts_box._dom_classes
    assert "wb-bad" in inner._dom_classes
    assert np.allclose(panel.charts.stress.now.y, good)  # the last good results stay
    assert panel.document["shafts"][0]["segments"][1]["section"]["inner_diameter"] == 80
    assert inner.value == 80.0  # nothing typed is thrown away
    inner.value = 25.0
    assert not panel.stale
    assert panel._messages["shafts[0].segments[1]"].value == ""
    assert "wb-bad" not in inner._dom_classes


def test_torque_drag_moves_the_jump(panel: Workbench) -> None:
    panel.result.value = "jam"
    panel.case_picker.value = 1
    x_slider = panel._fields["load_cases[1].torques[0].x"][0]
    x_slider.value = 400.0
    x = np.array(panel.charts.torque.now.x)
    torque = np.array(panel.charts.torque.now.y)
    jumps = x[1:][np.abs(np.diff(torque)) > 100]
    assert 400.0 in jumps
    assert list(panel.charts.torques.x) == [400.0]


def test_add_support_and_switch_kind(panel: Workbench) -> None:
    count = len(panel.document["supports"])
    panel.supports_box.children[-1].children[0].click()
    assert len(panel.document["supports"]) == count + 1
    assert not panel.stale
    assert len(panel.results.reactions[0]) == count + 1
    assert len(panel.charts.fixed.x) == 2  # x = 0 and the new one at the end
    panel._set_support_kind(count, "spring")
    assert panel.document["supports"][count]["kind"] == "spring"
    assert len(panel.charts.spring.x) == 2


def test_switch_result_and_units(panel: Workbench) -> None:
    panel.result.value = "jam, factored"
    jam = parse_case(panel.document)
    expected = solve(jam)
    row = expected.index("jam, factored")
    assert np.allclose(panel.charts.torque.now.y, expected.torque[row, expected._window(0)])
    si_stress = max(panel.charts.stress.now.y)
    panel.units.value = "us"
    assert panel.document["units"]["length"] == "in"
    # 1 psi = 6894.757 Pa (NIST SP 811, 2008, appendix B.9).
    assert max(panel.charts.stress.now.y) == pytest.approx(
        si_stress * 1e6 / 6894.757293168, rel=1e-6
    )
    assert "psi" in panel.check_table.value
    assert panel.charts.elevation.axes[0].label == "x [in]"


def test_structural_segment_edits(panel: Workbench) -> None:
    segments = panel.document["shafts"][0]["segments"]
    first = json.dumps(segments[0])
    panel._move_segment(0, 1)
    assert json.dumps(panel.document["shafts"][0]["segments"][1]) == first
    panel._add_segment(0)
    assert len(panel.document["shafts"][0]["segments"]) == 5
    assert len(panel.charts.bars.y) == 5
    panel._set_shape(("shafts", 0, "segments", 4), "solid")
    assert panel.document["shafts"][0]["segments"][4]["section"]["shape"] == "solid"
    panel._remove(("shafts", 0, "segments"), 4)
    assert len(panel.charts.bars.y) == 4


def test_baseline_overlay_and_difference(panel: Workbench) -> None:
    panel.pin_baseline()
    assert panel.charts.stress.baseline.visible
    base = np.array(panel.charts.stress.baseline.y)
    diameter = field(panel, "shafts[0].segments[0].section.diameter")
    diameter.value += 11.0
    assert np.allclose(panel.charts.stress.baseline.y, base)
    assert not np.allclose(panel.charts.stress.now.y[: len(base)], base)
    assert "baseline" in panel.difference.value and "%" in panel.difference.value
    panel.clear_baseline()
    assert not panel.charts.stress.baseline.visible


def test_sweep_matches_point_solves(panel: Workbench) -> None:
    path = ("shafts", 0, "segments", 0, "section", "diameter")
    values = (40.0, 50.0, 60.0)
    request = SweepRequest(path, values, "max_shear_stress", "jam")
    swept = run_sweep(panel.document, request)
    for value, result in zip(values, swept, strict=True):
        document = json.loads(json.dumps(panel.document))
        document["shafts"][0]["segments"][0]["section"]["diameter"] = value
        results = solve(parse_case(document))
        assert result == pytest.approx(
            results["jam"].shafts["auger"].shear_stress.max() / 1e6
            if results["jam"].shafts["auger"].shear_stress.max()
            > results["jam"].shafts["feeder"].shear_stress.max()
            else results["jam"].shafts["feeder"].shear_stress.max() / 1e6
        )
    # A torque sweep goes through superposition: it must equal point solves too.
    torque_path = ("load_cases", 1, "torques", 0, "torque")
    request = SweepRequest(torque_path, (1000.0, 2000.0), "governing_utilisation", "jam")
    swept = run_sweep(panel.document, request)
    for value, result in zip((1000.0, 2000.0), swept, strict=True):
        document = json.loads(json.dumps(panel.document))
        document["load_cases"][1]["torques"][0]["torque"] = value
        from workbench.solver.checks import run_checks

        assert result == pytest.approx(
            run_checks(solve(parse_case(document))).governing.utilisation
        )


def test_sweep_widget_progress_and_cancel(panel: Workbench) -> None:
    panel.sweep_input.value = ("shafts", 0, "segments", 0, "section", "diameter")
    panel.sweep_from.value, panel.sweep_to.value, panel.sweep_points.value = 40.0, 60.0, 300
    panel.start_sweep()
    assert panel.sweep_progress.value == 300
    assert len(panel.sweep_line.y) == 300
    assert panel.sweep_line.y[0] > panel.sweep_line.y[-1]  # a thicker shaft, less stress
    panel.sweep_progress.observe(lambda change: panel.cancel_sweep(), "value")
    panel.start_sweep()
    assert panel.sweep_progress.value < 300
    assert "cancelled" in panel.sweep_message.value


def test_save_and_reopen(panel: Workbench, tmp_path: Path) -> None:
    field(panel, "shafts[0].segments[0].section.diameter").value = 48.0
    panel.save()
    again = Workbench.open(panel.path, show=False)
    assert again.document["shafts"][0]["segments"][0]["section"]["diameter"] == 48
    assert load_case(panel.path) == panel.model
    # Saving a case with errors is refused and the file is left as it was.
    field(panel, "shafts[0].segments[0].section.diameter").value = -1.0
    panel._on_save(None)
    assert "errors" in panel.save_message.value
    assert load_case(panel.path).shafts[0].segments[0].layers[0].section.diameter == 0.048


def test_case_output_for_the_record(panel: Workbench) -> None:
    assert CASE_MIME_TYPE == "application/vnd.workbench.case+json"
    bundle = panel.case_bundle
    assert set(bundle) == {CASE_MIME_TYPE, "text/plain"}
    field(panel, "shafts[0].segments[0].section.diameter").value = 47.0
    case = panel.case_bundle[CASE_MIME_TYPE]
    assert case["shafts"][0]["segments"][0]["section"]["diameter"] == 47
    assert parse_case(case) == panel.model


def test_caution_and_mechanism_message(panel: Workbench) -> None:
    assert CAUTION in panel.caution.value
    for _ in range(len(panel.document["supports"])):
        panel._remove(("supports",), 0)
    assert panel.stale
    assert "free to spin" in panel._messages["supports"].value
