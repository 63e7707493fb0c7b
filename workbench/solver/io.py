"""Case files: read, validate and convert to a SI :class:`Model`; write back atomically.

A case file is UTF-8 JSON (contract: version 1, ``DEVELOPERS.md``). Every number is in the units
its ``units`` object names (SI base units by default). Reading checks every key: unknown keys,
unknown names and impossible values are :class:`InputError` naming the field by its path, e.g.
``shafts[0].segments[1].section.inner_diameter: must be smaller than outer_diameter (30 ≥ 20 mm)``.
"""

from __future__ import annotations

import dataclasses
import functools
import json
import os
import tempfile
import typing
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import Any

from workbench.case.design import design_to_dict, parse_design
from workbench.case.errors import InputError
from workbench.case.materials import Material, library_material
from workbench.case.reader import ObjectReader, kind_of
from workbench.case.units import SI, UnitSystem, display_units
from workbench.case.validate import field_path, join_path
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
from workbench.solver.noncircular import NONCIRCULAR_SHAPES
from workbench.solver.sections import Section

#: Every cross-section shape a case file may name, by its ``shape`` key.
SHAPES: dict[str, type[Section]] = {
    "solid": circular.SolidCircle,
    "tube": circular.Tube,
    "tapered": circular.TaperedCircle,
    **NONCIRCULAR_SHAPES,
}

_MATERIAL_KEYS = {
    "shear_modulus": "stress",
    "yield_strength": "stress",
    "ultimate_strength": "stress",
    "elastic_modulus": "stress",
    "poisson_ratio": None,
    "density": "density",
}


def parse_units(data: Any) -> UnitSystem:
    """Build the unit system from a case file's ``units`` object (absent: SI)."""
    if data is None:
        return SI
    known = [f.name for f in dataclasses.fields(UnitSystem) if not f.name.startswith("_")]
    reader = ObjectReader(data, "units", known, SI)
    return UnitSystem(**{key: reader.text(key) for key in known if key in data})


def _section_field_quantity(field: dataclasses.Field[Any]) -> str:
    return str(field.metadata.get("quantity", "length"))


@functools.cache
def _type_hints(cls: type) -> dict[str, Any]:
    # Resolving the string annotations is most of the cost of reading a section; do it once.
    return typing.get_type_hints(cls)


def _build_dataclass(cls: type, data: Any, path: str, units: UnitSystem, skip: set[str]) -> Any:
    """Build a section (or a part of one) from JSON by its dataclass fields."""
    hints = _type_hints(cls)
    own = [f for f in dataclasses.fields(cls) if f.init and f.name not in skip]
    reader = ObjectReader(data, path, [f.name for f in own] + sorted(skip), units)
    values: dict[str, Any] = {}
    for field in own:
        hint = hints[field.name]
        required = (
            field.default is dataclasses.MISSING and field.default_factory is dataclasses.MISSING
        )
        if typing.get_origin(hint) is tuple:
            (part_class, _) = typing.get_args(hint)
            values[field.name] = tuple(
                _build_dataclass(part_class, item, item_path, units, set())
                for item_path, item in reader.items(field.name, required=required)
            )
            if required and not values[field.name]:
                raise InputError(reader.at(field.name), "needs at least one entry")
        elif required or reader.has(field.name):
            values[field.name] = reader.number(field.name, _section_field_quantity(field))
    with field_path(path):
        return cls(**values)


def _parse_section(data: Any, path: str, units: UnitSystem) -> Section:
    if not isinstance(data, dict):
        raise InputError(path, f"must be an object, not {kind_of(data)}")
    shape = data.get("shape")
    if shape not in SHAPES:
        known = ", ".join(SHAPES)
        raise InputError(join_path(path, "shape"), f"unknown shape {shape!r} (known: {known})")
    section: Section = _build_dataclass(SHAPES[shape], data, path, units, {"shape"})
    return section


def _parse_material(name: str, data: Any, path: str, units: UnitSystem) -> Material:
    reader = ObjectReader(data, path, [*_MATERIAL_KEYS, "source"], units)
    values = {
        key: reader.optional_number(key, quantity) for key, quantity in _MATERIAL_KEYS.items()
    }
    if values["shear_modulus"] is None:
        raise InputError(reader.at("shear_modulus"), "is required")
    with field_path(path):
        return Material(name=name, source=reader.text("source", ""), **values)  # type: ignore[arg-type]


def _parse_segment(
    data: Any, path: str, units: UnitSystem, find_material: Callable[[str, str], Material]
) -> Segment:
    reader = ObjectReader(
        data,
        path,
        [
            "length",
            "material",
            "section",
            "layers",
            "fillet_radius",
            "keyseat",
            "cross_hole_diameter",
            "notch",
        ],
        units,
    )
    length = reader.number("length", "length")
    fillet = reader.optional_number("fillet_radius", "length")
    keyseat = reader.flag("keyseat", False)
    hole = reader.optional_number("cross_hole_diameter", "length")
    notch = _parse_notch(data["notch"], reader.at("notch"), units) if reader.has("notch") else None
    if reader.has("layers"):
        if reader.has("material") or reader.has("section"):
            msg = "give either material and section, or layers, not both"
            raise InputError(reader.at("layers"), msg)
        layers = []
        for layer_path, item in reader.items("layers"):
            layer = ObjectReader(item, layer_path, ["material", "section"], units)
            layers.append(
                Layer(
                    find_material(layer.text("material"), layer.at("material")),
                    _parse_section(item.get("section"), layer.at("section"), units),
                )
            )
        if not layers:
            raise InputError(reader.at("layers"), "needs at least one layer")
    else:
        material = find_material(reader.text("material"), reader.at("material"))
        layers = [Layer(material, _parse_section(data.get("section"), reader.at("section"), units))]
    with field_path(path):
        return Segment(length, tuple(layers), fillet, keyseat, hole, notch)


def _parse_notch(data: Any, path: str, units: UnitSystem) -> Notch:
    reader = ObjectReader(data, path, ["kts", "radius", "notch_sensitivity", "description"], units)
    with field_path(path):
        return Notch(
            kts=reader.number("kts", None),
            radius=reader.optional_number("radius", "length"),
            notch_sensitivity=reader.optional_number("notch_sensitivity", None),
            description=reader.text("description", ""),
        )


def _parse_point(data: Any, path: str, units: UnitSystem) -> GearPosition:
    reader = ObjectReader(data, path, ["shaft", "x", "radius"], units)
    with field_path(path):
        return GearPosition(
            reader.text("shaft"), reader.number("x", "length"), reader.number("radius", "length")
        )


def _parse_torque(data: Any, path: str, units: UnitSystem) -> PointTorque:
    reader = ObjectReader(data, path, ["shaft", "x", "torque", "power", "speed"], units)
    if reader.has("power") or reader.has("speed"):
        if reader.has("torque"):
            raise InputError(reader.at("torque"), "give either torque, or power and speed")
        power = reader.number("power", "power")
        speed = reader.number("speed", "speed")
        if speed <= 0.0:
            raise InputError(reader.at("speed"), f"must be greater than zero, not {speed:g}")
        torque = power / speed  # T = P/ω; the sign of the power gives the torque's sense
    else:
        torque = reader.number("torque", "torque")
    with field_path(path):
        return PointTorque(reader.text("shaft"), reader.number("x", "length"), torque)


def parse_case(data: Any) -> Model:
    """Validate a decoded case file and build its SI model.

    Parameters
    ----------
    data
        The decoded JSON document.

    Returns
    -------
    Model
        The model, with ``units`` set to the file's unit system.

    Raises
    ------
    InputError
        On any invalid key, value or reference, naming the field.
    """
    top_keys = [
        "title",
        "units",
        "materials",
        "shafts",
        "supports",
        "gears",
        "load_cases",
        "combinations",
        "design",
        "discs",
        "operating_speeds",
    ]
    if not isinstance(data, dict):
        raise InputError("", f"a case file must be a JSON object, not {kind_of(data)}")
    units = parse_units(data.get("units"))
    token = display_units.set(units)
    try:
        return _parse_with_units(data, units, top_keys)
    finally:
        display_units.reset(token)


def _parse_with_units(data: dict[str, Any], units: UnitSystem, top_keys: list[str]) -> Model:
    top = ObjectReader(data, "", top_keys, units)
    materials: dict[str, Material] = {}
    raw_materials = data.get("materials")
    raw_materials = {} if raw_materials is None else raw_materials
    if not isinstance(raw_materials, dict):
        raise InputError("materials", f"must be an object, not {kind_of(raw_materials)}")
    for name, item in raw_materials.items():
        materials[name] = _parse_material(name, item, f"materials.{name}", units)

    def find_material(name: str, path: str) -> Material:
        if name in materials:
            return materials[name]
        try:
            # Keep the library key as the name, so the case saves and reloads by it.
            return dataclasses.replace(library_material(name), name=name)
        except InputError as error:
            own = ", ".join(sorted(materials)) or "none"
            msg = f"unknown material {name!r}: not defined in materials (defined: {own}); {error.message}"
            raise InputError(path, msg) from None

    shafts = []
    for path, item in top.items("shafts", required=True):
        shaft = ObjectReader(item, path, ["id", "segments"], units)
        segments = tuple(
            _parse_segment(segment, segment_path, units, find_material)
            for segment_path, segment in shaft.items("segments", required=True)
        )
        with field_path(path):
            shafts.append(Shaft(shaft.text("id"), segments))

    supports = []
    for path, item in top.items("supports"):
        support = ObjectReader(item, path, ["shaft", "x", "kind", "stiffness", "rotation"], units)
        with field_path(path):
            supports.append(
                Support(
                    support.text("shaft"),
                    support.number("x", "length"),
                    support.text("kind", "fixed"),  # type: ignore[arg-type]
                    support.optional_number("stiffness", "stiffness"),
                    support.number("rotation", "angle", 0.0),
                )
            )

    gears = []
    for path, item in top.items("gears"):
        gear = ObjectReader(item, path, ["a", "b", "mesh"], units)
        with field_path(path):
            gears.append(
                GearMesh(
                    _parse_point(item.get("a"), gear.at("a"), units),
                    _parse_point(item.get("b"), gear.at("b"), units),
                    gear.text("mesh", "external"),  # type: ignore[arg-type]
                )
            )

    load_cases = []
    for path, item in top.items("load_cases", required=True):
        case = ObjectReader(item, path, ["name", "torques", "distributed"], units)
        torques = tuple(_parse_torque(t, p, units) for p, t in case.items("torques"))
        distributed = []
        for load_path, load_item in case.items("distributed"):
            load = ObjectReader(
                load_item,
                load_path,
                ["shaft", "start", "end", "intensity_start", "intensity_end"],
                units,
            )
            with field_path(load_path):
                distributed.append(
                    DistributedTorque(
                        load.text("shaft"),
                        load.number("start", "length"),
                        load.number("end", "length"),
                        load.number("intensity_start", "distributed_torque"),
                        load.number("intensity_end", "distributed_torque"),
                    )
                )
        with field_path(path):
            load_cases.append(LoadCase(case.text("name"), torques, tuple(distributed)))

    combinations = []
    for path, item in top.items("combinations"):
        combination = ObjectReader(item, path, ["name", "factors"], units)
        factors = item.get("factors")
        if not isinstance(factors, dict):
            raise InputError(
                combination.at("factors"), f"must be an object, not {kind_of(factors)}"
            )
        factor_reader = ObjectReader(factors, combination.at("factors"), factors.keys(), units)
        with field_path(path):
            combinations.append(
                Combination(
                    combination.text("name"),
                    tuple((name, factor_reader.number(name, None)) for name in factors),
                )
            )

    discs, operating_speeds = _parse_vibration(top, units)

    design = None
    if data.get("design") is not None:
        design = parse_design(data["design"], units)

    return Model(
        shafts=tuple(shafts),
        supports=tuple(supports),
        gears=tuple(gears),
        load_cases=tuple(load_cases),
        combinations=tuple(combinations),
        title=top.text("title", ""),
        materials=tuple(materials.values()),
        units=units,
        design=design,
        discs=discs,
        operating_speeds=operating_speeds,
    )


def _parse_vibration(
    top: ObjectReader, units: UnitSystem
) -> tuple[tuple[Disc, ...], tuple[OperatingSpeed, ...]]:
    """The ``discs`` and ``operating_speeds`` of a case (torsional vibration)."""
    discs = []
    for path, item in top.items("discs"):
        disc = ObjectReader(item, path, ["shaft", "x", "inertia"], units)
        # Read outside field_path: the reader's errors already carry the full path.
        values = (disc.text("shaft"), disc.number("x", "length"), disc.number("inertia", "inertia"))
        with field_path(path):
            discs.append(Disc(*values))
    speeds = []
    for path, item in top.items("operating_speeds"):
        speed = ObjectReader(item, path, ["name", "min", "max"], units)
        name = speed.text("name")
        low, high = speed.number("min", "speed"), speed.number("max", "speed")
        with field_path(path):
            speeds.append(OperatingSpeed(name, low, high))
    return tuple(discs), tuple(speeds)


def decode_case_text(text: str, source: str = "case") -> Any:
    """Decode case-file text, turning a JSON syntax error into an :class:`InputError`."""
    try:
        return json.loads(text)
    except json.JSONDecodeError as error:
        msg = f"not valid JSON: {error.msg} (line {error.lineno}, column {error.colno})"
        raise InputError(source, msg) from None


def load_case(path: str | os.PathLike[str]) -> Model:
    """Read and validate a case file.

    Parameters
    ----------
    path
        The JSON file.

    Raises
    ------
    InputError
        When the file cannot be read, is not JSON, or is not a valid case.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as error:
        raise InputError(str(path), f"cannot read the case file: {error}") from None
    return parse_case(decode_case_text(text, str(path)))


# --- writing -------------------------------------------------------------------------------


def _number(value: float) -> float | int:
    """Round-trip-safe JSON number: drop conversion noise (12 significant digits)."""
    rounded = float(f"{value:.12g}")
    return int(rounded) if rounded.is_integer() and abs(rounded) < 1e15 else rounded


def _notch_to_dict(notch: Notch, length: Callable[[float], float | int]) -> dict[str, Any]:
    entry: dict[str, Any] = {"kts": notch.kts}
    if notch.radius is not None:
        entry["radius"] = length(notch.radius)
    if notch.notch_sensitivity is not None:
        entry["notch_sensitivity"] = notch.notch_sensitivity
    if notch.description:
        entry["description"] = notch.description
    return entry


def _section_to_dict(section: Section, units: UnitSystem) -> dict[str, Any]:
    out: dict[str, Any] = {"shape": section.shape}
    for field in dataclasses.fields(section):
        value = getattr(section, field.name)
        if isinstance(value, tuple):
            out[field.name] = [
                {
                    part.name: _number(units.from_si(getattr(item, part.name), "length"))
                    for part in dataclasses.fields(item)
                }
                for item in value
            ]
        elif value is not None:
            if field.default is not dataclasses.MISSING and value == field.default:
                continue
            out[field.name] = _number(units.from_si(value, _section_field_quantity(field)))
    return out


def case_to_dict(model: Model, units: UnitSystem | None = None) -> dict[str, Any]:
    """The case file of a model, in ``units`` (default: the model's own).

    Parameters
    ----------
    model
        The model.
    units
        Units to write the numbers in.
    """
    units = units or model.units
    out: dict[str, Any] = {}
    if model.title:
        out["title"] = model.title
    if units != SI:
        out["units"] = units.as_dict()
    materials: dict[str, Any] = {}
    for material in model.materials:
        entry: dict[str, Any] = {
            key: _number(units.from_si(value, quantity) if quantity else value)
            for key, quantity in _MATERIAL_KEYS.items()
            if (value := getattr(material, key)) is not None
        }
        if material.source:
            entry["source"] = material.source
        materials[material.name] = entry
    if materials:
        out["materials"] = materials

    def length(value: float) -> float | int:
        return _number(units.from_si(value, "length"))

    shafts = []
    for shaft in model.shafts:
        segments = []
        for segment in shaft.segments:
            entry = {"length": length(segment.length)}
            if len(segment.layers) == 1:
                entry["material"] = segment.layers[0].material.name
                entry["section"] = _section_to_dict(segment.layers[0].section, units)
            else:
                entry["layers"] = [
                    {
                        "material": layer.material.name,
                        "section": _section_to_dict(layer.section, units),
                    }
                    for layer in segment.layers
                ]
            if segment.fillet_radius is not None:
                entry["fillet_radius"] = length(segment.fillet_radius)
            if segment.keyseat:
                entry["keyseat"] = True
            if segment.cross_hole_diameter is not None:
                entry["cross_hole_diameter"] = length(segment.cross_hole_diameter)
            if segment.notch is not None:
                entry["notch"] = _notch_to_dict(segment.notch, length)
            segments.append(entry)
        shafts.append({"id": shaft.id, "segments": segments})
    out["shafts"] = shafts
    supports = []
    for support in model.supports:
        entry = {"shaft": support.shaft, "x": length(support.x), "kind": support.kind}
        if support.stiffness is not None:
            entry["stiffness"] = _number(units.from_si(support.stiffness, "stiffness"))
        if support.rotation:
            entry["rotation"] = _number(units.from_si(support.rotation, "angle"))
        supports.append(entry)
    out["supports"] = supports
    if model.gears:
        out["gears"] = []
        for gear in model.gears:
            entry = {
                end: {"shaft": point.shaft, "x": length(point.x), "radius": length(point.radius)}
                for end, point in (("a", gear.a), ("b", gear.b))
            }
            if gear.mesh != "external":
                entry["mesh"] = gear.mesh
            out["gears"].append(entry)
    out["load_cases"] = [_load_case_to_dict(case, units) for case in model.load_cases]
    if model.combinations:
        out["combinations"] = [
            {"name": combination.name, "factors": {name: f for name, f in combination.factors}}
            for combination in model.combinations
        ]
    if model.design is not None:
        out["design"] = design_to_dict(model.design, units)
    if model.discs:
        out["discs"] = [
            {
                "shaft": disc.shaft,
                "x": length(disc.x),
                "inertia": _number(units.from_si(disc.inertia, "inertia")),
            }
            for disc in model.discs
        ]
    if model.operating_speeds:
        out["operating_speeds"] = [
            {
                "name": speed.name,
                "min": _number(units.from_si(speed.minimum, "speed")),
                "max": _number(units.from_si(speed.maximum, "speed")),
            }
            for speed in model.operating_speeds
        ]
    return out


def _load_case_to_dict(case: LoadCase, units: UnitSystem) -> dict[str, Any]:
    entry: dict[str, Any] = {"name": case.name}
    if case.torques:
        entry["torques"] = [
            {
                "shaft": torque.shaft,
                "x": _number(units.from_si(torque.x, "length")),
                "torque": _number(units.from_si(torque.torque, "torque")),
            }
            for torque in case.torques
        ]
    if case.distributed:
        entry["distributed"] = [
            {
                "shaft": load.shaft,
                "start": _number(units.from_si(load.start, "length")),
                "end": _number(units.from_si(load.end, "length")),
                "intensity_start": _number(
                    units.from_si(load.intensity_start, "distributed_torque")
                ),
                "intensity_end": _number(units.from_si(load.intensity_end, "distributed_torque")),
            }
            for load in case.distributed
        ]
    return entry


def write_json_atomic(
    path: str | os.PathLike[str], document: Mapping[str, Any] | list[Any]
) -> None:
    """Write JSON to ``path`` atomically: a temporary file in the same folder, then a rename.

    A crash or a full disk mid-write leaves the old file whole.
    """
    path = Path(path)
    text = json.dumps(document, indent=2, ensure_ascii=False) + "\n"
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as stream:
            stream.write(text)
            stream.flush()
            os.fsync(stream.fileno())
        if path.exists():
            os.chmod(temporary, path.stat().st_mode & 0o777)
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def save_case(model: Model, path: str | os.PathLike[str], units: UnitSystem | None = None) -> None:
    """Write a model as a case file, atomically (temporary file + rename)."""
    write_json_atomic(path, case_to_dict(model, units))
