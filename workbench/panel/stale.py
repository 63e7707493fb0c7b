"""Stale marks: while the case as edited is not solved, every output derived from it says so.

The panel keeps the last valid case's verdict, tables and charts up (an engineer sees what an
edit changed), but none of them may pass for the case as edited. :class:`StaleMarks` knows every
derived output (each chart, the sweep, the baseline difference, the modes and fatigue sections)
and every note over them: :meth:`StaleMarks.mark` dims them (CSS class ``wb-stale``) and writes,
in each note, why nothing is solved and which field to fix; :meth:`StaleMarks.clear` undoes it.
The summary and the check table say it in their own words (:mod:`workbench.panel.summary`).
"""

from __future__ import annotations

from typing import Any

import ipywidgets as w

from workbench.case.errors import InputError
from workbench.panel.document import field_words, normal_field, parse_path, plain_words
from workbench.panel.markup import render


def stale_reason(error: InputError, document: Any) -> str:
    """Why the case as edited is not solved, led by the field in plain words.

    Parameters
    ----------
    error
        The error of the document (or of a refused entry).
    document
        The case document (its items are named by id or name).
    """
    where = field_words(parse_path(normal_field(error.field)), document)
    message = plain_words(error.message)
    return f"{where}: {message}" if where else message


class StaleMarks:
    """The derived outputs of the panel and the notes over them, marked stale together."""

    def __init__(self) -> None:
        #: Widgets dimmed while stale, by what they show (tests and pages read the names).
        self.outputs: dict[str, w.DOMWidget] = {}
        #: Notes over groups of outputs, by what they cover: empty unless stale.
        self.notes: dict[str, w.HTML] = {}
        #: Why the case as edited is not solved, or ``None``.
        self.reason: str | None = None
        self._updating: tuple[tuple[str, ...], str] | None = None

    def output(self, name: str, widget: w.DOMWidget) -> w.DOMWidget:
        """Register ``widget`` (a chart, a table) as derived from the solve.

        A view built late (the cross-section, opened while the case is not solved) is dimmed at
        once.
        """
        self.outputs[name] = widget
        widget.add_class("wb-derived")
        if self.reason is not None:
            widget.add_class("wb-stale")
        return widget

    def note(self, what: str) -> w.HTML:
        """A note, over outputs showing ``what``, that says why they are stale."""
        note = w.HTML()
        note.add_class("wb-stale-note-line")
        self.notes[what] = note
        return note

    def mark(self, error: InputError, document: Any) -> str:
        """Dim every output and fill every note with the reason; return the reason."""
        self.reason = stale_reason(error, document)
        field = normal_field(error.field) or "case"
        for widget in self.outputs.values():
            widget.add_class("wb-stale")
        for what, note in self.notes.items():
            note.value = render("stale_note", what, self.reason, field)
        return self.reason

    def updating(self, names: tuple[str, ...], what: str) -> None:
        """Dim the outputs ``names`` and say, in the note over ``what``, they are being updated.

        For outputs that follow the rest of a solve (the modes): the case is solved, but what
        they show is still the last case's.
        """
        for name in names:
            self.outputs[name].add_class("wb-stale")
        self.notes[what].value = render("updating_note", what)
        self._updating = (names, what)

    def clear_updating(self) -> None:
        """The outputs marked by :meth:`updating` are current (unless all is stale)."""
        if self.reason is None and self._updating is not None:
            names, what = self._updating
            for name in names:
                self.outputs[name].remove_class("wb-stale")
            self.notes[what].value = ""
        self._updating = None

    def clear(self) -> None:
        """The case is solved: nothing is stale."""
        self._updating = None
        self.reason = None
        for widget in self.outputs.values():
            widget.remove_class("wb-stale")
        for note in self.notes.values():
            note.value = ""
