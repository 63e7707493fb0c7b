"""The bare reference of the solver benchmarks: a numpy build + ``solve_banded`` of one system.

What a hand-written solver of a single shaft of prismatic segments would do with the same columns
the array core reads, and nothing else: element stiffness G·J/L, the tridiagonal band without the
fixed ends, the loads, :func:`scipy.linalg.solve_banded`. The benchmarks time ``solve(model)``
against it side by side.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
import scipy.linalg

from workbench.solver import analysis, statics
from workbench.solver.columns import CaseTable, case_table
from workbench.solver.sections import FloatArray


@dataclass(frozen=True)
class PlainSystem:
    """A single-shaft point-load system as plain arrays, the bare reference's input."""

    length: FloatArray
    outer: FloatArray
    inner: FloatArray
    modulus: FloatArray
    spring_node: np.ndarray
    spring_stiffness: FloatArray
    load_node: np.ndarray
    load_case: np.ndarray
    load: FloatArray
    n_cases: int


def plain_system(source: Any) -> PlainSystem:
    """The columns of a demo model or table: one shaft, one layer per segment, fixed at both ends."""
    table = source if isinstance(source, CaseTable) else case_table(source)
    segments = table.segments
    if len(segments.shaft_ids) != 1 or len(segments.layer_shape) != segments.n_segments:
        msg = "the bare reference takes one shaft of one-layer segments"
        raise AssertionError(msg)
    if len(table.load_case) or np.any(table.support_rotation):
        msg = "the bare reference takes point torques and supports at rotation 0"
        raise AssertionError(msg)
    boundaries = np.concatenate([[0.0], np.cumsum(segments.length[0])])

    def node(x: FloatArray) -> np.ndarray:
        found = np.searchsorted(boundaries, x - 1e-9 * boundaries[-1])
        if not np.allclose(boundaries[found], x, rtol=0, atol=1e-9 * boundaries[-1]):
            msg = "the bare reference needs supports and loads on segment ends"
            raise AssertionError(msg)
        return found

    fixed = np.sort(node(table.support_x[table.support_fixed]))
    if fixed.tolist() != [0, segments.n_segments]:
        msg = "the bare reference holds the two ends fixed"
        raise AssertionError(msg)
    springs = ~table.support_fixed
    return PlainSystem(
        length=segments.length[0],
        outer=segments.outer_diameter_start[0],
        inner=segments.inner_diameter[0],
        modulus=segments.shear_modulus[0],
        spring_node=node(table.support_x[springs]),
        spring_stiffness=table.support_stiffness[0, springs],
        load_node=node(table.torque_x),
        load_case=table.torque_case,
        load=table.torque[0],
        n_cases=table.n_cases,
    )


def bare_solve(plain: PlainSystem) -> FloatArray:
    """Element stiffness G·J/L, the tridiagonal band, loads, ``solve_banded``: nothing else."""
    stiffness = plain.modulus * (np.pi / 32.0) * (plain.outer**4 - plain.inner**4) / plain.length
    n_nodes = len(stiffness) + 1
    diagonal = np.zeros(n_nodes)
    diagonal[:-1] += stiffness
    diagonal[1:] += stiffness
    np.add.at(diagonal, plain.spring_node, plain.spring_stiffness)
    band = np.zeros((3, n_nodes - 2))  # the two fixed end nodes removed; corners unused
    band[0, 1:] = -stiffness[1:-1]
    band[1] = diagonal[1:-1]
    band[2, :-1] = -stiffness[1:-1]
    rhs = np.zeros((n_nodes, plain.n_cases))
    np.add.at(rhs, (plain.load_node, plain.load_case), plain.load)
    return np.asarray(scipy.linalg.solve_banded((1, 1), band, rhs[1:-1]))


def agreement(model: Any, bare: FloatArray, results: Any = None) -> str:
    """How closely ``solve`` reproduces the bare solution (free node rotations).

    ``results``: the results to compare, when already solved (by default ``solve(model)``).

    The two sides build their stiffnesses in different orders of rounding (G·J/L against
    1/∫dx/(G·J)), so they solve matrices a few ulps apart: their solutions may differ by up to
    the condition number times the unit roundoff (forward error bound, Higham, *Accuracy and
    Stability of Numerical Algorithms*, 2nd ed., §7.1; from memory).
    """
    results = results if results is not None else analysis.solve(model)
    ours = results.node_angle[: bare.shape[1], 1:-1].T
    error = float(np.max(np.abs(ours - bare)) / np.max(np.abs(bare)))
    rcond = statics.solve_table(results.table).factor.rcond
    bound = 10.0 * float(np.finfo(float).eps) / rcond
    if error > bound:
        msg = f"solve() disagrees with the bare solution: {error:.1e} > κ·ε bound {bound:.1e}"
        raise AssertionError(msg)
    return (
        f"solve() matches the bare solution's rotations to {error:.1e} (relative; bound "
        f"10·ε/rcond = {bound:.1e}, rcond from ?gtcon)"
    )


__all__ = ["PlainSystem", "agreement", "bare_solve", "plain_system"]
