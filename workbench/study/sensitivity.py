"""Sobol indices of the governing utilisation through SALib, on a Saltelli plan of its own.

The plan's inputs span the unit hypercube; SALib's Sobol sampler (Saltelli's scheme, first-order
and total indices, ``calc_second_order=False``) gives N·(k + 2) points, which are mapped through
each input's inverse distribution function and run as a study of their own
(:func:`~workbench.study.engine.run_study`, rows in a parquet file beside the study's). The
indices are not computed when a variant of the plan is not a valid model (the estimator needs
every point), and the summary says so.

References
----------
.. [1] A. Saltelli et al., "Variance based sensitivity analysis of model output. Design and
   estimator for the total sensitivity index", *Computer Physics Communications* 181(2), 2010.
.. [2] J. Herman and W. Usher, "SALib: an open-source Python library for sensitivity analysis",
   *Journal of Open Source Software* 2(9), 2017 (``SALib.sample.sobol``, ``SALib.analyze.sobol``).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pyarrow.parquet as pq

from workbench.study.engine import StudyOutcome, plan_with_count, run_study
from workbench.study.evaluate import input_names
from workbench.study.plan import Plan, read_plan


def _problem(plan: Plan) -> dict[str, Any]:
    names = input_names(plan)
    return {"num_vars": len(names), "names": names, "bounds": [[0.0, 1.0]] * len(names)}


def saltelli_design(plan: Plan) -> np.ndarray:
    """(N·(k + 2), k) SALib's Sobol-sequence points on the unit hypercube, N the plan's."""
    from SALib.sample import sobol  # noqa: PLC0415 - only when indices are asked for

    base = plan.sensitivity.base_count
    points: np.ndarray = sobol.sample(_problem(plan), base, calc_second_order=False,
                                      seed=plan.sampling.seed)  # fmt: skip
    # The Sobol sequence starts at the cube's corner (0 maps to −∞ in a normal input).
    tiny = np.finfo(float).eps
    return np.clip(points, tiny, 1.0 - tiny)


def sobol_indices(
    case_text: str | bytes, plan: Plan, output: Path, **engine: Any
) -> tuple[dict[str, Any], StudyOutcome]:
    """Run the Saltelli plan and return the indices (or why not) with the run's outcome."""
    from SALib.analyze import sobol  # noqa: PLC0415

    design = saltelli_design(plan)
    own = plan_with_count(plan, len(design))
    outcome = run_study(case_text, own, output, unit=design, plan=read_plan(own), **engine)
    found: dict[str, Any] = {"variants": len(design), "base_count": plan.sensitivity.base_count,
                             "parquet": str(output)}  # fmt: skip
    if outcome.stopped:
        return {**found, "why_not": "the run was stopped"}, outcome
    table = pq.read_table(output, columns=["valid", "governing_utilisation"])
    valid = table.column("valid").to_numpy(zero_copy_only=False)
    if not valid.all():
        why = f"{int((~valid).sum())} of its variants are not valid models"
        return {**found, "why_not": why}, outcome
    values = table.column("governing_utilisation").to_numpy()
    indices = sobol.analyze(_problem(plan), values, calc_second_order=False,
                            seed=plan.sampling.seed)  # fmt: skip
    found.update(
        inputs=input_names(plan),
        S1=[float(v) for v in indices["S1"]],
        S1_conf=[float(v) for v in indices["S1_conf"]],
        ST=[float(v) for v in indices["ST"]],
        ST_conf=[float(v) for v in indices["ST_conf"]],
    )
    return found, outcome
