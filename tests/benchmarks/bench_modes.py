"""Speed of the torsional vibration analysis (``workbench.solver.modes.natural_modes``).

Target (on the 2-core reference machine):

* The first 10 modes of a 2,000-element system ≤ 100 ms: a line shaft of 250 segments (solid
  Ø40 mm and tube Ø50/30 mm in turn, with density), fixed at both ends, a spring support at
  mid-length, discs every 25 segments, cut into the default 8 elements per segment. The time is
  the whole call: modal mesh, assembly, constraints, shift-invert Lanczos, shapes.

Also reported: 20,000 elements (scaling), and a small disc chain on massless shafts (the dense
path). Models are invented for timing only.
"""

from __future__ import annotations

import math
from typing import Any

from tests.benchmarks.common import Row, time_calls

MS = 1e3


def _line_shaft(segments: int, density: float | None = 7850.0) -> Any:
    from workbench.case.materials import Material
    from workbench.solver.model import Disc, LoadCase, Model, Segment, Shaft, Support
    from workbench.solver.sections import SolidCircle, Tube

    steel = Material("demo drive steel", 79.3e9, 390e6, 470e6, density=density)
    solid, tube = SolidCircle(0.040), Tube(0.050, 0.030)
    lengths = (0.040, 0.060, 0.050)
    shaft = Shaft(
        "line",
        tuple(
            Segment.single(lengths[n % 3], steel, solid if n % 2 == 0 else tube)
            for n in range(segments)
        ),
    )
    joints = shaft.boundaries
    discs = tuple(Disc("line", float(joints[n]), 0.02) for n in range(25, segments, 25))
    return Model(
        shafts=(shaft,),
        supports=(
            Support("line", 0.0),
            Support("line", shaft.length),
            Support("line", float(joints[segments // 2]), "spring", 5.0e4),
        ),
        load_cases=(LoadCase("none"),),
        discs=discs,
    )


def _chain() -> Any:
    from workbench.case.materials import Material
    from workbench.solver.model import Disc, LoadCase, Model, Segment, Shaft, Support
    from workbench.solver.sections import SolidCircle

    steel = Material("demo drive steel", 79.3e9, 390e6, 470e6)
    shaft = Shaft(
        "chain",
        tuple(Segment.single(0.3, steel, SolidCircle(d)) for d in (0.06, 0.05, 0.045, 0.04)),
    )
    return Model(
        shafts=(shaft,),
        supports=(Support("chain", 0.0),),
        load_cases=(LoadCase("none"),),
        discs=tuple(
            Disc("chain", float(x), j)
            for x, j in zip(shaft.boundaries[1:], (0.8, 0.3, 0.5, 0.2), strict=True)
        ),
    )


def _modes_row(segments: int, target: float | None, repeats: int) -> Row:
    from workbench.solver.modes import natural_modes

    model = _line_shaft(segments)
    modes = natural_modes(model, count=10)
    elements = len(modes.mesh.element_length)
    timing = time_calls(lambda: natural_modes(model, count=10), repeats=repeats, budget=3.0)
    hertz = ", ".join(f"{f:.4g}" for f in modes.frequency[:3])
    notes = (
        f"{segments} segments × 8 elements = {elements} elements, {len(modes.mesh.node_x)} "
        f"nodes; sparse shift-invert eigsh at σ = 0; median of {len(timing.times)} "
        f"(p95 {timing.p95 * MS:.1f} ms)",
        f"lowest frequencies: {hertz} Hz",
    )
    return Row(
        f"{elements} el.: first 10 modes",
        timing.median * MS,
        "ms",
        target,
        gate=target is not None,
        notes=notes,
    )


def _chain_row() -> Row:
    from workbench.solver.modes import natural_modes

    model = _chain()
    timing = time_calls(lambda: natural_modes(model), repeats=200, budget=1.0)
    modes = natural_modes(model)
    return Row(
        "4-disc chain (dense): all modes",
        timing.median * MS,
        "ms",
        notes=(
            f"massless stepped shaft, 4 discs, dense eigh; {len(modes)} modes, highest "
            f"{modes.frequency[-1]:.4g} Hz; median of {len(timing.times)}",
        ),
    )


def run() -> list[Row]:
    """Every vibration benchmark."""
    rows = [_modes_row(250, 100.0, 31), _modes_row(2500, None, 7), _chain_row()]
    if not all(math.isfinite(row.measured) for row in rows):  # pragma: no cover
        msg = "a benchmark produced no figure"
        raise AssertionError(msg)
    return rows
