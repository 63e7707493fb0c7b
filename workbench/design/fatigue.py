"""Fatigue of members under fluctuating torque: Marin factors, Kfs, and fatigue factors of safety.

The chain, all in SI floats (Pa, m, K) and all pure functions:

1. :func:`endurance_limit` — the rotating-beam endurance limit Se' of a steel (or one found by
   test), corrected by the Marin factors ka (surface), kb (size), kc (load: 0.59 in torsion),
   kd (temperature), ke (reliability) and kf (miscellaneous). With ``loading="torsion"`` the
   result is the shear endurance limit Sse. Each factor comes back with its basis.
2. :func:`notch_sensitivity_torsion` and :func:`fatigue_concentration` — the notch sensitivity
   q in torsion from the Neuber relation q = 1/(1 + √a/√r) with Shigley's fit for √a, and the
   fatigue stress-concentration factor Kfs = 1 + q(Kts − 1).
3. :func:`stresses_from_extremes` (two load cases or combinations as the torque extremes) or
   :func:`stresses_from_mean_alternating` — the mean and alternating shear stress at the detail.
4. :func:`fatigue_factors` — the fatigue factor of safety by modified Goodman, Gerber,
   ASME-elliptic and Soderberg, and the first-cycle (Langer) yield factor.

Choices this module makes, stated again where they apply:

* Kfs multiplies the mean stress as well as the alternating one unless another mean-stress factor
  Kfsm is given (Shigley's conservative practice for shafts; from memory).
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
   ch. 7 (shaft design, Kfs applied to the mean stress). Equation and table numbers as in the
   9th ed., from memory; the Table 6-2, eq. (6-20), eq. (6-27) and Table 6-4 values were read in
   a reproduction of the book's problem text and match memory.
.. [2] H. Neuber, *Kerbspannungslehre*, Springer, 1937/1958; P. Kuhn and H. F. Hardrath, "An
   engineering method for estimating notch-size effect in fatigue tests on steel", NACA TN 2805,
   1952 (the relation q = 1/(1 + √a/√r) and the data for √a of steels).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.case.design import FATIGUE_CRITERIA, SURFACE_FINISHES
from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.concentration import ConcentrationFactor
from workbench.solver.sections import FloatArray

_MPA = 1e6
#: One kpsi in pascals (1000 lbf/in², with the international inch and pound, exact to rounding).
_KPSI = 6.894757293168361e6
_INCH = 0.0254  # m, exact (international inch, 1959)

# --- Marin factors -------------------------------------------------------------------------------
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
_SIZE_BREAK = 2.0 * _INCH

#: Steels: Se' = 0.5·Sut up to this Sut, and this cap above it (Shigley eq. 6-8, SI form).
ROTATING_BEAM_KNEE = 1400.0 * _MPA
ROTATING_BEAM_CAP = 700.0 * _MPA

#: Torsional ultimate strength over tensile ultimate strength, Ssu/Sut (Shigley eq. 6-54).
ULTIMATE_SHEAR_RATIO = 0.67

# --- notch sensitivity ---------------------------------------------------------------------------
#: Shigley's fit for the Neuber constant in torsion, √a (√in) in Sut (kpsi), lowest power first.
NEUBER_TORSION_POLYNOMIAL: tuple[float, ...] = (0.190, -2.51e-3, 1.35e-5, -2.67e-8)
#: Sut range (Pa) of that fit: 50 to 250 kpsi.
NEUBER_STRENGTH_RANGE: tuple[float, float] = (50.0 * _KPSI, 250.0 * _KPSI)
#: Largest notch radius the notch-sensitivity charts show, 0.16 in ≈ 4 mm (from memory).
CHART_NOTCH_RADIUS = 0.16 * _INCH

_SHIGLEY = "Shigley's Mechanical Engineering Design, 9th/10th ed."


def _require_number(name: str, value: float) -> float:
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        msg = f"must be a number, not {value!r}"
        raise InputError(name, msg)
    if not math.isfinite(value):
        msg = f"must be a finite number, not {value}"
        raise InputError(name, msg)
    return float(value)


def _require_positive_plain(name: str, value: float, unit: str) -> float:
    # For quantities the case-file unit systems do not carry (K, 1/m³, dimensionless).
    number = _require_number(name, value)
    if number <= 0.0:
        msg = f"must be greater than zero ({number:g}{' ' + unit if unit else ''})"
        raise InputError(name, msg)
    return number


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
        msg = f"unknown surface finish {finish!r}; choose one of {', '.join(SURFACE_FINISHES)}"
        raise InputError("finish", msg)
    if key == "polished":
        return MarinFactor(
            "ka", 1.0, "polished: ka = 1, the finish of the rotating-beam specimen behind Se'"
        )
    coefficient, exponent = SURFACE_FACTORS_MPA[key]
    strength_mpa = ultimate_strength / _MPA
    value = coefficient * strength_mpa**exponent
    basis = (
        f"{key}: ka = {coefficient:g}·Sut^({exponent:g}) with Sut = {strength_mpa:.4g} MPa = "
        f"{value:.4g} ({_SHIGLEY}, eq. 6-19, Table 6-2)"
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
        return MarinFactor("kb", 1.0, f"axial loading: kb = 1, no size effect ({_SHIGLEY})")
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
    inches = evaluated / _INCH
    if evaluated <= _SIZE_BREAK:
        value = (inches / 0.3) ** -0.107
        formula = f"(d/0.3 in)^−0.107 with d = {inches:.4g} in"
    else:
        value = 0.91 * inches**-0.157
        formula = f"0.91·d^−0.157 with d = {inches:.4g} in"
    basis = f"{loading}, round bar: kb = {formula} = {value:.4g} ({_SHIGLEY}, eq. 6-20){note}"
    return MarinFactor("kb", value, basis, in_range)


def _load_factor_value(loading: str) -> float:
    if not isinstance(loading, str) or loading not in LOAD_FACTORS:
        msg = f"unknown loading {loading!r}; choose one of {', '.join(LOAD_FACTORS)}"
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
    return MarinFactor("kc", value, f"{loading}: kc = {value:g} ({_SHIGLEY}, eq. 6-26)")


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
    _require_positive_plain("temperature", temperature, "K")
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
        f"0.104e-8·T_F³ − 0.595e-12·T_F⁴ = {value:.4g} ({_SHIGLEY}, eq. 6-27)"
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
    value = _require_number("reliability", reliability)
    for tabulated, factor in RELIABILITY_FACTORS.items():
        if abs(value - tabulated) <= 1e-12:
            return MarinFactor(
                "ke",
                factor,
                f"reliability {tabulated * 100:g} %: ke = {factor:.3f} ({_SHIGLEY}, Table 6-5)",
            )
    choices = ", ".join(f"{r:g}" for r in RELIABILITY_FACTORS)
    msg = f"{reliability!r} is not a tabulated reliability; give a fraction, one of {choices}"
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
    _require_positive_plain("miscellaneous", value, "")
    if value == 1.0 and not reason:
        return MarinFactor("kf", 1.0, "no miscellaneous effects stated: kf = 1")
    label = reason or "stated"
    return MarinFactor("kf", float(value), f"miscellaneous ({label}): kf = {value:g}")


def rotating_beam_endurance_limit(ultimate_strength: float) -> float:
    """Rotating-beam endurance limit Se' of a steel, estimated from its ultimate strength.

    Parameters
    ----------
    ultimate_strength
        Tensile ultimate strength Sut (Pa) of a steel.

    Returns
    -------
    float
        Se' = 0.5·Sut for Sut ≤ 1400 MPa, else 700 MPa (Pa).

    Raises
    ------
    InputError
        Sut not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-8) (steels only; other
       metals need tested values).
    """
    require_positive("ultimate_strength", ultimate_strength, "stress")
    if ultimate_strength <= ROTATING_BEAM_KNEE:
        return 0.5 * ultimate_strength
    return ROTATING_BEAM_CAP


@dataclass(frozen=True)
class EnduranceLimit:
    """A corrected endurance limit with its Marin factors.

    Parameters
    ----------
    value
        Se = ka·kb·kc·kd·ke·kf·Se' (Pa); with ``loading="torsion"`` the shear endurance limit Sse.
    rotating_beam_limit
        Se' (Pa), estimated or tested.
    rotating_beam_basis
        Where Se' comes from.
    loading
        ``"torsion"``, ``"bending"`` or ``"axial"``.
    surface, size, load, temperature, reliability, miscellaneous
        The factors ka, kb, kc, kd, ke, kf with their bases.
    """

    value: float
    rotating_beam_limit: float
    rotating_beam_basis: str
    loading: str
    surface: MarinFactor
    size: MarinFactor
    load: MarinFactor
    temperature: MarinFactor
    reliability: MarinFactor
    miscellaneous: MarinFactor

    @property
    def factors(self) -> tuple[MarinFactor, ...]:
        """The six Marin factors, ka to kf."""
        return (
            self.surface,
            self.size,
            self.load,
            self.temperature,
            self.reliability,
            self.miscellaneous,
        )

    @property
    def in_range(self) -> bool:
        """``True`` when every factor lay inside its data."""
        return all(factor.in_range for factor in self.factors)

    @property
    def basis(self) -> str:
        """One sentence: Se = product of the factors × Se', with the numbers."""
        product = "·".join(f"{f.symbol} {f.value:.4g}" for f in self.factors)
        symbol = "Sse" if self.loading == "torsion" else "Se"
        return (
            f"{symbol} = {product} × Se' {quote(self.rotating_beam_limit, 'stress')} = "
            f"{quote(self.value, 'stress')} ({self.rotating_beam_basis})"
        )


def endurance_limit(
    ultimate_strength: float,
    diameter: float,
    finish: str,
    loading: str = "torsion",
    reliability: float = 0.5,
    temperature: float | None = None,
    miscellaneous: float = 1.0,
    rotating_beam_limit: float | None = None,
) -> EnduranceLimit:
    """Corrected endurance limit of a round steel member by the Marin equation.

    Parameters
    ----------
    ultimate_strength
        Tensile ultimate strength Sut (Pa) at room temperature.
    diameter
        Diameter d (m) at the detail.
    finish
        Surface finish, one of :data:`SURFACE_FINISHES`.
    loading
        ``"torsion"`` (default; the result is Sse), ``"bending"`` or ``"axial"``.
    reliability
        Reliability, one of the fractions of :data:`RELIABILITY_FACTORS` (default 0.5: mean).
    temperature
        Operating temperature (K), or ``None`` for room temperature.
    miscellaneous
        Miscellaneous-effects factor kf (dimensionless), 1 unless known from data.
    rotating_beam_limit
        Rotating-beam endurance limit Se' (Pa) from tests of the material; when ``None`` it is
        estimated from Sut for a steel (:func:`rotating_beam_endurance_limit`).

    Returns
    -------
    EnduranceLimit
        Se = ka·kb·kc·kd·ke·kf·Se' (Pa), with each factor and its basis.

    Raises
    ------
    InputError
        Any input out of its domain (the field named is the parameter's).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-18) (the Marin equation,
       after J. Marin, *Mechanical Behavior of Engineering Materials*, Prentice-Hall, 1962) and
       the references of each factor's function.
    """
    require_positive("ultimate_strength", ultimate_strength, "stress")
    if rotating_beam_limit is None:
        base = rotating_beam_endurance_limit(ultimate_strength)
        if ultimate_strength <= ROTATING_BEAM_KNEE:
            base_basis = f"Se' = 0.5·Sut for a steel, {_SHIGLEY}, eq. 6-8"
        else:
            base_basis = f"Se' = 700 MPa for a steel with Sut above 1400 MPa, {_SHIGLEY}, eq. 6-8"
    else:
        require_positive("rotating_beam_limit", rotating_beam_limit, "stress")
        if rotating_beam_limit >= ultimate_strength:
            msg = (
                f"{quote(rotating_beam_limit, 'stress')} is not below the ultimate strength "
                f"{quote(ultimate_strength, 'stress')}"
            )
            raise InputError("rotating_beam_limit", msg)
        base = float(rotating_beam_limit)
        base_basis = "Se' as stated (from tests)"
    factors = (
        surface_factor(ultimate_strength, finish),
        size_factor(diameter, loading),
        load_factor(loading),
        temperature_factor(temperature),
        reliability_factor(reliability),
        miscellaneous_factor(miscellaneous),
    )
    value = base * math.prod(factor.value for factor in factors)
    return EnduranceLimit(value, base, base_basis, loading, *factors)


def ultimate_shear_strength(ultimate_strength: float) -> float:
    """Torsional ultimate strength of a steel estimated from its tensile ultimate strength.

    Parameters
    ----------
    ultimate_strength
        Tensile ultimate strength Sut (Pa).

    Returns
    -------
    float
        Ssu = 0.67·Sut (Pa).

    Raises
    ------
    InputError
        Sut not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-54) (from memory).
    """
    require_positive("ultimate_strength", ultimate_strength, "stress")
    return ULTIMATE_SHEAR_RATIO * ultimate_strength


def yield_shear_strength(yield_strength: float) -> float:
    """Torsional yield strength by the distortion-energy (von Mises) theory.

    Parameters
    ----------
    yield_strength
        Tensile yield strength Sy (Pa).

    Returns
    -------
    float
        Ssy = Sy/√3 ≈ 0.577·Sy (Pa).

    Raises
    ------
    InputError
        Sy not a finite positive number.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (5-21).
    """
    require_positive("yield_strength", yield_strength, "stress")
    return yield_strength / math.sqrt(3.0)


# --- notch sensitivity and Kfs -------------------------------------------------------------------
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
    f"Neuber relation q = 1/(1 + √a/√r) with Shigley's fit for √a in torsion ({_SHIGLEY}, "
    "eqs. 6-33 to 6-35b; coefficients from memory, matching a published quotation)"
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
       equation) and (6-35b) (√a in torsion), Fig. 6-21 (notch sensitivity in reversed torsion). The
       coefficients are from memory; they agree with a published quotation of the fit
       (k78ma.github.io notes on notch sensitivity), and the older rule "use the bending fit at
       Sut + 20 kpsi" gives the same q within 1 % (see the tests).
    .. [2] Kuhn and Hardrath, NACA TN 2805, 1952.
    """
    if notch_radius == 0.0:
        msg = "must be greater than zero: a sharp notch has no finite fatigue factor"
        raise InputError("notch_radius", msg)
    require_positive("notch_radius", notch_radius)
    require_positive("ultimate_strength", ultimate_strength, "stress")
    strength_kpsi = ultimate_strength / _KPSI
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
    radius_inch = notch_radius / _INCH
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
        value, sqrt_a_inch * math.sqrt(_INCH), in_range, "; ".join(notes), _NEUBER_SOURCE
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
    kts_value = _require_number("kts", kts_value)
    q_value = _require_number("q", q_value)
    if kts_value < 1.0:
        msg = f"a stress-concentration factor must be at least 1, not {kts_value:g}"
        raise InputError("kts", msg)
    if not 0.0 <= q_value <= 1.0:
        msg = f"the notch sensitivity must lie in [0, 1], not {q_value:g}"
        raise InputError("q", msg)
    value = 1.0 + q_value * (kts_value - 1.0)
    in_range = True
    sources = [f"Kfs = 1 + q(Kts − 1), {_SHIGLEY}, eq. 6-32"]
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


# --- mean and alternating stress -----------------------------------------------------------------
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
    kfs = _require_number("kfs", kfs)
    if kfs < 1.0:
        msg = f"a fatigue stress-concentration factor must be at least 1, not {kfs:g}"
        raise InputError("kfs", msg)
    if kfsm is None:
        return kfs, kfs, "Kfsm = Kfs (applied to the mean too: conservative practice)"
    kfsm = _require_number("kfsm", kfsm)
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
    first = _require_number("torque_max", torque_max)
    second = _require_number("torque_min", torque_min)
    _require_positive_plain("stress_per_torque", stress_per_torque, "1/m³")
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
    mean_torque = _require_number("torque_mean", torque_mean)
    amplitude = _require_number("torque_alternating", torque_alternating)
    if amplitude < 0.0:
        msg = (
            f"an alternating torque is an amplitude and must not be negative, not {amplitude:g} N·m"
        )
        raise InputError("torque_alternating", msg)
    return stresses_from_extremes(
        mean_torque + amplitude, mean_torque - amplitude, stress_per_torque, kfs, kfsm
    )


# --- factors of safety ---------------------------------------------------------------------------
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
                f"unknown fatigue criterion {criterion!r}; choose one of "
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
        ``first_cycle_yield`` (``inf`` where the stresses they depend on are zero).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., §6-12 and §6-14 (as in
       :func:`fatigue_factors`).
    """
    magnitude = np.abs(mean_shear)
    amplitude_ratio = np.asarray(alternating_shear, dtype=float) / endurance_shear
    ultimate_ratio = magnitude / ultimate_shear
    yield_ratio = magnitude / yield_shear
    with np.errstate(divide="ignore"):
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
    mean = _require_number("mean_shear", mean_shear)
    alternating = _require_number("alternating_shear", alternating_shear)
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
