"""Typed quantities: the number read as an engineer writes it, the unit by the registry."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from workbench.case.entry import read_quantity
from workbench.case.errors import InputError
from workbench.case.units import SI_ENGINEERING, us_customary

#: 1 in = 25.4 mm and 1 lbf = 4.448 221 615 260 5 N exactly (NIST SP 811, 2008, Appendix B.8/B.9).
INCH = 0.0254
POUND_FORCE = 4.4482216152605


@pytest.mark.parametrize(
    ("text", "quantity", "expected"),
    [
        ("60", "length", 0.060),  # bare: the field's unit (mm)
        ("60 mm", "length", 0.060),
        ("60mm", "length", 0.060),
        ("2.5 in", "length", 2.5 * INCH),
        ("2 1/4 in", "length", 2.25 * INCH),
        ("2-1/4 in", "length", 2.25 * INCH),
        ("2¼ in", "length", 2.25 * INCH),
        ("1/4 in", "length", 0.25 * INCH),
        ("1,250 N·m", "torque", 1250.0),
        ("1,250,000.5 N*mm", "torque", 1250.0005),
        ("-3.5e2 lbf*in", "torque", -350 * POUND_FORCE * INCH),
        ("\u22124 mm", "length", -0.004),
        ("5 N·m/deg", "stiffness", 5 * 180 / math.pi),
        ("0.25 °/m", "twist_rate", 0.25 * math.pi / 180),
        ("1200 rpm", "speed", 1200 * 2 * math.pi / 60),
        ("50 %", "ratio", 0.5),
    ],
)
def test_reads_what_an_engineer_types(text, quantity, expected):
    assert read_quantity(text, quantity, SI_ENGINEERING) == pytest.approx(expected, rel=1e-12)


def test_a_mixed_number_is_not_what_pint_alone_makes_of_it():
    # pint reads "2 1/4 in" as 2 / 4 in; a machinist means two and a quarter inches.
    assert pint.UnitRegistry().Quantity("2 1/4 in").to("in").magnitude == pytest.approx(0.5)
    assert read_quantity("2 1/4 in", "length", SI_ENGINEERING) == pytest.approx(2.25 * INCH)


def test_a_bare_number_is_in_the_unit_the_field_shows():
    assert read_quantity("2", "length", us_customary()) == pytest.approx(2 * INCH)
    assert read_quantity("2", "torque", us_customary()) == pytest.approx(2 * POUND_FORCE * INCH)


@pytest.mark.parametrize(
    ("text", "quantity", "words"),
    [
        ("7o", "length", "unknown unit 'o'"),
        ("abc", "length", "is not a number"),
        ("", "length", "is not a number"),
        ("1,25", "length", "decimals with a point"),
        ("60 kg", "length", "not a unit of length"),
        ("60 Hz", "speed", "name an angle"),
        ("1 rad", "ratio", "not a unit of ratio"),
        ("1e400", "length", "too large"),
        ("3/0 in", "length", "divide by zero"),
        ("9" * 41, "length", "at most 40 digits"),
        ("1" * 101, "length", "at most 100 characters"),
    ],
)
def test_anything_else_is_refused_naming_the_field(text, quantity, words):
    with pytest.raises(InputError) as caught:
        read_quantity(text, quantity, SI_ENGINEERING, "shafts[0].segments[1].length")
    assert caught.value.field == "shafts[0].segments[1].length"
    assert words in caught.value.message
    assert len(str(caught.value)) <= 200 and "\n" not in str(caught.value)


@given(st.integers(min_value=0, max_value=10**12), st.integers(min_value=0, max_value=999))
def test_thousands_commas_read_as_the_number_python_formats(whole, thousandths):
    text = f"{whole:,}.{thousandths:03d} mm"
    expected = float(f"{whole}.{thousandths:03d}") * 1e-3
    assert read_quantity(text, "length", SI_ENGINEERING) == pytest.approx(expected, rel=1e-15)


@given(st.text(max_size=40))
def test_any_text_gives_a_finite_value_or_one_named_line(text):
    try:
        value = read_quantity(text, "torque", SI_ENGINEERING, "torque")
    except InputError as error:
        assert error.field == "torque" and "\n" not in error.message
    else:
        assert math.isfinite(value)
