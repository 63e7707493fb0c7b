"""The Segments tab: one row per segment of the shaft shown, and a slider to drag one size."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import ipywidgets as w

from workbench.panel.bound import Editor, row
from workbench.panel.document import Path, clone, get_at, set_at
from workbench.panel.form import Form, button, sized
from workbench.panel.markup import render
from workbench.panel.shared import close_tree

#: The section shapes edited in a row, with their size keys (other shapes: in the case file).
SHAPE_KEYS = {
    "solid": ("diameter",),
    "tube": ("outer_diameter", "inner_diameter"),
    "tapered": ("diameter_start", "diameter_end", "bore"),
}


class SegmentsEditor(Editor):
    """Segment rows (length, section, material, fillet, keyseat, notch) of the shaft shown."""

    title = "Segments"

    def __init__(self, form: Form, shown_shaft: Callable[[], int]) -> None:
        super().__init__(form, shown_shaft)
        #: Picks the size the drag slider moves; the slider sits in ``dimension_box``.
        self.dimension = w.Dropdown()
        self.dimension_box = w.HBox()
        self.diameter_slider: w.FloatSlider | None = None
        self._drag: tuple[Path, tuple[w.Widget, ...]] | None = None

    def build(self) -> None:
        form = self.form
        s = self.shown_shaft()
        segments = get_at(self.document, ("shafts", s, "segments")) or []
        materials = sorted((self.document.get("materials") or {}).keys())
        self._drag = None  # the form's fields were reset: nothing to unbind
        rows: list[w.Widget] = []
        dims: list[tuple[str, Path | None]] = []
        for k, segment in enumerate(segments):
            base: Path = ("shafts", s, "segments", k)
            parts: list[w.Widget] = [
                w.Label(f"{k}", layout=sized("24px")),
                form.number((*base, "length"), "length", width="140px"),
            ]
            section = segment.get("section")
            if isinstance(section, dict) and section.get("shape") in SHAPE_KEYS:
                shape = section["shape"]
                parts.append(
                    form.choice(
                        (*base, "section", "shape"),
                        "",
                        list(SHAPE_KEYS),
                        lambda new, base=base: self.set_shape(base, new),
                        width="90px",
                    )
                )
                for key in SHAPE_KEYS[shape]:
                    optional = key == "bore"
                    if key in section or not optional:
                        words = key.replace("_", " ")
                        path = (*base, "section", key)
                        parts.append(form.number(path, words, optional=optional, width="170px"))
                        dims.append((f"segment {k} · {words}", path))
            else:
                kind = "layers" if "layers" in segment else str((section or {}).get("shape"))
                parts.append(w.HTML(render("italic", f"{kind} section: edit in the case file")))
            if "material" in segment:
                options = sorted({*materials, segment["material"]})
                parts.append(form.choice((*base, "material"), "", options, width="130px"))
            parts.append(
                form.number((*base, "fillet_radius"), "fillet r", optional=True, width="120px")
            )
            parts += [form.flag((*base, "keyseat"), "keyseat"), form.notch(base)]
            parts += [
                button("↑", lambda k=k: self.move(k, -1)),
                button("↓", lambda k=k: self.move(k, 1)),
                button("✕", lambda k=k: form.remove(("shafts", s, "segments"), k)),
                form.message(base),
            ]
            rows.append(row(parts))
        add = button("add segment", lambda: self.add(s), width="120px")
        self.dimension = w.Dropdown(
            options=dims or [("-", None)], description="drag", layout=sized("300px")
        )
        self.dimension_box = w.HBox()
        self.dimension.observe(lambda _: self._dimension_slider(), "value")
        self._dimension_slider()
        self.box.children = [
            w.HBox([self.dimension, self.dimension_box]),
            *rows,
            w.HBox([add, form.message(("shafts", s))]),
        ]

    def _dimension_slider(self) -> None:
        """A slider for the size picked in ``dimension`` (it replaces the one before)."""
        if self._drag is not None:  # the slider it replaces leaves the field's widgets
            self.form.forget(self._drag[0], *self._drag[1])
            self._drag = None
        path = self.dimension.value
        if path is None:
            close_tree(*self.dimension_box.children)
            self.dimension_box.children = []
            return
        value = float(get_at(self.document, path) or 1.0)
        self.diameter_slider, line = self.form.dragged(
            path, "size", 0.5 * value, 1.5 * value, width="360px"
        )
        self._drag = (path, tuple(line.children))
        close_tree(*self.dimension_box.children)  # the slider replaced, with its entry
        self.dimension_box.children = list(line.children)
        line.children = ()
        line.close()
        self.form.state.show_current_error()

    def set_shape(self, base: Path, shape: str) -> None:
        """Give segment ``base`` a section of another shape, sized from its present one."""
        segment = get_at(self.document, base)
        layers = segment.get("layers") or []
        section = segment.get("section") or (layers[0].get("section") if layers else {}) or {}
        size = next(
            (
                section[k]
                for k in ("diameter", "outer_diameter", "diameter_start")
                if isinstance(section.get(k), (int, float))
            ),
            50.0,
        )

        def change() -> None:
            new: dict[str, Any] = {"shape": shape}
            if shape == "solid":
                new["diameter"] = size
            elif shape == "tube":
                new |= {"outer_diameter": size, "inner_diameter": round(0.6 * size, 6)}
            else:
                new |= {"diameter_start": size, "diameter_end": round(0.8 * size, 6)}
            if layers:
                segment.pop("layers")
                segment["material"] = layers[0].get("material")
            set_at(self.document, (*base, "section"), new)

        self.form.structural(change)

    def move(self, k: int, step: int) -> None:
        """Swap segment ``k`` of the shaft shown with its neighbour ``step`` away."""
        segments = self.document["shafts"][self.shown_shaft()]["segments"]
        other = k + step
        if 0 <= other < len(segments):

            def change() -> None:
                segments[k], segments[other] = segments[other], segments[k]

            self.form.structural(change)

    def add(self, s: int) -> None:
        """Add a segment at the end of shaft ``s`` (a copy of its last one)."""
        segments = self.document["shafts"][s]["segments"]
        new = (
            clone(segments[-1])
            if segments
            else {
                "length": 100,
                "material": next(iter(self.document.get("materials") or {}), "steel-a36"),
                "section": {"shape": "solid", "diameter": 40},
            }
        )
        self.form.structural(lambda: segments.append(new))
