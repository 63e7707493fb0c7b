"""Units at the edges: one pint registry, a unit system per case file, SI floats inside.

A :class:`UnitSystem` names a unit for each base quantity of a case file (length, torque, stress,
angle, ...). Derived quantities follow from them: a rotational stiffness is torque/angle, a
distributed torque is torque/length, a shear modulus is in stress units, a twist rate is
angle/length. ``to_si`` and ``from_si`` convert plain floats and numpy arrays; pint is imported only
when a unit other than SI is named, so a purely SI session never pays for it.
"""

from __future__ import annotations

import contextvars
import functools
import math
import re
from dataclasses import dataclass, field, fields
from typing import Any

import numpy as np

from workbench.case.errors import InputError, quoted

#: SI unit of every quantity the solver works in.
SI_UNITS: dict[str, str] = {
    "length": "m",
    "torque": "N*m",
    "stress": "Pa",
    "angle": "rad",
    "power": "W",
    "speed": "rad/s",
    "inertia": "kg*m**2",
    "density": "kg/m**3",
}

#: Derived quantities: name -> (numerator base quantity, denominator base quantity, power of
#: the denominator).
DERIVED: dict[str, tuple[str | None, str | None, int]] = {
    "stiffness": ("torque", "angle", 1),
    "distributed_torque": ("torque", "length", 1),
    "shear_modulus": ("stress", None, 0),
    "area": ("length", None, 0),
    "twist_rate": ("angle", "length", 1),
}

_SIMPLE_FACTORS: dict[str, float] = {
    # Units so common that converting them must not cost a pint import.
    "m": 1.0,
    "mm": 1e-3,
    "cm": 1e-2,
    "N*m": 1.0,
    "N·m": 1.0,
    "N m": 1.0,
    "kN*m": 1e3,
    "N*mm": 1e-3,
    "Pa": 1.0,
    "kPa": 1e3,
    "MPa": 1e6,
    "GPa": 1e9,
    "rad": 1.0,
    "deg": math.pi / 180.0,
    "degree": math.pi / 180.0,
    "W": 1.0,
    "kW": 1e3,
    "rad/s": 1.0,
    "rpm": 2.0 * math.pi / 60.0,
    "kg*m**2": 1.0,
    "kg*m^2": 1.0,
    "kg/m**3": 1.0,
    "kg/m^3": 1.0,
    "deg/m": math.pi / 180.0,
}


#: The quantity each shortcut unit measures: a shortcut never bypasses the dimension check.
_SIMPLE_QUANTITY: dict[str, str] = {
    **dict.fromkeys(["m", "mm", "cm"], "length"),
    **dict.fromkeys(["N*m", "N·m", "N m", "kN*m", "N*mm"], "torque"),
    **dict.fromkeys(["Pa", "kPa", "MPa", "GPa"], "stress"),
    **dict.fromkeys(["rad", "deg", "degree"], "angle"),
    **dict.fromkeys(["W", "kW"], "power"),
    **dict.fromkeys(["rad/s", "rpm"], "speed"),
    **dict.fromkeys(["kg*m**2", "kg*m^2"], "inertia"),
    **dict.fromkeys(["kg/m**3", "kg/m^3"], "density"),
    "deg/m": "twist_rate",
}


_NEEDS_ANGLE = ("angle", "speed")
_ANGLE_WORDS = (
    "rad",
    "radian",
    "deg",
    "degree",
    "°",
    "arcmin",
    "arcminute",
    "arcsec",
    "arcsecond",
    "turn",
    "rev",
    "revolution",
    "rpm",
    "grad",
    "gon",
    "mrad",
)


def _names_an_angle(unit: str) -> bool:
    words = re.findall(r"[^\W\d_]+|°", unit)
    return any(word in _ANGLE_WORDS or word.rstrip("s") in _ANGLE_WORDS for word in words)


@functools.lru_cache(maxsize=1)
def registry() -> Any:
    """Return the application's single pint unit registry (created on first use)."""
    import pint  # noqa: PLC0415 - imported lazily: pint costs ~0.3 s and SI cases do not need it

    # The degree's display symbol is °: pint's own is "deg". Redefining it keeps every name and
    # alias, and the registry then prints "°/m" for a twist rate.
    ureg: Any = pint.UnitRegistry(on_redefinition="ignore")
    ureg.define("degree = π / 180 * radian = ° = deg = arcdeg = arcdegree = angular_degree")
    ureg.formatter.default_format = "~"
    ureg.formatter.default_sort_func = None  # units in the order written: N·m, not m·N
    return ureg


def si_unit(quantity: str) -> str:
    """The SI unit of ``quantity``, base or derived (``"stiffness"`` → ``"(N*m)/(rad)"``)."""
    if quantity in SI_UNITS:
        return SI_UNITS[quantity]
    if quantity == "ratio":
        return "dimensionless"
    numerator, denominator, power = DERIVED[quantity]
    top = f"({SI_UNITS[numerator]})" if numerator else "1"
    return f"{top}/({SI_UNITS[denominator]})**{power}" if denominator else top


def _involves_angle(quantity: str) -> bool:
    if quantity in SI_UNITS:
        return quantity in _NEEDS_ANGLE
    if quantity == "ratio":
        return False
    numerator, denominator, _ = DERIVED[quantity]
    return numerator in _NEEDS_ANGLE or denominator in _NEEDS_ANGLE


@functools.lru_cache(maxsize=256)
def unit_factor(unit: str, quantity: str) -> float:
    """Return the factor that turns a value in ``unit`` into SI for ``quantity``.

    Parameters
    ----------
    unit
        A unit string pint reads (``"mm"``, ``"lbf*in"``, ``"N·m/deg"``).
    quantity
        A base quantity of :data:`SI_UNITS`, a derived one of :data:`DERIVED`, or ``"ratio"``.

    Raises
    ------
    InputError
        Naming ``units.<quantity>``: the unit is unknown or measures something else.
    """
    if unit in _SIMPLE_FACTORS and _SIMPLE_QUANTITY.get(unit) == quantity:
        return _SIMPLE_FACTORS[unit]
    ureg = registry()
    try:
        parsed = ureg.Quantity(1.0, unit)
    except Exception as exc:
        msg = f"unknown unit {quoted(unit)}"
        raise InputError(f"units.{quantity}", msg) from exc
    named_angle = _names_an_angle(unit)
    if _involves_angle(quantity) != named_angle and (named_angle or quantity in _NEEDS_ANGLE):
        # pint counts the radian as dimensionless, so "percent" would pass as an angle and
        # "Hz" as a speed; a rotation must be named as one, and a ratio is not an angle.
        hint = " (name an angle: rad, deg, rev, rpm, ...)" if not named_angle else ""
        msg = f"{quoted(unit)} is not a unit of {quantity.replace('_', ' ')}{hint}"
        raise InputError(f"units.{quantity}", msg)
    expected = ureg.Quantity(1.0, si_unit(quantity)).dimensionality
    if parsed.dimensionality != expected:
        msg = (
            f"{quoted(unit)} is not a unit of {quantity.replace('_', ' ')} "
            f"(it has dimension {parsed.dimensionality or 'none'})"
        )
        raise InputError(f"units.{quantity}", msg)
    return float(parsed.to(si_unit(quantity)).magnitude)


@dataclass(frozen=True)
class UnitSystem:
    """The unit of each base quantity in a case file or a report.

    Parameters
    ----------
    length, torque, stress, angle, power, speed, inertia, density
        Any unit string pint can parse, of the matching dimension (``"mm"``, ``"lbf*in"``,
        ``"ksi"``, ``"deg"``, ``"kW"``, ``"rpm"``, ...).
    """

    length: str = "m"
    torque: str = "N*m"
    stress: str = "Pa"
    angle: str = "rad"
    power: str = "W"
    speed: str = "rad/s"
    inertia: str = "kg*m**2"
    density: str = "kg/m**3"
    #: Units a person reads a derived quantity in, where the case file's own (angle/length:
    #: ``deg/mm``) reads badly: ``(("twist_rate", "deg/m"),)``. Display only: values in a case file
    #: stay in the derived unit, and :meth:`as_dict` leaves these out.
    readouts: tuple[tuple[str, str], ...] = field(default=(), compare=False)
    _factors: dict[str, float] = field(default_factory=dict, init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        factors = {}
        for f in fields(self):
            if f.name.startswith("_") or f.name == "readouts":
                continue
            unit = getattr(self, f.name)
            if not isinstance(unit, str) or not unit.strip():
                raise InputError(f"units.{f.name}", f"must be a unit string, not {quoted(unit)}")
            factors[f.name] = unit_factor(unit, f.name)
        for name, (numerator, denominator, power) in DERIVED.items():
            value = factors[numerator] if numerator else 1.0
            if denominator:
                value /= factors[denominator] ** power
            factors[name] = value
        factors["area"] = factors["length"] ** 2
        factors["ratio"] = 1.0  # dimensionless: the same in every system
        for quantity, unit in self.readouts:
            factors[f"readout:{quantity}"] = unit_factor(unit, quantity)
        object.__setattr__(self, "_factors", factors)

    def factor(self, quantity: str) -> float:
        """Return the factor from this system's unit of ``quantity`` to SI."""
        return self._factors[quantity]

    def to_si(self, value: Any, quantity: str) -> Any:
        """Convert a float or array from this system's unit of ``quantity`` to SI."""
        return value * self._factors[quantity]

    def from_si(self, value: Any, quantity: str) -> Any:
        """Convert a float or array from SI to this system's unit of ``quantity``."""
        return value / self._factors[quantity]

    def label(self, quantity: str) -> str:
        """Return the unit string to print beside a value of ``quantity``."""
        if quantity in SI_UNITS:
            return str(getattr(self, quantity))
        if quantity == "ratio":
            return "1"
        numerator, denominator, _ = DERIVED[quantity]
        top = getattr(self, numerator) if numerator else "1"
        if quantity == "area":
            return f"{self.length}^2"
        if denominator is None:
            return str(top)
        return f"{top}/{getattr(self, denominator)}"

    def readout_unit(self, quantity: str) -> str:
        """The unit a person reads ``quantity`` in: its readout unit, else :meth:`label`."""
        return dict(self.readouts).get(quantity) or self.label(quantity)

    def readout_factor(self, quantity: str) -> float:
        """The factor from :meth:`readout_unit` of ``quantity`` to SI."""
        return self._factors.get(f"readout:{quantity}", self._factors[quantity])

    def to_readout(self, value: Any, quantity: str) -> Any:
        """Convert a float or array from SI to :meth:`readout_unit` of ``quantity``."""
        return value / self.readout_factor(quantity)

    def as_dict(self) -> dict[str, str]:
        """Return the unit strings keyed by base quantity (for the case file's ``units``)."""
        return {
            f.name: getattr(self, f.name)
            for f in fields(self)
            if not f.name.startswith("_") and f.name != "readouts"
        }


SI = UnitSystem()
#: The display system "SI (engineering)": mm, N·m, MPa, deg; a twist rate read in °/m.
SI_ENGINEERING = UnitSystem(
    length="mm",
    torque="N*m",
    stress="MPa",
    angle="deg",
    power="kW",
    speed="rpm",
    readouts=(("twist_rate", "deg/m"),),
)


@functools.lru_cache(maxsize=1)
def us_customary() -> UnitSystem:
    """The display system "US customary": in, lbf·in, psi, deg (built on first use: needs pint)."""
    return UnitSystem(
        length="in",
        torque="lbf*in",
        stress="psi",
        angle="deg",
        power="hp",
        speed="rpm",
        inertia="lb*in**2",
        density="lb/in**3",
        readouts=(("twist_rate", "deg/ft"),),
    )


#: Units in which model-validation messages quote values; io sets the case file's own system.
display_units: contextvars.ContextVar[UnitSystem] = contextvars.ContextVar(
    "display_units", default=SI
)


def quote(value: float, quantity: str) -> str:
    """Format an SI value in the current display units, e.g. ``"30 mm"``, for messages."""
    system = display_units.get()
    # A Python float: a value beyond the range of the display unit shows as inf, without numpy's
    # overflow warning.
    shown = system.from_si(float(value), quantity)
    return f"{_short(shown)} {system.label(quantity)}"


def _short(value: float) -> str:
    if not np.isfinite(value):
        return str(value)
    return f"{value:.6g}"
