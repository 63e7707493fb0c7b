"""Any cross-section by finite elements: a polygon with holes analysed with sectionproperties.

The one module that imports sectionproperties (and, through it, shapely and matplotlib): it is
loaded only when a case names a ``polygon`` or ``dxf`` section, so ``import workbench.solver``
and every case of other shapes stay free of them.

:func:`section_properties` checks the boundaries (shapely), meshes the section with 6-node
triangles and refines the mesh until the Saint-Venant torsion constant J and the warping
constant Cw are estimated within :data:`TOLERANCE` of their converged values; it then returns
J, Cw, the shear centre and the largest Saint-Venant shear stress per unit torque of that
mesh. Results are kept in memory by a digest of the geometry and the mesh options (the panel
re-solves on every edit; a section it has seen comes back in microseconds). Not on disk: a file
under the user's cache folder would outlive the method and the library version that made it,
and a stale or altered entry would reach results and signed records unseen; the first analysis
of a section in a process (about a second) is the price of never trusting one.

Convergence (a ratio test on successive refinements)
----------------------------------------------------
The first mesh has a largest element area A/24; each refinement quarters it, halving the element
size h, until a mesh has 400 elements; a finer one is followed by one of about twice its elements
(h shrinks by √2 — the bound below allows for it). A mesh with under 1.5 times the elements of
the one before (its boundaries, not the area limit, set both) replaces it. With
q_k the value of J (or Cw) on mesh k, Δ_k = q_k − q_{k−1} and ρ = Δ_k/Δ_{k−1}, a sequence
converging like hᵖ has ρ → 2⁻ᵖ, and the error left in q_k is the geometric tail
|Δ_k|·ρ/(1 − ρ) (Richardson's extrapolation with the observed order). Where the observed ρ is
negative or at least 1 (round-off, or not yet in the asymptotic range) the estimate is the
a-priori bound: the warping function of a polygon is singular at most like r^λ at a corner of
interior angle ω < 2π, λ = π/ω > ½, so the error of J (an energy) falls at least like
h^(2λ) > h; with the element size shrinking by √(n_{k−1}/n_k), ρ < ρ̄ = √(n_{k−1}/n_k) (½ for a
halving) and the tail is below |Δ_k|·ρ̄/(1 − ρ̄) (|Δ_k| for a halving). That bound also judges
the second mesh, before any rate is observed. The estimate is never less than |Δ_k|/3
(ρ = ¼, the rate of a smooth section); two
successive changes both below 10⁻⁵ of the value are round-off, and the larger is the estimate
(a circle drawn with many sides changes by no more than that once its sides are meshed). The
mesh is accepted when both estimates are within :data:`TOLERANCE` of the value (Cw: or of a
floor 10⁻⁴·I_p²/A, below which a section does not warp — a circle's Cw is 0 up to round-off).

References
----------
.. [1] R. Vanderlinde, *sectionproperties* 3 documentation, "Theory" (warping function by
   6-node triangles, torsion constant, warping constant Γ, shear centre, stresses from Mzz),
   https://sectionproperties.readthedocs.io.
.. [2] W. D. Pilkey, *Analysis and Design of Elastic Beams: Computational Methods*, Wiley,
   2002, ch. 6 (finite-element warping function, torsion and warping constants; from memory).
.. [3] L. F. Richardson, "The deferred approach to the limit", *Phil. Trans. R. Soc. A* 226
   (1927) (extrapolation from successive refinements; the ratio test is derivable).
.. [4] G. Strang and G. J. Fix, *An Analysis of the Finite Element Method*, Prentice-Hall, 1973,
   ch. 8 (corner singularities r^(π/ω) and the rate of convergence they allow; from memory).
"""

from __future__ import annotations

import contextlib
import hashlib
import io
import logging
import math
import threading
import warnings
from collections import OrderedDict
from dataclasses import dataclass

import numpy as np
import shapely
import shapely.affinity
from sectionproperties.analysis.section import Section as FESection
from sectionproperties.pre.geometry import Geometry
from shapely.geometry.polygon import orient

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import LARGEST, SMALLEST_NORMAL
from workbench.solver.sections import FloatArray

#: Largest estimated relative error of J and Cw accepted.
TOLERANCE = 0.01
#: Elements (about) of the first mesh: its largest element area is A / this.
FIRST_ELEMENTS = 24
#: Mesh refinements tried at most: the last has about 24·4⁵ ≈ 25 000 elements.
MAX_REFINEMENTS = 5
#: Sections kept in memory.
CACHE_SIZE = 256
#: Cw below this fraction of I_p²/A is taken as "does not warp" when judging convergence.
_WARPING_FLOOR = 1e-4
#: Arcs and circles of a drawing become straight pieces of this many degrees; splines are
#: sampled at this spacing (drawing units).
_DEGREES_PER_PIECE = 5.0
_SPLINE_SPACING = 0.05
#: A mesh with fewer than this many times the elements of the one before is no refinement of
#: it (the boundaries, not the area limit, set both); it takes the earlier one's place.
_REFINED = 1.5
#: From this many elements on, the next mesh has about twice the elements, not four times.
_FINE_MESH = 400
#: Two successive changes both below this fraction of the value are round-off, not a trend.
_ROUND_OFF = 1e-5
#: Changes the digest when the method changes (so no result of another method is reused).
_METHOD = b"fe-sections/2"


@dataclass(frozen=True)
class FESectionProperties:
    """Torsion and warping properties of a section by finite elements (SI).

    Attributes
    ----------
    area
        Area A (m²).
    centroid
        Centroid (x, y) in the boundary's own coordinates (m).
    polar_moment
        Polar second moment of area about the centroid, I_p = I_x + I_y (m⁴).
    torsion_constant
        Saint-Venant torsion constant J (m⁴).
    warping_constant
        Warping constant Cw (sectionproperties' Γ) about the shear centre (m⁶).
    shear_centre
        Shear centre (x, y) in the boundary's own coordinates (m), by Trefftz's definition.
    shear_stress_per_torque
        Largest Saint-Venant shear stress over the mesh's nodes per unit torque (1/m³). At a
        sharp re-entrant corner the exact stress is unbounded and this value grows as the mesh
        is refined: round such corners, or read it as the value at this mesh.
    unit_warping_peak
        Normalised unit warping Wn (m²) at the mesh node where |Wn| is largest, signed as the
        thin-wall theory's (σ_w = E·Wn·θ″): Wn = −ω_n, ω_n the Saint-Venant warping function
        taken about the shear centre and made orthogonal to 1 (its mean over the area is 0).
        0 for a section that does not warp.
    unit_warping_peak_at
        That node (x, y) in the boundary's own coordinates (m).
    depth
        Overall height of the section, the extent in y (m).
    elements
        Number of triangles of the accepted mesh.
    torsion_error, warping_error
        Estimated relative errors of J and Cw (Cw's against its floor when it does not warp).
    history
        (elements, J, Cw) of each mesh tried, coarsest first.
    """

    area: float
    centroid: tuple[float, float]
    polar_moment: float
    torsion_constant: float
    warping_constant: float
    shear_centre: tuple[float, float]
    shear_stress_per_torque: float
    unit_warping_peak: float
    unit_warping_peak_at: tuple[float, float]
    depth: float
    elements: int
    torsion_error: float
    warping_error: float
    history: tuple[tuple[int, float, float], ...]


# --- the boundaries ------------------------------------------------------------------------


def _point(xy: FloatArray) -> str:
    return f"({quote(float(xy[0]), 'length')}, {quote(float(xy[1]), 'length')})"


def _ring(points: FloatArray, field: str) -> shapely.Polygon:
    """One boundary as a polygon, refused naming ``field`` unless simple, closed and of area."""
    if points.ndim != 2 or points.shape[1] != 2 or not np.isfinite(points).all():
        raise InputError(field, "must be points (x, y) of finite numbers")
    if len(points) > 1 and np.array_equal(points[0], points[-1]):
        points = points[:-1]  # a drawing's closing point repeats the first
    distinct = len(np.unique(points, axis=0))
    if distinct < 3:
        msg = f"needs at least 3 distinct points to enclose an area, not {distinct}"
        raise InputError(field, msg)
    extent = float(np.ptp(points, axis=0).max())
    if not SMALLEST_NORMAL ** (1 / 6) <= extent <= LARGEST ** (1 / 6):  # Cw: the size⁶
        size = "large" if extent > 1.0 else "small"
        msg = f"spans {quote(extent, 'length')}: too {size} for the section's formulas"
        raise InputError(field, msg)
    spread = np.linalg.svd((points - points.mean(axis=0)) / extent, compute_uv=False)
    if not spread[1] > 1e-12 * spread[0]:
        raise InputError(field, "encloses no area: its points lie on one line")
    ring = shapely.LinearRing(points)
    if not ring.is_simple:
        crossing = _crossing(points)
        near = f" near {_point(crossing)}" if crossing is not None else ""
        raise InputError(field, f"the boundary crosses or touches itself{near}")
    return shapely.Polygon(ring)


def _crossing(points: FloatArray) -> FloatArray | None:
    """A point where the closed polyline ``points`` meets itself (``None`` if none is found)."""
    edges = shapely.linestrings(np.stack([points, np.roll(points, -1, axis=0)], axis=1))
    count = len(edges)
    first, second = np.triu_indices(count, 2)
    apart = ~((first == 0) & (second == count - 1))  # the last edge meets the first by design
    first, second = first[apart], second[apart]
    meets = shapely.intersects(edges[first], edges[second])
    if not meets.any():
        return None
    number = int(np.flatnonzero(meets)[0])
    shared = shapely.intersection(edges[first[number]], edges[second[number]])
    return shapely.get_coordinates(shared)[0]


def section_geometry(outer: FloatArray, holes: tuple[FloatArray, ...]) -> shapely.Polygon:
    """The section as one valid polygon with holes, checked boundary by boundary.

    Parameters
    ----------
    outer
        (n, 2) points of the outer boundary in order (m).
    holes
        (m_i, 2) points of each hole's boundary (m).

    Raises
    ------
    InputError
        Naming ``outer`` or ``holes[i]``: fewer than 3 distinct points, a boundary that crosses
        itself, no area; a hole not inside the outer boundary, or overlapping another hole.
    """
    shell = _ring(outer, "outer")
    rings = [_ring(points, f"holes[{number}]") for number, points in enumerate(holes)]
    for number, hole in enumerate(rings):
        if not shell.contains_properly(hole):
            msg = "must lie inside the outer boundary, clear of it"
            raise InputError(f"holes[{number}]", msg)
        for other, earlier in enumerate(rings[:number]):
            if hole.intersects(earlier):
                msg = f"overlaps or touches holes[{other}]"
                raise InputError(f"holes[{number}]", msg)
    polygon = shapely.Polygon(shell.exterior.coords, [ring.exterior.coords for ring in rings])
    return orient(polygon)


def read_drawing(file: str) -> tuple[FloatArray, tuple[FloatArray, ...]]:
    """The outer boundary and the holes of the one closed outline in a DXF drawing.

    Read by sectionproperties' DXF support (cad-to-shapely, ezdxf): lines, polylines, arcs,
    circles and splines joined into closed outlines; a closed outline inside another is a hole.

    Parameters
    ----------
    file
        The drawing's path.

    Returns
    -------
    outer, holes
        (n, 2) points of the outline and of each hole, in the drawing's units.

    Raises
    ------
    InputError
        On ``path``: the file is not a DXF drawing the reader understands, or holds no closed
        outline, or more than one separate outline.
    """
    # The reader prints, logs, warns and raises as it goes; none of it may reach the command line.
    silenced = logging.root.manager.disable
    try:
        logging.disable(logging.CRITICAL)
        with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            found = Geometry.from_dxf(
                file, spline_delta=_SPLINE_SPACING, degrees_per_segment=_DEGREES_PER_PIECE
            )
    except RuntimeError:
        raise InputError("path", "the drawing holds no closed outline") from None
    except Exception as error:  # any failure of the third-party reader: unreadable
        reason = str(error).splitlines()[0][:120] if str(error) else type(error).__name__
        raise InputError("path", f"cannot be read as a DXF drawing ({reason})") from None
    finally:
        logging.disable(silenced)
    polygon = found.geom
    if not isinstance(polygon, shapely.Polygon):  # a CompoundGeometry: separate outlines
        count = len(getattr(polygon, "geoms", ()))
        msg = f"the drawing holds {count} separate closed outlines; a section is one outline"
        raise InputError("path", msg)
    outer = np.asarray(polygon.exterior.coords, dtype=float)
    holes = tuple(np.asarray(ring.coords, dtype=float) for ring in polygon.interiors)
    return outer, holes


# --- the analysis --------------------------------------------------------------------------


def geometry_digest(outer: FloatArray, holes: tuple[FloatArray, ...]) -> bytes:
    """SHA-256 of the boundaries (their float64 bytes and lengths) and the mesh options."""
    digest = hashlib.sha256(_METHOD)
    options = [TOLERANCE, FIRST_ELEMENTS, MAX_REFINEMENTS, _FINE_MESH, _REFINED, _ROUND_OFF]
    digest.update(np.array(options, dtype=float).tobytes())
    for points in (outer, *holes):
        array = np.ascontiguousarray(points, dtype=np.float64)
        digest.update(np.int64(len(array)).tobytes())
        digest.update(array.tobytes())
    return digest.digest()


_CACHE: OrderedDict[bytes, FESectionProperties] = OrderedDict()
_CACHE_LOCK = threading.Lock()


def section_properties(
    outer: FloatArray, holes: tuple[FloatArray, ...] = ()
) -> FESectionProperties:
    """J, Cw, shear centre and τ/T of a polygon with holes, at a mesh converged within 1 %.

    Parameters
    ----------
    outer
        (n, 2) points of the outer boundary in order, either way round (m).
    holes
        (m_i, 2) points of each hole's boundary (m).

    Returns
    -------
    FESectionProperties
        From the memory cache when the same geometry was analysed before in this process.

    Raises
    ------
    InputError
        Naming ``outer`` or ``holes[i]`` for a boundary that cannot be a section
        (:func:`section_geometry`), or ``outer`` when the mesh does not settle.

    References
    ----------
    .. [1] sectionproperties 3 documentation, "Theory" (see the module's references).
    """
    outer = np.asarray(outer, dtype=float)
    holes = tuple(np.asarray(hole, dtype=float) for hole in holes)
    key = geometry_digest(outer, holes)
    with _CACHE_LOCK:
        found = _CACHE.get(key)
        if found is not None:
            _CACHE.move_to_end(key)
            return found
    result = _analyse(section_geometry(outer, holes))
    with _CACHE_LOCK:
        _CACHE[key] = result
        while len(_CACHE) > CACHE_SIZE:
            _CACHE.popitem(last=False)
    return result


def clear_cache() -> None:
    """Forget every section analysed (for tests and benchmarks)."""
    with _CACHE_LOCK:
        _CACHE.clear()


def _mesh_section(polygon: shapely.Polygon, element_area: float) -> FESection:
    geometry = Geometry(polygon)
    geometry.create_mesh(mesh_sizes=element_area)
    section = FESection(geometry)
    section.calculate_geometric_properties()
    section.calculate_warping_properties()
    return section


def relative_error(values: list[float], scale: float, refinement: float = 4.0) -> float:
    """Estimated relative error of the last of successive refinements' values (ratio test).

    Parameters
    ----------
    values
        The value on each mesh, coarsest first.
    scale
        What the error is relative to (the value, or a floor for values that vanish).
    refinement
        Elements of the last mesh over those of the one before (4 when the element size halves).

    Returns
    -------
    float
        ``inf`` with fewer than two values. With two, or while the changes do not shrink
        steadily, the a-priori bound |Δ|·ρ̄/(1 − ρ̄), ρ̄ = refinement^(−½) (the slowest rate a
        polygon allows, the error ∝ h); else the observed tail |Δ|·ρ/(1 − ρ), at least |Δ|/3.

    References
    ----------
    .. [1] L. F. Richardson, "The deferred approach to the limit", 1927 (the geometric tail of
       the changes; derivable).
    .. [2] Strang & Fix, *An Analysis of the Finite Element Method*, 1973, ch. 8 (corner
       singularities limit the rate; from memory).
    """
    if len(values) < 2 or scale <= 0.0 or not math.isfinite(scale):
        return math.inf
    last = values[-1] - values[-2]
    slowest = refinement**-0.5 if refinement > 1.0 else 1.0
    a_priori = abs(last) * slowest / (1.0 - slowest) if slowest < 1.0 else math.inf
    if len(values) == 2:
        return a_priori / scale  # no observed rate yet
    before = values[-2] - values[-3]
    if last == 0.0:
        return 0.0
    if max(abs(last), abs(before)) <= _ROUND_OFF * scale:
        return max(abs(last), abs(before)) / scale  # changes at the level of round-off
    ratio = last / before if before != 0.0 else math.inf
    if ratio >= 1.0 or ratio < 0.0:
        return a_priori / scale
    return abs(last) * max(ratio / (1.0 - ratio), 1.0 / 3.0) / scale


def _analyse(polygon: shapely.Polygon) -> FESectionProperties:
    # Work near the origin at a size near 1: the mesher's and the solver's tolerances are
    # absolute, and a section drawn in metres far from its origin would lose digits.
    left, bottom, right, top = polygon.bounds
    size = max(right - left, top - bottom)
    unit = shapely.affinity.affine_transform(
        polygon, [1.0 / size, 0.0, 0.0, 1.0 / size, -left / size, -bottom / size]
    )
    history: list[tuple[int, float, float]] = []
    torsion_error = warping_error = math.inf
    limit = unit.area / FIRST_ELEMENTS
    for _ in range(MAX_REFINEMENTS + 1):
        section = _mesh_section(unit, limit)
        ixx, iyy, _ = section.get_ic()
        count = len(section.mesh["triangles"])
        # Halve the element size; a mesh already fine (its boundaries, not the limit, made it)
        # is checked on one with about twice its elements, enough for the bound, at half the cost.
        if count < _FINE_MESH:
            limit /= 4.0
        else:
            limit = min(limit, unit.area / count) / 2.0
        if history and count < _REFINED * history[-1][0]:
            history.pop()  # the walls, not the area limit, set both meshes: keep the finer
        history.append((count, section.get_j(), section.get_gamma()))
        torsion = [j for _, j, _ in history]
        warping = [gamma for _, _, gamma in history]
        floor = _WARPING_FLOOR * (ixx + iyy) ** 2 / unit.area
        refined = history[-1][0] / history[-2][0] if len(history) > 1 else 1.0
        torsion_error = relative_error(torsion, abs(torsion[-1]), refined)
        warping_error = relative_error(warping, max(abs(warping[-1]), floor), refined)
        if torsion_error <= TOLERANCE and warping_error <= TOLERANCE:
            break
    else:
        msg = (
            f"J and Cw did not settle within {TOLERANCE:.0%} by {history[-1][0]:,} finite "
            f"elements (estimated errors {torsion_error:.1%} and {warping_error:.1%}); "
            "simplify the outline"
        )
        raise InputError("outer", msg)
    stress = section.calculate_stress(mzz=1.0).get_stress()[0]
    shear = float(np.hypot(stress["sig_zx_mzz"], stress["sig_zy_mzz"]).max())
    centroid_x, centroid_y = section.get_c()
    centre_x, centre_y = section.get_sc()
    peak, node = _unit_warping_peak(section)
    return FESectionProperties(
        area=float(section.get_area()) * size**2,
        centroid=(left + float(centroid_x) * size, bottom + float(centroid_y) * size),
        polar_moment=float(ixx + iyy) * size**4,
        torsion_constant=float(section.get_j()) * size**4,
        warping_constant=max(float(section.get_gamma()), 0.0) * size**6,
        shear_centre=(left + float(centre_x) * size, bottom + float(centre_y) * size),
        shear_stress_per_torque=shear / size**3,
        unit_warping_peak=peak * size**2,
        unit_warping_peak_at=(left + float(node[0]) * size, bottom + float(node[1]) * size),
        depth=top - bottom,
        elements=history[-1][0],
        torsion_error=torsion_error,
        warping_error=warping_error,
        history=tuple(
            (count, float(j) * size**4, float(gamma) * size**6) for count, j, gamma in history
        ),
    )


def _unit_warping_peak(section: FESection) -> tuple[float, FloatArray]:
    """Wn at the mesh node of largest |Wn|, and the node (the mesh's own coordinates).

    sectionproperties solves the Saint-Venant warping function ω about the centroid; about the
    shear centre (Trefftz: x_st, y_st from the centroid) and with its mean removed it is
    ω_n = ω − ω̄ + x_st·y − y_st·x, whose ∫ω_n² dA is sectionproperties' Γ (= Cw). Thin-wall
    theory's normalised unit warping has the opposite sign (σ_w = E·Wn·θ″, the axial
    displacement −Wn·θ′), so Wn = −ω_n. On a thin wall Wn then matches the mid-line
    sectorial coordinate plus the through-thickness part (±s·t/2 at a face), which thin-wall
    theory drops.

    References
    ----------
    .. [1] sectionproperties 3 documentation, "Theory" (warping function, Trefftz shear centre,
       Γ = I_ω − Q_ω²/A − y_s·I_xω + x_s·I_yω).
    .. [2] Pilkey, *Analysis and Design of Elastic Beams*, 2002, ch. 6 (normalised warping
       function about the shear centre; 6-node triangle shape functions; from memory).
    """
    properties = section.section_props
    omega = np.asarray(properties.omega, dtype=float)
    centroid = np.asarray(section.get_c(), dtype=float)
    x, y = (np.asarray(section.mesh["vertices"], dtype=float) - centroid).T
    triangles = np.asarray(section.mesh["triangles"], dtype=np.intp)
    corners, middles = triangles[:, :3], triangles[:, 3:6]
    # ω̄ exactly for the quadratic field: over a straight 6-node triangle the corner shape
    # functions integrate to 0 and each mid-side one to A/3.
    edges = np.stack([x[corners], y[corners]], axis=-1)
    first, second = edges[:, 1] - edges[:, 0], edges[:, 2] - edges[:, 0]
    area = 0.5 * np.abs(first[:, 0] * second[:, 1] - first[:, 1] * second[:, 0])
    mean = float(np.sum(area * omega[middles].mean(axis=1)) / area.sum())
    centre_x, centre_y = np.asarray(section.get_sc_t(), dtype=float) - centroid  # x_st, y_st
    unit = -(omega - mean + centre_x * y - centre_y * x)
    node = int(np.argmax(np.abs(unit)))
    return float(unit[node]), np.array([x[node], y[node]]) + centroid
