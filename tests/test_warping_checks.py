"""Warping stresses and checks of open sections: properties, shapes, inputs and the case keys.

Outside checks (closed forms, the flexural analogy, sectionproperties) live in
tests/validation/test_warping_stresses.py.
"""

from __future__ import annotations

import copy
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from workbench.case.design import CoexistingStress, DesignCriteria
from workbench.case.errors import InputError
from workbench.case.materials import Material
from workbench.case.units import UnitSystem
from workbench.design.check_report import CHECK_QUANTITIES, check_row
from workbench.design.independent import (
    WARPING_NOT_COVERED,
    NotCovered,
    require_uniform_torsion,
)
from workbench.design.warping_checks import (
    WARPING_KINDS,
    WarpingCheckInputs,
    WarpingRowPlaces,
    coexisting_by_segment,
    point_stresses,
    warping_check_rows,
    warping_limits,
    warping_utilisations,
)
from workbench.solver.io import case_to_dict, parse_case
from workbench.solver.open_shapes import angle_section, channel_section, i_section, z_section
from workbench.solver.warping_member import WarpingMember, recover, solve_member
from workbench.solver.warping_stress import (
    join_stress_points,
    node_stress_points,
    stress_points,
    torsional_stresses,
)

STEEL = Material("test steel", 79.3e9, 250e6, 400e6, elastic_modulus=207e9)
I_BEAM = i_section(0.3, 0.15, 0.15, 0.012, 0.012, 0.008)
CHANNEL = channel_section(0.2, 0.08, 0.01, 0.006)


def _restrained_member(length: float, torque: float, fraction: float):
    """Both ends fixed and restrained against warping, a torque at ``fraction`` of the span."""
    k = STEEL.shear_modulus * I_BEAM.torsion_constant
    w = 207e9 * I_BEAM.warping_constant
    member = WarpingMember(
        np.array([0.0, fraction * length, length]),
        np.full(2, k),
        np.full(2, w),
        np.array([True, False, True]),
        np.array([True, False, True]),
    )
    solution = solve_member(member, np.array([[0.0, torque, 0.0]]))
    return recover(solution, np.linspace(0.0, length, 21))


def _stresses(state, sections=(I_BEAM,), station_section=None):
    count = state.rate.shape[-1]
    index = np.zeros(count, dtype=np.intp) if station_section is None else station_section
    return torsional_stresses(
        stress_points(list(sections)),
        index,
        state.rate,
        state.second,
        state.third,
        STEEL.shear_modulus,
        207e9,
    )


def _inputs(stresses, segment_start, normal=None, shear=None) -> WarpingCheckInputs:
    count = len(segment_start)
    limits = warping_limits([STEEL], np.zeros(count, np.intp), DesignCriteria())
    return WarpingCheckInputs(
        np.asarray(segment_start, dtype=np.intp),
        stresses,
        np.zeros(count) if normal is None else np.asarray(normal, dtype=float),
        np.zeros(count) if shear is None else np.asarray(shear, dtype=float),
        limits,
    )


@settings(max_examples=40, deadline=None)
@given(
    st.floats(1.0, 12.0),
    st.floats(-2e4, 2e4).filter(lambda t: abs(t) > 1.0),
    st.floats(0.1, 0.9),
    st.floats(-50.0, 50.0).filter(lambda f: abs(f) > 1e-3),
)
def test_stresses_scale_linearly_with_torque(length, torque, fraction, factor) -> None:
    # Linear elasticity: every stress at every station and point scales with the torque.
    base = _stresses(_restrained_member(length, torque, fraction))
    scaled = _stresses(_restrained_member(length, factor * torque, fraction))
    for name in ("saint_venant_shear", "warping_shear", "warping_normal"):
        one, other = getattr(base, name), getattr(scaled, name)
        scale = float(np.abs(factor * one).max())
        np.testing.assert_allclose(other, factor * one, rtol=0.0, atol=1e-9 * scale + 1e-300)


@settings(max_examples=60, deadline=None)
@given(
    st.floats(1.0, 12.0),
    st.floats(-2e4, 2e4),
    st.floats(0.1, 0.9),
    st.floats(0.0, 300e6),
    st.floats(0.0, 150e6),
)
def test_combination_never_below_either_part(length, torque, fraction, normal, shear) -> None:
    # √(σ² + 3τ²) ≥ σ and ≥ √3·τ ≥ τ at every point, so its largest over the section and the
    # segment is never below the largest σ or τ.
    state = _restrained_member(length, torque, fraction)
    inputs = _inputs(_stresses(state), [0, 10], [normal, 0.0], [0.0, shear])
    sigma, tau, combined = point_stresses(inputs)
    assert np.all(combined >= sigma) and np.all(combined >= math.sqrt(3.0) * tau * (1 - 1e-15))
    judged = warping_utilisations(inputs)
    assert np.all(judged.value[..., 2, :] >= judged.value[..., 0, :])
    assert np.all(judged.value[..., 2, :] >= judged.value[..., 1, :])
    # The stated stresses are added at full value: the largest σ and τ grow by exactly them.
    bare = warping_utilisations(_inputs(inputs.stresses, [0, 10]))
    added = judged.value - bare.value
    np.testing.assert_allclose(added[..., 0, :], [[normal, 0.0]], atol=1e-6)
    np.testing.assert_allclose(added[..., 1, :], [[0.0, shear]], atol=1e-6)


def test_stress_points_of_the_shapes() -> None:
    points = stress_points([I_BEAM, CHANNEL])
    # Wall ends first, valid points first, padding after: an I has 5 walls and no inner point
    # where Wn changes sign (its web has Wn = 0 throughout); a channel's three walls each have one.
    assert points.valid.sum(axis=1).tolist() == [10, 9]
    assert points.valid.shape[1] == 10  # the most points of any section
    assert not points.valid[1, 9:].any()
    assert (points.kind[1, :9] == np.tile([0, 1, 2], 3)).all()
    assert (points.thickness[~points.valid] == 0).all()
    assert (points.statical_per_thickness[~points.valid] == 0).all()
    # The channel's largest |Sw| is at an inner point (its web's mid-depth or a flange's Wn = 0).
    assert np.abs(points.statical_moment[1]).max() == pytest.approx(
        abs(CHANNEL.peak_statical_moment), rel=1e-12
    )
    assert np.abs(points.unit_warping[1]).max() == pytest.approx(abs(CHANNEL.peak_warping))
    assert points.describe(0, 0, "mm", 1000.0) == "wall 0 start at (0, 294) mm"
    assert points.describe(1, 9) == "no stress point"


def test_a_node_of_a_section_by_finite_elements_follows_the_open_sections() -> None:
    # One node (Wn, where, (τ/T)·J) per section by finite elements, after the open ones and
    # padded to their width; σ_w = E·Wn·θ″ and τ_sv = G·t·θ′ there, no warping shear (Sw = 0).
    nodes = node_stress_points([2e-3], [[0.05, 0.01]], [4e-3])
    points = join_stress_points(stress_points([I_BEAM]), nodes)
    assert points.valid.shape == (2, 10)
    assert points.valid[1].tolist() == [True] + [False] * 9
    assert points.unit_warping[1, 0] == 2e-3 and points.thickness[1, 0] == 4e-3
    assert points.wall[1, 1:].tolist() == [-1] * 9 and points.statical_moment[1].sum() == 0.0
    assert points.describe(1, 0, "mm", 1000.0) == (
        "mesh node of largest |Wn| (finite elements) at (50, 10) mm"
    )
    stresses = torsional_stresses(points, [1], [1e-3], [2e-3], [5e-3], 80e9, 200e9)
    assert stresses.warping_normal[0, 0] == pytest.approx(200e9 * 2e-3 * 2e-3, rel=1e-15)
    assert stresses.saint_venant_shear[0, 0] == pytest.approx(80e9 * 4e-3 * 1e-3, rel=1e-15)
    assert stresses.warping_shear[0, 0] == 0.0 and not stresses.valid[0, 1:].any()


def test_section_of_no_warping_is_not_checked() -> None:
    # Stations of a round part (section −1) carry no stress point: their segment is not
    # checked (NaN), and the open section's segment is.
    state = _restrained_member(4.0, 5e3, 0.5)
    station_section = np.where(np.arange(21) < 10, 0, -1)
    stresses = _stresses(state, station_section=station_section)
    assert not stresses.valid[10:].any() and (stresses.warping_normal[:, 10:] == 0).all()
    judged = warping_utilisations(_inputs(stresses, [0, 10], [0.0, 80e6], [0.0, 9e6]))
    assert judged.checked.tolist() == [True, False]
    assert np.isnan(judged.value[..., 1]).all() and np.isnan(judged.limit[..., 1]).all()
    assert np.isfinite(judged.value[..., 0]).all()


def test_check_rows_say_what_was_added() -> None:
    state = _restrained_member(4.0, 5e3, 0.5)
    stresses = _stresses(state)
    inputs = _inputs(stresses, [0, 10], [40e6, 0.0], [0.0, 5e6])
    judged = warping_utilisations(inputs)
    x = np.linspace(0.0, 4.0, 21)
    places = WarpingRowPlaces(
        ("service",),
        ("girder", "girder"),
        (0, 1),
        x,
        np.zeros(21, np.intp),
        stress_points([I_BEAM]),
    )
    rows = warping_check_rows(inputs, judged, places)
    assert [(row.segment, row.kind) for row in rows] == [
        (segment, kind) for segment in (0, 1) for kind in WARPING_KINDS
    ]
    first = rows[0]
    assert first.value == judged.value[0, 0, 0] and first.limit == 125e6
    assert "4e+07 Pa" in first.note and "bending analysis" in first.note
    assert "Sy/FoS" in first.note and "governs at wall" in first.note
    assert "von Mises" in rows[1].note  # the shear limit follows the design's criterion
    # σ_w peaks at a flange tip (a wall's end 75 mm from the web), at the restrained end.
    point = stress_points([I_BEAM]).location[0, judged.point[0, 0, 0]]
    assert first.x == 0.0 and abs(point[0]) == pytest.approx(0.075)
    assert "end at (" in first.note
    row = check_row(first, UnitSystem(stress="MPa"))
    assert row["value"] == pytest.approx(judged.value[0, 0, 0] / 1e6)
    assert all(CHECK_QUANTITIES[kind] == "stress" for kind in WARPING_KINDS)


def test_limits_follow_the_criterion_and_need_a_yield_strength() -> None:
    other = Material("other steel", 79.3e9, 350e6, 500e6, elastic_modulus=207e9)
    design = DesignCriteria(factor_of_safety=1.5, shear_criterion="tresca")
    tresca = warping_limits([STEEL, other], [1, 0, 1], design)
    assert tresca.normal.tolist() == [350e6 / 1.5, 250e6 / 1.5, 350e6 / 1.5]
    assert tresca.shear.tolist() == [350e6 / 2 / 1.5, 250e6 / 2 / 1.5, 350e6 / 2 / 1.5]
    assert "Tresca" in tresca.shear_basis[0] and tresca.segment_material.tolist() == [1, 0, 1]
    cast_iron = Material("no yield", 41.4e9, None, 200e6)
    with pytest.raises(InputError) as caught:
        warping_limits([cast_iron], [0], DesignCriteria())
    assert caught.value.field == "yield_strength" and "no yield" in caught.value.message


def test_coexisting_stresses_by_segment() -> None:
    design = DesignCriteria(
        coexisting_stresses=(
            CoexistingStress("b", 1, 30e6, 2e6),
            CoexistingStress("a", 0, 0.0, 4e6),
        )
    )
    normal, shear = coexisting_by_segment(design, ("a", "b"), (2, 3))
    assert normal.tolist() == [0, 0, 0, 30e6, 0]
    assert shear.tolist() == [4e6, 0, 0, 2e6, 0]


BASE = {
    "units": {"stress": "MPa"},
    "materials": {"steel": {"shear_modulus": 79300, "yield_strength": 250}},
    "shafts": [
        {
            "id": "s",
            "segments": [
                {
                    "length": 1.0,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": 0.04},
                }
            ]
            * 2,
        }
    ],
    "supports": [{"shaft": "s", "x": 0}],
    "load_cases": [{"name": "T", "torques": [{"shaft": "s", "x": 1.0, "torque": 500}]}],
    "design": {"coexisting_stresses": [{"shaft": "s", "segment": 1, "normal_stress": 40}]},
}


def test_case_file_keys_load_in_si_and_round_trip() -> None:
    model = parse_case(copy.deepcopy(BASE))
    assert model.design.coexisting_stresses == (CoexistingStress("s", 1, 40e6, 0.0),)
    # The default (0) is left out when written back.
    assert case_to_dict(model)["design"]["coexisting_stresses"] == [
        {"shaft": "s", "segment": 1, "normal_stress": 40}
    ]


@pytest.mark.parametrize(
    ("entry", "field", "words"),
    [
        ({"shaft": "s", "segment": 2}, "segment", "has 2 segments"),
        ({"shaft": "q", "segment": 0}, "shaft", "unknown shaft"),
        ({"shaft": "s", "segment": 0.5}, "segment", "whole number"),
        ({"shaft": "s", "segment": 0, "shear_stress": -1}, "shear_stress", "negative"),
        ({"shaft": "s", "segment": 1}, "segment", "repeats"),
    ],
)
def test_bad_coexisting_stress_names_the_field(entry, field, words) -> None:
    document = copy.deepcopy(BASE)
    document["design"]["coexisting_stresses"].append(entry)
    with pytest.raises(InputError) as caught:
        parse_case(document)
    assert caught.value.field == f"design.coexisting_stresses[1].{field}"
    assert words in caught.value.message


def test_independent_check_says_it_does_not_cover_warping() -> None:
    require_uniform_torsion([False, False])
    with pytest.raises(NotCovered) as caught:
        require_uniform_torsion([False, True])
    assert str(caught.value) == WARPING_NOT_COVERED
    assert "restrained warping" in WARPING_NOT_COVERED


@pytest.mark.parametrize("section", [angle_section(0.1, 0.1, 0.008)])
def test_walls_meeting_at_one_point_carry_only_saint_venant_shear(section) -> None:
    # An angle's walls meet at one point: Wn = 0 and Sw = 0 everywhere (Cw ≈ 0), so only the
    # Saint-Venant shear remains, whatever θ″ and θ‴.
    stresses = torsional_stresses(stress_points([section]), [0], [1e-3], [5.0], [7.0], 80e9, 2e11)
    assert np.abs(stresses.warping_normal).max() <= 1e-9 * 2e11 * 5.0 * 0.1**2
    assert np.abs(stresses.saint_venant_shear[0, stresses.valid[0]]) == pytest.approx(
        80e9 * 0.008 * 1e-3
    )


def test_examples_in_the_docstrings_run() -> None:
    import doctest

    from workbench.design import warping_checks
    from workbench.solver import warping_stress

    for module in (warping_stress, warping_checks):
        outcome = doctest.testmod(module)
        assert outcome.attempted > 0 and outcome.failed == 0


def test_z_section_inner_points_lie_where_wn_vanishes() -> None:
    # Inner stress points are placed where Wn, linear along the wall, passes through zero: Wn
    # interpolated from the wall's ends there is zero, and the point lies on the wall.
    section = z_section(0.15, 0.06, 0.003, 0.003)
    points = stress_points([section])
    inner = points.valid[0] & (points.kind[0] == 2)
    assert inner.any()
    for slot in np.flatnonzero(inner).tolist():
        wall = int(points.wall[0, slot])
        start, end = section.walls[wall]
        a, b = section.points[start], section.points[end]
        along = np.linalg.norm(points.location[0, slot] - a) / np.linalg.norm(b - a)
        w = section.unit_warping
        assert 0.0 < along < 1.0
        assert abs(w[start] + along * (w[end] - w[start])) <= 1e-12 * np.abs(w).max()


@pytest.mark.parametrize(("normal", "shear"), [(0.0, 1e-308), (1e-160, 0.0), (1e200, 1e200)])
def test_combination_at_the_edges_of_the_floats(normal: float, shear: float) -> None:
    # Squares that under- or overflow must not make √(σ² + 3τ²) smaller than a part or inf.
    state = _restrained_member(2.0, 0.0, 0.5)  # no torque: the stated stresses alone
    inputs = _inputs(_stresses(state), [0], [normal], [shear])
    sigma, tau, combined = point_stresses(inputs)
    assert np.isfinite(combined).all()
    assert np.all(combined >= sigma) and np.all(combined >= tau)
    np.testing.assert_allclose(combined, math.hypot(normal, math.sqrt(3.0) * shear), rtol=1e-15)


@pytest.mark.parametrize(
    ("segment", "kind", "value", "limit", "field"),
    [
        (1, "warping_normal_stress", math.inf, 125e6, "design.coexisting_stresses[0]"),
        (0, "warping_combined_stress", math.inf, 125e6, "shafts[0].segments[0].section"),
        (0, "warping_normal_stress", 1e8, 1e-320, "materials.steel.yield_strength"),
        (0, "warping_shear_stress", 1e8, 1e-320, "materials.steel.yield_strength"),
    ],
)
def test_rows_beyond_the_range_of_numbers_name_their_cause(
    segment, kind, value, limit, field
) -> None:
    from workbench.design.check_report import Check
    from workbench.design.finite_checks import require_finite_checks

    model = parse_case(copy.deepcopy(BASE))
    row = Check("T", "s", segment, kind, value, limit, 0.0, "")
    with pytest.raises(InputError) as caught:
        require_finite_checks([row], model, model.design)
    assert caught.value.field == field
    assert "beyond the range of numbers" in caught.value.message
