"""The quantity (so the unit) of each case-file key the panel shows: one table, one lookup.

Every unit the panel prints beside a field, a sweep input or a sweep's load comes from
:func:`quantity_of`. The table below is the panel's own copy of what the case file declares; when
the one declaration of every key (with its quantity) lands in ``workbench/case/``, this module is
the only one to change: :func:`quantity_of` then reads the declaration.
"""

from __future__ import annotations

from workbench.panel.document import Path

#: The quantity of each numeric key the panel shows (``None``: a plain number).
_KEY_QUANTITY: dict[str, str | None] = {
    "length": "length",
    "diameter": "length",
    "outer_diameter": "length",
    "inner_diameter": "length",
    "diameter_start": "length",
    "diameter_end": "length",
    "bore": "length",
    "fillet_radius": "length",
    "cross_hole_diameter": "length",
    "x": "length",
    "start": "length",
    "end": "length",
    "radius": "length",
    "torque": "torque",
    "stiffness": "stiffness",
    "rotation": "angle",
    "intensity_start": "distributed_torque",
    "intensity_end": "distributed_torque",
    "factor_of_safety": None,
    "allowable_shear_stress": "stress",
    "max_twist_rate": "twist_rate",
    "limit": "angle",
    "width": "length",
    "height": "length",
    "thickness": "length",
    "inertia": "inertia",
    "min": "speed",
    "max": "speed",
    "density": "density",
    "frequency_margin": None,
}


def quantity_of(path: Path) -> str | None:
    """The quantity of the value at a case-document path, or ``None`` for a plain number.

    A combination's factors are plain numbers whatever the load case they name is called (a case
    named ``length`` must not get a unit).

    Parameters
    ----------
    path
        The field, as keys and list indices from the top of the case document.

    Returns
    -------
    str or None
        A quantity :class:`~workbench.solver.units.UnitSystem` knows (``"length"``,
        ``"torque"``, ...), or ``None``.

    Example
    -------
    >>> quantity_of(("shafts", 0, "segments", 1, "section", "inner_diameter"))
    'length'
    >>> quantity_of(("combinations", 0, "factors", "length")) is None
    True
    """
    if not path or not isinstance(path[-1], str) or path[-2:-1] == ("factors",):
        return None
    return _KEY_QUANTITY.get(path[-1])
