"""The smallest example of each defect the fuzzer found (open_defects.py), kept as regressions.

Each runs through the same judge as the fuzzer and must give only allowed outcomes. A defect
found and not yet fixed goes into ``OPEN_DEFECTS`` instead, with its examples as strict
``xfail`` tests here, so that its fix turns them red and moves them back to the found ones.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from tests.fuzz.judge import judge_case
from tests.fuzz.open_defects import FOUND_DEFECTS

FOUND = [(name, make) for defect in FOUND_DEFECTS for name, make in defect.examples.items()]


@pytest.mark.parametrize(
    ("name", "make"), FOUND, ids=[f"{d.area}: {n}" for d in FOUND_DEFECTS for n in d.examples]
)
def test_a_defect_the_fuzzer_found_stays_fixed(
    name: str, make: Callable[[], bytes], tmp_path: Path
) -> None:
    problems, _ = judge_case(make(), tmp_path, tally=False)
    assert problems == [], f"{name}: {problems}"
