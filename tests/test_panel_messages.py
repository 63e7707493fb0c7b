"""What an edit sends to the page: nothing unchanged, and each chart's scales set once.

The page redraws on every widget message; a message whose values did not change is a redraw for
nothing, and a scale that follows its marks' data changes its domain once per mark update (each
change redraws every mark and axis on it). These tests record the messages the widgets send
(a recording comm in place of the kernel's) while the demo case is edited.

Expected extents are numpy's ``nanmin``/``nanmax`` of the data the marks hold; a scale holds
them, rounded out to a step of the 1-2-5 series (common practice, no source).
"""

from __future__ import annotations

import asyncio
import shutil
from collections import Counter
from pathlib import Path
from typing import Any

import comm
import ipywidgets as w
import numpy as np
import pytest
from comm import DummyComm

from workbench.panel import Workbench
from workbench.panel.charts import READOUT_DELAY
from workbench.panel.document import get_at
from workbench.panel.plotting import nice_limits

DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"
DIAMETER = "shafts[0].segments[0].section.diameter"


#: The update messages widgets sent: (comm id, the state keys sent).
SENT: list[tuple[str, tuple[str, ...]]] = []


class RecordingComm(DummyComm):
    """A comm that keeps every update message a widget sends in :data:`SENT`."""

    def publish_msg(self, msg_type: str, data: Any = None, *args: Any, **kwargs: Any) -> None:
        if msg_type == "comm_msg" and data and data.get("method") == "update":
            SENT.append((self.comm_id, tuple(sorted(data["state"]))))


@pytest.fixture
def demo(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Workbench:
    monkeypatch.setattr(comm, "create_comm", RecordingComm)
    target = tmp_path / "press_drive.json"
    shutil.copy(DEMO, target)
    return Workbench.open(target, show=False)


def sent_by(panel: Workbench) -> Counter[str]:
    """The kinds of chart widgets that sent since the last clear (``Lines``, ``LinearScale``)."""
    kinds = {x.model_id: type(x).__name__ for x in chart_widgets(panel)}
    return Counter(kinds[key] for key, _ in SENT if key in kinds)


def chart_widgets(panel: Workbench) -> list[Any]:
    found = []
    for figure in panel.charts.figures:
        found += [figure, *figure.marks, *figure.axes]
        for mark in figure.marks:
            found += list(mark.scales.values())
    return found


def test_an_edit_that_changes_no_result_sends_no_chart_message(demo: Workbench) -> None:
    demo.enter(DIAMETER, "56")
    SENT.clear()
    demo.enter(DIAMETER, "56 mm")  # the same diameter written another way: solved again
    assert demo.document["shafts"][0]["segments"][0]["section"]["diameter"] == 56
    assert sent_by(demo) == Counter()  # a peak-stress line with gaps (NaN) was sent each time


def _drawn_extent(marks: list[Any], axis: str = "y") -> tuple[float, float]:
    drawn = [m for m in marks if m.visible and len(getattr(m, axis))]
    values = np.concatenate([np.asarray(getattr(m, axis), dtype=float).ravel() for m in drawn])
    return float(np.nanmin(values)), float(np.nanmax(values))


def _holds(scale: Any, low: float, high: float) -> None:
    """The scale holds low..high, and the data span at least 4/9 of it.

    Rounded out to a step of the 1-2-5 series (a step under a quarter of the span, so under
    1.5 times the span), and kept while within 1.5 times that: under 2.25 times the span.
    """
    assert scale.min <= low and high <= scale.max
    assert scale.max - scale.min <= 2.25 * (high - low)


def test_each_scale_is_set_once_per_edit_and_holds_what_is_drawn(demo: Workbench) -> None:
    demo.enter(DIAMETER, "56")
    SENT.clear()
    demo.enter(DIAMETER, "64")
    per_widget = Counter(key for key, _ in SENT)
    for widget in chart_widgets(demo):
        assert per_widget[widget.model_id] <= 1  # each widget's changes in one message
    for chart in (demo.charts.torque, demo.charts.angle, demo.charts.stress):
        _holds(chart.y_scale, *_drawn_extent(chart.figure.marks))
        # x is the drawing's scale (the shaft with a margin), shared by every chart along it
        low, high = _drawn_extent(chart.figure.marks, "x")
        assert chart.x_scale is demo.charts.drawing.x_scale
        assert chart.x_scale.min <= low and chart.x_scale.max >= high
    bars = demo.charts.bars
    assert demo.charts.bar_y.min == 0.0
    _holds(demo.charts.bar_y, 0.0, max(1.0, float(np.max(bars.y))))


def test_a_small_edit_moves_no_scale(demo: Workbench) -> None:
    """Limits rounded out to the 1-2-5 series stay while the data stays well inside them.

    Each scale change redraws every mark and axis on it in the page; a diameter nudged by
    half a millimetre changes no chart's range.
    """
    demo.enter(DIAMETER, "64")
    SENT.clear()
    demo.enter(DIAMETER, "63.5")
    assert sent_by(demo)["LinearScale"] == 0
    assert sent_by(demo)["Lines"] > 0  # the curves did move
    for chart in (demo.charts.torque, demo.charts.angle, demo.charts.stress):
        _holds(chart.y_scale, *_drawn_extent(chart.figure.marks))


@pytest.mark.parametrize(
    ("low", "high", "limits"),
    [
        (0.0, 52.0, (0.0, 60.0)),  # step 10 (52/8 = 6.5 → 10)
        (0.0, 1.38, (0.0, 1.4)),  # step 0.2, written 1.4 (not 1.4000000000000001)
        (-274.8, 1012.0, (-400.0, 1200.0)),  # step 200
        (3.0, 3.0, (2.0, 4.0)),  # flat: a unit each way
        (0.1, 0.3, (0.1, 0.3)),  # step 0.025: on it already
    ],
)
def test_nice_limits_round_out_to_the_one_two_five_series(
    low: float, high: float, limits: tuple[float, float]
) -> None:
    """Common practice for axis limits (a tick step of 1, 2, 2.5 or 5 × 10ⁿ), no source."""
    assert nice_limits(low, high) == limits


def test_nice_limits_keep_the_scale_only_while_it_fits() -> None:
    assert nice_limits(0.0, 48.0, (0.0, 60.0)) == (0.0, 60.0)  # held, 60 ≤ 1.5 × 50
    assert nice_limits(0.0, 30.0, (0.0, 60.0)) == (0.0, 30.0)  # too roomy: shrunk
    assert nice_limits(0.0, 61.0, (0.0, 60.0)) == (0.0, 70.0)  # outside: widened
    assert nice_limits(-1.0, 40.0, (0.0, 60.0)) == (-10.0, 40.0)  # below: widened
    assert nice_limits(-1e308, 1e308) == (-1e308, 1e308)  # beyond numbers: as given


def test_a_hidden_baseline_does_not_stretch_the_scale(demo: Workbench) -> None:
    demo.pin_baseline()
    demo.enter(DIAMETER, "30")  # the baseline's stress is far below this one's
    demo.clear_baseline()
    stress = demo.charts.stress
    assert not stress.baseline.visible
    _holds(stress.y_scale, *_drawn_extent(stress.figure.marks))


def test_the_invisible_readouts_are_sent_after_everything_seen(demo: Workbench) -> None:
    demo.enter(DIAMETER, "56")
    SENT.clear()
    demo.enter(DIAMETER, "64")
    order = [key for key, _ in SENT]
    charts = (demo.charts.torque, demo.charts.angle, demo.charts.stress)
    readouts = {chart.now_readout.model_id for chart in charts}
    seen = {demo.check_table.model_id, demo.summary.model_id}
    seen |= {chart.now.model_id for chart in charts}
    assert readouts <= set(order) and seen <= set(order)
    assert min(order.index(key) for key in readouts) > max(order.index(key) for key in seen)
    for chart in charts:  # and they hold the curve's points
        assert np.array_equal(chart.now_readout.x, chart.now.x)
        assert np.array_equal(chart.now_readout.y, chart.now.y)


def _moved(mark: Any, index: int, event: str, x: float) -> None:
    """A drag message as bqplot's front end sends it for a point of a Scatter."""
    mark._handle_custom_msgs(None, {"event": event, "point": {"x": x, "y": 0.0}, "index": index})


def test_a_drag_sends_the_dragged_mark_only_when_it_ends(demo: Workbench) -> None:
    """The page moves a dragged point itself: on each move only what follows it is sent."""
    handles = demo.drawing_editor.handles
    index = [part.kind for part in handles.place_parts].index("torque")
    torque = get_at(demo.document, handles.place_parts[index].path)
    _moved(handles.places, index, "drag_start", 300.0)
    SENT.clear()
    for x in (320.0, 340.0, 360.0):
        _moved(handles.places, index, "drag", x)
    sent = {key for key, _ in SENT}
    assert handles.places.model_id not in sent  # the dragged mark, drawn anew under the pointer
    charts = demo.charts
    followed = {charts.drawing.torques, charts.torque.now, charts.stress.now, demo.summary}
    assert {widget.model_id for widget in followed} <= sent  # the marker and the results
    assert torque["x"] == 360
    SENT.clear()
    _moved(handles.places, index, "drag_end", 380.0)
    assert handles.places.model_id in {key for key, _ in SENT}  # it takes its points now
    assert float(handles.places.x[index]) == 380.0 == torque["x"]


def test_the_summary_leads_and_the_check_table_follows_the_charts(demo: Workbench) -> None:
    """Sent in the page's order: summary, drawing, charts along the shaft, check table."""
    demo.enter(DIAMETER, "56")
    SENT.clear()
    demo.enter(DIAMETER, "64")
    order = [key for key, _ in SENT]
    charts = demo.charts
    curves = [charts.torque.now, charts.angle.now, charts.stress.now]
    first_curve = min(order.index(curve.model_id) for curve in curves)
    last_curve = max(order.index(curve.model_id) for curve in curves)
    assert order.index(demo.summary.model_id) < first_curve
    assert order.index(demo.check_table.model_id) > last_curve


def test_in_a_kernel_the_readouts_follow_once_the_edits_pause(demo: Workbench) -> None:
    """In an event loop the hover readouts wait for a pause: none between one edit and the next.

    They are copies of the curves; sent with every edit of a burst (typing, a drag) the page
    would draw them between one edit's charts and the next.
    """
    charts = (demo.charts.torque, demo.charts.angle, demo.charts.stress)
    readouts = {chart.now_readout.model_id for chart in charts}
    entry = next(x for x in demo.form.fields[DIAMETER] if isinstance(x, w.Text))

    async def burst() -> tuple[set[str], set[str]]:
        for value in ("56", "58", "62"):
            entry.value = value
            await asyncio.sleep(0)  # the edit is solved and drawn (the loop runs the flush)
        sent_while_editing = {key for key, _ in SENT}
        await asyncio.sleep(2 * READOUT_DELAY)
        return sent_while_editing, {key for key, _ in SENT}

    demo.enter(DIAMETER, "60")
    SENT.clear()
    while_editing, after_pause = asyncio.run(burst())
    assert demo.charts.stress.now.model_id in while_editing
    assert not readouts & while_editing
    assert readouts <= after_pause
    for chart in charts:  # the curves of the last edit
        assert np.array_equal(chart.now_readout.x, chart.now.x)
        assert np.array_equal(chart.now_readout.y, chart.now.y)


def test_points_named_by_their_values_are_matched_by_order(demo: Workbench) -> None:
    """A tooltip's words change with an edit; the page must not redraw those points anew.

    bqplot's front end matches points to their data by name unless ``names_unique`` is off:
    a cross named ``utilisation 1.381`` that becomes ``1.379`` would be removed and drawn again.
    The handles keep their names as identities (the page matches a dragged point by them).
    """
    demo.enter(DIAMETER, "56")
    charts = demo.charts
    worded = [
        *charts.stress.details,
        charts.stress.failing,
        charts.bar_failing,
        charts.bar_baseline,
        charts.drawing.failing,
    ]
    assert any(len(mark.names) for mark in worded)  # the demo fails a check: crosses named
    assert not any(mark.names_unique for mark in worded)
    handles = demo.drawing_editor.handles
    assert all(mark.names_unique for mark in (handles.places, handles.segment_marks))
