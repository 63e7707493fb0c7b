"""Solving straight from a case file's columns gives what solving its model gives.

The reference is the model path, ``solve(parse_case(document))``, which builds one object per
segment and has its own outside checks (tests/test_properties.py, tests/validation/). The
column path, :func:`workbench.solver.analysis.solve_case`, must give the same results to
1e-12 (relative to each quantity's scale) on random single and geared shafts of every section
shape, layers, details and units; and for bad input the same error, field path and message,
word for word. ``workbench solve --json`` must write the values it wrote before the column path
(tests/fixtures/solve/, written at commit 3bf80b7 with ``json.dumps``).
"""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from tests.test_bad_input import BAD, VALID
from tests.test_properties import SETTINGS, geared_cases, shaft_length, single_shaft_cases
from workbench.case.errors import InputError
from workbench.case.load import case_file_from_document
from workbench.cli import main
from workbench.solver.analysis import Results, solve, solve_case, solve_file
from workbench.solver.io import load_case, parse_case

ROOT = Path(__file__).resolve().parents[1]
FIXTURES = ROOT / "tests" / "fixtures" / "solve"
#: Each fixture case and the `solve --json` document written for it before the column path.
SOLVED_BEFORE = [
    (ROOT / "workbench" / "cases" / "press_drive.json", FIXTURES / "press_drive.solve.json"),
    (FIXTURES / "line_shaft.json", FIXTURES / "line_shaft.solve.json"),
    (FIXTURES / "every_shape.json", FIXTURES / "every_shape.solve.json"),
]
#: The two paths do the same arithmetic; the bound leaves room for rounding only.
TOLERANCE = 1e-12
ARRAYS = ("reactions", "gear_torques", "torque", "angle", "shear_stress", "node_angle")


def assert_same_results(columns: Results, model: Results) -> None:
    """Every array of the column path within 1e-12 of the model path's (relative to its scale)."""
    assert columns.names == model.names
    assert columns.shaft_ids == tuple(shaft.id for shaft in model.model.shafts)
    np.testing.assert_array_equal(columns.mesh.station_x, model.mesh.station_x)
    for name in ARRAYS:
        ours, reference = getattr(columns, name), getattr(model, name)
        assert ours.shape == reference.shape, name
        scale = float(np.abs(reference).max(initial=0.0)) or 1.0
        np.testing.assert_allclose(ours, reference, rtol=0.0, atol=TOLERANCE * scale, err_msg=name)


def both_paths(document: dict[str, Any]) -> tuple[Results | InputError, Results | InputError]:
    """(column path, model path) of one document: results, or the error each raised."""
    outcomes: list[Results | InputError] = []
    for path in (
        lambda: solve_case(case_file_from_document(copy.deepcopy(document))),
        lambda: solve(parse_case(copy.deepcopy(document))),
    ):
        try:
            outcomes.append(path())
        except InputError as error:
            outcomes.append(error)
    return outcomes[0], outcomes[1]


def assert_same_outcome(document: dict[str, Any]) -> None:
    """Both paths give the same results, or the same error word for word."""
    columns, model = both_paths(document)
    if isinstance(model, InputError):
        assert isinstance(columns, InputError), f"the column path accepted: {model}"
        assert type(columns) is type(model)
        assert str(columns) == str(model)
        return
    assert isinstance(columns, Results), f"the column path refused: {columns}"
    assert_same_results(columns, model)


# --- random cases of every shape ------------------------------------------------------------


@st.composite
def other_sections(draw: st.DrawFn) -> dict[str, Any]:
    """A non-circular section of sizes each shape accepts (SI)."""
    shape = draw(
        st.sampled_from(["rectangle", "box", "elliptical_tube", "thin_closed", "thin_open"])
    )
    width, height = draw(st.floats(0.02, 0.1)), draw(st.floats(0.02, 0.1))
    if shape == "rectangle":
        return {"shape": shape, "width": width, "height": height}
    thickness = min(width, height) * draw(st.floats(0.02, 0.05))
    if shape in ("box", "elliptical_tube"):
        return {"shape": shape, "width": width, "height": height, "thickness": thickness}
    walls = [{"length": width, "thickness": thickness}, {"length": height, "thickness": thickness}]
    if shape == "thin_open":
        return {"shape": shape, "walls": walls}
    return {"shape": shape, "enclosed_area": width * height, "walls": walls * 2}


@st.composite
def varied_cases(draw: st.DrawFn, geared: bool) -> dict[str, Any]:
    """A random case (tests/test_properties.py), then some segments made layered, non-circular,
    given details, and the whole written in millimetres or kept in SI."""
    case = draw(geared_cases() if geared else single_shaft_cases(n_cases=2))
    for shaft in case["shafts"]:
        for segment in shaft["segments"]:
            choice = draw(st.sampled_from(["keep", "keep", "layers", "other", "details"]))
            if choice == "layers":
                core = draw(st.floats(0.01, 0.05))
                bore = core * draw(st.floats(1.0, 1.2))
                outer = bore * draw(st.floats(1.1, 1.8))
                section = segment.pop("section")
                segment["layers"] = [
                    {
                        "material": segment.pop("material"),
                        "section": {
                            "shape": "tube",
                            "outer_diameter": outer,
                            "inner_diameter": bore,
                        },
                    },
                    {
                        "material": next(iter(case["materials"])),
                        "section": {"shape": "solid", "diameter": core},
                    },
                ]
                del section
            elif choice == "other":
                segment["section"] = draw(other_sections())
            elif choice == "details":
                segment["fillet_radius"] = draw(st.floats(0.0005, 0.005))
                segment["keyseat"] = draw(st.booleans())
                segment["notch"] = {"kts": draw(st.floats(1.0, 3.0)), "radius": 0.001}
    if draw(st.booleans()):
        case = in_millimetres(case)
    return case


#: Keys of the random cases measured in lengths (the rest stay as they are in mm–N·m–Pa–rad).
LENGTH_KEYS = frozenset(
    {
        "length",
        "diameter",
        "outer_diameter",
        "inner_diameter",
        "diameter_start",
        "diameter_end",
        "bore",
        "width",
        "height",
        "thickness",
        "x",
        "start",
        "end",
        "radius",
        "fillet_radius",
        "cross_hole_diameter",
    }
)


def in_millimetres(case: dict[str, Any]) -> dict[str, Any]:
    """The same case with every length in mm and enclosed areas in mm² (a units object added)."""

    def convert(node: Any, key: str = "") -> Any:
        if isinstance(node, dict):
            return {name: convert(value, name) for name, value in node.items()}
        if isinstance(node, list):
            return [convert(value, key) for value in node]
        if isinstance(node, float) and key in LENGTH_KEYS:
            return node * 1e3
        if isinstance(node, float) and key == "enclosed_area":
            return node * 1e6
        if isinstance(node, float) and key in ("intensity_start", "intensity_end"):
            return node * 1e-3  # N·m per mm
        if isinstance(node, float) and key == "stiffness":
            return node
        return node

    converted = convert(case)
    converted["units"] = {"length": "mm"}
    return converted


@SETTINGS
@given(varied_cases(geared=False))
def test_the_column_path_equals_the_model_path_on_single_shafts(case):
    assert_same_outcome(case)


@SETTINGS
@given(varied_cases(geared=True))
def test_the_column_path_equals_the_model_path_on_geared_shafts(case):
    assert_same_outcome(case)


# --- bad input: the same message, word for word ----------------------------------------------


@pytest.mark.parametrize(("change", "field"), [b[1:3] for b in BAD], ids=[b[0] for b in BAD])
def test_every_bad_input_of_the_catalogue_gives_the_same_message(change, field):
    case = copy.deepcopy(VALID)
    change(case)
    columns, model = both_paths(case)
    assert isinstance(model, InputError) and model.field == field
    assert isinstance(columns, InputError)
    assert str(columns) == str(model)


def _segment_paths(case: dict[str, Any]) -> list[tuple[int, int]]:
    return [(s, n) for s, shaft in enumerate(case["shafts"]) for n in range(len(shaft["segments"]))]


#: Changes of one segment that only building the model refuses (the declaration accepts them).
SEGMENT_BREAKS = [
    "inner ≥ outer",
    "bore ≥ end diameter",
    "unknown material",
    "overlapping layers",
    "non-circular layer",
    "cross hole too large",
    "length underflows in SI",
    "diameter overflows in SI",
    "notch radius underflows in SI",
    "fillet underflows in SI",
    "too thick a box wall",
]


def _break(segment: dict[str, Any], how: str) -> dict[str, str] | None:
    """Break one segment the way ``how`` says; return units the break needs, if any."""
    if how == "inner ≥ outer":
        segment["section"] = {"shape": "tube", "outer_diameter": 0.03, "inner_diameter": 0.03}
    elif how == "bore ≥ end diameter":
        segment["section"] = {
            "shape": "tapered",
            "diameter_start": 0.05,
            "diameter_end": 0.02,
            "bore": 0.02,
        }
    elif how == "unknown material":
        segment["material"] = "unobtainium"
    elif how == "overlapping layers":
        segment.pop("section", None)
        segment["layers"] = [
            {
                "material": "steel-1020-cd",
                "section": {"shape": "tube", "outer_diameter": 0.06, "inner_diameter": 0.03},
            },
            {"material": "steel-1020-cd", "section": {"shape": "solid", "diameter": 0.04}},
        ]
        segment.pop("material", None)
    elif how == "non-circular layer":
        segment.pop("section", None)
        segment.pop("material", None)
        segment["layers"] = [
            {
                "material": "steel-1020-cd",
                "section": {"shape": "rectangle", "width": 0.02, "height": 0.01},
            },
            {
                "material": "steel-1020-cd",
                "section": {"shape": "tube", "outer_diameter": 0.06, "inner_diameter": 0.05},
            },
        ]
    elif how == "cross hole too large":
        segment["cross_hole_diameter"] = 1e6  # larger than any section drawn, in m or mm
    elif how == "length underflows in SI":
        segment["length"] = 1e-322
        return {"length": "mm"}
    elif how == "diameter overflows in SI":
        segment["section"] = {"shape": "solid", "diameter": 1e306}
        return {"length": "km"}
    elif how == "notch radius underflows in SI":
        segment["notch"] = {"kts": 2.0, "radius": 1e-322}
        return {"length": "mm"}
    elif how == "fillet underflows in SI":
        segment["fillet_radius"] = 1e-322
        return {"length": "mm"}
    elif how == "too thick a box wall":
        segment["section"] = {"shape": "box", "width": 0.05, "height": 0.05, "thickness": 0.02}
    return None


@SETTINGS
@given(varied_cases(geared=True), st.data())
def test_a_segment_only_the_model_refuses_gives_the_same_message(case, data):
    """One or two segments broken; the first one in file order is named by both paths."""
    paths = _segment_paths(case)
    for shaft, number in data.draw(st.lists(st.sampled_from(paths), min_size=1, max_size=2)):
        segment = case["shafts"][shaft]["segments"][number]
        units = _break(segment, data.draw(st.sampled_from(SEGMENT_BREAKS)))
        if units is not None:
            case = _in_units(case, units)
    columns, model = both_paths(case)
    assert isinstance(model, InputError), "the break did not break the case"
    assert isinstance(columns, InputError)
    assert str(columns) == str(model)


def _in_units(case: dict[str, Any], units: dict[str, str]) -> dict[str, Any]:
    """The case with ``units`` declared (its numbers kept: a break needs only its own)."""
    case = copy.deepcopy(case)
    case["units"] = {**case.get("units", {}), **units}
    return case


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_a_support_or_a_load_off_the_shaft_gives_the_same_message(case, data):
    length = shaft_length(case["shafts"][0])
    what = data.draw(st.sampled_from(["support", "torque", "shaft id", "blank id"]))
    if what == "support":
        case["supports"][0]["x"] = length * data.draw(st.floats(1.01, 3.0))
    elif what == "torque":
        case["load_cases"][0]["torques"] = [{"shaft": "s", "x": -length, "torque": 1.0}]
    elif what == "shaft id":
        case["supports"][0]["shaft"] = "elsewhere"
    else:
        case["shafts"][0]["id"] = "   "
    assert_same_outcome(case)
    assert isinstance(both_paths(case)[0], InputError)


# --- the model of results solved from columns -------------------------------------------------


def test_the_model_of_column_results_is_built_when_asked_and_equals_the_loaded_model(tmp_path):
    document = json.loads((FIXTURES / "every_shape.json").read_text(encoding="utf-8"))
    results = solve_case(case_file_from_document(document))
    assert "model" not in vars(results)  # not built by solving
    assert results.model == parse_case(document)
    path = tmp_path / "case.json"
    path.write_text(json.dumps(document), encoding="utf-8")
    from_file = solve_file(path)
    assert from_file.model == load_case(path)
    assert_same_results(from_file, solve(load_case(path)))


# --- solve --json: the values written before -----------------------------------------------


@pytest.mark.parametrize(("case", "before"), SOLVED_BEFORE, ids=[c.stem for c, _ in SOLVED_BEFORE])
def test_solve_json_writes_the_values_it_wrote_before(capsys, case, before):
    assert main(["solve", str(case), "--json"]) == 0
    written = json.loads(capsys.readouterr().out)
    expected = json.loads(before.read_text(encoding="utf-8"))
    # The same document: every key, list length and string; the numbers to rounding noise (the
    # last digits of a solve differ between BLAS builds), zeros with their signs.
    assert _shape(written) == _shape(expected)
    flat_written, flat_expected = np.array(_numbers(written)), np.array(_numbers(expected))
    scale = np.abs(flat_expected).max()
    np.testing.assert_allclose(flat_written, flat_expected, rtol=1e-12, atol=1e-13 * scale)
    zeros = (flat_expected == 0) & (flat_written == 0)
    assert np.array_equal(np.signbit(flat_written[zeros]), np.signbit(flat_expected[zeros]))


def _shape(node: Any) -> Any:
    """The document with every number replaced by its type."""
    if isinstance(node, dict):
        return {key: _shape(value) for key, value in node.items()}
    if isinstance(node, list):
        return [_shape(value) for value in node]
    return type(node).__name__ if isinstance(node, int | float) else node


def _numbers(node: Any) -> list[float]:
    if isinstance(node, dict):
        return [v for value in node.values() for v in _numbers(value)]
    if isinstance(node, list):
        return [v for value in node for v in _numbers(value)]
    return [float(node)] if isinstance(node, int | float) else []


def test_a_combination_beyond_the_range_of_numbers_is_one_line_naming_its_factor(tmp_path, capsys):
    """A combination of 10 × 1e308 N·m overflows in SI: the solve refuses it (exit 2, one
    line, nothing on stdout) naming the factor, before any document is written."""
    case = copy.deepcopy(VALID)
    case["load_cases"] = [
        {"name": "huge", "torques": [{"shaft": "main", "x": 300, "torque": 1e308}]},
    ]
    case["combinations"] = [{"name": "tenfold", "factors": {"huge": 10}}]
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    status = main(["solve", str(path), "--json"])
    captured = capsys.readouterr()
    assert status == 2
    assert captured.out == ""
    assert captured.err.count("\n") == 1
    assert captured.err.startswith("combinations[0].factors.huge: 10 times load case 'huge' ")
    assert "of combination 'tenfold' overflow" in captured.err
    assert "null" not in captured.err and "Traceback" not in captured.err


@pytest.mark.parametrize("gap", [k * 1e-10 for k in range(-3, 25)])
def test_layers_at_the_edge_of_the_nesting_tolerance_are_judged_alike(gap):
    """A sleeve whose bore is the core's diameter less a few parts in 10¹⁰: the model's
    tolerance is 1e-9 of the diameter; both paths must accept and refuse the same sleeves."""
    case = copy.deepcopy(VALID)
    core = 40.0
    case["shafts"][0]["segments"][3]["layers"] = [
        {"material": "steel", "section": {"shape": "solid", "diameter": core}},
        {
            "material": "steel",
            "section": {"shape": "tube", "outer_diameter": 60, "inner_diameter": core * (1 - gap)},
        },
    ]
    assert_same_outcome(case)


def test_a_value_that_overflows_only_in_the_files_units_is_refused_by_name(tmp_path, capsys):
    """Stresses written in millipascals: about 1e306 Pa is finite in SI but not in mPa."""
    case = copy.deepcopy(VALID)
    case["units"]["stress"] = "mPa"
    case["materials"]["steel"]["shear_modulus"] = 79.3e12  # 79.3 GPa in mPa
    case["materials"]["steel"]["yield_strength"] = 350e9
    # 16·T/(π·d³) with T = 1e300 N·m on d = 17 mm: about 1e306 Pa, 1e309 mPa.
    case["shafts"][0]["segments"][0]["section"]["diameter"] = 17
    load = {"shaft": "main", "x": 300, "torque": 1e300}
    case["load_cases"] = [{"name": "enormous", "torques": [load]}]
    case.pop("combinations", None)
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    status = main(["solve", str(path), "--json"])
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.out == ""
    assert captured.err.count("\n") == 1
    assert captured.err.startswith("results[0].shafts.main.shear_stress: the shear stress of load ")
    assert "mPa: JSON cannot hold it" in captured.err
