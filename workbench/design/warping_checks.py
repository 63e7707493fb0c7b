"""Checks of open sections in restrained torsion: warping normal stress, shear, and both at once.

The torsional stresses come from :mod:`workbench.solver.warping_stress` at the stress points of
each station's section (wall ends, and inside a wall where Wn = 0), for every load case; how the
rate of twist and its derivatives were found does not matter here. To them the checks add the
bending stresses the engineer states for each segment (``design.coexisting_stresses``), at full
value and with the sign of the torsional stress at every point, since their distribution over
the section is not known here (an upper bound; the row's note says what was added):

* ``warping_normal_stress``: σ = |σ_w| + σ_b against Sy/FoS;
* ``warping_shear_stress``: τ = |τ_sv| + |τ_w| + τ_b (the face where the Saint-Venant shear
  adds to the warping shear) against the allowable shear stress of the design's shear
  criterion (:func:`~workbench.design.allowables.allowable_shear_stress`);
* ``warping_combined_stress``: √(σ² + 3τ²) with σ and τ at the same stress point, against
  Sy/FoS.

Each is the largest over the points of the section and the stations of the segment, result by
result; a segment with no stress point (no open section, nor one by finite elements that
warps) is not checked (NaN). Shapes: R results (any leading
axes), S stations, P stress points, G segments.

References
----------
.. [1] P. A. Seaburg and C. J. Carter, *Torsional Analysis of Structural Steel Members*, AISC
   Design Guide 9, 1997, ch. 4 (torsional stresses combined with bending stresses at the same
   points of the section; from memory).
.. [2] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 5 (distortion-energy equivalent stress √(σ² + 3τ²) for a normal stress with
   one shear stress; Ssy = Sy/√3 or Sy/2).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from workbench.case.declaration import COEXISTING_STRESS_ORIGIN
from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, quoted
from workbench.case.materials import Material
from workbench.case.units import display_units, quote
from workbench.design.allowables import allowable_shear_stress
from workbench.design.check_report import Check
from workbench.design.static_checks import IntArray, segment_peaks, station_segments
from workbench.solver.sections import FloatArray
from workbench.solver.warping_stress import StressPoints, TorsionalStresses

#: The warping check kinds, in the order of the kind axis of :class:`WarpingUtilisations`.
WARPING_KINDS: tuple[str, ...] = (
    "warping_normal_stress",
    "warping_shear_stress",
    "warping_combined_stress",
)


_ROOT_THREE = float(np.sqrt(3.0))


@dataclass(frozen=True)
class WarpingLimits:
    """Each segment's limits on normal and shear stress and how they were found.

    Attributes
    ----------
    normal, shear
        (G,) Sy/FoS and the allowable shear stress (Pa).
    segment_material
        (G,) index of each segment's material into the bases.
    normal_basis, shear_basis
        (M,) the sentence of each material's limits, for the rows.
    """

    normal: FloatArray
    shear: FloatArray
    segment_material: IntArray
    normal_basis: tuple[str, ...]
    shear_basis: tuple[str, ...]


def warping_limits(
    materials: Sequence[Material], segment_material: npt.ArrayLike, design: DesignCriteria
) -> WarpingLimits:
    """Sy/FoS and the allowable shear stress of each segment, from its material.

    Parameters
    ----------
    materials
        (M,) the distinct materials of the segments.
    segment_material
        (G,) index of each segment's material into ``materials``.
    design
        The criteria: factor of safety, shear criterion, keyway, stated allowable.

    Raises
    ------
    InputError
        A material has no yield strength (named by the material), or the shear criterion needs
        a value the material lacks.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 5 (Sy/n; Ssy = Sy/√3 or
       Sy/2), as in the module's references.
    """
    fos = design.factor_of_safety
    normal, shear, normal_basis, shear_basis = [], [], [], []
    for material in materials:  # the distinct materials: a handful however many segments
        strength = material.yield_strength
        if strength is None:
            msg = (
                f"material {quoted(material.name)} has no yield strength; the warping checks "
                "compare normal stress with Sy/FoS"
            )
            raise InputError("yield_strength", msg)
        normal.append(strength / fos)
        normal_basis.append(
            f"Sy/FoS = {quote(strength, 'stress')}/{fos:g} = {quote(strength / fos, 'stress')}"
        )
        allowable = allowable_shear_stress(
            material, design.shear_criterion, fos, design.keyway, design.allowable_shear_stress
        )
        shear.append(allowable.value)
        shear_basis.append(allowable.basis)
    index = np.asarray(segment_material, dtype=np.intp)
    return WarpingLimits(
        np.asarray(normal, dtype=float)[index],
        np.asarray(shear, dtype=float)[index],
        index,
        tuple(normal_basis),
        tuple(shear_basis),
    )


def coexisting_by_segment(
    design: DesignCriteria, shaft_ids: Sequence[str], segment_counts: Sequence[int]
) -> tuple[FloatArray, FloatArray]:
    """(G,) stated normal and shear stresses from bending, segment by segment (Pa); 0 if none.

    Segments are numbered shaft after shaft, in the order of ``shaft_ids``. The entries were
    checked against the model when it was built (shaft known, segment on it, one entry each).
    """
    first = np.concatenate([[0], np.cumsum(segment_counts)[:-1]]).astype(np.intp)
    number = {shaft: index for index, shaft in enumerate(shaft_ids)}
    stated = design.coexisting_stresses
    where = np.array(
        [first[number[entry.shaft]] + entry.segment for entry in stated], dtype=np.intp
    )
    normal, shear = np.zeros(int(np.sum(segment_counts))), np.zeros(int(np.sum(segment_counts)))
    normal[where] = [entry.normal_stress for entry in stated]
    shear[where] = [entry.shear_stress for entry in stated]
    return normal, shear


@dataclass(frozen=True)
class WarpingCheckInputs:
    """What the warping checks read (shapes in the module text).

    Parameters
    ----------
    segment_start
        (G,) index of each segment's first station, increasing from 0.
    stresses
        (..., S, P) the torsional stresses (:func:`~workbench.solver.warping_stress.\
torsional_stresses`).
    coexisting_normal, coexisting_shear
        (G,) stated bending stresses of each segment (Pa), ≥ 0.
    limits
        Each segment's limits (:func:`warping_limits`).
    """

    segment_start: IntArray
    stresses: TorsionalStresses
    coexisting_normal: FloatArray
    coexisting_shear: FloatArray
    limits: WarpingLimits


@dataclass(frozen=True)
class WarpingUtilisations:
    """The warping checks of every result and segment.

    Attributes
    ----------
    value, limit
        (..., K, G) governing value and limit (Pa), K over :data:`WARPING_KINDS`; NaN where the
        segment has no open section.
    station, point
        (..., K, G) the station (index into S) and stress point (index into P) where it governs.
    normal, shear
        (..., K, G) σ and τ (Pa) at that station and point, coexisting stresses included: what
        each value is made of.
    checked
        (G,) whether the segment has an open section (a valid stress point at a station).
    """

    value: FloatArray
    limit: FloatArray
    station: IntArray
    point: IntArray
    normal: FloatArray
    shear: FloatArray
    checked: np.ndarray

    @property
    def utilisation(self) -> FloatArray:
        """(..., K, G) value/limit."""
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            utilisation: FloatArray = self.value / self.limit
        return utilisation


def point_stresses(inputs: WarpingCheckInputs) -> tuple[FloatArray, FloatArray, FloatArray]:
    """σ, τ and √(σ² + 3τ²) (Pa) at every stress point, coexisting stresses added.

    Returns
    -------
    tuple of numpy.ndarray
        (..., S, P) each: σ = |σ_w| + σ_b, τ = |τ_sv| + |τ_w| + τ_b and the combination.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 5 (√(σ² + 3τ²)), as in the
       module's references.
    """
    stresses = inputs.stresses
    segment = station_segments(inputs.segment_start, stresses.valid.shape[0])
    bending_normal = inputs.coexisting_normal[segment][:, None]  # (S, 1)
    bending_shear = inputs.coexisting_shear[segment][:, None]
    # In place: each is a whole (..., S, P) array, and a pass over it is the cost.
    normal = np.abs(stresses.warping_normal)
    normal += bending_normal
    shear = np.abs(stresses.saint_venant_shear)
    shear += np.abs(stresses.warping_shear)
    shear += bending_shear
    with np.errstate(over="ignore", under="ignore"):
        combined = normal * normal
        squared = shear * shear
        squared *= 3.0
        combined += squared
        np.sqrt(combined, out=combined)
    # Squares beyond the range of floats (stresses below 1e-154 Pa or above 1e154 Pa) leave
    # the root short or infinite: those points again by hypot, which does not square.
    lost = ~(combined >= np.maximum(normal, shear)) | np.isinf(combined)
    if np.any(lost):
        combined[lost] = np.hypot(normal[lost], _ROOT_THREE * shear[lost])
    return normal, shear, combined


def warping_utilisations(inputs: WarpingCheckInputs) -> WarpingUtilisations:
    """Judge the three warping checks of every result and segment at once.

    Parameters
    ----------
    inputs
        The stresses, stated bending stresses and limits.

    Returns
    -------
    WarpingUtilisations
        Values, limits, where each governs and what it is made of.

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, ch. 4; Shigley's *Mechanical Engineering
       Design*, 9th ed., ch. 5 — as in the module's references.

    Examples
    --------
    One I-section segment, two stations, one load case; 40 MPa stated from bending:

    >>> from workbench.case.materials import Material
    >>> from workbench.solver.open_shapes import i_section
    >>> from workbench.solver.warping_stress import stress_points, torsional_stresses
    >>> section = i_section(0.3, 0.15, 0.15, 0.012, 0.012, 0.008)
    >>> stresses = torsional_stresses(stress_points([section]), [0, 0], [[0.0, 1e-3]],
    ...                               [[1e-3, 0.0]], [[-5e-3, 0.0]], 79.3e9, 207e9)
    >>> steel = Material("steel", 79.3e9, 250e6, 400e6, elastic_modulus=207e9)
    >>> inputs = WarpingCheckInputs(np.array([0]), stresses, np.array([40e6]), np.array([0.0]),
    ...                             warping_limits([steel], [0], DesignCriteria()))
    >>> judged = warping_utilisations(inputs)
    >>> (judged.value[0, :, 0] / 1e6).round(2).tolist()  # σ, τ, √(σ² + 3τ²) in MPa
    [42.24, 0.95, 42.24]
    >>> judged.limit[0, :, 0].round(-3).tolist()  # Sy/FoS, Sy/√3/FoS, Sy/FoS
    [125000000.0, 72169000.0, 125000000.0]
    """
    normal, shear, combined = point_stresses(inputs)
    kinds = (normal, shear, combined)  # each (..., S, P); kinds, not segments, are looped
    # The first point on a tie: a valid one (they come first).
    point_of_station = np.stack([np.argmax(array, axis=-1) for array in kinds], axis=-2)
    station_value = np.stack(  # (..., K, S); reading at the argmax beats a second reduction
        [
            np.take_along_axis(array, point_of_station[..., number, :, None], axis=-1)[..., 0]
            for number, array in enumerate(kinds)
        ],
        axis=-2,
    )
    value, station = segment_peaks(station_value, inputs.segment_start)  # (..., K, G)
    point = np.take_along_axis(point_of_station, station, axis=-1)

    def at_governing(array: FloatArray) -> FloatArray:
        """(..., S, P) array read at each kind's governing station and point: (..., K, G)."""
        flat = array.reshape(*array.shape[:-2], 1, -1)  # (..., 1, S·P)
        index = station * array.shape[-1] + point
        return np.take_along_axis(
            np.broadcast_to(flat, (*index.shape[:-1], flat.shape[-1])), index, -1
        )

    stresses = inputs.stresses
    checked = np.zeros(len(inputs.segment_start), dtype=bool)
    has_points = np.asarray(stresses.valid).any(axis=-1)  # (S,)
    checked[station_segments(inputs.segment_start, has_points.shape[0])[has_points]] = True
    limits = inputs.limits
    limit = np.stack([limits.normal, limits.shear, limits.normal])  # (K, G)
    value = np.where(checked, value, np.nan)
    limit = np.broadcast_to(np.where(checked, limit, np.nan), value.shape)
    return WarpingUtilisations(
        value=value,
        limit=limit,
        station=station,
        point=point,
        normal=at_governing(normal),
        shear=at_governing(shear),
        checked=checked,
    )


@dataclass(frozen=True)
class WarpingRowPlaces:
    """What names the rows of one model's warping checks.

    Attributes
    ----------
    results
        (R,) result names.
    shafts, numbers
        (G,) shaft id and index on its shaft of each segment.
    station_x
        (S,) position of each station along its shaft (m).
    station_section
        (S,) index of each station's section into the stress points (−1: none).
    points
        The stress points of the sections.
    finite_element
        (G,) whether the segment's section is one by finite elements (no wall mid-line: its
        warping shear is not computed); all False when not given.
    """

    results: tuple[str, ...]
    shafts: tuple[str, ...]
    numbers: tuple[int, ...]
    station_x: FloatArray
    station_section: IntArray
    points: StressPoints
    finite_element: np.ndarray | None = None


def warping_check_rows(
    inputs: WarpingCheckInputs, judged: WarpingUtilisations, places: WarpingRowPlaces
) -> list[Check]:
    """The check rows of one model (results on the leading axis of ``judged``), in report form.

    Rows by segment, kind and result, of the segments with an open section only; each row's
    note says what was added (the stated bending stresses) and where on the section it governs.
    Lengths and stresses in the notes are quoted in the display units of the caller
    (:data:`workbench.case.units.display_units`).
    """
    value, limit = judged.value.tolist(), judged.limit.tolist()
    station, point = judged.station.tolist(), judged.point.tolist()
    normal, shear = judged.normal.tolist(), judged.shear.tolist()
    limits = inputs.limits
    rows = []
    for index in np.flatnonzero(judged.checked).tolist():
        bending_normal = quote(float(inputs.coexisting_normal[index]), "stress")
        bending_shear = quote(float(inputs.coexisting_shear[index]), "stress")
        from_bending = f"from bending ({COEXISTING_STRESS_ORIGIN})"
        material = int(limits.segment_material[index])
        normal_basis, shear_basis = limits.normal_basis[material], limits.shear_basis[material]
        finite = places.finite_element is not None and bool(places.finite_element[index])
        # A section by finite elements: no wall, so no t or Sw; τ_sv is the section's largest.
        tau = (
            "τ = (τ/T)·G·J·|θ′| (largest Saint-Venant shear; warping shear not computed: no "
            f"wall mid-line) + {bending_shear}"
            if finite
            else f"τ = G·t·|θ′| + E·|Sw·θ‴|/t + {bending_shear}"
        )
        added = {
            "warping_normal_stress": (
                f"σ = |E·Wn·θ″| + {bending_normal} {from_bending}; limit {normal_basis}"
            ),
            "warping_shear_stress": f"{tau} {from_bending}; limit {shear_basis}",
            "warping_combined_stress": (
                f"√(σ² + 3τ²) at one point, σ = |E·Wn·θ″| + {bending_normal} and "
                f"{tau} {from_bending}; limit {normal_basis}"
            ),
        }
        for kind_number, kind in enumerate(WARPING_KINDS):
            for result, name in enumerate(places.results):
                at = station[result][kind_number][index]
                where = _point_words(places, at, point[result][kind_number][index])
                parts = (
                    f"σ = {quote(normal[result][kind_number][index], 'stress')}, "
                    f"τ = {quote(shear[result][kind_number][index], 'stress')}"
                )
                rows.append(
                    Check(
                        name,
                        places.shafts[index],
                        places.numbers[index],
                        kind,
                        value[result][kind_number][index],
                        limit[result][kind_number][index],
                        float(places.station_x[at]),
                        f"{added[kind]}; governs at {where} ({parts})",
                    )
                )
    return rows


def _point_words(places: WarpingRowPlaces, station: int, point: int) -> str:
    """The stress point in words, its coordinates in the display unit of length."""
    units = display_units.get()
    scale, label = float(units.from_si(1.0, "length")), units.label("length")
    section = int(places.station_section[station])
    return places.points.describe(section, point, label, scale)


__all__ = [
    "WARPING_KINDS",
    "WarpingCheckInputs",
    "WarpingLimits",
    "WarpingRowPlaces",
    "WarpingUtilisations",
    "coexisting_by_segment",
    "point_stresses",
    "warping_check_rows",
    "warping_limits",
    "warping_utilisations",
]
