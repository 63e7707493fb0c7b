"""The Modes section: mode shapes, natural frequencies against running-speed bands, their table.

Everything drawn comes from :func:`workbench.solver.modes.natural_modes` (through the panel's
state), converted to the panel's units. The section is drawn only while it is open: natural
modes are a dense eigenproblem, too dear for every edit.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w
import numpy as np
from ipywidgets import Layout

from workbench.case.display import format_number
from workbench.case.units import UnitSystem
from workbench.panel.document import unit_label
from workbench.panel.markup import render
from workbench.panel.plotting import (
    LOAD,
    NUMBER_FORMAT,
    SHAFT,
    SUPPORT,
    Legend,
    LegendEntry,
    bq,
    held,
    name_tooltip,
    number_axis,
    xy_figure,
)
from workbench.solver.modes import Modes

#: Colours of the mode shapes, lowest mode first (our own ramp from slate blue to amber).
MODE_COLOURS = ["#3d5a80", "#5c8a8a", "#8a6f3e", "#e09f3e", "#6b4e71", "#9a9a9a"]
#: How many of the lowest modes the mode-shape chart draws.
MODES_SHOWN = 4


def rpm(angular_frequency: Any) -> Any:
    """Revolutions per minute of a circular frequency or speed (rad/s)."""
    return np.asarray(angular_frequency, dtype=float) * 60.0 / (2.0 * np.pi)


def _band_mark(scales: dict[str, Any], opacity: float, line_style: str) -> Any:
    """A shaded running-speed band (the band itself, or the band widened by the margin)."""
    return bq.Lines(
        x=[[1.0, 1.0]],
        y=[[0.0, 1.0]],
        scales=scales,
        colors=[LOAD],
        fill="inside",
        fill_colors=[LOAD],
        fill_opacities=[opacity],
        line_style=line_style,
        stroke_width=1.0,
        visible=False,
    )


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
            labels=["rigid body"],
            visible=False,
        )
        self.shapes = xy_figure(
            [self.flexible, self.rigid],
            self.x_scale,
            self.y_scale,
            "x",
            "normalised angle",
            "Mode shapes (largest |angle| = 1)",
            height=260,
        )
        self.shapes.add_class("wb-chart-modes")
        # Beneath the figure, never over the curves; it lists the modes drawn and no other.
        self.legend = Legend("modes")
        self.bands_legend = Legend("frequencies")
        self.speed_scale = bq.LogScale()
        self.band_y = bq.LinearScale(min=0.0, max=1.0)
        band_scales = {"x": self.speed_scale, "y": self.band_y}
        self.widened = _band_mark(band_scales, opacity=0.12, line_style="dashed")
        self.bands = _band_mark(band_scales, opacity=0.45, line_style="solid")
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
            tooltip=bq.Tooltip(
                fields=["x"], labels=["natural frequency [rpm]"], formats=[NUMBER_FORMAT]
            ),
        )
        self.against = bq.Figure(
            marks=[self.widened, self.bands, self.frequencies, self.frequency_marks],
            axes=[
                number_axis(self.speed_scale, "speed, frequency [rpm]", grid_lines="none"),
            ],
            title="Natural frequencies against running-speed bands (±margin dashed)",
            animation_duration=0,
            fig_margin={"top": 30, "bottom": 40, "left": 20, "right": 20},
            layout=Layout(width="100%", min_width="340px", height="150px"),
            title_style={"font-size": "13px"},
        )
        self.against.add_class("wb-chart-frequencies")
        self.figures = [self.shapes, self.against]
        self.boxes = [
            w.VBox([self.shapes, self.legend.widget]),
            w.VBox([self.against, self.bands_legend.widget]),
        ]

    def draw(self, modes: Any, shaft_number: int, speeds: Any, margin: float) -> None:
        """Draw the lowest :data:`MODES_SHOWN` modes along one shaft and every frequency."""
        units = modes.model.units
        shaft = modes.model.shafts[shaft_number]
        length_unit = unit_label(units, "length")
        shown = range(min(MODES_SHOWN, len(modes)))
        flexible = [mode for mode in shown if not modes.rigid_body[mode]]
        rigid = [mode for mode in shown if modes.rigid_body[mode]]
        entries = []
        with held(self.shapes):
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
                    else f"mode {mode + 1}: {format_number(modes.frequency[mode])} Hz"
                    for mode in chosen
                ]
                name_tooltip(mark, "mode")
                line, marker = mark.line_style, mark.marker or ""
                entries += [
                    LegendEntry(label, colour, line, marker)
                    for label, colour in zip(mark.labels, mark.colors, strict=True)
                ]
        entries.sort(key=lambda entry: int(entry.label.split(":")[0].split()[1]))
        self.legend.show(entries)
        natural = rpm(modes.angular_frequency[~modes.rigid_body])
        lows = np.array([rpm(speed.minimum) for speed in speeds])
        highs = np.array([rpm(speed.maximum) for speed in speeds])
        wide_low, wide_high = lows * (1.0 - margin), highs * (1.0 + margin)
        positive = [value for value in [*natural, *wide_low, *highs] if value > 0.0]
        floor = 0.5 * min(positive) if positive else 1.0
        with held(self.against):
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
        bands = []
        if len(natural):
            bands.append(LegendEntry("natural frequency", SHAFT, "solid", "diamond"))
        if len(lows):
            bands.append(LegendEntry("running-speed band", LOAD, "solid", "square"))
            bands.append(LegendEntry(f"band widened by ±{margin:.0%}", LOAD, "dashed"))
        self.bands_legend.show(bands)


class ModesSection:
    """The Modes section's widgets: a message (no inertia, no modes), the charts, the table."""

    def __init__(self) -> None:
        self.chart = ModesChart()
        self.message = w.HTML()
        self.message.add_class("wb-modes-message")
        self.table = w.HTML()
        self.table.add_class("wb-frequencies")
        self.figures = w.VBox([*self.chart.boxes, self.table])
        self.box = w.VBox([self.message, self.figures])

    def draw(
        self,
        modes: Modes | None,
        why_none: str,
        shaft_number: int,
        speeds: Any,
        margin: float,
        units: UnitSystem,
    ) -> None:
        """Draw ``modes`` along one shaft, or say ``why_none`` when there are none.

        Parameters
        ----------
        modes
            The case's natural modes, or ``None``.
        why_none
            Why there are no modes (shown instead of the charts).
        shaft_number
            The shaft shown (index into the model's shafts).
        speeds
            The case's running-speed bands (``OperatingSpeed``, rad/s).
        margin
            The frequency margin (a fraction) the bands are widened by.
        units
            The panel's units.
        """
        if modes is None:
            self.message.value = render("italic", why_none)
            self.figures.layout.display = "none"
            self.table.value = ""
            return
        self.message.value = ""
        self.figures.layout.display = None
        self.chart.draw(modes, shaft_number, speeds, margin)
        self.table.value = _frequencies_html(modes, units)


def _frequencies_html(modes: Modes, units: UnitSystem) -> str:
    rows = []
    for mode in range(len(modes)):
        where, x = modes.antinode(mode)
        rows.append(
            (
                mode + 1,
                bool(modes.rigid_body[mode]),
                format_number(modes.frequency[mode]),
                format_number(float(rpm(modes.angular_frequency[mode]))),
                where,
                format_number(units.from_si(x, "length")),
            )
        )
    length = unit_label(units, "length")
    count, elements = len(modes), modes.elements_per_segment
    return render("frequencies", count, elements, length, rows, modes.notes)
