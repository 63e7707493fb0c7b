"""Notch sensitivity in torsion (Neuber) and the fatigue stress-concentration factor Kfs.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, §6-10, p. 296: eqs. (6-33) (Neuber), (6-34) (q from √a), (6-35b) (√a in torsion)
   and Fig. 6-21 (notch sensitivity in reversed torsion, r up to 0.16 in), read in a copy of
   that page.
.. [2] H. Neuber, *Kerbspannungslehre*, Springer, 1937/1958; P. Kuhn and H. F. Hardrath, "An
   engineering method for estimating notch-size effect in fatigue tests on steel", NACA TN 2805,
   1952 (the relation q = 1/(1 + √a/√r) and the data for √a of steels).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.concentration import ConcentrationFactor
from workbench.design.fatigue.conventions import INCH, KPSI, SHIGLEY, require_number

#: Shigley's fit for the Neuber constant in torsion, √a (√in) in Sut (kpsi), lowest power first.
NEUBER_TORSION_POLYNOMIAL: tuple[float, ...] = (0.190, -2.51e-3, 1.35e-5, -2.67e-8)
#: Sut range (Pa) of that fit: 50 to 250 kpsi.
NEUBER_STRENGTH_RANGE: tuple[float, float] = (50.0 * KPSI, 250.0 * KPSI)
#: Largest notch radius the notch-sensitivity chart shows, 0.16 in ≈ 4 mm (Shigley 9th ed.,
#: Fig. 6-21, p. 296, which says to use q at r = 0.16 in for larger radii).
CHART_NOTCH_RADIUS = 0.16 * INCH


@dataclass(frozen=True)
class NotchSensitivity:
    """The notch sensitivity q of a detail and how far to trust it.

    Parameters
    ----------
    value
        q (dimensionless, 0 ≤ q ≤ 1).
    neuber_constant
        √a, the square root of Neuber's characteristic length (m^½), as evaluated.
    in_range
        ``True`` when Sut lay inside the fit's 50–250 kpsi.
    note
        What was computed, and what was done instead when out of range.
    source
        Publication the relation and fit come from.
    """

    value: float
    neuber_constant: float
    in_range: bool
    note: str
    source: str


_NEUBER_SOURCE = (
    f"Neuber relation q = 1/(1 + √a/√r) with Shigley's fit for √a in torsion ({SHIGLEY}, "
    "eqs. 6-33, 6-34 and 6-35b, Fig. 6-21; 9th ed. p. 296)"
)


def _neuber_torsion_sqrt_inch(strength_kpsi: float) -> float:
    return float(sum(c * strength_kpsi**power for power, c in enumerate(NEUBER_TORSION_POLYNOMIAL)))


def notch_sensitivity_torsion(notch_radius: float, ultimate_strength: float) -> NotchSensitivity:
    """Notch sensitivity in torsion of a steel detail from its notch radius and strength.

    Parameters
    ----------
    notch_radius
        Notch (fillet, groove or hole-edge) radius r (m), greater than zero.
    ultimate_strength
        Tensile ultimate strength Sut (Pa) of the steel.

    Returns
    -------
    NotchSensitivity
        q = 1/(1 + √a/√r) with √a = 0.190 − 2.51e-3·Sut + 1.35e-5·Sut² − 2.67e-8·Sut³
        (√a in √in, Sut in kpsi), fitted for 50 ≤ Sut ≤ 250 kpsi (345–1724 MPa). Outside that:

        * Sut < 50 kpsi: √a taken at 50 kpsi, which gives a larger q than the trend (√a grows as
          Sut falls), i.e. on the safe side; flagged;
        * Sut > 250 kpsi: q = 1 (full notch sensitivity, Kfs = Kts: on the safe side); flagged;
        * within the range the fit reaches √a = 0 at about 234 kpsi; above that q = 1 is taken
          (noted).

        Radii beyond the charts' 0.16 in (≈ 4 mm) use the relation at the actual radius, which
        gives a larger q than reading the chart at 4 mm (noted).

    Raises
    ------
    InputError
        A value is not a finite positive number (a sharp notch, r = 0, has no finite factor).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eqs. (6-33), (6-34) (Neuber
       equation) and (6-35b) (√a in torsion), Fig. 6-21 (notch sensitivity in reversed torsion),
       p. 296: the coefficients 0.190, −2.51e-3, 1.35e-5, −2.67e-8 as printed there. The older
       rule "use the bending fit at Sut + 20 kpsi" gives the same q within 1 % (see the tests).
    .. [2] Kuhn and Hardrath, NACA TN 2805, 1952.
    """
    if notch_radius == 0.0:
        msg = "must be greater than zero: a sharp notch has no finite fatigue factor"
        raise InputError("notch_radius", msg)
    require_positive("notch_radius", notch_radius)
    require_positive("ultimate_strength", ultimate_strength, "stress")
    strength_kpsi = ultimate_strength / KPSI
    lowest, highest = NEUBER_STRENGTH_RANGE
    notes = []
    in_range = True
    if ultimate_strength > highest:
        in_range = False
        notes.append(
            f"Sut = {strength_kpsi:.4g} kpsi is above the fit's 250 kpsi: q = 1 taken "
            "(full notch sensitivity, Kfs = Kts; on the safe side)"
        )
        sqrt_a_inch = 0.0
    else:
        evaluated = strength_kpsi
        if ultimate_strength < lowest:
            in_range = False
            evaluated = 50.0
            notes.append(
                f"Sut = {strength_kpsi:.4g} kpsi is below the fit's 50 kpsi: √a taken at "
                "50 kpsi (a larger q than the trend; on the safe side)"
            )
        sqrt_a_inch = _neuber_torsion_sqrt_inch(evaluated)
        if sqrt_a_inch <= 0.0:
            notes.append(
                f"the fit gives √a ≤ 0 at Sut = {strength_kpsi:.4g} kpsi (it crosses zero near "
                "234 kpsi): q = 1 taken"
            )
            sqrt_a_inch = 0.0
    radius_inch = notch_radius / INCH
    value = 1.0 / (1.0 + sqrt_a_inch / math.sqrt(radius_inch))
    if notch_radius > CHART_NOTCH_RADIUS * (1.0 + 1e-9):
        notes.append(
            f"r = {quote(notch_radius, 'length')} is beyond the charts' 0.16 in (4 mm): the "
            "relation is used at the actual radius (a larger q than the chart at 4 mm)"
        )
    notes.insert(
        0,
        f"√a = {sqrt_a_inch:.4g} √in, r = {radius_inch:.4g} in: q = 1/(1 + √a/√r) = {value:.4g}",
    )
    return NotchSensitivity(
        value, sqrt_a_inch * math.sqrt(INCH), in_range, "; ".join(notes), _NEUBER_SOURCE
    )


def fatigue_concentration(
    kts: float | ConcentrationFactor, q: float | NotchSensitivity
) -> ConcentrationFactor:
    """Fatigue stress-concentration factor in torsion from Kts and the notch sensitivity.

    Parameters
    ----------
    kts
        Theoretical (elastic) torsional stress-concentration factor Kts ≥ 1 (dimensionless), or
        a :class:`~workbench.design.concentration.ConcentrationFactor`.
    q
        Notch sensitivity 0 ≤ q ≤ 1 (dimensionless), or a :class:`NotchSensitivity`.

    Returns
    -------
    ConcentrationFactor
        Kfs = 1 + q(Kts − 1), on the same nominal stress as Kts; ``in_range`` is ``False`` when
        either input was flagged.

    Raises
    ------
    InputError
        Kts below 1 or q outside [0, 1] (fields ``"kts"`` and ``"q"``).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-32).
    .. [2] R. E. Peterson, *Stress Concentration Factors*, Wiley, 1974 (definition of q).
    """
    kts_value = kts.value if isinstance(kts, ConcentrationFactor) else kts
    q_value = q.value if isinstance(q, NotchSensitivity) else q
    kts_value = require_number("kts", kts_value)
    q_value = require_number("q", q_value)
    if kts_value < 1.0:
        msg = f"a stress-concentration factor must be at least 1, not {kts_value:g}"
        raise InputError("kts", msg)
    if not 0.0 <= q_value <= 1.0:
        msg = f"the notch sensitivity must lie in [0, 1], not {q_value:g}"
        raise InputError("q", msg)
    value = 1.0 + q_value * (kts_value - 1.0)
    in_range = True
    sources = [f"Kfs = 1 + q(Kts − 1), {SHIGLEY}, eq. 6-32"]
    parts = [f"Kfs = 1 + {q_value:.4g}·({kts_value:.4g} − 1) = {value:.4g}"]
    if isinstance(kts, ConcentrationFactor):
        in_range = in_range and kts.in_range
        parts.append(f"Kts: {kts.note}")
        sources.append(kts.source)
    if isinstance(q, NotchSensitivity):
        in_range = in_range and q.in_range
        parts.append(f"q: {q.note}")
        sources.append(q.source)
    return ConcentrationFactor(value, in_range, "; ".join(parts), "; ".join(sources))
