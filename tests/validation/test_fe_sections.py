"""Sections by finite elements (workbench.solver.fe_sections) against published closed forms.

Sources, named beside each check:

* S. P. Timoshenko and J. N. Goodier, *Theory of Elasticity*, 3rd ed., McGraw-Hill, 1970,
  §109 (torsion of rectangular bars): K = β·a·b³, τ_max = T/(α·a·b²), the exact series and its
  table (a/b = 1: β = 0.141, α = 0.208; a/b = 2: β = 0.229, α = 0.246; a/b = 4: β = 0.281,
  α = 0.282), as workbench.solver.noncircular sums the series.
* J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., §3.3: J = πd⁴/32,
  J = π(D⁴ − d⁴)/32, τ_max = T·r/J for solid and hollow circles. The circles are drawn as
  regular n-gons; their area is n·R²·sin(2π/n)/2 (derivable), and J is compared with the
  circle's scaled by the square of the area ratio (J ∝ A² for similar shapes near a circle).
* Doubly symmetric I, mid-line model: Cw = t_f·h²·b³/24 (P. A. Seaburg and C. J. Carter,
  *Torsional Analysis of Structural Steel Members*, AISC Design Guide 9, 1997, App. C; from
  memory, and by hand: two flanges bending opposite ways, 2·(t_f·b³/12)·(h/2)²).
* Channel of uniform wall t, mid-line flange b and web h: Cw = t·b³·h²/12·(3b + 2h)/(6b + h) and
  the shear centre e = 3b²/(6b + h) from the web's mid-line, away from the flanges (the textbook
  thin-channel results; from memory, as tests/validation/test_open_sections.py states them).

The thin-wall closed forms neglect terms of order t/b: walls of t/b ≤ 0.04 are drawn, and the
finite-element values must agree within 1 % (the mesh's tolerance) plus that order.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from workbench.solver.fe_sections import section_properties
from workbench.solver.noncircular import rectangle_coefficients


def rectangle(long_side: float, short_side: float) -> np.ndarray:
    return np.array([(0, 0), (long_side, 0), (long_side, short_side), (0, short_side)], float)


def regular_polygon(diameter: float, sides: int) -> np.ndarray:
    angle = np.linspace(0.0, 2.0 * np.pi, sides, endpoint=False)
    return 0.5 * diameter * np.c_[np.cos(angle), np.sin(angle)]


def polygon_area_ratio(sides: int) -> float:
    """Area of a regular n-gon over that of its circumscribed circle (derivable)."""
    return sides * math.sin(2.0 * math.pi / sides) / (2.0 * math.pi)


@pytest.mark.parametrize(
    ("aspect", "table_beta", "table_alpha"),
    [(1.0, 0.141, 0.208), (2.0, 0.229, 0.246), (4.0, 0.281, 0.282)],
)
def test_rectangle_against_the_saint_venant_series(
    aspect: float, table_beta: float, table_alpha: float
) -> None:
    # Timoshenko & Goodier, 3rd ed., §109: the series (summed exactly) within the mesh's 1 %, the
    # printed table within its last digit and the mesh's 1 %. τ_max is at the middle of the long
    # sides, away from any re-entrant corner, so the nodal maximum converges too.
    short = 0.04
    properties = section_properties(rectangle(aspect * short, short))
    alpha, beta = rectangle_coefficients(aspect)
    assert properties.torsion_constant == pytest.approx(beta * aspect * short**4, rel=0.01)
    assert properties.torsion_constant / (aspect * short**4) == pytest.approx(
        table_beta, abs=0.0005 + 0.01 * table_beta
    )
    stress = 1.0 / (alpha * aspect * short**3)
    assert properties.shear_stress_per_torque == pytest.approx(stress, rel=0.01)
    assert 1.0 / (properties.shear_stress_per_torque * aspect * short**3) == pytest.approx(
        table_alpha, abs=0.0005 + 0.01 * table_alpha
    )
    assert properties.shear_centre == pytest.approx(
        (aspect * short / 2, short / 2), abs=1e-3 * short
    )


@pytest.mark.slow  # 256 sides: the mesh follows them
def test_solid_circle_against_pi_d4_over_32() -> None:
    # Gere & Goodno, 8th ed., §3.3; a circle has no warping: Cw ≈ 0 against I_p²/A.
    diameter, sides = 0.05, 256
    properties = section_properties(regular_polygon(diameter, sides))
    ratio = polygon_area_ratio(sides)
    assert properties.torsion_constant == pytest.approx(
        math.pi * diameter**4 / 32.0 * ratio**2, rel=0.01
    )
    assert properties.shear_stress_per_torque == pytest.approx(
        16.0 / (math.pi * diameter**3), rel=0.01
    )
    scale = properties.polar_moment**2 / properties.area
    assert abs(properties.warping_constant) < 1e-6 * scale
    assert properties.shear_centre == pytest.approx((0.0, 0.0), abs=1e-3 * diameter)


@pytest.mark.slow  # 256 sides on each boundary
def test_hollow_circle_against_pi_d4_minus_d4_over_32() -> None:
    # Gere & Goodno, 8th ed., §3.3: J = π(D⁴ − d⁴)/32, τ_max = T·(D/2)/J.
    outer, inner, sides = 0.06, 0.04, 256
    properties = section_properties(
        regular_polygon(outer, sides), (regular_polygon(inner, sides)[::-1],)
    )
    ratio = polygon_area_ratio(sides)
    exact = math.pi * (outer**4 - inner**4) / 32.0
    assert properties.torsion_constant == pytest.approx(exact * ratio**2, rel=0.01)
    assert properties.shear_stress_per_torque == pytest.approx(outer / 2.0 / exact, rel=0.01)


def i_outline(depth: float, width: float, thickness: float) -> np.ndarray:
    web_left, web_right = (width - thickness) / 2, (width + thickness) / 2
    top = depth - thickness
    return np.array(
        [
            (0, 0), (width, 0), (width, thickness), (web_right, thickness), (web_right, top),
            (width, top), (width, depth), (0, depth), (0, top), (web_left, top),
            (web_left, thickness), (0, thickness),
        ],
        float,
    )  # fmt: skip


def channel_outline(depth: float, width: float, thickness: float) -> np.ndarray:
    top = depth - thickness
    return np.array(
        [
            (0, 0), (width, 0), (width, thickness), (thickness, thickness), (thickness, top),
            (width, top), (width, depth), (0, depth),
        ],
        float,
    )  # fmt: skip


def test_thin_i_warping_constant_against_the_closed_form() -> None:
    # AISC Design Guide 9, App. C (from memory; also by hand): Cw = t_f·h²·b³/24, h between the
    # flanges' mid-planes; the I is doubly symmetric, so its shear centre is its centre.
    depth, width, thickness = 0.2, 0.1, 0.004
    properties = section_properties(i_outline(depth, width, thickness))
    h = depth - thickness
    closed_form = thickness * h**2 * width**3 / 24.0
    assert properties.warping_constant == pytest.approx(closed_form, rel=0.01 + thickness / width)
    assert properties.shear_centre == pytest.approx((width / 2, depth / 2), abs=1e-3 * depth)


def test_thin_channel_warping_constant_and_shear_centre_against_the_closed_forms() -> None:
    # Thin channel of uniform wall (from memory, as test_open_sections.py): b and h on the
    # mid-line; the shear centre lies outside the web, e = 3b²/(6b + h) from its mid-line.
    depth, width, thickness = 0.2, 0.1, 0.004
    properties = section_properties(channel_outline(depth, width, thickness))
    b, h = width - thickness / 2, depth - thickness
    closed_form = thickness * b**3 * h**2 / 12.0 * (3 * b + 2 * h) / (6 * b + h)
    order = thickness / width
    assert properties.warping_constant == pytest.approx(closed_form, rel=0.01 + order)
    offset = 3 * b**2 / (6 * b + h)
    centre_x, centre_y = properties.shear_centre
    assert thickness / 2 - centre_x == pytest.approx(offset, rel=0.01 + order)
    assert centre_y == pytest.approx(depth / 2, abs=1e-3 * depth)
