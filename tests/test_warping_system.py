"""Open sections that warp in the general solver: the case file, the system, its properties.

The closed forms live in ``tests/validation/test_warping_system.py``; here the general system is
held to the single-member solve (``workbench.solver.warping_member``, itself checked against
sympy), to equilibrium and superposition (hypothesis), and bad input to field-named errors.
"""

from __future__ import annotations

import copy
import json
from typing import Any

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from workbench.case.errors import InputError
from workbench.case.load import case_file_from_document
from workbench.case.save import case_document
from workbench.solver.analysis import solve, solve_case
from workbench.solver.build import build_model, case_file_of
from workbench.solver.io import parse_case
from workbench.solver.tables import results_document, results_text
from workbench.solver.warping_member import WarpingMember, recover, solve_member
from workbench.solver.warping_supports import UNSTATED_RESTRAINT

I_BEAM = {
    "shape": "i_beam",
    "depth": 0.25,
    "width": 0.125,
    "flange_thickness": 0.009,
    "web_thickness": 0.006,
}
STEEL = {"shear_modulus": 79.3e9, "elastic_modulus": 207e9}


def member_case(supports: list[dict[str, Any]], **loads: Any) -> dict[str, Any]:
    """A 5 m I member of three segments (the middle one a solid round bar), SI."""
    return {
        "materials": {"s": dict(STEEL)},
        "shafts": [
            {
                "id": "m",
                "segments": [
                    {"length": 2.0, "material": "s", "section": I_BEAM},
                    {
                        "length": 1.0,
                        "material": "s",
                        "section": {"shape": "solid", "diameter": 0.08},
                    },
                    {"length": 2.0, "material": "s", "section": I_BEAM},
                ],
            }
        ],
        "supports": supports,
        "load_cases": [{"name": "c", **loads}],
    }


def test_the_general_system_equals_the_single_member_solve() -> None:
    # The same member through both paths: nodes, rigidities and restraints alike.
    document = member_case(
        [
            {"shaft": "m", "x": 0.0, "warping": "restrained"},
            {"shaft": "m", "x": 5.0, "warping": "free"},
        ],
        torques=[{"shaft": "m", "x": 1.2, "torque": 800.0}],
        distributed=[
            {
                "shaft": "m",
                "start": 0.0,
                "end": 5.0,
                "intensity_start": 100.0,
                "intensity_end": 300.0,
            }
        ],
    )
    results = solve(parse_case(document))
    model = results.model
    mesh = results.mesh
    sections = [segment.layers[0].section for segment in model.shafts[0].segments]
    moduli = STEEL["shear_modulus"], STEEL["elastic_modulus"]
    segment = mesh.element_segment
    torsion = np.array([moduli[0] * sections[k].torsion_constant for k in segment])
    warping = np.array([moduli[1] * sections[k].warping_constant for k in segment])
    node_x = np.asarray(mesh.node_x)
    held = np.isin(node_x, [0.0, 5.0])
    member = WarpingMember(node_x, torsion, warping, held, node_x == 0.0)
    nodal = np.zeros((1, len(node_x)))
    nodal[0, np.flatnonzero(np.isclose(node_x, 1.2))] = 800.0
    x0, x1 = node_x[:-1], node_x[1:]
    start, end = 100.0 + 40.0 * x0, 100.0 + 40.0 * x1
    single = solve_member(member, nodal, start[None], end[None])
    states = recover(single, mesh.station_x)
    warping_values = results.warping
    assert warping_values is not None
    reactions = single.torque_reaction[0, held]
    np.testing.assert_allclose(results.reactions[0], reactions, rtol=1e-10)
    scale = np.abs(states.rotation).max()
    # At an element's end station the single member takes the next element's start: compare
    # where both give the same point's value (θ, T continuous away from the point torque).
    np.testing.assert_allclose(results.angle[0], states.rotation[0], atol=1e-10 * scale)
    bimoment_scale = np.abs(states.bimoment).max()
    inside = ~mesh.station_is_end
    np.testing.assert_allclose(
        warping_values.bimoment[0][inside],
        states.bimoment[0][inside],
        atol=1e-9 * bimoment_scale,
    )
    np.testing.assert_allclose(
        results.torque[0][inside], states.torque[0][inside], atol=1e-9 * np.abs(reactions).max()
    )
    assert warping_values.bimoment_reactions[0, 0] == pytest.approx(
        single.bimoment_reaction[0, 0], rel=1e-9
    )


def geared_case(torque: float, at: float, spring: float, factor_b: float) -> dict[str, Any]:
    """An I member driven through a gear from a round shaft on a spring, and a combination.

    The round shaft has a layered segment and a tapered one: parts without warping in the
    same system.
    """
    return {
        "materials": {"s": dict(STEEL)},
        "shafts": [
            {"id": "beam", "segments": [{"length": 4.0, "material": "s", "section": I_BEAM}]},
            {
                "id": "drive",
                "segments": [
                    {
                        "length": 0.6,
                        "layers": [
                            {"material": "s", "section": {"shape": "solid", "diameter": 0.04}},
                            {
                                "material": "s",
                                "section": {
                                    "shape": "tube",
                                    "outer_diameter": 0.06,
                                    "inner_diameter": 0.04,
                                },
                            },
                        ],
                    },
                    {
                        "length": 0.4,
                        "material": "s",
                        "section": {
                            "shape": "tapered",
                            "diameter_start": 0.06,
                            "diameter_end": 0.04,
                        },
                    },
                ],
            },
        ],
        "supports": [
            {"shaft": "beam", "x": 0.0, "warping": "restrained"},
            {"shaft": "beam", "x": 4.0, "warping": "restrained"},
            {"shaft": "drive", "x": 0.0, "kind": "spring", "stiffness": spring},
        ],
        "gears": [
            {
                "a": {"shaft": "beam", "x": 2.5, "radius": 0.2},
                "b": {"shaft": "drive", "x": 1.0, "radius": 0.1},
            }
        ],
        "load_cases": [
            {"name": "a", "torques": [{"shaft": "beam", "x": at, "torque": torque}]},
            {"name": "b", "torques": [{"shaft": "drive", "x": 0.5, "torque": 300.0}]},
        ],
        "combinations": [{"name": "ab", "factors": {"a": 1.0, "b": factor_b}}],
    }


@settings(max_examples=25, deadline=None)
@given(
    torque=st.floats(-5e3, 5e3).filter(lambda value: abs(value) > 1.0),
    at=st.floats(0.3, 3.7),
    spring=st.floats(1e3, 1e7),
    factor_b=st.floats(-3.0, 3.0),
)
def test_equilibrium_and_superposition_with_gears_and_springs(
    torque: float, at: float, spring: float, factor_b: float
) -> None:
    # Each shaft: reactions + applied + mesh torque = 0 (design §2); combinations superpose.
    results = solve(parse_case(geared_case(torque, at, spring, factor_b)))
    assert results.warping is not None
    applied = {0: {"beam": torque, "drive": 0.0}, 1: {"beam": 0.0, "drive": 300.0}}
    for row in (0, 1):
        beam = results.reactions[row, :2].sum() + results.gear_torques[row, 0, 0]
        drive = results.reactions[row, 2] + results.gear_torques[row, 0, 1]
        assert beam + applied[row]["beam"] == pytest.approx(0.0, abs=1e-8 * 5e3)
        assert drive + applied[row]["drive"] == pytest.approx(0.0, abs=1e-8 * 5e3)
    # The mesh r_a·θ_a = −r_b·θ_b holds on the rotations only.
    node_beam = results.mesh.node_of(0, 2.5)
    node_drive = results.mesh.node_of(1, 1.0)
    angles = results.node_angle[:, [node_beam, node_drive]]
    np.testing.assert_allclose(0.2 * angles[:, 0], -0.1 * angles[:, 1], atol=1e-14)
    combined = results.warping.bimoment[2]
    expected = results.warping.bimoment[0] + factor_b * results.warping.bimoment[1]
    np.testing.assert_allclose(combined, expected, atol=1e-9 * (np.abs(expected).max() + 1.0))
    np.testing.assert_allclose(
        results.reactions[2], results.reactions[0] + factor_b * results.reactions[1], atol=1e-6
    )


def test_restraining_warping_stiffens_the_member() -> None:
    # Restrained ends carry part of the torque by warping: less twist than free ends.
    free = member_case(
        [{"shaft": "m", "x": 0.0}, {"shaft": "m", "x": 5.0}],
        torques=[{"shaft": "m", "x": 1.0, "torque": 500.0}],
    )
    held = copy.deepcopy(free)
    for support in held["supports"]:
        support["warping"] = "restrained"
    twist_free = np.abs(solve(parse_case(free)).angle).max()
    twist_held = np.abs(solve(parse_case(held)).angle).max()
    assert twist_held < 0.9 * twist_free


def test_unstated_restraint_is_warned_once_and_stated_is_not() -> None:
    document = member_case(
        [{"shaft": "m", "x": 0.0}, {"shaft": "m", "x": 5.0, "warping": "free"}],
        torques=[{"shaft": "m", "x": 1.0, "torque": 500.0}],
    )
    warnings = solve_case(case_file_from_document(document)).warnings
    assert len(warnings) == 1
    assert warnings[0].startswith("supports[0]:")
    assert UNSTATED_RESTRAINT in warnings[0]
    document["supports"][0]["warping"] = "restrained"
    assert solve_case(case_file_from_document(document)).warnings == ()


def test_json_adds_the_warping_arrays_only_for_a_case_that_warps() -> None:
    document = member_case(
        [
            {"shaft": "m", "x": 0.0, "warping": "restrained"},
            {"shaft": "m", "x": 5.0, "warping": "free"},
        ],
        torques=[{"shaft": "m", "x": 1.0, "torque": 500.0}],
    )
    warping_results = solve_case(case_file_from_document(document))
    assert "largest |bimoment|" in results_text(warping_results)
    printed = results_document(warping_results)
    shaft = printed["results"][0]["shafts"]["m"]
    for key in ("rate_of_twist", "twist_second_derivative", "bimoment", "warping_torque"):
        assert len(shaft[key]) == len(shaft["x"])
    assert len(printed["results"][0]["bimoment_reactions"]) == 2
    round_bar = copy.deepcopy(document)
    for segment in round_bar["shafts"][0]["segments"]:
        segment["section"] = {"shape": "solid", "diameter": 0.08}
    for support in round_bar["supports"]:
        del support["warping"]
    plain_results = solve_case(case_file_from_document(round_bar))
    assert "bimoment" not in results_text(plain_results)
    plain = results_document(plain_results)
    assert set(plain["results"][0]) == {"name", "reactions", "shafts"}
    assert set(plain["results"][0]["shafts"]["m"]) == {"x", "torque", "angle", "shear_stress"}


def test_the_case_file_round_trips_shapes_and_warping() -> None:
    polyline = {
        "shape": "open_polyline",
        "points": [
            {"x": 0.1, "y": 0.0},
            {"x": 0.0, "y": 0.0, "thickness": 0.008},
            {"x": 0.0, "y": 0.2, "thickness": 0.006},
            {"x": 0.1, "y": 0.2, "thickness": 0.008},
        ],
    }
    document = member_case(
        [{"shaft": "m", "x": 0.0, "warping": "free"}, {"shaft": "m", "x": 5.0}],
        torques=[{"shaft": "m", "x": 1.0, "torque": 500.0}],
    )
    document["shafts"][0]["segments"][0]["section"] = polyline
    model = build_model(case_file_from_document(document))
    saved = json.loads(json.dumps(case_document(case_file_of(model))))
    assert saved["shafts"][0]["segments"][0]["section"] == polyline
    assert saved["shafts"][0]["segments"][2]["section"] == I_BEAM
    assert saved["supports"][0]["warping"] == "free"
    assert "warping" not in saved["supports"][1]


@pytest.mark.parametrize(
    ("change", "field"),
    [
        (
            lambda d: d["supports"][0].update(warping="restrained"),
            "supports[0].warping",
        ),
        (
            lambda d: d["shafts"][0]["segments"][0].update(
                section={
                    "shape": "open_polyline",
                    "points": [
                        {"x": 0.0, "y": 0.0},
                        {"x": 0.2, "y": 0.2, "thickness": 0.005},
                        {"x": 0.2, "y": 0.0, "thickness": 0.005},
                        {"x": 0.0, "y": 0.2, "thickness": 0.005},
                    ],
                }
            ),
            "shafts[0].segments[0].section.points[3]",
        ),
        (
            lambda d: d["shafts"][0]["segments"][0].update(
                section={**I_BEAM, "flange_thickness": 0.2}
            ),
            "shafts[0].segments[0].section.depth",
        ),
        (
            lambda d: d["shafts"][0]["segments"][0].update(
                section={
                    "shape": "open_polyline",
                    "points": [{"x": 0.0, "y": 0.0}, {"x": 0.01, "y": 0.0, "thickness": 0.02}],
                }
            ),
            "shafts[0].segments[0].section.points[1].thickness",
        ),
        (
            lambda d: d["shafts"][0]["segments"][0].update(
                section={**I_BEAM, "flange_thickness": 0.03}
            ),
            "shafts[0].segments[0].section.flange_thickness",
        ),
        (
            lambda d: d["shafts"][0]["segments"][0].update(
                section={
                    "shape": "channel",
                    "depth": 0.2,
                    "width": 0.005,
                    "flange_thickness": 0.008,
                    "web_thickness": 0.006,
                }
            ),
            "shafts[0].segments[0].section.width",
        ),
        (
            lambda d: d["materials"]["s"].pop("elastic_modulus"),
            "shafts[0].segments[0].material",
        ),
    ],
)
def test_bad_input_names_its_field(change: Any, field: str) -> None:
    # The warping key on a round bar is refused (explained), as are crossing walls, walls as
    # thick as the section is wide and a material without E where the section warps.
    document = member_case(
        [{"shaft": "m", "x": 2.5}, {"shaft": "m", "x": 5.0}],
        torques=[{"shaft": "m", "x": 1.0, "torque": 500.0}],
    )
    change(document)
    with pytest.raises(InputError) as raised:
        solve_case(case_file_from_document(document))
    assert raised.value.field == field, raised.value
    assert len(str(raised.value)) < 400


def test_round_parts_in_a_warping_system_keep_their_saint_venant_results() -> None:
    # A round shaft (layered and tapered parts, a spring, a distributed torque) solved beside an
    # unconnected I member must give what it gives alone on the one-rotation path.
    document = geared_case(1.0e3, 1.0, 5e4, 1.0)
    del document["gears"], document["combinations"]
    document["load_cases"][1]["distributed"] = [
        {
            "shaft": "drive",
            "start": 0.1,
            "end": 0.9,
            "intensity_start": 200.0,
            "intensity_end": -50.0,
        }
    ]
    document["supports"].append({"shaft": "drive", "x": 0.3})
    together = solve(parse_case(document))
    alone_document = copy.deepcopy(document)
    alone_document["shafts"] = alone_document["shafts"][1:]
    alone_document["supports"] = alone_document["supports"][2:]
    alone_document["load_cases"] = [alone_document["load_cases"][1]]
    alone = solve(parse_case(alone_document))
    assert together.warping is not None
    assert alone.warping is None
    window = slice(int(together.mesh.shaft_station_start[1]), None)
    np.testing.assert_allclose(together.reactions[1, 2:], alone.reactions[0], rtol=1e-12)
    np.testing.assert_allclose(together.angle[1, window], alone.angle[0], rtol=1e-10, atol=1e-16)
    np.testing.assert_allclose(together.torque[1, window], alone.torque[0], rtol=1e-10, atol=1e-9)
    # θ′ there is T/(G·K) and nothing warps.
    assert not np.any(together.warping.bimoment[1, window])


CHANNEL = {
    "shape": "channel",
    "depth": 0.2,
    "width": 0.075,
    "flange_thickness": 0.011,
    "web_thickness": 0.0085,
}


@settings(max_examples=30, deadline=None)
@given(
    lengths=st.lists(st.floats(0.2, 3.0), min_size=3, max_size=3),
    open_shapes=st.lists(st.sampled_from([I_BEAM, CHANNEL]), min_size=2, max_size=2),
    conditions=st.lists(st.sampled_from(["restrained", "free", None]), min_size=2, max_size=2),
    spring=st.one_of(st.none(), st.floats(1e2, 1e6)),
    torques=st.lists(st.tuples(st.floats(0.0, 1.0), st.floats(-2e3, 2e3)), min_size=1, max_size=3),
    intensities=st.tuples(st.floats(-500.0, 500.0), st.floats(-500.0, 500.0)),
    factor=st.floats(-2.0, 2.0),
)
def test_equilibrium_and_superposition_on_one_shaft(
    lengths: list[float],
    open_shapes: list[dict[str, Any]],
    conditions: list[str | None],
    spring: float | None,
    torques: list[tuple[float, float]],
    intensities: tuple[float, float],
    factor: float,
) -> None:
    # Σ reactions + Σ applied = 0 (design §2) with θ′ in the system; a combination is the
    # factored sum of its cases (superposition of linear elasticity).
    total = sum(lengths)
    round_bar = {"shape": "tube", "outer_diameter": 0.1, "inner_diameter": 0.08}
    sections = [open_shapes[0], round_bar, open_shapes[1]]
    supports: list[dict[str, Any]] = []
    for x, condition in zip((0.0, total), conditions, strict=True):
        support: dict[str, Any] = {"shaft": "m", "x": x}
        if condition is not None:
            support["warping"] = condition
        supports.append(support)
    if spring is not None:
        middle = lengths[0] + lengths[1] / 2
        supports.append({"shaft": "m", "x": middle, "kind": "spring", "stiffness": spring})
    point = [{"shaft": "m", "x": where * total, "torque": torque} for where, torque in torques]
    spread = {
        "shaft": "m",
        "start": 0.1 * total,
        "end": 0.8 * total,
        "intensity_start": intensities[0],
        "intensity_end": intensities[1],
    }
    document = {
        "materials": {"s": dict(STEEL)},
        "shafts": [
            {
                "id": "m",
                "segments": [
                    {"length": length, "material": "s", "section": section}
                    for length, section in zip(lengths, sections, strict=True)
                ],
            }
        ],
        "supports": supports,
        "load_cases": [
            {"name": "points", "torques": point},
            {"name": "spread", "distributed": [spread]},
        ],
        "combinations": [{"name": "both", "factors": {"points": 1.0, "spread": factor}}],
    }
    results = solve(parse_case(document))
    assert results.warping is not None
    applied = [sum(torque for _, torque in torques), 0.7 * total * sum(intensities) / 2]
    scale = 1.0 + sum(abs(torque) for _, torque in torques) + 0.7 * total * 500.0
    for row in (0, 1):
        assert results.reactions[row].sum() + applied[row] == pytest.approx(0.0, abs=1e-9 * scale)
    combined = results.reactions[0] + factor * results.reactions[1]
    np.testing.assert_allclose(results.reactions[2], combined, atol=1e-9 * scale)
    bimoment = results.warping.bimoment
    np.testing.assert_allclose(
        bimoment[2], bimoment[0] + factor * bimoment[1], atol=1e-9 * (np.abs(bimoment).max() + 1)
    )
    # Both torque parts add up to the torque (design §2: T = G·J·θ′ − E·Cw·θ‴).
    parts = results.warping.saint_venant_torque + results.warping.warping_torque
    np.testing.assert_allclose(parts, results.torque, atol=1e-9 * scale)


def test_a_warping_member_on_a_vanishing_spring_is_refused_naming_it() -> None:
    # Common practice, no source: a shaft held by a spring of 10⁻¹⁵ N·m/rad is a mechanism in
    # all but name; the refusal names the spring, as on the one-rotation path.
    document = member_case(
        [{"shaft": "m", "x": 0.0, "kind": "spring", "stiffness": 1e-15, "warping": "restrained"}],
        torques=[{"shaft": "m", "x": 4.0, "torque": 100.0}],
    )
    with pytest.raises(InputError) as raised:
        solve_case(case_file_from_document(document))
    assert raised.value.field == "supports"
    assert "nearly a mechanism" in str(raised.value)
