"""Non-circular prismatic sections: the solid rectangle, and the registry of every such shape.

Each shape is a frozen dataclass in SI metres subclassing
:class:`~workbench.solver.sections.Section`. It answers the same two questions as the circular
sections: the Saint-Venant torsion constant K (m⁴, so that the twist rate is T/(G·K)) and the
largest shear stress per unit torque (1/m³).

The solid rectangle uses the exact Saint-Venant series. The thin-walled shapes
(:mod:`workbench.solver.thin_walls`) use the classical thin-wall theories — Bredt–Batho for
closed cells, the sum of thin strips for open sections — and refuse walls too thick for those
theories to hold. :data:`NONCIRCULAR_SHAPES` names them all by their case-file shape.

References
----------
.. [1] S. P. Timoshenko and J. N. Goodier, *Theory of Elasticity*, 3rd ed., McGraw-Hill, 1970,
   ch. 10, torsion of bars of rectangular cross section (the series for β and k).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from workbench.case.errors import InputError, quoted
from workbench.case.validate import require_positive
from workbench.solver.sections import Section
from workbench.solver.thin_walls import Box, EllipticalTube, ThinWalledClosed, ThinWalledOpen

#: Relative size below which a term of the rectangle series no longer changes the sum in double
#: precision.
_SERIES_TOLERANCE = 1e-16


@functools.lru_cache(maxsize=4096)
def rectangle_coefficients(aspect_ratio: float) -> tuple[float, float]:
    """Saint-Venant coefficients α and β of a solid rectangle.

    For a rectangle with long side a and short side b, K = β·a·b³ and τ_max = T/(α·a·b²); τ_max
    acts at the middle of the long sides.

    Parameters
    ----------
    aspect_ratio
        a/b, long side over short side (dimensionless), at least 1; ``math.inf`` gives the limit
        of a thin strip, α = β = 1/3.

    Returns
    -------
    tuple of float
        ``(alpha, beta)``, dimensionless.

    Raises
    ------
    InputError
        If ``aspect_ratio`` is not a number of at least 1.

    Notes
    -----
    With r = a/b and n running over the odd integers,

    β = (1/3)·[1 − (192/π⁵)·(1/r)·Σ tanh(nπr/2)/n⁵],
    k = 1 − (8/π²)·Σ 1/(n²·cosh(nπr/2)),  α = β/k.

    The tanh sum is split as Σ 1/n⁵ − Σ (1 − tanh(nπr/2))/n⁵ with Σ_{n odd} 1/n⁵ = (1 − 2⁻⁵)·ζ(5)
    exactly, so that both remaining sums fall off like e^(−nπr/2); they are summed until a term is
    below 10⁻¹⁶ of the first. 1 − tanh x and 1/cosh x are evaluated through e^(−x), which cannot
    overflow.

    References
    ----------
    .. [1] Timoshenko & Goodier, *Theory of Elasticity*, 3rd ed., ch. 10, torsion of rectangular
       bars (series for the torque and the largest stress, and the table of α and β).
    .. [2] Σ_{n odd} n⁻ˢ = (1 − 2⁻ˢ)·ζ(s): split the zeta series into odd and even terms (any
       text on the Riemann zeta function; derivable).
    """
    if not isinstance(aspect_ratio, (int, float)) or isinstance(aspect_ratio, bool):
        msg = f"must be a number, not {quoted(aspect_ratio)}"
        field_name = "aspect_ratio"
        raise InputError(field_name, msg)
    if math.isnan(aspect_ratio) or aspect_ratio < 1.0:
        msg = f"must be the long side over the short side, at least 1 (not {aspect_ratio})"
        field_name = "aspect_ratio"
        raise InputError(field_name, msg)
    from scipy.special import zeta  # noqa: PLC0415 - slow to import; few cases need it

    ratio = float(aspect_ratio)
    # Terms shrink like e^(−nπr/2): stop where the last is below the tolerance relative to n = 1.
    last = 1.0 + 2.0 * math.log(1.0 / _SERIES_TOLERANCE) / (math.pi * ratio)
    odd = np.arange(1.0, last + 2.0, 2.0)
    decay = np.exp(-odd * math.pi * ratio / 2.0)  # e^(−x), x = nπr/2
    one_minus_tanh = 2.0 * decay**2 / (1.0 + decay**2)
    sech = 2.0 * decay / (1.0 + decay**2)
    odd_zeta_5 = (1.0 - 2.0**-5) * float(zeta(5.0))
    tanh_sum = odd_zeta_5 - float(np.sum(one_minus_tanh / odd**5))
    beta = (1.0 - 192.0 / math.pi**5 / ratio * tanh_sum) / 3.0
    stress_factor = 1.0 - 8.0 / math.pi**2 * float(np.sum(sech / odd**2))
    return beta / stress_factor, beta


@dataclass(frozen=True)
class Rectangle(Section):
    """Solid rectangular section.

    Parameters
    ----------
    width
        Overall width (m).
    height
        Overall height, the depth of the section (m). Either side may be the longer.

    Notes
    -----
    With a the longer and b the shorter side, K = β·a·b³ and τ_max = T/(α·a·b²) at the middle of
    the long sides, α and β from :func:`rectangle_coefficients` (the exact series, not a fit).

    References
    ----------
    .. [1] Timoshenko & Goodier, *Theory of Elasticity*, 3rd ed., ch. 10, torsion of rectangular
       bars.
    """

    width: float
    height: float
    shape: ClassVar[str] = "rectangle"

    def __post_init__(self) -> None:
        require_positive("width", self.width)
        require_positive("height", self.height)
        self._require_constants()

    @property
    def _long_short(self) -> tuple[float, float]:
        return max(self.width, self.height), min(self.width, self.height)

    @property
    def torsion_constant(self) -> float:
        """Torsion constant K = β·a·b³ (m⁴)."""
        long_side, short_side = self._long_short
        _, beta = rectangle_coefficients(long_side / short_side)
        return beta * long_side * short_side**3

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest shear stress per unit torque, 1/(α·a·b²) (1/m³)."""
        long_side, short_side = self._long_short
        alpha, _ = rectangle_coefficients(long_side / short_side)
        return 1.0 / (alpha * long_side * short_side**2)

    @property
    def outer_radius(self) -> float:
        """Half the height (m)."""
        return self.height / 2.0

    @property
    def polar_moment(self) -> float:
        """Polar moment of area about the centroid, J = w·h·(w² + h²)/12 (m⁴), exact.

        References
        ----------
        .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., App. E, rectangle
           (I_P = bh(b² + h²)/12; appendix placement from memory).
        """
        return self.width * self.height * (self.width**2 + self.height**2) / 12.0


#: Non-circular shapes by their case-file name.
NONCIRCULAR_SHAPES: dict[str, type[Section]] = {
    cls.shape: cls for cls in (Rectangle, ThinWalledClosed, Box, EllipticalTube, ThinWalledOpen)
}


__all__ = ["NONCIRCULAR_SHAPES", "Rectangle", "rectangle_coefficients"]
