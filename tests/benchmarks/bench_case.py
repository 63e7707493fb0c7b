"""Speed of reading case files and of the ``workbench`` command's start, against their targets.

Targets (on the 2-core reference machine):

* Decoding and validating a case file: ≤ 5 µs per segment at 10⁵ and 10⁶ segments, JSON
  decoding included (decode: bytes → the declared structs, types and bounds checked in C;
  validation: digits, keys given twice, totals). Building the SI model from it is reported
  beside, for information.
* ``workbench solve`` on the demo, cold: ≤ 1.3 × ``python -c "import numpy, scipy.sparse,
  scipy.linalg"`` (the two commands taking turns), with neither pint nor pandas loaded.
* ``workbench solve CASE --json`` with 100,000 segments: ≤ 8 × the same command on 10 segments
  (taking turns); where the time goes is in the notes.
* ``workbench solve CASE --json`` of a 10⁶-segment file: ≤ 1 GB peak memory (``ru_maxrss`` of
  the command, measured from a small process that runs it).

The case files are invented line shafts (solid and tube segments whose diameters vary from one
segment to the next, so that no two sections are alike), written to a temporary folder.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from tests.benchmarks.common import PROJECT_ROOT, Row, run_fresh_python, time_calls

US = 1e6
DEMO = PROJECT_ROOT / "workbench" / "cases" / "press_drive.json"


def case_text(segments: int) -> bytes:
    """A case file of one shaft of ``segments`` segments (mm, N·m, MPa, deg), as bytes.

    Alternately solid (Ø 40–41 mm) and tube (Ø 50–51/30 mm), lengths 40/60/50 mm; fixed at both
    ends, a spring at mid-length; three load cases (a drive torque, two opposed torques, a
    distributed torque) on segment joints.
    """
    lengths = (40, 60, 50)
    parts, joints, x = [], [0], 0
    for number in range(segments):
        length = lengths[number % 3]
        wobble = (number % 997) / 997  # every section differs from its neighbours
        if number % 2 == 0:
            section = f'{{"shape": "solid", "diameter": {40 + wobble:.6f}}}'
        else:
            section = (
                f'{{"shape": "tube", "outer_diameter": {50 + wobble:.6f}, "inner_diameter": 30}}'
            )
        parts.append(f'{{"length": {length}, "material": "steel", "section": {section}}}')
        x += length
        joints.append(x)

    def joint(fraction: float) -> int:
        return joints[round(fraction * segments)]

    head = (
        '{"title": "benchmark line shaft", "units": {"length": "mm", "torque": "N*m", '
        '"stress": "MPa", "angle": "deg"}, "materials": {"steel": {"shear_modulus": 79300, '
        '"yield_strength": 390, "ultimate_strength": 470}}, "shafts": [{"id": "line", '
        '"segments": ['
    )
    tail = (
        f']}}], "supports": [{{"shaft": "line", "x": 0, "kind": "fixed"}}, {{"shaft": "line", '
        f'"x": {x}, "kind": "fixed"}}, {{"shaft": "line", "x": {joint(0.5)}, "kind": "spring", '
        f'"stiffness": 872.7}}], "load_cases": [{{"name": "drive", "torques": [{{"shaft": "line", '
        f'"x": {joint(1 / 3)}, "torque": 1200}}]}}, {{"name": "opposed", "torques": [{{"shaft": '
        f'"line", "x": {joint(0.25)}, "torque": 500}}, {{"shaft": "line", "x": {joint(0.75)}, '
        f'"torque": -500}}]}}, {{"name": "spread", "distributed": [{{"shaft": "line", "start": '
        f'{joint(0.6)}, "end": {joint(0.7)}, "intensity_start": 0.1, "intensity_end": 0.3}}]}}]}}'
    )
    return (head + ", ".join(parts) + tail).encode("utf-8")


# --- decoding and validating ------------------------------------------------------------------


def _reading(segments: int, repeats: int) -> list[Row]:
    from workbench.case.load import case_file_from_bytes, check_case_bytes, decode_case_file
    from workbench.solver.build import build_model
    from workbench.solver.case_columns import case_system

    data = case_text(segments)
    label = f"{segments:,} segments"
    decoding = time_calls(lambda: decode_case_file(data), repeats=repeats, collect_between=True)
    case = decode_case_file(data)
    checking = time_calls(lambda: check_case_bytes(data, case), repeats=repeats)
    both = time_calls(lambda: case_file_from_bytes(data), repeats=repeats, collect_between=True)
    per = US / segments
    notes = (
        f"{len(data) / 1e6:.0f} MB file in memory; medians of {len(both.times)}: decode "
        f"{decoding.median * per:.2f} µs (bytes → declared structs, types and bounds checked "
        "by msgspec in C; the segments' keys taken as columns, kept for the solver, and the "
        f"alternatives checked on them), validation {checking.median * per:.2f} µs "
        "(digits of every number, keys given twice, segment total), timed apart",
    )
    rows = [
        Row(f"{label}: decode", decoding.median * per, "µs/segment"),
        Row(f"{label}: validate", checking.median * per, "µs/segment"),
        Row(f"{label}: decode + validate", both.median * per, "µs/segment", 5.0, notes=notes),
    ]
    tabling = time_calls(lambda: case_system(case), repeats=repeats, collect_between=True)
    note = (
        "declared case → the solver's SI columns (what `workbench solve` does): the segment "
        "columns the loader kept, each converted by one multiplication, checked on whole columns",
    )
    rows.append(
        Row(f"{label}: table from the decoded file", tabling.median * per, "µs/segment", notes=note)
    )
    if segments <= 100_000:
        building = time_calls(lambda: build_model(case), repeats=repeats, collect_between=True)
        note = (
            "declared case → SI Model: unit conversion by each key's quantity, the model's "
            "objects and checks (a Python object per segment: what the checks, the panel and "
            "the record use)",
        )
        rows.append(
            Row(f"{label}: build the SI model", building.median * per, "µs/segment", notes=note)
        )
    return rows


# --- the command's start ----------------------------------------------------------------------


def _environment(bytecode: str) -> dict[str, str]:
    """The project on the path; compiled modules cached in ``bytecode`` (as an install has them).

    Without a cache (``PYTHONDONTWRITEBYTECODE``, as CI sets) every start would compile the
    project's modules from source, which no installed package does.
    """
    environment = dict(os.environ)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(PROJECT_ROOT), environment.get("PYTHONPATH", "")) if part
    )
    environment.pop("PYTHONDONTWRITEBYTECODE", None)
    environment["PYTHONPYCACHEPREFIX"] = bytecode
    return environment


def _taking_turns(first: list[str], second: list[str], rounds: int) -> tuple[float, float]:
    """Median wall times (s) of two commands run one after the other, ``rounds`` times each.

    One untimed run of each first fills the bytecode cache of both.
    """
    times: tuple[list[float], list[float]] = ([], [])
    with tempfile.TemporaryDirectory() as bytecode:
        environment = _environment(bytecode)

        def run(command: list[str]) -> float:
            start = time.perf_counter()
            subprocess.run(
                command, env=environment, cwd=PROJECT_ROOT, stdout=subprocess.DEVNULL, check=True
            )
            return time.perf_counter() - start

        run(first), run(second)
        for _ in range(rounds):
            times[0].append(run(first))
            times[1].append(run(second))
    return statistics.median(times[0]), statistics.median(times[1])


_LOADED_PROBE = """
    import contextlib, io, json, sys
    from workbench.cli import main
    with contextlib.redirect_stdout(io.StringIO()):
        main(["solve", {case!r}])
    heavy = ["pint", "pandas", "scipy.special", "workbench.solver.modes", "ipywidgets", "jsonschema"]
    print(json.dumps({{"loaded": [name for name in heavy if name in sys.modules]}}))
"""


def _cold_start() -> list[Row]:
    base, ours = _taking_turns(
        [sys.executable, "-c", "import numpy, scipy.sparse, scipy.linalg"],
        [sys.executable, "-m", "workbench.cli", "solve", str(DEMO)],
        rounds=21,
    )
    loaded = run_fresh_python(_LOADED_PROBE.format(case=str(DEMO)))["loaded"]
    notes = (
        f"medians of 21 runs each, taking turns (bytecode cached, as installed): bare imports {base * 1e3:.0f} ms, "
        f"`workbench solve` on the demo {ours * 1e3:.0f} ms",
        "also loaded by the solve: "
        + (
            ", ".join(loaded)
            or "none of pint, pandas, scipy.special, the vibration module, widgets, jsonschema"
        ),
    )
    return [Row("demo solve, cold / numpy+scipy import", ours / base, "×", 1.3, notes=notes)]


_PHASES_PROBE = """
    import json, time
    start = time.perf_counter()
    from workbench.case.load import check_case_bytes, decode_case_file, read_case_bytes
    from workbench.solver.analysis import solve_case
    from workbench.solver.case_columns import case_system
    from workbench.solver.tables import results_json
    phases = {{"imports": time.perf_counter() - start}}
    def phase(name, call):
        begin = time.perf_counter()
        value = call()
        phases[name] = time.perf_counter() - begin
        return value
    data = phase("read", lambda: read_case_bytes({path!r}))
    case = phase("decode", lambda: decode_case_file(data))
    phase("validate", lambda: check_case_bytes(data, case))
    phase("table (apart)", lambda: case_system(case))
    results = phase("table and solve", lambda: solve_case(case))
    text = phase("JSON text", lambda: b"".join(results_json(results)))
    phases["output MB"] = len(text) / 1e6
    print(json.dumps(phases))
"""


def _solve_json() -> list[Row]:
    with tempfile.TemporaryDirectory() as folder:
        small, large = Path(folder) / "small.json", Path(folder) / "large.json"
        small.write_bytes(case_text(10))
        large.write_bytes(case_text(100_000))
        command = [sys.executable, "-m", "workbench.cli", "solve"]
        ten, hundred_thousand = _taking_turns(
            [*command, str(small), "--json"], [*command, str(large), "--json"], rounds=5
        )
        phases = run_fresh_python(_PHASES_PROBE.format(path=str(large)))
    size = phases.pop("output MB")
    split = ", ".join(f"{name} {seconds * 1e3:,.0f} ms" for name, seconds in phases.items())
    notes = (
        f"medians of 5 runs each, taking turns: 10 segments {ten * 1e3:.0f} ms, 100,000 "
        f"segments {hundred_thousand * 1e3:,.0f} ms",
        f"where the 100,000-segment run goes (one run, in process): {split}; the JSON text is "
        f"{size:.0f} MB, the shortest round-trip text of every float (msgspec), a block at a "
        "time",
    )
    return [Row("solve --json, 100k / 10 segments", hundred_thousand / ten, "×", 8.0, notes=notes)]


_MEMORY_PROBE = """
    import json, resource, subprocess, sys, time
    start = time.perf_counter()
    subprocess.run(
        [sys.executable, "-m", "workbench.cli", "solve", {path!r}, "--json"],
        stdout=subprocess.DEVNULL, check=True,
    )
    wall = time.perf_counter() - start
    peak = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024
    print(json.dumps({{"wall": wall, "peak": peak}}))
"""


def _solve_memory() -> list[Row]:
    """Peak memory of ``workbench solve FILE --json`` on a 10⁶-segment file, in a subprocess."""
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "million.json"
        data = case_text(1_000_000)
        path.write_bytes(data)
        probe = run_fresh_python(_MEMORY_PROBE.format(path=str(path)), timeout=600.0)
    notes = (
        f"ru_maxrss of the command (RUSAGE_CHILDREN of a small probe process that ran it): the "
        f"whole command, interpreter, {len(data) / 1e6:.0f} MB file, decoded case, columns, "
        f"mesh, solve and the JSON text written to /dev/null; it took {probe['wall']:.1f} s",
    )
    return [
        Row(
            "1M-segment file: solve --json peak memory",
            probe["peak"] / 1e6,
            "MB",
            1000.0,
            notes=notes,
        )
    ]


def run() -> list[Row]:
    """Every case-file benchmark, in the order of the targets."""
    return [
        *_reading(100_000, repeats=7),
        *_reading(1_000_000, repeats=3),
        *_cold_start(),
        *_solve_json(),
        *_solve_memory(),
    ]
