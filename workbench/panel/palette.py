"""The palette: add a support, a point torque, a gear or a disc at a station of the shaft shown.

The station is typed with its unit (read as every entry reads it) or taken from the part last
picked on the drawing. A new part starts with values a person then edits in the inspector: a
fixed support; a torque of 100 N·m in the load case behind the result shown; a disc of
0.01 kg·m²; a gear of pitch radius the shaft's size there, meshing with a shaft not yet geared
to this one (or a short new shaft when there is none).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as w

from workbench.case.errors import InputError
from workbench.panel.bound import Bound
from workbench.panel.document import plain_words
from workbench.panel.form import Form, button, clean_number, entry_text
from workbench.panel.inspector import section_size
from workbench.panel.markup import render
from workbench.panel.selection import Part, boundaries, cases_behind
from workbench.panel.shared import shared_layout, sized

#: What the palette adds, as its buttons name them.
ADDABLE = ("support", "torque", "gear", "disc")
#: The SI values a new torque and a new disc start from (N·m, kg·m²).
_NEW_TORQUE, _NEW_INERTIA = 100.0, 0.01


class Palette(Bound):
    """A row of buttons adding parts at the station typed (or picked) on the shaft shown.

    Parameters
    ----------
    form
        Writes the new part into the case document.
    shown_shaft
        The number of the shaft shown.
    result
        The result shown (a new torque goes to its load case).
    added
        Called with each part added (the panel picks it).
    """

    def __init__(
        self,
        form: Form,
        shown_shaft: Callable[[], int],
        result: Callable[[], Any],
        added: Callable[[Part], None],
    ) -> None:
        self.form, self.shown_shaft, self.result, self.added = form, shown_shaft, result, added
        self.station = w.Text(
            value="0",
            description="add at x",
            continuous_update=False,
            layout=sized("170px"),
            style={"description_width": "initial"},
        )
        self.station.add_class("wb-palette-station")
        self.unit = w.Label()
        self.message = w.HTML(layout=shared_layout(min_width="0"))
        self.message.add_class("wb-msg")
        self.buttons = {
            kind: button(f"+ {kind}", lambda k=kind: self.add(k), "90px") for kind in ADDABLE
        }
        for kind, widget in self.buttons.items():
            widget.tooltip = f"add a {kind} at the station typed"
        self.box = w.HBox(
            [self.station, self.unit, *self.buttons.values(), self.message],
            layout=shared_layout(align_items="center"),
        )
        self.box.add_class("wb-palette")

    def refresh(self) -> None:
        """Show the length unit beside the station (after a unit switch)."""
        self.unit.value = self.form.unit("length")

    def put_at(self, x: float) -> None:
        """Set the station (document length unit), e.g. to the part just picked."""
        self.station.value = entry_text(x)

    def add(self, kind: str) -> Part | None:
        """Add a part of ``kind`` at the station; refused beside the station when it is not one."""
        shaft = self.shown_shaft()
        length = float(boundaries(self.document, shaft)[-1])
        try:
            x = self.form.read(self.station.value, "length", "add at x")
        except InputError as error:
            self.message.value = render("text", plain_words(error.message))
            return None
        if not 0.0 <= x <= length:
            shown = f"{entry_text(length)} {self.form.unit('length')}"
            self.message.value = render("text", f"the station must lie on the shaft (0 to {shown})")
            return None
        self.message.value = ""
        made: list[Part] = []
        self.form.structural(lambda: made.append(self._insert(kind, shaft, clean_number(x))))
        self.added(made[0])
        return made[0]

    def _insert(self, kind: str, shaft: int, x: float) -> Part:
        document = self.document
        shaft_id = document["shafts"][shaft].get("id")
        units = self.form.state.units
        if kind == "support":
            supports = document.setdefault("supports", [])
            supports.append({"shaft": shaft_id, "x": x, "kind": "fixed"})
            return Part("support", ("supports", len(supports) - 1))
        if kind == "disc":
            discs = document.setdefault("discs", [])
            inertia = clean_number(float(units.from_si(_NEW_INERTIA, "inertia")))
            discs.append({"shaft": shaft_id, "x": x, "inertia": inertia})
            return Part("disc", ("discs", len(discs) - 1))
        if kind == "torque":
            cases = document.setdefault("load_cases", [])
            if not cases:
                cases.append({"name": "case 1"})
            c = (cases_behind(document, self.result()) or [0])[0]
            torques = cases[c].setdefault("torques", [])
            value = clean_number(float(units.from_si(_NEW_TORQUE, "torque")))
            torques.append({"shaft": shaft_id, "x": x, "torque": value})
            return Part("torque", ("load_cases", c, "torques", len(torques) - 1))
        return self._insert_gear(shaft, x)

    def _insert_gear(self, shaft: int, x: float) -> Part:
        """A gear at ``x``, meshing with a shaft not geared to this one (else a new short one)."""
        document = self.document
        shafts = document["shafts"]
        here = shafts[shaft]
        bounds = boundaries(document, shaft)
        k = min(int((bounds[1:] < x).sum()), len(bounds) - 2)
        segment = here["segments"][k]
        layers = segment.get("layers") or [{}]
        radius = section_size(
            segment.get("section") or layers[-1].get("section"), 0.05 * bounds[-1]
        )
        gears = document.setdefault("gears", [])
        geared = {here.get("id")}
        for gear in gears:
            ends = {gear["a"].get("shaft"), gear["b"].get("shaft")}
            if here.get("id") in ends:
                geared |= ends
        others = [s.get("id") for s in shafts if s.get("id") not in geared]
        if others:
            mate = others[0]
        else:
            mate = f"{here.get('id')} mate"
            first = dict(here["segments"][0], length=clean_number(0.2 * float(bounds[-1])))
            shafts.append({"id": mate, "segments": [first]})
        end_b: dict[str, Any] = {"shaft": mate, "x": 0, "radius": clean_number(radius)}
        gears.append(
            {"a": {"shaft": here.get("id"), "x": x, "radius": clean_number(radius)}, "b": end_b}
        )
        return Part("gear", ("gears", len(gears) - 1), "a")
