"""Fatigue factors of safety of a shear-stress cycle: Goodman, Gerber, ASME-elliptic, Soderberg.

And the first-cycle (Langer) yield factor. Only the magnitude of the mean shear stress counts: the
sign of a shear stress is fixed only by the positive sense chosen for the torque, which an
isotropic round member cannot tell apart (symmetry argument; Shigley treats the torsional mean
stress by its magnitude, from memory).

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, §6-12 (p. 303) and the summary pp. 346-347: eqs. (6-45) Soderberg, (6-46)
   modified Goodman, (6-47) Gerber, (6-48) ASME-elliptic, (6-49) first-cycle (Langer) yield;
   for torsion τ for σ, kc = 0.59, Ssu = 0.67 Sut and Ssy = 0.577 Sy (p. 347).
.. [2] ASME B106.1M-1985, *Design of Transmission Shafting* (the elliptic criterion).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.case.design import FATIGUE_CRITERIA
from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.fatigue.conventions import require_number
from workbench.solver.sections import FloatArray


@dataclass(frozen=True)
class FatigueResult:
    """Fatigue factors of safety of one stress cycle by four criteria, and first-cycle yield.

    A factor is ``math.inf`` when the stresses it depends on are zero. The utilisation of a
    criterion is 1/factor.

    Parameters
    ----------
    goodman
        Modified Goodman: 1/n = τa/Sse + |τm|/Ssu.
    gerber
        Gerber: n·τa/Sse + (n·|τm|/Ssu)² = 1.
    asme_elliptic
        ASME-elliptic: (n·τa/Sse)² + (n·|τm|/Ssy)² = 1.
    soderberg
        Soderberg: 1/n = τa/Sse + |τm|/Ssy.
    first_cycle_yield
        Langer: n = Ssy/(τa + |τm|).
    mean_shear
        |τm| used (Pa).
    alternating_shear
        τa (Pa).
    endurance_shear, ultimate_shear, yield_shear
        Sse, Ssu, Ssy (Pa).
    notes
        What was assumed (negative mean, zero components).
    """

    goodman: float
    gerber: float
    asme_elliptic: float
    soderberg: float
    first_cycle_yield: float
    mean_shear: float
    alternating_shear: float
    endurance_shear: float
    ultimate_shear: float
    yield_shear: float
    notes: tuple[str, ...] = ()

    def factor_of_safety(self, criterion: str) -> float:
        """The fatigue factor of safety by ``criterion``, one of :data:`FATIGUE_CRITERIA`."""
        if criterion not in FATIGUE_CRITERIA:
            msg = (
                f"unknown fatigue criterion {quoted(criterion)}; choose one of "
                f"{', '.join(FATIGUE_CRITERIA)}"
            )
            raise InputError("fatigue_criterion", msg)
        return float(getattr(self, criterion))

    @property
    def basis(self) -> str:
        """One sentence with the stresses, strengths and the five factors."""
        factors = ", ".join(
            f"{name.replace('_', '-')} {_short_factor(getattr(self, name))}"
            for name in (*FATIGUE_CRITERIA, "first_cycle_yield")
        )
        return (
            f"τa = {quote(self.alternating_shear, 'stress')}, |τm| = "
            f"{quote(self.mean_shear, 'stress')}; Sse = {quote(self.endurance_shear, 'stress')}, "
            f"Ssu = {quote(self.ultimate_shear, 'stress')}, Ssy = "
            f"{quote(self.yield_shear, 'stress')}: factors of safety {factors}"
        )


def _short_factor(value: float) -> str:
    return "∞" if math.isinf(value) else f"{value:.3g}"


def factors_of_safety(
    mean_shear: FloatArray | float,
    alternating_shear: FloatArray | float,
    endurance_shear: FloatArray | float,
    ultimate_shear: FloatArray | float,
    yield_shear: FloatArray | float,
) -> dict[str, FloatArray]:
    """The formulas of :func:`fatigue_factors` for many cycles at once, without validation.

    Parameters
    ----------
    mean_shear, alternating_shear
        τm (sign ignored) and τa ≥ 0 (Pa), arrays or scalars that broadcast together.
    endurance_shear, ultimate_shear, yield_shear
        Sse, Ssu, Ssy (Pa), positive.

    Returns
    -------
    dict of str to numpy.ndarray
        Factors of safety by ``goodman``, ``gerber``, ``asme_elliptic``, ``soderberg`` and
        ``first_cycle_yield`` (``inf`` where the stresses they depend on are zero or too small
        for their reciprocal, 0 where a ratio overflows).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., §6-12 and §6-14 (as in
       :func:`fatigue_factors`).
    """
    magnitude = np.abs(mean_shear)
    # A factor of safety beyond the range of numbers is 0 or ∞, judged as such: stresses
    # near the largest float, or a few ulps above zero, are no error here.
    with np.errstate(divide="ignore", over="ignore"):
        amplitude_ratio = np.asarray(alternating_shear, dtype=float) / endurance_shear
        ultimate_ratio = magnitude / ultimate_shear
        yield_ratio = magnitude / yield_shear
        return {
            "goodman": 1.0 / (amplitude_ratio + ultimate_ratio),
            # The root of n·A + n²(|τm|/Ssu)² = 1, in a form exact for τm = 0 and for τa = 0.
            "gerber": 2.0
            / (amplitude_ratio + np.sqrt(amplitude_ratio**2 + 4.0 * ultimate_ratio**2)),
            "asme_elliptic": 1.0 / np.hypot(amplitude_ratio, yield_ratio),
            "soderberg": 1.0 / (amplitude_ratio + yield_ratio),
            "first_cycle_yield": yield_shear / (alternating_shear + magnitude),
        }


def fatigue_factors(
    mean_shear: float,
    alternating_shear: float,
    endurance_shear: float,
    ultimate_shear: float,
    yield_shear: float,
) -> FatigueResult:
    """Fatigue factors of safety of a shear-stress cycle, and the first-cycle yield factor.

    The load line is radial: mean and alternating stress grow in proportion (the factor of safety
    scales the whole cycle).

    Parameters
    ----------
    mean_shear
        Mean shear stress τm (Pa), with any stress concentration applied; its sign is ignored.
    alternating_shear
        Alternating shear stress τa ≥ 0 (Pa), with Kfs applied.
    endurance_shear
        Shear endurance limit Sse (Pa): the Marin-corrected limit with kc = 0.59
        (:func:`endurance_limit` with ``loading="torsion"``).
    ultimate_shear
        Torsional ultimate strength Ssu (Pa), e.g. 0.67·Sut (:func:`ultimate_shear_strength`).
    yield_shear
        Torsional yield strength Ssy (Pa), e.g. 0.577·Sy (:func:`yield_shear_strength`);
        Ssy ≤ Ssu.

    Returns
    -------
    FatigueResult
        With A = τa/Sse:

        * Goodman n = 1/(A + |τm|/Ssu);
        * Gerber n = 2/(A + √(A² + 4(|τm|/Ssu)²)) (the root of n·A + n²(|τm|/Ssu)² = 1, in a
          form exact for τm = 0 and for τa = 0);
        * ASME-elliptic n = 1/√(A² + (|τm|/Ssy)²);
        * Soderberg n = 1/(A + |τm|/Ssy);
        * Langer (first-cycle yield) n = Ssy/(τa + |τm|).

        Purely alternating stress (τm = 0) gives Sse/τa by every criterion; a static stress
        (τa = 0) gives Ssu/|τm| (Goodman, Gerber) and Ssy/|τm| (ASME-elliptic, Soderberg).

    Raises
    ------
    InputError
        A stress is not finite, τa < 0, a strength is not positive, Ssy > Ssu or Sse > Ssu.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., §6-12 (Table 6-7: Gerber and
       Langer; Table 6-8: ASME-elliptic and Langer; eq. (6-46) modified Goodman, eq. (6-45)
       Soderberg; load line through the origin) and §6-14 (torsion: the same criteria with
       Sse, Ssu = 0.67 Sut and Ssy).
    .. [2] ASME B106.1M-1985, *Design of Transmission Shafting* (the elliptic criterion).
    """
    mean = require_number("mean_shear", mean_shear)
    alternating = require_number("alternating_shear", alternating_shear)
    if alternating < 0.0:
        msg = (
            f"an alternating stress is an amplitude and must not be negative "
            f"({quote(alternating, 'stress')})"
        )
        raise InputError("alternating_shear", msg)
    require_positive("endurance_shear", endurance_shear, "stress")
    require_positive("ultimate_shear", ultimate_shear, "stress")
    require_positive("yield_shear", yield_shear, "stress")
    if yield_shear > ultimate_shear:
        msg = (
            f"the shear yield strength {quote(yield_shear, 'stress')} exceeds the ultimate shear "
            f"strength {quote(ultimate_shear, 'stress')}"
        )
        raise InputError("yield_shear", msg)
    if endurance_shear > ultimate_shear:
        msg = (
            f"the shear endurance limit {quote(endurance_shear, 'stress')} exceeds the ultimate "
            f"shear strength {quote(ultimate_shear, 'stress')}"
        )
        raise InputError("endurance_shear", msg)
    notes = []
    if mean < 0.0:
        notes.append(
            "negative mean shear stress: its magnitude is used (the sign of a torsional mean "
            "stress does not change its effect)"
        )
    magnitude = abs(mean)
    if alternating == 0.0 and magnitude == 0.0:
        notes.append("no stress: every factor of safety is infinite")
    elif alternating == 0.0:
        notes.append("static stress (τa = 0): the fatigue criteria reduce to static strength")
    elif magnitude == 0.0:
        notes.append("purely alternating stress (τm = 0): every criterion gives Sse/τa")
    factors = factors_of_safety(
        magnitude, alternating, endurance_shear, ultimate_shear, yield_shear
    )
    return FatigueResult(
        goodman=float(factors["goodman"]),
        gerber=float(factors["gerber"]),
        asme_elliptic=float(factors["asme_elliptic"]),
        soderberg=float(factors["soderberg"]),
        first_cycle_yield=float(factors["first_cycle_yield"]),
        mean_shear=magnitude,
        alternating_shear=alternating,
        endurance_shear=float(endurance_shear),
        ultimate_shear=float(ultimate_shear),
        yield_shear=float(yield_shear),
        notes=tuple(notes),
    )


def failure_lines(
    endurance_shear: float, ultimate_shear: float, yield_shear: float, points: int = 41
) -> dict[str, tuple[FloatArray, FloatArray]]:
    """(τm, τa) of each failure line of the fatigue diagram, in the unit of the strengths given.

    Every line has ``points`` points, so one chart mark or one drawing can hold them all.

    Parameters
    ----------
    endurance_shear, ultimate_shear, yield_shear
        Sse, Ssu and Ssy (any one stress unit).
    points
        Points along each line.

    Returns
    -------
    dict
        In the order goodman, gerber, asme_elliptic, soderberg, langer: the modified Goodman
        line τa = Sse·(1 − τm/Ssu), the Gerber parabola τa = Sse·(1 − (τm/Ssu)²), the
        ASME-elliptic quadrant (τa/Sse)² + (τm/Ssy)² = 1 (by its angle, so the points are
        spread evenly round it), the Soderberg line τa = Sse·(1 − τm/Ssy) and the Langer
        first-cycle yield line τa + τm = Ssy.

    References
    ----------
    .. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
       §6-12, Tables 6-6 and 6-7 (the failure criteria for fluctuating stress, written here for
       shear strengths as in §7-4).
    """
    fraction = np.linspace(0.0, 1.0, points)
    return {
        "goodman": (fraction * ultimate_shear, endurance_shear * (1.0 - fraction)),
        "gerber": (fraction * ultimate_shear, endurance_shear * (1.0 - fraction**2)),
        "asme_elliptic": (
            yield_shear * np.sin(fraction * math.pi / 2.0),
            endurance_shear * np.cos(fraction * math.pi / 2.0),
        ),
        "soderberg": (fraction * yield_shear, endurance_shear * (1.0 - fraction)),
        "langer": (fraction * yield_shear, yield_shear * (1.0 - fraction)),
    }
