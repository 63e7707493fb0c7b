"""The What-if tab: pin a baseline to compare against, and sweep one input over a range.

Widgets only: a sweep is asked for with a :class:`~workbench.design.sweep.SweepRequest` and
computed on the batch path by :func:`workbench.design.sweep.sweep_chunks`, chunk by chunk so
Cancel can stop it
(in a kernel the chunks run as a task, giving the loop a turn between them).
"""

from __future__ import annotations

import asyncio
from collections.abc import Callable, Iterator
from typing import Any

import ipywidgets as w
import numpy as np

from workbench.case.display import unit_symbol
from workbench.case.entry import read_quantity
from workbench.case.errors import InputError
from workbench.case.units import UnitSystem
from workbench.design.sweep import METRICS, SweepRequest, sweep_chunks
from workbench.panel.document import Path, clone, css_name, get_at, parse_path, plain_words
from workbench.panel.form import Form, entry_text, sized
from workbench.panel.keys import quantity_of
from workbench.panel.markup import render
from workbench.panel.plotting import (
    CURRENT,
    FAIL,
    LIMIT,
    LOAD,
    NUMBER_FORMAT,
    Legend,
    LegendEntry,
    bq,
    name_tooltip,
    number_axis,
    readout,
    set_tooltip,
)
from workbench.panel.shared import shared_layout, shared_style

#: The sweep's metric whose limit is 1 (a utilisation): the chart draws that line.
UTILISATION_METRIC = "governing_utilisation"
#: The numbers of points a sweep takes (smallest, largest).
POINTS = (2, 5000)
#: The support numbers the reaction sweep takes (smallest, largest).
SUPPORT = (0, 99)


class WhatIf:
    """Baseline buttons, the comparison table, and the sweep's inputs, progress and chart.

    Parameters
    ----------
    form
        The panel's fields (the sweep's message line is one of its lines).
    result_shown
        The name of the result the panel shows (the sweep follows it).
    pin, clear
        Pin the current results as the baseline; clear the baseline.
    """

    title = "What-if"

    def __init__(
        self,
        form: Form,
        result_shown: Callable[[], Any],
        pin: Callable[[], None],
        clear: Callable[[], None],
    ) -> None:
        self.form = form
        self._result_shown = result_shown
        self._cancelled = False
        self._metric = ""
        #: The values of the last sweep so far (document units; NaN where a point is invalid).
        self.sweep_values: np.ndarray | None = None
        pin_button = w.Button(description="Pin baseline", icon="thumb-tack")
        pin_button.on_click(lambda _: pin())
        clear_button = w.Button(description="Clear baseline")
        clear_button.on_click(lambda _: clear())
        self.difference = w.HTML()
        self.difference.add_class("wb-difference")
        self.sweep_input = w.Dropdown(description="vary", layout=sized("420px"))
        self.sweep_input.observe(lambda _: self._sweep_defaults(), "value")
        # Read with the input's unit when Run is clicked (Form.read: 60, 60 mm, 2 1/4 in).
        self.sweep_from = w.Text(description="from", layout=sized("160px"))
        self.sweep_to = w.Text(description="to", layout=sized("160px"))
        # Whole numbers typed as text (a browser number input read `7o` as 7), refused beside.
        self.sweep_points, points_row = count_entry(
            form, "whatif.sweep.points", "points", 50, *POINTS
        )
        self.sweep_metric = w.Dropdown(
            options=[(label, key) for key, (label, _) in METRICS.items()],
            description="follow",
            layout=sized("360px"),
        )
        self.sweep_support, support_row = count_entry(
            form, "whatif.sweep.support", "support", 0, *SUPPORT, width="140px"
        )
        self.sweep_run = w.Button(description="Run sweep", icon="play", button_style="info")
        self.sweep_run.on_click(lambda _: self.start_sweep())
        self.sweep_cancel = w.Button(description="Cancel", icon="stop", disabled=True)
        self.sweep_cancel.on_click(lambda _: self.cancel_sweep())
        self.sweep_progress = w.IntProgress(value=0, min=0, max=1, description="progress")
        self.sweep_message = form.message("whatif.sweep")
        self.sweep_x, self.sweep_y = bq.LinearScale(), bq.LinearScale()
        scales = {"x": self.sweep_x, "y": self.sweep_y}
        self.sweep_line = bq.Lines(x=[], y=[], scales=scales, colors=[CURRENT], stroke_width=2)
        name_tooltip(self.sweep_line, "curve")
        #: The part of a utilisation sweep above 1 (designs that fail), dotted in its colour.
        self.sweep_over = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[FAIL],
            stroke_width=3,
            line_style="dotted",
            visible=False,
            labels=["fails: utilisation above 1"],
        )
        name_tooltip(self.sweep_over, "curve")
        self.sweep_limit = bq.Lines(
            x=[],
            y=[],
            scales=scales,
            colors=[LIMIT],
            line_style="dash_dotted",
            stroke_width=1.5,
            visible=False,
            labels=["utilisation = 1"],
        )
        name_tooltip(self.sweep_limit, "limit")
        self.sweep_readout = readout(scales, CURRENT)
        self.sweep_now = bq.Scatter(
            x=[],
            y=[],
            scales=scales,
            colors=[LOAD],
            default_size=80,
            tooltip=bq.Tooltip(
                fields=["x", "y"], labels=["now", "value"], formats=[NUMBER_FORMAT, NUMBER_FORMAT]
            ),
        )
        self.sweep_legend = Legend("sweep")
        self.sweep_figure = bq.Figure(
            marks=[
                self.sweep_limit,
                self.sweep_line,
                self.sweep_over,
                self.sweep_readout,
                self.sweep_now,
            ],
            axes=[
                number_axis(self.sweep_x, "input"),
                number_axis(self.sweep_y, "result", side="left", label_offset="45px"),
            ],
            title="Sweep",
            animation_duration=0,
            layout=w.Layout(width="620px", height="260px"),
            fig_margin={"top": 30, "bottom": 40, "left": 70, "right": 15},
        )
        self.sweep_figure.add_class("wb-chart-sweep")
        self.box = w.VBox(
            [
                w.HBox([pin_button, clear_button]),
                self.difference,
                w.HTML(render("heading", "Sweep", " one input over a range")),
                self.sweep_input,
                w.HBox([self.sweep_from, self.sweep_to, points_row]),
                w.HBox([self.sweep_metric, support_row]),
                w.HBox(
                    [self.sweep_run, self.sweep_cancel, self.sweep_progress, self.sweep_message]
                ),
                self.sweep_figure,
                self.sweep_legend.widget,
            ]
        )

    @property
    def _document(self) -> dict[str, Any]:
        return self.form.document

    def refresh_inputs(self) -> None:
        """Offer the document's numeric inputs (keeping the one picked while it exists)."""
        options = [(label, path) for path, label in numeric_inputs(self._document)]
        current = self.sweep_input.value
        self.sweep_input.options = options
        paths = [path for _, path in options]
        self.sweep_input.value = current if current in paths else (paths[0] if paths else None)
        self._sweep_defaults()

    def _sweep_defaults(self) -> None:
        path = self.sweep_input.value
        if path is None:
            return
        value = float(get_at(self._document, path) or 0.0)
        self.sweep_from.value = entry_text(0.5 * value) if value else "-1"
        self.sweep_to.value = entry_text(1.5 * value) if value else "1"

    def start_sweep(self) -> None:
        """Run the sweep set up in the tab (in chunks, so Cancel can stop it)."""
        path = self.sweep_input.value
        self.sweep_message.value = ""
        try:
            if path is None:
                raise InputError("sweep", "there is no numeric input to vary")
            if self.form.state.stale:
                msg = "the case as edited is not solved; fix the field marked in red first"
                raise InputError("sweep", msg)
            quantity = quantity_of(path)
            start = self.form.read(self.sweep_from.value, quantity, "sweep from")
            end = self.form.read(self.sweep_to.value, quantity, "sweep to")
            units = self.form.state.units
            points = read_count(self.sweep_points.value, *POINTS, "sweep points", units)
            support = read_count(self.sweep_support.value, *SUPPORT, "sweep support", units)
            values = tuple(np.linspace(start, end, points))
            request = SweepRequest(
                path, values, self.sweep_metric.value, self._result_shown(), support
            )
            chunks = sweep_chunks(clone(self._document), request)
        except InputError as error:
            self.sweep_message.value = render("text", str(error))
            return
        self._cancelled = False
        self.sweep_progress.max, self.sweep_progress.value = len(values), 0
        self.sweep_run.disabled, self.sweep_cancel.disabled = True, False
        label, quantity = METRICS[request.metric]
        unit = f" [{self.form.unit(quantity)}]" if quantity else ""
        input_label = dict((p, lbl) for lbl, p in self.sweep_input.options).get(path, "input")
        self.sweep_figure.axes[0].label = input_label
        self.sweep_figure.axes[1].label = label + unit
        self.sweep_line.labels = [label + unit]
        set_tooltip(self.sweep_readout, [input_label, label + unit])
        self._metric = request.metric
        try:
            loop = asyncio.get_running_loop()
        except RuntimeError:
            loop = None
        if loop is None:
            for done, result in chunks:
                self._sweep_step(values, done, result)
                if self._cancelled:
                    break
            self._sweep_done()
        else:
            loop.create_task(self._sweep_async(chunks, values))

    async def _sweep_async(
        self, chunks: Iterator[tuple[int, np.ndarray]], values: tuple[float, ...]
    ) -> None:
        try:
            for done, result in chunks:
                self._sweep_step(values, done, result)
                await asyncio.sleep(0)  # lets the kernel take a Cancel click
                if self._cancelled:
                    break
        except InputError as error:
            self.sweep_message.value = render("text", str(error))
        finally:
            self._sweep_done()

    def _sweep_step(self, values: tuple[float, ...], done: int, result: np.ndarray) -> None:
        self.sweep_values = result[:done]
        x, y = np.array(values[:done]), result[:done]
        with self.sweep_figure.hold_sync():
            self.sweep_line.x, self.sweep_line.y = x, y
            valid = np.isfinite(y)  # a point that is not a valid case has nothing to read
            self.sweep_readout.x, self.sweep_readout.y = x[valid], y[valid]
            current = get_at(self._document, self.sweep_input.value)
            now = isinstance(current, (int, float)) and done
            if now:
                self.sweep_now.x = np.array([float(current)])
                self.sweep_now.y = np.array([np.interp(current, values[:done], result[:done])])
            utilisation = self._metric == UTILISATION_METRIC and done > 0
            self.sweep_limit.visible = utilisation
            if utilisation:
                self.sweep_limit.x = np.array([x.min(), x.max()])
                self.sweep_limit.y = np.ones(2)
            over = utilisation and bool(np.any(y > 1.0))
            self.sweep_over.visible = over
            if over:
                self.sweep_over.x = x
                self.sweep_over.y = np.where(y > 1.0, y, np.nan)
        self.sweep_legend.show(self._sweep_entries(bool(now)))
        self.sweep_progress.value = done

    def _sweep_entries(self, now: bool) -> list[LegendEntry]:
        """The legend of what the sweep chart draws."""
        entries = [LegendEntry(self.sweep_line.labels[0], CURRENT, "solid")]
        if self.sweep_over.visible:
            entries.append(LegendEntry(self.sweep_over.labels[0], FAIL, "dotted"))
        if self.sweep_limit.visible:
            entries.append(LegendEntry("utilisation = 1 (the limit)", LIMIT, "dash_dotted"))
        if now:
            entries.append(LegendEntry("the case as it is now", LOAD, "", "circle"))
        return entries

    def _sweep_done(self) -> None:
        self.sweep_run.disabled, self.sweep_cancel.disabled = False, True
        if self._cancelled:
            self.sweep_message.value = f"cancelled after {self.sweep_progress.value} points"
        elif self.sweep_values is not None and np.isnan(self.sweep_values).any():
            bad = int(np.isnan(self.sweep_values).sum())
            self.sweep_message.value = f"{bad} points are not valid cases and are left out"

    def cancel_sweep(self) -> None:
        """Stop the sweep running after the chunk it is on."""
        self._cancelled = True


def numeric_inputs(document: dict[str, Any]) -> Iterator[tuple[Path, str]]:
    """Every numeric input of a case document a sweep may vary, as (path, readable label)."""
    units = document.get("units")
    system = UnitSystem(**units) if units else UnitSystem()

    def label(path: Path) -> str:
        quantity = quantity_of(path)
        symbol = unit_symbol(system.label(quantity)) if quantity else ""  # the document's unit
        unit = f" [{symbol}]" if symbol else ""
        return str(path[-1]).replace("_", " ") + unit

    for s, shaft in enumerate(document.get("shafts", [])):
        for k, segment in enumerate(shaft.get("segments", [])):
            where = f"{shaft.get('id')} segment {k}"
            base: Path = ("shafts", s, "segments", k)
            for key in ("length", "fillet_radius"):
                if isinstance(segment.get(key), (int, float)):
                    yield (*base, key), f"{where} · {label((*base, key))}"
            section = segment.get("section")
            if isinstance(section, dict):
                for key, value in section.items():
                    if isinstance(value, (int, float)) and not isinstance(value, bool):
                        path = (*base, "section", key)
                        yield path, f"{where} · {label(path)}"
    for n, support in enumerate(document.get("supports", [])):
        for key in ("x", "stiffness", "rotation"):
            if isinstance(support.get(key), (int, float)):
                yield ("supports", n, key), f"support {n} · {label(('supports', n, key))}"
    for n, gear in enumerate(document.get("gears", [])):
        for end in ("a", "b"):
            for key in ("x", "radius"):
                if isinstance(gear.get(end, {}).get(key), (int, float)):
                    path = ("gears", n, end, key)
                    yield path, f"gear {n}{end} · {label(path)}"
    for c, case in enumerate(document.get("load_cases", [])):
        for n, torque in enumerate(case.get("torques", [])):
            for key in ("torque", "x"):
                if isinstance(torque.get(key), (int, float)):
                    path = ("load_cases", c, "torques", n, key)
                    yield path, f"{case.get('name')} torque {n} · {label(path)}"
        for n, load in enumerate(case.get("distributed", [])):
            for key in ("intensity_start", "intensity_end", "start", "end"):
                if isinstance(load.get(key), (int, float)):
                    path = ("load_cases", c, "distributed", n, key)
                    yield path, f"{case.get('name')} distributed {n} · {label(path)}"
    for n, disc in enumerate(document.get("discs") or []):
        for key in ("inertia", "x"):
            if isinstance(disc.get(key), (int, float)):
                yield ("discs", n, key), f"disc {n} · {label(('discs', n, key))}"
    for name, material in (document.get("materials") or {}).items():
        if isinstance(material, dict) and isinstance(material.get("density"), (int, float)):
            path = ("materials", name, "density")
            yield path, f"{name} · {label(path)}"
    design = document.get("design") or {}
    for key in ("factor_of_safety", "allowable_shear_stress", "max_twist_rate"):
        if isinstance(design.get(key), (int, float)):
            yield ("design", key), f"design · {label(('design', key))}"


def count_entry(
    form: Form, key: str, description: str, value: int, low: int, high: int, width: str = "160px"
) -> tuple[w.Text, w.HBox]:
    """A text entry for a whole number that is no case field (a sweep's number of points).

    What is typed is read at once (:func:`read_count`); a refusal shows on the message line
    beside the entry, the text kept as typed. Nothing is written to the case.

    Parameters
    ----------
    form
        The panel's fields (the entry's message line is one of its lines).
    key
        The entry's name (``whatif.sweep.points``); its message line has the same key.
    description
        The words before the entry.
    value
        The number shown first.
    low, high
        The smallest and largest number taken (inclusive).
    width
        CSS width of the entry.

    Returns
    -------
    tuple
        The entry, and the row of the entry with its message line.
    """
    field = w.Text(
        value=str(value),
        description=description,
        continuous_update=False,
        layout=sized(width),
        style=shared_style(w.Text, description_width="initial"),
    )
    field.add_class(f"wb-at-{css_name(parse_path(key))}")
    message = form.message(key)

    def typed(change: dict[str, Any]) -> None:
        try:
            read_count(change["new"], low, high, key, form.state.units)
        except InputError as error:
            message.value = render("text", plain_words(error.message))
            field.add_class("wb-bad")
            return
        message.value = ""
        field.remove_class("wb-bad")

    field.observe(typed, "value")
    return field, w.HBox([field, message], layout=shared_layout(align_items="center"))


def read_count(text: str, low: int, high: int, field: str, units: UnitSystem) -> int:
    """A typed whole number from ``low`` to ``high`` (``50``, ``1,000``; no unit).

    ``units``: the panel's unit system (the reader's; a count has no unit).

    Raises
    ------
    InputError
        Naming ``field``, for anything else (``7o``, ``2.5``, ``0`` below ``low``).
    """
    number = read_quantity(text, "ratio", units, field)
    if not number.is_integer():
        raise InputError(field, f"{text.strip()!r} is not a whole number")
    if not low <= number <= high:
        raise InputError(field, f"give a whole number from {low:,} to {high:,}, not {number:,.0f}")
    return int(number)
