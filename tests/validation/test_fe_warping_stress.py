"""The warping normal stress of a section by finite elements against thin-wall closed forms.

Sources, named beside each check:

* Doubly symmetric I, mid-line model (flange width bf, flange thickness tf, flange mid-lines h0
  apart): the normalised unit warping at a flange tip is Wn = h0·bf/4 (V. Z. Vlasov,
  *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. I; P. A. Seaburg and C. J. Carter, *Torsional
  Analysis of Structural Steel Members*, AISC Design Guide 9, 1997, App. C — both from memory;
  by hand: the sectorial area swept from the web along half a flange, (h0/2)·(bf/2)).
* σ_w = E·Wn·θ″ at a restrained end of an I fixed and held against warping at both ends, a
  torque at mid-span: the closed form G·J·θ″ − E·Cw·θ⁗ = 0 solved by sympy in
  tests/test_warping_check_wiring.py (Boresi & Schmidt, *Advanced Mechanics of Materials*, 6th
  ed., 2003, ch. 10; chapter from memory), and the same member given as ``i_beam``.

Tolerance, and why: thin-wall theory keeps the warping of the wall's mid-line only. The exact
(Saint-Venant) warping function of a wall of thickness t adds a through-thickness part, ±s·t/2
at its faces (s the distance along the wall from the point of zero sectorial area, the web for
a flange), so at a flange tip the finite-element |Wn| lies between h0·bf/4 and
(h0 + tf)·bf/4 — a relative excess of at most tf/h0 (4 % here) — plus the 1 % to which the mesh
is converged. θ″ carries the 1 % of J and of Cw, so σ_w agrees within tf/h0 + 2 % above and 2 %
below.
"""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
import pytest

from tests.test_warping_check_wiring import GIRDER, _warping_normal_at_restraint
from workbench.design.checks import run_checks
from workbench.solver.analysis import solve
from workbench.solver.fe_sections import section_properties
from workbench.solver.io import parse_case
from workbench.solver.open_shapes import i_section

# The girder's I (mm): depth h, flange width bf and thickness tf, web tw.
DEPTH, WIDTH, FLANGE, WEB = 300.0, 150.0, 12.0, 8.0
BETWEEN = DEPTH - FLANGE  # h0, between flange mid-lines
THIN_WALL_EXCESS = FLANGE / BETWEEN  # the through-thickness part at most, relative


def i_outline(depth: float, width: float, flange: float, web: float) -> np.ndarray:
    """The I's outline, web on x = 0, bottom face on y = 0 (the mid-line model's frame)."""
    half, inner = width / 2.0, web / 2.0
    return np.array(
        [
            (-half, 0.0), (half, 0.0), (half, flange), (inner, flange),
            (inner, depth - flange), (half, depth - flange), (half, depth),
            (-half, depth), (-half, depth - flange), (-inner, depth - flange),
            (-inner, flange), (-half, flange),
        ]
    )  # fmt: skip


def test_largest_unit_warping_of_a_thin_i_is_at_a_flange_tip_and_matches_h0_bf_over_4() -> None:
    # Vlasov ch. I / AISC DG9 App. C: Wn(tip) = h0·bf/4 (mid-line), see the module text.
    metres = i_outline(DEPTH, WIDTH, FLANGE, WEB) / 1000.0
    found = section_properties(metres)
    closed = (BETWEEN / 1000.0) * (WIDTH / 1000.0) / 4.0
    peak = abs(found.unit_warping_peak)
    assert closed * (1.0 - 0.01) <= peak <= closed * (1.0 + THIN_WALL_EXCESS) * (1.0 + 0.01)
    x, _ = found.unit_warping_peak_at
    assert abs(x) == pytest.approx(WIDTH / 2000.0, rel=1e-12)  # at a flange tip
    # Signed as the mid-line model: the same quadrant's tip has the same sign.
    thin = i_section(*(size / 1000.0 for size in (DEPTH, WIDTH, WIDTH, FLANGE, FLANGE, WEB)))
    nearest = np.argmin(np.hypot(*(thin.points - np.array(found.unit_warping_peak_at)).T))
    assert np.sign(found.unit_warping_peak) == np.sign(thin.unit_warping[nearest]) != 0.0


def _warping_normal(document: dict[str, Any]) -> float:
    report = run_checks(solve(parse_case(document)))
    (row,) = [check for check in report.checks if check.kind == "warping_normal_stress"]
    assert row.x in (0.0, 4.0)  # at a restrained end (m)
    return row.value


def test_polygon_i_girder_warping_normal_stress_matches_the_closed_form_and_i_beam() -> None:
    # Fixed and held against warping at both ends, 9 kN·m at mid-span (the module's sources).
    document = copy.deepcopy(GIRDER)
    points = i_outline(DEPTH, WIDTH, FLANGE, WEB)
    document["shafts"][0]["segments"][0]["section"] = {
        "shape": "polygon",
        "outer": [{"x": float(x), "y": float(y)} for x, y in points],
    }
    polygon = _warping_normal(document)
    closed = _warping_normal_at_restraint()
    as_i_beam = _warping_normal(GIRDER)
    for reference in (closed, as_i_beam):
        assert 1.0 - 0.02 <= polygon / reference <= 1.0 + THIN_WALL_EXCESS + 0.02
