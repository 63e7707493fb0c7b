"""The case commands of ``workbench``: solve, check, size, schema, demo.

Exit status: 0 success (``check``: every check passes; ``size``: a passing size was found), 1 a
check fails or nothing passes, 2 bad input (raised as :class:`InputError`, printed by the main
command as one line), a system nearly a mechanism among it. Warnings on results that are still
reported (rotations beyond 1 rad) go to stderr, one line each, and leave the status alone.
"""

from __future__ import annotations

import argparse
import itertools
import json
import sys
from collections.abc import Iterable
from pathlib import Path
from typing import Any

from workbench.cli.output import output_file, writing
from workbench.cli.status import EXIT_FAILED_CHECK, EXIT_OK
from workbench.design.caution import CAUTION

__all__ = ["DEMO_CASE", "register"]

#: The bundled demo case (a scenario of our own).
DEMO_CASE = Path(__file__).resolve().parents[1] / "cases" / "press_drive.json"


def _print_json(document: Any) -> None:
    sys.stdout.write(json.dumps(document, indent=None, separators=(",", ":"), allow_nan=False))
    sys.stdout.write("\n")


def _command_solve(arguments: argparse.Namespace) -> int:
    # Straight from the file's columns: no object per segment (keep `--help` fast: lazy imports).
    from workbench.solver.analysis import solve_file  # noqa: PLC0415
    from workbench.solver.tables import results_json, results_text  # noqa: PLC0415

    # A result beyond the range of numbers is refused by the solve, naming its cause.
    results = solve_file(arguments.case)
    if arguments.json:
        # Written piece by piece; the document checks every value before its first piece.
        _write_bytes(itertools.chain(results_json(results), [b"\n"]))
    else:
        sys.stdout.write(results_text(results))
        sys.stdout.write(f"\nCaution: {CAUTION}\n")
    _warn(results.warnings)  # once the results are out: a refusal stays one line
    return EXIT_OK


def _warn(warnings: Iterable[str]) -> None:
    """Each caution on results that are still reported, one line on stderr."""
    for warning in warnings:
        sys.stderr.write(f"warning: {warning}\n")


def _write_bytes(pieces: Iterable[bytes]) -> None:
    """UTF-8 text to stdout as it is (a stream without a byte buffer gets it decoded)."""
    buffer = getattr(sys.stdout, "buffer", None)
    sys.stdout.flush()
    for piece in pieces:
        if buffer is None:
            sys.stdout.write(piece.decode("utf-8"))
        else:
            buffer.write(piece)
    sys.stdout.flush()


def _command_check(arguments: argparse.Namespace) -> int:
    from workbench.design.checks import check_document, check_text, run_checks  # noqa: PLC0415
    from workbench.design.warping_model_checks import FINITE_ELEMENT_SHEAR  # noqa: PLC0415
    from workbench.solver.analysis import solve  # noqa: PLC0415
    from workbench.solver.io import load_case  # noqa: PLC0415

    model = load_case(arguments.case)
    results = solve(model)
    report = run_checks(results)
    if arguments.json:
        _print_json(check_document(report))
    else:
        sys.stdout.write(check_text(report))
    # Once the report is out (a refusal stays one line); stresses left unjudged (the warping
    # shear of a section by finite elements) are repeated.
    unchecked = [note for note in report.notes if note == FINITE_ELEMENT_SHEAR]
    _warn([*results.warnings, *unchecked])
    return EXIT_OK if report.passes else EXIT_FAILED_CHECK


def _command_size(arguments: argparse.Namespace) -> int:
    from workbench.design.sizing import SizingRequest, size_shafts, sizing_document, sizing_text  # noqa: PLC0415
    from workbench.solver.io import load_case, save_case  # noqa: PLC0415

    output = output_file(arguments.output) if arguments.output else None
    model = load_case(arguments.case)
    request = SizingRequest.from_arguments(
        model,
        segments=arguments.segment,
        series=arguments.series,
        sizes=arguments.sizes,
        keep=arguments.keep,
        minimum_fraction=arguments.min_fraction,
    )
    outcome = size_shafts(model, request)
    if arguments.json:
        _print_json(sizing_document(outcome))
    else:
        sys.stdout.write(sizing_text(outcome))
    if output is not None:
        with writing(output):
            save_case(outcome.model, output)
    # The cautions on the sized model's results, as `solve` and `check` print them (a case
    # whose sections warp is refused before: the batch path solves uniform torsion only).
    _warn(outcome.report.results.warnings)
    return EXIT_OK if outcome.passes else EXIT_FAILED_CHECK


def _command_schema(arguments: argparse.Namespace) -> int:
    from workbench.case.schema import case_schema  # noqa: PLC0415

    sys.stdout.write(json.dumps(case_schema(), indent=2, ensure_ascii=False) + "\n")
    return EXIT_OK


def _command_demo(arguments: argparse.Namespace) -> int:
    sys.stdout.write(f"Demo case: {DEMO_CASE}\n\n")
    arguments.case = str(DEMO_CASE)
    arguments.json = False
    _command_solve(arguments)
    sys.stdout.write("\n")
    _command_check(arguments)
    return EXIT_OK


def register(commands: Any) -> None:
    """Add ``solve``, ``check``, ``size``, ``schema`` and ``demo`` to the argparse sub-parsers."""
    solve_parser = commands.add_parser("solve", help="solve every load case and combination")
    solve_parser.add_argument("case", help="case file (JSON)")
    solve_parser.add_argument("--json", action="store_true", help="print the JSON document")
    solve_parser.set_defaults(run=_command_solve)

    check_parser = commands.add_parser(
        "check", help="check stress and twist; exit 0 all pass, 1 any fails, 2 bad input"
    )
    check_parser.add_argument("case", help="case file (JSON)")
    check_parser.add_argument("--json", action="store_true", help="print the JSON document")
    check_parser.set_defaults(run=_command_check)

    size_parser = commands.add_parser(
        "size", help="find the smallest preferred diameters that pass every check"
    )
    size_parser.add_argument("case", help="case file (JSON)")
    size_parser.add_argument(
        "--segment",
        action="append",
        metavar="SHAFT:INDEX",
        help="segment to size, e.g. main:0 (repeatable; default: every circular segment)",
    )
    size_parser.add_argument(
        "--series",
        default="R40",
        choices=["R5", "R10", "R20", "R40"],
        help="ISO 3 Renard series of preferred sizes (default R40)",
    )
    size_parser.add_argument(
        "--sizes",
        metavar="LIST",
        help="comma-separated diameters to choose from instead, in the file's length unit",
    )
    size_parser.add_argument(
        "--keep",
        default="ratio",
        choices=["ratio", "wall"],
        help="for tubes: keep the bore ratio (default) or the wall thickness",
    )
    size_parser.add_argument(
        "--min-fraction",
        type=float,
        default=0.25,
        help="floor for each diameter, as a fraction of its starting size (default 0.25)",
    )
    size_parser.add_argument("-o", "--output", help="write the sized case file here")
    size_parser.add_argument("--json", action="store_true", help="print the JSON document")
    size_parser.set_defaults(run=_command_size)

    schema_parser = commands.add_parser("schema", help="print the case file's JSON Schema")
    schema_parser.set_defaults(run=_command_schema)

    demo_parser = commands.add_parser("demo", help="solve and check the bundled demo case")
    demo_parser.set_defaults(run=_command_demo)
