"""Typed entries and honest state: what a person types into the panel, and what it then shows.

Entries are text read with units (``60``, ``60 mm``, ``2 1/4 in``, ``1,250 N·m``); anything else
is refused beside its field, nothing is solved, and every output derived from the last valid case
says it is stale, why, and which field to fix.

Outside checks: 1 in = 25.4 mm exactly (NIST Special Publication 811, 2008, Appendix B.8); a
solid round shaft fixed at one end with an end torque T has τ_max = 16·T/(π·d³) (Gere & Goodno,
*Mechanics of Materials*, 8th ed., §3.3, eq. 3-13).
"""

from __future__ import annotations

import asyncio
import html
import math
from pathlib import Path

import ipywidgets as w
import pytest

from tests.panel_cases import box_of, field, message_beside, open_demo, shown_messages, simple_case
from workbench.case.errors import InputError
from workbench.case.units import registry
from workbench.panel import Workbench
from workbench.panel.markup import render

INCH = 0.0254  # m, exact (NIST SP 811, 2008, Appendix B.8)
DIAMETER = "shafts[0].segments[0].section.diameter"


def largest_shear_mpa(panel: Workbench) -> float:
    results = panel.results
    assert results is not None
    return float(results.shear_stress.max()) / 1e6


def tau_max_mpa(torque: float, diameter: float) -> float:
    """16·T/(π·d³) in MPa, T in N·m, d in m (Gere & Goodno, 8th ed., eq. 3-13)."""
    return 16.0 * torque / (math.pi * diameter**3) / 1e6


def widgets_in(root: w.Widget) -> list[w.Widget]:
    """Every widget under ``root`` (through boxes, tabs and accordions)."""
    found = [root]
    for child in getattr(root, "children", ()):
        found += widgets_in(child)
    return found


@pytest.mark.parametrize("typed", ["7o", "abc", "60 N·m", "1,25", ""])
def test_a_refused_entry_is_shown_beside_its_field_and_nothing_is_solved(typed: str) -> None:
    panel = Workbench(simple_case(diameter=40.0))
    entry = field(panel, DIAMETER)
    count, stress = panel.solve_count, largest_shear_mpa(panel)
    entry.value = typed
    assert panel.stale and panel.solve_count == count  # nothing solved
    assert entry.value == typed  # the text stays as typed
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 40  # kept
    message = html.unescape(message_beside(panel, DIAMETER).value)
    assert message and len(message) <= 200
    assert repr(typed) in message  # names what was typed
    assert set(shown_messages(panel)) == {message_beside(panel, DIAMETER).value}
    assert "wb-bad" in entry._dom_classes
    assert "Not solved" in panel.status.value and "diameter" in panel.status.value
    assert largest_shear_mpa(panel) == stress  # the last valid results, unchanged
    entry.value = "45"
    assert not panel.stale and panel.solve_count == count + 1
    assert largest_shear_mpa(panel) == pytest.approx(tau_max_mpa(500.0, 0.045), rel=1e-9)
    assert message_beside(panel, DIAMETER).value == "" and "wb-bad" not in entry._dom_classes


def test_seven_oh_is_not_seven_millimetres() -> None:
    panel = Workbench(simple_case(diameter=40.0))
    field(panel, DIAMETER).value = "7o"
    assert "unknown unit 'o'" in html.unescape(message_beside(panel, DIAMETER).value)
    assert largest_shear_mpa(panel) == pytest.approx(tau_max_mpa(500.0, 0.040), rel=1e-9)


def test_a_mixed_number_in_inches_in_a_us_panel() -> None:
    panel = Workbench(simple_case(diameter=60.0))
    panel.units.value = "us"
    assert panel.units_key == "us"
    entry = field(panel, DIAMETER)
    entry.value = "2 1/4 in"
    # The unit library alone reads the text as 2 / 4 in; the panel must read 2¼ in.
    assert registry().Quantity("2 1/4 in").to("in").magnitude == pytest.approx(0.5)
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 2.25
    assert entry.value == "2.25"
    torque = panel.model.load_cases[0].torques[0].torque  # N·m (SI inside the model)
    expected = tau_max_mpa(torque, 2.25 * INCH)
    assert largest_shear_mpa(panel) == pytest.approx(expected, rel=1e-9)
    entry.value = "57.15 mm"  # another unit of length: shown in the panel's unit
    assert entry.value == "2.25" and not panel.stale


def test_a_mixed_number_in_inches_in_an_si_panel() -> None:
    panel = Workbench(simple_case(diameter=60.0))
    entry = field(panel, DIAMETER)
    entry.value = "2 1/4 in"
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 57.15
    assert entry.value == "57.15"


def test_entering_text_from_code_reads_it_as_typed() -> None:
    panel = Workbench(simple_case(diameter=40.0))
    panel.enter(DIAMETER, "2 in")  # 50.8 mm (NIST SP 811, 2008, B.8: 1 in = 25.4 mm)
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 50.8
    assert field(panel, DIAMETER).value == "50.8" and not panel.stale
    assert largest_shear_mpa(panel) == pytest.approx(tau_max_mpa(500.0, 2 * INCH), rel=1e-9)
    count = panel.solve_count
    panel.enter(DIAMETER, "7o")  # refused beside the field, nothing solved
    assert panel.stale and panel.solve_count == count
    assert "'7o'" in html.unescape(message_beside(panel, DIAMETER).value)
    with pytest.raises(InputError, match="no entry of this field"):
        panel.enter("shafts[0].segments[9].section.diameter", "50")


def test_a_torque_with_thousands_separator() -> None:
    panel = Workbench(simple_case(diameter=40.0))
    path = "load_cases[0].torques[0].torque"
    entry = next(x for x in panel.form.fields[path] if isinstance(x, w.Text))
    slider = next(x for x in panel.form.fields[path] if isinstance(x, w.FloatSlider))
    entry.value = "1,250 N·m"
    assert panel.document["load_cases"][0]["torques"][0]["torque"] == 1250
    assert entry.value == "1,250" and slider.value == 1250.0
    assert largest_shear_mpa(panel) == pytest.approx(tau_max_mpa(1250.0, 0.040), rel=1e-9)
    entry.value = "1.5 kN·m"
    assert panel.document["load_cases"][0]["torques"][0]["torque"] == 1500


def test_no_quantity_is_a_browser_number_input() -> None:
    panel = Workbench(simple_case())
    kinds = {type(x).__name__ for x in widgets_in(panel.root)}
    assert not kinds & {"FloatText", "BoundedFloatText", "IntText", "BoundedIntText"}
    for widget in widgets_in(panel.root):
        if isinstance(widget, w.FloatSlider):
            assert not widget.readout  # its editable readout would read `7o` as 7
    for widgets in panel.form.fields.values():
        for widget in widgets:
            if isinstance(widget, w.Text):
                assert not widget.continuous_update  # read on Enter or leaving the field


def message_after(panel: Workbench, entry: w.Text) -> w.HTML:
    """The message line right after ``entry`` in its box."""
    box = box_of(panel.root, entry)
    assert box is not None
    children = list(box.children)
    line = children[children.index(entry) + 1]
    assert isinstance(line, w.HTML) and "wb-msg" in line._dom_classes
    return line


@pytest.mark.parametrize(
    ("typed", "words"),
    [
        ("7o", "'7o'"),
        ("abc", "not a number"),
        ("2.5", "not a whole number"),
        ("1", "from 2 to 5,000, not 1"),
        ("5,001", "not 5,001"),
        ("12 mm", "'12 mm'"),
    ],
)
def test_sweep_points_are_typed_text_refused_beside_the_field(typed: str, words: str) -> None:
    panel = Workbench(simple_case())
    panel.sweep_input.value = tuple(("shafts", 0, "segments", 0, "section", "diameter"))
    entry = panel.sweep_points
    assert isinstance(entry, w.Text) and not entry.continuous_update
    line = message_after(panel, entry)
    count = panel.solve_count
    entry.value = typed
    assert words in html.unescape(line.value)
    assert "wb-bad" in entry._dom_classes
    assert panel.solve_count == count and not panel.stale  # the case is untouched
    panel.start_sweep()  # refused again when run: no sweep drawn
    assert words in html.unescape(panel.sweep_message.value)
    assert len(panel.sweep_line.y) == 0
    entry.value = "1,000"  # thousands grouped, as a person writes it
    assert line.value == "" and "wb-bad" not in entry._dom_classes
    entry.value = "12"
    panel.start_sweep()
    assert len(panel.sweep_line.x) == 12 and panel.sweep_message.value == ""


def test_sweep_support_is_typed_text_refused_beside_the_field() -> None:
    panel = Workbench(simple_case())
    entry = panel.sweep_support
    assert isinstance(entry, w.Text)
    line = message_after(panel, entry)
    entry.value = "7o"
    assert "'7o'" in html.unescape(line.value)
    entry.value = "-1"
    assert "from 0 to 99, not -1" in html.unescape(line.value)
    entry.value = "0"
    assert line.value == "" and "wb-bad" not in entry._dom_classes


def stale_state(panel: Workbench) -> dict[str, bool]:
    shown = {name: "wb-stale" in x._dom_classes for name, x in panel.stale_marks.outputs.items()}
    shown["summary"] = "wb-stale" in panel.summary._dom_classes
    shown["check table"] = "wb-stale" in panel.check_table._dom_classes
    return shown


def test_every_derived_output_is_stale_says_why_and_points_at_the_field(tmp_path: Path) -> None:
    panel = open_demo(tmp_path)
    panel.pin_baseline()
    panel.sweep_input.value = tuple(("shafts", 0, "segments", 0, "section", "diameter"))
    panel.sweep_points.value = "5"
    panel.start_sweep()
    sweep = list(panel.sweep_line.y)
    panel.open_modes()
    panel.open_fatigue()
    verdict = "SOME CHECKS FAIL" if not panel.report.passes else "all checks pass"
    assert verdict in panel.summary.value
    assert not any(stale_state(panel).values())
    assert all(note.value == "" for note in panel.stale_marks.notes.values())
    count = panel.solve_count

    field(panel, DIAMETER).value = "7o"
    assert panel.solve_count == count
    assert set(panel.stale_marks.outputs) >= {
        "elevation",
        "torque",
        "angle",
        "stress",
        "utilisation",
        "mode shapes",
        "modes against speeds",
        "frequency table",
        "fatigue diagram",
        "fatigue table",
        "sweep",
        "baseline difference",
    }
    assert all(stale_state(panel).values()), stale_state(panel)
    summary = html.unescape(panel.summary.value)
    assert verdict not in summary and "NOT SOLVED" in summary and "'7o'" in summary
    checks = html.unescape(panel.check_table.value)
    assert "STALE" in checks and "'7o'" in checks
    assert checks.count("<td>was pass</td>") + checks.count("<td>was <span") == len(
        panel.report.governing_by_kind()
    )  # every verdict is the last valid case's
    for what, note in panel.stale_marks.notes.items():
        text = html.unescape(note.value)
        assert "STALE" in text and "'7o'" in text and DIAMETER in text, what
    notes = list(panel.stale_marks.notes.values())
    for where in (panel.charts_box, panel.whatif_box, *panel.more_charts.children):
        assert any(note in widgets_in(where) for note in notes)  # a note over each group
    assert ".wb-stale.bqplot.figure" in render("style") and "opacity" in render("style")
    assert list(panel.sweep_line.y) == sweep  # the last sweep stays up, marked

    # Nothing derived from the case as edited is offered while it is stale.
    panel.start_sweep()
    assert "not solved" in panel.sweep_message.value and panel.solve_count == count
    panel.units.value = "us"
    assert panel.units_key == "si" and "Fix the fields" in panel.status.value
    panel.result.value = panel.result.options[-1]  # a redraw while stale keeps it stale
    assert all(stale_state(panel).values()) and "NOT SOLVED" in panel.summary.value

    field(panel, DIAMETER).value = "62 mm"
    assert not panel.stale and panel.solve_count == count + 1
    assert not any(stale_state(panel).values())
    assert all(note.value == "" for note in panel.stale_marks.notes.values())
    assert "NOT SOLVED" not in panel.summary.value and "STALE" not in panel.check_table.value


def test_a_refusal_holds_back_edits_of_other_fields_until_it_is_fixed() -> None:
    panel = Workbench(simple_case(diameter=40.0))
    count = panel.solve_count
    field(panel, DIAMETER).value = "abc"
    length = field(panel, "shafts[0].segments[0].length")
    length.value = "1,100"  # taken into the case, not solved while the diameter is refused
    assert panel.document["shafts"][0]["segments"][0]["length"] == 1100
    assert panel.stale and panel.solve_count == count
    assert field(panel, DIAMETER).value == "abc"
    assert "'abc'" in html.unescape(message_beside(panel, DIAMETER).value)
    panel._on_shaft(None)  # the editors rebuilt: the refused text and its message stay
    assert field(panel, DIAMETER).value == "abc"
    assert "'abc'" in html.unescape(message_beside(panel, DIAMETER).value)
    field(panel, DIAMETER).value = "40"
    assert not panel.stale and panel.model.shafts[0].segments[0].length == pytest.approx(1.1)


def test_a_refusal_in_a_kernel_burst_leaves_nothing_solved() -> None:
    panel = Workbench(simple_case(diameter=40.0))
    entry = field(panel, DIAMETER)
    count = panel.solve_count

    async def burst() -> None:
        entry.value = "45"
        entry.value = "4 5"  # refused: after a valid edit that waits for the loop
        await asyncio.sleep(0)

    asyncio.run(burst())
    assert panel.stale and panel.solve_count == count
    assert "'4 5'" in html.unescape(message_beside(panel, DIAMETER).value)
    assert largest_shear_mpa(panel) == pytest.approx(tau_max_mpa(500.0, 0.040), rel=1e-9)
