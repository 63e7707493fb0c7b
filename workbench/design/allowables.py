"""Allowable shear stress of a shaft material and rule-of-thumb limits on the rate of twist.

How the factor of safety applies (the choice this module makes, stated in every result):

* ``"von_mises"`` and ``"tresca"`` turn the tensile yield strength into a shear yield strength
  (Sy/√3 and Sy/2) and divide it by the factor of safety.
* ``"shafting_code"`` returns the allowable of the ASME *Code for Design of Transmission Shafting*,
  min(0.30 Sy, 0.18 Su), × 0.75 where keyways are present. Those percentages are the code's own
  margin, so the factor of safety is **not** applied again (``factor_of_safety_applied`` is 1).
* ``"allowable"`` uses an allowable shear stress the user states; it is taken as already
  including its margin, so the factor of safety is not applied either.

Keyways reduce the allowable only under the code. With the other criteria a keyseat is taken
into account by its stress-concentration factor on the stress
(:func:`workbench.design.concentration.keyseat_kts`), which the basis sentence says. The code's
25 % is its allowance for the keyway, so under the code with ``keyway`` a keyseat's stress is
checked without Kts (:func:`keyseat_factor`): one or the other, never both, and the check row
and the basis sentence say which.

The twist-rate limits are rules of thumb of common practice, not code requirements.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, McGraw-Hill,
   ch. 5 (maximum-shear-stress and distortion-energy theories: Ssy = 0.5 Sy and 0.577 Sy).
.. [2] ASME, *Code for Design of Transmission Shafting* (ASA B17c-1927): allowable shear 30 % of
   the yield strength but not over 18 % of the ultimate strength, reduced by 25 % with keyways.
.. [3] A. S. Hall, A. R. Holowenko and H. G. Laughlin, *Schaum's Outline of Machine Design*,
   McGraw-Hill, chapter on shaft design (angle-of-twist guidance: about 0.08°/ft for machine
   shafts, about 1°/ft for line shafting).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from workbench.case.design import SHEAR_CRITERIA
from workbench.case.errors import InputError, quoted
from workbench.case.materials import Material
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.blockwise import by_blocks
from workbench.design.concentration import ConcentrationFactor, keyseat_kts
from workbench.solver.sections import FloatArray

#: Criteria :func:`allowable_shear_stress` accepts.

#: ASME transmission-shafting code fractions (of Sy, of Su) and the keyway reduction.
SHAFTING_CODE_YIELD_FRACTION = 0.30
SHAFTING_CODE_ULTIMATE_FRACTION = 0.18
SHAFTING_CODE_KEYWAY_FACTOR = 0.75
#: The code's publication, as the check rows name it.
SHAFTING_CODE_SOURCE = "ASME Code for Design of Transmission Shafting (ASA B17c-1927)"
#: What the check rows and the basis sentence say when the code's keyway allowance is applied.
KEYWAY_ALLOWANCE = (
    f"keyway allowance of the shafting code applied (×{SHAFTING_CODE_KEYWAY_FACTOR:g}); "
    "keyseat Kts not applied on top"
)

_FOOT = 0.3048  # m, exact (international foot, 1959)


@dataclass(frozen=True)
class Allowable:
    """An allowable shear stress and how it was obtained.

    Parameters
    ----------
    value
        Allowable shear stress (Pa).
    basis
        One human sentence with the formula and the numbers, for reports.
    criterion
        The criterion used, one of :data:`SHEAR_CRITERIA`.
    factor_of_safety_applied
        The divisor actually applied to the strength (dimensionless): the factor of safety for
        ``"von_mises"`` and ``"tresca"``, 1 for ``"shafting_code"`` and ``"allowable"``.
    """

    value: float
    basis: str
    criterion: str = ""
    factor_of_safety_applied: float = 1.0


def _require_strength(material: Material | None, attribute: str, criterion: str) -> float:
    if material is None:
        msg = f"criterion {quoted(criterion)} needs a material"
        raise InputError(field="material", message=msg)
    value = getattr(material, attribute)
    if value is None:
        label = attribute.replace("_", " ")
        msg = f"material {quoted(material.name)} has no {label}; criterion {quoted(criterion)} needs it"
        raise InputError(attribute, msg)
    return float(value)


def strength_allowables(
    criterion: str,
    factor_of_safety: float,
    yield_strength: ArrayLike,
    ultimate_strength: ArrayLike,
    keyway: bool = False,
) -> FloatArray:
    """The allowable shear stress of a criterion from strengths of any shape (arrays).

    The rule of :func:`allowable_shear_stress` for the criteria that read strengths, without
    its checks (the caller gives a criterion of :data:`SHEAR_CRITERIA` other than
    ``"allowable"``, a factor of safety of at least 1 and finite strengths); a study varies a
    material's strengths over many variants at once through it.

    Parameters
    ----------
    criterion
        ``"von_mises"``, ``"tresca"`` or ``"shafting_code"``.
    factor_of_safety
        Factor of safety n ≥ 1 (dimensionless), applied by the yield criteria only.
    yield_strength, ultimate_strength
        Tensile yield and ultimate strengths Sy, Su (Pa), broadcast together; the ultimate
        strength is read by ``"shafting_code"`` only.
    keyway
        Whether the code's × 0.75 for keyways applies.

    Returns
    -------
    FloatArray
        The allowable shear stress (Pa).

    References
    ----------
    Those of :func:`allowable_shear_stress`: Shigley's ch. 5 for the yield criteria, the ASME
    transmission-shafting code for 0.30 Sy, 0.18 Su and the keyway's × 0.75.
    """
    sy = np.asarray(yield_strength, dtype=float)
    if criterion == "von_mises":
        return sy / math.sqrt(3.0) / factor_of_safety
    if criterion == "tresca":
        return sy / 2.0 / factor_of_safety
    if criterion != "shafting_code":
        msg = f"reads no strength under criterion {quoted(criterion)}"
        raise InputError(field="criterion", message=msg)
    su = np.asarray(ultimate_strength, dtype=float)
    value = np.minimum(SHAFTING_CODE_YIELD_FRACTION * sy, SHAFTING_CODE_ULTIMATE_FRACTION * su)
    return value * SHAFTING_CODE_KEYWAY_FACTOR if keyway else value


def allowable_shear_stress(
    material: Material | None,
    criterion: str,
    factor_of_safety: float,
    keyway: bool = False,
    stated_allowable: float | None = None,
) -> Allowable:
    """Return the allowable shear stress of a shaft by a named criterion.

    Parameters
    ----------
    material
        The shaft material; its ``yield_strength`` (Pa) and, for the code, ``ultimate_strength``
        (Pa) are used. May be ``None`` with ``criterion="allowable"``.
    criterion
        ``"von_mises"`` (Sy/√3), ``"tresca"`` (Sy/2), ``"shafting_code"``
        (min(0.30 Sy, 0.18 Su), × 0.75 with keyways) or ``"allowable"`` (``stated_allowable``).
    factor_of_safety
        Factor of safety n ≥ 1 (dimensionless); divides the shear yield strength of the yield
        criteria, not applied to the code value nor to a stated allowable.
    keyway
        Whether the section has a keyway (reduces the code allowable by 25 %).
    stated_allowable
        Allowable shear stress (Pa) for ``criterion="allowable"``; must be ``None`` otherwise.

    Returns
    -------
    Allowable
        The value (Pa) with its basis sentence.

    Raises
    ------
    InputError
        Unknown criterion, factor of safety below 1, missing strength or stated allowable.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, ch. 5: Ssy = Sy/2 (Tresca),
       Ssy = Sy/√3 (von Mises).
    .. [2] ASME *Code for Design of Transmission Shafting*: 0.30 Sy, not over 0.18 Su, × 0.75
       with keyways.
    """
    if criterion not in SHEAR_CRITERIA:
        msg = f"unknown criterion {quoted(criterion)}; choose one of {', '.join(SHEAR_CRITERIA)}"
        raise InputError(field="criterion", message=msg)
    if (
        not isinstance(factor_of_safety, (int, float))
        or isinstance(factor_of_safety, bool)
        or not math.isfinite(factor_of_safety)
        or factor_of_safety < 1.0
    ):
        msg = f"must be a finite number of at least 1, not {quoted(factor_of_safety)}"
        raise InputError(field="factor_of_safety", message=msg)
    if criterion != "allowable" and stated_allowable is not None:
        msg = f"is used only with criterion 'allowable', not {quoted(criterion)}"
        raise InputError(field="stated_allowable", message=msg)
    fos = float(factor_of_safety)
    keyway_note = (
        "; keyway not reduced here: apply its stress-concentration factor to the stress"
        if keyway
        else ""
    )

    if criterion in ("von_mises", "tresca"):
        yield_strength = _require_strength(material, "yield_strength", criterion)
        value = float(strength_allowables(criterion, fos, yield_strength, math.nan))
        if criterion == "von_mises":
            formula, divisor = "von Mises: Sy/√3/FoS", "√3"
        else:
            formula, divisor = "Tresca: Sy/2/FoS", "2"
        basis = (
            f"{formula} = {quote(yield_strength, 'stress')}/{divisor}/{fos:g} = "
            f"{quote(value, 'stress')}{keyway_note}"
        )
        return Allowable(value, basis, criterion, fos)

    if criterion == "shafting_code":
        yield_strength = _require_strength(material, "yield_strength", criterion)
        ultimate = _require_strength(material, "ultimate_strength", criterion)
        value = float(strength_allowables(criterion, fos, yield_strength, ultimate))
        basis = (
            f"ASME transmission-shafting code: min(0.30 Sy, 0.18 Su) = "
            f"min(0.30 × {quote(yield_strength, 'stress')}, 0.18 × {quote(ultimate, 'stress')})"
            f" = {quote(value, 'stress')}"
        )
        if keyway:
            value = float(strength_allowables(criterion, fos, yield_strength, ultimate, keyway))
            basis += f", × 0.75 for the keyway = {quote(value, 'stress')} ({KEYWAY_ALLOWANCE})"
        basis += (
            f"; the code value carries its own margin, so the factor of safety ({fos:g}) is not "
            "applied"
        )
        return Allowable(value, basis, criterion, 1.0)

    # criterion == "allowable"
    if stated_allowable is None:
        msg = "criterion 'allowable' needs a stated allowable shear stress"
        raise InputError(field="stated_allowable", message=msg)
    require_positive("stated_allowable", stated_allowable, "stress")
    value = float(stated_allowable)
    basis = (
        f"stated allowable shear stress {quote(value, 'stress')}, used as given (taken to "
        f"include its margin; the factor of safety ({fos:g}) is not applied){keyway_note}"
    )
    return Allowable(value, basis, criterion, 1.0)


def keyseat_factor(criterion: str, keyway: bool) -> ConcentrationFactor:
    """The factor on a keyseat's nominal stress under a design's criterion: Kts, or 1.

    Parameters
    ----------
    criterion
        The shear criterion (:data:`SHEAR_CRITERIA`).
    keyway
        Whether the design declares keyways (``design.keyway``).

    Returns
    -------
    ConcentrationFactor
        1 under ``"shafting_code"`` with keyways — the code's × 0.75 on the allowable is its
        allowance for the keyway, and Kts on top would count the keyway twice; the end-milled
        keyseat's Kts (:func:`~workbench.design.concentration.keyseat_kts`) otherwise.

    References
    ----------
    .. [1] ASME *Code for Design of Transmission Shafting*: 0.30 Sy, not over 0.18 Su, reduced
       by 25 % where keyways are present.
    .. [2] Shigley's *Mechanical Engineering Design*, Table 7-1: end-mill keyseat Kts = 3.0.
    """
    if criterion == "shafting_code" and keyway:
        note = f"{KEYWAY_ALLOWANCE}; nominal stress 16T/(πd³)"
        return ConcentrationFactor(1.0, True, note, SHAFTING_CODE_SOURCE)
    return keyseat_kts()


# --- twist-rate limits ---------------------------------------------------------------------------
@dataclass(frozen=True)
class TwistRateLimit:
    """A rule-of-thumb limit on the rate of twist of a shaft.

    Parameters
    ----------
    value
        Largest rate of twist (rad/m).
    label
        Short human label, e.g. ``"0.08°/ft (machine shafts)"``.
    source
        Where the rule comes from; rules of thumb are marked as such.
    """

    value: float
    label: str
    source: str


#: Rate-of-twist limits of common practice, in rad/m.
TWIST_RATE_PRESETS: dict[str, TwistRateLimit] = {
    "machine-shaft": TwistRateLimit(
        math.radians(0.08) / _FOOT,
        "0.08°/ft ≈ 0.26°/m (machine shafts)",
        "rule of thumb (common practice): Hall, Holowenko & Laughlin, Schaum's Outline of "
        "Machine Design",
    ),
    "line-shaft": TwistRateLimit(
        math.radians(1.0) / _FOOT,
        "1°/ft ≈ 3.3°/m (line shafting)",
        "rule of thumb (common practice): Hall, Holowenko & Laughlin, Schaum's Outline of "
        "Machine Design",
    ),
}


#: Where the "1° in 20 diameters" rule comes from.
TWENTY_DIAMETERS_SOURCE = "rule of thumb (common practice, no source)"


def twenty_diameters_twist_rate(diameter: ArrayLike) -> FloatArray:
    """The "1° in 20 diameters" rate-of-twist limits of shafts of diameters d, element by element.

    Parameters
    ----------
    diameter
        Shaft diameters d (m), any shape.

    Returns
    -------
    numpy.ndarray
        (π/180)/(20 d) (rad/m), of the shape of ``diameter``; NaN where d is not finite and
        positive (a segment the rule does not apply to, given as NaN, stays NaN).

    References
    ----------
    .. [1] Common practice, no source.

    Examples
    --------
    >>> twenty_diameters_twist_rate([0.05, 0.1, float("nan")]).round(6).tolist()
    [0.017453, 0.008727, nan]
    """
    return by_blocks(_twenty_diameters_rate, diameter)


def _twenty_diameters_rate(diameter: FloatArray) -> FloatArray:
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = math.radians(1.0) / (20.0 * diameter)
    rate[~(np.isfinite(diameter) & (diameter > 0.0))] = np.nan
    return rate


def twenty_diameters_label(diameter: float) -> str:
    """The label of the "1° in 20 diameters" limit of a shaft of diameter d (m), for reports."""
    return f"1° in 20 diameters (d = {quote(diameter, 'length')})"


def twist_rate_one_degree_in_twenty_diameters(diameter: float) -> TwistRateLimit:
    """Return the "1° in 20 diameters" rate-of-twist limit for one shaft of diameter d.

    The diameter checked, then :func:`twenty_diameters_twist_rate` evaluates it.

    Parameters
    ----------
    diameter
        Shaft diameter d (m).

    Returns
    -------
    TwistRateLimit
        A limit of (π/180)/(20 d) rad/m.

    Raises
    ------
    InputError
        ``diameter`` is not a finite positive number.

    References
    ----------
    .. [1] Common practice, no source.
    """
    require_positive("diameter", diameter)
    return TwistRateLimit(
        float(twenty_diameters_twist_rate(diameter)),
        twenty_diameters_label(diameter),
        TWENTY_DIAMETERS_SOURCE,
    )
