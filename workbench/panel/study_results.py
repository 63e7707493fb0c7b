"""The Study tab's results: the utilisation's histogram and cumulative curve, drivers, tables.

Drawn from the engine's summary (plain JSON values, :func:`~workbench.study.summary.summarise`)
and the rows' histogram (:func:`~workbench.study.histogram.utilisation_histogram`); the panel
computes nothing itself. The limit, utilisation = 1, is drawn on both utilisation charts.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w
import numpy as np

from workbench.panel.markup import render_study
from workbench.panel.plotting import (
    BASELINE,
    CURRENT,
    FAIL,
    LIMIT,
    LOAD,
    Legend,
    LegendEntry,
    bq,
    held,
    number_axis,
)
from workbench.study.histogram import UtilisationHistogram


def _figure(title: str, marks: list[Any], x: Any, y: Any, x_label: str, y_label: str) -> Any:
    return bq.Figure(
        marks=marks,
        axes=[number_axis(x, x_label), number_axis(y, y_label, side="left", label_offset="45px")],
        title=title,
        animation_duration=0,
        layout=w.Layout(width="460px", height="260px"),
        fig_margin={"top": 30, "bottom": 40, "left": 70, "right": 15},
    )


def _number(value: float | None) -> str:
    return "–" if value is None else f"{value:.4g}"


class StudyResults:
    """The charts and tables of a finished study, and the note that says when they are stale."""

    def __init__(self) -> None:
        self.note = w.HTML()
        self.exceedance = w.HTML()
        x, count, share = (
            bq.LinearScale(),
            bq.LinearScale(min=0.0),
            bq.LinearScale(min=0.0, max=1.0),
        )
        self.bars = bq.Bars(x=[], y=[], scales={"x": x, "y": count}, colors=[CURRENT], padding=0.0)
        self.over = bq.Bars(x=[], y=[], scales={"x": x, "y": count}, colors=[FAIL], padding=0.0)
        self.limit = bq.Lines(x=[1.0, 1.0], y=[0.0, 1.0], scales={"x": x, "y": share},
                              colors=[LIMIT], line_style="dash_dotted")  # fmt: skip
        self.histogram = _figure("Governing utilisation", [self.bars, self.over, self.limit],
                                 x, count, "utilisation", "variants")  # fmt: skip
        cx, cy = bq.LinearScale(), bq.LinearScale(min=0.0, max=1.0)
        self.cumulative_line = bq.Lines(x=[], y=[], scales={"x": cx, "y": cy}, colors=[CURRENT],
                                        stroke_width=2)  # fmt: skip
        self.cumulative_limit = bq.Lines(x=[1.0, 1.0], y=[0.0, 1.0], scales={"x": cx, "y": cy},
                                         colors=[LIMIT], line_style="dash_dotted")  # fmt: skip
        self.cumulative = _figure("Fraction at or below", [self.cumulative_line,
                                  self.cumulative_limit], cx, cy, "utilisation", "fraction")  # fmt: skip
        sx, sy = bq.OrdinalScale(), bq.LinearScale(min=-1.0, max=1.0)
        self.sensitivity_bars = bq.Bars(x=[], y=[], scales={"x": sx, "y": sy},
                                        colors=[CURRENT, LOAD, BASELINE], type="grouped")  # fmt: skip
        self.sensitivity = bq.Figure(
            marks=[self.sensitivity_bars],
            axes=[
                bq.Axis(scale=sx, label="input"),
                number_axis(sy, "ρ, S1, ST", side="left", label_offset="45px"),
            ],
            title="What drives the utilisation",
            animation_duration=0,
            layout=w.Layout(width="620px", height="260px"),
            fig_margin={"top": 30, "bottom": 60, "left": 70, "right": 15},
        )
        self.legend = Legend("study")
        self.invalid = w.HTML()
        self.worst = w.HTML()
        self.charts = w.HBox([self.histogram, self.cumulative])
        self.box = w.VBox([self.note, self.exceedance, self.charts, self.legend.widget,
                           self.sensitivity, self.invalid, self.worst])  # fmt: skip
        self.box.add_class("wb-derived")

    def draw(self, summary: dict[str, Any], histogram: UtilisationHistogram) -> None:
        """Show a study's summary and histogram."""
        edges, counts = histogram.edges, histogram.counts.astype(float)
        centres = 0.5 * (edges[:-1] + edges[1:])
        above = centres > 1.0
        with held(self.histogram):
            self.bars.x, self.bars.y = centres, np.where(above, 0.0, counts)
            self.over.x, self.over.y = centres, np.where(above, counts, 0.0)
        with held(self.cumulative):
            self.cumulative_line.x = edges[1:]
            self.cumulative_line.y = histogram.cumulative
        self.legend.show(
            [
                LegendEntry("variants per bin", CURRENT, "solid"),
                LegendEntry("above the limit (fails)", FAIL, "solid"),
                LegendEntry("utilisation = 1 (the limit)", LIMIT, "dash_dotted"),
            ]
        )
        self.exceedance.value = self._exceedance(summary["exceedance"])
        self._sensitivity(summary)
        self.invalid.value = render_study(
            "rows_table",
            f"Invalid variants: {summary['invalid']['count']:,} of {summary['rows']:,}",
            ["field", "variants", "example"],
            [[e["field"], f"{e['count']:,}", e["example"]] for e in summary["invalid"]["by_field"]],
        )
        names = list(summary["plan"]["inputs"])
        header = ["variant", "utilisation", "check", *[entry["path"] for entry in names]]
        rows = [
            [str(row["variant"]), f"{row['governing_utilisation']:.4g}",
             str(row["governing_check"]), *[_number(v) for v in row["inputs"].values()]]
            for row in summary["worst"]
        ]  # fmt: skip
        self.worst.value = render_study("rows_table", "Worst variants", header, rows)

    @staticmethod
    def _exceedance(exceedance: dict[str, Any]) -> str:
        fraction = exceedance["fraction"]
        interval = exceedance.get("interval")
        return render_study(
            "exceedance",
            "no valid variant" if fraction is None else f"{fraction:.4g}",
            f"{exceedance['exceeding']:,}",
            f"{exceedance['variants']:,}",
            f"[{interval[0]:.4g}, {interval[1]:.4g}]" if interval else "",
            exceedance.get("why_no_interval", ""),
        )

    def _sensitivity(self, summary: dict[str, Any]) -> None:
        correlations = summary["rank_correlations"]
        inputs = [entry["path"] for entry in summary["plan"]["inputs"]]
        rho = [correlations.get(name, {}).get("governing_utilisation") for name in inputs]
        rows = [[np.nan if v is None else v for v in rho]]
        labels = ["Spearman ρ"]
        sobol = summary.get("sobol")
        if sobol and "S1" in sobol:
            rows += [sobol["S1"], sobol["ST"]]
            labels += ["Sobol S1", "Sobol ST"]
        with held(self.sensitivity):
            self.sensitivity_bars.x = inputs
            self.sensitivity_bars.y = np.array(rows, dtype=float)
            self.sensitivity_bars.labels = labels
        why = sobol.get("why_not") if sobol else None
        self.sensitivity.title = "What drives the utilisation" + (
            f" (Sobol indices not computed: {why})" if why else ""
        )

    def stale(self, why: str) -> None:
        """Dim the results and say why they are not of the case as it is."""
        self.box.add_class("wb-stale")
        self.note.value = render_study("stale", why)

    def fresh(self) -> None:
        """The results are of the case as it is."""
        self.box.remove_class("wb-stale")
        self.note.value = ""
