"""A study run in this process (the panel's small studies) gives the rows a cluster gives."""

from __future__ import annotations

import threading
from pathlib import Path
from typing import Any

import numpy as np
import pyarrow.parquet as pq

from tests.study_support import case_text, diameter_input, plan_text, study_cluster
from workbench.study.engine import Progress, run_study
from workbench.study.histogram import utilisation_histogram

__all__ = ["study_cluster"]


def test_in_process_rows_equal_the_cluster_rows(tmp_path: Path, study_cluster: Any) -> None:
    plan = plan_text([diameter_input(kind="normal", mean=48, std=2)], count=3 * 4096 + 5, seed=7)
    here = run_study(case_text(), plan, tmp_path / "here.parquet", in_process=True)
    there = run_study(case_text(), plan, tmp_path / "there.parquet", client=study_cluster)
    assert (here.rows, here.stopped, here.workers) == (3 * 4096 + 5, False, 1)
    assert pq.read_table(here.path).equals(pq.read_table(there.path))


def test_in_process_reports_each_chunk_and_stops_when_asked(tmp_path: Path) -> None:
    plan = plan_text([diameter_input(kind="uniform", low=45, high=50)], count=4 * 4096, seed=1)
    stop, seen = threading.Event(), []

    def progress(report: Progress) -> None:
        seen.append(report.done)
        if report.chunks == 2:
            stop.set()

    outcome = run_study(case_text(), plan, tmp_path / "r.parquet", in_process=True,
                        progress=progress, cancel=stop)  # fmt: skip
    assert seen == [4096, 8192]
    assert outcome.stopped and outcome.rows == 8192
    assert pq.read_metadata(outcome.path).num_rows == 8192


def test_the_histogram_counts_every_valid_variant(tmp_path: Path) -> None:
    """numpy.histogram over the whole column gives the counts read a row group at a time."""
    plan = plan_text([diameter_input(kind="normal", mean=47, std=1.5)], count=2 * 4096 + 3, seed=2)
    outcome = run_study(case_text(), plan, tmp_path / "r.parquet", in_process=True)
    found = utilisation_histogram(outcome.path, bins=25)
    table = pq.read_table(outcome.path)
    values = table.column("governing_utilisation").to_numpy()[table.column("valid").to_numpy()]
    expected, edges = np.histogram(values, bins=25, range=(min(values.min(), 1.0), values.max()))
    assert np.array_equal(found.counts, expected)
    assert np.allclose(found.edges, edges)
    assert found.cumulative[-1] == 1.0 and found.variants == len(values)


def test_the_first_rows_run_again_are_the_studys_own(tmp_path: Path) -> None:
    """A global design (Latin hypercube) and Monte Carlo: the verifier's re-run of the first
    rows gives the rows the study wrote."""
    from workbench.study.attached import CHECKED_ROWS, file_first_rows, first_rows

    for method in ("latin_hypercube", "monte_carlo"):
        plan = plan_text([diameter_input(kind="uniform", low=45, high=50)], count=5000, seed=4,
                         method=method)  # fmt: skip
        outcome = run_study(case_text(), plan, tmp_path / f"{method}.parquet", in_process=True)
        again = first_rows(case_text(), plan)
        assert again.num_rows == CHECKED_ROWS
        assert again.equals(file_first_rows(outcome.path))
