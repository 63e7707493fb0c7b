"""Numbers a person reads in the panel: four figures, grouped, units as written, words for keys.

Conversion factors: 1 in = 25.4 mm and 1 ft = 0.3048 m exactly, 1 lbf·in = 0.112 984 829 N·m,
1 psi = 6 894.757 Pa (NIST Special Publication 811, 2008 edition, appendix B.9).
"""

from __future__ import annotations

import html
import json
import math
import re
import typing
from pathlib import Path

import ipywidgets as w
import ipywidgets.widgets.widget as widget_module
import pytest

from tests.panel_cases import box_of, field, message_beside, open_demo, simple_case
from workbench.case.declaration import criteria
from workbench.case.entry import read_quantity
from workbench.case.units import SI_ENGINEERING
from workbench.panel import Workbench
from workbench.panel.document import get_at, parse_path
from workbench.panel.keys import quantity_of
from workbench.panel.plotting import NUMBER_FORMAT, bq

INCH = 25.4e-3  # m
FOOT = 0.3048  # m
POUND_FORCE_INCH = 0.112984829  # N·m


@pytest.fixture
def demo(tmp_path: Path) -> Workbench:
    return open_demo(tmp_path)


def _cells(table_html: str) -> list[list[str]]:
    """The rows of an HTML table as lists of cell texts."""
    rows = re.findall(r"<tr>(.*?)</tr>", table_html, re.S)
    return [
        [
            html.unescape(re.sub(r"<[^>]+>", "", cell))
            for cell in re.findall(r"<t[dh]>(.*?)</t[dh]>", r)
        ]
        for r in rows
    ]


def _entry(panel: Workbench, path: str) -> w.Text:
    return next(x for x in panel.form.fields[path] if isinstance(x, w.Text))


def _unit_beside(panel: Workbench, path: str) -> str:
    box = box_of(panel.root, field(panel, path))
    assert box is not None
    return " ".join(child.value for child in box.children if isinstance(child, w.Label))


def test_us_fields_show_four_figures_and_keep_the_value(demo: Workbench) -> None:
    path = "shafts[0].segments[0].length"
    si_length = demo.document["shafts"][0]["segments"][0]["length"]  # mm
    demo.units.value = "us"
    entry = field(demo, path)
    assert entry.value == f"{si_length / 25.4:.4g}"  # e.g. 250 mm → "9.843", not 9.8425196…
    assert len(entry.value.replace(",", "").replace(".", "")) <= 4
    # The document keeps full precision: shown text is 4 figures, the value is not rounded.
    assert demo.document["shafts"][0]["segments"][0]["length"] == pytest.approx(
        si_length / 25.4, rel=1e-9
    )
    # What is shown reads back to the same value to four figures.
    shown = read_quantity(entry.value, "length", demo.state.units)
    assert shown == pytest.approx(si_length * 1e-3, rel=5e-4)
    demo.units.value = "si"
    assert demo.document["shafts"][0]["segments"][0]["length"] == pytest.approx(
        si_length, rel=1e-12
    )


def test_us_torque_reads_grouped_not_in_exponent() -> None:
    panel = Workbench(simple_case(torque=2217.0))
    panel.units.value = "us"
    # 2217 N·m / 0.112984829 N·m per lbf·in = 19,622 lbf·in → 19,620 to four figures.
    assert _entry(panel, "load_cases[0].torques[0].torque").value == "19,620"
    assert field(panel, "load_cases[0].torques[0].torque").description == "T [lbf·in]"
    summary = html.unescape(panel.tables.summary.value)
    assert "reaction 0 [lbf·in]" in summary and "19,620" in summary
    assert "e+" not in summary and "e+" not in panel.check_table.value


def test_a_large_value_reads_back_through_its_power_of_ten() -> None:
    panel = Workbench(simple_case())
    entry = _entry(panel, "load_cases[0].torques[0].torque")
    entry.value = "12,345,678"  # N·m: shown with a power of ten, read back the same
    assert entry.value == "1.235×10⁷"
    assert panel.document["load_cases"][0]["torques"][0]["torque"] == 12_345_678
    assert read_quantity(entry.value, "torque", SI_ENGINEERING) == pytest.approx(1.235e7)


def test_twist_rate_in_degrees_per_metre_and_per_foot(demo: Workbench) -> None:
    path = "design.max_twist_rate"
    per_mm = demo.document["design"]["max_twist_rate"]  # the case file's deg/mm
    assert field(demo, path).value == f"{per_mm * 1000:.4g}"
    assert _unit_beside(demo, path) == "°/m"
    twist_rows = [r for r in _cells(demo.check_table.value) if r[2:3] == ["twist rate"]]
    assert twist_rows and all(r[6] == "°/m" for r in twist_rows)
    assert float(twist_rows[0][5]) == pytest.approx(per_mm * 1000, rel=5e-4)

    field(demo, path).value = "2"  # a bare number in the unit beside the field: 2 °/m
    assert demo.document["design"]["max_twist_rate"] == pytest.approx(0.002)
    assert demo.model.design.max_twist_rate == pytest.approx(2 * math.pi / 180)

    demo.units.value = "us"
    assert _unit_beside(demo, path) == "°/ft"
    assert field(demo, path).value == f"{2 * FOOT:.4g}"  # 2 °/m = 0.6096 °/ft
    twist_rows = [r for r in _cells(demo.check_table.value) if r[2:3] == ["twist rate"]]
    assert twist_rows and all(r[6] == "°/ft" for r in twist_rows)
    assert "deg/mm" not in demo.check_table.value and "deg/in" not in demo.check_table.value


def test_fatigue_ratio_rows_have_no_unit(demo: Workbench) -> None:
    rows = [
        r for r in _cells(demo.check_table.value) if r[2:3] in (["fatigue"], ["first cycle yield"])
    ]
    assert rows
    assert all(r[6] == "" for r in rows)


def test_density_unit_is_written_with_a_superscript(demo: Workbench) -> None:
    name = next(iter(demo.document["materials"]))
    path = f"materials.{name}.density"
    assert _unit_beside(demo, path) == "kg/m³"
    demo.units.value = "us"
    assert _unit_beside(demo, path) == "lb/in³"


def test_criteria_are_shown_in_words(demo: Workbench) -> None:
    shear = field(demo, "design.shear_criterion")
    assert shear.value == demo.document["design"]["shear_criterion"]  # the key is kept
    labels = [label for label, _ in shear.options]
    assert "von Mises (distortion energy)" in labels and not any("_" in x for x in labels)
    fatigue = field(demo, "design.fatigue.criterion")
    assert ("modified Goodman", "goodman") in fatigue.options
    finish = field(demo, "design.fatigue.finish")
    assert ("cold drawn", "cold-drawn") in finish.options
    demo.open_fatigue()
    assert "modified Goodman" in demo.fatigue_section.table.value
    assert "goodman" not in demo.fatigue_section.table.value


def test_every_named_choice_has_words() -> None:
    for choices in (
        criteria.ShearCriterion,
        criteria.TwistRule,
        criteria.FatigueCriterion,
        criteria.SurfaceFinish,
        criteria.MeanConcentration,
    ):
        for key in typing.get_args(choices):
            assert key in criteria.CHOICE_WORDS, key
    assert set(criteria.CHOICE_WORDS) <= {
        key
        for choices in (
            criteria.SHEAR_CRITERIA,
            criteria.TWIST_RATE_RULES,
            criteria.FATIGUE_CRITERIA,
            criteria.SURFACE_FINISHES,
            criteria.MEAN_CONCENTRATIONS,
        )
        for key in choices
    }


def test_rpm_column_and_axes_without_exponents(demo: Workbench) -> None:
    demo.open_modes()
    table = demo.modes_section.table.value
    rows = [r for r in _cells(table) if r and r[0].isdigit()]
    assert rows
    assert "e+" not in table and "e-" not in table
    # The rpm column is 60/(2π) × rad/s; written grouped, four figures.
    modes = demo.state.modes
    assert modes is not None
    hertz = float(modes.frequency[-1])
    shown = rows[-1][2]
    assert float(shown.replace(",", "")) == float(f"{hertz * 60:.4g}")
    assert ("," in shown) == (hertz * 60 >= 1000)
    # Every axis of every chart writes plain numbers (d3-format "r": decimal notation rounded
    # to significant digits, no exponent, no SI prefix).
    figures = [x for x in _widgets(demo.root) if isinstance(x, bq.Figure)]
    # Axes of names (the study's inputs on an ordinal scale) write names, not numbers.
    axes = [
        axis
        for figure in figures
        for axis in figure.axes
        if not isinstance(axis.scale, bq.OrdinalScale)
    ]
    assert len(axes) >= 10
    assert all(axis.tick_format == NUMBER_FORMAT for axis in axes)
    assert NUMBER_FORMAT.endswith("r") and "e" not in NUMBER_FORMAT and "s" not in NUMBER_FORMAT
    tooltips = [m.tooltip for f in figures for m in f.marks if m.tooltip is not None]
    formats = {fmt for tooltip in tooltips for fmt in tooltip.formats}
    assert not any(fmt.endswith(("g", "e", "s")) for fmt in formats), formats


def _widgets(root: w.Widget) -> list[w.Widget]:
    found, stack = [], [root]
    while stack:
        widget = stack.pop()
        found.append(widget)
        stack.extend(getattr(widget, "children", ()))
    return found


def test_the_case_file_keeps_its_twist_rate_unit(demo: Workbench) -> None:
    saved = json.loads(demo.case_json())
    assert "readouts" not in saved["units"]
    assert saved["design"]["max_twist_rate"] == demo.document["design"]["max_twist_rate"]


def _shown(panel: Workbench) -> dict[str, tuple[float, str, w.Widget]]:
    """Each quantity entry of the panel: its value read back in SI, the unit beside it, itself."""
    units = panel.state.units
    shown = {}
    for key, widgets in panel.form.fields.items():
        quantity = quantity_of(parse_path(key))
        for widget in widgets:
            if isinstance(widget, w.Text) and quantity is not None:
                box = box_of(panel.root, widget)
                beside = [c.value for c in box.children if isinstance(c, w.Label)] if box else []
                si = read_quantity(widget.value, quantity, units, key)
                shown[f"{key} #{len(shown)}"] = (si, " ".join(beside), widget)
    return shown


def test_a_unit_switch_shows_every_field_again_in_the_widgets_it_has(demo: Workbench) -> None:
    """SI → US → SI makes no widget model; every entry shows the same quantity in the new unit.

    1 in = 25.4 mm exactly (NIST Special Publication 811, 2008 edition, appendix B.9).
    """
    before = set(widget_module._instances)  # w.Widget.widgets, without its warning
    si = _shown(demo)
    demo.units.value = "us"
    # Not one model made (nor closed): the page has nothing to build; tooltips keep theirs too.
    assert set(widget_module._instances) == before
    us = _shown(demo)
    assert us.keys() == si.keys() and len(si) > 40
    # A key the case file gives at its default is kept (its field stays): a ratio, unchanged.
    assert demo.document["design"]["frequency_margin"] == 0.2
    for key, (value, beside, widget) in us.items():
        assert widget is si[key][2], key  # the same entry, shown again
        # Each shown to four figures: the two readings agree within the rounding of both.
        assert value == pytest.approx(si[key][0], rel=1e-3, abs=1e-12), key
        if si[key][1]:
            assert beside != si[key][1] or beside in ("rpm", "°"), key  # the unit follows
    length = "shafts[0].segments[0].length"
    si_length = demo.document["shafts"][0]["segments"][0]["length"] * 25.4  # mm
    assert _entry(demo, length).value == f"{si_length / 25.4:.4g}"
    assert _unit_beside(demo, length) == "in"
    slider = demo.diameter_slider
    assert slider is not None and slider.description.endswith("[in]")
    assert slider.value == get_at(demo.document, demo.dimension.value)
    assert slider.min <= slider.value <= slider.max
    axes = [axis.label for axis in demo.charts.stress.figure.axes]
    assert any("psi" in label for label in axes) and any("[in]" in label for label in axes)
    demo.units.value = "si"
    assert set(widget_module._instances) == before
    back = _shown(demo)
    for key, (value, beside, _widget) in back.items():
        assert value == pytest.approx(si[key][0], rel=1e-3, abs=1e-12), key
        assert beside == si[key][1], key


def test_typed_entries_and_refusals_work_after_a_unit_switch(demo: Workbench) -> None:
    path = "shafts[0].segments[0].section.diameter"
    demo.units.value = "us"
    demo.enter(path, "2 1/4")  # a bare number in the unit beside the field: 2.25 in
    assert demo.document["shafts"][0]["segments"][0]["section"]["diameter"] == 2.25
    assert not demo.stale and _entry(demo, path).value == "2.25"
    assert demo.diameter_slider is not None and demo.diameter_slider.value == 2.25
    demo.enter(path, "7o")
    assert demo.stale and "7o" in html.unescape(message_beside(demo, path).value)
    demo.enter(path, "60 mm")  # 60 / 25.4 in (NIST SP 811, 2008, B.9)
    assert not demo.stale and message_beside(demo, path).value == ""
    diameter = demo.document["shafts"][0]["segments"][0]["section"]["diameter"]
    assert diameter == pytest.approx(60 / 25.4, rel=1e-9)
    demo.units.value = "si"
    assert demo.document["shafts"][0]["segments"][0]["section"]["diameter"] == pytest.approx(60)
    assert _entry(demo, path).value == "60"
