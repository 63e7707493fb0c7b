"""``workbench compare REV_A REV_B``: what changed between two revisions of a record.

Exit status: 0 when both records verify and are compared (whether or not anything changed); 2
when a record cannot be read or does not verify (bad input, one line naming the file).
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any

from workbench.case.files import atomic_file
from workbench.cli.output import output_file, writing
from workbench.cli.status import EXIT_OK

__all__ = ["register"]


def _command_compare(arguments: argparse.Namespace) -> int:
    from workbench.record.compare import (  # noqa: PLC0415
        compare_records,
        comparison_html,
        comparison_text,
    )

    output = output_file(arguments.output) if arguments.output else None
    comparison = compare_records(arguments.rev_a, arguments.rev_b, arguments.public_key)
    if output is not None:
        page = comparison_html(comparison).encode("utf-8")
        with writing(output), atomic_file(output) as stream:
            stream.write(page)
    if arguments.json:
        sys.stdout.write(json.dumps(comparison.document(), ensure_ascii=False, indent=1) + "\n")
    else:
        sys.stdout.write(comparison_text(comparison))
        if output is not None:
            sys.stdout.write(f"wrote {output}\n")
    return EXIT_OK


def register(commands: Any) -> None:
    """Add ``compare`` to the argparse sub-parsers."""
    compare = commands.add_parser(
        "compare",
        help="verify two records and list what changed between them (inputs and results); "
        "exit 0 compared, 2 bad input or a record that does not verify",
    )
    compare.add_argument("rev_a", metavar="REV_A", help="the older record (.html)")
    compare.add_argument("rev_b", metavar="REV_B", help="the newer record (.html)")
    compare.add_argument("-o", "--output", metavar="DIFF.html", help="also write an HTML page")
    compare.add_argument("--json", action="store_true", help="print one JSON document")
    compare.add_argument(
        "--public-key", metavar="PEM", help="the signer's public key (PEM or JWK JSON)"
    )
    compare.set_defaults(run=_command_compare)
