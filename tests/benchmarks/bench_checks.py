"""Speed of the design checks and of sizing against their targets.

Targets (on the 2-core reference machine):

* Checks of a 20-segment shaft with 5 load cases: ``run_checks(results)`` median ≤ 5 ms (p95 and
  solve + checks reported beside it).
* Sizing 5 segments to R40 preferred sizes, re-solving the whole system at every step:
  ``size_shafts`` median ≤ 200 ms.
* The stress-concentration factors of 10,000 variants × 20 segments (19 shoulder fillets, 10
  cross holes and 20 twist limits by "1° in 20 diameters" per variant) by the array functions:
  median ≤ 20 ms. Measured beside it in the same run, the baseline: the scalar functions called
  once per segment and variant (timed on 200 variants, scaled to 10,000).
* Every static check of 10,000 variants of a 20-segment shaft with 5 results, from the arrays a
  batched diameter sweep gives — the (V, G) sizes and the solved (V, R, S) arrays — through
  ``batch_check_inputs`` and ``static_utilisations``: median ≤ 500 ms, half of the 1 s a batched
  sweep may take with its solve (the other half is the batched solve's). Judging alone (inputs
  built beforehand) and the same with one result are reported beside it.

Models are invented demo shafts (for timing only), built on :mod:`tests.benchmarks.common`.
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from tests.benchmarks.common import Row, demo_steel, many_case_model, time_calls
from workbench.case.design import DesignCriteria, RotationLimit
from workbench.design.allowables import (
    twenty_diameters_twist_rate,
    twist_rate_one_degree_in_twenty_diameters,
)
from workbench.design.check_inputs import batch_check_inputs
from workbench.design.check_layout import CheckLayout, check_layout
from workbench.design.checks import run_checks
from workbench.design.concentration import (
    shoulder_fillet_factors,
    shoulder_fillet_kts,
)
from workbench.design.sizing import SizingRequest, size_shafts
from workbench.design.static_checks import StaticCheckInputs, static_utilisations
from workbench.design.transverse_hole import transverse_hole_factors, transverse_hole_kts
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


def variant_arrays(
    variants: int = 10_000, results: int = 5, seed: int = 1
) -> tuple[CheckLayout, dict[str, Any]]:
    """The layout of :func:`checks_model` (20 segments) and arrays of ``variants`` variants.

    What a batched diameter sweep hands the checks: each variant scales each segment's diameters
    (outer and bore) by its own factor s in [0.8, 1.25], so the stress per unit torque by s⁻³
    and the rigidity by s⁴; its torques by a factor in [0.5, 1.5] (a stand-in for the split a
    batched solve would find). Fillet radii and hole diameters stay the base's, so r/d and d/D
    vary with the diameters (across the fits' ranges). Arguments of
    :func:`~workbench.design.check_inputs.batch_check_inputs` after the layout.
    """
    model = checks_model(cases=results)
    solved = solve(model)
    mesh = solved.mesh
    layout = check_layout(model, mesh, model.design)
    rng = np.random.default_rng(seed)
    segments, stations = layout.segments, len(mesh.station_x)
    scale = rng.uniform(0.8, 1.25, (variants, segments))
    station_scale = np.repeat(scale, np.diff(np.append(layout.segment_start, stations)), axis=1)
    arrays = {
        "torque": solved.torque[None] * rng.uniform(0.5, 1.5, (variants, 1, 1)),
        "stress_per_torque": mesh.station_stress_per_torque / station_scale**3,
        "torsional_rigidity": mesh.station_rigidity * station_scale**4,
        "angle": np.repeat(solved.node_angle[None], variants, axis=0),
        "outer_diameter_start": layout.outer_diameter_start * scale,
        "outer_diameter_end": layout.outer_diameter_end * scale,
        "bore": layout.bore * scale,
    }
    return layout, arrays


def variant_batch(variants: int = 10_000, results: int = 5, seed: int = 1) -> StaticCheckInputs:
    """The static-check inputs of :func:`variant_arrays`."""
    layout, arrays = variant_arrays(variants, results, seed)
    return batch_check_inputs(layout, **arrays).inputs


def _factor_inputs(layout: CheckLayout, arrays: dict[str, Any]) -> dict[str, Any]:
    """(V, G) arguments of the three fits, as the batch builder reads them."""
    start, end = arrays["outer_diameter_start"], arrays["outer_diameter_end"]
    before = np.full(start.shape, np.nan)
    before[:, 1:] = end[:, :-1]
    return {
        "big": np.fmax(start, before),
        "small": np.fmin(start, before),
        "radius": np.where(layout.shoulder, layout.fillet_radius, np.nan) + 0.0 * start,
        "hole": np.where(layout.cross_hole, layout.cross_hole_diameter, np.nan) + 0.0 * start,
        "middle": 0.5 * (start + end),
        "diameter": np.maximum(start, end),
    }


def _array_factors(inputs: dict[str, Any]) -> Any:
    return (
        shoulder_fillet_factors(inputs["big"], inputs["small"], inputs["radius"]).value,
        transverse_hole_factors(inputs["hole"], inputs["middle"]).value,
        twenty_diameters_twist_rate(inputs["diameter"]),
    )


def _scalar_factors(inputs: dict[str, Any]) -> Any:
    """The same factors by the scalar functions, one call per segment and variant."""
    big, small, radius, hole, middle, diameter = (
        inputs[name].tolist() for name in ("big", "small", "radius", "hole", "middle", "diameter")
    )
    nan = float("nan")
    shoulders, holes, limits = [], [], []
    for v in range(len(big)):  # the baseline: a loop over variants and segments
        for g in range(len(big[v])):
            shoulders.append(
                shoulder_fillet_kts(big[v][g], small[v][g], radius[v][g]).value
                if radius[v][g] == radius[v][g]  # not NaN: a shoulder
                else nan
            )
            holes.append(
                transverse_hole_kts(hole[v][g], middle[v][g]).value
                if hole[v][g] == hole[v][g]
                else nan
            )
            limits.append(twist_rate_one_degree_in_twenty_diameters(diameter[v][g]).value)
    shape = np.shape(inputs["big"])
    return tuple(np.reshape(values, shape) for values in (shoulders, holes, limits))


def _factors() -> list[Row]:
    layout, arrays = variant_arrays()
    inputs = _factor_inputs(layout, arrays)
    variants, segments = inputs["big"].shape
    timing = time_calls(lambda: _array_factors(inputs), repeats=30, warmup=2, budget=3.0)
    sample = 200  # variants the scalar loop is timed on, then scaled to the whole batch
    head = {name: values[:sample] for name, values in inputs.items()}
    scalar = time_calls(lambda: _scalar_factors(head), repeats=3, warmup=1, budget=10.0)
    # The two must agree before their times are compared.
    for by_arrays, by_scalars in zip(_array_factors(head), _scalar_factors(head), strict=True):
        if not np.allclose(by_arrays, by_scalars, rtol=1e-12, atol=0.0, equal_nan=True):
            raise AssertionError("the array and scalar factors differ")
    scaled = scalar.median * variants / sample
    shoulders, holes = (
        int(np.sum(~np.isnan(inputs["radius"]))),
        int(np.sum(~np.isnan(inputs["hole"]))),
    )
    note = (
        f"{variants:,} variants × {segments} segments: {shoulders:,} shoulder fillets, "
        f"{holes:,} cross holes, {variants * segments:,} twist limits by 1° in 20 diameters; "
        f"{len(timing.times)} timed calls, p95 {timing.p95 * MS:.1f} ms"
    )
    baseline = (
        f"the scalar functions, one call per segment and variant, timed on {sample} variants "
        f"({scalar.median * MS:.0f} ms) and scaled to {variants:,}: "
        f"{scalar.median / (sample * segments) * 1e6:.1f} µs per segment; "
        f"{scaled / timing.median:.0f}× the array functions. The scalar functions now wrap the "
        "array ones (numpy on one element), several times the cost per call of the pure-Python "
        "functions they replaced: the gain over the replaced loop is that much smaller"
    )
    return [
        Row(
            "10,000 variants × 20 segments: concentration factors, arrays, median",
            timing.median * MS,
            "ms",
            20.0,
            notes=(note,),
        ),
        Row(
            "10,000 variants × 20 segments: concentration factors, scalar loop (baseline)",
            scaled * MS,
            "ms",
            notes=(baseline,),
        ),
    ]


def _batch() -> list[Row]:
    rows = []
    for results, target in ((5, 500.0), (1, None)):
        layout, arrays = variant_arrays(results=results)
        batch = batch_check_inputs(layout, **arrays).inputs

        def build(layout: CheckLayout = layout, arrays: Any = arrays) -> Any:
            return batch_check_inputs(layout, **arrays)

        def judge(batch: StaticCheckInputs = batch) -> Any:
            return static_utilisations(batch).governing_utilisation()

        def build_and_judge() -> Any:
            return static_utilisations(build().inputs).governing_utilisation()

        timings = [
            time_calls(call, repeats=20, warmup=2, budget=5.0, collect_between=True)
            for call in (build_and_judge, judge, build)
        ]
        both, judged, built = timings
        variants, _, stations = batch.torque.shape
        what = (
            f"{variants:,} variants × {len(batch.segment_start)} segments ({stations} stations), "
            f"{results} result(s): shear, shoulder, keyseat, cross-hole, twist rate and a rotation "
            f"limit, and each variant's governing utilisation"
        )
        rows.append(
            Row(
                f"10,000 variants, 20 segments, {results} result(s): inputs from arrays + static "
                "checks median",
                both.median * MS,
                "ms",
                target,
                notes=(
                    f"{what}; batch_check_inputs from the (V, G) sizes and solved (V, R, S) arrays, "
                    f"then static_utilisations; {len(both.times)} timed calls, p95 "
                    f"{both.p95 * MS:.0f} ms; {both.median / variants * 1e6:.1f} µs per variant; "
                    f"building the inputs alone {built.median * MS:.0f} ms",
                ),
            )
        )
        rows.append(
            Row(
                f"10,000 variants, 20 segments, {results} result(s): static checks alone median",
                judged.median * MS,
                "ms",
                target,
                gate=False,
                notes=(
                    f"the same judged from inputs built beforehand; {len(judged.times)} timed "
                    f"calls, p95 {judged.p95 * MS:.0f} ms",
                ),
            )
        )
    return rows


def run() -> list[Row]:
    """Every check and sizing benchmark, in the order of the targets."""
    return [*_checks(), *_sizing(), *_factors(), *_batch()]
