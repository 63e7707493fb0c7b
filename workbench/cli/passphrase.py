"""Passphrases of private key files: asked on a terminal, or read from a named variable.

A passphrase is never an option's value (it would show in the shell history and the process
list): scripts name an environment variable holding it with ``--passphrase-env NAME``. With
neither a terminal nor such a variable the command stops with one line (exit 2).
"""

from __future__ import annotations

import argparse
import getpass
import os
import sys

from workbench.case.errors import InputError

__all__ = ["add_passphrase_option", "key_passphrase", "new_key_passphrase"]

_OPTION = "--passphrase-env"


def add_passphrase_option(parser: argparse.ArgumentParser, what: str) -> None:
    """Add ``--passphrase-env NAME`` to a sub-command."""
    parser.add_argument(
        _OPTION,
        dest="passphrase_env",
        metavar="NAME",
        help=f"environment variable holding the passphrase of {what} (default: asked on a "
        "terminal)",
    )


def key_passphrase(key_file: str, env_name: str | None) -> bytes | None:
    """The passphrase a key file needs to sign, or ``None`` for an unencrypted key.

    Raises
    ------
    InputError
        If the key is encrypted and the variable is not set or empty, or there is neither
        the variable nor a terminal to ask on.
    """
    from workbench.signing import key_is_encrypted  # noqa: PLC0415

    if not key_is_encrypted(key_file):
        return None
    return _read(env_name, f"Passphrase for {key_file}: ", confirm=False)


def new_key_passphrase(env_name: str | None, no_passphrase: bool) -> bytes | None:
    """The passphrase for a new key, or ``None`` (with a warning) when asked for none.

    Raises
    ------
    InputError
        If both options are given, the variable is not set or empty, or there is neither the
        variable nor a terminal to ask on, or the two entries on the terminal differ.
    """
    if no_passphrase:
        if env_name:
            raise InputError("--no-passphrase", f"give it or {_OPTION}, not both")
        sys.stderr.write(
            "warning: the private key is written WITHOUT a passphrase: anyone who gets a copy "
            "of the file can sign as you\n"
        )
        return None
    return _read(env_name, "Passphrase for the new private key: ", confirm=True)


def _read(env_name: str | None, prompt: str, *, confirm: bool) -> bytes:
    if env_name:
        value = os.environ.get(env_name)
        if value is None:
            raise InputError(_OPTION, f"the environment variable {env_name} is not set")
        if not value:
            raise InputError(_OPTION, f"the environment variable {env_name} is empty")
        return value.encode("utf-8")
    if not sys.stdin.isatty():
        msg = (
            f"no terminal to ask for it on; name an environment variable holding it with "
            f"{_OPTION} NAME"
        )
        raise InputError("passphrase", msg)
    value = getpass.getpass(prompt)
    if not value:
        raise InputError("passphrase", "empty; a key's passphrase cannot be empty")
    if confirm and getpass.getpass("The same passphrase again: ") != value:
        raise InputError("passphrase", "the two entries differ; nothing was written")
    return value.encode("utf-8")
