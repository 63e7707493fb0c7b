"""Properties every solution must have, on random shafts (hypothesis).

Each property is a law of linear-elastic torsion, checked against a reference built here:

* equilibrium of each shaft: Σ reactions + Σ applied (+ Σ gear torques) = 0 (design §2);
* a fixed support holds its prescribed rotation; a spring exerts −k(θ − rotation) (design §2);
* superposition of load cases and factored combinations (linearity);
* splitting a segment into two equal halves changes nothing (exact elements, design §3);
* the same case written in other units gives the same SI results (units only at the edges);
* compatibility: θ(x₂) − θ(x₁) = ∫T/(G·J) dx with T(x) from statics and J(x) = π(d⁴ − d_i⁴)/32
  evaluated here, integrated by ``scipy.integrate.quad`` (Gere & Goodno, *Mechanics of
  Materials*, 8th ed., §3.3-3.4);
* an external gear mesh keeps r_a·θ_a = −r_b·θ_b and does no work (T_a·θ_a + T_b·θ_b = 0).
"""

from __future__ import annotations

import copy
import itertools
import math
from typing import Any, Literal

import numpy as np
from hypothesis import HealthCheck, assume, example, given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from workbench.solver.analysis import Results, ShaftResult, solve
from workbench.solver.io import parse_case

SETTINGS = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])

#: Relative tolerance of the laws (rounding only: the solver's elements are exact).
TOLERANCE = 1e-9
GRID = 20  # supports sit on a grid of L/GRID, loads on L/(2·GRID): distinct points stay distinct


# --- random cases (SI) -------------------------------------------------------------------------


def _log_uniform(low: float, high: float) -> st.SearchStrategy[float]:
    return st.floats(math.log10(low), math.log10(high)).map(lambda e: 10.0**e)


@st.composite
def sections(draw: st.DrawFn) -> dict[str, Any]:
    shape = draw(st.sampled_from(["solid", "tube", "tapered"]))
    diameter = st.floats(0.010, 0.100)
    if shape == "solid":
        return {"shape": "solid", "diameter": draw(diameter)}
    if shape == "tube":
        outer = draw(diameter)
        return {
            "shape": "tube",
            "outer_diameter": outer,
            "inner_diameter": outer * draw(st.floats(0.1, 0.95)),
        }
    start, end = draw(diameter), draw(diameter)
    section = {"shape": "tapered", "diameter_start": start, "diameter_end": end}
    if draw(st.booleans()):
        section["bore"] = min(start, end) * draw(st.floats(0.1, 0.9))
    return section


@st.composite
def shafts(draw: st.DrawFn, shaft_id: str, materials: dict[str, Any]) -> dict[str, Any]:
    segments = []
    for _ in range(draw(st.integers(1, 8))):
        material = f"m{len(materials)}"
        materials[material] = {"shear_modulus": draw(st.floats(20e9, 120e9))}
        segments.append(
            {
                "length": draw(st.floats(0.05, 1.0)),
                "material": material,
                "section": draw(sections()),
            }
        )
    return {"id": shaft_id, "segments": segments}


def shaft_length(shaft: dict[str, Any]) -> float:
    return float(sum(segment["length"] for segment in shaft["segments"]))


@st.composite
def supports(
    draw: st.DrawFn, shaft: dict[str, Any], rotations: bool, min_size: int = 1
) -> list[dict[str, Any]]:
    length = shaft_length(shaft)
    places = draw(st.lists(st.integers(0, GRID), min_size=min_size, max_size=3, unique=True))
    out = []
    for place in places:
        support: dict[str, Any] = {"shaft": shaft["id"], "x": length * place / GRID}
        if draw(st.booleans()):
            support["kind"] = "fixed"
        else:
            support["kind"] = "spring"
            support["stiffness"] = draw(_log_uniform(1e2, 1e7))
        if rotations:
            support["rotation"] = draw(st.floats(-0.02, 0.02))
        out.append(support)
    return out


@st.composite
def loads(draw: st.DrawFn, shaft: dict[str, Any], max_points: int = 4) -> dict[str, Any]:
    length = shaft_length(shaft)
    torques = [
        {
            "shaft": shaft["id"],
            "x": length * place / (2 * GRID),
            "torque": draw(st.floats(-1000.0, 1000.0)),
        }
        for place in draw(st.lists(st.integers(0, 2 * GRID), max_size=max_points))
    ]
    distributed = []
    for _ in range(draw(st.integers(0, 2))):
        first, second = draw(
            st.lists(st.integers(0, 2 * GRID), min_size=2, max_size=2, unique=True)
        )
        start, end = sorted((first, second))
        distributed.append(
            {
                "shaft": shaft["id"],
                "start": length * start / (2 * GRID),
                "end": length * end / (2 * GRID),
                "intensity_start": draw(st.floats(-2000.0, 2000.0)),
                "intensity_end": draw(st.floats(-2000.0, 2000.0)),
            }
        )
    return {"torques": torques, "distributed": distributed}


@st.composite
def single_shaft_cases(draw: st.DrawFn, rotations: bool = True, n_cases: int = 1) -> dict:
    materials: dict[str, Any] = {}
    shaft = draw(shafts("s", materials))
    return {
        "materials": materials,
        "shafts": [shaft],
        "supports": draw(supports(shaft, rotations)),
        "load_cases": [{"name": f"case{i}", **draw(loads(shaft))} for i in range(n_cases)],
    }


# --- independent references --------------------------------------------------------------------


def applied_total(case: dict[str, Any], shaft_id: str, name: str | None = None) -> tuple:
    """(Σ applied, Σ|applied|) on one shaft: point torques and distributed resultants."""
    total, magnitude = 0.0, 0.0
    for load_case in case["load_cases"]:
        if name is not None and load_case["name"] != name:
            continue
        for torque in load_case.get("torques", []):
            if torque["shaft"] == shaft_id:
                total += torque["torque"]
                magnitude += abs(torque["torque"])
        for load in load_case.get("distributed", []):
            if load["shaft"] == shaft_id:
                span = load["end"] - load["start"]
                total += 0.5 * (load["intensity_start"] + load["intensity_end"]) * span
                magnitude += (
                    0.5 * (abs(load["intensity_start"]) + abs(load["intensity_end"])) * span
                )
    return total, magnitude


def _geometry(
    case: dict[str, Any], shaft: dict[str, Any], x: float, side: Literal["left", "right"] = "right"
) -> tuple:
    """(G, outer diameter, bore) at x, from the case dict; x at a segment end belongs to the
    next segment (side "right") or to the one it ends (side "left")."""
    ends = np.cumsum([segment["length"] for segment in shaft["segments"]])
    nudge = 1e-12 * ends[-1] * (1 if side == "right" else -1)  # x may be off by rounding
    number = min(int(np.searchsorted(ends, x + nudge, side=side)), len(ends) - 1)
    segment = shaft["segments"][number]
    fraction = min(max((x - (ends[number] - segment["length"])) / segment["length"], 0.0), 1.0)
    section = segment["section"]
    if section["shape"] == "solid":
        outer, inner = section["diameter"], 0.0
    elif section["shape"] == "tube":
        outer, inner = section["outer_diameter"], section["inner_diameter"]
    else:
        outer = section["diameter_start"] + fraction * (
            section["diameter_end"] - section["diameter_start"]
        )
        inner = section.get("bore", 0.0)
    return case["materials"][segment["material"]]["shear_modulus"], outer, inner


def rigidity_function(case: dict[str, Any], shaft: dict[str, Any]):
    """G·J(x) of a shaft from the case dict: J = π(d(x)⁴ − d_i⁴)/32 (Gere & Goodno §3.3)."""

    def rigidity(x: float) -> float:
        modulus, outer, inner = _geometry(case, shaft, x)
        return modulus * math.pi * (outer**4 - inner**4) / 32.0

    ends = np.cumsum([segment["length"] for segment in shaft["segments"]])
    return rigidity, [0.0, *ends.tolist()]


def stress_per_torque(case: dict[str, Any], values: ShaftResult) -> np.ndarray:
    """τ_max/|T| = (d(x)/2)/J(x) at every station (Gere & Goodno §3.3); at a doubled station the
    first belongs to the piece on the left."""
    shaft = case["shafts"][0]
    out = np.empty(len(values.x))
    for index, x in enumerate(values.x):
        is_left = index + 1 < len(values.x) and same_point(values.x[index + 1], x, values)
        _, outer, inner = _geometry(case, shaft, x, "left" if is_left else "right")
        out[index] = (outer / 2) / (math.pi * (outer**4 - inner**4) / 32.0)
    return out


def same_point(x1: float, x2: float, values: ShaftResult) -> bool:
    """Whether two stations are the same point of the shaft (to rounding)."""
    return abs(x1 - x2) <= 1e-12 * values.x[-1]


def stations_at(values: ShaftResult, x: float) -> np.ndarray:
    found = np.flatnonzero(np.abs(values.x - x) <= 1e-9 * max(values.x[-1], 1e-300))
    assert len(found) >= 1, f"no station at x = {x}"
    return found


def key_points(case: dict[str, Any], shaft: dict[str, Any]) -> list[float]:
    """Every point the solver must make a node: segment ends, supports, gears, load points."""
    _, points = rigidity_function(case, shaft)
    shaft_id = shaft["id"]
    points += [s["x"] for s in case["supports"] if s["shaft"] == shaft_id]
    for gear in case.get("gears", []):
        points += [gear[end]["x"] for end in ("a", "b") if gear[end]["shaft"] == shaft_id]
    for load_case in case["load_cases"]:
        points += [t["x"] for t in load_case.get("torques", []) if t["shaft"] == shaft_id]
        for load in load_case.get("distributed", []):
            if load["shaft"] == shaft_id:
                points += [load["start"], load["end"]]
    length = shaft_length(shaft)
    unique: list[float] = []
    for x in sorted(points):
        if not unique or x - unique[-1] > 1e-9 * length:
            unique.append(x)
    return unique


def stiffness_scale(case: dict[str, Any]) -> float:
    """The largest element or spring stiffness (N·m/rad), G·J/L with J of the larger end."""
    largest = max((s.get("stiffness", 0.0) for s in case["supports"]), default=0.0)
    for shaft in case["shafts"]:
        for segment in shaft["segments"]:
            section = segment["section"]
            diameter = max(v for k, v in section.items() if k not in {"shape", "bore"})
            modulus = case["materials"][segment["material"]]["shear_modulus"]
            largest = max(largest, modulus * math.pi * diameter**4 / 32 / segment["length"])
    return largest


def torque_scale(case: dict[str, Any], results: Results) -> float:
    """The torque a result is measured against: loads, reactions, internal torques, and the
    torque the stiffest element would carry under a twist of the size of the prescribed
    rotations (rotations of that size are only known to rounding)."""
    loads = max(applied_total(case, shaft["id"])[1] for shaft in case["shafts"])
    found = [
        np.abs(results.reactions).max(initial=0.0),
        np.abs(results.torque).max(initial=0.0),
        np.abs(results.gear_torques).max(initial=0.0),
    ]
    prescribed = max((abs(s.get("rotation", 0.0)) for s in case["supports"]), default=0.0)
    return max(loads, stiffness_scale(case) * prescribed, *found, 1e-300)


def angle_scale(case: dict[str, Any], results: Results) -> float:
    """The rotation a result is measured against: prescribed rotations and solved angles."""
    prescribed = max((abs(s.get("rotation", 0.0)) for s in case["supports"]), default=0.0)
    return max(prescribed, np.abs(results.angle).max(initial=0.0), 1e-300)


def close(actual, expected, scale: float, tolerance: float = TOLERANCE) -> bool:
    actual, expected = np.asarray(actual, dtype=float), np.asarray(expected, dtype=float)
    return bool(np.all(np.abs(actual - expected) <= tolerance * scale))


# --- equilibrium and supports -------------------------------------------------------------------


@SETTINGS
@given(single_shaft_cases())
def test_equilibrium_of_a_shaft_without_gears(case):
    solved = solve(parse_case(case))
    results = solved["case0"]
    applied, _ = applied_total(case, "s")
    total = results.reactions.sum() + applied
    assert abs(total) <= TOLERANCE * torque_scale(case, solved)


@SETTINGS
@given(single_shaft_cases())
def test_fixed_supports_hold_their_rotation_and_springs_follow_hookes_law(case):
    results = solve(parse_case(case))["case0"]
    values = results.shafts["s"]
    for number, support in enumerate(case["supports"]):
        rotation = support.get("rotation", 0.0)
        angles = values.angle[stations_at(values, support["x"])]
        if support["kind"] == "fixed":
            assert np.all(angles == rotation)  # exactly: a constraint, not a solved value
        else:
            expected = -support["stiffness"] * (angles[0] - rotation)
            assert math.isclose(results.reactions[number], expected, rel_tol=1e-12, abs_tol=1e-300)


@SETTINGS
@given(single_shaft_cases())
@example(  # a support inside a varying segment: found by this test
    {
        "materials": {"m0": {"shear_modulus": 20e9}},
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {
                        "length": 0.75,
                        "material": "m0",
                        "section": {
                            "shape": "tapered",
                            "diameter_start": 0.0625,
                            "diameter_end": 0.0625,
                        },
                    }
                ],
            }
        ],
        "supports": [{"shaft": "s", "x": 0.1125, "kind": "fixed", "rotation": 0.0}],
        "load_cases": [{"name": "case0", "torques": [], "distributed": []}],
    }
)
def test_a_jump_is_listed_twice_at_exactly_the_same_x(case):
    # Design §2: "At a jump (point torque) the station x is listed twice: value just left, then
    # just right." Every interior node (segment end, load point, support) is such a point.
    values = solve(parse_case(case))["case0"].shafts["s"]
    shaft = case["shafts"][0]
    length = shaft_length(shaft)
    for x in key_points(case, shaft):
        found = stations_at(values, x)
        if 1e-9 * length < x < length * (1 - 1e-9):
            assert len(found) == 2, x
        else:
            assert len(found) == 1, x
        assert np.all(values.x[found] == values.x[found[0]]), [repr(v) for v in values.x[found]]
    assert np.all(np.diff(values.x) >= 0.0)


# --- superposition ------------------------------------------------------------------------------


@SETTINGS
@given(single_shaft_cases(rotations=False, n_cases=2), st.floats(-3, 3), st.floats(-3, 3))
def test_superposition_of_load_cases_and_combinations(case, factor_a, factor_b):
    first, second = case["load_cases"]
    both = {
        "name": "both",
        "torques": first["torques"] + second["torques"],
        "distributed": first["distributed"] + second["distributed"],
    }
    case["load_cases"].append(both)
    case["combinations"] = [{"name": "combined", "factors": {"case0": factor_a, "case1": factor_b}}]
    results = solve(parse_case(case))
    a, b, ab, combined = (results[name] for name in ("case0", "case1", "both", "combined"))
    scale_torque, scale_angle = torque_scale(case, results), angle_scale(case, results)
    assert close(ab.reactions, a.reactions + b.reactions, scale_torque)
    assert close(ab.shafts["s"].torque, a.shafts["s"].torque + b.shafts["s"].torque, scale_torque)
    assert close(ab.shafts["s"].angle, a.shafts["s"].angle + b.shafts["s"].angle, scale_angle)
    assert close(
        combined.reactions, factor_a * a.reactions + factor_b * b.reactions, scale_torque * 3
    )
    assert close(
        combined.shafts["s"].angle,
        factor_a * a.shafts["s"].angle + factor_b * b.shafts["s"].angle,
        scale_angle * 3,
    )
    factors = stress_per_torque(case, combined.shafts["s"])
    assert close(
        combined.shafts["s"].shear_stress,
        np.abs(combined.shafts["s"].torque) * factors,
        scale_torque * factors.max(),
        tolerance=1e-12,
    )

    # Separate models, each with its own mesh: the reactions still add up.
    only = [copy.deepcopy(case) for _ in range(3)]
    for model_case, load_case in zip(only, (first, second, both), strict=True):
        model_case["load_cases"] = [{**load_case, "name": "only"}]
        model_case.pop("combinations")
    separate = [solve(parse_case(model_case))["only"] for model_case in only]
    assert close(separate[2].reactions, separate[0].reactions + separate[1].reactions, scale_torque)


# --- refining the segments ---------------------------------------------------------------------


def _halves(segment: dict[str, Any]) -> list[dict[str, Any]]:
    half = segment["length"] / 2
    section = segment["section"]
    if section["shape"] != "tapered":
        return [{**segment, "length": half}, {**segment, "length": half}]
    middle = 0.5 * (section["diameter_start"] + section["diameter_end"])
    return [
        {**segment, "length": half, "section": {**section, "diameter_end": middle}},
        {**segment, "length": half, "section": {**section, "diameter_start": middle}},
    ]


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_splitting_a_segment_in_two_halves_changes_nothing(case, data):
    segments = case["shafts"][0]["segments"]
    number = data.draw(st.integers(0, len(segments) - 1))
    split = copy.deepcopy(case)
    split["shafts"][0]["segments"][number : number + 1] = _halves(segments[number])
    solved = solve(parse_case(case))
    original, refined = solved["case0"], solve(parse_case(split))["case0"]
    scale_torque, scale_angle = torque_scale(case, solved), angle_scale(case, solved)
    scale_stress = scale_torque * stress_per_torque(case, original.shafts["s"]).max()
    assert close(refined.reactions, original.reactions, scale_torque)
    before, after = original.shafts["s"], refined.shafts["s"]
    for x in key_points(case, case["shafts"][0]):
        old, new = stations_at(before, x), stations_at(after, x)
        for pick in (0, -1):  # left and right of the point
            assert close(after.torque[new[pick]], before.torque[old[pick]], scale_torque)
            assert close(after.angle[new[pick]], before.angle[old[pick]], scale_angle)
            assert close(
                after.shear_stress[new[pick]], before.shear_stress[old[pick]], scale_stress
            )


# --- units --------------------------------------------------------------------------------------

#: Exact definitions: 1 in = 0.0254 m; 1 lbf = 0.45359237 kg × 9.80665 m/s² (NIST SP 811, B.8).
INCH = 0.0254
POUND_FORCE = 0.45359237 * 9.80665
#: SI value of one unit of each quantity in the two other systems.
SYSTEMS = {
    "mm": (
        {"length": "mm", "torque": "N*mm", "stress": "MPa", "angle": "deg"},
        {"length": 1e-3, "torque": 1e-3, "stress": 1e6, "angle": math.pi / 180},
    ),
    "us": (
        {"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg"},
        {
            "length": INCH,
            "torque": POUND_FORCE * INCH,
            "stress": POUND_FORCE / INCH**2,
            "angle": math.pi / 180,
        },
    ),
}
KEY_QUANTITY = {
    "length": "length",
    "diameter": "length",
    "outer_diameter": "length",
    "inner_diameter": "length",
    "diameter_start": "length",
    "diameter_end": "length",
    "bore": "length",
    "x": "length",
    "radius": "length",
    "start": "length",
    "end": "length",
    "shear_modulus": "stress",
    "rotation": "angle",
    "torque": "torque",
    "stiffness": "stiffness",
    "intensity_start": "distributed",
    "intensity_end": "distributed",
}


def in_units(value: Any, factors: dict[str, float], key: str = "") -> Any:
    """The SI case dict rewritten in another unit system (numbers divided by the factors)."""
    if isinstance(value, dict):
        return {k: in_units(v, factors, k) for k, v in value.items()}
    if isinstance(value, list):
        return [in_units(v, factors, key) for v in value]
    if isinstance(value, float | int) and not isinstance(value, bool) and key in KEY_QUANTITY:
        quantity = KEY_QUANTITY[key]
        factor = {
            "stiffness": factors["torque"] / factors["angle"],
            "distributed": factors["torque"] / factors["length"],
        }.get(quantity) or factors[quantity]
        return value / factor
    return value


@SETTINGS
@given(single_shaft_cases())
def test_the_same_case_in_other_units_gives_the_same_si_results(case):
    reference = solve(parse_case(case))
    scales = {
        "torque": torque_scale(case, reference),
        "reactions": torque_scale(case, reference),
        "angle": angle_scale(case, reference),
        "shear_stress": torque_scale(case, reference)
        * stress_per_torque(case, reference["case0"].shafts["s"]).max(),
    }
    for units, factors in SYSTEMS.values():
        other = in_units(case, factors)
        other["units"] = units
        results = solve(parse_case(other))
        assert results.mesh.station_x.shape == reference.mesh.station_x.shape
        assert close(
            results.mesh.station_x, reference.mesh.station_x, reference.mesh.station_x.max()
        )
        for name, scale in scales.items():
            assert close(getattr(results, name), getattr(reference, name), scale), name


# --- compatibility ------------------------------------------------------------------------------


def internal_torque_function(case: dict[str, Any], results: Results, shaft_id: str, name: str):
    """T(x) = −(Σ concentrated external torques on [0, x) + ∫₀ˣ t) from statics alone (design §2),
    with the solver's support reactions as the only solved input."""
    concentrated = [
        (support["x"], reaction)
        for support, reaction in zip(case["supports"], results[name].reactions, strict=True)
        if support["shaft"] == shaft_id
    ]
    load_case = next(c for c in case["load_cases"] if c["name"] == name)
    concentrated += [(t["x"], t["torque"]) for t in load_case["torques"] if t["shaft"] == shaft_id]
    distributed = [d for d in load_case["distributed"] if d["shaft"] == shaft_id]

    def running_load(x: float) -> float:
        total = 0.0
        for load in distributed:
            a, b, ta, tb = (
                load["start"],
                load["end"],
                load["intensity_start"],
                load["intensity_end"],
            )
            s = min(max(x, a), b) - a
            total += ta * s + (tb - ta) * s**2 / (2 * (b - a))
        return total

    def torque(x: float, after: float) -> float:
        """T at x, counting the concentrated torques at positions ≤ after."""
        return -(sum(t for position, t in concentrated if position <= after) + running_load(x))

    return torque


@SETTINGS
@given(single_shaft_cases())
def test_compatibility_angle_jumps_equal_the_integral_of_t_over_gj(case):
    results = solve(parse_case(case))
    values = results["case0"].shafts["s"]
    shaft = case["shafts"][0]
    rigidity, _ = rigidity_function(case, shaft)
    torque = internal_torque_function(case, results, "s", "case0")
    points = key_points(case, shaft)
    length = shaft_length(shaft)
    scale_torque = torque_scale(case, results)
    flexibility, _ = quad(lambda x: 1.0 / rigidity(x), 0.0, length, epsrel=1e-6, limit=200)
    scale = max(angle_scale(case, results), scale_torque * flexibility)
    jumps, references = [], []
    for x1, x2 in itertools.pairwise(points):
        after = x1 + 1e-9 * length  # concentrated torques at x1 act on the piece (x1, x2)
        value, _ = quad(
            lambda x, after=after: torque(x, after) / rigidity(x),
            x1,
            x2,
            epsabs=1e-13 * scale,
            epsrel=1e-12,
            limit=200,
        )
        jumps.append(
            values.angle[stations_at(values, x2)[0]] - values.angle[stations_at(values, x1)[-1]]
        )
        references.append(value)
    assert close(jumps, references, scale)
    # The solver's internal torque at every station equals the statics value.
    # A doubled station's first value is the one just left of x; the shaft's last station is
    # the value just left of its end.
    for index, x in enumerate(values.x):
        is_left = index + 1 == len(values.x) or same_point(values.x[index + 1], x, values)
        after = x - 1e-9 * length if is_left else x + 1e-9 * length
        assert close(values.torque[index], torque(x, after), scale_torque)
    # The peak stress at every station is |T|·(d/2)/J of the section there.
    factors = stress_per_torque(case, values)
    assert close(
        values.shear_stress,
        np.abs(values.torque) * factors,
        scale_torque * factors.max(),
        tolerance=1e-12,
    )


# --- gears --------------------------------------------------------------------------------------


@st.composite
def geared_cases(draw: st.DrawFn) -> dict[str, Any]:
    materials: dict[str, Any] = {}
    first, second = draw(shafts("a", materials)), draw(shafts("b", materials))
    gear = {
        "a": {
            "shaft": "a",
            "x": shaft_length(first) * draw(st.integers(0, GRID)) / GRID,
            "radius": draw(st.floats(0.02, 0.3)),
        },
        "b": {
            "shaft": "b",
            "x": shaft_length(second) * draw(st.integers(0, GRID)) / GRID,
            "radius": draw(st.floats(0.02, 0.3)),
        },
    }
    on_first = draw(supports(first, rotations=True, min_size=0))
    on_second = draw(supports(second, rotations=True, min_size=0 if on_first else 1))
    both_fixed = all(
        any(s["kind"] == "fixed" and s["x"] == gear[end]["x"] for s in group)
        for end, group in (("a", on_first), ("b", on_second))
    )
    assume(not both_fixed)  # the mesh torque would be undefined (an input error)
    load_a, load_b = draw(loads(first, 2)), draw(loads(second, 2))
    return {
        "materials": materials,
        "shafts": [first, second],
        "supports": on_first + on_second,
        "gears": [gear],
        "load_cases": [
            {
                "name": "case0",
                "torques": load_a["torques"] + load_b["torques"],
                "distributed": load_a["distributed"] + load_b["distributed"],
            }
        ],
    }


@SETTINGS
@given(geared_cases())
def test_gear_mesh_constraint_equilibrium_and_zero_work(case):
    solved = solve(parse_case(case))
    results = solved["case0"]
    scale_torque, scale_angle = torque_scale(case, solved), angle_scale(case, solved)
    gear = case["gears"][0]
    angle = {
        end: results.shafts[gear[end]["shaft"]].angle[
            stations_at(results.shafts[gear[end]["shaft"]], gear[end]["x"])[0]
        ]
        for end in ("a", "b")
    }
    arc = (gear["a"]["radius"] + gear["b"]["radius"]) * scale_angle
    assert abs(gear["a"]["radius"] * angle["a"] + gear["b"]["radius"] * angle["b"]) <= (
        TOLERANCE * arc
    )
    on_a, on_b = results.gear_torques[0]
    assert abs(on_a * angle["a"] + on_b * angle["b"]) <= TOLERANCE * scale_torque * scale_angle
    for shaft_id, gear_torque in (("a", on_a), ("b", on_b)):
        reactions = [
            reaction
            for support, reaction in zip(case["supports"], results.reactions, strict=True)
            if support["shaft"] == shaft_id
        ]
        applied, _ = applied_total(case, shaft_id)
        total = sum(reactions) + applied + gear_torque
        assert abs(total) <= TOLERANCE * scale_torque
