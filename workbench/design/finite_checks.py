"""Check rows beyond the range of numbers: refused naming the input that drives them.

The results a check reads are finite (:mod:`workbench.solver.finite_results`), but a check's
value or utilisation may still leave the range of floats: a notch factor of 1e308 times a
stress, a stress over an allowable of 1e-307 Pa, a rotation limit of 1e-300 rad. Such a row
can be neither printed as a number nor written to JSON, so the check is refused as bad input,
naming the key that makes it overflow: the detail's factor or size when the value overflows,
the limit's source (a strength, the factor of safety, a stated allowable, the twist or rotation
limit) when the utilisation does.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, short
from workbench.case.materials import Material
from workbench.case.validate import LARGEST, SMALLEST_NORMAL
from workbench.design.check_report import Check
from workbench.solver.model import Model

#: A factor of safety above this is taken for the cause when an allowable underflows (factors
#: of safety in practice lie below 10; common practice, no source).
_ABSURD_FACTOR_OF_SAFETY = 1e6

#: The key each stress-concentration check's factor comes from, on its segment.
_DETAIL_KEYS = {
    "shoulder_stress": "fillet_radius",
    "keyseat_stress": "keyseat",
    "notch_stress": "notch.kts",
    "cross_hole_stress": "cross_hole_diameter",
}


def require_finite_checks(checks: Iterable[Check], model: Model, design: DesignCriteria) -> None:
    """Raise :class:`InputError` on the first row whose value, limit or utilisation is out of range.

    Parameters
    ----------
    checks
        Rows of the static checks (stresses, twist rates, rotations) or of the fatigue check.
    model
        The model checked (its shafts' segments and materials).
    design
        The criteria the limits come from.
    """
    for check in checks:
        value_ok = math.isfinite(check.value)
        limit_ok = SMALLEST_NORMAL <= check.limit <= LARGEST
        if value_ok and limit_ok and math.isfinite(check.value / check.limit):
            continue
        if check.kind == "rotation":
            raise _rotation_error(check, design, value_ok)
        if check.kind in ("fatigue", "first_cycle_yield"):
            raise _fatigue_error(check, model, design)
        if check.kind in _WARPING_NORMAL_KINDS or (check.kind in _WARPING_KINDS and not value_ok):
            raise _warping_error(check, model, design, value_ok)
        segment = _segment_path(model, check)
        if not value_ok:
            what = f"the {check.kind.replace('_', ' ')} in {short(check.result)!r}"
            key = _DETAIL_KEYS.get(check.kind, "section")
            msg = f"{what} goes beyond the range of numbers ({check.value:g})"
            raise InputError(f"{segment}.{key}", msg)
        if check.kind == "twist_rate":
            msg = f"the twist rate over this limit goes beyond the range of numbers ({check.value:g} rad/m)"
            raise InputError("design.max_twist_rate", msg)
        raise _allowable_error(check, model, design)


#: The warping checks (workbench.design.warping_checks) and those of them whose limit is Sy/FoS;
#: the shear row's limit is the allowable shear stress, named as the static checks' is.
_WARPING_KINDS = ("warping_normal_stress", "warping_shear_stress", "warping_combined_stress")
_WARPING_NORMAL_KINDS = ("warping_normal_stress", "warping_combined_stress")


def _warping_error(
    check: Check, model: Model, design: DesignCriteria, value_ok: bool
) -> InputError:
    """A warping row out of range: the stated bending stress, the section, or Sy/FoS's source."""
    what = f"the {check.kind.replace('_', ' ')} in {short(check.result)!r}"
    if not value_ok:
        stated = next(
            (
                number
                for number, entry in enumerate(design.coexisting_stresses)
                if entry.shaft == check.shaft and entry.segment == check.segment
            ),
            None,
        )
        msg = f"{what} goes beyond the range of numbers ({check.value:g})"
        if stated is not None:
            return InputError(f"design.coexisting_stresses[{stated}]", msg)
        return InputError(f"{_segment_path(model, check)}.section", msg)
    msg = f"{what} over Sy/FoS ({check.limit:g} Pa) goes beyond the range of numbers"
    if design.factor_of_safety > _ABSURD_FACTOR_OF_SAFETY:
        return InputError("design.factor_of_safety", msg)
    material = model.shaft(check.shaft).segments[check.segment or 0].layers[0].material
    return InputError(f"materials.{short(material.name)}.yield_strength", msg)


def _segment_path(model: Model, check: Check) -> str:
    shaft = model.shaft_number(check.shaft)
    return f"shafts[{shaft}].segments[{check.segment}]"


def _rotation_error(check: Check, design: DesignCriteria, value_ok: bool) -> InputError:
    number = next(
        (
            index
            for index, limit in enumerate(design.rotation_limits)
            if limit.shaft == check.shaft and limit.end == check.x
        ),
        0,
    )
    path = f"design.rotation_limits[{number}]"
    if not value_ok:
        msg = (
            f"the rotation between its stations goes beyond the range of numbers ({check.value:g})"
        )
        return InputError(path, msg)
    msg = f"the rotation over this limit goes beyond the range of numbers ({check.value:g} rad)"
    return InputError(f"{path}.limit", msg)


def _fatigue_error(check: Check, model: Model, design: DesignCriteria) -> InputError:
    """The strength under a fatigue factor of safety of 0: a stress over it overflows."""
    strength = "endurance limit" if check.kind == "fatigue" else "yield strength"
    what = f"the stresses over the {strength} go beyond the range of numbers (n = 0)"
    fatigue = design.fatigue
    if check.kind == "fatigue" and fatigue is not None and fatigue.endurance_limit is not None:
        return InputError("design.fatigue.endurance_limit", what)
    material = model.shaft(check.shaft).segments[check.segment or 0].layers[0].material
    key = "ultimate_strength" if check.kind == "fatigue" else "yield_strength"
    return InputError(f"materials.{short(material.name)}.{key}", what)


def _allowable_error(check: Check, model: Model, design: DesignCriteria) -> InputError:
    """The source of an allowable stress so small that a stress over it overflows."""
    what = (
        f"the {check.kind.replace('_', ' ')} over the allowable ({check.limit:g} Pa) goes beyond "
        "the range of numbers"
    )
    if design.shear_criterion == "allowable":
        return InputError("design.allowable_shear_stress", what)
    if design.factor_of_safety > _ABSURD_FACTOR_OF_SAFETY:
        return InputError("design.factor_of_safety", what)
    segment = model.shaft(check.shaft).segments[check.segment or 0]
    materials = [layer.material for layer in segment.layers]

    def key_of(material: Material) -> tuple[float, str]:
        strengths = {"yield_strength": material.yield_strength}
        if design.shear_criterion == "shafting_code":
            # min(0.30 Sy, 0.18 Su): the ultimate governs when 0.6 Su is below Sy.
            ultimate = material.ultimate_strength
            strengths["ultimate_strength"] = None if ultimate is None else ultimate * 0.6
        given = {key: value for key, value in strengths.items() if value is not None}
        key = min(given, key=lambda name: given[name]) if given else "yield_strength"
        return given.get(key, math.inf), key

    weakest = min(materials, key=lambda material: key_of(material)[0])
    return InputError(f"materials.{short(weakest.name)}.{key_of(weakest)[1]}", what)


__all__ = ["require_finite_checks"]
