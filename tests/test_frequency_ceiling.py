"""The bound a sweep uses to skip frequency checks that cannot govern, on the demo case.

(The sweeps themselves are tested against the point-by-point reference in
``tests/test_design_sweep.py``.) The bound on the frequency-separation checks is worked out from the check's own definition
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
from workbench.design.checks import frequency_checks, frequency_utilisation_ceiling
from workbench.panel.document import clone
from workbench.solver.io import parse_case
from workbench.solver.modes import DEFAULT_MODE_COUNT, natural_modes

CASE = Path(__file__).resolve().parents[1] / "notebooks" / "press_drive.json"


def demo() -> dict[str, Any]:
    return json.loads(CASE.read_text(encoding="utf-8"))


def with_band(document: dict[str, Any], low_rpm: float, high_rpm: float) -> dict[str, Any]:
    """The case with one running-speed band instead of its own (in the file's rpm)."""
    edited = clone(document)
    edited["operating_speeds"] = [{"name": "test band", "min": low_rpm, "max": high_rpm}]
    return edited


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
