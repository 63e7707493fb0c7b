"""The force method with redundants chosen automatically, for any set of geared shafts.

The shafts and the ground are the nodes of a graph whose links are the supports (shaft to
ground) and the gear meshes (shaft to shaft). A spanning tree of it, grown from the ground
through the fixed supports first, then the springs, then the meshes, is a statically
determinate *primary structure*; every link left out is *released* and its force becomes a
redundant X_i (a support's reaction, or a mesh's tangential force). With t_i(x) the internal
torque of the primary structure under X_i = 1, T₀(x) that under the applied loads, ρ_is and
R₀s the reactions of the kept supports, c_s = 1/k_s their compliances and r_s their prescribed
rotations, the unit-load method gives the compatibility equations

    Σ_j f_ij·X_j = δ_i − Δ_i0,
    f_ij = Σ ∫ t_i·t_j dx/(G·J) + Σ_kept c_s·ρ_is·ρ_js + c_i·[i = j, released support],
    Δ_i0 = Σ ∫ t_i·T₀ dx/(G·J) + Σ_kept ρ_is·(c_s·R₀s − r_s),

where δ_i is the prescribed rotation r_i of a released support and 0 for a released mesh
(r_a·θ_a ± r_b·θ_b = 0). The integrals are sums over pieces of the flexibility moments
(:mod:`~workbench.design.independent.pieces`); the loads and redundants are columns of one
array, so every load case is solved at once. Combinations are factored sums of load cases.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.8
   (statically indeterminate torsional members: equilibrium, compatibility, torque–twist).
.. [2] R. C. Hibbeler, *Structural Analysis*, 8th ed., Pearson, 2012, ch. 9 and 10 (force
   method; Maxwell's theorem, f_ij = f_ji; virtual work, unit-load method).
.. [3] J. S. Przemieniecki, *Theory of Matrix Structural Analysis*, McGraw-Hill, 1968, ch. 6
   (the matrix force method; choice of redundants).
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass

import numpy as np

from workbench.case.declaration import POSITION_TOLERANCE
from workbench.design.independent.pieces import Pieces, cut_pieces, flexibility_moments
from workbench.design.independent.reading import FloatArray, IntArray, NotCovered, System

__all__ = ["ForceMethod", "solve_by_force_method"]

#: Largest condition number of the flexibility matrix the check trusts (common practice, no
#: source): beyond it the redundants are not independent (a rigid loop of meshes).
_LARGEST_CONDITION = 1e12
#: Largest number of array entries (pieces × columns × 3) the check allocates at once (80 MB).
_LARGEST_ARRAY = 10_000_000


@dataclass(frozen=True)
class ForceMethod:
    """The solution by the force method, load cases then combinations.

    Attributes
    ----------
    names
        Load cases then combinations.
    released
        Each redundant: ``("support", n)`` or ``("gear", n)`` (file order, from 0).
    flexibility
        f, the (n_redundants, n_redundants) flexibility matrix (SI: rad/(N·m) for supports,
        m/N-like for meshes).
    redundants
        X, (n_results, n_redundants) (N·m for a support, N for a mesh).
    reactions
        (n_results, n_supports): torque each support exerts on its shaft (N·m).
    gear_torques
        (n_results, n_gears, 2): torque each mesh exerts on the shaft of gear a and b (N·m).
    pieces
        The pieces of the shafts.
    torque
        (n_pieces, n_results, 3): T(x) = c₀ + c₁·ξ + c₂·ξ² on each piece, ξ = x − start (N·m,
        N·m/m, N·m/m²).
    pretwist_torque
        The largest k·|r| of a spring support's pre-twist (N·m; 0 without one): the size of the
        torques a pre-twist stands for, even where it only turns the system rigidly.
    """

    names: tuple[str, ...]
    released: tuple[tuple[str, int], ...]
    flexibility: FloatArray
    redundants: FloatArray
    reactions: FloatArray
    gear_torques: FloatArray
    pieces: Pieces
    torque: FloatArray
    pretwist_torque: float = 0.0

    def torque_at(self, shaft: int, x: FloatArray, *, left: bool = False) -> FloatArray:
        """Internal torque T (N·m), shape (len(x), n_results), at stations x (m) of a shaft.

        At a cut point (within the position tolerance) the value just right of it, or just
        left with ``left=True``.
        """
        pieces = self.pieces
        breaks = pieces.breaks[shaft]
        tolerance = POSITION_TOLERANCE * breaks[-1]
        found = (
            np.searchsorted(breaks, x - tolerance, side="left")
            if left
            else np.searchsorted(breaks, x + tolerance, side="right")
        )
        local = np.clip(found - 1, 0, len(breaks) - 2)
        number = pieces.first[shaft] + local
        xi = (x - pieces.start[number])[:, None]
        c = self.torque[number]
        return c[..., 0] + xi * (c[..., 1] + xi * c[..., 2])

    def governing(self) -> tuple[FloatArray, FloatArray]:
        """Largest |T| on each shaft (N·m) and where (m), each (n_results, n_shafts).

        Over both ends of every piece and the stationary point of T inside it.
        """
        pieces, c = self.pieces, self.torque
        length = pieces.length[:, None]
        with np.errstate(divide="ignore", invalid="ignore"):
            turning = np.where(c[..., 2] != 0.0, -c[..., 1] / (2.0 * c[..., 2]), 0.0)
        turning = np.clip(np.nan_to_num(turning), 0.0, length)
        candidates = np.stack(
            [np.zeros_like(turning), np.broadcast_to(length, turning.shape), turning], axis=-1
        )
        values = c[..., :1] + candidates * (c[..., 1:2] + candidates * c[..., 2:3])
        best = np.argmax(np.abs(values), axis=-1)
        peak = np.take_along_axis(values, best[..., None], axis=-1)[..., 0]
        where = pieces.start[:, None] + np.take_along_axis(candidates, best[..., None], -1)[..., 0]
        shafts = len(pieces.breaks)
        largest = np.empty((len(self.names), shafts))
        position = np.empty((len(self.names), shafts))
        for shaft in range(shafts):  # per shaft: a few
            window = slice(pieces.first[shaft], pieces.first[shaft + 1])
            row = np.argmax(np.abs(peak[window]), axis=0)
            largest[:, shaft] = np.abs(peak[window][row, np.arange(len(self.names))])
            position[:, shaft] = where[window][row, np.arange(len(self.names))]
        return largest, position


def _spanning_tree(system: System) -> tuple[list[int], dict[int, tuple[str, int, int]]]:
    """Shafts in the order the tree reaches them, and the link each hangs from.

    A link is ``("support", n, -1)`` or ``("gear", n, side)``, side the end (0 = a, 1 = b) on the
    hanging shaft.
    """
    shafts = len(system.shaft_ids)
    parent: dict[int, tuple[str, int, int]] = {}
    order: list[int] = []
    # Stiffest supports first: the primary structure then keeps the firmest links.
    for number in np.argsort(system.support_compliance, kind="stable"):
        shaft = int(system.support_shaft[number])
        if shaft not in parent:
            parent[shaft] = ("support", int(number), -1)
            order.append(shaft)
    queue = deque(order)
    while queue:
        shaft = queue.popleft()
        for mesh in np.flatnonzero(np.any(system.gear_shaft == shaft, axis=1)):
            for side in (0, 1):
                other = int(system.gear_shaft[mesh, side])
                if other not in parent:
                    parent[other] = ("gear", int(mesh), side)
                    order.append(other)
                    queue.append(other)
    if len(order) < shafts:
        loose = [system.shaft_ids[n] for n in range(shafts) if n not in parent]
        msg = f"shaft {loose[0]!r} is held by no support or mesh (free to spin)"
        raise NotCovered(msg)
    return order, parent


def solve_by_force_method(system: System) -> ForceMethod:
    """Reactions, mesh torques and internal torques of every load case and combination.

    Parameters
    ----------
    system
        The case as SI arrays (:func:`~workbench.design.independent.reading.read_system`).

    Returns
    -------
    ForceMethod
        The solution.

    Raises
    ------
    NotCovered
        A shaft held by nothing, redundants that are not independent, or a system too large
        for dense arrays.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8.
    .. [2] Hibbeler, *Structural Analysis*, 8th ed., ch. 9–10.
    """
    order, parent = _spanning_tree(system)
    kept_supports = {link[1] for link in parent.values() if link[0] == "support"}
    kept_gears = {link[1] for link in parent.values() if link[0] == "gear"}
    released = [("support", n) for n in range(len(system.support_x)) if n not in kept_supports]
    released += [("gear", n) for n in range(len(system.gear_x)) if n not in kept_gears]
    n_red, n_cases = len(released), len(system.case_names)
    columns = n_red + n_cases
    pieces = cut_pieces(system)
    if len(pieces.length) * columns * 3 > _LARGEST_ARRAY:
        msg = f"{len(pieces.length):,} pieces × {columns:,} load columns (too large)"
        raise NotCovered(msg)

    # Point torques of the primary structure: rows (shaft, x), one value per column.
    shaft_rows = [system.point_shaft]
    x_rows = [system.point_x]
    applied = np.zeros((len(system.point_x), columns))
    applied[np.arange(len(system.point_x)), n_red + system.point_case] = system.point_torque
    value_rows = [applied]
    for column, (kind, number) in enumerate(released):
        if kind == "support":
            ends = [(system.support_shaft[number], system.support_x[number], 1.0)]
        else:
            ends = [
                (system.gear_shaft[number, s], system.gear_x[number, s], system.gear_arm[number, s])
                for s in (0, 1)
            ]
        for shaft, x, value in ends:
            unit = np.zeros((1, columns))
            unit[0, column] = value
            shaft_rows.append(np.array([shaft]))
            x_rows.append(np.array([x]))
            value_rows.append(unit)

    spread_column = n_red + system.spread_case
    totals = np.zeros((len(system.shaft_ids), columns))
    for shafts, values in zip(shaft_rows, value_rows, strict=True):
        np.add.at(totals, shafts, values)
    resultant = (
        0.5
        * (system.spread_q_start + system.spread_q_end)
        * (system.spread_end - system.spread_start)
    )
    np.add.at(totals, (system.spread_shaft, spread_column), resultant)

    # The kept links carry what hangs from them, leaves first.
    support_force = np.zeros((len(system.support_x), columns))
    gear_force = np.zeros((len(system.gear_x), columns))
    for column, (kind, number) in enumerate(released):
        (support_force if kind == "support" else gear_force)[number, column] = 1.0
    for shaft in reversed(order):
        kind, number, side = parent[shaft]
        if kind == "support":
            support_force[number] = -totals[shaft]
            ends = [(shaft, system.support_x[number], 1.0)]
        else:
            gear_force[number] = -totals[shaft] / system.gear_arm[number, side]
            other = int(system.gear_shaft[number, 1 - side])
            totals[other] += system.gear_arm[number, 1 - side] * gear_force[number]
            ends = [
                (
                    int(system.gear_shaft[number, s]),
                    system.gear_x[number, s],
                    system.gear_arm[number, s],
                )
                for s in (0, 1)
            ]
        for end_shaft, x, arm in ends:
            shaft_rows.append(np.array([end_shaft]))
            x_rows.append(np.array([x]))
            value_rows.append(arm * (support_force if kind == "support" else gear_force)[[number]])

    torque = _primary_torque(
        system,
        pieces,
        np.concatenate(shaft_rows),
        np.concatenate(x_rows),
        np.concatenate(value_rows),
        spread_column,
        columns,
    )
    moments = flexibility_moments(system, pieces)
    unit = torque[:, :n_red, 0]  # the redundants are point loads: t_i is constant on a piece
    loads = torque[:, n_red:]
    kept = np.array(sorted(kept_supports), dtype=np.int64)
    compliance = system.support_compliance[kept]
    rho, reaction = support_force[kept, :n_red], support_force[kept, n_red:]

    flexibility = unit.T @ (moments[:, :1] * unit) + rho.T @ (compliance[:, None] * rho)
    released_support = np.array([kind == "support" for kind, _ in released], dtype=bool)
    numbers = np.array([number for _, number in released], dtype=np.int64)
    own = np.where(released_support, system.support_compliance[numbers * released_support], 0.0)
    flexibility[np.diag_indices(n_red)] += own
    twist = np.einsum("pck,pk->pc", loads, moments)  # ∫T₀/(GJ) piece by piece
    mismatch = unit.T @ twist + rho.T @ (
        compliance[:, None] * reaction - system.support_rotation[kept, None]
    )
    target = np.where(released_support, system.support_rotation[numbers * released_support], 0.0)
    if n_red:
        if np.linalg.cond(flexibility) > _LARGEST_CONDITION:
            msg = "supports and meshes that hold one rotation twice (redundants not independent)"
            raise NotCovered(msg)
        redundants = np.linalg.solve(flexibility, target[:, None] - mismatch)
    else:
        redundants = np.zeros((0, n_cases))

    # Superpose: real = loads + Σ X_j · unit_j, then the combinations.
    reactions = support_force[:, n_red:] + support_force[:, :n_red] @ redundants
    mesh = gear_force[:, n_red:] + gear_force[:, :n_red] @ redundants
    real = loads.copy()
    real[..., 0] += unit @ redundants
    factors = system.combination_factors
    reactions = np.concatenate([reactions, reactions @ factors.T], axis=1)
    mesh = np.concatenate([mesh, mesh @ factors.T], axis=1)
    real = np.concatenate([real, np.einsum("pck,mc->pmk", real, factors)], axis=1)
    redundants = np.concatenate([redundants, redundants @ factors.T], axis=1)
    return ForceMethod(
        names=(*system.case_names, *system.combination_names),
        released=tuple(released),
        flexibility=flexibility,
        redundants=redundants.T,
        reactions=reactions.T,
        gear_torques=np.moveaxis(mesh[:, None, :] * system.gear_arm[:, :, None], -1, 0),
        pieces=pieces,
        torque=real,
        pretwist_torque=float(
            np.max(
                np.abs(system.support_rotation)
                / np.where(system.support_compliance > 0.0, system.support_compliance, np.inf),
                initial=0.0,
            )
        ),
    )


def _within_shafts(pieces: Pieces, steps: FloatArray) -> FloatArray:
    """Running sum of ``steps`` (n_pieces, ...) along each shaft, restarting at each shaft."""
    total = np.cumsum(steps, axis=0)
    before = np.zeros_like(total)
    for shaft in range(1, len(pieces.breaks)):  # per shaft: a few
        start, end = pieces.first[shaft], pieces.first[shaft + 1]
        if start > 0:
            before[start:end] = total[start - 1]
    return total - before


def _primary_torque(
    system: System,
    pieces: Pieces,
    shafts: IntArray,
    xs: FloatArray,
    values: FloatArray,
    spread_column: IntArray,
    columns: int,
) -> FloatArray:
    """T(x) of the primary structure: (n_pieces, columns, 3) polynomial coefficients.

    T(x) = −(sum of the external torques on [0, x)), so a point torque at x lowers T on every
    piece from x on, and a distributed torque by ∫₀ˣ t.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (internal torque from a free
       body; distributed torques).
    """
    n_pieces = len(pieces.length)

    def steps(
        shaft: IntArray, x: FloatArray, value: FloatArray, column: IntArray | None
    ) -> FloatArray:
        index = pieces.index_at(shaft, x)
        inside = index < pieces.first[1:][shaft]  # a load at a shaft's far end acts on nothing
        out = np.zeros((n_pieces, columns))
        if column is None:
            np.add.at(out, index[inside], value[inside])
        else:
            np.add.at(out, (index[inside], column[inside]), value[inside])
        return _within_shafts(pieces, out)

    point = steps(shafts, xs, values, None)
    spread = system.spread_end - system.spread_start
    slope = (system.spread_q_end - system.spread_q_start) / spread
    intercept = system.spread_q_start - slope * system.spread_start
    s = system.spread_shaft
    level = steps(s, system.spread_start, intercept, spread_column) - steps(
        s, system.spread_end, intercept, spread_column
    )
    rise = steps(s, system.spread_start, slope, spread_column) - steps(
        s, system.spread_end, slope, spread_column
    )
    a, length = pieces.start[:, None], pieces.length[:, None]
    on_piece = length * (level + rise * (a + 0.5 * length))  # ∫ t over the piece
    before = _within_shafts(pieces, on_piece) - on_piece
    torque = np.empty((n_pieces, columns, 3))
    torque[..., 0] = -point - before
    torque[..., 1] = -(level + rise * a)
    torque[..., 2] = -0.5 * rise
    return torque
