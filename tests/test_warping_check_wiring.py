"""The warping checks in ``run_checks`` and through ``workbench check``, text and JSON.

Outside check: the warping normal stress of a doubly symmetric I fixed and held against warping
at both ends, a torque at mid-span, from the general solution of G·J·θ″ − E·Cw·θ⁗ = 0 solved
here by sympy (θ = c₀ + T·x/(2·G·J) + c₁·cosh λx + c₂·sinh λx on the half span, θ(0) = θ′(0) = 0
and θ′ = 0 at mid-span by symmetry), with the mid-line properties J = Σ b·t³/3,
Cw = t_f·b³·h₀²/24 and the largest Wn = h₀·b/4 (A. P. Boresi and R. J. Schmidt, *Advanced
Mechanics of Materials*, 6th ed., Wiley, 2003, ch. 10; V. Z. Vlasov, *Thin-Walled Elastic Beams*,
2nd ed., 1961, ch. V — the formulas as printed there, chapters from memory), σ_w = E·Wn·θ″.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

import pytest
import sympy as sp

from workbench.case.load import case_file_from_document
from workbench.cli import main
from workbench.design.checks import check_document, run_checks
from workbench.design.independent import WARPING_NOT_COVERED, NotCovered, independent_check
from workbench.design.warping_checks import WARPING_KINDS
from workbench.design.warping_model_checks import FINITE_ELEMENT_SHEAR, SAINT_VENANT_PART
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

GIRDER: dict[str, Any] = {
    "title": "Restrained I girder",
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {
        "plate": {"shear_modulus": 79300, "elastic_modulus": 207000, "yield_strength": 250}
    },
    "shafts": [
        {
            "id": "girder",
            "segments": [
                {
                    "length": 4000,
                    "material": "plate",
                    "section": {
                        "shape": "i_beam",
                        "depth": 300,
                        "width": 150,
                        "flange_thickness": 12,
                        "web_thickness": 8,
                    },
                }
            ],
        }
    ],
    "supports": [
        {"shaft": "girder", "x": 0, "warping": "restrained"},
        {"shaft": "girder", "x": 4000, "warping": "restrained"},
    ],
    "load_cases": [
        {"name": "eccentric load", "torques": [{"shaft": "girder", "x": 2000, "torque": 9000}]}
    ],
}


def _warping_normal_at_restraint() -> float:
    """σ_w (Pa) at a restrained end of the girder, from the closed form solved by sympy."""
    x = sp.symbols("x")
    shear, elastic = 79300e6, 207000e6
    width, flange, web, between = 0.150, 0.012, 0.008, 0.300 - 0.012
    torsion = (2 * width * flange**3 + between * web**3) / 3
    warping = flange * width**3 * between**2 / 24
    lam = sp.sqrt(shear * torsion / (elastic * warping))
    half_torque, half_span = 4500.0, 2.0
    c = sp.symbols("c0:3")
    theta = half_torque * x / (shear * torsion) + c[0] + c[1] * sp.cosh(lam * x)
    theta += c[2] * sp.sinh(lam * x)
    rate = sp.diff(theta, x)
    constants = sp.solve([theta.subs(x, 0), rate.subs(x, 0), rate.subs(x, half_span)], c)
    second = sp.diff(theta, x, 2).subs(constants).subs(x, 0)
    return float(elastic * between * width / 4 * second)


def _write(tmp_path: Path, document: dict[str, Any]) -> Path:
    path = tmp_path / "girder.json"
    path.write_text(json.dumps(document), encoding="utf-8")
    return path


def test_restrained_girder_fails_on_warping_stress_though_its_shear_passes(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    path = _write(tmp_path, GIRDER)
    assert main(["check", str(path)]) == 1
    text = capsys.readouterr().out
    assert "SOME CHECKS FAIL — governing: warping_normal_stress on girder segment 0" in text
    assert SAINT_VENANT_PART in text

    assert main(["check", str(path), "--json"]) == 1
    document = json.loads(capsys.readouterr().out)
    assert document["passes"] is False
    rows = {row["kind"]: row for row in document["checks"]}
    assert set(WARPING_KINDS) <= set(rows)
    assert rows["shear_stress"]["passes"] is True  # the Saint-Venant shear alone passes
    assert rows["warping_shear_stress"]["passes"] is True
    assert rows["warping_shear_stress"]["value"] >= rows["shear_stress"]["value"]
    normal = rows["warping_normal_stress"]
    assert normal["passes"] is False
    assert normal["limit"] == pytest.approx(125.0, rel=1e-12)  # Sy/FoS in MPa
    assert normal["x"] in (0.0, 4000.0)
    expected = _warping_normal_at_restraint() / 1e6  # in MPa, the case's unit
    assert normal["value"] == pytest.approx(expected, rel=1e-6)


def test_rows_carry_what_was_added_and_the_stated_bending_stress() -> None:
    document = copy.deepcopy(GIRDER)
    document["design"] = {
        "coexisting_stresses": [
            {"shaft": "girder", "segment": 0, "normal_stress": 30, "shear_stress": 5}
        ]
    }
    results = solve(parse_case(document))
    report = run_checks(results)
    bare = run_checks(solve(parse_case(GIRDER)))

    def row(found: Any, kind: str) -> Any:
        return next(check for check in found.checks if check.kind == kind)

    normal, normal_bare = row(report, "warping_normal_stress"), row(bare, "warping_normal_stress")
    assert normal.value == pytest.approx(normal_bare.value + 30e6, rel=1e-12)
    assert "σ = |E·Wn·θ″| + 30 MPa" in normal.note
    shear = row(report, "warping_shear_stress")
    assert "τ = G·t·|θ′| + E·|Sw·θ‴|/t + 5 MPa" in shear.note
    assert check_document(report)["passes"] is False


def test_a_round_case_has_no_warping_rows() -> None:
    document = copy.deepcopy(GIRDER)
    document["shafts"][0]["segments"][0]["section"] = {"shape": "solid", "diameter": 80}
    for support in document["supports"]:
        del support["warping"]
    report = run_checks(solve(parse_case(document)))
    kinds = {check.kind for check in report.checks}
    assert not kinds & set(WARPING_KINDS)
    assert SAINT_VENANT_PART not in report.notes


@pytest.mark.parametrize("state", ["restrained", "free"])
def test_the_independent_check_says_it_does_not_cover_warping(state: str) -> None:
    document = copy.deepcopy(GIRDER)
    for support in document["supports"]:
        support["warping"] = state
    with pytest.raises(NotCovered, match="restrained warping of open sections") as caught:
        independent_check(case_file_from_document(document))
    assert str(caught.value) == WARPING_NOT_COVERED


def test_the_independent_check_names_warping_for_open_sections_without_the_key() -> None:
    document = copy.deepcopy(GIRDER)
    for support in document["supports"]:
        del support["warping"]
    with pytest.raises(NotCovered) as caught:
        independent_check(case_file_from_document(document))
    assert str(caught.value) == WARPING_NOT_COVERED


def test_sizing_a_case_that_warps_is_refused_naming_the_section(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    document = copy.deepcopy(GIRDER)
    document["shafts"].append(
        {
            "id": "drive",
            "segments": [
                {"length": 500, "material": "plate", "section": {"shape": "solid", "diameter": 40}}
            ],
        }
    )
    document["supports"].append({"shaft": "drive", "x": 0})
    document["load_cases"][0]["torques"].append({"shaft": "drive", "x": 500, "torque": 100})
    path = _write(tmp_path, document)
    assert main(["size", str(path)]) == 2
    error = capsys.readouterr().err.strip()
    assert error.startswith("shafts[0].segments[0].section: a section that warps")
    assert "\n" not in error


def _polygon_girder(corners: list[tuple[float, float]], torque: float) -> dict[str, Any]:
    document = copy.deepcopy(GIRDER)
    document["shafts"][0]["segments"][0]["section"] = {
        "shape": "polygon",
        "outer": [{"x": x, "y": y} for x, y in corners],
    }
    document["load_cases"][0]["torques"][0]["torque"] = torque
    return document


#: The girder's I drawn as a polygon (mm), web on x = 0.
POLYGON_I = [
    (-75, 0), (75, 0), (75, 12), (4, 12), (4, 288), (75, 288), (75, 300), (-75, 300),
    (-75, 288), (-4, 288), (-4, 12), (-75, 12),
]  # fmt: skip


def test_a_polygon_section_that_warps_gets_warping_rows_and_the_shear_left_out_is_said(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # An angle drawn as a polygon: its finite-element warping constant is small but not 0; its
    # warping normal stress is judged at the mesh node of largest |Wn|, its warping shear is
    # not computed (no wall mid-line) and the command says so.
    corners = [(0, 0), (100, 0), (100, 10), (10, 10), (10, 100), (0, 100)]
    path = _write(tmp_path, _polygon_girder(corners, 50))
    assert main(["check", str(path)]) == 0
    captured = capsys.readouterr()
    assert captured.err == f"warning: {FINITE_ELEMENT_SHEAR}\n"
    assert f"note: {FINITE_ELEMENT_SHEAR}" in captured.out
    for kind in WARPING_KINDS:
        assert f" {kind} " in captured.out
    assert "NOT checked" not in captured.out


def test_a_polygon_whose_warping_normal_stress_exceeds_sy_over_fos_fails_check(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # The restrained girder's I as a polygon: σ_w ≈ 300 MPa at its ends (the closed form
    # above, see tests/validation/test_fe_warping_stress.py) against Sy/FoS = 125 MPa.
    girder = _polygon_girder(POLYGON_I, 9000)
    path = _write(tmp_path, girder)
    assert main(["check", "--json", str(path)]) == 1
    document = json.loads(capsys.readouterr().out)
    rows = {row["kind"]: row for row in document["checks"] if row["kind"] in WARPING_KINDS}
    normal = rows["warping_normal_stress"]
    assert normal["passes"] is False
    assert normal["value"] > normal["limit"] == pytest.approx(125.0, rel=1e-12)
    assert rows["warping_combined_stress"]["passes"] is False
    notes = {row.kind: row.note for row in run_checks(solve(parse_case(girder))).checks}
    assert "mesh node of largest |Wn|" in notes["warping_normal_stress"]
    assert "warping shear not computed" in notes["warping_shear_stress"]


def test_size_prints_the_cautions_on_its_results(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # A 20 m line shaft sized down to 20 mm twists θ = T·L/(G·J) = 150·20/(79.3e9·π·0.02⁴/32)
    # = 2.41 rad at its end (Gere & Goodno, Mechanics of Materials, 8th ed., §3.3): beyond
    # the 1 rad of the small-rotation theory, which `size` says as `solve` and `check` do.
    document = {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {
            "s": {"shear_modulus": 79300, "yield_strength": 350, "ultimate_strength": 500}
        },
        "shafts": [
            {
                "id": "line",
                "segments": [
                    {
                        "length": 20000,
                        "material": "s",
                        "section": {"shape": "solid", "diameter": 80},
                    }
                ],
            }
        ],
        "supports": [{"shaft": "line", "x": 0}],
        "load_cases": [
            {"name": "drive", "torques": [{"shaft": "line", "x": 20000, "torque": 150}]}
        ],
    }
    path = _write(tmp_path, document)
    assert main(["size", str(path)]) == 0
    error = capsys.readouterr().err
    assert error.startswith("warning: rotations reach ")
    assert "(2.41 rad;" in error
    assert error.count("\n") == 1


def test_open_and_polygon_segments_of_one_girder_are_each_judged_at_their_own_points() -> None:
    # Half the girder as i_beam, half as the same I drawn as a polygon: both segments get the
    # three rows, each at its own kind of stress point (the open one's walls, the polygon's node).
    document = _polygon_girder(POLYGON_I, 9000)
    segments = document["shafts"][0]["segments"]
    polygon_half = {**segments[0], "length": 2000}
    open_half = {**GIRDER["shafts"][0]["segments"][0], "length": 2000}
    document["shafts"][0]["segments"] = [open_half, polygon_half]
    report = run_checks(solve(parse_case(document)))
    notes = {
        (row.segment, row.kind): row.note for row in report.checks if row.kind in WARPING_KINDS
    }
    assert set(notes) == {(segment, kind) for segment in (0, 1) for kind in WARPING_KINDS}
    assert "at wall" not in notes[1, "warping_normal_stress"]
    assert "mesh node of largest |Wn|" in notes[1, "warping_normal_stress"]
    assert "governs at wall" in notes[0, "warping_normal_stress"]
    assert "warping shear not computed" in notes[1, "warping_shear_stress"]
    assert "warping shear not computed" not in notes[0, "warping_shear_stress"]
    assert SAINT_VENANT_PART in report.notes and FINITE_ELEMENT_SHEAR in report.notes
