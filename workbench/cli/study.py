"""The ``workbench study`` command: many variants of a case from a plan, on dask, to parquet.

``workbench study CASE --plan PLAN -o RESULTS.parquet [--workers N] [--scheduler ADDRESS]
[--chunk-size N] [--json] [--summary FILE]`` runs the plan's variants (a local dask cluster of
``--workers`` processes, or the cluster at ``--scheduler``), writes one row per variant to the
parquet file as chunks finish, then prints the summary (text, or JSON with ``--json``; also
written to ``--summary``). A progress bar goes to stderr when it is a terminal. Ctrl-C stops the
study cleanly: the rows written so far stay in the file (a valid parquet file) and the command
says how many, exit status 130. Exit status 0 when the study ran (whatever its variants'
verdicts), 2 for bad input (one line naming the field).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from workbench.cli.output import output_file
from workbench.cli.status import EXIT_INTERRUPTED, EXIT_OK

__all__ = ["register"]


def _read(path: str, option: str) -> bytes:
    from workbench.case.errors import InputError  # noqa: PLC0415 - keep `--help` fast

    try:
        return Path(path).read_bytes()
    except OSError as error:
        raise InputError(option, f"cannot read {path!r}: {error.strerror}") from None


def _command_study(arguments: argparse.Namespace) -> int:
    from workbench.case.errors import InputError  # noqa: PLC0415
    from workbench.case.load import read_case_bytes  # noqa: PLC0415
    from workbench.study.engine import check_chunk_size, run_study  # noqa: PLC0415
    from workbench.study.evaluate import prepare  # noqa: PLC0415
    from workbench.study.summary import summarise, summary_text  # noqa: PLC0415

    case_text = read_case_bytes(arguments.case)
    plan_json = _read(arguments.plan, "--plan")
    output = output_file(arguments.output)
    summary_path = output_file(arguments.summary, "--summary") if arguments.summary else None
    if arguments.workers is not None and arguments.workers < 1:
        raise InputError("--workers", f"must be at least 1, not {arguments.workers}")
    if arguments.chunk_size is not None:
        check_chunk_size(arguments.chunk_size)
    plan = prepare(case_text, plan_json).plan  # bad input named before a cluster starts
    engine: dict[str, Any] = {"workers": arguments.workers, "scheduler": arguments.scheduler}
    if arguments.chunk_size is not None:
        engine["chunk_size"] = arguments.chunk_size
    with _bar(plan.count) as bar:
        outcome = run_study(case_text, plan_json, output, progress=bar, **engine)
    if outcome.rows == 0:
        sys.stderr.write(f"stopped before any variant was written; {output} was not written\n")
        return EXIT_INTERRUPTED
    summary = summarise(output, plan, outcome.total)
    if plan.sensitivity.sobol and not outcome.stopped:
        from workbench.study.sensitivity import sobol_indices  # noqa: PLC0415

        sobol_path = output.with_suffix(".sobol.parquet")
        with _bar(None) as bar:
            summary["sobol"], sobol_outcome = sobol_indices(case_text, plan, sobol_path,
                                                            progress=bar, **engine)  # fmt: skip
        outcome = outcome if not sobol_outcome.stopped else sobol_outcome
    if arguments.json:
        sys.stdout.write(json.dumps(summary, separators=(",", ":"), allow_nan=False) + "\n")
    else:
        sys.stdout.write(summary_text(summary))
    if summary_path is not None:
        summary_path.write_text(json.dumps(summary, indent=1, allow_nan=False) + "\n", "utf-8")
    if outcome.stopped:
        sys.stderr.write(
            f"stopped: {outcome.rows} of {outcome.total} variants written to {outcome.path} "
            "(kept; the summary above covers them)\n"
        )
        return EXIT_INTERRUPTED
    return EXIT_OK


class _bar:  # noqa: N801 - used as a context manager, like a function
    """A tqdm progress bar on stderr (when it is a terminal) fed by the engine's progress."""

    def __init__(self, total: int | None) -> None:
        self.total = total
        self.bar: Any = None
        self.shown = 0

    def __enter__(self) -> _bar:
        if sys.stderr.isatty():
            from tqdm import tqdm  # noqa: PLC0415

            self.bar = tqdm(total=self.total, unit="variant", unit_scale=True, file=sys.stderr)
        return self

    def __call__(self, progress: Any) -> None:
        if self.bar is not None:
            self.bar.total = progress.total
            self.bar.update(progress.done - self.shown)
            self.shown = progress.done

    def __exit__(self, *_: object) -> None:
        if self.bar is not None:
            self.bar.close()


def register(commands: Any) -> None:
    """Add the ``study`` sub-command to an argparse sub-parsers object."""
    parser = commands.add_parser(
        "study", help="many variants of a case from a plan (scatter, tolerances), on dask"
    )
    parser.add_argument("case", help="case file (JSON)")
    parser.add_argument("--plan", required=True, help="study plan (JSON; see the README)")
    parser.add_argument("-o", "--output", required=True, help="parquet file of one row per variant")
    parser.add_argument(
        "--workers", type=int, help="worker processes of the local cluster (default: the cores)"
    )
    parser.add_argument("--scheduler", help="address of an existing dask.distributed scheduler")
    parser.add_argument("--chunk-size", type=int,
                        help="variants per chunk, a multiple of 4096 (default 4096)")  # fmt: skip
    parser.add_argument("--json", action="store_true", help="print the summary as JSON")
    parser.add_argument("--summary", help="also write the summary (JSON) to this file")
    parser.set_defaults(run=_command_study)
