"""Direct stiffness analysis of torsion systems: exact elements, one factorization for all cases.

The entry point of the static solution for a :class:`~workbench.solver.model.Model`. The work
is done by the array core on the model's columns:

* :mod:`~workbench.solver.columns` — the system as columns of arrays (taken once per shaft);
* :mod:`~workbench.solver.mesh` — nodes, elements and stations;
* :mod:`~workbench.solver.elements` — flexibility moments, stress per torque, element matrices;
* :mod:`~workbench.solver.assembly` — banded LAPACK (no gears) or sparse LU (gears);
* :mod:`~workbench.solver.recovery` and :mod:`~workbench.solver.statics` — T(x), θ(x), τ(x) and
  reactions by equilibrium, every load case at once;
* :mod:`~workbench.solver.finite_results` — a result beyond the range of numbers refused by name;
* :mod:`~workbench.solver.results` — :class:`Results`, the per-shaft views and tables;
* :mod:`~workbench.solver.batch` — many variants of one topology at once.

An element's behaviour follows exactly from three flexibility moments of its length,

    I_k = ∫₀ᴸ u^k du / (G·K(u)),   k = 0, 1, 2,

so that results are exact, not mesh-dependent: its stiffness is 1/I₀, the consistent nodal loads
of a linearly varying distributed torque follow from I₁ and I₂, and inside it

    T(u) = T(0⁺) − m(u),   m(u) = ∫₀ᵘ t,
    θ(u) = θ_a + ∫₀ᵘ T/(G·K).

References
----------
.. [1] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (direct stiffness method, element flexibility and stiffness) and ch. 12
   (constraints by Lagrange multipliers).
.. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (non-uniform torsion,
   φ = ∫T dx/(G·J)) and §3.8 (statically indeterminate torsional members).
"""

from __future__ import annotations

import contextlib
import dataclasses
import functools
import os
from collections.abc import Callable
from typing import TYPE_CHECKING

import numpy as np

from workbench.case.units import UnitSystem, display_units
from workbench.solver.assembly import add_diagonal, assemble_band, band_to_sparse
from workbench.solver.columns import CaseTable, case_table
from workbench.solver.elements import CURVE_PIECES, SaintVenantElements
from workbench.solver.finite_results import solve_in_range
from workbench.solver.mesh import Mesh, build_mesh, build_mesh_from_table
from workbench.solver.model import Model
from workbench.solver.results import Envelope, LoadResult, Results, ShaftResult
from workbench.solver.warping_statics import WarpingStationValues

if TYPE_CHECKING:
    import scipy.sparse as sp

    from workbench.case.declaration import CaseFile


def solve(model: Model, mesh: Mesh | None = None) -> Results:
    """Solve every load case of a model and superpose its combinations.

    Parameters
    ----------
    model
        The validated model (SI).
    mesh
        Its mesh, when already built (:func:`build_mesh`); built here otherwise.

    Returns
    -------
    Results
        Reactions, gear torques, and T, θ, τ at every station of every shaft, for every load case
        and combination.

    Raises
    ------
    MechanismError
        When part of the system is free to spin.
    InputError
        When supports or gears contradict each other (two fixed supports at one point, a gear
        held at both ends, a redundant loop of gears).

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2-3, 12.
    """
    return _results(case_table(model), mesh, model.units, model.title, model)


def solve_case(case: CaseFile) -> Results:
    """Solve a decoded case file straight from its columns: no Python object per segment.

    The segments' columns are those the loader kept with the case
    (:mod:`workbench.case.segment_keys`), or read from its objects when it was edited since.
    The same results as ``solve(build_model(case))`` (the same columns, mesh and arithmetic),
    and the same error for bad input, field path and message; the model is built only if a
    reader of the results asks for :attr:`Results.model`.

    Parameters
    ----------
    case
        The decoded case file, in its own units (:mod:`workbench.case.load`).

    Raises
    ------
    InputError
        On anything building the model refuses, or supports and gears that contradict each
        other.
    MechanismError
        When part of the system is free to spin.
    """
    from workbench.solver.build import build_model  # noqa: PLC0415 - only for solving files
    from workbench.solver.case_columns import case_system  # noqa: PLC0415

    system = case_system(case)
    if system.warps:  # restrained torsion reads the sections' warping from the model
        return solve(build_model(case))
    return _results(
        system.table, None, system.units, system.title, functools.partial(build_model, case)
    )


def solve_file(path: str | os.PathLike[str]) -> Results:
    """Read, check and solve a case file, as :func:`solve_case` does.

    The decoded file is let go once its columns are taken, before the solve (at 10⁶ segments
    it holds a quarter of a gigabyte); :attr:`Results.model`, when asked for, reads the file
    again.

    Raises
    ------
    InputError
        When the file cannot be read, is not a valid case, or its supports and gears
        contradict each other.
    MechanismError
        When part of the system is free to spin.
    """
    from workbench.case.load import load_case_file  # noqa: PLC0415 - only for solving files
    from workbench.solver.build import build_model, read_beside  # noqa: PLC0415
    from workbench.solver.case_columns import case_system  # noqa: PLC0415

    with read_beside(path):  # drawings named relative to the case file
        case = load_case_file(path)
        system = case_system(case)
        if system.warps:  # restrained torsion reads the sections' warping from the model
            return solve(build_model(case))
    del case  # let the decoded file go before the solve
    source = functools.partial(_model_of_file, path, build_model, load_case_file, read_beside)
    return _results(system.table, None, system.units, system.title, source)


def _model_of_file(
    path: str | os.PathLike[str],
    build: Callable[[CaseFile], Model],
    load: Callable[[str | os.PathLike[str]], CaseFile],
    beside: Callable[[str | os.PathLike[str]], contextlib.AbstractContextManager[None]],
) -> Model:
    with beside(path):
        return build(load(path))


def _results(
    table: CaseTable,
    mesh: Mesh | None,
    units: UnitSystem,
    title: str,
    source: Model | Callable[[], Model],
) -> Results:
    """Solve a table (one variant) and wrap its arrays as :class:`Results`."""
    mesh = mesh if mesh is not None else build_mesh_from_table(table)
    token = display_units.set(units)  # a refusal quotes values in the case's own units
    try:
        solution = solve_in_range(table, mesh)
    finally:
        display_units.reset(token)
    arrays = {
        name: getattr(solution, name)[:, 0]
        for name in ("reactions", "gear_torques", "torque", "angle", "shear_stress", "node_angle")
    }
    for array in arrays.values():
        array.setflags(write=False)
    warping = solution.warping
    if warping is not None:
        warping = WarpingStationValues(
            *(getattr(warping, item.name)[:, 0] for item in dataclasses.fields(warping))
        )
    return Results(
        table=table,
        mesh=mesh,
        names=solution.names,
        **arrays,
        units=units,
        title=title,
        source=source,
        warping=warping,
    )


def torsion_stiffness_matrix(model: Model, mesh: Mesh | None = None) -> sp.csr_matrix:
    """The assembled, unconstrained stiffness matrix (N·m/rad) over all mesh nodes.

    Springs are on the diagonal; fixed supports and gears are not applied. For benchmarks and
    for other analyses (vibration) built on the same elements.
    """
    table = case_table(model)
    mesh = mesh if mesh is not None else build_mesh_from_table(table)
    band = assemble_band(SaintVenantElements(mesh.flexibility[None]), mesh.shaft_node_start, 1)
    springs = np.flatnonzero(~table.support_fixed)
    add_diagonal(
        band,
        mesh.nodes_of(table.support_shaft[springs], table.support_x[springs]),
        table.support_stiffness[:, springs],
    )
    import scipy.sparse as sp  # noqa: PLC0415 - statics without gears needs no sparse matrix

    return sp.csr_matrix(band_to_sparse(band))


__all__ = [
    "CURVE_PIECES",
    "Envelope",
    "LoadResult",
    "Mesh",
    "Results",
    "ShaftResult",
    "build_mesh",
    "solve",
    "solve_case",
    "solve_file",
    "torsion_stiffness_matrix",
]
