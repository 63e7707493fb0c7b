"""Fuzzed case files through ``solve``, ``solve --json``, ``check``, ``size -o`` and ``modes``.

Each example is a valid case (committed or built) after random mutations of its values and of
its JSON text (:mod:`tests.fuzz.documents`); :func:`tests.fuzz.judge.judge_case` states the
outcomes allowed. CI runs a fixed set of examples (``derandomize``); a longer run draws more:
``WORKBENCH_FUZZ_EXAMPLES=20000 WORKBENCH_FUZZ_RANDOM=1 python -m pytest tests/fuzz`` (DEVELOPERS.md).
"""

from __future__ import annotations

import tempfile
from pathlib import Path

from hypothesis import given

from tests.fuzz.documents import case_texts
from tests.fuzz.harness import TALLY, fail, fuzz_settings, set_aside
from tests.fuzz.judge import judge_case

#: Case files per CI run; each goes through five commands.
CI_EXAMPLES = 1500


@fuzz_settings(CI_EXAMPLES)
@given(case_texts())
def test_fuzzed_case_files_give_only_allowed_outcomes(example: tuple[bytes, list[str]]) -> None:
    data, what = example
    with tempfile.TemporaryDirectory(prefix="wb-fuzz-") as folder:
        problems, runs = judge_case(data, Path(folder))
    problems = set_aside(problems, what)
    TALLY[("case files", "failed" if problems else "passed")] += 1
    if problems:
        fail("; ".join(problems), what, data, runs)
