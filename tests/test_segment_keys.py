"""The segments' columns the loader keeps with a decoded case: equal to a fresh reading, never stale.

:func:`workbench.case.segment_keys.take_segment_keys` reads each shaft's segment keys once while
the loader checks the alternatives, and :func:`~workbench.case.segment_keys.segment_keys` hands
them to the solver. Whatever is done to the case afterwards (a key set, a nested section edited,
a segment or shaft put in, replaced or removed), solving it must give what the model path gives
for the case as it is now: results to 1e-12, or the same error word for word (the reference,
``solve(build_model(case))``, builds one object per segment and reads nothing kept).
"""

from __future__ import annotations

import copy
import pickle
from collections.abc import Callable
from typing import Any

import msgspec
import numpy as np
import pytest
from hypothesis import given

from tests.test_case_columns import assert_same_results, varied_cases
from tests.test_properties import SETTINGS
from workbench.case import declaration as declared
from workbench.case.errors import InputError
from workbench.case.load import case_file_from_document, decode_case_file
from workbench.case.segment_keys import ShaftKeys, read_shaft_keys, segment_keys
from workbench.solver.analysis import Results, solve, solve_case
from workbench.solver.build import build_model

#: Two shafts of prismatic segments in mm (invented demo data): solid and tube, two materials.
DOCUMENT: dict[str, Any] = {
    "units": {"length": "mm"},
    "materials": {
        "steel": {"shear_modulus": 80e9},
        "bronze": {"shear_modulus": 40e9},
    },
    "shafts": [
        {
            "id": "input",
            "segments": [
                {
                    "length": 100.0 + 10.0 * number,
                    "material": "steel",
                    "section": (
                        {"shape": "solid", "diameter": 40.0}
                        if number % 2
                        else {"shape": "tube", "outer_diameter": 50.0, "inner_diameter": 30.0}
                    ),
                }
                for number in range(8)
            ],
        },
        {
            "id": "output",
            "segments": [
                {
                    "length": 200.0,
                    "material": "steel",
                    "section": {"shape": "solid", "diameter": 30.0},
                }
            ]
            * 3,
        },
    ],
    "supports": [
        {"shaft": "input", "x": 0.0},
        {"shaft": "input", "x": 1080.0},
        {"shaft": "output", "x": 0.0},
    ],
    "load_cases": [
        {
            "name": "drive",
            "torques": [
                {"shaft": "input", "x": 330.0, "torque": 250.0},
                {"shaft": "output", "x": 600.0, "torque": -40.0},
            ],
        }
    ],
}


def _decoded() -> declared.CaseFile:
    return decode_case_file(msgspec.json.encode(DOCUMENT))


def _segment(**keys: Any) -> declared.Segment:
    values = {"length": 150.0, "material": "steel", **keys}
    values.setdefault("section", {"shape": "solid", "diameter": 35.0})
    return msgspec.convert(values, declared.Segment)


def assert_keys_equal(kept: ShaftKeys, fresh: ShaftKeys) -> None:
    np.testing.assert_array_equal(kept.length, fresh.length)
    np.testing.assert_array_equal(kept.section_type, fresh.section_type)
    assert kept.material == fresh.material
    assert kept.given == fresh.given
    assert kept.section_numbers.keys() == fresh.section_numbers.keys()
    for name, column in fresh.section_numbers.items():
        np.testing.assert_array_equal(kept.section_numbers[name], column)


def _outcome(solver: Callable[[], Results]) -> Results | InputError:
    try:
        return solver()
    except InputError as error:
        return error


def assert_solves_as_the_model(case: declared.CaseFile) -> None:
    """solve_case(case) gives what solving the model built from the case now gives."""
    ours = _outcome(lambda: solve_case(case))
    reference = _outcome(lambda: solve(build_model(case)))
    if isinstance(reference, InputError):
        assert isinstance(ours, InputError), f"solve_case accepted: {reference}"
        assert str(ours) == str(reference)
        return
    assert isinstance(ours, Results), f"solve_case refused: {ours}"
    assert_same_results(ours, reference)


def test_the_loader_keeps_the_keys_and_hands_the_same_ones_on():
    case = _decoded()
    kept = segment_keys(case)
    assert segment_keys(case) is kept  # not read again
    for shaft, keys in zip(case.shafts, kept, strict=True):
        assert_keys_equal(keys, read_shaft_keys(shaft.segments))
    assert kept[0].material == "steel"
    assert kept[0].given == frozenset()
    for keys in kept:
        for array in (keys.length, keys.section_type, *keys.section_numbers.values()):
            assert not array.flags.writeable


def test_the_kept_keys_are_never_written_compared_or_copied():
    case = _decoded()
    assert segment_keys(case)
    plain = msgspec.structs.replace(case)  # a copy of the keys alone
    assert msgspec.json.encode(case) == msgspec.json.encode(plain)
    assert msgspec.to_builtins(case) == msgspec.to_builtins(plain) == _plain_document()
    assert case == plain
    assert not hasattr(plain, "_segment_keys")
    # A copy, a deep copy or a pickled case (another process) reads its own columns afresh.
    for copied in (copy.copy(case), copy.deepcopy(case), pickle.loads(pickle.dumps(case))):
        assert copied == case
        assert not hasattr(copied, "_segment_keys")


def _plain_document() -> Any:
    return msgspec.to_builtins(msgspec.convert(DOCUMENT, declared.CaseFile))


def _set_length(case: declared.CaseFile) -> None:
    case.shafts[0].segments[2].length = 55.0


def _set_a_diameter(case: declared.CaseFile) -> None:
    case.shafts[0].segments[1].section.diameter = 25.0  # type: ignore[union-attr]


def _set_a_bore_too_large(case: declared.CaseFile) -> None:
    case.shafts[0].segments[0].section.inner_diameter = 60.0  # type: ignore[union-attr]


def _set_another_shape(case: declared.CaseFile) -> None:
    case.shafts[0].segments[3].section = msgspec.convert(
        {"shape": "rectangle", "width": 30.0, "height": 20.0}, declared.Section
    )


def _set_another_material(case: declared.CaseFile) -> None:
    case.shafts[1].segments[1].material = "bronze"


def _set_an_unknown_material(case: declared.CaseFile) -> None:
    case.shafts[0].segments[5].material = "unobtainium"


def _set_a_bad_fillet(case: declared.CaseFile) -> None:
    case.shafts[0].segments[4].fillet_radius = -1.0


def _set_a_notch(case: declared.CaseFile) -> None:
    case.shafts[0].segments[4].notch = declared.Notch(kts=0.5)  # set, not decoded: unchecked


def _set_a_cross_hole_too_large(case: declared.CaseFile) -> None:
    case.shafts[0].segments[1].cross_hole_diameter = 45.0


def _set_layers(case: declared.CaseFile) -> None:
    segment = case.shafts[0].segments[6]
    segment.material = msgspec.UNSET
    segment.section = msgspec.UNSET
    segment.layers = [
        msgspec.convert(
            {"material": "bronze", "section": {"shape": "solid", "diameter": 30.0}},
            declared.Layer,
        )
    ]


def _replace_a_segment(case: declared.CaseFile) -> None:
    case.shafts[0].segments[2] = _segment(length=130.0)


def _append_a_segment(case: declared.CaseFile) -> None:
    case.shafts[1].segments.append(_segment())


def _remove_the_last_segment(case: declared.CaseFile) -> None:
    del case.shafts[0].segments[-1]  # the support at x = 1080 mm is now off the shaft


def _insert_a_segment(case: declared.CaseFile) -> None:
    case.shafts[0].segments.insert(0, _segment(section={"shape": "solid", "diameter": 1e-300}))


def _replace_the_segment_list(case: declared.CaseFile) -> None:
    case.shafts[1].segments = [_segment(length=600.0)]


def _replace_a_shaft(case: declared.CaseFile) -> None:
    case.shafts[1] = msgspec.convert(
        {"id": "output", "segments": [{"length": 700.0, "material": "bronze",
                                       "section": {"shape": "solid", "diameter": 20.0}}]},
        declared.Shaft,
    )  # fmt: skip


def _change_the_units(case: declared.CaseFile) -> None:
    case.units = msgspec.convert({"length": "cm"}, declared.Units)


EDITS = [
    _set_length,
    _set_a_diameter,
    _set_a_bore_too_large,
    _set_another_shape,
    _set_another_material,
    _set_an_unknown_material,
    _set_a_bad_fillet,
    _set_a_notch,
    _set_a_cross_hole_too_large,
    _set_layers,
    _replace_a_segment,
    _append_a_segment,
    _remove_the_last_segment,
    _insert_a_segment,
    _replace_the_segment_list,
    _replace_a_shaft,
    _change_the_units,
]


@pytest.mark.parametrize("edit", EDITS, ids=[edit.__name__.strip("_") for edit in EDITS])
def test_an_edit_after_decoding_is_never_solved_with_the_kept_columns(edit):
    case = _decoded()
    before = solve_case(case)  # solved once from the kept columns
    edit(case)
    assert_solves_as_the_model(case)
    for shaft, keys in zip(case.shafts, segment_keys(case), strict=True):
        assert_keys_equal(keys, read_shaft_keys(shaft.segments))
    outcome = _outcome(lambda: solve_case(case))
    if isinstance(outcome, Results):  # every edit above changes the results or refuses the case
        assert not all(
            np.array_equal(getattr(outcome, name), getattr(before, name))
            for name in ("reactions", "angle")
        ) or len(outcome.angle) != len(before.angle)


def test_an_edit_of_another_case_also_retires_the_kept_columns():
    # Edits are counted over every case object: conservative, never stale.
    case, other = _decoded(), _decoded()
    kept = segment_keys(case)
    other.title = "another"
    assert segment_keys(case) is not kept
    assert_solves_as_the_model(case)


@SETTINGS
@given(varied_cases(geared=True))
def test_solving_with_the_kept_columns_equals_solving_with_columns_read_afresh(document):
    case = case_file_from_document(copy.deepcopy(document))
    unkept = msgspec.structs.replace(case)  # the same keys, nothing kept: read when solved
    for shaft, keys in zip(case.shafts, segment_keys(case), strict=True):
        assert_keys_equal(keys, read_shaft_keys(shaft.segments))
    ours, fresh = _outcome(lambda: solve_case(case)), _outcome(lambda: solve_case(unkept))
    if isinstance(fresh, InputError):
        assert str(ours) == str(fresh)
        return
    assert isinstance(ours, Results)
    assert_same_results(ours, solve(build_model(case)))
    for name in ("reactions", "torque", "angle", "shear_stress", "node_angle"):
        np.testing.assert_array_equal(getattr(ours, name), getattr(fresh, name), err_msg=name)
