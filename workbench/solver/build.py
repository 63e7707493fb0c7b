"""The SI model of a case from its declared case file, and the case file of a model.

:func:`build_model` converts every number by its key's declared quantity (file units → SI,
finite after the conversion) and builds the :class:`~workbench.solver.model.Model`, whose
constructors check what the declaration cannot say (inner diameters smaller than outer ones,
layers that nest, names that exist, positions on their shafts); their errors come out naming
the field by its path in the case file. :func:`case_file_of` goes the other way, for saving.
"""

from __future__ import annotations

import contextlib
import dataclasses
import functools
import gc
import itertools
import os
import pathlib
from collections.abc import Iterator
from contextvars import ContextVar
from typing import TYPE_CHECKING, Any

import numpy as np
from msgspec import UNSET

from workbench.case import declaration as declared
from workbench.case.convert import Converter, unit_system
from workbench.case.design import design_criteria, design_section
from workbench.case.errors import InputError, path_key, quoted
from workbench.case.materials import LIBRARY, Material, closest_names, library_material
from workbench.case.power import torque_from_power
from workbench.case.units import SI, UnitSystem, display_units
from workbench.case.validate import build_each, within
from workbench.solver import sections as circular
from workbench.solver.model import (
    Combination,
    Disc,
    DistributedTorque,
    GearMesh,
    GearPosition,
    Layer,
    LoadCase,
    Model,
    Notch,
    OperatingSpeed,
    PointTorque,
    Segment,
    Shaft,
    Support,
)
from workbench.solver.sections import Section

if TYPE_CHECKING:
    from workbench.solver.polygon_sections import Points
    from workbench.solver.thin_walls import Wall


#: The folder of the case file being read: drawings named by a relative path are found there.
case_folder: ContextVar[str | None] = ContextVar("case_folder", default=None)


@contextlib.contextmanager
def read_beside(case_path: str | os.PathLike[str] | None) -> Iterator[None]:
    """Resolve the relative drawing paths of the case built inside against ``case_path``'s folder.

    Parameters
    ----------
    case_path
        The case file's path; ``None`` leaves relative drawing paths refused.
    """
    folder = None if case_path is None else str(pathlib.Path(case_path).resolve().parent)
    token = case_folder.set(folder)
    try:
        yield
    finally:
        case_folder.reset(token)


@functools.cache
def solver_sections() -> dict[type[declared.Keys], type[Section]]:
    """The solver's section for each declared shape (the same key names, in SI).

    The non-circular shapes are loaded on first use: a case of circular shafts (the demo's
    ``workbench solve``) never needs them.
    """
    from workbench.solver.noncircular import NONCIRCULAR_SHAPES  # noqa: PLC0415
    from workbench.solver.polygon_sections import DrawingSection, PolygonSection  # noqa: PLC0415
    from workbench.solver.warping_sections import OPEN_SECTIONS  # noqa: PLC0415

    shapes: tuple[type[Section], ...] = (
        circular.SolidCircle,
        circular.Tube,
        circular.TaperedCircle,
        *NONCIRCULAR_SHAPES.values(),
        *OPEN_SECTIONS.values(),
        PolygonSection,
        DrawingSection,
    )
    return {declared.SHAPES[cls.shape]: cls for cls in shapes}


def __getattr__(name: str) -> Any:
    # SECTIONS, the table of solver_sections(), is read by tests and tools as a constant.
    if name == "SECTIONS":
        return solver_sections()
    msg = f"module {__name__!r} has no attribute {name!r}"
    raise AttributeError(msg)


class ModelBuilder:
    """Builds the parts of one model, converting with one case's units.

    Made by :func:`building`; its errors name fields relative to the part it builds.
    """

    def __init__(self, case: declared.CaseFile, converter: Converter) -> None:
        self.case = case
        self.convert = converter
        self.materials: dict[str, Material] = {}
        for name, entry in (declared.value_of(case, "materials") or {}).items():
            try:
                self.materials[name] = self._material(name, entry)
            except InputError as error:
                raise within(f"materials.{path_key(name)}", error) from None
        self._library: dict[str, Material] = {}
        #: Whether a section built so far warps (E·Cw > 0) or a support states ``warping``:
        #: the case is then solved with the rate of twist at each node.
        self.warps = False

    def _material(self, name: str, entry: declared.Material) -> Material:
        si = self.convert.si
        return Material(
            name=name,
            shear_modulus=si(entry, "shear_modulus"),
            yield_strength=si(entry, "yield_strength"),
            ultimate_strength=si(entry, "ultimate_strength"),
            elastic_modulus=si(entry, "elastic_modulus"),
            poisson_ratio=si(entry, "poisson_ratio"),
            density=si(entry, "density"),
            source=declared.value_of(entry, "source"),
        )

    def material(self, name: str) -> Material:
        """A material of the case, else of the library (keeping the name the case used)."""
        found = self.materials.get(name) or self._library.get(name)
        if found is not None:
            return found
        try:
            found = dataclasses.replace(library_material(name), name=name)
        except InputError:
            own = itertools.islice(self.materials, 1000)  # a hint, not a search of every name
            hint = closest_names(name, [*own, *LIBRARY])
            msg = (
                f"unknown material {quoted(name)}: not among the case's {len(self.materials):,} "
                f"materials nor the library's {len(LIBRARY)}{hint}"
            )
            raise InputError("material", msg) from None
        self._library[name] = found
        return found

    def section(self, entry: Any) -> Section:
        """The solver's section of a declared one."""
        cls = type(entry)
        values: dict[str, Any] = {}
        for name in cls.__struct_fields__:
            if name == "walls":
                walls = entry.walls
                values[name] = tuple(self._wall(number, wall) for number, wall in enumerate(walls))
                continue
            if name == "points":
                values[name] = tuple(self._point(n, point) for n, point in enumerate(entry.points))
                continue
            if name == "outer":
                values[name] = self._boundary(name, entry.outer)
                continue
            if name == "holes":
                holes = entry.holes or ()
                values[name] = tuple(
                    self._boundary(f"holes[{number}]", hole) for number, hole in enumerate(holes)
                )
                continue
            if name == "path":
                values.update(
                    path=entry.path,
                    file=self._drawing_file(entry.path),
                    scale=self.convert.factor(declared.BoundaryPoint, "x"),
                )
                continue
            value = self.convert.si(entry, name)
            if value is not None:
                values[name] = value
        section = solver_sections()[cls](**values)
        if section.warping_constant > 0.0:
            self.warps = True
        return section

    def _point(self, number: int, entry: declared.MidlinePoint) -> Any:
        from workbench.solver.warping_sections import MidlinePoint  # noqa: PLC0415 - open only

        si = self.convert.si
        try:
            return MidlinePoint(si(entry, "x"), si(entry, "y"), si(entry, "thickness"))
        except InputError as error:
            raise within(f"points[{number}]", error) from None

    def _boundary(self, field: str, points: list[declared.BoundaryPoint]) -> Points:
        """A boundary's points in SI, ``((x, y), ...)``; a number beyond SI's range named."""
        factor = self.convert.factor(declared.BoundaryPoint, "x")
        with np.errstate(over="ignore"):  # checked right after
            values = np.array([(point.x, point.y) for point in points], dtype=float) * factor
        if not np.isfinite(values).all():
            number, axis = np.argwhere(~np.isfinite(values))[0]
            name = "xy"[axis]
            raw = getattr(points[number], name)
            msg = f"must be a finite number: {raw:g} is beyond the range of numbers in SI"
            raise InputError(f"{field}[{number}].{name}", msg)
        return tuple(map(tuple, values.tolist()))

    def _drawing_file(self, path: str) -> str:
        """A drawing's path resolved against the folder of the case file read."""
        drawing = pathlib.Path(path)
        if drawing.is_absolute():
            return str(drawing)
        folder = case_folder.get()
        if folder is None:
            msg = (
                f"{quoted(path)} is relative to the case file's folder, and this case was not "
                "read from a file: give the drawing's full path"
            )
            raise InputError("path", msg)
        return str(pathlib.Path(folder) / drawing)

    def _wall(self, number: int, entry: declared.Wall) -> Wall:
        from workbench.solver.thin_walls import Wall  # noqa: PLC0415 - thin walls only

        try:
            return Wall(self.convert.si(entry, "length"), self.convert.si(entry, "thickness"))
        except InputError as error:
            raise within(f"walls[{number}]", error) from None

    def _layer(self, number: int, entry: declared.Layer) -> Layer:
        try:
            material = self.material(entry.material)
            try:
                return Layer(material, self.section(entry.section))
            except InputError as error:
                raise within("section", error) from None
        except InputError as error:
            raise within(f"layers[{number}]", error) from None

    def segment(self, entry: declared.Segment) -> Segment:
        """A segment (its errors name fields relative to the segment)."""
        si = self.convert.si
        if entry.layers is UNSET or entry.layers is None:
            material = self.material(entry.material)  # type: ignore[arg-type]
            try:
                section = self.section(entry.section)
            except InputError as error:
                raise within("section", error) from None
            layers: tuple[Layer, ...] = (Layer(material, section),)
        else:
            layers = tuple(self._layer(n, layer) for n, layer in enumerate(entry.layers))
        notch = None
        if entry.notch is not UNSET and entry.notch is not None:
            try:
                notch = Notch(
                    kts=si(entry.notch, "kts"),
                    radius=si(entry.notch, "radius"),
                    notch_sensitivity=si(entry.notch, "notch_sensitivity"),
                    description=declared.value_of(entry.notch, "description"),
                )
            except InputError as error:
                raise within("notch", error) from None
        keyseat, fillet, hole = entry.keyseat, entry.fillet_radius, entry.cross_hole_diameter
        if not isinstance(keyseat, bool):
            keyseat = declared.default_of(declared.Segment, "keyseat")
        return Segment(
            si(entry, "length"),
            layers,
            None if fillet is UNSET or fillet is None else si(entry, "fillet_radius"),
            keyseat,
            None if hole is UNSET or hole is None else si(entry, "cross_hole_diameter"),
            notch,
        )

    def shafts(self) -> tuple[Shaft, ...]:
        shafts = []
        for number, entry in enumerate(self.case.shafts):
            path = f"shafts[{number}]"
            segments = []
            segment = self.segment
            for index, item in enumerate(entry.segments):
                try:
                    segments.append(segment(item))
                except InputError as error:
                    raise within(f"{path}.segments[{index}]", error) from None
            try:
                shafts.append(Shaft(entry.id, tuple(segments)))
            except InputError as error:
                raise within(path, error) from None
        return tuple(shafts)

    def _support(self, entry: declared.Support) -> Support:
        si = self.convert.si
        if declared.given(entry.warping):
            self.warps = True  # checked, and solved, with the sections' warping
        return Support(
            entry.shaft,
            si(entry, "x"),
            declared.value_of(entry, "kind"),
            si(entry, "stiffness"),
            si(entry, "rotation"),
            entry.warping if isinstance(entry.warping, str) else None,
        )

    def _gear_end(self, end: str, entry: declared.GearEnd) -> GearPosition:
        si = self.convert.si
        try:
            return GearPosition(entry.shaft, si(entry, "x"), si(entry, "radius"))
        except InputError as error:
            raise within(end, error) from None

    def _gear(self, entry: declared.Gear) -> GearMesh:
        a, b = self._gear_end("a", entry.a), self._gear_end("b", entry.b)
        return GearMesh(a, b, declared.value_of(entry, "mesh"))

    def _torque(self, entry: declared.Torque) -> PointTorque:
        si = self.convert.si
        if declared.given(entry.torque):
            torque = si(entry, "torque")
        else:
            torque = torque_from_power(si(entry, "power"), si(entry, "speed"))
        return PointTorque(entry.shaft, si(entry, "x"), torque)

    def _distributed(self, entry: declared.DistributedTorque) -> DistributedTorque:
        si = self.convert.si
        return DistributedTorque(
            entry.shaft,
            si(entry, "start"),
            si(entry, "end"),
            si(entry, "intensity_start"),
            si(entry, "intensity_end"),
        )

    def _load_case(self, entry: declared.LoadCase) -> LoadCase:
        value_of = declared.value_of
        torques = build_each(value_of(entry, "torques"), "torques", self._torque)
        distributed = build_each(value_of(entry, "distributed"), "distributed", self._distributed)
        return LoadCase(entry.name, torques, distributed)

    def _disc(self, entry: declared.Disc) -> Disc:
        return Disc(entry.shaft, self.convert.si(entry, "x"), self.convert.si(entry, "inertia"))

    def _speed(self, entry: declared.OperatingSpeed) -> OperatingSpeed:
        return OperatingSpeed(
            entry.name, self.convert.si(entry, "min"), self.convert.si(entry, "max")
        )

    def parts(self) -> dict[str, Any]:
        """Every part of the model but its shafts, as :class:`Model` takes them."""
        case, converter = self.case, self.convert
        value_of = declared.value_of
        design = value_of(case, "design")
        return {
            "supports": build_each(value_of(case, "supports"), "supports", self._support),
            "gears": build_each(value_of(case, "gears"), "gears", self._gear),
            "load_cases": build_each(value_of(case, "load_cases"), "load_cases", self._load_case),
            "combinations": build_each(
                value_of(case, "combinations"),
                "combinations",
                lambda entry: Combination(entry.name, tuple(entry.factors.items())),
            ),
            "title": value_of(case, "title"),
            "materials": tuple(self.materials.values()),
            "units": converter.units,
            "design": design_criteria(design, converter) if design is not None else None,
            "discs": build_each(value_of(case, "discs"), "discs", self._disc),
            "operating_speeds": build_each(
                value_of(case, "operating_speeds"), "operating_speeds", self._speed
            ),
        }

    def model(self) -> Model:
        """The whole model (its own checks name fields by their paths)."""
        shafts = self.shafts()
        return Model(shafts=shafts, **self.parts())


@contextlib.contextmanager
def building(case: declared.CaseFile) -> Iterator[ModelBuilder]:
    """A builder for the parts of a case, with messages quoting values in the file's units.

    Raises
    ------
    InputError
        On a unit or a material of the case the model refuses, naming the field.
    """
    units = unit_system(declared.value_of(case, "units"))
    token = display_units.set(units)  # messages quote values in the file's own units
    try:
        yield ModelBuilder(case, Converter(units))
    finally:
        display_units.reset(token)


def build_model(case: declared.CaseFile) -> Model:
    """The SI model of a validated case file.

    Parameters
    ----------
    case
        The decoded case file, in its own units (:mod:`workbench.case.load`).

    Returns
    -------
    Model
        The model, with ``units`` set to the file's unit system.

    Raises
    ------
    InputError
        On any value, reference or position the model refuses, naming the field.
    """
    collecting = gc.isenabled()
    # Millions of new objects and no cycles among them: the cyclic collector would only rescan
    # the growing heap again and again (a third of the building time at 10⁵ segments).
    gc.disable()
    try:
        with building(case) as builder:
            return builder.model()
    finally:
        if collecting:
            gc.enable()


# --- the case file of a model --------------------------------------------------------------


def _boundary_entry(points: Points, convert: Converter) -> list[declared.BoundaryPoint]:
    factor = convert.factor(declared.BoundaryPoint, "x")
    return [declared.BoundaryPoint(x=x / factor, y=y / factor) for x, y in points]


def _section_entry(section: Section, convert: Converter) -> Any:
    from workbench.solver.polygon_sections import DrawingSection, PolygonSection  # noqa: PLC0415

    cls = declared.SHAPES[section.shape]
    points = getattr(section, "points", None)
    if points is not None:
        entries = [convert.entry(declared.MidlinePoint, point) for point in points]
        return convert.entry(cls, section, points=entries)
    if isinstance(section, PolygonSection):
        holes = [_boundary_entry(hole, convert) for hole in section.holes]
        return cls(outer=_boundary_entry(section.outer, convert), holes=holes or UNSET)
    if isinstance(section, DrawingSection):
        return cls(path=section.path)
    walls = getattr(section, "walls", None)
    if walls is None:
        return convert.entry(cls, section)
    return convert.entry(cls, section, walls=[convert.entry(declared.Wall, w) for w in walls])


def _segment_entry(segment: Segment, convert: Converter) -> declared.Segment:
    layers: Any = [
        declared.Layer(material=layer.material.name, section=_section_entry(layer.section, convert))
        for layer in segment.layers
    ]
    single = len(layers) == 1
    notch = segment.notch
    return convert.entry(
        declared.Segment,
        segment,
        material=layers[0].material if single else UNSET,
        section=layers[0].section if single else UNSET,
        layers=UNSET if single else layers,
        notch=UNSET if notch is None else convert.entry(declared.Notch, notch),
    )


def _speed_entry(speed: OperatingSpeed, convert: Converter) -> declared.OperatingSpeed:
    # The model names the band's ends minimum and maximum; the case file min and max.
    file_value = convert.file_value
    return declared.OperatingSpeed(
        name=speed.name,
        min=file_value(declared.OperatingSpeed, "min", speed.minimum),
        max=file_value(declared.OperatingSpeed, "max", speed.maximum),
    )


def case_file_of(model: Model, units: UnitSystem | None = None) -> declared.CaseFile:
    """The declared case file of a model, in ``units`` (default: the model's own).

    Parameters
    ----------
    model
        The model.
    units
        Units to write the numbers in.
    """
    units = units or model.units
    convert = Converter(units)
    entry = convert.entry
    materials = {material.name: entry(declared.Material, material) for material in model.materials}
    return declared.CaseFile(
        title=model.title,
        units=UNSET if units == SI else declared.Units(**units.as_dict()),
        materials=materials,
        shafts=[
            declared.Shaft(
                id=shaft.id, segments=[_segment_entry(s, convert) for s in shaft.segments]
            )
            for shaft in model.shafts
        ],
        supports=[entry(declared.Support, support) for support in model.supports],
        gears=[
            entry(
                declared.Gear,
                gear,
                a=entry(declared.GearEnd, gear.a),
                b=entry(declared.GearEnd, gear.b),
            )
            for gear in model.gears
        ],
        load_cases=[
            entry(
                declared.LoadCase,
                case,
                torques=[entry(declared.Torque, torque) for torque in case.torques],
                distributed=[entry(declared.DistributedTorque, load) for load in case.distributed],
            )
            for case in model.load_cases
        ],
        combinations=[
            declared.Combination(name=combination.name, factors=dict(combination.factors))
            for combination in model.combinations
        ],
        design=UNSET if model.design is None else design_section(model.design, convert),
        discs=[entry(declared.Disc, disc) for disc in model.discs],
        operating_speeds=[_speed_entry(speed, convert) for speed in model.operating_speeds],
    )
