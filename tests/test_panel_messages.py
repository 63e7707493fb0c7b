"""What an edit sends to the page: nothing unchanged, and each chart's scales set once.

The page redraws on every widget message; a message whose values did not change is a redraw for
nothing, and a scale that follows its marks' data changes its domain once per mark update (each
change redraws every mark and axis on it). These tests record the messages the widgets send
(a recording comm in place of the kernel's) while the demo case is edited.

Expected extents are numpy's ``nanmin``/``nanmax`` of the data the marks hold (common practice,
no source).
"""

from __future__ import annotations

import shutil
from collections import Counter
from pathlib import Path
from typing import Any

import comm
import numpy as np
import pytest
from comm import DummyComm

from workbench.panel import Workbench

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


def test_each_scale_is_set_once_per_edit_at_the_extent_drawn(demo: Workbench) -> None:
    demo.enter(DIAMETER, "56")
    SENT.clear()
    demo.enter(DIAMETER, "64")
    per_widget = Counter(key for key, _ in SENT)
    for widget in chart_widgets(demo):
        assert per_widget[widget.model_id] <= 1  # each widget's changes in one message
    for chart in (demo.charts.torque, demo.charts.angle, demo.charts.stress):
        drawn = [m for m in chart.figure.marks if m.visible and len(m.y)]
        values = np.concatenate([np.asarray(m.y, dtype=float).ravel() for m in drawn])
        assert chart.y_scale.min == pytest.approx(np.nanmin(values))
        assert chart.y_scale.max == pytest.approx(np.nanmax(values))
        xs = np.concatenate([np.asarray(m.x, dtype=float).ravel() for m in drawn])
        # x is the drawing's scale (the shaft with a margin), shared by every chart along it
        assert chart.x_scale is demo.charts.drawing.x_scale
        assert chart.x_scale.min <= xs.min() and chart.x_scale.max >= xs.max()
    bars = demo.charts.bars
    assert demo.charts.bar_y.min == 0.0
    assert demo.charts.bar_y.max == pytest.approx(max(1.0, float(np.max(bars.y))))


def test_a_hidden_baseline_does_not_stretch_the_scale(demo: Workbench) -> None:
    demo.pin_baseline()
    demo.enter(DIAMETER, "30")  # the baseline's stress is far below this one's
    demo.clear_baseline()
    stress = demo.charts.stress
    assert not stress.baseline.visible
    drawn = [m for m in stress.figure.marks if m.visible and len(m.y)]
    low = np.nanmin(np.concatenate([np.asarray(m.y, dtype=float).ravel() for m in drawn]))
    assert stress.y_scale.min == pytest.approx(low)


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
