"""The trusted-signers file: the firm's list of whose key is whose, and who may sign as what.

A UTF-8 text file, one signer a line; blank lines and lines starting with ``#`` are skipped::

    # fingerprint                                  roles              name
    s1CV2ZPt5PMf0rEntQku3lSvu2_jgoS-3MRkS-RO7H4    prepared,checked   A. Ingenieur
    Yk3q0aYHkQ2mZ4y3bV6x1mJ8r1nHq8gC9o7l5cWkz0s    approved           B. Baumeister

- *fingerprint*: the RFC 7638 JWK thumbprint of the signer's public key (43 base64url
  characters), as ``workbench keygen`` prints it and ``workbench verify`` reports it;
- *roles*: one or more of ``prepared``, ``checked``, ``approved``, separated by commas, no
  spaces;
- *name*: the rest of the line (spaces allowed).

A fingerprint may appear once. The file is the reader's: a record never carries it.

References
----------
.. [1] M. Jones and N. Sakimura, "JSON Web Key (JWK) Thumbprint", RFC 7638, September 2015, §3.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from pathlib import Path

from workbench.signing.jose import SigningError

__all__ = ["ROLES", "TrustedSigner", "read_trusted_signers"]

_FINGERPRINT = re.compile(r"[A-Za-z0-9_-]{43}")
#: The roles of a record's signatures, in the order they are given (workbench.signing.chain).
ROLES = ("prepared", "checked", "approved")
#: Largest trusted-signers file read (bytes): a list of people, not a data set.
_MAX_BYTES = 1024 * 1024


@dataclass(frozen=True)
class TrustedSigner:
    """One line of the trusted-signers file.

    Attributes
    ----------
    fingerprint
        RFC 7638 thumbprint of the signer's public key.
    roles
        The roles the signer may sign as.
    name
        The signer's name as the firm writes it.
    """

    fingerprint: str
    roles: tuple[str, ...]
    name: str


def read_trusted_signers(path: str | os.PathLike[str]) -> dict[str, TrustedSigner]:
    """Read a trusted-signers file (format in the module docstring).

    Parameters
    ----------
    path
        The file.

    Returns
    -------
    dict
        Signers by fingerprint.

    Raises
    ------
    SigningError
        If the file cannot be read, or a line is not ``fingerprint roles name``, names an
        unknown role, or repeats a fingerprint (the message names the line).
    """
    file = Path(path)
    try:
        with file.open("rb") as stream:
            data = stream.read(_MAX_BYTES + 1)
    except OSError as error:
        msg = f"cannot read the trusted-signers file {file}: {error.strerror or error}"
        raise SigningError(msg) from None
    if len(data) > _MAX_BYTES:
        msg = f"{file} is larger than a trusted-signers file may be ({_MAX_BYTES:,} bytes)"
        raise SigningError(msg)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        msg = f"{file} is not UTF-8 text"
        raise SigningError(msg) from None
    signers: dict[str, TrustedSigner] = {}
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        signer = _signer(line, f"{file}, line {number}")
        if signer.fingerprint in signers:
            msg = f"{file}, line {number}: fingerprint {signer.fingerprint} is listed twice"
            raise SigningError(msg)
        signers[signer.fingerprint] = signer
    return signers


def _signer(line: str, where: str) -> TrustedSigner:
    parts = line.split(None, 2)
    if len(parts) < 3:
        msg = f"{where}: expected 'fingerprint roles name', found {len(parts)} field(s)"
        raise SigningError(msg)
    fingerprint, roles_text, name = parts
    if not _FINGERPRINT.fullmatch(fingerprint):
        msg = f"{where}: {fingerprint[:60]!r} is not a key fingerprint (43 base64url characters)"
        raise SigningError(msg)
    roles = tuple(roles_text.split(","))
    unknown = [role for role in roles if role not in ROLES]
    if unknown:
        msg = f"{where}: unknown role {unknown[0][:30]!r}; roles are {', '.join(ROLES)}"
        raise SigningError(msg)
    return TrustedSigner(fingerprint, roles, name.strip())
