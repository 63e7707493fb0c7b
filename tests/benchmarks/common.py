"""Shared pieces of the benchmarks: the result row, timers, fresh-subprocess runs, demo models.

A benchmark module ``bench_<name>.py`` in this package offers ``run() -> list[Row]``;
``python -m tests.benchmarks`` finds every such module, runs it and prints one table.

Timing follows :mod:`timeit`'s practice: ``time.perf_counter``, the cyclic garbage collector
off inside the timed loop (collected before it), warm-up calls first, and the median over many
repeats reported (p95 beside it where the spread matters).
"""

from __future__ import annotations

import gc
import json
import math
import os
import statistics
import subprocess
import sys
import textwrap
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np

#: The project root (holds ``workbench/`` and ``tests/``), put on PYTHONPATH of subprocesses.
PROJECT_ROOT = Path(__file__).resolve().parents[2]

Sense = Literal["<=", ">="]


@dataclass(frozen=True)
class Row:
    """One line of the benchmark table.

    Parameters
    ----------
    name
        What was measured.
    measured
        The figure (in ``unit``).
    unit
        Its unit (``ms``, ``MB``, ``×`` for a ratio, ``s``).
    target
        The figure to meet (in ``unit``), or ``None`` for a figure reported for information.
    sense
        ``"<="``: the measured figure must not exceed the target; ``">="``: it must reach it.
    gate
        Whether the row decides PASS/MISS; an informative row with a target shows ``info``.
    notes
        Lines printed under the table: what each side of a comparison includes, hot spots of a
        missed target.
    """

    name: str
    measured: float
    unit: str
    target: float | None = None
    sense: Sense = "<="
    gate: bool = True
    notes: tuple[str, ...] = field(default=())

    @property
    def ratio(self) -> float | None:
        """measured / target: ≤ 1 passes a ``"<="`` target, ≥ 1 passes a ``">="`` one."""
        if self.target is None or self.target == 0.0:
            return None
        return self.measured / self.target

    @property
    def passed(self) -> bool | None:
        """``True``/``False`` for a gating row with a target, ``None`` otherwise."""
        if self.target is None or not self.gate:
            return None
        if not math.isfinite(self.measured):
            return False
        if self.sense == "<=":
            return self.measured <= self.target
        return self.measured >= self.target

    @property
    def verdict(self) -> str:
        """``PASS``, ``MISS``, ``info`` or ``-`` (no target)."""
        if self.target is None:
            return "-"
        if not self.gate:
            return "info"
        return "PASS" if self.passed else "MISS"


@dataclass(frozen=True)
class Timing:
    """Wall-clock times of repeated calls (s)."""

    times: tuple[float, ...]
    #: CPU time of this process over the same calls (s), where it was taken (a shared machine
    #: slows the wall clock, much less the CPU time of the work itself).
    cpu_times: tuple[float, ...] = ()

    @property
    def median(self) -> float:
        """Median time (s)."""
        return statistics.median(self.times)

    @property
    def cpu_median(self) -> float:
        """Median CPU time (s); NaN where it was not taken."""
        return statistics.median(self.cpu_times) if self.cpu_times else math.nan

    @property
    def p95(self) -> float:
        """95th percentile (s), linear interpolation between order statistics."""
        return float(np.percentile(self.times, 95.0))

    @property
    def best(self) -> float:
        """Fastest call (s)."""
        return min(self.times)


@contextmanager
def _collector_off() -> Iterator[None]:
    enabled = gc.isenabled()
    gc.collect()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


def time_pair(
    first: Callable[[], object],
    second: Callable[[], object],
    *,
    repeats: int,
    warmup: int = 1,
) -> tuple[Timing, Timing]:
    """Time two calls taking turns, so that both see the same machine (for a ratio).

    A slow spell of the machine (another process, a frequency step) then lands on both sides
    instead of on one; the garbage collector runs between calls, outside the timed windows.
    """
    for _ in range(warmup):
        first()
        second()
    times: tuple[list[float], list[float]] = ([], [])
    cpu: tuple[list[float], list[float]] = ([], [])
    with _collector_off():
        for _ in range(repeats):
            for call, out, cpu_out in ((first, times[0], cpu[0]), (second, times[1], cpu[1])):
                start, cpu_start = time.perf_counter(), time.process_time()
                result = call()
                out.append(time.perf_counter() - start)
                cpu_out.append(time.process_time() - cpu_start)
                del result
                gc.collect()
    return Timing(tuple(times[0]), tuple(cpu[0])), Timing(tuple(times[1]), tuple(cpu[1]))


def time_calls(
    call: Callable[[], object],
    *,
    repeats: int,
    warmup: int = 1,
    budget: float | None = None,
    collect_between: bool = False,
) -> Timing:
    """Time ``call()`` ``repeats`` times after ``warmup`` untimed calls.

    Parameters
    ----------
    call
        The work to time; its result is dropped outside the timed window.
    repeats
        Largest number of timed calls.
    warmup
        Untimed calls first (imports, caches, first-touch page faults).
    budget
        Stop early once this many seconds of timed calls have passed (at least 3 calls).
    collect_between
        Run the garbage collector between calls (outside the timed window), for big models whose
        dropped results would otherwise pile up.
    """
    for _ in range(warmup):
        call()
    times: list[float] = []
    spent = 0.0
    with _collector_off():
        for _ in range(repeats):
            start = time.perf_counter()
            result = call()
            elapsed = time.perf_counter() - start
            del result
            times.append(elapsed)
            spent += elapsed
            if collect_between:
                gc.collect()
            if budget is not None and spent > budget and len(times) >= 3:
                break
    return Timing(tuple(times))


def resource_use(call: Callable[[], object], repeats: int = 3) -> str:
    """Page faults, user and system CPU time per call of ``call`` (after one warm-up), as text.

    Fresh pages are faulted in by the kernel (system time): where a process's allocator hands
    memory back between calls, every call of a code with large outputs pays them again.
    """
    import resource

    call()
    with _collector_off():
        before = resource.getrusage(resource.RUSAGE_SELF)
        for _ in range(repeats):
            result = call()
            del result
        after = resource.getrusage(resource.RUSAGE_SELF)
    faults = (after.ru_minflt - before.ru_minflt) / repeats
    user = (after.ru_utime - before.ru_utime) / repeats
    system = (after.ru_stime - before.ru_stime) / repeats
    return f"{faults:,.0f} page faults, user {user * 1e3:.1f} ms, system {system * 1e3:.1f} ms"


#: Marks the line of a fresh interpreter's output that carries its JSON answer.
ANSWER_MARK = "BENCHMARK-ANSWER "


def run_fresh_python(code: str, timeout: float = 120.0) -> Any:
    """Run ``code`` in a fresh interpreter (project on PYTHONPATH) and return the JSON it prints.

    The snippet prints its answer as one line ``ANSWER_MARK + json.dumps(...)`` (or, for short
    probes, one JSON object as the last line of its standard output). Everything else it writes
    is passed on to this process's standard error.

    The interpreter is started by a small shell that forks it (``/bin/sh`` where there is one):
    Linux keeps the high-water mark of the memory a process had before ``exec`` in its
    ``ru_maxrss``, so an interpreter exec'd straight from this (large) process would report this
    process's peak as its own.
    """
    environment = dict(os.environ)
    environment["PYTHONPATH"] = os.pathsep.join(
        part for part in (str(PROJECT_ROOT), environment.get("PYTHONPATH", "")) if part
    )
    command = [sys.executable, "-c", textwrap.dedent(code)]
    if Path("/bin/sh").exists():
        # `; exit $?` keeps the shell from exec'ing the interpreter in its own place.
        command = ["/bin/sh", "-c", '"$0" "$@"; exit $?', *command]
    completed = subprocess.run(
        command,
        cwd=PROJECT_ROOT,
        env=environment,
        capture_output=True,
        text=True,
        timeout=timeout,
        check=False,
    )
    lines = completed.stdout.strip().splitlines()
    answers = [line for line in lines if line.startswith(ANSWER_MARK)]
    chatter = [line for line in lines if not line.startswith(ANSWER_MARK)] if answers else []
    if chatter or completed.stderr:
        sys.stderr.write("\n".join(chatter) + ("\n" if chatter else "") + completed.stderr)
    if completed.returncode != 0:
        msg = f"subprocess failed (exit status {completed.returncode}); its output is above"
        raise RuntimeError(msg)
    if answers:
        return json.loads(answers[-1].removeprefix(ANSWER_MARK))
    return json.loads(lines[-1])


def rows_in_fresh_process(module: str, function: str = "run", timeout: float = 600.0) -> list[Row]:
    """Call ``module.function() -> list[Row]`` in a fresh interpreter and return its rows.

    A fresh process keeps one benchmark's imports, heap and caches from shaping another's
    figures (glibc's malloc thresholds move with what was freed before, and SuperLU allocates
    on every factorization).
    """
    code = f"""
        import dataclasses, json
        from tests.benchmarks.common import ANSWER_MARK
        from {module} import {function} as benchmark
        rows = [dataclasses.asdict(row) for row in benchmark()]
        print(ANSWER_MARK + json.dumps(rows))
    """
    return [
        Row(**{**fields, "notes": tuple(fields["notes"])})
        for fields in run_fresh_python(code, timeout=timeout)
    ]


# --- demo models (invented data, for timing only) ---------------------------------------------


def demo_steel() -> Any:
    """A demo carbon steel, G = 79.3 GPa."""
    from workbench.case.materials import Material

    return Material("demo drive steel", 79.3e9, 390e6, 470e6)


#: Segment lengths cycled along a demo shaft (m).
_SEGMENT_LENGTHS = (0.040, 0.060, 0.050)


def demo_shaft_model(segments: int, *, distributed: bool = True) -> Any:
    """A line shaft of ``segments`` segments, alternately solid Ø40 mm and tube Ø50/30 mm.

    Fixed at both ends, a spring support (50 kN·m/rad) at the joint nearest mid-length, three
    load cases: a drive torque at the joint nearest 1/3 of the length; two opposed torques near
    1/4 and 3/4; and either a linearly varying distributed torque over 60 %–70 % of the length
    (``distributed=True``) or a point torque near 0.65 of the length.
    Loads sit on segment joints, so the mesh has one element per segment (plus the distributed
    span's ends).
    """
    from workbench.solver.model import (
        DistributedTorque,
        LoadCase,
        Model,
        PointTorque,
        Segment,
        Shaft,
        Support,
    )
    from workbench.solver.sections import SolidCircle, Tube

    steel = demo_steel()
    solid, tube = SolidCircle(0.040), Tube(0.050, 0.030)
    built = tuple(
        Segment.single(_SEGMENT_LENGTHS[number % 3], steel, solid if number % 2 == 0 else tube)
        for number in range(segments)
    )
    shaft = Shaft("line", built)
    joints = shaft.boundaries

    def joint_near(fraction: float) -> float:
        return float(joints[max(1, min(segments - 1, round(fraction * segments)))])

    length = float(joints[-1])
    if distributed:
        third = LoadCase(
            "conveyor drag",
            distributed=(DistributedTorque("line", 0.6 * length, 0.7 * length, -40.0, -80.0),),
        )
    else:
        third = LoadCase("conveyor drag", torques=(PointTorque("line", joint_near(0.65), -60.0),))
    return Model(
        shafts=(shaft,),
        supports=(
            Support("line", 0.0),
            Support("line", length),
            Support("line", joint_near(0.5), "spring", 5.0e4),
        ),
        load_cases=(
            LoadCase("drive", torques=(PointTorque("line", joint_near(1 / 3), 250.0),)),
            LoadCase(
                "reversal",
                torques=(
                    PointTorque("line", joint_near(0.25), 180.0),
                    PointTorque("line", joint_near(0.75), -180.0),
                ),
            ),
            third,
        ),
    )


def demo_case_text(segments: int, *, distributed: bool = True) -> bytes:
    """The system of :func:`demo_shaft_model` written as a case file (SI units), as bytes.

    The same segments, supports and loads, each number written as the shortest text of the
    float the model holds (``repr``), so that the file decodes to the same SI values and solving
    it gives the model's results exactly.
    """
    lengths = np.resize(np.array(_SEGMENT_LENGTHS), segments)
    joints = np.concatenate([[0.0], np.cumsum(lengths)])

    def joint_near(fraction: float) -> float:
        return float(joints[max(1, min(segments - 1, round(fraction * segments)))])

    length = float(joints[-1])
    sections = (
        '{"shape": "solid", "diameter": 0.04}',
        '{"shape": "tube", "outer_diameter": 0.05, "inner_diameter": 0.03}',
    )
    # The segments repeat every six (three lengths, two sections): write six, repeat the text.
    cycle = [
        f'{{"length": {_SEGMENT_LENGTHS[number % 3]!r}, "material": "steel", '
        f'"section": {sections[number % 2]}}}'
        for number in range(6)
    ]
    parts = (cycle * (segments // 6 + 1))[:segments]
    if distributed:
        third = (
            f'"distributed": [{{"shaft": "line", "start": {0.6 * length!r}, "end": '
            f'{0.7 * length!r}, "intensity_start": -40.0, "intensity_end": -80.0}}]'
        )
    else:
        third = f'"torques": [{{"shaft": "line", "x": {joint_near(0.65)!r}, "torque": -60.0}}]'
    steel = demo_steel()
    head = (
        f'{{"title": "demo line shaft", "materials": {{"steel": {{"shear_modulus": '
        f'{steel.shear_modulus!r}, "yield_strength": {steel.yield_strength!r}, '
        f'"ultimate_strength": {steel.ultimate_strength!r}}}}}, "shafts": [{{"id": "line", '
        '"segments": ['
    )
    tail = (
        f']}}], "supports": [{{"shaft": "line", "x": 0.0}}, {{"shaft": "line", "x": {length!r}}}, '
        f'{{"shaft": "line", "x": {joint_near(0.5)!r}, "kind": "spring", "stiffness": 50000.0}}], '
        f'"load_cases": [{{"name": "drive", "torques": [{{"shaft": "line", "x": '
        f'{joint_near(1 / 3)!r}, "torque": 250.0}}]}}, {{"name": "reversal", "torques": [{{'
        f'"shaft": "line", "x": {joint_near(0.25)!r}, "torque": 180.0}}, {{"shaft": "line", '
        f'"x": {joint_near(0.75)!r}, "torque": -180.0}}]}}, {{"name": "conveyor drag", {third}}}]}}'
    )
    return (head + ", ".join(parts) + tail).encode("utf-8")


def many_case_model(
    segments: int, cases: int, *, on_joints: bool = True, random_state: int = 7
) -> Any:
    """A ``segments``-segment demo shaft (as :func:`demo_shaft_model`) with ``cases`` load cases.

    Each case is one point torque of random size (±300 N·m) at a random place: a segment joint
    when ``on_joints`` (the mesh keeps one element per segment), anywhere otherwise (every case
    adds a node).
    """
    from workbench.solver.model import LoadCase, Model, PointTorque

    base = demo_shaft_model(segments, distributed=False)
    shaft = base.shafts[0]
    joints = shaft.boundaries
    generator = np.random.default_rng(random_state)
    load_cases = []
    for number in range(cases):
        if on_joints:
            x = float(joints[generator.integers(1, segments)])
        else:
            x = float(generator.uniform(0.01, 0.99) * shaft.length)
        torque = float(generator.uniform(-300.0, 300.0))
        load_cases.append(LoadCase(f"case {number + 1}", torques=(PointTorque("line", x, torque),)))
    return Model(shafts=base.shafts, supports=base.supports, load_cases=tuple(load_cases))


# --- where the time goes -------------------------------------------------------------------------


#: The solver modules whose functions :func:`solve_phases` times.
SOLVER_CORE = (
    "workbench.solver.analysis",
    "workbench.solver.columns",
    "workbench.solver.mesh",
    "workbench.solver.mesh_sizes",
    "workbench.solver.elements",
    "workbench.solver.assembly",
    "workbench.solver.recovery",
    "workbench.solver.statics",
)


def solve_phases(model: Any, repeats: int = 5) -> list[str]:
    """Split the time of ``analysis.solve(model)`` over the core's functions (ms per solve).

    Every function defined in the core's modules (:data:`SOLVER_CORE`, other than ``solve``) is
    wrapped with a timer, wherever a core module refers to it, for the duration of the
    measurement and restored afterwards. Only calls made while no other wrapped function is
    running are counted, so nested calls are not counted twice; what is left is the work written
    inside ``solve`` itself.
    """
    import importlib
    import inspect

    from workbench.solver import analysis

    modules = [importlib.import_module(name) for name in SOLVER_CORE]
    originals = {
        function: f"{module.__name__.rsplit('.', 1)[-1]}.{name}"
        for module in modules
        for name, function in vars(module).items()
        if inspect.isfunction(function)
        and function.__module__ == module.__name__
        and function is not analysis.solve
    }
    spent = dict.fromkeys(originals.values(), 0.0)
    depth = 0

    def timed(label: str, function: Callable[..., Any]) -> Callable[..., Any]:
        def wrapper(*args: Any, **kwargs: Any) -> Any:
            nonlocal depth
            depth += 1
            start = time.perf_counter()
            try:
                return function(*args, **kwargs)
            finally:
                depth -= 1
                if depth == 0:
                    spent[label] += time.perf_counter() - start

        return wrapper

    patched = [
        (module, name, function)
        for module in modules
        for name, function in vars(module).items()
        if inspect.isfunction(function) and function in originals
    ]
    try:
        for module, name, function in patched:
            setattr(module, name, timed(originals[function], function))
        analysis.solve(model)
        for label in spent:
            spent[label] = 0.0
        total = time_calls(lambda: analysis.solve(model), repeats=repeats, warmup=0)
    finally:
        for module, name, function in patched:
            setattr(module, name, function)
    calls = len(total.times)
    mean_total = sum(total.times) / calls
    lines = [f"phases of solve() (mean of {calls}, total {mean_total * 1e3:.2f} ms):"]
    ranked = sorted(((name, value) for name, value in spent.items() if value), key=lambda x: -x[1])
    inside = mean_total * calls - sum(spent.values())
    for name, seconds in [*ranked[:12], ("inside solve() itself", inside)]:
        share = seconds / calls / mean_total
        lines.append(f"  {name:<32s} {seconds / calls * 1e3:8.2f} ms  {share:6.1%}")
    return lines
