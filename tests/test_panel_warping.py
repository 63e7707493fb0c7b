"""The panel and restrained warping: point tables, the cross-section view, the warping charts,
the unrestrained-warping warning, coexisting stresses (plain pytest widget tests).

Cases are the open-shapes fixture (invented data) and small variants of it.
"""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

import ipywidgets as w
import numpy as np
import pytest

from tests.panel_cases import field, inspector_entry, simple_case, widgets_in
from workbench.panel import Workbench
from workbench.panel.selection import Part
from workbench.panel.warping_section import bimoment_unit
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.open_shapes import i_section

FIXTURE = Path(__file__).parent / "fixtures" / "open_shapes.json"


def open_case() -> dict[str, Any]:
    return json.loads(FIXTURE.read_text(encoding="utf-8"))


def inspector_button(panel: Workbench, text: str) -> w.Button:
    inside = widgets_in(panel.drawing_editor.inspector.box)
    buttons = [x for x in inside if isinstance(x, w.Button) and x.description == text]
    return buttons[0]


def pick_segment(panel: Workbench, shaft: int, segment: int) -> None:
    panel.drawing_editor.pick(Part("segment", ("shafts", shaft, "segments", segment)))


# --- the cross-section view ---------------------------------------------------------------


def test_section_view_draws_an_i_beams_walls_and_shear_centre() -> None:
    panel = Workbench(open_case())
    pick_segment(panel, 0, 0)
    view = panel.warping.section
    assert panel.warping.opened and view is not None  # a case that warps opens it
    # The fixture's singly symmetric I: 300 deep, top 150 × 10.7, bottom 200 × 12, web 7.1 (mm).
    expected = i_section(0.300, 0.150, 0.200, 0.0107, 0.012, 0.0071)
    marks = dict(
        zip(view.marks.names.tolist(), zip(view.marks.x, view.marks.y, strict=True), strict=True)
    )
    np.testing.assert_allclose(marks["shear centre"], expected.shear_centre * 1e3, atol=1e-9)
    np.testing.assert_allclose(marks["centroid"], expected.centroid * 1e3, atol=1e-9)
    # Shear centre of a singly symmetric I on its web, from the top flange's mid-line:
    # e = h0·b_b³·t_b / (b_t³·t_t + b_b³·t_b) (Seaburg & Carter, AISC Design Guide 9, 1997,
    # App. C, singly symmetric I; from memory), h0 between the flanges' mid-lines.
    h0 = 300 - (10.7 + 12) / 2
    e = h0 * 200**3 * 12 / (150**3 * 10.7 + 200**3 * 12)
    top = expected.points[expected.walls].reshape(-1, 2)[:, 1].max() * 1e3
    assert marks["shear centre"][0] == pytest.approx(0.0, abs=1e-9)
    assert marks["shear centre"][1] == pytest.approx(top - e, rel=1e-9)
    # Each wall drawn as its mid-line widened by its thickness either side.
    x, y = np.asarray(view.solid.x), np.asarray(view.solid.y)
    assert x.shape == (len(expected.walls), 5)
    start = np.column_stack([x[:, 0] + x[:, 3], y[:, 0] + y[:, 3]]) / 2
    width = np.hypot(x[:, 0] - x[:, 3], y[:, 0] - y[:, 3])
    np.testing.assert_allclose(start, expected.points[expected.walls[:, 0]] * 1e3, atol=1e-9)
    np.testing.assert_allclose(width, expected.thicknesses * 1e3, rtol=1e-12)
    # Equal aspect: both scales span the same length.
    assert view.x_scale.max - view.x_scale.min == pytest.approx(view.y_scale.max - view.y_scale.min)
    assert "shear centre" in view.legend.widget.value and "σ_w peaks" in view.legend.widget.value
    # Live: a wider bottom flange moves the shear centre down towards it.
    inspector_entry(panel, "shafts[0].segments[0].section.bottom_width").value = "250"
    assert not panel.stale
    moved = i_section(0.300, 0.150, 0.250, 0.0107, 0.012, 0.0071).shear_centre * 1e3
    names = view.marks.names.tolist()
    at = names.index("shear centre")
    assert float(view.marks.y[at]) == pytest.approx(moved[1], rel=1e-9)
    assert moved[1] < marks["shear centre"][1]


def test_section_view_draws_round_sections_and_follows_the_pick() -> None:
    case = simple_case(diameter=40.0)
    case["shafts"][0]["segments"].append(
        {
            "length": 500,
            "material": "steel",
            "section": {"shape": "tube", "outer_diameter": 60, "inner_diameter": 45},
        }
    )
    case["load_cases"][0]["torques"][0]["x"] = 1500
    panel = Workbench(case)
    assert panel.warping.section is None  # a case that does not warp builds no view at first
    assert panel.warping.charts is None
    field(panel, "shafts[0].segments[0].length").value = "0"
    assert panel.stale
    panel.warping.section_box.selected_index = 0  # opened while not solved: the last, dimmed
    assert "wb-stale" in panel.stale_marks.outputs["cross-section"]._dom_classes
    field(panel, "shafts[0].segments[0].length").value = "1000"
    assert not panel.stale
    view = panel.warping.section
    assert view is not None
    pick_segment(panel, 0, 0)
    radius = np.hypot(np.asarray(view.solid.x), np.asarray(view.solid.y))
    np.testing.assert_allclose(radius, 20.0, rtol=1e-12)
    assert not view.voids.visible
    pick_segment(panel, 0, 1)
    np.testing.assert_allclose(np.hypot(view.solid.x, view.solid.y), 30.0, rtol=1e-12)
    np.testing.assert_allclose(np.hypot(view.voids.x, view.voids.y), 22.5, rtol=1e-12)
    field(panel, "shafts[0].segments[1].section.inner_diameter").value = "50"
    np.testing.assert_allclose(np.hypot(view.voids.x, view.voids.y), 25.0, rtol=1e-12)
    panel.drawing_editor.pick(Part("support", ("supports", 0)))
    assert view.figure.layout.display == "none" and "Pick a segment" in view.note.value


# --- the warping charts -----------------------------------------------------------------


def test_warping_charts_only_for_a_warping_case_and_stale_on_a_bad_value() -> None:
    plain = Workbench(simple_case())
    assert plain.warping.charts is None and plain.warping.charts_holder.layout.display == "none"

    case = open_case()
    # A doubly symmetric I for the closed form of its largest unit warping below.
    del case["shafts"][0]["segments"][0]["section"]["bottom_width"]
    del case["shafts"][0]["segments"][0]["section"]["bottom_thickness"]
    panel = Workbench(case)
    charts = panel.warping.charts
    assert charts is not None and panel.warping.charts_holder.layout.display is None
    results = solve(parse_case(copy.deepcopy(panel.document)))
    warping = results.warping
    assert warping is not None
    row, window = results.index(panel.result.value), results._window(0)
    # Bimoment in N·m² (the case's torque unit N·m times its metre), the torque's parts in N·m.
    np.testing.assert_allclose(charts.bimoment.lines.y, warping.bimoment[row, window], rtol=1e-12)
    assert charts.bimoment.figure.axes[1].label == "B [N·m²]"
    parts = np.asarray(charts.torque_parts.lines.y)
    np.testing.assert_allclose(parts[1], warping.saint_venant_torque[row, window], rtol=1e-12)
    np.testing.assert_allclose(parts[2], warping.warping_torque[row, window], rtol=1e-12)
    # Internal torque = Saint-Venant + warping parts (Vlasov's equilibrium, T = G·J·θ′ − E·Cw·θ‴).
    np.testing.assert_allclose(parts[0], parts[1] + parts[2], atol=1e-6 * np.abs(parts[0]).max())
    assert charts.bimoment.figure.axes[0].scale is panel.charts.x_scale  # the drawing's x
    # σ_w at the restrained end x = 0: E·Wn_max·θ″ with Wn_max = h0·b/4 for a doubly symmetric
    # I (Seaburg & Carter, AISC Design Guide 9, 1997, App. C; from memory), in MPa.
    h0, b = 0.300 - 0.0107, 0.150
    expected = 207e9 * h0 * b / 4 * abs(warping.second[row, window][0]) / 1e6
    stress = np.asarray(charts.normal_stress.lines.y)
    assert abs(stress[0]) == pytest.approx(expected, rel=1e-9)
    assert charts.normal_stress.figure.axes[1].label == "σ_w [MPa]"
    # A bad value: the warping charts go stale with every derived view, and say why.
    field(panel, "shafts[0].segments[0].length").value = "-5"
    assert panel.stale
    for name in ("bimoment", "torque parts", "warping normal stress", "cross-section"):
        assert "wb-stale" in panel.stale_marks.outputs[name]._dom_classes, name
    assert "length" in panel.stale_marks.notes["The warping charts are those"].value
    field(panel, "shafts[0].segments[0].length").value = "1500"
    assert not panel.stale
    assert "wb-stale" not in panel.stale_marks.outputs["bimoment"]._dom_classes
    # US customary: lbf·in² (1 lbf = 4.4482216152605 N, 1 in = 0.0254 m; NIST SP 811, App. B).
    panel.units.value = next(v for _, v in panel.units.options if v != panel.units.value)
    assert charts.bimoment.figure.axes[1].label == "B [lbf·in²]"
    per_unit = 4.4482216152605 * 0.0254**2
    shown = warping.bimoment[row, window] / per_unit
    np.testing.assert_allclose(
        charts.bimoment.lines.y, shown, rtol=1e-9, atol=1e-9 * abs(shown).max()
    )


def test_bimoment_unit_is_torque_times_its_length() -> None:
    from workbench.case.units import SI_ENGINEERING, us_customary

    assert bimoment_unit(SI_ENGINEERING) == ("N·m²", pytest.approx(1.0))
    symbol, factor = bimoment_unit(us_customary())
    # 1 lbf = 4.4482216152605 N, 1 in = 0.0254 m (NIST SP 811, 2008, App. B).
    assert symbol in {"in²·lbf", "lbf·in²"}
    assert factor == pytest.approx(4.4482216152605 * 0.0254**2, rel=1e-12)


# --- the warning --------------------------------------------------------------------------


def test_unstated_restraint_warning_beside_the_support_and_in_the_summary() -> None:
    case = open_case()
    del case["supports"][0]["warping"]  # a fixed support at the I, stating nothing
    panel = Workbench(case)
    assert "warping restraint is not modelled there and may govern" in panel.summary.value
    rows = [x.value for x in panel.form.messages["supports[0]"]]
    assert rows and all("may govern" in value for value in rows)
    assert not any(x.value for x in panel.form.messages.get("supports[1]", []))
    panel.drawing_editor.pick(Part("support", ("supports", 0)))
    beside = [x.value for x in panel.form.messages["supports[0].warping"]]
    assert beside and all("may govern" in value for value in beside)
    # The choice says the key is left out: it shows no value the solver does not take.
    inspector = widgets_in(panel.drawing_editor.inspector.box)
    (choice,) = [
        x
        for x in panel.form.fields["supports[0].warping"]
        if x in inspector and isinstance(x, w.Dropdown)
    ]
    assert choice.value == "" and choice.label == "not stated (free)"
    # Stated: the warning goes, beside the support and in the summary.
    choice.value = "restrained"
    assert panel.document["supports"][0]["warping"] == "restrained"
    assert "may govern" not in panel.summary.value
    assert not any(x.value for x in panel.form.messages["supports[0].warping"])


# --- editing points, holes, coexisting stresses -------------------------------------------


def test_editing_a_polyline_point_re_solves() -> None:
    panel = Workbench(open_case())
    pick_segment(panel, 0, 3)
    before = np.asarray(panel.warping.charts.bimoment.lines.y).copy()
    inspector_entry(panel, "shafts[0].segments[3].section.points[2].y").value = "200"
    inspector_entry(panel, "shafts[0].segments[3].section.points[3].y").value = "200"
    points = panel.document["shafts"][0]["segments"][3]["section"]["points"]
    assert points[2]["y"] == 200 and points[3]["y"] == 200 and not panel.stale
    assert not np.allclose(panel.warping.charts.bimoment.lines.y, before)
    view = panel.warping.section
    assert float(np.max(view.solid.y)) == pytest.approx(200 + 6 / 2)  # wall to y = 200, t = 6
    # A point added goes on along the last wall; a point removed again.
    inspector_button(panel, "add point").click()
    assert len(points) == 6 and (points[5]["x"], points[5]["y"]) == (60, 80)
    assert not panel.stale
    inspector_button(panel, "✕").click()  # the first point's removal
    assert len(panel.document["shafts"][0]["segments"][3]["section"]["points"]) == 5


def test_polygon_outer_and_holes_edited_as_point_tables() -> None:
    case = simple_case()
    case["materials"]["steel"]["elastic_modulus"] = 200000
    panel = Workbench(case)
    panel.drawing_editor.inspector.set_shape(("shafts", 0, "segments", 0), "polygon")
    section = panel.document["shafts"][0]["segments"][0]["section"]
    assert len(section["outer"]) == 4 and not panel.stale
    inspector_button(panel, "add hole").click()
    section = panel.document["shafts"][0]["segments"][0]["section"]
    assert len(section["holes"]) == 1 and len(section["holes"][0]) == 4
    assert not panel.stale, panel.status.value
    inspector_entry(panel, "shafts[0].segments[0].section.holes[0][0].x").value = "16"
    assert section["holes"][0][0]["x"] == 16 and not panel.stale
    panel.warping.section_box.selected_index = 0
    view = panel.warping.section
    assert view is not None and view.voids.visible
    assert float(np.min(view.voids.x)) == pytest.approx(15.0)  # the hole's other corner
    # A hole across the outer boundary is refused beside the hole's table.
    inspector_entry(panel, "shafts[0].segments[0].section.holes[0][1].x").value = "400"
    assert panel.stale and "hole" in panel.status.value.lower()


def test_coexisting_stresses_edited_in_the_design_tab() -> None:
    panel = Workbench(open_case())
    editor = panel.design_editor
    editor.add_coexisting()
    entries = panel.document["design"]["coexisting_stresses"]
    assert entries == [{"shaft": "girder", "segment": 0, "normal_stress": 0, "shear_stress": 0}]
    field(panel, "design.coexisting_stresses[0].normal_stress").value = "40 MPa"
    assert entries[0]["normal_stress"] == 40 and not panel.stale
    field(panel, "design.coexisting_stresses[0].segment").value = "9"
    assert panel.stale and "segment" in panel.status.value
    field(panel, "design.coexisting_stresses[0].segment").value = "1"
    assert not panel.stale
    editor.remove_coexisting(0)
    assert "coexisting_stresses" not in panel.document["design"]


def test_every_open_shape_drawn() -> None:
    panel = Workbench(open_case())
    for shaft, count in ((0, 4), (1, 2)):
        panel.shaft.value = shaft
        for segment in range(count):
            pick_segment(panel, shaft, segment)
            view = panel.warping.section
            assert view.figure.layout.display is None
            section = parse_case(copy.deepcopy(panel.document)).shafts[shaft].segments[segment]
            props = section.layers[0].section.properties
            names = view.marks.names.tolist()
            at = names.index("shear centre")
            assert (view.marks.x[at], view.marks.y[at]) == pytest.approx(
                tuple(props.shear_centre * 1e3), abs=1e-9
            )
            assert math.isfinite(float(np.max(view.solid.x)))
