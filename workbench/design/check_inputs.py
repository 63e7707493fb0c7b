"""The static checks' inputs from arrays: one model, or a batch of variants of its topology.

A :class:`CheckLayout` (:func:`check_layout`) holds what a topology fixes for its static checks —
which segment carries which detail, the stations of each segment, the points the rotation limits
read, the design's rules — with the base model's sizes as defaults. :func:`batch_check_inputs`
turns arrays of V variants × G segments (diameters, bores, fillet radii, hole diameters,
allowables) and each variant's solved arrays (internal torque, stress per unit torque, rigidity,
rotations) into the :class:`~workbench.design.static_checks.StaticCheckInputs` of the batch. Each
stress-concentration fit is called once for every variant and segment
(:func:`~workbench.design.concentration.shoulder_fillet_factors`,
:func:`~workbench.design.concentration.transverse_hole_factors`,
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

import math
from dataclasses import dataclass
from typing import Protocol

import numpy as np
from numpy.typing import ArrayLike

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.case.materials import Material
from workbench.case.units import quote
from workbench.design.allowables import (
    TWIST_RATE_PRESETS,
    Allowable,
    allowable_shear_stress,
    twenty_diameters_twist_rate,
)
from workbench.design.concentration import (
    ShoulderFilletFactors,
    TransverseHoleFactors,
    keyseat_kts,
    shoulder_fillet_factors,
    transverse_hole_factors,
)
from workbench.design.static_checks import (
    CONCENTRATION_KINDS,
    BoolArray,
    IntArray,
    StaticCheckInputs,
)
from workbench.solver.model import Model, Segment
from workbench.solver.sections import FloatArray, polar_moment

SHOULDER, KEYSEAT, NOTCH, CROSS_HOLE = range(len(CONCENTRATION_KINDS))

#: The rows of the report notes of one segment come in this order: the details, then the twist.
TWIST_NOTE = len(CONCENTRATION_KINDS)


class CheckMesh(Protocol):
    """What a layout reads of a solved topology's mesh (stations and nodes are per topology)."""

    @property
    def element_shaft(self) -> IntArray:
        """(elements,) the shaft of each element."""

    @property
    def element_segment(self) -> IntArray:
        """(elements,) the segment of each element, its index on its shaft."""

    @property
    def station_element(self) -> IntArray:
        """(S,) the element of each station."""

    @property
    def station_x(self) -> FloatArray:
        """(S,) the position of each station on its shaft (m)."""

    @property
    def station_stress_per_torque(self) -> FloatArray:
        """(S,) peak shear stress per unit torque (1/m³)."""

    def node_of(self, shaft_number: int, x: float) -> int:
        """Index of the node at position x (m) of a shaft."""


@dataclass(frozen=True)
class CheckLayout:
    """What a topology fixes for its static checks, with its base model's sizes.

    Shapes: G segments (every shaft's, in station order), K layer slots, S stations, L rotation
    limits. Sizes are SI; NaN where a segment has no such size (no fillet, not round…).

    Attributes
    ----------
    segment_start
        (G,) index of each segment's first station.
    shaft_ids, shaft_number, number
        The shafts' ids; (G,) each segment's shaft (index into ``shaft_ids``) and its index on it.
    circular
        (G,) every layer circular: the twenty-diameters rule applies.
    shoulder, keyseat, cross_hole
        (G,) the segment has the detail and the check can judge it: a fillet at its start
        between one-layer round segments, a keyseat on a one-layer round segment, a cross hole
        in a solid round one.
    notch_kts
        (G,) the Kts stated for a one-layer round segment's notch; NaN for none.
    notch_labels
        (G,) the notch's name ("" for none).
    outer_diameter_start, outer_diameter_end
        (G,) the base's outer diameter at each end of the circular segments, the outermost
        layer's for bonded layers (m).
    bore
        (G,) the base's bore of the one-layer round segments, 0 for solid (m).
    fillet_radius, cross_hole_diameter
        (G,) the base's fillet radii (of the checked shoulders) and hole diameters (m).
    allowable
        (K, G) allowable shear stress of each layer's material (Pa), ``inf`` in a missing slot.
    layer_notes
        (G,) the basis of each layer's allowable.
    stress_per_torque
        (K, S) the base's peak shear stress of each layer per unit segment torque (1/m³).
    station_x
        (S,) the base's station positions (m).
    twist_rate_limit
        (G,) a limit that does not depend on the diameter (rad/m), NaN for none.
    twist_basis
        The basis of that limit, for reports.
    twist_by_diameter
        Whether the limit is the twenty-diameters rule, on each circular segment's diameter.
    hole_divisor
        σ_max over the equivalent shear stress at a cross hole: √3 (von Mises) or 2.
    rotation_start, rotation_end, rotation_limit
        (L,) the two nodes of each rotation limit and its limit (rad).
    rotation_shafts, rotation_ends
        (L,) the shaft id and end position (m) of each rotation limit.
    unchecked
        (segment, note slot, text) of each detail or rule the checks cannot judge.
    """

    segment_start: IntArray
    shaft_ids: tuple[str, ...]
    shaft_number: IntArray
    number: IntArray
    circular: BoolArray
    shoulder: BoolArray
    keyseat: BoolArray
    cross_hole: BoolArray
    notch_kts: FloatArray
    notch_labels: tuple[str, ...]
    outer_diameter_start: FloatArray
    outer_diameter_end: FloatArray
    bore: FloatArray
    fillet_radius: FloatArray
    cross_hole_diameter: FloatArray
    allowable: FloatArray
    layer_notes: tuple[tuple[str, ...], ...]
    stress_per_torque: FloatArray
    station_x: FloatArray
    twist_rate_limit: FloatArray
    twist_basis: str
    twist_by_diameter: bool
    hole_divisor: float
    rotation_start: IntArray
    rotation_end: IntArray
    rotation_limit: FloatArray
    rotation_shafts: tuple[str, ...]
    rotation_ends: tuple[float, ...]
    unchecked: tuple[tuple[int, int, str], ...]

    @property
    def segments(self) -> int:
        """G, the number of segments."""
        return len(self.segment_start)

    def field(self, segment: int, key: str) -> str:
        """The case-file path of a key of segment ``segment`` (index over all shafts)."""
        shaft, number = int(self.shaft_number[segment]), int(self.number[segment])
        return f"shafts[{shaft}].segments[{number}].{key}"


def _fixed_twist_limit(design: DesignCriteria) -> tuple[float, str]:
    """The twist-rate limit (rad/m) that does not depend on a diameter, with its basis.

    NaN and "" when the design sets none, or sets the twenty-diameters rule.
    """
    preset = design.twist_rate_preset
    if preset is not None and preset != "twenty-diameters":
        rule = TWIST_RATE_PRESETS[preset]
        return rule.value, f"{rule.label}: {rule.source}"
    if preset is None and design.max_twist_rate is not None:
        return design.max_twist_rate, "stated limit"
    return math.nan, ""


#: Fractions of a segment's length at its two ends.
_ENDS = np.array([0.0, 1.0])


class _Allowables:
    """Each material's allowable shear stress under the design, found once per material."""

    def __init__(self, design: DesignCriteria) -> None:
        self.design = design
        self.found: dict[int, Allowable] = {}

    def __call__(self, material: Material) -> Allowable:
        key = id(material)
        if key not in self.found:
            self.found[key] = allowable_shear_stress(
                material,
                self.design.shear_criterion,
                self.design.factor_of_safety,
                keyway=self.design.keyway,
                stated_allowable=self.design.allowable_shear_stress,
            )
        return self.found[key]


def _layer_stress_factors(segment: Segment, fractions: FloatArray) -> list[FloatArray]:
    """Peak stress of each bonded layer per unit segment torque (1/m³), at fractions.

    Layer i carries Tᵢ = T·GᵢKᵢ/ΣGK (the layers share the twist).
    """
    rigidity = segment.torsional_rigidity_at(fractions)
    return [
        layer.material.shear_modulus
        * layer.section.torsion_constant_at(fractions)
        * layer.section.shear_stress_per_torque_at(fractions)
        / rigidity
        for layer in segment.layers
    ]


def check_layout(model: Model, mesh: CheckMesh, design: DesignCriteria) -> CheckLayout:
    """The layout of a model's static checks: its topology's details, rules and base sizes.

    Parameters
    ----------
    model
        The base model (SI); every variant of a batch shares its topology.
    mesh
        Its mesh (stations of each segment, nodes of the rotation limits).
    design
        Criteria: shear criterion and factor of safety, twist-rate limit, rotation limits.

    Returns
    -------
    CheckLayout
        What :func:`batch_check_inputs` needs besides the arrays of the variants.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8: bonded layers share the
       twist, layer i carries T·GᵢKᵢ/ΣGK.
    """
    offsets = np.cumsum([0, *(len(shaft.segments) for shaft in model.shafts)])
    station_segment = (
        offsets[mesh.element_shaft[mesh.station_element]]
        + mesh.element_segment[mesh.station_element]
    )
    start = np.flatnonzero(np.diff(station_segment, prepend=-1))
    end = np.append(start[1:], len(station_segment))
    segments = [
        (shaft_number, number, shaft, segment)
        for shaft_number, shaft in enumerate(model.shafts)
        for number, segment in enumerate(shaft.segments)
    ]
    count = len(segments)
    slots = max(len(segment.layers) for *_, segment in segments)
    stress = np.zeros((slots, len(station_segment)))
    stress[0] = mesh.station_stress_per_torque
    allowable = np.full((slots, count), np.inf)
    circular, one_round = np.zeros(count, dtype=bool), np.zeros(count, dtype=bool)
    shoulder, keyseat = np.zeros(count, dtype=bool), np.zeros(count, dtype=bool)
    outer = np.full((2, count), np.nan)  # at the start and the end
    bore, fillet_radius, hole_diameter, notch_kts = np.full((4, count), np.nan)
    notch_labels, layer_notes = [""] * count, []
    unchecked: list[tuple[int, int, str]] = []
    allowables = _Allowables(design)
    # Reading the segment objects into columns; the factors are computed on the columns.
    for index, (_, number, shaft, segment) in enumerate(segments):
        layered = len(segment.layers) > 1
        bases = []
        for slot, layer in enumerate(segment.layers):
            found = allowables(layer.material)
            allowable[slot, index] = found.value
            bases.append((f"layer {slot}: " if layered else "") + found.basis)
        layer_notes.append(tuple(bases))
        if layered:
            window = slice(start[index], end[index])
            fractions = np.clip(
                (mesh.station_x[window] - shaft.boundaries[number]) / segment.length, 0.0, 1.0
            )
            for slot, factor in enumerate(_layer_stress_factors(segment, fractions)):
                stress[slot, window] = factor
        circular[index] = all(layer.section.circular for layer in segment.layers)
        one_round[index] = circular[index] and not layered
        if circular[index]:
            radii = [layer.section.outer_radius_at(_ENDS) for layer in segment.layers]
            outer[:, index] = 2.0 * np.max(radii, axis=0)
        if one_round[index]:
            bore[index] = 2.0 * float(segment.layers[0].section.inner_radius_at(0.5))
        what = f"{shaft.id} segment {number}"
        if segment.fillet_radius is not None and number > 0:
            shoulder[index] = one_round[index] and one_round[index - 1]
            if shoulder[index]:
                fillet_radius[index] = segment.fillet_radius
            else:
                text = f"{what}: the shoulder check needs one-layer round segments on both sides"
                unchecked.append((index, SHOULDER, f"{text}; not checked"))
        if segment.keyseat:
            keyseat[index] = one_round[index]
            if not keyseat[index]:
                text = f"{what}: the keyseat factor is for one-layer round segments; not checked"
                unchecked.append((index, KEYSEAT, text))
        if segment.notch is not None:
            notch_labels[index] = label = segment.notch.label
            if one_round[index]:
                notch_kts[index] = segment.notch.kts
            else:
                text = f"{what}: the {label} factor is for one-layer round segments; not checked"
                unchecked.append((index, NOTCH, text))
        if segment.cross_hole_diameter is not None:
            if bore[index] == 0.0:  # a solid one-layer round segment
                hole_diameter[index] = segment.cross_hole_diameter
            else:
                text = f"{what}: the cross-hole factor is for solid round shafts; not checked"
                unchecked.append((index, CROSS_HOLE, text))
        if design.twist_rate_preset == "twenty-diameters" and not circular[index]:
            text = f"{what}: the twist-rate rule needs a round segment; not checked"
            unchecked.append((index, TWIST_NOTE, text))
    limits = design.rotation_limits
    nodes = np.array(
        [
            [mesh.node_of(model.shaft_number(limit.shaft), at) for at in (limit.start, limit.end)]
            for limit in limits
        ],
        dtype=np.intp,
    ).reshape(-1, 2)
    twist_limit, twist_basis = _fixed_twist_limit(design)
    return CheckLayout(
        segment_start=start,
        shaft_ids=tuple(shaft.id for shaft in model.shafts),
        shaft_number=np.array([item[0] for item in segments], dtype=np.intp),
        number=np.array([item[1] for item in segments], dtype=np.intp),
        circular=circular,
        shoulder=shoulder,
        keyseat=keyseat,
        cross_hole=~np.isnan(hole_diameter),
        notch_kts=notch_kts,
        notch_labels=tuple(notch_labels),
        outer_diameter_start=outer[0],
        outer_diameter_end=outer[1],
        bore=bore,
        fillet_radius=fillet_radius,
        cross_hole_diameter=hole_diameter,
        allowable=allowable,
        layer_notes=tuple(layer_notes),
        stress_per_torque=stress,
        station_x=np.asarray(mesh.station_x, dtype=float),
        twist_rate_limit=np.full(count, twist_limit),
        twist_basis=twist_basis,
        twist_by_diameter=design.twist_rate_preset == "twenty-diameters",
        hole_divisor=math.sqrt(3.0) if design.shear_criterion == "von_mises" else 2.0,
        rotation_start=nodes[:, 0].copy(),
        rotation_end=nodes[:, 1].copy(),
        rotation_limit=np.array([limit.limit for limit in limits], dtype=float),
        rotation_shafts=tuple(limit.shaft for limit in limits),
        rotation_ends=tuple(limit.end for limit in limits),
        unchecked=tuple(unchecked),
    )


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


def _columns(
    name: str, value: ArrayLike | None, default: ArrayLike, shape: tuple[int, ...]
) -> FloatArray:
    """``value`` (or ``default``) as a read-only (V, …) view of ``shape``; one row stands for all."""
    array = np.asarray(default if value is None else value, dtype=float)
    try:
        return np.broadcast_to(array, shape)
    except ValueError:
        expected = ", ".join(str(size) for size in shape)
        msg = f"has shape {array.shape}, expected ({expected}) or one row of it"
        raise InputError(name, msg) from None


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
        others are NaN throughout).

    Raises
    ------
    InputError
        An array of the wrong shape, named by its parameter.

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
    stress = np.asarray(stress_per_torque, dtype=float)
    if stress.ndim == 2 and slots == 1:
        stress = stress[:, None, :]
    stress = _columns("stress_per_torque", stress, stress, (variants, slots, stations))
    rigidity = _columns("torsional_rigidity", torsional_rigidity, (), (variants, stations))
    positions = _columns("station_x", station_x, layout.station_x, (variants, stations))
    if allowable is not None and slots == 1 and np.ndim(allowable) == 2:
        allowable = np.asarray(allowable, dtype=float)[:, None, :]
    allowables = _columns("allowable", allowable, layout.allowable, (variants, slots, segments))
    outer_start = _columns(
        "outer_diameter_start", outer_diameter_start, layout.outer_diameter_start, per_segment
    )
    end_default = layout.outer_diameter_end if outer_diameter_start is None else outer_start
    outer_end = _columns("outer_diameter_end", outer_diameter_end, end_default, per_segment)
    bores = _columns("bore", bore, layout.bore, per_segment)
    radii = _columns("fillet_radius", fillet_radius, layout.fillet_radius, per_segment)
    holes = _columns(
        "cross_hole_diameter", cross_hole_diameter, layout.cross_hole_diameter, per_segment
    )
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
    concentration[:, KEYSEAT] = np.where(layout.keyseat, keyseat_kts().value, np.nan)
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
