"""The panel's Modes and Fatigue sections and the Vibration and fatigue editors, in plain pytest.

Expected values come from the solver run on the same case, and from closed forms named beside
each check.
"""

from __future__ import annotations

import math
from pathlib import Path

import ipywidgets as w
import numpy as np
import pytest

from tests.panel_cases import CASE, field, message_beside, open_demo, simple_case
from workbench.design.checks import run_checks
from workbench.panel import Workbench
from workbench.solver.analysis import solve
from workbench.solver.io import load_case, parse_case


@pytest.fixture
def panel(tmp_path: Path) -> Workbench:
    return open_demo(tmp_path)


# --- vibration and fatigue ------------------------------------------------------------------


#: A spring support so soft (N·m/deg) that the two-disc system is free–free to 3e-6 of k.
SOFT = 1e-3


def two_disc_case(inertia_a: float = 0.2, inertia_b: float = 0.05) -> dict:
    """A massless solid shaft between two discs on a very soft spring (statics needs one)."""
    case = simple_case()
    case["units"]["inertia"] = "kg*m**2"
    case["supports"] = [{"shaft": "s", "x": 0, "kind": "spring", "stiffness": SOFT}]
    case["load_cases"] = [{"name": "none"}]
    case["discs"] = [
        {"shaft": "s", "x": 0, "inertia": inertia_a},
        {"shaft": "s", "x": 1000, "inertia": inertia_b},
    ]
    return case


def test_modes_chart_shows_natural_modes_of_the_case(panel: Workbench) -> None:
    from workbench.panel.modes_section import MODES_SHOWN, rpm
    from workbench.solver.modes import natural_modes

    panel.open_modes()
    expected = natural_modes(load_case(CASE))
    modes = panel.modes
    assert modes is not None
    np.testing.assert_array_equal(modes.angular_frequency, expected.angular_frequency)
    shown = min(MODES_SHOWN, len(expected))
    x_mm = expected.shape(0, "auger")[0] * 1e3
    lines = np.asarray(panel.charts_box and panel.modes_chart.flexible.y)
    for mode in range(shown):
        np.testing.assert_allclose(lines[mode], expected.shape(mode, "auger")[1], rtol=1e-12)
    np.testing.assert_allclose(panel.modes_chart.flexible.x[0], x_mm, rtol=1e-12)
    assert panel.modes_chart.flexible.labels[0] == f"mode 1: {expected.frequency[0]:.4g} Hz"
    np.testing.assert_allclose(
        panel.modes_chart.frequency_marks.x, rpm(expected.angular_frequency), rtol=1e-12
    )
    # The running-speed band 20–45 rpm of the case, and widened by the ±20 % margin.
    bands = np.atleast_2d(panel.modes_chart.bands.x)
    widened = np.atleast_2d(panel.modes_chart.widened.x)
    np.testing.assert_allclose(bands[0][:2], [20.0, 45.0], rtol=1e-12)
    np.testing.assert_allclose(widened[0][:2], [16.0, 54.0], rtol=1e-12)
    assert f"{expected.frequency[0]:.4g}" in panel.frequency_table.value
    # Live: a diameter edit changes the frequencies drawn.
    before = panel.modes_chart.frequency_marks.x.copy()
    field(panel, "shafts[0].segments[1].section.outer_diameter").value = "90.0"
    assert not np.allclose(panel.modes_chart.frequency_marks.x, before)
    again = natural_modes(parse_case(panel.document))
    np.testing.assert_allclose(panel.modes_chart.frequency_marks.x, rpm(again.angular_frequency))


def test_two_disc_frequency_follows_a_disc_inertia_edit() -> None:
    # Two discs on a massless shaft of stiffness k = G·J/L, free at both ends:
    # ω² = k·(J1 + J2)/(J1·J2) (Rao, Mechanical Vibrations, two-rotor torsional system; from
    # memory). With the soft spring ks at disc 1 the exact roots solve
    # J1·J2·ω⁴ − (J1·k + J2·(k + ks))·ω² + k·ks = 0 (two-degree-of-freedom system, same source).
    panel = Workbench(two_disc_case())
    panel.open_modes()
    stiffness = 80e9 * math.pi * 0.040**4 / 32 / 1.0
    spring = SOFT * 180 / math.pi

    def free_free(inertia_a: float, inertia_b: float) -> float:
        omega = math.sqrt(stiffness * (inertia_a + inertia_b) / (inertia_a * inertia_b))
        return omega / (2 * math.pi)

    def on_spring(inertia_a: float, inertia_b: float) -> float:
        roots = np.roots(
            [
                inertia_a * inertia_b,
                -(inertia_a * stiffness + inertia_b * (stiffness + spring)),
                stiffness * spring,
            ]
        )
        return math.sqrt(max(roots)) / (2 * math.pi)

    modes = panel.modes
    assert modes is not None and len(modes) == 2
    assert modes.frequency[1] == pytest.approx(on_spring(0.2, 0.05), rel=1e-9)
    assert modes.frequency[1] == pytest.approx(free_free(0.2, 0.05), rel=1e-5)
    field(panel, "discs[1].inertia").value = "0.1"
    modes = panel.modes
    assert modes is not None
    assert modes.frequency[1] == pytest.approx(on_spring(0.2, 0.1), rel=1e-9)
    assert modes.frequency[1] == pytest.approx(free_free(0.2, 0.1), rel=1e-5)
    listed = f"{modes.frequency[1]:.4g}"
    assert f"<td>{listed}</td>" in panel.frequency_table.value
    assert panel.modes_chart.flexible.labels[1] == f"mode 2: {listed} Hz"


def test_rigid_body_modes_are_marked() -> None:
    # A free–free two-disc system (statics refuses it, so the chart is drawn directly): one
    # rigid-body mode at 0 Hz, then ω² = k·(J1 + J2)/(J1·J2) (Rao, as above; from memory).
    from workbench.panel.modes_section import ModesChart
    from workbench.solver.modes import natural_modes

    case = two_disc_case()
    case["supports"] = []
    modes = natural_modes(parse_case(case))
    chart = ModesChart()
    chart.draw(modes, 0, (), 0.2)
    assert bool(modes.rigid_body[0]) and chart.rigid.visible
    assert chart.rigid.labels == ["mode 1: rigid body (0 Hz)"]
    np.testing.assert_allclose(chart.rigid.y, [1.0, 1.0])  # one rotation all along
    stiffness = 80e9 * math.pi * 0.040**4 / 32
    omega = math.sqrt(stiffness * 0.25 / (0.2 * 0.05))
    assert chart.flexible.labels == [f"mode 2: {omega / (2 * math.pi):.4g} Hz"]


def test_case_without_inertia_says_so() -> None:
    panel = Workbench(simple_case())
    panel.open_modes()
    assert panel.modes is None
    assert "no inertia" in panel.modes_message.value
    assert panel.modes_figures.layout.display == "none"
    # A density for the material gives the shaft inertia: the charts appear.
    field(panel, "materials.steel.density").value = "7850.0"
    assert panel.modes is not None and panel.modes_message.value == ""
    assert panel.modes_figures.layout.display is None


def test_fatigue_diagram_lines_and_operating_point(panel: Workbench) -> None:
    # Failure lines in the τm–τa plane (Budynas & Nisbett, Shigley's Mechanical Engineering
    # Design, 9th ed., §6-12, Tables 6-6 and 6-7): modified Goodman through (0, Sse) and
    # (Ssu, 0); Gerber parabola through the same intercepts; ASME ellipse through (0, Sse) and
    # (Ssy, 0); Soderberg through (0, Sse) and (Ssy, 0); Langer through (0, Ssy) and (Ssy, 0).
    from workbench.panel.fatigue_section import governing_fatigue_points

    panel.open_fatigue()
    report = run_checks(solve(load_case(CASE)))
    points = governing_fatigue_points(report, "auger")
    governing = points[0]
    factors = governing.factors
    sse, ssu, ssy = (
        factors.endurance_shear / 1e6,
        factors.ultimate_shear / 1e6,
        factors.yield_shear / 1e6,
    )
    xs, ys = panel.fatigue_chart.lines.x, panel.fatigue_chart.lines.y
    intercepts = {
        0: ((0, sse), (ssu, 0)),  # Goodman
        1: ((0, sse), (ssu, 0)),  # Gerber
        2: ((0, sse), (ssy, 0)),  # ASME elliptic
        3: ((0, sse), (ssy, 0)),  # Soderberg
        4: ((0, ssy), (ssy, 0)),  # Langer
    }
    for line, (start, end) in intercepts.items():
        assert (xs[line][0], ys[line][0]) == pytest.approx(start, abs=1e-9)
        assert (xs[line][-1], ys[line][-1]) == pytest.approx(end, abs=1e-9)
    # Shape between the ends: Goodman straight, Gerber parabola, ASME quarter ellipse.
    tm, ta = xs[0], ys[0]
    np.testing.assert_allclose(ta / sse + tm / ssu, 1.0, rtol=1e-12)
    np.testing.assert_allclose(ys[1], sse * (1 - (xs[1] / ssu) ** 2), rtol=1e-12, atol=1e-9)
    np.testing.assert_allclose((ys[2] / sse) ** 2 + (xs[2] / ssy) ** 2, 1.0, rtol=1e-9)
    # The operating point is the governing segment's FatiguePoint, in MPa.
    assert panel.fatigue_chart.point.x[0] == pytest.approx(factors.mean_shear / 1e6, rel=1e-12)
    assert panel.fatigue_chart.point.y[0] == pytest.approx(
        factors.alternating_shear / 1e6, rel=1e-12
    )
    assert (governing.shaft, governing.segment) == ("auger", 0)
    # The modified Goodman factor of the point is where the load line meets the line:
    # n = 1/(τa/Sse + τm/Ssu) (Shigley, 9th ed., eq. 6-41).
    n = 1 / (
        factors.alternating_shear / factors.endurance_shear
        + factors.mean_shear / factors.ultimate_shear
    )
    assert factors.goodman == pytest.approx(n, rel=1e-12)
    assert len(panel.fatigue_chart.others.x) == len(points) - 1
    # The criterion picked in the Design tab is the one drawn thick.
    field(panel, "design.fatigue.criterion").value = "soderberg"
    np.testing.assert_allclose(panel.fatigue_chart.chosen.x, xs[3])


def test_fatigue_switch_and_result_pickers(panel: Workbench) -> None:
    panel.open_fatigue()
    pickers = panel.form.fields["design.fatigue.extremes[1]"]
    pickers[0].value = "jam, factored"
    assert panel.model is not None and panel.model.design is not None
    assert panel.model.design.fatigue.extremes == ("pressing", "jam, factored")
    switch = next(
        x
        for x in panel.design_box.children[-10:]
        if isinstance(x, w.HBox)
        and any(isinstance(c, w.Checkbox) and c.description == "fatigue check" for c in x.children)
    )
    box = next(c for c in switch.children if isinstance(c, w.Checkbox))
    box.value = False
    assert "fatigue" not in panel.document["design"]
    assert "No fatigue check" in panel.fatigue_message.value
    assert not any(c.kind == "fatigue" for c in panel.report.checks)


@pytest.mark.parametrize(
    ("path", "value", "words"),
    [
        ("discs[0].inertia", -1.0, "greater than zero"),
        ("operating_speeds[0].max", 10.0, "must not be less than min"),
        ("materials.auger-steel.density", -5.0, "greater than zero"),
        ("design.frequency_margin", 1.5, "fraction from 0"),
        ("design.fatigue.factor_of_safety", 0.5, "at least 1"),
    ],
)
def test_bad_value_in_the_new_editors(
    panel: Workbench, path: str, value: float, words: str
) -> None:
    field(panel, path).value = f"{value:g}"
    assert panel.stale
    assert words in message_beside(panel, path).value
    assert field(panel, path).value == f"{value:g}".replace("-", "\u2212")  # shown as typed
    assert "wb-bad" in field(panel, path)._dom_classes


def test_bad_fatigue_pick_shows_beside_the_pickers(panel: Workbench) -> None:
    from workbench.panel.document import set_at

    set_at(panel.document, ("design", "fatigue", "extremes", 1), "nope")
    panel.refresh()
    assert panel.stale
    labels = panel.form.messages["design.fatigue.extremes"]
    assert any("unknown load case or combination" in label.value for label in labels)


def test_add_and_remove_disc_and_speed_band(panel: Workbench) -> None:
    panel.vibration_editor.add_disc()
    assert len(panel.document["discs"]) == 3 and not panel.stale
    panel.vibration_editor.add_speed()
    assert panel.document["operating_speeds"][-1]["name"] == "band 2"
    assert any(c.result == "band 2" for c in panel.report.checks)
    panel.form.remove(("operating_speeds",), 1, drop_empty=True)
    panel.form.remove(("discs",), 2, drop_empty=True)
    assert len(panel.document["discs"]) == 2 and len(panel.document["operating_speeds"]) == 1


def test_mean_stress_choice_moves_the_operating_point(panel: Workbench) -> None:
    # "nominal" leaves Kfs off the mean stress (Kfsm = 1): the operating point's τm falls by the
    # factor Kfs, τa stays (Shigley's Mechanical Engineering Design, 9th ed., eq. 6-36 with
    # Kfsm = Kfs or 1). The demo's governing segment carries a keyseat, Kfs = 3.0.
    from workbench.panel.fatigue_section import governing_fatigue_points

    panel.open_fatigue()
    before = governing_fatigue_points(panel.report, "auger")[0]
    chooser = field(panel, "design.fatigue.mean_concentration")
    assert chooser.value == "kfs"
    chooser.value = "none"
    assert panel.document["design"]["fatigue"]["mean_concentration"] == "none"
    after = governing_fatigue_points(panel.report, "auger")[0]
    assert (after.shaft, after.segment) == (before.shaft, before.segment)
    assert after.factors.mean_shear == pytest.approx(
        before.factors.mean_shear / before.concentration, rel=1e-12
    )
    assert after.factors.alternating_shear == pytest.approx(
        before.factors.alternating_shear, rel=1e-12
    )
    assert panel.fatigue_chart.point.x[0] == pytest.approx(
        after.factors.mean_shear / 1e6, rel=1e-12
    )
