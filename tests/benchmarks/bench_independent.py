"""Benchmarks of the independent check (force method) beside the stiffness solver it checks.

Both solve the same decoded case file (reading and unit conversion included on both sides),
taking turns so that the ratio compares like with like: the bundled demo, and one shaft of
20,000 segments (solid, tube and tapered in turn) with a mesh, three supports and a distributed
torque. No target: the ratio is reported for information (the record runs both).
"""

from __future__ import annotations

import copy
import json

from tests.benchmarks.common import Row, time_pair

#: Segments of the long shaft.
LONG_SHAFT_SEGMENTS = 20_000


def _long_shaft(document: dict) -> dict:
    big = copy.deepcopy(document)
    sections = (
        {"shape": "solid", "diameter": 60.0},
        {"shape": "tube", "outer_diameter": 70.0, "inner_diameter": 40.0},
        {"shape": "tapered", "diameter_start": 70.0, "diameter_end": 50.0},
    )
    n = LONG_SHAFT_SEGMENTS
    big["shafts"][0]["segments"] = [
        {"length": 1.0, "material": "auger-steel", "section": sections[i % 3]} for i in range(n)
    ]
    big["supports"] = [
        {"shaft": "auger", "x": 0},
        {"shaft": "auger", "x": n / 2, "kind": "spring", "stiffness": 500},
        {"shaft": "auger", "x": n},
    ]
    big["gears"][0]["a"]["x"] = n / 4
    big["load_cases"][0]["distributed"][0].update(start=0.6 * n, end=0.9 * n)
    big["design"]["rotation_limits"] = []
    return big


def run() -> list[Row]:
    """Time the force method against the solver on the demo and on a long shaft."""
    from workbench.case.load import case_file_from_document
    from workbench.cli.solve import DEMO_CASE
    from workbench.design.independent import independent_check
    from workbench.solver.analysis import solve_case

    demo = json.loads(DEMO_CASE.read_text("utf-8"))
    rows = []
    for label, document, repeats in (
        ("demo", demo, 41),
        (f"{LONG_SHAFT_SEGMENTS:,} segments", _long_shaft(demo), 5),
    ):
        case = case_file_from_document(document)
        check, solver = time_pair(
            lambda case=case: independent_check(case),
            lambda case=case: solve_case(case),
            repeats=repeats,
        )
        rows += [
            Row(f"independent check, {label}, median", check.median * 1e3, "ms"),
            Row(f"solver, {label}, median", solver.median * 1e3, "ms"),
            Row(f"independent check / solver, {label}", check.median / solver.median, "×"),
        ]
    return rows
