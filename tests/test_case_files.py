"""Case files: load → save → load round trips, atomic saving, and what saving must keep.

References: the case-file contract (design §2: UTF-8 JSON, ``units`` applies to every number,
unknown keys are errors) and POSIX ``rename(2)``/``os.replace`` atomicity for the save (a crash
mid-write must leave the old file whole).
"""

from __future__ import annotations

import dataclasses
import json
import math
import os
import shutil
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from workbench.case.units import SI, UnitSystem
from workbench.cli.solve import DEMO_CASE
from workbench.solver.analysis import solve
from workbench.solver.io import load_case, parse_case, save_case
from workbench.solver.model import Model

RELATIVE = 1e-9


def assert_same(first: Any, second: Any, path: str = "model") -> None:
    """Deep comparison of two models: floats within RELATIVE, everything else equal."""
    if dataclasses.is_dataclass(first) and not isinstance(first, type):
        assert type(first) is type(second), path
        for field in dataclasses.fields(first):
            if field.compare:
                assert_same(
                    getattr(first, field.name), getattr(second, field.name), f"{path}.{field.name}"
                )
    elif isinstance(first, tuple | list):
        assert isinstance(second, tuple | list) and len(first) == len(second), path
        for number, (a, b) in enumerate(zip(first, second, strict=True)):
            assert_same(a, b, f"{path}[{number}]")
    elif isinstance(first, float) and not isinstance(first, bool):
        assert isinstance(second, float | int) and not isinstance(second, bool), path
        assert math.isclose(first, second, rel_tol=RELATIVE, abs_tol=0.0), (path, first, second)
    else:
        assert first == second, (path, first, second)


RICH_CASE: dict[str, Any] = {
    "title": "Round-trip case: every part of the contract",
    "units": {"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg"},
    "materials": {
        "shaft-steel": {
            "shear_modulus": 11.5e6,
            "yield_strength": 50e3,
            "ultimate_strength": 70e3,
            "elastic_modulus": 30e6,
            "poisson_ratio": 0.3,
            "source": "demo values for a carbon steel",
        },
        "sleeve-bronze": {"shear_modulus": 6.0e6, "source": "demo value"},
    },
    "shafts": [
        {
            "id": "input",
            "segments": [
                {
                    "length": 10.25,
                    "material": "shaft-steel",
                    "fillet_radius": 0.06,
                    "section": {"shape": "solid", "diameter": 1.375},
                },
                {
                    "length": 6,
                    "material": "shaft-steel",
                    "section": {"shape": "tube", "outer_diameter": 1.75, "inner_diameter": 0.875},
                },
                {
                    "length": 4.5,
                    "material": "shaft-steel",
                    "section": {
                        "shape": "tapered",
                        "diameter_start": 1.75,
                        "diameter_end": 1.2,
                        "bore": 0.5,
                    },
                },
                {
                    "length": 3,
                    "layers": [
                        {
                            "material": "sleeve-bronze",
                            "section": {
                                "shape": "tube",
                                "outer_diameter": 2.25,
                                "inner_diameter": 1.5,
                            },
                        },
                        {"material": "shaft-steel", "section": {"shape": "solid", "diameter": 1.5}},
                    ],
                },
            ],
        },
        {
            "id": "output",
            "segments": [
                {
                    "length": 12,
                    "material": "shaft-steel",
                    "section": {"shape": "solid", "diameter": 1.125},
                }
            ],
        },
    ],
    "supports": [
        {"shaft": "input", "x": 0, "kind": "fixed", "rotation": 0.5},
        {"shaft": "input", "x": 23.75, "kind": "spring", "stiffness": 2500.0},
        {"shaft": "output", "x": 12, "kind": "spring", "stiffness": 4000.0, "rotation": -0.25},
    ],
    "gears": [
        {
            "a": {"shaft": "input", "x": 16.25, "radius": 2.5},
            "b": {"shaft": "output", "x": 0, "radius": 4.0},
            "mesh": "internal",
        },
    ],
    "load_cases": [
        {
            "name": "drive",
            "torques": [{"shaft": "input", "x": 10.25, "torque": 3000}],
            "distributed": [
                {
                    "shaft": "input",
                    "start": 2,
                    "end": 20,
                    "intensity_start": -40,
                    "intensity_end": 15.5,
                }
            ],
        },
        {"name": "brake", "torques": [{"shaft": "output", "x": 6, "torque": -1200.5}]},
    ],
    "combinations": [{"name": "both", "factors": {"drive": 1.2, "brake": 0.9}}],
}


def _round_trip(model: Model, folder: Path, units: UnitSystem | None = None) -> tuple:
    path = folder / "saved.json"
    save_case(model, path, units)
    text = path.read_text(encoding="utf-8")
    document = json.loads(text)  # valid JSON
    return load_case(path), document


def test_demo_case_round_trip(tmp_path):
    original = load_case(DEMO_CASE)
    reloaded, document = _round_trip(original, tmp_path)
    assert_same(reloaded, original)
    source = json.loads(DEMO_CASE.read_text(encoding="utf-8"))
    for key, unit in source["units"].items():
        assert document["units"][key] == unit  # the saved file keeps the file's units
    assert reloaded.units == original.units


def test_rich_case_round_trip_keeps_materials_layers_gears_and_units(tmp_path):
    original = parse_case(json.loads(json.dumps(RICH_CASE)))
    reloaded, document = _round_trip(original, tmp_path)
    assert_same(reloaded, original)
    assert {k: document["units"][k] for k in RICH_CASE["units"]} == RICH_CASE["units"]
    # Materials keep every value and source, in the file's units.
    assert document["materials"] == RICH_CASE["materials"]
    # The layered segment stays layered, the gear keeps its internal mesh.
    layered = document["shafts"][0]["segments"][3]
    assert layered == RICH_CASE["shafts"][0]["segments"][3]
    assert document["gears"] == RICH_CASE["gears"]
    assert document["supports"] == RICH_CASE["supports"]
    assert document["load_cases"] == RICH_CASE["load_cases"]
    assert document["combinations"] == RICH_CASE["combinations"]
    assert document["shafts"][0]["segments"][2] == RICH_CASE["shafts"][0]["segments"][2]


def test_round_trip_results_are_the_same(tmp_path):
    original = parse_case(json.loads(json.dumps(RICH_CASE)))
    reloaded, _ = _round_trip(original, tmp_path)
    before, after = solve(original), solve(reloaded)
    for name in ("reactions", "gear_torques", "torque", "angle", "shear_stress"):
        expected = getattr(before, name)
        assert np.allclose(
            getattr(after, name), expected, rtol=0, atol=RELATIVE * np.abs(expected).max()
        ), name


def test_saving_in_other_units_and_reading_back(tmp_path):
    original = parse_case(json.loads(json.dumps(RICH_CASE)))
    for units in (SI, UnitSystem(length="mm", torque="N*mm", stress="MPa", angle="rad")):
        reloaded, document = _round_trip(original, tmp_path, units)
        assert_same(dataclasses.replace(reloaded, units=original.units), original)
        assert reloaded.units == units
        if units == SI:
            assert "units" not in document or document["units"] == SI.as_dict()


def test_a_case_naming_a_library_material_saves_and_reloads(tmp_path):
    # A segment may name a library material instead of one defined in "materials"
    # (io.find_material); the saved file must still load.
    case = {
        "shafts": [
            {
                "id": "a",
                "segments": [
                    {
                        "length": 1.0,
                        "material": "steel-a36",
                        "section": {"shape": "solid", "diameter": 0.02},
                    }
                ],
            }
        ],
        "supports": [{"shaft": "a", "x": 0.0}],
        "load_cases": [{"name": "s", "torques": [{"shaft": "a", "x": 1.0, "torque": 10.0}]}],
    }
    original = parse_case(case)
    reloaded, _ = _round_trip(original, tmp_path)
    assert_same(reloaded, original)


def test_a_saved_case_has_no_unknown_keys_and_reads_as_utf8(tmp_path):
    original = parse_case(json.loads(json.dumps(RICH_CASE)))
    path = tmp_path / "saved.json"
    save_case(original, path)
    raw = path.read_bytes()
    raw.decode("utf-8")  # UTF-8 (design §2)
    assert parse_case(json.loads(raw))  # parse_case refuses unknown keys


# --- atomic saving ----------------------------------------------------------------------------


def _folder_with_old_file(tmp_path: Path) -> Path:
    shutil.copy(DEMO_CASE, tmp_path / "case.json")
    return tmp_path / "case.json"


def test_a_failed_rename_leaves_the_old_file_intact_and_no_temporary(tmp_path, monkeypatch):
    path = _folder_with_old_file(tmp_path)
    before = path.read_bytes()
    model = parse_case(json.loads(json.dumps(RICH_CASE)))
    calls = []

    def failing_replace(source, destination):
        calls.append((Path(source), Path(destination)))
        msg = "simulated crash at the rename"
        raise OSError(msg)

    monkeypatch.setattr(os, "replace", failing_replace)
    with pytest.raises(OSError, match="simulated crash"):
        save_case(model, path)
    assert calls, "the save must go through os.replace"
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.json"]


def test_a_crash_while_writing_leaves_the_old_file_intact(tmp_path, monkeypatch):
    path = _folder_with_old_file(tmp_path)
    before = path.read_bytes()
    model = parse_case(json.loads(json.dumps(RICH_CASE)))

    def failing_fsync(descriptor):
        msg = "simulated full disk"
        raise OSError(msg)

    monkeypatch.setattr(os, "fsync", failing_fsync)
    with pytest.raises(OSError, match="full disk"):
        save_case(model, path)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.json"]


def test_the_write_goes_to_a_temporary_file_beside_the_target_then_a_rename(tmp_path, monkeypatch):
    path = _folder_with_old_file(tmp_path)
    model = parse_case(json.loads(json.dumps(RICH_CASE)))
    real_replace = os.replace
    seen = []

    def spying_replace(source, destination):
        source, destination = Path(source), Path(destination)
        seen.append((source, destination, source.read_text(encoding="utf-8")))
        assert path.read_bytes() == DEMO_CASE.read_bytes()  # untouched until the rename
        real_replace(source, destination)

    monkeypatch.setattr(os, "replace", spying_replace)
    save_case(model, path)
    assert len(seen) == 1
    source, destination, text = seen[0]
    assert destination == path
    assert source.parent == path.parent and source != path  # same folder: a rename, not a copy
    assert path.read_text(encoding="utf-8") == text
    assert sorted(p.name for p in tmp_path.iterdir()) == ["case.json"]
    assert_same(load_case(path), model)
