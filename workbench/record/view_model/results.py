"""The Results section: support torques, extremes and diagrams of every load case.

For every load case and combination: the support torques, the extremes and the diagrams of
torque, twist and shear stress along every shaft, in the case's units.

The verifier rebuilds this section from the signed case and looks for it in the record, so it
must come out byte for byte as it always has.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.record.drawing import data_uri
from workbench.record.figures import line_diagram_svg
from workbench.record.view_model.common import Rows, number, unit_labels
from workbench.solver.analysis import Results

__all__ = ["ResultBlock", "ResultsView", "results_view"]


@dataclass(frozen=True)
class ResultBlock:
    """One load case or combination.

    Attributes
    ----------
    kind
        ``Load case`` or ``Combination``.
    name
        Its name.
    reactions
        Rows: support number, shaft, x, kind, reaction.
    extremes
        Rows: shaft, T min, T max, θ min, θ max, τ max.
    diagrams
        ``(shaft id, data: URI)`` of the diagrams along each shaft.
    """

    kind: str
    name: str
    reactions: Rows
    extremes: Rows
    diagrams: list[tuple[str, str]]


@dataclass(frozen=True)
class ResultsView:
    """Unit labels and one block per result."""

    units: dict[str, str]
    blocks: list[ResultBlock]


def results_view(results: Results, printed: bool = True) -> ResultsView:
    """The Results section of solved ``results`` (``printed``: units as the unit library prints them, else as the case file writes them)."""
    model = results.model
    units = model.units
    labels = unit_labels(units, "length", "torque", "stress", "angle", printed=printed)
    blocks = []
    for result in results:
        reactions: Rows = [
            [
                index,
                support.shaft,
                number(units.from_si(support.x, "length")),
                support.kind,
                number(units.from_si(float(result.reactions[index]), "torque"), 6),
            ]
            for index, support in enumerate(model.supports)
        ]
        extremes: Rows = []
        diagrams: list[tuple[str, str]] = []
        for shaft_id, values in result.shafts.items():
            x = units.from_si(values.x, "length")
            torque = units.from_si(values.torque, "torque")
            angle = units.from_si(values.angle, "angle")
            stress = units.from_si(values.shear_stress, "stress")
            extremes.append(
                [
                    shaft_id,
                    number(float(torque.min())),
                    number(float(torque.max())),
                    number(float(angle.min())),
                    number(float(angle.max())),
                    number(float(stress.max())),
                ]
            )
            svg = line_diagram_svg(
                x,
                [
                    (f"torque T [{labels['torque']}]", torque),
                    (f"angle of twist θ [{labels['angle']}]", angle),
                    (f"shear stress τ [{labels['stress']}]", stress),
                ],
                f"x along shaft {shaft_id} [{labels['length']}]",
            )
            diagrams.append((shaft_id, data_uri(svg)))
        kind = "Combination" if result.is_combination else "Load case"
        blocks.append(ResultBlock(kind, result.name, reactions, extremes, diagrams))
    return ResultsView(labels, blocks)
