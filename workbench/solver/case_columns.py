"""The columns of a decoded case file, taken key by key: no Python object per segment.

:func:`case_system` reads a validated :class:`~workbench.case.declaration.CaseFile` (file
units) straight into the :class:`~workbench.solver.columns.CaseTable` (SI) the array core
solves. Each declared key of the segments becomes one array (one pass over the decoded
segments per key), sections are grouped by shape, and each column is converted to SI by one
multiplication by its key's declared factor (the product a key-by-key conversion gives).

Checks: everything building the :class:`~workbench.solver.model.Model` checks of a segment
(finite after the conversion, lengths and diameters greater than zero and normal numbers,
bores smaller than their diameters, J and τ/T of circles in range, known materials, layers
that nest, a cross hole smaller than the segment) is checked on whole columns. A segment a check flags is then built the model's way, alone, so that
its error is the very message, field path included, that building the model gives; the
column checks only have to flag every such segment (they may flag a few more, which then pass).
Supports, gears, loads and the design section are few: they are built as the model builds them
and checked against the shafts' lengths by the model's own :class:`~workbench.solver.parts.References`.
"""

from __future__ import annotations

import functools
import itertools
import operator
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

import msgspec
import numpy as np

from workbench.case import declaration as declared
from workbench.case.errors import InputError
from workbench.case.materials import Material
from workbench.case.units import UnitSystem
from workbench.case.validate import not_normal_positive, within
from workbench.solver.build import ModelBuilder, building
from workbench.solver.columns import (
    GIVEN,
    SOLID,
    TAPERED,
    TUBE,
    BoolArray,
    CaseTable,
    IntArray,
    SegmentTable,
    section_row,
    system_columns,
)
from workbench.solver.model import Shaft
from workbench.solver.parts import References, check_segment_lengths, shaft_index
from workbench.solver.sections import FloatArray, circles_out_of_range

#: The declared circular sections by their shape code.
_CIRCULAR: dict[int, type] = {
    code: declared.SHAPES[shape]
    for code, shape in ((SOLID, "solid"), (TUBE, "tube"), (TAPERED, "tapered"))
}
_CIRCULAR_CODES = {cls: code for code, cls in _CIRCULAR.items()}
#: The shape code of each declared section (non-circular shapes are described by their class).
SHAPE_CODES: dict[type, int] = {
    cls: _CIRCULAR_CODES.get(cls, GIVEN) for cls in declared.SHAPES.values()
}
#: Layers of one segment overlap when a bore is smaller than (1 − this) times the outer
#: diameter of the layer inside it: the model's own tolerance, 1e-9, made a thousandth smaller
#: so that the columns flag every segment the model refuses (its outer diameters, interpolated
#: along the segment, may exceed the end diameters by an ulp).
_NEST_TOLERANCE = 1e-9 * (1.0 - 1e-3)

_LENGTH = operator.attrgetter("length")
_LAYERS = operator.attrgetter("layers")
_MATERIAL = operator.attrgetter("material")
_SECTION = operator.attrgetter("section")


@dataclass(frozen=True)
class CaseSystem:
    """A case file's system as columns, with what its results are reported in.

    Parameters
    ----------
    table
        The system (SI).
    units
        The case file's units.
    title
        The case's title.
    """

    table: CaseTable
    units: UnitSystem
    title: str


def case_system(case: declared.CaseFile) -> CaseSystem:
    """The columns of a validated case file, checked as building its model checks them.

    Parameters
    ----------
    case
        The decoded case file (:mod:`workbench.case.load`), in its own units.

    Returns
    -------
    CaseSystem
        Its table (one variant) with its units and title.

    Raises
    ------
    InputError
        On the first value, reference or position building the model refuses, with the same
        field path and message.

    Examples
    --------
    >>> from workbench.case.load import case_file_from_document
    >>> case = case_file_from_document({"units": {"length": "mm"},
    ...     "materials": {"s": {"shear_modulus": 80e9}},
    ...     "shafts": [{"id": "a", "segments": [{"length": 1000, "material": "s",
    ...         "section": {"shape": "solid", "diameter": 50}}]}],
    ...     "supports": [{"shaft": "a", "x": 0}],
    ...     "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1000, "torque": 100}]}]})
    >>> case_system(case).table.segments.outer_diameter_start
    array([[0.05]])
    """
    with building(case) as builder:
        shafts = [
            _ShaftReader(builder, number, entry).read() for number, entry in enumerate(case.shafts)
        ]
        parts = builder.parts()
        index = shaft_index(entry.id for entry in case.shafts)
        used = {id(material): material for shaft in shafts for material in shaft.materials}
        design = parts["design"]
        References(index, [shaft.total_length for shaft in shafts]).check(
            supports=parts["supports"],
            gears=parts["gears"],
            load_cases=parts["load_cases"],
            combinations=parts["combinations"],
            design=design,
            discs=parts["discs"],
            operating_speeds=parts["operating_speeds"],
            has_density=lambda: any(m.density is not None for m in used.values()),
        )
    table = CaseTable(
        segments=_joined(tuple(entry.id for entry in case.shafts), shafts),
        **system_columns(
            index.__getitem__,
            supports=parts["supports"],
            gears=parts["gears"],
            load_cases=parts["load_cases"],
            combinations=parts["combinations"],
            key_points=design.key_points() if design is not None else [],
        ),
    )
    return CaseSystem(table, parts["units"], parts["title"])


@dataclass(frozen=True)
class _ShaftColumns:
    """One shaft's segment and layer columns (SI)."""

    length: FloatArray  # (n_segments,)
    layers_per_segment: IntArray  # (n_segments,)
    layer_shape: np.ndarray[Any, np.dtype[np.int8]]  # (n_layers,)
    layer_values: FloatArray  # (6, n_layers): shear modulus, d_start, d_end, bore, K, τ/T
    materials: tuple[Material, ...]  # the distinct materials the shaft uses

    @property
    def total_length(self) -> float:
        """The shaft's length (m), summed as the model sums it."""
        return float(np.cumsum(self.length)[-1])


#: The d_start, d_end, bore, K and τ/T of a group of sections (``None``: not applicable).
_Columns = tuple[FloatArray | None, ...]


@functools.cache
def _required(cls: type) -> frozenset[str]:
    """The keys of a declared object that are never left out."""
    return frozenset(item.name for item in msgspec.structs.fields(cls) if item.required)


def _any_layer(refused: BoolArray, per_segment: IntArray) -> BoolArray:
    """(n_segments,) whether any layer of a segment is refused."""
    if len(refused) == len(per_segment):
        return refused
    return np.add.reduceat(refused.astype(np.intp), np.cumsum(per_segment) - per_segment) > 0


def _unnested(
    shape: np.ndarray[Any, np.dtype[np.int8]], dimensions: FloatArray, per_segment: IntArray
) -> BoolArray:
    """(n_segments,) layered segments with a non-circular layer or layers that overlap.

    Sorted by bore within each segment (as the model sorts them), a layer overlaps the one
    before it when its bore is smaller than that layer's largest outer diameter.
    """
    segment = np.repeat(np.arange(len(per_segment)), per_segment)
    layered = per_segment[segment] > 1
    refused = np.zeros(len(per_segment), dtype=bool)
    refused[segment[layered & (shape == GIVEN)]] = True
    start, end, bore = dimensions[0], dimensions[1], dimensions[2]
    order = np.lexsort((bore, segment))
    inner, outer = order[1:], order[:-1]
    overlap = (segment[inner] == segment[outer]) & ~(
        bore[inner] >= np.fmax(start[outer], end[outer]) * (1.0 - _NEST_TOLERANCE)
    )
    refused[segment[outer[overlap & layered[outer]]]] = True
    return refused


@dataclass(frozen=True)
class _Picked:
    """The entries of a list a mask picks (all of them without a mask), iterated in C."""

    source: Sequence[Any]
    pick: list[bool] | None
    count: int

    def __iter__(self) -> Iterator[Any]:
        return (
            iter(self.source) if self.pick is None else itertools.compress(self.source, self.pick)
        )

    def __len__(self) -> int:
        return self.count


class _ShaftReader:
    """Reads one declared shaft into columns; flags the segments a check refuses."""

    def __init__(self, builder: ModelBuilder, number: int, entry: declared.Shaft) -> None:
        self.builder, self.number, self.entry = builder, number, entry
        self.segments: Sequence[declared.Segment] = entry.segments
        self.flagged = np.zeros(len(entry.segments), dtype=bool)

    def si(self, entries: Sequence[Any] | _Picked, cls: type, name: str) -> FloatArray:
        """Key ``name`` of every entry in SI: its declared default where left out, else NaN.

        One pass over the entries and one multiplication by the key's factor, the product
        :meth:`~workbench.case.convert.Converter.si` forms. A value given in the file is a finite
        number, so a product that is not finite is an overflow of the conversion, and NaN
        only ever means "left out".
        """
        values = map(operator.attrgetter(name), entries)
        count = len(entries)
        if name in _required(cls):
            raw = np.fromiter(values, float, count)
        else:
            default = declared.default_of(cls, name)
            fill = np.nan if default is None else float(default)
            given = declared.given
            raw = np.fromiter((v if given(v) else fill for v in values), float, count)
        with np.errstate(over="ignore"):  # an overflow is flagged as not finite
            return raw * self.builder.convert.factor(cls, name)

    def read(self) -> _ShaftColumns:
        """The shaft's columns; raises the model's error of the first segment it refuses."""
        segments = self.segments
        length = self.si(segments, declared.Segment, "length")
        self.flagged |= not_normal_positive(length)
        layers, per_segment = self._layers()
        # Rows: shear modulus, d_start, d_end, bore, K, τ/T of every layer.
        values = np.full((6, len(layers)), np.nan)
        materials = self._moduli(layers, per_segment, values[0])
        shape, outer = self._sections(layers, per_segment, values)
        self._details(outer[np.cumsum(per_segment) - 1])
        for row in np.flatnonzero(self.flagged).tolist():  # a loop over refused segments only
            try:
                self.builder.segment(segments[row])
            except InputError as error:
                raise within(f"shafts[{self.number}].segments[{row}]", error) from None
        try:
            Shaft.check_id(self.entry.id)
            check_segment_lengths(length)
        except InputError as error:
            raise within(f"shafts[{self.number}]", error) from None
        return _ShaftColumns(
            length=length,
            layers_per_segment=per_segment,
            layer_shape=shape,
            layer_values=values,
            materials=materials,
        )

    def _layers(self) -> tuple[Sequence[Any], IntArray]:
        """Every layer (a one-layer segment stands for its own layer) and each segment's count."""
        segments = self.segments
        if not any(map(_LAYERS, segments)):
            return segments, np.ones(len(segments), dtype=np.intp)
        groups = [segment.layers or (segment,) for segment in segments]
        per_segment = np.fromiter(map(len, groups), np.intp, len(groups))
        return list(itertools.chain.from_iterable(groups)), per_segment

    def _moduli(
        self, layers: Sequence[Any], per_segment: IntArray, modulus: FloatArray
    ) -> tuple[Material, ...]:
        """The distinct materials; each layer's shear modulus (Pa) written to ``modulus``.

        Layers of unknown materials are flagged.
        """
        # One material throughout is the common case, and counting is cheaper than hashing.
        first = layers[0].material
        same = operator.countOf(map(_MATERIAL, layers), first) == len(layers)
        names = [first] if same else list(map(_MATERIAL, layers))
        found: dict[str, Material | None] = {}
        for name in dict.fromkeys(names):  # a loop over the distinct names
            try:
                found[name] = self.builder.material(name)
            except InputError:
                found[name] = None
        moduli = np.array([np.nan if m is None else m.shear_modulus for m in found.values()])
        if len(found) == 1:
            modulus[:] = moduli[0]
        else:
            position = {name: number for number, name in enumerate(found)}
            modulus[:] = moduli[np.fromiter(map(position.__getitem__, names), np.intp, len(names))]
        self.flagged |= _any_layer(np.isnan(modulus), per_segment)
        return tuple(m for m in found.values() if m is not None)

    def _sections(
        self, layers: Sequence[Any], per_segment: IntArray, values: FloatArray
    ) -> tuple[np.ndarray[Any, np.dtype[np.int8]], FloatArray]:
        """Shape codes and outer diameters (m) of the layers.

        Their d_start, d_end, bore, K and τ/T are written to ``values[1:]`` (m, m⁴, 1/m³).
        """
        sections = list(map(_SECTION, layers))
        count = len(sections)
        kinds = np.fromiter(map(type, sections), object, count)
        shape = np.full(count, GIVEN, dtype=np.int8)
        for kind, code in _CIRCULAR_CODES.items():  # a loop over the circular shapes
            shape[kinds == kind] = code
        del kinds
        outer = np.full(count, np.nan)
        refused = np.zeros(count, dtype=bool)
        codes = np.unique(shape).tolist()
        for code in codes:  # a loop over the shapes present
            mask = shape == code
            picked = None if len(codes) == 1 else mask.tolist()
            members = _Picked(sections, picked, int(np.count_nonzero(mask)))
            read = self._described if code == GIVEN else self._circular
            columns, outer_of, refused_of = read(code, members)
            rows: Any = slice(None) if picked is None else mask
            for number, column in enumerate(columns, start=1):
                if column is not None:
                    values[number, rows] = column
            outer[rows], refused[rows] = outer_of, refused_of
        self.flagged |= _any_layer(refused, per_segment)
        if np.any(per_segment > 1):
            self.flagged |= _unnested(shape, values[1:], per_segment)
        return shape, outer

    def _circular(self, code: int, members: _Picked) -> tuple[_Columns, FloatArray, BoolArray]:
        """Columns of circular sections of one shape.

        Returns d_start, d_end, bore (m; K and τ/T follow from them: ``None``), the outer
        diameters (m) and which sections the model refuses (:mod:`workbench.solver.sections`).
        """
        cls = _CIRCULAR[code]
        if code == SOLID:
            start = end = self.si(members, cls, "diameter")
            bore = np.zeros(len(members))
            refused = not_normal_positive(start)
        elif code == TUBE:
            start = end = self.si(members, cls, "outer_diameter")
            bore = self.si(members, cls, "inner_diameter")
            refused = not_normal_positive(start) | not_normal_positive(bore) | ~(bore < start)
        else:
            start = self.si(members, cls, "diameter_start")
            end = self.si(members, cls, "diameter_end")
            bore = self.si(members, cls, "bore")
            refused = (
                not_normal_positive(start)
                | not_normal_positive(end)
                | ~(bore >= 0.0)
                | ~np.isfinite(bore)
                | ~(bore < np.fmin(start, end))
            )
        # J and τ/T in range at both ends (between them they are monotonic in the diameter).
        refused |= circles_out_of_range(start, bore) | circles_out_of_range(end, bore)
        # The model's outer radius is half the largest diameter; the hole check doubles it.
        outer = 2.0 * (np.fmax(start, end) / 2.0)
        return (start, end, bore, None, None), outer, refused

    def _described(self, code: int, picked: _Picked) -> tuple[_Columns, FloatArray, BoolArray]:
        """The same for non-circular sections: each distinct one described by its class."""
        del code
        members = list(picked)
        keys = list(map(msgspec.json.encode, members))
        first = dict(zip(reversed(keys), range(len(keys) - 1, -1, -1), strict=True))
        described: dict[bytes, tuple[float, ...]] = {}
        for key, row in first.items():  # a loop over the distinct sections
            try:
                section = self.builder.section(members[row])
            except InputError:
                described[key] = (np.nan,) * 6
                continue
            described[key] = (*section_row(section)[1:], 2.0 * section.outer_radius)
        values = np.array(list(map(described.__getitem__, keys)), dtype=float).T.reshape(6, -1)
        return (None, None, None, values[3], values[4]), values[5], np.isnan(values[3])

    def _details(self, outer: FloatArray) -> None:
        """Flag the fillets, cross holes and notches the model refuses.

        ``outer``: each segment's outer diameter (m), which a cross hole must be smaller than.
        """
        segments, cls = self.segments, declared.Segment
        if any(map(operator.attrgetter("fillet_radius"), segments)):
            fillet = self.si(segments, cls, "fillet_radius")
            self.flagged |= ~np.isnan(fillet) & not_normal_positive(fillet)
        if any(map(operator.attrgetter("cross_hole_diameter"), segments)):
            hole = self.si(segments, cls, "cross_hole_diameter")
            self.flagged |= ~np.isnan(hole) & (not_normal_positive(hole) | ~(hole < outer))
        if any(map(operator.attrgetter("notch"), segments)):
            notches = list(map(operator.attrgetter("notch"), segments))
            rows = np.flatnonzero(np.fromiter(map(declared.given, notches), bool, len(notches)))
            members = list(map(notches.__getitem__, rows))
            kts = self.si(members, declared.Notch, "kts")
            radius = self.si(members, declared.Notch, "radius")
            sensitivity = self.si(members, declared.Notch, "notch_sensitivity")
            refused = (
                ~(kts >= 1.0)
                | ~np.isfinite(kts)
                | (~np.isnan(radius) & not_normal_positive(radius))
                | (~np.isnan(sensitivity) & ~((sensitivity >= 0.0) & (sensitivity <= 1.0)))
                | (~np.isnan(radius) & ~np.isnan(sensitivity))
            )
            self.flagged[rows[refused]] = True


def _joined(shaft_ids: tuple[str, ...], shafts: list[_ShaftColumns]) -> SegmentTable:
    """The segment table of every shaft, shaft after shaft."""

    def joined(arrays: list[Any]) -> Any:
        return arrays[0] if len(arrays) == 1 else np.concatenate(arrays, axis=-1)

    per_segment = joined([shaft.layers_per_segment for shaft in shafts])
    values = joined([shaft.layer_values for shaft in shafts])
    counts = [len(shaft.length) for shaft in shafts]
    return SegmentTable(
        shaft_ids=shaft_ids,
        shaft_segment_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.intp),
        length=joined([shaft.length for shaft in shafts]),
        segment_layer_start=np.concatenate([[0], np.cumsum(per_segment)]).astype(np.intp),
        layer_shape=joined([shaft.layer_shape for shaft in shafts]),
        shear_modulus=values[0],
        outer_diameter_start=values[1],
        outer_diameter_end=values[2],
        inner_diameter=values[3],
        torsion_constant=values[4],
        stress_per_torque=values[5],
    )


__all__ = ["SHAPE_CODES", "CaseSystem", "case_system"]
