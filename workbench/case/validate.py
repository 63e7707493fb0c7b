"""Field checks shared by every reader of a case: finite, positive, non-negative; field paths.

Errors name the field by its dotted path in the case file (``shafts[0].segments[1].length``).

A quantity that must be greater than zero must also be a normal number: a subnormal one (below
:data:`SMALLEST_NORMAL` in SI) has lost digits, and dividing by it overflows, so a diameter of
1e-320 mm would give a torsion constant of exactly zero.
"""

from __future__ import annotations

import contextlib
import math
from collections.abc import Callable, Iterable, Iterator
from typing import Any, TypeVar

import numpy as np

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote

Item = TypeVar("Item")
Built = TypeVar("Built")

#: The smallest positive number held to full precision (about 2.2e-308): a positive quantity in SI
#: must be at least this, and so must every constant a formula makes of such quantities.
SMALLEST_NORMAL = float(np.finfo(float).tiny)
#: The largest finite number (about 1.8e308).
LARGEST = float(np.finfo(float).max)


def not_normal_positive(values: Any) -> Any:
    """Where values are not finite numbers of at least :data:`SMALLEST_NORMAL` (NaN included)."""
    return ~((values >= SMALLEST_NORMAL) & (values <= LARGEST))


def all_normal_positive(values: Any) -> bool:
    """Whether every value is a finite number of at least :data:`SMALLEST_NORMAL` (none: true).

    Two reductions, without a mask the size of the values: the common case, every value fine,
    costs two reads. NaN fails (a reduction holding one gives NaN).
    """
    return not np.size(values) or bool(
        np.min(values) >= SMALLEST_NORMAL and np.max(values) <= LARGEST
    )


def all_finite(values: Any) -> bool:
    """Whether every value is a finite number (none: true), without a mask the size of the values.

    One reduction finds the common case: a sum of finite numbers that stays finite. A sum
    holding an infinity or NaN is not finite, but neither is one that overflows: then the
    smallest and largest values tell.
    """
    if not np.size(values):
        return True
    with np.errstate(over="ignore", invalid="ignore"):  # an overflow is told apart just below
        if np.isfinite(np.sum(values)):
            return True
    return bool(np.isfinite(np.min(values)) and np.isfinite(np.max(values)))


def require_positive(name: str, value: float, quantity: str = "length") -> None:
    """Raise :class:`InputError` unless ``value`` is a finite normal number greater than zero."""
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        raise InputError(name, f"must be a number, not {quoted(value)}")
    if not math.isfinite(value):
        raise InputError(name, f"must be a finite number, not {value}")
    if value <= 0.0:
        raise InputError(name, f"must be greater than zero ({quote(value, quantity)})")
    if value < SMALLEST_NORMAL:
        raise InputError(name, too_small(value, quantity))


def too_small(value: float, quantity: str) -> str:
    """Why a positive value below :data:`SMALLEST_NORMAL` (in SI) is refused."""
    return (
        f"is too close to zero to compute with ({quote(value, quantity)}; the least is "
        f"{quote(SMALLEST_NORMAL, quantity)})"
    )


def require_non_negative(name: str, value: float, quantity: str = "length") -> None:
    """Raise :class:`InputError` unless ``value`` is a finite number of at least zero."""
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        raise InputError(name, f"must be a number, not {quoted(value)}")
    if not math.isfinite(value):
        raise InputError(name, f"must be a finite number, not {value}")
    if value < 0.0:
        raise InputError(name, f"must not be negative ({quote(value, quantity)})")


def join_path(prefix: str, name: str) -> str:
    """Join a field path and a sub-field: ``join_path("shafts[0]", "length")``."""
    if not prefix:
        return name
    if not name:
        return prefix
    return f"{prefix}{name}" if name.startswith("[") else f"{prefix}.{name}"


def within(prefix: str, error: InputError) -> InputError:
    """``error`` with its field put under ``prefix``: ``within("supports[1]", error)``."""
    return type(error)(join_path(prefix, error.field), error.message)


def build_each(
    items: Iterable[Item] | None, path: str, make: Callable[[Item], Built]
) -> tuple[Built, ...]:
    """``make`` of each item of a list at ``path``, errors named ``path[n].field``."""
    built = []
    for number, item in enumerate(items or ()):
        try:
            built.append(make(item))
        except InputError as error:
            raise within(f"{path}[{number}]", error) from None
    return tuple(built)


@contextlib.contextmanager
def field_path(prefix: str) -> Iterator[None]:
    """Prefix the field of any :class:`InputError` raised inside the block with ``prefix``."""
    try:
        yield
    except InputError as error:
        # Readers inside the block already name the full path; prefix only bare field names.
        if error.field == prefix or error.field.startswith((f"{prefix}.", f"{prefix}[")):
            raise
        raise within(prefix, error) from None


def require_finite(name: str, value: float) -> None:
    """Raise :class:`InputError` unless ``value`` is a finite real number (sign free)."""
    if not isinstance(value, (int, float)) or isinstance(value, bool):
        raise InputError(name, f"must be a number, not {quoted(value)}")
    if not math.isfinite(value):
        raise InputError(name, f"must be a finite number, not {value}")
