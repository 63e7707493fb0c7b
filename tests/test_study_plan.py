"""The study plan: bad plans named by field, inputs resolved against the case, README keys."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from tests.study_support import case_text, diameter_input, plan_text
from workbench.case.errors import InputError
from workbench.case.materials import Material
from workbench.cli import main
from workbench.design.allowables import allowable_shear_stress
from workbench.study.evaluate import evaluate_chunk, parse_path, prepare
from workbench.study.plan import plan_keys, plan_reference, read_plan

README = Path(__file__).resolve().parents[1] / "README.md"
NORMAL = {"kind": "normal", "mean": 50, "std": 1}


@pytest.mark.parametrize(
    ("plan", "field"),
    [
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 0}}, "plan.sampling.count"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10, "seed": -1}}, "plan.sampling.seed"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10, "seed": "x"}}, "plan.sampling.seed"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10, "seed": 2**64}}, "plan.sampling.seed"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {}}, "plan.sampling.count"),
        ({"inputs": [], "sampling": {"count": 10}}, "plan.inputs"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10}, "colour": 1}, "plan"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"method": "sobol", "count": 1000}}, "plan.sampling.count"),
        ({"inputs": [diameter_input(kind="normal", mean=50, std=0)], "sampling": {"count": 10}}, "plan.inputs[0].distribution.std"),
        ({"inputs": [diameter_input(kind="uniform", low=5, high=5)], "sampling": {"count": 10}}, "plan.inputs[0].distribution.high"),
        ({"inputs": [diameter_input(kind="poisson")], "sampling": {"count": 10}}, "plan.inputs[0].distribution.kind"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10}, "outputs": ["colour"]}, "plan.outputs[0]"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10}, "outputs": ["first_natural_frequency"]}, "plan.outputs[0]"),
        ({"inputs": [diameter_input(**NORMAL), diameter_input(**NORMAL)], "sampling": {"count": 10}}, "plan.inputs[1].path"),
        ({"inputs": [diameter_input(kind="values", values=[1, 2])], "sampling": {"method": "grid", "count": 3}}, "plan.sampling.count"),
        ({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 10}, "sensitivity": {"sobol": True, "base_count": 100}}, "plan.sensitivity.base_count"),
    ],
)  # fmt: skip
def test_a_bad_plan_names_its_field(plan: dict[str, object], field: str) -> None:
    with pytest.raises(InputError) as caught:
        read_plan(json.dumps(plan))
    assert caught.value.field == field
    assert "\n" not in str(caught.value)


@pytest.mark.parametrize(
    ("path", "message"),
    [
        ("shafts[0].segments[3].section.diameter", "no such input"),
        ("shafts[0].segments[0].section.colour", "no such input"),
        ("materials.bronze.shear_modulus", "no such input"),
        ("supports[0].x", "moves the mesh"),
        ("load_cases[0].torques[0].x", "moves the mesh"),
        ("shafts[0].id", "names no number"),
        ("shafts[[0]", "not a path"),
    ],
)
def test_an_unknown_input_path_is_named(path: str, message: str) -> None:
    plan = plan_text([{"path": path, "distribution": NORMAL}], count=10)
    with pytest.raises(InputError) as caught:
        prepare(case_text(), plan)
    assert caught.value.field == "plan.inputs[0].path"
    assert message in caught.value.message


def test_paths_read_as_the_case_document_nests() -> None:
    assert parse_path("shafts[0].segments[12].section.diameter") == (
        "shafts", 0, "segments", 12, "section", "diameter"
    )  # fmt: skip
    assert parse_path("materials.auger-steel.yield_strength") == (
        "materials", "auger-steel", "yield_strength"
    )  # fmt: skip


def test_an_invalid_variant_is_counted_with_its_reason_not_a_crash() -> None:
    plan = plan_text([diameter_input(kind="normal", mean=5, std=5)], count=4096, seed=3)
    table = evaluate_chunk(case_text(), plan, 0, 4096)
    diameter = table.column(diameter_input()["path"]).to_numpy()
    valid = table.column("valid").to_numpy(zero_copy_only=False)
    assert np.array_equal(valid, diameter > 0)
    reasons = table.column("reason").to_pylist()
    first = int(np.flatnonzero(~valid)[0])
    assert reasons[first].startswith(
        "shafts[0].segments[0].section.diameter: must be greater than zero"
    )
    assert np.isnan(table.column("governing_utilisation").to_numpy()[~valid]).all()
    assert all(reason is None for reason, ok in zip(reasons, valid, strict=True) if ok)


def test_a_varied_strength_sets_the_allowable_the_scalar_rule_gives() -> None:
    """Yield strength varied under von Mises: utilisation × allowable is the same stress."""
    case = case_text(design={"shear_criterion": "von_mises", "factor_of_safety": 2})
    inputs = [
        {
            "path": "materials.steel.yield_strength",
            "distribution": {"kind": "values", "values": [250, 350, 500]},
        }
    ]
    table = evaluate_chunk(case, plan_text(inputs, method="grid"), 0, 3)
    utilisation = table.column("governing_utilisation").to_numpy()
    allowables = [
        allowable_shear_stress(
            Material("s", 79.3e9, yield_strength=sy * 1e6, ultimate_strength=None), "von_mises", 2.0
        ).value
        for sy in (250, 350, 500)
    ]
    stress = utilisation * np.array(allowables)
    np.testing.assert_allclose(stress, stress[0], rtol=1e-12)
    # τ = 16T/(πd³) (Shigley 9th ed. §3-12): 2000 N·m on Ø50 mm.
    np.testing.assert_allclose(stress[0], 16 * 2000 / (np.pi * 0.05**3), rtol=1e-12)


def test_a_grid_holds_every_combination() -> None:
    inputs = [
        diameter_input(kind="values", values=[48, 50, 52]),
        {"path": "load_cases[0].torques[0].torque", "distribution": {"kind": "uniform", "low": 1000, "high": 2000}},
    ]  # fmt: skip
    plan = plan_text(inputs, method="grid", levels=4)
    assert read_plan(plan).count == 12
    table = evaluate_chunk(case_text(), plan, 0, 12)
    diameter = table.column(inputs[0]["path"]).to_numpy()
    torque = table.column(inputs[1]["path"]).to_numpy()
    assert diameter.tolist() == [48.0] * 4 + [50.0] * 4 + [52.0] * 4
    np.testing.assert_allclose(torque[:4], [1125, 1375, 1625, 1875])


def test_rows_do_not_depend_on_the_chunks() -> None:
    """Monte Carlo blocks of 4,096 from SeedSequence streams: any cut of whole blocks agrees."""
    plan = plan_text([diameter_input(**NORMAL)], count=3 * 4096, seed=11)
    whole = evaluate_chunk(case_text(), plan, 0, 3 * 4096)
    parts = [evaluate_chunk(case_text(), plan, start, start + 4096) for start in (0, 4096, 8192)]
    for number, part in enumerate(parts):
        assert whole.slice(number * 4096, 4096).equals(part)
    # The block's stream is SeedSequence(seed).spawn(n)[block] (numpy's parallel streams).
    spawned = np.random.SeedSequence(11).spawn(3)[2].generate_state(4)
    direct = np.random.SeedSequence(11, spawn_key=(2,)).generate_state(4)
    assert np.array_equal(spawned, direct)


def test_the_readme_lists_every_plan_key() -> None:
    text = README.read_text("utf-8")
    assert plan_reference() in text
    keys = {name for name, _, _ in plan_keys()}
    assert {"inputs[].path", "sampling.seed", "sampling.count", "outputs", "worst"} <= keys
    for name in keys:
        assert f"| `{name}` |" in text


def test_the_command_refuses_a_bad_plan_in_one_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    case = tmp_path / "case.json"
    case.write_text(case_text())
    plan = tmp_path / "plan.json"
    plan.write_text(json.dumps({"inputs": [diameter_input(**NORMAL)], "sampling": {"count": 0}}))
    status = main(["study", str(case), "--plan", str(plan), "-o", str(tmp_path / "r.parquet")])
    err = capsys.readouterr().err
    assert status == 2
    assert err.count("\n") == 1 and err.startswith("plan.sampling.count:")
    assert not (tmp_path / "r.parquet").exists()


def test_a_variant_at_the_case_values_matches_the_case_solved_and_checked_alone() -> None:
    """The batch row of the nominal case equals solve + run_checks of the case itself."""
    from workbench.design.checks import run_checks
    from workbench.solver.analysis import solve
    from workbench.solver.io import load_case

    demo = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"
    inputs = [
        {
            "path": "shafts[0].segments[0].section.diameter",
            "distribution": {"kind": "values", "values": [60]},
        }
    ]  # the case's own value
    plan = json.dumps({"inputs": inputs, "sampling": {"method": "grid"},
                       "outputs": ["check_utilisations", "reactions", "twists"]})  # fmt: skip
    row = evaluate_chunk(demo.read_text(), plan, 0, 1).to_pylist()[0]
    model = load_case(demo)
    results = solve(model)
    checks = run_checks(results)
    static = [
        c
        for c in checks.checks
        if c.kind not in ("fatigue", "first_cycle_yield", "frequency_separation")
    ]
    assert row["governing_utilisation"] == pytest.approx(
        max(c.utilisation for c in static), rel=1e-12
    )
    units = model.units
    for number, name in enumerate(results.names):
        for support in range(len(model.supports)):
            expected = units.from_si(results.reactions[number, support], "torque")
            assert row[f"reaction.{name}.{support}"] == pytest.approx(expected, rel=1e-12, abs=1e-9)
    assert row["utilisation.shear_stress"] == pytest.approx(
        max(c.utilisation for c in static if c.kind == "shear_stress"), rel=1e-12
    )
