"""The independent check (force method, workbench.design.independent) against the solver.

Both are exact methods for these systems (piecewise-polynomial internal torque, exact or
quadrature-converged flexibility integrals), so they must agree to round-off: a relative 1e-9
of the largest torque of each result (AGREEMENT_TOLERANCE).
"""

from __future__ import annotations

import collections
import copy
import doctest
import importlib
import inspect
import itertools
import json
import math
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st
from scipy import integrate

from tests.validation import (
    test_closed_forms,
    test_fatigue,
    test_keyway_allowance,
    test_worked_examples,
)
from workbench.case.declaration.keys import POSITION_TOLERANCE
from workbench.case.errors import InputError, MechanismError
from workbench.case.load import case_file_from_document
from workbench.design.independent import (
    AGREEMENT_TOLERANCE,
    NotCovered,
    compare,
    independent_check,
)
from workbench.design.independent.forcemethod import solve_by_force_method
from workbench.design.independent.pieces import cut_pieces, flexibility_moments
from workbench.design.independent.reading import read_system
from workbench.design.independent.sections import rectangle_beta
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case

DEMO = Path(__file__).parents[1] / "workbench" / "cases" / "press_drive.json"
#: The validation modules whose tests solve static cases (tests/validation/test_modes.py holds
#: vibration examples without static loads: the check says "not covered: a case without load
#: cases" there, tested below, and running its eigen-solutions again here costs a minute).
VALIDATION_MODULES = (
    test_closed_forms,
    test_fatigue,
    test_keyway_allowance,
    test_worked_examples,
)


def agreement(document: dict[str, Any]) -> float:
    """Largest relative difference between the force method and the solver on a case."""
    solution = independent_check(case_file_from_document(copy.deepcopy(document)))
    results = solve(parse_case(copy.deepcopy(document)))
    stations = [
        [(result.shafts[shaft].x, result.shafts[shaft].torque) for shaft in results.shaft_ids]
        for result in results
    ]
    comparison = compare(solution, results.reactions, stations)
    assert len(comparison.rows) == len(results.names) * (
        results.reactions.shape[1] + len(results.shaft_ids)
    )
    return comparison.worst


def test_demo_two_geared_shafts_agree() -> None:
    document = json.loads(DEMO.read_text("utf-8"))
    assert agreement(document) <= AGREEMENT_TOLERANCE
    solution = independent_check(case_file_from_document(document))
    # One shaft on a fixed and a spring support, one hung from the mesh: one redundant.
    assert solution.released == (("support", 1),)
    # The exact largest |T| per shaft: here at piece ends, so the solver's stations hold it.
    results = solve(parse_case(document))
    largest, where = solution.governing()
    for number, result in enumerate(results):
        for shaft, name in enumerate(results.shaft_ids):
            values = result.shafts[name]
            peak = float(np.max(np.abs(values.torque)))
            assert largest[number, shaft] == pytest.approx(peak, rel=1e-12, abs=1e-9)
            at = values.x[np.argmax(np.abs(values.torque))]
            assert abs(where[number, shaft] - at) <= 1e-12 or peak == 0.0


def _calls(function: Callable[..., Any]) -> list[dict[str, Any]]:
    """Every argument set a test function runs with (its parametrize marks, crossed)."""
    marks = [m for m in getattr(function, "pytestmark", []) if m.name == "parametrize"]
    if not marks:
        return [{}]
    choices = []
    for mark in marks:
        names = (
            [n.strip() for n in mark.args[0].split(",")]
            if isinstance(mark.args[0], str)
            else list(mark.args[0])
        )
        rows = [row if len(names) > 1 else (row,) for row in mark.args[1]]
        choices.append([dict(zip(names, getattr(r, "values", r), strict=True)) for r in rows])
    return [dict(collections.ChainMap(*combo)) for combo in itertools.product(*choices)]


def validation_cases() -> list[tuple[str, dict[str, Any]]]:
    """Every case document a test in tests/validation/ solves, caught at parse_case."""
    caught: list[tuple[str, dict[str, Any]]] = []
    for module in VALIDATION_MODULES:
        original = module.parse_case
        for name, function in inspect.getmembers(module, inspect.isfunction):
            if not name.startswith("test_") or function.__module__ != module.__name__:
                continue
            if {"tmp_path", "monkeypatch", "capsys"} & set(inspect.signature(function).parameters):
                continue

            def catch(
                document: Any,
                *args: Any,
                _name: str = f"{module.__name__}.{name}",
                _original: Callable[..., Any] = original,
                **kwargs: Any,
            ) -> Any:
                kept = copy.deepcopy(document)
                model = _original(document, *args, **kwargs)  # bad input raises: not kept
                if isinstance(kept, dict):
                    caught.append((_name, kept))
                return model

            module.parse_case = catch
            try:
                for arguments in _calls(function):
                    function(**arguments)
            finally:
                module.parse_case = original
    return caught


VALIDATION_CASES = validation_cases()


def test_validation_cases_were_found() -> None:
    # The worked examples alone hold six systems (Hibbeler, Beer & Johnston, Philpot twice, the
    # gear pair, the three-shaft system); the closed forms add tapered, layered and loaded bars.
    assert len(VALIDATION_CASES) >= 25
    names = {name for name, _ in VALIDATION_CASES}
    assert any("large_geared_system" in name for name in names)
    assert any("gear_pair" in name for name in names)


@pytest.mark.parametrize(
    "document", [case for _, case in VALIDATION_CASES], ids=[n for n, _ in VALIDATION_CASES]
)
def test_every_validation_case_agrees_or_is_named_not_covered(document: dict[str, Any]) -> None:
    if not document.get("load_cases") or not document.get("supports"):
        # Vibration cases: nothing to solve statically, and the check says so.
        with pytest.raises(NotCovered, match=r"without (load cases|supports)"):
            independent_check(case_file_from_document(document))
        return
    try:
        solve(parse_case(copy.deepcopy(document)))
    except MechanismError:
        # A shaft free to spin (a vibration case): the solver refuses, the check names it.
        with pytest.raises(NotCovered, match="free to spin"):
            independent_check(case_file_from_document(document))
        return
    assert agreement(document) <= AGREEMENT_TOLERANCE


def test_textbook_two_material_shaft_fixed_at_both_ends() -> None:
    # T. A. Philpot, MecMovies companion to *Mechanics of Materials: An Integrated Learning
    # System*, example M6.20 (statically indeterminate coaxial shaft; edition not printed on the
    # example): hollow steel shaft (1), G = 75 GPa, D = 50 mm, d = 40 mm, L = 1500 mm, joined at
    # flange B to solid brass shaft (2), G = 40 GPa, d = 50 mm, L = 1000 mm, fixed at A and C,
    # T = 1000 N·m at B. Printed: T1 = 424.63 N·m, T2 = −575.37 N·m, τ1 = 29.30 MPa,
    # τ2 = 23.44 MPa.
    document = {
        "units": {"length": "mm", "torque": "N*m", "stress": "GPa"},
        "materials": {"steel": {"shear_modulus": 75}, "brass": {"shear_modulus": 40}},
        "shafts": [
            {
                "id": "ABC",
                "segments": [
                    {
                        "length": 1500,
                        "material": "steel",
                        "section": {"shape": "tube", "outer_diameter": 50, "inner_diameter": 40},
                    },
                    {
                        "length": 1000,
                        "material": "brass",
                        "section": {"shape": "solid", "diameter": 50},
                    },
                ],
            }
        ],
        "supports": [{"shaft": "ABC", "x": 0}, {"shaft": "ABC", "x": 2500}],
        "load_cases": [{"name": "T", "torques": [{"shaft": "ABC", "x": 1500, "torque": 1000}]}],
    }
    solution = independent_check(case_file_from_document(document))
    t1 = float(solution.torque_at(0, [750.0e-3])[0, 0])
    t2 = float(solution.torque_at(0, [2000.0e-3])[0, 0])
    assert t1 == pytest.approx(424.63, abs=0.005)
    assert t2 == pytest.approx(-575.37, abs=0.005)
    # τ = T·c/J with J afresh: 362,265 mm⁴ and 613,592 mm⁴ as the example prints.
    assert t1 * 25e-3 / 362_265e-12 / 1e6 == pytest.approx(29.30, abs=0.005)
    assert abs(t2) * 25e-3 / 613_592e-12 / 1e6 == pytest.approx(23.44, abs=0.005)
    assert solution.reactions[0] == pytest.approx([-424.63, -575.37], abs=0.005)
    assert agreement(document) <= AGREEMENT_TOLERANCE


def test_a_case_without_load_cases_is_named() -> None:
    document = json.loads(DEMO.read_text("utf-8"))
    del document["load_cases"], document["combinations"], document["design"]
    with pytest.raises(NotCovered, match="a case without load cases"):
        independent_check(case_file_from_document(document))


def test_a_shaft_held_by_nothing_is_named() -> None:
    document = json.loads(DEMO.read_text("utf-8"))
    document["gears"] = []
    with pytest.raises(NotCovered, match="'feeder' is held by no support or mesh"):
        independent_check(case_file_from_document(document))


def test_the_check_imports_no_solver_module() -> None:
    code = (
        "import sys, workbench.design.independent as i; "
        "print(sorted(m for m in sys.modules if m.startswith('workbench.solver')))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


# --- generated systems: geared, layered, spring-supported ------------------------------------

SECTIONS = st.one_of(
    st.builds(lambda d: {"shape": "solid", "diameter": d}, st.floats(20, 80)),
    st.builds(
        lambda d, f: {"shape": "tube", "outer_diameter": d, "inner_diameter": d * f},
        st.floats(30, 90),
        st.floats(0.3, 0.85),
    ),
    st.builds(
        lambda a, b, f: {
            "shape": "tapered",
            "diameter_start": a,
            "diameter_end": b,
            "bore": f * min(a, b),
        },
        st.floats(20, 90),
        st.floats(20, 90),
        st.sampled_from([0.0, 0.3, 0.6]),
    ),
    st.builds(
        lambda w, h: {"shape": "rectangle", "width": w, "height": h},
        st.floats(20, 60),
        st.floats(20, 60),
    ),
    st.builds(
        # t = 0.03·min(w, h): inside the thin-wall limit t·P/(2·A_m) ≤ 0.1.
        lambda w, h: {
            "shape": "elliptical_tube",
            "width": w,
            "height": h,
            "thickness": 0.03 * min(w, h),
        },
        st.floats(40, 80),
        st.floats(40, 80),
    ),
    st.builds(
        # A rectangular cell given by its walls: A_m = a·b, t = 0.03·min(a, b).
        lambda a, b: {
            "shape": "thin_closed",
            "enclosed_area": a * b,
            "walls": [{"length": side, "thickness": 0.03 * min(a, b)} for side in (a, b, a, b)],
        },
        st.floats(30, 70),
        st.floats(30, 70),
    ),
    st.builds(
        # Slender walls, b/t ≥ 10: inside the open-section limit.
        lambda walls: {
            "shape": "thin_open",
            "walls": [{"length": b, "thickness": t} for b, t in walls],
        },
        st.lists(st.tuples(st.floats(40, 80), st.floats(2, 4)), min_size=1, max_size=3),
    ),
    st.builds(
        # t = 0.035·min(w, h): inside the thin-wall limit t·P/(2·A_m) ≤ 0.1.
        lambda w, h: {"shape": "box", "width": w, "height": h, "thickness": 0.035 * min(w, h)},
        st.floats(40, 80),
        st.floats(40, 80),
    ),
)


#: Load magnitudes: zero, or 0.1 to 3 either way (a torque of 1e-253 N·m next to a pre-twist
#: would compare the solver's round-off with an exact zero).
MAGNITUDES = st.one_of(st.just(0.0), st.floats(0.1, 3.0), st.floats(-3.0, -0.1))


@st.composite
def segments(draw: st.DrawFn) -> dict[str, Any]:
    length = draw(st.floats(50, 600))
    if draw(st.booleans()):
        outer = draw(st.floats(50, 90))
        core = draw(st.floats(0.3, 0.8)) * outer
        return {
            "length": length,
            "layers": [
                {
                    "material": "steel",
                    "section": {"shape": "tube", "outer_diameter": outer, "inner_diameter": core},
                },
                {
                    "material": draw(st.sampled_from(["bronze", "steel"])),
                    "section": {"shape": "solid", "diameter": core},
                },
            ],
        }
    return {
        "length": length,
        "material": draw(st.sampled_from(["steel", "bronze"])),
        "section": draw(SECTIONS),
    }


@st.composite
def systems(draw: st.DrawFn) -> dict[str, Any]:
    count = draw(st.integers(1, 3))
    shafts = [
        {"id": f"s{n}", "segments": draw(st.lists(segments(), min_size=1, max_size=4))}
        for n in range(count)
    ]
    lengths = [sum(s["length"] for s in shaft["segments"]) for shaft in shafts]

    def spot(shaft: int) -> float:
        return draw(st.sampled_from([0.0, 0.25, 0.5, 0.8, 1.0])) * lengths[shaft]

    def support(shaft: int) -> dict[str, Any]:
        entry: dict[str, Any] = {"shaft": f"s{shaft}", "x": spot(shaft)}
        if draw(st.booleans()):
            entry |= {"kind": "spring", "stiffness": draw(st.floats(1e3, 1e6))}
        if draw(st.booleans()):  # a pre-twist of 0.1° to 2° either way (deg)
            entry["rotation"] = draw(st.sampled_from([-1.0, 1.0])) * draw(st.floats(0.1, 2.0))
        return entry

    supports = [support(0)]
    gears = []
    for shaft in range(1, count):  # each further shaft meshes with an earlier one
        other = draw(st.integers(0, shaft - 1))
        gears.append(
            {
                "a": {"shaft": f"s{other}", "x": spot(other), "radius": draw(st.floats(40, 150))},
                "b": {"shaft": f"s{shaft}", "x": spot(shaft), "radius": draw(st.floats(40, 150))},
                "mesh": draw(st.sampled_from(["external", "internal"])),
            }
        )
    for _ in range(draw(st.integers(0, 3))):  # redundant supports
        supports.append(support(draw(st.integers(0, count - 1))))
    positions = {(s["shaft"], s["x"]) for s in supports}
    if len(positions) < len(supports):  # two supports at one point: the solver refuses it
        supports = list({(s["shaft"], s["x"]): s for s in supports}.values())

    def load_case(name: str) -> dict[str, Any]:
        torques = [
            {"shaft": f"s{n}", "x": spot(n), "torque": draw(MAGNITUDES) * 1000.0}
            for n in draw(st.lists(st.integers(0, count - 1), max_size=3))
        ]
        spreads = []
        for n in draw(st.lists(st.integers(0, count - 1), max_size=2)):
            start = draw(st.floats(0.0, 0.5)) * lengths[n]
            spreads.append(
                {
                    "shaft": f"s{n}",
                    "start": start,
                    "end": start + draw(st.floats(0.2, 0.5)) * lengths[n],
                    "intensity_start": draw(MAGNITUDES),
                    "intensity_end": draw(MAGNITUDES),
                }
            )
        return {"name": name, "torques": torques, "distributed": spreads}

    return {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": {"shear_modulus": 79.3e3}, "bronze": {"shear_modulus": 41.4e3}},
        "shafts": shafts,
        "supports": supports,
        "gears": gears,
        "load_cases": [load_case("one"), load_case("two")],
        "combinations": [{"name": "both", "factors": {"one": 1.35, "two": -0.8}}],
    }


def out_of_balance(document: dict[str, Any]) -> float:
    """Largest |Σ torques on a shaft| of the force method's answer over its largest torque.

    Statics alone (design §2: Σ reactions + Σ mesh torques + Σ applied = 0 on every shaft), a
    check that needs no second solver.
    """
    system = read_system(case_file_from_document(copy.deepcopy(document)))
    solution = solve_by_force_method(system)
    shafts, cases = len(system.shaft_ids), len(system.case_names)
    applied = np.zeros((shafts, cases))
    np.add.at(applied, (system.point_shaft, system.point_case), system.point_torque)
    resultant = 0.5 * (system.spread_q_start + system.spread_q_end)
    resultant *= system.spread_end - system.spread_start
    np.add.at(applied, (system.spread_shaft, system.spread_case), resultant)
    total = applied.T.copy()
    np.add.at(total.T, system.support_shaft, solution.reactions[:cases].T)
    for side in (0, 1):
        np.add.at(total.T, system.gear_shaft[:, side], solution.gear_torques[:cases, :, side].T)
    scale = max(float(np.max(np.abs(solution.reactions), initial=0.0)), 1e-300)
    return float(np.max(np.abs(total))) / scale


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(systems())
@example(
    document={
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"},
        "materials": {"steel": {"shear_modulus": 79300.0}, "bronze": {"shear_modulus": 41400.0}},
        "shafts": [
            {
                "id": "s0",
                "segments": [
                    {
                        "length": 50.0,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": 20.0},
                    },
                    {
                        "length": 50.0,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": 20.0},
                    },
                ],
            },
            {
                "id": "s1",
                "segments": [
                    {
                        "length": 50.0,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": 20.0},
                    }
                ],
            },
            {
                "id": "s2",
                "segments": [
                    {
                        "length": 50.0,
                        "material": "steel",
                        "section": {"shape": "solid", "diameter": 20.0},
                    }
                ],
            },
        ],
        "supports": [{"shaft": "s0", "x": 25.0}],
        "gears": [
            {
                "a": {"shaft": "s0", "x": 0.0, "radius": 40.0},
                "b": {"shaft": "s1", "x": 0.0, "radius": 40.0},
                "mesh": "external",
            },
            {
                "a": {"shaft": "s0", "x": 0.0, "radius": 93.0},
                "b": {"shaft": "s2", "x": 0.0, "radius": 44.0},
                "mesh": "external",
            },
        ],
        "load_cases": [
            {
                "name": "one",
                "torques": [],
                "distributed": [
                    {
                        "shaft": "s2",
                        "start": 2.9802322387695312e-06,
                        "end": 25.00000298023224,
                        "intensity_start": 0.0,
                        "intensity_end": 0.109375,
                    }
                ],
            },
            {"name": "two", "torques": [], "distributed": []},
        ],
        "combinations": [{"name": "both", "factors": {"one": 1.35, "two": -0.8}}],
    },
).via("a load 3e-9 m from a shaft's end: an element 10⁷ times shorter than its neighbours")
def test_generated_geared_layered_spring_systems_agree(document: dict[str, Any]) -> None:
    try:
        solve(parse_case(copy.deepcopy(document)))
    except InputError as error:
        # The solver refuses the system (a rotation held twice, a locked loop of meshes, its
        # own equilibrium or conditioning test): nothing to compare with. The check either
        # refuses it too, naming why, or its answer must at least balance every shaft.
        try:
            balance = out_of_balance(document)
        except NotCovered as reason:
            assert "hold one rotation twice" in str(reason), (reason, error)
            return
        assert balance <= AGREEMENT_TOLERANCE, error
        return
    tolerance = conditioned_tolerance(document)
    assert agreement(document) <= tolerance
    assert out_of_balance(document) <= tolerance


def conditioned_tolerance(document: dict[str, Any]) -> float:
    """The agreement allowed on a case whose key points may nearly coincide.

    A span far shorter than its shaft makes an element that much stiffer than the rest: the
    stiffness matrix's condition number grows like length / span, and so does the round-off of
    any solution of it (Golub & Van Loan, *Matrix Computations*, 4th ed., §2.6.2: relative
    error ≈ κ·ε). A load drawn 3·10⁻⁹ m from a shaft's end agrees to 1.5·10⁻⁹, not 10⁻⁹.
    """
    ratio = 1.0
    for shaft in document["shafts"]:
        name = shaft["id"]
        length = sum(segment["length"] for segment in shaft["segments"])
        points = [0.0, length, *itertools.accumulate(s["length"] for s in shaft["segments"])]
        points += [s["x"] for s in document.get("supports", []) if s["shaft"] == name]
        for gear in document.get("gears", []):
            points += [end["x"] for end in (gear["a"], gear["b"]) if end["shaft"] == name]
        for case in document.get("load_cases", []):
            points += [t["x"] for t in case.get("torques", []) if t["shaft"] == name]
            for load in case.get("distributed", []):
                if load["shaft"] == name:
                    points += [load["start"], load["end"]]
        # Points within the case file's position tolerance (1e-9 m; these documents are in mm)
        # are one point to the solver: no span between them.
        gaps = np.diff(np.unique(points))
        gaps = gaps[gaps > POSITION_TOLERANCE * 1e3]
        if gaps.size:
            ratio = max(ratio, length / gaps.min())
    return max(AGREEMENT_TOLERANCE, 100 * np.finfo(float).eps * ratio)


def test_a_rotation_held_twice_is_named() -> None:
    # Both gears of a mesh sit on fixed supports: the mesh holds what the supports already hold.
    shaft = {
        "segments": [
            {"length": 1.0, "material": "steel", "section": {"shape": "solid", "diameter": 0.02}}
        ]
    }
    document = {
        "materials": {"steel": {"shear_modulus": 79.3e9}},
        "shafts": [{"id": "p", **shaft}, {"id": "q", **shaft}],
        "supports": [{"shaft": "p", "x": 0.0}, {"shaft": "q", "x": 0.0}],
        "gears": [
            {
                "a": {"shaft": "p", "x": 0.0, "radius": 0.04},
                "b": {"shaft": "q", "x": 0.0, "radius": 0.04},
            }
        ],
        "load_cases": [{"name": "one", "torques": [{"shaft": "p", "x": 1.0, "torque": 10.0}]}],
    }
    with pytest.raises(InputError):
        solve(parse_case(copy.deepcopy(document)))
    with pytest.raises(NotCovered, match="hold one rotation twice"):
        independent_check(case_file_from_document(document))


@pytest.mark.parametrize(
    ("start", "end", "bore"), [(100.0, 10.0, 0.0), (10.0, 90.0, 8.0), (60.0, 55.0, 50.0)]
)
def test_tapered_flexibility_moments_against_quad(start: float, end: float, bore: float) -> None:
    # I_k = ∫ ξᵏ dξ/(G·J(ξ)), J = π(D⁴ − b⁴)/32 (Gere & Goodno, 8th ed., §3.4), by scipy's
    # adaptive quad over one tapered segment: the Gauss–Legendre moments must agree.
    document = {
        "materials": {"steel": {"shear_modulus": 79.3e9}},
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {
                        "length": 0.7,
                        "material": "steel",
                        "section": {
                            "shape": "tapered",
                            "diameter_start": start / 1e3,
                            "diameter_end": end / 1e3,
                            "bore": bore / 1e3,
                        },
                    }
                ],
            }
        ],
        "supports": [{"shaft": "s", "x": 0.0}],
        "load_cases": [{"name": "none"}],
    }
    system = read_system(case_file_from_document(document))
    moments = flexibility_moments(system, cut_pieces(system))[0]

    def rigidity(xi: float) -> float:
        diameter = (start + (end - start) * xi / 0.7) / 1e3
        return 79.3e9 * math.pi * (diameter**4 - (bore / 1e3) ** 4) / 32.0

    for k in range(3):
        expected, _ = integrate.quad(
            lambda xi, k=k: xi**k / rigidity(xi), 0.0, 0.7, epsrel=1e-13, epsabs=0.0, limit=200
        )
        assert moments[k] == pytest.approx(expected, rel=1e-11)


@pytest.mark.parametrize(
    ("ratio", "beta"), [(1.0, 0.141), (2.0, 0.229), (4.0, 0.281), (10.0, 0.312)]
)
def test_rectangle_beta_against_the_printed_table(ratio: float, beta: float) -> None:
    # Timoshenko & Goodier, Theory of Elasticity, 3rd ed., ch. 10, table of β for rectangles
    # (three decimals as printed).
    assert rectangle_beta(ratio, 1.0) == pytest.approx(beta, abs=5e-4)


def test_power_and_speed_torques_and_library_materials_agree() -> None:
    # A torque given as power and speed (T = P/ω) in US units, a segment of a library material.
    document = json.loads(DEMO.read_text("utf-8"))
    document["units"] |= {"torque": "lbf*ft", "power": "hp"}
    document["load_cases"][1]["torques"][0] = {
        "shaft": "auger",
        "x": 250,
        "power": 12.0,
        "speed": 40.0,
    }
    document["shafts"][1]["segments"][0]["material"] = "steel-1020-cd"
    del document["design"]
    assert agreement(document) <= AGREEMENT_TOLERANCE


def test_the_docstring_example_runs() -> None:
    module = importlib.import_module("workbench.design.independent.compare")
    assert doctest.testmod(module, raise_on_error=True).attempted > 0


def test_a_system_too_large_for_dense_arrays_is_named() -> None:
    document = json.loads(DEMO.read_text("utf-8"))
    document["shafts"][1]["segments"] *= 2000  # 2,000 pieces on the feeder
    document["load_cases"] = [
        {"name": f"case {n}", "torques": [{"shaft": "auger", "x": 250, "torque": n}]}
        for n in range(2000)
    ]
    del document["combinations"], document["design"], document["discs"]
    with pytest.raises(NotCovered, match="too large"):
        independent_check(case_file_from_document(document))
