"""The whole-array range checks by reductions agree with numpy's element-by-element tests.

:func:`~workbench.case.validate.all_finite` decides with one sum in the common case and falls back
to the smallest and largest values when the sum is not finite (an infinity, a NaN, or finite
numbers whose sum overflows); :func:`~workbench.case.validate.all_normal_positive` with two
reductions. The reference is ``numpy.isfinite`` and the limits of IEEE 754 binary64 applied to
every element (``numpy.finfo(float)``: largest 1.7977e308, least normal 2.2251e-308).
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from workbench.case.validate import all_finite, all_normal_positive

FINFO = np.finfo(float)
EDGES = [0.0, -0.0, FINFO.max, -FINFO.max, FINFO.tiny, FINFO.smallest_subnormal, 1.0, -1.0]
SPECIAL = [np.inf, -np.inf, np.nan]


@pytest.mark.parametrize(
    ("values", "finite"),
    [
        ([], True),
        ([FINFO.max, FINFO.max], True),  # the sum overflows, every value is finite
        ([FINFO.max, -FINFO.max, FINFO.max], True),
        ([FINFO.max, np.inf], False),
        ([np.inf, -np.inf], False),  # the sum is NaN
        ([1.0, np.nan], False),
    ],
)
def test_all_finite_on_the_edge_cases(values, finite):
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no numpy warning escapes
        assert all_finite(np.array(values, dtype=float)) is finite


@settings(max_examples=300, deadline=None)
@given(
    hnp.arrays(
        float,
        hnp.array_shapes(max_dims=3, max_side=6),
        elements=st.one_of(st.floats(allow_nan=True), st.sampled_from(EDGES + SPECIAL)),
    )
)
def test_the_reductions_agree_with_numpy_element_by_element(values):
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert all_finite(values) == bool(np.isfinite(values).all())
        normal = (values >= FINFO.tiny) & (values <= FINFO.max)
        assert all_normal_positive(values) == bool(normal.all())
