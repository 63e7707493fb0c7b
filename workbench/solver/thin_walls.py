"""Thin-walled sections: closed cells (Bredt–Batho) and open sections (sum of thin strips).

Each shape is a frozen dataclass in SI metres subclassing
:class:`~workbench.solver.sections.Section`, as every section of
:mod:`workbench.solver.noncircular` (which registers them by their case-file names). The
thin-wall theories hold only for thin walls: walls too thick for them are refused (see
:data:`THIN_WALL_LIMIT`).

References
----------
.. [1] W. C. Young and R. G. Budynas, *Roark's Formulas for Stress and Strain*, 7th ed.,
   McGraw-Hill, 2002, ch. 10 and Table 10.1 (thin tubes, thin open sections; table placement
   from memory).
.. [2] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.11,
   thin-walled tubes: shear flow q = T/(2·A_m), τ = q/t, K = 4·A_m²/∮ds/t (Bredt–Batho).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive
from workbench.solver.sections import Section

#: Largest thin-wall parameter λ = t_max·P/(2·A_m) a closed cell may have (P the centre-line
#: perimeter, A_m the enclosed area, so 2·A_m/P is the cell's "hydraulic radius" and equals the
#: mean radius r of a circular tube). λ ≤ 0.1 is the usual "t ≤ r/10" thin-wall rule (common
#: practice, no source) carried over to any cell. Bredt–Batho gives the wall-mean shear stress; the
#: surface stress at mid-wall exceeds it by about λ/2 in a circular tube and about λ in a
#: flat-walled box (checked against sectionproperties in tests/validation/test_noncircular.py), so
#: the limit keeps that unconservative error near 10 % or less. For open sections the same limit
#: bounds the free-end deficit of the walls, see :class:`ThinWalledOpen`.
THIN_WALL_LIMIT = 0.1

#: Coefficient of the free-end deficit of a thin strip, K ≈ b·t³/3 − 0.21·t⁴ (Roark's fit for the
#: rectangle, [2] Table 10.1 case 4, taken at a long strip).
_STRIP_END_DEFICIT = 0.21

#: Relative excess over the isoperimetric bound P²/(4π) accepted for the enclosed area of a closed
#: cell: a circular cell entered to four significant figures may overshoot the bound by a few
#: parts in 10⁴; anything more is not a closed curve of that perimeter.
_ISOPERIMETRIC_SLACK = 1e-3


def _require_thin(
    field_name: str, thickness: float, enclosed_area: float, perimeter: float
) -> None:
    """Raise :class:`InputError` when a closed cell's wall is too thick for Bredt–Batho."""
    hydraulic_radius = 2.0 * enclosed_area / perimeter
    if thickness > THIN_WALL_LIMIT * hydraulic_radius:
        msg = (
            f"is too thick for thin-walled (Bredt–Batho) theory: {quote(thickness, 'length')} "
            f"exceeds {THIN_WALL_LIMIT:g} × 2·A/P = "
            f"{quote(THIN_WALL_LIMIT * hydraulic_radius, 'length')} for this cell"
        )
        raise InputError(field_name, msg)


def _require_walls(field_name: str, walls: object) -> tuple[Wall, ...]:
    """Return ``walls`` as a tuple of :class:`Wall`, or raise :class:`InputError`."""
    if not isinstance(walls, (tuple, list)):
        msg = f"must be a list of walls, not {quoted(walls)}"
        raise InputError(field_name, msg)
    for index, wall in enumerate(walls):
        if not isinstance(wall, Wall):
            msg = f"must be a wall with a length and a thickness, not {quoted(wall)}"
            entry = f"{field_name}[{index}]"
            raise InputError(entry, msg)
    if not walls:
        msg = "needs at least one wall"
        raise InputError(field_name, msg)
    return tuple(walls)


@dataclass(frozen=True)
class Wall:
    """One straight or curved panel of a thin-walled section, measured on its centre line.

    Parameters
    ----------
    length
        Length of the panel along the wall's centre line (m).
    thickness
        Wall thickness, uniform over the panel (m).
    """

    length: float
    thickness: float

    def __post_init__(self) -> None:
        require_positive("length", self.length)
        require_positive("thickness", self.thickness)


@dataclass(frozen=True)
class ThinWalledClosed(Section):
    """Single-cell thin-walled closed section described by its wall panels (Bredt–Batho).

    Parameters
    ----------
    enclosed_area
        A_m, the area enclosed by the centre line of the wall (m²).
    walls
        The wall panels round the centre line, each with its length (m) and thickness (m); their
        lengths add up to the centre-line perimeter P.

    Notes
    -----
    K = 4·A_m²/Σ(lᵢ/tᵢ), τ_max = T/(2·A_m·t_min). This is the wall-mean stress of thin-walled
    theory: the wall must be thin, t_max ≤ :data:`THIN_WALL_LIMIT` × 2·A_m/P, and the centre line
    must be able to enclose A_m (isoperimetric inequality A_m ≤ P²/(4π), with 0.1 % allowed for
    rounding of the entered values). Stress concentrations at
    sharp re-entrant corners are not included.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.11, thin-walled tubes
       (Bredt–Batho).
    .. [2] Young & Budynas, *Roark's Formulas for Stress and Strain*, 7th ed., Table 10.1, thin
       tubes (from memory for the case number).
    .. [3] Isoperimetric inequality 4πA ≤ P² (any text on plane geometry).
    """

    enclosed_area: float
    walls: tuple[Wall, ...]
    shape: ClassVar[str] = "thin_closed"

    def __post_init__(self) -> None:
        require_positive("enclosed_area", self.enclosed_area, "area")
        object.__setattr__(self, "walls", _require_walls("walls", self.walls))
        with self._formulas():
            self._require_closed_cell()
        self._require_constants()

    def _require_closed_cell(self) -> None:
        """The centre line can enclose the area, and the walls are thin."""
        perimeter = self.perimeter
        largest_area = perimeter**2 / (4.0 * math.pi)
        if self.enclosed_area > largest_area * (1.0 + _ISOPERIMETRIC_SLACK):
            msg = (
                f"is larger than any wall perimeter of {quote(perimeter, 'length')} can enclose "
                f"({quote(self.enclosed_area, 'area')} > P²/(4π) = {quote(largest_area, 'area')})"
            )
            field_name = "enclosed_area"
            raise InputError(field_name, msg)
        thickest = max(range(len(self.walls)), key=lambda index: self.walls[index].thickness)
        _require_thin(
            f"walls[{thickest}].thickness",
            self.walls[thickest].thickness,
            self.enclosed_area,
            perimeter,
        )

    @property
    def perimeter(self) -> float:
        """Centre-line perimeter P = Σ lᵢ (m)."""
        return math.fsum(wall.length for wall in self.walls)

    @property
    def torsion_constant(self) -> float:
        """Torsion constant K = 4·A_m²/Σ(lᵢ/tᵢ) (m⁴)."""
        compliance = math.fsum(wall.length / wall.thickness for wall in self.walls)
        return 4.0 * self.enclosed_area**2 / compliance

    @property
    def shear_stress_per_torque(self) -> float:
        """Wall-mean shear stress per unit torque in the thinnest wall, 1/(2·A_m·t_min) (1/m³)."""
        thinnest = min(wall.thickness for wall in self.walls)
        return 1.0 / (2.0 * self.enclosed_area * thinnest)

    @property
    def outer_radius(self) -> float:
        """Drawing size (m): radius of the circle of area A_m plus half the thickest wall."""
        thickest = max(wall.thickness for wall in self.walls)
        return math.sqrt(self.enclosed_area / math.pi) + thickest / 2.0

    @property
    def inner_radius(self) -> float:
        """Drawing size (m): radius of the circle of area A_m less half the thickest wall."""
        thickest = max(wall.thickness for wall in self.walls)
        return math.sqrt(self.enclosed_area / math.pi) - thickest / 2.0

    @property
    def polar_moment(self) -> float:
        """Polar moment of area, approximately (Σ lᵢ·tᵢ)·P²/48 (m⁴).

        The walls' layout is not known, so the mean square distance of the wall from the axis is
        taken as P²/48, its value on the centre line of any rectangle (derived by hand:
        ∮r² ds = a³(1 + ρ)³/6 for sides a and ρ·a, P = 2a(1 + ρ)). It is 18 % low for a
        circular cell (use ``tube`` there) and ignores the walls' own t³ terms; for the rotary
        inertia of a vibration analysis only.
        """
        wall_area = math.fsum(wall.length * wall.thickness for wall in self.walls)
        return wall_area * self.perimeter**2 / 48.0


class _UniformWallCell(Section):
    """A single closed cell of uniform wall: Bredt–Batho from its centre line.

    Subclasses give ``height`` and ``thickness`` (fields) and ``enclosed_area`` and
    ``perimeter`` (properties).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.11 (thin-walled tubes):
       K = 4·A_m²·t/P, τ = T/(2·A_m·t).
    """

    width: float
    height: float
    thickness: float

    def _require_hollow(self, word: str) -> None:
        """Check the outer sizes and that the wall leaves a hollow (``word``: side or axis)."""
        require_positive("width", self.width)
        require_positive("height", self.height)
        require_positive("thickness", self.thickness)
        smaller = min(self.width, self.height)
        if 2.0 * self.thickness >= smaller:
            msg = (
                f"leaves no hollow: twice {quote(self.thickness, 'length')} is not less than the "
                f"smaller outer {word} {quote(smaller, 'length')}"
            )
            field_name = "thickness"
            raise InputError(field_name, msg)

    @property
    def enclosed_area(self) -> float:
        raise NotImplementedError

    @property
    def perimeter(self) -> float:
        raise NotImplementedError

    @property
    def torsion_constant(self) -> float:
        """Torsion constant K = 4·A_m²·t/P (m⁴)."""
        return 4.0 * self.enclosed_area**2 * self.thickness / self.perimeter

    @property
    def shear_stress_per_torque(self) -> float:
        """Wall-mean shear stress per unit torque, 1/(2·A_m·t) (1/m³)."""
        return 1.0 / (2.0 * self.enclosed_area * self.thickness)

    @property
    def outer_radius(self) -> float:
        """Half the outer height (m)."""
        return self.height / 2.0

    @property
    def inner_radius(self) -> float:
        """Half the inner height (m)."""
        return self.height / 2.0 - self.thickness


@dataclass(frozen=True)
class Box(_UniformWallCell):
    """Rectangular hollow section of uniform wall thickness, sharp corners (Bredt–Batho).

    Parameters
    ----------
    width
        Overall outer width (m).
    height
        Overall outer height, the depth of the section (m).
    thickness
        Wall thickness (m); 2·t must be less than the smaller outer side, and the wall thin:
        t ≤ :data:`THIN_WALL_LIMIT` × 2·A_m/P.

    Notes
    -----
    On the centre line, A_m = (w − t)(h − t) and P = 2(w − t) + 2(h − t); K = 4·A_m²·t/P and
    τ = T/(2·A_m·t), the wall-mean stress (corner concentrations not included).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.11, thin-walled tubes
       (Bredt–Batho; rectangular tube example).
    """

    width: float
    height: float
    thickness: float
    shape: ClassVar[str] = "box"

    def __post_init__(self) -> None:
        self._require_hollow("side")
        with self._formulas():
            _require_thin("thickness", self.thickness, self.enclosed_area, self.perimeter)
        self._require_constants()

    @property
    def enclosed_area(self) -> float:
        """Area A_m enclosed by the wall's centre line (m²)."""
        return (self.width - self.thickness) * (self.height - self.thickness)

    @property
    def perimeter(self) -> float:
        """Centre-line perimeter P (m)."""
        return 2.0 * (self.width - self.thickness) + 2.0 * (self.height - self.thickness)

    @property
    def polar_moment(self) -> float:
        """Polar moment of area, outer rectangle less the hollow (m⁴), exact for sharp corners.

        References
        ----------
        .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., App. E, rectangle
           (I_P = bh(b² + h²)/12; appendix placement from memory).
        """
        inner_width = self.width - 2.0 * self.thickness
        inner_height = self.height - 2.0 * self.thickness
        outer = self.width * self.height * (self.width**2 + self.height**2)
        hollow = inner_width * inner_height * (inner_width**2 + inner_height**2)
        return (outer - hollow) / 12.0


@dataclass(frozen=True)
class EllipticalTube(_UniformWallCell):
    """Elliptical tube of uniform wall thickness (Bredt–Batho on the centre-line ellipse).

    Parameters
    ----------
    width
        Overall outer axis across the width (m).
    height
        Overall outer axis across the height, the depth of the section (m).
    thickness
        Wall thickness (m); 2·t must be less than the smaller axis, the wall thin
        (t ≤ :data:`THIN_WALL_LIMIT` × 2·A_m/P), and t/2 less than the centre line's smallest
        radius of curvature b²/a so the inner face stays a smooth curve.

    Notes
    -----
    The centre line is the ellipse of semi-axes a = (max(w, h) − t)/2 and b = (min(w, h) − t)/2:
    A_m = π·a·b and P = 4·a·E(m), E the complete elliptic integral of the second kind with
    parameter m = 1 − b²/a² (scipy's ``ellipe`` takes the parameter m = k², not the modulus k).
    K = 4·A_m²·t/P, τ = T/(2·A_m·t), the wall-mean stress.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.11, thin-walled tubes
       (Bredt–Batho).
    .. [2] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, 1964, §17.3
       (complete elliptic integral E(m); ellipse perimeter 4·a·E(1 − b²/a²)).
    """

    width: float
    height: float
    thickness: float
    shape: ClassVar[str] = "elliptical_tube"

    def __post_init__(self) -> None:
        self._require_hollow("axis")
        with self._formulas():
            self._require_smooth_and_thin()
        self._require_constants()

    def _require_smooth_and_thin(self) -> None:
        """The inner face is a smooth curve and the wall thin."""
        major, minor = self._semi_axes
        sharpest = minor**2 / major
        if self.thickness / 2.0 >= sharpest:
            msg = (
                f"is too thick for the curvature at the ends of the long axis: half of "
                f"{quote(self.thickness, 'length')} is not less than the centre line's radius "
                f"of curvature {quote(sharpest, 'length')} there"
            )
            field_name = "thickness"
            raise InputError(field_name, msg)
        _require_thin("thickness", self.thickness, self.enclosed_area, self.perimeter)

    @property
    def _semi_axes(self) -> tuple[float, float]:
        major = (max(self.width, self.height) - self.thickness) / 2.0
        minor = (min(self.width, self.height) - self.thickness) / 2.0
        return major, minor

    @property
    def enclosed_area(self) -> float:
        """Area A_m = π·a·b enclosed by the centre-line ellipse (m²)."""
        major, minor = self._semi_axes
        return math.pi * major * minor

    @property
    def perimeter(self) -> float:
        """Perimeter P = 4·a·E(1 − b²/a²) of the centre-line ellipse (m)."""
        major, minor = self._semi_axes
        from scipy.special import ellipe  # noqa: PLC0415 - slow to import; few cases need it

        return 4.0 * major * float(ellipe(1.0 - (minor / major) ** 2))

    @property
    def polar_moment(self) -> float:
        """Polar moment of area of the uniform wall, J = t·∮r² ds + t³·P/4 (m⁴).

        Notes
        -----
        The wall is the band ±t/2 about the centre-line ellipse along its normal; with the area
        element (1 + κ·n) dn ds the band's ∫r² dA is exactly t·∮r² ds + (t³/12)·∮(1 + 2κ·p) ds,
        p the centre line's support function, and ∮κ·p ds = P (Cauchy), which gives the form
        above (derived by hand; it reproduces π/2·(R_o⁴ − R_i⁴) for a circle). ∮r² ds is
        integrated by the trapezoidal rule in the ellipse's parameter, which converges
        geometrically for a smooth periodic integrand.

        References
        ----------
        .. [1] L. N. Trefethen and J. A. C. Weideman, "The exponentially convergent trapezoidal
           rule", *SIAM Review* 56 (2014) 385-458 (from memory).
        """
        major, minor = self._semi_axes
        angle = np.linspace(0.0, 2.0 * math.pi, 512, endpoint=False)
        radius_squared = (major * np.cos(angle)) ** 2 + (minor * np.sin(angle)) ** 2
        speed = np.hypot(major * np.sin(angle), minor * np.cos(angle))
        second_moment = float(np.mean(radius_squared * speed)) * 2.0 * math.pi
        return self.thickness * second_moment + self.thickness**3 * self.perimeter / 4.0


@dataclass(frozen=True)
class ThinWalledOpen(Section):
    """Thin-walled open section (flat strip, angle, channel, ...) as a set of thin walls.

    Parameters
    ----------
    walls
        The walls, each with its centre-line length b (m) and thickness t (m).

    Notes
    -----
    K = Σ bᵢ·tᵢ³/3 and τ_max = T·t_max/K, at the faces of the thickest wall away from its ends and
    junctions (re-entrant corners are not included). Each thin strip's true constant is smaller by
    about 0.21·t⁴ per strip (Roark's rectangle fit); the walls must be slender enough that this
    summed deficit is at most :data:`THIN_WALL_LIMIT` of K, i.e. b/t ≳ 6.3 for a lone strip.

    References
    ----------
    .. [1] Young & Budynas, *Roark's Formulas for Stress and Strain*, 7th ed., ch. 10, thin-walled
       open sections, K = Σ b·t³/3 (from memory; table number not checked), and Table 10.1
       case 4 (rectangle fit K = a·b³[1/3 − 0.21(b/a)(1 − b⁴/12a⁴)]).
    .. [2] Timoshenko & Goodier, *Theory of Elasticity*, 3rd ed., ch. 10, thin rectangles and
       rolled sections (from memory).
    """

    walls: tuple[Wall, ...]
    shape: ClassVar[str] = "thin_open"

    def __post_init__(self) -> None:
        object.__setattr__(self, "walls", _require_walls("walls", self.walls))
        with self._formulas():
            self._require_slender()
        self._require_constants()

    def _require_slender(self) -> None:
        """The walls' end effects are a small part of K."""
        deficit = math.fsum(_STRIP_END_DEFICIT * wall.thickness**4 for wall in self.walls)
        if deficit > THIN_WALL_LIMIT * self.torsion_constant:
            stubbiest = min(
                range(len(self.walls)),
                key=lambda index: self.walls[index].length / self.walls[index].thickness,
            )
            wall = self.walls[stubbiest]
            msg = (
                f"is too thick for thin-walled open-section theory: end effects 0.21·t⁴ exceed "
                f"{THIN_WALL_LIMIT:g} of Σb·t³/3 (stubbiest wall: {quote(wall.thickness, 'length')}"
                f" thick, {quote(wall.length, 'length')} long)"
            )
            field_name = f"walls[{stubbiest}].thickness"
            raise InputError(field_name, msg)

    @property
    def torsion_constant(self) -> float:
        """Torsion constant K = Σ b·t³/3 (m⁴)."""
        return math.fsum(wall.length * wall.thickness**3 for wall in self.walls) / 3.0

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest shear stress per unit torque, t_max/K (1/m³)."""
        thickest = max(wall.thickness for wall in self.walls)
        return thickest / self.torsion_constant

    @property
    def outer_radius(self) -> float:
        """Drawing size (m): half the longest wall; the walls' layout is not known."""
        return max(wall.length for wall in self.walls) / 2.0

    @property
    def polar_moment(self) -> float:
        """Polar moment of area, taken as Σ bᵢ·tᵢ·(bᵢ² + tᵢ²)/12 (m⁴): a lower bound.

        The walls' layout is not known, so each wall is taken about its own middle; exact for a
        single flat strip, low otherwise by the parallel-axis terms Σ bᵢ·tᵢ·dᵢ² of the walls'
        distances from the axis. For the rotary inertia of a vibration analysis only.
        """
        return math.fsum(
            wall.length * wall.thickness * (wall.length**2 + wall.thickness**2) / 12.0
            for wall in self.walls
        )


__all__ = [
    "THIN_WALL_LIMIT",
    "Box",
    "EllipticalTube",
    "ThinWalledClosed",
    "ThinWalledOpen",
    "Wall",
]
