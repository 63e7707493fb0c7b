"""Studies: many variants of one case drawn from a plan, run on dask, summarised.

Between the design rules and the faces: a plan (:mod:`~workbench.study.plan`) names the inputs
varied by their case-file path and their distributions; the engine
(:mod:`~workbench.study.engine`) runs chunks of the batch path on a ``dask.distributed`` cluster
and writes one parquet row per variant; the summary (:mod:`~workbench.study.summary`) reads it
back. A face runs :func:`run_study` with a progress callback and a cancel flag.
"""

from workbench.study.engine import Progress, StudyOutcome, run_study
from workbench.study.plan import Plan, plan_reference, read_plan
from workbench.study.summary import summarise, summary_text

__all__ = [
    "Plan",
    "Progress",
    "StudyOutcome",
    "plan_reference",
    "read_plan",
    "run_study",
    "summarise",
    "summary_text",
]
