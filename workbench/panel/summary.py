"""The summary, the check table, the caution and the baseline comparison, from the solver's results.

Plain HTML tables of what :func:`~workbench.solver.analysis.solve` and
:func:`~workbench.solver.checks.run_checks` gave, converted to the panel's units; nothing here
computes mechanics.
"""

from __future__ import annotations

import html
from typing import Any

import ipywidgets as w
import numpy as np

from workbench.panel.document import unit_label
from workbench.solver.analysis import Results
from workbench.solver.checks import CAUTION, CHECK_QUANTITIES, CheckReport
from workbench.solver.units import UnitSystem


def key_values(
    results: Results, report: CheckReport, result: str, units: UnitSystem
) -> dict[str, float]:
    """Headline values of a result in the panel's units (for the summary and the comparison).

    Parameters
    ----------
    results, report
        A solve and its checks.
    result
        The load case or combination (the first result when the name is unknown).
    units
        The panel's units.
    """
    row = results.index(result) if result in results.names else 0
    governing = report.governing
    values = {
        "governing utilisation": governing.utilisation if governing else float("nan"),
        f"largest shear stress [{unit_label(units, 'stress')}]": float(
            units.from_si(results.shear_stress[row].max(), "stress")
        ),
        f"largest |angle of twist| [{unit_label(units, 'angle')}]": float(
            units.from_si(np.abs(results.angle[row]).max(), "angle")
        ),
        f"largest |internal torque| [{unit_label(units, 'torque')}]": float(
            units.from_si(np.abs(results.torque[row]).max(), "torque")
        ),
    }
    for n, reaction in enumerate(results.reactions[row]):
        values[f"reaction {n} [{unit_label(units, 'torque')}]"] = float(
            units.from_si(reaction, "torque")
        )
    return values


def summary_html(values: dict[str, float], report: CheckReport, result: str) -> str:
    """The verdict, where it governs, and the headline ``values`` of the result shown."""
    governing = report.governing
    verdict = "all checks pass" if report.passes else "SOME CHECKS FAIL"
    where = ""
    if governing is not None:
        where = (
            f" ({governing.kind.replace('_', ' ')}, {governing.shaft} segment "
            f"{governing.segment}, {html.escape(governing.result)})"
        )
    cells = "".join(
        f"<tr><th>{html.escape(k)}</th><td class='wb-value' data-key='{html.escape(k)}'>"
        f"{v:.4g}</td></tr>"
        for k, v in values.items()
    )
    return (
        f"<b>{verdict}</b>{where} — showing <i>{html.escape(result)}</i>"
        f"<table class='wb-table'>{cells}</table>"
    )


def checks_html(report: CheckReport, units: UnitSystem) -> str:
    """The governing result of each segment and check, one row each."""
    governing: dict[tuple[str, Any, str], Any] = {}
    for check in report.checks:
        key = (check.shaft, check.segment, check.kind)
        if key not in governing or check.utilisation > governing[key].utilisation:
            governing[key] = check
    head = (
        "<tr><th>shaft</th><th>segment</th><th>check</th><th>governing result</th>"
        "<th>value</th><th>limit</th><th>unit</th><th>utilisation</th><th>verdict</th>"
        f"<th>x [{unit_label(units, 'length')}]</th></tr>"
    )
    rows = []
    for check in governing.values():
        quantity = CHECK_QUANTITIES[check.kind]
        verdict = "pass" if check.passes else "<span class='wb-fail'>FAIL</span>"
        unit = unit_label(units, quantity) if quantity else ""
        rows.append(
            f"<tr><td>{html.escape(check.shaft)}</td>"
            f"<td>{'-' if check.segment is None else check.segment}</td>"
            f"<td>{check.kind.replace('_', ' ')}</td><td>{html.escape(check.result)}</td>"
            f"<td>{units.from_si(check.value, quantity):.4g}</td>"
            f"<td>{units.from_si(check.limit, quantity):.4g}</td>"
            f"<td>{unit}</td><td>{check.utilisation:.3f}</td>"
            f"<td>{verdict}</td><td>{units.from_si(check.x, 'length'):.4g}</td></tr>"
        )
    return f"<table class='wb-table'>{head}{''.join(rows)}</table>"


def caution_html(report: CheckReport) -> str:
    """The standing caution, with the notes of the checks."""
    notes = "".join(f"<br>• {html.escape(n)}" for n in report.notes)
    return f"<div class='wb-caution'><b>Caution.</b> {CAUTION}{notes}</div>"


def difference_html(now: dict[str, float], before: dict[str, float] | None) -> str:
    """The headline values now against the baseline's (``None``: no baseline pinned)."""
    if before is None:
        return "<i>No baseline pinned: pin one, then edit, to compare.</i>"
    rows = []
    for key, value in now.items():
        old = before.get(key, float("nan"))
        change = value - old
        share = f"{change / old:+.1%}" if old else "-"
        rows.append(
            f"<tr><th>{html.escape(key)}</th><td>{old:.4g}</td><td>{value:.4g}</td>"
            f"<td>{change:+.4g}</td><td>{share}</td></tr>"
        )
    head = "<tr><th></th><th>baseline</th><th>now</th><th>change</th><th>%</th></tr>"
    return f"<table class='wb-table'>{head}{''.join(rows)}</table>"


class ResultTables:
    """The summary above the charts, the check table and the caution below them."""

    def __init__(self) -> None:
        self.summary = w.HTML()
        self.summary.add_class("wb-summary")
        self.check_table = w.HTML()
        self.check_table.add_class("wb-checks")
        self.caution = w.HTML()

    def draw(
        self, values: dict[str, float], report: CheckReport, result: str, units: UnitSystem
    ) -> None:
        """Fill the three from the checks and the headline values (:func:`key_values`)."""
        self.summary.value = summary_html(values, report, result)
        self.check_table.value = checks_html(report, units)
        self.caution.value = caution_html(report)
