"""No recalled ("from memory") value or source reaches a record or a report's source line.

The project's rule: a value that is only remembered is written "from memory" in code, and never
reaches a signed record. A value that could not be read in a published table carries the one mark
:data:`workbench.design.caution.NOT_TRACED` instead.
"""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

import nbformat
import pytest

from workbench.case.materials import FROM_MEMORY
from workbench.design.caution import NOT_TRACED
from workbench.design.checks import check_document, check_text, run_checks
from workbench.design.concentration import ConcentrationFactor, keyseat_kts, shoulder_fillet_kts
from workbench.design.fatigue.notch import fatigue_concentration, notch_sensitivity_torsion
from workbench.design.sizing import SizingRequest, size_shafts, sizing_document, sizing_text
from workbench.design.transverse_hole import transverse_hole_kts
from workbench.record.demo import FEED_DRIVE_CASE, LINE_SHAFT_CASE, demo_notebook
from workbench.record.exporter import export_file
from workbench.record.verify import _EARLIER_VIBRATION_REFERENCE
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case


def _detailed_case() -> dict[str, Any]:
    """The feed drive with a cross hole, a charted notch with its radius, fillets and fatigue."""
    case = copy.deepcopy(FEED_DRIVE_CASE)
    segments = case["shafts"][0]["segments"]
    segments[0]["cross_hole_diameter"] = 8
    segments[2]["notch"] = {"kts": 2.1, "radius": 0.8, "description": "retaining-ring groove"}
    return case


CASES = {"demo": LINE_SHAFT_CASE, "feed drive": FEED_DRIVE_CASE, "details": _detailed_case()}


@pytest.mark.parametrize("name", list(CASES))
def test_record_html_never_says_from_memory(name: str, tmp_path: Path) -> None:
    path = tmp_path / "case.ipynb"
    nbformat.write(demo_notebook(CASES[name], executed=True), str(path))
    text, _ = export_file(path, execute=False)
    assert "<html" in text, name
    if name != "demo":
        assert "Kfs" in text, name  # the fatigue section, with its notch factors, was rendered
        # The verifier maps records signed earlier onto this wording: it must be the one written.
        assert _EARLIER_VIBRATION_REFERENCE[1] in text, name
    if name == "details":
        assert "cross hole" in text, name
    assert FROM_MEMORY not in text.lower(), name


def test_check_and_sizing_reports_never_say_from_memory() -> None:
    """The command's check report (text and JSON) and a preferred-size sizing of the details."""
    model = parse_case(_detailed_case())
    report = run_checks(solve(model))
    texts = [
        "\n".join(check.note for check in report.checks),
        check_text(report),
        json.dumps(check_document(report), ensure_ascii=False),
    ]
    outcome = size_shafts(model, SizingRequest.from_arguments(model, None, "R20"))
    texts += [sizing_text(outcome), json.dumps(sizing_document(outcome), ensure_ascii=False)]
    # The factors whose sources this guards were reported: hole, fillet, keyseat, notch.
    notes = texts[0]
    assert "Pilkey" in notes and "Norton" in notes and "Table 7-1" in notes and NOT_TRACED in notes
    assert "q = 0.77 from its radius" in notes  # the notch's q by the Neuber relation (fatigue)
    for text in texts:
        assert FROM_MEMORY not in text.lower()


def _reportable_factors() -> list[ConcentrationFactor]:
    """Every kind of factor, in range and out of it, with the fatigue factors built on them."""
    steel = 620e6
    factors = [
        keyseat_kts(),
        shoulder_fillet_kts(0.045, 0.038, 0.002),  # in range
        shoulder_fillet_kts(0.1, 0.038, 0.0002),  # D/d above 2, r/d below 0.02
        transverse_hole_kts(0.008, 0.045),  # in range
        transverse_hole_kts(0.03, 0.05),  # d/D above the fit's end
    ]
    sensitivities = [
        notch_sensitivity_torsion(0.0008, steel),
        notch_sensitivity_torsion(0.008, steel),  # beyond the chart's 4 mm
        notch_sensitivity_torsion(0.001, 200e6),  # below the fit's 50 kpsi
        notch_sensitivity_torsion(0.001, 2000e6),  # above 250 kpsi
    ]
    fatigue = [fatigue_concentration(kts, q) for kts in factors for q in sensitivities]
    return factors + fatigue


def test_no_source_that_reaches_a_report_says_from_memory() -> None:
    factors = _reportable_factors()
    sources = [factor.source for factor in factors]
    sources += [notch_sensitivity_torsion(0.001, 620e6).source]
    assert len(sources) == 26
    for source in sources:
        assert source, source
        assert FROM_MEMORY not in source.lower(), source
    # The transverse hole's untraced range carries the one mark, in every factor built on it.
    hole = transverse_hole_kts(0.008, 0.045)
    assert hole.source.endswith(NOT_TRACED)
    assert sum(NOT_TRACED in source for source in sources) == 2 + 2 * 4


def test_readme_quotes_the_one_untraced_mark() -> None:
    text = (Path(__file__).parents[1] / "README.md").read_text("utf-8")
    assert NOT_TRACED in " ".join(text.split())
