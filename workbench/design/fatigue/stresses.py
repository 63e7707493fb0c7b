"""The mean and alternating shear stress of a torque cycle at a detail.

Kfs multiplies the mean stress as well as the alternating one unless another mean-stress factor
Kfsm is given (as Shigley's shaft equations (7-5) and (7-6), 9th ed. p. 368, apply Kfs to the
midrange torque as well; the book notes the factor is sometimes taken as optional there for
ductile materials).

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, eq. (6-36), p. 301 (σm = (σmax + σmin)/2, σa = |σmax − σmin|/2, as cited on
   p. 346) and eqs. (7-5), (7-6), p. 368.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.design.fatigue.conventions import require_number, require_positive_number


@dataclass(frozen=True)
class FatigueStresses:
    """Mean and alternating shear stress at a detail.

    Parameters
    ----------
    mean_shear
        τm = Kfsm·(τ₁ + τ₂)/2 (Pa), signed (only its magnitude matters to the criteria).
    alternating_shear
        τa = Kfs·|τ₁ − τ₂|/2 (Pa), ≥ 0.
    nominal_extremes
        The two nominal shear stresses τ₁, τ₂ (Pa), signed, in the order given.
    kfs, kfsm
        The fatigue stress-concentration factors applied to the alternating and the mean stress.
    basis
        One sentence with the formula and the numbers.
    """

    mean_shear: float
    alternating_shear: float
    nominal_extremes: tuple[float, float]
    kfs: float
    kfsm: float
    basis: str

    @property
    def peak_shear(self) -> float:
        """|τm| + τa (Pa): the largest shear stress magnitude of the cycle at the detail."""
        return abs(self.mean_shear) + self.alternating_shear


def _concentration_factors(kfs: float, kfsm: float | None) -> tuple[float, float, str]:
    kfs = require_number("kfs", kfs)
    if kfs < 1.0:
        msg = f"a fatigue stress-concentration factor must be at least 1, not {kfs:g}"
        raise InputError("kfs", msg)
    if kfsm is None:
        return kfs, kfs, "Kfsm = Kfs (applied to the mean too: conservative practice)"
    kfsm = require_number("kfsm", kfsm)
    if kfsm < 0.0:
        msg = f"the mean-stress concentration factor must not be negative, not {kfsm:g}"
        raise InputError("kfsm", msg)
    return kfs, kfsm, "Kfsm as stated"


def stresses_from_extremes(
    torque_max: float,
    torque_min: float,
    stress_per_torque: float,
    kfs: float,
    kfsm: float | None = None,
) -> FatigueStresses:
    """Mean and alternating shear stress from the two torque extremes of a cycle.

    Parameters
    ----------
    torque_max, torque_min
        The two extreme torques of the cycle (N·m), signed, e.g. from two load cases or
        combinations; the order does not matter.
    stress_per_torque
        Nominal shear stress per unit torque at the detail (Pa per N·m, i.e. 1/m³), e.g.
        16/(πd³) for a solid round shaft, on the nominal section the factors refer to.
    kfs
        Fatigue stress-concentration factor Kfs ≥ 1 applied to the alternating stress.
    kfsm
        Factor applied to the mean stress; ``None`` (default) applies Kfs to the mean as well,
        the conservative practice for shafts. A smaller value (e.g. from a local-yielding
        argument) must be justified by the caller.

    Returns
    -------
    FatigueStresses
        τm = Kfsm·(τ_max + τ_min)/2 and τa = Kfs·|τ_max − τ_min|/2 with τ = stress_per_torque·T.

    Raises
    ------
    InputError
        Non-finite torques, non-positive stress per torque, Kfs < 1 or Kfsm < 0.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-36) (σm = (σmax + σmin)/2,
       σa = |σmax − σmin|/2) and ch. 7 (shafts: Kfsm = Kfs as the conservative choice; from
       memory).
    """
    first = require_number("torque_max", torque_max)
    second = require_number("torque_min", torque_min)
    require_positive_number("stress_per_torque", stress_per_torque, "1/m³")
    kfs_value, kfsm_value, mean_note = _concentration_factors(kfs, kfsm)
    nominal = (first * stress_per_torque, second * stress_per_torque)
    mean = kfsm_value * (nominal[0] + nominal[1]) / 2.0
    alternating = kfs_value * abs(nominal[0] - nominal[1]) / 2.0
    basis = (
        f"τ = {stress_per_torque:.6g} 1/m³ × T: τ_nom {quote(nominal[0], 'stress')} and "
        f"{quote(nominal[1], 'stress')}; τm = Kfsm(τ₁ + τ₂)/2 = {quote(mean, 'stress')}, "
        f"τa = Kfs|τ₁ − τ₂|/2 = {quote(alternating, 'stress')} with Kfs = {kfs_value:.4g}, "
        f"{mean_note}"
    )
    return FatigueStresses(mean, alternating, nominal, kfs_value, kfsm_value, basis)


def stresses_from_mean_alternating(
    torque_mean: float,
    torque_alternating: float,
    stress_per_torque: float,
    kfs: float,
    kfsm: float | None = None,
) -> FatigueStresses:
    """Mean and alternating shear stress from a mean and an alternating torque.

    Parameters
    ----------
    torque_mean
        Mean torque Tm (N·m), signed.
    torque_alternating
        Alternating torque amplitude Ta ≥ 0 (N·m).
    stress_per_torque
        Nominal shear stress per unit torque at the detail (1/m³).
    kfs, kfsm
        As in :func:`stresses_from_extremes`.

    Returns
    -------
    FatigueStresses
        τm = Kfsm·Tm·s, τa = Kfs·Ta·s (s = stress per torque); the extremes are Tm ± Ta.

    Raises
    ------
    InputError
        Non-finite torques, Ta < 0, non-positive stress per torque, Kfs < 1 or Kfsm < 0.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-36).
    """
    mean_torque = require_number("torque_mean", torque_mean)
    amplitude = require_number("torque_alternating", torque_alternating)
    if amplitude < 0.0:
        msg = (
            f"an alternating torque is an amplitude and must not be negative, not {amplitude:g} N·m"
        )
        raise InputError("torque_alternating", msg)
    return stresses_from_extremes(
        mean_torque + amplitude, mean_torque - amplitude, stress_per_torque, kfs, kfsm
    )
