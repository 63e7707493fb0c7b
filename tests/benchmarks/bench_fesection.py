"""Sections by finite elements: a typical polygon section cold and from the cache.

Targets (issue 14): a sectionproperties analysis of a typical polygon section ≤ 2 s cold (a fresh
interpreter, the imports of workbench and sectionproperties included) and ≤ 5 ms from the cache
(the same outline built again as the panel rebuilds it on every edit).

The typical section is an invented channel outline, 200 mm deep, flanges 100 × 10 mm, web 8 mm
(eight corners, two re-entrant). A second row: an invented 120 × 80 mm plate with two round holes
of 30 mm (32 sides each), a section whose mesh its boundaries, more than the area limit, set.
"""

from __future__ import annotations

import statistics

from tests.benchmarks.common import ANSWER_MARK, Row, run_fresh_python, time_calls

MS = 1e3
COLD_RUNS = 3

CHANNEL = "((0, 0), (0.1, 0), (0.1, 0.01), (0.008, 0.01), (0.008, 0.19), (0.1, 0.19), (0.1, 0.2), (0, 0.2))"
PLATE = """(
    ((0, 0), (0.12, 0), (0.12, 0.08), (0, 0.08)),
    tuple(
        tuple((cx + 0.015 * math.cos(a), 0.04 + 0.015 * math.sin(a)) for a in angles)
        for cx in (0.03, 0.09)
    ),
)"""

COLD = """
import time
start = time.perf_counter()
import json, math
from workbench.solver.polygon_sections import PolygonSection
angles = [2 * math.pi * k / 32 for k in range(32)]
outer, holes = {geometry}
section = PolygonSection(outer, holes)
elapsed = time.perf_counter() - start
print("{mark}" + json.dumps([elapsed, section.properties.elements]))
"""


def _cold(geometry: str) -> tuple[float, int]:
    runs = [
        run_fresh_python(COLD.format(geometry=geometry, mark=ANSWER_MARK)) for _ in range(COLD_RUNS)
    ]
    return statistics.median(seconds for seconds, _ in runs), int(runs[0][1])


def run() -> list[Row]:
    """Cold (fresh process) and cached rows."""
    import ast

    from workbench.solver.analysis import solve
    from workbench.solver.io import parse_case
    from workbench.solver.polygon_sections import PolygonSection

    channel_cold, channel_elements = _cold(f"({CHANNEL}, ())")
    plate_cold, plate_elements = _cold(PLATE)
    outer = ast.literal_eval(CHANNEL)  # the same outline the fresh processes read
    PolygonSection(outer)
    cached = time_calls(lambda: PolygonSection(outer), repeats=200, warmup=3)
    case = {
        "materials": {"steel": {"shear_modulus": 79.3e9, "elastic_modulus": 200e9}},
        "shafts": [{"id": "s", "segments": [{"length": 2.0, "material": "steel", "section": {
            "shape": "polygon", "outer": [{"x": x, "y": y} for x, y in outer]}}]}],
        "supports": [{"shaft": "s", "x": 0.0}],
        "load_cases": [{"name": "c", "torques": [{"shaft": "s", "x": 2.0, "torque": 1e3}]}],
    }  # fmt: skip
    resolve = time_calls(lambda: solve(parse_case(case)), repeats=100, warmup=2)
    notes = (
        f"cold: a fresh interpreter imports workbench's polygon section, sectionproperties "
        f"(with shapely and matplotlib, which it imports) and meshes until J and Cw settle "
        f"within 1 %; median of {COLD_RUNS} processes; channel {channel_elements} elements",
        f"plate with two round holes: {plate_elements} elements",
        f"cached: PolygonSection(outline) built again (digest of the outline, memory cache, "
        f"range checks); median of {len(cached.times)} calls, p95 {cached.p95 * MS:.3f} ms",
    )
    return [
        Row(
            "polygon section (channel), cold, import included", channel_cold, "s", 2.0, notes=notes
        ),
        Row("polygon section (plate, two round holes), cold", plate_cold, "s", 2.0),
        Row("polygon section from the cache", cached.median * MS, "ms", 5.0),
        Row("polygon case re-read and solved, section cached", resolve.median * MS, "ms"),
    ]
