"""Torsion constants of the case file's sections, computed afresh from published closed forms.

Every constant is written out here again, from the formulas of the references, without the
solver's section classes: the check must not inherit a slip in them. A section is turned into
the two numbers the flexibility integrals need: a constant torsional rigidity c (N·m²) and, for
a tapered layer, the coefficients of g·(D₀ + ΔD·u)⁴, u = (x − x_start)/L the fraction along the
segment.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.3
   (J = πd⁴/32 and π(D⁴ − d⁴)/32), §3.4 (non-uniform bars, φ = ∫T dx/(G·J(x))), §3.11
   (thin-walled tubes: J = 4·A_m²/∮ds/t).
.. [2] S. P. Timoshenko and J. N. Goodier, *Theory of Elasticity*, 3rd ed., McGraw-Hill, 1970,
   ch. 10, torsion of rectangular bars (the series for β) and of thin open sections
   (J = Σ b·t³/3).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import integrate

from workbench.case.declaration import shapes

__all__ = ["LayerRigidity", "layer_rigidity", "rectangle_beta"]

#: Odd terms kept in the rectangle series: the tail Σ_{n > N} n⁻⁵ over odd n is below
#: 1/(8·N⁴) ≈ 5·10⁻¹⁶ for N = 4001, a part in 10¹⁵ of the sum.
_RECTANGLE_TERMS = np.arange(1.0, 4001.0, 2.0)


@dataclass(frozen=True)
class LayerRigidity:
    """The torsional rigidity of one layer along its segment.

    Attributes
    ----------
    constant
        The part that does not vary along the segment (N·m²); for a tapered layer, −G·π·b⁴/32
        of its bore.
    taper
        ``None`` for a prismatic layer; else (g, D₀, ΔD) with g = G·π/32 (Pa), D₀ the diameter
        at the segment's start and ΔD = D₁ − D₀ (m), so that the layer adds g·(D₀ + ΔD·u)⁴.
    """

    constant: float
    taper: tuple[float, float, float] | None = None


def rectangle_beta(long_side: float, short_side: float) -> float:
    """β of a solid rectangle, K = β·a·b³, by the Saint-Venant series summed term by term.

    Parameters
    ----------
    long_side, short_side
        a ≥ b (m); only their ratio matters.

    Returns
    -------
    float
        β (dimensionless): 0.1406 for a square, 1/3 for a thin strip.

    Notes
    -----
    β = (1/3)·[1 − (192/π⁵)·(b/a)·Σ_{n odd} tanh(nπa/2b)/n⁵], summed over the odd n below
    4001 with :func:`math.fsum` (tail below 10⁻¹⁵ of the sum).

    References
    ----------
    .. [1] Timoshenko & Goodier, *Theory of Elasticity*, 3rd ed., ch. 10, torsion of
       rectangular bars.
    """
    ratio = long_side / short_side
    terms = np.tanh(_RECTANGLE_TERMS * math.pi * ratio / 2.0) / _RECTANGLE_TERMS**5
    return (1.0 - 192.0 / math.pi**5 / ratio * math.fsum(terms.tolist())) / 3.0


def _ellipse_perimeter(major: float, minor: float) -> float:
    """Perimeter of an ellipse of semi-axes a ≥ b (m), ∫₀^{2π} √(a²sin²φ + b²cos²φ) dφ.

    By adaptive quadrature of the arc length (four equal quarters), not by the elliptic
    integral the solver uses, so that the two do not share a slip.

    References
    ----------
    .. [1] The arc length of x = a·cos φ, y = b·sin φ (any calculus text).
    """
    quarter, _ = integrate.quad(
        lambda phi: math.hypot(major * math.sin(phi), minor * math.cos(phi)),
        0.0,
        math.pi / 2.0,
        epsabs=0.0,
        epsrel=1e-13,
        limit=200,
    )
    return 4.0 * quarter


def _torsion_constant(section: object) -> float | None:
    """Saint-Venant torsion constant K of a prismatic section in SI (m⁴); ``None`` if tapered.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 and §3.11.
    .. [2] Timoshenko & Goodier, *Theory of Elasticity*, 3rd ed., ch. 10.
    """
    if isinstance(section, shapes.Solid):
        return math.pi * section.diameter**4 / 32.0
    if isinstance(section, shapes.Tube):
        return math.pi * (section.outer_diameter**4 - section.inner_diameter**4) / 32.0
    if isinstance(section, shapes.Rectangle):
        long_side = max(section.width, section.height)
        short_side = min(section.width, section.height)
        return rectangle_beta(long_side, short_side) * long_side * short_side**3
    if isinstance(section, shapes.ThinClosed):
        # Bredt–Batho: K = 4·A_m² / ∮ ds/t.
        compliance = math.fsum(wall.length / wall.thickness for wall in section.walls)
        return 4.0 * section.enclosed_area**2 / compliance
    if isinstance(section, shapes.Box):
        width, height = section.width - section.thickness, section.height - section.thickness
        return 4.0 * (width * height) ** 2 * section.thickness / (2.0 * (width + height))
    if isinstance(section, shapes.EllipticalTube):
        major = (max(section.width, section.height) - section.thickness) / 2.0
        minor = (min(section.width, section.height) - section.thickness) / 2.0
        area = math.pi * major * minor
        return 4.0 * area**2 * section.thickness / _ellipse_perimeter(major, minor)
    if isinstance(section, shapes.ThinOpen):
        return math.fsum(wall.length * wall.thickness**3 for wall in section.walls) / 3.0
    return None


def layer_rigidity(section: object, shear_modulus: float) -> LayerRigidity:
    """The rigidity of one layer (section already in SI metres, G in Pa).

    Parameters
    ----------
    section
        A declared section (:mod:`workbench.case.declaration.shapes`) with every length in m.
    shear_modulus
        G (Pa).

    Returns
    -------
    LayerRigidity
        G·K for a prismatic section; for a tapered one G·π·(D(u)⁴ − b⁴)/32 with
        D(u) = D₀ + (D₁ − D₀)·u.

    Raises
    ------
    ValueError
        On a section of a shape this module does not know.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (tapered bar).
    """
    if isinstance(section, shapes.Tapered):
        bore = section.bore if isinstance(section.bore, float | int) else 0.0
        scale = shear_modulus * math.pi / 32.0
        return LayerRigidity(
            -scale * float(bore) ** 4,
            (scale, section.diameter_start, section.diameter_end - section.diameter_start),
        )
    constant = _torsion_constant(section)
    if constant is None:
        msg = f"no torsion constant for a section of type {type(section).__name__}"
        raise ValueError(msg)
    return LayerRigidity(shear_modulus * constant)
