"""Solver: speed of the restrained-warping member against a bare ``solve_banded`` of its system.

Target (issue 14): 10⁵ warping elements, the whole solve (element matrices and consistent loads,
banded assembly, supports, factorization, nodal values, element end forces and reactions) ≤ 5×
:func:`scipy.linalg.solve_banded` of the same banded system (already assembled and constrained,
so the bare side only factors and solves). The two sides take turns (side by side in one run).

The member is an invented thin-walled beam: 10⁵ elements with λL from 10⁻² to 10³ (stiff and
long elements both), restrained at both ends, a point torque every 1000 nodes and a linearly
varying distributed torque on every element.

A second row runs the same kind of member through the general path
(:func:`workbench.solver.statics.solve_table` on its columns: θ and θ′ per node, warping
restraints at the supports, the mesh built beforehand) with point torques only, against
``solve_banded`` of its own assembled, constrained band: the whole solve there also recovers
the reactions, the torques and the warping values at every station and checks equilibrium.

A third row, for information (no target): the torsional stresses at the 10 stress points of an
I section and the three warping checks, at every node of the same member taken as 1000
segments of 100 elements, four load cases (the solved one scaled), judged at once.

A fourth row, for information: ``run_checks`` of a case file, an I girder of 1000 segments held
against warping at both ends under two load cases, beside the share of its warping rows
(:func:`~workbench.design.warping_model_checks.warping_rows`: stress points, stresses at every
station, the checks and the 6000 worded rows).
"""

from __future__ import annotations

import numpy as np
import scipy.linalg

from tests.benchmarks.common import Row, time_pair
from workbench.case.design import DesignCriteria
from workbench.case.materials import Material
from workbench.design.warping_checks import (
    WarpingCheckInputs,
    warping_limits,
    warping_utilisations,
)
from workbench.solver.assembly import assemble_band, prescribe
from workbench.solver.columns import GIVEN, WARPING_RESTRAINED, CaseTable, SegmentTable
from workbench.solver.mesh import build_mesh_from_table
from workbench.solver.open_shapes import i_section
from workbench.solver.statics import solve_table
from workbench.solver.warping_element import WarpingElements
from workbench.solver.warping_member import WarpingMember, WarpingSolution, recover, solve_member
from workbench.solver.warping_stress import stress_points, torsional_stresses

MS = 1e3
ELEMENTS = 100_000


def _member() -> tuple[WarpingMember, np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(14)
    length = rng.uniform(0.01, 0.05, ELEMENTS)
    torsion = rng.uniform(5e3, 2e4, ELEMENTS)
    mu = 10.0 ** rng.uniform(-2, 3, ELEMENTS)
    warping = torsion * (length / mu) ** 2
    node_x = np.concatenate([[0.0], np.cumsum(length)])
    held = np.zeros(ELEMENTS + 1, bool)
    held[[0, -1]] = True
    member = WarpingMember(node_x, torsion, warping, held, held.copy())
    nodal = np.zeros((1, ELEMENTS + 1))
    nodal[0, 500::1000] = rng.uniform(-1e3, 1e3, len(nodal[0, 500::1000]))
    start = rng.uniform(-50, 50, (1, ELEMENTS))
    end = rng.uniform(-50, 50, (1, ELEMENTS))
    return member, nodal, start, end


def _banded(member: WarpingMember, nodal: np.ndarray, start: np.ndarray, end: np.ndarray):
    """The same constrained system in scipy.linalg.solve_banded's storage, and its right side."""
    elements = member.elements
    loads = elements.distributed_loads(start, end)[0]
    rhs = np.zeros((1, 1, 2 * (ELEMENTS + 1)))
    rhs[0, 0, 0::2] = nodal[0]
    rhs[0, 0, 0:-2:2] += loads[:, 0]
    rhs[0, 0, 2::2] += loads[:, 2]
    rhs[0, 0, 1:-2:2] += loads[:, 1]
    rhs[0, 0, 3::2] += loads[:, 3]
    band = assemble_band(elements, np.array([0, ELEMENTS + 1]), 1)
    held = np.array([0, 1, 2 * ELEMENTS, 2 * ELEMENTS + 1])
    prescribe(band, rhs, held, np.zeros((1, 4)))
    width = band.half_width
    return width, np.ascontiguousarray(band.values[width:]), rhs[0, 0].copy()


def _general_table() -> CaseTable:
    """The member of :func:`_member` as the general solver's columns, point torques only."""
    member, nodal, _, _ = _member()
    length = np.diff(member.node_x)
    shear_modulus = 80e9
    nothing = np.full(ELEMENTS, np.nan)
    segments = SegmentTable(
        shaft_ids=("beam",),
        shaft_segment_start=np.array([0, ELEMENTS]),
        length=length,
        segment_layer_start=np.arange(ELEMENTS + 1),
        layer_shape=np.full(ELEMENTS, GIVEN, np.int8),
        shear_modulus=np.full(ELEMENTS, shear_modulus),
        outer_diameter_start=nothing,
        outer_diameter_end=nothing,
        inner_diameter=nothing,
        torsion_constant=member.torsion / shear_modulus,
        stress_per_torque=np.full(ELEMENTS, 1e6),
        warping_rigidity=member.warping,
    )
    loaded = np.flatnonzero(nodal[0])
    no_gears = np.zeros((0, 2))
    return CaseTable(
        segments=segments,
        support_shaft=np.zeros(2, np.intp),
        support_x=member.node_x[[0, -1]],
        support_fixed=np.ones(2, bool),
        support_stiffness=np.full(2, np.nan),
        support_rotation=np.zeros(2),
        gear_shaft=no_gears.astype(np.intp),
        gear_x=no_gears,
        gear_coefficient=no_gears,
        torque_case=np.zeros(len(loaded), np.intp),
        torque_shaft=np.zeros(len(loaded), np.intp),
        torque_x=member.node_x[loaded],
        torque=nodal[0, loaded],
        load_case=np.zeros(0, np.intp),
        load_shaft=np.zeros(0, np.intp),
        load_start=np.zeros(0),
        load_end=np.zeros(0),
        load_intensity=np.zeros((0, 2)),
        case_names=("service",),
        support_warping=np.full(2, WARPING_RESTRAINED, np.int8),
    )


def general_row() -> Row:
    """10⁵ warping elements through the general path against a bare solve_banded."""
    table = _general_table()
    mesh = build_mesh_from_table(table)
    member, nodal, _, _ = _member()
    elements = WarpingElements(np.diff(member.node_x), member.torsion, member.warping)
    band = assemble_band(elements, np.array([0, ELEMENTS + 1]), 1)
    rhs = np.zeros((1, 1, 2 * (ELEMENTS + 1)))
    rhs[0, 0, 0::2] = nodal[0]
    prescribe(band, rhs, np.array([0, 1, 2 * ELEMENTS, 2 * ELEMENTS + 1]), np.zeros((1, 4)))
    width = band.half_width
    ab, right = np.ascontiguousarray(band.values[width:]), rhs[0, 0].copy()

    def bare() -> np.ndarray:
        return scipy.linalg.solve_banded((width, width), ab, right, check_finite=False)

    ours, reference = time_pair(lambda: solve_table(table, mesh), bare, repeats=11, warmup=2)
    solution = solve_table(table, mesh)
    bare_dofs = bare()
    error = np.max(np.abs(solution.node_angle[0, 0] - bare_dofs[0::2])) / np.max(np.abs(bare_dofs))
    notes = (
        f"our side: solve_table on {ELEMENTS:,} warping elements (mesh built before): element "
        "entries, band assembly, supports and warping restraints, LAPACK dgbtrf/dgbtrs, one "
        "step of refinement, reactions, T, θ, θ′, θ″, θ‴, torques and bimoment at "
        f"{len(mesh.station_x):,} stations, condition estimate and equilibrium; median "
        f"{ours.median * MS:.1f} ms (best {ours.best * MS:.1f})",
        f"bare side: scipy.linalg.solve_banded of the same assembled, constrained band, median "
        f"{reference.median * MS:.1f} ms; taking turns, {len(ours.times)} calls each",
        f"largest difference of θ between the sides, relative to the largest θ: {error:.1e} "
        "(our side's step of refinement: the bare, unrefined solve leaves ~10⁻⁵ of the load out "
        "of balance on the stiff short elements)",
    )
    return Row(
        "10⁵ warping elements, general path: solve_table / bare solve_banded",
        ours.median / reference.median,
        "×",
        5.0,
        notes=notes,
    )


def run() -> list[Row]:
    """The 10⁵-element rows: the single member, the general path, stresses and checks."""
    member, nodal, start, end = _member()
    width, ab, rhs = _banded(member, nodal, start, end)

    def bare() -> np.ndarray:
        return scipy.linalg.solve_banded((width, width), ab, rhs, check_finite=False)

    ours, reference = time_pair(
        lambda: solve_member(member, nodal, start, end), bare, repeats=15, warmup=2
    )
    solution = solve_member(member, nodal, start, end)
    bare_dofs = bare()
    error = np.max(np.abs(solution.rotation[0] - bare_dofs[0::2])) / np.max(np.abs(bare_dofs))
    notes = (
        f"our side: solve_member on {ELEMENTS:,} elements (λL 10⁻²…10³): element matrices and "
        f"consistent loads, band assembly, supports, LAPACK dgbtrf/dgbtrs, end forces, "
        f"reactions; median {ours.median * MS:.1f} ms (best {ours.best * MS:.1f})",
        f"bare side: scipy.linalg.solve_banded of the same assembled, constrained band "
        f"(half-width {width}), median {reference.median * MS:.1f} ms; taking turns, "
        f"{len(ours.times)} calls each",
        f"largest difference of θ between the sides, relative to the largest θ: {error:.1e}",
    )
    ratio = Row(
        "10⁵ warping elements: solve / bare solve_banded",
        ours.median / reference.median,
        "×",
        5.0,
        notes=notes,
    )
    return [ratio, general_row(), _stress_row(member, solution), _run_checks_row()]


def _run_checks_row() -> Row:
    """``run_checks`` of a 1000-segment restrained I girder, two load cases."""
    from workbench.design.checks import run_checks
    from workbench.design.warping_model_checks import warping_rows
    from workbench.solver.analysis import solve
    from workbench.solver.io import parse_case

    count = 1000
    section = {
        "shape": "i_beam",
        "depth": 300,
        "width": 150,
        "flange_thickness": 12,
        "web_thickness": 8,
    }
    case = {
        "units": {"length": "mm", "torque": "N*m", "stress": "MPa"},
        "materials": {
            "s": {"shear_modulus": 79300, "elastic_modulus": 207000, "yield_strength": 250}
        },
        "shafts": [
            {
                "id": "girder",
                "segments": [
                    {"length": 8.0, "material": "s", "section": section} for _ in range(count)
                ],
            }
        ],
        "supports": [
            {"shaft": "girder", "x": 0, "warping": "restrained"},
            {"shaft": "girder", "x": 8000, "warping": "restrained"},
        ],
        "load_cases": [
            {"name": name, "torques": [{"shaft": "girder", "x": at, "torque": 900}]}
            for name, at in (("mid", 4000), ("third", 2664))
        ],
    }
    results = solve(parse_case(case))
    report = run_checks(results)
    assert results.warping is not None and len(report.checks) > 6 * count
    layout = report.static
    assert layout is not None

    def warping_share() -> object:
        return warping_rows(
            results, report.design, layout.inputs.segment_start, layout.shafts, layout.numbers
        )

    whole, share = time_pair(lambda: run_checks(results), warping_share, repeats=5, warmup=1)
    notes = (
        f"run_checks of a {count}-segment restrained I girder, 2 load cases, "
        f"{len(report.checks):,} rows: median {whole.median * MS:.1f} ms; its warping rows "
        f"(stress points, stresses, checks, wording) median {share.median * MS:.1f} ms",
    )
    return Row("run_checks, 1000-segment warping case", whole.median * MS, "ms", notes=notes)


def _stress_row(member: WarpingMember, solution: WarpingSolution) -> Row:
    """Stresses and checks at 10⁵ + 1 stations × 4 load cases × 10 stress points."""
    state = recover(solution, member.node_x)
    scale = np.array([[1.0], [-0.5], [2.0], [0.25]])
    rate, second, third = (scale * getattr(state, name) for name in ("rate", "second", "third"))
    points = stress_points([i_section(0.3, 0.15, 0.15, 0.012, 0.012, 0.008)])
    stations = len(member.node_x)
    segment_start = np.arange(0, stations - 1, 100)
    steel = Material("steel", 79.3e9, 250e6, 400e6, elastic_modulus=207e9)
    limits = warping_limits([steel], np.zeros(len(segment_start), np.intp), DesignCriteria())
    zeros = np.zeros(len(segment_start))

    def both() -> object:
        stresses = torsional_stresses(
            points, np.zeros(stations, np.intp), rate, second, third, 79.3e9, 207e9
        )
        inputs = WarpingCheckInputs(segment_start, stresses, zeros + 40e6, zeros, limits)
        return warping_utilisations(inputs)

    ours, _ = time_pair(both, lambda: None, repeats=7, warmup=1)
    notes = (
        f"stresses and checks: {stations:,} stations × 4 load cases × "
        f"{points.valid.shape[1]} stress points, {len(segment_start):,} segments; median "
        f"{ours.median * MS:.1f} ms (best {ours.best * MS:.1f})",
    )
    return Row(
        "warping stresses and checks, 10⁵ stations × 4 cases", ours.median * MS, "ms", notes=notes
    )
