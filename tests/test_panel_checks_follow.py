"""In a kernel, the natural frequencies follow the rest of a solve, and the panel says so meanwhile.

The frequency-separation checks need an eigensolve; in an event loop the panel sends the charts
and the static checks first and runs it after. Until then nothing may show a verdict that leaves
those checks out (a case can pass every static check and fail its frequency margin), nor the last
case's modes as this one's. Expected reports are :func:`~workbench.design.checks.run_checks` with
every check run at once; expected modes are :func:`~workbench.solver.modes.natural_modes`.
"""

from __future__ import annotations

import asyncio
import json
import shutil
from pathlib import Path
from typing import Any

import ipywidgets as w
import numpy as np
import pytest

from workbench.design.checks import run_checks, with_frequency_checks
from workbench.panel import Workbench
from workbench.panel.state import FREQUENCY_DELAY
from workbench.panel.summary import UPDATING_VERDICT
from workbench.solver.io import parse_case
from workbench.solver.modes import natural_modes

DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"
DIAMETER = "shafts[0].segments[0].section.diameter"


@pytest.fixture
def demo(tmp_path: Path) -> Workbench:
    target = tmp_path / "press_drive.json"
    shutil.copy(DEMO, target)
    return Workbench.open(target, show=False)


def entry(panel: Workbench) -> w.Text:
    return next(x for x in panel.form.fields[DIAMETER] if isinstance(x, w.Text))


async def checks_follow() -> None:
    """Let the loop run the frequency checks scheduled after a solve's redraw."""
    await asyncio.sleep(FREQUENCY_DELAY * 1.5)


def in_loop(panel: Workbench, step: Any) -> Any:
    """Run ``step(panel)`` (a coroutine function) in an event loop, as a kernel would."""
    return asyncio.run(step(panel))


def test_a_partial_report_completed_is_the_report_of_every_check() -> None:
    from workbench.solver.analysis import solve

    document = json.loads(DEMO.read_text(encoding="utf-8"))
    results = solve(parse_case(document))
    full = run_checks(results)
    partial = run_checks(results, frequencies=False)
    assert full.complete and not partial.complete
    assert any(check.kind == "frequency_separation" for check in full.checks)
    assert not any(check.kind == "frequency_separation" for check in partial.checks)
    completed = with_frequency_checks(partial)
    assert completed.complete
    assert completed.checks == full.checks and completed.notes == full.notes
    np.testing.assert_allclose(completed.modes.frequency, full.modes.frequency)
    assert completed.passes == full.passes


def test_a_case_without_running_speeds_is_complete_without_the_eigensolve() -> None:
    from workbench.solver.analysis import solve

    document = json.loads(DEMO.read_text(encoding="utf-8"))
    document.pop("operating_speeds", None)
    for shaft in document["shafts"]:
        shaft.pop("operating_speeds", None)
    model = parse_case(document)
    if model.operating_speeds:
        pytest.fail("the demo case's running speeds were not where this test removes them")
    report = run_checks(solve(model), frequencies=False)
    assert report.complete and report.modes is None


def test_charts_are_sent_before_the_frequencies_and_no_verdict_shows_meanwhile(
    demo: Workbench,
) -> None:
    async def step(panel: Workbench) -> tuple[Any, ...]:
        count = panel.solve_count
        entry(panel).value = "72"
        await asyncio.sleep(0)  # the burst's solve: charts and static checks sent
        first = (
            panel.solve_count - count,
            panel.summary.value,
            panel.check_table.value,
            panel.state.checks_pending,
            np.max(panel.charts.segments.y[0]),
        )
        await checks_follow()
        return (*first, panel.summary.value, panel.check_table.value, panel.state.checks_pending)

    solves, summary, table, pending, outline, summary_after, table_after, pending_after = in_loop(
        demo, step
    )
    assert solves == 1 and pending
    assert outline == 72 / 2  # the drawing already shows the new diameter
    assert UPDATING_VERDICT in summary
    assert "all checks pass" not in summary and "SOME CHECKS FAIL" not in summary
    assert "UPDATING" in table and "wb-updating-table" in table
    assert not pending_after
    expected = run_checks(demo.state.results)  # every check at once
    verdict = "all checks pass" if expected.passes else "SOME CHECKS FAIL"
    assert verdict in summary_after and UPDATING_VERDICT not in summary_after
    assert "UPDATING" not in table_after and "wb-updating-table" not in table_after
    assert demo.report.checks == expected.checks
    assert demo.case_bundle is not None


def test_the_record_output_waits_for_every_check(demo: Workbench) -> None:
    async def step(panel: Workbench) -> tuple[bool, Any]:
        entry(panel).value = "72"
        await asyncio.sleep(0)
        return panel.state.checks_pending, panel.state._case_bundle

    pending, bundle = in_loop(demo, step)
    assert pending and bundle is None  # no verdict made for the record while checks run
    assert "72" in json.dumps(demo.case_bundle)  # reading it finishes the checks first
    assert not demo.state.checks_pending


def test_open_modes_say_they_are_updating_then_show_this_cases_modes(demo: Workbench) -> None:
    demo.open_modes()
    before = demo.modes_section.table.value

    async def step(panel: Workbench) -> tuple[Any, ...]:
        entry(panel).value = "72"
        await asyncio.sleep(0)
        marks = panel.stale_marks
        during = (
            marks.notes["Natural modes are those"].value,
            [
                "wb-stale" in marks.outputs[name]._dom_classes
                for name in ("mode shapes", "modes against speeds", "frequency table")
            ],
            panel.modes_section.table.value,
        )
        await checks_follow()
        after = (
            marks.notes["Natural modes are those"].value,
            [
                "wb-stale" in marks.outputs[name]._dom_classes
                for name in ("mode shapes", "modes against speeds", "frequency table")
            ],
            panel.modes_section.table.value,
        )
        return during, after

    (note, dimmed, table), (note_after, dimmed_after, table_after) = in_loop(demo, step)
    assert "UPDATING" in note and all(dimmed)
    assert table == before  # the last case's, dimmed and noted as such
    assert note_after == "" and not any(dimmed_after)
    expected = natural_modes(parse_case(demo.document))
    np.testing.assert_allclose(demo.modes.frequency, expected.frequency)
    assert table_after != before


def test_an_edit_before_the_frequencies_ends_in_its_own_complete_state(demo: Workbench) -> None:
    async def step(panel: Workbench) -> None:
        entry(panel).value = "72"
        await asyncio.sleep(0)  # solved, frequency checks scheduled
        entry(panel).value = "66"  # comes first: the next solve replaces the partial report
        await asyncio.sleep(0)
        assert panel.state.checks_pending
        await checks_follow()

    in_loop(demo, step)
    assert not demo.state.checks_pending and not demo.stale
    assert demo.document["shafts"][0]["segments"][0]["section"]["diameter"] == 66
    assert demo.report.checks == run_checks(demo.state.results).checks
    assert UPDATING_VERDICT not in demo.summary.value


def test_a_bad_edit_while_the_frequencies_run_leaves_no_verdict(demo: Workbench) -> None:
    async def step(panel: Workbench) -> str:
        entry(panel).value = "72"
        await asyncio.sleep(0)
        entry(panel).value = "7o"  # refused beside the field
        await checks_follow()
        return panel.summary.value

    summary = in_loop(demo, step)
    assert demo.stale and "NOT SOLVED" in summary
    assert "all checks pass" not in summary and "SOME CHECKS FAIL" not in summary
    assert "wb-stale" in demo.summary._dom_classes


def test_a_drag_holds_the_frequencies_until_it_ends(demo: Workbench) -> None:
    handles = demo.drawing_editor.handles
    torque = [part.kind for part in handles.place_parts].index("torque")

    def send(event: str, x: float) -> None:
        message = {"event": event, "origin": {"x": 0, "y": 0}, "point": {"x": x, "y": 0.0}}
        handles.places._handle_custom_msgs(None, {**message, "index": torque})

    async def step(panel: Workbench) -> tuple[Any, ...]:
        count = panel.solve_count
        for x in (300.0, 320.0, 340.0):
            send("drag", x)
            await checks_follow()  # a pause in the drag: the checks still wait
        during = (panel.solve_count - count, panel.state.checks_pending, panel.summary.value)
        send("drag_end", 340.0)
        await checks_follow()
        return (*during, panel.state.checks_pending, panel.summary.value)

    solves, pending, summary, pending_after, summary_after = in_loop(demo, step)
    assert solves == 3 and pending and UPDATING_VERDICT in summary
    assert not pending_after and UPDATING_VERDICT not in summary_after
    expected = run_checks(demo.state.results)
    assert demo.report.checks == expected.checks
    verdict = "all checks pass" if expected.passes else "SOME CHECKS FAIL"
    assert verdict in summary_after


def test_enter_in_an_entry_is_one_solve(demo: Workbench) -> None:
    # The page sends two messages per Enter: a `submit` event (keypress), then the new value
    # (the input's change); ipywidgets 8.1's Text view, as installed.
    async def step(panel: Workbench) -> int:
        count = panel.solve_count
        field = entry(panel)
        field._handle_custom_msg({"event": "submit"}, [])
        field.value = "72"
        await asyncio.sleep(0)
        await checks_follow()
        return panel.solve_count - count

    assert in_loop(demo, step) == 1
    assert demo.document["shafts"][0]["segments"][0]["section"]["diameter"] == 72
