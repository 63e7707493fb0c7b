"""Fields bound to the case document: entries, sliders, pickers, their message lines and marks.

A :class:`Form` makes the widgets every editor is built from. Each widget is bound to a path of
the case document: an edit is written there, mirrored into the other widgets of the same field
(a slider and its entry), and handed to the :class:`~workbench.panel.state.CaseState`. An error is
shown in plain words on the message line nearest to the field it names (the field, else its row,
else its list), and the field is marked. The parts built on a form (each editor tab, the
drawing's handles, the inspector) derive from :mod:`workbench.panel.bound`.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import Any

import ipywidgets as w

from workbench.case.display import format_number
from workbench.case.entry import read_quantity
from workbench.case.errors import InputError
from workbench.panel.document import (
    Path,
    css_name,
    field_words,
    get_at,
    normal_field,
    parse_path,
    path_text,
    plain_words,
    remove_item,
    rename,
    set_at,
    unit_label,
)
from workbench.panel.keys import quantity_of
from workbench.panel.markup import render
from workbench.panel.shared import shared_layout, shared_style, sized
from workbench.panel.state import CaseState

#: Message lines whose key starts so are not an editor's: they outlive a rebuild of the editors.
_KEPT_MESSAGES = "whatif"


def _initial(widget: type) -> w.Widget:
    """A shared style that leaves the description its natural width."""
    return shared_style(widget, description_width="initial")


def clean_number(value: float) -> float | int:
    """Drop float noise from widget values (12 significant digits; whole numbers as int)."""
    rounded = float(f"{value:.12g}")
    return int(rounded) if rounded.is_integer() and abs(rounded) < 1e15 else rounded


def entry_text(value: float) -> str:
    """A value as an entry shows it: four significant figures, thousands grouped (``1,250``).

    Beyond 10⁻³ to 10⁶ it is written with a power of ten (``1.2×10⁷``), which
    :func:`~workbench.case.entry.read_quantity` reads back.
    """
    return format_number(float(value))


def button(text: str, action: Callable[..., Any], width: str = "34px") -> w.Button:
    """A button that runs ``action`` when clicked."""
    widget = w.Button(description=text, layout=sized(width), style=shared_style(w.Button))
    widget.on_click(lambda _: action())
    return widget


class Form:
    """The fields of the editors, bound to the case document of ``state``.

    Parameters
    ----------
    state
        The case being edited.
    rebuild
        Rebuilds every editor from the document (after a structural change).
    """

    def __init__(self, state: CaseState, rebuild: Callable[[], None]) -> None:
        self.state = state
        self._rebuild = rebuild
        #: The widgets of each field, by path text (``shafts[0].segments[1].length``).
        self.fields: dict[str, list[w.Widget]] = {}
        #: The message lines of each field, row or list, by path text.
        self.messages: dict[str, list[w.HTML]] = {}
        self._shown: list[w.HTML] = []
        self._bad: list[w.Widget] = []
        #: While set, widget changes are the panel's own (a rebuild, a mirror), not edits.
        self.muted = False
        #: The field edited last: an error no message line of its own can show is shown there.
        self.edited: Path | None = None
        # While a block runs under :meth:`recording`: the (key, widget) pairs bound in it.
        self._recorded: list[tuple[str, w.Widget]] | None = None
        #: What shows each bound field again in the panel's units (a unit switch keeps the
        #: widgets), given the unit system the document was in before the switch.
        self._reshow: dict[w.Widget, Callable[[Any], None]] = {}

    @property
    def document(self) -> dict[str, Any]:
        """The case document edited."""
        return self.state.document

    def unit(self, quantity: str | None) -> str:
        """The printed unit of a quantity in the panel's units (empty for a plain number)."""
        return unit_label(self.state.units, quantity) if quantity else ""

    def shown_text(self, value: float, quantity: str | None) -> str:
        """A document value (document units) as its entry shows it, in the unit beside it.

        The entry shows four figures; the document keeps the value's full precision, and an
        entry is read only when its text changes, so an untouched field never rounds the case.
        """
        if quantity is not None:
            units = self.state.units
            value = value * units.factor(quantity) / units.readout_factor(quantity)
        return entry_text(value)

    @contextmanager
    def quiet(self) -> Iterator[None]:
        """Widget changes inside the block are not edits."""
        self.muted = True
        try:
            yield
        finally:
            self.muted = False

    @contextmanager
    def recording(self) -> Iterator[list[tuple[str, w.Widget]]]:
        """The fields and message lines made inside the block, to :meth:`unbind` them later."""
        made: list[tuple[str, w.Widget]] = []
        self._recorded = made
        try:
            yield made
        finally:
            self._recorded = None

    def unbind(self, made: list[tuple[str, w.Widget]]) -> None:
        """Unbind the fields and message lines a :meth:`recording` made (they are replaced)."""
        for key, widget in made:
            for table in (self.fields, self.messages):
                if widget in table.get(key, ()):
                    table[key] = [x for x in table[key] if x is not widget]
            self._reshow.pop(widget, None)
        self._shown = [x for x in self._shown if x.comm is not None]
        self._bad = [x for x in self._bad if x.comm is not None]

    def reset(self) -> None:
        """Forget the editors' fields and message lines (they are about to be rebuilt)."""
        self.fields.clear()
        self._reshow.clear()
        self.messages = {k: v for k, v in self.messages.items() if k.startswith(_KEPT_MESSAGES)}
        self._shown, self._bad = [], []

    # --- building fields ------------------------------------------------------------------------

    def register(self, path: Path, widget: w.Widget) -> None:
        """Bind ``widget`` to the field at ``path`` (its errors mark it; its edits mirror)."""
        self.fields.setdefault(path_text(path), []).append(widget)
        if self._recorded is not None:
            self._recorded.append((path_text(path), widget))
        widget.add_class(f"wb-at-{css_name(path)}")  # lets a page find the field by its path

    def forget(self, path: Path, *widgets: w.Widget) -> None:
        """Unbind widgets and message lines from a field (a replaced drag slider and its entry)."""
        key = path_text(path)
        self.fields[key] = [x for x in self.fields.get(key, []) if x not in widgets]
        for widget in widgets:
            self._reshow.pop(widget, None)
        self.messages[key] = [x for x in self.messages.get(key, []) if x not in widgets]

    def message(self, prefix: Path | str) -> w.HTML:
        """An (empty) message line for errors of a field, or of a row or list named by a prefix."""
        key = prefix if isinstance(prefix, str) else path_text(prefix)
        label = w.HTML(layout=shared_layout(min_width="0"), style=shared_style(w.HTML))
        label.add_class("wb-msg")
        label.add_class(f"wb-msg-{css_name(parse_path(key))}")
        self.messages.setdefault(key, []).append(label)
        if self._recorded is not None:
            self._recorded.append((key, label))
        return label

    def beside(self, widget: w.Widget, path: Path, *extra: w.Widget) -> w.HBox:
        """``widget`` (and its unit) with the message line of ``path`` right after it."""
        return w.HBox(
            [widget, *extra, self.message(path)], layout=shared_layout(align_items="center")
        )

    def number(
        self,
        path: Path,
        description: str,
        *,
        optional: bool = False,
        width: str = "150px",
        default: float = 0.0,
    ) -> w.HBox:
        """A quantity entry bound to ``path`` (:meth:`entry`), with its unit shown beside it.

        Parameters
        ----------
        path
            The field; its unit comes from :func:`~workbench.panel.keys.quantity_of`.
        description
            The words before the entry.
        optional
            Whether 0 (or nothing typed) removes the key (the solver then takes its own default
            or none).
        width
            CSS width of the entry.
        default
            Shown while the document has no value there (the solver's own default), in the
            document's units.
        """

        def take(value: float | None) -> None:
            self.write(path, None if optional and not value else value)

        field = self.entry(path, description, take, width=width, default=default, empty=optional)
        unit = self.unit(quantity_of(path))
        if not unit:
            return self.beside(field, path)
        label = w.Label(unit, layout=shared_layout(), style=shared_style(w.Label))
        shown = self._reshow[field]

        def reshow(before: Any) -> None:
            shown(before)
            label.value = self.unit(quantity_of(path))

        self._reshow[field] = reshow
        return self.beside(field, path, label)

    def entry(
        self,
        path: Path,
        description: str,
        take: Callable[[float | None], Any],
        *,
        width: str = "150px",
        default: float = 0.0,
        empty: bool = False,
    ) -> w.Text:
        """A text entry for the quantity at ``path``: the one way the panel reads a typed value.

        It shows the document's value to four significant figures in the panel's units, and
        reads what is typed (on Enter or leaving the field) with
        :func:`~workbench.case.entry.read_quantity`: ``60``, ``60 mm``, ``2 1/4 in``,
        ``1,250 N·m``. A value read is handed to ``take`` in the document's units (and shown
        again, formatted); anything else is refused beside the field, the text kept as typed,
        the document left at its last valid value and nothing solved (``state.refuse``).

        Parameters
        ----------
        path, description, width, default
            As for :meth:`number`.
        take
            Given the value read (document units), or ``None`` for an empty entry when
            ``empty``.
        empty
            Whether an empty entry is a value (``None``: the key removed).
        """
        value = get_at(self.document, path)
        key = path_text(path)
        quantity = quantity_of(path)
        field = w.Text(
            value=self.shown_text(value if isinstance(value, (int, float)) else default, quantity),
            description=description,
            continuous_update=False,
            layout=sized(width),
            style=_initial(w.Text),
        )
        refused = self.state.refused.get(key)
        if refused is not None:  # rebuilt while refused: the text stays as typed
            field.value = refused[0]
        self.register(path, field)

        def typed(change: dict[str, Any]) -> None:
            if self.muted:
                return
            text = change["new"]
            if empty and not text.strip():
                self.state.accept(key)
                take(None)
                return
            try:
                number = self.read(text, quantity, key)
            except InputError as error:
                self.state.refuse(text, error)
                return
            self.state.accept(key)
            with self.quiet():
                field.value = self.shown_text(number, quantity)
            take(number)

        def reshow(_before: Any) -> None:
            value = get_at(self.document, path)
            number = value if isinstance(value, (int, float)) else default
            field.value = self.shown_text(number, quantity)

        field.observe(typed, "value")
        self._reshow[field] = reshow
        return field

    def read(self, text: str, quantity: str | None, field: str) -> float:
        """A typed value (``60``, ``2 1/4 in``) in the document's units of ``quantity``.

        A bare number is in the unit shown beside the field (a twist rate's is °/m or °/ft).

        Raises
        ------
        InputError
            Naming ``field``, for anything :func:`~workbench.case.entry.read_quantity` refuses.
        """
        quantity = quantity or "ratio"
        units = self.state.units
        return clean_number(units.from_si(read_quantity(text, quantity, units, field), quantity))

    def slider(
        self, path: Path, description: str, low: float, high: float, width: str = "360px"
    ) -> w.FloatSlider:
        """A slider bound to ``path`` (for the values worth dragging).

        Parameters
        ----------
        path
            The field; its unit comes from :func:`~workbench.panel.keys.quantity_of`.
        description
            The words before the slider (its unit follows in brackets).
        low, high
            The slider's range in the document's units (widened to hold the present value).
        width
            CSS width of the slider.
        """
        value = float(get_at(self.document, path) or 0.0)
        low, high = min(low, value), max(high, value)
        field = w.FloatSlider(
            value=value,
            min=low,
            max=high,
            step=None,  # any value: a snapped slider must not rewrite a typed value
            # The browser's readout is an editable number that reads `7o` as 7: values are
            # typed into the entry beside the slider instead (:meth:`dragged`).
            readout=False,
            description=f"{description} [{self.unit(quantity_of(path))}]",
            continuous_update=True,
            readout_format=".4g",
            layout=sized(width),
            style=_initial(w.FloatSlider),
        )
        self.register(path, field)
        field.observe(lambda change: self.write(path, clean_number(change["new"]), field), "value")

        def reshow(before: Any) -> None:
            quantity = quantity_of(path)
            scale = before.factor(quantity) / self.state.units.factor(quantity) if quantity else 1
            value = float(get_at(self.document, path) or 0.0)
            low, high = min(field.min * scale, value), max(field.max * scale, value)
            with field.hold_sync():  # one message to the page
                # Widened first: a slider clamps its value to the range it has when it is set.
                field.min, field.max = min(field.min, low), max(field.max, high)
                field.value = value
                field.min, field.max = low, high
                field.description = f"{description} [{self.unit(quantity)}]"

        self._reshow[field] = reshow
        return field

    def dragged(
        self, path: Path, description: str, low: float, high: float, width: str = "300px"
    ) -> tuple[w.FloatSlider, w.HBox]:
        """A :meth:`slider` with an :meth:`entry` for typing the value, its unit and message line.

        Returns
        -------
        tuple
            The slider, and the line holding all four.
        """
        slider = self.slider(path, description, low, high, width)
        entry = self.entry(path, "", lambda value: self.write(path, value), width="90px")
        return slider, self.beside(slider, path, entry)

    def flag(self, path: Path, description: str) -> w.HBox:
        """A check box bound to a true-or-absent key of the case (unticked removes the key)."""
        box = w.Checkbox(
            value=bool(get_at(self.document, path)),
            description=description,
            indent=False,
            layout=sized("90px"),
            style=shared_style(w.Checkbox),
        )
        self.register(path, box)
        box.observe(lambda change: self.write(path, True if change["new"] else None, box), "value")
        return self.beside(box, path)

    def notch(self, base: Path) -> w.HBox:
        """Kts of a segment's stated notch (a groove, a spline run-out); 0 removes the notch.

        Its radius, notch sensitivity and description are kept as the case file gives them.
        """
        path = (*base, "notch", "kts")

        def take(value: float | None) -> None:
            if value:
                self.write(path, value)
            else:
                get_at(self.document, base).pop("notch", None)
                self.state.edited()

        field = self.entry(path, "notch Kts", take, width="130px", empty=True)
        return self.beside(field, path)

    def choice(
        self,
        path: Path,
        description: str,
        options: list[Any],
        on_change: Callable[..., Any] | None = None,
        width: str = "180px",
    ) -> w.HBox:
        """A drop-down bound to ``path`` (or to ``on_change``), with its message line.

        ``options`` are values, or (label, value) pairs.
        """
        value = get_at(self.document, path)
        values = [option[1] if isinstance(option, tuple) else option for option in options]
        field = w.Dropdown(
            options=options,
            value=value if value in values else values[0],
            description=description,
            layout=sized(width),
            style=_initial(w.Dropdown),
        )
        self.register(path, field)

        def changed(change: dict[str, Any]) -> None:
            if on_change is not None:
                on_change(change["new"])
            else:
                self.write(path, change["new"], field)

        field.observe(changed, "value")
        return self.beside(field, path)

    def text(self, path: Path, description: str) -> w.HBox:
        """A name entry (a load case's new name follows into the combinations)."""
        field = w.Text(
            value=str(get_at(self.document, path) or ""),
            description=description,
            continuous_update=False,
        )
        self.register(path, field)

        def renamed(change: dict[str, Any]) -> None:
            self.edited = path
            self.structural(lambda: rename(self.document, path, change["new"]))

        field.observe(renamed, "value")
        return w.HBox([field, self.message(path)])

    def reshow(self, before: Any) -> None:
        """Show every bound field again in the panel's units, in the widgets it has.

        After a unit switch that re-expressed the document without changing its structure: the
        entries show their values in the new units, the units beside them and the sliders'
        ranges follow; no widget is made (the page builds nothing new).

        Parameters
        ----------
        before
            The unit system the document was in before the switch.
        """
        with self.quiet():
            for reshow in list(self._reshow.values()):
                reshow(before)

    # --- edits ------------------------------------------------------------------------------

    def write(self, path: Path, value: Any, source: w.Widget | None = None) -> None:
        """Store an edit in the document, mirror it in other widgets of the field, re-solve."""
        self.write_many({path: value}, source)

    def write_many(self, values: dict[Path, Any], source: w.Widget | None = None) -> None:
        """Store edits of several fields as one (the two lengths beside a shoulder), re-solve once.

        Parameters
        ----------
        values
            The new value of each field (document units); ``None`` removes the key.
        source
            The widget the edit came from (not mirrored into).
        """
        if self.muted or not values:
            return
        for path, value in values.items():
            self.edited = path
            set_at(self.document, path, value)
            self.state.accept(path_text(path))
            with self.quiet():
                for other in self.fields.get(path_text(path), []):
                    if other is not source and value is not None:
                        if isinstance(other, w.FloatSlider):
                            other.min, other.max = min(other.min, value), max(other.max, value)
                        other.value = (
                            self.shown_text(value, quantity_of(path))
                            if isinstance(other, w.Text)
                            else value
                        )
        self.state.edited()

    def structural(self, change: Callable[[], Any]) -> None:
        """Make a change of the document's structure, rebuild the editors, solve.

        Entries refused so far are dropped: their fields are rebuilt from the document (and a
        list item's path may have moved).
        """
        self.state.refused.clear()
        change()
        self._rebuild()
        self.state.refresh()

    def remove(self, path: Path, index: int, *, drop_empty: bool = False) -> None:
        """Remove item ``index`` of the list at ``path`` (``drop_empty``: and a list left empty)."""
        self.structural(lambda: remove_item(self.document, path, index, drop_empty=drop_empty))

    # --- errors -----------------------------------------------------------------------------

    def show_error(self, error: InputError) -> str:
        """Put the message beside the field the error names (else its row or list); mark it.

        Returns
        -------
        str
            The error in plain words, led by where it is (for the panel's status line).
        """
        self.clear_errors()
        field = normal_field(error.field)
        path = parse_path(field)
        message = plain_words(error.message)
        # The nearest enclosing thing shown: the field itself, else its row, else its list;
        # else the field just edited (a rename that made another entry's name a duplicate).
        places = [
            (path_text(path[:size]), field_words(path[size:])) for size in range(len(path), 0, -1)
        ]
        if self.edited is not None:
            places.append((path_text(self.edited), field_words(path, self.document)))
        for key, rest in places:
            labels = self.messages.get(key)
            if labels:
                text = render("text", f"{rest}: {message}" if rest else message)
                for label in labels:
                    label.value = text
                self._shown += labels
                break
        for widget in self.fields.get(field, []):
            widget.add_class("wb-bad")
            self._bad.append(widget)
        where = field_words(path, self.document)
        return f"{where}: {message}" if where else message

    def clear_errors(self) -> None:
        """Empty the message lines and unmark the fields an error was shown on."""
        for label in self._shown:
            label.value = ""
        for widget in self._bad:
            widget.remove_class("wb-bad")
        self._shown, self._bad = [], []
