"""The Restrained warping section: method, equations, peak values, diagrams, what is not covered.

Shown only for a case whose sections warp (:attr:`~workbench.solver.results.Results.warping`
is set); records of every other case have no such section. For every load case and combination
it gives, shaft by shaft, the largest |bimoment| and the largest |T_sv| and |T_w| with where each
occurs, the bimoment each warping restraint exerts, and a diagram of the three along the shaft.

The verifier rebuilds this section from the signed case (it is one of the computed sections),
so it is made from the results alone.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961 (restrained torsion of
   thin-walled open members).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.design.independent import WARPING_NOT_COVERED
from workbench.record.drawing import data_uri
from workbench.record.figures import line_diagram_svg
from workbench.record.view_model.common import Equation, Rows, equations, number, unit_labels
from workbench.solver.analysis import Results
from workbench.solver.polygon_sections import FiniteElementSection
from workbench.solver.warping_supports import unstated_restraint_warning

__all__ = ["WarpingBlock", "WarpingView", "warping_view"]


@dataclass(frozen=True)
class WarpingBlock:
    """One load case or combination.

    Attributes
    ----------
    kind, name
        ``Load case`` or ``Combination``, and its name.
    peaks
        Rows: shaft, largest |B| and its x, largest |T_sv| and its x, largest |T_w| and its x.
    restraints
        Rows: support number, shaft, x, kind, warping condition, bimoment reaction.
    diagrams
        ``(shaft id, data: URI)`` of B, T_sv and T_w along each shaft.
    """

    kind: str
    name: str
    peaks: Rows
    restraints: Rows
    diagrams: list[tuple[str, str]]


@dataclass(frozen=True)
class WarpingView:
    """What the Restrained warping section shows.

    Attributes
    ----------
    units
        Labels of length, torque and bimoment (torque·length).
    equations
        The section's numbered equations.
    unstated
        The warning naming fixed supports that state no warping condition, or ``None``.
    not_covered
        The sentence that the independent check does not cover restrained warping.
    blocks
        One per result.
    finite_element
        Whether a section by finite elements (polygon, dxf) warps: the method then says where
        its stresses are taken and that its warping shear is not computed.
    """

    units: dict[str, str]
    equations: tuple[Equation, ...]
    unstated: str | None
    not_covered: str
    blocks: list[WarpingBlock]
    finite_element: bool = False


def _peak(x: np.ndarray, values: np.ndarray) -> tuple[str, str]:
    """The largest |value| and its x, as written."""
    at = int(np.argmax(np.abs(values)))
    return number(float(abs(values[at]))), number(float(x[at]))


def warping_view(results: Results, printed: bool = True) -> WarpingView:
    """The Restrained warping section of solved ``results`` whose sections warp.

    Parameters
    ----------
    results
        Solved results with :attr:`~workbench.solver.results.Results.warping` set.
    printed
        Units as the unit library prints them, else as the case file writes them.
    """
    warping = results.warping
    assert warping is not None  # the caller shows this section only for such cases
    model = results.model
    units = model.units
    labels = unit_labels(units, "length", "torque", printed=printed)
    labels["bimoment"] = f"{labels['torque']}·{labels['length']}"
    per_length = float(units.from_si(1.0, "length"))
    mesh = results.mesh
    blocks = []
    for row, result in enumerate(results):
        peaks: Rows = []
        diagrams: list[tuple[str, str]] = []
        for number_of_shaft, shaft_id in enumerate(results.shaft_ids):
            window = slice(
                int(mesh.shaft_station_start[number_of_shaft]),
                int(mesh.shaft_station_start[number_of_shaft + 1]),
            )
            x = units.from_si(mesh.station_x[window], "length")
            bimoment = units.from_si(warping.bimoment[row, window], "torque") * per_length
            saint_venant = units.from_si(warping.saint_venant_torque[row, window], "torque")
            warping_part = units.from_si(warping.warping_torque[row, window], "torque")
            peaks.append(
                [
                    shaft_id,
                    *_peak(x, bimoment),
                    *_peak(x, saint_venant),
                    *_peak(x, warping_part),
                ]
            )
            svg = line_diagram_svg(
                x,
                [
                    (f"bimoment B [{labels['bimoment']}]", bimoment),
                    (f"Saint-Venant torque T_sv [{labels['torque']}]", saint_venant),
                    (f"warping torque T_w [{labels['torque']}]", warping_part),
                ],
                f"x along shaft {shaft_id} [{labels['length']}]",
            )
            diagrams.append((shaft_id, data_uri(svg)))
        reactions = units.from_si(warping.bimoment_reactions[row], "torque") * per_length
        restraints: Rows = [
            [
                index,
                support.shaft,
                number(units.from_si(support.x, "length")),
                support.kind,
                support.warping or "free (not stated)",
                number(float(reactions[index]), 6),
            ]
            for index, support in enumerate(model.supports)
        ]
        kind = "Combination" if result.is_combination else "Load case"
        blocks.append(WarpingBlock(kind, result.name, peaks, restraints, diagrams))
    return WarpingView(
        labels,
        equations("warping"),
        unstated_restraint_warning(results.table),
        WARPING_NOT_COVERED,
        blocks,
        any(
            isinstance(segment.layers[0].section, FiniteElementSection)
            and segment.layers[0].section.warping_constant > 0.0
            for shaft in model.shafts
            for segment in shaft.segments
        ),
    )
