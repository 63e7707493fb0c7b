"""Two shafts meshed at a fixed end: reactions and internal torque by hand equilibrium.

Shaft s0 is fixed at x = 0 and its gear (pitch radius r_a) sits at the same point; s1's gear
(r_b) is at its x = 0 and a point torque T acts on s1 at 25 mm. A second load case holds two
overlapping distributed torques of zero intensity (they only cut s1 into more elements).

By hand: s1 as a free body has no support, so the mesh torque on s1 is −T; the tooth force is
F = T/r_b and the mesh torque on s0 is F·r_a, so the fixed support of s0 reacts R = T·r_a/r_b
(free body of gear and shaft; T. Philpot, *Mechanics of Materials: An Integrated Learning
System*, MecMovies example M6.13, geared shafts: F from the torque on one gear, the torque on
the other F·D/2). Internal torque T(x) = −Σ external torques on [0, x) (Gere & Goodno,
*Mechanics of Materials*, 8th ed., §3.4): on s1, T between the gear and the load and 0 beyond;
on s0, 0 everywhere (the mesh torque goes straight into the support at the same point). The
zero load case loads nothing: every reaction and torque is 0.

The defect this guards: a one-element shaft in a mesh of exactly 8 elements had its internal
torque negated by ``np.negative(view, out=view)``, which numpy 2.4.6 as installed here computes
wrongly for an input of 64-byte stride written to a strided output (it reads the input as if
contiguous): the second load case took an uninitialised neighbour's torque, and the solve was
refused as out of equilibrium by the applied torque (or, by chance, passed).
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from workbench.cli import main

TORQUE = 1.0  # N·m at 25 mm on s1
RADIUS_A, RADIUS_B = 30.0, 90.0  # mm


def _case(n_segments_s1: int, order: tuple[str, str]) -> dict[str, Any]:
    """The two shafts; s1 60 mm long in ``n_segments_s1`` equal steps."""
    step = 60.0 / n_segments_s1
    cases = {
        "one": {"name": "one", "torques": [{"shaft": "s1", "x": 25, "torque": TORQUE}]},
        "two": {
            "name": "two",
            "distributed": [
                {"shaft": "s1", "start": 5, "end": 20, "intensity_start": 0, "intensity_end": 0},
                {"shaft": "s1", "start": 10, "end": 45, "intensity_start": 0, "intensity_end": 0},
            ],
        },
    }
    section = {"shape": "solid", "diameter": 20}
    return {
        "title": "Two meshed shafts, a fixed end at the mesh",
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": {"shear_modulus": 79300, "source": "demo values"}},
        "shafts": [
            {"id": "s0", "segments": [{"length": 50, "material": "steel", "section": section}]},
            {
                "id": "s1",
                "segments": [
                    {"length": step, "material": "steel", "section": section}
                    for _ in range(n_segments_s1)
                ],
            },
        ],
        "supports": [{"shaft": "s0", "x": 0, "kind": "fixed"}],
        "gears": [
            {
                "a": {"shaft": "s0", "x": 0, "radius": RADIUS_A},
                "b": {"shaft": "s1", "x": 0, "radius": RADIUS_B},
            }
        ],
        "load_cases": [cases[name] for name in order],
    }


def _solve(tmp_path: Path, capsys: pytest.CaptureFixture[str], case: dict[str, Any]) -> Any:
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    status = main(["solve", str(path), "--json"])
    captured = capsys.readouterr()
    assert status == 0, captured.err
    return {result["name"]: result for result in json.loads(captured.out)["results"]}


def _check_by_hand(results: dict[str, Any]) -> None:
    one, two = results["one"], results["two"]
    assert one["reactions"] == pytest.approx([TORQUE * RADIUS_A / RADIUS_B], rel=1e-12)
    assert two["reactions"] == [0.0]
    s1 = one["shafts"]["s1"]
    for x, torque in zip(s1["x"], s1["torque"], strict=True):
        if 0.0 < x < 25.0:
            assert torque == pytest.approx(TORQUE, rel=1e-12)
        elif x > 25.0:
            assert torque == pytest.approx(0.0, abs=1e-12 * TORQUE)
    assert one["shafts"]["s0"]["torque"] == pytest.approx([0.0] * 2, abs=1e-12 * TORQUE)
    for shaft in two["shafts"].values():
        assert all(value == 0.0 for value in shaft["torque"])
        assert all(value == 0.0 for value in shaft["angle"])


@pytest.mark.parametrize("order", [("one", "two"), ("two", "one")], ids=["as-reported", "swapped"])
def test_the_case_as_reported_balances_by_hand(tmp_path, capsys, order):
    # s1 in two segments: 7 elements on s1 (cut at 5, 10, 20, 25, 30, 45 mm) and 1 on s0, 8 in all.
    _check_by_hand(_solve(tmp_path, capsys, _case(2, order)))


@pytest.mark.parametrize("n_segments_s1", range(1, 12))
def test_any_number_of_elements_balances_by_hand(tmp_path, capsys, n_segments_s1):
    # The load of the second case on the one-element shaft: a wrong sweep shows in every size.
    _check_by_hand(_solve(tmp_path, capsys, _case(n_segments_s1, ("two", "one"))))
