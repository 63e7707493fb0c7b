"""What every chart of the panel shares: bqplot loaded once, our colours, held syncs, tooltips.

Visual language of our own: the shaft in slate blue, loads in amber, supports in charcoal, the
baseline dashed in grey, limits in brick red.
"""

from __future__ import annotations

import warnings
from collections.abc import Iterator
from contextlib import ExitStack, contextmanager
from typing import Any

from ipywidgets import Layout

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


def set_tooltip(
    mark: Any, labels: list[str], fields: tuple[str, ...] = ("x", "y"), fmt: str = ".4g"
) -> None:
    """Give ``mark`` a tooltip with these labels, keeping the one it has when they match.

    A tooltip is a widget of its own: making a new one on every redraw costs about a millisecond
    and a front-end widget each time, so it is only replaced when its text changes.
    """
    tooltip = mark.tooltip
    if tooltip is not None and list(tooltip.labels) == labels and tuple(tooltip.fields) == fields:
        return
    mark.tooltip = bq.Tooltip(fields=list(fields), labels=labels, formats=[fmt] * len(fields))


def xy_figure(
    marks: list[Any],
    x_scale: Any,
    y_scale: Any,
    x_label: str,
    y_label: str,
    title: str,
    height: int = 220,
) -> bq.Figure:
    """An x–y figure of the panel's look: axes labelled, grid dashed, no animation."""
    axes = [
        bq.Axis(scale=x_scale, label=x_label, grid_lines="none"),
        bq.Axis(
            scale=y_scale, label=y_label, side="left", grid_lines="dashed", label_offset="45px"
        ),
    ]
    return bq.Figure(
        marks=marks,
        axes=axes,
        title=title,
        animation_duration=0,
        fig_margin={"top": 30, "bottom": 40, "left": 65, "right": 15},
        layout=Layout(width="100%", min_width="340px", height=f"{height}px"),
        title_style={"font-size": "13px"},
    )
