"""Static pictures for the calculation record, as SVG text: drawings, diagrams and equations.

Everything here is deterministic: the same input gives the same bytes, so a record can be
rebuilt and compared. matplotlib draws with its SVG backend (no pyplot, no global figure
state) under a fixed ``svg.hashsalt`` and without a ``Date`` in the metadata; text is drawn as
paths, so a reader needs no font. The result diagrams are written directly as SVG polylines,
which is both faster than a plotting library and exact to the stations computed.
"""

from __future__ import annotations

import functools
import io
import math
from collections.abc import Sequence
from typing import Any

import numpy as np
from markupsafe import escape

from workbench.solver.model import Model

__all__ = ["data_uri", "elevation_svg", "equation_svg", "line_diagram_svg"]

#: Fixed salt for the ids matplotlib writes into SVG (clip paths, glyphs): stable bytes.
SVG_HASH_SALT = "workbench-record"

_RC: Any = {
    "svg.hashsalt": SVG_HASH_SALT,
    "svg.fonttype": "path",
    "font.family": "DejaVu Sans",
    "mathtext.fontset": "dejavusans",
    "font.size": 9.0,
}


def data_uri(svg: str) -> str:
    """``data:image/svg+xml;base64,…`` of an SVG document (CSP ``img-src data:`` allows it)."""
    import base64  # noqa: PLC0415

    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")


def _render(figure: Any) -> str:
    from matplotlib.backends.backend_svg import FigureCanvasSVG  # noqa: PLC0415

    buffer = io.StringIO()
    FigureCanvasSVG(figure)
    figure.savefig(
        buffer, format="svg", metadata={"Date": None}, bbox_inches="tight", pad_inches=0.02
    )
    return buffer.getvalue()


@functools.lru_cache(maxsize=64)
def equation_svg(tex: str, size: float = 11.0) -> str:
    """An equation in matplotlib mathtext, drawn as an SVG document.

    Parameters
    ----------
    tex
        The equation in mathtext (a TeX subset), without the surrounding ``$``.
    size
        Font size (pt).

    Returns
    -------
    str
        The SVG document; identical bytes for the same input.
    """
    import matplotlib  # noqa: PLC0415
    from matplotlib.figure import Figure  # noqa: PLC0415

    with matplotlib.rc_context(_RC):
        figure = Figure(figsize=(0.01, 0.01))
        figure.text(0.0, 0.0, f"${tex}$", fontsize=size)
        return _render(figure)


def elevation_svg(model: Model) -> str:
    """A to-scale elevation of every shaft: outline, supports, gears and load points.

    Lengths and diameters share one scale (``aspect="equal"``), so the drawing shows the true
    proportions of the shaft. Dimensions are in the case's length unit.
    """
    import matplotlib  # noqa: PLC0415
    from matplotlib.figure import Figure  # noqa: PLC0415
    from matplotlib.patches import Polygon  # noqa: PLC0415

    units = model.units
    scale = units.from_si(1.0, "length")
    label = units.label("length")
    with matplotlib.rc_context(_RC):
        rows = len(model.shafts)
        longest = max(shaft.length for shaft in model.shafts) * scale
        tallest = (
            max(
                float(np.max(segment.outer_radius_at(np.linspace(0.0, 1.0, 3))))
                for shaft in model.shafts
                for segment in shaft.segments
            )
            * scale
        )
        figure = Figure(figsize=(7.0, 1.0 + 1.3 * rows))
        for number, shaft in enumerate(model.shafts):
            axes = figure.add_subplot(rows, 1, number + 1)
            bounds = shaft.boundaries * scale
            for index, segment in enumerate(shaft.segments):
                fractions = np.linspace(0.0, 1.0, 9)
                xs = bounds[index] + fractions * (bounds[index + 1] - bounds[index])
                radius = segment.outer_radius_at(fractions) * scale
                outline = np.column_stack([np.r_[xs, xs[::-1]], np.r_[radius, -radius[::-1]]])
                axes.add_patch(
                    Polygon(
                        outline,
                        closed=True,
                        facecolor="#d9dee5",
                        edgecolor="#222222",
                        linewidth=0.8,
                    )
                )
                inner = [
                    layer.section
                    for layer in segment.layers
                    if getattr(layer.section, "inner_diameter", 0.0)
                ]
                for section in inner[:1]:
                    bore = getattr(section, "inner_diameter", 0.0) / 2.0 * scale
                    axes.plot([xs[0], xs[-1]], [bore, bore], color="#555555", lw=0.5, ls="--")
                    axes.plot([xs[0], xs[-1]], [-bore, -bore], color="#555555", lw=0.5, ls="--")
            axes.axhline(0.0, color="#888888", lw=0.5, ls="-.")
            for support in model.supports:
                if support.shaft != shaft.id:
                    continue
                x = support.x * scale
                marker = "^" if support.kind == "fixed" else "D"
                axes.plot([x], [-1.25 * tallest], marker=marker, color="#1f4e79", ms=7)
                axes.annotate(
                    support.kind,
                    (x, -1.25 * tallest),
                    xytext=(0, -12),
                    textcoords="offset points",
                    ha="center",
                    fontsize=7,
                )
            for gear in model.gears:
                for end in (gear.a, gear.b):
                    if end.shaft == shaft.id:
                        x, r = end.x * scale, end.radius * scale
                        axes.plot([x, x], [-r, r], color="#8c4a00", lw=2.0)
            for case in model.load_cases:
                for torque in case.torques:
                    if torque.shaft == shaft.id:
                        axes.plot(
                            [torque.x * scale], [1.25 * tallest], marker="v", color="#a00000", ms=5
                        )
            axes.set_aspect("equal", adjustable="box")
            axes.set_xlim(-0.03 * longest, 1.03 * longest)
            axes.set_ylim(-1.7 * tallest, 1.6 * tallest)
            axes.set_title(f"shaft {shaft.id}", fontsize=8, loc="left")
            axes.set_xlabel(f"x [{label}]", fontsize=8)
            axes.tick_params(labelsize=7)
            for spine in ("top", "right"):
                axes.spines[spine].set_visible(False)
        return _render(figure)


def _nice(value: float) -> str:
    if value == 0.0 or not math.isfinite(value):
        return "0"
    return f"{value:.4g}"


def line_diagram_svg(
    x: Sequence[float],
    panels: Sequence[tuple[str, Sequence[float]]],
    x_label: str,
    width: int = 640,
    panel_height: int = 110,
) -> str:
    """Stacked line diagrams of quantities along a shaft, written directly as SVG.

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

    Returns
    -------
    str
        An SVG document with a polyline per panel, a zero line, and the extreme values.
    """
    left, right, top, gap = 70, 14, 8, 26
    xs = np.asarray(x, dtype=float)
    x_min, x_max = float(xs.min()), float(xs.max())
    span = x_max - x_min or 1.0
    height = top + len(panels) * (panel_height + gap) + 14
    plot_width = width - left - right
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" font-family="sans-serif" font-size="10">',
        f'<rect width="{width}" height="{height}" fill="#ffffff"/>',
    ]
    for number, (label, raw_values) in enumerate(panels):
        values = np.asarray(raw_values, dtype=float)
        y0 = top + number * (panel_height + gap)
        low, high = min(float(values.min()), 0.0), max(float(values.max()), 0.0)
        extent = high - low or 1.0

        def to_x(value: float) -> float:
            return left + (value - x_min) / span * plot_width

        def to_y(value: float, y0: int = y0, high: float = high, extent: float = extent) -> float:
            return y0 + (high - value) / extent * panel_height

        points = " ".join(f"{to_x(a):.2f},{to_y(b):.2f}" for a, b in zip(xs, values, strict=True))
        zero = to_y(0.0)
        parts += [
            f'<rect x="{left}" y="{y0}" width="{plot_width}" height="{panel_height}" '
            'fill="none" stroke="#bbbbbb" stroke-width="0.6"/>',
            f'<line x1="{left}" y1="{zero:.2f}" x2="{left + plot_width}" y2="{zero:.2f}" '
            'stroke="#888888" stroke-width="0.6" stroke-dasharray="3,2"/>',
            f'<polyline points="{points}" fill="none" stroke="#1f4e79" stroke-width="1.4"/>',
            f'<text x="{left - 4}" y="{y0 + 9}" text-anchor="end">{escape(_nice(high))}</text>',
            f'<text x="{left - 4}" y="{y0 + panel_height}" text-anchor="end">'
            f"{escape(_nice(low))}</text>",
            f'<text x="{left + 4}" y="{y0 + 11}" fill="#333333">{escape(label)}</text>',
        ]
        peak = int(np.argmax(np.abs(values)))
        parts.append(
            f'<circle cx="{to_x(xs[peak]):.2f}" cy="{to_y(values[peak]):.2f}" r="2.5" '
            'fill="#a00000"/>'
        )
    bottom = top + len(panels) * (panel_height + gap) - gap + 12
    parts += [
        f'<text x="{left}" y="{bottom}">{escape(_nice(x_min))}</text>',
        f'<text x="{left + plot_width}" y="{bottom}" text-anchor="end">'
        f"{escape(_nice(x_max))}</text>",
        f'<text x="{left + plot_width / 2:.1f}" y="{bottom}" text-anchor="middle">'
        f"{escape(x_label)}</text>",
        "</svg>",
    ]
    return "\n".join(parts)
