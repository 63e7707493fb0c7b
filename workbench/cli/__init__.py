"""The ``workbench`` command: solve, check and size case files; open the workbench; records.

Bad input never ends in a traceback: the command prints one line naming the field and what is
wrong, on stderr, and exits with status 2. Anything unexpected is one line too ("internal error:
…, please report"), exit status 3; ``--debug`` shows the traceback instead.
"""

from __future__ import annotations

import argparse
import importlib
import sys
import traceback
from collections.abc import Sequence
from pathlib import Path

from workbench.case.errors import InputError, WorkbenchError, one_line, short
from workbench.cli.status import EXIT_BAD_INPUT, EXIT_INTERNAL_ERROR, EXIT_OK
from workbench.design.caution import CAUTION


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``workbench`` command."""
    parser = argparse.ArgumentParser(
        prog="workbench",
        description="Design and check members loaded in torsion.",
        epilog=f"Caution: {CAUTION}",
    )
    parser.add_argument(
        "--debug", action="store_true", help="show the traceback of an internal error"
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
    "workbench.cli.compare",
    "workbench.cli.study",
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
        sys.stderr.write(one_line(f"error: {error}") + "\n")
        return EXIT_BAD_INPUT
    except BrokenPipeError:
        return EXIT_OK
    except Exception as error:  # the last line of defence: every known fault is an InputError
        if arguments.debug:
            traceback.print_exc()
        else:
            sys.stderr.write(_internal_error_line(arguments, error) + "\n")
        return EXIT_INTERNAL_ERROR
    return status


def _internal_error_line(arguments: argparse.Namespace, error: Exception) -> str:
    """One line for an unexpected error: what it was, on which file, and to report it."""
    target = next(
        (
            value
            for key in ("case", "notebook", "record")
            if (value := getattr(arguments, key, None))
        ),
        "",
    )
    # The file's name, not its folder: the line stays short wherever the file lies.
    where = f" on {short(Path(target).name)}" if target else ""
    detail = short(str(error).replace("\n", " "))
    return (
        f"internal error{where}: {type(error).__name__}: {detail}; please report it "
        "(run with --debug for the traceback)"
    )
