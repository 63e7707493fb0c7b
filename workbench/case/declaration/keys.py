"""Building blocks of the case-file declaration: the limits, one key's metadata, alternatives.

Every key of a case file is a field of a :class:`Keys` struct (msgspec), annotated
``Annotated[<type>, key(description, quantity, bounds...)]``. The metadata sits in the
``msgspec.Meta`` of the annotation: msgspec checks the bounds while decoding; the loader, the
saver, the JSON Schema, the panel and the README's key reference read the rest (quantity,
default, when a key is always written, the words of a bound) from the same object, at the time
they need it, so that a change in one place reaches all of them.

An optional key defaults to ``UNSET`` (msgspec leaves it out when writing), so a decoded case
holds exactly the keys its file held; the value the key stands for when it is left out is its
declared ``default``. ``null`` is the same as leaving an optional key out.
"""

import functools
import math
import types
import typing
from collections.abc import Callable, Iterator, Mapping
from typing import Annotated, Any

import msgspec

# --- limits: every input is bounded (one constant each) -------------------------------------

#: Largest case file read (bytes): 256 MB.
MAX_FILE_BYTES = 256_000_000
#: Deepest nesting of JSON arrays and objects in a case document.
MAX_DEPTH = 32
#: Longest string value or key (characters).
MAX_STRING_LENGTH = 1_000
#: Longest unit string (characters): unit strings go to a parser.
MAX_UNIT_LENGTH = 100
#: Most digits in one number of a case file.
MAX_NUMBER_DIGITS = 40
#: Most segments in one case (all shafts together).
MAX_SEGMENTS = 2_000_000
#: Most load cases in one case (and most combinations).
MAX_LOAD_CASES = 10_000
#: Most entries of any other list (supports, gears, torques, layers, walls, ...).
MAX_ITEMS = 2_000_000
#: Most elements the vibration analysis cuts one segment into.
MAX_MODAL_ELEMENTS = 1_000
#: Two positions on one shaft closer than this fraction of its length are the same point; each
#: segment must be longer than twice it, so that its ends stay apart.
POSITION_TOLERANCE = 1e-9

#: The quantities a number may be measured in (each has a unit in a case's ``units``).
QUANTITIES: tuple[str, ...] = (
    "length",
    "area",
    "torque",
    "stress",
    "angle",
    "stiffness",
    "distributed_torque",
    "twist_rate",
    "power",
    "speed",
    "density",
    "inertia",
)


#: A name: of a shaft, a material, a load case, ...
Name = Annotated[str, msgspec.Meta(min_length=1, max_length=MAX_STRING_LENGTH)]
#: Free text (a title, a source, a description).
Text = Annotated[str, msgspec.Meta(max_length=MAX_STRING_LENGTH)]
#: A unit string, for a parser: shorter.
UnitText = Annotated[str, msgspec.Meta(max_length=MAX_UNIT_LENGTH)]


#: How many times a key of a case object has been set in this process (see :func:`edit_count`).
_EDITS = [0]


class Keys(msgspec.Struct, forbid_unknown_fields=True, gc=False):
    """Base of every object of a case file: unknown keys are refused.

    ``gc=False``: decoded case data never holds reference cycles, and a million segments are
    then not tracked by the cyclic garbage collector.

    Setting a key counts an edit (:func:`edit_count`); decoding and constructing do not set
    keys one by one and count nothing.
    """

    def __setattr__(self, name: str, value: Any) -> None:
        _EDITS[0] += 1
        super().__setattr__(name, value)


def edit_count() -> int:
    """How many keys of case objects have been set in this process, of any case.

    What is taken from a decoded case and kept beside it (its segments' columns,
    :mod:`workbench.case.segment_keys`) records this count, and is not used once it has moved:
    an edit anywhere may have changed the case it was taken from.
    """
    return _EDITS[0]


def key(
    description: str,
    quantity: str | None = None,
    *,
    default: Any = msgspec.NODEFAULT,
    always: bool = False,
    expect: str | None = None,
    choices: tuple[float, ...] | None = None,
    whole: bool = False,
    **bounds: Any,
) -> msgspec.Meta:
    """The metadata of one key.

    Parameters
    ----------
    description
        One line saying what the key is.
    quantity
        What the number is measured in (one of :data:`QUANTITIES`), which gives its unit; ``None``
        for dimensionless numbers, text and flags.
    default
        The value an optional key stands for when it is left out (``UNSET``).
    always
        Write the key even when it holds its default (the saver leaves defaults out otherwise).
    expect
        Words for what the value must be, used in messages instead of the bounds
        (``"a fraction from 0 up to (not including) 1"``).
    choices
        The only numbers allowed (a table's rows); checked by the model, shown in the schema.
    whole
        A whole number (written as an integer in the schema; ``8.0`` is accepted).
    **bounds
        ``gt``, ``ge``, ``lt``, ``le``, ``min_length``, ``max_length``, ``multiple_of`` as
        :class:`msgspec.Meta` takes them (numbers in the file's units).
    """
    if quantity is not None and quantity not in QUANTITIES:
        msg = f"unknown quantity {quantity!r}"
        raise ValueError(msg)
    extra: dict[str, Any] = {"quantity": quantity}
    schema: dict[str, Any] = {}
    if default is not msgspec.NODEFAULT:
        extra["default"] = default
        schema["default"] = default
    if always:
        extra["always"] = True
    if expect is not None:
        extra["expect"] = expect
    if choices is not None:
        extra["choices"] = choices
        schema["enum"] = list(choices)
    if whole:
        bounds.setdefault("multiple_of", 1)
        schema["type"] = "integer"
    return msgspec.Meta(
        description=description, extra=extra, extra_json_schema=schema or None, **bounds
    )


#: The shaft a support, gear, load or disc sits on, and where along it (x = 0 at its start).
ShaftId = Annotated[Name, key("Id of the shaft")]
Position = Annotated[float, key("Position along the shaft", "length")]


def given(value: Any) -> bool:
    """Whether an optional key holds a value (neither left out nor ``null``)."""
    return value is not msgspec.UNSET and value is not None


# --- alternatives: "either these keys or those" ---------------------------------------------


class Alternatives:
    """Groups of keys of one object of which one group (or at most one) is given.

    Parameters
    ----------
    groups
        The groups, e.g. ``(("material", "section"), ("layers",))``.
    required
        ``True``: exactly one group must be given; ``False``: at most one.

    Notes
    -----
    A message names a key: when two groups are given, the first key of the first group for an
    exactly-one choice ("give either extremes or ..."), the first key of the later group for an
    at-most-one choice (the key added on top); a group given in part names its missing key; no
    group at all names the first key of the first group.
    """

    __slots__ = ("_names", "_valid", "groups", "required")

    def __init__(self, groups: tuple[tuple[str, ...], ...], required: bool = True) -> None:
        self.groups, self.required = groups, required
        self._names = tuple(name for group in groups for name in group)
        # Presence of the keys as bits, in the order of `_names`; the valid patterns are "one
        # whole group" (and "none" when no group is required): checked first, for speed.
        valid, bit = set(), 1
        for group in groups:
            valid.add(((1 << len(group)) - 1) * bit)
            bit <<= len(group)
        if not required:
            valid.add(0)
        self._valid = frozenset(valid)

    def words(self) -> str:
        """``"material and section, or layers"``."""
        return ", or ".join(" and ".join(group) for group in self.groups)

    def problem(self, entry: Any) -> tuple[str, str] | None:
        """(key, message) of what is wrong with ``entry``'s choice, or ``None``."""
        present = [[name for name in group if given(getattr(entry, name))] for group in self.groups]
        touched = [number for number, names in enumerate(present) if names]
        if len(touched) > 1:
            blamed = touched[0] if self.required else touched[1]
            return present[blamed][0], f"give either {self.words()}, not both"
        if not touched:
            if not self.required:
                return None
            others = ", or ".join(" and ".join(group) for group in self.groups[1:])
            return self.groups[0][0], f"is required (or give {others})"
        group, names = self.groups[touched[0]], present[touched[0]]
        missing = [name for name in group if name not in names]
        if missing:
            return missing[0], f"is required with {names[0]}"
        return None

    def check(self, entry: Any) -> None:
        """Raise ``ValueError("key: message")`` (msgspec adds the object's path)."""
        present, bit = 0, 1
        for name in self._names:
            value = getattr(entry, name)
            if value is not msgspec.UNSET and value is not None:
                present |= bit
            bit <<= 1
        if present in self._valid:
            return
        problem = self.problem(entry)
        if problem is not None:
            msg = f"{problem[0]}: {problem[1]}"
            raise ValueError(msg)


# --- spans: "this key lies beyond that one" --------------------------------------------------


def _plain(value: float) -> str:
    return f"{value:g}"


class Span:
    """Two positions of one object that bound a stretch of a shaft: ``end`` lies beyond ``start``.

    Parameters
    ----------
    start, end
        The names of the two keys (numbers of one quantity, so comparable in the file's units).

    Notes
    -----
    A value that is not finite is left to the checks that name it (every number is checked
    finite after its conversion to SI); the span judges finite numbers only.
    """

    __slots__ = ("end", "start")

    def __init__(self, start: str, end: str) -> None:
        self.start, self.end = start, end

    def words(self) -> str:
        """``"end must be greater than start"``."""
        return f"{self.end} must be greater than {self.start}"

    def problem(
        self, start: float, end: float, show: Callable[[float], str] = _plain
    ) -> str | None:
        """Why ``end`` does not lie beyond ``start`` (``show`` writes a value), or ``None``."""
        if not (math.isfinite(start) and math.isfinite(end)) or end > start:
            return None
        return f"must be greater than {self.start} ({show(end)} ≤ {show(start)})"

    def check(self, entry: Any) -> None:
        """Raise ``ValueError("end: message")`` (msgspec adds the object's path)."""
        problem = self.problem(getattr(entry, self.start), getattr(entry, self.end))
        if problem is not None:
            msg = f"{self.end}: {problem}"
            raise ValueError(msg)


# --- reading the declaration ----------------------------------------------------------------


@functools.cache
def _annotations(cls: type) -> dict[str, Any]:
    return typing.get_type_hints(cls, include_extras=True)


def _meta_of(annotation: Any) -> msgspec.Meta | None:
    """The first :class:`msgspec.Meta` with a description inside an annotation, or ``None``."""
    if typing.get_origin(annotation) is typing.Annotated:
        for item in annotation.__metadata__:
            if isinstance(item, msgspec.Meta) and item.description:
                return item
        return _meta_of(typing.get_args(annotation)[0])
    for argument in typing.get_args(annotation):
        meta = _meta_of(argument)
        if meta is not None:
            return meta
    return None


@functools.cache
def field_metas(cls: type) -> dict[str, msgspec.Meta | None]:
    """Each field of a struct and its key metadata (the live objects of the declaration)."""
    hints = _annotations(cls)
    return {name: _meta_of(hints[name]) for name in cls.__struct_fields__}  # type: ignore[attr-defined]


def field_type(cls: type, name: str) -> Any:
    """The declared annotation of a field (with its ``Annotated`` metadata)."""
    return _annotations(cls)[name]


def extra_of(cls: type, name: str) -> Mapping[str, Any]:
    """The ``extra`` metadata of a field (empty for a field without key metadata)."""
    meta = field_metas(cls).get(name)
    return meta.extra if meta is not None and meta.extra is not None else {}


def quantity_of(cls: type, name: str) -> str | None:
    """The quantity a field is measured in, or ``None``."""
    quantity: str | None = extra_of(cls, name).get("quantity")
    return quantity


def default_of(cls: type, name: str) -> Any:
    """What an optional field stands for when left out (``None`` when nothing is declared)."""
    return extra_of(cls, name).get("default")


def value_of(entry: Any, name: str) -> Any:
    """A field's value, or its declared default when it is left out or ``null``."""
    value = getattr(entry, name)
    return value if given(value) else default_of(type(entry), name)


def structs_in(annotation: Any) -> Iterator[type]:
    """Every :class:`Keys` struct an annotation holds (inside lists, dicts, unions)."""
    if isinstance(annotation, type) and issubclass(annotation, Keys):
        yield annotation
        return
    for argument in typing.get_args(annotation):
        yield from structs_in(argument)


class Unwrapped:
    """A declared annotation unwrapped: its base types (no null, no ``UNSET``) and all its metadata."""

    def __init__(self, annotation: Any) -> None:
        self.metas: list[msgspec.Meta] = []
        self.bases: list[Any] = []
        self._unwrap(annotation)

    def _unwrap(self, annotation: Any) -> None:
        if typing.get_origin(annotation) is typing.Annotated:
            self.metas.extend(m for m in annotation.__metadata__ if isinstance(m, msgspec.Meta))
            self._unwrap(typing.get_args(annotation)[0])
        elif typing.get_origin(annotation) in (typing.Union, types.UnionType):
            for member in typing.get_args(annotation):
                self._unwrap(member)
        elif annotation not in (type(None), msgspec.UnsetType):
            self.bases.append(annotation)

    def bound(self, name: str) -> Any:
        """A bound (``gt``, ``max_length``, ...) of the key, or ``None``."""
        for meta in self.metas:
            value = getattr(meta, name, None)
            if value is not None:
                return value
        return None

    def extra(self, name: str) -> Any:
        """An item of the key's ``extra`` metadata, or ``None``."""
        for meta in self.metas:
            if meta.extra and name in meta.extra:
                return meta.extra[name]
        return None

    def structs(self) -> list[type[Keys]]:
        """The structs among the bases."""
        return [b for b in self.bases if isinstance(b, type) and issubclass(b, Keys)]

    def struct_for(self, value: Any) -> type[Keys] | None:
        """The struct among the bases that describes ``value`` (by its tag, for a union)."""
        structs = self.structs()
        if len(structs) == 1:
            return structs[0]
        for struct in structs:
            config = struct.__struct_config__
            if isinstance(value, dict) and value.get(config.tag_field) == config.tag:
                return struct
        return None

    def tags(self, name: str) -> tuple[str, ...]:
        """The tags of a union of structs told apart by the key ``name`` (empty otherwise)."""
        configs = [struct.__struct_config__ for struct in self.structs()]
        if len(configs) < 2 or any(config.tag_field != name for config in configs):
            return ()
        return tuple(str(config.tag) for config in configs)
