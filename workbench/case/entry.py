"""A quantity typed by a person: ``60``, ``60 mm``, ``2 1/4 in``, ``1,250 N·m`` → an SI float.

pint reads the unit, but not the number the way an engineer writes it: it takes ``2 1/4 in`` for
``2 / 4 in`` = 0.5 in, and ``1,250`` is no number to it. So the number is read here — a decimal
with optional thousands commas, a fraction, or a whole number and a fraction (``2 1/4``,
``2-1/4``, ``2¼``) — and only the rest goes to the unit registry, with the same dimension check a
case file's units get. A bare number is in the unit the field shows.
"""

from __future__ import annotations

import math
import re
import unicodedata

from workbench.case.declaration.keys import MAX_NUMBER_DIGITS, MAX_UNIT_LENGTH
from workbench.case.errors import InputError, short
from workbench.case.units import UnitSystem, unit_factor

#: The number at the start of an entry, then the unit. Thousands commas only in groups of three,
#: so a decimal comma (``1,25``) is not read as 125.
_ENTRY = re.compile(
    r"""^(?P<sign>[-+]?)\s*
    (?:
        (?P<whole>\d+)(?:\s+|-)(?P<mixed_numerator>\d+)/(?P<mixed_denominator>\d+)
      | (?P<numerator>\d+)/(?P<denominator>\d+)
      | (?P<decimal>(?:\d{1,3}(?:,\d{3})+|\d+)(?:\.\d*)?|\.\d+)(?P<exponent>[eE][-+]?\d+)?
    )
    (?P<unit>.*)$""",
    re.X | re.S,
)
_DECIMAL_COMMA = re.compile(r"^,\d")
#: Minus signs a keyboard or a copied document may give instead of ``-``.
_MINUSES = str.maketrans(
    {"\u2212": "-", "\u2012": "-", "\u2013": "-", "\ufe63": "-", "\uff0d": "-"}
)
#: A power of ten as the panel writes one (``1.235×10⁶``): read as ``1.235e6``.
_POWER_OF_TEN = re.compile(r"(?<=\d)\s*×\s*10([⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)")
_SUPERSCRIPT_DIGITS = str.maketrans("⁻⁺⁰¹²³⁴⁵⁶⁷⁸⁹", "-+0123456789")
#: Spaces inside a number or between it and the unit (no-break, thin, narrow no-break).
_SPACES = str.maketrans({"\u00a0": " ", "\u2009": " ", "\u202f": " "})


def _vulgar_fractions(text: str) -> str:
    """``2¼`` → ``2 1/4``: a fraction glyph becomes a fraction the pattern reads."""
    out = []
    for char in text:
        if unicodedata.category(char) == "No" and unicodedata.numeric(char, None) is not None:
            name = unicodedata.name(char, "")
            if name.startswith("VULGAR FRACTION"):
                value = unicodedata.numeric(char)
                numerator, denominator = value.as_integer_ratio()
                out.append(f" {numerator}/{denominator}")
                continue
        out.append(char)
    return "".join(out)


def read_quantity(text: str, quantity: str, system: UnitSystem, field: str = "") -> float:
    """Read a typed value with an optional unit and return it in SI.

    Parameters
    ----------
    text
        What was typed: a number (``60``, ``-1.5e3``, ``1.5×10³``, ``1,250``, ``1/4``, ``2 1/4``,
        ``2-1/4``, ``2¼``), then optionally a unit of ``quantity`` (``mm``, ``in``, ``N·m``, ``lbf*ft``, ``°``).
    quantity
        What the field measures (``"length"``, ``"torque"``, ``"stiffness"``, ``"ratio"``, ...).
    system
        The units the field shows: a bare number is in ``system``'s readout unit of
        ``quantity`` (:meth:`~workbench.case.units.UnitSystem.readout_unit`).
    field
        The field's path, named in the error.

    Returns
    -------
    float
        The value in SI (m, N·m, Pa, rad, ...).

    Raises
    ------
    InputError
        For anything else, naming ``field``: no number, a decimal comma, a unit that is unknown or
        of another quantity, a value that is not finite, too many digits, text too long.

    References
    ----------
    NIST Special Publication 811 (2008), *Guide for the Use of the International System of
    Units*, §10.5.3 (grouping digits) and §7.2 (a space between the number and the unit).
    """
    if len(text) > MAX_UNIT_LENGTH:
        msg = f"at most {MAX_UNIT_LENGTH} characters, not {len(text):,}"
        raise InputError(field, msg)
    cleaned = _POWER_OF_TEN.sub(
        lambda power: "e" + power[1].translate(_SUPERSCRIPT_DIGITS),
        text.translate(_MINUSES).translate(_SPACES),
    )
    cleaned = _vulgar_fractions(cleaned).strip()
    match = _ENTRY.match(cleaned)
    if match is None:
        raise InputError(field, f"{short(text)!r} is not a number (write e.g. 60, 60 mm, 2 1/4 in)")
    unit = match["unit"].strip()
    if _DECIMAL_COMMA.match(unit):
        raise InputError(field, f"{short(text)!r}: write decimals with a point (1.25, not 1,25)")
    digits = sum(char.isdigit() for char in match.group(0)[: len(match.group(0)) - len(unit)])
    if digits > MAX_NUMBER_DIGITS:
        raise InputError(field, f"at most {MAX_NUMBER_DIGITS} digits, not {digits}")
    magnitude = _magnitude(match, text, field)
    if unit:
        try:
            factor = unit_factor(unit, quantity)
        except InputError as exc:
            raise InputError(field, f"{short(text)!r}: {exc.message}") from None
    else:
        factor = system.readout_factor(quantity)
    value = -magnitude * factor if match["sign"] == "-" else magnitude * factor
    if not math.isfinite(value):
        raise InputError(field, f"{short(text)!r} is too large a number")
    return value


def _magnitude(match: re.Match[str], text: str, field: str) -> float:
    """The unsigned number of a matched entry."""
    if match["decimal"] is not None:
        return float(match["decimal"].replace(",", "") + (match["exponent"] or ""))
    if match["whole"] is not None:
        whole, top, bottom = match["whole"], match["mixed_numerator"], match["mixed_denominator"]
    else:
        whole, top, bottom = "0", match["numerator"], match["denominator"]
    if int(bottom) == 0:
        raise InputError(field, f"{short(text)!r}: a fraction cannot divide by zero")
    return int(whole) + int(top) / int(bottom)
