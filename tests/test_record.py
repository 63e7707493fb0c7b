"""The calculation record: export, signature, verification, tamper detection, package.

Independent references: jwcrypto (a JOSE library of its own) checks every JWS; the force-method
hand check is compared with the closed form for a bar fixed at both ends; hashlib checks the
package manifest; the drawings are read back with the standard library's XML parsers
(xml.etree, xml.dom.minidom) and measured against the case's own dimensions; the shipped
equation pictures are redrawn with matplotlib.
"""

from __future__ import annotations

import base64
import copy
import hashlib
import itertools
import json
import math
import re
import subprocess
import sys
import warnings
import zipfile
from pathlib import Path
from xml.dom import minidom
from xml.etree import ElementTree

import nbformat
import pytest
from jwcrypto import jwk as jwcrypto_jwk
from jwcrypto import jws as jwcrypto_jws

from workbench import cli
from workbench.case.files import temporary_prefix
from workbench.case.load import case_file_from_document
from workbench.design.checks import run_checks
from workbench.design.independent import independent_check
from workbench.record import equations
from workbench.record.demo import DEMO_TITLE_BLOCK, FEED_DRIVE_CASE, LINE_SHAFT_CASE, demo_notebook
from workbench.record.document import BLOCK_END, BLOCK_START, CSP, compute, render_body
from workbench.record.exporter import RecordExporter, export_file
from workbench.record.figures import elevation_svg
from workbench.record.package import build_package
from workbench.record.verify import verify_package, verify_record, verify_text
from workbench.signing import write_key_pair
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.modes import natural_modes

ALERT = "<script>alert(1)</script>"
SIGNED_AT = "2025-03-01T12:00:00Z"


def _title_block() -> dict:
    block = copy.deepcopy(DEMO_TITLE_BLOCK)
    block["project"] += f" {ALERT}"
    block["subject"] += f" {ALERT}"
    return block


@pytest.fixture(scope="module")
def keys(tmp_path_factory: pytest.TempPathFactory) -> dict[str, tuple[Path, Path]]:
    base = tmp_path_factory.mktemp("keys")
    return {"first": write_key_pair(base / "first"), "second": write_key_pair(base / "second")}


@pytest.fixture(scope="module")
def notebook(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """An unexecuted notebook: the exporter must run it to find the case."""
    path = tmp_path_factory.mktemp("nb") / "line_shaft.ipynb"
    nb = demo_notebook(title_block=_title_block(), note=f"A note. {ALERT}")
    nbformat.write(nb, str(path))
    return path


@pytest.fixture(scope="module")
def record(notebook: Path, keys: dict, tmp_path_factory: pytest.TempPathFactory) -> Path:
    text, _ = export_file(notebook, key_file=keys["first"][0], signed_at=SIGNED_AT)
    path = tmp_path_factory.mktemp("rec") / "record.html"
    path.write_text(text, encoding="utf-8", newline="")
    return path


def _executed(tmp_path: Path, case: dict | None = None) -> Path:
    path = tmp_path / "executed.ipynb"
    nbformat.write(
        demo_notebook(case, title_block=_title_block(), note=f"A note. {ALERT}", executed=True),
        str(path),
    )
    return path


def test_signed_record_verifies(record: Path, keys: dict) -> None:
    outcome = verify_record(record, keys["first"][1])
    assert outcome.ok, outcome.lines()
    text = "\n".join(outcome.lines())
    assert "Signed by: A. Ingenieur" in text
    assert SIGNED_AT in text
    assert "every number agrees" in text


def test_record_is_one_file_with_csp_and_no_active_script(record: Path) -> None:
    text = record.read_text("utf-8")
    assert f'<meta http-equiv="Content-Security-Policy" content="{CSP}">' in text
    assert "script-src" not in CSP
    scripts = re.findall(r"<script[^>]*>", text)
    assert scripts == [
        '<script type="application/jose" id="record-signature">',
        '<script type="application/jwk+json" id="record-public-key">',
    ]
    assert ALERT not in text  # escaped in the title, dropped from the markdown
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in text
    assert "example.invalid" not in text and "onerror" not in text
    assert not re.search(r'(src|href)="(https?:)?//', text)
    assert "@media print" in text and "break-before: page" in text


def test_record_holds_every_section(record: Path) -> None:
    text = record.read_text("utf-8")
    for ident in (
        "title",
        "purpose",
        "inputs",
        "method",
        "results",
        "checks",
        "hand-check",
        "warnings",
        "caution",
        "revisions",
        "signature",
        "software",
        "notebook",
    ):
        assert f'<section class="record-section" id="{ident}">' in text
    assert "WB-0042" in text and "B. Prüfer" in text and "demo values for a carbon steel" in text
    assert "qualified engineer" in text  # the caution deferring to licensed practice
    assert text.count('class="equation"') >= 6
    assert text.count('class="figure diagram"') == 3  # 2 load cases + 1 combination, 1 shaft


def test_record_numbers_come_from_the_case_not_the_outputs(record: Path) -> None:
    results = solve(parse_case(LINE_SHAFT_CASE))
    text = record.read_text("utf-8")
    # R_B of "service" in N·m, written with 6 significant digits and a minus sign (U+2212).
    written = f"{results.reactions[0, 1]:.6g}".replace("-", "\u2212")
    assert f"<td>{written}</td>" in text


def test_hand_check_agrees_in_record(record: Path) -> None:
    section = record.read_text("utf-8").split('id="hand-check"')[1].split("</section>")[0]
    results = solve(parse_case(LINE_SHAFT_CASE))
    rows = len(results.names) * (results.reactions.shape[1] + len(results.shaft_ids))
    assert section.count("<td>agrees</td>") == rows
    assert "DISAGREES" not in section
    assert "does not cover" not in section


def test_force_method_matches_closed_form_fixed_fixed() -> None:
    # Bar fixed at both ends, torque T0 at distance a from A (b = L − a), constant G·J:
    # T_A = T0·b/L, T_B = T0·a/L resisting (Gere & Goodno, Mechanics of Materials, 8th ed.,
    # §3.8, bar fixed at both ends; derivable by hand). Reactions here are torques on the shaft.
    case = copy.deepcopy(LINE_SHAFT_CASE)
    case["shafts"][0]["segments"] = [
        {"length": 1000, "material": "steel", "section": {"shape": "solid", "diameter": 40}}
    ]
    case["supports"] = [{"shaft": "main", "x": 0}, {"shaft": "main", "x": 1000}]
    case["load_cases"] = [{"name": "T0", "torques": [{"shaft": "main", "x": 300, "torque": 500}]}]
    case["combinations"] = []
    solution = independent_check(case_file_from_document(case))
    assert solution.reactions[0] == pytest.approx([-500 * 0.7, -500 * 0.3], rel=1e-10)


def test_flipped_digit_fails(record: Path, keys: dict) -> None:
    text = record.read_text("utf-8")
    start = text.index('class="reactions"')
    match = re.compile(r"<td>(\u2212?)(\d)").search(text, text.index("<tbody>", start))
    assert match is not None
    digit = match.group(2)
    flipped = str((int(digit) + 1) % 10)
    tampered = text[: match.start(2)] + flipped + text[match.end(2) :]
    outcome = verify_text(tampered.encode("utf-8"), None)
    assert not outcome.ok
    assert any("content was altered" in line for line in outcome.problems)


def test_changed_word_and_changed_css_fail(record: Path) -> None:
    text = record.read_text("utf-8")
    for old, new in (("Ingenieur", "Ingenieux"), ("#1f4e79", "#1f4e7a")):
        outcome = verify_text(text.replace(old, new, 1).encode("utf-8"), None)
        assert not outcome.ok


def test_changed_case_in_signature_fails(record: Path) -> None:
    text = record.read_text("utf-8")
    token = re.search(r'id="record-signature">([^<]+)<', text).group(1)
    header, payload, signature = token.split(".")
    data = json.loads(base64.urlsafe_b64decode(payload + "=" * (-len(payload) % 4)))
    data["case"]["load_cases"][1]["torques"][0]["torque"] = 90
    forged = base64.urlsafe_b64encode(json.dumps(data).encode()).decode().rstrip("=")
    outcome = verify_text(text.replace(token, f"{header}.{forged}.{signature}").encode(), None)
    assert not outcome.ok
    assert any("signature does not hold" in line for line in outcome.problems)


def test_resigned_with_another_key_fails_against_first_key(
    tmp_path: Path, keys: dict, record: Path
) -> None:
    text, _ = export_file(_executed(tmp_path), key_file=keys["second"][0], signed_at=SIGNED_AT)
    path = tmp_path / "resigned.html"
    path.write_text(text, encoding="utf-8", newline="")
    against_first = verify_record(path, keys["first"][1])
    assert not against_first.ok
    assert any("re-signed" in line for line in against_first.problems)
    # Without a key it verifies, and names the other fingerprint for the reader to compare.
    alone = verify_record(path)
    assert alone.ok
    assert verify_record(record).facts[0] != alone.facts[0]


def test_truncated_record_fails(record: Path) -> None:
    data = record.read_bytes()
    for cut in (len(data) // 2, len(data) - 20):
        outcome = verify_text(data[:cut], None)
        assert not outcome.ok
        assert any("truncated" in line for line in outcome.problems)


def test_altered_verification_footer_fails(record: Path) -> None:
    text = record.read_text("utf-8")
    start = text.index(BLOCK_START)
    tampered = text[:start] + text[start:].replace("<td>SIGNED</td>", "<td>SIGNED!</td>", 1)
    outcome = verify_text(tampered.encode(), None)
    assert not outcome.ok
    assert any("verification details" in line for line in outcome.problems)


def test_jws_verifies_with_jwcrypto(record: Path, keys: dict) -> None:
    text = record.read_text("utf-8")
    token = re.search(r'id="record-signature">([^<]+)<', text).group(1)
    embedded = json.loads(re.search(r'id="record-public-key">([^<]+)<', text).group(1))
    for key in (
        jwcrypto_jwk.JWK(**embedded),
        jwcrypto_jwk.JWK.from_pem(keys["first"][1].read_bytes()),
    ):
        checked = jwcrypto_jws.JWS()
        checked.deserialize(token)
        checked.verify(key, alg="EdDSA")
        payload = json.loads(checked.payload)
        assert payload["case"] == LINE_SHAFT_CASE
        assert payload["signed_at"] == SIGNED_AT
        assert payload["content_digest"].startswith("sha256:")
        assert payload["title_block"]["calculation_number"] == "WB-0042"
    assert jwcrypto_jwk.JWK(**embedded).thumbprint() in text
    other = jwcrypto_jwk.JWK.from_pem(keys["second"][1].read_bytes())
    checked = jwcrypto_jws.JWS()
    checked.deserialize(token)
    with pytest.raises(jwcrypto_jws.InvalidJWSSignature):
        checked.verify(other, alg="EdDSA")


def test_content_digest_is_the_file_without_its_block(record: Path) -> None:
    text = record.read_text("utf-8")
    start, end = text.index(BLOCK_START), text.index(BLOCK_END) + len(BLOCK_END) + 1
    digest = "sha256:" + hashlib.sha256((text[:start] + text[end:]).encode()).hexdigest()
    token = re.search(r'id="record-signature">([^<]+)<', text).group(1)
    payload = token.split(".")[1]
    data = json.loads(base64.urlsafe_b64decode(payload + "=" * (-len(payload) % 4)))
    assert data["content_digest"] == digest
    assert digest in text[start:end]


def test_unsigned_record_says_so_and_does_not_verify(tmp_path: Path) -> None:
    text, _ = export_file(_executed(tmp_path), signed_at=SIGNED_AT)
    assert "UNSIGNED" in text.split(BLOCK_START)[0]
    outcome = verify_text(text.encode(), None)
    assert not outcome.ok
    assert any("UNSIGNED" in line for line in outcome.problems)
    assert any("every number agrees" in line for line in outcome.facts)


def test_reproducible_except_timestamp(tmp_path: Path, keys: dict) -> None:
    notebook = _executed(tmp_path)
    first, _ = export_file(notebook, key_file=keys["first"][0], signed_at=SIGNED_AT)
    again, _ = export_file(notebook, key_file=keys["first"][0], signed_at=SIGNED_AT)
    assert first == again  # Ed25519 is deterministic: byte-identical
    later, _ = export_file(notebook, key_file=keys["first"][0], signed_at="2025-03-02T08:30:00Z")
    assert later != first
    body, later_body = first.split(BLOCK_START)[0], later.split(BLOCK_START)[0]
    assert later_body.replace("2025-03-02T08:30:00Z", SIGNED_AT) == body


def test_case_file_fallback_and_last_output_wins(tmp_path: Path) -> None:
    case = copy.deepcopy(LINE_SHAFT_CASE)
    (tmp_path / "line.json").write_text(json.dumps(case), encoding="utf-8")
    nb = nbformat.v4.new_notebook()
    nb.metadata["workbench"] = {"case_file": "line.json"}
    path = tmp_path / "fallback.ipynb"
    nbformat.write(nb, str(path))
    _, resources = export_file(path, execute=False)
    assert resources["workbench_case"] == case
    # Two case outputs: the later one is the panel's current case.
    changed = copy.deepcopy(case)
    changed["load_cases"][1]["torques"][0]["torque"] = 700
    nb = demo_notebook(executed=True)
    nb.cells[2].outputs = [
        nbformat.v4.new_output(
            "display_data",
            data={"application/vnd.workbench.case+json": changed, "text/plain": "case"},
        )
    ]
    nbformat.write(nb, str(path))
    _, resources = export_file(path, execute=False)
    assert resources["workbench_case"] == changed


def test_no_case_is_a_clear_input_error(tmp_path: Path) -> None:
    from workbench.case.errors import InputError

    path = tmp_path / "empty.ipynb"
    nbformat.write(nbformat.v4.new_notebook(), str(path))
    with pytest.raises(InputError, match="holds no case"):
        export_file(path, execute=False)


def _cli(argv: list[str]) -> int:
    """The ``workbench`` command line, as a user runs it."""
    return cli.main(argv)


def test_cli_keygen_export_verify_package(
    tmp_path: Path, capsys: pytest.CaptureFixture, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("RECORD_KEY_PASSPHRASE", "correct horse battery staple")
    passphrase = ["--passphrase-env", "RECORD_KEY_PASSPHRASE"]
    assert _cli(["keygen", "--out", str(tmp_path / "k"), *passphrase]) == 0
    printed = capsys.readouterr().out
    private, public = tmp_path / "k" / "private.pem", tmp_path / "k" / "public.pem"
    assert private.stat().st_mode & 0o077 == 0
    fingerprint = re.search(r"fingerprint: (\S+)", printed).group(1)
    assert fingerprint == jwcrypto_jwk.JWK.from_pem(public.read_bytes()).thumbprint()
    notebook = _executed(tmp_path)
    out = tmp_path / "record.html"
    # What an export and a package killed midway leave: removed by the next write of each file.
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True, check=True)  # fmt: skip
    leftovers = [
        tmp_path / f"{temporary_prefix(target, int(dead.stdout))}abcd1234.tmp"
        for target in (out, tmp_path / "pkg.zip")
    ]
    for leftover in leftovers:
        leftover.write_bytes(b"<html>" * 1000)
    assert (
        _cli(
            [
                "export",
                str(notebook),
                "-o",
                str(out),
                "--key",
                str(private),
                "--revision",
                "C",
                "--no-execute",
                *passphrase,
            ]
        )
        == 0
    )
    assert _cli(["verify", str(out), "--public-key", str(public)]) == 0
    assert "VERIFIED" in capsys.readouterr().out
    out.write_text(out.read_text("utf-8").replace("Revision", "Revisión", 1), "utf-8")
    assert _cli(["verify", str(out)]) == 1
    assert "NOT VERIFIED" in capsys.readouterr().out
    assert _cli(["verify", str(tmp_path / "missing.html")]) == 2
    assert _cli(["verify", str(tmp_path / "missing.zip")]) == 2
    assert "cannot read the package" in capsys.readouterr().err
    assert _cli(["keygen", "--out", str(tmp_path / "k"), *passphrase]) == 2  # never overwrites

    package = tmp_path / "pkg.zip"
    assert (
        _cli(["package", str(notebook), "-o", str(package), "--key", str(private), *passphrase])
        == 0
    )
    assert not any(leftover.exists() for leftover in leftovers)
    assert not [path.name for path in tmp_path.iterdir() if path.name.endswith(".tmp")]
    with zipfile.ZipFile(package) as archive:
        names = set(archive.namelist())
        assert {
            "notebook.ipynb",
            "case.json",
            "record.html",
            "results.csv",
            "manifest.json",
            "manifest.jws",
        } <= names
        manifest = json.loads(archive.read("manifest.json"))
        for entry in manifest["files"]:
            assert hashlib.sha256(archive.read(entry["name"])).hexdigest() == entry["sha256"]
        assert {entry["name"] for entry in manifest["files"]} == names - {
            "manifest.json",
            "manifest.jws",
        }
        checked = jwcrypto_jws.JWS()
        checked.deserialize(archive.read("manifest.jws").decode())
        checked.verify(jwcrypto_jwk.JWK.from_pem(public.read_bytes()), alg="EdDSA")
        assert checked.payload == archive.read("manifest.json")
        assert verify_text(archive.read("record.html"), None).ok


def test_exporter_defaults() -> None:
    exporter = RecordExporter()
    assert exporter.template_name == "workbench_record"
    assert exporter.file_extension == ".html"


def test_nbconvert_finds_the_exporter(tmp_path: Path) -> None:
    """Needs the package installed (pip install -e .): the entry point must be registered."""
    notebook = _executed(tmp_path)
    completed = subprocess.run(
        [
            sys.executable,
            "-m",
            "jupyter",
            "nbconvert",
            "--to",
            "workbench_record",
            "--RecordExporter.signed_at=" + SIGNED_AT,
            str(notebook),
            "--output-dir",
            str(tmp_path),
        ],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
    )
    assert completed.returncode == 0, completed.stderr
    text = (tmp_path / "executed.html").read_text("utf-8")
    assert "UNSIGNED" in text
    assert verify_text(text.encode(), None).facts


# --- drawings ------------------------------------------------------------------------------

SVG = "{http://www.w3.org/2000/svg}"
PRESS_DRIVE = Path(__file__).resolve().parents[1] / "workbench" / "cases" / "press_drive.json"


def _boxes(root: ElementTree.Element) -> list[tuple[float, float, float, float]]:
    """(left, right, top, bottom) of every segment outline, in drawing order."""
    boxes = []
    for polygon in root.iter(f"{SVG}polygon"):
        points = [tuple(map(float, pair.split(","))) for pair in polygon.get("points").split()]
        xs, ys = [p[0] for p in points], [p[1] for p in points]
        boxes.append((min(xs), max(xs), min(ys), max(ys)))
    return boxes


def test_elevation_is_to_scale() -> None:
    # The press-drive demo: two shafts (900 mm and 400 mm), solid, tube, taper, layered.
    case = json.loads(PRESS_DRIVE.read_text("utf-8"))
    root = ElementTree.fromstring(elevation_svg(parse_case(case)))
    boxes = _boxes(root)
    lengths = [250, 300, 200, 150, 400]  # mm, segment by segment, from the case
    diameters = [60, 70, 70, 75, 40]  # largest outer diameter of each segment (mm)
    scale = (boxes[0][1] - boxes[0][0]) / lengths[0]  # px per mm
    tolerance = 0.15  # px: coordinates are written to 0.1 px
    for (left, right, top, bottom), length, diameter in zip(boxes, lengths, diameters, strict=True):
        assert right - left == pytest.approx(length * scale, abs=tolerance)
        assert bottom - top == pytest.approx(diameter * scale, abs=tolerance)  # same scale
    # Segments follow one another along the shaft; both shafts start at the same x.
    for first, second in itertools.pairwise(boxes[:4]):
        assert second[0] == pytest.approx(first[1], abs=tolerance)
    assert boxes[4][0] == pytest.approx(boxes[0][0], abs=tolerance)
    # The taper runs Ø70 → Ø50: its right end is 50/70 the height of its left end.
    taper = next(p for i, p in enumerate(root.iter(f"{SVG}polygon")) if i == 2)
    points = [tuple(map(float, pair.split(","))) for pair in taper.get("points").split()]
    left_x, right_x = min(p[0] for p in points), max(p[0] for p in points)

    def height_at(x: float) -> float:
        ys = [p[1] for p in points if abs(p[0] - x) < 1e-6]
        return max(ys) - min(ys)

    assert height_at(right_x) == pytest.approx(50 * scale, abs=tolerance)
    assert height_at(left_x) == pytest.approx(70 * scale, abs=tolerance)
    # Gears: bars as tall as their pitch diameters (2 × 60 mm on the auger, 2 × 90 on the feeder).
    gears = sorted(
        float(rect.get("height"))
        for rect in root.iter(f"{SVG}rect")
        if rect.get("fill") == "#7a4a12"  # the gear bars' colour
    )
    assert gears == pytest.approx([120 * scale, 180 * scale], abs=tolerance)


def test_elevation_labels_supports_gears_and_loads() -> None:
    case = json.loads(PRESS_DRIVE.read_text("utf-8"))
    svg = elevation_svg(parse_case(case))
    root = ElementTree.fromstring(svg)
    texts = {text.text for text in root.iter(f"{SVG}text")}
    for expected in (
        "shaft auger",
        "shaft feeder",
        "S0 fixed",
        "S1 spring 500 N·m/°",
        "900 N·m (pressing)",
        "1400 N·m (jam)",
        "\u2212250 N·m (jam)",
        "\u22120.6 → \u22121.2 N·m/mm (pressing)",
        "gear 0, r 60 (meshes feeder at x 0)",
        "gear 0, r 90 (meshes auger at x 550)",
        "Ø60",
        "Ø70/40",
        "Ø70→50",
        "Ø75/50 + Ø50",
        "Ø40",
        "250",
        "300",
        "200",
        "150",
        "900",
        "400",
    ):
        assert expected in texts, expected
    # Three point torques, each a moment vector with two arrowheads; a fixed support's triangle.
    fills = [path.get("fill") for path in root.iter(f"{SVG}path")]
    assert fills.count("#a00000") == 6
    assert svg == elevation_svg(parse_case(case))  # deterministic: the same bytes


def test_elevation_escapes_every_user_string() -> None:
    case = copy.deepcopy(LINE_SHAFT_CASE)
    name = "m<a>&\"'x"
    case["shafts"][0]["id"] = name
    for support in case["supports"]:
        support["shaft"] = name
    for load_case in case["load_cases"]:
        for load in (*load_case.get("torques", []), *load_case.get("distributed", [])):
            load["shaft"] = name
    case["load_cases"][1]["name"] = ALERT
    case["combinations"][0]["factors"] = {"service": 1.5, ALERT: 1.2}
    svg = elevation_svg(parse_case(case))
    root = ElementTree.fromstring(svg)  # well-formed: nothing broke out of its text node
    texts = [text.text for text in root.iter(f"{SVG}text")]
    assert f"shaft {name}" in texts
    assert f"900 N·m ({ALERT})" in texts
    assert not [e for e in root.iter() if e.tag.rsplit("}", 1)[-1] != "svg" and "script" in e.tag]
    assert ALERT not in svg


def test_shipped_equations_match_their_source() -> None:
    folder = equations.equations_dir()
    index = json.loads((folder / "index.json").read_text("utf-8"))
    pictures = equations.load_equations()
    assert [p[0] for p in pictures] == list(equations.EQUATIONS)
    _, version, *_ = index["generator"].split()
    import matplotlib

    for equation, svg, width, height in pictures:
        entry = index["equations"][equation.name]
        assert entry["tex"] == equation.tex
        assert hashlib.sha256(svg.encode()).hexdigest() == entry["sha256"]
        root = ElementTree.fromstring(svg)
        # As numbers: a size of more than six digits (16.922812pt) is not what `:g` writes.
        drawn = [float(root.get(name, "").removesuffix("pt")) for name in ("width", "height")]
        assert drawn == [width, height]
        fresh = equations.render_equation(equation.tex)
        if matplotlib.__version__ == version:
            assert fresh == svg  # reproducible: the same matplotlib redraws the same bytes
        else:  # another matplotlib may lay glyphs out a hair differently, never another size
            redrawn = ElementTree.fromstring(fresh)
            assert float(redrawn.get("width")[:-2]) == pytest.approx(width, rel=0.03)
            assert float(redrawn.get("height")[:-2]) == pytest.approx(height, rel=0.03)


def test_equation_pictures_from_another_source_are_refused(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from workbench.case.errors import InputError

    equations.write_equations(tmp_path)
    monkeypatch.setattr(equations, "equations_dir", lambda: tmp_path)
    assert len(equations.load_equations.__wrapped__()) == len(equations.EQUATIONS)
    index = json.loads((tmp_path / "index.json").read_text("utf-8"))
    index["equations"]["shear-stress"]["tex"] = r"\tau = T/J"
    (tmp_path / "index.json").write_text(json.dumps(index), "utf-8")
    with pytest.raises(InputError, match="another source"):
        equations.load_equations.__wrapped__()
    equations.write_equations(tmp_path)
    (tmp_path / "layers.svg").write_text("<svg/>", "utf-8")
    with pytest.raises(InputError, match="differs from its index"):
        equations.load_equations.__wrapped__()


def test_export_needs_no_plotting_library(tmp_path: Path) -> None:
    notebook = _executed(tmp_path)
    code = (
        "import sys\n"
        "from workbench.record.exporter import export_file\n"
        f"text, _ = export_file({str(notebook)!r}, execute=False)\n"
        "assert 'class=\"equation\"' in text and 'figure elevation' in text\n"
        "print(sorted(m for m in sys.modules if m.split('.')[0] == 'matplotlib'))\n"
    )
    completed = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=300, check=False
    )
    assert completed.returncode == 0, completed.stderr
    assert completed.stdout.strip() == "[]"


# --- SVG outputs of notebook cells -----------------------------------------------------------

HOSTILE_SVG = (
    '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" '
    'width="120" height="60" onload="alert(3)">'
    "<script>alert(4)</script>"
    "<style>@import url(http://example.invalid/a.css); rect { fill: blue }</style>"
    "<style>rect { stroke: url(#edge) } circle { fill: url(http://example.invalid/p#x) }</style>"
    '<rect id="kept" width="100" height="40" fill="#2a6f2a"/>'
    '<foreignObject width="10" height="10"><div xmlns="http://www.w3.org/1999/xhtml">x</div>'
    "</foreignObject>"
    '<image xlink:href="http://example.invalid/x.png" width="5" height="5"/>'
    '<a href="javascript:alert(5)"><circle r="3" cx="5" cy="5" onclick="alert(6)"/></a>'
    '<set attributeName="href" to="javascript:alert(7)"/>'
    "</svg>"
)


def _svg_notebook() -> object:
    nb = demo_notebook(executed=True)
    cell = nbformat.v4.new_code_cell("draw()")
    cell.outputs = [
        nbformat.v4.new_output(
            "display_data", data={"image/svg+xml": HOSTILE_SVG, "text/plain": "drawing"}
        ),
        nbformat.v4.new_output(
            "display_data",
            data={"text/html": f"<div>inline {HOSTILE_SVG}</div>", "text/plain": "drawing"},
        ),
    ]
    nb.cells.append(cell)
    nb.cells.append(nbformat.v4.new_markdown_cell(f"A sketch:\n\n{HOSTILE_SVG}\n"))
    return nb


@pytest.mark.parametrize("skip_svg_encoding", [False, True])
def test_svg_outputs_are_kept_as_clean_images(skip_svg_encoding: bool) -> None:
    exporter = RecordExporter(execute=False, skip_svg_encoding=skip_svg_encoding)
    text, _ = exporter.from_notebook_node(_svg_notebook())
    cells = text.split('<section class="record-section" id="notebook">')[1]
    uris = re.findall(r'<img [^>]*src="data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)"', cells)
    assert len(uris) == 3  # the image/svg+xml output, the inline HTML one, the markdown one
    for uri in uris:
        drawing = base64.b64decode(uri).decode("utf-8")
        document = minidom.parseString(drawing)  # another parser than the cleaner's
        names = {node.localName for node in document.getElementsByTagName("*")}
        assert "rect" in names and "circle" in names  # the drawing is there
        assert not names & {"script", "foreignObject", "set"}
        for node in document.getElementsByTagName("*"):
            attributes = [node.attributes.item(i) for i in range(node.attributes.length)]
            assert not [a for a in attributes if a.localName.lower().startswith("on")]
        assert "javascript:" not in drawing and "example.invalid" not in drawing
        assert "@import" not in drawing and "fill: blue" not in drawing  # that sheet is gone
        assert "url(#edge)" in drawing  # a reference inside the drawing stays
    assert "alert(" not in text
    assert "img-src data:" in CSP


def test_svg_that_declares_entities_is_left_out() -> None:
    from workbench.record.sanitize import clean_svg, sanitize_notebook_html

    laughs = (
        '<!DOCTYPE svg [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;">]>'
        '<svg xmlns="http://www.w3.org/2000/svg"><text>&b;</text></svg>'
    )
    assert clean_svg(laughs) is None
    assert clean_svg("<svg><rect") is None  # not well-formed
    assert clean_svg('<html xmlns="http://www.w3.org/1999/xhtml"/>') is None  # not an SVG
    html = sanitize_notebook_html(f"<p>before</p>{laughs.split(']>')[1]}<p>after</p>")
    assert "<p>before</p>" in html and "<p>after</p>" in html
    uri = "data:image/svg+xml;base64," + base64.b64encode(laughs.encode()).decode()
    cleaned = sanitize_notebook_html(f'<img alt="x" src="{uri}">')
    assert "data:" not in cleaned and "ENTITY" not in cleaned


# --- calculation package -------------------------------------------------------------------


@pytest.fixture(scope="module")
def package(tmp_path_factory: pytest.TempPathFactory, keys: dict) -> Path:
    folder = tmp_path_factory.mktemp("pkg")
    notebook = folder / "line.ipynb"
    nbformat.write(demo_notebook(executed=True), str(notebook))
    out = folder / "line.zip"
    build_package(notebook, out, key_file=keys["first"][0])
    return out


def _rewritten(
    source: Path,
    target: Path,
    change: dict[str, bytes] | None = None,
    add: list[tuple[str, bytes]] | None = None,
) -> Path:
    """A copy of a zip with some members' bytes replaced and some entries appended."""
    with zipfile.ZipFile(source) as old, zipfile.ZipFile(target, "w") as new:
        for info in old.infolist():
            new.writestr(info, (change or {}).get(info.filename, old.read(info)))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", UserWarning)  # zipfile warns of a duplicate name
            for name, data in add or []:
                new.writestr(name, data)
    return target


def _member(package: Path, name: str) -> bytes:
    with zipfile.ZipFile(package) as archive:
        return archive.read(name)


def test_package_verifies(package: Path, keys: dict, capsys: pytest.CaptureFixture) -> None:
    with_key = verify_package(package, keys["first"][1])
    assert with_key.ok, with_key.lines()
    listed = len(json.loads(_member(package, "manifest.json"))["files"])
    assert (
        f"Files: {listed} of {listed} listed files match the manifest (SHA-256)" in with_key.facts
    )
    assert any(line.startswith("Record: Results: re-solved") for line in with_key.facts)
    alone = verify_package(package)
    assert alone.ok, alone.lines()
    fingerprint = jwcrypto_jwk.JWK.from_pem(keys["first"][1].read_bytes()).thumbprint()
    assert f"Manifest: valid EdDSA (Ed25519) signature by key {fingerprint}" in alone.facts
    assert _cli(["verify", str(package), "--public-key", str(keys["first"][1])]) == 0
    assert capsys.readouterr().out.rstrip().endswith("\nVERIFIED")


def test_tampered_file_in_package_fails(
    package: Path, keys: dict, tmp_path: Path, capsys: pytest.CaptureFixture
) -> None:
    table = _member(package, "results.csv")
    digit = re.search(rb"\n[^,\n]*,[^,\n]*,(\d)", table)
    assert digit is not None
    flipped = str((int(digit.group(1)) + 1) % 10).encode()
    tampered = table[: digit.start(1)] + flipped + table[digit.end(1) :]
    zipped = _rewritten(package, tmp_path / "tampered.zip", {"results.csv": tampered})
    outcome = verify_package(zipped, keys["first"][1])
    assert not outcome.ok
    assert outcome.problems == [
        "results.csv was changed after packaging: its SHA-256 differs from the manifest's"
    ]
    assert _cli(["verify", str(zipped)]) == 1
    printed = capsys.readouterr().out
    assert "FAILED: results.csv was changed" in printed and printed.endswith("NOT VERIFIED\n")
    # A changed size is caught before anything is read; so is a changed record.
    longer = _rewritten(
        package, tmp_path / "longer.zip", {"case.json": _member(package, "case.json") + b" "}
    )
    assert any("case.json is" in p and "bytes" in p for p in verify_package(longer).problems)
    record = _member(package, "record.html").replace(b"Ingenieur", b"Ingenieux", 1)
    edited = _rewritten(package, tmp_path / "record.zip", {"record.html": record})
    problems = verify_package(edited).problems
    assert (
        "record.html was changed after packaging: its SHA-256 differs from the manifest's"
        in problems
    )
    assert any(p.startswith("record.html: the record's content was altered") for p in problems)


def test_manifest_edited_to_match_fails(package: Path, tmp_path: Path) -> None:
    table = _member(package, "results.csv").replace(b",", b";", 1)
    manifest = json.loads(_member(package, "manifest.json"))
    for entry in manifest["files"]:
        if entry["name"] == "results.csv":
            entry["sha256"] = hashlib.sha256(table).hexdigest()
    from workbench.signing import canonicalize

    zipped = _rewritten(
        package,
        tmp_path / "forged.zip",
        {"results.csv": table, "manifest.json": canonicalize(manifest)},
    )
    outcome = verify_package(zipped)
    assert not outcome.ok
    assert outcome.problems == ["manifest.json differs from the manifest that was signed"]


def test_added_or_doubled_files_fail(package: Path, tmp_path: Path) -> None:
    added = _rewritten(package, tmp_path / "added.zip", add=[("notes.txt", b"trust me")])
    assert verify_package(added).problems == [
        "notes.txt is not listed in the manifest: it was added after packaging"
    ]
    doubled = _rewritten(package, tmp_path / "doubled.zip", add=[("case.json", b"{}")])
    problems = verify_package(doubled).problems
    assert "the zip holds 2 entries named case.json: one was added after packaging" in problems


def test_package_resigned_with_another_key_fails(package: Path, keys: dict, tmp_path: Path) -> None:
    notebook = tmp_path / "line.ipynb"
    notebook.write_bytes(_member(package, "notebook.ipynb"))
    other = build_package(notebook, tmp_path / "other.zip", key_file=keys["second"][0])
    assert (
        other["results_digest"] == json.loads(_member(package, "manifest.json"))["results_digest"]
    )
    against_first = verify_package(tmp_path / "other.zip", keys["first"][1])
    assert not against_first.ok
    assert any("re-signed" in line for line in against_first.problems)
    # A manifest signed by one key beside a record signed by another is caught too.
    mixed = _rewritten(
        package,
        tmp_path / "mixed.zip",
        {"manifest.jws": _member(tmp_path / "other.zip", "manifest.jws")},
    )
    assert any("not with the record's key" in p for p in verify_package(mixed).problems)


def test_unsigned_or_broken_package_does_not_verify(tmp_path: Path) -> None:
    notebook = tmp_path / "line.ipynb"
    nbformat.write(demo_notebook(executed=True), str(notebook))
    build_package(notebook, tmp_path / "unsigned.zip")
    outcome = verify_package(tmp_path / "unsigned.zip")
    assert not outcome.ok
    assert "the package is UNSIGNED: it has no manifest.jws" in outcome.problems
    cut = tmp_path / "cut.zip"
    cut.write_bytes((tmp_path / "unsigned.zip").read_bytes()[:-40])
    assert not verify_package(cut).ok


# --- torsional vibration and fatigue sections --------------------------------------------------


def _section_of(text: str, ident: str) -> str:
    return text.split(f'<section class="record-section" id="{ident}">')[1].split(
        "</section>", maxsplit=1
    )[0]


def _table_rows(section: str, css: str) -> list[list[str]]:
    table = section.split(f'<table class="{css}">')[1].split("</table>", maxsplit=1)[0]
    body = table.split("<tbody>")[1]
    return [re.findall(r"<td>(.*?)</td>", row) for row in body.split("</tr>") if "<td>" in row]


def _body(case: dict) -> str:
    """The record body of a case, unsigned, without notebook cells."""
    return render_body(
        compute(case),
        DEMO_TITLE_BLOCK,
        "",
        signer="",
        signed_at=SIGNED_AT,
        fingerprint=None,
        case_source="test",
    )


@pytest.fixture(scope="module")
def feed_record(keys: dict, tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("feed")
    notebook = folder / "feed.ipynb"
    nbformat.write(demo_notebook(FEED_DRIVE_CASE, executed=True), str(notebook))
    text, _ = export_file(notebook, key_file=keys["first"][0], signed_at=SIGNED_AT, execute=False)
    path = folder / "feed.html"
    path.write_text(text, encoding="utf-8", newline="")
    return path


def test_record_with_discs_and_fatigue_holds_both_sections(feed_record: Path, keys: dict) -> None:
    outcome = verify_record(feed_record, keys["first"][1])
    assert outcome.ok, outcome.lines()
    text = feed_record.read_text("utf-8")
    model = parse_case(FEED_DRIVE_CASE)
    report = run_checks(solve(model))
    # The modes the record shows: the same call as the frequency check, ten modes at least.
    modes = natural_modes(model, up_to=1450 * 2 * math.pi / 60 * 1.2)
    vibration = _section_of(text, "vibration")
    rows = _table_rows(vibration, "frequencies")
    assert len(rows) == len(modes)
    for row, hertz, rigid in zip(rows, modes.frequency, modes.rigid_body, strict=True):
        assert row[1] == f"{hertz:.6g}"
        assert row[2] == f"{hertz * 60:.6g}".replace("-", "\u2212")
        assert row[3] == ("rigid body" if rigid else "flexible")
    (separation,) = _table_rows(vibration, "separations")
    assert separation[:3] == ["run", "1", f"{modes.frequency[0]:.6g}"]
    assert separation[-1] == "clear"
    assert "common practice, no source" in vibration
    assert vibration.count('class="figure mode-shape"') == 4
    assert vibration.count('class="equation"') == 3
    fatigue = _section_of(text, "fatigue")
    rows = _table_rows(fatigue, "fatigue")
    assert len(rows) == len(report.fatigue_points) == 3
    for row, point in zip(rows, report.fatigue_points, strict=True):
        factors = point.factors
        assert row[:2] == [point.shaft, str(point.segment)]
        assert row[3] == f"{factors.mean_shear / 1e6:.5g}"  # MPa
        assert row[4] == f"{factors.alternating_shear / 1e6:.5g}"
        assert row[7:12] == [
            f"{getattr(factors, name):.3g}"
            for name in ("goodman", "gerber", "asme_elliptic", "soderberg", "first_cycle_yield")
        ]
    assert fatigue.count('class="figure fatigue-diagram"') == 3
    assert fatigue.count('class="equation"') == 5
    for needle in ("ka: machined", "kb: torsion", "kc: torsion", "ke: reliability 99 %"):
        assert needle in fatigue
    assert "start-up" in fatigue and "running" in fatigue


def test_record_frequency_matches_the_closed_form() -> None:
    # One massless shaft fixed at one end with a disc at the other: ω = √(k/J_disc),
    # k = G·(πd⁴/32)/L (Rao, Mechanical Vibrations, single-rotor torsional system; from memory).
    case = copy.deepcopy(FEED_DRIVE_CASE)
    del case["materials"]["steel"]["density"]
    case["shafts"][0]["segments"] = [
        {"length": 700, "material": "steel", "section": {"shape": "solid", "diameter": 45}}
    ]
    case["discs"] = [{"shaft": "feed", "x": 700, "inertia": 0.35}]
    case["design"] = {"factor_of_safety": 2.0}
    html = _body(case)
    stiffness = 79.3e9 * math.pi * 0.045**4 / 32 / 0.7
    hertz = math.sqrt(stiffness / 0.35) / (2 * math.pi)
    (row,) = _table_rows(_section_of(html, "vibration"), "frequencies")
    assert row[:4] == ["1", f"{hertz:.6g}", f"{hertz * 60:.6g}", "flexible"]
    assert "massless springs" in html  # the mode note: no density, the disc carries all inertia
    assert 'id="fatigue"' not in html


def test_record_fatigue_factor_matches_a_hand_calculation() -> None:
    # Segment 0 of the demo: Ø45 mm, no notch, torque cycling 120 ↔ 310 N·m. Shigley's Mechanical
    # Engineering Design, 9th ed.: τ = 16T/(πd³); τm, τa = (T₁ ± T₂)/2 (eq. 6-36); ka = 4.51·Sut^−0.265
    # (Table 6-2, machined), kb = 1.24·d^−0.107 (eq. 6-20, mm), kc = 0.59 (torsion), ke = 0.814
    # (Table 6-5, 99 %), Se′ = 0.5·Sut (eq. 6-8), Ssu = 0.67·Sut; Goodman 1/n = τa/Sse + τm/Ssu.
    per_torque = 16 / (math.pi * 0.045**3) / 1e6  # MPa per N·m
    mean, alternating = (310 + 120) / 2 * per_torque, (310 - 120) / 2 * per_torque
    endurance = 4.51 * 620**-0.265 * 1.24 * 45**-0.107 * 0.59 * 0.814 * 0.5 * 620
    goodman = 1 / (alternating / endurance + mean / (0.67 * 620))
    langer = 420 / math.sqrt(3) / (alternating + mean)
    html = _body(FEED_DRIVE_CASE)
    row = _table_rows(_section_of(html, "fatigue"), "fatigue")[0]
    assert float(row[3]) == pytest.approx(mean, rel=1e-4)
    assert float(row[4]) == pytest.approx(alternating, rel=1e-4)
    assert float(row[6]) == pytest.approx(endurance, rel=3e-3)  # 1.24 vs (1/7.62)^−0.107
    assert float(row[7]) == pytest.approx(goodman, rel=6e-3)  # written to 3 digits
    assert float(row[11]) == pytest.approx(langer, rel=6e-3)
    assert row[-1] == "pass"


def test_fatigue_diagram_is_drawn_to_its_numbers() -> None:
    from workbench.record.figures import fatigue_diagram_svg

    svg = fatigue_diagram_svg("seg", 100.0, 400.0, 240.0, (60.0, 30.0), "MPa")
    root = ElementTree.fromstring(svg)
    lines = [
        [tuple(map(float, p.split(","))) for p in line.get("points", "").split()]
        for line in root.iter(f"{SVG}polyline")
    ]
    goodman, gerber, elliptic, soderberg, langer = lines
    (point,) = [(float(c.get("cx", "")), float(c.get("cy", ""))) for c in root.iter(f"{SVG}circle")]
    origin = (goodman[0][0], goodman[-1][1])  # Goodman runs from (0, Sse) to (Ssu, 0)
    x_per, y_per = (goodman[-1][0] - origin[0]) / 400.0, (origin[1] - goodman[0][1]) / 100.0
    # Every curve starts at τa = Sse (Langer at Ssy) and ends on the τm axis at its strength.
    assert soderberg[-1][0] - origin[0] == pytest.approx(240 * x_per, abs=0.02)
    assert elliptic[-1][0] - origin[0] == pytest.approx(240 * x_per, abs=0.02)
    assert gerber[-1][0] == pytest.approx(goodman[-1][0]) and gerber[0] == goodman[0]
    assert origin[1] - langer[0][1] == pytest.approx(240 * y_per, abs=0.02)
    assert point[0] - origin[0] == pytest.approx(60 * x_per, abs=0.02)
    assert origin[1] - point[1] == pytest.approx(30 * y_per, abs=0.02)
    # Gerber at τm = Ssu/2 lies at τa = Sse·(1 − 1/4).
    assert origin[1] - gerber[20][1] == pytest.approx(75 * y_per, abs=0.02)


def _resigned(text: str, private_key_path: Path) -> str:
    """The record with its body as edited, signed again by the same key (a signer who edits)."""
    from workbench.record.document import content_digest, signature_block
    from workbench.signing import (
        canonicalize,
        jwk_thumbprint,
        load_private_key,
        public_jwk,
        sign_compact,
    )

    start, end = text.index(BLOCK_START), text.index(BLOCK_END) + len(BLOCK_END) + 1
    found = re.search(r'id="record-signature">([^<]+)<', text)
    assert found is not None
    token = found.group(1)
    payload_part = token.split(".")[1]
    payload = json.loads(base64.urlsafe_b64decode(payload_part + "=" * (-len(payload_part) % 4)))
    payload["content_digest"] = content_digest(text[:start] + text[end:])
    key = load_private_key(private_key_path)
    jwk = public_jwk(key.public_key())
    token = sign_compact(canonicalize(payload), key, {"typ": "JOSE"})
    block = signature_block(payload, token, jwk, jwk_thumbprint(jwk))
    return text[:start] + block + text[end:]


def test_changed_frequency_digit_fails_verify(feed_record: Path, keys: dict) -> None:
    text = feed_record.read_text("utf-8")
    start = text.index('<table class="frequencies">')
    match = re.compile(r"<td>1</td><td>(\d)").search(text, start)
    assert match is not None
    flipped = str((int(match.group(1)) + 1) % 10)
    tampered = text[: match.start(1)] + flipped + text[match.end(1) :]
    outcome = verify_text(tampered.encode("utf-8"), None)
    assert not outcome.ok
    assert any("content was altered" in line for line in outcome.problems)
    # Signed again after the edit: signature and content hold, the recomputation does not.
    again = verify_text(_resigned(tampered, keys["first"][0]).encode("utf-8"), None)
    assert not again.ok
    assert again.problems == [
        "the torsional vibration section written in the record differ from those recomputed "
        "from the embedded case"
    ]
    assert verify_text(_resigned(text, keys["first"][0]).encode("utf-8"), None).ok


def test_changed_fatigue_factor_fails_verify(feed_record: Path, keys: dict) -> None:
    text = feed_record.read_text("utf-8")
    start = text.index('<table class="fatigue">')
    match = re.compile(r"<td>(pass|FAIL)</td>").search(text, start)
    assert match is not None
    other = "FAIL" if match.group(1) == "pass" else "pass"
    tampered = text[: match.start(1)] + other + text[match.end(1) :]
    again = verify_text(_resigned(tampered, keys["first"][0]).encode("utf-8"), None)
    assert again.problems == [
        "the fatigue section written in the record differ from those recomputed from the "
        "embedded case"
    ]


def test_results_digest_covers_modes_and_fatigue_and_keeps_old_cases() -> None:
    from workbench.design.checks import check_document
    from workbench.record.computation import digest_rounded, results_digest
    from workbench.signing import canonicalize
    from workbench.solver.tables import results_document

    plain = compute(LINE_SHAFT_CASE)
    assert plain.modes is None
    document = {
        "results": results_document(plain.results),
        "checks": check_document(plain.report),
    }
    expected = "sha256:" + hashlib.sha256(canonicalize(digest_rounded(document))).hexdigest()
    assert plain.results_digest == expected  # a static case signs what it always signed
    feed = compute(FEED_DRIVE_CASE)
    assert feed.modes is not None and feed.report.fatigue_points
    assert feed.results_digest != results_digest(feed.results, feed.report)
    changed = copy.deepcopy(FEED_DRIVE_CASE)
    changed["discs"][1]["inertia"] = 0.36  # statics unchanged, the modes move
    assert compute(changed).results_digest != feed.results_digest
    assert "also torsional vibration" in _body(FEED_DRIVE_CASE)


def test_mode_shape_drawing_follows_the_shape() -> None:
    from workbench.record.figures import mode_shape_svg

    modes = natural_modes(parse_case(FEED_DRIVE_CASE))
    x, angle = modes.shape(0, "feed")
    svg = mode_shape_svg("mode 1", [("feed", (x * 1000).tolist(), angle.tolist())], [], "x [mm]")
    root = ElementTree.fromstring(svg)
    (line,) = root.iter(f"{SVG}polyline")
    points = [tuple(map(float, p.split(","))) for p in line.get("points", "").split()]
    assert len(points) == len(x)
    frame = next(r for r in root.iter(f"{SVG}rect") if r.get("fill") == "none")
    top, height = float(frame.get("y", "")), float(frame.get("height", ""))
    for (_, y), value in zip(points, angle, strict=True):
        assert y == pytest.approx(top + (1 - value) / 2 * height, abs=0.006)


def test_record_shows_a_notch_and_the_nominal_mean_choice() -> None:
    # A stated-Kts notch appears in the inputs, its factor in the fatigue table, and the choice of
    # a nominal mean stress is stated with its caution. Kfs = 1 + q(Kts − 1) (Shigley eq. 6-32).
    case = copy.deepcopy(FEED_DRIVE_CASE)
    case["shafts"][0]["segments"][0]["notch"] = {
        "kts": 1.65,
        "notch_sensitivity": 0.9,
        "description": "ring groove",
    }
    case["design"]["fatigue"]["mean_concentration"] = "none"
    html = _body(case)
    assert "ring groove: Kts 1.65, q 0.9" in html
    fatigue = _section_of(html, "fatigue")
    assert "none (nominal mean stress)" in fatigue
    assert "not conservative for a notch" in fatigue
    assert "τm is written without Kfs" in fatigue
    assert "τm is written without Kfs" not in _section_of(_body(FEED_DRIVE_CASE), "fatigue")
    row = _table_rows(fatigue, "fatigue")[0]
    assert row[5] == f"{1 + 0.9 * 0.65:.3g}"
