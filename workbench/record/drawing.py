"""Numbers for the record's drawings: readable values, label widths, point lists, data URIs.

The drawings are written by the SVG templates under ``templates/workbench_record/svg/``; the
modules that lay them out (:mod:`workbench.record.elevation`, :mod:`workbench.record.figures`)
compute coordinates only, with these helpers. Everything is deterministic: the same input
gives the same bytes, so a record can be rebuilt and compared.
"""

from __future__ import annotations

import base64
import math
from collections.abc import Iterable

from markupsafe import Markup

__all__ = ["FONT_FAMILY", "data_uri", "nice", "nice_step", "points", "text_width"]

#: Fonts of the drawings; an SVG shown as an image uses the reader's installed fonts.
FONT_FAMILY = "DejaVu Sans, Helvetica, Arial, sans-serif"


def data_uri(svg: str) -> Markup:
    """``data:image/svg+xml;base64,…`` of an SVG document (CSP ``img-src data:`` allows it).

    The one place a drawing's URI is marked safe: it is written in the base64 alphabet, which
    holds no character that escaping would change, so escaping would only scan the drawings'
    bytes (a few hundred kB a record) to no effect. The SVG inside was itself written by an
    autoescaped template.
    """
    encoded = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return Markup("data:image/svg+xml;base64," + encoded)


def nice(value: float, digits: int = 4) -> str:
    """``digits`` significant digits, no exponent between 10⁻⁴ and 10⁷, a true minus sign."""
    if value == 0.0 or not math.isfinite(value):
        return "0"
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-4 <= abs(value) < 1e7:
        decimals = max(digits - 1 - math.floor(math.log10(abs(value))), 0)
        text = f"{value:.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
    return text.replace("-", "\u2212")


def text_width(text: str, size: float) -> float:
    """Width of ``text`` in px at ``size`` px, for placing labels (average sans-serif glyph)."""
    return 0.6 * size * len(text)


def nice_step(span: float) -> float:
    """A round length (1, 2 or 5 × 10ⁿ) near a sixth of ``span``."""
    if span <= 0.0 or not math.isfinite(span):
        return 1.0
    raw = span / 6.0
    power = 10.0 ** math.floor(math.log10(raw))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if factor * power >= raw:
            return factor * power
    return 10.0 * power  # pragma: no cover - the loop always returns


def points(xs: Iterable[float], ys: Iterable[float], decimals: int) -> str:
    """An SVG point list ``"x,y x,y …"`` with ``decimals`` decimals (a polyline's data)."""
    pattern = f"{{:.{decimals}f}},{{:.{decimals}f}}"
    return " ".join(map(pattern.format, xs, ys))
