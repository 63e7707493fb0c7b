"""Speed and memory of the torsion solver against its targets.

Targets (on the 2-core reference machine; ratios measured side by side in one run, the two sides
taking turns so that both see the same machine):

* 20-segment shaft, 3 load cases: ``solve(model)`` median ≤ 1 ms (p95 reported).
* 100,000 segments: ``solve`` ≤ 1 s and ≤ 500 MB peak memory; t(100k)/t(10k) ≤ 12.
* The whole pipeline from the decoded case file to its ``Results`` at 10⁵ and 10⁶ segments
  (:mod:`tests.benchmarks.solver_pipeline`): ≤ 5× a bare numpy build +
  ``scipy.linalg.solve_banded`` of the same system; 10⁶ segments ≤ 2 s.
* 1,000 load cases on a 50-segment shaft: ≤ 5× ``solve_banded`` with 1,000 right-hand sides, one
  factorization.
* A batched diameter sweep, 10,000 variants of a 20-segment shaft: ≤ 1 s.
* ≥ 20× faster than a dense ``numpy.linalg.solve`` of the same system at 2,000 segments.
* The factor-and-solve core at 100,000 segments within 10× of ``scipy.linalg.solve_banded``.

Also reported: model building time, the import time of the solver.
Models are the invented demo shafts of :mod:`tests.benchmarks.common`.
"""

from __future__ import annotations

import dataclasses
import functools
import statistics
from typing import Any

import numpy as np
from scipy.linalg import lapack

from tests.benchmarks.bare_solver import agreement, bare_solve, plain_system
from tests.benchmarks.common import (
    Row,
    demo_shaft_model,
    many_case_model,
    resource_use,
    rows_in_fresh_process,
    run_fresh_python,
    solve_phases,
    time_calls,
    time_pair,
)
from tests.benchmarks.solver_pipeline import pipeline_versus_bare
from workbench.solver import analysis, assembly, statics
from workbench.solver.batch import solve_batch
from workbench.solver.columns import case_table
from workbench.solver.sections import FloatArray

MS = 1e3
MB = 1e6  # bytes in a megabyte (10⁶, not MiB)


def _with_hot_spots(row: Row, model: Any) -> Row:
    """Attach the phase split of ``solve(model)`` to a row whose target was missed."""
    if row.passed is not False:
        return row
    try:
        hot_spots = solve_phases(model)
    except Exception as error:  # a diagnostic must not hide the figure it explains
        hot_spots = [f"phase split failed: {type(error).__name__}: {error}"]
    return dataclasses.replace(row, notes=(*row.notes, *hot_spots))


# --- the targets ------------------------------------------------------------------------------


def _small_shaft() -> list[Row]:
    model = demo_shaft_model(20)
    timing = time_calls(lambda: analysis.solve(model), repeats=3000, warmup=50, budget=2.0)
    note = (
        f"20 segments ({len(analysis.build_mesh(model).node_x) - 1} elements), 3 load cases, "
        f"{len(timing.times)} timed calls of solve(model) incl. meshing; "
        f"best {timing.best * MS:.3f} ms"
    )
    median = Row("20 segments, 3 cases: solve median", timing.median * MS, "ms", 1.0, notes=(note,))
    return [
        _with_hot_spots(median, model),
        Row("20 segments, 3 cases: solve p95", timing.p95 * MS, "ms"),
    ]


def _large_shaft() -> list[Row]:
    rows = []
    medians = {}
    models = {}
    for segments, repeats in ((10_000, 15), (100_000, 5)):
        models[segments] = demo_shaft_model(segments)
        model = models[segments]
        timing = time_calls(
            functools.partial(analysis.solve, model), repeats=repeats, collect_between=True
        )
        medians[segments] = timing.median
        if segments == 100_000:
            note = (
                f"median of {len(timing.times)} in-process calls after one warm-up, p95 "
                f"{timing.p95 * MS:.0f} ms"
            )
            row = Row(
                "100k segments: solve median", timing.median * MS, "ms", 1000.0, notes=(note,)
            )
            rows.append(_with_hot_spots(row, model))
    growth = medians[100_000] / medians[10_000]
    note = (
        f"t(10k) = {medians[10_000] * MS:.1f} ms, t(100k) = {medians[100_000] * MS:.1f} ms "
        "(medians); linear growth gives 10"
    )
    row = Row("100k/10k segments: time ratio", growth, "×", 12.0, notes=(note,))
    rows.append(_with_hot_spots(row, models[100_000]))
    rows.extend(_large_shaft_memory())
    return rows


_MEMORY_PROBE = """
    import gc, json, resource, time, tracemalloc
    from tests.benchmarks.common import demo_shaft_model
    from workbench.solver.analysis import solve

    def resident_now():
        with open("/proc/self/statm") as statm:
            return int(statm.read().split()[1]) * resource.getpagesize()

    def high_water_mark():
        with open("/proc/self/status") as status:
            for line in status:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) * 1024
        return -1

    start = time.perf_counter()
    model = demo_shaft_model(100_000)
    build = time.perf_counter() - start
    gc.collect()
    resident_before = resident_now()
    try:
        # Linux: reset the high-water mark to the present resident size (proc(5), clear_refs 5),
        # so the model's own building peak does not hide the solve's.
        with open("/proc/self/clear_refs", "w") as clear_refs:
            clear_refs.write("5")
        reset = True
    except OSError:
        reset = False
    max_before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    hwm_before = high_water_mark()
    start = time.perf_counter()
    results = solve(model)
    first_solve = time.perf_counter() - start
    max_after = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    hwm_after = high_water_mark()
    del results
    gc.collect()
    tracemalloc.start()
    results = solve(model)
    current, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    print(json.dumps({
        "build": build, "first_solve": first_solve, "max_before": max_before,
        "max_after": max_after, "resident_before": resident_before, "traced_peak": peak,
        "traced_kept": current, "reset": reset, "hwm_before": hwm_before,
        "hwm_after": hwm_after,
    }))
"""


def _large_shaft_memory() -> list[Row]:
    probe = run_fresh_python(_MEMORY_PROBE)
    if probe["reset"]:
        baseline = probe["max_before"]
        how = "high-water mark reset to the resident size after building (clear_refs)"
    else:
        # Without a reset the building peak may hide the solve's; measuring from the resident
        # size instead can only overstate the solve's growth.
        baseline = probe["resident_before"]
        how = "no reset possible: Δ taken from the resident size before solve (an upper bound)"
    rss_delta = probe["max_after"] - baseline
    notes = (
        "gate: ru_maxrss(after first solve) − ru_maxrss(before), fresh subprocess, model "
        "already built; it sees every allocation, SuperLU's C heap included",
        f"{how}; resident before solve {probe['resident_before'] / MB:.0f} MB, ru_maxrss "
        f"before {probe['max_before'] / MB:.0f} MB, after {probe['max_after'] / MB:.0f} MB",
        f"cross-check, VmHWM of /proc/self/status: {probe['hwm_before'] / MB:.0f} MB → "
        f"{probe['hwm_after'] / MB:.0f} MB",
    )
    traced_note = (
        "tracemalloc peak of a second solve in the same subprocess: numpy buffers and Python "
        f"objects, not SuperLU's malloc; {probe['traced_kept'] / MB:.0f} MB still held by the "
        "results",
    )
    return [
        Row("100k segments: peak memory (ru_maxrss Δ)", rss_delta / MB, "MB", 500.0, notes=notes),
        Row(
            "100k segments: peak memory (tracemalloc)",
            probe["traced_peak"] / MB,
            "MB",
            500.0,
            gate=False,
            notes=traced_note,
        ),
        Row(
            "100k segments: first solve, fresh process",
            probe["first_solve"] * MS,
            "ms",
            notes=("one call in the memory subprocess: first touch of every page included",),
        ),
        Row("100k segments: model building (no target)", probe["build"] * MS, "ms"),
    ]


class _CountingLapack:
    """Stands in for scipy.linalg.lapack inside assembly.py, counting factorizations."""

    def __init__(self, lapack: Any) -> None:
        self.lapack = lapack
        self.factorizations = 0

    def __getattr__(self, name: str) -> Any:
        function = getattr(self.lapack, name)
        if name.endswith(("gttrf", "gbtrf")):

            def counted(*args: Any, **kwargs: Any) -> Any:
                self.factorizations += 1
                return function(*args, **kwargs)

            return counted
        return function


def _count_factorizations(model: Any) -> int:
    """LU factorizations made by one ``solve(model)`` (LAPACK band and SuperLU)."""
    counting = _CountingLapack(assembly.lapack)
    original_splu = assembly.spla.splu
    calls = 0

    def splu(*args: Any, **kwargs: Any) -> Any:
        nonlocal calls
        calls += 1
        return original_splu(*args, **kwargs)

    assembly.lapack = counting  # type: ignore[assignment]
    assembly.spla.splu = splu
    try:
        analysis.solve(model)
    finally:
        assembly.lapack = counting.lapack
        assembly.spla.splu = original_splu
    return counting.factorizations + calls


def _many_cases() -> list[Row]:
    model = many_case_model(50, 1000)
    analysis.solve(model)  # columns taken once per model
    plain = plain_system(model)
    ours, bare = time_pair(
        lambda: analysis.solve(model),
        lambda: bare_solve(plain),
        repeats=60,
        warmup=3,
    )
    n_elements = len(analysis.build_mesh(model).node_x) - 1
    notes = (
        f"1000 cases, one point torque each on a segment joint ({n_elements} elements); our "
        f"side solve(model) median {ours.median * MS:.2f} ms (p95 {ours.p95 * MS:.2f}), bare "
        f"side G·J/L + band + loads + solve_banded with 1000 right-hand sides, median "
        f"{bare.median * MS:.2f} ms; taking turns, {len(ours.times)} calls each",
        agreement(model, bare_solve(plain)),
        f"per call, ours: {resource_use(lambda: analysis.solve(model), 20)}; bare: "
        f"{resource_use(lambda: bare_solve(plain), 20)}",
    )
    ratio = Row(
        "50 seg., 1000 cases: solve / bare solve_banded",
        ours.median / bare.median,
        "×",
        5.0,
        notes=notes,
    )
    count = _count_factorizations(model)
    scattered = many_case_model(50, 1000, on_joints=False)
    scattered_timing = time_calls(
        lambda: analysis.solve(scattered), repeats=20, warmup=2, budget=3.0
    )
    scattered_note = (
        "same, torques anywhere: every case adds a node (mesh "
        f"{len(analysis.build_mesh(scattered).node_x) - 1} elements)",
    )
    return [
        _with_hot_spots(ratio, model),
        Row("50 segments, 1000 cases: solve median", ours.median * MS, "ms", 50.0),
        Row("50 segments, 1000 cases: LU factorizations", count, "", 1.0),
        Row(
            "50 seg., 1000 cases off the joints: solve",
            scattered_timing.median * MS,
            "ms",
            notes=scattered_note,
        ),
    ]


def _batch_sweep() -> list[Row]:
    model = demo_shaft_model(20, distributed=False)
    segments = case_table(model).segments
    scale = np.linspace(0.7, 1.3, 10_000)[:, None]
    outer = segments.outer_diameter_start[0] * scale
    inner = segments.inner_diameter[0] * scale
    timing = time_calls(
        lambda: solve_batch(model, outer_diameter=outer, inner_diameter=inner),
        repeats=9,
        warmup=1,
        collect_between=True,
    )
    batch = solve_batch(model, outer_diameter=outer, inner_diameter=inner)
    if not batch.valid.all():
        msg = f"the sweep has invalid variants: {batch.reasons[int(np.argmin(batch.valid))]}"
        raise AssertionError(msg)
    alone = time_calls(lambda: analysis.solve(model), repeats=200, warmup=5)
    worst = 0.0
    for number in (0, 4_999, 9_999):  # a variant written as its own model agrees
        variant = _scaled_model(model, float(scale[number, 0]))
        reference = analysis.solve(variant).torque
        worst = max(worst, float(np.abs(batch.torque[number] - reference).max()))
    notes = (
        f"10,000 diameters (×0.7 to ×1.3 of every segment's), 3 load cases, stations, T, θ, τ "
        f"and the nominal stress per torque of every variant; median of {len(timing.times)}, "
        f"p95 {timing.p95 * MS:.0f} ms",
        f"one-by-one solve(model) of a variant: median {alone.median * MS:.3f} ms, i.e. "
        f"{alone.median * 10_000:.1f} s for 10,000 ({alone.median * 10_000 / timing.median:.0f}× "
        f"the batch); three variants solved alone agree to {worst:.1e} N·m",
    )
    return [
        Row(
            "10,000-variant diameter sweep: solve_batch",
            timing.median * MS,
            "ms",
            1000.0,
            notes=notes,
        )
    ]


def _scaled_model(model: Any, factor: float) -> Any:
    """The demo model with every section's diameters scaled."""
    from workbench.solver.sections import SolidCircle, Tube

    def scaled(section: Any) -> Any:
        if isinstance(section, SolidCircle):
            return SolidCircle(section.diameter * factor)
        return Tube(section.outer_diameter * factor, section.inner_diameter * factor)

    shaft = model.shafts[0]
    segments = tuple(
        dataclasses.replace(
            segment,
            layers=tuple(
                dataclasses.replace(layer, section=scaled(layer.section))
                for layer in segment.layers
            ),
        )
        for segment in shaft.segments
    )
    return dataclasses.replace(model, shafts=(dataclasses.replace(shaft, segments=segments),))


class _DenseFactor:
    """Stand-in for assembly.BandFactor: densify the assembled band, LAPACK dense LU (?getrf,
    ?getrs, and ?gecon for the condition estimate every solve makes)."""

    def __init__(self, band: assembly.Band) -> None:
        self.band = band
        self.matrix = assembly.band_to_sparse(band).toarray()
        self.lu, self.pivots, _ = lapack.dgetrf(self.matrix)
        self.zero_pivots = np.zeros(0, dtype=np.intp)

    @property
    def order(self) -> int:
        return self.band.size

    @property
    def rcond(self) -> float:
        norm = float(np.abs(self.matrix).sum(axis=0).max())
        return float(lapack.dgecon(self.lu, norm, norm="1")[0])

    def block_rcond(self, n_blocks: int) -> FloatArray:
        assert n_blocks == 1
        return np.array([self.rcond])

    m_matrix_rcond = block_rcond

    def solve(self, rhs: FloatArray, transpose: bool = False) -> FloatArray:
        solution, _ = lapack.dgetrs(self.lu, self.pivots, rhs, trans=int(transpose))
        return np.asarray(solution)


def _versus_dense() -> list[Row]:
    model = demo_shaft_model(2000, distributed=False)
    plain = plain_system(model)
    analysis.solve(model)
    ours = time_calls(lambda: analysis.solve(model), repeats=50, warmup=3, budget=2.0)
    original = statics.BandFactor
    statics.BandFactor = _DenseFactor  # type: ignore[assignment,misc]
    try:
        dense_results = analysis.solve(model)
        dense_pipeline = time_calls(lambda: analysis.solve(model), repeats=7, budget=3.0)
    finally:
        statics.BandFactor = original  # type: ignore[misc]
    bare = bare_solve(plain)
    stiffness = plain.modulus * (np.pi / 32.0) * (plain.outer**4 - plain.inner**4) / plain.length
    size = len(stiffness) - 1
    matrix = np.diag(stiffness[:-1] + stiffness[1:])
    matrix[plain.spring_node - 1, plain.spring_node - 1] += plain.spring_stiffness
    matrix -= np.diag(stiffness[1:-1], 1) + np.diag(stiffness[1:-1], -1)
    rhs = np.zeros((size + 2, plain.n_cases))
    np.add.at(rhs, (plain.load_node, plain.load_case), plain.load)
    dense_timing = time_calls(lambda: np.linalg.solve(matrix, rhs[1:-1]), repeats=7, budget=3.0)
    error = float(
        np.max(np.abs(dense_results.node_angle[:3, 1:-1].T - bare)) / np.max(np.abs(bare))
    )
    checks = (
        f"system: {size} free rotations × 3 load cases; {agreement(model, bare)}; the dense-LU "
        f"solve() run matches it to {error:.1e}",
    )
    pipeline_notes = (
        f"dense side: the whole solve(model) with its band factorization swapped for "
        f"LAPACK dense LU (?getrf/?getrs, ?gecon for the condition number) on the densified "
        f"matrix, median {dense_pipeline.median * MS:.1f} ms",
        f"our side: the whole solve(model) as it is, median {ours.median * MS:.2f} ms",
        *checks,
    )
    bare_notes = (
        f"dense side: np.linalg.solve (LAPACK LU) on the ready dense matrix and loads only, "
        f"median {dense_timing.median * MS:.1f} ms; our side: the whole solve(model), "
        f"{ours.median * MS:.2f} ms (the harshest reading: only our side meshes and recovers)",
    )
    pipeline = Row(
        "2000 seg.: solve() with dense LU / as is",
        dense_pipeline.median / ours.median,
        "×",
        20.0,
        sense=">=",
        notes=pipeline_notes,
    )
    bare_row = Row(
        "2000 seg.: bare dense solve / solve()",
        dense_timing.median / ours.median,
        "×",
        20.0,
        sense=">=",
        gate=False,
        notes=bare_notes,
    )
    return [_with_hot_spots(pipeline, model), bare_row]


def _core_versus_banded() -> list[Row]:
    """The factor-and-solve core on the assembled band against ``solve_banded``."""
    model = demo_shaft_model(100_000, distributed=False)
    plain = plain_system(model)
    table = case_table(model)
    solution = statics.solve_table(table)
    band = solution.factor.band  # type: ignore[union-attr]
    rhs = np.zeros((table.n_cases, 1, band.size))
    mesh = solution.mesh
    nodes = mesh.nodes_of(table.torque_shaft, table.torque_x)
    np.add.at(rhs, (table.torque_case, 0, nodes), table.torque[0])

    def core() -> FloatArray:
        # A copy in Fortran order: the solve overwrites its right-hand sides.
        loads = np.array(rhs.reshape(table.n_cases, -1).T, order="F")
        return assembly.BandFactor(band).solve(loads)

    stiffness = plain.modulus * (np.pi / 32.0) * (plain.outer**4 - plain.inner**4) / plain.length
    ours, reference = time_pair(core, lambda: bare_solve(plain), repeats=21, warmup=2)
    error = float(
        np.max(np.abs(core()[1:-1] - bare_solve(plain))) / np.max(np.abs(bare_solve(plain)))
    )
    notes = (
        f"core: BandFactor (dgttrf + dgttrs, fixed rows held in place) on the assembled band of "
        f"{band.size} rotations × 3 cases, median {ours.median * MS:.2f} ms",
        f"reference: the bare build + scipy.linalg.solve_banded, median "
        f"{reference.median * MS:.2f} ms ({len(stiffness)} elements); solutions agree to "
        f"{error:.1e} (relative)",
    )
    return [
        Row(
            "100k seg.: band core / bare solve_banded",
            ours.median / reference.median,
            "×",
            10.0,
            notes=notes,
        )
    ]


_IMPORT_PROBE = """
    import json, sys, time
    start = time.perf_counter()
    import {module}
    elapsed = time.perf_counter() - start
    loaded = sorted(name for name in ("numpy", "scipy", "scipy.sparse", "pint", "pandas",
                    "matplotlib", "ipywidgets", "bqplot", "nbconvert") if name in sys.modules)
    print(json.dumps({{"elapsed": elapsed, "loaded": loaded}}))
"""


def _import_times() -> list[Row]:
    rows = []
    for module in ("workbench.solver", "workbench.solver.analysis"):
        probes = [run_fresh_python(_IMPORT_PROBE.format(module=module)) for _ in range(3)]
        elapsed = statistics.median(probe["elapsed"] for probe in probes)
        loaded = ", ".join(probes[0]["loaded"]) or "none of numpy, scipy, pint, pandas, widgets"
        note = f"`import {module}` in a fresh interpreter (median of 3); also loads: {loaded}"
        rows.append(Row(f"import {module}", elapsed * MS, "ms", notes=(note,)))
    return rows


def versus_banded() -> list[Row]:
    """The factor-and-solve core against ``solve_banded`` (run in a fresh interpreter)."""
    return _core_versus_banded()


def pipeline() -> list[Row]:
    """The whole pipeline at 10⁵ and 10⁶ segments (run in a fresh interpreter)."""
    return pipeline_versus_bare()


def run() -> list[Row]:
    """Every solver benchmark, in the order of the targets."""
    return [
        *_small_shaft(),
        *_large_shaft(),
        # A fresh process: the 10⁶-segment model's objects would shape the other figures' heap.
        *rows_in_fresh_process(__name__, "pipeline"),
        *_many_cases(),
        *_batch_sweep(),
        *_versus_dense(),
        *rows_in_fresh_process(__name__, "versus_banded"),
        *_import_times(),
    ]
