"""The segments' keys as columns, taken once from a decoded case and kept beside it.

At a million segments each pass over the decoded segment objects costs 20-35 ms. The loader
walks them anyway, to check that each segment gives material and section or layers, and the
solver needs the same keys as arrays: :func:`take_segment_keys` reads them once, in the file's
units, while the loader checks the alternatives, and keeps them with the case.
:func:`segment_keys` hands them on, or reads them afresh when the case may have changed since
they were taken: after an edit of any case object (:func:`~workbench.case.declaration.edit_count`)
or when a list of shafts or segments no longer holds the objects it held.

Kept per shaft (:class:`ShaftKeys`): the lengths, each segment's section type, the material
every segment names (when one does), which optional keys some segment gives, and the numbers
of the flat sections (every key a number) over the segments of each type. Nothing under
``layers``, notches or sections with walls is kept: lists an edit could change in place; whoever
needs them reads the objects.
"""

from __future__ import annotations

import functools
import itertools
import operator
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import msgspec
import numpy as np

from workbench.case import declaration as declared

#: The section types a segment may name, in declaration order: ``section_type`` indexes it.
SECTION_TYPES: tuple[type, ...] = tuple(declared.SHAPES.values())
#: The ``section_type`` of a segment that names no section (it gives layers).
NO_SECTION = -1
#: The optional keys of a segment :attr:`ShaftKeys.given` tells about.
OPTIONAL_KEYS = ("layers", "fillet_radius", "cross_hole_diameter", "notch")

_TYPE_INDEX: dict[type, int] = {
    **{cls: number for number, cls in enumerate(SECTION_TYPES)},
    type(msgspec.UNSET): NO_SECTION,
    type(None): NO_SECTION,
}
_SECTION = operator.attrgetter("section")
_MATERIAL = operator.attrgetter("material")
#: Where :func:`take_segment_keys` keeps what it took (an attribute never written to a file).
_KEPT = "_segment_keys"

FloatArray = np.ndarray[Any, np.dtype[np.float64]]


@functools.cache
def _flat_numbers(cls: type) -> tuple[str, ...] | None:
    """The keys of a section type when every one of them is a number, else ``None``."""
    numbers = {name for owner, name in declared.declared_numbers() if owner is cls}
    fields = tuple(item.name for item in msgspec.structs.fields(cls))
    return fields if numbers.issuperset(fields) else None


@functools.cache
def required_keys(cls: type) -> frozenset[str]:
    """The keys of a declared object that are never left out."""
    return frozenset(item.name for item in msgspec.structs.fields(cls) if item.required)


@dataclass(frozen=True)
class ShaftKeys:
    """One shaft's segment keys as read-only columns, in the file's units.

    Parameters
    ----------
    length
        (n_segments,) each segment's length (file length unit).
    section_type
        (n_segments,) int8: index of the segment's section type in :data:`SECTION_TYPES`,
        :data:`NO_SECTION` where it names none.
    material
        The material every segment names, or ``None`` when they do not all name one.
    given
        Which of :data:`OPTIONAL_KEYS` some segment gives.
    section_numbers
        (type, key) → the key of every segment whose section is of that flat type (all its keys
        numbers), in segment order; NaN where left out (file units).
    """

    length: FloatArray
    section_type: np.ndarray[Any, np.dtype[np.int8]]
    material: str | None
    given: frozenset[str]
    section_numbers: Mapping[tuple[type, str], FloatArray]

    def sections_complete(self) -> bool:
        """Whether every segment names one material and a section and none gives layers."""
        return (
            self.material is not None
            and "layers" not in self.given
            and (not len(self.section_type) or int(self.section_type.min()) != NO_SECTION)
        )


def read_shaft_keys(segments: Sequence[declared.Segment]) -> ShaftKeys:
    """The keys of one shaft's decoded segments as columns: a few passes over them, in C.

    Parameters
    ----------
    segments
        The shaft's segments, as decoded.
    """
    count = len(segments)
    length = np.fromiter(map(operator.attrgetter("length"), segments), float, count)
    sections: list[Any] = list(map(_SECTION, segments))
    types = map(_TYPE_INDEX.__getitem__, map(type, sections))
    section_type = np.fromiter(types, np.int8, count)
    first = segments[0].material if count else None
    material = first if isinstance(first, str) else None
    same = material is not None and operator.countOf(map(_MATERIAL, segments), first) == count
    given = frozenset(
        name for name in OPTIONAL_KEYS if any(map(operator.attrgetter(name), segments))
    )
    numbers: dict[tuple[type, str], FloatArray] = {}
    present = np.flatnonzero(np.bincount(section_type[section_type >= 0], minlength=1))
    for number in present.tolist():  # a loop over the section types present
        cls = SECTION_TYPES[number]
        names = _flat_numbers(cls)
        if names is None:
            continue
        if len(present) == 1 and not (section_type == NO_SECTION).any():
            members: Sequence[Any] = sections
        else:
            members = list(itertools.compress(sections, (section_type == number).tolist()))
        for name in names:
            numbers[cls, name] = _numbers(members, cls, name)
    for array in (length, section_type, *numbers.values()):
        array.setflags(write=False)
    return ShaftKeys(length, section_type, material if same else None, given, numbers)


def _numbers(members: Sequence[Any], cls: type, name: str) -> FloatArray:
    """Key ``name`` of every member: one pass; NaN where an optional key is left out."""
    values = map(operator.attrgetter(name), members)
    if name in required_keys(cls):
        return np.fromiter(values, float, len(members))
    given = declared.given
    return np.fromiter((v if given(v) else np.nan for v in values), float, len(members))


@dataclass(frozen=True)
class _Kept:
    """Keys taken from a case, with what tells whether the case is still as it was."""

    edits: int
    shafts: list[declared.Shaft]  # a copy of the case's list of shafts
    segments: tuple[list[declared.Segment], ...]  # a copy of each shaft's list of segments
    keys: tuple[ShaftKeys, ...]

    def fresh(self, case: declared.CaseFile) -> bool:
        """Whether nothing has been set since, and the lists hold the objects they held.

        Comparing a list with its copy is a pass of identity tests (equal objects, if one was
        put in place of another, hold equal keys).
        """
        return (
            declared.edit_count() == self.edits
            and case.shafts == self.shafts
            and all(
                shaft.segments == held
                for shaft, held in zip(case.shafts, self.segments, strict=True)
            )
        )


def take_segment_keys(case: declared.CaseFile) -> tuple[ShaftKeys, ...]:
    """Read each shaft's segment keys and keep them with ``case`` (see :func:`segment_keys`)."""
    keys = tuple(read_shaft_keys(shaft.segments) for shaft in case.shafts)
    kept = _Kept(
        declared.edit_count(),
        list(case.shafts),
        tuple(list(shaft.segments) for shaft in case.shafts),
        keys,
    )
    msgspec.Struct.__setattr__(case, _KEPT, kept)  # not an edit of the case's keys
    return keys


def segment_keys(case: declared.CaseFile) -> tuple[ShaftKeys, ...]:
    """Each shaft's segment keys: those the loader kept while still fresh, else read now.

    Parameters
    ----------
    case
        A decoded case file.
    """
    kept: _Kept | None = getattr(case, _KEPT, None)
    if kept is not None and kept.fresh(case):
        return kept.keys
    return tuple(read_shaft_keys(shaft.segments) for shaft in case.shafts)


__all__ = [
    "NO_SECTION",
    "OPTIONAL_KEYS",
    "SECTION_TYPES",
    "ShaftKeys",
    "read_shaft_keys",
    "required_keys",
    "segment_keys",
    "take_segment_keys",
]
