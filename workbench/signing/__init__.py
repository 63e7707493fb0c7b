"""Signing and verifying calculation records: canonical JSON, Ed25519 keys, JWS, countersigning.

Modules: ``canonical`` (RFC 8785), ``keys`` (key files, passphrases), ``jose`` (JWS, JWK),
``block`` (the record's signature block and content digest), ``chain`` (countersignatures),
``trusted`` (the trusted-signers file) and ``status`` (a record's status in one line).

A package of its own below the faces, so the record (which signs and verifies) and the panel
(which may show a record's status) both use it without importing each other. Well-kept
libraries do the security-critical work: `rfc8785` writes canonical JSON, `cryptography` reads
and writes Ed25519 key files, `joserfc` makes and checks JWS compact tokens, JWKs and their
thumbprints. `rfc8785` and `joserfc` are imported on first use only: `workbench solve` loads
neither.

Reach everything through the names below (``from workbench.signing import sign_compact``).
"""

from workbench.signing.block import (
    BLOCK_END,
    BLOCK_MARKER,
    BLOCK_START,
    JWK_SCRIPT,
    PAYLOAD_SCRIPT,
    TOKEN_SCRIPT,
    BlockData,
    content_digest,
    split_block,
)
from workbench.signing.canonical import CanonicalizationError, canonicalize
from workbench.signing.chain import (
    COUNTERSIGNATURE_FORMAT,
    Link,
    chain_links,
    chain_report,
    countersign_token,
    next_role_problem,
    token_digest,
)
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
    key_is_encrypted,
    load_private_key,
    load_public_key,
    write_key_pair,
)
from workbench.signing.status import record_status
from workbench.signing.trusted import ROLES, TrustedSigner, read_trusted_signers

__all__ = [
    "ALGORITHM",
    "BLOCK_END",
    "BLOCK_MARKER",
    "BLOCK_START",
    "COUNTERSIGNATURE_FORMAT",
    "JWK_SCRIPT",
    "PAYLOAD_SCRIPT",
    "PRIVATE_KEY_NAME",
    "PUBLIC_KEY_NAME",
    "ROLES",
    "TOKEN_SCRIPT",
    "BlockData",
    "CanonicalizationError",
    "Link",
    "SignatureInvalid",
    "SigningError",
    "TrustedSigner",
    "b64url_decode",
    "b64url_encode",
    "canonicalize",
    "chain_links",
    "chain_report",
    "content_digest",
    "countersign_token",
    "decode_unverified",
    "generate_key",
    "jwk_thumbprint",
    "key_is_encrypted",
    "load_private_key",
    "load_public_key",
    "next_role_problem",
    "public_jwk",
    "public_key_from_jwk",
    "read_trusted_signers",
    "record_status",
    "sign_compact",
    "split_block",
    "token_digest",
    "verify_compact",
    "write_key_pair",
]
