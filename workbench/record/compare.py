"""What changed between two revisions of a calculation record.

:func:`compare_records` verifies both records (:func:`workbench.record.verify.verify_record`),
reads the case each one signs, recomputes its results and checks from that case (never trusting
numbers written in the page), and lists every difference:

- inputs, grouped as dimensions, materials, supports, gears, loads, criteria and other keys,
  each named by its path in the case file (a shaft, material, load case or combination by its
  name, other list entries by their index), in the case file's own units;
- results: every support reaction of every load case and combination, the governing (largest)
  utilisation of every check of every segment over all results, and the verdicts (every
  check's pass or fail and the overall one).

A number has changed when the two values differ by more than ``RELATIVE_TOLERANCE`` of the
larger one: recomputing one unchanged case gives the same numbers, so the tolerance only keeps
the last bits of floating-point arithmetic out of the list.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.design.checks import check_document
from workbench.record.computation import Computation, compute, used_materials
from workbench.record.render import CSP
from workbench.record.templating import record_css, render
from workbench.record.verify import verify_record
from workbench.record.view_model.common import number
from workbench.solver.tables import results_document

__all__ = [
    "RELATIVE_TOLERANCE",
    "Change",
    "Comparison",
    "Revision",
    "compare_records",
    "comparison_html",
    "comparison_text",
]

#: Two numbers differ when |new − old| exceeds this fraction of the larger magnitude.
RELATIVE_TOLERANCE = 1e-9

#: Groups of inputs by the first key of their path (segments' ``material`` go to materials).
_INPUT_GROUPS = {
    "shafts": "dimensions",
    "materials": "materials",
    "supports": "supports",
    "gears": "gears",
    "load_cases": "loads",
    "combinations": "loads",
    "design": "criteria",
}
#: Groups of results.
RESULT_GROUPS = ("reactions", "utilisations", "verdicts")
#: The order groups are listed in.
GROUPS = (
    "dimensions",
    "materials",
    "supports",
    "gears",
    "loads",
    "criteria",
    "other",
    *RESULT_GROUPS,
)


@dataclass(frozen=True)
class Change:
    """One difference between the revisions.

    Attributes
    ----------
    group
        One of :data:`GROUPS`.
    item
        What changed: a case-file path, or a result named in words.
    old, new
        The values in revision A and B (``None``: absent there), in the case file's units.
    change
        ``new − old`` for two numbers, else ``None``.
    relative
        ``(new − old)/|old|`` for two numbers with ``old`` not zero, else ``None``.
    """

    group: str
    item: str
    old: Any
    new: Any
    change: float | None = None
    relative: float | None = None

    def cells(self) -> list[str]:
        """Group, item, old, new and change as a table row writes them."""
        change = "—" if self.change is None else _signed(self.change)
        if self.relative is not None:
            change += f" ({_signed(100.0 * self.relative, 3)} %)"
        elif self.change is None:
            change = "added" if self.old is None else "removed" if self.new is None else "changed"
        return [self.group, self.item, _shown(self.old), _shown(self.new), change]

    def document(self) -> dict[str, Any]:
        """The change as a JSON object (a number that is not finite written as text)."""
        old, new, change, relative = (
            _json_number(v) for v in (self.old, self.new, self.change, self.relative)
        )
        return {
            "group": self.group,
            "item": self.item,
            "old": old,
            "new": new,
            "change": change,
            "relative": relative,
        }


@dataclass(frozen=True)
class Revision:
    """What identifies one of the two records: its file, title block, signer and time."""

    path: str
    title: str
    revision: str
    signer: str
    signed_at: str
    facts: list[str] = field(default_factory=list)

    def document(self) -> dict[str, Any]:
        """The revision as a JSON object."""
        return {
            "path": self.path,
            "title": self.title,
            "revision": self.revision,
            "signer": self.signer,
            "signed_at": self.signed_at,
            "verification": self.facts,
        }


@dataclass(frozen=True)
class Comparison:
    """Both revisions and every change from A to B, inputs first, in :data:`GROUPS` order."""

    a: Revision
    b: Revision
    changes: list[Change]

    @property
    def inputs(self) -> list[Change]:
        """The changes of the case file."""
        return [c for c in self.changes if c.group not in RESULT_GROUPS]

    @property
    def results(self) -> list[Change]:
        """The changes of reactions, governing utilisations and verdicts."""
        return [c for c in self.changes if c.group in RESULT_GROUPS]

    def document(self) -> dict[str, Any]:
        """The comparison as one JSON document."""
        return {
            "a": self.a.document(),
            "b": self.b.document(),
            "relative_tolerance": RELATIVE_TOLERANCE,
            "inputs": [c.document() for c in self.inputs],
            "results": [c.document() for c in self.results],
        }


def _json_number(value: Any) -> Any:
    """``value``, or its text when it is a number JSON cannot hold (infinite, not a number)."""
    return str(value) if _is_number(value) and not math.isfinite(value) else value


def _signed(value: float, digits: int = 5) -> str:
    return ("+" if value > 0 else "") + number(value, digits)


def _shown(value: Any) -> str:
    if value is None:
        return "—"
    return number(value) if _is_number(value) else str(value)


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _differ(old: Any, new: Any) -> bool:
    if _is_number(old) and _is_number(new):
        if not (math.isfinite(old) and math.isfinite(new)):
            return not (math.isnan(old) and math.isnan(new)) and old != new
        return abs(new - old) > RELATIVE_TOLERANCE * max(abs(old), abs(new))
    return bool(old != new)


def _change(group: str, item: str, old: Any, new: Any) -> Change:
    if _is_number(old) and _is_number(new):
        delta = new - old
        relative = delta / abs(old) if old and math.isfinite(delta) else None
        return Change(group, item, old, new, delta, relative)
    return Change(group, item, old, new)


def _label(entry: Any, index: int) -> str:
    """A list entry's name in a path: its ``id`` or ``name`` when it has one, else its index."""
    if isinstance(entry, Mapping):
        for key in ("id", "name"):
            if isinstance(entry.get(key), str):
                return repr(entry[key])
    return str(index)


def _leaves(value: Any, path: str = "") -> Iterator[tuple[str, Any]]:
    """``(path, value)`` of every scalar of a case, lists keyed by their entries' names."""
    if isinstance(value, Mapping):
        for key, item in value.items():
            yield from _leaves(item, f"{path}.{key}" if path else str(key))
    elif isinstance(value, list):
        for index, item in enumerate(value):
            yield from _leaves(item, f"{path}[{_label(item, index)}]")
    else:
        yield path, value


def _input_group(path: str) -> str:
    if path.endswith(".material") or path.startswith("library material"):
        return "materials"
    head = path.split(".", 1)[0].split("[", 1)[0]
    return _INPUT_GROUPS.get(head, "other")


def _compared(group_of: Any, old: Mapping[str, Any], new: Mapping[str, Any]) -> list[Change]:
    items = list(old) + [item for item in new if item not in old]
    return [
        _change(group_of(item), item, old.get(item), new.get(item))
        for item in items
        if _differ(old.get(item), new.get(item))
    ]


#: The values of a library material a comparison lists, with the quantity of each.
_MATERIAL_QUANTITIES = (
    ("shear_modulus", "stress"),
    ("yield_strength", "stress"),
    ("ultimate_strength", "stress"),
    ("elastic_modulus", "stress"),
    ("poisson_ratio", ""),
    ("density", "density"),
    ("source", ""),
)


def _input_values(case: Mapping[str, Any], computation: Computation) -> dict[str, Any]:
    """Every scalar of the case, and the values of each library material it names.

    A library material is named, not written, in the case: its values come from the software
    that made the record, so they are compared too (in the case's units).
    """
    values = dict(_leaves(case))
    own = case.get("materials") or {}
    units = computation.model.units
    for name, material in used_materials(computation.model).items():
        if name in own:
            continue
        for field_name, quantity in _MATERIAL_QUANTITIES:
            value = getattr(material, field_name)
            if quantity and value is not None:
                value = units.from_si(value, quantity)
            values[f"library material {name!r}: {field_name}"] = value
    return values


def _result_values(computation: Computation) -> dict[str, Any]:
    """Reactions, governing utilisations and verdicts of one revision, keyed by their names."""
    values: dict[str, Any] = {}
    supports = computation.model.supports
    units = computation.model.units
    document = results_document(computation.results, units)
    for result in document["results"]:
        for index, reaction in enumerate(result["reactions"]):
            support = supports[index]
            where = f"support {index} ({support.shaft}, {support.kind})"
            values[f"reaction [{units.label('torque')}] at {where}, {result['name']!r}"] = reaction
    checks = check_document(computation.report)
    governing: dict[str, float] = {}
    passes: dict[str, bool] = {}
    for check in checks["checks"]:
        segment = "" if check["segment"] is None else f" segment {check['segment']}"
        name = f"{check['kind']} of {check['shaft']!r}{segment}"
        utilisation = check.get("utilisation")
        if _is_number(utilisation):
            governing[name] = max(governing.get(name, -math.inf), utilisation)
        passes[name] = passes.get(name, True) and bool(check.get("passes"))
    for name, utilisation in governing.items():
        values[f"governing utilisation: {name}"] = utilisation
    for name, passed in passes.items():
        values[f"verdict: {name}"] = "pass" if passed else "FAIL"
    values["verdict: overall"] = "pass" if checks["passes"] else "FAIL"
    return values


def _result_group(item: str) -> str:
    if item.startswith("reaction"):
        return "reactions"
    return "utilisations" if item.startswith("governing") else "verdicts"


def _revision(path: str | Path, public_key_path: str | Path | None) -> tuple[Revision, Any]:
    """Verify one record; its identity and the case it signs."""
    outcome = verify_record(path, public_key_path)
    if not outcome.ok or outcome.problems or outcome.payload is None:
        first = outcome.problems[0] if outcome.problems else "it does not verify"
        msg = f"does not verify, so it cannot be compared: {first}"
        raise InputError(str(path), msg)
    payload = outcome.payload
    block = payload.get("title_block") or {}
    case = payload.get("case")
    if not isinstance(case, Mapping):
        raise InputError(str(path), "the record signs no case")
    revision = Revision(
        path=str(path),
        title=str(case.get("title", "")),
        revision=str(block.get("revision", "")),
        signer=str(payload.get("signer", "")),
        signed_at=str(payload.get("signed_at", "")),
        facts=list(outcome.facts),
    )
    return revision, case


def compare_records(
    path_a: str | Path,
    path_b: str | Path,
    public_key_path: str | Path | None = None,
) -> Comparison:
    """Verify two records and list what changed from A to B.

    Parameters
    ----------
    path_a, path_b
        The older and the newer record (HTML files).
    public_key_path
        The signer's public key (PEM or JWK) both records are checked against; ``None``
        checks each against the key it embeds.

    Returns
    -------
    Comparison
        Both revisions and every change, inputs first.

    Raises
    ------
    InputError
        A record cannot be read, does not verify, or signs no case.

    References
    ----------
    .. [1] See :mod:`workbench.record.verify` (what verifying a record checks).
    """
    revision_a, case_a = _revision(path_a, public_key_path)
    revision_b, case_b = _revision(path_b, public_key_path)
    computation_a, computation_b = compute(case_a), compute(case_b)
    changes = _compared(
        _input_group, _input_values(case_a, computation_a), _input_values(case_b, computation_b)
    )
    changes += _compared(
        _result_group, _result_values(computation_a), _result_values(computation_b)
    )
    changes.sort(key=lambda change: GROUPS.index(change.group))
    return Comparison(revision_a, revision_b, changes)


def _heading(revision: Revision, letter: str) -> str:
    parts = [revision.title or "untitled"]
    if revision.revision:
        parts.append(f"revision {revision.revision}")
    parts.append(f"signed by {revision.signer or 'no one named'} at {revision.signed_at}")
    return f"{letter}: {revision.path} — {', '.join(parts)}"


def comparison_text(comparison: Comparison) -> str:
    """The comparison as plain text: both revisions, then every change, one line each."""
    lines = [_heading(comparison.a, "A"), _heading(comparison.b, "B"), ""]
    for title, changes in (("Inputs", comparison.inputs), ("Results", comparison.results)):
        lines.append(f"{title} changed: {len(changes) or 'none'}")
        for change in changes:
            group, item, old, new, delta = change.cells()
            lines.append(f"  {group}: {item}: {old} → {new}, change {delta}")
        lines.append("")
    return "\n".join(lines)


def comparison_html(comparison: Comparison) -> str:
    """The comparison as one offline HTML page in the record's style (autoescaped template)."""
    return render(
        "compare.html.j2",
        csp=CSP,
        css=record_css(),
        a=comparison.a,
        b=comparison.b,
        headings=(_heading(comparison.a, "A"), _heading(comparison.b, "B")),
        inputs=[change.cells() for change in comparison.inputs],
        results=[change.cells() for change in comparison.results],
        tolerance=RELATIVE_TOLERANCE,
    )
