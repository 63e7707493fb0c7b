"""Element constants of the array core, for every element (and every variant) at once.

An element of length L whose section law and load intensity are smooth is described exactly by
three flexibility moments

    I_k = ∫₀ᴸ u^k du / (G·K(u)),   k = 0, 1, 2:

closed form on a prismatic element (I_k = L^(k+1)/((k+1)·G·K)), 8-point Gauss–Legendre on graded
pieces of a varying one — all varying elements of all variants integrated in one pass. Its
stiffness is 1/I₀; the exact (consistent) nodal loads of a linearly varying distributed torque
follow from I₁ and I₂; inside it the rotation is recovered from the cumulative moments at the
stations.

Float arrays carry a leading axis of variants (``(n_variants, ...)``); integer arrays describing
the mesh topology do not.

References
----------
.. [1] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, ch. 2-3 (element flexibility and stiffness, consistent loads).
.. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (φ = ∫T dx/(G·J)) and §3.8
   (bonded layers: G·K = Σ Gᵢ·Kᵢ, layer i carries T·Gᵢ·Kᵢ/ΣG·K).
.. [3] P. J. Davis and P. Rabinowitz, *Methods of Numerical Integration*, 2nd ed., 1984, §2.7
   (Gauss–Legendre rules; from memory).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.solver.columns import GIVEN, TAPERED, BoolArray, IntArray, SegmentTable
from workbench.solver.sections import FloatArray, polar_moment, taper_breaks

#: Sub-intervals drawn inside an element whose torque or rotation is curved (distributed load or
#: varying section), so charts show the true curve.
CURVE_PIECES = 16

_GAUSS_POINTS, _GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(8)


def _variant_index(column: FloatArray, variant: Any) -> Any:
    """Row of a (n_variants, n) column for ``variant``: 0 when the column has one variant."""
    return variant if column.shape[0] > 1 or isinstance(variant, slice) else 0


def _layer_constants(
    segments: SegmentTable, variant: Any, layer: Any, fraction: Any
) -> tuple[FloatArray, FloatArray]:
    """G·K (N·m²) and peak shear stress per torque (1/m³) of layers at segment fractions.

    ``layer`` is an index array, or ``slice(None)`` for every layer in order (with ``variant``
    then ``slice(None)`` too), which reads the columns without copying them.
    """

    def take(column: FloatArray) -> Any:
        return column[_variant_index(column, variant), layer]

    shape = segments.layer_shape[layer]
    diameter = take(segments.outer_diameter_start)
    if not (isinstance(fraction, float) and fraction == 0.0):
        diameter = diameter + (take(segments.outer_diameter_end) - diameter) * fraction
    constant = polar_moment(diameter, take(segments.inner_diameter))
    stress = np.divide(diameter, constant)
    stress *= 0.5
    given = shape == GIVEN
    if given.any():
        constant = np.where(given, take(segments.torsion_constant), constant)
        stress = np.where(given, take(segments.stress_per_torque), stress)
    modulus = take(segments.shear_modulus)
    if np.broadcast_shapes(np.shape(modulus), constant.shape) == constant.shape:
        constant *= modulus  # in place: no temporary the size of the mesh
    else:
        constant = constant * modulus
    return constant, stress


def segment_constants(
    segments: SegmentTable, variant: Any = None, segment: Any = None, fraction: Any = 0.0
) -> tuple[FloatArray, FloatArray]:
    """Rigidity Σ Gᵢ·Kᵢ (N·m²) and peak shear stress per torque (1/m³) of segments at fractions.

    Parameters
    ----------
    segments
        The segment columns.
    variant
        Variant number(s), broadcast against ``segment`` (ignored for one-variant columns);
        ``None`` with ``segment=None``: every variant.
    segment
        Segment rows; ``None``: every segment, in order (result (n_variants, n_segments)).
    fraction
        Fractions of the segment length (0 at its start), broadcast against ``segment``.

    Returns
    -------
    rigidity, stress_per_torque
        Arrays of the broadcast shape.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 (J = π(D⁴ − d⁴)/32,
       τ = T·(D/2)/J) and §3.8 (composite bars: τᵢ = T·(Gᵢ·Kᵢ/ΣG·K)·(D/2)/Jᵢ).
    """
    one_layer_each = len(segments.layer_shape) == segments.n_segments
    if segment is None:
        if one_layer_each:
            return _layer_constants(segments, slice(None), slice(None), fraction)
        variant = np.arange(segments.n_variants)[:, None]
        segment = np.arange(segments.n_segments)[None, :]
    if one_layer_each:
        return _layer_constants(segments, variant, segment, fraction)
    first = segments.segment_layer_start[segment]
    count = segments.segment_layer_start[segment + 1] - first
    rigidity: Any = 0.0
    peak: Any = 0.0
    for slot in range(int(count.max())):  # bonded layers: a handful at most
        present = slot < count
        share, stress = _layer_constants(
            segments, variant, np.where(present, first + slot, first), fraction
        )
        share = np.where(present, share, 0.0)
        rigidity = rigidity + share
        peak = np.maximum(peak, share * stress)
    return rigidity, peak / rigidity


def _segment_breaks(segments: SegmentTable) -> tuple[IntArray, IntArray, FloatArray, int]:
    """(variant, segment, fraction) of every interior quadrature break of a tapered layer.

    Also returns the number of variants the diameters come in (1 when they do not vary).
    """
    tapered = np.flatnonzero(segments.layer_shape == TAPERED)
    start, end, bore = np.broadcast_arrays(
        segments.outer_diameter_start[:, tapered],
        segments.outer_diameter_end[:, tapered],
        segments.inner_diameter[:, tapered],
    )
    counts, fractions = taper_breaks(start.ravel(), end.ravel(), bore.ravel())
    pair = np.repeat(np.arange(start.size), counts)
    interior = (fractions > 0.0) & (fractions < 1.0)
    variant, column = np.divmod(pair[interior], max(len(tapered), 1))
    segment = segments.layer_segment[tapered[column]]
    return variant, segment, fractions[interior], start.shape[0]


def _union(
    row_a: IntArray, value_a: FloatArray, row_b: IntArray, value_b: FloatArray
) -> tuple[IntArray, FloatArray, BoolArray]:
    """Sorted distinct (row, value) pairs of two lists, and whether each came from the first."""
    row = np.concatenate([row_a, row_b])
    value = np.concatenate([value_a, value_b])
    tag = np.concatenate([np.zeros(len(row_a), dtype=np.int8), np.ones(len(row_b), np.int8)])
    order = np.lexsort((tag, value, row))  # the first list's copy of a repeated pair comes first
    row, value, tag = row[order], value[order], tag[order]
    keep = np.ones(len(row), dtype=bool)
    keep[1:] = (row[1:] != row[:-1]) | (value[1:] != value[:-1])
    return row[keep], value[keep], tag[keep] == 0


@dataclass(frozen=True)
class VaryingElements:
    """The elements whose section varies, and the segment fractions of their stations.

    Parameters
    ----------
    element
        (n_varying,) element numbers.
    segment
        (n_varying,) their segment rows.
    fraction
        (n_varying, 2) start and end of each as fractions of its segment.
    station_count
        (n_varying,) stations of each.
    station_fraction
        Segment fraction of each station, element after element, ascending.
    """

    element: IntArray
    segment: IntArray
    fraction: FloatArray
    station_count: IntArray
    station_fraction: FloatArray

    def _rows_of_breaks(self, segments: SegmentTable) -> tuple[IntArray, FloatArray, int]:
        """Row (variant × n_varying + element) and fraction of each break inside an element."""
        variant, segment, fraction, n_rows = _segment_breaks(segments)
        n_varying = len(self.element)
        # Merge breaks into the elements' (segment, start) order: each lands after its element.
        keys_segment = np.concatenate([self.segment, segment])
        keys_fraction = np.concatenate([self.fraction[:, 0], fraction])
        tag = np.concatenate([np.zeros(n_varying, np.int8), np.ones(len(fraction), np.int8)])
        order = np.lexsort((tag, keys_fraction, keys_segment))
        position = np.where(tag[order] == 0, np.arange(len(order)), 0)
        owner_of_sorted = order[np.maximum.accumulate(position)]
        owner = np.empty(len(order), dtype=np.intp)
        owner[order] = owner_of_sorted
        owner = owner[n_varying:]
        inside = (fraction > self.fraction[owner, 0]) & (fraction < self.fraction[owner, 1])
        inside &= self.segment[owner] == segment
        return variant[inside] * n_varying + owner[inside], fraction[inside], n_rows

    @classmethod
    def of(
        cls,
        segments: SegmentTable,
        element: IntArray,
        segment: IntArray,
        fraction: FloatArray,
    ) -> VaryingElements:
        """Stations of varying elements: CURVE_PIECES even steps and every quadrature break."""
        if not len(element):
            return cls(element, segment, fraction, np.zeros(0, np.intp), np.zeros(0))
        start, end = fraction[:, :1], fraction[:, 1:]
        # numpy.linspace's own arithmetic, so the stations are those of a linspace call.
        even = np.arange(CURVE_PIECES + 1) * ((end - start) / CURVE_PIECES) + start
        even[:, -1] = end[:, 0]
        rows_even = np.repeat(np.arange(len(element)), CURVE_PIECES + 1)
        bare = cls(element, segment, fraction, np.zeros(len(element), np.intp), np.zeros(0))
        rows_break, breaks, _ = bare._rows_of_breaks(segments)
        row, value, _ = _union(rows_even, even.ravel(), rows_break, breaks)
        counts = np.bincount(row, minlength=len(element)).astype(np.intp)
        return cls(element, segment, fraction, counts, value)

    def integrate(
        self, segments: SegmentTable, segment_length: FloatArray
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """Cumulative flexibility moments, stress per torque and rigidity at the stations.

        Each element is cut at its stations and at the quadrature breaks of the variant's own
        sections (graded so an 8-point Gauss–Legendre rule is exact to rounding on each piece).

        Parameters
        ----------
        segments
            Segment columns, any number of variants.
        segment_length
            (n_variants, n_segments) segment lengths (m).

        Returns
        -------
        moments
            (n_variants, n_stations, 3) ∫₀ᵘ v^k dv/(G·K) at each station (m^k/(N·m)).
        flexibility
            (n_variants, n_varying, 3) the same over each whole element.
        stress_per_torque, rigidity
            (n_variants, n_stations) at the stations (1/m³, N·m²).

        References
        ----------
        .. [1] Davis & Rabinowitz, *Methods of Numerical Integration*, 2nd ed., §2.7 (8-point
           Gauss–Legendre, exact for polynomials of degree 15; from memory).
        .. [2] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4 (φ = ∫T dx/(G·J)).
        """
        n_variants = max(segments.n_variants, segment_length.shape[0])
        n_varying, n_stations = len(self.element), len(self.station_fraction)
        station_row = np.repeat(np.arange(n_varying), self.station_count)
        all_rows = (np.arange(n_variants)[:, None] * n_varying + station_row).ravel()
        all_fractions = np.tile(self.station_fraction, n_variants)
        rows_break, breaks, n_rows = self._rows_of_breaks(segments)
        if n_rows < n_variants:  # one set of diameters for all variants
            offsets = np.arange(n_variants)[:, None] * n_varying
            rows_break = (offsets + rows_break).ravel()
            breaks = np.tile(breaks, n_variants)
        row, value, is_station = _union(all_rows, all_fractions, rows_break, breaks)
        # Pieces between consecutive cut points of one element.
        joined = row[1:] == row[:-1]
        low, high = value[:-1][joined], value[1:][joined]
        piece_row = row[1:][joined]
        variant, element = np.divmod(piece_row, n_varying)
        segment = self.segment[element][:, None]
        length = segment_length[_variant_index(segment_length, variant), self.segment[element]]
        half = 0.5 * (high - low)
        points = (0.5 * (low + high))[:, None] + half[:, None] * _GAUSS_POINTS
        local = (points - self.fraction[element, :1]) * length[:, None]
        rigidity, _ = segment_constants(segments, variant[:, None], segment, points)
        compliance = (half * length)[:, None] * _GAUSS_WEIGHTS / rigidity
        pieces = np.stack([(compliance * local**k).sum(axis=1) for k in range(3)], axis=1)
        # Cumulative sums run element by element, one cut position at a time (a few dozen
        # steps), so that no element's sum carries the rounding of all elements before it.
        position = np.arange(len(row)) - np.searchsorted(row, row)
        cumulative = np.zeros((len(row), 3))
        cumulative[1:][joined] = pieces
        by_position = np.argsort(position, kind="stable")
        bounds = np.searchsorted(position[by_position], np.arange(position.max(initial=0) + 2))
        for step in range(1, len(bounds) - 1):
            at = by_position[bounds[step] : bounds[step + 1]]
            cumulative[at] += cumulative[at - 1]
        moments = cumulative[is_station].reshape(n_variants, n_stations, 3)
        last = np.cumsum(self.station_count) - 1
        flexibility = moments[:, last]
        station_variant = np.arange(n_variants)[:, None]
        station_segment = np.repeat(self.segment, self.station_count)
        rigidity_at, stress_at = segment_constants(
            segments, station_variant, station_segment[None, :], self.station_fraction[None, :]
        )
        shape = (n_variants, n_stations)
        return (
            moments,
            flexibility,
            np.broadcast_to(stress_at, shape),
            np.broadcast_to(rigidity_at, shape),
        )


@dataclass(frozen=True)
class SaintVenantElements:
    """Two-node elements of uniform (Saint-Venant) torsion: one rotation per node.

    The element family the assembly reads: ``dofs_per_node`` and the entries of each element's
    stiffness matrix (an element of a family with n degrees of freedom per node has a 2n × 2n
    matrix on the degrees of freedom of its start node, then its end node).

    Parameters
    ----------
    flexibility
        (n_variants, n_elements, 3) flexibility moments I₀, I₁, I₂.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2-3:
       k = 1/I₀, K_e = k·[[1, −1], [−1, 1]].
    """

    flexibility: FloatArray
    dofs_per_node: int = 1

    @functools.cached_property
    def stiffness(self) -> FloatArray:
        """(n_variants, n_elements) element stiffness 1/I₀ (N·m/rad)."""
        return np.reciprocal(self.flexibility[..., 0])

    @functools.cached_property
    def _negative_stiffness(self) -> FloatArray:
        return np.negative(self.stiffness)

    def stiffness_entry(self, row: int, column: int) -> FloatArray:
        """(n_variants, n_elements) entry (row, column) of every element stiffness matrix."""
        return self.stiffness if row == column else self._negative_stiffness

    def consistent_loads(
        self, elements: IntArray, length: FloatArray, intensity: FloatArray
    ) -> tuple[FloatArray, FloatArray]:
        """Exact nodal loads of a linearly varying distributed torque on some elements.

        Parameters
        ----------
        elements
            (n_loaded,) the loaded elements.
        length
            (n_variants, n_loaded) their lengths (m).
        intensity
            (n_cases, n_variants, n_loaded, 2) intensity at each element's start and end
            (N·m/m).

        Returns
        -------
        start_load, end_load
            (n_cases, n_variants, n_loaded) torque on the start node and on the end node (N·m).

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3:
           fixed-end torque from compatibility, T_a = (t₀·I₁ + s·I₂)/I₀ with t = t₀ + 2s·u.
        """
        moments = self.flexibility[:, elements]
        start, end = intensity[..., 0], intensity[..., 1]
        slope = (end - start) / (2.0 * length)
        start_load = (start * moments[..., 1] + slope * moments[..., 2]) / moments[..., 0]
        total = 0.5 * (start + end) * length
        return start_load, total - start_load


__all__ = [
    "CURVE_PIECES",
    "SaintVenantElements",
    "VaryingElements",
    "segment_constants",
]
