"""Results in a reader's units: the ``solve --json`` document and plain-text tables.

Everything here converts SI results to a :class:`UnitSystem` at the edge; nothing computes
mechanics.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from workbench.case.units import UnitSystem
from workbench.solver.analysis import Results

#: The base quantities a results document reports, with their unit keys.
REPORTED_UNITS = ("length", "torque", "stress", "angle")


def _floats(values: Any) -> list[float]:
    return [float(v) for v in np.asarray(values, dtype=float)]


def results_document(results: Results, units: UnitSystem | None = None) -> dict[str, Any]:
    """The ``workbench solve --json`` document, in the given units (default: the case's).

    Parameters
    ----------
    results
        Solved results.
    units
        Units for every number.

    Returns
    -------
    dict
        ``{"units": {...}, "results": [{"name", "reactions", "shafts": {id: {"x", "torque",
        "angle", "shear_stress"}}}]}``, load cases then combinations, in file order.
    """
    units = units or results.model.units
    entries = []
    for result in results:
        shafts = {
            shaft_id: {
                "x": _floats(units.from_si(values.x, "length")),
                "torque": _floats(units.from_si(values.torque, "torque")),
                "angle": _floats(units.from_si(values.angle, "angle")),
                "shear_stress": _floats(units.from_si(values.shear_stress, "stress")),
            }
            for shaft_id, values in result.shafts.items()
        }
        entries.append(
            {
                "name": result.name,
                "reactions": _floats(units.from_si(result.reactions, "torque")),
                "shafts": shafts,
            }
        )
    return {"units": {key: getattr(units, key) for key in REPORTED_UNITS}, "results": entries}


def format_table(headers: list[str], rows: list[list[str]]) -> str:
    """Left-aligned first column, right-aligned numbers, a rule under the header."""
    widths = [
        max(len(str(cell)) for cell in column) for column in zip(headers, *rows, strict=False)
    ]
    lines = []
    for line_number, row in enumerate([headers, *rows]):
        cells = [
            str(cell).ljust(width) if index == 0 else str(cell).rjust(width)
            for index, (cell, width) in enumerate(zip(row, widths, strict=True))
        ]
        lines.append("  ".join(cells).rstrip())
        if line_number == 0:
            lines.append("  ".join("-" * width for width in widths))
    return "\n".join(lines)


def _g(value: float) -> str:
    return f"{value:.5g}"


def results_text(results: Results, units: UnitSystem | None = None) -> str:
    """Readable tables: reactions and, per shaft, the values at every node (left and right)."""
    units = units or results.model.units
    model = results.model
    out = []
    if model.title:
        out.append(model.title)
        out.append("=" * len(model.title))
    mesh = results.mesh
    for result in results:
        kind = "combination" if result.is_combination else "load case"
        out.append(f"\n{kind} {result.name!r}")
        rows = [
            [
                f"{support.shaft} x={_g(units.from_si(support.x, 'length'))}",
                support.kind,
                _g(units.from_si(reaction, "torque")),
            ]
            for support, reaction in zip(model.supports, result.reactions, strict=True)
        ]
        out.append(format_table(["support", "kind", f"reaction [{units.label('torque')}]"], rows))
        if model.gears:
            rows = [
                [
                    f"gears[{number}]",
                    _g(units.from_si(torques[0], "torque")),
                    _g(units.from_si(torques[1], "torque")),
                ]
                for number, torques in enumerate(result.gear_torques)
            ]
            out.append(
                format_table(
                    ["mesh", f"on a [{units.label('torque')}]", f"on b [{units.label('torque')}]"],
                    rows,
                )
            )
        for number, (shaft_id, values) in enumerate(result.shafts.items()):
            window = slice(
                int(mesh.shaft_station_start[number]), int(mesh.shaft_station_start[number + 1])
            )
            local = mesh.station_u[window]
            is_end = mesh.station_is_end[window]
            keep = (local == 0.0) | is_end
            rows = [
                [
                    _g(units.from_si(x, "length")),
                    _g(units.from_si(t, "torque")),
                    _g(units.from_si(a, "angle")),
                    _g(units.from_si(s, "stress")),
                ]
                for x, t, a, s in zip(
                    values.x[keep],
                    values.torque[keep],
                    values.angle[keep],
                    values.shear_stress[keep],
                    strict=True,
                )
            ]
            out.append(f"\nshaft {shaft_id!r}")
            out.append(
                format_table(
                    [
                        f"x [{units.label('length')}]",
                        f"torque [{units.label('torque')}]",
                        f"angle [{units.label('angle')}]",
                        f"shear stress [{units.label('stress')}]",
                    ],
                    rows,
                )
            )
            peak = int(np.argmax(values.shear_stress))
            out.append(
                f"largest shear stress {_g(units.from_si(values.shear_stress[peak], 'stress'))} "
                f"{units.label('stress')} at x = {_g(units.from_si(values.x[peak], 'length'))} "
                f"{units.label('length')}; largest |angle| "
                f"{_g(units.from_si(np.abs(values.angle).max(), 'angle'))} {units.label('angle')}"
            )
    return "\n".join(out) + "\n"
