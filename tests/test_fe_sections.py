"""Polygon and DXF sections by finite elements: convergence, the cache, the case file, bad input."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from sectionproperties.analysis.section import Section as FESection
from sectionproperties.pre.geometry import Geometry
from shapely import Polygon

from workbench.case.errors import InputError
from workbench.solver import fe_sections
from workbench.solver.build import case_file_of
from workbench.solver.fe_sections import relative_error, section_properties
from workbench.solver.io import load_case, parse_case

ROOT = Path(__file__).resolve().parents[1]
CHANNEL = [(0, 0), (100, 0), (100, 10), (8, 10), (8, 190), (100, 190), (100, 200), (0, 200)]


def points(pairs) -> list[dict[str, float]]:
    return [{"x": x, "y": y} for x, y in pairs]


def case(section: dict) -> dict:
    return {
        "units": {"length": "mm", "stress": "MPa", "torque": "N*m"},
        "materials": {"steel": {"shear_modulus": 79300}},
        "shafts": [{"id": "s", "segments": [{"length": 1000, "material": "steel", "section": section}]}],
        "supports": [{"shaft": "s", "x": 0}],
        "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 1000, "torque": 100}]}],
    }  # fmt: skip


# --- convergence ---------------------------------------------------------------------------


@given(
    limit=st.floats(0.1, 10.0),
    amplitude=st.floats(-1.0, 1.0).filter(lambda a: abs(a) > 1e-3),
    ratio=st.floats(0.01, 0.95),
    start=st.integers(0, 5),
)
def test_the_ratio_test_bounds_the_error_of_a_geometric_sequence(
    limit: float, amplitude: float, ratio: float, start: int
) -> None:
    # q_k = q∞ + c·ρᵏ: the estimate from the last three values is never below the true error.
    values = [limit + amplitude * ratio ** (start + k) for k in range(3)]
    true_error = abs(values[-1] - limit) / limit
    assert relative_error(values, limit) >= true_error * (1 - 1e-9)


def test_the_ratio_test_needs_two_values_and_falls_back_on_the_a_priori_bound() -> None:
    assert relative_error([1.0], 1.0) == np.inf
    assert relative_error([1.0, 1.02], 1.0) == pytest.approx(0.02)  # two meshes, h halved: |Δ|
    assert relative_error([1.0, 1.01, 1.03], 1.0) == pytest.approx(0.02)  # growing: |Δ|
    assert relative_error([1.0, 1.02, 1.01], 1.0) == pytest.approx(0.01)  # oscillating: |Δ|
    assert relative_error([1.0, 1.04, 1.05], 1.0) == pytest.approx(0.01 / 3)  # ρ = ¼
    assert relative_error([1.0, 1.0, 1.0], 0.0) == np.inf
    # Twice the elements: h shrinks by √2 only, ρ̄ = 2^(−½), the bound |Δ|·ρ̄/(1 − ρ̄) ≈ 2.41·|Δ|.
    assert relative_error([1.0, 1.01], 1.0, refinement=2.0) == pytest.approx(0.01 / (2**0.5 - 1))


@given(
    limit=st.floats(0.1, 10.0),
    amplitude=st.floats(-1.0, 1.0).filter(lambda a: abs(a) > 1e-3),
    refinement=st.floats(2.0, 8.0),
    order=st.floats(1.0, 4.0),
)
def test_the_a_priori_bound_holds_for_any_rate_a_polygon_allows(
    limit: float, amplitude: float, refinement: float, order: float
) -> None:
    # Error ∝ hᵖ with p ≥ 1 (a corner of any angle below 2π), h shrinking by √refinement.
    ratio = refinement ** (-order / 2)
    values = [limit + amplitude, limit + amplitude * ratio]
    assert relative_error(values, limit, refinement) >= abs(amplitude * ratio) / limit * (1 - 1e-9)


@pytest.mark.slow  # the finer mesh has some 5000 elements
def test_the_accepted_mesh_is_within_one_percent_of_a_much_finer_one() -> None:
    # A channel (two re-entrant corners): J and Cw of the accepted mesh against
    # sectionproperties on a mesh with 8 times its elements.
    fe_sections.clear_cache()
    outline = np.array(CHANNEL, float) / 1000.0
    properties = section_properties(outline)
    assert properties.torsion_error <= 0.01 and properties.warping_error <= 0.01
    geometry = Geometry(Polygon(outline * 10.0))  # the same at a size near 1, as analysed
    geometry.create_mesh(mesh_sizes=geometry.calculate_area() / (8 * properties.elements))
    fine = FESection(geometry)
    fine.calculate_geometric_properties()
    fine.calculate_warping_properties()
    assert properties.torsion_constant == pytest.approx(fine.get_j() / 1e4, rel=0.01)
    assert properties.warping_constant == pytest.approx(fine.get_gamma() / 1e6, rel=0.01)


# --- the cache -------------------------------------------------------------------------------


def test_a_section_seen_before_comes_from_the_cache(monkeypatch: pytest.MonkeyPatch) -> None:
    fe_sections.clear_cache()
    outline = np.array(CHANNEL, float) / 1000.0
    first = section_properties(outline)

    def refused(*_: object) -> None:
        raise AssertionError("analysed again")

    monkeypatch.setattr(fe_sections, "_analyse", refused)
    assert section_properties(outline.copy()) is first
    moved = outline.copy()
    moved[1, 0] += 1e-6  # any change of the geometry is a new digest
    with pytest.raises(AssertionError, match="analysed again"):
        section_properties(moved)


# --- the case file ---------------------------------------------------------------------------


def test_a_polygon_section_feeds_the_solver_and_saves_as_it_was_given() -> None:
    model = parse_case(case({"shape": "polygon", "outer": points(CHANNEL)}))
    section = model.shafts[0].segments[0].layers[0].section
    direct = section_properties(np.array(CHANNEL, float) / 1000.0)
    assert section.torsion_constant == direct.torsion_constant
    assert section.warping_constant == direct.warping_constant
    assert section.shear_stress_per_torque == direct.shear_stress_per_torque
    saved = case_file_of(model).shafts[0].segments[0].section
    assert [(p.x, p.y) for p in saved.outer] == pytest.approx(CHANNEL)


def square_drawing(path: Path, hole: bool = True, second: bool = False) -> None:
    drawing = ezdxf.new()
    space = drawing.modelspace()
    space.add_lwpolyline([(0, 0), (60, 0), (60, 40), (0, 40)], close=True)
    if hole:
        space.add_lwpolyline([(20, 10), (40, 10), (40, 30), (20, 30)], close=True)
    if second:
        space.add_lwpolyline([(100, 0), (120, 0), (120, 20), (100, 20)], close=True)
    drawing.saveas(path)


def test_a_dxf_section_is_read_beside_the_case_file(tmp_path: Path) -> None:
    square_drawing(tmp_path / "plate.dxf")
    (tmp_path / "case.json").write_text(json.dumps(case({"shape": "dxf", "path": "plate.dxf"})))
    section = load_case(tmp_path / "case.json").shafts[0].segments[0].layers[0].section
    # The same outline as a polygon: a 60 × 40 mm plate with a 20 × 20 mm hole in its middle.
    hole = np.array([(20, 10), (40, 10), (40, 30), (20, 30)], float)
    polygon = section_properties(
        np.array([(0, 0), (60, 0), (60, 40), (0, 40)], float) / 1e3, (hole / 1e3,)
    )
    assert section.torsion_constant == pytest.approx(polygon.torsion_constant, rel=0.01)
    assert section.warping_constant == pytest.approx(polygon.warping_constant, rel=0.01)
    assert section.shear_centre == pytest.approx((0.03, 0.02), abs=1e-5)


# --- bad input -------------------------------------------------------------------------------


def solve_error(section: dict, tmp_path: Path) -> tuple[int, str]:
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case(section)))
    completed = subprocess.run(
        [sys.executable, "-m", "workbench.cli", "solve", str(path)],
        capture_output=True,
        text=True,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
        cwd=ROOT,
        timeout=120,
        check=False,
    )
    return completed.returncode, completed.stderr


FIELD = "shafts[0].segments[0].section"
BAD_POLYGONS = [
    (
        {"outer": points([(0, 0), (10, 10), (10, 0), (0, 10)])},
        f"{FIELD}.outer: the boundary crosses or touches itself near (5 mm, 5 mm)",
    ),
    ({"outer": points([(0, 0), (10, 0)])}, f"{FIELD}.outer"),
    (
        {"outer": points([(0, 0), (10, 0), (20, 0)])},
        f"{FIELD}.outer: encloses no area: its points lie on one line",
    ),
    (
        {"outer": points([(0, 0), (10, 0), (0, 0), (10, 0)])},
        f"{FIELD}.outer: needs at least 3 distinct points to enclose an area, not 2",
    ),
    (
        {
            "outer": points([(0, 0), (10, 0), (10, 10), (0, 10)]),
            "holes": [points([(20, 20), (30, 20), (30, 30)])],
        },
        f"{FIELD}.holes[0]: must lie inside the outer boundary, clear of it",
    ),
    (
        {
            "outer": points([(0, 0), (10, 0), (10, 10), (0, 10)]),
            "holes": [points([(5, 2), (15, 2), (15, 8), (5, 8)])],
        },
        f"{FIELD}.holes[0]: must lie inside the outer boundary, clear of it",
    ),
    (
        {
            "outer": points([(0, 0), (10, 0), (10, 10), (0, 10)]),
            "holes": [points([(2, 2), (6, 2), (6, 6), (2, 6)]), points([(4, 4), (8, 4), (8, 8)])],
        },
        f"{FIELD}.holes[1]: overlaps or touches holes[0]",
    ),
    (
        {"outer": points([(0, 0), (1e300, 0), (0, 1e300)])},
        f"{FIELD}.outer: spans 1e+300 mm: too large for the section's formulas",
    ),
]


@pytest.mark.parametrize(("keys", "expected"), BAD_POLYGONS)
def test_a_bad_polygon_is_one_line_naming_the_field(
    keys: dict, expected: str, tmp_path: Path
) -> None:
    status, stderr = solve_error({"shape": "polygon", **keys}, tmp_path)
    assert status == 2
    assert len(stderr.strip().splitlines()) == 1
    assert stderr.startswith(expected), stderr


def test_the_section_errors_name_the_field_in_process() -> None:
    with pytest.raises(InputError) as caught:
        parse_case(
            case({"shape": "polygon", "outer": points([(0, 0), (10, 10), (10, 0), (0, 10)])})
        )
    assert caught.value.field == f"{FIELD}.outer"


@pytest.mark.parametrize(
    ("write", "expected"),
    [
        (None, "cannot read the drawing"),
        (b"not a drawing at all\n", "cannot be read as a DXF drawing"),
        ("open", "the drawing holds no closed outline"),
        ("two", "the drawing holds 2 separate closed outlines; a section is one outline"),
    ],
)
def test_a_bad_drawing_is_one_line_naming_the_path(
    write: object, expected: str, tmp_path: Path
) -> None:
    drawing = tmp_path / "part.dxf"
    if isinstance(write, bytes):
        drawing.write_bytes(write)
    elif write == "open":
        document = ezdxf.new()
        document.modelspace().add_line((0, 0), (10, 0))
        document.saveas(drawing)
    elif write == "two":
        square_drawing(drawing, hole=False, second=True)
    status, stderr = solve_error({"shape": "dxf", "path": "part.dxf"}, tmp_path)
    assert status == 2
    assert len(stderr.strip().splitlines()) == 1
    assert f"{FIELD}.path: " in stderr and expected in stderr, stderr
    assert "Traceback" not in stderr


@pytest.mark.parametrize(
    ("path", "expected"),
    [
        ("/dev/zero", "it is not a file"),
        ("/", "it is not a file"),
        ("/tmp/a\u0000b.dxf", "cannot read"),
    ],
)
def test_a_drawing_path_that_is_no_file_is_refused_without_reading(
    path: str, expected: str
) -> None:
    with pytest.raises(InputError) as caught:
        parse_case(case({"shape": "dxf", "path": path}))
    assert caught.value.field == f"{FIELD}.path"
    assert expected in caught.value.message


def test_a_relative_drawing_path_needs_a_case_read_from_a_file() -> None:
    with pytest.raises(InputError) as caught:
        parse_case(case({"shape": "dxf", "path": "part.dxf"}))
    assert caught.value.field == f"{FIELD}.path"
    assert "give the drawing's full path" in caught.value.message


def test_the_independent_check_says_it_does_not_cover_a_polygon_section() -> None:
    from workbench.case.load import case_file_from_document
    from workbench.design.independent.compare import independent_check
    from workbench.design.independent.reading import NotCovered

    with pytest.raises(NotCovered, match="polygon section, whose J comes from finite elements"):
        independent_check(
            case_file_from_document(case({"shape": "polygon", "outer": points(CHANNEL)}))
        )
