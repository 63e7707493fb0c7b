"""Design checks (``workbench.design.checks``) against values worked out by hand.

The reference for every number is a hand calculation on a statically determinate cantilever
(internal torque known from statics alone), with the formula and its source beside it:

* τ = 16T/(πd³), J = πd⁴/32, θ' = T/(GJ), θ = Σ TᵢLᵢ/(GᵢJᵢ): any mechanics-of-materials text
  (Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3-3.4).
* Shear yield Sy/√3 (von Mises) and Sy/2 (Tresca): Shigley's *Mechanical Engineering Design*,
  ch. 5.
* Transmission-shafting code: allowable shear min(0.30 Sy, 0.18 Su), −25 % with keyways; worked
  value Sy 150, Su 300 MPa → 45 MPa (ASME *Code for Design of Transmission Shafting*).
* Shoulder fillet Kts = A(r/d)^b (Norton, *Machine Design*, App. C, D/d = 1.20: A 0.83425,
  b −0.21649) on τ_nom = 16T/(πd³) of the smaller diameter.
* Keyseat Kts = 3.0 (Shigley, Table 7-1, end-milled keyseat).
* Transverse hole Ktg = 4 − 6.055(d/D) + 32.764(d/D)² − 38.33(d/D)³ (Pilkey & Pilkey,
  *Peterson's Stress Concentration Factors*, 3rd ed.), a normal stress; its equivalent shear
  stress is σ/√3 under von Mises (uniaxial stress at the hole edge; Shigley ch. 5).
* Bonded layers share the twist: layer i carries Tᵢ = T·GᵢJᵢ/ΣGJ, so τᵢ = T·Gᵢ·rᵢ/ΣGJ
  (Gere & Goodno, 8th ed., §3.8, composite bars).

Material constants: Shigley Table A-5 (carbon steel G 79.3 GPa) with AISI 1020 cold-drawn
strengths Sy 390, Su 470 MPa (Shigley Table A-20, from memory); Hibbeler, *Mechanics of
Materials*, property table (memory): A-36 steel G 75 GPa, Sy 250 MPa; stainless 304 G 75 GPa,
Sy 207 MPa; Al 6061-T6 G 26 GPa, Sy 255 MPa.
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

import pytest

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.cli import main
from workbench.design.caution import CAUTION
from workbench.design.checks import Check, CheckReport, check_document, check_text, run_checks
from workbench.design.concentration import shoulder_fillet_kts
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

PROJECT_ROOT = Path(__file__).resolve().parents[1]

MM = 1e-3  # m
MPA = 1e6  # Pa
DEG = math.pi / 180.0  # rad

#: Shigley Table A-5 carbon steel; AISI 1020 CD strengths (Table A-20, from memory). MPa.
STEEL_1020 = {"shear_modulus": 79300, "yield_strength": 390, "ultimate_strength": 470}
G_STEEL = 79.3e9
SY_STEEL = 390e6

ROW_KEYS = {"result", "shaft", "segment", "kind", "value", "limit", "utilisation", "passes", "x"}


# --- hand formulas ---------------------------------------------------------------------------


def polar(diameter: float, bore: float = 0.0) -> float:
    """J = π(D⁴ − d⁴)/32 (m⁴)."""
    return math.pi * (diameter**4 - bore**4) / 32.0


def tau(torque: float, diameter: float) -> float:
    """τ = 16T/(πd³) (Pa)."""
    return 16.0 * abs(torque) / (math.pi * diameter**3)


def hole_ktg(ratio: float) -> float:
    """Pilkey & Pilkey transverse-hole polynomial (normal stress over gross τ_nom)."""
    return 4.0 - 6.055 * ratio + 32.764 * ratio**2 - 38.33 * ratio**3


# --- the cantilever ----------------------------------------------------------------------------
# x = 0 fixed; segment 0: Ø36 mm × 300 mm with a keyseat; segment 1: Ø30 mm × 200 mm with a
# 1.5 mm shoulder fillet (D/d = 1.20, r/d = 0.05) and a Ø6 mm cross hole (d/D = 0.2).
D0, D1, L0, L1 = 36 * MM, 30 * MM, 0.300, 0.200
FILLET, HOLE = 1.5 * MM, 6 * MM
G_J0, G_J1 = G_STEEL * polar(D0), G_STEEL * polar(D1)

#: Internal torque (N·m) of each segment in each result, from statics of the cantilever:
#: "A" +400 N·m at the free end; "B" −250 N·m at the step; "A+B" their sum.
SEGMENT_TORQUE = {"A": (400.0, 400.0), "B": (-250.0, 0.0), "A+B": (150.0, 400.0)}


def cantilever_case(si: bool = False, design: dict[str, Any] | None = None) -> dict[str, Any]:
    """The cantilever as a case file in mm/N·m/MPa/deg, or (``si``) the same in SI base units.

    Numbers are given in mm, MPa and degrees and converted here by exact factors for the SI copy.
    """

    def length(mm: float) -> float:
        return mm * MM if si else mm

    def stress(mpa: float) -> float:
        return mpa * MPA if si else mpa

    def angle(deg: float) -> float:
        return deg * DEG if si else deg

    if design is None:
        design = {
            "factor_of_safety": 2.0,
            "shear_criterion": "von_mises",
            "max_twist_rate": 0.001,  # deg/mm = 1°/m
            "rotation_limits": [
                {"shaft": "main", "start": 0, "end": 500, "limit": 1.0},
                {"shaft": "main", "start": 100, "end": 400, "limit": 0.5},
            ],
        }
    design = copy.deepcopy(design)
    if si:
        if "max_twist_rate" in design:
            design["max_twist_rate"] = design["max_twist_rate"] * DEG / MM
        if "allowable_shear_stress" in design:
            design["allowable_shear_stress"] = stress(design["allowable_shear_stress"])
        for limit in design.get("rotation_limits", []):
            limit["start"], limit["end"] = length(limit["start"]), length(limit["end"])
            limit["limit"] = angle(limit["limit"])
    case: dict[str, Any] = {
        "title": "stepped cantilever for hand checks",
        "materials": {"steel": {key: stress(value) for key, value in STEEL_1020.items()}},
        "shafts": [
            {
                "id": "main",
                "segments": [
                    {
                        "length": length(300),
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": length(36)},
                        "keyseat": True,
                    },
                    {
                        "length": length(200),
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": length(30)},
                        "fillet_radius": length(1.5),
                        "cross_hole_diameter": length(6),
                    },
                ],
            }
        ],
        "supports": [{"shaft": "main", "x": 0, "kind": "fixed"}],
        "load_cases": [
            {"name": "A", "torques": [{"shaft": "main", "x": length(500), "torque": 400}]},
            {"name": "B", "torques": [{"shaft": "main", "x": length(300), "torque": -250}]},
        ],
        "combinations": [{"name": "A+B", "factors": {"A": 1.0, "B": 1.0}}],
        "design": design,
    }
    if not si:
        case["units"] = {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"}
    return case


def checks_of(case: dict[str, Any]) -> CheckReport:
    return run_checks(solve(parse_case(case)))


def find(report: CheckReport, result: str, kind: str, segment: int | None) -> list[Check]:
    return [
        c for c in report.checks if c.result == result and c.kind == kind and c.segment == segment
    ]


def only(report: CheckReport, result: str, kind: str, segment: int | None) -> Check:
    rows = find(report, result, kind, segment)
    assert len(rows) == 1, (result, kind, segment, rows)
    return rows[0]


def expected_cantilever_rows() -> dict[tuple[str, int | None, str, int], tuple[float, float]]:
    """(result, segment, kind, n-th of kind) -> (value, limit), all by hand, SI."""
    allowable = SY_STEEL / math.sqrt(3.0) / 2.0  # von Mises, FoS 2 (Shigley ch. 5)
    twist_limit = 0.001 * DEG / MM  # 1°/m
    # Norton App. C fit at D/d = 1.20 is the outside check of K; the product's own function is
    # the reference the row must reproduce (checked equal to the fit below).
    kts_norton = 0.83425 * (FILLET / D1) ** -0.21649
    kts = shoulder_fillet_kts(D0, D1, FILLET).value
    assert kts == pytest.approx(kts_norton, rel=1e-12)
    hole_equivalent = hole_ktg(HOLE / D1) / math.sqrt(3.0)
    rows: dict[tuple[str, int | None, str, int], tuple[float, float]] = {}
    for result, (t0, t1) in SEGMENT_TORQUE.items():
        rows[result, 0, "shear_stress", 0] = (tau(t0, D0), allowable)
        rows[result, 0, "keyseat_stress", 0] = (3.0 * tau(t0, D0), allowable)
        rows[result, 0, "twist_rate", 0] = (abs(t0) / G_J0, twist_limit)
        rows[result, 1, "shear_stress", 0] = (tau(t1, D1), allowable)
        rows[result, 1, "shoulder_stress", 0] = (kts * tau(t1, D1), allowable)
        rows[result, 1, "cross_hole_stress", 0] = (hole_equivalent * tau(t1, D1), allowable)
        rows[result, 1, "twist_rate", 0] = (abs(t1) / G_J1, twist_limit)
        # rotation = Σ T·L/(GJ) over the part of each segment between the two stations
        rows[result, None, "rotation", 0] = (abs(t0 * L0 / G_J0 + t1 * L1 / G_J1), 1.0 * DEG)
        rows[result, None, "rotation", 1] = (
            abs(t0 * 0.200 / G_J0 + t1 * 0.100 / G_J1),
            0.5 * DEG,
        )
    return rows


# --- the check table by hand -------------------------------------------------------------------


def test_cantilever_check_table_matches_hand_calculation() -> None:
    report = checks_of(cantilever_case())
    expected = expected_cantilever_rows()
    seen: dict[tuple[str, int | None, str], int] = {}
    actual = {}
    for check in report.checks:
        kind_key = (check.result, check.segment, check.kind)
        number = seen.get(kind_key, 0)
        seen[kind_key] = number + 1
        actual[(*kind_key, number)] = check
    assert set(actual) == set(expected)
    for key, (value, limit) in expected.items():
        check = actual[key]
        assert check.limit == pytest.approx(limit, rel=1e-12), key
        # zero-torque rows hold rounding noise: absolute tolerance relative to the limit
        assert check.value == pytest.approx(value, rel=1e-9, abs=1e-12 * limit), key
        assert check.utilisation == pytest.approx(value / limit, rel=1e-9, abs=1e-12), key
        assert check.passes == (value <= limit), key
        assert check.shaft == "main"


def test_cantilever_where_each_check_governs() -> None:
    report = checks_of(cantilever_case())
    # uniform torque along each segment: the first station of the segment governs
    assert only(report, "A", "shear_stress", 0).x == pytest.approx(0.0, abs=1e-12)
    assert only(report, "A", "shear_stress", 1).x == pytest.approx(0.300)
    assert only(report, "A", "shoulder_stress", 1).x == pytest.approx(0.300)
    ends = sorted(c.x for c in find(report, "A", "rotation", None))
    assert ends == pytest.approx([0.400, 0.500])


def test_cantilever_verdict_and_governing_check() -> None:
    report = checks_of(cantilever_case())
    # Hand: the largest utilisation is the twist rate of the Ø30 mm segment under 400 N·m,
    # 400/(79.3 GPa · π·0.030⁴/32) = 0.0634 rad/m against 1°/m = 0.01745 rad/m → 3.63.
    governing = report.governing
    assert governing is not None
    assert (governing.kind, governing.segment) == ("twist_rate", 1)
    assert governing.result in ("A", "A+B")
    assert governing.utilisation == pytest.approx(400.0 / G_J1 / DEG, rel=1e-9)
    expected = expected_cantilever_rows()
    assert governing.utilisation == pytest.approx(max(v / lim for v, lim in expected.values()))
    assert report.passes is False
    assert report.passes == all(c.value <= c.limit for c in report.checks)


def test_explicit_design_overrides_the_case_design() -> None:
    model = parse_case(cantilever_case())
    design = DesignCriteria(factor_of_safety=1.0, shear_criterion="tresca")
    report = run_checks(solve(model), design)
    limits = [c.limit for c in report.checks if c.kind.endswith("stress")]
    assert limits
    assert limits == pytest.approx([SY_STEEL / 2.0] * len(limits), rel=1e-12)
    assert not [c for c in report.checks if c.kind in ("twist_rate", "rotation")]


def test_no_design_uses_documented_defaults_and_says_so() -> None:
    case = cantilever_case()
    del case["design"]
    report = checks_of(case)
    limit = SY_STEEL / math.sqrt(3.0) / 2.0
    limits = [c.limit for c in report.checks]
    assert limits == pytest.approx([limit] * len(limits), rel=1e-12)
    assert any("no design criteria" in note for note in report.notes)


# --- shoulder: nominal stress on the smaller diameter --------------------------------------------


def stepped(
    small_first: bool, torque_x: float, fillet: float = 1.5, keyseat_layered: bool = False
) -> dict[str, Any]:
    """Two solid steps Ø30/Ø36 mm (order by ``small_first``), fillet on the second, in mm."""
    first, second = (30, 36) if small_first else (36, 30)
    return {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": STEEL_1020},
        "shafts": [
            {
                "id": "main",
                "segments": [
                    {"length": 300, "material": "steel",
                     "section": {"shape": "solid", "diameter": first}},
                    {"length": 200, "material": "steel", "fillet_radius": fillet,
                     "section": {"shape": "solid", "diameter": second}},
                ],
            }
        ],
        "supports": [{"shaft": "main", "x": 0}],
        "load_cases": [{"name": "A", "torques": [{"shaft": "main", "x": torque_x, "torque": 400}]}],
        "design": {"factor_of_safety": 2.0},
    }  # fmt: skip


@pytest.mark.parametrize("small_first", [False, True], ids=["step-down", "step-up"])
def test_shoulder_uses_kts_times_nominal_on_smaller_diameter(small_first: bool) -> None:
    report = checks_of(stepped(small_first, torque_x=500))
    row = only(report, "A", "shoulder_stress", 1)
    kts = shoulder_fillet_kts(0.036, 0.030, 0.0015).value
    # Norton App. C, D/d = 1.20 fit, r/d = 0.05: Kts ≈ 1.55
    assert kts == pytest.approx(0.83425 * 0.05**-0.21649, rel=1e-12)
    assert row.value == pytest.approx(kts * 16 * 400 / (math.pi * 0.030**3), rel=1e-9)
    assert row.x == pytest.approx(0.300)


def test_shoulder_carries_the_torque_of_the_smaller_diameter_at_the_shoulder() -> None:
    # Ø30 mm up to a shoulder at x = 300 mm, Ø36 mm beyond; 400 N·m enters at the shoulder (a hub
    # against it). The Ø30 mm side carries 400 N·m right up to the fillet, so the fillet sees
    # Kts·16·400/(π·0.030³) (nominal stress on the smaller diameter, Norton App. C), whatever the
    # larger side carries.
    report = checks_of(stepped(small_first=True, torque_x=300))
    row = only(report, "A", "shoulder_stress", 1)
    kts = shoulder_fillet_kts(0.036, 0.030, 0.0015).value
    assert row.value == pytest.approx(kts * 16 * 400 / (math.pi * 0.030**3), rel=1e-9)


def test_fillet_radius_outside_fit_is_flagged() -> None:
    # r/d = 0.3/30 = 0.01 < 0.02, below Norton's/Peterson's charted range
    report = checks_of(stepped(small_first=False, torque_x=500, fillet=0.3))
    row = only(report, "A", "shoulder_stress", 1)
    assert row.note.startswith("OUTSIDE THE DATA'S RANGE")
    assert any("OUTSIDE THE DATA'S RANGE" in note and "segment 1" in note for note in report.notes)
    document = check_document(report)
    assert any("OUTSIDE THE DATA'S RANGE" in note for note in document["notes"])
    assert "OUTSIDE THE DATA'S RANGE" in check_text(report)


def test_fit_inside_range_is_not_flagged() -> None:
    report = checks_of(stepped(small_first=False, torque_x=500, fillet=1.5))
    assert not any("OUTSIDE" in note for note in report.notes)
    assert "OUTSIDE" not in only(report, "A", "shoulder_stress", 1).note


def test_cross_hole_outside_fit_is_flagged() -> None:
    case = cantilever_case()
    case["shafts"][0]["segments"][1]["cross_hole_diameter"] = 15  # d/D = 0.5 > 0.4
    report = checks_of(case)
    assert any(
        "OUTSIDE THE DATA'S RANGE" in note and "cross_hole_stress" in note for note in report.notes
    )
    row = only(report, "A", "cross_hole_stress", 1)
    # out of range the value at d/D = 0.4 is used (flagged as not conservative)
    assert row.value == pytest.approx(hole_ktg(0.4) / math.sqrt(3.0) * tau(400, D1), rel=1e-9)


@pytest.mark.parametrize("where", ["layered", "rectangle"])
def test_keyseat_on_a_segment_it_cannot_check_is_not_dropped_silently(where: str) -> None:
    # A keyseat the checks cannot evaluate must either be checked or be named in the notes (as the
    # shoulder and cross-hole checks do), never vanish from the report.
    case = stepped(small_first=False, torque_x=500)
    if where == "layered":
        segment = {
            "length": 200,
            "keyseat": True,
            "layers": [
                {"material": "steel",
                 "section": {"shape": "tube", "outer_diameter": 30, "inner_diameter": 20}},
                {"material": "steel", "section": {"shape": "solid", "diameter": 20}},
            ],
        }  # fmt: skip
    else:
        segment = {
            "length": 200,
            "keyseat": True,
            "material": "steel",
            "section": {"shape": "rectangle", "width": 30, "height": 20},
        }
    case["shafts"][0]["segments"][1] = segment
    report = checks_of(case)
    checked = find(report, "A", "keyseat_stress", 1)
    noted = [note for note in report.notes if "keyseat" in note and "segment 1" in note]
    assert checked or noted


# --- layered segments: per-layer allowables ------------------------------------------------------

HIBBELER = {  # Hibbeler, Mechanics of Materials, property table (memory); MPa
    "a36": {"shear_modulus": 75000, "yield_strength": 250},
    "ss304": {"shear_modulus": 75000, "yield_strength": 207},
    "al6061": {"shear_modulus": 26000, "yield_strength": 255},
}


def layered_case(sleeve: str, core: str) -> dict[str, Any]:
    """Cantilever, one layered segment: sleeve Ø40/30 mm bonded over a Ø30 mm core, 1 kN·m."""
    return {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {name: HIBBELER[name] for name in {sleeve, core}},
        "shafts": [
            {
                "id": "main",
                "segments": [
                    {
                        "length": 250,
                        "layers": [
                            {"material": sleeve,
                             "section": {"shape": "tube", "outer_diameter": 40,
                                         "inner_diameter": 30}},
                            {"material": core, "section": {"shape": "solid", "diameter": 30}},
                        ],
                    }
                ],
            }
        ],
        "supports": [{"shaft": "main", "x": 0}],
        "load_cases": [{"name": "A", "torques": [{"shaft": "main", "x": 250, "torque": 1000}]}],
        "design": {"factor_of_safety": 1.5},
    }  # fmt: skip


@pytest.mark.parametrize(
    ("sleeve", "core", "governing_layer"),
    [
        # Equal G: stress ∝ radius. Sleeve 304 at r = 20 mm: 75·20/207 = 7.25 > core A-36
        # 75·15/250 = 4.50 → the weaker sleeve governs.
        ("ss304", "a36", 0),
        # Al sleeve: 26·20/255 = 2.04 < A-36 core 75·15/250 = 4.50 → the weaker (Sy 250) core.
        ("al6061", "a36", 1),
        # A-36 sleeve 75·20/250 = 6.00 > 304 core 75·15/207 = 5.43 → radius beats strength.
        ("a36", "ss304", 0),
    ],
)
def test_layered_segment_checks_each_layer_against_its_own_allowable(
    sleeve: str, core: str, governing_layer: int
) -> None:
    report = checks_of(layered_case(sleeve, core))
    row = only(report, "A", "shear_stress", 0)
    torque = 1000.0
    layers = [  # (G, outer radius, J, Sy), SI
        (HIBBELER[sleeve]["shear_modulus"] * MPA, 0.020, polar(0.040, 0.030),
         HIBBELER[sleeve]["yield_strength"] * MPA),
        (HIBBELER[core]["shear_modulus"] * MPA, 0.015, polar(0.030),
         HIBBELER[core]["yield_strength"] * MPA),
    ]  # fmt: skip
    rigidity = sum(g * j for g, _, j, _ in layers)
    stresses = [torque * g * r / rigidity for g, r, _, _ in layers]
    allowables = [sy / math.sqrt(3.0) / 1.5 for *_, sy in layers]
    utilisations = [s / a for s, a in zip(stresses, allowables, strict=True)]
    assert max(range(2), key=lambda i: utilisations[i]) == governing_layer
    assert row.value == pytest.approx(stresses[governing_layer], rel=1e-9)
    assert row.limit == pytest.approx(allowables[governing_layer], rel=1e-12)
    assert row.utilisation == pytest.approx(max(utilisations), rel=1e-9)
    assert row.note.startswith(f"layer {governing_layer}:")


# --- criteria ----------------------------------------------------------------------------------

#: ASME transmission-shafting code worked value: Sy 150 MPa, Su 300 MPa.
CODE_MATERIAL = {"shear_modulus": 79300, "yield_strength": 150, "ultimate_strength": 300}


@pytest.mark.parametrize(
    ("design", "limit_mpa"),
    [
        ({"factor_of_safety": 2.0, "shear_criterion": "von_mises"}, 150 / math.sqrt(3) / 2),
        ({"factor_of_safety": 2.0, "shear_criterion": "tresca"}, 150 / 2 / 2),
        # min(0.30·150, 0.18·300) = min(45, 54) = 45 MPa; the code's own margin, FoS not applied
        ({"factor_of_safety": 3.0, "shear_criterion": "shafting_code"}, 45.0),
        # −25 % with keyways: 33.75 MPa
        ({"factor_of_safety": 3.0, "shear_criterion": "shafting_code", "keyway": True}, 33.75),
        # a stated allowable is used as given
        ({"factor_of_safety": 2.0, "shear_criterion": "allowable",
          "allowable_shear_stress": 60.0}, 60.0),
    ],
    ids=["von_mises", "tresca", "shafting_code", "shafting_code_keyway", "allowable"],
)  # fmt: skip
def test_criterion_gives_documented_limit(design: dict[str, Any], limit_mpa: float) -> None:
    case = cantilever_case(design=design)
    case["materials"]["steel"] = CODE_MATERIAL
    report = checks_of(case)
    stress_rows = [c for c in report.checks if c.kind.endswith("stress")]
    assert stress_rows
    for row in stress_rows:
        assert row.limit == pytest.approx(limit_mpa * MPA, rel=1e-12)
    # the JSON row reports the limit in the file's MPa
    limits = [r["limit"] for r in check_document(report)["checks"] if r["kind"] == "shear_stress"]
    assert limits == pytest.approx([limit_mpa] * len(limits), rel=1e-12)


def test_cross_hole_equivalent_shear_under_tresca_is_half_the_peak() -> None:
    case = cantilever_case(design={"factor_of_safety": 2.0, "shear_criterion": "tresca"})
    row = only(checks_of(case), "A", "cross_hole_stress", 1)
    # uniaxial σ at the hole edge: Tresca equivalent shear σ/2 (Shigley ch. 5)
    assert row.value == pytest.approx(hole_ktg(0.2) / 2.0 * tau(400, D1), rel=1e-9)


# --- JSON document and units ----------------------------------------------------------------------


def run_cli(arguments: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    status = main(arguments)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def write(tmp_path: Path, name: str, case: dict[str, Any]) -> Path:
    path = tmp_path / name
    path.write_text(json.dumps(case), encoding="utf-8")
    return path


def test_check_json_document_shape(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = write(tmp_path, "mm.json", cantilever_case())
    status, out, _ = run_cli(["check", str(path), "--json"], capsys)
    document = json.loads(out)
    assert set(document) == {"passes", "checks", "caution", "notes"}
    assert document["caution"] == CAUTION
    assert isinstance(document["notes"], list)
    assert document["passes"] is False
    assert status == 1
    assert len(document["checks"]) == 27  # 9 checks × 3 results
    for row in document["checks"]:
        assert set(row) == ROW_KEYS
        assert isinstance(row["passes"], bool)
        assert row["segment"] is None or isinstance(row["segment"], int)


def test_check_json_is_in_the_files_units(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    mm_path = write(tmp_path, "mm.json", cantilever_case(si=False))
    si_path = write(tmp_path, "si.json", cantilever_case(si=True))
    _, mm_out, _ = run_cli(["check", str(mm_path), "--json"], capsys)
    _, si_out, _ = run_cli(["check", str(si_path), "--json"], capsys)
    mm_rows, si_rows = json.loads(mm_out)["checks"], json.loads(si_out)["checks"]
    assert len(mm_rows) == len(si_rows)
    # value/limit factor from the mm/MPa/deg file's unit to SI, per kind
    factor = {
        "shear_stress": MPA,
        "shoulder_stress": MPA,
        "keyseat_stress": MPA,
        "cross_hole_stress": MPA,
        "twist_rate": DEG / MM,
        "rotation": DEG,
    }
    for mm_row, si_row in zip(mm_rows, si_rows, strict=True):
        for key in ("result", "shaft", "segment", "kind", "passes"):
            assert mm_row[key] == si_row[key]
        scale = factor[mm_row["kind"]]
        assert mm_row["limit"] * scale == pytest.approx(si_row["limit"], rel=1e-12)
        assert mm_row["value"] * scale == pytest.approx(
            si_row["value"], rel=1e-9, abs=1e-12 * si_row["limit"]
        )
        assert mm_row["utilisation"] == pytest.approx(si_row["utilisation"], rel=1e-9, abs=1e-12)
        assert mm_row["x"] * MM == pytest.approx(si_row["x"], rel=1e-12, abs=1e-15)
    # and the SI rows are the hand values themselves
    hand = expected_cantilever_rows()
    first = next(r for r in si_rows if r["result"] == "A" and r["kind"] == "keyseat_stress")
    assert first["value"] == pytest.approx(hand["A", 0, "keyseat_stress", 0][0], rel=1e-9)
    mm_first = next(r for r in mm_rows if r["result"] == "A" and r["kind"] == "keyseat_stress")
    assert mm_first["value"] == pytest.approx(3 * 16 * 400 / (math.pi * 36.0**3) * 1e3, rel=1e-9)


# --- exit codes and bad input ------------------------------------------------------------------


def passing_case() -> dict[str, Any]:
    case = cantilever_case(
        design={"factor_of_safety": 1.0, "shear_criterion": "allowable",
                "allowable_shear_stress": 500.0, "max_twist_rate": 1.0}
    )  # fmt: skip
    return case


def cli_subprocess(*arguments: str) -> subprocess.CompletedProcess[str]:
    environment = dict(os.environ)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(PROJECT_ROOT), environment.get("PYTHONPATH", "")) if part
    )
    return subprocess.run(
        [sys.executable, "-m", "workbench.cli", *arguments],
        capture_output=True,
        text=True,
        env=environment,
        cwd=PROJECT_ROOT,
        timeout=60,
        check=False,
    )


def test_exit_codes_in_a_real_process(tmp_path: Path) -> None:
    good = write(tmp_path, "good.json", passing_case())
    bad = write(tmp_path, "bad.json", cantilever_case())
    broken_case = cantilever_case()
    broken_case["design"]["shear_criterion"] = "rankine"
    broken = write(tmp_path, "broken.json", broken_case)
    passed, failed, refused = (cli_subprocess("check", str(p)) for p in (good, bad, broken))
    assert passed.returncode == 0, passed.stderr
    assert "ALL CHECKS PASS" in passed.stdout
    assert failed.returncode == 1, failed.stderr
    assert "SOME CHECKS FAIL" in failed.stdout
    assert refused.returncode == 2
    assert refused.stdout == ""
    assert refused.stderr.splitlines() == [refused.stderr.strip()]
    assert refused.stderr.startswith("design.shear_criterion: ")
    assert "Traceback" not in refused.stderr


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"shear_criterion": "rankine"}, "design.shear_criterion"),
        ({"factor_of_safety": 0.8}, "design.factor_of_safety"),
        ({"shear_criterion": "allowable"}, "design.allowable_shear_stress"),
        (
            {"rotation_limits": [{"shaft": "main", "start": 0, "end": 900, "limit": 1.0}]},
            "design.rotation_limits[0].end",
        ),
        (
            {"rotation_limits": [{"shaft": "idler", "start": 0, "end": 100, "limit": 1.0}]},
            "design.rotation_limits[0].shaft",
        ),
        ({"max_twist": 0.001}, "design.max_twist"),
        ({"rotation_limits": [{"shaft": "main", "start": 0, "end": 100, "limt": 1.0}]},
         "design.rotation_limits[0].limt"),
    ],
    ids=["criterion", "fos-below-1", "allowable-missing", "rotation-off-shaft",
         "rotation-unknown-shaft", "unknown-key", "unknown-key-in-rotation-limit"],
)  # fmt: skip
@pytest.mark.parametrize("json_flag", [False, True], ids=["text", "json"])
def test_bad_design_is_one_stderr_line_naming_the_field(
    tmp_path: Path,
    capsys: pytest.CaptureFixture[str],
    change: dict[str, Any],
    field: str,
    json_flag: bool,
) -> None:
    case = cantilever_case()
    case["design"] = {"factor_of_safety": 2.0, **change}
    path = write(tmp_path, "case.json", case)
    status, out, err = run_cli(["check", str(path), *(["--json"] if json_flag else [])], capsys)
    assert status == 2
    assert out == ""
    lines = err.splitlines()
    assert len(lines) == 1, err
    assert lines[0].startswith(field + ": "), err
    # the same error from the library, as an InputError naming the field
    with pytest.raises(InputError) as caught:
        parse_case(case)
    assert caught.value.field == field


def test_zero_fillet_radius_is_bad_input_naming_the_segment(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # A zero fillet is a sharp corner with no finite Kts: bad input, named by its full path
    # (shafts[0].segments[1].fillet_radius) like every other field of a case file.
    case = cantilever_case()
    case["shafts"][0]["segments"][1]["fillet_radius"] = 0
    path = write(tmp_path, "case.json", case)
    status, out, err = run_cli(["check", str(path)], capsys)
    assert status == 2
    assert out == ""
    assert len(err.splitlines()) == 1
    assert err.startswith("shafts[0].segments[1].fillet_radius: "), err


# --- the caution -------------------------------------------------------------------------------


def test_every_check_report_carries_the_caution(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    report = checks_of(cantilever_case())
    assert CAUTION in check_text(report)
    assert check_document(report)["caution"] == CAUTION
    path = write(tmp_path, "case.json", cantilever_case())
    _, text, _ = run_cli(["check", str(path)], capsys)
    assert CAUTION in text
    _, text, _ = run_cli(["check", str(path), "--json"], capsys)
    assert json.loads(text)["caution"] == CAUTION
    _, text, _ = run_cli(["solve", str(path)], capsys)
    assert "Caution" in text
    assert "licensed professional practice" in text


def test_caution_is_about_codes_and_professional_practice() -> None:
    assert "codes" in CAUTION
    assert "licensed professional practice" in CAUTION


def test_demo_case_checks_against_its_own_criteria(capsys: pytest.CaptureFixture[str]) -> None:
    demo = PROJECT_ROOT / "workbench" / "cases" / "press_drive.json"
    status, out, _ = run_cli(["check", str(demo), "--json"], capsys)
    document = json.loads(out)
    assert status == (0 if document["passes"] else 1)
    shear = [r for r in document["checks"] if r["kind"] == "shear_stress"]
    # demo steel Sy 390 MPa, von Mises, FoS 2 (the case's own design)
    assert shear
    assert [r["limit"] for r in shear] == pytest.approx([390 / math.sqrt(3) / 2] * len(shear))
