"""Canonical JSON bytes for hashing and signing: the JSON Canonicalization Scheme (JCS).

:func:`canonicalize` turns a JSON-like Python value into the one byte string RFC 8785 allows
for it. The `rfc8785` package writes the bytes (member order, string escapes, ECMAScript number
text); this module first checks the value and names the offending item of anything that has no
JSON form, and carries integers beyond 2⁵³−1 the way records signed so far carry them.

Two documents that mean the same JSON value give the same bytes, so a signature over the bytes
is a signature over the value, whatever tool wrote the file.

References
----------
.. [1] A. Rundgren, B. Jordan and S. Erdtman, "JSON Canonicalization Scheme (JCS)", RFC 8785,
   June 2020, §3.1 (I-JSON input), §3.2.2 (values), §3.2.3 (sorting), Appendix D (big numbers).
.. [2] T. Bray, "The I-JSON Message Format", RFC 7493, March 2015, §2.2.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from workbench.case.errors import InputError

__all__ = ["CanonicalizationError", "canonicalize"]

#: Largest magnitude `rfc8785` writes as an integer: 2⁵³−1, the last one a double holds together
#: with all its neighbours (RFC 7493 §2.2).
_LARGEST_SAFE_INTEGER = 2**53 - 1


class CanonicalizationError(InputError):
    """A value that has no canonical JSON form (RFC 8785 §3.1, §3.2.2).

    ``field`` is the path of the offending item inside the value, e.g. ``results[2].torque``;
    empty for the value as a whole.
    """


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

    Notes
    -----
    `rfc8785` refuses integers beyond ±(2⁵³−1). Such an integer is accepted here, as it always
    was, when a double holds it exactly (2⁵³, 10²¹) or when the nearest double is written with
    the same digits (295147905179352830000), and it is handed on as that double: its canonical
    text is the double's ECMAScript text (``1e+21``), byte for byte what records signed before
    carry. Any other (2⁵³+1) is refused rather than rounded.

    References
    ----------
    .. [1] RFC 8785, §3.1, §3.2.1–§3.2.4 and Appendix D.

    Examples
    --------
    >>> canonicalize({"torque": 1200.0, "angle": [1e21, 10**21, -0.0], "shaft": "main"})
    b'{"angle":[1e+21,1e+21,0],"shaft":"main","torque":1200}'
    """
    import rfc8785  # noqa: PLC0415 - only hashing and signing need it, not `workbench solve`

    return rfc8785.dumps(_plain(value, ""))


def _plain(value: Any, field: str) -> Any:
    """The value as plain dicts, lists and scalars that `rfc8785` writes, checked on the way."""
    # bool before int: True is an int in Python but a literal in JSON.
    if value is None or value is True or value is False:
        return value
    if isinstance(value, str):
        _check_unicode(value, field)
        return value
    if isinstance(value, int):
        return _number_of_integer(value, field)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise _not_a_number(value, field)
        return value
    if isinstance(value, Mapping):
        return _plain_object(value, field)
    if isinstance(value, (list, tuple)):
        items = list(value)
        for index, item in enumerate(items):
            if type(item) is not float or not math.isfinite(item):  # floats: no path to build
                items[index] = _plain(item, f"{field}[{index}]")
        return items
    msg = (
        f"{type(value).__name__} value {value!r} has no JSON form; use None, bool, int, "
        "float, str, list or dict"
    )
    raise CanonicalizationError(field, msg)


def _plain_object(value: Mapping[Any, Any], field: str) -> dict[str, Any]:
    members: dict[str, Any] = {}
    for key, item in value.items():
        if not isinstance(key, str):
            msg = f"object key {key!r} is a {type(key).__name__}; JSON member names are strings"
            raise CanonicalizationError(field, msg)
        path = _member_path(field, key)
        _check_unicode(key, path)
        members[key] = _plain(item, path)
    return members


def _member_path(field: str, key: str) -> str:
    if key.isidentifier():
        return f"{field}.{key}" if field else key
    return f"{field}[{key!r}]"


def _not_a_number(number: float, field: str) -> CanonicalizationError:
    msg = f"{number!r} is not a JSON number (RFC 8785 §3.2.2.3 admits finite numbers only)"
    return CanonicalizationError(field, msg)


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


def _number_of_integer(value: int, field: str) -> int | float:
    # JSON numbers are IEEE 754 doubles (RFC 8785 §3.1): see canonicalize's Notes.
    value = int(value)  # plain int: an IntEnum member must not bring its own str()
    if -_LARGEST_SAFE_INTEGER <= value <= _LARGEST_SAFE_INTEGER:
        return value
    try:
        as_double = float(value)
    except OverflowError:
        msg = f"integer {value} is beyond the range of an IEEE 754 double (RFC 8785 §3.1)"
        raise CanonicalizationError(field, msg) from None
    if int(as_double) != value:
        import rfc8785  # noqa: PLC0415

        text = rfc8785.dumps(as_double).decode("ascii")
        if text != str(value):
            msg = (
                f"integer {value} cannot be carried by an IEEE 754 double (it would become "
                f"{text}); write it as a string (RFC 8785 §3.1, Appendix D)"
            )
            raise CanonicalizationError(field, msg)
    return as_double
