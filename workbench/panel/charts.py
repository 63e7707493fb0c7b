"""The panel's charts (bqplot): elevation, internal torque, angle of twist, shear stress, utilisation.

Everything drawn comes from the solver's model, results and check report, converted to the
panel's units; nothing here computes mechanics. Visual language of our own: the shaft in slate
blue, loads in amber, supports in charcoal, the baseline dashed in grey, limits in brick red.
"""

from __future__ import annotations

import warnings
from collections.abc import Iterator
from contextlib import ExitStack, contextmanager
from typing import Any

import numpy as np
from ipywidgets import Layout

from workbench.design.checks import CheckReport
from workbench.panel.document import unit_label
from workbench.solver.analysis import Results
from workbench.solver.model import Model

with warnings.catch_warnings():
    # bqscales 0.3 sets trait metadata the old way at import; nothing for us to act on.
    warnings.filterwarnings("ignore", category=DeprecationWarning, module="traitlets")
    warnings.filterwarnings("ignore", message="metadata .* was set from the constructor")
    import bqplot as bq

SHAFT = "#3d5a80"
SHAFT_FILL = "#98c1d9"
LOAD = "#e09f3e"
SUPPORT = "#33312e"
BASELINE = "#9a9a9a"
LIMIT = "#9e2a2b"
CURRENT = "#3d5a80"

#: Plot area of the elevation (px): the y range is set so lengths draw at one scale on both axes.
_ELEVATION_WIDTH, _ELEVATION_HEIGHT = 760, 210
_ELEVATION_MARGIN = {"top": 20, "bottom": 36, "left": 60, "right": 20}
_PLOT_RATIO = (_ELEVATION_HEIGHT - 56) / (_ELEVATION_WIDTH - 80)
_SAMPLES = 17


@contextmanager
def _held(figure: bq.Figure) -> Iterator[None]:
    """Hold the sync of a figure, its marks, their scales and its axes for one block.

    A mark whose x and y were sent one at a time would be drawn in between with the new x and
    the old y; held, each widget sends one message with all its changes when the block ends.
    """
    widgets: dict[int, Any] = {id(figure): figure}
    for item in [*figure.marks, *figure.axes]:
        widgets[id(item)] = item
        scales = item.scales.values() if hasattr(item, "scales") else [item.scale]
        for scale in scales:
            widgets[id(scale)] = scale
    with ExitStack() as stack:
        for widget in widgets.values():
            stack.enter_context(widget.hold_sync())
        yield


def _set_tooltip(
    mark: Any, labels: list[str], fields: tuple[str, ...] = ("x", "y"), fmt: str = ".4g"
) -> None:
    """Give ``mark`` a tooltip with these labels, keeping the one it has when they match.

    A tooltip is a widget of its own: making a new one on every redraw costs about a millisecond
    and a front-end widget each time, so it is only replaced when its text changes.
    """
    tooltip = mark.tooltip
    if tooltip is not None and list(tooltip.labels) == labels and tuple(tooltip.fields) == fields:
        return
    mark.tooltip = bq.Tooltip(fields=list(fields), labels=labels, formats=[fmt] * len(fields))


def _figure(
    marks: list[Any],
    x_scale: Any,
    y_scale: Any,
    x_label: str,
    y_label: str,
    title: str,
    height: int = 220,
) -> bq.Figure:
    axes = [
        bq.Axis(scale=x_scale, label=x_label, grid_lines="none"),
        bq.Axis(
            scale=y_scale, label=y_label, side="left", grid_lines="dashed", label_offset="45px"
        ),
    ]
    return bq.Figure(
        marks=marks,
        axes=axes,
        title=title,
        animation_duration=0,
        fig_margin={"top": 30, "bottom": 40, "left": 65, "right": 15},
        layout=Layout(width="100%", min_width="340px", height=f"{height}px"),
        title_style={"font-size": "13px"},
    )


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
        self.figure = _figure(
            [self.baseline, self.limit, self.now], self.x_scale, self.y_scale, "x", title, title
        )
        self.figure.add_class(f"wb-chart-{key}")

    def set_labels(self, x_label: str, y_label: str) -> None:
        self.figure.axes[0].label = x_label
        self.figure.axes[1].label = y_label
        _set_tooltip(self.now, [x_label, y_label])
        _set_tooltip(self.baseline, [x_label, "baseline " + y_label])
        _set_tooltip(self.limit, [x_label, "allowable " + y_label])


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
        self.utilisation = _figure(
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
        with _held(self.elevation):
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
            with _held(chart.figure):
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
        with _held(self.utilisation):
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
            _set_tooltip(mark, [f"{kind} support at x [{length_unit}]"], ("x",))
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
            _set_tooltip(self.gears, [f"gear at x [{length_unit}]", "pitch radius"])
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
        _set_tooltip(self.torques, [f"point torque at x [{length_unit}]"], ("x",))
        self.torques.names = [f"{t:.4g} {unit_label(units, 'torque')}" for t in torques_t]
        self.torques.display_names = bool(torques_x)
        self.distributed.visible = bool(spans_x)
        if spans_x:
            self.distributed.x = np.array(spans_x)
            self.distributed.y = np.full((len(spans_x), 2), load_y)
            _set_tooltip(self.distributed, [f"distributed torque x [{length_unit}]", "r"])


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


#: Colours of the mode shapes, lowest mode first (our own ramp from slate blue to amber).
MODE_COLOURS = ["#3d5a80", "#5c8a8a", "#8a6f3e", "#e09f3e", "#6b4e71", "#9a9a9a"]
#: How many of the lowest modes the mode-shape chart draws.
MODES_SHOWN = 4
#: Colours of the fatigue criteria lines.
CRITERION_COLOURS = {
    "goodman": "#3d5a80",
    "gerber": "#5c8a8a",
    "asme_elliptic": "#6b4e71",
    "soderberg": "#8a6f3e",
    "langer": LIMIT,
}
CRITERION_NAMES = {
    "goodman": "modified Goodman",
    "gerber": "Gerber",
    "asme_elliptic": "ASME elliptic",
    "soderberg": "Soderberg",
    "langer": "Langer (first-cycle yield)",
}
_CURVE_POINTS = 61


def rpm(angular_frequency: Any) -> Any:
    """Revolutions per minute of a circular frequency or speed (rad/s)."""
    return np.asarray(angular_frequency, dtype=float) * 60.0 / (2.0 * np.pi)


def criteria_lines(
    endurance_shear: float, ultimate_shear: float, yield_shear: float
) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """(τm, τa) of each failure line of the fatigue diagram, in the units of the strengths given.

    Parameters
    ----------
    endurance_shear, ultimate_shear, yield_shear
        Sse, Ssu, Ssy (any one stress unit).

    Returns
    -------
    dict
        ``goodman``: Sse–Ssu line; ``gerber``: τa = Sse·(1 − (τm/Ssu)²); ``asme_elliptic``:
        (τa/Sse)² + (τm/Ssy)² = 1; ``soderberg``: Sse–Ssy line; ``langer``: Ssy–Ssy line.

    References
    ----------
    .. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
       §6-12, Table 6-6 and 6-7 (the failure criteria for fluctuating stress, written here for
       shear strengths as in §7-4).
    """
    # Every line has the same number of points, so that one mark can hold them all.
    mean = np.linspace(0.0, 1.0, _CURVE_POINTS)
    return {
        "goodman": (mean * ultimate_shear, endurance_shear * (1.0 - mean)),
        "gerber": (mean * ultimate_shear, endurance_shear * (1.0 - mean**2)),
        "asme_elliptic": (
            mean * yield_shear,
            endurance_shear * np.sqrt(np.clip(1.0 - mean**2, 0.0, None)),
        ),
        "soderberg": (mean * yield_shear, endurance_shear * (1.0 - mean)),
        "langer": (mean * yield_shear, yield_shear * (1.0 - mean)),
    }


class ModesChart:
    """Mode shapes along the shaft shown, and natural frequencies against running-speed bands."""

    def __init__(self) -> None:
        self.x_scale, self.y_scale = bq.LinearScale(), bq.LinearScale(min=-1.1, max=1.1)
        scales = {"x": self.x_scale, "y": self.y_scale}
        self.flexible = bq.Lines(
            x=[[0.0, 1.0]],
            y=[[0.0, 0.0]],
            scales=scales,
            colors=MODE_COLOURS,
            stroke_width=2.0,
            display_legend=True,
            labels=["mode"],
            marker="circle",
            marker_size=12,
        )
        self.rigid = bq.Lines(
            x=[[0.0, 1.0]],
            y=[[0.0, 0.0]],
            scales=scales,
            colors=[SUPPORT],
            line_style="dashed",
            stroke_width=1.5,
            display_legend=True,
            labels=["rigid body"],
            visible=False,
        )
        self.shapes = _figure(
            [self.flexible, self.rigid],
            self.x_scale,
            self.y_scale,
            "x",
            "normalised angle",
            "Mode shapes (largest |angle| = 1)",
            height=260,
        )
        self.shapes.legend_location = "top-right"
        self.shapes.add_class("wb-chart-modes")
        self.speed_scale = bq.LogScale()
        self.band_y = bq.LinearScale(min=0.0, max=1.0)
        band_scales = {"x": self.speed_scale, "y": self.band_y}
        self.widened = bq.Lines(
            x=[[1.0, 1.0]],
            y=[[0.0, 1.0]],
            scales=band_scales,
            colors=[LOAD],
            fill="inside",
            fill_colors=[LOAD],
            fill_opacities=[0.12],
            line_style="dashed",
            stroke_width=1.0,
            visible=False,
        )
        self.bands = bq.Lines(
            x=[[1.0, 1.0]],
            y=[[0.0, 1.0]],
            scales=band_scales,
            colors=[LOAD],
            fill="inside",
            fill_colors=[LOAD],
            fill_opacities=[0.45],
            stroke_width=1.0,
            visible=False,
        )
        self.frequencies = bq.Lines(
            x=[[1.0, 1.0]],
            y=[[0.0, 1.0]],
            scales=band_scales,
            colors=[SHAFT],
            stroke_width=2.2,
            visible=False,
        )
        self.frequency_marks = bq.Scatter(
            x=[],
            y=[],
            scales=band_scales,
            marker="diamond",
            colors=[SHAFT],
            default_size=60,
            tooltip=bq.Tooltip(fields=["x"], labels=["natural frequency [rpm]"], formats=[".4g"]),
        )
        self.against = bq.Figure(
            marks=[self.widened, self.bands, self.frequencies, self.frequency_marks],
            axes=[
                bq.Axis(scale=self.speed_scale, label="speed, frequency [rpm]", grid_lines="none"),
            ],
            title="Natural frequencies against running-speed bands (±margin dashed)",
            animation_duration=0,
            fig_margin={"top": 30, "bottom": 40, "left": 20, "right": 20},
            layout=Layout(width="100%", min_width="340px", height="150px"),
            title_style={"font-size": "13px"},
        )
        self.against.add_class("wb-chart-frequencies")
        self.figures = [self.shapes, self.against]

    def draw(self, modes: Any, shaft_number: int, speeds: Any, margin: float) -> None:
        """Draw the lowest :data:`MODES_SHOWN` modes along one shaft and every frequency."""
        units = modes.model.units
        shaft = modes.model.shafts[shaft_number]
        length_unit = unit_label(units, "length")
        shown = range(min(MODES_SHOWN, len(modes)))
        flexible = [mode for mode in shown if not modes.rigid_body[mode]]
        rigid = [mode for mode in shown if modes.rigid_body[mode]]
        with _held(self.shapes):
            self.shapes.axes[0].label = f"x [{length_unit}]"
            for mark, chosen, colours in (
                (self.flexible, flexible, MODE_COLOURS),
                (self.rigid, rigid, [SUPPORT]),
            ):
                mark.visible = bool(chosen)
                if not chosen:
                    continue
                xs, ys = [], []
                for mode in chosen:
                    x, angle = modes.shape(mode, shaft.id)
                    xs.append(units.from_si(x, "length"))
                    ys.append(angle)
                mark.x, mark.y = np.array(xs), np.array(ys)
                mark.colors = [colours[n % len(colours)] for n in range(len(chosen))]
                mark.labels = [
                    f"mode {mode + 1}: rigid body (0 Hz)"
                    if modes.rigid_body[mode]
                    else f"mode {mode + 1}: {modes.frequency[mode]:.4g} Hz"
                    for mode in chosen
                ]
                _set_tooltip(mark, [f"x [{length_unit}]", "normalised angle"])
        natural = rpm(modes.angular_frequency[~modes.rigid_body])
        lows = np.array([rpm(speed.minimum) for speed in speeds])
        highs = np.array([rpm(speed.maximum) for speed in speeds])
        wide_low, wide_high = lows * (1.0 - margin), highs * (1.0 + margin)
        positive = [value for value in [*natural, *wide_low, *highs] if value > 0.0]
        floor = 0.5 * min(positive) if positive else 1.0
        with _held(self.against):
            self.frequencies.visible = bool(len(natural))
            if len(natural):
                self.frequencies.x = np.repeat(natural[:, None], 2, axis=1)
                self.frequencies.y = np.tile([0.0, 1.0], (len(natural), 1))
            self.frequency_marks.x = natural
            self.frequency_marks.y = np.full(len(natural), 0.5)
            for mark, bottom, high in (
                (self.widened, wide_low, wide_high),
                (self.bands, lows, highs),
            ):
                mark.visible = bool(len(bottom))
                if len(bottom):
                    low = np.maximum(bottom, floor)  # a band from 0 starts at the axis' left end
                    mark.x = np.stack([low, high, high, low, low], axis=1)
                    mark.y = np.tile([0.05, 0.05, 0.95, 0.95, 0.05], (len(low), 1))
                    mark.labels = [speed.name for speed in speeds]
            self.speed_scale.min = floor
            self.speed_scale.max = 2.0 * max(positive) if positive else 10.0


class FatigueChart:
    """Alternating against mean shear stress: the failure lines and the operating points."""

    def __init__(self) -> None:
        self.x_scale, self.y_scale = bq.LinearScale(min=0.0), bq.LinearScale(min=0.0)
        scales = {"x": self.x_scale, "y": self.y_scale}
        self.lines = bq.Lines(
            x=[[0.0, 1.0]],
            y=[[1.0, 0.0]],
            scales=scales,
            colors=list(CRITERION_COLOURS.values()),
            stroke_width=1.6,
            display_legend=True,
            labels=list(CRITERION_NAMES.values()),
        )
        self.chosen = bq.Lines(
            x=[0.0, 1.0],
            y=[1.0, 0.0],
            scales=scales,
            colors=[SHAFT],
            stroke_width=4.0,
            opacities=[0.35],
        )
        self.others = bq.Scatter(
            x=[],
            y=[],
            scales=scales,
            marker="circle",
            colors=[BASELINE],
            default_size=40,
        )
        self.point = bq.Scatter(
            x=[0.0],
            y=[0.0],
            scales=scales,
            marker="circle",
            colors=[LIMIT],
            default_size=110,
            stroke=SUPPORT,
        )
        self.figure = _figure(
            [self.chosen, self.lines, self.others, self.point],
            self.x_scale,
            self.y_scale,
            "τm",
            "τa",
            "Fatigue diagram",
            height=300,
        )
        self.figure.legend_location = "top-right"
        self.figure.add_class("wb-chart-fatigue")
        self.governing: Any = None

    def draw(self, points: Any, units: Any, criterion: str) -> None:
        """Draw the lines of the governing point's strengths and every point (stress units).

        ``points`` are the :class:`~workbench.design.fatigue_check.FatiguePoint` of the shaft
        shown, the governing one (lowest factor of safety by the criterion or Langer) first.
        """
        governing = points[0]
        self.governing = governing
        factors = governing.factors
        stress_unit = unit_label(units, "stress")

        def stress(value: Any) -> Any:
            return units.from_si(value, "stress")

        lines = criteria_lines(
            float(stress(factors.endurance_shear)),
            float(stress(factors.ultimate_shear)),
            float(stress(factors.yield_shear)),
        )
        x_label, y_label = f"τm [{stress_unit}]", f"τa [{stress_unit}]"
        with _held(self.figure):
            self.figure.axes[0].label = x_label
            self.figure.axes[1].label = y_label
            self.lines.x = np.array([line[0] for line in lines.values()])
            self.lines.y = np.array([line[1] for line in lines.values()])
            self.chosen.x, self.chosen.y = lines[criterion]
            self.point.x = np.array([float(stress(factors.mean_shear))])
            self.point.y = np.array([float(stress(factors.alternating_shear))])
            self.others.x = np.array([float(stress(p.factors.mean_shear)) for p in points[1:]])
            self.others.y = np.array(
                [float(stress(p.factors.alternating_shear)) for p in points[1:]]
            )
            _set_tooltip(self.lines, [x_label, y_label])
            _set_tooltip(self.chosen, [x_label, f"{CRITERION_NAMES[criterion]} {y_label}"])
            _set_tooltip(self.point, [f"governing {x_label}", y_label])
            _set_tooltip(self.others, [f"other segments' {x_label}", y_label])
            self.figure.title = (
                f"Fatigue diagram, {governing.shaft} segment {governing.segment} at x = "
                f"{units.from_si(governing.x, 'length'):.4g} {unit_label(units, 'length')} "
                f"(n = {factors.factor_of_safety(criterion):.3g} {CRITERION_NAMES[criterion]})"
            )
            top = max(float(stress(factors.ultimate_shear)), float(self.others.x.max(initial=0)))
            self.x_scale.max = 1.05 * top
            self.y_scale.max = 1.1 * max(
                float(stress(factors.yield_shear)), float(self.others.y.max(initial=0))
            )
