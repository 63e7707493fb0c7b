"""The ``workbench modes`` command: natural frequencies and mode shapes of torsional vibration.

``workbench modes CASE [--json] [--count N] [--elements-per-segment N] [--max-element-length L]``
prints the lowest natural frequencies (Hz), rigid-body modes flagged, with their mode shapes
(``--json``) or as tables with the separation of each frequency from the case's running-speed
bands. Exit status 0; 2 for bad input (raised as :class:`InputError` and printed by the main
command as one line).
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any

from workbench.cli.status import EXIT_OK
from workbench.design.caution import CAUTION

__all__ = ["register"]


def _command_modes(arguments: argparse.Namespace) -> int:
    from workbench.case.errors import InputError  # noqa: PLC0415 - keep `--help` fast
    from workbench.design.frequency import modes_text  # noqa: PLC0415
    from workbench.solver.io import load_case  # noqa: PLC0415
    from workbench.solver.modes import modes_document, natural_modes  # noqa: PLC0415

    model = load_case(arguments.case)
    longest = arguments.max_element_length
    if longest is not None:
        if not longest > 0.0:
            msg = f"must be greater than zero, not {longest:g}"
            raise InputError("--max-element-length", msg)
        longest = float(model.units.to_si(longest, "length"))
    for option, value in (
        ("--count", arguments.count),
        ("--elements-per-segment", arguments.elements_per_segment),
    ):
        if value is not None and value < 1:
            msg = f"must be at least 1, not {value}"
            raise InputError(option, msg)
    margin = getattr(model.design, "frequency_margin", None)
    up_to = None
    if model.operating_speeds:
        widening = 1.0 + (0.2 if margin is None else margin)
        up_to = max(speed.maximum for speed in model.operating_speeds) * widening
    options = {
        "elements_per_segment": "--elements-per-segment",
        "max_element_length": "--max-element-length",
    }
    try:
        modes = natural_modes(
            model,
            count=arguments.count,
            up_to=up_to,
            elements_per_segment=arguments.elements_per_segment,
            max_element_length=longest,
        )
    except InputError as error:
        if error.field in options:  # the options' own names on the command line
            raise InputError(options[error.field], error.message) from None
        raise
    if arguments.json:
        document = modes_document(modes)
        sys.stdout.write(json.dumps(document, separators=(",", ":"), allow_nan=False) + "\n")
    else:
        sys.stdout.write(modes_text(modes, margin))
        sys.stdout.write(f"\nCaution: {CAUTION}\n")
    return EXIT_OK


def register(commands: Any) -> None:
    """Add the ``modes`` sub-command to an argparse sub-parsers object."""
    parser = commands.add_parser(
        "modes", help="natural frequencies and mode shapes of torsional vibration"
    )
    parser.add_argument("case", help="case file (JSON)")
    parser.add_argument("--json", action="store_true", help="print the JSON document")
    parser.add_argument(
        "--count", type=int, default=10, help="number of lowest modes to report (default 10)"
    )
    parser.add_argument(
        "--elements-per-segment",
        type=int,
        default=None,
        metavar="N",
        help="elements per segment with distributed inertia (default: the case's design, or 8)",
    )
    parser.add_argument(
        "--max-element-length",
        type=float,
        default=None,
        metavar="L",
        help="longest element on a segment with distributed inertia, in the file's length unit",
    )
    parser.set_defaults(run=_command_modes)
