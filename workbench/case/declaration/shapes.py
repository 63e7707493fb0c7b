"""Cross-sections of a case file: one object per shape, told apart by its ``shape`` key.

Numbers are in the file's length units (``enclosed_area`` in length²). The solver builds its
section of the same name from each (:mod:`workbench.solver.build`); what the shapes mean and their
formulas are documented there (:mod:`workbench.solver.sections`, :mod:`workbench.solver.noncircular`,
:mod:`workbench.solver.thin_walls`).
"""

from typing import Annotated

from msgspec import UNSET, Meta, UnsetType

from workbench.case.declaration.keys import MAX_ITEMS, MAX_STRING_LENGTH, Keys, key


class Wall(Keys):
    """One panel of a thin-walled section, measured on its centre line."""

    length: Annotated[
        float, key("Length of the panel along the wall's centre line", "length", gt=0)
    ]
    thickness: Annotated[float, key("Wall thickness, uniform over the panel", "length", gt=0)]


Walls = Annotated[list[Wall], Meta(min_length=1, max_length=MAX_ITEMS)]


class Solid(Keys, tag_field="shape", tag="solid"):
    """Solid circle."""

    diameter: Annotated[float, key("Diameter", "length", gt=0)]


class Tube(Keys, tag_field="shape", tag="tube"):
    """Hollow circle of any wall thickness."""

    outer_diameter: Annotated[float, key("Outer diameter", "length", gt=0)]
    inner_diameter: Annotated[
        float, key("Inner diameter, smaller than the outer diameter", "length", gt=0)
    ]


class Tapered(Keys, tag_field="shape", tag="tapered"):
    """Circle whose diameter varies linearly along the segment, with an optional constant bore."""

    diameter_start: Annotated[float, key("Outer diameter at the segment's start", "length", gt=0)]
    diameter_end: Annotated[float, key("Outer diameter at the segment's end", "length", gt=0)]
    bore: (
        Annotated[
            float,
            key(
                "Diameter of a constant central bore, smaller than both end diameters; 0 for none",
                "length",
                ge=0,
                default=0.0,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET


class Rectangle(Keys, tag_field="shape", tag="rectangle"):
    """Solid rectangle (exact Saint-Venant series)."""

    width: Annotated[float, key("Overall width", "length", gt=0)]
    height: Annotated[float, key("Overall height, the depth of the section", "length", gt=0)]


class ThinClosed(Keys, tag_field="shape", tag="thin_closed"):
    """Single-cell thin-walled closed section described by its wall panels (Bredt–Batho)."""

    enclosed_area: Annotated[
        float, key("Area enclosed by the centre line of the wall", "area", gt=0)
    ]
    walls: Annotated[Walls, key("The wall panels round the centre line")]


class Box(Keys, tag_field="shape", tag="box"):
    """Rectangular hollow section of uniform wall thickness (Bredt–Batho)."""

    width: Annotated[float, key("Overall outer width", "length", gt=0)]
    height: Annotated[float, key("Overall outer height, the depth of the section", "length", gt=0)]
    thickness: Annotated[float, key("Wall thickness", "length", gt=0)]


class EllipticalTube(Keys, tag_field="shape", tag="elliptical_tube"):
    """Elliptical tube of uniform wall thickness (Bredt–Batho on the centre-line ellipse)."""

    width: Annotated[float, key("Overall outer axis across the width", "length", gt=0)]
    height: Annotated[float, key("Overall outer axis across the height", "length", gt=0)]
    thickness: Annotated[float, key("Wall thickness", "length", gt=0)]


class ThinOpen(Keys, tag_field="shape", tag="thin_open"):
    """Thin-walled open section (strip, angle, channel, ...) as a set of thin walls."""

    walls: Annotated[Walls, key("The walls, each with its centre-line length and thickness")]


# --- thin-walled open sections that warp (restrained torsion) ----------------------------------


class FlangedKeys(Keys):
    """Keys shared by sections of a web between two flanges (channel, Z)."""

    depth: Annotated[float, key("Overall depth, outside of flange to outside of flange", "length", gt=0)]  # fmt: skip
    width: Annotated[float, key("Overall flange width, the web's thickness included", "length", gt=0)]  # fmt: skip
    flange_thickness: Annotated[float, key("Thickness of both flanges", "length", gt=0)]
    web_thickness: Annotated[float, key("Thickness of the web", "length", gt=0)]


class IBeam(Keys, tag_field="shape", tag="i_beam"):
    """I section with a web between two flanges; the bottom flange may differ from the top one."""

    depth: Annotated[float, key("Overall depth, outside of flange to outside of flange", "length", gt=0)]  # fmt: skip
    width: Annotated[float, key("Width of the top flange (and of the bottom one unless stated)", "length", gt=0)]  # fmt: skip
    flange_thickness: Annotated[float, key("Thickness of the top flange (and of the bottom one unless stated)", "length", gt=0)]  # fmt: skip
    web_thickness: Annotated[float, key("Thickness of the web", "length", gt=0)]
    bottom_width: Annotated[float, key("Width of the bottom flange, where it differs from the top one", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    bottom_thickness: Annotated[float, key("Thickness of the bottom flange, where it differs from the top one", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip


class Channel(FlangedKeys, tag_field="shape", tag="channel"):
    """Channel: a web with both flanges on one side."""


class ZSection(FlangedKeys, tag_field="shape", tag="z_section"):
    """Z section: a web with its flanges on opposite sides."""


class Angle(Keys, tag_field="shape", tag="angle"):
    """Angle of two legs of one thickness (its warping constant is negligible: thin-wall theory 0)."""

    leg_a: Annotated[float, key("Overall length of the first leg, heel to toe", "length", gt=0)]
    leg_b: Annotated[float, key("Overall length of the second leg, heel to toe", "length", gt=0)]
    thickness: Annotated[float, key("Thickness of both legs", "length", gt=0)]


class Tee(Keys, tag_field="shape", tag="tee"):
    """Tee: a flange with a stem at its middle (its warping constant is negligible)."""

    depth: Annotated[float, key("Overall depth, top of flange to tip of stem", "length", gt=0)]
    width: Annotated[float, key("Flange width", "length", gt=0)]
    flange_thickness: Annotated[float, key("Thickness of the flange", "length", gt=0)]
    stem_thickness: Annotated[float, key("Thickness of the stem", "length", gt=0)]


class MidlinePoint(Keys):
    """A point of the wall's mid-line; every point but the first ends a wall of its thickness."""

    x: Annotated[float, key("Coordinate across the section", "length")]
    y: Annotated[float, key("Coordinate across the section, square to x", "length")]
    thickness: Annotated[float, key("Thickness of the wall from the previous point to this one (not on the first point)", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip


class OpenPolyline(Keys, tag_field="shape", tag="open_polyline"):
    """Thin-walled open section of any shape: its wall's mid-line as a polyline, wall by wall."""

    points: Annotated[
        list[MidlinePoint],
        key("Mid-line points in order, at least two", min_length=2, max_length=MAX_ITEMS),
    ]


#: The declared open sections that warp (restrained torsion).
OPEN_SHAPES = (IBeam, Channel, ZSection, Angle, Tee, OpenPolyline)

# --- any cross-section, by finite elements -----------------------------------------------------


class BoundaryPoint(Keys):
    """A corner of a section's boundary."""

    x: Annotated[float, key("Coordinate across the section", "length")]
    y: Annotated[float, key("Coordinate across the section, square to x", "length")]


Boundary = Annotated[list[BoundaryPoint], Meta(min_length=3, max_length=MAX_ITEMS)]


class Polygon(Keys, tag_field="shape", tag="polygon"):
    """Solid section of any shape: a polygon with polygonal holes (finite elements)."""

    outer: Annotated[Boundary, key("Corners of the outer boundary in order, at least three")]
    holes: (
        Annotated[
            list[Boundary],
            key("Boundaries of holes, each inside the outer one and clear of the others", max_length=MAX_ITEMS),
        ]
        | UnsetType
        | None
    ) = UNSET  # fmt: skip


class Drawing(Keys, tag_field="shape", tag="dxf"):
    """Solid section outlined in a DXF drawing: one closed outline with closed holes (finite elements)."""

    path: Annotated[
        str,
        key("The DXF drawing, relative to the case file's folder; its coordinates in the case's length unit", min_length=1, max_length=MAX_STRING_LENGTH),
    ]  # fmt: skip


#: The declared sections analysed by finite elements.
FE_SHAPES = (Polygon, Drawing)

#: Every cross-section a case file may name.
Section = (
    Solid | Tube | Tapered | Rectangle | ThinClosed | Box | EllipticalTube | ThinOpen
    | IBeam | Channel | ZSection | Angle | Tee | OpenPolyline
    | Polygon | Drawing
)  # fmt: skip

#: The section objects by their ``shape`` key.
SHAPES: dict[str, type[Keys]] = {
    str(cls.__struct_config__.tag): cls
    for cls in (
        Solid, Tube, Tapered, Rectangle, ThinClosed, Box, EllipticalTube, ThinOpen,
        *OPEN_SHAPES, *FE_SHAPES,
    )
}  # fmt: skip
