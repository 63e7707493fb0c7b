"""The demo notebook in real JupyterLab (headless Debian Chromium): the panel renders and follows.

Starts a private JupyterLab (:mod:`tests.browser.lab`), opens the demo notebook, runs all cells,
types a bad diameter (its message must show beside the field, in the page), then a good one, and
checks that a chart path and a result value change. Then types ``7o`` (a browser number input
read it as 7): it must be refused beside the field, nothing redrawn, and every derived output
marked stale with its reason ("NOT SOLVED: no verdict"). A second test makes a check fail (a
thin diameter): the failing bars turn the failing colour, crosses mark the failures on the
utilisation and stress charts and the check table says FAIL; a fit diameter clears every mark.
Screenshots of each state go to ``test-artifacts/`` (their paths are printed into the test log).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

from tests.browser.lab import ROOT, Lab, chromium, open_and_run_all

ARTIFACTS = ROOT / "test-artifacts"
DIAMETER = ".widget-text.wb-at-shafts-0-segments-0-section-diameter input"
DIAMETER_MESSAGE = ".wb-msg-shafts-0-segments-0-section-diameter"
#: The failing colour and the passing bar colour as the page computes them
#: (workbench.panel.plotting FAIL = #a4036f, SHAFT = #3d5a80).
FAIL_RGB, SHAFT_RGB = "rgb(164, 3, 111)", "rgb(61, 90, 128)"
#: The utilisation = 1 line's colour (LIMIT = #9e2a2b), left out of the segments' colours.
LIMIT_RGB = "rgb(158, 42, 43)"
#: Page script: in a chart, the segments' line colours and how many failing-colour marks are visible.
MARKS = """(figure) => {
  const root = document.querySelector(figure);
  const visible = (node) => getComputedStyle(node).visibility !== 'hidden'
    && node.closest('[style*="display: none"]') === null
    && parseFloat(getComputedStyle(node).opacity || '1') > 0;
  const bars = [...root.querySelectorAll('path.line')].map((bar) => getComputedStyle(bar).stroke)
    .filter((colour) => colour !== 'LIMIT_COLOUR');
  const crosses = [...root.querySelectorAll('path.dot')]
    .filter((dot) => getComputedStyle(dot).fill === 'FAIL_COLOUR' && visible(dot)).length;
  return {bars, crosses};
}""".replace("FAIL_COLOUR", FAIL_RGB).replace("LIMIT_COLOUR", LIMIT_RGB)


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
        settle(page)  # the notebook's last cells redraw the panel: let their updates land
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
        settle(page)
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
        assert "NOT SOLVED: no verdict" in page.locator(".wb-summary").inner_text()
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


@pytest.mark.browser
def test_a_failing_check_is_marked_then_cleared(lab: Lab, tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    ARTIFACTS.mkdir(exist_ok=True)
    with sync_playwright() as playwright, chromium(playwright, tmp_path / "browser") as context:
        page = context.new_page()
        open_and_run_all(page, lab)  # the notebook ends on a design that passes
        entry = page.locator(DIAMETER).first
        entry.scroll_into_view_if_needed()  # the notebook draws only the cells in view
        page.wait_for_function(
            "() => document.querySelector('.wb-summary').textContent.includes('checks pass')",
            timeout=15000,
        )
        assert_unmarked(page)
        # 30 mm where the demo has 60: the shear stress goes up eightfold and checks fail.
        entry.fill("30")
        entry.press("Enter")
        page.wait_for_function(
            "() => document.querySelector('.wb-summary').textContent.includes('SOME CHECKS FAIL')",
            timeout=15000,
        )
        page.wait_for_function(
            "([f, c]) => [...document.querySelectorAll(f + ' path.line')]"
            ".some((bar) => getComputedStyle(bar).stroke === c)",
            arg=[".wb-chart-utilisation", FAIL_RGB],
            timeout=15000,
        )
        bars = page.evaluate(MARKS, ".wb-chart-utilisation")
        failing = bars["bars"].count(FAIL_RGB)
        assert failing >= 1 and bars["crosses"] == failing  # a cross on each failing bar
        assert set(bars["bars"]) <= {FAIL_RGB, SHAFT_RGB}
        page.wait_for_function(
            "([marks, f]) => eval(marks)(f).crosses > 0",
            arg=[MARKS, ".wb-chart-stress"],
            timeout=15000,
        )
        assert page.locator(".wb-checks .wb-fail").count() >= 1
        assert page.locator(".wb-stale").count() == 0  # failing is a verdict, not stale
        page.locator(".wb-chart-utilisation").scroll_into_view_if_needed()
        shot(page, "lab_check_fails.png")

        entry.fill("75 mm")
        entry.press("Enter")
        page.wait_for_function(
            "() => !document.querySelector('.wb-summary').textContent.includes('FAIL')",
            timeout=15000,
        )
        page.wait_for_function(
            "([f, c]) => ![...document.querySelectorAll(f + ' path.line')]"
            ".some((bar) => getComputedStyle(bar).stroke === c)",
            arg=[".wb-chart-utilisation", FAIL_RGB],
            timeout=15000,
        )
        assert_unmarked(page)
        page.locator(".wb-chart-utilisation").scroll_into_view_if_needed()
        shot(page, "lab_check_fixed.png")


def assert_unmarked(page: Any) -> None:
    """No check fails on the page: no failing bar, no failing cross, no FAIL in the table."""
    assert "FAIL" not in page.locator(".wb-summary").text_content()
    bars = page.evaluate(MARKS, ".wb-chart-utilisation")
    assert bars["bars"] and set(bars["bars"]) == {SHAFT_RGB}
    assert bars["crosses"] == 0
    assert page.evaluate(MARKS, ".wb-chart-stress")["crosses"] == 0
    assert page.locator(".wb-checks .wb-fail").count() == 0


def settle(page: Any, quiet_ms: int = 600) -> None:
    """Wait until the stress line has not changed for ``quiet_ms`` (the page has drawn it all).

    A chart's line is drawn with its new points, then again when its scale arrives: reading it
    between the two would take a half-drawn chart for the state the page shows.
    """
    last = None
    for _ in range(100):
        now = page.locator(".wb-chart-stress path.line").last.get_attribute("d")
        if now == last:
            return
        last = now
        page.wait_for_timeout(quiet_ms)
    raise AssertionError("the stress chart never settled")


def shot(page: object, name: str) -> None:
    """A full-page screenshot into ``test-artifacts/``, its path printed into the test log."""
    path = ARTIFACTS / name
    page.screenshot(path=str(path), full_page=True)  # type: ignore[attr-defined]
    print(f"screenshot: {path}")
