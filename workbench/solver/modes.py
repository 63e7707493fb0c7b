"""Torsional vibration: natural frequencies, mode shapes and separation from running speeds.

The system is the static solver's own: the same elements with their exact stiffness
1/∫dx/(G·K), the same spring supports (:func:`~workbench.solver.analysis.torsion_stiffness_matrix`),
fixed supports and gear meshes. Inertia comes from the discs (lumped on their nodes) and from each
segment's own distributed rotary inertia ρ·J per length (J the polar moment of area, not the
torsion constant K), as a consistent mass matrix. Segments with mass are cut into several
elements (``elements_per_segment``, ``max_element_length``) because a modal result, unlike the
static one, depends on the mesh; massless segments stay one exact element each.

The undamped free vibration K·θ = ω²·M·θ is solved on the constrained coordinates θ = T·q:
fixed supports remove their rotation, and each gear mesh c_a·θ_a + c_b·θ_b = 0 removes one
rotation by expressing it through the other (θ_b = −(r_a/r_b)·θ_a for an external mesh), so that
TᵀKT and TᵀMT are the referred stiffness and inertia of the geared system. Small systems are
solved densely (massless rotations condensed out statically, then ``scipy.linalg.eigh``); large
ones by ``scipy.sparse.linalg.eigsh`` in shift-invert mode about a shift at or below zero.

A group of shafts that no support restrains has a rigid-body mode at zero frequency. The static
solver rejects such a system as a mechanism; here it is accepted and its rigid-body modes are
found exactly (a rotation constant along each shaft, in the gear ratios) and reported as such.

References
----------
.. [1] S. S. Rao, *Mechanical Vibrations*, Pearson: torsional vibration of discs on shafts,
   free-free two- and three-rotor systems, Holzer's method, torsional vibration of a uniform
   shaft (ωₙ = (2n − 1)·π/(2L)·√(G/ρ) fixed-free); chapters from memory.
.. [2] R. D. Cook, D. S. Malkus, M. E. Plesha and R. J. Witt, *Concepts and Applications of
   Finite Element Analysis*, 4th ed., Wiley, 2002, ch. 11 (consistent mass of a two-node element,
   ρAL/6·[[2, 1], [1, 2]] for the bar, the same for torsion with ρJ; static condensation of
   massless degrees of freedom; from memory).
.. [3] K.-J. Bathe, *Finite Element Procedures*, 1996, §11 (shift-invert Lanczos; rigid-body
   modes through a negative shift; from memory).
.. [4] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   ch. 12 (constraints by transformation of coordinates).
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

import numpy as np
import scipy.linalg
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from workbench.case.declaration import MAX_MODAL_ELEMENTS
from workbench.case.design import DEFAULT_MODAL_ELEMENTS_PER_SEGMENT
from workbench.case.errors import InputError, short
from workbench.case.units import UnitSystem, quote
from workbench.solver.analysis import Mesh, torsion_stiffness_matrix
from workbench.solver.columns import case_table
from workbench.solver.modal_model import (
    constraint_transformation,
    has_mass,
    modal_mesh,
    rigid_body_shapes,
    torsion_mass_matrix,
)
from workbench.solver.model import Model
from workbench.solver.sections import FloatArray

BoolArray = np.ndarray[Any, np.dtype[np.bool_]]

#: Elements each segment with distributed inertia is cut into, by default.
DEFAULT_ELEMENTS_PER_SEGMENT = DEFAULT_MODAL_ELEMENTS_PER_SEGMENT
#: Number of lowest modes reported by default.
DEFAULT_MODE_COUNT = 10
#: Systems with at most this many unknowns are solved densely (every mode at once).
DENSE_LIMIT = 400


@dataclass(frozen=True)
class Modes:
    """Natural frequencies and mode shapes of a model, lowest first.

    Attributes
    ----------
    model
        The model analysed.
    mesh
        The modal mesh (the static mesh's nodes plus discs and subdivisions of massive segments).
    angular_frequency
        (n_modes,) natural circular frequencies ω (rad/s); exactly 0 for rigid-body modes.
    rigid_body
        (n_modes,) whether each mode is a rigid-body mode of a group of shafts free to spin.
    shapes
        (n_modes, n_nodes) rotation at every mesh node, scaled so that the largest |angle| is 1
        and positive.
    complete
        Whether every mode of the discretised system is listed.
    elements_per_segment
        Elements each segment with distributed inertia was cut into (at least).
    notes
        Remarks on what the model includes (massless shafts, approximate polar moments).
    """

    model: Model
    mesh: Mesh
    angular_frequency: FloatArray
    rigid_body: BoolArray
    shapes: FloatArray
    complete: bool
    elements_per_segment: int
    notes: tuple[str, ...] = ()

    @property
    def frequency(self) -> FloatArray:
        """Natural frequencies f = ω/(2π) (Hz)."""
        return self.angular_frequency / (2.0 * math.pi)

    def __len__(self) -> int:
        return len(self.angular_frequency)

    def shape(self, mode: int, shaft_id: str) -> tuple[FloatArray, FloatArray]:
        """(x (m), normalised angle) of one mode along one shaft, at the mesh nodes."""
        number = self.model.shaft_number(shaft_id)
        window = slice(
            int(self.mesh.shaft_node_start[number]), int(self.mesh.shaft_node_start[number + 1])
        )
        return self.mesh.node_x[window], self.shapes[mode, window]

    def antinode(self, mode: int) -> tuple[str, float]:
        """(shaft id, x (m)) of the node where a mode's |angle| is largest."""
        node = int(np.argmax(np.abs(self.shapes[mode])))
        number = int(np.searchsorted(self.mesh.shaft_node_start, node, side="right") - 1)
        return self.model.shafts[number].id, float(self.mesh.node_x[node])


# --- the eigenproblem ---------------------------------------------------------------------------


def _dense_modes(
    stiffness: sp.spmatrix, mass: sp.spmatrix, lowest: int | None = None
) -> tuple[FloatArray, FloatArray]:
    """The ``lowest`` eigenpairs of K·q = λ·M·q (all when ``None``), massless unknowns condensed.

    Returns λ ascending and q (n, count). Asking for a few pairs lets LAPACK stop early (a
    subset costs about 40 % of the whole on a 170-unknown system).

    References
    ----------
    .. [1] Cook, Malkus, Plesha & Witt, *Concepts and Applications of FEA*, 4th ed., ch. 11
       (static condensation of massless degrees of freedom: exact for them; from memory).
    """
    k = stiffness.toarray()
    m = mass.toarray()
    massive = np.diag(m) > 0.0
    count = int(massive.sum())
    subset = None if lowest is None or lowest >= count else [0, lowest - 1]
    if massive.all():
        values, vectors = scipy.linalg.eigh(k, m, subset_by_index=subset)
        return values, vectors
    keep, drop = np.flatnonzero(massive), np.flatnonzero(~massive)
    with warnings.catch_warnings():
        # An ill-conditioned massless part (stiffnesses out of scale with each other) gives a
        # meaningless condensation: refused by the caller, naming the stiffness out of scale.
        warnings.simplefilter("error", scipy.linalg.LinAlgWarning)
        try:
            coupling = scipy.linalg.solve(
                k[np.ix_(drop, drop)], k[np.ix_(drop, keep)], assume_a="sym"
            )
        except scipy.linalg.LinAlgWarning as warning:
            raise _IllConditionedError(str(warning)) from None
    condensed = k[np.ix_(keep, keep)] - k[np.ix_(keep, drop)] @ coupling
    condensed = 0.5 * (condensed + condensed.T)
    values, reduced = scipy.linalg.eigh(condensed, m[np.ix_(keep, keep)], subset_by_index=subset)
    vectors = np.zeros((len(k), len(values)))
    vectors[keep] = reduced
    vectors[drop] = -coupling @ reduced
    return values, vectors


class _IllConditionedError(ArithmeticError):
    """The stiffness matrix is too ill-conditioned to condense (an internal signal)."""


def _out_of_scale(model: Model, mesh: Mesh) -> InputError:
    """The element or spring stiffness farthest (on a log scale) from the elements' median."""
    table = case_table(model)
    element_stiffness = 1.0 / mesh.flexibility[:, 0]
    springs = np.flatnonzero(~table.support_fixed)
    values = np.concatenate([element_stiffness, table.support_stiffness[0, springs]])
    distance = np.abs(np.log(values) - np.median(np.log(element_stiffness)))
    worst = int(np.argmax(distance))
    words = (
        f"{values[worst]:.3g} N·m/rad is out of scale with the rest (median element "
        f"{float(np.median(element_stiffness)):.3g}): the eigenproblem is too ill-conditioned"
    )
    if worst >= len(element_stiffness):
        return InputError(
            f"supports[{int(springs[worst - len(element_stiffness)])}].stiffness", words
        )
    row = int(mesh.element_segment_row[worst])
    return InputError(f"{table.segments.segment_path(row)}.material", f"its stiffness, {words}")


def _frequency_out_of_range(
    model: Model, mesh: Mesh, stiffness: sp.spmatrix, mass: sp.spmatrix
) -> InputError:
    """The material whose light elements put ω² = k/m beyond the range of numbers.

    LAPACK's generalised eigensolver returns no eigenvalue at all (no error) when one overflows:
    a density of 1e-297 kg/m³ gives masses of 1e-305 kg·m², normal numbers, but ω² of 1e309.
    """
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        ratio = np.abs(stiffness.diagonal()) / mass.diagonal()
    ratio[np.isnan(ratio)] = -1.0  # a massless node: condensed, not the cause
    node = int(np.argmax(ratio))
    last = len(mesh.element_length) - 1
    element = int(np.clip(np.searchsorted(mesh.element_start_node, node, "right") - 1, 0, last))
    shaft = int(mesh.element_shaft[element])
    number = int(mesh.element_segment[element])
    segment = model.shafts[shaft].segments[number]
    names = [layer.material.name for layer in segment.layers if layer.material.density]
    msg = (
        f"the mass of shafts[{shaft}].segments[{number}] is so small beside its stiffness that "
        f"ω² = k/m leaves the range of numbers ({_beyond(ratio[node])} rad²/s² at one node)"
    )
    return InputError(f"materials.{short(names[0] if names else '?')}.density", msg)


def _beyond(value: float) -> str:
    return f"{value:.3g}" if math.isfinite(value) else "beyond 1.8e308"


def _sparse_modes(
    stiffness: sp.spmatrix, mass: sp.spmatrix, count: int, shift: float
) -> tuple[FloatArray, FloatArray]:
    """The ``count`` eigenpairs of K·q = λ·M·q nearest above ``shift`` (≤ 0), shift-invert."""
    values, vectors = spla.eigsh(
        stiffness.tocsc(), k=count, M=mass.tocsc(), sigma=shift, which="LM"
    )
    order = np.argsort(values)
    return values[order], vectors[:, order]


def natural_modes(
    model: Model,
    *,
    count: int = DEFAULT_MODE_COUNT,
    up_to: float | None = None,
    elements_per_segment: int | None = None,
    max_element_length: float | None = None,
    method: str = "auto",
) -> Modes:
    """Natural frequencies and mode shapes of free torsional vibration.

    Parameters
    ----------
    model
        The validated model (SI). Any arrangement the static solver accepts, and also systems
        free to spin (their rigid-body modes are reported at 0 Hz).
    count
        How many of the lowest modes to return (rigid-body modes included), at least 1.
    up_to
        Also return every mode up to this circular frequency (rad/s) and the first one above it,
        when the discretised system has them.
    elements_per_segment
        Elements each segment with distributed inertia is cut into (default
        :data:`DEFAULT_ELEMENTS_PER_SEGMENT`, or the design's ``modal_elements_per_segment``).
    max_element_length
        Longest element on a segment with distributed inertia (m), or ``None`` (default: the
        design's ``modal_max_element_length``).
    method
        ``"auto"`` (dense up to :data:`DENSE_LIMIT` unknowns, sparse shift-invert above),
        ``"dense"`` or ``"sparse"``.

    Returns
    -------
    Modes
        Frequencies lowest first, rigid-body flags, normalised shapes.

    Raises
    ------
    InputError
        When the system has no inertia, a group free to spin carries none, two fixed supports
        sit at one point (refused as the statics refuse it), or an option is out of range.

    References
    ----------
    .. [1] Rao, *Mechanical Vibrations*, torsional vibration (from memory).
    .. [2] Cook, Malkus, Plesha & Witt, *Concepts and Applications of FEA*, 4th ed., ch. 11.
    """
    elements, longest = _options(model, count, elements_per_segment, max_element_length, method)
    modal_model, mesh = modal_mesh(model, elements, longest)
    stiffness = torsion_stiffness_matrix(modal_model, mesh)
    mass = torsion_mass_matrix(modal_model, mesh)
    if mass.nnz == 0 or not np.any(mass.diagonal() > 0.0):
        msg = "the system has no inertia: give discs, or a density for the shafts' materials"
        raise InputError("discs", msg)
    rigid = rigid_body_shapes(modal_model, mesh, mass)
    table = case_table(modal_model)
    # The statics' rule: a redundant fixed support leaves the frequencies defined, but the case
    # is the same ill-formed case file, refused alike whatever is asked of it.
    fixed = table.fixed_support_nodes(mesh.nodes_of(table.support_shaft, table.support_x))
    constraints = []
    for gear in model.gears:
        coefficient_a, coefficient_b = gear.coefficients
        node_a = mesh.node_of(model.shaft_number(gear.a.shaft), gear.a.x)
        node_b = mesh.node_of(model.shaft_number(gear.b.shaft), gear.b.x)
        constraints.append((node_a, coefficient_a, node_b, coefficient_b))
    transformation = constraint_transformation(len(mesh.node_x), fixed, constraints)
    transposed = transformation.T.tocsr()
    reduced_stiffness = (transposed @ stiffness @ transformation).tocsr()
    reduced_mass = (transposed @ mass @ transformation).tocsr()
    massive = int(np.count_nonzero(reduced_mass.diagonal() > 0.0))
    if massive == 0:
        msg = "no inertia is free to move: every disc and massive segment is held fixed"
        raise InputError("discs", msg)

    size = reduced_stiffness.shape[0]
    use_dense = method == "dense" or (method == "auto" and size <= DENSE_LIMIT)
    notes = list(_inertia_notes(model))
    if use_dense:
        # The modes asked for and one more (so that the first above ``up_to`` is among them);
        # twice as many until the highest found lies above ``up_to``, or all are found.
        lowest = max(count, len(rigid)) + 1
        while True:
            try:
                values, vectors = _dense_modes(reduced_stiffness, reduced_mass, lowest)
            except _IllConditionedError:
                raise _out_of_scale(modal_model, mesh) from None
            if len(values) < min(lowest, massive) or not np.all(np.isfinite(values)):
                raise _frequency_out_of_range(modal_model, mesh, stiffness, mass)
            if len(values) >= massive or up_to is None or values[-1] > up_to * up_to:
                break
            lowest *= 2
        complete = True
    else:
        values, vectors, complete = _sparse_search(
            model, reduced_stiffness, reduced_mass, massive, len(rigid), count, up_to, notes
        )
    # The lowest len(rigid) eigenvalues are the rigid-body modes (zero up to rounding): they are
    # replaced by the exact rigid rotations.
    flexible_values = np.maximum(values[len(rigid) :], 0.0)
    flexible_shapes = (transformation @ vectors[:, len(rigid) :]).T
    wanted = max(count, len(rigid))
    if up_to is not None:
        wanted = max(wanted, len(rigid) + int(np.searchsorted(np.sqrt(flexible_values), up_to)) + 1)
    flexible_count = max(0, min(wanted - len(rigid), len(flexible_values)))
    if flexible_count < len(flexible_values):
        complete = False
    angular = np.concatenate([np.zeros(len(rigid)), np.sqrt(flexible_values[:flexible_count])])
    shapes = np.vstack(
        [np.array(rigid).reshape(-1, len(mesh.node_x)), flexible_shapes[:flexible_count]]
    )
    shapes = _normalised(shapes)
    rigid_flags = np.arange(len(angular)) < len(rigid)
    for array in (angular, rigid_flags, shapes):
        array.setflags(write=False)
    return Modes(
        model=model,
        mesh=mesh,
        angular_frequency=angular,
        rigid_body=rigid_flags,
        shapes=shapes,
        complete=complete,
        elements_per_segment=elements,
        notes=tuple(notes),
    )


def _options(
    model: Model,
    count: int,
    elements_per_segment: int | None,
    max_element_length: float | None,
    method: str,
) -> tuple[int, float | None]:
    if isinstance(count, bool) or not isinstance(count, int) or count < 1:
        msg = f"must be a whole number of at least 1, not {count!r}"
        raise InputError("count", msg)
    if method not in ("auto", "dense", "sparse"):
        msg = f"must be 'auto', 'dense' or 'sparse', not {method!r}"
        raise InputError("method", msg)
    design = model.design
    pieces_key, longest_key = "elements_per_segment", "max_element_length"
    if elements_per_segment is None:
        pieces_key = "design.modal_elements_per_segment"
        elements_per_segment = getattr(
            design, "modal_elements_per_segment", DEFAULT_ELEMENTS_PER_SEGMENT
        )
    if max_element_length is None:
        longest_key = "design.modal_max_element_length"
        max_element_length = getattr(design, "modal_max_element_length", None)
    if (
        isinstance(elements_per_segment, bool)
        or not isinstance(elements_per_segment, int)
        or not 1 <= elements_per_segment <= MAX_MODAL_ELEMENTS
    ):
        msg = (
            f"must be a whole number from 1 to {MAX_MODAL_ELEMENTS:,}, not {elements_per_segment!r}"
        )
        raise InputError(pieces_key, msg)
    if max_element_length is not None:
        if not math.isfinite(max_element_length) or max_element_length <= 0.0:
            msg = f"must be greater than zero ({quote(max_element_length, 'length')})"
            raise InputError(longest_key, msg)
        # Bounded work: no segment with inertia cut into more elements than the case file may ask.
        longest = max(
            (
                segment.length
                for shaft in model.shafts
                for segment in shaft.segments
                if has_mass(segment)
            ),
            default=0.0,
        )
        if longest / max_element_length > MAX_MODAL_ELEMENTS:
            msg = (
                f"{quote(max_element_length, 'length')} would cut a segment of "
                f"{quote(longest, 'length')} into more than {MAX_MODAL_ELEMENTS:,} elements"
            )
            raise InputError(longest_key, msg)
    return elements_per_segment, max_element_length


def _sparse_search(
    model: Model,
    stiffness: sp.csr_matrix,
    mass: sp.csr_matrix,
    massive: int,
    rigid: int,
    count: int,
    up_to: float | None,
    notes: list[str],
) -> tuple[FloatArray, FloatArray, bool]:
    """Shift-invert Lanczos for the lowest modes, widening until ``up_to`` is passed."""
    if rigid:
        # A negative shift keeps K − σM regular when rigid-body modes make K singular; a small
        # one, relative to the elements' own frequencies, keeps the lowest modes well apart.
        diagonal_k, diagonal_m = stiffness.diagonal(), mass.diagonal()
        ratios = diagonal_k[diagonal_m > 0.0] / diagonal_m[diagonal_m > 0.0]
        shift = -1e-8 * float(np.median(ratios))
    else:
        shift = 0.0
    limit = max(1, min(massive - 1, stiffness.shape[0] // 4))
    wanted = min(max(count, 6) + rigid, limit)
    while True:
        values, vectors = _sparse_modes(stiffness, mass, wanted, shift)
        top = math.sqrt(max(float(values[-1]), 0.0))
        if up_to is None or top > up_to or wanted >= limit:
            break
        wanted = min(2 * wanted, limit)
    if up_to is not None and top <= up_to:
        notes.append(
            f"only the lowest {len(values)} modes were computed (up to {top / (2 * math.pi):.4g} "
            "Hz); the operating speeds reach above them"
        )
    return values, vectors, wanted >= stiffness.shape[0]


def _normalised(shapes: FloatArray) -> FloatArray:
    """Scale each row so that its largest |angle| is 1 and that entry is positive."""
    if not len(shapes):
        return shapes
    peak = np.argmax(np.abs(shapes), axis=1)
    scale = shapes[np.arange(len(shapes)), peak]
    scale = np.where(scale == 0.0, 1.0, scale)
    normalised: FloatArray = shapes / scale[:, None] + 0.0  # + 0.0: no −0.0 at fixed nodes
    return normalised


def _inertia_notes(model: Model) -> Iterable[str]:
    segments = [segment for shaft in model.shafts for segment in shaft.segments]
    massless = sum(not has_mass(segment) for segment in segments)
    if massless == len(segments):
        yield "no material density given: the shafts are massless springs, discs carry all inertia"
    elif massless:
        yield (
            f"{massless} of {len(segments)} segments have no material density: their own "
            "inertia is left out"
        )
    if any(
        has_mass(segment) and not layer.section.circular
        for segment in segments
        for layer in segment.layers
    ):
        yield (
            "rotary inertia of non-circular sections uses their polar moment of area, "
            "approximate for thin_closed and thin_open shapes (see the README)"
        )


# --- documents -----------------------------------------------------------------------------------


def modes_document(modes: Modes, units: UnitSystem | None = None) -> dict[str, Any]:
    """The ``workbench modes --json`` document.

    ``{"modes": [{"frequency": Hz, "rigid_body": bool, "shafts": {id: {"x": [...],
    "angle": [...]}}}]}``, lowest first; x in ``units`` (default: the case's) length units, the
    angles normalised to a largest |angle| of 1 over all shafts (no unit).
    """
    units = units or modes.model.units
    entries = []
    for mode in range(len(modes)):
        shafts = {}
        for shaft in modes.model.shafts:
            x, angle = modes.shape(mode, shaft.id)
            shafts[shaft.id] = {
                "x": [float(value) for value in units.from_si(x, "length")],
                "angle": [float(value) for value in angle],
            }
        entries.append(
            {
                "frequency": float(modes.frequency[mode]),
                "rigid_body": bool(modes.rigid_body[mode]),
                "shafts": shafts,
            }
        )
    return {"modes": entries}


__all__ = [
    "DEFAULT_ELEMENTS_PER_SEGMENT",
    "DEFAULT_MODE_COUNT",
    "Modes",
    "constraint_transformation",
    "modes_document",
    "natural_modes",
    "torsion_mass_matrix",
]
