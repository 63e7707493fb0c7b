"""The mesh of the array core: nodes, exact elements and result stations, from columns.

Each shaft is cut into elements at every segment end, support, gear, point torque, end of a
distributed torque and design key point, so inside an element the section law and the load
intensity are smooth. The cut-up (the topology: which element lies in which segment, which
stations it has) is fixed by one case; the sizes (node positions, flexibility moments, stresses
per torque) may come in many variants of it (:class:`Geometry`).

References
----------
.. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., Wiley, 2000, ch. 2-3.
"""

from __future__ import annotations

import dataclasses
import functools
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.solver.columns import BoolArray, CaseTable, IntArray, SegmentTable, case_table
from workbench.solver.element_range import require_element_constants, require_every_segment
from workbench.solver.elements import CURVE_PIECES, VaryingElements, segment_constants
from workbench.solver.model import POSITION_TOLERANCE, Model
from workbench.solver.sections import FloatArray


@dataclass(frozen=True)
class Geometry:
    """Sizes of a mesh for one or many variants: every array has a leading variant axis.

    Parameters
    ----------
    node_x
        (n_variants, n_nodes) node positions on their shafts (m).
    element_length
        (n_variants, n_elements) element lengths (m).
    flexibility
        (n_variants, n_elements, 3) flexibility moments I₀, I₁, I₂ (1/(N·m), m/(N·m), m²/(N·m)).
    station_u
        (n_variants, n_stations) distance of each station from its element's start (m).
    station_x
        (n_variants, n_stations) station positions (m).
    station_stress_per_torque
        (n_variants, n_stations) peak shear stress per unit torque (1/m³).
    station_rigidity
        (n_variants, n_stations) G·K (N·m²).
    interior_moments
        (n_variants, n_interior, 3) ∫₀ᵘ v^k dv/(G·K) at the stations inside elements.
    nodes_moved
        Whether the nodes are not where the case put them (segment lengths of the variants
        differ): loads then span between their nodes rather than their stated positions.
    """

    node_x: FloatArray
    element_length: FloatArray
    flexibility: FloatArray
    station_u: FloatArray
    station_x: FloatArray
    station_stress_per_torque: FloatArray
    station_rigidity: FloatArray
    interior_moments: FloatArray
    nodes_moved: bool = False

    @property
    def n_variants(self) -> int:
        """Number of variants."""
        return int(self.flexibility.shape[0])


@dataclass(frozen=True)
class MeshTopology:
    """Which element lies where and which stations it has: the variant-free part of a mesh.

    Arrays are flat over all shafts, shaft after shaft, each in increasing x.
    """

    shaft_node_start: IntArray  # (n_shafts + 1,) first node of each shaft
    element_start_node: IntArray  # (n_elements,)
    element_shaft: IntArray
    element_segment: IntArray  # segment index within its shaft
    element_segment_row: IntArray  # segment row over all shafts (SegmentTable order)
    element_fraction: FloatArray  # (n_elements, 2) start and end as fractions of the segment
    element_loaded: BoolArray  # (n_elements,) a distributed torque acts on it
    element_station_start: IntArray  # (n_elements + 1,) first station of each element
    station_element: IntArray  # (n_stations,)
    station_is_end: BoolArray  # the station is its element's end
    shaft_station_start: IntArray  # (n_shafts + 1,)
    interior: IntArray  # stations strictly inside their element
    interior_step: FloatArray  # their step number on elements of even steps (NaN on varying)
    varying: VaryingElements
    elements_are_segments: bool  # element i is segment row i

    @property
    def two_stations(self) -> bool:
        """Whether every element shows its two ends only (prismatic, no distributed load)."""
        return len(self.interior) == 0


@dataclass(frozen=True)
class Mesh(MeshTopology):
    """The cut-up geometry of a model: nodes, elements and result stations, all load-free.

    The topology (:class:`MeshTopology`) with the sizes of one variant.
    """

    node_x: FloatArray  # (n_nodes,) position of each node on its own shaft (m)
    element_length: FloatArray  # (m)
    flexibility: FloatArray  # (n_elements, 3): I₀ (1/(N·m)), I₁ (m/(N·m)), I₂ (m²/(N·m))
    station_x: FloatArray  # (m)
    station_u: FloatArray  # local coordinate from the element start (m)
    station_stress_per_torque: FloatArray  # (1/m³)
    station_rigidity: FloatArray  # G·K (N·m²)
    interior_moments: FloatArray  # (n_interior, 3) ∫₀ᵘ v^k dv/(G·K) at interior stations

    @functools.cached_property
    def station_moments(self) -> FloatArray:
        """(n_stations, 3) ∫₀ᵘ v^k dv/(G·K) at every station."""
        moments = np.zeros((len(self.station_element), 3))
        moments[self.station_is_end] = self.flexibility
        moments[self.interior] = self.interior_moments
        moments.setflags(write=False)
        return moments

    @property
    def geometry(self) -> Geometry:
        """The mesh's own sizes, as one variant."""
        return Geometry(
            node_x=self.node_x[None],
            element_length=self.element_length[None],
            flexibility=self.flexibility[None],
            station_u=self.station_u[None],
            station_x=self.station_x[None],
            station_stress_per_torque=self.station_stress_per_torque[None],
            station_rigidity=self.station_rigidity[None],
            interior_moments=self.interior_moments[None],
        )

    def node_of(self, shaft_number: int, x: float) -> int:
        """Index of the node at position x (m) of a shaft."""
        return int(self.nodes_of(np.array([shaft_number]), np.array([x], dtype=float))[0])

    def nodes_of(self, shaft_number: IntArray, x: FloatArray) -> IntArray:
        """Indices of the nodes nearest to positions x (m) of the given shafts."""
        if len(self.shaft_node_start) == 2:  # one shaft
            return self._nodes_on(0, x)
        nodes = np.empty(len(x), dtype=np.intp)
        for number in np.unique(shaft_number).tolist():  # a loop over shafts
            chosen = shaft_number == number
            nodes[chosen] = self._nodes_on(number, x[chosen])
        return nodes

    def _nodes_on(self, number: int, x: FloatArray) -> IntArray:
        start, stop = self.shaft_node_start[number], self.shaft_node_start[number + 1]
        positions = self.node_x[start:stop]
        right = np.searchsorted(positions, x)
        at = np.minimum(right, len(positions) - 1)
        before = positions[np.maximum(right - 1, 0)]
        # Nodes are sorted: the nearest is one of the two around x.
        left_nearer = (right > 0) & (x - before < positions[at] - x)
        nearest: IntArray = start + np.where(
            (right >= len(positions)) | left_nearer, right - 1, right
        )
        return nearest


def _merge_points(
    boundaries: FloatArray, segment_lengths: FloatArray, keys: FloatArray
) -> FloatArray:
    """Segment ends and key points, sorted, merging points closer than the position tolerance.

    Of a group of close points the first in order of x is kept; the shaft's ends stay exactly 0
    and its length.
    """
    length = float(boundaries[-1])
    tolerance = POSITION_TOLERANCE * length
    keys = np.clip(keys, 0.0, length)
    # The gaps are the segment lengths up to the rounding of their running sum.
    if float(segment_lengths.min()) > 2.0 * tolerance + 8.0 * np.finfo(float).eps * length:
        # Segment ends far apart: a key point near one of them only moves it to itself if first.
        right = np.searchsorted(boundaries, keys)
        before = boundaries[np.maximum(right - 1, 0)]
        after = boundaries[np.minimum(right, len(boundaries) - 1)]
        near_after = after - keys <= tolerance
        if np.all(near_after | (keys - before <= tolerance)):
            nodes = boundaries  # a fresh array of the caller's
            np.minimum.at(nodes, right[near_after], keys[near_after])
            nodes[0], nodes[-1] = 0.0, length
            return nodes
    # Segment ends come sorted with a few key points after them: timsort takes the runs as they are.
    points = np.sort(np.concatenate([boundaries, keys]), kind="stable")
    keep = np.empty(len(points), dtype=bool)
    keep[0] = True
    np.greater(np.diff(points), tolerance, out=keep[1:])
    merged = points[keep]
    merged[0], merged[-1] = 0.0, length
    if len(merged) > 1 and merged[-1] - merged[-2] <= tolerance:
        merged = np.delete(merged, -2)
    return merged


def _key_points(table: CaseTable, n_shafts: int) -> list[FloatArray]:
    """Positions on each shaft that must be nodes: supports, gears, loads, design points."""
    pairs = (
        (table.key_shaft, table.key_x),
        (table.support_shaft, table.support_x),
        (table.gear_shaft.ravel(), table.gear_x.ravel()),
        (table.torque_shaft, table.torque_x),
        (table.load_shaft, table.load_start),
        (table.load_shaft, table.load_end),
    )
    shafts = np.concatenate([shaft for shaft, _ in pairs])
    positions = np.concatenate([x for _, x in pairs])
    return [positions[shafts == number] for number in range(n_shafts)]


def _loaded(table: CaseTable, middles: FloatArray, first_element: IntArray) -> BoolArray:
    """Elements whose middle lies strictly inside a distributed torque's span."""
    marks = np.zeros(len(middles) + 1, dtype=np.intp)
    for number in np.unique(table.load_shaft).tolist():  # a loop over loaded shafts
        first, stop = first_element[number], first_element[number + 1]
        on_shaft = table.load_shaft == number
        low = np.searchsorted(middles[first:stop], table.load_start[on_shaft], side="right")
        high = np.searchsorted(middles[first:stop], table.load_end[on_shaft], side="left")
        np.add.at(marks, first + low, 1)
        np.add.at(marks, first + np.maximum(high, low), -1)
    return np.cumsum(marks[:-1]) > 0


def _shaft_nodes(
    segments: SegmentTable, keys: list[FloatArray]
) -> tuple[FloatArray, IntArray, IntArray | None, FloatArray | None]:
    """Nodes of every shaft; where they are not just the segment ends, each element's segment.

    Returns node_x, shaft_node_start, and (element_segment, element_origin) — the segment index
    within its shaft and the segment's start x — or (None, None) when every element is a whole
    segment.
    """
    lengths = segments.length[0]
    starts = segments.shaft_segment_start

    def boundaries_of(number: int) -> FloatArray:
        first, last = starts[number], starts[number + 1]
        boundaries = np.zeros(last - first + 1)
        np.cumsum(lengths[first:last], out=boundaries[1:])
        return boundaries

    node_parts = [
        _merge_points(
            boundaries_of(number), lengths[starts[number] : starts[number + 1]], keys[number]
        )
        for number in range(len(keys))  # a loop over shafts
    ]
    counts = [len(nodes) for nodes in node_parts]
    shaft_node_start = np.zeros(len(counts) + 1, dtype=np.intp)
    np.cumsum(counts, out=shaft_node_start[1:])
    node_x = np.concatenate(node_parts) if len(node_parts) > 1 else node_parts[0]
    if shaft_node_start[-1] - len(counts) == segments.n_segments:
        return node_x, shaft_node_start, None, None  # every element is a whole segment
    segment_parts, origin_parts = [], []
    for number, nodes in enumerate(node_parts):  # a loop over shafts
        boundaries = boundaries_of(number)
        middles = 0.5 * (nodes[:-1] + nodes[1:])
        segment_of = np.clip(np.searchsorted(boundaries, middles) - 1, 0, len(boundaries) - 2)
        require_every_segment(number, segment_of, len(boundaries) - 1)
        segment_parts.append(segment_of)
        origin_parts.append(boundaries[segment_of])
    return node_x, shaft_node_start, np.concatenate(segment_parts), np.concatenate(origin_parts)


def build_mesh_from_table(table: CaseTable) -> Mesh:
    """Cut a system given as columns into exact elements and result stations.

    Parameters
    ----------
    table
        The system's columns (the sizes of its first variant are used).

    Returns
    -------
    Mesh
        Load-free geometry shared by every load case.
    """
    segments = table.segments
    n_shafts = len(segments.shaft_ids)
    node_x, shaft_node_start, element_segment, origin = _shaft_nodes(
        segments, _key_points(table, n_shafts)
    )
    n_elements = len(node_x) - n_shafts
    first_element = shaft_node_start - np.arange(n_shafts + 1)
    if n_shafts == 1:
        element_shaft = np.zeros(n_elements, dtype=np.intp)
        element_start_node = np.arange(n_elements)
    else:
        element_shaft = np.repeat(np.arange(n_shafts), np.diff(first_element))
        element_start_node = np.arange(n_elements) + element_shaft
    if element_segment is None or origin is None:  # elements are the segments
        # One shaft: the element, its start node and its segment share one number.
        segment_row = element_start_node if n_shafts == 1 else np.arange(n_elements)
        element_segment = (
            segment_row if n_shafts == 1 else segment_row - first_element[element_shaft]
        )
        fraction = np.broadcast_to(np.array([0.0, 1.0]), (n_elements, 2))
    else:
        segment_row = element_segment + segments.shaft_segment_start[element_shaft]
        starts, ends = node_x[element_start_node], node_x[element_start_node + 1]
        length = segments.length[0, segment_row]
        fraction = np.stack(
            [
                np.maximum((starts - origin) / length, 0.0),
                np.minimum((ends - origin) / length, 1.0),
            ],
            axis=1,
        )
    if len(table.load_case):
        middles = 0.5 * (node_x[element_start_node] + node_x[element_start_node + 1])
        loaded = _loaded(table, middles, first_element)
    else:
        loaded = np.zeros(n_elements, dtype=bool)
    segment_varies = segments.segment_varies
    varies = segment_varies[segment_row] if segment_varies.any() else np.zeros(n_elements, bool)
    varying_element = np.flatnonzero(varies)
    varying = VaryingElements.of(
        segments, varying_element, segment_row[varying_element], fraction[varying_element]
    )
    if not len(varying_element) and not loaded.any():
        # Every element shows its two ends only.
        station_start = np.arange(0, 2 * n_elements + 1, 2)
        station_element = np.repeat(
            element_start_node if n_shafts == 1 else np.arange(n_elements), 2
        )
        is_end = np.zeros(2 * n_elements, dtype=bool)
        is_end[1::2] = True
        interior = np.zeros(0, dtype=np.intp)
        step = np.zeros(0)
    else:
        # Station counts: ends only where T is constant and θ linear; a curve elsewhere.
        counts = np.where(loaded, CURVE_PIECES + 1, 2)
        counts[varying_element] = varying.station_count
        station_start = np.zeros(n_elements + 1, dtype=np.intp)
        np.cumsum(counts, out=station_start[1:])
        station_element = np.repeat(np.arange(n_elements), counts)
        local = np.arange(len(station_element)) - station_start[station_element]
        is_end = local == counts[station_element] - 1
        interior = np.flatnonzero((local > 0) & ~is_end)
        step = np.where(varies[station_element[interior]], np.nan, local[interior])
    topology = MeshTopology(
        shaft_node_start=shaft_node_start,
        element_start_node=element_start_node,
        element_shaft=element_shaft,
        element_segment=element_segment,
        element_segment_row=segment_row,
        element_fraction=fraction,
        element_loaded=loaded,
        element_station_start=station_start,
        station_element=station_element,
        station_is_end=is_end,
        shaft_station_start=station_start[first_element],
        interior=interior,
        interior_step=step,
        varying=varying,
        elements_are_segments=origin is None,
    )
    geometry = size_mesh(topology, segments, node_x[None])
    arrays = {
        "node_x": node_x,
        "element_length": geometry.element_length[0],
        "flexibility": geometry.flexibility[0],
        "station_x": geometry.station_x[0],
        "station_u": geometry.station_u[0],
        "station_stress_per_torque": geometry.station_stress_per_torque[0],
        "station_rigidity": geometry.station_rigidity[0],
        "interior_moments": geometry.interior_moments[0],
    }
    for array in arrays.values():
        array.setflags(write=False)
    fields = {field.name: getattr(topology, field.name) for field in dataclasses.fields(topology)}
    return Mesh(**fields, **arrays)


def interleave(first: FloatArray, second: FloatArray, out: FloatArray | None = None) -> FloatArray:
    """[a₀, b₀, a₁, b₁, …] along the last axis (into ``out`` when given)."""
    if out is None:
        count = max(first.shape[-1], second.shape[-1])
        out = np.empty((*np.broadcast_shapes(first.shape[:-1], second.shape[:-1]), 2 * count))
    out[..., 0::2] = first
    out[..., 1::2] = second
    return out


def start_and_end_values(topology: MeshTopology, node_values: FloatArray) -> tuple[Any, Any]:
    """Values at each element's start node and end node (views when there is one shaft)."""
    if len(topology.shaft_node_start) == 2:
        return node_values[..., :-1], node_values[..., 1:]
    start_node = topology.element_start_node
    return node_values[..., start_node], node_values[..., start_node + 1]


def size_mesh(
    topology: MeshTopology, segments: SegmentTable, node_x: FloatArray, nodes_moved: bool = False
) -> Geometry:
    """Sizes of a mesh topology for every variant of the segment columns.

    Parameters
    ----------
    topology
        The mesh (or its topology).
    segments
        Segment columns with one or many variants.
    node_x
        (n_variants, n_nodes) node positions (m), or (1, n_nodes) when lengths do not vary.
    nodes_moved
        Whether ``node_x`` differs from the positions the case states (:func:`node_positions`).

    Returns
    -------
    Geometry
        Element flexibility moments and station values, variant by variant.

    Raises
    ------
    InputError
        When a rigidity G·K, a stress per torque or a flexibility moment is not a finite
        number in range (:func:`~workbench.solver.element_range.require_element_constants`).

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3
       (flexibility of a prismatic member: I_k = L^(k+1)/((k+1)·G·K)).
    """
    # Each input is in range, but a product or quotient of them may not be: that is checked
    # on the results, so numpy's warnings about it are not wanted.
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        geometry = _sizes(topology, segments, node_x, nodes_moved)
    require_element_constants(
        segments,
        topology.element_segment_row,
        topology.station_element,
        geometry.station_rigidity,
        geometry.station_stress_per_torque,
        geometry.flexibility,
    )
    return geometry


def _sizes(
    topology: MeshTopology, segments: SegmentTable, node_x: FloatArray, nodes_moved: bool
) -> Geometry:
    """The work of :func:`size_mesh`, without its checks."""
    n_variants = max(segments.n_variants, node_x.shape[0])
    x_start, x_end = start_and_end_values(topology, node_x)
    length = x_end - x_start
    n_elements = length.shape[1]
    rigidity, stress = segment_constants(segments)
    row = topology.element_segment_row
    identity = topology.elements_are_segments
    element_rigidity = rigidity if identity else rigidity[:, row]
    element_stress = stress if identity else stress[:, row]
    flexibility = np.empty((n_variants, n_elements, 3))
    # I₁ = I₀·L/2 and I₂ = I₁·2L/3, written in place: no temporary the size of the mesh.
    np.divide(length, element_rigidity, out=flexibility[..., 0])
    np.multiply(flexibility[..., 0], length, out=flexibility[..., 1])
    flexibility[..., 1] *= 0.5
    np.multiply(flexibility[..., 1], length, out=flexibility[..., 2])
    flexibility[..., 2] *= 2.0 / 3.0
    shape = (n_variants, len(topology.station_element))
    if topology.two_stations:
        full = (n_variants, n_elements)
        station_u = np.zeros((n_variants, 2 * n_elements))
        station_u[:, 1::2] = length
        if len(topology.shaft_node_start) == 2:  # one shaft: element k joins nodes k and k + 1
            station_x = np.repeat(np.broadcast_to(node_x, (n_variants, n_elements + 1)), 2, 1)
            station_x = station_x[:, 1:-1]
        else:
            station_x = interleave(np.broadcast_to(x_start, full), np.broadcast_to(x_end, full))
        # Both stations of an element hold its values: repeating them is one contiguous pass.
        station_stress = np.repeat(np.broadcast_to(element_stress, full), 2, axis=1)
        station_rigidity = np.repeat(np.broadcast_to(element_rigidity, full), 2, axis=1)
        interior_moments = np.zeros((n_variants, 0, 3))
    else:
        element = topology.station_element
        station_u = np.zeros(shape)
        ends = topology.station_is_end
        station_u[:, ends] = length
        interior = topology.interior
        interior_element = element[interior]
        interior_u = length[:, interior_element] * topology.interior_step / CURVE_PIECES
        interior_rigidity = element_rigidity[:, interior_element]
        interior_moments = np.stack(
            [
                interior_u / interior_rigidity,
                interior_u**2 / (2 * interior_rigidity),
                interior_u**3 / (3 * interior_rigidity),
            ],
            axis=-1,
        )
        station_stress = np.array(np.broadcast_to(element_stress[:, element], shape))
        station_rigidity = np.array(np.broadcast_to(element_rigidity[:, element], shape))
        # A row per variant: a varied section changes the interior moments even where the
        # lengths (so the interior positions) are shared.
        interior_u = np.array(np.broadcast_to(interior_u, (n_variants, interior_u.shape[1])))
        interior_moments = np.array(
            np.broadcast_to(interior_moments, (n_variants, *interior_moments.shape[1:]))
        )
        if len(topology.varying.element):
            _size_varying(
                topology,
                segments,
                flexibility,
                station_u,
                interior_u,
                interior_moments,
                station_stress,
                station_rigidity,
            )
        station_u[:, interior] = interior_u
        station_x = node_x[:, topology.element_start_node[element]] + station_u
        # An element's end station is its end node, exactly (x listed twice at a jump must match).
        station_x[:, ends] = x_end
    return Geometry(
        node_x=node_x,
        element_length=np.broadcast_to(length, (n_variants, n_elements)),
        flexibility=flexibility,
        station_u=station_u,
        station_x=station_x,
        station_stress_per_torque=station_stress,
        station_rigidity=station_rigidity,
        interior_moments=interior_moments,
        nodes_moved=nodes_moved,
    )


def _size_varying(
    topology: MeshTopology,
    segments: SegmentTable,
    flexibility: FloatArray,
    station_u: FloatArray,
    interior_u: FloatArray,
    interior_moments: FloatArray,
    station_stress: FloatArray,
    station_rigidity: FloatArray,
) -> None:
    """Fill in the values of the varying elements, integrated for every variant."""
    varying = topology.varying
    moments, element_flexibility, stress, rigidity = varying.integrate(segments, segments.length)
    flexibility[:, varying.element] = element_flexibility
    first = topology.element_station_start[varying.element]
    offsets = np.cumsum(varying.station_count) - varying.station_count
    owner = np.repeat(np.arange(len(varying.element)), varying.station_count)
    stations = first[owner] + np.arange(len(owner)) - offsets[owner]
    length = segments.length[:, varying.segment[owner]]
    station_u[:, stations] = (varying.station_fraction - varying.fraction[owner, 0]) * length
    station_stress[:, stations] = stress
    station_rigidity[:, stations] = rigidity
    inside = np.isin(stations, topology.interior, assume_unique=True)
    position = np.searchsorted(topology.interior, stations[inside])
    interior_u[:, position] = station_u[:, stations[inside]]
    interior_moments[:, position] = moments[:, inside]


def node_positions(mesh: Mesh, segments: SegmentTable) -> FloatArray:
    """(n_variants, n_nodes) node positions when segment lengths vary (m).

    Each node keeps its place as a fraction of its segment, so supports, gears and loads stay on
    the same nodes: a variant is the same topology at other sizes.
    """
    lengths = segments.length
    node_x = np.empty((lengths.shape[0], len(mesh.node_x)))
    start_node = mesh.element_start_node
    for number in range(len(mesh.shaft_node_start) - 1):  # a loop over shafts
        first, last = segments.shaft_segment_start[number : number + 2]
        boundaries = np.zeros((lengths.shape[0], last - first + 1))
        np.cumsum(lengths[:, first:last], axis=1, out=boundaries[:, 1:])
        elements = slice(
            mesh.shaft_node_start[number] - number, mesh.shaft_node_start[number + 1] - number - 1
        )
        local = mesh.element_segment[elements]
        node_x[:, start_node[elements]] = (
            boundaries[:, local] + mesh.element_fraction[elements, 0] * lengths[:, first + local]
        )
        node_x[:, mesh.shaft_node_start[number + 1] - 1] = boundaries[:, -1]
    return node_x


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
    return build_mesh_from_table(case_table(model))


__all__ = [
    "Geometry",
    "Mesh",
    "MeshTopology",
    "build_mesh",
    "build_mesh_from_table",
    "node_positions",
    "size_mesh",
]
