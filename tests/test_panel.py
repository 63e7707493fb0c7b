"""The workbench panel in plain pytest: set values as a user would, check what the panel shows.

Expected numbers come from the solver itself run on the same edited case (the panel must show
exactly what `parse_case` → `solve` → `run_checks` give), and from closed forms where a case is
simple enough: a solid round shaft fixed at one end with an end torque T has
τ_max = 16·T/(π·d³) and θ(L) = T·L/(G·J), J = π·d⁴/32 (Gere & Goodno, *Mechanics of Materials*,
8th ed., §3.3, eqs. 3-13 and 3-17).
"""

from __future__ import annotations

import asyncio
import html
import json
import math
import shutil
from pathlib import Path

import ipywidgets as w
import numpy as np
import pytest

from workbench.panel import CASE_MIME_TYPE, Workbench
from workbench.panel.document import get_at, normal_field, parse_path, plain_words
from workbench.panel.form import clean_number
from workbench.panel.sweep import run_sweep
from workbench.panel.sweep_request import SweepRequest
from workbench.solver.analysis import solve
from workbench.solver.checks import CAUTION, run_checks
from workbench.solver.io import load_case, parse_case
from workbench.solver.sections import SolidCircle

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
    return panel.form.fields[path][0]


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


def box_of(root: w.Widget, widget: w.Widget) -> w.Box | None:
    """The box whose children hold ``widget`` (depth-first through boxes and tabs)."""
    children = getattr(root, "children", ())
    if widget in children:
        return root
    for child in children:
        found = box_of(child, widget)
        if found is not None:
            return found
    return None


def message_beside(panel: Workbench, path: str) -> w.HTML:
    """The one message line in the same box as the field at ``path``, after the field."""
    entry = field(panel, path)
    box = box_of(panel.root, entry)
    assert box is not None, f"{path} is not shown in the panel"
    after = list(box.children)[list(box.children).index(entry) + 1 :]
    lines = [c for c in after if isinstance(c, w.HTML) and "wb-msg" in c._dom_classes]
    assert len(lines) == 1
    return lines[0]


def shown_messages(panel: Workbench) -> list[str]:
    return [line.value for lines in panel.form.messages.values() for line in lines if line.value]


def chart_data(panel: Workbench) -> dict[str, np.ndarray]:
    return {
        "torque": np.array(panel.charts.torque.now.y),
        "angle": np.array(panel.charts.angle.now.y),
        "stress": np.array(panel.charts.stress.now.y),
        "bars": np.array(panel.charts.bars.y),
        "outline": np.array(panel.charts.segments.y),
    }


def same_data(panel: Workbench, data: dict[str, np.ndarray]) -> bool:
    return all(np.array_equal(now, data[key]) for key, now in chart_data(panel).items())


# (field, bad value, words the message must hold). The rules are the solver's own (positive
# sizes, bore inside the tube, stations on the shaft, factor of safety at least 1); the message is
# shown in plain words: no snake_case names, units as written (N·m).
BAD_FIELDS = [
    (
        "shafts[0].segments[1].section.inner_diameter",
        80.0,
        ["must be smaller than outer diameter", "80 mm", "70 mm"],
    ),
    ("shafts[0].segments[0].length", -5.0, ["greater than zero", "-5 mm"]),
    ("shafts[0].segments[2].section.diameter_end", 0.0, ["greater than zero", "0 mm"]),
    ("supports[1].stiffness", -3.0, ["greater than zero", "-3 N·m/deg"]),
    ("supports[0].x", 5000.0, ["5000 mm is off shaft 'auger'", "0 to 900 mm"]),
    ("gears[0].a.radius", 0.0, ["greater than zero", "0 mm"]),
    ("design.factor_of_safety", 0.5, ["at least 1", "0.5"]),
    ("design.rotation_limits[0].end", 5000.0, ["5000 mm is off shaft 'auger'"]),
    ("design.rotation_limits[0].limit", -1.0, ["greater than zero", "-1 deg"]),
]


@pytest.mark.parametrize(("path", "bad", "words"), BAD_FIELDS, ids=[b[0] for b in BAD_FIELDS])
def test_bad_value_message_beside_its_field(
    panel: Workbench, path: str, bad: float, words: list[str]
) -> None:
    good_data = chart_data(panel)
    entry = field(panel, path)
    good = entry.value
    entry.value = bad
    assert panel.stale
    shown = message_beside(panel, path).value
    message = html.unescape(shown)
    for word in words:
        assert word in message, (word, message)
    assert "_" not in message
    assert shown_messages(panel) == [shown]  # beside that field and nowhere else
    assert "wb-bad" in entry._dom_classes
    assert "wb-stale" in panel.charts_box._dom_classes
    assert "Not solved" in panel.status.value
    assert same_data(panel, good_data)  # the last good results stay up
    assert get_at(panel.document, parse_path(path)) == clean_number(bad)  # nothing typed is lost
    assert entry.value == bad
    entry.value = good
    assert not panel.stale
    assert message_beside(panel, path).value == ""
    assert shown_messages(panel) == []
    assert "wb-bad" not in entry._dom_classes
    assert "wb-stale" not in panel.charts_box._dom_classes


def test_bad_value_on_slider_and_entry_of_one_field(panel: Workbench) -> None:
    path = "shafts[0].segments[0].section.diameter"
    panel.dimension.value = parse_path(path)
    good_data = chart_data(panel)
    field(panel, path).value = -2.0
    assert "greater than zero (-2 mm)" in message_beside(panel, path).value
    drag = panel.form.messages[path][-1]
    assert drag in panel.dimension_box.children  # the drag slider's own message line
    assert drag.value == message_beside(panel, path).value
    assert panel.diameter_slider.min <= -2.0 and panel.diameter_slider.value == -2.0
    assert same_data(panel, good_data)


def test_message_lands_on_the_row_when_no_field_shows_the_value(panel: Workbench) -> None:
    # Segment 3 is a two-layer section, edited in the case file: its row carries the message.
    layers = panel.document["shafts"][0]["segments"][3]["layers"]
    layers[1]["section"]["diameter"] = 0
    assert not panel.refresh()
    row = panel.form.messages["shafts[0].segments[3]"][0]
    assert "layer 1" in row.value and "greater than zero" in row.value
    assert shown_messages(panel) == [row.value]


def test_torque_drag_moves_the_jump(panel: Workbench) -> None:
    panel.result.value = "jam"
    panel.case_picker.value = 1
    x_slider = panel.form.fields["load_cases[1].torques[0].x"][0]
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
    panel.supports_editor.set_kind(count, "spring")
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
    panel.segments_editor.move(0, 1)
    assert json.dumps(panel.document["shafts"][0]["segments"][1]) == first
    panel.segments_editor.add(0)
    assert len(panel.document["shafts"][0]["segments"]) == 5
    assert len(panel.charts.bars.y) == 5
    panel.segments_editor.set_shape(("shafts", 0, "segments", 4), "solid")
    assert panel.document["shafts"][0]["segments"][4]["section"]["shape"] == "solid"
    panel.form.remove(("shafts", 0, "segments"), 4)
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
        governing = run_checks(solve(parse_case(document))).governing
        assert governing is not None
        assert result == pytest.approx(governing.utilisation)


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
    panel.save_button.click()
    assert "errors" in panel.save_message.value
    section = load_case(panel.path).shafts[0].segments[0].layers[0].section
    assert isinstance(section, SolidCircle) and section.diameter == 0.048


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
        panel.form.remove(("supports",), 0)
    assert panel.stale
    assert "free to spin" in panel.form.messages["supports"][0].value


def test_burst_in_a_kernel_loop_solves_once_in_the_last_state(panel: Workbench) -> None:
    # In a kernel an event loop runs: each edit is checked at once, the solve waits for the loop.
    entry = field(panel, "shafts[0].segments[0].section.diameter")
    count = panel.solve_count

    async def burst() -> int:
        for value in np.linspace(41.0, 59.0, 60):
            entry.value = float(value)
        during = panel.solve_count
        await asyncio.sleep(0)
        return during

    assert asyncio.run(burst()) == count  # no solve inside the burst
    assert panel.solve_count == count + 1
    assert np.max(panel.charts.segments.y[0]) == pytest.approx(59.0 / 2)
    expected = solve(parse_case(panel.document))
    row = expected.index(panel.result.value)
    assert np.allclose(
        panel.charts.stress.now.y, expected.shear_stress[row, expected._window(0)] / 1e6
    )
    assert not panel.stale and shown_messages(panel) == []


def test_burst_ending_on_a_bad_edit(panel: Workbench) -> None:
    path = "shafts[0].segments[0].section.diameter"
    entry = field(panel, path)
    count = panel.solve_count

    async def burst() -> str:
        for value in (45.0, 50.0, -1.0):
            entry.value = value
        at_once = message_beside(panel, path).value  # flagged as typed, before any solve
        await asyncio.sleep(0)
        return at_once

    assert "-1 mm" in asyncio.run(burst())
    assert panel.solve_count == count + 1  # the last valid edit (50) was solved, once
    assert panel.stale and "wb-stale" in panel.charts_box._dom_classes
    assert "greater than zero (-1 mm)" in message_beside(panel, path).value
    assert np.max(panel.charts.segments.y[0]) == pytest.approx(25.0)
    document = json.loads(json.dumps(panel.document))
    assert document["shafts"][0]["segments"][0]["section"]["diameter"] == -1
    document["shafts"][0]["segments"][0]["section"]["diameter"] = 50
    expected = solve(parse_case(document))
    row = expected.index(panel.result.value)
    assert np.allclose(
        panel.charts.stress.now.y, expected.shear_stress[row, expected._window(0)] / 1e6
    )


def test_burst_recovering_from_a_bad_edit(panel: Workbench) -> None:
    path = "shafts[0].segments[0].section.diameter"
    entry = field(panel, path)

    async def burst() -> None:
        entry.value = -1.0
        entry.value = 47.0
        await asyncio.sleep(0)

    asyncio.run(burst())
    assert not panel.stale and shown_messages(panel) == []
    assert "wb-stale" not in panel.charts_box._dom_classes
    assert np.max(panel.charts.segments.y[0]) == pytest.approx(23.5)


def test_reading_results_finishes_a_pending_edit(panel: Workbench) -> None:
    entry = field(panel, "shafts[0].segments[0].section.diameter")
    count = panel.solve_count

    async def edit_and_read() -> float:
        entry.value = 52.0
        results = panel.results  # settles: the last edit's results, in the same cell
        assert panel.solve_count == count + 1
        await asyncio.sleep(0)
        return float(results.shear_stress.max())

    largest = asyncio.run(edit_and_read())
    assert panel.solve_count == count + 1  # the loop's flush found nothing left to do
    assert largest == pytest.approx(solve(parse_case(panel.document)).shear_stress.max())


def test_rotation_limit_editor_closed_form() -> None:
    # θ(x) = T·x/(G·J) along a uniform shaft fixed at x = 0 (Gere & Goodno, 8th ed., eq. 3-17).
    panel = Workbench(simple_case())
    add = next(
        child
        for box in panel.design_box.children
        for child in getattr(box, "children", ())
        if isinstance(child, w.Button) and child.description == "add rotation limit"
    )
    add.click()
    assert panel.document["design"]["rotation_limits"] == [
        {"shaft": "s", "start": 0, "end": 1000, "limit": 1}
    ]
    T, G, J = 500.0, 80e9, math.pi * 0.040**4 / 32

    def rotation_check():
        (check,) = [c for c in panel.report.checks if c.kind == "rotation" and c.result == "drive"]
        return check

    assert rotation_check().value == pytest.approx(T * 1.0 / (G * J), rel=1e-9)
    assert rotation_check().limit == pytest.approx(math.radians(1.0), rel=1e-12)
    field(panel, "design.rotation_limits[0].limit").value = 2.0
    assert rotation_check().limit == pytest.approx(math.radians(2.0), rel=1e-12)
    field(panel, "design.rotation_limits[0].start").value = 400.0
    assert rotation_check().value == pytest.approx(T * 0.6 / (G * J), rel=1e-9)
    assert "rotation" in panel.check_table.value
    panel.design_editor.remove_rotation_limit(0)
    assert "rotation_limits" not in panel.document["design"]
    assert not [c for c in panel.report.checks if c.kind == "rotation"]


def test_plain_words_and_field_paths() -> None:
    # Wording rules of the panel's own (common practice, no source): names in words, quoted
    # ids and options untouched, units as written; a doubled list step folded.
    assert (
        plain_words("is required when shear_criterion is 'allowable'")
        == "is required when shear criterion is 'allowable'"
    )
    assert plain_words("unknown shaft 'my_shaft' (-3 N*m/deg)") == (
        "unknown shaft 'my_shaft' (-3 N·m/deg)"
    )
    assert normal_field("gears[0].gears[0].a.radius") == "gears[0].a.radius"
    assert normal_field("shafts[0].segments[1].length") == "shafts[0].segments[1].length"
    assert parse_path("design.rotation_limits[0].end") == ("design", "rotation_limits", 0, "end")


# --- vibration and fatigue ------------------------------------------------------------------


#: A spring support so soft (N·m/deg) that the two-disc system is free–free to 3e-6 of k.
SOFT = 1e-3


def two_disc_case(inertia_a: float = 0.2, inertia_b: float = 0.05) -> dict:
    """A massless solid shaft between two discs on a very soft spring (statics needs one)."""
    case = simple_case()
    case["units"]["inertia"] = "kg*m**2"
    case["supports"] = [{"shaft": "s", "x": 0, "kind": "spring", "stiffness": SOFT}]
    case["load_cases"] = [{"name": "none"}]
    case["discs"] = [
        {"shaft": "s", "x": 0, "inertia": inertia_a},
        {"shaft": "s", "x": 1000, "inertia": inertia_b},
    ]
    return case


def test_modes_chart_shows_natural_modes_of_the_case(panel: Workbench) -> None:
    from workbench.panel.modes_section import MODES_SHOWN, rpm
    from workbench.solver.modes import natural_modes

    panel.open_modes()
    expected = natural_modes(load_case(CASE))
    modes = panel.modes
    assert modes is not None
    np.testing.assert_array_equal(modes.angular_frequency, expected.angular_frequency)
    shown = min(MODES_SHOWN, len(expected))
    x_mm = expected.shape(0, "auger")[0] * 1e3
    lines = np.asarray(panel.charts_box and panel.modes_chart.flexible.y)
    for mode in range(shown):
        np.testing.assert_allclose(lines[mode], expected.shape(mode, "auger")[1], rtol=1e-12)
    np.testing.assert_allclose(panel.modes_chart.flexible.x[0], x_mm, rtol=1e-12)
    assert panel.modes_chart.flexible.labels[0] == f"mode 1: {expected.frequency[0]:.4g} Hz"
    np.testing.assert_allclose(
        panel.modes_chart.frequency_marks.x, rpm(expected.angular_frequency), rtol=1e-12
    )
    # The running-speed band 20–45 rpm of the case, and widened by the ±20 % margin.
    bands = np.atleast_2d(panel.modes_chart.bands.x)
    widened = np.atleast_2d(panel.modes_chart.widened.x)
    np.testing.assert_allclose(bands[0][:2], [20.0, 45.0], rtol=1e-12)
    np.testing.assert_allclose(widened[0][:2], [16.0, 54.0], rtol=1e-12)
    assert f"{expected.frequency[0]:.4g}" in panel.frequency_table.value
    # Live: a diameter edit changes the frequencies drawn.
    before = panel.modes_chart.frequency_marks.x.copy()
    field(panel, "shafts[0].segments[1].section.outer_diameter").value = 90.0
    assert not np.allclose(panel.modes_chart.frequency_marks.x, before)
    again = natural_modes(parse_case(panel.document))
    np.testing.assert_allclose(panel.modes_chart.frequency_marks.x, rpm(again.angular_frequency))


def test_two_disc_frequency_follows_a_disc_inertia_edit() -> None:
    # Two discs on a massless shaft of stiffness k = G·J/L, free at both ends:
    # ω² = k·(J1 + J2)/(J1·J2) (Rao, Mechanical Vibrations, two-rotor torsional system; from
    # memory). With the soft spring ks at disc 1 the exact roots solve
    # J1·J2·ω⁴ − (J1·k + J2·(k + ks))·ω² + k·ks = 0 (two-degree-of-freedom system, same source).
    panel = Workbench(two_disc_case())
    panel.open_modes()
    stiffness = 80e9 * math.pi * 0.040**4 / 32 / 1.0
    spring = SOFT * 180 / math.pi

    def free_free(inertia_a: float, inertia_b: float) -> float:
        omega = math.sqrt(stiffness * (inertia_a + inertia_b) / (inertia_a * inertia_b))
        return omega / (2 * math.pi)

    def on_spring(inertia_a: float, inertia_b: float) -> float:
        roots = np.roots(
            [
                inertia_a * inertia_b,
                -(inertia_a * stiffness + inertia_b * (stiffness + spring)),
                stiffness * spring,
            ]
        )
        return math.sqrt(max(roots)) / (2 * math.pi)

    modes = panel.modes
    assert modes is not None and len(modes) == 2
    assert modes.frequency[1] == pytest.approx(on_spring(0.2, 0.05), rel=1e-9)
    assert modes.frequency[1] == pytest.approx(free_free(0.2, 0.05), rel=1e-5)
    field(panel, "discs[1].inertia").value = 0.1
    modes = panel.modes
    assert modes is not None
    assert modes.frequency[1] == pytest.approx(on_spring(0.2, 0.1), rel=1e-9)
    assert modes.frequency[1] == pytest.approx(free_free(0.2, 0.1), rel=1e-5)
    listed = f"{modes.frequency[1]:.4g}"
    assert f"<td>{listed}</td>" in panel.frequency_table.value
    assert panel.modes_chart.flexible.labels[1] == f"mode 2: {listed} Hz"


def test_rigid_body_modes_are_marked() -> None:
    # A free–free two-disc system (statics refuses it, so the chart is drawn directly): one
    # rigid-body mode at 0 Hz, then ω² = k·(J1 + J2)/(J1·J2) (Rao, as above; from memory).
    from workbench.panel.modes_section import ModesChart
    from workbench.solver.modes import natural_modes

    case = two_disc_case()
    case["supports"] = []
    modes = natural_modes(parse_case(case))
    chart = ModesChart()
    chart.draw(modes, 0, (), 0.2)
    assert bool(modes.rigid_body[0]) and chart.rigid.visible
    assert chart.rigid.labels == ["mode 1: rigid body (0 Hz)"]
    np.testing.assert_allclose(chart.rigid.y, [1.0, 1.0])  # one rotation all along
    stiffness = 80e9 * math.pi * 0.040**4 / 32
    omega = math.sqrt(stiffness * 0.25 / (0.2 * 0.05))
    assert chart.flexible.labels == [f"mode 2: {omega / (2 * math.pi):.4g} Hz"]


def test_case_without_inertia_says_so() -> None:
    panel = Workbench(simple_case())
    panel.open_modes()
    assert panel.modes is None
    assert "no inertia" in panel.modes_message.value
    assert panel.modes_figures.layout.display == "none"
    # A density for the material gives the shaft inertia: the charts appear.
    field(panel, "materials.steel.density").value = 7850.0
    assert panel.modes is not None and panel.modes_message.value == ""
    assert panel.modes_figures.layout.display is None


def test_fatigue_diagram_lines_and_operating_point(panel: Workbench) -> None:
    # Failure lines in the τm–τa plane (Budynas & Nisbett, Shigley's Mechanical Engineering
    # Design, 9th ed., §6-12, Tables 6-6 and 6-7): modified Goodman through (0, Sse) and
    # (Ssu, 0); Gerber parabola through the same intercepts; ASME ellipse through (0, Sse) and
    # (Ssy, 0); Soderberg through (0, Sse) and (Ssy, 0); Langer through (0, Ssy) and (Ssy, 0).
    from workbench.panel.fatigue_section import governing_fatigue_points

    panel.open_fatigue()
    report = run_checks(solve(load_case(CASE)))
    points = governing_fatigue_points(report, "auger")
    governing = points[0]
    factors = governing.factors
    sse, ssu, ssy = (
        factors.endurance_shear / 1e6,
        factors.ultimate_shear / 1e6,
        factors.yield_shear / 1e6,
    )
    xs, ys = panel.fatigue_chart.lines.x, panel.fatigue_chart.lines.y
    intercepts = {
        0: ((0, sse), (ssu, 0)),  # Goodman
        1: ((0, sse), (ssu, 0)),  # Gerber
        2: ((0, sse), (ssy, 0)),  # ASME elliptic
        3: ((0, sse), (ssy, 0)),  # Soderberg
        4: ((0, ssy), (ssy, 0)),  # Langer
    }
    for line, (start, end) in intercepts.items():
        assert (xs[line][0], ys[line][0]) == pytest.approx(start, abs=1e-9)
        assert (xs[line][-1], ys[line][-1]) == pytest.approx(end, abs=1e-9)
    # Shape between the ends: Goodman straight, Gerber parabola, ASME quarter ellipse.
    tm, ta = xs[0], ys[0]
    np.testing.assert_allclose(ta / sse + tm / ssu, 1.0, rtol=1e-12)
    np.testing.assert_allclose(ys[1], sse * (1 - (xs[1] / ssu) ** 2), rtol=1e-12, atol=1e-9)
    np.testing.assert_allclose((ys[2] / sse) ** 2 + (xs[2] / ssy) ** 2, 1.0, rtol=1e-9)
    # The operating point is the governing segment's FatiguePoint, in MPa.
    assert panel.fatigue_chart.point.x[0] == pytest.approx(factors.mean_shear / 1e6, rel=1e-12)
    assert panel.fatigue_chart.point.y[0] == pytest.approx(
        factors.alternating_shear / 1e6, rel=1e-12
    )
    assert (governing.shaft, governing.segment) == ("auger", 0)
    # The modified Goodman factor of the point is where the load line meets the line:
    # n = 1/(τa/Sse + τm/Ssu) (Shigley, 9th ed., eq. 6-41).
    n = 1 / (
        factors.alternating_shear / factors.endurance_shear
        + factors.mean_shear / factors.ultimate_shear
    )
    assert factors.goodman == pytest.approx(n, rel=1e-12)
    assert len(panel.fatigue_chart.others.x) == len(points) - 1
    # The criterion picked in the Design tab is the one drawn thick.
    field(panel, "design.fatigue.criterion").value = "soderberg"
    np.testing.assert_allclose(panel.fatigue_chart.chosen.x, xs[3])


def test_fatigue_switch_and_result_pickers(panel: Workbench) -> None:
    panel.open_fatigue()
    pickers = panel.form.fields["design.fatigue.extremes[1]"]
    pickers[0].value = "jam, factored"
    assert panel.model is not None and panel.model.design is not None
    assert panel.model.design.fatigue.extremes == ("pressing", "jam, factored")
    switch = next(
        x
        for x in panel.design_box.children[-10:]
        if isinstance(x, w.HBox)
        and any(isinstance(c, w.Checkbox) and c.description == "fatigue check" for c in x.children)
    )
    box = next(c for c in switch.children if isinstance(c, w.Checkbox))
    box.value = False
    assert "fatigue" not in panel.document["design"]
    assert "No fatigue check" in panel.fatigue_message.value
    assert not any(c.kind == "fatigue" for c in panel.report.checks)


@pytest.mark.parametrize(
    ("path", "value", "words"),
    [
        ("discs[0].inertia", -1.0, "greater than zero"),
        ("operating_speeds[0].max", 10.0, "must not be less than min"),
        ("materials.auger-steel.density", -5.0, "greater than zero"),
        ("design.frequency_margin", 1.5, "fraction from 0"),
        ("design.fatigue.factor_of_safety", 0.5, "at least 1"),
    ],
)
def test_bad_value_in_the_new_editors(
    panel: Workbench, path: str, value: float, words: str
) -> None:
    field(panel, path).value = value
    assert panel.stale
    assert words in message_beside(panel, path).value
    assert field(panel, path).value == value  # what was typed stays
    assert "wb-bad" in field(panel, path)._dom_classes


def test_bad_fatigue_pick_shows_beside_the_pickers(panel: Workbench) -> None:
    from workbench.panel.document import set_at

    set_at(panel.document, ("design", "fatigue", "extremes", 1), "nope")
    panel.refresh()
    assert panel.stale
    labels = panel.form.messages["design.fatigue.extremes"]
    assert any("unknown load case or combination" in label.value for label in labels)


def test_add_and_remove_disc_and_speed_band(panel: Workbench) -> None:
    panel.vibration_editor.add_disc()
    assert len(panel.document["discs"]) == 3 and not panel.stale
    panel.vibration_editor.add_speed()
    assert panel.document["operating_speeds"][-1]["name"] == "band 2"
    assert any(c.result == "band 2" for c in panel.report.checks)
    panel.form.remove(("operating_speeds",), 1, drop_empty=True)
    panel.form.remove(("discs",), 2, drop_empty=True)
    assert len(panel.document["discs"]) == 2 and len(panel.document["operating_speeds"]) == 1


def test_mean_stress_choice_moves_the_operating_point(panel: Workbench) -> None:
    # "nominal" leaves Kfs off the mean stress (Kfsm = 1): the operating point's τm falls by the
    # factor Kfs, τa stays (Shigley's Mechanical Engineering Design, 9th ed., eq. 6-36 with
    # Kfsm = Kfs or 1). The demo's governing segment carries a keyseat, Kfs = 3.0.
    from workbench.panel.fatigue_section import governing_fatigue_points

    panel.open_fatigue()
    before = governing_fatigue_points(panel.report, "auger")[0]
    chooser = field(panel, "design.fatigue.mean_concentration")
    assert chooser.value == "kfs"
    chooser.value = "none"
    assert panel.document["design"]["fatigue"]["mean_concentration"] == "none"
    after = governing_fatigue_points(panel.report, "auger")[0]
    assert (after.shaft, after.segment) == (before.shaft, before.segment)
    assert after.factors.mean_shear == pytest.approx(
        before.factors.mean_shear / before.concentration, rel=1e-12
    )
    assert after.factors.alternating_shear == pytest.approx(
        before.factors.alternating_shear, rel=1e-12
    )
    assert panel.fatigue_chart.point.x[0] == pytest.approx(
        after.factors.mean_shear / 1e6, rel=1e-12
    )


def test_keyseat_and_notch_from_the_segment_row() -> None:
    # A stated Kts multiplies the nominal stress 16T/(πd³) (Pilkey & Pilkey, Peterson's Stress
    # Concentration Factors, 3rd ed., definition of Kts); the end-milled keyseat takes 3.0
    # (Shigley's Mechanical Engineering Design, Table 7-1).
    panel = Workbench(simple_case(diameter=40.0, torque=500.0))
    nominal = 16 * 500.0 / (math.pi * 0.040**3)

    def largest(kind: str) -> float | None:
        values = [c.value for c in panel.report.checks if c.kind == kind]
        return max(values) if values else None

    assert largest("keyseat_stress") is None and largest("notch_stress") is None
    field(panel, "shafts[0].segments[0].keyseat").value = True
    assert panel.document["shafts"][0]["segments"][0]["keyseat"] is True
    assert largest("keyseat_stress") == pytest.approx(3.0 * nominal, rel=1e-9)
    field(panel, "shafts[0].segments[0].keyseat").value = False
    assert "keyseat" not in panel.document["shafts"][0]["segments"][0]
    assert largest("keyseat_stress") is None

    notch = field(panel, "shafts[0].segments[0].notch.kts")
    notch.value = 1.8
    assert panel.document["shafts"][0]["segments"][0]["notch"] == {"kts": 1.8}
    assert largest("notch_stress") == pytest.approx(1.8 * nominal, rel=1e-9)
    notch.value = 0.7  # below 1: refused beside the field, the last good results kept
    assert panel.stale
    assert "at least 1" in message_beside(panel, "shafts[0].segments[0].notch.kts").value
    notch.value = 0.0  # no notch
    assert "notch" not in panel.document["shafts"][0]["segments"][0]
    assert not panel.stale
    assert largest("notch_stress") is None
