"""The Independent check section: the force method beside the stiffness solution.

The check itself is :mod:`workbench.design.independent` (it never uses the solver); this module
only sets its numbers beside the solver's, in the case's units, and says where they disagree or
what the check does not cover.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.case.load import case_file_from_document
from workbench.design.independent import (
    AGREEMENT_TOLERANCE,
    NotCovered,
    compare,
    independent_check,
)
from workbench.record.computation import Computation
from workbench.record.view_model.common import (
    Equation,
    Rows,
    equations,
    number,
    unit_label,
    unit_labels,
)

__all__ = ["HandCheckView", "hand_check_view"]

#: Largest number of redundants whose flexibility matrix the record prints.
_PRINTED_MATRIX = 6


@dataclass(frozen=True)
class HandCheckView:
    """What the independent-check section shows.

    Attributes
    ----------
    not_covered
        Why the check does not cover this case, or ``None`` when it does.
    units
        Labels of the torque unit.
    equations
        The force method's equations.
    released
        Each redundant in words (the primary structure keeps every other link).
    flexibility
        The flexibility matrix f in SI, rows of formatted numbers (empty when large).
    tolerance
        The relative agreement required, as written.
    rows
        Rows: result, quantity, force method, stiffness solution, difference, verdict.
    """

    not_covered: str | None
    units: dict[str, str]
    equations: tuple[Equation, ...] = ()
    released: tuple[str, ...] = ()
    flexibility: Rows | None = None
    tolerance: str = ""
    rows: Rows | None = None


def hand_check_view(computation: Computation) -> tuple[HandCheckView, list[str]]:
    """The independent-check section of a computation and a warning for every disagreement."""
    results, model = computation.results, computation.model
    units = model.units
    labels = unit_labels(units, "torque")
    try:
        solution = independent_check(case_file_from_document(computation.case))
    except NotCovered as reason:
        return HandCheckView(str(reason), labels), [f"independent check: not covered: {reason}"]
    stations = [
        [(result.shafts[shaft].x, result.shafts[shaft].torque) for shaft in results.shaft_ids]
        for result in results
    ]
    comparison = compare(solution, results.reactions, stations)

    def where(quantity: str, index: int) -> str:
        if quantity == "reaction":
            support = model.supports[index]
            x = number(units.from_si(support.x, "length"), 6)
            return f"reaction {index + 1} ({support.shaft}, x = {x} {unit_label(units, 'length')})"
        return f"largest |T| on {results.shaft_ids[index]}"

    def released(kind: str, index: int) -> str:
        if kind == "support":
            return where("reaction", index)
        gear = model.gears[index]
        return f"mesh {index + 1} ({gear.a.shaft}–{gear.b.shaft}): its tooth force"

    rows: Rows = []
    warnings = []
    for row in comparison.rows:
        rows.append(
            [
                row.result,
                where(row.quantity, row.index),
                number(units.from_si(row.independent, "torque"), 9),
                number(units.from_si(row.other, "torque"), 9),
                f"{row.relative_difference:.1e}",
                "agrees" if row.agrees else "DISAGREES",
            ]
        )
        if not row.agrees:
            warnings.append(
                f"independent check of {row.result}, {where(row.quantity, row.index)}: differs "
                f"from the stiffness solution by {row.relative_difference:.1e} (relative)"
            )
    matrix = solution.flexibility
    view = HandCheckView(
        None,
        labels,
        equations=equations("independent"),
        released=tuple(released(kind, index) for kind, index in solution.released),
        flexibility=(
            [[number(value, 6) for value in line] for line in matrix]
            if 0 < len(matrix) <= _PRINTED_MATRIX
            else None
        ),
        tolerance=f"{AGREEMENT_TOLERANCE:.0e}",
        rows=rows,
    )
    return view, warnings
