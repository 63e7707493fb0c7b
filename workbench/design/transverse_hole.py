"""Stress-concentration factor of a transverse (radial, through) hole in a solid shaft in torsion.

Pilkey & Pilkey's polynomial for a solid bar in torsion, a *normal*-stress factor over the gross
nominal shear stress 16T/(πD³). The d/D range over which the fit is taken as covered,
0 ≤ d/D ≤ 0.4, could not be read in a copy of the book: the source a report shows says so
(:data:`workbench.design.caution.NOT_TRACED`). Above the range the value at its end is used and
flagged as not conservative, since the factor still rises with d/D there.

References
----------
.. [1] W. D. Pilkey and D. F. Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., Wiley,
   2008, ch. 4 (transverse hole in a bar in torsion).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.blockwise import by_blocks
from workbench.design.caution import NOT_TRACED
from workbench.design.concentration import (
    RANGE_EDGE,
    BoolArray,
    ConcentrationFactor,
    all_positive,
    broadcast_floats,
    near_limit,
)
from workbench.solver.sections import FloatArray

#: d/D range of the transverse-hole polynomial (not read in a copy of the source; see the module).
HOLE_RATIO_RANGE: tuple[float, float] = (0.0, 0.4)

#: Pilkey & Pilkey's transverse-hole polynomial coefficients, lowest power first.
HOLE_POLYNOMIAL: tuple[float, ...] = (4.0, -6.055, 32.764, -38.33)

_HOLE_SOURCE = (
    "Pilkey & Pilkey, Peterson's Stress Concentration Factors, 3rd ed., transverse hole in a "
    f"solid bar in torsion; validity range 0 ≤ d/D ≤ 0.4 {NOT_TRACED}"
)


def _hole_ratio(hole: FloatArray, shaft: FloatArray) -> FloatArray:
    """d/D, or NaN where a diameter is not finite and positive or d ≥ D."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ratio = hole / shaft
    ratio[~(all_positive(hole, shaft) & (hole < shaft))] = np.nan
    return ratio


def _hole_ktg(hole: FloatArray, shaft: FloatArray) -> FloatArray:
    """Pilkey & Pilkey's polynomial at d/D, held at the fit's upper end above it."""
    highest = HOLE_RATIO_RANGE[1]
    evaluated = np.minimum(_hole_ratio(hole, shaft), highest)
    evaluated[evaluated >= highest * (1.0 - RANGE_EDGE)] = highest  # on the limit within 1e-9
    value = np.zeros(evaluated.shape)
    for coefficient in reversed(HOLE_POLYNOMIAL):  # Horner: four coefficients, not elements
        value *= evaluated
        value += coefficient
    return value


@dataclass(frozen=True)
class TransverseHoleFactors:
    """Transverse-hole factors element by element, and how each was found (arrays of one shape).

    Attributes
    ----------
    value
        Ktg = σ_max/τ_nom (dimensionless) on the gross nominal shear stress 16T/(πD³); NaN where
        the inputs define no factor.
    hole_diameter, shaft_diameter
        The inputs d and D (m), broadcast to the shape of ``value``.
    """

    value: FloatArray
    hole_diameter: FloatArray
    shaft_diameter: FloatArray

    @functools.cached_property
    def hole_ratio(self) -> FloatArray:
        """d/D (NaN where not defined); within 1e-9 (relative) of the fit's end it is on it."""
        ratio = _hole_ratio(np.ravel(self.hole_diameter), np.ravel(self.shaft_diameter))
        return np.reshape(ratio, self.value.shape)

    @functools.cached_property
    def defined(self) -> BoolArray:
        """Where d and D are finite and positive and d < D."""
        return ~np.isnan(self.hole_ratio)

    @functools.cached_property
    def above(self) -> BoolArray:
        """d/D above the fit's range: the value at its upper end, NOT conservative."""
        highest = HOLE_RATIO_RANGE[1]
        return self.defined & (self.hole_ratio > highest) & ~near_limit(self.hole_ratio, highest)

    @functools.cached_property
    def in_range(self) -> BoolArray:
        """Where the factor is defined and d/D lies inside the fit's range."""
        return self.defined & ~self.above

    def note(self, index: Any = ()) -> str:
        """What was computed for one element (``index`` into the arrays), and how."""
        if not self.defined[index]:
            return "no factor: a diameter is not finite and positive, or the hole is not smaller"
        kind = "largest normal stress over the gross nominal shear stress 16T/(πD³)"
        hole_ratio, highest = float(self.hole_ratio[index]), HOLE_RATIO_RANGE[1]
        if self.above[index]:
            return (
                f"d/D = {hole_ratio:.3g} is above the fit's {highest:g}: value at "
                f"d/D = {highest:g}, NOT conservative (the factor rises with d/D at the end of the "
                f"fit); confirm by chart or analysis; {kind}"
            )
        return f"d/D = {hole_ratio:.3g}; {kind}"

    def at(self, index: Any = ()) -> ConcentrationFactor:
        """One element as a :class:`ConcentrationFactor`, with its note and source."""
        return ConcentrationFactor(
            float(self.value[index]), bool(self.in_range[index]), self.note(index), _HOLE_SOURCE
        )


def transverse_hole_factors(
    hole_diameter: ArrayLike, shaft_diameter: ArrayLike
) -> TransverseHoleFactors:
    """Factors of transverse (radial, through) holes in solid shafts, broadcast element by element.

    Parameters
    ----------
    hole_diameter
        Hole diameters d (m), any shape broadcasting with ``shaft_diameter``.
    shaft_diameter
        Shaft diameters D (m).

    Returns
    -------
    TransverseHoleFactors
        Ktg = σ_max/τ_nom with τ_nom = 16T/(πD³) on the gross section: the largest *normal*
        stress at the hole edge over the nominal shear stress. Above d/D = 0.4 the value at
        d/D = 0.4, flagged as not conservative (the factor rises with d/D there). NaN where a
        diameter is not finite and positive or d ≥ D.

    References
    ----------
    .. [1] Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., transverse hole
       in a solid bar in torsion: Ktg = 4 − 6.055(d/D) + 32.764(d/D)² − 38.33(d/D)³, the
       coefficients in :data:`HOLE_POLYNOMIAL`.

    Examples
    --------
    >>> factors = transverse_hole_factors([0.01, 0.03], 0.05)
    >>> factors.value.round(5).tolist(), factors.in_range.tolist()
    ([3.79292, 4.36712], [True, False])
    """
    hole, shaft = broadcast_floats(hole_diameter, shaft_diameter)
    return TransverseHoleFactors(by_blocks(_hole_ktg, hole, shaft), hole, shaft)


def transverse_hole_kts(hole_diameter: float, shaft_diameter: float) -> ConcentrationFactor:
    """Stress-concentration factor of one transverse (radial, through) hole in a solid shaft.

    The one geometry checked, then :func:`transverse_hole_factors` evaluates it.

    Parameters
    ----------
    hole_diameter
        Hole diameter d (m).
    shaft_diameter
        Shaft diameter D (m), greater than d.

    Returns
    -------
    ConcentrationFactor
        Ktg = σ_max/τ_nom on the gross nominal shear stress 16T/(πD³), with ``in_range``, a note
        and the source (above d/D = 0.4 the value at 0.4, flagged as not conservative).

    Raises
    ------
    InputError
        A diameter is not a finite positive number, or d ≥ D.

    References
    ----------
    .. [1] Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., as
       :func:`transverse_hole_factors`.
    """
    require_positive("hole_diameter", hole_diameter)
    require_positive("shaft_diameter", shaft_diameter)
    if hole_diameter >= shaft_diameter:
        msg = (
            f"must be smaller than the shaft diameter ({quote(hole_diameter, 'length')} ≥ "
            f"{quote(shaft_diameter, 'length')})"
        )
        raise InputError(field="hole_diameter", message=msg)
    return transverse_hole_factors(hole_diameter, shaft_diameter).at()
