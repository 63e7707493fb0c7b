"""Whether a static solution can be trusted: the condition of its factor and equilibrium.

A system that is nearly a mechanism — a group of shafts held only by springs far softer than
the shafts, or part of a shaft hung on a segment far softer than the rest — has a stiffness
matrix so ill-conditioned that rounding swamps the rotations: on springs of 10⁻¹² N·m/rad
a 100 N·m torque came back as rotations of 10¹³ rad and reactions that miss equilibrium by
70 N·m. Such a result is refused, by two tests:

* the reciprocal 1-norm condition number of each variant's factored system below
  :data:`RCOND_LIMIT` / n², n the rotations of one variant. On the band it is exact from one
  solve (the stiffness matrix is an M-matrix: ‖A⁻¹‖₁ is the largest entry of A⁻ᵀ·1, where
  LAPACK's ?gtcon would estimate it with a dozen solves); with gears it is Hager's estimate (the
  method of LAPACK's ?lacon) of the symmetrically scaled bordered system, whose raw condition
  number would depend on the units of its multipliers. A shaft cut into n elements has a condition number of about 2n² with nothing
  nearly free (the stiffness matrix of a chain of springs; 6·10⁻¹² for the 10⁶-segment
  benchmark shaft, which is solved to 3·10⁻⁶), so the mesh's own growth is taken out and the
  test reads the physical ratio: a group of shafts on springs gives about 2n²·K/k (K the
  shafts' own stiffness, k the springs'), refused from K/k ≳ 10¹²;
* equilibrium of every shaft of every load case: applied torques, support reactions and the
  gear mesh torques on the shaft must sum to within :data:`EQUILIBRIUM_LIMIT` times the sum
  of the magnitudes of the torques that load its system, the shafts gear meshes join to it
  (and the rounding of prescribed rotations, :data:`ROUNDING_UNITS`): a shaft no gear joins
  is judged by its own loads, not hidden by a larger torque elsewhere. Each shaft is a free
  body: the
  system's total is no test with gears (their torques on two shafts differ by the ratio).
  Reactions of fixed supports come from equilibrium sweeps (they balance by construction);
  springs' reactions k·(θ̄ − θ) and gear torques come from the solve, and are what a near
  mechanism spoils. Combinations are sums of load cases and need no test of their own.

References
----------
.. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
   ch. 7 and 15 (condition numbers and their estimation; the forward error of a backward
   stable solve is about ε·κ).
.. [2] G. Strang and G. J. Fix, *An Analysis of the Finite Element Method*, Prentice-Hall,
   1973, §5.2 (the condition number of a stiffness matrix grows as the square of the number
   of elements along a member).
.. [3] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8 (equilibrium of a shaft as a free
   body: the applied torques and the reactions sum to zero).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.case.errors import InputError, short
from workbench.case.units import quote
from workbench.solver.columns import BoolArray, CaseTable, IntArray
from workbench.solver.sections import FloatArray

#: Refuse a solve whose factor's reciprocal condition number, times n² (n rotations), is below.
RCOND_LIMIT = 1e-12
#: Refuse a solve whose shafts miss equilibrium by more than this share of Σ|torques applied|.
EQUILIBRIUM_LIMIT = 1e-9
#: Torques of rounding size allowed besides: this many units of rounding (ε) of the torque the
#: stiffest element carries under the largest prescribed rotation (a rotation θ̄ is known to
#: ε·θ̄ only, so a system turned by its supports without load carries torques of that size).
ROUNDING_UNITS = 1024.0
#: Rotations beyond this (rad) are outside small-rotation theory: a warning, not a refusal.
ROTATION_LIMIT = 1.0
#: A message's longest line (the command line's rule for every message).
MESSAGE_LIMIT = 200


def rcond_limit(n_rotations: int) -> float:
    """The reciprocal condition number below which a system of ``n_rotations`` is refused."""
    return RCOND_LIMIT / float(max(n_rotations, 1)) ** 2


def shaft_groups(table: CaseTable) -> IntArray:
    """(n_shafts,) a number shared by the shafts that gear meshes join, one per group."""
    parent = list(range(len(table.segments.shaft_ids)))

    def root(number: int) -> int:
        while parent[number] != number:
            parent[number] = parent[parent[number]]
            number = parent[number]
        return number

    for shaft_a, shaft_b in table.gear_shaft.tolist():  # a loop over gears
        parent[root(shaft_a)] = root(shaft_b)
    return np.array([root(number) for number in range(len(parent))], dtype=np.intp)


@dataclass(frozen=True)
class Soundness:
    """How far each variant's solution can be trusted.

    Parameters
    ----------
    rcond
        (n_variants,) estimated reciprocal 1-norm condition number of each variant's system
        (the stacked estimate, a lower bound, when that alone clears every variant).
    limit
        The refusal limit of ``rcond`` for this number of rotations (:func:`rcond_limit`).
    n_rotations
        Rotations (unknowns) of one variant.
    residual
        (n_cases, n_variants, n_shafts) sum of the torques on each shaft (N·m).
    tolerance
        (n_cases, n_variants, n_shafts) the largest residual allowed on each shaft (N·m)
        (:func:`shaft_residuals`).
    """

    rcond: FloatArray
    limit: float
    n_rotations: int
    residual: FloatArray
    tolerance: FloatArray

    @functools.cached_property
    def ill_conditioned(self) -> BoolArray:
        """(n_variants,) whether the factor is too ill-conditioned to trust."""
        return ~(self.rcond >= self.limit)

    @functools.cached_property
    def off_balance(self) -> BoolArray:
        """(n_cases, n_variants, n_shafts) whether a shaft misses equilibrium."""
        return ~(np.abs(self.residual) <= self.tolerance)

    @functools.cached_property
    def sound(self) -> BoolArray:
        """(n_variants,) whether each variant's results may be reported."""
        return ~self.ill_conditioned & ~self.off_balance.any(axis=(0, 2))

    def error(self, table: CaseTable, variant: int = 0) -> InputError | None:
        """The refusal of one variant (one line naming the supports), or ``None``."""
        if self.sound[variant]:
            return None
        groups = shaft_groups(table)
        springs = ~table.support_fixed
        held = set(groups[table.support_shaft[~springs]].tolist())
        if self.ill_conditioned[variant]:
            what = (
                f"the system is nearly a mechanism (reciprocal condition "
                f"{self.rcond[variant]:.2g}, below {self.limit:.2g} for {self.n_rotations} "
                "rotations)"
            )
            # Groups held by springs alone are the likely near mechanisms.
            suspects = sorted(set(groups.tolist()) - held)
        else:
            case, shaft = _worst(self.residual[:, variant], self.tolerance[:, variant])
            torque = quote(float(np.abs(self.residual[case, variant, shaft])), "torque")
            what = (
                f"the results miss equilibrium by {torque} on shaft "
                f"{short(table.segments.shaft_ids[shaft], 30)!r} in load case "
                f"{short(table.case_names[case], 30)!r}: the system is nearly a mechanism"
            )
            suspects = [int(groups[shaft])] if int(groups[shaft]) not in held else []
        suspect = np.isin(groups[table.support_shaft], suspects) & springs
        if not suspect.any():
            return InputError(
                "shafts",
                _fit(f"{what}: a segment or spring is far softer than the rest; check sizes", []),
            )
        labels = [
            f"{short(table.segments.shaft_ids[shaft], 30)} x={quote(x, 'length')}"
            for shaft, x in zip(
                table.support_shaft[suspect].tolist(),
                table.support_x[suspect].tolist(),
                strict=True,
            )
        ]
        return InputError("supports", _fit(f"{what}: stiffen the springs at ", labels))


def _worst(residual: FloatArray, tolerance: FloatArray) -> tuple[int, int]:
    """(case, shaft) of the largest residual relative to its tolerance."""
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.abs(residual) / tolerance
    share = np.where(np.isnan(share), np.inf, share)
    case, shaft = np.unravel_index(int(np.argmax(share)), share.shape)
    return int(case), int(shaft)


def _fit(opening: str, labels: list[str]) -> str:
    """``opening``, then as many support labels as fit one line of :data:`MESSAGE_LIMIT`.

    The labels are followed by " or add a fixed support"; the field's name and ": " are
    allowed for.
    """
    room = MESSAGE_LIMIT - len("supports: ")
    if not labels:
        return short(opening, room)
    ending = " or add a fixed support"
    for count in range(len(labels), 0, -1):
        listed = ", ".join(labels[:count])
        if count < len(labels):
            listed += f" and {len(labels) - count} more"
        text = opening + listed + ending
        if len(text) <= room:
            return text
    return short(f"{opening}{len(labels)} springs{ending}", room)


def shaft_residuals(
    table: CaseTable,
    load_spans: FloatArray,
    element_stiffness: FloatArray,
    reactions: FloatArray,
    gear_torques: FloatArray,
) -> tuple[FloatArray, FloatArray]:
    """Sum of the torques on every shaft, and the largest allowed, per case, variant and shaft.

    Parameters
    ----------
    table
        The system (its point torques, distributed torques, supports and gears).
    load_spans
        (n_variants or 1, n_distributed) length of each distributed torque's span (m).
    element_stiffness
        (n_variants or 1, n_elements) every element's stiffness (N·m/rad).
    reactions
        (n_cases, n_variants, n_supports) support reactions of the load cases (N·m).
    gear_torques
        (n_cases, n_variants, n_gears, 2) mesh torques on gear a's and gear b's shafts (N·m).

    Returns
    -------
    residual, tolerance
        (n_cases, n_variants, n_shafts) ΣT on each shaft and the largest allowed on it (N·m):
        :data:`EQUILIBRIUM_LIMIT` times the sum of the magnitudes of the torques loading the
        shaft's system — the shafts gear meshes join to it (:func:`shaft_groups`): point
        torques, ∫|t| of distributed ones, springs' k·|θ̄|, fixed supports' reactions (what a
        prescribed rotation loads the system with) — and
        :data:`ROUNDING_UNITS`·ε times the stiffest element's stiffness times the largest
        prescribed rotation; never below 10⁻²⁹⁹ N·m (the smallest normal float over
        :data:`EQUILIBRIUM_LIMIT`).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8 (ΣT = 0 on a free body).
    """
    n_cases, n_variants = reactions.shape[:2]
    n_shafts = len(table.segments.shaft_ids)
    residual = np.zeros((n_cases, n_variants, n_shafts))
    # Σ|T| of each system, at the number of its group: shafts no gear joins are systems of their
    # own, whose rounding a large torque on another shaft must not hide (a shaft on one spring,
    # 4.6e-8 of its own load out of balance, passed against 1e-9 of 2862 N·m on another shaft).
    group = shaft_groups(table)
    scale = np.zeros((n_cases, n_variants, n_shafts))
    every = slice(None)
    # Index tuples typed Any: numpy's stubs do not take slices in ufunc.at.
    point: Any = (table.torque_case, every, table.torque_shaft)
    np.add.at(residual, point, table.torque.T)
    point_system: Any = (table.torque_case, every, group[table.torque_shaft])
    np.add.at(scale, point_system, np.abs(table.torque.T))
    if len(table.load_case):
        intensity = table.load_intensity  # (n_variants or 1, n_distributed, 2)
        totals = 0.5 * intensity.sum(axis=2) * load_spans
        distributed: Any = (table.load_case, every, table.load_shaft)
        np.add.at(residual, distributed, totals.T)
        distributed_system: Any = (table.load_case, every, group[table.load_shaft])
        magnitudes = 0.5 * np.abs(intensity).sum(axis=2) * load_spans
        np.add.at(scale, distributed_system, magnitudes.T)
    on_supports: Any = (every, every, table.support_shaft)
    np.add.at(residual, on_supports, reactions)
    if len(table.gear_x):
        on_gears: Any = (every, every, table.gear_shaft.ravel())
        np.add.at(residual, on_gears, gear_torques.reshape(n_cases, n_variants, -1))
    springs = ~table.support_fixed
    preload = np.abs(table.support_stiffness[:, springs] * table.support_rotation[:, springs])
    preload_system: Any = (every, every, group[table.support_shaft[springs]])
    np.add.at(scale, preload_system, np.broadcast_to(preload, (n_cases, *preload.shape)))
    fixed_system: Any = (every, every, group[table.support_shaft[table.support_fixed]])
    np.add.at(scale, fixed_system, np.abs(reactions[..., table.support_fixed]))
    scale = scale[..., group]  # each shaft's system's
    prescribed = np.abs(table.support_rotation).max(axis=1, initial=0.0)
    stiffest = element_stiffness.max(axis=1, initial=0.0)
    rounding = (ROUNDING_UNITS * np.finfo(float).eps * stiffest * prescribed)[:, None]
    # Below the smallest normal float a residual has no relative precision left: torques
    # under 10⁻²⁹⁹ N·m count as zero here.
    floor = np.finfo(float).tiny / EQUILIBRIUM_LIMIT
    return residual, np.maximum(EQUILIBRIUM_LIMIT * scale + rounding, floor)


def rotation_warning(
    angle: FloatArray,
    station_shaft: IntArray,
    station_x: FloatArray,
    table: CaseTable,
    names: tuple[str, ...],
) -> str | None:
    """The warning for rotations beyond :data:`ROTATION_LIMIT`, or ``None``.

    Parameters
    ----------
    angle
        (n_results, n_stations) rotations (rad).
    station_shaft, station_x
        (n_stations,) the shaft and position (m) of every station.
    table
        The system (its shaft ids and load-case count).
    names
        Result names (load cases, then combinations).

    Returns
    -------
    str or None
        One line (no "warning:" prefix) naming the largest rotation, where and in which result.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 (the torsion formulas assume
       small strains and rotations: radii stay straight and cross-sections plane).
    """
    if not angle.size:
        return None
    largest = np.abs(angle)
    flat = int(np.argmax(largest))
    row, station = np.unravel_index(flat, angle.shape)
    value = float(largest[row, station])
    if not value > ROTATION_LIMIT:
        return None
    kind = "combination" if row >= table.n_cases else "load case"
    shaft_id = table.segments.shaft_ids[int(station_shaft[station])]
    text = (
        f"rotations reach {quote(value, 'angle')} ({value:.3g} rad; shaft "
        f"{short(shaft_id, 30)!r} at x={quote(float(station_x[station]), 'length')}, {kind} "
        f"{short(names[row], 30)!r}), beyond {ROTATION_LIMIT:g} rad: outside the small-rotation "
        "theory these results rest on"
    )
    return short(text, MESSAGE_LIMIT - len("warning: "))


__all__ = [
    "EQUILIBRIUM_LIMIT",
    "RCOND_LIMIT",
    "ROTATION_LIMIT",
    "ROUNDING_UNITS",
    "Soundness",
    "rcond_limit",
    "rotation_warning",
    "shaft_groups",
    "shaft_residuals",
]
