"""The array fits of the design library, element by element (hypothesis).

Each array function (shoulder fillet, transverse hole, "1° in 20 diameters") is compared over
random arrays of every shape, inside and outside the fits' ranges, with two things:

* a plain-Python reference written here from the published data — Norton's fit constants
  (R. L. Norton, *Machine Design: An Integrated Approach*, App. C, shaft shoulder fillet in
  torsion, Kts = A(r/d)^b) and Pilkey & Pilkey's transverse-hole polynomial (W. D. Pilkey and
  D. F. Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., 2008, transverse hole in a
  solid bar in torsion) — and the out-of-range rules the concentration module states;
* the scalar functions a report calls, one element at a time: the same value (to 1e-12), the
  same range flag and note, and an :class:`InputError` exactly where the array gives NaN.
"""

from __future__ import annotations

import doctest
import math
from collections.abc import Callable
from types import ModuleType
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import array_shapes, broadcastable_shapes

from workbench.case.errors import InputError
from workbench.design import allowables, blockwise, concentration
from workbench.design.allowables import (
    twenty_diameters_twist_rate,
    twist_rate_one_degree_in_twenty_diameters,
)
from workbench.design.concentration import (
    shoulder_fillet_factors,
    shoulder_fillet_kts,
)
from workbench.design.transverse_hole import transverse_hole_factors, transverse_hole_kts

SETTINGS = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
TOLERANCE = 1e-12

# Norton, Machine Design, App. C: shoulder fillet in torsion, Kts = A·(r/d)^b, as (D/d, A, b).
NORTON = ((1.09, 0.90337, -0.12692), (1.20, 0.83425, -0.21649), (1.33, 0.84897, -0.23161),
          (2.00, 0.86331, -0.23865))  # fmt: skip
# The range the module states as covered (r/d from the charts' axis, D/d from the fits).
FILLET_LOW, FILLET_HIGH = 0.02, 0.30
# Pilkey & Pilkey: Ktg = 4 − 6.055(d/D) + 32.764(d/D)² − 38.33(d/D)³ for 0 ≤ d/D ≤ 0.4 (the range
# from memory).
HOLE_HIGH = 0.4
EDGE = 1e-9  # the module's stated tolerance for a ratio on a range limit


def _on_limit(ratio: float, limits: tuple[float, ...]) -> float:
    for limit in limits:
        if abs(ratio - limit) <= EDGE * limit:
            return limit
    return ratio


def reference_shoulder(big: float, small: float, radius: float) -> tuple[float, bool]:
    """Kts and whether in range, by the module's stated rules on Norton's published fits."""
    ratio = big / small
    if ratio <= 1.0 + EDGE:
        return 1.0, True  # no shoulder
    ratios = tuple(row[0] for row in NORTON)
    ratio = _on_limit(ratio, ratios)
    fillet = _on_limit(radius / small, (FILLET_LOW, FILLET_HIGH))
    in_range = FILLET_LOW <= fillet <= FILLET_HIGH and ratios[0] <= ratio <= ratios[-1]
    at = min(fillet, FILLET_HIGH)  # blunter than charted: held at the chart's end

    def fit(row: int) -> float:
        return NORTON[row][1] * at ** NORTON[row][2]

    if ratio >= ratios[-1]:
        return fit(len(NORTON) - 1), in_range
    if ratio <= ratios[0]:
        return fit(0), in_range
    for row in range(len(NORTON) - 1):
        low, high = ratios[row], ratios[row + 1]
        if low <= ratio <= high:
            weight = (ratio - low) / (high - low)
            return fit(row) + weight * (fit(row + 1) - fit(row)), in_range
    raise AssertionError(ratio)


def reference_hole(hole: float, shaft: float) -> tuple[float, bool]:
    """Ktg and whether in range, from Pilkey & Pilkey's polynomial, held at d/D = 0.4 above."""
    ratio = _on_limit(hole / shaft, (HOLE_HIGH,))
    x = min(ratio, HOLE_HIGH)
    return 4.0 - 6.055 * x + 32.764 * x**2 - 38.33 * x**3, ratio <= HOLE_HIGH


# --- random geometry, in range, out of range, on the limits and invalid -------------------------
DIAMETER_RATIOS = st.one_of(
    st.floats(0.5, 3.5),
    st.sampled_from([1.0, 1.0 + 1e-10, 1.09, 1.2, 1.33, 2.0, 2.0 * (1 + 5e-10), 1.04, 2.5]),
)
FILLET_RATIOS = st.one_of(
    st.floats(1e-4, 1.0),
    st.sampled_from([0.02, 0.3, 0.02 * (1 - 5e-10), 0.3 * (1 + 5e-10), 0.001, 0.5]),
)
HOLE_RATIOS = st.one_of(
    st.floats(1e-6, 1.2), st.sampled_from([0.2, 0.4, 0.4 * (1 + 5e-10), 0.41, 1.0])
)
ODD = st.sampled_from([0.0, -0.01, math.nan, math.inf])


def _values(
    data: st.DataObject, shape: tuple[int, ...], ratios: st.SearchStrategy[float]
) -> np.ndarray:
    """Ratios of an array shape, a few elements replaced by zero, negative or non-finite ones."""
    count = int(np.prod(shape))
    values = data.draw(
        st.lists(st.one_of(ratios, ratios, ratios, ODD), min_size=count, max_size=count)
    )
    return np.array(values, dtype=float).reshape(shape)


def _scale(diameter: np.ndarray) -> np.ndarray:
    """The diameters other sizes are drawn as ratios of, a valid one where they are not."""
    return np.where(np.isfinite(diameter) & (diameter > 0.0), diameter, 0.05)


def _shapes(data: st.DataObject, arguments: int) -> list[tuple[int, ...]]:
    """Shapes that broadcast together (a batch × segments, a row, a column, one number)."""
    base = data.draw(array_shapes(min_dims=0, max_dims=3, max_side=4))
    extra = data.draw(broadcastable_shapes(base, min_dims=0, max_dims=3, max_side=4, min_side=0))
    return [base, extra, *([base] * (arguments - 2))]


def _assert_elementwise(
    factors: Any,
    inputs: tuple[np.ndarray, ...],
    reference: Callable[..., tuple[float, bool]],
    scalar_function: Callable[..., Any],
) -> None:
    """Each element of ``factors`` against the reference and the scalar function's answer.

    Where the inputs define no factor (a size not finite and positive, D < d, a hole not smaller
    than the shaft; the ``reference`` is asked only elsewhere) the array holds NaN and the scalar
    function refuses the geometry.
    """
    shape = np.broadcast_shapes(*(array.shape for array in inputs))
    assert factors.value.shape == factors.in_range.shape == shape
    for index in np.ndindex(shape):
        args = tuple(float(np.broadcast_to(array, shape)[index]) for array in inputs)
        value = factors.value[index]
        ordered = args[0] >= args[1] if reference is reference_shoulder else args[0] < args[1]
        if not (all(math.isfinite(a) and a > 0.0 for a in args) and ordered):
            assert math.isnan(value) and not factors.in_range[index]
            with pytest.raises(InputError):
                scalar_function(*args)
            continue
        expected, in_range = reference(*args)
        assert value == pytest.approx(expected, rel=TOLERANCE, abs=0.0), args
        assert bool(factors.in_range[index]) == in_range, args
        scalar = scalar_function(*args)
        assert scalar.value == pytest.approx(value, rel=TOLERANCE, abs=0.0)
        assert scalar.in_range == in_range
        assert scalar.note == factors.note(index)


@given(data=st.data())
@SETTINGS
def test_shoulder_fillet_array_equals_reference_and_scalar(data: st.DataObject) -> None:
    small_shape, ratio_shape, fillet_shape = _shapes(data, 3)
    small = _values(data, small_shape, st.floats(1e-3, 1.0))
    big = _values(data, ratio_shape, DIAMETER_RATIOS) * _scale(small)
    radius = _values(data, fillet_shape, FILLET_RATIOS) * _scale(small)
    factors = shoulder_fillet_factors(big, small, radius)
    _assert_elementwise(factors, (big, small, radius), reference_shoulder, shoulder_fillet_kts)


@given(data=st.data())
@SETTINGS
def test_transverse_hole_array_equals_reference_and_scalar(data: st.DataObject) -> None:
    shaft_shape, ratio_shape = _shapes(data, 2)
    shaft = _values(data, shaft_shape, st.floats(1e-3, 1.0))
    hole = _values(data, ratio_shape, HOLE_RATIOS) * _scale(shaft)
    factors = transverse_hole_factors(hole, shaft)
    _assert_elementwise(factors, (hole, shaft), reference_hole, transverse_hole_kts)


@given(data=st.data())
@SETTINGS
def test_twenty_diameters_array_equals_rule_and_scalar(data: st.DataObject) -> None:
    # "1° in 20 diameters" (common practice, no source): (π/180)/(20 d) rad/m.
    shape = data.draw(array_shapes(min_dims=0, max_dims=3, max_side=5))
    diameter = _values(data, shape, st.floats(1e-4, 10.0))
    limits = twenty_diameters_twist_rate(diameter)
    assert limits.shape == shape
    for index in np.ndindex(shape):
        d = float(diameter[index])
        if not (math.isfinite(d) and d > 0.0):
            assert math.isnan(limits[index])
            with pytest.raises(InputError):
                twist_rate_one_degree_in_twenty_diameters(d)
            continue
        assert limits[index] == pytest.approx(math.pi / 180.0 / (20.0 * d), rel=TOLERANCE)
        scalar = twist_rate_one_degree_in_twenty_diameters(d)
        assert scalar.value == pytest.approx(limits[index], rel=TOLERANCE, abs=0.0)


def test_the_references_reproduce_the_published_points() -> None:
    # Guards on the references themselves: Norton App. C at a tabulated D/d, and the hole
    # polynomial evaluated by hand at d/D = 0.2 (3.79292) and 0.4 (4.36712).
    assert reference_shoulder(1.33, 1.0, 0.05) == (0.84897 * 0.05**-0.23161, True)
    assert reference_hole(0.2, 1.0)[0] == pytest.approx(3.79292, abs=1e-12)
    assert reference_hole(0.5, 1.0) == (pytest.approx(4.36712, abs=1e-12), False)


@pytest.mark.parametrize("module", [concentration, allowables, blockwise], ids=lambda m: m.__name__)
def test_examples_in_the_docstrings_run(module: ModuleType) -> None:
    # The examples quote the values above (Norton App. C, Pilkey & Pilkey, 1° in 20 diameters)
    # and a product of broadcast arrays worked by hand.
    assert doctest.testmod(module, raise_on_error=True).attempted > 0
