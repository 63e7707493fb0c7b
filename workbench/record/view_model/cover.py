"""The record's cover: the title block, the overall verdict, the signature status, a summary.

A checker reads page 1 first: who made the calculation and for what, whether every check passes
(and, if not, which check governs, how far over it is and where), whether the record is signed,
and in one paragraph what system was checked under which loads.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from workbench.design.checks import CheckReport
from workbench.record.notebook import TITLE_FIELDS
from workbench.record.view_model.common import Rows, number, unit_label
from workbench.solver.model import Model

__all__ = ["CoverView", "cover_view", "heading"]

#: How many failing checks the cover lists (the Design checks section lists every one).
COVER_FAILING_ROWS = 5


@dataclass(frozen=True)
class CoverView:
    """What page 1 shows.

    Attributes
    ----------
    signed
        Whether the record carries a signature.
    heading
        The record's heading (the subject, else the case's title).
    fields
        The title block: ``[label, value]`` rows, ``—`` for a field left out.
    passes
        Whether every check passes.
    verdict
        The verdict in words (with how many checks fail).
    governing
        The governing check in words: what, where, in which result, its utilisation.
    failing
        Up to :data:`COVER_FAILING_ROWS` failing checks, worst first: result, shaft, segment,
        check, utilisation.
    more_failing
        How many failing checks the cover leaves to the Design checks section.
    signature
        The signature status in words.
    summary
        One paragraph on the system and its load cases.
    """

    signed: bool
    heading: Any
    fields: Rows
    passes: bool
    verdict: str
    governing: str
    failing: Rows
    more_failing: int
    signature: str
    summary: str


def heading(title_block: Mapping[str, Any], model: Model) -> Any:
    """The record's heading (and page title): the subject, else the case's title."""
    return title_block.get("subject") or model.title or "Calculation record"


def _kind(kind: str) -> str:
    return kind.replace("_", " ")


def _governing(report: CheckReport) -> str:
    check = report.governing
    if check is None:
        return "No check applies to this case."
    units = report.results.model.units
    where = f"shaft {check.shaft}"
    if check.segment is not None:
        where += f", segment {check.segment}"
    x = f"{number(units.from_si(check.x, 'length'))} {unit_label(units, 'length')}"
    return (
        f"Governing check: {_kind(check.kind)} on {where} at x = {x}, in “{check.result}”: "
        f"utilisation {check.utilisation:.3f} ({'passes' if check.passes else 'FAILS'})."
    )


def _plural(count: int, word: str) -> str:
    return f"{count} {word}" + ("" if count == 1 else "s")


def _names(names: list[str], quote: bool = True) -> str:
    """``a``, ``a and b``, ``a, b and c`` (each in quotation marks when ``quote``)."""
    quoted = [f"“{name}”" if quote else name for name in names]
    if len(quoted) <= 1:
        return "".join(quoted)
    return ", ".join(quoted[:-1]) + " and " + quoted[-1]


def summary_text(model: Model) -> str:
    """One paragraph on the system checked and the loads it carries."""
    units = model.units
    length = unit_label(units, "length")
    shafts = _names(
        [
            f"{shaft.id} ({number(units.from_si(shaft.length, 'length'))} {length}, "
            f"{_plural(len(shaft.segments), 'segment')})"
            for shaft in model.shafts
        ],
        quote=False,
    )
    kinds = Counter(support.kind for support in model.supports)
    supports = ", ".join(f"{count} {kind}" for kind, count in sorted(kinds.items()))
    materials = sorted(
        {layer.material.name for s in model.shafts for g in s.segments for layer in g.layers}
    )
    parts = [f"{_plural(len(model.supports), 'support')} ({supports})"]
    if model.gears:
        parts.append(f"{_plural(len(model.gears), 'gear mesh')} coupling the shafts")
    if model.discs:
        parts.append(f"{_plural(len(model.discs), 'disc')} of rotary inertia")
    text = (
        f"The system is {_plural(len(model.shafts), 'shaft')} in torsion — {shafts} — with "
        f"{_names(parts, quote=False)}; {'materials' if len(materials) > 1 else 'material'} "
        f"{_names(materials)}. "
    )
    cases = [case.name for case in model.load_cases]
    text += f"It is checked under {_plural(len(cases), 'load case')} ({_names(cases)})"
    combinations = [combination.name for combination in model.combinations]
    if combinations:
        text += (
            f" and {_plural(len(combinations), 'factored combination')} ({_names(combinations)})"
        )
    return text + "; every number in this record is recomputed from the case it signs."


def cover_view(
    title_block: Mapping[str, Any],
    report: CheckReport,
    *,
    signer: str,
    signed_at: str,
    fingerprint: str | None,
) -> CoverView:
    """Page 1 of the record.

    Parameters
    ----------
    title_block
        From :func:`workbench.record.notebook.title_block_from`.
    report
        The checks of the case.
    signer, signed_at, fingerprint
        Who signs, when (ISO 8601 UTC) and the key's thumbprint (``None``: unsigned).
    """
    model = report.results.model
    failing = sorted(
        (check for check in report.checks if not check.passes),
        key=lambda check: -check.utilisation,
    )
    verdict = (
        "ALL CHECKS PASS"
        if report.passes
        else f"SOME CHECKS FAIL — {len(failing)} of {len(report.checks)} checks"
    )
    if fingerprint is None:
        signature = "UNSIGNED — nothing proves who made this record or that it is unchanged."
    else:
        signature = (
            f"Signed by {signer or 'a signer not named'} at {signed_at} (UTC), "
            f"key fingerprint {fingerprint}; see Verification at the end."
        )
    return CoverView(
        signed=fingerprint is not None,
        heading=heading(title_block, model),
        fields=[[label, title_block.get(key, "—")] for key, label in TITLE_FIELDS.items()],
        passes=report.passes,
        verdict=verdict,
        governing=_governing(report),
        failing=[
            [
                check.result,
                check.shaft,
                "—" if check.segment is None else check.segment,
                _kind(check.kind),
                f"{check.utilisation:.3f}",
            ]
            for check in failing[:COVER_FAILING_ROWS]
        ],
        more_failing=max(0, len(failing) - COVER_FAILING_ROWS),
        signature=signature,
        summary=summary_text(model),
    )
