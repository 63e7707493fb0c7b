"""Static pictures for the calculation record, written directly as SVG text.

Everything here is deterministic (the same input gives the same bytes, so a record can be
rebuilt and compared) and needs no plotting library: the elevation and the result diagrams
are plain SVG lines, polygons and text, exact to the geometry and the stations computed.
Every string that comes from a case (shaft names, load-case names, unit labels) is escaped.
The fixed equations of the method are pre-rendered files; see
:mod:`workbench.record.equations`.
"""

from __future__ import annotations

import base64
import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from markupsafe import escape

from workbench.solver.model import Model, Segment, Shaft

__all__ = [
    "data_uri",
    "elevation_svg",
    "fatigue_diagram_svg",
    "line_diagram_svg",
    "mode_shape_svg",
]

#: Fonts of the drawings; an SVG shown as an image uses the reader's installed fonts.
FONT_FAMILY = "DejaVu Sans, Helvetica, Arial, sans-serif"

# Colours of the drawings: one blue for structure, one red for loads, one brown for gears.
_INK = "#222222"
_FILL = "#dfe4ea"
_SUPPORT = "#1f4e79"
_LOAD = "#a00000"
_GEAR = "#7a4a12"
_DIM = "#444444"


def data_uri(svg: str) -> str:
    """``data:image/svg+xml;base64,…`` of an SVG document (CSP ``img-src data:`` allows it)."""
    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")


def _nice(value: float, digits: int = 4) -> str:
    """``digits`` significant digits, no exponent between 10⁻⁴ and 10⁷, a true minus sign."""
    if value == 0.0 or not math.isfinite(value):
        return "0"
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-4 <= abs(value) < 1e7:
        decimals = max(digits - 1 - math.floor(math.log10(abs(value))), 0)
        text = f"{value:.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
    return text.replace("-", "\u2212")


def _text_width(text: str, size: float) -> float:
    """Width of ``text`` in px at ``size`` px, for placing labels (average sans-serif glyph)."""
    return 0.6 * size * len(text)


def _nice_step(span: float) -> float:
    """A round length (1, 2 or 5 × 10ⁿ) near a sixth of ``span``."""
    if span <= 0.0 or not math.isfinite(span):
        return 1.0
    raw = span / 6.0
    power = 10.0 ** math.floor(math.log10(raw))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if factor * power >= raw:
            return factor * power
    return 10.0 * power  # pragma: no cover - the loop always returns


# --- elevation ------------------------------------------------------------------------------


@dataclass
class _Label:
    """A text in a lane above or below a shaft, with the mark that points at the shaft."""

    left: float
    right: float
    text: str
    anchor_x: float  # where the text is anchored (see ``anchor``)
    anchor: str  # SVG text-anchor: start, middle or end
    colour: str
    kind: str  # torque+, torque-, distributed, gear, support, section
    x: float  # the position the label belongs to (px)
    x_end: float = 0.0  # the end of a distributed load (px)
    reach: float = 0.0  # radius (m) its leader runs to at x
    reach_end: float = 0.0  # the same at x_end
    min_lane: int = 0  # lowest lane clear of a gear that stands out of the shaft
    lane: int = 0


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
    x: float, text: str, size: float, width: float, colour: str, kind: str, clear: float = 4.0
) -> _Label:
    """A label starting ``clear`` px right of ``x``, or ending left of it near the right edge.

    A text too long for either side is cut short with an ellipsis (the tables hold it whole).
    """
    room = max(width - 4.0 - (x + clear), x - clear - 2.0)
    if _text_width(text, size) > room:
        text = text[: max(int(room / (0.6 * size)) - 1, 1)] + "…"
    text_width = _text_width(text, size)
    if x + clear + text_width <= width - 4.0:
        return _Label(x - 12.0, x + clear + text_width, text, x + clear, "start", colour, kind, x)
    return _Label(x - clear - text_width, x + 12.0, text, x - clear, "end", colour, kind, x)


def _centred(x: float, text: str, size: float, width: float, colour: str, kind: str) -> _Label:
    """A label centred on ``x`` when it fits inside the drawing, else beside it."""
    half = _text_width(text, size) / 2.0
    if x - half >= 2.0 and x + half <= width - 2.0:
        return _Label(x - half, x + half, text, x, "middle", colour, kind, x)
    return _beside(x, text, size, width, colour, kind)


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
        return _nice(value * to_unit)

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


def _arrowhead(tip_x: float, y: float, direction: float, colour: str) -> str:
    back = tip_x - direction * 6.0
    return (
        f'<path d="M{tip_x:.1f},{y:.1f} L{back:.1f},{y - 3.2:.1f} L{back:.1f},{y + 3.2:.1f} Z" '
        f'fill="{colour}"/>'
    )


def _ground(x: float, y: float, colour: str) -> list[str]:
    """A hatched ground line centred on ``x`` at height ``y``."""
    parts = [
        f'<line x1="{x - 11:.1f}" y1="{y:.1f}" x2="{x + 11:.1f}" y2="{y:.1f}" stroke="{colour}" '
        'stroke-width="1.4"/>'
    ]
    parts += [
        f'<line x1="{x - 9 + 4.5 * k:.1f}" y1="{y:.1f}" x2="{x - 13 + 4.5 * k:.1f}" '
        f'y2="{y + 4.5:.1f}" stroke="{colour}" stroke-width="0.9"/>'
        for k in range(5)
    ]
    return parts


def _support_symbol(kind: str, x: float, top: float) -> tuple[list[str], float]:
    """A fixed (filled triangle) or spring (zigzag) support hanging from ``top``; its bottom."""
    if kind == "fixed":
        parts = [
            f'<path d="M{x:.1f},{top:.1f} L{x - 7:.1f},{top + 12:.1f} '
            f'L{x + 7:.1f},{top + 12:.1f} Z" fill="{_SUPPORT}"/>'
        ]
        return parts + _ground(x, top + 12.0, _SUPPORT), top + 17.0
    zig = [f"M{x:.1f},{top:.1f}", f"L{x:.1f},{top + 2:.1f}"]
    zig += [f"L{x + (5 if k % 2 == 0 else -5):.1f},{top + 3.5 + 2.5 * k:.1f}" for k in range(4)]
    zig += [f"L{x:.1f},{top + 13:.1f}", f"L{x:.1f},{top + 14:.1f}"]
    parts = [
        f'<path d="{" ".join(zig)}" fill="none" stroke="{_SUPPORT}" stroke-linejoin="round" '
        'stroke-width="1.2"/>'
    ]
    return parts + _ground(x, top + 14.0, _SUPPORT), top + 19.0


def _dimension_chain(
    stations: Sequence[float], texts: Sequence[str], y: float, font_size: float
) -> list[str]:
    """A dimension line through ``stations`` (px) with ticks and a length over each span."""
    parts = [
        f'<line x1="{stations[0]:.1f}" y1="{y:.1f}" x2="{stations[-1]:.1f}" y2="{y:.1f}" '
        f'stroke="{_DIM}" stroke-width="0.7"/>'
    ]
    parts += [
        f'<line x1="{x - 3:.1f}" y1="{y + 3:.1f}" x2="{x + 3:.1f}" y2="{y - 3:.1f}" '
        f'stroke="{_DIM}" stroke-width="1.1"/>'
        for x in stations
    ]
    below = False
    for left, right, text in zip(stations[:-1], stations[1:], texts, strict=True):
        fits = _text_width(text, font_size) + 4.0 <= right - left
        # A span too short for its number writes it under the line, alternating with the next.
        below = not fits and not below
        text_y = y + font_size + 1.0 if below else y - 3.0
        parts.append(
            f'<text x="{(left + right) / 2:.1f}" y="{text_y:.1f}" text-anchor="middle" '
            f'fill="{_DIM}">{escape(text)}</text>'
        )
    return parts


class _Elevation:
    """Lays out and draws the shafts of a model, one band under the other, on one scale."""

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
        torque_unit, distributed_unit = units.label("torque"), units.label("distributed_torque")
        labels = []
        for case in self.model.load_cases:
            for torque in case.torques:
                if torque.shaft != shaft.id:
                    continue
                value = _nice(float(units.from_si(torque.torque, "torque")))
                kind = "torque+" if torque.torque >= 0.0 else "torque-"
                text = f"{value} {torque_unit} ({case.name})"
                label = _beside(self.px(torque.x), text, font, width, _LOAD, kind, 16.0)
                label.reach = _radius_at(shaft, torque.x)
                labels.append(label)
            for load in case.distributed:
                if load.shaft != shaft.id:
                    continue
                start = _nice(float(units.from_si(load.intensity_start, "distributed_torque")))
                end = _nice(float(units.from_si(load.intensity_end, "distributed_torque")))
                text = f"{start} → {end} {distributed_unit} ({case.name})"
                label = _beside(self.px(load.start), text, font, width, _LOAD, "distributed")
                label.x_end = self.px(load.end)
                label.left = min(label.left, label.x - 2.0)
                label.right = max(label.right, label.x_end + 2.0)
                label.reach = _radius_at(shaft, load.start)
                label.reach_end = _radius_at(shaft, load.end)
                labels.append(label)
        for number, end, other in self._gears_on(shaft):
            text = (
                f"gear {number}, r {_nice(end.radius * self.to_unit)} (meshes {other.shaft} at "
                f"x {_nice(other.x * self.to_unit)})"
            )
            label = _beside(self.px(end.x), text, font, width, _GEAR, "gear")
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
                stiffness = _nice(float(units.from_si(support.stiffness, "stiffness")))
                text += f" {stiffness} {units.label('stiffness')}"
            if support.rotation:
                rotation = _nice(float(units.from_si(support.rotation, "angle")))
                text += f", θ {rotation} {units.label('angle')}"
            labels.append(_centred(self.px(support.x), text, font, width, _SUPPORT, "support"))
        inside = []
        bounds = shaft.boundaries
        for index, segment in enumerate(shaft.segments):
            text = _section_label(segment, self.to_unit)
            left, right = self.px(float(bounds[index])), self.px(float(bounds[index + 1]))
            thinnest = float(np.min(segment.outer_radius_at(np.linspace(0.0, 1.0, 5))))
            middle = (left + right) / 2.0
            room = _text_width(text, font) + 8.0 <= right - left
            if room and 2.0 * thinnest * self.scale >= font + 4.0:
                inside.append((middle, text))
            else:
                labels.append(_centred(middle, text, font, width, _INK, "section"))
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

    def shaft(self, shaft: Shaft, y: float) -> tuple[list[str], float]:
        """Draw one shaft with its top at ``y``; return the parts and the bottom (px)."""
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
        parts = [
            f'<text x="4" y="{title:.1f}" font-weight="bold" font-size="{font + 1:g}">'
            f"shaft {escape(shaft.id)}</text>"
        ]
        parts += self._outline(shaft, axis)
        for middle, text in inside:
            parts.append(
                f'<text x="{middle:.1f}" y="{axis + font * 0.35:.1f}" text-anchor="middle" '
                f'paint-order="stroke" stroke="{_FILL}" stroke-width="3">{escape(text)}</text>'
            )
        for x, r in gears:  # the pitch diameter to scale, as a hatched bar across the shaft
            parts.append(
                f'<rect x="{x - 3.5:.1f}" y="{axis - r:.1f}" width="7" height="{2 * r:.1f}" '
                f'fill="{_GEAR}" fill-opacity="0.35" stroke="{_GEAR}" stroke-width="1.2"/>'
            )
        for label in above:
            parts += self._mark_above(label, axis - radius - 16.0 - label.lane * lane_height, axis)
        for _, support in supports:
            top = axis + _radius_at(shaft, support.x) * scale + 1.0
            parts += _support_symbol(support.kind, px(support.x), top)[0]
        first_below = axis + symbols + font
        for label in below:
            parts.append(
                f'<text x="{label.anchor_x:.1f}" y="{first_below + label.lane * lane_height:.1f}" '
                f'text-anchor="{label.anchor}" fill="{label.colour}">{escape(label.text)}</text>'
            )
        # Chain of segment lengths under everything, then the overall length.
        lowest = max(
            [axis + symbols, axis + symbols + lanes_below * lane_height]
            + [axis + r + 4.0 for _, r in gears]
        )
        dimension = lowest + font + 6.0
        bounds = [float(b) for b in shaft.boundaries]
        spans = [_nice((b - a) * self.to_unit) for a, b in itertools.pairwise(bounds)]
        parts += _dimension_chain([px(b) for b in bounds], spans, dimension, font)
        bottom = dimension + 4.0
        if len(bounds) > 2:
            overall = dimension + lane_height + 6.0
            parts += _dimension_chain(
                [px(0.0), px(shaft.length)], [_nice(shaft.length * self.to_unit)], overall, font
            )
            bottom = overall + 4.0
        return parts, bottom + font

    def _outline(self, shaft: Shaft, axis: float) -> list[str]:
        """Outline, bores and layer interfaces of every segment, and the centre line."""
        parts = []
        bounds = shaft.boundaries
        for index, segment in enumerate(shaft.segments):
            fractions = np.linspace(0.0, 1.0, 2 if segment.prismatic else 9)
            xs = self.px(float(bounds[index])) + fractions * segment.length * self.scale
            outer = segment.outer_radius_at(fractions) * self.scale
            points = [
                *zip(xs, axis - outer, strict=True),
                *zip(xs[::-1], axis + outer[::-1], strict=True),
            ]
            parts.append(
                '<polygon points="'
                + " ".join(f"{a:.1f},{b:.1f}" for a, b in points)
                + f'" fill="{_FILL}" stroke="{_INK}" stroke-width="1.2"/>'
            )

            def pair(radii: Any, style: str, xs: Any = xs) -> list[str]:
                return [
                    '<polyline points="'
                    + " ".join(
                        f"{a:.1f},{axis + side * b:.1f}" for a, b in zip(xs, radii, strict=True)
                    )
                    + f'" fill="none" stroke="{_INK}" {style}/>'
                    for side in (-1.0, 1.0)
                ]

            for layer in segment.layers:  # an inner layer's surface: a bonded interface
                surface = layer.section.outer_radius_at(fractions) * self.scale
                if np.all(surface < outer - 0.5):
                    parts += pair(surface, 'stroke-width="0.6"')
            bore = np.min(
                [layer.section.inner_radius_at(fractions) for layer in segment.layers], axis=0
            )
            if np.any(bore > 0.0):
                parts += pair(bore * self.scale, 'stroke-width="0.8" stroke-dasharray="4,2"')
        parts.append(
            f'<line x1="{self.px(0.0) - 10:.1f}" y1="{axis:.1f}" '
            f'x2="{self.px(shaft.length) + 10:.1f}" y2="{axis:.1f}" stroke="#777777" '
            'stroke-width="0.6" stroke-dasharray="12,3,2,3"/>'
        )
        return parts

    def _mark_above(self, label: _Label, base: float, axis: float) -> list[str]:
        """A label above the shaft with its leader, torque vector or distributed band."""
        x, mark, scale = label.x, base - self.font * 0.35, self.scale
        text = (
            f'<text x="{label.anchor_x:.1f}" y="{base:.1f}" text-anchor="{label.anchor}" '
            f'fill="{label.colour}">{escape(label.text)}</text>'
        )
        if label.kind == "distributed":
            x_end, band = label.x_end, base + 3.0
            return [
                f'<rect x="{x:.1f}" y="{band:.1f}" width="{x_end - x:.1f}" height="5" '
                f'fill="{_LOAD}" fill-opacity="0.18" stroke="{_LOAD}" stroke-width="0.9"/>',
                f'<line x1="{x:.1f}" y1="{band + 5:.1f}" x2="{x:.1f}" '
                f'y2="{axis - label.reach * scale - 1:.1f}" stroke="{_LOAD}" '
                'stroke-width="0.7" stroke-dasharray="2,2"/>',
                f'<line x1="{x_end:.1f}" y1="{band + 5:.1f}" x2="{x_end:.1f}" '
                f'y2="{axis - label.reach_end * scale - 1:.1f}" stroke="{_LOAD}" '
                'stroke-width="0.7" stroke-dasharray="2,2"/>',
                text,
            ]
        parts = [
            f'<line x1="{x:.1f}" y1="{mark:.1f}" x2="{x:.1f}" '
            f'y2="{axis - label.reach * scale - 1:.1f}" stroke="{label.colour}" '
            'stroke-width="0.8"/>'
        ]
        if label.kind in ("torque+", "torque-"):
            direction = 1.0 if label.kind == "torque+" else -1.0
            tail, tip = x - 10.0 * direction, x + 10.0 * direction
            parts += [
                f'<line x1="{tail:.1f}" y1="{mark:.1f}" x2="{tip - 3 * direction:.1f}" '
                f'y2="{mark:.1f}" stroke="{_LOAD}" stroke-width="1.4"/>',
                _arrowhead(tip, mark, direction, _LOAD),
                _arrowhead(tip - 5.0 * direction, mark, direction, _LOAD),
            ]
        return [*parts, text]

    def scale_bar(self, y: float) -> list[str]:
        """A bar of a round length, bottom right, saying the drawing is to scale."""
        label = self.units.label("length")
        step = _nice_step((self.width - 2.0 * self.margin) / self.scale * self.to_unit)
        bar = step / self.to_unit * self.scale
        right = self.width - 8.0
        return [
            f'<line x1="{right - bar:.1f}" y1="{y:.1f}" x2="{right:.1f}" y2="{y:.1f}" '
            f'stroke="{_INK}" stroke-width="2"/>',
            *(
                f'<line x1="{x:.1f}" y1="{y - 4:.1f}" x2="{x:.1f}" y2="{y + 4:.1f}" '
                f'stroke="{_INK}" stroke-width="1"/>'
                for x in (right - bar, right)
            ),
            f'<text x="{right - bar - 6:.1f}" y="{y + 4:.1f}" text-anchor="end">'
            f"{escape(_nice(step))} {escape(label)}; drawn to scale, dimensions in "
            f"{escape(label)}</text>",
        ]


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
    drawing = _Elevation(model, width, font_size)
    body: list[str] = []
    y = 0.0
    for shaft in model.shafts:
        parts, y = drawing.shaft(shaft, y)
        body += parts
        y += 6.0
    body += drawing.scale_bar(y)
    height = math.ceil(y + 12.0)
    head = (
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" font-family="{FONT_FAMILY}" '
        f'font-size="{font_size:g}" fill="{_INK}">'
    )
    background = f'<rect width="{width}" height="{height}" fill="#ffffff"/>'
    return "\n".join([head, background, *body, "</svg>"])


# --- result diagrams ------------------------------------------------------------------------


def line_diagram_svg(
    x: Sequence[float],
    panels: Sequence[tuple[str, Sequence[float]]],
    x_label: str,
    width: int = 720,
    panel_height: int = 80,
    font_size: float = 11.0,
) -> str:
    """Stacked line diagrams of quantities along a shaft, written directly as SVG.

    Parameters
    ----------
    x
        Stations (in the reader's length unit). A repeated station draws a vertical jump.
    panels
        ``(label with unit, values)`` for each panel, values at the stations.
    x_label
        Label of the x axis.
    width, panel_height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document with a polyline per panel, a zero line, and the extreme values.
    """
    left, right, top, gap = 74, 14, 8, 26
    xs = np.asarray(x, dtype=float)
    x_min, x_max = float(xs.min()), float(xs.max())
    span = x_max - x_min or 1.0
    height = top + len(panels) * (panel_height + gap) + 16
    plot_width = width - left - right
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" font-family="{FONT_FAMILY}" '
        f'font-size="{font_size:g}">',
        f'<rect width="{width}" height="{height}" fill="#ffffff"/>',
    ]
    for number, (label, raw_values) in enumerate(panels):
        values = np.asarray(raw_values, dtype=float)
        y0 = top + number * (panel_height + gap)
        low, high = min(float(values.min()), 0.0), max(float(values.max()), 0.0)
        extent = high - low or 1.0

        def to_x(value: float) -> float:
            return left + (value - x_min) / span * plot_width

        def to_y(value: float, y0: int = y0, high: float = high, extent: float = extent) -> float:
            return y0 + (high - value) / extent * panel_height

        screen_x = (left + (xs - x_min) / span * plot_width).tolist()
        screen_y = (y0 + (high - values) / extent * panel_height).tolist()
        points = " ".join(map("{:.2f},{:.2f}".format, screen_x, screen_y))
        zero = to_y(0.0)
        parts += [
            f'<rect x="{left}" y="{y0}" width="{plot_width}" height="{panel_height}" '
            'fill="none" stroke="#bbbbbb" stroke-width="0.6"/>',
            f'<line x1="{left}" y1="{zero:.2f}" x2="{left + plot_width}" y2="{zero:.2f}" '
            'stroke="#888888" stroke-width="0.6" stroke-dasharray="3,2"/>',
            f'<polyline points="{points}" fill="none" stroke="#1f4e79" stroke-width="1.4"/>',
            f'<text x="{left - 4}" y="{y0 + font_size - 1:g}" text-anchor="end">'
            f"{escape(_nice(high))}</text>",
            f'<text x="{left - 4}" y="{y0 + panel_height}" text-anchor="end">'
            f"{escape(_nice(low))}</text>",
            f'<text x="{left + 4}" y="{y0 + font_size + 1:g}" fill="#333333">{escape(label)}</text>',
        ]
        peak = int(np.argmax(np.abs(values)))
        parts.append(
            f'<circle cx="{to_x(xs[peak]):.2f}" cy="{to_y(values[peak]):.2f}" r="2.5" '
            'fill="#a00000"/>'
        )
    bottom = top + len(panels) * (panel_height + gap) - gap + font_size + 3
    parts += [
        f'<text x="{left}" y="{bottom:g}">{escape(_nice(x_min))}</text>',
        f'<text x="{left + plot_width}" y="{bottom:g}" text-anchor="end">'
        f"{escape(_nice(x_max))}</text>",
        f'<text x="{left + plot_width / 2:.1f}" y="{bottom:g}" text-anchor="middle">'
        f"{escape(x_label)}</text>",
        "</svg>",
    ]
    return "\n".join(parts)


# --- mode shapes ----------------------------------------------------------------------------


def mode_shape_svg(
    title: str,
    shafts: Sequence[tuple[str, Sequence[float], Sequence[float]]],
    discs: Sequence[tuple[str, float]],
    x_label: str,
    width: int = 720,
    panel_height: int = 70,
    font_size: float = 11.0,
) -> str:
    """One mode shape: the normalised angle along each shaft, one panel per shaft.

    Parameters
    ----------
    title
        What the drawing shows (mode number and frequency).
    shafts
        ``(shaft id, x at the nodes (reader's length unit), normalised angle)`` per shaft.
    discs
        ``(shaft id, x)`` of each disc (reader's length unit), marked on its shaft's line.
    x_label
        Label of the x axis (with its unit).
    width, panel_height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document; every panel shares one x scale (the longest shaft) and the angle axis
        −1 … 1, so the shafts' amplitudes compare directly (a gear's ratio shows as a step in
        amplitude from one shaft to the next).
    """
    left, right, top, gap = 74, 14, font_size + 10, 22
    longest = max((float(max(x)) for _, x, _ in shafts if len(x)), default=1.0) or 1.0
    plot_width = width - left - right
    height = int(top + len(shafts) * (panel_height + gap) + font_size + 6)

    def to_x(value: float) -> float:
        return left + value / longest * plot_width

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" font-family="{FONT_FAMILY}" '
        f'font-size="{font_size:g}">',
        f'<rect width="{width}" height="{height}" fill="#ffffff"/>',
        f'<text x="{left}" y="{font_size + 2:g}" font-weight="bold">{escape(title)}</text>',
    ]
    for number, (shaft_id, xs, angles) in enumerate(shafts):
        y0 = top + number * (panel_height + gap)
        middle = y0 + panel_height / 2.0

        def to_y(value: float, y0: float = y0) -> float:
            return y0 + (1.0 - value) / 2.0 * panel_height

        points = " ".join(
            f"{to_x(float(a)):.2f},{to_y(float(b)):.2f}" for a, b in zip(xs, angles, strict=True)
        )
        parts += [
            f'<rect x="{left}" y="{y0:g}" width="{plot_width}" height="{panel_height}" '
            'fill="none" stroke="#bbbbbb" stroke-width="0.6"/>',
            f'<line x1="{left}" y1="{middle:.2f}" x2="{left + plot_width}" y2="{middle:.2f}" '
            'stroke="#888888" stroke-width="0.6" stroke-dasharray="3,2"/>',
            f'<polyline points="{points}" fill="none" stroke="{_SUPPORT}" stroke-width="1.4"/>',
            f'<text x="{left - 4}" y="{y0 + font_size - 1:g}" text-anchor="end">1</text>',
            f'<text x="{left - 4}" y="{y0 + panel_height:g}" text-anchor="end">\u22121</text>',
            f'<text x="{left + 4}" y="{y0 + font_size + 1:g}" fill="#333333">'
            f"shaft {escape(shaft_id)}</text>",
        ]
        for disc_shaft, disc_x in discs:
            if disc_shaft != shaft_id:
                continue
            angle = float(np.interp(disc_x, np.asarray(xs, float), np.asarray(angles, float)))
            parts.append(
                f'<rect x="{to_x(disc_x) - 3:.2f}" y="{to_y(angle) - 6:.2f}" width="6" '
                f'height="12" fill="{_LOAD}"/>'
            )
    bottom = top + len(shafts) * (panel_height + gap) - gap + font_size + 3
    parts += [
        f'<text x="{left}" y="{bottom:g}">0</text>',
        f'<text x="{left + plot_width}" y="{bottom:g}" text-anchor="end">'
        f"{escape(_nice(longest))}</text>",
        f'<text x="{left + plot_width / 2:.1f}" y="{bottom:g}" text-anchor="middle">'
        f"{escape(x_label)}</text>",
        "</svg>",
    ]
    return "\n".join(parts)


# --- fatigue diagram ------------------------------------------------------------------------

#: The criteria's lines: (name, colour, dash pattern or "").
_CRITERIA_STYLE = (
    ("Goodman", "#1f4e79", ""),
    ("Gerber", "#2a6f2a", "6,3"),
    ("ASME-elliptic", "#7a4a12", "2,2"),
    ("Soderberg", "#555555", "8,2,2,2"),
    ("Langer (first-cycle yield)", "#a00000", "4,4"),
)


def fatigue_diagram_svg(
    title: str,
    endurance: float,
    ultimate: float,
    shear_yield: float,
    point: tuple[float, float],
    unit: str,
    width: int = 720,
    height: int = 300,
    font_size: float = 11.0,
) -> str:
    """Alternating against mean shear stress: the failure lines and the operating point.

    Parameters
    ----------
    title
        What the drawing shows (shaft and segment).
    endurance, ultimate, shear_yield
        Sse, Ssu and Ssy in the reader's stress unit.
    point
        (τm, τa) of the governing cycle in the reader's stress unit.
    unit
        The stress unit's label.
    width, height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document with the modified Goodman line τa = Sse·(1 − τm/Ssu), the Gerber
        parabola τa = Sse·(1 − (τm/Ssu)²), the ASME-elliptic quadrant (τa/Sse)² + (τm/Ssy)² = 1,
        the Soderberg line τa = Sse·(1 − τm/Ssy) and the Langer line τa + τm = Ssy, the load line
        from the origin through the operating point, and the point itself.

    References
    ----------
    .. [1] Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed., §6-12, fig.
       6-27 (fatigue diagram of the criteria) and §6-14 (torsion).
    """
    left, right, top, bottom_margin = 74, 190, font_size + 12, 40
    mean, alternating = point
    x_max = max(ultimate, mean) * 1.08
    y_max = max(shear_yield, endurance, alternating) * 1.08
    plot_width, plot_height = width - left - right, height - top - bottom_margin
    bottom = top + plot_height

    def to_x(value: float) -> float:
        return left + value / x_max * plot_width

    def to_y(value: float) -> float:
        return bottom - value / y_max * plot_height

    fractions = np.linspace(0.0, 1.0, 41)
    curves = (
        (fractions * ultimate, endurance * (1.0 - fractions)),
        (fractions * ultimate, endurance * (1.0 - fractions**2)),
        (
            shear_yield * np.sin(fractions * math.pi / 2.0),
            endurance * np.cos(fractions * math.pi / 2.0),
        ),
        (fractions * shear_yield, endurance * (1.0 - fractions)),
        (fractions * shear_yield, shear_yield * (1.0 - fractions)),
    )
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" font-family="{FONT_FAMILY}" '
        f'font-size="{font_size:g}">',
        f'<rect width="{width}" height="{height}" fill="#ffffff"/>',
        f'<text x="{left}" y="{font_size + 2:g}" font-weight="bold">{escape(title)}</text>',
        f'<line x1="{left}" y1="{bottom:g}" x2="{left + plot_width}" y2="{bottom:g}" '
        f'stroke="{_INK}" stroke-width="1"/>',
        f'<line x1="{left}" y1="{top:g}" x2="{left}" y2="{bottom:g}" stroke="{_INK}" '
        'stroke-width="1"/>',
    ]
    for (_name, colour, dash), (xs, ys) in zip(_CRITERIA_STYLE, curves, strict=True):
        points = " ".join(f"{to_x(a):.2f},{to_y(b):.2f}" for a, b in zip(xs, ys, strict=True))
        style = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(
            f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="1.3"{style}/>'
        )
    for number, (name, colour, dash) in enumerate(_CRITERIA_STYLE):
        y = top + 6 + number * (font_size + 7)
        x = left + plot_width + 14
        style = f' stroke-dasharray="{dash}"' if dash else ""
        parts += [
            f'<line x1="{x}" y1="{y:g}" x2="{x + 24}" y2="{y:g}" stroke="{colour}" '
            f'stroke-width="1.3"{style}/>',
            f'<text x="{x + 30}" y="{y + font_size * 0.35:.1f}">{escape(name)}</text>',
        ]
    # The load line: the cycle grows in proportion from the origin (radial load line).
    reaches = [limit / value for limit, value in ((x_max, mean), (y_max, alternating)) if value]
    if reaches:
        reach = min(reaches)
        parts.append(
            f'<line x1="{to_x(0.0):.2f}" y1="{to_y(0.0):.2f}" x2="{to_x(mean * reach):.2f}" '
            f'y2="{to_y(alternating * reach):.2f}" stroke="#777777" stroke-width="0.7" '
            'stroke-dasharray="1,3"/>'
        )
    parts += [
        f'<circle cx="{to_x(mean):.2f}" cy="{to_y(alternating):.2f}" r="3.5" fill="{_LOAD}"/>',
        f'<text x="{to_x(mean) + 6:.2f}" y="{to_y(alternating) - 6:.2f}" fill="{_LOAD}">'
        f"(τm {escape(_nice(mean))}, τa {escape(_nice(alternating))})</text>",
    ]
    ticks = (
        (endurance, "Sse", "y"),
        (shear_yield, "Ssy", "y"),
        (shear_yield, "Ssy", "x"),
        (ultimate, "Ssu", "x"),
    )
    for value, name, axis in ticks:
        text = f"{name} {_nice(value)}"
        if axis == "y":
            parts.append(
                f'<text x="{left - 4}" y="{to_y(value) + font_size * 0.35:.1f}" '
                f'text-anchor="end">{escape(text)}</text>'
            )
        else:
            parts += [
                f'<line x1="{to_x(value):.2f}" y1="{bottom:g}" x2="{to_x(value):.2f}" '
                f'y2="{bottom + 4:g}" stroke="{_INK}" stroke-width="1"/>',
                f'<text x="{to_x(value):.2f}" y="{bottom + font_size + 4:g}" '
                f'text-anchor="middle">{escape(text)}</text>',
            ]
    parts += [
        f'<text x="{left + plot_width / 2:.1f}" y="{height - 6}" text-anchor="middle">'
        f"mean shear stress τm [{escape(unit)}]</text>",
        f'<text x="14" y="{(top + bottom) / 2:.1f}" text-anchor="middle" '
        f'transform="rotate(-90 14 {(top + bottom) / 2:.1f})">alternating shear stress τa '
        f"[{escape(unit)}]</text>",
        "</svg>",
    ]
    return "\n".join(parts)
