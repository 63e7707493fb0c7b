"""Speed of the workbench panel (kernel side, no browser) against its targets.

* One edit of a 20-segment case → every chart trait set: p95 ≤ 20 ms.
* 200 edits fired as fast as possible end in the last edit's state: ≤ 2 s in all.
* A 1,000-point diameter sweep of a 20-segment case (largest shear stress): ≤ 1 s.
Also reported: the same sweep following the governing utilisation (runs every check per point).
The 20-segment case is the demo case with its auger cut into 20 segments (invented data).
"""

from __future__ import annotations

import json
import time
from pathlib import Path
from typing import Any

import numpy as np

from tests.benchmarks.common import Row, time_calls

CASE = Path(__file__).resolve().parents[2] / "notebooks" / "press_drive.json"


def twenty_segment_case() -> dict[str, Any]:
    """The demo case with a 20-segment auger (alternating solid and tube, 45 mm each)."""
    document = json.loads(CASE.read_text(encoding="utf-8"))
    segments = []
    for number in range(20):
        if number % 2 == 0:
            section = {"shape": "solid", "diameter": 45 + number % 4}
            segments.append({"length": 45, "material": "auger-steel", "section": section})
        else:
            section = {"shape": "tube", "outer_diameter": 55, "inner_diameter": 30}
            segments.append(
                {"length": 45, "material": "auger-steel", "fillet_radius": 2, "section": section}
            )
    document["shafts"][0]["segments"] = segments
    return document


def run() -> list[Row]:
    from workbench.panel import Workbench
    from workbench.panel.sweep import SweepRequest, run_sweep

    document = twenty_segment_case()
    panel = Workbench(document)
    field = panel._fields["shafts[0].segments[4].section.diameter"][0]
    sizes = iter(np.tile(np.linspace(40.0, 60.0, 97), 50))

    def edit() -> None:
        field.value = float(next(sizes))

    timing = time_calls(edit, repeats=300, warmup=5)
    rows = [
        Row(
            "edit → all charts set, 20 segments (p95)",
            timing.p95 * 1e3,
            "ms",
            20.0,
            notes=(f"median {timing.median * 1e3:.2f} ms",),
        )
    ]

    count = panel.solve_count
    start = time.perf_counter()
    for value in np.linspace(41.0, 59.0, 200):
        field.value = float(value)
    elapsed = time.perf_counter() - start
    last = panel.document["shafts"][0]["segments"][4]["section"]["diameter"]
    ok = last == 59 and not panel.stale and panel.solve_count > count
    rows.append(
        Row("200 rapid edits end in the last state", elapsed if ok else float("inf"), "s", 2.0)
    )

    path = ("shafts", 0, "segments", 4, "section", "diameter")
    values = tuple(np.linspace(35.0, 60.0, 1000))
    for metric, target in (("max_shear_stress", 1.0), ("governing_utilisation", None)):
        request = SweepRequest(path, values, metric, "jam")
        start = time.perf_counter()
        run_sweep(document, request, chunk=25)
        rows.append(
            Row(
                f"1,000-point diameter sweep, 20 segments ({metric})",
                time.perf_counter() - start,
                "s",
                target,
            )
        )
    return rows
