"""Design checks: from results to a verdict, segment by segment, result by result.

For every load case and combination, every shaft and every segment, the checks find the governing
(largest) value of each quantity, compare it with its limit and report the utilisation
(value/limit) and where it governs:

* ``shear_stress`` — the largest shear stress over the segment's sections and layers against the
  allowable shear stress of the layer's material (criterion and factor of safety of the case's
  ``design``);
* ``shoulder_stress`` — Kts·τ_nom at a shoulder fillet (segment ``fillet_radius``), the nominal
  stress taken on the smaller diameter at the shoulder;
* ``keyseat_stress`` — Kts·τ with the end-milled keyseat factor; under the shafting code with
  ``keyway`` τ alone, the code's × 0.75 on the allowable being its keyway allowance (the row's
  note says so);
* ``notch_stress`` — Kts·τ with the factor the case states for a segment's ``notch`` (a groove,
  a spline run-out, …);
* ``cross_hole_stress`` — the equivalent shear stress of the peak normal stress at a transverse
  hole;
* ``twist_rate`` — the largest |T|/(G·K) along the segment against ``max_twist_rate``;
* ``rotation`` — |θ(end) − θ(start)| between two stations against a limit;
* ``frequency_separation`` — each natural frequency of torsional vibration near a running-speed
  band (``operating_speeds``) against the band widened by ``frequency_margin``
  (:mod:`workbench.solver.modes`; ``segment`` is ``None``).

* ``fatigue`` and ``first_cycle_yield`` — the fatigue check of ``design.fatigue``
  (:mod:`workbench.design.fatigue_check`).

The static checks of the segments are array functions (:mod:`workbench.design.static_checks`)
that judge a batch of variants of one topology at once; :func:`run_checks` prepares the one
model's arrays (:func:`model_check_inputs`), judges them as a batch of one, and turns the arrays
into the rows of a :class:`CheckReport` (:mod:`workbench.design.check_report`, whose names are
importable from here too).

Every report carries the caution that results must be verified against applicable codes and
licensed professional practice.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.case.units import display_units
from workbench.design.allowables import TWENTY_DIAMETERS_SOURCE, twenty_diameters_label
from workbench.design.check_inputs import BatchCheckInputs, batch_check_inputs
from workbench.design.check_layout import (
    CROSS_HOLE,
    KEYSEAT,
    NOTCH,
    SHOULDER,
    CheckLayout,
    check_layout,
)
from workbench.design.check_report import (
    CHECK_QUANTITIES,
    Check,
    CheckReport,
    PlasticReserveRow,
    StaticArrays,
    check_document,
    check_row,
    check_text,
    plastic_reserves,
)
from workbench.design.concentration import ConcentrationFactor
from workbench.design.fatigue_check import FatiguePoint, fatigue_checks
from workbench.design.finite_checks import require_finite_checks
from workbench.design.frequency import frequency_checks, frequency_utilisation_ceiling
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    STATIC_KINDS,
    StaticCheckInputs,
    static_utilisations,
)
from workbench.design.warping_model_checks import warping_rows
from workbench.solver.analysis import Results

__all__ = [
    "CHECK_QUANTITIES",
    "Check",
    "CheckReport",
    "ModelCheckInputs",
    "PlasticReserveRow",
    "check_document",
    "check_row",
    "check_text",
    "frequency_checks",
    "frequency_utilisation_ceiling",
    "model_check_inputs",
    "plastic_reserves",
    "run_checks",
    "with_frequency_checks",
]


@dataclass(frozen=True)
class ModelCheckInputs:
    """One solved model's static checks as a batch of one variant, and what the rows say.

    Attributes
    ----------
    inputs
        The arrays :func:`~workbench.design.static_checks.static_utilisations` judges (V = 1).
    shafts, numbers
        (G,) shaft id and index on its shaft of each segment.
    notes
        (C, G) how each check's value and limit were obtained, by kind of
        :data:`~workbench.design.static_checks.STATIC_KINDS` and segment; for ``shear_stress``
        the first layer's (see ``layer_notes``).
    layer_notes
        (G,) the basis of each layer's allowable, by segment.
    rotation_shafts, rotation_ends
        (L,) the shaft id and end position (m) of each rotation limit.
    report_notes
        Remarks for the whole report (segments not checked, factors outside their data).
    """

    inputs: StaticCheckInputs
    shafts: tuple[str, ...]
    numbers: tuple[int, ...]
    notes: tuple[tuple[str, ...], ...]
    layer_notes: tuple[tuple[str, ...], ...]
    rotation_shafts: tuple[str, ...]
    rotation_ends: tuple[float, ...]
    report_notes: tuple[str, ...]


def _row_notes(
    layout: CheckLayout, batch: BatchCheckInputs, shafts: tuple[str, ...]
) -> tuple[list[list[str]], list[str]]:
    """(C, G) what each check row of a batch of one says, and the report's notes in order.

    The factors are already computed (``batch``); this only words them, segment by segment of
    the segments that have each detail.
    """
    count = layout.segments
    notes = [[""] * count for _ in STATIC_KINDS]
    notes[0] = [bases[0] for bases in layout.layer_notes]
    remarks = list(layout.unchecked)

    def detail(kind: int, index: int, factor: ConcentrationFactor) -> None:
        note = f"K = {factor.value:.3g} ({factor.note}; {factor.source})"
        if not factor.in_range:
            note = "OUTSIDE THE DATA'S RANGE: " + note
            where = f"{shafts[index]} segment {layout.number[index]}"
            remarks.append((index, kind, f"{where}, {CONCENTRATION_KINDS[kind]}: {note}"))
        notes[1 + kind][index] = note

    for index in np.flatnonzero(layout.shoulder).tolist():
        detail(SHOULDER, index, batch.shoulder.at((0, index)))
    for index in np.flatnonzero(layout.keyseat).tolist():
        detail(KEYSEAT, index, layout.keyseat_factor)
    for index in np.flatnonzero(~np.isnan(layout.notch_kts)).tolist():
        label = layout.notch_labels[index]
        stated = ConcentrationFactor(
            float(layout.notch_kts[index]),
            True,
            f"{label}; nominal stress 16T/(πd³)",
            "Kts stated in the case file",
        )
        detail(NOTCH, index, stated)
    divisor = layout.hole_divisor
    for index in np.flatnonzero(layout.cross_hole).tolist():
        factor = batch.cross_hole.at((0, index))
        equivalent = ConcentrationFactor(
            float(batch.inputs.concentration[0, CROSS_HOLE, index]),
            factor.in_range,
            f"Ktg = {factor.value:.3g}, equivalent shear σ_max/{divisor:.4g}; {factor.note}",
            factor.source,
        )
        detail(CROSS_HOLE, index, equivalent)
    for index in np.flatnonzero(~np.isnan(batch.inputs.twist_rate_limit[0])).tolist():
        basis = layout.twist_basis
        if layout.twist_by_diameter:
            diameter = float(batch.twist_diameter[0, index])
            basis = f"{twenty_diameters_label(diameter)}: {TWENTY_DIAMETERS_SOURCE}"
        notes[-1][index] = f"|T|/(G·K), largest along the segment; limit: {basis}"
    remarks.sort(key=lambda remark: remark[:2])  # segment by segment, details then the twist
    return notes, [text for *_, text in remarks]


def model_check_inputs(results: Results, design: DesignCriteria) -> ModelCheckInputs:
    """The arrays of one solved model's static checks, with what each check row will say.

    The model is a batch of one variant of its own topology (:func:`check_layout`,
    :func:`batch_check_inputs`): each stress-concentration fit is evaluated once for all its
    segments.

    Parameters
    ----------
    results
        Solved results (SI).
    design
        Criteria: shear criterion and factor of safety, twist-rate limit, rotation limits.

    Returns
    -------
    ModelCheckInputs
        A batch of one variant, ready for
        :func:`~workbench.design.static_checks.static_utilisations`; stacking the inputs of
        models of one topology (:meth:`StaticCheckInputs.stack`) makes a batch of many.

    Raises
    ------
    InputError
        A detail's factor cannot be found (a cross hole as wide as the shaft where it sits),
        named by the segment's field path.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, ch. 5 and 7 (static shaft design, Kts);
       Norton, *Machine Design*, App. C; Pilkey & Pilkey, *Peterson's Stress Concentration
       Factors*, 3rd ed. (the factors, through :mod:`workbench.design.concentration`).
    """
    mesh = results.mesh
    layout = check_layout(results.model, mesh, design)
    # Where sections warp, the shear τ = T·t/J and the twist rate T/(G·J) are the Saint-Venant
    # part's, G·J·θ′: at a warping restraint the whole torque may be carried by warping.
    torque = results.torque if results.warping is None else results.warping.saint_venant_torque
    batch = batch_check_inputs(
        layout,
        torque[None],
        layout.stress_per_torque[None],
        mesh.station_rigidity[None],
        results.node_angle[None],
    )
    problem = batch.problem(0, layout)
    if problem is not None:
        raise InputError(*problem)
    shafts = tuple(layout.shaft_ids[number] for number in layout.shaft_number.tolist())
    notes, report_notes = _row_notes(layout, batch, shafts)
    return ModelCheckInputs(
        batch.inputs,
        shafts,
        tuple(layout.number.tolist()),
        tuple(tuple(row) for row in notes),
        layout.layer_notes,
        layout.rotation_shafts,
        layout.rotation_ends,
        tuple(report_notes),
    )


def _static_rows(results: Results, prepared: ModelCheckInputs) -> tuple[list[Check], StaticArrays]:
    """The static check rows and the arrays they were read from.

    Rows by segment, kind and result, then the rotations.
    """
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):  # refused by the caller
        judged = static_utilisations(prepared.inputs)
    names = results.names
    value, limit, x = (array[0].tolist() for array in (judged.value, judged.limit, judged.x))
    layer, checked = judged.layer[0].tolist(), judged.checked[0].tolist()
    rows = []
    for index, (shaft, number) in enumerate(zip(prepared.shafts, prepared.numbers, strict=True)):
        for kind_number, kind in enumerate(STATIC_KINDS):
            if not checked[kind_number][index]:
                continue
            for result, name in enumerate(names):
                note = (
                    prepared.layer_notes[index][layer[result][index]]
                    if kind_number == 0
                    else prepared.notes[kind_number][index]
                )
                rows.append(
                    Check(
                        name,
                        shaft,
                        number,
                        kind,
                        value[result][kind_number][index],
                        limit[result][kind_number][index],
                        x[result][kind_number][index],
                        note,
                    )
                )
    rotation = judged.rotation_value[0].tolist()
    for number, (shaft, end) in enumerate(
        zip(prepared.rotation_shafts, prepared.rotation_ends, strict=True)
    ):
        allowed = float(judged.rotation_limit[0, number])
        rows.extend(
            Check(
                name,
                shaft,
                None,
                "rotation",
                rotation[result][number],
                allowed,
                end,
                "|θ(end) − θ(start)|",
            )
            for result, name in enumerate(names)
        )
    return rows, StaticArrays(prepared.inputs, judged, prepared.shafts, prepared.numbers)


def run_checks(
    results: Results, design: DesignCriteria | None = None, *, frequencies: bool = True
) -> CheckReport:
    """Check every segment of every shaft in every load case and combination.

    Parameters
    ----------
    results
        Solved results.
    design
        Criteria; default: the model's ``design``, else :class:`DesignCriteria` defaults (von
        Mises, factor of safety 2, no twist limit), noted in the report.
    frequencies
        Whether to run the frequency-separation checks (an eigensolve). With ``False`` and a
        case with running speeds, the report is partial (``frequencies_pending``):
        :func:`with_frequency_checks` completes it, the same report as with ``True``.

    Returns
    -------
    CheckReport
        Every check, the verdict, and notes.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, ch. 5 and 7 (static shaft design, Kts).
    .. [2] Norton, *Machine Design*, App. C; Pilkey & Pilkey, *Peterson's Stress Concentration
       Factors*, 3rd ed.
    """
    notes = []
    if design is None:
        candidate = results.model.design
        if isinstance(candidate, DesignCriteria):
            design = candidate
        else:
            design = DesignCriteria()
            notes.append(
                "no design criteria in the case: von Mises, factor of safety 2.0, no twist limit"
            )
    token = display_units.set(results.model.units)  # notes quote lengths in the case's units
    try:
        prepared = model_check_inputs(results, design)
        warping = warping_rows(
            results, design, prepared.inputs.segment_start, prepared.shafts, prepared.numbers
        )
        checks, static = _static_rows(results, prepared)
        require_finite_checks(checks, results.model, design)
        require_finite_checks(warping.rows, results.model, design)
        checks.extend(warping.rows)
        notes.extend(prepared.report_notes)
        notes.extend(warping.notes)
        pending = None
        if frequencies:
            frequency_rows, frequency_notes, modes = frequency_checks(results.model, design)
            checks.extend(frequency_rows)
            notes.extend(frequency_notes)
        else:
            modes = None
            if results.model.operating_speeds:
                pending = (len(checks), len(dict.fromkeys(notes)))
        fatigue_points: tuple[FatiguePoint, ...] = ()
        if design.fatigue is not None:
            rows, points = fatigue_checks(results, design.fatigue, notes)
            fatigue_rows = [Check(*row) for row in rows]
            require_finite_checks(fatigue_rows, results.model, design)
            checks.extend(fatigue_rows)
            fatigue_points = tuple(points)
    finally:
        display_units.reset(token)
    return CheckReport(
        results,
        design,
        tuple(checks),
        tuple(dict.fromkeys(notes)),
        fatigue_points,
        modes,
        static,
        pending,
    )


def with_frequency_checks(report: CheckReport) -> CheckReport:
    """A partial report (``run_checks(..., frequencies=False)``) with its frequency checks run.

    The same report as ``run_checks(results)`` would give: the frequency-separation rows and
    notes in their places, the modes they used. A complete report is returned as it is.

    Parameters
    ----------
    report
        A report from :func:`run_checks`.

    References
    ----------
    .. [1] Separation of natural frequencies from running speeds by a margin: common practice,
       no source (see :func:`workbench.design.frequency.frequency_checks`).
    """
    if report.frequencies_pending is None:
        return report
    at_check, at_note = report.frequencies_pending
    model = report.results.model
    rows, notes, modes = frequency_checks(model, report.design)
    checks = (*report.checks[:at_check], *rows, *report.checks[at_check:])
    merged = (*report.notes[:at_note], *notes, *report.notes[at_note:])
    return replace(
        report,
        checks=checks,
        notes=tuple(dict.fromkeys(merged)),
        modes=modes,
        frequencies_pending=None,
    )
