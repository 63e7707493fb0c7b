"""Benchmarks of the calculation record: export against plain nbconvert, verify, size.

Both exports go through the Python API on the same already executed notebook (the bundled
demo case, displayed as the panel does), warm (imports and caches loaded), taking turns so that
the ratio compares like with like. The record's export
includes the solve, the checks, the hand check, the drawings and the signature.
"""

from __future__ import annotations

import json
import time

from tests.benchmarks.common import Row, time_calls, time_pair

#: Targets (from the issue).
EXPORT_RATIO_TARGET = 1.5
VERIFY_TARGET_S = 1.0
SIZE_TARGET_MB = 3.0


def run() -> list[Row]:
    """Time export (record vs plain HTML), verify, and measure the record's size."""
    from nbconvert.exporters import HTMLExporter

    from workbench.cli.solve import DEMO_CASE
    from workbench.record.demo import demo_notebook
    from workbench.record.exporter import RecordExporter
    from workbench.record.verify import verify_text
    from workbench.signing import generate_key

    case = json.loads(DEMO_CASE.read_text("utf-8"))
    nb = demo_notebook(case, executed=True)
    key = generate_key()
    exporter = RecordExporter(execute=False)
    plain = HTMLExporter()

    def record_export() -> str:
        from workbench.record.document import compute, render_record
        from workbench.record.notebook import find_case, title_block_from
        from workbench.record.sanitize import sanitize_notebook_html

        found, source = find_case(nb, None)
        cells, resources = HTMLExporter.from_notebook_node(exporter, nb)
        return render_record(
            compute(found),
            title_block_from(nb),
            sanitize_notebook_html(cells),
            private_key=key,
            case_source=source,
            extra_css=exporter._lab_css() + "\n".join(resources["inlining"]["css"]),
        )

    record_time, plain_time = time_pair(
        record_export, lambda: plain.from_notebook_node(nb), repeats=21, warmup=2
    )
    text = record_export()
    data = text.encode("utf-8")
    verify_time = time_calls(lambda: verify_text(data, None), repeats=7, warmup=1)
    start = time.perf_counter()
    ok = verify_text(data, None).ok
    elapsed = time.perf_counter() - start
    ratio = record_time.median / plain_time.median
    from workbench.record.countersign import countersign_text

    checked = countersign_text(data, generate_key(), role="checked", name="Checker").encode()
    approved = countersign_text(checked, generate_key(), role="approved", name="Approver")
    chained = approved.encode("utf-8")
    chained_time, single_time = time_pair(
        lambda: verify_text(chained, None), lambda: verify_text(data, None), repeats=7, warmup=1
    )
    return [
        Row(
            "record export (signed, demo case), median",
            record_time.median * 1e3,
            "ms",
            notes=("record: solve + checks + hand check + SVG drawings + sanitize + sign",),
        ),
        Row("plain nbconvert HTML export, median", plain_time.median * 1e3, "ms"),
        Row("record export / plain HTML export", ratio, "×", EXPORT_RATIO_TARGET),
        Row(
            "verify (signature, digests, re-solve)",
            verify_time.median,
            "s",
            VERIFY_TARGET_S,
            notes=(f"verified: {ok}, one cold-ish run {elapsed:.3f} s",),
        ),
        Row(
            "verify, checked and approved (two countersignatures)",
            chained_time.median,
            "s",
            VERIFY_TARGET_S,
            notes=(f"{chained_time.median / single_time.median:.2f}× the same record unchained",),
        ),
        Row("record size", len(data) / 1e6, "MB", SIZE_TARGET_MB),
        *_print_rows(text),
    ]


def _print_rows(text: str) -> list[Row]:
    """The record printed to PDF by headless Chromium (the package's record.pdf): time, pages."""
    import pypdfium2 as pdfium

    from workbench.record.pdf import print_pdf, printing_browser

    rows = []
    with printing_browser() as browser:
        for paper in ("A4", "Letter"):
            start = time.perf_counter()
            pdf = print_pdf(text, paper, browser)
            elapsed = time.perf_counter() - start
            pages = len(pdfium.PdfDocument(pdf))
            rows.append(
                Row(
                    f"record printed to PDF ({paper}, warm browser)",
                    elapsed,
                    "s",
                    notes=(f"{pages} pages, {len(pdf) / 1e6:.2f} MB",),
                )
            )
    return rows
