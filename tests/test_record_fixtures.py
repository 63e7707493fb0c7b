"""Records signed by earlier versions of workbench still verify.

The fixtures were exported and signed before the record's markup moved into templates:

* ``record-before.html``: ``workbench export notebooks/demo.ipynb`` (the bundled press-drive
  case: two shafts, a gear, distributed torque, discs, a running-speed band, fatigue; see
  ``fixtures/README.md``);
* ``record_hostile_names_signed.html``: the feed-drive demo case with markup in the title block,
  a material's name and source, the shaft id, the load-case, combination and speed-band names.

The verifier re-renders the results, checks, vibration and fatigue sections from the signed case
and looks for them in the file, so these tests fail when the rendering of those sections changes
by a single byte. The independent reference is the signature itself (jwcrypto checks it too).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from jwcrypto import jwk as jwcrypto_jwk
from jwcrypto import jws as jwcrypto_jws

from workbench.record.verify import verify_record, verify_text

FIXTURES = Path(__file__).resolve().parent / "fixtures"
#: Each record and the public half of the key that signed it.
SIGNERS = {
    "record-before.html": FIXTURES / "before-public.pem",
    "record_hostile_names_signed.html": FIXTURES / "record_signer_public.pem",
}
RECORDS = tuple(SIGNERS)


@pytest.mark.parametrize("name", RECORDS)
def test_record_signed_before_the_templates_verifies(name: str) -> None:
    outcome = verify_record(FIXTURES / name, SIGNERS[name])
    assert outcome.ok, outcome.lines()
    assert outcome.problems == []
    assert any(
        "Results: re-solved from the embedded case, every number" in fact for fact in outcome.facts
    )
    # The same signature by an independent JOSE library.
    text = (FIXTURES / name).read_text("utf-8")
    token = re.search(r'id="record-signature">([^<]+)<', text)
    assert token is not None
    checked = jwcrypto_jws.JWS()
    checked.deserialize(token.group(1))
    checked.verify(jwcrypto_jwk.JWK.from_pem(SIGNERS[name].read_bytes()), alg="EdDSA")
    assert json.loads(checked.payload)["format"] == "workbench-calculation-record"


@pytest.mark.parametrize("name", RECORDS)
def test_old_record_re_signed_with_a_changed_section_fails(name: str) -> None:
    """A changed results number is caught (so the test above can fail)."""
    text = (FIXTURES / name).read_text("utf-8")
    start = text.index('<table class="reactions">')
    match = re.compile(r"<td>(\u2212?)(\d)").search(text, text.index("<tbody>", start))
    assert match is not None
    flipped = str((int(match.group(2)) + 1) % 10)
    tampered = text[: match.start(2)] + flipped + text[match.end(2) :]
    outcome = verify_text(tampered.encode("utf-8"), None)
    assert not outcome.ok
    assert any("content was altered" in line for line in outcome.problems)


def test_hostile_fixture_holds_its_markup_as_text() -> None:
    text = (FIXTURES / "record_hostile_names_signed.html").read_text("utf-8")
    assert "<script>alert(1)</script>" not in text
    assert "<img src=x" not in text
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in text
    assert "&#34;&gt;&lt;img src=x onerror=alert(2)&gt;" in text


def test_a_digest_differing_in_the_last_digits_alone_is_named(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    """Re-solving may differ from the signing build in the 10th digit (eigenvalues of a stiff
    system), never in a number the record shows: the verifier says which of the two it found.
    """
    import dataclasses

    from workbench.record import verify as verifier

    real_compute = verifier.compute

    def last_digits_differ(case: object) -> object:
        computation = real_compute(case)  # type: ignore[arg-type]
        return dataclasses.replace(computation, results_digest="sha256:" + "0" * 64)

    monkeypatch.setattr(verifier, "compute", last_digits_differ)
    outcome = verify_record(FIXTURES / "record-before.html", SIGNERS["record-before.html"])
    assert outcome.ok, outcome.problems
    assert any("every number the record shows agrees" in fact for fact in outcome.facts)


def test_a_shown_number_that_differs_on_re_solving_fails(monkeypatch: pytest.MonkeyPatch) -> None:
    import dataclasses

    from workbench.record import verify as verifier

    real_compute, real_sections = verifier.compute, verifier.render_sections

    def digest_differs(case: object) -> object:
        computation = real_compute(case)  # type: ignore[arg-type]
        return dataclasses.replace(computation, results_digest="sha256:" + "0" * 64)

    def one_number_differs(computation: object, earlier: bool = False) -> list[tuple[str, str]]:
        sections = list(real_sections(computation, earlier))  # type: ignore[arg-type]
        ident, section = sections[0]
        return [(ident, section + "1"), *sections[1:]]

    monkeypatch.setattr(verifier, "compute", digest_differs)
    monkeypatch.setattr(verifier, "render_sections", one_number_differs)
    outcome = verify_record(FIXTURES / "record-before.html", SIGNERS["record-before.html"])
    assert not outcome.ok
    assert any("results digest mismatch" in problem for problem in outcome.problems)
