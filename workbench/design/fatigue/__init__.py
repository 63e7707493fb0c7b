"""Fatigue of members under fluctuating torque: Marin factors, Kfs, and fatigue factors of safety.

The chain, all in SI floats (Pa, m, K) and all pure functions, one module per step; import the
names from this package:

1. :mod:`~workbench.design.fatigue.marin` and :mod:`~workbench.design.fatigue.endurance`:
   :func:`endurance_limit`, the rotating-beam endurance limit Se' of a steel (or one found by
   test), corrected by the Marin factors ka (surface), kb (size), kc (load: 0.59 in torsion),
   kd (temperature), ke (reliability) and kf (miscellaneous). With ``loading="torsion"`` the
   result is the shear endurance limit Sse. Each factor comes back with its basis.
2. :mod:`~workbench.design.fatigue.notch`: :func:`notch_sensitivity_torsion` and
   :func:`fatigue_concentration`, the notch sensitivity q in torsion from the Neuber relation
   q = 1/(1 + √a/√r) with Shigley's fit for √a, and the fatigue stress-concentration factor
   Kfs = 1 + q(Kts − 1).
3. :mod:`~workbench.design.fatigue.stresses`: :func:`stresses_from_extremes` (two load cases or
   combinations as the torque extremes) or :func:`stresses_from_mean_alternating`, the mean and
   alternating shear stress at the detail.
4. :mod:`~workbench.design.fatigue.criteria`: :func:`fatigue_factors`, the fatigue factor of
   safety by modified Goodman, Gerber, ASME-elliptic and Soderberg, and the first-cycle (Langer)
   yield factor.

Choices these modules make, stated again where they apply:

* Kfs multiplies the mean stress as well as the alternating one unless another mean-stress factor
  Kfsm is given (Shigley 9th ed., eqs. (7-5) and (7-6), p. 368).
* Only the magnitude of the mean shear stress counts: the sign of a shear stress is fixed only by
  the positive sense chosen for the torque, which an isotropic round member cannot tell apart, so
  a mean torque of either sense has the same effect (symmetry argument; Shigley treats the
  torsional mean stress by its magnitude, from memory).
* For ductile, notch-free, polished specimens a torsional mean stress below the torsional yield
  strength hardly lowers the alternating strength (Smith's tests, as reported by Shigley, from
  memory); the mean-stress criteria here are therefore on the safe side for such members.
* Outside the range of a fit nothing is extrapolated silently: the factor says ``in_range`` and
  its basis says what was done instead.

These are estimates for design, from textbook correlations for steels. Where a failure can hurt
someone, use tested fatigue data for the actual material and process and the applicable code.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.
   (2011) and 10th ed. (2015), McGraw-Hill, ch. 6: eq. (6-8) Se' of steels; eq. (6-18) the Marin
   equation; eq. (6-19) and Table 6-2 the surface factor; eq. (6-20) the size factor; eq. (6-26)
   the load factor; eq. (6-27) and Table 6-4 the temperature factor; eq. (6-29) and Table 6-5 the
   reliability factor; eqs. (6-32) to (6-35) notch sensitivity; §6-12 to §6-15 the Goodman,
   Gerber, ASME-elliptic, Soderberg and Langer lines, and torsional fatigue (Ssu = 0.67 Sut);
   ch. 7 (shaft design, Kfs applied to the mean stress). Read in the 9th ed.: eqs. (6-32) to
   (6-35b) and Fig. 6-21 (pp. 295-296), (6-36), (6-45) to (6-49), (6-54), (5-21) (summary,
   pp. 346-347) and (7-5), (7-6) (p. 368); the Table 6-2, eq. (6-20), eq. (6-27) and Table 6-4
   values in a reproduction of the book's problem text. The other equation numbers are from
   memory.
.. [2] H. Neuber, *Kerbspannungslehre*, Springer, 1937/1958; P. Kuhn and H. F. Hardrath, "An
   engineering method for estimating notch-size effect in fatigue tests on steel", NACA TN 2805,
   1952 (the relation q = 1/(1 + √a/√r) and the data for √a of steels).
"""

from __future__ import annotations

from workbench.design.fatigue.criteria import (
    FatigueResult,
    factors_of_safety,
    fatigue_factors,
)
from workbench.design.fatigue.endurance import (
    ROTATING_BEAM_CAP,
    ROTATING_BEAM_KNEE,
    ULTIMATE_SHEAR_RATIO,
    EnduranceLimit,
    endurance_limit,
    rotating_beam_endurance_limit,
    ultimate_shear_strength,
    yield_shear_strength,
)
from workbench.design.fatigue.marin import (
    LOAD_FACTORS,
    RELIABILITY_FACTORS,
    SIZE_RANGE,
    SURFACE_FACTORS_KPSI,
    SURFACE_FACTORS_MPA,
    TEMPERATURE_POLYNOMIAL,
    TEMPERATURE_RANGE_F,
    MarinFactor,
    load_factor,
    miscellaneous_factor,
    reliability_factor,
    size_factor,
    surface_factor,
    temperature_factor,
)
from workbench.design.fatigue.notch import (
    CHART_NOTCH_RADIUS,
    NEUBER_STRENGTH_RANGE,
    NEUBER_TORSION_POLYNOMIAL,
    NotchSensitivity,
    fatigue_concentration,
    notch_sensitivity_torsion,
)
from workbench.design.fatigue.stresses import (
    FatigueStresses,
    stresses_from_extremes,
    stresses_from_mean_alternating,
)

__all__ = [
    "CHART_NOTCH_RADIUS",
    "LOAD_FACTORS",
    "NEUBER_STRENGTH_RANGE",
    "NEUBER_TORSION_POLYNOMIAL",
    "RELIABILITY_FACTORS",
    "ROTATING_BEAM_CAP",
    "ROTATING_BEAM_KNEE",
    "SIZE_RANGE",
    "SURFACE_FACTORS_KPSI",
    "SURFACE_FACTORS_MPA",
    "TEMPERATURE_POLYNOMIAL",
    "TEMPERATURE_RANGE_F",
    "ULTIMATE_SHEAR_RATIO",
    "EnduranceLimit",
    "FatigueResult",
    "FatigueStresses",
    "MarinFactor",
    "NotchSensitivity",
    "endurance_limit",
    "factors_of_safety",
    "fatigue_concentration",
    "fatigue_factors",
    "load_factor",
    "miscellaneous_factor",
    "notch_sensitivity_torsion",
    "reliability_factor",
    "rotating_beam_endurance_limit",
    "size_factor",
    "stresses_from_extremes",
    "stresses_from_mean_alternating",
    "surface_factor",
    "temperature_factor",
    "ultimate_shear_strength",
    "yield_shear_strength",
]
