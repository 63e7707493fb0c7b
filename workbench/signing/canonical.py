"""Canonical JSON bytes for hashing and signing: the JSON Canonicalization Scheme (JCS).

:func:`canonicalize` turns a JSON-like Python value (``dict`` with ``str`` keys, ``list`` or
``tuple``, ``str``, ``int``, ``float``, ``bool``, ``None``) into the one byte string RFC 8785
allows for it: UTF-8, no whitespace, object members sorted by the UTF-16 code units of their
names, strings with only the mandatory escapes and numbers written the way ECMAScript's
``Number.prototype.toString`` writes an IEEE 754 double.

Two documents that mean the same JSON value give the same bytes, so a signature over the bytes
is a signature over the value, whatever tool wrote the file.

References
----------
.. [1] A. Rundgren, B. Jordan and S. Erdtman, "JSON Canonicalization Scheme (JCS)", RFC 8785,
   June 2020, §3.1 (I-JSON input), §3.2.2.2 (strings), §3.2.2.3 (numbers), §3.2.3 (sorting),
   §3.2.4 (UTF-8).
.. [2] Ecma International, *ECMAScript Language Specification* (ECMA-262), Number::toString,
   §7.1.12.1 of the 6th edition (2015), including its Note 2.
.. [3] T. Bray, "The I-JSON Message Format", RFC 7493, March 2015.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from workbench.solver.errors import InputError

__all__ = ["CanonicalizationError", "canonicalize", "format_number"]


class CanonicalizationError(InputError):
    """A value that has no canonical JSON form (RFC 8785 §3.1, §3.2.2).

    ``field`` is the path of the offending item inside the value, e.g. ``results[2].torque``;
    empty for the value as a whole.
    """


# RFC 8785 §3.2.2.2: the five short escapes, \uhhhh (lower-case hex) for the rest of
# U+0000..U+001F, and \\ and \" — every other code point goes out as is.
_SHORT_ESCAPES = {0x08: "\\b", 0x09: "\\t", 0x0A: "\\n", 0x0C: "\\f", 0x0D: "\\r"}
_STRING_ESCAPES: dict[int, str] = {
    code: _SHORT_ESCAPES.get(code, f"\\u{code:04x}") for code in range(0x20)
}
_STRING_ESCAPES[ord('"')] = '\\"'
_STRING_ESCAPES[ord("\\")] = "\\\\"

# ECMAScript writes n ≤ 21 without an exponent and n > -6 as 0.000ddd (ECMA-262 Number::toString).
_LARGEST_PLAIN_EXPONENT = 21
_SMALLEST_PLAIN_EXPONENT = -6


def canonicalize(value: Any) -> bytes:
    """Serialize a JSON-like value to its RFC 8785 canonical UTF-8 bytes.

    Parameters
    ----------
    value
        ``None``, ``bool``, ``int``, ``float``, ``str``, a ``list``/``tuple`` of such values or a
        ``dict`` (any :class:`~collections.abc.Mapping`) with ``str`` keys. Dimensionless: the
        scheme knows no units; callers store SI floats.

    Returns
    -------
    bytes
        The canonical form, UTF-8 encoded.

    Raises
    ------
    CanonicalizationError
        For NaN or an infinity, an ``int`` that an IEEE 754 double cannot carry without changing
        its decimal text, a key that is not a ``str``, a string with a lone surrogate, or a value
        of another type. ``field`` names the offending item.

    References
    ----------
    .. [1] RFC 8785, §3.1, §3.2.1–§3.2.4.
    """
    parts: list[str] = []
    _serialize(value, "", parts)
    return "".join(parts).encode("utf-8")


def format_number(number: float, field: str = "") -> str:
    """Write a finite double the way ECMAScript ``Number.prototype.toString`` does.

    Parameters
    ----------
    number
        The value (dimensionless). ``-0.0`` gives ``"0"``.
    field
        Path reported in a :class:`CanonicalizationError`.

    Returns
    -------
    str
        Shortest digits that read back to the same double; no exponent for 1e-6 ≤ |x| < 1e21,
        otherwise ``d.ddde±n`` (e.g. ``"1e+21"``, ``"1e-7"``, ``"5e-324"``).

    Raises
    ------
    CanonicalizationError
        For NaN and the infinities, which JSON cannot express (RFC 8785 §3.2.2.3).

    References
    ----------
    .. [1] RFC 8785, §3.2.2.3 and Appendix B.
    .. [2] ECMA-262 6th ed., §7.1.12.1 Number::toString, steps 5–10 and Note 2.
    """
    if not math.isfinite(number):
        msg = f"{number!r} is not a JSON number (RFC 8785 §3.2.2.3 admits finite numbers only)"
        raise CanonicalizationError(field, msg)
    if number == 0.0:
        return "0"  # both zeros (ECMA-262 Number::toString step 2)
    text = repr(number)
    if "e" not in text:
        # 1e-4 ≤ |x| < 1e16: repr writes the same shortest digits without an exponent, as
        # ECMAScript does there; only its ".0" on whole numbers differs.
        return text[:-2] if text.endswith(".0") else text
    sign = "-" if number < 0.0 else ""
    digits, exponent = _shortest_digits(abs(number))
    # ECMA-262 names: k digits, the decimal point after the n-th digit (value = 0.digits × 10^n).
    k = len(digits)
    n = exponent + k
    if k <= n <= _LARGEST_PLAIN_EXPONENT:
        text = digits + "0" * (n - k)
    elif 0 < n <= _LARGEST_PLAIN_EXPONENT:
        text = f"{digits[:n]}.{digits[n:]}"
    elif _SMALLEST_PLAIN_EXPONENT < n <= 0:
        text = "0." + "0" * (-n) + digits
    else:
        exponent_text = f"e{'+' if n - 1 >= 0 else '-'}{abs(n - 1)}"
        mantissa = digits if k == 1 else f"{digits[0]}.{digits[1:]}"
        text = mantissa + exponent_text
    return sign + text


def _shortest_digits(magnitude: float) -> tuple[str, int]:
    """Shortest round-trip decimal digits of a positive double: ``(digits, e)``, x = digits·10^e.

    Python's ``repr`` already yields the shortest string that reads back to the same double and,
    among several such strings, the one nearest the exact value — the choice ECMA-262 Note 2
    asks for. Only its layout differs (``1e+21``, ``1.5e-07``, ``123.0``), so it is taken apart
    here into bare digits and a power of ten.
    """
    text = repr(magnitude)
    mantissa, _, exponent_text = text.partition("e")
    exponent = int(exponent_text) if exponent_text else 0
    whole, _, fraction = mantissa.partition(".")
    digits = whole + fraction
    exponent -= len(fraction)
    stripped = digits.lstrip("0")
    trailing = len(stripped) - len(stripped.rstrip("0"))
    return stripped.rstrip("0"), exponent + trailing


def _serialize(value: Any, field: str, parts: list[str]) -> None:
    # bool before int: True is an int in Python but a literal in JSON.
    if value is None:
        parts.append("null")
    elif value is True:
        parts.append("true")
    elif value is False:
        parts.append("false")
    elif isinstance(value, str):
        parts.append(_string(value, field))
    elif isinstance(value, int):
        parts.append(_integer(value, field))
    elif isinstance(value, float):
        parts.append(format_number(value, field))
    elif isinstance(value, Mapping):
        _object(value, field, parts)
    elif isinstance(value, (list, tuple)):
        parts.append("[")
        for index, item in enumerate(value):
            if index:
                parts.append(",")
            if type(item) is float and math.isfinite(item):  # common: no path to build
                parts.append(format_number(item))
            else:
                _serialize(item, f"{field}[{index}]", parts)
        parts.append("]")
    else:
        msg = (
            f"{type(value).__name__} value {value!r} has no JSON form; use None, bool, int, "
            "float, str, list or dict"
        )
        raise CanonicalizationError(field, msg)


def _object(value: Mapping[Any, Any], field: str, parts: list[str]) -> None:
    for key in value:
        if not isinstance(key, str):
            msg = f"object key {key!r} is a {type(key).__name__}; JSON member names are strings"
            raise CanonicalizationError(field, msg)
        _check_unicode(key, _member_path(field, key))
    # RFC 8785 §3.2.3: compare names as arrays of UTF-16 code units. Big-endian UTF-16 bytes
    # compare exactly like those code units (a shorter prefix first), unlike code points, which
    # put U+1F600 after U+FB33 where UTF-16 puts its lead surrogate U+D83D before it.
    ordered = sorted(value, key=lambda name: name.encode("utf-16-be"))
    parts.append("{")
    for index, key in enumerate(ordered):
        if index:
            parts.append(",")
        parts.append(_string(key, field))
        parts.append(":")
        _serialize(value[key], _member_path(field, key), parts)
    parts.append("}")


def _member_path(field: str, key: str) -> str:
    if key.isidentifier():
        return f"{field}.{key}" if field else key
    return f"{field}[{key!r}]"


def _check_unicode(text: str, field: str) -> None:
    try:
        text.encode("utf-8")
    except UnicodeEncodeError as error:
        code = ord(text[error.start])
        msg = (
            f"string has a lone surrogate U+{code:04X} at index {error.start}, which is not "
            "Unicode text (RFC 8785 §3.2.2.2 requires an error)"
        )
        raise CanonicalizationError(field, msg) from None


def _string(text: str, field: str) -> str:
    _check_unicode(text, field)
    return '"' + text.translate(_STRING_ESCAPES) + '"'


def _integer(value: int, field: str) -> str:
    # JSON numbers are IEEE 754 doubles (RFC 8785 §3.1). An int is accepted when a double holds
    # it exactly (2**53, 10**21) or when the nearest double is written with the same digits
    # (295147905179352830000, the canonical text of 2**68, read back by json.loads as an int),
    # so nothing the caller wrote is lost; 2**53 + 1 is refused rather than rounded.
    value = int(value)  # plain int: an IntEnum member must not bring its own str()
    try:
        as_double = float(value)
    except OverflowError:
        msg = f"integer {value} is beyond the range of an IEEE 754 double (RFC 8785 §3.1)"
        raise CanonicalizationError(field, msg) from None
    text = format_number(as_double, field)
    if int(as_double) != value and text != str(value):
        msg = (
            f"integer {value} cannot be carried by an IEEE 754 double (it would become {text}); "
            "write it as a string (RFC 8785 §3.1, Appendix D)"
        )
        raise CanonicalizationError(field, msg)
    return text
