"""The Torsional vibration section: inertia, method, frequencies, mode shapes, separation.

The separation is that of the natural frequencies from the running speeds.

The verifier rebuilds this section from the signed case and looks for it in the record, so it
must come out byte for byte as it always has.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from workbench.case.design import DEFAULT_FREQUENCY_MARGIN
from workbench.design.frequency import frequency_separations
from workbench.record.computation import Computation
from workbench.record.drawing import data_uri
from workbench.record.figures import mode_shape_svg
from workbench.record.view_model.common import Equation, Rows, equations, number, rpm, unit_labels

__all__ = ["DRAWN_MODES", "Separation", "VibrationView", "vibration_view"]

#: Flexible modes drawn in the record; every mode is in the table.
DRAWN_MODES = 4


@dataclass(frozen=True)
class Separation:
    """How the running speeds stand from the natural frequencies.

    Attributes
    ----------
    margin
        The margin as written (``20%``).
    default_margin
        Whether it is the default (common practice) rather than the case's own.
    bands
        Rows: band, min, max, widened band (rpm).
    rows
        Rows: band, mode, frequency, as a speed, where, utilisation, verdict.
    """

    margin: str
    default_margin: bool
    bands: Rows
    rows: Rows


@dataclass(frozen=True)
class VibrationView:
    """What the Torsional vibration section shows.

    Attributes
    ----------
    units
        Labels of the length, inertia and density units.
    discs
        Rows: disc, shaft, x, inertia (empty without discs).
    densities
        Rows: material, density.
    equations
        The vibration equations.
    modes_error
        Why the natural modes could not be found (then nothing below is shown), or ``None``.
    elements_per_segment
        The least number of elements per segment with inertia.
    frequencies
        Rows: mode, frequency, as a speed, kind, where the angle is largest.
    complete
        Whether every mode up to the widened bands is listed.
    shapes
        ``(mode number, data: URI)`` of the drawn mode shapes.
    separation
        The running speeds' check, or ``None`` without running speeds.
    notes
        Remarks of the modal analysis.
    """

    units: dict[str, str]
    discs: Rows
    densities: Rows
    equations: tuple[Equation, ...]
    modes_error: str | None = None
    elements_per_segment: int = 0
    frequencies: Rows | None = None
    complete: bool = True
    shapes: list[tuple[int, str]] | None = None
    separation: Separation | None = None
    notes: tuple[str, ...] = ()


def _separation(computation: Computation) -> Separation | None:
    model, modes = computation.model, computation.modes
    speeds = model.operating_speeds
    if not speeds or modes is None:
        return None
    margin = computation.report.design.frequency_margin
    return Separation(
        margin=f"{margin:.0%}",
        default_margin=margin == DEFAULT_FREQUENCY_MARGIN,
        bands=[
            [
                speed.name,
                number(rpm(speed.minimum), 6),
                number(rpm(speed.maximum), 6),
                f"{number(rpm(speed.minimum * (1 - margin)), 6)} to "
                f"{number(rpm(speed.maximum * (1 + margin)), 6)}",
            ]
            for speed in speeds
        ],
        rows=[
            [
                item.speed.name,
                item.mode + 1,
                number(item.angular_frequency / (2.0 * math.pi), 6),
                number(rpm(item.angular_frequency), 6),
                f"{item.position} the widened band",
                f"{item.utilisation:.3f}",
                "clear" if item.passes else "TOO CLOSE",
            ]
            for item in frequency_separations(modes, speeds, margin)
        ],
    )


def vibration_view(computation: Computation, printed: bool = True) -> VibrationView:
    """The Torsional vibration section of a computation with inertia.

    ``printed``: units as the unit library prints them, else as the case file writes them.
    """
    model, modes = computation.model, computation.modes
    units = model.units
    densities: dict[str, float | None] = {}
    for shaft in model.shafts:
        for segment in shaft.segments:
            for layer in segment.layers:
                densities.setdefault(layer.material.name, layer.material.density)
    view = VibrationView(
        units=unit_labels(units, "length", "inertia", "density", printed=printed),
        discs=[
            [
                index,
                disc.shaft,
                number(units.from_si(disc.x, "length")),
                number(units.from_si(disc.inertia, "inertia"), 6),
            ]
            for index, disc in enumerate(model.discs)
        ],
        densities=[
            [
                name,
                "— (massless spring)" if value is None else number(units.from_si(value, "density")),
            ]
            for name, value in densities.items()
        ],
        equations=equations("vibration"),
    )
    if modes is None:
        return VibrationView(
            view.units,
            view.discs,
            view.densities,
            view.equations,
            modes_error=computation.modes_error or "no inertia",
        )
    frequencies: Rows = []
    for mode in range(len(modes)):
        where, at = modes.antinode(mode)
        omega = float(modes.angular_frequency[mode])
        frequencies.append(
            [
                mode + 1,
                number(omega / (2.0 * math.pi), 6),
                number(rpm(omega), 6),
                "rigid body" if modes.rigid_body[mode] else "flexible",
                f"{where} @ {number(units.from_si(at, 'length'))}",
            ]
        )
    discs = [(disc.shaft, float(units.from_si(disc.x, "length"))) for disc in model.discs]
    length = view.units["length"]
    shapes: list[tuple[int, str]] = []
    flexible = [mode for mode in range(len(modes)) if not modes.rigid_body[mode]]
    for mode in flexible[:DRAWN_MODES]:
        shafts = []
        for member in model.shafts:
            stations, angle = modes.shape(mode, member.id)
            shafts.append((member.id, units.from_si(stations, "length").tolist(), angle.tolist()))
        hertz = float(modes.frequency[mode])
        svg = mode_shape_svg(
            f"mode {mode + 1}: {number(hertz, 6)} Hz = {number(rpm(hertz * 2.0 * math.pi), 6)} rpm",
            shafts,
            discs,
            f"x along the shaft [{length}]",
        )
        shapes.append((mode + 1, data_uri(svg)))
    return VibrationView(
        view.units,
        view.discs,
        view.densities,
        view.equations,
        elements_per_segment=modes.elements_per_segment,
        frequencies=frequencies,
        complete=modes.complete,
        shapes=shapes,
        separation=_separation(computation),
        notes=tuple(modes.notes),
    )
