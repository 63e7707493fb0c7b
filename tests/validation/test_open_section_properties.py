"""Properties every thin-walled open section has in Vlasov's theory, on random sections.

Sources: V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. I (from memory): the
principal sectorial coordinate (pole at the shear centre, normalised) is the one of least
∫ω² dA, so Cw ≥ 0 and no other pole or origin gives less; Cw, J and Wn are properties of the
shape, unchanged by a rigid motion; a section symmetric about an axis has its shear centre on it;
the walls of a section that all meet at one point warp not at all (Cw = 0: angles, tees);
the warping shear flow vanishes at a free edge (Sw = 0 there). A. P. Boresi and R. J. Schmidt,
*Advanced Mechanics of Materials*, 6th ed., 2003, ch. 8 and 10 (from memory) state the same.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from workbench.solver.open_sections import OpenSectionWarping, open_section, polyline_section
from workbench.solver.open_shapes import angle_section, i_section, tee_section

sizes = st.floats(0.02, 0.5)
fractions = st.floats(0.005, 0.03)


@st.composite
def polylines(draw: st.DrawFn) -> tuple[np.ndarray, np.ndarray]:
    """An x-monotone mid-line (it cannot cross itself) of 2 to 8 walls, thin walls."""
    count = draw(st.integers(2, 8))
    steps = np.array(draw(st.lists(st.floats(0.02, 0.3), min_size=count, max_size=count)))
    heights = np.array(draw(st.lists(st.floats(-0.3, 0.3), min_size=count + 1, max_size=count + 1)))
    points = np.column_stack([np.concatenate([[0.0], np.cumsum(steps)]), heights])
    lengths = np.hypot(*np.diff(points, axis=0).T)
    share = np.array(draw(st.lists(fractions, min_size=count, max_size=count)))
    return points, share * lengths.min()


def rotated(points: np.ndarray, angle: float, shift: tuple[float, float]) -> np.ndarray:
    turn = np.array([[math.cos(angle), -math.sin(angle)], [math.sin(angle), math.cos(angle)]])
    return points @ turn.T + np.array(shift)


def sectorial_spread(points: np.ndarray, thicknesses: np.ndarray, pole: np.ndarray) -> float:
    """∫(ω − mean ω)² dA for the sectorial coordinate about ``pole``, summed along the polyline."""
    start, end = points[:-1] - pole, points[1:] - pole
    omega = np.concatenate([[0.0], np.cumsum(start[:, 0] * end[:, 1] - start[:, 1] * end[:, 0])])
    areas = thicknesses * np.hypot(*np.diff(points, axis=0).T)
    mean = areas @ (omega[:-1] + omega[1:]) / 2.0 / areas.sum()
    w0, w1 = omega[:-1] - mean, omega[1:] - mean
    return float(areas @ (w0**2 + w0 * w1 + w1**2) / 3.0)


@given(polylines(), st.floats(-1.0, 1.0), st.floats(-1.0, 1.0))
def test_warping_constant_is_the_least_spread(
    polyline: tuple[np.ndarray, np.ndarray], px: float, py: float
) -> None:
    points, thicknesses = polyline
    section = polyline_section(points, thicknesses)
    assert section.warping_constant >= 0.0
    scale = section.area * float(np.ptp(points, axis=0).max()) ** 4
    any_pole = sectorial_spread(points, thicknesses, np.array([px, py]))
    assert section.warping_constant <= any_pole + 1e-10 * scale
    at_shear_centre = sectorial_spread(points, thicknesses, section.shear_centre)
    assert section.warping_constant == pytest.approx(at_shear_centre, rel=1e-9, abs=1e-12 * scale)


@given(polylines(), st.floats(-math.pi, math.pi), st.floats(-2, 2), st.floats(-2, 2))
def test_rigid_motion_changes_nothing(
    polyline: tuple[np.ndarray, np.ndarray], angle: float, dx: float, dy: float
) -> None:
    points, thicknesses = polyline
    section = polyline_section(points, thicknesses)
    moved = polyline_section(rotated(points, angle, (dx, dy)), thicknesses)
    scale = float(np.ptp(points, axis=0).max())
    assert moved.warping_constant == pytest.approx(
        section.warping_constant, rel=1e-7, abs=1e-12 * section.area * scale**4
    )
    assert moved.torsion_constant == pytest.approx(section.torsion_constant, rel=1e-12)
    np.testing.assert_allclose(
        moved.unit_warping, section.unit_warping, rtol=0, atol=1e-8 * scale**2
    )
    np.testing.assert_allclose(
        moved.shear_centre, rotated(section.shear_centre[None], angle, (dx, dy))[0], atol=1e-8
    )


@given(polylines())
def test_mirror_symmetric_section_has_its_shear_centre_on_the_axis(
    polyline: tuple[np.ndarray, np.ndarray],
) -> None:
    points, thicknesses = polyline
    half = points + np.array([0.05, 0.0])  # keep the two halves apart: x > 0 on this side
    mirrored = half[::-1] * np.array([-1.0, 1.0])
    # Join the halves by a wall across the axis between their first points.
    whole = np.vstack([mirrored, half])
    walls_t = np.concatenate([thicknesses[::-1], [thicknesses[0]], thicknesses])
    section = polyline_section(whole, walls_t)
    assert section.shear_centre[0] == pytest.approx(0.0, abs=1e-9 * float(np.ptp(whole)))


@given(sizes, sizes, fractions, sizes, sizes, fractions)
def test_angles_and_tees_do_not_warp(
    leg_a: float, leg_b: float, share: float, depth: float, width: float, share_b: float
) -> None:
    for section in (
        angle_section(leg_a, leg_b, share * min(leg_a, leg_b)),
        tee_section(depth, width, share * min(depth, width), share_b * min(depth, width)),
    ):
        extent = float(np.ptp(section.points, axis=0).max())
        assert section.warping_constant <= 1e-12 * section.area * extent**4
        np.testing.assert_allclose(section.unit_warping, 0.0, atol=1e-12 * extent**2)


def free_end_statical_moments(section: OpenSectionWarping) -> np.ndarray:
    degree = np.bincount(section.walls.ravel(), minlength=len(section.points))
    free = degree[section.walls] == 1
    return section.statical_moment[free]


@given(polylines())
def test_no_warping_shear_at_free_edges_of_a_polyline(
    polyline: tuple[np.ndarray, np.ndarray],
) -> None:
    points, thicknesses = polyline
    section = polyline_section(points, thicknesses)
    scale = section.area * float(np.ptp(points, axis=0).max()) ** 2
    np.testing.assert_allclose(free_end_statical_moments(section), 0.0, atol=1e-9 * scale)


@given(sizes, sizes, sizes, fractions, fractions, fractions)
def test_no_warping_shear_at_free_edges_of_an_i(
    depth: float, top: float, bottom: float, a: float, b: float, c: float
) -> None:
    small = min(depth, top, bottom)
    section = i_section(depth, top, bottom, a * small, b * small, c * small)
    scale = section.area * float(np.ptp(section.points, axis=0).max()) ** 2
    np.testing.assert_allclose(free_end_statical_moments(section), 0.0, atol=1e-9 * scale)
    # The shear centre of an I lies on its web, between the flanges.
    assert section.shear_centre[0] == pytest.approx(0.0, abs=1e-12 * depth)
    assert section.points[3, 1] <= section.shear_centre[1] <= section.points[0, 1]


@given(
    sizes,
    sizes,
    sizes,
    fractions,
    st.permutations(range(5)),
    st.lists(st.booleans(), min_size=5, max_size=5),
)
def test_order_and_direction_of_the_walls_change_nothing(
    depth: float, top: float, bottom: float, share: float, order: list[int], flips: list[bool]
) -> None:
    # The same I given wall by wall in another order, some walls drawn the other way round:
    # the section is the same; Sw of a reversed wall is read from its other end, with its sign
    # flipped (what lies behind becomes what lies ahead, and the two sum to ∫Wn dA = 0).
    small = min(depth, top, bottom)
    section = i_section(depth, top, bottom, share * small, share * small, share * small)
    walls = section.walls[order]
    flipped = np.array(flips)
    walls[flipped] = walls[flipped][:, ::-1]
    other = open_section(section.points, walls, section.thicknesses[order])
    scale = section.area * float(np.ptp(section.points, axis=0).max()) ** 2
    assert other.warping_constant == pytest.approx(section.warping_constant, rel=1e-9)
    assert other.torsion_constant == pytest.approx(section.torsion_constant, rel=1e-12)
    np.testing.assert_allclose(other.shear_centre, section.shear_centre, atol=1e-12 * depth)
    np.testing.assert_allclose(other.unit_warping, section.unit_warping, atol=1e-9 * scale)
    expected = section.statical_moment[order]
    expected[flipped] = -expected[flipped][:, ::-1]
    np.testing.assert_allclose(other.statical_moment, expected, atol=1e-9 * scale)
