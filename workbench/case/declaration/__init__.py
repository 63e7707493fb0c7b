"""The one declaration of the case file: every key, its type, quantity, default, bounds, meaning.

The structs (msgspec) in :mod:`~workbench.case.declaration.members`,
:mod:`~workbench.case.declaration.shapes` and :mod:`~workbench.case.declaration.criteria` are
the case file. From them come the loader's checks and messages (:mod:`workbench.case.load`),
the saver (:mod:`workbench.case.save`), the JSON Schema (:mod:`workbench.case.schema`), the
panel's units (:func:`key_quantities`), the README's key reference
(:mod:`workbench.case.reference`) and the solver's unit conversions (:mod:`workbench.solver.build`).
"""

import functools
from collections.abc import Iterator, Mapping

from workbench.case.declaration.criteria import (
    COEXISTING_STRESS_ORIGIN,
    DEFAULT_FACTOR_OF_SAFETY,
    DEFAULT_FATIGUE_FACTOR_OF_SAFETY,
    DEFAULT_FREQUENCY_MARGIN,
    DEFAULT_MODAL_ELEMENTS_PER_SEGMENT,
    FATIGUE_CRITERIA,
    MEAN_CONCENTRATIONS,
    RELIABILITIES,
    SHEAR_CRITERIA,
    SURFACE_FINISHES,
    TWIST_RATE_RULES,
    CoexistingStress,
    Design,
    Fatigue,
    RotationLimit,
)
from workbench.case.declaration.keys import (
    MAX_DEPTH,
    MAX_FILE_BYTES,
    MAX_ITEMS,
    MAX_LOAD_CASES,
    MAX_MODAL_ELEMENTS,
    MAX_NUMBER_DIGITS,
    MAX_SEGMENTS,
    MAX_STRING_LENGTH,
    MAX_UNIT_LENGTH,
    POSITION_TOLERANCE,
    QUANTITIES,
    Alternatives,
    Keys,
    Span,
    Unwrapped,
    default_of,
    edit_count,
    extra_of,
    field_metas,
    field_type,
    given,
    quantity_of,
    structs_in,
    value_of,
)
from workbench.case.declaration.members import (
    CaseFile,
    Combination,
    Disc,
    DistributedTorque,
    Gear,
    GearEnd,
    Layer,
    LoadCase,
    Material,
    MeshKind,
    Notch,
    OperatingSpeed,
    Segment,
    Shaft,
    Support,
    SupportKind,
    Torque,
    Units,
    WarpingKind,
)
from workbench.case.declaration.shapes import (
    OPEN_SHAPES,
    SHAPES,
    BoundaryPoint,
    MidlinePoint,
    Section,
    Wall,
)


@functools.cache
def declared_structs() -> tuple[type[Keys], ...]:
    """Every object of the case file, from :class:`CaseFile` down, each once, in key order."""
    found: list[type[Keys]] = []

    def visit(cls: type[Keys]) -> None:
        if cls in found:
            return
        found.append(cls)
        for name in cls.__struct_fields__:
            for inner in structs_in(field_type(cls, name)):
                visit(inner)

    visit(CaseFile)
    return tuple(found)


@functools.cache
def declared_numbers() -> tuple[tuple[type[Keys], str], ...]:
    """(object, key) of every key that holds a number, in declaration order."""
    return tuple(
        (cls, name)
        for cls in declared_structs()
        for name in cls.__struct_fields__
        if {float, int} & set(Unwrapped(field_type(cls, name)).bases)
    )


class _KeyQuantities(Mapping[str, str | None]):
    """Key name → quantity over every declared number (read from the declaration each time)."""

    def _table(self) -> dict[str, str | None]:
        table: dict[str, str | None] = {}
        for cls, name in declared_numbers():
            table.setdefault(name, quantity_of(cls, name))
        return table

    def __getitem__(self, name: str) -> str | None:
        return self._table()[name]

    def __iter__(self) -> Iterator[str]:
        return iter(self._table())

    def __len__(self) -> int:
        return len(self._table())


def key_quantities() -> Mapping[str, str | None]:
    """Each key name of the case file and the quantity its number is measured in (or ``None``).

    A key name means one quantity wherever it appears (``x`` is a length in supports, gears and
    discs alike; a test holds the declaration to this). The mapping reads the declaration on
    every lookup, so it always says what the loader does.
    """
    return _KeyQuantities()


__all__ = [
    "COEXISTING_STRESS_ORIGIN",
    "DEFAULT_FACTOR_OF_SAFETY",
    "DEFAULT_FATIGUE_FACTOR_OF_SAFETY",
    "DEFAULT_FREQUENCY_MARGIN",
    "DEFAULT_MODAL_ELEMENTS_PER_SEGMENT",
    "FATIGUE_CRITERIA",
    "MAX_DEPTH",
    "MAX_FILE_BYTES",
    "MAX_ITEMS",
    "MAX_LOAD_CASES",
    "MAX_MODAL_ELEMENTS",
    "MAX_NUMBER_DIGITS",
    "MAX_SEGMENTS",
    "MAX_STRING_LENGTH",
    "MAX_UNIT_LENGTH",
    "MEAN_CONCENTRATIONS",
    "OPEN_SHAPES",
    "POSITION_TOLERANCE",
    "QUANTITIES",
    "RELIABILITIES",
    "SHAPES",
    "SHEAR_CRITERIA",
    "SURFACE_FINISHES",
    "TWIST_RATE_RULES",
    "Alternatives",
    "BoundaryPoint",
    "CaseFile",
    "CoexistingStress",
    "Combination",
    "Design",
    "Disc",
    "DistributedTorque",
    "Fatigue",
    "Gear",
    "GearEnd",
    "Keys",
    "Layer",
    "LoadCase",
    "Material",
    "MeshKind",
    "MidlinePoint",
    "Notch",
    "OperatingSpeed",
    "RotationLimit",
    "Section",
    "Segment",
    "Shaft",
    "Span",
    "Support",
    "SupportKind",
    "Torque",
    "Units",
    "Unwrapped",
    "Wall",
    "WarpingKind",
    "declared_numbers",
    "declared_structs",
    "default_of",
    "edit_count",
    "extra_of",
    "field_metas",
    "field_type",
    "given",
    "key_quantities",
    "quantity_of",
    "value_of",
]
