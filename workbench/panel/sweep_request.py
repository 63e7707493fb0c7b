"""What a sweep asks for: the input varied, its values, the result followed.

This is the contract between the What-if tab (:mod:`workbench.panel.whatif`, widgets only) and
the computation of a sweep (:mod:`workbench.panel.sweep`, which alone calls the solver). Moving
the computation onto another solver entry point changes that module only.
"""

from __future__ import annotations

from dataclasses import dataclass

from workbench.case.errors import InputError
from workbench.panel.document import Path

#: Results a sweep can follow, by key: (label, quantity of the value).
METRICS: dict[str, tuple[str, str | None]] = {
    "max_shear_stress": ("largest shear stress", "stress"),
    "max_angle": ("largest |angle of twist|", "angle"),
    "governing_utilisation": ("governing utilisation (all results)", None),
    "reaction": ("reaction of a support", "torque"),
}


@dataclass(frozen=True)
class SweepRequest:
    """One sweep.

    Parameters
    ----------
    path
        The input varied (a path into the case document).
    values
        Its values, in the document's units.
    metric
        A :data:`METRICS` key.
    result
        The load case or combination followed (the governing utilisation covers all results).
    support
        The support whose reaction is followed, for ``metric="reaction"``.
    """

    path: Path
    values: tuple[float, ...]
    metric: str
    result: str
    support: int = 0

    def __post_init__(self) -> None:
        if self.metric not in METRICS:
            msg = f"unknown result {self.metric!r}; choose one of {', '.join(METRICS)}"
            raise InputError("metric", msg)
        if not self.values:
            raise InputError("values", "a sweep needs at least one value")
