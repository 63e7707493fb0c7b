"""What the record takes from a notebook: the case the panel holds, and the title block.

Contract with the panel: the panel's case is the *last* cell output carrying the MIME type
:data:`CASE_MIME_TYPE` (its data is the case dict, as in a case file). Failing that, the
notebook metadata ``{"workbench": {"case_file": "relative/path.json"}}`` names a case file,
relative to the notebook's folder. Numbers in other outputs are never read: the record
recomputes everything from the case.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.solver.io import decode_case_text

__all__ = [
    "CASE_MIME_TYPE",
    "TEXT_FIELDS",
    "TITLE_BLOCK_MIME_TYPE",
    "TITLE_FIELDS",
    "find_case",
    "has_case_output",
    "outputs_of",
    "title_block_from",
]

from workbench.case import CASE_MIME_TYPE, TITLE_BLOCK_MIME_TYPE
from workbench.case.title_block import HISTORY_FIELDS, TEXT_FIELDS, TITLE_FIELDS


def _outputs(nb: Any, mime_type: str = CASE_MIME_TYPE) -> list[Any]:
    """The data of every code cell output of ``mime_type``, in order."""
    found = []
    for cell in nb.get("cells", []):
        if cell.get("cell_type") != "code":
            continue
        for output in cell.get("outputs", []):
            data = output.get("data") or {}
            if mime_type in data:
                found.append(data[mime_type])
    return found


def outputs_of(nb: Any, mime_type: str) -> list[Any]:
    """The data of every code cell output of ``mime_type``, in order (a study's, say)."""
    return _outputs(nb, mime_type)


def has_case_output(nb: Any) -> bool:
    """Whether any code cell output carries the panel's case."""
    return bool(_outputs(nb))


def find_case(nb: Any, notebook_dir: Path | None) -> tuple[dict[str, Any], str]:
    """The case the notebook holds, and where it came from.

    Parameters
    ----------
    nb
        The notebook (``nbformat.NotebookNode`` or a plain dict), executed.
    notebook_dir
        Folder of the notebook file, for a relative ``case_file``; ``None`` for the working
        folder.

    Returns
    -------
    tuple
        ``(case dict, source)``; source is ``"cell output"`` or ``"case file <path>"``.

    Raises
    ------
    InputError
        When the notebook holds no case output and names no readable case file.
    """
    outputs = _outputs(nb)
    if outputs:
        data = outputs[-1]
        if isinstance(data, str):  # some front ends store JSON MIME data as text
            data = decode_case_text(data, f"notebook output {CASE_MIME_TYPE}")
        if not isinstance(data, dict):
            msg = f"the case output must be a JSON object, not {type(data).__name__}"
            raise InputError(CASE_MIME_TYPE, msg)
        return copy.deepcopy(dict(data)), "cell output"
    metadata = (nb.get("metadata") or {}).get("workbench") or {}
    case_file = metadata.get("case_file")
    if not case_file:
        msg = (
            f"the notebook holds no case: no cell output of type {CASE_MIME_TYPE} and no "
            "metadata workbench.case_file"
        )
        raise InputError("notebook", msg)
    path = Path(str(case_file))
    if not path.is_absolute():
        path = (notebook_dir or Path.cwd()) / path
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        msg = f"cannot read the case file {path}: {error.strerror or error}"
        raise InputError("metadata.workbench.case_file", msg) from None
    data = decode_case_text(text, str(path))
    if not isinstance(data, dict):
        raise InputError(str(path), "a case file must be a JSON object")
    return data, f"case file {case_file}"


def _json_object(data: Any, field: str) -> dict[str, Any]:
    """An output's JSON object (some front ends store JSON MIME data as text)."""
    if isinstance(data, str):
        try:
            data = json.loads(data)
        except ValueError:
            raise InputError(field, "is not valid JSON") from None
    if not isinstance(data, dict):
        raise InputError(field, f"must be a JSON object, not {type(data).__name__}")
    return dict(data)


def title_block_from(nb: Any, overrides: dict[str, Any] | None = None) -> dict[str, Any]:
    """The title block: metadata, then the title-block editor's output, then ``overrides``.

    The notebook metadata ``workbench.title_block`` first, then the last output of type
    :data:`TITLE_BLOCK_MIME_TYPE` (the panel's title-block editor), then ``overrides``. Each source replaces the fields it gives. Only known keys are kept (:data:`TITLE_FIELDS`,
    :data:`TEXT_FIELDS` and ``revision_history``, a list of ``{"revision", "date", "by",
    "description"}``); every value is text.

    Raises
    ------
    InputError
        For a title block that is not an object or a revision history that is not a list.
    """
    metadata = (nb.get("metadata") or {}).get("workbench") or {}
    raw = _json_object(metadata.get("title_block") or {}, "metadata.workbench.title_block")
    outputs = _outputs(nb, TITLE_BLOCK_MIME_TYPE)
    if outputs:
        edited = _json_object(outputs[-1], TITLE_BLOCK_MIME_TYPE)
        raw.update({key: value for key, value in edited.items() if value not in (None, "")})
    raw.update({key: value for key, value in (overrides or {}).items() if value is not None})
    block: dict[str, Any] = {}
    for key in (*TITLE_FIELDS, *TEXT_FIELDS):
        if raw.get(key) not in (None, ""):
            block[key] = str(raw[key])
    history = raw.get("revision_history") or []
    if not isinstance(history, list):
        raise InputError("title_block.revision_history", "must be a list of revisions")
    rows = []
    for number, item in enumerate(history):
        if not isinstance(item, dict):
            msg = f"must be an object, not {type(item).__name__}"
            raise InputError(f"title_block.revision_history[{number}]", msg)
        rows.append({key: str(item.get(key, "")) for key in HISTORY_FIELDS})
    if rows:
        block["revision_history"] = rows
    return json.loads(json.dumps(block))
