"""What every chart of the panel shares: bqplot loaded once, our colours, held syncs, tooltips.

Visual language of our own: the shaft in slate blue, loads in amber, supports in charcoal, the
baseline dashed in grey, limits in brick red; what fails in magenta *and* with a cross, so it
reads without colour. Every figure has a legend of our own beneath it (:class:`Legend`): bqplot
draws its legend inside the plot, over the curves.

Tooltips: bqplot 0.13 gives a line's tooltip the whole curve (its ``name``, ``index``, ``color``),
not the point under the pointer, so a line's ``x``/``y`` fields read ``NaN``. Lines here carry
name tooltips (:func:`name_tooltip`); values are read from points (:func:`readout`).
"""

from __future__ import annotations

import warnings
from collections.abc import Iterator
from contextlib import ExitStack, contextmanager
from dataclasses import dataclass
from typing import Any

import ipywidgets as w
import numpy as np
from ipywidgets import Layout

from workbench.panel.markup import render

with warnings.catch_warnings():
    # bqscales 0.3 sets trait metadata the old way at import; nothing for us to act on.
    warnings.filterwarnings("ignore", category=DeprecationWarning, module="traitlets")
    warnings.filterwarnings("ignore", message="metadata .* was set from the constructor")
    import bqplot as bq

SHAFT = "#3d5a80"
SHAFT_FILL = "#98c1d9"
LOAD = "#e09f3e"
SUPPORT = "#33312e"
BASELINE = "#9a9a9a"
LIMIT = "#9e2a2b"
CURRENT = "#3d5a80"
FAIL = "#a4036f"
#: The part picked on the drawing (its outline or station, thick) and the handles one drags.
SELECTED = "#2f9e44"
HANDLE = "#5c677d"
#: The mark of what fails its check, beside its colour.
FAIL_MARKER = "cross"
#: Colour and shape of each detail's peak stress, in the order of the checks' concentration
#: kinds (shoulder, keyseat, notch, cross hole).
DETAIL_STYLES: tuple[tuple[str, str, str], ...] = (
    ("shoulder", "#6b4e71", "diamond"),
    ("keyseat", "#2a9d8f", "square"),
    ("notch", "#8a6f3e", "triangle-up"),
    ("cross hole", "#5d7f2b", "triangle-down"),
)


@dataclass(frozen=True)
class LegendEntry:
    """One line of a legend: how the thing is drawn, and what it is.

    Attributes
    ----------
    label
        What it is.
    colour
        Its colour.
    line
        Its line style (bqplot's names: ``solid``, ``dashed``, ``dotted``, ``dash_dotted``), or
        ``""`` for a mark without a line.
    marker
        Its mark (bqplot's names: ``circle``, ``cross``, ``square``…), or ``""`` for a line alone.
    """

    label: str
    colour: str
    line: str = ""
    marker: str = ""


class Legend:
    """A figure's legend, beneath it (never over the curves): the entries of what is drawn."""

    def __init__(self, key: str) -> None:
        self.widget = w.HTML()
        self.widget.add_class("wb-legend")
        self.widget.add_class(f"wb-legend-{key}")
        self.entries: tuple[LegendEntry, ...] = ()

    def show(self, entries: list[LegendEntry]) -> None:
        """Show these entries (the HTML is only re-rendered when they change)."""
        chosen = tuple(entries)
        if chosen != self.entries:
            self.entries = chosen
            self.widget.value = render("legend", chosen)


def set_list(mark: Any, trait: str, values: list[Any]) -> None:
    """Set a list trait (colours, names, labels) only when it changes.

    Validating a list of 20 colours costs about 0.1 ms even when it is the same list.
    """
    current = getattr(mark, trait)
    if current is None or list(current) != values:
        setattr(mark, trait, values)


def set_array(mark: Any, trait: str, values: Any) -> None:
    """Set an array trait (a mark's x or y) only when its values change, NaN equal to NaN.

    The trait's own comparison takes NaN ≠ NaN, so an array with gaps (a detail's peak stress
    where it has none) was sent to the page again on every redraw, unchanged.
    """
    values = np.asarray(values, dtype=float)
    current = getattr(mark, trait)
    # A mark keeps one line's y as 1-D: compare without the axes of length one.
    same = current is not None and np.array_equal(
        np.squeeze(np.asarray(current, dtype=float)), np.squeeze(values), equal_nan=True
    )
    if not same:
        setattr(mark, trait, values)


#: Intervals an axis is cut into when its limits are rounded (:func:`nice_limits`).
_AXIS_INTERVALS = 8
#: A scale keeps its limits while they hold the data and are at most this many times the
#: rounded extent of the data (:func:`nice_limits`).
_KEEP_WITHIN = 1.5


def nice_step(span: float) -> float:
    """The step of 1, 2, 2.5 or 5 times a power of ten nearest above ``span``.

    Parameters
    ----------
    span
        A positive length on the axis (its units).

    References
    ----------
    Common practice for axis ticks (the 1-2-5 series), no source.
    """
    power = 10.0 ** np.floor(np.log10(span))
    for factor in (1.0, 2.0, 2.5, 5.0, 10.0):
        if factor * power >= span * (1.0 - 1e-12):
            return float(factor * power)
    return float(10.0 * power)  # pragma: no cover - the loop ends at 10 × power ≥ span


def nice_limits(
    low: float, high: float, current: tuple[float | None, float | None] = (None, None)
) -> tuple[float, float]:
    """Axis limits that hold ``low``..``high``, rounded out to a step of the 1-2-5 series.

    The limits are kept as they are (``current``) while they hold the data and are no more than
    :data:`_KEEP_WITHIN` times its rounded extent: an axis that moves on every edit makes the
    page redraw every mark and axis on it, and during a drag the eye loses the curve's scale.

    Parameters
    ----------
    low, high
        The data's extent (axis units), ``low ≤ high``.
    current
        The limits the scale has now (``None`` when unset).

    Returns
    -------
    tuple of float
        (lower, upper) limits, lower < upper.

    References
    ----------
    Common practice for axis limits (rounded out to a tick step), no source.
    """
    if low == high:  # a flat extent: a unit each way (as the page would centre one value)
        low, high = low - 1.0, high + 1.0
    if not np.isfinite(high - low):
        return low, high  # beyond the range of numbers: the data's own extent
    step = nice_step((high - low) / _AXIS_INTERVALS)
    # Rounded to 12 figures: 3 × 0.1 is written 0.3 on the axis, not 0.30000000000000004.
    nice_low = float(f"{np.floor(low / step) * step:.12g}")
    nice_high = float(f"{np.ceil(high / step) * step:.12g}")
    if not (np.isfinite(nice_low) and np.isfinite(nice_high) and nice_low < nice_high):
        nice_low, nice_high = low, high  # too fine a step for the numbers: the data's extent
    kept_low, kept_high = current
    if (
        kept_low is not None
        and kept_high is not None
        and kept_low <= low
        and high <= kept_high
        and kept_high - kept_low <= _KEEP_WITHIN * (nice_high - nice_low)
    ):
        return float(kept_low), float(kept_high)
    return float(nice_low), float(nice_high)


def fit_scale(scale: Any, marks: list[Any], axis: str = "y", include: float | None = None) -> None:
    """Fix ``scale`` at rounded limits that hold the visible marks' ``axis`` data (NaN left out).

    ``include``: a value the extent always holds (the 0 that bars stand on).

    A scale left to follow its marks' data changes its domain as each mark's update reaches the
    page, and every change redraws every mark and axis on it; fixed from here it changes once,
    and only when the data leaves its limits or shrinks well inside them (:func:`nice_limits`).
    """
    arrays = [
        np.asarray(getattr(mark, axis), dtype=float).ravel() for mark in marks if mark.visible
    ]
    data = np.concatenate(arrays) if arrays else np.empty(0)
    data = data[np.isfinite(data)]
    if include is not None:
        data = np.append(data, include)
    if not len(data):
        return
    low, high = nice_limits(float(data.min()), float(data.max()), (scale.min, scale.max))
    if (scale.min, scale.max) != (low, high):
        with scale.hold_sync():
            scale.min, scale.max = low, high


def name_tooltip(mark: Any, label: str) -> None:
    """Give a line a tooltip naming the curve under the pointer (its ``labels`` entry)."""
    tooltip = mark.tooltip
    if tooltip is not None and list(tooltip.labels) == [label] and list(tooltip.fields) == ["name"]:
        return
    _replace_tooltip(mark, bq.Tooltip(fields=["name"], labels=[label], formats=[""]))


def _replace_tooltip(mark: Any, tooltip: Any) -> None:
    """Give a mark a new tooltip and close the one it had (a widget of its own, with a layout)."""
    old = mark.tooltip
    mark.tooltip = tooltip
    if old is not None:
        old.layout.close()
        old.close()


#: For points whose names are words about their values (read in their tooltips): the page
#: tells the points apart by their order, not by name. Matched by name, a point whose words
#: changed with an edit (``utilisation 1.381`` → ``1.379``) is removed and drawn anew.
BY_ORDER = {"names_unique": False}


def failing_mark(scales: dict[str, Any], tooltip: Any) -> Any:
    """Crosses in the failing colour on what fails its check (hidden until something does)."""
    return bq.Scatter(
        x=[],
        y=[],
        scales=scales,
        marker=FAIL_MARKER,
        colors=[FAIL],
        default_size=150,
        stroke="white",
        visible=False,
        tooltip=tooltip,
        **BY_ORDER,
    )


def readout(scales: dict[str, Any], colour: str) -> Any:
    """Points along a curve that read its values under the pointer (drawn transparent)."""
    return bq.Scatter(
        x=[],
        y=[],
        scales=scales,
        marker="circle",
        colors=[colour],
        opacities=[0.0],
        default_size=40,
        stroke=None,
    )


@contextmanager
def held(figure: bq.Figure) -> Iterator[None]:
    """Hold the sync of a figure, its marks, their scales and its axes for one block.

    A mark whose x and y were sent one at a time would be drawn in between with the new x and
    the old y; held, each widget sends one message with all its changes when the block ends.
    """
    widgets: dict[int, Any] = {id(figure): figure}
    for item in [*figure.marks, *figure.axes]:
        widgets[id(item)] = item
        scales = item.scales.values() if hasattr(item, "scales") else [item.scale]
        for scale in scales:
            widgets[id(scale)] = scale
    with ExitStack() as stack:
        for widget in widgets.values():
            stack.enter_context(widget.hold_sync())
        yield


#: How charts write numbers (d3-format, as bqplot's front end uses it): four significant figures,
#: thousands grouped, trailing zeros trimmed, never an exponent or an SI prefix (``19,620``,
#: ``0.0125``; a log axis's ``1,000`` not ``1e+3``).
NUMBER_FORMAT = ",.4~r"


def number_axis(scale: Any, label: str, **options: Any) -> Any:
    """A chart axis whose ticks are written in :data:`NUMBER_FORMAT`."""
    return bq.Axis(scale=scale, label=label, tick_format=NUMBER_FORMAT, **options)


def set_tooltip(
    mark: Any, labels: list[str], fields: tuple[str, ...] = ("x", "y"), fmt: str = NUMBER_FORMAT
) -> None:
    """Give ``mark`` a tooltip with these labels, keeping the one it has when they match.

    A tooltip is a widget of its own: making a new one on every redraw costs about a millisecond
    and a front-end widget each time (a unit switch made one per mark), so only new labels are
    written into the one it has (the page redraws its table on a change of labels); it is
    replaced when its fields or formats change.
    """
    tooltip = mark.tooltip
    formats = [fmt] * len(fields)
    if tooltip is not None and tuple(tooltip.fields) == fields and list(tooltip.formats) == formats:
        if list(tooltip.labels) != labels:
            tooltip.labels = labels
        return
    _replace_tooltip(mark, bq.Tooltip(fields=list(fields), labels=labels, formats=formats))


#: Width (px) and side margins of the drawing and of every chart drawn along the shaft beneath
#: it: with one x scale, the same plot width and the same margins, a station lines up top to
#: bottom.
ALONG_WIDTH = 760
ALONG_MARGIN = {"left": 60, "right": 20}


def xy_figure(
    marks: list[Any],
    x_scale: Any,
    y_scale: Any,
    x_label: str,
    y_label: str,
    title: str,
    height: int = 220,
    *,
    along: bool = False,
) -> bq.Figure:
    """An x–y figure of the panel's look: axes labelled, grid dashed, no animation.

    ``along``: a chart along the shaft beneath the drawing (its width and side margins).
    """
    axes = [
        number_axis(x_scale, x_label, grid_lines="none"),
        number_axis(y_scale, y_label, side="left", grid_lines="dashed", label_offset="45px"),
    ]
    sides = ALONG_MARGIN if along else {"left": 65, "right": 15}
    size = (
        Layout(width=f"{ALONG_WIDTH}px", height=f"{height}px")
        if along
        else Layout(width="100%", min_width="340px", height=f"{height}px")
    )
    return bq.Figure(
        marks=marks,
        axes=axes,
        title=title,
        animation_duration=0,
        fig_margin={"top": 30, "bottom": 40, **sides},
        layout=size,
        title_style={"font-size": "13px"},
    )
