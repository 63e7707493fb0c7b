"""The ``design`` section of a case file: what the design must satisfy, in SI.

Plain settings, validated when built; the design rules that use them (allowables, twist limits,
fatigue) live in :mod:`workbench.design`. The keys of the section, the names a case may use for
criteria, finishes and rules, and the defaults are declared once in
:mod:`workbench.case.declaration.criteria`; :func:`design_criteria` builds the settings from
the declared section and :func:`design_section` writes them back.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from msgspec import UNSET

from workbench.case import declaration as declared
from workbench.case.convert import Converter
from workbench.case.declaration import (
    DEFAULT_FACTOR_OF_SAFETY,
    DEFAULT_FATIGUE_FACTOR_OF_SAFETY,
    DEFAULT_FREQUENCY_MARGIN,
    DEFAULT_MODAL_ELEMENTS_PER_SEGMENT,
    FATIGUE_CRITERIA,
    MAX_MODAL_ELEMENTS,
    MEAN_CONCENTRATIONS,
    RELIABILITIES,
    SHEAR_CRITERIA,
    SURFACE_FINISHES,
    TWIST_RATE_RULES,
    default_of,
    value_of,
)
from workbench.case.errors import InputError, quoted
from workbench.case.units import quote
from workbench.case.validate import build_each, require_positive, within

__all__ = [
    "DEFAULT_FACTOR_OF_SAFETY",
    "DEFAULT_FREQUENCY_MARGIN",
    "DEFAULT_MODAL_ELEMENTS_PER_SEGMENT",
    "FATIGUE_CRITERIA",
    "MEAN_CONCENTRATIONS",
    "RELIABILITIES",
    "SHEAR_CRITERIA",
    "SURFACE_FINISHES",
    "TWIST_RATE_RULES",
    "CoexistingStress",
    "DesignCriteria",
    "FatigueCriteria",
    "RotationLimit",
    "design_criteria",
    "design_section",
]


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
    finish: str = default_of(declared.Fatigue, "finish")
    reliability: float = default_of(declared.Fatigue, "reliability")
    temperature: float | None = None
    criterion: str = default_of(declared.Fatigue, "criterion")
    factor_of_safety: float = DEFAULT_FATIGUE_FACTOR_OF_SAFETY
    endurance_limit: float | None = None
    mean_concentration: str = default_of(declared.Fatigue, "mean_concentration")

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
            msg = (
                f"unknown finish {quoted(self.finish)}; choose one of {', '.join(SURFACE_FINISHES)}"
            )
            raise InputError("finish", msg)
        if self.reliability not in RELIABILITIES:
            known = ", ".join(f"{r:g}" for r in RELIABILITIES)
            raise InputError(
                "reliability", f"must be one of {known}, not {quoted(self.reliability)}"
            )
        if self.criterion not in FATIGUE_CRITERIA:
            msg = f"unknown criterion {quoted(self.criterion)}; choose one of {', '.join(FATIGUE_CRITERIA)}"
            raise InputError("criterion", msg)
        if self.endurance_limit is not None:
            require_positive("endurance_limit", self.endurance_limit, "stress")
        if self.mean_concentration not in MEAN_CONCENTRATIONS:
            msg = (
                f"unknown mean_concentration {quoted(self.mean_concentration)}; choose one of "
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


@dataclass(frozen=True)
class RotationLimit:
    """A limit on the relative rotation between two stations of one shaft.

    Parameters
    ----------
    shaft
        Shaft id.
    start, end
        The two stations (m), ``end`` beyond ``start``.
    limit
        Largest |θ(end) − θ(start)| (rad).
    """

    shaft: str
    start: float
    end: float
    limit: float

    def __post_init__(self) -> None:
        require_positive("limit", self.limit, "angle")
        problem = declared.RotationLimit.span.problem(
            self.start, self.end, lambda value: quote(value, "length")
        )
        if problem is not None:
            raise InputError("end", problem)


@dataclass(frozen=True)
class CoexistingStress:
    """Bending stresses acting with torsion on one segment (SI), as the engineer states them.

    Parameters
    ----------
    shaft
        Shaft id.
    segment
        Index of the segment on its shaft.
    normal_stress, shear_stress
        Largest normal and shear stress from bending (Pa), ≥ 0.
    """

    shaft: str
    segment: int
    normal_stress: float = 0.0
    shear_stress: float = 0.0

    def __post_init__(self) -> None:
        for name in ("normal_stress", "shear_stress"):
            value = getattr(self, name)
            if not (math.isfinite(value) and value >= 0.0):
                msg = f"must be a finite stress of at least 0, not {quote(value, 'stress')}"
                raise InputError(name, msg)


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
        Whether the shafts have keyways (the shafting code's 25 % reduction, instead of a
        keyseat's Kts).
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
    coexisting_stresses
        Bending stresses acting with torsion, by segment (the warping checks add them).
    """

    factor_of_safety: float = DEFAULT_FACTOR_OF_SAFETY
    shear_criterion: str = default_of(declared.Design, "shear_criterion")
    keyway: bool = False
    allowable_shear_stress: float | None = None
    max_twist_rate: float | None = None
    rotation_limits: tuple[RotationLimit, ...] = ()
    frequency_margin: float = DEFAULT_FREQUENCY_MARGIN
    modal_elements_per_segment: int = DEFAULT_MODAL_ELEMENTS_PER_SEGMENT
    modal_max_element_length: float | None = None
    fatigue: FatigueCriteria | None = None
    twist_rate_preset: str | None = None
    coexisting_stresses: tuple[CoexistingStress, ...] = ()

    def __post_init__(self) -> None:
        if self.twist_rate_preset is not None and self.twist_rate_preset not in TWIST_RATE_RULES:
            msg = (
                f"unknown preset {quoted(self.twist_rate_preset)}; give a number or one of "
                f"{', '.join(TWIST_RATE_RULES)}"
            )
            raise InputError("max_twist_rate", msg)
        if self.shear_criterion not in SHEAR_CRITERIA:
            msg = f"unknown criterion {quoted(self.shear_criterion)}; choose one of {', '.join(SHEAR_CRITERIA)}"
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
            msg = f"must be a fraction from 0 up to (not including) 1, not {quoted(margin)}"
            raise InputError("frequency_margin", msg)
        pieces = self.modal_elements_per_segment
        if (
            isinstance(pieces, bool)
            or not isinstance(pieces, int)
            or not 1 <= pieces <= MAX_MODAL_ELEMENTS
        ):
            msg = f"must be a whole number from 1 to {MAX_MODAL_ELEMENTS:,}, not {quoted(pieces)}"
            raise InputError("modal_elements_per_segment", msg)
        if self.modal_max_element_length is not None:
            require_positive("modal_max_element_length", self.modal_max_element_length)

    def key_points(self) -> list[tuple[str, float]]:
        """Stations the analysis must make nodes of (rotation-limit ends)."""
        return [(r.shaft, x) for r in self.rotation_limits for x in (r.start, r.end)]


def _fatigue_criteria(entry: declared.Fatigue, converter: Converter) -> FatigueCriteria:
    extremes = value_of(entry, "extremes")
    return FatigueCriteria(
        extremes=tuple(extremes) if extremes is not None else None,
        mean=value_of(entry, "mean"),
        alternating=value_of(entry, "alternating"),
        finish=value_of(entry, "finish"),
        reliability=value_of(entry, "reliability"),
        temperature=converter.si(entry, "temperature"),
        criterion=value_of(entry, "criterion"),
        factor_of_safety=value_of(entry, "factor_of_safety"),
        endurance_limit=converter.si(entry, "endurance_limit"),
        mean_concentration=value_of(entry, "mean_concentration"),
    )


def design_criteria(entry: declared.Design, converter: Converter) -> DesignCriteria:
    """The design settings (SI) of a case file's declared ``design`` section.

    Parameters
    ----------
    entry
        The decoded ``design`` object, in the file's units.
    converter
        The case's unit conversions.

    Raises
    ------
    InputError
        On a value the settings refuse, naming the field (``design.fatigue.reliability``).
    """
    try:
        limits = build_each(
            value_of(entry, "rotation_limits"),
            "rotation_limits",
            lambda limit: RotationLimit(
                limit.shaft,
                converter.si(limit, "start"),
                converter.si(limit, "end"),
                converter.si(limit, "limit"),
            ),
        )
        coexisting = build_each(
            value_of(entry, "coexisting_stresses"),
            "coexisting_stresses",
            lambda stated: CoexistingStress(
                stated.shaft,
                int(stated.segment),
                converter.si(stated, "normal_stress"),
                converter.si(stated, "shear_stress"),
            ),
        )
        fatigue = None
        if value_of(entry, "fatigue") is not None:
            try:
                fatigue = _fatigue_criteria(entry.fatigue, converter)  # type: ignore[arg-type]
            except InputError as error:
                raise within("fatigue", error) from None
        twist_rate = value_of(entry, "max_twist_rate")
        preset = twist_rate if isinstance(twist_rate, str) else None
        return DesignCriteria(
            factor_of_safety=value_of(entry, "factor_of_safety"),
            shear_criterion=value_of(entry, "shear_criterion"),
            keyway=value_of(entry, "keyway"),
            allowable_shear_stress=converter.si(entry, "allowable_shear_stress"),
            max_twist_rate=None if preset is not None else converter.si(entry, "max_twist_rate"),
            twist_rate_preset=preset,
            rotation_limits=limits,
            frequency_margin=value_of(entry, "frequency_margin"),
            modal_elements_per_segment=int(value_of(entry, "modal_elements_per_segment")),
            modal_max_element_length=converter.si(entry, "modal_max_element_length"),
            fatigue=fatigue,
            coexisting_stresses=coexisting,
        )
    except InputError as error:
        raise within("design", error) from None


def design_section(criteria: DesignCriteria, converter: Converter) -> declared.Design:
    """The declared ``design`` section of these settings, in the converter's units."""
    fatigue: Any = UNSET
    if criteria.fatigue is not None:
        extremes = criteria.fatigue.extremes
        fatigue = converter.entry(
            declared.Fatigue,
            criteria.fatigue,
            extremes=list(extremes) if extremes is not None else UNSET,
        )
    twist_rate: Any = criteria.twist_rate_preset or converter.file_value(
        declared.Design, "max_twist_rate", criteria.max_twist_rate
    )
    return converter.entry(
        declared.Design,
        criteria,
        max_twist_rate=UNSET if twist_rate is None else twist_rate,
        rotation_limits=[
            converter.entry(declared.RotationLimit, limit) for limit in criteria.rotation_limits
        ],
        fatigue=fatigue,
        coexisting_stresses=[
            converter.entry(declared.CoexistingStress, stated)
            for stated in criteria.coexisting_stresses
        ],
    )
