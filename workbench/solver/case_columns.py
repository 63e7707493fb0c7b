"""The columns of a decoded case file: no Python object per segment.

:func:`case_system` reads a validated :class:`~workbench.case.declaration.CaseFile` (file
units) straight into the :class:`~workbench.solver.columns.CaseTable` (SI) the array core
solves: each shaft's segments from the columns the loader took of their keys
(:func:`~workbench.case.segment_keys.segment_keys`, read afresh if the case was edited since),
read and checked by :class:`~workbench.solver.shaft_columns.ShaftReader`. Supports, gears, loads
and the design section are few: they are built as the model builds them and checked against the
shafts' lengths by the model's own :class:`~workbench.solver.parts.References`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.case import declaration as declared
from workbench.case.segment_keys import segment_keys
from workbench.case.units import UnitSystem
from workbench.solver.build import building
from workbench.solver.columns import CaseTable, SegmentTable, system_columns
from workbench.solver.parts import References, shaft_index
from workbench.solver.shaft_columns import SHAPE_CODES, ShaftColumns, ShaftReader


@dataclass(frozen=True)
class CaseSystem:
    """A case file's system as columns, with what its results are reported in.

    Parameters
    ----------
    table
        The system (SI).
    units
        The case file's units.
    title
        The case's title.
    warps
        Whether a section warps or a support states ``warping``: the table then lacks the
        warping columns, and the case is solved from its model.
    """

    table: CaseTable
    units: UnitSystem
    title: str
    warps: bool = False


def case_system(case: declared.CaseFile) -> CaseSystem:
    """The columns of a validated case file, checked as building its model checks them.

    Parameters
    ----------
    case
        The decoded case file (:mod:`workbench.case.load`), in its own units.

    Returns
    -------
    CaseSystem
        Its table (one variant) with its units and title.

    Raises
    ------
    InputError
        On the first value, reference or position building the model refuses, with the same
        field path and message.

    Examples
    --------
    >>> from workbench.case.load import case_file_from_document
    >>> case = case_file_from_document({"units": {"length": "mm"},
    ...     "materials": {"s": {"shear_modulus": 80e9}},
    ...     "shafts": [{"id": "a", "segments": [{"length": 1000, "material": "s",
    ...         "section": {"shape": "solid", "diameter": 50}}]}],
    ...     "supports": [{"shaft": "a", "x": 0}],
    ...     "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1000, "torque": 100}]}]})
    >>> case_system(case).table.segments.outer_diameter_start
    array([[0.05]])
    """
    with building(case) as builder:
        shafts = [
            ShaftReader(builder, number, entry, keys).read()
            for number, (entry, keys) in enumerate(
                zip(case.shafts, segment_keys(case), strict=True)
            )
        ]
        parts = builder.parts()
        index = shaft_index(entry.id for entry in case.shafts)
        used = {id(material): material for shaft in shafts for material in shaft.materials}
        design = parts["design"]
        References(
            index, [shaft.total_length for shaft in shafts], [len(shaft.length) for shaft in shafts]
        ).check(
            supports=parts["supports"],
            gears=parts["gears"],
            load_cases=parts["load_cases"],
            combinations=parts["combinations"],
            design=design,
            discs=parts["discs"],
            operating_speeds=parts["operating_speeds"],
            has_density=lambda: any(m.density is not None for m in used.values()),
        )
    table = CaseTable(
        segments=_joined(tuple(entry.id for entry in case.shafts), shafts),
        **system_columns(
            index.__getitem__,
            supports=parts["supports"],
            gears=parts["gears"],
            load_cases=parts["load_cases"],
            combinations=parts["combinations"],
            key_points=design.key_points() if design is not None else [],
        ),
    )
    return CaseSystem(table, parts["units"], parts["title"], builder.warps)


def _joined(shaft_ids: tuple[str, ...], shafts: list[ShaftColumns]) -> SegmentTable:
    """The segment table of every shaft, shaft after shaft."""
    if len(shafts) == 1:
        only = shafts[0]
        length, layer_start, shape, values = (
            only.length,
            only.layer_start,
            only.layer_shape,
            only.layer_values,
        )
    else:
        length = np.concatenate([shaft.length for shaft in shafts])
        offsets = np.cumsum([0] + [shaft.layer_start[-1] for shaft in shafts])
        layer_start = np.concatenate(
            [
                shaft.layer_start[:-1] + offset
                for shaft, offset in zip(shafts, offsets, strict=False)
            ]
            + [offsets[-1:]]
        )
        shape = np.concatenate([shaft.layer_shape for shaft in shafts])
        values = tuple(
            np.concatenate([shaft.layer_values[row] for shaft in shafts]) for row in range(6)
        )
    counts = [len(shaft.length) for shaft in shafts]
    return SegmentTable(
        shaft_ids=shaft_ids,
        shaft_segment_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.intp),
        length=length,
        segment_layer_start=layer_start.astype(np.intp, copy=False),
        layer_shape=shape,
        shear_modulus=values[0],
        outer_diameter_start=values[1],
        outer_diameter_end=values[2],
        inner_diameter=values[3],
        torsion_constant=values[4],
        stress_per_torque=values[5],
    )


__all__ = ["SHAPE_CODES", "CaseSystem", "case_system"]
