"""Sweeps: vary one input of a case over a range and follow one result, on the batch path.

A sweep names an input by its path in the case document (``("shafts", 0, "segments", 0,
"section", "diameter")``) and gives its values in the document's units. Every point is a variant
of the case: where the input is a column of the array core — a section's diameter or bore, a
fillet radius, a spring's stiffness or prescribed rotation, a gear's radius, a torque or a
distributed-torque intensity — a chunk of points is solved and checked as one batch
(:func:`~workbench.design.batch_checks.governing_utilisations`: one solve of every point, the
static checks as arrays; the fatigue check and the natural frequencies of each point, where
they could govern, point by point). Any other input (a position, a segment's length, a disc, a
density, a design criterion) changes more than a column can say — a length moves every position
after it, where a batch keeps each node's place in its segment — so its points are read, solved
and checked one by one, exactly as the case edited to each value.

Whatever the path, a point's value is the one the case edited to that value gives, read by the
case-file parser, solved and checked alone; NaN where that case is not valid (the reason is
:func:`point_error`'s).
"""

from __future__ import annotations

import copy
import math
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.case.declaration import key_quantities
from workbench.case.errors import InputError, quoted
from workbench.design.batch_checks import governing_utilisations
from workbench.design.checks import run_checks
from workbench.solver.analysis import Results, solve
from workbench.solver.batch import solve_batch
from workbench.solver.columns import DIMENSION_KEYS, SOLID, CaseTable, case_table
from workbench.solver.io import parse_case
from workbench.solver.model import Model

#: A field of the case document: keys and list indices.
Path = tuple[str | int, ...]

#: Results a sweep can follow, by key: (label, quantity of the value).
METRICS: dict[str, tuple[str, str | None]] = {
    "max_shear_stress": ("largest shear stress", "stress"),
    "max_angle": ("largest |angle of twist|", "angle"),
    "governing_utilisation": ("governing utilisation (all results)", None),
    "reaction": ("reaction of a support", "torque"),
}

_LINEAR_KEYS = {"torque", "intensity_start", "intensity_end"}


@dataclass(frozen=True)
class SweepRequest:
    """One sweep.

    Parameters
    ----------
    path
        The input varied (a path into the case document).
    values
        Its values, in the document's units.
    metric
        A :data:`METRICS` key.
    result
        The load case or combination followed (the governing utilisation covers all results).
    support
        The support whose reaction is followed, for ``metric="reaction"``.
    """

    path: Path
    values: tuple[float, ...]
    metric: str
    result: str
    support: int = 0

    def __post_init__(self) -> None:
        if self.metric not in METRICS:
            msg = f"unknown result {quoted(self.metric)}; choose one of {', '.join(METRICS)}"
            raise InputError("metric", msg)
        if not self.values:
            raise InputError("values", "a sweep needs at least one value")

    @property
    def linear(self) -> bool:
        """Whether the input is a load magnitude (the points superpose)."""
        return self.path[0] == "load_cases" and self.path[-1] in _LINEAR_KEYS


@dataclass(frozen=True)
class BatchColumn:
    """Where a swept input sits in the batch's columns: name, index, and its quantity.

    ``names`` holds two columns for a prismatic section's one outer diameter (both ends).
    """

    names: tuple[str, ...]
    index: tuple[int, ...]
    quantity: str
    sign: float = 1.0


def sweep_chunks(
    document: dict[str, Any], request: SweepRequest, chunk: int = 100
) -> Iterator[tuple[int, np.ndarray]]:
    """Solve a sweep chunk by chunk, yielding (points done, values so far) after each chunk.

    The values are in the document's units (NaN where a point is not a valid case: the reason is
    in :func:`point_error`). The caller may stop iterating at any chunk (cancel).
    """
    base = parse_case(copy.deepcopy(document))
    solve(base).index(request.result)  # an unknown result name fails before any work
    if request.metric == "reaction" and not 0 <= request.support < len(base.supports):
        msg = f"support {request.support} does not exist (the case has {len(base.supports)})"
        raise InputError("support", msg)
    column = batch_column(case_table(base), request.path)
    values = np.full(len(request.values), np.nan)
    for start in range(0, len(request.values), chunk):
        part = request.values[start : start + chunk]
        if column is None:
            found = [_one_point(document, request, value) for value in part]
        else:
            found = list(_batch_points(base, request, column, part))
        values[start : start + len(part)] = found
        yield start + len(part), values.copy()


def run_sweep(document: dict[str, Any], request: SweepRequest, chunk: int = 100) -> np.ndarray:
    """The whole sweep at once (see :func:`sweep_chunks`)."""
    latest = np.full(len(request.values), np.nan)
    for _, chunk_values in sweep_chunks(document, request, chunk):
        latest = chunk_values
    return latest


def edited(document: Any, path: Path, value: Any) -> Any:
    """A deep copy of the document with ``value`` at ``path`` (objects made on the way)."""
    copied = copy.deepcopy(document)
    node = copied
    for key in path[:-1]:
        if isinstance(key, str) and key not in node:
            node[key] = {}
        node = node[key]
    node[path[-1]] = value
    return copied


def point_error(document: dict[str, Any], path: Path, value: float) -> str | None:
    """Why the case with ``path`` set to ``value`` is not valid (``None`` when it is)."""
    try:
        solve(parse_case(edited(document, path, value)))
    except InputError as error:
        return str(error)
    return None


def batch_column(table: CaseTable, path: Path) -> BatchColumn | None:
    """The batch column of a document path, or ``None`` when the input is not one.

    Parameters
    ----------
    table
        The base case's columns (:func:`~workbench.solver.columns.case_table`).
    path
        Keys and list indices into the case document.
    """
    quantity = key_quantities().get(str(path[-1]))
    if quantity is None:
        return None
    if path[0] == "shafts" and len(path) > 4 and path[2] == "segments":
        segments = table.segments
        row = int(segments.shaft_segment_start[int(path[1])]) + int(path[3])
        if path[4:] == ("fillet_radius",):
            return BatchColumn(("fillet_radius",), (row,), quantity)
        tail = path[4:]
        layer = int(segments.segment_layer_start[row])
        if tail[:1] == ("layers",) and len(tail) == 4:
            layer, tail = layer + int(tail[1]), tail[2:]
        if len(tail) != 2 or tail[0] != "section":
            return None
        keys = DIMENSION_KEYS.get(int(segments.layer_shape[layer]))
        if keys is None or tail[1] not in keys:
            return None
        names: tuple[str, ...] = ("outer_diameter_start", "outer_diameter_end", "inner_diameter")
        if int(segments.layer_shape[layer]) == SOLID:
            chosen = names[:2]  # a solid's one diameter: both ends, no bore
        else:
            chosen = tuple(name for name, key in zip(names, keys, strict=True) if key == tail[1])
        return BatchColumn(chosen, (layer,), quantity)
    if path[0] == "supports" and path[2] in ("stiffness", "rotation"):
        if path[2] == "stiffness" and table.support_fixed[int(path[1])]:
            return None
        return BatchColumn((f"support_{path[2]}",), (int(path[1]),), quantity)
    if path[0] == "gears" and path[3] == "radius":
        end = 0 if path[2] == "a" else 1
        sign = float(np.sign(table.gear_coefficient[0, int(path[1]), end]))
        return BatchColumn(("gear_coefficient",), (int(path[1]), end), quantity, sign)
    if path[0] == "load_cases" and path[-1] in _LINEAR_KEYS:
        case, item = int(path[1]), int(path[3])
        if path[2] == "torques":
            first = int(np.searchsorted(table.torque_case, case))
            return BatchColumn(("torque",), (first + item,), quantity)
        first = int(np.searchsorted(table.load_case, case))
        return BatchColumn(
            ("load_intensity",), (first + item, int(path[4] == "intensity_end")), quantity
        )
    return None


def _batch_points(
    base: Model, request: SweepRequest, column: BatchColumn, part: Sequence[float]
) -> np.ndarray:
    """The metric at each value of a chunk, every point one variant of one batch."""
    table = case_table(base)
    si = np.array([base.units.to_si(value, column.quantity) for value in part]) * column.sign
    count = len(part)
    columns: dict[str, Any] = {}
    for name in column.names:
        if name == "fillet_radius":
            # Read by the checks only; the base's radii on the other segments (NaN for none).
            radii = [
                math.nan if segment.fillet_radius is None else segment.fillet_radius
                for shaft in base.shafts
                for segment in shaft.segments
            ]
            values = np.repeat(np.array([radii]), count, axis=0)
        else:
            holder = table.segments if hasattr(table.segments, name) else table
            values = np.repeat(getattr(holder, name), count, axis=0)
        if len(column.index) == 1:
            values[:, column.index[0]] = si
        else:
            values[:, column.index[0], column.index[1]] = si
        columns[name] = values
    if request.metric == "governing_utilisation" or "fillet_radius" in columns:
        verdicts = governing_utilisations(
            base, frequency=request.metric == "governing_utilisation", **columns
        )
        if request.metric == "governing_utilisation":
            return verdicts.utilisation
        batch, valid = verdicts.batch, verdicts.valid
    else:
        batch = solve_batch(base, **columns)
        valid = batch.valid
    row = batch.names.index(request.result)
    units = base.units
    if request.metric == "max_shear_stress":
        found = units.from_si(batch.shear_stress[:, row].max(axis=1), "stress")
    elif request.metric == "max_angle":
        found = units.from_si(np.abs(batch.angle[:, row]).max(axis=1), "angle")
    else:
        found = units.from_si(batch.reactions[:, row, request.support], "torque")
    return np.where(valid, found, np.nan)


def _one_point(document: dict[str, Any], request: SweepRequest, value: float) -> float:
    """The metric of the case edited to ``value``, read, solved and checked alone."""
    try:
        results = solve(parse_case(edited(document, request.path, value)))
        if request.metric == "governing_utilisation":
            governing = run_checks(results).governing
            return governing.utilisation if governing is not None else math.nan
    except InputError:
        return math.nan
    return _row_metric(results, request)


def _row_metric(results: Results, request: SweepRequest) -> float:
    units = results.model.units
    row = results.index(request.result)
    if request.metric == "max_shear_stress":
        return float(units.from_si(results.shear_stress[row].max(), "stress"))
    if request.metric == "max_angle":
        return float(units.from_si(np.abs(results.angle[row]).max(), "angle"))
    return float(units.from_si(results.reactions[row, request.support], "torque"))
