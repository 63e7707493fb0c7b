"""Sweeps on the batch path (``workbench.design.sweep``) against the point-by-point reference.

Every point of a sweep must be what the demo case edited to that value gives when read by the
case-file parser, solved and checked alone (``parse_case`` → ``solve`` → ``run_checks``, the
one-by-one path checked against handbook values in tests/validation); NaN where the edited case is
not valid. Agreement is asked to rel 1e-9, as asked of every sweep since they were batched: the
batches sum the same terms in another order. The demo has a running-speed band, discs, a fatigue
check, tapered and bonded-layer segments and a gear mesh.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest

from tests.test_frequency_ceiling import demo, with_band
from workbench.case.errors import InputError
from workbench.design.checks import run_checks
from workbench.design.sweep import (
    Path,
    SweepRequest,
    edited,
    point_error,
    run_sweep,
    sweep_chunks,
)
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

DIAMETER: Path = ("shafts", 0, "segments", 0, "section", "diameter")


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


def point_by_point(document: dict[str, Any], request: SweepRequest) -> np.ndarray:
    """Each point read, solved and checked on its own (NaN where the edited case is invalid)."""
    out = []
    for value in request.values:
        try:
            model = parse_case(edited(document, request.path, value))
            results = solve(model)
        except InputError:
            out.append(math.nan)
            continue
        row = results.index(request.result)
        units = model.units
        if request.metric == "governing_utilisation":
            governing = run_checks(results).governing
            assert governing is not None
            out.append(governing.utilisation)
        elif request.metric == "max_shear_stress":
            out.append(float(units.from_si(results.shear_stress[row].max(), "stress")))
        elif request.metric == "max_angle":
            out.append(float(units.from_si(np.abs(results.angle[row]).max(), "angle")))
        else:
            out.append(float(units.from_si(results.reactions[row, request.support], "torque")))
    return np.array(out)


METRICS = ("governing_utilisation", "max_shear_stress", "max_angle", "reaction")


@pytest.mark.parametrize("invalid", [math.nan, -5.0])
def test_diameter_sweep_equals_point_by_point(invalid: float) -> None:
    document = demo()
    values = with_invalid_middle(np.linspace(30.0, 90.0, 13), invalid)
    for metric in METRICS:
        request = SweepRequest(DIAMETER, values, metric, "jam", support=1)
        # Chunks of 4: batches with and without the invalid point, and a short last one.
        assert_same(run_sweep(document, request, chunk=4), point_by_point(document, request))


def test_diameter_sweep_where_natural_frequencies_govern() -> None:
    # A wide band about the lowest mode (near 4,000 rpm): the frequency separation governs the
    # larger diameters, the stresses the smaller ones (tests/test_sweep.py shows both happen).
    document = with_band(demo(), 2000.0, 8000.0)
    values = with_invalid_middle(np.linspace(35.0, 80.0, 12), math.nan)
    request = SweepRequest(DIAMETER, values, "governing_utilisation", "jam")
    assert_same(run_sweep(document, request, chunk=5), point_by_point(document, request))


@pytest.mark.parametrize(
    ("path", "low", "high"),
    [
        (("load_cases", 1, "torques", 0, "torque"), -3000.0, 3000.0),  # read by the fatigue check
        (("load_cases", 0, "torques", 0, "torque"), -3000.0, 3000.0),  # and by a combination
        (("load_cases", 0, "distributed", 0, "intensity_end"), -3000.0, 3000.0),
        (("shafts", 0, "segments", 1, "section", "outer_diameter"), 45.0, 90.0),  # a tube
        (("shafts", 0, "segments", 1, "section", "inner_diameter"), 10.0, 75.0),  # past outer
        (("shafts", 0, "segments", 2, "section", "diameter_end"), 40.0, 80.0),  # a taper
        (("shafts", 0, "segments", 3, "layers", 1, "section", "diameter"), 20.0, 49.0),  # bonded
        (("shafts", 0, "segments", 1, "fillet_radius"), -1.0, 8.0),  # a shoulder, ≤ 0 invalid
        (("supports", 1, "stiffness"), -100.0, 5000.0),
        (("gears", 0, "b", "radius"), 30.0, 150.0),
        (("shafts", 0, "segments", 0, "length"), 250.0, 400.0),  # one by one: moves positions
        (("design", "factor_of_safety"), 1.2, 3.0),  # one by one
    ],
)
def test_sweeps_of_other_inputs_equal_point_by_point(path: Path, low: float, high: float) -> None:
    document = demo()
    values = with_invalid_middle(np.linspace(low, high, 9), math.nan)
    for metric in METRICS:
        request = SweepRequest(path, values, metric, "pressing, factored", support=0)
        assert_same(run_sweep(document, request, chunk=4), point_by_point(document, request))


def test_chunks_report_progress_and_point_errors_name_the_field() -> None:
    document = demo()
    request = SweepRequest(DIAMETER, (40.0, 50.0, -5.0, 60.0, 70.0), "max_angle", "jam")
    done = [count for count, _ in sweep_chunks(document, request, chunk=2)]
    assert done == [2, 4, 5]
    error = point_error(document, DIAMETER, -5.0)
    assert error is not None and error.startswith("shafts[0].segments[0].section.diameter: ")
    assert point_error(document, DIAMETER, 50.0) is None


def test_unknown_results_and_supports_are_refused_by_name() -> None:
    document = demo()
    with pytest.raises(InputError) as raised:
        run_sweep(document, SweepRequest(DIAMETER, (50.0,), "max_angle", "no such result"))
    assert raised.value.field == "result"
    with pytest.raises(InputError) as raised:
        run_sweep(document, SweepRequest(DIAMETER, (50.0,), "reaction", "jam", support=9))
    assert raised.value.field == "support"
