"""Torsional stresses of an I-beam in restrained torsion against closed forms and a FE code.

Sources, each also named beside its check:

* The governing equation G·J·θ″ − E·Cw·θ⁗ = −m, T = G·J·θ′ − E·Cw·θ‴, B = −E·Cw·θ″, and the end
  conditions of restrained warping θ′ = 0 (Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961,
  ch. V; Timoshenko & Gere, *Theory of Elastic Stability*, 2nd ed., 1961, ch. 5 — as quoted in
  the project's references file; chapters from memory). The member of length L with both ends
  fixed and restrained against warping under a torque T at mid-span, solved by hand from that
  equation (derived by hand; the solver itself is checked against sympy's solution of the same
  equation in ``test_warping_closed_forms.py``): with λ = √(G·J/(E·Cw)) and a = L/2, on the
  first half θ′ = T/(2GJ)·(1 − cosh λx + tanh(λa/2)·sinh λx), so
  θ″(0) = T·λ/(2GJ)·tanh(λa/2), θ‴(0) = −T·λ²/(2GJ) and θ′(a/2) = T/(2GJ)·(1 − sech(λa/2)).
* Doubly symmetric I on the mid-line (flange width bf, thickness tf, h0 between flange
  mid-lines): Wn at a flange tip = h0·bf/4 (the project's references file, restrained-torsion
  entry); Sw at the flange–web junction = h0·bf²·tf/16 (derived by hand: ∫Wn·t ds over half a
  flange, Wn linear from h0·bf/4 at the tip to 0 at the web).
* The flexural analogy (Timoshenko & Gere, ch. 5, from memory; the bimoment of an I is the
  couple of its flange moments, B = M_f·h0): each flange is a rectangle bent in its own plane by
  M_f = B/h0 and sheared by V_f = dM_f/dx; its stresses by the elementary beam formulas
  σ = M·c/I and τ_max = 3V/(2A) for a rectangle (Gere & Goodno, *Mechanics of Materials*,
  8th ed., ch. 5, from memory).
* sectionproperties (finite-element warping function and Saint-Venant shear stress of the solid
  outline), an outside library: its warping function at a flange tip is Wn there (the section is
  doubly symmetric, so the centroid is the shear centre), and its shear stress on a flange face
  under a torque T is G·t·θ′ with θ′ = T/(G·J).
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from sectionproperties.analysis.section import Section as FESection
from sectionproperties.pre.geometry import Geometry
from shapely.geometry import Polygon

from workbench.solver.open_shapes import i_section
from workbench.solver.warping_member import WarpingMember, recover, solve_member
from workbench.solver.warping_stress import stress_points, torsional_stresses

# An I of our own proportions (mm): 300 deep, flanges 150 × 12, web 8; steel.
DEPTH, WIDTH, FLANGE, WEB = 0.3, 0.15, 0.012, 0.008
SHEAR_MODULUS, ELASTIC_MODULUS = 79.3e9, 207e9  # Shigley Table A-5, carbon steel
H0 = DEPTH - FLANGE
TORQUE, SPAN = 10e3, 4.0  # N·m at mid-span, m between the restrained ends

#: The exact element and recovery reproduce the closed form to rounding.
EXACT = 1e-9


def _member_state(x: np.ndarray):
    section = i_section(DEPTH, WIDTH, WIDTH, FLANGE, FLANGE, WEB)
    torsion = SHEAR_MODULUS * section.torsion_constant
    warping = ELASTIC_MODULUS * section.warping_constant
    member = WarpingMember(
        np.array([0.0, SPAN / 2.0, SPAN]),
        np.full(2, torsion),
        np.full(2, warping),
        np.array([True, False, True]),
        np.array([True, False, True]),
    )
    solution = solve_member(member, np.array([[0.0, TORQUE, 0.0]]))
    return section, recover(solution, x), torsion, warping


def test_fixed_fixed_i_beam_stresses_against_closed_forms() -> None:
    # Sources: the closed form of the module text (derived by hand from the governing
    # equation) and Wn = h0·bf/4, Sw = h0·bf²·tf/16 of a doubly symmetric I.
    a = SPAN / 2.0
    x = np.array([0.0, a / 2.0])
    section, state, torsion, warping = _member_state(x)
    lam = math.sqrt(torsion / warping)
    second_at_support = TORQUE * lam / (2 * torsion) * math.tanh(lam * a / 2)
    third_at_support = TORQUE * lam**2 / (2 * torsion)
    rate_at_quarter = TORQUE / (2 * torsion) * (1 - 1 / math.cosh(lam * a / 2))

    points = stress_points([section])
    stresses = torsional_stresses(
        points,
        np.zeros(2, dtype=np.intp),
        state.rate,
        state.second,
        state.third,
        SHEAR_MODULUS,
        ELASTIC_MODULUS,
    )
    tip_warping = H0 * WIDTH / 4.0
    junction_statical = H0 * WIDTH**2 * FLANGE / 16.0
    # σ_w peaks at the flange tips at the restrained end: E·(h0·bf/4)·θ″(0).
    sigma = np.abs(stresses.warping_normal[0, 0]).max()
    assert sigma == pytest.approx(ELASTIC_MODULUS * tip_warping * second_at_support, rel=EXACT)
    # τ_w peaks at the flange–web junction there: E·(h0·bf²·tf/16)·|θ‴(0)|/tf.
    tau_w = np.abs(stresses.warping_shear[0, 0]).max()
    expected_tau_w = ELASTIC_MODULUS * junction_statical * third_at_support / FLANGE
    assert tau_w == pytest.approx(expected_tau_w, rel=EXACT)
    # No Saint-Venant shear where θ′ = 0; at the quarter span G·t·θ′ in the flange and web.
    assert np.abs(stresses.saint_venant_shear[0, 0]).max() <= EXACT * expected_tau_w
    tau_sv = np.abs(stresses.saint_venant_shear[0, 1])
    valid = points.valid[0]
    flange = valid & (points.thickness[0] == FLANGE)
    web = valid & (points.thickness[0] == WEB)
    np.testing.assert_allclose(tau_sv[flange], SHEAR_MODULUS * FLANGE * rate_at_quarter, EXACT)
    np.testing.assert_allclose(tau_sv[web], SHEAR_MODULUS * WEB * rate_at_quarter, EXACT)
    # Where each peaks on the section: σ_w at the tips (where τ_w = 0), τ_w at the junctions.
    at_tips = np.isclose(np.abs(points.location[0, :, 0]), WIDTH / 2.0) & valid
    assert np.abs(stresses.warping_normal[0, 0, at_tips]) == pytest.approx(sigma, rel=EXACT)
    assert np.abs(stresses.warping_shear[0, 0, at_tips]).max() <= EXACT * tau_w


def test_flexural_analogy_of_the_flanges() -> None:
    # Source: the flexural analogy (Timoshenko & Gere, ch. 5, from memory) with σ = M·c/I and
    # τ_max = 3V/(2A) of a rectangle (Gere & Goodno, ch. 5, from memory), at stations along
    # the span; M_f = B/h0, V_f = dM_f/dx = −E·Cw·θ‴/h0 (the warping torque over h0).
    x = np.linspace(0.0, SPAN, 17)
    section, state, _, warping = _member_state(x)
    flange_moment = np.abs(state.bimoment[0]) / H0
    flange_shear = np.abs(warping * state.third[0]) / H0
    flange_inertia = FLANGE * WIDTH**3 / 12.0
    expected_sigma = flange_moment * (WIDTH / 2.0) / flange_inertia
    expected_tau = 1.5 * flange_shear / (WIDTH * FLANGE)
    stresses = torsional_stresses(
        stress_points([section]),
        np.zeros(len(x), dtype=np.intp),
        state.rate,
        state.second,
        state.third,
        SHEAR_MODULUS,
        ELASTIC_MODULUS,
    )
    scale_sigma, scale_tau = expected_sigma.max(), expected_tau.max()
    np.testing.assert_allclose(
        np.abs(stresses.warping_normal[0]).max(axis=-1), expected_sigma, atol=EXACT * scale_sigma
    )
    np.testing.assert_allclose(
        np.abs(stresses.warping_shear[0]).max(axis=-1), expected_tau, atol=EXACT * scale_tau
    )


# sectionproperties: finite-element warping function and Saint-Venant stresses
# --------------------------------------------------------------------------------------------

FE_DEPTH, FE_WIDTH, FE_FLANGE, FE_WEB = 0.2, 0.1, 0.004, 0.003

#: Thin-wall theory against the solid outline at t/b = 0.04 (as in test_open_sections.py: the
#: mid-line model's junction and through-thickness terms are a fraction of t/b); observed
#: 0.02 % for the warping function and 0.7 % for the face shear.
THIN_WALL_AGREEMENT = 0.01


def _fe_section() -> FESection:
    """sectionproperties' warping analysis of the I's solid outline (about 2,300 elements)."""
    d, b, tf, tw = FE_DEPTH, FE_WIDTH, FE_FLANGE, FE_WEB
    outline = [
        (-b / 2, 0.0), (b / 2, 0.0), (b / 2, tf), (tw / 2, tf), (tw / 2, d - tf), (b / 2, d - tf),
        (b / 2, d), (-b / 2, d), (-b / 2, d - tf), (-tw / 2, d - tf), (-tw / 2, tf), (-b / 2, tf),
    ]  # fmt: skip
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a warning inside the reference would make it suspect
        fe = FESection(Geometry(Polygon(outline)).create_mesh(mesh_sizes=[1e-6]))
        fe.calculate_geometric_properties()
        fe.calculate_warping_properties()
    return fe


def test_warping_function_and_stresses_against_sectionproperties() -> None:
    # Source: sectionproperties' FE warping function ω (about the centroid = shear centre of a
    # doubly symmetric I, mean zero) and its Saint-Venant shear stress under a torque.
    fe = _fe_section()
    section = i_section(FE_DEPTH, FE_WIDTH, FE_WIDTH, FE_FLANGE, FE_FLANGE, FE_WEB)
    points = stress_points([section])
    vertices, omega = fe.mesh["vertices"], fe.section_props.omega
    # The tip's mid-thickness value: the mean of the tip edge's two corners (ω is odd across
    # the thickness about the mid-line).
    corners = [
        int(np.argmin(np.hypot(vertices[:, 0] - FE_WIDTH / 2, vertices[:, 1] - y)))
        for y in (FE_DEPTH, FE_DEPTH - FE_FLANGE)
    ]
    fe_tip = float(np.mean(omega[corners]))
    tip = (
        np.isclose(points.location[0, :, 0], FE_WIDTH / 2)
        & np.isclose(points.location[0, :, 1], FE_DEPTH - FE_FLANGE / 2)
        & points.valid[0]
    )
    ours = points.unit_warping[0, tip]
    assert abs(fe_tip) == pytest.approx(float(np.abs(ours).max()), rel=THIN_WALL_AGREEMENT)
    # The warping normal stress E·Wn·θ″ at the tip from either warping function, for one θ″.
    second = 2e-3
    stresses = torsional_stresses(points, [0], [0.0], [second], [0.0], 80e9, 200e9)
    assert float(np.abs(stresses.warping_normal[0, tip]).max()) == pytest.approx(
        200e9 * abs(fe_tip) * second, rel=THIN_WALL_AGREEMENT
    )

    # Saint-Venant shear on the outer face of a flange, half-way along a half flange, under T.
    torque, shear_modulus = 1e3, 80e9
    face = [(FE_WIDTH / 4, FE_DEPTH - 1e-7)]
    fe_stress = fe.get_stress_at_points(face, mzz=torque)[0]
    assert fe_stress is not None
    fe_tau = math.hypot(fe_stress[1], fe_stress[2])
    rate = torque / (shear_modulus * section.torsion_constant)
    stresses = torsional_stresses(points, [0], [rate], [0.0], [0.0], shear_modulus, 200e9)
    flange = points.valid[0] & (points.thickness[0] == FE_FLANGE)
    ours_tau = float(np.abs(stresses.saint_venant_shear[0, flange]).max())
    assert ours_tau == pytest.approx(fe_tau, rel=THIN_WALL_AGREEMENT)
