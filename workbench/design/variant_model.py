"""One variant of a batch as a model of its own, for the checks that are made variant by variant.

A batched solve (:func:`~workbench.solver.batch.solve_batch`) holds its variants as columns;
the checks that are not array functions (fatigue, the natural frequencies) read a
:class:`~workbench.solver.model.Model`. :func:`variant_model` writes one variant's row of the
columns back into the base model's objects: sections, materials (shear modulus), details,
spring stiffnesses and prescribed rotations, gear radii and load magnitudes. Positions are the
base model's: a variant of other segment lengths keeps its nodes as fractions of its segments,
which a model of stated positions cannot say.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from typing import Any

import numpy as np

from workbench.case.errors import InputError
from workbench.solver.columns import CaseTable, case_table
from workbench.solver.model import GearMesh, Layer, LoadCase, Model, Segment, Support
from workbench.solver.sections import FloatArray, Section, SolidCircle, TaperedCircle, Tube


def _row(column: FloatArray, variant: int) -> Any:
    """The variant's row of a column (a column of one row stands for every variant)."""
    return column[variant if column.shape[0] > 1 else 0].tolist()


def _section(section: Section, start: float, end: float, bore: float) -> Section:
    """The section at a variant's dimensions (m); the base's object when they are its own."""
    if isinstance(section, SolidCircle):
        return section if start == section.diameter else SolidCircle(start)
    if isinstance(section, Tube):
        same = (start, bore) == (section.outer_diameter, section.inner_diameter)
        return section if same else Tube(start, bore)
    if isinstance(section, TaperedCircle):
        same = (start, end, bore) == (section.diameter_start, section.diameter_end, section.bore)
        return section if same else TaperedCircle(start, end, bore)
    return section


def variant_model(
    model: Model,
    table: CaseTable,
    variant: int,
    details: Mapping[str, FloatArray | None] | None = None,
) -> Model:
    """The model of one variant of a batch.

    Parameters
    ----------
    model
        The base model (SI) the batch's columns were taken from.
    table
        The batch's columns (:attr:`~workbench.solver.batch.BatchResults.table`).
    variant
        Which row.
    details
        (V, G) ``fillet_radius`` and ``cross_hole_diameter`` columns (m), or ``None`` each for
        the base's; read on the segments that have the detail.

    Returns
    -------
    Model
        The base model with the variant's sizes, moduli, stiffnesses, radii and loads.

    Raises
    ------
    InputError
        A non-circular section whose torsion constant or stress per torque the batch varies
        (no section of the case file is given by those numbers), or a variant that is not a
        valid model, named by the model's own checks.
    """
    details = details or {}
    segments = table.segments
    base = case_table(model).segments
    length = _row(segments.length, variant)
    modulus, start, end, bore = (
        _row(getattr(segments, name), variant)
        for name in (
            "shear_modulus",
            "outer_diameter_start",
            "outer_diameter_end",
            "inner_diameter",
        )
    )
    given = (segments.layer_shape == 3) & ~np.all(  # a GIVEN section with other numbers
        (segments.torsion_constant == base.torsion_constant)
        & (segments.stress_per_torque == base.stress_per_torque),
        axis=0,
    )
    if given.any():
        msg = "a non-circular section's numbers cannot be varied for the checks made one by one"
        raise InputError("torsion_constant", msg)
    fillet, hole = details.get("fillet_radius"), details.get("cross_hole_diameter")
    layer_rows = iter(range(len(modulus)))
    segment_rows = iter(range(len(length)))

    def resized(segment: Segment) -> Segment:
        number = next(segment_rows)
        layers = []
        for layer in segment.layers:
            row = next(layer_rows)
            material = layer.material
            if modulus[row] != material.shear_modulus:
                material = dataclasses.replace(material, shear_modulus=modulus[row])
            section = _section(layer.section, start[row], end[row], bore[row])
            layers.append(Layer(material, section))
        changes: dict[str, Any] = {"length": length[number], "layers": tuple(layers)}
        if fillet is not None and segment.fillet_radius is not None:
            changes["fillet_radius"] = float(fillet[variant, number])
        if hole is not None and segment.cross_hole_diameter is not None:
            changes["cross_hole_diameter"] = float(hole[variant, number])
        return dataclasses.replace(segment, **changes)

    # The one-by-one path: one model, written segment by segment.
    shafts = tuple(
        dataclasses.replace(shaft, segments=tuple(resized(segment) for segment in shaft.segments))
        for shaft in model.shafts
    )
    stiffness = _row(table.support_stiffness, variant)
    rotation = _row(table.support_rotation, variant)
    supports = tuple(
        _support(support, stiffness[number], rotation[number])
        for number, support in enumerate(model.supports)
    )
    coefficients = _row(table.gear_coefficient, variant)
    gears = tuple(_gear(gear, *coefficients[number]) for number, gear in enumerate(model.gears))
    torques = iter(_row(table.torque, variant))
    intensities = iter(_row(table.load_intensity, variant))
    load_cases = tuple(
        LoadCase(
            case.name,
            tuple(dataclasses.replace(item, torque=next(torques)) for item in case.torques),
            tuple(
                dataclasses.replace(item, **dict(zip(("intensity_start", "intensity_end"),
                                                     next(intensities), strict=True)))
                for item in case.distributed
            ),
        )
        for case in model.load_cases
    )  # fmt: skip
    return dataclasses.replace(
        model, shafts=shafts, supports=supports, gears=gears, load_cases=load_cases
    )


def _support(support: Support, stiffness: float, rotation: float) -> Support:
    changes: dict[str, Any] = {}
    if support.kind != "fixed" and stiffness != support.stiffness:
        changes["stiffness"] = stiffness
    if rotation != support.rotation:
        changes["rotation"] = rotation
    return dataclasses.replace(support, **changes) if changes else support


def _gear(gear: GearMesh, radius_a: float, coefficient_b: float) -> GearMesh:
    if (radius_a, coefficient_b) == gear.coefficients:
        return gear
    return dataclasses.replace(
        gear,
        a=dataclasses.replace(gear.a, radius=radius_a),
        b=dataclasses.replace(gear.b, radius=abs(coefficient_b)),
    )
