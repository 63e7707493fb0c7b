"""One chunk of a study: its variants' inputs drawn, solved and checked in one batch, as a table.

:func:`prepare` reads the case and the plan once (on the machine that runs the chunk too: a
worker keeps the last one it prepared) and says where each varied input sits in the batch's
columns:

* a section's dimension, a fillet radius, a spring's stiffness or prescribed rotation, a gear's
  radius, a torque or a distributed intensity: the column a sweep uses
  (:func:`~workbench.design.sweep.batch_column`);
* ``shafts[i].segments[j].length``: the segment's length (nodes keep their place as fractions
  of their segments);
* ``materials.NAME.shear_modulus``: the modulus of every layer of that material;
* ``materials.NAME.yield_strength`` / ``ultimate_strength``: the allowable shear stress of every
  layer of that material, by the design's criterion
  (:func:`~workbench.design.allowables.strength_allowables`).

:func:`evaluate_chunk` is the task a scheduler runs: plain arguments in (the case text, the
plan's JSON, the chunk's first and last variant, its rows of a global design), a pyarrow table
out. One call of :func:`~workbench.design.batch_checks.governing_utilisations` judges the chunk:
the static checks and rotation limits of every variant at once. The fatigue and frequency
checks are made variant by variant (not array functions) and are left out of a study; the
summary says so.
"""

from __future__ import annotations

import dataclasses
import functools
import re
from dataclasses import dataclass
from typing import Any

import numpy as np
import pyarrow as pa

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, short
from workbench.design.allowables import strength_allowables
from workbench.design.batch_checks import VERDICT_KINDS, governing_utilisations
from workbench.design.check_layout import check_layout
from workbench.design.static_checks import STATIC_KINDS
from workbench.design.sweep import BatchColumn, Path, batch_column
from workbench.solver.columns import CaseTable, case_table
from workbench.solver.io import decode_case_text, parse_case
from workbench.solver.mesh import build_mesh
from workbench.solver.model import Model
from workbench.solver.sections import FloatArray
from workbench.study.plan import Plan, read_plan
from workbench.study.sampling import input_values

#: What a study leaves out of the governing utilisation, and why (the summary repeats it).
LEFT_OUT = (
    "fatigue and frequency-separation checks are made variant by variant on each variant's own "
    "model, not on the batch path: a study's governing utilisation is over the static checks "
    "and rotation limits"
)
_STRENGTHS = ("yield_strength", "ultimate_strength")
_STEP = re.compile(r"\[(\d+)\]|\.?([^.\[\]]+)")


def parse_path(text: str) -> Path:
    """``"shafts[0].segments[1].section.diameter"`` → ``("shafts", 0, "segments", 1, ...)``."""
    steps: list[str | int] = []
    position = 0
    while position < len(text):
        found = _STEP.match(text, position)
        if found is None or found.end() == position:
            raise ValueError(text)
        steps.append(int(found[1]) if found[1] is not None else found[2])
        position = found.end()
    return tuple(steps)


@dataclass(frozen=True)
class Target:
    """Where one varied input goes: a batch column (by name and index) or a strength.

    ``kind`` is ``"column"`` (``column``), ``"length"`` (segment ``rows``), ``"modulus"`` (layer
    ``rows``) or ``"strength"`` (``strength`` names which; ``slots`` the (K, G) places of the
    material).
    """

    kind: str
    quantity: str
    column: BatchColumn | None = None
    rows: tuple[int, ...] = ()
    strength: str = ""
    material: str = ""


@dataclass(frozen=True)
class Prepared:
    """A case and a plan read once: the base model, the targets, the nominal values."""

    model: Model
    table: CaseTable
    plan: Plan
    targets: tuple[Target, ...]
    nominals: FloatArray  # (k,) the case's own value of each input (its unit)
    design: DesignCriteria
    allowable: FloatArray  # (K, G) the base's allowable of each layer slot (Pa)
    slot_material: np.ndarray  # (K, G) material name of each layer slot ("" where none)
    strengths: dict[str, tuple[float, float]]  # material → (Sy, Su) (Pa; NaN when not given)


def _walk(document: Any, path: Path, field: str) -> Any:
    node = document
    for step in path:
        try:
            node = node[step]
        except (KeyError, IndexError, TypeError):
            msg = f"the case has no {short(str(step))!r} here: no such input"
            raise InputError(field, msg) from None
    if isinstance(node, bool) or not isinstance(node, int | float):
        raise InputError(field, "names no number of the case")
    return float(node)


def _target(model: Model, table: CaseTable, path: Path, field: str) -> Target:
    if path[0] == "materials" and len(path) == 3:
        name, key = str(path[1]), str(path[2])
        if key == "shear_modulus":
            layers = [layer.material.name for shaft in model.shafts
                      for segment in shaft.segments for layer in segment.layers]  # fmt: skip
            rows = tuple(i for i, used in enumerate(layers) if used == name)
            return Target("modulus", "stress", rows=rows, material=name)
        if key in _STRENGTHS:
            return Target("strength", "stress", strength=key, material=name)
    if path[0] == "shafts" and len(path) == 5 and path[2] == "segments" and path[4] == "length":
        row = int(table.segments.shaft_segment_start[int(path[1])]) + int(path[3])
        return Target("length", "length", rows=(row,))
    column = batch_column(table, path)
    if column is None:
        msg = (
            "cannot be varied on the batch path: a position moves the mesh (vary a segment's "
            "length instead); the README lists the inputs a study varies"
        )
        raise InputError(field, msg)
    return Target("column", column.quantity, column=column)


def prepare(case_text: str | bytes, plan_json: str | bytes) -> Prepared:
    """Read the case and the plan; check every input path against the case.

    Raises
    ------
    InputError
        A bad case (its field named), a bad plan, or an input path the case does not have or
        a study cannot vary (``plan.inputs[i].path``).
    """
    plan = read_plan(plan_json)
    document = decode_case_text(case_text)
    model = parse_case(document)
    design = model.design if isinstance(model.design, DesignCriteria) else DesignCriteria()
    design = dataclasses.replace(design, fatigue=None)
    model = dataclasses.replace(model, design=design)
    table = case_table(model)
    targets, nominals = [], []
    for number, entry in enumerate(plan.inputs):
        field = f"plan.inputs[{number}].path"
        try:
            path = parse_path(entry.path)
        except ValueError:
            raise InputError(field, f"{short(entry.path)!r} is not a path of the case") from None
        nominals.append(_walk(document, path, field))
        targets.append(_target(model, table, path, field))
    layout = check_layout(model, build_mesh(model), design)
    slots = np.full(layout.allowable.shape, "", dtype=object)
    strengths: dict[str, tuple[float, float]] = {}
    place = 0
    for shaft in model.shafts:  # the base model's segments: read once per study, not per variant
        for segment in shaft.segments:
            for slot, layer in enumerate(segment.layers):
                material = layer.material
                slots[slot, place] = material.name
                strengths[material.name] = tuple(  # type: ignore[assignment]
                    np.nan if getattr(material, key) is None else getattr(material, key)
                    for key in _STRENGTHS
                )
            place += 1
    for number, target in enumerate(targets):
        if target.kind == "strength" and design.shear_criterion == "allowable":
            msg = "the design's criterion 'allowable' reads no strength: varying it changes nothing"
            raise InputError(f"plan.inputs[{number}].path", msg)
    return Prepared(model, table, plan, tuple(targets), np.array(nominals, dtype=float), design,
                    layout.allowable, slots, strengths)  # fmt: skip


@functools.lru_cache(maxsize=2)
def _prepared(case_text: str | bytes, plan_json: str | bytes) -> Prepared:
    return prepare(case_text, plan_json)


def input_names(plan: Plan) -> list[str]:
    """The parquet column of each input: its path."""
    return [entry.path for entry in plan.inputs]


def _columns(prepared: Prepared, values: FloatArray) -> dict[str, Any]:
    """The batch's columns (SI) of the chunk's input values (the case's units)."""
    count = len(values)
    table, units, model = prepared.table, prepared.model.units, prepared.model
    columns: dict[str, Any] = {}
    allowable: FloatArray | None = None
    strengths: dict[str, list[FloatArray]] = {}

    def column(name: str) -> FloatArray:
        if name not in columns:
            if name == "fillet_radius":
                base = np.array([[np.nan if segment.fillet_radius is None else segment.fillet_radius
                                  for shaft in model.shafts for segment in shaft.segments]])  # fmt: skip
            else:
                holder = table.segments if hasattr(table.segments, name) else table
                base = getattr(holder, name)
            columns[name] = np.repeat(base, count, axis=0)
        found: FloatArray = columns[name]
        return found

    for number, target in enumerate(prepared.targets):
        si = units.to_si(values[:, number], target.quantity)
        if target.kind == "column":
            assert target.column is not None
            for name in target.column.names:
                index: tuple[Any, ...] = (slice(None), *target.column.index)
                column(name)[index] = si * target.column.sign
        elif target.kind in ("length", "modulus"):
            name = "length" if target.kind == "length" else "shear_modulus"
            column(name)[:, list(target.rows)] = si[:, None]
        else:
            pair = strengths.setdefault(
                target.material,
                [np.full(count, value) for value in prepared.strengths.get(target.material, ())]
                or [np.full(count, np.nan)] * 2,
            )
            pair[_STRENGTHS.index(target.strength)] = si
    if strengths:
        allowable = np.repeat(prepared.allowable[None], count, axis=0)
        design = prepared.design
        for material, (sy, su) in strengths.items():
            found = strength_allowables(design.shear_criterion, design.factor_of_safety, sy, su,
                                        design.keyway)  # fmt: skip
            slot, segment = np.nonzero(prepared.slot_material == material)
            allowable[:, slot, segment] = found[:, None]
        columns["allowable"] = allowable
    return columns


def evaluate_chunk(
    case_text: str | bytes,
    plan_json: str | bytes,
    start: int,
    stop: int,
    unit: FloatArray | None = None,
) -> pa.Table:
    """Draw, solve and check variants [start, stop) of a study in one batch.

    Parameters
    ----------
    case_text, plan_json
        The case file's text and the plan's JSON (plain data, shipped to a worker as they are).
    start, stop
        The chunk's variants (``start`` a multiple of :data:`~workbench.study.plan.BLOCK`).
    unit
        (stop − start, k) the chunk's rows of a global design on the unit hypercube, or ``None``.

    Returns
    -------
    pyarrow.Table
        One row per variant: ``variant``, each input (by its path, in the case's unit),
        ``valid``, ``reason``, ``governing_utilisation``, ``governing_check`` and the outputs
        the plan asks for (in the case's units).
    """
    prepared = _prepared(case_text, plan_json)
    plan, units = prepared.plan, prepared.model.units
    values = input_values(plan, prepared.nominals, start, stop, unit)
    columns = _columns(prepared, values)
    verdicts = governing_utilisations(prepared.model, frequency=False, **columns)
    valid = verdicts.valid
    data: dict[str, Any] = {"variant": np.arange(start, stop, dtype=np.int64)}
    for number, name in enumerate(input_names(plan)):
        data[name] = values[:, number]
    data["valid"] = valid
    data["reason"] = pa.array(verdicts.reasons, type=pa.string())
    data["governing_utilisation"] = verdicts.utilisation
    kinds = pa.array(verdicts.kind.astype(np.int32), mask=verdicts.kind < 0)
    data["governing_check"] = pa.DictionaryArray.from_arrays(
        kinds, pa.array(VERDICT_KINDS, type=pa.string())
    )
    batch, judged = verdicts.batch, verdicts.judged
    hide = ~valid
    if "check_utilisations" in plan.outputs:
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            peaks = np.fmax.reduce(judged.utilisation, axis=(1, 3))  # (V, C) in one pass
            for kind_number, kind in enumerate(STATIC_KINDS):
                if judged.checked[:, kind_number].any():
                    data[f"utilisation.{kind}"] = np.where(hide, np.nan, peaks[:, kind_number])
            if judged.rotation_limit.shape[1]:
                peak = np.fmax.reduce(judged.rotation_utilisation, axis=(1, 2))
                data["utilisation.rotation"] = np.where(hide, np.nan, peak)
    if "reactions" in plan.outputs:
        reactions = units.from_si(batch.reactions, "torque")
        for row, result in enumerate(batch.names):
            for support in range(reactions.shape[2]):
                data[f"reaction.{result}.{support}"] = np.where(
                    hide, np.nan, reactions[:, row, support]
                )
    if "twists" in plan.outputs:
        starts = batch.mesh.shaft_node_start
        angle = units.from_si(np.abs(batch.node_angle), "angle")  # (V, R, N)
        peaks = np.maximum.reduceat(angle, starts[:-1], axis=2)
        for row, result in enumerate(batch.names):
            for shaft, shaft_id in enumerate(prepared.table.segments.shaft_ids):
                data[f"twist.{result}.{shaft_id}"] = np.where(hide, np.nan, peaks[:, row, shaft])
    return pa.table(data)
