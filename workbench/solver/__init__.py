"""The shared torsion solver: case files → validated model → solve → results → checks.

numpy and scipy only (pint is loaded lazily for non-SI units, pandas lazily for DataFrames); no
widget, nbconvert or matplotlib module is ever imported here.

>>> from workbench.solver import load_case, solve, run_checks
>>> results = solve(load_case("case.json"))          # doctest: +SKIP
"""

from workbench.solver.analysis import (
    Envelope,
    LoadResult,
    Mesh,
    Results,
    ShaftResult,
    build_mesh,
    solve,
)
from workbench.solver.batch import BatchResults, solve_batch
from workbench.solver.checks import CAUTION, Check, CheckReport, DesignCriteria, run_checks
from workbench.solver.errors import InputError, MechanismError, WorkbenchError
from workbench.solver.io import case_to_dict, load_case, parse_case, save_case
from workbench.solver.materials import LIBRARY, Material, library_material
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
from workbench.solver.modes import Modes, natural_modes
from workbench.solver.sizing import SizingRequest, size_shafts
from workbench.solver.units import SI, SI_ENGINEERING, UnitSystem, us_customary

__all__ = [
    "CAUTION",
    "LIBRARY",
    "SI",
    "SI_ENGINEERING",
    "BatchResults",
    "Check",
    "CheckReport",
    "Combination",
    "DesignCriteria",
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
    "SizingRequest",
    "Support",
    "UnitSystem",
    "WorkbenchError",
    "build_mesh",
    "case_to_dict",
    "library_material",
    "load_case",
    "natural_modes",
    "parse_case",
    "run_checks",
    "save_case",
    "size_shafts",
    "solve",
    "solve_batch",
    "us_customary",
]
