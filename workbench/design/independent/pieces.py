"""Pieces of the shafts between load points and their flexibility moments ∫ξᵏ dx/(G·J).

Every shaft is cut at its segment ends, supports, gears, concentrated torques and the ends of
distributed torques; inside a piece the rigidity G·J(x) is smooth and the internal torque a
polynomial of degree ≤ 2 in ξ = x − x_piece. The check then needs only the three moments

    I_k = ∫₀^ℓ ξᵏ dξ / (G·J(x_piece + ξ)),   k = 0, 1, 2,

which are exact, ℓᵏ⁺¹/((k + 1)·G·J), on a prismatic piece. On a tapered piece they come from
Gauss–Legendre quadrature (all tapered pieces at once), checked against a rule of twice the
order; a piece where the two differ by more than 10⁻¹³ is integrated by
:func:`scipy.integrate.quad` instead.

References
----------
.. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4: φ = ∫T dx/(G·J(x)).
.. [2] P. J. Davis and P. Rabinowitz, *Methods of Numerical Integration*, 2nd ed., Academic
   Press, 1984, §2.7 (Gauss–Legendre rules).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np
from scipy import integrate

from workbench.case.declaration import POSITION_TOLERANCE
from workbench.design.independent.reading import FloatArray, IntArray, System

__all__ = ["Pieces", "cut_pieces", "flexibility_moments"]

#: Points of the Gauss–Legendre rule on a tapered piece (checked against twice as many).
_GAUSS_POINTS = 40
#: Largest relative difference between the two rules accepted before quad takes over.
_RULE_AGREEMENT = 1e-13


@dataclass(frozen=True)
class Pieces:
    """The pieces of every shaft, shaft after shaft, each in order along its shaft.

    Attributes
    ----------
    shaft, segment
        Shaft and segment number of each piece.
    start, length
        Where the piece starts on its shaft and its length (m).
    first
        Index of each shaft's first piece (n_shafts + 1 entries, the last the total).
    breaks
        Each shaft's cut points (m), 0 and its length included.
    """

    shaft: IntArray
    segment: IntArray
    start: FloatArray
    length: FloatArray
    first: IntArray
    breaks: tuple[FloatArray, ...]

    def index_at(self, shaft: IntArray, x: FloatArray) -> IntArray:
        """Index of the piece that starts at x on each shaft (m).

        The shaft's next index after its last piece when x is its far end: a load at x acts on
        this piece and the ones after.
        """
        found = np.empty(len(x), dtype=np.int64)
        for number, breaks in enumerate(self.breaks):  # per shaft: a few shafts
            mine = shaft == number
            tolerance = POSITION_TOLERANCE * breaks[-1]
            local = np.searchsorted(breaks, x[mine] - tolerance)
            found[mine] = self.first[number] + local
        return found


def cut_pieces(system: System) -> Pieces:
    """The pieces of every shaft of ``system``, cut at every point where something acts."""
    positions = [
        (system.segment_shaft, system.segment_start),
        (system.support_shaft, system.support_x),
        (system.gear_shaft.ravel(), system.gear_x.ravel()),
        (system.point_shaft, system.point_x),
        (system.spread_shaft, system.spread_start),
        (system.spread_shaft, system.spread_end),
    ]
    shafts = np.concatenate([shaft for shaft, _ in positions])
    xs = np.concatenate([x for _, x in positions])
    segment_end = system.segment_start + system.segment_length
    all_breaks, starts, lengths, segments, owners, first = [], [], [], [], [], [0]
    for number, length in enumerate(system.shaft_lengths):
        cuts = np.sort(np.concatenate([[0.0, length], xs[shafts == number]]))
        cuts = np.clip(cuts, 0.0, length)
        keep = np.concatenate([[True], np.diff(cuts) > POSITION_TOLERANCE * length])
        cuts = cuts[keep]
        cuts[-1] = length  # the far end stays exact, a cut within tolerance of it merges
        if len(cuts) < 2:
            cuts = np.array([0.0, length])
        mine = np.flatnonzero(system.segment_shaft == number)
        middle = 0.5 * (cuts[:-1] + cuts[1:])
        local = np.clip(np.searchsorted(segment_end[mine], middle), 0, len(mine) - 1)
        all_breaks.append(cuts)
        starts.append(cuts[:-1])
        lengths.append(np.diff(cuts))
        segments.append(mine[local])
        owners.append(np.full(len(middle), number, dtype=np.int64))
        first.append(first[-1] + len(middle))
    return Pieces(
        shaft=np.concatenate(owners),
        segment=np.concatenate(segments),
        start=np.concatenate(starts),
        length=np.concatenate(lengths),
        first=np.array(first, dtype=np.int64),
        breaks=tuple(all_breaks),
    )


def _tapered_rigidity(
    system: System, pieces: Pieces, chosen: IntArray, xi: FloatArray
) -> FloatArray:
    """G·J at ξ (m) along each chosen piece, shape (len(chosen), xi.shape[-1]) in N·m²."""
    segment = pieces.segment[chosen]
    u = (pieces.start[chosen, None] - system.segment_start[segment, None] + xi) / (
        system.segment_length[segment, None]
    )
    rigidity = np.repeat(system.segment_constant[segment, None], u.shape[1], axis=1)
    # Pair every chosen piece with each tapered layer of its segment.
    order = np.argsort(system.taper_segment, kind="stable")
    layer_segments = system.taper_segment[order]
    low = np.searchsorted(layer_segments, segment, side="left")
    high = np.searchsorted(layer_segments, segment, side="right")
    count = high - low
    row = np.repeat(np.arange(len(chosen)), count)
    layer = order[
        np.repeat(low, count)
        + (np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count))
    ]
    diameter = system.taper_start[layer, None] + system.taper_change[layer, None] * u[row]
    np.add.at(rigidity, row, system.taper_scale[layer, None] * diameter**4)
    return rigidity


@functools.cache
def _gauss_rule(points: int) -> tuple[FloatArray, FloatArray]:
    """Nodes and weights of the Gauss–Legendre rule on [−1, 1] (computed once per order)."""
    return np.polynomial.legendre.leggauss(points)


def _gauss_moments(system: System, pieces: Pieces, chosen: IntArray, points: int) -> FloatArray:
    nodes, weights = _gauss_rule(points)
    half = 0.5 * pieces.length[chosen, None]
    xi = half * (nodes + 1.0)
    flexibility = half * weights / _tapered_rigidity(system, pieces, chosen, xi)
    return np.stack([np.sum(flexibility * xi**k, axis=1) for k in range(3)], axis=1)


def flexibility_moments(system: System, pieces: Pieces) -> FloatArray:
    """I_k = ∫₀^ℓ ξᵏ dξ/(G·J) of every piece, shape (n_pieces, 3), in m^(k+1)/(N·m²).

    Parameters
    ----------
    system
        The case's arrays.
    pieces
        Its pieces (:func:`cut_pieces`).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.4.
    .. [2] Davis & Rabinowitz, *Methods of Numerical Integration*, 2nd ed., §2.7.
    """
    length = pieces.length
    moments = np.empty((len(length), 3))
    is_tapered = np.isin(pieces.segment, system.taper_segment)
    rigidity = np.where(is_tapered, 1.0, system.segment_constant[pieces.segment])
    for k in range(3):
        moments[:, k] = length ** (k + 1) / ((k + 1) * rigidity)
    tapered = np.flatnonzero(is_tapered)
    if len(tapered) == 0:
        return moments
    coarse = _gauss_moments(system, pieces, tapered, _GAUSS_POINTS)
    fine = _gauss_moments(system, pieces, tapered, 2 * _GAUSS_POINTS)
    moments[tapered] = fine
    spread = np.max(np.abs(fine - coarse) / np.abs(fine), axis=1)
    for number in tapered[spread > _RULE_AGREEMENT]:  # only pieces the rules disagree on
        chosen = np.array([number])

        def integrand(xi: float, k: int, chosen: IntArray = chosen) -> float:
            value = _tapered_rigidity(system, pieces, chosen, np.array([[xi]]))
            return float(xi**k / value[0, 0])

        for k in range(3):
            moments[number, k], _ = integrate.quad(
                integrand,
                0.0,
                float(length[number]),
                args=(k,),
                epsabs=0.0,
                epsrel=1e-13,
                limit=200,
            )
    return moments
