"""``workbench compare``: two signed revisions of the demo, one diameter changed.

The demo drives the feeder through a gear from the auger; the feeder's torque is fixed by its
own loads and the gear ratio (statically determinate), so a diameter of the auger moves the
auger's results only. The auger is held at both ends (fixed and spring): changing its stiffness
moves the split of the same torques between its two supports, so the two reactions of every
result change by equal and opposite amounts (equilibrium of the shaft, Σ reactions + Σ applied
= 0, with the applied and gear torques unchanged).
"""

from __future__ import annotations

import json
from pathlib import Path

import nbformat
import pytest

from workbench import cli
from workbench.cli.solve import DEMO_CASE
from workbench.record.compare import compare_records
from workbench.record.demo import demo_notebook
from workbench.record.exporter import export_file
from workbench.signing import write_key_pair

SIGNED_AT = "2026-01-05T09:00:00Z"
DIAMETER = "shafts['auger'].segments[0].section.diameter"


@pytest.fixture(scope="module")
def key(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    return write_key_pair(tmp_path_factory.mktemp("keys"))


def _record(
    folder: Path, name: str, key: Path, diameter: float, title: str = "", material: str = ""
) -> Path:
    case = json.loads(DEMO_CASE.read_text("utf-8"))
    case["shafts"][0]["segments"][0]["section"]["diameter"] = diameter
    if title:
        case["title"] = title
    if material:
        case["shafts"][0]["segments"][0]["material"] = material
    notebook = folder / f"{name}.ipynb"
    nbformat.write(demo_notebook(case, executed=True), str(notebook))
    text, _ = export_file(notebook, key_file=key, execute=False, signed_at=SIGNED_AT)
    path = folder / f"{name}.html"
    path.write_text(text, encoding="utf-8", newline="")
    return path


@pytest.fixture(scope="module")
def revisions(tmp_path_factory: pytest.TempPathFactory, key: tuple[Path, Path]) -> list[Path]:
    folder = tmp_path_factory.mktemp("revisions")
    return [_record(folder, name, key[0], d) for name, d in (("a", 60), ("b", 65), ("c", 70))]


def test_diff_names_exactly_the_changed_diameter_and_the_results_it_moved(
    revisions: list[Path], key: tuple[Path, Path]
) -> None:
    comparison = compare_records(revisions[0], revisions[1], key[1])
    assert [(c.group, c.item, c.old, c.new, c.change) for c in comparison.inputs] == [
        ("dimensions", DIAMETER, 60, 65, 5)
    ]
    results = comparison.results
    assert results
    assert all("'feeder'" not in change.item for change in results)
    reactions = [c for c in results if c.group == "reactions"]
    by_result: dict[str, float] = {}
    for change in reactions:
        name = change.item.split("), ", 1)[1]
        by_result[name] = by_result.get(name, 0.0) + change.change
    assert len(by_result) == 4  # 2 load cases + 2 combinations, both supports each
    assert len(reactions) == 8
    for total in by_result.values():
        assert abs(total) < 1e-9 * max(abs(c.new) for c in reactions)
    # A stiffer end segment draws torque to the fixed support at x = 0.
    fixed = [c for c in reactions if "support 0" in c.item]
    assert all(abs(c.new) > abs(c.old) for c in fixed)
    # The keyseat stress Kts·16T/(πd³) (Shigley, keyseat Kts on the nominal stress) of the end
    # segment governs in 'jam, factored', where T is the fixed support's reaction: the
    # utilisation moves by |R0'|/|R0| · (60/65)³ and stays above 1, so no verdict changes.
    keyseat = next(c for c in results if c.item.endswith("keyseat_stress of 'auger' segment 0"))
    jam = next(c for c in fixed if c.item.endswith("'jam, factored'"))
    expected = keyseat.old * abs(jam.new) / abs(jam.old) * (60 / 65) ** 3
    assert keyseat.new == pytest.approx(expected, rel=1e-9)
    assert keyseat.new > 1.0
    assert not [c for c in results if c.group == "verdicts"]


def test_cli_text_json_and_html_show_a_verdict_that_flips(
    revisions: list[Path], key: tuple[Path, Path], tmp_path: Path, capsys: pytest.CaptureFixture
) -> None:
    page = tmp_path / "diff.html"
    argv = ["compare", str(revisions[0]), str(revisions[2]), "--public-key", str(key[1])]
    assert cli.main([*argv, "-o", str(page)]) == 0
    text = capsys.readouterr().out
    assert f"dimensions: {DIAMETER}: 60 → 70, change +10 (+16.7 %)" in text
    assert "verdicts: verdict: keyseat_stress of 'auger' segment 0: FAIL → pass" in text
    assert "verdicts: verdict: overall: FAIL → pass" in text
    assert cli.main([*argv, "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert [item["item"] for item in document["inputs"]] == [DIAMETER]
    verdicts = {
        i["item"]: (i["old"], i["new"]) for i in document["results"] if i["group"] == "verdicts"
    }
    assert verdicts["verdict: overall"] == ("FAIL", "pass")
    html = page.read_text("utf-8")
    assert "Content-Security-Policy" in html and "<script" not in html
    assert DIAMETER.replace("'", "&#39;") in html


def test_html_escapes_names_from_the_case(key: tuple[Path, Path], tmp_path: Path) -> None:
    hostile = "<script>alert(1)</script>"
    a = _record(tmp_path, "a", key[0], 60, title=f"Drive {hostile}")
    b = _record(tmp_path, "b", key[0], 60, title="Drive")
    page = tmp_path / "diff.html"
    assert cli.main(["compare", str(a), str(b), "-o", str(page)]) == 0
    html = page.read_text("utf-8")
    assert hostile not in html and "&lt;script&gt;" in html


def test_a_record_that_does_not_verify_is_bad_input(
    revisions: list[Path], tmp_path: Path, capsys: pytest.CaptureFixture
) -> None:
    altered = tmp_path / "altered.html"
    text = revisions[1].read_text("utf-8")
    altered.write_text(text.replace("Cider press", "Cider pres", 1), "utf-8")
    assert cli.main(["compare", str(revisions[0]), str(altered)]) == 2
    error = capsys.readouterr().err.strip()
    assert error.startswith(f"{altered}: does not verify, so it cannot be compared")
    assert "\n" not in error and len(error) <= 200


def test_a_library_material_swapped_lists_its_values(
    key: tuple[Path, Path], tmp_path: Path
) -> None:
    # The case names a library material; its values come from the library, so they are listed.
    # Shigley's Mechanical Engineering Design, 9th ed., Table A-20: 1020 HR Sy 210, Su 380 MPa;
    # 1045 CD Sy 530, Su 630 MPa.
    a = _record(tmp_path, "a", key[0], 60, material="steel-1020-hr")
    b = _record(tmp_path, "b", key[0], 60, material="steel-1045-cd")
    comparison = compare_records(a, b, key[1])
    inputs = {c.item: (c.old, c.new) for c in comparison.inputs}
    assert inputs["shafts['auger'].segments[0].material"] == ("steel-1020-hr", "steel-1045-cd")
    assert inputs["library material 'steel-1020-hr': yield_strength"] == (
        pytest.approx(210.0),
        None,
    )
    assert inputs["library material 'steel-1045-cd': ultimate_strength"] == (
        None,
        pytest.approx(630.0),
    )
    assert {c.group for c in comparison.inputs} == {"materials"}
