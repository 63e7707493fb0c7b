"""Demo notebooks for the calculation record (invented data, a scenario of our own).

They display the case exactly as the panel does (the record's contract), so the record can be
exported, tested and timed before and apart from the panel.
"""

from __future__ import annotations

import copy
import json
from typing import Any

import nbformat

from workbench.record.notebook import CASE_MIME_TYPE as CASE_MIME

#: One shaft on two supports (fixed, spring with a pre-twist): the hand check applies.
LINE_SHAFT_CASE: dict[str, Any] = {
    "title": "Orchard conveyor line shaft (demo)",
    "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {
        "steel": {
            "shear_modulus": 79300,
            "yield_strength": 350,
            "ultimate_strength": 520,
            "source": "demo values for a carbon steel",
        }
    },
    "shafts": [
        {
            "id": "main",
            "segments": [
                {"length": 300, "material": "steel", "section": {"shape": "solid", "diameter": 50}},
                {
                    "length": 200,
                    "material": "steel",
                    "section": {"shape": "tube", "outer_diameter": 50, "inner_diameter": 30},
                },
                {
                    "length": 150,
                    "material": "steel",
                    "section": {"shape": "tapered", "diameter_start": 50, "diameter_end": 40},
                },
                {"length": 100, "material": "steel", "section": {"shape": "solid", "diameter": 40}},
            ],
        }
    ],
    "supports": [
        {"shaft": "main", "x": 0, "kind": "fixed"},
        {"shaft": "main", "x": 650, "kind": "spring", "stiffness": 50000, "rotation": 0.1},
    ],
    "load_cases": [
        {
            "name": "service",
            "torques": [
                {"shaft": "main", "x": 300, "torque": 400},
                {"shaft": "main", "x": 750, "torque": -50},
            ],
            "distributed": [
                {
                    "shaft": "main",
                    "start": 100,
                    "end": 600,
                    "intensity_start": 0.2,
                    "intensity_end": 0.8,
                }
            ],
        },
        {"name": "peak", "torques": [{"shaft": "main", "x": 500, "torque": 900}]},
    ],
    "combinations": [{"name": "factored", "factors": {"service": 1.5, "peak": 1.2}}],
    "design": {"factor_of_safety": 2.0, "shear_criterion": "von_mises"},
}

#: One shaft fixed at the drive end with two discs, a density, a running-speed band and a
#: fatigue check between start-up and running torque: the record's vibration and fatigue sections.
FEED_DRIVE_CASE: dict[str, Any] = {
    "title": "Cider press feed drive (demo)",
    "units": {
        "length": "mm",
        "torque": "N*m",
        "stress": "MPa",
        "angle": "deg",
        "speed": "rpm",
        "inertia": "kg*m**2",
        "density": "kg/m**3",
    },
    "materials": {
        "steel": {
            "shear_modulus": 79300,
            "yield_strength": 420,
            "ultimate_strength": 620,
            "density": 7850,
            "source": "demo values for a quenched and tempered steel",
        }
    },
    "shafts": [
        {
            "id": "feed",
            "segments": [
                {"length": 200, "material": "steel", "section": {"shape": "solid", "diameter": 45}},
                {
                    "length": 350,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": 38},
                    "fillet_radius": 2,
                    "keyseat": True,
                },
                {
                    "length": 150,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": 32},
                    "fillet_radius": 1.5,
                },
            ],
        }
    ],
    "supports": [{"shaft": "feed", "x": 0, "kind": "fixed"}],
    "discs": [
        {"shaft": "feed", "x": 400, "inertia": 0.08},
        {"shaft": "feed", "x": 700, "inertia": 0.35},
    ],
    "operating_speeds": [{"name": "run", "min": 900, "max": 1450}],
    "load_cases": [
        {"name": "start-up", "torques": [{"shaft": "feed", "x": 700, "torque": 310}]},
        {"name": "running", "torques": [{"shaft": "feed", "x": 700, "torque": 120}]},
    ],
    "design": {
        "factor_of_safety": 2.0,
        "shear_criterion": "von_mises",
        "fatigue": {
            "extremes": ["start-up", "running"],
            "finish": "machined",
            "reliability": 0.99,
            "criterion": "goodman",
            "factor_of_safety": 1.5,
        },
    },
}

DEMO_TITLE_BLOCK: dict[str, Any] = {
    "project": "Orchard line",
    "calculation_number": "WB-0042",
    "revision": "B",
    "subject": "Line shaft torsion check",
    "prepared_by": "A. Ingenieur",
    "date_prepared": "2025-03-01",
    "checked_by": "B. Prüfer",
    "date_checked": "2025-03-02",
    "revision_history": [
        {"revision": "A", "date": "2025-02-20", "by": "A. Ingenieur", "description": "first issue"},
        {"revision": "B", "date": "2025-03-01", "by": "A. Ingenieur", "description": "taper"},
    ],
}


def case_cell_source(case: dict[str, Any]) -> str:
    """A code cell that displays the case as the panel does (the record's contract)."""
    return (
        "import json\n"
        "from IPython.display import display\n"
        f"case = json.loads({json.dumps(json.dumps(case))})\n"
        f"display({{{CASE_MIME!r}: case, 'text/plain': 'case'}}, raw=True)\n"
    )


def demo_notebook(
    case: dict[str, Any] | None = None,
    *,
    title_block: dict[str, Any] | None = None,
    note: str = "A note for the checker.",
    executed: bool = False,
) -> Any:
    """A notebook: a markdown cell, a cell displaying the case, a cell printing a number.

    Parameters
    ----------
    case
        The case dict (default :data:`LINE_SHAFT_CASE`).
    title_block
        Metadata ``workbench.title_block`` (default :data:`DEMO_TITLE_BLOCK`).
    note
        Markdown text of the first cell (may hold HTML).
    executed
        Write the case output as a kernel would, so no kernel needs to run.
    """
    case = copy.deepcopy(case or LINE_SHAFT_CASE)
    nb = nbformat.v4.new_notebook()
    block = copy.deepcopy(DEMO_TITLE_BLOCK if title_block is None else title_block)
    nb.metadata["workbench"] = {"title_block": block}
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3",
        "language": "python",
    }
    code = nbformat.v4.new_code_cell(case_cell_source(case))
    if executed:
        code.execution_count = 1
        code.outputs = [
            nbformat.v4.new_output(
                "display_data", data={CASE_MIME: case, "text/plain": "case"}, metadata={}
            )
        ]
    nb.cells = [
        nbformat.v4.new_markdown_cell(f"# {case.get('title', 'Case')}\n\n{note}"),
        code,
        nbformat.v4.new_code_cell("print('a number an output claims:', 12345.678)"),
    ]
    return nb
