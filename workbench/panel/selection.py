"""The parts of the shaft shown that the drawing and the parts list pick: what each is, and where.

A part is an item of the case document that sits on the shaft shown: a segment, a support, one
end of a gear mesh, a point torque or a distributed torque of any load case, a disc. It is named
by its document path (the same path the fields and the solver's messages use), so a part picked
on the drawing, in the list or named by an error is the same thing. Positions are in the
document's length unit, x = 0 at the shaft's start.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.panel.document import Path, field_words, get_at

#: The kinds of part, in the order the parts list shows them.
KINDS = ("segment", "support", "gear", "torque", "distributed", "disc")


@dataclass(frozen=True)
class Part:
    """One part of the shaft shown.

    Attributes
    ----------
    kind
        One of :data:`KINDS`.
    path
        The item's document path (a gear mesh's, for a gear end).
    end
        ``"a"`` or ``"b"``: the end of the mesh on the shaft shown (gears only).
    """

    kind: str
    path: Path
    end: str = ""

    @property
    def key(self) -> str:
        """A short unique text for the part (the parts list's value)."""
        return "/".join(str(step) for step in self.path) + (f"/{self.end}" if self.end else "")


def boundaries(document: dict[str, Any], shaft: int) -> np.ndarray:
    """The segment boundaries of shaft ``shaft`` (document length unit), 0 first."""
    segments = get_at(document, ("shafts", shaft, "segments")) or []
    lengths = np.array([float(s.get("length", 0.0)) for s in segments], dtype=float)
    return np.concatenate([[0.0], np.cumsum(lengths)])


def parts_of(document: dict[str, Any], shaft: int) -> list[Part]:
    """Every part on shaft number ``shaft``, in :data:`KINDS` order, each kind in file order."""
    shafts = document.get("shafts") or []
    if not 0 <= shaft < len(shafts):
        return []
    shaft_id = shafts[shaft].get("id")
    parts = [
        Part("segment", ("shafts", shaft, "segments", k))
        for k in range(len(shafts[shaft].get("segments") or []))
    ]
    parts += [
        Part("support", ("supports", n))
        for n, item in enumerate(document.get("supports") or [])
        if item.get("shaft") == shaft_id
    ]
    for n, gear in enumerate(document.get("gears") or []):
        parts += [
            Part("gear", ("gears", n), end)
            for end in ("a", "b")
            if (gear.get(end) or {}).get("shaft") == shaft_id
        ]
    for kind, key in (("torque", "torques"), ("distributed", "distributed")):
        for c, case in enumerate(document.get("load_cases") or []):
            parts += [
                Part(kind, ("load_cases", c, key, n))
                for n, item in enumerate(case.get(key) or [])
                if item.get("shaft") == shaft_id
            ]
    parts += [
        Part("disc", ("discs", n))
        for n, item in enumerate(document.get("discs") or [])
        if item.get("shaft") == shaft_id
    ]
    return parts


def part_label(part: Part, document: dict[str, Any]) -> str:
    """A part in words, as the parts list shows it (``load case 'jam' · torque 0``)."""
    if part.kind == "segment":
        return field_words(part.path[2:])
    words = field_words(part.path, document)
    return f"{words} · end {part.end}" if part.end else words


def station(part: Part, document: dict[str, Any]) -> float:
    """Where a part sits along its shaft (document length unit): a segment's or a span's middle."""
    item = get_at(document, part.path) or {}
    if part.kind == "segment":
        bounds = boundaries(document, int(part.path[1]))
        k = int(part.path[3])
        return float(0.5 * (bounds[k] + bounds[k + 1]))
    if part.kind == "gear":
        item = item.get(part.end) or {}
    if part.kind == "distributed":
        return 0.5 * (_number(item.get("start")) + _number(item.get("end")))
    return _number(item.get("x"))


def _number(value: Any) -> float:
    return float(value) if isinstance(value, (int, float)) else 0.0


def cases_behind(document: dict[str, Any], result: Any) -> list[int]:
    """The numbers of the load cases a result is made of (itself, or a combination's)."""
    names = [case.get("name") for case in document.get("load_cases") or []]
    if result in names:
        return [names.index(result)]
    for combination in document.get("combinations") or []:
        if combination.get("name") == result:
            return [names.index(n) for n in combination.get("factors") or {} if n in names]
    return []
