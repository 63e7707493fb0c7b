"""Cross-sections of torsion members: torsion constant and peak shear stress per unit torque.

Every section is a frozen dataclass in SI (metres). A section answers two questions, at a fraction
``s`` of the segment length (0 at its start, 1 at its end):

* ``torsion_constant_at(s)`` — the torsion constant K (m⁴), equal to the polar moment J for a
  circle, so that the twist rate is T/(G·K);
* ``shear_stress_per_torque_at(s)`` — the largest shear stress magnitude over the section for a
  unit torque (1/m³), so that τ_max = |T|·value.

Prismatic sections (``prismatic = True``) also expose the constants ``torsion_constant`` and
``shear_stress_per_torque``. Non-circular shapes live in :mod:`workbench.solver.noncircular`.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, ch. 3
   (J = πd⁴/32, τ = T·r/J, non-uniform torsion of tapered bars).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, ClassVar

import numpy as np
from numpy.typing import ArrayLike, NDArray

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_non_negative, require_positive

FloatArray = NDArray[np.float64]

#: Largest ratio between the wall-to-bore distances at the two ends of one quadrature piece of a
#: varying section. With 8 Gauss–Legendre points per piece the integrals of 1/J are exact to
#: rounding (the nearest pole of the integrand then lies 9 half-widths away).
_GRADING_RATIO = 1.25


def polar_moment(outer_diameter: ArrayLike, inner_diameter: ArrayLike = 0.0) -> FloatArray:
    """Polar second moment of area of a solid or hollow circle.

    Parameters
    ----------
    outer_diameter
        Outer diameter D (m).
    inner_diameter
        Bore diameter d (m); 0 for a solid circle.

    Returns
    -------
    numpy.ndarray
        J = π(D⁴ − d⁴)/32 (m⁴).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., eqs. 3-10 and 3-19.
    """
    outer = np.asarray(outer_diameter, dtype=float)
    inner = np.asarray(inner_diameter, dtype=float)
    if outer.ndim == 0 and inner.ndim == 0:
        return math.pi * (outer**4 - inner**4) / 32.0
    # Columns of a million segments: one buffer worked in place (each temporary costs page faults).
    moment = np.empty(np.broadcast_shapes(outer.shape, inner.shape))
    np.multiply(outer, outer, out=moment)
    np.multiply(moment, moment, out=moment)
    if inner.any():
        bore = inner * inner
        bore *= bore
        moment -= bore
    moment *= math.pi / 32.0
    return moment


def taper_breaks(
    diameter_start: FloatArray, diameter_end: FloatArray, bore: FloatArray
) -> tuple[np.ndarray[Any, np.dtype[np.intp]], FloatArray]:
    """Quadrature pieces of many linearly tapered circular sections at once.

    1/J has poles where d = ±bore (or d = 0): the pieces are graded geometrically in the distance
    d − bore, so that each stays far from the poles relative to its own width and an 8-point
    Gauss–Legendre rule on it is exact to rounding.

    Parameters
    ----------
    diameter_start, diameter_end
        (n,) outer diameters at the two ends (m).
    bore
        (n,) constant bore diameters (m), smaller than both ends.

    Returns
    -------
    counts
        (n,) number of break fractions of each section (pieces + 1).
    fractions
        The break fractions of every section, section after section, each run ascending from
        exactly 0 to exactly 1.

    References
    ----------
    .. [1] P. J. Davis and P. Rabinowitz, *Methods of Numerical Integration*, 2nd ed., Academic
       Press, 1984, §2.7 and §4.8 (Gauss rules lose accuracy near a pole of the integrand;
       graded subdivision; from memory).
    """
    span = diameter_end - diameter_start
    gap_start, gap_end = diameter_start - bore, diameter_end - bore
    low, high = np.minimum(gap_start, gap_end), np.maximum(gap_start, gap_end)
    pieces = np.ceil(np.log(high / low) / math.log(_GRADING_RATIO) - 1e-12)
    pieces = np.where(span == 0.0, 1, np.maximum(pieces, 1)).astype(np.intp)
    counts = pieces + 1
    row = np.repeat(np.arange(len(counts)), counts)
    step = np.arange(len(row)) - (np.cumsum(counts) - counts)[row]
    # A narrowing taper runs from its high gap down: walk its geometric steps from the far end.
    step = np.where(span[row] < 0.0, pieces[row] - step, step)
    gaps = low[row] * (high[row] / low[row]) ** (step / pieces[row])
    with np.errstate(invalid="ignore", divide="ignore"):
        fractions = (gaps + bore[row] - diameter_start[row]) / span[row]
    first = np.cumsum(counts) - counts
    fractions[first] = 0.0
    fractions[first + pieces] = 1.0
    return counts, fractions


@dataclass(frozen=True)
class Section:
    """Base class: the interface every cross-section offers to the analysis."""

    shape: ClassVar[str] = ""
    prismatic: ClassVar[bool] = True
    circular: ClassVar[bool] = False

    # --- to be provided by prismatic subclasses -------------------------------------------
    @property
    def torsion_constant(self) -> float:
        """Torsion constant K (m⁴); J for a circle."""
        raise NotImplementedError

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest shear stress over the section per unit torque (1/m³)."""
        raise NotImplementedError

    @property
    def outer_radius(self) -> float:
        """Half the overall depth of the section (m): for drawing and for layer checks."""
        raise NotImplementedError

    @property
    def inner_radius(self) -> float:
        """Radius of a central bore (m), 0 when there is none."""
        return 0.0

    @property
    def polar_moment(self) -> float:
        """Polar second moment of area about the shaft's axis, J = ∫r² dA (m⁴).

        It gives the rotary inertia ρ·J per unit length for vibration; for a circle it is the
        torsion constant. Non-circular shapes give their own (exact or a stated approximation).
        """
        if self.circular:
            return self.torsion_constant
        raise NotImplementedError

    # --- the interface the analysis uses -----------------------------------------------------
    def torsion_constant_at(self, fraction: ArrayLike) -> FloatArray:
        """Torsion constant K (m⁴) at fractions ``s`` ∈ [0, 1] of the segment length."""
        return np.full(np.shape(fraction), self.torsion_constant)

    def shear_stress_per_torque_at(self, fraction: ArrayLike) -> FloatArray:
        """Largest shear stress per unit torque (1/m³) at fractions of the segment length."""
        return np.full(np.shape(fraction), self.shear_stress_per_torque)

    def outer_radius_at(self, fraction: ArrayLike) -> FloatArray:
        """Half the overall depth (m) at fractions of the segment length."""
        return np.full(np.shape(fraction), self.outer_radius)

    def polar_moment_at(self, fraction: ArrayLike) -> FloatArray:
        """Polar second moment of area (m⁴) at fractions of the segment length."""
        if self.circular:
            return self.torsion_constant_at(fraction)
        return np.full(np.shape(fraction), self.polar_moment)

    def inner_radius_at(self, fraction: ArrayLike) -> FloatArray:
        """Bore radius (m) at fractions of the segment length."""
        return np.full(np.shape(fraction), self.inner_radius)

    def quadrature_breaks(self) -> FloatArray:
        """Fractions splitting the length into pieces on which 1/K is smooth.

        On each piece an 8-point Gauss–Legendre rule is exact to rounding.
        """
        return np.array([0.0, 1.0])


@dataclass(frozen=True)
class SolidCircle(Section):
    """Solid circular section.

    Parameters
    ----------
    diameter
        Diameter d (m).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3: J = πd⁴/32, τ_max = 16T/(πd³).
    """

    diameter: float
    shape: ClassVar[str] = "solid"
    circular: ClassVar[bool] = True

    def __post_init__(self) -> None:
        require_positive("diameter", self.diameter)

    @property
    def torsion_constant(self) -> float:
        return math.pi * self.diameter**4 / 32.0

    @property
    def shear_stress_per_torque(self) -> float:
        return 16.0 / (math.pi * self.diameter**3)

    @property
    def outer_radius(self) -> float:
        return self.diameter / 2.0


@dataclass(frozen=True)
class Tube(Section):
    """Hollow circular section (any wall thickness).

    Parameters
    ----------
    outer_diameter
        Outer diameter D (m).
    inner_diameter
        Inner diameter d (m), smaller than D.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3: J = π(D⁴ − d⁴)/32,
       τ_max = T·(D/2)/J.
    """

    outer_diameter: float
    inner_diameter: float
    shape: ClassVar[str] = "tube"
    circular: ClassVar[bool] = True

    def __post_init__(self) -> None:
        require_positive("outer_diameter", self.outer_diameter)
        require_positive("inner_diameter", self.inner_diameter)
        if self.inner_diameter >= self.outer_diameter:
            msg = (
                "must be smaller than outer_diameter "
                f"({quote(self.inner_diameter, 'length')} ≥ {quote(self.outer_diameter, 'length')})"
            )
            raise InputError("inner_diameter", msg)

    @property
    def torsion_constant(self) -> float:
        return math.pi * (self.outer_diameter**4 - self.inner_diameter**4) / 32.0

    @property
    def shear_stress_per_torque(self) -> float:
        return (self.outer_diameter / 2.0) / self.torsion_constant

    @property
    def outer_radius(self) -> float:
        return self.outer_diameter / 2.0

    @property
    def inner_radius(self) -> float:
        return self.inner_diameter / 2.0


@dataclass(frozen=True)
class TaperedCircle(Section):
    """Circular section whose diameter varies linearly along the segment; optional constant bore.

    Parameters
    ----------
    diameter_start
        Outer diameter at the segment's start (m).
    diameter_end
        Outer diameter at the segment's end (m).
    bore
        Diameter of a constant central bore (m); 0 for none. Smaller than both diameters.

    Notes
    -----
    The taper is assumed gentle, so that the stresses of a prismatic shaft of the local diameter
    apply at every section (the usual engineering approximation; errors grow with the cone angle).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4, non-uniform torsion:
       φ = ∫ T dx / (G·J(x)).
    """

    diameter_start: float
    diameter_end: float
    bore: float = 0.0
    shape: ClassVar[str] = "tapered"
    prismatic: ClassVar[bool] = False
    circular: ClassVar[bool] = True

    def __post_init__(self) -> None:
        require_positive("diameter_start", self.diameter_start)
        require_positive("diameter_end", self.diameter_end)
        require_non_negative("bore", self.bore)
        smaller = min(self.diameter_start, self.diameter_end)
        if self.bore >= smaller:
            msg = (
                f"must be smaller than the smaller end diameter "
                f"({quote(self.bore, 'length')} ≥ {quote(smaller, 'length')})"
            )
            raise InputError("bore", msg)

    def diameter_at(self, fraction: ArrayLike) -> FloatArray:
        """Outer diameter (m) at fractions of the segment length."""
        s = np.asarray(fraction, dtype=float)
        return self.diameter_start + (self.diameter_end - self.diameter_start) * s

    def torsion_constant_at(self, fraction: ArrayLike) -> FloatArray:
        return polar_moment(self.diameter_at(fraction), self.bore)

    def shear_stress_per_torque_at(self, fraction: ArrayLike) -> FloatArray:
        return (self.diameter_at(fraction) / 2.0) / self.torsion_constant_at(fraction)

    def outer_radius_at(self, fraction: ArrayLike) -> FloatArray:
        return self.diameter_at(fraction) / 2.0

    def inner_radius_at(self, fraction: ArrayLike) -> FloatArray:
        return np.full(np.shape(fraction), self.bore / 2.0)

    @property
    def outer_radius(self) -> float:
        return max(self.diameter_start, self.diameter_end) / 2.0

    @property
    def inner_radius(self) -> float:
        return self.bore / 2.0

    def quadrature_breaks(self) -> FloatArray:
        _, fractions = taper_breaks(
            np.array([self.diameter_start]), np.array([self.diameter_end]), np.array([self.bore])
        )
        return fractions
