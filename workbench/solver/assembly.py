"""Assembly and factorization: banded LAPACK without gears, one sparse LU with them.

Nodes are numbered shaft after shaft in increasing x and an element joins two consecutive nodes,
so with n degrees of freedom per node every element matrix lies within a band of half-width
2n − 1 (1 for uniform torsion: tridiagonal). Many variants of one topology are stacked one after
another into the same band (they share no entry), so a single LAPACK call factors them all.

Fixed degrees of freedom keep their row and column: the off-diagonal entries move to the
right-hand side and the row reads K_jj·θ_j = K_jj·θ̄_j, so the band keeps its shape and its
scale. Gear meshes are linear constraints with Lagrange multipliers (the mesh forces); a system
with gears is factored by SuperLU.

References
----------
.. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., Wiley, 2000, ch. 2-3
   (direct stiffness assembly, prescribed displacements) and ch. 12 (constraints by Lagrange
   multipliers).
.. [2] E. Anderson et al., *LAPACK Users' Guide*, 3rd ed., SIAM, 1999, §2.4 and §5.1 (band
   storage; ?gtsv, ?gttrf/?gttrs/?gtcon for tridiagonal and ?gbtrf/?gbtrs/?gbcon for band
   matrices).
.. [3] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
   ch. 15 (condition estimation; the 1-norm estimator behind ?gbcon and onenormest).
"""

from __future__ import annotations

import functools
import warnings
from collections.abc import Callable
from dataclasses import dataclass
from typing import Protocol

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.linalg import lapack

from workbench.case.errors import InputError
from workbench.solver.columns import IntArray
from workbench.solver.sections import FloatArray


class ElementFamily(Protocol):
    """What the assembly reads of an element family (see :class:`SaintVenantElements`)."""

    @property
    def dofs_per_node(self) -> int: ...

    def stiffness_entry(self, row: int, column: int) -> FloatArray: ...


@dataclass(frozen=True)
class Band:
    """Stacked band matrices of many variants in LAPACK general-band storage.

    ``values[kl + ku + i − j, j]`` holds A[i, j] (kl = ku = ``half_width``); the first kl rows
    are the work space ?gbtrf fills. Columns run variant after variant.

    Parameters
    ----------
    values
        (3·half_width + 1, n_variants · n_dofs) band storage.
    half_width
        Number of sub- (and super-) diagonals.
    n_variants
        Number of stacked systems.
    """

    values: FloatArray
    half_width: int
    n_variants: int

    @property
    def size(self) -> int:
        """Order of the stacked system."""
        return int(self.values.shape[1])

    @property
    def diagonal_row(self) -> int:
        """Storage row of the main diagonal."""
        return 2 * self.half_width

    def blocks(self) -> FloatArray:
        """(rows, n_variants, n_dofs) view of the storage, variant by variant."""
        return self.values.reshape(self.values.shape[0], self.n_variants, -1)


def assemble_band(elements: ElementFamily, shaft_node_start: IntArray, n_variants: int) -> Band:
    """Assemble every element of every variant into stacked band storage.

    Parameters
    ----------
    elements
        The element family: entries of each element's stiffness matrix (n_variants, n_elements).
    shaft_node_start
        (n_shafts + 1,) first node of each shaft; a shaft's elements join consecutive nodes.
    n_variants
        Number of variants to stack.

    Returns
    -------
    Band
        The unconstrained stiffness matrices, without springs.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2 (direct
       stiffness assembly: K = Σ Aᵉᵀ kᵉ Aᵉ).
    .. [2] Anderson et al., *LAPACK Users' Guide*, 3rd ed., §5.3.3 (band storage).
    """
    dofs = elements.dofs_per_node
    half_width = 2 * dofs - 1
    n_nodes = int(shaft_node_start[-1])
    values = np.zeros((3 * half_width + 1, n_variants, n_nodes * dofs))
    element_dofs = 2 * dofs
    for number in range(len(shaft_node_start) - 1):  # a loop over shafts
        first_node, end_node = int(shaft_node_start[number]), int(shaft_node_start[number + 1])
        first, stop = first_node - number, end_node - 1 - number  # the shaft's elements
        for row in range(element_dofs):
            for column in range(element_dofs):
                # Element e starts at node n: entry (row, column) sits at A[n·d + row, n·d + column].
                start = first_node * dofs + column
                target = values[
                    2 * half_width + row - column, :, start : start + (stop - first) * dofs : dofs
                ]
                target += elements.stiffness_entry(row, column)[:, first:stop]
    return Band(values.reshape(values.shape[0], -1), half_width, n_variants)


def add_diagonal(band: Band, dofs: IntArray, values: FloatArray) -> None:
    """Add (n_variants or 1, n) values to the diagonal at degrees of freedom ``dofs`` (springs)."""
    diagonal = band.blocks()[band.diagonal_row]
    for item in range(len(dofs)):  # a loop over springs
        diagonal[:, dofs[item]] += values[:, item]


def prescribe(band: Band, rhs: FloatArray, dofs: IntArray, values: FloatArray) -> None:
    """Hold degrees of freedom at prescribed values, keeping the band's shape.

    Parameters
    ----------
    band
        The assembled band (changed in place).
    rhs
        (n_cases, n_variants, n_dofs) right-hand sides (changed in place).
    dofs
        (n_fixed,) the held degrees of freedom, distinct.
    values
        (n_variants or 1, n_fixed) their values.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 2 (prescribed
       displacements: their columns times the values move to the right-hand side).
    """
    blocks = band.blocks()
    diagonal_row, width = band.diagonal_row, band.half_width
    n_dofs = blocks.shape[2]
    for offset in range(-width, width + 1):  # a loop over the band's diagonals
        if offset == 0:
            continue
        neighbour = dofs + offset
        inside = (neighbour >= 0) & (neighbour < n_dofs)
        held, other = dofs[inside], neighbour[inside]
        # Column j of the held dof: A[j + offset, j] moves to the right-hand side, then goes.
        column = blocks[diagonal_row + offset]
        rhs[:, :, other] -= column[:, held] * values[:, inside]
        column[:, held] = 0.0
        # Row j: A[j, j + offset] sits in column j + offset.
        blocks[diagonal_row - offset][:, other] = 0.0
    rhs[:, :, dofs] = blocks[diagonal_row][:, dofs] * values


class BandFactor:
    """LU factors of stacked band matrices, with every load case solved from one factorization.

    Tridiagonal systems (one degree of freedom per node) use ?gttrf/?gttrs, wider bands
    ?gbtrf/?gbtrs; :meth:`rcond` estimates the reciprocal condition number (?gtcon/?gbcon).

    A pivot that comes out exactly zero (a near mechanism, its stiffness lost to rounding) is
    recorded in :attr:`zero_pivots` and replaced by one, so that the solve stays finite and the
    other stacked variants (whose blocks share no entry with it) keep their own solutions; the
    caller refuses the variants that hold one.
    """

    def __init__(self, band: Band) -> None:
        self.band = band
        width = band.half_width
        values = band.values
        # scipy's ?gttrf wrapper refuses orders below 3 (its du2 would be empty): use ?gbtrf.
        self._tridiagonal = width == 1 and band.size >= 3
        if self._tridiagonal:
            diagonal = band.diagonal_row
            factors = lapack.dgttrf(
                values[diagonal + 1, :-1], values[diagonal], values[diagonal - 1, 1:]
            )
            self._factors = factors[:-1]
            pivots = factors[1]  # U's diagonal
        else:
            lu, pivot_rows, _ = lapack.dgbtrf(values, width, width)
            self._factors = (lu, pivot_rows)
            pivots = lu[2 * width]
        # LAPACK completes the factorization past a zero pivot (info > 0): find every one.
        #: Rows whose pivot came out exactly zero (set to one in the factors).
        self.zero_pivots = np.flatnonzero(pivots == 0.0)
        pivots[self.zero_pivots] = 1.0

    @property
    def order(self) -> int:
        """Order of the stacked system."""
        return self.band.size

    def solve(self, rhs: FloatArray, transpose: bool = False) -> FloatArray:
        """Solve A·x = b (or Aᵀ·x = b) for (n_dofs_total, n_rhs) right-hand sides.

        The right-hand sides are overwritten where they can be (Fortran order avoids a copy).
        """
        width = self.band.half_width
        if self._tridiagonal:
            trans = "T" if transpose else "N"
            solution, info = lapack.dgttrs(*self._factors, rhs, trans=trans, overwrite_b=True)
        else:
            lu, pivots = self._factors
            solution, info = lapack.dgbtrs(
                lu, width, width, rhs, pivots, trans=int(transpose), overwrite_b=True
            )
        if info != 0:
            msg = f"LAPACK band solve failed (info {info})"
            raise RuntimeError(msg)
        return np.asarray(solution)

    @functools.cached_property
    def rcond(self) -> float:
        """Reciprocal condition number in the 1-norm, estimated (1 well-conditioned, 0 singular).

        Over stacked variants it is that of the stacked system: at most each variant's own.
        """
        if len(self.zero_pivots):
            return 0.0
        width = self.band.half_width
        norm = float(np.abs(self.band.values[width:]).sum(axis=0).max())
        if self._tridiagonal:
            rcond, _ = lapack.dgtcon(*self._factors, norm)
        else:
            lu, pivots = self._factors
            rcond, _ = lapack.dgbcon(width, width, lu, pivots, norm)
        return float(rcond)

    def block_rcond(self, n_blocks: int) -> FloatArray:
        """Reciprocal 1-norm condition number of each stacked variant's own matrix, estimated.

        The stacked :attr:`rcond` is at most every variant's (‖A‖₁ and ‖A⁻¹‖₁ of a block
        diagonal matrix are the largest of its blocks'); this tells the variants apart, by
        Hager's estimator (:func:`block_rcond`). An M-matrix has :meth:`m_matrix_rcond`.
        """
        width = self.band.half_width
        column_sums = np.abs(self.band.values[width:]).sum(axis=0)
        rcond = block_rcond(self.solve, column_sums, n_blocks)
        rcond[self.zero_pivots // (self.band.size // n_blocks)] = 0.0
        return rcond

    def m_matrix_rcond(self, n_blocks: int) -> FloatArray:
        """Reciprocal 1-norm condition number of each stacked variant's M-matrix, exactly.

        The stiffness matrix of springs and elements of one rotation per node (positive
        diagonal, no positive entry off it, nonsingular: any system restrained) is an
        M-matrix: its inverse has no negative entry, so ‖A⁻¹‖₁, the largest column sum of
        A⁻¹, is the largest entry of A⁻ᵀ·1 — from one solve for every variant at once, where
        ?gtcon's estimate takes a dozen. Only for such a matrix (the caller knows).

        References
        ----------
        .. [1] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM,
           2002, §8.3 (‖A⁻¹‖ of an M-matrix from one solve with the vector of ones; section
           from memory).
        .. [2] A. Berman and R. J. Plemmons, *Nonnegative Matrices in the Mathematical
           Sciences*, SIAM, 1994, ch. 6 (a nonsingular M-matrix has a nonnegative inverse).
        """
        width, values, diagonal = self.band.half_width, self.band.values, self.band.diagonal_row
        # Nothing positive off the diagonal: a column's Σ|A_ij| is A_jj − Σ_(i≠j) A_ij.
        column_sums = values[diagonal].copy()
        for row in (*range(width, diagonal), *range(diagonal + 1, 3 * width + 1)):
            column_sums -= values[row]  # a loop over the band's off-diagonals
        norms = column_sums.reshape(n_blocks, -1).max(axis=1)
        ones = np.ones((self.band.size, 1), order="F")
        inverse_norms = np.abs(self.solve(ones, transpose=True)).reshape(n_blocks, -1).max(axis=1)
        with np.errstate(divide="ignore", over="ignore"):
            rcond = 1.0 / (norms * inverse_norms)
        rcond[~np.isfinite(rcond)] = 0.0
        rcond[self.zero_pivots // (self.band.size // n_blocks)] = 0.0
        return rcond


class SparseFactor:
    """SuperLU factors of a sparse (saddle-point) system, one factorization for all cases."""

    def __init__(self, matrix: sp.csc_matrix) -> None:
        self.matrix = matrix
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("error", spla.MatrixRankWarning)
                # Natural order: every variant's block is factored as its own system would be,
                # the border of multipliers after its band (fill-in stays within the band's
                # reach of each constrained pair); row pivoting handles the zero diagonal.
                self._lu = spla.splu(matrix, permc_spec="NATURAL")
        except (RuntimeError, spla.MatrixRankWarning):
            msg = (
                "the system is singular: the gear meshes form a closed loop whose constraints "
                "repeat each other, or lock part of the system against itself"
            )
            raise InputError("gears", msg) from None

    @property
    def order(self) -> int:
        """Order of the stacked (bordered) system."""
        return int(self.matrix.shape[0])

    def solve_plain(self, rhs: FloatArray, transpose: bool = False) -> FloatArray:
        """Solve A·x = b (or Aᵀ·x = b) with the factors alone (no refinement)."""
        return np.asarray(self._lu.solve(rhs, trans="T" if transpose else "N"))

    def solve(self, rhs: FloatArray) -> FloatArray:
        """Solve for (n, n_rhs) right-hand sides, with one step of iterative refinement.

        The saddle-point system pivots off its diagonal: the refinement brings the gear
        constraints back to rounding (soft springs on stiff shafts otherwise leave ~1e-8).
        """
        solution = self._lu.solve(rhs)
        if not np.all(np.isfinite(solution)):
            msg = "the system is singular: check for redundant gear loops"
            raise InputError("gears", msg)
        return np.asarray(solution + self._lu.solve(rhs - self.matrix @ solution))

    @functools.cached_property
    def _columns(self) -> tuple[IntArray, IntArray, FloatArray]:
        """(row, column, |value|) of every stored entry (the CSC arrays, one pass)."""
        matrix = self.matrix
        matrix.sum_duplicates()
        columns = np.repeat(np.arange(matrix.shape[1]), np.diff(matrix.indptr))
        return matrix.indices, columns, np.abs(matrix.data)

    @functools.cached_property
    def scaling(self) -> FloatArray:
        """(n,) symmetric scaling D that makes D·A·D free of the units of the multipliers.

        The bordered matrix mixes stiffnesses (N·m/rad) with pitch radii (m): its condition
        number would change with the units of the multipliers alone. D = 1/√A_jj on the
        rotations, and on each multiplier the reciprocal of its largest scaled coefficient.
        """
        rows, columns, values = self._columns
        size = self.matrix.shape[0]
        on_diagonal = rows == columns
        diagonal = np.zeros(size)
        diagonal[rows[on_diagonal]] = values[on_diagonal]
        rotation = diagonal > 0.0
        scaling = np.zeros(size)
        scaling[rotation] = 1.0 / np.sqrt(diagonal[rotation])
        largest = np.zeros(size)
        np.maximum.at(largest, columns, values * scaling[rows])
        border = ~rotation & (largest > 0.0)
        scaling[border] = 1.0 / largest[border]
        return scaling

    def _scaled_solve(self, rhs: FloatArray, transpose: bool = False) -> FloatArray:
        """(D·A·D)⁻¹·rhs = D⁻¹·A⁻¹·D⁻¹·rhs (or with Aᵀ)."""
        inverse = (1.0 / self.scaling).reshape(-1, *[1] * (np.ndim(rhs) - 1))
        return inverse * self.solve_plain(inverse * rhs, transpose)

    def _scaled_column_sums(self) -> FloatArray:
        rows, columns, values = self._columns
        scaling = self.scaling
        sums = np.bincount(columns, values * scaling[rows], minlength=len(scaling))
        return sums * scaling

    @functools.cached_property
    def rcond(self) -> float:
        """Reciprocal 1-norm condition number of D·A·D (:attr:`scaling`), estimated.

        ‖D·A·D‖₁ exactly, ‖(D·A·D)⁻¹‖₁ by ``onenormest`` through the factors.
        """
        size = self.matrix.shape[0]
        inverse = spla.LinearOperator(
            (size, size),
            matvec=self._scaled_solve,
            rmatvec=lambda vector: self._scaled_solve(vector, transpose=True),
            dtype=float,
        )
        norm = float(self._scaled_column_sums().max())
        return float(1.0 / (norm * spla.onenormest(inverse)))

    def block_rcond(self, n_blocks: int) -> FloatArray:
        """Reciprocal condition number of each stacked variant's scaled bordered matrix."""
        return block_rcond(self._scaled_solve, self._scaled_column_sums(), n_blocks)


def block_rcond(
    solve: Callable[[FloatArray, bool], FloatArray], column_sums: FloatArray, n_blocks: int
) -> FloatArray:
    """Reciprocal 1-norm condition numbers of the equal diagonal blocks of one factored matrix.

    ‖A_b⁻¹‖₁ is estimated for every block at once by Hager's method in Higham's form (the
    estimator behind LAPACK's ?lacon): each step solves the whole stacked system once with A
    and once with Aᵀ, every block carrying its own vector, so the blocks are told apart at the
    cost of a few solves of one right-hand side. The estimate of ‖A_b⁻¹‖₁ is a lower bound
    (almost always within a factor 3), so the reciprocal condition number is an upper one.

    Parameters
    ----------
    solve
        ``solve(rhs, transpose)``: A⁻¹·rhs (or A⁻ᵀ·rhs) for (n, k) right-hand sides.
    column_sums
        (n,) Σᵢ|A_ij| of every column: ‖A_b‖₁ is the largest of its block's.
    n_blocks
        Number of blocks, all of order n / n_blocks.

    Returns
    -------
    numpy.ndarray
        (n_blocks,) 1 / (‖A_b‖₁·‖A_b⁻¹‖₁), 0 for a block whose inverse is not finite.

    References
    ----------
    .. [1] W. W. Hager, "Condition estimates", *SIAM J. Sci. Stat. Comput.* 5 (1984) 311-316.
    .. [2] N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002,
       §15.3, Algorithm 15.4 (the estimator, its extra test vector and its limit of 5 steps).
    """
    size = len(column_sums) // n_blocks
    norms = column_sums.reshape(n_blocks, size).max(axis=1)

    def apply(vectors: FloatArray, transpose: bool) -> FloatArray:
        rhs = np.asfortranarray(vectors.reshape(-1, 1))
        return np.asarray(solve(rhs, transpose)).reshape(n_blocks, size)

    blocks = np.arange(n_blocks)
    vector = np.full((n_blocks, size), 1.0 / size)
    estimate = np.zeros(n_blocks)
    going = np.ones(n_blocks, dtype=bool)
    with np.errstate(invalid="ignore", over="ignore"):
        for _ in range(5):  # Higham's limit on the steps, every block at once
            image = apply(vector, False)
            norm = np.abs(image).sum(axis=1)
            going &= ~(norm <= estimate)  # no longer growing: that block is done
            estimate = np.where(going, norm, estimate)
            signs = np.where(image >= 0.0, 1.0, -1.0)
            back = apply(signs, True)
            largest = np.argmax(np.abs(back), axis=1)
            going &= np.abs(back[blocks, largest]) > np.einsum("bi,bi->b", back, vector)
            if not going.any():
                break
            vector = np.zeros((n_blocks, size))
            vector[blocks, largest] = 1.0
        # Higham's extra vector catches the matrices the steps underestimate.
        alternating = (1.0 + np.arange(size) / max(size - 1, 1)) * (-1.0) ** np.arange(size)
        extra = 2.0 * np.abs(apply(np.tile(alternating, (n_blocks, 1)), False)).sum(axis=1)
        estimate = np.maximum(estimate, extra / (3.0 * size))
        rcond = 1.0 / (norms * estimate)
    return np.where(np.isfinite(rcond), rcond, 0.0)


def band_to_sparse(band: Band) -> sp.coo_matrix:
    """The stacked band as a sparse matrix (for systems that need more than a band)."""
    rows, cols, values = [], [], []
    size = band.size
    columns = np.arange(size)
    for storage_row in range(band.half_width, band.values.shape[0]):
        offset = storage_row - band.diagonal_row
        data = band.values[storage_row]
        keep = (data != 0.0) & (columns + offset >= 0) & (columns + offset < size)
        rows.append(columns[keep] + offset)
        cols.append(columns[keep])
        values.append(data[keep])
    return sp.coo_matrix(
        (np.concatenate(values), (np.concatenate(rows), np.concatenate(cols))), shape=(size, size)
    )


def with_constraints(
    band: Band,
    rhs: FloatArray,
    constraint_dofs: IntArray,
    coefficients: FloatArray,
    known: FloatArray,
) -> tuple[SparseFactor, FloatArray]:
    """Border the stacked system with linear constraints Σ c·u = 0 (Lagrange multipliers).

    Parameters
    ----------
    band
        The constrained-support stiffness of every variant.
    rhs
        (n_cases, n_variants, n_dofs) right-hand sides.
    constraint_dofs
        (n_constraints, 2) the two degrees of freedom each constraint joins.
    coefficients
        (n_variants or 1, n_constraints, 2) their coefficients c_a, c_b.
    known
        (n_variants or 1, n_constraints, 2) the prescribed value of each joined dof, NaN where
        it is free; a prescribed dof's term moves to the constraint's right-hand side.

    Returns
    -------
    factor, rhs
        The factored bordered system and its (n_total, n_cases) right-hand sides: variant after
        variant, each variant's dofs then its multipliers (:func:`split_constrained`), so that
        each variant is factored with the very arithmetic of its own system.
    """
    _, n_variants, n_dofs = rhs.shape
    n_constraints = len(constraint_dofs)
    block = n_dofs + n_constraints  # each variant's dofs, then its multipliers
    coefficients = np.broadcast_to(coefficients, (n_variants, n_constraints, 2))
    known = np.broadcast_to(known, (n_variants, n_constraints, 2))
    free = np.isnan(known)
    first = np.arange(n_variants)[:, None, None] * block
    dof = first + constraint_dofs[None]
    multiplier = np.broadcast_to(first + n_dofs + np.arange(n_constraints)[:, None], dof.shape)
    base = band_to_sparse(band)
    # Band numbering (variant · n_dofs + dof) to the bordered numbering (variant · block + dof).
    base_row = base.row + (base.row // n_dofs) * n_constraints
    base_col = base.col + (base.col // n_dofs) * n_constraints
    rows = np.concatenate([base_row, dof[free], multiplier[free]])
    cols = np.concatenate([base_col, multiplier[free], dof[free]])
    values = np.concatenate([base.data, coefficients[free], coefficients[free]])
    size = n_variants * block
    matrix = sp.csc_matrix((values, (rows, cols)), shape=(size, size))
    constraint_rhs = -np.where(free, 0.0, coefficients * np.nan_to_num(known)).sum(axis=2)
    return SparseFactor(matrix), bordered(rhs, constraint_rhs[None])


def bordered(dof_values: FloatArray, constraint_values: FloatArray) -> FloatArray:
    """Right-hand sides in the bordered numbering of :func:`with_constraints`.

    Parameters
    ----------
    dof_values
        (n_cases, n_variants, n_dofs) the rows of the degrees of freedom.
    constraint_values
        (n_cases or 1, n_variants, n_constraints) the rows of the constraints.

    Returns
    -------
    numpy.ndarray
        (n_variants · (n_dofs + n_constraints), n_cases): variant after variant, its dofs then
        its constraints.
    """
    n_cases, n_variants, n_dofs = dof_values.shape
    block = n_dofs + constraint_values.shape[-1]
    full = np.empty((n_variants, block, n_cases))
    full[:, :n_dofs] = np.moveaxis(dof_values, 0, -1)
    full[:, n_dofs:] = np.moveaxis(constraint_values, 0, -1)
    return full.reshape(n_variants * block, n_cases)


def split_constrained(
    solution: FloatArray, n_variants: int, n_dofs: int
) -> tuple[FloatArray, FloatArray]:
    """(n_cases, n_variants, n_dofs) dofs and (n_cases, n_variants, n_constraints) multipliers."""
    blocks = solution.reshape(n_variants, -1, solution.shape[1])
    return np.moveaxis(blocks[:, :n_dofs], -1, 0), np.moveaxis(blocks[:, n_dofs:], -1, 0)


__all__ = [
    "Band",
    "BandFactor",
    "ElementFamily",
    "SparseFactor",
    "add_diagonal",
    "assemble_band",
    "band_to_sparse",
    "block_rcond",
    "bordered",
    "prescribe",
    "split_constrained",
    "with_constraints",
]
