"""The calculation record of a case whose open sections warp: method, equations, results, checks.

The numbers come from the solver and the checks, which are held to outside sources elsewhere
(tests/validation/test_warping_system.py, tests/validation/test_warping_stresses.py,
tests/test_warping_check_wiring.py); here the record is held to showing them, verifying, and
saying what it does not cover. The equations are those of V. Z. Vlasov, *Thin-Walled Elastic
Beams*, 2nd ed., 1961 (restrained torsion), as the record cites them.
"""

from __future__ import annotations

import copy
import html
import re
from pathlib import Path

import nbformat
import pytest

from tests.test_warping_check_wiring import GIRDER, POLYGON_I, _polygon_girder
from workbench.case.materials import FROM_MEMORY
from workbench.design.independent import WARPING_NOT_COVERED
from workbench.record.demo import LINE_SHAFT_CASE, demo_notebook
from workbench.record.exporter import export_file
from workbench.record.verify import verify_record
from workbench.signing import write_key_pair
from workbench.solver.warping_supports import UNSTATED_RESTRAINT

SIGNED_AT = "2025-03-01T12:00:00Z"


def _unstated_girder() -> dict:
    """The girder restrained at x = 0; the fixed support at its end states nothing."""
    case = copy.deepcopy(GIRDER)
    del case["supports"][1]["warping"]
    return case


@pytest.fixture(scope="module")
def signed(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path, str]:
    base = tmp_path_factory.mktemp("warping-record")
    private, public = write_key_pair(base / "keys")
    notebook = base / "girder.ipynb"
    nbformat.write(demo_notebook(_unstated_girder(), executed=True), str(notebook))
    text, _ = export_file(notebook, key_file=private, execute=False, signed_at=SIGNED_AT)
    path = base / "record.html"
    path.write_text(text, encoding="utf-8", newline="")
    return path, public, text


def _section(text: str, ident: str) -> str:
    """The readable text of one section of the record (tags and pictures' data left out)."""
    start = text.index(f'id="{ident}"')
    end = text.index("<section", start)
    words = re.sub(r"<[^>]+>", " ", re.sub(r'src="data:[^"]*"', "", text[start:end]))
    return html.unescape(re.sub(r"\s+", " ", words))


def test_the_record_of_a_warping_case_verifies(signed: tuple[Path, Path, str]) -> None:
    path, public, _ = signed
    outcome = verify_record(path, public)
    assert outcome.ok, outcome.lines()
    assert "every number agrees" in "\n".join(outcome.lines())


def test_it_states_the_method_and_the_equations(signed: tuple[Path, Path, str]) -> None:
    method = _section(signed[2], "method")
    assert "Open sections that warp (E·Cw > 0) are solved in restrained torsion" in method
    assert "warping of non-circular sections is free (no warping restraint)" not in method
    section = _section(signed[2], "warping")
    assert "Vlasov" in section
    assert "the rotation θ and the rate of twist θ′ at every node" in section
    assert "exact element of G·J and E·Cw" in section
    assert '"restrained" holds the section\'s warping there (θ′ = 0)' in section
    for reading in (
        "G·J·θ″ − E·Cw·θ⁗ = −m(x)",
        "T = T_sv + T_w = G·J·θ′ − E·Cw·θ‴",
        "B = −E·Cw·θ″",
        "σ_w = E·Wn·θ″",
        "τ_w = E·Sw·θ‴/t",
        "τ_sv = G·t·θ′",
    ):
        assert f'alt="{html.escape(reading)}"' in signed[2], reading


def test_it_shows_the_peaks_restraints_and_a_diagram(signed: tuple[Path, Path, str]) -> None:
    section = _section(signed[2], "warping")
    assert "largest |B| [N·m·mm]" in section
    assert "largest |T_sv| [N·m]" in section and "largest |T_w| [N·m]" in section
    assert "restrained" in section and "free (not stated)" in section
    assert "bimoment and the two parts of the torque along shaft girder" in signed[2]


def test_it_shows_the_checks_with_what_was_added(signed: tuple[Path, Path, str]) -> None:
    checks = _section(signed[2], "checks")
    for kind in ("warping_normal_stress", "warping_shear_stress", "warping_combined_stress"):
        assert kind in checks
    assert "What each warping check added, and where it governs" in checks
    assert "σ = |E·Wn·θ″| + 0 MPa from bending" in checks
    assert "SOME CHECKS FAIL — governing: warping_normal_stress" in checks


def test_it_warns_of_the_unstated_restraint_and_what_is_not_covered(
    signed: tuple[Path, Path, str],
) -> None:
    text = signed[2]
    assert UNSTATED_RESTRAINT in _section(text, "warping")
    assert UNSTATED_RESTRAINT in _section(text, "warnings")
    assert WARPING_NOT_COVERED in _section(text, "warping")
    assert WARPING_NOT_COVERED in _section(text, "hand-check")
    assert FROM_MEMORY not in text.lower()


def test_a_round_case_has_no_warping_section(tmp_path: Path) -> None:
    notebook = tmp_path / "round.ipynb"
    nbformat.write(demo_notebook(LINE_SHAFT_CASE, executed=True), str(notebook))
    text, _ = export_file(notebook, execute=False, signed_at=SIGNED_AT)
    assert 'id="warping"' not in text
    method = _section(text, "method")
    assert "warping of non-circular sections is free (no warping restraint)" in method
    assert "What each warping check added" not in text
    assert "warping_normal_stress" not in text


def test_a_polygon_section_that_warps_is_described_where_its_stresses_are_taken(
    tmp_path: Path, signed: tuple[Path, Path, str]
) -> None:
    # The girder's I drawn as a polygon: the method says where its stresses are taken and that
    # its warping shear is not computed; the record of the open I does not.
    sentence = "Sections by finite elements (polygon, dxf) that warp have no wall mid-line"
    notebook = tmp_path / "polygon.ipynb"
    case = _polygon_girder(POLYGON_I, 9000)
    nbformat.write(demo_notebook(case, executed=True), str(notebook))
    text, _ = export_file(notebook, execute=False, signed_at=SIGNED_AT)
    method = _section(text, "warping")
    assert sentence in method
    assert "Their warping shear τ_w is NOT computed" in method
    assert "mesh node of largest |Wn| (finite elements)" in _section(text, "checks")
    assert sentence not in signed[2]
