"""msgspec's validation errors as our one-line messages, naming the field by its path.

msgspec reports ``Expected `float` > 0.0 - at `$.shafts[0].segments[1].length```. This module
finds the key in the declaration and the value in the document and says it the way every message
of the program does: ``shafts[0].segments[1].length: must be greater than zero (-5 mm)``.
"""

from __future__ import annotations

import math
import re
import typing
from typing import Any

import msgspec

from workbench.case.declaration import CaseFile, Keys, Span, Unwrapped, field_type, quantity_of
from workbench.case.errors import InputError, path_key, quoted

#: msgspec's report: what is wrong, then where: `` - at `$.a[0].b``` or, for a dict's key,
#: `` - at `key` in `$.a```.
_REPORT = re.compile(
    r"""^(?P<what>.*?)
    (?:\ -\ at\ `(?P<key>key)`\ in\ `(?P<keyed>[^`]*)`
    |\ -\ at\ `(?P<path>[^`]*)`)?$""",
    re.S | re.X,
)
_STEP = re.compile(r"\.([A-Za-z_][A-Za-z_0-9]*)|\[(\d+)\]|\[\.\.\.\]")
_TYPE_ONLY = re.compile(r"Expected `[^`]*`(?:, got `[^`]*`)?")


def _words(declared: Unwrapped) -> str:
    """What a key must be, in words (``"a number"``, ``"one of fixed, spring"``)."""
    parts = []
    for base in declared.bases:
        origin = typing.get_origin(base) or base
        if origin is typing.Literal:
            parts.append("one of " + ", ".join(str(v) for v in typing.get_args(base)))
        elif base is bool:
            parts.append("true or false")
        elif base in (int, float):
            parts.append("a number")
        elif base is str:
            parts.append("a string")
        elif origin is list:
            parts.append("a list")
        else:
            parts.append("an object")
    return " or ".join(dict.fromkeys(parts))


def kind_of(value: Any) -> str:
    """A few words naming the JSON kind of ``value`` ("a list", "null", "25.4")."""
    names = {dict: "an object", list: "a list", str: "a string", bool: "true/false"}
    if value is None:
        return "null"
    return names.get(type(value), quoted(value))


def _unit(document: Any, quantity: str | None) -> str:
    """The unit label of a quantity in the document's units ("" when it has none)."""
    if quantity is None:
        return ""
    from workbench.case.units import UnitSystem  # noqa: PLC0415 - only for a message

    units = document.get("units") if isinstance(document, dict) else None
    try:
        system = UnitSystem(**units) if isinstance(units, dict) else UnitSystem()
    except (InputError, TypeError):
        return ""
    return f" {system.label(quantity)}"


def _number(value: float) -> str:
    return f"{value:g}"


def bound_message(declared: Unwrapped, value: Any, document: Any) -> str:
    """Why a number is outside its declared bounds (or not finite), in words."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if not math.isfinite(value):
            return f"must be a finite number, not {value}"
        expect = declared.extra("expect")
        if expect:
            return f"must be {expect}, not {_number(value)}"
        if declared.bound("multiple_of") == 1 and not float(value).is_integer():
            return f"must be a whole number, not {_number(value)}"
        shown = f"{_number(value)}{_unit(document, declared.extra('quantity'))}"
        gt, ge, lt, le = (declared.bound(name) for name in ("gt", "ge", "lt", "le"))
        if (gt, ge, lt, le) == (0, None, None, None):
            return f"must be greater than zero ({shown})"
        if (gt, ge, lt, le) == (None, 0, None, None):
            return f"must not be negative ({shown})"
        if ge is not None and le is not None:
            return f"must lie between {_number(ge)} and {_number(le)}, not {shown}"
        limits = [f"greater than {_number(gt)}" if gt is not None else ""]
        limits += [f"at least {_number(ge)}" if ge is not None else ""]
        limits += [f"less than {_number(lt)}" if lt is not None else ""]
        limits += [f"at most {_number(le)}" if le is not None else ""]
        return f"must be {' and '.join(part for part in limits if part)}, not {shown}"
    size = len(value) if isinstance(value, (str, list, dict)) else 0
    least, most = declared.bound("min_length"), declared.bound("max_length")
    expect = declared.extra("expect")
    if expect:
        return f"must be {expect}, not {kind_of(value) if not isinstance(value, list) else quoted(value)}"
    if isinstance(value, str):
        if least is not None and size < least:
            return "must not be empty"
        return f"must be at most {most:,} characters long, not {size:,}"
    if least is not None and size < least:
        return f"must hold at least {least:,} {'entry' if least == 1 else 'entries'}, not {size:,}"
    return f"must hold at most {most:,} entries, not {size:,}"


class _Walk:
    """The document and the declaration followed together along an error's path."""

    def __init__(self, document: Any) -> None:
        self.document = document
        self.value: Any = document
        self.declared = Unwrapped(CaseFile)
        self.parts: list[str] = []
        self.found = True

    def path(self, *more: str) -> str:
        text = ""
        for part in [*self.parts, *more]:
            text += part if part.startswith("[") or not text else f".{part}"
        return text

    def struct(self) -> type[Keys] | None:
        return self.declared.struct_for(self.value)

    def step_key(self, name: str) -> None:
        struct = self.struct()
        tags = self.declared.tags(name)
        self.parts.append(path_key(name))
        self.value = self.value.get(name) if isinstance(self.value, dict) else None
        if tags:
            self.declared = Unwrapped(typing.Literal[tags])
            return
        if struct is None or name not in struct.__struct_fields__:
            self.found = False
            return
        self.declared = Unwrapped(field_type(struct, name))

    def step_index(self, index: int) -> None:
        self.parts.append(f"[{index}]")
        self.value = self.value[index] if isinstance(self.value, list) else None
        self._inner(0)

    def step_dict_value(self) -> None:
        """Step into the first value of a dict that does not convert to its declared type."""
        inner = self._inner(1)
        if not isinstance(self.value, dict):
            self.found = False
            return
        for name, item in self.value.items():
            try:
                msgspec.convert(item, inner)
            except msgspec.ValidationError:
                self.parts.append(path_key(str(name)))
                self.value = item
                return
        self.found = False

    def _inner(self, position: int) -> Any:
        containers = [b for b in self.declared.bases if typing.get_origin(b) in (list, dict)]
        if not containers:
            self.found = False
            return Any
        inner = typing.get_args(containers[0])[position]
        self.declared = Unwrapped(inner)
        return inner


def _expected_keys(struct: type[Keys]) -> str:
    names = list(struct.__struct_fields__)
    tag_field = struct.__struct_config__.tag_field
    if tag_field:
        names.insert(0, tag_field)
    return ", ".join(sorted(names))


def translate(error: msgspec.ValidationError, document: Any) -> InputError:
    """Our :class:`InputError` for a msgspec validation error of ``document``.

    Parameters
    ----------
    error
        The error msgspec raised decoding or converting ``document`` to :class:`CaseFile`.
    document
        The same document as plain JSON values, to quote the offending value.
    """
    report = _REPORT.match(str(error))
    assert report is not None  # the pattern matches any text
    what = report["what"]
    walk = _Walk(document)
    for step in _STEP.finditer((report["path"] or report["keyed"] or "$")[1:]):
        if step[1] is not None:
            walk.step_key(step[1])
        elif step[2] is not None:
            walk.step_index(int(step[2]))
        else:
            walk.step_dict_value()
    if report["key"]:
        return _bad_dict_key(walk, what)
    return _message(walk, what, document)


def _bad_dict_key(walk: _Walk, what: str) -> InputError:
    names = list(walk.value) if isinstance(walk.value, dict) else []
    key_type = Unwrapped(typing.get_args(walk.declared.bases[0])[0]) if walk.found else None
    for name in names:
        if not isinstance(name, str) or (key_type and not _fits(name, key_type)):
            bad = Unwrapped(str) if key_type is None else key_type
            return InputError(
                walk.path(path_key(str(name))), "name " + bound_message(bad, name, None)
            )
    return InputError(walk.path(), what)


def _fits(name: str, declared: Unwrapped) -> bool:
    least, most = declared.bound("min_length") or 0, declared.bound("max_length")
    return least <= len(name) and (most is None or len(name) <= most)


def _message(walk: _Walk, what: str, document: Any) -> InputError:
    value = walk.value
    if what.startswith("Object contains unknown field"):
        name = _quoted_name(what)
        struct = walk.struct()
        expected = f" (expected: {_expected_keys(struct)})" if struct else ""
        return InputError(walk.path(path_key(name)), f"unknown key{expected}")
    if what.startswith("Object missing required field"):
        return InputError(walk.path(path_key(_quoted_name(what))), "is required")
    own = re.match(r"^([a-z_]+): (.*)$", what, re.S)
    struct = walk.struct()
    if own and struct is not None and own[1] in struct.__struct_fields__:
        # A message of the declaration's own (alternatives, spans); a span's quotes its units.
        span = getattr(struct, "span", None)
        if isinstance(span, Span) and own[1] == span.end and isinstance(value, dict):
            unit = _unit(document, quantity_of(struct, span.end))
            quoted = span.problem(
                value[span.start], value[span.end], lambda v: f"{_number(v)}{unit}"
            )
            return InputError(walk.path(own[1]), quoted or own[2])
        return InputError(walk.path(own[1]), own[2])
    if not walk.parts and not isinstance(value, dict):
        return InputError("", f"a case file must be a JSON object, not {kind_of(value)}")
    if what.startswith(("Number out of range", "Integer value out of range")):
        return InputError(walk.path(), "must be a finite number: this one is out of range")
    if value is None and walk.found:
        return InputError(walk.path(), "is required")
    if what.startswith("Invalid enum value") or what.startswith("Invalid value"):
        return InputError(walk.path(), _unknown_name(walk, value))
    if _TYPE_ONLY.fullmatch(what):
        return InputError(walk.path(), f"must be {_words(walk.declared)}, not {kind_of(value)}")
    if what.startswith("Expected") and walk.found:
        return InputError(walk.path(), bound_message(walk.declared, value, document))
    return InputError(walk.path(), what)


def _quoted_name(what: str) -> str:
    """The name msgspec quotes in backticks (the name may hold backticks itself)."""
    return what[what.index("`") + 1 : what.rindex("`")]


def _unknown_name(walk: _Walk, value: Any) -> str:
    field = walk.parts[-1] if walk.parts else "value"
    choices = [
        str(choice)
        for base in walk.declared.bases
        if typing.get_origin(base) is typing.Literal
        for choice in typing.get_args(base)
    ]
    words = field.replace("_", " ").split()[-1]
    return f"unknown {words} {quoted(value)}; choose one of {', '.join(choices)}"
