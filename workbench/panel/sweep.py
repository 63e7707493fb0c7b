"""Sweeps: vary one input of a case over a range and follow one result (the computation).

The What-if tab (:mod:`workbench.panel.whatif`) asks for a sweep with a
:class:`~workbench.panel.sweep_request.SweepRequest` and reads :func:`sweep_chunks`; nothing else
of this module is used by the panel, so moving the computation onto another solver entry point
changes this module only.

No mechanics here: every point is solved by :func:`workbench.solver.analysis.solve` and checked by
:func:`workbench.design.checks.run_checks`. What this module adds is batching, so a sweep costs a
few solver calls instead of one per point:

* A torque (or distributed-torque intensity) enters the equations linearly, so the points of its
  sweep are load cases of one model: the solver factorizes the stiffness matrix once and solves
  every point as one more right-hand side (its multi-case path; superposition of the cases).
* Any other input (a diameter, a length, a stiffness) changes the stiffness, so each point is its
  own system. The points are solved as independent copies of the system placed side by side in one
  model (shaft ids suffixed ``@n``): one assembly and one sparse factorization per chunk of points,
  which removes the per-call Python overhead of many small solves. The copies share no node, so
  each copy's results are exactly those of its own system.

For the governing utilisation, the checks that read a swept result by name are made point by
point from the batch's own rows: the fatigue check of a load sweep (its two results renamed to
the point's), and the frequency-separation checks of the copies, whose natural frequencies are
of each point's own system (the copies carry no discs or running speeds). A point's eigen-solve
is skipped when its other checks already reach the most any frequency check could use
(:func:`workbench.design.checks.frequency_utilisation_ceiling`): it could not govern. Every value
equals the point-by-point reference :func:`_solo_metric` to rounding.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable, Iterator, Sequence
from typing import Any

import numpy as np

from workbench.case.design import DesignCriteria, FatigueCriteria
from workbench.case.errors import InputError
from workbench.design.checks import (
    Check,
    frequency_checks,
    frequency_utilisation_ceiling,
    run_checks,
)
from workbench.design.fatigue_check import fatigue_checks
from workbench.panel.document import Path, clone, get_at, path_text, set_at
from workbench.panel.keys import quantity_of
from workbench.panel.sweep_request import SweepRequest
from workbench.solver.analysis import Results, solve
from workbench.solver.io import parse_case
from workbench.solver.model import Combination, LoadCase, Model, Shaft

_LINEAR_KEYS = {"torque", "intensity_start", "intensity_end"}


def _is_linear(request: SweepRequest) -> bool:
    """Whether the input is a load magnitude (the points superpose)."""
    return request.path[0] == "load_cases" and request.path[-1] in _LINEAR_KEYS


def sweep_chunks(
    document: dict[str, Any], request: SweepRequest, chunk: int = 100
) -> Iterator[tuple[int, np.ndarray]]:
    """Solve a sweep chunk by chunk, yielding (points done, values so far) after each chunk.

    The values are in the document's units (NaN where a point is not a valid case: the reason is
    in :func:`point_error`). The caller may stop iterating at any chunk (cancel).
    """
    base = parse_case(clone(document))
    base_results = solve(base)
    base_results.index(request.result)  # an unknown result name fails before any work
    if request.metric == "reaction" and not 0 <= request.support < len(base.supports):
        msg = f"support {request.support} does not exist (the case has {len(base.supports)})"
        raise InputError("support", msg)
    values = np.full(len(request.values), np.nan)
    for start in range(0, len(request.values), chunk):
        part = request.values[start : start + chunk]
        if _is_linear(request):
            values[start : start + len(part)] = _linear_chunk(base, request, part)
        else:
            values[start : start + len(part)] = _copies_chunk(document, base, request, part)
        yield start + len(part), values.copy()


def run_sweep(document: dict[str, Any], request: SweepRequest, chunk: int = 100) -> np.ndarray:
    """The whole sweep at once (see :func:`sweep_chunks`)."""
    latest = np.full(len(request.values), np.nan)
    for _, chunk_values in sweep_chunks(document, request, chunk):
        latest = chunk_values
    return latest


def point_error(document: dict[str, Any], path: Path, value: float) -> str | None:
    """Why the case with ``path`` set to ``value`` is not valid (``None`` when it is)."""
    variant = clone(document)
    set_at(variant, path, value)
    try:
        solve(parse_case(variant))
    except InputError as error:
        return str(error)
    return None


# --- load magnitudes: one model, one load case per point --------------------------------------


def _linear_chunk(base: Model, request: SweepRequest, part: Sequence[float]) -> np.ndarray:
    case_number = int(request.path[1])
    swept = base.load_cases[case_number]
    variants: dict[int, LoadCase] = {}
    for number, value in enumerate(part):
        try:
            variants[number] = _load_variant(swept, request.path, base.units.to_si, value, number)
        except InputError:
            continue  # not a valid load (a NaN, an infinite value): NaN at this point
    out = np.full(len(part), np.nan)
    if not variants:
        return out
    others = [case for case in base.load_cases if case.name != swept.name]
    fixed_combinations, varied_combinations = [], []
    for combination in base.combinations:
        factors = dict(combination.factors)
        if swept.name not in factors:
            fixed_combinations.append(combination)
            continue
        for number in variants:
            renamed = {
                (_variant(swept.name, number) if name == swept.name else name): factor
                for name, factor in factors.items()
            }
            varied_combinations.append(Combination.of(_variant(combination.name, number), renamed))
    varied_names = {swept.name} | {
        c.name for c in base.combinations if swept.name in dict(c.factors)
    }
    design = base.design
    fatigue = design.fatigue if isinstance(design, DesignCriteria) else None
    follows_load = fatigue is not None and bool(varied_names & set(fatigue.result_names))
    if follows_load and isinstance(design, DesignCriteria):
        # The fatigue check reads the swept result by name: each variant's own check is made
        # below from the variant's rows; the other metrics do not read it.
        design = dataclasses.replace(design, fatigue=None)
    model = dataclasses.replace(
        base,
        load_cases=(*others, *variants.values()),
        combinations=(*fixed_combinations, *varied_combinations),
        design=design,
    )
    results = solve(model)
    fixed_names = {case.name for case in others} | {c.name for c in fixed_combinations}
    # Rows that do not follow the load: running-speed bands, and a fatigue check of fixed results.
    fixed_names |= {speed.name for speed in base.operating_speeds}
    if fatigue is not None and not follows_load:
        fixed_names.add(fatigue.label)
    report = run_checks(results) if request.metric == "governing_utilisation" else None
    utilisation: dict[str, float] = {}
    if report is not None:
        for check in report.checks:
            utilisation[check.result] = max(utilisation.get(check.result, 0.0), check.utilisation)
    for number in variants:
        if report is not None:
            names = [*fixed_names, *(_variant(name, number) for name in varied_names)]
            governing = max((utilisation.get(name, 0.0) for name in names), default=np.nan)
            if fatigue is not None and follows_load:

                def rename(name: str, number: int = number) -> str:
                    return _variant(name, number) if name in varied_names else name

                governing = max(governing, _fatigue_utilisation(results, fatigue, rename))
            out[number] = governing
            continue
        name = request.result
        if name in varied_names:
            name = _variant(name, number)
        out[number] = _row_metric(results, results.index(name), request, slice(None), None)
    return out


def _load_variant(
    swept: LoadCase, path: Path, to_si: Callable[[float, str], float], value: float, number: int
) -> LoadCase:
    """The swept load case with one load's magnitude set to ``value`` (document units).

    Raises :class:`InputError` when the value is not a valid load.
    """
    kind, item, key = path[2], int(path[3]), str(path[4])
    si = float(to_si(value, quantity_of(path) or "torque"))
    name = _variant(swept.name, number)
    if kind == "torques":
        torques = list(swept.torques)
        torques[item] = dataclasses.replace(torques[item], torque=si)
        return LoadCase(name, tuple(torques), swept.distributed)
    loads = list(swept.distributed)
    loads[item] = dataclasses.replace(loads[item], **{key: si})  # type: ignore[arg-type]
    return LoadCase(name, swept.torques, tuple(loads))


def _fatigue_utilisation(
    results: Results, criteria: FatigueCriteria, rename: Callable[[str], str]
) -> float:
    """The largest utilisation of the fatigue check of the results ``rename`` gives."""
    if criteria.extremes is not None:
        first, second = criteria.extremes
        renamed = dataclasses.replace(criteria, extremes=(rename(first), rename(second)))
    else:
        assert criteria.mean is not None and criteria.alternating is not None
        renamed = dataclasses.replace(
            criteria, mean=rename(criteria.mean), alternating=rename(criteria.alternating)
        )
    rows, _ = fatigue_checks(results, renamed, [])  # notes are not needed for a number
    return max((Check(*row).utilisation for row in rows), default=0.0)


def _variant(name: str, number: int) -> str:
    return f"{name} ⟨sweep {number}⟩"


# --- any other input: side-by-side copies of the system ----------------------------------------


def _copies_chunk(
    document: dict[str, Any], base: Model, request: SweepRequest, part: Sequence[float]
) -> np.ndarray:
    models: list[Model | None] = [_variant_model(document, base, request.path, v) for v in part]
    good = [model for model in models if model is not None]
    out = np.full(len(part), np.nan)
    if not good:
        return out
    if request.path[0] == "design":
        # Copies share one set of design criteria: a criterion's sweep is checked point by point.
        return np.array(
            [_solo_metric(model, request) if model is not None else np.nan for model in models]
        )
    try:
        merged = _side_by_side(good)
        results = solve(merged)
    except InputError:
        # One bad point spoils the batch: solve point by point so the others still count.
        return np.array(
            [_solo_metric(model, request) if model is not None else np.nan for model in models]
        )
    n_shafts, n_supports = len(base.shafts), len(base.supports)
    row = results.index(request.result)
    utilisation = np.zeros(len(good))
    if request.metric == "governing_utilisation":
        report = run_checks(results)
        copy_of = {shaft.id: number // n_shafts for number, shaft in enumerate(merged.shafts)}
        for check in report.checks:
            copy = copy_of[check.shaft]
            utilisation[copy] = max(utilisation[copy], check.utilisation)
        # The copies carry no discs or running speeds: natural frequencies are of each point's
        # own system, checked one by one.
        utilisation = np.array(
            [
                _with_frequencies(model, statics)
                for model, statics in zip(good, utilisation, strict=True)
            ]
        )
    starts = results.mesh.shaft_station_start
    values = []
    for copy in range(len(good)):
        if request.metric == "governing_utilisation":
            values.append(utilisation[copy])
            continue
        window = slice(int(starts[copy * n_shafts]), int(starts[(copy + 1) * n_shafts]))
        values.append(_row_metric(results, row, request, window, copy * n_supports))
    out[[number for number, model in enumerate(models) if model is not None]] = values
    return out


def _solo_metric(model: Model, request: SweepRequest) -> float:
    try:
        results = solve(model)
    except InputError:
        return math.nan
    if request.metric == "governing_utilisation":
        governing = run_checks(results).governing
        return governing.utilisation if governing is not None else math.nan
    return _row_metric(results, results.index(request.result), request, slice(None), 0)


def _with_frequencies(model: Model, statics: float) -> float:
    """Governing utilisation of ``model``, given the largest of its other checks (``statics``)."""
    if not model.operating_speeds:
        return statics
    design = model.design if isinstance(model.design, DesignCriteria) else DesignCriteria()
    if statics >= frequency_utilisation_ceiling(model, design):
        return statics  # no frequency check can govern: the eigen-solve would not change it
    checks, _, _ = frequency_checks(model, design)
    return max([statics, *(check.utilisation for check in checks)])


def _row_metric(
    results: Results, row: int, request: SweepRequest, window: slice, support_offset: int | None
) -> float:
    units = results.model.units
    if request.metric == "max_shear_stress":
        return float(units.from_si(results.shear_stress[row, window].max(), "stress"))
    if request.metric == "max_angle":
        return float(units.from_si(np.abs(results.angle[row, window]).max(), "angle"))
    offset = support_offset or 0
    return float(units.from_si(results.reactions[row, offset + request.support], "torque"))


def _variant_model(document: dict[str, Any], base: Model, path: Path, value: float) -> Model | None:
    """The model with one input changed, or ``None`` when that makes the case invalid."""
    try:
        if path[0] == "shafts" and len(path) > 4 and path[2] == "segments":
            return _with_segment(document, base, path, value)
        variant = clone(document)
        set_at(variant, path, value)
        return parse_case(variant)
    except InputError:
        return None


def _with_segment(document: dict[str, Any], base: Model, path: Path, value: float) -> Model:
    """Re-read only the changed segment (through the case reader) and swap it into the model."""
    shaft_number, segment_number = int(path[1]), int(path[3])
    segment = clone(get_at(document, path[:4]))
    set_at(segment, path[4:], value)
    probe = {
        "materials": document.get("materials", {}),
        "shafts": [{"id": "probe", "segments": [segment]}],
        "supports": [{"shaft": "probe", "x": 0}],
        "load_cases": [{"name": "probe"}],
    }
    if document.get("units"):
        probe["units"] = document["units"]
    try:
        new_segment = parse_case(probe).shafts[0].segments[0]
    except InputError as error:
        field = error.field.replace("shafts[0].segments[0]", path_text(path[:4]), 1)
        raise InputError(field, error.message) from None
    shaft = base.shafts[shaft_number]
    segments = list(shaft.segments)
    segments[segment_number] = new_segment
    shafts = list(base.shafts)
    shafts[shaft_number] = Shaft(shaft.id, tuple(segments))
    return dataclasses.replace(base, shafts=tuple(shafts))


def _side_by_side(models: Sequence[Model]) -> Model:
    """One model holding independent copies of the given systems (shaft ids suffixed ``@n``)."""
    first = models[0]
    shafts, supports, gears = [], [], []
    torques: list[list[Any]] = [[] for _ in first.load_cases]
    distributed: list[list[Any]] = [[] for _ in first.load_cases]
    limits = []
    for copy, model in enumerate(models):

        def rename(shaft_id: str, copy: int = copy) -> str:
            return f"{shaft_id}@{copy}"

        shafts += [Shaft(rename(shaft.id), shaft.segments) for shaft in model.shafts]
        supports += [dataclasses.replace(s, shaft=rename(s.shaft)) for s in model.supports]
        gears += [
            dataclasses.replace(
                gear,
                a=dataclasses.replace(gear.a, shaft=rename(gear.a.shaft)),
                b=dataclasses.replace(gear.b, shaft=rename(gear.b.shaft)),
            )
            for gear in model.gears
        ]
        for number, case in enumerate(model.load_cases):
            torques[number] += [dataclasses.replace(t, shaft=rename(t.shaft)) for t in case.torques]
            distributed[number] += [
                dataclasses.replace(d, shaft=rename(d.shaft)) for d in case.distributed
            ]
        if isinstance(model.design, DesignCriteria):
            limits += [
                dataclasses.replace(r, shaft=rename(r.shaft)) for r in model.design.rotation_limits
            ]
    design = first.design
    if isinstance(design, DesignCriteria):
        design = dataclasses.replace(design, rotation_limits=tuple(limits))
    return dataclasses.replace(
        first,
        shafts=tuple(shafts),
        supports=tuple(supports),
        gears=tuple(gears),
        load_cases=tuple(
            LoadCase(case.name, tuple(torques[n]), tuple(distributed[n]))
            for n, case in enumerate(first.load_cases)
        ),
        design=design,
        discs=(),  # the copies are for statics; their frequencies are checked one by one
        operating_speeds=(),
    )
