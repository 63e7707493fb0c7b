"""The record's framing sections: purpose and scope, revisions, signature (the cover: ``cover``)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from workbench.record.computation import has_inertia
from workbench.record.notebook import TEXT_FIELDS
from workbench.record.view_model.common import Rows
from workbench.solver.model import Model

__all__ = [
    "SignatureView",
    "purpose_view",
    "revisions_view",
]


@dataclass(frozen=True)
class SignatureView:
    """Who signed, when, and with which key (``fingerprint`` ``None``: unsigned)."""

    signer: str
    signed_at: str
    fingerprint: str | None


def _default_scope(model: Model) -> str:
    vibration = has_inertia(model)
    fatigue = getattr(model.design, "fatigue", None) is not None
    left_out = ["bending", "axial load"]
    left_out += [] if fatigue else ["fatigue"]
    left_out += [] if vibration else ["vibration"]
    left_out.append("buckling")
    added = [
        *(
            ["torsional vibration (natural frequencies, separation from running speeds)"]
            if vibration
            else []
        ),
        *(["fatigue under the fluctuating torque named in the design"] if fatigue else []),
    ]
    text = f"Torsion only (no {', '.join(left_out[:-1])} or {left_out[-1]}); static loads"
    if added:
        text += "; also " + " and ".join(added)
    return text + "; the members, supports and loads listed under Inputs."


def purpose_view(title_block: Mapping[str, Any], model: Model) -> list[tuple[str, Any]]:
    """``(heading, text)`` of the purpose and the scope: the notebook's, or written from the case."""
    texts = {
        "purpose": title_block.get("purpose")
        or f"Check the shafts of “{model.title or 'the case'}” in torsion: support torques, "
        "internal torque, angle of twist and shear stress for every load case and combination, "
        "against the design criteria stated below.",
        "scope": title_block.get("scope") or _default_scope(model),
    }
    return [(key.capitalize(), texts[key]) for key in TEXT_FIELDS]


def revisions_view(title_block: Mapping[str, Any]) -> tuple[Rows, Any]:
    """Rows of the revision history, and the revision to name when there is none."""
    history = title_block.get("revision_history") or []
    rows = [
        [
            entry.get("revision", ""),
            entry.get("date", ""),
            entry.get("by", ""),
            entry.get("description", ""),
        ]
        for entry in history
    ]
    return rows, title_block.get("revision", "—")
