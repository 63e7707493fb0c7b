"""Benchmark of ``workbench compare``: two signed revisions of the demo, one diameter changed.

The figure is one whole comparison, warm: both records verified (signature, digests, re-solve),
both cases recomputed, every input and result compared.
"""

from __future__ import annotations

import copy
import json
import tempfile
from pathlib import Path

from tests.benchmarks.common import Row, time_calls

#: Target (from the issue).
COMPARE_TARGET_S = 2.0


def run() -> list[Row]:
    """Time :func:`workbench.record.compare.compare_records` on two revisions of the demo."""
    import nbformat

    from workbench.cli.solve import DEMO_CASE
    from workbench.record.compare import compare_records
    from workbench.record.demo import demo_notebook
    from workbench.record.exporter import export_file
    from workbench.signing import write_key_pair

    case = json.loads(DEMO_CASE.read_text("utf-8"))
    revised = copy.deepcopy(case)
    revised["shafts"][0]["segments"][0]["section"]["diameter"] = 65
    with tempfile.TemporaryDirectory() as folder:
        base = Path(folder)
        private, _ = write_key_pair(base / "keys")
        records = []
        for name, revision in (("a", case), ("b", revised)):
            notebook = base / f"{name}.ipynb"
            nbformat.write(demo_notebook(revision, executed=True), str(notebook))
            text, _ = export_file(notebook, key_file=private, execute=False)
            path = base / f"{name}.html"
            path.write_text(text, encoding="utf-8", newline="")
            records.append(path)
        timing = time_calls(lambda: compare_records(*records), repeats=7, warmup=1)
        changes = len(compare_records(*records).changes)
    return [
        Row(
            "compare two signed revisions (verify both, recompute, diff), median",
            timing.median,
            "s",
            COMPARE_TARGET_S,
            notes=(f"compare: {changes} changes listed (one diameter of the demo changed)",),
        )
    ]
