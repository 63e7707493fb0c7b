"""The drawing as the editor: the elevation's handles, the parts list, the inspector, the palette.

One part is picked at a time (:attr:`DrawingEditor.selected`): by a click on the drawing, by the
parts list (a ``Select``), by typing its name into the finder above the list (a text entry that
offers the parts' names; Enter picks: a part is picked without a mouse, and in JupyterLab, whose
notebook takes arrow keys from a list, keys reach an entry), or by the palette after it adds one. The pick is outlined on the drawing, chosen in the list and shown
in the inspector; every edit goes through the :class:`~workbench.panel.form.Form` as typed
values do, so the solve, the stale marks and the charts follow alike.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as w

from workbench.panel.elevation import Elevation
from workbench.panel.form import Form
from workbench.panel.handles import Handles
from workbench.panel.inspector import Inspector
from workbench.panel.palette import Palette
from workbench.panel.selection import Part, part_label, parts_of, station


class DrawingEditor:
    """The parts of the shaft shown, picked on the drawing or in the list, and edited.

    Parameters
    ----------
    elevation
        The to-scale drawing (its figure gets the handles).
    form
        The fields' factory, bound to the case document.
    shown_shaft
        The number of the shaft shown.
    result
        The result shown.
    """

    def __init__(
        self,
        elevation: Elevation,
        form: Form,
        shown_shaft: Callable[[], int],
        result: Callable[[], Any],
    ) -> None:
        self.form, self.shown_shaft, self.result = form, shown_shaft, result
        self.handles = Handles(elevation, form, shown_shaft, self.pick)
        self.inspector = Inspector(form, self._shaft_ids)
        self.palette = Palette(form, shown_shaft, result, self.pick)
        self.parts_list = w.Select(
            options=[], rows=12, description="", layout=w.Layout(width="300px")
        )
        self.parts_list.add_class("wb-parts")
        self.parts_list.observe(self._listed, "value")
        self.finder = w.Combobox(
            placeholder="type a part's name, Enter",
            options=[],
            ensure_option=True,
            continuous_update=False,
            layout=w.Layout(width="300px"),
        )
        self.finder.add_class("wb-part-finder")
        self.finder.observe(self._found, "value")
        self.parts: list[Part] = []
        self.selected: Part | None = None
        self._muted = False

    def _shaft_ids(self) -> list[str]:
        return [s.get("id", "?") for s in self.form.document.get("shafts", [])]

    def build(self) -> None:
        """Rebuild the parts list and the inspector from the document (a structural change)."""
        document = self.form.document
        self.parts = parts_of(document, self.shown_shaft())
        if self.selected not in self.parts:
            self.selected = None
        self._muted = True
        try:
            labels = [part_label(p, document) for p in self.parts]
            self.parts_list.options = list(zip(labels, [p.key for p in self.parts], strict=True))
            self.parts_list.value = self.selected.key if self.selected is not None else None
            self.finder.options = labels
            self.finder.value = self._label(self.selected)
        finally:
            self._muted = False
        self.palette.refresh()
        self.handles.selected = self.selected
        self.inspector.show(self.selected)

    def reshow(self) -> None:
        """After a unit switch shown in place: the palette's unit and station in the new units."""
        self.palette.refresh()
        if self.selected is not None:
            self.palette.put_at(station(self.selected, self.form.document))

    def draw(self, result: Any) -> None:
        """Redraw the handles and the pick's outline (after the elevation is drawn)."""
        self.handles.draw(result)

    def pick(self, part: Part | None) -> None:
        """Pick ``part``: outline it, choose it in the list, show it in the inspector."""
        if part is not None and part not in self.parts:
            self.parts = parts_of(self.form.document, self.shown_shaft())
            if part not in self.parts:
                return
        if part == self.selected:
            return
        self.selected = part
        self._muted = True
        try:
            self.parts_list.value = part.key if part is not None else None
            self.finder.value = self._label(part)
        finally:
            self._muted = False
        self.handles.selected = part
        self.handles.show_selected()
        if part is not None:
            self.palette.put_at(station(part, self.form.document))
        self.inspector.show(part)

    def _label(self, part: Part | None) -> str:
        return part_label(part, self.form.document) if part is not None else ""

    def _found(self, change: dict[str, Any]) -> None:
        if self._muted:
            return
        document = self.form.document
        chosen = next((p for p in self.parts if part_label(p, document) == change["new"]), None)
        if chosen is not None:
            self.pick(chosen)

    def _listed(self, change: dict[str, Any]) -> None:
        if self._muted:
            return
        chosen = next((p for p in self.parts if p.key == change["new"]), None)
        self.pick(chosen)
