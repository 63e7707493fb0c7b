"""The shafting code's keyway allowance is applied once: × 0.75 on the allowable, no Kts on top.

The rule (ASME *Code for Design of Transmission Shafting*, ASA B17c-1927): allowable shear
0.30 Sy, not over 0.18 Su, "reduced by 25 % if the shafts have keyways"; restated in those words
by Engineers Edge, "ASME Shaft Design Allowable Stress and Diameter Equations" (a copy on
scribd.com, document 345374296, was what could be read).

Worked example applying the 0.75 factor — what was found, and how far it can be trusted: an
answer on askfilo.com, a question-and-answer site, not a textbook
(https://askfilo.com/user-question-answers-smart-solutions/a-woodruff-key-3-16-in-by-1-in-is-used-to-key-a-gear-on-a-1-3430343933343034).
The question: a Woodruff key keys a gear on a 1 3/16 in shaft, SAE 1035 cold drawn,
Su = 92,000 psi, Sy = 78,000 psi; the torque capacity of the shaft by the ASME shafting code,
"0.18Su or 0.3Sy & a 25% reduction for its keyway". The answer: τ = min(0.18·92,000 = 16,560,
0.3·78,000 = 23,400) = 16,560 psi; T = (π/16)·16,560·1.1875³ ≈ 5,444 in·lb without the keyway;
× 0.75 → ≈ 4,083 in·lb. The question reads like a textbook exercise, but the book, its edition
and the page were not found: the source is the answer as published on that site, no more.
"""

from __future__ import annotations

import copy
import json
from typing import Any

import pytest

from workbench import cli
from workbench.design.allowables import KEYWAY_ALLOWANCE
from workbench.design.checks import run_checks
from workbench.record.view_model.checks import checks_view
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

PSI = 6894.757293168361  # Pa per psi (1 lbf/in², exact from the inch and the pound-force)

#: The askfilo.com answer's numbers (see the module docstring for what that source is).
CAPACITY_WITH_KEYWAY = 4083.0  # in·lb, printed "≈ 4 083"
ALLOWABLE_WITH_KEYWAY = 0.75 * 16_560.0  # psi: 0.75 × 0.18 × 92,000

SHAFT: dict[str, Any] = {
    "title": "1 3/16 in shaft keyed by the shafting code",
    "units": {"length": "in", "torque": "lbf*in", "stress": "psi"},
    "materials": {
        "sae-1035-cd": {
            "shear_modulus": 11.5e6,
            "yield_strength": 78_000,
            "ultimate_strength": 92_000,
        }
    },
    "shafts": [
        {
            "id": "gear shaft",
            "segments": [
                {
                    "length": 10,
                    "material": "sae-1035-cd",
                    "section": {"shape": "solid", "diameter": 1.1875},
                    "keyseat": True,
                }
            ],
        }
    ],
    "supports": [{"shaft": "gear shaft", "x": 0}],
    "load_cases": [
        {
            "name": "capacity",
            "torques": [{"shaft": "gear shaft", "x": 10, "torque": CAPACITY_WITH_KEYWAY}],
        }
    ],
    "design": {"shear_criterion": "shafting_code", "keyway": True},
}


def _rows(case: dict[str, Any]) -> dict[str, Any]:
    report = run_checks(solve(parse_case(case)))
    return {check.kind: check for check in report.checks}


def test_the_code_s_keyway_allowance_is_not_doubled_by_the_keyseat_kts():
    rows = _rows(copy.deepcopy(SHAFT))
    shear, keyseat = rows["shear_stress"], rows["keyseat_stress"]
    assert shear.limit == pytest.approx(ALLOWABLE_WITH_KEYWAY * PSI, rel=1e-12)
    # The example's capacity uses the reduced allowable fully (to its 4 printed figures).
    assert shear.utilisation == pytest.approx(1.0, abs=5e-4)
    # The keyseat is checked against the same reduced allowable with K = 1, not Kts = 3.
    assert keyseat.value == pytest.approx(shear.value, rel=1e-12)
    assert keyseat.limit == shear.limit
    assert keyseat.utilisation == pytest.approx(1.0, abs=5e-4)
    assert "K = 1 (keyway allowance of the shafting code applied (×0.75); keyseat Kts not applied on top" in keyseat.note  # fmt: skip
    assert KEYWAY_ALLOWANCE in shear.note


@pytest.mark.parametrize(
    ("design", "allowable"),
    [
        ({"shear_criterion": "shafting_code", "keyway": False}, 16_560.0),
        (
            {"shear_criterion": "von_mises", "keyway": True, "factor_of_safety": 1.0},
            78_000 / 3**0.5,
        ),
    ],
    ids=["code without keyway", "von Mises with keyway"],
)
def test_without_the_code_s_allowance_the_keyseat_kts_applies(design, allowable):
    case = copy.deepcopy(SHAFT)
    case["design"] = design
    rows = _rows(case)
    shear, keyseat = rows["shear_stress"], rows["keyseat_stress"]
    assert shear.limit == pytest.approx(allowable * PSI, rel=1e-12)
    # Shigley's Mechanical Engineering Design, Table 7-1: end-milled keyseat Kts = 3.0.
    assert keyseat.value == pytest.approx(3.0 * shear.value, rel=1e-12)
    assert "not applied on top" not in keyseat.note + shear.note


def test_check_says_which_in_its_text_and_the_record_in_its_design_checks(tmp_path, capsys):
    path = tmp_path / "keyed.json"
    path.write_text(json.dumps(SHAFT), encoding="utf-8")
    assert cli.main(["check", str(path)]) == 0
    printed = capsys.readouterr().out
    (allowable,) = [line for line in printed.splitlines() if line.startswith("allowable: ")]
    assert "× 0.75 for the keyway = 12420 psi" in allowable
    assert KEYWAY_ALLOWANCE in allowable
    record = checks_view(run_checks(solve(parse_case(copy.deepcopy(SHAFT)))))
    assert [line for line in record.allowables if KEYWAY_ALLOWANCE in line] == record.allowables
    keyseat_rows = [row for row in record.rows if row[3] == "keyseat_stress"]
    shear_rows = [row for row in record.rows if row[3] == "shear_stress"]
    assert [row[4:] for row in keyseat_rows] == [row[4:] for row in shear_rows]
