"""The fixed equations of the record's method section, pre-rendered as SVG files.

The equations never change from one record to the next, so they are drawn once, when the
package is built, and shipped with the record template in
``templates/workbench_record/static/equations/``: one SVG file per equation and
``index.json`` naming, for each, the source it was drawn from, its size and its SHA-256. An
export only reads these files (once per process), so making a record needs no plotting
library.

To redraw them after changing :data:`EQUATIONS` (needs matplotlib, a build-time tool only)::

    python -m workbench.record.equations

matplotlib's mathtext draws each equation with its SVG backend (no pyplot, no global figure
state), text as paths (a reader needs no font), under a fixed ``svg.hashsalt`` and without a
``Date``: the same matplotlib gives the same bytes.

References
----------
.. [1] J. M. Gere and B. J. Goodno, *Mechanics of Materials*, 8th ed., Cengage, 2013, ch. 3
   (rate of twist, shear stress, polar moment, internal torque; §3.8 compatibility).
.. [2] W. D. Pilkey, *Formulas for Stress, Strain, and Structural Matrices*, 2nd ed., Wiley,
   2005, ch. 14 (element stiffness of a bar in torsion from its flexibility).
.. [3] V. Z. Vlasov, *Thin-Walled Elastic Beams*, 2nd ed., 1961 (restrained torsion of
   thin-walled open members: the governing equation, bimoment, warping stresses).
"""

from __future__ import annotations

import functools
import hashlib
import io
import json
import sys
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from workbench.case.errors import InputError
from workbench.record.templating import TEMPLATE_NAME, templates_dir

__all__ = ["EQUATIONS", "Equation", "equation_file", "equations_dir", "load_equations", "main"]

#: Font size the equations are drawn at (pt); shown at their natural size.
EQUATION_SIZE = 12.0

#: Fixed salt for the ids matplotlib writes into SVG (clip paths, glyphs): stable bytes.
SVG_HASH_SALT = "workbench-record"

_RC: Any = {
    "svg.hashsalt": SVG_HASH_SALT,
    "svg.fonttype": "path",
    "font.family": "DejaVu Sans",
    "mathtext.fontset": "dejavusans",
}


@dataclass(frozen=True)
class Equation:
    """One equation of the method.

    Attributes
    ----------
    name
        File stem of its picture.
    tex
        The equation in matplotlib mathtext (a TeX subset), without the surrounding ``$``.
    reading
        A plain-text reading of it (the picture's alternative text).
    meaning
        What it states, shown beside it.
    group
        The record section that shows it: ``"statics"`` (Method and assumptions),
        ``"vibration"`` (Torsional vibration), ``"fatigue"`` (Fatigue), ``"warping"`` (Restrained
        warping, cases that warp only) or ``"independent"``
        (Independent check).
    """

    name: str
    tex: str
    reading: str
    meaning: str
    group: str = "statics"


#: Equations of the method, in the order the record numbers them.
EQUATIONS: tuple[Equation, ...] = (
    Equation(
        "twist-rate",
        r"\dfrac{d\theta}{dx} = \dfrac{T(x)}{G\,J(x)}",
        "dθ/dx = T(x)/(G·J(x))",
        "rate of twist (Saint-Venant torsion, circular section)",
    ),
    Equation(
        "shear-stress",
        r"\tau_{max} = \dfrac{T\,r_o}{J}",
        "τ_max = T·r_o/J",
        "largest shear stress on the section",
    ),
    Equation(
        "polar-moment",
        r"J_{solid} = \dfrac{\pi D^4}{32},\qquad J_{tube} = \dfrac{\pi (D^4 - d^4)}{32}",
        "J = πD⁴/32 (solid), π(D⁴ − d⁴)/32 (tube)",
        "polar moment of area",
    ),
    Equation(
        "element-stiffness",
        r"k_e = \left( \int_0^{L_e} \dfrac{dx}{G\,J(x)} \right)^{-1}",
        "k_e = (∫ dx/(G·J(x)))⁻¹",
        "exact element stiffness from the exact flexibility",
    ),
    Equation(
        "element-matrix",
        r"K_e = k_e \left[ \genfrac{}{}{0}{0}{\ \ 1}{-1} \quad \genfrac{}{}{0}{0}{-1}{\ \ 1} \right]",
        "K_e = k_e·[[1, −1], [−1, 1]]",
        "element stiffness matrix on the two end rotations",
    ),
    Equation(
        "layers",
        r"G\,J = \sum_i G_i\,J_i",
        "G·J = Σ Gᵢ·Jᵢ",
        "bonded coaxial layers share the twist",
    ),
    Equation(
        "internal-torque",
        r"T(x) = -\sum_{x_i < x} T_i - \int_0^x t(s)\,ds",
        "T(x) = −Σ T_i (x_i < x) − ∫₀ˣ t(s) ds",
        "internal torque from equilibrium",
    ),
    # The 8th place: records signed before number the equations after it from 9.
    Equation(
        "force-compatibility",
        r"\sum_j f_{ij}\,X_j = \delta_i - \Delta_{i0}",
        "Σⱼ f_ij·X_j = δ_i − Δ_i0",
        "compatibility at each released support or mesh: δ_i is the support's prescribed "
        "rotation (minus X_i/k_i for a spring, in f_ii), 0 for a mesh",
        "independent",
    ),
    Equation(
        "consistent-mass",
        r"M_e = \dfrac{\mu\,L_e}{6} \left[ \genfrac{}{}{0}{0}{2}{1} \quad \genfrac{}{}{0}{0}{1}{2} "
        r"\right],\qquad \mu = \sum_i \rho_i\,J_i",
        "M_e = μ·L_e/6·[[2, 1], [1, 2]], μ = Σ ρᵢ·Jᵢ",
        "consistent mass of a prismatic element (tapered: integrated exactly); discs add their "
        "inertia on their node",
        "vibration",
    ),
    Equation(
        "gear-constraint",
        r"\theta = T\,q,\qquad c_a\,\theta_a + c_b\,\theta_b = 0,\qquad "
        r"\theta_b = -\dfrac{r_a}{r_b}\,\theta_a",
        "θ = T·q; c_a·θ_a + c_b·θ_b = 0; θ_b = −(r_a/r_b)·θ_a",
        "constraints by transformation: fixed supports and gear meshes remove rotations",
        "vibration",
    ),
    Equation(
        "eigenproblem",
        r"T^{\,T} K\,T\,q = \omega^2\,T^{\,T} M\,T\,q,\qquad f = \dfrac{\omega}{2\pi}",
        "Tᵀ·K·T·q = ω²·Tᵀ·M·T·q, f = ω/(2π)",
        "undamped free vibration on the constrained coordinates",
        "vibration",
    ),
    Equation(
        "fatigue-stresses",
        r"\tau_m = K_{fs}\,\dfrac{|T_1 + T_2|}{2}\,\dfrac{r_o}{J},\qquad "
        r"\tau_a = K_{fs}\,\dfrac{|T_1 - T_2|}{2}\,\dfrac{r_o}{J},\qquad K_{fs} = 1 + q\,(K_{ts} - 1)",
        "τm = Kfs·|T₁ + T₂|/2·r_o/J, τa = Kfs·|T₁ − T₂|/2·r_o/J, Kfs = 1 + q·(Kts − 1)",
        "mean and alternating shear stress of the cycle between two torque states",
        "fatigue",
    ),
    Equation(
        "endurance-limit",
        r"S_{se} = k_a\,k_b\,k_c\,k_d\,k_e\,S_e^{\prime}",
        "Sse = ka·kb·kc·kd·ke·Se′",
        "corrected shear endurance limit (Marin factors; kc for torsion)",
        "fatigue",
    ),
    Equation(
        "goodman-soderberg",
        r"\dfrac{1}{n} = \dfrac{\tau_a}{S_{se}} + \dfrac{\tau_m}{S_{su}}\ \ (\mathrm{Goodman}),"
        r"\qquad \dfrac{1}{n} = \dfrac{\tau_a}{S_{se}} + \dfrac{\tau_m}{S_{sy}}\ \ "
        r"(\mathrm{Soderberg})",
        "1/n = τa/Sse + τm/Ssu (Goodman); 1/n = τa/Sse + τm/Ssy (Soderberg)",
        "linear criteria",
        "fatigue",
    ),
    Equation(
        "gerber-elliptic",
        r"\dfrac{n\,\tau_a}{S_{se}} + \left(\dfrac{n\,\tau_m}{S_{su}}\right)^2 = 1\ \ "
        r"(\mathrm{Gerber}),\qquad \left(\dfrac{n\,\tau_a}{S_{se}}\right)^2 + "
        r"\left(\dfrac{n\,\tau_m}{S_{sy}}\right)^2 = 1\ \ (\mathrm{ASME\ elliptic})",
        "n·τa/Sse + (n·τm/Ssu)² = 1 (Gerber); (n·τa/Sse)² + (n·τm/Ssy)² = 1 (ASME-elliptic)",
        "curved criteria",
        "fatigue",
    ),
    Equation(
        "langer",
        r"n_y = \dfrac{S_{sy}}{\tau_a + \tau_m},\qquad S_{su} = 0.67\,S_{ut},\quad "
        r"S_{sy} = S_y/\sqrt{3}",
        "n_y = Ssy/(τa + τm); Ssu = 0.67·Sut, Ssy = Sy/√3",
        "first-cycle yield (Langer) and the torsional strengths",
        "fatigue",
    ),
    Equation(
        "force-flexibility",
        r"f_{ij} = \int \dfrac{t_i\,t_j}{G\,J}\,dx + \sum_s \dfrac{\rho_{is}\,\rho_{js}}{k_s},"
        r"\qquad \Delta_{i0} = \int \dfrac{t_i\,T_0}{G\,J}\,dx + "
        r"\sum_s \rho_{is} \left( \dfrac{R_{0s}}{k_s} - r_s \right)",
        "f_ij = ∫t_i·t_j/(G·J) dx + Σ_s ρ_is·ρ_js/k_s; Δ_i0 = ∫t_i·T₀/(G·J) dx + "
        "Σ_s ρ_is·(R₀s/k_s − r_s)",
        "unit-load method on the primary structure: t_i, ρ_is internal torque and kept-support "
        "reactions under X_i = 1; T₀, R₀s under the loads",
        "independent",
    ),
    # Restrained warping of open sections (Vlasov): shown only in records of cases that warp.
    Equation(
        "warping-governing",
        r"G\,J\,\theta^{\prime\prime} - E\,C_w\,\theta^{\prime\prime\prime\prime} = -m(x)",
        "G·J·θ″ − E·Cw·θ⁗ = −m(x)",
        "restrained (non-uniform) torsion of a thin-walled open member; m is the distributed "
        "torque per unit length",
        "warping",
    ),
    Equation(
        "warping-torque",
        r"T = T_{sv} + T_w = G\,J\,\theta^{\prime} - E\,C_w\,\theta^{\prime\prime\prime}",
        "T = T_sv + T_w = G·J·θ′ − E·Cw·θ‴",
        "internal torque: the Saint-Venant part and the warping part",
        "warping",
    ),
    Equation(
        "bimoment",
        r"B = -E\,C_w\,\theta^{\prime\prime}",
        "B = −E·Cw·θ″",
        "bimoment",
        "warping",
    ),
    Equation(
        "warping-normal-stress",
        r"\sigma_w = E\,W_n\,\theta^{\prime\prime}",
        "σ_w = E·Wn·θ″",
        "warping normal stress; Wn the normalised unit warping at the point",
        "warping",
    ),
    Equation(
        "warping-shear-stress",
        r"\tau_w = \dfrac{E\,S_w\,\theta^{\prime\prime\prime}}{t}",
        "τ_w = E·Sw·θ‴/t",
        "warping shear stress; Sw the warping statical moment, t the wall's thickness",
        "warping",
    ),
    Equation(
        "saint-venant-wall-shear",
        r"\tau_{sv} = G\,t\,\theta^{\prime}",
        "τ_sv = G·t·θ′",
        "Saint-Venant shear on the faces of a wall of thickness t",
        "warping",
    ),
)


def equations_dir() -> Path:
    """The folder of the shipped equation pictures (beside the record template)."""
    return templates_dir() / TEMPLATE_NAME / "static" / "equations"


def equation_file(equation: Equation) -> str:
    """File name of an equation's picture."""
    return f"{equation.name}.svg"


def render_equation(tex: str, size: float = EQUATION_SIZE) -> str:
    """Draw an equation with matplotlib mathtext as an SVG document (build time only).

    Parameters
    ----------
    tex
        The equation in mathtext, without the surrounding ``$``.
    size
        Font size (pt).

    Returns
    -------
    str
        The SVG document; identical bytes for the same input and matplotlib.
    """
    import matplotlib  # noqa: PLC0415
    from matplotlib.backends.backend_svg import FigureCanvasSVG  # noqa: PLC0415
    from matplotlib.figure import Figure  # noqa: PLC0415

    with matplotlib.rc_context(_RC):
        figure = Figure(figsize=(0.01, 0.01))
        FigureCanvasSVG(figure)
        figure.text(0.0, 0.0, f"${tex}$", fontsize=size)
        buffer = io.StringIO()
        figure.savefig(
            buffer, format="svg", metadata={"Date": None}, bbox_inches="tight", pad_inches=0.03
        )
        return buffer.getvalue()


def _size_pt(svg: str) -> tuple[float, float]:
    """Width and height (pt) of a picture matplotlib drew (build time: our own output)."""
    from xml.etree import ElementTree  # noqa: PLC0415

    root = ElementTree.fromstring(svg)  # matplotlib's output, never a reader's file

    def attribute(name: str) -> float:
        return float(root.get(name, "").removesuffix("pt"))

    return attribute("width"), attribute("height")


def build_index(pictures: dict[str, str]) -> dict[str, Any]:
    """The ``index.json`` document of rendered pictures (``name -> SVG text``)."""
    import matplotlib  # noqa: PLC0415

    entries = {}
    for equation in EQUATIONS:
        svg = pictures[equation.name]
        width, height = _size_pt(svg)
        entries[equation.name] = {
            "file": equation_file(equation),
            "tex": equation.tex,
            "width_pt": width,
            "height_pt": height,
            "sha256": hashlib.sha256(svg.encode("utf-8")).hexdigest(),
        }
    return {
        "generator": f"matplotlib {matplotlib.__version__} mathtext, svg backend",
        "size_pt": EQUATION_SIZE,
        "equations": entries,
    }


def write_equations(folder: Path | None = None) -> list[Path]:
    """Draw every equation into ``folder`` (default :func:`equations_dir`); return the files."""
    folder = folder or equations_dir()
    folder.mkdir(parents=True, exist_ok=True)
    pictures = {equation.name: render_equation(equation.tex) for equation in EQUATIONS}
    written = []
    for equation in EQUATIONS:
        path = folder / equation_file(equation)
        path.write_text(pictures[equation.name], encoding="utf-8", newline="")
        written.append(path)
    index = folder / "index.json"
    index.write_text(
        json.dumps(build_index(pictures), indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
    )
    written.append(index)
    return written


@functools.lru_cache(maxsize=1)
def load_equations() -> tuple[tuple[Equation, str, float, float], ...]:
    """Every equation with its shipped picture: ``(equation, SVG text, width pt, height pt)``.

    Read once per process.

    Raises
    ------
    InputError
        When a picture is missing, or was drawn from another source than :data:`EQUATIONS`
        (run ``python -m workbench.record.equations``), or its bytes differ from the index.
    """
    folder = equations_dir()
    try:
        index = json.loads((folder / "index.json").read_text("utf-8"))["equations"]
    except (OSError, ValueError, KeyError) as error:
        msg = f"the equation pictures' index is missing or unreadable ({error}); run python -m workbench.record.equations"
        raise InputError(str(folder), msg) from None
    loaded = []
    for equation in EQUATIONS:
        entry = index.get(equation.name) or {}
        if entry.get("tex") != equation.tex:
            msg = f"the picture of equation {equation.name!r} was drawn from another source; run python -m workbench.record.equations"
            raise InputError(str(folder), msg)
        path = folder / equation_file(equation)
        try:
            svg = path.read_text("utf-8")
        except OSError as error:
            msg = f"cannot read the equation picture {path.name}: {error.strerror or error}"
            raise InputError(str(path), msg) from None
        if hashlib.sha256(svg.encode("utf-8")).hexdigest() != entry.get("sha256"):
            msg = f"the equation picture {path.name} differs from its index entry"
            raise InputError(str(path), msg)
        loaded.append((equation, svg, float(entry["width_pt"]), float(entry["height_pt"])))
    return tuple(loaded)


def main(argv: Sequence[str] | None = None) -> int:
    """Redraw the shipped equation pictures; print the files written."""
    folder = Path(argv[0]) if argv else None
    for path in write_equations(folder):
        sys.stdout.write(f"wrote {path}\n")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
