"""The mesh's checks: every segment has an element, every element constant is in range.

Each input is a finite number in range and each section's constants are too (the model and the
columns check them), but a product or quotient of them may not be: G·K of a modulus of 1e300 Pa
and a torsion constant of 1e10 m⁴ overflows, L/(G·K) of a long soft segment too. The mesh sizes
its elements with numpy's warnings off and these checks refuse what comes out of range, naming
the segment. Besides, the mesh merges points closer than the position tolerance: a chain of
such points could merge a segment's two ends, and is refused here by the segment's length.
"""

from __future__ import annotations

import numpy as np

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.case.validate import all_finite, all_normal_positive, not_normal_positive
from workbench.solver.columns import BoolArray, IntArray, SegmentTable
from workbench.solver.model import POSITION_TOLERANCE
from workbench.solver.sections import FloatArray

#: The end of a message on a value beyond the numbers a float holds to full precision.
_OUT_OF_RANGE = "out of the range of full-precision numbers"


def require_every_segment(shaft: int, segment_of: IntArray, n_segments: int) -> None:
    """Raise :class:`InputError` when a segment got no element (its ends merged with points).

    Segments are longer than twice the position tolerance
    (:func:`~workbench.solver.parts.check_segment_lengths`), but a chain of points each within
    the tolerance of the next merges into its first.

    Parameters
    ----------
    shaft
        The shaft's number.
    segment_of
        (n_elements,) the segment (on the shaft) of each of the shaft's elements, ascending.
    n_segments
        The shaft's number of segments.
    """
    bounded = np.concatenate([[-1], segment_of, [n_segments]])
    gaps = np.flatnonzero(np.diff(bounded) > 1)
    if not len(gaps):
        return
    missing = int(bounded[gaps[0]]) + 1
    msg = (
        f"is too short for the points on and around it (supports, gears, loads) to be told "
        f"apart: points closer than {POSITION_TOLERANCE:g} of the shaft's length are one point"
    )
    raise InputError(f"shafts[{shaft}].segments[{missing}].length", msg)


def require_element_constants(
    segments: SegmentTable,
    element_segment_row: IntArray,
    station_element: IntArray | None,
    station_rigidity: FloatArray,
    station_stress_per_torque: FloatArray,
    flexibility: FloatArray,
) -> None:
    """Raise :class:`InputError` naming the first segment whose element constants are out of range.

    G·K and τ/T at every station must be finite normal numbers, and so must each element's
    flexibility I₀ (its stiffness 1/I₀ is then finite too); I₁ and I₂ must be finite.

    Parameters
    ----------
    segments
        The segment columns (lengths in m, for the message; field paths).
    element_segment_row, station_element
        (n_elements,) segment row of each element; (n_stations,) element of each station, or
        ``None`` when the values below are the elements' (each station holds its element's).
    station_rigidity, station_stress_per_torque
        (n_variants, n_stations) G·K (N·m²) and τ/T (1/m³), or (n_variants or 1, n_elements).
    flexibility
        (n_variants, n_elements, 3) I₀, I₁, I₂ (1/(N·m), m/(N·m), m²/(N·m)).
    """
    checks = (
        (station_rigidity, "its torsional rigidity G·K", "N·m²"),
        (station_stress_per_torque, "its τ/T", "1/m³"),
    )
    for values, what, unit in checks:
        if all_normal_positive(values):
            continue  # the common case, found without a mask the size of the stations
        bad = not_normal_positive(values)
        if bad.any():
            variant, station = _first(bad)
            element = station if station_element is None else station_element[station]
            row = int(element_segment_row[element])
            msg = f"{what} comes to {float(values[variant, station]):.3g} {unit}, {_OUT_OF_RANGE}"
            raise InputError(f"{segments.segment_path(row)}.section", msg)
    if all_normal_positive(flexibility[..., 0]) and all_finite(flexibility[..., 1:]):
        return
    bad = not_normal_positive(flexibility[..., 0]) | ~np.isfinite(flexibility[..., 1:]).all(-1)
    if bad.any():
        variant, element = _first(bad)
        row = int(element_segment_row[element])
        length = float(segments.length[min(variant, len(segments.length) - 1), row])
        moments = ", ".join(f"{value:.3g}" for value in flexibility[variant, element])
        msg = (
            f"{quote(length, 'length')} is out of range for its rigidity: an element's "
            f"∫u^k du/(G·K), k = 0, 1, 2, come to {moments}"
        )
        raise InputError(f"{segments.segment_path(row)}.length", msg)


def _first(bad: BoolArray) -> tuple[int, int]:
    """(variant, column) of the first ``True`` of a (n_variants, n) mask."""
    variant, column = np.unravel_index(int(np.argmax(bad)), bad.shape)
    return int(variant), int(column)


__all__ = ["require_element_constants", "require_every_segment"]
