"""Static-check inputs of a batch of variants built from plain arrays (hypothesis).

A batch built by :func:`batch_check_inputs` from arrays of variants × segments (diameters,
bores, fillet radii, hole diameters, allowables) and each variant's solved arrays must

* hold, segment by segment, the factor, nominal stress per torque, shoulder station and twist
  limit a plain loop written here from the checks' stated rules gives (which diameter each
  factor is read at: the shoulder's two sides, the smallest section for a keyseat or notch, the
  middle of the segment for a cross hole, the largest for "1° in 20 diameters"; τ_nom = 16TD/
  (π(D⁴ − d⁴)), Gere & Goodno §3.3), through the scalar factor functions (checked against the
  published fits in tests/validation);
* judge every static check of every variant as :func:`model_check_inputs` of each variant's
  own model does, to 1e-12.

The arrays are written here from the drawn sizes, not read back from the models: allowables by Shigley's *Mechanical Engineering Design*, 9th ed., ch. 5 (Sy/√3/n von
Mises, Sy/2/n Tresca), the stress of each bonded layer by Gere & Goodno, *Mechanics of
Materials*, 8th ed., §3.8 (layer i carries T·GᵢJᵢ/ΣGJ, so τᵢ = T·Gᵢ·(Dᵢ/2)/ΣGJ).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.test_static_checks import GRID, LOAD_PLACES, ROTATION_PAIRS, section_of
from workbench.case.errors import InputError
from workbench.design.check_inputs import batch_check_inputs
from workbench.design.check_layout import check_layout
from workbench.design.checks import model_check_inputs
from workbench.design.concentration import shoulder_fillet_kts
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    StaticCheckInputs,
    StaticUtilisations,
    static_utilisations,
)
from workbench.design.transverse_hole import transverse_hole_kts
from workbench.solver.analysis import Results, solve
from workbench.solver.io import parse_case
from workbench.solver.sections import polar_moment

SETTINGS = settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
TOLERANCE = 1e-12
STEEL_MODULUS, SLEEVE_MODULUS = 79e9, 40e9
SLEEVE_SHARE = 0.8  # the sleeve's yield strength over the steel's
KINDS = ("solid", "tube", "tapered", "layered", "rectangle")


@st.composite
def topologies(draw: st.DrawFn) -> dict[str, Any]:
    """What every variant shares: shafts, segment kinds and details, rules, load places."""
    shafts = [
        [
            {
                "kind": draw(st.sampled_from(KINDS)),
                "length": draw(st.floats(0.05, 0.5)),
                "diameter": draw(st.one_of(st.floats(0.02, 0.08), st.just(0.05))),
                "fillet": number > 0 and draw(st.booleans()),
                "keyseat": draw(st.booleans()),
                "notch": draw(st.booleans()),
                "hole": draw(st.booleans()),
            }
            for number in range(draw(st.integers(1, 4)))
        ]
        for _ in range(draw(st.integers(1, 2)))
    ]
    return {
        "shafts": shafts,
        "twist": draw(st.sampled_from([None, "number", "twenty-diameters", "machine-shaft"])),
        "criterion": draw(st.sampled_from(["von_mises", "tresca"])),
        "factor_of_safety": draw(st.floats(1.2, 3.0)),
        "twist_limit": draw(st.floats(0.005, 0.05)),
        "rotations": draw(ROTATION_PAIRS),
        "load_places": draw(LOAD_PLACES),
    }


@st.composite
def variants(draw: st.DrawFn, topology: dict[str, Any]) -> dict[str, Any]:
    """One variant: its sizes (diameters, fillets, holes), strength and torques, as drawn."""
    sizes = [
        {
            "diameter": spec["diameter"] * draw(st.one_of(st.floats(0.7, 1.4), st.just(1.0))),
            "fillet_ratio": draw(st.floats(0.005, 0.4)),  # across 0.02 ≤ r/d ≤ 0.30
            "hole_ratio": draw(st.floats(0.05, 0.5)),  # d/D at the middle, across 0.4
        }
        for shaft in topology["shafts"]
        for spec in shaft
    ]
    return {
        "sizes": sizes,
        "strength": draw(st.floats(200e6, 600e6)),
        "torques": [draw(st.floats(-2000.0, 2000.0)) for _ in range(4 * len(topology["shafts"]))],
    }


def case_of(topology: dict[str, Any], variant: dict[str, Any]) -> dict[str, Any]:
    """The case file of one variant."""
    sizes = iter(variant["sizes"])
    shafts = []
    for shaft_number, specs in enumerate(topology["shafts"]):
        segments = []
        for spec in specs:
            size = next(sizes)
            diameter = size["diameter"]
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
                segment["fillet_radius"] = size["fillet_ratio"] * diameter
            if spec["keyseat"]:
                segment["keyseat"] = True
            if spec["notch"]:
                segment["notch"] = {"kts": 2.0}
            if spec["hole"]:
                segment["cross_hole_diameter"] = size["hole_ratio"] * _middle(spec, diameter)
            segments.append(segment)
        shafts.append({"id": f"s{shaft_number}", "segments": segments})
    lengths = [sum(spec["length"] for spec in specs) for specs in topology["shafts"]]
    torques = iter(variant["torques"])
    design: dict[str, Any] = {
        "factor_of_safety": topology["factor_of_safety"],
        "shear_criterion": topology["criterion"],
        "rotation_limits": [
            {
                "shaft": "s0",
                "start": lengths[0] * min(pair) / GRID,
                "end": lengths[0] * max(pair) / GRID,
                "limit": 0.01,
            }
            for pair in topology["rotations"]
        ],
    }
    if topology["twist"] == "number":
        design["max_twist_rate"] = topology["twist_limit"]
    elif topology["twist"] is not None:
        design["max_twist_rate"] = topology["twist"]
    strength = variant["strength"]
    return {
        "materials": {
            "steel": {"shear_modulus": STEEL_MODULUS, "yield_strength": strength},
            "sleeve": {"shear_modulus": SLEEVE_MODULUS, "yield_strength": SLEEVE_SHARE * strength},
        },
        "shafts": shafts,
        "supports": [{"shaft": shaft["id"], "x": 0.0} for shaft in shafts],
        "load_cases": [
            {
                "name": name,
                "torques": [
                    {
                        "shaft": f"s{s}",
                        "x": lengths[s] * place / (2 * GRID),
                        "torque": next(torques),
                    }
                    for s in range(len(shafts))
                    for place in topology["load_places"][:2]
                ],
            }
            for name in ("A", "B")
        ],
        "combinations": [{"name": "A-B", "factors": {"A": 1.0, "B": -1.0}}],
        "design": design,
    }


def _middle(spec: dict[str, Any], diameter: float) -> float:
    return 0.9 * diameter if spec["kind"] == "tapered" else diameter


def segment_arrays(topology: dict[str, Any], variants: list[dict[str, Any]]) -> dict[str, Any]:
    """(V, G) sizes of every segment and (V, K, G) allowables, from the drawn sizes."""
    specs = [spec for shaft in topology["shafts"] for spec in shaft]
    count = len(specs)
    slots = 2 if any(spec["kind"] == "layered" for spec in specs) else 1
    arrays: dict[str, Any] = {
        name: np.full((len(variants), count), np.nan)
        for name in ("start", "end", "bore", "fillet", "hole")
    }
    arrays["allowable"] = np.full((len(variants), slots, count), np.inf)
    divisor = math.sqrt(3.0) if topology["criterion"] == "von_mises" else 2.0
    for v, variant in enumerate(variants):
        steel = variant["strength"] / divisor / topology["factor_of_safety"]
        for g, (spec, size) in enumerate(zip(specs, variant["sizes"], strict=True)):
            diameter, kind = size["diameter"], spec["kind"]
            if kind != "rectangle":
                arrays["start"][v, g] = diameter
                arrays["end"][v, g] = 0.8 * diameter if kind == "tapered" else diameter
            if kind in ("solid", "tapered", "tube"):
                arrays["bore"][v, g] = 0.6 * diameter if kind == "tube" else 0.0
            if spec["fillet"]:
                arrays["fillet"][v, g] = size["fillet_ratio"] * diameter
            if spec["hole"]:
                arrays["hole"][v, g] = size["hole_ratio"] * _middle(spec, diameter)
            if kind == "layered":
                arrays["allowable"][v, :, g] = (SLEEVE_SHARE * steel, steel)
            else:
                arrays["allowable"][v, 0, g] = steel
    return arrays


def layer_stress(topology: dict[str, Any], variant: dict[str, Any], results: Results) -> Any:
    """(K, S) peak stress of each layer per unit segment torque, by hand for bonded layers."""
    specs = [spec for shaft in topology["shafts"] for spec in shaft]
    slots = 2 if any(spec["kind"] == "layered" for spec in specs) else 1
    mesh = results.mesh
    stress = np.zeros((slots, len(mesh.station_x)))
    stress[0] = mesh.station_stress_per_torque
    offsets = np.cumsum([0, *(len(shaft) for shaft in topology["shafts"])])
    segment = (
        offsets[mesh.element_shaft[mesh.station_element]]
        + mesh.element_segment[mesh.station_element]
    )
    for g, (spec, size) in enumerate(zip(specs, variant["sizes"], strict=True)):
        if spec["kind"] != "layered":
            continue
        outer, core = size["diameter"], 0.6 * size["diameter"]
        rigidity = SLEEVE_MODULUS * polar_moment(outer, core) + STEEL_MODULUS * polar_moment(core)
        stress[:, segment == g] = [
            [SLEEVE_MODULUS * outer / 2.0 / rigidity],
            [STEEL_MODULUS * core / 2.0 / rigidity],
        ]
    return stress


ROUND = ("solid", "tube", "tapered")  # one-layer round segments: the details can be checked


def _nominal(outer: float, bore: float) -> float:
    """τ_nom per unit torque, 16·D/(π(D⁴ − d⁴)) (Gere & Goodno, §3.3)."""
    return 16.0 * outer / (math.pi * (outer**4 - bore**4))


def expected_inputs(
    topology: dict[str, Any], variant: dict[str, Any], segment_start: Any
) -> dict[str, Any]:
    """Factor, nominal stress per torque, shoulder station and twist limit, segment by segment.

    A plain loop over the segments from the rules the checks state (module text of
    workbench.design.check_inputs), NaN where a segment has no such check.
    """
    specs = [spec for shaft in topology["shafts"] for spec in shaft]
    first = np.cumsum([0, *(len(shaft) for shaft in topology["shafts"])])[:-1]
    count = len(specs)
    factor, nominal = np.full((4, count), np.nan), np.full((4, count), np.nan)
    station, twist = np.array(segment_start), np.full(count, np.nan)
    divisor = math.sqrt(3.0) if topology["criterion"] == "von_mises" else 2.0
    for g, (spec, size) in enumerate(zip(specs, variant["sizes"], strict=True)):
        kind, diameter = spec["kind"], size["diameter"]
        end = 0.8 * diameter if kind == "tapered" else diameter
        bore = 0.6 * diameter if kind == "tube" else 0.0
        if spec["fillet"] and g not in first and kind in ROUND and specs[g - 1]["kind"] in ROUND:
            before = variant["sizes"][g - 1]["diameter"]
            before_kind = specs[g - 1]["kind"]
            before_end = 0.8 * before if before_kind == "tapered" else before
            before_bore = 0.6 * before if before_kind == "tube" else 0.0
            if before_end < diameter:  # the previous side is the smaller
                small, big, small_bore = before_end, diameter, before_bore
                station[g] -= 1
            else:
                small, big, small_bore = diameter, before_end, bore
            radius = size["fillet_ratio"] * diameter
            factor[0, g] = shoulder_fillet_kts(big, small, radius).value
            nominal[0, g] = _nominal(small, small_bore)
        if kind in ROUND:
            smallest = _nominal(min(diameter, end), bore)
            if spec["keyseat"]:
                factor[1, g], nominal[1, g] = 3.0, smallest  # Shigley Table 7-1
            if spec["notch"]:
                factor[2, g], nominal[2, g] = 2.0, smallest
            if spec["hole"] and bore == 0.0:
                middle = _middle(spec, diameter)
                hole = size["hole_ratio"] * middle
                factor[3, g] = transverse_hole_kts(hole, middle).value / divisor
                nominal[3, g] = _nominal(middle, 0.0)
        if topology["twist"] == "number":
            twist[g] = topology["twist_limit"]
        elif topology["twist"] == "machine-shaft":
            twist[g] = math.radians(0.08) / 0.3048  # 0.08°/ft (Schaum's Outline of Machine Design)
        elif topology["twist"] == "twenty-diameters" and kind != "rectangle":
            twist[g] = math.radians(1.0) / (20.0 * max(diameter, end))  # common practice
    return {"factor": factor, "nominal": nominal, "station": station, "twist": twist}


def _assert_same(judged: StaticUtilisations, expected: StaticUtilisations) -> None:
    for name in ("value", "limit", "x", "rotation_value", "rotation_limit"):
        np.testing.assert_allclose(
            getattr(judged, name), getattr(expected, name), rtol=TOLERANCE, atol=0.0, err_msg=name
        )
    assert np.array_equal(judged.checked, expected.checked)
    np.testing.assert_allclose(
        judged.governing_utilisation(), expected.governing_utilisation(), rtol=TOLERANCE, atol=0.0
    )


@st.composite
def batches(draw: st.DrawFn) -> tuple[dict[str, Any], list[dict[str, Any]]]:
    topology = draw(topologies())
    return topology, [draw(variants(topology)) for _ in range(draw(st.integers(1, 4)))]


@given(batch=batches())
@SETTINGS
def test_a_batch_from_arrays_judges_as_each_model_does(
    batch: tuple[dict[str, Any], list[dict[str, Any]]],
) -> None:
    topology, drawn = batch
    models = [parse_case(case_of(topology, variant)) for variant in drawn]
    solved = [solve(model) for model in models]
    one_by_one = [model_check_inputs(results, results.model.design) for results in solved]
    for prepared in one_by_one:  # a guard: the variants are of one topology
        assert np.array_equal(prepared.inputs.segment_start, one_by_one[0].inputs.segment_start)
    layout = check_layout(models[0], solved[0].mesh, models[0].design)
    sizes = segment_arrays(topology, drawn)
    built = batch_check_inputs(
        layout,
        np.stack([results.torque for results in solved]),
        np.stack([layer_stress(topology, v, r) for v, r in zip(drawn, solved, strict=True)]),
        np.stack([results.mesh.station_rigidity for results in solved]),
        np.stack([results.node_angle for results in solved]),
        np.stack([results.mesh.station_x for results in solved]),
        outer_diameter_start=sizes["start"],
        outer_diameter_end=sizes["end"],
        bore=sizes["bore"],
        fillet_radius=sizes["fillet"],
        cross_hole_diameter=sizes["hole"],
        allowable=sizes["allowable"],
    )
    assert built.valid.all()
    for v, variant in enumerate(drawn):
        expected_v = expected_inputs(topology, variant, layout.segment_start)
        inputs = built.inputs
        for name, got in (
            ("factor", inputs.concentration[v]),
            ("nominal", inputs.nominal_stress_per_torque[v]),
            ("twist", inputs.twist_rate_limit[v]),
        ):
            np.testing.assert_allclose(
                got, expected_v[name], rtol=TOLERANCE, atol=0.0, err_msg=name
            )
        shouldered = ~np.isnan(expected_v["factor"][0])
        assert np.array_equal(
            inputs.shoulder_station[v][shouldered], expected_v["station"][shouldered]
        )
    expected = StaticCheckInputs.stack([prepared.inputs for prepared in one_by_one])
    _assert_same(static_utilisations(built.inputs), static_utilisations(expected))
    # Each factor outside its data is flagged in the batch as in the model's own row notes.
    for v, prepared in enumerate(one_by_one):
        for kind in range(len(CONCENTRATION_KINDS)):
            outside = [note.startswith("OUTSIDE") for note in prepared.notes[1 + kind]]
            assert (~built.in_range[v, kind]).tolist() == outside


# --- variants a factor cannot be found for, and arrays of the wrong shape -------------------------


def stepped_case(hole: float = 0.006, fillet: float = 0.002) -> dict[str, Any]:
    """Ø40 solid, then a 40→30 mm taper with a fillet and a cross hole, SI."""
    return {
        "materials": {"steel": {"shear_modulus": 79e9, "yield_strength": 350e6}},
        "shafts": [
            {
                "id": "main",
                "segments": [
                    {"length": 0.3, "material": "steel",
                     "section": {"shape": "solid", "diameter": 0.04}},
                    {"length": 0.2, "material": "steel", "fillet_radius": fillet,
                     "cross_hole_diameter": hole,
                     "section": {"shape": "tapered", "diameter_start": 0.045,
                                 "diameter_end": 0.03}},
                ],
            }
        ],
        "supports": [{"shaft": "main", "x": 0}],
        "load_cases": [{"name": "A", "torques": [{"shaft": "main", "x": 0.5, "torque": 300}]}],
        "design": {"rotation_limits": [{"shaft": "main", "start": 0, "end": 0.5, "limit": 0.01}]},
    }  # fmt: skip


def _batch_of(results: Results, variants: int, **sizes: Any) -> Any:
    layout = check_layout(results.model, results.mesh, results.model.design)
    return layout, batch_check_inputs(
        layout,
        np.repeat(results.torque[None], variants, axis=0),
        results.mesh.station_stress_per_torque,
        results.mesh.station_rigidity,
        np.repeat(results.node_angle[None], variants, axis=0),
        **sizes,
    )


def test_a_variant_without_a_factor_is_flagged_not_failing_the_batch() -> None:
    results = solve(parse_case(stepped_case()))
    # Middle diameter of the taper 37.5 mm: a 38 mm hole has no factor; nor has a sharp corner.
    holes = np.array([[np.nan, 0.006], [np.nan, 0.038], [np.nan, 0.006]])
    fillets = np.array([[np.nan, 0.002], [np.nan, 0.002], [np.nan, 0.0]])
    layout, batch = _batch_of(results, 3, cross_hole_diameter=holes, fillet_radius=fillets)
    assert batch.valid.tolist() == [True, False, False]
    governing = static_utilisations(batch.inputs).governing_utilisation()
    assert math.isfinite(governing[0]) and np.isnan(governing[1:]).all()
    assert batch.problem(0, layout) is None
    field, message = batch.problem(1, layout)
    assert field == "shafts[0].segments[1].cross_hole_diameter"
    assert "smaller than the shaft diameter" in message
    field, message = batch.problem(2, layout)
    assert field == "shafts[0].segments[1].fillet_radius" and "sharp corner" in message
    # The valid variant is judged as the model itself is.
    alone = static_utilisations(model_check_inputs(results, results.model.design).inputs)
    assert governing[0] == pytest.approx(alone.governing_utilisation()[0], rel=TOLERANCE)


def test_one_model_with_a_hole_wider_than_its_section_names_the_field() -> None:
    # Segment validation compares the hole with the taper's larger end (45 mm); the factor is read
    # at the middle (37.5 mm), where a 40 mm hole does not fit.
    results = solve(parse_case(stepped_case(hole=0.040)))
    with pytest.raises(InputError) as caught:
        model_check_inputs(results, results.model.design)
    assert caught.value.field == "shafts[0].segments[1].cross_hole_diameter"


@pytest.mark.parametrize(
    ("change", "field"),
    [
        ({"outer_diameter_start": np.ones((2, 3))}, "outer_diameter_start"),
        ({"allowable": np.ones((2, 2, 5))}, "allowable"),
        ({"fillet_radius": np.ones(7)}, "fillet_radius"),
    ],
)
def test_arrays_of_the_wrong_shape_are_refused_by_name(change: dict[str, Any], field: str) -> None:
    results = solve(parse_case(stepped_case()))
    with pytest.raises(InputError) as caught:
        _batch_of(results, 2, **change)
    assert caught.value.field == field


def test_torques_of_another_topology_and_missing_rotations_are_refused() -> None:
    results = solve(parse_case(stepped_case()))
    layout = check_layout(results.model, results.mesh, results.model.design)
    rigidity = results.mesh.station_rigidity
    with pytest.raises(InputError) as caught:
        batch_check_inputs(layout, results.torque[None, :, :-1], rigidity, rigidity)
    assert caught.value.field == "torque"
    with pytest.raises(InputError) as caught:
        batch_check_inputs(
            layout, results.torque[None], results.mesh.station_stress_per_torque, rigidity
        )
    assert caught.value.field == "angle"


@pytest.mark.parametrize("field", ["stress_per_torque", "allowable"])
def test_a_layered_topology_needs_arrays_per_layer_slot(field: str) -> None:
    # One value per station or segment cannot say which bonded layer it belongs to: refused, not
    # spread over both slots.
    case = stepped_case()
    case["materials"]["sleeve"] = {"shear_modulus": 40e9, "yield_strength": 250e6}
    case["shafts"][0]["segments"][0] = {
        "length": 0.3,
        "layers": [
            {"material": "sleeve", "section": {"shape": "tube", "outer_diameter": 0.05,
                                               "inner_diameter": 0.03}},
            {"material": "steel", "section": {"shape": "solid", "diameter": 0.03}},
        ],
    }  # fmt: skip
    results = solve(parse_case(case))
    layout = check_layout(results.model, results.mesh, results.model.design)
    per_slot = np.repeat(results.mesh.station_stress_per_torque[None, None], 2, axis=1)
    arguments: dict[str, Any] = {
        "stress_per_torque": results.mesh.station_stress_per_torque[None],
        "allowable": None,
    }
    if field == "allowable":
        arguments = {"stress_per_torque": per_slot, "allowable": np.full((1, 2), 100e6)}
    with pytest.raises(InputError) as caught:
        batch_check_inputs(
            layout,
            results.torque[None],
            torsional_rigidity=results.mesh.station_rigidity,
            angle=results.node_angle[None],
            **arguments,
        )
    assert caught.value.field == field
