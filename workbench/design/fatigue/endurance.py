"""The corrected endurance limit of a steel by the Marin equation, and its shear strengths.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 6: eq. (6-8) Se' of steels, eq. (6-18) the Marin equation (these two numbers
   from memory); eq. (6-54) Ssu = 0.67 Sut (p. 317) and ch. 5, eq. (5-21) Ssy = 0.577 Sy
   (p. 297), both as cited in the book's summary of fatigue equations, p. 347.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.design.fatigue.conventions import MPA, SHIGLEY
from workbench.design.fatigue.marin import (
    MarinFactor,
    load_factor,
    miscellaneous_factor,
    reliability_factor,
    size_factor,
    surface_factor,
    temperature_factor,
)

#: Steels: Se' = 0.5·Sut up to this Sut, and this cap above it (Shigley eq. 6-8, SI form).
ROTATING_BEAM_KNEE = 1400.0 * MPA
ROTATING_BEAM_CAP = 700.0 * MPA

#: Torsional ultimate strength over tensile ultimate strength, Ssu/Sut (Shigley eq. 6-54).
ULTIMATE_SHEAR_RATIO = 0.67


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
            base_basis = f"Se' = 0.5·Sut for a steel, {SHIGLEY}, eq. 6-8"
        else:
            base_basis = f"Se' = 700 MPa for a steel with Sut above 1400 MPa, {SHIGLEY}, eq. 6-8"
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
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., eq. (6-54), p. 317, as cited on
       p. 347 ("replace Sut with Ssu = 0.67Sut").
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
