"""The study section's drawing: the governing utilisation's histogram and cumulative fraction.

Coordinates computed here, SVG written by ``templates/workbench_record/svg/study_histogram.svg.j2``
(autoescaped), as every drawing of the record (:mod:`workbench.record.figures`): the same counts
give the same bytes, so the verifier can draw it again from the signed counts and compare.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from workbench.record.drawing import FONT_FAMILY, nice, points
from workbench.record.templating import render


def study_histogram_svg(
    edges: Sequence[float],
    counts: Sequence[int],
    width: int = 720,
    panel_height: int = 110,
    font_size: float = 11.0,
) -> str:
    """Variants per bin (bins above the limit in the load colour) over the cumulative fraction.

    Parameters
    ----------
    edges
        (bins + 1,) bin edges of the governing utilisation (dimensionless).
    counts
        (bins,) valid variants per bin.
    width, panel_height
        Size in CSS pixels.
    font_size
        Size of the text (CSS px).

    Returns
    -------
    str
        An SVG document: two stacked panels over one utilisation axis, the limit 1 on both.
    """
    left, right, top, gap = 74, 14, 8, 26
    plot_width = width - left - right
    edge = np.asarray(edges, dtype=float)
    count = np.asarray(counts, dtype=float)
    low, high = float(edge[0]), float(edge[-1])
    span = high - low or 1.0

    def to_x(value: np.ndarray | float) -> np.ndarray | float:
        return left + (value - low) / span * plot_width

    tallest = float(count.max()) if count.size and count.max() > 0 else 1.0
    bottom_of_bars = top + panel_height
    bars = [
        {"x": to_x(a), "width": to_x(b) - to_x(a), "y": bottom_of_bars - n / tallest * panel_height,
         "height": n / tallest * panel_height, "over": 0.5 * (a + b) > 1.0}
        for a, b, n in zip(edge[:-1], edge[1:], count, strict=True) if n > 0
    ]  # fmt: skip
    total = float(count.sum()) or 1.0
    second = top + panel_height + gap
    fraction = np.concatenate([[0.0], np.cumsum(count) / total])
    curve = points(np.asarray(to_x(edge)).tolist(),
                   (second + (1.0 - fraction) * panel_height).tolist(), decimals=2)  # fmt: skip
    panels: list[dict[str, Any]] = [
        {"top": top, "high": f"{int(tallest):,}", "label": "variants per bin"},
        {"top": second, "high": "1", "label": "fraction at or below"},
    ]
    for panel in panels:
        panel["high_y"] = panel["top"] + font_size - 1
        panel["low_y"] = panel["top"] + panel_height
        panel["label_y"] = panel["top"] + font_size + 1
    bottom = second + panel_height + font_size + 3
    return render(
        "svg/study_histogram.svg.j2",
        width=width,
        height=bottom + 16,
        font_family=FONT_FAMILY,
        font_size=font_size,
        left=left,
        right_edge=left + plot_width,
        plot_width=plot_width,
        panel_height=panel_height,
        panels=panels,
        bars=bars,
        cumulative=curve,
        limit_x=to_x(1.0),
        limit_label_y=top - 1 + font_size,
        bottom=bottom,
        centre_x=left + plot_width / 2,
        x_min=nice(low),
        x_max=nice(high),
    )
