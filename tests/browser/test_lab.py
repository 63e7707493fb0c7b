"""The demo notebook in real JupyterLab (headless Debian Chromium): the panel renders and follows.

Starts a private JupyterLab (:mod:`tests.browser.lab`), opens the demo notebook, runs all cells,
types a bad diameter (its message must show beside the field, in the page), then a good one, and
checks that a chart path and a result value change. Then types ``7o`` (a browser number input
read it as 7): it must be refused beside the field, nothing redrawn, and every derived output
marked stale with its reason. Screenshots of each state go to ``test-artifacts/``.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pytest

from tests.browser.lab import ROOT, Lab, chromium, jupyter_lab, open_and_run_all

ARTIFACTS = ROOT / "test-artifacts"
DIAMETER = ".widget-text.wb-at-shafts-0-segments-0-section-diameter input"
DIAMETER_MESSAGE = ".wb-msg-shafts-0-segments-0-section-diameter"


@pytest.fixture
def lab(tmp_path: Path) -> Iterator[Lab]:
    scratch = tmp_path / "lab"
    scratch.mkdir()
    with jupyter_lab(scratch) as running:
        yield running


@pytest.mark.browser
def test_demo_notebook_in_lab(lab: Lab, tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    ARTIFACTS.mkdir(exist_ok=True)
    with sync_playwright() as playwright, chromium(playwright, tmp_path / "browser") as context:
        page = context.new_page()
        open_and_run_all(page, lab)
        figures = page.locator(".wb-charts .bqplot.figure")
        assert figures.count() >= 5
        stress_path = page.locator(".wb-chart-stress path.line").last
        value = page.locator(".wb-summary td.wb-value").nth(1)
        page.locator(DIAMETER).first.scroll_into_view_if_needed()
        settled(page, stress_path)  # a loaded machine may still be laying the page out
        before_d, before_value = stress_path.get_attribute("d"), value.inner_text()
        entry = page.locator(DIAMETER).first  # the segment's entry and the drag line's
        # A bad value: the message shows beside the field, the charts keep the last good case.
        entry.fill("-5")
        entry.press("Enter")
        message = page.locator(DIAMETER_MESSAGE).first
        page.wait_for_function(
            "s => (document.querySelector(s) || {}).innerText?.includes('greater than zero')",
            arg=DIAMETER_MESSAGE,
            timeout=15000,
        )
        assert "-5 mm" in message.inner_text()
        assert page.locator(".wb-charts.wb-stale").count() == 1
        assert stress_path.get_attribute("d") == before_d
        entry.fill("80")
        entry.press("Enter")
        page.wait_for_function(
            "([selector, old]) => { const paths = document.querySelectorAll(selector);"
            " return paths.length && paths[paths.length - 1].getAttribute('d') !== old; }",
            arg=[".wb-chart-stress path.line", before_d],
            timeout=15000,
        )
        assert stress_path.get_attribute("d") != before_d
        page.wait_for_function(
            "([old]) => document.querySelectorAll('.wb-summary td.wb-value')[1].innerText !== old",
            arg=[before_value],
            timeout=15000,
        )
        assert value.inner_text() != before_value
        assert message.inner_text() == ""
        assert page.locator(".wb-charts.wb-stale").count() == 0
        shot(page, "lab_panel.png")

        # Typed text that is no length: refused beside the field, nothing solved, all stale.
        after_d = stress_path.get_attribute("d")
        entry.fill("7o")
        entry.press("Enter")
        page.wait_for_function(
            "s => (document.querySelector(s) || {}).innerText?.includes('unknown unit')",
            arg=DIAMETER_MESSAGE,
            timeout=15000,
        )
        assert "'7o'" in message.inner_text()
        assert entry.input_value() == "7o"
        page.wait_for_selector(".wb-summary.wb-stale", timeout=15000)
        assert "NOT SOLVED" in page.locator(".wb-summary").inner_text()
        assert "STALE" in page.locator(".wb-checks").inner_text()
        assert page.locator(".wb-charts .bqplot.figure.wb-stale").count() >= 5
        note = page.locator(".wb-charts .wb-stale-note").first
        assert "'7o'" in note.inner_text() and "segments[0].section.diameter" in note.inner_text()
        opacity = page.locator(".wb-chart-stress").evaluate("e => getComputedStyle(e).opacity")
        assert float(opacity) < 0.5
        assert stress_path.get_attribute("d") == after_d  # the last valid case stays up
        shot(page, "lab_panel_refused_7o.png")
        entry.fill("75 mm")
        entry.press("Enter")
        page.wait_for_function(
            "() => !document.querySelector('.wb-summary.wb-stale')", timeout=15000
        )
        assert message.inner_text() == "" and entry.input_value() == "75"
        assert page.locator(".wb-stale").count() == 0


def settled(page: object, path: object, quiet_ms: int = 700, tries: int = 20) -> None:
    """Wait until a chart path's ``d`` stays the same for ``quiet_ms`` (the page is drawn)."""
    last = path.get_attribute("d")  # type: ignore[attr-defined]
    for _ in range(tries):
        page.wait_for_timeout(quiet_ms)  # type: ignore[attr-defined]
        now = path.get_attribute("d")  # type: ignore[attr-defined]
        if now == last:
            return
        last = now


def shot(page: object, name: str) -> None:
    """A full-page screenshot into ``test-artifacts/``, its path printed into the test log."""
    path = ARTIFACTS / name
    page.screenshot(path=str(path), full_page=True)  # type: ignore[attr-defined]
    print(f"screenshot: {path}")
