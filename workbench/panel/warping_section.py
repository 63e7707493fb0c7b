"""Restrained warping in the panel: the cross-section view and, for a case that warps, its charts.

Built lazily: a case whose sections do not warp costs nothing on an edit until the cross-section
is opened, and never builds the warping charts. For a case that warps
(:attr:`Results.warping <workbench.solver.results.Results.warping>` is set) three charts follow
the shaft shown on the drawing's x scale: the bimoment B, the torque's two parts (Saint-Venant
G·J·θ′ and warping −E·Cw·θ‴) beside the internal torque, and the warping normal stress
σ_w = E·Wn·θ″ at each station's governing stress point (the largest |σ_w| over the section's
stress points, :func:`~workbench.solver.warping_stress.torsional_stresses`). A bimoment is
shown in the torque unit times the length of that unit (N·m², lbf·in²), a stress in the panel's
stress unit. The supports the unrestrained-warping warning names (fixed supports stating no
``warping`` where a section warps) get the warning beside their fields.
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w
import numpy as np

from workbench.case.units import UnitSystem, registry
from workbench.panel.document import unit_label
from workbench.panel.form import Form
from workbench.panel.markup import render
from workbench.panel.plotting import (
    CURRENT,
    LIMIT,
    LOAD,
    Legend,
    LegendEntry,
    bq,
    fit_scale,
    held,
    set_list,
    xy_figure,
)
from workbench.panel.section_view import SectionView
from workbench.panel.selection import Part
from workbench.panel.stale import StaleMarks
from workbench.solver.analysis import Results
from workbench.solver.model import Model
from workbench.solver.warping_sections import OpenWarpingSection
from workbench.solver.warping_stress import stress_points, torsional_stresses
from workbench.solver.warping_supports import UNSTATED_RESTRAINT, unstated_restraints


def bimoment_unit(units: UnitSystem) -> tuple[str, float]:
    """The unit a bimoment is shown in and N·m² per that unit: the torque unit times its length.

    ``N*m`` gives N·m², ``lbf*in`` lbf·in², ``kN*m`` kN·m²; a torque unit with no length in it
    (a named unit) is multiplied by the length unit of the case.
    """
    torque = registry().Unit(units.torque)
    lengths = [
        name
        for name in torque._units  # pint's own split of a unit into its parts
        if registry().Unit(name).dimensionality == registry().Unit("m").dimensionality
    ]
    unit = f"({units.torque})*{lengths[0] if lengths else units.length}"
    factor = float(registry().Quantity(1.0, unit).to("N*m**2").magnitude)
    return format(registry().Unit(unit), "~P"), factor


class _Chart:
    """A small chart along the shaft: named lines on the drawing's x scale, legend beneath."""

    def __init__(self, title: str, key: str, x_scale: Any, colours: list[str]) -> None:
        self.y_scale = bq.LinearScale()
        self.lines = bq.Lines(
            x=[], y=[], scales={"x": x_scale, "y": self.y_scale}, colors=colours, stroke_width=2.0
        )
        self.figure = xy_figure([self.lines], x_scale, self.y_scale, "x", title, title, 170,
                                along=True)  # fmt: skip
        self.figure.add_class(f"wb-chart-{key}")
        self.legend = Legend(key)
        self.box = w.VBox([self.figure, self.legend.widget])

    def draw(self, x: Any, curves: list[tuple[str, Any, str]], x_label: str, y_label: str) -> None:
        with held(self.figure):
            self.lines.x = x
            self.lines.y = np.vstack([y for _, y, _ in curves])
            set_list(self.lines, "colors", [colour for _, _, colour in curves])
            set_list(self.lines, "labels", [label for label, _, _ in curves])
            self.figure.axes[0].label, self.figure.axes[1].label = x_label, y_label
            fit_scale(self.y_scale, [self.lines], "y", include=0.0)
        self.legend.show([LegendEntry(label, colour, "solid") for label, _, colour in curves])


class WarpingCharts:
    """Bimoment, the torque's two parts, and σ_w at the governing points, along the shaft."""

    def __init__(self, x_scale: Any) -> None:
        self.bimoment = _Chart("Bimoment", "bimoment", x_scale, [CURRENT])
        self.torque_parts = _Chart("Torque's two parts", "torque-parts", x_scale,
                                   [CURRENT, LOAD, LIMIT])  # fmt: skip
        self.normal_stress = _Chart("Warping normal stress", "warping-stress", x_scale, [LIMIT])
        self.charts = (self.bimoment, self.torque_parts, self.normal_stress)
        self.box = w.VBox([chart.box for chart in self.charts])

    def draw(self, model: Model, results: Results, result: str, shaft: int) -> None:
        """Draw the shaft's bimoment, torque parts and σ_w in ``result`` (a case that warps)."""
        warping = results.warping
        assert warping is not None
        units, row, window = model.units, results.index(result), results._window(shaft)
        mesh = results.mesh
        x = units.from_si(mesh.station_x[window], "length")
        x_label = f"x [{unit_label(units, 'length')}]"
        torque_unit = unit_label(units, "torque")
        symbol, per_unit = bimoment_unit(units)
        self.bimoment.draw(
            x,
            [(f"bimoment B, {result}", warping.bimoment[row, window] / per_unit, CURRENT)],
            x_label,
            f"B [{symbol}]",
        )
        self.torque_parts.draw(
            x,
            [
                (
                    f"internal torque, {result}",
                    units.from_si(results.torque[row, window], "torque"),
                    CURRENT,
                ),
                (
                    "Saint-Venant part G·J·θ′",
                    units.from_si(warping.saint_venant_torque[row, window], "torque"),
                    LOAD,
                ),
                (
                    "warping part −E·Cw·θ‴",
                    units.from_si(warping.warping_torque[row, window], "torque"),
                    LIMIT,
                ),
            ],
            x_label,
            f"T [{torque_unit}]",
        )
        stress = governing_normal_stress(model, results, row, shaft)
        self.normal_stress.draw(
            x,
            [
                (
                    f"σ_w = E·Wn·θ″ at the governing point, {result}",
                    units.from_si(stress, "stress"),
                    LIMIT,
                )
            ],
            x_label,
            f"σ_w [{unit_label(units, 'stress')}]",
        )


def governing_normal_stress(model: Model, results: Results, row: int, shaft: int) -> np.ndarray:
    """σ_w (Pa) at each station of a shaft, at the section's point of largest |σ_w|, signed.

    NaN at the stations of a section that is not open (it has no stress points).

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, ch. V (σ_w = E·ω·θ″), as in
       :mod:`workbench.solver.warping_stress`.
    """
    warping = results.warping
    assert warping is not None
    window = results._window(shaft)
    mesh = results.mesh
    segments = model.shafts[shaft].segments
    open_numbers = [
        n for n, s in enumerate(segments) if isinstance(s.layers[0].section, OpenWarpingSection)
    ]
    station_segment = mesh.element_segment[mesh.station_element[window]]
    lookup = np.full(len(segments), -1, dtype=np.intp)
    lookup[open_numbers] = np.arange(len(open_numbers))
    station_section = lookup[station_segment]
    stress = np.full(station_section.shape, np.nan)
    if not open_numbers:
        return stress
    sections = [segments[n].layers[0].section.properties for n in open_numbers]  # type: ignore[attr-defined]
    elastic = np.array(
        [segments[n].layers[0].material.elastic_modulus or 0.0 for n in open_numbers]
    )
    shear = np.array([segments[n].layers[0].material.shear_modulus for n in open_numbers])
    chosen = np.maximum(station_section, 0)
    stresses = torsional_stresses(
        stress_points(sections),
        station_section,
        warping.rate[row, window],
        warping.second[row, window],
        warping.third[row, window],
        shear[chosen],
        elastic[chosen],
    )
    normal = np.where(stresses.valid, stresses.warping_normal, 0.0)
    peak = np.take_along_axis(normal, np.abs(normal).argmax(axis=1)[:, None], axis=1)[:, 0]
    return np.where(station_section >= 0, peak, np.nan)


class WarpingSection:
    """The cross-section view and the warping charts, built when first needed.

    Parameters
    ----------
    x_scale
        The drawing's x scale (the charts share it).
    stale_marks
        The panel's stale marks: the views built are registered with them.
    form
        The panel's fields (the warning is shown beside the supports it names).
    """

    def __init__(self, x_scale: Any, stale_marks: StaleMarks, form: Form) -> None:
        self.x_scale, self.stale_marks, self.form = x_scale, stale_marks, form
        self.section: SectionView | None = None
        self.charts: WarpingCharts | None = None
        self.section_holder = w.VBox()
        self.section_box = w.Accordion(
            children=[self.section_holder],
            titles=("Cross-section of the segment picked",),
            selected_index=None,
        )
        self.charts_holder = w.VBox(layout=w.Layout(display="none"))
        self._warned: list[str] = []
        self._results: Results | None = None

    @property
    def opened(self) -> bool:
        """Whether the cross-section view is open."""
        return self.section_box.selected_index == 0

    def draw(
        self, model: Model, results: Results, result: str, shaft: int, picked: Part | None
    ) -> None:
        """Draw what is shown: the section picked (if open) and the charts (if the case warps)."""
        warps = results.warping is not None
        if warps and self.section is None and self.section_box.selected_index is None:
            self.section_box.selected_index = 0  # a case that warps opens its section at once
        if self.opened:
            self.draw_section(model, picked)
        if warps:
            if self.charts is None:
                self.charts = WarpingCharts(self.x_scale)
                names = ("bimoment", "torque parts", "warping normal stress")
                for name, chart in zip(names, self.charts.charts, strict=True):
                    self.stale_marks.output(name, chart.figure)
                note = self.stale_marks.note("The warping charts are those")
                self.charts_holder.children = [note, self.charts.box]
            self.charts.draw(model, results, result, shaft)
            self.charts_holder.layout.display = None
        elif self.charts is not None:
            self.charts_holder.layout.display = "none"
        self.show_warning(results)

    def draw_section(self, model: Model, picked: Part | None) -> None:
        if self.section is None:
            self.section = SectionView()
            self.stale_marks.output("cross-section", self.section.figure)
            self.section_holder.children = [self.section.box]
        sections, words = None, ""
        if picked is not None and picked.kind == "segment":
            _, shaft, _, number = picked.path
            segments = model.shafts[int(shaft)].segments
            if int(number) < len(segments):
                sections = [layer.section for layer in segments[int(number)].layers]
                words = f"shaft {model.shafts[int(shaft)].id}, segment {number}"
        self.section.draw(sections, model.units, words)

    def show_warning(self, results: Results | None = None) -> None:
        """Put the unrestrained-warping warning beside each support it names (and only there).

        ``results``: those solved last (by default the last given; again after fields are
        rebuilt). Only a case whose sections warp can be warned.
        """
        results = self._results = results or self._results
        if results is None or (results.warping is None and not self._warned):
            return
        flagged = np.flatnonzero(unstated_restraints(results.table)).tolist()
        keys = [f"supports[{n}]{where}" for n in flagged for where in ("", ".warping")]
        if not keys and not self._warned:
            return
        text = render("warning", f'Warning: no "warping" stated: {UNSTATED_RESTRAINT}')
        for key in self._warned:
            for label in self.form.messages.get(key, []):
                if label.value == text:
                    label.value = ""
        for key in keys:
            for label in self.form.messages.get(key, []):
                label.value = text
        self._warned = keys
