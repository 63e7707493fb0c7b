"""The array core's other paths against the one-by-one solution, on random cases (hypothesis).

* Many variants solved at once (:func:`workbench.solver.batch.solve_batch`) equal each variant
  written as its own case file and solved alone (:func:`workbench.solver.analysis.solve`, itself
  checked against the laws of torsion in ``test_properties.py`` and against textbooks in
  ``tests/validation``), to 1e-12 of the results' size.
* The banded LAPACK path equals the sparse LU path (scipy's SuperLU) on the same system.
* Each variant is in equilibrium: Σ reactions + Σ applied = 0 (design §2).
* A variant that is not a valid model is flagged with the field the case-file parser names for
  the same mistake, and the valid variants beside it still solve.
* The band assembly of elements with two degrees of freedom per node equals a dense assembly
  with ``numpy.add.at``, and the band solve equals ``numpy.linalg.solve``.
* The reciprocal condition estimate (LAPACK ?gtcon/?gbcon) brackets the exact 1/κ₁ from
  ``numpy.linalg.cond``: the estimator's ‖A⁻¹‖₁ is a lower bound, usually within a factor of 3
  (N. J. Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., SIAM, 2002, §15.3;
  from memory) — a factor of 10 is allowed here.
"""

from __future__ import annotations

import copy
import itertools
import math
from typing import Any

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from tests.test_properties import (
    SETTINGS,
    angle_scale,
    applied_total,
    geared_cases,
    single_shaft_cases,
    stiffness_scale,
    torque_scale,
)
from workbench.case.errors import InputError
from workbench.solver.analysis import Results, solve
from workbench.solver.assembly import Band, BandFactor, assemble_band, band_to_sparse
from workbench.solver.batch import BatchResults, solve_batch
from workbench.solver.columns import case_table
from workbench.solver.io import parse_case
from workbench.solver.statics import solve_table

#: Relative agreement of two paths that differ only in rounding.
AGREEMENT = 1e-12

_DIMENSIONS = ("diameter", "outer_diameter", "inner_diameter", "diameter_start", "diameter_end")


# --- variants of a case dict, and the same variants as batch columns ---------------------------


def _mapped(case: dict[str, Any], shaft_id: str, x: float, factors: list[float]) -> float:
    """Where x goes when each segment's length is scaled: the same fraction of its segment."""
    shaft = next(shaft for shaft in case["shafts"] if shaft["id"] == shaft_id)
    lengths = [segment["length"] for segment in shaft["segments"]]
    ends = np.cumsum(lengths)
    number = min(int(np.searchsorted(ends, x, side="right")), len(lengths) - 1)
    start = ends[number] - lengths[number]
    fraction = (x - start) / lengths[number]
    new_starts = np.concatenate([[0.0], np.cumsum(np.multiply(lengths, factors))])
    return float(new_starts[number] + fraction * lengths[number] * factors[number])


@st.composite
def variant_factors(draw: st.DrawFn, case: dict[str, Any], vary_lengths: bool) -> dict[str, Any]:
    """Scale factors (and new load values) of one variant of a case."""
    factor = st.floats(0.8, 1.25)
    segments = [segment for shaft in case["shafts"] for segment in shaft["segments"]]
    return {
        "length": [draw(factor) if vary_lengths else 1.0 for _ in segments],
        "diameter": [draw(factor) for _ in segments],
        "modulus": [draw(factor) for _ in segments],
        "stiffness": [draw(factor) for _ in case["supports"]],
        "radius": [draw(factor) for _ in case.get("gears", [])],
        "torque": [
            draw(st.floats(-1000.0, 1000.0))
            for load_case in case["load_cases"]
            for _ in load_case["torques"]
        ],
        "intensity": [
            (draw(st.floats(-2000.0, 2000.0)), draw(st.floats(-2000.0, 2000.0)))
            for load_case in case["load_cases"]
            for _ in load_case["distributed"]
        ],
    }


def variant_case(case: dict[str, Any], factors: dict[str, Any]) -> dict[str, Any]:
    """The variant written as a case file of its own (each segment has its own material)."""
    variant = copy.deepcopy(case)
    length_factors: dict[str, list[float]] = {}
    number = 0
    for shaft in variant["shafts"]:
        length_factors[shaft["id"]] = []
        for segment in shaft["segments"]:
            segment["length"] *= factors["length"][number]
            length_factors[shaft["id"]].append(factors["length"][number])
            for key in (*_DIMENSIONS, "bore"):
                if key in segment["section"]:
                    segment["section"][key] *= factors["diameter"][number]
            variant["materials"][segment["material"]]["shear_modulus"] *= factors["modulus"][number]
            number += 1

    def moved(item: dict[str, Any], key: str = "x") -> None:
        item[key] = _mapped(case, item["shaft"], item[key], length_factors[item["shaft"]])

    for support, scale in zip(variant["supports"], factors["stiffness"], strict=True):
        moved(support)
        if "stiffness" in support:
            support["stiffness"] *= scale
    for gear, scale in zip(variant.get("gears", []), factors["radius"], strict=True):
        for end in ("a", "b"):
            moved(gear[end])
            gear[end]["radius"] *= scale
    torques = iter(factors["torque"])
    intensities = iter(factors["intensity"])
    for load_case in variant["load_cases"]:
        for torque in load_case["torques"]:
            moved(torque)
            torque["torque"] = next(torques)
        for load in load_case["distributed"]:
            moved(load, "start")
            moved(load, "end")
            load["intensity_start"], load["intensity_end"] = next(intensities)
    return variant


def batch_columns(case: dict[str, Any], all_factors: list[dict[str, Any]]) -> dict[str, Any]:
    """The same variants as batch columns (one layer per segment in these cases)."""
    table = case_table(parse_case(copy.deepcopy(case)))
    segments = table.segments

    def scaled(column: np.ndarray, key: str) -> np.ndarray:
        return np.array([column[0] * factors[key] for factors in all_factors])

    radius = np.array([factors["radius"] for factors in all_factors]).reshape(len(all_factors), -1)
    columns = {
        "length": scaled(segments.length, "length"),
        "outer_diameter_start": scaled(segments.outer_diameter_start, "diameter"),
        "outer_diameter_end": scaled(segments.outer_diameter_end, "diameter"),
        "inner_diameter": scaled(segments.inner_diameter, "diameter"),
        "shear_modulus": scaled(segments.shear_modulus, "modulus"),
        "support_stiffness": scaled(table.support_stiffness, "stiffness"),
        "gear_coefficient": table.gear_coefficient * radius[:, :, None],
        "torque": np.array([factors["torque"] for factors in all_factors]).reshape(
            len(all_factors), -1
        ),
        "load_intensity": np.array([factors["intensity"] for factors in all_factors]).reshape(
            len(all_factors), -1, 2
        ),
    }
    return columns


def assert_same_variant(batch: BatchResults, number: int, case: dict[str, Any], alone: Results):
    """One variant of the batch against the same case solved alone."""
    angle = angle_scale(case, alone)
    # Torques between two fixed supports come from a stiffness times a difference of rotations:
    # each path's rounding of the rotations (ε·θ) shows in them as k·ε·θ.
    torque = max(torque_scale(case, alone), stiffness_scale(case) * angle)
    # A stress is a torque times the section's stress per torque: measured against both scales.
    stress = torque * float(alone.mesh.station_stress_per_torque.max())
    np.testing.assert_allclose(batch.reactions[number], alone.reactions, atol=AGREEMENT * torque)
    np.testing.assert_allclose(
        batch.gear_torques[number], alone.gear_torques, atol=AGREEMENT * torque
    )
    np.testing.assert_allclose(batch.node_angle[number], alone.node_angle, atol=AGREEMENT * angle)
    np.testing.assert_allclose(batch.node_x[number], alone.mesh.node_x, rtol=AGREEMENT, atol=0)
    # Element ends are stations of both (a varied taper may add quadrature stations inside).
    assert len(alone.mesh.element_station_start) == len(batch.mesh.element_station_start)
    ends_batch = np.concatenate(
        [batch.mesh.element_station_start[:-1], batch.mesh.element_station_start[1:] - 1]
    )
    ends_alone = np.concatenate(
        [alone.mesh.element_station_start[:-1], alone.mesh.element_station_start[1:] - 1]
    )
    for name, scale in (("torque", torque), ("angle", angle), ("shear_stress", stress)):
        ours = getattr(batch, name)[number][:, ends_batch]
        theirs = getattr(alone, name)[:, ends_alone]
        np.testing.assert_allclose(ours, theirs, atol=AGREEMENT * scale, err_msg=name)
    if batch.station_x.shape[1] == len(alone.mesh.station_x):
        np.testing.assert_allclose(batch.torque[number], alone.torque, atol=AGREEMENT * torque)
        np.testing.assert_allclose(batch.angle[number], alone.angle, atol=AGREEMENT * angle)
        np.testing.assert_allclose(
            batch.station_x[number], alone.mesh.station_x, rtol=AGREEMENT, atol=0
        )


# --- the batch path equals the one-by-one path -------------------------------------------------


def _check_batch(case: dict[str, Any], all_factors: list[dict[str, Any]]) -> BatchResults:
    batch = solve_batch(parse_case(copy.deepcopy(case)), **batch_columns(case, all_factors))
    assert batch.valid.all(), batch.reasons
    for number, factors in enumerate(all_factors):
        variant = variant_case(case, factors)
        assert_same_variant(batch, number, variant, solve(parse_case(variant)))
    return batch


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_batch_of_single_shafts_equals_each_variant_solved_alone(case, data):
    vary_lengths = data.draw(st.booleans())
    count = data.draw(st.integers(1, 4))
    factors = [data.draw(variant_factors(case, vary_lengths)) for _ in range(count)]
    batch = _check_batch(case, factors)
    # Equilibrium of every variant (design §2): Σ reactions + Σ applied = 0.
    for number, variant_factor in enumerate(factors):
        variant = variant_case(case, variant_factor)
        applied, magnitude = applied_total(variant, "s")
        total = batch.reactions[number, 0].sum() + applied
        scale = max(magnitude, float(np.abs(batch.reactions[number]).max(initial=0.0)), 1e-300)
        assert abs(total) <= 1e-9 * max(scale, torque_scale(variant, solve(parse_case(variant))))


@SETTINGS
@given(geared_cases(), st.data())
def test_batch_of_geared_shafts_equals_each_variant_solved_alone(case, data):
    count = data.draw(st.integers(1, 3))
    factors = [data.draw(variant_factors(case, data.draw(st.booleans()))) for _ in range(count)]
    _check_batch(case, factors)


# --- invalid variants ----------------------------------------------------------------------------


def _break(case: dict[str, Any], how: str, segment: int) -> tuple[dict[str, Any], str]:
    """A copy of the case with one mistake, and the field the parser names for it."""
    broken = copy.deepcopy(case)
    target = broken["shafts"][0]["segments"][segment]
    section = target["section"]
    path = f"shafts[0].segments[{segment}]"
    if how == "length":
        target["length"] = -target["length"]
        return broken, f"{path}.length"
    if section["shape"] == "solid":
        section["diameter"] = -section["diameter"]
        return broken, f"{path}.section.diameter"
    if section["shape"] == "tube":
        section["inner_diameter"] = section["outer_diameter"] * 1.1  # a negative wall
        return broken, f"{path}.section.inner_diameter"
    section["bore"] = max(section["diameter_start"], section["diameter_end"]) * 1.05
    return broken, f"{path}.section.bore"


def _break_columns(
    columns: dict[str, Any], variant: int, case: dict[str, Any], segment: int, how: str
) -> None:
    """The mistake of :func:`_break` made in the batch columns of one variant."""
    if how == "length":
        columns["length"][variant, segment] *= -1.0
        return
    section = case["shafts"][0]["segments"][segment]["section"]
    start = columns["outer_diameter_start"][variant, segment]
    end = columns["outer_diameter_end"][variant, segment]
    if section["shape"] == "solid":
        columns["outer_diameter_start"][variant, segment] = -start
        columns["outer_diameter_end"][variant, segment] = -end
    elif section["shape"] == "tube":
        columns["inner_diameter"][variant, segment] = start * 1.1
    else:
        columns["inner_diameter"][variant, segment] = max(start, end) * 1.05


@SETTINGS
@given(single_shaft_cases(), st.data())
def test_invalid_variants_are_flagged_with_the_parsers_field_and_the_others_solve(case, data):
    count = data.draw(st.integers(2, 5))
    factors = [data.draw(variant_factors(case, True)) for _ in range(count)]
    bad = data.draw(st.lists(st.integers(0, count - 1), min_size=1, max_size=count, unique=True))
    n_segments = len(case["shafts"][0]["segments"])
    columns = batch_columns(case, factors)
    expected: dict[int, str] = {}
    for number in bad:
        segment = data.draw(st.integers(0, n_segments - 1))
        how = data.draw(st.sampled_from(["length", "section"]))
        broken, field = _break(variant_case(case, factors[number]), how, segment)
        with pytest.raises(InputError) as raised:
            parse_case(broken)
        assert raised.value.field == field  # the parser names the same field
        expected[number] = field
        _break_columns(columns, number, case, segment, how)
    batch = solve_batch(parse_case(copy.deepcopy(case)), **columns)
    for number in range(count):
        if number in expected:
            assert not batch.valid[number]
            reason = batch.reasons[number]
            assert reason is not None and reason.startswith(expected[number] + ": "), reason
            assert np.all(np.isnan(batch.torque[number]))
        else:
            assert batch.valid[number] and batch.reasons[number] is None
            variant = variant_case(case, factors[number])
            assert_same_variant(batch, number, variant, solve(parse_case(variant)))


# --- banded and sparse paths ---------------------------------------------------------------------


def _assert_same_solution(first: Any, second: Any, case: dict[str, Any], alone: Results) -> None:
    angle = angle_scale(case, alone)
    torque = max(torque_scale(case, alone), stiffness_scale(case) * angle)
    for name, scale in (
        ("reactions", torque),
        ("torque", torque),
        ("angle", angle),
        ("node_angle", angle),
        ("gear_torques", torque),
    ):
        np.testing.assert_allclose(
            getattr(first, name), getattr(second, name), atol=AGREEMENT * scale, err_msg=name
        )


@SETTINGS
@given(single_shaft_cases(n_cases=2))
def test_banded_lapack_path_equals_sparse_lu_path(case):
    model = parse_case(case)
    table = case_table(model)
    banded = solve_table(table, method="band")
    sparse = solve_table(table, method="sparse")
    assert isinstance(banded.factor, BandFactor)
    _assert_same_solution(banded, sparse, case, solve(model))


def test_the_band_refuses_gears_and_names_the_option() -> None:
    def shaft(name: str, diameter: float) -> dict[str, Any]:
        section = {"shape": "solid", "diameter": diameter}
        return {"id": name, "segments": [{"length": 1.0, "material": "s", "section": section}]}

    gear = {
        "a": {"shaft": "a", "x": 1.0, "radius": 0.1},
        "b": {"shaft": "b", "x": 0.0, "radius": 0.2},
    }
    case = {
        "materials": {"s": {"shear_modulus": 80e9}},
        "shafts": [shaft("a", 0.05), shaft("b", 0.04)],
        "supports": [{"shaft": "a", "x": 0.0}],
        "gears": [gear],
        "load_cases": [{"name": "c", "torques": [{"shaft": "b", "x": 1.0, "torque": 10.0}]}],
    }
    with pytest.raises(InputError) as raised:
        solve_table(case_table(parse_case(case)), method="band")
    assert raised.value.field == "method"


# --- more than one degree of freedom per node, and the condition estimate -----------------------


class _RandomFamily:
    """Elements with an arbitrary symmetric positive definite 2n × 2n matrix each."""

    def __init__(self, matrices: np.ndarray, dofs_per_node: int) -> None:
        self.matrices = matrices  # (n_variants, n_elements, 2n, 2n)
        self.dofs_per_node = dofs_per_node

    def stiffness_entry(self, row: int, column: int) -> np.ndarray:
        return self.matrices[..., row, column]


@SETTINGS
@given(
    st.integers(1, 3),
    st.lists(st.integers(1, 6), min_size=1, max_size=3),
    st.integers(1, 3),
    st.integers(0, 2**32 - 1),
)
def test_band_assembly_with_several_dofs_per_node_equals_a_dense_assembly(
    dofs, elements_per_shaft, n_variants, seed
):
    generator = np.random.default_rng(seed)
    size = 2 * dofs
    n_elements = sum(elements_per_shaft)
    raw = generator.normal(size=(n_variants, n_elements, size, size))
    matrices = raw @ np.swapaxes(raw, -1, -2) + size * np.eye(size)
    shaft_node_start = np.concatenate([[0], np.cumsum([count + 1 for count in elements_per_shaft])])
    n_dofs = int(shaft_node_start[-1]) * dofs
    band = assemble_band(_RandomFamily(matrices, dofs), shaft_node_start, n_variants)
    dense = np.zeros((n_variants, n_dofs, n_dofs))
    start_nodes = np.concatenate(
        [np.arange(start, stop - 1) for start, stop in itertools.pairwise(shaft_node_start)]
    )
    for element, node in enumerate(start_nodes):
        where = np.arange(node * dofs, node * dofs + size)
        np.add.at(dense, (slice(None), where[:, None], where[None, :]), matrices[:, element])
    stacked = band_to_sparse(band).toarray()
    for variant in range(n_variants):
        block = slice(variant * n_dofs, (variant + 1) * n_dofs)
        np.testing.assert_allclose(stacked[block, block], dense[variant], rtol=1e-14, atol=1e-12)
    # Variants share no entry.
    mask = np.kron(np.eye(n_variants), np.ones((n_dofs, n_dofs))) == 0
    assert not np.any(stacked[mask])
    factor = BandFactor(band)
    rhs = generator.normal(size=(n_variants * n_dofs, 2))
    expected = np.linalg.solve(stacked, rhs)
    np.testing.assert_allclose(
        factor.solve(np.asfortranarray(rhs)), expected, rtol=1e-9, atol=1e-12
    )
    exact = 1.0 / np.linalg.cond(stacked, 1)
    assert exact * (1.0 - 1e-9) <= factor.rcond <= 10.0 * exact


@SETTINGS
@given(single_shaft_cases())
def test_the_condition_estimate_of_a_shaft_brackets_the_exact_one(case):
    solution = solve_table(case_table(parse_case(case)), method="band")
    assert isinstance(solution.factor, BandFactor)
    matrix = band_to_sparse(solution.factor.band).toarray()
    exact = 1.0 / np.linalg.cond(matrix, 1)
    assert math.isfinite(solution.factor.rcond)
    assert exact * (1.0 - 1e-9) <= solution.factor.rcond <= 10.0 * exact


@SETTINGS
@given(single_shaft_cases(n_cases=2), st.integers(0, 2**32 - 1))
def test_the_one_pass_band_solve_equals_factoring_then_solving(case, seed):
    """?gtsv eliminates as ?gttrf + ?gttrs do (LAPACK Users' Guide, 3rd ed., §2.4): the same
    numbers, bit for bit, the band left as it was and the same condition estimate."""
    solution = solve_table(case_table(parse_case(case)), method="band")
    assert isinstance(solution.factor, BandFactor)
    band = solution.factor.band
    kept = band.values.copy()
    rhs = np.random.default_rng(seed).normal(size=(band.size, 3))
    factored = BandFactor(band)
    expected = factored.solve(np.asfortranarray(rhs))
    solving, solved = BandFactor.solving(band, np.asfortranarray(rhs))
    np.testing.assert_array_equal(solved, expected)
    np.testing.assert_array_equal(band.values, kept)
    assert solving.rcond == factored.rcond


def test_the_one_pass_band_solve_refuses_a_free_part_as_the_factorization_does():
    values = np.zeros((4, 4))
    values[2] = [1.0, 0.0, 1.0, 1.0]  # a zero pivot on the second row of a diagonal band
    band = Band(values, half_width=1, n_variants=1)
    with pytest.raises(InputError) as factoring:
        BandFactor(band)
    with pytest.raises(InputError) as solving:
        BandFactor.solving(band, np.ones((4, 1), order="F"))
    assert str(solving.value) == str(factoring.value)


# --- the bundled demo: a taper, bonded layers and a gear pair, diameters varied -----------------

_OUTER_KEYS = ("diameter", "outer_diameter", "diameter_start", "diameter_end")


def _scaled_outer(case: dict[str, Any], factor: float) -> dict[str, Any]:
    scaled = copy.deepcopy(case)
    for shaft in scaled["shafts"]:
        for segment in shaft["segments"]:
            layers = segment.get("layers") or [segment]
            for layer in layers:
                section = layer["section"]
                for key in _OUTER_KEYS:
                    if key in section:
                        section[key] *= factor
    return scaled


def test_demo_diameter_sweep_equals_each_variant_alone_and_names_an_overlap() -> None:
    """Regression: a diameter sweep over a case with a tapered segment failed to broadcast."""
    import json

    from workbench.cli.solve import DEMO_CASE

    case = json.loads(DEMO_CASE.read_text(encoding="utf-8"))
    model = parse_case(copy.deepcopy(case))
    factors = np.array([0.9, 0.95, 1.0, 1.1])
    segments = case_table(model).segments
    batch = solve_batch(
        model,
        outer_diameter_start=factors[:, None] * segments.outer_diameter_start,
        outer_diameter_end=factors[:, None] * segments.outer_diameter_end,
    )
    # 1.1: the bonded core (50 mm → 55 mm) no longer fits the sleeve's 50 mm bore.
    assert batch.valid.tolist() == [True, True, True, False]
    with pytest.raises(InputError) as refused:
        parse_case(_scaled_outer(case, 1.1))
    assert batch.reason(3).split(":")[0] == refused.value.field
    assert "bore (0.05 m) is smaller than that layer's outer diameter (0.055 m)" in batch.reason(3)
    for number, factor in enumerate(factors[:3]):
        alone = solve(parse_case(_scaled_outer(case, float(factor))))
        scale = float(np.abs(alone.reactions).max())
        np.testing.assert_allclose(batch.reactions[number], alone.reactions, atol=1e-12 * scale)
        angle = float(np.abs(alone.node_angle).max())
        np.testing.assert_allclose(batch.node_angle[number], alone.node_angle, atol=1e-12 * angle)
