"""A single thin-walled member in restrained (non-uniform, Vlasov) torsion: solve and recover.

The member is a chain of exact warping elements (:mod:`workbench.solver.warping_element`) joining
nodes at ``node_x``; each node may hold its rotation θ (a torsional support) and/or its rate of
twist θ′ (warping restrained: θ′ = 0 makes the cross-section's warping vanish there). All load
cases share one banded factorization. Because the elements are exact, the nodal values do not
depend on the mesh, and the recovery inside an element is exact too.

Sign conventions (design §2, right-hand rule about +x): applied torques, reactions and θ are
positive along +x; the internal torque on the face whose outward normal is +x is
T = G·J·θ′ − E·Cw·θ‴ (Saint-Venant part G·J·θ′ plus warping part −E·Cw·θ‴); the bimoment is
B = −E·Cw·θ″ (so the warping normal stress is σw = E·Wn·θ″ = −B·Wn/Cw). A torque reaction is the
torque the support exerts on the member; a bimoment reaction is the generalised force conjugate
to θ′ that a warping restraint exerts (−B at the member's start, +B at its end: (−T, B) and
(T, −B) are the element's end forces conjugate to (θ, θ′) at its start and end).

Where E·Cw = 0 on both sides of a node (a circular or closed part), θ′ has no stiffness there: it
is condensed out (held at 0 in the system, recovered afterwards as T/(G·J)), so the system stays
regular.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V.
.. [2] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (assembly, prescribed displacements, static condensation) and §8.5.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.case.declaration import POSITION_TOLERANCE
from workbench.case.errors import InputError, MechanismError
from workbench.solver.assembly import BandFactor, add_diagonal, assemble_band, prescribe
from workbench.solver.sections import FloatArray
from workbench.solver.warping_element import WarpingElements


@dataclass(frozen=True)
class WarpingMember:
    """One prismatic-by-parts thin-walled member with its supports.

    Parameters
    ----------
    node_x
        (n + 1,) node positions (m), strictly increasing.
    torsion
        (n,) G·J of each element (N·m²), > 0.
    warping
        (n,) E·Cw of each element (N·m⁴), ≥ 0.
    rotation_held
        (n + 1,) True where the node's rotation is held at 0 (a torsional support).
    warping_held
        (n + 1,) True where the node's warping is restrained (θ′ = 0).
    """

    node_x: FloatArray
    torsion: FloatArray
    warping: FloatArray
    rotation_held: np.ndarray
    warping_held: np.ndarray

    def __post_init__(self) -> None:
        n = len(self.node_x) - 1
        checks = (
            ("node_x", n >= 1 and bool(np.all(np.diff(self.node_x) > 0)), "strictly increasing"),
            ("torsion", self.torsion.shape == (n,) and bool(np.all(self.torsion > 0)), "> 0"),
            ("warping", self.warping.shape == (n,) and bool(np.all(self.warping >= 0)), "≥ 0"),
            ("rotation_held", self.rotation_held.shape == (n + 1,), "one flag per node"),
            ("warping_held", self.warping_held.shape == (n + 1,), "one flag per node"),
        )
        for field, good, rule in checks:
            if not good:
                msg = f"must be {rule} (finite, one value per element or node)"
                raise InputError(field, msg)

    @property
    def elements(self) -> WarpingElements:
        """The member's exact elements."""
        return WarpingElements(np.diff(self.node_x), self.torsion, self.warping)


@dataclass(frozen=True)
class WarpingSolution:
    """Nodal results of every load case.

    Parameters
    ----------
    member
        The solved member.
    rotation
        (n_cases, n + 1) θ at the nodes (rad).
    rate
        (n_cases, n + 1) θ′ at the nodes (rad/m); T/(G·J) where θ′ was condensed out.
    end_forces
        (n_cases, n, 4) element end forces (−T(0), B(0), T(L), −B(L)) (N·m, N·m²).
    torque_reaction
        (n_cases, n + 1) torque of the supports (N·m); 0 where the rotation is free.
    bimoment_reaction
        (n_cases, n + 1) generalised force of the warping restraints (N·m²); 0 where free.
    start, end
        (n_cases, n) distributed torque at each element's ends (N·m/m).
    """

    member: WarpingMember
    rotation: FloatArray
    rate: FloatArray
    end_forces: FloatArray
    torque_reaction: FloatArray
    bimoment_reaction: FloatArray
    start: FloatArray
    end: FloatArray


def _node_sum(element_start: FloatArray, element_end: FloatArray) -> FloatArray:
    """(n_cases, n + 1) sums of element-end quantities at the nodes."""
    shape = element_start.shape
    total = np.zeros((*shape[:-1], shape[-1] + 1))
    total[..., :-1] += element_start
    total[..., 1:] += element_end
    return total


def warping_nodes(member: WarpingMember) -> np.ndarray:
    """(n + 1,) True at nodes beside an element that warps (E·Cw > 0): their θ′ is solved for."""
    warps = (member.warping > 0).astype(float)
    return _node_sum(warps, warps) > 0


def solve_member(
    member: WarpingMember,
    nodal_torque: FloatArray,
    start: FloatArray | None = None,
    end: FloatArray | None = None,
    nodal_bimoment: FloatArray | None = None,
) -> WarpingSolution:
    """Solve every load case of one member in restrained torsion, one factorization.

    Parameters
    ----------
    member
        The member and its supports.
    nodal_torque
        (n_cases, n + 1) torques applied at the nodes (N·m).
    start, end
        (n_cases, n) distributed torque at each element's start and end (N·m/m), linear between;
        zero when omitted.
    nodal_bimoment
        (n_cases, n + 1) generalised loads conjugate to θ′ at the nodes (N·m²), e.g. the exact
        consistent loads of a torque inside an element
        (:meth:`~workbench.solver.warping_element.WarpingElements.point_loads`); zero when
        omitted.

    Returns
    -------
    WarpingSolution
        Nodal rotations, rates of twist, element end forces and reactions.

    Raises
    ------
    MechanismError
        When the supports leave the member free to spin.

    Examples
    --------
    >>> import numpy as np
    >>> member = WarpingMember(np.array([0.0, 2.0]), np.array([1e5]), np.array([0.0]),
    ...                        np.array([True, False]), np.array([False, False]))
    >>> float(solve_member(member, np.array([[0.0, 100.0]])).rotation[0, 1])
    0.002

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2-3.
    """
    n = len(member.node_x) - 1
    nodal_torque = np.atleast_2d(np.asarray(nodal_torque, dtype=float))
    n_cases = nodal_torque.shape[0]
    if nodal_torque.shape != (n_cases, n + 1) or not np.all(np.isfinite(nodal_torque)):
        raise InputError("nodal_torque", "must be finite, one value per case and node")
    zeros = np.zeros((n_cases, n))
    start = zeros if start is None else np.broadcast_to(start, (n_cases, n))
    end = zeros if end is None else np.broadcast_to(end, (n_cases, n))
    if not (np.all(np.isfinite(start)) and np.all(np.isfinite(end))):
        raise InputError("distributed", "must be finite, one value per case and element")
    if not np.any(member.rotation_held):
        raise MechanismError("supports", "no support holds the member's rotation: it spins")

    elements = member.elements
    element_loads = elements.distributed_loads(start, end)  # (n_cases, n, 4)
    rhs = np.zeros((n_cases, 1, 2 * (n + 1)))
    rhs[:, 0, 0::2] = nodal_torque + _node_sum(element_loads[..., 0], element_loads[..., 2])
    rhs[:, 0, 1::2] = _node_sum(element_loads[..., 1], element_loads[..., 3])
    if nodal_bimoment is not None:
        nodal_bimoment = np.broadcast_to(nodal_bimoment, (n_cases, n + 1))
        if not np.all(np.isfinite(nodal_bimoment)):
            raise InputError("nodal_bimoment", "must be finite, one value per case and node")
        rhs[:, 0, 1::2] += nodal_bimoment

    band = assemble_band(elements, np.array([0, n + 1]), 1)
    # θ′ without stiffness (E·Cw = 0 on both sides): condensed out, held at 0 below.
    warps = warping_nodes(member)
    silent = np.flatnonzero(~warps)
    add_diagonal(band, 2 * silent + 1, np.ones((1, len(silent))))
    held = np.concatenate(
        [
            2 * np.flatnonzero(member.rotation_held),
            2 * np.flatnonzero(member.warping_held | ~warps) + 1,
        ]
    )
    prescribe(band, rhs, held, np.zeros((1, len(held))))
    factor = BandFactor(band)
    if len(factor.zero_pivots):
        raise MechanismError("supports", "the supports leave the member free to spin")
    dofs = factor.solve(np.asfortranarray(rhs[:, 0, :].T)).T  # (n_cases, 2(n + 1))

    rotation, rate = dofs[:, 0::2], dofs[:, 1::2]
    nodal = np.stack([rotation[:, :-1], rate[:, :-1], rotation[:, 1:], rate[:, 1:]], axis=-1)
    end_forces = elements.end_forces(nodal) - element_loads
    torque_balance = _node_sum(end_forces[..., 0], end_forces[..., 2]) - nodal_torque
    bimoment_balance = _node_sum(end_forces[..., 1], end_forces[..., 3])
    if nodal_bimoment is not None:
        bimoment_balance -= nodal_bimoment
    torque_reaction = np.where(member.rotation_held, torque_balance, 0.0)
    bimoment_reaction = np.where(member.warping_held & warps, bimoment_balance, 0.0)
    # Condensed θ′: the Saint-Venant value T/(G·J) of the element beside the node.
    left_torque = np.concatenate([-end_forces[:, :1, 0], end_forces[..., 2]], axis=1)
    torsion_beside = np.concatenate([member.torsion[:1], member.torsion])
    rate = np.where(warps, rate, left_torque / torsion_beside)
    return WarpingSolution(
        member, rotation, rate, end_forces, torque_reaction, bimoment_reaction, start, end
    )


@dataclass(frozen=True)
class WarpingStations:
    """The state of the member at stations, for every load case.

    Every array is (n_cases, n_stations). ``rotation`` θ (rad), ``rate`` θ′ (rad/m),
    ``second`` θ″ (rad/m²), ``third`` θ‴ (rad/m³), ``saint_venant_torque`` G·J·θ′ (N·m),
    ``warping_torque`` −E·Cw·θ‴ (N·m), ``torque`` their sum T (N·m), ``bimoment`` B = −E·Cw·θ″
    (N·m²). At a node the station belongs to the element that starts there (the last node to the
    last element); where E·Cw = 0, θ‴, the warping torque and the bimoment are 0.
    """

    x: FloatArray
    rotation: FloatArray
    rate: FloatArray
    second: FloatArray
    third: FloatArray
    saint_venant_torque: FloatArray
    warping_torque: FloatArray
    torque: FloatArray
    bimoment: FloatArray


def recover(solution: WarpingSolution, x: FloatArray) -> WarpingStations:
    """θ, its three derivatives, the two parts of the torque and the bimoment at stations.

    A station at ξ inside an element splits it into two exact sub-elements (lengths ξ and L − ξ,
    their own consistent loads); the station's (θ, θ′) follow from its equilibrium with the two
    element nodes held at their solved values (a 2×2 solve per station and case), and T and B
    from the end forces of the longer sub-element — exact, since the sub-elements are.

    Parameters
    ----------
    solution
        A solved member.
    x
        (n_stations,) positions along the member (m), within [node_x[0], node_x[-1]].

    Returns
    -------
    WarpingStations
        The state at the stations.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3 (static
       condensation of interior degrees of freedom).
    """
    member = solution.member
    node_x = member.node_x
    x = np.asarray(x, dtype=float)
    if not np.all((x >= node_x[0]) & (x <= node_x[-1])):
        raise InputError("x", "stations must lie on the member")
    element = np.clip(np.searchsorted(node_x, x, side="right") - 1, 0, len(node_x) - 2)
    total = node_x[element + 1] - node_x[element]
    first = np.stack([solution.rotation[:, element], _rate_dof(solution, element)], axis=-1)
    second = np.stack([solution.rotation[:, element + 1], _rate_dof(solution, element + 1)], -1)
    return element_states(
        x,
        total,
        np.clip(x - node_x[element], 0.0, total),
        member.torsion[element],
        member.warping[element],
        first,
        second,
        solution.start[:, element],
        solution.end[:, element],
    )


def element_states(
    x: FloatArray,
    total: FloatArray,
    offset: FloatArray,
    torsion: FloatArray,
    warping: FloatArray,
    first: FloatArray,
    second: FloatArray,
    start: FloatArray,
    end: FloatArray,
) -> WarpingStations:
    """The exact state at stations inside solved prismatic elements (see :func:`recover`).

    Parameters
    ----------
    x
        (n_stations,) the stations' positions (m), reported back.
    total, offset
        (n_stations,) length of each station's element and the station's distance from the
        element's start (m), 0 ≤ offset ≤ total.
    torsion, warping
        (n_stations,) the element's G·J (N·m²) and E·Cw (N·m⁴).
    first, second
        (n_cases, n_stations, 2) (θ, θ′) of the element's start and end node as the system
        holds them (rad, rad/m): θ′ = 0 where it was condensed out.
    start, end
        (n_cases, n_stations) distributed torque at the element's start and end (N·m/m).

    Returns
    -------
    WarpingStations
        The state at the stations.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3 (static
       condensation of interior degrees of freedom).
    """
    # A station on a node takes the node's values and the whole element's end forces (the
    # zero-length piece beside it is given the whole length too, and not used). Within
    # POSITION_TOLERANCE of the element's length a station is on the node: a sub-element that
    # short cannot be condensed (its stiffness, ~1/length³, swamps the digits of the solve).
    near = POSITION_TOLERANCE * total
    at_start, at_end = offset <= near, offset >= total - near
    left_length = np.where(at_start, total, offset)
    right_length = np.where(at_end, total, total - offset)
    left = WarpingElements(left_length, torsion, warping).regular_matrices()
    right = WarpingElements(right_length, torsion, warping).regular_matrices()

    middle = start + (end - start) * (offset / total)
    left_loads = WarpingElements(left_length, torsion, warping).distributed_loads(start, middle)
    right_loads = WarpingElements(right_length, torsion, warping).distributed_loads(middle, end)

    stiffness = left[:, 2:, 2:] + right[:, :2, :2]
    load = (
        left_loads[..., 2:]
        + right_loads[..., :2]
        - np.einsum("sij,csj->csi", left[:, 2:, :2], first)
        - np.einsum("sij,csj->csi", right[:, :2, 2:], second)
    )
    state = np.linalg.solve(stiffness[np.newaxis], load[..., np.newaxis])[..., 0]
    state = np.where(at_start[:, None], first, np.where(at_end[:, None], second, state))

    use_left = np.where(at_start, False, np.where(at_end, True, offset >= total - offset))
    left_forces = np.einsum("sij,csj->csi", left, np.concatenate([first, state], -1))
    right_forces = np.einsum("sij,csj->csi", right, np.concatenate([state, second], -1))
    left_forces -= left_loads
    right_forces -= right_loads
    torque = np.where(use_left, left_forces[..., 2], -right_forces[..., 0])
    bimoment = np.where(use_left, -left_forces[..., 3], right_forces[..., 1])

    free = warping == 0
    safe_warping = np.where(free, 1.0, warping)
    rotation = state[..., 0]
    rate = np.where(free, torque / torsion, state[..., 1])
    second_derivative = np.where(free, -middle / torsion, -bimoment / safe_warping)
    third = np.where(free, 0.0, (torsion * rate - torque) / safe_warping)
    saint_venant = torsion * rate
    return WarpingStations(
        x=x,
        rotation=rotation,
        rate=rate,
        second=second_derivative,
        third=third,
        saint_venant_torque=saint_venant,
        warping_torque=torque - saint_venant,
        torque=torque,
        bimoment=np.where(free, 0.0, bimoment),
    )


def _rate_dof(solution: WarpingSolution, node: np.ndarray) -> FloatArray:
    """θ′ as the system holds it: 0 where it was condensed out (E·Cw = 0 on both sides)."""
    warps = warping_nodes(solution.member)
    return np.where(warps[node], solution.rate[:, node], 0.0)
