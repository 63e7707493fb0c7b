"""Batched sweeps against the point-by-point reference, on the demo case.

A sweep solves its points in batches (side-by-side copies of the system, or one load case per
point). Whatever the batching, every point must be what the case edited to that value gives when
read, solved and checked alone (``parse_case`` → :func:`_solo_metric`, i.e. ``solve`` →
``run_checks``); a value that makes the case invalid is NaN. Agreement is asked to rel 1e-9
(rounding: the batches sum the same terms in another order).

The bound on the frequency-separation checks is worked out from the check's own definition
(``workbench.solver.modes.frequency_separations``): a mode below or above a widened band is at
most fully used (≤ 1); one inside [low, high] is measured from the nearer edge,
min(ω/low, high/ω) ≤ √(high/low), equal at ω = √(low·high).
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.design.checks import frequency_checks, frequency_utilisation_ceiling, run_checks
from workbench.panel.document import Path as DocumentPath
from workbench.panel.document import clone, set_at
from workbench.panel.sweep import _solo_metric, run_sweep
from workbench.panel.sweep_request import SweepRequest
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.modes import DEFAULT_MODE_COUNT, natural_modes

CASE = Path(__file__).resolve().parents[1] / "notebooks" / "press_drive.json"
DIAMETER: DocumentPath = ("shafts", 0, "segments", 0, "section", "diameter")


def demo() -> dict[str, Any]:
    return json.loads(CASE.read_text(encoding="utf-8"))


def with_band(document: dict[str, Any], low_rpm: float, high_rpm: float) -> dict[str, Any]:
    """The case with one running-speed band instead of its own (in the file's rpm)."""
    edited = clone(document)
    edited["operating_speeds"] = [{"name": "test band", "min": low_rpm, "max": high_rpm}]
    return edited


def point_by_point(document: dict[str, Any], request: SweepRequest) -> np.ndarray:
    """Each point read, solved and checked on its own (NaN where the edited case is invalid)."""
    out = []
    for value in request.values:
        edited = clone(document)
        set_at(edited, request.path, value)
        try:
            model = parse_case(edited)
        except InputError:
            out.append(math.nan)
            continue
        out.append(_solo_metric(model, request))
    return np.array(out)


def assert_same(swept: np.ndarray, expected: np.ndarray) -> None:
    assert np.array_equal(np.isnan(swept), np.isnan(expected))
    valid = ~np.isnan(expected)
    assert valid.sum() >= len(expected) - 2
    np.testing.assert_allclose(swept[valid], expected[valid], rtol=1e-9, atol=0.0)


def with_invalid_middle(values: np.ndarray, invalid: float) -> tuple[float, ...]:
    """The values with the middle one replaced by one that makes the case invalid."""
    out = [float(value) for value in values]
    out[len(out) // 2] = invalid
    return tuple(out)


@pytest.mark.parametrize("invalid", [math.nan, -5.0])
def test_diameter_sweep_equals_point_by_point(invalid: float) -> None:
    # The demo case has a running-speed band, discs and a fatigue check.
    document = demo()
    values = with_invalid_middle(np.linspace(30.0, 90.0, 13), invalid)
    for metric in ("governing_utilisation", "max_shear_stress", "reaction"):
        request = SweepRequest(DIAMETER, values, metric, "jam", support=1)
        # Chunks of 4: batches with and without the invalid point, and a short last one.
        assert_same(run_sweep(document, request, chunk=4), point_by_point(document, request))


def test_diameter_sweep_where_natural_frequencies_govern() -> None:
    # A wide band about the lowest mode (near 4,000 rpm): at the larger diameters the
    # frequency-separation check governs, at the smaller ones the stresses do.
    document = with_band(demo(), 2000.0, 8000.0)
    values = with_invalid_middle(np.linspace(35.0, 80.0, 12), math.nan)
    request = SweepRequest(DIAMETER, values, "governing_utilisation", "jam")
    assert_same(run_sweep(document, request, chunk=5), point_by_point(document, request))
    kinds = set()
    for value in values:
        edited = clone(document)
        set_at(edited, DIAMETER, value)
        if math.isnan(value):
            continue
        governing = run_checks(solve(parse_case(edited))).governing
        assert governing is not None
        kinds.add(governing.kind)
    assert "frequency_separation" in kinds
    assert kinds - {"frequency_separation"}


@pytest.mark.parametrize(
    "path",
    [
        ("load_cases", 1, "torques", 0, "torque"),  # "jam": read by the fatigue check
        ("load_cases", 0, "torques", 0, "torque"),  # "pressing": fatigue and a combination
        ("load_cases", 0, "distributed", 0, "intensity_end"),
    ],
)
def test_load_sweep_equals_point_by_point(path: DocumentPath) -> None:
    document = demo()
    values = with_invalid_middle(np.linspace(-3000.0, 3000.0, 11), math.nan)
    for metric in ("governing_utilisation", "max_angle"):
        request = SweepRequest(path, values, metric, "pressing, factored")
        assert_same(run_sweep(document, request, chunk=4), point_by_point(document, request))


def lowest_mode_rpm(document: dict[str, Any]) -> float:
    model = parse_case(document)
    modes = natural_modes(model, count=DEFAULT_MODE_COUNT)
    lowest = float(modes.angular_frequency[~modes.rigid_body][0])
    return float(model.units.from_si(lowest, "speed"))


def frequency_utilisations(document: dict[str, Any]) -> tuple[float, list[float]]:
    model = parse_case(document)
    assert isinstance(model.design, DesignCriteria)
    checks, _, _ = frequency_checks(model, model.design)
    assert checks
    ceiling = frequency_utilisation_ceiling(model, model.design)
    return ceiling, [check.utilisation for check in checks]


def test_frequency_ceiling_is_reached_by_a_mode_in_the_middle_of_the_band() -> None:
    document = demo()
    omega = lowest_mode_rpm(document)
    margin = document["design"]["frequency_margin"]
    for ratio in (1.3, 1.5, 3.0):
        # Widened band [ω/ratio, ω·ratio]: the mode sits at its geometric middle (a ratio of at
        # least √((1 + m)/(1 − m)) keeps the band's max above its min).
        edited = with_band(document, omega / ratio / (1.0 - margin), omega * ratio / (1.0 + margin))
        ceiling, utilisations = frequency_utilisations(edited)
        assert ceiling == pytest.approx(ratio, rel=1e-12)
        assert max(utilisations) == pytest.approx(ceiling, rel=1e-9)


def test_frequency_ceiling_bounds_every_band() -> None:
    document = demo()
    omega = lowest_mode_rpm(document)
    rng = np.random.default_rng(11)
    for _ in range(25):
        # Bands from far below to far above the lowest modes, narrow and wide.
        low = omega * float(np.exp(rng.uniform(-3.0, 2.0)))
        edited = with_band(document, low, low * float(np.exp(rng.uniform(0.0, 2.5))))
        ceiling, utilisations = frequency_utilisations(edited)
        assert max(utilisations) <= ceiling * (1.0 + 1e-12)
    ceiling, _ = frequency_utilisations(with_band(document, 0.0, omega))
    assert ceiling == math.inf  # a band from standstill: an inside mode has high/ω, unbounded
