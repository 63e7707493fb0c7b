"""Bad input: every path through ``parse_case`` and through ``workbench solve`` names the field.

Contract (design §2): bad input gives one line on stderr naming the field and what is wrong,
exit code 2, no traceback; a system free to spin (a mechanism) is bad input, named as such.
Each case below changes one thing in an otherwise valid case file and states the exact field
path the message must start with.
"""

from __future__ import annotations

import copy
import json
import os
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from workbench.case.errors import InputError, MechanismError
from workbench.cli import main
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

ROOT = Path(__file__).resolve().parents[1]

VALID: dict[str, Any] = {
    "title": "bad-input base case",
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {"steel": {"shear_modulus": 79300, "yield_strength": 350}},
    "shafts": [
        {
            "id": "main",
            "segments": [
                {"length": 300, "material": "steel", "section": {"shape": "solid", "diameter": 50}},
                {
                    "length": 200,
                    "material": "steel",
                    "section": {"shape": "tube", "outer_diameter": 20, "inner_diameter": 10},
                },
                {
                    "length": 150,
                    "material": "steel",
                    "section": {"shape": "tapered", "diameter_start": 50, "diameter_end": 40},
                },
                {
                    "length": 100,
                    "layers": [
                        {
                            "material": "steel",
                            "section": {
                                "shape": "tube",
                                "outer_diameter": 60,
                                "inner_diameter": 40,
                            },
                        },
                        {"material": "steel", "section": {"shape": "solid", "diameter": 40}},
                    ],
                },
            ],
        },
        {
            "id": "out",
            "segments": [
                {"length": 400, "material": "steel", "section": {"shape": "solid", "diameter": 30}}
            ],
        },
    ],
    "supports": [
        {"shaft": "main", "x": 0, "kind": "fixed"},
        {"shaft": "main", "x": 750, "kind": "spring", "stiffness": 5e4, "rotation": 0.0},
    ],
    "gears": [
        {
            "a": {"shaft": "main", "x": 750, "radius": 60},
            "b": {"shaft": "out", "x": 0, "radius": 120},
        }
    ],
    "load_cases": [
        {
            "name": "service",
            "torques": [{"shaft": "main", "x": 300, "torque": 400}],
            "distributed": [
                {
                    "shaft": "main",
                    "start": 0,
                    "end": 300,
                    "intensity_start": 10,
                    "intensity_end": 10,
                }
            ],
        },
    ],
    "combinations": [{"name": "factored", "factors": {"service": 1.5}}],
}


def test_the_base_case_is_valid():
    solve(parse_case(copy.deepcopy(VALID)))  # so every failure below comes from its one change


def setter(path: str, value: Any) -> Callable[[dict[str, Any]], None]:
    """Set a value deep in the case: path like 'shafts.0.segments.1.length'."""

    def apply(case: dict[str, Any]) -> None:
        *parents, last = path.split(".")
        target: Any = case
        for key in parents:
            target = target[int(key)] if isinstance(target, list) else target[key]
        if isinstance(target, list):
            target[int(last)] = value
        else:
            target[last] = value

    return apply


def deleter(path: str) -> Callable[[dict[str, Any]], None]:
    def apply(case: dict[str, Any]) -> None:
        *parents, last = path.split(".")
        target: Any = case
        for key in parents:
            target = target[int(key)] if isinstance(target, list) else target[key]
        del target[last]

    return apply


SEGMENT = "shafts.0.segments"
NAN, INF = float("nan"), float("inf")

# (id, change, field the message must start with, words the message must contain)
BAD: list[tuple[str, Callable[[dict[str, Any]], None], str, str]] = [
    # lengths and diameters
    (
        "zero length",
        setter(f"{SEGMENT}.0.length", 0),
        "shafts[0].segments[0].length",
        "greater than zero (0 mm)",
    ),
    (
        "negative length",
        setter(f"{SEGMENT}.2.length", -5),
        "shafts[0].segments[2].length",
        "greater than zero (-5 mm)",
    ),
    (
        "zero diameter",
        setter(f"{SEGMENT}.0.section.diameter", 0),
        "shafts[0].segments[0].section.diameter",
        "greater than zero",
    ),
    (
        "negative outer diameter",
        setter(f"{SEGMENT}.1.section.outer_diameter", -20),
        "shafts[0].segments[1].section.outer_diameter",
        "greater than zero",
    ),
    (
        "negative tapered end",
        setter(f"{SEGMENT}.2.section.diameter_end", -40),
        "shafts[0].segments[2].section.diameter_end",
        "greater than zero",
    ),
    (
        "zero layer diameter",
        setter(f"{SEGMENT}.3.layers.1.section.diameter", 0),
        "shafts[0].segments[3].layers[1].section.diameter",
        "greater than zero",
    ),
    (
        "inner equals outer",
        setter(f"{SEGMENT}.1.section.inner_diameter", 20),
        "shafts[0].segments[1].section.inner_diameter",
        "must be smaller than outer_diameter (20 mm ≥ 20 mm)",
    ),
    (
        "inner above outer",
        setter(f"{SEGMENT}.1.section.inner_diameter", 30),
        "shafts[0].segments[1].section.inner_diameter",
        "must be smaller than outer_diameter (30 mm ≥ 20 mm)",
    ),
    (
        "bore too big",
        setter(f"{SEGMENT}.2.section.bore", 45),
        "shafts[0].segments[2].section.bore",
        "45 mm ≥ 40 mm",
    ),
    (
        "overlapping layers",
        setter(f"{SEGMENT}.3.layers.0.section.inner_diameter", 30),
        "shafts[0].segments[3].layers[0].section",
        "overlaps",
    ),
    (
        "non-positive shear modulus",
        setter("materials.steel.shear_modulus", -1),
        "materials.steel.shear_modulus",
        "greater than zero",
    ),
    (
        "non-positive spring",
        setter("supports.1.stiffness", 0),
        "supports[1].stiffness",
        "greater than zero",
    ),
    ("zero gear radius", setter("gears.0.a.radius", 0), "gears[0].a.radius", "greater than zero"),
    (
        "distributed end before start",
        setter("load_cases.0.distributed.0.end", -1),
        "load_cases[0].distributed[0].end",
        "greater than start",
    ),
    # NaN and inf (a JSON NaN literal decodes to float('nan'))
    ("NaN length", setter(f"{SEGMENT}.0.length", NAN), "shafts[0].segments[0].length", "finite"),
    (
        "inf diameter",
        setter(f"{SEGMENT}.0.section.diameter", INF),
        "shafts[0].segments[0].section.diameter",
        "finite",
    ),
    (
        "NaN torque",
        setter("load_cases.0.torques.0.torque", NAN),
        "load_cases[0].torques[0].torque",
        "finite",
    ),
    ("-inf support x", setter("supports.0.x", -INF), "supports[0].x", "finite"),
    (
        "NaN intensity",
        setter("load_cases.0.distributed.0.intensity_end", NAN),
        "load_cases[0].distributed[0].intensity_end",
        "finite",
    ),
    (
        "NaN factor",
        setter("combinations.0.factors.service", NAN),
        "combinations[0].factors.service",
        "finite",
    ),
    # unknown names
    (
        "unknown material",
        setter(f"{SEGMENT}.0.material", "unobtainium"),
        "shafts[0].segments[0].material",
        "unknown material 'unobtainium'",
    ),
    (
        "unknown layer material",
        setter(f"{SEGMENT}.3.layers.1.material", "unobtainium"),
        "shafts[0].segments[3].layers[1].material",
        "unknown material",
    ),
    (
        "unknown support shaft",
        setter("supports.0.shaft", "ghost"),
        "supports[0].shaft",
        "unknown shaft 'ghost'",
    ),
    (
        "unknown torque shaft",
        setter("load_cases.0.torques.0.shaft", "ghost"),
        "load_cases[0].torques[0].shaft",
        "unknown shaft",
    ),
    (
        "unknown load case",
        setter("combinations.0.factors", {"servise": 1.5}),
        "combinations[0].factors.servise",
        "unknown load case 'servise'",
    ),
    (
        "unknown shape",
        setter(f"{SEGMENT}.0.section.shape", "hexagon"),
        "shafts[0].segments[0].section.shape",
        "unknown shape 'hexagon'",
    ),
    ("unknown support kind", setter("supports.0.kind", "pinned"), "supports[0].kind", "pinned"),
    # off the shaft
    (
        "torque off the shaft",
        setter("load_cases.0.torques.0.x", 900),
        "load_cases[0].torques[0].x",
        "900 mm is off shaft 'main'",
    ),
    (
        "torque before the start",
        setter("load_cases.0.torques.0.x", -1),
        "load_cases[0].torques[0].x",
        "off shaft",
    ),
    ("support off the shaft", setter("supports.0.x", 751), "supports[0].x", "off shaft"),
    (
        "distributed off the shaft",
        setter("load_cases.0.distributed.0.end", 800),
        "load_cases[0].distributed[0].end",
        "off shaft",
    ),
    # gears between points that do not exist
    (
        "gear on an unknown shaft",
        setter("gears.0.b.shaft", "ghost"),
        "gears[0].b.shaft",
        "unknown shaft 'ghost'",
    ),
    ("gear off the shaft", setter("gears.0.b.x", 401), "gears[0].b.x", "off shaft 'out'"),
    (
        "gear meshing with its own shaft",
        setter("gears.0.b.shaft", "main"),
        "gears[0].b.shaft",
        "own shaft",
    ),
    # units
    ("unknown unit", setter("units.length", "furlongz"), "units.length", "unknown unit"),
    (
        "unit of the wrong dimension",
        setter("units.length", "kg"),
        "units.length",
        "not a unit of length",
    ),
    ("torque unit of force", setter("units.torque", "N"), "units.torque", "not a unit of torque"),
    ("stress unit of length", setter("units.stress", "mm"), "units.stress", "not a unit of stress"),
    (
        "length unit of stress",
        setter("units.length", "MPa"),
        "units.length",
        "not a unit of length",
    ),
    ("angle unit of length", setter("units.angle", "mm"), "units.angle", "not a unit of angle"),
    ("torque unit of angle", setter("units.torque", "deg"), "units.torque", "not a unit of torque"),
    (
        "stress unit of length (pint)",
        setter("units.stress", "inch"),
        "units.stress",
        "not a unit of stress",
    ),
    ("empty unit", setter("units.angle", ""), "units.angle", "unit string"),
    ("unit that divides by zero", setter("units.length", "1/0"), "units.length", "unit"),
    ("unit with an unbalanced bracket", setter("units.length", "mm)"), "units.length", "unit"),
    ("unit string not a string", setter("units.length", 5), "units.length", "string"),
    ("units not an object", setter("units", "mm"), "units", "object"),
    # unknown keys at several depths
    ("unknown top key", setter("colour", "red"), "colour", "unknown key"),
    ("unknown units key", setter("units.colour", "red"), "units.colour", "unknown key"),
    (
        "unknown material key",
        setter("materials.steel.colour", "red"),
        "materials.steel.colour",
        "unknown key",
    ),
    ("unknown shaft key", setter("shafts.1.colour", "red"), "shafts[1].colour", "unknown key"),
    (
        "unknown segment key",
        setter(f"{SEGMENT}.1.colour", "red"),
        "shafts[0].segments[1].colour",
        "unknown key",
    ),
    (
        "unknown section key",
        setter(f"{SEGMENT}.1.section.colour", "red"),
        "shafts[0].segments[1].section.colour",
        "unknown key",
    ),
    (
        "unknown layer key",
        setter(f"{SEGMENT}.3.layers.0.colour", "red"),
        "shafts[0].segments[3].layers[0].colour",
        "unknown key",
    ),
    (
        "unknown support key",
        setter("supports.1.colour", "red"),
        "supports[1].colour",
        "unknown key",
    ),
    ("unknown gear key", setter("gears.0.a.colour", "red"), "gears[0].a.colour", "unknown key"),
    (
        "unknown torque key",
        setter("load_cases.0.torques.0.colour", "red"),
        "load_cases[0].torques[0].colour",
        "unknown key",
    ),
    (
        "unknown distributed key",
        setter("load_cases.0.distributed.0.colour", "red"),
        "load_cases[0].distributed[0].colour",
        "unknown key",
    ),
    (
        "unknown combination key",
        setter("combinations.0.colour", "red"),
        "combinations[0].colour",
        "unknown key",
    ),
    # wrong types: a string for a number, at several depths
    (
        "string length",
        setter(f"{SEGMENT}.0.length", "300"),
        "shafts[0].segments[0].length",
        "must be a number",
    ),
    (
        "string diameter",
        setter(f"{SEGMENT}.0.section.diameter", "50"),
        "shafts[0].segments[0].section.diameter",
        "must be a number",
    ),
    (
        "string shear modulus",
        setter("materials.steel.shear_modulus", "79300"),
        "materials.steel.shear_modulus",
        "must be a number",
    ),
    ("string support x", setter("supports.0.x", "0"), "supports[0].x", "must be a number"),
    (
        "string stiffness",
        setter("supports.1.stiffness", "5e4"),
        "supports[1].stiffness",
        "must be a number",
    ),
    (
        "string rotation",
        setter("supports.1.rotation", "0"),
        "supports[1].rotation",
        "must be a number",
    ),
    ("string gear x", setter("gears.0.a.x", "750"), "gears[0].a.x", "must be a number"),
    (
        "string gear radius",
        setter("gears.0.b.radius", "120"),
        "gears[0].b.radius",
        "must be a number",
    ),
    (
        "string torque",
        setter("load_cases.0.torques.0.torque", "400"),
        "load_cases[0].torques[0].torque",
        "must be a number",
    ),
    (
        "string torque x",
        setter("load_cases.0.torques.0.x", "300"),
        "load_cases[0].torques[0].x",
        "must be a number",
    ),
    (
        "string distributed start",
        setter("load_cases.0.distributed.0.start", "0"),
        "load_cases[0].distributed[0].start",
        "must be a number",
    ),
    (
        "string factor",
        setter("combinations.0.factors.service", "1.5"),
        "combinations[0].factors.service",
        "must be a number",
    ),
    (
        "boolean length",
        setter(f"{SEGMENT}.0.length", True),
        "shafts[0].segments[0].length",
        "must be a number",
    ),
    ("number for a shaft id", setter("shafts.1.id", 5), "shafts[1].id", "must be a string"),
    (
        "number for a load case name",
        setter("load_cases.0.name", 5),
        "load_cases[0].name",
        "must be a string",
    ),
    (
        "number for a support shaft",
        setter("supports.0.shaft", 3),
        "supports[0].shaft",
        "must be a string",
    ),
    (
        "number for a gear shaft",
        setter("gears.0.a.shaft", 3),
        "gears[0].a.shaft",
        "must be a string",
    ),
    ("list for shafts", setter("shafts", "main"), "shafts", "must be a list"),
    (
        "string for a section",
        setter(f"{SEGMENT}.0.section", "solid"),
        "shafts[0].segments[0].section",
        "must be an object",
    ),
    ("string for a gear end", setter("gears.0.a", "main"), "gears[0].a", "must be an object"),
    (
        "list for factors",
        setter("combinations.0.factors", []),
        "combinations[0].factors",
        "must be an object",
    ),
    # missing and duplicated things
    (
        "missing length",
        deleter(f"{SEGMENT}.0.length"),
        "shafts[0].segments[0].length",
        "is required",
    ),
    # a rotation limit is a stretch of one shaft: end beyond start, both on the shaft
    (
        "rotation limit start after end",
        setter(
            "design", {"rotation_limits": [{"shaft": "main", "start": 500, "end": 300, "limit": 1}]}
        ),
        "design.rotation_limits[0].end",
        "must be greater than start (300 mm ≤ 500 mm)",
    ),
    (
        "rotation limit start at end",
        setter(
            "design", {"rotation_limits": [{"shaft": "main", "start": 300, "end": 300, "limit": 1}]}
        ),
        "design.rotation_limits[0].end",
        "must be greater than start (300 mm ≤ 300 mm)",
    ),
    (
        "rotation limit end off the shaft",
        setter(
            "design", {"rotation_limits": [{"shaft": "main", "start": 0, "end": 900, "limit": 1}]}
        ),
        "design.rotation_limits[0].end",
        "900 mm is off shaft 'main', which runs from 0 to 750 mm",
    ),
    (
        "rotation limit start off the shaft",
        setter(
            "design", {"rotation_limits": [{"shaft": "main", "start": -10, "end": 300, "limit": 1}]}
        ),
        "design.rotation_limits[0].start",
        "-10 mm is off shaft 'main'",
    ),
    (
        "spring without stiffness",
        deleter("supports.1.stiffness"),
        "supports[1].stiffness",
        "needs a stiffness",
    ),
    # a notch with a stated Kts
    (
        "notch kts below one",
        setter(f"{SEGMENT}.0.notch", {"kts": 0.9}),
        "shafts[0].segments[0].notch.kts",
        "at least 1, not 0.9",
    ),
    (
        "notch without kts",
        setter(f"{SEGMENT}.0.notch", {"radius": 1}),
        "shafts[0].segments[0].notch.kts",
        "is required",
    ),
    (
        "notch radius and sensitivity",
        setter(f"{SEGMENT}.0.notch", {"kts": 2, "radius": 1, "notch_sensitivity": 0.9}),
        "shafts[0].segments[0].notch.notch_sensitivity",
        "not both",
    ),
    (
        "notch sensitivity above one",
        setter(f"{SEGMENT}.0.notch", {"kts": 2, "notch_sensitivity": 1.2}),
        "shafts[0].segments[0].notch.notch_sensitivity",
        "between 0 and 1, not 1.2",
    ),
    (
        "notch zero radius",
        setter(f"{SEGMENT}.0.notch", {"kts": 2, "radius": 0}),
        "shafts[0].segments[0].notch.radius",
        "greater than zero (0 mm)",
    ),
    (
        "notch unknown key",
        setter(f"{SEGMENT}.0.notch", {"kts": 2, "depth": 1}),
        "shafts[0].segments[0].notch.depth",
        "unknown key",
    ),
    (
        "notch not an object",
        setter(f"{SEGMENT}.0.notch", 1.8),
        "shafts[0].segments[0].notch",
        "must be an object",
    ),
    ("duplicate shaft id", setter("shafts.1.id", "main"), "shafts[1].id", "duplicate"),
    (
        "duplicate load-case name",
        setter("combinations.0.name", "service"),
        "combinations[0].name",
        "duplicate",
    ),
]


@pytest.mark.parametrize(
    ("change", "field", "words"), [b[1:] for b in BAD], ids=[b[0] for b in BAD]
)
def test_parse_case_names_the_field(change, field, words):
    case = copy.deepcopy(VALID)
    change(case)
    with pytest.raises(InputError) as raised:
        parse_case(case)
    assert raised.value.field == field
    assert str(raised.value).startswith(f"{field}: ")
    assert words in raised.value.message


def _run_cli(capsys: pytest.CaptureFixture[str], path: Path) -> tuple[int, str, str]:
    status = main(["solve", str(path)])
    captured = capsys.readouterr()
    return status, captured.out, captured.err


@pytest.mark.parametrize(
    ("change", "field", "words"), [b[1:] for b in BAD], ids=[b[0] for b in BAD]
)
def test_cli_prints_one_line_naming_the_field(tmp_path, capsys, change, field, words):
    case = copy.deepcopy(VALID)
    change(case)
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")  # NaN/inf become JSON NaN/Infinity
    status, out, err = _run_cli(capsys, path)
    assert status == 2
    assert out == ""
    assert err.endswith("\n") and err.count("\n") == 1, err
    assert err.startswith(f"{field}: "), err
    assert words in err
    assert "Traceback" not in err


# --- mechanisms -------------------------------------------------------------------------------


def _no_support(case: dict[str, Any]) -> None:
    case["supports"] = []


def _geared_group_unsupported(case: dict[str, Any]) -> None:
    case["shafts"].append(
        {
            "id": "idler",
            "segments": [
                {"length": 100, "material": "steel", "section": {"shape": "solid", "diameter": 20}}
            ],
        }
    )
    case["supports"] = [{"shaft": "idler", "x": 0, "kind": "fixed"}]


def _one_shaft_unsupported(case: dict[str, Any]) -> None:
    del case["gears"]


MECHANISMS = [
    ("no support at all", _no_support, ["'main'", "'out'"]),
    ("gear-joined pair with no support", _geared_group_unsupported, ["'main'", "'out'"]),
    ("a shaft left without support or gear", _one_shaft_unsupported, ["'out'"]),
]


@pytest.mark.parametrize(
    ("change", "names"), [m[1:] for m in MECHANISMS], ids=[m[0] for m in MECHANISMS]
)
def test_a_system_free_to_spin_is_a_mechanism_error(tmp_path, capsys, change, names):
    case = copy.deepcopy(VALID)
    change(case)
    with pytest.raises(MechanismError) as raised:
        solve(parse_case(case))
    assert raised.value.field == "supports"
    message = str(raised.value)
    assert "free to spin" in message
    assert "mechanism" in message
    for name in names:
        assert name in message
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    status, out, err = _run_cli(capsys, path)
    assert (status, out) == (2, "")
    assert err == message + "\n"


# --- files that are not case files, through a real subprocess ------------------------------------


def _solve_in_subprocess(path: Path) -> subprocess.CompletedProcess[str]:
    environment = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.run(
        [sys.executable, "-m", "workbench.cli", "solve", str(path)],
        capture_output=True,
        text=True,
        env=environment,
        cwd=ROOT,
        timeout=60,
        check=False,
    )


RAW_FILES = [
    ("truncated JSON", '{"shafts": [{"id": "main", "segm', "not valid JSON"),
    (
        "NaN literal",
        json.dumps(VALID).replace('"length": 300', '"length": NaN', 1),
        "shafts[0].segments[0].length: must be a finite number",
    ),
    (
        "Infinity literal",
        json.dumps(VALID).replace('"torque": 400', '"torque": -Infinity', 1),
        "load_cases[0].torques[0].torque: must be a finite number",
    ),
    (
        "inner diameter too big",
        json.dumps(VALID).replace('"inner_diameter": 10', '"inner_diameter": 30', 1),
        "shafts[0].segments[1].section.inner_diameter: must be smaller than outer_diameter "
        "(30 mm ≥ 20 mm)",
    ),
    ("a JSON list", "[1, 2]", "a case file must be a JSON object"),
    ("empty file", "", "not valid JSON"),
]


@pytest.mark.parametrize(
    ("text", "start"), [r[1:] for r in RAW_FILES], ids=[r[0] for r in RAW_FILES]
)
def test_cli_subprocess_on_bad_files(tmp_path, text, start):
    path = tmp_path / "case.json"
    path.write_text(text, encoding="utf-8")
    completed = _solve_in_subprocess(path)
    assert completed.returncode == 2
    assert completed.stdout == ""
    assert completed.stderr.count("\n") == 1, completed.stderr
    assert "Traceback" not in completed.stderr
    if start.startswith(("not valid", "a case file")):
        assert start in completed.stderr  # the field is the file itself (or the whole case)
    else:
        assert completed.stderr.startswith(start), completed.stderr


def test_cli_subprocess_on_a_missing_file_and_on_bytes_that_are_not_utf8(tmp_path):
    missing = _solve_in_subprocess(tmp_path / "nowhere.json")
    binary = tmp_path / "binary.json"
    binary.write_bytes(b"\xff\xfe{\x00")
    undecodable = _solve_in_subprocess(binary)
    for completed, path in ((missing, tmp_path / "nowhere.json"), (undecodable, binary)):
        assert completed.returncode == 2
        assert completed.stderr.count("\n") == 1
        assert completed.stderr.startswith(f"{path}: cannot read the case file")
        assert "Traceback" not in completed.stderr


def test_cli_subprocess_on_a_mechanism(tmp_path):
    case = copy.deepcopy(VALID)
    case["supports"] = []
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    completed = _solve_in_subprocess(path)
    assert completed.returncode == 2
    assert completed.stderr.count("\n") == 1
    assert completed.stderr.startswith("supports: ")
    assert "free to spin (a mechanism)" in completed.stderr
    assert "Traceback" not in completed.stderr
