"""Speed of the design checks and of sizing against their targets.

Targets (on the 2-core reference machine):

* Checks of a 20-segment shaft with 5 load cases: ``run_checks(results)`` median ≤ 5 ms (p95 and
  solve + checks reported beside it).
* Sizing 5 segments to R40 preferred sizes, re-solving the whole system at every step:
  ``size_shafts`` median ≤ 200 ms.
* Every static check of 10,000 variants of a 20-segment shaft with 5 results, judged at once by
  ``static_utilisations`` on synthetic arrays shaped as a batched solve returns them: median
  ≤ 500 ms, half of the 1 s a batched diameter sweep may take with its solve (the other half is
  the batched solve's). The same with one result is reported beside it.

Models are invented demo shafts (for timing only), built on :mod:`tests.benchmarks.common`.
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from tests.benchmarks.common import Row, demo_steel, many_case_model, time_calls
from workbench.case.design import DesignCriteria, RotationLimit
from workbench.design.checks import model_check_inputs, run_checks
from workbench.design.sizing import SizingRequest, size_shafts
from workbench.design.static_checks import StaticCheckInputs, static_utilisations
from workbench.solver.analysis import solve
from workbench.solver.model import LoadCase, Model, PointTorque, Segment, Shaft, Support
from workbench.solver.sections import SolidCircle

MS = 1e3


def checks_model(segments: int = 20, cases: int = 5) -> Any:
    """The demo line shaft with every check kind switched on.

    Shoulder fillets (2 mm) on every segment after the first, keyseats and Ø6 mm cross holes on
    the solid segments, a twist-rate limit and a rotation limit over the whole shaft.
    """
    base = many_case_model(segments, cases)
    shaft = base.shafts[0]
    detailed = tuple(
        dataclasses.replace(
            segment,
            fillet_radius=0.002 if number else None,
            keyseat=number % 2 == 0,
            cross_hole_diameter=0.006 if number % 2 == 0 else None,
        )
        for number, segment in enumerate(shaft.segments)
    )
    shaft = dataclasses.replace(shaft, segments=detailed)
    design = DesignCriteria(
        factor_of_safety=2.0,
        max_twist_rate=0.02,
        rotation_limits=(RotationLimit(shaft.id, 0.0, shaft.length, 0.01),),
    )
    return Model(shafts=(shaft,), supports=base.supports, load_cases=base.load_cases, design=design)


def sizing_model(segments: int = 5) -> Model:
    """A shaft fixed at both ends, 60 mm solid steps, a torque inside every segment.

    A torque inside each segment keeps every segment loaded whatever the others' sizes, so the
    search has a finite answer for each.
    """
    steel = demo_steel()
    lengths = [0.20 + 0.05 * (number % 3) for number in range(segments)]
    shaft = Shaft(
        "drive", tuple(Segment.single(length, steel, SolidCircle(0.060)) for length in lengths)
    )
    middles = [float(shaft.boundaries[i] + 0.5 * lengths[i]) for i in range(segments)]
    torques = tuple(
        PointTorque("drive", x, (900.0 if number % 2 == 0 else -500.0) * (1 + 0.2 * number))
        for number, x in enumerate(middles)
    )
    return Model(
        shafts=(shaft,),
        supports=(Support("drive", 0.0), Support("drive", shaft.length)),
        load_cases=(LoadCase("drive", torques),),
        design=DesignCriteria(factor_of_safety=2.0, max_twist_rate=0.03),
    )


def _checks() -> list[Row]:
    model = checks_model()
    results = solve(model)
    report = run_checks(results)
    timing = time_calls(lambda: run_checks(results), repeats=500, warmup=5, budget=2.0)
    both = time_calls(lambda: run_checks(solve(model)), repeats=500, warmup=5, budget=2.0)
    note = (
        f"{len(report.checks)} checks ({len(results.names)} results × every segment and kind); "
        f"{len(timing.times)} timed calls of run_checks(results), solve excluded; p95 "
        f"{timing.p95 * MS:.2f} ms; solve + run_checks median {both.median * MS:.2f} ms"
    )
    return [
        Row(
            "20 segments, 5 cases: checks median",
            timing.median * MS,
            "ms",
            5.0,
            notes=(note,),
        ),
        Row("20 segments, 5 cases: solve + checks median", both.median * MS, "ms", 5.0, gate=False),
    ]


def _sizing() -> list[Row]:
    model = sizing_model()
    request = SizingRequest.from_arguments(model, None, "R40")
    outcome = size_shafts(model, request)
    if not outcome.passes:
        msg = "the sizing benchmark's model found no passing sizes"
        raise AssertionError(msg)
    timing = time_calls(lambda: size_shafts(model, request), repeats=50, warmup=1, budget=3.0)
    sizes = ", ".join(f"{row.diameter_after * MS:g}" for row in outcome.segments)
    note = (
        f"5 segments fixed at both ends, R40; {outcome.evaluations} solve-and-check evaluations; "
        f"sizes {sizes} mm; {len(timing.times)} timed calls, p95 {timing.p95 * MS:.1f} ms"
    )
    return [Row("5 segments: sizing median", timing.median * MS, "ms", 200.0, notes=(note,))]


def variant_batch(variants: int = 10_000, results: int = 5, seed: int = 1) -> StaticCheckInputs:
    """Synthetic inputs of ``variants`` variants of :func:`checks_model` (20 segments).

    Each variant scales each segment's diameter by its own factor s in [0.8, 1.25]: the stress
    per unit torque by s⁻³, the rigidity by s⁴; its torques by a factor in [0.5, 1.5] (a stand-in
    for the split a batched solve would find), and each shoulder's smaller side is drawn. The
    arrays have the shapes and magnitudes a batched solve of the topology gives.
    """
    model = checks_model(cases=results)
    one = model_check_inputs(solve(model), model.design).inputs
    rng = np.random.default_rng(seed)
    segments = len(one.segment_start)
    stations = one.torque.shape[-1]
    scale = rng.uniform(0.8, 1.25, (variants, segments))
    station_scale = np.repeat(scale, np.diff(np.append(one.segment_start, stations)), axis=1)

    def tile(array: Any) -> Any:
        return np.repeat(array, variants, axis=0)

    previous = np.maximum(one.segment_start - 1, 0)
    return StaticCheckInputs(
        segment_start=one.segment_start,
        torque=tile(one.torque) * rng.uniform(0.5, 1.5, (variants, 1, 1)),
        station_x=tile(one.station_x),
        stress_per_torque=tile(one.stress_per_torque) / station_scale[:, None, :] ** 3,
        allowable=tile(one.allowable),
        torsional_rigidity=tile(one.torsional_rigidity) * station_scale**4,
        twist_rate_limit=tile(one.twist_rate_limit),
        concentration=tile(one.concentration),
        nominal_stress_per_torque=tile(one.nominal_stress_per_torque) / scale[:, None, :] ** 3,
        shoulder_station=np.where(
            rng.random((variants, segments)) < 0.5, one.segment_start, previous
        ).astype(np.intp),
        angle=tile(one.angle),
        rotation_start=one.rotation_start,
        rotation_end=one.rotation_end,
        rotation_limit=tile(one.rotation_limit),
    )


def _batch() -> list[Row]:
    rows = []
    for results, target in ((5, 500.0), (1, None)):
        batch = variant_batch(results=results)

        def judge(batch: StaticCheckInputs = batch) -> Any:
            return static_utilisations(batch).governing_utilisation()

        timing = time_calls(judge, repeats=20, warmup=2, budget=5.0, collect_between=True)
        variants, _, stations = batch.torque.shape
        note = (
            f"{variants:,} variants × {len(batch.segment_start)} segments ({stations} stations), "
            f"{results} result(s); shear, shoulder, keyseat, cross-hole, twist rate and a rotation "
            f"limit, and each variant's governing utilisation; {len(timing.times)} timed calls, "
            f"p95 {timing.p95 * MS:.0f} ms; {timing.median / variants * 1e6:.1f} µs per variant"
        )
        rows.append(
            Row(
                f"10,000 variants, 20 segments, {results} result(s): static checks median",
                timing.median * MS,
                "ms",
                target,
                notes=(note,),
            )
        )
    return rows


def run() -> list[Row]:
    """Every check and sizing benchmark, in the order of the targets."""
    return [*_checks(), *_sizing(), *_batch()]
