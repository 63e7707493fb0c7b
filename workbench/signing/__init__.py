"""Signing and verifying calculation records: RFC 8785 canonical JSON, Ed25519 keys, JWS.

A package of its own below the faces, so the record (which signs and verifies) and the panel
(which may show a record's status) both use it without importing each other. Reach everything
through the names below (``from workbench.signing import sign_compact``).
"""

from workbench.signing.canonical import CanonicalizationError, canonicalize
from workbench.signing.jose import (
    ALGORITHM,
    PRIVATE_KEY_NAME,
    PUBLIC_KEY_NAME,
    SignatureInvalid,
    SigningError,
    b64url_decode,
    b64url_encode,
    decode_unverified,
    generate_key,
    jwk_thumbprint,
    load_private_key,
    load_public_key,
    public_jwk,
    public_key_from_jwk,
    sign_compact,
    verify_compact,
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
