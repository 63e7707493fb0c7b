"""Direct stiffness analysis of torsion systems: exact elements, one factorization for all cases.

Each shaft is cut into elements at every segment end, support, gear, point torque and end of a
distributed torque, so inside an element the section law and the load intensity are smooth. An
element's behaviour follows exactly from three flexibility moments of its length,

    I_k = ∫₀ᴸ u^k du / (G·K(u)),   k = 0, 1, 2,

(closed form for prismatic elements, Gauss–Legendre to rounding for tapered ones): its stiffness is
1/I₀, the exact (consistent) nodal loads of a linearly varying distributed torque follow from I₁
and I₂, and inside the element the internal torque and rotation are recovered exactly:

    T(u) = T(0⁺) − m(u),   m(u) = ∫₀ᵘ t,
    θ(u) = θ_a + ∫₀ᵘ T/(G·K).

Fixed supports are eliminated, springs sit on the diagonal, gear meshes are linear constraints with
Lagrange multipliers (the gear torques). One sparse LU factorization serves every load case;
combinations are superposed from the load-case results.

References
----------
.. [1] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (direct stiffness method, element flexibility and stiffness) and ch. 12
   (constraints by Lagrange multipliers).
.. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (non-uniform torsion,
   φ = ∫T dx/(G·J)) and §3.8 (statically indeterminate torsional members).
"""

from __future__ import annotations

import functools
import itertools
import math
import warnings
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from workbench.case.errors import InputError, MechanismError
from workbench.solver.model import POSITION_TOLERANCE, Model, Segment
from workbench.solver.sections import FloatArray

IntArray = np.ndarray[Any, np.dtype[np.intp]]

#: Sub-intervals drawn inside an element whose torque or rotation is curved (distributed load or
#: varying section), so charts show the true curve.
CURVE_PIECES = 16

_GAUSS_POINTS, _GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(8)


@dataclass(frozen=True)
class Mesh:
    """The cut-up geometry of a model: nodes, elements and result stations, all load-free.

    Arrays are flat over all shafts, shaft after shaft, each in increasing x.
    """

    node_x: FloatArray  # (n_nodes,) position of each node on its own shaft (m)
    shaft_node_start: IntArray  # (n_shafts + 1,) first node of each shaft
    element_start_node: IntArray  # (n_elements,)
    element_shaft: IntArray
    element_segment: IntArray  # segment index within its shaft
    element_length: FloatArray  # (m)
    flexibility: FloatArray  # (n_elements, 3): I₀ (1/(N·m)), I₁ (m/(N·m)), I₂ (m²/(N·m))
    station_element: IntArray  # (n_stations,)
    station_x: FloatArray  # (m)
    station_u: FloatArray  # local coordinate from the element start (m)
    station_moments: FloatArray  # (n_stations, 3): ∫₀ᵘ v^k dv/(G·K)
    station_stress_per_torque: FloatArray  # (1/m³)
    station_rigidity: FloatArray  # G·K (N·m²)
    station_is_end: np.ndarray[Any, np.dtype[np.bool_]]  # the station is its element's end
    shaft_station_start: IntArray  # (n_shafts + 1,)

    def node_of(self, shaft_number: int, x: float) -> int:
        """Index of the node at position x (m) of a shaft."""
        start, stop = self.shaft_node_start[shaft_number], self.shaft_node_start[shaft_number + 1]
        positions = self.node_x[start:stop]
        # Nodes are sorted: the nearest is one of the two around x.
        right = int(np.searchsorted(positions, x))
        if right >= len(positions) or (
            right > 0 and x - positions[right - 1] < positions[right] - x
        ):
            right -= 1
        return int(start + right)


def _merge_points(points: FloatArray, length: float) -> FloatArray:
    """Sort positions and merge those closer than the position tolerance."""
    tolerance = POSITION_TOLERANCE * length
    points = np.clip(np.sort(points), 0.0, length)
    keep = np.concatenate([[True], np.diff(points) > tolerance])
    merged = points[keep]
    merged[0], merged[-1] = 0.0, length
    if len(merged) > 1 and merged[-1] - merged[-2] <= tolerance:
        merged = np.delete(merged, -2)
    return merged


def _key_points(model: Model) -> list[list[float]]:
    points: list[list[float]] = [[] for _ in model.shafts]
    # Design checks may ask for values at given points (rotation limits): make them nodes.
    design_points = model.design.key_points() if model.design is not None else []
    for shaft_id, x in (*design_points, *model.extra_nodes):
        points[model.shaft_number(shaft_id)].append(x)
    for support in model.supports:
        points[model.shaft_number(support.shaft)].append(support.x)
    for gear in model.gears:
        points[model.shaft_number(gear.a.shaft)].append(gear.a.x)
        points[model.shaft_number(gear.b.shaft)].append(gear.b.x)
    for case in model.load_cases:
        for torque in case.torques:
            points[model.shaft_number(torque.shaft)].append(torque.x)
        for load in case.distributed:
            number = model.shaft_number(load.shaft)
            points[number].extend((load.start, load.end))
    return points


def _segment_constants(segment: Segment) -> tuple[float, float]:
    """(G·K, peak stress per torque) of a prismatic segment, NaNs for a varying one."""
    if len(segment.layers) == 1:
        layer = segment.layers[0]
        if not layer.section.prismatic:
            return math.nan, math.nan
        return (
            layer.material.shear_modulus * layer.section.torsion_constant,
            layer.section.shear_stress_per_torque,
        )
    if not segment.prismatic:
        return math.nan, math.nan
    return segment.torsional_rigidity, segment.shear_stress_per_torque


def _varying_element(
    segment: Segment, fraction_start: float, fraction_end: float
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Stations, cumulative flexibility moments, stress factors and rigidity of a varying element.

    8-point Gauss–Legendre on pieces graded so that the rule is exact to rounding. The same
    piece of the same segment (equal by value) is integrated once: sweeps, sizing and the modal
    mesh rebuild unchanged tapers many times over. The arrays returned are read-only.
    """
    try:
        return _varying_element_cached(segment, fraction_start, fraction_end)
    except TypeError:  # a segment whose parts cannot be hashed: integrate it afresh
        return _integrate_varying_element(segment, fraction_start, fraction_end)


@functools.lru_cache(maxsize=4096)
def _varying_element_cached(
    segment: Segment, fraction_start: float, fraction_end: float
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    arrays = _integrate_varying_element(segment, fraction_start, fraction_end)
    for array in arrays:
        array.setflags(write=False)
    return arrays


def _integrate_varying_element(
    segment: Segment, fraction_start: float, fraction_end: float
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    breaks = segment.quadrature_breaks()
    inside = breaks[(breaks > fraction_start) & (breaks < fraction_end)]
    fractions = np.unique(
        np.concatenate([np.linspace(fraction_start, fraction_end, CURVE_PIECES + 1), inside])
    )
    low, high = fractions[:-1, None], fractions[1:, None]
    points = 0.5 * (low + high) + 0.5 * (high - low) * _GAUSS_POINTS
    weights = 0.5 * (high - low) * _GAUSS_WEIGHTS * segment.length
    local = (points - fraction_start) * segment.length
    compliance = weights / segment.torsional_rigidity_at(points)
    pieces = np.stack([(compliance * local**k).sum(axis=1) for k in range(3)], axis=1)
    moments = np.vstack([np.zeros((1, 3)), np.cumsum(pieces, axis=0)])
    station_u = (fractions - fraction_start) * segment.length
    return (
        station_u,
        moments,
        segment.shear_stress_per_torque_at(fractions),
        segment.torsional_rigidity_at(fractions),
    )


def build_mesh(model: Model) -> Mesh:
    """Cut a model into exact elements and result stations.

    Parameters
    ----------
    model
        The validated model.

    Returns
    -------
    Mesh
        Load-free geometry shared by every load case.
    """
    key_points = _key_points(model)
    loaded_spans = _loaded_spans(model)
    node_x_parts, element_parts, varying_elements = [], [], []
    shaft_node_start = [0]
    element_count = 0
    for number, shaft in enumerate(model.shafts):
        boundaries = shaft.boundaries
        nodes = _merge_points(np.concatenate([boundaries, key_points[number]]), shaft.length)
        node_x_parts.append(nodes)
        first_node = shaft_node_start[-1]
        shaft_node_start.append(first_node + len(nodes))
        n_elements = len(nodes) - 1
        starts, ends = nodes[:-1], nodes[1:]
        middles = 0.5 * (starts + ends)
        segment_of = np.clip(np.searchsorted(boundaries, middles) - 1, 0, len(shaft.segments) - 1)
        # One pass over the segments: (G·K, stress per torque), NaN marking a varying segment.
        constants = np.array([_segment_constants(segment) for segment in shaft.segments])
        loaded = np.zeros(n_elements, dtype=bool)
        for span_start, span_end in loaded_spans[number]:
            loaded |= (middles > span_start) & (middles < span_end)
        varying = np.isnan(constants[segment_of, 0])
        element_parts.append(
            (
                np.full(n_elements, number),
                first_node + np.arange(n_elements),
                segment_of,
                ends - starts,
                constants[segment_of, 0],
                constants[segment_of, 1],
                loaded,
            )
        )
        for local_index in np.flatnonzero(varying):
            segment_number = int(segment_of[local_index])
            segment = shaft.segments[segment_number]
            start_fraction = (starts[local_index] - boundaries[segment_number]) / segment.length
            end_fraction = (ends[local_index] - boundaries[segment_number]) / segment.length
            varying_elements.append(
                (
                    element_count + int(local_index),
                    _varying_element(segment, max(start_fraction, 0.0), min(end_fraction, 1.0)),
                )
            )
        element_count += n_elements

    shafts, start_nodes, segments, lengths, rigidity, stress_factor, loaded = (
        np.concatenate(column) for column in zip(*element_parts, strict=True)
    )
    node_x = np.concatenate(node_x_parts)
    # Station counts: ends only where T is constant and θ linear; a curve elsewhere.
    counts = np.where(loaded, CURVE_PIECES + 1, 2)
    for element, (station_u, _, _, _) in varying_elements:
        counts[element] = len(station_u)
    station_element = np.repeat(np.arange(element_count), counts)
    offsets = np.cumsum(counts) - counts
    local = np.arange(len(station_element)) - offsets[station_element]
    u = lengths[station_element] * local / (counts[station_element] - 1)
    element_rigidity = rigidity[station_element]
    station_moments = np.stack(
        [u / element_rigidity, u**2 / (2 * element_rigidity), u**3 / (3 * element_rigidity)], axis=1
    )
    station_stress = stress_factor[station_element].copy()
    station_rigidity = element_rigidity.copy()
    flexibility = np.stack(
        [lengths / rigidity, lengths**2 / (2 * rigidity), lengths**3 / (3 * rigidity)], axis=1
    )
    for element, (station_u, moments, stress, station_gk) in varying_elements:
        window = slice(offsets[element], offsets[element] + counts[element])
        u[window] = station_u
        station_moments[window] = moments
        station_stress[window] = stress
        station_rigidity[window] = station_gk
        flexibility[element] = moments[-1]
    station_x = node_x[start_nodes[station_element]] + u
    station_is_end = local == counts[station_element] - 1
    # An element's end station is its end node, exactly (x listed twice at a jump must match).
    station_x[station_is_end] = node_x[start_nodes[station_element[station_is_end]] + 1]
    element_end = np.cumsum(counts)
    shaft_station_start = np.concatenate(
        [[0], element_end[np.searchsorted(shafts, np.arange(len(model.shafts)), side="right") - 1]]
    )
    for array in (
        node_x,
        u,
        station_moments,
        station_stress,
        station_rigidity,
        flexibility,
        station_x,
    ):
        array.setflags(write=False)
    return Mesh(
        node_x=node_x,
        shaft_node_start=np.asarray(shaft_node_start),
        element_start_node=start_nodes,
        element_shaft=shafts,
        element_segment=segments,
        element_length=lengths,
        flexibility=flexibility,
        station_element=station_element,
        station_x=station_x,
        station_u=u,
        station_moments=station_moments,
        station_stress_per_torque=station_stress,
        station_rigidity=station_rigidity,
        station_is_end=station_is_end,
        shaft_station_start=shaft_station_start,
    )


def _loaded_spans(model: Model) -> list[list[tuple[float, float]]]:
    spans: list[list[tuple[float, float]]] = [[] for _ in model.shafts]
    for case in model.load_cases:
        for load in case.distributed:
            spans[model.shaft_number(load.shaft)].append((load.start, load.end))
    return spans


def _check_restrained(model: Model) -> None:
    """Raise :class:`MechanismError` naming every group of shafts no support restrains."""
    parent = list(range(len(model.shafts)))

    def root(number: int) -> int:
        while parent[number] != number:
            parent[number] = parent[parent[number]]
            number = parent[number]
        return number

    for gear in model.gears:
        parent[root(model.shaft_number(gear.a.shaft))] = root(model.shaft_number(gear.b.shaft))
    restrained = {root(model.shaft_number(support.shaft)) for support in model.supports}
    groups: dict[int, list[str]] = {}
    for number, shaft in enumerate(model.shafts):
        groups.setdefault(root(number), []).append(shaft.id)
    free = [names for group, names in groups.items() if group not in restrained]
    if free:
        names = free[0]
        if len(names) == 1:
            what = f"shaft {names[0]!r} is"
        else:
            what = "shafts " + ", ".join(repr(name) for name in names) + " (joined by gears) are"
        msg = (
            f"{what} free to spin (a mechanism): no support restrains it; add a fixed or spring "
            "support, or a gear to a supported shaft"
        )
        raise MechanismError("supports", msg)


@dataclass(frozen=True)
class ShaftResult:
    """Results along one shaft for one load case or combination, at the mesh stations.

    At a point where a value jumps (a point torque, a support, a gear, a change of section) the
    station x appears twice: the value just left, then just right.

    Attributes
    ----------
    x
        Station positions along the shaft (m).
    torque
        Internal torque T(x) (N·m): the torque on the cut face whose outward normal is +x.
    angle
        Angle of twist θ(x) (rad), the rotation of the section.
    shear_stress
        Largest shear-stress magnitude over the section (Pa), over all layers.
    """

    x: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray


@dataclass(frozen=True)
class LoadResult:
    """Every result of one load case or combination.

    Attributes
    ----------
    name
        The load case's or combination's name.
    is_combination
        Whether it is a combination.
    reactions
        Torque each support exerts on its shaft (N·m), in model order.
    gear_torques
        (n_gears, 2): torque the mesh exerts on the shaft of gear a and of gear b (N·m).
    shafts
        Results along each shaft, by shaft id.
    """

    name: str
    is_combination: bool
    reactions: FloatArray
    gear_torques: FloatArray
    shafts: Mapping[str, ShaftResult]


@dataclass(frozen=True)
class Envelope:
    """Least and greatest values over all load cases and combinations, station by station.

    Attributes
    ----------
    x
        Stations (m).
    torque_min, torque_max
        Internal torque bounds (N·m).
    angle_min, angle_max
        Rotation bounds (rad).
    shear_stress_max
        Largest shear stress (Pa).
    """

    x: FloatArray
    torque_min: FloatArray
    torque_max: FloatArray
    angle_min: FloatArray
    angle_max: FloatArray
    shear_stress_max: FloatArray


@dataclass(frozen=True)
class Results:
    """The solution of a model: every load case, then every combination.

    Arrays have one row per result (load cases first, in model order, then combinations) and one
    column per station; :meth:`__getitem__` gives a per-result view.

    Attributes
    ----------
    model
        The model solved.
    mesh
        Its mesh.
    names
        Result names in order.
    reactions
        (n_results, n_supports) support torques (N·m).
    gear_torques
        (n_results, n_gears, 2) mesh torques on gear a's and gear b's shaft (N·m).
    torque, angle, shear_stress
        (n_results, n_stations) internal torque (N·m), rotation (rad), peak shear stress (Pa).
    node_angle
        (n_results, n_nodes) rotation at the mesh nodes (rad).
    """

    model: Model
    mesh: Mesh
    names: tuple[str, ...]
    reactions: FloatArray
    gear_torques: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray
    node_angle: FloatArray

    def index(self, name: str) -> int:
        """Row of the named load case or combination."""
        try:
            return self.names.index(name)
        except ValueError:
            msg = f"unknown load case or combination {name!r}; known: {', '.join(self.names)}"
            raise InputError("result", msg) from None

    def __getitem__(self, name: str) -> LoadResult:
        row = self.index(name)
        shafts = {}
        for number, shaft in enumerate(self.model.shafts):
            window = self._window(number)
            shafts[shaft.id] = ShaftResult(
                x=self.mesh.station_x[window],
                torque=self.torque[row, window],
                angle=self.angle[row, window],
                shear_stress=self.shear_stress[row, window],
            )
        return LoadResult(
            name=name,
            is_combination=row >= len(self.model.load_cases),
            reactions=self.reactions[row],
            gear_torques=self.gear_torques[row],
            shafts=shafts,
        )

    def __iter__(self) -> Iterator[LoadResult]:
        return (self[name] for name in self.names)

    def __len__(self) -> int:
        return len(self.names)

    def _window(self, shaft_number: int) -> slice:
        starts = self.mesh.shaft_station_start
        return slice(int(starts[shaft_number]), int(starts[shaft_number + 1]))

    def envelope(self, shaft_id: str) -> Envelope:
        """Bounds over all results along one shaft."""
        window = self._window(self.model.shaft_number(shaft_id))
        return Envelope(
            x=self.mesh.station_x[window],
            torque_min=self.torque[:, window].min(axis=0),
            torque_max=self.torque[:, window].max(axis=0),
            angle_min=self.angle[:, window].min(axis=0),
            angle_max=self.angle[:, window].max(axis=0),
            shear_stress_max=self.shear_stress[:, window].max(axis=0),
        )

    def to_frame(self) -> Any:
        """All station results as a long pandas DataFrame (SI units).

        Columns: ``result``, ``shaft``, ``x``, ``torque``, ``angle``, ``shear_stress``.
        """
        import pandas as pd  # noqa: PLC0415 - tables are an edge; the solver core stays light

        shaft_of_station = self.mesh.element_shaft[self.mesh.station_element]
        shaft_ids = np.array([shaft.id for shaft in self.model.shafts], dtype=object)
        rows = len(self.names)
        return pd.DataFrame(
            {
                "result": np.repeat(np.array(self.names, dtype=object), len(shaft_of_station)),
                "shaft": np.tile(shaft_ids[shaft_of_station], rows),
                "x": np.tile(self.mesh.station_x, rows),
                "torque": self.torque.ravel(),
                "angle": self.angle.ravel(),
                "shear_stress": self.shear_stress.ravel(),
            }
        )

    def reactions_frame(self) -> Any:
        """Support reactions (N·m) as a DataFrame: one row per result, one column per support."""
        import pandas as pd  # noqa: PLC0415

        columns = [
            f"{support.shaft}@{support.x:g} m ({support.kind})" for support in self.model.supports
        ]
        return pd.DataFrame(self.reactions, index=list(self.names), columns=columns)


@dataclass(frozen=True)
class _LoadTable:
    """Per-case load intensities at the ends of loaded elements, and nodal point torques."""

    point: FloatArray  # (n_cases, n_nodes) concentrated torques at nodes (N·m)
    elements: IntArray  # loaded elements
    intensity_start: FloatArray  # (n_cases, n_loaded) at element start (N·m/m)
    intensity_end: FloatArray


def _load_table(model: Model, mesh: Mesh) -> _LoadTable:
    n_cases = len(model.load_cases)
    point = np.zeros((n_cases, len(mesh.node_x)))
    spans = []
    for row, case in enumerate(model.load_cases):
        for torque in case.torques:
            point[row, mesh.node_of(model.shaft_number(torque.shaft), torque.x)] += torque.torque
        for load in case.distributed:
            spans.append((row, model.shaft_number(load.shaft), load))
    if not spans:
        empty = np.zeros((n_cases, 0))
        return _LoadTable(point, np.zeros(0, dtype=np.intp), empty, empty)
    element_start = mesh.node_x[mesh.element_start_node]
    element_end = element_start + mesh.element_length
    middles = 0.5 * (element_start + element_end)
    loaded_mask = np.zeros(len(middles), dtype=bool)
    for _, shaft_number, load in spans:
        loaded_mask |= (
            (mesh.element_shaft == shaft_number) & (middles > load.start) & (middles < load.end)
        )
    elements = np.flatnonzero(loaded_mask)
    starts, ends = element_start[elements], element_end[elements]
    intensity_start = np.zeros((n_cases, len(elements)))
    intensity_end = np.zeros((n_cases, len(elements)))
    for row, shaft_number, load in spans:
        inside = (
            (mesh.element_shaft[elements] == shaft_number)
            & (0.5 * (starts + ends) > load.start)
            & (0.5 * (starts + ends) < load.end)
        )
        intensity_start[row, inside] += load.intensity_at(starts[inside])
        intensity_end[row, inside] += load.intensity_at(ends[inside])
    return _LoadTable(point, elements, intensity_start, intensity_end)


def solve(model: Model, mesh: Mesh | None = None) -> Results:
    """Solve every load case of a model and superpose its combinations.

    Parameters
    ----------
    model
        The validated model (SI).
    mesh
        Its mesh, when already built (:func:`build_mesh`); built here otherwise.

    Returns
    -------
    Results
        Reactions, gear torques, and T, θ, τ at every station of every shaft, for every load case
        and combination.

    Raises
    ------
    MechanismError
        When part of the system is free to spin.
    InputError
        When supports or gears contradict each other (two fixed supports at one point, a gear
        held at both ends, a redundant loop of gears).

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2-3, 12.
    """
    _check_restrained(model)
    mesh = mesh if mesh is not None else build_mesh(model)
    loads = _load_table(model, mesh)
    n_nodes, n_cases = len(mesh.node_x), len(model.load_cases)

    # Prescribed rotations (fixed supports) and the free numbering.
    prescribed = np.full(n_nodes, np.nan)
    support_nodes = np.array(
        [mesh.node_of(model.shaft_number(s.shaft), s.x) for s in model.supports], dtype=np.intp
    )
    for number, support in enumerate(model.supports):
        if support.kind != "fixed":
            continue
        node = support_nodes[number]
        if not np.isnan(prescribed[node]):
            msg = "a second fixed support at the same point of the shaft: the split is undefined"
            raise InputError(f"supports[{number}]", msg)
        prescribed[node] = support.rotation
    is_free = np.isnan(prescribed)
    free_number = np.cumsum(is_free) - 1
    n_free = int(is_free.sum())

    # Element stiffness and consistent loads.
    stiffness = 1.0 / mesh.flexibility[:, 0]
    node_a = mesh.element_start_node
    node_b = node_a + 1
    nodal = loads.point.copy()
    if len(loads.elements):
        length = mesh.element_length[loads.elements]
        moments = mesh.flexibility[loads.elements]
        slope = (loads.intensity_end - loads.intensity_start) / (2.0 * length)
        start_part = (loads.intensity_start * moments[:, 1] + slope * moments[:, 2]) / moments[:, 0]
        total = 0.5 * (loads.intensity_start + loads.intensity_end) * length
        np.add.at(nodal.T, node_a[loads.elements], start_part.T)
        np.add.at(nodal.T, node_b[loads.elements], (total - start_part).T)

    diagonal = np.zeros(n_nodes)
    spring_rhs = np.zeros(n_nodes)
    for number, support in enumerate(model.supports):
        if support.kind == "spring":
            assert support.stiffness is not None
            diagonal[support_nodes[number]] += support.stiffness
            spring_rhs[support_nodes[number]] += support.stiffness * support.rotation
    # bincount sums repeated indices like np.add.at, an order of magnitude faster.
    diagonal += np.bincount(node_a, stiffness, n_nodes) + np.bincount(node_b, stiffness, n_nodes)

    known = np.where(is_free, 0.0, prescribed)
    rhs_full = nodal + spring_rhs
    # Move the prescribed rotations' element forces to the right-hand side.
    both_free = is_free[node_a] & is_free[node_b]
    coupling_a = ~is_free[node_b] & is_free[node_a]
    coupling_b = ~is_free[node_a] & is_free[node_b]
    correction = np.zeros(n_nodes)
    correction += np.bincount(
        node_a[coupling_a], stiffness[coupling_a] * known[node_b[coupling_a]], n_nodes
    ) + np.bincount(node_b[coupling_b], stiffness[coupling_b] * known[node_a[coupling_b]], n_nodes)
    rhs_full = rhs_full + correction

    rows = [free_number[is_free], free_number[node_a[both_free]], free_number[node_b[both_free]]]
    cols = [free_number[is_free], free_number[node_b[both_free]], free_number[node_a[both_free]]]
    values = [diagonal[is_free], -stiffness[both_free], -stiffness[both_free]]
    rhs_constraints = []
    gear_nodes = []
    for number, gear in enumerate(model.gears):
        node_of_a = mesh.node_of(model.shaft_number(gear.a.shaft), gear.a.x)
        node_of_b = mesh.node_of(model.shaft_number(gear.b.shaft), gear.b.x)
        gear_nodes.append((node_of_a, node_of_b))
        coefficient_a, coefficient_b = gear.coefficients
        if not is_free[node_of_a] and not is_free[node_of_b]:
            msg = "both gears sit at fixed supports: the mesh torque is undefined"
            raise InputError(f"gears[{number}]", msg)
        row = n_free + number
        fixed_part = 0.0
        for node, coefficient in ((node_of_a, coefficient_a), (node_of_b, coefficient_b)):
            if is_free[node]:
                rows += [np.array([row]), np.array([free_number[node]])]
                cols += [np.array([free_number[node]]), np.array([row])]
                values += [np.array([coefficient]), np.array([coefficient])]
            else:
                fixed_part += coefficient * known[node]
        rhs_constraints.append(-fixed_part)
    size = n_free + len(model.gears)
    matrix = sp.csc_matrix(
        (np.concatenate(values), (np.concatenate(rows), np.concatenate(cols))), shape=(size, size)
    )
    rhs = np.empty((size, n_cases))
    rhs[:n_free] = rhs_full[:, is_free].T
    rhs[n_free:] = np.array(rhs_constraints)[:, None] if model.gears else 0.0
    solution = _factor_and_solve(matrix, rhs, bool(model.gears))

    node_angle = np.tile(known, (n_cases, 1))
    node_angle[:, is_free] = solution[:n_free].T
    multipliers = solution[n_free:].T  # (n_cases, n_gears)
    gear_torques = np.zeros((n_cases, len(model.gears), 2))
    for number, gear in enumerate(model.gears):
        coefficient_a, coefficient_b = gear.coefficients
        gear_torques[:, number, 0] = -multipliers[:, number] * coefficient_a
        gear_torques[:, number, 1] = -multipliers[:, number] * coefficient_b

    # Internal torque just right of each element start, T(0+) = (θ_b − θ_a + ∫m/GK)/I₀.
    n_elements = len(stiffness)
    intensity_start = np.zeros((n_cases, n_elements))
    intensity_end = np.zeros((n_cases, n_elements))
    intensity_start[:, loads.elements] = loads.intensity_start
    intensity_end[:, loads.elements] = loads.intensity_end
    length = mesh.element_length
    slope = (intensity_end - intensity_start) / (2.0 * length)
    load_moment = intensity_start * mesh.flexibility[:, 1] + slope * mesh.flexibility[:, 2]
    stiffness_torque = (node_angle[:, node_b] - node_angle[:, node_a] + load_moment) * stiffness
    resultant = 0.5 * (intensity_start + intensity_end) * length
    external, reactions = _known_external_torques(
        model, support_nodes, node_angle, loads.point, gear_torques, gear_nodes
    )
    start_torque = _equilibrium_start_torques(mesh, ~is_free, external, resultant, stiffness_torque)
    end_torque = start_torque - resultant

    element = mesh.station_element
    u = mesh.station_u
    station_torque = (
        start_torque[:, element] - intensity_start[:, element] * u - slope[:, element] * u**2
    )
    moments = mesh.station_moments
    station_angle = (
        node_angle[:, node_a[element]]
        + start_torque[:, element] * moments[:, 0]
        - intensity_start[:, element] * moments[:, 1]
        - slope[:, element] * moments[:, 2]
    )
    # An element's end is its end node: take the nodal value itself, free of rounding.
    ends = mesh.station_is_end
    station_angle[:, ends] = node_angle[:, node_b[element[ends]]]

    _fixed_reactions(model, mesh, support_nodes, start_torque, end_torque, external, reactions)
    return _with_combinations(
        model, mesh, reactions, gear_torques, station_torque, station_angle, node_angle
    )


def _factor_and_solve(matrix: sp.csc_matrix, rhs: FloatArray, has_constraints: bool) -> FloatArray:
    """One LU factorization, all right-hand sides."""
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", spla.MatrixRankWarning)
            # Shaft-by-shaft numbering keeps the matrix banded, so no reordering is needed; gear
            # rows come last and fill only the tail.
            factor = spla.splu(
                matrix,
                permc_spec="NATURAL" if not has_constraints else "COLAMD",
                options={"SymmetricMode": not has_constraints},
            )
    except (RuntimeError, spla.MatrixRankWarning):
        msg = (
            "the system is singular: the gear meshes form a closed loop whose constraints repeat "
            "each other, or lock part of the system against itself"
        )
        raise InputError("gears", msg) from None
    solution = factor.solve(rhs)
    if not np.all(np.isfinite(solution)):
        msg = "the system is singular: check for redundant gear loops"
        raise InputError("gears", msg)
    if has_constraints:
        # The saddle-point system pivots off its diagonal: one step of iterative refinement
        # brings the gear constraints back to rounding (soft springs on stiff shafts left ~1e-8).
        solution = solution + factor.solve(rhs - matrix @ solution)
    return np.asarray(solution)


def _known_external_torques(
    model: Model,
    support_nodes: IntArray,
    node_angle: FloatArray,
    point: FloatArray,
    gear_torques: FloatArray,
    gear_nodes: list[tuple[int, int]],
) -> tuple[FloatArray, FloatArray]:
    """Concentrated torques at nodes known after the solve (applied, gear, spring).

    Also returns the reactions array with the springs' entries filled in.
    """
    external = point.copy()
    for number, (node_a, node_b) in enumerate(gear_nodes):
        external[:, node_a] += gear_torques[:, number, 0]
        external[:, node_b] += gear_torques[:, number, 1]
    reactions = np.zeros((point.shape[0], len(model.supports)))
    for number, support in enumerate(model.supports):
        if support.kind == "spring":
            assert support.stiffness is not None
            node = support_nodes[number]
            reaction = -support.stiffness * (node_angle[:, node] - support.rotation)
            reactions[:, number] = reaction
            external[:, node] += reaction
    return external, reactions


def _equilibrium_start_torques(
    mesh: Mesh,
    fixed_node: np.ndarray[Any, np.dtype[np.bool_]],
    external: FloatArray,
    resultant: FloatArray,
    stiffness_torque: FloatArray,
) -> FloatArray:
    """Internal torque just right of each element start, from equilibrium.

    Each shaft is swept node by node, T(x⁺) = T(x⁻) − (concentrated torques at x): from its start
    up to the first fixed support, from its end back to the last one, and between two fixed
    supports from the element torque the stiffness gives just right of a fixed support (whose
    reaction is not known beforehand). Torques far from any fixed support then do not suffer the
    cancellation of two large, nearly equal rotations (a stiff shaft on a soft spring).
    """
    start = np.empty_like(stiffness_torque)
    for shaft in range(len(mesh.shaft_node_start) - 1):
        first_node, end_node = mesh.shaft_node_start[shaft], mesh.shaft_node_start[shaft + 1]
        first, last = first_node - shaft, end_node - 1 - shaft  # its elements: [first, last)
        ext = external[:, first_node:end_node]
        loads = resultant[:, first:last]
        cumulative_ext = np.cumsum(ext, axis=1)
        cumulative_load = np.cumsum(loads, axis=1)
        # Sweep from the shaft's start: T_k(0⁺) = −Σ_{j≤k} ext_j − Σ_{j<k} W_j.
        from_start = -cumulative_ext[:, :-1] - (cumulative_load - loads)
        fixed = np.flatnonzero(fixed_node[first_node:end_node])
        local = start[:, first:last]
        local[:] = from_start
        if len(fixed) == 0:
            continue
        for piece_start, piece_end in itertools.pairwise(fixed):
            offset = stiffness_torque[:, first + piece_start] - from_start[:, piece_start]
            local[:, piece_start:piece_end] += offset[:, None]
        # Beyond the last fixed support the sweep runs back from the shaft's free end.
        local[:, fixed[-1] :] += (cumulative_ext[:, -1] + cumulative_load[:, -1])[:, None]
    return start


def _fixed_reactions(
    model: Model,
    mesh: Mesh,
    support_nodes: IntArray,
    start_torque: FloatArray,
    end_torque: FloatArray,
    external: FloatArray,
    reactions: FloatArray,
) -> None:
    """Fill in fixed-support torques from the jump of internal torque at their nodes."""
    n_cases, n_nodes = external.shape
    torque_left = np.zeros((n_cases, n_nodes))
    torque_right = np.zeros((n_cases, n_nodes))
    torque_right[:, mesh.element_start_node] = start_torque
    torque_left[:, mesh.element_start_node + 1] = end_torque
    for number, support in enumerate(model.supports):
        if support.kind == "fixed":
            node = support_nodes[number]
            # T(x⁻) − T(x⁺) equals the sum of the concentrated external torques at x.
            jump = torque_left[:, node] - torque_right[:, node]
            reactions[:, number] = jump - external[:, node]


def _with_combinations(
    model: Model,
    mesh: Mesh,
    reactions: FloatArray,
    gear_torques: FloatArray,
    torque: FloatArray,
    angle: FloatArray,
    node_angle: FloatArray,
) -> Results:
    case_row = {case.name: row for row, case in enumerate(model.load_cases)}
    factors = np.zeros((len(model.combinations), len(model.load_cases)))
    for row, combination in enumerate(model.combinations):
        for case_name, factor in combination.factors:
            factors[row, case_row[case_name]] += factor

    def combine(values: FloatArray) -> FloatArray:
        if not model.combinations:
            return values
        flat = values.reshape(values.shape[0], -1)
        combined: FloatArray = np.concatenate([flat, factors @ flat]).reshape(
            (flat.shape[0] + factors.shape[0], *values.shape[1:])
        )
        return combined

    all_torque = combine(torque)
    arrays = {
        "reactions": combine(reactions),
        "gear_torques": combine(gear_torques),
        "torque": all_torque,
        "angle": combine(angle),
        "shear_stress": np.abs(all_torque) * mesh.station_stress_per_torque,
        "node_angle": combine(node_angle),
    }
    for array in arrays.values():
        array.setflags(write=False)
    return Results(model=model, mesh=mesh, names=model.result_names, **arrays)


def torsion_stiffness_matrix(model: Model, mesh: Mesh | None = None) -> sp.csr_matrix:
    """The assembled, unconstrained stiffness matrix (N·m/rad) over all mesh nodes.

    Springs are on the diagonal; fixed supports and gears are not applied. For benchmarks and
    for other analyses (vibration) built on the same elements.
    """
    mesh = mesh if mesh is not None else build_mesh(model)
    stiffness = 1.0 / mesh.flexibility[:, 0]
    node_a = mesh.element_start_node
    node_b = node_a + 1
    rows = np.concatenate([node_a, node_b, node_a, node_b])
    cols = np.concatenate([node_a, node_b, node_b, node_a])
    values = np.concatenate([stiffness, stiffness, -stiffness, -stiffness])
    size = len(mesh.node_x)
    matrix = sp.csr_matrix((values, (rows, cols)), shape=(size, size))
    for support in model.supports:
        if support.kind == "spring":
            node = mesh.node_of(model.shaft_number(support.shaft), support.x)
            matrix[node, node] += support.stiffness
    return matrix


__all__ = [
    "CURVE_PIECES",
    "Envelope",
    "LoadResult",
    "Mesh",
    "Results",
    "ShaftResult",
    "build_mesh",
    "solve",
    "torsion_stiffness_matrix",
]
