"""The record's sub-commands of ``workbench``: keygen, export, verify, countersign, package.

Exit status: 0 on success; 2 for bad input (raised as :class:`InputError`/
:class:`WorkbenchError`, printed by the main command as one line); ``verify`` exits 1 when the
record or package does not verify (altered, unsigned, re-signed with another key, truncated, a
file of the package changed, added or missing), after printing what it found and what failed,
one line each.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.case.files import atomic_file
from workbench.case.title_block import TEXT_FIELDS, TITLE_FIELDS
from workbench.cli.output import output_file, writing
from workbench.cli.passphrase import add_passphrase_option, key_passphrase, new_key_passphrase
from workbench.cli.status import EXIT_FAILED_CHECK, EXIT_OK
from workbench.record.pdf import PAPER_SIZES

__all__ = ["EXIT_NOT_VERIFIED", "register"]

#: ``workbench verify``: the record does not verify.
EXIT_NOT_VERIFIED = EXIT_FAILED_CHECK

#: Title-block options: every field of the title block, then purpose and scope.
_TITLE_OPTIONS = (
    *((key, label.lower()) for key, label in TITLE_FIELDS.items()),
    *((key, f"{key} (one paragraph)") for key in TEXT_FIELDS),
)


def _title_overrides(arguments: argparse.Namespace) -> dict[str, Any]:
    return {
        key: getattr(arguments, key)
        for key, _ in _TITLE_OPTIONS
        if getattr(arguments, key, None) is not None
    }


def _add_title_options(parser: argparse.ArgumentParser) -> None:
    group = parser.add_argument_group(
        "title block (over the notebook's title-block output and metadata)"
    )
    for key, text in _TITLE_OPTIONS:
        group.add_argument(f"--{key.replace('_', '-')}", dest=key, metavar="TEXT", help=text)
    parser.add_argument("--signer", default="", help="signer's name (default: prepared by)")


def _command_keygen(arguments: argparse.Namespace) -> int:
    from workbench.signing import (  # noqa: PLC0415
        jwk_thumbprint,
        load_private_key,
        write_key_pair,
    )

    passphrase = new_key_passphrase(arguments.passphrase_env, arguments.no_passphrase)
    private_path, public_path = write_key_pair(arguments.out, passphrase=passphrase)
    fingerprint = jwk_thumbprint(load_private_key(private_path, passphrase).public_key())
    protection = "unencrypted" if passphrase is None else "encrypted with your passphrase"
    sys.stdout.write(
        f"private key: {private_path} (owner-only, {protection}; keep it secret)\n"
        f"public key:  {public_path} (hand this out)\n"
        f"fingerprint: {fingerprint}\n"
    )
    return EXIT_OK


def _command_export(arguments: argparse.Namespace) -> int:
    from workbench.record.exporter import export_file  # noqa: PLC0415

    output = output_file(arguments.output)
    record, _ = export_file(
        arguments.notebook,
        key_file=arguments.key,
        key_passphrase=_passphrase(arguments),
        signer=arguments.signer,
        title_block=_title_overrides(arguments),
        execute=not arguments.no_execute,
    )
    with writing(output), atomic_file(output) as stream:
        stream.write(record.encode("utf-8"))
    status = "signed" if arguments.key else "UNSIGNED"
    sys.stdout.write(f"wrote {output} ({status}, {len(record.encode('utf-8')):,} bytes)\n")
    return EXIT_OK


def _command_verify(arguments: argparse.Namespace) -> int:
    import zipfile  # noqa: PLC0415

    from workbench.record.verify import verify_package, verify_record  # noqa: PLC0415

    # A package is a zip (named so, or starting with a zip header); a record is HTML text.
    path = Path(arguments.record)
    is_package = path.suffix.lower() == ".zip" or zipfile.is_zipfile(path)
    if is_package:
        if arguments.trusted is not None:
            raise InputError("--trusted", "checks a record's signatures, not a package's")
        if arguments.study_rows is not None:
            raise InputError("--study-rows", "checks a record's study, not a package's")
        outcome = verify_package(arguments.record, arguments.public_key)
    else:
        outcome = verify_record(
            arguments.record, arguments.public_key, arguments.trusted, arguments.study_rows
        )
    for line in outcome.lines():
        sys.stdout.write(line + "\n")
    return EXIT_OK if outcome.ok else EXIT_NOT_VERIFIED


def _passphrase(arguments: argparse.Namespace) -> bytes | None:
    """The passphrase of ``--key`` (checked now, before any work), ``None`` if unencrypted."""
    if not arguments.key:
        return None
    from workbench.signing import load_private_key  # noqa: PLC0415

    passphrase = key_passphrase(arguments.key, arguments.passphrase_env)
    load_private_key(arguments.key, passphrase)  # a wrong passphrase stops here, one line
    return passphrase


def _command_countersign(arguments: argparse.Namespace) -> int:
    from workbench.record.countersign import countersign_text  # noqa: PLC0415
    from workbench.signing import jwk_thumbprint, load_private_key  # noqa: PLC0415

    source = Path(arguments.record)
    try:
        data = source.read_bytes()
    except OSError as error:
        raise InputError(
            str(source), f"cannot read the record: {error.strerror or error}"
        ) from None
    output = output_file(
        arguments.output or arguments.record, "-o" if arguments.output else "record"
    )
    private_key = load_private_key(arguments.key, _passphrase(arguments))
    record = countersign_text(
        data, private_key, role=arguments.role, name=arguments.name or "", where=source
    )
    with writing(output), atomic_file(output) as stream:
        stream.write(record.encode("utf-8"))
    fingerprint = jwk_thumbprint(private_key.public_key())
    sys.stdout.write(f"countersigned {output} as {arguments.role} (key {fingerprint})\n")
    return EXIT_OK


def _command_package(arguments: argparse.Namespace) -> int:
    from workbench.record.package import build_package  # noqa: PLC0415

    output = output_file(arguments.output)
    with writing(output):
        manifest = build_package(
            arguments.notebook,
            output,
            key_file=arguments.key,
            key_passphrase=_passphrase(arguments),
            signer=arguments.signer,
            title_block=_title_overrides(arguments),
            paper=None if arguments.no_pdf else arguments.paper,
        )
    names = ", ".join(entry["name"] for entry in manifest["files"])
    signed = "signed manifest" if arguments.key else "UNSIGNED manifest"
    sys.stdout.write(f"wrote {arguments.output}: {names}, manifest.json ({signed})\n")
    return EXIT_OK


def register(commands: Any) -> None:
    """Add ``keygen``, ``export``, ``verify``, ``countersign`` and ``package`` to the parsers."""
    keygen = commands.add_parser(
        "keygen", help="make an Ed25519 signing key pair (private.pem, public.pem)"
    )
    keygen.add_argument("--out", required=True, metavar="DIR", help="folder for the key files")
    add_passphrase_option(keygen, "the new private key")
    keygen.add_argument(
        "--no-passphrase",
        action="store_true",
        help="write the private key unencrypted (not advised; a warning is printed)",
    )
    keygen.set_defaults(run=_command_keygen)

    export = commands.add_parser(
        "export", help="write the signed calculation record (one HTML file) of a notebook"
    )
    export.add_argument("notebook", help="the notebook (.ipynb)")
    export.add_argument("-o", "--output", required=True, help="record file to write (.html)")
    export.add_argument("--key", help="private key (PEM) to sign with; omit for UNSIGNED")
    export.add_argument(
        "--no-execute",
        action="store_true",
        help="never execute the notebook (it must already hold a case output or case_file)",
    )
    add_passphrase_option(export, "--key, when it is encrypted")
    _add_title_options(export)
    export.set_defaults(run=_command_export)

    verify = commands.add_parser(
        "verify",
        help="check a record's or a package's signature, content and results; exit 0 verified, "
        "1 not, 2 bad input",
    )
    verify.add_argument(
        "record",
        help="the record (.html) or calculation package (.zip: manifest signature, every "
        "file's SHA-256, and the record inside)",
    )
    verify.add_argument(
        "--public-key",
        metavar="PEM",
        action="append",
        help="the signer's public key (PEM or JWK JSON); give it again for each countersigner",
    )
    verify.add_argument(
        "--trusted",
        metavar="SIGNERS",
        help="trusted-signers file (fingerprint, roles, name a line): name each signature's "
        "signer, fail on a key not on it",
    )
    verify.add_argument(
        "--study-rows",
        metavar="PARQUET",
        help="the rows file of the record's study: check its SHA-256 and summary against the "
        "signed ones",
    )
    verify.set_defaults(run=_command_verify)

    countersign = commands.add_parser(
        "countersign",
        help="add a checker's or an approver's signature to a record that verifies",
    )
    countersign.add_argument("record", help="the signed record (.html)")
    countersign.add_argument("--key", required=True, help="your private key (PEM)")
    countersign.add_argument("--role", required=True, choices=["checked", "approved"])
    countersign.add_argument(
        "--name", help="your name (default: the title block's checked by / approved by)"
    )
    countersign.add_argument(
        "-o", "--output", help="write the countersigned record here (default: in place)"
    )
    add_passphrase_option(countersign, "--key, when it is encrypted")
    countersign.set_defaults(run=_command_countersign)

    package = commands.add_parser(
        "package", help="zip notebook, case, record, results and a signed manifest"
    )
    package.add_argument("notebook", help="the notebook (.ipynb)")
    package.add_argument("-o", "--output", required=True, help="zip file to write")
    package.add_argument("--key", help="private key (PEM) to sign with")
    package.add_argument(
        "--paper",
        choices=PAPER_SIZES,
        default="A4",
        help="paper of record.pdf, printed by headless Chromium (default A4)",
    )
    package.add_argument("--no-pdf", action="store_true", help="leave record.pdf out")
    add_passphrase_option(package, "--key, when it is encrypted")
    _add_title_options(package)
    package.set_defaults(run=_command_package)
