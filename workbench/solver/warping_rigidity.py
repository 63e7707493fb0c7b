"""The warping rigidity E·Cw of a shaft's segments, read from its model layers.

Kept apart from the open sections themselves (:mod:`workbench.solver.warping_sections`), so
that taking a model's columns loads no non-circular shape.
"""

from __future__ import annotations

import operator
from typing import Any

import numpy as np
import numpy.typing as npt

from workbench.case.errors import InputError
from workbench.solver.sections import Section


def segment_warping_rigidity(
    layers: list[Any], per_segment: npt.NDArray[np.intp], distinct: list[Section]
) -> npt.NDArray[np.float64] | None:
    """(n_segments,) E·Cw of each segment of a shaft (N·m⁴), ``None`` when none warps.

    ``layers``: the shaft's model layers, segment after segment (``per_segment`` of each);
    ``distinct``: its distinct sections.

    Only when a distinct section warps are the layers' Young's moduli read: a case without open
    sections pays one look at each distinct section.

    Raises
    ------
    InputError
        On the material of a segment whose section warps but which states no Young's modulus.
    """
    if not any(section.warping_constant > 0.0 for section in distinct):
        return None
    constants = np.fromiter(map(_WARPING_CONSTANT, map(_SECTION, layers)), float, len(layers))
    moduli = np.fromiter(
        (np.nan if e is None else e for e in map(_ELASTIC_MODULUS, layers)), float, len(layers)
    )
    missing = np.flatnonzero((constants > 0.0) & np.isnan(moduli))
    if missing.size:
        layer = int(missing[0])
        segment = int(np.searchsorted(np.cumsum(per_segment), layer, side="right"))
        name = layers[layer].material.name
        msg = (
            f"material {name!r} states no elastic_modulus E: the section warps, and restrained "
            "torsion needs its warping rigidity E·Cw"
        )
        raise InputError(f"segments[{segment}].material", msg)
    rigidity = np.where(constants > 0.0, moduli * constants, 0.0)
    return np.add.reduceat(rigidity, np.concatenate([[0], np.cumsum(per_segment)[:-1]]))


_WARPING_CONSTANT = operator.attrgetter("warping_constant")
_ELASTIC_MODULUS = operator.attrgetter("material.elastic_modulus")
_SECTION = operator.attrgetter("section")

__all__ = ["segment_warping_rigidity"]
