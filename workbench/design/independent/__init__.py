"""An independent check of the stiffness solution: the force method, coded afresh.

It reads the decoded case file itself (:mod:`workbench.case`), computes the sections' torsion
constants again from published closed forms, picks the redundants from a spanning tree of the
supports and gear meshes, and solves the compatibility equations of the force method. It
imports nothing from :mod:`workbench.solver` (an import-linter contract holds it to that).

Use :func:`independent_check` for the solution, or the reason the check does not cover a case,
and :func:`compare` to set it beside another solution.
"""

from workbench.design.independent.compare import (
    AGREEMENT_TOLERANCE,
    Comparison,
    ComparisonRow,
    compare,
    independent_check,
)
from workbench.design.independent.forcemethod import ForceMethod
from workbench.design.independent.reading import (
    WARPING_NOT_COVERED,
    NotCovered,
    require_uniform_torsion,
)

__all__ = [
    "AGREEMENT_TOLERANCE",
    "WARPING_NOT_COVERED",
    "Comparison",
    "ComparisonRow",
    "ForceMethod",
    "NotCovered",
    "compare",
    "independent_check",
    "require_uniform_torsion",
]
