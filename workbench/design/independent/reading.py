"""The decoded case file as SI arrays for the independent check, read without the solver.

Numbers are converted by the quantity the declaration gives each key
(:class:`workbench.case.convert.Converter`); materials come from the case, else from the
library. What the check does not cover is reported by :class:`NotCovered`, not guessed.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from workbench.case import declaration as declared
from workbench.case.convert import Converter, unit_system
from workbench.case.declaration.shapes import FE_SHAPES, OPEN_SHAPES, Angle, Tee
from workbench.case.materials import library_material
from workbench.case.power import torque_from_power
from workbench.design.independent.sections import LayerRigidity, layer_rigidity

__all__ = [
    "WARPING_NOT_COVERED",
    "NotCovered",
    "System",
    "read_system",
    "require_uniform_torsion",
]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]


class NotCovered(Exception):  # noqa: N818 - a plain answer, not an error of the program
    """The case uses a feature the independent check does not cover (the message names it)."""


#: What the record says instead of the independent check for a case whose open sections are
#: restrained against warping (defined here only): the force method solves uniform torsion.
WARPING_NOT_COVERED = (
    "restrained warping of open sections: this check solves uniform (Saint-Venant) torsion "
    "only, so the torques shared between supports, the bimoments and the warping stresses of "
    "this case are not checked independently"
)


#: The open shapes whose warping constant is not 0 in general (an angle's and a tee's is, by the
#: thin-walled theory; a polyline's may be).
_WARPING_SHAPES = tuple(shape for shape in OPEN_SHAPES if shape not in (Angle, Tee))


def require_uniform_torsion(warping_restrained: Iterable[bool]) -> None:
    """Raise :class:`NotCovered` with :data:`WARPING_NOT_COVERED` if any flag is true.

    Parameters
    ----------
    warping_restrained
        Whether each support (or any other part) of the case restrains warping.
    """
    if any(warping_restrained):
        raise NotCovered(WARPING_NOT_COVERED)


@dataclass(frozen=True)
class System:
    """A case in SI, as arrays.

    Attributes
    ----------
    shaft_ids, shaft_lengths
        Each shaft's name and length (m).
    segment_shaft, segment_start, segment_length
        Shaft number, start x (m) and length (m) of every segment.
    segment_constant
        The constant part of each segment's rigidity G·J (N·m²), layers summed.
    taper_segment, taper_scale, taper_start, taper_change
        Tapered layers: segment number, g = G·π/32 (Pa), D₀ and ΔD (m), adding g·(D₀ + ΔD·u)⁴.
    support_shaft, support_x, support_compliance, support_rotation
        Supports in file order: shaft, x (m), 1/k (rad/(N·m), 0 when fixed), prescribed
        rotation (rad).
    gear_shaft, gear_x, gear_arm
        (n_gears, 2): the shafts, positions (m) and signed arms (m) of gears a and b; a mesh force
        F puts the torque arm·F on each shaft (arm_a = r_a; arm_b = +r_b external, −r_b internal).
    point_case, point_shaft, point_x, point_torque
        Concentrated torques of every load case (N·m).
    spread_case, spread_shaft, spread_start, spread_end, spread_q_start, spread_q_end
        Distributed torques: from, to (m), intensities (N·m/m).
    case_names, combination_names, combination_factors
        Load cases; combinations and their (n_combinations, n_cases) factors.
    """

    shaft_ids: tuple[str, ...]
    shaft_lengths: FloatArray
    segment_shaft: IntArray
    segment_start: FloatArray
    segment_length: FloatArray
    segment_constant: FloatArray
    taper_segment: IntArray
    taper_scale: FloatArray
    taper_start: FloatArray
    taper_change: FloatArray
    support_shaft: IntArray
    support_x: FloatArray
    support_compliance: FloatArray
    support_rotation: FloatArray
    gear_shaft: IntArray
    gear_x: FloatArray
    gear_arm: FloatArray
    point_case: IntArray
    point_shaft: IntArray
    point_x: FloatArray
    point_torque: FloatArray
    spread_case: IntArray
    spread_shaft: IntArray
    spread_start: FloatArray
    spread_end: FloatArray
    spread_q_start: FloatArray
    spread_q_end: FloatArray
    case_names: tuple[str, ...]
    combination_names: tuple[str, ...]
    combination_factors: FloatArray


def _items(case: Any, name: str) -> list[Any]:
    value = declared.value_of(case, name)
    return list(value) if value else []


class _Reader:
    """Converts one case's numbers to SI and looks its materials up."""

    def __init__(self, case: declared.CaseFile) -> None:
        self.si = Converter(unit_system(declared.value_of(case, "units"))).si
        self.materials = {
            name: self.si(entry, "shear_modulus")
            for name, entry in (declared.value_of(case, "materials") or {}).items()
        }

    def shear_modulus(self, name: str) -> float:
        if name not in self.materials:
            self.materials[name] = library_material(name).shear_modulus
        return self.materials[name]

    def section(self, entry: Any) -> Any:
        """The same declared section with every number in SI.

        Raises
        ------
        NotCovered
            For a section by finite elements (``polygon``, ``dxf``): no closed form checks it.
        """
        if isinstance(entry, FE_SHAPES):
            msg = (
                f"a {entry.__struct_config__.tag} section, whose J comes from finite elements "
                "(sectionproperties): the check has no closed form of its own for it"
            )
            raise NotCovered(msg)
        if isinstance(entry, OPEN_SHAPES):  # one that does not warp (an angle, a tee)
            msg = (
                f"a {entry.__struct_config__.tag} section, whose J comes from its wall "
                "mid-line: the check has no closed form of its own for it"
            )
            raise NotCovered(msg)
        values: dict[str, Any] = {}
        for name in type(entry).__struct_fields__:
            if name == "walls":
                values[name] = [
                    declared.Wall(
                        length=self.si(wall, "length"), thickness=self.si(wall, "thickness")
                    )
                    for wall in entry.walls
                ]
            else:
                values[name] = self.si(entry, name)
        return type(entry)(**{key: value for key, value in values.items() if value is not None})

    def layers(self, segment: declared.Segment) -> list[LayerRigidity]:
        if declared.given(segment.layers):
            pairs = [(layer.material, layer.section) for layer in segment.layers]  # type: ignore[union-attr]
        else:
            pairs = [(segment.material, segment.section)]
        return [
            layer_rigidity(self.section(section), self.shear_modulus(str(material)))
            for material, section in pairs
        ]


def read_system(case: declared.CaseFile) -> System:
    """The SI arrays of a decoded, validated case file.

    Parameters
    ----------
    case
        The decoded case file in its own units (:mod:`workbench.case.load`).

    Returns
    -------
    System
        Every number the check needs, in SI.

    Raises
    ------
    NotCovered
        When the case has no load case or no support, or warps (:data:`WARPING_NOT_COVERED`).
    """
    reader = _Reader(case)
    si = reader.si
    shaft_number = {shaft.id: number for number, shaft in enumerate(case.shafts)}
    lengths = [[si(segment, "length") for segment in shaft.segments] for shaft in case.shafts]
    segment_length = np.concatenate([np.asarray(row, dtype=float) for row in lengths])
    counts = np.array([len(row) for row in lengths])
    segment_shaft = np.repeat(np.arange(len(counts)), counts)
    segment_start = np.concatenate([np.cumsum([0.0, *row[:-1]]) for row in lengths])
    shaft_lengths = np.array([float(np.sum(row)) for row in lengths])

    constant = np.zeros(len(segment_length))
    tapers: list[tuple[int, float, float, float]] = []
    segments = [segment for shaft in case.shafts for segment in shaft.segments]
    # A case warps where a support states its warping or an open section that warps is used.
    require_uniform_torsion(
        [declared.given(support.warping) for support in _items(case, "supports")]
        + [isinstance(segment.section, _WARPING_SHAPES) for segment in segments]
    )
    for number, segment in enumerate(segments):  # reading the file: one struct each
        for layer in reader.layers(segment):
            constant[number] += layer.constant
            if layer.taper is not None:
                tapers.append((number, *layer.taper))
    taper = np.array(tapers, dtype=float).reshape(-1, 4)

    supports = _items(case, "supports")
    if not supports:
        msg = "a case without supports"
        raise NotCovered(msg)
    stiffness = np.array([si(s, "stiffness") or np.inf for s in supports], dtype=float)
    fixed = np.array([declared.value_of(s, "kind") == "fixed" for s in supports], dtype=bool)
    gears = _items(case, "gears")
    gear_arm = np.array(
        [
            [
                si(g.a, "radius"),
                si(g.b, "radius") * (-1.0 if declared.value_of(g, "mesh") == "internal" else 1.0),
            ]
            for g in gears
        ],
        dtype=float,
    ).reshape(-1, 2)

    load_cases = _items(case, "load_cases")
    if not load_cases:
        msg = "a case without load cases"
        raise NotCovered(msg)
    points = [(n, t) for n, load in enumerate(load_cases) for t in _items(load, "torques")]
    spreads = [(n, d) for n, load in enumerate(load_cases) for d in _items(load, "distributed")]
    names = tuple(load.name for load in load_cases)
    combinations = _items(case, "combinations")
    factors = np.array(
        [[c.factors.get(name, 0.0) for name in names] for c in combinations], dtype=float
    ).reshape(len(combinations), len(names))

    def torque(entry: declared.Torque) -> float:
        if declared.given(entry.torque):
            return float(si(entry, "torque"))
        return torque_from_power(si(entry, "power"), si(entry, "speed"))

    return System(
        shaft_ids=tuple(shaft_number),
        shaft_lengths=shaft_lengths,
        segment_shaft=segment_shaft,
        segment_start=segment_start,
        segment_length=segment_length,
        segment_constant=constant,
        taper_segment=taper[:, 0].astype(np.int64),
        taper_scale=taper[:, 1],
        taper_start=taper[:, 2],
        taper_change=taper[:, 3],
        support_shaft=np.array([shaft_number[s.shaft] for s in supports], dtype=np.int64),
        support_x=np.array([si(s, "x") for s in supports], dtype=float),
        support_compliance=np.where(fixed, 0.0, 1.0 / stiffness),
        support_rotation=np.array([si(s, "rotation") for s in supports], dtype=float),
        gear_shaft=np.array(
            [[shaft_number[g.a.shaft], shaft_number[g.b.shaft]] for g in gears], dtype=np.int64
        ).reshape(-1, 2),
        gear_x=np.array([[si(g.a, "x"), si(g.b, "x")] for g in gears], dtype=float).reshape(-1, 2),
        gear_arm=gear_arm,
        point_case=np.array([n for n, _ in points], dtype=np.int64),
        point_shaft=np.array([shaft_number[t.shaft] for _, t in points], dtype=np.int64),
        point_x=np.array([si(t, "x") for _, t in points], dtype=float),
        point_torque=np.array([torque(t) for _, t in points], dtype=float),
        spread_case=np.array([n for n, _ in spreads], dtype=np.int64),
        spread_shaft=np.array([shaft_number[d.shaft] for _, d in spreads], dtype=np.int64),
        spread_start=np.array([si(d, "start") for _, d in spreads], dtype=float),
        spread_end=np.array([si(d, "end") for _, d in spreads], dtype=float),
        spread_q_start=np.array([si(d, "intensity_start") for _, d in spreads], dtype=float),
        spread_q_end=np.array([si(d, "intensity_end") for _, d in spreads], dtype=float),
        case_names=names,
        combination_names=tuple(c.name for c in combinations),
        combination_factors=factors,
    )
