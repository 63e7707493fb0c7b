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
from typing import Any

from workbench.case.display import readout_symbol
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
    """The printed unit a person reads a quantity in (``N·m``, ``kg/m³``, ``°/m``; none for a ratio)."""
    return readout_symbol(units, quantity)


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


def structure(document: Any) -> Any:
    """The fields a document has, without its numbers or its units table.

    Two documents of the same structure are edited by the same fields: a unit switch that keeps
    it re-shows the fields in place (the case file's keys may come back in another order).
    """
    if isinstance(document, dict):
        return {k: structure(v) for k, v in document.items() if k != "units"}
    if isinstance(document, list):
        return [structure(v) for v in document]
    if isinstance(document, (int, float)) and not isinstance(document, bool):
        return 0
    return document


def clone(document: Any) -> Any:
    """A deep copy (the solver gets its own, so later edits never reach a solved model)."""
    return copy.deepcopy(document)


def remove_item(document: Any, path: Path, index: int, *, drop_empty: bool = False) -> None:
    """Remove item ``index`` of the list at ``path`` (and, with ``drop_empty``, a list left empty)."""
    items = get_at(document, path)
    items.pop(index)
    if drop_empty and not items:
        get_at(document, path[:-1]).pop(path[-1])


def rename(document: dict[str, Any], path: Path, name: str) -> None:
    """Set the name at ``path``; a load case's new name follows into the combinations' factors."""
    old = get_at(document, path)
    set_at(document, path, name)
    if path[0] == "load_cases":
        for combination in document.get("combinations", []):
            factors = combination.get("factors", {})
            if old in factors:
                factors[name] = factors.pop(old)


def result_names(document: dict[str, Any]) -> list[Any]:
    """The names of the load cases, then of the combinations (the results, in file order)."""
    return [c.get("name") for c in document.get("load_cases", [])] + [
        c.get("name") for c in document.get("combinations", [])
    ]


def shaft_length(shaft: dict[str, Any]) -> float:
    """The length of a shaft of the document: its segments' lengths added (document units)."""
    return sum(float(segment.get("length", 0)) for segment in shaft.get("segments", []))
