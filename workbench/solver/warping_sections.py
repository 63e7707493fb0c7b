"""The open thin-walled sections of a case file that warp: I beam, channel, Z, angle, tee, polyline.

Each is a prismatic :class:`~workbench.solver.sections.Section` in SI metres, with the keys of its
case-file shape. It lays out its wall mid-line through :mod:`workbench.solver.open_shapes` (or,
for a polyline, takes it as given) and reads its properties from the one general routine
:func:`~workbench.solver.open_sections.open_section`: the Saint-Venant torsion constant
J = Σ b·t³/3, the largest Saint-Venant shear stress per unit torque t_max/J, and the warping
constant Cw that restrained (Vlasov) torsion needs. Errors name the section's own keys
(``depth``, ``points[3].thickness``), the builder puts the segment's path in front.

References
----------
.. [1] A. P. Boresi and R. J. Schmidt, *Advanced Mechanics of Materials*, 6th ed., Wiley, 2003,
   ch. 10 (torsion of thin-wall open sections: J = Σ b·t³/3, τ = T·t/J; chapter from memory).
.. [2] P. A. Seaburg and C. J. Carter, *Torsional Analysis of Structural Steel Members*, AISC
   Design Guide 9, 1997, ch. 3 (Cw; from memory).
"""

from __future__ import annotations

import functools
import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.solver import open_shapes
from workbench.solver.open_sections import OpenSectionWarping, polyline_section
from workbench.solver.sections import Section

#: A wall's thickness as the general routine names it, for the polyline's own key.
_THICKNESS_FIELD = re.compile(r"^thicknesses\[(\d+)\]")
_POINT_FIELD = re.compile(r"^points\[(\d+)\]")


@dataclass(frozen=True)
class OpenWarpingSection(Section):
    """Base of the open sections that carry warping properties (prismatic, not circular)."""

    def __post_init__(self) -> None:
        self.properties  # noqa: B018 - checks the dimensions now, naming the key
        self._require_constants()

    def _build(self) -> OpenSectionWarping:
        raise NotImplementedError

    @functools.cached_property
    def properties(self) -> OpenSectionWarping:
        """J, Cw, shear centre, Wn and Sw of the mid-line (:class:`OpenSectionWarping`)."""
        return self._build()

    @property
    def torsion_constant(self) -> float:
        """Saint-Venant torsion constant J = Σ b·t³/3 (m⁴)."""
        return self.properties.torsion_constant

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest Saint-Venant shear stress per unit torque, t_max/J (1/m³).

        References
        ----------
        .. [1] Boresi & Schmidt, *Advanced Mechanics of Materials*, 6th ed., ch. 10 (τ = T·t/J).
        """
        return float(self.properties.thicknesses.max()) / self.torsion_constant

    @property
    def warping_constant(self) -> float:
        """Warping constant Cw = ∫Wn² dA (m⁶); 0 where only rounding leaves one.

        Below :data:`_NO_WARPING` of A·d⁴ (area, extent d: the largest Cw of such a section)
        it counts as 0: angles and tees, whose walls meet at one point, have Cw = 0 in
        thin-walled theory and only rounding's remainder here.

        References
        ----------
        .. [1] Seaburg & Carter, AISC Design Guide 9, 1997, ch. 3 (angles and tees: Cw
           negligible; from memory).
        """
        properties = self.properties
        scale = properties.area * (2.0 * self.outer_radius) ** 4
        constant = properties.warping_constant
        return constant if constant > _NO_WARPING * scale else 0.0

    @property
    def outer_radius(self) -> float:
        """Half the largest distance between mid-line points (m): for drawing only."""
        points = self.properties.points
        gaps = np.hypot(*(points[:, None, :] - points[None, :, :]).transpose(2, 0, 1))
        return float(gaps.max()) / 2.0

    @property
    def polar_moment(self) -> float:
        """∫r² dA about the shear centre, the axis of twist, on the thin walls (m⁴).

        Each wall from a to b (relative to the shear centre) of thickness t gives
        t·L·(|a|² + a·b + |b|²)/3 + L·t³/12; for the rotary inertia of a vibration analysis.
        """
        walls = self.properties
        ends = walls.points[walls.walls] - walls.shear_centre
        a, b = ends[:, 0], ends[:, 1]
        length = np.hypot(*(b - a).T)
        t = walls.thicknesses
        along = (np.sum(a * a, 1) + np.sum(a * b, 1) + np.sum(b * b, 1)) / 3.0
        return float(np.sum(t * length * along + length * t**3 / 12.0))


@dataclass(frozen=True)
class IBeam(OpenWarpingSection):
    """I section; the bottom flange is the top one unless stated (m)."""

    depth: float
    width: float
    flange_thickness: float
    web_thickness: float
    bottom_width: float | None = None
    bottom_thickness: float | None = None
    shape: ClassVar[str] = "i_beam"

    def _build(self) -> OpenSectionWarping:
        bottom_width = self.width if self.bottom_width is None else self.bottom_width
        bottom = self.flange_thickness if self.bottom_thickness is None else self.bottom_thickness
        bottom_key = "bottom_width" if self.bottom_width is not None else "width"
        _require_wider(("width", self.width), ("web_thickness", self.web_thickness))
        _require_wider((bottom_key, bottom_width), ("web_thickness", self.web_thickness))
        try:
            return open_shapes.i_section(
                self.depth,
                self.width,
                bottom_width,
                self.flange_thickness,
                bottom,
                self.web_thickness,
                field="",
            )
        except InputError as error:
            # The builder's names for the unequal-flange dimensions are this shape's keys.
            bottom_thickness = (
                "bottom_thickness" if self.bottom_thickness is not None else "flange_thickness"
            )
            names = {
                "top_width": "width",
                "top_thickness": "flange_thickness",
                "bottom_width": bottom_key,
                "bottom_thickness": bottom_thickness,
            }
            # The walls: top flange twice, web, bottom flange twice.
            walls = ("flange_thickness",) * 2 + ("web_thickness",) + (bottom_thickness,) * 2
            raise _renamed(error, names, walls) from None


@dataclass(frozen=True)
class _Flanged(OpenWarpingSection):
    depth: float
    width: float
    flange_thickness: float
    web_thickness: float


@dataclass(frozen=True)
class Channel(_Flanged):
    """Channel (m)."""

    shape: ClassVar[str] = "channel"

    def _build(self) -> OpenSectionWarping:
        _require_wider(("width", self.width), ("web_thickness", self.web_thickness))
        return _keyed(
            _FLANGED_WALLS,
            open_shapes.channel_section,
            self.depth,
            self.width,
            self.flange_thickness,
            self.web_thickness,
        )


@dataclass(frozen=True)
class ZSection(_Flanged):
    """Z section (m)."""

    shape: ClassVar[str] = "z_section"

    def _build(self) -> OpenSectionWarping:
        _require_wider(("width", self.width), ("web_thickness", self.web_thickness))
        return _keyed(
            _FLANGED_WALLS,
            open_shapes.z_section,
            self.depth,
            self.width,
            self.flange_thickness,
            self.web_thickness,
        )


@dataclass(frozen=True)
class Angle(OpenWarpingSection):
    """Angle (m)."""

    leg_a: float
    leg_b: float
    thickness: float
    shape: ClassVar[str] = "angle"

    def _build(self) -> OpenSectionWarping:
        return _keyed(
            ("thickness", "thickness"),
            open_shapes.angle_section,
            self.leg_a,
            self.leg_b,
            self.thickness,
        )


@dataclass(frozen=True)
class Tee(OpenWarpingSection):
    """Tee (m)."""

    depth: float
    width: float
    flange_thickness: float
    stem_thickness: float
    shape: ClassVar[str] = "tee"

    def _build(self) -> OpenSectionWarping:
        _require_wider(("width", self.width), ("stem_thickness", self.stem_thickness))
        return _keyed(
            ("flange_thickness", "flange_thickness", "stem_thickness"),
            open_shapes.tee_section,
            self.depth,
            self.width,
            self.flange_thickness,
            self.stem_thickness,
        )


@dataclass(frozen=True)
class MidlinePoint:
    """A mid-line point (m) and the thickness of the wall arriving at it (m; none at the first)."""

    x: float
    y: float
    thickness: float | None = None


@dataclass(frozen=True)
class OpenPolyline(OpenWarpingSection):
    """An open section whose wall mid-line is one polyline (m)."""

    points: tuple[MidlinePoint, ...]
    shape: ClassVar[str] = "open_polyline"

    def _build(self) -> OpenSectionWarping:
        points = self.points
        if len(points) < 2:
            raise InputError("points", "must hold at least two mid-line points")
        if points[0].thickness is not None:
            msg = "must not be given on the first point: each thickness is of the wall arriving"
            raise InputError("points[0].thickness", msg)
        missing = [k for k, point in enumerate(points[1:], 1) if point.thickness is None]
        if missing:
            msg = "is missing: every point but the first ends a wall and gives its thickness"
            raise InputError(f"points[{missing[0]}].thickness", msg)
        xy = [(point.x, point.y) for point in points]
        thicknesses = [float(point.thickness or 0.0) for point in points[1:]]
        try:
            return polyline_section(xy, thicknesses, field="")
        except InputError as error:
            field = error.field.lstrip(".")
            thickness = _THICKNESS_FIELD.match(field)
            if thickness is not None:
                field = f"points[{int(thickness.group(1)) + 1}].thickness"
            elif field.startswith("walls["):
                # Wall k of a polyline joins point k to point k + 1: name where it ends.
                number = int(field[6 : field.index("]")])
                field = f"points[{number + 1}]"
            elif _POINT_FIELD.match(field) is None:
                field = "points"
            raise InputError(field, error.message) from None


#: The key of each wall's thickness of a channel or Z (flange, web, flange).
_FLANGED_WALLS = ("flange_thickness", "web_thickness", "flange_thickness")


def _require_wider(wide: tuple[str, float], thick: tuple[str, float]) -> None:
    """A flange (or leg) wider than the wall standing on it, else :class:`InputError`."""
    (name, width), (wall, thickness) = wide, thick
    if not width > thickness:
        msg = f"must exceed {wall} ({quote(width, 'length')} ≤ {quote(thickness, 'length')})"
        raise InputError(name, msg)


def _keyed(
    walls: tuple[str, ...], builder: Callable[..., OpenSectionWarping], *sizes: float
) -> OpenSectionWarping:
    """A shape builder's section, its errors naming this section's keys (no prefix)."""
    try:
        return builder(*sizes, field="")
    except InputError as error:
        raise _renamed(error, {}, walls) from None


def _renamed(error: InputError, names: dict[str, str], walls: tuple[str, ...]) -> InputError:
    """The error of a builder called with ``field=""`` in this shape's keys.

    Its leading dot goes, the builder's dimension names become this shape's (in the message
    too), and a wall's thickness or any other place on the mid-line becomes the key that sizes
    it (``walls``: the key of each wall's thickness, in the builder's order of walls).
    """
    field = error.field.lstrip(".")
    message = error.message
    for old, new in names.items():
        message = message.replace(old, new)
    head, dot, rest = field.partition(".")
    thickness = _THICKNESS_FIELD.match(field)
    if thickness is not None:
        return InputError(walls[int(thickness.group(1))], message)
    if head.startswith(("points", "walls")):
        return InputError("width", message)
    return InputError(names.get(head, head) + dot + rest if field else "section", message)


#: The open sections by their case-file name.
OPEN_SECTIONS: dict[str, type[Section]] = {
    cls.shape: cls for cls in (IBeam, Channel, ZSection, Angle, Tee, OpenPolyline)
}

#: Warping constants below this fraction of A·d⁴ (area, extent d) count as none.
_NO_WARPING = 1e-10


__all__ = [
    "OPEN_SECTIONS",
    "Angle",
    "Channel",
    "IBeam",
    "MidlinePoint",
    "OpenPolyline",
    "OpenWarpingSection",
    "Tee",
    "ZSection",
]
