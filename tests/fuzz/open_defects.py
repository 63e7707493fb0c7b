"""Failures the fuzzer finds that are known and not fixed yet, each with its smallest examples.

Each entry names the area its fix belongs to. A failure that matches an entry is counted as
"known open" in the fuzz figures instead of failing the run (``WORKBENCH_FUZZ_STRICT=1`` fails on
it too), and every smallest example is a strict ``xfail`` test (test_open_defects.py): when the
fix lands the example passes, the xfail turns red, and the entry (or the example) is deleted
here. Nothing else is let through.
"""

from __future__ import annotations

import copy
import json
import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from tests.fuzz.documents import EXTREME

FIXTURES = Path(__file__).resolve().parents[1] / "fixtures"
STRICT = os.environ.get("WORKBENCH_FUZZ_STRICT") == "1"


def _fixture(name: str) -> dict[str, Any]:
    path = (
        FIXTURES.parents[1] / "workbench" / "cases" / name
        if name == "press_drive.json"
        else FIXTURES / "solve" / name
    )
    return json.loads(path.read_text(encoding="utf-8"))


def _changed(name: str, change: Callable[[dict[str, Any]], Any]) -> bytes:
    document = copy.deepcopy(_fixture(name))
    change(document)
    return json.dumps(document).encode()


def _segment(document: dict[str, Any], number: int) -> dict[str, Any]:
    segment: dict[str, Any] = document["shafts"][0]["segments"][number]
    return segment


#: A message that is itself at fault (too long, two lines, no field): never an open defect of
#: another area, unless it reports a number no longer finite or arrays that no longer fit.
_MESSAGE_FAULTS = ("not exactly one line", "a message of", "an empty message", "names no field")
_NUMERIC_WORDS = ("JSON cannot hold it", "has shape")


def _numeric_extreme(problem: str, mutations: Sequence[str]) -> bool:
    if not any(m.startswith(EXTREME) for m in mutations):
        return False
    if any(fault in problem for fault in _MESSAGE_FAULTS):
        return any(word in problem for word in _NUMERIC_WORDS)
    return True


@dataclass(frozen=True)
class OpenDefect:
    """A known failure: its area, how to tell it, and its smallest examples (case-file bytes).

    ``area`` is the work its fix belongs to (the helper that makes it); ``matches`` tells a
    problem of a fuzzed case (with the mutations that made the case) as one of this defect's.
    """

    name: str
    area: str
    matches: Callable[[str, Sequence[str]], bool]
    examples: dict[str, Callable[[], bytes]]

    @property
    def made_by(self) -> tuple[str, ...]:
        """The mutations the examples stand for (an extreme number for the numeric ones)."""
        return (f"{EXTREME} (example)",) if self.matches is _numeric_extreme else ()


_SPRINGS_ONLY = {
    "units": {"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg"},
    "materials": {"steel": {"shear_modulus": 11.5e6, "yield_strength": 50750}},
    "shafts": [
        {
            "id": "s1",
            "segments": [
                {"length": 39.37, "material": "steel", "section": {"shape": "rectangle", "width": 6.914, "height": 13.07}},
                {"length": 24.94, "material": "steel", "section": {"shape": "tube", "outer_diameter": 5.612, "inner_diameter": 2.384}},
                {"length": 16.7, "material": "steel", "section": {"shape": "tube", "outer_diameter": 1.938, "inner_diameter": 1.607}},
            ],
        }
    ],
    "supports": [
        {"shaft": "s1", "x": 81.01, "kind": "spring", "stiffness": 69480.0},
        {"shaft": "s1", "x": 20.25, "kind": "spring", "stiffness": 88510000.0},
    ],
    "load_cases": [{"name": "case 0", "torques": [{"shaft": "s1", "x": 8.571e-07, "torque": 42490.0}]}],
}  # fmt: skip


#: A shaft on one spring beside a shaft with a fixed support (lengths in m): its spring reaction
#: missed its own load by 4.6e-8 of it, passed against 1e-9 of the other shaft's 2862 N·m.
ONE_SPRING_BESIDE = {
    "units": {"torque": "N*m", "stress": "MPa", "angle": "deg"},
    "materials": {"steel": {"shear_modulus": 79300.0}},
    "shafts": [
        {"id": "s0", "segments": [{"length": 770.8, "material": "steel", "section": {"shape": "rectangle", "width": 29.51, "height": 44.26}}]},
        {"id": "s2", "segments": [{"length": 651.6, "material": "steel", "section": {"shape": "solid", "diameter": 80.03}}]},
    ],
    "supports": [{"shaft": "s0", "x": 192.7, "kind": "spring", "stiffness": 1e7}, {"shaft": "s2", "x": 162.9}],
    "load_cases": [
        {
            "name": "case 1",
            "torques": [{"shaft": "s2", "x": 651.6, "torque": -2862.0}],
            "distributed": [{"shaft": "s0", "start": 0.04705, "end": 371.1, "intensity_start": 0.000292, "intensity_end": 0}],
        }
    ],
}  # fmt: skip


def _soft_springs(stiffness: float) -> bytes:
    """One steel shaft on two springs, 100 N·m in the middle (issue 11, defect 1)."""
    section = {"shape": "solid", "diameter": 0.05}
    document = {
        "shafts": [{"id": "s", "segments": [{"length": 1, "material": "steel-1020-cd", "section": section}]}],
        "supports": [
            {"shaft": "s", "x": 0, "kind": "spring", "stiffness": stiffness},
            {"shaft": "s", "x": 1, "kind": "spring", "stiffness": stiffness},
        ],
        "load_cases": [{"name": "drive", "torques": [{"shaft": "s", "x": 0.5, "torque": 100}]}],
    }  # fmt: skip
    return json.dumps(document).encode()


#: Defects the fuzzer found, all fixed since: their smallest examples are regression tests
#: (test_open_defects.py) that must give only allowed outcomes.
FOUND_DEFECTS: tuple[OpenDefect, ...] = (
    OpenDefect(
        "numbers at the ends of the range of floats overflow, underflow or divide by zero",
        "finite",
        _numeric_extreme,
        {
            "diameter 1e-320: RuntimeWarning": lambda: _changed(
                "line_shaft.json", lambda d: _segment(d, 0)["section"].update(diameter=1e-320)
            ),
            "tapered diameter_end 1e-320: ValueError (exit 3)": lambda: _changed(
                "line_shaft.json", lambda d: _segment(d, 2)["section"].update(diameter_end=1e-320)
            ),
            "thin wall thickness 1e-320: ZeroDivisionError (exit 3)": lambda: _changed(
                "every_shape.json",
                lambda d: _segment(d, 8)["section"]["walls"][2].update(thickness=1e-320),
            ),
            "rectangle height 1e-300: ZeroDivisionError (exit 3)": lambda: _changed(
                "every_shape.json", lambda d: _segment(d, 5)["section"].update(height=1e-300)
            ),
            "segment length 1e30: check's arrays do not fit": lambda: _changed(
                "line_shaft.json", lambda d: _segment(d, 0).update(length=1e30)
            ),
            "torque 1.7e308: solve prints inf, --json refuses, check warns": lambda: _changed(
                "line_shaft.json", lambda d: d["load_cases"][0]["torques"][0].update(torque=1.7e308)
            ),
            "combination factor 1e308: solve prints inf, --json refuses": lambda: _changed(
                "line_shaft.json", lambda d: d["combinations"][0]["factors"].update(service=1e308)
            ),
            "support rotation 7.2e154 deg: fatigue criteria overflow": lambda: _changed(
                "press_drive.json", lambda d: d["supports"][1].update(rotation=7.2e154)
            ),
            "rotation limit 7.5e-13 deg: size overflows growing the sections": lambda: _changed(
                "press_drive.json",
                lambda d: d["design"]["rotation_limits"][0].update(limit=7.5e-13),
            ),
        },
    ),
    OpenDefect(
        "accepted results out of equilibrium by more than 1e-9·Σ|T|",
        "mechanism",
        lambda problem, mutations: problem.startswith("equilibrium:"),
        {
            "two springs of 1e-9 N·m/rad: 0.2 % out, check passes": lambda: _soft_springs(1e-9),
            "a valid shaft on two springs only: 1.003e-9·Σ|T| out": lambda: json.dumps(
                _SPRINGS_ONLY
            ).encode(),
            "a shaft on one spring beside a loaded shaft: 2.3e-8·Σ|T| out": lambda: json.dumps(
                ONE_SPRING_BESIDE
            ).encode(),
        },
    ),
    OpenDefect(
        "modes accepts two fixed supports at one point, which solve refuses",
        "modesrules",
        lambda problem, mutations: "modes did not" in problem and "same point" in problem,
        {
            "press drive, support 0 twice": lambda: _changed(
                "press_drive.json", lambda d: d["supports"].insert(1, dict(d["supports"][0]))
            ),
        },
    ),
    OpenDefect(
        "a rotation limit whose start lies after its end is accepted",
        "modesrules",
        lambda problem, mutations: problem.startswith("accepted rotation_limits"),
        {
            "start 600 mm, end 100 mm": lambda: _changed(
                "line_shaft.json",
                lambda d: d["design"].update(
                    rotation_limits=[{"shaft": "main", "start": 600, "end": 100, "limit": 1}]
                ),
            ),
        },
    ),
)


#: Defects found and not fixed yet (none today); each example is a strict ``xfail``.
OPEN_DEFECTS: tuple[OpenDefect, ...] = ()


def known_open(problem: str, mutations: Sequence[str]) -> OpenDefect | None:
    """The open defect ``problem`` is an instance of, or ``None`` (always ``None`` when strict)."""
    if STRICT:
        return None
    return next((d for d in OPEN_DEFECTS if d.matches(problem, mutations)), None)
