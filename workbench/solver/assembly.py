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
from dataclasses import dataclass
from typing import Any, Protocol

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


def _singular(what: str) -> InputError:
    msg = f"the system is singular: {what}"
    return InputError("supports", msg)


class BandFactor:
    """LU factors of stacked band matrices, with every load case solved from one factorization.

    Tridiagonal systems (one degree of freedom per node) use ?gttrf/?gttrs, wider bands
    ?gbtrf/?gbtrs; :meth:`rcond` estimates the reciprocal condition number (?gtcon/?gbcon).
    :meth:`solving` factors and solves at once (?gtsv: the same elimination, one pass), keeping
    the factors only if they are asked for later.
    """

    def __init__(self, band: Band) -> None:
        self.band = band
        # scipy's ?gttrf wrapper refuses orders below 3 (its du2 would be empty): use ?gbtrf.
        self._tridiagonal = band.half_width == 1 and band.size >= 3
        self._factors  # noqa: B018 - factor now: a zero pivot is refused here

    @classmethod
    def solving(cls, band: Band, rhs: FloatArray) -> tuple[BandFactor, FloatArray]:
        """Factor the band and solve (n_dofs_total, n_rhs) right-hand sides, overwritten.

        A tridiagonal band is eliminated together with its right-hand sides (?gtsv, the
        elimination ?gttrf and ?gttrs make, in one pass over the band); the factors of the
        returned object are then taken again only if :attr:`rcond` is read.

        Raises
        ------
        InputError
            On a zero pivot (part of the system is free to move).
        """
        factor = cls.__new__(cls)
        factor.band = band
        factor._tridiagonal = band.half_width == 1 and band.size >= 3
        if not factor._tridiagonal:
            return factor, factor.solve(rhs)
        values, diagonal = band.values, band.diagonal_row
        *_, solution, info = lapack.dgtsv(
            values[diagonal + 1, :-1],
            values[diagonal],
            values[diagonal - 1, 1:],
            rhs,
            overwrite_b=True,
        )
        if info > 0:
            raise _singular("a zero pivot: part of the system is free to move")
        return factor, np.asarray(solution)

    @functools.cached_property
    def _factors(self) -> tuple[Any, ...]:
        values, width = self.band.values, self.band.half_width
        if self._tridiagonal:
            diagonal = self.band.diagonal_row
            *factors, info = lapack.dgttrf(
                values[diagonal + 1, :-1], values[diagonal], values[diagonal - 1, 1:]
            )
        else:
            *factors, info = lapack.dgbtrf(values, width, width)
        if info > 0:
            raise _singular("a zero pivot: part of the system is free to move")
        return tuple(factors)

    def solve(self, rhs: FloatArray) -> FloatArray:
        """Solve for (n_dofs_total, n_rhs) right-hand sides (Fortran order avoids a copy)."""
        width = self.band.half_width
        if self._tridiagonal:
            solution, info = lapack.dgttrs(*self._factors, rhs, overwrite_b=True)
        else:
            lu, pivots = self._factors
            solution, info = lapack.dgbtrs(lu, width, width, rhs, pivots, overwrite_b=True)
        if info != 0:
            msg = f"LAPACK band solve failed (info {info})"
            raise RuntimeError(msg)
        return np.asarray(solution)

    @functools.cached_property
    def rcond(self) -> float:
        """Reciprocal condition number in the 1-norm, estimated (1 well-conditioned, 0 singular).

        Over stacked variants it is that of the stacked system: at most each variant's own.
        """
        width = self.band.half_width
        norm = float(np.abs(self.band.values[width:]).sum(axis=0).max())
        if self._tridiagonal:
            rcond, _ = lapack.dgtcon(*self._factors, norm)
        else:
            lu, pivots = self._factors
            rcond, _ = lapack.dgbcon(width, width, lu, pivots, norm)
        return float(rcond)


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
    def rcond(self) -> float:
        """Reciprocal condition number in the 1-norm, estimated with ``onenormest``."""
        size = self.matrix.shape[0]
        inverse = spla.LinearOperator(
            (size, size),
            matvec=self._lu.solve,
            rmatvec=lambda vector: self._lu.solve(vector, trans="T"),
            dtype=float,
        )
        norm = spla.onenormest(self.matrix)
        return float(1.0 / (norm * spla.onenormest(inverse)))


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
    n_cases, n_variants, n_dofs = rhs.shape
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
    full = np.empty((n_variants, block, n_cases))
    full[:, :n_dofs] = np.moveaxis(rhs, 0, -1)
    full[:, n_dofs:] = constraint_rhs[..., None]
    return SparseFactor(matrix), full.reshape(size, n_cases)


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
    "prescribe",
    "split_constrained",
    "with_constraints",
]
