"""The Marin factors ka to kf that correct a rotating-beam endurance limit.

Surface (ka), size (kb), load (kc: 0.59 in torsion), temperature (kd), reliability (ke) and
miscellaneous effects (kf), each returned with the formula, its numbers and its source. Outside
the data behind a fit nothing is extrapolated silently: the factor says ``in_range`` and its
basis says what was done instead.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.
   (2011) and 10th ed. (2015), McGraw-Hill, ch. 6: eq. (6-18) the Marin equation; eq. (6-19)
   and Table 6-2 the surface factor; eq. (6-20) the size factor; eq. (6-26) the load factor;
   eq. (6-27) and Table 6-4 the temperature factor; eq. (6-29) and Table 6-5 the reliability
   factor. Equation and table numbers as in the 9th ed., from memory; the Table 6-2,
   eq. (6-20), eq. (6-27) and Table 6-4 values were read in a reproduction of the book's problem
   text and match memory.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.case.design import SURFACE_FINISHES
from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.fatigue.conventions import (
    INCH,
    MPA,
    SHIGLEY,
    require_number,
    require_positive_number,
)

#: Surface factor ka = a·Sut^b with Sut in MPa: finish -> (a, b) (Shigley Table 6-2).
SURFACE_FACTORS_MPA: dict[str, tuple[float, float]] = {
    "ground": (1.58, -0.085),
    "machined": (4.51, -0.265),
    "cold-drawn": (4.51, -0.265),
    "hot-rolled": (57.7, -0.718),
    "as-forged": (272.0, -0.995),
}

#: The same fits with Sut in kpsi (Shigley Table 6-2); kept to check the MPa column against.
SURFACE_FACTORS_KPSI: dict[str, tuple[float, float]] = {
    "ground": (1.34, -0.085),
    "machined": (2.70, -0.265),
    "cold-drawn": (2.70, -0.265),
    "hot-rolled": (14.4, -0.718),
    "as-forged": (39.9, -0.995),
}


#: Load factor kc by kind of loading (Shigley eq. 6-26).
LOAD_FACTORS: dict[str, float] = {"bending": 1.0, "axial": 0.85, "torsion": 0.59}

#: Reliability (fraction) -> reliability factor ke (Shigley Table 6-5; ke = 1 − 0.08·z_a).
RELIABILITY_FACTORS: dict[float, float] = {  # keys: RELIABILITIES of the case file
    0.5: 1.000,
    0.9: 0.897,
    0.95: 0.868,
    0.99: 0.814,
    0.999: 0.753,
    0.9999: 0.702,
    0.99999: 0.659,
    0.999999: 0.620,
}

#: Temperature-factor polynomial kd(T_F), lowest power first, T_F in °F (Shigley eq. 6-27).
TEMPERATURE_POLYNOMIAL: tuple[float, ...] = (0.975, 0.432e-3, -0.115e-5, 0.104e-8, -0.595e-12)
#: Range of eq. (6-27), °F.
TEMPERATURE_RANGE_F: tuple[float, float] = (70.0, 1000.0)

#: Size-factor fit ranges (m): kb = (d/0.3 in)^-0.107 up to 2 in, 0.91·(d/in)^-0.157 up to 10 in.
SIZE_RANGE: tuple[float, float] = (2.79e-3, 254e-3)
_SIZE_BREAK = 2.0 * INCH


@dataclass(frozen=True)
class MarinFactor:
    """One Marin modifying factor of the endurance limit.

    Parameters
    ----------
    symbol
        The factor's symbol: ``"ka"``, ``"kb"``, ``"kc"``, ``"kd"``, ``"ke"`` or ``"kf"``.
    value
        The factor (dimensionless).
    basis
        One sentence: the formula with its numbers and the source.
    in_range
        ``False`` when the input lay outside the data behind the factor; ``basis`` then says what
        was done instead.
    """

    symbol: str
    value: float
    basis: str
    in_range: bool = True


def surface_factor(ultimate_strength: float, finish: str) -> MarinFactor:
    """Marin surface factor ka of a steel part.

    Parameters
    ----------
    ultimate_strength
        Tensile ultimate strength Sut (Pa).
    finish
        One of :data:`SURFACE_FINISHES`: ``"polished"`` (the specimen's own finish, ka = 1),
        ``"ground"``, ``"machined"``, ``"cold-drawn"``, ``"hot-rolled"``, ``"as-forged"``.

    Returns
    -------
    MarinFactor
        ka = a·Sut^b (Sut in MPa), capped at 1 and flagged where the fit would exceed 1 (low
        strengths: the fit would credit the finish with raising the polished-specimen limit).

    Raises
    ------
    InputError
        Unknown finish, or Sut not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-19) and Table 6-2:
       ground 1.58/−0.085, machined or cold-drawn 4.51/−0.265, hot-rolled 57.7/−0.718,
       as-forged 272/−0.995 (a for Sut in MPa, b).
    .. [2] The cap at 1: common practice, no source.
    """
    require_positive("ultimate_strength", ultimate_strength, "stress")
    key = finish.strip().lower() if isinstance(finish, str) else ""
    if key not in SURFACE_FINISHES:
        msg = (
            f"unknown surface finish {quoted(finish)}; choose one of {', '.join(SURFACE_FINISHES)}"
        )
        raise InputError("finish", msg)
    if key == "polished":
        return MarinFactor(
            "ka", 1.0, "polished: ka = 1, the finish of the rotating-beam specimen behind Se'"
        )
    coefficient, exponent = SURFACE_FACTORS_MPA[key]
    strength_mpa = ultimate_strength / MPA
    value = coefficient * strength_mpa**exponent
    basis = (
        f"{key}: ka = {coefficient:g}·Sut^({exponent:g}) with Sut = {strength_mpa:.4g} MPa = "
        f"{value:.4g} ({SHIGLEY}, eq. 6-19, Table 6-2)"
    )
    if value > 1.0:
        return MarinFactor(
            "ka",
            1.0,
            basis + "; capped at 1 (the fit exceeds 1 at this low strength; common practice)",
            in_range=False,
        )
    return MarinFactor("ka", value, basis)


def size_factor(diameter: float, loading: str = "torsion") -> MarinFactor:
    """Marin size factor kb of a round bar.

    Parameters
    ----------
    diameter
        Diameter d (m) of the round section at the detail (the outer diameter of a tube).
    loading
        ``"torsion"`` or ``"bending"`` (a rotating round bar: the same fit), or ``"axial"``
        (kb = 1, no size effect). In torsion the shear stress is axisymmetric, so the fit applies
        whether or not the shaft rotates.

    Returns
    -------
    MarinFactor
        kb = (d/0.3 in)^−0.107 = 0.879·d^−0.107 (d in inches) for 0.11 ≤ d ≤ 2 in, and
        0.91·d^−0.157 for 2 < d ≤ 10 in; the millimetre forms 1.24·d^−0.107 (2.79–51 mm) and
        1.51·d^−0.157 (51–254 mm) are the same fits rounded. Below 2.79 mm the value at 2.79 mm
        is taken (no data; the fit rises as d falls); above 254 mm the fit is extrapolated
        (lowering kb further); both flagged.

    Raises
    ------
    InputError
        Diameter not a finite positive number, or unknown loading.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-20) (bending and torsion of
       rotating round bars; kb = 1 for axial loading).
    """
    require_positive("diameter", diameter)
    _load_factor_value(loading)
    if loading == "axial":
        return MarinFactor("kb", 1.0, f"axial loading: kb = 1, no size effect ({SHIGLEY})")
    lowest, highest = SIZE_RANGE
    evaluated = diameter
    note = ""
    in_range = True
    if diameter < lowest:
        evaluated = lowest
        in_range = False
        note = (
            f"; d = {quote(diameter, 'length')} is below the fit's 2.79 mm: kb taken at 2.79 mm "
            "(no data for smaller bars)"
        )
    elif diameter > highest:
        in_range = False
        note = (
            f"; d = {quote(diameter, 'length')} is above the fit's 254 mm (10 in): the fit is "
            "extrapolated; confirm the size effect by test or a code for large shafts"
        )
    inches = evaluated / INCH
    if evaluated <= _SIZE_BREAK:
        value = (inches / 0.3) ** -0.107
        formula = f"(d/0.3 in)^−0.107 with d = {inches:.4g} in"
    else:
        value = 0.91 * inches**-0.157
        formula = f"0.91·d^−0.157 with d = {inches:.4g} in"
    basis = f"{loading}, round bar: kb = {formula} = {value:.4g} ({SHIGLEY}, eq. 6-20){note}"
    return MarinFactor("kb", value, basis, in_range)


def _load_factor_value(loading: str) -> float:
    if not isinstance(loading, str) or loading not in LOAD_FACTORS:
        msg = f"unknown loading {quoted(loading)}; choose one of {', '.join(LOAD_FACTORS)}"
        raise InputError("loading", msg)
    return LOAD_FACTORS[loading]


def load_factor(loading: str = "torsion") -> MarinFactor:
    """Marin load factor kc.

    Parameters
    ----------
    loading
        ``"torsion"`` (kc = 0.59), ``"bending"`` (1) or ``"axial"`` (0.85).

    Returns
    -------
    MarinFactor
        kc; with ``"torsion"`` the corrected endurance limit is the shear endurance limit Sse.
        Use kc = 0.59 for torsion alone; combined loads are instead reduced to a von Mises stress
        and compared with the bending limit.

    Raises
    ------
    InputError
        Unknown loading.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-26). (0.59 is close to the
       distortion-energy ratio 1/√3 = 0.577.)
    """
    value = _load_factor_value(loading)
    return MarinFactor("kc", value, f"{loading}: kc = {value:g} ({SHIGLEY}, eq. 6-26)")


def temperature_factor(temperature: float | None = None) -> MarinFactor:
    """Marin temperature factor kd of a steel.

    Parameters
    ----------
    temperature
        Operating temperature (K), or ``None`` for room temperature (kd = 1).

    Returns
    -------
    MarinFactor
        kd = 0.975 + 0.432e-3·T_F − 0.115e-5·T_F² + 0.104e-8·T_F³ − 0.595e-12·T_F⁴ (T_F in °F),
        valid 70 ≤ T_F ≤ 1000 °F (21–538 °C). Below 70 °F, kd = 1 is taken and flagged: at low
        temperature brittle fracture must be investigated first.

    Raises
    ------
    InputError
        Temperature not a finite positive number, or above 1000 °F (538 °C), where creep and the
        loss of strength govern and this estimate does not apply.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-27), a fit to Table 6-4
       (ratio of tensile strength at temperature to that at room temperature).
    """
    if temperature is None:
        return MarinFactor("kd", 1.0, "room temperature: kd = 1")
    require_positive_number("temperature", temperature, "K")
    fahrenheit = (temperature - 273.15) * 9.0 / 5.0 + 32.0
    celsius = temperature - 273.15
    low, high = TEMPERATURE_RANGE_F
    if fahrenheit > high:
        msg = (
            f"{celsius:.4g} °C ({fahrenheit:.4g} °F) is above the 1000 °F (538 °C) of the "
            "temperature-factor fit: creep governs there and this estimate does not apply"
        )
        raise InputError("temperature", msg)
    if fahrenheit < low:
        return MarinFactor(
            "kd",
            1.0,
            f"{celsius:.4g} °C is below the fit's 70 °F (21 °C): kd = 1 taken; at low "
            "temperature investigate brittle fracture first",
            in_range=False,
        )
    value = sum(c * fahrenheit**power for power, c in enumerate(TEMPERATURE_POLYNOMIAL))
    basis = (
        f"{celsius:.4g} °C = {fahrenheit:.4g} °F: kd = 0.975 + 0.432e-3·T_F − 0.115e-5·T_F² + "
        f"0.104e-8·T_F³ − 0.595e-12·T_F⁴ = {value:.4g} ({SHIGLEY}, eq. 6-27)"
    )
    return MarinFactor("kd", float(value), basis)


def reliability_factor(reliability: float = 0.5) -> MarinFactor:
    """Marin reliability factor ke.

    Parameters
    ----------
    reliability
        Reliability as a fraction, one of the tabulated values 0.5, 0.9, 0.95, 0.99, 0.999,
        0.9999, 0.99999, 0.999999 (0.5 means the mean endurance limit).

    Returns
    -------
    MarinFactor
        ke from the table, ke = 1 − 0.08·z_a (endurance limits of steels scattered with a
        standard deviation of 8 % of the mean).

    Raises
    ------
    InputError
        The reliability is not one of the tabulated values.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-29) and Table 6-5.
    """
    value = require_number("reliability", reliability)
    for tabulated, factor in RELIABILITY_FACTORS.items():
        if abs(value - tabulated) <= 1e-12:
            return MarinFactor(
                "ke",
                factor,
                f"reliability {tabulated * 100:g} %: ke = {factor:.3f} ({SHIGLEY}, Table 6-5)",
            )
    choices = ", ".join(f"{r:g}" for r in RELIABILITY_FACTORS)
    msg = f"{quoted(reliability)} is not a tabulated reliability; give a fraction, one of {choices}"
    raise InputError("reliability", msg)


def miscellaneous_factor(value: float = 1.0, reason: str = "") -> MarinFactor:
    """Marin miscellaneous-effects factor kf.

    Parameters
    ----------
    value
        The factor (dimensionless, > 0): 1 unless corrosion, plating, metal spraying, fretting,
        residual stresses or the like are accounted for from data.
    reason
        What the factor stands for, for the record.

    Returns
    -------
    MarinFactor
        kf as given.

    Raises
    ------
    InputError
        Not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., §6-9 (miscellaneous-effects
       factor: no general values; from tests).
    """
    require_positive_number("miscellaneous", value, "")
    if value == 1.0 and not reason:
        return MarinFactor("kf", 1.0, "no miscellaneous effects stated: kf = 1")
    label = reason or "stated"
    return MarinFactor("kf", float(value), f"miscellaneous ({label}): kf = {value:g}")
