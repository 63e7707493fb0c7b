"""Speed of the batch path of the design layer: a batched diameter sweep, and sizing the demo.

Targets (on the 2-core reference machine):

* A batched diameter sweep, 10,000 variants of a 20-segment shaft with every static check
  (shear stress, shoulder fillets, keyseats, notches, cross holes, twist rate and a rotation
  limit, 5 results), solved and judged by
  :func:`~workbench.design.batch_checks.governing_utilisations`: median ≤ 1 s. Measured beside
  it in the same run, the baseline: the one-by-one loop ``run_checks(solve(model))`` over the
  variants' own models, timed on a sample and scaled to 10,000 (the two must agree first).
* ``workbench size`` on the demo case: ``size_shafts`` in-process and the command in a fresh
  interpreter, reported for information (the sizes and evaluation counts are those of the
  one-model-per-candidate search it replaced, held by tests/test_sizing.py).

Models are invented demo shafts (for timing only).
"""

from __future__ import annotations

import dataclasses
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

import numpy as np

from tests.benchmarks.bench_checks import checks_model
from tests.benchmarks.common import Row, time_calls
from workbench.design.batch_checks import governing_utilisations
from workbench.design.checks import run_checks
from workbench.design.sizing import SizingRequest, size_shafts
from workbench.design.variant_model import variant_model
from workbench.solver.analysis import solve
from workbench.solver.batch import solve_batch
from workbench.solver.columns import case_table
from workbench.solver.io import load_case
from workbench.solver.model import Model, Notch

MS = 1e3
DEMO = Path(__file__).resolve().parents[2] / "workbench" / "cases" / "press_drive.json"


def sweep_model() -> Model:
    """:func:`~tests.benchmarks.bench_checks.checks_model` with a notch on every odd segment.

    So every static check kind is there: shoulders, keyseats and cross holes on the even
    segments, a stated notch (Kts 2) on the odd ones, a twist-rate limit and a rotation limit.
    """
    model = checks_model()
    shaft = model.shafts[0]
    segments = tuple(
        dataclasses.replace(segment, notch=Notch(2.0, description="groove"))
        if number % 2
        else segment
        for number, segment in enumerate(shaft.segments)
    )
    return dataclasses.replace(model, shafts=(dataclasses.replace(shaft, segments=segments),))


def diameter_columns(model: Model, variants: int, seed: int = 1) -> dict[str, Any]:
    """Each variant scales each segment's outer diameter and bore by its own factor in
    [0.8, 1.25] (a diameter sweep of every segment at once)."""
    table = case_table(model).segments
    scale = np.random.default_rng(seed).uniform(0.8, 1.25, (variants, table.n_segments))
    return {
        "outer_diameter": table.outer_diameter_start * scale,
        "inner_diameter": table.inner_diameter * scale,
    }


def _sweep() -> list[Row]:
    model = sweep_model()
    variants = 10_000
    columns = diameter_columns(model, variants)
    timing = time_calls(
        lambda: governing_utilisations(model, **columns),
        repeats=10,
        warmup=1,
        budget=20.0,
        collect_between=True,
    )
    verdicts = governing_utilisations(model, **columns)
    solved = time_calls(lambda: solve_batch(model, **columns), repeats=10, warmup=1, budget=10.0)
    sample = 40  # variants the one-by-one loop is timed on, then scaled to the whole sweep
    models = [variant_model(model, verdicts.batch.table, number) for number in range(sample)]

    def one_by_one() -> list[float]:
        return [run_checks(solve(alone)).governing.utilisation for alone in models]  # type: ignore[union-attr]

    alone = one_by_one()
    if not np.allclose(verdicts.utilisation[:sample], alone, rtol=1e-9, atol=0.0):
        raise AssertionError("the batched sweep and the one-by-one loop differ")
    loop = time_calls(one_by_one, repeats=3, warmup=0, budget=20.0)
    scaled = loop.median * variants / sample
    kinds = sorted({verdicts.kind_name(number) or "-" for number in range(variants)})
    stations = verdicts.batch.station_x.shape[1]
    note = (
        f"{variants:,} variants × {verdicts.layout.segments} segments ({stations} stations), "
        f"{len(verdicts.batch.names)} results; every segment's outer diameter and bore scaled by "
        f"its own factor; solve_batch alone {solved.median * MS:.0f} ms; governing kinds found: "
        f"{', '.join(kinds)}; {int(verdicts.valid.sum()):,} valid; {len(timing.times)} timed "
        f"calls, p95 {timing.p95 * MS:.0f} ms"
    )
    baseline = (
        f"run_checks(solve(model)) of each variant's own model, timed on {sample} variants "
        f"({loop.median / sample * MS:.1f} ms each) and scaled to {variants:,}: "
        f"{scaled / timing.median:.0f}× the batch"
    )
    return [
        Row(
            "10,000 variants × 20 segments, every static check: batched sweep median",
            timing.median * MS,
            "ms",
            1000.0,
            notes=(note,),
        ),
        Row(
            "10,000 variants × 20 segments, every static check: one by one (baseline)",
            scaled * MS,
            "ms",
            notes=(baseline,),
        ),
    ]


def _sizing() -> list[Row]:
    model = load_case(DEMO)
    request = SizingRequest.from_arguments(model, None, "R40")
    outcome = size_shafts(model, request)
    timing = time_calls(lambda: size_shafts(model, request), repeats=30, warmup=1, budget=5.0)
    command = [sys.executable, "-m", "workbench.cli", "size", str(DEMO)]
    walls = []
    for _ in range(5):
        start = time.perf_counter()
        subprocess.run(command, check=True, capture_output=True)
        walls.append(time.perf_counter() - start)
    sizes = ", ".join(f"{row.diameter_after * MS:g}" for row in outcome.segments)
    note = (
        f"the demo, R40: {outcome.evaluations} evaluations, sizes {sizes} mm; each step's "
        f"candidates judged as one batch; {len(timing.times)} timed calls, p95 "
        f"{timing.p95 * MS:.0f} ms"
    )
    return [
        Row("workbench size on the demo: size_shafts median", timing.median * MS, "ms",
            notes=(note,)),
        Row("workbench size on the demo: the command, fresh interpreter, median",
            float(np.median(walls)) * MS, "ms",
            notes=("python -m workbench.cli size press_drive.json, 5 runs",)),
    ]  # fmt: skip


def run() -> list[Row]:
    """The batched sweep against its baseline, then sizing the demo."""
    return [*_sweep(), *_sizing()]
