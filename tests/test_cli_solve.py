"""``workbench solve``: the JSON document of the contract, readable output, and a light import.

Reference: the case-file contract and the ``solve --json`` document of design §2 (keys, order,
units, doubled stations at jumps); the sign convention T(x) = −Σ external torques on [0, x), so
T(x⁻) − T(x⁺) equals the torque applied at x. Exact unit factors: 1 mm = 10⁻³ m,
1 MPa = 10⁶ Pa, 1° = π/180 rad (SI Brochure, 9th ed., tables 8 and 4).
"""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest

from workbench.cli import main
from workbench.cli.solve import DEMO_CASE
from workbench.design.caution import CAUTION

ROOT = Path(__file__).resolve().parents[1]
RESULT_KEYS = {"name", "reactions", "shafts"}
SHAFT_KEYS = {"x", "torque", "angle", "shear_stress"}


def _environment() -> dict[str, str]:
    return {**os.environ, "PYTHONPATH": str(ROOT)}


def _solve_json_subprocess(path: Path) -> dict[str, Any]:
    completed = subprocess.run(
        [sys.executable, "-m", "workbench.cli", "solve", str(path), "--json"],
        capture_output=True,
        text=True,
        env=_environment(),
        cwd=ROOT,
        timeout=60,
        check=False,
    )
    assert completed.returncode == 0, completed.stderr
    assert completed.stderr == ""
    assert completed.stdout.count("\n") == 1  # one document
    document: dict[str, Any] = json.loads(completed.stdout)
    return document


def _solve_json(capsys: pytest.CaptureFixture[str], path: Path) -> dict[str, Any]:
    assert main(["solve", str(path), "--json"]) == 0
    captured = capsys.readouterr()
    assert captured.err == ""
    document: dict[str, Any] = json.loads(captured.out)
    return document


def _write(tmp_path: Path, case: dict[str, Any], name: str = "case.json") -> Path:
    path = tmp_path / name
    path.write_text(json.dumps(case), encoding="utf-8")
    return path


def test_the_json_document_has_exactly_the_contract_shape():
    case = json.loads(DEMO_CASE.read_text(encoding="utf-8"))
    document = _solve_json_subprocess(DEMO_CASE)
    assert set(document) == {"units", "results"}
    assert document["units"] == {
        key: case["units"][key] for key in ("length", "torque", "stress", "angle")
    }
    expected_names = [c["name"] for c in case["load_cases"]] + [
        c["name"] for c in case.get("combinations", [])
    ]
    assert [result["name"] for result in document["results"]] == expected_names
    shaft_ids = [shaft["id"] for shaft in case["shafts"]]
    for result in document["results"]:
        assert set(result) == RESULT_KEYS
        assert len(result["reactions"]) == len(case["supports"])
        assert list(result["shafts"]) == shaft_ids
        for values in result["shafts"].values():
            assert set(values) == SHAFT_KEYS
            lengths = {len(values[key]) for key in SHAFT_KEYS}
            assert len(lengths) == 1 and lengths.pop() >= 2
            for key in SHAFT_KEYS:
                assert all(isinstance(v, float) and math.isfinite(v) for v in values[key])
            assert values["x"] == sorted(values["x"])
            assert min(values["shear_stress"]) >= 0.0


def _applied_at(case: dict[str, Any], result_name: str, shaft_id: str, x: float) -> float:
    """Torque applied at x in a load case, or in a combination by its factors."""
    cases = {c["name"]: c for c in case["load_cases"]}
    factors = {result_name: 1.0}
    for combination in case.get("combinations", []):
        if combination["name"] == result_name:
            factors = combination["factors"]
    return sum(
        factor * t["torque"]
        for name, factor in factors.items()
        for t in cases[name].get("torques", [])
        if t["shaft"] == shaft_id and t["x"] == x
    )


def _check_jumps(case: dict[str, Any], document: dict[str, Any], shaft_id: str, x: float):
    for result in document["results"]:
        values = result["shafts"][shaft_id]
        where = [i for i, v in enumerate(values["x"]) if v == x]
        assert len(where) == 2 and where[1] == where[0] + 1, (result["name"], x)
        applied = _applied_at(case, result["name"], shaft_id, x)
        jump = values["torque"][where[0]] - values["torque"][where[1]]  # left − right
        assert jump == pytest.approx(applied, rel=1e-9, abs=1e-9 * abs(applied))
        # θ is continuous at a point torque.
        angles = [values["angle"][i] for i in where]
        assert angles[0] == pytest.approx(angles[1], rel=1e-12, abs=1e-15)


def test_a_point_torque_is_listed_twice_left_then_right_in_the_demo_case():
    case = json.loads(DEMO_CASE.read_text(encoding="utf-8"))
    document = _solve_json_subprocess(DEMO_CASE)
    x = case["load_cases"][0]["torques"][0]["x"]
    _check_jumps(case, document, case["load_cases"][0]["torques"][0]["shaft"], x)


MM_CASE: dict[str, Any] = {
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {"steel": {"shear_modulus": 79300}},  # Shigley Table A-5, carbon steel
    "shafts": [
        {
            "id": "s",
            "segments": [
                {
                    "length": 400,
                    "material": "steel",
                    "section": {
                        "shape": "tapered",
                        "diameter_start": 60,
                        "diameter_end": 40,
                        "bore": 12,
                    },
                },
                {
                    "length": 300,
                    "material": "steel",
                    "section": {"shape": "tube", "outer_diameter": 50, "inner_diameter": 30},
                },
            ],
        }
    ],
    "supports": [
        {"shaft": "s", "x": 0, "kind": "fixed"},
        {"shaft": "s", "x": 700, "kind": "spring", "stiffness": 300, "rotation": 0.1},
    ],
    "load_cases": [
        {
            "name": "a",
            "torques": [
                {"shaft": "s", "x": 130, "torque": 750},
                {"shaft": "s", "x": 520, "torque": -410},
            ],
            "distributed": [
                {
                    "shaft": "s",
                    "start": 100,
                    "end": 600,
                    "intensity_start": 0.8,
                    "intensity_end": -0.3,
                }
            ],
        },
        {"name": "b", "torques": [{"shaft": "s", "x": 130, "torque": -200}]},
    ],
    "combinations": [{"name": "a+b", "factors": {"a": 1.25, "b": 1.5}}],
}

#: The same case written in SI by hand (m, N·m, Pa, rad).
SI_CASE: dict[str, Any] = {
    "materials": {"steel": {"shear_modulus": 79.3e9}},
    "shafts": [
        {
            "id": "s",
            "segments": [
                {
                    "length": 0.4,
                    "material": "steel",
                    "section": {
                        "shape": "tapered",
                        "diameter_start": 0.06,
                        "diameter_end": 0.04,
                        "bore": 0.012,
                    },
                },
                {
                    "length": 0.3,
                    "material": "steel",
                    "section": {"shape": "tube", "outer_diameter": 0.05, "inner_diameter": 0.03},
                },
            ],
        }
    ],
    "supports": [
        {"shaft": "s", "x": 0, "kind": "fixed"},
        {
            "shaft": "s",
            "x": 0.7,
            "kind": "spring",
            "stiffness": 300 * 180 / math.pi,
            "rotation": 0.1 * math.pi / 180,
        },
    ],
    "load_cases": [
        {
            "name": "a",
            "torques": [
                {"shaft": "s", "x": 0.13, "torque": 750},
                {"shaft": "s", "x": 0.52, "torque": -410},
            ],
            "distributed": [
                {
                    "shaft": "s",
                    "start": 0.1,
                    "end": 0.6,
                    "intensity_start": 800,
                    "intensity_end": -300,
                }
            ],
        },
        {"name": "b", "torques": [{"shaft": "s", "x": 0.13, "torque": -200}]},
    ],
    "combinations": [{"name": "a+b", "factors": {"a": 1.25, "b": 1.5}}],
}


def test_point_torques_inside_tapered_and_loaded_elements_are_listed_twice(tmp_path, capsys):
    document = _solve_json(capsys, _write(tmp_path, MM_CASE))
    for x in (130, 520):
        _check_jumps(MM_CASE, document, "s", x)


def test_values_are_printed_in_the_files_units(tmp_path, capsys):
    in_mm = _solve_json(capsys, _write(tmp_path, MM_CASE, "mm.json"))
    in_si = _solve_json(capsys, _write(tmp_path, SI_CASE, "si.json"))
    assert in_mm["units"] == MM_CASE["units"]
    assert in_si["units"] == {"length": "m", "torque": "N*m", "stress": "Pa", "angle": "rad"}
    factors = {"x": 1e-3, "torque": 1.0, "angle": math.pi / 180, "shear_stress": 1e6}
    for mm_result, si_result in zip(in_mm["results"], in_si["results"], strict=True):
        assert mm_result["name"] == si_result["name"]
        assert mm_result["reactions"] == pytest.approx(si_result["reactions"], rel=1e-9)
        for key, factor in factors.items():
            mm_values = [v * factor for v in mm_result["shafts"]["s"][key]]
            si_values = si_result["shafts"]["s"][key]
            scale = max(abs(v) for v in si_values)
            assert mm_values == pytest.approx(si_values, rel=1e-9, abs=1e-9 * scale), key
    # The mm document really is in mm (not SI relabelled): the shaft ends at 700 mm.
    assert in_mm["results"][0]["shafts"]["s"]["x"][-1] == pytest.approx(700.0, rel=1e-12)


def test_readable_output_has_tables_and_the_caution(tmp_path, capsys):
    assert main(["solve", str(_write(tmp_path, MM_CASE))]) == 0
    captured = capsys.readouterr()
    assert captured.err == ""
    assert CAUTION in captured.out
    # Deference to codes and licensed practice (project rules), whatever the exact wording.
    assert "codes" in CAUTION and "licensed professional" in CAUTION
    for name in ("'a'", "'b'", "'a+b'"):
        assert name in captured.out
    assert "[mm]" in captured.out and "[MPa]" in captured.out and "[deg]" in captured.out


def test_readable_output_through_a_subprocess_shows_the_caution():
    completed = subprocess.run(
        [sys.executable, "-m", "workbench.cli", "solve", str(DEMO_CASE)],
        capture_output=True,
        text=True,
        env=_environment(),
        cwd=ROOT,
        timeout=60,
        check=False,
    )
    assert completed.returncode == 0, completed.stderr
    assert CAUTION in completed.stdout
    assert "Traceback" not in completed.stderr


IMPORT_PROBE = """
import json, sys
import workbench.solver
import workbench.solver.analysis, workbench.case.errors, workbench.solver.io
import workbench.solver.model, workbench.solver.sections, workbench.solver.tables
import workbench.case.units
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
solve(parse_case({
    "materials": {"steel": {"shear_modulus": 79.3e9}},
    "shafts": [{"id": "s", "segments": [
        {"length": 1.0, "material": "steel", "section": {"shape": "solid", "diameter": 0.05}}]}],
    "supports": [{"shaft": "s", "x": 0.0}],
    "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 1.0, "torque": 100.0}]}],
}))
# A non-circular shape loads the registry of every shape, the finite-element ones' classes too,
# but not the finite-element module: sectionproperties (and its matplotlib) wait for a polygon.
solve(parse_case({
    "materials": {"steel": {"shear_modulus": 79.3e9}},
    "shafts": [{"id": "s", "segments": [{"length": 1.0, "material": "steel",
        "section": {"shape": "rectangle", "width": 0.05, "height": 0.02}}]}],
    "supports": [{"shaft": "s", "x": 0.0}],
    "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 1.0, "torque": 100.0}]}],
}))
heavy = ["ipywidgets", "bqplot", "nbconvert", "matplotlib", "pandas", "traitlets", "IPython",
         "nbformat", "pint", "sectionproperties", "shapely", "cad_to_shapely", "ezdxf",
         "workbench.solver.fe_sections"]
print(json.dumps({"loaded": [m for m in heavy if m in sys.modules]}))
"""

POLYGON_PROBE = """
import json, sys
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
solve(parse_case({
    "materials": {"steel": {"shear_modulus": 79.3e9, "elastic_modulus": 200e9}},
    "shafts": [{"id": "s", "segments": [{"length": 1.0, "material": "steel",
        "section": {"shape": "polygon", "outer": [{"x": 0, "y": 0}, {"x": 0.05, "y": 0},
                                                   {"x": 0.05, "y": 0.02}, {"x": 0, "y": 0.02}]}}]}],
    "supports": [{"shaft": "s", "x": 0.0}],
    "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 1.0, "torque": 100.0}]}],
}))
probed = ["sectionproperties", "matplotlib", "cad_to_shapely", "ezdxf", "ipywidgets", "nbconvert"]
print(json.dumps({"loaded": [m for m in probed if m in sys.modules]}))
"""


def _modules_loaded(probe: str) -> list[str]:
    """The probed modules a fresh interpreter running ``probe`` has loaded."""
    completed = subprocess.run(
        [sys.executable, "-c", probe],
        capture_output=True,
        text=True,
        env=_environment(),
        cwd=ROOT,
        timeout=120,
        check=False,
    )
    assert completed.returncode == 0, completed.stderr
    loaded: list[str] = json.loads(completed.stdout)["loaded"]
    return loaded


def test_the_solver_imports_light():
    # Design §1: the solver imports with no widget, nbconvert or matplotlib module (nor pandas,
    # nor pint for an SI case) loaded. Its start-up time is a benchmark row, not a unit test.
    assert _modules_loaded(IMPORT_PROBE) == []


def test_a_polygon_section_loads_sectionproperties_and_with_it_matplotlib_but_no_dxf_reader():
    # What the finite-element section costs in modules, stated rather than hidden: the
    # sectionproperties package imports matplotlib.pyplot itself; the DXF reader waits for a
    # drawing, and no widget or notebook library comes with either.
    assert _modules_loaded(POLYGON_PROBE) == ["sectionproperties", "matplotlib"]


def test_an_unexpected_error_is_one_line_with_exit_status_3(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    """The last line of defence: a defect is reported in one line, exit 3, never a traceback."""
    from workbench.solver import analysis

    def broken(*_: object, **__: object) -> None:
        raise RuntimeError("a defect\nspread over lines " + "x" * 500)

    monkeypatch.setattr(analysis, "solve_file", broken)
    status = main(["solve", str(DEMO_CASE)])
    captured = capsys.readouterr()
    assert status == 3
    lines = captured.err.splitlines()
    assert len(lines) == 1
    assert lines[0].startswith(f"internal error on {DEMO_CASE.name}: RuntimeError: a defect")
    assert "please report" in lines[0] and "Traceback" not in captured.err
    assert len(lines[0]) <= 200


def test_debug_shows_the_traceback_of_an_internal_error(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    from workbench.solver import analysis

    def broken(*_: object, **__: object) -> None:
        raise RuntimeError("a defect")

    monkeypatch.setattr(analysis, "solve_file", broken)
    assert main(["--debug", "solve", str(DEMO_CASE)]) == 3
    assert "Traceback" in capsys.readouterr().err


def test_lab_stopped_with_sigterm_stops_its_server(tmp_path: Path) -> None:
    """``workbench lab`` ended by SIGTERM leaves no server running behind it."""
    import signal
    import time

    pid_file = tmp_path / "child.pid"
    (tmp_path / "demo.ipynb").write_text("{}", encoding="utf-8")
    # A stand-in server that records its pid and would run for a minute.
    server = (
        f"import os, time; open({str(pid_file)!r}, 'w').write(str(os.getpid())); time.sleep(60)"
    )
    script = (
        "import sys\n"
        "import workbench.cli.lab as lab\n"
        f"lab.lab_command = lambda *a, **k: [sys.executable, '-c', {server!r}]\n"
        "from workbench.cli import main\n"
        f"sys.exit(main(['lab', '--folder', {str(tmp_path)!r}]))\n"
    )
    parent = subprocess.Popen([sys.executable, "-c", script])
    deadline = time.monotonic() + 30
    while not pid_file.exists() or not pid_file.read_text():
        assert time.monotonic() < deadline, "the stand-in server never started"
        time.sleep(0.05)
    child = int(pid_file.read_text())
    parent.send_signal(signal.SIGTERM)
    assert parent.wait(timeout=30) == 128 + signal.SIGTERM
    deadline = time.monotonic() + 10
    while True:
        try:
            os.kill(child, 0)
        except ProcessLookupError:
            break  # the server is gone
        # A zombie no longer runs; its parent (reaped by now) was the lab command.
        status = Path(f"/proc/{child}/status")
        if status.exists() and "zombie" in status.read_text():
            break
        assert time.monotonic() < deadline, "the server outlived workbench lab"
        time.sleep(0.05)
