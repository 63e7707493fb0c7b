"""The record opened in headless Chromium with every outside request refused.

Checks: the page makes no request but for itself, the equations and drawings (inline SVG images)
render at a readable size, an SVG cell output carrying a script is shown as a picture and its
script never runs, and no script from a title or a markdown cell runs (no dialog opens).
Needs /usr/bin/chromium and playwright (never ``playwright install``).
"""

from __future__ import annotations

import copy
from pathlib import Path

import nbformat
import pytest

from tests.browser.lab import CHROMIUM, FLAGS
from workbench.record.demo import DEMO_TITLE_BLOCK, FEED_DRIVE_CASE, demo_notebook
from workbench.record.exporter import export_file
from workbench.signing import write_key_pair

pytestmark = pytest.mark.browser

ALERT = "<script>alert(1)</script>"
ARTIFACTS = Path(__file__).resolve().parents[2] / "test-artifacts"


def test_record_renders_offline_and_runs_no_script(tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    block = copy.deepcopy(DEMO_TITLE_BLOCK)
    block["subject"] += f" {ALERT}"
    block["project"] += f" {ALERT}"
    notebook = tmp_path / "line.ipynb"
    nb = demo_notebook(
        title_block=block, note=f"Note {ALERT} <img src=x onerror=alert(2)>", executed=True
    )
    drawing = nbformat.v4.new_code_cell("draw()")
    drawing.outputs = [
        nbformat.v4.new_output(
            "display_data",
            data={
                "image/svg+xml": (
                    '<svg xmlns="http://www.w3.org/2000/svg" width="160" height="80" '
                    'onload="alert(3)"><script>alert(4)</script>'
                    '<rect width="160" height="80" fill="#2a6f2a"/></svg>'
                ),
                "text/plain": "drawing",
            },
        )
    ]
    nb.cells.append(drawing)
    nbformat.write(nb, str(notebook))
    private, _ = write_key_pair(tmp_path / "keys")
    text, _ = export_file(notebook, key_file=private)
    record = tmp_path / "record.html"
    record.write_text(text, encoding="utf-8", newline="")

    refused: list[str] = []
    dialogs: list[str] = []
    with sync_playwright() as p:
        context = p.chromium.launch_persistent_context(
            str(tmp_path / "profile"),
            executable_path=CHROMIUM,
            headless=True,
            args=FLAGS,
        )
        try:

            def route(request_route) -> None:  # type: ignore[no-untyped-def]
                url = request_route.request.url
                if url.startswith(("file:", "data:")):
                    request_route.continue_()
                else:
                    refused.append(url)
                    request_route.abort()

            context.route("**/*", route)
            page = context.new_page()
            page.on("dialog", lambda dialog: (dialogs.append(dialog.message), dialog.dismiss()))
            page.goto(record.as_uri())
            page.wait_for_load_state("load")
            output = page.eval_on_selector_all(
                ".jp-RenderedSVG img",
                "els => els.map(e => [e.complete, e.naturalWidth, e.naturalHeight,"
                " e.src.startsWith('data:image/svg+xml;base64,')])",
            )
            column = page.eval_on_selector("main#record-body", "e => e.clientWidth")
            sizes = page.eval_on_selector_all(
                "img.equation, img.figure",
                "els => els.map(e => [e.className, e.complete, e.naturalWidth, e.naturalHeight,"
                " e.getBoundingClientRect().width])",
            )
            title = page.title()
            heading = page.inner_text("h1")
            ARTIFACTS.mkdir(exist_ok=True)
            page.screenshot(path=str(ARTIFACTS / "record.png"), full_page=True)
            page.emulate_media(media="print")
            page.screenshot(path=str(ARTIFACTS / "record-print.png"))
        finally:
            context.close()
    assert refused == []
    assert dialogs == []
    equations = [s for s in sizes if "equation" in s[0]]
    charts = [s for s in sizes if "diagram" in s[0]]
    assert len(equations) >= 6 and len(charts) == 3
    for _, complete, natural_width, natural_height, shown_width in sizes:
        assert complete and natural_width > 0 and natural_height > 0 and shown_width > 0
    # Readable: drawings span the text column; equations show at their natural size.
    for klass, _, natural_width, _, shown_width in sizes:
        if "figure" in klass:
            assert shown_width >= 0.95 * min(column, natural_width)
        else:
            assert shown_width >= natural_width - 1  # the width attribute is rounded to a pixel
    assert output == [[True, 160, 80, True]]  # the SVG output is shown; its script did not run
    assert ALERT in title and ALERT in heading  # shown as text, not run


def test_vibration_and_fatigue_drawings_render_offline(tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    notebook = tmp_path / "feed.ipynb"
    nbformat.write(demo_notebook(FEED_DRIVE_CASE, executed=True), str(notebook))
    private, _ = write_key_pair(tmp_path / "keys")
    text, _ = export_file(notebook, key_file=private, execute=False)
    record = tmp_path / "feed.html"
    record.write_text(text, encoding="utf-8", newline="")
    refused: list[str] = []
    with sync_playwright() as p:
        context = p.chromium.launch_persistent_context(
            str(tmp_path / "profile"),
            executable_path=CHROMIUM,
            headless=True,
            args=FLAGS,
        )
        try:

            def route(request_route) -> None:
                url = request_route.request.url
                if url.startswith(("file:", "data:")):
                    request_route.continue_()
                else:
                    refused.append(url)
                    request_route.abort()

            context.route("**/*", route)
            page = context.new_page()
            page.goto(record.as_uri())
            page.wait_for_load_state("load")
            column = page.eval_on_selector("main#record-body", "e => e.clientWidth")
            sizes = page.eval_on_selector_all(
                "#vibration img, #fatigue img",
                "els => els.map(e => [e.className, e.complete, e.naturalWidth, e.naturalHeight,"
                " e.getBoundingClientRect().width])",
            )
            ARTIFACTS.mkdir(exist_ok=True)
            page.locator("#vibration").screenshot(path=str(ARTIFACTS / "record-vibration.png"))
            page.locator("#fatigue").screenshot(path=str(ARTIFACTS / "record-fatigue.png"))
        finally:
            context.close()
    assert refused == []
    kinds = [s[0] for s in sizes]
    assert kinds.count("figure mode-shape") == 4 and kinds.count("figure fatigue-diagram") == 3
    assert kinds.count("equation") == 3 + 5
    for klass, complete, natural_width, natural_height, shown_width in sizes:
        assert complete and natural_width > 0 and natural_height > 0
        if "figure" in klass:
            assert shown_width >= 0.95 * min(column, natural_width)
        else:
            assert shown_width >= natural_width - 1
