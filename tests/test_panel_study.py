"""The panel's Study tab in plain pytest: a small study run, one cancelled, results stale after an edit.

Outside check: a solid shaft fixed at one end with an end torque T has τ = 16T/(πd³) (Gere &
Goodno, *Mechanics of Materials*, 8th ed., §3.3, eq. 3-13); with d normal (μ, σ) the utilisation
τ/τ_allow exceeds 1 exactly when d < d* = (16T/(π τ_allow))^(1/3), so P = Φ((d* − μ)/σ)
(scipy.stats.norm). The interval the tab shows must hold it, and Spearman's ρ of a strictly
decreasing function of d is −1.
"""

from __future__ import annotations

import asyncio
import copy
import json
import math
import threading
from pathlib import Path

import numpy as np
import pyarrow.parquet as pq
import pytest
from scipy import stats

from tests.panel_cases import field
from tests.study_support import SHAFT_CASE
from workbench.panel import Workbench
from workbench.study.attached import STUDY_MIME_TYPE, file_digest

DIAMETER = "shafts[0].segments[0].section.diameter"


def _panel_with_plan(tmp_path: Path, count: int, mean: str = "47", std: str = "1") -> Workbench:
    panel = Workbench(copy.deepcopy(SHAFT_CASE))
    form = panel.study.plan_form
    form.input_path.value = DIAMETER
    form.kind.value = "normal"
    entries = {entry.description.split(" [")[0]: entry for entry in form.parameters.children}
    entries["mean"].value, entries["std"].value = mean, std
    form.add_input()
    form.count.value, form.seed.value = str(count), "3"
    panel.study.rows_file.value = str(tmp_path / "rows.parquet")
    return panel


def test_a_small_study_runs_in_the_panel_and_matches_the_closed_form(tmp_path: Path) -> None:
    panel = _panel_with_plan(tmp_path, 8000)
    study = panel.study
    study.start_study()
    study.wait(120)
    assert study.message.value == ""
    assert study.progress.value == study.progress.max == 8000
    last = study.last
    assert last is not None
    summary = last["summary"]
    d_star = (16 * 2000.0 / (math.pi * 100e6)) ** (1 / 3) * 1000  # mm
    exact = stats.norm.cdf((d_star - 47.0) / 1.0)
    low, high = summary["exceedance"]["interval"]
    assert low < exact < high
    # What the tab draws is the rows' own: the bars count every valid variant once.
    rows = pq.read_table(tmp_path / "rows.parquet")
    utilisation = rows.column("governing_utilisation").to_numpy()
    assert sum(study.results.bars.y) + sum(study.results.over.y) == len(utilisation)
    exceeding = np.count_nonzero(utilisation > 1.0)
    counts = np.add(study.results.bars.y, study.results.over.y)
    centres = np.asarray(study.results.bars.x)
    width = centres[1] - centres[0]
    assert (
        counts[centres - width / 2 >= 1.0].sum()
        <= exceeding
        <= counts[centres + width / 2 > 1.0].sum()
    )
    assert study.results.cumulative_line.y[-1] == pytest.approx(1.0)
    assert list(study.results.limit.x) == [1.0, 1.0]
    assert f"{summary['exceedance']['fraction']:.4g}" in study.results.exceedance.value
    assert list(study.results.sensitivity_bars.x) == [DIAMETER]
    assert study.results.sensitivity_bars.y[0][0] == pytest.approx(-1.0)
    worst = int(np.argmax(utilisation))
    assert f"<td>{worst}</td>" in study.results.worst.value
    assert last["rows_sha256"] == file_digest(tmp_path / "rows.parquet")
    bundle = study.bundle()
    assert bundle is not None and bundle[STUDY_MIME_TYPE]["summary"] == summary


def test_cancel_stops_after_the_chunk_and_keeps_its_rows(tmp_path: Path) -> None:
    panel = _panel_with_plan(tmp_path, 10_000)
    study = panel.study
    study.progress.observe(lambda _: study.cancel_study(), "value")  # Cancel at the first report
    study.start_study()
    study.wait(120)
    assert pq.read_metadata(tmp_path / "rows.parquet").num_rows == 4096  # one whole chunk
    assert "cancelled: 4,096 of 10,000" in study.message.value
    assert study.last is not None and study.last["stopped"]
    assert study.last["summary"]["rows"] == 4096
    assert not study.run.disabled and study.cancel.disabled


def test_results_are_stale_after_an_edit_and_fresh_when_it_is_undone(tmp_path: Path) -> None:
    panel = _panel_with_plan(tmp_path, 2000)
    panel.study.start_study()
    panel.study.wait(120)
    box = panel.study.results.box
    assert "wb-stale" not in box._dom_classes
    field(panel, DIAMETER).value = "52"
    assert "wb-stale" in box._dom_classes
    assert "edited since" in panel.study.results.note.value
    field(panel, DIAMETER).value = "50"
    assert "wb-stale" not in box._dom_classes


def test_bad_entries_are_named_beside_the_tab(tmp_path: Path) -> None:
    panel = Workbench(copy.deepcopy(SHAFT_CASE))
    study = panel.study
    study.start_study()
    assert "add at least one input" in study.message.value
    form = study.plan_form
    form.input_path.value = DIAMETER
    form.parameters.children[0].value = "4x7"
    form.add_input()
    assert "study mean" in form.input_message.value
    assert form.inputs == []
    form.parameters.children[0].value = "47 mm"
    form.add_input()
    form.count.value = "0"
    study.start_study()
    assert "study variants" in study.message.value
    assert not study.running


def test_sobol_indices_come_with_the_spearman_bars(tmp_path: Path) -> None:
    """One input drives all the variance: its first-order and total Sobol indices are 1.

    Saltelli et al., Comput. Phys. Commun. 181(2), 2010: S1 = ST = 1 for a function of one
    input alone (estimates within SALib's own confidence widths).
    """
    panel = _panel_with_plan(tmp_path, 1000)
    form = panel.study.plan_form
    form.sobol.value, form.base_count.value = True, "512"
    panel.study.start_study()
    panel.study.wait(120)
    bars = panel.study.results.sensitivity_bars
    assert list(bars.labels) == ["Spearman ρ", "Sobol S1", "Sobol ST"]
    sobol = panel.study.last["summary"]["sobol"]
    assert sobol["variants"] == 512 * 3
    assert bars.y[1][0] == pytest.approx(1.0, abs=max(0.05, 2 * sobol["S1_conf"][0]))
    assert bars.y[2][0] == pytest.approx(1.0, abs=max(0.05, 2 * sobol["ST_conf"][0]))


def test_a_larger_study_runs_on_a_kept_local_cluster_with_the_same_rows(tmp_path: Path) -> None:
    """Above 10,000 variants the tab starts one local cluster and keeps it for the next run."""
    from workbench.study.engine import run_study

    panel = _panel_with_plan(tmp_path, 12_288)
    study = panel.study
    try:
        study.start_study()
        study.wait(180)
        assert study.message.value == ""
        client = study._client
        assert client is not None
        study.start_study()  # again: the same client, no second cluster
        study.wait(180)
        assert study._client is client
    finally:
        study.close()
    assert study._client is None
    plan = json.dumps(study.last["plan"])
    here = run_study(panel.case_json(), plan, tmp_path / "here.parquet", in_process=True)
    assert pq.read_table(here.path).equals(pq.read_table(tmp_path / "rows.parquet"))


def test_with_a_running_loop_the_widgets_are_written_on_its_thread(tmp_path: Path) -> None:
    """In a kernel the engine's reports reach the widgets through the loop, never the worker."""
    panel = _panel_with_plan(tmp_path, 10_000)
    study = panel.study
    writers: list[threading.Thread] = []
    study.progress.observe(lambda _: writers.append(threading.current_thread()), "value")

    async def click_and_wait() -> None:
        study.start_study()
        while study.running or study.run.disabled:
            await asyncio.sleep(0.01)

    asyncio.run(click_and_wait())
    assert study.progress.value == 10_000
    assert len(writers) >= 3 and set(writers) == {threading.main_thread()}
