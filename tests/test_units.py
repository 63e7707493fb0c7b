"""Units at the edges: the same case in SI and in US customary units gives the same answers.

Property (hypothesis): a random case written once in SI base units and once in inches, lbf·in,
psi and degrees — each number converted with the conversion factors of pint's registry
(``workbench.case.units.registry()``; pint's definitions: 1 in = 0.0254 m exactly,
1 lbf = 4.448 221 615 260 5 N exactly, 1 psi = 1 lbf/in²) — gives the same verdict and the same
check rows and solve results after conversion, to 1e-9 relative.

Power and speed as a load: T = P/ω. With P in kW and n in rpm, T[N·m] = 60 000·P/(2π·n)
= 9549.3·P/n; with P in hp (550 ft·lbf/s) and n in rpm, T[lbf·in] = 550·12·60·P/(2π·n)
= 63 025·P/n (exact from the unit definitions).
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from workbench.case.errors import InputError
from workbench.case.units import UnitSystem, registry
from workbench.cli import main
from workbench.design.checks import check_document, run_checks
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.tables import results_document

US_UNITS = {"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg"}
SI_UNITS = {"length": "m", "torque": "N*m", "stress": "Pa", "angle": "rad"}


def factor(unit: str, si_unit: str) -> float:
    """How many ``si_unit`` one ``unit`` is, by pint."""
    return float(registry().Quantity(1.0, unit).to(si_unit).magnitude)


def us_to_si() -> dict[str, float]:
    """Factors from the US-customary unit of each quantity to SI."""
    base = {q: factor(US_UNITS[q], SI_UNITS[q]) for q in US_UNITS}
    return {
        **base,
        "stiffness": base["torque"] / base["angle"],
        "distributed_torque": base["torque"] / base["length"],
        "twist_rate": base["angle"] / base["length"],
    }


def test_conversion_factors_are_the_definitions() -> None:
    factors = us_to_si()
    assert factors["length"] == pytest.approx(0.0254, rel=1e-15)
    assert factors["torque"] == pytest.approx(4.4482216152605 * 0.0254, rel=1e-14)
    assert factors["stress"] == pytest.approx(4.4482216152605 / 0.0254**2, rel=1e-14)
    assert factors["angle"] == pytest.approx(math.pi / 180.0, rel=1e-15)


# --- random cases ------------------------------------------------------------------------------

CRITERIA = ("von_mises", "tresca", "shafting_code", "allowable")


@st.composite
def case_parameters(draw: st.DrawFn) -> dict[str, Any]:
    """Random case data in SI (m, N·m, Pa, rad)."""
    count = draw(st.integers(1, 3))
    segments = []
    for number in range(count):
        outer = draw(st.floats(0.020, 0.080))
        tube = draw(st.booleans())
        segment: dict[str, Any] = {
            "length": draw(st.floats(0.050, 0.500)),
            "outer": outer,
            "bore": outer * draw(st.floats(0.3, 0.8)) if tube else None,
            "keyseat": draw(st.booleans()),
            "fillet_fraction": draw(st.none() | st.floats(0.025, 0.25)) if number else None,
            "hole_fraction": None if tube else draw(st.none() | st.floats(0.05, 0.35)),
        }
        segments.append(segment)
    length = sum(s["length"] for s in segments)
    yield_strength = draw(st.floats(200e6, 600e6))
    material = {
        "shear_modulus": draw(st.floats(26e9, 80e9)),
        "yield_strength": yield_strength,
        "ultimate_strength": yield_strength * draw(st.floats(1.1, 1.6)),
    }
    end_support = draw(st.sampled_from(["none", "fixed", "spring"]))
    cases = []
    for number in range(draw(st.integers(1, 2))):
        torques = [
            (draw(st.floats(0.05, 1.0)) * length,
             draw(st.floats(50.0, 3000.0)) * draw(st.sampled_from([-1.0, 1.0])))
            for _ in range(draw(st.integers(1, 2)))
        ]  # fmt: skip
        distributed = None
        if draw(st.booleans()):
            start = draw(st.floats(0.0, 0.5)) * length
            end = start + draw(st.floats(0.1, 0.5)) * length
            distributed = (start, end, draw(st.floats(-2000.0, 2000.0)),
                           draw(st.floats(-2000.0, 2000.0)))  # fmt: skip
        cases.append({"name": f"case {number + 1}", "torques": torques, "distributed": distributed})
    criterion = draw(st.sampled_from(CRITERIA))
    return {
        "segments": segments,
        "length": length,
        "material": material,
        "end_support": end_support,
        "spring": draw(st.floats(1e3, 1e6)),
        "cases": cases,
        "combination": draw(st.none() | st.floats(0.5, 2.0)),
        "design": {
            "criterion": criterion,
            "factor_of_safety": draw(st.floats(1.0, 3.0)),
            "keyway": draw(st.booleans()),
            "allowable": draw(st.floats(30e6, 200e6)) if criterion == "allowable" else None,
            "max_twist_rate": draw(st.none() | st.floats(0.005, 0.05)),
            "rotation": draw(st.none() | st.tuples(st.floats(0.0, 0.4), st.floats(0.6, 1.0),
                                                   st.floats(0.001, 0.05))),
        },
    }  # fmt: skip


def build_case(p: dict[str, Any], us: bool) -> dict[str, Any]:
    """The case file of parameters ``p`` (SI) in SI, or converted to US customary units."""
    factors = us_to_si() if us else dict.fromkeys(us_to_si(), 1.0)

    def c(value: float, quantity: str) -> float:
        return value / factors[quantity]

    segments = []
    for number, s in enumerate(p["segments"]):
        if s["bore"] is None:
            section = {"shape": "solid", "diameter": c(s["outer"], "length")}
        else:
            section = {"shape": "tube", "outer_diameter": c(s["outer"], "length"),
                       "inner_diameter": c(s["bore"], "length")}  # fmt: skip
        entry: dict[str, Any] = {"length": c(s["length"], "length"), "material": "metal",
                                 "section": section, "keyseat": s["keyseat"]}  # fmt: skip
        if s["fillet_fraction"] is not None:
            smaller = min(s["outer"], p["segments"][number - 1]["outer"])
            entry["fillet_radius"] = c(s["fillet_fraction"] * smaller, "length")
        if s["hole_fraction"] is not None:
            entry["cross_hole_diameter"] = c(s["hole_fraction"] * s["outer"], "length")
        segments.append(entry)
    supports: list[dict[str, Any]] = [{"shaft": "s", "x": 0.0, "kind": "fixed"}]
    if p["end_support"] == "fixed":
        supports.append({"shaft": "s", "x": c(p["length"], "length"), "kind": "fixed"})
    elif p["end_support"] == "spring":
        supports.append({"shaft": "s", "x": c(p["length"], "length"), "kind": "spring",
                         "stiffness": c(p["spring"], "stiffness")})  # fmt: skip
    load_cases = []
    for case in p["cases"]:
        entry = {
            "name": case["name"],
            "torques": [{"shaft": "s", "x": c(x, "length"), "torque": c(t, "torque")}
                        for x, t in case["torques"]],
        }  # fmt: skip
        if case["distributed"] is not None:
            start, end, first, last = case["distributed"]
            entry["distributed"] = [{
                "shaft": "s", "start": c(start, "length"), "end": c(end, "length"),
                "intensity_start": c(first, "distributed_torque"),
                "intensity_end": c(last, "distributed_torque"),
            }]  # fmt: skip
        load_cases.append(entry)
    d = p["design"]
    design: dict[str, Any] = {
        "factor_of_safety": d["factor_of_safety"],
        "shear_criterion": d["criterion"],
        "keyway": d["keyway"],
    }
    if d["allowable"] is not None:
        design["allowable_shear_stress"] = c(d["allowable"], "stress")
    if d["max_twist_rate"] is not None:
        design["max_twist_rate"] = c(d["max_twist_rate"], "twist_rate")
    if d["rotation"] is not None:
        start, end, limit = d["rotation"]
        design["rotation_limits"] = [{
            "shaft": "s", "start": c(start * p["length"], "length"),
            "end": c(end * p["length"], "length"), "limit": c(limit, "angle"),
        }]  # fmt: skip
    document: dict[str, Any] = {
        "materials": {"metal": {key: c(value, "stress") for key, value in p["material"].items()}},
        "shafts": [{"id": "s", "segments": segments}],
        "supports": supports,
        "load_cases": load_cases,
        "design": design,
    }
    if p["combination"] is not None:
        document["combinations"] = [
            {"name": "factored", "factors": {p["cases"][0]["name"]: p["combination"]}}
        ]
    if us:
        document["units"] = dict(US_UNITS)
    return document


CHECK_QUANTITY = {
    "shear_stress": "stress",
    "shoulder_stress": "stress",
    "keyseat_stress": "stress",
    "cross_hole_stress": "stress",
    "twist_rate": "twist_rate",
    "rotation": "angle",
}


def close(us_values: Any, si_values: Any, scale: float) -> None:
    """US values × factor equal SI values to 1e-9 relative (noise near zero to the array's size)."""
    us_array, si_array = (
        np.asarray(us_values, dtype=float) * scale,
        np.asarray(si_values, dtype=float),
    )
    size = float(np.max(np.abs(si_array), initial=0.0))
    # An SI value of 1e-15 (Pa, rad, m) is rounding noise of a quantity that is zero.
    np.testing.assert_allclose(us_array, si_array, rtol=1e-9, atol=max(1e-12 * size, 1e-15))


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(case_parameters())
def test_si_and_us_customary_give_the_same_answers(p: dict[str, Any]) -> None:
    si_model = parse_case(build_case(p, us=False))
    us_model = parse_case(build_case(p, us=True))
    si_results, us_results = solve(si_model), solve(us_model)
    si_report, us_report = run_checks(si_results), run_checks(us_results)
    assert si_report.passes == us_report.passes

    factors = us_to_si()
    si_rows = check_document(si_report)["checks"]
    us_rows = check_document(us_report)["checks"]
    assert len(si_rows) == len(us_rows)
    for si_row, us_row in zip(si_rows, us_rows, strict=True):
        for key in ("result", "shaft", "segment", "kind", "passes"):
            assert si_row[key] == us_row[key]
        scale = factors[CHECK_QUANTITY[si_row["kind"]]]
        close(us_row["limit"], si_row["limit"], scale)
        close(us_row["value"], si_row["value"], scale)
        close(us_row["x"], si_row["x"], factors["length"])
        assert us_row["utilisation"] == pytest.approx(si_row["utilisation"], rel=1e-9, abs=1e-12)

    si_document, us_document = results_document(si_results), results_document(us_results)
    assert us_document["units"] == US_UNITS
    for si_entry, us_entry in zip(si_document["results"], us_document["results"], strict=True):
        assert si_entry["name"] == us_entry["name"]
        close(us_entry["reactions"], si_entry["reactions"], factors["torque"])
        for shaft, si_values in si_entry["shafts"].items():
            us_values = us_entry["shafts"][shaft]
            close(us_values["x"], si_values["x"], factors["length"])
            close(us_values["torque"], si_values["torque"], factors["torque"])
            close(us_values["angle"], si_values["angle"], factors["angle"])
            close(us_values["shear_stress"], si_values["shear_stress"], factors["stress"])


# --- power and speed as a load ---------------------------------------------------------------


def power_case(units: dict[str, str], power: float, speed: float, length: float) -> dict[str, Any]:
    """A cantilever driven at its free end by a power at a speed (in ``units``)."""
    return {
        "units": units,
        "materials": {"steel": {"shear_modulus": 79.3e9 / factor(units["stress"], "Pa")}},
        "shafts": [
            {
                "id": "s",
                "segments": [
                    {"length": length, "material": "steel",
                     "section": {"shape": "solid", "diameter": length / 10}}
                ],
            }
        ],
        "supports": [{"shaft": "s", "x": 0}],
        "load_cases": [
            {"name": "run", "torques": [{"shaft": "s", "x": length, "power": power,
                                         "speed": speed}]}
        ],
    }  # fmt: skip


@pytest.mark.parametrize(("power", "speed"), [(15.0, 1450.0), (0.75, 2900.0), (-4.0, 960.0)])
def test_kilowatts_and_rpm_give_9549_p_over_n(power: float, speed: float) -> None:
    units = {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg", "power": "kW",
             "speed": "rpm"}  # fmt: skip
    results = solve(parse_case(power_case(units, power, speed, 500.0)))
    torque = results_document(results)["results"][0]["shafts"]["s"]["torque"]
    exact = 60_000.0 * power / (2.0 * math.pi * speed)  # P/ω with P = 1000·P_kW, ω = 2πn/60
    assert exact == pytest.approx(9549.3 * power / speed, rel=1e-5)
    assert torque[0] == pytest.approx(exact, rel=1e-12)
    assert max(torque) == pytest.approx(min(torque), rel=1e-12)  # uniform along the cantilever


@pytest.mark.parametrize(("power", "speed"), [(20.0, 1750.0), (0.5, 3450.0)])
def test_horsepower_and_rpm_give_63025_p_over_n(power: float, speed: float) -> None:
    units = {"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg", "power": "hp",
             "speed": "rpm"}  # fmt: skip
    results = solve(parse_case(power_case(units, power, speed, 20.0)))
    torque = results_document(results)["results"][0]["shafts"]["s"]["torque"]
    # 1 hp = 550 ft·lbf/s = 6600 in·lbf/s; ω = 2πn/60 → T = 6600·60·P/(2πn) lbf·in
    exact = 396_000.0 * power / (2.0 * math.pi * speed)
    assert exact == pytest.approx(63025.0 * power / speed, rel=1e-5)
    assert torque[0] == pytest.approx(exact, rel=1e-12)


def test_power_in_si_is_watts_over_radians_per_second() -> None:
    results = solve(parse_case(power_case(dict(SI_UNITS), 1500.0, 100.0, 0.5)))
    assert float(results.torque[0, 0]) == pytest.approx(15.0, rel=1e-15)


# --- bad units -----------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("units", "field", "word"),
    [
        ({"length": "furlongz"}, "units.length", "furlongz"),
        ({"stress": "megapascalz"}, "units.stress", "megapascalz"),
        ({"torque": "N"}, "units.torque", "'N'"),
        ({"length": "psi"}, "units.length", "'psi'"),
        ({"stress": "N*m"}, "units.stress", "'N*m'"),
        ({"angle": "m"}, "units.angle", "'m'"),
        ({"power": "rpm"}, "units.power", "'rpm'"),
        ({"speed": "kW"}, "units.speed", "'kW'"),
        ({"density": "kg"}, "units.density", "'kg'"),
        ({"length": ""}, "units.length", "''"),
        ({"length": 25.4}, "units.length", "25.4"),
        ({"lenght": "mm"}, "units.lenght", "unknown key"),
    ],
)
def test_bad_units_are_input_errors_naming_the_quantity(
    units: dict[str, Any], field: str, word: str
) -> None:
    case = power_case(dict(SI_UNITS), 1500.0, 100.0, 0.5)
    case["units"] = units
    with pytest.raises(InputError) as caught:
        parse_case(case)
    assert caught.value.field == field
    assert word in caught.value.message


@pytest.mark.parametrize("angle", ["percent", "dimensionless", "ppm"])
def test_an_angle_unit_must_be_an_angle(angle: str) -> None:
    # pint treats the radian as dimensionless, so a plain number unit has an angle's dimension;
    # "percent" is no unit of angle and must be refused, not read as 0.01 rad.
    with pytest.raises(InputError) as caught:
        UnitSystem(angle=angle)
    assert caught.value.field == "units.angle"


def test_bad_unit_on_the_command_line_is_one_line(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    case = power_case(dict(SI_UNITS), 1500.0, 100.0, 0.5)
    case["units"] = {"torque": "N"}
    path = tmp_path / "case.json"
    path.write_text(json.dumps(case), encoding="utf-8")
    assert main(["check", str(path)]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err.startswith("units.torque: ")
    assert len(captured.err.splitlines()) == 1
