"""The fatigue check: from two solved torque states to a fatigue factor of safety per segment.

A shaft that starts, runs and stops cycles between torque states. The case names them as two
results (load cases or combinations): either the two extremes of the cycle, or one result whose
torques are the mean and another whose torques are the alternating amplitude. For every one-layer
round segment and every station the check forms the mean and alternating shear stress (the
fatigue stress-concentration factor applied to both, Shigley's conservative practice), the
corrected endurance limit of the segment (Marin factors for its finish, size, torsion,
temperature and reliability), and the factor of safety by the chosen criterion (modified
Goodman, Gerber, ASME-elliptic or Soderberg) and against first-cycle yield (Langer).

Check rows are dimensionless: ``value`` = 1/n (the fraction of the fatigue strength used) and
``limit`` = 1/n_required, so that utilisation = n_required/n like every other check.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th/10th ed.,
   McGraw-Hill, ch. 6 (Marin factors, notch sensitivity, fluctuating stresses) and ch. 7 (shafts).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from workbench.case.design import FatigueCriteria
from workbench.case.errors import InputError, listing, quoted
from workbench.case.units import UnitSystem, display_units
from workbench.case.validate import field_path
from workbench.design.check_layout import CheckMesh
from workbench.design.concentration import keyseat_kts, shoulder_fillet_kts
from workbench.design.fatigue import (
    EnduranceLimit,
    FatigueResult,
    endurance_limit,
    factors_of_safety,
    fatigue_concentration,
    fatigue_factors,
    notch_sensitivity_torsion,
    stresses_from_extremes,
    stresses_from_mean_alternating,
    ultimate_shear_strength,
    yield_shear_strength,
)
from workbench.solver.model import Model, Segment
from workbench.solver.sections import FloatArray

if TYPE_CHECKING:
    from workbench.solver.analysis import Results


@dataclass(frozen=True)
class FatiguePoint:
    """The governing stress cycle of one segment, for the fatigue diagram.

    Attributes
    ----------
    shaft, segment
        Which segment.
    x
        Where the cycle governs (m).
    factors
        Factors of safety by every criterion, with the stresses and strengths used (Pa).
    concentration
        Kfs applied there.
    basis
        How the endurance limit was found.
    endurance_limit
        The segment's own corrected endurance limit (its diameter and material, every Marin
        factor with its basis), as the check computed it. At a shoulder whose smaller side is
        the previous segment the cycle is checked against that side's limit instead
        (``factors.endurance_shear``).
    """

    shaft: str
    segment: int
    x: float
    factors: FatigueResult
    concentration: float
    basis: str
    endurance_limit: EnduranceLimit


def _round_outer_diameter(segment: Segment) -> float | None:
    if len(segment.layers) != 1 or not segment.layers[0].section.circular:
        return None
    return 2.0 * segment.layers[0].section.outer_radius


FatigueRow = tuple[str, str, int, str, float, float, float, str]


@dataclass(frozen=True)
class SolvedState:
    """What the fatigue check reads of one solved variant: its arrays on a mesh's stations.

    Attributes
    ----------
    model
        The variant's model (SI): diameters, materials and details of its segments.
    mesh
        A mesh of its topology: which shaft, segment and element each station belongs to.
    station_x
        (S,) station positions (m).
    stress_per_torque
        (S,) peak shear stress per unit torque (1/m³).
    torque
        (R, S) internal torque of every result (N·m).
    names
        The results' names, in row order.
    """

    model: Model
    mesh: CheckMesh
    station_x: FloatArray
    stress_per_torque: FloatArray
    torque: FloatArray
    names: tuple[str, ...]

    @classmethod
    def of(cls, results: Results) -> SolvedState:
        """The state of one solved model."""
        mesh = results.mesh
        return cls(
            results.model,
            mesh,
            mesh.station_x,
            mesh.station_stress_per_torque,
            results.torque,
            results.names,
        )


def fatigue_checks(
    results: Results | SolvedState, criteria: FatigueCriteria, notes: list[str]
) -> tuple[list[FatigueRow], list[FatiguePoint]]:
    """Rows ``(result, shaft, segment, kind, value, limit, x, note)`` and the governing cycles.

    Parameters
    ----------
    results
        Solved results holding both named results, or one variant's arrays of a batched solve.
    criteria
        The fatigue criteria.
    notes
        Remarks are appended here (segments not checked, factors outside their data).
    """
    state = results if isinstance(results, SolvedState) else SolvedState.of(results)
    model, mesh = state.model, state.mesh
    first, second = (_row(state.names, name) for name in criteria.result_names)
    rows: list[FatigueRow] = []
    points: list[FatiguePoint] = []
    station_shaft = mesh.element_shaft[mesh.station_element]
    station_segment = mesh.element_segment[mesh.station_element]
    required = criteria.factor_of_safety
    for shaft_number, shaft in enumerate(model.shafts):
        for number, segment in enumerate(shaft.segments):
            diameter = _round_outer_diameter(segment)
            material = segment.layers[0].material
            if (
                diameter is None
                or material.ultimate_strength is None
                or material.yield_strength is None
            ):
                notes.append(
                    f"{shaft.id} segment {number}: fatigue is checked for one-layer round "
                    "segments of a material with yield and ultimate strengths; not checked"
                )
                continue
            stations = np.flatnonzero((station_shaft == shaft_number) & (station_segment == number))
            with field_path(f"shafts[{shaft_number}].segments[{number}]"):
                own = _strengths(segment, criteria)
                assert own is not None
                body_factor, body_note = _body_factor(segment)
                # (station, Kfs, how): every station with the body's factor, plus the shoulder
                # at the segment's start on its smaller side (the previous segment's last station
                # when that one is the smaller).
                # The shoulder's smaller side may be the previous segment: its stress, size
                # factor and material then govern there.
                places = [(int(station), body_factor, body_note, own) for station in stations]
                shoulder = _shoulder_factor(shaft.segments, number)
                if shoulder is not None:
                    kfs, how, this_side = shoulder
                    side = own if this_side else _strengths(shaft.segments[number - 1], criteria)
                    if side is not None:
                        station = int(stations[0]) if this_side else int(stations[0]) - 1
                        places.append((station, kfs, how, side))
            place = _governing_place(places, state, first, second, criteria)
            station, kfs, how, (limit, ultimate, shear_yield) = places[place]
            factor = float(state.stress_per_torque[station])
            torque_a = float(state.torque[first, station])
            torque_b = float(state.torque[second, station])
            kfsm = kfs if criteria.mean_concentration == "kfs" else 1.0
            if criteria.extremes is not None:
                stresses = stresses_from_extremes(torque_a, torque_b, factor, kfs, kfsm)
            else:
                stresses = stresses_from_mean_alternating(
                    torque_a, abs(torque_b), factor, kfs, kfsm
                )
            outcome = fatigue_factors(
                stresses.mean_shear, stresses.alternating_shear, limit.value, ultimate, shear_yield
            )
            x = float(state.station_x[station])
            mean_note = "" if criteria.mean_concentration == "kfs" else ", nominal mean stress"
            basis = f"Kfs = {kfs:.3g} ({how}{mean_note}); {limit.basis}"
            if not limit.in_range:
                notes.append(
                    f"{shaft.id} segment {number}, fatigue: a Marin factor is outside its data; {limit.basis}"
                )
            points.append(FatiguePoint(shaft.id, number, x, outcome, kfs, basis, own[0]))
            for kind, factor_of_safety in (
                ("fatigue", outcome.factor_of_safety(criteria.criterion)),
                ("first_cycle_yield", outcome.first_cycle_yield),
            ):
                rows.append(
                    (
                        criteria.label,
                        shaft.id,
                        number,
                        kind,
                        # n = 0: a stress over a strength beyond the range of numbers (refused
                        # by name in the report, workbench.design.finite_checks).
                        1.0 / factor_of_safety if factor_of_safety else math.inf,
                        1.0 / required,
                        x,
                        f"{criteria.criterion if kind == 'fatigue' else 'Langer'}: "
                        f"n = {factor_of_safety:.3g} (required {required:g}); {basis}",
                    )
                )
    return rows, points


def _row(names: tuple[str, ...], name: str) -> int:
    """Row of the named load case or combination."""
    try:
        return names.index(name)
    except ValueError:
        msg = f"unknown load case or combination {quoted(name)}; known: {listing(names)}"
        raise InputError("result", msg) from None


def _body_factor(segment: Segment) -> tuple[float, str]:
    """Kfs along a segment's length and how it was found: the larger of keyseat and notch.

    Where along the segment a keyseat or a stated notch sits is not known, so its factor applies
    at every station; with both, the larger governs.
    """
    candidates = [(1.0, "no notch")]
    if segment.keyseat:
        # No notch radius is known for a keyseat: q = 1 (full sensitivity).
        candidates.append((fatigue_concentration(keyseat_kts(), 1.0).value, "keyseat, q = 1"))
    notch = segment.notch
    if notch is not None:
        ultimate_strength = segment.layers[0].material.ultimate_strength
        if notch.notch_sensitivity is not None:
            q, how = notch.notch_sensitivity, f"q = {notch.notch_sensitivity:.3g} as stated"
        elif notch.radius is not None and ultimate_strength is not None:
            sensitivity = notch_sensitivity_torsion(notch.radius, ultimate_strength)
            q, how = sensitivity.value, f"q = {sensitivity.value:.2f} from its radius"
        else:
            q, how = 1.0, "q = 1 (no radius given)"
        value = fatigue_concentration(notch.kts, q).value
        candidates.append((value, f"{notch.label}, Kts = {notch.kts:.3g}, {how}"))
    return max(candidates, key=lambda candidate: candidate[0])


def _governing_place(
    places: list[tuple[int, float, str, Any]],
    state: SolvedState,
    first: int,
    second: int,
    criteria: FatigueCriteria,
) -> int:
    """The place whose smaller factor of safety (the criterion's or Langer's) is least.

    All places at once, by the same formulas as the scalar chain that then reports the winner.
    """
    stations = np.array([place[0] for place in places])
    kfs = np.array([place[1] for place in places])
    kfsm = kfs if criteria.mean_concentration == "kfs" else np.ones_like(kfs)
    strengths = np.array([(s[0].value, s[1], s[2]) for *_, s in places]).T
    per_torque = state.stress_per_torque[stations]
    # A stress beyond the range of numbers is inf here and governs; the scalar chain then
    # refuses it by name.
    with np.errstate(over="ignore", invalid="ignore"):
        nominal_a = state.torque[first, stations] * per_torque
        nominal_b = state.torque[second, stations] * per_torque
        if criteria.extremes is not None:
            mean = kfsm * (nominal_a + nominal_b) / 2.0
            alternating = kfs * np.abs(nominal_a - nominal_b) / 2.0
        else:
            # stresses_from_mean_alternating: extremes Tm ± |Ta|, then as above.
            high, low = nominal_a + np.abs(nominal_b), nominal_a - np.abs(nominal_b)
            mean = kfsm * (high + low) / 2.0
            alternating = kfs * np.abs(high - low) / 2.0
    factors = factors_of_safety(mean, alternating, *strengths)
    worst = np.minimum(factors[criteria.criterion], factors["first_cycle_yield"])
    return int(np.argmin(worst))


@functools.lru_cache(maxsize=512)
def _endurance_limit(
    ultimate_strength: float,
    diameter: float,
    finish: str,
    reliability: float,
    temperature: float | None,
    tested_limit: float | None,
    units: UnitSystem,
) -> EnduranceLimit:
    # The Marin chain depends only on these (and the units its basis text quotes): every edit of
    # a live panel would otherwise rebuild the same limits and sentences.
    return endurance_limit(
        ultimate_strength,
        diameter,
        finish,
        "torsion",
        reliability,
        temperature,
        rotating_beam_limit=tested_limit,
    )


def _strengths(
    segment: Segment, criteria: FatigueCriteria
) -> tuple[EnduranceLimit, float, float] | None:
    """(Sse, Ssu, Ssy) of a one-layer round segment with yield and ultimate strengths (Pa)."""
    diameter = _round_outer_diameter(segment)
    material = segment.layers[0].material
    if diameter is None or material.ultimate_strength is None or material.yield_strength is None:
        return None
    limit = _endurance_limit(
        material.ultimate_strength,
        diameter,
        criteria.finish,
        criteria.reliability,
        criteria.temperature,
        criteria.endurance_limit,
        display_units.get(),
    )
    return (
        limit,
        ultimate_shear_strength(material.ultimate_strength),
        yield_shear_strength(material.yield_strength),
    )


def _shoulder_factor(segments: tuple[Segment, ...], number: int) -> tuple[float, str, bool] | None:
    """Kfs at a fillet shoulder at a segment's start between round segments.

    Also says whether the smaller side is this segment.
    """
    segment = segments[number]
    if number == 0 or segment.fillet_radius is None:
        return None
    here, before = _round_outer_diameter(segment), _round_outer_diameter(segments[number - 1])
    if here is None or before is None:
        return None
    small, big = sorted((here, before))
    smaller_side = segment if here <= before else segments[number - 1]
    ultimate_strength = smaller_side.layers[0].material.ultimate_strength
    if ultimate_strength is None:
        return None
    theoretical = shoulder_fillet_kts(big, small, segment.fillet_radius)
    sensitivity = notch_sensitivity_torsion(segment.fillet_radius, ultimate_strength)
    factor = fatigue_concentration(theoretical, sensitivity)
    how = f"shoulder, Kts = {theoretical.value:.3g}, q = {sensitivity.value:.2f}"
    return factor.value, how, here <= before
