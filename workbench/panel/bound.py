"""Parts of the panel bound to the case document through its :class:`~workbench.panel.form.Form`.

:class:`Bound` is any part that edits the document (the drawing's handles, the inspector, the
palette); :class:`Editor` is one tab of the table view, rebuilt from the document after every
structural change; :func:`row` lays out one editor row.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as w

from workbench.panel.form import Form
from workbench.panel.shared import shared_layout


class Bound:
    """A part of the panel that edits the case document through its :class:`Form`."""

    form: Form

    @property
    def document(self) -> dict[str, Any]:
        """The case document edited."""
        return self.form.document


class Editor(Bound):
    """One editor tab: a box rebuilt from the document after every structural change.

    Parameters
    ----------
    form
        The fields' factory, bound to the case document.
    shown_shaft
        The number of the shaft the panel shows (the segment rows and new items follow it).
    """

    #: The tab's title.
    title = ""

    def __init__(self, form: Form, shown_shaft: Callable[[], int]) -> None:
        self.form = form
        self.shown_shaft = shown_shaft
        self.box = w.VBox()

    def shaft_ids(self) -> list[str]:
        """The ids of the document's shafts, in order."""
        return [s.get("id", "?") for s in self.document.get("shafts", [])]

    def build(self) -> None:
        """Rebuild the box's rows from the document."""
        raise NotImplementedError


def row(parts: list[w.Widget], *, wrap: bool = True) -> w.HBox:
    """One editor row: its widgets centred on a line (wrapping when ``wrap``)."""
    layout = (
        shared_layout(align_items="center", flex_flow="row wrap")
        if wrap
        else shared_layout(align_items="center")
    )
    return w.HBox(parts, layout=layout)
