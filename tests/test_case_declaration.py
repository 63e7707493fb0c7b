"""One declaration of the case file: the loader, the saver, the schema, the panel and the README
all read it, and saving then loading gives back the same case.

References: the case-file contract (design §2: case file version 1, ``units`` applies to every
number, unknown keys are errors), the JSON Schema 2020-12 specification through the ``jsonschema``
library's validator, and the issue that asks for one declaration (a key's quantity changed in one
place must reach the schema, the parser and the panel's units).
"""

from __future__ import annotations

import dataclasses
import json
import math
import typing
from pathlib import Path
from typing import Any

import jsonschema
import msgspec
import pytest

from tests.test_case_files import assert_same
from tests.test_schema import SECTIONS, one_segment_case
from workbench.case import declaration as declared
from workbench.case.declaration import field_metas, field_type
from workbench.case.load import case_file_from_bytes, case_file_from_document
from workbench.case.reference import markdown, readme_section
from workbench.case.save import case_document
from workbench.case.schema import case_schema
from workbench.case.units import SI_UNITS
from workbench.panel.keys import quantity_of
from workbench.panel.whatif import numeric_inputs
from workbench.solver.build import SECTIONS as SOLVER_SECTIONS
from workbench.solver.io import case_to_dict, load_case, parse_case, save_case

ROOT = Path(__file__).resolve().parents[1]
#: Every case file the project ships (the demo, and the notebook's copy of it).
BUNDLED = sorted(
    [*(ROOT / "workbench" / "cases").glob("*.json"), *(ROOT / "notebooks").glob("*.json")]
)


def test_bundled_cases_are_found() -> None:
    assert BUNDLED, "no bundled case files"


# --- one declaration, every reader ------------------------------------------------------------


def test_a_quantity_changed_in_the_declaration_reaches_schema_parser_panel_and_readme(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    case = one_segment_case(SECTIONS["solid"], fillet_radius=2)
    case["units"] = {"length": "mm", "torque": "N*m", "stress": "MPa", "angle": "deg"}
    before = parse_case(case).shafts[0].segments[0].fillet_radius
    assert before == pytest.approx(2e-3)  # a length: 2 mm

    meta = field_metas(declared.Segment)["fillet_radius"]
    assert meta is not None and meta.extra is not None
    monkeypatch.setitem(meta.extra, "quantity", "angle")  # the one place

    # the parser converts by the new quantity: 2 deg in rad
    model = parse_case(case)
    assert model.shafts[0].segments[0].fillet_radius == pytest.approx(2 * math.pi / 180)
    # the schema says so
    described = case_schema()["$defs"]["Segment"]["properties"]["fillet_radius"]["description"]
    assert described.endswith("[angle units]")
    # the panel's unit table says so, and labels the input in degrees
    assert quantity_of(("shafts", 0, "segments", 0, "fillet_radius")) == "angle"
    labels = dict(numeric_inputs(case))
    assert labels[("shafts", 0, "segments", 0, "fillet_radius")].endswith("fillet radius [°]")
    # the README's key reference would say so
    assert "| `fillet_radius` | number | angle |" in markdown()
    # and the saver writes it back in the same unit
    assert case_to_dict(model)["shafts"][0]["segments"][0]["fillet_radius"] == 2


def test_a_key_name_means_one_quantity_wherever_it_appears() -> None:
    seen: dict[str, set[str | None]] = {}
    for cls, name in declared.declared_numbers():
        seen.setdefault(name, set()).add(declared.quantity_of(cls, name))
    assert {name: q for name, q in seen.items() if len(q) > 1} == {}


def test_every_key_has_a_description_and_every_quantity_a_unit() -> None:
    for cls in declared.declared_structs():
        assert cls.__doc__, cls
        for name, meta in field_metas(cls).items():
            assert meta is not None and meta.description, (cls.__name__, name)
            quantity = declared.quantity_of(cls, name)
            assert quantity is None or quantity in declared.QUANTITIES


def test_every_declared_shape_is_a_solver_section_with_the_same_keys() -> None:
    assert set(SOLVER_SECTIONS) == set(declared.SHAPES.values())
    for shape, cls in declared.SHAPES.items():
        section = SOLVER_SECTIONS[cls]
        assert section.shape == shape
        solver_keys = {f.name for f in dataclasses.fields(section) if f.init}
        derived = getattr(section, "derived_keys", frozenset())  # a drawing's file and unit
        assert solver_keys - derived == set(cls.__struct_fields__), shape


def test_the_units_object_names_every_base_quantity_with_its_si_default() -> None:
    assert set(declared.Units.__struct_fields__) == set(SI_UNITS)
    for name in SI_UNITS:
        assert declared.default_of(declared.Units, name) == SI_UNITS[name]


def test_the_limits_are_the_declared_bounds() -> None:
    def bound(cls: type, name: str, which: str) -> Any:
        return declared.Unwrapped(field_type(cls, name)).bound(which)

    assert bound(declared.Shaft, "segments", "max_length") == declared.MAX_SEGMENTS
    assert bound(declared.CaseFile, "load_cases", "max_length") == declared.MAX_LOAD_CASES
    assert bound(declared.Design, "modal_elements_per_segment", "le") == declared.MAX_MODAL_ELEMENTS
    assert bound(declared.CaseFile, "title", "max_length") == declared.MAX_STRING_LENGTH
    assert bound(declared.Units, "length", "max_length") == declared.MAX_UNIT_LENGTH


def _depth(annotation: Any, seen: frozenset[type] = frozenset()) -> int:
    """Levels of JSON arrays and objects a declared value may hold."""
    unwrapped = declared.Unwrapped(annotation)
    deepest = 0
    for base in unwrapped.bases:
        origin = typing.get_origin(base)
        if origin in (list, dict):
            deepest = max(deepest, 1 + _depth(typing.get_args(base)[-1], seen))
        elif isinstance(base, type) and issubclass(base, declared.Keys) and base not in seen:
            inner = [_depth(field_type(base, n), seen | {base}) for n in base.__struct_fields__]
            deepest = max(deepest, 1 + max(inner, default=0))
    return deepest


def test_a_valid_case_never_nests_near_the_depth_limit() -> None:
    # the loader relies on this: a file that decodes into the declaration is shallow
    assert _depth(declared.CaseFile) < declared.MAX_DEPTH


def test_the_readme_key_reference_is_current() -> None:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    assert readme_section(text) == markdown(), (
        "the README's key reference is stale: run "
        "`python -m workbench.case.reference --readme README.md`"
    )


# --- round trips: load → save → load -------------------------------------------------------------


@pytest.mark.parametrize("path", BUNDLED, ids=[p.name for p in BUNDLED])
def test_every_bundled_case_round_trips(tmp_path: Path, path: Path) -> None:
    original = load_case(path)
    save_case(original, tmp_path / "saved.json")
    assert_same(load_case(tmp_path / "saved.json"), original)
    # the declared case survives the trip as well, in the file's own units
    typed = case_file_from_bytes(path.read_bytes(), str(path))
    again = case_file_from_document(case_document(typed))
    assert case_document(again) == case_document(typed)


@pytest.mark.parametrize("shape", list(SECTIONS))
def test_every_shape_round_trips(tmp_path: Path, shape: str) -> None:
    original = parse_case(one_segment_case(SECTIONS[shape]))
    save_case(original, tmp_path / "saved.json")
    reloaded = load_case(tmp_path / "saved.json")
    assert_same(reloaded, original)
    assert case_to_dict(reloaded)["shafts"][0]["segments"][0]["section"] == SECTIONS[shape]


def test_saved_cases_hold_their_keys_once_and_pass_the_schema(tmp_path: Path) -> None:
    validator = jsonschema.Draft202012Validator(case_schema())
    for path in BUNDLED:
        save_case(load_case(path), tmp_path / "saved.json")
        raw = (tmp_path / "saved.json").read_bytes()
        assert not list(validator.iter_errors(json.loads(raw)))
        generic = msgspec.json.decode(raw)
        assert raw.count(b":") == msgspec.json.encode(generic).count(b":")  # no key dropped
