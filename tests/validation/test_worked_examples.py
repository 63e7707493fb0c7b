"""The solver against textbook worked examples, and a large system against a dense reference.

Sources, each also named beside its check (values as listed in /work/shared/references.md and
re-derived by hand in the comments):

* Hibbeler, *Mechanics of Materials*, 8th ed. (from memory): shaft fixed at both ends with two
  torques → end reactions of magnitude 645 N·m and 345 N·m.
* Beer & Johnston, *Mechanics of Materials* (from memory): 10 in shaft, 7/8 in diameter, 5/8 in
  bore over the 5 in next to B, fixed at both ends, 90 lb·ft at mid-length → T_A = 51.7 lb·ft,
  T_B = 38.3 lb·ft.
* Philpot, *Mechanics of Materials*, companion example M6.23: stainless tube + bronze solid,
  3° at the joint → T = 12.70 kN·m, τ₁ = 84.43 MPa, τ₂ = 93.27 MPa.
* Hibbeler, *Mechanics of Materials* (from memory): gear pair, 45 N·m at A → θ_A = 0.0850 rad.
* A three-shaft, two-mesh system with springs and four fixed supports against a dense solution
  built here from scratch with numpy (null-space elimination of the constraints, a different
  method from the solver's Lagrange multipliers).

Sign convention (design §2): a reaction is the torque the support exerts on the shaft, positive
along +x by the right-hand rule; it opposes the applied torques.
"""

from __future__ import annotations

import itertools
import math
from typing import Any

import numpy as np
import pytest

from workbench.solver.analysis import ShaftResult, solve
from workbench.solver.io import parse_case
from workbench.solver.tables import results_document


def solid(diameter: float) -> dict[str, Any]:
    return {"shape": "solid", "diameter": diameter}


def tube(outer: float, inner: float) -> dict[str, Any]:
    return {"shape": "tube", "outer_diameter": outer, "inner_diameter": inner}


def stations_at(values: ShaftResult, x: float) -> np.ndarray:
    found = np.flatnonzero(np.abs(values.x - x) <= 1e-12 * max(1.0, abs(x)))
    assert len(found) >= 1, f"no station at x = {x}"
    return found


def test_hibbeler_shaft_fixed_both_ends_two_torques():
    # Hibbeler, Mechanics of Materials, 8th ed. (from memory): d = 20 mm, L = 2 m, fixed at both
    # ends; 800 N·m at 0.2 m and −500 N·m at 1.7 m → reactions 645 N·m and 345 N·m. By hand
    # (uniform shaft, R_A share = T·b/L): 800·1.8/2 − 500·0.3/2 = 645; 800·0.2/2 − 500·1.7/2 =
    # −345. Our reactions oppose: R_A = −645 N·m, R_B = +345 N·m; ΣR + ΣT = 0.
    case = {
        "materials": {"steel": {"shear_modulus": 75e9}},  # Hibbeler A-36 table value; G cancels
        "shafts": [
            {
                "id": "AB",
                "segments": [{"length": 2.0, "material": "steel", "section": solid(0.020)}],
            }
        ],
        "supports": [
            {"shaft": "AB", "x": 0.0, "kind": "fixed"},
            {"shaft": "AB", "x": 2.0, "kind": "fixed"},
        ],
        "load_cases": [
            {
                "name": "given",
                "torques": [
                    {"shaft": "AB", "x": 0.2, "torque": 800.0},
                    {"shaft": "AB", "x": 1.7, "torque": -500.0},
                ],
            }
        ],
    }
    reactions = solve(parse_case(case))["given"].reactions
    assert reactions[0] == pytest.approx(-645.0, abs=0.5)  # book value, 3 significant figures
    assert reactions[1] == pytest.approx(345.0, abs=0.5)
    assert reactions == pytest.approx([-645.0, 345.0], rel=1e-12)  # exact by hand


def test_beer_johnston_shaft_with_bore_fixed_both_ends_in_us_units():
    # Beer & Johnston, Mechanics of Materials (from memory): 10 in, d = 7/8 in, 5/8 in bore over
    # the 5 in next to B, fixed both ends, 90 lb·ft at mid-length → T_A = 51.7, T_B = 38.3 lb·ft.
    # By hand: equal lengths, one material, so T_A = T₀·J_A/(J_A + J_B) with
    # J ∝ 0.875⁴ = 0.586182 and 0.875⁴ − 0.625⁴ = 0.433594 → T_A = 51.73, T_B = 38.27 lb·ft.
    # Written in US units so the case file goes through pint.
    case = {
        "units": {"length": "in", "torque": "lbf*ft", "stress": "psi", "angle": "rad"},
        # G of steel 11.2·10⁶ psi (Beer & Johnston property table, from memory); it cancels.
        "materials": {"steel": {"shear_modulus": 11.2e6}},
        "shafts": [
            {
                "id": "AB",
                "segments": [
                    {"length": 5, "material": "steel", "section": solid(7 / 8)},
                    {"length": 5, "material": "steel", "section": tube(7 / 8, 5 / 8)},
                ],
            }
        ],
        "supports": [
            {"shaft": "AB", "x": 0, "kind": "fixed"},
            {"shaft": "AB", "x": 10, "kind": "fixed"},
        ],
        "load_cases": [{"name": "given", "torques": [{"shaft": "AB", "x": 5, "torque": 90}]}],
    }
    results = solve(parse_case(case))
    document = results_document(results)
    reactions = document["results"][0]["reactions"]  # in the file's units: lbf·ft
    assert reactions[0] == pytest.approx(-51.7, abs=0.05)
    assert reactions[1] == pytest.approx(-38.3, abs=0.05)
    j_a, j_b = 0.875**4, 0.875**4 - 0.625**4
    assert reactions[0] == pytest.approx(-90 * j_a / (j_a + j_b), rel=1e-10)
    # In SI the same reaction is 51.73 lbf·ft = 51.73·1.3558179 N·m (1 lbf·ft = 0.3048 m ×
    # 4.4482216152605 N, exact by definition).
    lbf_ft = 0.3048 * 4.4482216152605
    assert results["given"].reactions[0] == pytest.approx(reactions[0] * lbf_ft, rel=1e-12)


PHILPOT = {
    "units": {"length": "mm", "torque": "kN*m", "stress": "GPa", "angle": "deg"},
    "materials": {"stainless": {"shear_modulus": 86}, "bronze": {"shear_modulus": 38}},
    "shafts": [
        {
            "id": "shaft",
            "segments": [
                {"length": 2000, "material": "stainless", "section": tube(75, 55)},
                {"length": 800, "material": "bronze", "section": solid(75)},
            ],
        }
    ],
}


def test_philpot_m6_23_prescribed_rotation_at_the_joint():
    # Philpot, Mechanics of Materials, companion example M6.23: tube 75/55 mm (G 86 GPa,
    # L 2.0 m) + solid 75 mm (G 38 GPa, L 0.8 m), fixed at both far ends; torque at the joint
    # for 3° there → T = 12.70 kN·m, τ₁ = 84.43 MPa, τ₂ = 93.27 MPa.
    # Modelled with a fixed support at the joint whose prescribed rotation is 3°: that support
    # supplies the joint torque, so T = R_joint (the torque it exerts on the shaft, design §2).
    # By hand: k₁ = G₁J₁/L₁ = 94 942, k₂ = 147 550 N·m/rad; T = (k₁ + k₂)·(π/60) = 12.697 kN·m.
    case = {
        **PHILPOT,
        "supports": [
            {"shaft": "shaft", "x": 0, "kind": "fixed"},
            {"shaft": "shaft", "x": 2000, "kind": "fixed", "rotation": 3},
            {"shaft": "shaft", "x": 2800, "kind": "fixed"},
        ],
        "load_cases": [{"name": "3 deg at the joint"}],
    }
    results = solve(parse_case(case))
    document = results_document(results)["results"][0]
    joint_torque = document["reactions"][1]  # kN·m
    assert joint_torque == pytest.approx(12.70, abs=0.005)
    assert sum(document["reactions"]) == pytest.approx(0.0, abs=1e-12)
    values = results["3 deg at the joint"].shafts["shaft"]
    tube_part, solid_part = values.x < 2.0 - 1e-9, values.x > 2.0 + 1e-9
    assert values.shear_stress[tube_part].max() / 1e6 == pytest.approx(84.43, abs=0.005)
    assert values.shear_stress[solid_part].max() / 1e6 == pytest.approx(93.27, abs=0.005)
    assert values.angle[stations_at(values, 2.0)] == pytest.approx(math.radians(3.0), rel=1e-15)


def test_philpot_m6_23_by_unit_torque_and_scaling():
    # The same example the other way: a unit torque at the joint, then scale to 3° (linearity).
    case = {
        **PHILPOT,
        "supports": [
            {"shaft": "shaft", "x": 0, "kind": "fixed"},
            {"shaft": "shaft", "x": 2800, "kind": "fixed"},
        ],
        "load_cases": [{"name": "unit", "torques": [{"shaft": "shaft", "x": 2000, "torque": 1}]}],
    }
    results = solve(parse_case(case))
    values = results["unit"].shafts["shaft"]
    joint_angle = float(values.angle[stations_at(values, 2.0)[0]])  # rad per kN·m
    scale = math.radians(3.0) / joint_angle
    assert scale == pytest.approx(12.70, abs=0.005)  # kN·m
    tube_part, solid_part = values.x < 2.0 - 1e-9, values.x > 2.0 + 1e-9
    assert scale * values.shear_stress[tube_part].max() / 1e6 == pytest.approx(84.43, abs=0.005)
    assert scale * values.shear_stress[solid_part].max() / 1e6 == pytest.approx(93.27, abs=0.005)


def test_hibbeler_gear_pair_angle_at_a():
    # Hibbeler, Mechanics of Materials (from memory): d = 20 mm both shafts, G = 80 GPa; 45 N·m at
    # A on AB (L = 2 m, free to turn in bearings), gear B (r = 150 mm) meshes with gear C
    # (r = 75 mm) on CD (L = 1.5 m, fixed at D) → θ_A = 0.0850 rad. By hand: F = 45/0.15 = 300 N,
    # T_CD = 22.5 N·m, φ_C = 22.5·1.5/GJ = 0.026857, φ_B = φ_C·75/150, φ_A/B = 45·2/GJ → 0.08505.
    case = {
        "units": {"length": "mm", "torque": "N*m", "stress": "GPa", "angle": "rad"},
        "materials": {"steel": {"shear_modulus": 80}},
        "shafts": [
            {"id": "AB", "segments": [{"length": 2000, "material": "steel", "section": solid(20)}]},
            {"id": "CD", "segments": [{"length": 1500, "material": "steel", "section": solid(20)}]},
        ],
        "supports": [{"shaft": "CD", "x": 1500, "kind": "fixed"}],
        "gears": [
            {
                "a": {"shaft": "AB", "x": 2000, "radius": 150},
                "b": {"shaft": "CD", "x": 0, "radius": 75},
            }
        ],
        "load_cases": [{"name": "given", "torques": [{"shaft": "AB", "x": 0, "torque": 45}]}],
    }
    results = solve(parse_case(case))
    angle_a = float(results["given"].shafts["AB"].angle[0])
    assert round(angle_a, 4) == pytest.approx(0.0850, abs=1e-12)  # 3 significant figures
    rigidity = 80e9 * math.pi * 0.020**4 / 32
    by_hand = 45 * 2 / rigidity + (22.5 * 1.5 / rigidity) * 75 / 150
    assert angle_a == pytest.approx(by_hand, rel=1e-12)
    # The mesh gives CD 45·75/150 = 22.5 N·m, taken by the support at D.
    assert abs(results["given"].reactions[0]) == pytest.approx(22.5, rel=1e-12)


# --- a large system against an independent dense solution --------------------------------------

G_STEEL = 79.3e9  # Shigley's Mechanical Engineering Design, Table A-5, carbon steel
G_BRONZE = 41.4e9  # Shigley's Mechanical Engineering Design, Table A-5, phosphor bronze

# (length m, G Pa, outer diameter m, inner diameter m) per segment; every segment prismatic.
SHAFTS = {
    "input": [(0.5, G_STEEL, 0.040, 0.0), (0.7, G_STEEL, 0.050, 0.030)],
    "counter": [(0.9, G_BRONZE, 0.030, 0.0)],
    "output": [
        (0.6, G_STEEL, 0.035, 0.0),
        (0.4, G_STEEL, 0.045, 0.025),
        (0.5, G_BRONZE, 0.045, 0.0),
    ],
}
# (shaft, x, kind, stiffness N·m/rad (springs only), prescribed rotation rad)
SUPPORTS = [
    ("input", 0.0, "fixed", 0.0, 0.0),
    ("input", 0.3, "spring", 2.0e4, 0.01),
    ("counter", 0.45, "fixed", 0.0, 0.0),
    ("output", 0.0, "fixed", 0.0, 0.002),
    ("output", 1.5, "fixed", 0.0, 0.0),
    ("output", 0.8, "spring", 5.0e3, 0.0),
]
# (shaft a, x a, radius a, shaft b, x b, radius b, mesh)
GEARS = [
    ("input", 1.2, 0.10, "counter", 0.0, 0.05, "external"),
    ("counter", 0.9, 0.06, "output", 0.3, 0.12, "internal"),
]
POINT_TORQUES = [("input", 0.8, 500.0), ("counter", 0.2, -150.0), ("output", 1.2, 300.0)]
# (shaft, start, end, intensity at start, at end) — each inside one segment
DISTRIBUTED = [("input", 0.5, 1.2, 200.0, 200.0), ("output", 1.0, 1.5, 100.0, -50.0)]


def _large_case() -> dict[str, Any]:
    def section(outer, inner):
        return tube(outer, inner) if inner else solid(outer)

    materials = {"steel": {"shear_modulus": G_STEEL}, "bronze": {"shear_modulus": G_BRONZE}}
    name = {G_STEEL: "steel", G_BRONZE: "bronze"}
    return {
        "materials": materials,
        "shafts": [
            {
                "id": shaft,
                "segments": [
                    {"length": length, "material": name[g], "section": section(outer, inner)}
                    for length, g, outer, inner in segments
                ],
            }
            for shaft, segments in SHAFTS.items()
        ],
        "supports": [
            {
                "shaft": shaft,
                "x": x,
                "kind": kind,
                "rotation": rotation,
                **({"stiffness": stiffness} if kind == "spring" else {}),
            }
            for shaft, x, kind, stiffness, rotation in SUPPORTS
        ],
        "gears": [
            {
                "a": {"shaft": sa, "x": xa, "radius": ra},
                "b": {"shaft": sb, "x": xb, "radius": rb},
                "mesh": mesh,
            }
            for sa, xa, ra, sb, xb, rb, mesh in GEARS
        ],
        "load_cases": [
            {
                "name": "all",
                "torques": [{"shaft": s, "x": x, "torque": t} for s, x, t in POINT_TORQUES],
                "distributed": [
                    {"shaft": s, "start": a, "end": b, "intensity_start": ta, "intensity_end": tb}
                    for s, a, b, ta, tb in DISTRIBUTED
                ],
            }
        ],
    }


def _dense_reference():
    """Solve the large system independently: dense numpy, constraints eliminated by a null space.

    Each shaft gets nodes at every segment end, support, gear, load point and load end; between
    nodes a prismatic element of stiffness G·J/L (J = π(D⁴ − d⁴)/32, Gere & Goodno, 8th ed.,
    §3.3). A linearly varying distributed torque t_a → t_b on an element gives the exact nodal
    loads L(2t_a + t_b)/6 and L(t_a + 2t_b)/6 (shape functions of a prismatic element are exact).
    Fixed supports θ = θ₀ and meshes r_a·θ_a ± r_b·θ_b = 0 form C·θ = c; with θ = θ_p + N·q
    (N spanning the null space of C), Nᵀ K N q = Nᵀ(f − K θ_p). The constraint torques on each
    node are then K θ − f.
    """
    nodes: dict[str, list[float]] = {}
    for shaft, segments in SHAFTS.items():
        points = {0.0, *np.cumsum([s[0] for s in segments]).round(12)}
        points |= {x for s, x, *_ in SUPPORTS if s == shaft}
        points |= {x for s, x, _ in POINT_TORQUES if s == shaft}
        points |= {g[1] for g in GEARS if g[0] == shaft} | {g[4] for g in GEARS if g[3] == shaft}
        points |= {v for s, a, b, *_ in DISTRIBUTED if s == shaft for v in (a, b)}
        nodes[shaft] = sorted(float(p) for p in points)
    index: dict[tuple[str, float], int] = {}
    for shaft, xs in nodes.items():
        for x in xs:
            index[(shaft, x)] = len(index)
    size = len(index)
    stiffness = np.zeros((size, size))
    loads = np.zeros(size)
    elements = []  # (shaft, node a, node b, k, length, t_a, t_b)

    def intensity(shaft, x):
        total = 0.0
        for s, a, b, ta, tb in DISTRIBUTED:
            if s == shaft and a - 1e-12 <= x <= b + 1e-12:
                total += ta + (tb - ta) * (x - a) / (b - a)
        return total

    for shaft, xs in nodes.items():
        ends = np.cumsum([s[0] for s in SHAFTS[shaft]])
        for xa, xb in itertools.pairwise(xs):
            middle = 0.5 * (xa + xb)
            _, g, outer, inner = SHAFTS[shaft][int(np.searchsorted(ends, middle))]
            k = g * math.pi * (outer**4 - inner**4) / 32 / (xb - xa)
            a, b = index[(shaft, xa)], index[(shaft, xb)]
            stiffness[np.ix_([a, b], [a, b])] += k * np.array([[1, -1], [-1, 1]])
            inside = any(s == shaft and lo < middle < hi for s, lo, hi, _, _ in DISTRIBUTED)
            ta, tb = (intensity(shaft, xa), intensity(shaft, xb)) if inside else (0.0, 0.0)
            span = xb - xa
            loads[a] += span * (2 * ta + tb) / 6
            loads[b] += span * (ta + 2 * tb) / 6
            elements.append((shaft, a, b, k, span, ta, tb))
    for shaft, x, torque in POINT_TORQUES:
        loads[index[(shaft, x)]] += torque
    rows, values = [], []
    for shaft, x, kind, k, rotation in SUPPORTS:
        node = index[(shaft, x)]
        if kind == "spring":
            stiffness[node, node] += k
            loads[node] += k * rotation
        else:
            row = np.zeros(size)
            row[node] = 1.0
            rows.append(row)
            values.append(rotation)
    for sa, xa, ra, sb, xb, rb, mesh in GEARS:
        row = np.zeros(size)
        row[index[(sa, xa)]] = ra
        row[index[(sb, xb)]] = rb if mesh == "external" else -rb
        rows.append(row)
        values.append(0.0)
    constraints, prescribed = np.array(rows), np.array(values)
    particular = np.linalg.lstsq(constraints, prescribed, rcond=None)[0]
    _, singular, vt = np.linalg.svd(constraints)
    rank = int((singular > 1e-12 * singular.max()).sum())
    null = vt[rank:].T
    reduced = null.T @ stiffness @ null
    q = np.linalg.solve(reduced, null.T @ (loads - stiffness @ particular))
    angle = particular + null @ q
    constraint_torque = stiffness @ angle - loads
    return index, angle, constraint_torque, elements


def test_large_geared_system_against_dense_null_space_solution():
    index, angle, constraint_torque, elements = _dense_reference()
    assert len(index) == 16  # a system with many unknowns (16 nodes, 6 constraints)
    results = solve(parse_case(_large_case()))["all"]

    scale_torque = max(abs(t) for *_, t in POINT_TORQUES)
    for number, (shaft, x, kind, k, rotation) in enumerate(SUPPORTS):
        node = index[(shaft, x)]
        expected = -k * (angle[node] - rotation) if kind == "spring" else constraint_torque[node]
        assert results.reactions[number] == pytest.approx(expected, abs=1e-9 * scale_torque)
    for number, (sa, xa, _, sb, xb, _, _) in enumerate(GEARS):
        assert results.gear_torques[number][0] == pytest.approx(
            constraint_torque[index[(sa, xa)]], abs=1e-9 * scale_torque
        )
        assert results.gear_torques[number][1] == pytest.approx(
            constraint_torque[index[(sb, xb)]], abs=1e-9 * scale_torque
        )
    scale_angle = np.abs(angle).max()
    for (shaft, x), node in index.items():
        values = results.shafts[shaft]
        for station in stations_at(values, x):
            assert values.angle[station] == pytest.approx(angle[node], abs=1e-10 * scale_angle)
    # Internal torque just right of each element start: T(0⁺) = k·(θ_b − θ_a) + L(2t_a + t_b)/6.
    reverse = {node: key for key, node in index.items()}
    for shaft, a, b, k, span, ta, tb in elements:
        expected = k * (angle[b] - angle[a]) + span * (2 * ta + tb) / 6
        values = results.shafts[shaft]
        station = stations_at(values, reverse[a][1])[-1]
        assert values.torque[station] == pytest.approx(expected, abs=1e-9 * scale_torque)
