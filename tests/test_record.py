"""The calculation record: export, signature, verification, tamper detection, package.

Independent references: jwcrypto (a JOSE library of its own) checks every JWS; the force-method
hand check is compared with the closed form for a bar fixed at both ends; hashlib checks the
package manifest.
"""

from __future__ import annotations

import argparse
import base64
import copy
import hashlib
import json
import re
import subprocess
import sys
import zipfile
from pathlib import Path

import nbformat
import pytest
from jwcrypto import jwk as jwcrypto_jwk
from jwcrypto import jws as jwcrypto_jws

from workbench.record import cli_commands
from workbench.record.demo import DEMO_TITLE_BLOCK, LINE_SHAFT_CASE, demo_notebook
from workbench.record.document import BLOCK_END, BLOCK_START, CSP
from workbench.record.exporter import RecordExporter, export_file
from workbench.record.handcheck import force_method_check
from workbench.record.signing import write_key_pair
from workbench.record.verify import verify_record, verify_text
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

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
    assert section.count("<td>agrees</td>") == 3
    assert "DISAGREES" not in section


def test_force_method_matches_closed_form_fixed_fixed() -> None:
    # Bar fixed at both ends, torque T0 at distance a from A (b = L − a), constant G·J:
    # T_A = T0·b/L, T_B = T0·a/L resisting (Gere & Goodno, Mechanics of Materials, 8th ed.,
    # §3.8, bar fixed at both ends; from memory). Reactions here are torques on the shaft: −.
    case = copy.deepcopy(LINE_SHAFT_CASE)
    case["shafts"][0]["segments"] = [
        {"length": 1000, "material": "steel", "section": {"shape": "solid", "diameter": 40}}
    ]
    case["supports"] = [{"shaft": "main", "x": 0}, {"shaft": "main", "x": 1000}]
    case["load_cases"] = [{"name": "T0", "torques": [{"shaft": "main", "x": 300, "torque": 500}]}]
    case["combinations"] = []
    model = parse_case(case)
    results = solve(model)
    (check,) = force_method_check(model, results.reactions)
    assert check.reactions[0] == pytest.approx(-500 * 0.7, rel=1e-10)
    assert check.reactions[1] == pytest.approx(-500 * 0.3, rel=1e-10)
    assert check.agrees


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
    from workbench.solver.errors import InputError

    path = tmp_path / "empty.ipynb"
    nbformat.write(nbformat.v4.new_notebook(), str(path))
    with pytest.raises(InputError, match="holds no case"):
        export_file(path, execute=False)


def _cli(argv: list[str]) -> int:
    from workbench import cli

    parser = argparse.ArgumentParser(prog="workbench")
    commands = parser.add_subparsers(dest="command", required=True)
    cli_commands.register(commands)
    arguments = parser.parse_args(argv)
    try:
        return arguments.run(arguments)
    except cli.WorkbenchError as error:  # what the main command does: one line, exit 2
        sys.stderr.write(f"{error}\n")
        return cli.EXIT_BAD_INPUT


def test_cli_keygen_export_verify_package(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    assert _cli(["keygen", "--out", str(tmp_path / "k")]) == 0
    printed = capsys.readouterr().out
    private, public = tmp_path / "k" / "private.pem", tmp_path / "k" / "public.pem"
    assert private.stat().st_mode & 0o077 == 0
    fingerprint = re.search(r"fingerprint: (\S+)", printed).group(1)
    assert fingerprint == jwcrypto_jwk.JWK.from_pem(public.read_bytes()).thumbprint()
    notebook = _executed(tmp_path)
    out = tmp_path / "record.html"
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
    assert _cli(["keygen", "--out", str(tmp_path / "k")]) == 2  # never overwrites a key

    package = tmp_path / "pkg.zip"
    assert _cli(["package", str(notebook), "-o", str(package), "--key", str(private)]) == 0
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
