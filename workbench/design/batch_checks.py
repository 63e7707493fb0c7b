"""Many variants of one case judged at once: a batched solve, its check inputs and the verdicts.

:func:`governing_utilisations` takes a base model and columns of varied inputs (diameters of
every layer, segment lengths, shear moduli, spring stiffnesses, gear radii, loads, fillet radii,
cross holes), solves every variant with :func:`~workbench.solver.batch.solve_batch`, builds the
static checks' inputs with :func:`~workbench.design.check_inputs.batch_check_inputs` and judges
them with :func:`~workbench.design.static_checks.static_utilisations`: no Python loop over
variants or segments. Each variant's governing check is the one
:func:`~workbench.design.checks.run_checks` of that variant alone would name: the first row of
largest utilisation in the report's order (segment by segment, kind by kind, result by result;
then the rotation limits, the frequency separations and the fatigue rows).

The checks of a case that are not array functions are made variant by variant, and
:attr:`BatchVerdicts.one_by_one` names them:

* ``fatigue`` and ``first_cycle_yield`` (the case's ``design.fatigue``): the fatigue check of each
  valid variant, read from the batch's own arrays (no second solve) and the variant's model;
* ``frequency_separation`` (running-speed bands): each variant's natural frequencies, an
  eigen-solve of its own model, made only where such a check could still govern (where the
  other checks stay below :func:`~workbench.design.frequency.frequency_utilisation_ceiling`).

A variant that is not a valid model is flagged with the reason the case-file parser gives for the
same mistake (its field path), and NaN throughout, instead of failing the batch.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, ch. 3, 5, 6 and 7 (as in :mod:`workbench.design.static_checks` and
   :mod:`workbench.design.fatigue_check`).
.. [2] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, §3.8
   (bonded layers share the twist: layer i carries T·GᵢKᵢ/ΣGK).

Examples
--------
>>> import numpy as np
>>> from workbench.solver.io import parse_case
>>> model = parse_case({"materials": {"s": {"shear_modulus": 80e9, "yield_strength": 300e6}},
...     "shafts": [{"id": "a", "segments": [{"length": 1.0, "material": "s",
...         "section": {"shape": "solid", "diameter": 0.05}}]}],
...     "supports": [{"shaft": "a", "x": 0.0}],
...     "load_cases": [{"name": "c", "torques": [{"shaft": "a", "x": 1.0, "torque": 1e3}]}]})
>>> verdicts = governing_utilisations(model, outer_diameter=np.array([[0.04], [0.05], [-0.01]]))
>>> [round(float(value), 4) for value in verdicts.utilisation[:2]], verdicts.kind_name(0)
([0.9189, 0.4705], 'shear_stress')
>>> verdicts.reasons[2]
'shafts[0].segments[0].section.diameter: must be greater than zero (-0.01 m)'
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.case.units import display_units, quote
from workbench.design.check_inputs import batch_check_inputs
from workbench.design.check_layout import CheckLayout, check_layout
from workbench.design.fatigue_check import SolvedState, fatigue_checks
from workbench.design.frequency import frequency_checks, frequency_utilisation_ceiling
from workbench.design.static_checks import (
    STATIC_KINDS,
    BoolArray,
    IntArray,
    StaticUtilisations,
    static_utilisations,
)
from workbench.design.variant_model import variant_model
from workbench.solver.batch import BatchResults, solve_batch
from workbench.solver.columns import case_table
from workbench.solver.sections import FloatArray, polar_moment

#: Columns only the checks read, (V, G) over every shaft's segments in order (m).
CHECK_COLUMNS = ("fillet_radius", "cross_hole_diameter")

#: Every kind a verdict can name, in the order a check report lists them.
VERDICT_KINDS: tuple[str, ...] = (
    *STATIC_KINDS,
    "rotation",
    "frequency_separation",
    "fatigue",
    "first_cycle_yield",
)
ROTATION, FREQUENCY, FATIGUE = (VERDICT_KINDS.index(kind) for kind in VERDICT_KINDS[-4:-1])


@dataclass(frozen=True)
class BatchVerdicts:
    """The verdicts of V variants of one case (see the module text).

    Attributes
    ----------
    batch
        The batched solve (its arrays, the validity of each variant as a model).
    layout
        The topology's static-check layout.
    judged
        Every static check of every variant (:class:`StaticUtilisations`).
    valid
        (V,) whether the variant is a valid model whose every checked detail has a factor.
    reasons
        (V,) why a variant is not valid (one line naming the field), ``None`` for a valid one.
    utilisation
        (V,) the governing utilisation over every check, NaN for an invalid variant.
    kind
        (V,) the governing check's kind, an index into :data:`VERDICT_KINDS`; −1 for none.
    result
        (V,) the governing check's result (a running-speed band for a frequency check).
    shaft, segment
        (V,) where it governs: shaft id and segment index on it (−1 for a rotation limit or a
        frequency separation, which name no segment; the shaft of a frequency separation is
        where its mode's angle is largest).
    fatigue_utilisation
        (V, G, 2) utilisation of the fatigue and first-cycle-yield rows of each segment; NaN
        where a segment has none.
    passes
        (V,) every static, rotation and fatigue check passes (frequency separations, judged only
        where they could govern, are not among them).
    one_by_one
        The kinds judged variant by variant, not as arrays.
    """

    batch: BatchResults
    layout: CheckLayout
    judged: StaticUtilisations
    valid: BoolArray
    reasons: tuple[str | None, ...]
    utilisation: FloatArray
    kind: IntArray
    result: tuple[str | None, ...]
    shaft: tuple[str | None, ...]
    segment: IntArray
    fatigue_utilisation: FloatArray
    passes: BoolArray
    one_by_one: tuple[str, ...]

    def __len__(self) -> int:
        return len(self.valid)

    def kind_name(self, variant: int) -> str | None:
        """The governing check's kind of a variant, ``None`` for an invalid one."""
        number = int(self.kind[variant])
        return VERDICT_KINDS[number] if number >= 0 else None

    @functools.cached_property
    def segment_governing(self) -> tuple[FloatArray, IntArray]:
        """(V, G) governing utilisation of each segment over its rows, and its kind.

        The rows of a segment are its static checks (kind by kind, result by result) and its
        fatigue rows, as :meth:`~workbench.design.check_report.CheckReport.segment_utilisation`
        reads them; the utilisation is −∞ and the kind −1 where a segment has no row.
        """
        utilisation = self.judged.utilisation.transpose(0, 3, 2, 1)  # (V, G, C, R)
        variants, segments = utilisation.shape[:2]
        rows = utilisation.reshape(variants, segments, -1)
        filled = np.where(np.isnan(rows), -np.inf, rows)
        first = np.argmax(filled, axis=2)
        best = np.take_along_axis(filled, first[..., None], axis=2)[..., 0]
        kind = np.where(np.isfinite(best), first // utilisation.shape[3], -1)
        fatigue = np.where(np.isnan(self.fatigue_utilisation), -np.inf, self.fatigue_utilisation)
        for row in range(2):  # the fatigue row, then first-cycle yield
            better = fatigue[..., row] > best
            best = np.where(better, fatigue[..., row], best)
            kind = np.where(better, FATIGUE + row, kind)
        return best, kind


def _segment_columns(batch: BatchResults, layout: CheckLayout) -> dict[str, FloatArray]:
    """(V, G) outer diameters at both ends (the outermost layer's) and bores, from the table."""
    segments = batch.table.segments
    first_layer = segments.segment_layer_start[:-1]

    def outermost(column: FloatArray) -> FloatArray:
        widest = np.fmax.reduceat(column, first_layer, axis=1) if column.shape[1] else column
        return np.where(layout.circular, widest, np.nan)

    return {
        "outer_diameter_start": outermost(segments.outer_diameter_start),
        "outer_diameter_end": outermost(segments.outer_diameter_end),
        "bore": np.where(np.isnan(layout.bore), np.nan, segments.inner_diameter[:, first_layer]),
    }


def _layer_stress(batch: BatchResults, layout: CheckLayout) -> FloatArray:
    """(V, K, S) peak stress of each bonded layer per unit segment torque (1/m³).

    One-layer segments keep the batch's own stress per torque in slot 0. In a segment of bonded
    layers, layer i carries T·GᵢKᵢ/ΣGK [2]_, so its peak stress per unit segment torque is
    Gᵢ·Kᵢ·(dᵢ/2)/Kᵢ/ΣGK = Gᵢ·(dᵢ/2)/ΣGK, with dᵢ its outer diameter at the station.
    """
    variants, stations = batch.stress_per_torque.shape
    slots = len(layout.allowable)
    stress = np.zeros((variants, slots, stations))
    stress[:, 0] = batch.stress_per_torque
    if slots == 1:
        return stress
    segments = batch.table.segments
    counts = np.diff(np.append(layout.segment_start, stations))
    station_segment = np.repeat(np.arange(layout.segments), counts)
    layered = np.flatnonzero(segments.layers_per_segment[station_segment] > 1)
    segment = station_segment[layered]
    start_x = batch.station_x[:, layout.segment_start[segment]]
    length = np.broadcast_to(segments.length, (variants, layout.segments))[:, segment]
    fraction = np.clip((batch.station_x[:, layered] - start_x) / length, 0.0, 1.0)
    stress[:, :, layered] = 0.0
    for slot in range(slots):  # layer slots: a handful, not segments
        present = segments.layers_per_segment[segment] > slot
        row = segments.segment_layer_start[segment[present]] + slot

        def column(name: str, row: IntArray = row) -> FloatArray:
            values: FloatArray = getattr(segments, name)
            return np.broadcast_to(values, (variants, values.shape[1]))[:, row]

        start, end = column("outer_diameter_start"), column("outer_diameter_end")
        diameter = start + (end - start) * fraction[:, present]
        share = column("shear_modulus") * polar_moment(diameter, column("inner_diameter"))
        peak = share * (diameter / 2.0) / polar_moment(diameter, column("inner_diameter"))
        stress[:, slot, layered[present]] = peak / batch.rigidity[:, layered[present]]
    return stress


def _require_uniform_torsion(segments: Any) -> None:
    """Refuse a case whose sections warp: the batch path solves uniform torsion only.

    Raises
    ------
    InputError
        On the first segment that warps (E·Cw > 0), saying to check the case alone.
    """
    rigidity = segments.warping_rigidity
    if rigidity is None:
        return
    first = int(np.flatnonzero(np.asarray(rigidity).reshape(-1) > 0.0)[0])
    shaft = int(np.searchsorted(segments.shaft_segment_start, first, side="right")) - 1
    number = first - int(segments.shaft_segment_start[shaft])
    msg = (
        "a section that warps (restrained torsion) cannot be swept, sized or studied; "
        "solve and check the case itself"
    )
    raise InputError(f"shafts[{shaft}].segments[{number}].section", msg)


def governing_utilisations(
    model: Any,
    *,
    frequency: bool = True,
    fillet_radius: Any = None,
    cross_hole_diameter: Any = None,
    allowable: Any = None,
    **variants: Any,
) -> BatchVerdicts:
    """Judge every check of many variants of one case at once.

    Parameters
    ----------
    model
        The base :class:`~workbench.solver.model.Model` (SI); its ``design`` gives the criteria
        (defaults when it has none, as :func:`~workbench.design.checks.run_checks` uses).
    frequency
        Whether to judge the frequency separations of running-speed bands (variant by variant,
        where one could govern); a search that does not size for them leaves them out.
    fillet_radius, cross_hole_diameter
        (V, G) fillet radius of the shoulder at each segment's start and diameter of each
        segment's cross hole (m), over every shaft's segments in order; the base model's when
        left out. Read where the segment has the detail.
    allowable
        (V, G) or (V, K, G) allowable shear stress of each segment (per layer slot) (Pa), the
        base model's when left out (a study varying a material's strengths gives it).
    **variants
        Columns of :func:`~workbench.solver.batch.solve_batch` (SI, one row per variant):
        ``length``, ``outer_diameter`` (or ``outer_diameter_start`` and ``_end``),
        ``inner_diameter``, ``shear_modulus``, ``support_stiffness``, ``support_rotation``,
        ``gear_coefficient``, ``torque``, ``load_intensity``.

    Returns
    -------
    BatchVerdicts
        Per variant: governing utilisation and check, validity and reason.

    Raises
    ------
    InputError
        A column of unknown name or wrong shape; lengths varied in a case with checks made one
        by one (their models keep every position where the case states it, a batch keeps each
        node's place in its segment).
    MechanismError
        When the topology leaves part of the system free to spin.

    References
    ----------
    .. [1] Shigley's *Mechanical Engineering Design*, 9th ed., ch. 3, 5, 6 and 7.
    """
    design = model.design if isinstance(model.design, DesignCriteria) else DesignCriteria()
    _require_uniform_torsion(case_table(model).segments)
    checks_frequency = frequency and bool(model.operating_speeds)
    one_by_one = (
        *(("frequency_separation",) if checks_frequency else ()),
        *(("fatigue", "first_cycle_yield") if design.fatigue is not None else ()),
    )
    base_length = case_table(model).segments.length
    lengths_vary = "length" in variants and not np.array_equal(
        np.broadcast_to(np.asarray(variants["length"], dtype=float), np.shape(variants["length"])),
        np.broadcast_to(base_length, np.shape(variants["length"])),
    )
    if one_by_one and lengths_vary:
        msg = (
            f"cannot vary with {' and '.join(one_by_one[:1] + one_by_one[1:2])} checks in the "
            "case: those are made on each variant's own model, which keeps every position"
        )
        raise InputError("length", msg)
    details = {"fillet_radius": fillet_radius, "cross_hole_diameter": cross_hole_diameter}
    only_checked = (*details.values(), allowable)
    checked = max((len(values) for values in only_checked if values is not None), default=1)
    solved = max((len(np.asarray(values)) for values in variants.values()), default=1)
    if checked > solved and "shear_modulus" not in variants:
        # Sizes only the checks read: every variant solves the base's system.
        variants["shear_modulus"] = np.repeat(case_table(model).segments.shear_modulus, checked, 0)
    token = display_units.set(model.units)
    try:
        return _judge(model, design, checks_frequency, one_by_one, details, variants, allowable)
    finally:
        display_units.reset(token)


@dataclass(frozen=True)
class _Unbatched:
    """The checks of one variant made on its own model (see the module text).

    ``fatigue`` is (G, 2) utilisations of its fatigue rows (NaN where none); ``frequency`` the
    largest frequency-separation utilisation (−∞ where not judged), ``band`` its band and
    ``antinode`` the shaft where its mode's angle is largest.
    """

    fatigue: FloatArray
    passes: bool
    frequency: float = -np.inf
    band: str | None = None
    antinode: str | None = None


def _judge(
    model: Any,
    design: DesignCriteria,
    checks_frequency: bool,
    one_by_one: tuple[str, ...],
    details: dict[str, Any],
    variants: dict[str, Any],
    allowable: Any = None,
) -> BatchVerdicts:
    batch = solve_batch(model, **variants)
    layout = check_layout(model, batch.mesh, design)
    count = len(batch)
    sizes = {
        name: None if values is None else np.broadcast_to(np.asarray(values, dtype=float), (count, layout.segments))
        for name, values in details.items()
    }  # fmt: skip
    built = batch_check_inputs(
        layout,
        batch.torque,
        _layer_stress(batch, layout),
        batch.rigidity,
        batch.node_angle,
        batch.station_x,
        **_segment_columns(batch, layout),
        **sizes,
        allowable=allowable,
    )
    reasons = list(batch.reasons)
    valid = batch.valid.copy()
    for name, values in sizes.items():
        if values is None:
            continue
        bad, segment = _bad_sizes(model, layout, name, values)
        for variant in np.flatnonzero(bad & valid).tolist():  # invalid variants only, told once
            size = quote(float(values[variant, segment[variant]]), "length")
            field = layout.field(int(segment[variant]), name)
            reasons[variant] = f"{field}: must be greater than zero ({size})"
        valid &= ~bad
    for variant in np.flatnonzero(valid & ~built.valid).tolist():
        problem = built.problem(variant, layout)
        assert problem is not None  # the batch found a detail without a factor
        reasons[variant] = f"{problem[0]}: {problem[1]}"
    valid &= built.valid
    # A value or utilisation beyond the range of numbers fails its check (inf is not within any
    # limit); a single model's report refuses it by name (workbench.design.finite_checks).
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        judged = static_utilisations(built.inputs)
        utilisation = np.where(valid, judged.governing_utilisation(), np.nan)
    passes = valid & _static_passes(judged)
    kind, row, segment = _first_row(judged, utilisation)
    results: list[str | None] = [batch.names[r] if r >= 0 else None for r in row.tolist()]
    shafts = [
        layout.shaft_ids[int(layout.shaft_number[g])] if g >= 0 else None for g in segment.tolist()
    ]
    for variant in np.flatnonzero(kind == ROTATION).tolist():
        limit = int(segment[variant])
        shafts[variant], segment[variant] = layout.rotation_shafts[limit], -1
    fatigue = np.full((count, layout.segments, 2), np.nan)
    if one_by_one:
        ceiling = frequency_utilisation_ceiling(model, design) if checks_frequency else 0.0
        for variant in np.flatnonzero(valid).tolist():  # the checks that are not array functions
            try:
                alone = _unbatched(model, design, batch, layout, variant, sizes,
                                   float(utilisation[variant]), ceiling)  # fmt: skip
            except InputError as error:
                reasons[variant] = str(error)
                valid[variant] = passes[variant] = False
                utilisation[variant], kind[variant], segment[variant] = np.nan, -1, -1
                results[variant] = shafts[variant] = None
                continue
            fatigue[variant] = alone.fatigue
            passes[variant] &= alone.passes
            if alone.frequency > utilisation[variant]:
                utilisation[variant], kind[variant], segment[variant] = (
                    alone.frequency,
                    FREQUENCY,
                    -1,
                )
                results[variant], shafts[variant] = alone.band, alone.antinode
            rows = np.where(np.isnan(alone.fatigue), -np.inf, alone.fatigue).ravel()
            first = int(np.argmax(rows))  # segment by segment, fatigue then first-cycle yield
            if rows[first] > utilisation[variant]:
                utilisation[variant], kind[variant] = rows[first], FATIGUE + first % 2
                segment[variant] = first // 2
                results[variant] = design.fatigue.label  # type: ignore[union-attr]
                shafts[variant] = layout.shaft_ids[int(layout.shaft_number[first // 2])]
    on_shaft = np.where(segment >= 0, layout.number[np.maximum(segment, 0)], -1)
    return BatchVerdicts(
        batch=batch,
        layout=layout,
        judged=judged,
        valid=valid,
        reasons=tuple(reasons),
        utilisation=utilisation,
        kind=kind,
        result=tuple(results),
        shaft=tuple(shafts),
        segment=on_shaft,
        fatigue_utilisation=fatigue,
        passes=passes,
        one_by_one=one_by_one,
    )


def _bad_sizes(
    model: Any, layout: CheckLayout, name: str, values: FloatArray
) -> tuple[BoolArray, IntArray]:
    """Variants with a given fillet radius or hole diameter that is not a finite positive size.

    Read on the segments the base gives one, as the case-file parser requires; with the first
    such segment of each variant.
    """
    has = np.array(
        [getattr(segment, name) is not None for shaft in model.shafts for segment in shaft.segments]
    )
    bad: BoolArray = has & ~(np.isfinite(values) & (values > 0.0))
    return np.any(bad, axis=1), np.argmax(bad, axis=1)


def _static_passes(judged: StaticUtilisations) -> BoolArray:
    """(V,) every existing static check and rotation limit within its limit."""
    within = judged.value <= judged.limit
    segments = np.all(within | ~judged.checked[:, None], axis=(1, 2, 3))
    rotations = judged.rotation_value <= judged.rotation_limit[:, None, :]
    return segments & np.all(rotations, axis=(1, 2))


def _first_row(
    judged: StaticUtilisations, governing: FloatArray
) -> tuple[IntArray, IntArray, IntArray]:
    """(V,) kind, result row and segment of the first row that reaches ``governing``.

    Rows in the report's order: segment by segment, kind by kind, result by result, then each
    rotation limit result by result (its number stands in the segment's place); −1 for none.
    """
    variants, results, kinds, segments = judged.value.shape
    target = governing[:, None, None, None]
    hits = (judged.utilisation == target).transpose(0, 3, 2, 1).reshape(variants, -1)
    rotation = judged.rotation_utilisation == governing[:, None, None]
    rotation_hits = np.zeros((variants, 1), dtype=bool)  # a column of no hit: never empty
    rotation_hits = np.concatenate(
        [rotation.transpose(0, 2, 1).reshape(variants, -1), rotation_hits], axis=1
    )
    first = np.argmax(hits, axis=1)
    segment, kind, row = np.unravel_index(first, (segments, kinds, results))
    found = hits[np.arange(variants), first]
    on_rotation = ~found & rotation_hits.any(axis=1)
    limit, rotation_row = np.divmod(np.argmax(rotation_hits, axis=1), max(results, 1))
    kind = np.where(found, kind, np.where(on_rotation, ROTATION, -1))
    row = np.where(found, row, np.where(on_rotation, rotation_row, -1))
    segment = np.where(found, segment, np.where(on_rotation, limit, -1))
    return kind.astype(np.intp), row.astype(np.intp), segment.astype(np.intp)


def _unbatched(
    model: Any,
    design: DesignCriteria,
    batch: BatchResults,
    layout: CheckLayout,
    variant: int,
    sizes: dict[str, FloatArray | None],
    static: float,
    ceiling: float,
) -> _Unbatched:
    """The fatigue and frequency checks of one variant, on its own model."""
    own = variant_model(model, batch.table, variant, sizes)
    fatigue = np.full((layout.segments, 2), np.nan)
    passes = True
    if design.fatigue is not None:
        state = SolvedState(
            own,
            batch.mesh,
            batch.station_x[variant],
            batch.stress_per_torque[variant],
            batch.torque[variant],
            batch.names,
        )
        rows, _ = fatigue_checks(state, design.fatigue, [])  # notes are not needed for numbers
        passes = all(row[4] <= row[5] for row in rows)
        place = {(shaft, number): g for g, (shaft, number) in enumerate(_segment_keys(layout))}
        for _, shaft, number, kind, value, limit, *_ in rows:
            fatigue[place[shaft, number], int(kind != "fatigue")] = value / limit
    worst = max(static, float(np.nanmax(fatigue, initial=-np.inf)))
    if ceiling == 0.0 or static >= ceiling or worst > ceiling:
        return _Unbatched(fatigue, passes)  # no frequency check can govern
    checks, _, _ = frequency_checks(own, design)
    if not checks:
        return _Unbatched(fatigue, passes)
    top = max(checks, key=lambda check: check.utilisation)
    return _Unbatched(fatigue, passes, top.utilisation, top.result, top.shaft)


def _segment_keys(layout: CheckLayout) -> list[tuple[str, int]]:
    return [
        (layout.shaft_ids[shaft], number)
        for shaft, number in zip(layout.shaft_number.tolist(), layout.number.tolist(), strict=True)
    ]
