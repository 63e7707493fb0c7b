"""Reading a decoded JSON object of a case file: typed values by key, unknown keys refused.

Every error is an :class:`InputError` naming the field by its path in the case file.
"""

from __future__ import annotations

import math
import typing
from collections.abc import Iterator
from typing import Any

from workbench.case.errors import InputError
from workbench.case.units import UnitSystem
from workbench.case.validate import join_path


class ObjectReader:
    """A JSON object being read, with its path, that refuses unknown keys."""

    def __init__(self, data: Any, path: str, allowed: typing.Iterable[str], units: UnitSystem):
        if not isinstance(data, dict):
            raise InputError(path, f"must be an object, not {kind_of(data)}")
        allowed = set(allowed)
        for key in data:
            if key not in allowed:
                expected = ", ".join(sorted(allowed))
                raise InputError(join_path(path, str(key)), f"unknown key (expected: {expected})")
        self.data, self.path, self.units = data, path, units

    def at(self, key: str) -> str:
        return join_path(self.path, key)

    def has(self, key: str) -> bool:
        return self.data.get(key) is not None

    def number(self, key: str, quantity: str | None, default: float | None = None) -> float:
        if key not in self.data or self.data[key] is None:
            if default is None:
                raise InputError(self.at(key), "is required")
            return default
        value = self.data[key]
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(self.at(key), f"must be a number, not {kind_of(value)}")
        if not math.isfinite(value):
            raise InputError(self.at(key), f"must be a finite number, not {value}")
        return float(self.units.to_si(float(value), quantity)) if quantity else float(value)

    def optional_number(self, key: str, quantity: str | None) -> float | None:
        if self.data.get(key) is None:
            return None
        return self.number(key, quantity)

    def text(self, key: str, default: str | None = None) -> str:
        value = self.data.get(key, default)
        if value is None:
            raise InputError(self.at(key), "is required")
        if not isinstance(value, str):
            raise InputError(self.at(key), f"must be a string, not {kind_of(value)}")
        return value

    def flag(self, key: str, default: bool) -> bool:
        value = self.data.get(key, default)
        if not isinstance(value, bool):
            raise InputError(self.at(key), f"must be true or false, not {kind_of(value)}")
        return value

    def items(self, key: str, required: bool = False) -> Iterator[tuple[str, Any]]:
        value = self.data.get(key)
        if value is None:
            if required:
                raise InputError(self.at(key), "is required")
            return
        if not isinstance(value, list):
            raise InputError(self.at(key), f"must be a list, not {kind_of(value)}")
        for number, item in enumerate(value):
            yield f"{self.at(key)}[{number}]", item


def kind_of(value: Any) -> str:
    """A few words naming the JSON kind of ``value`` for a message ("a list", "null")."""
    names = {dict: "an object", list: "a list", str: "a string", bool: "true/false"}
    if value is None:
        return "null"
    return names.get(type(value), f"{value!r}")
