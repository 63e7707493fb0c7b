"""Everything a record shows and signs, recomputed from its case: results, checks, modes, digests.

*Results digest*: the SHA-256 of the RFC 8785 canonical JSON of ``{"results": results
document, "checks": check document}``, every number rounded to 10 significant digits first, so
that a re-run on another machine (another BLAS, last-bit differences) gives the same digest.
A case with inertia adds ``"modes"`` (frequencies, rigid-body flags and mode shapes, the shapes'
normalised angles rounded to 9 decimals so that round-off about a node of the shape cannot
change the digest); a case with ``design.fatigue`` adds ``"fatigue"`` (the governing cycle of
every segment with its stresses, strengths and factors of safety). Cases without them keep the
digest they always had.
"""

from __future__ import annotations

import hashlib
import json
import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from workbench.case.errors import InputError
from workbench.case.materials import FROM_MEMORY, Material, recalled
from workbench.design.checks import CheckReport, check_document, run_checks
from workbench.signing import canonicalize
from workbench.solver.analysis import Results, solve
from workbench.solver.io import parse_case
from workbench.solver.model import Model
from workbench.solver.modes import Modes
from workbench.solver.tables import results_document

__all__ = [
    "DIGEST_DIGITS",
    "Computation",
    "compute",
    "digest_rounded",
    "has_inertia",
    "record_modes",
    "results_digest",
]

#: Significant digits kept in the results digest (cross-machine stability).
DIGEST_DIGITS = 10


@dataclass(frozen=True)
class Computation:
    """Everything recomputed from a case: model, results, checks and their digest."""

    case: dict[str, Any]
    model: Model
    results: Results
    report: CheckReport
    results_digest: str
    modes: Modes | None = None
    modes_error: str | None = None


def digest_rounded(value: Any) -> Any:
    """``value`` with every float cut to :data:`DIGEST_DIGITS` significant digits (JSON-like)."""
    if isinstance(value, float):
        if not math.isfinite(value):
            return str(value)
        return float(f"{value:.{DIGEST_DIGITS}g}") + 0.0  # + 0.0 turns -0.0 into 0.0
    if isinstance(value, Mapping):
        return {key: digest_rounded(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [digest_rounded(item) for item in value]
    return value


def has_inertia(model: Model) -> bool:
    """Whether the case gives discs or a density: then the record has a vibration section."""
    return bool(model.discs) or any(
        layer.material.density is not None
        for shaft in model.shafts
        for segment in shaft.segments
        for layer in segment.layers
    )


def record_modes(model: Model, report: CheckReport) -> Modes:
    """The natural modes the record shows: the lowest ten, and all up to the widened bands.

    Raises
    ------
    InputError
        When the system has no inertia free to move, or a group of shafts is free to spin
        without inertia.
    """
    from workbench.solver.modes import natural_modes  # noqa: PLC0415

    if report.modes is not None:
        # The frequency checks asked for exactly these modes (the same count, bands and mesh).
        return report.modes
    speeds = model.operating_speeds
    up_to = None
    if speeds:
        up_to = max(speed.maximum for speed in speeds) * (1.0 + report.design.frequency_margin)
    return natural_modes(
        model,
        up_to=up_to,
        elements_per_segment=report.design.modal_elements_per_segment,
        max_element_length=report.design.modal_max_element_length,
    )


def modes_digest_document(modes: Modes) -> list[dict[str, Any]]:
    """Frequencies (Hz), rigid-body flags and shapes (x in m, angles to 9 decimals)."""
    entries = []
    for mode in range(len(modes)):
        shafts = {}
        for shaft in modes.model.shafts:
            x, angle = modes.shape(mode, shaft.id)
            shafts[shaft.id] = {
                "x": [float(value) for value in x],
                "angle": [round(float(value), 9) + 0.0 for value in angle],
            }
        entries.append(
            {
                "frequency": float(modes.frequency[mode]),
                "rigid_body": bool(modes.rigid_body[mode]),
                "shafts": shafts,
            }
        )
    return entries


def fatigue_digest_document(report: CheckReport) -> list[dict[str, Any]]:
    """The governing cycle of every segment checked for fatigue (SI)."""
    return [
        {
            "shaft": point.shaft,
            "segment": point.segment,
            "x": point.x,
            "kfs": point.concentration,
            "mean_shear": point.factors.mean_shear,
            "alternating_shear": point.factors.alternating_shear,
            "endurance_shear": point.factors.endurance_shear,
            "ultimate_shear": point.factors.ultimate_shear,
            "yield_shear": point.factors.yield_shear,
            "goodman": point.factors.goodman,
            "gerber": point.factors.gerber,
            "asme_elliptic": point.factors.asme_elliptic,
            "soderberg": point.factors.soderberg,
            "first_cycle_yield": point.factors.first_cycle_yield,
        }
        for point in report.fatigue_points
    ]


def results_digest(results: Results, report: CheckReport, modes: Modes | None = None) -> str:
    """``sha256:<hex>`` of the canonical, rounded results, checks, modes and fatigue cycles."""
    solved = results_document(results)
    # The warnings are words about the numbers digested already (and records signed before
    # they existed must keep their digests).
    solved.pop("warnings", None)
    document: dict[str, Any] = {"results": solved, "checks": check_document(report)}
    if modes is not None:
        document["modes"] = modes_digest_document(modes)
    if report.fatigue_points:
        document["fatigue"] = fatigue_digest_document(report)
    return "sha256:" + hashlib.sha256(canonicalize(digest_rounded(document))).hexdigest()


def compute(case: Mapping[str, Any]) -> Computation:
    """Parse, solve and check a case, find its natural modes, and digest the results.

    Raises
    ------
    InputError
        When the case is not valid.
    """
    case_dict = json.loads(json.dumps(case))
    model = parse_case(case_dict)
    results = solve(model)
    report = run_checks(results)
    modes, modes_error = None, None
    if has_inertia(model):
        try:
            modes = record_modes(model, report)
        except InputError as error:
            modes_error = str(error)
    return Computation(
        case_dict,
        model,
        results,
        report,
        results_digest(results, report, modes),
        modes,
        modes_error,
    )


def used_materials(model: Model) -> dict[str, Material]:
    """The materials ``model``'s segments and layers use, by name, in the order first used."""
    found: dict[str, Material] = {}
    for shaft in model.shafts:
        for segment in shaft.segments:
            for layer in segment.layers:
                found.setdefault(layer.material.name, layer.material)
    return found


def refuse_recalled_materials(model: Model) -> None:
    """Refuse a record whose material data says it was recalled rather than read.

    Raises
    ------
    InputError
        On ``materials.NAME.source`` of the first material whose source holds
        :data:`workbench.case.materials.FROM_MEMORY`.

    References
    ----------
    .. [1] See :mod:`workbench.case.materials` (every library value cites its table or is marked
       typical); the project's rule that no recalled value reaches a signed record.
    """
    for name, material in used_materials(model).items():
        if recalled(material):
            msg = (
                f"says its values are '{FROM_MEMORY}': a record takes material data read from a "
                "published table or a mill certificate; state that source"
            )
            raise InputError(field=f"materials.{name}.source", message=msg)
