"""The summary, the check table, the caution and the baseline comparison, from the solver's results.

Tables of what :func:`~workbench.solver.analysis.solve` and
:func:`~workbench.design.checks.run_checks` gave, converted to the panel's units (HTML from
:mod:`workbench.panel.markup`); nothing here computes mechanics.
"""

from __future__ import annotations

import ipywidgets as w
import numpy as np

from workbench.case.display import format_number
from workbench.case.units import UnitSystem
from workbench.design.caution import CAUTION
from workbench.design.checks import CHECK_QUANTITIES, CheckReport
from workbench.panel.document import unit_label
from workbench.panel.markup import render
from workbench.solver.analysis import Results


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


def summary_html(
    values: dict[str, float],
    report: CheckReport,
    result: str,
    stale: str | None = None,
    warnings: tuple[str, ...] = (),
) -> str:
    """The verdict, where it governs, and the headline ``values`` of the result shown.

    ``stale``: why the case as edited is not solved (the field and its message). There is then
    no verdict, only the last valid case's values (a pass of that case is no pass of this one).
    ``warnings``: the results' cautions (:attr:`Results.warnings`), each a line under the verdict.
    """
    cautions = "".join(render("warning", f"Warning: {text}") for text in warnings)
    if stale is not None:
        verdict = f"{STALE_VERDICT} — {stale}"
        return render("summary", verdict, None, result, _cells(values)) + cautions
    if not report.complete:
        return render("summary", UPDATING_VERDICT, None, result, _cells(values), True) + cautions
    governing = report.governing
    where = None
    if governing is not None:
        kind = governing.kind.replace("_", " ")
        where = (kind, governing.shaft, governing.segment, governing.result)
    verdict = "all checks pass" if report.passes else "SOME CHECKS FAIL"
    return render("summary", verdict, where, result, _cells(values)) + cautions


#: The summary's verdict while the case as edited is not solved (the reason follows).
STALE_VERDICT = "NOT SOLVED: no verdict (values of the last valid case, dimmed)"


#: The summary's verdict while the frequency checks of the case as edited still run (its values
#: are current; a verdict without those checks could pass a case they fail).
UPDATING_VERDICT = "CHECKING: natural frequencies being worked out, no verdict yet"


def _cells(values: dict[str, float]) -> list[tuple[str, str]]:
    return [(key, format_number(value)) for key, value in values.items()]


def checks_html(report: CheckReport, units: UnitSystem, stale: str | None = None) -> str:
    """The governing result of each segment and check, one row each.

    ``stale``: why the case as edited is not solved; the rows are then the last valid case's,
    headed so, and their verdicts read "was pass" / "was FAIL".
    """
    unit_of = {quantity: unit_label(units, quantity) for quantity in set(CHECK_QUANTITIES.values())}
    rows = [
        (
            check.shaft,
            "-" if check.segment is None else check.segment,
            check.kind.replace("_", " "),
            check.result,
            format_number(units.to_readout(check.value, CHECK_QUANTITIES[check.kind])),
            format_number(units.to_readout(check.limit, CHECK_QUANTITIES[check.kind])),
            unit_of[CHECK_QUANTITIES[check.kind]],
            f"{check.utilisation:.3f}",
            check.passes,
            format_number(units.to_readout(check.x, "length")),
        )
        for check in report.governing_by_kind()
    ]
    return render("checks", unit_label(units, "length"), rows, stale, not report.complete)


def difference_html(now: dict[str, float], before: dict[str, float] | None) -> str:
    """The headline values now against the baseline's (``None``: no baseline pinned)."""
    if before is None:
        return render("difference", None)
    rows = []
    for key, value in now.items():
        old = before.get(key, float("nan"))
        change = value - old
        share = f"{change / old:+.1%}" if old else "-"
        sign = "+" if change > 0 else ""
        rows.append(
            (key, [format_number(old), format_number(value), sign + format_number(change), share])
        )
    return render("difference", rows)


class ResultTables:
    """The summary above the charts, the check table and the caution below them."""

    def __init__(self) -> None:
        self.summary = w.HTML()
        self.summary.add_class("wb-summary")
        self.check_table = w.HTML()
        self.check_table.add_class("wb-checks")
        self.caution = w.HTML()
        self._shown: (
            tuple[dict[str, float], CheckReport, str, UnitSystem, tuple[str, ...]] | None
        ) = None
        self._stale: str | None = None

    def draw_summary(
        self,
        values: dict[str, float],
        report: CheckReport,
        result: str,
        units: UnitSystem,
        stale: str | None = None,
        warnings: tuple[str, ...] = (),
    ) -> None:
        """The summary above the charts from the headline values (:func:`key_values`).

        ``stale``: why the case as edited is not solved; these are then the last valid case's,
        shown dimmed and without a verdict. ``warnings``: the results' cautions. The check table follows with :meth:`draw_checks`.
        """
        self._shown = (values, report, result, units, warnings)
        self._stale = stale
        self.summary.value = summary_html(values, report, result, stale, warnings)
        self._dim(self.summary, stale is not None)

    def draw_checks(self) -> None:
        """The check table and the caution below the charts, of the summary last drawn."""
        if self._shown is None:
            return
        _, report, _, units, _ = self._shown
        self.check_table.value = checks_html(report, units, self._stale)
        self.caution.value = render("caution", CAUTION, report.notes)
        self._dim(self.check_table, self._stale is not None)

    def show_stale(self, why: str) -> None:
        """The case as edited is not solved (``why``): no verdict; values and checks dimmed."""
        if self._shown is not None:
            values, report, result, units, warnings = self._shown
            self.summary.value = summary_html(values, report, result, why, warnings)
            self.check_table.value = checks_html(report, units, why)
        for widget in (self.summary, self.check_table):
            self._dim(widget, True)

    @staticmethod
    def _dim(widget: w.HTML, stale: bool) -> None:
        if stale:
            widget.add_class("wb-stale")
        else:
            widget.remove_class("wb-stale")
