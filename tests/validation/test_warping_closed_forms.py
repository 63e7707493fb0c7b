"""The restrained-warping member against sympy's solution of Vlasov's equation and its limits.

Sources, each also named beside its check:

* The governing equation of non-uniform torsion G·J·θ″ − E·Cw·θ⁗ = −m with T = G·J·θ′ − E·Cw·θ‴
  and B = −E·Cw·θ″, and its end conditions (restrained warping θ′ = 0, free warping θ″ = 0):
  V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961, ch. V (chapter from memory); the
  same equation is the subject of Seaburg & Carter, *Torsional Analysis of Structural Steel
  Members*, AISC Steel Design Guide 9, 1997, whose case tables were not read for these checks.
* The reference θ(x): ``sympy.dsolve`` of that equation (general solution C1 + C2·x +
  C3·e^(−λx) + C4·e^(λx) − m·x²/(2·G·J)), its constants fixed by the end conditions and, at a
  concentrated torque, by continuity of θ, θ′, θ″ and the jump of T, solved in 50-digit mpmath —
  evaluated in this test, never copied.
* The cantilever with a restrained root under an end torque, in the closed form
  θ = T/(G·J·λ)·(λx − sinh λx + tanh λL·(cosh λx − 1)) (derived by hand; checked against the
  sympy reference in the same test; written stably as λx + (sinh λ(L − x) − sinh λL)/cosh λL,
  an identity, times e^(−λL) above and below).
* Saint-Venant limits (E·Cw → 0, long members): the bar fixed at both ends, θ(a) =
  T·a·(L − a)/(G·J·L) (Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8, from memory; also
  derived by hand), and uniform torque on a fixed–fixed bar, θ_mid = m·L²/(8·G·J) (derived by
  hand from dT/dx = −m, dθ/dx = T/(G·J)).
"""

from __future__ import annotations

import functools
from collections.abc import Callable, Sequence

import mpmath
import numpy as np
import pytest
import sympy

from workbench.solver.warping_element import WarpingElements
from workbench.solver.warping_member import WarpingMember, recover, solve_member

#: Relative tolerance against the 50-digit reference (of the largest magnitude of each curve).
EXACT = 1e-9

mpmath.mp.dps = 50


@functools.cache
def _general_solution() -> tuple[Callable[..., object], ...]:
    """θ and its first three derivatives from sympy's dsolve, as mpmath functions."""
    x, k, w, m = sympy.symbols("x k w m", positive=True)
    theta = sympy.Function("theta")
    solved = sympy.dsolve(k * theta(x).diff(x, 2) - w * theta(x).diff(x, 4) + m, theta(x)).rhs
    constants = sympy.symbols("C1:5")
    derivatives = [sympy.diff(solved, x, order) for order in range(4)]
    return tuple(
        sympy.lambdify((x, k, w, m, *constants), expression, "mpmath") for expression in derivatives
    )


def reference(
    k: float,
    w: float,
    length: float,
    m: float,
    torque: float,
    at: float,
    start: str,
    end: str,
) -> Callable[[float], list[object]]:
    """The exact state (θ, θ′, θ″, θ‴) at x of a member with the given end conditions.

    ``start``/``end``: ``"restrained"`` (θ = θ′ = 0), ``"free"`` (θ = θ″ = 0, warping free) or
    ``"loose"`` (no support: θ″ = 0 and T = the applied end torque, the cantilever's tip).
    A concentrated torque ``torque`` acts at ``at`` (0 < at < length, or at = length on a loose
    end); ``m`` is a uniform distributed torque.
    """
    functions = _general_solution()
    k_, w_, m_ = mpmath.mpf(k), mpmath.mpf(w), mpmath.mpf(m)
    inner = 0 < at < length
    pieces = 2 if inner else 1
    bounds = [mpmath.mpf(0), mpmath.mpf(at), mpmath.mpf(length)] if inner else [0, length]
    bounds = [mpmath.mpf(b) for b in bounds]

    def row(piece: int, order: int, x: object, weight: float = 1.0) -> tuple[list, object]:
        # The state's derivative `order` at x is linear in the piece's four constants.
        zero = [functions[order](x, k_, w_, m_, 0, 0, 0, 0)]
        coefficients = []
        for unit in range(4):
            ones = [0, 0, 0, 0]
            ones[unit] = 1
            coefficients.append(functions[order](x, k_, w_, m_, *ones) - zero[0])
        full = [mpmath.mpf(0)] * (4 * pieces)
        full[4 * piece : 4 * piece + 4] = [weight * c for c in coefficients]
        return full, weight * zero[0]

    rows, rhs = [], []

    def condition(terms: Sequence[tuple[int, int, object, float]], value: object) -> None:
        total, constant = [mpmath.mpf(0)] * (4 * pieces), mpmath.mpf(0)
        for piece, order, x, weight in terms:
            entries, offset = row(piece, order, x, weight)
            total = [a + b for a, b in zip(total, entries, strict=True)]
            constant += offset
        rows.append(total)
        rhs.append(value - constant)

    def torque_terms(piece: int, x: object, sign: float) -> list[tuple[int, int, object, float]]:
        return [(piece, 1, x, sign * k), (piece, 3, x, -sign * w)]

    ends = ((start, 0, bounds[0]), (end, pieces - 1, bounds[-1]))
    for kind, piece, x in ends:
        if kind in ("restrained", "free"):
            condition([(piece, 0, x, 1.0)], 0)
            condition([(piece, 1 if kind == "restrained" else 2, x, 1.0)], 0)
        else:  # loose end: no bimoment, the end torque
            condition([(piece, 2, x, 1.0)], 0)
            condition(torque_terms(piece, x, 1.0), torque if x == bounds[-1] else 0)
    if inner:
        a = bounds[1]
        for order in range(3):
            condition([(0, order, a, 1.0), (1, order, a, -1.0)], 0)
        # T(a⁺) − T(a⁻) = −torque (design §2: T is minus the external torques to the left).
        condition(torque_terms(1, a, 1.0) + torque_terms(0, a, -1.0), -torque)
    constants = mpmath.lu_solve(mpmath.matrix(rows), mpmath.matrix(rhs))

    def state(x: float) -> list[object]:
        piece = 1 if inner and x > at else 0
        values = [constants[4 * piece + i] for i in range(4)]
        return [f(mpmath.mpf(x), k_, w_, m_, *values) for f in functions]

    return state


# An invented thin-walled member: G·J = 8 kN·m², E·Cw = 40 kN·m⁴, so λ = 0.447 /m.
TORSION = 8.0e3
WARPING = 4.0e4
LENGTH = 6.0


def solved(
    k: float, w: float, length: float, m: float, torque: float, at: float, start: str, end: str
) -> tuple[np.ndarray, object]:
    nodes = np.unique(np.array([0.0, at, length]))
    held = {"restrained": (True, True), "free": (True, False), "loose": (False, False)}
    rotation = np.zeros(len(nodes), bool)
    warping = np.zeros(len(nodes), bool)
    rotation[0], warping[0] = held[start]
    rotation[-1], warping[-1] = held[end]
    member = WarpingMember(
        nodes, np.full(len(nodes) - 1, k), np.full(len(nodes) - 1, w), rotation, warping
    )
    nodal = np.zeros((1, len(nodes)))
    nodal[0, np.searchsorted(nodes, at)] = torque
    uniform = np.full((1, len(nodes) - 1), m)
    x = np.linspace(0.0, length, 41)
    return x, recover(solve_member(member, nodal, uniform, uniform), x)


def compare(
    k: float, w: float, length: float, m: float, torque: float, at: float, start: str, end: str
) -> None:
    x, stations = solved(k, w, length, m, torque, at, start, end)
    exact = reference(k, w, length, m, torque, at, start, end)
    expected = np.array([[float(v) for v in exact(float(p))] for p in x]).T
    got = [stations.rotation[0], stations.rate[0], stations.second[0], stations.third[0]]
    # θ‴ jumps at a concentrated torque: the reference takes the left piece there.
    keep = ~np.isclose(x, at) if 0 < at < length else np.ones(len(x), bool)
    for name, value, reference_value in zip(("θ", "θ′", "θ″", "θ‴"), got, expected, strict=True):
        scale = np.max(np.abs(reference_value))
        error = np.max(np.abs(value - reference_value)[keep]) / scale
        assert error < EXACT, f"{name}: {error:.2e}"
    bimoment = -w * expected[2]
    assert np.allclose(
        stations.bimoment[0], bimoment, rtol=0, atol=EXACT * np.max(np.abs(bimoment))
    )


@pytest.mark.parametrize("at", [0.6, 1.5, 3.0, 4.7])
@pytest.mark.parametrize("scale", [1.0, 100.0])
def test_point_torque_both_ends_restrained(at: float, scale: float) -> None:
    # (a) end conditions θ = θ′ = 0 (Vlasov ch. V, from memory); sympy dsolve reference.
    compare(TORSION * scale, WARPING, LENGTH, 0.0, 1.5e3, at, "restrained", "restrained")


@pytest.mark.parametrize("at", [0.6, 3.0, 5.1])
def test_point_torque_both_ends_warping_free(at: float) -> None:
    # (b) pinned torsionally: θ = θ″ = 0 at both ends; sympy dsolve reference.
    compare(TORSION, WARPING, LENGTH, 0.0, -900.0, at, "free", "free")


@pytest.mark.parametrize("scale", [0.01, 1.0, 400.0])
def test_cantilever_restrained_root_end_torque(scale: float) -> None:
    # (c) root θ = θ′ = 0, tip θ″ = 0 and T = applied; sympy dsolve reference and closed form.
    k, torque = TORSION * scale, 700.0
    compare(k, WARPING, LENGTH, 0.0, torque, LENGTH, "restrained", "loose")
    x, stations = solved(k, WARPING, LENGTH, 0.0, torque, LENGTH, "restrained", "loose")
    closed = cantilever_closed_form(k, WARPING, LENGTH, torque, x)
    assert np.allclose(stations.rotation[0], closed, rtol=EXACT, atol=EXACT * closed[-1])


@pytest.mark.parametrize(
    ("start", "end"), [("restrained", "restrained"), ("free", "free"), ("restrained", "free")]
)
def test_uniform_distributed_torque(start: str, end: str) -> None:
    # (d) uniform m; particular solution −m·x²/(2·G·J) from sympy dsolve.
    compare(TORSION, WARPING, LENGTH, 250.0, 0.0, 0.0, start, end)


def cantilever_closed_form(
    k: float, w: float, length: float, torque: float, x: np.ndarray
) -> np.ndarray:
    """θ = T/(G·J·λ)·(λx + (sinh λ(L − x) − sinh λL)/cosh λL), everything times e^(−λL)."""
    lam = np.sqrt(k / w)
    decay = np.exp(-2 * lam * length)
    ratio = (np.exp(-lam * x) - np.exp(-lam * (2 * length - x)) - 1 + decay) / (1 + decay)
    return torque / (k * lam) * (lam * x + ratio)


@pytest.mark.parametrize("mu", [1e3, 1e4, 1e6])
def test_very_stiff_member_no_overflow(mu: float) -> None:
    # λL up to 10⁶: the cantilever closed form above, in its overflow-free form.
    k, torque, length = 8.0e3, 500.0, 6.0
    w = k * (length / mu) ** 2
    x, stations = solved(k, w, length, 0.0, torque, length, "restrained", "loose")
    closed = cantilever_closed_form(k, w, length, torque, x)
    assert np.allclose(stations.rotation[0], closed, rtol=1e-11, atol=1e-11 * closed[-1])
    assert np.all(np.isfinite(stations.bimoment))


@pytest.mark.parametrize("ratio", [1e-4, 1e-8, 0.0])
def test_vanishing_warping_tends_to_saint_venant(ratio: float) -> None:
    # Fixed-both-ends bar, θ(a) = T·a·(L − a)/(G·J·L) (Gere & Goodno §3.8, from memory; by hand).
    at, torque = 2.0, 1.2e3
    w = WARPING * ratio
    x, stations = solved(TORSION, w, LENGTH, 0.0, torque, at, "restrained", "restrained")
    saint_venant = (
        torque * np.where(x <= at, x * (LENGTH - at), at * (LENGTH - x)) / (TORSION * LENGTH)
    )
    mu = LENGTH * np.sqrt(TORSION / w) if w else np.inf
    error = np.max(np.abs(stations.rotation[0] - saint_venant)) / np.max(saint_venant)
    assert error < (1e-12 if w == 0 else 10.0 / mu)


@pytest.mark.parametrize("mu", [10.0, 100.0, 1e3, 1e4])
def test_long_member_mid_span_tends_to_saint_venant(mu: float) -> None:
    # Uniform torque on a fixed–fixed bar: θ_mid = m·L²/(8·G·J) (by hand, see module docstring).
    m = 300.0
    w = TORSION * (LENGTH / mu) ** 2
    x, stations = solved(TORSION, w, LENGTH, m, 0.0, 0.0, "restrained", "restrained")
    mid = stations.rotation[0][len(x) // 2]
    saint_venant = m * LENGTH**2 / (8 * TORSION)
    assert abs(mid / saint_venant - 1) < 10.0 / mu
    if mu > 100:  # e^(±λL) beyond 50 digits: the limit above is the check
        return
    exact = reference(TORSION, w, LENGTH, m, 0.0, 0.0, "restrained", "restrained")
    assert mid == pytest.approx(float(exact(LENGTH / 2)[0]), rel=EXACT)


@functools.cache
def _linear_load_solution() -> tuple[Callable[..., object], ...]:
    """θ…θ‴ of sympy's dsolve under a linear torque m0 + (m1 − m0)·x/L, as mpmath functions."""
    x, k, w, m0, m1, length = sympy.symbols("x k w m0 m1 L", positive=True)
    theta = sympy.Function("theta")
    load = m0 + (m1 - m0) * x / length
    solved = sympy.dsolve(k * theta(x).diff(x, 2) - w * theta(x).diff(x, 4) + load, theta(x)).rhs
    constants = sympy.symbols("C1:5")
    return tuple(
        sympy.lambdify((x, k, w, m0, m1, length, *constants), sympy.diff(solved, x, o), "mpmath")
        for o in range(4)
    )


@pytest.mark.parametrize("mu", [1e-4, 0.5, 2.999, 3.001, 7.0, 60.0])
def test_element_matrix_and_loads_from_the_general_solution(mu: float) -> None:
    # The element built independently of its closed forms: K = F·A⁻¹ from sympy's general
    # solution (A: nodal values of the four homogeneous solutions, F: their end forces
    # (−T(0), B(0), T(L), −B(L))), and the consistent loads of a linear torque m0 → m1 as
    # f = K·u_p − F_p of the particular solution, all in 50-digit mpmath.
    k, length = 5.0e3, 2.0
    w = k * (length / mu) ** 2
    m0, m1 = mpmath.mpf(120), mpmath.mpf(-40)
    functions = _linear_load_solution()
    parameters = (mpmath.mpf(k), mpmath.mpf(w), m0, m1, mpmath.mpf(length))
    derivatives = [
        functools.partial(lambda f, at, *c: f(at, *parameters, *c), f) for f in functions
    ]

    def ends(values: Sequence[object], homogeneous: bool) -> tuple[list, list]:
        def d(order: int, at: float) -> object:
            value = derivatives[order](mpmath.mpf(at), *values)
            return value - derivatives[order](mpmath.mpf(at), 0, 0, 0, 0) if homogeneous else value

        torque = [k * d(1, at) - w * d(3, at) for at in (0, length)]
        nodal = [d(0, 0), d(1, 0), d(0, length), d(1, length)]
        forces = [-torque[0], -w * d(2, 0), torque[1], w * d(2, length)]
        return nodal, forces

    columns = [ends([int(i == j) for j in range(4)], True) for i in range(4)]
    a = mpmath.matrix([[columns[j][0][i] for j in range(4)] for i in range(4)])
    f = mpmath.matrix([[columns[j][1][i] for j in range(4)] for i in range(4)])
    stiffness = f * mpmath.inverse(a)
    nodal_p, forces_p = ends([0, 0, 0, 0], False)
    loads = stiffness * mpmath.matrix(nodal_p) - mpmath.matrix(forces_p)

    element = WarpingElements(np.array([length]), np.array([k]), np.array([w]))
    ours = element.matrices()[0]
    expected = np.array([[float(stiffness[i, j]) for j in range(4)] for i in range(4)])
    assert np.allclose(ours, expected, rtol=1e-12, atol=1e-12 * np.abs(expected).max())
    ours_loads = element.distributed_loads(np.array([float(m0)]), np.array([float(m1)]))[0]
    expected_loads = np.array([float(v) for v in loads])
    assert np.allclose(
        ours_loads, expected_loads, rtol=1e-12, atol=1e-12 * np.abs(expected_loads).max()
    )
