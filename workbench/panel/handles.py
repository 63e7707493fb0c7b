"""Handles on the drawing: click a part to pick it; drag a load, a shoulder or a section's edge.

Every handle is a point of a bqplot ``Scatter``. A click (``element_click``) picks the part under
it; a drag (``drag``, then ``drag_end``, with the point in data coordinates) edits the case
document through the :class:`~workbench.panel.form.Form`, as a typed value would: the value is
limited to what the case allows (inside the shaft, no length below a fiftieth of the pair it
splits, no section shrunk through its bore), written, and solved; the drawing then follows the
document. Handles are drawn from the document (panel units) at the heights the elevation drew its
markers at.

* Segment handles on the centre line pick a segment.
* Edge handles (on each segment's outline, at its middle) move along y only: the new outer
  radius. A circular section's outside follows (its bore stays); any other section, and the
  layers of a bonded segment, are scaled as a whole.
* Shoulder handles (between two segments) move along x only: the two lengths beside it change,
  their sum kept.
* Place handles (translucent discs round supports, gear ends, torques, distributed torques,
  discs) move along x only: the part's position (a distributed torque keeps its span). Each is
  named by its part's name: bqplot's front end matches points to their data by name, so names
  must differ.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

from workbench.panel.bound import Bound
from workbench.panel.document import Path, get_at
from workbench.panel.elevation import Elevation
from workbench.panel.form import Form, clean_number
from workbench.panel.keys import quantity_of
from workbench.panel.plotting import HANDLE, SELECTED, bq, set_list
from workbench.panel.selection import (
    Part,
    boundaries,
    cases_behind,
    part_label,
    parts_of,
    station,
)

#: The keys that set a circular section's outside, and the bore each must stay clear of.
OUTSIDE_KEYS = {
    "solid": (("diameter",), ""),
    "tube": (("outer_diameter",), "inner_diameter"),
    "tapered": (("diameter_start", "diameter_end"), "bore"),
}
#: Smallest share of the two segments beside a shoulder left to either of them.
_SHORTEST_SHARE = 0.02
#: An outside is kept this much larger than its bore, and a section at least this share of
#: its size before the drag.
_BORE_CLEARANCE, _SMALLEST_SCALE = 1.05, 0.05


def _handles(scales: dict[str, Any], marker: str, size: int, **move: bool) -> Any:
    return bq.Scatter(
        x=[],
        y=[],
        scales=scales,
        marker=marker,
        colors=[HANDLE],
        stroke=HANDLE,
        default_size=size,
        fill=False,
        display_names=False,
        enable_move=bool(move),
        **move,
    )


class Handles(Bound):
    """The handles drawn over the elevation, what they pick and the edits their drags make.

    Parameters
    ----------
    elevation
        The drawing the handles lie on (its figure gets their marks).
    form
        Writes the edits into the case document.
    shown_shaft
        The number of the shaft shown.
    pick
        Called with the part a handle picked.
    """

    def __init__(
        self,
        elevation: Elevation,
        form: Form,
        shown_shaft: Callable[[], int],
        pick: Callable[[Part], None],
    ) -> None:
        self.elevation, self.form, self.shown_shaft, self.pick = elevation, form, shown_shaft, pick
        scales = {"x": elevation.x_scale, "y": elevation.y_scale}
        self.highlight = bq.Lines(
            x=[], y=[], scales=scales, colors=[SELECTED], stroke_width=3.5, visible=False
        )
        self.segment_marks = _handles(scales, "circle", 50)
        self.segment_marks.display_names = True
        self.edges = _handles(scales, "square", 60, restrict_y=True)
        self.shoulders = _handles(scales, "rectangle", 90, restrict_x=True)
        self.places = _handles(scales, "circle", 320, restrict_x=True)
        # A translucent disc, not a ring: it can be grabbed anywhere round the marker it holds.
        self.places.fill, self.places.opacities = True, [0.3]
        for mark, tip in (
            (self.segment_marks, "segment (click to pick)"),
            (self.edges, "outer radius (drag up or down)"),
            (self.shoulders, "shoulder (drag along the shaft)"),
            (self.places, "drag along the shaft:"),
        ):
            mark.tooltip = bq.Tooltip(fields=["name"], labels=[tip], formats=[""])
            mark.on_element_click(self._clicked)
        for mark in (self.edges, self.shoulders, self.places):
            mark.on_drag_start(self._clicked)
            mark.on_drag(self._dragged)
            mark.on_drag_end(self._dragged)
        elevation.figure.marks = [
            *elevation.figure.marks,
            self.highlight,
            self.segment_marks,
            self.edges,
            self.shoulders,
            self.places,
        ]
        #: The parts the place handles stand for, in their order.
        self.place_parts: list[Part] = []
        self._bounds = np.zeros(1)
        self.selected: Part | None = None
        #: The mark whose point is being dragged (between its first ``drag`` and ``drag_end``).
        self.dragging: Any = None

    # --- drawing --------------------------------------------------------------------------

    def draw(self, result: Any) -> None:
        """Draw the handles of the shaft shown from the document (after the elevation's draw)."""
        document, shaft = self.document, self.shown_shaft()
        bounds = boundaries(document, shaft)
        self._bounds = bounds
        middles = 0.5 * (bounds[:-1] + bounds[1:])
        radius = self.elevation.mid_radius
        if len(radius) != len(middles):  # the last solve is of another shape: no edge handles
            radius = np.zeros(0)
        self.segment_marks.x, self.segment_marks.y = middles, np.zeros(len(middles))
        set_list(self.segment_marks, "names", [str(k) for k in range(len(middles))])
        self._put(self.edges, middles[: len(radius)], radius)
        self._put(self.shoulders, bounds[1:-1], np.zeros(max(len(bounds) - 2, 0)))
        cases = set(cases_behind(document, result))
        heights = {
            "support": self.elevation.marker_y,
            "torque": self.elevation.load_y,
            "distributed": self.elevation.load_y,
            "disc": 0.5 * self.elevation.marker_y,
        }
        places, x, y = [], [], []
        for part in parts_of(document, shaft):
            if part.kind == "segment":
                continue
            if part.kind in ("torque", "distributed") and part.path[1] not in cases:
                continue  # loads of other results are not drawn
            places.append(part)
            x.append(station(part, document))
            if part.kind == "gear":
                y.append(float(get_at(document, (*part.path, part.end, "radius")) or 0.0))
            else:
                y.append(heights[part.kind])
        self.place_parts = places
        self._put(self.places, np.array(x, dtype=float), np.array(y, dtype=float))
        # Unique names: bqplot's front end matches points to their data by name.
        set_list(self.places, "names", [part_label(part, document) for part in places])
        self.show_selected()

    def _put(self, mark: Any, x: np.ndarray, y: np.ndarray) -> None:
        """Set a handle mark's points, unless one of them is being dragged.

        The page moves a dragged point itself; sent again on each move, the mark would be drawn
        anew under the pointer. It takes its points when the drag ends (the page sends the
        dropped point first, then the drawing follows the document).
        """
        if mark is not self.dragging:
            mark.x, mark.y = x, y

    def show_selected(self) -> None:
        """Outline the part picked: a segment's outline, a span, or a line at a station."""
        part, mark = self.selected, self.highlight
        outline = self.elevation.segments
        if part is None or (part.kind == "segment" and part.path[1] != self.shown_shaft()):
            mark.visible = False
            return
        if part.kind == "segment":
            k = int(part.path[3])
            if np.ndim(outline.x) != 2 or k >= len(outline.y):
                mark.visible = False
                return
            mark.x, mark.y = np.asarray(outline.x[k]), np.asarray(outline.y[k])
        elif part.kind == "distributed":
            item = get_at(self.document, part.path) or {}
            start, end = float(item.get("start", 0.0)), float(item.get("end", 0.0))
            top = self.elevation.load_y
            mark.x, mark.y = np.array([start, start, end, end]), np.array([0.0, top, top, 0.0])
        else:
            at = station(part, self.document)
            low, high = self.elevation.y_scale.min, self.elevation.y_scale.max
            mark.x, mark.y = np.array([at, at]), 0.9 * np.array([low or 0.0, high or 0.0])
        mark.visible = True

    # --- events ---------------------------------------------------------------------------

    def part_at(self, mark: Any, index: int) -> Part | None:
        """The part a handle stands for."""
        shaft = self.shown_shaft()
        count = len(self._bounds) - 1
        if mark in (self.segment_marks, self.edges) and 0 <= index < count:
            return Part("segment", ("shafts", shaft, "segments", index))
        if mark is self.shoulders and 0 <= index < count - 1:
            return Part("segment", ("shafts", shaft, "segments", index + 1))
        if mark is self.places and 0 <= index < len(self.place_parts):
            return self.place_parts[index]
        return None

    def _clicked(self, mark: Any, event: dict[str, Any]) -> None:
        self.dragging = None  # a click, or a drag starting: no point is held yet
        index = point_index(event)
        part = self.part_at(mark, index) if index is not None else None
        if part is not None:
            self.pick(part)

    def _dragged(self, mark: Any, event: dict[str, Any]) -> None:
        moving = event.get("event") == "drag"
        self.dragging = mark if moving else None
        state = self.form.state
        # While a point is dragged, each move redraws the charts and reactions; the natural
        # frequencies (an eigensolve) and so the verdict wait until it is let go.
        state.checks_held = moving
        try:
            self._move(mark, event)
        finally:
            if not moving:
                state.release_checks()

    def _move(self, mark: Any, event: dict[str, Any]) -> None:
        index, point = point_index(event), event.get("point") or {}
        if index is None:
            return
        if mark is self.edges and isinstance(point.get("y"), (int, float)):
            self.move_edge(index, float(point["y"]))
        elif isinstance(point.get("x"), (int, float)):
            if mark is self.shoulders:
                self.move_shoulder(index + 1, float(point["x"]))
            elif mark is self.places and 0 <= index < len(self.place_parts):
                self.move_place(self.place_parts[index], float(point["x"]))

    # --- edits ----------------------------------------------------------------------------

    def move_place(self, part: Part, x: float) -> None:
        """Put a part at ``x`` along its shaft (inside the shaft; a span keeps its length)."""
        length = float(self._bounds[-1])
        x = min(max(x, 0.0), length)
        if part.kind == "distributed":
            item = get_at(self.document, part.path) or {}
            start, end = float(item.get("start", 0.0)), float(item.get("end", 0.0))
            shift = min(max(x - 0.5 * (start + end), -start), length - end)
            values = {
                (*part.path, "start"): clean_number(start + shift),
                (*part.path, "end"): clean_number(end + shift),
            }
        else:
            where = (*part.path, part.end, "x") if part.end else (*part.path, "x")
            values = {where: clean_number(x)}
        self.form.write_many(values)

    def move_shoulder(self, k: int, x: float) -> None:
        """Move the shoulder at the start of segment ``k``: the two lengths beside it change."""
        bounds = self._bounds
        if not 1 <= k < len(bounds) - 1:
            return
        start, end = float(bounds[k - 1]), float(bounds[k + 1])
        gap = _SHORTEST_SHARE * (end - start)
        x = min(max(x, start + gap), end - gap)
        base = ("shafts", self.shown_shaft(), "segments")
        self.form.write_many(
            {
                (*base, k - 1, "length"): clean_number(x - start),
                (*base, k, "length"): clean_number(end - x),
            }
        )

    def move_edge(self, k: int, y: float) -> None:
        """Give segment ``k`` the outer radius ``|y|`` at its middle (sizes scaled to match)."""
        radius = self.elevation.mid_radius
        if not 0 <= k < len(radius) or radius[k] <= 0:
            return
        scale = max(abs(y) / float(radius[k]), _SMALLEST_SCALE)
        base: Path = ("shafts", self.shown_shaft(), "segments", k)
        segment = get_at(self.document, base) or {}
        section = segment.get("section")
        values: dict[Path, Any] = {}
        if isinstance(section, dict) and section.get("shape") in OUTSIDE_KEYS:
            outside, bore = OUTSIDE_KEYS[section["shape"]]
            sizes = [float(section[key]) for key in outside if key in section]
            inner = float(section.get(bore) or 0.0) if bore else 0.0
            if sizes and inner:
                scale = max(scale, _BORE_CLEARANCE * inner / min(sizes))
            for key in outside:
                if key in section:
                    values[(*base, "section", key)] = clean_number(float(section[key]) * scale)
        else:
            for number, layer in enumerate(segment.get("layers") or []):
                _scaled(layer.get("section"), (*base, "layers", number, "section"), scale, values)
            _scaled(section, (*base, "section"), scale, values)
        self.form.write_many(values)


def point_index(event: dict[str, Any]) -> int | None:
    """The number of the point a bqplot message is about, or ``None``.

    bqplot 0.13's front end names a dragged point by ``index``; a click sends the point's data,
    which holds its ``index``.
    """
    data = event.get("data")
    for found in (event.get("index"), data.get("index") if isinstance(data, dict) else None):
        if isinstance(found, int) and not isinstance(found, bool):
            return found
    return None


def _scaled(section: Any, path: Path, scale: float, values: dict[Path, Any]) -> None:
    """Every size of a section scaled by ``scale`` (lengths; areas by its square), into values."""
    if not isinstance(section, dict):
        return
    for key, value in section.items():
        if isinstance(value, list):
            for number, item in enumerate(value):
                _scaled(item, (*path, key, number), scale, values)
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            power = {"length": 1, "area": 2}.get(quantity_of((*path, key)) or "", 0)
            if power:
                values[(*path, key)] = clean_number(float(value) * scale**power)
