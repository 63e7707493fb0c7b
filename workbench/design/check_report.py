"""What the checks report: one :class:`Check` per governing value, the :class:`CheckReport`.

Also the report as the ``workbench check --json`` document and as readable text, with the plastic
reserve of round segments beside it (information, not a check). Every report carries the caution
that results must be verified against applicable codes and licensed professional practice.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.units import UnitSystem
from workbench.design.caution import CAUTION
from workbench.design.fatigue_check import FatiguePoint
from workbench.design.plastic import plastic_reserve
from workbench.design.static_checks import StaticCheckInputs, StaticUtilisations
from workbench.design.verdict import WithinLimit
from workbench.solver.analysis import Results
from workbench.solver.sections import SolidCircle, Tube

#: Check kinds and the quantity their value and limit are measured in.
CHECK_QUANTITIES: dict[str, str] = {
    "shear_stress": "stress",
    "shoulder_stress": "stress",
    "keyseat_stress": "stress",
    "notch_stress": "stress",
    "cross_hole_stress": "stress",
    "twist_rate": "twist_rate",
    "rotation": "angle",
    "frequency_separation": "speed",
    # Open sections in restrained torsion (workbench.design.warping_checks).
    "warping_normal_stress": "stress",
    "warping_shear_stress": "stress",
    "warping_combined_stress": "stress",
    # Fatigue rows are dimensionless: value 1/n, limit 1/n_required.
    "fatigue": "ratio",
    "first_cycle_yield": "ratio",
}


@dataclass(frozen=True)
class Check(WithinLimit):
    """One check: the governing value of one quantity of one segment in one result.

    Attributes
    ----------
    result
        Load case or combination name.
    shaft
        Shaft id.
    segment
        Segment index on the shaft (``None`` for a rotation limit between stations).
    kind
        One of :data:`CHECK_QUANTITIES`.
    value
        Governing value (SI: Pa, rad/m or rad).
    limit
        Its limit (same unit).
    x
        Where it governs (m).
    note
        How the value and limit were obtained (criterion, factors, ranges).
    """

    result: str
    shaft: str
    segment: int | None
    kind: str
    value: float
    limit: float
    x: float
    note: str = ""


@dataclass(frozen=True)
class StaticArrays:
    """The arrays behind a report's static check rows: a batch of one variant, judged.

    Attributes
    ----------
    inputs
        What :func:`~workbench.design.static_checks.static_utilisations` judged (V = 1).
    judged
        What it found (values, limits, stations of every kind, segment and result).
    shafts, numbers
        (G,) shaft id and index on its shaft of each segment of the arrays.
    """

    inputs: StaticCheckInputs
    judged: StaticUtilisations
    shafts: tuple[str, ...]
    numbers: tuple[int, ...]


@dataclass(frozen=True)
class CheckReport:
    """All checks of a solved model.

    Attributes
    ----------
    results
        The results checked.
    design
        The criteria used.
    checks
        Every check, by result, shaft, segment, kind.
    notes
        Remarks that apply to the whole report (ranges of fits, defaults used).
    fatigue_points
        The governing stress cycle of each segment, when the design asks for a fatigue check.
    modes
        The natural modes (:class:`workbench.solver.modes.Modes`) the frequency-separation
        checks used, when the case has running speeds; ``None`` otherwise.
    static
        The arrays the static checks judged (:class:`StaticArrays`), for drawing the stresses
        the rows report; ``None`` for a report built from rows alone.
    frequencies_pending
        ``None`` once every check has run. Otherwise the report is partial: the case has
        running speeds but its frequency-separation checks are still to run (``run_checks(...,
        frequencies=False)``), and this is where their rows and notes go (an index in
        ``checks`` and one in ``notes``); :func:`workbench.design.checks.with_frequency_checks`
        completes it. A partial report's :attr:`passes` is no verdict.
    """

    results: Results
    design: DesignCriteria
    checks: tuple[Check, ...]
    notes: tuple[str, ...] = field(default=())
    fatigue_points: tuple[FatiguePoint, ...] = field(default=())
    modes: Any = None
    static: StaticArrays | None = field(default=None, repr=False, compare=False)
    frequencies_pending: tuple[int, int] | None = None

    @property
    def complete(self) -> bool:
        """Whether every check of the case has run (see :attr:`frequencies_pending`)."""
        return self.frequencies_pending is None

    @property
    def passes(self) -> bool:
        """Whether every check passes."""
        return all(check.passes for check in self.checks)

    @property
    def governing(self) -> Check | None:
        """The check with the largest utilisation."""
        return max(self.checks, key=lambda check: check.utilisation, default=None)

    def to_frame(self, units: UnitSystem | None = None) -> Any:
        """The checks as a pandas DataFrame, values in ``units`` (default: the case's)."""
        import pandas as pd  # noqa: PLC0415

        units = units or self.results.model.units
        rows = [check_row(check, units) | {"note": check.note} for check in self.checks]
        return pd.DataFrame(rows, columns=[*_ROW_KEYS, "note"])

    def governing_by_kind(self) -> list[Check]:
        """The governing check of each segment and kind over all results, in first-seen order."""
        governing: dict[tuple[str, int | None, str], Check] = {}
        for check in self.checks:
            key = (check.shaft, check.segment, check.kind)
            if key not in governing or check.utilisation > governing[key].utilisation:
                governing[key] = check
        return list(governing.values())

    def segment_utilisation(self) -> dict[tuple[str, int], Check]:
        """The governing check of each (shaft, segment) over all results and kinds."""
        governing: dict[tuple[str, int], Check] = {}
        for check in self.checks:
            if check.segment is None:
                continue
            key = (check.shaft, check.segment)
            if key not in governing or check.utilisation > governing[key].utilisation:
                governing[key] = check
        return governing


@dataclass(frozen=True)
class PlasticReserveRow:
    """Yield and fully plastic torque of a round segment against its largest torque.

    Attributes
    ----------
    shaft, segment
        Which segment.
    shear_yield
        Shear yield strength used (Pa): Sy/2 for Tresca, Sy/√3 otherwise.
    yield_torque, plastic_torque
        T_y = τ_y·J/c and T_p (N·m), elastic–perfectly plastic material.
    largest_torque
        Largest |T| in the segment over every result (N·m).
    """

    shaft: str
    segment: int
    shear_yield: float
    yield_torque: float
    plastic_torque: float
    largest_torque: float

    @property
    def reserve(self) -> float:
        """T_p / largest |T|: how far the largest torque is from full plastic collapse."""
        return self.plastic_torque / self.largest_torque if self.largest_torque else math.inf


def plastic_reserves(report: CheckReport) -> list[PlasticReserveRow]:
    """Plastic reserve of every one-layer prismatic round segment with a yield strength.

    References
    ----------
    .. [1] Beer, Johnston, DeWolf & Mazurek, *Mechanics of Materials*, plastic deformations in
       circular shafts: T_y = τ_y·J/c, T_p = (2π/3)·τ_y·(c³ − cᵢ³).
    """
    results, rows = report.results, []
    station_shaft = results.mesh.element_shaft[results.mesh.station_element]
    station_segment = results.mesh.element_segment[results.mesh.station_element]
    for shaft_number, shaft in enumerate(results.model.shafts):
        for number, segment in enumerate(shaft.segments):
            section = segment.layers[0].section
            material = segment.layers[0].material
            if (
                len(segment.layers) != 1
                or not isinstance(section, (SolidCircle, Tube))
                or material.yield_strength is None
            ):
                continue
            divisor = 2.0 if report.design.shear_criterion == "tresca" else math.sqrt(3.0)
            shear_yield = material.yield_strength / divisor
            bore = section.inner_diameter if isinstance(section, Tube) else 0.0
            reserve = plastic_reserve(shear_yield, 2.0 * section.outer_radius, bore)
            mask = (station_shaft == shaft_number) & (station_segment == number)
            largest = float(np.abs(results.torque[:, mask]).max())
            rows.append(
                PlasticReserveRow(
                    shaft.id,
                    number,
                    shear_yield,
                    reserve.yield_torque,
                    reserve.plastic_torque,
                    largest,
                )
            )
    return rows


_ROW_KEYS = ("result", "shaft", "segment", "kind", "value", "limit", "utilisation", "passes", "x")


def check_row(check: Check, units: UnitSystem) -> dict[str, Any]:
    """One check as the ``workbench check --json`` row, in ``units``."""
    quantity = CHECK_QUANTITIES[check.kind]
    return {
        "result": check.result,
        "shaft": check.shaft,
        "segment": check.segment,
        "kind": check.kind,
        "value": float(units.from_si(check.value, quantity)),
        "limit": float(units.from_si(check.limit, quantity)),
        "utilisation": float(check.utilisation),
        "passes": bool(check.passes),
        "x": float(units.from_si(check.x, "length")),
    }


def check_document(report: CheckReport, units: UnitSystem | None = None) -> dict[str, Any]:
    """The ``workbench check --json`` document: ``{"passes", "checks", "caution", "notes"}``."""
    units = units or report.results.model.units
    return {
        "passes": report.passes,
        "checks": [check_row(check, units) for check in report.checks],
        "caution": CAUTION,
        "notes": list(report.notes),
    }


def check_text(report: CheckReport, units: UnitSystem | None = None) -> str:
    """Readable check table: the governing check of each segment and kind over all results."""
    from workbench.solver.tables import format_table  # noqa: PLC0415

    units = units or report.results.model.units
    rows = []
    for check in report.governing_by_kind():
        quantity = CHECK_QUANTITIES[check.kind]
        rows.append(
            [
                check.shaft,
                "-" if check.segment is None else str(check.segment),
                check.kind,
                check.result,
                f"{units.from_si(check.value, quantity):.4g}",
                f"{units.from_si(check.limit, quantity):.4g}",
                f"{check.utilisation:.3f}",
                "pass" if check.passes else "FAIL",
                f"{units.from_si(check.x, 'length'):.4g}",
            ]
        )
    lines = [
        "Design checks (governing result of each segment and kind)",
        format_table(
            [
                "shaft",
                "seg",
                "check",
                "governing result",
                "value",
                "limit",
                "utilisation",
                "verdict",
                f"x [{units.label('length')}]",
            ],
            rows,
        ),
        "",
        "units: stress "
        + units.label("stress")
        + ", twist rate "
        + units.label("twist_rate")
        + ", rotation "
        + units.label("angle")
        + (
            ", speed " + units.label("speed")
            if any(check.kind == "frequency_separation" for check in report.checks)
            else ""
        ),
    ]
    allowables = sorted({check.note for check in report.checks if check.kind == "shear_stress"})
    lines += ["allowable: " + note for note in allowables]
    lines += ["note: " + note for note in report.notes]
    reserves = plastic_reserves(report)
    if reserves:
        torque = units.label("torque")
        lines += [
            "",
            "Plastic reserve (elastic–perfectly plastic, round one-layer segments; information)",
            format_table(
                [
                    "shaft",
                    "seg",
                    f"yield torque [{torque}]",
                    f"plastic torque [{torque}]",
                    f"largest |T| [{torque}]",
                    "T_p/|T|",
                ],
                [
                    [
                        row.shaft,
                        str(row.segment),
                        f"{units.from_si(row.yield_torque, 'torque'):.4g}",
                        f"{units.from_si(row.plastic_torque, 'torque'):.4g}",
                        f"{units.from_si(row.largest_torque, 'torque'):.4g}",
                        f"{row.reserve:.3g}",
                    ]
                    for row in reserves
                ],
            ),
        ]
    governing_check = report.governing
    verdict = "ALL CHECKS PASS" if report.passes else "SOME CHECKS FAIL"
    if governing_check is not None:
        lines.append(
            f"\n{verdict} — governing: {governing_check.kind} on {governing_check.shaft} segment "
            f"{governing_check.segment} in {governing_check.result!r}, utilisation "
            f"{governing_check.utilisation:.3f}"
        )
    lines.append(f"\nCaution: {CAUTION}")
    return "\n".join(lines) + "\n"
