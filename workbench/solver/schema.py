"""The case file's JSON Schema (draft 2020-12), printed by ``workbench schema``.

Section shapes are generated from the same dataclasses the loader builds, so the schema cannot
drift from the shapes the program accepts. The loader remains the authority on values (inner
smaller than outer, points on the shaft, known names); the schema describes structure and types.
"""

from __future__ import annotations

import dataclasses
import typing
from typing import Any

from workbench.case.design import (
    FATIGUE_CRITERIA,
    MEAN_CONCENTRATIONS,
    RELIABILITIES,
    SHEAR_CRITERIA,
    SURFACE_FINISHES,
)
from workbench.case.units import UnitSystem
from workbench.solver.io import SHAPES

_NUMBER = {"type": "number"}
_POSITIVE = {"type": "number", "exclusiveMinimum": 0}
_NAME = {"type": "string", "minLength": 1}


def _object(
    properties: dict[str, Any], required: list[str], description: str = ""
) -> dict[str, Any]:
    schema: dict[str, Any] = {
        "type": "object",
        "properties": properties,
        "required": required,
        "additionalProperties": False,
    }
    if description:
        schema["description"] = description
    return schema


def _dataclass_schema(cls: type, extra: dict[str, Any]) -> dict[str, Any]:
    hints = typing.get_type_hints(cls)
    properties: dict[str, Any] = dict(extra)
    required = list(extra)
    for field in dataclasses.fields(cls):
        if not field.init:
            continue
        hint = hints[field.name]
        if typing.get_origin(hint) is tuple:
            (part, _) = typing.get_args(hint)
            properties[field.name] = {
                "type": "array",
                "minItems": 1,
                "items": _dataclass_schema(part, {}),
            }
        else:
            quantity = field.metadata.get("quantity", "length")
            minimum = _NUMBER if field.name == "bore" else _POSITIVE
            properties[field.name] = dict(minimum, description=f"{quantity} units")
        if field.default is dataclasses.MISSING and field.default_factory is dataclasses.MISSING:
            required.append(field.name)
    return _object(properties, required)


def case_schema() -> dict[str, Any]:
    """The JSON Schema of a case file, version 1 with its extensions."""
    sections = [
        _dataclass_schema(cls, {"shape": {"const": shape}}) for shape, cls in SHAPES.items()
    ]
    section = {"oneOf": sections}
    layer = _object({"material": _NAME, "section": section}, ["material", "section"])
    notch = _object(
        {
            "kts": {"type": "number", "minimum": 1},
            "radius": _POSITIVE,
            "notch_sensitivity": {"type": "number", "minimum": 0, "maximum": 1},
            "description": {"type": "string"},
        },
        ["kts"],
        "a stress raiser with a stated Kts on the segment's nominal stress 16T/(πd³); "
        "radius (length units) or notch_sensitivity, not both",
    )
    notch["not"] = {"required": ["radius", "notch_sensitivity"]}
    segment_common = {
        "length": _POSITIVE,
        "fillet_radius": _POSITIVE,
        "keyseat": {"type": "boolean"},
        "cross_hole_diameter": _POSITIVE,
        "notch": notch,
    }
    segment = {
        "oneOf": [
            _object(
                {**segment_common, "material": _NAME, "section": section},
                ["length", "material", "section"],
            ),
            _object(
                {**segment_common, "layers": {"type": "array", "minItems": 1, "items": layer}},
                ["length", "layers"],
                "bonded coaxial members acting together",
            ),
        ]
    }
    point = {"shaft": _NAME, "x": _NUMBER}
    torque = {
        "oneOf": [
            _object({**point, "torque": _NUMBER}, ["shaft", "x", "torque"]),
            _object(
                {**point, "power": _NUMBER, "speed": _POSITIVE},
                ["shaft", "x", "power", "speed"],
                "torque = power/speed, in the power and speed units",
            ),
        ]
    }
    distributed = _object(
        {
            "shaft": _NAME,
            "start": _NUMBER,
            "end": _NUMBER,
            "intensity_start": _NUMBER,
            "intensity_end": _NUMBER,
        },
        ["shaft", "start", "end", "intensity_start", "intensity_end"],
        "linearly varying distributed torque, torque/length units",
    )
    unit_keys = [f.name for f in dataclasses.fields(UnitSystem) if not f.name.startswith("_")]
    material = _object(
        {
            "shear_modulus": _POSITIVE,
            "yield_strength": _POSITIVE,
            "ultimate_strength": _POSITIVE,
            "elastic_modulus": _POSITIVE,
            "poisson_ratio": {"type": "number", "exclusiveMinimum": -1, "maximum": 0.5},
            "density": _POSITIVE,
            "source": {"type": "string"},
        },
        ["shear_modulus"],
        "stress units; density in density units",
    )
    gear_end = _object(
        {"shaft": _NAME, "x": _NUMBER, "radius": _POSITIVE}, ["shaft", "x", "radius"]
    )
    fatigue_common = {
        "finish": {"enum": list(SURFACE_FINISHES)},
        "reliability": {"enum": list(RELIABILITIES)},
        "temperature": {"type": ["number", "null"], "exclusiveMinimum": 0},
        "criterion": {"enum": list(FATIGUE_CRITERIA)},
        "factor_of_safety": {"type": "number", "minimum": 1},
        "endurance_limit": {"type": ["number", "null"], "exclusiveMinimum": 0},
        "mean_concentration": {"enum": list(MEAN_CONCENTRATIONS)},
    }
    design = _object(
        {
            "factor_of_safety": {"type": "number", "minimum": 1},
            "shear_criterion": {"enum": list(SHEAR_CRITERIA)},
            "keyway": {"type": "boolean"},
            "allowable_shear_stress": {"type": ["number", "null"], "exclusiveMinimum": 0},
            "max_twist_rate": {
                "oneOf": [
                    {"type": ["number", "null"], "exclusiveMinimum": 0},
                    {"enum": ["machine-shaft", "line-shaft", "twenty-diameters"]},
                ]
            },
            "frequency_margin": {"type": "number", "minimum": 0, "exclusiveMaximum": 1},
            "modal_elements_per_segment": {"type": "integer", "minimum": 1},
            "modal_max_element_length": {"type": ["number", "null"], "exclusiveMinimum": 0},
            "fatigue": {
                "oneOf": [
                    _object(
                        {
                            **fatigue_common,
                            "extremes": {
                                "type": "array",
                                "minItems": 2,
                                "maxItems": 2,
                                "items": _NAME,
                            },
                        },
                        ["extremes"],
                    ),
                    _object(
                        {**fatigue_common, "mean": _NAME, "alternating": _NAME},
                        ["mean", "alternating"],
                    ),
                ]
            },
            "rotation_limits": {
                "type": "array",
                "items": _object(
                    {"shaft": _NAME, "start": _NUMBER, "end": _NUMBER, "limit": _POSITIVE},
                    ["shaft", "start", "end", "limit"],
                ),
            },
        },
        [],
        "design criteria for the checks; max_twist_rate in angle/length units",
    )
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "workbench case file, version 1",
        "type": "object",
        "additionalProperties": False,
        "required": ["shafts", "load_cases"],
        "properties": {
            "title": {"type": "string"},
            "units": _object({key: {"type": "string", "minLength": 1} for key in unit_keys}, []),
            "materials": {"type": "object", "additionalProperties": material},
            "shafts": {
                "type": "array",
                "minItems": 1,
                "items": _object(
                    {"id": _NAME, "segments": {"type": "array", "minItems": 1, "items": segment}},
                    ["id", "segments"],
                ),
            },
            "supports": {
                "type": "array",
                "items": _object(
                    {
                        **point,
                        "kind": {"enum": ["fixed", "spring"]},
                        "stiffness": _POSITIVE,
                        "rotation": _NUMBER,
                    },
                    ["shaft", "x"],
                ),
            },
            "gears": {
                "type": "array",
                "items": _object(
                    {"a": gear_end, "b": gear_end, "mesh": {"enum": ["external", "internal"]}},
                    ["a", "b"],
                ),
            },
            "load_cases": {
                "type": "array",
                "minItems": 1,
                "items": _object(
                    {
                        "name": _NAME,
                        "torques": {"type": "array", "items": torque},
                        "distributed": {"type": "array", "items": distributed},
                    },
                    ["name"],
                ),
            },
            "combinations": {
                "type": "array",
                "items": _object(
                    {"name": _NAME, "factors": {"type": "object", "additionalProperties": _NUMBER}},
                    ["name", "factors"],
                ),
            },
            "design": design,
            "discs": {
                "type": "array",
                "items": _object(
                    {**point, "inertia": _POSITIVE},
                    ["shaft", "x", "inertia"],
                    "rigid disc; inertia in inertia units (mass moment of inertia)",
                ),
            },
            "operating_speeds": {
                "type": "array",
                "items": _object(
                    {"name": _NAME, "min": dict(_NUMBER, minimum=0), "max": _POSITIVE},
                    ["name", "min", "max"],
                    "running-speed band in speed units, min ≤ max",
                ),
            },
        },
    }
