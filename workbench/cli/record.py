"""The record's sub-commands of ``workbench``: keygen, export, verify, package.

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

from workbench.case.files import atomic_file
from workbench.case.title_block import TEXT_FIELDS, TITLE_FIELDS
from workbench.cli.output import output_file, writing
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

    private_path, public_path = write_key_pair(arguments.out)
    fingerprint = jwk_thumbprint(load_private_key(private_path).public_key())
    sys.stdout.write(
        f"private key: {private_path} (owner-only; keep it secret)\n"
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
    check = verify_package if is_package else verify_record
    outcome = check(arguments.record, arguments.public_key)
    for line in outcome.lines():
        sys.stdout.write(line + "\n")
    return EXIT_OK if outcome.ok else EXIT_NOT_VERIFIED


def _command_package(arguments: argparse.Namespace) -> int:
    from workbench.record.package import build_package  # noqa: PLC0415

    output = output_file(arguments.output)
    with writing(output):
        manifest = build_package(
            arguments.notebook,
            output,
            key_file=arguments.key,
            signer=arguments.signer,
            title_block=_title_overrides(arguments),
            paper=None if arguments.no_pdf else arguments.paper,
        )
    names = ", ".join(entry["name"] for entry in manifest["files"])
    signed = "signed manifest" if arguments.key else "UNSIGNED manifest"
    sys.stdout.write(f"wrote {arguments.output}: {names}, manifest.json ({signed})\n")
    return EXIT_OK


def register(commands: Any) -> None:
    """Add ``keygen``, ``export``, ``verify`` and ``package`` to the argparse sub-parsers."""
    keygen = commands.add_parser(
        "keygen", help="make an Ed25519 signing key pair (private.pem, public.pem)"
    )
    keygen.add_argument("--out", required=True, metavar="DIR", help="folder for the key files")
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
        "--public-key", metavar="PEM", help="the signer's public key (PEM or JWK JSON)"
    )
    verify.set_defaults(run=_command_verify)

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
    _add_title_options(package)
    package.set_defaults(run=_command_package)
