"""Countersignatures: a checker and an approver sign after the engineer who prepared a record.

The record's own JWS is the first link of a chain (role ``prepared``). Each countersignature is
a further JWS, EdDSA over Ed25519 like the first, whose payload (RFC 8785 canonical JSON) holds

- ``previous``: ``sha256:<hex>`` of the compact JWS before it, as ASCII text, so it signs
  that signature and, through it, everything the record signs;
- ``content_digest``: the record's content digest, so a change to the record fails every
  signature, not only the first;
- ``role`` (``checked`` or ``approved``), ``name`` and ``signed_at`` (ISO 8601 UTC).

The chain runs prepared → checked → approved: each role once, in that order, each by a key no
earlier link used (an independent check needs another person's key).

References
----------
.. [1] M. Jones, J. Bradley and N. Sakimura, "JSON Web Signature (JWS)", RFC 7515, May 2015,
   §7.1 (compact serialization).
.. [2] A. Rundgren, B. Jordan and S. Erdtman, "JSON Canonicalization Scheme (JCS)", RFC 8785,
   June 2020.
.. [3] M. Jones and N. Sakimura, "JSON Web Key (JWK) Thumbprint", RFC 7638, September 2015.
.. [4] NIST, "Secure Hash Standard (SHS)", FIPS 180-4, August 2015, §6.2 (SHA-256).
"""

from __future__ import annotations

import json
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

from workbench.signing.block import content_digest
from workbench.signing.canonical import canonicalize
from workbench.signing.jose import (
    SigningError,
    decode_unverified,
    jwk_thumbprint,
    public_key_from_jwk,
    sign_compact,
    verify_compact,
)
from workbench.signing.trusted import ROLES, TrustedSigner

__all__ = [
    "COUNTERSIGNATURE_FORMAT",
    "ROLES",
    "Link",
    "chain_links",
    "chain_report",
    "countersign_token",
    "next_role_problem",
    "token_digest",
]

#: ``format`` of a countersignature's payload.
COUNTERSIGNATURE_FORMAT = "workbench-countersignature"
_FORMAT_VERSION = 1


def token_digest(token: str) -> str:
    """``sha256:<hex>`` of a compact JWS's text, what the next link signs (RFC 7515 §7.1).

    The rule of :func:`~workbench.signing.block.content_digest` (FIPS 180-4 §6.2 over UTF-8
    octets; a token is ASCII).
    """
    return content_digest(token)


@dataclass
class Link:
    """One signature of a record's chain, as read and checked.

    Attributes
    ----------
    role, name, signed_at
        What the signature says (``signed_at`` ISO 8601 UTC); ``"?"`` when unreadable.
    fingerprint
        RFC 7638 thumbprint of the key that signed it, ``None`` when unreadable.
    token
        The compact JWS (``None`` when missing).
    jwk
        The public key (JWK members) the block carries with it.
    problems
        What does not hold, one line each; empty when the link holds.
    """

    role: str
    name: str
    signed_at: str
    fingerprint: str | None
    token: str | None
    jwk: dict[str, Any] | None = None
    problems: list[str] = field(default_factory=list)


def next_role_problem(links: Sequence[Link], role: str, fingerprint: str) -> str | None:
    """Why ``role`` signed by ``fingerprint`` cannot follow ``links``, or ``None`` if it can.

    Parameters
    ----------
    links
        The chain so far (the first is ``prepared``).
    role
        ``"checked"`` or ``"approved"``.
    fingerprint
        The new signer's key thumbprint.
    """
    if role not in ROLES[1:]:
        return f"role must be one of {', '.join(ROLES[1:])}, not {role!r}"
    last = links[-1].role if links else ROLES[0]
    if last not in ROLES or ROLES.index(role) <= ROLES.index(last):
        return (
            f"a {role!r} signature cannot follow {last!r}: the chain runs "
            f"{' → '.join(ROLES)}, each role once"
        )
    if role == "approved" and last != "checked":
        return "'approved' follows 'checked': the record has not been checked yet"
    earlier = next((link.role for link in links if link.fingerprint == fingerprint), None)
    if earlier is not None:
        return (
            f"key {fingerprint} already signed this record as {earlier!r}; an independent "
            f"{role!r} signature needs another person's key"
        )
    return None


def countersign_token(
    previous_token: str,
    private_key: Ed25519PrivateKey,
    *,
    role: str,
    name: str,
    signed_at: str,
    content_digest: str,
) -> str:
    """Sign the signature before, as ``role``: a countersignature (compact JWS, EdDSA).

    Parameters
    ----------
    previous_token
        The last JWS of the chain (the record's own signature, or the last countersignature).
    private_key
        The countersigner's Ed25519 key.
    role
        ``"checked"`` or ``"approved"``.
    name
        The countersigner's name.
    signed_at
        ISO 8601 UTC time of countersigning.
    content_digest
        The record's content digest (what the first signature signs).

    Returns
    -------
    str
        The JWS; its payload is the canonical JSON the module docstring describes.

    References
    ----------
    .. [1] RFC 7515, §5.1; RFC 8785; FIPS 180-4, §6.2.
    """
    payload = {
        "format": COUNTERSIGNATURE_FORMAT,
        "format_version": _FORMAT_VERSION,
        "role": role,
        "name": name,
        "signed_at": signed_at,
        "previous": token_digest(previous_token),
        "content_digest": content_digest,
    }
    return sign_compact(canonicalize(payload), private_key, {"typ": "JOSE"})


def chain_links(
    first: Link,
    countersignatures: Sequence[tuple[str | None, str | None]],
    content_digest: str,
) -> list[Link]:
    """Read and check every countersignature after the record's own signature.

    Parameters
    ----------
    first
        The record's own signature (role ``prepared``), already checked by the caller.
    countersignatures
        ``(token, jwk text)`` of each countersignature in the block's order.
    content_digest
        The digest of the record file as it is now (outside its signature block).

    Returns
    -------
    list of Link
        ``first``, then one link per countersignature with its problems.
    """
    links = [first]
    for number, (token, jwk_text) in enumerate(countersignatures, start=1):
        links.append(_countersignature_link(number, token, jwk_text, links, content_digest))
    return links


def _countersignature_link(
    number: int, token: str | None, jwk_text: str | None, links: list[Link], digest: str
) -> Link:
    link = Link("?", "?", "?", None, token)
    if token is None or jwk_text is None:
        link.problems.append(f"countersignature {number} or its key is missing or malformed")
        return link
    try:
        _describe(link, decode_unverified(token)[1])
        link.jwk = json.loads(jwk_text)
        key = public_key_from_jwk(link.jwk or {})
        link.fingerprint = jwk_thumbprint(key)
        _, payload_bytes = verify_compact(token, key)
    except (ValueError, SigningError) as error:
        link.problems.append(f"countersignature {number} does not hold: {error}")
        return link
    payload = _describe(link, payload_bytes)
    if payload.get("format") != COUNTERSIGNATURE_FORMAT:
        link.problems.append(f"countersignature {number} is not a workbench countersignature")
        return link
    previous = links[-1]
    if previous.token is None or payload.get("previous") != token_digest(previous.token):
        link.problems.append(
            "it does not sign the signature before it: a signature of the chain was replaced, "
            "removed or moved"
        )
    if payload.get("content_digest") != digest:
        link.problems.append(
            "the record's content was altered after this countersignature (content digest mismatch)"
        )
    order = next_role_problem(links, link.role, link.fingerprint)
    if order is not None:
        link.problems.append(order)
    return link


def _describe(link: Link, payload_bytes: bytes) -> dict[str, Any]:
    """Fill role, name and time from a countersignature's payload; return the payload."""
    try:
        payload = json.loads(payload_bytes)
    except ValueError:
        payload = None
    if not isinstance(payload, dict):
        return {}
    link.role, link.name, link.signed_at = (
        str(payload.get(key, "?")) for key in ("role", "name", "signed_at")
    )
    return payload


def chain_report(
    links: Sequence[Link],
    given: Sequence[str] | None = None,
    trusted: Mapping[str, TrustedSigner] | None = None,
) -> tuple[list[str], list[str]]:
    """Readable facts and problems of a chain, one line each.

    Parameters
    ----------
    links
        From :func:`chain_links`.
    given
        Fingerprints of the public keys the reader gave (``--public-key``), or ``None``: then
        every key is the one the record carries, and only its fingerprint ties it to a person.
    trusted
        The reader's trusted signers by fingerprint (``--trusted``), or ``None``.

    Returns
    -------
    tuple of list of str
        ``(facts, problems)``; problems of the first link are left to the caller.
    """
    facts = [f"Chain: {' → '.join(link.role for link in links)}"]
    problems: list[str] = []
    for index, link in enumerate(links):
        facts.append(
            f"{link.role.capitalize()} by: {link.name or 'not named'}, {link.signed_at} (UTC), "
            f"key {link.fingerprint or '?'}"
            + (" — countersignature holds" if index and not link.problems else "")
        )
        what = f"the {link.role} countersignature ({link.name}, key {link.fingerprint or '?'})"
        if index:
            problems += [f"{what}: {problem}" for problem in link.problems]
        if index and given is not None and link.fingerprint not in given:
            problems.append(
                f"{what} is by a key not among the --public-key keys given: an unknown key "
                "countersigned"
            )
        if trusted is not None:
            line, fault = _trust(link, trusted)
            (problems if fault else facts).append(line)
    return facts, problems


def _trust(link: Link, trusted: Mapping[str, TrustedSigner]) -> tuple[str, bool]:
    """The trusted-list line of one link, and whether it is a fault."""
    signer = trusted.get(link.fingerprint or "")
    if signer is None:
        return (
            f"Trusted list: the {link.role} signature (key {link.fingerprint or '?'}) belongs "
            "to nobody on the list",
            True,
        )
    may = ", ".join(signer.roles)
    if link.role not in signer.roles:
        return (
            f"Trusted list: the {link.role} signature is by {signer.name}, who is on the list "
            f"to sign as {may} only",
            True,
        )
    named = "" if link.name == signer.name else f" (the record names {link.name!r})"
    return f"Trusted list: the {link.role} signature is by {signer.name} ({may}){named}", False
