"""Torsional stresses of thin-walled open sections at the points where they peak, as arrays.

Three stresses act on the wall of an open section in non-uniform (restrained) torsion:

* the pure-torsion (Saint-Venant) shear τ_sv = G·t·θ′ on the faces of a wall of thickness t,
  opposite on the two faces and constant along the wall;
* the warping shear τ_w = E·Sw·θ‴/t, uniform through the thickness, with Sw the warping statical
  moment at the point (its sign is that of the flow along the wall from its start to its end);
* the warping normal stress σ_w = E·Wn·θ″ = −B·Wn/Cw, with Wn the normalised unit warping.

Along a straight wall Wn is linear and Sw quadratic, stationary where Wn = 0. Each stress
therefore peaks at a wall's ends or, for the warping shear, inside a wall where Wn changes sign.
:func:`stress_points` lists those points of every section (its *stress points*): each wall's
start and end, and the point inside it where Wn = 0 if there is one. A junction of walls is one
point of the mid-line but a stress point of each wall that meets there, since t and Sw belong to
the wall. :func:`torsional_stresses` evaluates the three stresses at every stress point of every
station and load case at once.

Shapes: N sections; P stress points per section (padded, the valid ones first); S stations; any
leading axes (load cases, variants) on the derivatives of θ.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., Israel Program for Scientific
   Translations, 1961, ch. I and V (sectorial coordinates, σ_w = E·ω·θ″, the flow of warping
   shear E·Sw·θ‴) (chapters from memory).
.. [2] S. P. Timoshenko and J. M. Gere, *Theory of Elastic Stability*, 2nd ed., McGraw-Hill,
   1961, ch. 5 (non-uniform torsion of thin-walled open members) (chapter from memory).
.. [3] A. P. Boresi and R. J. Schmidt, *Advanced Mechanics of Materials*, 6th ed., Wiley, 2003,
   ch. 10 (τ = G·t·θ′ on the faces of a thin open wall; restrained warping) (from memory).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from workbench.solver.open_sections import OpenSectionWarping

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.intp]
BoolArray = npt.NDArray[np.bool_]

#: What each stress point of a wall is, by the code in :attr:`StressPoints.kind`.
POINT_KINDS: tuple[str, ...] = (
    "start",
    "end",
    "inside (Wn = 0)",
    "mesh node of largest |Wn| (finite elements)",
)
#: The code in :attr:`StressPoints.kind` of a section by finite elements' one stress point.
NODE_KIND = 3

#: Relative size (of a section's largest |Wn|) below which Wn counts as zero at a wall's end.
_ROUND_OFF = 1e-9


@dataclass(frozen=True)
class StressPoints:
    """The stress points of N sections, padded to P points each (valid points first).

    Attributes
    ----------
    valid
        (N, P) whether the slot holds a stress point.
    wall
        (N, P) index of the point's wall in its section (−1 in padding).
    kind
        (N, P) code into :data:`POINT_KINDS` (−1 in padding).
    location
        (N, P, 2) the point on the wall's mid-line (m), in the section's coordinates; 0 in
        padding.
    thickness
        (N, P) thickness t of the point's wall (m); 0 in padding.
    unit_warping
        (N, P) normalised unit warping Wn (m²); 0 in padding.
    statical_moment
        (N, P) warping statical moment Sw (m⁴), signed along the wall from start to end; 0 in
        padding.
    statical_per_thickness
        (N, P) Sw/t (m³); 0 in padding (so no stress arises there).
    """

    valid: BoolArray
    wall: IntArray
    kind: IntArray
    location: FloatArray
    thickness: FloatArray
    unit_warping: FloatArray
    statical_moment: FloatArray
    statical_per_thickness: FloatArray

    def describe(
        self, section: int, point: int, length_label: str = "m", scale: float = 1.0
    ) -> str:
        """The point in words, e.g. ``"wall 2 end at (50, 194)"``, lengths × ``scale``."""
        if not self.valid[section, point]:
            return "no stress point"
        x, y = (scale * self.location[section, point]).tolist()
        kind = POINT_KINDS[int(self.kind[section, point])]
        wall = int(self.wall[section, point])
        if wall < 0:  # a section by finite elements: no walls
            return f"{kind} at ({x:.4g}, {y:.4g}) {length_label}"
        return f"wall {wall} {kind} at ({x:.4g}, {y:.4g}) {length_label}"


def stress_points(sections: Sequence[OpenSectionWarping]) -> StressPoints:
    """The stress points of each section: every wall's ends and its inner point where Wn = 0.

    Parameters
    ----------
    sections
        N open sections (:func:`~workbench.solver.open_sections.open_section`), in SI.

    Returns
    -------
    StressPoints
        (N, P) arrays, P the most stress points of any section; a section's points come
        first, wall by wall (start, end, inside), padding after.

    Notes
    -----
    Inside a wall from A to B where Wn changes sign, Wn = 0 at the fraction f = Wn_A/(Wn_A − Wn_B)
    of its length b, and Sw there is Sw_A + t·b·f·(Wn_A + (Wn_B − Wn_A)·f/2) (Wn linear along the
    wall).

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, ch. I (Sw = ∫Wn·t ds), as in the module's
       references.
    """
    counts = np.array([len(section.walls) for section in sections], dtype=np.intp)
    owner = np.repeat(np.arange(len(sections)), counts)
    ends = np.concatenate([section.points[section.walls] for section in sections]).reshape(-1, 2, 2)
    w_ends = np.concatenate([section.unit_warping[section.walls] for section in sections]).reshape(
        -1, 2
    )
    statical = np.concatenate([section.statical_moment for section in sections]).reshape(-1, 2)
    thickness = np.concatenate([section.thicknesses for section in sections])
    lengths = np.hypot(*(ends[:, 1] - ends[:, 0]).T)

    w0, w1 = w_ends.T
    # A sign change by round-off (Wn ≈ 0 at both ends, a web of an I) is no inner point.
    largest = np.zeros(len(sections))
    np.maximum.at(largest, owner, np.maximum(np.abs(w0), np.abs(w1)))
    noise = _ROUND_OFF * largest[owner]
    changes = (w0 * w1 < 0.0) & (np.abs(w0) > noise) & (np.abs(w1) > noise)
    fraction = np.where(changes, w0 / np.where(changes, w0 - w1, 1.0), 0.0)
    inside = statical[:, 0] + thickness * lengths * fraction * (w0 + (w1 - w0) * fraction / 2.0)
    # Candidates wall by wall: (walls, 3) → flat, in the order start, end, inside.
    candidate_w = np.column_stack([w0, w1, np.zeros_like(w0)]).ravel()
    candidate_sw = np.column_stack([statical, np.where(changes, inside, 0.0)]).ravel()
    at = np.column_stack([np.zeros_like(fraction), np.ones_like(fraction), fraction])
    candidate_xy = ends[:, None, 0] + at[..., None] * (ends[:, None, 1] - ends[:, None, 0])
    candidate_valid = np.column_stack([np.ones((len(w0), 2), dtype=bool), changes]).ravel()
    candidate_owner = np.repeat(owner, 3)
    first_wall = np.concatenate([[0], np.cumsum(counts)[:-1]])
    candidate_wall = np.repeat(np.arange(len(w0)) - first_wall[owner], 3)
    candidate_kind = np.tile(np.arange(3), len(w0))
    candidate_t = np.repeat(thickness, 3)

    # Each section's valid candidates first: the slot of a valid one is its rank among them.
    width = int(np.bincount(candidate_owner[candidate_valid], minlength=len(sections)).max())
    order = np.lexsort((~candidate_valid, candidate_owner))  # stable: walls keep their order
    section_start = np.concatenate([[0], np.cumsum(3 * counts)[:-1]])
    slot = np.empty(len(order), dtype=np.intp)
    slot[order] = np.arange(len(order)) - section_start[candidate_owner[order]]

    def scatter(values: npt.NDArray, fill: float | int, dtype: npt.DTypeLike) -> npt.NDArray:
        table = np.full((len(sections), width, *values.shape[1:]), fill, dtype=dtype)
        chosen = candidate_valid
        table[candidate_owner[chosen], slot[chosen]] = values[chosen]
        return table

    valid = scatter(candidate_valid, fill=False, dtype=bool)
    t = scatter(candidate_t, 0.0, float)
    sw = scatter(candidate_sw, 0.0, float)
    per_thickness = np.divide(sw, t, out=np.zeros_like(sw), where=valid)
    return StressPoints(
        valid=valid,
        wall=scatter(candidate_wall, -1, np.intp),
        kind=scatter(candidate_kind, -1, np.intp),
        location=scatter(candidate_xy.reshape(-1, 2), 0.0, float),
        thickness=t,
        unit_warping=scatter(candidate_w, 0.0, float),
        statical_moment=sw,
        statical_per_thickness=per_thickness,
    )


def node_stress_points(
    unit_warping: npt.ArrayLike, location: npt.ArrayLike, shear_thickness: npt.ArrayLike
) -> StressPoints:
    """One stress point for each of N sections by finite elements: its node of largest |Wn|.

    Parameters
    ----------
    unit_warping
        (N,) Wn at that node (m²), signed as thin-wall theory's (σ_w = E·Wn·θ″).
    location
        (N, 2) the node (m), in the section's coordinates.
    shear_thickness
        (N,) (τ/T)·J (m): the length that makes G·t·θ′ the section's largest Saint-Venant
        shear, (τ/T)·G·J·θ′ — taken at this point though it peaks elsewhere (an upper bound).

    Returns
    -------
    StressPoints
        (N, 1) arrays; no warping statical moment (Sw = 0): the warping shear of a section
        without a wall mid-line is not found by thin-wall theory and is not computed.

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, ch. V (σ_w = E·Wn·θ″), as in the module's
       references.
    """
    warping = np.asarray(unit_warping, dtype=float).reshape(-1, 1)
    count = warping.shape[0]
    return StressPoints(
        valid=np.ones((count, 1), dtype=bool),
        wall=np.full((count, 1), -1, dtype=np.intp),
        kind=np.full((count, 1), NODE_KIND, dtype=np.intp),
        location=np.asarray(location, dtype=float).reshape(count, 1, 2),
        thickness=np.asarray(shear_thickness, dtype=float).reshape(count, 1),
        unit_warping=warping,
        statical_moment=np.zeros((count, 1)),
        statical_per_thickness=np.zeros((count, 1)),
    )


def join_stress_points(first: StressPoints, second: StressPoints) -> StressPoints:
    """The sections of ``first`` then those of ``second``, padded to the wider of the two."""
    width = max(first.valid.shape[1], second.valid.shape[1])

    def padded(points: StressPoints, name: str, fill: float | int) -> npt.NDArray:
        array = getattr(points, name)
        pad = [(0, 0), (0, width - array.shape[1])] + [(0, 0)] * (array.ndim - 2)
        return np.pad(array, pad, constant_values=fill)

    fills = {"valid": False, "wall": -1, "kind": -1}
    joined = {
        name: np.concatenate(
            [padded(first, name, fills.get(name, 0.0)), padded(second, name, fills.get(name, 0.0))]
        )
        for name in StressPoints.__dataclass_fields__
    }
    return StressPoints(**joined)


@dataclass(frozen=True)
class TorsionalStresses:
    """The three torsional stresses at every stress point, shape (..., S, P), signed (Pa).

    Attributes
    ----------
    saint_venant_shear
        τ_sv = G·t·θ′ on the wall's faces (the other face carries −τ_sv).
    warping_shear
        τ_w = E·(Sw/t)·θ‴, along the wall from its start to its end.
    warping_normal
        σ_w = E·Wn·θ″, positive in tension.
    valid
        (S, P) whether the slot is a stress point of the station's section (stresses are 0
        elsewhere).
    """

    saint_venant_shear: FloatArray
    warping_shear: FloatArray
    warping_normal: FloatArray
    valid: BoolArray


def torsional_stresses(
    points: StressPoints,
    station_section: npt.ArrayLike,
    rate: npt.ArrayLike,
    second: npt.ArrayLike,
    third: npt.ArrayLike,
    shear_modulus: npt.ArrayLike,
    elastic_modulus: npt.ArrayLike,
) -> TorsionalStresses:
    """τ_sv, τ_w and σ_w at every stress point of every station and load case at once.

    Parameters
    ----------
    points
        The stress points of N sections (:func:`stress_points`).
    station_section
        (S,) index of each station's section into ``points``; −1 for a station of no open
        section (a circular or closed part), whose stresses are then 0 and not valid.
    rate, second, third
        (..., S) θ′ (rad/m), θ″ (rad/m²) and θ‴ (rad/m³) at the stations, any leading axes
        (load cases, variants), as :func:`~workbench.solver.warping_member.recover` gives them.
    shear_modulus, elastic_modulus
        (S,) or scalar G and E of each station's material (Pa).

    Returns
    -------
    TorsionalStresses
        (..., S, P) signed stresses (Pa).

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, ch. V (σ_w = E·ω·θ″, τ_w = E·Sw·θ‴/t) and
       Boresi & Schmidt, *Advanced Mechanics of Materials*, 6th ed., ch. 10 (τ_sv = G·t·θ′),
       as in the module's references.

    Examples
    --------
    >>> from workbench.solver.open_shapes import i_section
    >>> section = i_section(0.3, 0.15, 0.15, 0.012, 0.012, 0.008)
    >>> stresses = torsional_stresses(stress_points([section]), [0], [0.0], [1e-3], [0.0],
    ...                               80e9, 200e9)
    >>> round(float(abs(stresses.warping_normal).max()) / 1e6, 3)  # E·(h0·bf/4)·θ″
    2.16
    """
    section = np.asarray(station_section, dtype=np.intp)
    # One padding row at the end: a station of no open section (index −1) reads it.
    padding = (np.zeros((1, points.valid.shape[1])),)
    thickness = np.concatenate([points.thickness, *padding])[section]
    warping = np.concatenate([points.unit_warping, *padding])[section]
    per_thickness = np.concatenate([points.statical_per_thickness, *padding])[section]
    valid = np.concatenate([points.valid, padding[0].astype(bool)])[section]
    shear = np.broadcast_to(np.asarray(shear_modulus, dtype=float), section.shape)[:, None]
    elastic = np.broadcast_to(np.asarray(elastic_modulus, dtype=float), section.shape)[:, None]
    rate_, second_, third_ = (np.asarray(a, dtype=float)[..., None] for a in (rate, second, third))
    # A product beyond the floats is refused by the checks that read it, naming its cause
    # (design.finite_checks), so it may overflow here without a warning.
    with np.errstate(over="ignore", invalid="ignore"):
        return TorsionalStresses(
            saint_venant_shear=(shear * thickness) * rate_,
            warping_shear=(elastic * per_thickness) * third_,
            warping_normal=(elastic * warping) * second_,
            valid=valid,
        )


__all__ = [
    "NODE_KIND",
    "POINT_KINDS",
    "StressPoints",
    "TorsionalStresses",
    "join_stress_points",
    "node_stress_points",
    "stress_points",
    "torsional_stresses",
]
