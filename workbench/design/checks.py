"""Design checks: from results to a verdict, segment by segment, result by result.

For every load case and combination, every shaft and every segment, the checks find the governing
(largest) value of each quantity, compare it with its limit and report the utilisation
(value/limit) and where it governs:

* ``shear_stress`` — the largest shear stress over the segment's sections and layers against the
  allowable shear stress of the layer's material (criterion and factor of safety of the case's
  ``design``);
* ``shoulder_stress`` — Kts·τ_nom at a shoulder fillet (segment ``fillet_radius``), the nominal
  stress taken on the smaller diameter at the shoulder;
* ``keyseat_stress`` — Kts·τ with the end-milled keyseat factor;
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

import math
from dataclasses import dataclass

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.materials import Material
from workbench.case.units import display_units
from workbench.case.validate import field_path
from workbench.design.allowables import (
    TWIST_RATE_PRESETS,
    Allowable,
    allowable_shear_stress,
    twist_rate_one_degree_in_twenty_diameters,
)
from workbench.design.check_report import (
    CHECK_QUANTITIES,
    Check,
    CheckReport,
    PlasticReserveRow,
    check_document,
    check_row,
    check_text,
    plastic_reserves,
)
from workbench.design.concentration import (
    ConcentrationFactor,
    keyseat_kts,
    shoulder_fillet_kts,
    transverse_hole_kts,
)
from workbench.design.fatigue_check import FatiguePoint, fatigue_checks
from workbench.design.frequency import frequency_checks, frequency_utilisation_ceiling
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    STATIC_KINDS,
    StaticCheckInputs,
    static_utilisations,
)
from workbench.solver.analysis import Results
from workbench.solver.model import Segment
from workbench.solver.sections import FloatArray, SolidCircle, Tube

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
    "twist_rate_limit",
]

_SHOULDER, _KEYSEAT, _NOTCH, _CROSS_HOLE = range(len(CONCENTRATION_KINDS))


def twist_rate_limit(design: DesignCriteria, diameter: float | None) -> tuple[float, str] | None:
    """The twist-rate limit (rad/m) of a segment of outer ``diameter`` (m), with its basis.

    ``None`` when the design sets no limit, or the rule needs a diameter the segment lacks.
    """
    if design.twist_rate_preset == "twenty-diameters":
        if diameter is None:
            return None
        rule = twist_rate_one_degree_in_twenty_diameters(diameter)
        return rule.value, f"{rule.label}: {rule.source}"
    if design.twist_rate_preset is not None:
        preset = TWIST_RATE_PRESETS[design.twist_rate_preset]
        return preset.value, f"{preset.label}: {preset.source}"
    if design.max_twist_rate is not None:
        return design.max_twist_rate, "stated limit"
    return None


#: Fractions of a segment's length where the details' diameters are read: start, middle, end.
_PROFILE_FRACTIONS = np.array([0.0, 0.5, 1.0])


def _round_profile(segment: Segment) -> list[tuple[float, float]] | None:
    """(outer, bore) diameters (m) of a one-layer round segment at its start, middle and end.

    ``None`` for a layered or non-circular segment.
    """
    if len(segment.layers) != 1 or not segment.layers[0].section.circular:
        return None
    section = segment.layers[0].section
    outer = 2.0 * section.outer_radius_at(_PROFILE_FRACTIONS)
    bore = 2.0 * section.inner_radius_at(_PROFILE_FRACTIONS)
    return list(zip(outer.tolist(), bore.tolist(), strict=True))


def _nominal_stress_factor(outer: float, bore: float) -> float:
    """τ_nom per unit torque of a round section, T·(D/2)/J (1/m³)."""
    if bore > 0.0:
        return Tube(outer, bore).shear_stress_per_torque
    return SolidCircle(outer).shear_stress_per_torque


def _layer_stress_factors(segment: Segment, fractions: FloatArray) -> list[FloatArray]:
    """Peak stress of each bonded layer per unit segment torque (1/m³), at fractions.

    Layer i carries Tᵢ = T·GᵢKᵢ/ΣGK (the layers share the twist).
    """
    rigidity = segment.torsional_rigidity_at(fractions)
    return [
        layer.material.shear_modulus
        * layer.section.torsion_constant_at(fractions)
        * layer.section.shear_stress_per_torque_at(fractions)
        / rigidity
        for layer in segment.layers
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


class _Preparation:
    """Fills the arrays of :class:`ModelCheckInputs`, segment by segment of the model."""

    def __init__(self, results: Results, design: DesignCriteria) -> None:
        self.results, self.design = results, design
        mesh = results.mesh
        shafts = results.model.shafts
        offsets = np.cumsum([0, *(len(shaft.segments) for shaft in shafts)])
        station_shaft = mesh.element_shaft[mesh.station_element]
        station_segment = offsets[station_shaft] + mesh.element_segment[mesh.station_element]
        self.start = np.flatnonzero(np.diff(station_segment, prepend=-1))
        self.end = np.append(self.start[1:], len(station_segment))
        self.segments = [
            (shaft_number, number, segment)
            for shaft_number, shaft in enumerate(shafts)
            for number, segment in enumerate(shaft.segments)
        ]
        count = len(self.segments)
        slots = max(len(segment.layers) for *_, segment in self.segments)
        self.stress = np.zeros((slots, len(station_segment)))
        self.stress[0] = mesh.station_stress_per_torque
        self.allowable = np.full((slots, count), np.inf)
        self.concentration = np.full((len(CONCENTRATION_KINDS), count), np.nan)
        self.nominal = np.full((len(CONCENTRATION_KINDS), count), np.nan)
        self.shoulder_station = self.start.copy()
        self.twist_limit = np.full(count, np.nan)
        self.notes = [[""] * count for _ in STATIC_KINDS]
        self.layer_notes: list[tuple[str, ...]] = []
        self.profiles = [_round_profile(segment) for *_, segment in self.segments]
        self.report_notes: list[str] = []
        self._allowables: dict[int, Allowable] = {}

    def material_allowable(self, material: Material) -> Allowable:
        key = id(material)
        if key not in self._allowables:
            self._allowables[key] = allowable_shear_stress(
                material,
                self.design.shear_criterion,
                self.design.factor_of_safety,
                keyway=self.design.keyway,
                stated_allowable=self.design.allowable_shear_stress,
            )
        return self._allowables[key]

    def run(self) -> ModelCheckInputs:
        model, mesh = self.results.model, self.results.mesh
        for index, (shaft_number, number, segment) in enumerate(self.segments):
            shaft = model.shafts[shaft_number]
            self._layers(index, shaft.boundaries[number], segment)
            with field_path(f"shafts[{shaft_number}].segments[{number}]"):
                self._shoulder(index, shaft.id, number, shaft.segments[number])
                self._body_details(index, shaft.id, number, segment)
            self._twist(index, shaft.id, number, segment)
        limits = self.design.rotation_limits
        nodes = [
            (
                mesh.node_of(model.shaft_number(limit.shaft), limit.start),
                mesh.node_of(model.shaft_number(limit.shaft), limit.end),
            )
            for limit in limits
        ]
        inputs = StaticCheckInputs(
            segment_start=self.start,
            torque=self.results.torque[None],
            station_x=mesh.station_x[None],
            stress_per_torque=self.stress[None],
            allowable=self.allowable[None],
            torsional_rigidity=mesh.station_rigidity[None],
            twist_rate_limit=self.twist_limit[None],
            concentration=self.concentration[None],
            nominal_stress_per_torque=self.nominal[None],
            shoulder_station=self.shoulder_station[None],
            angle=self.results.node_angle[None],
            rotation_start=np.array([start for start, _ in nodes], dtype=np.intp),
            rotation_end=np.array([end for _, end in nodes], dtype=np.intp),
            rotation_limit=np.array([[limit.limit for limit in limits]], dtype=float),
        )
        return ModelCheckInputs(
            inputs,
            tuple(model.shafts[shaft_number].id for shaft_number, *_ in self.segments),
            tuple(number for _, number, _ in self.segments),
            tuple(tuple(row) for row in self.notes),
            tuple(self.layer_notes),
            tuple(limit.shaft for limit in limits),
            tuple(limit.end for limit in limits),
            tuple(self.report_notes),
        )

    def _layers(self, index: int, boundary: float, segment: Segment) -> None:
        layered = len(segment.layers) > 1
        bases = []
        for slot, layer in enumerate(segment.layers):
            allowable = self.material_allowable(layer.material)
            self.allowable[slot, index] = allowable.value
            bases.append((f"layer {slot}: " if layered else "") + allowable.basis)
        self.layer_notes.append(tuple(bases))
        self.notes[0][index] = bases[0]
        if layered:
            window = slice(self.start[index], self.end[index])
            x = self.results.mesh.station_x[window]
            fractions = np.clip((x - boundary) / segment.length, 0.0, 1.0)
            for slot, factor in enumerate(_layer_stress_factors(segment, fractions)):
                self.stress[slot, window] = factor

    def _detail(
        self,
        kind: int,
        index: int,
        shaft: str,
        number: int,
        factor: ConcentrationFactor,
        nominal: float,
    ) -> None:
        note = f"K = {factor.value:.3g} ({factor.note}; {factor.source})"
        if not factor.in_range:
            note = "OUTSIDE THE DATA'S RANGE: " + note
            self.report_notes.append(
                f"{shaft} segment {number}, {CONCENTRATION_KINDS[kind]}: {note}"
            )
        self.concentration[kind, index] = factor.value
        self.nominal[kind, index] = nominal
        self.notes[1 + kind][index] = note

    def _shoulder(self, index: int, shaft: str, number: int, segment: Segment) -> None:
        if segment.fillet_radius is None or number == 0:
            return
        here, before = self.profiles[index], self.profiles[index - 1]
        if here is None or before is None:
            self.report_notes.append(
                f"{shaft} segment {number}: the shoulder check needs one-layer round "
                "segments on both sides; not checked"
            )
            return
        small, big = sorted((here[0], before[-1]), key=lambda pair: pair[0])
        factor = shoulder_fillet_kts(big[0], small[0], segment.fillet_radius)
        # The nominal stress is that of the smaller diameter under its own torque: the previous
        # segment's last station sits just left of this one's first.
        if here[0][0] > before[-1][0]:
            self.shoulder_station[index] = self.start[index] - 1
        self._detail(_SHOULDER, index, shaft, number, factor, _nominal_stress_factor(*small))

    def _body_details(self, index: int, shaft: str, number: int, segment: Segment) -> None:
        raisers: list[tuple[int, str, ConcentrationFactor]] = []
        if segment.keyseat:
            raisers.append((_KEYSEAT, "keyseat", keyseat_kts()))
        if segment.notch is not None:
            notch = segment.notch
            stated = ConcentrationFactor(
                notch.kts,
                True,
                f"{notch.label}; nominal stress 16T/(πd³)",
                "Kts stated in the case file",
            )
            raisers.append((_NOTCH, notch.label, stated))
        profile = self.profiles[index]
        for kind, what, factor in raisers:
            if profile is None:
                self.report_notes.append(
                    f"{shaft} segment {number}: the {what} factor is for one-layer round "
                    "segments; not checked"
                )
                continue
            # Where along the segment the detail sits is not known: the smallest section's
            # nominal stress (largest stress per torque) governs.
            largest = max(_nominal_stress_factor(*diameters) for diameters in profile)
            self._detail(kind, index, shaft, number, factor, largest)
        if segment.cross_hole_diameter is None:
            return
        if profile is None or profile[1][1] > 0.0:
            self.report_notes.append(
                f"{shaft} segment {number}: the cross-hole factor is for solid round "
                "shafts; not checked"
            )
            return
        middle = profile[1][0]
        factor = transverse_hole_kts(segment.cross_hole_diameter, middle)
        # The hole's peak is a normal stress σ in a uniaxial state; its equivalent shear stress
        # is σ/√3 (von Mises) or σ/2 (Tresca, used for the other criteria).
        divisor = math.sqrt(3.0) if self.design.shear_criterion == "von_mises" else 2.0
        equivalent = ConcentrationFactor(
            factor.value / divisor,
            factor.in_range,
            f"Ktg = {factor.value:.3g}, equivalent shear σ_max/{divisor:.4g}; {factor.note}",
            factor.source,
        )
        self._detail(
            _CROSS_HOLE, index, shaft, number, equivalent, _nominal_stress_factor(middle, 0.0)
        )

    def _twist(self, index: int, shaft: str, number: int, segment: Segment) -> None:
        round_diameter = (
            2.0 * max(layer.section.outer_radius for layer in segment.layers)
            if all(layer.section.circular for layer in segment.layers)
            else None
        )
        limit = twist_rate_limit(self.design, round_diameter)
        if limit is not None:
            self.twist_limit[index] = limit[0]
            self.notes[-1][index] = f"|T|/(G·K), largest along the segment; limit: {limit[1]}"
        elif self.design.twist_rate_preset is not None:
            self.report_notes.append(
                f"{shaft} segment {number}: the twist-rate rule needs a round segment; not checked"
            )


def model_check_inputs(results: Results, design: DesignCriteria) -> ModelCheckInputs:
    """The arrays of one solved model's static checks, with what each check row will say.

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
        A detail's factor cannot be found (a zero fillet radius, a hole as wide as the shaft),
        named by the segment's field path.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, ch. 5 and 7 (static shaft design, Kts);
       Norton, *Machine Design*, App. C; Pilkey & Pilkey, *Peterson's Stress Concentration
       Factors*, 3rd ed. (the factors, through :mod:`workbench.design.concentration`).
    """
    return _Preparation(results, design).run()


def _static_rows(results: Results, prepared: ModelCheckInputs) -> list[Check]:
    """The report's rows of the static checks, by segment, kind and result, then rotations."""
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
    return rows


def run_checks(results: Results, design: DesignCriteria | None = None) -> CheckReport:
    """Check every segment of every shaft in every load case and combination.

    Parameters
    ----------
    results
        Solved results.
    design
        Criteria; default: the model's ``design``, else :class:`DesignCriteria` defaults (von
        Mises, factor of safety 2, no twist limit), noted in the report.

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
        checks = _static_rows(results, prepared)
        notes.extend(prepared.report_notes)
        frequency_rows, frequency_notes, modes = frequency_checks(results.model, design)
        checks.extend(frequency_rows)
        notes.extend(frequency_notes)
        fatigue_points: tuple[FatiguePoint, ...] = ()
        if design.fatigue is not None:
            rows, points = fatigue_checks(results, design.fatigue, notes)
            checks.extend(Check(*row) for row in rows)
            fatigue_points = tuple(points)
    finally:
        display_units.reset(token)
    return CheckReport(
        results, design, tuple(checks), tuple(dict.fromkeys(notes)), fatigue_points, modes
    )
