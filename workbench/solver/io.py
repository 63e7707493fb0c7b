"""Case files ⇄ :class:`~workbench.solver.model.Model`: the entry points every face uses.

Reading is :mod:`workbench.case.load` (bytes or plain JSON values → a validated case file, with
every limit) followed by :func:`~workbench.solver.build.build_model` (file units → SI, the model's
own checks); writing is :func:`~workbench.solver.build.case_file_of` followed by
:mod:`workbench.case.save` (defaults left out, atomic write). Errors are :class:`InputError`
naming the field by its path, e.g.
``shafts[0].segments[1].section.inner_diameter: must be smaller than outer_diameter (30 ≥ 20 mm)``.
"""

from __future__ import annotations

import os
from typing import Any

from workbench.case.load import case_file_from_document, decode_document, load_case_file
from workbench.case.units import UnitSystem
from workbench.solver.build import build_model, case_file_of, read_beside
from workbench.solver.model import Model

__all__ = [
    "case_to_dict",
    "decode_case_text",
    "load_case",
    "parse_case",
    "save_case",
]


def parse_case(data: Any) -> Model:
    """Validate a decoded case file (plain JSON values) and build its SI model.

    Parameters
    ----------
    data
        The decoded JSON document.

    Returns
    -------
    Model
        The model, with ``units`` set to the file's unit system.

    Raises
    ------
    InputError
        On any invalid key, value or reference, naming the field.
    """
    return build_model(case_file_from_document(data))


def decode_case_text(text: str | bytes, source: str = "case") -> Any:
    """Decode case-file text to plain JSON values within every limit of a case file.

    Raises
    ------
    InputError
        On text that is not JSON (naming line and column), or that breaks a limit.
    """
    return decode_document(text, source)


def load_case(path: str | os.PathLike[str]) -> Model:
    """Read and validate a case file.

    Parameters
    ----------
    path
        The JSON file.

    Raises
    ------
    InputError
        When the file cannot be read, is not JSON, or is not a valid case.
    """
    with read_beside(path):  # drawings named relative to the case file
        return build_model(load_case_file(path))


def case_to_dict(model: Model, units: UnitSystem | None = None) -> dict[str, Any]:
    """The case file of a model, in ``units`` (default: the model's own).

    Parameters
    ----------
    model
        The model.
    units
        Units to write the numbers in.
    """
    from workbench.case.save import case_document  # noqa: PLC0415 - only when saving

    return case_document(case_file_of(model, units))


def save_case(model: Model, path: str | os.PathLike[str], units: UnitSystem | None = None) -> None:
    """Write a model as a case file, atomically (temporary file + rename)."""
    from workbench.case.save import write_json_atomic  # noqa: PLC0415 - only when saving

    write_json_atomic(path, case_to_dict(model, units))
