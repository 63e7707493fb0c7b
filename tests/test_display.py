"""Numbers and units as shown to a person: four significant figures, grouped, pretty symbols."""

from __future__ import annotations

import math
import re

import pytest
from hypothesis import given
from hypothesis import strategies as st

from workbench.case.display import format_number, format_quantity, unit_symbol
from workbench.case.units import SI_ENGINEERING, us_customary


@pytest.mark.parametrize(
    ("value", "shown"),
    [
        (112.56, "112.6"),
        (1234.5, "1,235"),  # half up on the digits, as a person rounds them
        (12345.0, "12,350"),
        (0.0012345, "0.001235"),
        (0.001, "0.001"),
        (9.99996, "10"),
        (50.0, "50"),
        (-4.5, "\u22124.5"),
        (999999.6, "1×10⁶"),
        (1.2345e7, "1.235×10⁷"),
        (2.5e-5, "2.5×10⁻⁵"),
        (0.0, "0"),
        (math.nan, "—"),
    ],
)
def test_values_are_written_as_an_engineer_writes_them(value, shown):
    assert format_number(value) == shown


_SUPERSCRIPT_DIGITS = str.maketrans("⁻⁰¹²³⁴⁵⁶⁷⁸⁹", "-0123456789")


def _read_back(text: str) -> float:
    text = text.replace(",", "").replace("\u2212", "-")
    mantissa, _, exponent = text.partition("×10")
    return float(mantissa) * 10.0 ** int(exponent.translate(_SUPERSCRIPT_DIGITS) or 0)


@given(st.floats(allow_nan=False, allow_infinity=False, min_value=-1e300, max_value=1e300))
def test_the_shown_number_is_the_value_to_four_figures(value):
    shown = format_number(value)
    assert "e" not in shown
    digits = re.sub(r"×10.*", "", shown).replace(",", "").replace(".", "").lstrip("\u22120")
    assert len(digits.rstrip("0")) <= 4
    assert _read_back(shown) == pytest.approx(value, rel=5.0001e-4, abs=1e-300)
    plain = 1e-3 <= abs(_read_back(shown)) < 1e6
    assert ("×10" not in shown) == (plain or value == 0)


@pytest.mark.parametrize(
    ("unit", "symbol"),
    [
        ("N*m", "N·m"),
        ("kg*m**2", "kg·m²"),
        ("kg/m**3", "kg/m³"),
        ("deg/m", "°/m"),
        ("deg/ft", "°/ft"),
        ("lbf*in", "lbf·in"),
        ("N*m/deg", "N·m/°"),
        ("1", ""),
    ],
)
def test_unit_symbols_come_from_the_unit_registry_in_the_order_written(unit, symbol):
    assert unit_symbol(unit) == symbol


def test_a_quantity_in_a_display_system():
    assert format_quantity(112.56e6, "stress", SI_ENGINEERING) == "112.6 MPa"
    # 19,620 lbf·in is 2,216.8 N·m (1 lbf·in = 0.112 984 829 N·m, NIST SP 811, 2008, App. B.9).
    assert format_quantity(2216.76, "torque", us_customary()) == "19,620 lbf·in"
    assert format_quantity(0.5, "ratio", SI_ENGINEERING) == "0.5"
