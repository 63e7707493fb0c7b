"""Static pictures for the calculation record: coordinates computed here, SVG from templates.

Each function computes the numbers of one drawing (screen coordinates, point lists, the texts
of its labels) and renders its template under ``templates/workbench_record/svg/``, which writes
the elements and escapes every text. No plotting library is needed, and the same input gives
the same bytes, so a record can be rebuilt and compared. The elevation is laid out in
:mod:`workbench.record.elevation`; the fixed equations of the method are pre-rendered files
(:mod:`workbench.record.equations`).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from workbench.design.fatigue.criteria import failure_lines
from workbench.record.drawing import FONT_FAMILY, data_uri, nice, points
from workbench.record.elevation import elevation_svg
from workbench.record.templating import render

__all__ = [
    "data_uri",
    "elevation_svg",
    "fatigue_diagram_svg",
    "line_diagram_svg",
    "mode_shape_svg",
]


def _stacked(
    width: int, top: float, count: int, panel_height: int, gap: int, font_size: float
) -> dict[str, Any]:
    """The frame of a drawing of stacked panels: size, fonts, where the panels and x axis go (px).

    Room is left for the values on the left (74 px) and a margin on the right (14 px).
    """
    left, right = 74, 14
    plot_width = width - left - right
    return {
        "left": left,
        "right_edge": left + plot_width,
        "plot_width": plot_width,
        "panel_height": panel_height,
        "bottom": top + count * (panel_height + gap) - gap + font_size + 3,
        "centre_x": left + plot_width / 2,
        "font_family": FONT_FAMILY,
        "font_size": font_size,
        "width": width,
    }


def line_diagram_svg(
    x: Sequence[float],
    panels: Sequence[tuple[str, Sequence[float]]],
    x_label: str,
    width: int = 720,
    panel_height: int = 80,
    font_size: float = 11.0,
) -> str:
    """Stacked line diagrams of quantities along a shaft.

    Parameters
    ----------
    x
        Stations (in the reader's length unit). A repeated station draws a vertical jump.
    panels
        ``(label with unit, values)`` for each panel, values at the stations.
    x_label
        Label of the x axis.
    width, panel_height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document with a polyline per panel, a zero line, and the extreme values.
    """
    top, gap = 8, 26
    frame = _stacked(width, top, len(panels), panel_height, gap, font_size)
    left, plot_width = frame["left"], frame["plot_width"]
    xs = np.asarray(x, dtype=float)
    x_min, x_max = float(xs.min()), float(xs.max())
    span = x_max - x_min or 1.0
    screen_x = left + (xs - x_min) / span * plot_width
    drawn = []
    for number, (label, raw_values) in enumerate(panels):
        values = np.asarray(raw_values, dtype=float)
        y0 = top + number * (panel_height + gap)
        low, high = min(float(values.min()), 0.0), max(float(values.max()), 0.0)
        extent = high - low or 1.0
        screen_y = y0 + (high - values) / extent * panel_height
        peak = int(np.argmax(np.abs(values)))
        drawn.append(
            {
                "top": y0,
                "zero": y0 + high / extent * panel_height,
                "points": points(screen_x.tolist(), screen_y.tolist(), decimals=2),
                "high": nice(high),
                "high_y": y0 + font_size - 1,
                "low": nice(low),
                "low_y": y0 + panel_height,
                "label": label,
                "label_y": y0 + font_size + 1,
                "peak": (
                    left + (xs[peak] - x_min) / span * plot_width,
                    y0 + (high - values[peak]) / extent * panel_height,
                ),
            }
        )
    return render(
        "svg/line_diagram.svg.j2",
        **frame,
        height=top + len(panels) * (panel_height + gap) + 16,
        panels=drawn,
        x_min=nice(x_min),
        x_max=nice(x_max),
        x_label=x_label,
    )


def mode_shape_svg(
    title: str,
    shafts: Sequence[tuple[str, Sequence[float], Sequence[float]]],
    discs: Sequence[tuple[str, float]],
    x_label: str,
    width: int = 720,
    panel_height: int = 70,
    font_size: float = 11.0,
) -> str:
    """One mode shape: the normalised angle along each shaft, one panel per shaft.

    Parameters
    ----------
    title
        What the drawing shows (mode number and frequency).
    shafts
        ``(shaft id, x at the nodes (reader's length unit), normalised angle)`` per shaft.
    discs
        ``(shaft id, x)`` of each disc (reader's length unit), marked on its shaft's line.
    x_label
        Label of the x axis (with its unit).
    width, panel_height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document; every panel shares one x scale (the longest shaft) and the angle axis
        −1 … 1, so the shafts' amplitudes compare directly (a gear's ratio shows as a step in
        amplitude from one shaft to the next).
    """
    top, gap = font_size + 10, 22
    frame = _stacked(width, top, len(shafts), panel_height, gap, font_size)
    left, plot_width = frame["left"], frame["plot_width"]
    longest = max((float(max(x)) for _, x, _ in shafts if len(x)), default=1.0) or 1.0
    drawn = []
    for number, (shaft_id, xs, angles) in enumerate(shafts):
        y0 = top + number * (panel_height + gap)
        stations, shape = np.asarray(xs, dtype=float), np.asarray(angles, dtype=float)
        marks = []
        for disc_shaft, disc_x in discs:
            if disc_shaft == shaft_id:
                angle = float(np.interp(disc_x, stations, shape))
                marks.append(
                    (
                        left + disc_x / longest * plot_width - 3,
                        y0 + (1.0 - angle) / 2.0 * panel_height - 6,
                    )
                )
        drawn.append(
            {
                "id": shaft_id,
                "top": y0,
                "middle": y0 + panel_height / 2.0,
                "points": points(
                    (left + stations / longest * plot_width).tolist(),
                    (y0 + (1.0 - shape) / 2.0 * panel_height).tolist(),
                    decimals=2,
                ),
                "high_y": y0 + font_size - 1,
                "low_y": y0 + panel_height,
                "label_y": y0 + font_size + 1,
                "discs": marks,
            }
        )
    return render(
        "svg/mode_shape.svg.j2",
        **frame,
        height=int(top + len(shafts) * (panel_height + gap) + font_size + 6),
        title=title,
        title_y=font_size + 2,
        shafts=drawn,
        longest=nice(longest),
        x_label=x_label,
    )


def fatigue_diagram_svg(
    title: str,
    endurance: float,
    ultimate: float,
    shear_yield: float,
    point: tuple[float, float],
    unit: str,
    width: int = 720,
    height: int = 300,
    font_size: float = 11.0,
) -> str:
    """Alternating against mean shear stress: the failure lines and the operating point.

    Parameters
    ----------
    title
        What the drawing shows (shaft and segment).
    endurance, ultimate, shear_yield
        Sse, Ssu and Ssy in the reader's stress unit.
    point
        (τm, τa) of the governing cycle in the reader's stress unit.
    unit
        The stress unit's label.
    width, height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document with the modified Goodman line τa = Sse·(1 − τm/Ssu), the Gerber
        parabola τa = Sse·(1 − (τm/Ssu)²), the ASME-elliptic quadrant (τa/Sse)² + (τm/Ssy)² = 1,
        the Soderberg line τa = Sse·(1 − τm/Ssy) and the Langer line τa + τm = Ssy, the load line
        from the origin through the operating point, and the point itself.

    References
    ----------
    .. [1] Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed., §6-12, fig.
       6-27 (fatigue diagram of the criteria) and §6-14 (torsion).
    """
    left, right, top, bottom_margin = 74, 190, font_size + 12, 40
    mean, alternating = point
    x_max = max(ultimate, mean) * 1.08
    y_max = max(shear_yield, endurance, alternating) * 1.08
    plot_width, plot_height = width - left - right, height - top - bottom_margin
    bottom = top + plot_height

    def to_x(value: Any) -> Any:  # a number or an array of them
        return left + value / x_max * plot_width

    def to_y(value: Any) -> Any:
        return bottom - value / y_max * plot_height

    # In the order of the template's legend: Goodman, Gerber, ASME-elliptic, Soderberg, Langer.
    curves = tuple(failure_lines(endurance, ultimate, shear_yield, points=41).values())
    # The load line: the cycle grows in proportion from the origin (radial load line).
    reaches = [limit / value for limit, value in ((x_max, mean), (y_max, alternating)) if value]
    load_line = None
    if reaches:
        reach = min(reaches)
        load_line = (to_x(0.0), to_y(0.0), to_x(mean * reach), to_y(alternating * reach))
    # Texts sit 0.35 em below the point they name, so that they look centred on it.
    drop = font_size * 0.35
    point_x, point_y = to_x(mean), to_y(alternating)
    legend_x = left + plot_width + 14
    return render(
        "svg/fatigue_diagram.svg.j2",
        width=width,
        height=height,
        font_family=FONT_FAMILY,
        font_size=font_size,
        title=title,
        title_y=font_size + 2,
        left=left,
        right_edge=left + plot_width,
        top=top,
        bottom=bottom,
        curves=[points(to_x(xs).tolist(), to_y(ys).tolist(), decimals=2) for xs, ys in curves],
        legend=[  # (line start, line end, text x, y, text y) of each criterion's entry
            (legend_x, legend_x + 24, legend_x + 30, y, y + drop)
            for y in (top + 6 + number * (font_size + 7) for number in range(5))
        ],
        load_line=load_line,
        point=(point_x, point_y),
        point_label=(point_x + 6, point_y - 6, f"(τm {nice(mean)}, τa {nice(alternating)})"),
        strengths_y=[
            (to_y(value) + drop, f"{name} {nice(value)}")
            for value, name in ((endurance, "Sse"), (shear_yield, "Ssy"))
        ],
        strengths_x=[
            (to_x(value), f"{name} {nice(value)}")
            for value, name in ((shear_yield, "Ssy"), (ultimate, "Ssu"))
        ],
        tick_end=bottom + 4,
        tick_text_y=bottom + font_size + 4,
        x_axis=(left + plot_width / 2, height - 6),
        y_axis=(14, (top + bottom) / 2),
        unit=unit,
    )
