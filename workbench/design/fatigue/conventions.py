"""What the fatigue modules share: unit factors, the source they cite, checks of plain numbers."""

from __future__ import annotations

import math

from workbench.case.errors import InputError, quoted

MPA = 1e6
#: One kpsi in pascals (1000 lbf/in², with the international inch and pound, exact to rounding).
KPSI = 6.894757293168361e6
INCH = 0.0254  # m, exact (international inch, 1959)

SHIGLEY = "Shigley's Mechanical Engineering Design, 9th/10th ed."


def require_number(name: str, value: float) -> float:
    """``value`` as a float, or :class:`InputError` on ``name`` when it is not a finite number."""
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        msg = f"must be a number, not {quoted(value)}"
        raise InputError(name, msg)
    if not math.isfinite(value):
        msg = f"must be a finite number, not {value}"
        raise InputError(name, msg)
    return float(value)


def require_positive_number(name: str, value: float, unit: str) -> float:
    """A finite number greater than zero, for quantities no case-file unit carries.

    Kelvin, 1/m³ and plain ratios: the message quotes ``unit`` as given, not in case units.
    """
    number = require_number(name, value)
    if number <= 0.0:
        msg = f"must be greater than zero ({number:g}{' ' + unit if unit else ''})"
        raise InputError(name, msg)
    return number
