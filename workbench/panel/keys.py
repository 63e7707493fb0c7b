"""The quantity (so the unit) of each case-file key the panel shows: one table, one lookup.

Every unit the panel prints beside a field, a sweep input or a sweep's load comes from
:func:`quantity_of`, which reads the case file's one declaration (``workbench.case.declaration``):
change a key's quantity there and the panel's units follow.
"""

from __future__ import annotations

from collections.abc import Mapping

from workbench.case.declaration import key_quantities
from workbench.panel.document import Path

#: The quantity of each key, read from the case file's one declaration on every lookup.
_KEY_QUANTITY: Mapping[str, str | None] = key_quantities()


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
        A quantity :class:`~workbench.case.units.UnitSystem` knows (``"length"``,
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
