"""The one rule every check obeys: a value passes when it is at most its limit."""

from __future__ import annotations


class WithinLimit:
    """Mixin for a result with a ``value`` and a ``limit`` in the same unit.

    Utilisation is value/limit, and the result passes when the value is at most the limit.
    """

    value: float
    limit: float

    @property
    def utilisation(self) -> float:
        """value/limit."""
        return self.value / self.limit

    @property
    def passes(self) -> bool:
        """Whether the value is within its limit."""
        return self.value <= self.limit
