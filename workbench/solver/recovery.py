"""Recovery of internal torque, rotation and reactions from the nodal rotations, vectorised.

Arrays run (n_cases, n_variants, ...): every load case of every variant at once. Inside an
element the internal torque and rotation follow exactly from equilibrium and the element's
cumulative flexibility moments:

    T(u) = T(0⁺) − t₀·u − s·u²,               t(u) = t₀ + 2s·u,
    θ(u) = θ_a + T(0⁺)·m₀(u) − t₀·m₁(u) − s·m₂(u),   m_k(u) = ∫₀ᵘ v^k dv/(G·K).

References
----------
.. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (non-uniform torsion:
   φ = ∫T dx/(G·J), T(x) from the free body) and §3.8 (statically indeterminate members:
   reactions from equilibrium once the rotations are known).
.. [2] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3 (member end
   forces from the nodal displacements).
"""

from __future__ import annotations

import itertools
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from workbench.solver.columns import BoolArray, IntArray
from workbench.solver.mesh import Mesh
from workbench.solver.mesh_sizes import Geometry, interleave, start_and_end_values
from workbench.solver.sections import FloatArray


@dataclass(frozen=True)
class ElementLoads:
    """Distributed torque on the loaded elements, per load case and variant.

    Parameters
    ----------
    elements
        (n_loaded,) the loaded elements.
    start, end
        (n_cases, n_variants, n_loaded) intensity at each element's start and end (N·m/m).
    length
        (n_variants, n_loaded) their lengths (m).
    """

    elements: IntArray
    start: FloatArray
    end: FloatArray
    length: FloatArray

    @property
    def slope(self) -> FloatArray:
        """Half the intensity's gradient, s in t(u) = t₀ + 2s·u (N·m/m²)."""
        return (self.end - self.start) / (2.0 * self.length)

    @property
    def resultant(self) -> FloatArray:
        """Total torque on each loaded element (N·m)."""
        return 0.5 * (self.start + self.end) * self.length

    def full(self, values: FloatArray, n_elements: int) -> FloatArray:
        """(n_cases, n_variants, n_elements) with ``values`` on the loaded elements, 0 elsewhere."""
        spread = np.zeros((*values.shape[:2], n_elements))
        spread[..., self.elements] = values
        return spread


def start_torques(
    mesh: Mesh,
    fixed_node: BoolArray,
    external: FloatArray,
    resultant: FloatArray | None,
    stiffness_torque: Callable[[IntArray], FloatArray],
) -> FloatArray:
    """Internal torque just right of each element start, from equilibrium.

    Each shaft is swept node by node, T(x⁺) = T(x⁻) − (concentrated torques at x): from its start
    up to the first fixed support, from its end back to the last one, and between two fixed
    supports from the element torque the stiffness gives just right of a fixed support (whose
    reaction is not known beforehand). Torques far from any fixed support then do not suffer the
    cancellation of two large, nearly equal rotations (a stiff shaft on a soft spring).

    Parameters
    ----------
    mesh
        The mesh.
    fixed_node
        (n_nodes,) whether a fixed support holds the node.
    external
        (n_cases, n_variants, n_nodes) concentrated torques known at each node (N·m).
    resultant
        (n_cases, n_variants, n_elements) distributed torque on each element (N·m), or
        ``None`` when there is none.
    stiffness_torque
        Element torque T(0⁺) from the element stiffness, for given elements (N·m).

    Returns
    -------
    numpy.ndarray
        (n_cases, n_variants, n_elements) T(0⁺) of each element (N·m).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (internal torque from a free
       body: T(x) = −Σ external torques on [0, x)).
    """
    n_elements = len(mesh.element_start_node)
    start = np.empty((*external.shape[:-1], n_elements))
    for shaft in range(len(mesh.shaft_node_start) - 1):  # a loop over shafts
        first_node, end_node = mesh.shaft_node_start[shaft], mesh.shaft_node_start[shaft + 1]
        first, last = first_node - shaft, end_node - 1 - shaft  # its elements: [first, last)
        local = start[..., first:last]
        # Sweep from the shaft's start: T_k(0⁺) = −Σ_{j≤k} ext_j − Σ_{j<k} W_j.
        np.cumsum(external[..., first_node : end_node - 1], axis=-1, out=local)
        total = local[..., -1:] + external[..., end_node - 1 : end_node]
        if resultant is not None:
            loads = resultant[..., first:last]
            swept = np.cumsum(loads, axis=-1)
            total = total + swept[..., -1:]
            swept -= loads
            local += swept
        # Not np.negative(local, out=local): numpy 2.4.6 (as installed here) reads an input of
        # 64-byte stride as if contiguous when the output is strided, so a one-element shaft in a
        # mesh of 8 elements took its neighbour's (uninitialised) torque. Multiply is unaffected.
        local *= -1.0
        fixed = np.flatnonzero(fixed_node[first_node:end_node])
        if len(fixed) == 0:
            continue
        pieces = list(itertools.pairwise(fixed))
        if pieces:
            piece_starts = np.array([piece[0] for piece in pieces])
            offsets = stiffness_torque(first + piece_starts) - local[..., piece_starts]
            for number, (piece_start, piece_end) in enumerate(pieces):  # fixed supports
                local[..., piece_start:piece_end] += offsets[..., number : number + 1]
        # Beyond the last fixed support the sweep runs back from the shaft's free end.
        local[..., fixed[-1] :] += total
    return start


#: Stations inside elements recovered at once (bounds the temporaries of the formulas).
STATION_BLOCK = 1 << 16


def station_values(
    mesh: Mesh,
    geometry: Geometry,
    start: FloatArray,
    end: FloatArray,
    node_angle: FloatArray,
    loads: ElementLoads,
    torque: FloatArray,
    angle: FloatArray,
) -> None:
    """Internal torque and rotation at every station of every element.

    Parameters
    ----------
    mesh, geometry
        The mesh and its sizes (one or many variants).
    start, end
        (n_cases, n_variants, n_elements) T(0⁺) and T(L⁻) of each element (N·m).
    node_angle
        (n_cases, n_variants, n_nodes) nodal rotations (rad).
    loads
        The distributed torque on the loaded elements.
    torque, angle
        (n_cases, n_variants, n_stations) outputs, written here: T (N·m) and θ (rad).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (T(x) from equilibrium,
       θ(x) = θ_a + ∫T/(G·J)).
    """
    angle_a, angle_b = start_and_end_values(mesh, node_angle)
    if mesh.two_stations:  # every element shows its two ends only: interleave them
        interleave(start, end, out=torque)
        interleave(angle_a, angle_b, out=angle)
        return
    n_elements = start.shape[-1]
    first = mesh.element_station_start[:-1]
    last = mesh.element_station_start[1:] - 1
    torque[..., first], torque[..., last] = start, end
    # An element's ends are its nodes: take the nodal values themselves, free of rounding.
    angle[..., first], angle[..., last] = angle_a, angle_b
    all_intensity = loads.full(loads.start, n_elements)
    all_slope = loads.full(loads.slope, n_elements)
    # A block of stations at a time: the formulas' temporaries stay small (at 10⁶ elements
    # whole-array temporaries would double the solve's peak memory).
    for block in range(0, len(mesh.interior), STATION_BLOCK):  # a loop over blocks of stations
        inside = mesh.interior[block : block + STATION_BLOCK]
        element = mesh.station_element[inside]
        u = geometry.station_u[:, inside]
        moments = geometry.interior_moments[:, block : block + STATION_BLOCK]
        intensity = all_intensity[..., element]
        slope = all_slope[..., element]
        element_start = start[..., element]
        torque[..., inside] = element_start - intensity * u - slope * u**2
        angle[..., inside] = (
            angle_a[..., element]
            + element_start * moments[..., 0]
            - intensity * moments[..., 1]
            - slope * moments[..., 2]
        )


def fixed_reactions(
    mesh: Mesh, nodes: IntArray, start: FloatArray, end: FloatArray, external: FloatArray
) -> FloatArray:
    """Torque of fixed supports: the jump of internal torque at their nodes less the known ones.

    T(x⁻) − T(x⁺) equals the sum of the concentrated external torques at x.

    Parameters
    ----------
    mesh
        The mesh.
    nodes
        (n_fixed,) nodes of the fixed supports.
    start, end
        (n_cases, n_variants, n_elements) T(0⁺) and T(L⁻) of each element (N·m).
    external
        (n_cases, n_variants, n_nodes) known concentrated torques (N·m).

    Returns
    -------
    numpy.ndarray
        (n_cases, n_variants, n_fixed) reactions (N·m).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8 (reactions of statically
       indeterminate members from equilibrium once the twist is known).
    """
    shaft = np.searchsorted(mesh.shaft_node_start, nodes, side="right") - 1
    has_left = nodes > mesh.shaft_node_start[shaft]
    has_right = nodes < mesh.shaft_node_start[shaft + 1] - 1
    left = np.where(has_left, end[..., np.maximum(nodes - 1 - shaft, 0)], 0.0)
    right_element = np.minimum(nodes - shaft, start.shape[-1] - 1)
    right = np.where(has_right, start[..., right_element], 0.0)
    return left - right - external[..., nodes]


def combine(values: FloatArray, factors: FloatArray) -> FloatArray:
    """Load cases then their factored combinations, stacked on the first axis.

    Linear elasticity: a combination's effects are the factored sum of its cases' (superposition,
    Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.5; section from memory).
    """
    if not len(factors):
        return values
    combined = np.tensordot(factors, values, axes=(1, 0))
    return np.concatenate([values, combined])


def combine_in_place(results: FloatArray, factors: FloatArray) -> None:
    """Fill rows n_cases… of ``results`` with the combinations of its first n_cases rows."""
    n_cases = factors.shape[1]
    if len(factors):
        results[n_cases:] = np.tensordot(factors, results[:n_cases], axes=(1, 0))


__all__ = [
    "ElementLoads",
    "combine",
    "combine_in_place",
    "fixed_reactions",
    "start_torques",
    "station_values",
]
