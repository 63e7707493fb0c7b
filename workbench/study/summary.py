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
import pyarrow.compute as pc
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
    source = pq.ParquetFile(path)  # read column by column: memory of a few columns at a time

    def column(name: str) -> Any:
        return source.read(columns=[name]).column(0)

    inputs = input_names(plan)
    outputs = [
        name
        for name in source.schema_arrow.names
        if name not in _NOT_OUTPUTS and name not in inputs
    ]
    valid = column("valid").to_numpy()
    rows = source.metadata.num_rows
    utilisation = column("governing_utilisation").to_numpy()
    governing = utilisation[valid]
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
        values = column(name).to_numpy()[valid]
        values = values[np.isfinite(values)]
        found = (
            np.percentile(values, PERCENTILES) if len(values) else np.full(len(PERCENTILES), np.nan)
        )
        percentiles[name] = dict(zip([f"p{p:g}" for p in PERCENTILES], _finite(found), strict=True))
    correlations = _rank_correlations(column, inputs, outputs, valid)
    order = np.argsort(np.where(valid, utilisation, -np.inf))[::-1][: plan.worst]
    order = order[valid[order]].tolist()
    chosen = source.read(columns=["variant", "governing_check", *inputs]).take(order).to_pylist()
    worst = [
        {"variant": row["variant"], "governing_utilisation": float(utilisation[i]),
         "governing_check": row["governing_check"],
         "inputs": {name: row[name] for name in inputs}}
        for i, row in zip(order, chosen, strict=True)
    ]  # fmt: skip
    reasons = pc.drop_null(column("reason")).to_pylist()
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


def _centred_ranks(values: np.ndarray) -> np.ndarray | None:
    """Average ranks (ties shared), centred and scaled to unit length; ``None`` if all tie."""
    ranks = stats.rankdata(values)
    ranks -= ranks.mean()
    length = float(np.sqrt(ranks @ ranks))
    return ranks / length if length > 0.0 else None


def _rank_correlations(
    column: Any, inputs: list[str], outputs: list[str], valid: np.ndarray
) -> dict[str, dict[str, float | None]]:
    """Spearman's ρ of every input with every output, over the valid variants.

    ρ is the Pearson correlation of the average ranks [2]_: each column is ranked once, and an
    output's ρ with every input is one product of its centred ranks with theirs — an output at a
    time, so memory holds the inputs' ranks and one output's. Variants where an output is not
    finite are left out of that output's coefficients (the inputs re-ranked without them).
    """
    if valid.sum() < 3:
        return {}
    drawn = [column(name).to_numpy()[valid] for name in inputs]
    ranked = [_centred_ranks(values) for values in drawn]
    found: dict[str, dict[str, float | None]] = {name: {} for name in inputs}
    for name in outputs:
        values = column(name).to_numpy()[valid]
        finite = np.isfinite(values)
        everywhere = bool(finite.all())
        own = _centred_ranks(values[finite]) if finite.sum() >= 3 else None
        for number, input_name in enumerate(inputs):
            other = ranked[number] if everywhere else _centred_ranks(drawn[number][finite])
            rho = None if own is None or other is None else float(np.clip(own @ other, -1.0, 1.0))
            found[input_name][name] = rho
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
