"""Cross-sections of torsion members: torsion constant and peak shear stress per unit torque.

Every section is a frozen dataclass in SI (metres). A section answers two questions, at a fraction
``s`` of the segment length (0 at its start, 1 at its end):

* ``torsion_constant_at(s)`` — the torsion constant K (m⁴), equal to the polar moment J for a
  circle, so that the twist rate is T/(G·K);
* ``shear_stress_per_torque_at(s)`` — the largest shear stress magnitude over the section for a
  unit torque (1/m³), so that τ_max = |T|·value.

Prismatic sections (``prismatic = True``) also expose the constants ``torsion_constant`` and
``shear_stress_per_torque``. Non-circular shapes live in :mod:`workbench.solver.noncircular`
and :mod:`workbench.solver.thin_walls`.

A section is refused when its constants are not positive finite numbers held to full precision
(:data:`~workbench.case.validate.SMALLEST_NORMAL` up to the largest float): a diameter of
1e-320 mm, allowed by "greater than zero", would give J = 0 and an infinite stress per torque.
The message names the dimension that is out of range.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, ch. 3
   (J = πd⁴/32, τ = T·r/J, non-uniform torsion of tapered bars).
"""

from __future__ import annotations

import contextlib
import dataclasses
import math
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any, ClassVar

import numpy as np
from numpy.typing import ArrayLike, NDArray

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import (
    LARGEST,
    SMALLEST_NORMAL,
    all_normal_positive,
    not_normal_positive,
    require_non_negative,
    require_positive,
)

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

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
    moment *= _PI_OVER_32
    return moment


_PI_OVER_32 = math.pi / 32.0


def circle_constants(diameter: Any, bore: Any) -> tuple[Any, Any]:
    """J (m⁴) and peak shear stress per torque (1/m³) of circles, with the solver's arithmetic.

    Floats or arrays alike, rounded exactly as :func:`polar_moment` and the element constants
    round them, so that a check on these values is a check on what the solver computes. A value
    out of range comes out as 0, inf or NaN: arrays under the caller's ``numpy.errstate``,
    floats without an error (a zero J gives an infinite stress per torque).

    Parameters
    ----------
    diameter
        Outer diameter D (m).
    bore
        Bore diameter d (m), 0 for a solid circle.

    Returns
    -------
    moment, stress_per_torque
        J = π(D⁴ − d⁴)/32 and (D/2)/J.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., eqs. 3-10 and 3-19 (J), §3.3
       (τ = T·r/J).
    """
    squared, bore_squared = diameter * diameter, bore * bore
    moment = (squared * squared - bore_squared * bore_squared) * _PI_OVER_32
    if isinstance(moment, float):
        return moment, 0.5 * (diameter / moment) if moment else math.inf
    return moment, 0.5 * (diameter / moment)


def circles_out_of_range(diameter: FloatArray, bore: FloatArray) -> BoolArray:
    """Where J or τ/T of circles (:func:`circle_constants`) is not a finite normal number."""
    refused = circles_refused(diameter, bore)
    return np.zeros(np.shape(diameter), dtype=bool) if refused is None else refused


def circles_refused(diameter: FloatArray, bore: FloatArray) -> BoolArray | None:
    """As :func:`circles_out_of_range`, ``None`` when every circle is in range (no mask made)."""
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):  # what is looked for
        moment, stress = circle_constants(diameter, bore)
    if all_normal_positive(moment) and all_normal_positive(stress):
        return None
    out: BoolArray = not_normal_positive(moment) | not_normal_positive(stress)
    return out


def require_circle(name: str, diameter: float, bore: float) -> None:
    """Raise :class:`InputError` on ``name`` unless a circle's J and τ/T are in range.

    Parameters
    ----------
    name
        The key of the outer diameter (``diameter``, ``diameter_start``, ...).
    diameter, bore
        Outer and bore diameters (m).
    """
    moment, stress = circle_constants(diameter, bore)
    if not SMALLEST_NORMAL <= moment <= LARGEST:
        what = f"J = π(D⁴ − d⁴)/32 comes to {moment:.3g} m⁴"
    elif not SMALLEST_NORMAL <= stress <= LARGEST:
        what = f"τ/T = (D/2)/J comes to {stress:.3g} 1/m³"
    else:
        return
    size = "small" if diameter < 1.0 else "large"
    msg = f"{quote(diameter, 'length')} is too {size} for the torsion formulas: {what}"
    raise InputError(name, msg)


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
    def warping_constant(self) -> float:
        """Warping constant Cw (m⁶) of restrained torsion: 0 for sections that do not warp.

        Circular sections do not warp; closed and solid non-circular ones are taken in
        Saint-Venant torsion (their warping is small and left free). Open thin-walled
        sections with a mid-line (:mod:`workbench.solver.warping_sections`) give their own.
        """
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

    # --- range of the formulas (non-circular shapes; circles check their own cheaply) -----------
    def _dimensions(self) -> Iterator[tuple[str, float, str]]:
        """(key, value in SI, quantity) of every dimension, walls' included."""
        for item in dataclasses.fields(self):
            value = getattr(self, item.name)
            if isinstance(value, float | int):
                yield item.name, float(value), "area" if item.name.endswith("area") else "length"
            elif isinstance(value, tuple):
                for number, wall in enumerate(value):
                    yield from (
                        (f"{item.name}[{number}].{key}", float(size), kind)
                        for key, size, kind in Section._dimensions(wall)
                    )

    def _out_of_range(self, what: str) -> InputError:
        """The error naming the dimension farthest from 1 m (on a log scale): the likely cause."""

        def distance(entry: tuple[str, float, str]) -> float:
            _, value, quantity = entry
            metres = math.sqrt(value) if quantity == "area" else value
            return abs(math.log(metres)) if metres > 0.0 else math.inf

        key, value, quantity = max(self._dimensions(), key=distance)
        size = "small" if value < 1.0 else "large"
        msg = f"{quote(value, quantity)} is too {size} for the {self.shape} section's formulas: {what}"
        return InputError(key, msg)

    @contextlib.contextmanager
    def _formulas(self) -> Iterator[None]:
        """Turn an overflow or a division by zero of the formulas inside into that error."""
        try:
            with np.errstate(over="raise", divide="raise", invalid="raise"):
                yield
        except (OverflowError, ZeroDivisionError, FloatingPointError):
            raise self._out_of_range("they overflow or divide by zero") from None

    def _require_constants(self) -> None:
        """Raise :class:`InputError` unless K, τ/T and J are positive finite normal numbers."""
        for attribute, name, unit in (
            ("torsion_constant", "K", "m⁴"),
            ("shear_stress_per_torque", "τ/T", "1/m³"),
            ("polar_moment", "J", "m⁴"),
        ):
            with self._formulas():
                value = getattr(self, attribute)
            if not SMALLEST_NORMAL <= value <= LARGEST:
                raise self._out_of_range(f"{name} comes to {value:.3g} {unit}")


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
        require_circle("diameter", self.diameter, 0.0)

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
        require_circle("outer_diameter", self.outer_diameter, self.inner_diameter)

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
        require_circle("diameter_start", self.diameter_start, self.bore)
        require_circle("diameter_end", self.diameter_end, self.bore)

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
