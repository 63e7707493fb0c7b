"""Many variants of one topology, solved at once: the batch entry point of the array core.

A variant keeps the base case's shafts, segments, supports, gears and loads (its topology) and
changes their sizes: segment lengths, section dimensions, shear moduli, spring stiffnesses,
prescribed rotations, gear radii, load magnitudes. Each is given as a column with one row per
variant. All variants are checked at once; one that is not a valid model (a negative wall, a
bore as large as its shaft, a zero length) is flagged with the reason instead of failing the
batch, and so is one whose solution cannot be trusted (nearly a mechanism, see
:mod:`~workbench.solver.soundness`); the valid ones are solved together: their systems are stacked in one band (one
LAPACK factorization for every variant and load case) or, with gears, in one sparse system.

A node keeps its place as a fraction of its segment when lengths vary, so supports, gears and
loads stay on the same nodes.

Examples
--------
A diameter sweep of a solid shaft (every segment the same diameter in each variant):

>>> import numpy as np
>>> from workbench.solver.io import parse_case
>>> model = parse_case({"materials": {"s": {"shear_modulus": 80e9}},
...     "shafts": [{"id": "a", "segments": [{"length": 1.0, "material": "s",
...         "section": {"shape": "solid", "diameter": 0.05}}]}],
...     "supports": [{"shaft": "a", "x": 0.0}],
...     "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1.0, "torque": 100.0}]}]})
>>> batch = solve_batch(model, outer_diameter=np.array([[0.04], [0.05], [-0.01]]))
>>> batch.valid.tolist()
[True, True, False]
>>> batch.reason(2)
'shafts[0].segments[0].section.diameter: must be greater than zero (-0.01 m)'
"""

from __future__ import annotations

import dataclasses
import functools
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.case.errors import InputError, listing
from workbench.case.units import quote
from workbench.case.validate import not_normal_positive, too_small
from workbench.solver.columns import (
    DIMENSION_KEYS,
    GIVEN,
    SOLID,
    TAPERED,
    TUBE,
    BoolArray,
    CaseTable,
    IntArray,
    case_table,
)
from workbench.solver.finite_results import solve_in_range
from workbench.solver.mesh import Mesh, build_mesh_from_table, node_positions
from workbench.solver.mesh_sizes import size_mesh
from workbench.solver.model import Model
from workbench.solver.sections import FloatArray, circles_out_of_range
from workbench.solver.soundness import Soundness

#: Columns a variant may change, by the table that holds them.
SEGMENT_COLUMNS = (
    "length",
    "shear_modulus",
    "outer_diameter_start",
    "outer_diameter_end",
    "inner_diameter",
    "torsion_constant",
    "stress_per_torque",
)
CASE_COLUMNS = (
    "support_stiffness",
    "support_rotation",
    "gear_coefficient",
    "torque",
    "load_intensity",
)


@dataclass(frozen=True)
class _Rule:
    """One validity rule: which column it reads and how a breach is told."""

    column: str
    message: Callable[[float, float], str]  # (value, other value) → text after the path
    key: Callable[[int], str]  # layer shape code → field name in the case file


def _positive(what: str) -> Callable[[float, float], str]:
    def message(value: float, _: float) -> str:
        if value > 0.0 and np.isfinite(value):
            return too_small(value, what)
        return f"must be greater than zero ({quote(value, what)})"

    return message


def _out_of_range(value: float, _: float) -> str:
    size = "small" if value < 1.0 else "large"
    return (
        f"{quote(value, 'length')} is too {size} for the torsion formulas: J or τ/T is out of range"
    )


def _same_key(name: str) -> Callable[[int], str]:
    return lambda _: name


_RULES = (
    _Rule("length", _positive("length"), _same_key("length")),
    _Rule(
        "shear_modulus",
        lambda value, _: f"its shear modulus must be greater than zero ({quote(value, 'stress')})",
        _same_key("material"),
    ),
    _Rule("outer_diameter_start", _positive("length"), lambda shape: DIMENSION_KEYS[shape][0]),
    _Rule("outer_diameter_end", _positive("length"), lambda shape: DIMENSION_KEYS[shape][1]),
    _Rule(
        "inner_diameter",
        lambda value, _: f"must be greater than zero ({quote(value, 'length')})",
        lambda shape: DIMENSION_KEYS[shape][2],
    ),
    _Rule(
        "inner_diameter",
        lambda value, _: f"must not be negative ({quote(value, 'length')})",
        lambda shape: DIMENSION_KEYS[shape][2],
    ),
    _Rule(
        "inner_diameter",
        lambda value, other: (
            f"must be smaller than the outer diameter ({quote(value, 'length')} ≥ "
            f"{quote(other, 'length')})"
        ),
        lambda shape: DIMENSION_KEYS[shape][2],
    ),
    _Rule(
        "outer_diameter_end",
        lambda value, other: (
            f"a prismatic section has one outer diameter: the end value "
            f"{quote(value, 'length')} differs from the start {quote(other, 'length')}"
        ),
        lambda shape: DIMENSION_KEYS[shape][1],
    ),
    _Rule(
        "inner_diameter",
        lambda value, _: f"a solid section has no bore ({quote(value, 'length')})",
        _same_key("diameter"),
    ),
    _Rule("outer_diameter_start", _out_of_range, lambda shape: DIMENSION_KEYS[shape][0]),
    _Rule("outer_diameter_end", _out_of_range, lambda shape: DIMENSION_KEYS[shape][1]),
    _Rule(
        "torsion_constant",
        lambda value, _: f"its torsion constant must be greater than zero ({value:g} m⁴)",
        _same_key("section"),
    ),
    _Rule(
        "stress_per_torque",
        lambda value, _: f"its stress per unit torque must be greater than zero ({value:g} 1/m³)",
        _same_key("section"),
    ),
    _Rule(
        "outer_diameter_start",
        lambda value, other: (
            f"overlaps another bonded layer: its bore ({quote(value, 'length')}) is smaller than "
            f"that layer's outer diameter ({quote(other, 'length')})"
        ),
        _same_key("section"),
    ),
    _Rule("support_stiffness", _positive("stiffness"), _same_key("stiffness")),
    _Rule(
        "support_rotation",
        lambda value, _: f"must be a finite number, not {value}",
        _same_key("rotation"),
    ),
    _Rule(
        "gear_coefficient",
        lambda value, _: f"must be a finite pitch radius greater than zero ({value} m)",
        _same_key("radius"),
    ),
    _Rule("torque", lambda value, _: f"must be a finite number, not {value}", _same_key("torque")),
    _Rule(
        "load_intensity",
        lambda value, _: f"must be a finite number, not {value}",
        _same_key("intensity"),
    ),
)
_RULE_NUMBER = {id(rule): number for number, rule in enumerate(_RULES)}
#: The rule number of a variant whose solve is refused (:mod:`~workbench.solver.soundness`).
UNSOUND = len(_RULES)


@dataclass(frozen=True)
class Validity:
    """Which variants are valid models and, for the others, the first rule each breaks.

    Parameters
    ----------
    valid
        (n_variants,) whether each variant is a valid model.
    rule
        (n_variants,) number of the first broken rule, −1 for a valid variant, :data:`UNSOUND`
        for a variant nearly a mechanism.
    item
        (n_variants,) row (layer, segment, support, …) of the column where it broke.
    value, other
        (n_variants,) the offending value and the value it was compared with (SI).
    """

    valid: BoolArray
    rule: IntArray
    item: IntArray
    value: FloatArray
    other: FloatArray


def _check(
    state: dict[str, Any], rule: _Rule, bad: BoolArray, value: Any, other: Any = np.nan
) -> None:
    """Record ``rule`` for every variant that breaks it first (``bad``: (n_variants, n))."""
    bad = np.asarray(bad).reshape(bad.shape[0], -1)
    hit = bad.any(axis=1) & (state["rule"] < 0)
    if not hit.any():
        return
    where = np.argmax(bad[hit], axis=1)
    state["rule"][hit] = _RULE_NUMBER[id(rule)]
    state["item"][hit] = where
    state["value"][hit] = np.broadcast_to(value, bad.shape).reshape(bad.shape)[hit, where]
    state["other"][hit] = np.broadcast_to(other, bad.shape).reshape(bad.shape)[hit, where]


def validate(table: CaseTable, n_variants: int) -> Validity:
    """Check every variant of a table at once (the rules of the case file, vectorised).

    Parameters
    ----------
    table
        The table with variant columns.
    n_variants
        Number of variants.

    Returns
    -------
    Validity
        The verdict of each variant.
    """
    state = {
        "rule": np.full(n_variants, -1),
        "item": np.zeros(n_variants, dtype=np.intp),
        "value": np.full(n_variants, np.nan),
        "other": np.full(n_variants, np.nan),
    }
    segments = table.segments
    rules = iter(_RULES)

    def each(values: Any) -> FloatArray:
        return np.broadcast_to(values, (n_variants, *np.shape(values)[1:]))

    def not_positive(values: Any) -> BoolArray:
        with np.errstate(invalid="ignore"):  # NaN (a column that does not apply) is refused
            refused: BoolArray = not_normal_positive(values)
        return refused

    length = each(segments.length)
    _check(state, next(rules), not_positive(length), length)
    modulus = each(segments.shear_modulus)
    _check(state, next(rules), not_positive(modulus), modulus)
    shape = segments.layer_shape
    circular = shape != GIVEN
    start, end = each(segments.outer_diameter_start), each(segments.outer_diameter_end)
    bore = each(segments.inner_diameter)
    _check(state, next(rules), circular & not_positive(start), start)
    _check(state, next(rules), circular & not_positive(end), end)
    _check(state, next(rules), (shape == TUBE) & not_positive(bore), bore)
    _check(state, next(rules), (shape == TAPERED) & ~(np.isfinite(bore) & (bore >= 0.0)), bore)
    smaller = np.minimum(start, end)
    _check(state, next(rules), circular & (bore >= smaller), bore, smaller)
    prismatic = (shape == SOLID) | (shape == TUBE)
    _check(state, next(rules), prismatic & (end != start), end, start)
    _check(state, next(rules), (shape == SOLID) & (bore != 0.0), bore)
    _check(state, next(rules), circular & circles_out_of_range(start, bore), start)
    _check(state, next(rules), circular & circles_out_of_range(end, bore), end)
    constant = each(segments.torsion_constant)
    _check(state, next(rules), (shape == GIVEN) & not_positive(constant), constant)
    stress = each(segments.stress_per_torque)
    _check(state, next(rules), (shape == GIVEN) & not_positive(stress), stress)
    _check_nesting(state, next(rules), table, start, end, bore)
    springs = ~table.support_fixed
    stiffness = each(table.support_stiffness)
    _check(state, next(rules), springs & not_positive(stiffness), stiffness)
    rotation = each(table.support_rotation)
    _check(state, next(rules), ~np.isfinite(rotation), rotation)
    radius = np.abs(each(table.gear_coefficient)).reshape(n_variants, -1)
    _check(state, next(rules), not_positive(radius), radius)
    torque = each(table.torque)
    _check(state, next(rules), ~np.isfinite(torque), torque)
    intensity = each(table.load_intensity).reshape(n_variants, -1)
    _check(state, next(rules), ~np.isfinite(intensity), intensity)
    return Validity(state["rule"] < 0, state["rule"], state["item"], state["value"], state["other"])


def _check_nesting(
    state: dict[str, Any],
    rule: _Rule,
    table: CaseTable,
    start: FloatArray,
    end: FloatArray,
    bore: FloatArray,
) -> None:
    """Bonded layers of one segment must not overlap radially (at five points along it)."""
    segments = table.segments
    first = segments.segment_layer_start[:-1]
    count = segments.layers_per_segment
    fractions = np.linspace(0.0, 1.0, 5)[:, None, None]
    outer = start + (end - start) * fractions  # (5, n_variants, n_layers)
    n_layers = len(segments.layer_shape)
    bad = np.zeros(start.shape, dtype=bool)
    own_bore = np.full(start.shape, np.nan)
    other_outer = np.full(start.shape, np.nan)
    for low in range(int(count.max(initial=1))):  # pairs of bonded layers: a handful
        for high in range(low + 1, int(count.max(initial=1))):
            layered = np.flatnonzero(count > high)
            a, b = first[layered] + low, first[layered] + high
            a_inside_b = np.all(bore[None, :, b] >= outer[:, :, a] * (1.0 - 1e-9), axis=0)
            b_inside_a = np.all(bore[None, :, a] >= outer[:, :, b] * (1.0 - 1e-9), axis=0)
            overlap = ~(a_inside_b | b_inside_a)
            # As the case file's reader does: the layer with the larger bore is the outer one,
            # and it is named, with its bore and the inner layer's outer diameter.
            b_outside = bore[:, b] >= bore[:, a]
            for outer_layer, inner_layer, named in ((b, a, b_outside), (a, b, ~b_outside)):
                hit = overlap & named
                bad[:, outer_layer] |= hit
                own_bore[:, outer_layer] = np.where(
                    hit, bore[:, outer_layer], own_bore[:, outer_layer]
                )
                other_outer[:, outer_layer] = np.where(
                    hit, outer[:, :, inner_layer].max(axis=0), other_outer[:, outer_layer]
                )
    if n_layers:
        _check(state, rule, bad, own_bore, other_outer)


@dataclass(frozen=True)
class BatchResults:
    """Results of every variant: arrays (n_variants, …), NaN for a variant that is not valid.

    Parameters
    ----------
    names
        Result names: load cases, then combinations.
    mesh
        The base case's mesh: the topology every variant shares (stations, elements).
    validity
        Which variants are valid, and why the others are not.
    node_x
        (n_variants, n_nodes) node positions (m).
    station_x
        (n_variants, n_stations) station positions (m).
    stress_per_torque
        (n_variants, n_stations) nominal peak shear stress per unit torque (1/m³).
    rigidity
        (n_variants, n_stations) G·K (N·m²).
    torque, angle, shear_stress
        (n_variants, n_results, n_stations) internal torque (N·m), rotation (rad), peak shear
        stress (Pa).
    reactions
        (n_variants, n_results, n_supports) support torques (N·m).
    gear_torques
        (n_variants, n_results, n_gears, 2) mesh torques (N·m).
    node_angle
        (n_variants, n_results, n_nodes) nodal rotations (rad).
    table
        The variant columns as solved (invalid variants carry the base case's values).
    soundness
        The condition and equilibrium of every variant's solution.
    """

    names: tuple[str, ...]
    mesh: Mesh
    validity: Validity
    node_x: FloatArray
    station_x: FloatArray
    stress_per_torque: FloatArray
    rigidity: FloatArray
    torque: FloatArray
    angle: FloatArray
    shear_stress: FloatArray
    reactions: FloatArray
    gear_torques: FloatArray
    node_angle: FloatArray
    table: CaseTable
    soundness: Soundness

    @property
    def valid(self) -> BoolArray:
        """(n_variants,) whether each variant is a valid model."""
        return self.validity.valid

    def __len__(self) -> int:
        return len(self.validity.valid)

    def reason(self, variant: int) -> str | None:
        """Why a variant is not a valid model (one line naming the field), or ``None``."""
        number = int(self.validity.rule[variant])
        if number < 0:
            return None
        if number == UNSOUND:
            return str(self.soundness.error(self.table, variant))
        rule = _RULES[number]
        item = int(self.validity.item[variant])
        path = _field_path(self.table, rule, item)
        return f"{path}: {rule.message(self.validity.value[variant], self.validity.other[variant])}"

    @functools.cached_property
    def reasons(self) -> tuple[str | None, ...]:
        """The reason of every variant (``None`` for a valid one)."""
        reasons: list[str | None] = [None] * len(self)
        for variant in np.flatnonzero(~self.valid).tolist():  # invalid variants only, told once
            reasons[variant] = self.reason(variant)
        return tuple(reasons)


def _field_path(table: CaseTable, rule: _Rule, item: int) -> str:
    """The case-file path of row ``item`` of the column ``rule`` reads."""
    segments = table.segments
    if rule.column == "length":
        shaft = int(np.searchsorted(segments.shaft_segment_start, item, side="right") - 1)
        return f"shafts[{shaft}].segments[{item - segments.shaft_segment_start[shaft]}].length"
    if rule.column in SEGMENT_COLUMNS:
        segment = int(segments.layer_segment[item])
        shaft = int(np.searchsorted(segments.shaft_segment_start, segment, side="right") - 1)
        path = f"shafts[{shaft}].segments[{segment - segments.shaft_segment_start[shaft]}]"
        if segments.layers_per_segment[segment] > 1:
            path += f".layers[{item - segments.segment_layer_start[segment]}]"
        key = rule.key(int(segments.layer_shape[item]))
        return f"{path}.{key}" if key in ("material", "section") else f"{path}.section.{key}"
    if rule.column.startswith("support"):
        return f"supports[{item}].{rule.key(0)}"
    if rule.column == "gear_coefficient":
        return f"gears[{item // 2}].{'ab'[item % 2]}.radius"
    if rule.column == "torque":
        case = int(table.torque_case[item])
        number = item - int(np.searchsorted(table.torque_case, case))
        return f"load_cases[{case}].torques[{number}].torque"
    load, end = divmod(item, 2)
    case = int(table.load_case[load])
    number = load - int(np.searchsorted(table.load_case, case))
    return f"load_cases[{case}].distributed[{number}].{('intensity_start', 'intensity_end')[end]}"


def _n_variants(columns: dict[str, Any]) -> int:
    counts = {np.shape(values)[0] for values in columns.values()}
    if len(counts - {1}) > 1:
        msg = f"every column needs the same number of variants, not {sorted(counts)}"
        raise InputError("variants", msg)
    return max(counts)


def solve_batch(base: Model | CaseTable, **variants: Any) -> BatchResults:
    """Solve many variants of one case at once.

    Parameters
    ----------
    base
        The case every variant starts from (its topology and the sizes not varied).
    **variants
        Columns with one row per variant (SI): ``length`` (n_variants, n_segments);
        ``shear_modulus``, ``outer_diameter_start``, ``outer_diameter_end``,
        ``inner_diameter``, ``torsion_constant``, ``stress_per_torque`` (n_variants,
        n_layers), or ``outer_diameter`` for both ends at once; ``support_stiffness``,
        ``support_rotation`` (n_variants, n_supports); ``gear_coefficient`` (n_variants,
        n_gears, 2); ``torque`` (n_variants, n_point_torques); ``load_intensity`` (n_variants,
        n_distributed, 2). Rows follow :func:`~workbench.solver.columns.case_table` order.

    Returns
    -------
    BatchResults
        Every variant's results, NaN for an invalid variant (with its reason).

    Raises
    ------
    InputError
        A column of unknown name or shape.
    MechanismError
        When the topology leaves part of the system free to spin (every variant then would).
    """
    table = base if isinstance(base, CaseTable) else case_table(base)
    if "outer_diameter" in variants:
        diameter = variants.pop("outer_diameter")
        variants.setdefault("outer_diameter_start", diameter)
        variants.setdefault("outer_diameter_end", diameter)
    unknown = set(variants) - set(SEGMENT_COLUMNS) - set(CASE_COLUMNS)
    if unknown:
        known = ", ".join((*SEGMENT_COLUMNS, *CASE_COLUMNS, "outer_diameter"))
        msg = f"unknown column(s) {listing(sorted(unknown))}; known: {known}"
        raise InputError("variants", msg)
    columns = {name: np.asarray(values, dtype=float) for name, values in variants.items()}
    n_variants = _n_variants(columns) if columns else 1
    try:
        varied = _with_columns(table, columns)
    except ValueError as error:
        raise InputError("variants", str(error)) from None
    validity = validate(varied, n_variants)
    if not validity.valid.all():
        # Invalid rows take the base case's sizes, so the stacked system stays well posed.
        keep = validity.valid
        safe = {
            name: np.where(keep.reshape(-1, *[1] * (values.ndim - 1)), values, _column(table, name))
            for name, values in columns.items()
        }
        varied = _with_columns(table, safe)
    mesh = build_mesh_from_table(table)
    segments = varied.segments
    moved = "length" in columns
    node_x = node_positions(mesh, segments) if moved else mesh.node_x[None]
    geometry = size_mesh(mesh, segments, node_x, nodes_moved=moved)
    solution = solve_in_range(varied, mesh, geometry, unsound="flag")
    unsound = validity.valid & ~np.broadcast_to(solution.soundness.sound, (n_variants,))
    if unsound.any():
        validity = dataclasses.replace(
            validity,
            valid=validity.valid & ~unsound,
            rule=np.where(unsound, UNSOUND, validity.rule),
        )
    n_stations = len(mesh.station_element)
    invalid = ~validity.valid

    def per_variant(values: FloatArray, results_first: bool = True) -> FloatArray:
        array = np.array(np.moveaxis(values, 1, 0) if results_first else values, dtype=float)
        if array.shape[0] == 1 and n_variants > 1:
            array = np.repeat(array, n_variants, axis=0)
        array[invalid] = np.nan
        return array

    return BatchResults(
        names=solution.names,
        mesh=mesh,
        validity=validity,
        node_x=per_variant(np.broadcast_to(geometry.node_x, (n_variants, len(mesh.node_x))), False),
        station_x=per_variant(geometry.station_x, False),
        stress_per_torque=per_variant(
            np.broadcast_to(geometry.station_stress_per_torque, (n_variants, n_stations)), False
        ),
        rigidity=per_variant(
            np.broadcast_to(geometry.station_rigidity, (n_variants, n_stations)), False
        ),
        torque=per_variant(solution.torque),
        angle=per_variant(solution.angle),
        shear_stress=per_variant(solution.shear_stress),
        reactions=per_variant(solution.reactions),
        gear_torques=per_variant(solution.gear_torques),
        node_angle=per_variant(solution.node_angle),
        table=varied,
        soundness=solution.soundness,
    )


def _column(table: CaseTable, name: str) -> FloatArray:
    holder = table.segments if name in SEGMENT_COLUMNS else table
    column: FloatArray = getattr(holder, name)
    return column


def _with_columns(table: CaseTable, columns: dict[str, FloatArray]) -> CaseTable:
    """The table with some of its variant columns replaced."""
    segment_part: dict[str, Any] = {
        name: values for name, values in columns.items() if name in SEGMENT_COLUMNS
    }
    case_part: dict[str, Any] = {
        name: values for name, values in columns.items() if name in CASE_COLUMNS
    }
    segments = dataclasses.replace(table.segments, **segment_part)
    return dataclasses.replace(table, segments=segments, **case_part)


__all__ = ["UNSOUND", "BatchResults", "Validity", "solve_batch", "validate"]
