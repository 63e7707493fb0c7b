"""The static solution of a system where some segment warps: θ and θ′ at every node.

:func:`solve_warping_table` is the path :func:`~workbench.solver.statics.solve_table` takes when
a segment's warping rigidity E·Cw is positive. Every element is an exact restrained-warping
element (:class:`~workbench.solver.warping_element.WarpingElements`); where E·Cw = 0 (circular,
tapered, layered or closed parts) it is the exact Saint-Venant element on θ with θ′ taking no
part, and a node whose neighbours all have E·Cw = 0 has its θ′ held at 0 (condensed out), so the
system stays regular. Shafts, spring and fixed supports, prescribed rotations and gear meshes
(constraints on θ only) are those of the one-rotation path; a support with ``"warping":
"restrained"`` also holds θ′ = 0. One factorization (banded LAPACK, or SuperLU with gears)
solves every load case.

Recovery is exact: the internal torque by equilibrium of each element's end forces, the state
inside a warping element from its two exact sub-elements (:func:`~workbench.solver.
warping_member.element_states`), θ inside a Saint-Venant element from ∫T/(G·K) as on the
one-rotation path. Results add, at every station, θ′, θ″, θ‴, the Saint-Venant torque G·J·θ′,
the warping torque −E·Cw·θ‴ and the bimoment B = −E·Cw·θ″ (design §2); where a section does
not warp, θ′ = T/(G·K) and θ″, θ‴, the warping torque and B are reported as 0.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V.
.. [2] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (assembly, prescribed displacements, condensation), §8.5 (the element
   with θ and θ′ per node) and ch. 12 (constraints by Lagrange multipliers).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Protocol

import numpy as np

from workbench.case.errors import InputError, MechanismError
from workbench.solver.assembly import (
    BandFactor,
    SparseFactor,
    add_diagonal,
    assemble_band,
    bordered,
    prescribe,
    split_constrained,
    with_constraints,
)
from workbench.solver.columns import WARPING_RESTRAINED, CaseTable, IntArray
from workbench.solver.elements import SaintVenantElements
from workbench.solver.recovery import ElementLoads, combine, fixed_reactions, station_values
from workbench.solver.sections import FloatArray
from workbench.solver.soundness import Soundness, rcond_limit, shaft_residuals
from workbench.solver.warping_element import WarpingElements
from workbench.solver.warping_recovery import span_torques, station_states

if TYPE_CHECKING:
    from workbench.solver.mesh import Mesh
    from workbench.solver.mesh_sizes import Geometry


class SupportColumns(Protocol):
    """The supports on the mesh as the static solve holds them (fixed held, springs).

    ``fixed_rotation`` (1, n_fixed) (rad), ``spring_stiffness`` (1, n_springs) (N·m/rad),
    ``spring_rotation`` (1, n_springs) (rad).
    """

    @property
    def fixed(self) -> IntArray: ...
    @property
    def fixed_nodes(self) -> IntArray: ...
    @property
    def fixed_rotation(self) -> FloatArray: ...
    @property
    def springs(self) -> IntArray: ...
    @property
    def spring_nodes(self) -> IntArray: ...
    @property
    def spring_stiffness(self) -> FloatArray: ...
    @property
    def spring_rotation(self) -> FloatArray: ...


@dataclass(frozen=True)
class WarpingStationValues:
    """The restrained-torsion state at every station: arrays (n_results, n_variants, n_stations).

    ``rate`` θ′ (rad/m), ``second`` θ″ (rad/m²), ``third`` θ‴ (rad/m³), ``saint_venant_torque``
    G·J·θ′ (N·m), ``warping_torque`` −E·Cw·θ‴ (N·m), ``bimoment`` B = −E·Cw·θ″ (N·m²); and
    ``bimoment_reactions`` (n_results, n_variants, n_supports) the generalised force of each
    warping restraint (N·m², 0 where a support leaves warping free).
    """

    rate: FloatArray
    second: FloatArray
    third: FloatArray
    saint_venant_torque: FloatArray
    warping_torque: FloatArray
    bimoment: FloatArray
    bimoment_reactions: FloatArray


#: The arrays of :class:`WarpingStationValues` at stations, in order.
STATION_ARRAYS = ("rate", "second", "third", "saint_venant_torque", "warping_torque", "bimoment")


@dataclass(frozen=True)
class WarpingSolve:
    """What the restrained-torsion solve hands back to :func:`~workbench.solver.statics.solve_table`.

    Arrays have the load cases (not yet combined) first, one variant: ``node_angle``
    (n_cases, 1, n_nodes) (rad); ``reactions`` (n_cases, 1, n_supports) (N·m); ``gear_torques``
    (n_cases, 1, n_gears, 2) (N·m); ``torque``, ``angle`` (n_cases, 1, n_stations);
    ``warping`` the station values, combined.
    """

    node_angle: FloatArray
    reactions: FloatArray
    gear_torques: FloatArray
    torque: FloatArray
    angle: FloatArray
    saint_venant_torque: FloatArray
    warping: WarpingStationValues
    factor: BandFactor | SparseFactor
    soundness: Soundness


#: A segment whose λ·L exceeds this warps in a zone of 1/λ at its ends, 10⁻⁸ of its length: its
#: E·Cw is taken as 0 (the difference is of that order), since θ′ would otherwise be left with
#: a stiffness ~1/(λL) of the others' and the system as ill-conditioned as a mechanism.
NEGLIGIBLE_WARPING_MU = 1e8


def _elements(table: CaseTable, mesh: Mesh, geometry: Geometry) -> WarpingElements:
    """Every element of the mesh as a restrained-warping element (Saint-Venant where E·Cw = 0).

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., ch. V (restraint decays as e^(−λx)).
    """
    rigidity = table.segments.warping_rigidity
    assert rigidity is not None
    row = mesh.element_segment_row
    warping = rigidity[0, row]
    saint_venant = SaintVenantElements(geometry.flexibility).stiffness[0]
    length = geometry.element_length[0]
    # A warping part is prismatic and single-layered: its G·J is k·L exactly.
    torsion = saint_venant * length
    with np.errstate(divide="ignore", over="ignore"):
        segment_mu = table.segments.length[0, row] * np.sqrt(torsion / warping)
    warping = np.where(segment_mu > NEGLIGIBLE_WARPING_MU, 0.0, warping)
    return WarpingElements(length, torsion, warping, saint_venant)


def _consistent_loads(
    elements: WarpingElements, loads: ElementLoads, geometry: Geometry
) -> FloatArray:
    """(n_cases, n_loaded, 4) exact consistent loads of the distributed torques on θ and θ′."""
    chosen = loads.elements
    start, end = loads.start[:, 0], loads.end[:, 0]
    part = WarpingElements(
        elements.length[chosen], elements.torsion[chosen], elements.warping[chosen]
    )
    exact = part.distributed_loads(start, end)
    # Where E·Cw = 0 the Saint-Venant element's loads are exact for any taper.
    plain = elements.warping[chosen] == 0.0
    if plain.any():
        start_load, end_load = SaintVenantElements(geometry.flexibility).consistent_loads(
            chosen, loads.length, np.stack([loads.start, loads.end], axis=-1)
        )
        exact[..., 0] = np.where(plain, start_load[:, 0], exact[..., 0])
        exact[..., 2] = np.where(plain, end_load[:, 0], exact[..., 2])
    return exact


def _warping_nodes(mesh: Mesh, warping: FloatArray) -> np.ndarray:
    """(n_nodes,) whether an element beside the node warps: its θ′ is solved for."""
    warps = np.zeros(int(mesh.shaft_node_start[-1]), dtype=bool)
    start = mesh.element_start_node
    warps[start[warping > 0.0]] = True
    warps[start[warping > 0.0] + 1] = True
    return warps


def solve_warping_table(
    table: CaseTable,
    mesh: Mesh,
    geometry: Geometry,
    supports: SupportColumns,
    loads: ElementLoads,
    point: FloatArray,
    method: str,
) -> WarpingSolve:
    """Solve every load case of a system where some segment warps.

    Parameters
    ----------
    table, mesh, geometry
        The system, its mesh and the mesh's sizes (one variant).
    supports
        The supports on the mesh (fixed held, springs on the diagonal).
    loads
        The distributed torques on the loaded elements.
    point
        (n_cases, 1, n_nodes) point torques at the nodes (N·m).
    method
        ``"auto"`` or ``"band"``: banded LAPACK without gears; ``"sparse"``: SuperLU.

    Raises
    ------
    InputError
        For a batch of variants (restrained warping is solved one case at a time), gears held
        at both ends, or ``method="band"`` with gears.
    MechanismError
        When a pivot vanishes: part of the system is free to spin.
    """
    if geometry.n_variants > 1 or table.n_variants > 1:
        msg = "a case whose sections warp is solved one variant at a time, not as a batch"
        raise InputError("shafts", msg)
    elements = _elements(table, mesh, geometry)
    n_cases, n_nodes = table.n_cases, int(mesh.shaft_node_start[-1])
    start_node = mesh.element_start_node
    # The dofs (θ₁, θ′₁, θ₂, θ′₂) of every element; on one shaft, strided slices (no gathers).
    n_elements = len(start_node)
    element_dofs: list[Any] = [
        slice(column, column + 2 * n_elements, 2)
        if len(mesh.shaft_node_start) == 2
        else 2 * start_node + column
        for column in range(4)
    ]
    rhs = np.zeros((n_cases, 1, 2 * n_nodes))
    rhs[:, 0, 0::2] = point[:, 0]
    element_loads = np.zeros((n_cases, len(start_node), 4))
    if len(loads.elements):
        element_loads[:, loads.elements] = _consistent_loads(elements, loads, geometry)
        # Each element starts at a node of its own: no index repeats within one column.
        for column in range(4):  # the element's four degrees of freedom
            rhs[:, 0, element_dofs[column]] += element_loads[..., column]
    spring_dofs = 2 * supports.spring_nodes
    rhs[:, 0, spring_dofs] += supports.spring_stiffness * supports.spring_rotation

    band = assemble_band(elements, mesh.shaft_node_start, 1)
    add_diagonal(band, spring_dofs, supports.spring_stiffness)
    warps = _warping_nodes(mesh, elements.warping)
    silent = np.flatnonzero(~warps)
    add_diagonal(band, 2 * silent + 1, np.ones((1, len(silent))))
    support_node = mesh.nodes_of(table.support_shaft, table.support_x)
    restrained = support_node[table.support_warping == WARPING_RESTRAINED]
    held_rates = np.union1d(2 * silent + 1, 2 * restrained + 1)
    held = np.concatenate([2 * supports.fixed_nodes, held_rates])
    values = np.concatenate([supports.fixed_rotation, np.zeros((1, len(held_rates)))], axis=1)
    loaded = rhs.copy()  # the loads before any degree of freedom is held
    prescribe(band, rhs, held, values)
    scale, scaled_norm = _equilibrated_norm(band)

    dofs, multipliers, gear_nodes, factor = _factor_and_solve(
        table, mesh, band, rhs, supports, method
    )
    if isinstance(factor, BandFactor) and len(factor.zero_pivots):
        raise MechanismError("supports", "the supports leave part of the system free to spin")
    dofs[..., held] = values
    # One step of refinement, its residual summed element by element (as on the one-rotation
    # path): the torques of stiff short elements then keep their own accuracy.
    residual = _residual(
        loaded, elements, element_dofs, dofs, supports, multipliers, gear_nodes, table
    )
    residual[..., held] = 0.0
    dofs, multipliers = _refined(factor, residual, dofs, multipliers, gear_nodes, table)
    dofs[..., held] = values
    node_angle, node_rate = dofs[..., 0::2], dofs[..., 1::2]

    # End forces (−T(0), B(0), T(L), −B(L)) of every element, less its consistent loads.
    nodal = np.stack([dofs[:, 0, element_dofs[column]] for column in range(4)], axis=-1)
    end_forces = elements.end_forces(nodal) - element_loads

    gear_torques = -multipliers[..., None] * table.gear_coefficient
    external = point.copy()
    at_gears: Any = (slice(None), slice(None), gear_nodes.ravel())
    np.add.at(external, at_gears, gear_torques.reshape(n_cases, 1, -1))
    spring_reactions = -supports.spring_stiffness * (
        node_angle[..., supports.spring_nodes] - supports.spring_rotation
    )
    at_springs: Any = (slice(None), slice(None), supports.spring_nodes)
    np.add.at(external, at_springs, spring_reactions)
    resultant = (element_loads[..., 0] + element_loads[..., 2])[:, None]
    fixed_node = np.zeros(n_nodes, dtype=bool)
    fixed_node[supports.fixed_nodes] = True
    start = span_torques(
        mesh, fixed_node, external, resultant, -end_forces[:, None, :, 0], elements.entries[0]
    )
    end = start - resultant
    reactions = np.zeros((n_cases, 1, len(table.support_x)))
    reactions[..., supports.springs] = spring_reactions
    reactions[..., supports.fixed] = fixed_reactions(
        mesh, supports.fixed_nodes, start, end, external
    )
    bimoment_balance = np.zeros((n_cases, n_nodes))
    bimoment_balance[:, start_node] += end_forces[..., 1]  # a node of its own per element
    bimoment_balance[:, start_node + 1] += end_forces[..., 3]
    at_restrained = np.zeros((n_cases, 1, len(table.support_x)))
    stated = table.support_warping == WARPING_RESTRAINED
    at_restrained[:, 0, stated] = bimoment_balance[:, support_node[stated]]

    n_stations = len(mesh.station_element)
    torque = np.empty((n_cases, 1, n_stations))
    angle = np.empty_like(torque)
    station_values(mesh, geometry, start, end, node_angle, loads, torque, angle)
    station = station_states(
        mesh, geometry, elements, loads, node_angle, node_rate, warps, end_forces, torque, angle
    )
    factors = table.combination_factors
    _, rate, second, third, saint_venant, warping_torque, bimoment = station
    warping = WarpingStationValues(
        rate=combine(rate, factors),
        second=combine(second, factors),
        third=combine(third, factors),
        saint_venant_torque=combine(saint_venant, factors),
        warping_torque=combine(warping_torque, factors),
        bimoment=combine(bimoment, factors),
        bimoment_reactions=combine(at_restrained, factors),
    )
    soundness = _soundness(table, factor, elements, reactions, gear_torques, scale, scaled_norm)
    return WarpingSolve(
        node_angle=node_angle,
        reactions=reactions,
        gear_torques=gear_torques,
        torque=torque,
        angle=station[0],
        saint_venant_torque=station[4],
        warping=warping,
        factor=factor,
        soundness=soundness,
    )


def _equilibrated_norm(band: Any) -> tuple[FloatArray, float]:
    """The scale s = 1/√diag(K) (n_dofs,) and ‖D·K·D‖₁ with D = diag(s), K unchanged.

    The condition that tells a near mechanism is that of D·K·D, K scaled to a unit diagonal:
    the entries of a short warping element grow as E·Cw/L³ against θ and E·Cw/L against θ′,
    so a load a hair from a support makes K's own condition number that ratio cubed, though
    the solution keeps its accuracy (one step of refinement). K itself is factored unscaled.

    References
    ----------
    .. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
       §7.3 (a symmetric positive definite matrix scaled to a unit diagonal is within a factor
       n of its best diagonal scaling, van der Sluis) (section from memory).
    """
    values, diagonal_row = band.values, band.diagonal_row
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = 1.0 / np.sqrt(values[diagonal_row])
    scale[~(np.isfinite(scale) & (scale > 0.0))] = 1.0
    size = len(scale)
    sums = np.zeros(size)
    for row in range(band.half_width, values.shape[0]):  # a loop over the band's diagonals
        offset = row - diagonal_row  # values[row, j] is K[j + offset, j]
        low, high = max(0, -offset), min(size, size - offset)
        part = np.abs(values[row, low:high])
        part *= scale[low + offset : high + offset]
        sums[low:high] += part
    return scale, float(np.max(sums * scale))


def _residual(
    loaded: FloatArray,
    elements: WarpingElements,
    element_dofs: list[Any],
    dofs: FloatArray,
    supports: SupportColumns,
    multipliers: FloatArray,
    gear_nodes: IntArray,
    table: CaseTable,
) -> FloatArray:
    """The residual f − K·u − Cᵀ·λ (n_cases, 1, n_dofs), K·u summed element by element."""
    nodal = np.stack([dofs[:, 0, element_dofs[column]] for column in range(4)], axis=-1)
    forces = elements.end_forces(nodal)
    residual = loaded.copy()
    # Each element starts at a node of its own: no index repeats within one column.
    for column in range(4):  # the element's four degrees of freedom
        residual[:, 0, element_dofs[column]] -= forces[..., column]
    spring_dofs = 2 * supports.spring_nodes
    residual[..., spring_dofs] -= supports.spring_stiffness * dofs[..., spring_dofs]
    if len(gear_nodes):
        gears: Any = (slice(None), slice(None), 2 * gear_nodes.ravel())
        terms = multipliers[..., None] * table.gear_coefficient
        np.subtract.at(residual, gears, terms.reshape(len(residual), 1, -1))
    return residual


def _refined(
    factor: BandFactor | SparseFactor,
    residual: FloatArray,
    dofs: FloatArray,
    multipliers: FloatArray,
    gear_nodes: IntArray,
    table: CaseTable,
) -> tuple[FloatArray, FloatArray]:
    """(θ, θ′) and multipliers after one step of iterative refinement.

    References
    ----------
    .. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
       ch. 12 (iterative refinement).
    """
    n_dofs = dofs.shape[-1]
    if isinstance(factor, BandFactor):
        change = factor.solve(np.asfortranarray(residual[:, 0].T)).T[:, None]
        return dofs + change, multipliers
    angles = dofs[..., 2 * gear_nodes]
    constraint = -(table.gear_coefficient * angles).sum(axis=-1)
    change = factor.solve_plain(bordered(residual, constraint))
    dof_change, multiplier_change = split_constrained(change, 1, n_dofs)
    return dofs + dof_change, multipliers + multiplier_change


def _factor_and_solve(
    table: CaseTable,
    mesh: Mesh,
    band: Any,
    rhs: FloatArray,
    supports: SupportColumns,
    method: str,
) -> tuple[FloatArray, FloatArray, IntArray, BandFactor | SparseFactor]:
    """(θ, θ′) of every node and case, mesh multipliers, gear nodes and the factor.

    Gears constrain the rotations only: c_a·θ_a + c_b·θ_b = 0 on the θ rows.
    """
    n_cases, _, n_dofs = rhs.shape
    n_gears = len(table.gear_x)
    if n_gears and method == "band":
        msg = "gear meshes need the sparse solver: a banded system holds no constraints"
        raise InputError("method", msg)
    if not n_gears and method != "sparse":
        factor = BandFactor(band)
        solution = factor.solve(np.asfortranarray(rhs[:, 0].T)).T[:, None]
        return solution, np.zeros((n_cases, 1, 0)), np.zeros((0, 2), dtype=np.intp), factor
    gear_nodes = mesh.nodes_of(table.gear_shaft.ravel(), table.gear_x.ravel()).reshape(-1, 2)
    known = np.full((1, n_gears, 2), np.nan)
    for position, node in enumerate(supports.fixed_nodes):  # a loop over fixed supports
        known[:, gear_nodes == node] = supports.fixed_rotation[:, position : position + 1]
    both = np.flatnonzero(np.all(~np.isnan(known[0]), axis=1))
    if len(both):
        msg = "both gears sit at fixed supports: the mesh torque is undefined"
        raise InputError(f"gears[{int(both[0])}]", msg)
    sparse, full_rhs = with_constraints(band, rhs, 2 * gear_nodes, table.gear_coefficient, known)
    dofs, multipliers = split_constrained(sparse.solve(full_rhs), 1, n_dofs)
    return dofs, multipliers, gear_nodes, sparse


def _soundness(
    table: CaseTable,
    factor: BandFactor | SparseFactor,
    elements: WarpingElements,
    reactions: FloatArray,
    gear_torques: FloatArray,
    scale: FloatArray,
    scaled_norm: float,
) -> Soundness:
    """The factor's condition estimate and each shaft's equilibrium.

    Not an M-matrix here (θ′ couples with both signs): a banded factor's ‖A⁻¹‖₁ is estimated from
    one solve (:func:`_inverse_norm`), a sparse one's by Hager's method; the equilibrium of each shaft after the refinement is the check that catches a near
    mechanism's rigid rotation drowning its twists.
    """
    if isinstance(factor, BandFactor):
        with np.errstate(divide="ignore", over="ignore"):
            rcond = np.array([1.0 / (scaled_norm * _inverse_norm(factor, scale))])
        rcond[~np.isfinite(rcond)] = 0.0
    else:
        rcond = factor.block_rcond(1)
    residual, tolerance = shaft_residuals(
        table,
        (table.load_end - table.load_start)[None],
        elements.entries[0][None],
        reactions,
        gear_torques,
    )
    return Soundness(rcond, rcond_limit(factor.order), factor.order, residual, tolerance)


def _inverse_norm(factor: BandFactor, scale: FloatArray) -> float:
    """A lower bound of ‖(D·A·D)⁻¹‖₁ from one solve: ‖D·A⁻¹·D·(1/n)·1‖₁, Hager's first step.

    The uniform vector loads every rotation alike: it is the load that turns a nearly free
    shaft (a near mechanism, whose soft mode is its rigid rotation) and so finds its large
    inverse; the estimate, a lower bound, makes the reciprocal condition an upper one.

    References
    ----------
    .. [1] W. W. Hager, "Condition estimates", *SIAM J. Sci. Stat. Comput.* 5 (1984) 311-316.
    .. [2] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
       §15.3, Algorithm 15.4 (its first step).
    """
    size = factor.order
    vector = np.asfortranarray((scale / size)[:, None])
    with np.errstate(over="ignore", invalid="ignore"):
        return float(np.abs(factor.solve(vector)[:, 0] * scale).sum())


__all__ = [
    "STATION_ARRAYS",
    "WarpingSolve",
    "WarpingStationValues",
    "solve_warping_table",
]
