"""JWK, JWK thumbprints and JWS compact signatures (EdDSA over Ed25519), through `joserfc`.

The record is signed as a JSON Web Signature (JWS) in compact serialization with the EdDSA
algorithm over Ed25519. The protected header is ``{"alg": "EdDSA", "kid": <thumbprint>}`` plus
any extra members, in sorted order, so the same header always gives the same bytes. The key id
is the RFC 7638 JWK thumbprint of the public key: the fingerprint a checker compares with the one
the engineer published.

`joserfc` encodes, signs, verifies and computes thumbprints. It is told the one algorithm
accepted (EdDSA) on every call; RFC 9864 has since named ``Ed25519`` as the fully specified
successor of ``EdDSA`` and joserfc warns about the older name, but records carry ``EdDSA``
(RFC 8037), which every JOSE library reads, so exactly that warning is silenced where joserfc is
called. This module adds the verifier's own policy — EdDSA only, no ``crit`` extensions, unique
header members, the key id must be the key's thumbprint, one canonical base64url spelling — and
says in one line what is wrong with a token that fails.

References
----------
.. [1] M. Jones, J. Bradley and N. Sakimura, "JSON Web Signature (JWS)", RFC 7515, May 2015,
   §3.1 (compact serialization), §4.1 (header parameters), §5.1–§5.2 (signing, validation).
.. [2] I. Liusvaara, "CFRG Elliptic Curve Diffie-Hellman (ECDH) and Signatures in JSON Object
   Signing and Encryption (JOSE)", RFC 8037, January 2017, §2 (OKP keys), §3.1 (EdDSA).
.. [3] S. Josefsson and I. Liusvaara, "Edwards-Curve Digital Signature Algorithm (EdDSA)",
   RFC 8032, January 2017, §5.1 (Ed25519).
.. [4] M. Jones and N. Sakimura, "JSON Web Key (JWK) Thumbprint", RFC 7638, September 2015, §3.
.. [5] S. Josefsson, "The Base16, Base32, and Base64 Data Encodings", RFC 4648, October 2006,
   §3.2 (padding), §3.5 (canonical encoding), §5 (base64url).
.. [6] M. Jones, "Fully-Specified Algorithms for JOSE and COSE", RFC 9864, 2025.
"""

from __future__ import annotations

import json
import re
import warnings
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from functools import lru_cache
from typing import Any

from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey, Ed25519PublicKey

from workbench.case.errors import WorkbenchError
from workbench.signing.canonical import canonicalize

__all__ = [
    "ALGORITHM",
    "MAX_PAYLOAD_BYTES",
    "SignatureInvalid",
    "SigningError",
    "b64url_decode",
    "b64url_encode",
    "decode_unverified",
    "jwk_thumbprint",
    "public_jwk",
    "public_key_from_jwk",
    "sign_compact",
    "verify_compact",
]

#: The one JWS algorithm accepted: EdDSA (RFC 8037 §3.1), here always over Ed25519.
ALGORITHM = "EdDSA"
#: Largest payload signed or verified (bytes): a record holds its whole case, so this is
#: generous; it bounds what a token can make the verifier decode.
MAX_PAYLOAD_BYTES = 256 * 1024 * 1024
_MAX_PAYLOAD_CHARACTERS = -(-MAX_PAYLOAD_BYTES // 3) * 4  # its base64url text, at most
#: Largest encoded protected header (characters); ours is about 90.
_MAX_HEADER_CHARACTERS = 8192
#: What joserfc warns on every use of "EdDSA" (RFC 9864); silenced where it is called, no more.
_EDDSA_DEPRECATION = "EdDSA is deprecated via RFC 9864"

_ED25519_KEY_BYTES = 32  # RFC 8032 §5.1.5: public key and seed are 32 octets
_ED25519_SIGNATURE_BYTES = 64  # RFC 8032 §5.1.6
_BASE64URL_TEXT = re.compile(r"[A-Za-z0-9_-]*")
# Members sign_compact sets itself, or that would change how the token is to be read
# (b64 and crit: RFC 7797, RFC 7515 §4.1.11), which records never use.
_RESERVED_HEADER_MEMBERS = frozenset({"alg", "kid", "b64", "crit"})


class SigningError(WorkbenchError):
    """A key or a signature cannot be made, read or used."""


class SignatureInvalid(SigningError):  # noqa: N818 - the name the record code uses
    """A JWS token is malformed, uses an algorithm other than EdDSA, or does not verify."""


# --- joserfc, told the algorithm ---------------------------------------------------------------


@lru_cache(maxsize=1)
def _registry() -> Any:
    """A joserfc JWS registry that allows EdDSA only and takes headers of any member names."""
    from joserfc.jws import JWSRegistry  # noqa: PLC0415 - `workbench solve` never signs

    registry = JWSRegistry(algorithms=[ALGORITHM], strict_check_header=False)
    registry.max_header_length = _MAX_HEADER_CHARACTERS
    registry.max_payload_length = _MAX_PAYLOAD_CHARACTERS
    return registry


@contextmanager
def _eddsa_allowed() -> Iterator[None]:
    """Silence exactly joserfc's RFC 9864 warning about the name "EdDSA", nothing else.

    ``warnings.catch_warnings`` changes the process-wide filter list while it is active, so
    signing from several threads at once may let that one warning through; never an error.
    """
    from joserfc.errors import SecurityWarning  # noqa: PLC0415

    with warnings.catch_warnings():
        warnings.filterwarnings(
            "ignore", message=re.escape(_EDDSA_DEPRECATION), category=SecurityWarning
        )
        yield


def _okp_key(key: Ed25519PrivateKey | Ed25519PublicKey) -> Any:
    from joserfc.jwk import OKPKey  # noqa: PLC0415

    return OKPKey.import_key(key)


# --- base64url (RFC 4648 §5, no padding) ----------------------------------------------------


def b64url_encode(data: bytes) -> str:
    """Encode bytes as base64url without padding.

    Parameters
    ----------
    data
        The octets to encode.

    Returns
    -------
    str
        Characters from ``A–Z a–z 0–9 - _`` only, no ``=`` (JWS drops the padding).

    References
    ----------
    .. [1] RFC 4648, §5.
    .. [2] RFC 7515, §2 (Base64url Encoding) and Appendix C.
    """
    from joserfc.util import urlsafe_b64encode  # noqa: PLC0415

    return urlsafe_b64encode(bytes(data)).decode("ascii")


def b64url_decode(text: str, what: str = "value") -> bytes:
    """Decode unpadded base64url, refusing anything but its one canonical spelling.

    Parameters
    ----------
    text
        The encoded text.
    what
        What the text is (``"JWS payload"``), for the error message.

    Returns
    -------
    bytes
        The decoded octets.

    Raises
    ------
    SigningError
        On padding, a character outside the base64url alphabet, an impossible length, or unused
        trailing bits that are not zero. The last rule makes the encoding one-to-one, so two
        different texts never decode to the same bytes (RFC 4648 §3.5).

    References
    ----------
    .. [1] RFC 4648, §3.2, §3.3, §3.5 and §5.
    """
    if not isinstance(text, str):
        msg = f"{what} must be base64url text, not {type(text).__name__}"
        raise SigningError(msg)
    # joserfc decodes; these checks first say what is wrong (it would also take "Zg==").
    if "=" in text:
        msg = f"{what} is padded with '='; JWS base64url carries no padding (RFC 7515 §2)"
        raise SigningError(msg)
    match = _BASE64URL_TEXT.match(text)
    end = match.end() if match else 0
    if end != len(text):
        msg = f"{what} has {text[end]!r} at position {end}, outside the base64url alphabet"
        raise SigningError(msg)
    if len(text) % 4 == 1:
        msg = f"{what} has {len(text)} characters, a length no base64url encoding has"
        raise SigningError(msg)
    from joserfc.util import urlsafe_b64decode  # noqa: PLC0415

    try:
        return urlsafe_b64decode(text.encode("ascii"))
    except ValueError:  # binascii.Error: what is left is a last character with bits set
        msg = f"{what} is not canonical base64url: its unused trailing bits are not zero"
        raise SigningError(msg) from None


# --- JWK (RFC 8037) and thumbprint (RFC 7638) --------------------------------------------------


def public_jwk(public_key: Ed25519PublicKey) -> dict[str, str]:
    """Return the public JWK of an Ed25519 key.

    Parameters
    ----------
    public_key
        The key (a private key is refused: pass ``private_key.public_key()``).

    Returns
    -------
    dict
        ``{"kty": "OKP", "crv": "Ed25519", "x": <32-octet key, base64url>}``.

    Raises
    ------
    SigningError
        If ``public_key`` is not an Ed25519 public key.

    References
    ----------
    .. [1] RFC 8037, §2.
    """
    if not isinstance(public_key, Ed25519PublicKey):
        msg = f"expected an Ed25519 public key, not {type(public_key).__name__}"
        raise SigningError(msg)
    members = _okp_key(public_key).as_dict(private=False)
    return {name: str(members[name]) for name in ("kty", "crv", "x")}


def public_key_from_jwk(jwk: Mapping[str, Any]) -> Ed25519PublicKey:
    """Read an Ed25519 public key from its JWK.

    Parameters
    ----------
    jwk
        A JSON object with ``kty`` ``"OKP"``, ``crv`` ``"Ed25519"`` and ``x``. Other members
        (``kid``, ``use``, ``alg``) are ignored; a private member ``d`` is refused, so that a
        private key is never taken for a public one and passed around.

    Returns
    -------
    Ed25519PublicKey
        The key.

    Raises
    ------
    SigningError
        For another key type or curve, a missing or malformed ``x``, or a private ``d``.

    References
    ----------
    .. [1] RFC 8037, §2.
    """
    required = _required_members(jwk)
    if "d" in jwk:
        msg = (
            "JWK holds the private member 'd'; give the public key only (kty, crv, x) and keep "
            "the private one secret"
        )
        raise SigningError(msg)
    from joserfc.jwk import OKPKey  # noqa: PLC0415

    key = OKPKey.import_key(required).public_key
    if not isinstance(key, Ed25519PublicKey):  # _required_members checked the curve
        msg = f"JWK is not an Ed25519 public key ({type(key).__name__})"
        raise SigningError(msg)
    return key


def _required_members(jwk: Mapping[str, Any]) -> dict[str, Any]:
    """``kty``, ``crv`` and ``x`` of an Ed25519 JWK, checked (RFC 8037 §2, RFC 7638 §3.2)."""
    if not isinstance(jwk, Mapping):
        msg = f"a JWK is a JSON object, not {type(jwk).__name__}"
        raise SigningError(msg)
    kty, crv, x = jwk.get("kty"), jwk.get("crv"), jwk.get("x")
    if kty != "OKP":
        msg = f"JWK key type (kty) is {kty!r}; an Ed25519 key has kty 'OKP' (RFC 8037 §2)"
        raise SigningError(msg)
    if crv != "Ed25519":
        msg = f"JWK curve (crv) is {crv!r}; record signatures use 'Ed25519'"
        raise SigningError(msg)
    if not isinstance(x, str):
        msg = "JWK has no public key member 'x' (a base64url string)"
        raise SigningError(msg)
    raw = b64url_decode(x, "JWK member 'x'")
    if len(raw) != _ED25519_KEY_BYTES:
        msg = f"JWK member 'x' holds {len(raw)} octets; an Ed25519 public key has 32"
        raise SigningError(msg)
    return {"crv": crv, "kty": kty, "x": x}


def jwk_thumbprint(jwk: Mapping[str, Any] | Ed25519PublicKey) -> str:
    """Compute the RFC 7638 SHA-256 thumbprint of an Ed25519 JWK: the fingerprint users see.

    Parameters
    ----------
    jwk
        An OKP/Ed25519 JWK (public, or private with ``d``, which does not enter the
        thumbprint), or an :class:`Ed25519PublicKey`.

    Returns
    -------
    str
        base64url (no padding) of SHA-256 over the UTF-8 JSON object of the required members
        ``crv``, ``kty`` and ``x`` in that (lexicographic) order, without whitespace. 43
        characters.

    Raises
    ------
    SigningError
        If ``jwk`` is not a well-formed OKP/Ed25519 key.

    References
    ----------
    .. [1] RFC 7638, §3.1–§3.3.
    .. [2] RFC 8037, §2 (required members of an OKP key) and Appendix A.3 (example).
    """
    if isinstance(jwk, Ed25519PublicKey):
        jwk = public_jwk(jwk)
    from joserfc.jwk import thumbprint  # noqa: PLC0415

    return str(thumbprint(_required_members(jwk)))


# --- JWS compact serialization (RFC 7515) ------------------------------------------------------


def sign_compact(
    payload: bytes,
    private_key: Ed25519PrivateKey,
    extra_header: Mapping[str, Any] | None = None,
    *,
    include_kid: bool = True,
) -> str:
    """Sign ``payload`` as a JWS in compact serialization with EdDSA (Ed25519).

    Parameters
    ----------
    payload
        The octets to sign (the record, already serialized), at most
        :data:`MAX_PAYLOAD_BYTES`.
    private_key
        The signer's Ed25519 key.
    extra_header
        More protected header members (e.g. ``{"typ": "...", "iat": ...}``). ``alg`` and
        ``kid`` are set here and may not be given; nor may ``b64`` or ``crit``, which would
        ask the reader for extensions records never use.
    include_kid
        Put the RFC 7638 thumbprint of the public key in the header as ``kid`` (default). Off
        only to reproduce published examples whose header is ``{"alg":"EdDSA"}`` alone.

    Returns
    -------
    str
        ``BASE64URL(header) '.' BASE64URL(payload) '.' BASE64URL(signature)``, where the header
        is the JSON object of the members above in sorted order (for ASCII text and integers,
        as the record's header holds, exactly its RFC 8785 form). Ed25519 is deterministic, so
        the same key, header and payload always give the same token.

    Raises
    ------
    SigningError
        If the key is not an Ed25519 private key, the payload is not bytes or is too large, or
        the extra header is not a JSON object of names other than the reserved ones, has no
        canonical JSON form, or gives a registered member (``typ``, ``cty``…) a value of the
        wrong type.

    References
    ----------
    .. [1] RFC 7515, §3.1, §4.1, §5.1 and §7.1.
    .. [2] RFC 8037, §3.1 (EdDSA signing input and signature).
    .. [3] RFC 8032, §5.1.6 (Ed25519 signing).
    """
    if not isinstance(private_key, Ed25519PrivateKey):
        msg = f"signing needs an Ed25519 private key, not {type(private_key).__name__}"
        raise SigningError(msg)
    if not isinstance(payload, (bytes, bytearray, memoryview)):
        msg = f"payload must be bytes, not {type(payload).__name__}; encode it first"
        raise SigningError(msg)
    if len(payload) > MAX_PAYLOAD_BYTES:
        msg = (
            f"payload of {len(payload):,} bytes is more than a record signs ({MAX_PAYLOAD_BYTES:,})"
        )
        raise SigningError(msg)
    header: dict[str, Any] = {"alg": ALGORITHM}
    if include_kid:
        header["kid"] = jwk_thumbprint(private_key.public_key())
    if extra_header is not None:
        if not isinstance(extra_header, Mapping):
            msg = f"extra_header must be a JSON object, not {type(extra_header).__name__}"
            raise SigningError(msg)
        reserved = sorted(_RESERVED_HEADER_MEMBERS.intersection(extra_header))
        if reserved:
            msg = f"extra_header may not set {', '.join(reserved)}: sign_compact sets the header"
            raise SigningError(msg)
        header.update(extra_header)
    try:
        canonicalize(header)
    except WorkbenchError as error:
        msg = f"the protected header has no canonical JSON form: {error}"
        raise SigningError(msg) from None
    from joserfc.errors import JoseError  # noqa: PLC0415
    from joserfc.jws import serialize_compact  # noqa: PLC0415

    ordered = {name: header[name] for name in sorted(header)}
    try:
        with _eddsa_allowed():
            token = serialize_compact(
                ordered,
                bytes(payload),
                _okp_key(private_key),
                algorithms=[ALGORITHM],
                registry=_registry(),
            )
    except JoseError as error:
        msg = f"the protected header is not valid: {error.description or error}"
        raise SigningError(msg) from None
    if token.index(".") > _MAX_HEADER_CHARACTERS:  # verify_compact would refuse the token
        msg = f"the protected header is longer than {_MAX_HEADER_CHARACTERS} characters encoded"
        raise SigningError(msg)
    return str(token)


def decode_unverified(token: str) -> tuple[dict[str, Any], bytes]:
    """Read the header and payload of a compact JWS without checking its signature.

    Use it to read ``kid`` and pick the key to check against, never to trust the content:
    :func:`verify_compact` is the check.

    Parameters
    ----------
    token
        A JWS in compact serialization.

    Returns
    -------
    tuple
        ``(header, payload)``: the protected header as a dict and the payload octets.

    Raises
    ------
    SignatureInvalid
        If the token is not three base64url parts, or its header is not a UTF-8 JSON object
        with unique member names.

    References
    ----------
    .. [1] RFC 7515, §5.2 steps 1–6 and §7.1.
    """
    header, payload, _ = _parse_compact(token)
    return header, payload


def verify_compact(token: str, public_key: Ed25519PublicKey) -> tuple[dict[str, Any], bytes]:
    """Check a compact JWS made with EdDSA against an Ed25519 public key.

    Parameters
    ----------
    token
        A JWS in compact serialization.
    public_key
        The key the signer is expected to hold.

    Returns
    -------
    tuple
        ``(header, payload)``: the protected header as a dict and the payload octets, both
        covered by the signature.

    Raises
    ------
    SignatureInvalid
        If the token is malformed (not three parts, bad base64url, header not a JSON object,
        duplicate header members), its ``alg`` is anything but ``"EdDSA"`` (``"none"`` is never
        accepted), it lists ``crit`` extensions, its ``kid`` is not the thumbprint of
        ``public_key``, or the signature does not verify.
    SigningError
        If ``public_key`` is not an Ed25519 public key.

    References
    ----------
    .. [1] RFC 7515, §5.2 (validation), §4.1.1 (alg), §4.1.11 (crit), §10.7 (algorithm
       choice is the verifier's, not the token's).
    .. [2] RFC 8037, §3.1; RFC 8032, §5.1.7 (Ed25519 verification).
    """
    if not isinstance(public_key, Ed25519PublicKey):
        msg = f"verification needs an Ed25519 public key, not {type(public_key).__name__}"
        raise SigningError(msg)
    header, payload, signature = _parse_compact(token)
    alg = header.get("alg")
    if alg == "none":
        msg = "JWS is unsigned (alg 'none'); unsigned tokens are never accepted"
        raise SignatureInvalid(msg)
    if alg != ALGORITHM:
        msg = f"JWS algorithm is {alg!r}; only {ALGORITHM!r} (Ed25519) signatures are accepted"
        raise SignatureInvalid(msg)
    if "crit" in header:
        msg = f"JWS header lists critical extensions {header['crit']!r}, which are not supported"
        raise SignatureInvalid(msg)
    thumbprint = jwk_thumbprint(public_key)
    kid = header.get("kid")
    if kid is not None and kid != thumbprint:
        msg = f"JWS was signed with key {kid!r}, not with the key given ({thumbprint})"
        raise SignatureInvalid(msg)
    if not signature:
        msg = "JWS signature part is empty (an unsigned or truncated token)"
        raise SignatureInvalid(msg)
    if len(signature) != _ED25519_SIGNATURE_BYTES:
        msg = f"JWS signature has {len(signature)} octets; an Ed25519 signature has 64"
        raise SignatureInvalid(msg)
    from joserfc.errors import BadSignatureError, JoseError  # noqa: PLC0415
    from joserfc.jws import deserialize_compact  # noqa: PLC0415

    try:
        with _eddsa_allowed():
            deserialize_compact(
                token, _okp_key(public_key), algorithms=[ALGORITHM], registry=_registry()
            )
    except BadSignatureError:
        msg = (
            f"JWS signature does not verify with key {thumbprint}: the header or the payload "
            "was changed after signing, or another key signed it"
        )
        raise SignatureInvalid(msg) from None
    except JoseError as error:
        msg = f"JWS is not accepted: {error.description or error}"
        raise SignatureInvalid(msg) from None
    return header, payload


def _parse_compact(token: str) -> tuple[dict[str, Any], bytes, bytes]:
    """Split and decode a compact JWS: header, payload, signature (one message per fault)."""
    if not isinstance(token, str):
        msg = f"a JWS compact token is text, not {type(token).__name__}"
        raise SignatureInvalid(msg)
    parts = token.split(".")
    if len(parts) != 3:
        msg = (
            f"malformed JWS: expected 3 parts separated by '.', found {len(parts)} "
            "(truncated or not a compact JWS?)"
        )
        raise SignatureInvalid(msg)
    encoded_header, encoded_payload, encoded_signature = parts
    if not encoded_header:
        msg = "malformed JWS: the header part is empty"
        raise SignatureInvalid(msg)
    if len(encoded_header) > _MAX_HEADER_CHARACTERS:
        msg = f"malformed JWS: the header is longer than {_MAX_HEADER_CHARACTERS} characters"
        raise SignatureInvalid(msg)
    if len(encoded_payload) > _MAX_PAYLOAD_CHARACTERS:
        msg = f"JWS payload is larger than a record signs ({MAX_PAYLOAD_BYTES:,} bytes)"
        raise SignatureInvalid(msg)
    try:
        header_bytes = b64url_decode(encoded_header, "JWS header")
        payload = b64url_decode(encoded_payload, "JWS payload")
        signature = b64url_decode(encoded_signature, "JWS signature")
    except SigningError as error:
        msg = f"malformed JWS: {error}"
        raise SignatureInvalid(msg) from None
    return _parse_header(header_bytes), payload, signature


def _parse_header(header_bytes: bytes) -> dict[str, Any]:
    try:
        text = header_bytes.decode("utf-8")
    except UnicodeDecodeError:
        msg = "malformed JWS: the header is not UTF-8 text"
        raise SignatureInvalid(msg) from None
    try:
        header = json.loads(
            text, object_pairs_hook=_unique_members, parse_constant=_refuse_constant
        )
    except ValueError as error:
        msg = f"malformed JWS: the header is not valid JSON ({error})"
        raise SignatureInvalid(msg) from None
    if not isinstance(header, dict):
        msg = f"malformed JWS: the header is a JSON {type(header).__name__}, not an object"
        raise SignatureInvalid(msg)
    return header


def _unique_members(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    # RFC 7515 §5.2 step 4: header member names must be unique; a second "alg" could make two
    # readers of one token disagree about what it says (joserfc would keep the last one).
    members: dict[str, Any] = {}
    for name, value in pairs:
        if name in members:
            msg = f"malformed JWS: the header names member {name!r} twice"
            raise SignatureInvalid(msg)
        members[name] = value
    return members


def _refuse_constant(name: str) -> None:
    msg = f"{name} is not a JSON value"
    raise ValueError(msg)
