"""The fatigue check (``design.fatigue`` → rows ``fatigue`` and ``first_cycle_yield``) by hand.

Every expected number is worked out in this file from published formulas, on statically
determinate cantilevers (internal torque from statics alone), never read back from the product.
Sources, each also named beside its check; "(from memory)" marks a value recalled, not read:

* τ = 16T/(πd³) for a solid round shaft: Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3.
* τm = (τmax + τmin)/2, τa = |τmax − τmin|/2: Shigley's *Mechanical Engineering Design*
  (Budynas & Nisbett), 9th ed., eq. (6-36).
* Se' = 0.5·Sut for steels up to 1400 MPa: Shigley 9th ed., eq. (6-8).
* ka = 4.51·Sut^−0.265 (Sut in MPa, machined or cold-drawn) and ka = 1.58·Sut^−0.085 (ground):
  Shigley 9th ed., Table 6-2.
* kb = (d/7.62 mm)^−0.107 = 1.24·d^−0.107 (d in mm, 2.79–51 mm): Shigley 9th ed., eq. (6-20)
  (the 7.62 mm is the 0.3 in specimen; 1.24 is the printed rounding of 7.62^0.107).
* kc = 0.59 in torsion: Shigley 9th ed., eq. (6-26). ke = 0.814 at 99 % reliability: Table 6-5.
* Ssu = 0.67·Sut: Shigley 9th ed., eq. (6-54) (from memory). Ssy = 0.577·Sy, the
  distortion-energy value Sy/√3 to three figures: Shigley 9th ed., eq. (5-21).
* Modified Goodman 1/n = τa/Sse + τm/Ssu (eq. 6-46), Soderberg 1/n = τa/Sse + τm/Ssy (eq. 6-45),
  Gerber n = ½(Ssu/τm)²(τa/Sse)[−1 + √(1 + (2τm·Sse/(Ssu·τa))²)] (Table 6-7), ASME-elliptic
  n = 1/√((τa/Sse)² + (τm/Ssy)²) (Table 6-8), Langer first-cycle yield n = Ssy/(τa + τm)
  (Tables 6-7, 6-8), all in their torsional form (§6-14, shear stresses and strengths).
* Kfs = 1 + q(Kts − 1), applied to the mean stress as well (Kfsm = Kfs): Shigley 9th ed.,
  eq. (6-32) and ch. 7 (the conservative practice for shafts, from memory).
* Shoulder fillet Kts = A(r/d)^b at D/d = 1.20: A = 0.83425, b = −0.21649 (Norton, *Machine
  Design*, App. C, fit to Peterson's chart), nominal stress on the smaller diameter d.
* Notch sensitivity in torsion q = 1/(1 + √a/√r) with √a = 0.190 − 2.51e-3·Sut + 1.35e-5·Sut²
  − 2.67e-8·Sut³ (√in, Sut in kpsi): Shigley 9th ed., eqs. (6-34), (6-35b) (from memory).
* At a shoulder the size factor is taken at the smaller diameter d, where the nominal stress is:
  Shigley 9th ed., Example 7-1 (kb from d = 1.100 in at a shoulder with D = 1.65 in; from memory).
* Keyseat Kts = 3.0 (end-milled, first iteration): Shigley 9th ed., Table 7-1; with no notch
  radius known, q = 1 (full sensitivity), so Kfs = Kts.
* 1 kpsi = 6.894757293168361 MPa, 1 in = 25.4 mm (exact): NIST SP 811, App. B.
* The JSON Schema checks use the ``jsonschema`` library's Draft 2020-12 validator (JSON Schema
  2020-12 specification) as the outside reference.

Material: AISI 1020 cold-drawn, Sut = 470 MPa, Sy = 390 MPa (Shigley Table A-20, from memory);
G = 79.3 GPa (Shigley Table A-5).
"""

from __future__ import annotations

import copy
import json
import math
import os
import subprocess
import sys
from pathlib import Path
from typing import Any

import jsonschema
import numpy as np
import pytest

from workbench.case.design import DesignCriteria, FatigueCriteria
from workbench.case.errors import InputError
from workbench.case.schema import case_schema
from workbench.case.units import SI, us_customary
from workbench.cli import main
from workbench.design.checks import Check, CheckReport, check_document, run_checks
from workbench.design.concentration import shoulder_fillet_kts
from workbench.design.fatigue import (
    fatigue_factors,
    notch_sensitivity_torsion,
    stresses_from_extremes,
)
from workbench.solver.analysis import solve
from workbench.solver.io import case_to_dict, load_case, parse_case, save_case
from workbench.solver.model import Model

PROJECT_ROOT = Path(__file__).resolve().parents[1]

MM = 1e-3  # m
MPA = 1e6  # Pa
INCH_MM = 25.4  # mm per inch, exact (NIST SP 811)
KPSI_MPA = 6.894757293168361  # MPa per kpsi (NIST SP 811: lbf 4.4482216152605 N, in 25.4 mm)

SUT, SY = 470.0, 390.0  # MPa, AISI 1020 CD (Shigley Table A-20, from memory)
MATERIAL = {"shear_modulus": 79300, "yield_strength": SY, "ultimate_strength": SUT}
MM_UNITS = {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"}

T_MAX, T_MIN = 300.0, -100.0  # N·m, the two extremes of the cycle (load cases "A" and "B")
REQUIRED = 1.5

ROW_KEYS = {"result", "shaft", "segment", "kind", "value", "limit", "utilisation", "passes", "x"}
CRITERIA = ("goodman", "gerber", "asme_elliptic", "soderberg")


# --- hand formulas (MPa, mm, N·m) ------------------------------------------------------------


def tau(torque: float, diameter_mm: float) -> float:
    """τ = 16T/(πd³) in MPa, T in N·m, d in mm (Gere & Goodno, §3.3)."""
    return 16.0 * torque / (math.pi * (diameter_mm * MM) ** 3) / MPA


def size_factor_mm(diameter_mm: float) -> float:
    """kb = (d/7.62)^−0.107, d in mm, 2.79–51 mm (Shigley eq. 6-20)."""
    return (diameter_mm / 7.62) ** -0.107


def shear_endurance(diameter_mm: float, reliability_factor: float = 0.814) -> float:
    """Sse = ka·kb·kc·ke·Se' (MPa) of a machined steel bar at room temperature (Shigley ch. 6)."""
    rotating_beam = 0.5 * SUT  # eq. 6-8
    surface = 4.51 * SUT**-0.265  # Table 6-2, machined
    load = 0.59  # eq. 6-26, torsion
    return surface * size_factor_mm(diameter_mm) * load * reliability_factor * rotating_beam


def ultimate_shear() -> float:
    """Ssu = 0.67·Sut (Shigley eq. 6-54, from memory)."""
    return 0.67 * SUT


def yield_shear() -> float:
    """Ssy = Sy/√3 (Shigley eq. 5-21; 0.577·Sy as printed)."""
    return SY / math.sqrt(3.0)


def hand_factors(mean: float, alternating: float, endurance: float) -> dict[str, float]:
    """Factors of safety by Shigley's textbook forms (τm > 0, τa > 0, MPa)."""
    ssu, ssy = ultimate_shear(), yield_shear()
    gerber = (
        0.5
        * (ssu / mean) ** 2
        * (alternating / endurance)
        * (-1.0 + math.sqrt(1.0 + (2.0 * mean * endurance / (ssu * alternating)) ** 2))
    )
    return {
        "goodman": 1.0 / (alternating / endurance + mean / ssu),
        "gerber": gerber,
        "asme_elliptic": 1.0 / math.sqrt((alternating / endurance) ** 2 + (mean / ssy) ** 2),
        "soderberg": 1.0 / (alternating / endurance + mean / ssy),
        "first_cycle_yield": ssy / (alternating + mean),
    }


def hand_cycle(diameter_mm: float, kfs: float = 1.0) -> tuple[float, float]:
    """(τm, τa) in MPa of the T_MAX ↔ T_MIN cycle, Kfs on both (Shigley eq. 6-36, ch. 7)."""
    high, low = tau(T_MAX, diameter_mm), tau(T_MIN, diameter_mm)
    return kfs * abs(high + low) / 2.0, kfs * abs(high - low) / 2.0


# --- cases -----------------------------------------------------------------------------------


def segment(diameter_mm: float, length_mm: float = 400.0, **extra: Any) -> dict[str, Any]:
    return {
        "length": length_mm,
        "material": "steel",
        "section": {"shape": "solid", "diameter": diameter_mm},
        **extra,
    }


def fatigue_case(
    segments: list[dict[str, Any]] | None = None,
    fatigue: dict[str, Any] | None = None,
    load_x: float | None = None,
    support_x: float = 0.0,
    load_cases: list[dict[str, Any]] | None = None,
) -> dict[str, Any]:
    """A cantilever: fixed at ``support_x``, T_MAX in "A" and T_MIN in "B" at ``load_x``."""
    segments = segments if segments is not None else [segment(30.0)]
    total = sum(item["length"] for item in segments)
    load_x = total if load_x is None else load_x
    if fatigue is None:
        fatigue = {
            "extremes": ["A", "B"],
            "finish": "machined",
            "reliability": 0.99,
            "criterion": "goodman",
            "factor_of_safety": REQUIRED,
        }
    if load_cases is None:
        load_cases = [
            {"name": "A", "torques": [{"shaft": "main", "x": load_x, "torque": T_MAX}]},
            {"name": "B", "torques": [{"shaft": "main", "x": load_x, "torque": T_MIN}]},
        ]
    return {
        "title": "fatigue cantilever for hand checks",
        "units": MM_UNITS,
        "materials": {"steel": dict(MATERIAL)},
        "shafts": [{"id": "main", "segments": segments}],
        "supports": [{"shaft": "main", "x": support_x, "kind": "fixed"}],
        "load_cases": load_cases,
        "design": {"fatigue": fatigue},
    }


def report_of(case: dict[str, Any]) -> CheckReport:
    return run_checks(solve(parse_case(case)))


def row(report: CheckReport, kind: str, segment_number: int = 0) -> Check:
    rows = [c for c in report.checks if c.kind == kind and c.segment == segment_number]
    assert len(rows) == 1, rows
    return rows[0]


def assert_row(check: Check, factor_of_safety: float, required: float = REQUIRED) -> None:
    """value = 1/n, limit = 1/n_required, utilisation = n_required/n, passes = n ≥ n_required."""
    assert check.value == pytest.approx(1.0 / factor_of_safety, rel=1e-9)
    assert check.limit == pytest.approx(1.0 / required, rel=1e-12)
    assert check.utilisation == pytest.approx(required / factor_of_safety, rel=1e-9)
    assert check.passes is (factor_of_safety >= required)


def fatigue_of(model: Model) -> FatigueCriteria | None:
    assert isinstance(model.design, DesignCriteria)
    return model.design.fatigue


def write(tmp_path: Path, name: str, case: dict[str, Any]) -> Path:
    path = tmp_path / name
    path.write_text(json.dumps(case), encoding="utf-8")
    return path


def run_cli(arguments: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    status = main(arguments)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


# --- (1) one round segment, no notch ---------------------------------------------------------


def test_hand_formulas_agree_with_their_printed_roundings() -> None:
    # Shigley eq. (6-20): (d/7.62)^−0.107 = 1.24·d^−0.107; 1.24 is printed to three figures, so
    # the two agree within half a unit of its last figure (0.005/1.24 = 0.4 %).
    for diameter in (2.79, 10.0, 30.0, 36.0, 51.0):
        assert 1.24 * diameter**-0.107 == pytest.approx(size_factor_mm(diameter), rel=0.005 / 1.24)
    # Shigley eq. (5-21): Ssy = 0.577·Sy is Sy/√3 to three figures.
    assert yield_shear() == pytest.approx(0.577 * SY, rel=0.0005 / 0.577)
    # Shigley Example 6-3 (from memory): machined, Sut = 520 MPa → ka = 0.860.
    assert round(4.51 * 520.0**-0.265, 3) == 0.860


def test_goodman_and_langer_rows_match_the_hand_calculation() -> None:
    report = report_of(fatigue_case())
    mean, alternating = hand_cycle(30.0)
    # τm, τa from the extremes by hand: τ(300) = 56.59 MPa, τ(−100) = −18.86 MPa
    assert mean == pytest.approx(tau(100.0, 30.0), rel=1e-12)
    assert alternating == pytest.approx(tau(200.0, 30.0), rel=1e-12)
    endurance = shear_endurance(30.0)
    hand = hand_factors(mean, alternating, endurance)
    fatigue, first_cycle = row(report, "fatigue"), row(report, "first_cycle_yield")
    assert_row(fatigue, hand["goodman"])
    assert_row(first_cycle, hand["first_cycle_yield"])
    # The same cycle along the whole cantilever (statics: uniform torque); the first station,
    # the fixed end, is reported.
    assert fatigue.x == 0.0
    assert first_cycle.x == 0.0
    assert fatigue.result == first_cycle.result == "fatigue: A ↔ B"
    assert fatigue.note.startswith("goodman: n = ")
    assert first_cycle.note.startswith("Langer: n = ")
    # the governing cycle behind the rows, in SI
    (point,) = report.fatigue_points
    assert point.concentration == 1.0
    assert point.factors.endurance_shear == pytest.approx(endurance * MPA, rel=1e-9)
    assert point.factors.mean_shear == pytest.approx(mean * MPA, rel=1e-9)
    assert point.factors.alternating_shear == pytest.approx(alternating * MPA, rel=1e-9)
    assert point.factors.ultimate_shear == pytest.approx(ultimate_shear() * MPA, rel=1e-12)
    assert point.factors.yield_shear == pytest.approx(yield_shear() * MPA, rel=1e-12)


@pytest.mark.parametrize("criterion", CRITERIA)
def test_each_criterion_matches_its_textbook_form(criterion: str) -> None:
    case = fatigue_case()
    case["design"]["fatigue"]["criterion"] = criterion
    report = report_of(case)
    hand = hand_factors(*hand_cycle(30.0), shear_endurance(30.0))
    assert_row(row(report, "fatigue"), hand[criterion])
    assert row(report, "fatigue").note.startswith(f"{criterion}: n = ")
    # first-cycle yield does not depend on the fatigue criterion
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"])


def test_the_criteria_rank_as_the_textbook_says() -> None:
    # Shigley §6-12: for the same cycle Soderberg ≤ Goodman ≤ Gerber, and ASME-elliptic
    # ≥ Soderberg (it runs to Ssy, Soderberg's straight line lies inside it).
    factors = {}
    for criterion in CRITERIA:
        case = fatigue_case()
        case["design"]["fatigue"]["criterion"] = criterion
        factors[criterion] = 1.0 / row(report_of(case), "fatigue").value
    assert factors["soderberg"] < factors["goodman"] < factors["gerber"]
    assert factors["soderberg"] < factors["asme_elliptic"]


def test_factor_of_safety_sets_the_limit_and_the_verdict(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    hand = hand_factors(*hand_cycle(30.0), shear_endurance(30.0))
    # the hand Goodman factor, ≈ 2.0, lies between 1.5 and 2.5; Langer ≈ 3.98 above both
    assert REQUIRED < hand["goodman"] < 2.5 < hand["first_cycle_yield"]
    case = fatigue_case()
    case["design"]["fatigue"]["factor_of_safety"] = 2.5
    report = report_of(case)
    assert_row(row(report, "fatigue"), hand["goodman"], required=2.5)
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"], required=2.5)
    assert not row(report, "fatigue").passes
    assert row(report, "first_cycle_yield").passes
    assert not report.passes
    # the static rows pass (τ = 56.6 MPa < Sy/√3/2 = 112.6 MPa), so only fatigue fails
    assert all(c.passes for c in report.checks if c.kind == "shear_stress")
    status, out, _ = run_cli(["check", str(write(tmp_path, "c.json", case))], capsys)
    assert status == 1
    assert "SOME CHECKS FAIL" in out
    assert "governing: fatigue on main segment 0" in out


def test_governing_station_lies_where_the_torque_is() -> None:
    # Fixed at x = 400 mm, loaded at x = 150 mm: by statics the stretch 150–400 mm carries the
    # torque and the overhang 0–150 mm carries none, so the cycle governs in the loaded stretch.
    report = report_of(fatigue_case(load_x=150.0, support_x=400.0))
    hand = hand_factors(*hand_cycle(30.0), shear_endurance(30.0))
    fatigue = row(report, "fatigue")
    assert_row(fatigue, hand["goodman"])
    assert 150.0 * MM <= fatigue.x <= 400.0 * MM
    assert 150.0 * MM <= row(report, "first_cycle_yield").x <= 400.0 * MM


@pytest.mark.parametrize("alternating_sign", [1.0, -1.0], ids=["positive", "negative"])
def test_mean_and_alternating_form_matches_the_same_cycle(alternating_sign: float) -> None:
    # Tm = (Tmax + Tmin)/2 = 100 N·m, Ta = (Tmax − Tmin)/2 = 200 N·m (Shigley eq. 6-36); an
    # amplitude has no sign, so the alternating result's torque may be given either way.
    torque_mean = (T_MAX + T_MIN) / 2.0
    torque_amplitude = alternating_sign * (T_MAX - T_MIN) / 2.0
    case = fatigue_case(
        fatigue={
            "mean": "running",
            "alternating": "ripple",
            "finish": "machined",
            "reliability": 0.99,
            "criterion": "goodman",
            "factor_of_safety": REQUIRED,
        },
        load_cases=[
            {"name": "running", "torques": [{"shaft": "main", "x": 400, "torque": torque_mean}]},
            {
                "name": "ripple",
                "torques": [{"shaft": "main", "x": 400, "torque": torque_amplitude}],
            },
        ],
    )
    report = report_of(case)
    hand = hand_factors(
        tau(torque_mean, 30.0), tau(abs(torque_amplitude), 30.0), shear_endurance(30.0)
    )
    assert hand["goodman"] == pytest.approx(
        hand_factors(*hand_cycle(30.0), shear_endurance(30.0))["goodman"], rel=1e-12
    )
    assert_row(row(report, "fatigue"), hand["goodman"])
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"])
    assert row(report, "fatigue").result == "fatigue: mean running, alternating ripple"


def test_a_combination_can_be_an_extreme() -> None:
    # "B" as the combination 1.0·"A" + 1.0·"C" with C = −400 N·m gives the same −100 N·m
    # (superposition: the torque of a combination is the factored sum).
    case = fatigue_case(
        load_cases=[
            {"name": "A", "torques": [{"shaft": "main", "x": 400, "torque": T_MAX}]},
            {"name": "C", "torques": [{"shaft": "main", "x": 400, "torque": T_MIN - T_MAX}]},
        ]
    )
    case["combinations"] = [{"name": "B", "factors": {"A": 1.0, "C": 1.0}}]
    hand = hand_factors(*hand_cycle(30.0), shear_endurance(30.0))
    assert_row(row(report_of(case), "fatigue"), hand["goodman"])


# --- (2) details: shoulder fillet and keyseat ------------------------------------------------

SMALL, BIG, FILLET = 30.0, 36.0, 1.5  # mm: D/d = 1.20, r/d = 0.05, inside Norton's fit


def shoulder_kfs() -> float:
    """Kfs = 1 + q(Kts − 1) at the 36/30 mm shoulder with r = 1.5 mm, checked from outside."""
    kts = shoulder_fillet_kts(BIG * MM, SMALL * MM, FILLET * MM)
    # Norton App. C, D/d = 1.20: Kts = 0.83425·(r/d)^−0.21649
    assert kts.value == pytest.approx(0.83425 * (FILLET / SMALL) ** -0.21649, rel=1e-12)
    assert kts.in_range
    q = notch_sensitivity_torsion(FILLET * MM, SUT * MPA)
    # Shigley eq. (6-35b) in kpsi and √in, Neuber eq. (6-34)
    strength = SUT / KPSI_MPA
    sqrt_a = 0.190 - 2.51e-3 * strength + 1.35e-5 * strength**2 - 2.67e-8 * strength**3
    q_hand = 1.0 / (1.0 + sqrt_a / math.sqrt(FILLET / INCH_MM))
    assert q.value == pytest.approx(q_hand, rel=1e-9)
    assert 0.0 < q.value < 1.0
    return 1.0 + q_hand * (kts.value - 1.0)  # Shigley eq. (6-32)


@pytest.mark.parametrize("small_first", [True, False], ids=["smaller-first", "smaller-second"])
def test_shoulder_applies_kfs_to_the_smaller_sides_stress(small_first: bool) -> None:
    first, second = (SMALL, BIG) if small_first else (BIG, SMALL)
    case = fatigue_case(
        segments=[segment(first, 300.0), segment(second, 200.0, fillet_radius=FILLET)]
    )
    report = report_of(case)
    kfs = shoulder_kfs()
    # nominal stress and size factor on the smaller diameter (Shigley Example 7-1 practice)
    hand = hand_factors(*hand_cycle(SMALL, kfs), shear_endurance(SMALL))
    fatigue, first_cycle = row(report, "fatigue", 1), row(report, "first_cycle_yield", 1)
    point = next(p for p in report.fatigue_points if p.segment == 1)
    assert point.concentration == pytest.approx(kfs, rel=1e-9)
    assert fatigue.x == pytest.approx(300.0 * MM, rel=1e-12)
    assert first_cycle.x == pytest.approx(300.0 * MM, rel=1e-12)
    assert_row(first_cycle, hand["first_cycle_yield"])
    assert point.factors.endurance_shear == pytest.approx(shear_endurance(SMALL) * MPA, rel=1e-9)
    assert_row(fatigue, hand["goodman"])
    # the shoulder governs the shaft's fatigue: the plain stretches are less used
    body = hand_factors(*hand_cycle(first), shear_endurance(first))
    assert_row(row(report, "fatigue", 0), body["goodman"])
    assert row(report, "fatigue", 0).utilisation < fatigue.utilisation


def test_a_shoulder_and_its_mirror_image_give_the_same_factor() -> None:
    # The same fillet between the same diameters under the same torque is the same detail,
    # whichever side of it the shaft starts on (symmetry), so the fatigue factor is the same.
    factors = []
    for first, second in ((SMALL, BIG), (BIG, SMALL)):
        case = fatigue_case(
            segments=[segment(first, 300.0), segment(second, 200.0, fillet_radius=FILLET)]
        )
        factors.append(1.0 / row(report_of(case), "fatigue", 1).value)
    assert factors[0] == pytest.approx(factors[1], rel=1e-9)


def test_no_shoulder_factor_without_a_fillet_radius() -> None:
    # No fillet_radius: no shoulder detail is declared, the step is checked as plain stretches.
    report = report_of(fatigue_case(segments=[segment(BIG, 300.0), segment(SMALL, 200.0)]))
    for number, diameter in ((0, BIG), (1, SMALL)):
        hand = hand_factors(*hand_cycle(diameter), shear_endurance(diameter))
        assert_row(row(report, "fatigue", number), hand["goodman"])


def test_keyseat_uses_kts_three_with_full_notch_sensitivity() -> None:
    report = report_of(fatigue_case(segments=[segment(30.0, keyseat=True)]))
    kfs = 1.0 + 1.0 * (3.0 - 1.0)  # Shigley Table 7-1 Kts = 3.0, q = 1, eq. (6-32)
    hand = hand_factors(*hand_cycle(30.0, kfs), shear_endurance(30.0))
    assert_row(row(report, "fatigue"), hand["goodman"])
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"])
    (point,) = report.fatigue_points
    assert point.concentration == pytest.approx(3.0, rel=1e-12)
    assert "keyseat, q = 1" in row(report, "fatigue").note


# --- (2b) a notch with a stated Kts, and the nominal mean stress --------------------------------
# Kfs = 1 + q(Kts − 1): Shigley 9th ed., eq. (6-32). Kts 1.8 and q 0.85 are round demo values
# of a groove, not from a source; the check must carry them through the published formulas.


@pytest.mark.parametrize(
    ("notch", "q"),
    [
        ({"kts": 1.8, "notch_sensitivity": 0.85}, 0.85),
        # no radius, no stated q: full sensitivity, Kfs = Kts (the safe side)
        ({"kts": 1.8}, 1.0),
    ],
    ids=["stated-q", "no-q"],
)
def test_notch_with_a_stated_kts(notch: dict[str, Any], q: float) -> None:
    report = report_of(
        fatigue_case(segments=[segment(30.0, notch={**notch, "description": "groove"})])
    )
    kfs = 1.0 + q * (1.8 - 1.0)
    hand = hand_factors(*hand_cycle(30.0, kfs), shear_endurance(30.0))
    assert_row(row(report, "fatigue"), hand["goodman"])
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"])
    assert "groove, Kts = 1.8" in row(report, "fatigue").note
    # the static check: Kts times the nominal stress of the larger torque, against the allowable
    notch_row = max(
        (c for c in report.checks if c.kind == "notch_stress"), key=lambda c: c.utilisation
    )
    assert notch_row.value == pytest.approx(1.8 * tau(T_MAX, 30.0) * MPA, rel=1e-9)


def test_notch_radius_gives_q_by_neuber() -> None:
    # q = 1/(1 + √a/√r), √a from Shigley eq. (6-35b) in kpsi (from memory; see the module note).
    radius_mm = 1.0
    strength_kpsi = SUT / KPSI_MPA
    sqrt_a = 0.190 - 2.51e-3 * strength_kpsi + 1.35e-5 * strength_kpsi**2
    sqrt_a -= 2.67e-8 * strength_kpsi**3
    q = 1.0 / (1.0 + sqrt_a / math.sqrt(radius_mm / INCH_MM))
    notch = {"kts": 1.8, "radius": radius_mm}
    report = report_of(fatigue_case(segments=[segment(30.0, notch=notch)]))
    hand = hand_factors(*hand_cycle(30.0, 1.0 + q * 0.8), shear_endurance(30.0))
    assert_row(row(report, "fatigue"), hand["goodman"])


def test_keyseat_and_notch_on_one_segment_take_the_larger_factor() -> None:
    # Where along the segment each sits is not known: the larger Kfs governs (keyseat 3.0, q = 1).
    notch = {"kts": 1.8, "notch_sensitivity": 0.85}
    report = report_of(fatigue_case(segments=[segment(30.0, keyseat=True, notch=notch)]))
    (point,) = report.fatigue_points
    assert point.concentration == pytest.approx(3.0, rel=1e-12)
    kinds = {c.kind for c in report.checks}
    assert {"keyseat_stress", "notch_stress"} <= kinds


def test_nominal_mean_stress_leaves_the_mean_unconcentrated() -> None:
    # mean_concentration "none": τm nominal, τa with Kfs (Kf in the endurance limit only, as in
    # Brown, Marks' Calculations for Machine Design, ch. 7, Example 3).
    notch = {"kts": 1.8, "notch_sensitivity": 0.85}
    fatigue = {
        "extremes": ["A", "B"],
        "finish": "machined",
        "reliability": 0.99,
        "factor_of_safety": REQUIRED,
        "mean_concentration": "none",
    }
    report = report_of(fatigue_case(segments=[segment(30.0, notch=notch)], fatigue=fatigue))
    kfs = 1.0 + 0.85 * 0.8
    mean, _ = hand_cycle(30.0)
    _, alternating = hand_cycle(30.0, kfs)
    hand = hand_factors(mean, alternating, shear_endurance(30.0))
    assert_row(row(report, "fatigue"), hand["goodman"])
    assert_row(row(report, "first_cycle_yield"), hand["first_cycle_yield"])
    assert "nominal mean stress" in row(report, "fatigue").note
    default = report_of(fatigue_case(segments=[segment(30.0, notch=notch)]))
    assert row(default, "fatigue").value > row(report, "fatigue").value


def test_notch_round_trips_through_a_saved_case(tmp_path: Path) -> None:
    notch = {"kts": 1.8, "radius": 1.0, "description": "ring groove"}
    fatigue = {"extremes": ["A", "B"], "mean_concentration": "none"}
    case = fatigue_case(segments=[segment(30.0, notch=notch)], fatigue=fatigue)
    model = parse_case(case)
    path = tmp_path / "saved.json"
    save_case(model, path, us_customary())
    written = json.loads(path.read_text(encoding="utf-8"))
    saved = written["shafts"][0]["segments"][0]["notch"]
    assert saved["radius"] == pytest.approx(1.0 / INCH_MM, rel=1e-11)
    assert (saved["kts"], saved["description"]) == (1.8, "ring groove")
    assert written["design"]["fatigue"]["mean_concentration"] == "none"
    again = load_case(path).shafts[0].segments[0].notch
    original = model.shafts[0].segments[0].notch
    assert again is not None and original is not None
    assert again.radius == pytest.approx(original.radius, rel=1e-11)
    assert (again.kts, again.notch_sensitivity, again.label) == (1.8, None, "ring groove")


# --- (3) the JSON check document ---------------------------------------------------------------


def shoulder_model_case() -> dict[str, Any]:
    return fatigue_case(segments=[segment(BIG, 300.0), segment(SMALL, 200.0, fillet_radius=FILLET)])


@pytest.mark.parametrize(
    ("system", "length_per_mm"),
    [("mm", 1.0), ("si", 1e-3), ("us", 1.0 / INCH_MM)],
    ids=["mm-MPa", "SI", "US-customary"],
)
def test_check_json_carries_dimensionless_fatigue_rows(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], system: str, length_per_mm: float
) -> None:
    case = shoulder_model_case()
    if system != "mm":
        units = SI if system == "si" else us_customary()
        case = case_to_dict(parse_case(case), units)
    status, out, err = run_cli(["check", str(write(tmp_path, "c.json", case)), "--json"], capsys)
    assert err == ""
    document = json.loads(out)
    assert set(document) == {"passes", "checks", "caution", "notes"}
    rows = [r for r in document["checks"] if r["kind"] in ("fatigue", "first_cycle_yield")]
    assert len(rows) == 4  # two kinds × two checked segments
    hand = {
        0: hand_factors(*hand_cycle(BIG), shear_endurance(BIG)),
        1: hand_factors(*hand_cycle(SMALL, shoulder_kfs()), shear_endurance(SMALL)),
    }
    for entry in rows:
        assert set(entry) == ROW_KEYS
        assert entry["result"] == "fatigue: A ↔ B"
        assert entry["shaft"] == "main"
        key = "goodman" if entry["kind"] == "fatigue" else "first_cycle_yield"
        factor = hand[entry["segment"]][key]
        # dimensionless: 1/n and 1/n_required whatever the file's stress unit
        assert entry["value"] == pytest.approx(1.0 / factor, rel=1e-9)
        assert entry["limit"] == pytest.approx(1.0 / REQUIRED, rel=1e-12)
        assert entry["utilisation"] == pytest.approx(REQUIRED / factor, rel=1e-9)
        assert entry["passes"] is (factor >= REQUIRED)
    shoulder = next(r for r in rows if r["segment"] == 1 and r["kind"] == "fatigue")
    assert shoulder["x"] == pytest.approx(300.0 * length_per_mm, rel=1e-9)  # in file units
    assert document["passes"] is all(r["passes"] for r in document["checks"])
    assert status == (0 if document["passes"] else 1)


# --- (4) case-file round trip and the JSON Schema ----------------------------------------------

FULL_EXTREMES = {
    "extremes": ["A", "B"],
    "finish": "ground",
    "reliability": 0.999,
    "temperature": 400.0,
    "criterion": "gerber",
    "factor_of_safety": 2.0,
    "endurance_limit": 200.0,
}
FULL_PAIR = {
    "mean": "A",
    "alternating": "B",
    "finish": "hot-rolled",
    "reliability": 0.9,
    "criterion": "soderberg",
    "factor_of_safety": 1.25,
}


@pytest.mark.parametrize("fatigue", [FULL_EXTREMES, FULL_PAIR], ids=["extremes", "mean-alt"])
def test_design_fatigue_round_trips_through_a_saved_case(
    tmp_path: Path, fatigue: dict[str, Any]
) -> None:
    model = parse_case(fatigue_case(fatigue=copy.deepcopy(fatigue)))
    written = case_to_dict(model)
    assert written["design"]["fatigue"] == fatigue
    path = tmp_path / "saved.json"
    save_case(model, path)
    again = load_case(path)
    assert fatigue_of(again) == fatigue_of(model)
    assert again == model
    jsonschema.Draft202012Validator(case_schema()).validate(json.loads(path.read_text("utf-8")))


def test_endurance_limit_round_trips_in_us_customary_units(tmp_path: Path) -> None:
    model = parse_case(fatigue_case(fatigue=copy.deepcopy(FULL_EXTREMES)))
    path = tmp_path / "us.json"
    save_case(model, path, us_customary())
    written = json.loads(path.read_text("utf-8"))["design"]["fatigue"]
    # 200 MPa in psi: 200/6.894757293168361 kpsi (NIST SP 811)
    assert written["endurance_limit"] == pytest.approx(200.0 / KPSI_MPA * 1e3, rel=1e-11)
    assert written["temperature"] == 400.0  # kelvin in every unit system
    again = fatigue_of(load_case(path))
    assert again is not None
    assert again.endurance_limit == pytest.approx(200.0 * MPA, rel=1e-11)
    assert again.extremes == ("A", "B")
    assert (again.finish, again.reliability, again.criterion) == ("ground", 0.999, "gerber")


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft202012Validator:
    schema = case_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


VALID_FATIGUE = {
    "extremes-only": {"extremes": ["A", "B"]},
    "extremes-full": FULL_EXTREMES,
    "mean-alternating": {"mean": "A", "alternating": "B"},
    "mean-alternating-full": FULL_PAIR,
    "nulls": {"extremes": ["A", "B"], "temperature": None, "endurance_limit": None},
    "polished-asme": {"extremes": ["A", "B"], "finish": "polished", "criterion": "asme_elliptic"},
    "nominal-mean": {"extremes": ["A", "B"], "mean_concentration": "none"},
    "concentrated-mean": {"extremes": ["A", "B"], "mean_concentration": "kfs"},
}


@pytest.mark.parametrize("fatigue", VALID_FATIGUE.values(), ids=VALID_FATIGUE.keys())
def test_schema_and_loader_accept_the_valid_forms(
    validator: jsonschema.Draft202012Validator, fatigue: dict[str, Any]
) -> None:
    case = fatigue_case(fatigue=copy.deepcopy(fatigue))
    validator.validate(case)
    assert fatigue_of(parse_case(case)) is not None


INVALID_FATIGUE = {
    "extremes-of-one": {"extremes": ["A"]},
    "extremes-of-three": {"extremes": ["A", "B", "A"]},
    "extremes-not-a-list": {"extremes": "A"},
    "extremes-and-mean": {"extremes": ["A", "B"], "mean": "A", "alternating": "B"},
    "only-mean": {"mean": "A"},
    "only-alternating": {"alternating": "B"},
    "neither": {"finish": "machined"},
    "unknown-finish": {"extremes": ["A", "B"], "finish": "sandblasted"},
    "reliability-not-tabulated": {"extremes": ["A", "B"], "reliability": 0.98},
    "unknown-criterion": {"extremes": ["A", "B"], "criterion": "morrow"},
    "fos-below-one": {"extremes": ["A", "B"], "factor_of_safety": 0.9},
    "endurance-limit-zero": {"extremes": ["A", "B"], "endurance_limit": 0},
    "endurance-limit-negative": {"extremes": ["A", "B"], "endurance_limit": -100},
    "temperature-zero": {"extremes": ["A", "B"], "temperature": 0},
    "unknown-key": {"extremes": ["A", "B"], "margin": 0.1},
    "unknown-mean-concentration": {"extremes": ["A", "B"], "mean_concentration": "half"},
}


@pytest.mark.parametrize("fatigue", INVALID_FATIGUE.values(), ids=INVALID_FATIGUE.keys())
def test_schema_rejects_the_bad_forms(
    validator: jsonschema.Draft202012Validator, fatigue: dict[str, Any]
) -> None:
    errors = list(validator.iter_errors(fatigue_case(fatigue=copy.deepcopy(fatigue))))
    assert errors, fatigue
    assert all(list(error.absolute_path)[:2] == ["design", "fatigue"] for error in errors)


# --- (5) bad input through `workbench check` ---------------------------------------------------

BAD_INPUT = [
    ("unknown-extreme", {"extremes": ["A", "C"]}, "design.fatigue.extremes", "'C'"),
    ("unknown-mean", {"mean": "Z", "alternating": "B"}, "design.fatigue.mean", "'Z'"),
    ("unknown-alternating", {"mean": "A", "alternating": "Z"}, "design.fatigue.alternating", "'Z'"),
    ("extremes-and-mean", {"extremes": ["A", "B"], "mean": "A", "alternating": "B"},
     "design.fatigue.extremes", "not both"),
    ("only-mean", {"mean": "A"}, "design.fatigue.alternating", "required"),
    ("unknown-finish", {"extremes": ["A", "B"], "finish": "sandblasted"}, "design.fatigue.finish",
     "sandblasted"),
    ("reliability-not-tabulated", {"extremes": ["A", "B"], "reliability": 0.98},
     "design.fatigue.reliability", "0.98"),
    ("unknown-criterion", {"extremes": ["A", "B"], "criterion": "morrow"},
     "design.fatigue.criterion", "morrow"),
    ("fos-below-one", {"extremes": ["A", "B"], "factor_of_safety": 0.9},
     "design.fatigue.factor_of_safety", "0.9"),
    ("endurance-limit-zero", {"extremes": ["A", "B"], "endurance_limit": 0},
     "design.fatigue.endurance_limit", "0"),
    ("endurance-limit-negative", {"extremes": ["A", "B"], "endurance_limit": -100},
     "design.fatigue.endurance_limit", "-100"),
    ("extremes-of-one", {"extremes": ["A"]}, "design.fatigue.extremes", "two"),
    ("extremes-of-three", {"extremes": ["A", "B", "A"]}, "design.fatigue.extremes", "two"),
    ("unknown-mean-concentration", {"extremes": ["A", "B"], "mean_concentration": "half"},
     "design.fatigue.mean_concentration", "half"),
]  # fmt: skip


@pytest.mark.parametrize(
    ("fatigue", "field", "words"),
    [entry[1:] for entry in BAD_INPUT],
    ids=[entry[0] for entry in BAD_INPUT],
)
def test_bad_fatigue_input_is_one_stderr_line_naming_the_field(
    tmp_path: Path,
    capsys: pytest.CaptureFixture[str],
    fatigue: dict[str, Any],
    field: str,
    words: str,
) -> None:
    case = fatigue_case(fatigue=copy.deepcopy(fatigue))
    status, out, err = run_cli(["check", str(write(tmp_path, "bad.json", case))], capsys)
    assert status == 2
    assert out == ""
    lines = err.splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith(field + ": "), err
    assert words in lines[0], err
    # the same from the library: an InputError naming the field
    with pytest.raises(InputError) as caught:
        run_checks(solve(parse_case(case)))
    assert caught.value.field == field


def test_bad_fatigue_input_in_a_real_process(tmp_path: Path) -> None:
    path = write(tmp_path, "bad.json", fatigue_case(fatigue={"extremes": ["A", "B", "A"]}))
    environment = dict(os.environ)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(PROJECT_ROOT), environment.get("PYTHONPATH", "")) if part
    )
    completed = subprocess.run(
        [sys.executable, "-m", "workbench.cli", "check", str(path), "--json"],
        capture_output=True,
        text=True,
        env=environment,
        cwd=PROJECT_ROOT,
        timeout=60,
        check=False,
    )
    assert completed.returncode == 2
    assert completed.stdout == ""
    assert completed.stderr.splitlines() == [completed.stderr.strip()]
    assert completed.stderr.startswith("design.fatigue.extremes: ")
    assert "Traceback" not in completed.stderr


NOT_CHECKED = {
    "layered": {
        "length": 200,
        "layers": [
            {"material": "steel", "section": {"shape": "tube", "outer_diameter": 40,
                                              "inner_diameter": 30}},
            {"material": "steel", "section": {"shape": "solid", "diameter": 30}},
        ],
    },
    "rectangle": {"length": 200, "material": "steel",
                  "section": {"shape": "rectangle", "width": 30, "height": 20}},
    "no-ultimate-strength": {"length": 200, "material": "no-ultimate",
                             "section": {"shape": "solid", "diameter": 30}},
}  # fmt: skip


@pytest.mark.parametrize("second", NOT_CHECKED.values(), ids=NOT_CHECKED.keys())
def test_a_segment_the_check_cannot_treat_is_noted_not_checked(second: dict[str, Any]) -> None:
    case = fatigue_case(segments=[segment(30.0, 300.0), copy.deepcopy(second)])
    # a steel whose ultimate strength is not stated
    case["materials"]["no-ultimate"] = {"shear_modulus": 79300, "yield_strength": SY}
    report = report_of(case)
    notes = [note for note in report.notes if note.startswith("main segment 1")]
    assert len(notes) == 1, report.notes
    assert "fatigue" in notes[0]
    assert "not checked" in notes[0]
    assert "round" in notes[0]
    assert "ultimate" in notes[0]
    assert notes[0] in check_document(report)["notes"]
    assert not [c for c in report.checks if c.segment == 1 and c.kind == "fatigue"]
    # the round steel segment beside it is still checked, by hand
    hand = hand_factors(*hand_cycle(30.0), shear_endurance(30.0))
    assert_row(row(report, "fatigue", 0), hand["goodman"])
    assert_row(row(report, "first_cycle_yield", 0), hand["first_cycle_yield"])


@pytest.mark.parametrize("mean_concentration", ["kfs", "none"])
def test_the_reported_cycle_is_the_worst_station(mean_concentration: str) -> None:
    # The check picks its station among all at once; the scalar chain (Shigley eq. 6-36 and the
    # criteria of §6-12) run station by station must find the same worst cycle. A load inside
    # the shaft and a distributed torque make the stress vary along it.
    fatigue = {
        "extremes": ["A", "B"],
        "reliability": 0.99,
        "criterion": "gerber",
        "mean_concentration": mean_concentration,
    }
    load_cases = [
        {
            "name": "A",
            "torques": [{"shaft": "main", "x": 350.0, "torque": 260.0}],
            "distributed": [
                {
                    "shaft": "main",
                    "start": 0,
                    "end": 500,
                    "intensity_start": 0.3,
                    "intensity_end": 0,
                }
            ],
        },
        {"name": "B", "torques": [{"shaft": "main", "x": 500.0, "torque": -90.0}]},
    ]
    case = fatigue_case(
        segments=[
            segment(BIG, 300.0, keyseat=True),
            segment(SMALL, 200.0, notch={"kts": 1.6, "radius": 0.8}),
        ],
        fatigue=fatigue,
        load_cases=load_cases,
    )
    results = solve(parse_case(case))
    report = run_checks(results)
    mesh = results.mesh
    q = notch_sensitivity_torsion(0.8 * MM, SUT * MPA).value
    body = {0: 3.0, 1: 1.0 + q * 0.6}  # keyseat Kts 3 with q = 1; notch Kts 1.6 (eq. 6-32)
    assert len(report.fatigue_points) == 2
    for point in report.fatigue_points:
        kfs = body[point.segment]
        assert point.concentration == pytest.approx(kfs, rel=1e-12)
        kfsm = kfs if mean_concentration == "kfs" else 1.0
        on_segment = mesh.element_segment[mesh.station_element] == point.segment
        worst = math.inf
        for station in np.flatnonzero(on_segment):
            stresses = stresses_from_extremes(
                float(results.torque[0, station]),
                float(results.torque[1, station]),
                float(mesh.station_stress_per_torque[station]),
                kfs,
                kfsm,
            )
            outcome = fatigue_factors(
                stresses.mean_shear,
                stresses.alternating_shear,
                point.factors.endurance_shear,
                point.factors.ultimate_shear,
                point.factors.yield_shear,
            )
            worst = min(worst, outcome.gerber, outcome.first_cycle_yield)
        found = min(point.factors.gerber, point.factors.first_cycle_yield)
        assert found == pytest.approx(worst, rel=1e-12)
