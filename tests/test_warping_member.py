"""Properties of the restrained-warping member solver: equilibrium, superposition, mesh independence.

Outside checks against closed forms live in tests/validation/test_warping_closed_forms.py.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from workbench.case.errors import InputError, MechanismError
from workbench.solver.warping_element import WarpingElements
from workbench.solver.warping_member import WarpingMember, recover, solve_member

SUPPORTS = {"restrained": (True, True), "free": (True, False), "loose": (False, False)}

lengths = st.floats(0.5, 20.0)
mus = st.floats(1e-3, 3e3)
torques = st.floats(-5e3, 5e3)


def member(
    node_x: np.ndarray, k: float, w: np.ndarray | float, start: str, end: str
) -> WarpingMember:
    n = len(node_x) - 1
    rotation, warping = np.zeros(n + 1, bool), np.zeros(n + 1, bool)
    rotation[0], warping[0] = SUPPORTS[start]
    rotation[-1], warping[-1] = SUPPORTS[end]
    return WarpingMember(node_x, np.full(n, k), np.broadcast_to(w, (n,)).copy(), rotation, warping)


ends = st.sampled_from(
    [
        ("restrained", "restrained"),
        ("free", "free"),
        ("restrained", "loose"),
        ("free", "restrained"),
    ]
)


@settings(max_examples=60, deadline=None)
@given(lengths, mus, torques, torques, st.floats(-300, 300), st.floats(-300, 300), ends)
def test_reactions_balance_the_loads(length, mu, p1, p2, m0, m1, support) -> None:
    k = 5e3
    w = k * (length / mu) ** 2
    nodes = np.array([0.0, 0.3, 0.55, 1.0]) * length
    nodal = np.array([[0.0, p1, p2, 0.0]])
    start = np.array([[m0, m0 + (m1 - m0) * 0.3, m0 + (m1 - m0) * 0.55]])
    end = np.array([[m0 + (m1 - m0) * 0.3, m0 + (m1 - m0) * 0.55, m1]])
    solution = solve_member(member(nodes, k, w, *support), nodal, start, end)
    applied = p1 + p2 + (m0 + m1) / 2 * length
    scale = abs(p1) + abs(p2) + (abs(m0) + abs(m1)) * length + 1.0
    assert abs(solution.torque_reaction.sum() + applied) < 1e-9 * scale
    # The internal torque at every station is minus the external torques to its left.
    x = np.linspace(0.0, length, 23)
    stations = recover(solution, x)
    left_load = np.where(x > nodes[1], p1, 0) + np.where(x > nodes[2], p2, 0)
    left_load += m0 * x + (m1 - m0) * x**2 / (2 * length)
    expected = -(solution.torque_reaction[0, 0] + left_load)
    assert np.allclose(stations.torque[0], expected, rtol=0, atol=1e-8 * scale)


@settings(max_examples=40, deadline=None)
@given(lengths, mus, torques, torques, st.floats(-2.0, 2.0), ends)
def test_superposition(length, mu, p1, p2, factor, support) -> None:
    k = 2e4
    w = k * (length / mu) ** 2
    nodes = np.array([0.0, 0.4, 1.0]) * length
    case_a = np.array([0.0, p1, 0.0])
    case_b = np.array([0.0, 0.0, p2]) if support[1] == "loose" else np.array([0.0, p2, 0.0])
    solved = solve_member(
        member(nodes, k, w, *support), np.stack([case_a, case_b, factor * case_a + case_b])
    )
    combined = factor * solved.rotation[0] + solved.rotation[1]
    scale = np.max(np.abs(solved.rotation)) + 1e-300
    assert np.allclose(solved.rotation[2], combined, rtol=0, atol=1e-9 * scale)


@settings(max_examples=40, deadline=None)
@given(lengths, mus, st.floats(-300, 300), st.floats(-300, 300), st.integers(2, 9), ends)
def test_one_element_or_many_give_the_same_nodes(length, mu, m0, m1, pieces, support) -> None:
    # The element is exact: splitting it changes no value at the original nodes.
    k = 1e4
    w = k * (length / mu) ** 2
    if support[1] == "loose":
        support = (support[0], "free")
    one = solve_member(member(np.array([0.0, length]), k, w, *support), np.zeros((1, 2)), m0, m1)
    nodes = np.linspace(0.0, length, pieces + 1)
    intensity = m0 + (m1 - m0) * nodes / length
    many = solve_member(
        member(nodes, k, w, *support),
        np.zeros((1, pieces + 1)),
        intensity[np.newaxis, :-1],
        intensity[np.newaxis, 1:],
    )
    scale = np.max(np.abs(many.rotation)) + 1e-300
    for got, expected in ((many.rotation, one.rotation), (many.rate, one.rate)):
        assert np.allclose(
            got[:, [0, -1]], expected, rtol=0, atol=1e-9 * np.max(np.abs(expected)) + 1e-15 * scale
        )
    # Inside: recovery from the single element agrees with the fine mesh's nodes.
    inner = recover(one, nodes)
    assert np.allclose(inner.rotation[0], many.rotation[0], rtol=0, atol=1e-9 * scale)


def test_circular_part_condenses_the_rate_of_twist() -> None:
    # A member whose last part does not warp (E·Cw = 0): the system stays regular, and its
    # torque is the Saint-Venant torque G·J·θ′.
    nodes = np.array([0.0, 2.0, 3.0, 5.0])
    solved = solve_member(
        WarpingMember(
            nodes,
            np.array([4e3, 4e3, 9e3]),
            np.array([2e4, 2e4, 0.0]),
            np.array([True, False, False, True]),
            np.array([True, False, False, False]),
        ),
        np.array([[0.0, 800.0, -300.0, 0.0]]),
    )
    stations = recover(solved, np.array([3.5, 4.0, 5.0]))
    assert np.all(np.isfinite(solved.rotation))
    assert np.allclose(stations.torque, stations.saint_venant_torque)
    assert np.allclose(stations.bimoment, 0.0)
    assert abs(solved.torque_reaction.sum() + 500.0) < 1e-9


def test_saint_venant_element_is_plain() -> None:
    elements = WarpingElements(np.array([2.0]), np.array([6e3]), np.array([0.0]))
    matrix = elements.matrices()[0]
    assert matrix[0, 0] == pytest.approx(3e3)
    assert np.all(matrix[[1, 3]][:, [1, 3]] == 0.0)


def test_spinning_member_is_refused() -> None:
    with pytest.raises(MechanismError):
        solve_member(member(np.array([0.0, 1.0]), 1e3, 1e3, "loose", "loose"), np.zeros((1, 2)))


@pytest.mark.parametrize(
    ("field", "node_x", "torsion", "warping"),
    [
        ("node_x", [0.0, 0.0], [1.0], [1.0]),
        ("torsion", [0.0, 1.0], [0.0], [1.0]),
        ("warping", [0.0, 1.0], [1.0], [-1.0]),
        ("warping", [0.0, 1.0], [1.0], [np.nan]),
    ],
)
def test_bad_member_names_the_field(field, node_x, torsion, warping) -> None:
    with pytest.raises(InputError, match=field):
        WarpingMember(
            np.array(node_x),
            np.array(torsion),
            np.array(warping),
            np.ones(2, bool),
            np.ones(2, bool),
        )


@settings(max_examples=40, deadline=None)
@given(lengths, st.floats(1e-3, 3e3) | st.just(np.inf), st.floats(0.05, 0.95), torques, ends)
def test_point_torque_inside_an_element(length, mu, fraction, torque, support) -> None:
    # Its consistent loads on one element give the end nodes of two elements meeting at the load.
    k = 3e3
    w = 0.0 if np.isinf(mu) else k * (length / mu) ** 2
    at = fraction * length
    loads = WarpingElements(np.array([length]), np.array([k]), np.array([w])).point_loads(
        np.array([at]), np.array([torque])
    )
    one = solve_member(
        member(np.array([0.0, length]), k, w, *support),
        loads[:, [0, 2]],
        nodal_bimoment=loads[:, [1, 3]],
    )
    two = solve_member(
        member(np.array([0.0, at, length]), k, w, *support), np.array([[0.0, torque, 0.0]])
    )
    scale = np.max(np.abs(two.rotation)) + 1e-300
    assert np.allclose(one.rotation, two.rotation[:, [0, 2]], rtol=0, atol=1e-9 * scale)
    assert np.allclose(one.torque_reaction, two.torque_reaction[:, [0, 2]], atol=1e-9 * abs(torque))


@pytest.mark.parametrize("side", [-1.0, 1.0])
def test_station_within_rounding_of_a_node_takes_the_node(side: float) -> None:
    # A station a rounding error away from a node (np.linspace's 0.3 against 0.1 × 3.0) once
    # split the element into a sub-element of 5.6e-17 m, whose condensation gave θ′, θ″ and θ‴
    # off by their own size (found by the stress-scaling property of test_warping_checks.py).
    # Beside the node it must agree with the node's values and, a little further off, with
    # itself (the state is smooth away from the torque's jump in θ‴).
    node_x = np.array([0.0, 0.1 * 3.0, 3.0])
    solution = solve_member(
        member(node_x, 1e5, 3e4, "restrained", "restrained"), np.array([[0.0, 1e3, 0.0]])
    )
    at_node = recover(solution, node_x[1:2])
    off = node_x[1] + side * np.array([np.spacing(node_x[1]), 1e-8])
    near = recover(solution, off)
    for name in ("rotation", "rate", "second"):
        values = getattr(near, name)[0]
        scale = np.abs(getattr(at_node, name)).max()
        np.testing.assert_allclose(values, getattr(at_node, name)[0, 0], atol=1e-6 * scale)
    if side > 0:  # the element that starts at the node: its θ‴ (the left one's differs)
        np.testing.assert_allclose(near.third[0], at_node.third[0, 0], rtol=1e-6)
