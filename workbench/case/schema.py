"""The case file's JSON Schema (draft 2020-12), printed by ``workbench schema``.

Generated from the declaration (``msgspec.json.schema``), then completed from the same
declaration with what msgspec does not write: each number's quantity in its description, and the
alternatives ("material and section, or layers") as ``oneOf``/``not``. The loader remains the
authority on what needs the model to judge (inner smaller than outer, points on the shaft, known
names); the schema describes structure, types and bounds.
"""

from __future__ import annotations

from typing import Any

import msgspec

from workbench.case.declaration import (
    Alternatives,
    CaseFile,
    declared_structs,
    field_metas,
    quantity_of,
)


def _alternatives_schema(alternatives: Alternatives) -> dict[str, Any]:
    """``oneOf`` (exactly one group) or ``not`` (never two groups) for a struct's alternatives."""
    groups = alternatives.groups
    if not alternatives.required:
        return {
            "not": {
                "anyOf": [
                    {"required": [first[0], second[0]]}
                    for number, first in enumerate(groups)
                    for second in groups[number + 1 :]
                ]
            }
        }
    options = []
    for group in groups:
        others = [name for other in groups if other is not group for name in other]
        options.append(
            {"required": list(group), "not": {"anyOf": [{"required": [n]} for n in others]}}
        )
    return {"oneOf": options}


def _without_null_branch(schema: dict[str, Any]) -> dict[str, Any]:
    """``anyOf [X, null]`` as one schema, so a validator's errors point inside X.

    A number, string or list takes ``null`` in its ``type``; an object (a ``$ref``) is written
    without it: the loader reads ``null`` as a key left out, the schema asks for the object.
    """
    branches = schema.get("anyOf")
    if not branches or {"type": "null"} not in branches or len(branches) != 2:
        return schema
    (kept,) = [branch for branch in branches if branch != {"type": "null"}]
    merged = {**{k: v for k, v in schema.items() if k != "anyOf"}, **kept}
    if isinstance(kept.get("type"), str):
        merged["type"] = [kept["type"], "null"]
    return merged


def _complete(definition: dict[str, Any], cls: type) -> None:
    """Add quantities to the descriptions, and the alternatives, to one struct's schema."""
    properties = definition.get("properties", {})
    for name, meta in field_metas(cls).items():
        if name not in properties:
            continue
        properties[name] = _without_null_branch(properties[name])
        if meta is None:
            continue
        quantity = quantity_of(cls, name)
        unit = f" [{quantity.replace('_', ' ')} units]" if quantity else ""
        properties[name]["description"] = f"{meta.description}{unit}"
    alternatives = getattr(cls, "alternatives", None)
    if isinstance(alternatives, Alternatives):
        definition.update(_alternatives_schema(alternatives))


def case_schema() -> dict[str, Any]:
    """The JSON Schema of a case file, version 1 with its extensions."""
    generated = msgspec.json.schema(CaseFile)
    definitions = generated["$defs"]
    for cls in declared_structs():
        _complete(definitions[cls.__name__], cls)
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "workbench case file, version 1",
        **generated,
    }
