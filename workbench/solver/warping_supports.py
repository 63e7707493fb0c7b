"""Supports and the warping of open sections: the stated conditions checked, the unstated warned.

A support's ``warping`` key says whether it holds the warping of an open thin-walled section
(``"restrained"``: θ′ = 0 there) or leaves it (``"free"``). It means something only where a
section that warps (E·Cw > 0) meets the support: on a circular or closed member the key is
refused with the reason, not ignored. Where a section that warps meets a fixed support that
states nothing, the results take the warping as free and say so: :data:`UNSTATED_RESTRAINT`
is the one wording of that warning, which the command line, the panel and the record show.

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V (end conditions of
   restrained torsion: warping held, θ′ = 0, or free, B = 0).
"""

from __future__ import annotations

import numpy as np

from workbench.case.errors import InputError
from workbench.solver.columns import WARPING_UNSTATED, BoolArray, CaseTable, FloatArray

#: The warning where a section that warps meets a fixed support stating no ``warping``.
UNSTATED_RESTRAINT = "warping restraint is not modelled there and may govern"


def support_warping_rigidity(table: CaseTable) -> FloatArray:
    """(n_supports,) the largest E·Cw (N·m⁴) of the segments a support touches (0: none warps).

    A support at a segment boundary touches the segments on both sides; positions are compared
    with the mesh's tolerance of each shaft's length.
    """
    segments = table.segments
    rigidity = segments.warping_rigidity
    n_supports = len(table.support_x)
    if rigidity is None or not n_supports:
        return np.zeros(n_supports)
    length = segments.length[0]
    start_row = segments.shaft_segment_start
    ends = np.cumsum(length)
    touching = np.zeros(n_supports)
    for number in range(n_supports):  # a loop over supports (few)
        shaft = int(table.support_shaft[number])
        first, stop = int(start_row[shaft]), int(start_row[shaft + 1])
        offset = ends[first - 1] if first else 0.0
        shaft_ends = ends[first:stop] - offset
        shaft_starts = shaft_ends - length[first:stop]
        tolerance = 1e-9 * float(shaft_ends[-1])
        x = float(table.support_x[number])
        near = (shaft_starts <= x + tolerance) & (shaft_ends >= x - tolerance)
        touching[number] = float(rigidity[0, first:stop][near].max(initial=0.0))
    return touching


def check_warping_supports(table: CaseTable) -> None:
    """Refuse a support that states ``warping`` where no section that warps meets it.

    Raises
    ------
    InputError
        On ``supports[n].warping``, saying why the condition has no meaning there.
    """
    stated = np.flatnonzero(table.support_warping != WARPING_UNSTATED)
    if not stated.size:
        return
    rigidity = support_warping_rigidity(table)
    silent = stated[rigidity[stated] <= 0.0]
    if silent.size:
        msg = (
            "the member there does not warp (a circular or closed section, or an open one of "
            "warping constant 0), so no warping condition applies; leave the key out"
        )
        raise InputError(f"supports[{int(silent[0])}].warping", msg)


def unstated_restraints(table: CaseTable) -> BoolArray:
    """(n_supports,) fixed supports stating no ``warping`` where a section that warps meets them."""
    unstated = table.support_fixed & (table.support_warping == WARPING_UNSTATED)
    if not unstated.any():
        return unstated
    return unstated & (support_warping_rigidity(table) > 0.0)


def unstated_restraint_warning(table: CaseTable) -> str | None:
    """The one-line warning naming the fixed supports of :func:`unstated_restraints`, or ``None``."""
    numbers = np.flatnonzero(unstated_restraints(table))
    if not numbers.size:
        return None
    where = ", ".join(f"supports[{int(n)}]" for n in numbers[:3])
    more = f" and {numbers.size - 3} more" if numbers.size > 3 else ""
    return (
        f"{where}{more}: a section that warps (E·Cw > 0) meets a fixed support stating no "
        f'"warping"; it is taken as free: {UNSTATED_RESTRAINT}'
    )


__all__ = [
    "UNSTATED_RESTRAINT",
    "check_warping_supports",
    "support_warping_rigidity",
    "unstated_restraint_warning",
    "unstated_restraints",
]
