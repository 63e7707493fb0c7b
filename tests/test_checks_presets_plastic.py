"""Named twist-rate limits and the plastic-reserve table of the check report."""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path

import pytest

from workbench.case.units import registry
from workbench.cli import main
from workbench.design.checks import plastic_reserves, run_checks
from workbench.solver.analysis import solve
from workbench.solver.io import case_to_dict, parse_case

DIAMETER_MM = 40.0
TORQUE = 500.0  # N·m

CASE = {
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {
        "steel": {"shear_modulus": 79300, "yield_strength": 350, "ultimate_strength": 520}
    },
    "shafts": [
        {
            "id": "s",
            "segments": [
                {
                    "length": 1000,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": DIAMETER_MM},
                }
            ],
        }
    ],
    "supports": [{"shaft": "s", "x": 0, "kind": "fixed"}],
    "load_cases": [{"name": "end", "torques": [{"shaft": "s", "x": 1000, "torque": TORQUE}]}],
}


def _case(**design: object) -> dict:
    case = copy.deepcopy(CASE)
    case["design"] = dict(design)
    return case


def _twist_limit(case: dict) -> float:
    report = run_checks(solve(parse_case(case)))
    (row,) = [check for check in report.checks if check.kind == "twist_rate"]
    return row.limit


def test_machine_shaft_preset_is_0_08_degrees_per_foot() -> None:
    # Hall, Holowenko & Laughlin, Schaum's Outline of Machine Design: 0.08°/ft for machine shafts
    # (a rule of thumb, common practice); the conversion is pint's.
    expected = registry().Quantity(0.08, "deg/ft").to("rad/m").magnitude
    assert _twist_limit(_case(max_twist_rate="machine-shaft")) == pytest.approx(expected, rel=1e-12)


def test_line_shaft_preset_is_one_degree_per_foot() -> None:
    # Same source: about 1°/ft for line shafting (rule of thumb).
    expected = registry().Quantity(1.0, "deg/ft").to("rad/m").magnitude
    assert _twist_limit(_case(max_twist_rate="line-shaft")) == pytest.approx(expected, rel=1e-12)


def test_twenty_diameters_rule_uses_the_segment_diameter() -> None:
    # "1° in 20 diameters" (common practice, no source): 1° over a length of 20·d.
    expected = math.radians(1.0) / (20.0 * DIAMETER_MM * 1e-3)
    assert _twist_limit(_case(max_twist_rate="twenty-diameters")) == pytest.approx(
        expected, rel=1e-12
    )


def test_a_preset_round_trips_by_name() -> None:
    saved = case_to_dict(parse_case(_case(max_twist_rate="line-shaft")))
    assert saved["design"]["max_twist_rate"] == "line-shaft"


def test_an_unknown_preset_is_bad_input(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "case.json"
    path.write_text(json.dumps(_case(max_twist_rate="very-stiff")), encoding="utf-8")
    assert main(["check", str(path)]) == 2
    error = capsys.readouterr().err.strip().splitlines()
    assert len(error) == 1 and error[0].startswith("design.max_twist_rate:")


@pytest.mark.parametrize(("criterion", "divisor"), [("von_mises", math.sqrt(3.0)), ("tresca", 2.0)])
def test_plastic_reserve_of_a_solid_shaft(criterion: str, divisor: float) -> None:
    # Beer & Johnston, Mechanics of Materials, plastic torsion of circular shafts:
    # T_y = τ_y·J/c = τ_y·π·d³/16 and, for a solid shaft, T_p = (4/3)·T_y.
    report = run_checks(solve(parse_case(_case(shear_criterion=criterion))))
    (row,) = plastic_reserves(report)
    shear_yield = 350e6 / divisor
    yield_torque = shear_yield * math.pi * (DIAMETER_MM * 1e-3) ** 3 / 16.0
    assert row.shear_yield == pytest.approx(shear_yield, rel=1e-12)
    assert row.yield_torque == pytest.approx(yield_torque, rel=1e-12)
    assert row.plastic_torque / row.yield_torque == pytest.approx(4.0 / 3.0, rel=1e-12)
    assert row.largest_torque == pytest.approx(TORQUE, rel=1e-12)
    assert row.reserve == pytest.approx(row.plastic_torque / TORQUE, rel=1e-12)


def test_check_text_shows_the_plastic_reserve(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    path = tmp_path / "case.json"
    path.write_text(json.dumps(_case()), encoding="utf-8")
    main(["check", str(path)])
    out = capsys.readouterr().out
    assert "Plastic reserve" in out
