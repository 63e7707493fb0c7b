"""The Independent hand check section: support torques by the force method beside the solver's.

The check itself is :mod:`workbench.design.handcheck`; this module only writes its numbers in
the case's units and says where the two methods disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.design.handcheck import AGREEMENT_TOLERANCE, applicable, force_method_check
from workbench.record.view_model.common import Rows, number
from workbench.solver.analysis import Results

__all__ = ["HandCheckView", "hand_check_view"]


@dataclass(frozen=True)
class HandCheckView:
    """What the hand-check section shows.

    Attributes
    ----------
    not_applicable
        Why the check does not apply to this case, or ``None`` when it does.
    units
        Labels of the angle and torque units.
    flexibility
        f_BB of the first result, rad/(N·m), as written.
    tolerance
        The relative agreement required, as written.
    rows
        Rows: result, θ_B0, R_A by hand and by the solver, R_B likewise, difference, verdict.
    """

    not_applicable: str | None
    units: dict[str, str]
    flexibility: str = ""
    tolerance: str = ""
    rows: Rows | None = None


def hand_check_view(results: Results) -> tuple[HandCheckView, list[str]]:
    """The hand-check section of ``results`` and a warning for every result that disagrees."""
    model = results.model
    units = model.units
    labels = {"angle": units.label("angle"), "torque": units.label("torque")}
    reason = applicable(model)
    if reason is not None:
        return HandCheckView(reason, labels), []
    checks = force_method_check(model, results.reactions)
    rows: Rows = []
    warnings = []
    for check in checks:
        rows.append(
            [
                check.result,
                number(units.from_si(check.theta_b0, "angle"), 6),
                number(units.from_si(check.reactions[0], "torque"), 8),
                number(units.from_si(check.solver_reactions[0], "torque"), 8),
                number(units.from_si(check.reactions[1], "torque"), 8),
                number(units.from_si(check.solver_reactions[1], "torque"), 8),
                f"{check.relative_difference:.1e}",
                "agrees" if check.agrees else "DISAGREES",
            ]
        )
        if not check.agrees:
            warnings.append(
                f"hand check of {check.result}: support torques differ from the stiffness "
                f"solution by {check.relative_difference:.1e} (relative)"
            )
    view = HandCheckView(
        None,
        labels,
        flexibility=number(checks[0].flexibility, 6),
        tolerance=f"{AGREEMENT_TOLERANCE:.0e}",
        rows=rows,
    )
    return view, warnings
