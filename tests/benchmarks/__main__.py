"""Run the benchmarks and print one table of figures against their targets.

Usage, from the project root::

    python -m tests.benchmarks               # every bench_*.py module of this package
    python -m tests.benchmarks --only solver # one module (``solver`` or ``bench_solver``)
    python -m tests.benchmarks --list        # the modules found

A module ``bench_<name>.py`` takes part by offering ``run() -> list[Row]``
(:class:`tests.benchmarks.common.Row`); each module runs in a fresh interpreter of its own
(``--in-process`` runs them all in this one), its rows come back as JSON. The table shows each figure, its target, the ratio
measured/target and PASS/MISS; rows without a target are reported for information.

Benchmarks report, they do not fail: the exit status is 0 even when a target is missed, and 1 only
when a benchmark module could not run (an exception) or ``--only`` names no module.
"""

from __future__ import annotations

import argparse
import importlib
import os
import pkgutil
import platform
import sys
import time
import traceback
from collections.abc import Sequence
from pathlib import Path

from tests.benchmarks.common import Row, rows_in_fresh_process

PREFIX = "bench_"

#: Share of the cores' time taken by other processes above which the figures are flagged.
BUSY_SHARE = 0.10
#: Shorter runs are below the resolution of the kernel's CPU-time counters (clock ticks).
MIN_WALL_FOR_SHARE = 2.0


def discover() -> list[str]:
    """Names of the ``bench_*`` modules of this package, sorted."""
    folder = Path(__file__).resolve().parent
    return sorted(
        info.name
        for info in pkgutil.iter_modules([str(folder)])
        if info.name.startswith(PREFIX) and not info.ispkg
    )


def _format_number(value: float | None) -> str:
    if value is None:
        return "-"
    magnitude = abs(value)
    if float(value).is_integer() and magnitude < 1e6:
        return f"{value:,.0f}"
    if magnitude == 0.0 or 0.01 <= magnitude < 1e6:
        digits = 0 if magnitude >= 1000 else 1 if magnitude >= 100 else 2 if magnitude >= 1 else 3
        return f"{value:,.{digits}f}"
    return f"{value:.3g}"


def _target_text(row: Row) -> str:
    if row.target is None:
        return "-"
    sign = "≤" if row.sense == "<=" else "≥"
    return f"{sign} {_format_number(row.target)} {row.unit}".rstrip()


def render(results: Sequence[tuple[str, Row]]) -> str:
    """One aligned table, then the numbered notes of its rows."""
    header = ("module", "benchmark", "measured", "unit", "target", "ratio", "result")
    lines: list[tuple[str, ...]] = [header]
    notes: list[str] = []
    noted = 0
    for module, row in results:
        name = row.name
        if row.notes:
            noted += 1
            name = f"{row.name} [{noted}]"
            notes.append(f"[{noted}] {row.name}")
            notes.extend(f"    {line}" for line in row.notes)
        lines.append(
            (
                module.removeprefix(PREFIX),
                name,
                _format_number(row.measured),
                row.unit,
                _target_text(row),
                _format_number(row.ratio),
                row.verdict,
            )
        )
    widths = [max(len(line[column]) for line in lines) for column in range(len(header))]
    right_aligned = {2, 5}
    table = []
    for number, line in enumerate(lines):
        cells = [
            cell.rjust(width) if column in right_aligned else cell.ljust(width)
            for column, (cell, width) in enumerate(zip(line, widths, strict=True))
        ]
        table.append("  ".join(cells).rstrip())
        if number == 0:
            table.append("  ".join("-" * width for width in widths))
    return "\n".join([*table, "", *notes])


def _busy_seconds() -> tuple[float, float] | None:
    """(CPU seconds all processes have used, CPU seconds this process and its children have)."""
    try:
        with open("/proc/stat") as stat:
            fields = stat.readline().split()
    except OSError:
        return None
    # user nice system idle iowait irq softirq steal: everything but idle and iowait is busy.
    ticks = [int(value) for value in fields[1:9]]
    busy = (sum(ticks) - ticks[3] - ticks[4]) / os.sysconf("SC_CLK_TCK")
    own = os.times()
    return busy, own.user + own.system + own.children_user + own.children_system


def _machine_line(before: tuple[float, float] | None, wall: float) -> str:
    """Cores and the CPU other processes took meanwhile, to tell a busy machine's figures."""
    cores = os.cpu_count() or 1
    line = f"machine: {cores} cores, Python {platform.python_version()}, {wall:.0f} s in all"
    after = _busy_seconds()
    if before is None or after is None or wall < MIN_WALL_FOR_SHARE:
        return line
    others = max(0.0, (after[0] - before[0]) - (after[1] - before[1])) / (wall * cores)
    line += f"; other processes used {others:.0%} of the cores meanwhile"
    if others > BUSY_SHARE:
        line += " (timings are inflated: run again on a quiet machine)"
    return line


def main(argv: Sequence[str] | None = None) -> int:
    """Run the selected benchmark modules and print the table; see the module docstring."""
    parser = argparse.ArgumentParser(
        prog="python -m tests.benchmarks",
        description=__doc__,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--only", metavar="NAME", help="run one module: 'solver' or 'bench_solver'")
    parser.add_argument("--list", action="store_true", help="list the benchmark modules and exit")
    parser.add_argument(
        "--in-process",
        action="store_true",
        help="run the modules in this interpreter, one after another (for debugging); by default "
        "each runs in a fresh interpreter so none shapes another's figures",
    )
    options = parser.parse_args(argv)
    modules = discover()
    if options.list:
        print("\n".join(modules))
        return 0
    if options.only:
        wanted = options.only.removesuffix(".py")
        wanted = wanted if wanted.startswith(PREFIX) else PREFIX + wanted
        if wanted not in modules:
            print(f"no benchmark module {wanted!r}; found: {', '.join(modules)}", file=sys.stderr)
            return 1
        modules = [wanted]
    results: list[tuple[str, Row]] = []
    failed: list[str] = []
    started = time.perf_counter()
    busy_before = _busy_seconds()
    for name in modules:
        print(f"running {name} ...", file=sys.stderr, flush=True)
        module_start = time.perf_counter()
        try:
            if options.in_process:
                rows = importlib.import_module(f"{__package__}.{name}").run()
            else:
                rows = rows_in_fresh_process(f"{__package__}.{name}")
        except Exception:
            traceback.print_exc()
            failed.append(name)
            continue
        print(f"  {name}: {time.perf_counter() - module_start:.1f} s", file=sys.stderr)
        results.extend((name, row) for row in rows)
    print(render(results))
    print(_machine_line(busy_before, time.perf_counter() - started))
    gated = [row for _, row in results if row.passed is not None]
    missed = [row.name for row in gated if not row.passed]
    summary = f"{len(gated) - len(missed)}/{len(gated)} targets met" + (
        f"; missed: {', '.join(missed)}" if missed else ""
    )
    print(summary)
    if failed:
        print(f"benchmark modules that could not run (traceback above): {', '.join(failed)}")
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
