"""The static checks as array functions: many variants of one shaft topology judged at once.

A *variant* is one model of a topology: the same shafts, segments, details and stations, other
dimensions, materials or loads. Every array has a leading variant axis, so a batch of variants
(from a batched solve) and the one model of :func:`workbench.design.checks.run_checks` (one
variant) go through the same code, with no Python loop over variants or segments. The letters of
the shapes:

* V variants; R results (load cases and combinations); S stations of the topology, in order;
* G segments, every shaft's in station order (a segment's stations are consecutive);
* K layer slots (1 for one-layer segments; a slot a segment lacks has stress 0 and allowable ∞);
* L rotation limits, P points the rotation limits read angles at (nodes or stations).

The kinds, in the order of :data:`STATIC_KINDS`, and what each compares:

* ``shear_stress``: the largest |T|·s_k of each layer k (s_k its peak shear stress per unit
  segment torque) against the layer's allowable shear stress; the layer with the largest
  utilisation governs, result by result;
* ``shoulder_stress``: Kts·τ_nom at the segment's start, τ_nom = |T|·s on the smaller diameter
  under the torque of that side (the station ``shoulder_station``);
* ``keyseat_stress``, ``notch_stress``, ``cross_hole_stress``: K·|T|·s_nom, largest along the
  segment (where the detail sits is not known); the cross hole's K is already its equivalent
  shear factor;
* ``twist_rate``: the largest |T|/(G·K) along the segment against its limit;

and, apart from the segments, ``rotation``: |θ(end) − θ(start)| against its limit.

A check a segment does not have (no keyseat, no twist limit…) is NaN in value, limit and
utilisation; :attr:`StaticUtilisations.checked` says which exist.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 3 (τ = T·r/J, dθ/dx = T/(G·J)), ch. 5 (allowable shear stress) and ch. 7
   (static shaft design with Kts on the nominal stress).
.. [2] W. D. Pilkey and D. F. Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed., Wiley,
   2008 (τ_max = Kts·τ_nom).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, fields
from typing import Any

import numpy as np

from workbench.solver.sections import FloatArray

IntArray = np.ndarray[Any, np.dtype[np.intp]]
BoolArray = np.ndarray[Any, np.dtype[np.bool_]]

#: The static check kinds of every segment, in the order of the kind axis of the results.
STATIC_KINDS: tuple[str, ...] = (
    "shear_stress",
    "shoulder_stress",
    "keyseat_stress",
    "notch_stress",
    "cross_hole_stress",
    "twist_rate",
)

#: The stress-concentration kinds, in the order of the detail axis of the inputs.
CONCENTRATION_KINDS: tuple[str, ...] = STATIC_KINDS[1:5]


@dataclass(frozen=True)
class StaticCheckInputs:
    """What the static checks read, for V variants of one topology (shapes in the module text).

    Parameters
    ----------
    segment_start
        (G,) index of each segment's first station, increasing from 0; the last segment runs to
        the last station.
    torque
        (V, R, S) internal torque at each station (N·m), signed.
    station_x
        (V, S) position of each station along its shaft (m).
    stress_per_torque
        (V, K, S) peak shear stress of each layer per unit segment torque (1/m³, i.e. Pa per
        N·m); 0 in a slot the segment lacks.
    allowable
        (V, K, G) allowable shear stress of each layer's material (Pa); ``inf`` in a slot the
        segment lacks. Slot 0 is also the limit of the concentrated stresses.
    torsional_rigidity
        (V, S) G·K at each station (N·m²).
    twist_rate_limit
        (V, G) largest allowed rate of twist (rad/m); NaN where the segment is not checked.
    concentration
        (V, 4, G) factor of each detail of :data:`CONCENTRATION_KINDS` (dimensionless): Kts of
        the shoulder, keyseat and notch, σ_max/τ_nom over the equivalent-stress divisor for the
        cross hole; NaN where the segment has no such detail.
    nominal_stress_per_torque
        (V, 4, G) the nominal shear stress per unit torque each factor multiplies (1/m³).
    shoulder_station
        (V, G) the station whose torque loads the shoulder's smaller side: the segment's first
        station, or the one before it (the previous segment's last) when that side is smaller.
    angle
        (V, R, P) rotation at the points the rotation limits read (rad).
    rotation_start, rotation_end
        (L,) the two points (indices into P) of each rotation limit.
    rotation_limit
        (V, L) largest allowed |θ(end) − θ(start)| (rad).
    """

    segment_start: IntArray
    torque: FloatArray
    station_x: FloatArray
    stress_per_torque: FloatArray
    allowable: FloatArray
    torsional_rigidity: FloatArray
    twist_rate_limit: FloatArray
    concentration: FloatArray
    nominal_stress_per_torque: FloatArray
    shoulder_station: IntArray
    angle: FloatArray
    rotation_start: IntArray
    rotation_end: IntArray
    rotation_limit: FloatArray

    def __post_init__(self) -> None:
        variants, _, stations = self.torque.shape
        segments = len(self.segment_start)
        slots = self.stress_per_torque.shape[1]
        limits = len(self.rotation_start)
        expected = {
            "station_x": (variants, stations),
            "stress_per_torque": (variants, slots, stations),
            "allowable": (variants, slots, segments),
            "torsional_rigidity": (variants, stations),
            "twist_rate_limit": (variants, segments),
            "concentration": (variants, len(CONCENTRATION_KINDS), segments),
            "nominal_stress_per_torque": (variants, len(CONCENTRATION_KINDS), segments),
            "shoulder_station": (variants, segments),
            "rotation_end": (limits,),
            "rotation_limit": (variants, limits),
        }
        for name, shape in expected.items():
            if np.shape(getattr(self, name)) != shape:
                msg = f"{name} has shape {np.shape(getattr(self, name))}, expected {shape}"
                raise ValueError(msg)
        if self.angle.shape[:2] != self.torque.shape[:2]:
            msg = f"angle has shape {self.angle.shape}, expected ({variants}, R, P)"
            raise ValueError(msg)
        starts = np.asarray(self.segment_start)
        if (
            segments == 0
            or starts[0] != 0
            or np.any(np.diff(starts) <= 0)
            or starts[-1] >= stations
        ):
            msg = "segment_start must rise from 0, each segment holding at least one station"
            raise ValueError(msg)

    @classmethod
    def stack(cls, inputs: Sequence[StaticCheckInputs]) -> StaticCheckInputs:
        """The inputs of several variant batches of one topology as one batch.

        Raises
        ------
        ValueError
            The batches differ in topology (segment starts, rotation points, array shapes).
        """
        first = inputs[0]
        shared = ("segment_start", "rotation_start", "rotation_end")
        for other in inputs[1:]:
            if any(not np.array_equal(getattr(other, n), getattr(first, n)) for n in shared):
                msg = "the batches stacked are not of one topology"
                raise ValueError(msg)
        arrays = {
            item.name: np.concatenate([getattr(batch, item.name) for batch in inputs])
            for item in fields(cls)
            if item.name not in shared
        }
        return cls(**{name: getattr(first, name) for name in shared}, **arrays)


@dataclass(frozen=True)
class StaticUtilisations:
    """Every static check of V variants: the governing value of each kind, segment and result.

    Attributes
    ----------
    value
        (V, R, C, G) governing value (Pa, or rad/m for ``twist_rate``); C runs over
        :data:`STATIC_KINDS`. NaN where the check does not exist.
    limit
        (V, R, C, G) its limit (same unit); NaN where the check does not exist.
    station
        (V, R, C, G) the station where the value governs (index into S).
    layer
        (V, R, G) the layer slot whose shear stress governs.
    checked
        (V, C, G) whether the check exists.
    rotation_value, rotation_limit
        (V, R, L) and (V, L): |θ(end) − θ(start)| and its limit (rad).
    station_x
        (V, S) the position of every station (m), for :attr:`x`.
    """

    value: FloatArray
    limit: FloatArray
    station: IntArray
    layer: IntArray
    checked: BoolArray
    rotation_value: FloatArray
    rotation_limit: FloatArray
    station_x: FloatArray

    @property
    def x(self) -> FloatArray:
        """(V, R, C, G) where each value governs (m)."""
        variants = len(self.station)
        flat = self.station.reshape(variants, -1)
        return np.take_along_axis(self.station_x, flat, axis=1).reshape(self.station.shape)

    @property
    def utilisation(self) -> FloatArray:
        """(V, R, C, G) value/limit, NaN where the check does not exist.

        A quotient beyond the range of numbers is inf: the check fails (a single model's
        report refuses it by name, :mod:`workbench.design.finite_checks`).
        """
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            utilisation: FloatArray = self.value / self.limit
        return utilisation

    @property
    def rotation_utilisation(self) -> FloatArray:
        """(V, R, L) rotation over its limit (inf beyond the range of numbers, as above)."""
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            utilisation: FloatArray = self.rotation_value / self.rotation_limit[:, None, :]
        return utilisation

    def governing_utilisation(self) -> FloatArray:
        """(V,) the largest utilisation of each variant over every static check and rotation.

        NaN only for a variant whose values are all NaN (a variant the batch could not solve).
        """
        # Kinds and segments first, as static_utilisations lays the arrays out in memory: the
        # reduction is then elementwise over whole (V, R) slabs.
        by_kind = self.utilisation.transpose(2, 3, 0, 1)
        slabs = by_kind.reshape(-1, *by_kind.shape[2:])
        segments = np.fmax.reduce(np.fmax.reduce(slabs, axis=0), axis=-1)
        if self.rotation_value.shape[-1] == 0:
            return segments
        return np.fmax(segments, np.fmax.reduce(self.rotation_utilisation, axis=(1, 2)))


def segment_peaks(values: FloatArray, segment_start: IntArray) -> tuple[FloatArray, IntArray]:
    """The largest value in each segment and the first station where it occurs.

    Parameters
    ----------
    values
        (..., S) a quantity at every station, any unit.
    segment_start
        (G,) index of each segment's first station (increasing from 0).

    Returns
    -------
    tuple of numpy.ndarray
        (..., G) the peaks (same unit) and the index of the station of each: the first one on a
        tie, and a NaN anywhere in a segment makes its peak NaN at the first NaN, as
        :func:`numpy.max` and :func:`numpy.argmax` do.
    """
    stations_first = np.ascontiguousarray(np.moveaxis(values, -1, 0))
    peaks, stations = _peaks_by_segment(stations_first, segment_start)
    return np.moveaxis(peaks, 0, -1), np.moveaxis(stations, 0, -1)


def _peaks_by_segment(values: FloatArray, segment_start: IntArray) -> tuple[FloatArray, IntArray]:
    """:func:`segment_peaks` of (S, ...) values, as (G, ...) arrays.

    The segments' first stations are compared with their second ones, then their third ones…,
    each step one elementwise pass over every variant and segment at once (a reduction along a
    short axis, or ``numpy.maximum.reduceat``, is an order of magnitude slower per element).
    """
    counts = np.diff(np.append(segment_start, len(values)))
    peaks = values[segment_start]
    offsets = np.zeros(peaks.shape, dtype=np.intp)
    for step in range(1, int(counts.max())):  # stations within the longest segment
        rows = np.flatnonzero(counts > step)
        every = len(rows) == len(counts)
        candidate = values[segment_start[rows] + step]
        current = peaks if every else peaks[rows]
        chosen = offsets if every else offsets[rows]
        better = (candidate > current) | np.isnan(candidate)
        better &= ~np.isnan(current)
        np.copyto(current, candidate, where=better)
        np.copyto(chosen, step, where=better)
        if not every:
            peaks[rows], offsets[rows] = current, chosen
    offsets += segment_start.reshape(-1, *(1,) * (peaks.ndim - 1))
    return peaks, offsets


def station_segments(segment_start: IntArray, stations: int) -> IntArray:
    """(S,) the segment of each station, from each segment's first station (increasing from 0)."""
    counts = np.diff(np.append(segment_start, stations))
    return np.repeat(np.arange(len(segment_start)), counts)


def station_concentrated_stresses(inputs: StaticCheckInputs, variant: int = 0) -> FloatArray:
    """The stresses the concentration checks judge, station by station, for one variant.

    Each is K·(|T|·s_nom) with the factor K and nominal stress per torque s_nom the checks use,
    in the same order of operations, so a segment's largest is the check's value to the last
    bit (multiplying by a positive number keeps the order of the torques).

    Parameters
    ----------
    inputs
        The batch the checks judge (shapes and units in :class:`StaticCheckInputs`).
    variant
        Which variant of the batch.

    Returns
    -------
    numpy.ndarray
        (R, 4, S) stress (Pa) of each kind of :data:`CONCENTRATION_KINDS` at every station of
        the segments that have the detail, NaN elsewhere. A shoulder has one value, at its
        segment's first station, under the torque of the smaller side (``shoulder_station``).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 7 (τ_max = Kts·τ_nom).
    """
    start = inputs.segment_start
    magnitude = np.abs(inputs.torque[variant])  # (R, S)
    segment = station_segments(start, magnitude.shape[-1])
    factor = inputs.concentration[variant][:, segment]  # (4, S)
    nominal = inputs.nominal_stress_per_torque[variant][:, segment]
    stress: FloatArray = factor * (magnitude[:, None, :] * nominal)
    shoulder = np.full(magnitude.shape, np.nan)
    shoulder_torque = magnitude[:, inputs.shoulder_station[variant]]  # (R, G)
    first = inputs.concentration[variant, 0] * (
        shoulder_torque * inputs.nominal_stress_per_torque[variant, 0]
    )
    shoulder[:, start] = first
    stress[:, 0] = shoulder
    return stress


def static_utilisations(inputs: StaticCheckInputs) -> StaticUtilisations:
    """Judge every static check of every variant, result and segment at once.

    Parameters
    ----------
    inputs
        The batch (shapes and units in :class:`StaticCheckInputs`).

    Returns
    -------
    StaticUtilisations
        Values, limits, where each governs, and which checks exist.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 3 (τ = T·r/J,
       dθ/dx = T/(G·J)) and ch. 7 (τ_max = Kts·τ_nom), as in the module's references.

    Examples
    --------
    >>> import numpy as np
    >>> one = StaticCheckInputs(
    ...     segment_start=np.array([0]), torque=np.array([[[100.0, -300.0]]]),
    ...     station_x=np.array([[0.0, 1.0]]), stress_per_torque=np.full((1, 1, 2), 1e5),
    ...     allowable=np.array([[[60e6]]]), torsional_rigidity=np.full((1, 2), 1e4),
    ...     twist_rate_limit=np.array([[0.05]]), concentration=np.full((1, 4, 1), np.nan),
    ...     nominal_stress_per_torque=np.full((1, 4, 1), np.nan),
    ...     shoulder_station=np.zeros((1, 1), dtype=np.intp), angle=np.zeros((1, 1, 0)),
    ...     rotation_start=np.zeros(0, dtype=np.intp), rotation_end=np.zeros(0, dtype=np.intp),
    ...     rotation_limit=np.zeros((1, 0)))
    >>> judged = static_utilisations(one)
    >>> float(judged.value[0, 0, 0, 0]), float(judged.x[0, 0, 0, 0])
    (30000000.0, 1.0)
    >>> float(judged.governing_utilisation()[0])
    0.6
    """
    start = inputs.segment_start
    variants, results, _ = inputs.torque.shape
    segments = len(start)
    # Stations (then segments) first in memory: a segment's stations are then whole rows.
    magnitude = np.abs(np.moveaxis(inputs.torque, -1, 0), order="C")  # (S, V, R)
    by_segment = (len(STATIC_KINDS), segments, variants, results)  # (C, G, V, R)
    value, limit = np.empty(by_segment), np.empty(by_segment)
    station = np.empty(by_segment, dtype=np.intp)

    value[0], layer, limit[0], station[0] = _governing_layer(inputs, magnitude)

    # K·|T|·s_nom along a segment peaks where |T| does: one pass over the stations serves the
    # keyseat, the notch and the cross hole; the shoulder reads one station's torque instead.
    torque_peak, torque_station = _peaks_by_segment(magnitude, start)
    shoulder_torque = magnitude[inputs.shoulder_station.T, np.arange(variants)]  # (G, V, R)
    factor = np.moveaxis(inputs.concentration, 0, -1)[..., None]  # (4, G, V, 1)
    nominal = np.moveaxis(inputs.nominal_stress_per_torque, 0, -1)[..., None]
    details = slice(1, 1 + len(CONCENTRATION_KINDS))  # the shoulder, then the body's details
    body = slice(2, details.stop)
    value[1] = factor[0] * (shoulder_torque * nominal[0])
    value[body] = factor[1:] * (torque_peak * nominal[1:])
    station[1] = start[:, None, None]
    station[body] = torque_station
    detail_allowable = inputs.allowable[:, 0, :].T[..., None]  # (G, V, 1)
    limit[details] = np.where(np.isnan(factor), np.nan, detail_allowable)

    twist_limit = inputs.twist_rate_limit.T[..., None]  # (G, V, 1)
    limit[-1] = twist_limit
    if np.isnan(twist_limit).all():  # no twist limit anywhere: skip the pass over the stations
        value[-1], station[-1] = np.nan, start[:, None, None]
    else:
        rigidity = inputs.torsional_rigidity.T[..., None]  # (S, V, 1)
        value[-1], station[-1] = _peaks_by_segment(magnitude / rigidity, start)
        value[-1][np.isnan(limit[-1])] = np.nan

    checked = np.concatenate(
        [
            np.ones((variants, 1, segments), dtype=bool),
            ~np.isnan(inputs.concentration),
            ~np.isnan(inputs.twist_rate_limit)[:, None, :],
        ],
        axis=1,
    )
    rotation = np.abs(
        inputs.angle[..., inputs.rotation_end] - inputs.angle[..., inputs.rotation_start]
    )
    to_variants_first = (2, 3, 0, 1)  # (C, G, V, R) -> (V, R, C, G), a view
    return StaticUtilisations(
        value.transpose(to_variants_first),
        limit.transpose(to_variants_first),
        station.transpose(to_variants_first),
        np.moveaxis(layer, 0, -1),
        checked,
        rotation,
        inputs.rotation_limit,
        inputs.station_x,
    )


def _governing_layer(
    inputs: StaticCheckInputs, magnitude: FloatArray
) -> tuple[FloatArray, IntArray, FloatArray, IntArray]:
    """(G, V, R) shear stress, layer slot, allowable and station of the governing layer.

    ``magnitude`` is |T| as (S, V, R). The layer with the largest utilisation governs; on a tie
    the lower slot.
    """
    stress = magnitude * inputs.stress_per_torque[:, 0, :].T[..., None]
    peak, station = _peaks_by_segment(stress, inputs.segment_start)
    allowable = np.broadcast_to(inputs.allowable[:, 0, :].T[..., None], peak.shape).copy()
    layer = np.zeros(peak.shape, dtype=np.intp)
    utilisation = peak / allowable
    for slot in range(1, inputs.stress_per_torque.shape[1]):  # layer slots, not segments
        stress = magnitude * inputs.stress_per_torque[:, slot, :].T[..., None]
        slot_peak, slot_station = _peaks_by_segment(stress, inputs.segment_start)
        slot_allowable = inputs.allowable[:, slot, :].T[..., None]
        slot_utilisation = slot_peak / slot_allowable
        better = slot_utilisation > utilisation
        np.copyto(peak, slot_peak, where=better)
        np.copyto(station, slot_station, where=better)
        np.copyto(allowable, np.broadcast_to(slot_allowable, peak.shape), where=better)
        np.copyto(layer, slot, where=better)
        np.copyto(utilisation, slot_utilisation, where=better)
    return peak, layer, allowable, station
