"""A longer fuzz run that goes on past failures and sorts them: ``python -m tests.fuzz.survey N``.

The pytest fuzz tests stop at the first failure and shrink it; this runs ``N`` fuzzed case files
(new ones each time; ``--fixed`` for the same ones as CI's derandomized run), prints the outcome figures, and writes each
failure with its input to ``--out`` (default ``fuzz-failures.jsonl``), one JSON line each.
"""

from __future__ import annotations

import argparse
import json
import tempfile
import time
from pathlib import Path

from hypothesis import HealthCheck, Phase, given, settings

from tests.fuzz.documents import case_texts
from tests.fuzz.harness import set_aside, summary
from tests.fuzz.judge import judge_case


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("examples", type=int)
    parser.add_argument("--fixed", action="store_true", help="CI's derandomized examples")
    parser.add_argument("--out", default="fuzz-failures.jsonl")
    arguments = parser.parse_args()
    failures = 0
    started = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder, open(arguments.out, "w", encoding="utf-8") as out:

        @settings(
            max_examples=arguments.examples,
            database=None,
            deadline=None,
            phases=[Phase.generate],
            derandomize=arguments.fixed,
            suppress_health_check=list(HealthCheck),
        )
        @given(case_texts())
        def explore(example: tuple[bytes, list[str]]) -> None:
            nonlocal failures
            data, what = example
            problems, _ = judge_case(data, Path(folder))
            problems = set_aside(problems, what)
            if problems:
                failures += 1
                row = {"problems": problems, "mutations": what}
                row["input"] = data[:4000].decode("utf-8", "backslashreplace")
                out.write(json.dumps(row, ensure_ascii=False) + "\n")
                out.flush()

        explore()
    for line in summary():
        print(line)
    print(
        f"{arguments.examples} cases, {failures} with failures, {time.perf_counter() - started:.0f} s"
    )


if __name__ == "__main__":
    main()
