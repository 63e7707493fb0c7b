"""Warping properties of thin-walled open sections against closed forms and a finite-element code.

Sources, named beside each check:

* Channel of uniform wall, e = 3b²/(h + 6b) (the textbook shear centre of a thin channel) and
  Cw = t·b³·h²/12 · (3b + 2h)/(6b + h), b the flange and h the web on the mid-line (from memory;
  the sectionproperties comparison below checks the same channel independently).
* P. A. Seaburg and C. J. Carter, *Torsional Analysis of Structural Steel Members*, AISC Design
  Guide 9, 1997, App. C (from memory): I shapes Cw = t_f·h²·b³/24, Wn₀ = b·h/4,
  Sw₁ = t_f·b²·h/16; singly symmetric I Cw = t_f·h²·b₁³·b₂³/(12(b₁³ + b₂³)); Z shapes of
  uniform wall Cw = t·b³·h²/12 · (b + 2h)/(2b + h).
* sectionproperties (finite-element warping analysis of the solid outline), an outside library.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from sectionproperties.analysis.section import Section as FESection
from sectionproperties.pre.geometry import Geometry
from shapely.geometry import Polygon

from workbench.solver.open_sections import OpenSectionWarping, polyline_section
from workbench.solver.open_shapes import channel_section, i_section, z_section

DEPTH, WIDTH, THICK = 0.2, 0.1, 0.003


def test_doubly_symmetric_i_closed_forms() -> None:
    # Source: AISC Design Guide 9 (1997) App. C, I shapes (from memory): Cw = t_f·h²·b³/24,
    # Wn at the flange tips b·h/4, Sw at the web-flange junction t_f·b²·h/16 (h between flange
    # mid-planes). Also Cw = 2·(t_f·b³/12)·(h/2)² by hand (flanges bend opposite ways).
    depth, width, flange, web = 0.3, 0.15, 0.012, 0.008
    section = i_section(depth, width, width, flange, flange, web)
    h = depth - flange
    assert section.warping_constant == pytest.approx(flange * h**2 * width**3 / 24.0, rel=1e-12)
    assert abs(section.peak_warping) == pytest.approx(width * h / 4.0, rel=1e-12)
    assert abs(section.peak_statical_moment) == pytest.approx(
        flange * width**2 * h / 16.0, rel=1e-12
    )
    assert section.torsion_constant == pytest.approx(
        (2 * width * flange**3 + h * web**3) / 3.0, rel=1e-12
    )
    np.testing.assert_allclose(section.shear_centre, [0.0, depth / 2.0], atol=1e-15)
    # |Wn| peaks at a flange tip; |Sw| at a flange's junction with the web (on its mid-line).
    assert abs(section.peak_warping_point[0]) == pytest.approx(width / 2.0)
    assert section.peak_statical_point[0] == pytest.approx(0.0, abs=1e-15)


def test_singly_symmetric_i_closed_form() -> None:
    # Source: AISC Design Guide 9 (1997) App. C, singly symmetric I (from memory):
    # Cw = t_f·h²·b₁³·b₂³/(12(b₁³ + b₂³)); the shear centre divides h in the ratio of the
    # flanges' own second moments, e_top = h·b₂³/(b₁³ + b₂³) from the top flange.
    depth, top, bottom, flange, web = 0.25, 0.16, 0.09, 0.01, 0.007
    section = i_section(depth, top, bottom, flange, flange, web)
    h = depth - flange
    expected = flange * h**2 * top**3 * bottom**3 / (12.0 * (top**3 + bottom**3))
    assert section.warping_constant == pytest.approx(expected, rel=1e-12)
    from_top = h * bottom**3 / (top**3 + bottom**3)
    assert section.shear_centre[1] == pytest.approx(depth - flange / 2.0 - from_top, rel=1e-12)


@pytest.mark.parametrize(("width", "depth"), [(0.04, 0.1), (0.075, 0.2), (0.1, 0.1)])
def test_channel_closed_forms(width: float, depth: float) -> None:
    # Uniform wall channel (from memory; also checked against sectionproperties below):
    # e = 3b²/(h + 6b) from the web's mid-line, Cw = t·b³·h²/12·(3b + 2h)/(6b + h).
    t = 0.002
    section = channel_section(depth, width, t, t)
    b, h = width - t / 2.0, depth - t
    assert -section.shear_centre[0] == pytest.approx(3 * b**2 / (h + 6 * b), rel=1e-12)
    assert section.shear_centre[1] == pytest.approx(depth / 2.0, rel=1e-12)
    expected = t * b**3 * h**2 / 12.0 * (3 * b + 2 * h) / (6 * b + h)
    assert section.warping_constant == pytest.approx(expected, rel=1e-12)


def test_z_closed_form() -> None:
    # Source: AISC Design Guide 9 (1997) App. C, Z shapes of uniform wall (from memory):
    # Cw = t·b³·h²/12·(b + 2h)/(2b + h); the shear centre is the centroid (point symmetry).
    t = 0.0025
    section = z_section(0.15, 0.06, t, t)
    b, h = 0.06 - t / 2.0, 0.15 - t
    expected = t * b**3 * h**2 / 12.0 * (b + 2 * h) / (2 * b + h)
    assert section.warping_constant == pytest.approx(expected, rel=1e-12)
    np.testing.assert_allclose(section.shear_centre, section.centroid, atol=1e-15)


@pytest.mark.parametrize("walls", [8, 64, 256])
def test_semicircle_shear_centre(walls: int) -> None:
    # Source: thin semicircular open section of mid-line radius r, shear centre e = 4r/π from the
    # centre of the arc (Boresi & Schmidt, 6th ed., ch. 8; from memory). The arc is drawn as a
    # polyline of straight walls; the chords' error falls as 1/walls².
    radius, thickness = 0.1, 0.002
    angle = np.linspace(-np.pi / 2.0, np.pi / 2.0, walls + 1)
    points = radius * np.column_stack([np.cos(angle), np.sin(angle)])
    section = polyline_section(points, np.full(walls, thickness))
    expected = 4.0 * radius / np.pi
    assert section.shear_centre[0] == pytest.approx(expected, rel=1.0 / walls**2)
    assert section.shear_centre[1] == pytest.approx(0.0, abs=1e-15)


# sectionproperties: finite-element warping analysis of the solid outline
# --------------------------------------------------------------------------------------------


def fe_section(outline: list[tuple[float, float]]) -> FESection:
    """Mesh the outline (elements ≤ 4 mm²) and run sectionproperties' warping analysis."""
    with warnings.catch_warnings():
        # A warning inside the reference library would make its answer suspect: fail on it.
        warnings.simplefilter("error")
        section = FESection(Geometry(Polygon(outline)).create_mesh(mesh_sizes=[4e-6]))
        section.calculate_geometric_properties()
        section.calculate_warping_properties()
    return section


def i_outline(depth: float, top: float, bottom: float, t_top: float, t_bottom: float, web: float):
    return [
        (-bottom / 2, 0.0), (bottom / 2, 0.0), (bottom / 2, t_bottom), (web / 2, t_bottom),
        (web / 2, depth - t_top), (top / 2, depth - t_top), (top / 2, depth), (-top / 2, depth),
        (-top / 2, depth - t_top), (-web / 2, depth - t_top), (-web / 2, t_bottom),
        (-bottom / 2, t_bottom),
    ]  # fmt: skip


def channel_outline(depth: float, width: float, flange: float, web: float):
    return [
        (-web / 2, 0.0), (width - web / 2, 0.0), (width - web / 2, flange), (web / 2, flange),
        (web / 2, depth - flange), (width - web / 2, depth - flange), (width - web / 2, depth),
        (-web / 2, depth),
    ]  # fmt: skip


def z_outline(depth: float, width: float, flange: float, web: float):
    return [
        (-web / 2, 0.0), (width - web / 2, 0.0), (width - web / 2, flange), (web / 2, flange),
        (web / 2, depth), (web / 2 - width, depth), (web / 2 - width, depth - flange),
        (-web / 2, depth - flange),
    ]  # fmt: skip


#: Agreement expected of thin-wall theory for walls of t/b = 0.03: the mid-line model counts the
#: junctions twice or not at all (areas ~t² against walls ~b·t, lever arms shifted by ~t/2) and
#: leaves out each wall's own through-thickness warping (~(t/b)² of Cw); both are a fraction of
#: t/b = 3 %, and the two partly cancel, so 1 % is asked (observed: within 0.2 %).
THIN_WALL_AGREEMENT = 0.01

CASES = {
    "doubly symmetric I": (
        i_section(DEPTH, WIDTH, WIDTH, THICK, THICK, THICK),
        i_outline(DEPTH, WIDTH, WIDTH, THICK, THICK, THICK),
    ),
    "singly symmetric I": (
        i_section(DEPTH, WIDTH, 0.06, THICK, 0.002, 0.0025),
        i_outline(DEPTH, WIDTH, 0.06, THICK, 0.002, 0.0025),
    ),
    "channel": (
        channel_section(DEPTH, WIDTH, THICK, 0.0025),
        channel_outline(DEPTH, WIDTH, THICK, 0.0025),
    ),
    "Z": (z_section(DEPTH, WIDTH, THICK, 0.0025), z_outline(DEPTH, WIDTH, THICK, 0.0025)),
}


@pytest.mark.parametrize("name", list(CASES))
def test_against_sectionproperties(name: str) -> None:
    # Source: sectionproperties FE warping analysis of the same sharp-cornered outline, about
    # 500 elements (the mesh of tests/validation/test_noncircular.py's thin walls).
    section, outline = CASES[name]
    fe = fe_section(outline)
    assert isinstance(section, OpenSectionWarping)
    assert fe.get_gamma() == pytest.approx(section.warping_constant, rel=THIN_WALL_AGREEMENT)
    assert fe.get_j() == pytest.approx(section.torsion_constant, rel=THIN_WALL_AGREEMENT)
    np.testing.assert_allclose(
        fe.get_sc(), section.shear_centre, atol=THIN_WALL_AGREEMENT * WIDTH, rtol=0.0
    )
