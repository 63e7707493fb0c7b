"""Sizes of a mesh: element flexibility moments and station values, for one or many variants.

The cut-up of the shafts (:class:`MeshTopology`, built by :mod:`workbench.solver.mesh`) is
fixed by one case; its sizes — node positions, flexibility moments, stresses per torque, the
stations' values — may come in many variants of it (:class:`Geometry`), from segment columns
with a leading variant axis.

References
----------
.. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., Wiley, 2000, ch. 3.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.solver.columns import BoolArray, IntArray, SegmentTable
from workbench.solver.element_range import require_element_constants
from workbench.solver.elements import CURVE_PIECES, VaryingElements, segment_constants
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
        geometry, element_rigidity, element_stress = _sizes(topology, segments, node_x, nodes_moved)
    # Both stations of an element of two stations hold its values: check the elements'.
    two = topology.two_stations
    require_element_constants(
        segments,
        topology.element_segment_row,
        None if two else topology.station_element,
        element_rigidity if two else geometry.station_rigidity,
        element_stress if two else geometry.station_stress_per_torque,
        geometry.flexibility,
    )
    return geometry


def _sizes(
    topology: MeshTopology, segments: SegmentTable, node_x: FloatArray, nodes_moved: bool
) -> tuple[Geometry, FloatArray, FloatArray]:
    """The work of :func:`size_mesh`, without its checks; also each element's G·K and τ/T.

    The elements' values are (n_variants or 1, n_elements) (N·m², 1/m³).
    """
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
    geometry = Geometry(
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
    return geometry, element_rigidity, element_stress


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


__all__ = ["Geometry", "MeshTopology", "interleave", "size_mesh", "start_and_end_values"]
