"""Hypothesis strategies for case files: valid ones built or taken from the fixtures, then broken.

A fuzzed case starts from a valid document — one of the committed cases, or one built here
(ungeared or geared shafts of random sections, supports, point and distributed torques) — and
takes one to three mutations at random places: a value of the wrong type, an extreme number,
a key deleted or renamed, a list entry duplicated or dropped, an empty container, a value copied
from elsewhere in the document (coincident supports, a start after its end, a name twice),
unicode and very long strings, deep nesting. The document is then written as JSON text, which may
itself be mutated: cut short, a key written twice, a byte flipped, a number of thousands of
digits, a BOM, UTF-16.
"""

from __future__ import annotations

import copy
import json
import math
from pathlib import Path
from typing import Any

from hypothesis import strategies as st

from tests.test_bad_input import VALID

ROOT = Path(__file__).resolve().parents[2]

#: The committed valid cases the mutations start from.
STARTING_FILES = (
    ROOT / "workbench" / "cases" / "press_drive.json",
    ROOT / "tests" / "fixtures" / "solve" / "every_shape.json",
    ROOT / "tests" / "fixtures" / "solve" / "line_shaft.json",
)
STARTING_CASES: tuple[dict[str, Any], ...] = (
    *(json.loads(path.read_text(encoding="utf-8")) for path in STARTING_FILES),
    VALID,
)

#: A place in a document: the keys and indexes from its root.
Place = tuple[str | int, ...]

# --- valid documents built from parts ---------------------------------------------------------

_UNIT_SYSTEMS: tuple[tuple[dict[str, str] | None, float, float, float], ...] = (
    # (units, file units per m, per N·m, per Pa)
    (None, 1.0, 1.0, 1.0),
    ({"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"}, 1e3, 1.0, 1e-6),
    ({"length": "in", "torque": "lbf*in", "stress": "psi", "angle": "deg"}, 39.37, 8.851, 1.45e-4),
)


def _nice(value: float) -> float:
    """``value`` to four significant digits, as a person would type it."""
    return float(f"{value:.4g}")


@st.composite
def _section(draw: st.DrawFn, metre: float) -> dict[str, Any]:
    size = draw(st.floats(0.01, 0.2)) * metre
    shape = draw(st.sampled_from(["solid", "tube", "tapered", "rectangle", "box"]))
    if shape == "solid":
        return {"shape": shape, "diameter": _nice(size)}
    if shape == "tube":
        ratio = draw(st.floats(0.1, 0.9))
        return {
            "shape": shape,
            "outer_diameter": _nice(size),
            "inner_diameter": _nice(size * ratio),
        }
    if shape == "tapered":
        ratio = draw(st.floats(0.5, 1.5))
        return {"shape": shape, "diameter_start": _nice(size), "diameter_end": _nice(size * ratio)}
    if shape == "rectangle":
        ratio = draw(st.floats(0.2, 5.0))
        return {"shape": shape, "width": _nice(size), "height": _nice(size * ratio)}
    return {
        "shape": shape,
        "width": _nice(size),
        "height": _nice(size),
        "thickness": _nice(size / 20),
    }


@st.composite
def built_case(draw: st.DrawFn) -> dict[str, Any]:
    """A valid case of one to three shafts, with or without gears between them."""
    units, metre, newton_metre, pascal = draw(st.sampled_from(_UNIT_SYSTEMS))
    document: dict[str, Any] = {"title": "fuzz", "shafts": [], "supports": [], "load_cases": []}
    if units:
        document["units"] = dict(units)  # a copy: mutations must not reach the constant
    document["materials"] = {
        "steel": {
            "shear_modulus": _nice(79.3e9 * pascal),
            "yield_strength": _nice(350e6 * pascal),
            "ultimate_strength": _nice(520e6 * pascal),
        }
    }
    if draw(st.booleans()):
        document["materials"]["steel"]["density"] = 7850  # kg/m³: the vibration's inertia
    lengths = []
    for number in range(draw(st.integers(1, 3))):
        segments = [
            {
                "length": _nice(draw(st.floats(0.05, 1.0)) * metre),
                "material": "steel",
                "section": draw(_section(metre)),
            }
            for _ in range(draw(st.integers(1, 4)))
        ]
        document["shafts"].append({"id": f"s{number}", "segments": segments})
        lengths.append(sum(segment["length"] for segment in segments))
    geared = len(lengths) > 1 and draw(st.booleans())
    if geared:
        document["gears"] = [
            {
                "a": {"shaft": f"s{number}", "x": lengths[number], "radius": _nice(0.05 * metre)},
                "b": {"shaft": f"s{number + 1}", "x": 0, "radius": _nice(0.08 * metre)},
                "mesh": draw(st.sampled_from(["external", "internal"])),
            }
            for number in range(len(lengths) - 1)
        ]
    for number, length in enumerate(lengths):
        if geared and number > 0 and draw(st.booleans()):
            continue  # held through the gears
        fractions = draw(
            st.lists(st.sampled_from([0.0, 0.25, 0.5, 1.0]), min_size=1, max_size=3, unique=True)
        )
        for fraction in fractions:
            support: dict[str, Any] = {"shaft": f"s{number}", "x": _nice(fraction * length)}
            if draw(st.booleans()):
                support |= {
                    "kind": "spring",
                    "stiffness": _nice(draw(st.floats(1e3, 1e7)) * newton_metre),
                }
            document["supports"].append(support)
    for case in range(draw(st.integers(1, 2))):
        torques = [
            {
                "shaft": f"s{draw(st.integers(0, len(lengths) - 1))}",
                "x": _nice(draw(st.floats(0.0, 1.0)) * lengths[0]),
                "torque": _nice(draw(st.floats(-5e3, 5e3)) * newton_metre),
            }
            for _ in range(draw(st.integers(0, 3)))
        ]
        for torque in torques:
            torque["x"] = min(torque["x"], lengths[int(torque["shaft"][1:])])
        loads: dict[str, Any] = {"name": f"case {case}", "torques": torques}
        if draw(st.booleans()):
            start, end = sorted(
                draw(st.lists(st.floats(0.0, 1.0), min_size=2, max_size=2, unique=True))
            )
            if end - start > 1e-3:
                loads["distributed"] = [
                    {
                        "shaft": "s0",
                        "start": _nice(start * lengths[0]),
                        "end": _nice(end * lengths[0]),
                        "intensity_start": _nice(draw(st.floats(-1e3, 1e3)) * newton_metre / metre),
                        "intensity_end": _nice(draw(st.floats(-1e3, 1e3)) * newton_metre / metre),
                    }
                ]
        document["load_cases"].append(loads)
    if draw(st.booleans()):
        document["combinations"] = [
            {"name": "factored", "factors": {case["name"]: 1.5 for case in document["load_cases"]}}
        ]
    if draw(st.booleans()):
        document["design"] = {"factor_of_safety": 2.0, "shear_criterion": "von_mises"}
    return document


#: A valid document: one of the committed cases or a built one.
valid_documents = st.one_of(
    st.sampled_from(STARTING_CASES).map(copy.deepcopy),
    built_case(),
)

# --- values that do not belong -----------------------------------------------------------------

EXTREME_NUMBERS: tuple[Any, ...] = (
    0,
    -0.0,
    5e-324,
    -5e-324,
    1e-320,
    1e-300,
    1e-12,
    1e12,
    1e300,
    1.7e308,
    -1.7e308,
    -1,
    -1.5,
    2**53 + 1,
    2**63,
    -(2**63) - 1,
    10**39,
    10**40,
    -(10**40),
    10**41,
    math.nan,
    math.inf,
    -math.inf,
)
ODD_SCALARS: tuple[Any, ...] = (
    None,
    True,
    False,
    "",
    " ",
    "0",
    "1e400",
    "NaN",
    "\ud800",
    "\x00",
    "a\nb",
    "steel",
    "main",
    "fixed",
    "spring",
    "service",
)


def long_strings() -> st.SearchStrategy[str]:
    """Strings just past the limits and far past them (up to a million characters)."""
    return st.builds(
        lambda char, size: char * size,
        st.sampled_from(["x", "é", "字", "\U0001f527", ":", '"', "\\"]),
        st.sampled_from([61, 101, 201, 1_001, 100_000, 1_000_000]),
    )


def deep(depth: int, kind: str) -> Any:
    """A list or object nested ``depth`` levels deep."""
    value: Any = 1
    for _ in range(depth):
        value = [value] if kind == "list" else {"k": value}
    return value


odd_values: st.SearchStrategy[Any] = st.one_of(
    st.sampled_from(EXTREME_NUMBERS),
    st.sampled_from(ODD_SCALARS),
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(-(10**45), 10**45),
    st.text(max_size=30),
    long_strings(),
    st.builds(deep, st.integers(1, 40), st.sampled_from(["list", "object"])),
    st.sampled_from([[], {}, [[]], [{}], {"": None}]).map(copy.deepcopy),  # later edits stay here
)

# --- mutations of a document ---------------------------------------------------------------------


def places(node: Any, here: Place = ()) -> list[Place]:
    """Every place below ``node`` (its keys and list entries, depth first)."""
    found: list[Place] = []
    if isinstance(node, dict):
        items: Any = node.items()
    elif isinstance(node, list):
        items = enumerate(node)
    else:
        return found
    for step, value in items:
        found.append((*here, step))
        found.extend(places(value, (*here, step)))
    return found


def get_at(document: Any, place: Place) -> Any:
    """The value at ``place`` in ``document``."""
    for step in place:
        document = document[step]
    return document


def _parent(document: Any, place: Place) -> tuple[Any, str | int]:
    return get_at(document, place[:-1]), place[-1]


def _replace(document: Any, place: Place, value: Any) -> None:
    parent, step = _parent(document, place)
    parent[step] = value


def _delete(document: Any, place: Place) -> None:
    parent, step = _parent(document, place)
    del parent[step]


def _duplicate(document: Any, place: Place) -> None:
    parent, step = _parent(document, place)
    if isinstance(parent, list):
        parent.insert(int(step), copy.deepcopy(parent[step]))
    else:
        parent[f"{step}"] = copy.deepcopy(parent[step])


def _rename(document: Any, place: Place, name: str) -> None:
    parent, step = _parent(document, place)
    if isinstance(parent, dict):
        parent[name] = parent.pop(step)
    else:
        parent[step] = {name: parent[step]}


def _emptied(value: Any) -> Any:
    return [] if isinstance(value, list) else {} if isinstance(value, dict) else value


#: Factors a number is scaled by: gentle ones that keep a case valid, and extreme ones.
_FACTORS = (0.5, 2.0, 10.0, 0.1, -1.0, 0.0, 1e-300, 1e300, 1e-12, 1e12, 1 + 1e-12, 1e-320, 1e308)


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _scaled(value: float, factor: float) -> float:
    try:
        return value * factor
    except OverflowError:  # an integer times a float beyond the range of floats
        return math.copysign(math.inf, value)


@st.composite
def _one_mutation(draw: st.DrawFn, document: Any) -> str:
    """Change ``document`` in place at one random place; return what was done (for the report).

    Half the time the place is a number, changed as a number (scaled, made extreme, or copied
    from another number: coincident points, a start at its end); otherwise any place is given
    a value of the wrong kind, deleted, duplicated, renamed, emptied or copied from elsewhere.
    """
    all_places = places(document)
    if not all_places:
        return "nothing to change"
    numbers = [p for p in all_places if _is_number(get_at(document, p))]
    if numbers and draw(st.booleans()):
        place = draw(st.sampled_from(numbers))
        before = get_at(document, place)
        operation = draw(st.sampled_from(["scale", "scale", "extreme", "copy"]))
        if operation == "scale":
            factor = draw(st.sampled_from(_FACTORS))
            _replace(document, place, _scaled(before, factor))
            done = f"scale {place} by {factor}"
        elif operation == "extreme":
            value = draw(st.sampled_from(EXTREME_NUMBERS))
            _replace(document, place, value)
            done = f"set {place} to {value!r}"
        else:
            source = draw(st.sampled_from(numbers))
            _replace(document, place, get_at(document, source))
            done = f"copy {source} to {place}"
        return _marked(done, before, get_at(document, place))
    place = draw(st.sampled_from(all_places))
    before = get_at(document, place)
    operation = draw(
        st.sampled_from(["replace", "replace", "copy", "delete", "duplicate", "rename", "empty"])
    )
    if operation == "copy":
        source = draw(st.sampled_from(all_places))
        _replace(document, place, copy.deepcopy(get_at(document, source)))
        return _marked(f"copy {source} to {place}", before, get_at(document, place))
    if operation == "delete":
        _delete(document, place)
    elif operation == "duplicate":
        _duplicate(document, place)
    elif operation == "rename":
        name = draw(
            st.one_of(st.text(max_size=12), long_strings(), st.sampled_from(ODD_SCALARS[3:]))
        )
        _rename(document, place, name)
        return f"rename {place} to {short_repr(name)}"
    elif operation == "empty":
        _replace(document, place, _emptied(get_at(document, place)))
    else:
        value = draw(odd_values)
        _replace(document, place, value)
        return _marked(f"set {place} to {short_repr(value)}", before, value)
    return f"{operation} {place}"


#: The word that marks a mutation giving a number extreme for its place (tests/fuzz/open_defects.py).
EXTREME = "EXTREME"


def _marked(done: str, before: Any, after: Any) -> str:
    """``done``, marked :data:`EXTREME` when :func:`is_extreme` holds of the change."""
    return f"{EXTREME} {done}" if is_extreme(before, after) else done


def is_extreme(before: Any, after: Any) -> bool:
    """Whether ``after`` is a number nine orders of magnitude off ``before`` (or off 1 when
    ``before`` is no number or zero), or not finite: the changes that overflow or underflow."""
    if not _is_number(after):
        return False
    scale = abs(before) if _is_number(before) and before != 0 and math.isfinite(before) else 1.0
    size = abs(float(after)) if abs(after) < 1e308 else math.inf
    return not math.isfinite(size) or size > 1e9 * scale or 0 < size < 1e-9 * scale


def short_repr(value: Any) -> str:
    """``repr(value)`` cut to 80 characters, for the list of mutations."""
    text = repr(value)
    return text if len(text) <= 80 else f"{text[:60]}… ({len(text):,} chars)"


@st.composite
def mutated_documents(draw: st.DrawFn) -> tuple[Any, list[str]]:
    """A valid document after up to three mutations, with the list of mutations done."""
    document = draw(valid_documents)
    done = [draw(_one_mutation(document)) for _ in range(draw(st.integers(0, 3)))]
    return document, done


# --- the document as text, and the text mutated -------------------------------------------------


class Repeated(dict):  # type: ignore[type-arg]
    """An object written with one of its keys twice (JSON text a dict cannot hold)."""

    def __init__(self, items: dict[str, Any], twice: str, second: Any) -> None:
        super().__init__(items)
        self.twice, self.second = twice, second


def dumps(value: Any, ascii_only: bool = True) -> str:
    """JSON text of ``value``; a :class:`Repeated` object writes its key twice."""
    if isinstance(value, Repeated):
        pairs = [*value.items(), (value.twice, value.second)]
        inner = ",".join(f"{dumps(k, ascii_only)}:{dumps(v, ascii_only)}" for k, v in pairs)
        return "{" + inner + "}"
    if isinstance(value, dict):
        inner = ",".join(f"{dumps(k, ascii_only)}:{dumps(v, ascii_only)}" for k, v in value.items())
        return "{" + inner + "}"
    if isinstance(value, list):
        return "[" + ",".join(dumps(v, ascii_only) for v in value) + "]"
    return json.dumps(value, ensure_ascii=ascii_only)


def _encode(text: str) -> bytes:
    return text.encode("utf-8", "surrogatepass")


def _with_key_twice(document: Any, draw: st.DrawFn) -> bytes:
    objects = [p for p in [(), *places(document)] if isinstance(get_at(document, p), dict)]
    objects = [p for p in objects if get_at(document, p)]
    if not objects:
        return _encode(dumps(document))
    place = draw(st.sampled_from(objects))
    target = get_at(document, place)
    key = draw(st.sampled_from(sorted(target)))
    second = draw(st.one_of(st.just(copy.deepcopy(target[key])), odd_values))
    repeated = Repeated(target, key, second)
    if place:
        document = copy.deepcopy(document)
        _replace(document, place, repeated)
        return _encode(dumps(document))
    return _encode(dumps(repeated))


def _text_mutation(draw: st.DrawFn, data: bytes) -> tuple[bytes, str]:
    kind = draw(
        st.sampled_from(
            ["cut", "flip", "insert", "digits", "literal", "nest", "bom", "utf16", "space"]
        )
    )
    position = draw(st.integers(0, len(data)))
    if kind == "cut":
        return data[:position], f"cut at byte {position}"
    if kind == "flip" and data:
        spot = min(position, len(data) - 1)
        byte = draw(st.integers(0, 255))
        return data[:spot] + bytes([byte]) + data[spot + 1 :], f"byte {spot} set to {byte}"
    if kind == "insert":
        piece = draw(
            st.sampled_from([b",", b"]", b"}", b"{", b"[", b'"', b"\\", b"\xff", b"\x00", b":1"])
        )
        return data[:position] + piece + data[position:], f"{piece!r} put at byte {position}"
    if kind == "digits":
        size = draw(st.sampled_from([40, 41, 400, 5001]))
        number = b"9" * size
        return _first_number_replaced(data, position, number), f"{EXTREME} a {size}-digit number"
    if kind == "literal":
        literal = draw(
            st.sampled_from(
                [
                    b"1e400",
                    b"-1e400",
                    b"1E-400",
                    b"-0",
                    b"NaN",
                    b"Infinity",
                    b"1.0e+308",
                    b"0e0",
                    b"00",
                    b"1.",
                ]
            )
        )
        what = f"a number written {literal!r}"
        if literal not in (b"-0", b"0e0", b"00", b"1."):
            what = f"{EXTREME} {what}"
        return _first_number_replaced(data, position, literal), what
    if kind == "nest":
        depth = draw(st.integers(30, 5000))
        return b"[" * depth + data + b"]" * depth, f"nested in {depth} lists"
    if kind == "bom":
        return b"\xef\xbb\xbf" + data, "a byte-order mark first"
    if kind == "utf16":
        return data.decode("utf-8", "replace").encode("utf-16"), "UTF-16"
    return data.replace(b",", b" ,\n\t "), "whitespace"


def _first_number_replaced(data: bytes, position: int, number: bytes) -> bytes:
    """``data`` with the first number token at or after ``position`` replaced by ``number``."""
    digits = b"-0123456789"
    start = next(
        (i for i in range(position, len(data)) if data[i] in digits and data[i - 1 : i] in b":[, "),
        None,
    )
    if start is None:
        return data
    end = start
    while end < len(data) and data[end] in b"-+.eE0123456789":
        end += 1
    return data[:start] + number + data[end:]


@st.composite
def case_texts(draw: st.DrawFn) -> tuple[bytes, list[str]]:
    """The bytes of a case file: a mutated document, written as JSON, maybe mutated as text."""
    document, done = draw(mutated_documents())
    way = draw(st.sampled_from(["plain", "plain", "plain", "unicode", "key twice", "text"]))
    if way == "key twice":
        return _with_key_twice(document, draw), [*done, "a key twice"]
    data = _encode(dumps(document, ascii_only=way != "unicode"))
    if way == "text":
        data, what = _text_mutation(draw, data)
        return data, [*done, what]
    return data, done
