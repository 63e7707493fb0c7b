"""Torsional vibration against closed forms, Holzer's method, scipy and sectionproperties.

Sources, each also named beside its check:

* S. S. Rao, *Mechanical Vibrations* (torsional vibration; chapters from memory): two rotors on a
  shaft of stiffness k, free–free, ω² = k(J₁ + J₂)/(J₁J₂) with amplitudes J₁θ₁ = −J₂θ₂; three
  equal rotors on two equal shafts, free–free, ω = 0, √(k/J), √(3k/J); Holzer's method, written
  out below as an independent reference; a uniform shaft fixed at one end and free at the other,
  ωₙ = (2n − 1)·π/(2L)·√(G/ρ). The same formulas are listed in /work/shared/references.md.
* Cook, Malkus, Plesha & Witt, *Concepts and Applications of Finite Element Analysis*, 4th ed.,
  ch. 11 (from memory): consistent mass μL/6·[[2, 1], [1, 2]] of a two-node element, which gives
  upper bounds converging as h²; the discrete dispersion relation of a uniform mesh,
  ω_h² = (6G/(ρh²))·(1 − cos kh)/(2 + cos kh), is derived by hand below from the assembled
  difference equation (θ_j = sin(k·x_j) satisfies every interior row and the free-end row when
  cos kL = 0).
* Gears: the referred system of a geared pair, J_ref = J·n², k_ref = k·n² with n = r_a/r_b the
  speed ratio (Rao, *Mechanical Vibrations*, geared systems, from memory), built here as a single
  equivalent shaft; and scipy.linalg.null_space of the constraint matrix as an independent way to
  impose the meshes.
* sympy: the consistent mass integral of a tapered element, ∫ρJ(x)NᵢNⱼ dx, done symbolically.
* sectionproperties: polar moments of area (Iₓₓ + I_yy about the centroid) of non-circular
  sections; Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.3 (J = π(D⁴ − d⁴)/32).
* The ±20 % separation margin is common practice, no source.
"""

from __future__ import annotations

import copy
import json
import math
from collections.abc import Callable, Sequence
from typing import Any

import numpy as np
import pytest
import scipy.linalg
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq
from sectionproperties.analysis.section import Section as FESection
from sectionproperties.pre.geometry import Geometry
from sectionproperties.pre.library import rectangular_hollow_section, rectangular_section
from shapely.geometry import Polygon

from workbench import cli
from workbench.case.errors import InputError
from workbench.case.schema import case_schema
from workbench.design.checks import run_checks
from workbench.solver.analysis import build_mesh, torsion_stiffness_matrix
from workbench.solver.io import case_to_dict, parse_case
from workbench.solver.model import Model
from workbench.solver.modes import (
    Modes,
    constraint_transformation,
    natural_modes,
    torsion_mass_matrix,
)
from workbench.solver.noncircular import Rectangle
from workbench.solver.thin_walls import (
    Box,
    EllipticalTube,
    ThinWalledClosed,
    ThinWalledOpen,
    Wall,
)

#: Carbon steel, Shigley's *Mechanical Engineering Design*, Table A-5: G = 79.3 GPa; density
#: 7850 kg/m³ (a typical textbook value, from memory).
STEEL_SHEAR_MODULUS = 79.3e9
STEEL_DENSITY = 7850.0

#: Closed forms and independent references are met to rounding.
EXACT = 1e-9


def polar_moment(diameter: float) -> float:
    """J = πd⁴/32 (Gere & Goodno, 8th ed., §3.3)."""
    return math.pi * diameter**4 / 32.0


def segment(length: float, diameter: float, material: str = "steel") -> dict[str, Any]:
    return {
        "length": length,
        "material": material,
        "section": {"shape": "solid", "diameter": diameter},
    }


def case(
    shafts: dict[str, Sequence[dict[str, Any]]],
    *,
    supports: Sequence[dict[str, Any]] = (),
    discs: Sequence[tuple[str, float, float]] = (),
    gears: Sequence[dict[str, Any]] = (),
    density: float | None = None,
    materials: dict[str, dict[str, float]] | None = None,
    **extra: Any,
) -> dict[str, Any]:
    """A case file (SI) with one empty load case: free vibration needs no loads."""
    steel: dict[str, float] = {"shear_modulus": STEEL_SHEAR_MODULUS}
    if density is not None:
        steel["density"] = density
    return {
        "materials": {"steel": steel, **(materials or {})},
        "shafts": [{"id": name, "segments": list(parts)} for name, parts in shafts.items()],
        "supports": list(supports),
        "gears": list(gears),
        "discs": [{"shaft": s, "x": x, "inertia": j} for s, x, j in discs],
        "load_cases": [{"name": "none"}],
        **extra,
    }


def flexible(modes: Modes) -> np.ndarray:
    return np.asarray(modes.angular_frequency[~modes.rigid_body])


def disc_angles(modes: Modes, mode: int, model: Model) -> np.ndarray:
    """A mode's rotation at each disc, in disc order."""
    nodes = [modes.mesh.node_of(model.shaft_number(d.shaft), d.x) for d in model.discs]
    return np.asarray(modes.shapes[mode, nodes])


# --- discs on massless shafts ------------------------------------------------------------------


@pytest.mark.parametrize(("inertia_1", "inertia_2"), [(0.5, 1.5), (2.0, 2.0), (0.01, 3.0)])
def test_two_discs_free_free(inertia_1: float, inertia_2: float) -> None:
    # Source: Rao, Mechanical Vibrations, two-rotor system: ω² = k(J₁ + J₂)/(J₁J₂), one rigid-body
    # mode at 0, and J₁θ₁ + J₂θ₂ = 0 in the flexible mode (no net angular momentum).
    length, diameter = 0.8, 0.05
    stiffness = STEEL_SHEAR_MODULUS * polar_moment(diameter) / length
    model = parse_case(
        case(
            {"s": [segment(length, diameter)]},
            discs=[("s", 0.0, inertia_1), ("s", length, inertia_2)],
        )
    )
    modes = natural_modes(model)
    assert len(modes) == 2
    assert list(modes.rigid_body) == [True, False]
    assert modes.angular_frequency[0] == 0.0
    expected = math.sqrt(stiffness * (inertia_1 + inertia_2) / (inertia_1 * inertia_2))
    assert modes.angular_frequency[1] == pytest.approx(expected, rel=EXACT)
    assert modes.frequency[1] == pytest.approx(expected / (2 * math.pi), rel=EXACT)
    np.testing.assert_allclose(disc_angles(modes, 0, model), [1.0, 1.0], rtol=EXACT)
    first, second = disc_angles(modes, 1, model)
    assert inertia_1 * first + inertia_2 * second == pytest.approx(0.0, abs=EXACT)
    assert modes.complete


def test_three_equal_discs_free_free() -> None:
    # Source: Rao, Mechanical Vibrations, three equal rotors on two equal shafts, free–free:
    # ω = 0, √(k/J), √(3k/J), with shapes (1, 1, 1), (1, 0, −1), (1, −2, 1) (from memory; the
    # shapes follow by hand from the 3×3 system).
    length, diameter, inertia = 0.5, 0.04, 0.3
    stiffness = STEEL_SHEAR_MODULUS * polar_moment(diameter) / length
    model = parse_case(
        case(
            {"s": [segment(length, diameter), segment(length, diameter)]},
            discs=[("s", 0.0, inertia), ("s", length, inertia), ("s", 2 * length, inertia)],
        )
    )
    modes = natural_modes(model)
    root = math.sqrt(stiffness / inertia)
    np.testing.assert_allclose(
        modes.angular_frequency, [0.0, root, math.sqrt(3) * root], rtol=EXACT
    )
    assert list(modes.rigid_body) == [True, False, False]
    for mode, shape in ((0, [1, 1, 1]), (1, [1, 0, -1]), (2, [1, -2, 1])):
        angles = disc_angles(modes, mode, model)
        expected = np.array(shape, dtype=float) / max(shape, key=abs)
        np.testing.assert_allclose(angles, expected, atol=1e-9)


# --- Holzer's method -----------------------------------------------------------------------------


def holzer(
    omega: float, inertias: Sequence[float], stiffnesses: Sequence[float]
) -> tuple[float, list[float]]:
    """Holzer's table for a chain fixed at one end: fixed —k₀— J₀ —k₁— J₁ … J_{n−1} (free).

    Start at the free end with θ = 1; the torque in the shaft next towards the fixed end is the
    sum of the discs' inertia torques ω²Jθ beyond it, and θ drops by that torque over k. The
    residual is θ at the fixed end, zero at a natural frequency (Rao, Mechanical Vibrations,
    Holzer's method).
    """
    angle, torque = 1.0, 0.0
    angles = []
    for inertia, stiffness in zip(reversed(inertias), reversed(stiffnesses), strict=True):
        angles.append(angle)
        torque += omega**2 * inertia * angle
        angle -= torque / stiffness
    return angle, angles[::-1]


def holzer_roots(inertias: Sequence[float], stiffnesses: Sequence[float]) -> list[float]:
    """Every natural frequency by scanning Holzer's residual for sign changes, then brentq."""
    # Gershgorin: ω² ≤ max over discs of (sum of |row of K|)/J.
    k = [*stiffnesses, 0.0]
    bound = math.sqrt(max(2 * (k[j] + k[j + 1]) / inertias[j] for j in range(len(inertias))))
    grid = np.linspace(1e-9 * bound, 1.01 * bound, 40001)
    residual = np.array([holzer(w, inertias, stiffnesses)[0] for w in grid])
    changes = np.flatnonzero(np.sign(residual[:-1]) != np.sign(residual[1:]))
    return [
        brentq(
            lambda w: holzer(w, inertias, stiffnesses)[0],
            grid[i],
            grid[i + 1],
            xtol=1e-14,
            rtol=1e-15,
        )
        for i in changes
    ]


def chain_model(
    lengths: Sequence[float], diameters: Sequence[float], inertias: Sequence[float]
) -> Model:
    """A stepped massless shaft fixed at x = 0 with a disc at each segment's end."""
    ends = np.cumsum(lengths)
    return parse_case(
        case(
            {"s": [segment(span, d) for span, d in zip(lengths, diameters, strict=True)]},
            supports=[{"shaft": "s", "x": 0.0}],
            discs=[("s", float(x), j) for x, j in zip(ends, inertias, strict=True)],
        )
    )


def test_four_disc_chain_against_holzer() -> None:
    # Source: Holzer's method (Rao, Mechanical Vibrations), implemented above; the stiffness of
    # each shaft k = GJ/L with J = πd⁴/32 (Gere & Goodno, 8th ed., §3.3).
    lengths, diameters = [0.3, 0.4, 0.25, 0.35], [0.06, 0.05, 0.045, 0.04]
    inertias = [0.8, 0.3, 0.5, 0.2]
    stiffnesses = [
        STEEL_SHEAR_MODULUS * polar_moment(d) / span
        for span, d in zip(lengths, diameters, strict=True)
    ]
    roots = holzer_roots(inertias, stiffnesses)
    assert len(roots) == 4
    model = chain_model(lengths, diameters, inertias)
    modes = natural_modes(model)
    assert not modes.rigid_body.any()
    np.testing.assert_allclose(modes.angular_frequency, roots, rtol=1e-10)
    for mode, omega in enumerate(roots):
        _, angles = holzer(omega, inertias, stiffnesses)
        expected = np.array(angles) / max(angles, key=abs)
        np.testing.assert_allclose(disc_angles(modes, mode, model), expected, atol=1e-8)


@settings(max_examples=25, deadline=None)
@given(
    st.lists(st.floats(0.1, 1.0), min_size=4, max_size=4),
    st.lists(st.floats(0.02, 0.08), min_size=4, max_size=4),
    st.lists(st.floats(0.01, 2.0), min_size=4, max_size=4),
)
def test_any_chain_makes_holzers_residual_change_sign(
    lengths: list[float], diameters: list[float], inertias: list[float]
) -> None:
    # Source: Holzer's method (Rao, Mechanical Vibrations): at each natural frequency the
    # residual at the fixed end passes through zero.
    stiffnesses = [
        STEEL_SHEAR_MODULUS * polar_moment(d) / span
        for span, d in zip(lengths, diameters, strict=True)
    ]
    modes = natural_modes(chain_model(lengths, diameters, inertias))
    assert len(modes) == 4
    for omega in modes.angular_frequency:
        below, _ = holzer(omega * (1 - 1e-7), inertias, stiffnesses)
        above, _ = holzer(omega * (1 + 1e-7), inertias, stiffnesses)
        assert below * above < 0.0


# --- the continuous shaft -------------------------------------------------------------------------


def fixed_free_shaft(length: float, diameter: float) -> Model:
    return parse_case(
        case(
            {"s": [segment(length, diameter)]},
            supports=[{"shaft": "s", "x": 0.0}],
            density=STEEL_DENSITY,
        )
    )


def test_continuous_fixed_free_shaft_converges_as_h_squared_from_above() -> None:
    # Source: Rao, Mechanical Vibrations, uniform shaft fixed–free: ωₙ = (2n − 1)π/(2L)·√(G/ρ);
    # Cook et al., Concepts and Applications of FEA, 4th ed., ch. 11: consistent mass gives upper
    # bounds, error ∝ h². Observed relative errors (modes 1, 2, 3):
    #   N = 4:  6.4e-3  5.8e-2  1.5e-1
    #   N = 8:  1.6e-3  1.5e-2  4.0e-2
    #   N = 16: 4.0e-4  3.6e-3  1.0e-2
    #   N = 32: 1.0e-4  9.0e-4  2.5e-3
    #   N = 64: 2.5e-5  2.3e-4  6.3e-4
    length, diameter = 1.2, 0.05
    model = fixed_free_shaft(length, diameter)
    wave = math.sqrt(STEEL_SHEAR_MODULUS / STEEL_DENSITY)
    exact = np.array([(2 * n - 1) * math.pi / (2 * length) * wave for n in (1, 2, 3)])
    errors = []
    for pieces in (4, 8, 16, 32, 64):
        modes = natural_modes(model, count=3, elements_per_segment=pieces)
        assert not modes.rigid_body.any()
        error = modes.angular_frequency[:3] / exact - 1.0
        assert np.all(error > 0.0)  # upper bounds
        errors.append(error)
    errors_array = np.array(errors)
    order = np.log2(errors_array[:-1] / errors_array[1:])
    assert np.all((order[1:] > 1.95) & (order[1:] < 2.05))  # h² from N = 8 on
    assert np.all(errors_array[-1] < 1e-3)


@pytest.mark.parametrize(("pieces", "method"), [(12, "dense"), (600, "sparse"), (60, "sparse")])
def test_uniform_mesh_meets_the_discrete_dispersion_relation(pieces: int, method: str) -> None:
    # Source: derived by hand from the assembled rows (Cook et al., ch. 11, consistent mass):
    # ω_h² = (6G/(ρh²))·(1 − cos kh)/(2 + cos kh), kₙ = (2n − 1)π/(2L), exact for the mesh.
    length, diameter = 0.9, 0.03
    modes = natural_modes(
        fixed_free_shaft(length, diameter), count=6, elements_per_segment=pieces, method=method
    )
    step = length / pieces
    wave = np.array([(2 * n - 1) * math.pi / (2 * length) for n in range(1, 7)])
    cosine = np.cos(wave * step)
    expected = np.sqrt(
        6 * STEEL_SHEAR_MODULUS / (STEEL_DENSITY * step**2) * (1 - cosine) / (2 + cosine)
    )
    np.testing.assert_allclose(modes.angular_frequency[:6], expected, rtol=1e-9)
    # The shape is the sine itself at the nodes.
    x, angle = modes.shape(0, "s")
    np.testing.assert_allclose(angle, np.sin(wave[0] * x) / np.sin(wave[0] * length), atol=1e-7)


@pytest.mark.parametrize(("pieces", "method"), [(40, "dense"), (200, "sparse")])
def test_every_mode_up_to_a_frequency_and_the_first_above(pieces: int, method: str) -> None:
    # The same discrete dispersion relation as above; ``up_to`` between modes 25 and 26 must
    # bring back modes 1 to 26, however few ``count`` asks for.
    length, diameter = 0.9, 0.03
    step = length / pieces
    wave = np.array([(2 * n - 1) * math.pi / (2 * length) for n in range(1, 27)])
    cosine = np.cos(wave * step)
    expected = np.sqrt(
        6 * STEEL_SHEAR_MODULUS / (STEEL_DENSITY * step**2) * (1 - cosine) / (2 + cosine)
    )
    modes = natural_modes(
        fixed_free_shaft(length, diameter),
        count=1,
        up_to=float(expected[24] + expected[25]) / 2,
        elements_per_segment=pieces,
        method=method,
    )
    np.testing.assert_allclose(modes.angular_frequency, expected[:26], rtol=1e-8)
    assert not modes.complete


def test_free_free_shaft_has_one_rigid_body_mode_then_n_pi_over_l() -> None:
    # Source: Rao, Mechanical Vibrations, uniform shaft free at both ends: ωₙ = nπ/L·√(G/ρ),
    # n = 0 the rigid-body rotation.
    length = 1.5
    model = parse_case(case({"s": [segment(length, 0.04)]}, density=STEEL_DENSITY))
    modes = natural_modes(model, count=4, elements_per_segment=400)
    assert list(modes.rigid_body) == [True, False, False, False]
    wave = math.sqrt(STEEL_SHEAR_MODULUS / STEEL_DENSITY)
    exact = np.array([n * math.pi / length * wave for n in (1, 2, 3)])
    # Upper bounds within the mesh's (kh)²/24 (2.3e-5 for mode 3 at 400 elements).
    error = modes.angular_frequency[1:] / exact - 1.0
    assert np.all((error > 0.0) & (error < 3e-5))
    np.testing.assert_allclose(modes.shapes[0], 1.0)


# --- mass matrix ----------------------------------------------------------------------------------


def test_consistent_mass_of_prismatic_tapered_and_layered_elements_against_sympy() -> None:
    # Source: Cook et al., Concepts and Applications of FEA, 4th ed., ch. 11: M = ∫μNᵀN dx with
    # N = [1 − ξ, ξ]; μ = ρJ(x), J = π(d(x)⁴ − bore⁴)/32 (Gere & Goodno §3.3), integrated in sympy.
    length, start, end, bore = 0.4, 0.06, 0.035, 0.01
    data = case(
        {
            "s": [
                segment(0.3, 0.05),
                {
                    "length": length,
                    "material": "steel",
                    "section": {
                        "shape": "tapered",
                        "diameter_start": start,
                        "diameter_end": end,
                        "bore": bore,
                    },
                },
                {
                    "length": 0.2,
                    "layers": [
                        {
                            "material": "steel",
                            "section": {
                                "shape": "tube",
                                "outer_diameter": 0.07,
                                "inner_diameter": 0.05,
                            },
                        },
                        {"material": "bronze", "section": {"shape": "solid", "diameter": 0.05}},
                    ],
                },
            ]
        },
        density=STEEL_DENSITY,
        materials={"bronze": {"shear_modulus": 38e9, "density": 8830.0}},
    )
    model = parse_case(data)
    mesh = build_mesh(model)
    assert len(mesh.element_length) == 3
    mass = torsion_mass_matrix(model, mesh).toarray()
    xi = sympy.symbols("xi")
    shape = [1 - xi, xi]

    def consistent(mu: sympy.Expr, element_length: float) -> np.ndarray:
        return np.array(
            [
                [float(sympy.integrate(mu * a * b * element_length, (xi, 0, 1))) for b in shape]
                for a in shape
            ]
        )

    pi = sympy.pi
    prismatic = consistent(sympy.Float(STEEL_DENSITY) * pi * sympy.Float(0.05) ** 4 / 32, 0.3)
    diameter = start + (end - start) * xi
    tapered = consistent(STEEL_DENSITY * pi * (diameter**4 - bore**4) / 32, length)
    layered = consistent(
        STEEL_DENSITY * pi * (sympy.Float(0.07) ** 4 - sympy.Float(0.05) ** 4) / 32
        + 8830 * pi * sympy.Float(0.05) ** 4 / 32,
        0.2,
    )
    expected = np.zeros((4, 4))
    for number, block in enumerate((prismatic, tapered, layered)):
        expected[number : number + 2, number : number + 2] += block
    np.testing.assert_allclose(mass, expected, rtol=1e-12, atol=1e-18)
    # The prismatic block is μL/6·[[2, 1], [1, 2]] itself.
    mu = STEEL_DENSITY * polar_moment(0.05)
    np.testing.assert_allclose(prismatic, mu * 0.3 / 6 * np.array([[2, 1], [1, 2]]), rtol=1e-13)


# --- gears ----------------------------------------------------------------------------------------


def geared_case(mesh_kind: str, density: float | None, supported: bool = True) -> dict[str, Any]:
    """Shaft "a" (fixed at 0 when supported) drives shaft "b" through a mesh r_a = 40, r_b = 100 mm."""
    data = case(
        {"a": [segment(0.5, 0.04)], "b": [segment(0.8, 0.06)]},
        supports=[{"shaft": "a", "x": 0.0}] if supported else [],
        gears=[
            {
                "a": {"shaft": "a", "x": 0.5, "radius": 0.04},
                "b": {"shaft": "b", "x": 0.0, "radius": 0.1},
                "mesh": mesh_kind,
            }
        ],
        discs=[("a", 0.5, 0.004), ("b", 0.0, 0.06), ("b", 0.8, 0.9)]
        + ([] if supported else [("a", 0.0, 0.02)]),
        density=density,
    )
    return data


@pytest.mark.parametrize("mesh_kind", ["external", "internal"])
@pytest.mark.parametrize("density", [None, STEEL_DENSITY])
def test_geared_pair_equals_the_referred_single_shaft(
    mesh_kind: str, density: float | None
) -> None:
    # Source: referred system (Rao, Mechanical Vibrations, geared systems, from memory): with the
    # speed ratio n = r_a/r_b, inertia and stiffness of shaft b refer to shaft a as J·n², k·n².
    # Shaft b becomes a segment of the same section and length L_b/n² (k·n²) and, with
    # distributed inertia, density ρ·n⁴ (ρJ·L per element ·n²); the meshes then match element
    # for element, so the frequencies agree to rounding.
    ratio = 0.04 / 0.1
    geared = parse_case(geared_case(mesh_kind, density))
    referred_material = {
        "referred": {
            "shear_modulus": STEEL_SHEAR_MODULUS,
            **({"density": density * ratio**4} if density else {}),
        }
    }
    equivalent = parse_case(
        case(
            {"s": [segment(0.5, 0.04), segment(0.8 / ratio**2, 0.06, "referred")]},
            supports=[{"shaft": "s", "x": 0.0}],
            discs=[
                ("s", 0.5, 0.004 + 0.06 * ratio**2),
                ("s", 0.5 + 0.8 / ratio**2, 0.9 * ratio**2),
            ],
            density=density,
            materials=referred_material,
        )
    )
    ours = natural_modes(geared, count=8)
    reference = natural_modes(equivalent, count=8)
    count = min(len(ours), len(reference))
    assert count >= 2
    np.testing.assert_allclose(
        ours.angular_frequency[:count], reference.angular_frequency[:count], rtol=1e-9
    )
    # θ_b = ∓n·φ along the referred part: compare the end disc against the gear, mode by mode.
    sign = -1.0 if mesh_kind == "external" else 1.0
    for mode in range(2):
        _, angle_a = ours.shape(mode, "a")
        _, angle_b = ours.shape(mode, "b")
        _, angle_s = reference.shape(mode, "s")
        gear_node = np.argmin(np.abs(reference.shape(mode, "s")[0] - 0.5))
        assert angle_b[-1] / angle_a[-1] == pytest.approx(
            sign * ratio * angle_s[-1] / angle_s[gear_node], rel=1e-7
        )


def test_geared_pair_against_a_null_space_basis() -> None:
    # Source: scipy.linalg.null_space of the constraint matrix (fixed rotations and the mesh
    # r_a·θ_a + r_b·θ_b = 0) and scipy.linalg.eig of the projected pencil, which needs neither our
    # elimination nor our condensation of massless rotations (their infinite eigenvalues drop out).
    model = parse_case(geared_case("external", None))
    ours = natural_modes(model)
    mesh = ours.mesh
    stiffness = torsion_stiffness_matrix(model, mesh).toarray()
    mass = torsion_mass_matrix(model, mesh).toarray()
    rows = []
    for support in model.supports:
        row = np.zeros(len(mesh.node_x))
        row[mesh.node_of(model.shaft_number(support.shaft), support.x)] = 1.0
        rows.append(row)
    gear = model.gears[0]
    row = np.zeros(len(mesh.node_x))
    row[mesh.node_of(model.shaft_number("a"), gear.a.x)] = gear.a.radius
    row[mesh.node_of(model.shaft_number("b"), gear.b.x)] = gear.b.radius
    rows.append(row)
    basis = scipy.linalg.null_space(np.array(rows))
    values = scipy.linalg.eig(basis.T @ stiffness @ basis, basis.T @ mass @ basis, right=False)
    finite = np.sort(np.real(values[np.isfinite(values)]))
    np.testing.assert_allclose(ours.angular_frequency, np.sqrt(finite), rtol=1e-8)


def test_free_geared_pair_turns_rigidly_in_the_gear_ratio() -> None:
    # Source: the mesh constraint r_a·θ_a = −r_b·θ_b (design §2) for a rigid rotation; the
    # flexible modes against the null-space reference as above.
    model = parse_case(geared_case("external", STEEL_DENSITY, supported=False))
    modes = natural_modes(model, count=3)
    assert list(modes.rigid_body) == [True, False, False]
    _, angle_a = modes.shape(0, "a")
    _, angle_b = modes.shape(0, "b")
    np.testing.assert_allclose(angle_a, angle_a[0])
    np.testing.assert_allclose(angle_b, -angle_a[0] * 0.04 / 0.1)
    assert max(np.max(np.abs(angle_a)), np.max(np.abs(angle_b))) == 1.0


def test_constraint_transformation_spans_the_null_space() -> None:
    # Source: scipy.linalg.null_space; a chain of three meshes, one at a fixed node, one repeated
    # (implied by the others): T must span exactly the null space of the constraint rows.
    # θ₀ = −2θ₃ and θ₃ = 3θ₅ imply θ₀ + 6θ₅ = 0 (the third row); θ₆ = 0 through the fixed node 1.
    constraints = [(0, 1.0, 3, 2.0), (3, 0.5, 5, -1.5), (0, 1.0, 5, 6.0), (6, 1.0, 1, 3.0)]
    fixed = [1]
    transformation = constraint_transformation(8, fixed, constraints).toarray()
    rows = [np.eye(8)[node] for node in fixed]
    for node_a, c_a, node_b, c_b in constraints:
        row = np.zeros(8)
        row[node_a] += c_a
        row[node_b] += c_b
        rows.append(row)
    reference = scipy.linalg.null_space(np.array(rows))
    assert transformation.shape[1] == reference.shape[1]
    # Same column space: projecting T on the reference basis loses nothing.
    projected = reference @ (reference.T @ transformation)
    np.testing.assert_allclose(projected, transformation, atol=1e-12)
    np.testing.assert_allclose(np.array(rows) @ transformation, 0.0, atol=1e-12)


# --- massless parts, the sparse path --------------------------------------------------------------


def test_massless_segments_between_massive_ones_dense_and_sparse_against_scipy_eig() -> None:
    # Source: scipy.linalg.eig of the full pencil with the fixed rotations removed (singular mass:
    # the massless rotations give infinite eigenvalues, which drop out), against both our dense
    # path (static condensation) and our sparse shift-invert path.
    data = case(
        {
            "s": [
                segment(0.3, 0.05),
                segment(0.4, 0.03, "light"),
                segment(0.3, 0.05),
                segment(0.2, 0.03, "light"),
            ]
        },
        supports=[
            {"shaft": "s", "x": 0.0},
            {"shaft": "s", "x": 0.5, "kind": "spring", "stiffness": 5e3},
            {"shaft": "s", "x": 1.2, "kind": "spring", "stiffness": 2e4},
        ],
        discs=[("s", 0.7, 0.05), ("s", 1.0, 0.02)],
        density=STEEL_DENSITY,
        materials={"light": {"shear_modulus": STEEL_SHEAR_MODULUS}},
    )
    model = parse_case(data)
    dense = natural_modes(model, count=12, elements_per_segment=150, method="dense")
    sparse = natural_modes(model, count=12, elements_per_segment=150, method="sparse")
    np.testing.assert_allclose(sparse.angular_frequency, dense.angular_frequency[:12], rtol=1e-8)
    np.testing.assert_allclose(np.abs(sparse.shapes), np.abs(dense.shapes[:12]), atol=1e-6)
    stiffness = torsion_stiffness_matrix(model, dense.mesh).toarray()[1:, 1:]
    mass = torsion_mass_matrix(model, dense.mesh).toarray()[1:, 1:]
    values = scipy.linalg.eigvals(stiffness, mass)
    finite = np.sort(np.real(values[np.isfinite(values) & (np.abs(values) < 1e30)]))
    np.testing.assert_allclose(dense.angular_frequency[:12], np.sqrt(finite[:12]), rtol=1e-7)


def test_sparse_path_with_a_rigid_body_mode_matches_the_dense_one() -> None:
    # Source: scipy.linalg.eigh (dense) and scipy.sparse.linalg.eigsh (shift-invert at a negative
    # shift) on the same free–free shaft with discs.
    data = case(
        {"s": [segment(0.5, 0.05), segment(0.5, 0.04)]},
        discs=[("s", 0.0, 0.1), ("s", 1.0, 0.3)],
        density=STEEL_DENSITY,
    )
    model = parse_case(data)
    dense = natural_modes(model, count=8, elements_per_segment=150, method="dense")
    sparse = natural_modes(model, count=8, elements_per_segment=150, method="sparse")
    assert list(sparse.rigid_body) == [True] + [False] * 7
    np.testing.assert_allclose(
        sparse.angular_frequency, dense.angular_frequency[:8], rtol=1e-8, atol=0.0
    )


# --- non-circular sections: polar moments ---------------------------------------------------------


def fe_polar_moment(geometry: Geometry, mesh_area: float) -> float:
    """Iₓₓ + I_yy about the centroid, from sectionproperties' geometric analysis."""
    section = FESection(geometry.create_mesh(mesh_sizes=[mesh_area]))
    section.calculate_geometric_properties()
    ixx, iyy, _ = section.get_ic()
    return float(ixx + iyy)


def test_polar_moments_of_rectangle_and_box_against_sectionproperties() -> None:
    # Source: sectionproperties geometric analysis (exact for polygons).
    assert Rectangle(0.08, 0.03).polar_moment == pytest.approx(
        fe_polar_moment(rectangular_section(d=0.03, b=0.08), 1e-4), rel=1e-9
    )
    box = Box(width=0.1, height=0.06, thickness=0.003)
    reference = fe_polar_moment(
        rectangular_hollow_section(d=0.06, b=0.1, t=0.003, r_out=0.0, n_r=1), 1e-4
    )
    assert box.polar_moment == pytest.approx(reference, rel=1e-9)


def test_polar_moment_of_elliptical_tube_against_sectionproperties() -> None:
    # Source: sectionproperties geometric analysis of the uniform wall: the centre-line ellipse
    # (a 512-gon) offset by ±t/2 with shapely; the 512-gon's own error is about 3e-5.
    width, height, thickness = 0.1, 0.05, 0.003
    tube = EllipticalTube(width=width, height=height, thickness=thickness)
    semi_major, semi_minor = (width - thickness) / 2, (height - thickness) / 2
    angle = np.linspace(0.0, 2 * math.pi, 512, endpoint=False)
    centre = Polygon(np.column_stack([semi_major * np.cos(angle), semi_minor * np.sin(angle)]))
    wall = centre.buffer(thickness / 2, join_style="mitre").difference(
        centre.buffer(-thickness / 2, join_style="mitre")
    )
    assert tube.polar_moment == pytest.approx(fe_polar_moment(Geometry(wall), 1e-2), rel=6e-5)


def test_polar_moment_approximations_of_thin_walled_shapes() -> None:
    # Source: sectionproperties geometric analysis. thin_closed takes (Σ l·t)·P²/48 — the
    # centre-line value of any rectangle — so a thin box of uniform wall is met within its t²
    # terms (0.1 % here); thin_open takes each wall about its own middle, exact for one strip and a
    # lower bound for an angle.
    width, height, thickness = 0.12, 0.05, 0.001
    walls = (Wall(width - thickness, thickness), Wall(height - thickness, thickness)) * 2
    cell = ThinWalledClosed(enclosed_area=(width - thickness) * (height - thickness), walls=walls)
    reference = fe_polar_moment(
        rectangular_hollow_section(d=height, b=width, t=thickness, r_out=0.0, n_r=1), 1e-5
    )
    assert cell.polar_moment == pytest.approx(reference, rel=2e-3)
    strip = ThinWalledOpen(walls=(Wall(0.06, 0.004),))
    assert strip.polar_moment == pytest.approx(
        fe_polar_moment(rectangular_section(d=0.004, b=0.06), 1e-5), rel=1e-9
    )
    leg, t = 0.05, 0.003
    angle = Polygon([(0, 0), (leg, 0), (leg, t), (t, t), (t, leg), (0, leg)])
    section = ThinWalledOpen(walls=(Wall(leg, t), Wall(leg - t, t)))
    assert section.polar_moment < fe_polar_moment(Geometry(angle), 1e-5)


def test_circular_polar_moment_is_the_torsion_constant() -> None:
    # Source: Gere & Goodno, 8th ed., §3.3: J = π(D⁴ − d⁴)/32 is both.
    from workbench.solver.sections import SolidCircle, TaperedCircle, Tube

    assert Tube(0.05, 0.03).polar_moment == pytest.approx(
        math.pi * (0.05**4 - 0.03**4) / 32, rel=1e-14
    )
    assert SolidCircle(0.02).polar_moment == pytest.approx(math.pi * 0.02**4 / 32, rel=1e-14)
    np.testing.assert_allclose(
        TaperedCircle(0.05, 0.03).polar_moment_at([0.0, 0.5, 1.0]),
        [polar_moment(d) for d in (0.05, 0.04, 0.03)],
        rtol=1e-14,
    )


# --- separation from running speeds --------------------------------------------------------------

#: Two equal discs J on two equal shafts k, fixed at one end (fixed —k— J —k— J): ω² =
#: (k/J)·(3 ∓ √5)/2, shapes θ₂/θ₁ = (1 ± √5)/2 (Rao, Mechanical Vibrations, two-degree-of-freedom
#: torsional system; the roots by hand from det(K − ω²M) = 0). About 1302 and 3408 rpm here.
CHAIN_LENGTH, CHAIN_DIAMETER, CHAIN_INERTIA = 1.0, 0.05, 1.0
RPM = 2 * math.pi / 60


def chain_case(**extra: Any) -> dict[str, Any]:
    data = case(
        {"s": [segment(CHAIN_LENGTH, CHAIN_DIAMETER), segment(CHAIN_LENGTH, CHAIN_DIAMETER)]},
        supports=[{"shaft": "s", "x": 0.0}],
        discs=[("s", CHAIN_LENGTH, CHAIN_INERTIA), ("s", 2 * CHAIN_LENGTH, CHAIN_INERTIA)],
        **extra,
    )
    data["materials"]["steel"]["yield_strength"] = 350e6
    return data


def chain_omegas() -> tuple[float, float]:
    stiffness = STEEL_SHEAR_MODULUS * polar_moment(CHAIN_DIAMETER) / CHAIN_LENGTH
    base = stiffness / CHAIN_INERTIA
    return math.sqrt(base * (3 - math.sqrt(5)) / 2), math.sqrt(base * (3 + math.sqrt(5)) / 2)


@pytest.mark.parametrize(
    ("band", "margin", "expected"),
    [
        ((2000, 2500), None, [(1, "below", True), (2, "above", True)]),
        ((2800, 3000), None, [(1, "below", True), (2, "inside", False)]),
        ((4500, 5000), None, [(2, "below", True)]),
        ((2800, 3000), 0.1, [(1, "below", True), (2, "above", True)]),
        ((0, 3000), None, [(1, "inside", False), (2, "inside", False)]),
        ((1000, 1000), 0.0, [(1, "above", True)]),
        ((1100, 1200), 0.15, [(1, "inside", False), (2, "above", True)]),
    ],
)
def test_frequency_separation_check(
    band: tuple[float, float], margin: float | None, expected: list[tuple[int, str, bool]]
) -> None:
    # Source: the separation rule — each band widened to [min·(1 − m), max·(1 + m)], m = 0.2 by
    # default (common practice, no source) — applied to the two-disc chain's closed form (Rao).
    # Each band is checked against its nearest mode below, every mode inside and its nearest
    # mode above; utilisation = ω/low below, high/ω above, the nearer edge's inside.
    from workbench.solver.analysis import solve

    extra: dict[str, Any] = {
        "units": {"speed": "rpm"},
        "operating_speeds": [{"name": "run", "min": band[0], "max": band[1]}],
    }
    if margin is not None:
        extra["design"] = {"frequency_margin": margin}
    report = run_checks(solve(parse_case(chain_case(**extra))))
    checks = [check for check in report.checks if check.kind == "frequency_separation"]
    m = 0.2 if margin is None else margin
    low, high = band[0] * RPM * (1 - m), band[1] * RPM * (1 + m)
    omegas = chain_omegas()
    assert len(checks) == len(expected)
    for check, (mode, position, passes) in zip(checks, expected, strict=True):
        omega = omegas[mode - 1]
        assert (check.result, check.segment) == ("run", None)
        assert check.note.startswith(f"mode {mode}:") and f" {position} " in check.note
        assert check.passes is passes
        from_below = omega / low if low else math.inf
        utilisation = {
            "below": from_below,
            "above": high / omega,
            "inside": min(from_below, high / omega),
        }
        assert check.utilisation == pytest.approx(utilisation[position], rel=1e-9)
        # Where the mode's angle is largest: the far disc in mode 1, the near one in mode 2.
        assert check.shaft == "s" and check.x == pytest.approx(CHAIN_LENGTH * (3 - mode))
    assert ("common practice, no source" in " ".join(report.notes)) is (margin is None)


def test_frequency_check_rows_in_the_check_document() -> None:
    # Source: the check table contract (kind, segment null, speeds in the file's units) and the
    # chain's closed form (Rao).
    from workbench.design.checks import check_document
    from workbench.solver.analysis import solve

    model = parse_case(
        chain_case(
            units={"speed": "rpm"}, operating_speeds=[{"name": "run", "min": 2800, "max": 3000}]
        )
    )
    document = check_document(run_checks(solve(model)))
    rows = [row for row in document["checks"] if row["kind"] == "frequency_separation"]
    first, second = chain_omegas()
    assert rows == [
        {
            "result": "run",
            "shaft": "s",
            "segment": None,
            "kind": "frequency_separation",
            "value": pytest.approx(first / RPM),
            "limit": pytest.approx(2800 * 0.8),
            "utilisation": pytest.approx(first / (2800 * 0.8 * RPM)),
            "passes": True,
            "x": pytest.approx(2 * CHAIN_LENGTH),
        },
        {
            "result": "run",
            "shaft": "s",
            "segment": None,
            "kind": "frequency_separation",
            "value": pytest.approx(3000 * 1.2),
            "limit": pytest.approx(second / RPM),
            "utilisation": pytest.approx(3600 * RPM / second),
            "passes": False,
            "x": pytest.approx(CHAIN_LENGTH),
        },
    ]
    assert document["passes"] is False


def two_disc_case(**extra: Any) -> dict[str, Any]:
    """Two discs on one massless shaft, free–free (no supports)."""
    return case(
        {"s": [segment(1.0, 0.05)]},
        discs=[("s", 0.0, 0.5), ("s", 1.0, 1.5)],
        **extra,
    )


def two_disc_omega() -> float:
    """ω² = k(J₁ + J₂)/(J₁J₂) (Rao)."""
    stiffness = STEEL_SHEAR_MODULUS * polar_moment(0.05) / 1.0
    return math.sqrt(stiffness * 2.0 / 0.75)


# --- case files: round trip, schema, units ------------------------------------------------------


def test_vibration_keys_round_trip_and_follow_the_schema() -> None:
    # Source: jsonschema (an outside validator) against the published schema; the round trip and
    # unit invariance check that mm, rpm and g·cm² give the same SI model and frequencies.
    import jsonschema

    data = two_disc_case(
        units={"length": "mm", "speed": "rpm", "inertia": "g*cm**2", "density": "g/cm**3"},
        operating_speeds=[{"name": "run", "min": 1000, "max": 1500}],
        design={
            "frequency_margin": 0.15,
            "modal_elements_per_segment": 4,
            "modal_max_element_length": 50,
        },
    )
    data["shafts"][0]["segments"][0]["length"] = 1000
    data["shafts"][0]["segments"][0]["section"]["diameter"] = 50
    data["materials"]["steel"]["shear_modulus"] = STEEL_SHEAR_MODULUS
    data["materials"]["steel"]["density"] = 7.85
    data["discs"] = [
        {"shaft": "s", "x": 0, "inertia": 5e6},
        {"shaft": "s", "x": 1000, "inertia": 1.5e7},
    ]
    jsonschema.validate(data, case_schema())
    model = parse_case(data)
    assert model.discs[1].inertia == pytest.approx(1.5)
    assert model.operating_speeds[0].maximum == pytest.approx(1500 * RPM)
    assert model.materials[0].density == pytest.approx(7850.0)
    saved = case_to_dict(model)
    jsonschema.validate(saved, case_schema())
    assert saved["discs"] == data["discs"]
    assert saved["operating_speeds"] == data["operating_speeds"]
    assert saved["design"]["frequency_margin"] == 0.15
    assert saved["design"]["modal_elements_per_segment"] == 4
    assert saved["design"]["modal_max_element_length"] == 50
    again = parse_case(saved)
    assert again.discs == model.discs and again.operating_speeds == model.operating_speeds
    si = copy.deepcopy(data)
    si["units"] = {}
    si["shafts"][0]["segments"][0].update(length=1.0, section={"shape": "solid", "diameter": 0.05})
    si["materials"]["steel"]["density"] = 7850.0
    si["discs"] = [{"shaft": "s", "x": 0, "inertia": 0.5}, {"shaft": "s", "x": 1.0, "inertia": 1.5}]
    si["operating_speeds"] = [{"name": "run", "min": 1000 * RPM, "max": 1500 * RPM}]
    si["design"]["modal_max_element_length"] = 0.05
    np.testing.assert_allclose(
        natural_modes(model).angular_frequency,
        natural_modes(parse_case(si)).angular_frequency,
        rtol=1e-12,
    )
    # The design's mesh options reach the analysis: 1000 mm in pieces of at most 50 mm.
    assert natural_modes(model).mesh.element_length.max() <= 0.05 + 1e-12
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(
            {**data, "discs": [{"shaft": "s", "x": 0, "inertia": -1}]}, case_schema()
        )


# --- the command line -----------------------------------------------------------------------------


@pytest.fixture
def workbench_main() -> Callable[[list[str]], int]:
    """``workbench.cli.main``, the command line the ``modes`` sub-command is part of."""
    return cli.main


def test_cli_json_document(
    tmp_path: Any, capsys: pytest.CaptureFixture[str], workbench_main: Callable[[list[str]], int]
) -> None:
    # Source: the document contract of `workbench modes --json`; the two-disc closed form (Rao).
    data = two_disc_case(units={"length": "mm"})
    data["shafts"][0]["segments"][0].update(length=1000, section={"shape": "solid", "diameter": 50})
    data["discs"] = [
        {"shaft": "s", "x": 0, "inertia": 0.5},
        {"shaft": "s", "x": 1000, "inertia": 1.5},
    ]
    data["supports"] = []
    path = tmp_path / "case.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    capsys.readouterr()
    assert workbench_main(["modes", str(path), "--json"]) == 0
    out = capsys.readouterr().out
    document = json.loads(out)
    assert list(document) == ["modes"]
    modes = document["modes"]
    assert [set(mode) for mode in modes] == [{"frequency", "rigid_body", "shafts"}] * 2
    assert [mode["rigid_body"] for mode in modes] == [True, False]
    assert modes[0]["frequency"] == 0.0
    assert modes[1]["frequency"] == pytest.approx(two_disc_omega() / (2 * math.pi), rel=EXACT)
    for mode in modes:
        shaft = mode["shafts"]["s"]
        assert set(shaft) == {"x", "angle"}
        assert shaft["x"][0] == 0.0 and shaft["x"][-1] == pytest.approx(1000.0)
        assert max(abs(value) for value in shaft["angle"]) == pytest.approx(1.0, abs=1e-15)
        assert len(shaft["x"]) == len(shaft["angle"])
    assert capsys.readouterr().err == ""
    # The readable form names the frequency and carries the caution.
    assert workbench_main(["modes", str(path), "--count", "2"]) == 0
    text = capsys.readouterr().out
    assert (
        f"{two_disc_omega() / (2 * math.pi):.5g}" in text
        and "rigid body" in text
        and "Caution" in text
    )


BAD_INPUT = [
    (
        "negative inertia",
        lambda d: d["discs"][0].update(inertia=-0.5),
        "discs[0].inertia",
        "greater than zero",
    ),
    (
        "zero inertia",
        lambda d: d["discs"][0].update(inertia=0),
        "discs[0].inertia",
        "greater than zero",
    ),
    (
        "string inertia",
        lambda d: d["discs"][0].update(inertia="0.5"),
        "discs[0].inertia",
        "must be a number",
    ),
    ("disc off the shaft", lambda d: d["discs"][1].update(x=1.5), "discs[1].x", "off shaft"),
    (
        "disc on an unknown shaft",
        lambda d: d["discs"][0].update(shaft="spindle"),
        "discs[0].shaft",
        "unknown shaft 'spindle'",
    ),
    ("unknown disc key", lambda d: d["discs"][0].update(mass=3), "discs[0].mass", "unknown key"),
    ("missing inertia", lambda d: d["discs"][0].pop("inertia"), "discs[0].inertia", "is required"),
    (
        "speed min above max",
        lambda d: d.update(operating_speeds=[{"name": "run", "min": 1500, "max": 1000}]),
        "operating_speeds[0].max",
        "must not be less than min",
    ),
    (
        "negative speed",
        lambda d: d.update(operating_speeds=[{"name": "run", "min": -5, "max": 1000}]),
        "operating_speeds[0].min",
        "must not be negative",
    ),
    (
        "duplicate speed",
        lambda d: d.update(
            operating_speeds=[
                {"name": "run", "min": 1, "max": 2},
                {"name": "run", "min": 3, "max": 4},
            ]
        ),
        "operating_speeds[1].name",
        "duplicate name",
    ),
    (
        "speed named like a load case",
        lambda d: d.update(operating_speeds=[{"name": "none", "min": 1, "max": 2}]),
        "operating_speeds[0].name",
        "duplicate name",
    ),
    (
        "speeds without inertia",
        lambda d: (
            d.update(operating_speeds=[{"name": "run", "min": 1, "max": 2}]),
            d.pop("discs"),
        ),
        "operating_speeds",
        "needs inertia",
    ),
    (
        "margin of 1",
        lambda d: d.update(design={"frequency_margin": 1.0}),
        "design.frequency_margin",
        "fraction",
    ),
    (
        "fractional element count",
        lambda d: d.update(design={"modal_elements_per_segment": 2.5}),
        "design.modal_elements_per_segment",
        "whole number",
    ),
    (
        "zero element count",
        lambda d: d.update(design={"modal_elements_per_segment": 0}),
        "design.modal_elements_per_segment",
        "whole number",
    ),
]


@pytest.mark.parametrize(
    ("change", "field", "words"),
    [item[1:] for item in BAD_INPUT],
    ids=[item[0] for item in BAD_INPUT],
)
def test_bad_input_names_the_field(
    change: Callable[[dict[str, Any]], Any], field: str, words: str
) -> None:
    data = two_disc_case(units={"speed": "rpm"})
    change(data)
    with pytest.raises(InputError) as raised:
        parse_case(data)
    assert raised.value.field == field
    assert words in raised.value.message


@pytest.mark.parametrize(
    ("change", "field", "words"),
    [item[1:] for item in BAD_INPUT[:5]],
    ids=[item[0] for item in BAD_INPUT[:5]],
)
def test_cli_bad_input_is_one_line_and_exit_2(
    tmp_path: Any,
    capsys: pytest.CaptureFixture[str],
    workbench_main: Callable[[list[str]], int],
    change: Callable[[dict[str, Any]], Any],
    field: str,
    words: str,
) -> None:
    data = two_disc_case()
    change(data)
    path = tmp_path / "case.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    capsys.readouterr()
    assert workbench_main(["modes", str(path), "--json"]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = captured.err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith(f"{field}: ") and words in lines[0]


def test_systems_without_inertia_where_it_matters_are_bad_input() -> None:
    # A shaft free to spin with no inertia has no defined motion; a system with no inertia at all
    # has no modes.
    no_inertia = case({"s": [segment(1.0, 0.05)]}, supports=[{"shaft": "s", "x": 0.0}])
    with pytest.raises(InputError, match="no inertia") as raised:
        natural_modes(parse_case(no_inertia))
    assert raised.value.field == "discs"
    loose = case(
        {"s": [segment(1.0, 0.05)], "idler": [segment(0.3, 0.02)]},
        supports=[{"shaft": "s", "x": 0.0}],
        discs=[("s", 1.0, 0.2)],
    )
    with pytest.raises(InputError, match="shaft 'idler' is free to spin and carry no inertia"):
        natural_modes(parse_case(loose))
    held = case(
        {"s": [segment(1.0, 0.05)]}, supports=[{"shaft": "s", "x": 1.0}], discs=[("s", 1.0, 0.2)]
    )
    with pytest.raises(InputError, match="held fixed"):
        natural_modes(parse_case(held))
    with pytest.raises(InputError) as raised:
        natural_modes(parse_case(two_disc_case()), count=0)
    assert raised.value.field == "count"
