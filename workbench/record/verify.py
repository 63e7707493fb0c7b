"""Check a calculation record: who signed it, when, with which key, and that nothing changed.

The verifier reads the record as text and never runs anything from it (no browser, no
script, no template). It

1. finds the signature block (exactly one, followed by nothing but ``</body></html>``: a file
   cut short or with anything appended fails here);
2. checks the JWS (EdDSA) against the public key given, or else against the key embedded in
   the record — then the fingerprint it reports is what a reader compares with the one the
   signer published;
3. recomputes the content digest of the file outside the signature block and compares it
   with the signed one (any changed number or word, in the body or the CSS, fails);
4. rebuilds the signature block from the token and key and compares it byte for byte;
5. re-runs the solver and the checks from the signed case and compares the results digest,
   and compares the results and checks sections written in the record with those rebuilt
   from the recomputation.
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from workbench.record.document import (
    BLOCK_END,
    BLOCK_START,
    DOCUMENT_END,
    FORMAT,
    _checks_html,
    _results_html,
    _section,
    compute,
    content_digest,
    signature_block,
)
from workbench.solver.errors import InputError, WorkbenchError

__all__ = ["Verification", "verify_record", "verify_text"]

_TOKEN = re.compile(
    r'<script type="application/jose" id="record-signature">([A-Za-z0-9_.-]*)</script>'
)
_JWK = re.compile(
    r'<script type="application/jwk\+json" id="record-public-key">(\{[^<]*\})</script>'
)
_PAYLOAD = re.compile(r'<script type="application/json" id="record-payload">([^<]*)</script>')


@dataclass
class Verification:
    """The outcome of checking a record.

    Attributes
    ----------
    ok
        Whether every check holds (signed, unchanged, results confirmed).
    facts
        What the record says and what was confirmed (signer, time, fingerprint…).
    problems
        What failed, one clear line each.
    """

    ok: bool = False
    facts: list[str] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)

    def lines(self) -> list[str]:
        """Readable report lines, the verdict last."""
        verdict = "VERIFIED" if self.ok and not self.problems else "NOT VERIFIED"
        return [*self.facts, *(f"FAILED: {p}" for p in self.problems), verdict]


def verify_record(path: str | Path, public_key_path: str | Path | None = None) -> Verification:
    """Check a record file; see :func:`verify_text`.

    Raises
    ------
    InputError
        When the file (or the key file) cannot be read.
    """
    file = Path(path)
    try:
        data = file.read_bytes()
    except OSError as error:
        msg = f"cannot read the record: {error.strerror or error}"
        raise InputError(str(file), msg) from None
    public_key = None
    if public_key_path is not None:
        from workbench.record.signing import load_public_key  # noqa: PLC0415

        public_key = load_public_key(public_key_path)
    return verify_text(data, public_key)


def verify_text(data: bytes, public_key: Any = None) -> Verification:
    """Check the bytes of a record.

    Parameters
    ----------
    data
        The record file's bytes.
    public_key
        The signer's Ed25519 public key, or ``None`` to use the key embedded in the record
        (then only the reported fingerprint ties it to a person).

    Returns
    -------
    Verification
        Facts and problems; ``ok`` only when all holds.
    """
    from workbench.record.signing import (  # noqa: PLC0415
        SigningError,
        jwk_thumbprint,
        public_key_from_jwk,
        verify_compact,
    )

    outcome = Verification()
    problems = outcome.problems
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        problems.append("the file is not UTF-8 text: not a workbench record, or damaged")
        return outcome
    if not text.endswith(DOCUMENT_END):
        problems.append(
            "the file does not end the way a record ends (</body></html>): it was cut short "
            "(truncated) or something was appended"
        )
    starts, ends = text.count(BLOCK_START), text.count(BLOCK_END)
    if starts != 1 or ends != 1:
        problems.append(
            f"expected one signature block, found {starts} start and {ends} end markers: "
            "truncated, or not a workbench record"
        )
        return outcome
    start = text.index(BLOCK_START)
    end = text.index(BLOCK_END) + len(BLOCK_END) + 1
    if end <= start or text[end - 1] != "\n":
        problems.append("the signature block is malformed (truncated or edited)")
        return outcome
    block, outside = text[start:end], text[:start] + text[end:]
    if text[end:] != DOCUMENT_END and not problems:
        problems.append("something follows the signature block besides </body></html>")

    token_match, jwk_match = _TOKEN.search(block), _JWK.search(block)
    signed = token_match is not None
    jwk: dict[str, Any] | None = None
    token: str | None = None
    fingerprint: str | None = None
    if signed and token_match is not None:
        token = token_match.group(1)
        if jwk_match is None:
            problems.append("the record's public key (record-public-key) is missing")
            return outcome
        try:
            jwk = json.loads(jwk_match.group(1))
            embedded = public_key_from_jwk(jwk)
        except (ValueError, SigningError) as error:
            problems.append(f"the embedded public key is unreadable: {error}")
            return outcome
        fingerprint = jwk_thumbprint(embedded)
        key = embedded
        if public_key is not None:
            expected = jwk_thumbprint(public_key)
            if expected != fingerprint:
                problems.append(
                    f"the record was signed with key {fingerprint}, not with the expected key "
                    f"{expected}: it was re-signed by someone else, or the wrong key was given"
                )
                return outcome
            key = public_key
        try:
            _, payload_bytes = verify_compact(token, key)
        except SigningError as error:
            problems.append(f"the signature does not hold: {error}")
            return outcome
        outcome.facts.append(f"Signature: valid EdDSA (Ed25519) signature by key {fingerprint}")
        if public_key is None:
            outcome.facts.append(
                "Key: taken from the record itself; compare the fingerprint with the one the "
                "signer published (or pass --public-key)"
            )
        else:
            outcome.facts.append("Key: matches the public key given")
    else:
        payload_match = _PAYLOAD.search(block)
        if payload_match is None:
            problems.append("the record carries neither a signature nor a payload: damaged")
            return outcome
        payload_bytes = payload_match.group(1).encode("utf-8")
        problems.append("the record is UNSIGNED: nothing proves who made it")
    try:
        payload = json.loads(payload_bytes)
    except ValueError:
        problems.append("the signed payload is not JSON")
        return outcome
    if not isinstance(payload, dict) or payload.get("format") != FORMAT:
        problems.append("the payload is not a workbench calculation record")
        return outcome
    outcome.facts += [
        f"Signed by: {payload.get('signer') or 'not named'}",
        f"Signed at: {payload.get('signed_at', '?')} (UTC)",
        f"Software: workbench {payload.get('software', {}).get('workbench', '?')}",
    ]
    title_block = payload.get("title_block") or {}
    if title_block:
        outcome.facts.append(
            "Title: "
            + ", ".join(
                f"{key} {title_block[key]}"
                for key in ("project", "calculation_number", "revision")
                if key in title_block
            )
        )
    if content_digest(outside) == payload.get("content_digest"):
        outcome.facts.append(f"Content: unchanged ({payload.get('content_digest')})")
    else:
        problems.append(
            "the record's content was altered after signing: its visible text, numbers or "
            "styles differ from what was signed (content digest mismatch)"
        )
    if block != signature_block(payload, token, jwk, fingerprint):
        problems.append("the verification details at the end of the record were altered")
    try:
        computation = compute(payload.get("case") or {})
    except WorkbenchError as error:
        problems.append(f"the embedded case cannot be solved again: {error}")
        return outcome
    if computation.results_digest == payload.get("results_digest"):
        outcome.facts.append(
            f"Results: re-solved from the embedded case, every number agrees "
            f"({computation.results_digest})"
        )
    else:
        problems.append(
            "re-solving the embedded case gives results other than those signed "
            "(results digest mismatch)"
        )
    for ident, title, builder in (
        ("results", "Results", _results_html),
        ("checks", "Design checks", _checks_html),
    ):
        if _section(ident, title, builder(computation)) not in outside:
            problems.append(
                f"the {title.lower()} written in the record differ from those recomputed from "
                "the embedded case"
            )
    outcome.ok = signed and not problems
    return outcome
