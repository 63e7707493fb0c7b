"""A system nearly a mechanism is refused by name, never reported; big rotations are flagged.

The case that passed every check: the line shaft of ``tests/fixtures/solve/line_shaft.json`` on
two springs of 10⁻¹² N·m/rad with 100 N·m applied came back with rotations of 10¹³ rad and
reactions that missed equilibrium by tens of N·m, and ``check`` said all checks pass.
"""

from __future__ import annotations

import copy
import dataclasses
import json
import math
from pathlib import Path
from typing import Any

import nbformat
import numpy as np
import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from tests.fuzz.open_defects import ONE_SPRING_BESIDE
from tests.panel_cases import shown_messages, simple_case
from tests.test_batch import _RandomFamily
from tests.test_properties import (
    SETTINGS,
    _log_uniform,
    applied_total,
    geared_cases,
    single_shaft_cases,
    torque_scale,
)
from workbench import cli
from workbench.case.errors import InputError
from workbench.panel import Workbench
from workbench.solver.analysis import solve
from workbench.solver.assembly import BandFactor, assemble_band, band_to_sparse
from workbench.solver.batch import solve_batch
from workbench.solver.columns import case_table
from workbench.solver.io import parse_case
from workbench.solver.soundness import (
    EQUILIBRIUM_LIMIT,
    ROTATION_LIMIT,
    Soundness,
    rcond_limit,
)
from workbench.solver.statics import solve_table

ROOT = Path(__file__).resolve().parents[1]
LINE_SHAFT = ROOT / "tests" / "fixtures" / "solve" / "line_shaft.json"
FIXTURES = sorted((ROOT / "tests" / "fixtures" / "solve").glob("*.solve.json"))
DEMO = ROOT / "workbench" / "cases" / "press_drive.json"

#: The file's units are N*m and deg: a stiffness per radian is π/180 of itself per degree.
PER_DEGREE = math.pi / 180.0


def on_springs(stiffness: float, torque: float = 100.0) -> dict[str, Any]:
    """The line shaft on two springs of ``stiffness`` N·m/rad at its ends, one torque (N·m)."""
    case = json.loads(LINE_SHAFT.read_text(encoding="utf-8"))
    case["supports"] = [
        {"shaft": "main", "x": x, "kind": "spring", "stiffness": stiffness * PER_DEGREE}
        for x in (0, 650)
    ]
    case["load_cases"] = [
        {"name": "service", "torques": [{"shaft": "main", "x": 300, "torque": torque}]}
    ]
    del case["combinations"]
    return case


def run(capsys: pytest.CaptureFixture[str], argv: list[str]) -> tuple[int, str, str]:
    status = cli.main(argv)
    captured = capsys.readouterr()
    return status, captured.out, captured.err


def written(tmp_path: Path, case: dict[str, Any], name: str = "case.json") -> Path:
    path = tmp_path / name
    path.write_text(json.dumps(case), encoding="utf-8")
    return path


def assert_refused_naming_the_springs(status: int, out: str, err: str) -> None:
    assert (status, out) == (2, "")
    assert err.endswith("\n") and err.count("\n") == 1
    line = err.rstrip("\n")
    assert len(line) <= 200
    assert line.startswith("supports: the system is nearly a mechanism")
    assert "main x=0 mm" in line and "main x=650 mm" in line
    assert line.endswith("or add a fixed support")


# --- the case of the report, through every command ---------------------------------------------


COMMANDS = [["solve"], ["solve", "--json"], ["check"], ["check", "--json"], ["size"]]


@pytest.mark.parametrize("command", COMMANDS, ids=[" ".join(c) for c in COMMANDS])
def test_springs_of_1e_12_are_refused_by_every_static_command(tmp_path, capsys, command):
    path = written(tmp_path, on_springs(1e-12))
    status, out, err = run(capsys, [*command, str(path)])
    assert_refused_naming_the_springs(status, out, err)
    assert "ALL CHECKS PASS" not in out and "reciprocal condition" in err


def test_springs_of_1e_9_are_refused_by_the_condition_estimate(tmp_path, capsys):
    # The criterion decides: the factor's rcond (4.6e-16) is below 1e-12/n² for n = 5 rotations.
    path = written(tmp_path, on_springs(1e-9))
    status, out, err = run(capsys, ["check", str(path)])
    assert_refused_naming_the_springs(status, out, err)
    assert f"below {rcond_limit(5):.2g} for 5 rotations" in err


def test_springs_of_1e_6_are_solved_in_equilibrium_with_a_rotation_warning(tmp_path, capsys):
    # Source: equilibrium of the shaft as a free body (Gere & Goodno, Mechanics of Materials,
    # 8th ed., §3.8): the two spring reactions carry the 100 N·m between them. Springs 10¹⁰
    # times softer than the shaft turn it almost rigidly, θ ≈ T/(2k) = 5·10⁷ rad, each taking
    # half (their difference is k times the twist, ~10⁻⁹ N·m).
    path = written(tmp_path, on_springs(1e-6))
    status, out, err = run(capsys, ["solve", "--json", str(path)])
    assert status == 0
    document = json.loads(out)
    reactions = document["results"][0]["reactions"]
    assert abs(sum(reactions) + 100.0) <= EQUILIBRIUM_LIMIT * 100.0
    np.testing.assert_allclose(reactions, [-50.0, -50.0], rtol=1e-8)
    assert document["warnings"] == [err.removeprefix("warning: ").rstrip("\n")]
    assert "(5e+07 rad;" in err


def test_a_shaft_on_one_spring_is_balanced_by_its_own_loads_not_its_neighbours(tmp_path, capsys):
    # Source: equilibrium of the shaft as a free body (Gere & Goodno, Mechanics of Materials,
    # 8th ed., §3.8): its one spring carries its whole load, the resultant of a linearly varying
    # distributed torque ½·t₀·(b − a). A 2862 N·m torque on another shaft (no gear joins them)
    # once set the allowance, and this shaft's reaction was 4.6e-8 of its load off.
    case = ONE_SPRING_BESIDE
    path = written(tmp_path, case)
    status, out, _ = run(capsys, ["solve", "--json", str(path)])
    assert status == 0
    reactions = json.loads(out)["results"][0]["reactions"]
    load = case["load_cases"][0]["distributed"][0]
    resultant = 0.5 * load["intensity_start"] * (load["end"] - load["start"])
    assert abs(reactions[0] + resultant) <= EQUILIBRIUM_LIMIT * resultant
    assert reactions[1] == pytest.approx(2862.0, rel=1e-12)


def test_modes_of_a_shaft_on_springs_of_1e_12_are_reported(tmp_path, capsys):
    # Not refused: the static solve divides by the springs' stiffness, the eigenproblem does
    # not. A shaft on springs of 10⁻¹² N·m/rad has a mode at √(2k/J)/2π ≈ 5·10⁻⁶ Hz (physical:
    # it is all but free) and otherwise the free-free shaft's modes. Source for those: the
    # wave equation θ_tt = (G/ρ)·θ_xx with θ' = 0 at both ends, f_n = n·√(G/ρ)/(2L) (Rao,
    # Mechanical Vibrations, 5th ed., §8.5, torsional vibration of a shaft; from memory).
    case = simple_case(diameter=40.0, torque=100.0)
    case["materials"]["steel"]["density"] = 7850
    case["supports"] = [
        {"shaft": "s", "x": x, "kind": "spring", "stiffness": 1e-12 * PER_DEGREE} for x in (0, 1000)
    ]
    path = written(tmp_path, case)
    status, out, _ = run(capsys, ["modes", "--json", "--elements-per-segment", "64", str(path)])
    assert status == 0
    modes = json.loads(out)["modes"]
    assert modes[0]["frequency"] < 1e-3 and not modes[0]["rigid_body"]
    wave_speed = math.sqrt(80e9 / 7850)
    for number in (1, 2):
        expected = number * wave_speed / (2 * 1.0)
        assert modes[number]["frequency"] == pytest.approx(expected, rel=2e-3)
    # The static commands refuse the same case.
    status, out, err = run(capsys, ["solve", str(path)])
    assert (status, out) == (2, "") and "s x=0 mm, s x=1000 mm" in err


# --- what the refusal says ----------------------------------------------------------------------


def test_an_equilibrium_refusal_names_the_shaft_the_case_and_the_springs():
    table = case_table(parse_case(on_springs(1.0)))
    soundness = Soundness(
        rcond=np.array([1e-3]),
        limit=rcond_limit(5),
        n_rotations=5,
        residual=np.array([[[72.0]]]),
        tolerance=np.array([[1e-7]]),
    )
    error = soundness.error(table)
    assert error is not None and error.field == "supports"
    assert str(error) == (
        "supports: the results miss equilibrium by 72 N*m on shaft 'main' in load case "
        "'service': the system is nearly a mechanism: stiffen the springs at main x=0 m, "
        "main x=0.65 m or add a fixed support"
    )


def test_a_shaft_hung_on_a_thread_is_refused_naming_the_shafts(tmp_path, capsys):
    # Held by a fixed support, not by springs: the near mechanism is a 1 µm segment between
    # the support and the rest, 10¹⁹ times softer than it (J ∝ d⁴).
    case = simple_case()
    segment = case["shafts"][0]["segments"][0]
    thread = copy.deepcopy(segment) | {"length": 10}
    thread["section"] = {"shape": "solid", "diameter": 0.001}
    case["shafts"][0]["segments"] = [thread, segment | {"length": 990}]
    status, out, err = run(capsys, ["check", str(written(tmp_path, case))])
    assert (status, out) == (2, "")
    assert err.startswith("shafts: the system is nearly a mechanism (reciprocal condition ")
    assert err.endswith("a segment or spring is far softer than the rest; check sizes\n")


def test_a_long_list_of_springs_is_cut_to_one_line():
    case = on_springs(1e-12)
    case["shafts"][0]["id"] = "a shaft with a long name " * 4
    for support in case["supports"]:
        support["shaft"] = case["shafts"][0]["id"]
    case["supports"] += [copy.deepcopy(case["supports"][0]) | {"x": x} for x in (100, 200, 300)]
    for torque in case["load_cases"][0]["torques"]:
        torque["shaft"] = case["shafts"][0]["id"]
    with pytest.raises(InputError) as raised:
        solve(parse_case(case))
    assert len(str(raised.value)) <= 200
    assert "more or add a fixed support" in str(raised.value)


# --- the property: accepted results hold equilibrium, shaft by shaft ----------------------------


def shaft_equilibrium_misses(case: dict[str, Any], results: Any) -> list[float]:
    """|Σ torques| on each shaft of each load case (N·m), from the case file and the results.

    Source: a shaft is a free body, ΣT = 0 (Gere & Goodno, Mechanics of Materials, 8th ed.,
    §3.8): applied point torques, distributed resultants ½(t₀ + t₁)·(b − a), support reactions
    and the gear mesh torques on it.
    """
    misses = []
    for load_case in case["load_cases"]:
        result = results[load_case["name"]]
        for shaft in case["shafts"]:
            total = applied_total(case, shaft["id"], load_case["name"])[0]
            total += sum(
                reaction
                for support, reaction in zip(case["supports"], result.reactions, strict=True)
                if support["shaft"] == shaft["id"]
            )
            for gear, torques in zip(case.get("gears", []), result.gear_torques, strict=True):
                total += sum(
                    torque
                    for end, torque in zip("ab", torques, strict=True)
                    if gear[end]["shaft"] == shaft["id"]
                )
            misses.append(abs(total))
    return misses


#: Found by the property: a prescribed rotation of 5e-324 rad (a subnormal float) gave a
#: tolerance that underflowed to zero and a residual of one subnormal unit.
SUBNORMAL_ROTATION = {
    "materials": {"m0": {"shear_modulus": 2e10}},
    "shafts": [
        {
            "id": "s",
            "segments": [
                {"length": 1.0, "material": "m0", "section": {"shape": "solid", "diameter": 0.0625}}
            ],
        }
    ],
    "supports": [
        {"shaft": "s", "x": 0.0, "kind": "spring", "stiffness": 100.0, "rotation": 0.0},
        {"shaft": "s", "x": 0.05, "kind": "spring", "stiffness": 100.0, "rotation": 5e-324},
    ],
    "load_cases": [{"name": "case0", "torques": [], "distributed": []}],
}


@SETTINGS
@given(st.one_of(single_shaft_cases(), geared_cases()))
@example(case=SUBNORMAL_ROTATION)
def test_random_stiff_systems_are_solved_in_equilibrium(case):
    # Springs of 10² to 10⁷ N·m/rad on shafts of 10 to 100 mm: none is nearly a mechanism.
    results = solve(parse_case(copy.deepcopy(case)))
    bound = EQUILIBRIUM_LIMIT * torque_scale(case, results)
    assert max(shaft_equilibrium_misses(case, results)) <= bound


@st.composite
def soft_spring_cases(draw: st.DrawFn) -> dict[str, Any]:
    """A random shaft held by springs only, of any stiffness down to 10⁻¹⁴ N·m/rad."""
    case = draw(single_shaft_cases(rotations=False))
    for support in case["supports"]:
        support["kind"] = "spring"
        support["stiffness"] = draw(_log_uniform(1e-14, 1e7))
    return case


@SETTINGS
@given(soft_spring_cases())
def test_soft_springs_are_either_refused_by_name_or_solved_in_equilibrium(case):
    try:
        results = solve(parse_case(copy.deepcopy(case)))
    except InputError as error:
        assert error.field == "supports" and "nearly a mechanism" in error.message
        assert len(str(error)) <= 200
        return
    applied = sum(applied_total(case, "s", item["name"])[1] for item in case["load_cases"])
    assert max(shaft_equilibrium_misses(case, results)) <= EQUILIBRIUM_LIMIT * applied


# --- many variants: a near mechanism is one invalid variant, not a failed batch -----------------


def test_a_batch_flags_the_variants_nearly_a_mechanism_and_solves_the_others():
    model = parse_case(on_springs(1e3))
    # Per degree in the file, per radian here (SI). 1e-300 loses the springs to rounding
    # altogether: an exactly zero pivot, kept to its own variant.
    stiffness = np.array([[5e4, 5e4], [1e-12, 1e-12], [1e-300, 1e-300], [1e3, 2e3]])
    batch = solve_batch(model, support_stiffness=stiffness)
    assert batch.valid.tolist() == [True, False, False, True]
    for variant in (1, 2):
        reason = batch.reason(variant)
        assert reason is not None and reason.startswith("supports: the system is nearly")
        assert "main x=0 m, main x=0.65 m" in reason
        assert np.isnan(batch.reactions[variant]).all()
    for variant in (0, 3):
        springs = tuple(
            dataclasses.replace(support, stiffness=float(value))
            for support, value in zip(model.supports, stiffness[variant], strict=True)
        )
        solved = solve(dataclasses.replace(model, supports=springs))
        np.testing.assert_allclose(batch.reactions[variant], solved.reactions, rtol=1e-12)
        np.testing.assert_allclose(batch.angle[variant], solved.angle, rtol=1e-12)


class _UnitElements:
    """Elements of stiffness 1 N·m/rad, one rotation per node."""

    dofs_per_node = 1

    def __init__(self, n_variants: int, n_elements: int) -> None:
        self.ones = np.ones((n_variants, n_elements))

    def stiffness_entry(self, row: int, column: int) -> np.ndarray:
        return self.ones if row == column else -self.ones


def test_an_exact_zero_pivot_is_kept_to_its_variant():
    # Source: numpy.linalg.solve of the regular block. A chain of unit elements with nothing
    # holding it is exactly singular: its last pivot is 1 − 1 = 0 in floating point too.
    n_elements = 4
    band = assemble_band(_UnitElements(2, n_elements), np.array([0, n_elements + 1]), 2)
    band.blocks()[band.diagonal_row][0, 0] += 2.0  # variant 0 held by a spring at node 0
    stacked = band_to_sparse(band).toarray()
    factor = BandFactor(band)
    n_dofs = n_elements + 1
    assert factor.zero_pivots.tolist() == [2 * n_dofs - 1]
    rhs = np.arange(1.0, 2 * n_dofs + 1)[:, None]
    solution = factor.solve(np.asfortranarray(rhs.copy()))
    assert np.isfinite(solution).all()
    expected = np.linalg.solve(stacked[:n_dofs, :n_dofs], rhs[:n_dofs])
    np.testing.assert_allclose(solution[:n_dofs], expected, rtol=1e-12)
    assert factor.rcond == 0.0
    estimates = factor.block_rcond(2)
    assert estimates[1] == 0.0
    exact = 1.0 / np.linalg.cond(stacked[:n_dofs, :n_dofs], 1)
    assert exact * (1.0 - 1e-9) <= estimates[0] <= 10.0 * exact


# --- the condition estimate of each stacked variant ---------------------------------------------


@SETTINGS
@given(st.integers(1, 6), st.integers(1, 2), st.integers(0, 2**32 - 1))
def test_each_variants_condition_estimate_brackets_its_exact_one(n_variants, dofs, seed):
    # Source: numpy.linalg.cond(·, 1), the exact 1-norm condition number of each block. Hager's
    # estimate of ‖A⁻¹‖₁ is a lower bound, so rcond is at least the exact value.
    generator = np.random.default_rng(seed)
    elements = 4
    size = 2 * dofs
    raw = generator.normal(size=(n_variants, elements, size, size))
    # Variants far apart in scale: the stacked estimate cannot stand for each.
    spread = 10.0 ** generator.uniform(-6, 6, size=(n_variants, 1, 1, 1))
    matrices = spread * (raw @ np.swapaxes(raw, -1, -2) + size * np.eye(size))
    band = assemble_band(_RandomFamily(matrices, dofs), np.array([0, elements + 1]), n_variants)
    factor = BandFactor(band)
    estimates = factor.block_rcond(n_variants)
    n_dofs = (elements + 1) * dofs
    stacked = band_to_sparse(band).toarray()
    for variant in range(n_variants):
        block = slice(variant * n_dofs, (variant + 1) * n_dofs)
        exact = 1.0 / np.linalg.cond(stacked[block, block], 1)
        assert exact * (1.0 - 1e-9) <= estimates[variant] <= 10.0 * exact


@SETTINGS
@given(single_shaft_cases())
def test_a_shafts_condition_number_is_exact(case):
    # Source: numpy.linalg.cond(·, 1) of the held band (an SVD-free exact 1-norm condition
    # number: ‖A‖₁·‖A⁻¹‖₁ with the inverse formed densely).
    solution = solve_table(case_table(parse_case(copy.deepcopy(case))))
    assert isinstance(solution.factor, BandFactor)
    matrix = band_to_sparse(solution.factor.band).toarray()
    exact = 1.0 / np.linalg.cond(matrix, 1)
    assert solution.soundness.rcond[0] == pytest.approx(exact, rel=1e-9)
    # LAPACK's estimate (?gtcon) of the same is at least the exact value.
    assert exact * (1.0 - 1e-9) <= solution.factor.rcond <= 10.0 * exact


def test_the_geared_systems_condition_is_that_of_its_scaled_matrix():
    # Source: numpy.linalg.cond(·, 1) of D·A·D, D the factor's scaling, block by block: the
    # bordered matrix's own condition would change with the units of the multipliers.
    base = case_table(parse_case(json.loads(DEMO.read_text(encoding="utf-8"))))
    springs = ~base.support_fixed
    stiffness = np.repeat(base.support_stiffness, 3, axis=0)
    stiffness[1, springs] *= 1e-3
    stiffness[2, springs] *= 1e3
    solution = solve_table(dataclasses.replace(base, support_stiffness=stiffness))
    factor = solution.factor
    scaled = (factor.scaling[:, None] * factor.matrix.toarray()) * factor.scaling[None, :]
    estimates = factor.block_rcond(3)
    size = len(scaled) // 3
    for variant in range(3):
        block = slice(variant * size, (variant + 1) * size)
        exact = 1.0 / np.linalg.cond(scaled[block, block], 1)
        assert exact * (1.0 - 1e-9) <= estimates[variant] <= 10.0 * exact


# --- rotations beyond 1 rad ---------------------------------------------------------------------


def long_thin_shaft() -> dict[str, Any]:
    """2 m of Ø10 mm steel fixed at one end, 50 N·m at the other: θ = TL/GJ ≈ 1.28 rad."""
    case = simple_case(diameter=10.0, torque=50.0)
    case["shafts"][0]["segments"][0]["length"] = 2000
    case["load_cases"][0]["torques"][0]["x"] = 2000
    return case


def test_rotations_beyond_1_rad_are_a_warning_on_stderr_and_in_the_document(tmp_path, capsys):
    # Source: φ = T·L/(G·J), J = π·d⁴/32 (Gere & Goodno, Mechanics of Materials, 8th ed.,
    # eq. 3-17): 50 × 2 / (80·10⁹ × π·0.01⁴/32) = 1.273 rad = 72.9°.
    expected = 50.0 * 2.0 / (80e9 * math.pi * 0.01**4 / 32.0)
    assert expected > ROTATION_LIMIT
    path = written(tmp_path, long_thin_shaft())
    status, out, err = run(capsys, ["solve", "--json", str(path)])
    assert status == 0
    document = json.loads(out)
    assert list(document) == ["units", "results", "warnings"]
    end_angle = document["results"][0]["shafts"]["s"]["angle"][-1]
    assert end_angle == pytest.approx(math.degrees(expected), rel=1e-12)
    assert err == f"warning: {document['warnings'][0]}\n"
    assert err == (
        f"warning: rotations reach {math.degrees(expected):.6g} deg ({expected:.3g} rad; "
        "shaft 's' at x=2000 mm, load case 'drive'), beyond 1 rad: outside the small-rotation "
        "theory these results rest on\n"
    )
    assert len(err.rstrip("\n")) <= 200
    status, out, err_text = run(capsys, ["solve", str(path)])
    assert status == 0 and err_text == err
    status, out, err_check = run(capsys, ["check", str(path)])
    assert err_check == err


@pytest.mark.parametrize("fixture", FIXTURES, ids=[f.name for f in FIXTURES])
def test_documents_without_a_warning_keep_their_keys(tmp_path, capsys, fixture):
    name = fixture.name.removesuffix(".solve.json")
    case = DEMO if name == "press_drive" else fixture.with_name(f"{name}.json")
    status, out, err = run(capsys, ["solve", "--json", str(case)])
    assert (status, err) == (0, "")
    assert list(json.loads(out)) == list(json.loads(fixture.read_text(encoding="utf-8")))


# --- the panel and the record -------------------------------------------------------------------


def test_the_panel_shows_no_verdict_for_a_near_mechanism():
    case = simple_case()
    case["supports"] = [
        {"shaft": "s", "x": x, "kind": "spring", "stiffness": 1e3} for x in (0, 1000)
    ]
    panel = Workbench(case)
    assert not panel.stale and "all checks pass" in panel.summary.value
    for support in panel.document["supports"]:
        support["stiffness"] = 1e-12 * PER_DEGREE
    assert not panel.refresh()
    assert panel.stale and panel.error is not None and panel.error.field == "supports"
    assert "nearly a mechanism" in panel.status.value
    assert any("nearly a mechanism" in text for text in shown_messages(panel))
    assert "all checks pass" not in panel.summary.value.lower()
    assert "NOT SOLVED" in panel.summary.value
    for widget in (panel.summary, panel.check_table, panel.charts_box):
        assert "wb-stale" in widget._dom_classes
    panel.shaft.value = 0  # a redraw while stale keeps the verdict away
    panel._redraw()
    assert "all checks pass" not in panel.summary.value.lower()
    for support in panel.document["supports"]:
        support["stiffness"] = 1e3
    assert panel.refresh()
    assert "all checks pass" in panel.summary.value
    for widget in (panel.summary, panel.check_table, panel.charts_box):
        assert "wb-stale" not in widget._dom_classes


def test_the_panel_warns_of_rotations_beyond_1_rad():
    panel = Workbench(long_thin_shaft())
    assert not panel.stale
    assert "Warning: rotations reach" in panel.status.value


def test_record_export_of_a_near_mechanism_is_refused(tmp_path, capsys):
    written(tmp_path, on_springs(1e-12), "case.json")
    notebook = nbformat.v4.new_notebook()
    notebook.metadata["workbench"] = {"case_file": "case.json"}
    path = tmp_path / "calc.ipynb"
    nbformat.write(notebook, str(path))
    record = tmp_path / "record.html"
    status, out, err = run(capsys, ["export", str(path), "-o", str(record), "--no-execute"])
    assert (status, out) == (2, "")
    assert err.startswith("supports: the system is nearly a mechanism")
    assert not record.exists()
