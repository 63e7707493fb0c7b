"""A study's sampling and estimates against closed forms and scipy.stats.

Sources, each also named beside its check:

* Shigley's *Mechanical Engineering Design*, 9th ed., §3-12 (and Gere & Goodno, *Mechanics of
  Materials*, 8th ed., §3.3): τ = 16T/(πd³) in a solid round shaft. With the diameter normal,
  d ~ N(μ, σ), the utilisation U = τ/τ_a is a decreasing function of d, so
  P(U > u) = P(d < d(u)) = Φ((d(u) − μ)/σ) with d(u) = (16T/(π·τ_a·u))^(1/3) — the exact
  distribution of U by the monotone transformation of a random variable (any probability text,
  e.g. Papoulis & Pillai, *Probability, Random Variables and Stochastic Processes*, 4th ed.,
  §5-2). Φ is ``scipy.stats.norm.cdf``.
* ``scipy.stats.kstest``: the Kolmogorov–Smirnov test of the simulated U against that exact CDF.
* McKay, Beckman & Conover, *Technometrics* 21(2), 1979: a Latin hypercube of N points puts one
  point in each of N equal strata of every input's margin.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import numpy as np
import pyarrow.parquet as pq
import pytest
from scipy import stats

from tests.study_support import case_text, diameter_input, plan_text, study_cluster
from workbench.study.engine import run_study
from workbench.study.evaluate import evaluate_chunk
from workbench.study.plan import read_plan
from workbench.study.sampling import unit_design
from workbench.study.summary import summarise

__all__ = ["study_cluster"]  # the fixture, imported for the tests below

MEAN, STD = 50.0, 1.0  # mm
ALLOWABLE = 100e6  # Pa, the case's stated allowable shear stress
#: The torque that puts the diameter of utilisation 1 at the 10 % quantile of d (N·m).
TORQUE = ALLOWABLE * math.pi * ((MEAN + STD * stats.norm.ppf(0.10)) * 1e-3) ** 3 / 16.0


def exact_utilisation_cdf(u: np.ndarray) -> np.ndarray:
    """P(U ≤ u) for d ~ N(MEAN, STD) mm (Shigley §3-12 through the monotone transformation)."""
    diameter = (16.0 * TORQUE / (math.pi * ALLOWABLE * u)) ** (1.0 / 3.0) * 1e3  # mm
    return stats.norm.sf(diameter, MEAN, STD)


def _case() -> str:
    load = [{"name": "service", "torques": [{"shaft": "main", "x": 500, "torque": TORQUE}]}]
    return case_text(load_cases=load)


def test_exceedance_interval_holds_the_closed_form_and_ks_accepts(
    tmp_path: Path, study_cluster: Any
) -> None:
    count = 20_480
    plan = plan_text([diameter_input(kind="normal", mean=MEAN, std=STD)], count=count, seed=2024)
    out = tmp_path / "scatter.parquet"
    outcome = run_study(_case(), plan, out, client=study_cluster, chunk_size=8192)
    assert outcome.rows == count and not outcome.stopped
    summary = summarise(out, read_plan(plan))
    exact = stats.norm.cdf(((16.0 * TORQUE / (math.pi * ALLOWABLE)) ** (1 / 3) * 1e3 - MEAN) / STD)
    assert exact == pytest.approx(0.10, rel=1e-9)
    low, high = summary["exceedance"]["interval"]
    assert low <= exact <= high, (low, exact, high)
    # The shear-stress check is the one check: U = τ/τ_a exactly.
    utilisation = pq.read_table(out, columns=["governing_utilisation"]).column(0).to_numpy()
    diameters = pq.read_table(out, columns=[diameter_input()["path"]]).column(0).to_numpy()
    tau = 16.0 * TORQUE / (math.pi * (diameters * 1e-3) ** 3)
    np.testing.assert_allclose(utilisation, tau / ALLOWABLE, rtol=1e-10)
    result = stats.kstest(utilisation, exact_utilisation_cdf)
    assert result.pvalue > 0.01, result


def test_ks_refuses_a_wrong_distribution() -> None:
    """The KS check above can fail: a shifted mean (50.5 mm) is refused on the same count."""
    plan = plan_text([diameter_input(kind="normal", mean=MEAN + 0.5, std=STD)], count=8192, seed=1)
    table = evaluate_chunk(_case(), plan, 0, 8192)
    utilisation = table.column("governing_utilisation").to_numpy()
    assert stats.kstest(utilisation, exact_utilisation_cdf).pvalue < 1e-6


def test_latin_hypercube_margins_are_stratified() -> None:
    """McKay et al. 1979: each of N strata of each margin holds exactly one of the N points."""
    inputs = [
        diameter_input(kind="uniform", low=45, high=55),
        {"path": "load_cases[0].torques[0].torque",
         "distribution": {"kind": "triangular", "low": 1000, "mode": 2000, "high": 2500}},
        {"path": "materials.steel.shear_modulus",
         "distribution": {"kind": "lognormal", "median": 79300, "sigma": 0.02}},
    ]  # fmt: skip
    count = 1000
    plan = read_plan(plan_text(inputs, method="latin_hypercube", count=count, seed=5))
    unit = unit_design(plan)
    assert unit is not None
    for column in unit.T:
        assert np.array_equal(np.sort(np.floor(column * count).astype(int)), np.arange(count))
    # And through each input's distribution: one value per stratum of its own CDF (scipy.stats).
    table = evaluate_chunk(case_text(), plan_text(inputs, method="latin_hypercube", count=count,
                                                  seed=5), 0, count, unit)  # fmt: skip
    diameter = table.column(inputs[0]["path"]).to_numpy()
    strata = np.floor(stats.uniform(45, 10).cdf(diameter) * count).astype(int)
    assert np.array_equal(np.sort(strata), np.arange(count))
    torque = table.column(inputs[1]["path"]).to_numpy()
    strata = np.floor(stats.triang((2000 - 1000) / 1500, 1000, 1500).cdf(torque) * count)
    assert np.array_equal(np.sort(strata.astype(int)), np.arange(count))


def test_two_worker_cluster_rows_equal_the_local_run(tmp_path: Path, study_cluster: Any) -> None:
    """Rows on a LocalCluster of two worker processes, 4,096 a chunk, equal one in-process batch."""
    inputs = [
        diameter_input(kind="normal", mean=MEAN, std=4.0),
        {"path": "load_cases[0].torques[0].torque",
         "distribution": {"kind": "uniform", "low": 1500, "high": 2500}},
    ]  # fmt: skip
    count = 9 * 4096 + 123  # more chunks than the engine keeps in flight (3 per worker)
    plan = plan_text(inputs, count=count, seed=77)
    out = tmp_path / "cluster.parquet"
    workers = len(study_cluster.scheduler_info()["workers"])
    assert workers == 2
    outcome = run_study(_case(), plan, out, client=study_cluster, chunk_size=4096)
    assert outcome.rows == count
    on_cluster = pq.read_table(out)
    local = evaluate_chunk(_case(), plan, 0, count)
    assert on_cluster.num_rows == local.num_rows
    for name in local.column_names:
        assert (
            on_cluster.column(name).combine_chunks().equals(local.column(name).combine_chunks())
        ), name


@pytest.mark.parametrize("method", ["sobol", "halton"])
def test_quasi_random_margins_are_balanced(method: str) -> None:
    """One point of the first 2^m per interval [i/2^m, (i + 1)/2^m) of every margin.

    Sobol' points: I. M. Sobol', "On the distribution of points in a cube and the approximate
    evaluation of integrals", USSR Comput. Math. Math. Phys. 7(4), 1967 — the first 2^m points
    form a (t, m, s)-net, whose one-dimensional projections are stratified this way; Owen's
    scrambling (A. B. Owen, 1995) keeps it. Halton points in base b put one of the first b^m
    points in each interval of width b^−m of that margin (J. H. Halton, Numer. Math. 2, 1960);
    the first margin's base is 2.
    """
    inputs = [diameter_input(kind="uniform", low=45, high=55),
              {"path": "load_cases[0].torques[0].torque",
               "distribution": {"kind": "uniform", "low": 1000, "high": 2000}}]  # fmt: skip
    count = 1024
    plan = read_plan(plan_text(inputs, method=method, count=count, seed=8))
    unit = unit_design(plan)
    assert unit is not None and unit.shape == (count, 2)
    margins = unit.T if method == "sobol" else unit.T[:1]
    for column in margins:
        assert np.array_equal(np.sort(np.floor(column * count).astype(int)), np.arange(count))
