"""The README's case-file example is valid JSON, names only what it defines, and solves.

Read from README.md itself (the first ``json`` block under "## Case files"), so the example a user
copies is the one tested.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

from workbench.case.materials import LIBRARY
from workbench.design.checks import run_checks
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

README = Path(__file__).resolve().parents[1] / "README.md"


def readme_case() -> dict:
    text = README.read_text("utf-8")
    section = text.split("\n## Case files\n", 1)[1]
    block = re.search(r"```json\n(.*?)\n```", section, re.DOTALL)
    assert block is not None, "no ```json block under '## Case files'"
    return json.loads(block[1])  # plain JSON: no comments, no trailing commas


def test_readme_case_names_only_what_it_defines() -> None:
    case = readme_case()
    shafts = {shaft["id"] for shaft in case["shafts"]}
    named = {item["shaft"] for item in case["supports"]}
    named |= {end["shaft"] for gear in case["gears"] for end in (gear["a"], gear["b"])}
    named |= {
        load["shaft"]
        for load_case in case["load_cases"]
        for load in (*load_case.get("torques", []), *load_case.get("distributed", []))
    }
    assert named <= shafts
    materials = {
        item["material"]
        for shaft in case["shafts"]
        for segment in shaft["segments"]
        for item in (segment, *segment.get("layers", []))
        if "material" in item
    }
    assert materials <= set(case["materials"]) | set(LIBRARY)


def test_readme_case_solves_and_its_checks_run() -> None:
    """It solves, its checks run, and its combination is 1.5 × its load case (superposition)."""
    model = parse_case(readme_case())
    results = solve(model)
    assert {result.name for result in results} == {"service", "factored"}
    report = run_checks(results)
    assert len(report.checks) > 0
    service, factored = results["service"], results["factored"]
    # Superposition: the factored combination is 1.5 × the service case (README: combinations).
    assert (
        abs(factored.reactions - 1.5 * service.reactions).max()
        <= 1e-9 * abs(service.reactions).max()
    )
