"""Sizing: the smallest preferred diameters for which every check passes in every result.

In a statically indeterminate system the torque split moves when a segment changes size (a
stiffer segment attracts torque), so segments cannot be sized one by one from fixed torques. The
search re-solves the whole system at every step:

1. *Scaling*: each chosen segment's diameter is scaled by u^(1/3) for a governing stress check or
   u^(1/4) for a twist check (τ ∝ T/d³, θ' ∝ T/d⁴), rounded up to the next preferred size, and the
   system is re-solved, until the sizes repeat.
2. *Repair*: while any check fails, each segment whose checks fail goes up one preferred size.
3. *Descent*: each segment in turn tries the next smaller size, kept if every check still passes,
   until no segment can go down.

The answer passes every check, and for every sized segment the next smaller preferred size
(others held) fails one: a local minimum on the grid of preferred sizes.
"""

from __future__ import annotations

import contextlib
import dataclasses
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError
from workbench.case.units import display_units, quote
from workbench.case.validate import quoted, within
from workbench.design.batch_checks import VERDICT_KINDS, BatchVerdicts, governing_utilisations
from workbench.design.caution import CAUTION
from workbench.design.checks import Check, CheckReport, run_checks
from workbench.design.preferred import (
    VALUE_RANGE,
    next_smaller_preferred,
    round_up_preferred,
)
from workbench.design.resize import outer_diameter, resized, resized_dimensions
from workbench.design.sizing_request import SizingRequest, require_preferred, sizable
from workbench.solver.analysis import solve
from workbench.solver.columns import case_table
from workbench.solver.model import Layer, Model

_MAX_ROUNDS = 40


@dataclass(frozen=True)
class SizedSegment:
    """The outcome for one segment.

    Attributes
    ----------
    shaft, segment
        Which segment.
    diameter_before, diameter_after
        Outer diameter before and after sizing (m).
    governing
        Its governing check at the final sizes.
    next_smaller
        The next smaller allowed diameter (m), or ``None`` at the bottom of the list.
    at_floor
        Whether the segment stopped at the floor (``minimum_fraction``) rather than at a check.
    """

    shaft: str
    segment: int
    diameter_before: float
    diameter_after: float
    governing: Check | None
    next_smaller: float | None
    at_floor: bool = False


@dataclass(frozen=True)
class SizingOutcome:
    """The sized model, its checks and the path taken.

    Attributes
    ----------
    model
        The model at the final sizes.
    report
        Its checks.
    segments
        Per sized segment: before, after, governing check.
    evaluations
        Number of solve-and-check evaluations made.
    """

    model: Model
    report: CheckReport
    segments: tuple[SizedSegment, ...]
    evaluations: int
    request_floor: float = 0.25

    @property
    def passes(self) -> bool:
        """Whether every strength and stiffness check passes at the final sizes."""
        return sizing_passes(self.report)


@dataclass(frozen=True)
class _Verdict:
    """One set of sizes judged.

    Whether every check sized for passes, and per sized segment the governing utilisation with
    the exponent that scales its diameter (1/3 for a stress, 1/4 for a twist or rotation).
    """

    passes: bool
    utilisation: list[tuple[float, float]]


class _Search:
    def __init__(self, model: Model, request: SizingRequest) -> None:
        self.model, self.request = model, request
        self.length_factor = model.units.factor("length")
        #: Distinct sets of sizes the search has judged (sets judged ahead in a batch are
        #: counted when the search reaches them, not before).
        self.evaluations = 0
        self.reached: set[tuple[float, ...]] = set()
        self.verdicts: dict[tuple[float, ...], _Verdict | None] = {}
        for shaft_id, number in request.segments:
            named = quoted(f"{shaft_id}:{number}")
            if shaft_id not in {shaft.id for shaft in model.shafts}:
                raise InputError("--segment", f"{named}: unknown shaft {quoted(shaft_id)}")
            shaft = model.shaft(shaft_id)
            if not 0 <= number < len(shaft.segments):
                msg = (
                    f"{named}: shaft {quoted(shaft_id)} has segments 0 to {len(shaft.segments) - 1}"
                )
                raise InputError("--segment", msg)
            if not sizable(shaft.segments[number]):
                msg = f"{named}: only one-layer solid, tube or tapered segments can be sized by diameter"
                raise InputError("--segment", msg)

    # sizes are handled in the case's length unit so the preferred numbers are the user's own
    def up(self, diameter: float) -> float:
        if self.request.sizes:
            for size in self.request.sizes:
                if size >= diameter * (1.0 - 1e-9):
                    return size
            return self.request.sizes[-1]
        with self._preferred(diameter):
            value = round_up_preferred(
                diameter / self.length_factor * (1.0 - 1e-12), self.request.series
            )
        return value * self.length_factor

    def down(self, diameter: float) -> float | None:
        if self.request.sizes:
            smaller = [size for size in self.request.sizes if size < diameter * (1.0 - 1e-9)]
            return smaller[-1] if smaller else None
        # A size read back from SI sits a rounding error off its preferred number: step from
        # just below it, or the "next smaller" size is the same size again.
        with self._preferred(diameter):
            value = next_smaller_preferred(
                diameter / self.length_factor * (1.0 - 1e-9), self.request.series
            )
        return value * self.length_factor

    @contextlib.contextmanager
    def _preferred(self, diameter: float) -> Iterator[None]:
        """A size beyond the preferred numbers' range, refused as the series option's."""
        try:
            yield
        except InputError:
            low, high = (quote(v * self.length_factor, "length") for v in VALUE_RANGE)
            msg = (
                f"a size of {quote(diameter, 'length')} is needed, outside the preferred "
                f"numbers' range ({low} to {high}); give --sizes"
            )
            raise InputError("--series", msg) from None

    def step_up(self, diameter: float) -> float | None:
        if self.request.sizes:
            larger = [size for size in self.request.sizes if size > diameter * (1.0 + 1e-9)]
            return larger[0] if larger else None
        return self.up(diameter * (1.0 + 1e-6))

    def build(self, sizes: tuple[float, ...]) -> Model:
        shafts = list(self.model.shafts)
        for (shaft_id, number), diameter in zip(self.request.segments, sizes, strict=True):
            index = self.model.shaft_number(shaft_id)
            segment = shafts[index].segments[number]
            layer = segment.layers[0]
            try:
                section = resized(layer.section, diameter, self.request.keep)
            except InputError as error:  # grown beyond what the formulas hold: name the segment
                raise within(f"shafts[{index}].segments[{number}].section", error) from None
            new_segment = dataclasses.replace(segment, layers=(Layer(layer.material, section),))
            segments = list(shafts[index].segments)
            segments[number] = new_segment
            shafts[index] = dataclasses.replace(shafts[index], segments=tuple(segments))
        return dataclasses.replace(self.model, shafts=tuple(shafts))

    def prepare_columns(self) -> None:
        """Read the base model's columns and, per sized segment, its layer row.

        Also the rotation limits whose span each sized segment lies in, matched to their rows as
        the check report's rotation rows are (by their end).
        """
        table = case_table(self.model).segments
        rows = [
            table.shaft_segment_start[self.model.shaft_number(shaft_id)] + number
            for shaft_id, number in self.request.segments
        ]
        self.segment_rows = np.array(rows, dtype=np.intp)
        self.layer_rows = table.segment_layer_start[self.segment_rows]
        self.base = {
            name: getattr(table, name)
            for name in ("outer_diameter_start", "outer_diameter_end", "inner_diameter")
        }
        self.shapes = table.layer_shape[self.layer_rows]
        design = self.model.design
        limits = design.rotation_limits if isinstance(design, DesignCriteria) else ()
        self.rotation_spans = np.zeros((len(rows), len(limits)), dtype=bool)
        for place, (shaft_id, number) in enumerate(self.request.segments):
            boundaries = self.model.shaft(shaft_id).boundaries
            for row, limit in enumerate(limits):  # a rotation check's row names its end only
                if limit.shaft != shaft_id:
                    continue
                named = next(
                    other
                    for other in limits
                    if other.shaft == shaft_id
                    and abs(other.end - limit.end) < 1e-12 + 1e-9 * abs(other.end)
                )
                low, high = sorted((named.start, named.end))
                inside = boundaries[number] < high and boundaries[number + 1] > low
                self.rotation_spans[place, row] = inside

    @staticmethod
    def key(sizes: tuple[float, ...]) -> tuple[float, ...]:
        return tuple(float(f"{size:.10g}") for size in sizes)

    def judge(self, candidates: Sequence[tuple[float, ...]]) -> None:
        """Judge the sets of sizes not judged yet, all in one batch."""
        pending = list(
            {
                self.key(sizes): sizes
                for sizes in candidates
                if self.key(sizes) not in self.verdicts
            }.items()
        )
        if not pending:
            return
        diameters = np.array([sizes for _, sizes in pending])
        columns = {
            name: np.repeat(values, len(pending), axis=0) for name, values in self.base.items()
        }
        base_start, base_end, base_bore = (
            values[0, self.layer_rows] for values in self.base.values()
        )
        start, end, bore = resized_dimensions(
            self.shapes, base_start, base_end, base_bore, diameters, self.request.keep
        )
        for name, values in zip(columns, (start, end, bore), strict=True):
            columns[name][:, self.layer_rows] = values
        verdicts = governing_utilisations(self.model, frequency=False, **columns)
        utilisations = self.utilisations(verdicts)
        for number, (key, _) in enumerate(pending):
            if not verdicts.valid[number]:
                self.verdicts[key] = None
                continue
            self.verdicts[key] = _Verdict(bool(verdicts.passes[number]), utilisations[number])

    def evaluate(self, sizes: tuple[float, ...]) -> _Verdict | None:
        """The verdict at these sizes; ``None`` when the sizes make an impossible section."""
        key = self.key(sizes)
        if key not in self.reached:
            self.reached.add(key)
            self.evaluations += 1
        self.judge([sizes])
        return self.verdicts[key]

    def utilisations(self, verdicts: BatchVerdicts) -> list[list[tuple[float, float]]]:
        """(utilisation, exponent) governing each sized segment, variant by variant.

        A segment's own rows (every kind and result, fatigue included), or a rotation limit
        whose span it lies in when that is used more (exponent 1/4).
        """
        best, kind = verdicts.segment_governing
        value = best[:, self.segment_rows]
        kinds = kind[:, self.segment_rows]
        exponent = np.where(_TWIST_KINDS[kinds] & (kinds >= 0), 0.25, 1.0 / 3.0)
        value, exponent = np.where(kinds >= 0, value, 0.0), np.where(kinds >= 0, exponent, 0.25)
        rotation = verdicts.judged.rotation_utilisation.max(axis=1, initial=-np.inf)  # (V, L)
        spanned = np.where(self.rotation_spans[None], rotation[:, None, :], -np.inf)
        over = spanned.max(axis=2, initial=-np.inf)
        exponent = np.where(over > value, 0.25, exponent)
        value = np.maximum(over, value)
        return [
            list(zip(row, powers, strict=True))
            for row, powers in zip(value.tolist(), exponent.tolist(), strict=True)
        ]


#: Checks a diameter search does not aim at: a natural frequency moves with every size, up or
#: down, and is better separated from running speeds by design (discs, supports) than by sizing.
NOT_SIZED_FOR = ("frequency_separation",)


def sizing_passes(report: CheckReport) -> bool:
    """Whether every check sizing aims at passes (all but :data:`NOT_SIZED_FOR`)."""
    return all(check.passes for check in report.checks if check.kind not in NOT_SIZED_FOR)


#: Kinds whose utilisation scales with 1/d⁴ (a rate of twist or a rotation), the others with
#: 1/d³ (a stress); indexed by :data:`VERDICT_KINDS` number.
_TWIST_KINDS = np.array([kind in ("twist_rate", "rotation") for kind in VERDICT_KINDS])


def size_shafts(model: Model, request: SizingRequest) -> SizingOutcome:
    """Find the smallest preferred diameters for which every check passes.

    Parameters
    ----------
    model
        The model (its ``design`` gives the criteria).
    request
        Which segments, which sizes.

    Returns
    -------
    SizingOutcome
        Final model and checks; ``passes`` is false when even the largest allowed size fails.

    References
    ----------
    .. [1] ISO 3 / ISO 497, preferred numbers (Renard series) for rounding sizes up.
    .. [2] Shigley's *Mechanical Engineering Design*, ch. 7 (shaft sizing for stress and
       deflection: d ∝ (T/τ_allow)^(1/3), d ∝ (T/θ'_allow)^(1/4)).
    """
    token = display_units.set(model.units)
    try:
        return _size(model, request)
    finally:
        display_units.reset(token)


def _size(model: Model, request: SizingRequest) -> SizingOutcome:
    # The case as given must solve: what the solve refuses (a near mechanism, say) is refused
    # here in its words, not as sizes that all fail.
    solve(model)
    search = _Search(model, request)
    search.prepare_columns()
    before = tuple(
        outer_diameter(model.shaft(shaft_id).segments[number].layers[0].section)
        for shaft_id, number in request.segments
    )
    if not request.sizes:
        require_preferred(model, request, before)
    floors = tuple(search.up(d * request.minimum_fraction) for d in before)
    sizes = tuple(search.up(d) for d in before)
    seen: set[tuple[float, ...]] = set()
    for _ in range(_MAX_ROUNDS):  # scaling
        report = search.evaluate(sizes)
        if report is None or sizes in seen:
            break
        seen.add(sizes)
        sizes = tuple(
            max(search.up(size * max(value, 1e-6) ** exponent), floor)
            for size, floor, (value, exponent) in zip(
                sizes, floors, report.utilisation, strict=True
            )
        )
    report = search.evaluate(sizes)
    for _ in range(_MAX_ROUNDS * 4):  # repair
        if report is not None and report.passes:
            break
        if report is None:
            failing = [True] * len(sizes)
        else:
            failing = [value > 1.0 for value, _ in report.utilisation]
            if not any(failing):
                failing = [True] * len(sizes)
        stepped = tuple(
            (search.step_up(size) or size) if fails else size
            for size, fails in zip(sizes, failing, strict=True)
        )
        if stepped == sizes:
            break  # the largest sizes still fail
        sizes = stepped
        report = search.evaluate(sizes)
    if report is not None and report.passes:
        changed = True
        while changed:  # descent
            changed = False
            for index in range(len(sizes)):
                trial = _smaller(search, sizes, floors, index)
                if trial is None:
                    continue
                if search.key(trial) not in search.verdicts:
                    # Every later segment's next smaller size, judged in one batch: the search
                    # reaches them in turn unless one is kept first (then the rest are judged
                    # again at the new sizes).
                    later = (_smaller(search, sizes, floors, k) for k in range(index, len(sizes)))
                    search.judge([candidate for candidate in later if candidate is not None])
                trial_report = search.evaluate(trial)
                if trial_report is not None and trial_report.passes:
                    sizes, report, changed = trial, trial_report, True
    final_model = search.build(sizes)
    if search.evaluate(sizes) is None:
        msg = "no allowed size gives a valid section (check the wall thickness and the size list)"
        raise InputError("--sizes" if request.sizes else "--series", msg)
    final_report = run_checks(solve(final_model))
    governing = final_report.segment_utilisation()
    rows = tuple(
        SizedSegment(
            shaft_id,
            number,
            before_size,
            size,
            governing.get((shaft_id, number)),
            search.down(size),
            at_floor=abs(size - floor) <= 1e-9 * floor,
        )
        for (shaft_id, number), before_size, size, floor in zip(
            request.segments, before, sizes, floors, strict=True
        )
    )
    return SizingOutcome(
        final_model, final_report, rows, search.evaluations, request.minimum_fraction
    )


def _smaller(
    search: _Search, sizes: tuple[float, ...], floors: tuple[float, ...], index: int
) -> tuple[float, ...] | None:
    """The sizes with segment ``index`` one allowed size down, or ``None`` at its floor."""
    smaller = search.down(sizes[index])
    if smaller is None or smaller < floors[index] * (1.0 - 1e-9):
        return None
    if smaller >= sizes[index] * (1.0 - 1e-9):  # no smaller size: the descent must end
        return None
    return (*sizes[:index], smaller, *sizes[index + 1 :])


def sizing_document(outcome: SizingOutcome) -> dict[str, Any]:
    """The ``workbench size --json`` document, in the case's units."""
    units = outcome.model.units

    def length(value: float | None) -> float | None:
        return None if value is None else float(units.from_si(value, "length"))

    return {
        "passes": outcome.passes,
        "segments": [
            {
                "shaft": row.shaft,
                "segment": row.segment,
                "diameter_before": length(row.diameter_before),
                "diameter_after": length(row.diameter_after),
                "next_smaller": length(row.next_smaller),
                "governing_kind": row.governing.kind if row.governing else None,
                "governing_result": row.governing.result if row.governing else None,
                "utilisation": row.governing.utilisation if row.governing else None,
                "at_floor": row.at_floor,
            }
            for row in outcome.segments
        ],
        "evaluations": outcome.evaluations,
        "caution": CAUTION,
    }


def sizing_text(outcome: SizingOutcome) -> str:
    """Readable sizing table."""
    from workbench.solver.tables import format_table  # noqa: PLC0415

    units = outcome.model.units
    label = units.label("length")
    rows = [
        [
            f"{row.shaft}:{row.segment}",
            f"{units.from_si(row.diameter_before, 'length'):.4g}",
            f"{units.from_si(row.diameter_after, 'length'):.4g}",
            row.governing.kind if row.governing else "-",
            row.governing.result if row.governing else "-",
            f"{row.governing.utilisation:.3f}" if row.governing else "-",
        ]
        for row in outcome.segments
    ]
    floor_rows = [f"{row.shaft}:{row.segment}" for row in outcome.segments if row.at_floor]
    floor_note = (
        f"\n{', '.join(floor_rows)}: stopped at the floor "
        f"({outcome.request_floor:.0%} of the starting diameter); no check governs there — the "
        "segment sheds torque as it shrinks. Choose its size on other grounds."
        if floor_rows
        else ""
    )
    unsized = [c for c in outcome.report.checks if c.kind in NOT_SIZED_FOR and not c.passes]
    if unsized:
        floor_note += (
            f"\n{len(unsized)} frequency-separation check(s) fail at these sizes: sizing does not "
            "aim at them (see `workbench check`)."
        )
    verdict = (
        "every check passes at these sizes; each next smaller size fails a check"
        + (" (but for the segments at the floor)" if floor_rows else "")
        if outcome.passes
        else "NO ALLOWED SIZE PASSES EVERY CHECK: the largest sizes tried still fail"
    )
    return (
        format_table(
            [
                "segment",
                f"before [{label}]",
                f"after [{label}]",
                "governing check",
                "in result",
                "utilisation",
            ],
            rows,
        )
        + f"\n\n{verdict} ({outcome.evaluations} evaluations){floor_note}\n\nCaution: {CAUTION}\n"
    )
