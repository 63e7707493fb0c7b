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
from workbench.case.validate import all_normal_positive, not_normal_positive, within
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
from workbench.solver.sections import FloatArray, circles_refused

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

_MATERIAL = operator.attrgetter("material")
_HOLE = operator.attrgetter("cross_hole_diameter")
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
        References(
            index, [shaft.total_length for shaft in shafts], [len(shaft.length) for shaft in shafts]
        ).check(
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
    """One shaft's segment and layer columns (SI), read-only: equal columns may be one array."""

    length: FloatArray  # (n_segments,)
    layer_start: IntArray  # (n_segments + 1,) first layer row of each segment
    layer_shape: np.ndarray[Any, np.dtype[np.int8]]  # (n_layers,)
    # (n_layers,) each: shear modulus, d_start, d_end, bore, K, τ/T
    layer_values: tuple[FloatArray, ...]
    materials: tuple[Material, ...]  # the distinct materials the shaft uses

    @property
    def total_length(self) -> float:
        """The shaft's length (m), summed as the model sums it."""
        return float(np.cumsum(self.length)[-1])


#: The d_start, d_end, bore, K and τ/T of a group of sections (``None``: not applicable).
_Columns = tuple[FloatArray | None, ...]

#: The shape code of the type of a segment's ``section``; a layered segment has none.
_LAYERED = -1
_CODE_OF_TYPE: dict[type, int] = {
    **SHAPE_CODES,
    type(msgspec.UNSET): _LAYERED,
    type(None): _LAYERED,
}


def _shape_codes(sections: list[Any]) -> np.ndarray[Any, np.dtype[np.int8]]:
    """(n,) the shape code of each section (:data:`_LAYERED` where there is none)."""
    codes = map(_CODE_OF_TYPE.__getitem__, map(type, sections))
    return np.fromiter(codes, np.int8, len(sections))


@functools.cache
def _required(cls: type) -> frozenset[str]:
    """The keys of a declared object that are never left out."""
    return frozenset(item.name for item in msgspec.structs.fields(cls) if item.required)


def _not_positive(values: FloatArray) -> BoolArray | None:
    """Where a value is not a finite normal number above zero (NaN included); ``None``: nowhere.

    Two reductions find the common case, every value fine, without a mask the size of the column.
    """
    return None if all_normal_positive(values) else not_normal_positive(values)


def _either(*masks: BoolArray | None) -> BoolArray | None:
    """The union of masks (``None`` stands for an empty one)."""
    given = [mask for mask in masks if mask is not None]
    return functools.reduce(np.logical_or, given) if given else None


def _any_layer(refused: BoolArray, per_segment: IntArray | None) -> BoolArray:
    """(n_segments,) whether any layer of a segment is refused (``None``: one layer each)."""
    if per_segment is None:
        return refused
    return np.add.reduceat(refused.astype(np.intp), np.cumsum(per_segment) - per_segment) > 0


def _unnested(
    shape: np.ndarray[Any, np.dtype[np.int8]],
    start: FloatArray,
    end: FloatArray,
    bore: FloatArray,
    per_segment: IntArray,
) -> BoolArray:
    """(n_segments,) layered segments with a non-circular layer or layers that overlap.

    Sorted by bore within each segment (as the model sorts them), a layer overlaps the one
    before it when its bore is smaller than that layer's largest outer diameter.
    """
    segment = np.repeat(np.arange(len(per_segment)), per_segment)
    layered = per_segment[segment] > 1
    refused = np.zeros(len(per_segment), dtype=bool)
    refused[segment[layered & (shape == GIVEN)]] = True
    order = np.lexsort((bore, segment))
    inner, outer = order[1:], order[:-1]
    overlap = (segment[inner] == segment[outer]) & ~(
        bore[inner] >= np.fmax(start[outer], end[outer]) * (1.0 - _NEST_TOLERANCE)
    )
    refused[segment[outer[overlap & layered[outer]]]] = True
    return refused


def _outer(start: FloatArray, end: FloatArray) -> FloatArray:
    """Outer diameters (m) of circular sections, as the model's hole check takes them.

    Its outer radius is half the largest diameter; the check doubles it.
    """
    return 2.0 * (np.fmax(start, end) / 2.0)


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


def _filled(count: int, value: float) -> FloatArray:
    """A read-only column holding one value everywhere, without a buffer of its size."""
    return np.broadcast_to(np.float64(value), (count,))


class _ShaftReader:
    """Reads one declared shaft into columns; flags the segments a check refuses.

    Each key is one pass over the structs in C (``map`` with an attribute getter), each check
    a few whole-column operations; a mask is made only where a check finds something.
    """

    def __init__(self, builder: ModelBuilder, number: int, entry: declared.Shaft) -> None:
        self.builder, self.number, self.entry = builder, number, entry
        self.segments: Sequence[declared.Segment] = entry.segments
        self.flagged: BoolArray | None = None

    def flag(self, refused: BoolArray | None) -> None:
        """Flag the segments where ``refused`` holds (``None``: none)."""
        if refused is not None:
            self.flagged = refused if self.flagged is None else self.flagged | refused

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
            column = np.fromiter(values, float, count)
        else:
            default = declared.default_of(cls, name)
            fill = np.nan if default is None else float(default)
            given = declared.given
            column = np.fromiter((v if given(v) else fill for v in values), float, count)
        factor = self.builder.convert.factor(cls, name)
        if factor != 1.0:
            with np.errstate(over="ignore", under="ignore"):  # an overflow is flagged
                column *= factor
        return column

    def read(self) -> _ShaftColumns:
        """The shaft's columns; raises the model's error of the first segment it refuses."""
        segments = self.segments
        length = self.si(segments, declared.Segment, "length")
        self.flag(_not_positive(length))
        sections: list[Any] = list(map(_SECTION, segments))
        codes = _shape_codes(sections)
        per_segment: IntArray | None = None
        layers: Sequence[Any] = segments
        if codes.min() == _LAYERED:  # some segments are bonded layers
            layers, per_segment = self._layers()
            sections = list(map(_SECTION, layers))
            codes = _shape_codes(sections)
        modulus, materials = self._moduli(layers, per_segment)
        holes = any(map(_HOLE, segments))
        dimensions, outer = self._sections(sections, codes, per_segment, holes)
        del sections
        self._details(outer, per_segment)
        if self.flagged is not None:
            for row in np.flatnonzero(self.flagged).tolist():  # a loop over refused segments
                try:
                    self.builder.segment(segments[row])
                except InputError as error:
                    raise within(f"shafts[{self.number}].segments[{row}]", error) from None
        try:
            Shaft.check_id(self.entry.id)
            check_segment_lengths(length)
        except InputError as error:
            raise within(f"shafts[{self.number}]", error) from None
        # Columns that do not apply (K and τ/T of circular sections) share one NaN column.
        nan = _filled(len(codes), np.nan)
        values = [modulus, *(nan if column is None else column for column in dimensions)]
        for array in (length, *values):
            array.setflags(write=False)
        if per_segment is None:  # one layer each: the layer rows are the segment rows
            layer_start = np.arange(len(segments) + 1)
        else:
            layer_start = np.concatenate([[0], np.cumsum(per_segment)])
        return _ShaftColumns(
            length=length,
            layer_start=layer_start,
            layer_shape=codes,
            layer_values=tuple(values),
            materials=materials,
        )

    def _layers(self) -> tuple[list[Any], IntArray]:
        """Every layer (a one-layer segment stands for its own layer) and each segment's count."""
        groups = [segment.layers or (segment,) for segment in self.segments]
        per_segment = np.fromiter(map(len, groups), np.intp, len(groups))
        return list(itertools.chain.from_iterable(groups)), per_segment

    def _moduli(
        self, layers: Sequence[Any], per_segment: IntArray | None
    ) -> tuple[FloatArray, tuple[Material, ...]]:
        """Each layer's shear modulus (Pa) and the distinct materials.

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
            modulus = _filled(len(layers), float(moduli[0]))
        else:
            position = {name: number for number, name in enumerate(found)}
            modulus = moduli[np.fromiter(map(position.__getitem__, names), np.intp, len(names))]
        if np.isnan(moduli).any():
            self.flag(_any_layer(np.isnan(modulus), per_segment))
        return modulus, tuple(m for m in found.values() if m is not None)

    def _sections(
        self,
        sections: list[Any],
        codes: np.ndarray[Any, np.dtype[np.int8]],
        per_segment: IntArray | None,
        with_outer: bool,
    ) -> tuple[_Columns, FloatArray | None]:
        """The layers' d_start, d_end, bore, K and τ/T (m, m⁴, 1/m³; ``None``: NaN throughout).

        Also each layer's outer diameter (m) ``with_outer`` (for cross holes), else ``None``.
        The sections are read a shape at a time.
        """
        count = len(sections)
        present = [code for code in range(GIVEN + 1) if np.any(codes == code)]
        if len(present) == 1:
            group = self._group(present[0], _Picked(sections, None, count), with_outer)
            columns, outer, refused = list(group[0]), group[1], group[2]
        else:
            columns = [None] * 5
            outer = np.empty(count) if with_outer else None
            parts: list[BoolArray | None] = []
            # d_end is d_start unless a section tapers: then one array serves for both.
            filled = range(5) if TAPERED in present else (0, 2, 3, 4)
            for code in present:  # a loop over the shapes present
                mask = codes == code
                picked = _Picked(sections, mask.tolist(), int(np.count_nonzero(mask)))
                group_columns, group_outer, group_refused = self._group(code, picked, with_outer)
                for number in filled:
                    column = group_columns[number]
                    if column is not None:
                        target = columns[number]
                        if target is None:
                            # Circular shapes fill d_start, d_end and bore, non-circular
                            # ones K and τ/T: the rows of the others stay NaN.
                            whole = number <= 2 and GIVEN not in present
                            target = np.empty(count) if whole else np.full(count, np.nan)
                            columns[number] = target
                        target[mask] = column
                if outer is not None and group_outer is not None:
                    outer[mask] = group_outer
                if group_refused is not None:
                    parts.append(_scattered(mask, group_refused))
            if TAPERED not in present:
                columns[1] = columns[0]
            refused = _either(*parts)
        if refused is not None:
            self.flag(_any_layer(refused, per_segment))
        if per_segment is not None and np.any(per_segment > 1):
            start, end, bore = (
                np.full(count, np.nan) if column is None else column for column in columns[:3]
            )
            self.flag(_unnested(codes, start, end, bore, per_segment))
        return tuple(columns), outer

    def _group(
        self, code: int, members: _Picked, with_outer: bool
    ) -> tuple[_Columns, FloatArray | None, BoolArray | None]:
        """Columns of the sections of one shape (see :meth:`_circular`, :meth:`_described`).

        Also their outer diameters (m) ``with_outer``, and which of them the model refuses
        (``None``: none).
        """
        if code == GIVEN:
            return self._described(members)
        columns, refused = self._circular(code, members)
        start, end = columns[0], columns[1]
        outer = _outer(start, end) if with_outer and start is not None and end is not None else None
        return columns, outer, refused

    def _circular(self, code: int, members: _Picked) -> tuple[_Columns, BoolArray | None]:
        """Columns of circular sections of one shape.

        Returns d_start, d_end, bore (m; K and τ/T follow from them: ``None``) and which
        sections the model refuses (:mod:`workbench.solver.sections`; ``None``: none).
        """
        cls = _CIRCULAR[code]
        if code == SOLID:
            start = end = self.si(members, cls, "diameter")
            bore = np.zeros(len(members))
            refused = _not_positive(start)
        elif code == TUBE:
            start = end = self.si(members, cls, "outer_diameter")
            bore = self.si(members, cls, "inner_diameter")
            refused = _either(_not_positive(start), _not_positive(bore))
            if refused is None and not np.less(bore, start).all():
                refused = ~(bore < start)
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
        ends = (start,) if end is start else (start, end)
        for diameter in ends:  # one end, or both of a taper
            out_of_range = circles_refused(diameter, bore)
            if out_of_range is not None:
                refused = out_of_range if refused is None else refused | out_of_range
        return (start, end, bore, None, None), refused

    def _described(self, picked: _Picked) -> tuple[_Columns, FloatArray, BoolArray | None]:
        """Columns of non-circular sections, each distinct one described by its class.

        Also their outer diameters (m) and which the model refuses (``None``: none).
        """
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
        refused = np.isnan(values[3])
        return (
            (None, None, None, values[3], values[4]),
            values[5],
            refused if refused.any() else None,
        )

    def _details(self, outer: FloatArray | None, per_segment: IntArray | None) -> None:
        """Flag the fillets, cross holes and notches the model refuses.

        ``outer``: each layer's outer diameter (m) when some segment has a cross hole, which
        must be smaller than the segment's (its last layer's).
        """
        segments, cls = self.segments, declared.Segment
        if any(map(operator.attrgetter("fillet_radius"), segments)):
            fillet = self.si(segments, cls, "fillet_radius")
            self.flag(~np.isnan(fillet) & not_normal_positive(fillet))
        if outer is not None:
            hole = self.si(segments, cls, "cross_hole_diameter")
            if per_segment is not None:
                outer = outer[np.cumsum(per_segment) - 1]
            self.flag(~np.isnan(hole) & (not_normal_positive(hole) | ~(hole < outer)))
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
            flagged = np.zeros(len(segments), dtype=bool)
            flagged[rows[refused]] = True
            self.flag(flagged)


def _scattered(mask: BoolArray, values: BoolArray) -> BoolArray:
    """A mask the size of ``mask`` holding ``values`` where ``mask`` holds."""
    full = np.zeros(len(mask), dtype=bool)
    full[mask] = values
    return full


def _joined(shaft_ids: tuple[str, ...], shafts: list[_ShaftColumns]) -> SegmentTable:
    """The segment table of every shaft, shaft after shaft."""
    if len(shafts) == 1:
        only = shafts[0]
        length, layer_start, shape, values = (
            only.length,
            only.layer_start,
            only.layer_shape,
            only.layer_values,
        )
    else:
        length = np.concatenate([shaft.length for shaft in shafts])
        offsets = np.cumsum([0] + [shaft.layer_start[-1] for shaft in shafts])
        layer_start = np.concatenate(
            [
                shaft.layer_start[:-1] + offset
                for shaft, offset in zip(shafts, offsets, strict=False)
            ]
            + [offsets[-1:]]
        )
        shape = np.concatenate([shaft.layer_shape for shaft in shafts])
        values = tuple(
            np.concatenate([shaft.layer_values[row] for shaft in shafts]) for row in range(6)
        )
    counts = [len(shaft.length) for shaft in shafts]
    return SegmentTable(
        shaft_ids=shaft_ids,
        shaft_segment_start=np.concatenate([[0], np.cumsum(counts)]).astype(np.intp),
        length=length,
        segment_layer_start=layer_start.astype(np.intp, copy=False),
        layer_shape=shape,
        shear_modulus=values[0],
        outer_diameter_start=values[1],
        outer_diameter_end=values[2],
        inner_diameter=values[3],
        torsion_constant=values[4],
        stress_per_torque=values[5],
    )


__all__ = ["SHAPE_CODES", "CaseSystem", "case_system"]
