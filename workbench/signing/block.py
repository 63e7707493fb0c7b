"""Where a calculation record keeps its signatures, and what its content digest covers.

A record file ends with one *signature block*, from the comment ``BLOCK_START`` through the
comment ``BLOCK_END``: the verification details a reader sees and, as data in script elements,
the JWS of the record (``record-signature``), its public key (``record-public-key``) and any
countersignatures with their keys (``record-countersignature-1``, ``record-countersignature-1-key``
…). The content digest is the SHA-256 of the file's bytes with that block cut out, so adding a
countersignature leaves the digest, and the record's own signature, as they were.

Reading a block needs no record code: the panel shows a record's signature status from here.

References
----------
.. [1] M. Jones, J. Bradley and N. Sakimura, "JSON Web Signature (JWS)", RFC 7515, May 2015,
   §7.1 (compact serialization).
.. [2] NIST, "Secure Hash Standard (SHS)", FIPS 180-4, August 2015, §6.2 (SHA-256).
"""

from __future__ import annotations

import hashlib
import re
from html.parser import HTMLParser

__all__ = [
    "BLOCK_END",
    "BLOCK_MARKER",
    "BLOCK_START",
    "COUNTERSIGNATURE_ID",
    "JWK_SCRIPT",
    "PAYLOAD_SCRIPT",
    "TOKEN_SCRIPT",
    "BlockData",
    "content_digest",
    "split_block",
]

#: Name of the comments that open and close the signature block.
BLOCK_MARKER = "workbench-record-signature-block"
BLOCK_START = f"<!-- {BLOCK_MARKER} -->"
BLOCK_END = f"<!-- /{BLOCK_MARKER} -->"

#: The block's data: (element id, type, what its text must match entirely).
TOKEN_SCRIPT = ("record-signature", "application/jose", re.compile(r"[A-Za-z0-9_.-]*"))
JWK_SCRIPT = ("record-public-key", "application/jwk+json", re.compile(r"\{[^<]*\}"))
PAYLOAD_SCRIPT = ("record-payload", "application/json", re.compile(r"[^<]*"))
#: Element id of the n-th countersignature (from 1); its public key adds ``-key``.
COUNTERSIGNATURE_ID = "record-countersignature-{}"


def content_digest(text_without_block: str) -> str:
    """``sha256:<hex>`` of a record's text outside its signature block (UTF-8 bytes).

    Parameters
    ----------
    text_without_block
        The record file's text with the signature block cut out.

    Returns
    -------
    str
        ``"sha256:"`` and 64 lower-case hex digits.

    References
    ----------
    .. [1] FIPS 180-4, §6.2 (SHA-256).

    Example
    -------
    >>> content_digest("")[:15]
    'sha256:e3b0c442'
    """
    return "sha256:" + hashlib.sha256(text_without_block.encode("utf-8")).hexdigest()


def split_block(text: str) -> tuple[str, str, str] | None:
    """``(before, block, after)`` of a record's text, or ``None`` without exactly one block.

    The block runs from ``BLOCK_START`` through ``BLOCK_END`` and the newline after it.
    """
    if text.count(BLOCK_START) != 1 or text.count(BLOCK_END) != 1:
        return None
    start = text.index(BLOCK_START)
    end = text.index(BLOCK_END) + len(BLOCK_END) + 1
    if end <= start or text[end - 1 : end] != "\n":
        return None
    return text[:start], text[start:end], text[end:]


class BlockData(HTMLParser):
    """The text of every script element of a signature block, by id (the first of each)."""

    def __init__(self, block: str) -> None:
        super().__init__(convert_charrefs=False)
        self.scripts: dict[str, tuple[str, str]] = {}
        self._open: tuple[str, str] | None = None
        self._text: list[str] = []
        self.feed(block)
        self.close()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag == "script":
            attributes = dict(attrs)
            self._open = (attributes.get("id") or "", attributes.get("type") or "")
            self._text = []

    def handle_data(self, data: str) -> None:
        if self._open is not None:
            self._text.append(data)

    def handle_endtag(self, tag: str) -> None:
        if tag == "script" and self._open is not None:
            ident, kind = self._open
            self.scripts.setdefault(ident, (kind, "".join(self._text)))
            self._open = None

    def get(self, what: tuple[str, str, re.Pattern[str]]) -> str | None:
        """The text of the script element ``what`` names, when its type and text are right."""
        ident, kind, pattern = what
        found = self.scripts.get(ident)
        if found is None or found[0] != kind or not pattern.fullmatch(found[1]):
            return None
        return found[1]

    def countersignatures(self) -> list[tuple[str | None, str | None]]:
        """``(token, jwk text)`` of each countersignature, in order (``None`` where unreadable).

        Numbering runs from 1 without a gap; the first number with neither element ends it.
        """
        found: list[tuple[str | None, str | None]] = []
        number = 1
        while True:
            ident = COUNTERSIGNATURE_ID.format(number)
            token = self.get((ident, TOKEN_SCRIPT[1], TOKEN_SCRIPT[2]))
            jwk = self.get((f"{ident}-key", JWK_SCRIPT[1], JWK_SCRIPT[2]))
            if ident not in self.scripts and f"{ident}-key" not in self.scripts:
                return found
            found.append((token, jwk))
            number += 1
