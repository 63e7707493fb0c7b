"""The workbench panel: edit a case, see every chart and the checks follow, compare, sweep, save.

:class:`Workbench` composes small parts and lays them out:

* :class:`~workbench.panel.state.CaseState`: the case document, its solve, the coalescing of
  edit bursts, the current results and whether they are stale (no widgets);
* :class:`~workbench.panel.form.Form`: fields bound to the document, messages beside them;
* the drawing as the editor (:mod:`workbench.panel.drawing`): handles on the elevation, the
  parts list and finder, the inspector and the palette, beside the drawing;
* the table view: the editor tabs (:mod:`workbench.panel.editors`) for bulk entry and the
  What-if tab (:mod:`workbench.panel.whatif`);
* the charts (:mod:`workbench.panel.charts`, :mod:`~workbench.panel.modes_section`,
  :mod:`~workbench.panel.fatigue_section`) and the tables (:mod:`workbench.panel.summary`).

Bad input is shown, in plain words, beside the field its path names; the last good charts stay up
marked stale, and the value typed stays where it was typed. In a kernel a burst of edits is solved
once, when it ends (see :mod:`workbench.panel.state`).
"""

from __future__ import annotations

from pathlib import Path as FilePath
from typing import Any

import ipywidgets as w
from IPython.display import display

from workbench.case.errors import InputError
from workbench.design.checks import CheckReport
from workbench.panel.bound import Editor
from workbench.panel.charts import Charts
from workbench.panel.document import UNIT_CHOICES, result_names, structure
from workbench.panel.drawing import DrawingEditor
from workbench.panel.editors import (
    CombinationsEditor,
    DesignEditor,
    GearsEditor,
    LoadsEditor,
    SegmentsEditor,
    SupportsEditor,
    VibrationEditor,
)
from workbench.panel.fatigue_section import FatigueSection
from workbench.panel.form import Form, sized
from workbench.panel.markup import render
from workbench.panel.modes_section import ModesSection
from workbench.panel.plotting import held
from workbench.panel.shared import close_tree
from workbench.panel.stale import StaleMarks
from workbench.panel.state import CaseState
from workbench.panel.study_view import StudyView
from workbench.panel.summary import ResultTables, difference_html, key_values
from workbench.panel.warping_section import WarpingSection
from workbench.panel.whatif import WhatIf
from workbench.solver.analysis import Results
from workbench.solver.io import decode_case_text

#: The outputs of the Modes section (stale marks' names) and the note over them.
MODES_OUTPUTS = ("mode shapes", "modes against speeds", "frequency table")
MODES_NOTE = "Natural modes are those"


class _Part:
    """An attribute of the panel that lives on one of its parts (kept where notebooks find it)."""

    def __init__(self, part: str, name: str | None = None) -> None:
        self.part, self.name = part, name or ""

    def __set_name__(self, owner: type, name: str) -> None:
        self.name = self.name or name

    def __get__(self, panel: Any, owner: type | None = None) -> Any:
        if panel is None:
            return self
        return getattr(getattr(panel, self.part), self.name)

    def __set__(self, panel: Any, value: Any) -> None:
        setattr(getattr(panel, self.part), self.name, value)


class Workbench:
    """An editable, live-solving panel for one case.

    Parameters
    ----------
    document
        The case file's JSON (decoded), in any units the case file may use.
    path
        The case file to save to.
    """

    # The case and its solve (pending work is finished before a result is read).
    path = _Part("state")
    units_key = _Part("state")
    document = _Part("state")
    model = _Part("state")
    results = _Part("state")
    report = _Part("state")
    modes = _Part("state")
    stale = _Part("state")
    error = _Part("state")
    baseline = _Part("state")
    solve_count = _Part("state")
    case_bundle = _Part("state")
    # Widgets of the parts, reachable from the panel as before.
    segments_box = _Part("segments_editor", "box")
    supports_box = _Part("supports_editor", "box")
    gears_box = _Part("gears_editor", "box")
    loads_box = _Part("loads_editor", "box")
    combinations_box = _Part("combinations_editor", "box")
    design_box = _Part("design_editor", "box")
    vibration_box = _Part("vibration_editor", "box")
    dimension = _Part("segments_editor")
    dimension_box = _Part("segments_editor")
    diameter_slider = _Part("segments_editor")
    case_picker = _Part("loads_editor")
    summary = _Part("tables")
    check_table = _Part("tables")
    caution = _Part("tables")
    modes_chart = _Part("modes_section", "chart")
    modes_message = _Part("modes_section", "message")
    modes_figures = _Part("modes_section", "figures")
    frequency_table = _Part("modes_section", "table")
    fatigue_chart = _Part("fatigue_section", "chart")
    fatigue_message = _Part("fatigue_section", "message")
    fatigue_figures = _Part("fatigue_section", "figures")
    fatigue_table = _Part("fatigue_section", "table")
    whatif_box = _Part("whatif", "box")
    difference = _Part("whatif")
    sweep_input = _Part("whatif")
    sweep_from = _Part("whatif")
    sweep_to = _Part("whatif")
    sweep_points = _Part("whatif")
    sweep_metric = _Part("whatif")
    sweep_support = _Part("whatif")
    sweep_run = _Part("whatif")
    sweep_cancel = _Part("whatif")
    sweep_progress = _Part("whatif")
    sweep_message = _Part("whatif")
    sweep_x = _Part("whatif")
    sweep_y = _Part("whatif")
    sweep_line = _Part("whatif")
    sweep_now = _Part("whatif")
    sweep_figure = _Part("whatif")
    sweep_values = _Part("whatif")

    def __init__(self, document: dict[str, Any], path: str | FilePath | None = None) -> None:
        self.state = CaseState(document, path, self._on_solved, self._on_error, self._on_checked)
        self.form = Form(self.state, self._rebuild)
        self._handle: Any = None
        self.charts = Charts()
        self.modes_section = ModesSection()
        self.fatigue_section = FatigueSection()
        self.tables = ResultTables()
        self.stale_marks = StaleMarks()
        self.warping = WarpingSection(self.charts.x_scale, self.stale_marks, self.form)
        shown = self._shown_shaft
        self.segments_editor = SegmentsEditor(self.form, shown)
        self.supports_editor = SupportsEditor(self.form, shown)
        self.gears_editor = GearsEditor(self.form, shown)
        self.loads_editor = LoadsEditor(self.form, shown)
        self.combinations_editor = CombinationsEditor(self.form, shown)
        self.design_editor = DesignEditor(self.form, shown)
        self.vibration_editor = VibrationEditor(self.form, shown)
        self.whatif = WhatIf(
            self.form, lambda: self.result.value, self.pin_baseline, self.clear_baseline
        )
        self.study = StudyView(self.form, self.state.case_json, lambda: self.state.path)
        self.drawing_editor = DrawingEditor(
            self.charts.drawing, self.form, shown, lambda: self.result.value
        )
        self.drawing_editor.inspector.on_show.append(self._follow_pick)
        self._build()
        parts = self.drawing_editor.parts
        self.drawing_editor.pick(parts[0] if parts else None)  # the first segment, to start
        self.refresh()

    @property
    def _editors(self) -> tuple[Editor, ...]:
        return (
            self.segments_editor,
            self.supports_editor,
            self.gears_editor,
            self.loads_editor,
            self.combinations_editor,
            self.design_editor,
            self.vibration_editor,
        )

    def _shown_shaft(self) -> int:
        return self.shaft.value or 0

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
        bundle = self.case_bundle or {"text/plain": "no valid case yet"}
        self._handle = display(bundle, raw=True, display_id=True)

    def _repr_mimebundle_(self, **kwargs: Any) -> Any:
        return self.root._repr_mimebundle_(**kwargs)

    def save(self, path: str | FilePath | None = None) -> FilePath:
        """Save the last valid case to its case file (atomically)."""
        return self.state.save(path)

    def case_json(self) -> str:
        """The current case file text (last valid case, panel units)."""
        return self.state.case_json()

    def enter(self, field: str, text: str) -> None:
        """Type ``text`` into the entry of ``field``, as a person would, and press Enter.

        It is read like typed text (``71``, ``71 mm``, ``2 3/4 in``): a refused value shows beside
        the field and nothing is solved.

        Parameters
        ----------
        field
            The field's path as the panel names it, e.g.
            ``"shafts[0].segments[0].section.diameter"`` (a field of the shaft shown).
        text
            What is typed, with or without a unit (the field's unit when without).

        Raises
        ------
        InputError
            When no entry of that field is on the panel.
        """
        entries = [x for x in self.form.fields.get(field, []) if isinstance(x, w.Text)]
        if not entries:
            raise InputError(field, "no entry of this field is shown on the panel")
        entries[0].value = text
        self.settle()

    def settle(self) -> None:
        """Solve and redraw a pending edit now instead of when the burst of edits ends."""
        self.state.settle()
        self.charts.draw_readouts()  # and the hover readouts, not after a pause

    def refresh(self) -> bool:
        """Solve the document and redraw; on bad input keep the last results, marked stale."""
        return self.state.refresh()

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
        self.result = w.Dropdown(description="Show", layout=sized("280px"))
        self.result.observe(lambda _: self._redraw(), "value")
        self.shaft = w.Dropdown(description="Shaft", layout=sized("200px"))
        self.shaft.observe(self._on_shaft, "value")
        self.save_button = w.Button(description="Save case", icon="save", button_style="primary")
        self.save_button.on_click(self._on_save)
        self.save_message = w.HTML()
        tabs: list[Editor | WhatIf | StudyView] = [*self._editors, self.whatif, self.study]
        self.editors = w.Tab(children=[tab.box for tab in tabs])
        for number, tab in enumerate(tabs):
            self.editors.set_title(number, tab.title)
        marks = self.stale_marks
        for name, figure in zip(
            ("elevation", "torque", "angle", "stress", "utilisation"),
            self.charts.figures,
            strict=True,
        ):
            marks.output(name, figure)
        for name, widget in (
            (MODES_OUTPUTS[0], self.modes_section.chart.shapes),
            (MODES_OUTPUTS[1], self.modes_section.chart.against),
            (MODES_OUTPUTS[2], self.modes_section.table),
            ("fatigue diagram", self.fatigue_section.chart.figure),
            ("fatigue table", self.fatigue_section.table),
            ("sweep", self.whatif.sweep_figure),
            ("baseline difference", self.whatif.difference),
        ):
            marks.output(name, widget)
        self.whatif.box.children = (
            marks.note("The baseline difference and the sweep are those"),
            *self.whatif.box.children,
        )
        self.more_charts = w.Accordion(
            children=[
                w.VBox([marks.note(MODES_NOTE), self.modes_section.box]),
                w.VBox([marks.note("The fatigue points are those"), self.fatigue_section.box]),
            ],
            titles=("Modes: natural frequencies and mode shapes", "Fatigue diagram"),
            selected_index=None,
        )
        self.more_charts.observe(lambda _: self._redraw(), "selected_index")
        self.warping.section_box.observe(lambda _: self._follow_pick(), "selected_index")
        editing = self.drawing_editor
        self.drawing_box = w.HBox(
            [
                w.VBox(
                    [editing.palette.box, self.charts.elevation, self.charts.drawing.legend.widget]
                ),
                w.VBox(
                    [
                        w.HTML(render("heading", "Parts", " (type a name and Enter, or click)")),
                        editing.finder,
                        editing.parts_list,
                        editing.inspector.box,
                        self.warping.section_box,
                    ]
                ),
            ]
        )
        self.drawing_box.layout = w.Layout(flex_flow="row wrap")  # narrow pages: parts below
        self.drawing_box.add_class("wb-drawing")
        self.table_view = w.Accordion(
            children=[self.editors],
            titles=("Table view: every part in rows, for bulk entry; what-if and sweeps",),
            selected_index=0,
        )
        self.charts_box = w.VBox(
            [
                marks.note("These charts are those"),
                self.drawing_box,
                # Along the shaft, one column on the drawing's x scale: a station lines up.
                self.charts.torque.box,
                self.charts.angle.box,
                self.charts.stress.box,
                self.charts.utilisation_box,
                self.warping.charts_holder,  # a case that warps: bimoment, torque parts, σ_w
                self.more_charts,
            ]
        )
        self.charts_box.add_class("wb-charts")
        self.root = w.VBox(
            [
                w.HTML(render("style")),
                self.title,
                w.HBox([self.units, self.shaft, self.result]),
                w.HBox([self.save_button, self.save_message]),
                self.status,
                self.summary,
                self.charts_box,
                w.HTML(
                    render("heading", "Checks", " (governing result of each segment and check)")
                ),
                self.check_table,
                self.caution,
                self.table_view,
            ]
        )
        self.root.add_class("wb-panel")
        self._rebuild()

    def _rebuild(self) -> None:
        """Rebuild every editor from the document (after a structural change)."""
        self.form.reset()
        with self.form.quiet():
            doc = self.document
            self.title.value = render("title", doc.get("title") or "Untitled case")
            shaft_ids = [s.get("id", "?") for s in doc.get("shafts", [])]
            keep = self.shaft.value if self.shaft.value in range(len(shaft_ids)) else 0
            self.shaft.options = [(name, n) for n, name in enumerate(shaft_ids)]
            self.shaft.value = keep
            names = result_names(doc)
            current = self.result.value
            self.result.options = names
            self.result.value = current if current in names else (names[0] if names else None)
            old = [child for editor in self._editors for child in editor.box.children]
            for editor in self._editors:
                editor.build()
            kept = {id(child) for editor in self._editors for child in editor.box.children}
            close_tree(*(child for child in old if id(child) not in kept))
            self.whatif.refresh_inputs()
            self.study.refresh_inputs()
            self.drawing_editor.build()

    # --- what the state tells ---------------------------------------------------------------

    def _on_solved(self) -> None:
        self.form.clear_errors()
        results = self.state.results
        cautions = results.warnings if results is not None else ()
        self.status.value = render("solved") + "".join(
            render("warning", f"Warning: {text}") for text in cautions
        )
        self.charts_box.remove_class("wb-stale")
        self.stale_marks.clear()
        self.study.case_changed()
        self._redraw()
        self._update_record_output()

    def _update_record_output(self) -> None:
        bundle = self.state.case_bundle  # none while checks are pending: no verdict yet
        if self._handle is not None and bundle is not None:
            self._handle.update(bundle, raw=True)

    def _on_checked(self) -> None:
        """The frequency checks of the case drawn have run: the verdict, the tables, the modes."""
        state = self.state
        model, results, report = state.model, state.results, state.report
        if model is None or results is None or report is None or state.stale:
            return
        result = self.result.value if self.result.value in results.names else results.names[0]
        values = key_values(results, report, result, state.units)
        self.tables.draw_summary(values, report, result, state.units, None, results.warnings)
        self.tables.draw_checks()
        self.stale_marks.clear_updating()
        if self.more_charts.selected_index == 0:
            self._draw_modes(model, report)
        self._update_record_output()

    def _on_error(self, error: InputError) -> None:
        """The message beside the field the error names, in the status line; all else stale."""
        # Dimmed first: a page that sees the message then sees the charts dimmed too.
        self.charts_box.add_class("wb-stale")
        words = self.form.show_error(error)
        self.status.value = render("not_solved", words)
        why = self.stale_marks.mark(error, self.document)
        self.tables.show_stale(why)  # no verdict of the last valid case stands for this one
        self.study.case_changed()

    # --- the panel's own controls -----------------------------------------------------------

    def _on_shaft(self, _change: Any) -> None:
        if self.form.muted:
            return
        self._rebuild()  # the segment editors and the loads' defaults follow the shaft shown
        self.state.show_current_error()
        self._redraw()

    def _on_units(self, change: dict[str, Any]) -> None:
        """Re-express the case in the units picked and show it so, in the widgets there are.

        The fields are shown again in place (:meth:`Form.reshow`): a page that builds no new
        widget models switches in a blink. Only a document whose structure the conversion
        changed (a key the case file left out, written back) has its editors rebuilt.
        """
        if self.form.muted:
            return
        before, fields = self.state.units, structure(self.document)
        if not self.state.change_units(change["new"]):
            with self.form.quiet():
                self.units.value = change["old"]
            self.status.value = render(
                "warning", "Fix the fields marked in red before changing units."
            )
            return
        if structure(self.document) == fields:
            self.form.reshow(before)
            self.whatif.refresh_inputs()
            self.study.refresh_inputs()
            self.drawing_editor.reshow()
        else:
            self._rebuild()
        self.refresh()

    def _on_save(self, _button: Any) -> None:
        try:
            target = self.save()
        except (InputError, OSError) as error:
            self.save_message.value = render("warning", str(error))
            return
        self.save_message.value = render("text", f"saved to {target}")

    def open_modes(self) -> None:
        """Open the Modes section (its charts then follow every edit)."""
        self.more_charts.selected_index = 0

    def open_fatigue(self) -> None:
        """Open the Fatigue section."""
        self.more_charts.selected_index = 1

    def pin_baseline(self) -> None:
        """Keep the current results as the baseline the charts draw under the new ones."""
        if self.state.pin_baseline():
            self._redraw()

    def clear_baseline(self) -> None:
        """Drop the baseline."""
        self.state.baseline = None
        self._redraw()

    def start_sweep(self) -> None:
        """Run the sweep set up in the What-if tab (in chunks, so Cancel can stop it)."""
        self.whatif.start_sweep()

    def cancel_sweep(self) -> None:
        """Stop a running sweep after its current chunk."""
        self.whatif.cancel_sweep()

    # --- drawing ----------------------------------------------------------------------------

    def _draw_modes(self, model: Any, report: CheckReport) -> None:
        shaft = min(self.shaft.value or 0, len(model.shafts) - 1)
        state = self.state
        speeds, margin = model.operating_speeds, report.design.frequency_margin
        self.modes_section.draw(state.modes, state.why_no_modes, shaft, speeds, margin, state.units)

    def key_values(self, results: Results, report: CheckReport, result: str) -> dict[str, float]:
        """Headline values of a result in the panel's units (for the summary and the diff)."""
        return key_values(results, report, result, self.state.units)

    def _follow_pick(self) -> None:
        """The cross-section view follows the part picked; the warnings follow rebuilt fields."""
        model = self.state.model
        if model is not None and self.warping.opened:
            self.warping.draw_section(model, self.drawing_editor.selected)
        self.warping.show_warning()

    def _redraw(self) -> None:
        state = self.state
        model, results, report = state.model, state.results, state.report
        if model is None or results is None or report is None:
            return
        result = self.result.value if self.result.value in results.names else results.names[0]
        shaft = min(self.shaft.value or 0, len(model.shafts) - 1)
        units = state.units
        # Sent in the page's order, top to bottom: the summary (verdict, reactions), the
        # drawing, the charts along the shaft, then the check table below them.
        values = key_values(results, report, result, units)
        reason = self.stale_marks.reason
        self.tables.draw_summary(values, report, result, units, reason, results.warnings)
        self.charts.draw(model, results, report, result, shaft, state.baseline)
        self.warping.draw(model, results, result, shaft, self.drawing_editor.selected)
        with held(self.charts.elevation):
            self.drawing_editor.draw(result)
        self.tables.draw_checks()
        baseline = state.baseline
        before = key_values(*baseline, result, units) if baseline is not None else None
        self.difference.value = difference_html(values, before)
        opened = self.more_charts.selected_index  # a closed section is drawn when it opens
        if opened == 0 and not report.complete and reason is None:
            # The modes and the frequency checks follow once this is sent (CaseState): until
            # then the modes drawn are the last case's, and say so.
            self.stale_marks.updating(MODES_OUTPUTS, MODES_NOTE)
        elif opened == 0:
            self._draw_modes(model, report)
        if opened == 1:
            self.fatigue_section.draw(model, report, shaft, units)
        self.charts.follow_readouts()  # invisible hover points: after all that is seen
