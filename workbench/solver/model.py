"""The validated model of a torsion system: frozen dataclasses in SI units.

Data flows one way: a case file (or the panel) builds a :class:`Model`; the analysis solves it; the
checks judge the results. Every constructor validates its own fields and every cross-reference is
checked by :class:`Model`, so an invalid model cannot exist. Errors are :class:`InputError` naming
the field by its dotted path in the case file (``supports[1].x``). The parts other than the
shafts (supports, gears, loads, ...) and the checks of their references are in
:mod:`workbench.solver.parts`; their names are kept here too.

Sign conventions (right-hand rule about each shaft's +x axis): applied torques, reactions and
rotations are positive along +x; a spring support exerts −stiffness·(θ − rotation).
"""

from __future__ import annotations

import functools
import itertools
import operator
from dataclasses import dataclass, field

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, quoted
from workbench.case.materials import Material
from workbench.case.units import SI, UnitSystem, quote
from workbench.case.validate import (
    require_finite,
    require_positive,
)
from workbench.solver.parts import (
    POSITION_TOLERANCE,
    Combination,
    Disc,
    DistributedTorque,
    GearMesh,
    GearPosition,
    LoadCase,
    OperatingSpeed,
    PointTorque,
    References,
    Support,
    check_segment_lengths,
    result_names,
    shaft_index,
)
from workbench.solver.sections import FloatArray, Section

_LENGTH = operator.attrgetter("length")


@dataclass(frozen=True)
class Layer:
    """One member of a segment: a material and a cross-section.

    Parameters
    ----------
    material
        The layer's material (shear modulus in Pa).
    section
        The layer's cross-section (SI).
    """

    material: Material
    section: Section


@dataclass(frozen=True)
class Notch:
    """A stress raiser whose torsional stress-concentration factor the engineer states.

    For details the design library has no factor for: a circumferential groove (a retaining-ring
    or relief groove), a spline run-out, a press-fit edge. Read Kts from a chart (Pilkey & Pilkey,
    *Peterson's Stress Concentration Factors*) on the nominal stress 16T/(πd³) of the segment's
    own section: model a groove as a short segment of its root diameter so that the nominal
    stress, and the twist, are those of the root.

    Parameters
    ----------
    kts
        Theoretical torsional stress-concentration factor Kts ≥ 1 (dimensionless).
    radius
        Notch root radius (m), for the notch sensitivity q of the fatigue check (Neuber's
        relation); ``None`` when not known.
    notch_sensitivity
        A stated notch sensitivity 0 ≤ q ≤ 1 instead of ``radius``. With neither, the fatigue
        check takes q = 1 (Kfs = Kts: the safe side).
    description
        What the detail is (shown in the check's note and the record).
    """

    kts: float
    radius: float | None = None
    notch_sensitivity: float | None = None
    description: str = ""

    def __post_init__(self) -> None:
        require_finite("kts", self.kts)
        if self.kts < 1.0:
            msg = f"a stress-concentration factor must be at least 1, not {self.kts:g}"
            raise InputError("kts", msg)
        if self.radius is not None and self.notch_sensitivity is not None:
            msg = "give the notch radius or a stated notch sensitivity, not both"
            raise InputError("notch_sensitivity", msg)
        if self.radius is not None:
            require_positive("radius", self.radius)
        if self.notch_sensitivity is not None:
            require_finite("notch_sensitivity", self.notch_sensitivity)
            if not 0.0 <= self.notch_sensitivity <= 1.0:
                msg = f"must lie between 0 and 1, not {self.notch_sensitivity:g}"
                raise InputError("notch_sensitivity", msg)

    @property
    def label(self) -> str:
        """A few words naming the detail: its description, or "notch"."""
        return self.description or "notch"


@dataclass(frozen=True)
class Segment:
    """A length of shaft with one cross-section, or several bonded coaxial layers acting together.

    Parameters
    ----------
    length
        Length along the shaft (m).
    layers
        One layer for an ordinary segment; several for bonded coaxial members that share the twist
        (a tube shrunk or bonded over a core). Layered segments take circular layers whose radial
        extents do not overlap.
    fillet_radius
        Fillet radius of the shoulder at the segment's start (m), used by the stress-concentration
        check; ``None`` when there is no shoulder or it is not known.
    keyseat
        Whether the segment carries an end-milled keyseat (stress concentration in the checks).
    cross_hole_diameter
        Diameter of a transverse through hole in the segment (m), or ``None``.
    notch
        A stress raiser with a stated Kts (:class:`Notch`), or ``None``.

    Notes
    -----
    Layers share the rotation of each cross-section, so their rigidities add:
    G·K = Σ Gᵢ·Kᵢ, and layer i carries Tᵢ = T·Gᵢ·Kᵢ/ΣG·K.

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8 (composite bars in torsion).
    """

    length: float
    layers: tuple[Layer, ...]
    fillet_radius: float | None = None
    keyseat: bool = False
    cross_hole_diameter: float | None = None
    notch: Notch | None = None

    def __post_init__(self) -> None:
        require_positive("length", self.length)
        if not self.layers:
            raise InputError("layers", "a segment needs at least one layer")
        if self.fillet_radius is not None:
            # A sharp corner (r = 0) has no finite stress-concentration factor.
            require_positive("fillet_radius", self.fillet_radius)
        if self.cross_hole_diameter is not None:
            require_positive("cross_hole_diameter", self.cross_hole_diameter)
            if self.cross_hole_diameter >= 2.0 * self.layers[-1].section.outer_radius:
                msg = (
                    f"must be smaller than the segment's diameter "
                    f"({quote(self.cross_hole_diameter, 'length')})"
                )
                raise InputError("cross_hole_diameter", msg)
        if len(self.layers) > 1:
            self._check_layers_nest()

    def _check_layers_nest(self) -> None:
        spans = []
        for index, layer in enumerate(self.layers):
            if not layer.section.circular:
                msg = (
                    f"shape {quoted(layer.section.shape)} cannot be a bonded layer: layered segments "
                    "take circular layers (solid, tube, tapered)"
                )
                raise InputError(f"layers[{index}].section.shape", msg)
            fractions = np.linspace(0.0, 1.0, 5)
            spans.append(
                (
                    layer.section.inner_radius_at(fractions),
                    layer.section.outer_radius_at(fractions),
                    index,
                )
            )
        spans.sort(key=lambda span: float(span[0][0]))
        for (_, outer, inner_index), (inner, _, outer_index) in itertools.pairwise(spans):
            if np.any(inner < outer * (1.0 - 1e-9)):
                msg = (
                    f"overlaps layer {inner_index}: its bore "
                    f"({quote(2 * float(inner.min()), 'length')}) is smaller than that layer's "
                    f"outer diameter ({quote(2 * float(outer.max()), 'length')})"
                )
                raise InputError(f"layers[{outer_index}].section", msg)

    @classmethod
    def single(
        cls,
        length: float,
        material: Material,
        section: Section,
        fillet_radius: float | None = None,
        keyseat: bool = False,
        cross_hole_diameter: float | None = None,
        notch: Notch | None = None,
    ) -> Segment:
        """Build an ordinary one-layer segment."""
        return cls(
            length, (Layer(material, section),), fillet_radius, keyseat, cross_hole_diameter, notch
        )

    @property
    def prismatic(self) -> bool:
        """Whether every layer's section is constant along the segment."""
        return all(layer.section.prismatic for layer in self.layers)

    @property
    def torsional_rigidity(self) -> float:
        """G·K of a prismatic segment (N·m²)."""
        if len(self.layers) == 1:
            layer = self.layers[0]
            return layer.material.shear_modulus * layer.section.torsion_constant
        return sum(
            layer.material.shear_modulus * layer.section.torsion_constant for layer in self.layers
        )

    def torsional_rigidity_at(self, fraction: FloatArray) -> FloatArray:
        """Σ Gᵢ·Kᵢ (N·m²) at fractions of the segment length."""
        total = np.zeros(np.shape(fraction))
        for layer in self.layers:
            total = total + layer.material.shear_modulus * layer.section.torsion_constant_at(
                fraction
            )
        return total

    def shear_stress_per_torque_at(self, fraction: FloatArray) -> FloatArray:
        """Largest shear stress over all layers per unit segment torque (1/m³).

        Layer i sees τᵢ = T·(Gᵢ·Kᵢ/ΣG·K)·sᵢ, with sᵢ its own peak stress per unit torque.
        """
        if len(self.layers) == 1:
            return self.layers[0].section.shear_stress_per_torque_at(fraction)
        rigidity = self.torsional_rigidity_at(fraction)
        peak = np.zeros(np.shape(fraction))
        for layer in self.layers:
            share = layer.material.shear_modulus * layer.section.torsion_constant_at(fraction)
            peak = np.maximum(peak, share * layer.section.shear_stress_per_torque_at(fraction))
        return peak / rigidity

    @property
    def shear_stress_per_torque(self) -> float:
        """Largest shear stress per unit torque (1/m³) of a prismatic segment."""
        if len(self.layers) == 1:
            return self.layers[0].section.shear_stress_per_torque
        return float(self.shear_stress_per_torque_at(np.zeros(1))[0])

    def outer_radius_at(self, fraction: FloatArray) -> FloatArray:
        """Largest outer radius over the layers (m), for drawing."""
        return np.max([layer.section.outer_radius_at(fraction) for layer in self.layers], axis=0)

    def quadrature_breaks(self) -> FloatArray:
        """Fractions where the segment's 1/(G·K) may need a new quadrature piece."""
        return np.unique(
            np.concatenate([layer.section.quadrature_breaks() for layer in self.layers])
        )


@dataclass(frozen=True)
class Shaft:
    """A shaft: segments end to end along its own x axis, x = 0 at its start.

    Parameters
    ----------
    id
        The shaft's name, unique in the model.
    segments
        Segments from x = 0 onwards.
    """

    id: str
    segments: tuple[Segment, ...]

    def __post_init__(self) -> None:
        self.check_id(self.id)
        if not self.segments:
            raise InputError("segments", "a shaft needs at least one segment")
        count = len(self.segments)
        check_segment_lengths(np.fromiter(map(_LENGTH, self.segments), float, count))

    @staticmethod
    def check_id(shaft_id: str) -> None:
        """Raise :class:`InputError` on field ``id`` unless the id is a name (not blank)."""
        if not isinstance(shaft_id, str) or not shaft_id.strip():
            raise InputError("id", f"must be a non-empty name, not {quoted(shaft_id)}")

    @functools.cached_property
    def length(self) -> float:
        """Total length (m)."""
        return float(self.boundaries[-1])

    @functools.cached_property
    def boundaries(self) -> FloatArray:
        """Position of every segment end, from 0 to the shaft's length (m)."""
        return np.concatenate([[0.0], np.cumsum([segment.length for segment in self.segments])])

    def contains(self, x: float) -> bool:
        """Whether the position x (m) lies on the shaft, within the position tolerance."""
        tolerance = POSITION_TOLERANCE * self.length
        return -tolerance <= x <= self.length + tolerance


@dataclass(frozen=True)
class Model:
    """A whole torsion system, validated, in SI units.

    Parameters
    ----------
    shafts
        The shafts.
    supports
        Supports (at least one per group of shafts joined by gears).
    gears
        Gear meshes joining shafts.
    load_cases
        At least one load case.
    combinations
        Factored sums of load cases.
    title
        Free text.
    materials
        The named materials the case file defined (kept for saving); segments hold their own.
    units
        The units the case was written in, used to report it back.
    design
        Design criteria for the checks (the case's ``design`` section), or ``None``.
    extra_nodes
        Further points (shaft id, x in m) the mesh must make nodes of, e.g. the subdivision
        points of the vibration analysis.
    discs
        Rigid discs for the vibration analysis (:mod:`workbench.solver.modes`).
    operating_speeds
        Running-speed bands the natural frequencies are checked against.
    """

    shafts: tuple[Shaft, ...]
    supports: tuple[Support, ...]
    load_cases: tuple[LoadCase, ...]
    gears: tuple[GearMesh, ...] = ()
    combinations: tuple[Combination, ...] = ()
    title: str = ""
    materials: tuple[Material, ...] = ()
    units: UnitSystem = SI
    design: DesignCriteria | None = None
    extra_nodes: tuple[tuple[str, float], ...] = ()
    discs: tuple[Disc, ...] = ()
    operating_speeds: tuple[OperatingSpeed, ...] = ()
    _shaft_index: dict[str, int] = field(
        default_factory=dict, init=False, repr=False, compare=False
    )

    def __post_init__(self) -> None:
        if not self.shafts:
            raise InputError("shafts", "the model needs at least one shaft")
        index = shaft_index(shaft.id for shaft in self.shafts)
        object.__setattr__(self, "_shaft_index", index)
        References(
            index,
            [shaft.length for shaft in self.shafts],
            [len(shaft.segments) for shaft in self.shafts],
        ).check(
            supports=self.supports,
            gears=self.gears,
            load_cases=self.load_cases,
            combinations=self.combinations,
            design=self.design,
            discs=self.discs,
            operating_speeds=self.operating_speeds,
            has_density=self._has_density,
        )

    def _has_density(self) -> bool:
        return any(
            layer.material.density is not None
            for shaft in self.shafts
            for segment in shaft.segments
            for layer in segment.layers
        )

    def check_point(self, path: str, shaft_id: str, x: float, key: str) -> None:
        """Raise :class:`InputError` at ``path`` unless x lies on the named shaft."""
        References(
            self._shaft_index,
            [shaft.length for shaft in self.shafts],
            [len(shaft.segments) for shaft in self.shafts],
        ).point(path, shaft_id, x, key)

    def shaft(self, shaft_id: str) -> Shaft:
        """Return the shaft with this id."""
        return self.shafts[self._shaft_index[shaft_id]]

    def shaft_number(self, shaft_id: str) -> int:
        """Return the index of the shaft with this id."""
        return self._shaft_index[shaft_id]

    @property
    def result_names(self) -> tuple[str, ...]:
        """Load cases, then combinations, in file order."""
        return result_names(self.load_cases, self.combinations)


__all__ = [
    "POSITION_TOLERANCE",
    "Combination",
    "Disc",
    "DistributedTorque",
    "GearMesh",
    "GearPosition",
    "Layer",
    "LoadCase",
    "Model",
    "Notch",
    "OperatingSpeed",
    "PointTorque",
    "References",
    "Segment",
    "Shaft",
    "Support",
    "result_names",
    "shaft_index",
]
