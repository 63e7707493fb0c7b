r"""Case files in: bytes, or plain JSON values, to a validated :class:`CaseFile` in the file's units.

Everything the declaration states is checked here — types, bounds, unknown keys, alternatives —
and every input is bounded: the file's size, its nesting, the digits of its numbers, the length
of its strings and lists. A key given twice in one object is an error (JSON parsers keep the
last one silently). Each failure is one :class:`InputError` naming the field by its path.

How a key given twice is found cheaply: every key of the file is a field of the decoded case
(optional keys left out stay ``UNSET`` and are not written back), so the file and the case
written back hold the same number of keys, hence of colons outside strings, and the colons
inside strings are the same text in both. A count that differs (or a colon written as a ``\u003a`` escape,
which could hide one) sends the file to the exact, slower pass that names the key.
"""

from __future__ import annotations

import numbers
import operator
import os
import re
from pathlib import Path
from typing import Any

import msgspec
import numpy as np

from workbench.case.declaration import MAX_FILE_BYTES, MAX_SEGMENTS, CaseFile, Segment
from workbench.case.errors import InputError
from workbench.case.segment_keys import take_segment_keys
from workbench.case.text import (
    check_depth,
    check_number_digits,
    out_of_range,
    repeated_key,
    syntax_error,
)

_DECODER = msgspec.json.Decoder(CaseFile)
_MATERIAL = operator.attrgetter("material")
_SECTION = operator.attrgetter("section")
_LAYERS = operator.attrgetter("layers")
_ENCODER = msgspec.json.Encoder()
_BYTE = re.compile(r"\(byte (\d+)\)")
#: A colon written as an escape inside a string: it could hide a key given twice from the count.
_ESCAPED_COLON = re.compile(rb"\\u003[aA]")


def read_case_bytes(path: str | os.PathLike[str]) -> bytes:
    """The bytes of a case file, refusing a file larger than the limit before reading it."""
    path = Path(path)
    try:
        with path.open("rb") as stream:
            size = os.fstat(stream.fileno()).st_size
            _check_size(size, str(path))
            data = stream.read(MAX_FILE_BYTES + 1)
    except OSError as error:
        raise InputError(str(path), f"cannot read the case file: {error}") from None
    _check_size(len(data), str(path))
    return data


def _check_size(size: int, source: str) -> None:
    if size > MAX_FILE_BYTES:
        msg = (
            f"the case file holds {size / 1e6:,.0f} MB; case files may be at most "
            f"{MAX_FILE_BYTES / 1e6:,.0f} MB"
        )
        raise InputError(source, msg)


def _check_text(data: bytes, source: str) -> None:
    _check_size(len(data), source)
    if not data.isascii():
        try:
            data.decode("utf-8")
        except UnicodeDecodeError as error:
            raise InputError(source, f"cannot read the case file: {error}") from None


def _check_repeated_keys(data: bytes, written: bytes) -> None:
    """Raise when an object of ``data`` holds a key twice (``written``: the decoded data re-encoded)."""
    if data.count(b":") == written.count(b":") and not _ESCAPED_COLON.search(data):
        return
    path = repeated_key(data)
    if path is not None:
        raise InputError(path, "given twice in one object; each key may appear once")


def decode_document(data: bytes | str, source: str = "case") -> Any:
    """Decode case-file JSON to plain values (dicts, lists, ...), within every limit.

    Parameters
    ----------
    data
        The JSON text (UTF-8 bytes or str).
    source
        What the text is (a file name), for the messages about the text as a whole.

    Raises
    ------
    InputError
        Not UTF-8, not JSON, too large, nested too deep, a number of too many digits, a key given
        twice in one object, or a number out of range.
    """
    if isinstance(data, str):
        try:
            data = data.encode("utf-8")
        except UnicodeEncodeError as error:
            raise InputError(source, f"cannot read the case file: {error}") from None
    _check_text(data, source)
    check_number_digits(data)
    check_depth(data)
    try:
        document = msgspec.json.decode(data)
    except msgspec.DecodeError as error:
        if "number out of range" in str(error).lower():
            raise out_of_range(data) or InputError(source, str(error)) from None
        found = _BYTE.search(str(error))
        offset = int(found[1]) if found else len(data)
        reason = str(error).removeprefix("JSON is malformed: ").split(" (byte")[0]
        raise syntax_error(data, offset, reason.lower(), source) from None
    except msgspec.ValidationError as error:  # a number beyond the range of a double
        raise out_of_range(data) or InputError(source, str(error)) from None
    _check_repeated_keys(data, _ENCODER.encode(document))
    return document


def decode_case_file(data: bytes, source: str = "case") -> CaseFile:
    """Decode case-file bytes into the declaration: structure, types, bounds, alternatives.

    Raises
    ------
    InputError
        On anything :func:`decode_document` refuses, or a key, value or structure the
        declaration does not allow, naming the field.
    """
    _check_text(data, source)
    try:
        case = _DECODER.decode(data)
    except msgspec.ValidationError as error:
        from workbench.case.messages import translate  # noqa: PLC0415 - only for a message

        # The plain document quotes the value; decoding it raises the text's own error first.
        raise translate(error, decode_document(data, source)) from None
    except msgspec.DecodeError as error:
        decode_document(data, source)  # names the syntax error by line and column
        raise InputError(source, f"not valid JSON: {error}") from None
    check_segment_alternatives(case)
    return case


def check_case_bytes(data: bytes, case: CaseFile) -> None:
    """The checks of a decoded file that its types cannot make: digits, keys twice, totals."""
    check_number_digits(data)
    _check_repeated_keys(data, _ENCODER.encode(case))
    _check_totals(case)


def case_file_from_bytes(data: bytes, source: str = "case") -> CaseFile:
    """Decode and validate case-file bytes (:func:`decode_case_file`, :func:`check_case_bytes`).

    Raises
    ------
    InputError
        On any limit, structure or value the declaration does not allow, naming the field.
    """
    case = decode_case_file(data, source)
    check_case_bytes(data, case)
    return case


def _other_number(node: Any) -> bool:
    """Whether ``node`` is a number of another type than ``int``/``float``/``bool`` (numpy)."""
    return isinstance(node, numbers.Number) and type(node) not in (int, float, bool)


def _holds_other_numbers(node: Any) -> bool:
    if isinstance(node, dict):
        return any(_holds_other_numbers(value) for value in node.values())
    if isinstance(node, list | tuple):
        return any(_holds_other_numbers(value) for value in node)
    return _other_number(node)


def _plain_numbers(node: Any) -> Any:
    """``node`` with numbers of other types as Python numbers (``item()`` of a numpy scalar)."""
    if isinstance(node, dict):
        return {name: _plain_numbers(value) for name, value in node.items()}
    if isinstance(node, list | tuple):
        return [_plain_numbers(value) for value in node]
    if _other_number(node):
        return node.item() if hasattr(node, "item") else float(node)
    return node


def case_file_from_document(document: Any) -> CaseFile:
    """Validate a decoded case document (plain JSON values) against the declaration.

    Numbers of other types than ``int`` and ``float`` (numpy scalars a program put in the
    document) are read as the numbers they are.
    """
    try:
        case = msgspec.convert(document, CaseFile)
    except msgspec.ValidationError as error:
        from workbench.case.messages import translate  # noqa: PLC0415 - only for a message

        if not _holds_other_numbers(document):
            raise translate(error, document) from None
        document = _plain_numbers(document)
        try:
            case = msgspec.convert(document, CaseFile)
        except msgspec.ValidationError as again:
            raise translate(again, document) from None
    check_segment_alternatives(case)
    _check_totals(case)
    return case


def check_segment_alternatives(case: CaseFile) -> None:
    """Raise on the first segment that gives neither or both of its alternatives.

    Checked on whole lists of segments, in C, rather than by each segment as it is decoded:
    the segments' keys are taken as columns once (:func:`~workbench.case.segment_keys.take_segment_keys`,
    kept with the case for the solver), and they show the common case, every segment one material
    and a section and no layers. Otherwise the first segment in error gets the message of the
    declared :attr:`Segment.alternatives <workbench.case.declaration.Segment>` under its field
    path.

    Raises
    ------
    InputError
        ``shafts[0].segments[3].material: give either material and section, or layers, not
        both`` and the like.
    """
    taken = take_segment_keys(case)
    for number, (shaft, keys) in enumerate(zip(case.shafts, taken, strict=True)):
        if keys.sections_complete():
            continue  # every segment a material and a section: the common case
        segments = shaft.segments
        count = len(segments)
        # A given material is a name and a given list of layers is not empty (both declared
        # so) and a section is an object: "given" is truth (null and UNSET are false).
        material, section, layers = (
            np.fromiter(map(bool, map(read, segments)), bool, count)
            for read in (_MATERIAL, _SECTION, _LAYERS)
        )
        wrong = ~((material & section & ~layers) | (~material & ~section & layers))
        if wrong.any():
            row = int(np.argmax(wrong))
            problem = Segment.alternatives.problem(segments[row])
            if problem is not None:
                field, message = problem
                raise InputError(f"shafts[{number}].segments[{row}].{field}", message)


def load_case_file(path: str | os.PathLike[str]) -> CaseFile:
    """Read, decode and validate a case file."""
    return case_file_from_bytes(read_case_bytes(path), str(path))


def _check_totals(case: CaseFile) -> None:
    total = sum(len(shaft.segments) for shaft in case.shafts)
    if total > MAX_SEGMENTS:
        msg = f"the case holds {total:,} segments; a case may hold at most {MAX_SEGMENTS:,}"
        raise InputError("shafts", msg)
