"""The study summary against scipy.stats: Spearman's ρ, percentiles, the exceedance interval."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pyarrow.parquet as pq
import pytest
from scipy import stats

from tests.study_support import case_text, diameter_input, plan_text
from workbench.study.evaluate import evaluate_chunk
from workbench.study.plan import read_plan
from workbench.study.summary import PERCENTILES, summarise, summary_text

INPUTS = [
    diameter_input(kind="normal", mean=50, std=20),  # P(d < 0) = Φ(−2.5) ≈ 0.6 %: invalid variants
    {"path": "load_cases[0].torques[0].torque", "distribution": {"kind": "values", "values": [1500, 2000, 2500]}},
]  # fmt: skip


@pytest.fixture(scope="module")
def written(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, str]:
    plan = plan_text(INPUTS, count=8192, seed=21)
    path = tmp_path_factory.mktemp("summary") / "rows.parquet"
    pq.write_table(evaluate_chunk(case_text(), plan, 0, 8192), path)
    return path, plan


def test_rank_correlations_are_scipy_spearmanr(written: tuple[Path, str]) -> None:
    path, plan = written
    summary = summarise(path, read_plan(plan))
    table = pq.read_table(path)
    valid = table.column("valid").to_numpy()
    assert 0 < (~valid).sum() < 200  # a few negative diameters, counted, not a crash
    for name in (INPUTS[0]["path"], INPUTS[1]["path"]):
        x = table.column(name).to_numpy()[valid]
        for output in ("governing_utilisation", "reaction.service.0", "twist.service.main"):
            y = table.column(output).to_numpy()[valid]
            expected = stats.spearmanr(x, y).statistic  # ties in the torque's three values
            assert summary["rank_correlations"][name][output] == pytest.approx(expected, abs=1e-12)


def test_percentiles_exceedance_and_invalid_counts(written: tuple[Path, str]) -> None:
    path, plan = written
    summary = summarise(path, read_plan(plan))
    table = pq.read_table(path)
    valid = table.column("valid").to_numpy()
    utilisation = table.column("governing_utilisation").to_numpy()[valid]
    found = list(summary["percentiles"]["governing_utilisation"].values())
    np.testing.assert_allclose(found, np.percentile(utilisation, PERCENTILES), rtol=1e-12)
    exceeding = int((utilisation > 1).sum())
    interval = stats.binomtest(exceeding, len(utilisation)).proportion_ci(0.95, method="exact")
    assert summary["exceedance"]["interval"] == [interval.low, interval.high]
    by_field = summary["invalid"]["by_field"]
    assert by_field[0]["field"] == "shafts[0].segments[0].section.diameter"
    assert by_field[0]["count"] == summary["invalid"]["count"] == int((~valid).sum())
    worst = summary["worst"]
    assert [row["governing_utilisation"] for row in worst] == sorted(utilisation, reverse=True)[:10]
    text = summary_text(summary)
    assert f"Invalid variants: {int((~valid).sum())}" in text and "Caution:" in text
