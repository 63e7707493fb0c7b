"""The record's cover, its title block's sources, its page footer and the package's PDF copy.

The title block comes from the notebook's metadata, then the panel editor's output, then the
command line; the cover states the verdict, the governing check with its utilisation and place,
the signature status and a summary; headers print units as the unit library does; failing rows
carry a mark; the footer's text cannot break out of its CSS string.
"""

from __future__ import annotations

import copy
import json
import re
import zipfile
from pathlib import Path

import nbformat
import pytest

from workbench.case import TITLE_BLOCK_MIME_TYPE
from workbench.case.errors import InputError
from workbench.panel.title_block import TitleBlockEditor, title_block_bundle
from workbench.record.demo import DEMO_TITLE_BLOCK, demo_notebook
from workbench.record.exporter import export_file
from workbench.record.notebook import title_block_from
from workbench.record.pdf import _stamped
from workbench.record.render import css_string, footer_css
from workbench.record.verify import verify_package

ROOT = Path(__file__).resolve().parents[1]
DEMO_CASE = json.loads((ROOT / "workbench" / "cases" / "press_drive.json").read_text("utf-8"))


def _editor_output(nb: object, block: dict[str, str]) -> None:
    cell = nbformat.v4.new_code_cell("TitleBlockEditor.show_new(...)")
    cell.outputs = [nbformat.v4.new_output("display_data", data=title_block_bundle(block))]
    nb.cells.insert(0, cell)  # type: ignore[attr-defined]


def test_title_block_reads_metadata_then_editor_output_then_options() -> None:
    nb = demo_notebook(executed=True)
    assert title_block_from(nb)["project"] == DEMO_TITLE_BLOCK["project"]
    _editor_output(nb, {"project": "Edited in the panel", "approved_by": "C. Approver"})
    block = title_block_from(nb)
    assert block["project"] == "Edited in the panel"
    assert block["approved_by"] == "C. Approver"
    assert block["revision"] == DEMO_TITLE_BLOCK["revision"]  # kept from the metadata
    assert title_block_from(nb, {"project": "From the command line"})["project"] == (
        "From the command line"
    )


def test_title_block_output_as_text_and_bad_output() -> None:
    nb = demo_notebook(executed=True)
    cell = nbformat.v4.new_code_cell("")
    cell.outputs = [
        nbformat.v4.new_output(
            "display_data", data={TITLE_BLOCK_MIME_TYPE: json.dumps({"revision": "C"})}
        )
    ]
    nb.cells.append(cell)
    assert title_block_from(nb)["revision"] == "C"
    cell.outputs[0]["data"][TITLE_BLOCK_MIME_TYPE] = "[1, 2"
    with pytest.raises(InputError, match="not valid JSON"):
        title_block_from(nb)


def test_editor_keeps_its_fields_as_the_output_the_record_reads() -> None:
    editor = TitleBlockEditor({"project": "P", "unknown": "ignored", "revision": "A"})
    editor.fields["checked_by"].value = "  M. Okafor "
    bundle = title_block_bundle(editor.block)
    assert bundle[TITLE_BLOCK_MIME_TYPE] == {
        "project": "P",
        "revision": "A",
        "checked_by": "M. Okafor",
    }
    assert "Checked by: M. Okafor" in bundle["text/plain"]


def test_editor_updates_its_output_on_every_edit() -> None:
    class Handle:
        def __init__(self) -> None:
            self.shown: list[dict] = []

        def update(self, bundle: dict, raw: bool) -> None:
            assert raw
            self.shown.append(bundle[TITLE_BLOCK_MIME_TYPE])

    editor = TitleBlockEditor({"project": "P"})
    editor._handle = Handle()
    editor.fields["revision"].value = "C"
    editor.fields["project"].value = ""
    assert editor._handle.shown == [{"project": "P", "revision": "C"}, {"revision": "C"}]


def _record(tmp_path: Path, case: dict, block: dict, **options: object) -> str:
    notebook = tmp_path / "calc.ipynb"
    nbformat.write(demo_notebook(case, title_block=block, executed=True), str(notebook))
    text, _ = export_file(notebook, **options)  # type: ignore[arg-type]
    return text


def _cover(text: str) -> str:
    return text.split('<section class="record-section" id="title">', 1)[1].split(
        "</section>", maxsplit=1
    )[0]


def test_cover_of_a_failing_design_names_the_governing_check(tmp_path: Path) -> None:
    """The shipped press drive fails its keyseat check (see notebooks/demo.ipynb)."""
    block = {**DEMO_TITLE_BLOCK, "approved_by": "C. Approver", "date_approved": "2025-03-03"}
    text = _record(tmp_path, copy.deepcopy(DEMO_CASE), block, title_block={"revision": "C"})
    cover = _cover(text)
    assert "SOME CHECKS FAIL — " in cover
    governing = re.search(r'<p class="governing">([^<]*)</p>', cover)
    assert governing is not None
    assert re.fullmatch(
        r"Governing check: keyseat stress on shaft auger, segment 0 at x = [0-9.]+ mm, in "
        r"“[^”]+”: utilisation 1\.\d{3} \(FAILS\)\.",
        governing[1].replace("&#34;", '"'),
    ), governing[1]
    assert '<table class="failing checks">' in cover and '<tr class="fail">' in cover
    for label, value in (("Approved by", "C. Approver"), ("Revision", "C")):
        assert f"<td>{label}</td><td>{value}</td>" in cover
    assert "UNSIGNED — nothing proves who made this record" in cover
    summary = re.search(r"System and loads:</strong> ([^<]*)</p>", cover)
    assert summary is not None
    assert "2 shafts in torsion — auger (" in summary[1] and "1 gear mesh" in summary[1]
    assert "2 load cases (“pressing” and “jam”)" in summary[1]
    # Every failing check row of the table is marked, and only those.
    checks = text.split('<section class="record-section" id="checks">', 1)[1]
    rows = re.findall(
        r"<tr( class=\"fail\")?>((?:<td>[^<]*</td>)+)</tr>", checks.split("</table>")[0]
    )
    assert rows and all(bool(mark) == row.endswith("<td>FAIL</td>") for mark, row in rows)


def test_headers_print_units_as_the_unit_library_does(tmp_path: Path) -> None:
    text = _record(tmp_path, copy.deepcopy(DEMO_CASE), DEMO_TITLE_BLOCK)
    body = text.split('<main id="record-body">', 1)[1].split(
        '<section class="record-section" id="notebook">'
    )[0]
    assert "reaction [N·m]" in body and "inertia [kg·m²]" in body and "θ max [°]" in body
    assert not re.search(r"\[[^\]]*(\*|\*\*)[^\]]*\]", body)


def test_signed_cover_names_signer_and_fingerprint(tmp_path: Path) -> None:
    from workbench.signing import write_key_pair

    private, _ = write_key_pair(tmp_path / "keys")
    text = _record(tmp_path, copy.deepcopy(DEMO_CASE), DEMO_TITLE_BLOCK, key_file=private)
    cover = _cover(text)
    assert "unsigned-banner" not in cover
    assert re.search(
        r"Signed by A\. Ingenieur at \d{4}-\d\d-\d\dT[\d:]+Z \(UTC\), key fingerprint [\w-]{43}",
        cover,
    )


@pytest.mark.parametrize(
    "text", ["P</style><script>alert(1)</script>", 'a"b\\c\nd', "Ünïcode · ok", "'; } * {"]
)
def test_footer_text_cannot_leave_its_css_string(text: str) -> None:
    quoted = css_string(text)
    inner = quoted[1:-1]
    assert quoted.startswith('"') and quoted.endswith('"')
    assert not re.search(r"[\"'<>;{}\n]", inner)
    assert all(part[:6].isalnum() for part in inner.split("\\")[1:])
    # Decoding the escapes (CSS Syntax 3, 4.3.7: six hex digits and one space) gives the text.
    decoded = re.sub(r"\\([0-9a-f]{6}) ", lambda m: chr(int(m[1], 16)), inner)
    assert decoded == text
    rule = footer_css({"project": text})
    assert "</style" not in rule.lower() and rule.count("{") == rule.count("}") == 2


def test_pdf_time_stamps_are_set_to_the_signing_time_in_place() -> None:
    pdf = b"%PDF-1.4\n/CreationDate (D:20261202153101+00'00')\n/ModDate (D:20261202153101+00'00')>>"
    stamped = _stamped(pdf, "2025-03-01T08:09:10Z")
    assert len(stamped) == len(pdf)
    assert stamped.count(b"(D:20250301080910+00'00')") == 2


@pytest.mark.browser
def test_package_holds_the_printed_record_listed_in_the_signed_manifest(tmp_path: Path) -> None:
    import pypdfium2 as pdfium

    from workbench.record.package import build_package
    from workbench.signing import write_key_pair

    private, public = write_key_pair(tmp_path / "keys")
    notebook = tmp_path / "calc.ipynb"
    nbformat.write(demo_notebook(executed=True), str(notebook))
    manifest = build_package(notebook, tmp_path / "calc.zip", key_file=private, paper="Letter")
    entry = next(e for e in manifest["files"] if e["name"] == "record.pdf")
    with zipfile.ZipFile(tmp_path / "calc.zip") as archive:
        pdf = archive.read("record.pdf")
    import hashlib

    assert entry["sha256"] == hashlib.sha256(pdf).hexdigest() and entry["size"] == len(pdf)
    document = pdfium.PdfDocument(pdf)
    width, height = document[0].get_size()
    assert (round(width), round(height)) == (612, 792)  # Letter, 8.5 × 11 in at 72 pt/in
    first = document[0].get_textpage().get_text_range()
    assert DEMO_TITLE_BLOCK["subject"] in first and f"page 1 of {len(document)}" in first
    assert verify_package(tmp_path / "calc.zip", public).ok
    # Left out on request.
    manifest = build_package(notebook, tmp_path / "nopdf.zip", paper=None)
    assert "record.pdf" not in {e["name"] for e in manifest["files"]}
