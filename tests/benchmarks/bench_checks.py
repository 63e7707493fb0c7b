"""Speed of the design checks and of sizing against their targets.

Targets (on the 2-core reference machine):

* Checks of a 20-segment shaft with 5 load cases: ``run_checks(results)`` median ≤ 5 ms (p95 and
  solve + checks reported beside it).
* Sizing 5 segments to R40 preferred sizes, re-solving the whole system at every step:
  ``size_shafts`` median ≤ 200 ms.

Models are invented demo shafts (for timing only), built on :mod:`tests.benchmarks.common`.
"""

from __future__ import annotations

import dataclasses
from typing import Any

from tests.benchmarks.common import Row, demo_steel, many_case_model, time_calls
from workbench.case.design import DesignCriteria, RotationLimit
from workbench.design.checks import run_checks
from workbench.design.sizing import SizingRequest, size_shafts
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


def run() -> list[Row]:
    """Every check and sizing benchmark, in the order of the targets."""
    return [*_checks(), *_sizing()]
