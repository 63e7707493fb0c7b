"""The workbench panel: edit a case, see every chart and the checks follow, compare, sweep, save.

The panel edits a case document (the case file's JSON in the panel's units, see
:mod:`workbench.panel.document`). After every edit it hands a copy to the solver
(:func:`~workbench.solver.io.parse_case`, :func:`~workbench.solver.analysis.solve`,
:func:`~workbench.design.checks.run_checks`) and redraws from what comes back. Bad input raises
:class:`~workbench.case.errors.InputError`; its message is shown, in plain words, beside the
field its path names, the last good charts stay up marked stale, and the value typed stays where
it was typed.

In a kernel (an event loop running), every edit is checked at once (``parse_case``), so a bad
value is flagged the moment it is typed, but the solve and the redraw wait until the burst of
edits ends (the loop runs queued callbacks after the current message or cell) and then run once,
on the newest valid document. Reading :attr:`Workbench.results` (or ``model``, ``report``,
``stale``, ``error``) or calling :meth:`Workbench.settle` finishes that work at once. Without a
loop (plain scripts, tests) every edit solves and redraws before the assignment returns.
"""

from __future__ import annotations

import asyncio
import html
import json
from collections.abc import Callable
from pathlib import Path as FilePath
from typing import Any

import ipywidgets as w
import numpy as np
from IPython.display import display

from workbench.case.design import (
    DEFAULT_FREQUENCY_MARGIN,
    FATIGUE_CRITERIA,
    SHEAR_CRITERIA,
    SURFACE_FINISHES,
)
from workbench.case.errors import InputError
from workbench.design.caution import CAUTION
from workbench.design.checks import CHECK_QUANTITIES, CheckReport, run_checks
from workbench.design.fatigue import RELIABILITY_FACTORS
from workbench.design.fatigue_check import FatiguePoint
from workbench.panel import CASE_MIME_TYPE
from workbench.panel.charts import CRITERION_NAMES, Charts, FatigueChart, ModesChart, rpm
from workbench.panel.document import (
    UNIT_CHOICES,
    Path,
    clone,
    css_name,
    field_words,
    get_at,
    normal_field,
    numeric_inputs,
    parse_path,
    path_text,
    plain_words,
    set_at,
    unit_key,
    unit_label,
    unit_system,
)
from workbench.panel.sweep import METRICS, SweepRequest, sweep_chunks
from workbench.solver.analysis import Results, solve
from workbench.solver.io import case_to_dict, decode_case_text, parse_case, save_case
from workbench.solver.model import Model
from workbench.solver.modes import Modes, natural_modes

_SHAPE_KEYS = {
    "solid": ("diameter",),
    "tube": ("outer_diameter", "inner_diameter"),
    "tapered": ("diameter_start", "diameter_end", "bore"),
}
_SUPPORT_KINDS = ("fixed", "spring", "prescribed rotation")
_STYLE = """<style>
.wb-msg {color:#9e2a2b; font-size:12px; padding-left:6px}
.wb-bad input {background:#fbe3e2 !important}
.wb-stale .bqplot.figure {opacity:0.45}
.wb-table {border-collapse:collapse; font-size:12px}
.wb-table td, .wb-table th {border-bottom:1px solid #d5d9e0; padding:2px 8px; text-align:right}
.wb-fail {color:#9e2a2b; font-weight:bold}
.wb-caution {border-left:4px solid #e09f3e; padding:4px 8px; font-size:12px; background:#fdf5e8}
</style>"""


def _short(label: str, width: str = "auto") -> w.Layout:
    return w.Layout(width=width)


class Workbench:
    """An editable, live-solving panel for one case.

    Parameters
    ----------
    document
        The case file's JSON (decoded), in any units the case file may use.
    path
        The case file to save to.
    """

    def __init__(self, document: dict[str, Any], path: str | FilePath | None = None) -> None:
        self.path = FilePath(path) if path is not None else None
        model = parse_case(clone(document))  # a case that does not load is the caller's error
        key = unit_key(model.units)
        self.units_key = key or "si"
        self.document: dict[str, Any] = (
            clone(document) if key is not None else case_to_dict(model, unit_system("si"))
        )
        self._model: Model | None = None
        self._results: Results | None = None
        self._report: CheckReport | None = None
        # Natural modes are worked out only while the Modes section is open (or when asked for),
        # once per solved model: they are a dense eigenproblem, too dear for every edit.
        self._modes: Modes | None = None
        self._modes_message = ""
        self._modes_model: Model | None = None
        self.baseline: tuple[Results, CheckReport] | None = None
        self._stale = False
        self._error: InputError | None = None
        self.solve_count = 0
        self.case_bundle: dict[str, Any] | None = None
        self._handle: Any = None
        # Coalescing: the newest valid model not yet solved, and the error of the last edit when
        # it came after that model; a flush is scheduled while _pending.
        self._queued: Model | None = None
        self._queued_error: InputError | None = None
        self._pending = False
        self._muted = False
        self._fields: dict[str, list[w.Widget]] = {}
        self._messages: dict[str, list[w.HTML]] = {}
        self._shown: list[w.HTML] = []
        self._bad: list[w.Widget] = []
        self._drag: tuple[str, w.Widget, w.HTML] | None = None
        self._sweep_cancelled = False
        self.sweep_values: np.ndarray | None = None
        self.charts = Charts()
        self.modes_chart = ModesChart()
        self.fatigue_chart = FatigueChart()
        self._build()
        self.refresh()

    # --- state (pending work finished first) --------------------------------------------------

    @property
    def model(self) -> Model | None:
        """The last valid model (solved), or ``None`` before the first valid case."""
        self.settle()
        return self._model

    @property
    def results(self) -> Results | None:
        """Results of :attr:`model`."""
        self.settle()
        return self._results

    @property
    def report(self) -> CheckReport | None:
        """Checks of :attr:`results`."""
        self.settle()
        return self._report

    @property
    def modes(self) -> Modes | None:
        """Natural modes of :attr:`model` (as ``natural_modes`` gives them), or ``None``.

        ``None`` when the case has no inertia (:attr:`modes_message` says why).
        """
        self.settle()
        self._ensure_modes()
        return self._modes

    def _ensure_modes(self) -> None:
        if self._model is not None and self._modes_model is not self._model:
            report = self._report
            if report is not None and report.results.model is self._model and report.modes:
                # The checks already found them (running-speed bands): no second eigensolve.
                self._modes, self._modes_message = report.modes, ""
            else:
                self._modes, self._modes_message = _modes_of(self._model)
            self._modes_model = self._model

    @property
    def stale(self) -> bool:
        """Whether the document has an error, so the charts show the last valid case."""
        self.settle()
        return self._stale

    @property
    def error(self) -> InputError | None:
        """The error of the document, when :attr:`stale`."""
        self.settle()
        return self._error

    def settle(self) -> None:
        """Solve and redraw a pending edit now instead of when the burst of edits ends."""
        if self._queued is not None:
            self._flush()

    # --- opening, showing, saving -------------------------------------------------------------

    @classmethod
    def open(cls, path: str | FilePath, show: bool = True) -> Workbench:
        """Open a case file in a panel (and display it, in a notebook)."""
        text = FilePath(path).read_text(encoding="utf-8")
        panel = cls(decode_case_text(text, str(path)), path)
        if show:
            panel.show()
        return panel

    def show(self) -> None:
        """Display the panel and the case record output the calculation record reads."""
        display(self.root)
        self._handle = display(self._case_output(), raw=True, display_id=True)

    def _repr_mimebundle_(self, **kwargs: Any) -> Any:
        return self.root._repr_mimebundle_(**kwargs)

    def _case_output(self) -> dict[str, Any]:
        bundle = self.case_bundle or {"text/plain": "no valid case yet"}
        return bundle

    def save(self, path: str | FilePath | None = None) -> FilePath:
        """Save the last valid case to its case file (atomically)."""
        target = FilePath(path) if path is not None else self.path
        if target is None:
            raise InputError("path", "this panel has no case file; give a path to save to")
        if self.stale or self.model is None:
            msg = "the case has errors (marked in red); fix them before saving"
            raise InputError("case", msg)
        save_case(self.model, target)
        self.path = target
        return target

    # --- layout -----------------------------------------------------------------------------

    def _build(self) -> None:
        self.title = w.HTML()
        self.status = w.HTML()
        self.units = w.ToggleButtons(
            options=[(label, key) for key, label in UNIT_CHOICES.items()],
            value=self.units_key,
            description="Units",
            style={"button_width": "170px"},
        )
        self.units.observe(self._on_units, "value")
        self.result = w.Dropdown(description="Show", layout=_short("", "280px"))
        self.result.observe(lambda _: self._redraw(), "value")
        self.shaft = w.Dropdown(description="Shaft", layout=_short("", "200px"))
        self.shaft.observe(self._on_shaft, "value")
        self.save_button = w.Button(description="Save case", icon="save", button_style="primary")
        self.save_button.on_click(self._on_save)
        self.save_message = w.HTML()
        self.summary = w.HTML()
        self.summary.add_class("wb-summary")
        self.check_table = w.HTML()
        self.check_table.add_class("wb-checks")
        self.caution = w.HTML()
        self.segments_box = w.VBox()
        self.supports_box = w.VBox()
        self.gears_box = w.VBox()
        self.loads_box = w.VBox()
        self.combinations_box = w.VBox()
        self.design_box = w.VBox()
        self.vibration_box = w.VBox()
        self.whatif_box = w.VBox()
        self.editors = w.Tab(
            children=[
                self.segments_box,
                self.supports_box,
                self.gears_box,
                self.loads_box,
                self.combinations_box,
                self.design_box,
                self.vibration_box,
                self.whatif_box,
            ]
        )
        for number, name in enumerate(
            [
                "Segments",
                "Supports",
                "Gears",
                "Loads",
                "Combinations",
                "Design",
                "Vibration",
                "What-if",
            ]
        ):
            self.editors.set_title(number, name)
        self.charts_box = w.VBox(
            [
                self.charts.elevation,
                w.GridBox(
                    [
                        self.charts.torque.figure,
                        self.charts.angle.figure,
                        self.charts.stress.figure,
                        self.charts.utilisation,
                    ],
                    layout=w.Layout(grid_template_columns="1fr 1fr", width="100%"),
                ),
                self._build_more_charts(),
            ]
        )
        self.charts_box.add_class("wb-charts")
        self.root = w.VBox(
            [
                w.HTML(_STYLE),
                self.title,
                w.HBox([self.units, self.shaft, self.result]),
                w.HBox([self.save_button, self.save_message]),
                self.status,
                self.editors,
                self.summary,
                self.charts_box,
                w.HTML("<b>Checks</b> (governing result of each segment and check)"),
                self.check_table,
                self.caution,
            ]
        )
        self.root.add_class("wb-panel")
        self._build_whatif()
        self._rebuild()

    def _rebuild(self) -> None:
        """Rebuild every editor from the document (after a structural change)."""
        self._fields.clear()
        self._messages = {k: v for k, v in self._messages.items() if k.startswith("whatif")}
        self._shown, self._bad, self._drag = [], [], None
        self._muted = True
        try:
            doc = self.document
            self.title.value = f"<h3>{html.escape(doc.get('title') or 'Untitled case')}</h3>"
            shaft_ids = [s.get("id", "?") for s in doc.get("shafts", [])]
            keep = self.shaft.value if self.shaft.value in range(len(shaft_ids)) else 0
            self.shaft.options = [(name, n) for n, name in enumerate(shaft_ids)]
            self.shaft.value = keep
            names = [c.get("name") for c in doc.get("load_cases", [])] + [
                c.get("name") for c in doc.get("combinations", [])
            ]
            current = self.result.value
            self.result.options = names
            self.result.value = current if current in names else (names[0] if names else None)
            self._build_segments()
            self._build_supports()
            self._build_gears()
            self._build_loads()
            self._build_combinations()
            self._build_design()
            self._build_vibration()
            self._refresh_sweep_inputs()
        finally:
            self._muted = False

    # --- field helpers ----------------------------------------------------------------------

    @property
    def _units(self) -> Any:
        return unit_system(self.units_key)

    def _unit(self, quantity: str | None) -> str:
        return unit_label(self._units, quantity) if quantity else ""

    def _register(self, path: Path, widget: w.Widget) -> None:
        self._fields.setdefault(path_text(path), []).append(widget)
        widget.add_class(f"wb-at-{css_name(path)}")  # lets a page find the field by its path

    def _message(self, prefix: Path | str) -> w.HTML:
        """An (empty) message line for errors of a field, or of a row or list named by a prefix."""
        key = prefix if isinstance(prefix, str) else path_text(prefix)
        label = w.HTML(layout=w.Layout(min_width="0"))
        label.add_class("wb-msg")
        label.add_class(f"wb-msg-{css_name(parse_path(key))}")
        self._messages.setdefault(key, []).append(label)
        return label

    def _beside(self, widget: w.Widget, path: Path, *extra: w.Widget) -> w.HBox:
        """``widget`` (and its unit) with the message line of ``path`` right after it."""
        return w.HBox([widget, *extra, self._message(path)], layout=w.Layout(align_items="center"))

    def number(
        self,
        path: Path,
        description: str,
        quantity: str | None,
        *,
        optional: bool = False,
        width: str = "150px",
        default: float = 0.0,
    ) -> w.Widget:
        """A numeric entry bound to ``path``, with its unit shown (optional: 0 removes the key).

        ``default`` is shown while the document has no value there (the solver's own default).
        """
        value = get_at(self.document, path)
        field = w.FloatText(
            value=float(value) if isinstance(value, (int, float)) else default,
            description=description,
            layout=_short("", width),
            style={"description_width": "initial"},
        )
        self._register(path, field)

        def changed(change: dict[str, Any]) -> None:
            new = change["new"]
            self._write(path, None if optional and new == 0 else _clean(new), field)

        field.observe(changed, "value")
        unit = self._unit(quantity)
        return self._beside(field, path, *([w.Label(unit)] if unit else []))

    def slider(
        self,
        path: Path,
        description: str,
        quantity: str,
        low: float,
        high: float,
        width: str = "360px",
    ) -> w.FloatSlider:
        """A slider bound to ``path`` (for the values worth dragging)."""
        value = float(get_at(self.document, path) or 0.0)
        low, high = min(low, value), max(high, value)
        field = w.FloatSlider(
            value=value,
            min=low,
            max=high,
            step=None,  # any value: a snapped slider must not rewrite a typed value
            description=f"{description} [{self._unit(quantity)}]",
            continuous_update=True,
            readout_format=".4g",
            layout=_short("", width),
            style={"description_width": "initial"},
        )
        self._register(path, field)
        field.observe(lambda change: self._write(path, _clean(change["new"]), field), "value")
        return field

    def flag(self, path: Path, description: str) -> w.HBox:
        """A check box bound to a true-or-absent key of the case (unticked removes the key)."""
        box = w.Checkbox(
            value=bool(get_at(self.document, path)),
            description=description,
            indent=False,
            layout=_short("", "90px"),
        )
        self._register(path, box)
        box.observe(lambda change: self._write(path, True if change["new"] else None, box), "value")
        return self._beside(box, path)

    def _notch_field(self, base: Path) -> w.HBox:
        """Kts of a segment's stated notch (a groove, a spline run-out); 0 removes the notch.

        Its radius, notch sensitivity and description are kept as the case file gives them.
        """
        path = (*base, "notch", "kts")
        value = get_at(self.document, path)
        field = w.FloatText(
            value=float(value) if isinstance(value, (int, float)) else 0.0,
            description="notch Kts",
            layout=_short("", "130px"),
            style={"description_width": "initial"},
        )
        self._register(path, field)

        def changed(change: dict[str, Any]) -> None:
            if self._muted:
                return
            if change["new"] == 0:
                get_at(self.document, base).pop("notch", None)
                self._edited(field)
            else:
                self._write(path, _clean(change["new"]), field)

        field.observe(changed, "value")
        return self._beside(field, path)

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
            layout=_short("", width),
            style={"description_width": "initial"},
        )
        self._register(path, field)

        def changed(change: dict[str, Any]) -> None:
            if on_change is not None:
                on_change(change["new"])
            else:
                self._write(path, change["new"], field)

        field.observe(changed, "value")
        return self._beside(field, path)

    def _write(self, path: Path, value: Any, source: w.Widget | None = None) -> None:
        """Store an edit in the document, mirror it in other widgets of the field, re-solve."""
        if self._muted:
            return
        set_at(self.document, path, value)
        self._muted = True
        try:
            for other in self._fields.get(path_text(path), []):
                if other is not source and value is not None:
                    if isinstance(other, w.FloatSlider):
                        other.min, other.max = min(other.min, value), max(other.max, value)
                    other.value = value
        finally:
            self._muted = False
        self._edited(source)

    def _structural(self, change: Callable[[], None]) -> None:
        change()
        self._rebuild()
        self.refresh()

    # --- editors ----------------------------------------------------------------------------

    def _build_segments(self) -> None:
        s = self.shaft.value or 0
        segments = get_at(self.document, ("shafts", s, "segments")) or []
        materials = sorted((self.document.get("materials") or {}).keys())
        rows: list[w.Widget] = []
        dims: list[tuple[str, Path | None]] = []
        for k, segment in enumerate(segments):
            base: Path = ("shafts", s, "segments", k)
            parts: list[w.Widget] = [
                w.Label(f"{k}", layout=_short("", "24px")),
                self.number((*base, "length"), "length", "length", width="140px"),
            ]
            section = segment.get("section")
            if isinstance(section, dict) and section.get("shape") in _SHAPE_KEYS:
                shape = section["shape"]
                parts.append(
                    self.choice(
                        (*base, "section", "shape"),
                        "",
                        list(_SHAPE_KEYS),
                        lambda new, base=base: self._set_shape(base, new),
                        width="90px",
                    )
                )
                for key in _SHAPE_KEYS[shape]:
                    optional = key == "bore"
                    if key in section or not optional:
                        parts.append(
                            self.number(
                                (*base, "section", key),
                                key.replace("_", " "),
                                "length",
                                optional=optional,
                                width="170px",
                            )
                        )
                        dims.append(
                            (f"segment {k} · {key.replace('_', ' ')}", (*base, "section", key))
                        )
            else:
                kind = "layers" if "layers" in segment else str((section or {}).get("shape"))
                parts.append(w.HTML(f"<i>{html.escape(kind)} section: edit in the case file</i>"))
            if "material" in segment:
                options = sorted({*materials, segment["material"]})
                parts.append(self.choice((*base, "material"), "", options, width="130px"))
            parts.append(
                self.number(
                    (*base, "fillet_radius"), "fillet r", "length", optional=True, width="120px"
                )
            )
            parts += [self.flag((*base, "keyseat"), "keyseat"), self._notch_field(base)]
            parts += [
                self._button("↑", lambda k=k: self._move_segment(k, -1)),
                self._button("↓", lambda k=k: self._move_segment(k, 1)),
                self._button("✕", lambda k=k: self._remove(("shafts", s, "segments"), k)),
                self._message(base),
            ]
            rows.append(w.HBox(parts, layout=w.Layout(align_items="center", flex_flow="row wrap")))
        add = self._button("add segment", lambda: self._add_segment(s), width="120px")
        self.dimension = w.Dropdown(
            options=dims or [("-", None)], description="drag", layout=_short("", "300px")
        )
        self.dimension_box = w.HBox()
        self.dimension.observe(lambda _: self._dimension_slider(), "value")
        self._dimension_slider()
        self.segments_box.children = [
            w.HBox([self.dimension, self.dimension_box]),
            *rows,
            w.HBox([add, self._message(("shafts", s))]),
        ]

    def _dimension_slider(self) -> None:
        if self._drag is not None:  # the slider it replaces leaves the field's widgets
            key, old, label = self._drag
            self._fields[key] = [x for x in self._fields.get(key, []) if x is not old]
            self._messages[key] = [x for x in self._messages.get(key, []) if x is not label]
            self._drag = None
        path = self.dimension.value
        if path is None:
            self.dimension_box.children = []
            return
        value = float(get_at(self.document, path) or 1.0)
        self.diameter_slider = self.slider(path, "size", "length", 0.5 * value, 1.5 * value)
        label = self._message(path)
        self._drag = (path_text(path), self.diameter_slider, label)
        self.dimension_box.children = [self.diameter_slider, label]
        if self._stale and self._error is not None:
            self._show_error(self._error)

    def _set_shape(self, base: Path, shape: str) -> None:
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

        self._structural(change)

    def _move_segment(self, k: int, step: int) -> None:
        segments = self.document["shafts"][self.shaft.value or 0]["segments"]
        other = k + step
        if 0 <= other < len(segments):

            def change() -> None:
                segments[k], segments[other] = segments[other], segments[k]

            self._structural(change)

    def _add_segment(self, s: int) -> None:
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
        self._structural(lambda: segments.append(new))

    def _remove(self, path: Path, index: int) -> None:
        items = get_at(self.document, path)
        self._structural(lambda: items.pop(index))

    def _button(self, text: str, action: Callable[..., Any], width: str = "34px") -> w.Button:
        button = w.Button(description=text, layout=_short("", width))
        button.on_click(lambda _: action())
        return button

    def _shaft_ids(self) -> list[str]:
        return [s.get("id", "?") for s in self.document.get("shafts", [])]

    def _build_supports(self) -> None:
        rows = []
        for n, support in enumerate(self.document.get("supports", [])):
            base: Path = ("supports", n)
            kind = support.get("kind", "fixed")
            shown = "prescribed rotation" if kind == "fixed" and "rotation" in support else kind
            parts = [
                w.Label(f"{n}", layout=_short("", "24px")),
                self.choice((*base, "shaft"), "shaft", self._shaft_ids(), width="160px"),
                self.number((*base, "x"), "x", "length"),
                w.Dropdown(options=_SUPPORT_KINDS, value=shown, layout=_short("", "170px")),
            ]
            parts[-1].observe(lambda c, n=n: self._set_support_kind(n, c["new"]), "value")
            if kind == "spring":
                parts.append(
                    self.number((*base, "stiffness"), "stiffness", "stiffness", width="180px")
                )
            if shown != "fixed":
                parts.append(self.number((*base, "rotation"), "rotation", "angle"))
            parts += [
                self._button("✕", lambda n=n: self._remove(("supports",), n)),
                self._message(base),
            ]
            rows.append(w.HBox(parts, layout=w.Layout(align_items="center")))
        add = self._button("add support", self._add_support, width="120px")
        self.supports_box.children = [*rows, w.HBox([add, self._message("supports")])]

    def _set_support_kind(self, n: int, shown: str) -> None:
        support = self.document["supports"][n]

        def change() -> None:
            if shown == "spring":
                support["kind"] = "spring"
                support.setdefault("stiffness", 1000.0)
            else:
                support["kind"] = "fixed"
                support.pop("stiffness", None)
                if shown == "prescribed rotation":
                    support.setdefault("rotation", 0.0)
                else:
                    support.pop("rotation", None)

        self._structural(change)

    def _add_support(self) -> None:
        shaft = self.document["shafts"][self.shaft.value or 0]
        end = sum(float(seg.get("length", 0)) for seg in shaft["segments"])
        supports = self.document.setdefault("supports", [])
        self._structural(lambda: supports.append({"shaft": shaft["id"], "x": end, "kind": "fixed"}))

    def _build_gears(self) -> None:
        rows = []
        for n, gear in enumerate(self.document.get("gears", [])):
            base: Path = ("gears", n)
            parts: list[w.Widget] = [w.Label(f"{n}", layout=_short("", "24px"))]
            for end in ("a", "b"):
                parts += [
                    self.choice((*base, end, "shaft"), end, self._shaft_ids(), width="140px"),
                    self.number((*base, end, "x"), "x", "length", width="120px"),
                    self.number((*base, end, "radius"), "r", "length", width="120px"),
                ]
            mesh = w.Dropdown(
                options=["external", "internal"],
                value=gear.get("mesh", "external"),
                layout=_short("", "100px"),
            )
            mesh.observe(lambda c, base=base: self._write((*base, "mesh"), c["new"]), "value")
            parts += [
                mesh,
                self._button("✕", lambda n=n: self._remove(("gears",), n)),
                self._message(base),
            ]
            rows.append(w.HBox(parts, layout=w.Layout(align_items="center", flex_flow="row wrap")))
        add = self._button("add gear mesh", self._add_gear, width="130px")
        self.gears_box.children = [*rows, w.HBox([add, self._message("gears")])]

    def _add_gear(self) -> None:
        ids = self._shaft_ids()
        gear = {
            "a": {"shaft": ids[0], "x": 0, "radius": 50},
            "b": {"shaft": ids[-1], "x": 0, "radius": 50},
        }
        self._structural(lambda: self.document.setdefault("gears", []).append(gear))

    def _build_loads(self) -> None:
        cases = self.document.get("load_cases", [])
        names = [c.get("name") for c in cases]
        current = getattr(self, "case_picker", None)
        keep = current.value if current is not None and current.value in range(len(names)) else 0
        self.case_picker = w.Dropdown(
            options=[(str(n), i) for i, n in enumerate(names)], value=keep, description="load case"
        )
        self.case_picker.observe(lambda _: self._structural(lambda: None), "value")
        rows: list[w.Widget] = [self.case_picker]
        if not cases:
            self.loads_box.children = rows
            return
        c = keep
        case = cases[c]
        rows.append(self._text((("load_cases", c, "name")), "name"))
        lengths = {
            s.get("id"): sum(float(g.get("length", 0)) for g in s.get("segments", []))
            for s in self.document.get("shafts", [])
        }
        for n, torque in enumerate(case.get("torques", [])):
            base: Path = ("load_cases", c, "torques", n)
            length = lengths.get(torque.get("shaft"), 1.0)
            size = max(abs(float(torque.get("torque", 0.0))) * 3.0, 100.0)
            rows.append(
                w.HBox(
                    [
                        w.Label(f"torque {n}"),
                        self.choice((*base, "shaft"), "", self._shaft_ids(), width="110px"),
                        self._beside(
                            self.slider((*base, "x"), "x", "length", 0.0, length, width="300px"),
                            (*base, "x"),
                        ),
                        self._beside(
                            self.slider(
                                (*base, "torque"), "T", "torque", -size, size, width="320px"
                            ),
                            (*base, "torque"),
                        ),
                        self._button(
                            "✕", lambda n=n: self._remove(("load_cases", c, "torques"), n)
                        ),
                        self._message(base),
                    ],
                    layout=w.Layout(align_items="center"),
                )
            )
        for n, _load in enumerate(case.get("distributed", [])):
            base = ("load_cases", c, "distributed", n)
            rows.append(
                w.HBox(
                    [
                        w.Label(f"distributed {n}"),
                        self.choice((*base, "shaft"), "", self._shaft_ids(), width="110px"),
                        self.number((*base, "start"), "from", "length", width="120px"),
                        self.number((*base, "end"), "to", "length", width="120px"),
                        self.number(
                            (*base, "intensity_start"), "t₁", "distributed_torque", width="110px"
                        ),
                        self.number(
                            (*base, "intensity_end"), "t₂", "distributed_torque", width="110px"
                        ),
                        self._button(
                            "✕", lambda n=n: self._remove(("load_cases", c, "distributed"), n)
                        ),
                        self._message(base),
                    ],
                    layout=w.Layout(align_items="center", flex_flow="row wrap"),
                )
            )
        shaft_id = self._shaft_ids()[self.shaft.value or 0]
        length = lengths.get(shaft_id, 1.0)
        rows.append(
            w.HBox(
                [
                    self._button(
                        "add torque",
                        lambda: self._structural(
                            lambda: case.setdefault("torques", []).append(
                                {"shaft": shaft_id, "x": round(length / 2, 6), "torque": 100}
                            )
                        ),
                        width="110px",
                    ),
                    self._button(
                        "add distributed",
                        lambda: self._structural(
                            lambda: case.setdefault("distributed", []).append(
                                {
                                    "shaft": shaft_id,
                                    "start": 0,
                                    "end": length,
                                    "intensity_start": 1,
                                    "intensity_end": 1,
                                }
                            )
                        ),
                        width="130px",
                    ),
                    self._button("add load case", self._add_case, width="120px"),
                    self._message(("load_cases", c)),
                ]
            )
        )
        self.loads_box.children = rows

    def _add_case(self) -> None:
        cases = self.document.setdefault("load_cases", [])
        name = f"case {len(cases) + 1}"
        self._structural(lambda: cases.append({"name": name}))

    def _text(self, path: Path, description: str) -> w.Widget:
        field = w.Text(
            value=str(get_at(self.document, path) or ""),
            description=description,
            continuous_update=False,
        )
        self._register(path, field)
        field.observe(lambda c: self._rename(path, c["new"]), "value")
        return w.HBox([field, self._message(path)])

    def _rename(self, path: Path, name: str) -> None:
        old = get_at(self.document, path)
        set_at(self.document, path, name)
        if path[0] == "load_cases":
            for combination in self.document.get("combinations", []):
                factors = combination.get("factors", {})
                if old in factors:
                    factors[name] = factors.pop(old)
        self._structural(lambda: None)

    def _build_combinations(self) -> None:
        cases = [c.get("name") for c in self.document.get("load_cases", [])]
        rows = []
        for n, combination in enumerate(self.document.get("combinations", [])):
            base: Path = ("combinations", n)
            parts = [self._text((*base, "name"), "name")]
            for case in cases:
                if case in combination.get("factors", {}):
                    parts.append(
                        self.number(
                            (*base, "factors", case),
                            f"× {case}",
                            None,
                            optional=True,
                            width="170px",
                        )
                    )
                else:
                    parts.append(
                        self._button(
                            f"+ {case}",
                            lambda base=base, case=case: self._structural(
                                lambda: set_at(self.document, (*base, "factors", case), 1.0)
                            ),
                            width="auto",
                        )
                    )
            parts += [
                self._button("✕", lambda n=n: self._remove(("combinations",), n)),
                self._message(base),
            ]
            rows.append(w.HBox(parts, layout=w.Layout(align_items="center", flex_flow="row wrap")))
        add = self._button("add combination", self._add_combination, width="140px")
        self.combinations_box.children = [*rows, w.HBox([add, self._message("combinations")])]

    def _add_combination(self) -> None:
        cases = [c.get("name") for c in self.document.get("load_cases", [])]
        combinations = self.document.setdefault("combinations", [])
        entry = {"name": f"combination {len(combinations) + 1}", "factors": {cases[0]: 1.0}}
        self._structural(lambda: combinations.append(entry))

    def _build_design(self) -> None:
        design = self.document.setdefault("design", {})
        design.setdefault("factor_of_safety", 2.0)
        design.setdefault("shear_criterion", "von_mises")
        keyway = w.Checkbox(value=bool(design.get("keyway", False)), description="keyways")
        keyway.observe(lambda c: self._write(("design", "keyway"), c["new"]), "value")
        self.design_box.children = [
            self.number(("design", "factor_of_safety"), "factor of safety", None, width="200px"),
            self.choice(
                ("design", "shear_criterion"), "criterion", list(SHEAR_CRITERIA), width="260px"
            ),
            keyway,
            self.number(
                ("design", "allowable_shear_stress"),
                "stated allowable (0 = none)",
                "stress",
                optional=True,
                width="300px",
            ),
            self.number(
                ("design", "max_twist_rate"),
                "largest twist rate (0 = none)",
                "twist_rate",
                optional=True,
                width="300px",
            ),
            w.HTML("<b>Rotation limits</b>: largest |θ(end) − θ(start)| between two stations"),
            *self._rotation_limit_rows(),
            w.HBox(
                [
                    self._button("add rotation limit", self._add_rotation_limit, width="150px"),
                    self._message(("design", "rotation_limits")),
                ]
            ),
            *self._fatigue_rows(),
            self._message("design"),
        ]

    def _rotation_limit_rows(self) -> list[w.Widget]:
        rows: list[w.Widget] = []
        limits = get_at(self.document, ("design", "rotation_limits")) or []
        for n, _limit in enumerate(limits):
            base: Path = ("design", "rotation_limits", n)
            parts = [
                w.Label(f"{n}", layout=_short("", "24px")),
                self.choice((*base, "shaft"), "shaft", self._shaft_ids(), width="160px"),
                self.number((*base, "start"), "from x", "length", width="150px"),
                self.number((*base, "end"), "to x", "length", width="150px"),
                self.number((*base, "limit"), "limit", "angle", width="150px"),
                self._button("✕", lambda n=n: self._remove_rotation_limit(n)),
                self._message(base),
            ]
            rows.append(w.HBox(parts, layout=w.Layout(align_items="center", flex_flow="row wrap")))
        return rows

    def _add_rotation_limit(self) -> None:
        """A new limit over the whole shaft shown, 1 angle unit (to be set by the engineer)."""
        shaft = self.document["shafts"][self.shaft.value or 0]
        end = sum(float(seg.get("length", 0)) for seg in shaft["segments"])
        entry = {"shaft": shaft["id"], "start": 0, "end": _clean(end), "limit": 1}
        design = self.document.setdefault("design", {})
        self._structural(lambda: design.setdefault("rotation_limits", []).append(entry))

    def _remove_rotation_limit(self, n: int) -> None:
        design = self.document["design"]

        def change() -> None:
            design["rotation_limits"].pop(n)
            if not design["rotation_limits"]:
                design.pop("rotation_limits")

        self._structural(change)

    # --- vibration and fatigue: editors and charts ---------------------------------------------

    def _build_more_charts(self) -> w.Tab:
        self.modes_message = w.HTML()
        self.modes_message.add_class("wb-modes-message")
        self.frequency_table = w.HTML()
        self.frequency_table.add_class("wb-frequencies")
        self.modes_figures = w.VBox(
            [self.modes_chart.shapes, self.modes_chart.against, self.frequency_table]
        )
        self.fatigue_message = w.HTML()
        self.fatigue_message.add_class("wb-fatigue-message")
        self.fatigue_table = w.HTML()
        self.fatigue_figures = w.VBox([self.fatigue_chart.figure, self.fatigue_table])
        self.more_charts = w.Accordion(
            children=[
                w.VBox([self.modes_message, self.modes_figures]),
                w.VBox([self.fatigue_message, self.fatigue_figures]),
            ],
            titles=("Modes: natural frequencies and mode shapes", "Fatigue diagram"),
            selected_index=None,
        )
        self.more_charts.observe(lambda _: self._redraw(), "selected_index")
        return self.more_charts

    def open_modes(self) -> None:
        """Open the Modes section (its charts then follow every edit)."""
        self.more_charts.selected_index = 0

    def open_fatigue(self) -> None:
        """Open the Fatigue section."""
        self.more_charts.selected_index = 1

    def _draw_modes(self, shaft: int) -> None:
        if self.more_charts.selected_index != 0:
            return  # drawn when the section is opened
        self._ensure_modes()
        modes, model = self._modes, self._model
        assert model is not None
        if modes is None:
            self.modes_message.value = f"<i>{html.escape(self._modes_message)}</i>"
            self.modes_figures.layout.display = "none"
            self.frequency_table.value = ""
            return
        self.modes_message.value = ""
        self.modes_figures.layout.display = None
        assert self._report is not None
        margin = self._report.design.frequency_margin
        self.modes_chart.draw(modes, shaft, model.operating_speeds, margin)
        self.frequency_table.value = self._frequencies_html(modes)

    def _frequencies_html(self, modes: Modes) -> str:
        length = self._unit("length")
        rows = []
        for mode in range(len(modes)):
            where, x = modes.antinode(mode)
            if modes.rigid_body[mode]:
                values = "<td>0</td><td>0</td><td>rigid body (free to spin)</td>"
            else:
                values = (
                    f"<td>{modes.frequency[mode]:.4g}</td>"
                    f"<td>{float(rpm(modes.angular_frequency[mode])):.4g}</td><td></td>"
                )
            rows.append(
                f"<tr><td>{mode + 1}</td>{values}<td>{html.escape(where)}</td>"
                f"<td>{self._units.from_si(x, 'length'):.4g}</td></tr>"
            )
        head = (
            "<tr><th>mode</th><th>f [Hz]</th><th>[rpm]</th><th></th><th>largest angle on</th>"
            f"<th>x [{length}]</th></tr>"
        )
        notes = "".join(f"<br>• {html.escape(note)}" for note in modes.notes)
        return (
            f"<b>Natural frequencies</b> (lowest {len(modes)}; "
            f"{modes.elements_per_segment} elements per segment with inertia)"
            f"<table class='wb-table'>{head}{''.join(rows)}</table>{notes}"
        )

    def _draw_fatigue(self, shaft: int) -> None:
        if self.more_charts.selected_index != 1:
            return  # drawn when the section is opened
        model, report = self._model, self._report
        assert model is not None and report is not None
        fatigue = report.design.fatigue
        points = governing_fatigue_points(report, model.shafts[shaft].id)
        if fatigue is None or not points:
            self.fatigue_message.value = (
                "<i>No fatigue check: switch it on in the Design tab (two results the torque "
                "cycles between, or a mean and an alternating one).</i>"
                if fatigue is None
                else "<i>No segment could be checked for fatigue (see the notes below the "
                "checks).</i>"
            )
            self.fatigue_figures.layout.display = "none"
            return
        self.fatigue_message.value = ""
        self.fatigue_figures.layout.display = None
        self.fatigue_chart.draw(points, self._units, fatigue.criterion)
        units, stress = self._units, self._unit("stress")
        rows = []
        for point in points:
            factors = point.factors
            rows.append(
                f"<tr><td>{html.escape(point.shaft)}</td><td>{point.segment}</td>"
                f"<td>{units.from_si(point.x, 'length'):.4g}</td>"
                + "".join(
                    f"<td>{units.from_si(value, 'stress'):.4g}</td>"
                    for value in (
                        factors.mean_shear,
                        factors.alternating_shear,
                        factors.endurance_shear,
                        factors.ultimate_shear,
                        factors.yield_shear,
                    )
                )
                + f"<td>{point.concentration:.3g}</td>"
                f"<td>{factors.factor_of_safety(fatigue.criterion):.3g}</td>"
                f"<td>{factors.first_cycle_yield:.3g}</td></tr>"
            )
        head = (
            f"<tr><th>shaft</th><th>segment</th><th>x [{self._unit('length')}]</th>"
            + "".join(f"<th>{name} [{stress}]</th>" for name in ("τm", "τa", "Sse", "Ssu", "Ssy"))
            + f"<th>Kfs</th><th>n {html.escape(CRITERION_NAMES[fatigue.criterion])}</th>"
            "<th>n Langer</th></tr>"
        )
        self.fatigue_table.value = (
            "The lines are drawn for the governing segment's strengths (first row); the other "
            f"segments' points are grey.<table class='wb-table'>{head}{''.join(rows)}</table>"
        )

    def _build_vibration(self) -> None:
        doc = self.document
        rows: list[w.Widget] = [w.HTML("<b>Discs</b> (rigid rotors, flywheels, hubs)")]
        for n, _disc in enumerate(doc.get("discs") or []):
            base: Path = ("discs", n)
            rows.append(
                w.HBox(
                    [
                        w.Label(f"{n}", layout=_short("", "24px")),
                        self.choice((*base, "shaft"), "shaft", self._shaft_ids(), width="160px"),
                        self.number((*base, "x"), "x", "length"),
                        self.number((*base, "inertia"), "inertia", "inertia", width="170px"),
                        self._button("✕", lambda n=n: self._remove_listed("discs", n)),
                        self._message(base),
                    ],
                    layout=w.Layout(align_items="center", flex_flow="row wrap"),
                )
            )
        rows.append(
            w.HBox(
                [self._button("add disc", self._add_disc, width="110px"), self._message("discs")]
            )
        )
        rows.append(w.HTML("<b>Running-speed bands</b>"))
        for n, _speed in enumerate(doc.get("operating_speeds") or []):
            base = ("operating_speeds", n)
            rows.append(
                w.HBox(
                    [
                        w.Label(f"{n}", layout=_short("", "24px")),
                        self._text((*base, "name"), "name"),
                        self.number((*base, "min"), "min", "speed"),
                        self.number((*base, "max"), "max", "speed"),
                        self._button("✕", lambda n=n: self._remove_listed("operating_speeds", n)),
                        self._message(base),
                    ],
                    layout=w.Layout(align_items="center", flex_flow="row wrap"),
                )
            )
        rows.append(
            w.HBox(
                [
                    self._button("add speed band", self._add_speed, width="130px"),
                    self._message("operating_speeds"),
                ]
            )
        )
        rows.append(
            self.number(
                ("design", "frequency_margin"),
                "frequency margin (fraction)",
                None,
                width="260px",
                default=DEFAULT_FREQUENCY_MARGIN,
            )
        )
        rows.append(w.HTML("<b>Material density</b> (0 = massless; the segments then only spring)"))
        for name in sorted((doc.get("materials") or {}).keys()):
            if isinstance(doc["materials"][name], dict):
                rows.append(
                    self.number(
                        ("materials", name, "density"),
                        name,
                        "density",
                        optional=True,
                        width="260px",
                    )
                )
        self.vibration_box.children = rows

    def _remove_listed(self, key: str, index: int) -> None:
        def change() -> None:
            self.document[key].pop(index)
            if not self.document[key]:
                self.document.pop(key)

        self._structural(change)

    def _add_disc(self) -> None:
        shaft = self.document["shafts"][self.shaft.value or 0]
        end = sum(float(seg.get("length", 0)) for seg in shaft["segments"])
        entry = {"shaft": shaft["id"], "x": _clean(end), "inertia": 0.1}
        self._structural(lambda: self.document.setdefault("discs", []).append(entry))

    def _add_speed(self) -> None:
        speeds = self.document.setdefault("operating_speeds", [])
        entry = {"name": f"band {len(speeds) + 1}", "min": 100, "max": 200}
        self._structural(lambda: speeds.append(entry))

    def _fatigue_rows(self) -> list[w.Widget]:
        """The fatigue check's editor (design.fatigue), switched on and off by a checkbox."""
        fatigue = get_at(self.document, ("design", "fatigue"))
        switch = w.Checkbox(value=isinstance(fatigue, dict), description="fatigue check")
        switch.observe(lambda c: self._switch_fatigue(c["new"]), "value")
        rows: list[w.Widget] = [
            w.HTML("<b>Fatigue</b> under a torque that fluctuates between two results"),
            w.HBox([switch, self._message(("design", "fatigue"))]),
        ]
        if not isinstance(fatigue, dict):
            return rows
        base: Path = ("design", "fatigue")
        names = [c.get("name") for c in self.document.get("load_cases", [])] + [
            c.get("name") for c in self.document.get("combinations", [])
        ]
        pair = "extremes" if "extremes" in fatigue else "mean and alternating"
        how = w.Dropdown(
            options=["extremes", "mean and alternating"],
            value=pair,
            description="torques are",
            layout=_short("", "300px"),
            style={"description_width": "initial"},
        )
        how.observe(lambda c: self._fatigue_pair(c["new"]), "value")
        if pair == "extremes":
            picks = [
                self.choice((*base, "extremes", 0), "between", names, width="260px"),
                self.choice((*base, "extremes", 1), "and", names, width="220px"),
                self._message((*base, "extremes")),
            ]
        else:
            picks = [
                self.choice((*base, "mean"), "mean", names, width="240px"),
                self.choice((*base, "alternating"), "alternating", names, width="260px"),
            ]
        rows += [
            w.HBox([how, *picks], layout=w.Layout(align_items="center", flex_flow="row wrap")),
            w.HBox(
                [
                    self.choice((*base, "finish"), "finish", list(SURFACE_FINISHES)),
                    self.choice((*base, "reliability"), "reliability", list(RELIABILITY_FACTORS)),
                    self.choice(
                        (*base, "criterion"), "criterion", list(FATIGUE_CRITERIA), width="220px"
                    ),
                    self.number(
                        (*base, "factor_of_safety"),
                        "fatigue factor of safety",
                        None,
                        width="240px",
                        default=1.5,
                    ),
                    self.choice(
                        (*base, "mean_concentration"),
                        "mean stress",
                        [("× Kfs (conservative)", "kfs"), ("nominal", "none")],
                        width="260px",
                    ),
                ],
                layout=w.Layout(align_items="center", flex_flow="row wrap"),
            ),
        ]
        return rows

    def _switch_fatigue(self, on: bool) -> None:
        design = self.document.setdefault("design", {})
        names = [c.get("name") for c in self.document.get("load_cases", [])]

        def change() -> None:
            if on:
                first, second = (names * 2)[:2] if names else ("", "")
                design["fatigue"] = {
                    "extremes": [first, second],
                    "finish": "machined",
                    "reliability": 0.5,
                    "criterion": "goodman",
                    "factor_of_safety": 1.5,
                }
            else:
                design.pop("fatigue", None)

        self._structural(change)

    def _fatigue_pair(self, pair: str) -> None:
        fatigue = self.document["design"]["fatigue"]

        def change() -> None:
            if pair == "extremes":
                first, second = fatigue.pop("mean", None), fatigue.pop("alternating", None)
                fatigue["extremes"] = [first, second]
            else:
                first, second = (fatigue.pop("extremes", None) or [None, None])[:2]
                fatigue["mean"], fatigue["alternating"] = first, second

        self._structural(change)

    # --- what-if: baseline and sweep ---------------------------------------------------------

    def _build_whatif(self) -> None:
        pin = w.Button(description="Pin baseline", icon="thumb-tack")
        pin.on_click(lambda _: self.pin_baseline())
        clear = w.Button(description="Clear baseline")
        clear.on_click(lambda _: self.clear_baseline())
        self.difference = w.HTML()
        self.difference.add_class("wb-difference")
        self.sweep_input = w.Dropdown(description="vary", layout=_short("", "420px"))
        self.sweep_input.observe(lambda _: self._sweep_defaults(), "value")
        self.sweep_from = w.FloatText(description="from", layout=_short("", "160px"))
        self.sweep_to = w.FloatText(description="to", layout=_short("", "160px"))
        self.sweep_points = w.BoundedIntText(
            value=50, min=2, max=5000, description="points", layout=_short("", "160px")
        )
        self.sweep_metric = w.Dropdown(
            options=[(label, key) for key, (label, _) in METRICS.items()],
            description="follow",
            layout=_short("", "360px"),
        )
        self.sweep_support = w.BoundedIntText(
            value=0, min=0, max=99, description="support", layout=_short("", "140px")
        )
        self.sweep_run = w.Button(description="Run sweep", icon="play", button_style="info")
        self.sweep_run.on_click(lambda _: self.start_sweep())
        self.sweep_cancel = w.Button(description="Cancel", icon="stop", disabled=True)
        self.sweep_cancel.on_click(lambda _: self.cancel_sweep())
        self.sweep_progress = w.IntProgress(value=0, min=0, max=1, description="progress")
        self.sweep_message = self._message("whatif.sweep")
        import bqplot as bq  # noqa: PLC0415 - already loaded with the charts

        self.sweep_x, self.sweep_y = bq.LinearScale(), bq.LinearScale()
        scales = {"x": self.sweep_x, "y": self.sweep_y}
        self.sweep_line = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=["#3d5a80"],
            stroke_width=2,
            tooltip=bq.Tooltip(fields=["x", "y"], formats=[".4g", ".4g"]),
        )
        self.sweep_now = bq.Scatter(x=[], y=[], scales=scales, colors=["#e09f3e"], default_size=80)
        self.sweep_figure = bq.Figure(
            marks=[self.sweep_line, self.sweep_now],
            axes=[
                bq.Axis(scale=self.sweep_x, label="input"),
                bq.Axis(scale=self.sweep_y, side="left", label="result", label_offset="45px"),
            ],
            title="Sweep",
            animation_duration=0,
            layout=w.Layout(width="620px", height="260px"),
            fig_margin={"top": 30, "bottom": 40, "left": 70, "right": 15},
        )
        self.sweep_figure.add_class("wb-chart-sweep")
        self.whatif_box.children = [
            w.HBox([pin, clear]),
            self.difference,
            w.HTML("<b>Sweep</b> one input over a range"),
            self.sweep_input,
            w.HBox([self.sweep_from, self.sweep_to, self.sweep_points]),
            w.HBox([self.sweep_metric, self.sweep_support]),
            w.HBox([self.sweep_run, self.sweep_cancel, self.sweep_progress, self.sweep_message]),
            self.sweep_figure,
        ]

    def _refresh_sweep_inputs(self) -> None:
        options = [(label, path) for path, label in numeric_inputs(self.document)]
        current = self.sweep_input.value
        self.sweep_input.options = options
        paths = [path for _, path in options]
        self.sweep_input.value = current if current in paths else (paths[0] if paths else None)
        self._sweep_defaults()

    def _sweep_defaults(self) -> None:
        path = self.sweep_input.value
        if path is None:
            return
        value = float(get_at(self.document, path) or 0.0)
        self.sweep_from.value = round(0.5 * value, 6) if value else -1.0
        self.sweep_to.value = round(1.5 * value, 6) if value else 1.0

    def pin_baseline(self) -> None:
        """Keep the current results as the baseline the charts draw under the new ones."""
        if self.results is not None and self.report is not None and not self.stale:
            self.baseline = (self.results, self.report)
            self._redraw()

    def clear_baseline(self) -> None:
        self.baseline = None
        self._redraw()

    def start_sweep(self) -> None:
        """Run the sweep set up in the What-if tab (in chunks, so Cancel can stop it)."""
        path = self.sweep_input.value
        self.sweep_message.value = ""
        try:
            if path is None:
                raise InputError("sweep", "there is no numeric input to vary")
            values = tuple(
                np.linspace(self.sweep_from.value, self.sweep_to.value, self.sweep_points.value)
            )
            request = SweepRequest(
                path, values, self.sweep_metric.value, self.result.value, self.sweep_support.value
            )
            chunks = sweep_chunks(clone(self.document), request)
        except InputError as error:
            self.sweep_message.value = html.escape(str(error))
            return
        self._sweep_cancelled = False
        self.sweep_progress.max, self.sweep_progress.value = len(values), 0
        self.sweep_run.disabled, self.sweep_cancel.disabled = True, False
        label, quantity = METRICS[request.metric]
        unit = f" [{self._unit(quantity)}]" if quantity else ""
        input_label = dict((p, lbl) for lbl, p in self.sweep_input.options).get(path, "input")
        self.sweep_figure.axes[0].label = input_label
        self.sweep_figure.axes[1].label = label + unit
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            loop = None
        if loop is None:
            for done, result in chunks:
                self._sweep_step(values, done, result)
                if self._sweep_cancelled:
                    break
            self._sweep_done()
        else:
            loop.create_task(self._sweep_async(chunks, values))

    async def _sweep_async(self, chunks: Any, values: tuple[float, ...]) -> None:
        try:
            for done, result in chunks:
                self._sweep_step(values, done, result)
                await asyncio.sleep(0)  # lets the kernel take a Cancel click
                if self._sweep_cancelled:
                    break
        except InputError as error:
            self.sweep_message.value = html.escape(str(error))
        finally:
            self._sweep_done()

    def _sweep_step(self, values: tuple[float, ...], done: int, result: np.ndarray) -> None:
        self.sweep_values = result[:done]
        with self.sweep_figure.hold_sync():
            self.sweep_line.x, self.sweep_line.y = np.array(values[:done]), result[:done]
            current = get_at(self.document, self.sweep_input.value)
            if isinstance(current, (int, float)) and done:
                self.sweep_now.x = np.array([float(current)])
                self.sweep_now.y = np.array([np.interp(current, values[:done], result[:done])])
        self.sweep_progress.value = done

    def _sweep_done(self) -> None:
        self.sweep_run.disabled, self.sweep_cancel.disabled = False, True
        if self._sweep_cancelled:
            self.sweep_message.value = f"cancelled after {self.sweep_progress.value} points"
        elif self.sweep_values is not None and np.isnan(self.sweep_values).any():
            bad = int(np.isnan(self.sweep_values).sum())
            self.sweep_message.value = f"{bad} points are not valid cases and are left out"

    def cancel_sweep(self) -> None:
        self._sweep_cancelled = True

    # --- solving and drawing ------------------------------------------------------------------

    def _edited(self, source: w.Widget | None = None) -> None:
        """An edit happened: check it now; solve and redraw now, or once the burst ends."""
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            loop = None
        if loop is None:
            self.refresh()
            return
        # A kernel: edits (from the browser, one message each, or from a cell's loop) arrive
        # faster than a redraw is worth. Each is validated at once, so its message shows as it is
        # typed; the solve and redraw run once, after the queued edits, on the newest valid model.
        model = self._parse()
        if model is not None:
            self._queued, self._queued_error = model, None
        elif self._queued is not None:
            self._queued_error = self._error  # the burst ends on a bad edit: show it after
        if self._queued is not None and not self._pending:
            self._pending = True
            loop.call_soon(self._flush)

    def _flush(self) -> None:
        self._pending = False
        model, error = self._queued, self._queued_error
        self._queued, self._queued_error = None, None
        if model is None:
            return
        self._solve(model)
        if error is not None:  # the last edit was bad: its message, over the last good charts
            self._show_error(error)

    def refresh(self) -> bool:
        """Solve the document and redraw; on bad input keep the last results, marked stale."""
        self._queued, self._queued_error = None, None
        model = self._parse()
        return model is not None and self._solve(model)

    def _parse(self) -> Model | None:
        """The document's model, or ``None`` (and its error shown) when the input is bad."""
        try:
            return parse_case(clone(self.document))
        except InputError as error:
            self._show_error(error)
        except Exception as error:
            self._show_error(InputError("", f"unexpected error ({type(error).__name__}): {error}"))
        return None

    def _solve(self, model: Model) -> bool:
        """Solve and check a valid model, then redraw everything from it."""
        try:
            results = solve(model)
            report = run_checks(results)
        except InputError as error:
            self._show_error(error)
            return False
        except Exception as error:
            self._show_error(InputError("", f"unexpected error ({type(error).__name__}): {error}"))
            return False
        self._model, self._results, self._report = model, results, report
        self.solve_count += 1
        self._stale, self._error = False, None
        self._clear_errors()
        self._redraw()
        self._publish()
        return True

    def _show_error(self, error: InputError) -> None:
        """Put the message beside the field the error names (else its row or list); dim charts."""
        self._stale, self._error = True, error
        self._clear_errors()
        field = normal_field(error.field)
        path = parse_path(field)
        message = plain_words(error.message)
        # The nearest enclosing thing shown: the field itself, else its row, else its list.
        for size in range(len(path), 0, -1):
            labels = self._messages.get(path_text(path[:size]))
            if labels:
                rest = field_words(path[size:])
                text = html.escape(f"{rest}: {message}" if rest else message)
                for label in labels:
                    label.value = text
                self._shown += labels
                break
        for widget in self._fields.get(field, []):
            widget.add_class("wb-bad")
            self._bad.append(widget)
        where = field_words(path, self.document)
        self.status.value = (
            "<span class='wb-msg'><b>Not solved:</b> "
            f"{html.escape(f'{where}: {message}' if where else message)}</span> "
            "<i>(charts show the last valid case, dimmed)</i>"
        )
        self.charts_box.add_class("wb-stale")

    def _clear_errors(self) -> None:
        for label in self._shown:
            label.value = ""
        for widget in self._bad:
            widget.remove_class("wb-bad")
        self._shown, self._bad = [], []
        if not self._stale:
            self.status.value = "<span style='color:#3d5a80'>Solved.</span>"
            self.charts_box.remove_class("wb-stale")

    def _on_shaft(self, _change: Any) -> None:
        if self._muted:
            return
        self._rebuild()  # the segment editors and the loads' defaults follow the shaft shown
        if self._stale and self._error is not None:
            self._show_error(self._error)
        self._redraw()

    def _on_units(self, change: dict[str, Any]) -> None:
        if self._muted:
            return
        if self.stale or self.model is None:
            self._muted = True
            self.units.value = change["old"]
            self._muted = False
            self.status.value = (
                "<span class='wb-msg'>Fix the fields marked in red before changing units.</span>"
            )
            return
        self.units_key = change["new"]
        self.document = case_to_dict(self.model, unit_system(self.units_key))
        self._rebuild()
        self.refresh()

    def _on_save(self, _button: Any) -> None:
        try:
            target = self.save()
        except (InputError, OSError) as error:
            self.save_message.value = f"<span class='wb-msg'>{html.escape(str(error))}</span>"
            return
        self.save_message.value = f"saved to {html.escape(str(target))}"

    def _redraw(self) -> None:
        if self.model is None or self.results is None or self.report is None:
            return
        result = (
            self.result.value
            if self.result.value in self.results.names
            else (self.results.names[0])
        )
        shaft = min(self.shaft.value or 0, len(self.model.shafts) - 1)
        self.charts.draw(self.model, self.results, self.report, result, shaft, self.baseline)
        self.summary.value = self._summary_html(result)
        self.check_table.value = self._checks_html()
        notes = "".join(f"<br>• {html.escape(n)}" for n in self.report.notes)
        self.caution.value = f"<div class='wb-caution'><b>Caution.</b> {CAUTION}{notes}</div>"
        self.difference.value = self._difference_html(result)
        self._draw_modes(shaft)
        self._draw_fatigue(shaft)

    def key_values(self, results: Results, report: CheckReport, result: str) -> dict[str, float]:
        """Headline values of a result in the panel's units (for the summary and the diff)."""
        units = self._units
        row = results.index(result) if result in results.names else 0
        governing = report.governing
        values = {
            "governing utilisation": governing.utilisation if governing else float("nan"),
            f"largest shear stress [{self._unit('stress')}]": float(
                units.from_si(results.shear_stress[row].max(), "stress")
            ),
            f"largest |angle of twist| [{self._unit('angle')}]": float(
                units.from_si(np.abs(results.angle[row]).max(), "angle")
            ),
            f"largest |internal torque| [{self._unit('torque')}]": float(
                units.from_si(np.abs(results.torque[row]).max(), "torque")
            ),
        }
        for n, reaction in enumerate(results.reactions[row]):
            values[f"reaction {n} [{self._unit('torque')}]"] = float(
                units.from_si(reaction, "torque")
            )
        return values

    def _summary_html(self, result: str) -> str:
        assert self.results is not None and self.report is not None
        values = self.key_values(self.results, self.report, result)
        governing = self.report.governing
        verdict = "all checks pass" if self.report.passes else "SOME CHECKS FAIL"
        where = ""
        if governing is not None:
            where = (
                f" ({governing.kind.replace('_', ' ')}, {governing.shaft} segment "
                f"{governing.segment}, {html.escape(governing.result)})"
            )
        cells = "".join(
            f"<tr><th>{html.escape(k)}</th><td class='wb-value' data-key='{html.escape(k)}'>"
            f"{v:.4g}</td></tr>"
            for k, v in values.items()
        )
        return (
            f"<b>{verdict}</b>{where} — showing <i>{html.escape(result)}</i>"
            f"<table class='wb-table'>{cells}</table>"
        )

    def _checks_html(self) -> str:
        assert self.report is not None
        units = self._units
        governing: dict[tuple[str, Any, str], Any] = {}
        for check in self.report.checks:
            key = (check.shaft, check.segment, check.kind)
            if key not in governing or check.utilisation > governing[key].utilisation:
                governing[key] = check
        head = (
            "<tr><th>shaft</th><th>segment</th><th>check</th><th>governing result</th>"
            "<th>value</th><th>limit</th><th>unit</th><th>utilisation</th><th>verdict</th>"
            f"<th>x [{self._unit('length')}]</th></tr>"
        )
        rows = []
        for check in governing.values():
            quantity = CHECK_QUANTITIES[check.kind]
            verdict = "pass" if check.passes else "<span class='wb-fail'>FAIL</span>"
            rows.append(
                f"<tr><td>{html.escape(check.shaft)}</td>"
                f"<td>{'-' if check.segment is None else check.segment}</td>"
                f"<td>{check.kind.replace('_', ' ')}</td><td>{html.escape(check.result)}</td>"
                f"<td>{units.from_si(check.value, quantity):.4g}</td>"
                f"<td>{units.from_si(check.limit, quantity):.4g}</td>"
                f"<td>{self._unit(quantity)}</td><td>{check.utilisation:.3f}</td>"
                f"<td>{verdict}</td><td>{units.from_si(check.x, 'length'):.4g}</td></tr>"
            )
        return f"<table class='wb-table'>{head}{''.join(rows)}</table>"

    def _difference_html(self, result: str) -> str:
        if self.baseline is None or self.results is None or self.report is None:
            return "<i>No baseline pinned: pin one, then edit, to compare.</i>"
        now = self.key_values(self.results, self.report, result)
        before = self.key_values(*self.baseline, result)
        rows = []
        for key, value in now.items():
            old = before.get(key, float("nan"))
            change = value - old
            share = f"{change / old:+.1%}" if old else "-"
            rows.append(
                f"<tr><th>{html.escape(key)}</th><td>{old:.4g}</td><td>{value:.4g}</td>"
                f"<td>{change:+.4g}</td><td>{share}</td></tr>"
            )
        head = "<tr><th></th><th>baseline</th><th>now</th><th>change</th><th>%</th></tr>"
        return f"<table class='wb-table'>{head}{''.join(rows)}</table>"

    def _publish(self) -> None:
        """Update the case output the calculation record reads (the exporter takes the last)."""
        assert self.model is not None and self.report is not None
        governing = self.report.governing
        text = (
            f"workbench case: {self.model.title or 'untitled'}; "
            f"{'all checks pass' if self.report.passes else 'some checks fail'}"
            + (f"; governing utilisation {governing.utilisation:.3f}" if governing else "")
        )
        self.case_bundle = {CASE_MIME_TYPE: case_to_dict(self.model), "text/plain": text}
        if self._handle is not None:
            self._handle.update(self.case_bundle, raw=True)

    def case_json(self) -> str:
        """The current case file text (last valid case, panel units)."""
        assert self.model is not None
        return json.dumps(case_to_dict(self.model), indent=2, ensure_ascii=False)


def _has_inertia(model: Model) -> bool:
    """Whether a case has discs or a material with a density (anything to vibrate)."""
    return bool(model.discs) or any(
        layer.material.density
        for shaft in model.shafts
        for segment in shaft.segments
        for layer in segment.layers
    )


def _modes_of(model: Model) -> tuple[Modes | None, str]:
    """The natural modes of a case (as ``workbench modes`` gives them), or why there are none."""
    if not _has_inertia(model):
        return None, (
            "This case has no inertia, so no natural frequencies: add discs, or a density for "
            "the shafts' materials (Vibration tab)."
        )
    try:
        return natural_modes(model), ""
    except InputError as error:
        return None, f"No natural modes: {plain_words(error.message)}"


def governing_fatigue_points(report: CheckReport, shaft: str) -> list[FatiguePoint]:
    """The fatigue points of one shaft (else of all), the governing one first.

    Governing: the lowest factor of safety by the design's criterion or against first-cycle
    yield, as in the check table.
    """
    fatigue = report.design.fatigue
    points = [p for p in report.fatigue_points if p.shaft == shaft] or list(report.fatigue_points)
    if fatigue is None or not points:
        return []

    def worst(point: FatiguePoint) -> float:
        factors = point.factors
        return min(factors.factor_of_safety(fatigue.criterion), factors.first_cycle_yield)

    return sorted(points, key=worst)


def _clean(value: float) -> float | int:
    """Drop float noise from widget values (12 significant digits; whole numbers as int)."""
    rounded = float(f"{value:.12g}")
    return int(rounded) if rounded.is_integer() and abs(rounded) < 1e15 else rounded
