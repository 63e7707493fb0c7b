"""Separation of natural frequencies of torsional vibration from running-speed bands.

The modes come from :func:`workbench.solver.modes.natural_modes`; this module judges them: each
running-speed band, widened by a margin, against its neighbouring natural frequencies, and turns
the result into the report's ``frequency_separation`` checks (:func:`frequency_checks`).

References
----------
.. [1] Separation of natural frequencies from running speeds by a margin, ±20 % by default:
   common practice, no source.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from workbench.case.design import DEFAULT_FREQUENCY_MARGIN, DesignCriteria
from workbench.case.errors import InputError
from workbench.case.units import UnitSystem, display_units, quote
from workbench.design.check_report import Check
from workbench.design.verdict import WithinLimit
from workbench.solver.model import Model, OperatingSpeed
from workbench.solver.modes import DEFAULT_MODE_COUNT, Modes, natural_modes
from workbench.solver.tables import format_table


@dataclass(frozen=True)
class Separation(WithinLimit):
    """How far one natural frequency lies from one running-speed band.

    Attributes
    ----------
    speed
        The band.
    mode
        Index of the mode in its :class:`Modes` (0 = lowest).
    angular_frequency
        The mode's natural circular frequency ω (rad/s).
    low, high
        The band widened by the margin: minimum·(1 − margin), maximum·(1 + margin) (rad/s).
    position
        ``"below"``, ``"above"`` or ``"inside"`` the widened band.
    value, limit
        Below the band: ω and the widened lower edge; above it: the widened upper edge and ω;
        inside: the pair of the nearer edge. The mode is clear when value ≤ limit, and
        value/limit is the utilisation (rad/s both).
    shaft, x
        Where the mode's |angle| is largest (shaft id, m).
    """

    speed: OperatingSpeed
    mode: int
    angular_frequency: float
    low: float
    high: float
    position: str
    value: float
    limit: float
    shaft: str
    x: float


def frequency_separations(
    modes: Modes, speeds: Sequence[OperatingSpeed], margin: float
) -> tuple[Separation, ...]:
    """Each running-speed band against its neighbouring natural frequencies.

    Parameters
    ----------
    modes
        Natural modes (:func:`natural_modes`), computed at least up to the widest band's top.
    speeds
        Running-speed bands (rad/s). A band excites at once per revolution: the natural
        circular frequency ω is compared with the speed in rad/s itself.
    margin
        Relative widening of each band, 0 ≤ margin < 1: [min·(1 − m), max·(1 + m)].

    Returns
    -------
    tuple of Separation
        For each band: the nearest mode below the widened band, every mode inside it and the
        nearest mode above it; rigid-body modes are not resonances and are left out.

    References
    ----------
    .. [1] Separation of natural frequencies from running speeds by a margin, ±20 % by default:
       common practice, no source.
    """
    out = []
    flexible = np.flatnonzero(~modes.rigid_body)
    omega = modes.angular_frequency[flexible]
    for speed in speeds:
        low = speed.minimum * (1.0 - margin)
        high = speed.maximum * (1.0 + margin)
        below = flexible[omega <= low] if low > 0.0 else flexible[:0]
        above = flexible[omega >= high]
        inside = [mode for mode in flexible if mode not in below and mode not in above]
        chosen = [*below[-1:], *inside, *above[:1]]
        for mode in chosen:
            natural = float(modes.angular_frequency[mode])
            if mode in below:
                position, value, limit = "below", natural, low
            elif mode in above:
                position, value, limit = "above", high, natural
            else:
                position = "inside"
                from_below = natural / low if low > 0.0 else math.inf
                from_above = high / natural
                value, limit = (natural, low) if from_below < from_above else (high, natural)
            shaft, x = modes.antinode(int(mode))
            out.append(
                Separation(speed, int(mode), natural, low, high, position, value, limit, shaft, x)
            )
    return tuple(out)


def separation_note(separation: Separation, margin: float) -> str:
    """One line on a separation, in the current display units (speeds) and Hz."""
    speed = separation.speed
    hertz = separation.angular_frequency / (2.0 * math.pi)
    return (
        f"mode {separation.mode + 1}: {hertz:.4g} Hz = {quote(separation.angular_frequency, 'speed')}"
        f", {separation.position} {speed.name!r} {quote(speed.minimum, 'speed')} to "
        f"{quote(speed.maximum, 'speed')} widened by ±{margin:.0%} to "
        f"{quote(separation.low, 'speed')} to {quote(separation.high, 'speed')}; once per "
        "revolution"
    )


#: natural_modes' options and the keys of the case's design section that give them.
_DESIGN_KEYS = {
    "elements_per_segment": "design.modal_elements_per_segment",
    "max_element_length": "design.modal_max_element_length",
}


def frequency_checks(
    model: Model, design: DesignCriteria
) -> tuple[list[Check], list[str], Modes | None]:
    """The ``frequency_separation`` checks of a model's running-speed bands.

    Parameters
    ----------
    model
        The validated model (SI), with its ``operating_speeds`` and inertia (discs, densities).
    design
        Criteria: the frequency margin and the modal mesh settings.

    Returns
    -------
    tuple
        (checks, notes, modes): one check per mode near each band, the report's notes on them,
        and the :class:`workbench.solver.modes.Modes` used; ``([], [], None)`` without bands.

    References
    ----------
    .. [1] Separation of natural frequencies from running speeds by a margin: common practice,
       no source (see :func:`workbench.solver.modes.frequency_separations`).
    """
    speeds = model.operating_speeds
    if not speeds:
        return [], [], None
    margin = design.frequency_margin
    token = display_units.set(model.units)  # the notes quote speeds in the case's units
    try:
        # The usual count (not 1): for small systems every mode comes at once anyway, and the
        # report keeps them for charts and records to reuse.
        try:
            modes = natural_modes(
                model,
                count=DEFAULT_MODE_COUNT,
                up_to=max(speed.maximum for speed in speeds) * (1.0 + margin),
                elements_per_segment=design.modal_elements_per_segment,
                max_element_length=design.modal_max_element_length,
            )
        except InputError as error:
            if error.field in _DESIGN_KEYS:  # the mesh options come from the design section
                raise InputError(_DESIGN_KEYS[error.field], error.message) from None
            raise
        checks = [
            Check(
                separation.speed.name,
                separation.shaft,
                None,
                "frequency_separation",
                separation.value,
                separation.limit,
                separation.x,
                separation_note(separation, margin),
            )
            for separation in frequency_separations(modes, speeds, margin)
        ]
    finally:
        display_units.reset(token)
    source = (
        "the default, common practice, no source"
        if margin == DEFAULT_FREQUENCY_MARGIN
        else "the case's frequency_margin"
    )
    notes = [
        f"frequency separation: running-speed bands widened by ±{margin:.0%} ({source}), "
        "excitation once per revolution; shaft and x name where the mode's angle is largest",
        *modes.notes,
    ]
    return checks, notes, modes


def frequency_utilisation_ceiling(model: Model, design: DesignCriteria) -> float:
    """The largest utilisation any ``frequency_separation`` check of the model could have.

    Whatever its natural frequencies: a caller that knows another check's utilisation is at
    least this can skip the eigen-solve, since no frequency check can govern then.

    Parameters
    ----------
    model
        The model; only its ``operating_speeds`` (rad/s) are read.
    design
        Criteria: the frequency margin m.

    Returns
    -------
    float
        0 without bands; else the largest over the bands of max(1, √(high/low)), with
        low = min·(1 − m) and high = max·(1 + m); ``inf`` when a band starts at 0.

    Notes
    -----
    A mode below a widened band has utilisation ω/low ≤ 1, one above it high/ω ≤ 1. One inside
    it (low < ω < high) is measured from the nearer edge, min(ω/low, high/ω), which is largest,
    √(high/low), at ω = √(low·high). With low = 0 an inside mode has high/ω, unbounded.

    References
    ----------
    .. [1] From the definition of the check, :func:`workbench.solver.modes.frequency_separations`.
    """
    ceiling = 0.0
    margin = design.frequency_margin
    for speed in model.operating_speeds:
        low, high = speed.minimum * (1.0 - margin), speed.maximum * (1.0 + margin)
        if low <= 0.0:
            return math.inf
        ceiling = max(ceiling, 1.0, math.sqrt(high / low))
    return ceiling


def modes_text(modes: Modes, margin: float | None = None, units: UnitSystem | None = None) -> str:
    """Readable tables: the modes, then each running-speed band against its neighbours."""
    units = units or modes.model.units
    speed_unit = units.label("speed")
    length_unit = units.label("length")
    rows = []
    for mode in range(len(modes)):
        shaft, x = modes.antinode(mode)
        rows.append(
            [
                str(mode + 1),
                f"{modes.frequency[mode]:.5g}",
                f"{units.from_si(modes.angular_frequency[mode], 'speed'):.5g}",
                "rigid body" if modes.rigid_body[mode] else "flexible",
                f"{shaft} @ {units.from_si(x, 'length'):.4g}",
            ]
        )
    lines = [
        "Natural frequencies of torsional vibration (lowest first)",
        format_table(
            [
                "mode",
                "frequency [Hz]",
                f"as a speed [{speed_unit}]",
                "kind",
                f"largest |angle| [shaft @ x {length_unit}]",
            ],
            rows,
        ),
        f"mesh: segments with inertia cut into at least {modes.elements_per_segment} elements; "
        "refine (--elements-per-segment) to confirm the frequencies you rely on",
    ]
    if modes.model.operating_speeds:
        margin = DEFAULT_FREQUENCY_MARGIN if margin is None else margin
        token = display_units.set(units)
        try:
            separations = frequency_separations(modes, modes.model.operating_speeds, margin)
            rows = [
                [
                    item.speed.name,
                    str(item.mode + 1),
                    f"{units.from_si(item.angular_frequency, 'speed'):.5g}",
                    f"{units.from_si(item.low, 'speed'):.5g} to "
                    f"{units.from_si(item.high, 'speed'):.5g}",
                    item.position,
                    f"{item.utilisation:.3f}",
                    "clear" if item.passes else "TOO CLOSE",
                ]
                for item in separations
            ]
        finally:
            display_units.reset(token)
        lines += [
            "",
            f"Separation from running speeds (bands widened by ±{margin:.0%}; once per revolution)",
            format_table(
                [
                    "band",
                    "mode",
                    f"natural [{speed_unit}]",
                    f"widened band [{speed_unit}]",
                    "where",
                    "utilisation",
                    "verdict",
                ],
                rows,
            ),
        ]
    lines += [f"note: {note}" for note in modes.notes]
    return "\n".join(lines) + "\n"
