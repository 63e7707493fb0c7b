"""Plastic torsion of circular shafts of an elastic–perfectly plastic material.

The shear stress grows linearly with the radius up to the shear yield strength τ_y and stays at
τ_y beyond. The yield torque T_y starts yielding at the surface; the plastic torque T_p yields the
whole section; their ratio is the reserve a ductile shaft has beyond first yield (4/3 for a solid
shaft). These are ultimate-load figures for a static torque: they say nothing about fatigue.

References
----------
.. [1] F. P. Beer, E. R. Johnston, J. T. DeWolf and D. F. Mazurek, *Mechanics of Materials*,
   McGraw-Hill, ch. 3, plastic deformations in circular shafts (elastoplastic material).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_non_negative, require_positive


def _check_section(outer_diameter: float, inner_diameter: float) -> None:
    require_positive("outer_diameter", outer_diameter)
    require_non_negative("inner_diameter", inner_diameter)
    if inner_diameter >= outer_diameter:
        msg = (
            f"must be smaller than outer_diameter ({quote(inner_diameter, 'length')} ≥ "
            f"{quote(outer_diameter, 'length')})"
        )
        raise InputError(field="inner_diameter", message=msg)


def yield_torque(shear_yield: float, outer_diameter: float, inner_diameter: float = 0.0) -> float:
    """Torque at which the outer fibre of a circular shaft reaches the shear yield strength.

    Parameters
    ----------
    shear_yield
        Shear yield strength τ_y (Pa).
    outer_diameter
        Outer diameter D = 2c (m).
    inner_diameter
        Bore diameter (m); 0 for a solid shaft.

    Returns
    -------
    float
        T_y = τ_y·J/c (N·m), J = π(D⁴ − d⁴)/32.

    Raises
    ------
    InputError
        Non-positive strength or diameter, or a bore not smaller than the outer diameter.

    References
    ----------
    .. [1] Beer & Johnston, *Mechanics of Materials*, ch. 3: T_Y = (J/c)·τ_Y.
    """
    require_positive("shear_yield", shear_yield, "stress")
    _check_section(outer_diameter, inner_diameter)
    polar_moment = math.pi * (outer_diameter**4 - inner_diameter**4) / 32.0
    return shear_yield * polar_moment / (outer_diameter / 2.0)


def plastic_torque(shear_yield: float, outer_diameter: float, inner_diameter: float = 0.0) -> float:
    """Fully plastic torque of a circular shaft.

    Parameters
    ----------
    shear_yield
        Shear yield strength τ_y (Pa).
    outer_diameter
        Outer diameter D = 2c (m).
    inner_diameter
        Bore diameter 2cᵢ (m); 0 for a solid shaft.

    Returns
    -------
    float
        T_p = (2π/3)·τ_y·(c³ − cᵢ³) (N·m).

    Raises
    ------
    InputError
        Non-positive strength or diameter, or a bore not smaller than the outer diameter.

    References
    ----------
    .. [1] Beer & Johnston, *Mechanics of Materials*, ch. 3: T_P = (2/3)πc³τ_Y for a solid
       shaft; the hollow form follows from the same integral ∫ τ_Y·2πρ² dρ over cᵢ ≤ ρ ≤ c.
    """
    require_positive("shear_yield", shear_yield, "stress")
    _check_section(outer_diameter, inner_diameter)
    outer_radius = outer_diameter / 2.0
    inner_radius = inner_diameter / 2.0
    return 2.0 * math.pi / 3.0 * shear_yield * (outer_radius**3 - inner_radius**3)


def partly_plastic_torque(shear_yield: float, diameter: float, elastic_core_radius: float) -> float:
    """Torque on a solid circular shaft yielded outside an elastic core.

    Parameters
    ----------
    shear_yield
        Shear yield strength τ_y (Pa).
    diameter
        Shaft diameter 2c (m).
    elastic_core_radius
        Radius ρ_y of the still-elastic core (m), 0 ≤ ρ_y ≤ c.

    Returns
    -------
    float
        T = (4/3)·T_y·[1 − ¼(ρ_y/c)³] (N·m); T_y at ρ_y = c, T_p at ρ_y = 0.

    Raises
    ------
    InputError
        Non-positive strength or diameter, or a core radius outside [0, c].

    References
    ----------
    .. [1] Beer & Johnston, *Mechanics of Materials*, ch. 3: T = (4/3)T_Y(1 − ρ_Y³/(4c³)).
    """
    require_positive("shear_yield", shear_yield, "stress")
    require_positive("diameter", diameter)
    require_non_negative("elastic_core_radius", elastic_core_radius)
    radius = diameter / 2.0
    if elastic_core_radius > radius:
        msg = (
            f"must not exceed the shaft radius ({quote(elastic_core_radius, 'length')} > "
            f"{quote(radius, 'length')})"
        )
        raise InputError(field="elastic_core_radius", message=msg)
    first_yield = yield_torque(shear_yield, diameter)
    return 4.0 / 3.0 * first_yield * (1.0 - 0.25 * (elastic_core_radius / radius) ** 3)


@dataclass(frozen=True)
class PlasticReserve:
    """Yield and plastic torques of a circular shaft and their ratio.

    Parameters
    ----------
    yield_torque
        Torque at first yield T_y (N·m).
    plastic_torque
        Fully plastic torque T_p (N·m).
    ratio
        T_p/T_y (dimensionless): 4/3 for a solid shaft, towards 1 for a thin tube.
    """

    yield_torque: float
    plastic_torque: float
    ratio: float


def plastic_reserve(
    shear_yield: float, outer_diameter: float, inner_diameter: float = 0.0
) -> PlasticReserve:
    """Yield torque, plastic torque and their ratio for a solid or hollow circular shaft.

    Parameters
    ----------
    shear_yield
        Shear yield strength τ_y (Pa).
    outer_diameter
        Outer diameter (m).
    inner_diameter
        Bore diameter (m); 0 for a solid shaft.

    Returns
    -------
    PlasticReserve
        T_y, T_p (N·m) and T_p/T_y = (4/3)·c(c³ − cᵢ³)/(c⁴ − cᵢ⁴).

    References
    ----------
    .. [1] Beer & Johnston, *Mechanics of Materials*, ch. 3, plastic torsion of circular shafts.
    """
    first = yield_torque(shear_yield, outer_diameter, inner_diameter)
    full = plastic_torque(shear_yield, outer_diameter, inner_diameter)
    return PlasticReserve(first, full, full / first)
