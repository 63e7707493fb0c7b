"""Records and packages signed before signing moved to joserfc and rfc8785 still verify.

The fixtures (tests/fixtures/README.md) were written by the hand-made JWS and RFC 8785 code
this package replaced; jwcrypto, an independent JOSE library, checks their signatures too, so
the verdicts below are not only our code agreeing with itself.
"""

from __future__ import annotations

import io
import json
import zipfile
from pathlib import Path

import pytest
from jwcrypto import jwk as jwcrypto_jwk
from jwcrypto import jws as jwcrypto_jws

from workbench.cli.record import EXIT_NOT_VERIFIED
from workbench.record.verify import verify_package_bytes, verify_text
from workbench.signing import canonicalize, decode_unverified, load_public_key

FIXTURES = Path(__file__).parent / "fixtures"
PUBLIC_KEY = FIXTURES / "before-public.pem"
FINGERPRINT = "s1CV2ZPt5PMf0rEntQku3lSvu2_jgoS-3MRkS-RO7H4"
RECORDS = ["record-before.html", "record-large-integer.html"]


def _token(record: bytes) -> str:
    start = record.index(b'id="record-signature">') + len(b'id="record-signature">')
    return record[start : record.index(b"</script>", start)].decode("ascii")


def _flip(data: bytes, position: int) -> bytes:
    """``data`` with one byte changed (a digit to the next digit, anything else to 'x')."""
    old = data[position : position + 1]
    new = bytes([ord("0") + (old[0] - ord("0") + 1) % 10]) if old.isdigit() else b"x"
    assert new != old
    return data[:position] + new + data[position + 1 :]


@pytest.mark.parametrize("name", RECORDS)
def test_record_signed_before_verifies(name: str) -> None:
    data = (FIXTURES / name).read_bytes()
    outcome = verify_text(data, load_public_key(PUBLIC_KEY))
    assert outcome.ok, outcome.lines()
    text = "\n".join(outcome.lines())
    assert f"signature by key {FINGERPRINT}" in text
    assert "Results: re-solved from the embedded case, every number" in text
    # Outside check: jwcrypto verifies the same token with the same public key.
    check = jwcrypto_jws.JWS()
    check.deserialize(_token(data))
    check.verify(jwcrypto_jwk.JWK.from_pem(PUBLIC_KEY.read_bytes()))
    assert json.loads(check.payload)["content_digest"] == outcome.payload["content_digest"]


@pytest.mark.parametrize("name", RECORDS)
def test_record_signed_before_fails_after_a_one_byte_change(name: str) -> None:
    data = (FIXTURES / name).read_bytes()
    key = load_public_key(PUBLIC_KEY)
    token_at = data.index(b'id="record-signature">') + len(b'id="record-signature">')
    places = {
        "a number in the results": data.index(b"<td>", data.index(b'id="results"')) + 4,
        "a word of the method": data.index(b'id="method"') + 40,
        "the stylesheet": data.index(b"<style") + 10,
        "the token's payload": token_at + _token(data).index(".") + 20,
        "the token's signature": token_at + len(_token(data)) - 10,
    }
    for place, position in places.items():
        outcome = verify_text(_flip(data, position), key)
        assert not outcome.ok, place
        assert outcome.problems, place


def test_large_integer_is_signed_as_its_canonical_double() -> None:
    # RFC 8785 §3.2.2.3 and Appendix B (read): the double 10^21 is written "1e+21". The old
    # canonicaliser carried the integer 10**21 as that double; rfc8785 refuses integers above
    # 2**53 - 1, so ours converts first and must give the signed bytes back exactly.
    _, payload = decode_unverified(_token((FIXTURES / "record-large-integer.html").read_bytes()))
    assert b'"limit":1e+21,' in payload
    document = json.loads(payload)
    limit = document["case"]["design"]["rotation_limits"][0]
    assert limit["limit"] == 1e21
    assert canonicalize(document) == payload
    limit["limit"] = 10**21  # the integer the case file held
    assert canonicalize(document) == payload


def test_package_signed_before_verifies() -> None:
    data = (FIXTURES / "package-before.zip").read_bytes()
    outcome = verify_package_bytes(data, load_public_key(PUBLIC_KEY))
    assert outcome.ok, outcome.lines()
    text = "\n".join(outcome.lines())
    assert f"Manifest: valid EdDSA (Ed25519) signature by key {FINGERPRINT}" in text
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        manifest, token = archive.read("manifest.json"), archive.read("manifest.jws")
    check = jwcrypto_jws.JWS()
    check.deserialize(token.decode("ascii"))
    check.verify(jwcrypto_jwk.JWK.from_pem(PUBLIC_KEY.read_bytes()))
    assert check.payload == manifest
    assert canonicalize(json.loads(manifest)) == manifest


def _rezipped(data: bytes, name: str, position: int) -> bytes:
    """The package with one byte of member ``name`` changed, written as a sound zip again."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as source, zipfile.ZipFile(out, "w") as target:
        for info in source.infolist():
            content = source.read(info)
            target.writestr(info, _flip(content, position) if info.filename == name else content)
    return out.getvalue()


@pytest.mark.parametrize(
    ("name", "position", "fragment"),
    [
        ("manifest.json", 40, "differs from the manifest that was signed"),
        ("manifest.jws", -10, "signature does not hold"),
        ("case.json", 60, "case.json was changed after packaging"),
        ("results.csv", 200, "results.csv was changed after packaging"),
        ("record.html", 5000, "record.html was changed after packaging"),
    ],
)
def test_package_signed_before_fails_after_a_one_byte_change(
    name: str, position: int, fragment: str
) -> None:
    data = (FIXTURES / "package-before.zip").read_bytes()
    key = load_public_key(PUBLIC_KEY)
    outcome = verify_package_bytes(_rezipped(data, name, position), key)
    assert not outcome.ok
    assert any(fragment in problem for problem in outcome.problems), outcome.problems
    # A byte changed in the zip file itself (not re-zipped) is found as well.
    assert not verify_package_bytes(_flip(data, len(data) // 2), key).ok


def test_cli_verifies_the_old_record_and_refuses_a_changed_one(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    from workbench.cli import main

    record = FIXTURES / "record-before.html"
    assert main(["verify", str(record), "--public-key", str(PUBLIC_KEY)]) == 0
    assert capsys.readouterr().out.rstrip().endswith("VERIFIED")
    data = record.read_bytes()
    changed = tmp_path / "changed.html"
    changed.write_bytes(_flip(data, data.index(b"<td>", data.index(b'id="results"')) + 4))
    assert main(["verify", str(changed), "--public-key", str(PUBLIC_KEY)]) == EXIT_NOT_VERIFIED
    assert capsys.readouterr().out.rstrip().endswith("NOT VERIFIED")
