"""The study section's view: plan, counts, summary and drawing, from the signed study alone.

Built only from the study the record signs (:func:`workbench.record.study.study_payload`) and
the case's units, so the verifier builds it again from the payload and compares.
"""

from __future__ import annotations

from typing import Any

from workbench.case.declaration import key_quantities
from workbench.record.drawing import data_uri, nice
from workbench.record.study_figures import study_histogram_svg
from workbench.record.view_model.common import unit_label
from workbench.study.evaluate import parse_path
from workbench.study.summary import PERCENTILES


def _unit(units: Any, path: str) -> str:
    last = parse_path(path)[-1]
    quantity = key_quantities().get(str(last)) if isinstance(last, str) else None
    return unit_label(units, quantity) if quantity else "–"


def _number(value: Any) -> str:
    return "–" if value is None else nice(float(value))


def _parameters(distribution: dict[str, Any]) -> str:
    shown = []
    for name, value in distribution.items():
        if name == "kind":
            continue
        if isinstance(value, list):
            text = ", ".join(_number(v) for v in value)
        else:
            text = _number(value) if isinstance(value, (int, float)) else str(value)
        shown.append(f"{name} {text}")
    return "; ".join(shown)


def study_view(study: dict[str, Any], units: Any) -> dict[str, Any]:
    """What ``sections/study.html.j2`` shows."""
    plan, summary = study["plan"], study["summary"]
    sampling = plan.get("sampling") or {}
    inputs = [
        [entry["path"], entry["distribution"]["kind"], _parameters(entry["distribution"]),
         _unit(units, entry["path"])]
        for entry in plan["inputs"]
    ]  # fmt: skip
    exceedance = summary["exceedance"]
    interval = exceedance.get("interval")
    percentiles = summary["percentiles"]
    names = [f"p{p:g}" for p in PERCENTILES]
    paths = [entry["path"] for entry in plan["inputs"]]
    sobol = summary.get("sobol")
    correlations = summary["rank_correlations"]
    return {
        "inputs": inputs,
        "sampling": [
            ["method", str(sampling.get("method", "monte_carlo")).replace("_", " ")],
            ["variants", f"{summary['total']:,}"],
            ["seed", str(sampling.get("seed", 0))],
            *(
                [["levels per input", str(sampling.get("levels", 5))]]
                if sampling.get("method") == "grid"
                else []
            ),
        ],
        "counts": [
            ["variants run", f"{summary['rows']:,} of {summary['total']:,}"],
            ["valid models", f"{summary['valid']:,}"],
            ["invalid models", f"{summary['invalid']['count']:,}"],
        ],
        "invalid": [
            [entry["field"], f"{entry['count']:,}", entry["example"]]
            for entry in summary["invalid"]["by_field"]
        ],
        "fraction": _number(exceedance["fraction"]),
        "exceeding": f"{exceedance['exceeding']:,} of {exceedance['variants']:,}",
        "interval": f"[{_number(interval[0])}, {_number(interval[1])}]" if interval else "",
        "why_no_interval": exceedance.get("why_no_interval", ""),
        "percentile_names": names,
        "percentiles": [
            [name, *(_number(percentiles[name].get(p)) for p in names)]
            for name in sorted(percentiles)
        ],
        "correlations": [
            [name, _number(correlations.get(name, {}).get("governing_utilisation"))]
            for name in paths
        ],
        "sobol": [
            [name, _number(first), _number(total)]
            for name, first, total in zip(sobol["inputs"], sobol["S1"], sobol["ST"], strict=True)
        ]
        if sobol and "S1" in sobol
        else [],
        "sobol_why_not": (sobol or {}).get("why_not", ""),
        "worst": [
            [
                str(row["variant"]),
                _number(row["governing_utilisation"]),
                str(row["governing_check"]),
                *(_number(row["inputs"].get(p)) for p in paths),
            ]
            for row in summary["worst"]
        ],
        "input_paths": paths,
        "figure": data_uri(
            study_histogram_svg(study["histogram"]["edges"], study["histogram"]["counts"])
        ),
        "left_out": summary["left_out"],
        "rows_file": study["rows_file"],
        "rows_sha256": study["rows_sha256"],
        "rows_digest": study["rows_digest"],
        "checked_rows": study["checked_rows"],
    }
