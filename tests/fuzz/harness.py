"""Run ``workbench`` in-process on fuzzed input and judge what came out.

The allowed outcomes (README, "Commands"): exit 0 or 1 with nothing on stderr, or exit 2 with
exactly one line of at most 200 characters on stderr that names a field. Exit 3, a traceback, a
warning, a second line, or a run longer than :data:`TIME_LIMIT` seconds is a failure.
"""

from __future__ import annotations

import collections
import contextlib
import faulthandler
import io
import os
import signal
import time
import warnings
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field

from hypothesis import HealthCheck, settings

from tests.fuzz.open_defects import known_open
from workbench.cli import main

#: The longest run allowed for one command on one input (s): beyond it the run has hung.
TIME_LIMIT = 10.0
#: The longest message line allowed (characters).
LONGEST_MESSAGE = 200
#: A run still going this long is stuck in native code where no signal is seen: stop the process.
_LAST_RESORT = 120.0

#: Examples per fuzz test: ``WORKBENCH_FUZZ_EXAMPLES`` when set, else each test's CI default.
_EXAMPLES = os.environ.get("WORKBENCH_FUZZ_EXAMPLES")
#: ``WORKBENCH_FUZZ_RANDOM=1`` draws new examples each run instead of CI's fixed ones.
_RANDOM = os.environ.get("WORKBENCH_FUZZ_RANDOM") == "1"

#: Outcomes by command and kind, shown at the end of the test session (tests/fuzz/conftest.py).
TALLY: collections.Counter[tuple[str, str]] = collections.Counter()
#: Seconds spent running each command.
SECONDS: collections.Counter[str] = collections.Counter()


def fuzz_settings(ci_examples: int) -> settings:
    """Hypothesis settings of a fuzz test: ``ci_examples`` fixed examples unless told otherwise."""
    return settings(
        max_examples=int(_EXAMPLES) if _EXAMPLES else ci_examples,
        derandomize=not _RANDOM,
        database=None,
        deadline=None,
        print_blob=True,
        suppress_health_check=list(HealthCheck),
    )


class Overtime(BaseException):
    """A run went past the time limit (a BaseException: the command's guard must not catch it)."""


@dataclass
class Run:
    """What one command did: its exit status, its output, its warnings and its time."""

    command: str
    status: int | None
    stdout: str
    stderr: str
    warnings: list[str] = field(default_factory=list)
    seconds: float = 0.0
    overtime: bool = False

    def problem(self) -> str | None:
        """Why this run is not an allowed outcome, or ``None`` when it is."""
        if self.overtime:
            return f"ran over {TIME_LIMIT:g} s"
        if self.warnings:
            return f"a warning reached stderr: {self.warnings[0][:300]}"
        if self.status in (0, 1):
            # Rotations beyond 1 rad are told on stderr (README), one line each, as a message is.
            lines = self.stderr.splitlines(keepends=True)
            if all(line.startswith("warning: ") and not message_problem(line) for line in lines):
                return None
            return f"exit {self.status} with stderr {self.stderr[:300]!r}"
        if self.status != 2:
            return f"exit {self.status}: {self.stderr[:400]!r}"
        return message_problem(self.stderr)


def message_problem(stderr: str) -> str | None:
    """Why ``stderr`` is not one line of at most 200 characters, or ``None``."""
    if not stderr.endswith("\n") or stderr.count("\n") != 1 or "\r" in stderr:
        return f"not exactly one line on stderr: {stderr[:300]!r}"
    line = stderr[:-1]
    if len(line) > LONGEST_MESSAGE:
        return f"a message of {len(line):,} characters: {line[:300]!r}"
    if not line.strip():
        return "an empty message"
    return None


@contextlib.contextmanager
def _time_limit(seconds: float) -> Iterator[None]:
    def stop(signum: int, frame: object) -> None:
        raise Overtime

    previous = signal.signal(signal.SIGALRM, stop)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    faulthandler.dump_traceback_later(_LAST_RESORT, exit=True)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        faulthandler.cancel_dump_traceback_later()
        signal.signal(signal.SIGALRM, previous)


def _stream() -> io.TextIOWrapper:
    """A UTF-8 text stream with a byte buffer, like a terminal's (strict: a lone surrogate fails)."""
    return io.TextIOWrapper(io.BytesIO(), encoding="utf-8", errors="strict", newline="\n")


def _text(stream: io.TextIOWrapper) -> str:
    stream.flush()
    buffer = stream.buffer
    assert isinstance(buffer, io.BytesIO)
    return buffer.getvalue().decode("utf-8", "backslashreplace")


def run(command: str, argv: Sequence[str], *, tally: bool = True) -> Run:
    """Run ``workbench ARGV`` in this process with the time limit, capturing what it writes.

    ``command`` names the run in the fuzz figures (``"solve --json"``); ``tally=False`` leaves
    it out of them.
    """
    out, err = _stream(), _stream()
    status: int | None = None
    overtime = False
    started = time.perf_counter()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            with (
                _time_limit(TIME_LIMIT),
                contextlib.redirect_stdout(out),
                contextlib.redirect_stderr(err),
            ):
                status = main(list(argv))
        except Overtime:
            overtime = True
        except SystemExit as exit_:  # argparse's own refusals
            status = exit_.code if isinstance(exit_.code, int) else 2
        except Exception as error:
            text = f"traceback: {type(error).__name__}: {error}"[:400]
            err.write(text.encode("utf-8", "backslashreplace").decode("utf-8") + "\n")
    seconds = time.perf_counter() - started
    result = Run(
        command=command,
        status=status,
        stdout=_text(out),
        stderr=_text(err),
        warnings=[f"{w.category.__name__}: {w.message}" for w in caught],
        seconds=seconds,
        overtime=overtime,
    )
    if tally:
        SECONDS[command] += seconds
        kind = "over time" if overtime else f"exit {status}"
        TALLY[(command, f"{kind} with a warning" if result.warnings else kind)] += 1
    return result


def set_aside(problems: Sequence[str], mutations: Sequence[str]) -> list[str]:
    """The problems that are no known open defect; the others are counted, not failed on."""
    left = []
    for problem in problems:
        defect = known_open(problem, mutations)
        if defect is None:
            left.append(problem)
        else:
            TALLY[("problems set aside as known open defects", defect.area)] += 1
    return left


def summary() -> list[str]:
    """The fuzz figures: runs per command, outcomes by kind, time taken."""
    lines = []
    for command in sorted({c for c, _ in TALLY}):
        kinds = {k: n for (c, k), n in sorted(TALLY.items()) if c == command}
        total = sum(kinds.values())
        shown = ", ".join(f"{k}: {n}" for k, n in kinds.items())
        timing = f" in {SECONDS[command]:.1f} s" if command in SECONDS else ""
        lines.append(f"{command}: {total}{timing} ({shown})")
    return lines


def shown(data: bytes) -> str:
    """The input, short enough for a failure's report."""
    text = data.decode("utf-8", "backslashreplace")
    return text if len(text) <= 2000 else f"{text[:1000]} … {text[-500:]} ({len(text):,} chars)"


def fail(reason: str, what: Sequence[str], data: bytes, runs: Sequence[Run] = ()) -> None:
    """Fail the example with everything needed to reproduce it."""
    detail = "\n".join(f"  {r.command}: exit {r.status}, stderr {r.stderr[:300]!r}" for r in runs)
    message = f"{reason}\nmutations: {list(what)}\nruns:\n{detail}\ninput: {shown(data)}"
    raise AssertionError(message)


__all__ = ["TIME_LIMIT", "Run", "fail", "fuzz_settings", "message_problem", "run", "summary"]
