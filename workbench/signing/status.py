"""A record's signature status in one line, from its signature block alone (for the panel).

This checks what signing covers — every JWS of the chain against the key the record carries
and the content digest of the file — without the record's code: it does not re-solve the case
(``workbench verify`` does that, and compares the keys with the ones a reader was given).

References
----------
.. [1] M. Jones, J. Bradley and N. Sakimura, "JSON Web Signature (JWS)", RFC 7515, May 2015,
   §5.2 (validation).
"""

from __future__ import annotations

import json
import os
from pathlib import Path

from workbench.signing.block import (
    JWK_SCRIPT,
    PAYLOAD_SCRIPT,
    TOKEN_SCRIPT,
    BlockData,
    content_digest,
    split_block,
)
from workbench.signing.chain import Link, chain_links
from workbench.signing.jose import SigningError, jwk_thumbprint, public_key_from_jwk, verify_compact

__all__ = ["record_status"]

#: Largest record read for its status (bytes), as the verifier's own bound on a payload.
_MAX_RECORD_BYTES = 256 * 1024 * 1024


def record_status(path: str | os.PathLike[str]) -> tuple[bool, str]:
    """Whether a record file's signatures hold, and one line saying who signed it as what.

    Parameters
    ----------
    path
        The record file (HTML).

    Returns
    -------
    tuple
        ``(holds, line)``: ``holds`` when the record is signed, every signature of its chain
        holds and its content is unchanged; ``line`` names each signature's role, signer and
        key fingerprint, or the first thing that fails.
    """
    file = Path(path)
    try:
        if file.stat().st_size > _MAX_RECORD_BYTES:
            return False, f"{file.name}: larger than a record may be"
        text = file.read_bytes().decode("utf-8")
    except OSError as error:
        return False, f"{file.name}: cannot be read ({error.strerror or error})"
    except UnicodeDecodeError:
        return False, f"{file.name}: not a workbench record (not UTF-8 text)"
    parts = split_block(text)
    if parts is None:
        return False, f"{file.name}: not a workbench record (no signature block)"
    before, block, after = parts
    data = BlockData(block)
    token, jwk_text = data.get(TOKEN_SCRIPT), data.get(JWK_SCRIPT)
    if token is None:
        what = "UNSIGNED" if data.get(PAYLOAD_SCRIPT) is not None else "damaged"
        return False, f"{file.name}: {what}, nothing proves who made it"
    try:
        jwk = json.loads(jwk_text or "")
        key = public_key_from_jwk(jwk)
        _, payload_bytes = verify_compact(token, key)
        payload = json.loads(payload_bytes)
    except (ValueError, SigningError) as error:
        return False, f"{file.name}: NOT VALID, the record's signature does not hold ({error})"
    digest = content_digest(before + after)
    first = Link(
        "prepared",
        str(payload.get("signer") or "not named"),
        str(payload.get("signed_at", "?")),
        jwk_thumbprint(key),
        token,
        jwk,
    )
    if payload.get("content_digest") != digest:
        first.problems.append("the content was altered after signing")
    links = chain_links(first, data.countersignatures(), digest)
    for link in links:
        if link.problems:
            return False, f"{file.name}: NOT VALID, the {link.role} signature: {link.problems[0]}"
    signers = "; ".join(
        f"{link.role} by {link.name or 'not named'} (key {link.fingerprint})" for link in links
    )
    return True, f"{file.name}: signatures hold, content unchanged. {signers}"
