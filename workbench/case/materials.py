"""Materials of torsion members: elastic constants, strengths and density, with their sources.

A :class:`Material` is a frozen dataclass in SI (Pa, kg/m³). :data:`LIBRARY` holds a set of common
engineering metals; every row names the publication and table its values come from, and says
"(from memory)" for each value that was recalled rather than read from a checked copy. Strengths
vary with grade, temper, product form and size: the library values are typical or minimum
textbook values for a first pass, not a substitute for the certified properties of the stock
actually bought.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering Design*, McGraw-Hill,
   Table A-5 (physical constants), Table A-20 (hot-rolled and cold-drawn carbon steels),
   Table A-21 (heat-treated steels), Table A-24 (cast iron, aluminium alloys).
.. [2] R. C. Hibbeler, *Mechanics of Materials*, Pearson, table of average mechanical properties
   of typical engineering materials.
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
_SHIGLEY_A5_STEEL = (
    "Shigley's Mechanical Engineering Design, Table A-5, carbon steel: E 207 GPa, G 79.3 GPa, "
    "ν 0.292; weight density 76.5 kN/m³ (from memory)"
)


def _shigley_carbon_steel(
    name: str, table_row: str, yield_mpa: float, ultimate_mpa: float
) -> Material:
    return Material(
        name=name,
        shear_modulus=79.3 * _GPA,
        yield_strength=yield_mpa * _MPA,
        ultimate_strength=ultimate_mpa * _MPA,
        elastic_modulus=207.0 * _GPA,
        poisson_ratio=0.292,
        density=76.5e3 / STANDARD_GRAVITY,
        source=(
            f"{_SHIGLEY_A5_STEEL}; strengths: Shigley Table A-20, {table_row}: "
            f"Sy {yield_mpa:g} MPa, Su {ultimate_mpa:g} MPa (from memory)"
        ),
    )


LIBRARY: dict[str, Material] = {
    "steel-1020-hr": _shigley_carbon_steel(
        "AISI 1020 hot-rolled steel", "AISI 1020 HR", 210.0, 380.0
    ),
    "steel-1020-cd": _shigley_carbon_steel(
        "AISI 1020 cold-drawn steel", "AISI 1020 CD", 390.0, 470.0
    ),
    "steel-1040-hr": _shigley_carbon_steel(
        "AISI 1040 hot-rolled steel", "AISI 1040 HR", 290.0, 520.0
    ),
    "steel-1040-cd": _shigley_carbon_steel(
        "AISI 1040 cold-drawn steel", "AISI 1040 CD", 490.0, 590.0
    ),
    "steel-1045-cd": _shigley_carbon_steel(
        "AISI 1045 cold-drawn steel", "AISI 1045 CD", 530.0, 630.0
    ),
    "steel-4140-qt650": Material(
        name="AISI 4140 alloy steel, quenched and tempered at 650 °C",
        shear_modulus=79.3 * _GPA,
        yield_strength=655.0 * _MPA,
        ultimate_strength=758.0 * _MPA,
        elastic_modulus=207.0 * _GPA,
        poisson_ratio=0.292,
        density=76.5e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, alloy steel: E 207 GPa, "
            "G 79.3 GPa, ν 0.292, weight density 76.5 kN/m³ (from memory: same row values as "
            "carbon steel); strengths: Shigley Table A-21, AISI 4140 Q&T 650 °C: Sy 655 MPa, "
            "Su 758 MPa (from memory)"
        ),
    ),
    "steel-a36": Material(
        name="ASTM A-36 structural steel",
        shear_modulus=75.0 * _GPA,
        yield_strength=250.0 * _MPA,
        ultimate_strength=400.0 * _MPA,
        elastic_modulus=200.0 * _GPA,
        poisson_ratio=0.32,
        density=7850.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, structural "
            "A-36 steel: G 75 GPa, Sy 250 MPa, Su 400 MPa; E 200 GPa, ν 0.32, "
            "density 7.85 Mg/m³ (from memory)"
        ),
    ),
    "stainless-304": Material(
        name="AISI 304 stainless steel",
        shear_modulus=75.0 * _GPA,
        yield_strength=207.0 * _MPA,
        ultimate_strength=517.0 * _MPA,
        elastic_modulus=193.0 * _GPA,
        poisson_ratio=0.27,
        density=7860.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, stainless "
            "304: G 75 GPa, Sy 207 MPa; Su 517 MPa, E 193 GPa, ν 0.27, density 7.86 Mg/m³ "
            "(from memory)"
        ),
    ),
    "aluminium-6061-t6": Material(
        name="Aluminium alloy 6061-T6",
        shear_modulus=26.0 * _GPA,
        yield_strength=255.0 * _MPA,
        ultimate_strength=290.0 * _MPA,
        elastic_modulus=68.9 * _GPA,
        poisson_ratio=0.35,
        density=2710.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, wrought "
            "aluminium 6061-T6: G 26 GPa, Sy 255 MPa, Su 290 MPa; E 68.9 GPa, ν 0.35, "
            "density 2.71 Mg/m³ (from memory)"
        ),
    ),
    "aluminium-2024-t3": Material(
        name="Aluminium alloy 2024-T3",
        shear_modulus=26.2 * _GPA,
        yield_strength=345.0 * _MPA,
        ultimate_strength=483.0 * _MPA,
        elastic_modulus=71.0 * _GPA,
        poisson_ratio=0.334,
        density=26.6e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, aluminium alloys: E 71.0 GPa, "
            "G 26.2 GPa, ν 0.334; weight density 26.6 kN/m³ (from memory); strengths: Shigley "
            "Table A-24, 2024-T3: Sy 345 MPa, Su 483 MPa (from memory)"
        ),
    ),
    "titanium-6al-4v": Material(
        name="Titanium alloy Ti-6Al-4V",
        shear_modulus=44.0 * _GPA,
        yield_strength=924.0 * _MPA,
        ultimate_strength=1000.0 * _MPA,
        elastic_modulus=120.0 * _GPA,
        poisson_ratio=0.36,
        density=4430.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, Ti-6Al-4V: "
            "G 44 GPa, Sy 924 MPa, Su 1000 MPa; E 120 GPa, ν 0.36, density 4.43 Mg/m³ "
            "(from memory)"
        ),
    ),
    "brass-red-c83400": Material(
        name="Red brass C83400",
        shear_modulus=37.0 * _GPA,
        yield_strength=70.0 * _MPA,
        ultimate_strength=241.0 * _MPA,
        elastic_modulus=101.0 * _GPA,
        poisson_ratio=0.35,
        density=8740.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, red brass "
            "C83400: G 37 GPa, Sy 70 MPa, Su 241 MPa, E 101 GPa, ν 0.35, density 8.74 Mg/m³ "
            "(all from memory)"
        ),
    ),
    "bronze-c86100": Material(
        name="Bronze C86100",
        shear_modulus=38.0 * _GPA,
        yield_strength=345.0 * _MPA,
        ultimate_strength=655.0 * _MPA,
        elastic_modulus=103.0 * _GPA,
        poisson_ratio=0.34,
        density=8830.0,
        source=(
            "Hibbeler, Mechanics of Materials, average mechanical properties table, bronze "
            "C86100: G 38 GPa, Sy 345 MPa, Su 655 MPa, E 103 GPa, ν 0.34, density 8.83 Mg/m³ "
            "(all from memory)"
        ),
    ),
    "brass": Material(
        name="Brass (strength not given: depends on alloy and temper)",
        shear_modulus=40.1 * _GPA,
        yield_strength=None,
        ultimate_strength=None,
        elastic_modulus=106.0 * _GPA,
        poisson_ratio=0.324,
        density=83.8e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, brass: E 106 GPa, G 40.1 GPa; "
            "ν 0.324, weight density 83.8 kN/m³ (from memory)"
        ),
    ),
    "phosphor-bronze": Material(
        name="Phosphor bronze (strength not given: depends on alloy and temper)",
        shear_modulus=41.4 * _GPA,
        yield_strength=None,
        ultimate_strength=None,
        elastic_modulus=111.0 * _GPA,
        poisson_ratio=0.349,
        density=80.1e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, phosphor bronze: E 111 GPa, "
            "G 41.4 GPa; ν 0.349, weight density 80.1 kN/m³ (from memory)"
        ),
    ),
    "copper": Material(
        name="Copper (strength not given: depends on temper)",
        shear_modulus=44.7 * _GPA,
        yield_strength=None,
        ultimate_strength=None,
        elastic_modulus=119.0 * _GPA,
        poisson_ratio=0.326,
        density=87.3e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, copper: E 119 GPa, G 44.7 GPa; "
            "ν 0.326, weight density 87.3 kN/m³ (from memory)"
        ),
    ),
    "cast-iron-grey-30": Material(
        name="Grey cast iron, ASTM class 30 (no yield point)",
        shear_modulus=41.4 * _GPA,
        yield_strength=None,
        ultimate_strength=214.0 * _MPA,
        elastic_modulus=100.0 * _GPA,
        poisson_ratio=0.211,
        density=70.6e3 / STANDARD_GRAVITY,
        source=(
            "Shigley's Mechanical Engineering Design, Table A-5, grey cast iron: E 100 GPa, "
            "G 41.4 GPa; ν 0.211, weight density 70.6 kN/m³ (from memory); tensile strength: "
            "Shigley Table A-24, ASTM 30: Su 214 MPa (from memory)"
        ),
    ),
}


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
