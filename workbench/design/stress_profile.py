"""The stresses the static checks judged along one shaft, as plain arrays for a chart.

Read from the arrays a :class:`~workbench.design.check_report.CheckReport` keeps of its static
checks (:class:`~workbench.design.check_report.StaticArrays`): nothing is computed a second way.
The peak (concentrated) stress of each detail is K·|T|·s_nom station by station
(:func:`~workbench.design.static_checks.station_concentrated_stresses`), whose largest on a
segment is the check row's value; the allowables and the governing values are the rows' own.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 5 (allowable shear stress) and ch. 7 (τ_max = Kts·τ_nom).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.design.check_report import CheckReport
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    BoolArray,
    IntArray,
    station_concentrated_stresses,
    station_segments,
)
from workbench.solver.sections import FloatArray


@dataclass(frozen=True)
class ShaftStresses:
    """The static checks' stresses along one shaft in one result (SI).

    Shapes: S the shaft's stations, G its segments, 4 the kinds of
    :data:`~workbench.design.static_checks.CONCENTRATION_KINDS` (shoulder, keyseat, notch,
    cross hole).

    Attributes
    ----------
    x
        (S,) station positions (m).
    segment
        (S,) the segment of each station (its index on the shaft).
    peak
        (4, S) concentrated stress of each kind at each station (Pa), NaN where the segment has
        no such detail; a shoulder has one value, at its segment's start.
    factor
        (4, G) the factor K of each detail (dimensionless), NaN where none.
    detail_value, detail_limit, detail_x
        (4, G) each detail check's governing value and limit (Pa) and where it governs (m);
        NaN where none. The values are the check rows' values.
    shear_value, shear_limit, shear_x
        (G,) the shear-stress check of each segment: its value and allowable (Pa), where (m).
    """

    x: FloatArray
    segment: IntArray
    peak: FloatArray
    factor: FloatArray
    detail_value: FloatArray
    detail_limit: FloatArray
    detail_x: FloatArray
    shear_value: FloatArray
    shear_limit: FloatArray
    shear_x: FloatArray

    @property
    def detail_fails(self) -> BoolArray:
        """(4, G) the detail checks that fail (value above the limit, as a check row says)."""
        return np.greater(self.detail_value, self.detail_limit)

    @property
    def shear_fails(self) -> BoolArray:
        """(G,) the shear-stress checks that fail."""
        return np.greater(self.shear_value, self.shear_limit)

    @property
    def kinds(self) -> tuple[str, ...]:
        """The kinds of the detail axis, in order."""
        return CONCENTRATION_KINDS


def shaft_stresses(report: CheckReport, shaft_id: str, result: str) -> ShaftStresses | None:
    """The stresses the static checks of ``report`` judged along one shaft in one result.

    Parameters
    ----------
    report
        A report of :func:`~workbench.design.checks.run_checks` (it keeps its arrays).
    shaft_id
        The shaft.
    result
        A load case or combination of the report.

    Returns
    -------
    ShaftStresses or None
        ``None`` when the report keeps no arrays, or has no such shaft or result.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 7 (τ_max = Kts·τ_nom).
    """
    static = report.static
    names = report.results.names
    if static is None or result not in names or shaft_id not in static.shafts:
        return None
    row = names.index(result)
    inputs, judged = static.inputs, static.judged
    chosen = np.flatnonzero(np.asarray(static.shafts) == shaft_id)  # a shaft's are consecutive
    first, last = int(chosen[0]), int(chosen[-1])
    stations = inputs.torque.shape[-1]
    start = int(inputs.segment_start[first])
    stop = int(inputs.segment_start[last + 1]) if last + 1 < len(static.shafts) else stations
    window = slice(start, stop)
    segments = slice(first, last + 1)
    peak = station_concentrated_stresses(inputs, 0)[row, :, window]
    value, limit, x = (
        array[0, row, :, segments] for array in (judged.value, judged.limit, judged.x)
    )
    segment = station_segments(inputs.segment_start, stations)[window] - first
    return ShaftStresses(
        x=inputs.station_x[0, window],
        segment=segment,
        peak=peak,
        factor=inputs.concentration[0, :, segments],
        detail_value=value[1 : 1 + len(CONCENTRATION_KINDS)],
        detail_limit=limit[1 : 1 + len(CONCENTRATION_KINDS)],
        detail_x=np.where(np.isnan(value), np.nan, x)[1 : 1 + len(CONCENTRATION_KINDS)],
        shear_value=value[0],
        shear_limit=limit[0],
        shear_x=x[0],
    )
