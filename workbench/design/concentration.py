"""Stress-concentration factors of shaft details in torsion.

Each fit is one array function, broadcasting over inputs of any shape (a batch of variants ×
segments at once): :func:`shoulder_fillet_factors` (and, for a transverse hole,
:func:`workbench.design.transverse_hole.transverse_hole_factors`) return the
factors with, element by element, whether the geometry lies inside the range the data cover and
what was done instead when it does not. Nothing is extrapolated silently. The scalar functions
(:func:`shoulder_fillet_kts`) validate one geometry, call the array
function and return a :class:`ConcentrationFactor` with its note and source for a report.

Shoulder fillet
    Norton's power-law fits Kts = A·(r/d)^b to Peterson's charts, for D/d = 1.09, 1.20, 1.33 and
    2.00. The nominal stress is τ_nom = 16T/(πd³) on the smaller diameter d. The range this
    module accepts as covered is 0.02 ≤ r/d ≤ 0.30 and 1.09 ≤ D/d ≤ 2.00: the charts' r/d axis
    runs to 0.30, and below r/d = 0.02 (Shigley's "sharp fillet") the curves are too steep to
    read. Between tabulated D/d the factor is interpolated linearly in D/d between the values of
    the two neighbouring fits at the same r/d. Outside the range:

    * r/d > 0.30: the factor at r/d = 0.30 (conservative: Kts falls as r/d grows);
    * r/d < 0.02: the fit is extrapolated to the actual r/d, which raises Kts as the fillet
      sharpens, and flagged (a sharper fillet than the charts show should be avoided);
    * 1 < D/d < 1.09: the D/d = 1.09 fit (conservative: Kts grows with D/d);
    * D/d > 2.00: the D/d = 2.00 fit, flagged as possibly unconservative, since Kts may keep
      rising with D/d beyond the last charted curve;
    * D/d = 1 (no shoulder): Kts = 1.

    Caution: at D/d = 1.09 and small r/d Norton's fit lies well below (about 15 % at r/d = 0.02)
    the polynomial fit of the same chart in Pilkey & Pilkey (from memory); the two agree within
    about 6 % for D/d ≥ 1.20.

Transverse hole
    In :mod:`workbench.design.transverse_hole`.

Keyseat
    Shigley's first-iteration estimate Kts ≈ 3.0 for an end-milled keyseat.

References
----------
.. [1] R. L. Norton, *Machine Design: An Integrated Approach*, Prentice Hall, Appendix C,
   stress-concentration factor for a shaft with a shoulder fillet in torsion (curve fits).
.. [2] W. D. Pilkey and D. F. Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., Wiley,
   2008, ch. 3 (shoulder fillets).
.. [3] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, McGraw-Hill,
   Table 7-1 (first-iteration estimates of stress-concentration factors).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field
from typing import Any, NamedTuple

import numpy as np
from numpy.typing import ArrayLike

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.blockwise import BLOCK, by_blocks
from workbench.solver.sections import FloatArray

IntArray = np.ndarray[Any, np.dtype[np.intp]]
BoolArray = np.ndarray[Any, np.dtype[np.bool_]]

#: Norton's fits Kts = A·(r/d)^b, as (D/d, A, b), in increasing D/d.
NORTON_TORSION_FITS: tuple[tuple[float, float, float], ...] = (
    (1.09, 0.90337, -0.12692),
    (1.20, 0.83425, -0.21649),
    (1.33, 0.84897, -0.23161),
    (2.00, 0.86331, -0.23865),
)

#: r/d range this module treats as covered by the shoulder-fillet fits.
FILLET_RATIO_RANGE: tuple[float, float] = (0.02, 0.30)

_NORTON_SOURCE = (
    "Norton, Machine Design, App. C: fit Kts = A(r/d)^b to Peterson's charts, shaft shoulder "
    "fillet in torsion"
)
_SHIGLEY_SOURCE = "Shigley's Mechanical Engineering Design, Table 7-1 (first-iteration estimate)"

# The fits' columns as arrays, for the array functions.
_FIT_RATIOS, _FIT_COEFFICIENTS, _FIT_EXPONENTS = np.array(NORTON_TORSION_FITS).T
_FIT_GAPS = np.diff(_FIT_RATIOS)

# Ratios within this relative distance of 1 are a plain shaft (no shoulder).
_NO_SHOULDER = 1e-9

# Ratios within this relative distance of a range limit count as on it: 0.02/0.05 is not
# exactly 0.4 in binary floating point, and a 20 mm hole in a 50 mm shaft is in range.
RANGE_EDGE = 1e-9


def near_limit(ratio: FloatArray, limit: float) -> BoolArray:
    """Where ``ratio`` lies within :data:`RANGE_EDGE` (relative) of ``limit``: on it."""
    return np.abs(ratio - limit) <= RANGE_EDGE * limit


def all_positive(*values: FloatArray) -> BoolArray:
    """Where every one of ``values`` is finite and greater than zero."""
    result = np.ones(values[0].shape, dtype=bool)
    for value in values:
        result &= np.isfinite(value) & (value > 0.0)
    return result


def broadcast_floats(*values: ArrayLike) -> list[FloatArray]:
    """``values`` as float arrays broadcast to one shape (views, no copies)."""
    return list(np.broadcast_arrays(*(np.asarray(value, dtype=float) for value in values)))


@dataclass(frozen=True)
class ConcentrationFactor:
    """A stress-concentration factor and how far to trust it.

    Parameters
    ----------
    value
        The factor (dimensionless), multiplying the nominal stress stated in ``note``.
    in_range
        ``True`` when the geometry lies inside the range the data cover.
    note
        What was computed, and what was done instead when out of range.
    source
        Publication the data come from.
    """

    value: float
    in_range: bool
    note: str
    source: str


# --- shoulder fillet -----------------------------------------------------------------------------
class ShoulderFilletTerms(NamedTuple):
    """What the shoulder-fillet fits are evaluated from, element by element.

    Attributes
    ----------
    diameter_ratio, fillet_ratio
        D/d and r/d.
    evaluated_fillet_ratio
        The r/d the fits are evaluated at: r/d, held at the range's upper end above it.
    lower_fit
        Row of :data:`NORTON_TORSION_FITS` below D/d (D/d held inside the fitted ratios).
    weight
        Share of the next row's fit, linear in D/d: 0 on the lower row, 1 on the next.
    defined
        Where D, d and r are finite and positive and D ≥ d.
    """

    diameter_ratio: FloatArray
    fillet_ratio: FloatArray
    evaluated_fillet_ratio: FloatArray
    lower_fit: IntArray
    weight: FloatArray
    defined: BoolArray


def _shoulder_terms(big: FloatArray, small: FloatArray, radius: FloatArray) -> ShoulderFilletTerms:
    """D/d, r/d, the r/d evaluated, the fits and their weights, of 1-d arrays of one length."""
    defined = all_positive(big, small, radius) & (big >= small)
    lowest_r, highest_r = FILLET_RATIO_RANGE
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        diameter_ratio, fillet_ratio = big / small, radius / small
        # Outside the fitted ratios the nearest fit applies; inside, the two around D/d.
        held = np.clip(diameter_ratio, _FIT_RATIOS[0], _FIT_RATIOS[-1])
        lower = np.zeros(held.shape, dtype=np.intp)
        for ratio in _FIT_RATIOS[1:-1]:  # the inner fitted ratios, not elements
            lower += held >= ratio
        below, above = held - _FIT_RATIOS[lower], _FIT_RATIOS[lower + 1] - held
        weight = below / _FIT_GAPS[lower]
        # On a fitted ratio (within 1e-9) that ratio's fit alone applies.
        weight[below <= RANGE_EDGE * _FIT_RATIOS[lower]] = 0.0
        weight[above <= RANGE_EDGE * _FIT_RATIOS[lower + 1]] = 1.0
        evaluated = np.minimum(fillet_ratio, highest_r)
        evaluated[evaluated >= highest_r * (1.0 - RANGE_EDGE)] = highest_r
        evaluated[near_limit(evaluated, lowest_r)] = lowest_r
    return ShoulderFilletTerms(diameter_ratio, fillet_ratio, evaluated, lower, weight, defined)


def _shoulder_value(terms: ShoulderFilletTerms) -> FloatArray:
    """Kts of :func:`_shoulder_terms`: the fits A·(r/d)^b, linear in D/d between two of them."""
    lower, weight = terms.lower_fit, terms.weight
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        # A·(r/d)^b = A·exp(b·ln(r/d)): one logarithm serves both fits.
        log_ratio = np.log(terms.evaluated_fillet_ratio)
        value = _FIT_COEFFICIENTS[lower] * np.exp(_FIT_EXPONENTS[lower] * log_ratio)
        value *= 1.0 - weight
        # (1 − w)·low + w·high is each fit itself, to the last bit, at w = 0 and w = 1.
        value += (
            weight * _FIT_COEFFICIENTS[lower + 1] * np.exp(_FIT_EXPONENTS[lower + 1] * log_ratio)
        )
    value[terms.diameter_ratio <= 1.0 + _NO_SHOULDER] = 1.0
    value[~terms.defined] = np.nan
    return value


def _shoulder_kts(big: FloatArray, small: FloatArray, radius: FloatArray) -> FloatArray:
    return _shoulder_value(_shoulder_terms(big, small, radius))


class ShoulderFilletFlags(NamedTuple):
    """Where each rule of the module text applied, element by element.

    Attributes
    ----------
    plain
        No shoulder: D/d = 1 within 1e-9, Kts = 1.
    fillet_above
        r/d above the charted range: Kts taken at its upper end (conservative).
    fillet_below
        r/d below the charted range: the fit extrapolated to the actual r/d, flagged.
    diameter_above
        D/d above the largest fitted ratio: that ratio's fit, possibly unconservative.
    diameter_below
        1 < D/d below the smallest fitted ratio: that ratio's fit (conservative).
    in_range
        The factor is defined and the geometry lies inside the fits' range.
    """

    plain: BoolArray
    fillet_above: BoolArray
    fillet_below: BoolArray
    diameter_above: BoolArray
    diameter_below: BoolArray
    in_range: BoolArray


@dataclass(frozen=True)
class ShoulderFilletFactors:
    """Shoulder-fillet factors element by element, and how each was found (arrays of one shape).

    A ratio within 1e-9 (relative) of a fitted D/d or of a limit of the r/d range counts as on
    it. Everything but ``value`` is found when first asked for, by the formula ``value`` came from.

    Attributes
    ----------
    value
        Kts (dimensionless) on the nominal stress 16T/(πd³) of the smaller diameter; NaN where
        the inputs define no factor (see ``defined``).
    big_diameter, small_diameter, fillet_radius
        The inputs D, d and r (m), broadcast to the shape of ``value``.
    known_terms
        The terms ``value`` was evaluated from, when they were kept (inputs of one block); see
        :attr:`terms`.
    """

    value: FloatArray
    big_diameter: FloatArray
    small_diameter: FloatArray
    fillet_radius: FloatArray
    known_terms: ShoulderFilletTerms | None = field(default=None, repr=False, compare=False)

    @functools.cached_property
    def terms(self) -> ShoulderFilletTerms:
        """What the fits were evaluated from, element by element."""
        if self.known_terms is not None:
            return self.known_terms
        inputs = (self.big_diameter, self.small_diameter, self.fillet_radius)
        terms = _shoulder_terms(*(np.ravel(array) for array in inputs))
        return ShoulderFilletTerms._make(np.reshape(array, self.value.shape) for array in terms)

    @functools.cached_property
    def flags(self) -> ShoulderFilletFlags:
        """Where each rule applied, element by element."""
        terms = self.terms
        shoulder = terms.defined & ~(terms.diameter_ratio <= 1.0 + _NO_SHOULDER)
        lowest_r, highest_r = FILLET_RATIO_RANGE
        fillet, ratio = terms.fillet_ratio, terms.diameter_ratio
        outside = (
            shoulder & (fillet > highest_r) & ~near_limit(fillet, highest_r),
            shoulder & (fillet < lowest_r) & ~near_limit(fillet, lowest_r),
            shoulder & (ratio > _FIT_RATIOS[-1]) & ~near_limit(ratio, _FIT_RATIOS[-1]),
            shoulder & (ratio < _FIT_RATIOS[0]) & ~near_limit(ratio, _FIT_RATIOS[0]),
        )
        in_range = terms.defined & ~np.logical_or.reduce(outside)
        return ShoulderFilletFlags(terms.defined & ~shoulder, *outside, in_range)

    @property
    def defined(self) -> BoolArray:
        """Where D, d and r are finite and positive and D ≥ d."""
        return self.terms.defined

    @property
    def in_range(self) -> BoolArray:
        """Where the factor is defined and the geometry lies inside the fits' range."""
        return self.flags.in_range

    def note(self, index: Any = ()) -> str:
        """What was computed for one element (``index`` into the arrays), and how."""
        if not self.defined[index]:
            return "no factor: a dimension is not finite and positive, or D < d"
        terms, flags = self.terms, self.flags
        if flags.plain[index]:
            return "no shoulder (D/d = 1): Kts = 1"
        lowest_r, highest_r = FILLET_RATIO_RANGE
        diameter_ratio = float(terms.diameter_ratio[index])
        fillet_ratio = float(terms.fillet_ratio[index])
        evaluated_r = float(terms.evaluated_fillet_ratio[index])
        notes = []
        if flags.fillet_above[index]:
            notes.append(
                f"r/d = {fillet_ratio:.3g} is above the charted {highest_r:g}: Kts taken at "
                f"r/d = {highest_r:g} (conservative, Kts falls as r/d grows)"
            )
        elif flags.fillet_below[index]:
            notes.append(
                f"r/d = {fillet_ratio:.3g} is below the charted {lowest_r:g}: fit extrapolated "
                "to the actual r/d (Kts rises as the fillet sharpens); enlarge the fillet or "
                "confirm the factor by test or analysis"
            )
        ratios = _FIT_RATIOS
        lower, weight = int(terms.lower_fit[index]), float(terms.weight[index])
        if flags.diameter_above[index]:
            notes.append(
                f"D/d = {diameter_ratio:.3g} is above the largest fitted {ratios[-1]:.2f}: the "
                f"D/d = {ratios[-1]:.2f} fit is used, possibly unconservative (Kts may keep "
                "rising with D/d beyond the last charted curve)"
            )
        elif flags.diameter_below[index]:
            notes.append(
                f"D/d = {diameter_ratio:.3g} is below the smallest fitted {ratios[0]:.2f}: the "
                f"D/d = {ratios[0]:.2f} fit is used (conservative, Kts grows with D/d)"
            )
        elif weight in (0.0, 1.0):
            notes.append(f"D/d = {ratios[lower + int(weight)]:.2f} fit at r/d = {evaluated_r:.3g}")
        else:
            notes.append(
                f"D/d = {diameter_ratio:.3g}: linear in D/d between the {ratios[lower]:.2f} and "
                f"{ratios[lower + 1]:.2f} fits at r/d = {evaluated_r:.3g}"
            )
        notes.append("nominal stress 16T/(πd³) on the smaller diameter")
        return "; ".join(notes)

    def at(self, index: Any = ()) -> ConcentrationFactor:
        """One element as a :class:`ConcentrationFactor`, with its note and source."""
        return ConcentrationFactor(
            float(self.value[index]), bool(self.in_range[index]), self.note(index), _NORTON_SOURCE
        )


def shoulder_fillet_factors(
    big_diameter: ArrayLike, small_diameter: ArrayLike, fillet_radius: ArrayLike
) -> ShoulderFilletFactors:
    """Torsional stress-concentration factors of shoulder fillets, broadcast element by element.

    Parameters
    ----------
    big_diameter
        Larger diameters D (m), any shape broadcasting with the others.
    small_diameter
        Smaller diameters d (m); the nominal stress is 16T/(πd³) on them.
    fillet_radius
        Fillet radii r (m).

    Returns
    -------
    ShoulderFilletFactors
        Kts = τ_max/τ_nom of the broadcast shape, with where each lies outside the fits' range
        and what was done there (the module docstring); NaN where an input is not finite and
        positive or D < d (a missing detail given as NaN stays NaN).

    References
    ----------
    .. [1] Norton, *Machine Design*, App. C, shoulder fillet in torsion: Kts = A(r/d)^b, the
       constants in :data:`NORTON_TORSION_FITS`.
    .. [2] Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., ch. 3.

    Examples
    --------
    >>> factors = shoulder_fillet_factors([0.036, 0.1], 0.030, [0.0015, 0.0006])
    >>> [round(value, 4) for value in factors.value.tolist()], factors.in_range.tolist()
    ([1.5957, 2.196], [True, False])
    """
    big, small, radius = broadcast_floats(big_diameter, small_diameter, fillet_radius)
    if big.size > BLOCK:
        value = by_blocks(_shoulder_kts, big, small, radius)
        return ShoulderFilletFactors(value, big, small, radius)
    # One block (a model's segments, one shoulder): its terms are kept for the notes.
    terms = _shoulder_terms(*(np.ravel(array) for array in (big, small, radius)))
    shaped = ShoulderFilletTerms._make(np.reshape(array, big.shape) for array in terms)
    value = np.reshape(_shoulder_value(terms), big.shape)
    return ShoulderFilletFactors(value, big, small, radius, shaped)


def shoulder_fillet_kts(
    big_diameter: float, small_diameter: float, fillet_radius: float
) -> ConcentrationFactor:
    """Torsional stress-concentration factor at one shoulder fillet of a round shaft.

    The one geometry checked, then :func:`shoulder_fillet_factors` evaluates it.

    Parameters
    ----------
    big_diameter
        Larger diameter D (m).
    small_diameter
        Smaller diameter d (m); the nominal stress is 16T/(πd³) on it.
    fillet_radius
        Fillet radius r (m), greater than zero.

    Returns
    -------
    ConcentrationFactor
        Kts = τ_max/τ_nom, with ``in_range``, a note and the source (module text: what is done
        outside 0.02 ≤ r/d ≤ 0.30, 1.09 ≤ D/d ≤ 2.00).

    Raises
    ------
    InputError
        A dimension is not a finite positive number, or D < d.

    References
    ----------
    .. [1] Norton, *Machine Design*, App. C, as :func:`shoulder_fillet_factors`.
    """
    require_positive("big_diameter", big_diameter)
    require_positive("small_diameter", small_diameter)
    if fillet_radius == 0.0:
        msg = "must be greater than zero: a sharp corner has no finite stress-concentration factor"
        raise InputError(field="fillet_radius", message=msg)
    require_positive("fillet_radius", fillet_radius)
    if big_diameter < small_diameter:
        msg = (
            f"must not be smaller than small_diameter ({quote(big_diameter, 'length')} < "
            f"{quote(small_diameter, 'length')})"
        )
        raise InputError(field="big_diameter", message=msg)
    return shoulder_fillet_factors(big_diameter, small_diameter, fillet_radius).at()


# --- keyseat -------------------------------------------------------------------------------------
def keyseat_kts() -> ConcentrationFactor:
    """First-iteration torsional stress-concentration factor of an end-milled keyseat.

    Returns
    -------
    ConcentrationFactor
        Kts = 3.0 (dimensionless), on the nominal stress 16T/(πd³) of the shaft.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, Table 7-1: end-mill keyseat
       (r/d = 0.02), Kts = 3.0.
    """
    return ConcentrationFactor(
        3.0,
        True,
        "end-milled keyseat, first-iteration estimate (r/d ≈ 0.02) for use before the keyseat "
        "is dimensioned; nominal stress 16T/(πd³)",
        _SHIGLEY_SOURCE,
    )
