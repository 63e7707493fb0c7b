"""The parts of a torsion system other than its shafts, and the checks of their references.

Supports, gears, loads, combinations, discs and running-speed bands: frozen dataclasses in SI
units, each validating its own fields. :class:`References` checks their names and positions
against the shafts, which needs only each shaft's length, so that a model
(:class:`~workbench.solver.model.Model`) and a case solved straight from its columns
(:mod:`workbench.solver.case_columns`) run the same checks with the same messages.

Sign conventions (right-hand rule about each shaft's +x axis): applied torques, reactions and
rotations are positive along +x; a spring support exerts −stiffness·(θ − rotation).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from workbench.case.declaration import POSITION_TOLERANCE, MeshKind, SupportKind, WarpingKind
from workbench.case.design import DesignCriteria
from workbench.case.errors import InputError, listing, path_key, quoted
from workbench.case.units import display_units, quote
from workbench.case.validate import require_finite, require_non_negative, require_positive
from workbench.solver.sections import FloatArray


def check_segment_lengths(lengths: FloatArray) -> None:
    """Raise :class:`InputError` unless a shaft's segments add up and can be told apart.

    The shaft's length must be a finite number, and every segment longer than twice the
    position tolerance of it (plus the rounding of the running sum), so that no segment end
    merges with the next: a segment of 1e30 mm before one of 200 mm would otherwise swallow
    it, and the loads on it, without a word.

    Parameters
    ----------
    lengths
        (n_segments,) the segment lengths of one shaft (m), each a finite number above zero.

    Raises
    ------
    InputError
        On ``segments[j].length``: where the running sum overflows; else the segment out of
        scale, the longest when it dwarfs the rest, the shortest otherwise.
    """
    # Positions are reported in the file's unit: the sum must be finite there too.
    in_file_units = display_units.get().factor("length")
    with np.errstate(over="ignore"):  # an overflow of the sum is what is looked for
        ends = np.cumsum(lengths)
        shown = ends / in_file_units
    if not np.isfinite(shown[-1]):
        number = int(np.argmin(np.isfinite(shown)))
        msg = (
            "the segments up to this one add up to more than the largest number, "
            f"{float(np.finfo(float).max):.4g} {display_units.get().label('length')}"
        )
        raise InputError(f"segments[{number}].length", msg)
    total = float(ends[-1])
    least = 2.0 * POSITION_TOLERANCE * total + 8.0 * float(np.finfo(float).eps) * total
    shortest, longest = int(np.argmin(lengths)), int(np.argmax(lengths))
    if len(lengths) < 2 or lengths[shortest] > least:
        return
    typical = float(np.median(lengths))
    if lengths[longest] / typical > typical / lengths[shortest]:
        msg = (
            f"{quote(lengths[longest], 'length')} dwarfs segment {shortest} "
            f"({quote(lengths[shortest], 'length')}): each segment must be longer than "
            f"{2.0 * POSITION_TOLERANCE:g} of its shaft for its ends to be told apart"
        )
        raise InputError(f"segments[{longest}].length", msg)
    msg = (
        f"{quote(lengths[shortest], 'length')} is too short to tell its ends apart on a shaft "
        f"{quote(total, 'length')} long (each segment must be longer than "
        f"{2.0 * POSITION_TOLERANCE:g} of it)"
    )
    raise InputError(f"segments[{shortest}].length", msg)


@dataclass(frozen=True)
class Support:
    """A support that restrains a shaft's rotation at one point.

    Parameters
    ----------
    shaft
        Id of the shaft.
    x
        Position along the shaft (m).
    kind
        ``"fixed"``: the rotation there is held at ``rotation``; ``"spring"``: the support exerts
        −stiffness·(θ − rotation).
    stiffness
        Rotational stiffness of a spring support (N·m/rad).
    rotation
        Prescribed rotation of the support (rad): a misfit or pre-twist; 0 by default.
    warping
        ``"restrained"``: the support holds the section's warping (θ′ = 0, open sections that
        warp); ``"free"``: it leaves it; ``None``: not stated, taken as free.
    """

    shaft: str
    x: float
    kind: SupportKind = "fixed"
    stiffness: float | None = None
    rotation: float = 0.0
    warping: WarpingKind | None = None

    def __post_init__(self) -> None:
        require_finite("x", self.x)
        require_finite("rotation", self.rotation)
        if self.kind not in ("fixed", "spring"):
            raise InputError("kind", f"must be 'fixed' or 'spring', not {quoted(self.kind)}")
        if self.kind == "spring":
            if self.stiffness is None:
                raise InputError("stiffness", "a spring support needs a stiffness")
            require_positive("stiffness", self.stiffness, "stiffness")
        elif self.stiffness is not None:
            raise InputError("stiffness", "only a spring support takes a stiffness")
        if self.warping not in (None, "free", "restrained"):
            msg = f"must be 'restrained' or 'free', not {quoted(self.warping)}"
            raise InputError("warping", msg)


@dataclass(frozen=True)
class GearPosition:
    """Where one gear of a mesh sits.

    Parameters
    ----------
    shaft
        Id of the shaft carrying the gear.
    x
        Position along the shaft (m).
    radius
        Pitch radius (m).
    """

    shaft: str
    x: float
    radius: float

    def __post_init__(self) -> None:
        require_finite("x", self.x)
        require_positive("radius", self.radius)


@dataclass(frozen=True)
class GearMesh:
    """Two gears in mesh, rigid teeth, no backlash.

    Parameters
    ----------
    a, b
        The two gears.
    mesh
        ``"external"`` (the shafts turn in opposite senses: r_a·θ_a = −r_b·θ_b) or ``"internal"``
        (a pinion inside a ring gear, same sense: r_a·θ_a = r_b·θ_b).

    References
    ----------
    .. [1] Gere & Goodno, *Mechanics of Materials*, 8th ed., §3.8 (gear trains: compatibility of
       arc lengths at the pitch circles).
    """

    a: GearPosition
    b: GearPosition
    mesh: MeshKind = "external"

    def __post_init__(self) -> None:
        if self.mesh not in ("external", "internal"):
            raise InputError("mesh", f"must be 'external' or 'internal', not {quoted(self.mesh)}")

    @property
    def coefficients(self) -> tuple[float, float]:
        """(c_a, c_b) of the constraint c_a·θ_a + c_b·θ_b = 0 (m)."""
        sign = 1.0 if self.mesh == "external" else -1.0
        return self.a.radius, sign * self.b.radius


@dataclass(frozen=True)
class PointTorque:
    """A concentrated torque applied at a point.

    Parameters
    ----------
    shaft
        Id of the shaft.
    x
        Position (m).
    torque
        Torque (N·m), positive along +x.
    """

    shaft: str
    x: float
    torque: float

    def __post_init__(self) -> None:
        require_finite("x", self.x)
        require_finite("torque", self.torque)


@dataclass(frozen=True)
class DistributedTorque:
    """A distributed torque varying linearly from ``start`` to ``end``.

    Parameters
    ----------
    shaft
        Id of the shaft.
    start, end
        Where the load begins and ends (m), start < end.
    intensity_start, intensity_end
        Torque per length at start and at end (N·m/m), positive along +x.
    """

    shaft: str
    start: float
    end: float
    intensity_start: float
    intensity_end: float

    def __post_init__(self) -> None:
        for name in ("start", "end", "intensity_start", "intensity_end"):
            require_finite(name, getattr(self, name))
        if self.end <= self.start:
            msg = (
                f"must be greater than start ({quote(self.end, 'length')} ≤ "
                f"{quote(self.start, 'length')})"
            )
            raise InputError("end", msg)

    def intensity_at(self, x: FloatArray) -> FloatArray:
        """Intensity (N·m/m) at positions inside [start, end]."""
        fraction = (np.asarray(x) - self.start) / (self.end - self.start)
        return self.intensity_start + (self.intensity_end - self.intensity_start) * fraction

    @property
    def resultant(self) -> float:
        """Total torque (N·m)."""
        return 0.5 * (self.intensity_start + self.intensity_end) * (self.end - self.start)


@dataclass(frozen=True)
class LoadCase:
    """A named set of applied torques.

    Parameters
    ----------
    name
        Unique name.
    torques
        Point torques.
    distributed
        Distributed torques.
    """

    name: str
    torques: tuple[PointTorque, ...] = ()
    distributed: tuple[DistributedTorque, ...] = ()

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("name", f"must be a non-empty name, not {quoted(self.name)}")


@dataclass(frozen=True)
class Combination:
    """A factored sum of load cases, obtained by superposition of their results.

    Parameters
    ----------
    name
        Unique name (not shared with any load case).
    factors
        (load-case name, factor) pairs.

    Notes
    -----
    A support's prescribed rotation belongs to every load case, so a combination scales it with
    the factors like any other effect of its cases.
    """

    name: str
    factors: tuple[tuple[str, float], ...]

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("name", f"must be a non-empty name, not {quoted(self.name)}")
        if not self.factors:
            raise InputError("factors", "a combination needs at least one load case")
        for case_name, factor in self.factors:
            require_finite(f"factors.{case_name}", factor)

    @classmethod
    def of(cls, name: str, factors: Mapping[str, float]) -> Combination:
        """Build from a mapping of load-case name to factor."""
        return cls(name, tuple(factors.items()))


@dataclass(frozen=True)
class Disc:
    """A rigid disc (rotor, flywheel, gear blank, coupling hub) on a shaft, for vibration.

    Parameters
    ----------
    shaft
        Id of the shaft.
    x
        Position along the shaft (m).
    inertia
        Mass moment of inertia about the shaft's axis (kg·m²), greater than zero.

    References
    ----------
    .. [1] S. S. Rao, *Mechanical Vibrations*, torsional systems of discs on shafts (rotors of
       inertia J on shafts of stiffness k); chapter and section from memory.
    """

    shaft: str
    x: float
    inertia: float

    def __post_init__(self) -> None:
        require_finite("x", self.x)
        require_positive("inertia", self.inertia, "inertia")


@dataclass(frozen=True)
class OperatingSpeed:
    """A band of running speeds the natural frequencies must keep clear of.

    Parameters
    ----------
    name
        Unique name (not shared with any load case or combination).
    minimum, maximum
        Lowest and highest running speed (rad/s), 0 ≤ minimum ≤ maximum; the case file's
        ``min`` and ``max``.
    """

    name: str
    minimum: float
    maximum: float

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("name", f"must be a non-empty name, not {quoted(self.name)}")
        require_non_negative("min", self.minimum, "speed")
        require_positive("max", self.maximum, "speed")
        if self.maximum < self.minimum:
            msg = (
                f"must not be less than min ({quote(self.maximum, 'speed')} < "
                f"{quote(self.minimum, 'speed')})"
            )
            raise InputError("max", msg)


def result_names(
    load_cases: tuple[LoadCase, ...], combinations: tuple[Combination, ...]
) -> tuple[str, ...]:
    """Load cases, then combinations, in file order."""
    return tuple(case.name for case in load_cases) + tuple(
        combination.name for combination in combinations
    )


def require_load_cases(count: int) -> None:
    """Raise :class:`InputError` when a static analysis is asked of a case with no load case.

    A case needs load cases only for what it is loaded by (solve, check, size); its natural
    frequencies need none, so the case file may leave them out.
    """
    if count < 1:
        raise InputError("load_cases", "is required")


def shaft_index(shaft_ids: Iterable[str]) -> dict[str, int]:
    """Each shaft id and its number; :class:`InputError` on an id given twice."""
    index: dict[str, int] = {}
    for number, shaft_id in enumerate(shaft_ids):
        if shaft_id in index:
            raise InputError(f"shafts[{number}].id", f"duplicate shaft id {quoted(shaft_id)}")
        index[shaft_id] = number
    return index


class References:
    """The checks of a model's names and positions, which need only each shaft's length.

    A model checks itself with them; a case solved straight from its columns
    (:mod:`workbench.solver.case_columns`) runs the same checks without building its shafts.

    Parameters
    ----------
    index
        Shaft id → shaft number (:func:`shaft_index`).
    lengths
        Length of each shaft (m), in number order.
    segment_counts
        Number of segments of each shaft, in number order.
    """

    def __init__(
        self, index: Mapping[str, int], lengths: Sequence[float], segment_counts: Sequence[int]
    ) -> None:
        self.index, self.lengths, self.segment_counts = index, lengths, segment_counts

    def shaft(self, path: str, shaft_id: str) -> int:
        """The number of the named shaft; :class:`InputError` at ``path.shaft`` if unknown."""
        if shaft_id not in self.index:
            known = listing(self.index)
            raise InputError(f"{path}.shaft", f"unknown shaft {quoted(shaft_id)}; known: {known}")
        return self.index[shaft_id]

    def point(self, path: str, shaft_id: str, x: float, key: str) -> None:
        """Raise :class:`InputError` at ``path`` unless x lies on the named shaft."""
        length = self.lengths[self.shaft(path, shaft_id)]
        tolerance = POSITION_TOLERANCE * length
        if not -tolerance <= x <= length + tolerance:
            msg = (
                f"{quote(x, 'length')} is off shaft {quoted(shaft_id)}, which runs from 0 to "
                f"{quote(length, 'length')}"
            )
            raise InputError(f"{path}.{key}", msg)

    def check(
        self,
        *,
        supports: tuple[Support, ...],
        gears: tuple[GearMesh, ...],
        load_cases: tuple[LoadCase, ...],
        combinations: tuple[Combination, ...],
        design: DesignCriteria | None,
        discs: tuple[Disc, ...],
        operating_speeds: tuple[OperatingSpeed, ...],
        has_density: Callable[[], bool],
    ) -> None:
        """Raise :class:`InputError` on the first name or position that does not fit the shafts.

        Parameters
        ----------
        supports, gears, load_cases, combinations, design, discs, operating_speeds
            The model's parts other than its shafts.
        has_density
            Whether any segment's material has a density (asked only when needed).
        """
        point = self.point
        for number, support in enumerate(supports):
            point(f"supports[{number}]", support.shaft, support.x, "x")
        for number, gear in enumerate(gears):
            point(f"gears[{number}].a", gear.a.shaft, gear.a.x, "x")
            point(f"gears[{number}].b", gear.b.shaft, gear.b.x, "x")
            if gear.a.shaft == gear.b.shaft:
                raise InputError(
                    f"gears[{number}].b.shaft", "a gear cannot mesh with its own shaft"
                )
        names: set[str] = set()
        for number, case in enumerate(load_cases):
            if case.name in names:
                raise InputError(
                    f"load_cases[{number}].name", f"duplicate name {quoted(case.name)}"
                )
            names.add(case.name)
            for item, torque in enumerate(case.torques):
                point(f"load_cases[{number}].torques[{item}]", torque.shaft, torque.x, "x")
            for item, load in enumerate(case.distributed):
                path = f"load_cases[{number}].distributed[{item}]"
                point(path, load.shaft, load.start, "start")
                point(path, load.shaft, load.end, "end")
        case_names = set(names)
        for number, combination in enumerate(combinations):
            if combination.name in names:
                msg = (
                    f"duplicate name {quoted(combination.name)} (names are shared with load cases)"
                )
                raise InputError(f"combinations[{number}].name", msg)
            names.add(combination.name)
            for case_name, _ in combination.factors:
                if case_name not in case_names:
                    msg = f"unknown load case {quoted(case_name)}; known: {listing(sorted(case_names))}"
                    raise InputError(f"combinations[{number}].factors.{path_key(case_name)}", msg)
        self._check_vibration(names, discs, operating_speeds, has_density)
        if design is not None:
            self._check_design(design, result_names(load_cases, combinations))

    def _check_design(self, design: DesignCriteria, known: tuple[str, ...]) -> None:
        """Raise :class:`InputError` when a limit, a stated segment or a fatigue result is off."""
        for number, limit in enumerate(design.rotation_limits):
            path = f"design.rotation_limits[{number}]"
            self.point(path, limit.shaft, limit.start, "start")
            self.point(path, limit.shaft, limit.end, "end")
        stated: dict[tuple[str, int], int] = {}
        for number, coexisting in enumerate(design.coexisting_stresses):
            path = f"design.coexisting_stresses[{number}]"
            count = self.segment_counts[self.shaft(path, coexisting.shaft)]
            where = (coexisting.shaft, coexisting.segment)
            if coexisting.segment >= count:
                msg = (
                    f"is {coexisting.segment}, but shaft {quoted(coexisting.shaft)} has "
                    f"{count} segment{'s' if count != 1 else ''} (0 to {count - 1})"
                )
                raise InputError(f"{path}.segment", msg)
            if where in stated:
                msg = f"repeats design.coexisting_stresses[{stated[where]}]: one entry per segment"
                raise InputError(f"{path}.segment", msg)
            stated[where] = number
        fatigue = design.fatigue
        if fatigue is None:
            return
        keys = ("extremes", "extremes") if fatigue.extremes is not None else ("mean", "alternating")
        for key, name in zip(keys, fatigue.result_names, strict=True):
            if name not in known:
                msg = f"unknown load case or combination {quoted(name)}; known: {listing(known)}"
                raise InputError(f"design.fatigue.{key}", msg)

    def _check_vibration(
        self,
        result_names: set[str],
        discs: tuple[Disc, ...],
        operating_speeds: tuple[OperatingSpeed, ...],
        has_density: Callable[[], bool],
    ) -> None:
        for number, disc in enumerate(discs):
            self.point(f"discs[{number}]", disc.shaft, disc.x, "x")
        speed_names: set[str] = set()
        for number, speed in enumerate(operating_speeds):
            if speed.name in result_names or speed.name in speed_names:
                msg = (
                    f"duplicate name {quoted(speed.name)} (names are shared with load cases and "
                    "combinations)"
                )
                raise InputError(f"operating_speeds[{number}].name", msg)
            speed_names.add(speed.name)
        if operating_speeds and not discs and not has_density():
            msg = (
                "a frequency check needs inertia: give discs, or a density for the shafts' "
                "materials"
            )
            raise InputError("operating_speeds", msg)
