"""Ed25519 keys and JWS compact signatures for the calculation record.

The record is signed as a JSON Web Signature (JWS) in compact serialization with the EdDSA
algorithm over Ed25519. The protected header is ``{"alg": "EdDSA", "kid": <thumbprint>}`` plus
any extra members, written as canonical JSON (RFC 8785) so the same header always gives the same
bytes. The key id is the RFC 7638 JWK thumbprint of the public key: the fingerprint a checker
compares with the one the engineer published.

Key files are PEM: the private key as unencrypted PKCS#8, readable by its owner only, the public
key as SubjectPublicKeyInfo. A public key may also be read from a JWK JSON file (RFC 8037).

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
.. [6] A. Rundgren, B. Jordan and S. Erdtman, "JSON Canonicalization Scheme (JCS)", RFC 8785,
   June 2020.
"""

from __future__ import annotations

import base64
import binascii
import hashlib
import json
import os
import re
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from cryptography.exceptions import InvalidSignature, UnsupportedAlgorithm
from cryptography.hazmat.primitives import serialization
from cryptography.hazmat.primitives.asymmetric import ec, ed448, rsa, x448, x25519
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey, Ed25519PublicKey

from workbench.signing.canonical import canonicalize
from workbench.solver.errors import WorkbenchError

__all__ = [
    "PRIVATE_KEY_NAME",
    "PUBLIC_KEY_NAME",
    "SignatureInvalid",
    "SigningError",
    "b64url_decode",
    "b64url_encode",
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

#: File names :func:`write_key_pair` gives the private and the public key.
PRIVATE_KEY_NAME = "private.pem"
PUBLIC_KEY_NAME = "public.pem"

#: The one JWS algorithm accepted: EdDSA (RFC 8037 §3.1), here always over Ed25519.
ALGORITHM = "EdDSA"

_ED25519_KEY_BYTES = 32  # RFC 8032 §5.1.5: public key and seed are 32 octets
_ED25519_SIGNATURE_BYTES = 64  # RFC 8032 §5.1.6
_BASE64URL_TEXT = re.compile(r"[A-Za-z0-9_-]*")
# Members sign_compact sets itself, or that would change how the token is to be read
# (b64 and crit: RFC 7797, RFC 7515 §4.1.11), which this module does not implement.
_RESERVED_HEADER_MEMBERS = frozenset({"alg", "kid", "b64", "crit"})


class SigningError(WorkbenchError):
    """A key or a signature cannot be made, read or used."""


class SignatureInvalid(SigningError):  # noqa: N818 - the name the record code uses
    """A JWS token is malformed, uses an algorithm other than EdDSA, or does not verify."""


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
    return base64.urlsafe_b64encode(data).rstrip(b"=").decode("ascii")


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
    try:
        data = base64.urlsafe_b64decode(text + "=" * (-len(text) % 4))
    except binascii.Error as error:  # not reached after the checks above; kept as a guard
        msg = f"{what} is not valid base64url ({error})"
        raise SigningError(msg) from None
    if b64url_encode(data) != text:
        msg = f"{what} is not canonical base64url: its unused trailing bits are not zero"
        raise SigningError(msg)
    return data


# --- keys --------------------------------------------------------------------------------------


def generate_key() -> Ed25519PrivateKey:
    """Make a new Ed25519 private key from the operating system's random source.

    Returns
    -------
    Ed25519PrivateKey
        The new key.

    References
    ----------
    .. [1] RFC 8032, §5.1.5 (key generation).
    """
    return Ed25519PrivateKey.generate()


def write_key_pair(
    directory: str | os.PathLike[str], private_key: Ed25519PrivateKey | None = None
) -> tuple[Path, Path]:
    """Write a key pair to ``directory``, never replacing a key already there.

    Parameters
    ----------
    directory
        Folder to write into; made (owner-only) if missing.
    private_key
        Key to write; a new one from :func:`generate_key` when omitted.

    Returns
    -------
    tuple of Path
        ``(private_path, public_path)``: :data:`PRIVATE_KEY_NAME`, unencrypted PKCS#8 PEM with
        mode 0o600, and :data:`PUBLIC_KEY_NAME`, SubjectPublicKeyInfo PEM with mode 0o644.

    Raises
    ------
    SigningError
        If either file already exists, or a file cannot be written.

    Notes
    -----
    The private file is created with ``O_CREAT | O_EXCL`` and its final mode in one call, so it
    is never readable by others, not even for an instant, and a file (or link) put there in the
    meantime is not followed or overwritten.

    References
    ----------
    .. [1] RFC 5958, "Asymmetric Key Packages" (PKCS#8); RFC 8410, §7 (Ed25519 in PKCS#8) and
       §4 (SubjectPublicKeyInfo).
    """
    folder = Path(directory)
    private_path = folder / PRIVATE_KEY_NAME
    public_path = folder / PUBLIC_KEY_NAME
    for path in (private_path, public_path):
        if path.exists() or path.is_symlink():
            msg = (
                f"{path} already exists; refusing to overwrite a signing key (move it away "
                "first if you really mean to replace it)"
            )
            raise SigningError(msg)
    key = generate_key() if private_key is None else private_key
    if not isinstance(key, Ed25519PrivateKey):
        msg = f"private_key must be an Ed25519 private key, not {type(key).__name__}"
        raise SigningError(msg)
    private_pem = key.private_bytes(
        serialization.Encoding.PEM,
        serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption(),
    )
    public_pem = key.public_key().public_bytes(
        serialization.Encoding.PEM, serialization.PublicFormat.SubjectPublicKeyInfo
    )
    try:
        folder.mkdir(mode=0o700, parents=True, exist_ok=True)
    except OSError as error:
        msg = f"cannot make the key folder {folder}: {error.strerror or error}"
        raise SigningError(msg) from None
    _write_new_file(private_path, private_pem, 0o600)
    try:
        _write_new_file(public_path, public_pem, 0o644)
    except SigningError:
        private_path.unlink()  # no half-written pair: the private key alone is of no use
        raise
    return private_path, public_path


def _write_new_file(path: Path, content: bytes, mode: int) -> None:
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_NOFOLLOW", 0)
    try:
        descriptor = os.open(path, flags, mode)
    except FileExistsError:
        msg = f"{path} already exists; refusing to overwrite a signing key"
        raise SigningError(msg) from None
    except OSError as error:
        msg = f"cannot create {path}: {error.strerror or error}"
        raise SigningError(msg) from None
    with os.fdopen(descriptor, "wb") as stream:
        stream.write(content)


def load_private_key(
    path: str | os.PathLike[str], password: bytes | None = None
) -> Ed25519PrivateKey:
    """Read an Ed25519 private key from a PEM file (PKCS#8).

    Parameters
    ----------
    path
        The key file, as written by :func:`write_key_pair`.
    password
        Pass phrase of an encrypted PKCS#8 file; ``None`` for an unencrypted one.

    Returns
    -------
    Ed25519PrivateKey
        The key.

    Raises
    ------
    SigningError
        If the file is missing or unreadable, is not a PEM private key, needs a (different)
        password, or holds a key of another type.

    References
    ----------
    .. [1] RFC 8410, §7; RFC 5958 (PKCS#8).
    """
    file = Path(path)
    data = _read_key_file(file, "private key")
    if b"-----BEGIN" not in data:
        msg = f"{file} is not a PEM file (no '-----BEGIN' line); expected a PKCS#8 private key"
        raise SigningError(msg)
    if b"PUBLIC KEY-----" in data and b"PRIVATE KEY-----" not in data:
        msg = f"{file} holds a public key; signing needs the private key file"
        raise SigningError(msg)
    try:
        key = serialization.load_pem_private_key(data, password=password)
    except TypeError:
        msg = (
            f"{file} is encrypted and no password was given"
            if password is None
            else f"{file} is not encrypted; give no password"
        )
        raise SigningError(msg) from None
    except (ValueError, UnsupportedAlgorithm) as error:
        msg = f"{file} is not a readable PEM private key (or the password is wrong): {error}"
        raise SigningError(msg) from None
    if not isinstance(key, Ed25519PrivateKey):
        msg = f"{file} holds {_key_kind(key)}, not an Ed25519 key; record signatures use Ed25519"
        raise SigningError(msg)
    return key


def load_public_key(path: str | os.PathLike[str]) -> Ed25519PublicKey:
    """Read an Ed25519 public key from a PEM (SubjectPublicKeyInfo) or a JWK JSON file.

    Parameters
    ----------
    path
        The key file: PEM as written by :func:`write_key_pair`, or a JSON object with
        ``kty``, ``crv`` and ``x`` as :func:`public_jwk` gives.

    Returns
    -------
    Ed25519PublicKey
        The key.

    Raises
    ------
    SigningError
        If the file is missing or unreadable, holds a private key, is neither PEM nor a JWK,
        or holds a key of another type.

    References
    ----------
    .. [1] RFC 8410, §4 (SubjectPublicKeyInfo); RFC 8037, §2 (OKP JWK).
    """
    file = Path(path)
    data = _read_key_file(file, "public key")
    if data.lstrip().startswith(b"{"):
        try:
            jwk = json.loads(data.decode("utf-8"))
        except (UnicodeDecodeError, ValueError) as error:
            msg = f"{file} starts like JSON but is not valid JSON: {error}"
            raise SigningError(msg) from None
        if not isinstance(jwk, dict):
            msg = f"{file} is JSON but not a JWK object"
            raise SigningError(msg)
        try:
            return public_key_from_jwk(jwk)
        except SigningError as error:
            msg = f"{file}: {error}"
            raise SigningError(msg) from None
    if b"-----BEGIN" not in data:
        msg = f"{file} is neither a PEM public key nor a JWK JSON file"
        raise SigningError(msg)
    if b"PRIVATE KEY-----" in data:
        msg = (
            f"{file} holds a private key; give the public key file (never hand out the private one)"
        )
        raise SigningError(msg)
    try:
        key = serialization.load_pem_public_key(data)
    except (ValueError, UnsupportedAlgorithm) as error:
        msg = f"{file} is not a readable PEM public key: {error}"
        raise SigningError(msg) from None
    if not isinstance(key, Ed25519PublicKey):
        msg = f"{file} holds {_key_kind(key)}, not an Ed25519 key; record signatures use Ed25519"
        raise SigningError(msg)
    return key


def _read_key_file(file: Path, kind: str) -> bytes:
    try:
        return file.read_bytes()
    except FileNotFoundError:
        msg = f"no {kind} file at {file}"
        raise SigningError(msg) from None
    except IsADirectoryError:
        msg = f"{file} is a folder, not a {kind} file"
        raise SigningError(msg) from None
    except OSError as error:
        msg = f"cannot read the {kind} file {file}: {error.strerror or error}"
        raise SigningError(msg) from None


def _key_kind(key: object) -> str:
    kinds = (
        ((rsa.RSAPrivateKey, rsa.RSAPublicKey), "an RSA key"),
        ((ec.EllipticCurvePrivateKey, ec.EllipticCurvePublicKey), "an elliptic-curve (ECDSA) key"),
        ((ed448.Ed448PrivateKey, ed448.Ed448PublicKey), "an Ed448 key"),
        ((x25519.X25519PrivateKey, x25519.X25519PublicKey), "an X25519 key"),
        ((x448.X448PrivateKey, x448.X448PublicKey), "an X448 key"),
    )
    for classes, label in kinds:
        if isinstance(key, classes):
            return label
    return f"a key of type {type(key).__name__}"


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
    raw = public_key.public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    return {"kty": "OKP", "crv": "Ed25519", "x": b64url_encode(raw)}


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
    x = _okp_public_bytes(jwk)
    if "d" in jwk:
        msg = (
            "JWK holds the private member 'd'; give the public key only (kty, crv, x) and keep "
            "the private one secret"
        )
        raise SigningError(msg)
    return Ed25519PublicKey.from_public_bytes(x)


def _okp_public_bytes(jwk: Mapping[str, Any]) -> bytes:
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
    return raw


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
        ``crv``, ``kty`` and ``x`` in that (lexicographic) order, without whitespace — the
        RFC 8785 canonical form of that object. 43 characters.

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
    raw = _okp_public_bytes(jwk)
    required = {"crv": "Ed25519", "kty": "OKP", "x": b64url_encode(raw)}
    return b64url_encode(hashlib.sha256(canonicalize(required)).digest())


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
        The octets to sign (the record, already serialized).
    private_key
        The signer's Ed25519 key.
    extra_header
        More protected header members (e.g. ``{"typ": "...", "iat": ...}``). ``alg`` and
        ``kid`` are set here and may not be given; nor may ``b64`` or ``crit``, which would
        ask the reader for extensions this module does not implement.
    include_kid
        Put the RFC 7638 thumbprint of the public key in the header as ``kid`` (default). Off
        only to reproduce published examples whose header is ``{"alg":"EdDSA"}`` alone.

    Returns
    -------
    str
        ``BASE64URL(header) '.' BASE64URL(payload) '.' BASE64URL(signature)``, where the header
        is the RFC 8785 canonical JSON of the members above. Ed25519 is deterministic, so the
        same key, header and payload always give the same token.

    Raises
    ------
    SigningError
        If the key is not an Ed25519 private key, the payload is not bytes, or the extra
        header is not a JSON object of names other than the reserved ones, or has no
        canonical JSON form.

    References
    ----------
    .. [1] RFC 7515, §3.1, §5.1 and §7.1.
    .. [2] RFC 8037, §3.1 (EdDSA signing input and signature).
    .. [3] RFC 8032, §5.1.6 (Ed25519 signing).
    """
    if not isinstance(private_key, Ed25519PrivateKey):
        msg = f"signing needs an Ed25519 private key, not {type(private_key).__name__}"
        raise SigningError(msg)
    if not isinstance(payload, (bytes, bytearray, memoryview)):
        msg = f"payload must be bytes, not {type(payload).__name__}; encode it first"
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
        header_bytes = canonicalize(header)
    except WorkbenchError as error:
        msg = f"the protected header has no canonical JSON form: {error}"
        raise SigningError(msg) from None
    signing_input = f"{b64url_encode(header_bytes)}.{b64url_encode(bytes(payload))}"
    signature = private_key.sign(signing_input.encode("ascii"))
    return f"{signing_input}.{b64url_encode(signature)}"


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
    header, payload, _, _ = _parse_compact(token)
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
    header, payload, signing_input, signature = _parse_compact(token)
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
    try:
        public_key.verify(signature, signing_input)
    except InvalidSignature:
        msg = (
            f"JWS signature does not verify with key {thumbprint}: the header or the payload "
            "was changed after signing, or another key signed it"
        )
        raise SignatureInvalid(msg) from None
    return header, payload


def _parse_compact(token: str) -> tuple[dict[str, Any], bytes, bytes, bytes]:
    """Split and decode a compact JWS: header, payload, signing input, signature."""
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
    try:
        header_bytes = b64url_decode(encoded_header, "JWS header")
        payload = b64url_decode(encoded_payload, "JWS payload")
        signature = b64url_decode(encoded_signature, "JWS signature")
    except SigningError as error:
        msg = f"malformed JWS: {error}"
        raise SignatureInvalid(msg) from None
    header = _parse_header(header_bytes)
    signing_input = f"{encoded_header}.{encoded_payload}".encode("ascii")
    return header, payload, signing_input, signature


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
    # readers of one token disagree about what it says.
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
