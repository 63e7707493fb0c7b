"""The Inputs section: the elevation, segments, materials, supports, gears, loads and criteria.

Every value is written in the case's own units; the template ``sections/inputs.html.j2`` gives
the headings, the column heads and the caption.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from workbench.case.design import DesignCriteria
from workbench.case.materials import TYPICAL, needs_certificate
from workbench.record.computation import used_materials
from workbench.record.drawing import data_uri
from workbench.record.elevation import elevation_svg
from workbench.record.view_model.common import Rows, number, unit_label, unit_labels
from workbench.solver.model import Model, Notch

__all__ = ["InputsView", "inputs_view"]


@dataclass(frozen=True)
class InputsView:
    """What the Inputs section shows.

    Attributes
    ----------
    units
        Labels of the case's units (length, torque, stress, angle, stiffness, distributed
        torque).
    elevation
        The to-scale elevation as a ``data:`` URI.
    segments, materials, supports, gears, combinations, criteria
        Table rows (``gears`` and ``combinations`` empty when the case has none).
    certificates
        Names of the materials with a value marked ``typical_mark``: the record asks for their
        mill certificates.
    typical_mark
        :data:`workbench.case.materials.TYPICAL`.
    load_cases
        ``(name, rows)`` of every load case: its point and distributed torques.
    """

    units: dict[str, str]
    elevation: str
    segments: Rows
    materials: Rows
    supports: Rows
    gears: Rows
    load_cases: list[tuple[str, Rows]]
    combinations: Rows
    criteria: Rows
    certificates: list[str]
    typical_mark: str = TYPICAL


def _notch_text(notch: Notch, units: Any) -> str:
    """``groove: Kts 1.65, q 0.9`` — a notch as the inputs table shows it."""
    parts = [f"Kts {notch.kts:g}"]
    if notch.radius is not None:
        parts.append(f"r = {number(units.from_si(notch.radius, 'length'))}")
    if notch.notch_sensitivity is not None:
        parts.append(f"q {notch.notch_sensitivity:g}")
    return f"{notch.label}: {', '.join(parts)}"


def _section_text(section: Any, units: Any) -> str:
    """``solid Ø50 mm``, ``tube Ø50/Ø30 mm``, ``tapered Ø50 → Ø40 mm, bore Ø10``."""

    def length(value: float) -> str:
        return number(units.from_si(value, "length"))

    label = unit_label(units, "length")
    shape = section.shape
    if shape == "solid":
        return f"solid Ø{length(section.diameter)} {label}"
    if shape == "tube":
        return f"tube Ø{length(section.outer_diameter)}/Ø{length(section.inner_diameter)} {label}"
    if shape == "tapered":
        bore = f", bore Ø{length(section.bore)}" if section.bore else ""
        return (
            f"tapered Ø{length(section.diameter_start)} → Ø{length(section.diameter_end)} "
            f"{label}{bore}"
        )
    return f"{shape} (see case)"


def _segment_rows(model: Model) -> Rows:
    units = model.units
    rows = []
    for shaft in model.shafts:
        bounds = shaft.boundaries
        for index, segment in enumerate(shaft.segments):
            sections = " + ".join(_section_text(layer.section, units) for layer in segment.layers)
            names = ", ".join(dict.fromkeys(layer.material.name for layer in segment.layers))
            details = []
            if segment.keyseat:
                details.append("keyseat")
            if segment.fillet_radius is not None:
                details.append(
                    f"fillet r = {number(units.from_si(segment.fillet_radius, 'length'))}"
                )
            if segment.cross_hole_diameter is not None:
                hole = number(units.from_si(segment.cross_hole_diameter, "length"))
                details.append(f"cross hole Ø{hole}")
            if segment.notch is not None:
                details.append(_notch_text(segment.notch, units))
            rows.append(
                [
                    shaft.id,
                    index,
                    number(units.from_si(bounds[index], "length")),
                    number(units.from_si(bounds[index + 1], "length")),
                    sections,
                    names,
                    ", ".join(details) or "—",
                ]
            )
    return rows


def _load_rows(model: Model) -> list[tuple[str, Rows]]:
    units = model.units
    torque, distributed = unit_label(units, "torque"), unit_label(units, "distributed_torque")
    cases = []
    for case in model.load_cases:
        rows: Rows = [
            [
                point.shaft,
                "point",
                number(units.from_si(point.x, "length")),
                "",
                number(units.from_si(point.torque, "torque")) + f" {torque}",
            ]
            for point in case.torques
        ]
        rows += [
            [
                load.shaft,
                "distributed",
                number(units.from_si(load.start, "length")),
                number(units.from_si(load.end, "length")),
                f"{number(units.from_si(load.intensity_start, 'distributed_torque'))} → "
                f"{number(units.from_si(load.intensity_end, 'distributed_torque'))} {distributed}",
            ]
            for load in case.distributed
        ]
        cases.append((case.name, rows))
    return cases


def _criteria_rows(design: DesignCriteria, units: Any) -> Rows:
    rows: Rows = [
        ["shear criterion", design.shear_criterion],
        ["factor of safety", f"{design.factor_of_safety:g}"],
        ["keyways (code reduction)", "yes" if design.keyway else "no"],
    ]
    if design.allowable_shear_stress is not None:
        stress = number(units.from_si(design.allowable_shear_stress, "stress"))
        rows.append(["stated allowable shear stress", f"{stress} {unit_label(units, 'stress')}"])
    if design.max_twist_rate is not None:
        rate = number(units.from_si(design.max_twist_rate, "twist_rate"))
        rows.append(["largest rate of twist", f"{rate} {unit_label(units, 'twist_rate')}"])
    for limit in design.rotation_limits:
        rows.append(
            [
                f"rotation limit, shaft {limit.shaft}",
                f"|θ({number(units.from_si(limit.end, 'length'))}) − "
                f"θ({number(units.from_si(limit.start, 'length'))})| ≤ "
                f"{number(units.from_si(limit.limit, 'angle'))} {unit_label(units, 'angle')}",
            ]
        )
    return rows


def inputs_view(model: Model, design: DesignCriteria) -> InputsView:
    """The Inputs section of ``model`` checked by ``design``, in the case's units."""
    units = model.units

    def optional(value: float | None, quantity: str) -> str:
        return "—" if value is None else number(units.from_si(value, quantity))

    materials = used_materials(model)
    return InputsView(
        units=unit_labels(
            units, "length", "torque", "stress", "angle", "stiffness", "distributed_torque"
        ),
        elevation=data_uri(elevation_svg(model)),
        segments=_segment_rows(model),
        materials=[
            [
                material.name,
                optional(material.shear_modulus, "stress"),
                optional(material.yield_strength, "stress"),
                optional(material.ultimate_strength, "stress"),
                material.source or "not stated",
            ]
            for material in materials.values()
        ],
        supports=[
            [
                index,
                support.shaft,
                number(units.from_si(support.x, "length")),
                support.kind,
                optional(support.stiffness, "stiffness"),
                number(units.from_si(support.rotation, "angle")),
            ]
            for index, support in enumerate(model.supports)
        ],
        gears=[
            [
                index,
                gear.a.shaft,
                number(units.from_si(gear.a.x, "length")),
                number(units.from_si(gear.a.radius, "length")),
                gear.b.shaft,
                number(units.from_si(gear.b.x, "length")),
                number(units.from_si(gear.b.radius, "length")),
            ]
            for index, gear in enumerate(model.gears)
        ],
        load_cases=_load_rows(model),
        combinations=[
            [combination.name, ", ".join(f"{f:g} × {name}" for name, f in combination.factors)]
            for combination in model.combinations
        ],
        criteria=_criteria_rows(design, units),
        certificates=[name for name, material in materials.items() if needs_certificate(material)],
    )
