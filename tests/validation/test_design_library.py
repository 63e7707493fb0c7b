"""Design library (materials, allowables, stress concentration, plastic torsion, preferred sizes,
power) checked against published tables, worked values and closed forms.

The source of every check is beside it. "(from memory)" marks a value recalled rather than read
from the publication; such checks are as good as that recollection.
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Iterator

import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import quad

from workbench.case.design import SHEAR_CRITERIA
from workbench.case.errors import InputError
from workbench.case.materials import LIBRARY, Material, library_material
from workbench.case.power import torque_from_power
from workbench.case.units import SI_ENGINEERING, display_units, registry
from workbench.design.allowables import (
    TWIST_RATE_PRESETS,
    allowable_shear_stress,
    twist_rate_one_degree_in_twenty_diameters,
)
from workbench.design.concentration import (
    FILLET_RATIO_RANGE,
    NORTON_TORSION_FITS,
    keyseat_kts,
    shoulder_fillet_kts,
)
from workbench.design.plastic import (
    partly_plastic_torque,
    plastic_reserve,
    plastic_torque,
    yield_torque,
)
from workbench.design.preferred import (
    RENARD_SERIES,
    next_smaller_preferred,
    round_up_preferred,
    round_up_to_list,
)
from workbench.design.transverse_hole import transverse_hole_kts

MPA = 1e6
GPA = 1e9


@pytest.fixture
def engineering_display() -> Iterator[None]:
    token = display_units.set(SI_ENGINEERING)
    try:
        yield
    finally:
        display_units.reset(token)


def _material(yield_mpa: float | None = 150.0, ultimate_mpa: float | None = 300.0) -> Material:
    # Strength pair of the worked shafting-code value in the references; G is immaterial here.
    return Material(
        "test steel",
        79.3 * GPA,
        None if yield_mpa is None else yield_mpa * MPA,
        None if ultimate_mpa is None else ultimate_mpa * MPA,
    )


# ================================================================================================
# Materials
# ================================================================================================
@pytest.mark.parametrize("key", sorted(LIBRARY))
def test_every_library_material_validates_and_names_its_source(key: str) -> None:
    material = LIBRARY[key]
    # Re-constructing runs the validation again on every field.
    rebuilt = Material(
        material.name,
        material.shear_modulus,
        material.yield_strength,
        material.ultimate_strength,
        material.elastic_modulus,
        material.poisson_ratio,
        material.density,
        material.source,
    )
    assert rebuilt == material
    assert material.source.strip()
    assert key == key.lower() and " " not in key


def test_library_has_at_least_twelve_materials() -> None:
    assert len(LIBRARY) >= 12


@pytest.mark.parametrize("key", sorted(LIBRARY))
def test_shear_modulus_consistent_with_elastic_modulus_and_poisson_ratio(key: str) -> None:
    # Consistency check, not an outside value: for an isotropic elastic solid G = E/(2(1 + ν))
    # (Timoshenko & Goodier, Theory of Elasticity, 3rd ed., §6). Tabulated E, G, ν are each
    # rounded to about three figures and wrought products are slightly anisotropic, so 3 % is
    # allowed (the largest difference in the library is 1.9 %, Hibbeler's 6061-T6).
    material = LIBRARY[key]
    assert material.elastic_modulus is not None and material.poisson_ratio is not None
    expected = material.elastic_modulus / (2.0 * (1.0 + material.poisson_ratio))
    assert material.shear_modulus == pytest.approx(expected, rel=0.03)


@pytest.mark.parametrize(
    ("key", "elastic_gpa", "shear_gpa"),
    [
        # Shigley's Mechanical Engineering Design, Table A-5 (values as quoted in references).
        ("steel-1020-hr", 207.0, 79.3),
        ("steel-1045-cd", 207.0, 79.3),
        ("aluminium-2024-t3", 71.0, 26.2),
        ("brass", 106.0, 40.1),
        ("phosphor-bronze", 111.0, 41.4),
        ("cast-iron-grey-30", 100.0, 41.4),
        ("copper", 119.0, 44.7),
    ],
)
def test_library_elastic_constants_match_shigley_table_a5(
    key: str, elastic_gpa: float, shear_gpa: float
) -> None:
    material = library_material(key)
    assert material.elastic_modulus == pytest.approx(elastic_gpa * GPA, rel=1e-12)
    assert material.shear_modulus == pytest.approx(shear_gpa * GPA, rel=1e-12)


def test_library_carbon_steel_poisson_ratio_matches_shigley_table_a5() -> None:
    # Shigley Table A-5, carbon steel ν = 0.292; aluminium alloys 0.334.
    assert library_material("steel-1040-hr").poisson_ratio == 0.292
    assert library_material("aluminium-2024-t3").poisson_ratio == 0.334


@pytest.mark.parametrize(
    ("key", "shear_gpa", "yield_mpa", "ultimate_mpa"),
    [
        # Hibbeler, Mechanics of Materials, property table (values as quoted in references).
        ("steel-a36", 75.0, 250.0, 400.0),
        ("stainless-304", 75.0, 207.0, None),
        ("aluminium-6061-t6", 26.0, 255.0, 290.0),
        ("titanium-6al-4v", 44.0, 924.0, 1000.0),
    ],
)
def test_library_matches_hibbeler_property_table(
    key: str, shear_gpa: float, yield_mpa: float, ultimate_mpa: float | None
) -> None:
    material = library_material(key)
    assert material.shear_modulus == pytest.approx(shear_gpa * GPA, rel=1e-12)
    assert material.yield_strength == pytest.approx(yield_mpa * MPA, rel=1e-12)
    if ultimate_mpa is not None:
        assert material.ultimate_strength == pytest.approx(ultimate_mpa * MPA, rel=1e-12)


@pytest.mark.parametrize(
    ("key", "yield_mpa", "ultimate_mpa"),
    [
        # Budynas & Nisbett, Shigley's Mechanical Engineering Design, 9th ed., Table A-20
        # (p. 1040), deterministic ASTM minimum strengths, read in a copy of the table.
        ("steel-1020-hr", 210.0, 380.0),
        ("steel-1020-cd", 390.0, 470.0),
        ("steel-1040-hr", 290.0, 520.0),
        ("steel-1040-cd", 490.0, 590.0),
        ("steel-1045-cd", 530.0, 630.0),
        # Same book, Table A-24(b) (p. 1046), wrought 2024 T3.
        ("aluminium-2024-t3", 345.0, 482.0),
    ],
)
def test_library_strengths_match_shigley_tables_a20_and_a24(
    key: str, yield_mpa: float, ultimate_mpa: float
) -> None:
    material = library_material(key)
    assert material.yield_strength == pytest.approx(yield_mpa * MPA, rel=1e-12)
    assert material.ultimate_strength == pytest.approx(ultimate_mpa * MPA, rel=1e-12)


def test_grey_cast_iron_tensile_strength_matches_shigley_table_a24() -> None:
    # Shigley 9th ed., Table A-24(a) (p. 1046): ASTM 30, Sut = 31 kpsi; 1 kpsi = 6.894757 MPa
    # (NIST SP 811, appendix B).
    material = library_material("cast-iron-grey-30")
    assert material.ultimate_strength == pytest.approx(31 * 6.894757e6, rel=1e-6)
    assert material.yield_strength is None


@pytest.mark.parametrize(
    ("key", "density", "elastic_gpa", "poisson", "ultimate_mpa"),
    [
        # Hibbeler, Mechanics of Materials, "Average Mechanical Properties of Typical
        # Engineering Materials (SI Units)", read in a copy of the table (edition not shown).
        ("steel-a36", 7850.0, 200.0, 0.32, 400.0),
        ("stainless-304", 7860.0, 193.0, 0.27, 517.0),
        ("aluminium-6061-t6", 2710.0, 68.9, 0.35, 290.0),
        ("titanium-6al-4v", 4430.0, 120.0, 0.36, 1000.0),
        ("brass-red-c83400", 8740.0, 101.0, 0.35, 241.0),
        ("bronze-c86100", 8830.0, 103.0, 0.34, 655.0),
    ],
)
def test_library_rows_match_hibbeler_table_in_full(
    key: str, density: float, elastic_gpa: float, poisson: float, ultimate_mpa: float
) -> None:
    material = library_material(key)
    assert material.density == pytest.approx(density, rel=1e-12)
    assert material.elastic_modulus == pytest.approx(elastic_gpa * GPA, rel=1e-12)
    assert material.poisson_ratio == poisson
    assert material.ultimate_strength == pytest.approx(ultimate_mpa * MPA, rel=1e-12)


def test_library_lookup_ignores_case_and_suggests_close_names() -> None:
    assert library_material("  Steel-1020-HR ") is LIBRARY["steel-1020-hr"]
    with pytest.raises(InputError) as caught:
        library_material("steel-1020")
    assert caught.value.field == "material"
    assert "steel-1020-hr" in caught.value.message


@pytest.mark.parametrize(
    ("changes", "field"),
    [
        ({"shear_modulus": -1.0}, "shear_modulus"),
        ({"shear_modulus": math.nan}, "shear_modulus"),
        ({"yield_strength": 0.0}, "yield_strength"),
        ({"ultimate_strength": math.inf}, "ultimate_strength"),
        ({"yield_strength": 400 * MPA, "ultimate_strength": 300 * MPA}, "yield_strength"),
        ({"poisson_ratio": 0.6}, "poisson_ratio"),
        ({"poisson_ratio": -1.0}, "poisson_ratio"),
        ({"density": -7800.0}, "density"),
        ({"elastic_modulus": 0.0}, "elastic_modulus"),
        ({"name": ""}, "name"),
    ],
)
def test_material_rejects_bad_values(changes: dict[str, object], field: str) -> None:
    arguments: dict[str, object] = {
        "name": "x",
        "shear_modulus": 80 * GPA,
        "yield_strength": 250 * MPA,
        "ultimate_strength": 400 * MPA,
    }
    arguments.update(changes)
    with pytest.raises(InputError) as caught:
        Material(**arguments)  # type: ignore[arg-type]
    assert caught.value.field == field


# ================================================================================================
# Allowables
# ================================================================================================
def test_shafting_code_worked_value() -> None:
    # ASME Code for Design of Transmission Shafting: 0.30 Sy but not over 0.18 Su.
    # Worked value in the references: Sy 150, Su 300 MPa -> min(45, 54) = 45 MPa.
    allowable = allowable_shear_stress(_material(150.0, 300.0), "shafting_code", 2.0)
    assert allowable.value == pytest.approx(45.0 * MPA, rel=1e-12)
    assert allowable.factor_of_safety_applied == 1.0
    assert "not applied" in allowable.basis


def test_shafting_code_ultimate_limit_and_keyway() -> None:
    # Same code: Hibbeler's A-36 (Sy 250, Su 400 MPa) -> min(75, 72) = 72 MPa, the 18 % Su
    # limit governs; 25 % less with a keyway -> 54 MPa.
    steel = library_material("steel-a36")
    assert allowable_shear_stress(steel, "shafting_code", 1.0).value == pytest.approx(72 * MPA)
    keyed = allowable_shear_stress(steel, "shafting_code", 1.0, keyway=True)
    assert keyed.value == pytest.approx(54 * MPA)
    assert "0.75" in keyed.basis


def test_tresca_and_von_mises_shear_yield_factors() -> None:
    # Shigley's Mechanical Engineering Design, ch. 5: Ssy = 0.5 Sy (maximum shear stress) and
    # Ssy = 0.577 Sy (distortion energy); 0.577 is printed to 3 decimals, hence abs 5e-4.
    material = _material(350.0, 500.0)
    tresca = allowable_shear_stress(material, "tresca", 1.0).value
    von_mises = allowable_shear_stress(material, "von_mises", 1.0).value
    assert tresca / (350 * MPA) == pytest.approx(0.5, abs=1e-12)
    assert von_mises / (350 * MPA) == pytest.approx(0.577, abs=5e-4)


def test_yield_criteria_divide_by_factor_of_safety(engineering_display: None) -> None:
    # Choice of this module (documented): the yield-based shear strength is divided by the
    # factor of safety. Sy/√3/2 = 350/1.732/2 = 101.04 MPa.
    allowable = allowable_shear_stress(_material(350.0, 500.0), "von_mises", 2.0)
    assert allowable.value == pytest.approx(350 * MPA / math.sqrt(3.0) / 2.0)
    assert allowable.factor_of_safety_applied == 2.0
    assert "350 MPa" in allowable.basis and "√3" in allowable.basis


def test_stated_allowable_is_used_as_given(engineering_display: None) -> None:
    allowable = allowable_shear_stress(None, "allowable", 3.0, stated_allowable=60 * MPA)
    assert allowable.value == 60 * MPA
    assert allowable.factor_of_safety_applied == 1.0
    assert "60 MPa" in allowable.basis


@pytest.mark.parametrize(
    ("material", "criterion", "kwargs", "field"),
    [
        (library_material("cast-iron-grey-30"), "von_mises", {}, "yield_strength"),
        (_material(150.0, None), "shafting_code", {}, "ultimate_strength"),
        (_material(), "maximum_stress", {}, "criterion"),
        (_material(), "tresca", {"factor_of_safety": 0.9}, "factor_of_safety"),
        (_material(), "tresca", {"factor_of_safety": math.nan}, "factor_of_safety"),
        (_material(), "allowable", {}, "stated_allowable"),
        (_material(), "tresca", {"stated_allowable": 50 * MPA}, "stated_allowable"),
        (_material(), "allowable", {"stated_allowable": -5.0}, "stated_allowable"),
    ],
)
def test_allowable_errors(
    material: Material, criterion: str, kwargs: dict[str, float], field: str
) -> None:
    arguments: dict[str, float] = {"factor_of_safety": 2.0}
    arguments.update(kwargs)
    fos = arguments.pop("factor_of_safety")
    with pytest.raises(InputError) as caught:
        allowable_shear_stress(material, criterion, fos, **arguments)  # type: ignore[arg-type]
    assert caught.value.field == field


@given(
    st.sampled_from(SHEAR_CRITERIA),
    st.floats(min_value=1.0, max_value=10.0),
    st.floats(min_value=1.0, max_value=10.0),
)
def test_allowable_monotone_in_factor_of_safety(
    criterion: str, first: float, second: float
) -> None:
    low, high = sorted((first, second))
    material = _material(250.0, 400.0)
    stated = 80 * MPA if criterion == "allowable" else None
    at_low = allowable_shear_stress(material, criterion, low, stated_allowable=stated).value
    at_high = allowable_shear_stress(material, criterion, high, stated_allowable=stated).value
    assert at_high <= at_low
    if criterion in ("von_mises", "tresca") and high > low * (1 + 1e-9):
        assert at_high < at_low


def test_twist_rate_presets_are_the_rules_of_thumb() -> None:
    # Hall, Holowenko & Laughlin, Schaum's Outline of Machine Design (rules of thumb, common
    # practice): 0.08°/ft (references: ≈ 0.26°/m) and 1°/ft. Units converted by pint.
    ureg = registry()
    machine = TWIST_RATE_PRESETS["machine-shaft"]
    line = TWIST_RATE_PRESETS["line-shaft"]
    assert machine.value == pytest.approx(ureg.Quantity(0.08, "deg/ft").to("rad/m").magnitude)
    assert line.value == pytest.approx(ureg.Quantity(1.0, "deg/ft").to("rad/m").magnitude)
    assert ureg.Quantity(machine.value, "rad/m").to("deg/m").magnitude == pytest.approx(
        0.26, abs=0.005
    )
    assert "rule of thumb" in machine.source and "rule of thumb" in line.source


def test_one_degree_in_twenty_diameters() -> None:
    # "1° in 20 diameters" (common practice, no source): d = 50 mm -> 1° per metre.
    ureg = registry()
    limit = twist_rate_one_degree_in_twenty_diameters(0.050)
    expected = (ureg.Quantity(1.0, "deg") / (20 * ureg.Quantity(50.0, "mm"))).to("rad/m")
    assert limit.value == pytest.approx(expected.magnitude, rel=1e-12)
    assert "no source" in limit.source
    with pytest.raises(InputError):
        twist_rate_one_degree_in_twenty_diameters(0.0)


# ================================================================================================
# Stress concentration
# ================================================================================================
def test_shoulder_fillet_matches_shigley_first_iteration_estimates() -> None:
    # Shigley's Mechanical Engineering Design, Table 7-1: shoulder fillet, sharp (r/d = 0.02)
    # Kts = 2.2, well rounded (r/d = 0.1) Kts = 1.5. The table states no D/d; the D/d = 2.00
    # curve (the most severe one charted) reproduces both. The table prints one decimal, so
    # ±0.05 (half its last digit) is the tolerance.
    sharp = shoulder_fillet_kts(0.100, 0.050, 0.02 * 0.050)
    rounded = shoulder_fillet_kts(0.100, 0.050, 0.1 * 0.050)
    assert sharp.in_range and rounded.in_range
    assert sharp.value == pytest.approx(2.2, abs=0.05)
    assert rounded.value == pytest.approx(1.5, abs=0.05)


@pytest.mark.parametrize("diameter_ratio", [row[0] for row in NORTON_TORSION_FITS])
def test_shigley_estimates_bound_every_charted_shoulder(diameter_ratio: float) -> None:
    # Table 7-1's estimates are meant as first-iteration upper values; no charted D/d exceeds
    # them by more than the table's rounding (Shigley Table 7-1).
    small = 0.040
    assert shoulder_fillet_kts(diameter_ratio * small, small, 0.02 * small).value <= 2.2 + 0.05
    assert shoulder_fillet_kts(diameter_ratio * small, small, 0.1 * small).value <= 1.5 + 0.05


def _pilkey_stepped_torsion(diameter_ratio: float, fillet_ratio: float) -> float | None:
    # Pilkey & Pilkey, Peterson's Stress Concentration Factors, 3rd ed., stepped bar in
    # torsion, polynomial fit of the chart, valid for 0.25 ≤ t/r ≤ 4 (coefficients from memory).
    step_over_radius = (diameter_ratio - 1.0) / 2.0 / fillet_ratio
    if not 0.25 <= step_over_radius <= 4.0:
        return None
    root = math.sqrt(step_over_radius)
    c1 = 0.905 + 0.783 * root - 0.075 * step_over_radius
    c2 = -0.437 - 1.969 * root + 0.553 * step_over_radius
    c3 = 1.557 + 1.073 * root - 0.578 * step_over_radius
    c4 = -1.061 + 0.171 * root + 0.086 * step_over_radius
    x = (diameter_ratio - 1.0) / diameter_ratio
    return c1 + c2 * x + c3 * x**2 + c4 * x**3


_PILKEY_POINTS = [
    (diameter_ratio, fillet_ratio)
    for diameter_ratio in (1.20, 1.33, 2.00)
    for fillet_ratio in (0.02, 0.03, 0.05, 0.1, 0.15, 0.2, 0.3)
    if _pilkey_stepped_torsion(diameter_ratio, fillet_ratio) is not None
]


def test_pilkey_comparison_covers_every_compared_ratio() -> None:
    # Guard: the comparison below must not silently shrink to nothing.
    assert {ratio for ratio, _ in _PILKEY_POINTS} == {1.20, 1.33, 2.00}
    assert len(_PILKEY_POINTS) >= 12


@pytest.mark.parametrize(("diameter_ratio", "fillet_ratio"), _PILKEY_POINTS)
def test_norton_fit_agrees_with_pilkey_polynomial(
    diameter_ratio: float, fillet_ratio: float
) -> None:
    # Two independent fits (Norton's power law; Pilkey & Pilkey's polynomial) of Peterson's
    # stepped-shaft torsion chart, compared where both apply. Tolerance 6 %: a few % fit error
    # each; the largest difference found is 5.96 % (D/d 1.20, r/d 0.30). D/d = 1.09 is left out
    # on purpose: there Norton's fit lies up to 15 % below Pilkey's at small r/d (reported, see
    # the concentration module docstring).
    reference = _pilkey_stepped_torsion(diameter_ratio, fillet_ratio)
    assert reference is not None
    value = shoulder_fillet_kts(diameter_ratio, 1.0, fillet_ratio).value
    assert value == pytest.approx(reference, rel=0.06)


def test_tabulated_ratio_uses_its_own_fit() -> None:
    # Norton App. C: D/d = 1.33, A = 0.84897, b = -0.23161 at r/d = 0.05.
    factor = shoulder_fillet_kts(1.33, 1.0, 0.05)
    assert factor.value == pytest.approx(0.84897 * 0.05**-0.23161, rel=1e-12)
    assert factor.in_range


def test_interpolation_is_linear_in_diameter_ratio() -> None:
    low = shoulder_fillet_kts(1.33, 1.0, 0.08).value
    high = shoulder_fillet_kts(2.00, 1.0, 0.08).value
    middle = shoulder_fillet_kts((1.33 + 2.00) / 2, 1.0, 0.08)
    assert middle.in_range
    assert middle.value == pytest.approx((low + high) / 2, rel=1e-12)
    # Continuous at a tabulated ratio.
    assert shoulder_fillet_kts(1.33 * (1 + 1e-9), 1.0, 0.08).value == pytest.approx(low)


def test_out_of_range_geometry_is_flagged_and_conservative() -> None:
    lowest_r, highest_r = FILLET_RATIO_RANGE
    # Blunter than charted: value held at r/d = 0.30, above the fit at the actual r/d.
    blunt = shoulder_fillet_kts(2.0, 1.0, 0.5)
    assert not blunt.in_range and "above" in blunt.note
    assert blunt.value == pytest.approx(shoulder_fillet_kts(2.0, 1.0, highest_r).value)
    assert blunt.value > 0.86331 * 0.5**-0.23865
    # Sharper than charted: flagged, and larger than at the chart's sharpest fillet.
    sharp = shoulder_fillet_kts(2.0, 1.0, 0.005)
    assert not sharp.in_range and "below" in sharp.note
    assert sharp.value > shoulder_fillet_kts(2.0, 1.0, lowest_r).value
    # Larger step than charted: the D/d = 2.00 fit, flagged.
    big_step = shoulder_fillet_kts(3.0, 1.0, 0.05)
    assert not big_step.in_range and "unconservative" in big_step.note
    assert big_step.value == pytest.approx(shoulder_fillet_kts(2.0, 1.0, 0.05).value)
    # Smaller step than charted: the D/d = 1.09 fit, an upper value since Kts grows with D/d.
    small_step = shoulder_fillet_kts(1.04, 1.0, 0.05)
    assert not small_step.in_range
    assert small_step.value == pytest.approx(shoulder_fillet_kts(1.09, 1.0, 0.05).value)
    # No step at all.
    plain = shoulder_fillet_kts(0.04, 0.04, 0.001)
    assert plain.value == 1.0 and plain.in_range


def test_range_limits_survive_floating_point_division() -> None:
    # 15/50 and 100/50 in metres are not exactly 0.30 and 2.00 in binary: still in range.
    assert shoulder_fillet_kts(0.100, 0.050, 0.015).in_range
    assert shoulder_fillet_kts(0.100, 0.050, 0.001).in_range
    assert shoulder_fillet_kts(0.0545, 0.050, 0.001).in_range  # D/d = 1.09


@pytest.mark.parametrize(
    ("big", "small", "radius", "field"),
    [
        (0.03, 0.04, 0.001, "big_diameter"),
        (0.05, 0.04, 0.0, "fillet_radius"),
        (0.05, 0.04, -0.001, "fillet_radius"),
        (0.05, 0.0, 0.001, "small_diameter"),
    ],
)
def test_shoulder_fillet_errors(big: float, small: float, radius: float, field: str) -> None:
    with pytest.raises(InputError) as caught:
        shoulder_fillet_kts(big, small, radius)
    assert caught.value.field == field


@given(
    st.floats(min_value=FILLET_RATIO_RANGE[0], max_value=FILLET_RATIO_RANGE[1] / 1.01),
    st.floats(min_value=1.09, max_value=2.0),
    st.floats(min_value=1.09, max_value=2.0),
)
def test_kts_grows_with_diameter_ratio_and_falls_with_fillet(
    fillet_ratio: float, first: float, second: float
) -> None:
    # Peterson's charts (Pilkey & Pilkey, ch. 3): at a given r/d a bigger step concentrates more,
    # and a larger fillet less; the conservative out-of-range choices rely on both.
    low, high = sorted((first, second))
    assert (
        shoulder_fillet_kts(low, 1.0, fillet_ratio).value
        <= shoulder_fillet_kts(high, 1.0, fillet_ratio).value + 1e-12
    )
    assert (
        shoulder_fillet_kts(low, 1.0, fillet_ratio * 1.01).value
        < shoulder_fillet_kts(low, 1.0, fillet_ratio).value
    )


def test_keyseat_estimate() -> None:
    # Shigley Table 7-1: end-mill keyseat (r/d = 0.02), Kts = 3.0.
    factor = keyseat_kts()
    assert factor.value == 3.0 and factor.in_range
    assert "Table 7-1" in factor.source


def test_transverse_hole_small_hole_limit_is_the_plate_solution() -> None:
    # A small circular hole in pure shear τ: σ_max = 4τ (Kirsch solution; Timoshenko & Goodier,
    # Theory of Elasticity, 3rd ed., stress concentration at a circular hole). The polynomial
    # must tend to it as d/D -> 0.
    assert transverse_hole_kts(1e-6, 1.0).value == pytest.approx(4.0, abs=1e-4)


@pytest.mark.parametrize(
    ("hole_ratio", "expected"),
    [
        # Pilkey & Pilkey polynomial as quoted in the references, evaluated by hand:
        # 4 - 6.055·0.2 + 32.764·0.04 - 38.33·0.008 = 3.79292
        (0.2, 3.79292),
        # 4 - 6.055·0.4 + 32.764·0.16 - 38.33·0.064 = 4.36712
        (0.4, 4.36712),
    ],
)
def test_transverse_hole_polynomial(hole_ratio: float, expected: float) -> None:
    factor = transverse_hole_kts(hole_ratio * 0.05, 0.05)
    assert factor.in_range
    assert factor.value == pytest.approx(expected, abs=1e-9)
    assert "normal stress" in factor.note


def test_transverse_hole_out_of_range() -> None:
    factor = transverse_hole_kts(0.5, 1.0)
    assert not factor.in_range and "NOT conservative" in factor.note
    with pytest.raises(InputError) as caught:
        transverse_hole_kts(1.0, 1.0)
    assert caught.value.field == "hole_diameter"


# ================================================================================================
# Plastic torsion (Beer & Johnston, Mechanics of Materials, ch. 3, elastoplastic shafts)
# ================================================================================================
def test_plastic_ratio_of_a_solid_shaft_is_four_thirds() -> None:
    reserve = plastic_reserve(150 * MPA, 0.050)
    assert reserve.ratio == pytest.approx(4.0 / 3.0, rel=1e-12)


def test_beer_johnston_partly_plastic_example() -> None:
    # Beer & Johnston worked example (from memory): d = 50 mm, τ_y = 150 MPa -> T_Y = 3.68 kN·m;
    # under 4.60 kN·m the elastic core has ρ_Y/c = 0.630. Figures to 3 s.f.: 0.3 % tolerance.
    assert yield_torque(150 * MPA, 0.050) == pytest.approx(3.68e3, rel=3e-3)
    torque = partly_plastic_torque(150 * MPA, 0.050, 0.630 * 0.025)
    assert torque == pytest.approx(4.60e3, rel=3e-3)


@pytest.mark.parametrize("inner_diameter", [0.0, 0.010, 0.030, 0.045])
def test_torques_match_integrated_stress(inner_diameter: float) -> None:
    # Independent check: integrate the stress distribution, T = ∫ τ(ρ)·2πρ² dρ (scipy quad).
    shear_yield, outer = 200 * MPA, 0.050
    c, ci = outer / 2, inner_diameter / 2
    elastic, _ = quad(lambda rho: shear_yield * rho / c * 2 * math.pi * rho**2, ci, c)
    plastic, _ = quad(lambda rho: shear_yield * 2 * math.pi * rho**2, ci, c)
    assert yield_torque(shear_yield, outer, inner_diameter) == pytest.approx(elastic, rel=1e-10)
    assert plastic_torque(shear_yield, outer, inner_diameter) == pytest.approx(plastic, rel=1e-10)
    # Hollow-shaft ratio (Beer & Johnston): T_p/T_y = (4/3)·c(c³ − cᵢ³)/(c⁴ − cᵢ⁴).
    reserve = plastic_reserve(shear_yield, outer, inner_diameter)
    assert reserve.ratio == pytest.approx(4 / 3 * c * (c**3 - ci**3) / (c**4 - ci**4), rel=1e-12)


@pytest.mark.parametrize("core_fraction", [0.0, 0.3, 0.63, 1.0])
def test_partly_plastic_torque_matches_integrated_stress(core_fraction: float) -> None:
    shear_yield, diameter = 150 * MPA, 0.050
    c = diameter / 2
    core = core_fraction * c

    def stress(rho: float) -> float:
        return shear_yield if rho >= core else shear_yield * rho / core

    points = [core] if 0 < core < c else None
    integrated, _ = quad(lambda rho: stress(rho) * 2 * math.pi * rho**2, 0, c, points=points)
    assert partly_plastic_torque(shear_yield, diameter, core) == pytest.approx(integrated, rel=1e-9)


def test_partly_plastic_limits_and_errors() -> None:
    assert partly_plastic_torque(150 * MPA, 0.05, 0.025) == pytest.approx(
        yield_torque(150 * MPA, 0.05)
    )
    assert partly_plastic_torque(150 * MPA, 0.05, 0.0) == pytest.approx(
        plastic_torque(150 * MPA, 0.05)
    )
    with pytest.raises(InputError) as caught:
        partly_plastic_torque(150 * MPA, 0.05, 0.03)
    assert caught.value.field == "elastic_core_radius"
    with pytest.raises(InputError) as caught:
        plastic_torque(150 * MPA, 0.05, 0.05)
    assert caught.value.field == "inner_diameter"


# ================================================================================================
# Preferred numbers (ISO 3 / ISO 497)
# ================================================================================================
def test_series_values_as_quoted_from_iso_3() -> None:
    # ISO 3 basic series as quoted in Wikipedia, "Preferred number" (Renard numbers), copied in
    # public source files: R10, then the R20 values not in R10 and the R40 values not in R20.
    r10 = (1.00, 1.25, 1.60, 2.00, 2.50, 3.15, 4.00, 5.00, 6.30, 8.00)
    r20_added = (1.12, 1.40, 1.80, 2.24, 2.80, 3.55, 4.50, 5.60, 7.10, 9.00)
    r40_odd = (1.06, 1.32, 1.70, 2.12, 2.65, 3.35, 4.25, 5.30, 6.70, 8.50)
    r40_even = (1.18, 1.50, 1.90, 2.36, 3.00, 3.75, 4.75, 6.00, 7.50, 9.50)
    assert RENARD_SERIES["R5"] == (1.00, 1.60, 2.50, 4.00, 6.30)
    assert RENARD_SERIES["R10"] == r10
    assert RENARD_SERIES["R20"] == tuple(sorted(r10 + r20_added))
    assert RENARD_SERIES["R40"] == tuple(sorted(r10 + r20_added + r40_odd + r40_even))


@pytest.mark.parametrize(("name", "count"), [("R5", 5), ("R10", 10), ("R20", 20), ("R40", 40)])
def test_series_are_rounded_geometric_progressions(name: str, count: int) -> None:
    # ISO 3: the Rn values are rounded from 10^(i/n); the standard gives the rounding deviations
    # as -1.01 % ... +1.26 % (from memory). Tolerance: those bounds, to the next 0.01 %.
    values = RENARD_SERIES[name]
    assert len(values) == count
    for index, value in enumerate(values):
        deviation = value / 10 ** (index / count) - 1
        assert -0.0102 <= deviation <= 0.0127, (name, value)
    assert list(values) == sorted(values)


@pytest.mark.parametrize(("coarse", "fine"), [("R5", "R10"), ("R10", "R20"), ("R20", "R40")])
def test_each_series_is_every_other_term_of_the_next(coarse: str, fine: str) -> None:
    # ISO 3: R5 ⊂ R10 ⊂ R20 ⊂ R40, each taking every second term of the next finer series.
    assert RENARD_SERIES[coarse] == RENARD_SERIES[fine][::2]


@pytest.mark.parametrize(
    ("value", "series", "expected"),
    [
        (0.025, "R40", 0.025),  # already preferred: unchanged
        (0.0251, "R40", 0.0265),
        (33.0, "R20", 35.5),
        (9.6, "R40", 10.0),  # into the next decade
        (0.0011, "R5", 0.0016),
        (31.6, "R10", 40.0),
        (1e-3, "R10", 1e-3),
    ],
)
def test_round_up_preferred_examples(value: float, series: str, expected: float) -> None:
    assert round_up_preferred(value, series) == expected


def test_next_smaller_preferred_examples() -> None:
    assert next_smaller_preferred(0.025, "R10") == 0.020
    assert next_smaller_preferred(1.0, "R40") == 0.95
    assert next_smaller_preferred(0.0251, "R40") == 0.025


def _decade_ratio(series: str) -> float:
    values = [*RENARD_SERIES[series], 10.0]
    return max(b / a for a, b in itertools.pairwise(values))


@given(
    st.floats(min_value=1e-12, max_value=1e12, allow_nan=False, allow_infinity=False),
    st.sampled_from(sorted(RENARD_SERIES)),
)
def test_rounding_properties(value: float, series: str) -> None:
    up = round_up_preferred(value, series)
    down = next_smaller_preferred(value, series)
    assert up >= value
    assert down < value
    # No preferred number lies strictly between the neighbour below and the rounded-up value.
    assert next_smaller_preferred(up, series) < value
    assert up / value <= _decade_ratio(series) * (1 + 1e-12)
    mantissa = up / 10 ** math.floor(math.log10(up) + 1e-12)
    assert min(abs(mantissa - p) for p in [*RENARD_SERIES[series], 10.0]) < 1e-9


def test_round_up_to_list() -> None:
    stock = [0.030, 0.020, 0.025]
    assert round_up_to_list(0.026, stock) == 0.030
    assert round_up_to_list(0.025, stock) == 0.025
    assert round_up_to_list(0.001, stock) == 0.020
    with pytest.raises(InputError) as caught:
        round_up_to_list(0.031, stock)
    assert caught.value.field == "value"
    with pytest.raises(InputError):
        round_up_to_list(0.02, [])
    with pytest.raises(InputError):
        round_up_to_list(0.02, [0.03, -0.01])


@pytest.mark.parametrize("bad", [0.0, -1.0, math.nan, math.inf])
def test_preferred_rejects_bad_values(bad: float) -> None:
    with pytest.raises(InputError):
        round_up_preferred(bad)
    with pytest.raises(InputError):
        next_smaller_preferred(bad)


def test_unknown_series() -> None:
    with pytest.raises(InputError) as caught:
        round_up_preferred(1.0, "R80")
    assert caught.value.field == "series"


# ================================================================================================
# Power, speed, torque
# ================================================================================================
def test_torque_constant_kilowatt_rpm() -> None:
    # T[N·m] = 9549.3·P[kW]/n[rpm] (exact from unit definitions: 1000·60/(2π) = 9549.297);
    # tolerance half a unit of the constant's last printed digit. Units converted by pint.
    ureg = registry()
    torque = torque_from_power(
        ureg.Quantity(1.0, "kW").to("W").magnitude, ureg.Quantity(1.0, "rpm").to("rad/s").magnitude
    )
    assert torque == pytest.approx(9549.3, abs=0.05)


def test_torque_constant_horsepower_rpm() -> None:
    # T[lbf·in] = 63025·P[hp]/n[rpm] (mechanical horsepower, 550 ft·lbf/s); tolerance half a
    # unit of the last printed digit. Units converted by pint.
    ureg = registry()
    torque = torque_from_power(
        ureg.Quantity(1.0, "hp").to("W").magnitude, ureg.Quantity(1.0, "rpm").to("rad/s").magnitude
    )
    assert ureg.Quantity(torque, "N*m").to("lbf*in").magnitude == pytest.approx(63025, abs=0.5)


@pytest.mark.parametrize(
    ("power", "speed", "field"),
    [(1e3, 0.0, "speed"), (1e3, -5.0, "speed"), (math.nan, 10.0, "power")],
)
def test_torque_from_power_errors(power: float, speed: float, field: str) -> None:
    with pytest.raises(InputError) as caught:
        torque_from_power(power, speed)
    assert caught.value.field == field
