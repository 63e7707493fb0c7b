"""Every message is one line of at most 200 characters and names its field (README, "Commands").

Each test is a defect the fuzzer (tests/fuzz) found: a message that quoted a whole value or
listed a whole library, a key that broke the line or vanished from the path, a message that
named an internal word instead of a field or an option, a damaged package or key file that
ended in a traceback.
"""

from __future__ import annotations

import contextlib
import copy
import io
import json
from pathlib import Path
from typing import Any

import pytest

from tests.test_bad_input import VALID
from workbench.case.errors import LONGEST_LINE, QUOTED, InputError, listing, path_key, quoted
from workbench.cli import main

FIXTURES = Path(__file__).resolve().parent / "fixtures"
LINE_SHAFT = json.loads((FIXTURES / "solve" / "line_shaft.json").read_text(encoding="utf-8"))


def run(argv: list[str]) -> tuple[int, str, str]:
    """``workbench ARGV`` in this process: (exit status, stdout, stderr)."""
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        status = main(argv)
    return status, out.getvalue(), err.getvalue()


def refusal(tmp_path: Path, document: Any, command: str = "solve") -> str:
    """The one line ``workbench COMMAND`` prints refusing ``document`` (exit 2)."""
    case = tmp_path / "case.json"
    case.write_text(json.dumps(document), encoding="utf-8")
    status, _, stderr = run([command, str(case)])
    assert status == 2, stderr
    assert stderr.endswith("\n") and stderr.count("\n") == 1, stderr
    line = stderr[:-1]
    assert len(line) <= LONGEST_LINE, line
    return line


def test_an_unknown_material_of_the_longest_name_is_quoted_in_part(tmp_path: Path) -> None:
    case = copy.deepcopy(VALID)
    name = "x" * 1_000  # the longest name a case file may hold
    case["shafts"][0]["segments"][0]["material"] = name
    line = refusal(tmp_path, case)
    assert line.startswith("shafts[0].segments[0].material: unknown material 'xxx")
    assert "x" * QUOTED not in line and "…" in line


def test_an_unknown_material_names_close_ones_not_the_whole_library(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    case["shafts"][0]["segments"][0]["material"] = "stel"
    line = refusal(tmp_path, case)
    assert line.startswith("shafts[0].segments[0].material: unknown material 'stel'")
    assert "did you mean 'steel'" in line
    case["shafts"][0]["segments"][0]["material"] = "main"  # close to nothing
    line = refusal(tmp_path, case)
    assert "aluminium" not in line and "bronze" not in line  # no list of the library


def test_a_key_that_would_break_the_line_or_vanish_is_quoted(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    case["a\nb"] = 1
    assert refusal(tmp_path, case).startswith('"a\\nb": unknown key (expected: ')
    case = copy.deepcopy(LINE_SHAFT)
    case[""] = 1
    assert refusal(tmp_path, case).startswith('"": unknown key (expected: ')
    case = copy.deepcopy(LINE_SHAFT)
    case["¶\x8f\U0010cb9d"] = 1  # a C1 control and a private-use character: escaped
    assert refusal(tmp_path, case).startswith('"¶\\u008f\\U0010cb9d": unknown key (expected: ')
    case = copy.deepcopy(LINE_SHAFT)
    case["`a`b"] = 1  # msgspec quotes names in backticks
    assert refusal(tmp_path, case).startswith("`a`b: unknown key (expected: ")


def test_a_long_material_name_in_a_path_is_cut(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    name = "m" * 1000
    case["materials"][name] = {"shear_modulus": -1}
    line = refusal(tmp_path, case)
    assert line.startswith("materials.mmm") and line.count("m") < 200
    assert "shear_modulus: must be greater than zero" in line


def test_a_missing_yield_strength_names_the_material_that_lacks_it(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    del case["materials"]["steel"]["yield_strength"]
    for command in ("check", "size"):
        line = refusal(tmp_path, case, command)
        assert line == (
            "materials.steel.yield_strength: material 'steel' has no yield strength; "
            "criterion 'von_mises' needs it"
        )


def test_size_names_its_option_when_no_segment_can_be_sized(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    for segment in case["shafts"][0]["segments"]:
        segment["section"] = {"shape": "rectangle", "width": 40, "height": 30}
    line = refusal(tmp_path, case, "size")
    assert line.startswith("--segment: no segment of the case has a round section to size")


def test_size_names_the_option_of_a_bad_fraction(tmp_path: Path) -> None:
    case = tmp_path / "case.json"
    case.write_text(json.dumps(LINE_SHAFT), encoding="utf-8")
    status, _, stderr = run(["size", str(case), "--min-fraction", "nan"])
    assert (status, stderr) == (2, "--min-fraction: must lie in (0, 1]\n")


def test_size_names_a_segment_beyond_the_preferred_numbers(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    case["shafts"][0]["segments"][0]["section"]["diameter"] = 2.5e307
    line = refusal(tmp_path, case, "size")
    # Refused before sizing starts: its torsion constant is beyond the range of numbers.
    assert line.startswith("shafts[0].segments[0].section.diameter: 2.5e+307 mm is too large")


def test_verify_names_the_option_of_a_key_file_that_is_no_key(tmp_path: Path) -> None:
    key = tmp_path / "key.pem"
    key.write_bytes(b"")
    status, _, stderr = run(
        ["verify", str(FIXTURES / "record-before.html"), "--public-key", str(key)]
    )
    assert status == 2
    assert stderr == f"--public-key: {key} is neither a PEM public key nor a JWK JSON file\n"


def test_verify_reports_a_package_cut_at_its_start_as_not_verified(tmp_path: Path) -> None:
    package = tmp_path / "package.zip"
    package.write_bytes((FIXTURES / "package-before.zip").read_bytes()[1:])  # zipfile: ValueError
    status, stdout, stderr = run(
        ["verify", str(package), "--public-key", str(FIXTURES / "before-public.pem")]
    )
    assert (status, stderr) == (1, "")
    assert "FAILED: notebook.ipynb cannot be read from the zip" in stdout
    assert stdout.endswith("NOT VERIFIED\n")


@pytest.mark.parametrize("breaking", ["\n", "\r", "\x00", "\u2028", "\x85", "\t"])
def test_an_input_error_is_one_line_whatever_it_holds(breaking: str) -> None:
    text = str(InputError(f"materials.a{breaking}b", f"bad{breaking}value " + "y" * 500))
    assert text.splitlines() == [text] and len(text) == LONGEST_LINE and text.endswith("…")
    assert text.isprintable()


def test_quoting_helpers_cut_values_and_lists() -> None:
    assert quoted("z" * 100) == "'" + "z" * (QUOTED - 2) + "…"
    assert listing(["a", "b", "c", "d", "e", "f", "g"]) == "'a', 'b', 'c', 'd', 'e' and 2 more"
    assert path_key("steel 1020") == "steel 1020"
    assert path_key(" x") == '" x"'


def test_an_allowable_stated_for_another_criterion_names_its_key(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT)
    case["design"]["allowable_shear_stress"] = 5
    for command in ("check", "size"):
        line = refusal(tmp_path, case, command)
        assert line == (
            "design.allowable_shear_stress: is used only with criterion 'allowable', "
            "not 'von_mises'"
        )
