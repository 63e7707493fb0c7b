"""What ``modes`` accepts and refuses, against ``solve``, ``check`` and ``size``.

One case file means one thing to every command: two fixed supports at one point are refused by
``modes`` with the message ``solve`` gives; a case without load cases is a vibration case, which
``modes`` analyses and the static commands refuse with the message they always gave. A rotation
limit is a stretch of one shaft, refused the same way from a file and from Python.

Outside check: the one frequency of a disc on a massless shaft held at its other end,
ωₙ = √(k/J) with k = G·(πd⁴/32)/L (S. S. Rao, *Mechanical Vibrations*, torsional vibration of a
single rotor; chapter from memory), with J = πd⁴/32 (Gere & Goodno, *Mechanics of Materials*,
8th ed., §3.3).
"""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

import pytest

from workbench.case.design import RotationLimit
from workbench.case.errors import InputError
from workbench.cli import main
from workbench.solver.io import load_case, parse_case, save_case
from workbench.solver.modes import natural_modes

ROOT = Path(__file__).resolve().parents[1]

SHEAR_MODULUS = 80e9  # Pa
DIAMETER = 0.05  # m
LENGTH = 1.0  # m
DISC = 0.5  # kg·m²

ROTOR: dict[str, Any] = {
    "title": "one disc on a massless shaft (vibration only)",
    "materials": {"steel": {"shear_modulus": SHEAR_MODULUS, "yield_strength": 350e6}},
    "shafts": [
        {
            "id": "rotor",
            "segments": [
                {
                    "length": LENGTH,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": DIAMETER},
                }
            ],
        }
    ],
    "supports": [{"shaft": "rotor", "x": 0.0, "kind": "fixed"}],
    "discs": [{"shaft": "rotor", "x": LENGTH, "inertia": DISC}],
}

LOADED: dict[str, Any] = {
    **ROTOR,
    "load_cases": [{"name": "drive", "torques": [{"shaft": "rotor", "x": LENGTH, "torque": 100}]}],
}


def _one_rotor_frequency() -> float:
    """f = √(k/J)/(2π) (Hz): Rao, *Mechanical Vibrations*, single rotor (from memory)."""
    stiffness = SHEAR_MODULUS * math.pi * DIAMETER**4 / 32.0 / LENGTH
    return math.sqrt(stiffness / DISC) / (2.0 * math.pi)


def _write(tmp_path: Path, document: dict[str, Any]) -> Path:
    path = tmp_path / "case.json"
    path.write_text(json.dumps(document), encoding="utf-8")
    return path


def _run(capsys: pytest.CaptureFixture[str], *arguments: str) -> tuple[int, str, str]:
    status = main(list(arguments))
    captured = capsys.readouterr()
    return status, captured.out, captured.err


# --- a case without load cases -----------------------------------------------------------------


def test_modes_needs_no_load_case(tmp_path, capsys):
    path = _write(tmp_path, ROTOR)
    status, out, err = _run(capsys, "modes", "--json", str(path))
    assert (status, err) == (0, "")
    frequency = json.loads(out)["modes"][0]["frequency"]
    assert frequency == pytest.approx(_one_rotor_frequency(), rel=1e-12)


def test_load_cases_do_not_change_the_frequencies():
    bare = natural_modes(parse_case(copy.deepcopy(ROTOR)))
    loaded = natural_modes(parse_case(copy.deepcopy(LOADED)))
    assert bare.angular_frequency.tolist() == loaded.angular_frequency.tolist()


@pytest.mark.parametrize("command", ["solve", "check", "size"])
def test_static_commands_still_need_a_load_case(tmp_path, capsys, command):
    path = _write(tmp_path, ROTOR)
    status, out, err = _run(capsys, command, str(path))
    assert (status, out, err) == (2, "", "load_cases: is required\n")


def test_solve_json_still_needs_a_load_case(tmp_path, capsys):
    status, out, err = _run(capsys, "solve", "--json", str(_write(tmp_path, ROTOR)))
    assert (status, out, err) == (2, "", "load_cases: is required\n")


@pytest.mark.parametrize("command", ["modes", "solve"])
def test_an_empty_list_of_load_cases_is_refused_by_every_command(tmp_path, capsys, command):
    path = _write(tmp_path, {**ROTOR, "load_cases": []})
    status, out, err = _run(capsys, command, str(path))
    assert status == 2 and out == ""
    assert err == "load_cases: must hold at least 1 entry, not 0\n"


def test_a_case_without_load_cases_saves_and_reads_back(tmp_path):
    path = tmp_path / "saved.json"
    save_case(parse_case(copy.deepcopy(ROTOR)), path)
    assert "load_cases" not in json.loads(path.read_text("utf-8"))
    again = natural_modes(load_case(path))
    assert again.frequency[0] == pytest.approx(_one_rotor_frequency(), rel=1e-12)


# --- two fixed supports at one point ----------------------------------------------------------


SECOND_FIXED = "supports[1]: a second fixed support at the same point of the shaft: the split is undefined\n"  # fmt: skip


@pytest.mark.parametrize(
    ("document", "command"),
    [
        (ROTOR, ["modes"]),
        (ROTOR, ["modes", "--json"]),
        (LOADED, ["modes"]),
        (LOADED, ["solve"]),
        (LOADED, ["solve", "--json"]),
        (LOADED, ["check"]),
    ],
    ids=["modes", "modes --json", "modes, loaded", "solve", "solve --json", "check"],
)
def test_two_fixed_supports_at_one_point_are_refused_alike(tmp_path, capsys, document, command):
    case = copy.deepcopy(document)
    case["supports"].append({"shaft": "rotor", "x": 0.0, "kind": "fixed"})
    status, out, err = _run(capsys, *command, str(_write(tmp_path, case)))
    assert (status, out, err) == (2, "", SECOND_FIXED)


def test_modes_in_python_refuses_two_fixed_supports_at_one_point():
    case = copy.deepcopy(ROTOR)
    case["supports"].append({"shaft": "rotor", "x": 0.0, "kind": "fixed"})
    with pytest.raises(InputError) as raised:
        natural_modes(parse_case(case))
    assert str(raised.value) == SECOND_FIXED.strip()


def test_a_fixed_and_a_spring_support_at_one_point_are_still_accepted():
    case = copy.deepcopy(ROTOR)
    case["supports"].append({"shaft": "rotor", "x": 0.0, "kind": "spring", "stiffness": 1e3})
    assert natural_modes(parse_case(case)).frequency[0] == pytest.approx(
        _one_rotor_frequency(), rel=1e-12
    )


# --- a rotation limit built in Python ---------------------------------------------------------


@pytest.mark.parametrize(("start", "end"), [(0.5, 0.2), (0.3, 0.3)])
def test_a_rotation_limit_built_in_python_needs_end_beyond_start(start, end):
    with pytest.raises(InputError) as raised:
        RotationLimit("rotor", start, end, 0.01)
    assert raised.value.field == "end"
    assert raised.value.message.startswith("must be greater than start (")


@pytest.mark.parametrize("command", ["modes", "check"])
def test_a_density_whose_frequencies_overflow_is_named(tmp_path, capsys, command):
    # 1e-297 kg/m³ gives masses of 1e-305 kg·m² (normal numbers) but ω² = k/m beyond the
    # floats: LAPACK's eigensolver then returns no eigenvalue and no error (found by the fuzzer).
    document = json.loads((ROOT / "workbench" / "cases" / "press_drive.json").read_text())
    for material in document["materials"].values():
        if "density" in material:
            material["density"] *= 1e-300
    path = tmp_path / "case.json"
    path.write_text(json.dumps(document))
    assert main([command, str(path)]) == 2
    line = capsys.readouterr().err.strip()
    assert line.startswith("materials.") and ".density: " in line, line
    assert "ω² = k/m leaves the range of numbers" in line
