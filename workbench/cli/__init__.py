"""The ``workbench`` command: solve, check and size case files; open the workbench; records.

Bad input never ends in a traceback: the command prints one line naming the field and what is
wrong, on stderr, and exits with status 2.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from workbench.case.errors import InputError, WorkbenchError
from workbench.cli.status import EXIT_BAD_INPUT, EXIT_OK
from workbench.design.caution import CAUTION


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``workbench`` command."""
    parser = argparse.ArgumentParser(
        prog="workbench",
        description="Design and check members loaded in torsion.",
        epilog=f"Caution: {CAUTION}",
    )
    commands = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    for module_name in COMMAND_MODULES:
        importlib.import_module(module_name).register(commands)
    return parser


#: Every module that adds sub-commands, each through its own ``register(commands)``; their
#: imports are light, so ``--help`` stays fast (each command imports its work when it runs).
COMMAND_MODULES: tuple[str, ...] = (
    "workbench.cli.solve",
    "workbench.cli.modes",
    "workbench.cli.lab",
    "workbench.cli.record",
)


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit status."""
    parser = build_parser()
    arguments = parser.parse_args(argv)
    try:
        status: int = arguments.run(arguments)
    except InputError as error:
        sys.stderr.write(f"{error}\n")
        return EXIT_BAD_INPUT
    except WorkbenchError as error:
        sys.stderr.write(f"error: {error}\n")
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        return EXIT_OK
    return status
