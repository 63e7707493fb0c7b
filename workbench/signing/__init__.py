"""Signing and verifying calculation records: RFC 8785 canonical JSON, Ed25519 keys, JWS.

A package of its own below the faces, so the record (which signs and verifies) and the panel
(which may show a record's status) both use it without importing each other. Well-kept
libraries do the security-critical work: `rfc8785` writes canonical JSON, `cryptography` reads
and writes Ed25519 key files, `joserfc` makes and checks JWS compact tokens, JWKs and their
thumbprints. `rfc8785` and `joserfc` are imported on first use only: `workbench solve` loads
neither.

Reach everything through the names below (``from workbench.signing import sign_compact``).
"""

from workbench.signing.canonical import CanonicalizationError, canonicalize
from workbench.signing.jose import (
    ALGORITHM,
    SignatureInvalid,
    SigningError,
    b64url_decode,
    b64url_encode,
    decode_unverified,
    jwk_thumbprint,
    public_jwk,
    public_key_from_jwk,
    sign_compact,
    verify_compact,
)
from workbench.signing.keys import (
    PRIVATE_KEY_NAME,
    PUBLIC_KEY_NAME,
    generate_key,
    load_private_key,
    load_public_key,
    write_key_pair,
)

__all__ = [
    "ALGORITHM",
    "PRIVATE_KEY_NAME",
    "PUBLIC_KEY_NAME",
    "CanonicalizationError",
    "SignatureInvalid",
    "SigningError",
    "b64url_decode",
    "b64url_encode",
    "canonicalize",
    "decode_unverified",
    "generate_key",
    "jwk_thumbprint",
    "load_private_key",
    "load_public_key",
    "public_jwk",
    "public_key_from_jwk",
    "sign_compact",
    "verify_compact",
    "write_key_pair",
]
