"""The stresses the checks judged, station by station, for a chart (workbench.design.stress_profile).

Outside reference: τ_nom = 16T/(πd³) for a solid round shaft and τ_max = Kts·τ_nom with Kts = 3.0
for an end-milled keyseat (Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
eq. 3-37 and Table 7-1). The rest checks that the profile is the checks' own numbers: each
segment's largest peak stress equals its check row's value exactly.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from workbench.design.checks import run_checks
from workbench.design.static_checks import CONCENTRATION_KINDS
from workbench.design.stress_profile import shaft_stresses
from workbench.solver.analysis import solve
from workbench.solver.io import load_case

DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"


@pytest.fixture(scope="module")
def demo_report():
    return run_checks(solve(load_case(DEMO)))


def test_every_detail_row_is_the_largest_peak_of_its_segment(demo_report) -> None:
    rows = [c for c in demo_report.checks if c.kind in CONCENTRATION_KINDS]
    assert {c.kind for c in rows} == {"keyseat_stress", "shoulder_stress"}
    for check in rows:
        profile = shaft_stresses(demo_report, check.shaft, check.result)
        kind = CONCENTRATION_KINDS.index(check.kind)
        on_segment = profile.segment == check.segment
        peaks = profile.peak[kind, on_segment]
        assert np.nanmax(peaks) == check.value  # exactly: the same arithmetic
        assert profile.detail_value[kind, check.segment] == check.value
        assert profile.detail_x[kind, check.segment] == check.x
        assert profile.detail_fails[kind, check.segment] == (not check.passes)
        # No trace on a segment without the detail.
        assert np.isnan(profile.peak[kind, ~on_segment]).all()


def test_keyseat_peak_is_three_times_the_nominal_stress(demo_report) -> None:
    # auger segment 0: solid, d = 60 mm, keyseated; Shigley Table 7-1, Kts = 3.0 (end mill).
    results = demo_report.results
    result = "jam, factored"
    profile = shaft_stresses(demo_report, "auger", result)
    window = results._window(results.model.shaft_number("auger"))
    torque = np.abs(results.torque[results.index(result), window])
    on_segment = profile.segment == 0
    nominal = 16.0 * torque[on_segment] / (math.pi * 0.060**3)
    assert profile.factor[1, 0] == 3.0
    assert np.allclose(profile.peak[1, on_segment], 3.0 * nominal, rtol=1e-12)
    assert profile.detail_fails[1, 0]
    assert profile.shear_limit[0] == pytest.approx(390e6 / math.sqrt(3) / 2, rel=1e-12)


def test_shaft_without_details_and_unknown_names(demo_report) -> None:
    profile = shaft_stresses(demo_report, "feeder", "jam")
    assert np.isnan(profile.peak).all() and np.isnan(profile.detail_x).all()
    assert profile.x[0] == 0.0 and len(profile.shear_limit) == 1
    assert shaft_stresses(demo_report, "nope", "jam") is None
    assert shaft_stresses(demo_report, "auger", "nope") is None
