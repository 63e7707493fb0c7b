"""Preferred numbers (Renard series R5, R10, R20, R40) and rounding a size up to a list.

The series hold the rounded values of 10^(i/n), i = 0 … n−1, for n = 5, 10, 20, 40 in one
decade; every decade repeats them times a power of ten. Each series contains every other term
of the next finer one. The values below were checked against a secondary quotation of the
ISO 3 tables (reference [3]: R5, R10, the R20 values not in R10 and the R40 values not in R20),
not against a copy of the standard itself; the tests also check them against 10^(i/n) and the
nesting of the series.

Rounding is exact in decimal: each candidate size is formed as an integer number of hundredths
times a power of ten in one correctly rounded floating-point operation, so a value that already
is a preferred number (e.g. 0.025) rounds to itself.

References
----------
.. [1] ISO 3:1973, *Preferred numbers — Series of preferred numbers*.
.. [2] ISO 497:1973, *Guide to the choice of series of preferred numbers and of series
   containing more rounded values of preferred numbers*.
.. [3] Wikipedia, "Preferred number", section "Renard numbers" (the R5, R10, R20 and R40 basic
   series of ISO 3), as quoted in public source files that copy its tables.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive

# Rounded preferred numbers of one decade, in hundredths (ISO 3 basic series, as quoted in [3]).
_HUNDREDTHS: dict[str, tuple[int, ...]] = {
    "R5": (100, 160, 250, 400, 630),
    "R10": (100, 125, 160, 200, 250, 315, 400, 500, 630, 800),
    "R20": (100, 112, 125, 140, 160, 180, 200, 224, 250, 280,
            315, 355, 400, 450, 500, 560, 630, 710, 800, 900),
    "R40": (100, 106, 112, 118, 125, 132, 140, 150, 160, 170,
            180, 190, 200, 212, 224, 236, 250, 265, 280, 300,
            315, 335, 355, 375, 400, 425, 450, 475, 500, 530,
            560, 600, 630, 670, 710, 750, 800, 850, 900, 950),
}  # fmt: skip

#: Preferred numbers of one decade [1, 10), per series name.
RENARD_SERIES: dict[str, tuple[float, ...]] = {
    name: tuple(value / 100.0 for value in values) for name, values in _HUNDREDTHS.items()
}

#: Values this module rounds (a power of ten either side must stay finite).
VALUE_RANGE: tuple[float, float] = (1e-300, 1e300)


def _require_value(value: float, field: str = "value") -> None:
    require_positive(field, value, "length")
    if not VALUE_RANGE[0] <= value <= VALUE_RANGE[1]:
        msg = f"must lie between {VALUE_RANGE[0]:g} and {VALUE_RANGE[1]:g}, not {value:g}"
        raise InputError(field, msg)


def _series(series: str) -> tuple[int, ...]:
    if series not in _HUNDREDTHS:
        msg = f"unknown series {quoted(series)}; choose one of {', '.join(_HUNDREDTHS)}"
        raise InputError(field="series", message=msg)
    return _HUNDREDTHS[series]


def _scaled(hundredths: int, exponent: int) -> float:
    # One correctly rounded operation on exact operands: hundredths·10^exponent.
    if exponent >= 0:
        return float(hundredths * 10**exponent)
    return hundredths / 10.0 ** (-exponent)


def _candidates(value: float, series: str) -> list[float]:
    values = _series(series)
    decade = math.floor(math.log10(value))
    # Decades either side absorb any error of log10 near a power of ten.
    return [
        _scaled(hundredths, power - 2)
        for power in range(decade - 1, decade + 3)
        for hundredths in values
    ]


def round_up_preferred(value: float, series: str = "R40") -> float:
    """Smallest preferred number of a Renard series not less than ``value``.

    Parameters
    ----------
    value
        Positive value, any decade (any unit; e.g. a diameter in m).
    series
        ``"R5"``, ``"R10"``, ``"R20"`` or ``"R40"``.

    Returns
    -------
    float
        The preferred number p ≥ value (same unit), p = value when value is preferred.

    Raises
    ------
    InputError
        ``value`` is not a finite positive number within :data:`VALUE_RANGE`, or the series is
        unknown.

    References
    ----------
    .. [1] ISO 3:1973, series R5–R40.
    """
    _require_value(value)
    return min(c for c in _candidates(value, series) if c >= value)


def next_smaller_preferred(value: float, series: str = "R40") -> float:
    """Largest preferred number of a Renard series strictly less than ``value``.

    Parameters
    ----------
    value
        Positive value, any decade.
    series
        ``"R5"``, ``"R10"``, ``"R20"`` or ``"R40"``.

    Returns
    -------
    float
        The preferred number p < value.

    Raises
    ------
    InputError
        ``value`` is not a finite positive number within :data:`VALUE_RANGE`, or the series is
        unknown.

    References
    ----------
    .. [1] ISO 3:1973, series R5–R40.
    """
    _require_value(value)
    return max(c for c in _candidates(value, series) if c < value)


def round_up_to_list(value: float, sizes: Iterable[float], *, quantity: str = "length") -> float:
    """Smallest size of a list not less than ``value`` (e.g. stock bar diameters).

    Parameters
    ----------
    value
        Positive value (SI, e.g. m).
    sizes
        Available sizes (same unit), any order.
    quantity
        Quantity of the values, for messages (``"length"`` by default).

    Returns
    -------
    float
        The smallest size ≥ value.

    Raises
    ------
    InputError
        The list is empty or holds a non-positive size, or ``value`` exceeds its largest size.

    References
    ----------
    .. [1] ISO 497:1973 (choosing sizes from a chosen list).
    """
    require_positive("value", value, quantity)
    given = list(sizes)
    if not given:
        msg = "must hold at least one size"
        raise InputError(field="sizes", message=msg)
    for index, size in enumerate(given):
        require_positive(f"sizes[{index}]", size, quantity)
    available = [float(size) for size in given]
    largest = max(available)
    if value > largest:
        msg = (
            f"{quote(value, quantity)} exceeds the largest available size "
            f"{quote(largest, quantity)}"
        )
        raise InputError(field="value", message=msg)
    return min(size for size in available if size >= value)
