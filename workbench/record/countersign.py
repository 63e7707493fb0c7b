"""Countersign a calculation record: a checker or an approver signs after the one who prepared it.

The record must verify first (signature, content, results re-solved from its case): nobody
countersigns what they have not checked holds. The countersignature (a further JWS, see
:mod:`workbench.signing.chain`) signs the SHA-256 of the last signature of the chain and goes
into the signature block, which the content digest leaves out: the record's own signature, its
content and every earlier countersignature stay byte for byte as they were.

References
----------
.. [1] M. Jones, J. Bradley and N. Sakimura, "JSON Web Signature (JWS)", RFC 7515, May 2015.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.record.document import signing_time
from workbench.record.render import signature_block
from workbench.record.verify import verify_text

__all__ = ["MAX_NAME_CHARACTERS", "countersign_text"]

#: Longest countersigner's name (characters): a person's name, on one line.
MAX_NAME_CHARACTERS = 120


def countersign_text(
    data: bytes,
    private_key: Any,
    *,
    role: str,
    name: str = "",
    signed_at: str | None = None,
    where: str | Path = "record",
) -> str:
    """Add a countersignature to a record's bytes; return the new record text.

    Parameters
    ----------
    data
        The record file's bytes.
    private_key
        The countersigner's Ed25519 private key.
    role
        ``"checked"`` or ``"approved"``.
    name
        The countersigner's name; default the title block's ``checked_by`` (or
        ``approved_by``).
    signed_at
        ISO 8601 UTC time; default now (or ``SOURCE_DATE_EPOCH``).
    where
        The record's file name, for messages.

    Returns
    -------
    str
        The record with the countersignature at the end of its signature block.

    Raises
    ------
    InputError
        If the record does not verify, the role cannot follow the chain (wrong order, given
        twice, a key that already signed it), or no usable name is given or found.
    """
    from workbench.signing import (  # noqa: PLC0415
        JWK_SCRIPT,
        TOKEN_SCRIPT,
        BlockData,
        Link,
        chain_links,
        content_digest,
        countersign_token,
        jwk_thumbprint,
        next_role_problem,
        public_jwk,
        split_block,
    )

    outcome = verify_text(data)
    if not outcome.ok or outcome.payload is None:
        first = outcome.problems[0] if outcome.problems else "it does not verify"
        msg = f"does not verify, and only a record that verifies is countersigned: {first}"
        raise InputError(str(where), msg)
    payload = outcome.payload
    before, block, after = split_block(data.decode("utf-8")) or ("", "", "")
    scripts = BlockData(block)
    token = scripts.get(TOKEN_SCRIPT)
    jwk = json.loads(scripts.get(JWK_SCRIPT) or "{}")
    fingerprint = jwk_thumbprint(jwk)
    first_link = Link("prepared", "", "", fingerprint, token, jwk)
    links = chain_links(first_link, scripts.countersignatures(), content_digest(before + after))
    new_fingerprint = jwk_thumbprint(private_key.public_key())
    problem = next_role_problem(links, role, new_fingerprint)
    if problem is not None:
        raise InputError("--role", problem)
    name = _name(name or str((payload.get("title_block") or {}).get(f"{role}_by") or ""), role)
    signed_at = signed_at or signing_time()
    new_token = countersign_token(
        links[-1].token or "",
        private_key,
        role=role,
        name=name,
        signed_at=signed_at,
        content_digest=str(payload.get("content_digest")),
    )
    links.append(
        Link(
            role, name, signed_at, new_fingerprint, new_token, public_jwk(private_key.public_key())
        )
    )
    return before + signature_block(payload, token, jwk, fingerprint, links[1:]) + after


def _name(name: str, role: str) -> str:
    name = name.strip()
    if not name:
        msg = f"give the countersigner's name (the title block names nobody as {role} by)"
        raise InputError("--name", msg)
    if len(name) > MAX_NAME_CHARACTERS or not name.isprintable():
        msg = f"a name of at most {MAX_NAME_CHARACTERS} printable characters on one line"
        raise InputError("--name", msg)
    return name
