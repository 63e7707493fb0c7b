"""A study as a calculation record takes it: what the panel hands over, and its first rows.

The panel shows its last finished study as a notebook output of :data:`STUDY_MIME_TYPE` (plain
JSON values, :func:`study_output`); the record's exporter takes the last such output, and the
verifier re-runs the study's first :data:`CHECKED_ROWS` variants from the plan and seed
(:func:`first_rows`) and compares them with what the record signed. Both faces import this
from here (neither imports the other).
"""

from __future__ import annotations

import hashlib
import json
import os
from pathlib import Path
from typing import Any

import pyarrow as pa
import pyarrow.parquet as pq

from workbench.study.evaluate import evaluate_chunk
from workbench.study.plan import BLOCK, read_plan
from workbench.study.sampling import unit_design

#: The MIME type of the panel's study output (the last one in a notebook is the record's).
STUDY_MIME_TYPE = "application/vnd.workbench.study+json"
#: Variants the verifier re-runs.
CHECKED_ROWS = 1000


def file_digest(path: str | os.PathLike[str]) -> str:
    """``sha256:<hex>`` of a file's bytes, read a megabyte at a time."""
    digest = hashlib.sha256()
    with Path(path).open("rb") as stream:
        while block := stream.read(1 << 20):
            digest.update(block)
    return "sha256:" + digest.hexdigest()


def case_digest(case: Any) -> str:
    """``sha256:<hex>`` of a case's JSON (text or decoded), keys sorted, whatever its layout."""
    document = json.loads(case) if isinstance(case, (str, bytes)) else case
    text = json.dumps(document, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return "sha256:" + hashlib.sha256(text.encode("utf-8")).hexdigest()


def first_rows(case_text: str | bytes, plan_json: str | bytes) -> pa.Table:
    """The study's first :data:`CHECKED_ROWS` variants, run again in this process."""
    plan = read_plan(plan_json)
    # Monte Carlo draws a whole block from its stream: the first block runs, its head is kept.
    stop = min(BLOCK, plan.count)
    design = unit_design(plan)
    unit = None if design is None else design[:stop]
    return evaluate_chunk(case_text, plan_json, 0, stop, unit).slice(0, CHECKED_ROWS)


def file_first_rows(path: str | os.PathLike[str]) -> pa.Table:
    """A rows file's first :data:`CHECKED_ROWS` variants (its first row groups only)."""
    source = pq.ParquetFile(path)
    tables, rows = [], 0
    for group in range(source.num_row_groups):
        if rows >= CHECKED_ROWS:
            break
        tables.append(source.read_row_group(group))
        rows += tables[-1].num_rows
    return pa.concat_tables(tables).slice(0, CHECKED_ROWS)


def study_output(
    case_text: str, plan_json: str, summary: dict[str, Any], rows_file: Path, stopped: bool
) -> dict[str, Any]:
    """The panel's study as plain JSON values (the output the record reads)."""
    return {
        "case_digest": case_digest(case_text),
        "plan": json.loads(plan_json),
        "summary": summary,
        "rows_file": str(rows_file),
        "rows_sha256": file_digest(rows_file),
        "stopped": stopped,
    }
