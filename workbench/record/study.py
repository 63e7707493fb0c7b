"""A study in the calculation record: taken from the notebook, tied to its rows, signed, verified.

How a study gets into a record: the panel's Study tab hands its last finished study to the
notebook as an output of :data:`~workbench.study.attached.STUDY_MIME_TYPE` (a cell
``panel.study.for_record()``); the exporter takes the *last* such output. The record accepts it
only when

* it was run on the record's own case (the case digests agree),
* its rows file (``rows_file``, relative to the notebook's folder or absolute) is there with the
  SHA-256 the panel reported, and
* the first :data:`~workbench.study.attached.CHECKED_ROWS` variants, run again here from the
  plan and seed, agree with the file's first rows (the *rows digest*).

The record then summarises the rows file itself (:func:`~workbench.study.summary.summarise`;
Sobol indices, which need a study of their own, are taken from the panel's summary) and signs
:func:`study_payload`: the plan, the summary, the histogram's counts, the rows file's SHA-256 and
the rows digest. The section is drawn from that payload alone, so the verifier draws it again
from what was signed and compares (:func:`check_study`).

*Rows digest*: SHA-256 of the RFC 8785 canonical JSON of the first rows' ``variant``, inputs,
``valid``, ``reason`` and ``governing_utilisation``, each float cut to 10 significant digits (the
results digest's rule, :func:`~workbench.record.computation.digest_rounded`).
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError, WorkbenchError
from workbench.record.computation import digest_rounded
from workbench.record.notebook import outputs_of
from workbench.signing import canonicalize
from workbench.study.attached import (
    CHECKED_ROWS,
    STUDY_MIME_TYPE,
    case_digest,
    file_digest,
    file_first_rows,
    first_rows,
)
from workbench.study.evaluate import input_names
from workbench.study.histogram import utilisation_histogram
from workbench.study.plan import read_plan
from workbench.study.summary import summarise

__all__ = ["check_study", "find_study", "rows_digest", "study_payload"]


def rows_digest(table: Any, plan_json: str | bytes) -> str:
    """``sha256:<hex>`` of the rows' variant, inputs, validity, reason and governing utilisation."""
    names = ["variant", *input_names(read_plan(plan_json)), "valid", "reason",
             "governing_utilisation"]  # fmt: skip
    columns = {name: table.column(name).to_pylist() for name in names}
    return "sha256:" + hashlib.sha256(canonicalize(digest_rounded(columns))).hexdigest()


def find_study(nb: Any) -> dict[str, Any] | None:
    """The last study output of a notebook, or ``None``."""
    found = outputs_of(nb, STUDY_MIME_TYPE)
    if not found:
        return None
    study = found[-1]
    if not isinstance(study, dict) or not {"plan", "rows_file", "rows_sha256"} <= set(study):
        raise InputError("study", "the notebook's study output is not one the panel wrote")
    return study


def _plan_json(plan: Any) -> bytes:
    return canonicalize(plan)


def study_payload(
    study: dict[str, Any], case: dict[str, Any], folder: Path | None
) -> dict[str, Any]:
    """The study the record signs, checked against its case and its rows file.

    Raises
    ------
    InputError
        The study was run on another case, its rows file is missing or changed, or its first
        variants run again differ from the file's (``study``).
    """
    if study.get("case_digest") != case_digest(case):
        msg = "the notebook's last study was run on another case than the record's: run it again"
        raise InputError("study", msg)
    rows_file = Path(str(study["rows_file"]))
    if not rows_file.is_absolute() and folder is not None:
        rows_file = folder / rows_file
    if not rows_file.is_file():
        raise InputError("study", f"its rows file {str(rows_file)!r} is not there")
    if file_digest(rows_file) != study["rows_sha256"]:
        raise InputError("study", f"its rows file {str(rows_file)!r} changed after the study ran")
    plan_json = _plan_json(study["plan"])
    case_text = canonicalize(case)
    try:
        again = rows_digest(first_rows(case_text, plan_json), plan_json)
    except WorkbenchError as error:
        raise InputError("study", f"its plan cannot be run again: {error}") from None
    if again != rows_digest(file_first_rows(rows_file), plan_json):
        msg = f"its first {CHECKED_ROWS} variants run again differ from the rows file's"
        raise InputError("study", msg)
    plan = read_plan(plan_json)
    summary = summarise(rows_file, plan, plan.count)
    sobol = (study.get("summary") or {}).get("sobol")
    if sobol is not None:
        summary["sobol"] = sobol
    histogram = utilisation_histogram(rows_file)
    payload = {
        "plan": study["plan"],
        "summary": summary,
        "histogram": {"edges": histogram.edges.tolist(), "counts": histogram.counts.tolist()},
        "rows_file": rows_file.name,
        "rows_sha256": study["rows_sha256"],
        "rows_digest": again,
        "checked_rows": min(CHECKED_ROWS, plan.count),
    }
    # As the verifier reads it back from the signed canonical JSON (keys sorted): the section
    # is drawn from the same values either side.
    signed: dict[str, Any] = json.loads(canonicalize(payload))
    return signed


def check_study(
    study: dict[str, Any], case: dict[str, Any], rows_file: Path | None
) -> tuple[list[str], list[str]]:
    """The verifier's checks of a signed study: (facts, problems).

    The first variants are run again from the signed case, plan and seed and their digest
    compared with the signed one; with ``rows_file``, the file's SHA-256 is compared with the
    signed one and its summary, made again, with the signed summary.
    """
    facts: list[str] = []
    problems: list[str] = []
    plan_json = _plan_json(study.get("plan"))
    try:
        again = rows_digest(first_rows(canonicalize(case), plan_json), plan_json)
    except WorkbenchError as error:
        return facts, [f"the study's plan cannot be run again: {error}"]
    count = study.get("checked_rows")
    if again == study.get("rows_digest"):
        facts.append(f"Study: its first {count} variants run again from the plan and seed agree")
    else:
        problems.append(
            f"the study's first {count} variants run again differ from those signed "
            "(rows digest mismatch)"
        )
    if rows_file is None:
        facts.append("Study rows file: not given (--study-rows checks it)")
        return facts, problems
    if not rows_file.is_file():
        raise InputError("--study-rows", f"cannot read {str(rows_file)!r}")
    if file_digest(rows_file) != study.get("rows_sha256"):
        problems.append(f"the study rows file {rows_file.name} is not the one signed (SHA-256)")
        return facts, problems
    plan = read_plan(plan_json)
    summary = summarise(rows_file, plan, plan.count)
    signed = dict(study.get("summary") or {})
    signed.pop("sobol", None)
    if digest_rounded(summary) == digest_rounded(signed):
        facts.append(f"Study rows file: {rows_file.name} is the one signed; its summary agrees")
    else:
        problems.append("the study's summary differs from the one made again from its rows file")
    return facts, problems


def verify_study(
    study: dict[str, Any], computation: Any, written: str, rows_file: Path | None
) -> tuple[list[str], list[str]]:
    """The study section drawn again from the signed study and compared, then :func:`check_study`."""
    from workbench.record.render import render_section  # noqa: PLC0415 - render imports the views
    from workbench.record.view_model import study_section  # noqa: PLC0415

    problems = []
    try:
        section = render_section(study_section(study, computation))
    except (KeyError, TypeError, ValueError, IndexError):
        return [], ["the signed study cannot be read: damaged"]
    if section not in written:
        problems.append("the study section written in the record differs from the signed study")
    facts, found = check_study(study, computation.case, rows_file)
    return facts, [*problems, *found]
