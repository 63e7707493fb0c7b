"""The exact restrained-warping (Vlasov) torsion element, for every element at once.

A prismatic thin-walled member of Saint-Venant rigidity G·J and warping rigidity E·Cw under a
distributed torque m(x) obeys

    G·J·θ″ − E·Cw·θ⁗ = −m,

whose homogeneous solutions are 1, x, cosh λx, sinh λx with λ = √(G·J/(E·Cw)). The element has the
rotation θ and the rate of twist θ′ at each node (degrees of freedom θ₁, θ′₁, θ₂, θ′₂) and the
exact stiffness of that equation: with μ = λ·L and g = μ − 2·tanh(μ/2),

    k₁₁ = (G·J/L)·μ/g              k₁₂ = G·J·tanh(μ/2)/g
    k₂₂ = G·J·L·(μ·coth μ − 1)/(μ·g)   k₂₄ = G·J·L·(1 − μ/sinh μ)/(μ·g)

(k₁₃ = −k₁₁, k₁₄ = k₁₂, k₂₃ = −k₁₂, k₃₃ = k₁₁, k₃₄ = −k₁₂, k₄₄ = k₂₂). The generalised forces
conjugate to (θ₁, θ′₁, θ₂, θ′₂) are (−T(0), B(0), T(L), −B(L)) with the internal torque
T = G·J·θ′ − E·Cw·θ‴ and the bimoment B = −E·Cw·θ″ (design §2).

Written this way nothing overflows: only tanh, 1/tanh and μ/sinh μ = 2μ·e^(−μ)/(1 − e^(−2μ))
appear, so λL = 10³, 10⁶ or E·Cw = 0 (μ = ∞: the Saint-Venant element G·J/L with a decoupled
θ′) are exact. Where μ is small the differences cancel; there each entry is written as a ratio
of entire power series (of μ·sinh μ − 2(cosh μ − 1), sinh μ − μ, …), summed term by term, and
scaled by E·Cw/L³ instead of G·J/L — it tends to the cubic (Euler–Bernoulli-like) warping
element 12, 6L, 4L², 2L² as μ → 0.

The exact consistent loads of a linear distributed torque m̄ + δ·(2x/L − 1) (m̄ the mean, δ half
the rise) are

    f = m̄·(L/2, L²·F, L/2, −L²·F) + δ·(−L·E, L²·G, L·E, L²·G)

with F = g/(2μ²·tanh(μ/2)), E = (μ/g − 12/μ²)/6 and
G = (μ·coth μ + 2μ/sinh μ − 3)/(3μ·g) − F: the integrals of the exact shape functions times
the load (F → 1/12, E → 1/5, G → −1/60 as μ → 0; F → 0, E → 1/6, G → 0 as μ → ∞).

References
----------
.. [1] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., Israel Program for Scientific
   Translations, 1961, ch. V (the governing equation of restrained torsion, bimoment).
.. [2] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   Wiley, 2000, §8.5 and ch. 9 (the element with θ and θ′ per node; exact stiffness from the
   homogeneous solutions; consistent loads as integrals of the shape functions).
.. [3] The entries above were derived for this module with sympy from the homogeneous solutions
   (stiffness = end forces · inverse of the nodal-value matrix); tests/validation checks the
   solved member against published closed forms.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from workbench.solver.sections import FloatArray

#: Below this μ = λL the entries are summed as power series (their closed forms cancel).
SERIES_BELOW = 3.0
#: Terms of each series: the last one is below 10⁻¹⁷ of the first at μ = SERIES_BELOW.
SERIES_TERMS = 22
#: μ is capped here so that E·Cw = 0 (μ = ∞) goes through the same formulas without inf/inf.
MU_CAP = 1e150


def _coefficients(term: Callable[[int], float]) -> FloatArray:
    """Coefficients c_n (n = 0 … SERIES_TERMS−1) of a series Σ c_n·μ^(2n)."""
    return np.array([term(n) for n in range(SERIES_TERMS)], dtype=np.float64)


def _f(n: int) -> float:
    return 1.0 / math.factorial(n)


# (μ·sinh μ − 2(cosh μ − 1))/μ⁴, sinh μ/μ, (cosh μ − 1)/μ², (μ·cosh μ − sinh μ)/μ³,
# (sinh μ − μ)/μ³, (sinh μ/μ − 12·first)/μ², (μ·cosh μ + 2μ − 3 sinh μ)/μ⁵ — each from the
# Taylor series of cosh and sinh, their vanishing leading terms removed.
_P_G = _coefficients(lambda n: _f(2 * n + 3) - 2 * _f(2 * n + 4))
_SINH_OVER = _coefficients(lambda n: _f(2 * n + 1))
_COSH_M1 = _coefficients(lambda n: _f(2 * n + 2))
_C_NUM = _coefficients(lambda n: _f(2 * n + 2) - _f(2 * n + 3))
_D_NUM = _coefficients(lambda n: _f(2 * n + 3))
_E_NUM = _coefficients(lambda n: _f(2 * n + 3) - 12 * (_f(2 * n + 5) - 2 * _f(2 * n + 6)))
_G_NUM = _coefficients(lambda n: _f(2 * n + 4) - 3 * _f(2 * n + 5))


def _series(coefficients: FloatArray, square: FloatArray) -> FloatArray:
    """Σ c_n·s^n by Horner's rule, for the (n,) array s = μ²."""
    total = np.full_like(square, coefficients[-1])
    for coefficient in coefficients[-2::-1]:  # a loop over series terms, not elements
        total = total * square + coefficient
    return total


def _hyperbolic(mu: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """tanh(μ/2), g = μ − 2·tanh(μ/2), coth μ and μ/sinh μ, none overflowing (μ ≥ SERIES_BELOW)."""
    half = np.tanh(mu / 2)
    over_sinh = 2 * mu * np.exp(-mu) / -np.expm1(-2 * mu)  # μ/sinh μ = 2μe^(−μ)/(1 − e^(−2μ))
    return half, mu - 2 * half, 1 / np.tanh(mu), over_sinh


@dataclass(frozen=True)
class WarpingFunctions:
    """The dimensionless functions of μ = λL that make up the element, for every element.

    Parameters
    ----------
    mu
        (n,) μ = L·√(G·J/(E·Cw)) (dimensionless); ``inf`` where E·Cw = 0.
    """

    mu: FloatArray

    @property
    def small(self) -> np.ndarray:
        """Elements whose entries are summed as series (μ below SERIES_BELOW)."""
        return self.mu < SERIES_BELOW

    def _split(self) -> tuple[np.ndarray, FloatArray, FloatArray]:
        # Each branch is evaluated on its own elements only.
        small = self.small
        return small, self.mu[small] ** 2, np.minimum(self.mu[~small], MU_CAP)

    def stiffness_factors(self) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """(a, b, c, d) with k₁₁ = a·s/L², k₁₂ = b·s/L, k₂₂ = c·s, k₂₄ = d·s.

        The scale s is E·Cw/L where μ < SERIES_BELOW, G·J·L elsewhere
        (:class:`WarpingElements`).

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., §8.5.
        """
        small, square, mu = self._split()
        half, g, coth, over_sinh = _hyperbolic(mu)
        p_g = _series(_P_G, square)
        return (
            _merge(small, _series(_SINH_OVER, square) / p_g, mu / g),
            _merge(small, _series(_COSH_M1, square) / p_g, half / g),
            _merge(small, _series(_C_NUM, square) / p_g, (mu * coth - 1) / (mu * g)),
            _merge(small, _series(_D_NUM, square) / p_g, (1 - over_sinh) / (mu * g)),
        )

    def load_factors(self) -> tuple[FloatArray, FloatArray, FloatArray]:
        """(E, F, G) of the consistent loads of a linear distributed torque (module docstring).

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 9
           (consistent loads f = ∫Nᵀ·m dx).
        """
        small, square, mu = self._split()
        half, g, coth, over_sinh = _hyperbolic(mu)
        p_g = _series(_P_G, square)
        f_small = p_g / (2 * _series(_COSH_M1, square))
        f_large = g / (2 * mu * mu * half)
        return (
            _merge(small, _series(_E_NUM, square) / (6 * p_g), (mu / g - 12 / mu**2) / 6),
            _merge(small, f_small, f_large),
            _merge(
                small,
                _series(_G_NUM, square) / (3 * p_g) - f_small,
                (mu * coth + 2 * over_sinh - 3) / (3 * mu * g) - f_large,
            ),
        )


def _merge(small: np.ndarray, small_values: FloatArray, large_values: FloatArray) -> FloatArray:
    """One (n,) array from the values of the small-μ elements and of the others."""
    merged = np.empty(len(small))
    merged[small] = small_values
    merged[~small] = large_values
    return merged


#: Entry (row, column) of the element matrix as (index into the entries, sign).
_LAYOUT = (
    ((0, 1), (1, 1), (0, -1), (1, 1)),
    ((1, 1), (2, 1), (1, -1), (3, 1)),
    ((0, -1), (1, -1), (0, 1), (1, -1)),
    ((1, 1), (3, 1), (1, -1), (2, 1)),
)


def warping_mu(length: FloatArray, torsion: FloatArray, warping: FloatArray) -> FloatArray:
    """μ = λ·L = L·√(G·J/(E·Cw)) of each element (``inf`` where E·Cw = 0).

    Parameters
    ----------
    length
        (n,) element lengths (m), > 0.
    torsion
        (n,) Saint-Venant rigidity G·J (N·m²), > 0.
    warping
        (n,) warping rigidity E·Cw (N·m⁴), ≥ 0.

    Returns
    -------
    FloatArray
        (n,) μ (dimensionless).

    References
    ----------
    .. [1] Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., ch. V (λ² = G·J/(E·Cw)).
    """
    with np.errstate(divide="ignore"):
        return np.asarray(length * np.sqrt(torsion / warping), dtype=float)


@dataclass(frozen=True)
class WarpingElements:
    """Exact restrained-warping elements: stiffness entries and consistent loads, as arrays.

    Offers what :func:`workbench.solver.assembly.assemble_band` reads (two degrees of freedom
    per node, entries (1, n_elements)).

    Parameters
    ----------
    length
        (n,) element lengths (m), > 0.
    torsion
        (n,) G·J (N·m²), > 0.
    warping
        (n,) E·Cw (N·m⁴), ≥ 0; 0 gives the Saint-Venant element with θ′ left out.
    saint_venant_stiffness
        (n,) the stiffness (N·m/rad) of the elements where E·Cw = 0, when given: 1/∫dx/(G·J)
        of a tapered or layered circular part, exact where G·J/L would not be; ``None``: G·J/L.

    Examples
    --------
    >>> import numpy as np
    >>> elements = WarpingElements(np.array([2.0]), np.array([1e5]), np.array([0.0]))
    >>> float(elements.stiffness_entry(0, 0)[0, 0])
    50000.0

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., §8.5.
    """

    length: FloatArray
    torsion: FloatArray
    warping: FloatArray
    saint_venant_stiffness: FloatArray | None = None

    @property
    def dofs_per_node(self) -> int:
        """θ and θ′."""
        return 2

    @functools.cached_property
    def functions(self) -> WarpingFunctions:
        """The dimensionless functions of μ."""
        return WarpingFunctions(warping_mu(self.length, self.torsion, self.warping))

    @functools.cached_property
    def entries(self) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """The four distinct entries (k₁₁, k₁₂, k₂₂, k₂₄) of every element (N·m, N·m², N·m³).

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., §8.5.
        """
        functions = self.functions
        a, b, c, d = functions.stiffness_factors()
        length = self.length
        scale = np.where(functions.small, self.warping / length, self.torsion * length)
        k11 = a * scale / length**2
        # E·Cw = 0: θ′ takes no part (its exact entries vanish with 1/μ).
        free = self.warping == 0
        if self.saint_venant_stiffness is not None:
            k11 = np.where(free, self.saint_venant_stiffness, k11)
        k12, k22, k24 = (
            np.where(free, 0.0, entry) for entry in (b * scale / length, c * scale, d * scale)
        )
        return k11, k12, k22, k24

    def stiffness_entry(self, row: int, column: int) -> FloatArray:
        """Entry (row, column) of every element's matrix, shaped (1, n) for the assembly."""
        which, sign = _LAYOUT[row][column]
        entry = self.entries[which]
        return (entry if sign > 0 else -entry)[np.newaxis]

    def matrices(self) -> FloatArray:
        """(n, 4, 4) element stiffness matrices."""
        matrices = np.empty((len(self.length), 4, 4))
        for row in range(4):  # 4×4 entries, each a whole column of elements
            for column in range(4):
                matrices[:, row, column] = self.stiffness_entry(row, column)[0]
        return matrices

    def regular_matrices(self) -> FloatArray:
        """(n, 4, 4) matrices with θ′ given unit stiffness where E·Cw = 0 (θ′ takes no part)."""
        matrices = self.matrices()
        free = self.warping == 0
        matrices[free, 1, 1] = matrices[free, 3, 3] = 1.0
        return matrices

    def point_loads(self, offset: FloatArray, torque: FloatArray) -> FloatArray:
        """(n, 4) exact consistent nodal loads of a concentrated torque inside each element.

        The element is cut at the load into two exact pieces and the cut's (θ, θ′) condensed
        out: f = −K_ec·K_cc⁻¹·(P, 0).

        Parameters
        ----------
        offset
            (n,) distance of the torque from the element's start (m), 0 < offset < L.
        torque
            (n,) the torque (N·m).

        Returns
        -------
        FloatArray
            (n, 4) loads conjugate to (θ₁, θ′₁, θ₂, θ′₂): N·m, N·m², N·m, N·m².

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 3
           (static condensation).
        """
        left = WarpingElements(offset, self.torsion, self.warping).regular_matrices()
        right = WarpingElements(self.length - offset, self.torsion, self.warping)
        right_matrices = right.regular_matrices()
        cut = left[:, 2:, 2:] + right_matrices[:, :2, :2]
        applied = np.stack([torque, np.zeros_like(torque)], axis=-1)
        state = np.linalg.solve(cut, applied[..., np.newaxis])[..., 0]
        start = np.einsum("nij,nj->ni", left[:, :2, 2:], state)
        end = np.einsum("nij,nj->ni", right_matrices[:, 2:, :2], state)
        return -np.concatenate([start, end], axis=-1)

    def end_forces(self, nodal: FloatArray) -> FloatArray:
        """(..., n, 4) K·u of every element for (..., n, 4) nodal values (θ₁, θ′₁, θ₂, θ′₂)."""
        k11, k12, k22, k24 = self.entries
        rotation = nodal[..., 0] - nodal[..., 2]
        first, second = nodal[..., 1], nodal[..., 3]
        torque = k11 * rotation + k12 * (first + second)
        return np.stack(
            [
                torque,
                k12 * rotation + k22 * first + k24 * second,
                -torque,
                k12 * rotation + k24 * first + k22 * second,
            ],
            axis=-1,
        )

    def distributed_loads(self, start: FloatArray, end: FloatArray) -> FloatArray:
        """(n, 4) exact consistent nodal loads of a torque varying linearly along each element.

        Parameters
        ----------
        start, end
            (n,) or (n_cases, n) intensities at the element's start and end (N·m/m).

        Returns
        -------
        FloatArray
            (..., n, 4) loads conjugate to (θ₁, θ′₁, θ₂, θ′₂): N·m, N·m², N·m, N·m².

        References
        ----------
        .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 9.
        """
        e, f, g = self.functions.load_factors()
        free = self.warping == 0
        f, g = np.where(free, 0.0, f), np.where(free, 0.0, g)
        e = np.where(free, 1 / 6, e)
        length = self.length
        mean, rise = (start + end) / 2, (end - start) / 2
        return np.stack(
            [
                mean * length / 2 - rise * length * e,
                (mean * f + rise * g) * length**2,
                mean * length / 2 + rise * length * e,
                (-mean * f + rise * g) * length**2,
            ],
            axis=-1,
        )
