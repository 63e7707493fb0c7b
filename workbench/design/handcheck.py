"""An independent hand check of the support torques: the force (flexibility) method.

For one shaft held by exactly two supports (fixed or spring, no gears) the system is once
statically indeterminate. The check releases the second support, B, leaving the shaft held at
A alone (the primary structure, statically determinate), and finds

* θ_B0, the rotation at B of the primary structure under the applied loads, by integrating
  T0(x)/(G·J(x)) from A to B with :func:`scipy.integrate.quad`;
* f_BB = f_A + ∫ dx/(G·J), the rotation at B of the primary structure under a unit torque at B
  (f_A = 1/k_A for a spring at A, 0 for a fixed support);

and solves the compatibility equation θ_B0 + R_B·f_BB = r_B − f_B·R_B for the redundant R_B
(r_B the prescribed rotation at B, f_B = 1/k_B), then R_A from equilibrium.

Nothing here calls the stiffness solver: the torsion constants of circular sections are
computed afresh (J = π(D⁴ − d⁴)/32) and the internal torque from statics; only non-circular
sections borrow their torsion constant from the model.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.8
   (statically indeterminate torsional members; superposition and compatibility).
.. [2] R. C. Hibbeler, *Mechanics of Materials*, 10th ed., Pearson, 2017, §5.5.
.. [3] S. P. Timoshenko and J. M. Gere, *Mechanics of Materials*, Van Nostrand, 1972, §3.4.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np
from scipy import integrate

from workbench.solver.model import Model, Segment
from workbench.solver.sections import SolidCircle, TaperedCircle, Tube

__all__ = ["HandCheck", "force_method_check"]

#: Relative agreement the record asks of the two methods (common practice, no source).
AGREEMENT_TOLERANCE = 1e-6


@dataclass(frozen=True)
class HandCheck:
    """Support torques of one load case by the force method, beside the solver's.

    Attributes
    ----------
    result
        Load case or combination name.
    theta_b0
        Rotation at B of the released (primary) shaft under the loads (rad).
    flexibility
        f_BB, rotation at B of the primary shaft per unit torque at B (rad/(N·m)).
    reactions
        (R_A, R_B) by the force method (N·m).
    solver_reactions
        (R_A, R_B) from the stiffness solution (N·m).
    """

    result: str
    theta_b0: float
    flexibility: float
    reactions: tuple[float, float]
    solver_reactions: tuple[float, float]

    @property
    def relative_difference(self) -> float:
        """Largest |R_force − R_solver| over both supports, relative to the largest |R|."""
        scale = max(*(abs(value) for value in self.reactions), 1e-300)
        return max(
            abs(mine - theirs) / scale
            for mine, theirs in zip(self.reactions, self.solver_reactions, strict=True)
        )

    @property
    def agrees(self) -> bool:
        """Whether the two methods agree within :data:`AGREEMENT_TOLERANCE`."""
        return self.relative_difference <= AGREEMENT_TOLERANCE


def _circular_polar_moment(section: object, fraction: float) -> float | None:
    """J = π(D⁴ − d⁴)/32 of a circular section at a fraction of the segment (m⁴).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., eqs. (3-10) and (3-23).
    """
    if isinstance(section, SolidCircle):
        return math.pi * section.diameter**4 / 32.0
    if isinstance(section, Tube):
        return math.pi * (section.outer_diameter**4 - section.inner_diameter**4) / 32.0
    if isinstance(section, TaperedCircle):
        diameter = (
            section.diameter_start + (section.diameter_end - section.diameter_start) * fraction
        )
        return math.pi * (diameter**4 - section.bore**4) / 32.0
    return None


def _rigidity(segment: Segment, fraction: float) -> float:
    """G·J of a segment at a fraction of its length (N·m²); layers add."""
    total = 0.0
    for layer in segment.layers:
        polar = _circular_polar_moment(layer.section, fraction)
        if polar is None:
            # Non-circular: the torsion constant is a section property, not part of the solver.
            single = Segment(segment.length, (layer,))
            total += float(single.torsional_rigidity_at(np.array([fraction]))[0])
        else:
            total += layer.material.shear_modulus * polar
    return total


def applicable(model: Model) -> str | None:
    """Why the force-method check does not apply, or ``None`` when it does."""
    if len(model.shafts) != 1:
        return f"the case has {len(model.shafts)} shafts; the check covers a single shaft"
    if model.gears:
        return "the case has gears; the check covers a shaft without gears"
    if len(model.supports) != 2:
        return (
            f"the shaft has {len(model.supports)} supports; the check covers exactly two "
            "(one redundant)"
        )
    return None


def force_method_check(model: Model, solver_reactions: np.ndarray) -> list[HandCheck]:
    """Support torques of every load case and combination by the force method.

    Parameters
    ----------
    model
        A single shaft on two supports, no gears (see :func:`applicable`), SI.
    solver_reactions
        (n_results, 2) support torques of the stiffness solution (N·m), load cases then
        combinations, to set beside the hand values.

    Returns
    -------
    list of HandCheck
        One per load case, then one per combination (by superposition of the load cases'
        hand values).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8.
    """
    shaft = model.shafts[0]
    first, second = sorted(model.supports, key=lambda support: support.x)
    bounds = shaft.boundaries
    start, end = first.x, second.x
    order = [model.supports.index(first), model.supports.index(second)]

    def rigidity_at(x: float) -> float:
        number = int(np.clip(np.searchsorted(bounds, x, side="right") - 1, 0, len(bounds) - 2))
        segment = shaft.segments[number]
        return _rigidity(segment, (x - bounds[number]) / segment.length)

    compliance_a = 0.0 if first.kind == "fixed" else 1.0 / float(first.stiffness or math.inf)
    compliance_b = 0.0 if second.kind == "fixed" else 1.0 / float(second.stiffness or math.inf)
    base_breaks = [float(b) for b in bounds if start < b < end]
    flexibility_span = _integrate(lambda x: 1.0 / rigidity_at(x), start, end, base_breaks)
    flexibility = compliance_a + flexibility_span

    per_case: list[tuple[float, float, float]] = []
    for case in model.load_cases:
        points = [(t.x, t.torque) for t in case.torques]
        spans = list(case.distributed)
        applied_total = sum(t for _, t in points) + sum(d.resultant for d in spans)

        def applied_before(
            x: float, points: list[tuple[float, float]] = points, spans: list = spans
        ) -> float:
            total = sum(torque for position, torque in points if position < x)
            for load in spans:
                upper = min(x, load.end)
                if upper > load.start:
                    # ∫ linear intensity from start to upper (trapezoid is exact for a line).
                    q_start = load.intensity_start
                    q_upper = float(load.intensity_at(np.array([upper]))[0])
                    total += 0.5 * (q_start + q_upper) * (upper - load.start)
            return total

        # Primary structure: only A holds the shaft, R_A0 = −Σ applied.
        reaction_a0 = -applied_total
        breaks = sorted(
            {
                *base_breaks,
                *(p for p, _ in points if start < p < end),
                *(v for d in spans for v in (d.start, d.end) if start < v < end),
            }
        )
        rotation_a0 = first.rotation - compliance_a * reaction_a0

        def primary_torque(
            x: float, reaction_a0: float = reaction_a0, applied_before: object = applied_before
        ) -> float:
            # T(x) = −(sum of external torques on [0, x)), A included for x > x_A.
            return -(reaction_a0 + applied_before(x))  # type: ignore[operator]

        theta_b0 = rotation_a0 + _integrate(
            lambda x: primary_torque(x) / rigidity_at(x), start, end, breaks
        )
        redundant = (second.rotation - theta_b0) / (flexibility + compliance_b)
        per_case.append((theta_b0, -applied_total - redundant, redundant))

    checks: list[HandCheck] = []
    names = [case.name for case in model.load_cases]
    rows: list[tuple[str, float, float, float]] = [
        (name, theta, ra, rb) for name, (theta, ra, rb) in zip(names, per_case, strict=True)
    ]
    for combination in model.combinations:
        factors = dict(combination.factors)
        theta = sum(factors.get(n, 0.0) * v[0] for n, v in zip(names, per_case, strict=True))
        ra = sum(factors.get(n, 0.0) * v[1] for n, v in zip(names, per_case, strict=True))
        rb = sum(factors.get(n, 0.0) * v[2] for n, v in zip(names, per_case, strict=True))
        rows.append((combination.name, theta, ra, rb))
    for row, (name, theta, ra, rb) in enumerate(rows):
        solver = np.asarray(solver_reactions[row], dtype=float)
        checks.append(
            HandCheck(
                result=name,
                theta_b0=float(theta),
                flexibility=float(flexibility),
                reactions=(float(ra), float(rb)),
                solver_reactions=(float(solver[order[0]]), float(solver[order[1]])),
            )
        )
    return checks


def _integrate(function: object, start: float, end: float, breaks: list[float]) -> float:
    """∫ function over [start, end], piece by piece between breaks (jumps and kinks)."""
    edges = [start, *sorted(b for b in breaks if start < b < end), end]
    total = 0.0
    for low, high in itertools.pairwise(edges):
        if high - low <= 0.0:
            continue
        # quad never evaluates the ends, so a jump at an edge does not disturb the piece.
        value, _ = integrate.quad(function, low, high, epsabs=0.0, epsrel=1e-12, limit=200)
        total += value
    return total
