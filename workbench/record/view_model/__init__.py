"""The record as plain data: one view model per section, in the order the record shows them.

Each section is a :class:`Section` — its anchor id, its heading and its view (strings already
formatted in the case's units, numbers, lists, small dataclasses) — rendered by the template
``sections/<id>.html.j2``. No markup is written here; the templates escape every value.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from markupsafe import Markup

import workbench
from workbench.design.caution import CAUTION
from workbench.record.computation import Computation
from workbench.record.view_model.checks import checks_view
from workbench.record.view_model.common import Equation, equations
from workbench.record.view_model.cover import cover_view, heading
from workbench.record.view_model.fatigue import fatigue_view
from workbench.record.view_model.front import SignatureView, purpose_view, revisions_view
from workbench.record.view_model.hand_check import hand_check_view
from workbench.record.view_model.inputs import inputs_view
from workbench.record.view_model.results import results_view
from workbench.record.view_model.study import study_view
from workbench.record.view_model.vibration import vibration_view
from workbench.record.view_model.warping import warping_view

__all__ = ["Section", "heading", "record_sections", "study_section", "verified_sections"]


@dataclass(frozen=True)
class Section:
    """One section of the record.

    Attributes
    ----------
    ident
        Its ``id`` in the page (also the name of its template).
    title
        Its heading.
    view
        What its template shows.
    """

    ident: str
    title: str
    view: Any

    @property
    def template(self) -> str:
        """The section's template, below ``templates/workbench_record/``."""
        return f"sections/{self.ident}.html.j2"


def extra_sections(computation: Computation, printed: bool = True) -> list[Section]:
    """Restrained warping, torsional vibration and fatigue sections, when the case has them."""
    out = []
    if computation.results.warping is not None:  # cases whose sections warp, only
        restrained = warping_view(computation.results, printed)
        out.append(Section("warping", "Restrained warping", restrained))
    if computation.modes is not None or computation.modes_error is not None:
        view = vibration_view(computation, printed)
        out.append(Section("vibration", "Torsional vibration", view))
    if computation.report.design.fatigue is not None:
        out.append(Section("fatigue", "Fatigue", fatigue_view(computation.report, printed)))
    return out


def verified_sections(computation: Computation, earlier: bool = False) -> list[Section]:
    """The sections the verifier rebuilds from the signed case (results, checks, vibration…).

    ``earlier``: as records signed before units were printed by the unit library wrote them
    (``N*m``, ``kg*m**2``; failing check rows not marked), so that those records still verify.
    """
    printed = not earlier
    return [
        Section("results", "Results", results_view(computation.results, printed)),
        *extra_sections(computation, printed),
        Section("checks", "Design checks", checks_view(computation.report, printed, printed)),
    ]


@dataclass(frozen=True)
class WarpingMethodView:
    """The Method section of a case whose sections warp: its equations, and that it warps."""

    rows: tuple[Equation, ...]
    warps: bool = True


def method_view(computation: Computation) -> tuple[Equation, ...] | WarpingMethodView:
    """The Method section's view: the equations alone, as every other record has always had."""
    rows = equations("statics")
    return rows if computation.results.warping is None else WarpingMethodView(rows)


def study_section(study: dict[str, Any], computation: Computation) -> Section:
    """The study section, drawn from the signed study alone (the verifier draws it again)."""
    return Section("study", "Study", study_view(study, computation.model.units))


def record_sections(
    computation: Computation,
    title_block: Mapping[str, Any],
    notebook_html: str,
    *,
    signer: str,
    signed_at: str,
    fingerprint: str | None,
    case_source: str,
    study: dict[str, Any] | None = None,
) -> list[Section]:
    """Every section of the record, in order.

    Parameters
    ----------
    computation
        From :func:`workbench.record.computation.compute`.
    title_block
        The notebook's title block (with the command line's fields over it).
    notebook_html
        The notebook's cells, already sanitized by :mod:`workbench.record.sanitize`.
    signer, signed_at, fingerprint
        Who signs, when (ISO 8601 UTC) and the key's thumbprint (``None``: unsigned).
    case_source
        Where the case came from (``cell output`` or ``case file …``).
    study
        The study signed with the record (:func:`workbench.record.study.study_payload`), or
        ``None``: then no study section.
    """
    model, report = computation.model, computation.report
    hand_check, hand_warnings = hand_check_view(computation)
    warnings = [*report.notes, *hand_warnings]
    if computation.results.warping is not None:  # the unmodelled restraint, rotations beyond 1 rad
        warnings = [*computation.results.warnings, *warnings]
    failing = [check for check in report.checks if not check.passes]
    if failing:
        warnings.append(f"{len(failing)} check(s) fail; see Design checks")
    if fingerprint is None:
        warnings.append("the record is UNSIGNED")
    results, *extra, checks = verified_sections(computation)
    return [
        Section(
            "title",
            "Title block and verdict",
            cover_view(
                title_block, report, signer=signer, signed_at=signed_at, fingerprint=fingerprint
            ),
        ),
        Section("purpose", "Purpose and scope", purpose_view(title_block, model)),
        Section("inputs", "Inputs", inputs_view(model, report.design)),
        Section("method", "Method and assumptions", method_view(computation)),
        results,
        *extra,
        checks,
        *([study_section(study, computation)] if study is not None else []),
        Section("hand-check", "Independent check", hand_check),
        Section("warnings", "Warnings", warnings),
        Section("caution", "Caution", CAUTION),
        Section("revisions", "Revision history", revisions_view(title_block)),
        Section("signature", "Signature", SignatureView(signer, signed_at, fingerprint)),
        Section(
            "software",
            "Software",
            {"version": workbench.__version__, "case_source": case_source},
        ),
        # The one place the notebook's cells pass unescaped: they are HTML, already cleaned by
        # workbench.record.sanitize (an allow-list; no script, style, event handler or fetch).
        Section("notebook", "Notebook", Markup(notebook_html)),
    ]
