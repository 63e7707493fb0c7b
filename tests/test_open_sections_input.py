"""Bad input to the open-section warping routine: one line naming the field, never a traceback."""

from __future__ import annotations

import math

import numpy as np
import pytest

from workbench.case.errors import LONGEST_LINE, InputError
from workbench.solver.open_sections import open_section, polyline_section
from workbench.solver.open_shapes import channel_section, i_section

#: A bent mid-line of two 1 m walls.
BENT = [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0)]
#: A bent mid-line of two 0.1 m walls.
SMALL_BENT = [(0.0, 0.0), (0.1, 0.0), (0.1, 0.1)]

BAD_POLYLINES = {
    "crosses itself": (
        [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.5, -0.5)],
        [0.01] * 3,
        "section.walls[2]",
        "must not cross itself",
    ),
    "folds back on itself": (
        [(0.0, 0.0), (1.0, 0.0), (0.4, 0.0)],
        [0.01] * 2,
        "section.walls[1]",
        "must not cross itself",
    ),
    "touches itself at a point": (
        [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 0.0)],
        [0.01] * 3,
        "section.points[3]",
        "coincides with point 0",
    ),
    "joins a wall inside it": (
        [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.5, 1.0), (0.5, 0.0)],
        [0.01] * 4,
        "section.walls[3]",
        "split a wall",
    ),
    "zero-length wall": (
        [(0.0, 0.0), (1.0, 0.0), (1.0, 0.0), (1.0, 1.0)],
        [0.01] * 3,
        "section.walls[1]",
        "zero length",
    ),
    "zero thickness": (
        BENT,
        [0.01, 0.0],
        "section.thicknesses[1]",
        "greater than zero",
    ),
    "negative thickness": (
        BENT,
        [-0.01, 0.01],
        "section.thicknesses[0]",
        "greater than zero",
    ),
    "NaN thickness": (
        BENT,
        [0.01, math.nan],
        "section.thicknesses[1]",
        "finite",
    ),
    "thicker than the section is wide": (
        SMALL_BENT,
        [0.01, 0.2],
        "section.thicknesses[1]",
        "thicker than the section is wide",
    ),
    "too stubby for thin-wall theory": (
        SMALL_BENT,
        [0.05, 0.05],
        "section.thicknesses[0]",
        "too thick for thin-walled",
    ),
    "one point": ([(0.0, 0.0)], [], "section.points", "at least two"),
    "infinite point": (
        [(0.0, 0.0), (math.inf, 0.0)],
        [0.01],
        "section.points[1]",
        "finite",
    ),
    "thicknesses miscounted": (
        BENT,
        [0.01],
        "section.thicknesses",
        "one thickness for each of the 2 walls",
    ),
    "not numbers": ([("a", 0.0), (1.0, 0.0)], [0.01], "section.points", "numbers"),
    "thickness not a number": (
        [(0.0, 0.0), (1.0, 0.0)],
        ["thin"],
        "section.thicknesses",
        "numbers",
    ),
}


@pytest.mark.parametrize("name", list(BAD_POLYLINES))
def test_bad_polyline_names_the_field(name: str) -> None:
    points, thicknesses, field, words = BAD_POLYLINES[name]
    with pytest.raises(InputError) as caught:
        polyline_section(points, thicknesses)
    assert caught.value.field == field
    assert words in caught.value.message
    assert len(str(caught.value)) <= LONGEST_LINE
    assert "\n" not in str(caught.value)


def test_closed_loop_is_not_an_open_section() -> None:
    square = [(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)]
    walls = [(0, 1), (1, 2), (2, 0)]  # a closed cell, and point 3 left unjoined
    with pytest.raises(InputError, match="without a closed loop") as caught:
        open_section(square, walls, [0.01] * 3, field="beam.section")
    assert caught.value.field == "beam.section.walls"


def test_walls_index_outside_the_points() -> None:
    with pytest.raises(InputError, match="must index the 3 points") as caught:
        open_section([(0, 0), (1, 0), (1, 1)], [(0, 1), (1, 3)], [0.01, 0.01])
    assert caught.value.field == "section.walls"


def test_shape_dimensions_name_their_field() -> None:
    with pytest.raises(InputError, match="greater than zero") as caught:
        i_section(0.2, 0.1, 0.1, 0.01, -0.01, 0.008, field="shafts[0].segments[2].section")
    assert caught.value.field == "shafts[0].segments[2].section.bottom_thickness"
    with pytest.raises(InputError, match="must exceed the walls across it") as caught:
        channel_section(0.2, 0.1, 0.1, 0.01)
    assert caught.value.field == "section.depth"


def test_straight_strip_has_its_shear_centre_on_itself() -> None:
    # Collinear walls leave the shear-centre system singular; the strip does not warp.
    strip = polyline_section(np.array([(0.0, 0.0), (0.1, 0.0), (0.3, 0.0)]), [0.004, 0.004])
    np.testing.assert_allclose(strip.shear_centre, [0.15, 0.0], atol=1e-15)
    assert strip.warping_constant == 0.0
    assert strip.torsion_constant == pytest.approx(0.3 * 0.004**3 / 3.0)
