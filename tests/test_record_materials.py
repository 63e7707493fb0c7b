"""Material data a checker can trace: every library value cites its table or is marked typical,
a record asks for the mill certificate of a typical material, and no recalled value is signed."""

from __future__ import annotations

import copy
from pathlib import Path

import nbformat
import pytest

from workbench import cli
from workbench.case.materials import FROM_MEMORY, LIBRARY, PROVENANCE, TYPICAL
from workbench.case.reference import (
    LIBRARY_BEGIN,
    LIBRARY_END,
    library_markdown,
    readme_section,
)
from workbench.record.demo import LINE_SHAFT_CASE, demo_notebook
from workbench.record.exporter import export_file

VALUE_FIELDS = (
    "shear_modulus",
    "elastic_modulus",
    "poisson_ratio",
    "density",
    "yield_strength",
    "ultimate_strength",
)


@pytest.mark.parametrize("key", sorted(LIBRARY))
def test_every_library_value_cites_a_table_or_is_marked_typical(key: str) -> None:
    material = LIBRARY[key]
    given = {name for name in VALUE_FIELDS if getattr(material, name) is not None}
    assert set(PROVENANCE[key]) == given
    for name in given:
        reference = PROVENANCE[key][name]
        # A citation names its table and its edition, or says the copy read did not show it.
        edition = "ed.," in reference or "(edition not shown in the copy read)" in reference
        cited = edition and ("Table" in reference or "table" in reference)
        assert reference == TYPICAL or cited, (key, name, reference)
        assert reference in material.source
    assert FROM_MEMORY not in material.source.lower()


def _notebook(tmp_path: Path, materials: dict, material: str) -> Path:
    case = copy.deepcopy(LINE_SHAFT_CASE)
    case["materials"] = materials
    for shaft in case["shafts"]:
        for segment in shaft["segments"]:
            segment["material"] = material
    path = tmp_path / "case.ipynb"
    nbformat.write(demo_notebook(case, executed=True), str(path))
    return path


def test_export_refuses_a_material_whose_source_is_from_memory(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    recalled = {"shear_modulus": 79300, "yield_strength": 350, "source": "Handbook (from memory)"}
    notebook = _notebook(tmp_path, {"steel": recalled}, "steel")
    out = tmp_path / "record.html"
    assert cli.main(["export", str(notebook), "-o", str(out)]) == 2
    error = capsys.readouterr().err.strip()
    assert error.startswith("materials.steel.source: says its values are 'from memory'")
    assert len(error) <= 200
    assert not out.exists()


def test_record_asks_for_the_mill_certificate_of_a_typical_library_material(
    tmp_path: Path,
) -> None:
    assert TYPICAL in LIBRARY["steel-1045-cd"].source
    text, _ = export_file(_notebook(tmp_path, {}, "steel-1045-cd"), execute=False)
    assert "Mill certificate required</strong> for steel-1045-cd" in text
    assert TYPICAL in text


def test_record_of_fully_cited_library_material_asks_for_no_certificate(tmp_path: Path) -> None:
    assert TYPICAL not in LIBRARY["steel-a36"].source
    text, _ = export_file(_notebook(tmp_path, {}, "steel-a36"), execute=False)
    assert "Mill certificate required" not in text


def test_readme_lists_the_library_as_generated_from_it() -> None:
    text = (Path(__file__).parents[1] / "README.md").read_text("utf-8")
    section = library_markdown()
    assert readme_section(text, LIBRARY_BEGIN, LIBRARY_END) == section, (
        "README library section is stale: run `python -m workbench.case.reference --readme README.md`"
    )
    for key, material in LIBRARY.items():
        assert f"`{key}`" in section and material.source.split(":")[0] in section
