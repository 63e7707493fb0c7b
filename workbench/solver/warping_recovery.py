"""Recovery of a restrained-warping solve: element torques by equilibrium, state at stations.

Both read the nodal (θ, θ′) of :mod:`workbench.solver.warping_statics` and its element end
forces (−T(0), B(0), T(L), −B(L)); neither solves anything global.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V.
.. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (T(x) from a free body).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.solver.recovery import ElementLoads
from workbench.solver.sections import FloatArray
from workbench.solver.warping_element import WarpingElements
from workbench.solver.warping_member import element_states

if TYPE_CHECKING:
    from workbench.solver.mesh import Mesh
    from workbench.solver.mesh_sizes import Geometry


def span_torques(
    mesh: Mesh,
    fixed_node: np.ndarray,
    external: FloatArray,
    resultant: FloatArray,
    estimate: FloatArray,
    stiffness: FloatArray,
) -> FloatArray:
    """T(0⁺) of every element (n_cases, 1, n_elements) by equilibrium along each shaft.

    T(x) is minus the external torques on [0, x) (design §2): exact from a shaft's start up to
    its first fixed support, and (as the torques on (x, L]) from its end back to the last one.
    Between two fixed supports one constant is unknown: it is taken from the end forces of the
    most flexible element of the span, whose torque k·Δθ loses the fewest digits — a load a
    hair from a support makes an element whose k·Δθ would lose them all.

    Parameters
    ----------
    fixed_node
        (n_nodes,) whether a fixed support holds the node.
    external
        (n_cases, 1, n_nodes) concentrated torques known at the nodes (N·m).
    resultant
        (n_cases, 1, n_elements) each element's distributed torque in all (N·m).
    estimate
        (n_cases, 1, n_elements) T(0⁺) from the element end forces (N·m).
    stiffness
        (n_elements,) each element's k₁₁ (N·m/rad).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (T(x) from a free body).
    """
    start = np.empty_like(estimate)
    node_start = mesh.shaft_node_start
    for number in range(len(node_start) - 1):  # a loop over shafts
        first, stop = int(node_start[number]), int(node_start[number + 1])
        elements = slice(first - number, stop - number - 1)
        loads, spread = external[..., first:stop], resultant[..., elements]
        before = np.zeros_like(spread)
        before[..., 1:] = np.cumsum(spread[..., :-1], axis=-1)
        from_left = -(np.cumsum(loads[..., :-1], axis=-1) + before)
        from_right = (
            np.cumsum(loads[..., :0:-1], axis=-1)[..., ::-1]
            + np.cumsum(spread[..., ::-1], axis=-1)[..., ::-1]
        )
        fixed = fixed_node[first:stop]
        span = np.cumsum(fixed[:-1])  # fixed nodes at or before each element's start
        last = int(fixed.sum())
        torque = np.where(span == 0, from_left, from_right)
        inner = np.flatnonzero((span > 0) & (span < last))
        if inner.size:
            # The most flexible element of each inner span (a run of ``inner``) gives the
            # span's constant: the first element of least stiffness in each run.
            flexible = stiffness[elements][inner]
            starts = np.concatenate([[0], np.flatnonzero(np.diff(span[inner])) + 1])
            counts = np.diff(np.append(starts, inner.size))
            least = np.repeat(np.minimum.reduceat(flexible, starts), counts)
            candidates = np.flatnonzero(flexible == least)
            chosen = inner[candidates[np.searchsorted(candidates, starts)]]
            constant = from_left[..., chosen] - estimate[..., elements][..., chosen]
            torque[..., inner] = from_left[..., inner] - np.repeat(constant, counts, axis=-1)
        start[..., elements] = torque
    return start


def station_states(
    mesh: Mesh,
    geometry: Geometry,
    elements: WarpingElements,
    loads: ElementLoads,
    node_angle: FloatArray,
    node_rate: FloatArray,
    warps: np.ndarray,
    end_forces: FloatArray,
    torque: FloatArray,
    angle: FloatArray,
) -> tuple[FloatArray, ...]:
    """(θ, θ′, θ″, θ‴, G·J·θ′, −E·Cw·θ‴, B), each (n_cases, 1, n_stations).

    ``angle`` is written in place (the one-rotation recovery's, the solve's own array).
    Stations of Saint-Venant elements keep θ and T of the one-rotation recovery, with
    θ′ = T/(G·K); stations of warping elements take the exact state of
    :func:`~workbench.solver.warping_member.element_states`.
    """
    element = mesh.station_element
    rate = torque / geometry.station_rigidity[None]
    second, third, bimoment = (np.zeros(torque.shape) for _ in range(3))
    warping = elements.warping[element]
    held_rate = np.where(warps, node_rate, 0.0)
    u = geometry.station_u[0]
    # Stations on an element's ends: the nodal θ′ and the end forces' bimoment, B(0) = f₂ and
    # B(L) = −f₄ (the end forces are (−T(0), B(0), T(L), −B(L))); element by element.
    warping_elements = np.flatnonzero(elements.warping > 0.0)
    if warping_elements.size:
        first_station = mesh.element_station_start[warping_elements]
        last_station = mesh.element_station_start[warping_elements + 1] - 1
        node_a = mesh.element_start_node[warping_elements]
        rate[:, 0, first_station] = held_rate[:, 0, node_a]
        rate[:, 0, last_station] = held_rate[:, 0, node_a + 1]
        bimoment[:, 0, first_station] = end_forces[:, warping_elements, 1]
        bimoment[:, 0, last_station] = -end_forces[:, warping_elements, 3]
    inside = np.flatnonzero((warping > 0.0) & (u > 0.0) & ~mesh.station_is_end)
    if inside.size:
        on = element[inside]
        node_a = mesh.element_start_node[on]
        first = np.stack([node_angle[:, 0, node_a], held_rate[:, 0, node_a]], axis=-1)
        last = np.stack([node_angle[:, 0, node_a + 1], held_rate[:, 0, node_a + 1]], axis=-1)
        intensity_start = np.zeros((torque.shape[0], len(elements.length)))
        intensity_end = np.zeros_like(intensity_start)
        intensity_start[:, loads.elements] = loads.start[:, 0]
        intensity_end[:, loads.elements] = loads.end[:, 0]
        state = element_states(
            mesh.station_x[inside],
            elements.length[on],
            u[inside],
            elements.torsion[on],
            elements.warping[on],
            first,
            last,
            intensity_start[:, on],
            intensity_end[:, on],
        )
        angle[:, 0, inside] = state.rotation
        rate[:, 0, inside] = state.rate
        bimoment[:, 0, inside] = state.bimoment
    warps_here = warping > 0.0
    # Every station on a warping element (a long I member): whole arrays, no gathers.
    chosen: Any = slice(None) if warps_here.all() else np.flatnonzero(warps_here)
    if warps_here.any():
        rigidity = warping[chosen]
        second[:, 0, chosen] = -bimoment[:, 0, chosen] / rigidity
        # T = G·J·θ′ − E·Cw·θ‴ gives θ‴ from the torque by equilibrium and θ′.
        torsion = elements.torsion[element[chosen]]
        third[:, 0, chosen] = (torsion * rate[:, 0, chosen] - torque[:, 0, chosen]) / rigidity
    saint_venant = rate * geometry.station_rigidity[None]
    return angle, rate, second, third, saint_venant, torque - saint_venant, bimoment


__all__ = ["span_torques", "station_states"]
