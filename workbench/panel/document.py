"""The case document the panel edits: a case file's JSON in the panel's units, and its paths.

The panel never holds mechanics of its own. It edits this document (plain JSON values, exactly
as a case file would hold them) and hands it to :func:`workbench.solver.io.parse_case`, which
validates it and builds the SI model. A field is addressed by a *path*, a tuple of keys and list
indices, written the way the solver names fields in its errors
(``shafts[0].segments[1].section.inner_diameter``).
"""

from __future__ import annotations

import copy
import re
from collections.abc import Iterator, Mapping
from typing import Any

from workbench.case.declaration import key_quantities
from workbench.case.units import SI_ENGINEERING, UnitSystem, us_customary

Path = tuple[str | int, ...]

#: The unit systems the panel offers, by key.
UNIT_CHOICES: dict[str, str] = {
    "si": "SI: mm, N·m, MPa, deg",
    "us": "US: in, lbf·in, psi, deg",
}

_BASE = ("length", "torque", "stress", "angle")


def unit_system(key: str) -> UnitSystem:
    """The unit system of a :data:`UNIT_CHOICES` key."""
    return us_customary() if key == "us" else SI_ENGINEERING


def unit_key(units: UnitSystem) -> str | None:
    """The :data:`UNIT_CHOICES` key whose shown units match ``units``, else ``None``."""
    for key in UNIT_CHOICES:
        system = unit_system(key)
        if all(getattr(system, name) == getattr(units, name) for name in _BASE):
            return key
    return None


def pretty_unit(label: str) -> str:
    """A unit string as people write it: ``N*m`` → ``N·m``, ``**2`` → ``²``."""
    return label.replace("**2", "²").replace("^2", "²").replace("*", "·")


def unit_label(units: UnitSystem, quantity: str) -> str:
    """The pretty unit of a quantity in a unit system."""
    return pretty_unit(units.label(quantity))


def path_text(path: Path) -> str:
    """``("shafts", 0, "segments", 1, "length")`` → ``shafts[0].segments[1].length``."""
    text = ""
    for key in path:
        if isinstance(key, int):
            text += f"[{key}]"
        else:
            text = f"{text}.{key}" if text else key
    return text


_PATH_PART = re.compile(r"\[(\d+)\]|([^.\[\]]+)")


def parse_path(text: str) -> Path:
    """``shafts[0].segments[1].length`` → ``("shafts", 0, "segments", 1, "length")``."""
    return tuple(
        int(index) if index else key for index, key in _PATH_PART.findall(text) if index or key
    )


def css_name(path: Path) -> str:
    """A CSS class fragment for a path: ``shafts-0-segments-1-length``."""
    return re.sub(r"[^A-Za-z0-9_]+", "-", "-".join(str(key) for key in path)).strip("-")


_DOUBLED = re.compile(r"(\b[a-z_]+\[\d+\])\.\1(?=[.\[]|$)")


def normal_field(field: str) -> str:
    """An error's field path with a repeated step folded (``gears[0].gears[0].a`` → ``gears[0].a``).

    Older solver builds named the list item of some errors twice (gear ends, combination
    factors); the panel needs the path of the field itself to put the message beside it.
    """
    return _DOUBLED.sub(r"\1", field)


#: How a list item is named in plain words, by the key of its list.
_ITEM_WORDS = {
    "shafts": "shaft",
    "segments": "segment",
    "layers": "layer",
    "supports": "support",
    "gears": "gear mesh",
    "load_cases": "load case",
    "torques": "torque",
    "distributed": "distributed torque",
    "combinations": "combination",
    "rotation_limits": "rotation limit",
    "discs": "disc",
    "operating_speeds": "running-speed band",
    "extremes": "result",
}
_QUIET_KEYS = {"section"}
_NAMED_BY = {
    "shafts": "id",
    "load_cases": "name",
    "combinations": "name",
    "operating_speeds": "name",
}


def field_words(path: Path, document: Any = None) -> str:
    """A field path in plain words: ``shaft auger · segment 1 · inner diameter``.

    Items of a list are named by their id or name when ``document`` holds them (the path must
    then start at the document's top), else by their number.
    """
    words: list[str] = []
    node = document
    for number, key in enumerate(path):
        if isinstance(key, int):
            continue
        following = path[number + 1] if number + 1 < len(path) else None
        if isinstance(following, int):
            item = get_at(node, (key, following)) if node is not None else None
            name = item.get(_NAMED_BY[key]) if key in _NAMED_BY and isinstance(item, dict) else None
            label = _ITEM_WORDS.get(key, key.replace("_", " "))
            words.append(f"{label} '{name}'" if name else f"{label} {following}")
            node = item
            continue
        if key == "factors":
            node = node.get(key) if isinstance(node, dict) else None
            continue
        if isinstance(node, dict) and isinstance(node.get(key), (dict, list)):
            node = node.get(key)
        else:
            node = None
        if key not in _QUIET_KEYS or number == len(path) - 1:
            if path[number - 1 : number] == ("factors",):
                words.append(f"factor on '{key}'")
            elif key in ("a", "b") and "gears" in path:
                words.append(f"end {key}")
            else:
                words.append(key.replace("_", " "))
    return " · ".join(words)


_QUOTED = re.compile(r"('[^']*'|\"[^\"]*\")")
_SNAKE = re.compile(r"\b[a-z]+(?:_[a-z0-9]+)+\b")


def plain_words(message: str) -> str:
    """A solver message as people read it: field names in words, units written out.

    ``must be smaller than outer_diameter (80 mm ≥ 70 mm)`` →
    ``must be smaller than outer diameter (80 mm ≥ 70 mm)``. Quoted names (ids, options) stay as
    they are.
    """
    parts = _QUOTED.split(message)
    for number in range(0, len(parts), 2):
        text = _SNAKE.sub(lambda match: match.group(0).replace("_", " "), parts[number])
        parts[number] = pretty_unit(text)
    return "".join(parts)


def get_at(document: Any, path: Path) -> Any:
    """The value at ``path`` (``None`` when a key is absent)."""
    node = document
    for key in path:
        if isinstance(key, int):
            if not isinstance(node, list) or key >= len(node):
                return None
            node = node[key]
        else:
            if not isinstance(node, dict):
                return None
            node = node.get(key)
    return node


def set_at(document: Any, path: Path, value: Any) -> None:
    """Set (or, with ``value`` None, remove) the value at ``path``, making objects on the way."""
    node = document
    for key in path[:-1]:
        if isinstance(key, str) and key not in node:
            node[key] = {}
        node = node[key]
    last = path[-1]
    if value is None and isinstance(last, str):
        node.pop(last, None)
    else:
        node[last] = value


def clone(document: Any) -> Any:
    """A deep copy (the solver gets its own, so later edits never reach a solved model)."""
    return copy.deepcopy(document)


#: The quantity of each numeric key the panel shows, for its unit label: the case-file
#: declaration's, looked up when asked.
KEY_QUANTITY: Mapping[str, str | None] = key_quantities()


def numeric_inputs(document: dict[str, Any]) -> Iterator[tuple[Path, str]]:
    """Every numeric input of a case document a sweep may vary, as (path, readable label)."""
    units = document.get("units")
    system = UnitSystem(**units) if units else UnitSystem()

    def label(key: str) -> str:
        quantity = KEY_QUANTITY.get(key)
        unit = f" [{unit_label(system, quantity)}]" if quantity else ""
        return key.replace("_", " ") + unit

    for s, shaft in enumerate(document.get("shafts", [])):
        for k, segment in enumerate(shaft.get("segments", [])):
            where = f"{shaft.get('id')} segment {k}"
            base: Path = ("shafts", s, "segments", k)
            for key in ("length", "fillet_radius"):
                if isinstance(segment.get(key), (int, float)):
                    yield (*base, key), f"{where} · {label(key)}"
            section = segment.get("section")
            if isinstance(section, dict):
                for key, value in section.items():
                    if isinstance(value, (int, float)) and not isinstance(value, bool):
                        yield (*base, "section", key), f"{where} · {label(key)}"
    for n, support in enumerate(document.get("supports", [])):
        for key in ("x", "stiffness", "rotation"):
            if isinstance(support.get(key), (int, float)):
                yield ("supports", n, key), f"support {n} · {label(key)}"
    for n, gear in enumerate(document.get("gears", [])):
        for end in ("a", "b"):
            for key in ("x", "radius"):
                if isinstance(gear.get(end, {}).get(key), (int, float)):
                    yield ("gears", n, end, key), f"gear {n}{end} · {label(key)}"
    for c, case in enumerate(document.get("load_cases", [])):
        for n, torque in enumerate(case.get("torques", [])):
            for key in ("torque", "x"):
                if isinstance(torque.get(key), (int, float)):
                    yield (
                        ("load_cases", c, "torques", n, key),
                        f"{case.get('name')} torque {n} · {label(key)}",
                    )
        for n, load in enumerate(case.get("distributed", [])):
            for key in ("intensity_start", "intensity_end", "start", "end"):
                if isinstance(load.get(key), (int, float)):
                    yield (
                        ("load_cases", c, "distributed", n, key),
                        f"{case.get('name')} distributed {n} · {label(key)}",
                    )
    for n, disc in enumerate(document.get("discs") or []):
        for key in ("inertia", "x"):
            if isinstance(disc.get(key), (int, float)):
                yield ("discs", n, key), f"disc {n} · {label(key)}"
    for name, material in (document.get("materials") or {}).items():
        if isinstance(material, dict) and isinstance(material.get("density"), (int, float)):
            yield ("materials", name, "density"), f"{name} · {label('density')}"
    design = document.get("design") or {}
    for key in ("factor_of_safety", "allowable_shear_stress", "max_twist_rate"):
        if isinstance(design.get(key), (int, float)):
            yield ("design", key), f"design · {label(key)}"
