"""Stress-concentration factors of shaft details in torsion.

Every function returns a :class:`ConcentrationFactor` that says whether the geometry lies inside
the range its data cover (``in_range``) and, when it does not, what was done instead
(``note``). Nothing is extrapolated silently.

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
    Pilkey & Pilkey's polynomial for a solid bar in torsion, a *normal*-stress factor over the
    gross nominal shear stress 16T/(πD³); valid for 0 ≤ d/D ≤ 0.4 (range from memory).

Keyseat
    Shigley's first-iteration estimate Kts ≈ 3.0 for an end-milled keyseat.

References
----------
.. [1] R. L. Norton, *Machine Design: An Integrated Approach*, Prentice Hall, Appendix C,
   stress-concentration factor for a shaft with a shoulder fillet in torsion (curve fits).
.. [2] W. D. Pilkey and D. F. Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., Wiley,
   2008, ch. 3 (shoulder fillets) and ch. 4 (transverse hole in a bar in torsion).
.. [3] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, McGraw-Hill,
   Table 7-1 (first-iteration estimates of stress-concentration factors).
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive

#: Norton's fits Kts = A·(r/d)^b, as (D/d, A, b), in increasing D/d.
NORTON_TORSION_FITS: tuple[tuple[float, float, float], ...] = (
    (1.09, 0.90337, -0.12692),
    (1.20, 0.83425, -0.21649),
    (1.33, 0.84897, -0.23161),
    (2.00, 0.86331, -0.23865),
)

#: r/d range this module treats as covered by the shoulder-fillet fits.
FILLET_RATIO_RANGE: tuple[float, float] = (0.02, 0.30)

#: d/D range of the transverse-hole polynomial (from memory).
HOLE_RATIO_RANGE: tuple[float, float] = (0.0, 0.4)

#: Pilkey & Pilkey's transverse-hole polynomial coefficients, lowest power first.
HOLE_POLYNOMIAL: tuple[float, ...] = (4.0, -6.055, 32.764, -38.33)

_NORTON_SOURCE = (
    "Norton, Machine Design, App. C: fit Kts = A(r/d)^b to Peterson's charts, shaft shoulder "
    "fillet in torsion"
)
_HOLE_SOURCE = (
    "Pilkey & Pilkey, Peterson's Stress Concentration Factors, 3rd ed., transverse hole in a "
    "solid bar in torsion (validity range 0 ≤ d/D ≤ 0.4 from memory)"
)
_SHIGLEY_SOURCE = "Shigley's Mechanical Engineering Design, Table 7-1 (first-iteration estimate)"

# Ratios within this relative distance of 1 are a plain shaft (no shoulder).
_NO_SHOULDER = 1e-9

# Ratios within this relative distance of a range limit count as on it: 0.02/0.05 is not
# exactly 0.4 in binary floating point, and a 20 mm hole in a 50 mm shaft is in range.
_EDGE = 1e-9


def _snap(ratio: float, limits: tuple[float, ...]) -> float:
    for limit in limits:
        if abs(ratio - limit) <= _EDGE * limit:
            return limit
    return ratio


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


def _norton(ratio_index: int, fillet_ratio: float) -> float:
    _, coefficient, exponent = NORTON_TORSION_FITS[ratio_index]
    return float(coefficient * fillet_ratio**exponent)


def shoulder_fillet_kts(
    big_diameter: float, small_diameter: float, fillet_radius: float
) -> ConcentrationFactor:
    """Torsional stress-concentration factor at a shoulder fillet of a round shaft.

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
        Kts = τ_max/τ_nom, with ``in_range`` and a note (see the module docstring for what is
        done outside 0.02 ≤ r/d ≤ 0.30, 1.09 ≤ D/d ≤ 2.00).

    Raises
    ------
    InputError
        A dimension is not a finite positive number, or D < d.

    References
    ----------
    .. [1] Norton, *Machine Design*, App. C, shoulder fillet in torsion: Kts = A(r/d)^b.
    .. [2] Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., ch. 3.
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
    diameter_ratio = big_diameter / small_diameter
    if diameter_ratio <= 1.0 + _NO_SHOULDER:
        return ConcentrationFactor(1.0, True, "no shoulder (D/d = 1): Kts = 1", _NORTON_SOURCE)

    ratios = [row[0] for row in NORTON_TORSION_FITS]
    diameter_ratio = _snap(diameter_ratio, tuple(ratios))
    fillet_ratio = _snap(fillet_radius / small_diameter, FILLET_RATIO_RANGE)
    lowest_r, highest_r = FILLET_RATIO_RANGE
    notes: list[str] = []
    in_range = True
    if fillet_ratio > highest_r:
        evaluated_r = highest_r
        in_range = False
        notes.append(
            f"r/d = {fillet_ratio:.3g} is above the charted {highest_r:g}: Kts taken at "
            f"r/d = {highest_r:g} (conservative, Kts falls as r/d grows)"
        )
    elif fillet_ratio < lowest_r:
        evaluated_r = fillet_ratio
        in_range = False
        notes.append(
            f"r/d = {fillet_ratio:.3g} is below the charted {lowest_r:g}: fit extrapolated to "
            "the actual r/d (Kts rises as the fillet sharpens); enlarge the fillet or confirm "
            "the factor by test or analysis"
        )
    else:
        evaluated_r = fillet_ratio

    if diameter_ratio > ratios[-1]:
        value = _norton(len(ratios) - 1, evaluated_r)
        in_range = False
        notes.append(
            f"D/d = {diameter_ratio:.3g} is above the largest fitted {ratios[-1]:.2f}: the "
            f"D/d = {ratios[-1]:.2f} fit is used, possibly unconservative (Kts may keep rising "
            "with D/d beyond the last charted curve)"
        )
    elif diameter_ratio < ratios[0]:
        value = _norton(0, evaluated_r)
        in_range = False
        notes.append(
            f"D/d = {diameter_ratio:.3g} is below the smallest fitted {ratios[0]:.2f}: the "
            f"D/d = {ratios[0]:.2f} fit is used (conservative, Kts grows with D/d)"
        )
    else:
        upper = next(i for i, ratio in enumerate(ratios) if ratio >= diameter_ratio)
        if ratios[upper] == diameter_ratio or upper == 0:
            value = _norton(upper, evaluated_r)
            notes.append(f"D/d = {ratios[upper]:.2f} fit at r/d = {evaluated_r:.3g}")
        else:
            lower = upper - 1
            weight = (diameter_ratio - ratios[lower]) / (ratios[upper] - ratios[lower])
            low_value = _norton(lower, evaluated_r)
            high_value = _norton(upper, evaluated_r)
            value = low_value + weight * (high_value - low_value)
            notes.append(
                f"D/d = {diameter_ratio:.3g}: linear in D/d between the {ratios[lower]:.2f} and "
                f"{ratios[upper]:.2f} fits at r/d = {evaluated_r:.3g}"
            )
    notes.append("nominal stress 16T/(πd³) on the smaller diameter")
    return ConcentrationFactor(value, in_range, "; ".join(notes), _NORTON_SOURCE)


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


def _hole_polynomial(hole_ratio: float) -> float:
    return float(sum(c * hole_ratio**power for power, c in enumerate(HOLE_POLYNOMIAL)))


def transverse_hole_kts(hole_diameter: float, shaft_diameter: float) -> ConcentrationFactor:
    """Stress-concentration factor of a transverse (radial, through) hole in a solid shaft.

    Parameters
    ----------
    hole_diameter
        Hole diameter d (m).
    shaft_diameter
        Shaft diameter D (m), greater than d.

    Returns
    -------
    ConcentrationFactor
        Ktg = σ_max/τ_nom with τ_nom = 16T/(πD³) on the gross section: the largest *normal*
        stress at the hole edge over the nominal shear stress. Outside 0 ≤ d/D ≤ 0.4 the value
        at d/D = 0.4 is returned, flagged as not conservative (the factor rises with d/D there).

    Raises
    ------
    InputError
        A diameter is not a finite positive number, or d ≥ D.

    References
    ----------
    .. [1] Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., transverse hole
       in a solid bar in torsion: Ktg = 4 − 6.055(d/D) + 32.764(d/D)² − 38.33(d/D)³.
    """
    require_positive("hole_diameter", hole_diameter)
    require_positive("shaft_diameter", shaft_diameter)
    if hole_diameter >= shaft_diameter:
        msg = (
            f"must be smaller than the shaft diameter ({quote(hole_diameter, 'length')} ≥ "
            f"{quote(shaft_diameter, 'length')})"
        )
        raise InputError(field="hole_diameter", message=msg)
    hole_ratio = _snap(hole_diameter / shaft_diameter, HOLE_RATIO_RANGE[1:])
    kind = "largest normal stress over the gross nominal shear stress 16T/(πD³)"
    highest = HOLE_RATIO_RANGE[1]
    if hole_ratio > highest:
        value = _hole_polynomial(highest)
        note = (
            f"d/D = {hole_ratio:.3g} is above the fit's {highest:g}: value at d/D = {highest:g}, "
            f"NOT conservative (the factor rises with d/D at the end of the fit); confirm by chart "
            f"or analysis; {kind}"
        )
        return ConcentrationFactor(value, False, note, _HOLE_SOURCE)
    note = f"d/D = {hole_ratio:.3g}; {kind}"
    return ConcentrationFactor(_hole_polynomial(hole_ratio), True, note, _HOLE_SOURCE)
