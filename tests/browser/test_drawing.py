"""The drawing as the editor in real JupyterLab (headless Debian Chromium), by mouse and by keys.

Opens the demo notebook (:mod:`tests.browser.lab`), then: clicks segment 1 on the drawing and
types its new outer diameter into the inspector (the stress chart must redraw); drags the point
torque's ring along the shaft (its position in the inspector must follow); and, with key events
only, picks a support by typing its name into the parts finder, tabs to its position and types a
new one. Screenshots
of each state go to ``test-artifacts/`` (their paths are printed into the test log).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.browser.lab import Lab, chromium, open_and_run_all
from tests.browser.test_lab import ARTIFACTS, shot

_STRESS = ".wb-chart-stress path.line"
_CHANGED = (
    "([selector, old]) => { const paths = document.querySelectorAll(selector);"
    " return paths.length && paths[paths.length - 1].getAttribute('d') !== old; }"
)


def _point(page: object, name: str) -> object:
    """The point of a drawing's mark named ``name`` (its text beside it, shown or not)."""
    return page.locator(  # type: ignore[attr-defined]
        f'.wb-chart-elevation g.object_grp:has(text.dot_text:text-is("{name}")) path.dot'
    ).first


def _inspector_input(page: object, path: str) -> object:
    return page.locator(f".wb-inspector .widget-text.wb-at-{path} input").first  # type: ignore[attr-defined]


@pytest.mark.browser
def test_drawing_is_the_editor_in_lab(lab: Lab, tmp_path: Path) -> None:
    from playwright.sync_api import sync_playwright

    ARTIFACTS.mkdir(exist_ok=True)
    with sync_playwright() as playwright, chromium(playwright, tmp_path / "browser") as context:
        page = context.new_page()
        open_and_run_all(page, lab)
        page.locator(".wb-drawing").scroll_into_view_if_needed()
        inspector = page.locator(".wb-inspector")

        # Pick segment 1 on the drawing; type its outer diameter in the inspector.
        _point(page, "1").dispatch_event("click")  # the centre line runs through its middle
        page.wait_for_function(
            "() => document.querySelector('.wb-inspector').innerText.includes('segment 1')",
            timeout=15000,
        )
        before = page.locator(_STRESS).last.get_attribute("d")
        outer = _inspector_input(page, "shafts-0-segments-1-section-outer_diameter")
        assert outer.input_value() == "70"
        outer.fill("76 mm")
        outer.press("Enter")
        page.wait_for_function(_CHANGED, arg=[_STRESS, before], timeout=15000)
        assert outer.input_value() == "76"
        assert "Solved" in page.locator(".wb-panel").first.inner_text()
        shot(page, "lab_drawing_segment_picked.png")

        # Drag the point torque's ring along the shaft: its x in the inspector follows.
        ring = _point(page, "load case 'jam' · torque 0")
        box = ring.bounding_box()
        assert box is not None
        # Grabbed beside the torque's own marker, which it rings.
        x, y = box["x"] + box["width"] / 2, box["y"] + box["height"] * 0.85
        before = page.locator(_STRESS).last.get_attribute("d")
        page.mouse.move(x, y)
        page.mouse.down()
        for step in range(1, 9):
            page.mouse.move(x + 15 * step, y, steps=2)
        page.mouse.up()
        page.wait_for_function(
            "() => document.querySelector('.wb-inspector').innerText.includes('torque')",
            timeout=15000,
        )
        where = _inspector_input(page, "load_cases-1-torques-0-x")
        page.wait_for_function("e => e.value !== '250'", arg=where.element_handle(), timeout=15000)
        moved = float(where.input_value().replace(",", ""))
        assert 250 < moved <= 900
        page.wait_for_function(_CHANGED, arg=[_STRESS, before], timeout=15000)
        shot(page, "lab_drawing_torque_dragged.png")

        # Keys only: the parts list picks support 1, Tab reaches its fields, a value is typed.
        # (JupyterLab's notebook takes arrow keys from a list: the finder is an entry.)
        finder = page.locator(".wb-part-finder input")
        finder.focus()
        page.keyboard.press("Control+A")
        page.keyboard.type("support 1")
        page.keyboard.press("Enter")
        page.wait_for_function(
            "() => document.querySelector('.wb-inspector').innerText.includes('support 1')",
            timeout=15000,
        )
        position = _inspector_input(page, "supports-1-x")
        for _ in range(6):
            page.keyboard.press("Tab")
            if position.evaluate("e => e === document.activeElement"):
                break
        assert position.evaluate("e => e === document.activeElement")
        page.keyboard.press("Control+A")
        page.keyboard.type("850")
        page.keyboard.press("Enter")
        page.wait_for_function(
            "() => document.querySelector('.wb-summary') &&"
            " !document.querySelector('.wb-summary.wb-stale')",
            timeout=15000,
        )
        assert position.input_value() == "850"
        assert (
            inspector.locator(".wb-msg").all_inner_texts()
            == [""] * inspector.locator(".wb-msg").count()
        )
        shot(page, "lab_drawing_keys_only.png")
