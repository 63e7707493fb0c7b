"""Pieces every section's view model uses: numbers as the record writes them, the equations.

A view model holds only plain data — strings already formatted in the case's units, numbers,
lists and small dataclasses. The templates under ``templates/workbench_record/`` turn it into
HTML and escape every value they write.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from workbench.case.display import unit_symbol
from workbench.record.drawing import data_uri
from workbench.record.equations import load_equations

__all__ = ["Equation", "equations", "factor", "number", "rpm", "unit_label", "unit_labels"]

#: Rows of a table: one list of cells (formatted strings, or whole numbers) per row.
Rows = list[list[Any]]


def number(value: float, digits: int = 5) -> str:
    """``digits`` significant digits with a true minus sign; an exact zero is ``0``."""
    if value == 0.0:
        return "0"
    return f"{value:.{digits}g}".replace("-", "\u2212")


def factor(value: float) -> str:
    """A factor of safety to three digits; ``∞`` when nothing loads the part."""
    return "∞" if math.isinf(value) else f"{value:.3g}"


def rpm(angular: float) -> float:
    """An angular frequency (rad/s) as a speed (rev/min)."""
    return angular * 60.0 / (2.0 * math.pi)


def unit_label(units: Any, quantity: str, printed: bool = True) -> str:
    """The case's unit of ``quantity`` as the unit library prints it (``N·m``, ``kg·m²``).

    ``printed=False`` gives the unit as the case file writes it (``N*m``, ``kg*m**2``): records
    signed before the printed form wrote it so in the sections a verifier rebuilds.
    """
    label: str = units.label(quantity)
    return unit_symbol(label) if printed else label


def unit_labels(units: Any, *quantities: str, printed: bool = True) -> dict[str, str]:
    """The labels of the case's units for ``quantities`` (``{"torque": "N·m", …}``)."""
    return {quantity: unit_label(units, quantity, printed) for quantity in quantities}


@dataclass(frozen=True)
class Equation:
    """One row of an equations table.

    Attributes
    ----------
    uri
        The shipped picture as a ``data:`` URI.
    width, height
        Its size as drawn (CSS px), so that every equation's text has the same size.
    reading
        A plain-text reading (the picture's alternative text).
    meaning
        What it states.
    number
        Its number, counted through the whole record.
    """

    uri: str
    width: int
    height: int
    reading: str
    meaning: str
    number: int


@lru_cache(maxsize=4)
def equations(group: str) -> tuple[Equation, ...]:
    """The equations one section shows (``statics``, ``vibration``, ``fatigue``, ``independent``)."""
    rows = []
    for number_in_record, (equation, svg, width_pt, height_pt) in enumerate(
        load_equations(), start=1
    ):
        if equation.group != group:
            continue
        # Shown at the size drawn (pt → CSS px at 96 px per inch); the width and height
        # attributes keep the layout from jumping while the page loads.
        rows.append(
            Equation(
                data_uri(svg),
                round(width_pt * 4 / 3),
                round(height_pt * 4 / 3),
                equation.reading,
                equation.meaning,
                number_in_record,
            )
        )
    return tuple(rows)
