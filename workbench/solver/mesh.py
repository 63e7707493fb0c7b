"""The mesh of the array core: nodes, exact elements and result stations, from columns.

Each shaft is cut into elements at every segment end, support, gear, point torque, end of a
distributed torque and design key point, so inside an element the section law and the load
intensity are smooth. The cut-up (the topology: which element lies in which segment, which
stations it has) is fixed by one case; the sizes (node positions, flexibility moments, stresses
per torque) may come in many variants of it (:mod:`workbench.solver.mesh_sizes`).

References
----------
.. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., Wiley, 2000, ch. 2-3.
"""

from __future__ import annotations

import dataclasses
import functools
from dataclasses import dataclass

import numpy as np

from workbench.solver.columns import BoolArray, CaseTable, IntArray, SegmentTable, case_table
from workbench.solver.element_range import require_every_segment
from workbench.solver.elements import CURVE_PIECES, VaryingElements
from workbench.solver.mesh_sizes import Geometry, MeshTopology, size_mesh
from workbench.solver.model import POSITION_TOLERANCE, Model
from workbench.solver.sections import FloatArray


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


#: Most elements that warp given stations inside them to draw their curves. Checks never need
#: them: in an element without distributed torque B″ = λ²·B and the warping torque obeys the
#: same equation, so |B|, the warping torque and the Saint-Venant torque T − T_w peak at the
#: element's ends (a solution of y″ = λ²y has no interior extremum of |y|; Vlasov,
#: *Thin-Walled Elastic Beams*, 2nd ed., ch. V); a loaded element has its curve stations anyway.
WARPING_CURVES_UP_TO = 4096


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
    # Where a section warps θ, θ′, θ″ and B are curves (hyperbolic) even without a load: drawn
    # from stations inside the elements, up to a mesh whose nodes draw them well enough alone.
    curved = loaded
    if segments.warping_rigidity is not None:
        warping = segments.warping_rigidity[0, segment_row] > 0.0
        if np.count_nonzero(warping) <= WARPING_CURVES_UP_TO:
            curved = loaded | warping
    if not len(varying_element) and not curved.any():
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
        counts = np.where(curved, CURVE_PIECES + 1, 2)
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


__all__ = ["Mesh", "build_mesh", "build_mesh_from_table", "node_positions"]
