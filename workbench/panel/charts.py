"""The panel's main charts: elevation, internal torque, angle of twist, shear stress, utilisation.

Everything drawn comes from the solver's model, results and check report, converted to the
panel's units; nothing here computes mechanics. The stress chart draws the stresses the checks
judged (:func:`workbench.design.stress_profile.shaft_stresses`): the nominal curve, each detail's
peak stress K·τ_nom with its factor, the allowable of each segment, and a cross on each check
that fails. Colours, legends and shared helpers: :mod:`workbench.panel.plotting`; the elevation:
:mod:`workbench.panel.elevation`; the Modes and Fatigue sections have modules of their own.
"""

from __future__ import annotations

import asyncio
from typing import Any

import ipywidgets as w
import numpy as np

from workbench.case.display import format_number
from workbench.design.checks import CheckReport
from workbench.design.stress_profile import ShaftStresses, shaft_stresses
from workbench.panel.document import unit_label
from workbench.panel.elevation import Elevation
from workbench.panel.plotting import (
    BASELINE,
    BY_ORDER,
    CURRENT,
    DETAIL_STYLES,
    FAIL,
    FAIL_MARKER,
    LIMIT,
    SHAFT,
    SHAFT_FILL,
    Legend,
    LegendEntry,
    bq,
    failing_mark,
    fit_scale,
    held,
    name_tooltip,
    readout,
    set_array,
    set_list,
    set_tooltip,
    xy_figure,
)
from workbench.solver.analysis import Results
from workbench.solver.model import Model


class ResultChart:
    """One x–y result chart along the chosen shaft: now, baseline, readouts, legend beneath."""

    def __init__(self, title: str, key: str, x_scale: Any) -> None:
        self.key = key
        #: Readout points still to set: (mark, x, y) (see :meth:`set_curves`).
        self._readouts: list[tuple[Any, Any, Any]] = []
        self.x_scale, self.y_scale = x_scale, bq.LinearScale()
        scales = {"x": self.x_scale, "y": self.y_scale}
        extra = self.make_marks(scales)
        self.baseline = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[BASELINE],
            line_style="dashed",
            stroke_width=1.5,
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
        self.now_readout = readout(scales, CURRENT)
        self.baseline_readout = readout(scales, BASELINE)
        self.baseline_readout.visible = False
        marks = [self.baseline, *extra, self.now, self.baseline_readout, self.now_readout]
        self.figure = xy_figure(
            marks, self.x_scale, self.y_scale, "x", title, title, 180, along=True
        )
        self.figure.add_class(f"wb-chart-{key}")
        self.legend = Legend(key)
        self.box = w.VBox([self.figure, self.legend.widget])

    def make_marks(self, scales: dict[str, Any]) -> tuple[Any, ...]:
        """Marks a chart draws between the baseline and the curve now (none here)."""
        return ()

    def set_labels(self, x_label: str, y_label: str, result: str) -> None:
        self.figure.axes[0].label = x_label
        self.figure.axes[1].label = y_label
        set_list(self.now, "labels", [f"{y_label}, {result}"])
        set_list(self.baseline, "labels", [f"baseline {y_label}"])
        name_tooltip(self.now, "curve")
        name_tooltip(self.baseline, "curve")
        set_tooltip(self.now_readout, [x_label, y_label])
        set_tooltip(self.baseline_readout, [x_label, "baseline " + y_label])

    def set_curves(self, x: Any, y: Any, base: tuple[Any, Any] | None) -> None:
        """The curve now and the baseline's (``None``: no baseline); readouts come later.

        The readouts' points (invisible until hovered) are set by :meth:`draw_readouts`, after
        everything seen: the page draws the curves first.
        """
        self.now.x, self.now.y = x, y
        self._readouts = [(self.now_readout, x, y)]
        if base is not None:
            self.baseline.x, self.baseline.y = base
            self._readouts.append((self.baseline_readout, *base))
        self.baseline.visible = self.baseline_readout.visible = base is not None

    def draw_readouts(self) -> None:
        """Give the readouts the points of the curves last set (each in one message)."""
        for mark, x, y in self._readouts:
            with mark.hold_sync():
                mark.x, mark.y = x, y
        self._readouts = []

    def seen(self) -> list[Any]:
        """The marks drawn to be seen (the readouts are invisible points over the curves)."""
        hidden = (self.now_readout, self.baseline_readout)
        return [mark for mark in self.figure.marks if mark not in hidden]

    def entries(self, now_label: str) -> list[LegendEntry]:
        """The legend entries of the curve now and of the baseline when it is drawn."""
        entries = [LegendEntry(now_label, CURRENT, "solid")]
        if self.baseline.visible:
            entries.append(LegendEntry("baseline (pinned)", BASELINE, "dashed"))
        return entries


class StressChart(ResultChart):
    """The shear stress chart: nominal τ, each detail's peak K·τ_nom, allowables, failures."""

    def __init__(self, x_scale: Any) -> None:
        #: The detail kinds drawn: (kind, legend label, drawn as a line too).
        self.drawn: list[tuple[int, str, bool]] = []
        super().__init__("Shear stress", "stress", x_scale)

    def make_marks(self, scales: dict[str, Any]) -> tuple[Any, ...]:
        """The allowable, the detail peaks, each detail's check and the failing crosses."""
        self.limit = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[LIMIT],
            stroke_width=1.5,
            line_style="dash_dotted",
            visible=False,
            labels=["allowable shear stress of the segment"],
        )
        self.peaks = bq.Lines(
            x=[], y=[], scales=scales, line_style="dashed", stroke_width=1.8, visible=False
        )
        #: One mark per detail kind: the check's governing peak stress, in the kind's shape.
        self.details = [
            bq.Scatter(
                x=[],
                y=[],
                scales=scales,
                marker=marker,
                colors=[colour],
                default_size=70,
                visible=False,
                display_names=False,
                tooltip=bq.Tooltip(fields=["name"], labels=[name], formats=[""]),
                **BY_ORDER,
            )
            for name, colour, marker in DETAIL_STYLES
        ]
        self.failing = failing_mark(
            scales, bq.Tooltip(fields=["name"], labels=["fails"], formats=[""])
        )
        return (self.limit, self.peaks, *self.details, self.failing)

    def draw_checks(self, stresses: ShaftStresses | None, units: Any, bounds: Any) -> None:
        """The allowables, the detail peaks and the failing checks of the shaft shown."""
        self.drawn = []
        if stresses is None:
            for mark in (self.limit, self.peaks, *self.details, self.failing):
                mark.visible = False
            return
        stress_unit = unit_label(units, "stress")
        # Allowable: a step along each segment, from its start to its end.
        self.limit.x = np.column_stack([bounds[:-1], bounds[1:]]).ravel()
        self.limit.y = np.repeat(units.from_si(stresses.shear_limit, "stress"), 2)
        self.limit.visible = True
        name_tooltip(self.limit, "limit")
        present = np.flatnonzero(~np.isnan(stresses.factor).all(axis=1)).tolist()
        # A shoulder is one point (its check's); the body's details run along their segment.
        lines = [kind for kind in present if np.count_nonzero(~np.isnan(stresses.peak[kind])) > 1]
        x = units.from_si(stresses.x, "length")
        self.peaks.visible = bool(lines)
        if lines:
            self.peaks.x = x
            set_array(self.peaks, "y", units.from_si(stresses.peak[lines], "stress"))
            set_list(self.peaks, "colors", [DETAIL_STYLES[kind][1] for kind in lines])
            set_list(self.peaks, "labels", [self._detail_label(stresses, kind) for kind in lines])
            name_tooltip(self.peaks, "peak stress")
        for kind, mark in enumerate(self.details):
            where = np.flatnonzero(~np.isnan(stresses.detail_value[kind]))
            mark.visible = bool(len(where))
            if len(where):
                self.drawn.append((kind, self._detail_label(stresses, kind), kind in lines))
            mark.x = units.from_si(stresses.detail_x[kind, where], "length")
            mark.y = units.from_si(stresses.detail_value[kind, where], "stress")
            values = mark.y.tolist() if len(where) else []
            names = [
                f"segment {segment}: K = {factor:.3g}, {format_number(value)} {stress_unit}"
                for segment, factor, value in zip(
                    where.tolist(), stresses.factor[kind, where].tolist(), values, strict=True
                )
            ]
            set_list(mark, "names", names)
        fails = stresses.detail_fails
        kinds, segments = np.nonzero(fails)
        shear = np.flatnonzero(stresses.shear_fails)
        fail_x = np.concatenate([stresses.detail_x[fails], stresses.shear_x[shear]])
        fail_y = np.concatenate([stresses.detail_value[fails], stresses.shear_value[shear]])
        limits = np.concatenate([stresses.detail_limit[fails], stresses.shear_limit[shear]])
        words = [f"{DETAIL_STYLES[kind][0]} stress" for kind in kinds.tolist()]
        words += ["shear stress"] * len(shear)
        self.failing.visible = bool(len(fail_x))
        self.failing.x = units.from_si(fail_x, "length")
        self.failing.y = units.from_si(fail_y, "stress")
        names = [
            f"{what} fails, segment {segment}: utilisation {value / limit:.3f}"
            for what, segment, value, limit in zip(
                words,
                [*segments.tolist(), *shear.tolist()],
                fail_y.tolist(),
                limits.tolist(),
                strict=True,
            )
        ]
        set_list(self.failing, "names", names)

    @staticmethod
    def _detail_label(stresses: ShaftStresses, kind: int) -> str:
        factors = np.unique(stresses.factor[kind][~np.isnan(stresses.factor[kind])])
        name = DETAIL_STYLES[kind][0]
        if len(factors) == 1:
            return f"{name} peak K·τ_nom, K = {factors[0]:.3g}"
        return f"{name} peak K·τ_nom, K = {factors.min():.3g} to {factors.max():.3g}"

    def check_entries(self) -> list[LegendEntry]:
        """Legend entries of the allowable, each detail drawn and the failing mark."""
        entries = []
        if self.limit.visible:
            entries.append(LegendEntry(self.limit.labels[0], LIMIT, "dash_dotted"))
        for kind, label, line in self.drawn:
            _, colour, marker = DETAIL_STYLES[kind]
            words = f"{label}; mark: its check"
            entries.append(LegendEntry(words, colour, "dashed" if line else "", marker))
        if self.failing.visible:
            entries.append(LegendEntry("fails its check", FAIL, "", FAIL_MARKER))
        return entries


#: Seconds after the last redraw of a burst (typing, a drag) that the hover readouts follow.
READOUT_DELAY = 0.25


class Charts:
    """Every chart of the panel, redrawn from (model, results, report) in one synced update."""

    def __init__(self) -> None:
        self._readout_timer: asyncio.TimerHandle | None = None
        self.drawing = Elevation()
        self.elevation = self.drawing.figure
        # The drawing's marks, reachable as before.
        self.segments, self.centre = self.drawing.segments, self.drawing.centre
        self.fixed = self.drawing.supports["fixed"]
        self.spring = self.drawing.supports["spring"]
        self.prescribed = self.drawing.supports["prescribed"]
        self.gears, self.torques = self.drawing.gears, self.drawing.torques
        self.distributed = self.drawing.distributed
        #: The drawing's x scale: every chart along the shaft is drawn on it.
        self.x_scale = self.drawing.x_scale
        self.torque = ResultChart("Internal torque", "torque", self.x_scale)
        self.angle = ResultChart("Angle of twist", "angle", self.x_scale)
        self.stress = StressChart(self.x_scale)
        self.bar_x, self.bar_y = self.x_scale, bq.LinearScale(min=0.0)
        bar_scales = {"x": self.bar_x, "y": self.bar_y}
        # One filled step over each segment's own stretch of the shaft, its height the
        # segment's governing utilisation.
        self.bars = bq.Lines(
            x=[[0.0, 1.0]],
            y=[[0.0, 0.0]],
            scales=bar_scales,
            colors=[SHAFT],
            fill="bottom",
            fill_colors=[SHAFT_FILL],
            fill_opacities=[0.7],
            stroke_width=2,
        )
        self.bar_failing = failing_mark(
            bar_scales,
            bq.Tooltip(fields=["name"], labels=["fails"], formats=[""]),
        )
        self.bar_baseline = bq.Scatter(
            x=[],
            y=[],
            scales=bar_scales,
            marker="circle",
            colors=[BASELINE],
            default_size=60,
            visible=False,
            tooltip=bq.Tooltip(fields=["name"], labels=["baseline"], formats=[""]),
            **BY_ORDER,
        )
        self.bar_limit = bq.Lines(
            x=[0],
            y=[1.0],
            scales=bar_scales,
            colors=[LIMIT],
            line_style="dash_dotted",
            labels=["utilisation = 1"],
            tooltip=bq.Tooltip(fields=["name"], labels=["limit"], formats=[""]),
        )
        self.utilisation = xy_figure(
            [self.bars, self.bar_limit, self.bar_baseline, self.bar_failing],
            self.bar_x,
            self.bar_y,
            "x",
            "utilisation",
            "Governing utilisation by segment",
            180,
            along=True,
        )
        self.utilisation.add_class("wb-chart-utilisation")
        self.utilisation_legend = Legend("utilisation")
        self.utilisation_box = w.VBox([self.utilisation, self.utilisation_legend.widget])
        self.figures = [
            self.elevation,
            self.torque.figure,
            self.angle.figure,
            self.stress.figure,
            self.utilisation,
        ]
        self.legends = [
            self.drawing.legend,
            self.torque.legend,
            self.angle.legend,
            self.stress.legend,
            self.utilisation_legend,
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
        """Redraw every chart; each widget of a figure sends its changes in one message.

        The readouts follow when :meth:`draw_readouts` is called (the panel calls it last).
        """
        units = model.units
        shaft = model.shafts[shaft_number]
        length_unit = unit_label(units, "length")
        with held(self.elevation):
            self.drawing.draw(model, shaft_number, result, report)
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
                chart.set_labels(x_label, y_label, result)
                base_curve = None
                if base is not None:
                    base_results, base_window, base_row = base
                    source = {
                        "torque": base_results.torque,
                        "angle": base_results.angle,
                        "stress": base_results.shear_stress,
                    }[chart.key]
                    base_curve = (
                        units.from_si(base_results.mesh.station_x[base_window], "length"),
                        units.from_si(source[base_row, base_window], quantity),
                    )
                chart.set_curves(x, units.from_si(values[row, window], quantity), base_curve)
                if chart is self.stress:
                    bounds = units.from_si(shaft.boundaries, "length")
                    self.stress.draw_checks(shaft_stresses(report, shaft.id, result), units, bounds)
                # x is the drawing's scale, set once by the drawing for every chart
                fit_scale(chart.y_scale, chart.seen(), "y")
            now_label = {
                "torque": "internal torque",
                "angle": "angle of twist",
                "stress": "nominal τ = T·r/J (no concentration)",
            }[chart.key]
            entries = chart.entries(f"{now_label}, {result}")
            if chart is self.stress:
                entries += self.stress.check_entries()
            chart.legend.show(entries)
        with held(self.utilisation):
            self._draw_bars(report, shaft, units, result, baseline)
            fit_scale(self.bar_y, self.utilisation.marks, "y", include=0.0)

    def draw_readouts(self) -> None:
        """The result charts' readouts, after everything seen is sent (see ``set_curves``)."""
        if self._readout_timer is not None:
            self._readout_timer.cancel()
            self._readout_timer = None
        for chart in (self.torque, self.angle, self.stress):
            chart.draw_readouts()

    def follow_readouts(self) -> None:
        """Send the readouts now, or in a kernel once a burst of redraws has paused.

        The readouts are invisible points that read a curve's values under the pointer: a copy
        of each curve, one message each. While a value is typed or a marker dragged, the page
        would draw those copies between one edit's charts and the next; in an event loop they
        follow :data:`READOUT_DELAY` after the last redraw (one message per readout per pause),
        before a person can point at a curve. Without a loop they are sent at once.
        """
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            self.draw_readouts()
            return
        if self._readout_timer is not None:
            self._readout_timer.cancel()
        self._readout_timer = loop.call_later(READOUT_DELAY, self.draw_readouts)

    def _draw_bars(
        self,
        report: CheckReport,
        shaft: Any,
        units: Any,
        result: str,
        baseline: tuple[Results, CheckReport] | None,
    ) -> None:
        labels, now, fails = segment_utilisation(report, shaft.id, len(shaft.segments), result)
        bounds = units.from_si(shaft.boundaries, "length")
        middles = 0.5 * (bounds[:-1] + bounds[1:])
        self.bars.x = np.column_stack([bounds[:-1], bounds[1:]])
        self.bars.y = np.column_stack([now, now])
        colours = np.where(fails, FAIL, SHAFT).tolist()
        set_list(self.bars, "colors", colours)
        set_list(self.bars, "fill_colors", np.where(fails, FAIL, SHAFT_FILL).tolist())
        words = [
            f"segment {k}: {u:.3f}" for k, u in zip(labels.tolist(), now.tolist(), strict=True)
        ]
        set_list(self.bars, "labels", words)
        name_tooltip(self.bars, "utilisation")
        self.bar_failing.x, self.bar_failing.y = middles[fails], now[fails]
        set_list(self.bar_failing, "names", [words[k] for k in np.flatnonzero(fails).tolist()])
        self.bar_failing.visible = bool(fails.any())
        self.bar_limit.x, self.bar_limit.y = bounds[[0, -1]], np.ones(2)
        self.utilisation.axes[0].label = f"x [{unit_label(units, 'length')}]"
        if baseline is not None:
            base_labels, base_values, _ = segment_utilisation(
                baseline[1], shaft.id, len(shaft.segments), result
            )
            self.bar_baseline.x, self.bar_baseline.y = middles[base_labels], base_values
            names = [
                f"segment {k}: {u:.3f}"
                for k, u in zip(base_labels.tolist(), base_values.tolist(), strict=True)
            ]
            set_list(self.bar_baseline, "names", names)
        self.bar_baseline.visible = baseline is not None
        entries = [
            LegendEntry(f"governing utilisation over each segment, {result}", SHAFT, "solid")
        ]
        if fails.any():
            entries.append(LegendEntry("fails (a check above its limit)", FAIL, "", FAIL_MARKER))
        entries.append(LegendEntry("utilisation = 1", LIMIT, "dash_dotted"))
        if baseline is not None:
            entries.append(LegendEntry("baseline (pinned)", BASELINE, "", "circle"))
        self.utilisation_legend.show(entries)


def segment_utilisation(
    report: CheckReport, shaft_id: str, count: int, result: str
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Each segment's governing utilisation in ``result`` and whether it fails there.

    Returns (segment numbers, the largest utilisation of each over its checks in ``result``,
    whether any of its checks fails there, as the check rows say).
    """
    values = np.zeros(count)
    fails = np.zeros(count, dtype=bool)
    for check in report.checks:
        if check.shaft == shaft_id and check.result == result and check.segment is not None:
            values[check.segment] = max(values[check.segment], check.utilisation)
            fails[check.segment] |= not check.passes
    return np.arange(count), values, fails
