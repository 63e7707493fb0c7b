"""The drawing is the editor: pick parts on it or in the parts list, drag handles, add from the
palette, edit every field in the inspector; the charts share the drawing's x scale; no widget
is left behind by a rebuild.

Drags and clicks are sent as bqplot 0.13's front end sends them (its ``Scatter`` view):
``{"event": "drag_end", "point": {"x", "y"}, "index": i}`` in data coordinates, and
``{"event": "element_click", "data": {"index": i, ...}}``, through the mark's own message
handler. Stresses are checked against τ = 16·T/(π·d³) for a solid round and
τ = 16·T·D/(π·(D⁴ − d⁴)) for a tube (Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3,
eqs. 3-14 and 3-16).
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import ipywidgets.widgets.widget as widget_module
import numpy as np
import pytest

from tests.panel_cases import inspector_entry, open_demo, simple_case, widgets_in
from workbench.panel import Workbench
from workbench.panel.selection import KINDS, Part


def _send(mark: Any, event: str, index: int, **point: float) -> None:
    """A message as bqplot's front end sends it for a point of a Scatter."""
    if event == "element_click":
        content: dict[str, Any] = {"event": event, "data": {"index": index, "x": 0, "y": 0}}
    else:
        content = {"event": event, "point": point, "index": index}
        if event == "drag":
            content["origin"] = {"x": 10.0, "y": 10.0}  # pixels: not read
    mark._handle_custom_msgs(None, content)


def _two_segments() -> dict:
    case = simple_case()
    first = case["shafts"][0]["segments"][0]
    first["length"] = 400
    second = {
        "length": 600,
        "material": "steel",
        "section": {"shape": "tube", "outer_diameter": 50, "inner_diameter": 30},
    }
    case["shafts"][0]["segments"].append(second)
    return case


@pytest.fixture
def demo(tmp_path: Path) -> Workbench:
    return open_demo(tmp_path)


def _place(panel: Workbench, kind: str) -> int:
    return [p.kind for p in panel.drawing_editor.handles.place_parts].index(kind)


def test_a_click_picks_each_kind_of_part(demo: Workbench) -> None:
    editor = demo.drawing_editor
    handles = editor.handles
    demo.result.value = "pressing"  # its load case has a point and a distributed torque
    _send(handles.segment_marks, "element_click", 2)
    assert editor.selected == Part("segment", ("shafts", 0, "segments", 2))
    assert editor.parts_list.value == "shafts/0/segments/2"
    assert handles.highlight.visible
    np.testing.assert_array_equal(handles.highlight.x, demo.charts.segments.x[2])
    picked = {"segment"}
    for kind in KINDS[1:]:
        _send(handles.places, "element_click", _place(demo, kind))
        assert editor.selected is not None and editor.selected.kind == kind
        assert editor.parts_list.value == editor.selected.key
        assert handles.highlight.visible
        picked.add(kind)
    assert picked == set(KINDS)
    # The inspector shows the part last picked: a disc's position and inertia with units.
    text = " ".join(
        f"{x.description} {getattr(x, 'value', '')}"
        for row in editor.inspector.box.children
        for x in getattr(row, "children", ())
    )
    assert "inertia" in text and "kg·m²" in text and "x" in text


def test_inspector_edits_a_segment_and_the_stress_follows() -> None:
    panel = Workbench(simple_case(diameter=40.0, torque=500.0))
    editor = panel.drawing_editor
    assert editor.selected == Part("segment", ("shafts", 0, "segments", 0))
    path = "shafts[0].segments[0].section.diameter"
    (entry,) = [x for x in panel.form.fields[path] if x in widgets_in(editor.inspector.box)]
    entry.value = "2 in"  # 50.8 mm
    assert panel.document["shafts"][0]["segments"][0]["section"]["diameter"] == 50.8
    tau = 16 * 500.0 / (math.pi * 0.0508**3) / 1e6  # MPa
    assert float(np.max(panel.charts.stress.now.y)) == pytest.approx(tau, rel=1e-9)
    entry.value = "7o"  # refused beside the inspector's field, nothing solved
    assert panel.stale and "7o" in panel.status.value


def test_inspector_edits_a_layered_segment(demo: Workbench) -> None:
    demo.drawing_editor.pick(Part("segment", ("shafts", 0, "segments", 3)))
    base = "shafts[0].segments[3].layers"
    for field in (
        "[0].section.outer_diameter",
        "[0].section.inner_diameter",
        "[1].section.diameter",
    ):
        inspector_entry(demo, base + field)
    inspector_entry(demo, base + "[0].section.outer_diameter").value = "80"
    layer = demo.document["shafts"][0]["segments"][3]["layers"][0]
    assert layer["section"]["outer_diameter"] == 80 and not demo.stale


def test_inspector_edits_every_non_circular_shape() -> None:
    from workbench.case.declaration import SHAPES

    case = simple_case()
    # Open sections that warp need Young's modulus (their warping rigidity is E·Cw).
    case["materials"]["steel"]["elastic_modulus"] = 200000
    panel = Workbench(case)
    inspector = panel.drawing_editor.inspector
    for shape in SHAPES:
        inspector.set_shape(("shafts", 0, "segments", 0), shape)
        section = panel.document["shafts"][0]["segments"][0]["section"]
        if shape == "dxf":  # no drawing to start from: its path is asked for beside the field
            assert panel.stale and "path" in panel.status.value
            inspector_entry(panel, "shafts[0].segments[0].section.path")
            continue
        assert section["shape"] == shape and not panel.stale, (shape, panel.status.value)
        number_keys = [k for k, v in section.items() if isinstance(v, (int, float))]
        for key in number_keys:
            inspector_entry(panel, f"shafts[0].segments[0].section.{key}")
        if "walls" in section:
            inspector_entry(panel, "shafts[0].segments[0].section.walls[3].thickness")
        if "points" in section:
            inspector_entry(panel, "shafts[0].segments[0].section.points[3].thickness")
        if "outer" in section:
            inspector_entry(panel, "shafts[0].segments[0].section.outer[3].y")
    inspector.set_shape(("shafts", 0, "segments", 0), "thin_open")
    inspector_entry(panel, "shafts[0].segments[0].section.walls[0].thickness").value = "5"
    assert panel.document["shafts"][0]["segments"][0]["section"]["walls"][0]["thickness"] == 5
    assert not panel.stale
    inspector.set_shape(("shafts", 0, "segments", 0), "rectangle")
    inspector_entry(panel, "shafts[0].segments[0].section.height").value = "30 mm"
    assert panel.document["shafts"][0]["segments"][0]["section"]["height"] == 30
    assert not panel.stale


def test_drag_a_torque_along_its_shaft() -> None:
    panel = Workbench(simple_case(torque=500.0))
    handles = panel.drawing_editor.handles
    index = _place(panel, "torque")
    _send(handles.places, "drag_start", index, x=1000.0, y=0.0)
    assert panel.drawing_editor.selected == Part("torque", ("load_cases", 0, "torques", 0))
    _send(handles.places, "drag", index, x=600.0, y=0.0)
    _send(handles.places, "drag_end", index, x=400.0, y=0.0)
    assert panel.document["load_cases"][0]["torques"][0]["x"] == 400
    # Fixed at 0, torque at 400: the internal torque is 500 N·m before it, none beyond.
    x, torque = np.asarray(panel.charts.torque.now.x), np.asarray(panel.charts.torque.now.y)
    assert np.allclose(np.abs(torque[x < 399]), 500.0) and np.allclose(torque[x > 401], 0.0)
    assert float(handles.places.x[index]) == 400.0
    _send(handles.places, "drag_end", index, x=-80.0, y=0.0)  # kept on the shaft
    assert panel.document["load_cases"][0]["torques"][0]["x"] == 0
    _send(handles.places, "drag_end", index, x=5000.0, y=0.0)
    assert panel.document["load_cases"][0]["torques"][0]["x"] == 1000


def test_drag_a_shoulder_keeps_the_total_length() -> None:
    panel = Workbench(_two_segments())
    shoulders = panel.drawing_editor.handles.shoulders
    assert list(shoulders.x) == [400.0]
    _send(shoulders, "drag_end", 0, x=300.0, y=0.0)
    lengths = [s["length"] for s in panel.document["shafts"][0]["segments"]]
    assert lengths == [300, 700] and not panel.stale
    _send(shoulders, "drag_end", 0, x=-500.0, y=0.0)  # no length below 2 % of the pair
    lengths = [s["length"] for s in panel.document["shafts"][0]["segments"]]
    assert lengths == [20, 980] and sum(lengths) == 1000 and not panel.stale


def test_drag_a_sections_edge_changes_its_outer_diameter() -> None:
    panel = Workbench(_two_segments())
    edges = panel.drawing_editor.handles.edges
    _send(edges, "drag_end", 0, x=200.0, y=25.0)
    segments = panel.document["shafts"][0]["segments"]
    assert segments[0]["section"]["diameter"] == 50
    _send(edges, "drag_end", 1, x=700.0, y=-30.0)  # below the axis: the radius is its size
    assert segments[1]["section"] == {"shape": "tube", "outer_diameter": 60, "inner_diameter": 30}
    tau = 16 * 500.0 * 0.06 / (math.pi * (0.06**4 - 0.03**4)) / 1e6
    x, stress = np.asarray(panel.charts.stress.now.x), np.asarray(panel.charts.stress.now.y)
    assert float(np.max(np.abs(stress[x > 401]))) == pytest.approx(tau, rel=1e-9)
    _send(edges, "drag_end", 1, x=700.0, y=2.0)  # not through the bore
    assert segments[1]["section"]["outer_diameter"] == pytest.approx(31.5)
    assert not panel.stale


def test_palette_adds_each_part_at_the_station(demo: Workbench) -> None:
    editor = demo.drawing_editor
    palette = editor.palette
    for kind, key in (("support", "supports"), ("torque", "load_cases"), ("disc", "discs")):
        palette.station.value = "300 mm"
        part = palette.add(kind)
        assert part is not None and editor.selected == part and part.kind == kind
        item = demo.document
        for step in part.path:
            item = item[step]
        assert item["x"] == 300 and item["shaft"] == "auger", key
        assert not demo.stale, demo.status.value
    palette.station.value = "12 in"
    part = palette.add("gear")
    assert part is not None and part.kind == "gear"
    gear = demo.document["gears"][-1]
    assert gear["a"]["shaft"] == "auger" and gear["a"]["x"] == pytest.approx(304.8)
    assert not demo.stale, demo.status.value
    palette.station.value = "5 m"  # off the shaft: refused beside the station
    count = len(demo.document["supports"])
    assert palette.add("support") is None and "0 to 900 mm" in palette.message.value
    assert len(demo.document["supports"]) == count


def test_parts_list_picks_and_the_inspector_edits_without_a_mouse(demo: Workbench) -> None:
    editor = demo.drawing_editor
    labels = [label for label, _ in editor.parts_list.options]
    assert "load case 'jam' · torque 0" in labels and "gear mesh 0 · end a" in labels
    editor.parts_list.value = "load_cases/1/torques/0"  # what arrow keys in the list do
    assert editor.selected == Part("torque", ("load_cases", 1, "torques", 0))
    entry = inspector_entry(demo, "load_cases[1].torques[0].torque")
    assert entry.value == "1,400"
    entry.value = "1,250 N·m"
    assert demo.document["load_cases"][1]["torques"][0]["torque"] == 1250 and not demo.stale


def test_the_finder_picks_a_part_by_its_name_typed(demo: Workbench) -> None:
    editor = demo.drawing_editor
    assert "support 1" in editor.finder.options and editor.finder.ensure_option
    editor.finder.value = "support 1"  # typed, then Enter
    assert editor.selected == Part("support", ("supports", 1))
    assert editor.parts_list.value == "supports/1"
    inspector_entry(demo, "supports[1].x").value = "850"
    assert demo.document["supports"][1]["x"] == 850 and not demo.stale
    # The drawing names its handles by the parts' names (unique: the page matches points so).
    names = list(editor.handles.places.names)
    assert len(set(names)) == len(names) and "support 1" in names


def test_charts_along_the_shaft_share_the_drawings_x_scale(demo: Workbench) -> None:
    charts = demo.charts
    scale = charts.drawing.x_scale
    figures = [charts.torque.figure, charts.angle.figure, charts.stress.figure, charts.utilisation]
    for figure in figures:
        assert all(mark.scales["x"] is scale for mark in figure.marks)
        assert figure.axes[0].scale is scale
        assert figure.layout.width == charts.elevation.layout.width
        for side in ("left", "right"):
            assert figure.fig_margin[side] == charts.elevation.fig_margin[side]
    # Each segment's utilisation spans its own stretch of the shaft.
    np.testing.assert_array_equal(charts.bars.x[:, 0], [0, 250, 550, 750])
    np.testing.assert_array_equal(charts.bars.x[:, 1], [250, 550, 750, 900])


def test_rebuilds_close_the_widgets_they_replace(demo: Workbench) -> None:
    editor = demo.drawing_editor

    def churn() -> None:
        demo.form.structural(lambda: None)  # every editor rebuilt
        editor.pick(Part("segment", ("shafts", 0, "segments", 3)))
        editor.pick(Part("torque", ("load_cases", 1, "torques", 0)))
        demo.units.value = "us"
        demo.units.value = "si"

    churn()
    churn()
    before = len(widget_module._instances)  # w.Widget.widgets, without its warning
    for _ in range(4):
        churn()
    assert len(widget_module._instances) == before
