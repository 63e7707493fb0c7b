"""Thin-walled open sections that warp: sectorial (warping) properties on the wall mid-line.

A section is a set of straight walls joining points of its mid-line, without a closed loop (a
tree: a polyline, or a polyline with branches such as an I or a tee). :func:`open_section` is the
one general routine; :func:`polyline_section` and the shape builders of
:mod:`workbench.solver.open_shapes` only lay out the mid-line and call it. Everything is in SI
metres and computed on arrays over the walls.

Method (Vlasov's theory of thin-walled open beams): the sectorial coordinate ω about a pole P
grows along the mid-line by dω = (r − P) × dr; on a straight wall from A to B it grows by the
cross product (A − P) × (B − P). The shear centre S is the pole about which ω has no product with
x or y; Wn = ω_S − ∫ω_S dA / A is the normalised unit warping, Cw = ∫Wn² dA the warping constant
and Sw(s) = ∫₀ˢ Wn·t ds the warping statical moment. Wn is linear along a wall, so the integrals
of a wall are closed forms of its end values.

References
----------
.. [1] A. P. Boresi and R. J. Schmidt, *Advanced Mechanics of Materials*, 6th ed., Wiley, 2003,
   ch. 8 (shear centre of thin-walled sections) and ch. 10 (torsion of thin-wall open sections,
   restrained warping) (chapter numbers from memory).
.. [2] P. A. Seaburg and C. J. Carter, *Torsional Analysis of Structural Steel Members*, AISC
   Design Guide 9, 1997, ch. 3 and App. C (torsional properties: J = Σb·t³/3, Wn, Sw, Cw; from
   memory for the appendix).
.. [3] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., Israel Program for Scientific
   Translations, 1961, ch. I (sectorial coordinates; from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.solver.thin_walls import _STRIP_END_DEFICIT, THIN_WALL_LIMIT

FloatArray = npt.NDArray[np.float64]
IndexArray = npt.NDArray[np.intp]

#: Relative size (of the section's extent) below which two mid-line points count as one, and a
#: cross product as zero: far below any drawing's precision, far above rounding.
_GEOMETRY_TOLERANCE = 1e-9


@dataclass(frozen=True)
class OpenSectionWarping:
    """Torsion and warping properties of a thin-walled open section (SI).

    Attributes
    ----------
    points
        Mid-line points (m), shape (n, 2), as given.
    walls
        Index pairs (start, end) into ``points`` of each wall, shape (m, 2).
    thicknesses
        Wall thicknesses (m), shape (m,).
    area
        Σ b·t (m²).
    centroid
        Centroid of the walls (m), shape (2,).
    torsion_constant
        J = Σ b·t³/3 (m⁴).
    warping_constant
        Cw = ∫Wn² dA (m⁶).
    shear_centre
        Shear centre (m), shape (2,), in the coordinates of ``points``.
    unit_warping
        Normalised unit warping Wn at each point (m²), shape (n,); linear along each wall.
    statical_moment
        Warping statical moment Sw (m⁴) at the start and end of each wall, shape (m, 2): the
        ∫Wn·t ds of the part of the section behind the point when going from the wall's start to
        its end (its sign flips with the wall's direction; warping shear τ = E·Sw·θ‴/t).
    peak_warping_point, peak_warping
        Where |Wn| is largest (m, shape (2,)) and Wn there (m²): the warping normal stress
        E·Wn·θ″ peaks there.
    peak_statical_point, peak_statical_wall, peak_statical_moment
        Where |Sw| is largest (m, shape (2,)), on which wall, and Sw there (m⁴), over wall ends
        and points inside walls where Wn changes sign (Sw is stationary there).

    References
    ----------
    .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, ch. 3 (stresses E·Wn·θ″, E·Sw·θ‴/t,
       G·t·θ′; from memory).
    """

    points: FloatArray
    walls: IndexArray
    thicknesses: FloatArray
    area: float
    centroid: FloatArray
    torsion_constant: float
    warping_constant: float
    shear_centre: FloatArray
    unit_warping: FloatArray
    statical_moment: FloatArray
    peak_warping_point: FloatArray
    peak_warping: float
    peak_statical_point: FloatArray
    peak_statical_wall: int
    peak_statical_moment: float

    @property
    def thickest_wall(self) -> int:
        """Index of the thickest wall, where the Saint-Venant shear G·t·θ′ is largest."""
        return int(np.argmax(self.thicknesses))


def polyline_section(
    points: npt.ArrayLike, thicknesses: npt.ArrayLike, field: str = "section"
) -> OpenSectionWarping:
    """Warping properties of an open section whose mid-line is one polyline.

    Parameters
    ----------
    points
        Mid-line points (m), shape (n, 2), n ≥ 2; wall k joins points k and k + 1.
    thicknesses
        Thickness of each wall (m), shape (n − 1,).
    field
        Field path that error messages name.

    References
    ----------
    .. [1] Boresi & Schmidt, *Advanced Mechanics of Materials*, 6th ed., ch. 8 and 10 (see the
       module's references).
    """
    count = np.shape(points)[0] if np.ndim(points) == 2 else 0
    walls = np.column_stack([np.arange(count - 1), np.arange(1, count)]) if count > 1 else None
    return open_section(points, walls, thicknesses, field)


def open_section(
    points: npt.ArrayLike,
    walls: npt.ArrayLike | None,
    thicknesses: npt.ArrayLike,
    field: str = "section",
) -> OpenSectionWarping:
    """Warping properties of a thin-walled open section: the one general routine.

    Parameters
    ----------
    points
        Mid-line points (m), shape (n, 2).
    walls
        Index pairs (start, end) into ``points``, shape (n − 1, 2): the walls must join all the
        points without a closed loop (an open section is a tree of walls).
    thicknesses
        Thickness of each wall (m), shape (n − 1,).
    field
        Field path that error messages name (``field.points[3]``, ``field.thicknesses[1]``).

    Raises
    ------
    InputError
        Naming the field: a malformed array, a non-positive thickness, a wall of zero length, a
        mid-line that crosses or touches itself, a closed loop or a part not joined to the rest,
        a wall as thick as the section is wide, or walls too stubby for thin-wall theory.

    Notes
    -----
    J = Σ b·t³/3; the free edges' deficits Σ 0.105·t⁴ must stay within
    :data:`~workbench.solver.thin_walls.THIN_WALL_LIMIT` of J (see :func:`_require_slender`).
    The shear centre solves [[∫xy, −∫x²], [∫y², −∫xy]]·(Sx − Px, Sy − Py) = (∫ω_P·x, ∫ω_P·y)
    (all ∫…dA, x and y from the centroid, ω_P the sectorial coordinate about the pole P at the
    centroid), since ω_S = ω_P − (Sx − Px)·y + (Sy − Py)·x + const and ω_S is orthogonal to x
    and y.

    References
    ----------
    .. [1] Boresi & Schmidt, *Advanced Mechanics of Materials*, 6th ed., ch. 8 (shear centre by
       sectorial products) and ch. 10 (Cw = ∫Wn² dA) (chapter numbers from memory).
    .. [2] Seaburg & Carter, AISC Design Guide 9, 1997, ch. 3 and App. C (Wn, Sw, Cw; from memory).
    """
    xy, pairs, t = _checked_arrays(points, walls, thicknesses, field)
    ends = xy[pairs]  # (m, 2 ends, 2 coordinates)
    lengths = np.hypot(*(ends[:, 1] - ends[:, 0]).T)
    _require_geometry(xy, pairs, t, lengths, field)
    wall_areas = t * lengths
    area = float(wall_areas.sum())
    centroid = wall_areas @ ends.mean(axis=1) / area
    local = ends - centroid
    torsion_constant = float(np.sum(lengths * t**3) / 3.0)
    _require_slender(t, lengths, pairs, torsion_constant, field)

    # Path matrix: path[j, k] = ±1 when wall k lies on the way from point 0 to point j.
    path = _path_matrix(pairs, len(xy), field)
    start_area = _sectorial_at_points(local, path, np.zeros(2))
    x2, y2, xy2 = _second_moments(local, wall_areas)
    omega_x, omega_y = _linear_products(start_area[pairs], local, wall_areas)
    # Walls all on one line leave the system singular: any pole on the line will do, and the
    # least-squares answer of least norm takes the centroid.
    system = np.array([[xy2, -x2], [y2, -xy2]])
    offset = np.linalg.lstsq(system, np.array([omega_x, omega_y]), rcond=1e-12)[0]
    sectorial = _sectorial_at_points(local, path, offset)
    sectorial_ends = sectorial[pairs]
    unit_warping = sectorial - float(wall_areas @ sectorial_ends.mean(axis=1)) / area
    w_ends = unit_warping[pairs]
    w_start, w_end = w_ends[:, 0], w_ends[:, 1]
    warping_constant = float(wall_areas @ (w_start**2 + w_start * w_end + w_end**2) / 3.0)
    statical = _statical_moments(pairs, path, wall_areas * (w_start + w_end) / 2.0)
    peak_point = int(np.argmax(np.abs(unit_warping)))
    peak = _peak_statical(ends, w_ends, t, lengths, statical)
    return OpenSectionWarping(
        points=xy,
        walls=pairs,
        thicknesses=t,
        area=area,
        centroid=centroid,
        torsion_constant=torsion_constant,
        warping_constant=warping_constant,
        shear_centre=centroid + offset,
        unit_warping=unit_warping,
        statical_moment=statical,
        peak_warping_point=xy[peak_point],
        peak_warping=float(unit_warping[peak_point]),
        peak_statical_point=peak[0],
        peak_statical_wall=peak[1],
        peak_statical_moment=peak[2],
    )


def _numbers(values: npt.ArrayLike, field: str) -> FloatArray:
    """``values`` as an array of floats, or :class:`InputError` naming ``field``."""
    try:
        return np.asarray(values, dtype=float)
    except (TypeError, ValueError):
        msg = f"must be an array of numbers, not {quoted(values)}"
        raise InputError(field, msg) from None


def _checked_arrays(
    points: npt.ArrayLike, walls: npt.ArrayLike | None, thicknesses: npt.ArrayLike, field: str
) -> tuple[FloatArray, IndexArray, FloatArray]:
    """The three arrays as numbers of the right shapes, or :class:`InputError`."""
    xy = _numbers(points, f"{field}.points")
    t = _numbers(thicknesses, f"{field}.thicknesses")
    pairs = _numbers(walls if walls is not None else np.zeros((0, 2)), f"{field}.walls")
    if xy.ndim != 2 or xy.shape[1] != 2 or len(xy) < 2:
        msg = f"must be at least two (x, y) mid-line points, not an array of shape {xy.shape}"
        raise InputError(f"{field}.points", msg)
    if not np.all(np.isfinite(xy)):
        bad = int(np.argmax(~np.all(np.isfinite(xy), axis=1)))
        raise InputError(f"{field}.points[{bad}]", "must be finite numbers")
    count = len(xy) - 1
    if pairs.shape != (count, 2) or not np.all(pairs == np.round(pairs)):
        msg = f"must be {count} pairs of point indices (a tree of walls), not shape {pairs.shape}"
        raise InputError(f"{field}.walls", msg)
    if pairs.size and (pairs.min() < 0 or pairs.max() > count):
        msg = f"must index the {count + 1} points (0 to {count})"
        raise InputError(f"{field}.walls", msg)
    if t.shape != (count,):
        msg = f"must give one thickness for each of the {count} walls, not shape {t.shape}"
        raise InputError(f"{field}.thicknesses", msg)
    bad_t = np.flatnonzero(~(np.isfinite(t) & (t > 0.0)))
    if bad_t.size:
        require_positive(f"{field}.thicknesses[{bad_t[0]}]", float(t[bad_t[0]]))
    return xy, pairs.astype(np.intp), t


def _require_geometry(
    xy: FloatArray, pairs: IndexArray, t: FloatArray, lengths: FloatArray, field: str
) -> None:
    """No zero-length wall, no crossing, no wall as thick as the section is wide."""
    extent = float(np.max(np.hypot(*(xy[:, None, :] - xy[None, :, :]).transpose(2, 0, 1))))
    short_walls = np.flatnonzero(lengths <= _GEOMETRY_TOLERANCE * max(extent, 1e-300))
    if short_walls.size:
        k = int(short_walls[0])
        msg = f"has zero length: its end points {pairs[k, 0]} and {pairs[k, 1]} coincide"
        raise InputError(f"{field}.walls[{k}]", msg)
    _require_no_crossing(xy, pairs, extent, field)
    thick = np.flatnonzero(t >= extent)
    if thick.size:
        k = int(thick[0])
        msg = (
            f"is thicker than the section is wide: {quote(float(t[k]), 'length')} is not less "
            f"than the mid-line's extent {quote(extent, 'length')}"
        )
        raise InputError(f"{field}.thicknesses[{k}]", msg)


def _require_no_crossing(xy: FloatArray, pairs: IndexArray, extent: float, field: str) -> None:
    """Raise when two walls meet other than end to end at a shared point, or a point repeats."""
    gaps = np.hypot(*(xy[:, None, :] - xy[None, :, :]).transpose(2, 0, 1))
    np.fill_diagonal(gaps, np.inf)
    tolerance = _GEOMETRY_TOLERANCE * extent
    if np.any(gaps <= tolerance):
        first, second = np.argwhere(gaps <= tolerance)[0]
        msg = f"coincides with point {first}: the mid-line touches itself"
        raise InputError(f"{field}.points[{second}]", msg)
    a, b = xy[pairs[:, 0]], xy[pairs[:, 1]]
    d = b - a

    def cross(u: FloatArray, v: FloatArray) -> FloatArray:
        return u[..., 0] * v[..., 1] - u[..., 1] * v[..., 0]

    # Wall i against wall j: parameters of the closest approach on each, clipped to the walls.
    denominator = cross(d[:, None, :], d[None, :, :])
    ab = a[None, :, :] - a[:, None, :]
    parallel = np.abs(denominator) <= _GEOMETRY_TOLERANCE * np.outer(*(2 * [np.hypot(*d.T)]))
    safe = np.where(parallel, 1.0, denominator)
    along_i = np.where(parallel, 0.5, cross(ab, d[None, :, :]) / safe)
    along_j = np.where(parallel, 0.5, cross(ab, d[:, None, :]) / safe)
    crossing = (~parallel) & (along_i > -1e-12) & (along_i < 1 + 1e-12)
    crossing &= (along_j > -1e-12) & (along_j < 1 + 1e-12)
    # Parallel walls overlap when one's end lies on the other within the tolerance.
    overlap = parallel & (np.abs(cross(ab, d[:, None, :])) <= tolerance * np.hypot(*d.T)[:, None])
    span = np.einsum("ijk,ik->ij", ab, d) / np.einsum("ik,ik->i", d, d)[:, None]
    reach = span + np.einsum("jk,ik->ij", d, d) / np.einsum("ik,ik->i", d, d)[:, None]
    overlap &= (np.maximum(span, reach) > 1e-9) & (np.minimum(span, reach) < 1 - 1e-9)
    shared = (pairs[:, None, :, None] == pairs[None, :, None, :]).any(axis=(2, 3))
    meeting = (crossing & ~shared) | overlap
    np.fill_diagonal(meeting, val=False)
    if np.any(meeting):
        first, second = np.argwhere(meeting)[0]
        msg = (
            f"meets wall {first} away from a shared end point: the mid-line must not cross "
            "itself (split a wall where another joins it)"
        )
        raise InputError(f"{field}.walls[{second}]", msg)


def _require_slender(
    t: FloatArray, lengths: FloatArray, pairs: IndexArray, torsion_constant: float, field: str
) -> None:
    """The free edges' end effects are a small part of J.

    Roark's deficit 0.21·t⁴ of a lone strip belongs to its two free edges, 0.105·t⁴ each; walls
    that run on into another wall have no free edge there (a mid-line polyline drawn through a
    curve has free edges at its two ends only). The limit is that of
    :class:`~workbench.solver.thin_walls.ThinWalledOpen`, which counts every wall as a lone strip.

    References
    ----------
    .. [1] Young & Budynas, *Roark's Formulas for Stress and Strain*, 7th ed., Table 10.1 case 4
       (the rectangle fit, taken at a long strip).
    """
    degree = np.bincount(pairs.ravel(), minlength=int(pairs.max()) + 1)
    free_edges = (degree[pairs] == 1).sum(axis=1)
    deficit = _STRIP_END_DEFICIT / 2.0 * float(free_edges @ t**4)
    if deficit > THIN_WALL_LIMIT * torsion_constant:
        k = int(np.argmax(np.where(free_edges > 0, t, 0.0)))
        msg = (
            f"is too thick for thin-walled open-section theory: free-edge effects 0.105·t⁴ "
            f"exceed {THIN_WALL_LIMIT:g} of Σb·t³/3 (thickest free-edged wall: "
            f"{quote(float(t[k]), 'length')} thick, {quote(float(lengths[k]), 'length')} long)"
        )
        raise InputError(f"{field}.thicknesses[{k}]", msg)


def _path_matrix(pairs: IndexArray, count: int, field: str) -> FloatArray:
    """path[j, k] = +1 (−1) when wall k lies forwards (backwards) on the way from point 0 to j.

    The walls' incidence matrix without point 0's column is square; it is invertible exactly
    when the walls form a tree, and its inverse, all 0 and ±1, is the path matrix. A matrix
    that is not a tree's either fails to invert or gives an inverse that, rounded, is not one.
    """
    walls = len(pairs)
    incidence = np.zeros((walls, count))
    incidence[np.arange(walls), pairs[:, 1]] = 1.0
    incidence[np.arange(walls), pairs[:, 0]] = -1.0
    reduced = incidence[:, 1:]
    try:
        inverse = np.round(np.linalg.inv(reduced))
    except np.linalg.LinAlgError:
        inverse = np.zeros_like(reduced)
    if not np.array_equal(reduced @ inverse, np.eye(walls)):
        msg = "must join all the points in one piece without a closed loop (an open section)"
        raise InputError(f"{field}.walls", msg)
    path = np.zeros((count, walls))
    path[1:] = inverse
    return path


def _sectorial_at_points(local: FloatArray, path: FloatArray, pole: FloatArray) -> FloatArray:
    """Sectorial coordinate ω (m²) about ``pole`` at every point, zero at point 0."""
    start, end = local[:, 0] - pole, local[:, 1] - pole
    swept = start[:, 0] * end[:, 1] - start[:, 1] * end[:, 0]
    return path @ swept


def _second_moments(local: FloatArray, wall_areas: FloatArray) -> tuple[float, float, float]:
    """∫x² dA, ∫y² dA, ∫xy dA about the centroid (m⁴), walls as lines."""
    (x0, y0), (x1, y1) = local[:, 0].T, local[:, 1].T
    xx = wall_areas @ (x0**2 + x0 * x1 + x1**2) / 3.0
    yy = wall_areas @ (y0**2 + y0 * y1 + y1**2) / 3.0
    xy = wall_areas @ (2 * x0 * y0 + x0 * y1 + x1 * y0 + 2 * x1 * y1) / 6.0
    return float(xx), float(yy), float(xy)


def _linear_products(
    omega_ends: FloatArray, local: FloatArray, wall_areas: FloatArray
) -> tuple[float, float]:
    """∫ω·x dA and ∫ω·y dA (m⁵), each a product of two functions linear along each wall."""
    w0, w1 = omega_ends.T
    (x0, y0), (x1, y1) = local[:, 0].T, local[:, 1].T
    wx = wall_areas @ (2 * w0 * x0 + w0 * x1 + w1 * x0 + 2 * w1 * x1) / 6.0
    wy = wall_areas @ (2 * w0 * y0 + w0 * y1 + w1 * y0 + 2 * w1 * y1) / 6.0
    return float(wx), float(wy)


def _statical_moments(pairs: IndexArray, path: FloatArray, wall_moments: FloatArray) -> FloatArray:
    """Sw (m⁴) at the start and end of each wall from each wall's own ∫Wn dA.

    Wall m hangs below wall k (seen from point 0) when k lies on the way to m's far point; the
    sum over what hangs below k, k included, is what is cut off beyond k's far end.
    """
    on_path = np.abs(path)
    deep_is_end = on_path[pairs[:, 1], np.arange(len(pairs))] > 0
    deep = np.where(deep_is_end, pairs[:, 1], pairs[:, 0])
    below = on_path[deep].T  # below[k, m]: wall m hangs below wall k
    hanging = below @ wall_moments
    # Going from start to end, "behind" is the start's side: the part beyond the start when the
    # start is the far point, else all but what hangs below (whose sum with it is ∫Wn dA = 0).
    behind_start = np.where(deep_is_end, -hanging, hanging - wall_moments)
    return np.column_stack([behind_start, behind_start + wall_moments])


def _peak_statical(
    ends: FloatArray,
    w_ends: FloatArray,
    t: FloatArray,
    lengths: FloatArray,
    statical: FloatArray,
) -> tuple[FloatArray, int, float]:
    """Point, wall and value of the largest |Sw|: at wall ends or where Wn = 0 inside a wall."""
    w0, w1 = w_ends.T
    changes = (w0 * w1 < 0.0) & (w0 != w1)
    fraction = np.where(changes, w0 / np.where(w0 == w1, 1.0, w0 - w1), 0.0)
    inside = statical[:, 0] + t * lengths * fraction * (w0 + (w1 - w0) * fraction / 2.0)
    candidates = np.column_stack([statical, np.where(changes, inside, 0.0)])
    fractions = np.column_stack([np.zeros_like(t), np.ones_like(t), fraction])
    wall, which = np.unravel_index(int(np.argmax(np.abs(candidates))), candidates.shape)
    at = fractions[wall, which]
    point = ends[wall, 0] + at * (ends[wall, 1] - ends[wall, 0])
    return point, int(wall), float(candidates[wall, which])


__all__ = ["OpenSectionWarping", "open_section", "polyline_section"]
