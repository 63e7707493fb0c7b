"""The panel's main charts: elevation, internal torque, angle of twist, shear stress, utilisation.

Everything drawn comes from the solver's model, results and check report, converted to the
panel's units; nothing here computes mechanics. Colours and shared helpers:
:mod:`workbench.panel.plotting`; the Modes and Fatigue sections have modules of their own.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from ipywidgets import Layout

from workbench.design.checks import CheckReport
from workbench.panel.document import unit_label
from workbench.panel.plotting import (
    BASELINE,
    CURRENT,
    LIMIT,
    LOAD,
    SHAFT,
    SHAFT_FILL,
    SUPPORT,
    bq,
    held,
    set_tooltip,
    xy_figure,
)
from workbench.solver.analysis import Results
from workbench.solver.model import Model

#: Plot area of the elevation (px): the y range is set so lengths draw at one scale on both axes.
_ELEVATION_WIDTH, _ELEVATION_HEIGHT = 760, 210
_ELEVATION_MARGIN = {"top": 20, "bottom": 36, "left": 60, "right": 20}
_PLOT_RATIO = (_ELEVATION_HEIGHT - 56) / (_ELEVATION_WIDTH - 80)
_SAMPLES = 17


class ResultChart:
    """One x–y result chart (now, baseline, optional limit line) along the chosen shaft."""

    def __init__(self, title: str, key: str) -> None:
        self.key = key
        self.x_scale, self.y_scale = bq.LinearScale(), bq.LinearScale()
        scales = {"x": self.x_scale, "y": self.y_scale}
        self.baseline = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[BASELINE],
            line_style="dashed",
            stroke_width=1.5,
            visible=False,
        )
        self.limit = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[LIMIT],
            stroke_width=1.5,
            line_style="dash_dotted",
            visible=False,
        )
        self.now = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[CURRENT],
            stroke_width=2.2,
            fill="bottom",
            fill_opacities=[0.12],
            fill_colors=[SHAFT_FILL],
        )
        self.figure = xy_figure(
            [self.baseline, self.limit, self.now], self.x_scale, self.y_scale, "x", title, title
        )
        self.figure.add_class(f"wb-chart-{key}")

    def set_labels(self, x_label: str, y_label: str) -> None:
        self.figure.axes[0].label = x_label
        self.figure.axes[1].label = y_label
        set_tooltip(self.now, [x_label, y_label])
        set_tooltip(self.baseline, [x_label, "baseline " + y_label])
        set_tooltip(self.limit, [x_label, "allowable " + y_label])


class Charts:
    """Every chart of the panel, redrawn from (model, results, report) in one synced update."""

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
        self.fixed = bq.Scatter(
            x=[], y=[], scales=scales, marker="triangle-up", colors=[SUPPORT], default_size=140
        )
        self.spring = bq.Scatter(
            x=[],
            y=[],
            scales=scales,
            marker="diamond",
            colors=[SUPPORT],
            default_size=120,
            fill=False,
            stroke=SUPPORT,
        )
        self.prescribed = bq.Scatter(
            x=[], y=[], scales=scales, marker="square", colors=[LIMIT], default_size=110
        )
        self.gears = bq.Lines(
            x=[[0, 0]], y=[[0, 0]], scales=scales, colors=[SUPPORT], stroke_width=5, visible=False
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
        )
        self.elevation = bq.Figure(
            marks=[
                self.centre,
                self.segments,
                self.gears,
                self.distributed,
                self.fixed,
                self.spring,
                self.prescribed,
                self.torques,
            ],
            axes=[
                bq.Axis(scale=self.x_scale, label="x"),
                bq.Axis(scale=self.y_scale, side="left", label="radius", label_offset="45px"),
            ],
            title="Elevation (to scale)",
            animation_duration=0,
            fig_margin=_ELEVATION_MARGIN,
            layout=Layout(width=f"{_ELEVATION_WIDTH}px", height=f"{_ELEVATION_HEIGHT}px"),
            title_style={"font-size": "13px"},
        )
        self.elevation.add_class("wb-chart-elevation")
        self.torque = ResultChart("Internal torque", "torque")
        self.angle = ResultChart("Angle of twist", "angle")
        self.stress = ResultChart("Shear stress", "stress")
        self.bar_x, self.bar_y = bq.OrdinalScale(), bq.LinearScale(min=0.0)
        bar_scales = {"x": self.bar_x, "y": self.bar_y}
        self.bars = bq.Bars(
            x=[0],
            y=[0.0],
            scales=bar_scales,
            colors=[SHAFT],
            padding=0.25,
            tooltip=bq.Tooltip(
                fields=["x", "y"], labels=["segment", "utilisation"], formats=["", ".3f"]
            ),
        )
        self.bar_baseline = bq.Scatter(
            x=[],
            y=[],
            scales=bar_scales,
            marker="cross",
            colors=[BASELINE],
            default_size=80,
            visible=False,
            tooltip=bq.Tooltip(
                fields=["x", "y"], labels=["segment", "baseline"], formats=["", ".3f"]
            ),
        )
        self.bar_limit = bq.Lines(
            x=[0], y=[1.0], scales=bar_scales, colors=[LIMIT], line_style="dash_dotted"
        )
        self.utilisation = xy_figure(
            [self.bars, self.bar_limit, self.bar_baseline],
            self.bar_x,
            self.bar_y,
            "segment",
            "utilisation",
            "Governing utilisation by segment",
        )
        self.utilisation.add_class("wb-chart-utilisation")
        self.figures = [
            self.elevation,
            self.torque.figure,
            self.angle.figure,
            self.stress.figure,
            self.utilisation,
        ]

    def draw(
        self,
        model: Model,
        results: Results,
        report: CheckReport,
        result: str,
        shaft_number: int,
        baseline: tuple[Results, CheckReport] | None,
    ) -> None:
        """Redraw every chart; each widget of a figure sends its changes in one message."""
        units = model.units
        shaft = model.shafts[shaft_number]
        length_unit = unit_label(units, "length")
        with held(self.elevation):
            self._draw_elevation(model, shaft_number, result)
        row = results.index(result)
        window = results._window(shaft_number)
        x = units.from_si(results.mesh.station_x[window], "length")
        x_label = f"x [{length_unit}]"
        series = {
            "torque": (results.torque, "torque", f"T [{unit_label(units, 'torque')}]"),
            "angle": (results.angle, "angle", f"θ [{unit_label(units, 'angle')}]"),
            "stress": (results.shear_stress, "stress", f"τ [{unit_label(units, 'stress')}]"),
        }
        base = None
        if baseline is not None and shaft.id in baseline[0].model._shaft_index:
            base_results = baseline[0]
            base_number = base_results.model.shaft_number(shaft.id)
            base_window = base_results._window(base_number)
            base_row = base_results.index(result) if result in base_results.names else 0
            base = (base_results, base_window, base_row)
        for chart in (self.torque, self.angle, self.stress):
            values, quantity, y_label = series[chart.key]
            with held(chart.figure):
                chart.set_labels(x_label, y_label)
                chart.now.x, chart.now.y = x, units.from_si(values[row, window], quantity)
                if base is not None:
                    base_results, base_window, base_row = base
                    source = {
                        "torque": base_results.torque,
                        "angle": base_results.angle,
                        "stress": base_results.shear_stress,
                    }[chart.key]
                    chart.baseline.x = units.from_si(
                        base_results.mesh.station_x[base_window], "length"
                    )
                    chart.baseline.y = units.from_si(source[base_row, base_window], quantity)
                chart.baseline.visible = base is not None
                if chart.key == "stress":
                    self._draw_allowable(report, shaft, result)
        with held(self.utilisation):
            labels, now = segment_utilisation(report, shaft.id, len(shaft.segments), result)
            self.bars.x, self.bars.y = labels, now
            self.bar_limit.x, self.bar_limit.y = labels, np.ones(len(labels))
            if baseline is not None:
                base_labels, base_values = segment_utilisation(
                    baseline[1], shaft.id, len(shaft.segments), result
                )
                self.bar_baseline.x, self.bar_baseline.y = base_labels, base_values
            self.bar_baseline.visible = baseline is not None

    def _draw_allowable(self, report: CheckReport, shaft: Any, result: str) -> None:
        units = report.results.model.units
        limits = {
            c.segment: c.limit
            for c in report.checks
            if c.kind == "shear_stress" and c.shaft == shaft.id and c.result == result
        }
        bounds = units.from_si(shaft.boundaries, "length")
        xs, ys = [], []
        for number in range(len(shaft.segments)):
            if number in limits:
                limit = units.from_si(limits[number], "stress")
                xs += [bounds[number], bounds[number + 1]]
                ys += [limit, limit]
        self.stress.limit.x, self.stress.limit.y = np.array(xs), np.array(ys)
        self.stress.limit.visible = bool(xs)

    def _draw_elevation(self, model: Model, shaft_number: int, result: str) -> None:
        units = model.units
        shaft = model.shafts[shaft_number]
        length = units.from_si(shaft.length, "length")
        bounds = units.from_si(shaft.boundaries, "length")
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
        length_unit = unit_label(units, "length")
        self.elevation.axes[0].label = f"x [{length_unit}]"
        self.elevation.axes[1].label = f"r [{length_unit}]"
        marker_y = -max(radius_max * 1.25, 0.08 * half_height)
        kinds: dict[str, list[float]] = {"fixed": [], "spring": [], "prescribed": []}
        for support in model.supports:
            if support.shaft != shaft.id:
                continue
            kind: str = support.kind
            if kind == "fixed" and support.rotation != 0.0:
                kind = "prescribed"
            kinds[kind].append(float(units.from_si(support.x, "length")))
        for kind, mark in (
            ("fixed", self.fixed),
            ("spring", self.spring),
            ("prescribed", self.prescribed),
        ):
            mark.x = np.array(kinds[kind])
            mark.y = np.full(len(kinds[kind]), marker_y)
            set_tooltip(mark, [f"{kind} support at x [{length_unit}]"], ("x",))
        gear_x, gear_y = [], []
        for gear in model.gears:
            for point in (gear.a, gear.b):
                if point.shaft == shaft.id:
                    x = float(units.from_si(point.x, "length"))
                    radius = float(units.from_si(point.radius, "length"))
                    gear_x.append([x, x])
                    gear_y.append([-radius, radius])
        self.gears.visible = bool(gear_x)
        if gear_x:
            self.gears.x, self.gears.y = np.array(gear_x), np.array(gear_y)
            set_tooltip(self.gears, [f"gear at x [{length_unit}]", "pitch radius"])
        torques_x, torques_t, spans_x = [], [], []
        for case, factor in _cases_of(model, result):
            for torque in case.torques:
                if torque.shaft == shaft.id:
                    torques_x.append(float(units.from_si(torque.x, "length")))
                    torques_t.append(float(units.from_si(torque.torque * factor, "torque")))
            for load in case.distributed:
                if load.shaft == shaft.id:
                    spans_x.append(units.from_si(np.array([load.start, load.end]), "length"))
        load_y = max(radius_max * 1.35, 0.1 * half_height)
        self.torques.x = np.array(torques_x)
        self.torques.y = np.full(len(torques_x), load_y)
        self.torques.default_size = 90
        set_tooltip(self.torques, [f"point torque at x [{length_unit}]"], ("x",))
        self.torques.names = [f"{t:.4g} {unit_label(units, 'torque')}" for t in torques_t]
        self.torques.display_names = bool(torques_x)
        self.distributed.visible = bool(spans_x)
        if spans_x:
            self.distributed.x = np.array(spans_x)
            self.distributed.y = np.full((len(spans_x), 2), load_y)
            set_tooltip(self.distributed, [f"distributed torque x [{length_unit}]", "r"])


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


def segment_utilisation(
    report: CheckReport, shaft_id: str, count: int, result: str
) -> tuple[np.ndarray, np.ndarray]:
    """(segment numbers, governing utilisation of each segment over its checks in ``result``)."""
    values = np.zeros(count)
    for check in report.checks:
        if check.shaft == shaft_id and check.result == result and check.segment is not None:
            values[check.segment] = max(values[check.segment], check.utilisation)
    return np.arange(count), values
