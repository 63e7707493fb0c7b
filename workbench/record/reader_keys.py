"""What a reader gives ``workbench verify``: the file, the public keys, the trusted signers.

Each fault of these is bad input, named by its option (``--public-key``, ``--trusted``).
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError

__all__ = ["as_list", "pick", "read_trusted", "read_with_key"]


def read_with_key(
    path: str | Path,
    what: str,
    public_key_path: str | Path | Sequence[str | Path] | None,
) -> tuple[bytes, Any]:
    """The file's bytes and the public key(s) to check it with (``None``: the embedded ones)."""
    file = Path(path)
    try:
        data = file.read_bytes()
    except OSError as error:
        msg = f"cannot read the {what}: {error.strerror or error}"
        raise InputError(str(file), msg) from None
    if public_key_path is None:
        return data, None
    from workbench.signing import SigningError, load_public_key  # noqa: PLC0415

    paths = [public_key_path] if isinstance(public_key_path, (str, Path)) else public_key_path
    try:
        keys = [load_public_key(one) for one in paths]
    except SigningError as error:  # bad input of the option that named the key
        raise InputError("--public-key", str(error)) from None
    return data, keys[0] if len(keys) == 1 else keys


def as_list(public_key: Any) -> list[Any]:
    """The keys given: none, one, or a list, as a list."""
    if public_key is None:
        return []
    return list(public_key) if isinstance(public_key, (list, tuple)) else [public_key]


def pick(public_keys: list[Any], fingerprint: str | None) -> Any:
    """The given key whose thumbprint is ``fingerprint``, else the first one given."""
    from workbench.signing import jwk_thumbprint  # noqa: PLC0415

    return next((k for k in public_keys if jwk_thumbprint(k) == fingerprint), public_keys[0])


def read_trusted(trusted_path: str | Path | None) -> Any:
    """The trusted signers by fingerprint from ``--trusted``, or ``None`` when not given."""
    if trusted_path is None:
        return None
    from workbench.signing import SigningError, read_trusted_signers  # noqa: PLC0415

    try:
        return read_trusted_signers(trusted_path)
    except SigningError as error:
        raise InputError("--trusted", str(error)) from None
