"""The solver against closed-form results of circular-shaft torsion and independent quadrature.

Sources, each also named beside its check:

* Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 (J = πd⁴/32, J = π(D⁴ − d⁴)/32,
  τ = T·r/J), §3.4 (non-uniform torsion: φ = ∫T dx/(G·J(x)); tapered bar
  φ = 32TL(d_A² + d_A·d_B + d_B²)/(3πG·d_A³·d_B³), the number from memory), §3.8 (statically
  indeterminate members: bar fixed at both ends, T_A = T₀·L_B·I_PA/(L_B·I_PA + L_A·I_PB), from
  memory; composite bar of bonded coaxial members, whose rigidities add — derived by hand below).
* Distributed torque on a uniform shaft (derived by hand from dT/dx = −t, dθ/dx = T/GJ):
  cantilever uniform t → θ_end = tL²/(2GJ); cantilever t = t₀x/L → θ_end = t₀L²/(3GJ);
  fixed–fixed uniform t → reactions −tL/2 each, θ_mid = tL²/(8GJ).
* ``scipy.integrate.quad`` as the independent reference for every integral of T(x)/(G·J(x)).

Sign convention (design §2): a reaction is the torque the support exerts on the shaft, positive
along +x; T(x) is minus the sum of all external torques on [0, x).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from typing import Any

import numpy as np
import pytest
from scipy.integrate import quad

from workbench.solver.analysis import ShaftResult, solve
from workbench.solver.io import parse_case
from workbench.solver.model import Model
from workbench.solver.sections import SolidCircle, Tube

#: Carbon steel, Shigley's *Mechanical Engineering Design*, Table A-5: G = 79.3 GPa.
STEEL_SHEAR_MODULUS = 79.3e9
#: Aluminium alloys, Shigley's *Mechanical Engineering Design*, Table A-5: G = 26.2 GPa.
ALUMINIUM_SHEAR_MODULUS = 26.2e9

#: Relative tolerance of results the solver claims exact to rounding (closed forms).
EXACT = 1e-11
#: Relative tolerance asked of scipy's adaptive quadrature (the reference itself).
QUAD_TOLERANCE = 1e-13


# --- building cases ----------------------------------------------------------------------------


def solid(diameter: float) -> dict[str, Any]:
    return {"shape": "solid", "diameter": diameter}


def tube(outer: float, inner: float) -> dict[str, Any]:
    return {"shape": "tube", "outer_diameter": outer, "inner_diameter": inner}


def tapered(start: float, end: float, bore: float = 0.0) -> dict[str, Any]:
    section: dict[str, Any] = {"shape": "tapered", "diameter_start": start, "diameter_end": end}
    if bore:
        section["bore"] = bore
    return section


def segment(length: float, section: dict[str, Any], material: str = "steel") -> dict[str, Any]:
    return {"length": length, "material": material, "section": section}


def build(
    segments: Sequence[dict[str, Any]],
    supports: Sequence[dict[str, Any]],
    torques: Sequence[tuple[float, float]] = (),
    distributed: Sequence[tuple[float, float, float, float]] = (),
) -> Model:
    """One shaft "s", one load case "case", SI units throughout."""
    data = {
        "materials": {
            "steel": {"shear_modulus": STEEL_SHEAR_MODULUS},
            "aluminium": {"shear_modulus": ALUMINIUM_SHEAR_MODULUS},
        },
        "shafts": [{"id": "s", "segments": list(segments)}],
        "supports": [{"shaft": "s", **support} for support in supports],
        "load_cases": [
            {
                "name": "case",
                "torques": [{"shaft": "s", "x": x, "torque": t} for x, t in torques],
                "distributed": [
                    {"shaft": "s", "start": a, "end": b, "intensity_start": ta, "intensity_end": tb}
                    for a, b, ta, tb in distributed
                ],
            }
        ],
    }
    return parse_case(data)


def fixed(x: float, rotation: float = 0.0) -> dict[str, Any]:
    return {"x": x, "kind": "fixed", "rotation": rotation}


def stations_at(values: ShaftResult, x: float) -> np.ndarray:
    """Indices of the stations at x (two at a jump: left, then right)."""
    found = np.flatnonzero(np.abs(values.x - x) <= 1e-12 * max(1.0, abs(x)))
    assert len(found) >= 1, f"no station at x = {x}"
    return found


def left(values: ShaftResult, quantity: str, x: float) -> float:
    return float(getattr(values, quantity)[stations_at(values, x)[0]])


def right(values: ShaftResult, quantity: str, x: float) -> float:
    return float(getattr(values, quantity)[stations_at(values, x)[-1]])


def solid_polar_moment(diameter: float) -> float:
    """J = πd⁴/32 (Gere & Goodno, 8th ed., eq. 3-10)."""
    return math.pi * diameter**4 / 32.0


def integral(function: Callable[[float], float], a: float, b: float, breaks=()) -> float:
    inner = [p for p in breaks if a < p < b]
    value, _ = quad(
        function, a, b, points=inner or None, epsabs=0.0, epsrel=QUAD_TOLERANCE, limit=200
    )
    return float(value)


# --- sections ----------------------------------------------------------------------------------


def test_solid_polar_moment_and_stress_against_hand_formula():
    # Gere & Goodno, 8th ed., §3.3: J = πd⁴/32, τ_max = 16T/(πd³). Hand value for d = 50 mm:
    # J = π·50⁴/32 mm⁴ = 613 592.315 mm⁴.
    section = SolidCircle(0.050)
    assert section.torsion_constant == pytest.approx(613_592.315e-12, rel=1e-9)
    assert section.shear_stress_per_torque == pytest.approx(16 / (math.pi * 0.050**3), rel=1e-14)

    torque, length = 1_200.0, 0.8
    model = build([segment(length, solid(0.050))], [fixed(0.0)], torques=[(length, torque)])
    values = solve(model)["case"].shafts["s"]
    # τ_max = T·c/J = 1200·0.025/613 592.315e-12 = 48.8924 MPa (hand value).
    assert np.allclose(values.shear_stress, 48.892_399e6, rtol=1e-7)
    rigidity = STEEL_SHEAR_MODULUS * solid_polar_moment(0.050)
    assert values.angle[-1] == pytest.approx(torque * length / rigidity, rel=EXACT)
    assert np.allclose(values.torque, torque, rtol=EXACT)


def test_tube_polar_moment_and_stress_against_hand_formula():
    # Gere & Goodno, 8th ed., §3.3: J = π(D⁴ − d⁴)/32, τ_max = T·(D/2)/J. Hand value for
    # D = 50 mm, d = 30 mm: J = π(6 250 000 − 810 000)/32 mm⁴ = 534 070.751 mm⁴.
    section = Tube(0.050, 0.030)
    assert section.torsion_constant == pytest.approx(534_070.751e-12, rel=1e-9)

    torque, length = -750.0, 1.1
    model = build([segment(length, tube(0.050, 0.030))], [fixed(length)], torques=[(0.0, torque)])
    result = solve(model)["case"]
    values = result.shafts["s"]
    # τ_max = 750·0.025/534 070.751e-12 = 35.1077 MPa (hand value); the stress is a magnitude.
    assert np.allclose(values.shear_stress, 35.107_708e6, rtol=1e-7)
    # Torque applied at x = 0 and the support at x = L: T(x) = −T₀ on (0, L]; θ(0) = −T(0⁺)L/GJ.
    rigidity = STEEL_SHEAR_MODULUS * 534_070.751e-12
    assert right(values, "torque", 0.0) == pytest.approx(-torque, rel=EXACT)
    assert left(values, "angle", 0.0) == pytest.approx(torque * length / rigidity, rel=1e-8)
    assert result.reactions[0] == pytest.approx(-torque, rel=EXACT)


# --- tapered shafts ----------------------------------------------------------------------------


def tapered_closed_form(torque, length, shear_modulus, d_a, d_b):
    """Gere & Goodno, 8th ed., §3.4 tapered bar (from memory for the number):
    φ = 32TL(d_A² + d_A·d_B + d_B²)/(3πG·d_A³·d_B³)."""
    return (
        32
        * torque
        * length
        * (d_a**2 + d_a * d_b + d_b**2)
        / (3 * math.pi * shear_modulus * d_a**3 * d_b**3)
    )


@pytest.mark.parametrize(
    ("d_a", "d_b"), [(0.060, 0.030), (0.030, 0.060), (0.050, 0.049), (0.100, 0.010)]
)
def test_tapered_end_rotation_against_closed_form_and_quad(d_a, d_b):
    torque, length = 850.0, 1.3
    model = build([segment(length, tapered(d_a, d_b))], [fixed(0.0)], torques=[(length, torque)])
    angle_end = solve(model)["case"].shafts["s"].angle[-1]

    closed = tapered_closed_form(torque, length, STEEL_SHEAR_MODULUS, d_a, d_b)
    by_quad = torque * integral(
        lambda x: 1.0 / (STEEL_SHEAR_MODULUS * solid_polar_moment(d_a + (d_b - d_a) * x / length)),
        0.0,
        length,
    )
    assert closed == pytest.approx(by_quad, rel=1e-12)  # the reference agrees with itself
    assert angle_end == pytest.approx(closed, rel=EXACT)


@pytest.mark.parametrize(
    ("d_a", "d_b", "bore"), [(0.060, 0.030, 0.020), (0.030, 0.060, 0.029), (0.050, 0.045, 0.010)]
)
def test_tapered_with_bore_end_rotation_against_quad(d_a, d_b, bore):
    # Gere & Goodno, 8th ed., §3.4: φ = ∫T dx/(G·J(x)), J(x) = π(d(x)⁴ − d_bore⁴)/32.
    torque, length = -420.0, 0.9
    model = build(
        [segment(length, tapered(d_a, d_b, bore))], [fixed(0.0)], torques=[(length, torque)]
    )
    values = solve(model)["case"].shafts["s"]

    def polar(x):
        return math.pi * ((d_a + (d_b - d_a) * x / length) ** 4 - bore**4) / 32.0

    for x, angle in zip(values.x, values.angle, strict=True):
        expected = torque * integral(lambda s: 1.0 / (STEEL_SHEAR_MODULUS * polar(s)), 0.0, x)
        assert angle == pytest.approx(expected, rel=EXACT, abs=1e-15)
    # τ_max at each station: T·(d(x)/2)/J(x), largest at the small end.
    small = np.argmin(np.abs(values.x - (length if d_b < d_a else 0.0)))
    x_small = values.x[small]
    expected_stress = abs(torque) * (d_a + (d_b - d_a) * x_small / length) / 2 / polar(x_small)
    assert values.shear_stress.max() == pytest.approx(expected_stress, rel=1e-12)


def test_tapered_cantilever_with_mid_torque_and_distributed_load_against_quad():
    # Statically determinate: fixed at x = 0. T(x) from statics, θ(x) = ∫₀ˣ T/(G·J) by quad
    # (Gere & Goodno, 8th ed., §3.4).
    length, d_a, d_b, bore = 1.2, 0.070, 0.040, 0.015
    point_x, point_torque = 0.5, 900.0
    load = (0.3, 1.1, 400.0, -250.0)  # start, end, intensity at start, at end (N·m/m)
    model = build(
        [segment(length, tapered(d_a, d_b, bore))],
        [fixed(0.0)],
        torques=[(point_x, point_torque)],
        distributed=[load],
    )
    result = solve(model)["case"]
    values = result.shafts["s"]

    def intensity(x):
        a, b, ta, tb = load
        return ta + (tb - ta) * (x - a) / (b - a) if a <= x <= b else 0.0

    def load_up_to(x):  # ∫₀ˣ t
        return integral(intensity, 0.0, x, breaks=(load[0], load[1]))

    resultant = 0.5 * (load[2] + load[3]) * (load[1] - load[0])
    reaction = -(point_torque + resultant)
    assert result.reactions[0] == pytest.approx(reaction, rel=EXACT)

    def internal(x, side=+1):
        on_left = point_torque if (x > point_x or (x == point_x and side > 0)) else 0.0
        return -(reaction + on_left + load_up_to(x))

    def polar(x):
        return math.pi * ((d_a + (d_b - d_a) * x / length) ** 4 - bore**4) / 32.0

    def rate(x):
        return internal(x) / (STEEL_SHEAR_MODULUS * polar(x))

    breaks = (point_x, load[0], load[1])
    scale = abs(values.angle).max()
    for index, x in enumerate(values.x):
        side = +1 if index + 1 == len(values.x) or values.x[index + 1] != x else -1
        assert values.torque[index] == pytest.approx(internal(x, side), rel=1e-11, abs=1e-9)
        expected = integral(rate, 0.0, x, breaks)
        assert values.angle[index] == pytest.approx(expected, rel=1e-10, abs=1e-12 * scale)
    assert len(values.x) > 40  # curves are drawn inside the loaded, tapered elements


def test_tapered_fixed_both_ends_reaction_against_quad_compatibility():
    # Fixed at both ends: θ(L) = 0 = ∫₀ᴸ T/(GJ) with T(x) = −R_A − M(x), M(x) the applied torque
    # on [0, x); so R_A = −∫M/(GJ) / ∫1/(GJ) (Gere & Goodno, 8th ed., §3.8, by quad).
    length, d_a, d_b, bore = 0.8, 0.030, 0.055, 0.012
    point_x, point_torque = 0.35, -600.0
    load = (0.0, 0.8, 150.0, 450.0)
    model = build(
        [segment(length, tapered(d_a, d_b, bore))],
        [fixed(0.0), fixed(length)],
        torques=[(point_x, point_torque)],
        distributed=[load],
    )
    result = solve(model)["case"]

    def flexibility(x):
        return 1.0 / (
            STEEL_SHEAR_MODULUS * math.pi * ((d_a + (d_b - d_a) * x / length) ** 4 - bore**4) / 32.0
        )

    def applied_before(x):
        a, b, ta, tb = load
        distributed = ta * x + (tb - ta) * x**2 / (2 * (b - a))
        return distributed + (point_torque if x > point_x else 0.0)

    reaction_a = -integral(lambda x: applied_before(x) * flexibility(x), 0, length, (point_x,))
    reaction_a /= integral(flexibility, 0, length)
    resultant = 0.5 * (load[2] + load[3]) * length
    reaction_b = -(point_torque + resultant) - reaction_a
    assert result.reactions[0] == pytest.approx(reaction_a, rel=1e-11)
    assert result.reactions[1] == pytest.approx(reaction_b, rel=1e-11)
    values = result.shafts["s"]
    assert values.angle[0] == 0.0
    assert values.angle[-1] == 0.0


# --- distributed torque on a uniform shaft ----------------------------------------------------


UNIFORM_DIAMETER = 0.040
UNIFORM_RIGIDITY = STEEL_SHEAR_MODULUS * solid_polar_moment(UNIFORM_DIAMETER)


def test_cantilever_uniform_distributed_torque():
    # Derived: T(x) = t(L − x), θ_end = ∫₀ᴸ t(L − x)/GJ dx = tL²/(2GJ).
    intensity, length = 300.0, 1.5
    model = build(
        [segment(length, solid(UNIFORM_DIAMETER))],
        [fixed(0.0)],
        distributed=[(0.0, length, intensity, intensity)],
    )
    result = solve(model)["case"]
    assert result.reactions[0] == pytest.approx(-intensity * length, rel=EXACT)
    expected = intensity * length**2 / (2 * UNIFORM_RIGIDITY)
    assert result.shafts["s"].angle[-1] == pytest.approx(expected, rel=EXACT)


def test_cantilever_linearly_increasing_distributed_torque():
    # Derived: t = t₀x/L, T(x) = t₀(L² − x²)/(2L), θ_end = t₀L²/(3GJ).
    peak, length = 500.0, 2.0
    model = build(
        [segment(length, solid(UNIFORM_DIAMETER))],
        [fixed(0.0)],
        distributed=[(0.0, length, 0.0, peak)],
    )
    result = solve(model)["case"]
    assert result.reactions[0] == pytest.approx(-peak * length / 2, rel=EXACT)
    expected = peak * length**2 / (3 * UNIFORM_RIGIDITY)
    assert result.shafts["s"].angle[-1] == pytest.approx(expected, rel=EXACT)


def test_fixed_fixed_uniform_distributed_torque():
    # Derived by symmetry: reactions tL/2 each, opposing the load (our sign: −tL/2);
    # T(x) = t(L/2 − x), θ_mid = ∫₀^{L/2} T/GJ = tL²/(8GJ).
    intensity, length = -240.0, 1.6
    model = build(
        [segment(length, solid(UNIFORM_DIAMETER))],
        [fixed(0.0), fixed(length)],
        distributed=[(0.0, length, intensity, intensity)],
        torques=[(length / 2, 0.0)],  # a zero torque only to put a station at mid-length
    )
    result = solve(model)["case"]
    assert result.reactions == pytest.approx([-intensity * length / 2] * 2, rel=EXACT)
    values = result.shafts["s"]
    expected = intensity * length**2 / (8 * UNIFORM_RIGIDITY)
    assert left(values, "angle", length / 2) == pytest.approx(expected, rel=EXACT)
    assert left(values, "torque", length / 2) == pytest.approx(0.0, abs=1e-10 * abs(intensity))


def test_interior_stations_of_a_loaded_element_follow_the_exact_polynomials():
    # Cantilever fixed at 0 with t(x) = t_a + (t_b − t_a)x/L on [0, L]; by hand:
    # T(x) = ∫ₓᴸ t = R(L) − R(x) with R(x) = t_a·x + (t_b − t_a)x²/(2L);
    # θ(x) = (1/GJ)∫₀ˣ T = (R(L)·x − t_a·x²/2 − (t_b − t_a)x³/(6L))/GJ.
    t_a, t_b, length = 120.0, -380.0, 1.4
    model = build(
        [segment(length, solid(UNIFORM_DIAMETER))],
        [fixed(0.0)],
        distributed=[(0.0, length, t_a, t_b)],
    )
    values = solve(model)["case"].shafts["s"]
    x = values.x
    inside = (x > 0) & (x < length)
    assert inside.sum() >= 10  # stations inside the element, not just its ends

    def running(x):
        return t_a * x + (t_b - t_a) * x**2 / (2 * length)

    total = running(length)
    torque = total - running(x)
    angle = (total * x - t_a * x**2 / 2 - (t_b - t_a) * x**3 / (6 * length)) / UNIFORM_RIGIDITY
    assert np.allclose(values.torque, torque, rtol=0, atol=1e-11 * abs(t_b) * length)
    assert np.allclose(values.angle, angle, rtol=0, atol=1e-12 * np.abs(angle).max())


def test_interior_stations_of_a_partly_loaded_stepped_shaft():
    # Fixed–free, two prismatic segments, the load over part of each; T(x) = ∫ₓᴸ t and
    # θ(x) = ∫₀ˣ T/GJ(x) by quad (Gere & Goodno, 8th ed., §3.4).
    model = build(
        [segment(0.5, solid(0.050)), segment(0.7, tube(0.060, 0.040), "aluminium")],
        [fixed(0.0)],
        distributed=[(0.2, 0.9, 200.0, 600.0)],
    )
    values = solve(model)["case"].shafts["s"]

    def intensity(x):
        return 200.0 + 400.0 * (x - 0.2) / 0.7 if 0.2 <= x <= 0.9 else 0.0

    def internal(x):
        return integral(intensity, x, 1.2, (0.2, 0.9))

    def rigidity(x):
        if x < 0.5:
            return STEEL_SHEAR_MODULUS * solid_polar_moment(0.050)
        return ALUMINIUM_SHEAR_MODULUS * math.pi * (0.060**4 - 0.040**4) / 32

    for x, torque, angle in zip(values.x, values.torque, values.angle, strict=True):
        assert torque == pytest.approx(internal(x), rel=1e-12, abs=1e-9)
        expected = integral(lambda s: internal(s) / rigidity(s), 0.0, x, (0.2, 0.5, 0.9))
        assert angle == pytest.approx(expected, rel=1e-10, abs=1e-15)


# --- layered (bonded coaxial) segments ---------------------------------------------------------


@pytest.mark.parametrize(
    ("tube_material", "core_material"), [("steel", "aluminium"), ("aluminium", "steel")]
)
def test_layered_segment_rigidity_sum_and_layer_stresses(tube_material, core_material):
    # Composite bar of a tube bonded over a core (Gere & Goodno, 8th ed., §3.8 composite bar
    # idea; derived by hand): both share the twist rate φ' = T/(G₁J₁ + G₂J₂), so layer i carries
    # Tᵢ = T·GᵢJᵢ/ΣGJ and its peak stress is τᵢ = Gᵢ·rᵢ·φ' at its own outer radius rᵢ.
    moduli = {"steel": STEEL_SHEAR_MODULUS, "aluminium": ALUMINIUM_SHEAR_MODULUS}
    outer, bore_of_tube, core = 0.060, 0.040, 0.040
    torque, length = 2_000.0, 0.7
    model = build(
        [
            {
                "length": length,
                "layers": [
                    {"material": tube_material, "section": tube(outer, bore_of_tube)},
                    {"material": core_material, "section": solid(core)},
                ],
            }
        ],
        [fixed(0.0)],
        torques=[(length, torque)],
    )
    values = solve(model)["case"].shafts["s"]

    tube_rigidity = moduli[tube_material] * math.pi * (outer**4 - bore_of_tube**4) / 32
    core_rigidity = moduli[core_material] * solid_polar_moment(core)
    twist_rate = torque / (tube_rigidity + core_rigidity)
    assert values.angle[-1] == pytest.approx(twist_rate * length, rel=EXACT)
    tube_stress = moduli[tube_material] * (outer / 2) * twist_rate
    core_stress = moduli[core_material] * (core / 2) * twist_rate
    # The tube's share of the torque, by its own formula τ = T₁·r/J₁, gives the same stress.
    tube_torque = torque * tube_rigidity / (tube_rigidity + core_rigidity)
    polar_tube = math.pi * (outer**4 - bore_of_tube**4) / 32
    assert tube_stress == pytest.approx(tube_torque * (outer / 2) / polar_tube, rel=1e-14)
    assert np.allclose(values.shear_stress, max(tube_stress, core_stress), rtol=EXACT)
    # With these numbers the governing layer changes with the materials: steel tube governs in
    # the first case, the steel core in the second (79.3·20 > 26.2·30).
    governing = "tube" if tube_material == "steel" else "core"
    assert (tube_stress > core_stress) == (governing == "tube")


# --- statically indeterminate two-segment bar --------------------------------------------------


def test_bar_fixed_both_ends_torque_at_step():
    # Gere & Goodno, 8th ed., §3.8, bar fixed at both ends (from memory):
    # T_A = T₀·L_B·I_PA/(L_B·I_PA + L_A·I_PB), T_B = T₀·L_A·I_PB/(L_B·I_PA + L_A·I_PB);
    # φ_C = T_A·L_A/(G·I_PA). Our reactions oppose the load: R_A = −T_A, R_B = −T_B.
    length_a, length_b, torque = 0.6, 0.9, 1_500.0
    polar_a = solid_polar_moment(0.050)
    polar_b = math.pi * (0.050**4 - 0.035**4) / 32
    model = build(
        [segment(length_a, solid(0.050)), segment(length_b, tube(0.050, 0.035))],
        [fixed(0.0), fixed(length_a + length_b)],
        torques=[(length_a, torque)],
    )
    result = solve(model)["case"]
    denominator = length_b * polar_a + length_a * polar_b
    torque_a = torque * length_b * polar_a / denominator
    torque_b = torque * length_a * polar_b / denominator
    assert result.reactions[0] == pytest.approx(-torque_a, rel=EXACT)
    assert result.reactions[1] == pytest.approx(-torque_b, rel=EXACT)
    values = result.shafts["s"]
    expected = torque_a * length_a / (STEEL_SHEAR_MODULUS * polar_a)
    assert left(values, "angle", length_a) == pytest.approx(expected, rel=EXACT)
    # The jump of T at C equals the applied torque (T(C⁻) − T(C⁺) = T₀).
    jump = left(values, "torque", length_a) - right(values, "torque", length_a)
    assert jump == pytest.approx(torque, rel=EXACT)


# --- mesh independence -------------------------------------------------------------------------


def _mesh_case(extra_points: Sequence[float]) -> Model:
    return build(
        [
            segment(0.4, solid(0.045)),
            segment(0.5, tapered(0.045, 0.030, 0.010)),
            segment(0.3, tube(0.050, 0.030), "aluminium"),
        ],
        [fixed(0.0), {"x": 1.2, "kind": "spring", "stiffness": 4.0e4}, fixed(0.7)],
        torques=[(0.25, 700.0), (1.0, -300.0), *[(x, 0.0) for x in extra_points]],
        distributed=[(0.1, 1.1, 250.0, -100.0)],
    )


def test_results_do_not_depend_on_extra_unloaded_nodes():
    # A zero point torque only adds a node. Exact elements (design §3) make every result at the
    # original stations independent of it. Reference: the same model without the extra nodes.
    plain = solve(_mesh_case([]))
    refined = solve(_mesh_case([0.05, 0.33, 0.55, 0.61, 0.95, 1.15]))
    assert refined.mesh.node_x.size == plain.mesh.node_x.size + 6
    assert refined["case"].reactions == pytest.approx(plain["case"].reactions, rel=1e-12)
    coarse, fine = plain["case"].shafts["s"], refined["case"].shafts["s"]
    node_x = plain.mesh.node_x
    scale_angle = np.abs(coarse.angle).max()
    scale_torque = np.abs(coarse.torque).max()
    for x in node_x:
        for side in (left, right):
            assert side(fine, "angle", x) == pytest.approx(
                side(coarse, "angle", x), rel=1e-12, abs=1e-12 * scale_angle
            )
            assert side(fine, "torque", x) == pytest.approx(
                side(coarse, "torque", x), rel=1e-12, abs=1e-12 * scale_torque
            )
