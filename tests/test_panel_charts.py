"""What the panel's charts draw: the stress the checks use, failures, legends, tooltips, labels.

One test for each thing seen on the panel (the stress chart showed only the nominal stress while
the keyseat check failed; failing bars looked like passing ones; no legends; no utilisation = 1
line on the sweep; ``NaN`` in tooltips after pinning a baseline; a modes legend over the curves
naming a rigid-body mode that was not there; unlabelled markers on the elevation).

Expected numbers are the check rows of :func:`run_checks` on the same case (the chart must show
exactly them) and, for the allowables, the distortion-energy shear yield Ssy = Sy/√3 over the
factor of safety (Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed., §5-5,
eq. 5-21).
"""

from __future__ import annotations

import math
import shutil
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from tests.panel_cases import simple_case
from workbench.panel import Workbench
from workbench.panel.plotting import FAIL, FAIL_MARKER, bq

DEMO = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"
JAM = "jam, factored"


@pytest.fixture
def demo(tmp_path: Path) -> Workbench:
    target = tmp_path / "press_drive.json"
    shutil.copy(DEMO, target)
    panel = Workbench.open(target, show=False)
    panel.result.value = JAM
    return panel


def _row(panel: Workbench, kind: str, segment: int, result: str = JAM) -> Any:
    (check,) = [
        c
        for c in panel.report.checks
        if c.kind == kind and c.shaft == "auger" and c.segment == segment and c.result == result
    ]
    return check


def _labels(legend: Any) -> list[str]:
    return [entry.label for entry in legend.entries]


def test_keyseat_peak_stress_is_on_the_chart_at_the_checks_value(demo: Workbench) -> None:
    check = _row(demo, "keyseat_stress", 0)
    assert not check.passes and check.utilisation == pytest.approx(1.38, abs=0.005)
    units = demo.state.units
    expected = float(units.from_si(check.value, "stress"))  # MPa, as the check table shows it
    chart = demo.charts.stress
    keyseat = chart.details[1]
    assert keyseat.visible and keyseat.marker == "square"
    assert float(keyseat.y[0]) == expected  # exactly the check row's value
    assert float(keyseat.x[0]) == float(units.from_si(check.x, "length"))
    # The dashed trace of K·τ_nom along the segment peaks at the same value.
    row = chart.peaks.labels.index("keyseat peak K·τ_nom, K = 3")
    assert np.nanmax(chart.peaks.y[row]) == expected
    # The situation seen: nominal under the allowable, the keyseat's peak above it.
    allowable = float(np.max(chart.limit.y))
    assert np.max(chart.now.y) < allowable < expected
    assert expected == pytest.approx(155.7, abs=0.05)
    # The shoulder's check is drawn too (its factor in the legend).
    shoulder = _row(demo, "shoulder_stress", 1)
    assert float(chart.details[0].y[0]) == float(units.from_si(shoulder.value, "stress"))
    labels = _labels(chart.legend)
    assert any(label.startswith("keyseat peak K·τ_nom, K = 3") for label in labels)
    assert any(label.startswith("shoulder peak K·τ_nom, K = 1.64") for label in labels)


def two_material_case() -> dict:
    """Two solid segments of two steels, fixed at x = 0, an end torque (invented data)."""
    case = simple_case()
    case["materials"]["soft"] = {"shear_modulus": 80000, "yield_strength": 250}
    segment = case["shafts"][0]["segments"][0]
    case["shafts"][0]["segments"] = [
        {**segment, "length": 400},
        {**segment, "length": 600, "material": "soft"},
    ]
    case["design"] = {"shear_criterion": "von_mises", "factor_of_safety": 2.0}
    return case


def test_allowable_of_each_segment() -> None:
    panel = Workbench(two_material_case())
    limit = panel.charts.stress.limit
    # A step along each segment: Sy/√3/n (Shigley §5-5), 400 and 250 MPa, n = 2.
    np.testing.assert_array_equal(limit.x, [0.0, 400.0, 400.0, 1000.0])
    expected = [400 / math.sqrt(3) / 2] * 2 + [250 / math.sqrt(3) / 2] * 2
    np.testing.assert_allclose(limit.y, expected, rtol=1e-12)
    rows = [c for c in panel.report.checks if c.kind == "shear_stress"]
    assert sorted({c.limit / 1e6 for c in rows}) == pytest.approx(sorted(set(expected)))
    assert "allowable shear stress of the segment" in _labels(panel.charts.stress.legend)


def test_failing_marks_differ_from_passing_ones_in_colour_and_shape(demo: Workbench) -> None:
    charts = demo.charts
    # Bars: segment 0 fails (keyseat) in the failing colour, with a cross over it.
    assert charts.bars.colors[0] == FAIL
    assert all(colour != FAIL for colour in charts.bars.colors[1:])
    # Drawn along the shaft: the cross over the middle of segment 0 (0 to 250 mm).
    assert charts.bar_failing.visible and list(charts.bar_failing.x) == [125.0]
    assert charts.bar_failing.marker == FAIL_MARKER
    assert float(charts.bar_failing.y[0]) == _row(demo, "keyseat_stress", 0).utilisation
    # Stress chart: a cross on the failing check, none on the passing shoulder.
    assert charts.stress.failing.visible and charts.stress.failing.marker == FAIL_MARKER
    np.testing.assert_array_equal(charts.stress.failing.y, charts.stress.details[1].y)
    assert "keyseat stress fails" in charts.stress.failing.names[0]
    # Drawing: the failing segment in the failing colour, a cross naming the check.
    assert charts.segments.colors[0] == FAIL and FAIL not in charts.segments.colors[1:]
    assert charts.drawing.failing.visible and charts.drawing.failing.marker == FAIL_MARKER
    assert "keyseat stress fails (1.38" in charts.drawing.failing.names[0]
    # The mark is not the passing marks' shape, and each legend says what it means.
    passing_shapes = {mark.marker for mark in charts.stress.details} | {"square"}
    assert FAIL_MARKER not in passing_shapes
    for legend in (charts.stress.legend, charts.utilisation_legend, charts.drawing.legend):
        (entry,) = [e for e in legend.entries if e.colour == FAIL]
        assert entry.marker == FAIL_MARKER and "fails" in entry.label
    # Made to pass (a thicker keyseated segment): no failing colour or cross is left.
    demo.form.fields["shafts[0].segments[0].section.diameter"][0].value = "75"
    assert demo.report.passes
    assert FAIL not in charts.bars.colors and FAIL not in charts.segments.colors
    assert not (charts.bar_failing.visible or charts.stress.failing.visible)
    assert not charts.drawing.failing.visible


def test_legends_for_the_allowable_the_baseline_and_the_sweep(demo: Workbench) -> None:
    demo.pin_baseline()
    stress = _labels(demo.charts.stress.legend)
    assert "allowable shear stress of the segment" in stress
    assert "baseline (pinned)" in stress
    for legend in (demo.charts.torque.legend, demo.charts.angle.legend):
        assert "baseline (pinned)" in _labels(legend)
    assert "baseline (pinned)" in _labels(demo.charts.utilisation_legend)
    assert "utilisation = 1" in _labels(demo.charts.utilisation_legend)
    # The legends are rendered beneath their figures, each entry labelled.
    html = demo.charts.stress.legend.widget.value
    assert "data-label='baseline (pinned)'" in html and "allowable shear stress" in html
    demo.clear_baseline()
    assert "baseline (pinned)" not in _labels(demo.charts.stress.legend)


def test_utilisation_sweep_has_a_limit_line_and_a_legend(demo: Workbench) -> None:
    demo.sweep_input.value = ("shafts", 0, "segments", 0, "section", "diameter")
    demo.sweep_metric.value = "governing_utilisation"
    demo.sweep_from.value, demo.sweep_to.value, demo.sweep_points.value = "50", "90", "9"
    demo.start_sweep()
    whatif = demo.whatif
    assert whatif.sweep_limit.visible
    np.testing.assert_array_equal(whatif.sweep_limit.y, [1.0, 1.0])
    np.testing.assert_array_equal(whatif.sweep_limit.x, [50.0, 90.0])
    # At 50 mm the keyseat fails: that stretch is drawn dotted in the failing colour.
    assert whatif.sweep_over.visible and whatif.sweep_over.colors == [FAIL]
    over = np.asarray(whatif.sweep_over.y)
    assert np.nanmin(over) > 1.0 and np.isnan(over[-1])
    labels = _labels(whatif.sweep_legend)
    assert labels[0] == "governing utilisation (all results)"
    assert "utilisation = 1 (the limit)" in labels and "the case as it is now" in labels
    assert "fails: utilisation above 1" in labels
    # A stress sweep has no utilisation line.
    demo.sweep_metric.value = "max_shear_stress"
    demo.start_sweep()
    assert not whatif.sweep_limit.visible
    assert "utilisation = 1 (the limit)" not in _labels(whatif.sweep_legend)


def _hovered(mark: Any) -> list[dict[str, Any]]:
    """What bqplot 0.13 hands a mark's tooltip under the pointer (its front end, read there).

    A line: the whole curve ({name, index, color}: no x or y). A point of a scatter or a bar:
    its own x, y and name ("Dot<i>" without names).
    """
    if isinstance(mark, bq.Lines):
        y = np.asarray(mark.y, dtype=float)
        count = len(y) if y.ndim == 2 else 1
        labels = list(mark.labels) + [f"C{i + 1}" for i in range(len(mark.labels), count)]
        return [{"name": labels[i], "index": i} for i in range(count)]
    names = list(getattr(mark, "names", None) if getattr(mark, "names", None) is not None else [])
    x, y = np.asarray(mark.x), np.asarray(mark.y, dtype=float)
    return [
        {"x": x[i], "y": y[i], "name": names[i] if names else f"Dot{i}", "index": i}
        for i in range(len(y))
    ]


def _tooltip_texts(figures: list[Any]) -> list[str]:
    texts = []
    for figure in figures:
        for mark in figure.marks:
            if mark.tooltip is None or not mark.visible:
                continue
            for datum in _hovered(mark):
                for field, label in zip(mark.tooltip.fields, mark.tooltip.labels, strict=True):
                    value = datum.get(field, math.nan)
                    if isinstance(value, str):
                        assert value, f"{label}: empty"
                        texts.append(f"{label} {value}")
                        continue
                    number = float(value)
                    text = "NaN" if not math.isfinite(number) else f"{number:.4g}"
                    texts.append(f"{label} {text}")
    return texts


def test_no_tooltip_reads_nan_after_pinning_a_baseline(demo: Workbench) -> None:
    demo.pin_baseline()
    demo.form.fields["shafts[0].segments[0].section.diameter"][0].value = "64"
    demo.open_modes()
    demo.sweep_metric.value = "governing_utilisation"
    demo.sweep_points.value = "5"
    demo.start_sweep()
    figures = [
        *demo.charts.figures,
        demo.sweep_figure,
        *demo.modes_chart.figures,
    ]
    texts = _tooltip_texts(figures)
    assert texts and not [text for text in texts if "NaN" in text]
    # The baseline's curve is named, and its points read its values.
    baseline = demo.charts.stress.baseline_readout
    assert baseline.visible and baseline.tooltip.labels[1].startswith("baseline τ")
    np.testing.assert_array_equal(baseline.y, demo.charts.stress.baseline.y)
    assert f"x [mm] {float(baseline.x[0]):.4g}" in texts


def test_modes_legend_lists_the_modes_drawn_beneath_the_curves(demo: Workbench) -> None:
    demo.open_modes()
    chart = demo.modes_chart
    modes = demo.modes
    assert not modes.rigid_body.any()  # the demo is held: no rigid-body mode
    labels = _labels(chart.legend)
    assert labels == list(chart.flexible.labels)
    assert len(labels) == min(4, len(modes)) and not [x for x in labels if "rigid" in x]
    # No legend drawn by bqplot inside the plot (over the curves): ours sits beneath it.
    assert not any(mark.display_legend for mark in chart.shapes.marks)
    box = chart.boxes[0]
    assert list(box.children) == [chart.shapes, chart.legend.widget]
    assert "natural frequency" in _labels(chart.bands_legend)


def test_modes_legend_has_the_rigid_body_mode_when_there_is_one() -> None:
    from tests.test_panel_sections import two_disc_case
    from workbench.panel.modes_section import ModesChart
    from workbench.solver.io import parse_case
    from workbench.solver.modes import natural_modes

    case = two_disc_case()
    case["supports"] = []
    chart = ModesChart()
    chart.draw(natural_modes(parse_case(case)), 0, (), 0.2)
    labels = _labels(chart.legend)
    assert labels[0] == "mode 1: rigid body (0 Hz)" and labels[1].startswith("mode 2:")
    assert chart.legend.entries[0].line == "dashed"


def test_elevation_markers_are_labelled(demo: Workbench) -> None:
    charts = demo.charts
    handles = demo.drawing_editor.handles
    # The drag handles are not markers: each names what it does in its tooltip instead.
    moved = (handles.edges, handles.shoulders, handles.places)
    for mark in moved:
        assert mark.enable_move and mark.tooltip is not None and mark.tooltip.labels[0]
    drawn = [mark for mark in charts.elevation.marks if mark.visible and mark not in moved]
    for mark in drawn:
        if isinstance(mark, bq.Scatter) and len(mark.x):
            assert mark.display_names and len(mark.names) == len(mark.x), mark.marker
            assert all(mark.names)
    assert list(charts.fixed.names) == ["fixed"]
    assert list(charts.torques.names) == ["2,100 N·m"]  # the jam torque, factored
    assert charts.gears.labels_visibility == "label"
    assert list(charts.gears.labels) == ["gear 0a, r 60 mm"]
    labels = _labels(charts.drawing.legend)
    for words in ("fixed support", "gear (pitch diameter)", "point torque"):
        assert any(label.startswith(words) for label in labels), words
