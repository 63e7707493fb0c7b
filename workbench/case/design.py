"""The ``design`` section of a case file: what the design must satisfy, in SI.

Plain settings, validated where they are read; the design rules that use them (allowables, twist
limits, fatigue) live in :mod:`workbench.design`. The names a case file may use for criteria,
finishes and rules are declared here once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from workbench.case.errors import InputError
from workbench.case.reader import ObjectReader
from workbench.case.units import UnitSystem
from workbench.case.validate import field_path, require_positive

#: Shear criteria a case may name (``design.shear_criterion``).
SHEAR_CRITERIA: tuple[str, ...] = ("von_mises", "tresca", "shafting_code", "allowable")

#: Named twist-rate limits a case may give instead of a number: rules of thumb (common practice).
TWIST_RATE_RULES: tuple[str, ...] = ("machine-shaft", "line-shaft", "twenty-diameters")

#: Mean-stress criteria of the fatigue check (``design.fatigue.criterion``).
FATIGUE_CRITERIA: tuple[str, ...] = ("goodman", "gerber", "asme_elliptic", "soderberg")

#: Surface finishes of the Marin surface factor (``design.fatigue.finish``).
SURFACE_FINISHES: tuple[str, ...] = (
    "polished",
    "ground",
    "machined",
    "cold-drawn",
    "hot-rolled",
    "as-forged",
)

#: Reliabilities of the endurance limit a case may name (Shigley Table 6-5 rows).
RELIABILITIES: tuple[float, ...] = (0.5, 0.9, 0.95, 0.99, 0.999, 0.9999, 0.99999, 0.999999)

#: Relative widening of each running-speed band for the frequency check (±20 %: common practice,
#: no source).
DEFAULT_FREQUENCY_MARGIN = 0.2

#: Elements each segment with distributed inertia is cut into for the vibration analysis.
DEFAULT_MODAL_ELEMENTS_PER_SEGMENT = 8

#: How the mean stress is concentrated: ``"kfs"`` (Kfsm = Kfs, the conservative practice for
#: shafts) or ``"none"`` (the nominal mean stress, Kfsm = 1).
MEAN_CONCENTRATIONS: tuple[str, ...] = ("kfs", "none")


@dataclass(frozen=True)
class FatigueCriteria:
    """How to check fatigue under fluctuating torque.

    Parameters
    ----------
    extremes
        Names of the two results (load cases or combinations) the torque cycles between.
    mean, alternating
        Instead of ``extremes``: the result whose torques are the mean torque, and the one whose
        torques are the alternating amplitude.
    finish
        Surface finish for the Marin surface factor: ``ground``, ``machined``, ``cold-drawn``,
        ``hot-rolled``, ``as-forged`` (or ``polished``).
    reliability
        Reliability of the endurance limit (0.5 … 0.999999, Shigley Table 6-5 values).
    temperature
        Operating temperature (K), or ``None`` for room temperature.
    criterion
        ``goodman``, ``gerber``, ``asme_elliptic`` or ``soderberg``.
    factor_of_safety
        Required fatigue factor of safety (≥ 1), also used against first-cycle yield.
    endurance_limit
        A tested rotating-beam endurance limit Se' (Pa) to use instead of the 0.5·Sut estimate.
    mean_concentration
        ``"kfs"`` (default): the fatigue stress-concentration factor multiplies the mean stress
        as well as the alternating one (Shigley's conservative practice for shafts);
        ``"none"``: the mean stress is nominal (Kfsm = 1), the practice of texts that put Kf
        into the endurance limit (Brown, *Marks' Calculations for Machine Design*, ch. 7).
        ``"none"`` relies on local yielding at the notch relieving the steady stress; it is not
        conservative for a notch that stays elastic.
    """

    extremes: tuple[str, str] | None = None
    mean: str | None = None
    alternating: str | None = None
    finish: str = "machined"
    reliability: float = 0.5
    temperature: float | None = None
    criterion: str = "goodman"
    factor_of_safety: float = 1.5
    endurance_limit: float | None = None
    mean_concentration: str = "kfs"

    def __post_init__(self) -> None:
        given_pair = self.mean is not None or self.alternating is not None
        if (self.extremes is None) == (not given_pair):
            what = "not both" if given_pair else "one of them is required"
            msg = f"give either extremes (two results) or mean and alternating, {what}"
            raise InputError("extremes", msg)
        if given_pair and (self.mean is None or self.alternating is None):
            raise InputError("alternating" if self.mean else "mean", "is required with the other")
        if self.extremes is not None and len(self.extremes) != 2:
            raise InputError("extremes", "must name exactly two results")
        if self.finish not in SURFACE_FINISHES:
            msg = f"unknown finish {self.finish!r}; choose one of {', '.join(SURFACE_FINISHES)}"
            raise InputError("finish", msg)
        if self.reliability not in RELIABILITIES:
            known = ", ".join(f"{r:g}" for r in RELIABILITIES)
            raise InputError("reliability", f"must be one of {known}, not {self.reliability!r}")
        if self.criterion not in FATIGUE_CRITERIA:
            msg = (
                f"unknown criterion {self.criterion!r}; choose one of {', '.join(FATIGUE_CRITERIA)}"
            )
            raise InputError("criterion", msg)
        if self.endurance_limit is not None:
            require_positive("endurance_limit", self.endurance_limit, "stress")
        if self.mean_concentration not in MEAN_CONCENTRATIONS:
            msg = (
                f"unknown mean_concentration {self.mean_concentration!r}; choose one of "
                f"{', '.join(MEAN_CONCENTRATIONS)}"
            )
            raise InputError("mean_concentration", msg)
        if self.temperature is not None and not (
            math.isfinite(self.temperature) and self.temperature > 0.0
        ):
            raise InputError(
                "temperature", f"must be a temperature above 0 K, not {self.temperature:g}"
            )
        if not (math.isfinite(self.factor_of_safety) and self.factor_of_safety >= 1.0):
            raise InputError(
                "factor_of_safety", f"must be at least 1, not {self.factor_of_safety:g}"
            )

    @property
    def result_names(self) -> tuple[str, str]:
        """The two results the check reads."""
        if self.extremes is not None:
            return self.extremes
        assert self.mean is not None and self.alternating is not None
        return self.mean, self.alternating

    @property
    def label(self) -> str:
        """What the check rows carry in their ``result`` column."""
        first, second = self.result_names
        if self.extremes is not None:
            return f"fatigue: {first} ↔ {second}"
        return f"fatigue: mean {first}, alternating {second}"


_FATIGUE_KEYS = (
    "extremes",
    "mean",
    "alternating",
    "finish",
    "reliability",
    "temperature",
    "criterion",
    "factor_of_safety",
    "endurance_limit",
    "mean_concentration",
)


def parse_fatigue(data: Any, units: UnitSystem) -> FatigueCriteria:
    """Read the case file's ``design.fatigue`` object.

    ``endurance_limit`` is in stress units, ``temperature`` in kelvin.
    """
    reader = ObjectReader(data, "design.fatigue", _FATIGUE_KEYS, units)
    extremes = data.get("extremes")
    if extremes is not None and (
        not isinstance(extremes, list) or not all(isinstance(name, str) for name in extremes)
    ):
        raise InputError("design.fatigue.extremes", "must be a list of two result names")
    with field_path("design.fatigue"):
        return FatigueCriteria(
            extremes=tuple(extremes) if extremes is not None else None,
            mean=reader.text("mean") if reader.has("mean") else None,
            alternating=reader.text("alternating") if reader.has("alternating") else None,
            finish=reader.text("finish", "machined"),
            reliability=reader.number("reliability", None, 0.5),
            temperature=reader.optional_number("temperature", None),
            criterion=reader.text("criterion", "goodman"),
            factor_of_safety=reader.number("factor_of_safety", None, 1.5),
            endurance_limit=reader.optional_number("endurance_limit", "stress"),
            mean_concentration=reader.text("mean_concentration", "kfs"),
        )


def fatigue_to_dict(criteria: FatigueCriteria, units: UnitSystem) -> dict[str, Any]:
    """The case file's ``design.fatigue`` object."""
    out: dict[str, Any] = {}
    if criteria.extremes is not None:
        out["extremes"] = list(criteria.extremes)
    else:
        out["mean"], out["alternating"] = criteria.mean, criteria.alternating
    out |= {
        "finish": criteria.finish,
        "reliability": criteria.reliability,
        "criterion": criteria.criterion,
        "factor_of_safety": criteria.factor_of_safety,
    }
    if criteria.temperature is not None:
        out["temperature"] = criteria.temperature
    if criteria.endurance_limit is not None:
        out["endurance_limit"] = float(f"{units.from_si(criteria.endurance_limit, 'stress'):.12g}")
    if criteria.mean_concentration != "kfs":
        out["mean_concentration"] = criteria.mean_concentration
    return out


@dataclass(frozen=True)
class RotationLimit:
    """A limit on the relative rotation between two stations of one shaft.

    Parameters
    ----------
    shaft
        Shaft id.
    start, end
        The two stations (m).
    limit
        Largest |θ(end) − θ(start)| (rad).
    """

    shaft: str
    start: float
    end: float
    limit: float

    def __post_init__(self) -> None:
        require_positive("limit", self.limit, "angle")


@dataclass(frozen=True)
class DesignCriteria:
    """What the design must satisfy.

    Parameters
    ----------
    factor_of_safety
        Divides the shear yield strength for the ``von_mises`` and ``tresca`` criteria (≥ 1).
    shear_criterion
        ``"von_mises"`` (Sy/√3), ``"tresca"`` (Sy/2), ``"shafting_code"`` (min(0.30 Sy, 0.18 Su),
        −25 % with keyways) or ``"allowable"`` (``allowable_shear_stress`` as stated).
    keyway
        Whether the shafts have keyways (the shafting code's 25 % reduction).
    allowable_shear_stress
        Stated allowable shear stress (Pa) for ``"allowable"``.
    max_twist_rate
        Largest rate of twist (rad/m), or ``None`` for no twist-rate check.
    rotation_limits
        Limits on relative rotation between stations.
    frequency_margin
        Relative widening of each running-speed band for the frequency check, 0 ≤ m < 1
        (default 0.2, ±20 %: common practice, no source).
    modal_elements_per_segment
        Elements each segment with distributed inertia is cut into for the vibration analysis.
    modal_max_element_length
        Longest such element (m), or ``None``.
    """

    factor_of_safety: float = 2.0
    shear_criterion: str = "von_mises"
    keyway: bool = False
    allowable_shear_stress: float | None = None
    max_twist_rate: float | None = None
    rotation_limits: tuple[RotationLimit, ...] = ()
    frequency_margin: float = DEFAULT_FREQUENCY_MARGIN
    modal_elements_per_segment: int = DEFAULT_MODAL_ELEMENTS_PER_SEGMENT
    modal_max_element_length: float | None = None
    fatigue: FatigueCriteria | None = None
    twist_rate_preset: str | None = None

    def __post_init__(self) -> None:
        if self.twist_rate_preset is not None and self.twist_rate_preset not in TWIST_RATE_RULES:
            msg = (
                f"unknown preset {self.twist_rate_preset!r}; give a number or one of "
                f"{', '.join(TWIST_RATE_RULES)}"
            )
            raise InputError("max_twist_rate", msg)
        if self.shear_criterion not in SHEAR_CRITERIA:
            msg = f"unknown criterion {self.shear_criterion!r}; choose one of {', '.join(SHEAR_CRITERIA)}"
            raise InputError("shear_criterion", msg)
        if (
            isinstance(self.factor_of_safety, bool)
            or not isinstance(self.factor_of_safety, (int, float))
            or not math.isfinite(self.factor_of_safety)
            or self.factor_of_safety < 1.0
        ):
            raise InputError(
                "factor_of_safety", f"must be at least 1, not {self.factor_of_safety:g}"
            )
        if self.shear_criterion == "allowable" and self.allowable_shear_stress is None:
            msg = "is required when shear_criterion is 'allowable'"
            raise InputError("allowable_shear_stress", msg)
        if self.allowable_shear_stress is not None:
            require_positive("allowable_shear_stress", self.allowable_shear_stress, "stress")
        if self.max_twist_rate is not None:
            require_positive("max_twist_rate", self.max_twist_rate, "twist_rate")
        self._check_vibration_settings()

    def _check_vibration_settings(self) -> None:
        margin = self.frequency_margin
        if (
            isinstance(margin, bool)
            or not isinstance(margin, (int, float))
            or not math.isfinite(margin)
            or not 0.0 <= margin < 1.0
        ):
            msg = f"must be a fraction from 0 up to (not including) 1, not {margin!r}"
            raise InputError("frequency_margin", msg)
        pieces = self.modal_elements_per_segment
        if isinstance(pieces, bool) or not isinstance(pieces, int) or pieces < 1:
            msg = f"must be a whole number of at least 1, not {pieces!r}"
            raise InputError("modal_elements_per_segment", msg)
        if self.modal_max_element_length is not None:
            require_positive("modal_max_element_length", self.modal_max_element_length)

    def key_points(self) -> list[tuple[str, float]]:
        """Stations the analysis must make nodes of (rotation-limit ends)."""
        return [(r.shaft, x) for r in self.rotation_limits for x in (r.start, r.end)]


_DESIGN_KEYS = {
    "factor_of_safety",
    "shear_criterion",
    "keyway",
    "allowable_shear_stress",
    "max_twist_rate",
    "rotation_limits",
    "frequency_margin",
    "modal_elements_per_segment",
    "modal_max_element_length",
    "fatigue",
}


def parse_design(data: Any, units: UnitSystem) -> DesignCriteria:
    """Read a case file's ``design`` object (in the file's units).

    ``max_twist_rate`` is in angle units per length unit; ``allowable_shear_stress`` in stress
    units; each ``rotation_limits`` entry is ``{"shaft", "start", "end", "limit"}``;
    ``frequency_margin`` is a fraction, ``modal_max_element_length`` in length units.
    """
    reader = ObjectReader(data, "design", _DESIGN_KEYS, units)
    limits = []
    for path, item in reader.items("rotation_limits"):
        entry = ObjectReader(item, path, ["shaft", "start", "end", "limit"], units)
        with field_path(path):
            limits.append(
                RotationLimit(
                    entry.text("shaft"),
                    entry.number("start", "length"),
                    entry.number("end", "length"),
                    entry.number("limit", "angle"),
                )
            )
    # Read outside field_path: the reader's errors already carry the full path.
    margin = reader.number("frequency_margin", None, DEFAULT_FREQUENCY_MARGIN)
    pieces = reader.number(
        "modal_elements_per_segment", None, float(DEFAULT_MODAL_ELEMENTS_PER_SEGMENT)
    )
    if not pieces.is_integer():
        msg = f"must be a whole number of at least 1, not {pieces:g}"
        raise InputError(reader.at("modal_elements_per_segment"), msg)
    longest = reader.optional_number("modal_max_element_length", "length")
    fatigue = parse_fatigue(data["fatigue"], units) if data.get("fatigue") is not None else None
    with field_path("design"):
        return DesignCriteria(
            factor_of_safety=reader.number("factor_of_safety", None, 2.0),
            shear_criterion=reader.text("shear_criterion", "von_mises"),
            keyway=reader.flag("keyway", False),
            allowable_shear_stress=reader.optional_number("allowable_shear_stress", "stress"),
            max_twist_rate=None
            if isinstance(data.get("max_twist_rate"), str)
            else reader.optional_number("max_twist_rate", "twist_rate"),
            twist_rate_preset=data["max_twist_rate"]
            if isinstance(data.get("max_twist_rate"), str)
            else None,
            rotation_limits=tuple(limits),
            frequency_margin=margin,
            modal_elements_per_segment=int(pieces),
            modal_max_element_length=longest,
            fatigue=fatigue,
        )


def design_to_dict(design: DesignCriteria, units: UnitSystem) -> dict[str, Any]:
    """The case file's ``design`` object for these criteria, in ``units``."""
    out: dict[str, Any] = {
        "factor_of_safety": design.factor_of_safety,
        "shear_criterion": design.shear_criterion,
        "keyway": design.keyway,
    }
    if design.allowable_shear_stress is not None:
        out["allowable_shear_stress"] = float(
            f"{units.from_si(design.allowable_shear_stress, 'stress'):.12g}"
        )
    if design.twist_rate_preset is not None:
        out["max_twist_rate"] = design.twist_rate_preset
    if design.max_twist_rate is not None:
        out["max_twist_rate"] = float(f"{units.from_si(design.max_twist_rate, 'twist_rate'):.12g}")
    if design.rotation_limits:
        out["rotation_limits"] = [
            {
                "shaft": r.shaft,
                "start": float(f"{units.from_si(r.start, 'length'):.12g}"),
                "end": float(f"{units.from_si(r.end, 'length'):.12g}"),
                "limit": float(f"{units.from_si(r.limit, 'angle'):.12g}"),
            }
            for r in design.rotation_limits
        ]
    # Vibration settings are written only when they differ from the defaults.
    defaults = DesignCriteria()
    if design.frequency_margin != defaults.frequency_margin:
        out["frequency_margin"] = design.frequency_margin
    if design.modal_elements_per_segment != defaults.modal_elements_per_segment:
        out["modal_elements_per_segment"] = design.modal_elements_per_segment
    if design.modal_max_element_length is not None:
        out["modal_max_element_length"] = float(
            f"{units.from_si(design.modal_max_element_length, 'length'):.12g}"
        )
    if design.fatigue is not None:
        out["fatigue"] = fatigue_to_dict(design.fatigue, units)
    return out
