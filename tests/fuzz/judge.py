"""One fuzzed case file through ``solve``, ``solve --json``, ``check``, ``size`` and ``modes``.

:func:`judge_case` writes the bytes to a file, runs each command in-process and returns every
way the outcomes break the contract (README, "Commands"):

- each run is exit 0/1 with nothing on stderr, or exit 2 with one line ≤ 200 characters that
  names a field (a key of the case file, the file itself, or an option); never exit 3, a
  traceback, a warning, or more than 10 s;
- an accepted case (``solve`` exit 0) holds every bound of the published JSON Schema, gives only
  finite numbers and holds equilibrium in every load case and combination
  (:mod:`tests.fuzz.equilibrium`), and the program reads the same file into a model;
- a case ``solve`` refuses, ``check`` and ``size`` refuse too (they solve it first); a support
  ``solve`` refuses by its place in the list (two fixed at one point), ``modes`` refuses too (a
  system free to spin is another matter: ``modes`` reports its rigid-body modes);
- a case ``size -o`` writes reads back and solves, and no temporary file is left beside it.
"""

from __future__ import annotations

import functools
import json
import math
import re
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import jsonschema

from tests.fuzz.documents import get_at, places
from tests.fuzz.equilibrium import equilibrium_problem
from tests.fuzz.harness import Run, run
from workbench.case.declaration import CaseFile
from workbench.case.errors import path_key
from workbench.case.schema import case_schema

#: Names a message may start with: the case file's top-level keys, and the commands' options.
_TOP_KEYS = frozenset(CaseFile.__struct_fields__)
_OPTION = re.compile(r"^--?[a-z][a-z-]*: ")
#: A place in a document whose root is a list (``[0][0].shafts: ...``): the path names it.
_LIST_ROOT = re.compile(r"^(\[\d+\])+[.:\[]")


@functools.cache
def _validator() -> jsonschema.protocols.Validator:
    schema = case_schema()
    cls = jsonschema.validators.validator_for(schema)
    return cls(schema)


def _decoded(data: bytes) -> Any:
    try:
        return json.loads(data.decode("utf-8"))
    except (ValueError, RecursionError):
        return None


def names_a_field(line: str, document: Any, case_path: str) -> bool:
    """Whether the message ``line`` starts by naming a field, the case file or an option."""
    if line.startswith(f"{case_path}: ") or _OPTION.match(line) or _LIST_ROOT.match(line):
        return True
    names = set(_TOP_KEYS)
    if isinstance(document, dict):  # an unknown key, as a path shows it
        names |= {path_key(str(key)) for key in document}
    return any(
        (line.startswith(name) and line[len(name) : len(name) + 2] in (": ", ".", "["))
        or line.startswith(f"{name}[")
        or line.startswith(f"{name}.")
        for name in names
        if name
    )


def _run_problems(runs: Sequence[Run], document: Any, case_path: str) -> list[str]:
    problems = []
    for result in runs:
        problem = result.problem()
        if problem is None and result.status == 2:
            line = result.stderr.rstrip("\n")
            if not names_a_field(line, document, case_path):
                problem = f"the message names no field: {line!r}"
        if problem:
            problems.append(f"{result.command}: {problem}")
    return problems


def _accepted_problems(solved: Run, document: Any, case_path: str) -> list[str]:
    """Bounds, finite numbers and equilibrium of a case ``solve --json`` accepted."""
    from workbench.solver.io import load_case

    problems = []
    if isinstance(document, dict):
        error = jsonschema.exceptions.best_match(_validator().iter_errors(document))
        if error is not None:
            where = "".join(f"[{step!r}]" for step in error.absolute_path)
            problems.append(
                f"accepted out of the schema's bounds at {where}: {error.message[:200]}"
            )
        for index, limit in enumerate(_rotation_limits(document)):
            start, end = limit.get("start"), limit.get("end")
            if _numbers(start, end) and start >= end:
                problems.append(f"accepted rotation_limits[{index}] with start {start} ≥ end {end}")
    output = json.loads(solved.stdout, parse_constant=lambda name: math.nan)
    where = non_finite(output)
    if where:
        problems.append(f"solve --json wrote a number that is not finite at {where}")
        return problems
    try:
        model = load_case(case_path)
    except Exception as error:
        return [*problems, f"solve accepted the case, load_case refused it: {error}"[:400]]
    broken = equilibrium_problem(model, output)
    if broken:
        problems.append(f"equilibrium: {broken}")
    return problems


def non_finite(document: Any) -> str | None:
    """The place of the first number of a JSON document that is not finite, or ``None``."""
    for place in places(document):
        value = get_at(document, place)
        if isinstance(value, float) and not math.isfinite(value):
            return str(place)
    return None


def _rotation_limits(document: dict[str, Any]) -> list[dict[str, Any]]:
    design = document.get("design")
    limits = design.get("rotation_limits") if isinstance(design, dict) else None
    return (
        [limit for limit in limits if isinstance(limit, dict)] if isinstance(limits, list) else []
    )


def _numbers(*values: Any) -> bool:
    return all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values)


def judge_case(data: bytes, folder: Path, *, tally: bool = True) -> tuple[list[str], list[Run]]:
    """Every way the commands' outcomes on the case file ``data`` break the contract.

    Parameters
    ----------
    data
        The case file's bytes.
    folder
        An empty folder for the file and the sized case.
    tally
        Whether the runs count in the fuzz figures.
    """
    case = folder / "case.json"
    case.write_bytes(data)
    sized = folder / "sized.json"
    sized.unlink(missing_ok=True)
    runs = {
        "solve": run("solve", ["solve", str(case)], tally=tally),
        "solve --json": run("solve --json", ["solve", str(case), "--json"], tally=tally),
        "check": run("check", ["check", str(case)], tally=tally),
        "size": run("size", ["size", str(case), "-o", str(sized)], tally=tally),
        "modes": run("modes", ["modes", str(case)], tally=tally),
    }
    document = _decoded(data)
    problems = _run_problems(list(runs.values()), document, str(case))
    solved = runs["solve --json"]
    if solved.status == 0 and not problems:
        problems += _accepted_problems(solved, document, str(case))
    if runs["solve"].status != solved.status:
        problems.append(f"solve exit {runs['solve'].status}, solve --json exit {solved.status}")
    if solved.status == 2:
        for name in ("check", "size"):
            if runs[name].status in (0, 1):
                problems.append(
                    f"solve refused the case ({solved.stderr.strip()[:120]}), {name} did not"
                )
        layout = solved.stderr.startswith("supports[")  # one support named: two at a point
        if layout and runs["modes"].status in (0, 1):
            problems.append(
                f"solve refused the supports ({solved.stderr.strip()[:120]}), modes did not"
            )
    if runs["size"].status in (0, 1) and sized.exists():
        again = run("solve (sized)", ["solve", str(sized), "--json"], tally=tally)
        if again.status != 0:
            problems.append(
                f"the sized case does not solve: exit {again.status} {again.stderr[:200]!r}"
            )
    left = [p.name for p in folder.iterdir() if p.name not in ("case.json", "sized.json")]
    if left:
        problems.append(f"files left beside the case: {left}")
    return problems, list(runs.values())
