"""The case file as JSON bytes: the limits checked on the text, and the field path of a byte.

The checks that hold for every file are cheap single passes done in C (``bytes.translate``,
``bytes.count``); where one of them finds something, a slower exact pass names the field. The
structure of a document (which bytes are keys, values, brackets) comes from a vectorised scan of
the bytes outside strings (numpy), so naming a field deep in a 256 MB file stays bounded.
"""

from __future__ import annotations

import json
import math
import re
from typing import Any

import numpy as np

from workbench.case.declaration import MAX_DEPTH, MAX_NUMBER_DIGITS
from workbench.case.errors import InputError, path_key

_QUOTE, _BACKSLASH = 0x22, 0x5C
_OPENS, _CLOSES = b"{[", b"}]"

#: 1 for the bytes that give a JSON text its structure (outside strings).
_STRUCTURAL = np.zeros(256, dtype=bool)
_STRUCTURAL[list(b"{}[]:,")] = True

#: Digits become "1", every other byte "0"; the characters a number holds besides digits are
#: deleted, so the digits of one number end up side by side.
_DIGITS = bytes(0x31 if 0x30 <= byte <= 0x39 else 0x30 for byte in range(256))
_NUMBER_PUNCTUATION = b".eE+-"
_LONG_RUN = re.compile(rb"[-+.0-9eE]{%d,}" % (MAX_NUMBER_DIGITS + 1))
_NON_FINITE = (b"NaN", b"Infinity", b"-Infinity")
#: Numbers with an exponent of three digits or more: the only ones beyond a double's range (their
#: digits are bounded).
_EXPONENT = re.compile(rb"-?[0-9]+(?:\.[0-9]*)?[eE][-+]?[0-9]{3,}")


def _real_quotes(raw: np.ndarray) -> np.ndarray:
    """Positions of the quotes that open or close strings (escaped quotes left out)."""
    quotes = np.flatnonzero(raw == _QUOTE)
    backslashes = np.flatnonzero(raw == _BACKSLASH)
    if backslashes.size == 0 or quotes.size == 0:
        return quotes
    # A quote is escaped when an odd run of backslashes ends just before it.
    run_starts = backslashes[np.concatenate(([True], np.diff(backslashes) != 1))]
    before = quotes - 1
    inside_run = np.isin(before, backslashes)
    start_of_run = run_starts[np.searchsorted(run_starts, before, side="right") - 1]
    run_length = np.where(inside_run, before - start_of_run + 1, 0)
    return quotes[run_length % 2 == 0]


class Structure:
    """The brackets, colons and commas of a JSON text outside its strings, with their depths.

    Parameters
    ----------
    data
        The JSON bytes.
    end
        Scan only ``data[:end]`` (the text before a byte of interest).
    """

    def __init__(self, data: bytes, end: int | None = None) -> None:
        raw = np.frombuffer(data, dtype=np.uint8, count=len(data) if end is None else end)
        self.data = data
        self.quotes = _real_quotes(raw)
        candidates = np.flatnonzero(_STRUCTURAL[raw])
        outside = (np.searchsorted(self.quotes, candidates) % 2) == 0
        self.positions = candidates[outside]
        self.tokens = raw[self.positions]
        step = np.zeros(self.tokens.shape, dtype=np.int64)
        step[np.isin(self.tokens, list(_OPENS))] = 1
        step[np.isin(self.tokens, list(_CLOSES))] = -1
        self.opens = step == 1
        #: Depth just after each token (an opening bracket counts itself).
        self.depth = np.cumsum(step)

    def in_string(self, offset: int) -> bool:
        """Whether the byte at ``offset`` lies inside a string (quotes included)."""
        return bool(np.searchsorted(self.quotes, offset, side="right") % 2 == 1)

    def too_deep(self, limit: int) -> int | None:
        """Offset of the first bracket that opens deeper than ``limit`` levels, or ``None``."""
        deep = np.flatnonzero(self.depth > limit)
        return int(self.positions[deep[0]]) if deep.size else None

    def _key_before(self, colon: int) -> str:
        """The key whose colon is at byte ``colon``."""
        close = int(np.searchsorted(self.quotes, colon)) - 1
        first, last = int(self.quotes[close - 1]), int(self.quotes[close])
        return str(json.loads(self.data[first : last + 1]))

    def path_at(self, offset: int) -> str:
        """The field path of the value at byte ``offset`` (``shafts[0].segments[3].length``)."""
        count = int(np.searchsorted(self.positions, offset))
        depth, tokens = self.depth[:count], self.tokens[:count]
        parts: list[str] = []
        start = 0
        level_now = int(depth[-1]) if count else 0
        for level in range(1, level_now + 1):
            # The container open at this level: the last opening bracket reaching it.
            opening = np.flatnonzero(self.opens[start:count] & (depth[start:] == level))
            if opening.size == 0:
                break
            start += int(opening[-1])
            inside = slice(start + 1, count)
            at_level = depth[inside] == level
            if tokens[start] == ord("{"):
                colons = np.flatnonzero(at_level & (tokens[inside] == ord(":")))
                if colons.size == 0:
                    break
                key = self._key_before(int(self.positions[start + 1 + int(colons[-1])]))
                parts.append(f".{path_key(key)}" if parts else path_key(key))
            else:
                commas = np.count_nonzero(at_level & (tokens[inside] == ord(",")))
                parts.append(f"[{commas}]")
        return "".join(parts)


def check_number_digits(data: bytes) -> None:
    """Raise :class:`InputError` at the first number of more than the allowed digits."""
    merged = data.translate(_DIGITS, _NUMBER_PUNCTUATION)
    if merged.find(b"1" * (MAX_NUMBER_DIGITS + 1)) < 0:
        return  # the common case: one pass in C, no number is that long
    structure: Structure | None = None
    for match in _LONG_RUN.finditer(data):
        digits = sum(1 for byte in match.group() if 0x30 <= byte <= 0x39)
        if digits <= MAX_NUMBER_DIGITS:
            continue
        structure = structure or Structure(data)
        if structure.in_string(match.start()):
            continue
        msg = f"a number of {digits:,} digits; numbers may have at most {MAX_NUMBER_DIGITS}"
        raise InputError(structure.path_at(match.start()), msg)


def out_of_range(data: bytes) -> InputError | None:
    """The error for the first number outside strings too large for a double, if there is one."""
    structure: Structure | None = None
    for match in _EXPONENT.finditer(data):
        if math.isfinite(float(match.group())):
            continue
        structure = structure or Structure(data)
        if not structure.in_string(match.start()):
            msg = f"must be a finite number: {match.group().decode()} is out of range"
            return InputError(structure.path_at(match.start()), msg)
    return None


def check_depth(data: bytes) -> None:
    """Raise :class:`InputError` where arrays and objects nest deeper than allowed."""
    structure = Structure(data)
    offset = structure.too_deep(MAX_DEPTH)
    if offset is not None:
        msg = f"nested deeper than {MAX_DEPTH} levels of lists and objects"
        raise InputError(Structure(data, offset).path_at(offset), msg)


def syntax_error(data: bytes, offset: int, reason: str, source: str) -> InputError:
    """The error for JSON that does not parse at byte ``offset``.

    A ``NaN`` or ``Infinity`` literal (accepted by some JSON writers) is named by its field as a
    number that is not finite.
    """
    for start in (offset - 1, offset):
        for literal in _NON_FINITE:
            if start >= 0 and data.startswith(literal, start):
                path = Structure(data, start).path_at(start)
                return InputError(path, f"must be a finite number, not {literal.decode()}")
    line = data.count(b"\n", 0, offset) + 1
    column = offset - (data.rfind(b"\n", 0, offset) + 1) + 1
    return InputError(source, f"not valid JSON: {reason} (line {line}, column {column})")


class _Repeated(dict[str, Any]):
    """An object of the document one of whose keys appeared twice."""

    repeated = ""


def _keep_pairs(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    result = dict(pairs)
    if len(result) == len(pairs):
        return result
    seen: set[str] = set()
    marked = _Repeated(result)
    for name, _ in pairs:
        if name in seen:
            marked.repeated = name
            break
        seen.add(name)
    return marked


def _first_repeated(node: Any, path: str) -> str | None:
    if isinstance(node, _Repeated):
        return f"{path}.{path_key(node.repeated)}" if path else path_key(node.repeated)
    children: Any = ()
    if isinstance(node, dict):
        children = ((f"{path}.{path_key(k)}" if path else path_key(k), v) for k, v in node.items())
    elif isinstance(node, list):
        children = ((f"{path}[{n}]", v) for n, v in enumerate(node))
    for child_path, child in children:
        found = _first_repeated(child, child_path)
        if found is not None:
            return found
    return None


def repeated_key(data: bytes) -> str | None:
    """The path of the first key an object of the document holds twice, or ``None``.

    The exact, slow pass (the standard library's parser, every object's keys compared); run only
    when the fast count says keys went missing.
    """
    document = json.loads(data, object_pairs_hook=_keep_pairs)
    return _first_repeated(document, "")
