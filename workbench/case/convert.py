"""Numbers of a case file ⇄ SI, each by the quantity its key is declared in.

A :class:`Converter` is made for one case's units; it reads each key's quantity from the
declaration the first time it meets the key, so the loader, the saver and the schema always
agree on what a number is measured in.
"""

from __future__ import annotations

import math
from typing import Any

from msgspec import UNSET

from workbench.case.declaration import Keys, default_of, given, quantity_of
from workbench.case.errors import InputError
from workbench.case.units import SI, UnitSystem


def unit_system(units: Any) -> UnitSystem:
    """The unit system of a case file's ``units`` object (SI when it is left out)."""
    if not given(units):
        return SI
    named = {name: getattr(units, name) for name in units.__struct_fields__}
    return UnitSystem(**{name: value for name, value in named.items() if given(value)})


class Converter:
    """File units ⇄ SI for the keys of one case.

    Parameters
    ----------
    units
        The case's unit system.
    """

    def __init__(self, units: UnitSystem) -> None:
        self.units = units
        self._plans: dict[tuple[type, str], tuple[float, Any]] = {}

    def _plan(self, cls: type, name: str) -> tuple[float, Any]:
        """(factor to SI, declared default) of a key, read from the declaration once."""
        quantity = quantity_of(cls, name)
        plan = (self.units.factor(quantity) if quantity else 1.0, default_of(cls, name))
        self._plans[cls, name] = plan
        return plan

    def factor(self, cls: type, name: str) -> float:
        """The factor from the file's unit of key ``name`` of ``cls`` to SI (1 without a unit)."""
        plan = self._plans.get((cls, name)) or self._plan(cls, name)
        return plan[0]

    def si(self, entry: Any, name: str) -> Any:
        """Key ``name`` of ``entry`` in SI: its declared default when left out, ``None`` if none.

        Raises
        ------
        InputError
            On field ``name`` when the number is not finite, before or after the conversion.
        """
        raw = getattr(entry, name)
        cls = type(entry)
        factor, default = self._plans.get((cls, name)) or self._plan(cls, name)
        if raw is UNSET or raw is None:
            if default is None:
                return None
            raw = default
        value = raw * factor
        if not math.isfinite(value):
            raise InputError(name, self._not_finite(cls, name, raw))
        return value

    def _not_finite(self, cls: type, name: str, raw: float) -> str:
        if not math.isfinite(raw):
            return f"must be a finite number, not {raw}"
        quantity = quantity_of(cls, name)
        unit = f" {self.units.label(quantity)}" if quantity else ""
        return f"must be a finite number: {raw:g}{unit} is beyond the range of numbers in SI"

    def file_value(self, cls: type, name: str, value: Any) -> Any:
        """An SI value of key ``name`` of ``cls`` in the file's unit (``None`` stays ``None``)."""
        if value is None:
            return None
        return value / self.factor(cls, name)

    def entry(self, cls: type[Keys], source: Any, **given_values: Any) -> Any:
        """A declared object of ``cls`` from a model object with keys of the same names.

        Numbers with a quantity are converted from SI; ``None`` leaves a key out; keys the
        source has no attribute for are left out unless given in ``given_values``.
        """
        values: dict[str, Any] = {}
        for name in cls.__struct_fields__:
            if name in given_values:
                values[name] = given_values[name]
                continue
            value = getattr(source, name, None)
            if value is None:
                values[name] = UNSET
            elif quantity_of(cls, name) is not None and isinstance(value, float | int):
                values[name] = self.file_value(cls, name, value)
            else:
                values[name] = value
        return cls(**values)
