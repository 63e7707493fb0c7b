"""Verdicts of many variants at once against each variant checked alone (hypothesis).

:func:`workbench.design.batch_checks.governing_utilisations` solves a batch of variants, builds
their check inputs from arrays and judges them at once. Each variant's governing utilisation, and
which check governs (kind, result, shaft, segment), must be what ``run_checks(solve(model))`` of
the variant written as a case file of its own gives (the one-by-one path, itself checked against
handbook values in tests/validation and tests/test_checks.py), to 1e-12; a variant that is not a
valid model is flagged with the field the case-file parser names for the same mistake.

The random cases are those of tests/test_properties.py and tests/test_batch.py (single shafts and
geared pairs, variants of other diameters, lengths, moduli, stiffnesses, gear radii and loads),
with shaft details and design criteria added here. The demo case adds the checks made variant by
variant: fatigue and the separation of natural frequencies from running speeds.
"""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.test_batch import _break, _break_columns, batch_columns, variant_case, variant_factors
from tests.test_properties import (
    angle_scale,
    applied_total,
    geared_cases,
    single_shaft_cases,
)
from workbench.case.errors import InputError
from workbench.design.batch_checks import governing_utilisations
from workbench.design.checks import run_checks
from workbench.solver.analysis import Results, solve
from workbench.solver.io import parse_case

AGREEMENT = 1e-12
SETTINGS = settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])
DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"


@st.composite
def with_checks(draw: st.DrawFn, case: dict[str, Any]) -> dict[str, Any]:
    """The case with yield strengths, shaft details and design criteria."""
    case = copy.deepcopy(case)
    for material in case["materials"].values():
        material["yield_strength"] = draw(st.floats(200e6, 600e6))
    for shaft in case["shafts"]:
        for number, segment in enumerate(shaft["segments"]):
            if number and draw(st.booleans()):
                segment["fillet_radius"] = draw(st.floats(0.0005, 0.005))
            segment["keyseat"] = draw(st.booleans())
            if draw(st.booleans()):
                segment["notch"] = {"kts": draw(st.floats(1.2, 3.0))}
            section = segment["section"]
            if section["shape"] == "solid" and draw(st.booleans()):
                segment["cross_hole_diameter"] = section["diameter"] * draw(st.floats(0.05, 0.5))
    first = case["shafts"][0]
    design: dict[str, Any] = {
        "factor_of_safety": draw(st.floats(1.2, 3.0)),
        "shear_criterion": draw(st.sampled_from(["von_mises", "tresca"])),
        "rotation_limits": [
            {"shaft": first["id"], "start": 0.0, "end": _length(first), "limit": 0.01}
        ],
    }
    twist = draw(st.sampled_from([None, "number", "twenty-diameters"]))
    if twist == "number":
        design["max_twist_rate"] = draw(st.floats(0.005, 0.1))
    elif twist is not None:
        design["max_twist_rate"] = twist
    case["design"] = design
    return case


def _length(shaft: dict[str, Any]) -> float:
    return float(sum(segment["length"] for segment in shaft["segments"]))


def written_alone(case: dict[str, Any], factors: dict[str, Any]) -> dict[str, Any]:
    """The variant as a case file of its own (the rotation limit still spans its shaft)."""
    variant = variant_case(case, factors)
    limit = variant["design"]["rotation_limits"][0]
    limit["end"] = _length(variant["shafts"][0])
    return variant


#: A bound on every concentration factor these draws make (keyseat 3, notches ≤ 3, shoulders
#: with r/d ≥ 0.005, holes with d/D ≤ 0.6): it only sizes the rounding tolerance below.
LARGEST_FACTOR = 5.0


def utilisation_scale(case: dict[str, Any], alone: Results, report: Any) -> float:
    """The utilisation a check would show under the solve's own scale of torque and angle.

    The batched and the one-by-one solve agree to 1e-12 of the torque scale of
    tests/test_batch.py (loads, reactions, and the stiffest element under the size of the
    angles), not of each small torque: a check's utilisation is known to that scale times its
    utilisation per unit torque (stress per torque times its factor over the allowable, or one
    over the rigidity times the twist limit), and a rotation's to the angle scale over its limit.
    """
    angle = angle_scale(case, alone)
    mesh = alone.mesh
    springs = max((support.get("stiffness", 0.0) for support in case["supports"]), default=0.0)
    stiffest = max(springs, float(np.max(1.0 / mesh.flexibility[:, 0])))  # G·K/L of an element
    found = (alone.reactions, alone.torque, alone.gear_torques)
    torque = max(
        *(float(np.abs(values).max(initial=0.0)) for values in found),
        *(applied_total(case, shaft["id"])[1] for shaft in case["shafts"]),
        stiffest * angle,
    )
    allowable = min(check.limit for check in report.checks if check.kind == "shear_stress")
    twist = [check.limit for check in report.checks if check.kind == "twist_rate"]
    per_torque = LARGEST_FACTOR * float(mesh.station_stress_per_torque.max()) / allowable
    if twist:
        per_torque = max(per_torque, 1.0 / float(mesh.station_rigidity.min()) / min(twist))
    rotation = [check.limit for check in report.checks if check.kind == "rotation"]
    return max(torque * per_torque, angle / min(rotation, default=math.inf))


def assert_same_verdict(verdicts: Any, number: int, variant: dict[str, Any]) -> None:
    """The batch's verdict of one variant is the variant's own, alone, to rounding.

    Rows whose utilisation lies within the rounding tolerance of the largest are tied: the batch
    may name any of them (with one such row it must name that one).
    """
    alone = solve(parse_case(variant))
    report = run_checks(alone)
    governing = report.governing
    assert governing is not None
    assert verdicts.valid[number] and verdicts.reasons[number] is None
    tolerance = AGREEMENT * (governing.utilisation + utilisation_scale(variant, alone, report))
    assert abs(verdicts.utilisation[number] - governing.utilisation) <= tolerance
    segment = int(verdicts.segment[number])
    named = (
        verdicts.kind_name(number),
        verdicts.result[number],
        verdicts.shaft[number],
        None if segment < 0 else segment,
    )
    tied = {
        (check.kind, check.result, check.shaft, check.segment)
        for check in report.checks
        if check.utilisation >= governing.utilisation - 2.0 * tolerance
    }
    assert named in tied, (named, tied)
    if len(tied) == 1:
        assert named == (governing.kind, governing.result, governing.shaft, governing.segment)
    sized_for = [check for check in report.checks if check.kind != "frequency_separation"]
    if all(abs(check.utilisation - 1.0) > 2.0 * tolerance for check in sized_for):
        assert bool(verdicts.passes[number]) == all(check.passes for check in sized_for)


def _judge_batch(case: dict[str, Any], factors: list[dict[str, Any]], **columns: Any) -> Any:
    return governing_utilisations(parse_case(copy.deepcopy(case)), **columns)


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_single_shaft_variants_are_judged_as_each_alone(case: Any, data: st.DataObject) -> None:
    case = data.draw(with_checks(case))
    count = data.draw(st.integers(1, 4))
    lengths = data.draw(st.booleans())
    factors = [data.draw(variant_factors(case, lengths)) for _ in range(count)]
    verdicts = _judge_batch(case, factors, **batch_columns(case, factors))
    assert verdicts.one_by_one == ()
    for number, variant_factor in enumerate(factors):
        assert_same_verdict(verdicts, number, written_alone(case, variant_factor))


@SETTINGS
@given(geared_cases(), st.data())
def test_geared_variants_are_judged_as_each_alone(case: Any, data: st.DataObject) -> None:
    case = data.draw(with_checks(case))
    count = data.draw(st.integers(1, 3))
    factors = [data.draw(variant_factors(case, data.draw(st.booleans()))) for _ in range(count)]
    verdicts = _judge_batch(case, factors, **batch_columns(case, factors))
    for number, variant_factor in enumerate(factors):
        assert_same_verdict(verdicts, number, written_alone(case, variant_factor))


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_invalid_variants_are_flagged_with_the_parsers_field(case: Any, data: st.DataObject):
    case = data.draw(with_checks(case))
    count = data.draw(st.integers(2, 5))
    factors = [data.draw(variant_factors(case, True)) for _ in range(count)]
    bad = data.draw(st.lists(st.integers(0, count - 1), min_size=1, max_size=count, unique=True))
    columns = batch_columns(case, factors)
    expected: dict[int, str] = {}
    for number in bad:
        segment = data.draw(st.integers(0, len(case["shafts"][0]["segments"]) - 1))
        how = data.draw(st.sampled_from(["length", "section"]))
        broken, field = _break(written_alone(case, factors[number]), how, segment)
        with pytest.raises(InputError) as raised:
            parse_case(broken)
        assert raised.value.field == field
        expected[number] = field
        _break_columns(columns, number, case, segment, how)
    verdicts = _judge_batch(case, factors, **columns)
    for number in range(count):
        if number in expected:
            assert not verdicts.valid[number] and not verdicts.passes[number]
            reason = verdicts.reasons[number]
            assert reason is not None and reason.startswith(expected[number] + ": "), reason
            assert math.isnan(verdicts.utilisation[number])
            assert verdicts.kind_name(number) is None
        else:
            assert_same_verdict(verdicts, number, written_alone(case, factors[number]))


# --- the demo: fatigue and natural frequencies, checked variant by variant ----------------------


def demo() -> dict[str, Any]:
    return json.loads(DEMO.read_text(encoding="utf-8"))


def demo_variant(diameters: tuple[float, float], torque: float) -> dict[str, Any]:
    """The demo with its first two segments' outer diameters (mm) and the jam torque (N·m)."""
    case = demo()
    segments = case["shafts"][0]["segments"]
    segments[0]["section"]["diameter"] = diameters[0]
    tube = segments[1]["section"]
    tube["inner_diameter"] *= diameters[1] / tube["outer_diameter"]
    tube["outer_diameter"] = diameters[1]
    case["load_cases"][1]["torques"][0]["torque"] = torque
    return case


@pytest.mark.parametrize("band", [None, (2000.0, 8000.0)])
def test_demo_variants_with_fatigue_and_frequencies(band: tuple[float, float] | None) -> None:
    # With a wide band about the lowest mode (near 4,000 rpm) the frequency separation governs
    # the stiffer variants; with the demo's own band (20 to 45 rpm) the statics and fatigue do.
    chosen = [((40.0, 70.0), 1400.0), ((60.0, 55.0), 900.0), ((75.0, 80.0), 2500.0),
              ((30.0, 70.0), -800.0), ((60.0, 70.0), 1400.0), ((90.0, 90.0), 100.0)]  # fmt: skip
    cases = [demo_variant(*item) for item in chosen]
    if band is not None:
        for case in [*cases]:
            case["operating_speeds"] = [{"name": "test band", "min": band[0], "max": band[1]}]
    base = parse_case(cases[4])
    models = [parse_case(case) for case in cases]
    first = np.array([model.shafts[0].segments[0].layers[0].section.diameter for model in models])
    outer = np.array(
        [model.shafts[0].segments[1].layers[0].section.outer_diameter for model in models]
    )
    inner = np.array(
        [model.shafts[0].segments[1].layers[0].section.inner_diameter for model in models]
    )
    table_torques = np.array([[1.0, 1.0, 1.0]]) * np.array(
        [[900.0, 1.0, -250.0]]
    )  # pressing, jam (set below), feeder
    table_torques = np.repeat(table_torques, len(models), axis=0)
    table_torques[:, 1] = [torque for _, torque in chosen]
    starts = np.repeat(np.array([[0.060, 0.070, 0.070, 0.075, 0.050, 0.040]]), len(models), 0)
    starts[:, 0], starts[:, 1] = first, outer
    ends = starts.copy()
    ends[:, 2] = 0.050
    bores = np.repeat(np.array([[0.0, 0.040, 0.0, 0.050, 0.0, 0.0]]), len(models), 0)
    bores[:, 1] = inner
    verdicts = governing_utilisations(
        base,
        outer_diameter_start=starts,
        outer_diameter_end=ends,
        inner_diameter=bores,
        torque=table_torques,
    )
    assert verdicts.one_by_one == ("frequency_separation", "fatigue", "first_cycle_yield")
    kinds = set()
    for number, case in enumerate(cases):
        assert_same_verdict(verdicts, number, case)
        kinds.add(verdicts.kind_name(number))
    if band is not None:
        assert "frequency_separation" in kinds and kinds - {"frequency_separation"}


def test_lengths_cannot_vary_with_checks_made_one_by_one() -> None:
    model = parse_case(demo())
    with pytest.raises(InputError) as raised:
        governing_utilisations(model, length=np.ones((2, 5)))
    assert raised.value.field == "length"
