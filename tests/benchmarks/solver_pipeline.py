"""The whole pipeline from the decoded case file to its results, against a bare solve_banded.

Target (issue #10): at 10⁵ and 10⁶ segments, :func:`~workbench.solver.analysis.solve_case` of
the decoded case ≤ 5× a bare numpy build + ``scipy.linalg.solve_banded`` of the same system;
10⁶ segments ≤ 2 s.

Where the pipeline starts: the case as the loader hands it (:func:`~workbench.case.load.decode_case_file`):
its declared structs, and the columns of its segments' keys the loader took while checking
each segment's alternatives (:mod:`workbench.case.segment_keys`), in the file's units. From
there the pipeline converts and checks the columns, reads what the loader did not take, meshes,
solves and recovers. Decoding (taking the columns included, and also timed apart) and validating
the bytes come before it and are reported apart; so are the same pipeline with nothing kept
(the columns read from the structs, as after an edit) and the bytes-to-results total.
"""

from __future__ import annotations

import gc
import time

import msgspec

from tests.benchmarks.bare_solver import agreement, bare_solve, plain_system
from tests.benchmarks.common import Row, demo_case_text, resource_use, time_calls, time_pair
from workbench.solver import analysis, statics

MS = 1e3


def pipeline_versus_bare() -> list[Row]:
    """The decoded case file → Results, against a bare numpy build + solve_banded."""
    from workbench.case.load import check_case_bytes, decode_case_file
    from workbench.case.segment_keys import take_segment_keys
    from workbench.solver.case_columns import case_system

    rows = []
    for segments, repeats, label in ((100_000, 21, "100k"), (1_000_000, 11, "1M")):
        data = demo_case_text(segments, distributed=False)
        decoding = time_calls(lambda data=data: decode_case_file(data), repeats=3)
        case = decode_case_file(data)
        taking = time_calls(lambda case=case: take_segment_keys(case), repeats=3)
        validating = time_calls(
            lambda data=data, case=case: check_case_bytes(data, case), repeats=3
        )
        start = time.perf_counter()
        check_case_bytes(data, case)
        total = time.perf_counter() - start + decoding.median
        del data
        gc.collect()
        start = time.perf_counter()
        analysis.solve_case(case)
        cold = time.perf_counter() - start
        total += time_calls(lambda case=case: analysis.solve_case(case), repeats=3).median
        tabling = time_calls(lambda case=case: case_system(case), repeats=7)
        unkept = msgspec.structs.replace(case)  # the same structs, no columns kept
        tabling_unkept = time_calls(lambda case=unkept: case_system(case), repeats=5)
        table = case_system(case).table
        solving = time_calls(lambda table=table: statics.solve_table(table), repeats=7)
        plain = plain_system(table)
        ours, bare = time_pair(
            lambda case=case: analysis.solve_case(case),
            lambda plain=plain: bare_solve(plain),
            repeats=repeats,
        )
        unkept_ours, unkept_bare = time_pair(
            lambda case=unkept: analysis.solve_case(case),
            lambda plain=plain: bare_solve(plain),
            repeats=max(5, repeats // 2),
        )
        ratio = ours.median / bare.median
        per = 1e9 / segments
        notes = (
            "our side: solve_case(case) on the case as decode_case_file hands it (its structs "
            "and the columns of its segments' keys, file units, taken while the loader checked "
            "the alternatives) → Results: columns to SI and checked on the whole, meshing, "
            "element constants, banded LAPACK, T/θ/τ at every station, reactions; median "
            f"{ours.median * MS:.0f} ms (CPU time {ours.cpu_median * MS:.0f} ms)",
            f"its parts, timed apart (medians): table {tabling.median * MS:.0f} ms "
            f"({tabling.median * per:.0f} ns/segment), solve of the table "
            f"{solving.median * MS:.0f} ms ({solving.median * per:.0f} ns/segment)",
            f"before it, reported apart: decode {decoding.median * MS:.0f} ms "
            f"({decoding.median * per:.0f} ns/segment), of which taking the columns "
            f"{taking.median * MS:.0f} ms ({taking.median * per:.0f} ns/segment); validation "
            f"{validating.median * MS:.0f} ms ({validating.median * per:.0f} ns/segment); bytes "
            f"→ results in all about {total * MS:.0f} ms",
            f"with nothing kept (the columns read from the structs, as after an edit): table "
            f"{tabling_unkept.median * MS:.0f} ms, pipeline {unkept_ours.median * MS:.0f} ms, "
            f"{unkept_ours.median / unkept_bare.median:.1f}× bare (CPU time "
            f"{unkept_ours.cpu_median / unkept_bare.cpu_median:.1f}×)",
            f"bare side: G·J/L from the same columns, the tridiagonal band without the fixed "
            f"ends, loads, scipy.linalg.solve_banded, median {bare.median * MS:.1f} ms (CPU time "
            f"{bare.cpu_median * MS:.1f} ms); ratio of CPU-time medians "
            f"{ours.cpu_median / bare.cpu_median:.1f}×",
            f"the two sides took turns, {len(ours.times)} calls each; best {ours.best * MS:.0f} "
            f"against {bare.best * MS:.1f} ms ({ours.best / bare.best:.1f}×); first call "
            f"{cold * MS:.0f} ms",
            agreement(None, bare_solve(plain), analysis.solve_case(case)),
            f"per call, ours: {resource_use(lambda case=case: analysis.solve_case(case))}; bare: "
            f"{resource_use(lambda plain=plain: bare_solve(plain))}",
        )
        rows.append(
            Row(
                f"{label} segments: case file → results / bare solve_banded",
                ratio,
                "×",
                5.0,
                notes=notes,
            )
        )
        rows.append(Row(f"{label} segments: table from the case file", tabling.median * MS, "ms"))
        rows.append(
            Row(
                f"{label} segments: table, nothing kept",
                tabling_unkept.median * MS,
                "ms",
                notes=("the same case with no columns kept: every key read from the structs",),
            )
        )
        rows.append(Row(f"{label} segments: solve of the table", solving.median * MS, "ms"))
        if segments == 1_000_000:
            rows.append(
                Row("1M segments: case file → results median", ours.median * MS, "ms", 2000.0)
            )
        del case, unkept, table
        gc.collect()
    return rows


__all__ = ["pipeline_versus_bare"]
