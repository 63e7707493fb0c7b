"""Case files out: a declared case as the JSON document of a case file, and the atomic write.

Keys are written in their declared order; a key holding its declared default is left out unless
the declaration says it is always written, and so are empty lists and objects; numbers with a
unit drop the noise of unit conversion (12 significant digits, whole numbers as integers).
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping
from typing import Any

from workbench.case.declaration import CaseFile, Keys, extra_of, given
from workbench.case.files import atomic_file


def round_trip_number(value: float) -> float | int:
    """Round-trip-safe JSON number: drop conversion noise (12 significant digits)."""
    rounded = float(f"{value:.12g}")
    return int(rounded) if rounded.is_integer() and abs(rounded) < 1e15 else rounded


def _value(value: Any, quantity: str | None) -> Any:
    if isinstance(value, Keys):
        return entry_document(value)
    if isinstance(value, list):
        return [_value(item, quantity) for item in value]
    if isinstance(value, dict):
        return {name: _value(item, quantity) for name, item in value.items()}
    if quantity is not None and isinstance(value, float):
        return round_trip_number(value)
    return value


def entry_document(entry: Keys) -> dict[str, Any]:
    """The JSON object of one declared object of a case file (its tag first, for a shape)."""
    cls = type(entry)
    out: dict[str, Any] = {}
    config = cls.__struct_config__
    if config.tag_field is not None:
        out[config.tag_field] = config.tag
    for name in cls.__struct_fields__:
        value = getattr(entry, name)
        if not given(value):
            continue
        extra = extra_of(cls, name)
        if not extra.get("always"):
            if "default" in extra and value == extra["default"]:
                continue
            if isinstance(value, list | dict) and not value:
                continue
        out[name] = _value(value, extra.get("quantity"))
    return out


def case_document(case: CaseFile) -> dict[str, Any]:
    """The JSON document of a case file (plain dicts, lists, strings and numbers)."""
    return entry_document(case)


def write_json_atomic(
    path: str | os.PathLike[str], document: Mapping[str, Any] | list[Any]
) -> None:
    """Write JSON to ``path`` atomically (:func:`~workbench.case.files.atomic_file`).

    A crash or a full disk mid-write leaves the old file whole; the temporaries of a writer
    killed mid-write are removed by the next write of the same file.
    """
    text = json.dumps(document, indent=2, ensure_ascii=False) + "\n"
    with atomic_file(path) as stream:
        stream.write(text.encode("utf-8"))


def save_case_file(case: CaseFile, path: str | os.PathLike[str]) -> None:
    """Write a declared case as a case file, atomically (temporary file + rename)."""
    write_json_atomic(path, case_document(case))
