"""The general solver with open sections that warp, against Vlasov's equation solved by sympy.

Sources, each also named beside its check:

* The governing equation of non-uniform torsion G·J·θ″ − E·Cw·θ⁗ = −m, T = G·J·θ′ − E·Cw·θ‴,
  B = −E·Cw·θ″, with end conditions θ′ = 0 (warping restrained) or θ″ = 0 (warping free):
  V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V; S. P. Timoshenko and
  J. M. Gere, *Theory of Elastic Stability*, 2nd ed., McGraw-Hill, 1961, ch. 5 (non-uniform
  torsion) (chapters from memory). The reference θ(x) is sympy's ``dsolve`` of that equation,
  its constants fixed by the end conditions (``reference`` of
  ``tests/validation/test_warping_closed_forms.py``), evaluated here, never copied.
* The I section's constants: J = Σ b·t³/3 and Cw = t_f·b_f³·h₀²/24 on the mid-line (Seaburg &
  Carter, AISC Design Guide 9, 1997, App. C, from memory; checked against sectionproperties in
  the open-section tests), taken here from the solver's section so that the reference and the
  solve share them.
* Saint-Venant limits (E·Cw → 0; members long against 1/λ): a bar fixed at both ends under a
  torque at a, θ(a) = T·a·(L − a)/(G·J·L), and under uniform torque, θ_mid = m·L²/(8·G·J)
  (Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8, from memory; derived by hand too).
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pytest

from tests.validation.test_warping_closed_forms import reference
from workbench.solver.analysis import solve
from workbench.solver.io import parse_case
from workbench.solver.results import Results

#: An invented rolled-I-like member (m, Pa): depth 300, flanges 150 × 10.7, web 7.1 mm.
SECTION = {
    "shape": "i_beam",
    "depth": 0.300,
    "width": 0.150,
    "flange_thickness": 0.0107,
    "web_thickness": 0.0071,
}
SHEAR_MODULUS, ELASTIC_MODULUS = 79.3e9, 207e9
LENGTH = 6.0
#: Relative tolerance against the 50-digit reference (of each curve's largest magnitude).
EXACT = 1e-8


def case(
    *,
    start: str,
    end: str,
    torque: float = 0.0,
    at: float = LENGTH / 2,
    intensity: float = 0.0,
    elastic_modulus: float = ELASTIC_MODULUS,
    length: float = LENGTH,
) -> dict[str, Any]:
    """A case file (SI) of one I member on two fixed supports with the given warping."""
    loads: dict[str, Any] = {"name": "c"}
    if torque:
        loads["torques"] = [{"shaft": "m", "x": at, "torque": torque}]
    if intensity:
        loads["distributed"] = [
            {
                "shaft": "m",
                "start": 0.0,
                "end": length,
                "intensity_start": intensity,
                "intensity_end": intensity,
            }
        ]
    return {
        "materials": {"s": {"shear_modulus": SHEAR_MODULUS, "elastic_modulus": elastic_modulus}},
        "shafts": [
            {"id": "m", "segments": [{"length": length, "material": "s", "section": SECTION}]}
        ],
        "supports": [
            {"shaft": "m", "x": 0.0, "warping": start},
            {"shaft": "m", "x": length, "warping": end},
        ],
        "load_cases": [loads],
    }


def rigidities(results: Results) -> tuple[float, float]:
    """(G·J, E·Cw) of the member solved (N·m², N·m⁴)."""
    section = results.model.shafts[0].segments[0].layers[0].section
    elastic = results.model.shafts[0].segments[0].layers[0].material.elastic_modulus
    return SHEAR_MODULUS * section.torsion_constant, elastic * section.warping_constant


def check_against_reference(document: dict[str, Any], m: float, torque: float, at: float) -> None:
    results = solve(parse_case(document))
    k, w = rigidities(results)
    start, end = (support["warping"] for support in document["supports"])
    exact = reference(k, w, LENGTH, m, torque, at, start, end)
    x = results.mesh.station_x
    expected = np.array([[float(v) for v in exact(float(p))] for p in x]).T
    warping = results.warping
    assert warping is not None
    got = [results.angle[0], warping.rate[0], warping.second[0], warping.third[0]]
    # θ‴ jumps at a concentrated torque: the reference takes the left piece there.
    keep = ~np.isclose(x, at) if torque else np.ones(len(x), bool)
    for name, value, exact_value in zip(("θ", "θ′", "θ″", "θ‴"), got, expected, strict=True):
        error = np.max(np.abs(value - exact_value)[keep]) / np.max(np.abs(exact_value))
        assert error < EXACT, f"{name}: {error:.2e}"
    bimoment = -w * expected[2]
    scale = np.max(np.abs(bimoment))
    assert np.max(np.abs(warping.bimoment[0] - bimoment)) < EXACT * scale
    # T = G·J·θ′ − E·Cw·θ‴ (design §2) at every station.
    torque_parts = k * expected[1] - w * expected[3]
    assert np.allclose(
        results.torque[0][keep], torque_parts[keep], rtol=0, atol=EXACT * np.abs(torque_parts).max()
    )


@pytest.mark.parametrize(("start", "end"), [("restrained", "restrained"), ("free", "free")])
def test_uniform_torque(start: str, end: str) -> None:
    # Vlasov ch. V / Timoshenko & Gere ch. 5: uniform m, both ends alike; sympy dsolve reference.
    m = 2.5e3
    check_against_reference(case(start=start, end=end, intensity=m), m, 0.0, LENGTH / 2)


@pytest.mark.parametrize(("start", "end"), [("restrained", "restrained"), ("free", "free")])
def test_point_torque_at_mid_span(start: str, end: str) -> None:
    # Vlasov ch. V / Timoshenko & Gere ch. 5: a torque at mid-span; sympy dsolve reference.
    torque = 4.0e3
    check_against_reference(case(start=start, end=end, torque=torque), 0.0, torque, LENGTH / 2)


@pytest.mark.parametrize("at", [0.9, 4.2])
def test_point_torque_restrained_and_free(at: float) -> None:
    # One end restrained, the other free; the torque off centre; sympy dsolve reference.
    check_against_reference(
        case(start="restrained", end="free", torque=-1.2e3, at=at), 0, -1.2e3, at
    )


def test_vanishing_warping_rigidity_tends_to_saint_venant() -> None:
    # E·Cw → 0 (E made tiny): θ(a) = T·a·(L − a)/(G·J·L) (Gere & Goodno §3.8, from memory).
    torque, at = 3.0e3, 2.0
    cases = ((ELASTIC_MODULUS * 1e-6, 5e-3), (ELASTIC_MODULUS * 1e-10, 5e-5), (1e-290, 1e-12))
    for elastic, tolerance in cases:
        document = case(start="restrained", end="restrained", torque=torque, at=at)
        document["materials"]["s"]["elastic_modulus"] = elastic
        results = solve(parse_case(document))
        k, _ = rigidities(results)
        saint_venant = torque * at * (LENGTH - at) / (k * LENGTH)
        peak = float(np.max(results.angle[0]))
        assert abs(peak / saint_venant - 1.0) < tolerance


def test_long_member_mid_span_twist_tends_to_saint_venant() -> None:
    # λL large: the restraint's effect decays over ≈ 1/λ (Vlasov ch. V); θ_mid → m·L²/(8·G·J).
    m = 500.0
    ratios = []
    for length in (30.0, 300.0):
        document = case(start="restrained", end="restrained", intensity=m, length=length)
        results = solve(parse_case(document))
        k, w = rigidities(results)
        x = results.mesh.station_x
        middle = np.interp(length / 2, x, results.angle[0])
        ratios.append(middle / (m * length**2 / (8 * k)))
        # The leftover is of the order of the decay length over the span: 1/(λL)·8/1 or less.
        assert abs(ratios[-1] - 1.0) < 8.0 * np.sqrt(w / k) / length
    assert abs(ratios[1] - 1.0) < abs(ratios[0] - 1.0)
