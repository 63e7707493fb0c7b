"""One solved model's warping checks: its open sections' stresses judged, as check rows.

Where a case's sections warp (:attr:`~workbench.solver.results.Results.warping` is set), every
segment whose section is an open thin-walled shape (I, channel, Z, angle, tee, polyline) gets
the three rows of :mod:`workbench.design.warping_checks` — warping normal stress, shear
(Saint-Venant plus warping plus the stated bending shear) and √(σ² + 3τ²) — for every load case
and combination, the torsional stresses taken at every station and stress point of the section.
The segment's ``shear_stress`` row stays: it is the Saint-Venant shear G·t_max·θ′ alone, which
the ``warping_shear_stress`` row contains at the same wall, so for open sections the latter
governs shear; a report note (:data:`SAINT_VENANT_PART`) says so.

A section that warps but has no wall mid-line (a polygon or drawing section by finite elements)
has one stress point, the mesh node of largest |Wn| (:mod:`workbench.solver.fe_sections`), where
σ_w = E·Wn·θ″ peaks; its Saint-Venant shear there is taken as the section's largest,
(τ/T)·T_sv, wherever that peaks (an upper bound). Its warping shear is not computed — thin-wall
theory's E·Sw·θ‴/t needs a wall mid-line — so its ``warping_shear_stress`` row is the
Saint-Venant shear plus the stated bending shear, and the row's note says the warping shear is
left out (:data:`FINITE_ELEMENT_SHEAR`).

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V (σ_w = E·Wn·θ″,
   τ_w = E·Sw·θ‴/t), through :mod:`workbench.solver.warping_stress`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, short
from workbench.case.materials import Material
from workbench.design.check_report import Check
from workbench.design.static_checks import IntArray, station_segments
from workbench.design.warping_checks import (
    WarpingCheckInputs,
    WarpingRowPlaces,
    coexisting_by_segment,
    warping_check_rows,
    warping_limits,
    warping_utilisations,
)
from workbench.solver.analysis import Results
from workbench.solver.open_sections import OpenSectionWarping
from workbench.solver.polygon_sections import FiniteElementSection
from workbench.solver.warping_sections import OpenWarpingSection
from workbench.solver.warping_stress import (
    StressPoints,
    join_stress_points,
    node_stress_points,
    stress_points,
    torsional_stresses,
)

__all__ = ["FINITE_ELEMENT_SHEAR", "SAINT_VENANT_PART", "WarpingRows", "warping_rows"]

#: The report's note where a section by finite elements is judged in restrained torsion.
FINITE_ELEMENT_SHEAR = (
    "sections by finite elements (polygon, dxf) in restrained torsion: warping normal stress "
    "E·Wn·θ″ at the mesh node of largest |Wn|; their warping shear is NOT computed (thin-wall "
    "theory's E·Sw·θ‴/t needs a wall mid-line), so warping_shear_stress is the largest "
    "Saint-Venant shear (τ/T)·T_sv plus the stated bending shear: judge the warping shear "
    "separately where the section is thin-walled"
)

#: The report's note where the warping checks judge some segment.
SAINT_VENANT_PART = (
    "open sections in restrained torsion: shear_stress and twist_rate are the Saint-Venant "
    "part's (G·t·θ′, θ′); warping_shear_stress adds the warping shear E·Sw·θ‴/t at each wall "
    "and governs shear; each warping row's note says what was added"
)


@dataclass(frozen=True)
class WarpingRows:
    """The warping rows of one model and what the report says of them.

    Attributes
    ----------
    rows
        The check rows, by segment, kind and result.
    checked
        (G,) whether each segment's warping stresses were judged (an open section, or one by
        finite elements that warps).
    notes
        Remarks for the report (what the shear rows hold).
    """

    rows: list[Check]
    checked: np.ndarray
    notes: list[str]


def warping_rows(
    results: Results,
    design: DesignCriteria,
    segment_start: IntArray,
    shafts: tuple[str, ...],
    numbers: tuple[int, ...],
) -> WarpingRows:
    """The warping check rows of a solved model whose sections warp (none if they do not).

    Parameters
    ----------
    results
        Solved results; :attr:`~workbench.solver.results.Results.warping` holds θ′, θ″ and θ‴
        (rad/m, rad/m², rad/m³) at every station.
    design
        Criteria: factor of safety, shear criterion, stated coexisting stresses.
    segment_start
        (G,) index of each segment's first station (segments shaft after shaft).
    shafts, numbers
        (G,) shaft id and index on its shaft of each segment.

    Returns
    -------
    WarpingRows
        Rows, the segments judged, and the report's notes.

    Raises
    ------
    InputError
        A material of an open section lacks its yield strength or E, named by the material.

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, ch. V, as in the module's references.
    """
    count = len(segment_start)
    warping = results.warping
    if warping is None:
        return WarpingRows([], np.zeros(count, dtype=bool), [])
    model = results.model
    segments = [segment for shaft in model.shafts for segment in shaft.segments]
    sections: dict[int, int] = {}  # id(section) → its index among the distinct open sections
    properties: list[OpenSectionWarping] = []
    finite: dict[int, int] = {}  # id(section) → its index among the distinct FE sections
    finite_sections: list[FiniteElementSection] = []
    segment_finite = np.full(count, -1, dtype=np.intp)
    segment_section = np.full(count, -1, dtype=np.intp)
    materials: dict[int, int] = {}
    distinct_materials: list[Material] = []
    segment_material = np.zeros(count, dtype=np.intp)
    for index, segment in enumerate(segments):  # reading the segment objects: one pass
        layer = segment.layers[0]
        section = layer.section
        if isinstance(section, OpenWarpingSection):
            segment_section[index] = sections.setdefault(id(section), len(sections))
            if len(properties) < len(sections):
                properties.append(section.properties)
        elif isinstance(section, FiniteElementSection) and section.warping_constant > 0.0:
            segment_finite[index] = finite.setdefault(id(section), len(finite))
            if len(finite_sections) < len(finite):
                finite_sections.append(section)
        else:
            continue
        material = layer.material
        if material.elastic_modulus is None:  # refused when the model was built; named here too
            msg = "a section in restrained torsion needs the elastic modulus E"
            raise InputError(f"materials.{short(material.name)}.elastic_modulus", msg)
        segment_material[index] = materials.setdefault(id(material), len(materials))
        if len(distinct_materials) < len(materials):
            distinct_materials.append(material)
    # The sections by finite elements follow the open ones in the stress points.
    is_finite = segment_finite >= 0
    segment_section[is_finite] = len(properties) + segment_finite[is_finite]
    checked = segment_section >= 0
    if not checked.any():
        return WarpingRows([], checked, [])
    stations = int(results.mesh.station_x.shape[0])
    station_segment = station_segments(segment_start, stations)
    station_section = segment_section[station_segment]
    moduli = np.array(
        [[m.shear_modulus, m.elastic_modulus or 0.0] for m in distinct_materials], dtype=float
    )[segment_material[station_segment]]
    points = _stress_points(properties, finite_sections)
    stresses = torsional_stresses(
        points,
        station_section,
        warping.rate,
        warping.second,
        warping.third,
        moduli[:, 0],
        moduli[:, 1],
    )
    try:
        limits = warping_limits(distinct_materials, segment_material, design)
    except InputError as error:
        # Named where the case defines the material.
        lacking = [m for m in distinct_materials if m.yield_strength is None]
        if error.field != "yield_strength" or not lacking:
            raise
        material = lacking[0]
        field = f"materials.{short(material.name)}.yield_strength"
        raise InputError(field, error.message) from None
    counts = [len(shaft.segments) for shaft in model.shafts]
    normal, shear = coexisting_by_segment(design, results.shaft_ids, counts)
    inputs = WarpingCheckInputs(segment_start, stresses, normal, shear, limits)
    with np.errstate(over="ignore", invalid="ignore"):  # out of range: refused by the caller
        judged = warping_utilisations(inputs)
    places = WarpingRowPlaces(
        results.names, shafts, numbers, results.mesh.station_x, station_section, points, is_finite
    )
    notes = [SAINT_VENANT_PART] if properties else []
    if finite_sections:
        notes.append(FINITE_ELEMENT_SHEAR)
    return WarpingRows(warping_check_rows(inputs, judged, places), checked, notes)


def _stress_points(
    open_sections: list[OpenSectionWarping], finite_sections: list[FiniteElementSection]
) -> StressPoints:
    """The open sections' stress points, then one node of each section by finite elements."""
    nodes = node_stress_points(
        [section.properties.unit_warping_peak for section in finite_sections],
        np.array([section.properties.unit_warping_peak_at for section in finite_sections]),
        [section.shear_stress_per_torque * section.torsion_constant for section in finite_sections],
    )
    if not open_sections:
        return nodes
    walls = stress_points(open_sections)
    return join_stress_points(walls, nodes) if finite_sections else walls
