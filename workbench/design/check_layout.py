"""The layout of a topology's static checks: which segment has which detail, and base sizes.

A :class:`CheckLayout` (:func:`check_layout` of a model) holds what every variant of a topology
shares for its static checks — the stations of each segment, which segment carries a shoulder
fillet, keyseat, notch or cross hole the checks can judge (and which they cannot, with the note
that says so), the points the rotation limits read, the design's rules — with the base model's
sizes and allowables as columns over the segments. Reading the model's segment objects into these
columns is the only pass over segments; :mod:`workbench.design.check_inputs` computes every factor
from the columns.

What the checks can judge (the rules :mod:`workbench.design.checks` states): a shoulder fillet
at a segment's start between one-layer round segments; a keyseat or a stated notch on a one-layer
round segment; a cross hole in a solid round one; the "1° in 20 diameters" twist rule on any
circular segment.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.8
   (bonded layers share the twist: layer i carries T·GᵢKᵢ/ΣGK).
.. [2] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 5 (allowable shear stress; equivalent stress of a uniaxial normal stress:
   σ/√3 von Mises, σ/2 Tresca).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, short
from workbench.case.materials import Material
from workbench.design.allowables import (
    TWIST_RATE_PRESETS,
    Allowable,
    allowable_shear_stress,
    keyseat_factor,
)
from workbench.design.concentration import ConcentrationFactor
from workbench.design.static_checks import CONCENTRATION_KINDS, BoolArray, IntArray
from workbench.solver.model import Model, Segment
from workbench.solver.sections import FloatArray

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
    keyseat_factor
        The factor on a keyseat's nominal stress under the design
        (:func:`~workbench.design.allowables.keyseat_factor`: Kts, or 1 under the shafting
        code's keyway allowance).
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
    keyseat_factor: ConcentrationFactor
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


#: The case file's key of each design value the allowable refuses; any other fault (a strength
#: the material lacks) is the material's, named at the segment that uses it.
_DESIGN_FIELDS = {
    "criterion": "design.shear_criterion",
    "factor_of_safety": "design.factor_of_safety",
    "stated_allowable": "design.allowable_shear_stress",
}


class _Allowables:
    """Each material's allowable shear stress under the design, found once per material."""

    def __init__(self, design: DesignCriteria) -> None:
        self.design = design
        self.found: dict[int, Allowable] = {}

    def __call__(self, material: Material, path: str) -> Allowable:
        """The allowable of ``material``, found once.

        A strength the criterion needs and the material lacks is named at ``path.material``: the
        segment (or layer) that uses it, the first one the checks come to.
        """
        key = id(material)
        if key not in self.found:
            try:
                self.found[key] = allowable_shear_stress(
                    material,
                    self.design.shear_criterion,
                    self.design.factor_of_safety,
                    keyway=self.design.keyway,
                    stated_allowable=self.design.allowable_shear_stress,
                )
            except InputError as error:
                if error.field in ("yield_strength", "ultimate_strength"):
                    # A strength the criterion needs: named where the case defines its materials
                    # (a library material is defined there too, under its name, to add one).
                    field = f"materials.{short(material.name)}.{error.field}"
                else:
                    field = _DESIGN_FIELDS.get(error.field, f"{path}.material")
                raise InputError(field, error.message) from None
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
    for index, (shaft_number, number, shaft, segment) in enumerate(segments):
        layered = len(segment.layers) > 1
        bases = []
        for slot, layer in enumerate(segment.layers):
            path = f"shafts[{shaft_number}].segments[{number}]"
            found = allowables(layer.material, f"{path}.layers[{slot}]" if layered else path)
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
        section = segment.layers[0].section
        circular[index] = all(layer.section.circular for layer in segment.layers)
        one_round[index] = circular[index] and not layered
        if circular[index]:
            outermost = segment.outer_radius_at if layered else section.outer_radius_at
            outer[:, index] = 2.0 * outermost(_ENDS)
        if one_round[index]:
            bore[index] = 2.0 * section.inner_radius
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
        keyseat_factor=keyseat_factor(design.shear_criterion, design.keyway),
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
