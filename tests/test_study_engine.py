"""The study engine on dask: progress, cancel, the command end to end, Ctrl-C, Sobol indices."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import threading
import time
from pathlib import Path
from typing import Any

import numpy as np
import pyarrow.parquet as pq
import pytest

from tests.study_support import case_text, diameter_input, plan_text, study_cluster
from workbench.case.errors import InputError
from workbench.cli import main
from workbench.study.engine import Progress, run_study
from workbench.study.plan import read_plan
from workbench.study.summary import summarise

__all__ = ["study_cluster"]

ROOT = Path(__file__).resolve().parents[1]
TORQUE = {"path": "load_cases[0].torques[0].torque",
          "distribution": {"kind": "uniform", "low": 1500, "high": 2500}}  # fmt: skip


def test_progress_after_each_chunk_and_cancel_keeps_the_rows(
    tmp_path: Path, study_cluster: Any
) -> None:
    plan = plan_text(
        [diameter_input(kind="normal", mean=50, std=1), TORQUE], count=40 * 4096, seed=4
    )
    seen: list[Progress] = []
    stop = threading.Event()

    def progress(step: Progress) -> None:
        seen.append(step)
        if step.chunks == 2:
            stop.set()

    out = tmp_path / "stopped.parquet"
    outcome = run_study(case_text(), plan, out, client=study_cluster, chunk_size=4096,
                        progress=progress, cancel=stop)  # fmt: skip
    assert outcome.stopped
    assert outcome.rows == seen[-1].done == 2 * 4096 < outcome.total == 40 * 4096
    assert [step.done for step in seen] == [4096, 8192]
    table = pq.read_table(out)  # a whole parquet file of the rows written
    assert table.column("variant").to_pylist() == list(range(2 * 4096))
    summary = summarise(out, read_plan(plan), outcome.total)
    assert summary["rows"] == 8192 and summary["total"] == 40 * 4096


def test_a_bad_chunk_size_or_scheduler_is_named(tmp_path: Path) -> None:
    plan = plan_text([diameter_input(kind="normal", mean=50, std=1)], count=10)
    with pytest.raises(InputError) as caught:
        run_study(case_text(), plan, tmp_path / "r.parquet", chunk_size=1000)
    assert caught.value.field == "--chunk-size"
    with pytest.raises(InputError) as caught:
        run_study(case_text(), plan, tmp_path / "r.parquet", scheduler="tcp://127.0.0.1:1")
    assert caught.value.field == "--scheduler"


def test_the_command_writes_rows_and_a_summary(tmp_path: Path, study_cluster: Any,
                                               capsys: pytest.CaptureFixture[str]) -> None:  # fmt: skip
    case = tmp_path / "case.json"
    case.write_text(case_text())
    plan = tmp_path / "plan.json"
    inputs = [diameter_input(kind="normal", mean=50, std=8), TORQUE]
    document = json.loads(plan_text(inputs, method="latin_hypercube", count=5000, seed=9))
    document["sensitivity"] = {"sobol": True, "base_count": 256}
    document["worst"] = 3
    plan.write_text(json.dumps(document))
    out, summary_file = tmp_path / "rows.parquet", tmp_path / "summary.json"
    address = study_cluster.scheduler.address
    status = main(["study", str(case), "--plan", str(plan), "-o", str(out), "--scheduler", address,
                   "--json", "--summary", str(summary_file), "--chunk-size", "4096"])  # fmt: skip
    captured = capsys.readouterr()
    assert status == 0, captured.err
    summary = json.loads(captured.out)
    assert summary == json.loads(summary_file.read_text())
    table = pq.read_table(out)
    assert table.num_rows == 5000
    valid = table.column("valid").to_numpy(zero_copy_only=False)
    # A diameter of N(50, 8) mm goes below zero now and then (P ≈ 2e-10 per variant: here the
    # Latin hypercube's extreme strata); whatever the count, it matches the reasons'.
    assert summary["invalid"]["count"] == int((~valid).sum())
    exceedance = summary["exceedance"]
    assert (
        exceedance["interval"] is None
        and "does not draw variants independently" in exceedance["why_no_interval"]
    )
    utilisation = table.column("governing_utilisation").to_numpy()[valid]
    assert exceedance["fraction"] == pytest.approx(np.mean(utilisation > 1.0))
    assert len(summary["worst"]) == 3
    assert summary["worst"][0]["governing_utilisation"] == pytest.approx(utilisation.max())
    rho = summary["rank_correlations"]
    # τ = 16T/(πd³): the utilisation falls with the diameter and rises with the torque.
    assert rho[inputs[0]["path"]]["governing_utilisation"] < -0.5
    assert rho[inputs[1]["path"]]["governing_utilisation"] > 0.1
    sobol = summary["sobol"]
    assert sobol["variants"] == 256 * 4
    assert (tmp_path / "rows.sobol.parquet").exists()
    # d over ±3σ moves τ far more than T over ±25 %: the diameter's total index is the larger.
    assert sobol["ST"][0] > sobol["ST"][1] > 0.0


def test_ctrl_c_stops_cleanly_and_keeps_the_rows(tmp_path: Path) -> None:
    case = tmp_path / "case.json"
    case.write_text(case_text())
    plan = tmp_path / "plan.json"
    plan.write_text(
        plan_text([diameter_input(kind="normal", mean=50, std=1)], count=400 * 4096, seed=2)
    )
    out = tmp_path / "rows.parquet"
    command = [sys.executable, "-m", "workbench.cli", "study", str(case), "--plan", str(plan),
               "-o", str(out), "--workers", "2", "--chunk-size", "4096"]  # fmt: skip
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    process = subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                               start_new_session=True, env=env)  # fmt: skip
    deadline = time.monotonic() + 60
    while not out.exists() and time.monotonic() < deadline:
        time.sleep(0.1)
    time.sleep(0.5)
    os.killpg(process.pid, signal.SIGINT)  # as a terminal's Ctrl-C: the whole process group
    stdout, stderr = process.communicate(timeout=60)
    assert process.returncode == 130, stderr
    assert "Traceback" not in stderr
    rows = pq.read_table(out).num_rows
    assert 0 < rows < 400 * 4096
    assert stderr.strip() == (
        f"stopped: {rows} of {400 * 4096} variants written to {out} (kept; the summary above covers them)"
    )
    assert stdout.startswith(f"Study: {rows} of {400 * 4096} variants")


def test_runs_one_after_another_on_one_client(tmp_path: Path, study_cluster: Any) -> None:
    """A face keeps one client: runs of the same case back to back each keep their own data."""
    case = case_text()
    for number in range(4):
        plan = plan_text(
            [diameter_input(kind="normal", mean=50, std=1)], count=2 * 4096, seed=number
        )
        outcome = run_study(case, plan, tmp_path / f"r{number}.parquet", client=study_cluster)
        assert outcome.rows == 2 * 4096 and not outcome.stopped
