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

Every report carries the caution that results must be verified against applicable codes and
licensed professional practice.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.materials import Material
from workbench.case.units import UnitSystem, display_units
from workbench.case.validate import field_path
from workbench.design.allowables import (
    TWIST_RATE_PRESETS,
    Allowable,
    allowable_shear_stress,
    twist_rate_one_degree_in_twenty_diameters,
)
from workbench.design.caution import CAUTION
from workbench.design.concentration import (
    ConcentrationFactor,
    keyseat_kts,
    shoulder_fillet_kts,
    transverse_hole_kts,
)
from workbench.design.fatigue_check import FatiguePoint, fatigue_checks
from workbench.design.plastic import plastic_reserve
from workbench.design.verdict import WithinLimit
from workbench.solver.analysis import Results
from workbench.solver.model import Model, Segment
from workbench.solver.sections import FloatArray, SolidCircle, Tube

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
    # Fatigue rows are dimensionless: value 1/n, limit 1/n_required.
    "fatigue": "ratio",
    "first_cycle_yield": "ratio",
}


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
    """

    results: Results
    design: DesignCriteria
    checks: tuple[Check, ...]
    notes: tuple[str, ...] = field(default=())
    fatigue_points: tuple[FatiguePoint, ...] = field(default=())
    modes: Any = None

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


def _circular_diameter(segment: Segment, fraction: float) -> tuple[float, float] | None:
    """(outer, bore) diameters of a one-layer circular segment at a fraction, else None."""
    if len(segment.layers) != 1 or not segment.layers[0].section.circular:
        return None
    section = segment.layers[0].section
    outer = 2.0 * float(section.outer_radius_at(np.array([fraction]))[0])
    bore = 2.0 * float(section.inner_radius_at(np.array([fraction]))[0])
    return outer, bore


def _nominal_stress_factor(outer: float, bore: float) -> float:
    """τ_nom per unit torque of a round section, T·(D/2)/J (1/m³)."""
    if bore > 0.0:
        return Tube(outer, bore).shear_stress_per_torque
    return SolidCircle(outer).shear_stress_per_torque


def _layer_stress_factors(segment: Segment, fractions: FloatArray) -> list[FloatArray]:
    """Peak stress of each layer per unit segment torque (1/m³), at fractions."""
    if len(segment.layers) == 1:
        return [segment.layers[0].section.shear_stress_per_torque_at(fractions)]
    rigidity = segment.torsional_rigidity_at(fractions)
    return [
        layer.material.shear_modulus
        * layer.section.torsion_constant_at(fractions)
        * layer.section.shear_stress_per_torque_at(fractions)
        / rigidity
        for layer in segment.layers
    ]


class _Checker:
    """Computes the checks of one solved model (keeps per-material allowables)."""

    def __init__(self, results: Results, design: DesignCriteria) -> None:
        self.results = results
        self.design = design
        self.model = results.model
        self.mesh = results.mesh
        self.checks: list[Check] = []
        self.notes: list[str] = []
        self.fatigue_points: list[FatiguePoint] = []
        self.modes: Any = None
        self._allowables: dict[int, Allowable] = {}

    def allowable(self, material: Material) -> Allowable:
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

    def add(
        self,
        kind: str,
        shaft: str,
        segment: int | None,
        values: FloatArray,
        positions: FloatArray,
        limit: float,
        note: str,
    ) -> None:
        """One check per result from (n_results, n_points) values at positions."""
        peaks = np.argmax(values, axis=1)
        for row, name in enumerate(self.results.names):
            peak = int(peaks[row])
            self.checks.append(
                Check(
                    name,
                    shaft,
                    segment,
                    kind,
                    float(values[row, peak]),
                    limit,
                    float(positions[peak]),
                    note,
                )
            )

    def run(self) -> CheckReport:
        mesh, results = self.mesh, self.results
        station_shaft = mesh.element_shaft[mesh.station_element]
        station_segment = mesh.element_segment[mesh.station_element]
        for shaft_number, shaft in enumerate(self.model.shafts):
            boundaries = shaft.boundaries
            for segment_number, segment in enumerate(shaft.segments):
                mask = (station_shaft == shaft_number) & (station_segment == segment_number)
                stations = np.flatnonzero(mask)
                x = mesh.station_x[stations]
                torque = np.abs(results.torque[:, stations])
                fractions = np.clip((x - boundaries[segment_number]) / segment.length, 0.0, 1.0)
                self._stress(shaft.id, segment_number, segment, torque, x, fractions)
                # The previous segment's last station sits just left of this one's first
                # (stations run in order): the shoulder check needs the torque on both sides.
                before = stations[0] - 1 if segment_number > 0 else stations[0]
                torque_before = np.abs(results.torque[:, before])
                with field_path(f"shafts[{shaft_number}].segments[{segment_number}]"):
                    self._concentrations(
                        shaft_number, segment_number, segment, torque, x, torque_before
                    )
                round_diameter = (
                    2.0 * max(layer.section.outer_radius for layer in segment.layers)
                    if all(layer.section.circular for layer in segment.layers)
                    else None
                )
                twist_limit = twist_rate_limit(self.design, round_diameter)
                if twist_limit is not None:
                    rate = torque / mesh.station_rigidity[stations]
                    self.add(
                        "twist_rate",
                        shaft.id,
                        segment_number,
                        rate,
                        x,
                        twist_limit[0],
                        f"|T|/(G·K), largest along the segment; limit: {twist_limit[1]}",
                    )
                elif self.design.twist_rate_preset is not None:
                    self.notes.append(
                        f"{shaft.id} segment {segment_number}: the twist-rate rule needs a round "
                        "segment; not checked"
                    )
        self._rotations()
        self._frequencies()
        if self.design.fatigue is not None:
            rows, self.fatigue_points = fatigue_checks(
                self.results, self.design.fatigue, self.notes
            )
            self.checks.extend(Check(*row) for row in rows)
        return CheckReport(
            results,
            self.design,
            tuple(self.checks),
            tuple(dict.fromkeys(self.notes)),
            tuple(self.fatigue_points),
            self.modes,
        )

    def _stress(
        self,
        shaft: str,
        number: int,
        segment: Segment,
        torque: FloatArray,
        x: FloatArray,
        fractions: FloatArray,
    ) -> None:
        factors = _layer_stress_factors(segment, fractions)
        best: tuple[float, FloatArray, float, str] | None = None
        for layer_number, (layer, factor) in enumerate(zip(segment.layers, factors, strict=True)):
            allowable = self.allowable(layer.material)
            stress = torque * factor
            utilisation = float(stress.max()) / allowable.value
            label = f"layer {layer_number}: " if len(segment.layers) > 1 else ""
            if best is None or utilisation > best[0]:
                best = (utilisation, stress, allowable.value, label + allowable.basis)
        assert best is not None
        _, stress, limit, basis = best
        self.add("shear_stress", shaft, number, stress, x, limit, basis)

    def _concentrations(
        self,
        shaft_number: int,
        number: int,
        segment: Segment,
        torque: FloatArray,
        x: FloatArray,
        torque_before: FloatArray,
    ) -> None:
        shaft = self.model.shafts[shaft_number]
        material = segment.layers[0].material
        allowable = self.allowable(material)
        if segment.fillet_radius is not None and number > 0:
            here = _circular_diameter(segment, 0.0)
            before = _circular_diameter(shaft.segments[number - 1], 1.0)
            if here is None or before is None:
                self.notes.append(
                    f"{shaft.id} segment {number}: the shoulder check needs one-layer round "
                    "segments on both sides; not checked"
                )
            else:
                small, big = sorted((here, before), key=lambda pair: pair[0])
                factor = shoulder_fillet_kts(big[0], small[0], segment.fillet_radius)
                start = x[:1]
                # The nominal stress is that of the smaller diameter under its own torque.
                small_torque = torque[:, 0] if here[0] <= before[0] else torque_before
                nominal = small_torque[:, None] * _nominal_stress_factor(*small)
                self._concentrated(
                    "shoulder_stress", shaft.id, number, factor, nominal, start, allowable
                )
        body_raisers = []
        if segment.keyseat:
            body_raisers.append(("keyseat_stress", "keyseat", keyseat_kts()))
        if segment.notch is not None:
            notch = segment.notch
            stated = ConcentrationFactor(
                notch.kts,
                True,
                f"{notch.label}; nominal stress 16T/(πd³)",
                "Kts stated in the case file",
            )
            body_raisers.append(("notch_stress", notch.label, stated))
        for kind, what, factor in body_raisers:
            dims = _circular_diameter(segment, 0.5)
            if dims is None:
                self.notes.append(
                    f"{shaft.id} segment {number}: the {what} factor is for one-layer round "
                    "segments; not checked"
                )
                continue
            # Where along the segment the detail sits is not known: the smallest section's
            # nominal stress (largest stress per torque) governs.
            largest = max(
                _nominal_stress_factor(*_circular_diameter(segment, f) or dims)
                for f in np.linspace(0.0, 1.0, 3)
            )
            self._concentrated(kind, shaft.id, number, factor, torque * largest, x, allowable)
        if segment.cross_hole_diameter is not None:
            dims = _circular_diameter(segment, 0.5)
            if dims is None or dims[1] > 0.0:
                self.notes.append(
                    f"{shaft.id} segment {number}: the cross-hole factor is for solid round "
                    "shafts; not checked"
                )
            else:
                factor = transverse_hole_kts(segment.cross_hole_diameter, dims[0])
                nominal = torque * _nominal_stress_factor(dims[0], 0.0)
                # The hole's peak is a normal stress σ in a uniaxial state; its equivalent shear
                # stress is σ/√3 (von Mises) or σ/2 (Tresca, used for the other criteria).
                divisor = math.sqrt(3.0) if self.design.shear_criterion == "von_mises" else 2.0
                equivalent = ConcentrationFactor(
                    factor.value / divisor,
                    factor.in_range,
                    f"Ktg = {factor.value:.3g}, equivalent shear σ_max/{divisor:.4g}; {factor.note}",
                    factor.source,
                )
                self._concentrated(
                    "cross_hole_stress", shaft.id, number, equivalent, nominal, x, allowable
                )

    def _concentrated(
        self,
        kind: str,
        shaft: str,
        number: int,
        factor: ConcentrationFactor,
        nominal: FloatArray,
        x: FloatArray,
        allowable: Allowable,
    ) -> None:
        note = f"K = {factor.value:.3g} ({factor.note}; {factor.source})"
        if not factor.in_range:
            note = "OUTSIDE THE DATA'S RANGE: " + note
            self.notes.append(f"{shaft} segment {number}, {kind}: {note}")
        self.add(kind, shaft, number, factor.value * nominal, x, allowable.value, note)

    def _rotations(self) -> None:
        for limit in self.design.rotation_limits:
            shaft_number = self.model.shaft_number(limit.shaft)
            start = self.mesh.node_of(shaft_number, limit.start)
            end = self.mesh.node_of(shaft_number, limit.end)
            relative = np.abs(self.results.node_angle[:, end] - self.results.node_angle[:, start])[
                :, None
            ]
            self.add(
                "rotation",
                limit.shaft,
                None,
                relative,
                np.array([limit.end]),
                limit.limit,
                "|θ(end) − θ(start)|",
            )

    def _frequencies(self) -> None:
        checks, notes, modes = frequency_checks(self.model, self.design)
        self.checks.extend(checks)
        self.notes.extend(notes)
        self.modes = modes


def frequency_checks(model: Model, design: DesignCriteria) -> tuple[list[Check], list[str], Any]:
    """The ``frequency_separation`` checks of a model's running-speed bands.

    Parameters
    ----------
    model
        The validated model (SI), with its ``operating_speeds`` and inertia (discs, densities).
    design
        Criteria: the frequency margin and the modal mesh settings.

    Returns
    -------
    tuple
        (checks, notes, modes): one check per mode near each band, the report's notes on them,
        and the :class:`workbench.solver.modes.Modes` used; ``([], [], None)`` without bands.

    References
    ----------
    .. [1] Separation of natural frequencies from running speeds by a margin: common practice,
       no source (see :func:`workbench.solver.modes.frequency_separations`).
    """
    speeds = model.operating_speeds
    if not speeds:
        return [], [], None
    from workbench.case.design import DEFAULT_FREQUENCY_MARGIN  # noqa: PLC0415
    from workbench.design.frequency import frequency_separations, separation_note  # noqa: PLC0415
    from workbench.solver.modes import DEFAULT_MODE_COUNT, natural_modes  # noqa: PLC0415

    margin = design.frequency_margin
    token = display_units.set(model.units)  # the notes quote speeds in the case's units
    try:
        # The usual count (not 1): for small systems every mode comes at once anyway, and the
        # report keeps them for charts and records to reuse.
        modes = natural_modes(
            model,
            count=DEFAULT_MODE_COUNT,
            up_to=max(speed.maximum for speed in speeds) * (1.0 + margin),
            elements_per_segment=design.modal_elements_per_segment,
            max_element_length=design.modal_max_element_length,
        )
        checks = [
            Check(
                separation.speed.name,
                separation.shaft,
                None,
                "frequency_separation",
                separation.value,
                separation.limit,
                separation.x,
                separation_note(separation, margin),
            )
            for separation in frequency_separations(modes, speeds, margin)
        ]
    finally:
        display_units.reset(token)
    source = (
        "the default, common practice, no source"
        if margin == DEFAULT_FREQUENCY_MARGIN
        else "the case's frequency_margin"
    )
    notes = [
        f"frequency separation: running-speed bands widened by ±{margin:.0%} ({source}), "
        "excitation once per revolution; shaft and x name where the mode's angle is largest",
        *modes.notes,
    ]
    return checks, notes, modes


def frequency_utilisation_ceiling(model: Model, design: DesignCriteria) -> float:
    """The largest utilisation any ``frequency_separation`` check of the model could have.

    Whatever its natural frequencies: a caller that knows another check's utilisation is at
    least this can skip the eigen-solve, since no frequency check can govern then.

    Parameters
    ----------
    model
        The model; only its ``operating_speeds`` (rad/s) are read.
    design
        Criteria: the frequency margin m.

    Returns
    -------
    float
        0 without bands; else the largest over the bands of max(1, √(high/low)), with
        low = min·(1 − m) and high = max·(1 + m); ``inf`` when a band starts at 0.

    Notes
    -----
    A mode below a widened band has utilisation ω/low ≤ 1, one above it high/ω ≤ 1. One inside
    it (low < ω < high) is measured from the nearer edge, min(ω/low, high/ω), which is largest,
    √(high/low), at ω = √(low·high). With low = 0 an inside mode has high/ω, unbounded.

    References
    ----------
    .. [1] From the definition of the check, :func:`workbench.solver.modes.frequency_separations`.
    """
    ceiling = 0.0
    margin = design.frequency_margin
    for speed in model.operating_speeds:
        low, high = speed.minimum * (1.0 - margin), speed.maximum * (1.0 + margin)
        if low <= 0.0:
            return math.inf
        ceiling = max(ceiling, 1.0, math.sqrt(high / low))
    return ceiling


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
    token = display_units.set(results.model.units)
    try:
        report = _Checker(results, design).run()
    finally:
        display_units.reset(token)
    if notes:
        report = dataclasses.replace(report, notes=(*notes, *report.notes))
    return report


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
    governing: dict[tuple[str, int | None, str], Check] = {}
    for check in report.checks:
        key = (check.shaft, check.segment, check.kind)
        if key not in governing or check.utilisation > governing[key].utilisation:
            governing[key] = check
    rows = []
    for check in governing.values():
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
