"""The torsion solver: mechanics only — sections, mesh, statics, modes (numpy + scipy).

numpy and scipy only (pint is loaded lazily for non-SI units, pandas lazily for DataFrames); no
widget, nbconvert or matplotlib module is ever imported here.

>>> from workbench.solver import load_case, solve
>>> results = solve(load_case("case.json"))          # doctest: +SKIP
"""

from typing import TYPE_CHECKING, Any

from workbench.case.errors import InputError, MechanismError, WorkbenchError
from workbench.case.materials import LIBRARY, Material, library_material
from workbench.case.units import SI, SI_ENGINEERING, UnitSystem, us_customary
from workbench.solver.analysis import (
    Envelope,
    LoadResult,
    Mesh,
    Results,
    ShaftResult,
    build_mesh,
    solve,
)
from workbench.solver.io import case_to_dict, load_case, parse_case, save_case
from workbench.solver.model import (
    Combination,
    DistributedTorque,
    GearMesh,
    GearPosition,
    Layer,
    LoadCase,
    Model,
    PointTorque,
    Segment,
    Shaft,
    Support,
)

if TYPE_CHECKING:
    from workbench.solver.batch import BatchResults, solve_batch
    from workbench.solver.modes import Modes, natural_modes


def __getattr__(name: str) -> Any:
    # The vibration analysis and the batch path are loaded when first asked for: statics
    # (`workbench solve`) never needs them, and they cost a noticeable part of the command's start.
    if name in ("Modes", "natural_modes"):
        from workbench.solver import modes  # noqa: PLC0415

        return getattr(modes, name)
    if name in ("BatchResults", "solve_batch"):
        from workbench.solver import batch  # noqa: PLC0415

        return getattr(batch, name)
    msg = f"module {__name__!r} has no attribute {name!r}"
    raise AttributeError(msg)


__all__ = [
    "LIBRARY",
    "SI",
    "SI_ENGINEERING",
    "BatchResults",
    "Combination",
    "DistributedTorque",
    "Envelope",
    "GearMesh",
    "GearPosition",
    "InputError",
    "Layer",
    "LoadCase",
    "LoadResult",
    "Material",
    "MechanismError",
    "Mesh",
    "Model",
    "Modes",
    "PointTorque",
    "Results",
    "Segment",
    "Shaft",
    "ShaftResult",
    "Support",
    "UnitSystem",
    "WorkbenchError",
    "build_mesh",
    "case_to_dict",
    "library_material",
    "load_case",
    "natural_modes",
    "parse_case",
    "save_case",
    "solve",
    "solve_batch",
    "us_customary",
]
