"""The Fatigue section: torque states, method, Marin factors, factors of safety, diagrams.

Every segment's factors of safety by each criterion and its fatigue diagram.

The Marin factors are those the fatigue check used (each fatigue point carries its segment's
endurance limit); nothing is recomputed here. The verifier rebuilds this section from the
signed case and looks for it in the record, so it must come out byte for byte as it always has.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.design.checks import CheckReport
from workbench.record.drawing import data_uri
from workbench.record.figures import fatigue_diagram_svg
from workbench.record.view_model.common import (
    Equation,
    Rows,
    equations,
    factor,
    number,
    unit_label,
    unit_labels,
)

__all__ = ["FatigueView", "fatigue_view"]


@dataclass(frozen=True)
class FatigueView:
    """What the Fatigue section shows.

    Attributes
    ----------
    units
        Labels of the length and stress units.
    first, second
        The two results named: the extremes of the cycle, or the mean and the alternating one.
    extremes
        Whether the torque cycles between ``first`` and ``second`` (else mean and amplitude).
    nominal_mean
        Whether the mean stress is taken nominal (no Kfs on it).
    settings
        Rows: setting, value.
    equations
        The fatigue equations.
    marin
        Rows: shaft, segment, Ø, ka … ke, Se′, Sse.
    bases
        Where each Marin factor and Se′ came from, once each.
    criterion
        The chosen criterion as written (``goodman``, ``asme-elliptic``…).
    required
        The required factor of safety as written.
    rows
        Rows: shaft, segment, x, τm, τa, Kfs, Sse, the factors of safety, verdict.
    notches
        How Kfs was found at each segment's governing place.
    diagrams
        ``(shaft, segment, data: URI)`` of each segment's fatigue diagram.
    """

    units: dict[str, str]
    first: str
    second: str
    extremes: bool
    nominal_mean: bool
    settings: Rows
    equations: tuple[Equation, ...]
    marin: Rows
    bases: list[str]
    criterion: str
    required: str
    rows: Rows
    notches: list[str]
    diagrams: list[tuple[str, int, str]]


def fatigue_view(report: CheckReport, printed: bool = True) -> FatigueView:
    """The Fatigue section of a report whose design has ``fatigue`` criteria.

    ``printed``: units as the unit library prints them, else as the case file writes them.
    """
    criteria = report.design.fatigue
    assert criteria is not None
    model = report.results.model
    units = model.units
    stress = unit_label(units, "stress", printed)
    nominal_mean = criteria.mean_concentration == "none"
    settings: Rows = [
        ["criterion", criteria.criterion.replace("_", "-")],
        [
            "required factor of safety (fatigue and first-cycle yield)",
            f"{criteria.factor_of_safety:g}",
        ],
        [
            "stress concentration on the mean stress",
            "none (nominal mean stress)" if nominal_mean else "Kfs (as on the alternating)",
        ],
        ["surface finish", criteria.finish],
        ["reliability", f"{criteria.reliability:g}"],
        [
            "temperature",
            "room temperature" if criteria.temperature is None else f"{criteria.temperature:g} K",
        ],
        [
            "rotating-beam endurance limit Se′",
            "estimated from Sut"
            if criteria.endurance_limit is None
            else f"tested, {number(units.from_si(criteria.endurance_limit, 'stress'))} {stress}",
        ],
    ]
    marin: Rows = []
    bases: dict[str, None] = {}
    rows: Rows = []
    diagrams: list[tuple[str, int, str]] = []
    required = criteria.factor_of_safety
    for point in report.fatigue_points:
        limit = point.endurance_limit
        segment = model.shafts[model.shaft_number(point.shaft)].segments[point.segment]
        diameter = 2.0 * segment.layers[0].section.outer_radius
        marin.append(
            [
                point.shaft,
                point.segment,
                number(units.from_si(diameter, "length")),
                *(f"{marin_factor.value:.4g}" for marin_factor in limit.factors[:5]),
                number(units.from_si(limit.rotating_beam_limit, "stress")),
                number(units.from_si(limit.value, "stress")),
            ]
        )
        for marin_factor in limit.factors[:5]:
            bases.setdefault(f"{marin_factor.symbol}: {marin_factor.basis}", None)
        bases.setdefault(f"Se′: {limit.rotating_beam_basis}", None)
        factors = point.factors
        governing = min(factors.factor_of_safety(criteria.criterion), factors.first_cycle_yield)
        rows.append(
            [
                point.shaft,
                point.segment,
                number(units.from_si(point.x, "length")),
                number(units.from_si(factors.mean_shear, "stress")),
                number(units.from_si(factors.alternating_shear, "stress")),
                f"{point.concentration:.3g}",
                number(units.from_si(factors.endurance_shear, "stress")),
                factor(factors.goodman),
                factor(factors.gerber),
                factor(factors.asme_elliptic),
                factor(factors.soderberg),
                factor(factors.first_cycle_yield),
                "pass" if governing >= required else "FAIL",
            ]
        )
        svg = fatigue_diagram_svg(
            f"fatigue diagram, shaft {point.shaft} segment {point.segment}",
            float(units.from_si(factors.endurance_shear, "stress")),
            float(units.from_si(factors.ultimate_shear, "stress")),
            float(units.from_si(factors.yield_shear, "stress")),
            (
                float(units.from_si(factors.mean_shear, "stress")),
                float(units.from_si(factors.alternating_shear, "stress")),
            ),
            stress,
        )
        diagrams.append((point.shaft, point.segment, data_uri(svg)))
    first, second = criteria.result_names
    return FatigueView(
        units=unit_labels(units, "length", "stress", printed=printed),
        first=first,
        second=second,
        extremes=criteria.extremes is not None,
        nominal_mean=nominal_mean,
        settings=settings,
        equations=equations("fatigue"),
        marin=marin,
        bases=list(bases),
        criterion=criteria.criterion.replace("_", "-"),
        required=f"{required:g}",
        rows=rows,
        notches=[
            f"{point.shaft} segment {point.segment}: {point.basis.split('; ')[0]}"
            for point in report.fatigue_points
        ],
        diagrams=diagrams,
    )
