"""The Fatigue section: the fatigue diagram (τm–τa) with its failure lines, and the points' table.

The points are the fatigue check's own (:class:`~workbench.design.fatigue_check.FatiguePoint`,
made by :func:`~workbench.design.checks.run_checks`); the panel converts them to its units and
draws them.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w
import numpy as np

from workbench.case.declaration.criteria import in_words
from workbench.case.design import FATIGUE_CRITERIA
from workbench.case.display import format_number
from workbench.case.units import UnitSystem
from workbench.design.checks import CheckReport
from workbench.design.fatigue.criteria import failure_lines
from workbench.design.fatigue_check import FatiguePoint
from workbench.panel.document import unit_label
from workbench.panel.markup import render
from workbench.panel.plotting import (
    BASELINE,
    LIMIT,
    SHAFT,
    SUPPORT,
    bq,
    held,
    name_tooltip,
    set_tooltip,
    xy_figure,
)
from workbench.solver.model import Model

#: Colours of the fatigue criteria lines.
CRITERION_COLOURS = {
    "goodman": "#3d5a80",
    "gerber": "#5c8a8a",
    "asme_elliptic": "#6b4e71",
    "soderberg": "#8a6f3e",
    "langer": LIMIT,
}
#: The lines drawn, in words: the case's fatigue criteria, and Langer's first-cycle yield line.
CRITERION_NAMES = {
    **{criterion: in_words(criterion) for criterion in FATIGUE_CRITERIA},
    "langer": "Langer (first-cycle yield)",
}
_CURVE_POINTS = 61


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
        self.figure = xy_figure(
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

        lines = failure_lines(
            float(stress(factors.endurance_shear)),
            float(stress(factors.ultimate_shear)),
            float(stress(factors.yield_shear)),
            points=_CURVE_POINTS,
        )
        x_label, y_label = f"τm [{stress_unit}]", f"τa [{stress_unit}]"
        with held(self.figure):
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
            # A line's tooltip gets the curve, not a point: it names the curve (plotting).
            name_tooltip(self.lines, "failure line")
            self.chosen.labels = [f"{CRITERION_NAMES[criterion]} (the design's criterion)"]
            name_tooltip(self.chosen, "chosen")
            set_tooltip(self.point, [f"governing {x_label}", y_label])
            set_tooltip(self.others, [f"other segments' {x_label}", y_label])
            self.figure.title = (
                f"Fatigue diagram, {governing.shaft} segment {governing.segment} at x = "
                f"{format_number(units.from_si(governing.x, 'length'))} {unit_label(units, 'length')} "
                f"(n = {format_number(factors.factor_of_safety(criterion), 3)} "
                f"{CRITERION_NAMES[criterion]})"
            )
            top = max(float(stress(factors.ultimate_shear)), float(self.others.x.max(initial=0)))
            self.x_scale.max = 1.05 * top
            self.y_scale.max = 1.1 * max(
                float(stress(factors.yield_shear)), float(self.others.y.max(initial=0))
            )


def governing_fatigue_points(report: CheckReport, shaft: str) -> list[FatiguePoint]:
    """The fatigue points of one shaft (else of all), the governing one first.

    Governing: the lowest factor of safety by the design's criterion or against first-cycle
    yield, as in the check table.
    """
    fatigue = report.design.fatigue
    points = [p for p in report.fatigue_points if p.shaft == shaft] or list(report.fatigue_points)
    if fatigue is None or not points:
        return []

    def worst(point: FatiguePoint) -> float:
        factors = point.factors
        return min(factors.factor_of_safety(fatigue.criterion), factors.first_cycle_yield)

    return sorted(points, key=worst)


class FatigueSection:
    """The Fatigue section's widgets: a message (no check, no point), the diagram, the table."""

    def __init__(self) -> None:
        self.chart = FatigueChart()
        self.message = w.HTML()
        self.message.add_class("wb-fatigue-message")
        self.table = w.HTML()
        self.figures = w.VBox([self.chart.figure, self.table])
        self.box = w.VBox([self.message, self.figures])

    def draw(self, model: Model, report: CheckReport, shaft_number: int, units: UnitSystem) -> None:
        """Draw the fatigue points of one shaft of a checked case (or say why there are none).

        Parameters
        ----------
        model
            The case's model.
        report
            Its checks (with their fatigue points).
        shaft_number
            The shaft shown (index into the model's shafts).
        units
            The panel's units.
        """
        fatigue = report.design.fatigue
        points = governing_fatigue_points(report, model.shafts[shaft_number].id)
        if fatigue is None or not points:
            self.message.value = render(
                "italic",
                "No fatigue check: switch it on in the Design tab (two results the torque "
                "cycles between, or a mean and an alternating one)."
                if fatigue is None
                else "No segment could be checked for fatigue (see the notes below the checks).",
            )
            self.figures.layout.display = "none"
            return
        self.message.value = ""
        self.figures.layout.display = None
        self.chart.draw(points, units, fatigue.criterion)
        rows = []
        for point in points:
            factors = point.factors
            stresses = (
                factors.mean_shear,
                factors.alternating_shear,
                factors.endurance_shear,
                factors.ultimate_shear,
                factors.yield_shear,
            )
            rows.append(
                [
                    point.shaft,
                    point.segment,
                    format_number(units.from_si(point.x, "length")),
                    *(format_number(units.from_si(value, "stress")) for value in stresses),
                    format_number(point.concentration, 3),
                    format_number(factors.factor_of_safety(fatigue.criterion), 3),
                    format_number(factors.first_cycle_yield, 3),
                ]
            )
        self.table.value = render(
            "fatigue_points",
            unit_label(units, "length"),
            unit_label(units, "stress"),
            CRITERION_NAMES[fatigue.criterion],
            rows,
        )
