"""Every input is bounded, and a key given twice is an error: one line naming the field, exit 2.

References: RFC 8259 §4 (the names within a JSON object SHOULD be unique; parsers that keep the
last one lose data silently), IEEE 754 binary64 (the largest finite double is about 1.8e308, so
1e400 has no finite value), and the limits of the case-file declaration (file size, nesting,
string length, digits, counts), each tested at its edge.
"""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from tests.test_bad_input import VALID
from workbench.case import declaration as declared
from workbench.case import load as case_load
from workbench.case.errors import InputError
from workbench.cli import main
from workbench.solver.io import decode_case_text, load_case, parse_case

BASE = json.dumps(VALID)


def _with(text: str, old: str, new: str) -> str:
    assert old in text
    return text.replace(old, new, 1)


def _solve_line(tmp_path: Path, capsys: pytest.CaptureFixture[str], text: str) -> str:
    """Run ``workbench solve`` on ``text``: it must exit 2 with one short line; return the line."""
    path = tmp_path / "case.json"
    path.write_text(text, encoding="utf-8")
    status = main(["solve", str(path)])
    captured = capsys.readouterr()
    assert status == 2, captured.err
    assert captured.out == ""
    assert captured.err.count("\n") == 1 and captured.err.endswith("\n"), captured.err[:400]
    assert len(captured.err) <= 201, captured.err  # one line of at most 200 characters
    assert "Traceback" not in captured.err
    return captured.err.rstrip("\n")


# --- keys given twice ---------------------------------------------------------------------------

REPEATED = [
    ("top level", _with(BASE, '"title":', '"title": "first", "title":'), "title"),
    (
        "in a section",
        _with(BASE, '"diameter": 50', '"diameter": 50, "diameter": 51'),
        "shafts[0].segments[0].section.diameter",
    ),
    (
        "a material defined twice",
        _with(BASE, '"materials": {', '"materials": {"steel": {"shear_modulus": 1}, '),
        "materials.steel",
    ),
    (
        "written with an escape",
        _with(BASE, '"title":', '"t\\u0069tle": "first", "title":'),
        "title",
    ),
    (
        "hidden by a colon written as an escape",
        _with(BASE, '"title": "bad-input base case"', '"title": "first", "title": "b\\u003a"'),
        "title",
    ),
    (
        "in a list of loads",
        _with(BASE, '"torque": 400', '"torque": 400, "x": 301'),
        "load_cases[0].torques[0].x",
    ),
]


@pytest.mark.parametrize(("text", "field"), [r[1:] for r in REPEATED], ids=[r[0] for r in REPEATED])
def test_a_key_given_twice_is_named(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], text: str, field: str
) -> None:
    line = _solve_line(tmp_path, capsys, text)
    assert line.startswith(f"{field}: given twice"), line
    with pytest.raises(InputError) as raised:
        decode_case_text(text)  # the panel's and the record's reader refuse it too
    assert raised.value.field == field


def test_the_same_key_in_different_objects_is_fine() -> None:
    parse_case(decode_case_text(BASE))  # "material", "length", "shaft" recur across objects


# --- limits -------------------------------------------------------------------------------------


def test_a_file_over_the_size_limit_is_refused_before_it_is_read(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    path = tmp_path / "huge.json"
    with path.open("wb") as stream:  # sparse: no disk space is used
        stream.truncate(declared.MAX_FILE_BYTES + 1)
    status = main(["solve", str(path)])
    err = capsys.readouterr().err
    assert status == 2
    assert err.startswith(f"{path}: the case file holds 256 MB; case files may be at most 256 MB")


def test_nesting_beyond_the_limit_names_where(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    deep = "[" * (declared.MAX_DEPTH + 5) + "]" * (declared.MAX_DEPTH + 5)
    line = _solve_line(tmp_path, capsys, _with(BASE, '"bad-input base case"', deep))
    assert line.startswith("title[0][0]")
    assert line.endswith(f"nested deeper than {declared.MAX_DEPTH} levels of lists and objects")


def test_very_deep_nesting_is_one_line_not_a_recursion_error(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    deep = "[" * 100_000 + "]" * 100_000
    line = _solve_line(tmp_path, capsys, _with(BASE, '"bad-input base case"', deep))
    assert "nested deeper than" in line


def test_nesting_at_the_limit_decodes() -> None:
    levels = declared.MAX_DEPTH - 1  # inside the top-level object
    decode_case_text('{"a": ' + "[" * levels + "]" * levels + "}")
    with pytest.raises(InputError):
        decode_case_text('{"a": ' + "[" * (levels + 1) + "]" * (levels + 1) + "}")


def test_strings_at_and_over_the_limit(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    at_limit = "x" * declared.MAX_STRING_LENGTH
    parse_case({**copy.deepcopy(VALID), "title": at_limit})
    line = _solve_line(tmp_path, capsys, _with(BASE, '"bad-input base case"', f'"{at_limit}y"'))
    assert line == "title: must be at most 1,000 characters long, not 1,001"


def test_a_megabyte_unit_string_is_refused_at_once(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    line = _solve_line(
        tmp_path, capsys, _with(BASE, '"length": "mm"', f'"length": "{"m" * 10**6}"')
    )
    assert line == "units.length: must be at most 100 characters long, not 1,000,000"


def test_a_long_unknown_key_is_quoted_short(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    line = _solve_line(tmp_path, capsys, _with(BASE, '"title":', f'"{"k" * 5000}": 1, "title":'))
    assert line.startswith("k" * 59 + "…: unknown key (expected: ")


def test_a_long_material_name_is_refused(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    name = "s" * (declared.MAX_STRING_LENGTH + 1)
    line = _solve_line(
        tmp_path, capsys, _with(BASE, '"materials": {"steel"', f'"materials": {{"{name}"')
    )
    assert line.startswith("materials.sss") and "at most 1,000 characters long, not 1,001" in line


@pytest.mark.parametrize("digits", [41, 5001])
def test_numbers_of_too_many_digits(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], digits: int
) -> None:
    line = _solve_line(tmp_path, capsys, _with(BASE, '"length": 300', f'"length": {"9" * digits}'))
    assert line == (
        f"shafts[0].segments[0].length: a number of {digits:,} digits; numbers may have at most 40"
    )


def test_forty_digits_and_long_digit_strings_are_fine() -> None:
    text = _with(BASE, '"length": 300', '"length": 300.0000000000000000000000000000000000000')
    text = _with(text, '"bad-input base case"', '"serial ' + "1" * 60 + '"')
    assert load_case_text(text).shafts[0].segments[0].length == pytest.approx(0.3)


def load_case_text(text: str) -> Any:
    return parse_case(decode_case_text(text))


@pytest.mark.parametrize(
    ("old", "new", "field"),
    [
        ('"length": 300', '"length": 1e400', "shafts[0].segments[0].length"),
        ('"torque": 400', '"torque": -2.5E+999', "load_cases[0].torques[0].torque"),
    ],
)
def test_a_number_beyond_a_double_is_named(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], old: str, new: str, field: str
) -> None:
    line = _solve_line(tmp_path, capsys, _with(BASE, old, new))
    assert line.startswith(f"{field}: must be a finite number")


def test_1e400_written_for_a_whole_number(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    case = {**copy.deepcopy(VALID), "design": {"modal_elements_per_segment": 1}}
    text = _with(
        json.dumps(case), '"modal_elements_per_segment": 1', '"modal_elements_per_segment": 1e400'
    )
    line = _solve_line(tmp_path, capsys, text)
    assert line.startswith("design.modal_elements_per_segment: must be a finite number")


def test_a_number_that_overflows_in_si_is_named(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    text = _with(
        _with(BASE, '"length": 300', '"length": 1e306'), '"length": "mm"', '"length": "km"'
    )
    line = _solve_line(tmp_path, capsys, text)
    assert line == (
        "shafts[0].segments[0].length: must be a finite number: 1e+306 km is beyond the range "
        "of numbers in SI"
    )


@pytest.mark.parametrize(
    ("elements", "words"), [(1001, "1001"), (10_000_000, "1e+07"), (2.5, "2.5")]
)
def test_modal_elements_per_segment_are_bounded(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], elements: float, words: str
) -> None:
    case = {**copy.deepcopy(VALID), "design": {"modal_elements_per_segment": elements}}
    line = _solve_line(tmp_path, capsys, json.dumps(case))
    assert line == (
        f"design.modal_elements_per_segment: must be a whole number from 1 to 1,000, not {words}"
    )
    case["design"]["modal_elements_per_segment"] = declared.MAX_MODAL_ELEMENTS
    assert parse_case(case).design.modal_elements_per_segment == declared.MAX_MODAL_ELEMENTS


def test_design_settings_made_in_code_are_bounded_too() -> None:
    from workbench.case.design import DesignCriteria

    with pytest.raises(InputError, match="whole number from 1 to 1,000, not 10000000"):
        DesignCriteria(modal_elements_per_segment=10_000_000)


def test_load_cases_are_bounded(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    cases = [{"name": f"case {n}"} for n in range(declared.MAX_LOAD_CASES + 1)]
    line = _solve_line(
        tmp_path, capsys, json.dumps({**VALID, "combinations": [], "load_cases": cases})
    )
    assert line == "load_cases: must hold at most 10,000 entries, not 10,001"


def test_segments_are_counted_over_all_shafts(monkeypatch: pytest.MonkeyPatch) -> None:
    # A file of two million segments is large for a unit test: the per-shaft bound is the
    # declaration's (test_case_declaration), the count over shafts is checked here with the
    # limit lowered to this case's size.
    monkeypatch.setattr(case_load, "MAX_SEGMENTS", 4)
    with pytest.raises(InputError) as raised:
        parse_case(copy.deepcopy(VALID))  # 4 + 1 segments
    assert str(raised.value) == "shafts: the case holds 5 segments; a case may hold at most 4"


# --- shapes and other malformed values ----------------------------------------------------------


@pytest.mark.parametrize(
    ("shape", "words"),
    [
        ("{}", "must be one of solid, tube, tapered, rectangle, thin_closed, box, elliptical_tube, thin_open, i_beam, channel, z_section, angle, tee, open_polyline, polygon, dxf,"),
        ("[]", "must be one of solid, tube"),
        ('"hexagon"', "unknown shape 'hexagon'; choose one of solid, tube"),
        ("null", "is required"),
    ],
)  # fmt: skip
def test_a_shape_that_is_not_a_name(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], shape: str, words: str
) -> None:
    line = _solve_line(tmp_path, capsys, _with(BASE, '"shape": "solid"', f'"shape": {shape}'))
    assert line.startswith(f"shafts[0].segments[0].section.shape: {words}"), line


@pytest.mark.parametrize(
    ("old", "new", "line"),
    [
        (
            '"length": 100, "layers"',
            '"length": 100, "material": "steel", "layers"',
            "shafts[0].segments[3].material: give either material and section, or layers, not both",
        ),
        (
            '"torque": 400',
            '"power": 5',
            "load_cases[0].torques[0].speed: is required with power",
        ),
        (
            '{"length": 300, "material": "steel", "section": {"shape": "solid", "diameter": 50}}',
            '{"length": 300}',
            "shafts[0].segments[0].material: is required (or give layers)",
        ),
    ],
)
def test_alternatives_name_the_key(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], old: str, new: str, line: str
) -> None:
    assert _solve_line(tmp_path, capsys, _with(BASE, old, new)) == line


@pytest.mark.parametrize(
    ("keys", "line"),
    [
        (
            {"layers": True, "section": True},
            "shafts[2].segments[2].section: give either material and section, or layers, not both",
        ),
        ({"material": True}, "shafts[2].segments[2].section: is required with material"),
        ({"section": True}, "shafts[2].segments[2].material: is required with section"),
        ({"layers": True, "material": None}, None),
    ],
)
def test_alternatives_on_whole_shafts(keys: dict[str, bool | None], line: str | None) -> None:
    """A segment's alternatives are checked shaft by shaft after decoding: the first segment
    in error, by the bytes and by a plain document, under its own path (common practice, no
    source: each key once, either group of keys)."""
    layer = {"material": "steel", "section": {"shape": "solid", "diameter": 40}}
    whole = {"length": 100, **layer}
    layered = {"length": 100, "layers": [layer]}
    document = copy.deepcopy(VALID)
    document["shafts"].append({"id": "second", "segments": [whole, layered, dict(layered)]})
    odd = {"length": 100}
    for name, given in keys.items():
        odd[name] = (
            None if given is None else layered["layers"] if name == "layers" else layer[name]
        )
    document["shafts"][2]["segments"][2] = odd
    document["shafts"][2]["segments"].append({"length": 100})  # a later error stays unreported
    if line is None:
        document["shafts"][2]["segments"].pop()
        case_load.case_file_from_document(document)
        case_load.decode_case_file(json.dumps(document).encode())
        return
    for read in (
        lambda: case_load.case_file_from_document(document),
        lambda: case_load.decode_case_file(json.dumps(document).encode()),
    ):
        with pytest.raises(InputError) as caught:
            read()
        assert str(caught.value) == line


def test_nan_and_infinity_literals_are_named_as_not_finite() -> None:
    for literal in ("NaN", "Infinity", "-Infinity"):
        with pytest.raises(InputError) as raised:
            decode_case_text(_with(BASE, '"length": 300', f'"length": {literal}'))
        assert (
            str(raised.value)
            == f"shafts[0].segments[0].length: must be a finite number, not {literal}"
        )


def test_numpy_numbers_in_a_document_are_numbers() -> None:
    case = copy.deepcopy(VALID)
    case["shafts"][0]["segments"][0]["length"] = np.float64(300.0)
    case["supports"][1]["x"] = np.int64(750)
    model = parse_case(case)
    assert model.shafts[0].segments[0].length == 0.3
    assert math.isclose(model.supports[1].x, 0.75)
    case["shafts"][0]["segments"][0]["length"] = np.float64(-1.0)
    with pytest.raises(InputError, match=r"greater than zero \(-1 mm\)"):
        parse_case(case)


def test_a_file_that_breaks_nothing_loads(tmp_path: Path) -> None:
    path = tmp_path / "case.json"
    path.write_text(BASE, encoding="utf-8")
    assert load_case(path).title == "bad-input base case"
