"""Materials of torsion members: elastic constants, strengths and density, with their sources.

A :class:`Material` is a frozen dataclass in SI (Pa, kg/m³). :data:`LIBRARY` holds a set of common
engineering metals. Every value of a row sits under the published table it was read from (book,
edition, table, row), or, where no table could be read, under :data:`TYPICAL`; a record asks for
the mill certificate of every material that carries that mark, and refuses a material whose
source says a value was recalled (:data:`FROM_MEMORY`). Strengths vary with grade, temper,
product form and size: the library values are textbook values for a first pass, not a substitute
for the certified properties of the stock actually bought.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, 9th ed.,
   McGraw-Hill, Table A-20 (hot-rolled and cold-drawn carbon steels, p. 1040), Table A-24
   (grey cast iron, aluminium alloys, p. 1046).
.. [2] R. C. Hibbeler, *Mechanics of Materials*, Pearson, table "Average Mechanical Properties of
   Typical Engineering Materials (SI Units)".
.. [3] W. D. Callister and D. G. Rethwisch, *Fundamentals of Materials Science and Engineering:
   An Integrated Approach*, 3rd ed., Wiley, Table B.2 (moduli of elasticity).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from dataclasses import dataclass

from workbench.case.errors import InputError, listing, quoted
from workbench.case.units import quote
from workbench.case.validate import require_positive

#: Standard acceleration of free fall (m/s²), to turn a tabulated weight density into a mass
#: density (CGPM 1901, exact by definition).
STANDARD_GRAVITY = 9.80665

_GPA = 1e9
_MPA = 1e6


@dataclass(frozen=True)
class Material:
    """An isotropic, linearly elastic material with optional strengths.

    Parameters
    ----------
    name
        Human-readable name, e.g. ``"AISI 1020 hot-rolled steel"``.
    shear_modulus
        Shear modulus G (Pa).
    yield_strength
        Tensile yield strength Sy (Pa), or ``None`` when the material has no defined yield
        (grey cast iron) or it has not been given.
    ultimate_strength
        Tensile ultimate strength Su (Pa), or ``None``.
    elastic_modulus
        Young's modulus E (Pa), or ``None``.
    poisson_ratio
        Poisson's ratio ν (dimensionless), or ``None``; -1 < ν ≤ 0.5.
    density
        Mass density ρ (kg/m³), or ``None``.
    source
        Publication and table the values come from.

    Raises
    ------
    InputError
        A value is not a finite positive number, ν is outside (-1, 0.5], or Sy > Su.

    References
    ----------
    .. [1] S. P. Timoshenko and J. N. Goodier, *Theory of Elasticity*, 3rd ed., McGraw-Hill, 1970,
       §6 (G = E/(2(1+ν)); positive bulk and shear moduli bound ν to (-1, 0.5]).
    """

    name: str
    shear_modulus: float
    yield_strength: float | None
    ultimate_strength: float | None
    elastic_modulus: float | None = None
    poisson_ratio: float | None = None
    density: float | None = None
    source: str = ""

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            msg = f"must be a non-empty string, not {quoted(self.name)}"
            raise InputError(field="name", message=msg)
        require_positive("shear_modulus", self.shear_modulus, "stress")
        for field_name, quantity in (
            ("yield_strength", "stress"),
            ("ultimate_strength", "stress"),
            ("elastic_modulus", "stress"),
            ("density", "density"),
        ):
            value = getattr(self, field_name)
            if value is not None:
                require_positive(field_name, value, quantity)
        ratio = self.poisson_ratio
        if ratio is not None:
            if not isinstance(ratio, (int, float)) or isinstance(ratio, bool):
                msg = f"must be a number, not {quoted(ratio)}"
                raise InputError(field="poisson_ratio", message=msg)
            if not (math.isfinite(ratio) and -1.0 < ratio <= 0.5):
                msg = f"must lie in (-1, 0.5] for an isotropic solid, not {ratio}"
                raise InputError(field="poisson_ratio", message=msg)
        if (
            self.yield_strength is not None
            and self.ultimate_strength is not None
            and self.yield_strength > self.ultimate_strength
        ):
            msg = (
                f"yield strength {quote(self.yield_strength, 'stress')} exceeds the ultimate "
                f"strength {quote(self.ultimate_strength, 'stress')}"
            )
            raise InputError(field="yield_strength", message=msg)
        if not isinstance(self.source, str):
            msg = f"must be a string, not {quoted(self.source)}"
            raise InputError(field="source", message=msg)


# --- the library ---------------------------------------------------------------------------------
#: The mark of a library value that could not be read from a published table; the record asks
#: for the mill certificate of every material carrying it. Defined here only.
TYPICAL = "typical — state the certified value"

#: Words that mark a recalled value; a record refuses to be written with them in a material.
FROM_MEMORY = "from memory"

_SHIGLEY = "R. G. Budynas and J. K. Nisbett, Shigley's Mechanical Engineering Design, 9th ed."
_SHIGLEY_A20 = f"{_SHIGLEY}, Table A-20 (p. 1040)"
_SHIGLEY_A24 = f"{_SHIGLEY}, Table A-24"
_CALLISTER_B2 = (
    "W. D. Callister and D. G. Rethwisch, Fundamentals of Materials Science and Engineering: "
    "An Integrated Approach, 3rd ed., Table B.2"
)
_HIBBELER = (
    "R. C. Hibbeler, Mechanics of Materials, table 'Average Mechanical Properties of Typical "
    "Engineering Materials (SI Units)' (edition not shown in the copy read)"
)
_KPSI = 6.894757293168e6  # Pa per kpsi (NIST SP 811, exact from the pound and the inch)

#: Field of :class:`Material` → (symbol, unit shown, Pa or kg/m³ per unit shown), in the order a
#: source lists them.
_SHOWN = {
    "shear_modulus": ("G", "GPa", _GPA),
    "elastic_modulus": ("E", "GPa", _GPA),
    "poisson_ratio": ("ν", "", 1.0),
    "density": ("ρ", "kg/m³", 1.0),
    "yield_strength": ("Sy", "MPa", _MPA),
    "ultimate_strength": ("Su", "MPa", _MPA),
}

_STEEL_TYPICAL = {
    "shear_modulus": 79.3 * _GPA,
    "poisson_ratio": 0.292,
    "density": 76.5e3 / STANDARD_GRAVITY,
}

#: Library rows: key → (name, {reference: {field: value in SI}}). Every value sits under the
#: published table it was read from, or under :data:`TYPICAL`.
_ROWS: dict[str, tuple[str, dict[str, dict[str, float]]]] = {
    "steel-1020-hr": (
        "AISI 1020 hot-rolled steel",
        {
            f"{_SHIGLEY_A20}, 1020 HR": {
                "yield_strength": 210 * _MPA,
                "ultimate_strength": 380 * _MPA,
            },
            f"{_CALLISTER_B2}, steel alloy 1020": {"elastic_modulus": 207 * _GPA},
            TYPICAL: _STEEL_TYPICAL,
        },
    ),
    "steel-1020-cd": (
        "AISI 1020 cold-drawn steel",
        {
            f"{_SHIGLEY_A20}, 1020 CD": {
                "yield_strength": 390 * _MPA,
                "ultimate_strength": 470 * _MPA,
            },
            f"{_CALLISTER_B2}, steel alloy 1020": {"elastic_modulus": 207 * _GPA},
            TYPICAL: _STEEL_TYPICAL,
        },
    ),
    "steel-1040-hr": (
        "AISI 1040 hot-rolled steel",
        {
            f"{_SHIGLEY_A20}, 1040 HR": {
                "yield_strength": 290 * _MPA,
                "ultimate_strength": 520 * _MPA,
            },
            f"{_CALLISTER_B2}, steel alloy 1040": {"elastic_modulus": 207 * _GPA},
            TYPICAL: _STEEL_TYPICAL,
        },
    ),
    "steel-1040-cd": (
        "AISI 1040 cold-drawn steel",
        {
            f"{_SHIGLEY_A20}, 1040 CD": {
                "yield_strength": 490 * _MPA,
                "ultimate_strength": 590 * _MPA,
            },
            f"{_CALLISTER_B2}, steel alloy 1040": {"elastic_modulus": 207 * _GPA},
            TYPICAL: _STEEL_TYPICAL,
        },
    ),
    "steel-1045-cd": (
        "AISI 1045 cold-drawn steel",
        {
            f"{_SHIGLEY_A20}, 1045 CD": {
                "yield_strength": 530 * _MPA,
                "ultimate_strength": 630 * _MPA,
            },
            TYPICAL: {"elastic_modulus": 207 * _GPA, **_STEEL_TYPICAL},
        },
    ),
    "steel-4140-qt650": (
        "AISI 4140 alloy steel, quenched and tempered at 650 °C",
        {
            f"{_CALLISTER_B2}, steel alloy 4140": {"elastic_modulus": 207 * _GPA},
            TYPICAL: {
                "yield_strength": 655 * _MPA,
                "ultimate_strength": 758 * _MPA,
                **_STEEL_TYPICAL,
            },
        },
    ),
    "steel-a36": (
        "ASTM A-36 structural steel",
        {
            f"{_HIBBELER}, structural steel A-36": {
                "shear_modulus": 75 * _GPA,
                "elastic_modulus": 200 * _GPA,
                "poisson_ratio": 0.32,
                "density": 7850.0,
                "yield_strength": 250 * _MPA,
                "ultimate_strength": 400 * _MPA,
            },
        },
    ),
    "stainless-304": (
        "AISI 304 stainless steel",
        {
            f"{_HIBBELER}, stainless 304": {
                "shear_modulus": 75 * _GPA,
                "elastic_modulus": 193 * _GPA,
                "poisson_ratio": 0.27,
                "density": 7860.0,
                "yield_strength": 207 * _MPA,
                "ultimate_strength": 517 * _MPA,
            },
        },
    ),
    "aluminium-6061-t6": (
        "Aluminium alloy 6061-T6",
        {
            f"{_HIBBELER}, wrought aluminium 6061-T6": {
                "shear_modulus": 26 * _GPA,
                "elastic_modulus": 68.9 * _GPA,
                "poisson_ratio": 0.35,
                "density": 2710.0,
                "yield_strength": 255 * _MPA,
                "ultimate_strength": 290 * _MPA,
            },
        },
    ),
    "aluminium-2024-t3": (
        "Aluminium alloy 2024-T3",
        {
            f"{_SHIGLEY_A24}(b) (p. 1046), wrought 2024 T3": {
                "yield_strength": 345 * _MPA,
                "ultimate_strength": 482 * _MPA,
            },
            TYPICAL: {
                "shear_modulus": 26.2 * _GPA,
                "elastic_modulus": 71.0 * _GPA,
                "poisson_ratio": 0.334,
                "density": 26.6e3 / STANDARD_GRAVITY,
            },
        },
    ),
    "titanium-6al-4v": (
        "Titanium alloy Ti-6Al-4V",
        {
            f"{_HIBBELER}, titanium alloy Ti-6Al-4V": {
                "shear_modulus": 44 * _GPA,
                "elastic_modulus": 120 * _GPA,
                "poisson_ratio": 0.36,
                "density": 4430.0,
                "yield_strength": 924 * _MPA,
                "ultimate_strength": 1000 * _MPA,
            },
        },
    ),
    "brass-red-c83400": (
        "Red brass C83400",
        {
            f"{_HIBBELER}, red brass C83400": {
                "shear_modulus": 37 * _GPA,
                "elastic_modulus": 101 * _GPA,
                "poisson_ratio": 0.35,
                "density": 8740.0,
                "yield_strength": 70 * _MPA,
                "ultimate_strength": 241 * _MPA,
            },
        },
    ),
    "bronze-c86100": (
        "Bronze C86100",
        {
            f"{_HIBBELER}, bronze C86100": {
                "shear_modulus": 38 * _GPA,
                "elastic_modulus": 103 * _GPA,
                "poisson_ratio": 0.34,
                "density": 8830.0,
                "yield_strength": 345 * _MPA,
                "ultimate_strength": 655 * _MPA,
            },
        },
    ),
    "brass": (
        "Brass (strength not given: depends on alloy and temper)",
        {
            TYPICAL: {
                "shear_modulus": 40.1 * _GPA,
                "elastic_modulus": 106 * _GPA,
                "poisson_ratio": 0.324,
                "density": 83.8e3 / STANDARD_GRAVITY,
            },
        },
    ),
    "phosphor-bronze": (
        "Phosphor bronze (strength not given: depends on alloy and temper)",
        {
            TYPICAL: {
                "shear_modulus": 41.4 * _GPA,
                "elastic_modulus": 111 * _GPA,
                "poisson_ratio": 0.349,
                "density": 80.1e3 / STANDARD_GRAVITY,
            },
        },
    ),
    "copper": (
        "Copper (strength not given: depends on temper)",
        {
            TYPICAL: {
                "shear_modulus": 44.7 * _GPA,
                "elastic_modulus": 119 * _GPA,
                "poisson_ratio": 0.326,
                "density": 87.3e3 / STANDARD_GRAVITY,
            },
        },
    ),
    "cast-iron-grey-30": (
        "Grey cast iron, ASTM class 30 (no yield point)",
        {
            f"{_SHIGLEY_A24}(a) (p. 1046), ASTM 30, Sut 31 kpsi": {"ultimate_strength": 31 * _KPSI},
            TYPICAL: {
                "shear_modulus": 41.4 * _GPA,
                "elastic_modulus": 100 * _GPA,
                "poisson_ratio": 0.211,
                "density": 70.6e3 / STANDARD_GRAVITY,
            },
        },
    ),
}


def _shown(field: str, value: float) -> str:
    symbol, unit, scale = _SHOWN[field]
    return f"{symbol} {value / scale:.4g}" + (f" {unit}" if unit else "")


def _library_material(name: str, references: dict[str, dict[str, float]]) -> Material:
    values: dict[str, float] = {}
    parts = []
    for reference, cited in references.items():
        values.update(cited)
        shown = [_shown(field, cited[field]) for field in _SHOWN if field in cited]
        parts.append(f"{', '.join(shown)}: {reference}")
    return Material(
        name=name,
        shear_modulus=values.pop("shear_modulus"),
        yield_strength=values.pop("yield_strength", None),
        ultimate_strength=values.pop("ultimate_strength", None),
        source="; ".join(parts),
        **values,
    )


LIBRARY: dict[str, Material] = {key: _library_material(*row) for key, row in _ROWS.items()}

#: For each library key, the reference (or :data:`TYPICAL`) of each value it gives.
PROVENANCE: dict[str, dict[str, str]] = {
    key: {field: reference for reference, cited in references.items() for field in cited}
    for key, (_, references) in _ROWS.items()
}


def needs_certificate(material: Material) -> bool:
    """Whether ``material`` carries a value marked :data:`TYPICAL` (its mill certificate is due).

    References
    ----------
    .. [1] See :data:`TYPICAL`.
    """
    return TYPICAL in material.source


def recalled(material: Material) -> bool:
    """Whether ``material``'s source says a value was recalled (:data:`FROM_MEMORY`)."""
    return FROM_MEMORY in material.source.lower()


def closest_names(name: str, names: Iterable[str]) -> str:
    """``"; did you mean 'a', 'b'?"``: up to three of ``names`` close to ``name``, or ``""``.

    The names themselves may be many; the message stays one short line.
    """
    close = difflib.get_close_matches(name, list(names), n=3, cutoff=0.5)
    return f"; did you mean {listing(close)}?" if close else ""


def library_material(name: str) -> Material:
    """Return a material of :data:`LIBRARY` by its key.

    Parameters
    ----------
    name
        Library key, e.g. ``"steel-1020-hr"``; case and surrounding blanks are ignored.

    Returns
    -------
    Material
        The library row.

    Raises
    ------
    InputError
        On field ``"material"`` when no row has that key; the message lists close matches.

    References
    ----------
    .. [1] See :mod:`workbench.case.materials` (each row's ``source``).
    """
    key = name.strip().lower() if isinstance(name, str) else ""
    if key in LIBRARY:
        return LIBRARY[key]
    msg = f"no library material named {quoted(name)}{closest_names(key, LIBRARY)}"
    raise InputError(field="material", message=msg)
