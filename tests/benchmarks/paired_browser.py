"""The panel's browser figures of two project trees, measured in turns on one machine.

``python -m tests.benchmarks.paired_browser OTHER_TREE [--samples N]`` opens the demo notebook
of ``OTHER_TREE`` (before, e.g. a worktree of ``main``) and of this tree (after) in two JupyterLabs
and one headless Chromium, and takes the rows of :func:`tests.benchmarks.bench_panel.browser_rows`
in turns: a typed value in one page, then in the other (the page in front each time: a page
behind gets no animation frames), the same for each drag move and unit switch. A shared machine
then slows both alike; the figures of one tree alone, taken minutes apart, differed by 2× here.

Prints p95 and median (ms) of each row for both trees; not collected by ``python -m
tests.benchmarks`` (no ``run``).
"""

from __future__ import annotations

import argparse
import tempfile
from contextlib import ExitStack
from pathlib import Path
from typing import Any

import numpy as np

from tests.benchmarks import bench_panel as bench
from tests.browser.lab import ROOT, chromium, jupyter_lab, open_and_run_all

WARMUP, SWITCHES = 3, 10


def _front(page: Any) -> Any:
    page.bring_to_front()
    page.wait_for_timeout(100)
    return page


def _turns(number: int, names: tuple[str, str]) -> tuple[str, str]:
    return names if number % 2 == 0 else (names[1], names[0])


def measure(pages: dict[str, Any], samples: int) -> dict[str, dict[str, np.ndarray]]:
    """Delays (ms) of each row for each page, the pages taking turns sample by sample."""
    names = tuple(pages)
    assert len(names) == 2
    found: dict[str, dict[str, np.ndarray]] = {name: {} for name in names}
    for page in pages.values():
        page.evaluate(bench._RECORDER, "enter")
    for number in range(WARMUP + samples):
        for name in _turns(number, names):
            page = _front(pages[name])
            done = page.evaluate("() => window.__wbRecord.redraws.length")
            entry = page.locator(bench._DIAMETER).first
            entry.fill("56" if number % 2 == 0 else "64")
            entry.press("Enter")
            page.evaluate("n => window.__wbRedrawn(n)", done)
            page.wait_for_timeout(300)
    for name, page in pages.items():
        found[name]["typed"] = bench._first_and_final(page, WARMUP)[1]
    held = {}
    for name, page in pages.items():
        _front(page).locator(".wb-drawing").scroll_into_view_if_needed()
        page.evaluate(bench._RECORDER, "drag")
        box = page.locator(bench._TORQUE).first.bounding_box()
        held[name] = (box["x"] + box["width"] / 2, box["y"] + box["height"] * 0.85)
        page.mouse.move(*held[name])
        page.mouse.down()
    for number in range(WARMUP + samples):
        for name in _turns(number, names):
            page, (x, y) = _front(pages[name]), held[name]
            done = page.evaluate("() => window.__wbRecord.redraws.length")
            page.mouse.move(x + (12 if number % 2 == 0 else 24), y)
            page.evaluate("n => window.__wbRedrawn(n)", done)
            page.wait_for_timeout(300)
    for name, page in pages.items():
        page.mouse.up()
        found[name]["drag"] = bench._first_and_final(page, WARMUP)[1]
    from workbench.panel.document import UNIT_CHOICES

    switched: dict[str, list[float]] = {name: [] for name in names}
    for page in pages.values():
        page.evaluate(bench._SWITCH)
    for number in range(SWITCHES + 1):
        key, unit = ("us", "psi") if number % 2 == 0 else ("si", "MPa")
        for name in _turns(number, names):
            page = _front(pages[name])
            button = page.locator(".widget-toggle-button", has_text=UNIT_CHOICES[key]).first
            button.scroll_into_view_if_needed()
            page.evaluate(
                "([u, e]) => { window.__wbPending = window.__wbSwitched(u, e); }",
                [unit, bench._DIAMETER],
            )
            button.click()
            delay = page.evaluate("() => window.__wbPending")
            if number:  # the first switch builds the page's styles for the other units
                switched[name].append(delay)
            page.wait_for_timeout(300)
    for name in names:
        found[name]["switch"] = np.array(switched[name])
    return found


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("other", type=Path, help="the project tree measured as 'before'")
    parser.add_argument("--samples", type=int, default=30)
    arguments = parser.parse_args()
    from playwright.sync_api import sync_playwright

    trees = {"before": arguments.other.resolve(), "after": ROOT}
    with tempfile.TemporaryDirectory() as scratch, ExitStack() as stack:
        folder = Path(scratch)
        pages = {}
        labs = {}
        for name, root in trees.items():
            (folder / name).mkdir()
            files = (root / "notebooks" / "demo.ipynb", root / "notebooks" / "press_drive.json")
            labs[name] = stack.enter_context(jupyter_lab(folder / name, files, root))
        playwright = stack.enter_context(sync_playwright())
        context = stack.enter_context(chromium(playwright, folder / "browser"))
        for name, lab in labs.items():
            pages[name] = context.new_page()
            open_and_run_all(pages[name], lab)
        found = measure(pages, arguments.samples)
    for row in ("typed", "drag", "switch"):
        for name, root in trees.items():
            delays = found[name][row]
            print(
                f"{row:6s} {name:6s} p95 {np.percentile(delays, 95.0):6.1f} ms, median "
                f"{np.median(delays):6.1f} ms over {len(delays)} ({root})"
            )


if __name__ == "__main__":
    main()
