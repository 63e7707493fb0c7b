"""Resizing round sections to a new diameter, keeping their bore ratio or their wall.

The rule a diameter search applies to each sized segment, written once as an array function
(:func:`resized_dimensions`, for a batch of candidate sizes) and wrapped for one section
(:func:`resized`).
"""

from __future__ import annotations

from typing import Any

import numpy as np

from workbench.case.errors import InputError, quoted
from workbench.solver.columns import SOLID, TAPERED, TUBE
from workbench.solver.sections import FloatArray, Section, SolidCircle, TaperedCircle, Tube


def outer_diameter(section: Section) -> float:
    """The diameter sizing works on: outer diameter, the larger end of a taper (m)."""
    return 2.0 * section.outer_radius


def resized_dimensions(
    shape: Any, start: Any, end: Any, bore: Any, diameter: Any, keep: str
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Outer diameters at both ends and bores of round sections resized to ``diameter`` (m).

    Parameters
    ----------
    shape
        Shape codes (:data:`~workbench.solver.columns.SOLID`, ``TUBE`` or ``TAPERED``).
    start, end, bore
        The sections' outer diameters at the start and the end and their bores (m).
    diameter
        The new diameters sizing works on (m): the outer diameter, the larger end of a taper;
        any shape that broadcasts against the sections'.
    keep
        ``"ratio"`` keeps bore/outer (and a taper's shape), ``"wall"`` the wall thickness (and
        a taper's bore).

    Returns
    -------
    tuple of numpy.ndarray
        The new start and end outer diameters and bores (m); a wall kept on a diameter at most
        twice its thickness gives a bore of zero or less (not a valid tube).
    """
    shape, start, end, bore = (np.asarray(value) for value in (shape, start, end, bore))
    diameter = np.asarray(diameter, dtype=float)
    largest = 2.0 * (np.maximum(start, end) / 2.0)  # the taper's larger end, as sizing reads it
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = diameter / largest
        tube_bore = (
            diameter * bore / start if keep == "ratio" else diameter - 2.0 * (0.5 * (start - bore))
        )
    tapered = shape == TAPERED
    new_start = np.where(tapered, start * scale, diameter)
    new_end = np.where(tapered, end * scale, diameter)
    taper_bore = bore * scale if keep == "ratio" else np.broadcast_to(bore, scale.shape)
    new_bore = np.where(tapered, taper_bore, np.where(shape == TUBE, tube_bore, 0.0))
    return new_start, new_end, new_bore


def _dimensions(section: Section) -> tuple[int, float, float, float]:
    """(shape code, start, end, bore) of a round section."""
    if isinstance(section, SolidCircle):
        return SOLID, section.diameter, section.diameter, 0.0
    if isinstance(section, Tube):
        return TUBE, section.outer_diameter, section.outer_diameter, section.inner_diameter
    if isinstance(section, TaperedCircle):
        return TAPERED, section.diameter_start, section.diameter_end, section.bore
    raise InputError("section", f"shape {quoted(section.shape)} cannot be sized by diameter")


def resized(section: Section, diameter: float, keep: str) -> Section:
    """The section with outer diameter ``diameter`` (m), keeping bore ratio or wall.

    Raises
    ------
    InputError
        When keeping the wall leaves no bore (the diameter is at most twice the wall).
    """
    shape, start, end, bore = _dimensions(section)
    new = resized_dimensions(shape, start, end, bore, diameter, keep)
    start, end, bore = (float(value) for value in new)
    if shape == SOLID:
        return SolidCircle(start)
    if shape == TUBE:
        return Tube(start, bore)
    return TaperedCircle(start, end, bore)


__all__ = ["outer_diameter", "resized", "resized_dimensions"]
