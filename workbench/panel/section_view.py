"""The cross-section of the segment picked, drawn to scale (equal aspect) beside the drawing.

The solver's section objects give every line drawn: an open section's walls from its mid-line
points, walls and thicknesses (:class:`~workbench.solver.open_sections.OpenSectionWarping`), its
shear centre and centroid, and the stress points where the warping normal stress σ_w = E·Wn·θ″
and the warping shear τ_w = E·Sw·θ‴/t peak (largest |Wn| and |Sw/t| of
:func:`~workbench.solver.warping_stress.stress_points`); a polygon's or a drawing's boundary and
holes, with the centroid and shear centre its finite-element analysis found; a round section's
circle or annulus (each layer's, for bonded layers). Nothing here computes mechanics: the
positions are the solver's, converted to the panel's length unit.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import ipywidgets as w
import numpy as np

from workbench.panel.document import unit_label
from workbench.panel.markup import render
from workbench.panel.plotting import (
    LIMIT,
    LOAD,
    SHAFT,
    SHAFT_FILL,
    SUPPORT,
    Legend,
    LegendEntry,
    bq,
    held,
    number_axis,
    set_list,
)
from workbench.solver.polygon_sections import DrawingSection, FiniteElementSection, drawing_outline
from workbench.solver.warping_sections import OpenWarpingSection
from workbench.solver.warping_stress import stress_points

#: Points on a circle drawn (a 128-gon is round at any size the view has).
CIRCLE_POINTS = 129
#: The view's side (px); the plot area is square, so x and y share one scale per pixel.
SIDE = 340
MARGIN = 45


@dataclass
class SectionShape:
    """What the view draws of one section, in SI metres.

    Attributes
    ----------
    solid
        Closed outlines of material, each (n, 2).
    voids
        Closed outlines of holes, each (n, 2).
    marks
        Named points: (name, (x, y)), e.g. the shear centre.
    stress
        The stress points: (name, (x, y)) where σ_w and τ_w peak.
    """

    solid: list[np.ndarray] = field(default_factory=list)
    voids: list[np.ndarray] = field(default_factory=list)
    marks: list[tuple[str, np.ndarray]] = field(default_factory=list)
    stress: list[tuple[str, np.ndarray]] = field(default_factory=list)


def _circle(radius: float) -> np.ndarray:
    angle = np.linspace(0.0, 2.0 * np.pi, CIRCLE_POINTS)
    return radius * np.column_stack([np.cos(angle), np.sin(angle)])


def _closed(points: Any) -> np.ndarray:
    xy = np.asarray(points, dtype=float).reshape(-1, 2)
    return np.vstack([xy, xy[:1]])


def wall_outlines(points: np.ndarray, walls: np.ndarray, thicknesses: np.ndarray) -> np.ndarray:
    """Each wall as a closed rectangle about its mid-line, shape (m, 5, 2) (m).

    Parameters
    ----------
    points
        Mid-line points (m), (n, 2).
    walls
        Index pairs (start, end) of each wall, (m, 2).
    thicknesses
        Each wall's thickness t (m), (m,): the rectangle reaches t/2 either side.
    """
    start, end = points[walls[:, 0]], points[walls[:, 1]]
    along = end - start
    normal = np.column_stack([-along[:, 1], along[:, 0]]) / np.hypot(*along.T)[:, None]
    half = 0.5 * thicknesses[:, None] * normal
    corners = [start + half, end + half, end - half, start - half, start + half]
    return np.stack(corners, axis=1)


def padded_outlines(outlines: list[np.ndarray]) -> np.ndarray:
    """Closed outlines as one (k, n, 2) array, each padded to n with its own last point.

    A line mark takes rectangular arrays; the repeated point draws nothing.
    """
    if not outlines:
        return np.zeros((1, 2, 2))
    longest = max(len(o) for o in outlines)
    return np.stack([np.vstack([o, np.repeat(o[-1:], longest - len(o), axis=0)]) for o in outlines])


def section_shape(sections: list[Any]) -> SectionShape | None:
    """What to draw of a segment's section (its layers' for bonded layers), or ``None``.

    Parameters
    ----------
    sections
        The solver's section objects of the segment (one, or one per bonded layer), in SI.
    """
    shape = SectionShape()
    first = sections[0]
    if isinstance(first, OpenWarpingSection):
        props = first.properties
        shape.solid = list(wall_outlines(props.points, props.walls, props.thicknesses))
        shape.marks = [("shear centre", props.shear_centre), ("centroid", props.centroid)]
        points = stress_points([props])
        valid = points.valid[0]
        normal = np.where(valid, np.abs(points.unit_warping[0]), -1.0)
        shear = np.where(valid, np.abs(points.statical_per_thickness[0]), -1.0)
        shape.stress = [
            ("σ_w peaks (largest |Wn|)", points.location[0, int(np.argmax(normal))]),
            ("τ_w peaks (largest |Sw/t|)", points.location[0, int(np.argmax(shear))]),
        ]
        return shape
    if isinstance(first, FiniteElementSection):
        if isinstance(first, DrawingSection):
            outer, holes = drawing_outline(first.file, first.scale)
        else:
            outer, holes = first.outer, first.holes  # type: ignore[attr-defined]
        shape.solid = [_closed(outer)]
        shape.voids = [_closed(hole) for hole in holes]
        found = first.properties
        shape.marks = [
            ("shear centre", np.asarray(found.shear_centre)),
            ("centroid", np.asarray(found.centroid)),
        ]
        return shape
    if all(getattr(section, "circular", False) for section in sections):
        for section in sections:
            shape.solid.append(_circle(section.outer_radius))
            inner = float(getattr(section, "inner_diameter", 0.0) or 0.0)
            if inner > 0.0:
                shape.voids.append(_circle(0.5 * inner))
        shape.marks = [("centre (centroid and shear centre)", np.zeros(2))]
        return shape
    return None


class SectionView:
    """The picked segment's section, to scale, with its shear centre, centroid, stress points."""

    def __init__(self) -> None:
        self.x_scale, self.y_scale = bq.LinearScale(), bq.LinearScale()
        scales = {"x": self.x_scale, "y": self.y_scale}
        self.solid = bq.Lines(
            x=[], y=[], scales=scales, colors=[SHAFT], fill="inside",
            fill_colors=[SHAFT_FILL], fill_opacities=[0.8], stroke_width=1.2,
        )  # fmt: skip
        self.voids = bq.Lines(
            x=[], y=[], scales=scales, colors=[SHAFT], fill="inside",
            fill_colors=["white"], fill_opacities=[1.0], stroke_width=1.2,
        )  # fmt: skip
        self.marks = bq.Scatter(
            x=[], y=[], scales=scales, marker="circle", colors=[SUPPORT],
            default_size=40, names=[], display_names=True,
        )  # fmt: skip
        self.stress = bq.Scatter(
            x=[], y=[], scales=scales, marker="diamond", colors=[LIMIT, LOAD],
            default_size=70, names=[], display_names=True,
        )  # fmt: skip
        axes = [
            number_axis(self.x_scale, "x"),
            number_axis(self.y_scale, "y", side="left"),
        ]
        self.figure = bq.Figure(
            marks=[self.solid, self.voids, self.marks, self.stress],
            axes=axes,
            title="Cross-section",
            animation_duration=0,
            min_aspect_ratio=1.0,
            max_aspect_ratio=1.0,
            fig_margin=dict.fromkeys(("top", "bottom", "left", "right"), MARGIN),
            layout=w.Layout(width=f"{SIDE}px", height=f"{SIDE}px"),
            title_style={"font-size": "13px"},
        )
        self.figure.add_class("wb-chart-section")
        self.note = w.HTML()
        self.legend = Legend("section")
        self.box = w.VBox([self.note, self.figure, self.legend.widget])
        self._drawn: str | None = None

    def draw(self, sections: list[Any] | None, units: Any, words: str) -> None:
        """Draw ``sections`` (the segment's, SI; ``None``: no segment picked) in ``units``.

        ``words`` names the segment. A section drawn already (same shape and sizes, same units)
        is not sent again.
        """
        key = f"{words}|{sections!r}|{units!r}"
        if key == self._drawn:
            return
        self._drawn = key
        shape = section_shape(sections) if sections else None
        if shape is None:
            what = "Pick a segment" if not sections else "This shape has no drawing"
            self.note.value = render("italic", f"{what}: its cross-section is drawn here.")
            self.figure.layout.display = "none"
            self.legend.show([])
            return
        self.note.value = render("text", f"{words}, to scale")
        self.figure.layout.display = None
        length = unit_label(units, "length")

        def scaled(points: Any) -> np.ndarray:
            return units.from_si(np.asarray(points, dtype=float), "length")

        with held(self.figure):
            for mark, outlines in ((self.solid, shape.solid), (self.voids, shape.voids)):
                mark.visible = bool(outlines)
                padded = scaled(padded_outlines(outlines))
                if len(padded) == 1:  # bqplot squeezes a (1, n) array: one line is 1-D
                    padded = padded[0]
                mark.x, mark.y = padded[..., 0], padded[..., 1]
            for mark, named in ((self.marks, shape.marks), (self.stress, shape.stress)):
                xy = scaled([p for _, p in named]).reshape(-1, 2)
                mark.visible = bool(named)
                mark.x, mark.y = xy[:, 0], xy[:, 1]
                set_list(mark, "names", [name.split(" (")[0] for name, _ in named])
            every = np.vstack([scaled(o) for o in shape.solid])
            low, high = every.min(axis=0), every.max(axis=0)
            middle, span = 0.5 * (low + high), 1.2 * float((high - low).max())
            for scale, centre in ((self.x_scale, middle[0]), (self.y_scale, middle[1])):
                scale.min, scale.max = float(centre - span / 2), float(centre + span / 2)
            self.figure.axes[0].label = f"x [{length}]"
            self.figure.axes[1].label = f"y [{length}]"
        entries = [LegendEntry("material (walls drawn with their thickness)", SHAFT, "solid")]
        for name, point in shape.marks:
            x, y = scaled(point).tolist()
            entries.append(
                LegendEntry(f"{name} ({x:.4g}, {y:.4g}) {length}", SUPPORT, "", "circle")
            )
        for (name, point), colour in zip(shape.stress, (LIMIT, LOAD), strict=False):
            x, y = scaled(point).tolist()
            entries.append(
                LegendEntry(f"{name} ({x:.4g}, {y:.4g}) {length}", colour, "", "diamond")
            )
        self.legend.show(entries)
