"""The modal model of a torsion system: its mesh, consistent mass and constraints.

The elements, springs, fixed supports and gear meshes are the static solver's own; inertia comes
from the discs (lumped on their nodes) and each segment's distributed rotary inertia ρ·J per
length as a consistent mass matrix. Fixed supports and gear meshes are applied by a
transformation θ = T·q; a group of shafts no support restrains has exact rigid-body shapes.

References
----------
.. [1] R. D. Cook, D. S. Malkus, M. E. Plesha and R. J. Witt, *Concepts and Applications of
   Finite Element Analysis*, 4th ed., Wiley, 2002, ch. 11 (consistent mass of a two-node element,
   ρAL/6·[[2, 1], [1, 2]] for the bar, the same for torsion with ρJ; from memory).
.. [2] W. McGuire, R. H. Gallagher and R. D. Ziemian, *Matrix Structural Analysis*, 2nd ed.,
   ch. 12 (constraints by transformation of coordinates).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable, Sequence

import numpy as np
import scipy.linalg
import scipy.sparse as sp

from workbench.case.errors import InputError, short
from workbench.case.validate import not_normal_positive
from workbench.solver.analysis import Mesh, build_mesh
from workbench.solver.model import POSITION_TOLERANCE, Model, Segment
from workbench.solver.sections import FloatArray

_GAUSS_POINTS, _GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(8)
#: Gauss–Legendre points and weights on [0, 1]; 8 points integrate the consistent mass of a
#: tapered element (a polynomial of degree 6 in the element coordinate) exactly.
_UNIT_POINTS = 0.5 * (_GAUSS_POINTS + 1.0)
_UNIT_WEIGHTS = 0.5 * _GAUSS_WEIGHTS


def _rotary_inertia(segment: Segment, fraction: FloatArray) -> FloatArray:
    """Σ ρᵢ·Jᵢ (kg·m) of a segment's layers at fractions of its length; no density: no mass."""
    total = np.zeros(np.shape(fraction))
    for layer in segment.layers:
        if layer.material.density is not None:
            total = total + layer.material.density * layer.section.polar_moment_at(fraction)
    return total


def has_mass(segment: Segment) -> bool:
    """Whether any layer of the segment has a density (so distributed inertia)."""
    return any(layer.material.density is not None for layer in segment.layers)


def _subdivisions(
    model: Model, elements_per_segment: int, max_element_length: float | None
) -> list[FloatArray]:
    """Inner cut points of every segment with inertia, one array per shaft (m)."""
    out = []
    for shaft in model.shafts:
        parts = []
        for number, segment in enumerate(shaft.segments):
            if not has_mass(segment):
                continue  # a massless segment is one exact spring: inner nodes add nothing
            pieces = elements_per_segment
            if max_element_length is not None:
                pieces = max(pieces, math.ceil(segment.length / max_element_length - 1e-9))
            start = float(shaft.boundaries[number])
            parts.append(start + segment.length * np.arange(1, pieces) / pieces)
        out.append(np.concatenate(parts) if parts else np.zeros(0))
    return out


def modal_mesh(
    model: Model, elements_per_segment: int, max_element_length: float | None
) -> tuple[Model, Mesh]:
    """The model the vibration analysis solves (massive segments subdivided) and its mesh."""
    per_shaft = _subdivisions(model, elements_per_segment, max_element_length)
    discs: list[list[float]] = [[] for _ in model.shafts]
    for disc in model.discs:
        discs[model.shaft_number(disc.shaft)].append(disc.x)
    wanted = [
        np.concatenate([np.asarray(own, dtype=float), inner])
        for own, inner in zip(discs, per_shaft, strict=True)
    ]
    points = tuple(
        (shaft.id, x) for shaft, xs in zip(model.shafts, wanted, strict=True) for x in xs.tolist()
    )
    # The loads play no part in free vibration.
    modal_model = dataclasses.replace(
        model,
        load_cases=(),
        combinations=(),
        design=None,
        extra_nodes=points,
    )
    mesh = build_mesh(modal_model)
    for number, (shaft, xs) in enumerate(zip(model.shafts, wanted, strict=True)):
        nodes = mesh.node_x[mesh.shaft_node_start[number] : mesh.shaft_node_start[number + 1]]
        right = np.clip(np.searchsorted(nodes, xs), 1, len(nodes) - 1)
        gap = np.minimum(np.abs(nodes[right] - xs), np.abs(nodes[right - 1] - xs))
        if np.any(gap > 2.0 * POSITION_TOLERANCE * shaft.length):  # pragma: no cover
            msg = f"the modal mesh lacks a node on shaft {shaft.id!r}: a broken invariant"
            raise AssertionError(msg)
    return modal_model, mesh


def torsion_mass_matrix(model: Model, mesh: Mesh) -> sp.csr_matrix:
    """The assembled, unconstrained mass matrix (kg·m²) over all mesh nodes.

    Parameters
    ----------
    model
        The model: its discs and its segments' materials and sections.
    mesh
        A mesh of the model (:func:`~workbench.solver.analysis.build_mesh`) with a node at every
        disc.

    Returns
    -------
    scipy.sparse.csr_matrix
        Consistent element mass with linear shape functions, M_ij = ∫ μ(x)·N_i·N_j dx with
        μ = Σ ρ·J (kg·m); for a prismatic element μL/6·[[2, 1], [1, 2]]. Tapered elements are
        integrated by 8-point Gauss–Legendre, exact for their polynomial integrand. Discs add
        their inertia on the diagonal.

    References
    ----------
    .. [1] Cook, Malkus, Plesha & Witt, *Concepts and Applications of Finite Element Analysis*,
       4th ed., ch. 11, consistent mass matrix of a two-node bar element (from memory).
    .. [2] Rao, *Mechanical Vibrations*, torsional vibration, rotary inertia of a shaft element
       ρ·J·dx (from memory).
    """
    n_elements = len(mesh.element_length)
    length = mesh.element_length
    # μ at the Gauss points of each element: constant on prismatic segments.
    mu = np.zeros((n_elements, len(_UNIT_POINTS)))
    for number, shaft in enumerate(model.shafts):
        # A shaft's elements are contiguous and in order of x, so of segment.
        first = int(mesh.shaft_node_start[number]) - number
        last = int(mesh.shaft_node_start[number + 1]) - number - 1
        segments = mesh.element_segment[first:last]
        constant = np.array(
            [
                float(_rotary_inertia(segment, np.zeros(1))[0]) if segment.prismatic else 0.0
                for segment in shaft.segments
            ]
        )
        mu[first:last] = constant[segments][:, None]
        for segment_number, segment in enumerate(shaft.segments):
            if segment.prismatic or not has_mass(segment):
                continue
            low, high = np.searchsorted(segments, [segment_number, segment_number + 1])
            elements = np.arange(first + low, first + high)
            start = mesh.node_x[mesh.element_start_node[elements]]
            origin = shaft.boundaries[segment_number]
            fraction = (
                start[:, None] + length[elements, None] * _UNIT_POINTS[None, :] - origin
            ) / segment.length
            mu[elements] = _rotary_inertia(segment, np.clip(fraction, 0.0, 1.0))
    shape_a, shape_b = 1.0 - _UNIT_POINTS, _UNIT_POINTS
    with np.errstate(over="ignore", invalid="ignore"):  # a product out of range is checked below
        weighted = mu * _UNIT_WEIGHTS * length[:, None]
        m_aa = weighted @ (shape_a * shape_a)
        m_ab = weighted @ (shape_a * shape_b)
        m_bb = weighted @ (shape_b * shape_b)
    _require_masses_in_range(model, mesh, np.stack([m_aa, m_ab, m_bb]))
    node_a = mesh.element_start_node
    node_b = node_a + 1
    rows = np.concatenate([node_a, node_b, node_a, node_b])
    cols = np.concatenate([node_a, node_b, node_b, node_a])
    values = np.concatenate([m_aa, m_bb, m_ab, m_ab])
    size = len(mesh.node_x)
    matrix = sp.csr_matrix((values, (rows, cols)), shape=(size, size))
    if model.discs:
        nodes = [mesh.node_of(model.shaft_number(disc.shaft), disc.x) for disc in model.discs]
        inertia = [disc.inertia for disc in model.discs]
        matrix = matrix + sp.csr_matrix((inertia, (nodes, nodes)), shape=(size, size))
    return matrix


def _require_masses_in_range(model: Model, mesh: Mesh, masses: FloatArray) -> None:
    """Raise :class:`InputError` unless every element's mass entries are 0 or normal numbers.

    ``masses``: (3, n_elements) M_aa, M_ab, M_bb (kg·m²). A density of 1e-300 kg/m³ gives
    entries of 1e-309, which the eigensolver cannot work with (it returns no modes at all).
    """
    bad = (masses != 0.0) & not_normal_positive(masses)
    if not bad.any():
        return
    element = int(np.argmax(bad.any(axis=0)))
    shaft = int(mesh.element_shaft[element])
    segment = model.shafts[shaft].segments[int(mesh.element_segment[element])]
    names = [layer.material.name for layer in segment.layers if layer.material.density]
    value = float(masses[:, element][bad[:, element]][0])
    msg = (
        f"the rotary inertia ρ·J·L/3 of an element of shafts[{shaft}].segments"
        f"[{int(mesh.element_segment[element])}] comes to {value:.3g} kg·m², beyond the range "
        "of full-precision numbers"
    )
    raise InputError(f"materials.{short(names[0] if names else '?')}.density", msg)


# --- constraints ------------------------------------------------------------------------------


def constraint_transformation(
    n_nodes: int,
    fixed: Iterable[int],
    constraints: Sequence[tuple[int, float, int, float]],
) -> sp.csr_matrix:
    """The basis T (θ = T·q) of rotations that honour fixed nodes and linear two-node constraints.

    Parameters
    ----------
    n_nodes
        Number of nodal rotations.
    fixed
        Nodes held at zero rotation.
    constraints
        (node_a, c_a, node_b, c_b) for each constraint c_a·θ_a + c_b·θ_b = 0 (a gear mesh: c in m).

    Returns
    -------
    scipy.sparse.csr_matrix
        (n_nodes, n_free) with one column per remaining unknown; TᵀKT and TᵀMT are the
        constrained stiffness and inertia (for a gear, referred through the ratio).

    Notes
    -----
    Gaussian elimination of the constraints one by one: each, written in the unknowns left so
    far, eliminates the unknown with the largest coefficient. A constraint already implied by the
    others (a consistent loop, a gear at two fixed supports) eliminates nothing; one that
    contradicts them locks the unknowns it joins. For gear trains without loops every rotation is
    a ratio times one unknown, so T stays as sparse as the identity.

    References
    ----------
    .. [1] McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed., ch. 12
       (constraints by transformation).
    """
    expressions: dict[int, dict[int, float]] = {int(node): {} for node in fixed}
    users: dict[int, set[int]] = {}

    def row(node: int) -> dict[int, float]:
        return expressions.get(node, {node: 1.0})

    for node_a, coefficient_a, node_b, coefficient_b in constraints:
        combination: dict[int, float] = {}
        for node, coefficient in ((node_a, coefficient_a), (node_b, coefficient_b)):
            for unknown, value in row(int(node)).items():
                combination[unknown] = combination.get(unknown, 0.0) + coefficient * value
        scale = max((abs(value) for value in combination.values()), default=0.0)
        combination = {u: v for u, v in combination.items() if abs(v) > 1e-12 * scale}
        if not combination:
            continue
        pivot = max(combination, key=lambda unknown: (abs(combination[unknown]), -unknown))
        divisor = combination.pop(pivot)
        replacement = {unknown: -value / divisor for unknown, value in combination.items()}
        affected = users.pop(pivot, set())
        if pivot not in expressions:
            affected.add(pivot)
        for node in affected:
            current = dict(row(node))
            weight = current.pop(pivot)
            for unknown, value in replacement.items():
                current[unknown] = current.get(unknown, 0.0) + weight * value
                users.setdefault(unknown, set()).add(node)
            expressions[node] = current
    free = np.array(sorted(set(range(n_nodes)) - set(expressions)), dtype=np.intp)
    column = np.full(n_nodes, -1, dtype=np.intp)
    column[free] = np.arange(len(free))
    rows, cols, values = [free], [column[free]], [np.ones(len(free))]
    for node, expression in expressions.items():
        if expression:
            rows.append(np.full(len(expression), node, dtype=np.intp))
            cols.append(column[np.fromiter(expression, dtype=np.intp, count=len(expression))])
            values.append(np.fromiter(expression.values(), dtype=float, count=len(expression)))
    return sp.csr_matrix(
        (np.concatenate(values), (np.concatenate(rows), np.concatenate(cols))),
        shape=(n_nodes, len(free)),
    )


def rigid_body_shapes(model: Model, mesh: Mesh, mass: sp.csr_matrix) -> list[FloatArray]:
    """Rigid-body modes: one per group of shafts (joined by gears) that nothing restrains.

    Zero strain energy means a constant rotation c_s along each shaft s (the elements have
    positive stiffness), c_s = 0 on a shaft with a fixed or spring support, and
    c_a·r_a ± c_b·r_b = 0 across each mesh: the null space of that small system, group by group.
    """
    count = len(model.shafts)
    parent = list(range(count))

    def root(number: int) -> int:
        while parent[number] != number:
            parent[number] = parent[parent[number]]
            number = parent[number]
        return number

    for gear in model.gears:
        parent[root(model.shaft_number(gear.a.shaft))] = root(model.shaft_number(gear.b.shaft))
    equations = []
    for support in model.supports:
        equation = np.zeros(count)
        equation[model.shaft_number(support.shaft)] = 1.0
        equations.append(equation)
    for gear in model.gears:
        equation = np.zeros(count)
        coefficient_a, coefficient_b = gear.coefficients
        equation[model.shaft_number(gear.a.shaft)] += coefficient_a
        equation[model.shaft_number(gear.b.shaft)] += coefficient_b
        equations.append(equation)
    system = np.array(equations).reshape(-1, count)
    shapes = []
    for group in sorted({root(number) for number in range(count)}):
        members = [number for number in range(count) if root(number) == group]
        rows = system[:, members]
        rows = rows[np.any(rows != 0.0, axis=1)]
        basis = scipy.linalg.null_space(rows) if len(rows) else np.ones((len(members), 1))
        if basis.shape[1] == 0:
            continue
        shape = np.zeros(len(mesh.node_x))
        for member, value in zip(members, basis[:, 0], strict=True):
            window = slice(
                int(mesh.shaft_node_start[member]), int(mesh.shaft_node_start[member + 1])
            )
            shape[window] = value
        if float(shape @ (mass @ shape)) <= 0.0:
            names = [model.shafts[number].id for number in members]
            if len(names) == 1:
                what = f"shaft {names[0]!r} is"
            else:
                joined = ", ".join(repr(name) for name in names)
                what = f"shafts {joined} (joined by gears) are"
            msg = (
                f"{what} free to spin and carry no inertia, so its motion is undefined: give it "
                "a disc or a material density, or a support"
            )
            raise InputError("discs", msg)
        shapes.append(shape)
    return shapes
