"""The ``design`` section of a case file: what the design must satisfy, and its fatigue settings.

The names a case may use for criteria, finishes and rules are declared here once; the design
rules that use them live in :mod:`workbench.design`, the settings' model in
:mod:`workbench.case.design`.
"""

import typing
from typing import Annotated, ClassVar, Literal

from msgspec import UNSET, Meta, UnsetType

from workbench.case.declaration.keys import (
    MAX_ITEMS,
    MAX_MODAL_ELEMENTS,
    Alternatives,
    Keys,
    Name,
    ShaftId,
    Span,
    key,
)

ShearCriterion = Literal["von_mises", "tresca", "shafting_code", "allowable"]
TwistRule = Literal["machine-shaft", "line-shaft", "twenty-diameters"]
FatigueCriterion = Literal["goodman", "gerber", "asme_elliptic", "soderberg"]
SurfaceFinish = Literal["polished", "ground", "machined", "cold-drawn", "hot-rolled", "as-forged"]
MeanConcentration = Literal["kfs", "none"]

#: Shear criteria a case may name (``design.shear_criterion``).
SHEAR_CRITERIA: tuple[str, ...] = typing.get_args(ShearCriterion)
#: Named twist-rate limits a case may give instead of a number: rules of thumb (common practice).
TWIST_RATE_RULES: tuple[str, ...] = typing.get_args(TwistRule)
#: Mean-stress criteria of the fatigue check (``design.fatigue.criterion``).
FATIGUE_CRITERIA: tuple[str, ...] = typing.get_args(FatigueCriterion)
#: Surface finishes of the Marin surface factor (``design.fatigue.finish``).
SURFACE_FINISHES: tuple[str, ...] = typing.get_args(SurfaceFinish)
#: How the mean stress is concentrated: ``"kfs"`` (Kfsm = Kfs, the conservative practice for
#: shafts) or ``"none"`` (the nominal mean stress, Kfsm = 1).
MEAN_CONCENTRATIONS: tuple[str, ...] = typing.get_args(MeanConcentration)
#: Each named choice above in the words a person reads (the panel's drop-downs, tables, charts),
#: one entry per key: a key added above without words here fails the declaration's tests.
CHOICE_WORDS: dict[str, str] = {
    # shear criteria
    "von_mises": "von Mises (distortion energy)",
    "tresca": "Tresca (maximum shear)",
    "shafting_code": "transmission shafting code",
    "allowable": "stated allowable",
    # twist-rate rules
    "machine-shaft": "machine shaft rule",
    "line-shaft": "line shaft rule",
    "twenty-diameters": "twenty diameters rule",
    # fatigue (mean-stress) criteria
    "goodman": "modified Goodman",
    "gerber": "Gerber",
    "asme_elliptic": "ASME elliptic",
    "soderberg": "Soderberg",
    # surface finishes
    "polished": "polished",
    "ground": "ground",
    "machined": "machined",
    "cold-drawn": "cold drawn",
    "hot-rolled": "hot rolled",
    "as-forged": "as forged",
    # mean stress concentration
    "kfs": "Kfs on the mean stress too",
    "none": "nominal mean stress",
}


def in_words(key: str) -> str:
    """A named choice of a case file (``"von_mises"``) as a person reads it; else the key, spaced."""
    return CHOICE_WORDS.get(key) or key.replace("_", " ")


def word_options(keys: tuple[str, ...]) -> list[tuple[str, str]]:
    """(words, key) pairs for a drop-down of named choices."""
    return [(in_words(key), key) for key in keys]


#: Reliabilities of the endurance limit a case may name (Shigley Table 6-5 rows).
RELIABILITIES: tuple[float, ...] = (0.5, 0.9, 0.95, 0.99, 0.999, 0.9999, 0.99999, 0.999999)

#: Relative widening of each running-speed band for the frequency check (±20 %: common practice,
#: no source).
DEFAULT_FREQUENCY_MARGIN = 0.2
#: Elements each segment with distributed inertia is cut into for the vibration analysis.
DEFAULT_MODAL_ELEMENTS_PER_SEGMENT = 8
#: Factor of safety on the shear yield strength when a case names none.
DEFAULT_FACTOR_OF_SAFETY = 2.0
#: Required fatigue factor of safety when a case names none.
DEFAULT_FATIGUE_FACTOR_OF_SAFETY = 1.5


class RotationLimit(Keys):
    """A limit on the relative rotation between two stations of one shaft."""

    span: ClassVar[Span] = Span("start", "end")

    shaft: ShaftId
    start: Annotated[float, key("The first station", "length")]
    end: Annotated[float, key("The second station, beyond start", "length")]
    limit: Annotated[float, key("Largest |θ(end) − θ(start)|", "angle", gt=0)]

    def __post_init__(self) -> None:
        self.span.check(self)


#: Where the coexisting stresses of ``design.coexisting_stresses`` come from: the key
#: reference, the check rows and the record say it in these words (defined here only).
COEXISTING_STRESS_ORIGIN = "stated from the engineer's own bending analysis, not computed here"


def _bending_stress(kind: str) -> Meta:
    """The key of a stated stress from bending of one kind (``"normal"``, ``"shear"``)."""
    description = (
        f"Largest {kind} stress from bending acting with torsion, {COEXISTING_STRESS_ORIGIN}"
    )
    return key(description, "stress", default=0.0, ge=0)


class CoexistingStress(Keys):
    """Stresses from bending that act with torsion on one segment of a section that warps.

    The warping checks add them at full value, with the sign of the torsional stress, at every
    point of the segment's section (their distribution over the section is not known here).
    """

    shaft: ShaftId
    segment: Annotated[
        float,
        key(
            "Index of the segment on its shaft, 0 for the first",
            expect="a whole number from 0",
            whole=True,
            ge=0,
        ),
    ]
    normal_stress: Annotated[float, _bending_stress("normal")] | UnsetType | None = UNSET
    shear_stress: Annotated[float, _bending_stress("shear")] | UnsetType | None = UNSET


class Fatigue(Keys):
    """How to check fatigue under fluctuating torque (``design.fatigue``)."""

    alternatives: ClassVar[Alternatives] = Alternatives((("extremes",), ("mean", "alternating")))

    extremes: (
        Annotated[
            list[Name],
            key(
                "The two results (load cases or combinations) the torque cycles between",
                expect="a list of exactly two result names",
                min_length=2,
                max_length=2,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    mean: (
        Annotated[Name, key("Instead of extremes: the result whose torques are the mean")]
        | UnsetType
        | None
    ) = UNSET
    alternating: (
        Annotated[Name, key("With mean: the result whose torques are the alternating amplitude")]
        | UnsetType
        | None
    ) = UNSET
    finish: (
        Annotated[
            SurfaceFinish,
            key("Surface finish for the Marin surface factor", default="machined", always=True),
        ]
        | UnsetType
        | None
    ) = UNSET
    reliability: (
        Annotated[
            float,
            key(
                "Reliability of the endurance limit (Shigley Table 6-5 rows)",
                default=0.5,
                always=True,
                choices=RELIABILITIES,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    temperature: (
        Annotated[
            float, key("Operating temperature in kelvin; room temperature when left out", gt=0)
        ]
        | UnsetType
        | None
    ) = UNSET
    criterion: (
        Annotated[FatigueCriterion, key("Mean-stress criterion", default="goodman", always=True)]
        | UnsetType
        | None
    ) = UNSET
    factor_of_safety: (
        Annotated[
            float,
            key(
                "Required fatigue factor of safety, also against first-cycle yield",
                default=DEFAULT_FATIGUE_FACTOR_OF_SAFETY,
                always=True,
                ge=1,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    endurance_limit: (
        Annotated[
            float,
            key("A tested rotating-beam endurance limit Se' instead of 0.5·Sut", "stress", gt=0),
        ]
        | UnsetType
        | None
    ) = UNSET
    mean_concentration: (
        Annotated[
            MeanConcentration,
            key("kfs: Kfs on the mean stress too; none: a nominal mean stress", default="kfs"),
        ]
        | UnsetType
        | None
    ) = UNSET

    def __post_init__(self) -> None:
        self.alternatives.check(self)


class Design(Keys):
    """Design criteria for the checks (``design``)."""

    factor_of_safety: (
        Annotated[
            float,
            key(
                "Divides the shear yield strength (von_mises, tresca)",
                default=DEFAULT_FACTOR_OF_SAFETY,
                always=True,
                ge=1,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    shear_criterion: (
        Annotated[
            ShearCriterion,
            key("How the allowable shear stress is found", default="von_mises", always=True),
        ]
        | UnsetType
        | None
    ) = UNSET
    keyway: (
        Annotated[bool, key("Whether the shafts have keyways (the shafting code's 25 % reduction, instead of a keyseat's Kts)", default=False, always=True)] | UnsetType | None
    ) = UNSET  # fmt: skip
    allowable_shear_stress: (
        Annotated[float, key("Stated allowable shear stress (criterion allowable)", "stress", gt=0)]
        | UnsetType
        | None
    ) = UNSET
    max_twist_rate: (
        Annotated[float, key("Largest rate of twist, or a named rule", "twist_rate", gt=0)]
        | TwistRule
        | UnsetType
        | None
    ) = UNSET
    rotation_limits: (
        Annotated[
            list[RotationLimit],
            key("Limits on relative rotation between stations", max_length=MAX_ITEMS),
        ]
        | UnsetType
        | None
    ) = UNSET
    frequency_margin: (
        Annotated[
            float,
            key(
                "Relative widening of each running-speed band for the frequency check",
                default=DEFAULT_FREQUENCY_MARGIN,
                expect="a fraction from 0 up to (not including) 1",
                ge=0,
                lt=1,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    modal_elements_per_segment: (
        Annotated[
            float,
            key(
                "Elements each segment with distributed inertia is cut into (vibration)",
                default=DEFAULT_MODAL_ELEMENTS_PER_SEGMENT,
                expect=f"a whole number from 1 to {MAX_MODAL_ELEMENTS:,}",
                whole=True,
                ge=1,
                le=MAX_MODAL_ELEMENTS,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
    modal_max_element_length: (
        Annotated[float, key("Longest such element", "length", gt=0)] | UnsetType | None
    ) = UNSET
    fatigue: Annotated[Fatigue, key("Fatigue under fluctuating torque")] | UnsetType | None = UNSET
    coexisting_stresses: (
        Annotated[
            list[CoexistingStress],
            key(
                "Bending stresses acting with torsion, by segment (warping checks of sections "
                "that warp); a segment not listed has none",
                max_length=MAX_ITEMS,
            ),
        ]
        | UnsetType
        | None
    ) = UNSET
