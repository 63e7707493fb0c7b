"""Numbers and units as an engineer writes them: ``112.6 MPa``, ``1,250 N·m``, ``0.25 °/m``.

Values are rounded to four significant figures, grouped in thousands, and written without an
exponent between 10⁻³ and 10⁶; outside that range as ``1.235×10⁶``. Unit symbols come from the
unit registry's own pretty format, in the order they were written (``N·m``, not ``m·N``), with
``°`` as the symbol of the degree.
"""

from __future__ import annotations

import functools
import math
from decimal import ROUND_HALF_UP, Decimal

from workbench.case.units import UnitSystem, registry

#: Significant figures of a displayed value (common practice, no source).
SIGNIFICANT_FIGURES = 4
#: Magnitudes written without an exponent: [SMALLEST_PLAIN, LARGEST_PLAIN).
SMALLEST_PLAIN = Decimal("0.001")
LARGEST_PLAIN = Decimal("1e6")
_SUPERSCRIPTS = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


@functools.lru_cache(maxsize=4096)  # a table's limits and stations repeat from redraw to redraw
def format_number(value: float, significant: int = SIGNIFICANT_FIGURES) -> str:
    """Write ``value`` rounded to ``significant`` figures, thousands grouped.

    Parameters
    ----------
    value
        Any float (in the unit it will be shown in).
    significant
        Significant figures kept.

    Returns
    -------
    str
        ``"1,235"``, ``"112.6"``, ``"0.001235"``, ``"−4.5"``, ``"1.235×10⁶"``; ``"—"`` for a value
        that is not finite.
    """
    if not math.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    # Round the shortest decimal that reads back as the value, half up, as a person would
    # round the digits printed (binary rounding would make 1234.5 → 1,234).
    magnitude = Decimal(repr(abs(float(value))))  # a numpy scalar reprs as np.float64(...)
    exponent = magnitude.adjusted()
    step = Decimal(1).scaleb(exponent - significant + 1)
    rounded = magnitude.quantize(step, rounding=ROUND_HALF_UP)
    exponent = rounded.adjusted()  # 9.9996 → 10.00: the rounding may carry into a new decade
    sign = "\u2212" if value < 0 else ""
    if SMALLEST_PLAIN <= rounded < LARGEST_PLAIN:
        decimals = max(0, significant - 1 - exponent)
        text = f"{rounded:,.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        return sign + text
    mantissa = f"{rounded.scaleb(-exponent):.{significant - 1}f}".rstrip("0").rstrip(".")
    return f"{sign}{mantissa}×10{str(exponent).translate(_SUPERSCRIPTS)}"


@functools.lru_cache(maxsize=256)
def unit_symbol(unit: str) -> str:
    """The unit as printed: ``"N*m"`` → ``"N·m"``, ``"kg*m**2"`` → ``"kg·m²"``, ``"deg/m"`` → ``"°/m"``.

    Parameters
    ----------
    unit
        A unit string the registry reads; ``"1"`` for a ratio.
    """
    if unit in ("1", ""):
        return ""
    return format(registry().Unit(unit), "~P")


def readout_symbol(system: UnitSystem, quantity: str) -> str:
    """The printed unit a person reads ``quantity`` in (``"MPa"``, ``"°/m"``; ``""`` for a ratio).

    Parameters
    ----------
    system
        The units shown (its readout unit of a derived quantity, else its own).
    quantity
        What is measured (``"length"``, ``"twist_rate"``, ``"ratio"``, ...).
    """
    return unit_symbol(system.readout_unit(quantity))


def format_quantity(value: float, quantity: str, system: UnitSystem) -> str:
    """An SI value in ``system``'s readout unit of ``quantity``, e.g. ``"112.6 MPa"``, ``"0.25 °/m"``.

    Parameters
    ----------
    value
        The value in SI (m, N·m, Pa, rad, ...).
    quantity
        What it measures (``"length"``, ``"twist_rate"``, ``"ratio"``, ...).
    system
        The units to show it in.
    """
    number = format_number(system.to_readout(value, quantity))
    symbol = readout_symbol(system, quantity)
    return f"{number} {symbol}" if symbol else number
