"""Torque transmitted by a rotating shaft from its power and speed.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, McGraw-Hill,
   ch. 3 (power transmitted by a rotating shaft, P = T·ω).
"""

from __future__ import annotations

import math

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive


def torque_from_power(power: float, speed: float) -> float:
    """Torque a shaft transmits at a given power and rotational speed.

    Parameters
    ----------
    power
        Power P (W); its sign carries over to the torque (negative for power taken off).
    speed
        Rotational speed ω (rad/s), greater than zero.

    Returns
    -------
    float
        T = P/ω (N·m).

    Raises
    ------
    InputError
        ``power`` is not a finite number, or ``speed`` is not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, ch. 3: P = T·ω.
    """
    if not isinstance(power, (int, float)) or isinstance(power, bool) or not math.isfinite(power):
        msg = f"must be a finite number, not {quoted(power)}"
        raise InputError(field="power", message=msg)
    require_positive("speed", speed, "speed")
    if power != 0.0 and not math.isfinite(power / speed):
        msg = f"{quote(power, 'power')} at {quote(speed, 'speed')} gives no finite torque"
        raise InputError(field="speed", message=msg)
    return power / speed
