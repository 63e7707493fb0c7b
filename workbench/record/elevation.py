"""The to-scale elevation of a model's shafts: its layout, computed as coordinates.

:func:`elevation_svg` lays out every shaft (outline, bores, layer interfaces, supports, gears,
loads and their labels, the chains of segment lengths, a scale bar) as numbers and short texts;
``templates/workbench_record/svg/elevation.svg.j2`` writes the elements, escaping every text.
Colours are named by role (``load``, ``gear``, ``support``, ``ink``); the template's palette
gives them.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from workbench.case.display import unit_symbol
from workbench.record.drawing import FONT_FAMILY, nice, nice_step, points, text_width
from workbench.record.templating import render
from workbench.solver.model import Model, Segment, Shaft

__all__ = ["elevation_svg"]


@dataclass(frozen=True)
class Line:
    """A straight line from (x1, y1) to (x2, y2) (px)."""

    x1: float
    y1: float
    x2: float
    y2: float


@dataclass(frozen=True)
class Text:
    """A text anchored at (x, y) (px); ``anchor`` is SVG's text-anchor."""

    x: float
    y: float
    text: str
    anchor: str = "middle"
    role: str = "ink"


@dataclass
class _Label:
    """A text in a lane above or below a shaft, with the mark that points at the shaft."""

    left: float
    right: float
    text: str
    anchor_x: float  # where the text is anchored (see ``anchor``)
    anchor: str  # SVG text-anchor: start, middle or end
    role: str  # colour role: load, gear, support or ink
    kind: str  # torque+, torque-, distributed, gear, support, section
    x: float  # the position the label belongs to (px)
    x_end: float = 0.0  # the end of a distributed load (px)
    reach: float = 0.0  # radius (m) its leader runs to at x
    reach_end: float = 0.0  # the same at x_end
    min_lane: int = 0  # lowest lane clear of a gear that stands out of the shaft
    lane: int = 0


@dataclass(frozen=True)
class Mark:
    """A label above a shaft with what points at the shaft.

    A distributed load has a ``band`` (x, y, width) and two dashed ``leaders``; a point torque
    or a gear has one solid leader, and a torque its moment vector: a ``shaft`` line and two
    arrowheads (``heads``, path data).
    """

    kind: str
    role: str
    label: Text
    leaders: tuple[Line, ...]
    band: tuple[float, float, float] | None = None
    shaft: Line | None = None
    heads: tuple[str, ...] = ()


@dataclass(frozen=True)
class Support:
    """A fixed (filled triangle) or spring (zigzag) support: its path data and ground hatch."""

    kind: str
    path: str
    ground: tuple[Line, ...]


@dataclass(frozen=True)
class Chain:
    """A dimension line through stations, with a tick at each and a length over each span."""

    line: Line
    ticks: tuple[Line, ...]
    texts: tuple[Text, ...]


@dataclass(frozen=True)
class SegmentOutline:
    """A segment's outline (polygon points), its layer interfaces and bore (polyline points)."""

    outline: str
    interfaces: tuple[str, ...]
    bores: tuple[str, ...]


@dataclass
class ShaftDrawing:
    """Everything drawn for one shaft, in drawing order."""

    id: str
    title_y: float
    title_size: float
    segments: list[SegmentOutline] = field(default_factory=list)
    centre_line: Line | None = None
    inside: list[Text] = field(default_factory=list)
    gears: list[tuple[float, float, float]] = field(default_factory=list)  # x, y, height
    above: list[Mark] = field(default_factory=list)
    supports: list[Support] = field(default_factory=list)
    below: list[Text] = field(default_factory=list)
    chains: list[Chain] = field(default_factory=list)


def _place(labels: list[_Label], gap: float = 8.0) -> int:
    """Give each label the lowest free lane at or above its ``min_lane``; return the lanes used.

    Labels are taken from left to right and a lane is free when its last label ends ``gap``
    before this one starts (first-fit colouring of intervals).
    """
    ends: list[float] = []
    for label in sorted(labels, key=lambda item: (item.left, item.right, item.text)):
        while len(ends) < label.min_lane:
            ends.append(-math.inf)
        for lane in range(label.min_lane, len(ends)):
            if label.left >= ends[lane] + gap:
                label.lane = lane
                ends[lane] = label.right
                break
        else:
            label.lane = len(ends)
            ends.append(label.right)
    return len(ends)


def _beside(
    x: float, text: str, size: float, width: float, role: str, kind: str, clear: float = 4.0
) -> _Label:
    """A label starting ``clear`` px right of ``x``, or ending left of it near the right edge.

    A text too long for either side is cut short with an ellipsis (the tables hold it whole).
    """
    room = max(width - 4.0 - (x + clear), x - clear - 2.0)
    if text_width(text, size) > room:
        text = text[: max(int(room / (0.6 * size)) - 1, 1)] + "…"
    wide = text_width(text, size)
    if x + clear + wide <= width - 4.0:
        return _Label(x - 12.0, x + clear + wide, text, x + clear, "start", role, kind, x)
    return _Label(x - clear - wide, x + 12.0, text, x - clear, "end", role, kind, x)


def _centred(x: float, text: str, size: float, width: float, role: str, kind: str) -> _Label:
    """A label centred on ``x`` when it fits inside the drawing, else beside it."""
    half = text_width(text, size) / 2.0
    if x - half >= 2.0 and x + half <= width - 2.0:
        return _Label(x - half, x + half, text, x, "middle", role, kind, x)
    return _beside(x, text, size, width, role, kind)


def _radius_at(shaft: Shaft, x: float) -> float:
    """Outer radius (m) at ``x`` (m); at a joint, the larger of the two segments'."""
    bounds = shaft.boundaries
    radii = []
    for index, segment in enumerate(shaft.segments):
        start, end = float(bounds[index]), float(bounds[index + 1])
        if start - 1e-12 <= x <= end + 1e-12:
            fraction = min(max((x - start) / (end - start), 0.0), 1.0)
            radii.append(float(segment.outer_radius_at(np.array([fraction]))[0]))
    return max(radii) if radii else 0.0


def _tallest(shaft: Shaft) -> float:
    """Largest outer radius (m) along a shaft."""
    return max(
        float(np.max(segment.outer_radius_at(np.linspace(0.0, 1.0, 3))))
        for segment in shaft.segments
    )


def _section_label(segment: Segment, to_unit: float) -> str:
    """Short section text for the drawing, outer layer first: Ø60, Ø70/40, Ø70→50, Ø75/50 + Ø50."""

    def diameter(value: float) -> str:
        return nice(value * to_unit)

    parts = []
    layers = sorted(segment.layers, key=lambda layer: -layer.section.outer_radius)
    for layer in layers:
        section: Any = layer.section
        if section.shape == "solid":
            parts.append(f"Ø{diameter(section.diameter)}")
        elif section.shape == "tube":
            parts.append(f"Ø{diameter(section.outer_diameter)}/{diameter(section.inner_diameter)}")
        elif section.shape == "tapered":
            text = f"Ø{diameter(section.diameter_start)}→{diameter(section.diameter_end)}"
            parts.append(text + (f"/{diameter(section.bore)}" if section.bore else ""))
        else:  # non-circular: its name and overall size
            size = "×".join(
                diameter(getattr(section, side))
                for side in ("width", "height")
                if getattr(section, side, None)
            )
            wall = getattr(section, "thickness", None)
            text = " ".join(part for part in (section.shape.replace("_", " "), size) if part)
            parts.append(text + (f", t {diameter(wall)}" if isinstance(wall, float) else ""))
    return " + ".join(parts)


def _arrowhead(tip_x: float, y: float, direction: float) -> str:
    """Path data of a filled arrowhead pointing along ``direction`` (±1) with its tip at x."""
    back = tip_x - direction * 6.0
    return f"M{tip_x:.1f},{y:.1f} L{back:.1f},{y - 3.2:.1f} L{back:.1f},{y + 3.2:.1f} Z"


def _ground(x: float, y: float) -> tuple[Line, ...]:
    """A ground line centred on ``x`` at height ``y``, then its five hatch strokes."""
    return (
        Line(x - 11, y, x + 11, y),
        *(Line(x - 9 + 4.5 * k, y, x - 13 + 4.5 * k, y + 4.5) for k in range(5)),
    )


def _support(kind: str, x: float, top: float) -> Support:
    """A fixed (filled triangle) or spring (zigzag) support hanging from ``top``."""
    if kind == "fixed":
        path = f"M{x:.1f},{top:.1f} L{x - 7:.1f},{top + 12:.1f} L{x + 7:.1f},{top + 12:.1f} Z"
        return Support(kind, path, _ground(x, top + 12.0))
    zig = [f"M{x:.1f},{top:.1f}", f"L{x:.1f},{top + 2:.1f}"]
    zig += [f"L{x + (5 if k % 2 == 0 else -5):.1f},{top + 3.5 + 2.5 * k:.1f}" for k in range(4)]
    zig += [f"L{x:.1f},{top + 13:.1f}", f"L{x:.1f},{top + 14:.1f}"]
    return Support(kind, " ".join(zig), _ground(x, top + 14.0))


def _dimension_chain(
    stations: Sequence[float], texts: Sequence[str], y: float, font_size: float
) -> Chain:
    """A dimension line through ``stations`` (px) with ticks and a length over each span."""
    placed = []
    below = False
    for left, right, text in zip(stations[:-1], stations[1:], texts, strict=True):
        fits = text_width(text, font_size) + 4.0 <= right - left
        # A span too short for its number writes it under the line, alternating with the next.
        below = not fits and not below
        text_y = y + font_size + 1.0 if below else y - 3.0
        placed.append(Text((left + right) / 2, text_y, text))
    return Chain(
        Line(stations[0], y, stations[-1], y),
        tuple(Line(x - 3, y + 3, x + 3, y - 3) for x in stations),
        tuple(placed),
    )


class _Elevation:
    """Lays out the shafts of a model, one band under the other, on one scale."""

    def __init__(self, model: Model, width: int, font_size: float) -> None:
        self.model = model
        self.units = model.units
        self.to_unit = float(self.units.from_si(1.0, "length"))
        self.width = width
        self.font = font_size
        self.lane_height = font_size + 6.0
        self.margin = 44.0
        self.longest = max(shaft.length for shaft in model.shafts)
        tallest = max(_tallest(shaft) for shaft in model.shafts)
        tallest = max([tallest, *(end.radius for gear in model.gears for end in (gear.a, gear.b))])
        # One scale for x and y; a stubby shaft is kept to a readable height, still to scale.
        self.scale = min((width - 2.0 * self.margin) / self.longest, 180.0 / (2.0 * tallest))

    def px(self, x: float) -> float:
        return self.margin + x * self.scale

    def _gears_on(self, shaft: Shaft) -> list[tuple[int, Any, Any]]:
        return [
            (number, end, other)
            for number, gear in enumerate(self.model.gears)
            for end, other in ((gear.a, gear.b), (gear.b, gear.a))
            if end.shaft == shaft.id
        ]

    def _above(self, shaft: Shaft) -> list[_Label]:
        units, font, width = self.units, self.font, self.width
        torque_unit, distributed_unit = (
            unit_symbol(units.label("torque")),
            unit_symbol(units.label("distributed_torque")),
        )
        labels = []
        for case in self.model.load_cases:
            for torque in case.torques:
                if torque.shaft != shaft.id:
                    continue
                value = nice(float(units.from_si(torque.torque, "torque")))
                kind = "torque+" if torque.torque >= 0.0 else "torque-"
                text = f"{value} {torque_unit} ({case.name})"
                label = _beside(self.px(torque.x), text, font, width, "load", kind, 16.0)
                label.reach = _radius_at(shaft, torque.x)
                labels.append(label)
            for load in case.distributed:
                if load.shaft != shaft.id:
                    continue
                start = nice(float(units.from_si(load.intensity_start, "distributed_torque")))
                end = nice(float(units.from_si(load.intensity_end, "distributed_torque")))
                text = f"{start} → {end} {distributed_unit} ({case.name})"
                label = _beside(self.px(load.start), text, font, width, "load", "distributed")
                label.x_end = self.px(load.end)
                label.left = min(label.left, label.x - 2.0)
                label.right = max(label.right, label.x_end + 2.0)
                label.reach = _radius_at(shaft, load.start)
                label.reach_end = _radius_at(shaft, load.end)
                labels.append(label)
        for number, end, other in self._gears_on(shaft):
            text = (
                f"gear {number}, r {nice(end.radius * self.to_unit)} (meshes {other.shaft} at "
                f"x {nice(other.x * self.to_unit)})"
            )
            label = _beside(self.px(end.x), text, font, width, "gear", "gear")
            label.reach = end.radius
            labels.append(label)
        return labels

    def _below(self, shaft: Shaft) -> tuple[list[_Label], list[tuple[float, str]]]:
        units, font, width = self.units, self.font, self.width
        labels = []
        for number, support in enumerate(self.model.supports):
            if support.shaft != shaft.id:
                continue
            text = f"S{number} {support.kind}"
            if support.kind == "spring" and support.stiffness is not None:
                stiffness = nice(float(units.from_si(support.stiffness, "stiffness")))
                text += f" {stiffness} {unit_symbol(units.label('stiffness'))}"
            if support.rotation:
                rotation = nice(float(units.from_si(support.rotation, "angle")))
                text += f", θ {rotation} {unit_symbol(units.label('angle'))}"
            labels.append(_centred(self.px(support.x), text, font, width, "support", "support"))
        inside = []
        bounds = shaft.boundaries
        for index, segment in enumerate(shaft.segments):
            text = _section_label(segment, self.to_unit)
            left, right = self.px(float(bounds[index])), self.px(float(bounds[index + 1]))
            thinnest = float(np.min(segment.outer_radius_at(np.linspace(0.0, 1.0, 5))))
            middle = (left + right) / 2.0
            room = text_width(text, font) + 8.0 <= right - left
            if room and 2.0 * thinnest * self.scale >= font + 4.0:
                inside.append((middle, text))
            else:
                labels.append(_centred(middle, text, font, width, "ink", "section"))
        return labels, inside

    def _clear_gears(
        self, labels: list[_Label], gears: list[tuple[float, float]], first: float
    ) -> None:
        """Raise ``min_lane`` of labels over a gear whose pitch circle reaches into the lanes.

        ``first`` is the distance (px) from the axis to the nearest edge of lane 0's text.
        """
        for label in labels:
            for x, reach in gears:
                if label.left - 6.0 <= x <= label.right + 6.0 and reach + 4.0 > first:
                    needed = math.ceil((reach + 4.0 - first) / self.lane_height)
                    label.min_lane = max(label.min_lane, needed)

    def shaft(self, shaft: Shaft, y: float) -> tuple[ShaftDrawing, float]:
        """Lay out one shaft with its top at ``y``; return it and its bottom (px)."""
        font, lane_height, scale = self.font, self.lane_height, self.scale
        px = self.px
        radius = _tallest(shaft) * scale
        gears = [(px(end.x), end.radius * scale) for _, end, _ in self._gears_on(shaft)]
        supports = [(n, s) for n, s in enumerate(self.model.supports) if s.shaft == shaft.id]
        above = self._above(shaft)
        below, inside = self._below(shaft)
        # Above: lane k's baseline sits (16 + k·lane) px over the shaft's top.
        self._clear_gears(above, gears, radius + 16.0 - 3.0)
        lanes_above = _place(above)
        # Below: under the shaft and the support symbols (about 20 px deep).
        symbols = max([radius + 4.0] + [_radius_at(shaft, s.x) * scale + 22.0 for _, s in supports])
        self._clear_gears(below, gears, symbols)
        lanes_below = _place(below)
        title = y + font + 3.0
        reach_up = max(
            [radius + 16.0 + max(lanes_above - 1, 0) * lane_height + font]
            + [r + 2.0 for _, r in gears]
        )
        axis = title + 8.0 + reach_up
        drawing = ShaftDrawing(shaft.id, title, font + 1)
        drawing.segments = self._outline(shaft, axis)
        drawing.centre_line = Line(px(0.0) - 10, axis, px(shaft.length) + 10, axis)
        drawing.inside = [Text(middle, axis + font * 0.35, text) for middle, text in inside]
        # The pitch diameter to scale, as a hatched bar across the shaft.
        drawing.gears = [(x - 3.5, axis - r, 2 * r) for x, r in gears]
        drawing.above = [
            self._mark_above(label, axis - radius - 16.0 - label.lane * lane_height, axis)
            for label in above
        ]
        drawing.supports = [
            _support(support.kind, px(support.x), axis + _radius_at(shaft, support.x) * scale + 1.0)
            for _, support in supports
        ]
        first_below = axis + symbols + font
        drawing.below = [
            Text(label.anchor_x, first_below + label.lane * lane_height, label.text, label.anchor,
                 label.role)
            for label in below
        ]  # fmt: skip
        # Chain of segment lengths under everything, then the overall length.
        lowest = max(
            [axis + symbols, axis + symbols + lanes_below * lane_height]
            + [axis + r + 4.0 for _, r in gears]
        )
        dimension = lowest + font + 6.0
        bounds = [float(b) for b in shaft.boundaries]
        spans = [nice((b - a) * self.to_unit) for a, b in itertools.pairwise(bounds)]
        drawing.chains.append(_dimension_chain([px(b) for b in bounds], spans, dimension, font))
        bottom = dimension + 4.0
        if len(bounds) > 2:
            overall = dimension + lane_height + 6.0
            drawing.chains.append(
                _dimension_chain(
                    [px(0.0), px(shaft.length)], [nice(shaft.length * self.to_unit)], overall, font
                )
            )
            bottom = overall + 4.0
        return drawing, bottom + font

    def _outline(self, shaft: Shaft, axis: float) -> list[SegmentOutline]:
        """Outline, bonded layer interfaces and bore of every segment."""
        outlines = []
        bounds = shaft.boundaries
        for index, segment in enumerate(shaft.segments):
            fractions = np.linspace(0.0, 1.0, 2 if segment.prismatic else 9)
            xs = self.px(float(bounds[index])) + fractions * segment.length * self.scale
            outer = segment.outer_radius_at(fractions) * self.scale
            outline = points([*xs, *xs[::-1]], [*(axis - outer), *(axis + outer[::-1])], decimals=1)

            def pair(radii: Any, xs: Any = xs) -> list[str]:
                return [points(xs, axis + side * radii, decimals=1) for side in (-1.0, 1.0)]

            interfaces = []
            for layer in segment.layers:  # an inner layer's surface: a bonded interface
                surface = layer.section.outer_radius_at(fractions) * self.scale
                if np.all(surface < outer - 0.5):
                    interfaces += pair(surface)
            bore = np.min(
                [layer.section.inner_radius_at(fractions) for layer in segment.layers], axis=0
            )
            bores = pair(bore * self.scale) if np.any(bore > 0.0) else []
            outlines.append(SegmentOutline(outline, tuple(interfaces), tuple(bores)))
        return outlines

    def _mark_above(self, label: _Label, base: float, axis: float) -> Mark:
        """A label above the shaft with its leader, torque vector or distributed band."""
        x, mark, scale = label.x, base - self.font * 0.35, self.scale
        text = Text(label.anchor_x, base, label.text, label.anchor, label.role)
        if label.kind == "distributed":
            x_end, band = label.x_end, base + 3.0
            return Mark(
                label.kind,
                label.role,
                text,
                (
                    Line(x, band + 5, x, axis - label.reach * scale - 1),
                    Line(x_end, band + 5, x_end, axis - label.reach_end * scale - 1),
                ),
                band=(x, band, x_end - x),
            )
        leader = Line(x, mark, x, axis - label.reach * scale - 1)
        if label.kind not in ("torque+", "torque-"):
            return Mark(label.kind, label.role, text, (leader,))
        direction = 1.0 if label.kind == "torque+" else -1.0
        tail, tip = x - 10.0 * direction, x + 10.0 * direction
        return Mark(
            label.kind,
            label.role,
            text,
            (leader,),
            shaft=Line(tail, mark, tip - 3 * direction, mark),
            heads=(
                _arrowhead(tip, mark, direction),
                _arrowhead(tip - 5.0 * direction, mark, direction),
            ),
        )

    def scale_bar(self, y: float) -> tuple[Line, tuple[Line, ...], Text]:
        """A bar of a round length, bottom right, with its ticks and its length."""
        step = nice_step((self.width - 2.0 * self.margin) / self.scale * self.to_unit)
        bar = step / self.to_unit * self.scale
        right = self.width - 8.0
        return (
            Line(right - bar, y, right, y),
            tuple(Line(x, y - 4, x, y + 4) for x in (right - bar, right)),
            Text(right - bar - 6, y + 4, nice(step), "end"),
        )


def elevation_svg(model: Model, width: int = 720, font_size: float = 11.0) -> str:
    """A to-scale elevation of every shaft: outline, bores, supports, gears and loads, labelled.

    Lengths and diameters share one scale (the same for every shaft), so the drawing shows the
    true proportions; a scale bar and a chain of segment lengths give its dimensions in the
    case's length unit. Torques are drawn as moment vectors (double arrowhead, right-hand rule
    about the shaft's +x axis) beside their value and load case.

    Parameters
    ----------
    model
        The model (SI inside); labels are written in its units.
    width
        Width of the drawing (CSS px).
    font_size
        Size of the label text (CSS px).

    Returns
    -------
    str
        An SVG document; identical bytes for the same model.
    """
    layout = _Elevation(model, width, font_size)
    shafts = []
    y = 0.0
    for shaft in model.shafts:
        drawing, y = layout.shaft(shaft, y)
        shafts.append(drawing)
        y += 6.0
    bar, ticks, length = layout.scale_bar(y)
    return render(
        "svg/elevation.svg.j2",
        width=width,
        height=math.ceil(y + 12.0),
        font_family=FONT_FAMILY,
        font_size=font_size,
        shafts=shafts,
        scale_bar=bar,
        scale_ticks=ticks,
        scale_length=length,
        length_unit=unit_symbol(model.units.label("length")),
    )
