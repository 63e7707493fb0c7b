"""The inspector: every field of the part picked on the drawing, with its unit, to edit.

Fields are laid out from the case file's one declaration (:mod:`workbench.case.declaration`):
each key of the part's object in declaration order, worded from its key name, its unit from its
declared quantity (:func:`~workbench.panel.keys.quantity_of`), its declared description as the
field's tooltip. Numbers are the :class:`~workbench.panel.form.Form`'s text entries (read with
units, refused beside the field); choices are drop-downs; a section's shape is picked from the
declared shapes and its own keys follow, walls and bonded layers included.
"""

from __future__ import annotations

import typing
from collections.abc import Callable
from typing import Any

import ipywidgets as w
import msgspec

from workbench.case.declaration import (
    SHAPES,
    BoundaryPoint,
    Disc,
    DistributedTorque,
    Gear,
    Keys,
    Layer,
    MidlinePoint,
    Notch,
    Segment,
    Support,
    Torque,
    Unwrapped,
    default_of,
    field_metas,
    field_type,
    structs_in,
)
from workbench.panel.bound import Bound, row
from workbench.panel.document import Path, field_words, get_at, set_at
from workbench.panel.form import Form, button, clean_number
from workbench.panel.keys import quantity_of
from workbench.panel.markup import render
from workbench.panel.selection import Part, part_label
from workbench.panel.shared import close_tree, shared_layout

#: The object of the case file each kind of part is (a gear: the whole mesh).
PART_OBJECTS: dict[str, type[Keys]] = {
    "segment": Segment,
    "support": Support,
    "gear": Gear,
    "torque": Torque,
    "distributed": DistributedTorque,
    "disc": Disc,
}
#: The choice, beside the declared shapes, that makes a segment of bonded layers.
LAYERED = "bonded layers"
#: Points edited as a small table, one row each, with the fewest rows a list may have.
POINT_TABLES: dict[type[Keys], int] = {MidlinePoint: 2, BoundaryPoint: 3}


def _words(name: str) -> str:
    return name.replace("_", " ")


def _required(cls: type[Keys]) -> set[str]:
    return {field.name for field in msgspec.structs.fields(cls) if field.required}


def new_section(shape: str, size: float) -> dict[str, Any]:
    """A section of ``shape`` about ``size`` across (document length unit), from its declaration.

    Its required sizes: ``size`` across, a bore or inner size of 0.6 of it, an end 0.8 of it, a
    wall a fiftieth of it (thin, as the thin-wall formulas need), an area of its square; walls:
    four, each ``size`` long; mid-line points: a channel ``size`` deep and wide; a polygon: a
    square ``size`` across. A drawing's path has no default: the section waits for it.
    """
    cls = SHAPES[shape]
    section: dict[str, Any] = {"shape": shape}
    for name in _required(cls):
        quantity = quantity_of((name,))
        if name == "walls":
            section[name] = [{"length": size, "thickness": round(0.02 * size, 6)} for _ in range(4)]
        elif name == "points":  # an open mid-line: a channel-like polyline, walls a fiftieth
            wall = round(0.02 * size, 6)
            corners = ((size, 0.0), (0.0, 0.0), (0.0, size), (size, size))
            section[name] = [
                {"x": x, "y": y, **({"thickness": wall} if number else {})}
                for number, (x, y) in enumerate(corners)
            ]
        elif name == "outer":  # any section by finite elements: a square ``size`` across
            corners = ((0.0, 0.0), (size, 0.0), (size, size), (0.0, size))
            section[name] = [{"x": x, "y": y} for x, y in corners]
        elif quantity == "area":
            section[name] = round(size * size, 6)
        elif quantity == "length":
            share = 0.02 if "thickness" in name else 0.6 if "inner" in name else 1.0
            section[name] = round((0.8 if name.endswith("_end") else share) * size, 6)
    return {key: section[key] for key in ("shape", *cls.__struct_fields__) if key in section}


def section_size(section: Any, fallback: float) -> float:
    """The largest overall size a section (or its first wall) gives, else ``fallback``."""
    if not isinstance(section, dict):
        return fallback
    sizes = [
        float(section[key])
        for key in ("diameter", "outer_diameter", "diameter_start", "width", "height")
        if isinstance(section.get(key), (int, float))
    ]
    return max(sizes) if sizes else fallback


class Inspector(Bound):
    """The fields of the part picked, beside the drawing (rebuilt when another is picked).

    Parameters
    ----------
    form
        The fields' factory, bound to the case document.
    shaft_ids
        The ids of the document's shafts.
    """

    def __init__(self, form: Form, shaft_ids: Callable[[], list[str]]) -> None:
        self.form, self.shaft_ids = form, shaft_ids
        self.heading = w.HTML()
        self.box = w.VBox([self.heading], layout=w.Layout(min_width="360px"))
        self.box.add_class("wb-inspector")
        self.part: Part | None = None
        self._made: list[tuple[str, w.Widget]] = []
        #: Called after each :meth:`show` (views that follow the part picked).
        self.on_show: list[Callable[[], None]] = []

    def show(self, part: Part | None) -> None:
        """Show the fields of ``part`` (nothing picked: a hint), closing the fields shown before."""
        old = self.box.children[1:]
        self.form.unbind(self._made)
        self.part = part
        item = get_at(self.document, part.path) if part is not None else None
        if part is None or not isinstance(item, dict):
            self.part, self._made = None, []
            self.heading.value = render(
                "italic", "Pick a part on the drawing or in the list to see its fields."
            )
            self.box.children = [self.heading]
        else:
            self.heading.value = render("heading", part_label(part, self.document), "")
            with self.form.quiet(), self.form.recording() as made:
                rows = self._rows(PART_OBJECTS[part.kind], part.path, item)
            self._made = made
            self.box.children = [self.heading, *rows]
        close_tree(*old)
        self.form.state.show_current_error()
        for follow in self.on_show:
            follow()

    # --- fields from the declaration ------------------------------------------------------

    def _rows(self, cls: type[Keys], base: Path, item: dict[str, Any]) -> list[w.Widget]:
        required = _required(cls)
        # A segment's layers are shown under its section choice; its material only without them.
        skipped = (
            {"layers", *(["material"] if "layers" in item else [])} if cls is Segment else set()
        )
        rows: list[w.Widget] = []
        for name in cls.__struct_fields__:
            if name not in skipped:
                rows += self._field(cls, name, (*base, name), item, name in required)
        return rows

    def _field(
        self, cls: type[Keys], name: str, path: Path, item: dict[str, Any], required: bool
    ) -> list[w.Widget]:
        form, value = self.form, item.get(name)
        declared = Unwrapped(field_type(cls, name))
        meta = field_metas(cls).get(name)
        tip = meta.description if meta is not None and meta.description else ""
        words = _words(name)
        structs = list(structs_in(field_type(cls, name)))
        lists = [b for b in declared.bases if typing.get_origin(b) is list]
        literals = [b for b in declared.bases if typing.get_origin(b) is typing.Literal]
        if name == "shaft":
            return [self._choice(path, words, self.shaft_ids(), tip, structural=True)]
        if name == "material":
            names = sorted({*(self.document.get("materials") or {}), str(value or "")} - {""})
            return [self._choice(path, words, names, tip)]
        if cls is Segment and name == "section":
            return self._section(path[:-1], item, tip)
        if declared.tags("shape"):
            return self._section(path[:-1], item, tip, layered=False)
        if lists and structs and structs[0] in POINT_TABLES:
            nested = typing.get_origin(Unwrapped(typing.get_args(lists[0])[0]).bases[0]) is list
            if nested:  # a polygon's holes: each a boundary of its own
                return self._holes(path, value or [])
            return self._points(path, structs[0], value or [], words)
        if lists and structs:
            return self._items(path, structs[0], value or [], words)
        if structs:
            if structs[0] is Notch:
                rows: list[w.Widget] = [form.notch(path[:-1])]
                if isinstance(value, dict):
                    rows += [
                        self._field(Notch, key, (*path, key), value, False)[0]
                        for key in Notch.__struct_fields__
                        if key != "kts"
                    ]
                return rows
            inner = value if isinstance(value, dict) else {}
            heading = w.HTML(render("heading", field_words(path).split(" · ")[-1], ""))
            return [heading, *self._rows(structs[0], path, inner)]
        if bool in declared.bases:
            return [_tip(form.flag(path, words), tip)]
        if literals:
            options: list[Any] = list(typing.get_args(literals[0]))
            if required:
                return [self._choice(path, words, options, tip)]
            # Left out, the default applies: say so rather than show a value ("" writes none).
            stated = [(str(option), option) for option in options]
            options = [(f"not stated ({default_of(cls, name)})", ""), *stated]
            line = self.form.choice(
                path, words, options, lambda new: self.form.write(path, new or None), "230px"
            )
            return [_tip(line, tip)]
        if {float, int} & set(declared.bases):
            default = default_of(cls, name)
            shown = float(default) if isinstance(default, (int, float)) else 0.0
            entry = form.number(path, words, optional=not required, default=shown, width="190px")
            return [_tip(entry, tip)]
        if str in declared.bases:
            return [_tip(form.text(path, words), tip)]
        return []

    def _choice(
        self, path: Path, words: str, options: list[Any], tip: str, *, structural: bool = False
    ) -> w.Widget:
        def change(new: Any) -> None:
            self.form.structural(lambda: set_at(self.document, path, new))

        line = self.form.choice(path, words, options, change if structural else None, "230px")
        return _tip(line, tip)

    def _section(
        self, base: Path, owner: dict[str, Any], tip: str, *, layered: bool = True
    ) -> list[w.Widget]:
        """The shape choice of ``owner``'s section (or its layers) and the shape's own fields."""
        section = owner.get("section")
        layers = owner.get("layers")
        shape = LAYERED if layers else (section or {}).get("shape")
        options = [*SHAPES, *([LAYERED] if layered else [])]
        line = self.form.choice(
            (*base, "section", "shape"),
            "section",
            options,
            lambda new: None if self.form.muted else self.set_shape(base, new),
            "230px",
        )
        choice = line.children[0]
        with self.form.quiet():
            choice.value = shape if shape in options else options[0]
        rows: list[w.Widget] = [_tip(line, tip)]
        if layers:
            rows += self._items((*base, "layers"), Layer, layers, "layers")
        elif isinstance(section, dict) and section.get("shape") in SHAPES:
            rows += self._rows(SHAPES[section["shape"]], (*base, "section"), section)
        return rows

    def _items(self, path: Path, cls: type[Keys], items: list[Any], words: str) -> list[w.Widget]:
        """Each item of a list (layers, walls): its fields, a remove button; an add button."""
        form = self.form
        rows: list[w.Widget] = []
        singular = words[:-1] if words.endswith("s") else words
        for number, item in enumerate(items):
            remove = button("✕", lambda n=number: form.remove(path, n))
            remove.tooltip = f"remove {singular} {number}"
            parts = [w.HTML(render("text", f"{singular} {number}"))]
            if len(items) > 1:
                parts.append(remove)
            rows.append(w.HBox(parts, layout=shared_layout(align_items="center")))
            rows += self._rows(cls, (*path, number), item if isinstance(item, dict) else {})
        add = button(f"add {singular}", lambda: self.add_item(path), width="120px")
        rows.append(w.HBox([add, form.message(path)]))
        return rows

    def _points(self, path: Path, cls: type[Keys], points: list[Any], words: str) -> list[w.Widget]:
        """A list of points as a small table: a row of its coordinates each, add and remove."""
        form = self.form
        fewest = POINT_TABLES[cls]
        rows: list[w.Widget] = [w.HTML(render("heading", words, ""))]
        for number in range(len(points)):
            cells: list[w.Widget] = [w.Label(f"{number}", layout=shared_layout(width="22px"))]
            for name in cls.__struct_fields__:
                if name == "thickness" and number == 0:
                    continue  # the first mid-line point ends no wall
                optional = name not in _required(cls)
                cells.append(
                    form.number(
                        (*path, number, name),
                        name,
                        optional=optional,
                        width="120px" if name != "thickness" else "150px",
                    )
                )
            if len(points) > fewest:
                remove = button("✕", lambda n=number: form.remove(path, n))
                remove.tooltip = f"remove point {number}"
                cells.append(remove)
            rows.append(row(cells))
        add = button("add point", lambda: self.add_point(path, cls), width="110px")
        rows.append(w.HBox([add, form.message(path)]))
        return rows

    def _holes(self, path: Path, holes: list[Any]) -> list[w.Widget]:
        """A polygon's holes: each its table of corners and a remove button; an add button."""
        rows: list[w.Widget] = []
        for number, hole in enumerate(holes):
            remove = button("✕", lambda n=number: self.form.remove(path, n, drop_empty=True))
            remove.tooltip = f"remove hole {number}"
            rows += self._points((*path, number), BoundaryPoint, hole or [], f"hole {number}")
            rows.append(remove)
        add = button("add hole", lambda: self.add_hole(path), width="110px")
        rows.append(w.HBox([add, self.form.message(path)]))
        return rows

    # --- structural edits -------------------------------------------------------------------

    def set_shape(self, base: Path, shape: str) -> None:
        """Give the item at ``base`` a section of ``shape`` (or bonded layers), sized as now."""
        owner = get_at(self.document, base)
        layers = owner.get("layers") or []
        section = owner.get("section") or (layers[-1].get("section") if layers else None)
        size = section_size(section, 0.1 * float(owner.get("length") or 500.0))

        def change() -> None:
            if shape == LAYERED:
                material = owner.pop("material", None)
                owner["layers"] = [{"material": material, "section": owner.pop("section")}]
                return
            if layers:
                owner.pop("layers")
                owner["material"] = layers[0].get("material")
            owner["section"] = new_section(shape, size)

        self.form.structural(change)

    def add_point(self, path: Path, cls: type[Keys]) -> None:
        """Add a point to a table of points.

        A mid-line goes on by its last wall; a boundary gets its closing edge's middle (a convex
        polygon stays simple).
        """
        points = get_at(self.document, path)
        first, before, last = points[0], points[-2], points[-1]
        if cls is MidlinePoint:
            point = {**last, "x": 2 * last["x"] - before["x"], "y": 2 * last["y"] - before["y"]}
        else:
            point = {"x": 0.5 * (last["x"] + first["x"]), "y": 0.5 * (last["y"] + first["y"])}
        point.update({k: clean_number(round(float(point[k]), 6)) for k in ("x", "y")})
        self.form.structural(lambda: points.append(point))

    def add_hole(self, path: Path) -> None:
        """Add a square hole a quarter of the outer boundary's size, round its middle."""
        outer = get_at(self.document, (*path[:-1], "outer")) or []
        xs = [float(p["x"]) for p in outer] or [0.0]
        ys = [float(p["y"]) for p in outer] or [0.0]
        middle = (0.5 * (min(xs) + max(xs)), 0.5 * (min(ys) + max(ys)))
        half = 0.125 * min(max(xs) - min(xs), max(ys) - min(ys))
        hole = [
            {
                "x": clean_number(round(middle[0] + a * half, 6)),
                "y": clean_number(round(middle[1] + b * half, 6)),
            }
            for a, b in ((-1, -1), (1, -1), (1, 1), (-1, 1))
        ]
        section = get_at(self.document, path[:-1])
        self.form.structural(lambda: section.setdefault(path[-1], []).append(hole))

    def add_item(self, path: Path) -> None:
        """Add a wall (a copy of the last) or a layer (a tube round the outermost) to a list."""
        items = get_at(self.document, path)

        def change() -> None:
            last = dict(items[-1])
            if path[-1] == "layers":
                outside = section_size(last.get("section"), 50.0)
                last["section"] = {
                    "shape": "tube",
                    "outer_diameter": round(1.2 * outside, 6),
                    "inner_diameter": outside,
                }
            items.append(last)

        self.form.structural(change)


def _tip(line: w.Widget, tip: str) -> w.Widget:
    """The declared description of a field as the tooltip of its entry."""
    if tip:
        line.children[0].tooltip = tip
    return line
