"""Numbers at the edges of the floats: every outcome is a result or one line naming the field.

A case file may hold any finite number: 1e-320 (subnormal, fewer digits), 5e-324 (the least),
1e300 and 1.7e308 (near the largest), −0.0. Each is valid JSON and many pass the declared
bounds ("greater than zero"), yet a formula of them may overflow, underflow to zero or divide by
zero. The contract (issue #11): exit 0 or 1 with finite results, or exit 2 with one line of at
most 200 characters naming the field; no traceback, no numpy warning on stderr.

The limits of IEEE 754 binary64 the tests lean on: the largest finite number is about
1.7977e308, the least normal one 2.2251e-308 and the least subnormal one 4.9407e-324
(IEEE Std 754-2019, §3.4 and Table 3.5; ``numpy.finfo(float)`` gives the same).

``WORKBENCH_EXTREMES_EXAMPLES`` sets how many examples the property test runs (150 by
default; a longer run, e.g. 5000, is documented in DEVELOPERS.md).
"""

from __future__ import annotations

import contextlib
import copy
import io
import json
import math
import os
import re
import tempfile
import warnings
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from workbench.case import declaration
from workbench.case.errors import InputError
from workbench.cli import main
from workbench.solver.io import parse_case

ROOT = Path(__file__).resolve().parents[1]
LINE_SHAFT = ROOT / "tests" / "fixtures" / "solve" / "line_shaft.json"


def _press_drive_with_every_other_key(base: dict[str, Any]) -> dict[str, Any]:
    """The demo with the numeric keys the three files leave out: a stated allowable stress,
    the modal mesh's two keys, a tested endurance limit and a temperature, a stated notch
    sensitivity, a torque given as power and speed, and stated bending stresses."""
    case = copy.deepcopy(base)
    case["design"].update(
        shear_criterion="allowable",
        allowable_shear_stress=120,
        modal_elements_per_segment=6,
        modal_max_element_length=100,
    )
    case["design"]["fatigue"].update(endurance_limit=230, temperature=300)
    stated = {"shaft": "feeder", "segment": 0, "normal_stress": 40, "shear_stress": 5}
    case["design"]["coexisting_stresses"] = [stated]
    case["shafts"][0]["segments"][0]["notch"] = {"kts": 1.6, "notch_sensitivity": 0.8}
    load = {"shaft": "feeder", "x": 400, "power": -2000, "speed": 300}
    case["load_cases"][1]["torques"][1] = load
    return case


#: The base cases: the demo (mm, design, fatigue, discs, densities, running speeds), the same
#: with every other numeric key, every section shape (inches, layers, notch, internal gear mesh),
#: the line shaft and a polygon section. Between them they hold every numeric key the case file declares
#: (test_the_bases_hold_every_numeric_key_of_the_declaration).
BASES: dict[str, dict[str, Any]] = {
    "press_drive": json.loads((ROOT / "workbench" / "cases" / "press_drive.json").read_text()),
    "every_shape": json.loads((ROOT / "tests/fixtures/solve/every_shape.json").read_text()),
    "open_shapes": json.loads((ROOT / "tests/fixtures/open_shapes.json").read_text()),
    "line_shaft": json.loads(LINE_SHAFT.read_text()),
}
BASES["press_drive_more"] = _press_drive_with_every_other_key(BASES["press_drive"])
#: A section by finite elements: a 40 × 20 mm plate with a 10 mm square hole.
BASES["polygon"] = {
    "units": {"length": "mm", "stress": "MPa"},
    "materials": {"steel": {"shear_modulus": 79300, "elastic_modulus": 200000}},
    "shafts": [{"id": "s", "segments": [{"length": 500, "material": "steel", "section": {
        "shape": "polygon",
        "outer": [{"x": 0, "y": 0}, {"x": 40, "y": 0}, {"x": 40, "y": 20}, {"x": 0, "y": 20}],
        "holes": [[{"x": 15, "y": 5}, {"x": 25, "y": 5}, {"x": 25, "y": 15}, {"x": 15, "y": 15}]],
    }}]}],
    "supports": [{"shaft": "s", "x": 0}],
    "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 500, "torque": 100}]}],
}  # fmt: skip

#: Floats at the edges: IEEE 754 binary64 (see the module's docstring).
LARGEST = 1.7976931348623157e308
SUBNORMAL_LEAST = 5e-324
EXTREMES = (1e-320, SUBNORMAL_LEAST, 1e-300, 1e300, 1.7e308, -0.0, -1.7e308, -1e300, LARGEST)

#: The keys a case file's top level holds: a message must start with a path under one of them.
TOP_LEVEL = {
    "title",
    "units",
    "materials",
    "shafts",
    "supports",
    "gears",
    "load_cases",
    "combinations",
    "design",
    "discs",
    "operating_speeds",
}

COMMANDS = (
    ("solve",),
    ("solve", "--json"),
    ("check",),
    ("check", "--json"),
    ("modes",),
    ("modes", "--json"),
)


class Outcome:
    """What one in-process run of the command line did."""

    def __init__(self, status: int, out: str, err: str, caught: list[Any]) -> None:
        self.status, self.out, self.err, self.caught = status, out, err, caught

    @property
    def lines(self) -> list[str]:
        return self.err.splitlines()

    def __repr__(self) -> str:
        shown = [
            f"{w.category.__name__}: {w.message} ({w.filename}:{w.lineno})" for w in self.caught
        ]
        return f"Outcome(status={self.status}, err={self.err!r}, warnings={shown})"


def run(argv: list[str]) -> Outcome:
    """``workbench ARGV`` in this process, every warning recorded rather than raised."""
    out, err = io.StringIO(), io.StringIO()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            status = main(argv)
    return Outcome(status, out.getvalue(), err.getvalue(), list(caught))


@contextlib.contextmanager
def case_file(case: dict[str, Any]) -> Iterator[str]:
    """The case written to a temporary file (hypothesis runs many examples in one test)."""
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "case.json"
        path.write_text(json.dumps(case), encoding="utf-8")
        yield str(path)


def field_of(line: str) -> str:
    """The field path a message starts with (up to the first ": ")."""
    return line.split(": ", 1)[0]


def assert_contract(outcome: Outcome, command: tuple[str, ...]) -> None:
    """Exit 0/1 with finite results, or exit 2 with one line naming a field; no warnings."""
    assert not outcome.caught, outcome
    assert outcome.status in (0, 1, 2), outcome
    assert "Traceback" not in outcome.err, outcome
    if outcome.status == 2:
        assert len(outcome.lines) == 1, outcome
        line = outcome.lines[0]
        assert len(line) <= 200, outcome
        field = field_of(line)
        assert re.split(r"[.\[]", field, maxsplit=1)[0] in TOP_LEVEL, outcome
        assert outcome.out == "", outcome
        return
    assert all(len(line) <= 200 for line in outcome.lines), outcome
    if "--json" in command:
        # Every number finite: JSON has no inf or NaN, and Python's reader would take them.
        def refuse(constant: str) -> None:
            raise AssertionError(f"{constant} in the JSON document: {outcome}")

        json.loads(outcome.out, parse_constant=refuse)
    elif command[0] == "solve":
        assert not re.search(r"\b(inf|nan)\b", outcome.out, re.IGNORECASE), outcome


def numeric_leaves(node: Any, path: tuple[Any, ...] = ()) -> Iterator[tuple[Any, ...]]:
    """Paths of every number in a case document (booleans are not numbers here)."""
    if isinstance(node, dict):
        for key, value in node.items():
            yield from numeric_leaves(value, (*path, key))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield from numeric_leaves(value, (*path, index))
    elif isinstance(node, int | float) and not isinstance(node, bool):
        yield path


def with_value(base: dict[str, Any], path: tuple[Any, ...], value: float) -> dict[str, Any]:
    case = copy.deepcopy(base)
    target: Any = case
    for step in path[:-1]:
        target = target[step]
    target[path[-1]] = value
    return case


LEAVES = {name: list(numeric_leaves(base)) for name, base in BASES.items()}

#: Extreme floats: the list above, and any of magnitude above 1e250 or below 1e-250.
extreme_floats = st.one_of(
    st.sampled_from(EXTREMES),
    st.floats(min_value=1e250, max_value=LARGEST),
    st.floats(min_value=-LARGEST, max_value=-1e250),
    st.floats(min_value=SUBNORMAL_LEAST, max_value=1e-250),
    st.floats(min_value=-1e-250, max_value=-SUBNORMAL_LEAST),
)


@settings(
    max_examples=int(os.environ.get("WORKBENCH_EXTREMES_EXAMPLES", "150")),
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(data=st.data(), value=extreme_floats, command=st.sampled_from(COMMANDS))
def test_one_number_at_an_edge_of_the_floats_is_a_result_or_one_line_naming_a_field(
    data: st.DataObject, value: float, command: tuple[str, ...]
) -> None:
    name = data.draw(st.sampled_from(sorted(BASES)), label="base")
    path = data.draw(st.sampled_from(LEAVES[name]), label="path")
    with case_file(with_value(BASES[name], path, value)) as file:
        outcome = run([*command, file])
    assert_contract(outcome, command)
    event(f"exit {outcome.status}")  # the outcomes by kind: --hypothesis-show-statistics


# --- the defects of issue #11, one test each ----------------------------------------------------


def line_shaft_with(path: tuple[Any, ...], value: float) -> dict[str, Any]:
    return with_value(BASES["line_shaft"], path, value)


@pytest.mark.parametrize(
    "command", [("solve",), ("solve", "--json"), ("check",), ("check", "--json")]
)
def test_a_combination_factor_of_1e308_is_refused_naming_the_factor(command):
    """Before: `check` said SOME CHECKS FAIL with utilisation inf, `solve` printed inf, exit 0."""
    case = line_shaft_with(("combinations", 0, "factors", "service"), 1e308)
    with case_file(case) as file:
        outcome = run([*command, file])
    assert_contract(outcome, command)
    assert outcome.status == 2
    assert outcome.lines[0].startswith("combinations[0].factors.service: 1e+308 times load case ")
    assert "of combination 'factored' overflow" in outcome.lines[0]


@pytest.mark.parametrize("command", [("solve",), ("check",), ("modes",)])
def test_a_segment_of_1e30_mm_is_refused_naming_its_length(command):
    """Before: the shorter segments merged into its end (their loads with them): `solve` gave
    zero torque everywhere and `check` failed on an array of the wrong shape."""
    case = line_shaft_with(("shafts", 0, "segments", 0, "length"), 1e30)
    with case_file(case) as file:
        outcome = run([*command, file])
    assert_contract(outcome, command)
    assert outcome.status == 2
    assert outcome.lines[0].startswith("shafts[0].segments[0].length: 1e+30 mm dwarfs segment 3")


def test_a_segment_too_short_beside_its_shaft_is_refused_naming_it():
    case = line_shaft_with(("shafts", 0, "segments", 1, "length"), 1e-7)
    with case_file(case) as file:
        outcome = run(["check", file])
    assert outcome.status == 2, outcome
    assert outcome.lines[0].startswith("shafts[0].segments[1].length: 1e-07 mm is too short")


@pytest.mark.parametrize("unit", ["m", "mm"])
def test_segments_adding_up_beyond_the_largest_number_are_refused_naming_the_one_that_overflows(
    unit,
):
    """In metres the sum overflows in SI; in millimetres it is finite in SI (3.4e305 m) but not
    in the file's unit, where positions are reported."""
    case = line_shaft_with(("units", "length"), unit)
    for number in (0, 1):
        case["shafts"][0]["segments"][number]["length"] = 1.7e308
    for command in (("solve",), ("modes", "--json")):
        with case_file(case) as file:
            outcome = run([*command, file])
        assert outcome.status == 2, outcome
        assert outcome.lines[0].startswith(
            "shafts[0].segments[1].length: the segments up to this one add up to more than"
        )


def test_a_chain_of_points_closer_than_the_tolerance_cannot_swallow_a_segment():
    """Three torques 0.9e-9 m apart across a segment of 3e-9 m on a 1 m shaft: each point is
    within the position tolerance (1e-9 of the length) of the next, so they merge into the
    first and the segment between them would have no element."""
    case = {
        "materials": {"s": {"shear_modulus": 80e9, "yield_strength": 350e6}},
        "shafts": [
            {
                "id": "a",
                "segments": [
                    {
                        "length": length,
                        "material": "s",
                        "section": {"shape": "solid", "diameter": 0.05},
                    }
                    for length in (0.5, 3e-9, 0.5 - 3e-9)
                ],
            }
        ],
        "supports": [{"shaft": "a", "x": 0.0}],
        "load_cases": [
            {
                "name": "c",
                "torques": [
                    {"shaft": "a", "x": 0.5 + k * 0.9e-9, "torque": 100.0} for k in (1, 2, 3)
                ],
            }
        ],
    }
    with case_file(case) as file:
        outcome = run(["check", file])
    assert outcome.status == 2, outcome
    assert outcome.lines[0].startswith("shafts[0].segments[1].length: is too short for the points")


@pytest.mark.parametrize("command", [("solve",), ("solve", "--json"), ("check",), ("modes",)])
def test_a_subnormal_diameter_is_refused_naming_it_without_numpy_warnings(command):
    """Before: numpy's divide-by-zero warnings, then a message blaming the supports."""
    case = line_shaft_with(("shafts", 0, "segments", 0, "section", "diameter"), 1e-320)
    with case_file(case) as file:
        outcome = run([*command, file])
    assert_contract(outcome, command)
    assert outcome.status == 2
    assert outcome.lines[0].startswith(
        "shafts[0].segments[0].section.diameter: is too close to zero to compute with"
    )


# --- section formulas: every shape, out of range at both ends, named on both paths -----------

#: (section in SI, the key a message must name).
SECTIONS_OUT_OF_RANGE = [
    ({"shape": "solid", "diameter": 1e-80}, "diameter"),
    ({"shape": "solid", "diameter": 1e100}, "diameter"),
    ({"shape": "tube", "outer_diameter": 1e100, "inner_diameter": 0.02}, "outer_diameter"),
    ({"shape": "tube", "outer_diameter": 2e-80, "inner_diameter": 1e-80}, "outer_diameter"),
    ({"shape": "tapered", "diameter_start": 1e-80, "diameter_end": 0.05}, "diameter_start"),
    ({"shape": "tapered", "diameter_start": 0.05, "diameter_end": 1e100}, "diameter_end"),
    ({"shape": "rectangle", "width": 1e-300, "height": 0.05}, "width"),
    ({"shape": "rectangle", "width": 0.05, "height": 1e200}, "height"),
    ({"shape": "box", "width": 1e200, "height": 1e200, "thickness": 1.0}, "width"),
    ({"shape": "box", "width": 1e-120, "height": 1e-120, "thickness": 1e-122}, "thickness"),
    ({"shape": "elliptical_tube", "width": 1e200, "height": 1e200, "thickness": 1.0}, "width"),
    (
        {
            "shape": "thin_closed",
            "enclosed_area": 1e-250,
            "walls": [{"length": 1e-125, "thickness": 1e-127}] * 4,
        },
        "walls[0].thickness",
    ),
    ({"shape": "thin_open", "walls": [{"length": 1.0, "thickness": 1e-120}]}, "walls[0].thickness"),
    ({"shape": "thin_open", "walls": [{"length": 1e200, "thickness": 1e150}]}, "walls[0].length"),
]


def one_segment_case(section: dict[str, Any]) -> dict[str, Any]:
    return {
        "materials": {"s": {"shear_modulus": 80e9}},
        "shafts": [{"id": "a", "segments": [{"length": 1.0, "material": "s", "section": section}]}],
        "supports": [{"shaft": "a", "x": 0.0}],
        "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1.0, "torque": 100.0}]}],
    }


@pytest.mark.parametrize(("section", "key"), SECTIONS_OUT_OF_RANGE)
def test_a_section_whose_constants_leave_the_range_of_numbers_is_refused_naming_its_dimension(
    section, key
):
    """J (or K), τ/T and the polar moment must be positive finite normal numbers: the model
    (the panel's and `check`'s path) and the columns (`solve`'s path) say the same."""
    case = one_segment_case(section)
    field = f"shafts[0].segments[0].section.{key}"
    with pytest.raises(InputError) as caught:
        parse_case(copy.deepcopy(case))
    assert caught.value.field == field
    assert "for the " in caught.value.message and "formulas" in caught.value.message
    for command in (("solve",), ("check",)):
        with case_file(case) as file:
            outcome = run([*command, file])
        assert_contract(outcome, command)
        assert outcome.status == 2
        assert outcome.lines[0] == str(caught.value)


@pytest.mark.parametrize("diameter", [1e-76, 1e70])
def test_sections_just_inside_the_range_of_numbers_still_solve(diameter):
    """A diameter of 1e-76 m gives J ≈ 1e-305 m⁴, 1e70 m gives J ≈ 1e279 m⁴ (and G·J ≈ 8e289
    N·m²): normal numbers all, so the case solves (absurd as a shaft, and a check says so)."""
    case = one_segment_case({"shape": "solid", "diameter": diameter})
    with case_file(case) as file:
        outcome = run(["solve", "--json", file])
    assert_contract(outcome, ("solve", "--json"))
    assert outcome.status == 0


def test_a_rigidity_beyond_the_largest_number_is_refused_naming_the_section():
    """J ≈ 1e303 m⁴ is a normal number, but G·J with G = 80 GPa is not."""
    case = one_segment_case({"shape": "solid", "diameter": 1e76})
    with case_file(case) as file:
        outcome = run(["solve", file])
    assert_contract(outcome, ("solve",))
    assert outcome.status == 2
    assert outcome.lines[0].startswith(
        "shafts[0].segments[0].section: its torsional rigidity G·K comes to inf N·m²"
    )


def test_a_layer_of_a_bonded_segment_out_of_range_is_named_by_its_layer():
    case = copy.deepcopy(BASES["press_drive"])
    case["shafts"][0]["segments"][3]["layers"][1]["section"]["diameter"] = 1e-300
    with case_file(case) as file:
        outcome = run(["check", file])
    assert outcome.status == 2, outcome
    assert outcome.lines[0].startswith("shafts[0].segments[3].layers[1].section.diameter: ")


# --- results beyond the range of numbers -----------------------------------------------------


@pytest.mark.parametrize("torque", [1.7e308, -1.7e308])
def test_a_load_whose_results_overflow_is_refused_naming_it(torque):
    case = line_shaft_with(("load_cases", 1, "torques", 0, "torque"), torque)
    with case_file(case) as file:
        outcome = run(["solve", file])
    assert_contract(outcome, ("solve",))
    assert outcome.status == 2
    assert outcome.lines[0].startswith("load_cases[1].torques[0]: the ")
    assert "of load case 'peak' goes beyond ±1.8e+308" in outcome.lines[0]


def test_a_prescribed_rotation_whose_torques_overflow_is_refused_naming_it():
    case = line_shaft_with(("supports", 1, "rotation"), 1.7e308)
    with case_file(case) as file:
        outcome = run(["solve", file])
    assert_contract(outcome, ("solve",))
    assert outcome.status == 2
    assert outcome.lines[0].startswith("supports[1].rotation: the ")


# --- check rows beyond the range of numbers --------------------------------------------------

MORE = "press_drive_more"


@pytest.mark.parametrize(
    ("base", "path", "value", "field"),
    [
        # A stated notch factor of 1.7e308 times a stress of some MPa.
        (
            MORE,
            ("shafts", 0, "segments", 0, "notch", "kts"),
            1.7e308,
            "shafts[0].segments[0].notch.kts",
        ),
        # A yield strength of 2.2e-307 Pa: normal, but a stress over its allowable overflows.
        (
            "line_shaft",
            ("materials", "steel", "yield_strength"),
            2.2250738585e-313,
            "materials.steel.yield_strength",
        ),
        (MORE, ("design", "allowable_shear_stress"), 1e-310, "design.allowable_shear_stress"),
        # A tested endurance limit of 2.2e-307 Pa: the Marin factors take it below any stress
        # ratio a float holds, and the fatigue factor of safety comes out 0.
        (
            MORE,
            ("design", "fatigue", "endurance_limit"),
            2.2250738585e-313,
            "design.fatigue.endurance_limit",
        ),
    ],
)
def test_a_check_whose_value_or_utilisation_overflows_is_refused_naming_its_cause(
    base, path, value, field
):
    """Before: "utilisation inf" in the text, an internal error from `check --json` (JSON
    holds no inf) or a division by zero (n = 0)."""
    case = with_value(BASES[base], path, value)
    for command in (("check",), ("check", "--json")):
        with case_file(case) as file:
            outcome = run([*command, file])
        assert_contract(outcome, command)
        assert outcome.status == 2
        assert outcome.lines[0].startswith(f"{field}: ")
        assert "beyond the range of numbers" in outcome.lines[0]


# --- vibration -------------------------------------------------------------------------------


def press_drive_with(path: tuple[Any, ...], value: float) -> dict[str, Any]:
    return with_value(BASES["press_drive"], path, value)


@pytest.mark.parametrize("command", [("modes",), ("modes", "--json"), ("check",)])
def test_a_density_whose_rotary_inertia_underflows_is_refused_naming_it(command):
    """Before: the eigensolver returned no modes at all and `modes` ended in an IndexError."""
    case = press_drive_with(("materials", "auger-steel", "density"), 1e-300)
    with case_file(case) as file:
        outcome = run([*command, file])
    assert_contract(outcome, command)
    assert outcome.status == 2
    assert outcome.lines[0].startswith("materials.auger-steel.density: the rotary inertia ")


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        (("supports", 1, "stiffness"), 1e300, "supports[1].stiffness"),
        (("materials", "b", "shear_modulus"), 1e300, "shafts[0].segments[4].material"),
    ],
)
def test_a_stiffness_out_of_scale_for_the_eigenproblem_is_refused_naming_it(path, value, field):
    """Before: scipy's warning that the matrix is ill-conditioned, and frequencies anyway."""
    case = with_value(BASES["every_shape"], path, value)
    with case_file(case) as file:
        outcome = run(["modes", file])
    assert_contract(outcome, ("modes",))
    assert outcome.status == 2
    assert outcome.lines[0].startswith(f"{field}: ")
    assert "out of scale" in outcome.lines[0]


@pytest.mark.parametrize("inertia", [1e300, 1e-300])
def test_a_disc_at_an_edge_of_the_floats_gives_finite_frequencies_or_a_named_refusal(inertia):
    case = press_drive_with(("discs", 0, "inertia"), inertia)
    with case_file(case) as file:
        outcome = run(["modes", "--json", file])
    assert_contract(outcome, ("modes", "--json"))
    if outcome.status == 0:
        frequencies = [mode["frequency"] for mode in json.loads(outcome.out)["modes"]]
        assert all(math.isfinite(f) and f >= 0.0 for f in frequencies)


def test_running_speeds_near_the_largest_number_do_not_overflow_their_square():
    """Before: ``up_to**2`` raised OverflowError (exit 3)."""
    case = press_drive_with(("operating_speeds", 0, "max"), 1e300)
    for command in (("check",), ("modes",)):
        with case_file(case) as file:
            outcome = run([*command, file])
        assert_contract(outcome, command)


def test_the_bases_hold_every_numeric_key_of_the_declaration():
    declared_keys: set[str] = set()
    seen: set[type] = set()

    def walk(cls: type) -> None:
        if cls in seen:
            return
        seen.add(cls)
        for name in cls.__struct_fields__:  # type: ignore[attr-defined]
            annotation = declaration.field_type(cls, name)
            if {int, float} & set(declaration.Unwrapped(annotation).bases):
                declared_keys.add(name)
            for inner in declaration.structs_in(annotation):
                walk(inner)

    walk(declaration.CaseFile)
    held = {path[-1] for name in BASES for path in LEAVES[name]}
    assert declared_keys - held == set()


def test_a_modal_element_length_that_would_cut_too_many_elements_is_refused():
    """Before: 1e-300 mm asked numpy for about 1e302 elements (an internal error); 1e-3 mm ran
    a quarter of a million elements a segment."""
    for length in (1e-300, 1e-3):
        case = with_value(BASES["press_drive_more"], ("design", "modal_max_element_length"), length)
        with case_file(case) as file:
            outcome = run(["modes", file])
        assert_contract(outcome, ("modes",))
        assert outcome.status == 2
        assert outcome.lines[0].startswith("design.modal_max_element_length: ")
        assert "into more than 1,000 elements" in outcome.lines[0]


@pytest.mark.parametrize(
    ("option", "value"),
    [("--max-element-length", "1e-300"), ("--elements-per-segment", "10000000")],
)
def test_modal_mesh_options_are_bounded_like_the_case_file(option, value):
    with case_file(BASES["press_drive"]) as file:
        outcome = run(["modes", file, option, value])
    assert outcome.status == 2, outcome
    assert outcome.lines[0].startswith(f"{option}: ")


def test_the_limits_the_checks_use_are_those_of_ieee_754_binary64():
    """The tests' constants against numpy's own account of the floats (IEEE 754-2019)."""
    info = np.finfo(float)
    assert info.max == LARGEST
    assert info.tiny == 2.2250738585072014e-308
    assert info.smallest_subnormal == SUBNORMAL_LEAST
