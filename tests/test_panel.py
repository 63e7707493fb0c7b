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
from pathlib import Path

import ipywidgets as w
import numpy as np
import pytest

from tests.panel_cases import (
    box_of,
    field,
    message_beside,
    open_demo,
    shown_messages,
    simple_case,
)
from workbench.case.errors import InputError
from workbench.design.caution import CAUTION
from workbench.design.checks import run_checks
from workbench.design.sweep import SweepRequest, run_sweep
from workbench.panel import CASE_MIME_TYPE, Workbench
from workbench.panel.document import get_at, normal_field, parse_path, plain_words
from workbench.panel.form import clean_number
from workbench.panel.state import CaseState
from workbench.solver.analysis import solve
from workbench.solver.io import load_case, parse_case
from workbench.solver.sections import SolidCircle


@pytest.fixture
def panel(tmp_path: Path) -> Workbench:
    return open_demo(tmp_path)


def test_closed_form_end_torque() -> None:
    panel = Workbench(simple_case())
    d, T, L, G = 0.040, 500.0, 1.0, 80e9
    tau = 16 * T / (math.pi * d**3) / 1e6
    theta = math.degrees(T * L / (G * math.pi * d**4 / 32))
    assert max(panel.charts.stress.now.y) == pytest.approx(tau, rel=1e-9)
    assert max(abs(panel.charts.angle.now.y)) == pytest.approx(theta, rel=1e-9)
    # Editing the diameter moves the curves to the new closed form.
    field(panel, "shafts[0].segments[0].section.diameter").value = "50.0"
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
    new_outer = float(outer.value) + 12.0
    outer.value = f"{new_outer:g}"
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
    assert field(panel, path).value == "52"
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 52


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
    entry.value = f"{bad:g}"
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
    assert float(entry.value.replace("\u2212", "-").replace(",", "")) == bad
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
    field(panel, path).value = "-2.0"
    assert "greater than zero (-2 mm)" in message_beside(panel, path).value
    (drag,) = [x for x in panel.form.messages[path] if x in panel.dimension_box.children]
    # the drag slider's own message line
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
    diameter.value = f"{float(diameter.value) + 11.0:g}"
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
    panel.sweep_from.value, panel.sweep_to.value, panel.sweep_points.value = "40", "60 mm", "300"
    panel.start_sweep()
    assert panel.sweep_progress.value == 300
    assert len(panel.sweep_line.y) == 300
    assert panel.sweep_line.y[0] > panel.sweep_line.y[-1]  # a thicker shaft, less stress
    panel.sweep_progress.observe(lambda change: panel.cancel_sweep(), "value")
    panel.start_sweep()
    assert panel.sweep_progress.value < 300
    assert "cancelled" in panel.sweep_message.value


def test_save_and_reopen(panel: Workbench, tmp_path: Path) -> None:
    field(panel, "shafts[0].segments[0].section.diameter").value = "48.0"
    panel.save()
    again = Workbench.open(panel.path, show=False)
    assert again.document["shafts"][0]["segments"][0]["section"]["diameter"] == 48
    assert load_case(panel.path) == panel.model
    # Saving a case with errors is refused and the file is left as it was.
    field(panel, "shafts[0].segments[0].section.diameter").value = "-1.0"
    panel.save_button.click()
    assert "errors" in panel.save_message.value
    section = load_case(panel.path).shafts[0].segments[0].layers[0].section
    assert isinstance(section, SolidCircle) and section.diameter == 0.048


def test_case_output_for_the_record(panel: Workbench) -> None:
    assert CASE_MIME_TYPE == "application/vnd.workbench.case+json"
    bundle = panel.case_bundle
    assert set(bundle) == {CASE_MIME_TYPE, "text/plain"}
    field(panel, "shafts[0].segments[0].section.diameter").value = "47.0"
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
            entry.value = str(value)
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
            entry.value = str(value)
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
        entry.value = "-1.0"
        entry.value = "47.0"
        await asyncio.sleep(0)

    asyncio.run(burst())
    assert not panel.stale and shown_messages(panel) == []
    assert "wb-stale" not in panel.charts_box._dom_classes
    assert np.max(panel.charts.segments.y[0]) == pytest.approx(23.5)


def test_reading_results_finishes_a_pending_edit(panel: Workbench) -> None:
    entry = field(panel, "shafts[0].segments[0].section.diameter")
    count = panel.solve_count

    async def edit_and_read() -> float:
        entry.value = "52.0"
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
    field(panel, "design.rotation_limits[0].limit").value = "2.0"
    assert rotation_check().limit == pytest.approx(math.radians(2.0), rel=1e-12)
    field(panel, "design.rotation_limits[0].start").value = "400.0"
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
    notch.value = "1.8"
    assert panel.document["shafts"][0]["segments"][0]["notch"] == {"kts": 1.8}
    assert largest("notch_stress") == pytest.approx(1.8 * nominal, rel=1e-9)
    notch.value = "0.7"  # below 1: refused beside the field, the last good results kept
    assert panel.stale
    assert "at least 1" in message_beside(panel, "shafts[0].segments[0].notch.kts").value
    notch.value = "0.0"  # no notch
    assert "notch" not in panel.document["shafts"][0]["segments"][0]
    assert not panel.stale
    assert largest("notch_stress") is None


def html_shown(root: w.Widget) -> list[str]:
    """The value of every HTML widget in the panel (depth-first through boxes and tabs)."""
    found = [root.value] if isinstance(root, w.HTML) else []
    for child in getattr(root, "children", ()):
        found += html_shown(child)
    return found


def test_names_from_the_case_cannot_inject_markup() -> None:
    # Untrusted text placed in HTML element content or attributes is escaped (OWASP Cross Site
    # Scripting Prevention Cheat Sheet, output encoding for HTML contexts): names typed in a
    # case file show as text and never become elements.
    attack = "<img src=x onerror=alert(1)>"
    case = simple_case()
    case["title"] = f"title {attack}"
    case["shafts"][0]["id"] = f"s{attack}"
    case["supports"][0]["shaft"] = f"s{attack}"
    case["load_cases"][0] = {
        "name": f"drive{attack}",
        "torques": [{"shaft": f"s{attack}", "x": 1000, "torque": 500}],
    }
    panel = Workbench(case)
    field(panel, "shafts[0].segments[0].section.diameter").value = "-1.0"  # a message naming them
    shown = html_shown(panel.root)
    assert not [value for value in shown if "<img" in value]
    escaped = "&lt;img src=x onerror=alert(1)&gt;"
    assert escaped in panel.title.value
    assert escaped in panel.status.value  # the field is named by its shaft's id
    assert f"drive{escaped}" in panel.summary.value
    assert f"s{escaped}" in panel.check_table.value


def test_a_combination_factor_has_no_unit_whatever_its_case_is_called() -> None:
    # A combination's factors are plain numbers (case-file contract: "factors": {"service": 1.5});
    # a length is in the case's length unit. Common practice, no source.
    case = simple_case()
    case["load_cases"][0]["name"] = "length"
    case["combinations"] = [{"name": "factored", "factors": {"length": 1.5}}]
    panel = Workbench(case)

    def units_beside(path: str) -> list[str]:
        box = box_of(panel.root, field(panel, path))
        assert box is not None
        return [child.value for child in box.children if isinstance(child, w.Label)]

    assert units_beside("combinations[0].factors.length") == []
    assert units_beside("shafts[0].segments[0].length") == ["mm"]


def test_case_state_alone_solves_keeps_the_last_good_results_and_names_the_field() -> None:
    # The state needs no widget. τ_max = 16·T/(π·d³) (Gere & Goodno, 8th ed., eq. 3-13);
    # 1 in = 25.4 mm exactly (NIST SP 811, 2008, appendix B.8).
    solved: list[int] = []
    errors: list[InputError] = []
    state = CaseState(simple_case(), None, lambda: solved.append(state.solve_count), errors.append)
    tau = 16 * 500.0 / (math.pi * 0.040**3)
    assert state.refresh() and solved == [1]
    assert state.results is not None
    assert state.results.shear_stress.max() == pytest.approx(tau, rel=1e-9)
    state.document["shafts"][0]["segments"][0]["section"]["diameter"] = -1
    assert not state.refresh()
    assert state.stale and solved == [1]
    assert errors[-1].field == "shafts[0].segments[0].section.diameter"
    assert state.results.shear_stress.max() == pytest.approx(tau, rel=1e-9)
    assert not state.change_units("us")  # refused while the document has an error
    state.document["shafts"][0]["segments"][0]["section"]["diameter"] = 40
    assert state.refresh() and not state.stale
    assert state.change_units("us")
    diameter = state.document["shafts"][0]["segments"][0]["section"]["diameter"]
    assert diameter == pytest.approx(40 / 25.4, rel=1e-11)  # the case file keeps 12 digits


def test_a_rename_that_duplicates_another_name_is_told_beside_the_name(panel: Workbench) -> None:
    # Found by the fuzzer (tests/fuzz): the duplicate is named at the other load case, whose
    # name is not shown while this one is picked, so no message line showed it.
    path = "load_cases[0].name"
    field(panel, path).value = "jam"
    assert panel.stale
    shown = html.unescape(message_beside(panel, path).value)
    assert "duplicate name 'jam'" in shown and "load case" in shown
    assert shown_messages(panel) == [message_beside(panel, path).value]
    assert "wb-stale" in panel.charts_box._dom_classes
    field(panel, path).value = "pressing"
    assert not panel.stale and shown_messages(panel) == []
