"""Equilibrium of a solved case, read from ``workbench solve --json`` and the case's own loads.

Each shaft alone is in equilibrium: Σ applied torque + Σ support reactions = 0 about its axis
(Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8, statically indeterminate torsional
members). Shafts joined by gears exchange tooth forces that do no work in a rotation the gears
allow, so for a set of shafts joined by gears the virtual work of the applied torques and the
reactions in such a rotation δθ is zero: Σ_s δθ_s·(Σ applied_s + Σ reactions_s) = 0, with
r_a·δθ_a = ∓r_b·δθ_b across each mesh (the gears' compatibility: the same source, §3.8; the
principle of virtual work for rigid bodies: common practice, no source). Without gears δθ_s = 1
for each shaft alone, which is plain equilibrium. A loop of meshes that allows no rotation is not
judged (its virtual rotation is zero).
"""

from __future__ import annotations

import math
import sys
from collections.abc import Sequence
from typing import Any

from workbench.case.declaration import POSITION_TOLERANCE
from workbench.solver.model import Model

#: Equilibrium must hold to this fraction of Σ|torque|: 1e-9 for the solve (issue 11), plus up to
#: 1e-9 more for the loads of points closer than the position tolerance (1e-9 of a shaft's
#: length, README), which the model merges before it solves.
RELATIVE = 1e-9 + POSITION_TOLERANCE
#: Below the smallest normal double a residual is rounding of subnormal loads, not an imbalance.
FLOOR = sys.float_info.min


def _allowed_rotations(model: Model) -> list[dict[str, float]]:
    """A virtual rotation δθ per shaft for each group of shafts joined by gears."""
    neighbours: dict[str, list[tuple[str, float]]] = {shaft.id: [] for shaft in model.shafts}
    for mesh in model.gears:
        c_a, c_b = mesh.coefficients  # c_a·θ_a + c_b·θ_b = 0
        neighbours[mesh.a.shaft].append((mesh.b.shaft, -c_a / c_b))
        neighbours[mesh.b.shaft].append((mesh.a.shaft, -c_b / c_a))
    groups: list[dict[str, float]] = []
    seen: set[str] = set()
    for start in neighbours:
        if start in seen:
            continue
        rotation = {start: 1.0}
        stack, consistent = [start], True
        while stack:
            shaft = stack.pop()
            for other, ratio in neighbours[shaft]:
                value = rotation[shaft] * ratio
                if other not in rotation:
                    rotation[other] = value
                    stack.append(other)
                elif not math.isclose(rotation[other], value, rel_tol=1e-9):
                    consistent = False  # a locked loop of gears
        seen.update(rotation)
        if consistent:
            groups.append(rotation)
    return groups


def _applied_by_shaft(model: Model) -> list[dict[str, float]]:
    """Σ applied torque on each shaft (N·m), per load case."""
    totals = []
    for case in model.load_cases:
        by_shaft = dict.fromkeys((shaft.id for shaft in model.shafts), 0.0)
        for point in case.torques:
            by_shaft[point.shaft] += point.torque
        for spread in case.distributed:
            by_shaft[spread.shaft] += spread.resultant
        totals.append(by_shaft)
    return totals


def equilibrium_problem(model: Model, document: dict[str, Any]) -> str | None:
    """Why the results of ``solve --json`` break equilibrium, or ``None`` when they hold it.

    Parameters
    ----------
    model
        The case, as the program reads it (loads in SI).
    document
        The decoded output of ``workbench solve --json`` (reactions in the file's torque unit).
    """
    applied = _applied_by_shaft(model)
    names = [case.name for case in model.load_cases]
    for combination in model.combinations:
        totals = dict.fromkeys(applied[0], 0.0)
        for name, factor in combination.factors:
            for shaft, value in applied[names.index(name)].items():
                totals[shaft] += factor * value
        applied.append(totals)
    results: Sequence[dict[str, Any]] = document["results"]
    if len(results) != len(applied):
        return f"{len(results)} results for {len(applied)} load cases and combinations"
    groups = _allowed_rotations(model)
    for result, loads in zip(results, applied, strict=True):
        reactions = [float(model.units.to_si(r, "torque")) for r in result["reactions"]]
        if len(reactions) != len(model.supports):
            return f"{len(reactions)} reactions for {len(model.supports)} supports"
        for group in groups:
            work, scale = 0.0, 0.0
            for shaft, rotation in group.items():
                work += rotation * loads[shaft]
                scale += abs(rotation * loads[shaft])
            for support, reaction in zip(model.supports, reactions, strict=True):
                rotation = group.get(support.shaft)
                if rotation is not None:
                    work += rotation * reaction
                    scale += abs(rotation * reaction)
            if not math.isfinite(work) or abs(work) > max(RELATIVE * scale, FLOOR):
                return (
                    f"{result['name']!r}: shafts {sorted(group)} out of equilibrium by "
                    f"{work:.6g} N·m (Σ|T| = {scale:.6g} N·m)"
                )
    return None
