"""The static checks as array functions over a batch of variants (hypothesis).

Two references, both outside the array code:

* plain Python loops over variants, results, segments and stations, written here from the
  definitions of the checks (the largest |T|·s of each layer against its allowable, K·|T|·s_nom,
  |T|/(G·K), |θ(end) − θ(start)|; Shigley's *Mechanical Engineering Design*, 9th ed., ch. 3, 5
  and 7), on random arrays;
* :func:`run_checks` of each variant's model one at a time: a batch stacked from models of one
  topology (what a batched solve returns) must give every static row of every model's report to
  1e-12, whatever each variant's sizes, materials, criterion and loads.
"""

from __future__ import annotations

import doctest
import math
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from workbench.case.design import DesignCriteria
from workbench.design import static_checks
from workbench.design.checks import model_check_inputs, run_checks
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    STATIC_KINDS,
    StaticCheckInputs,
    segment_peaks,
    static_utilisations,
)
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.model import Model

SETTINGS = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
TOLERANCE = 1e-12


# --- against plain loops ---------------------------------------------------------------------


@st.composite
def segment_layouts(draw: st.DrawFn) -> tuple[np.ndarray, int]:
    counts = draw(st.lists(st.integers(1, 5), min_size=1, max_size=6))
    return np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.intp), int(sum(counts))


@given(layout=segment_layouts(), data=st.data())
@SETTINGS
def test_segment_peaks_are_each_segments_max_and_first_argmax(
    layout: tuple[np.ndarray, int], data: st.DataObject
) -> None:
    start, stations = layout
    # Small integers make ties common: the first station of a tie must be reported, as argmax.
    values = data.draw(arrays(np.float64, (3, stations), elements=st.integers(-3, 3).map(float)))
    peaks, where = segment_peaks(values, start)
    ends = [*start[1:], stations]
    for row in range(3):
        for segment, (first, last) in enumerate(zip(start, ends, strict=True)):
            window = values[row, first:last]
            assert peaks[row, segment] == window.max()
            assert where[row, segment] == first + int(np.argmax(window))


@st.composite
def random_inputs(draw: st.DrawFn) -> StaticCheckInputs:
    start, stations = draw(segment_layouts())
    segments, slots, variants, results = len(start), draw(st.integers(1, 2)), 3, 2
    rng = np.random.default_rng(draw(st.integers(0, 2**32 - 1)))
    concentration = rng.uniform(1.0, 3.0, (variants, len(CONCENTRATION_KINDS), segments))
    concentration[rng.random(concentration.shape) < 0.4] = np.nan  # details a segment lacks
    concentration[:, 0, 0] = np.nan  # no shoulder before the first segment
    twist_limit = rng.uniform(0.01, 0.05, (variants, segments))
    twist_limit[rng.random(twist_limit.shape) < 0.3] = np.nan
    allowable = rng.uniform(50e6, 200e6, (variants, slots, segments))
    stress = rng.uniform(1e4, 1e6, (variants, slots, stations))
    if slots == 2:  # the first segment has one layer only
        allowable[:, 1, 0] = np.inf
        stress[:, 1, : (start[1] if segments > 1 else stations)] = 0.0
    shoulder = np.where(rng.random((variants, segments)) < 0.5, start, np.maximum(start - 1, 0))
    points = 4
    return StaticCheckInputs(
        segment_start=start,
        torque=rng.uniform(-2000.0, 2000.0, (variants, results, stations)),
        station_x=np.cumsum(rng.uniform(0.0, 0.1, (variants, stations)), axis=1),
        stress_per_torque=stress,
        allowable=allowable,
        torsional_rigidity=rng.uniform(1e3, 1e5, (variants, stations)),
        twist_rate_limit=twist_limit,
        concentration=concentration,
        nominal_stress_per_torque=rng.uniform(1e4, 1e6, concentration.shape),
        shoulder_station=shoulder.astype(np.intp),
        angle=rng.uniform(-0.1, 0.1, (variants, results, points)),
        rotation_start=np.array([0, 1], dtype=np.intp),
        rotation_end=np.array([3, 2], dtype=np.intp),
        rotation_limit=rng.uniform(0.01, 0.1, (variants, 2)),
    )


def _looped_value(inputs: StaticCheckInputs, v: int, r: int, kind: str, g: int) -> float:
    """The governing value by loops over stations and layers, from the checks' definitions."""
    ends = [*inputs.segment_start[1:], inputs.torque.shape[-1]]
    window = range(inputs.segment_start[g], ends[g])
    torque = [abs(inputs.torque[v, r, s]) for s in window]
    if kind == "shear_stress":
        best, value = -math.inf, math.nan
        for k in range(inputs.stress_per_torque.shape[1]):
            peak = max(
                t * inputs.stress_per_torque[v, k, s] for t, s in zip(torque, window, strict=True)
            )
            if peak / inputs.allowable[v, k, g] > best:
                best, value = peak / inputs.allowable[v, k, g], peak
        return value
    if kind == "twist_rate":
        return max(t / inputs.torsional_rigidity[v, s] for t, s in zip(torque, window, strict=True))
    detail = CONCENTRATION_KINDS.index(kind)
    factor = inputs.concentration[v, detail, g]
    nominal = inputs.nominal_stress_per_torque[v, detail, g]
    if kind == "shoulder_stress":
        return factor * abs(inputs.torque[v, r, inputs.shoulder_station[v, g]]) * nominal
    return max(factor * t * nominal for t in torque)


@given(data=st.data())
@SETTINGS
def test_array_checks_equal_loops_over_variants_results_and_segments(data: st.DataObject) -> None:
    inputs = data.draw(random_inputs())
    judged = static_utilisations(inputs)
    variants, results, _ = inputs.torque.shape
    for v in range(variants):
        for r in range(results):
            for c, kind in enumerate(STATIC_KINDS):
                for g in range(len(inputs.segment_start)):
                    if kind == "twist_rate":
                        exists = not math.isnan(inputs.twist_rate_limit[v, g])
                    elif kind == "shear_stress":
                        exists = True
                    else:
                        exists = not math.isnan(inputs.concentration[v, c - 1, g])
                    assert judged.checked[v, c, g] == exists
                    if not exists:
                        assert math.isnan(judged.value[v, r, c, g])
                        continue
                    expected = _looped_value(inputs, v, r, kind, g)
                    assert judged.value[v, r, c, g] == pytest.approx(expected, rel=TOLERANCE)
            for limit in range(2):
                start, end = inputs.rotation_start[limit], inputs.rotation_end[limit]
                rotation = abs(inputs.angle[v, r, end] - inputs.angle[v, r, start])
                assert judged.rotation_value[v, r, limit] == rotation
    every = np.concatenate(
        [
            judged.utilisation.reshape(variants, -1),
            judged.rotation_utilisation.reshape(variants, -1),
        ],
        axis=1,
    )
    assert np.array_equal(judged.governing_utilisation(), np.nanmax(every, axis=1))


# --- a batch against run_checks one model at a time ------------------------------------------

GRID = 8  # rotation limits and loads sit on a grid of the shaft length
#: (start, end) grid points of up to two rotation limits.
ROTATION_PAIRS = st.lists(
    st.tuples(st.integers(0, GRID), st.integers(0, GRID)).filter(lambda p: p[0] != p[1]),
    max_size=2,
)
#: Grid points (of half the grid's step) where the torques of every load case act.
LOAD_PLACES = st.lists(st.integers(1, 2 * GRID - 1), min_size=1, max_size=3)


@st.composite
def topologies(draw: st.DrawFn) -> dict[str, Any]:
    """What every variant shares: shafts, segment kinds, details, load and limit positions."""
    shafts = []
    for shaft_number in range(draw(st.integers(1, 2))):
        segments = [
            {
                "kind": draw(st.sampled_from(["solid", "tube", "tapered", "layered"])),
                "length": draw(st.floats(0.05, 0.5)),
                "diameter": draw(st.floats(0.02, 0.08)),
                "fillet": number > 0 and draw(st.booleans()),
                "keyseat": draw(st.booleans()),
                "notch": draw(st.booleans()),
                "hole": draw(st.booleans()),
            }
            for number in range(draw(st.integers(1, 4)))
        ]
        shafts.append({"id": f"s{shaft_number}", "segments": segments})
    return {
        "shafts": shafts,
        "far_support": draw(st.booleans()),
        "twist": draw(st.sampled_from([None, "number", "twenty-diameters", "machine-shaft"])),
        "rotations": draw(ROTATION_PAIRS),
        "load_places": draw(LOAD_PLACES),
    }


def section_of(kind: str, diameter: float) -> dict[str, Any]:
    """The case-file section of a segment kind, its sizes in fixed ratios to ``diameter``."""
    if kind == "tube":
        return {"shape": "tube", "outer_diameter": diameter, "inner_diameter": 0.6 * diameter}
    if kind == "tapered":
        return {"shape": "tapered", "diameter_start": diameter, "diameter_end": 0.8 * diameter}
    if kind == "rectangle":
        return {"shape": "rectangle", "width": diameter, "height": 0.7 * diameter}
    return {"shape": "solid", "diameter": diameter}


@st.composite
def variants(draw: st.DrawFn, topology: dict[str, Any]) -> dict[str, Any]:
    """One model of the topology: its own sizes, strength, criterion, limits and torques."""
    strength = draw(st.floats(200e6, 600e6))
    shafts = []
    for shaft in topology["shafts"]:
        segments = []
        for spec in shaft["segments"]:
            # Scaling a taper or a tube keeps its station count (the quadrature pieces follow
            # the ratio of its diameters).
            diameter = spec["diameter"] * draw(st.floats(0.7, 1.4))
            segment: dict[str, Any] = {"length": spec["length"]}
            if spec["kind"] == "layered":
                segment["layers"] = [
                    {"material": "sleeve", "section": section_of("tube", diameter)},
                    {"material": "steel", "section": section_of("solid", 0.6 * diameter)},
                ]
            else:
                segment["material"] = "steel"
                segment["section"] = section_of(spec["kind"], diameter)
            if spec["fillet"]:
                segment["fillet_radius"] = 0.04 * diameter
            if spec["keyseat"]:
                segment["keyseat"] = True
            if spec["notch"]:
                segment["notch"] = {"kts": draw(st.floats(1.0, 3.5))}
            if spec["hole"]:
                segment["cross_hole_diameter"] = 0.15 * spec["diameter"]
            segments.append(segment)
        shafts.append({"id": shaft["id"], "segments": segments})
    lengths = {s["id"]: sum(seg["length"] for seg in s["segments"]) for s in shafts}
    supports = [{"shaft": s["id"], "x": 0.0} for s in shafts]
    if topology["far_support"]:
        supports.append({"shaft": "s0", "x": lengths["s0"], "kind": "spring", "stiffness": 2e4})
    cases = [
        {
            "name": name,
            "torques": [
                {
                    "shaft": shaft["id"],
                    "x": lengths[shaft["id"]] * place / (2 * GRID),
                    "torque": draw(st.floats(-2000.0, 2000.0)),
                }
                for shaft in shafts
                for place in topology["load_places"]
            ],
        }
        for name in ("A", "B")
    ]
    design: dict[str, Any] = {
        "factor_of_safety": draw(st.floats(1.2, 3.0)),
        "shear_criterion": draw(st.sampled_from(["von_mises", "tresca"])),
        "rotation_limits": [
            {
                "shaft": "s0",
                "start": lengths["s0"] * min(pair) / GRID,
                "end": lengths["s0"] * max(pair) / GRID,
                "limit": draw(st.floats(0.001, 0.05)),
            }
            for pair in topology["rotations"]
        ],
    }
    if topology["twist"] == "number":
        design["max_twist_rate"] = draw(st.floats(0.005, 0.05))
    elif topology["twist"] is not None:
        design["max_twist_rate"] = topology["twist"]
    return {
        "materials": {
            "steel": {"shear_modulus": 79e9, "yield_strength": strength},
            "sleeve": {"shear_modulus": 40e9, "yield_strength": 0.8 * strength},
        },
        "shafts": shafts,
        "supports": supports,
        "load_cases": cases,
        "combinations": [{"name": "A-B", "factors": {"A": 1.0, "B": -1.0}}],
        "design": design,
    }


@st.composite
def batches(draw: st.DrawFn) -> list[Model]:
    topology = draw(topologies())
    return [parse_case(draw(variants(topology))) for _ in range(draw(st.integers(2, 4)))]


@given(models=batches())
@SETTINGS
def test_a_batch_of_variants_equals_run_checks_one_model_at_a_time(models: list[Model]) -> None:
    solved = [solve(model) for model in models]
    prepared = [model_check_inputs(results, results.model.design) for results in solved]
    batch = StaticCheckInputs.stack([item.inputs for item in prepared])
    judged = static_utilisations(batch)
    governing = judged.governing_utilisation()
    for v, results in enumerate(solved):
        report = run_checks(results)
        rows = [c for c in report.checks if c.kind in (*STATIC_KINDS, "rotation")]
        segment_of = {
            (shaft, number): g
            for g, (shaft, number) in enumerate(
                zip(prepared[v].shafts, prepared[v].numbers, strict=True)
            )
        }
        checked = int(judged.checked[v].sum()) + len(prepared[v].rotation_ends)
        assert len(rows) == checked * len(results.names)
        rotation_seen = [0] * len(results.names)
        for row in rows:
            r = results.names.index(row.result)
            if row.kind == "rotation":
                limit = rotation_seen[r]
                rotation_seen[r] += 1
                got = (judged.rotation_value[v, r, limit], judged.rotation_limit[v, limit])
                assert got == pytest.approx((row.value, row.limit), rel=TOLERANCE, abs=0.0)
                continue
            c, g = STATIC_KINDS.index(row.kind), segment_of[row.shaft, row.segment]
            got = (judged.value[v, r, c, g], judged.limit[v, r, c, g], judged.x[v, r, c, g])
            assert got == pytest.approx((row.value, row.limit, row.x), rel=TOLERANCE, abs=0.0)
        largest = max(row.utilisation for row in rows)
        assert governing[v] == pytest.approx(largest, rel=TOLERANCE, abs=0.0)


# --- the contract of the inputs --------------------------------------------------------------


def _demo_inputs() -> StaticCheckInputs:
    case = {
        "materials": {"steel": {"shear_modulus": 79e9, "yield_strength": 350e6}},
        "shafts": [
            {
                "id": "main",
                "segments": [
                    {"length": 0.3, "material": "steel", "section": {"shape": "solid", "diameter": 0.04}},
                    {"length": 0.2, "material": "steel", "section": {"shape": "solid", "diameter": 0.03},
                     "fillet_radius": 0.002},
                ],
            }
        ],
        "supports": [{"shaft": "main", "x": 0}],
        "load_cases": [{"name": "A", "torques": [{"shaft": "main", "x": 0.5, "torque": 300}]}],
    }  # fmt: skip
    return model_check_inputs(solve(parse_case(case)), DesignCriteria()).inputs


def test_inputs_of_the_wrong_shape_are_refused_naming_the_array() -> None:
    inputs = _demo_inputs()
    with pytest.raises(ValueError, match="allowable has shape"):
        StaticCheckInputs(**{**vars(inputs), "allowable": inputs.allowable[:, :, :1]})
    with pytest.raises(ValueError, match="segment_start"):
        StaticCheckInputs(**{**vars(inputs), "segment_start": inputs.segment_start[::-1]})


def test_batches_of_other_topologies_are_not_stacked() -> None:
    inputs = _demo_inputs()
    other = StaticCheckInputs(
        **{**vars(inputs), "segment_start": inputs.segment_start + np.array([0, 1])}
    )
    with pytest.raises(ValueError, match="one topology"):
        StaticCheckInputs.stack([inputs, other])


def test_the_documented_example_runs() -> None:
    assert doctest.testmod(static_checks, raise_on_error=True).attempted > 0
