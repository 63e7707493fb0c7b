"""The smallest example of each open defect (open_defects.py), as a strict ``xfail``.

Each runs through the same judge as the fuzzer. It fails today; when the fix of its area lands
it passes, the strict xfail turns red, and the example (and, with its last example, the open
defect) is deleted from open_defects.py so that the fuzzer fails on it again.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from tests.fuzz.judge import judge_case
from tests.fuzz.open_defects import OPEN_DEFECTS, OpenDefect

EXAMPLES = [
    (defect, name, make) for defect in OPEN_DEFECTS for name, make in defect.examples.items()
]
IDS = [f"{defect.area}: {name}" for defect, name, _ in EXAMPLES]


@pytest.mark.parametrize(
    ("defect", "name", "make"),
    [
        pytest.param(*example, marks=pytest.mark.xfail(strict=True, reason=example[0].name))
        for example in EXAMPLES
    ],
    ids=IDS,
)
def test_open_defect_example_is_fixed(
    defect: OpenDefect, name: str, make: Callable[[], bytes], tmp_path: Path
) -> None:
    problems, _ = judge_case(make(), tmp_path, tally=False)
    assert problems == [], f"{name}: {problems}"


@pytest.mark.parametrize(("defect", "name", "make"), EXAMPLES, ids=IDS)
def test_open_defect_example_fails_only_as_its_defect(
    defect: OpenDefect, name: str, make: Callable[[], bytes], tmp_path: Path
) -> None:
    # Each example stands for its defect alone: the fuzzer sets aside nothing else.
    problems, _ = judge_case(make(), tmp_path, tally=False)
    others = [p for p in problems if not defect.matches(p, defect.made_by)]
    assert others == [], f"{name}: {others}"
