"""The panel's elevation: the shaft shown, to scale, with its supports, gears, loads and failures.

Everything drawn comes from the solver's model and the check report, converted to the panel's
units; nothing here computes mechanics. Every marker carries its name beside it and the legend
beneath the drawing lists what is drawn; a segment failing a check in any result is drawn in the
failing colour with a cross on it naming the check.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from ipywidgets import Layout

from workbench.case.display import format_number
from workbench.design.checks import CheckReport
from workbench.panel.document import unit_label
from workbench.panel.plotting import (
    ALONG_MARGIN,
    ALONG_WIDTH,
    FAIL,
    FAIL_MARKER,
    LIMIT,
    LOAD,
    SHAFT,
    SHAFT_FILL,
    SUPPORT,
    Legend,
    LegendEntry,
    bq,
    failing_mark,
    name_tooltip,
    number_axis,
    set_list,
    set_tooltip,
)
from workbench.solver.model import Model

#: Plot area of the elevation (px): the y range is set so lengths draw at one scale on both axes.
_ELEVATION_WIDTH, _ELEVATION_HEIGHT = ALONG_WIDTH, 210
_ELEVATION_MARGIN = {"top": 20, "bottom": 36, **ALONG_MARGIN}
_PLOT_RATIO = (_ELEVATION_HEIGHT - 56) / (_ELEVATION_WIDTH - 80)
_SAMPLES = 17
#: The support kinds drawn, their marker, and the words of their label and legend.
SUPPORT_KINDS = {
    "fixed": ("triangle-up", "fixed", "fixed support"),
    "spring": ("diamond", "spring", "spring support"),
    "prescribed": ("square", "set θ", "support with a set rotation"),
}


def _support_mark(scales: dict[str, Any], kind: str) -> Any:
    marker = SUPPORT_KINDS[kind][0]
    colour = LIMIT if kind == "prescribed" else SUPPORT
    return bq.Scatter(
        x=[],
        y=[],
        scales=scales,
        marker=marker,
        colors=[colour],
        default_size=140 if kind == "fixed" else 110,
        fill=kind != "spring",
        stroke=colour,
        display_names=True,
    )


class Elevation:
    """The to-scale elevation of one shaft, its markers labelled, with a legend beneath."""

    def __init__(self) -> None:
        self.x_scale = bq.LinearScale()
        self.y_scale = bq.LinearScale()
        scales = {"x": self.x_scale, "y": self.y_scale}
        self.segments = bq.Lines(
            x=[[0, 1]],
            y=[[0, 0]],
            scales=scales,
            colors=[SHAFT],
            fill="inside",
            fill_colors=[SHAFT_FILL],
            fill_opacities=[0.6],
            stroke_width=1.2,
        )
        self.centre = bq.Lines(
            x=[0, 1],
            y=[0, 0],
            scales=scales,
            colors=[SHAFT],
            line_style="dash_dotted",
            stroke_width=0.8,
        )
        self.supports = {kind: _support_mark(scales, kind) for kind in SUPPORT_KINDS}
        self.gears = bq.Lines(
            x=[[0, 0]],
            y=[[0, 0]],
            scales=scales,
            colors=[SUPPORT],
            stroke_width=5,
            visible=False,
            labels_visibility="label",
        )
        self.torques = bq.Scatter(
            x=[],
            y=[],
            scales=scales,
            marker="circle",
            colors=[LOAD],
            default_size=90,
            stroke=SUPPORT,
        )
        self.distributed = bq.Lines(
            x=[[0, 0]],
            y=[[0, 0]],
            scales=scales,
            colors=[LOAD],
            stroke_width=6,
            opacities=[0.8],
            visible=False,
            labels_visibility="label",
        )
        self.discs = bq.Scatter(
            x=[],
            y=[],
            scales=scales,
            marker="ellipse",
            colors=[SHAFT],
            stroke=SUPPORT,
            default_size=110,
            display_names=True,
            visible=False,
        )
        self.failing = failing_mark(
            scales, bq.Tooltip(fields=["name"], labels=["fails"], formats=[""])
        )
        self.failing.display_names = True
        self.figure = bq.Figure(
            marks=[
                self.centre,
                self.segments,
                self.gears,
                self.distributed,
                *self.supports.values(),
                self.discs,
                self.torques,
                self.failing,
            ],
            axes=[
                number_axis(self.x_scale, "x"),
                number_axis(self.y_scale, "radius", side="left", label_offset="45px"),
            ],
            title="Elevation (to scale)",
            animation_duration=0,
            fig_margin=_ELEVATION_MARGIN,
            layout=Layout(width=f"{_ELEVATION_WIDTH}px", height=f"{_ELEVATION_HEIGHT}px"),
            title_style={"font-size": "13px"},
        )
        self.figure.add_class("wb-chart-elevation")
        self.legend = Legend("elevation")
        #: Heights (panel units) the markers were last drawn at: supports below the shaft,
        #: loads above it; and the outer radius at each segment's middle.
        self.marker_y = self.load_y = 0.0
        self.mid_radius = np.zeros(0)

    def draw(self, model: Model, shaft_number: int, result: str, report: CheckReport) -> None:
        """Draw one shaft of ``model`` with the loads of ``result`` and the failing segments."""
        units = model.units
        shaft = model.shafts[shaft_number]
        length = units.from_si(shaft.length, "length")
        bounds = units.from_si(shaft.boundaries, "length")
        length_unit = unit_label(units, "length")
        outlines_x, outlines_y = [], []
        fractions = np.linspace(0.0, 1.0, _SAMPLES)
        radius_max = 0.0
        for number, segment in enumerate(shaft.segments):
            radius = units.from_si(segment.outer_radius_at(fractions), "length")
            radius_max = max(radius_max, float(radius.max()))
            along = bounds[number] + (bounds[number + 1] - bounds[number]) * fractions
            outlines_x.append(np.concatenate([along, along[::-1], along[:1]]))
            outlines_y.append(np.concatenate([radius, -radius[::-1], radius[:1]]))
        self.segments.x, self.segments.y = np.array(outlines_x), np.array(outlines_y)
        self.centre.x, self.centre.y = [0.0, length], [0.0, 0.0]
        # Same scale on both axes for the figure's fixed plot area.
        half_height = 0.5 * _PLOT_RATIO * length * 1.04
        self.x_scale.min, self.x_scale.max = -0.02 * length, 1.02 * length
        self.y_scale.min, self.y_scale.max = -half_height, half_height
        self.figure.axes[0].label = f"x [{length_unit}]"
        self.figure.axes[1].label = f"r [{length_unit}]"
        entries = [LegendEntry("shaft (to scale)", SHAFT, "solid")]
        entries += self._draw_failing(report, shaft, units, len(shaft.segments))
        self.mid_radius = np.array(outlines_y)[:, _SAMPLES // 2]  # fraction 0.5 of each
        marker_y = -max(radius_max * 1.25, 0.08 * half_height)
        entries += self._draw_supports(model, shaft.id, units, marker_y)
        entries += self._draw_gears(model, shaft.id, units)
        entries += self._draw_discs(model, shaft.id, units, 0.5 * marker_y)
        load_y = max(radius_max * 1.35, 0.1 * half_height)
        self.marker_y, self.load_y = marker_y, load_y
        entries += self._draw_loads(model, shaft.id, result, units, load_y)
        self.legend.show(entries)

    def _draw_failing(
        self, report: CheckReport, shaft: Any, units: Any, count: int
    ) -> list[LegendEntry]:
        """Segments failing a check in any result: failing colour, and a cross naming the check."""
        governing = report.segment_utilisation()
        failing = [
            governing[(shaft.id, number)]
            for number in range(count)
            if (shaft.id, number) in governing and not governing[(shaft.id, number)].passes
        ]
        numbers = {check.segment for check in failing}
        set_list(self.segments, "colors", [FAIL if n in numbers else SHAFT for n in range(count)])
        fills = [FAIL if n in numbers else SHAFT_FILL for n in range(count)]
        set_list(self.segments, "fill_colors", fills)
        self.failing.x = units.from_si(np.array([c.x for c in failing], dtype=float), "length")
        self.failing.y = np.zeros(len(failing))
        names = [
            f"{check.kind.replace('_', ' ')} fails ({check.utilisation:.2f}, {check.result})"
            for check in failing
        ]
        set_list(self.failing, "names", names)
        self.failing.visible = bool(failing)
        if not failing:
            return []
        return [LegendEntry("fails a check (in some result)", FAIL, "", FAIL_MARKER)]

    def _draw_supports(
        self, model: Model, shaft_id: str, units: Any, marker_y: float
    ) -> list[LegendEntry]:
        length_unit = unit_label(units, "length")
        kinds: dict[str, list[float]] = {kind: [] for kind in SUPPORT_KINDS}
        for support in model.supports:
            if support.shaft != shaft_id:
                continue
            kind: str = support.kind
            if kind == "fixed" and support.rotation != 0.0:
                kind = "prescribed"
            kinds[kind].append(float(units.from_si(support.x, "length")))
        entries = []
        for kind, mark in self.supports.items():
            _, name, words = SUPPORT_KINDS[kind]
            mark.x = np.array(kinds[kind])
            mark.y = np.full(len(kinds[kind]), marker_y)
            set_list(mark, "names", [name] * len(kinds[kind]))
            mark.visible = bool(kinds[kind])
            set_tooltip(mark, [f"{words} at x [{length_unit}]"], ("x",))
            if kinds[kind]:
                entries.append(LegendEntry(words, mark.colors[0], "", mark.marker))
        return entries

    def _draw_gears(self, model: Model, shaft_id: str, units: Any) -> list[LegendEntry]:
        length_unit = unit_label(units, "length")
        gear_x, gear_y, names = [], [], []
        for number, gear in enumerate(model.gears):
            for end, point in (("a", gear.a), ("b", gear.b)):
                if point.shaft == shaft_id:
                    x = float(units.from_si(point.x, "length"))
                    radius = float(units.from_si(point.radius, "length"))
                    gear_x.append([x, x])
                    gear_y.append([-radius, radius])
                    names.append(f"gear {number}{end}, r {format_number(radius)} {length_unit}")
        self.gears.visible = bool(gear_x)
        if not gear_x:
            return []
        self.gears.x, self.gears.y = np.array(gear_x), np.array(gear_y)
        set_list(self.gears, "labels", names)
        name_tooltip(self.gears, "gear (pitch diameter)")
        return [LegendEntry("gear (pitch diameter)", SUPPORT, "solid")]

    def _draw_discs(
        self, model: Model, shaft_id: str, units: Any, disc_y: float
    ) -> list[LegendEntry]:
        """The discs (for vibration) on the shaft, below its axis, each named with its inertia."""
        discs = [disc for disc in model.discs if disc.shaft == shaft_id]
        self.discs.visible = bool(discs)
        if not discs:
            return []
        self.discs.x = units.from_si(np.array([disc.x for disc in discs], dtype=float), "length")
        self.discs.y = np.full(len(discs), disc_y)
        inertia = units.from_si(np.array([disc.inertia for disc in discs], dtype=float), "inertia")
        unit = unit_label(units, "inertia")
        set_list(self.discs, "names", [f"disc {format_number(j)} {unit}" for j in inertia.tolist()])
        set_tooltip(self.discs, [f"disc at x [{unit_label(units, 'length')}]"], ("x",))
        return [LegendEntry("disc (vibration)", SHAFT, "", "ellipse")]

    def _draw_loads(
        self, model: Model, shaft_id: str, result: str, units: Any, load_y: float
    ) -> list[LegendEntry]:
        length_unit = unit_label(units, "length")
        torque_unit = unit_label(units, "torque")
        torques_x, torques_t, spans_x = [], [], []
        for case, factor in _cases_of(model, result):
            for torque in case.torques:
                if torque.shaft == shaft_id:
                    torques_x.append(float(units.from_si(torque.x, "length")))
                    torques_t.append(float(units.from_si(torque.torque * factor, "torque")))
            for load in case.distributed:
                if load.shaft == shaft_id:
                    spans_x.append(units.from_si(np.array([load.start, load.end]), "length"))
        self.torques.x = np.array(torques_x)
        self.torques.y = np.full(len(torques_x), load_y)
        self.torques.default_size = 90
        set_tooltip(self.torques, [f"point torque at x [{length_unit}]"], ("x",))
        set_list(self.torques, "names", [f"{format_number(t)} {torque_unit}" for t in torques_t])
        self.torques.display_names = bool(torques_x)
        self.torques.visible = bool(torques_x)
        self.distributed.visible = bool(spans_x)
        entries = []
        if torques_x:
            entries.append(LegendEntry("point torque (its value beside it)", LOAD, "", "circle"))
        if spans_x:
            self.distributed.x = np.array(spans_x)
            self.distributed.y = np.full((len(spans_x), 2), load_y)
            self.distributed.labels = ["distributed torque"] * len(spans_x)
            name_tooltip(self.distributed, "load")
            entries.append(LegendEntry("distributed torque", LOAD, "solid"))
        return entries


def _cases_of(model: Model, result: str) -> list[tuple[Any, float]]:
    """The load cases behind a result, with their factors."""
    for case in model.load_cases:
        if case.name == result:
            return [(case, 1.0)]
    by_name = {case.name: case for case in model.load_cases}
    for combination in model.combinations:
        if combination.name == result:
            return [(by_name[name], factor) for name, factor in combination.factors]
    return []
