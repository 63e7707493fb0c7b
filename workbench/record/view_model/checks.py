"""The Design checks section: the verdict, the governing check, and every check's row.

The verifier rebuilds this section from the signed case and looks for it in the record, so it
must come out byte for byte as it always has.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from workbench.design.checks import CHECK_QUANTITIES, CheckReport
from workbench.design.warping_checks import WARPING_KINDS
from workbench.record.view_model.common import Rows, number, unit_labels

__all__ = ["ChecksView", "checks_view"]


@dataclass(frozen=True)
class ChecksView:
    """What the Design checks section shows.

    Attributes
    ----------
    passes
        Whether every check passes.
    governing
        The governing check (kind, shaft, segment, result, utilisation as written), or ``None``.
    units
        Labels of the stress, rate-of-twist and rotation units.
    rows
        One row per check: result, shaft, segment, check, value, limit, utilisation, verdict.
    allowables
        How each allowable shear stress was found (one line each, sorted).
    row_classes
        The class of each row: ``fail`` for a failing check (shown marked on screen and in
        print), ``""`` otherwise; empty when rows are not marked.
    warping_notes
        What each warping check row added and where it governs, one line per row (empty for a
        case whose sections do not warp, whose section is then as it always was).
    """

    passes: bool
    governing: dict[str, str] | None
    units: dict[str, str]
    rows: Rows
    allowables: list[str]
    row_classes: list[str]
    warping_notes: list[str] = field(default_factory=list)


def checks_view(report: CheckReport, printed: bool = True, marked: bool = True) -> ChecksView:
    """The Design checks section of ``report``, values in the case's units.

    Parameters
    ----------
    report
        The checks.
    printed
        Units as the unit library prints them (``N·m``), else as the case file writes them.
    marked
        Whether failing rows carry the class ``fail``.
    """
    units = report.results.model.units
    rows: Rows = []
    for check in report.checks:
        quantity = CHECK_QUANTITIES[check.kind]
        rows.append(
            [
                check.result,
                check.shaft,
                "—" if check.segment is None else check.segment,
                check.kind,
                number(units.from_si(check.value, quantity)),
                number(units.from_si(check.limit, quantity)),
                f"{check.utilisation:.3f}",
                "pass" if check.passes else "FAIL",
            ]
        )
    governing = report.governing
    return ChecksView(
        passes=report.passes,
        governing=None
        if governing is None
        else {
            "kind": governing.kind,
            "shaft": governing.shaft,
            "segment": str(governing.segment),
            "result": governing.result,
            "utilisation": f"{governing.utilisation:.3f}",
        },
        units=unit_labels(units, "stress", "twist_rate", "angle", printed=printed),
        rows=rows,
        allowables=sorted(
            {check.note for check in report.checks if check.kind == "shear_stress" and check.note}
        ),
        row_classes=[("" if check.passes else "fail") for check in report.checks] if marked else [],
        warping_notes=[
            f"{check.result}, shaft {check.shaft} segment {check.segment}, {check.kind}: "
            f"{check.note}"
            for check in report.checks
            if check.kind in WARPING_KINDS
        ],
    )
