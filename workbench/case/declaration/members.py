"""The case file itself: units, materials, shafts and segments, supports, gears, loads, vibration.

Contract: case file version 1 (``DEVELOPERS.md``, design §2). Numbers are in the units the
``units`` object names (SI base units when absent); references by name (shafts, materials, load
cases) and positions on shafts are checked when the model is built.
"""

from typing import Annotated, ClassVar, Literal

from msgspec import UNSET, Meta, UnsetType

from workbench.case.declaration.criteria import Design
from workbench.case.declaration.keys import (
    MAX_ITEMS,
    MAX_LOAD_CASES,
    MAX_SEGMENTS,
    Alternatives,
    Keys,
    Name,
    Position,
    ShaftId,
    Text,
    UnitText,
    key,
)
from workbench.case.declaration.shapes import Section
from workbench.case.units import SI_UNITS

SupportKind = Literal["fixed", "spring"]
MeshKind = Literal["external", "internal"]
WarpingKind = Literal["restrained", "free"]


def _items(
    description: str, most: int = MAX_ITEMS, least: int = 0, *, always: bool = False
) -> Meta:
    return key(description, always=always, min_length=least, max_length=most)


class Units(Keys):
    """Units of the numbers in the file: any unit string pint understands, of the right dimension.

    Derived units: stiffness = torque/angle, distributed torque = torque/length, twist rate =
    angle/length, area = length²; shear modulus and strengths are in stress units.
    """

    length: Annotated[UnitText, key("Lengths, positions, diameters", default=SI_UNITS["length"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    torque: Annotated[UnitText, key("Torques", default=SI_UNITS["torque"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    stress: Annotated[UnitText, key("Stresses, moduli, strengths", default=SI_UNITS["stress"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    angle: Annotated[UnitText, key("Rotations and angles", default=SI_UNITS["angle"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    power: Annotated[UnitText, key("Power of a torque given as power and speed", default=SI_UNITS["power"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    speed: Annotated[UnitText, key("Rotational speeds", default=SI_UNITS["speed"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    inertia: Annotated[UnitText, key("Mass moments of inertia", default=SI_UNITS["inertia"], always=True)] | UnsetType | None = UNSET  # fmt: skip
    density: Annotated[UnitText, key("Mass densities", default=SI_UNITS["density"], always=True)] | UnsetType | None = UNSET  # fmt: skip


class Material(Keys):
    """An isotropic, linearly elastic material, by the name segments use for it."""

    shear_modulus: Annotated[float, key("Shear modulus G", "stress", gt=0)]
    yield_strength: Annotated[float, key("Tensile yield strength Sy", "stress", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    ultimate_strength: Annotated[float, key("Tensile ultimate strength Su", "stress", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    elastic_modulus: Annotated[float, key("Young's modulus E", "stress", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    poisson_ratio: Annotated[float, key("Poisson's ratio ν", gt=-1, le=0.5)] | UnsetType | None = UNSET  # fmt: skip
    density: Annotated[float, key("Mass density ρ (for vibration)", "density", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    source: Annotated[Text, key("Publication and table the values come from", default="")] | UnsetType | None = UNSET  # fmt: skip


class Layer(Keys):
    """One of the bonded coaxial circular members of a layered segment."""

    material: Annotated[Name, key("Name of a material of the case or of the library")]
    section: Annotated[Section, key("The layer's cross-section")]


class Notch(Keys):
    """A stress raiser whose Kts is read from a chart, on the segment's nominal stress 16T/(πd³)."""

    alternatives: ClassVar[Alternatives] = Alternatives(
        (("radius",), ("notch_sensitivity",)), required=False
    )

    kts: Annotated[float, key("Theoretical torsional stress-concentration factor Kts", ge=1)]
    radius: Annotated[float, key("Notch root radius (for the notch sensitivity q)", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    notch_sensitivity: Annotated[float, key("A stated notch sensitivity q instead of radius", ge=0, le=1)] | UnsetType | None = UNSET  # fmt: skip
    description: Annotated[Text, key("What the detail is", default="")] | UnsetType | None = UNSET  # fmt: skip

    def __post_init__(self) -> None:
        self.alternatives.check(self)


class Segment(Keys):
    """A length of shaft: a material and a section, or bonded coaxial layers."""

    # Checked on whole lists of segments after decoding (workbench.case.load), not in a
    # __post_init__: a million segments then decode without a Python call each.
    alternatives: ClassVar[Alternatives] = Alternatives((("material", "section"), ("layers",)))

    length: Annotated[float, key("Length along the shaft", "length", gt=0)]
    material: Annotated[Name, key("Name of a material of the case or of the library")] | UnsetType | None = UNSET  # fmt: skip
    section: Annotated[Section, key("The cross-section")] | UnsetType | None = UNSET
    layers: Annotated[list[Layer], _items("Bonded coaxial circular members acting together", least=1)] | UnsetType | None = UNSET  # fmt: skip
    fillet_radius: Annotated[float, key("Fillet radius of the shoulder at the segment's start", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    keyseat: Annotated[bool, key("Whether the segment carries an end-milled keyseat", default=False)] | UnsetType | None = UNSET  # fmt: skip
    cross_hole_diameter: Annotated[float, key("Diameter of a transverse through hole", "length", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    notch: Annotated[Notch, key("A stress raiser with a stated Kts")] | UnsetType | None = UNSET


class Shaft(Keys):
    """A shaft: segments end to end along its own x axis, x = 0 at its start."""

    id: Annotated[Name, key("The shaft's name, unique in the case")]
    segments: Annotated[list[Segment], _items("Segments from x = 0 onwards", MAX_SEGMENTS, 1)]


class Support(Keys):
    """A support restraining a shaft's rotation at one point."""

    shaft: ShaftId
    x: Position
    kind: Annotated[SupportKind, key("fixed holds the rotation; spring exerts −stiffness·(θ − rotation)", default="fixed", always=True)] | UnsetType | None = UNSET  # fmt: skip
    stiffness: Annotated[float, key("Rotational stiffness of a spring support", "stiffness", gt=0)] | UnsetType | None = UNSET  # fmt: skip
    rotation: Annotated[float, key("Prescribed rotation of the support (misfit, pre-twist)", "angle", default=0.0)] | UnsetType | None = UNSET  # fmt: skip
    warping: Annotated[WarpingKind, key("Open sections that warp: restrained holds the warping there (θ′ = 0); free leaves it", default="free", always=True)] | UnsetType | None = UNSET  # fmt: skip


class GearEnd(Keys):
    """Where one gear of a mesh sits."""

    shaft: ShaftId
    x: Position
    radius: Annotated[float, key("Pitch radius", "length", gt=0)]


class Gear(Keys):
    """Two gears in mesh, rigid teeth, no backlash."""

    a: Annotated[GearEnd, key("The first gear")]
    b: Annotated[GearEnd, key("The second gear")]
    mesh: Annotated[MeshKind, key("external: r_a·θ_a = −r_b·θ_b; internal: r_a·θ_a = r_b·θ_b", default="external")] | UnsetType | None = UNSET  # fmt: skip


class Torque(Keys):
    """A concentrated torque: a torque, or a power and a speed (T = P/ω)."""

    alternatives: ClassVar[Alternatives] = Alternatives((("torque",), ("power", "speed")))

    shaft: ShaftId
    x: Position
    torque: Annotated[float, key("Torque, positive along +x", "torque")] | UnsetType | None = UNSET  # fmt: skip
    power: Annotated[float, key("Power; its sign gives the torque's sense", "power")] | UnsetType | None = UNSET  # fmt: skip
    speed: Annotated[float, key("Rotational speed", "speed", gt=0)] | UnsetType | None = UNSET

    def __post_init__(self) -> None:
        self.alternatives.check(self)


class DistributedTorque(Keys):
    """A distributed torque varying linearly from start to end."""

    shaft: ShaftId
    start: Annotated[float, key("Where the load begins", "length")]
    end: Annotated[float, key("Where the load ends, after start", "length")]
    intensity_start: Annotated[float, key("Torque per length at start", "distributed_torque")]
    intensity_end: Annotated[float, key("Torque per length at end", "distributed_torque")]


class LoadCase(Keys):
    """A named set of applied torques."""

    name: Annotated[Name, key("Unique name (shared with combinations and running speeds)")]
    torques: Annotated[list[Torque], _items("Point torques")] | UnsetType | None = UNSET
    distributed: Annotated[list[DistributedTorque], _items("Distributed torques")] | UnsetType | None = UNSET  # fmt: skip


class Combination(Keys):
    """A factored sum of load-case results (superposition)."""

    name: Annotated[Name, key("Unique name (not shared with any load case)")]
    factors: Annotated[
        dict[Name, float],
        key("Factor on each load case, by its name", min_length=1, max_length=MAX_LOAD_CASES),
    ]


class Disc(Keys):
    """A rigid disc (rotor, flywheel, hub) on a shaft, for vibration."""

    shaft: ShaftId
    x: Position
    inertia: Annotated[float, key("Mass moment of inertia about the shaft's axis", "inertia", gt=0)]


class OperatingSpeed(Keys):
    """A band of running speeds the natural frequencies must keep clear of."""

    name: Annotated[Name, key("Unique name (shared with load cases and combinations)")]
    min: Annotated[float, key("Lowest running speed", "speed", ge=0)]
    max: Annotated[float, key("Highest running speed, not less than min", "speed", gt=0)]


# dict=True: the loader keeps the segments' columns beside the keys (workbench.case.segment_keys),
# never written, compared or copied with them (msgspec allows a __dict__ only with gc=True).
class CaseFile(Keys, kw_only=True, gc=True, dict=True):
    """A case file, version 1."""

    title: Annotated[Text, key("Free text naming the case", default="")] | UnsetType | None = UNSET  # fmt: skip
    units: Annotated[Units, key("Units of the numbers in the file (SI when left out)")] | UnsetType | None = UNSET  # fmt: skip
    materials: Annotated[dict[Name, Material], key("Materials of this case by name", max_length=MAX_ITEMS)] | UnsetType | None = UNSET  # fmt: skip
    shafts: Annotated[list[Shaft], _items("The shafts", MAX_SEGMENTS, 1)]
    supports: Annotated[list[Support], _items("Supports, in the order reactions are reported", always=True)] | UnsetType | None = UNSET  # fmt: skip
    gears: Annotated[list[Gear], _items("Gear meshes joining shafts")] | UnsetType | None = UNSET
    load_cases: Annotated[list[LoadCase], _items("Load cases: solve, check and size need at least one; modes none", MAX_LOAD_CASES, 1)] | UnsetType | None = UNSET  # fmt: skip
    combinations: Annotated[list[Combination], _items("Factored sums of load cases", MAX_LOAD_CASES)] | UnsetType | None = UNSET  # fmt: skip
    design: Annotated[Design, key("Design criteria for the checks")] | UnsetType | None = UNSET
    discs: Annotated[list[Disc], _items("Rigid discs (vibration)")] | UnsetType | None = UNSET
    operating_speeds: Annotated[list[OperatingSpeed], _items("Running-speed bands (vibration)")] | UnsetType | None = UNSET  # fmt: skip
