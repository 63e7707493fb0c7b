"""The case file's JSON Schema (``workbench schema``) against the reference validator.

Outside reference: the ``jsonschema`` library's Draft 2020-12 validator (JSON Schema 2020-12
specification, https://json-schema.org/draft/2020-12). The schema must be a valid schema, accept
every valid case the loader accepts, and reject structural errors the loader rejects.
"""

from __future__ import annotations

import copy
import json
from collections.abc import Callable
from pathlib import Path
from typing import Any

import jsonschema
import pytest

from workbench.case.errors import InputError
from workbench.case.schema import case_schema
from workbench.cli import main
from workbench.solver.io import case_to_dict, parse_case

DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"


@pytest.fixture(scope="module")
def schema() -> dict[str, Any]:
    return case_schema()


@pytest.fixture(scope="module")
def validator(schema: dict[str, Any]) -> jsonschema.Draft202012Validator:
    return jsonschema.Draft202012Validator(schema)


def test_cli_prints_a_valid_draft_2020_12_schema(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["schema"]) == 0
    printed = json.loads(capsys.readouterr().out)
    jsonschema.Draft202012Validator.check_schema(printed)
    assert printed["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    assert printed == case_schema()


# --- valid cases ---------------------------------------------------------------------------------

STEEL = {"shear_modulus": 79300, "yield_strength": 390, "ultimate_strength": 470}
MM_UNITS = {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"}


def one_segment_case(section: dict[str, Any], **segment: Any) -> dict[str, Any]:
    return {
        "units": MM_UNITS,
        "materials": {"steel": STEEL},
        "shafts": [
            {"id": "s", "segments": [{"length": 300, "material": "steel", "section": section,
                                      **segment}]}
        ],
        "supports": [{"shaft": "s", "x": 0}],
        "load_cases": [{"name": "A", "torques": [{"shaft": "s", "x": 300, "torque": 100}]}],
    }  # fmt: skip


SECTIONS: dict[str, dict[str, Any]] = {
    "solid": {"shape": "solid", "diameter": 40},
    "tube": {"shape": "tube", "outer_diameter": 40, "inner_diameter": 30},
    "tapered": {"shape": "tapered", "diameter_start": 40, "diameter_end": 30},
    "tapered-bored": {"shape": "tapered", "diameter_start": 40, "diameter_end": 30, "bore": 10},
    "rectangle": {"shape": "rectangle", "width": 40, "height": 20},
    # A_m 1500 mm² ≤ P²/(4π) = 2037 mm²; t = 1.5 mm ≤ 0.1·2A_m/P = 1.9 mm
    "thin_closed": {"shape": "thin_closed", "enclosed_area": 1500,
                    "walls": [{"length": 160, "thickness": 1.5}]},
    "box": {"shape": "box", "width": 60, "height": 40, "thickness": 2},
    "elliptical_tube": {"shape": "elliptical_tube", "width": 60, "height": 40, "thickness": 2},
    "thin_open": {"shape": "thin_open",
                  "walls": [{"length": 50, "thickness": 3}, {"length": 40, "thickness": 3}]},
}  # fmt: skip


def layered_case() -> dict[str, Any]:
    case = one_segment_case(SECTIONS["solid"])
    case["materials"]["bronze"] = {"shear_modulus": 41400, "source": "Shigley Table A-5"}
    case["shafts"][0]["segments"] = [
        {
            "length": 300,
            "keyseat": False,
            "layers": [
                {"material": "bronze",
                 "section": {"shape": "tube", "outer_diameter": 50, "inner_diameter": 40}},
                {"material": "steel", "section": {"shape": "solid", "diameter": 40}},
            ],
        }
    ]  # fmt: skip
    return case


def geared_case() -> dict[str, Any]:
    return {
        "title": "two shafts in mesh",
        "units": MM_UNITS,
        "materials": {"steel": STEEL},
        "shafts": [
            {"id": "a", "segments": [{"length": 400, "material": "steel",
                                      "section": SECTIONS["solid"]}]},
            {"id": "b", "segments": [
                {"length": 200, "material": "steel", "section": SECTIONS["solid"]},
                {"length": 200, "material": "steel", "section": {"shape": "solid", "diameter": 30},
                 "fillet_radius": 2, "cross_hole_diameter": 5,
                 "notch": {"kts": 1.7, "radius": 0.5, "description": "ring groove"}},
            ]},
        ],
        "supports": [{"shaft": "b", "x": 400, "kind": "fixed"},
                     {"shaft": "a", "x": 0, "kind": "spring", "stiffness": 5000, "rotation": 0.1}],
        "gears": [{"a": {"shaft": "a", "x": 400, "radius": 100},
                   "b": {"shaft": "b", "x": 0, "radius": 50}, "mesh": "external"}],
        "load_cases": [
            {"name": "drive", "torques": [{"shaft": "a", "x": 200, "torque": 90}],
             "distributed": [{"shaft": "b", "start": 100, "end": 300, "intensity_start": 0.1,
                              "intensity_end": -0.2}]},
            {"name": "empty"},
        ],
        "combinations": [{"name": "drive, factored", "factors": {"drive": 1.5, "empty": 1}}],
        "design": {
            "factor_of_safety": 1.5,
            "shear_criterion": "shafting_code",
            "keyway": True,
            "max_twist_rate": 0.002,
            "rotation_limits": [{"shaft": "a", "start": 0, "end": 400, "limit": 2}],
        },
    }  # fmt: skip


def power_case() -> dict[str, Any]:
    case = one_segment_case(SECTIONS["solid"], keyseat=True)
    case["units"] = {**MM_UNITS, "power": "kW", "speed": "rpm"}
    case["load_cases"][0]["torques"] = [{"shaft": "s", "x": 300, "power": 7.5, "speed": 1450}]
    case["design"] = {"shear_criterion": "allowable", "allowable_shear_stress": 40}
    return case


def library_material_case() -> dict[str, Any]:
    case = one_segment_case(SECTIONS["tube"])
    del case["materials"]
    del case["units"]
    case["shafts"][0]["segments"][0].update(
        length=0.3, material="steel-1020-cd",
        section={"shape": "tube", "outer_diameter": 0.04, "inner_diameter": 0.03},
    )  # fmt: skip
    case["load_cases"][0]["torques"][0]["x"] = 0.3
    case["design"] = {"shear_criterion": "tresca", "factor_of_safety": 1.2,
                      "allowable_shear_stress": None, "max_twist_rate": None}  # fmt: skip
    return case


def section_case(name: str) -> Callable[[], dict[str, Any]]:
    return lambda: one_segment_case(SECTIONS[name])


VALID: dict[str, Callable[[], dict[str, Any]]] = {
    **{f"section-{name}": section_case(name) for name in SECTIONS},
    "layers": layered_case,
    "gears-design-combinations": geared_case,
    "power-speed": power_case,
    "library-material-si": library_material_case,
    "demo": lambda: json.loads(DEMO.read_text(encoding="utf-8")),
    # a vibration case: frequencies need no loads (solve, check and size refuse it, by name)
    "no-load-cases": lambda: {
        key: value
        for key, value in one_segment_case(SECTIONS["solid"]).items()
        if key != "load_cases"
    },
}


@pytest.mark.parametrize("name", list(VALID))
def test_valid_cases_pass_schema_and_loader(
    name: str, validator: jsonschema.Draft202012Validator
) -> None:
    case = VALID[name]()
    errors = [f"{list(e.absolute_path)}: {e.message}" for e in validator.iter_errors(case)]
    assert errors == []
    parse_case(case)


@pytest.mark.parametrize("name", ["gears-design-combinations", "layers", "demo"])
def test_written_case_files_pass_the_schema(
    name: str, validator: jsonschema.Draft202012Validator
) -> None:
    # what the program writes back (`workbench size -o`) must be a valid case file too
    written = case_to_dict(parse_case(VALID[name]()))
    assert [e.message for e in validator.iter_errors(written)] == []
    parse_case(written)


# --- structurally bad cases ---------------------------------------------------------------------


def edit(path: tuple[Any, ...], change: Callable[[Any, Any], None]) -> Callable[[], dict[str, Any]]:
    """A geared case with ``change(container, key)`` applied at ``path``."""

    def make() -> dict[str, Any]:
        case = copy.deepcopy(geared_case())
        container: Any = case
        for key in path[:-1]:
            container = container[key]
        change(container, path[-1])
        return case

    return make


def setter(value: Any) -> Callable[[Any, Any], None]:
    def change(container: Any, key: Any) -> None:
        container[key] = value

    return change


def remove(container: Any, key: Any) -> None:
    del container[key]


BAD: dict[str, Callable[[], dict[str, Any]]] = {
    # unknown keys at several depths
    "unknown-top": edit(("colour",), setter("red")),
    "unknown-units": edit(("units", "lenght"), setter("mm")),
    "unknown-material": edit(("materials", "steel", "hardness"), setter(200)),
    "unknown-shaft": edit(("shafts", 0, "speed"), setter(10)),
    "unknown-segment": edit(("shafts", 1, "segments", 1, "radius"), setter(2)),
    "unknown-section": edit(("shafts", 0, "segments", 0, "section", "radius"), setter(20)),
    "unknown-support": edit(("supports", 0, "damping"), setter(1)),
    "unknown-gear-end": edit(("gears", 0, "a", "teeth"), setter(20)),
    "unknown-torque": edit(("load_cases", 0, "torques", 0, "arm"), setter(1)),
    "unknown-distributed": edit(("load_cases", 0, "distributed", 0, "kind"), setter("uniform")),
    "unknown-design": edit(("design", "max_twist"), setter(1)),
    "unknown-rotation-limit": edit(("design", "rotation_limits", 0, "limt"), setter(1)),
    "unknown-wall": lambda: {
        **one_segment_case(
            {"shape": "thin_open", "walls": [{"length": 50, "thickness": 3, "radius": 1}]}
        ),
    },
    # wrong types
    "length-string": edit(("shafts", 0, "segments", 0, "length"), setter("400")),
    "diameter-bool": edit(("shafts", 0, "segments", 0, "section", "diameter"), setter(True)),
    "keyseat-string": edit(("shafts", 1, "segments", 0, "keyseat"), setter("yes")),
    "notch-kts-below-one": edit(("shafts", 1, "segments", 1, "notch", "kts"), setter(0.8)),
    "notch-radius-and-q": edit(
        ("shafts", 1, "segments", 1, "notch", "notch_sensitivity"), setter(0.9)
    ),
    "notch-q-above-one": edit(
        ("shafts", 1, "segments", 1, "notch"), setter({"kts": 1.7, "notch_sensitivity": 1.5})
    ),
    "notch-unknown-key": edit(("shafts", 1, "segments", 1, "notch", "depth"), setter(1)),
    "shafts-object": edit(("shafts",), setter({"id": "a"})),
    "segments-object": edit(("shafts", 0, "segments"), setter({})),
    "torque-string": edit(("load_cases", 0, "torques", 0, "torque"), setter("90 N*m")),
    "factor-string": edit(("combinations", 0, "factors", "drive"), setter("1.5")),
    "title-number": edit(("title",), setter(7)),
    "units-not-object": edit(("units",), setter("mm")),
    "unit-not-string": edit(("units", "length"), setter(25.4)),
    "material-not-object": edit(("materials", "steel"), setter(79300)),
    "keyway-number": edit(("design", "keyway"), setter(1)),
    "fos-string": edit(("design", "factor_of_safety"), setter("2")),
    "shape-number": edit(("shafts", 0, "segments", 0, "section", "shape"), setter(3)),
    "support-kind-number": edit(("supports", 0, "kind"), setter(1)),
    "design-list": edit(("design",), setter([])),
    # missing required
    "no-shafts": edit(("shafts",), remove),
    "empty-load-cases": edit(("load_cases",), setter([])),
    "no-segment-length": edit(("shafts", 0, "segments", 0, "length"), remove),
    "no-section": edit(("shafts", 0, "segments", 0, "section"), remove),
    "no-shape": edit(("shafts", 0, "segments", 0, "section", "shape"), remove),
    "no-diameter": edit(("shafts", 0, "segments", 0, "section", "diameter"), remove),
    "no-shear-modulus": edit(("materials", "steel", "shear_modulus"), remove),
    "no-torque-x": edit(("load_cases", 0, "torques", 0, "x"), remove),
    "no-torque-value": edit(("load_cases", 0, "torques", 0, "torque"), remove),
    "no-shaft-id": edit(("shafts", 0, "id"), remove),
    "no-case-name": edit(("load_cases", 0, "name"), remove),
    "no-gear-radius": edit(("gears", 0, "b", "radius"), remove),
    "no-rotation-limit-value": edit(("design", "rotation_limits", 0, "limit"), remove),
    "no-combination-factors": edit(("combinations", 0, "factors"), remove),
    "no-distributed-end": edit(("load_cases", 0, "distributed", 0, "end"), remove),
    "power-without-speed": lambda: {
        **power_case(),
        "load_cases": [{"name": "A", "torques": [{"shaft": "s", "x": 300, "power": 7.5}]}],
    },
    "torque-and-power": lambda: {
        **power_case(),
        "load_cases": [
            {
                "name": "A",
                "torques": [{"shaft": "s", "x": 300, "power": 7.5, "speed": 1450, "torque": 50}],
            }
        ],
    },
    "material-and-layers": lambda: {
        **layered_case(),
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {
                        **layered_case()["shafts"][0]["segments"][0],
                        "material": "steel",
                        "section": SECTIONS["solid"],
                    }
                ],
            }
        ],
    },
    "not-an-object": lambda: [geared_case()],  # type: ignore[dict-item, return-value]
}


@pytest.mark.parametrize("name", list(BAD))
def test_structural_errors_are_rejected_by_schema_and_loader(
    name: str, validator: jsonschema.Draft202012Validator
) -> None:
    case = BAD[name]()
    assert not validator.is_valid(case), f"schema accepted {name}"
    with pytest.raises(InputError):
        parse_case(case)


def test_the_base_of_the_bad_cases_is_valid(validator: jsonschema.Draft202012Validator) -> None:
    # every bad case is one edit away from this valid one, so each rejection is due to its edit
    assert validator.is_valid(geared_case())
    parse_case(geared_case())
