"""A torsion system as columns of arrays: the input of the array core.

Every segment of every shaft is one row of a :class:`SegmentTable` (shaft after shaft, in
increasing x), every bonded layer one row of its layer columns, and supports, gears and loads
are columns too. The solver's core (:mod:`workbench.solver.statics`) reads nothing else, so a
case file decoded straight into columns never has to build one Python object per segment.

Float columns that a sweep may vary carry a leading axis of variants: shape ``(n_variants, n)``,
with ``n_variants = 1`` for one case. Integer and boolean columns (which shaft, which load case,
a support's kind) describe the topology and have no variant axis.

Sections are described by a shape code and the dimensions of a circular law, outer diameter
d(s) = d₀ + (d₁ − d₀)·s along the segment fraction s and a constant bore b, so that
J(s) = π(d⁴ − b⁴)/32 and τ/T = (d/2)/J; non-circular (prismatic) shapes carry their own torsion
constant and peak stress per torque, computed once by their section classes.

References
----------
.. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 (J = π(D⁴ − d⁴)/32, τ = T·r/J),
   §3.4 (non-uniform torsion) and §3.8 (composite bars: rigidities of bonded layers add).
"""

from __future__ import annotations

import itertools
import operator
import weakref
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from workbench.case.errors import InputError
from workbench.solver.model import (
    Combination,
    GearMesh,
    LoadCase,
    Model,
    Shaft,
    Support,
)
from workbench.solver.sections import FloatArray, Section, SolidCircle, TaperedCircle, Tube
from workbench.solver.warping_rigidity import segment_warping_rigidity

IntArray = np.ndarray[Any, np.dtype[np.intp]]
BoolArray = np.ndarray[Any, np.dtype[np.bool_]]

#: Shape codes of a layer.
SOLID, TUBE, TAPERED, GIVEN = 0, 1, 2, 3
#: A support's warping condition: the key left out (free), stated free, stated restrained.
WARPING_UNSTATED, WARPING_FREE, WARPING_RESTRAINED = 0, 1, 2
_WARPING_CODES = {None: WARPING_UNSTATED, "free": WARPING_FREE, "restrained": WARPING_RESTRAINED}
#: The case-file keys of each circular shape's (outer start, outer end, bore) dimensions.
DIMENSION_KEYS: dict[int, tuple[str, str, str]] = {
    SOLID: ("diameter", "diameter", "diameter"),
    TUBE: ("outer_diameter", "outer_diameter", "inner_diameter"),
    TAPERED: ("diameter_start", "diameter_end", "bore"),
}


def _variant_rows(values: Any, *shape: int) -> FloatArray:
    """A float column as (n_variants, *shape); without the leading axis it is one variant."""
    array = np.asarray(values, dtype=float)
    if array.size == 0:
        return np.zeros((1, *shape))
    if array.shape == shape:
        array = array[None]
    if array.shape[1:] != shape:
        msg = f"a column of shape (n_variants, {shape}) was expected, not {array.shape}"
        raise ValueError(msg)
    return array


@dataclass(frozen=True)
class SegmentTable:
    """Every segment and layer of every shaft as columns (SI units).

    Parameters
    ----------
    shaft_ids
        The shafts' names, in order.
    shaft_segment_start
        (n_shafts + 1,) first segment row of each shaft.
    length
        (n_variants, n_segments) segment lengths (m).
    segment_layer_start
        (n_segments + 1,) first layer row of each segment (bonded layers share a segment).
    layer_shape
        (n_layers,) shape code: :data:`SOLID`, :data:`TUBE`, :data:`TAPERED` or :data:`GIVEN`.
    shear_modulus
        (n_variants, n_layers) shear modulus G of each layer (Pa).
    outer_diameter_start, outer_diameter_end
        (n_variants, n_layers) outer diameter at the segment's start and end (m); NaN for a
        :data:`GIVEN` shape.
    inner_diameter
        (n_variants, n_layers) constant bore diameter (m), 0 for a solid; NaN for :data:`GIVEN`.
    torsion_constant
        (n_variants, n_layers) torsion constant K (m⁴) of a :data:`GIVEN` shape; NaN otherwise.
    stress_per_torque
        (n_variants, n_layers) peak shear stress per unit torque (1/m³) of a :data:`GIVEN`
        shape; NaN otherwise.
    warping_rigidity
        (n_variants, n_segments) E·Cw of each segment (N·m⁴), or ``None`` when no section of
        the system warps (then every segment's is 0 and the system has one rotation per node).
    """

    shaft_ids: tuple[str, ...]
    shaft_segment_start: IntArray
    length: FloatArray
    segment_layer_start: IntArray
    layer_shape: np.ndarray[Any, np.dtype[np.int8]]
    shear_modulus: FloatArray
    outer_diameter_start: FloatArray
    outer_diameter_end: FloatArray
    inner_diameter: FloatArray
    torsion_constant: FloatArray
    stress_per_torque: FloatArray
    warping_rigidity: FloatArray | None = None

    def __post_init__(self) -> None:
        n_segments = len(self.segment_layer_start) - 1
        n_layers = len(self.layer_shape)
        object.__setattr__(self, "length", _variant_rows(self.length, n_segments))
        for name in LAYER_COLUMNS:
            object.__setattr__(self, name, _variant_rows(getattr(self, name), n_layers))
        if self.warping_rigidity is not None:
            rigidity = _variant_rows(self.warping_rigidity, n_segments)
            object.__setattr__(self, "warping_rigidity", rigidity if rigidity.any() else None)

    @property
    def warps(self) -> bool:
        """Whether some segment warps (E·Cw > 0): restrained torsion, θ and θ′ per node."""
        return self.warping_rigidity is not None

    @property
    def n_variants(self) -> int:
        """Number of variants the columns carry (1 for one case)."""
        names = ("length", *LAYER_COLUMNS)
        return max(getattr(self, name).shape[0] for name in names)

    @property
    def n_segments(self) -> int:
        """Number of segments over all shafts."""
        return len(self.segment_layer_start) - 1

    @property
    def layers_per_segment(self) -> IntArray:
        """(n_segments,) number of bonded layers of each segment."""
        return np.diff(self.segment_layer_start)

    @property
    def layer_segment(self) -> IntArray:
        """(n_layers,) segment row of each layer."""
        return np.repeat(np.arange(self.n_segments), self.layers_per_segment)

    @property
    def segment_varies(self) -> BoolArray:
        """(n_segments,) whether a segment has a layer whose section varies along it."""
        tapered = self.layer_shape == TAPERED
        if not tapered.any():
            return np.zeros(self.n_segments, dtype=bool)
        return np.add.reduceat(tapered.astype(np.intp), self.segment_layer_start[:-1]) > 0

    def segment_shaft(self) -> IntArray:
        """(n_segments,) shaft number of each segment."""
        return np.repeat(np.arange(len(self.shaft_ids)), np.diff(self.shaft_segment_start))

    def segment_path(self, row: int) -> str:
        """The case file's path of a segment row: ``shafts[1].segments[4]``."""
        shaft = int(np.searchsorted(self.shaft_segment_start, row, side="right")) - 1
        return f"shafts[{shaft}].segments[{row - int(self.shaft_segment_start[shaft])}]"


#: Float columns of :class:`SegmentTable` with one value per layer.
LAYER_COLUMNS = (
    "shear_modulus",
    "outer_diameter_start",
    "outer_diameter_end",
    "inner_diameter",
    "torsion_constant",
    "stress_per_torque",
)


@dataclass(frozen=True)
class CaseTable:
    """A whole torsion system as columns (SI units): segments, supports, gears and loads.

    Positions (``x``) are measured along each shaft from its start; shafts are numbered in
    :attr:`SegmentTable.shaft_ids` order.

    Parameters
    ----------
    segments
        The segment and layer columns.
    support_shaft, support_x
        (n_supports,) shaft number and position (m) of each support.
    support_fixed
        (n_supports,) ``True`` for a fixed support, ``False`` for a spring.
    support_stiffness
        (n_variants, n_supports) spring stiffness (N·m/rad); ignored for fixed supports.
    support_rotation
        (n_variants, n_supports) prescribed rotation (rad).
    gear_shaft, gear_x
        (n_gears, 2) shaft number and position (m) of gear a and gear b of each mesh.
    gear_coefficient
        (n_variants, n_gears, 2) coefficients (c_a, c_b) of the constraint c_a·θ_a + c_b·θ_b = 0
        (m): the pitch radii, c_b negative for an internal mesh.
    torque_case, torque_shaft, torque_x
        (n_point,) load case, shaft and position (m) of each point torque.
    torque
        (n_variants, n_point) point torques (N·m).
    load_case, load_shaft, load_start, load_end
        (n_distributed,) load case, shaft, start and end (m) of each distributed torque.
    load_intensity
        (n_variants, n_distributed, 2) intensity at the start and at the end (N·m/m).
    case_names, combination_names
        Names of the load cases and of the combinations, in order.
    combination_factors
        (n_combinations, n_cases) factor of each load case in each combination.
    key_shaft, key_x
        Extra points that must be mesh nodes (design checks read values there).
    support_warping
        (n_supports,) the warping condition each support states: :data:`WARPING_UNSTATED`
        (free, the key left out), :data:`WARPING_FREE` or :data:`WARPING_RESTRAINED`.
    """

    segments: SegmentTable
    support_shaft: IntArray
    support_x: FloatArray
    support_fixed: BoolArray
    support_stiffness: FloatArray
    support_rotation: FloatArray
    gear_shaft: IntArray
    gear_x: FloatArray
    gear_coefficient: FloatArray
    torque_case: IntArray
    torque_shaft: IntArray
    torque_x: FloatArray
    torque: FloatArray
    load_case: IntArray
    load_shaft: IntArray
    load_start: FloatArray
    load_end: FloatArray
    load_intensity: FloatArray
    case_names: tuple[str, ...]
    combination_names: tuple[str, ...] = ()
    combination_factors: FloatArray = field(default_factory=lambda: np.zeros((0, 0)))
    key_shaft: IntArray | None = None
    key_x: FloatArray | None = None
    support_warping: np.ndarray[Any, np.dtype[np.int8]] | None = None

    def __post_init__(self) -> None:
        n_supports, n_gears = len(self.support_x), len(self.gear_x)
        set_field = object.__setattr__
        set_field(self, "support_stiffness", _variant_rows(self.support_stiffness, n_supports))
        set_field(self, "support_rotation", _variant_rows(self.support_rotation, n_supports))
        set_field(self, "torque", _variant_rows(self.torque, len(self.torque_x)))
        set_field(self, "gear_coefficient", _variant_rows(self.gear_coefficient, n_gears, 2))
        intensity = _variant_rows(self.load_intensity, len(self.load_start), 2)
        set_field(self, "load_intensity", intensity)
        if not len(self.combination_factors):
            set_field(self, "combination_factors", np.zeros((0, len(self.case_names))))
        if self.key_shaft is None or self.key_x is None:
            set_field(self, "key_shaft", np.zeros(0, dtype=np.intp))
            set_field(self, "key_x", np.zeros(0))
        if self.support_warping is None:
            set_field(self, "support_warping", np.zeros(n_supports, dtype=np.int8))

    @property
    def n_variants(self) -> int:
        """Number of variants the columns carry (1 for one case)."""
        columns = (
            self.support_stiffness,
            self.support_rotation,
            self.gear_coefficient,
            self.torque,
            self.load_intensity,
        )
        return max(self.segments.n_variants, *(column.shape[0] for column in columns))

    @property
    def n_cases(self) -> int:
        """Number of load cases."""
        return len(self.case_names)

    @property
    def result_names(self) -> tuple[str, ...]:
        """Load cases, then combinations."""
        return self.case_names + self.combination_names

    def fixed_support_nodes(self, support_node: IntArray) -> IntArray:
        """The nodes the fixed supports hold, refusing two fixed supports at one node.

        The rule of every analysis of the system (statics and vibration alike): a second fixed
        support at a point already held is a redundant restraint whose share of the reaction is
        undefined, an ill-formed case whatever is asked of it.

        Parameters
        ----------
        support_node
            (n_supports,) the mesh node of each support.

        Raises
        ------
        InputError
            Naming the second fixed support at a point (``supports[2]``).
        """
        fixed_numbers = np.flatnonzero(self.support_fixed)
        nodes = support_node[fixed_numbers]
        _, first, counts = np.unique(nodes, return_index=True, return_counts=True)
        if np.any(counts > 1):
            repeated = nodes[first[counts > 1][0]]
            number = int(fixed_numbers[np.flatnonzero(nodes == repeated)[1]])
            msg = "a second fixed support at the same point of the shaft: the split is undefined"
            raise InputError(f"supports[{number}]", msg)
        return nodes


# --- columns from a Model ----------------------------------------------------------------------

_LENGTH = operator.attrgetter("length")
_LAYERS = operator.attrgetter("layers")
_SECTION = operator.attrgetter("section")
_MODULUS = operator.attrgetter("material.shear_modulus")
_FIRST = operator.itemgetter(0)


def section_row(section: Section) -> tuple[float, ...]:
    """(shape code, d_start, d_end, bore, K, τ/T) of one section object."""
    nan = np.nan
    if isinstance(section, SolidCircle):
        return (SOLID, section.diameter, section.diameter, 0.0, nan, nan)
    if isinstance(section, Tube):
        diameter = section.outer_diameter
        return (TUBE, diameter, diameter, section.inner_diameter, nan, nan)
    if isinstance(section, TaperedCircle):
        return (TAPERED, section.diameter_start, section.diameter_end, section.bore, nan, nan)
    if not section.prismatic:
        msg = f"a varying section of shape {section.shape!r} has no column form"
        raise TypeError(msg)
    return (GIVEN, nan, nan, nan, section.torsion_constant, section.shear_stress_per_torque)


_CACHE: dict[int, tuple[weakref.ref[Any], Any]] = {}


def _cached(owner: Any, build: Any) -> Any:
    """``build(owner)``, taken once per immutable owner (a Shaft, a Model) while it lives.

    Models rebuilt around an unchanged shaft (sizing steps, panel edits of another shaft) and
    repeated solves of one model reuse the columns instead of walking the objects again.
    """
    key = (id(owner), build)
    entry = _CACHE.get(key)  # type: ignore[call-overload]
    if entry is not None and entry[0]() is owner:
        return entry[1]
    value = build(owner)
    _CACHE[key] = (weakref.ref(owner), value)  # type: ignore[index]
    weakref.finalize(owner, _forget, key)
    return value


def _forget(key: Any) -> None:
    _CACHE.pop(key, None)


@dataclass(frozen=True)
class _ShaftColumns:
    """One shaft's columns as taken from its objects: distinct sections described once."""

    length: FloatArray  # (n_segments,)
    layers_per_segment: IntArray  # (n_segments,)
    shear_modulus: FloatArray  # (n_layers,)
    section: IntArray  # (n_layers,) row of each layer's section in ``described``
    described: FloatArray  # (n_distinct, 6) shape code, d_start, d_end, bore, K, τ/T
    warping_rigidity: FloatArray | None = None  # (n_segments,) E·Cw; None: no section warps


def _shaft_columns(shaft: Shaft) -> _ShaftColumns:
    """The columns of one shaft, taken once while it lives."""
    columns: _ShaftColumns = _cached(shaft, _take_shaft_columns)
    return columns


def _take_shaft_columns(shaft: Shaft) -> _ShaftColumns:
    segments = shaft.segments
    count = len(segments)
    # map() with operator getters keeps the per-segment work in C: no Python frame per segment.
    lengths = np.fromiter(map(_LENGTH, segments), float, count)
    layers = list(map(_LAYERS, segments))
    per_segment = np.fromiter(map(len, layers), np.intp, count)
    flat = list(map(_FIRST, layers)) if per_segment.max() == 1 else list(itertools.chain(*layers))
    sections = list(map(_SECTION, flat))
    moduli = np.fromiter(map(_MODULUS, flat), float, len(flat))
    # Sections are shared between segments: describe each distinct object once. The position of
    # a layer's section is that of the first layer holding the same object.
    first_seen: dict[int, int] = {}
    position = np.fromiter(
        map(first_seen.setdefault, map(id, sections), itertools.count()), np.intp, len(flat)
    )
    distinct = np.fromiter(first_seen.values(), np.intp, len(first_seen))
    row_of = np.empty(len(flat), dtype=np.intp)
    row_of[distinct] = np.arange(len(distinct))
    described = np.array([section_row(sections[index]) for index in distinct], dtype=float)
    warping = segment_warping_rigidity(flat, per_segment, [sections[k] for k in distinct])
    columns = _ShaftColumns(lengths, per_segment, moduli, row_of[position], described, warping)
    for array in (lengths, per_segment, moduli, columns.section, described):
        array.setflags(write=False)
    return columns


def segment_table(shafts: tuple[Shaft, ...]) -> SegmentTable:
    """Columns of every segment of the given shafts, shaft after shaft.

    Parameters
    ----------
    shafts
        The model's shafts.

    Returns
    -------
    SegmentTable
        One variant.
    """
    parts = []
    for number, shaft in enumerate(shafts):  # a loop over shafts
        try:
            parts.append(_shaft_columns(shaft))
        except InputError as error:
            raise InputError(f"shafts[{number}].{error.field}", error.message) from None

    def joined(name: str) -> Any:
        arrays = [getattr(part, name) for part in parts]
        return arrays[0] if len(arrays) == 1 else np.concatenate(arrays)

    counts = [len(part.length) for part in parts]
    per_segment = joined("layers_per_segment")
    offsets = np.cumsum([0] + [len(part.described) for part in parts])
    section = (
        parts[0].section
        if len(parts) == 1
        else np.concatenate(
            [part.section + offset for part, offset in zip(parts, offsets, strict=False)]
        )
    )
    described = np.concatenate([part.described for part in parts])
    # One gather per column: a strided (n, 6) gather would cost several times more.
    column = [np.ascontiguousarray(described[:, k])[section] for k in range(6)]
    warping = None
    if any(part.warping_rigidity is not None for part in parts):
        warping = np.concatenate(
            [
                np.zeros(len(part.length))
                if part.warping_rigidity is None
                else part.warping_rigidity
                for part in parts
            ]
        )
    return SegmentTable(
        shaft_ids=tuple(shaft.id for shaft in shafts),
        shaft_segment_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.intp),
        length=joined("length"),
        segment_layer_start=np.concatenate([[0], np.cumsum(per_segment)]).astype(np.intp),
        layer_shape=column[0].astype(np.int8),
        shear_modulus=joined("shear_modulus"),
        outer_diameter_start=column[1],
        outer_diameter_end=column[2],
        inner_diameter=column[3],
        torsion_constant=column[4],
        stress_per_torque=column[5],
        warping_rigidity=warping,
    )


def case_table(model: Model) -> CaseTable:
    """The columns of a validated model: the input of :func:`workbench.solver.statics.solve_table`.

    Taken once per model (a model is immutable) and kept while the model lives.

    Parameters
    ----------
    model
        The validated model (SI).

    Returns
    -------
    CaseTable
        One variant.

    Examples
    --------
    >>> from workbench.solver.io import parse_case
    >>> model = parse_case({"materials": {"s": {"shear_modulus": 80e9}},
    ...     "shafts": [{"id": "a", "segments": [{"length": 1.0, "material": "s",
    ...         "section": {"shape": "solid", "diameter": 0.05}}]}],
    ...     "supports": [{"shaft": "a", "x": 0.0}],
    ...     "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1.0, "torque": 100.0}]}]})
    >>> case_table(model).segments.length
    array([[1.]])
    """
    table: CaseTable = _cached(model, _take_case_table)
    return table


def _take_case_table(model: Model) -> CaseTable:
    design_points = model.design.key_points() if model.design is not None else []
    return CaseTable(
        segments=segment_table(model.shafts),
        **system_columns(
            model.shaft_number,
            supports=model.supports,
            gears=model.gears,
            load_cases=model.load_cases,
            combinations=model.combinations,
            key_points=[*design_points, *model.extra_nodes],
        ),
    )


def system_columns(
    number: Callable[[str], int],
    *,
    supports: tuple[Support, ...],
    gears: tuple[GearMesh, ...],
    load_cases: tuple[LoadCase, ...],
    combinations: tuple[Combination, ...],
    key_points: list[tuple[str, float]],
) -> dict[str, Any]:
    """Every column of a :class:`CaseTable` but its segments, from the model's parts (SI).

    Parameters
    ----------
    number
        Shaft id → shaft number.
    supports, gears, load_cases, combinations
        The validated parts (one object each: there are few of them).
    key_points
        (shaft id, x in m) of further points the mesh must make nodes of.
    """
    points = [(row, torque) for row, case in enumerate(load_cases) for torque in case.torques]
    spans = [(row, load) for row, case in enumerate(load_cases) for load in case.distributed]
    case_row = {case.name: row for row, case in enumerate(load_cases)}
    factors = np.zeros((len(combinations), len(load_cases)))
    for row, combination in enumerate(combinations):
        for case_name, factor in combination.factors:
            factors[row, case_row[case_name]] += factor
    return {
        "support_shaft": np.array([number(item.shaft) for item in supports], dtype=np.intp),
        "support_x": np.array([item.x for item in supports], dtype=float),
        "support_fixed": np.array([item.kind == "fixed" for item in supports], dtype=bool),
        "support_stiffness": np.array(
            [item.stiffness if item.stiffness is not None else np.nan for item in supports]
        ),
        "support_rotation": np.array([item.rotation for item in supports], dtype=float),
        "gear_shaft": np.array(
            [(number(gear.a.shaft), number(gear.b.shaft)) for gear in gears], dtype=np.intp
        ).reshape(-1, 2),
        "gear_x": np.array([(gear.a.x, gear.b.x) for gear in gears], dtype=float).reshape(-1, 2),
        "gear_coefficient": np.array([gear.coefficients for gear in gears], dtype=float),
        "torque_case": np.array([row for row, _ in points], dtype=np.intp),
        "torque_shaft": np.array([number(torque.shaft) for _, torque in points], dtype=np.intp),
        "torque_x": np.array([torque.x for _, torque in points], dtype=float),
        "torque": np.array([torque.torque for _, torque in points], dtype=float),
        "load_case": np.array([row for row, _ in spans], dtype=np.intp),
        "load_shaft": np.array([number(load.shaft) for _, load in spans], dtype=np.intp),
        "load_start": np.array([load.start for _, load in spans], dtype=float),
        "load_end": np.array([load.end for _, load in spans], dtype=float),
        "load_intensity": np.array(
            [(load.intensity_start, load.intensity_end) for _, load in spans], dtype=float
        ),
        "case_names": tuple(case.name for case in load_cases),
        "combination_names": tuple(combination.name for combination in combinations),
        "combination_factors": factors,
        "key_shaft": np.array([number(shaft_id) for shaft_id, _ in key_points], dtype=np.intp),
        "key_x": np.array([x for _, x in key_points], dtype=float),
        "support_warping": np.array(
            [_WARPING_CODES[item.warping] for item in supports], dtype=np.int8
        ),
    }


__all__ = [
    "DIMENSION_KEYS",
    "GIVEN",
    "LAYER_COLUMNS",
    "SOLID",
    "TAPERED",
    "TUBE",
    "WARPING_FREE",
    "WARPING_RESTRAINED",
    "WARPING_UNSTATED",
    "CaseTable",
    "SegmentTable",
    "case_table",
    "segment_table",
    "system_columns",
]
