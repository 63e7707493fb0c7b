"""A study's summary, read back from its parquet file: exceedance, percentiles, drivers, worst.

* The probability that the governing utilisation exceeds 1, over the valid variants. For Monte
  Carlo sampling, with its 95 % confidence interval (Clopper–Pearson, exact, through
  ``scipy.stats.binomtest(...).proportion_ci``): the variants are independent draws, so the count
  is binomial. Latin hypercube, quasi-random and grid designs are not independent draws (they
  spread the variants on purpose), so the binomial interval does not hold: the fraction is given
  without one, and the summary says why.
* Percentiles of every output; Spearman rank correlations of every input with every output
  (``scipy.stats.spearmanr``, valid variants); the variants of highest governing utilisation;
  the invalid variants counted by the field their reason names, one message each as example.

References
----------
.. [1] C. J. Clopper and E. S. Pearson, "The use of confidence or fiducial limits illustrated
   in the case of the binomial", *Biometrika* 26(4), 1934; scipy.stats.binomtest, SciPy 1.17.
.. [2] C. Spearman, "The proof and measurement of association between two things", *American
   Journal of Psychology* 15(1), 1904; scipy.stats.spearmanr, SciPy 1.17.
"""

from __future__ import annotations

import os
from collections import Counter
from typing import Any

import numpy as np
import pyarrow.parquet as pq
from scipy import stats

from workbench.design.caution import CAUTION
from workbench.study.evaluate import LEFT_OUT, input_names
from workbench.study.plan import Plan, to_builtins

#: Percentiles reported of every output.
PERCENTILES = (1.0, 5.0, 25.0, 50.0, 75.0, 95.0, 99.0)
#: Confidence level of the exceedance interval.
CONFIDENCE = 0.95
_NOT_OUTPUTS = {"variant", "valid", "reason", "governing_check"}
NO_INTERVAL = (
    "no confidence interval: the {method} design does not draw variants independently, so the "
    "binomial interval of Monte Carlo sampling does not hold for its fraction"
)


def _finite(values: np.ndarray) -> Any:
    """Plain JSON numbers: NaN and infinities as ``None``."""
    return [float(v) if np.isfinite(v) else None for v in np.atleast_1d(values)]


def summarise(path: str | os.PathLike[str], plan: Plan, total: int | None = None) -> dict[str, Any]:
    """The summary of a study's parquet file (plain JSON values).

    Parameters
    ----------
    path
        The parquet file :func:`~workbench.study.engine.run_study` wrote.
    plan
        Its plan.
    total
        Variants the plan holds, when fewer rows were written (a stopped study).
    """
    table = pq.read_table(path)
    inputs = input_names(plan)
    outputs = [
        name for name in table.column_names if name not in _NOT_OUTPUTS and name not in inputs
    ]
    valid = table.column("valid").to_numpy(zero_copy_only=False)
    rows = table.num_rows
    governing = table.column("governing_utilisation").to_numpy()[valid]
    exceeding = int(np.count_nonzero(governing > 1.0))
    tested = len(governing)
    exceedance: dict[str, Any] = {"variants": tested, "exceeding": exceeding,
                                  "fraction": exceeding / tested if tested else None}  # fmt: skip
    if plan.sampling.method == "monte_carlo" and tested:
        interval = stats.binomtest(exceeding, tested).proportion_ci(CONFIDENCE, method="exact")
        exceedance["confidence"] = CONFIDENCE
        exceedance["interval"] = [float(interval.low), float(interval.high)]
    else:
        exceedance["interval"] = None
        exceedance["why_no_interval"] = NO_INTERVAL.format(
            method=plan.sampling.method.replace("_", " ")
        )
    percentiles = {}
    for name in outputs:
        values = table.column(name).to_numpy()[valid]
        values = values[np.isfinite(values)]
        found = (
            np.percentile(values, PERCENTILES) if len(values) else np.full(len(PERCENTILES), np.nan)
        )
        percentiles[name] = dict(zip([f"p{p:g}" for p in PERCENTILES], _finite(found), strict=True))
    correlations = _rank_correlations(table, inputs, outputs, valid)
    utilisation = table.column("governing_utilisation").to_numpy()
    order = np.argsort(np.where(valid, utilisation, -np.inf))[::-1][: plan.worst]
    order = order[valid[order]]
    worst = [
        {"variant": int(table.column("variant")[int(i)].as_py()),
         "governing_utilisation": float(utilisation[i]),
         "governing_check": table.column("governing_check")[int(i)].as_py(),
         "inputs": {name: float(table.column(name)[int(i)].as_py()) for name in inputs}}
        for i in order.tolist()
    ]  # fmt: skip
    reasons = table.column("reason").to_pylist() if not valid.all() else []
    by_field: Counter[str] = Counter()
    example: dict[str, str] = {}
    for reason in reasons:  # the invalid variants' messages, counted by the field they name
        if reason is not None:
            field = reason.split(": ", 1)[0]
            by_field[field] += 1
            example.setdefault(field, reason)
    return {
        "plan": to_builtins(plan),
        "rows": rows,
        "total": total if total is not None else rows,
        "valid": int(valid.sum()),
        "invalid": {
            "count": int(rows - valid.sum()),
            "by_field": [
                {"field": f, "count": n, "example": example[f]} for f, n in by_field.most_common()
            ],
        },
        "exceedance": exceedance,
        "percentiles": percentiles,
        "rank_correlations": correlations,
        "worst": worst,
        "left_out": LEFT_OUT,
        "caution": CAUTION,
    }


def _rank_correlations(
    table: Any, inputs: list[str], outputs: list[str], valid: np.ndarray
) -> dict[str, dict[str, float | None]]:
    """Spearman's ρ of every input with every output, over the valid variants."""
    if valid.sum() < 3:
        return {}
    columns = np.column_stack(
        [table.column(name).to_numpy()[valid] for name in (*inputs, *outputs)]
    )
    columns = columns[np.isfinite(columns).all(axis=1)]
    if len(columns) < 3:
        return {}
    spread = np.std(columns, axis=0) > 0.0
    if not spread[: len(inputs)].any() or not spread[len(inputs) :].any():
        return {}
    with np.errstate(invalid="ignore", divide="ignore"):
        rho = stats.spearmanr(columns).statistic
    if np.ndim(rho) == 0:  # two columns: scipy gives the one coefficient
        rho = np.array([[1.0, rho], [rho, 1.0]])
    found: dict[str, dict[str, float | None]] = {}
    for i, name in enumerate(inputs):
        row = rho[i, len(inputs) :]
        shown = np.where(spread[i] & spread[len(inputs) :], row, np.nan)
        found[name] = dict(zip(outputs, _finite(shown), strict=True))
    return found


def summary_text(summary: dict[str, Any]) -> str:
    """The summary as readable text."""
    lines = [f"Study: {summary['rows']} of {summary['total']} variants, {summary['valid']} valid"]
    exceedance = summary["exceedance"]
    if exceedance["fraction"] is not None:
        text = f"P(governing utilisation > 1) = {exceedance['fraction']:.4g} ({exceedance['exceeding']} of {exceedance['variants']})"
        if exceedance.get("interval"):
            low, high = exceedance["interval"]
            text += f", {exceedance['confidence']:.0%} interval [{low:.4g}, {high:.4g}] (Clopper-Pearson)"
        lines.append(text)
        if exceedance.get("why_no_interval"):
            lines.append(f"  {exceedance['why_no_interval']}")
    lines.append("")
    lines.append("Percentiles (" + ", ".join(f"p{p:g}" for p in PERCENTILES) + "):")
    for name, values in summary["percentiles"].items():
        shown = ", ".join("-" if v is None else f"{v:.4g}" for v in values.values())
        lines.append(f"  {name}: {shown}")
    if summary["rank_correlations"]:
        lines.append("")
        lines.append("Rank correlations (Spearman) with governing_utilisation:")
        for name, row in summary["rank_correlations"].items():
            value = row.get("governing_utilisation")
            lines.append(f"  {name}: {'-' if value is None else f'{value:+.3f}'}")
    if "sobol" in summary:
        lines.append("")
        lines.append(summary_sobol_text(summary["sobol"]))
    if summary["worst"]:
        lines.append("")
        lines.append("Worst variants:")
        for row in summary["worst"]:
            lines.append(
                f"  #{row['variant']}: {row['governing_utilisation']:.4g} ({row['governing_check']})"
            )
    invalid = summary["invalid"]
    lines.append("")
    lines.append(f"Invalid variants: {invalid['count']}")
    for entry in invalid["by_field"]:
        lines.append(f"  {entry['count']} × {entry['example']}")
    lines.append("")
    lines.append(f"Left out: {summary['left_out']}.")
    lines.append(f"Caution: {summary['caution']}")
    return "\n".join(lines) + "\n"


def summary_sobol_text(sobol: dict[str, Any]) -> str:
    """The Sobol indices as text lines (or why they were not computed)."""
    if "why_not" in sobol:
        return f"Sobol indices: not computed ({sobol['why_not']})"
    lines = [
        f"Sobol indices of governing_utilisation (SALib, {sobol['variants']} variants): S1, ST"
    ]
    for name, first, total in zip(sobol["inputs"], sobol["S1"], sobol["ST"], strict=True):
        lines.append(f"  {name}: {first:.3f}, {total:.3f}")
    return "\n".join(lines)
