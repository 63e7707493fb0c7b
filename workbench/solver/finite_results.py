"""Results beyond the range of numbers: refused naming the input that drives them.

Every input of a solve is a finite number and every element constant is in range (the model,
the columns and :func:`~workbench.solver.mesh_sizes.size_mesh` check them), but a result can still
overflow: a combination factor of 1e308, a torque of 1e300 N·m on a thin shaft, a prescribed
rotation of 1e300 rad on a stiff spring. :func:`solve_in_range` solves with numpy's overflow
warnings off — an infinite result is the expected outcome there, and it is checked — and
refuses the first result that is not finite, naming:

* for a combination whose load cases are finite, the factor whose product is largest;
* for a load case, the largest of its loads or of the supports' prescribed rotations (by the
  torque each stands for), or, when only the shear stress overflows and a section's stress per
  torque is the larger number, that segment's section.
"""

from __future__ import annotations

from typing import Any, Literal

import numpy as np

from workbench.case.errors import InputError, short
from workbench.case.validate import LARGEST, all_finite
from workbench.solver.columns import CaseTable
from workbench.solver.mesh import Mesh
from workbench.solver.mesh_sizes import Geometry
from workbench.solver.sections import FloatArray
from workbench.solver.statics import StaticSolution, solve_table

#: The results checked, in the order a message names them, with their SI units.
_QUANTITIES = (
    ("torque", "internal torque", "N·m"),
    ("reactions", "support reaction", "N·m"),
    ("gear_torques", "gear torque", "N·m"),
    ("angle", "rotation", "rad"),
    ("shear_stress", "shear stress", "Pa"),
)


def solve_in_range(
    table: CaseTable,
    mesh: Mesh | None = None,
    geometry: Geometry | None = None,
    method: Literal["auto", "band", "sparse"] = "auto",
    unsound: Literal["raise", "flag"] = "raise",
) -> StaticSolution:
    """:func:`~workbench.solver.statics.solve_table`, its results checked finite.

    A result beyond the range of numbers is named by its cause before the soundness of the
    solve is judged: an overflow also upsets equilibrium, and blaming the supports for it
    would send the engineer to the wrong field.

    Raises
    ------
    InputError
        Naming the input that drives the first result beyond the range of numbers, besides
        everything :func:`~workbench.solver.statics.solve_table` raises.
    """
    with np.errstate(over="ignore", invalid="ignore"):  # an overflow is checked just below
        solution = solve_table(table, mesh, geometry, method, unsound="flag")
    require_finite_results(table, solution)
    sound = solution.soundness.sound
    if unsound == "raise" and not sound.all():
        error = solution.soundness.error(table, int(np.argmin(sound)))
        assert error is not None
        raise error
    return solution


def require_finite_results(table: CaseTable, solution: StaticSolution) -> None:
    """Raise :class:`InputError` when any result of any variant is not a finite number."""
    n_cases = table.n_cases
    for name, words, unit in _QUANTITIES:
        values = getattr(solution, name)
        if all_finite(values):
            continue  # the common case, found without a mask the size of the results
        bad = ~np.isfinite(values.reshape(*values.shape[:2], -1)).all(
            axis=-1
        )  # (results, variants)
        if not bad.any():
            continue
        result, variant = (int(index) for index in np.argwhere(bad)[0])
        if result >= n_cases and not bad[:n_cases, variant].any():
            raise _factor_error(table, solution, result - n_cases, variant, words)
        case = int(np.argmax(bad[:n_cases, variant])) if result >= n_cases else result
        what = f"the {words} of load case {short(table.case_names[case])!r}"
        if name == "shear_stress" and (
            section := _section_error(table, solution, case, variant, what)
        ):
            raise section
        raise _load_error(
            table, solution, case, variant, f"{what} goes beyond ±{LARGEST:.2g} {unit}"
        )


def _factor_error(
    table: CaseTable, solution: StaticSolution, combination: int, variant: int, words: str
) -> InputError:
    """The factor of a combination whose product with its load case's results is largest."""
    factors = table.combination_factors[combination]
    peaks = np.array([_peak(solution, case, variant) for case in range(table.n_cases)], dtype=float)
    with np.errstate(over="ignore"):  # the product that overflows is the one looked for
        products = np.abs(factors) * peaks
    case = int(np.argmax(np.where(factors != 0.0, products, -1.0)))
    name = short(table.case_names[case])
    msg = (
        f"{factors[case]:g} times load case {name!r} makes the {words} of combination "
        f"{short(table.combination_names[combination])!r} overflow, beyond ±{LARGEST:.2g}"
    )
    return InputError(f"combinations[{combination}].factors.{name}", msg)


def _peak(solution: StaticSolution, case: int, variant: int) -> float:
    """The largest magnitude among a load case's results (in any unit: a scale)."""
    return max(
        float(np.max(np.abs(getattr(solution, name)[case, variant]), initial=0.0))
        for name, _, _ in _QUANTITIES
    )


def _section_error(
    table: CaseTable, solution: StaticSolution, case: int, variant: int, what: str
) -> InputError | None:
    """The section whose stress per torque, larger than the torque there, makes τ overflow."""
    stress = solution.shear_stress[case, variant]
    station = int(np.argmax(~np.isfinite(stress)))
    per_torque = float(_row(solution.geometry.station_stress_per_torque, variant)[station])
    torque = abs(float(solution.torque[case, variant, station]))
    if not per_torque > torque:
        return None
    segment = int(solution.mesh.element_segment_row[solution.mesh.station_element[station]])
    msg = (
        f"its stress per torque τ/T = {per_torque:.3g} 1/m³ times {torque:.3g} N·m makes {what} "
        "overflow"
    )
    return InputError(f"{table.segments.segment_path(segment)}.section", msg)


def _row(values: FloatArray, variant: int) -> Any:
    """Row ``variant`` of a (n_variants or 1, …) array."""
    return values[min(variant, len(values) - 1)]


def _load_error(
    table: CaseTable, solution: StaticSolution, case: int, variant: int, what: str
) -> InputError:
    """The load (or prescribed rotation) of a load case that stands for the largest torque."""
    candidates: list[tuple[float, str, str]] = []
    chosen = table.torque_case == case
    if chosen.any():
        sizes = np.where(chosen, np.abs(_row(table.torque, variant)), -1.0)
        number = int(np.argmax(sizes))
        item = int(np.count_nonzero(chosen[:number]))
        candidates.append((float(sizes[number]), f"load_cases[{case}].torques[{item}]", "load"))
    chosen = table.load_case == case
    if chosen.any():
        ends = np.abs(_row(table.load_intensity, variant))  # (n_distributed, 2)
        with np.errstate(over="ignore"):  # a resultant beyond range is the largest one
            sizes = np.where(chosen, ends.max(axis=1) * (table.load_end - table.load_start), -1.0)
        number = int(np.argmax(sizes))
        item = int(np.count_nonzero(chosen[:number]))
        key = "intensity_start" if ends[number, 0] >= ends[number, 1] else "intensity_end"
        path = f"load_cases[{case}].distributed[{item}].{key}"
        candidates.append((float(sizes[number]), path, "load"))
    rotation = np.abs(_row(table.support_rotation, variant))
    if np.any(rotation > 0.0):
        # The torque a misfit stands for: the spring's stiffness, or at a fixed support the
        # stiffest element's.
        stiffest = 1.0 / float(np.min(_row(solution.geometry.flexibility, variant)[:, 0]))
        springs = np.abs(_row(table.support_stiffness, variant))
        with np.errstate(over="ignore", invalid="ignore"):  # beyond range is the largest
            sizes = np.where(
                rotation > 0.0, rotation * np.where(table.support_fixed, stiffest, springs), -1.0
            )
        number = int(np.argmax(sizes))
        candidates.append((float(sizes[number]), f"supports[{number}].rotation", "rotation"))
    if not candidates:
        return InputError(f"load_cases[{case}]", what)
    _, path, kind = max(candidates, key=lambda candidate: candidate[0])
    cause = "this prescribed rotation" if kind == "rotation" else "this load"
    return InputError(path, f"{what}: {cause} is too large for the shafts that carry it")


__all__ = ["require_finite_results", "solve_in_range"]
