"""The array core of the static solution: columns in, every load case of every variant out.

:func:`solve_table` takes a system as columns (:class:`~workbench.solver.columns.CaseTable`),
cuts it into exact elements, assembles the stiffness of all elements at once, factors it once
(banded LAPACK without gears, SuperLU with them) for all load cases as a matrix of right-hand
sides, and recovers T, θ and τ at every station by equilibrium. Many variants of one topology
(:mod:`workbench.solver.batch`) go through the same code with a leading variant axis.

References
----------
.. [1] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (direct stiffness method) and ch. 12 (Lagrange multipliers).
.. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 and §3.8.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from workbench.case.errors import InputError, MechanismError
from workbench.solver.assembly import (
    Band,
    BandFactor,
    SparseFactor,
    add_diagonal,
    assemble_band,
    bordered,
    prescribe,
    split_constrained,
    with_constraints,
)
from workbench.solver.columns import CaseTable, IntArray
from workbench.solver.elements import SaintVenantElements
from workbench.solver.mesh import Mesh, build_mesh_from_table
from workbench.solver.mesh_sizes import Geometry
from workbench.solver.parts import require_load_cases
from workbench.solver.recovery import (
    ElementLoads,
    combine,
    combine_in_place,
    fixed_reactions,
    start_torques,
    station_values,
)
from workbench.solver.sections import FloatArray
from workbench.solver.soundness import (
    Soundness,
    rcond_limit,
    shaft_groups,
    shaft_residuals,
)
from workbench.solver.warping_statics import WarpingStationValues, solve_warping_table
from workbench.solver.warping_supports import check_warping_supports


@dataclass(frozen=True)
class StaticSolution:
    """Every load case, then every combination, of every variant: arrays (n_results, n_variants, …).

    Parameters
    ----------
    names
        Result names: load cases, then combinations.
    mesh
        The mesh (its topology is every variant's).
    geometry
        The sizes of every variant.
    reactions
        (n_results, n_variants, n_supports) support torques (N·m).
    gear_torques
        (n_results, n_variants, n_gears, 2) mesh torques on gear a's and gear b's shaft (N·m).
    torque, angle, shear_stress
        (n_results, n_variants, n_stations) internal torque (N·m), rotation (rad), peak shear
        stress (Pa).
    node_angle
        (n_results, n_variants, n_nodes) nodal rotations (rad).
    factor
        The factorization (its ``rcond`` estimates the reciprocal condition number).
    soundness
        Each variant's condition estimate and the equilibrium of its shafts
        (:mod:`~workbench.solver.soundness`).
    warping
        Where some section warps: θ′, θ″, θ‴, the Saint-Venant and warping torques and the
        bimoment at the stations (:mod:`~workbench.solver.warping_statics`); ``None`` otherwise.
        ``shear_stress`` is then the Saint-Venant part's, |G·J·θ′|·τ/T.
    """

    names: tuple[str, ...]
    mesh: Mesh
    geometry: Geometry
    reactions: FloatArray
    gear_torques: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray
    node_angle: FloatArray
    factor: BandFactor | SparseFactor
    soundness: Soundness
    warping: WarpingStationValues | None = None


def check_restrained(table: CaseTable) -> None:
    """Raise :class:`MechanismError` naming every group of shafts no support restrains."""
    shaft_ids = table.segments.shaft_ids
    root = shaft_groups(table)
    restrained = set(root[table.support_shaft].tolist())
    groups: dict[int, list[str]] = {}
    for number, shaft_id in enumerate(shaft_ids):
        groups.setdefault(int(root[number]), []).append(shaft_id)
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


def _element_loads(
    table: CaseTable, mesh: Mesh, geometry: Geometry, n_variants: int
) -> ElementLoads:
    """Intensities of the distributed torques at the ends of every loaded element."""
    n_cases = table.n_cases
    elements = np.flatnonzero(mesh.element_loaded)
    length = geometry.element_length[:, elements]
    start = np.zeros((n_cases, n_variants, len(elements)))
    end = np.zeros_like(start)
    if not len(elements):
        return ElementLoads(elements, start, end, length)
    node_a = mesh.element_start_node[elements]
    x_start = geometry.node_x[:, node_a]
    x_end = geometry.node_x[:, node_a + 1]
    middle = 0.5 * (mesh.node_x[node_a] + mesh.node_x[node_a + 1])
    span_start, span_end = _load_spans(table, mesh, geometry)
    intensity = table.load_intensity
    shaft = mesh.element_shaft[elements]
    for number in range(len(table.load_case)):  # a loop over distributed torques
        inside = (
            (shaft == table.load_shaft[number])
            & (middle > table.load_start[number])
            & (middle < table.load_end[number])
        )
        low, high = span_start[:, number : number + 1], span_end[:, number : number + 1]
        rate = (intensity[:, number, 1:] - intensity[:, number, :1]) / (high - low)
        case = table.load_case[number]
        start[case][:, inside] += intensity[:, number, :1] + rate * (x_start[:, inside] - low)
        end[case][:, inside] += intensity[:, number, :1] + rate * (x_end[:, inside] - low)
    return ElementLoads(elements, start, end, length)


def _load_spans(table: CaseTable, mesh: Mesh, geometry: Geometry) -> tuple[FloatArray, FloatArray]:
    """(n_variants or 1, n_distributed) start and end of every distributed torque (m)."""
    if not geometry.nodes_moved:
        return table.load_start[None], table.load_end[None]
    # Lengths vary: the loads' ends stay on their nodes.
    nodes_start = mesh.nodes_of(table.load_shaft, table.load_start)
    nodes_end = mesh.nodes_of(table.load_shaft, table.load_end)
    return geometry.node_x[:, nodes_start], geometry.node_x[:, nodes_end]


def solve_table(
    table: CaseTable,
    mesh: Mesh | None = None,
    geometry: Geometry | None = None,
    method: Literal["auto", "band", "sparse"] = "auto",
    unsound: Literal["raise", "flag"] = "raise",
) -> StaticSolution:
    """Solve every load case (and combination) of a system given as columns.

    Parameters
    ----------
    table
        The system: segments, supports, gears, loads (SI).
    mesh
        Its mesh, when already built; built here otherwise.
    geometry
        Sizes of many variants of the mesh (:func:`~workbench.solver.mesh_sizes.size_mesh`); the
        mesh's own sizes by default. The table's variant columns must match it.
    method
        ``"auto"``: banded LAPACK without gears, sparse LU with them; ``"sparse"`` forces the
        sparse LU (for checks of one path against the other); ``"band"`` refuses gears.

    Returns
    -------
    StaticSolution
        Results of every load case and combination of every variant.

    Raises
    ------
    MechanismError
        When part of the system is free to spin.
    InputError
        When the case has no load case, or supports or gears contradict each other (two fixed
        supports at one point, a gear held at both ends, a redundant loop of gears), or
        (``unsound="raise"``) when the system is nearly a mechanism: its factor too
        ill-conditioned, or its shafts out of equilibrium after the solve.
    """
    require_load_cases(table.n_cases)
    check_restrained(table)
    check_warping_supports(table)
    mesh = mesh if mesh is not None else build_mesh_from_table(table)
    geometry = geometry if geometry is not None else mesh.geometry
    n_variants = max(geometry.n_variants, table.n_variants)
    supports = _Supports.of(table, mesh)
    if table.segments.warps:
        return _solve_warping(table, mesh, geometry, supports, method, unsound)
    elements = SaintVenantElements(geometry.flexibility)
    loads = _element_loads(table, mesh, geometry, n_variants)
    point, rhs = _right_hand_sides(table, mesh, elements, loads, supports, n_variants)
    band = assemble_band(elements, mesh.shaft_node_start, n_variants)
    add_diagonal(band, supports.spring_nodes, supports.spring_stiffness)
    prescribe(band, rhs, supports.fixed_nodes, supports.fixed_rotation)
    node_angle, multipliers, gear_nodes, factor = _factor_and_solve(
        table, mesh, band, rhs, supports, method
    )
    del rhs  # the right-hand sides as held are done with (the solve may have overwritten them)
    solution = None
    for attempt in range(2):  # the solve, then one step of refinement if a shaft is off balance
        if attempt:
            point, loaded = _right_hand_sides(table, mesh, elements, loads, supports, n_variants)
            node_angle, multipliers = _refine(
                mesh,
                elements,
                supports,
                factor,
                loaded,
                node_angle,
                multipliers,
                gear_nodes,
                table.gear_coefficient,
            )
        # The held rows give θ̄·K_jj/K_jj: put the prescribed values back exactly.
        node_angle[..., supports.fixed_nodes] = supports.fixed_rotation
        solution = _recover(
            table,
            mesh,
            geometry,
            elements,
            loads,
            supports,
            point,
            node_angle,
            -multipliers[..., None] * table.gear_coefficient,
            gear_nodes,
            factor,
        )
        soundness = solution.soundness
        if not (soundness.off_balance.any(axis=(0, 2)) & ~soundness.ill_conditioned).any():
            break
    assert solution is not None
    sound = solution.soundness.sound
    if unsound == "raise" and not sound.all():
        error = solution.soundness.error(table, int(np.argmin(sound)))
        assert error is not None
        raise error
    return solution


def _solve_warping(
    table: CaseTable,
    mesh: Mesh,
    geometry: Geometry,
    supports: _Supports,
    method: str,
    unsound: str,
) -> StaticSolution:
    """:func:`solve_table` where some segment warps: θ and θ′ per node, one variant."""
    loads = _element_loads(table, mesh, geometry, 1)
    point = np.zeros((table.n_cases, 1, len(mesh.node_x)))
    torque_node = mesh.nodes_of(table.torque_shaft, table.torque_x)
    at_torques: Any = (table.torque_case, slice(None), torque_node)
    np.add.at(point, at_torques, table.torque.T)
    solved = solve_warping_table(table, mesh, geometry, supports, loads, point, method)
    factors = table.combination_factors
    saint_venant = combine(solved.saint_venant_torque, factors)
    solution = StaticSolution(
        names=table.result_names,
        mesh=mesh,
        geometry=geometry,
        reactions=combine(solved.reactions, factors),
        gear_torques=combine(solved.gear_torques, factors),
        torque=combine(solved.torque, factors),
        angle=combine(solved.angle, factors),
        shear_stress=np.abs(saint_venant) * geometry.station_stress_per_torque,
        node_angle=combine(solved.node_angle, factors),
        factor=solved.factor,
        soundness=solved.soundness,
        warping=solved.warping,
    )
    sound = solution.soundness.sound
    if unsound == "raise" and not sound.all():
        error = solution.soundness.error(table, int(np.argmin(sound)))
        assert error is not None
        raise error
    return solution


def _refine(
    mesh: Mesh,
    elements: SaintVenantElements,
    supports: _Supports,
    factor: BandFactor | SparseFactor,
    loaded: FloatArray,
    node_angle: FloatArray,
    multipliers: FloatArray,
    gear_nodes: IntArray,
    gear_coefficient: FloatArray,
) -> tuple[FloatArray, FloatArray]:
    """One step of iterative refinement, its residual f − K·θ − Cᵀ·λ taken element by element.

    K·θ is summed from each element's torque k·(θ_b − θ_a), so the residual keeps the accuracy
    of the torques, not of the rotations' products with the stiffness: a long mesh on springs
    (10⁵ elements: 2·10⁻⁸ of the load out of balance) comes back in balance to rounding, while
    a near mechanism, whose twists drown in its rigid rotation, stays out.

    Parameters
    ----------
    loaded
        (n_cases, n_variants, n_nodes) the loads before any rotation was held: point torques,
        consistent loads and the springs' k·θ̄ (N·m).
    node_angle, multipliers
        (n_cases, n_variants, n_nodes) rotations (rad) and (n_cases, n_variants, n_gears)
        mesh multipliers (N) of the solve.

    Returns
    -------
    node_angle, multipliers
        Refined.

    References
    ----------
    .. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
       ch. 12 (iterative refinement: one step makes the solve componentwise stable; its gain
       is bounded by the accuracy of the residual).
    """
    n_cases, n_variants, n_nodes = node_angle.shape
    node_a = mesh.element_start_node
    element_torque = elements.stiffness * (node_angle[..., node_a + 1] - node_angle[..., node_a])
    residual = loaded
    residual[..., node_a] += element_torque  # −(K_e·θ)_a = k·(θ_b − θ_a)
    residual[..., node_a + 1] -= element_torque
    springs: Any = (slice(None), slice(None), supports.spring_nodes)
    np.subtract.at(
        residual, springs, supports.spring_stiffness * node_angle[..., supports.spring_nodes]
    )
    coefficients = np.broadcast_to(gear_coefficient, (n_variants, *gear_coefficient.shape[1:]))
    gears: Any = (slice(None), slice(None), gear_nodes.ravel())
    np.subtract.at(
        residual, gears, (multipliers[..., None] * coefficients).reshape(n_cases, n_variants, -1)
    )
    residual[..., supports.fixed_nodes] = 0.0  # held: no correction
    if isinstance(factor, BandFactor):
        change = factor.solve(np.asfortranarray(residual.reshape(n_cases, -1).T))
        return node_angle + change.T.reshape(node_angle.shape), multipliers
    # The mesh rows: c_a·θ_a + c_b·θ_b = 0 (a held rotation's term is exact, θ̄ put back).
    constraint = -(coefficients * node_angle[..., gear_nodes]).sum(axis=-1)
    change = factor.solve_plain(bordered(residual, constraint))
    angle_change, multiplier_change = split_constrained(change, n_variants, n_nodes)
    return node_angle + angle_change, multipliers + multiplier_change


def _soundness(
    table: CaseTable,
    mesh: Mesh,
    geometry: Geometry,
    factor: BandFactor | SparseFactor,
    stiffness: FloatArray,
    reactions: FloatArray,
    gear_torques: FloatArray,
) -> Soundness:
    """Each variant's condition estimate and the equilibrium of its shafts, load case by case.

    ``stiffness`` (n_variants or 1, n_elements) is every element's (N·m/rad); ``reactions``
    (n_cases, n_variants, n_supports) and ``gear_torques`` (n_cases, n_variants, n_gears, 2)
    are the load cases' (N·m).
    """
    n_variants = reactions.shape[1]
    n_rotations = factor.order // n_variants
    limit = rcond_limit(n_rotations)
    if isinstance(factor, BandFactor):  # Saint-Venant elements and springs: an M-matrix
        rcond = factor.m_matrix_rcond(n_variants)
    else:
        rcond = factor.block_rcond(n_variants)
    span_start, span_end = _load_spans(table, mesh, geometry)
    residual, tolerance = shaft_residuals(
        table, span_end - span_start, stiffness, reactions, gear_torques
    )
    return Soundness(rcond, limit, n_rotations, residual, tolerance)


@dataclass(frozen=True)
class _Supports:
    """The supports of a table on its mesh: fixed ones held, springs on the diagonal."""

    fixed: IntArray  # support numbers of the fixed supports
    fixed_nodes: IntArray
    fixed_rotation: FloatArray  # (n_variants or 1, n_fixed) (rad)
    springs: IntArray  # support numbers of the springs
    spring_nodes: IntArray
    spring_stiffness: FloatArray  # (n_variants or 1, n_springs) (N·m/rad)
    spring_rotation: FloatArray  # (rad)

    @classmethod
    def of(cls, table: CaseTable, mesh: Mesh) -> _Supports:
        support_node = mesh.nodes_of(table.support_shaft, table.support_x)
        springs = np.flatnonzero(~table.support_fixed)
        fixed = np.flatnonzero(table.support_fixed)
        return cls(
            fixed=fixed,
            fixed_nodes=table.fixed_support_nodes(support_node),
            fixed_rotation=table.support_rotation[:, fixed],
            springs=springs,
            spring_nodes=support_node[springs],
            spring_stiffness=table.support_stiffness[:, springs],
            spring_rotation=table.support_rotation[:, springs],
        )


def _right_hand_sides(
    table: CaseTable,
    mesh: Mesh,
    elements: SaintVenantElements,
    loads: ElementLoads,
    supports: _Supports,
    n_variants: int,
) -> tuple[FloatArray, FloatArray]:
    """(point torques at nodes, right-hand sides), both (n_cases, n_variants, n_nodes) (N·m).

    The right-hand sides add the consistent loads of distributed torques and the springs'
    prescribed rotations (k·θ̄).
    """
    point = np.zeros((table.n_cases, n_variants, len(mesh.node_x)))
    torque_node = mesh.nodes_of(table.torque_shaft, table.torque_x)
    at_torques: Any = (table.torque_case, slice(None), torque_node)
    np.add.at(point, at_torques, table.torque.T)
    # Not a copy of ``point``: a fresh buffer is written only where the torques act.
    rhs = np.zeros_like(point)
    np.add.at(rhs, at_torques, table.torque.T)
    if len(loads.elements):
        start_load, end_load = elements.consistent_loads(
            loads.elements, loads.length, np.stack([loads.start, loads.end], axis=-1)
        )
        node_a = mesh.element_start_node[loads.elements]
        rhs[..., node_a] += start_load
        rhs[..., node_a + 1] += end_load
    for item, node in enumerate(supports.spring_nodes):  # a loop over springs
        rhs[..., node] += supports.spring_stiffness[:, item] * supports.spring_rotation[:, item]
    return point, rhs


def _factor_and_solve(
    table: CaseTable,
    mesh: Mesh,
    band: Band,
    rhs: FloatArray,
    supports: _Supports,
    method: str,
) -> tuple[FloatArray, FloatArray, IntArray, BandFactor | SparseFactor]:
    """Nodal rotations and mesh multipliers of every case: one factorization for all of them.

    The gear torques are −λ·(c_a, c_b) of each mesh's multiplier λ.
    """
    n_cases, n_variants, n_nodes = rhs.shape
    n_gears = len(table.gear_x)
    if n_gears and method == "band":
        msg = "gear meshes need the sparse solver: a banded system holds no constraints"
        raise InputError("method", msg)
    if not n_gears and method != "sparse":
        factor = BandFactor(band)
        solution = factor.solve(rhs.reshape(n_cases, -1).T)
        node_angle = solution.T.reshape(n_cases, n_variants, n_nodes)
        no_gears = np.zeros((n_cases, n_variants, 0))
        return node_angle, no_gears, np.zeros((0, 2), dtype=np.intp), factor
    gear_nodes = mesh.nodes_of(table.gear_shaft.ravel(), table.gear_x.ravel()).reshape(-1, 2)
    fixed_rotation = supports.fixed_rotation
    known = np.full((fixed_rotation.shape[0], n_gears, 2), np.nan)
    for position, node in enumerate(supports.fixed_nodes):  # a loop over fixed supports
        known[:, gear_nodes == node] = fixed_rotation[:, position : position + 1]
    both = np.flatnonzero(np.all(~np.isnan(known[0]), axis=1))
    if len(both):
        msg = "both gears sit at fixed supports: the mesh torque is undefined"
        raise InputError(f"gears[{int(both[0])}]", msg)
    sparse, full_rhs = with_constraints(band, rhs, gear_nodes, table.gear_coefficient, known)
    node_angle, multipliers = split_constrained(sparse.solve(full_rhs), n_variants, n_nodes)
    return node_angle, multipliers, gear_nodes, sparse


def _recover(
    table: CaseTable,
    mesh: Mesh,
    geometry: Geometry,
    elements: SaintVenantElements,
    loads: ElementLoads,
    supports: _Supports,
    point: FloatArray,
    node_angle: FloatArray,
    gear_torques: FloatArray,
    gear_nodes: IntArray,
    factor: BandFactor | SparseFactor,
) -> StaticSolution:
    """Internal torque, rotation and stress at the stations, and the reactions, by equilibrium."""
    n_cases, n_variants, n_nodes = node_angle.shape
    # Concentrated torques known after the solve: applied, gears, springs.
    external = point
    at_gears: Any = (slice(None), slice(None), gear_nodes.ravel())
    np.add.at(external, at_gears, gear_torques.reshape(n_cases, n_variants, -1))
    spring_nodes = supports.spring_nodes
    spring_reactions = -supports.spring_stiffness * (
        node_angle[..., spring_nodes] - supports.spring_rotation
    )
    at_springs: Any = (slice(None), slice(None), spring_nodes)
    np.add.at(external, at_springs, spring_reactions)

    n_elements = len(mesh.element_start_node)
    stiffness = elements.stiffness
    load_moment = np.zeros((n_cases, n_variants, 0))
    resultant = None
    if len(loads.elements):
        resultant = loads.full(loads.resultant, n_elements)
        moments = elements.flexibility[:, loads.elements]
        load_moment = moments[..., 1] * loads.start + moments[..., 2] * loads.slope

    def stiffness_torque(chosen: IntArray) -> FloatArray:
        """T(0⁺) = (θ_b − θ_a + ∫m/GK)/I₀ of the chosen elements."""
        node_a = mesh.element_start_node[chosen]
        twist = node_angle[..., node_a + 1] - node_angle[..., node_a]
        # The loaded elements come sorted: find the chosen ones among them.
        position = np.searchsorted(loads.elements, chosen)
        on_load = position < len(loads.elements)
        on_load[on_load] = loads.elements[position[on_load]] == chosen[on_load]
        twist[..., on_load] += load_moment[..., position[on_load]]
        return twist * stiffness[:, chosen]

    fixed_node = np.zeros(n_nodes, dtype=bool)
    fixed_node[supports.fixed_nodes] = True
    start = start_torques(mesh, fixed_node, external, resultant, stiffness_torque)
    # Without distributed torque the torque is constant along each element.
    end = start if resultant is None else start - resultant
    factors = table.combination_factors
    # T, θ and τ of every result at every station, in one block: combinations are written in
    # place instead of stacked by copying.
    n_results = n_cases + len(factors)
    stations = np.empty((3, n_results, n_variants, len(mesh.station_element)))
    torque, angle, shear_stress = stations
    station_values(mesh, geometry, start, end, node_angle, loads, torque[:n_cases], angle[:n_cases])
    combine_in_place(torque, factors)
    combine_in_place(angle, factors)
    np.abs(torque, out=shear_stress)
    shear_stress *= geometry.station_stress_per_torque
    reactions = np.zeros((n_cases, n_variants, len(table.support_x)))
    reactions[..., supports.springs] = spring_reactions
    reactions[..., supports.fixed] = fixed_reactions(
        mesh, supports.fixed_nodes, start, end, external
    )
    return StaticSolution(
        names=table.result_names,
        mesh=mesh,
        geometry=geometry,
        reactions=combine(reactions, factors),
        gear_torques=combine(gear_torques, factors),
        torque=torque,
        angle=angle,
        shear_stress=shear_stress,
        node_angle=combine(node_angle, factors),
        factor=factor,
        soundness=_soundness(table, mesh, geometry, factor, stiffness, reactions, gear_torques),
    )


__all__ = ["StaticSolution", "check_restrained", "solve_table"]
