"""Show the fuzz figures (runs per command, outcomes by kind, time) at the end of the session."""

from __future__ import annotations

from typing import Any

from tests.fuzz.harness import summary


def pytest_terminal_summary(terminalreporter: Any) -> None:
    lines = summary()
    if lines:
        terminalreporter.section("fuzz figures")
        for line in lines:
            terminalreporter.write_line(line)
