"""The static checks' inputs from arrays: one model, or a batch of variants of its topology.

A :class:`~workbench.design.check_layout.CheckLayout` holds what a topology fixes for its static
checks, with the base model's sizes as defaults. :func:`batch_check_inputs`
turns arrays of V variants × G segments (diameters, bores, fillet radii, hole diameters,
allowables) and each variant's solved arrays (internal torque, stress per unit torque, rigidity,
rotations) into the :class:`~workbench.design.static_checks.StaticCheckInputs` of the batch. Each
stress-concentration fit is called once for every variant and segment
(:func:`~workbench.design.concentration.shoulder_fillet_factors`,
:func:`~workbench.design.transverse_hole.transverse_hole_factors`,
:func:`~workbench.design.allowables.twenty_diameters_twist_rate`); there is no loop over variants
or segments. :func:`workbench.design.checks.model_check_inputs` is the batch of one model.

What is measured where (the rules :mod:`workbench.design.checks` states):

* a shoulder fillet at a segment's start, between one-layer round segments: Kts at D/d of the
  two sides, on the nominal stress of the smaller side under the torque of that side;
* a keyseat or a stated notch on a one-layer round segment: its factor on the largest nominal
  stress of the segment's start, middle and end (where the detail sits is not known);
* a cross hole in a solid round segment: Ktg at d/D of the middle diameter, over the
  equivalent-stress divisor of the criterion (√3 von Mises, 2 otherwise), on the nominal stress
  of the middle diameter;
* the "1° in 20 diameters" twist rule: on the largest outer diameter of a round segment.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 3 (τ = T·r/J), ch. 5 (equivalent stress of a uniaxial normal stress: σ/√3
   von Mises, σ/2 Tresca) and ch. 7 (Kts on the nominal stress).
.. [2] R. L. Norton, *Machine Design*, App. C; W. D. Pilkey and D. F. Pilkey, *Peterson's Stress
   Concentration Factors*, 3rd ed. (the factors, through :mod:`workbench.design.concentration`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from workbench.case.errors import InputError
from workbench.case.units import quote
from workbench.design.allowables import twenty_diameters_twist_rate
from workbench.design.check_layout import CROSS_HOLE, KEYSEAT, NOTCH, SHOULDER, CheckLayout
from workbench.design.concentration import ShoulderFilletFactors, shoulder_fillet_factors
from workbench.design.static_checks import CONCENTRATION_KINDS, BoolArray, StaticCheckInputs
from workbench.design.transverse_hole import TransverseHoleFactors, transverse_hole_factors
from workbench.solver.sections import FloatArray, polar_moment


@dataclass(frozen=True)
class BatchCheckInputs:
    """The static checks' inputs of V variants of one topology, and how their factors were found.

    Attributes
    ----------
    inputs
        What :func:`~workbench.design.static_checks.static_utilisations` judges. A variant that
        is not valid (``valid``) has NaN torques and rotations, so every value of it is NaN.
    shoulder
        (V, G) the shoulder-fillet factors and their range flags; NaN where no shoulder is checked.
    cross_hole
        (V, G) the transverse-hole factors Ktg (before the equivalent-stress divisor).
    twist_diameter
        (V, G) the diameter the twenty-diameters rule was taken on (m); NaN where it was not.
    valid
        (V,) whether every checked detail of the variant has a factor.
    fillet_radius, big_diameter, small_diameter
        (V, G) the shoulders' fillet radii and the diameters of their two sides (m).
    hole_diameter, hole_shaft_diameter, hole_bore
        (V, G) the cross holes' diameters, the shaft diameter at the hole and its bore (m).
    """

    inputs: StaticCheckInputs
    shoulder: ShoulderFilletFactors
    cross_hole: TransverseHoleFactors
    twist_diameter: FloatArray
    valid: BoolArray
    fillet_radius: FloatArray
    big_diameter: FloatArray
    small_diameter: FloatArray
    hole_diameter: FloatArray
    hole_shaft_diameter: FloatArray
    hole_bore: FloatArray

    @property
    def in_range(self) -> BoolArray:
        """(V, 4, G) whether each factor of :data:`CONCENTRATION_KINDS` lies inside its data.

        ``True`` where the segment has no such detail; the keyseat and a stated notch always.
        """
        result = np.ones(self.inputs.concentration.shape, dtype=bool)
        result[:, SHOULDER] = self.shoulder.in_range | np.isnan(self.fillet_radius)
        result[:, CROSS_HOLE] = self.cross_hole.in_range | np.isnan(self.hole_diameter)
        return result

    def problem(self, variant: int, layout: CheckLayout) -> tuple[str, str] | None:
        """The field and message of the first detail of a variant without a factor, or ``None``.

        Parameters
        ----------
        variant
            Index of the variant.
        layout
            The layout the batch was built on (it names the fields).
        """
        shoulder = layout.shoulder & ~self.shoulder.defined[variant]
        hole = layout.cross_hole & (
            ~self.cross_hole.defined[variant] | (self.hole_bore[variant] != 0.0)
        )
        bad = np.flatnonzero(np.stack([shoulder, hole], axis=1).ravel())
        if len(bad) == 0:
            return None
        segment, detail = divmod(int(bad[0]), 2)
        at = (variant, segment)
        if detail == 0:
            radius = float(self.fillet_radius[at])
            if not radius > 0.0:
                msg = (
                    f"must be greater than zero ({quote(radius, 'length')}): a sharp corner has "
                    "no finite stress-concentration factor"
                )
                return layout.field(segment, "fillet_radius"), msg
            sides = f"{quote(self.big_diameter[at], 'length')}, {quote(self.small_diameter[at], 'length')}"
            msg = f"the diameters at the shoulder must be finite and greater than zero ({sides})"
            return layout.field(segment, "section"), msg
        hole_diameter, shaft_diameter = float(self.hole_diameter[at]), self.hole_shaft_diameter[at]
        if not hole_diameter > 0.0:
            return layout.field(segment, "cross_hole_diameter"), (
                f"must be greater than zero ({quote(hole_diameter, 'length')})"
            )
        if self.hole_bore[at] != 0.0:
            return layout.field(segment, "cross_hole_diameter"), (
                "the cross-hole factor is for solid round shafts "
                f"(bore {quote(self.hole_bore[at], 'length')})"
            )
        return layout.field(segment, "cross_hole_diameter"), (
            f"must be smaller than the shaft diameter ({quote(hole_diameter, 'length')} ≥ "
            f"{quote(shaft_diameter, 'length')})"
        )


def _columns(name: str, value: ArrayLike, shape: tuple[int, ...]) -> FloatArray:
    """``value`` as a read-only view of ``shape`` (V, …); one row stands for every variant."""
    array = np.asarray(value, dtype=float)
    try:
        return np.broadcast_to(array, shape)
    except ValueError:
        expected = ", ".join(str(size) for size in shape)
        msg = f"has shape {array.shape}, expected ({expected}) or one row of it"
        raise InputError(name, msg) from None


def _slot_columns(name: str, value: ArrayLike, shape: tuple[int, int, int]) -> FloatArray:
    """(V, K, n) of ``value`` given by layer slot, or as (V, n) when every segment has one layer."""
    array = np.asarray(value, dtype=float)
    if shape[1] > 1 and array.ndim < 3:
        # One value per segment or station cannot say which layer it belongs to.
        msg = f"has shape {array.shape}: the topology has bonded layers, give (V, {shape[1]}, …)"
        raise InputError(name, msg)
    return _columns(name, array[:, None, :] if array.ndim == 2 else array, shape)


def _given(value: ArrayLike | None, default: ArrayLike) -> ArrayLike:
    return default if value is None else value


def _nominal_stress_per_torque(outer_diameter: FloatArray, bore: FloatArray) -> FloatArray:
    """τ_nom per unit torque of round sections, (D/2)/J (1/m³); 16/(πD³) without a bore."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return (outer_diameter / 2.0) / polar_moment(outer_diameter, bore)


def batch_check_inputs(
    layout: CheckLayout,
    torque: ArrayLike,
    stress_per_torque: ArrayLike,
    torsional_rigidity: ArrayLike,
    angle: ArrayLike | None = None,
    station_x: ArrayLike | None = None,
    *,
    outer_diameter_start: ArrayLike | None = None,
    outer_diameter_end: ArrayLike | None = None,
    bore: ArrayLike | None = None,
    fillet_radius: ArrayLike | None = None,
    cross_hole_diameter: ArrayLike | None = None,
    allowable: ArrayLike | None = None,
) -> BatchCheckInputs:
    """The static checks' inputs of V variants of a layout's topology, from plain arrays.

    Shapes: V variants, R results, S stations, P nodes, G segments, K layer slots (those of the
    layout). A per-segment array of shape (G,) or (1, G) stands for every variant; an array left
    out takes the layout's base values.

    Parameters
    ----------
    layout
        The topology's layout (:func:`check_layout` of the base model).
    torque
        (V, R, S) internal torque at each station (N·m), a batched solve's ``torque``.
    stress_per_torque
        (V, S) peak shear stress per unit torque at each station (1/m³), a batched solve's
        ``stress_per_torque``; (V, K, S) per layer slot, required when the topology has bonded
        layers (K > 1).
    torsional_rigidity
        (V, S) G·K at each station (N·m²), a batched solve's ``rigidity``.
    angle
        (V, R, P) rotation of each node (rad), a batched solve's ``node_angle``; may be left out
        when the design has no rotation limit.
    station_x
        (V, S) station positions (m); the layout's when left out.
    outer_diameter_start, outer_diameter_end
        (V, G) outer diameter of each circular segment at its start and end (m), the outermost
        layer's for bonded layers; the end defaults to the start when only the start is given.
    bore
        (V, G) bore diameter of the one-layer round segments (m), 0 for solid ones (a cross hole
        needs 0).
    fillet_radius
        (V, G) fillet radius of the shoulder at each segment's start (m); read where the layout
        checks a shoulder.
    cross_hole_diameter
        (V, G) diameter of each segment's cross hole (m); read where the layout checks one.
    allowable
        (V, G) allowable shear stress (Pa) of one-layer topologies, or (V, K, G) per layer slot.

    Returns
    -------
    BatchCheckInputs
        The inputs of :func:`~workbench.design.static_checks.static_utilisations`, the factors
        with their range flags, and which variants have a factor for every checked detail (the
        others are NaN throughout). A variant a batched solve found invalid comes with NaN
        torques already, so its values are NaN too; its reason is the solve's.

    Raises
    ------
    InputError
        An array of the wrong shape, named by its parameter (with bonded layers in the topology,
        the stresses per torque and allowables must be given per layer slot).

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 3, 5 and 7; Norton, *Machine
       Design*, App. C; Pilkey & Pilkey, *Peterson's Stress Concentration Factors*, 3rd ed.
       (as in the module's references).
    """
    torques = np.asarray(torque, dtype=float)
    if torques.ndim != 3 or torques.shape[2] != len(layout.station_x):
        msg = f"has shape {torques.shape}, expected (V, R, {len(layout.station_x)})"
        raise InputError("torque", msg)
    variants, results, stations = torques.shape
    segments, slots = layout.segments, len(layout.allowable)
    per_segment = (variants, segments)
    per_station, per_slot = (variants, stations), (variants, slots, segments)
    stress = _slot_columns("stress_per_torque", stress_per_torque, (variants, slots, stations))
    rigidity = _columns("torsional_rigidity", torsional_rigidity, per_station)
    positions = _columns("station_x", _given(station_x, layout.station_x), per_station)
    allowables = _slot_columns("allowable", _given(allowable, layout.allowable[None]), per_slot)
    start = _given(outer_diameter_start, layout.outer_diameter_start)
    outer_start = _columns("outer_diameter_start", start, per_segment)
    end = outer_start if outer_diameter_start is not None else layout.outer_diameter_end
    outer_end = _columns("outer_diameter_end", _given(outer_diameter_end, end), per_segment)
    bores = _columns("bore", _given(bore, layout.bore), per_segment)
    radii = _columns("fillet_radius", _given(fillet_radius, layout.fillet_radius), per_segment)
    hole_given = _given(cross_hole_diameter, layout.cross_hole_diameter)
    holes = _columns("cross_hole_diameter", hole_given, per_segment)
    if angle is None:
        if len(layout.rotation_limit):
            raise InputError(
                "angle", "the design has rotation limits: the node rotations are needed"
            )
        angles = np.zeros((variants, results, 0))
    else:
        angles = np.asarray(angle, dtype=float)
        if angles.shape[:2] != (variants, results):
            raise InputError(
                "angle", f"has shape {angles.shape}, expected ({variants}, {results}, P)"
            )

    concentration = np.full((variants, len(CONCENTRATION_KINDS), segments), np.nan)
    nominal = np.full(concentration.shape, np.nan)

    # Shoulder at a segment's start: this segment's start against the previous one's end.
    before_outer = np.full(per_segment, np.nan)
    before_outer[:, 1:] = outer_end[:, :-1]
    before_bore = np.full(per_segment, np.nan)
    before_bore[:, 1:] = bores[:, :-1]
    before_smaller = before_outer < outer_start  # on a tie this side is the smaller
    small = np.where(before_smaller, before_outer, outer_start)
    big = np.where(before_smaller, outer_start, before_outer)
    shoulder_radius = np.where(layout.shoulder, radii, np.nan)
    shoulder = shoulder_fillet_factors(big, small, shoulder_radius)
    concentration[:, SHOULDER] = shoulder.value
    small_bore = np.where(before_smaller, before_bore, bores)
    nominal[:, SHOULDER] = np.where(
        layout.shoulder, _nominal_stress_per_torque(small, small_bore), np.nan
    )
    # The smaller side's torque loads the fillet: the previous segment's last station sits just
    # left of this one's first.
    shoulder_station = layout.segment_start - (layout.shoulder & before_smaller)

    # Keyseat and notch: the smallest diameter (largest nominal stress) of the segment governs;
    # a linear taper is smallest at an end.
    smallest = _nominal_stress_per_torque(np.minimum(outer_start, outer_end), bores)
    concentration[:, KEYSEAT] = np.where(layout.keyseat, layout.keyseat_factor.value, np.nan)
    concentration[:, NOTCH] = layout.notch_kts
    body = ~np.isnan(concentration[:, KEYSEAT : NOTCH + 1])
    nominal[:, KEYSEAT : NOTCH + 1] = np.where(body, smallest[:, None, :], np.nan)

    # Cross hole at the middle diameter; its peak normal stress as an equivalent shear stress.
    middle = outer_start + 0.5 * (outer_end - outer_start)
    hole_diameter = np.where(layout.cross_hole, holes, np.nan)
    cross_hole = transverse_hole_factors(hole_diameter, middle)
    concentration[:, CROSS_HOLE] = cross_hole.value / layout.hole_divisor
    nominal[:, CROSS_HOLE] = np.where(
        layout.cross_hole, _nominal_stress_per_torque(middle, np.zeros(())), np.nan
    )

    if layout.twist_by_diameter:
        twist_diameter = np.where(layout.circular, np.maximum(outer_start, outer_end), np.nan)
        twist_limit = twenty_diameters_twist_rate(twist_diameter)
    else:
        twist_diameter = np.full(per_segment, np.nan)
        twist_limit = np.broadcast_to(layout.twist_rate_limit, per_segment)

    missing = (layout.shoulder & ~shoulder.defined) | (
        layout.cross_hole & (~cross_hole.defined | (bores != 0.0))
    )
    valid = ~missing.any(axis=1)
    if not valid.all():
        # As a batched solve does with a variant that is not a valid model: NaN throughout.
        torques, angles = torques.copy(), angles.copy()
        torques[~valid] = np.nan
        angles[~valid] = np.nan
    inputs = StaticCheckInputs(
        segment_start=layout.segment_start,
        torque=torques,
        station_x=positions,
        stress_per_torque=stress,
        allowable=allowables,
        torsional_rigidity=rigidity,
        twist_rate_limit=twist_limit,
        concentration=concentration,
        nominal_stress_per_torque=nominal,
        shoulder_station=np.broadcast_to(shoulder_station, per_segment),
        angle=angles,
        rotation_start=layout.rotation_start,
        rotation_end=layout.rotation_end,
        rotation_limit=np.broadcast_to(
            layout.rotation_limit, (variants, len(layout.rotation_limit))
        ),
    )
    return BatchCheckInputs(
        inputs,
        shoulder,
        cross_hole,
        twist_diameter,
        valid,
        shoulder_radius,
        big,
        small,
        hole_diameter,
        middle,
        bores,
    )
