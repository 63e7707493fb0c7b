"""A small title-block editor: project, calculation number, revision, names and dates.

A kernel cannot write the notebook's metadata, so the editor keeps the title block as a cell
output of type :data:`~workbench.case.TITLE_BLOCK_MIME_TYPE`, updated on every edit; the
calculation record reads the last such output over the notebook's metadata (the command line's
options still override both)::

    from workbench.panel.title_block import TitleBlockEditor
    TitleBlockEditor.show_new({"project": "Orchard line", "revision": "A"})
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

import ipywidgets as w
from IPython.display import display

from workbench.case import TITLE_BLOCK_MIME_TYPE
from workbench.case.title_block import TITLE_FIELDS

__all__ = ["TitleBlockEditor", "title_block_bundle"]

#: Longest text kept in one field (a title block is short; a longer paste is cut).
MAX_FIELD_LENGTH = 200


def title_block_bundle(block: Mapping[str, str]) -> dict[str, Any]:
    """The output the record reads: the fields given, as JSON and as readable text."""
    fields = {key: str(block[key]) for key in TITLE_FIELDS if block.get(key)}
    text = "; ".join(f"{TITLE_FIELDS[key]}: {value}" for key, value in fields.items())
    return {
        TITLE_BLOCK_MIME_TYPE: json.loads(json.dumps(fields)),
        "text/plain": f"title block — {text or 'empty'}",
    }


class TitleBlockEditor:
    """One text field per title-block field; every edit updates the kept output.

    Parameters
    ----------
    initial
        Starting values by key (:data:`~workbench.case.title_block.TITLE_FIELDS`); unknown keys
        are ignored.
    """

    def __init__(self, initial: Mapping[str, Any] | None = None) -> None:
        initial = initial or {}
        self.fields = {
            key: w.Text(
                value=str(initial.get(key) or "")[:MAX_FIELD_LENGTH],
                description=label,
                style={"description_width": "10em"},
                layout=w.Layout(width="32em"),
            )
            for key, label in TITLE_FIELDS.items()
        }
        for field in self.fields.values():
            field.observe(self._edited, names="value")
        heading = w.Label("Title block (kept in this notebook for the calculation record)")
        self.root = w.VBox([heading, *self.fields.values()])
        self._handle: Any = None

    @property
    def block(self) -> dict[str, str]:
        """The fields filled in, by key (each cut to :data:`MAX_FIELD_LENGTH` characters)."""
        return {
            key: field.value.strip()[:MAX_FIELD_LENGTH]
            for key, field in self.fields.items()
            if field.value.strip()
        }

    def show(self) -> None:
        """Display the fields and the output the record reads."""
        display(self.root)
        self._handle = display(title_block_bundle(self.block), raw=True, display_id=True)

    @classmethod
    def show_new(cls, initial: Mapping[str, Any] | None = None) -> TitleBlockEditor:
        """A new editor, displayed."""
        editor = cls(initial)
        editor.show()
        return editor

    def _edited(self, _change: Any) -> None:
        if self._handle is not None:
            self._handle.update(title_block_bundle(self.block), raw=True)
