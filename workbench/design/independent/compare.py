"""The independent check of a case and its comparison with another solution, number by number.

The other solution comes in as plain arrays (support torques, and T at its own stations), so
that this package never needs the solver's types.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from workbench.case.declaration import CaseFile
from workbench.design.independent.forcemethod import ForceMethod, solve_by_force_method
from workbench.design.independent.reading import FloatArray, read_system

__all__ = ["AGREEMENT_TOLERANCE", "Comparison", "ComparisonRow", "compare", "independent_check"]

#: Relative agreement asked of the two methods: differences over the largest torque of the
#: result (common practice, no source; both are exact methods, so only round-off separates
#: them).
AGREEMENT_TOLERANCE = 1e-9


def independent_check(case: CaseFile) -> ForceMethod:
    """Solve a decoded case by the force method, independently of the stiffness solver.

    Parameters
    ----------
    case
        The decoded, validated case file in its own units (:mod:`workbench.case.load`).

    Returns
    -------
    ForceMethod
        Reactions (N·m), mesh torques (N·m) and T(x) (N·m) of every load case and combination.

    Raises
    ------
    NotCovered
        When the case uses something the check does not cover; the message names it.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.8.
    .. [2] Hibbeler, *Structural Analysis*, 8th ed., Pearson, 2012, ch. 9–10.

    Examples
    --------
    >>> from workbench.case.load import case_file_from_document
    >>> case = case_file_from_document({
    ...     "materials": {"steel": {"shear_modulus": 80e9}},
    ...     "shafts": [{"id": "s", "segments": [
    ...         {"length": 1.0, "material": "steel", "section": {"shape": "solid", "diameter": 0.04}}]}],
    ...     "supports": [{"shaft": "s", "x": 0}, {"shaft": "s", "x": 1.0}],
    ...     "load_cases": [{"name": "T", "torques": [{"shaft": "s", "x": 0.3, "torque": 500}]}]})
    >>> [round(float(r), 9) for r in independent_check(case).reactions[0]]
    [-350.0, -150.0]
    """
    return solve_by_force_method(read_system(case))


@dataclass(frozen=True)
class ComparisonRow:
    """One number by both methods.

    Attributes
    ----------
    result
        Load case or combination.
    quantity
        ``"reaction"`` (of support ``index``) or ``"governing torque"`` (largest |T| on shaft
        ``index``).
    index
        Support or shaft number, from 0 in file order.
    independent, other
        The value by the force method and by the other solution (N·m).
    relative_difference
        For a reaction |a − b|; for a shaft the largest |T_a(x) − T_b(x)| over the other
        solution's stations; either over the largest torque of the result (or the torque k·|r|
        a spring's pre-twist stands for, when larger; 1 N·m when all are 0).
    """

    result: str
    quantity: str
    index: int
    independent: float
    other: float
    relative_difference: float

    @property
    def agrees(self) -> bool:
        """Whether the difference is within :data:`AGREEMENT_TOLERANCE`."""
        return self.relative_difference <= AGREEMENT_TOLERANCE


@dataclass(frozen=True)
class Comparison:
    """The force method beside another solution."""

    solution: ForceMethod
    rows: tuple[ComparisonRow, ...]

    @property
    def worst(self) -> float:
        """The largest relative difference of any row."""
        return max((row.relative_difference for row in self.rows), default=0.0)

    @property
    def agrees(self) -> bool:
        """Whether every row agrees."""
        return all(row.agrees for row in self.rows)


def _station_sides(x: FloatArray) -> FloatArray:
    """Whether each station takes the value just left: the first of a repeated x."""
    return np.concatenate([x[1:] == x[:-1], [False]])


def compare(
    solution: ForceMethod,
    reactions: FloatArray,
    stations: Sequence[Sequence[tuple[FloatArray, FloatArray]]],
) -> Comparison:
    """Set the force method beside another solution of the same case.

    Parameters
    ----------
    solution
        From :func:`independent_check`.
    reactions
        (n_results, n_supports): the other solution's support torques (N·m), same order.
    stations
        For each result, for each shaft, the other solution's (x (m), T (N·m)) at its stations;
        a repeated x holds the value just left, then just right.

    Returns
    -------
    Comparison
        A row per support and per shaft of every result.
    """
    rows: list[ComparisonRow] = []
    for number, name in enumerate(solution.names):
        mine_r = solution.reactions[number]
        theirs_r = np.asarray(reactions[number], dtype=float)
        shafts = []
        for shaft, (given_x, theirs_t) in enumerate(stations[number]):
            x = np.asarray(given_x, dtype=float)
            left = _station_sides(x)
            mine_t = np.where(
                left,
                solution.torque_at(shaft, x, left=True)[:, number],
                solution.torque_at(shaft, x)[:, number],
            )
            shafts.append((mine_t, np.asarray(theirs_t, dtype=float)))
        scale = max(
            [float(np.max(np.abs(mine_r), initial=0.0)), solution.pretwist_torque]
            + [float(np.max(np.abs(mine), initial=0.0)) for mine, _ in shafts]
        )
        scale = scale if scale > 0.0 else 1.0
        for support, (mine, theirs) in enumerate(zip(mine_r, theirs_r, strict=True)):
            rows.append(
                ComparisonRow(
                    name,
                    "reaction",
                    support,
                    float(mine),
                    float(theirs),
                    float(abs(mine - theirs) / scale),
                )
            )
        for shaft, (mine, theirs) in enumerate(shafts):
            rows.append(
                ComparisonRow(
                    name,
                    "governing torque",
                    shaft,
                    float(np.max(np.abs(mine), initial=0.0)),
                    float(np.max(np.abs(theirs), initial=0.0)),
                    float(np.max(np.abs(mine - theirs), initial=0.0)) / scale,
                )
            )
    return Comparison(solution, tuple(rows))
