"""What ``workbench size`` is asked: which segments, which sizes, from the command line's words.

A value the request refuses is named by the option that gave it (``--segment``, ``--sizes``,
``--min-fraction``...), and a segment the preferred numbers cannot reach by its section.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.design.preferred import RENARD_SERIES, VALUE_RANGE
from workbench.solver.model import Model, Segment
from workbench.solver.sections import SolidCircle, TaperedCircle, Tube

__all__ = ["SizingRequest", "require_preferred", "sizable"]

#: The command-line option that gives each field of a :class:`SizingRequest`.
_OPTIONS = {
    "segments": "--segment",
    "series": "--series",
    "sizes": "--sizes",
    "keep": "--keep",
    "minimum_fraction": "--min-fraction",
}


@dataclass(frozen=True)
class SizingRequest:
    """What to size and how.

    Parameters
    ----------
    segments
        (shaft id, segment index) of each segment to size.
    series
        Renard series of preferred sizes (``"R5"`` … ``"R40"``), in the case's length unit,
        unless ``sizes`` is given.
    sizes
        Allowed outer diameters (m), ascending; replaces the series when given.
    keep
        For tubes and bored tapers: ``"ratio"`` keeps bore/outer, ``"wall"`` keeps the wall
        thickness.
    minimum_fraction
        No segment goes below this fraction of its starting diameter. In an indeterminate shaft
        a segment can shed torque as it shrinks (its stress then falls with its size), so the
        checks alone may never stop it; such a segment ends at this floor and is reported as
        governed by no check. Default 0.25 (our choice; a practical floor, no source).
    """

    segments: tuple[tuple[str, int], ...]
    series: str = "R40"
    sizes: tuple[float, ...] = ()
    keep: str = "ratio"
    minimum_fraction: float = 0.25

    def __post_init__(self) -> None:
        if self.series not in RENARD_SERIES:
            raise InputError(
                "series", f"unknown series {quoted(self.series)}; choose R5, R10, R20, R40"
            )
        if self.keep not in ("ratio", "wall"):
            raise InputError("keep", f"must be 'ratio' or 'wall', not {quoted(self.keep)}")
        if not self.segments:
            raise InputError("segments", "choose at least one segment to size")
        if not 0.0 < self.minimum_fraction <= 1.0:
            raise InputError("minimum_fraction", "must lie in (0, 1]")

    @classmethod
    def from_arguments(
        cls,
        model: Model,
        segments: Sequence[str] | None,
        series: str = "R40",
        sizes: str | None = None,
        keep: str = "ratio",
        minimum_fraction: float = 0.25,
    ) -> SizingRequest:
        """Build from command-line words: ``["main:0", "main:2"]``, ``"40,45,50"`` (file units)."""
        chosen: list[tuple[str, int]] = []
        if segments:
            for word in segments:
                shaft_id, _, index = word.rpartition(":")
                if not shaft_id or not index.isdigit():
                    raise InputError("--segment", f"expected SHAFT:INDEX, not {quoted(word)}")
                chosen.append((shaft_id, int(index)))
        else:
            chosen = [
                (shaft.id, number)
                for shaft in model.shafts
                for number, segment in enumerate(shaft.segments)
                if sizable(segment)
            ]
        allowed: tuple[float, ...] = ()
        if sizes:
            try:
                values = [float(word) for word in sizes.split(",") if word.strip()]
            except ValueError:
                raise InputError(
                    "--sizes", f"expected comma-separated numbers, not {quoted(sizes)}"
                ) from None
            if not values or any(not value > 0 for value in values):
                raise InputError("--sizes", "sizes must be positive numbers")
            allowed = tuple(sorted(model.units.to_si(value, "length") for value in values))
        if not chosen:
            msg = "no segment of the case has a round section to size; name segments as SHAFT:INDEX"
            raise InputError("--segment", msg)
        try:
            return cls(tuple(chosen), series, allowed, keep, minimum_fraction)
        except InputError as error:  # named by the option that gave the value
            raise InputError(_OPTIONS.get(error.field, error.field), error.message) from None


def sizable(segment: Segment) -> bool:
    """Whether a segment can be sized by its diameter: one solid, tube or tapered layer."""
    return len(segment.layers) == 1 and isinstance(
        segment.layers[0].section, (SolidCircle, Tube, TaperedCircle)
    )


def require_preferred(model: Model, request: SizingRequest, diameters: tuple[float, ...]) -> None:
    """Refuse, by its section, a segment whose size the preferred numbers cannot reach."""
    low, high = (value * model.units.factor("length") for value in VALUE_RANGE)
    for (shaft_id, number), diameter in zip(request.segments, diameters, strict=True):
        if not low * 10.0 <= diameter * request.minimum_fraction <= diameter <= high / 10.0:
            path = f"shafts[{model.shaft_number(shaft_id)}].segments[{number}].section"
            msg = (
                f"a size of {quote(diameter, 'length')} cannot be sized: preferred numbers run "
                f"from {quote(low, 'length')} to {quote(high, 'length')}; give --sizes"
            )
            raise InputError(path, msg)
