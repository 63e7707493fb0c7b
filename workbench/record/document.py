"""The calculation record as one self-contained, signed HTML file.

Layout of a record file (UTF-8)::

    <!DOCTYPE html> … <head> CSP meta, title, inline CSS </head> <body>
    <main id="record-body"> … every section of the record … </main>
    <!-- workbench-record-signature-block -->
    <footer id="record-verification"> … fingerprint, digests, how to verify … </footer>
    <script type="application/jose" id="record-signature">JWS</script>
    <script type="application/jwk+json" id="record-public-key">JWK</script>
    <!-- /workbench-record-signature-block -->
    </body></html>

*Signed content* (what ``content_digest`` covers): the SHA-256 of the exact bytes of the file
with the signature block — from the opening marker comment through the closing one, both
included — cut out. That is the whole head (CSS included, since CSS can change what is seen)
and the whole ``<main id="record-body">`` element. The signature block itself is rebuilt by the
verifier from the token and the key and compared byte for byte, so its visible text cannot be
changed either.

*Results digest*: the SHA-256 of the RFC 8785 canonical JSON of ``{"results": results
document, "checks": check document}``, every number rounded to 10 significant digits first, so
that a re-run on another machine (another BLAS, last-bit differences) gives the same digest.
A case with inertia adds ``"modes"`` (frequencies, rigid-body flags and mode shapes, the shapes'
normalised angles rounded to 9 decimals so that round-off about a node of the shape cannot
change the digest); a case with ``design.fatigue`` adds ``"fatigue"`` (the governing cycle of
every segment with its stresses, strengths and factors of safety). Cases without them keep the
digest they always had.

The JWS payload (RFC 8785 canonical JSON) holds the case, the title block, both digests, the
signer, the time of signing and the software version.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import time
from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from markupsafe import Markup, escape

import workbench
from workbench.case.errors import InputError
from workbench.design.caution import CAUTION
from workbench.design.checks import CHECK_QUANTITIES, CheckReport, check_document, run_checks
from workbench.record.assets import templates_dir
from workbench.record.notebook import TEXT_FIELDS, TITLE_FIELDS
from workbench.signing import canonicalize
from workbench.solver.analysis import Results, solve
from workbench.solver.io import parse_case
from workbench.solver.model import Model, Notch
from workbench.solver.modes import Modes
from workbench.solver.tables import results_document

__all__ = [
    "BLOCK_END",
    "BLOCK_START",
    "CSP",
    "FORMAT",
    "Computation",
    "compute",
    "render_record",
    "signature_block",
]

FORMAT = "workbench-calculation-record"
FORMAT_VERSION = 1

#: The record's Content-Security-Policy: no fetch of any kind, no script at all.
CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'"

BLOCK_START = "<!-- workbench-record-signature-block -->"
BLOCK_END = "<!-- /workbench-record-signature-block -->"
DOCUMENT_END = "</body>\n</html>\n"

#: Significant digits kept in the results digest (cross-machine stability).
DIGEST_DIGITS = 10


# --- computation ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Computation:
    """Everything recomputed from a case: model, results, checks and their digest."""

    case: dict[str, Any]
    model: Model
    results: Results
    report: CheckReport
    results_digest: str
    modes: Modes | None = None
    modes_error: str | None = None


def _rounded(value: Any) -> Any:
    if isinstance(value, float):
        if not math.isfinite(value):
            return str(value)
        return float(f"{value:.{DIGEST_DIGITS}g}") + 0.0  # + 0.0 turns -0.0 into 0.0
    if isinstance(value, Mapping):
        return {key: _rounded(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [_rounded(item) for item in value]
    return value


def _has_inertia(model: Model) -> bool:
    """Whether the case gives discs or a density: then the record has a vibration section."""
    return bool(model.discs) or any(
        layer.material.density is not None
        for shaft in model.shafts
        for segment in shaft.segments
        for layer in segment.layers
    )


def record_modes(model: Model, report: CheckReport) -> Modes:
    """The natural modes the record shows: the lowest ten, and all up to the widened bands.

    Raises
    ------
    InputError
        When the system has no inertia free to move, or a group of shafts is free to spin
        without inertia.
    """
    from workbench.solver.modes import natural_modes  # noqa: PLC0415

    if report.modes is not None:
        # The frequency checks asked for exactly these modes (the same count, bands and mesh).
        return report.modes
    speeds = model.operating_speeds
    up_to = None
    if speeds:
        up_to = max(speed.maximum for speed in speeds) * (1.0 + report.design.frequency_margin)
    return natural_modes(
        model,
        up_to=up_to,
        elements_per_segment=report.design.modal_elements_per_segment,
        max_element_length=report.design.modal_max_element_length,
    )


def modes_digest_document(modes: Modes) -> list[dict[str, Any]]:
    """Frequencies (Hz), rigid-body flags and shapes (x in m, angles to 9 decimals)."""
    entries = []
    for mode in range(len(modes)):
        shafts = {}
        for shaft in modes.model.shafts:
            x, angle = modes.shape(mode, shaft.id)
            shafts[shaft.id] = {
                "x": [float(value) for value in x],
                "angle": [round(float(value), 9) + 0.0 for value in angle],
            }
        entries.append(
            {
                "frequency": float(modes.frequency[mode]),
                "rigid_body": bool(modes.rigid_body[mode]),
                "shafts": shafts,
            }
        )
    return entries


def fatigue_digest_document(report: CheckReport) -> list[dict[str, Any]]:
    """The governing cycle of every segment checked for fatigue (SI)."""
    return [
        {
            "shaft": point.shaft,
            "segment": point.segment,
            "x": point.x,
            "kfs": point.concentration,
            "mean_shear": point.factors.mean_shear,
            "alternating_shear": point.factors.alternating_shear,
            "endurance_shear": point.factors.endurance_shear,
            "ultimate_shear": point.factors.ultimate_shear,
            "yield_shear": point.factors.yield_shear,
            "goodman": point.factors.goodman,
            "gerber": point.factors.gerber,
            "asme_elliptic": point.factors.asme_elliptic,
            "soderberg": point.factors.soderberg,
            "first_cycle_yield": point.factors.first_cycle_yield,
        }
        for point in report.fatigue_points
    ]


def results_digest(results: Results, report: CheckReport, modes: Modes | None = None) -> str:
    """``sha256:<hex>`` of the canonical, rounded results, checks, modes and fatigue cycles."""
    document: dict[str, Any] = {
        "results": results_document(results),
        "checks": check_document(report),
    }
    if modes is not None:
        document["modes"] = modes_digest_document(modes)
    if report.fatigue_points:
        document["fatigue"] = fatigue_digest_document(report)
    return "sha256:" + hashlib.sha256(canonicalize(_rounded(document))).hexdigest()


def compute(case: Mapping[str, Any]) -> Computation:
    """Parse, solve and check a case, find its natural modes, and digest the results.

    Raises
    ------
    InputError
        When the case is not valid.
    """
    case_dict = json.loads(json.dumps(case))
    model = parse_case(case_dict)
    results = solve(model)
    report = run_checks(results)
    modes, modes_error = None, None
    if _has_inertia(model):
        try:
            modes = record_modes(model, report)
        except InputError as error:
            modes_error = str(error)
    return Computation(
        case_dict,
        model,
        results,
        report,
        results_digest(results, report, modes),
        modes,
        modes_error,
    )


def content_digest(text_without_block: str) -> str:
    """``sha256:<hex>`` of the record's bytes outside the signature block."""
    return "sha256:" + hashlib.sha256(text_without_block.encode("utf-8")).hexdigest()


def signing_time() -> str:
    """Now in UTC (ISO 8601, seconds), or ``SOURCE_DATE_EPOCH`` when set (reproducible builds)."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    seconds = int(epoch) if epoch and epoch.strip().isdigit() else int(time.time())
    return time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(seconds))


# --- HTML helpers ----------------------------------------------------------------------------


def _num(value: float, digits: int = 5) -> str:
    if value == 0.0:
        return "0"
    return f"{value:.{digits}g}".replace("-", "\u2212")


def _table(headers: list[str], rows: list[list[Any]], css: str = "") -> str:
    head = "".join(f"<th>{escape(h)}</th>" for h in headers)
    body = "".join(
        "<tr>" + "".join(f"<td>{escape(cell)}</td>" for cell in row) + "</tr>" for row in rows
    )
    klass = f' class="{escape(css)}"' if css else ""
    return f"<table{klass}><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def _section(ident: str, title: str, content: str) -> str:
    return (
        f'<section class="record-section" id="{ident}">\n<h2>{escape(title)}</h2>\n'
        f"{content}\n</section>\n"
    )


def _img(svg: str, alt: str, css: str = "figure") -> str:
    from workbench.record.figures import data_uri  # noqa: PLC0415

    return f'<img class="{css}" alt="{escape(alt)}" src="{data_uri(svg)}">'


# --- sections ------------------------------------------------------------------------------


@lru_cache(maxsize=1)
def _method_html() -> str:
    """The method section; the same for every record, so built once per process."""
    assumptions = [
        "Linear elastic, isotropic, homogeneous material in each layer.",
        "Saint-Venant torsion: plane circular sections stay plane; warping of non-circular "
        "sections is free (no warping restraint).",
        "Small rotations; torques applied about the shaft axis; no bending or axial effects "
        "in the solution.",
        "Direct stiffness method on rotational degrees of freedom with the exact element "
        "stiffness from the exact flexibility ∫dx/(G·J(x)) (prismatic, tapered, layered) "
        "and exact nodal loads for linearly varying distributed torque; T(x), θ(x), τ(x) are "
        "recovered inside elements from equilibrium, so results do not depend on a mesh.",
        "Spring supports exert −k·(θ − rotation); gears impose r_a·θ_a = −r_b·θ_b.",
        "Combinations by superposition of load cases.",
        "Sign convention: right-hand rule about each shaft's +x axis.",
    ]
    items = "".join(f"<li>{escape(text)}</li>" for text in assumptions)
    return (
        f"<ul>{items}</ul>\n<h3>Equations</h3>\n{_equations_table('statics')}"
        "\n<p>References: J. M. Gere and B. J. Goodno, <em>Mechanics of Materials</em>, 8th ed., "
        "ch. 3; W. D. Pilkey, <em>Formulas for Stress, Strain, and Structural Matrices</em>, "
        "2nd ed., ch. 14 (torsion, transfer and stiffness matrices).</p>"
    )


@lru_cache(maxsize=4)
def _equations_table(group: str) -> str:
    """The shipped pictures of one group's equations, numbered through the whole record."""
    from workbench.record.equations import load_equations  # noqa: PLC0415
    from workbench.record.figures import data_uri  # noqa: PLC0415

    rows = []
    for number, (equation, svg, width_pt, height_pt) in enumerate(load_equations(), start=1):
        if equation.group != group:
            continue
        # Shown at the size drawn (pt → CSS px at 96 px per inch), so every equation's text
        # has the same size; the width and height attributes keep the layout from jumping.
        width, height = round(width_pt * 4 / 3), round(height_pt * 4 / 3)
        rows.append(
            f'<tr><td class="equation-picture"><img class="equation" width="{width}" '
            f'height="{height}" alt="{escape(equation.reading)}" src="{data_uri(svg)}"></td>'
            f'<td class="equation-note">{escape(equation.meaning)}</td>'
            f'<td class="equation-number">({number})</td></tr>'
        )
    return f'<table class="equations"><tbody>{"".join(rows)}</tbody></table>'


def _notch_text(notch: Notch, units: Any) -> str:
    """``groove: Kts 1.65, q 0.9`` — a notch as the inputs table shows it."""
    parts = [f"Kts {notch.kts:g}"]
    if notch.radius is not None:
        parts.append(f"r = {_num(units.from_si(notch.radius, 'length'))}")
    if notch.notch_sensitivity is not None:
        parts.append(f"q {notch.notch_sensitivity:g}")
    return f"{notch.label}: {', '.join(parts)}"


def _section_text(section: Any, units: Any) -> str:
    def length(value: float) -> str:
        return _num(units.from_si(value, "length"))

    label = units.label("length")
    shape = section.shape
    if shape == "solid":
        return f"solid Ø{length(section.diameter)} {label}"
    if shape == "tube":
        return f"tube Ø{length(section.outer_diameter)}/Ø{length(section.inner_diameter)} {label}"
    if shape == "tapered":
        bore = f", bore Ø{length(section.bore)}" if section.bore else ""
        return (
            f"tapered Ø{length(section.diameter_start)} → Ø{length(section.diameter_end)} "
            f"{label}{bore}"
        )
    return f"{shape} (see case)"


def _inputs_html(computation: Computation) -> str:
    from workbench.record.figures import elevation_svg  # noqa: PLC0415

    model = computation.model
    units = model.units
    length, torque, stress, angle = (
        units.label(q) for q in ("length", "torque", "stress", "angle")
    )
    parts = [
        "<h3>Geometry</h3>",
        _img(elevation_svg(model), "to-scale elevation of the shafts", "figure elevation"),
        f'<p class="caption">Elevation, drawn to scale (dimensions in {escape(length)}). '
        "Below each shaft: supports (filled triangle fixed, zigzag spring) and the chain of "
        "segment lengths. Above: point torques as moment vectors (double arrowhead, right-hand "
        "rule about the shaft's +x axis) with value and load case, distributed torques as bands "
        "over their span, gears as hatched bars of their pitch diameter. Dashed lines: bores; "
        "thin lines: bonded layer interfaces.</p>",
    ]
    rows = []
    for shaft in model.shafts:
        bounds = shaft.boundaries
        for number, segment in enumerate(shaft.segments):
            sections = " + ".join(_section_text(layer.section, units) for layer in segment.layers)
            names = ", ".join(dict.fromkeys(layer.material.name for layer in segment.layers))
            extras = []
            if segment.keyseat:
                extras.append("keyseat")
            if segment.fillet_radius is not None:
                extras.append(f"fillet r = {_num(units.from_si(segment.fillet_radius, 'length'))}")
            if segment.cross_hole_diameter is not None:
                extras.append(
                    f"cross hole Ø{_num(units.from_si(segment.cross_hole_diameter, 'length'))}"
                )
            if segment.notch is not None:
                extras.append(_notch_text(segment.notch, units))
            rows.append(
                [
                    shaft.id,
                    number,
                    _num(units.from_si(bounds[number], "length")),
                    _num(units.from_si(bounds[number + 1], "length")),
                    sections,
                    names,
                    ", ".join(extras) or "—",
                ]
            )
    parts.append(
        _table(
            [
                "shaft",
                "segment",
                f"from [{length}]",
                f"to [{length}]",
                "section",
                "material",
                "details",
            ],
            rows,
        )
    )
    materials: dict[str, Any] = {}
    for shaft in model.shafts:
        for segment in shaft.segments:
            for layer in segment.layers:
                materials.setdefault(layer.material.name, layer.material)

    def opt(value: float | None, quantity: str) -> str:
        return "—" if value is None else _num(units.from_si(value, quantity))

    parts += [
        "<h3>Materials</h3>",
        _table(
            ["material", f"G [{stress}]", f"Sy [{stress}]", f"Su [{stress}]", "source"],
            [
                [
                    m.name,
                    opt(m.shear_modulus, "stress"),
                    opt(m.yield_strength, "stress"),
                    opt(m.ultimate_strength, "stress"),
                    m.source or "not stated",
                ]
                for m in materials.values()
            ],
        ),
    ]
    stiffness = units.label("stiffness")
    parts += [
        "<h3>Supports</h3>",
        _table(
            [
                "#",
                "shaft",
                f"x [{length}]",
                "kind",
                f"stiffness [{stiffness}]",
                f"prescribed rotation [{angle}]",
            ],
            [
                [
                    n,
                    s.shaft,
                    _num(units.from_si(s.x, "length")),
                    s.kind,
                    opt(s.stiffness, "stiffness"),
                    _num(units.from_si(s.rotation, "angle")),
                ]
                for n, s in enumerate(model.supports)
            ],
        ),
    ]
    if model.gears:
        parts += [
            "<h3>Gears</h3>",
            _table(
                [
                    "#",
                    "shaft a",
                    f"x a [{length}]",
                    f"radius a [{length}]",
                    "shaft b",
                    f"x b [{length}]",
                    f"radius b [{length}]",
                ],
                [
                    [
                        n,
                        g.a.shaft,
                        _num(units.from_si(g.a.x, "length")),
                        _num(units.from_si(g.a.radius, "length")),
                        g.b.shaft,
                        _num(units.from_si(g.b.x, "length")),
                        _num(units.from_si(g.b.radius, "length")),
                    ]
                    for n, g in enumerate(model.gears)
                ],
            ),
        ]
    distributed = units.label("distributed_torque")
    parts.append("<h3>Loads</h3>")
    for case in model.load_cases:
        rows = [
            [
                t.shaft,
                "point",
                _num(units.from_si(t.x, "length")),
                "",
                _num(units.from_si(t.torque, "torque")) + f" {torque}",
            ]
            for t in case.torques
        ]
        rows += [
            [
                d.shaft,
                "distributed",
                _num(units.from_si(d.start, "length")),
                _num(units.from_si(d.end, "length")),
                f"{_num(units.from_si(d.intensity_start, 'distributed_torque'))} → "
                f"{_num(units.from_si(d.intensity_end, 'distributed_torque'))} {distributed}",
            ]
            for d in case.distributed
        ]
        parts += [
            f"<h4>Load case {escape(case.name)}</h4>",
            _table(
                ["shaft", "kind", f"x / start [{length}]", f"end [{length}]", "torque / intensity"],
                rows,
            ),
        ]
    if model.combinations:
        parts += [
            "<h3>Combinations</h3>",
            _table(
                ["combination", "factors"],
                [
                    [c.name, ", ".join(f"{f:g} × {n}" for n, f in c.factors)]
                    for c in model.combinations
                ],
            ),
        ]
    design = computation.report.design
    rows = [
        ["shear criterion", design.shear_criterion],
        ["factor of safety", f"{design.factor_of_safety:g}"],
        ["keyways (code reduction)", "yes" if design.keyway else "no"],
    ]
    if design.allowable_shear_stress is not None:
        rows.append(
            [
                "stated allowable shear stress",
                f"{_num(units.from_si(design.allowable_shear_stress, 'stress'))} {stress}",
            ]
        )
    if design.max_twist_rate is not None:
        rows.append(
            [
                "largest rate of twist",
                f"{_num(units.from_si(design.max_twist_rate, 'twist_rate'))} "
                f"{units.label('twist_rate')}",
            ]
        )
    for limit in design.rotation_limits:
        rows.append(
            [
                f"rotation limit, shaft {limit.shaft}",
                f"|θ({_num(units.from_si(limit.end, 'length'))}) − "
                f"θ({_num(units.from_si(limit.start, 'length'))})| ≤ "
                f"{_num(units.from_si(limit.limit, 'angle'))} {angle}",
            ]
        )
    parts += ["<h3>Design criteria</h3>", _table(["criterion", "value"], rows)]
    return "\n".join(parts)


def _results_html(computation: Computation) -> str:
    from workbench.record.figures import line_diagram_svg  # noqa: PLC0415

    model, results = computation.model, computation.results
    units = model.units
    length, torque, stress, angle = (
        units.label(q) for q in ("length", "torque", "stress", "angle")
    )
    parts = []
    for result in results:
        kind = "Combination" if result.is_combination else "Load case"
        parts.append(f'<div class="result-block"><h3>{kind} {escape(result.name)}</h3>')
        parts.append(
            _table(
                ["support", "shaft", f"x [{length}]", "kind", f"reaction [{torque}]"],
                [
                    [
                        n,
                        s.shaft,
                        _num(units.from_si(s.x, "length")),
                        s.kind,
                        _num(units.from_si(float(result.reactions[n]), "torque"), 6),
                    ]
                    for n, s in enumerate(model.supports)
                ],
                "reactions",
            )
        )
        summary = []
        for shaft_id, values in result.shafts.items():
            t = units.from_si(values.torque, "torque")
            a = units.from_si(values.angle, "angle")
            s = units.from_si(values.shear_stress, "stress")
            summary.append(
                [
                    shaft_id,
                    _num(float(t.min())),
                    _num(float(t.max())),
                    _num(float(a.min())),
                    _num(float(a.max())),
                    _num(float(s.max())),
                ]
            )
        parts.append(
            _table(
                [
                    "shaft",
                    f"T min [{torque}]",
                    f"T max [{torque}]",
                    f"θ min [{angle}]",
                    f"θ max [{angle}]",
                    f"τ max [{stress}]",
                ],
                summary,
            )
        )
        for shaft_id, values in result.shafts.items():
            svg = line_diagram_svg(
                units.from_si(values.x, "length"),
                [
                    (f"torque T [{torque}]", units.from_si(values.torque, "torque")),
                    (f"angle of twist θ [{angle}]", units.from_si(values.angle, "angle")),
                    (f"shear stress τ [{stress}]", units.from_si(values.shear_stress, "stress")),
                ],
                f"x along shaft {shaft_id} [{length}]",
            )
            parts.append(
                _img(
                    svg,
                    f"torque, twist and stress along shaft {shaft_id}, {result.name}",
                    "figure diagram",
                )
            )
        parts.append("</div>")
    return "\n".join(parts)


def _checks_html(computation: Computation) -> str:
    report = computation.report
    units = computation.model.units
    rows = []
    for check in report.checks:
        quantity = CHECK_QUANTITIES[check.kind]
        rows.append(
            [
                check.result,
                check.shaft,
                "—" if check.segment is None else check.segment,
                check.kind,
                _num(units.from_si(check.value, quantity)),
                _num(units.from_si(check.limit, quantity)),
                f"{check.utilisation:.3f}",
                "pass" if check.passes else "FAIL",
            ]
        )
    verdict = "ALL CHECKS PASS" if report.passes else "SOME CHECKS FAIL"
    governing = report.governing
    lines = [f'<p class="verdict {"pass" if report.passes else "fail"}">{verdict}']
    if governing is not None:
        lines.append(
            f" — governing: {escape(governing.kind)} on shaft {escape(governing.shaft)} "
            f"segment {escape(governing.segment)} in {escape(governing.result)}, utilisation "
            f"{governing.utilisation:.3f}"
        )
    lines.append("</p>")
    units_line = (
        f"<p>Units: stress {escape(units.label('stress'))}, rate of twist "
        f"{escape(units.label('twist_rate'))}, rotation {escape(units.label('angle'))}.</p>"
    )
    allowables = sorted({c.note for c in report.checks if c.kind == "shear_stress" and c.note})
    notes = "".join(f"<li>{escape(note)}</li>" for note in allowables)
    return (
        "".join(lines)
        + units_line
        + _table(
            ["result", "shaft", "segment", "check", "value", "limit", "utilisation", "verdict"],
            rows,
            "checks",
        )
        + (f"<ul>{notes}</ul>" if notes else "")
    )


# --- torsional vibration and fatigue ------------------------------------------------------------

#: Flexible modes drawn in the record; every mode is in the table.
DRAWN_MODES = 4


def _rpm(angular: float) -> float:
    return angular * 60.0 / (2.0 * math.pi)


def _vibration_html(computation: Computation) -> str:
    """Inertia, method, natural frequencies, mode shapes and separation from running speeds."""
    from workbench.case.design import DEFAULT_FREQUENCY_MARGIN  # noqa: PLC0415
    from workbench.design.frequency import frequency_separations  # noqa: PLC0415
    from workbench.record.figures import mode_shape_svg  # noqa: PLC0415

    model, modes = computation.model, computation.modes
    units = model.units
    length, inertia, density = (units.label(q) for q in ("length", "inertia", "density"))
    parts = ["<h3>Inertia</h3>"]
    if model.discs:
        parts.append(
            _table(
                ["disc", "shaft", f"x [{length}]", f"inertia [{inertia}]"],
                [
                    [
                        n,
                        d.shaft,
                        _num(units.from_si(d.x, "length")),
                        _num(units.from_si(d.inertia, "inertia"), 6),
                    ]
                    for n, d in enumerate(model.discs)
                ],
            )
        )
    else:
        parts.append("<p>No discs: the shafts' own inertia only.</p>")
    densities: dict[str, float | None] = {}
    for shaft in model.shafts:
        for segment in shaft.segments:
            for layer in segment.layers:
                densities.setdefault(layer.material.name, layer.material.density)
    parts.append(
        _table(
            ["material", f"density [{density}]"],
            [
                [
                    name,
                    "— (massless spring)"
                    if value is None
                    else _num(units.from_si(value, "density")),
                ]
                for name, value in densities.items()
            ],
        )
    )
    assumptions = [
        "Undamped free vibration about the shaft axes; the shafts' stiffness is the static "
        "solver's own (exact element stiffness, spring supports, fixed supports, gear meshes).",
        "Inertia: each disc's mass moment of inertia on its node; each segment with a density "
        "adds ρ·J per length (J the polar moment of area) as a consistent mass matrix.",
        "Fixed supports and gear meshes are imposed by a transformation of coordinates θ = T·q, "
        "so that TᵀKT and TᵀMT are the stiffness and inertia referred through the gear ratios.",
        "A group of shafts that no support restrains has a rigid-body mode at 0 Hz, marked as "
        "such.",
        "Running speeds excite once per revolution: each band is compared with the natural "
        "frequencies as speeds.",
    ]
    parts += [
        "<h3>Method</h3>",
        "<ul>" + "".join(f"<li>{escape(text)}</li>" for text in assumptions) + "</ul>",
        _equations_table("vibration"),
        "<p>References: S. S. Rao, <em>Mechanical Vibrations</em> (torsional systems of discs on "
        "shafts; from memory); R. D. Cook, D. S. Malkus, M. E. Plesha and R. J. Witt, "
        "<em>Concepts and Applications of Finite Element Analysis</em>, 4th ed., ch. 11 "
        "(consistent mass); W. McGuire, R. H. Gallagher and R. D. Ziemian, <em>Matrix Structural "
        "Analysis</em>, 2nd ed., ch. 12 (constraints by transformation).</p>",
    ]
    if modes is None:
        parts.append(
            f'<p class="verdict fail">The natural modes could not be found: '
            f"{escape(computation.modes_error or 'no inertia')}.</p>"
        )
        return "\n".join(parts)
    parts.append(
        f"<p>Mesh: every segment with inertia cut into at least {modes.elements_per_segment} "
        "elements (frequencies converge from above as the square of the element length; refine "
        "to confirm the frequencies relied on).</p>"
    )
    rows = []
    for mode in range(len(modes)):
        where, at = modes.antinode(mode)
        omega = float(modes.angular_frequency[mode])
        rows.append(
            [
                mode + 1,
                _num(omega / (2.0 * math.pi), 6),
                _num(_rpm(omega), 6),
                "rigid body" if modes.rigid_body[mode] else "flexible",
                f"{where} @ {_num(units.from_si(at, 'length'))}",
            ]
        )
    parts += [
        "<h3>Natural frequencies</h3>",
        _table(
            [
                "mode",
                "frequency [Hz]",
                "as a speed [rpm]",
                "kind",
                f"largest |angle| [shaft @ x {length}]",
            ],
            rows,
            "frequencies",
        ),
    ]
    if not modes.complete:
        parts.append("<p>The lowest modes only; <code>workbench modes</code> lists more.</p>")
    discs = [(d.shaft, float(units.from_si(d.x, "length"))) for d in model.discs]
    drawn = [mode for mode in range(len(modes)) if not modes.rigid_body[mode]][:DRAWN_MODES]
    for mode in drawn:
        shafts = []
        for member in model.shafts:
            stations, angle = modes.shape(mode, member.id)
            shafts.append((member.id, units.from_si(stations, "length").tolist(), angle.tolist()))
        hertz = float(modes.frequency[mode])
        svg = mode_shape_svg(
            f"mode {mode + 1}: {_num(hertz, 6)} Hz = {_num(_rpm(hertz * 2.0 * math.pi), 6)} rpm",
            shafts,
            discs,
            f"x along the shaft [{length}]",
        )
        parts.append(_img(svg, f"shape of mode {mode + 1}", "figure mode-shape"))
    if drawn:
        parts.append(
            '<p class="caption">Mode shapes: rotation along each shaft, scaled to a largest '
            "|angle| of 1 over all shafts (one scale for every panel); red bars mark discs. "
            "Rigid-body modes (a constant rotation) are not drawn.</p>"
        )
    speeds = model.operating_speeds
    if speeds:
        margin = computation.report.design.frequency_margin
        source = (
            "the default, common practice, no source"
            if margin == DEFAULT_FREQUENCY_MARGIN
            else "the case's frequency_margin"
        )
        parts += [
            "<h3>Running speeds and frequency separation</h3>",
            f"<p>Each band [min, max] is widened to [min·(1 − m), max·(1 + m)] with margin "
            f"m = {margin:.0%} ({escape(source)}) and compared with the nearest natural "
            "frequency below it, every one inside it and the nearest above it (excitation once "
            "per revolution). A frequency is clear when it lies outside the widened band; "
            "utilisation = value/limit (below: ω over the lower edge; above: the upper edge "
            "over ω).</p>",
            _table(
                ["band", "min [rpm]", "max [rpm]", "widened [rpm]"],
                [
                    [
                        s.name,
                        _num(_rpm(s.minimum), 6),
                        _num(_rpm(s.maximum), 6),
                        f"{_num(_rpm(s.minimum * (1 - margin)), 6)} to "
                        f"{_num(_rpm(s.maximum * (1 + margin)), 6)}",
                    ]
                    for s in speeds
                ],
            ),
            _table(
                [
                    "band",
                    "mode",
                    "frequency [Hz]",
                    "as a speed [rpm]",
                    "where",
                    "utilisation",
                    "verdict",
                ],
                [
                    [
                        item.speed.name,
                        item.mode + 1,
                        _num(item.angular_frequency / (2.0 * math.pi), 6),
                        _num(_rpm(item.angular_frequency), 6),
                        f"{item.position} the widened band",
                        f"{item.utilisation:.3f}",
                        "clear" if item.passes else "TOO CLOSE",
                    ]
                    for item in frequency_separations(modes, speeds, margin)
                ],
                "separations",
            ),
        ]
    if modes.notes:
        parts.append("<ul>" + "".join(f"<li>{escape(n)}</li>" for n in modes.notes) + "</ul>")
    return "\n".join(parts)


def _factor(value: float) -> str:
    return "∞" if math.isinf(value) else f"{value:.3g}"


def _fatigue_html(computation: Computation) -> str:
    """Torque states, method with Marin factors, per-segment factors of safety, diagrams."""
    from workbench.case.units import display_units  # noqa: PLC0415
    from workbench.design.fatigue import endurance_limit  # noqa: PLC0415
    from workbench.record.figures import fatigue_diagram_svg  # noqa: PLC0415

    model, report = computation.model, computation.report
    criteria = report.design.fatigue
    assert criteria is not None
    units = model.units
    length, stress = units.label("length"), units.label("stress")
    first, second = criteria.result_names
    nominal_mean = criteria.mean_concentration == "none"
    mean_factor = "" if nominal_mean else "Kfs·"
    if criteria.extremes is not None:
        states = (
            f"<p>The torque cycles between the results <strong>{escape(first)}</strong> and "
            f"<strong>{escape(second)}</strong>: at every station T₁ and T₂ are their internal "
            "torques.</p>"
        )
    else:
        states = (
            f"<p>Mean torque from the result <strong>{escape(first)}</strong>, alternating "
            f"amplitude from <strong>{escape(second)}</strong> (its magnitude): "
            f"τm = {mean_factor}Tm·r_o/J, τa = Kfs·|Ta|·r_o/J.</p>"
        )
    settings = [
        ["criterion", criteria.criterion.replace("_", "-")],
        [
            "required factor of safety (fatigue and first-cycle yield)",
            f"{criteria.factor_of_safety:g}",
        ],
        [
            "stress concentration on the mean stress",
            "none (nominal mean stress)" if nominal_mean else "Kfs (as on the alternating)",
        ],
        ["surface finish", criteria.finish],
        ["reliability", f"{criteria.reliability:g}"],
        [
            "temperature",
            "room temperature" if criteria.temperature is None else f"{criteria.temperature:g} K",
        ],
        [
            "rotating-beam endurance limit Se′",
            "estimated from Sut"
            if criteria.endurance_limit is None
            else f"tested, {_num(units.from_si(criteria.endurance_limit, 'stress'))} {stress}",
        ],
    ]
    method = [
        "For every one-layer round segment of a material with yield and ultimate strengths, at "
        "every station: the cycle's mean and alternating shear stress with the fatigue "
        + (
            "stress-concentration factor Kfs on the alternating stress only; the mean stress is "
            "nominal, which relies on local yielding at the notch (not conservative for a notch "
            "that stays elastic)."
            if nominal_mean
            else "stress-concentration factor Kfs on both (conservative practice for shafts)."
        ),
        "Kfs = 1 + q·(Kts − 1): at a shoulder fillet Kts from fits to the shoulder charts and q "
        "from the torsional Neuber relation; at a keyseat Kts = 3.0 with q = 1; at a notch the "
        "stated Kts with the stated q, or q from its radius by the Neuber relation, or q = 1; "
        "no notch: 1.",
        "Sse = ka·kb·kc·kd·ke·Se′ (Marin factors: finish, size, torsion kc = 0.59, "
        "temperature, reliability); Se′ = 0.5·Sut up to 1400 MPa, else 700 MPa, unless tested.",
        "The factor of safety along a radial load line by the chosen criterion, and against "
        "first-cycle yield (Langer); the station where the smaller governs is reported.",
    ]
    parts = [
        "<h3>Torque states</h3>",
        states,
        _table(["setting", "value"], settings),
        "<h3>Method</h3>",
        "<ul>" + "".join(f"<li>{escape(text)}</li>" for text in method) + "</ul>",
        _equations_table("fatigue"),
        (
            "<p>This case takes the mean stress nominal: in the first line above, τm is written "
            "without Kfs.</p>"
            if nominal_mean
            else ""
        ),
        "<p>References: R. G. Budynas and J. K. Nisbett, <em>Shigley's Mechanical Engineering "
        "Design</em>, 9th/10th ed., ch. 6 (Marin factors, notch sensitivity, fluctuating "
        "stresses, torsion) and ch. 7 (shafts); ASME B106.1M-1985 (the elliptic criterion).</p>",
    ]
    marin_rows: list[list[Any]] = []
    bases: dict[str, None] = {}
    token = display_units.set(units)
    try:
        for point in report.fatigue_points:
            segment = model.shafts[model.shaft_number(point.shaft)].segments[point.segment]
            material = segment.layers[0].material
            assert material.ultimate_strength is not None
            diameter = 2.0 * segment.layers[0].section.outer_radius
            limit = endurance_limit(
                material.ultimate_strength,
                diameter,
                criteria.finish,
                "torsion",
                criteria.reliability,
                criteria.temperature,
                rotating_beam_limit=criteria.endurance_limit,
            )
            marin_rows.append(
                [
                    point.shaft,
                    point.segment,
                    _num(units.from_si(diameter, "length")),
                    *(f"{factor.value:.4g}" for factor in limit.factors[:5]),
                    _num(units.from_si(limit.rotating_beam_limit, "stress")),
                    _num(units.from_si(limit.value, "stress")),
                ]
            )
            for factor in limit.factors[:5]:
                bases.setdefault(f"{factor.symbol}: {factor.basis}", None)
            bases.setdefault(f"Se′: {limit.rotating_beam_basis}", None)
    finally:
        display_units.reset(token)
    parts += [
        "<h4>Marin factors</h4>",
        _table(
            [
                "shaft",
                "segment",
                f"Ø [{length}]",
                "ka",
                "kb",
                "kc",
                "kd",
                "ke",
                f"Se′ [{stress}]",
                f"Sse [{stress}]",
            ],
            marin_rows,
        ),
        "<ul>" + "".join(f"<li>{escape(text)}</li>" for text in bases) + "</ul>",
    ]
    required = criteria.factor_of_safety
    rows = []
    for point in report.fatigue_points:
        factors = point.factors
        governing = min(factors.factor_of_safety(criteria.criterion), factors.first_cycle_yield)
        rows.append(
            [
                point.shaft,
                point.segment,
                _num(units.from_si(point.x, "length")),
                _num(units.from_si(factors.mean_shear, "stress")),
                _num(units.from_si(factors.alternating_shear, "stress")),
                f"{point.concentration:.3g}",
                _num(units.from_si(factors.endurance_shear, "stress")),
                _factor(factors.goodman),
                _factor(factors.gerber),
                _factor(factors.asme_elliptic),
                _factor(factors.soderberg),
                _factor(factors.first_cycle_yield),
                "pass" if governing >= required else "FAIL",
            ]
        )
    chosen = criteria.criterion.replace("_", "-")
    parts += [
        "<h3>Factors of safety</h3>",
        f"<p>Verdict by the chosen criterion ({escape(chosen)}) and by first-cycle yield "
        f"(Langer): both must reach the required factor {required:g}. Columns Goodman to "
        "Langer are factors of safety n; the other criteria are shown for comparison. "
        f"Stresses in {escape(stress)}; x in {escape(length)}.</p>",
        _table(
            [
                "shaft",
                "segment",
                "x",
                "τm",
                "τa",
                "Kfs",
                "Sse",
                "Goodman",
                "Gerber",
                "ASME-elliptic",
                "Soderberg",
                "Langer",
                "verdict",
            ],
            rows,
            "fatigue",
        ),
        "<ul>"
        + "".join(
            f"<li>{escape(p.shaft)} segment {p.segment}: {escape(p.basis.split('; ')[0])}</li>"
            for p in report.fatigue_points
        )
        + "</ul>",
    ]
    if not report.fatigue_points:
        parts.append("<p>No segment could be checked for fatigue; see Warnings.</p>")
    for point in report.fatigue_points:
        factors = point.factors
        svg = fatigue_diagram_svg(
            f"fatigue diagram, shaft {point.shaft} segment {point.segment}",
            float(units.from_si(factors.endurance_shear, "stress")),
            float(units.from_si(factors.ultimate_shear, "stress")),
            float(units.from_si(factors.yield_shear, "stress")),
            (
                float(units.from_si(factors.mean_shear, "stress")),
                float(units.from_si(factors.alternating_shear, "stress")),
            ),
            stress,
        )
        parts.append(
            _img(
                svg,
                f"fatigue diagram of shaft {point.shaft} segment {point.segment}",
                "figure fatigue-diagram",
            )
        )
    if report.fatigue_points:
        parts.append(
            '<p class="caption">Fatigue diagrams: alternating against mean shear stress with the '
            "criteria's failure lines (Sse, Ssu, Ssy of the segment), the radial load line "
            "(dotted) and the governing cycle (red point).</p>"
        )
    return "\n".join(parts)


def _hand_check_html(computation: Computation) -> tuple[str, list[str]]:
    from workbench.design.handcheck import (  # noqa: PLC0415
        AGREEMENT_TOLERANCE,
        applicable,
        force_method_check,
    )

    model = computation.model
    reason = applicable(model)
    if reason is not None:
        return (
            f"<p>The force-method hand check is not applicable: {escape(reason)}. The stiffness "
            "solution stands on its own here; check the support torques independently before "
            "relying on them.</p>",
            [],
        )
    units = model.units
    torque = units.label("torque")
    checks = force_method_check(model, computation.results.reactions)
    rows = []
    warnings = []
    for check in checks:
        rows.append(
            [
                check.result,
                _num(units.from_si(check.theta_b0, "angle"), 6),
                _num(units.from_si(check.reactions[0], "torque"), 8),
                _num(units.from_si(check.solver_reactions[0], "torque"), 8),
                _num(units.from_si(check.reactions[1], "torque"), 8),
                _num(units.from_si(check.solver_reactions[1], "torque"), 8),
                f"{check.relative_difference:.1e}",
                "agrees" if check.agrees else "DISAGREES",
            ]
        )
        if not check.agrees:
            warnings.append(
                f"hand check of {check.result}: support torques differ from the stiffness "
                f"solution by {check.relative_difference:.1e} (relative)"
            )
    intro = (
        "<p>Independent check by the force method (Gere &amp; Goodno, <em>Mechanics of "
        "Materials</em>, 8th ed., §3.8): the support B further along the shaft is released; "
        "the rotation θ<sub>B0</sub> of the released shaft under the loads is integrated "
        "numerically as ∫T₀/(G·J) dx (scipy.integrate.quad, torsion constants computed "
        "afresh); the redundant R<sub>B</sub> follows from compatibility "
        "θ<sub>B0</sub> + R<sub>B</sub>·f<sub>BB</sub> = r<sub>B</sub> − R<sub>B</sub>/k<sub>B</sub> "
        "and R<sub>A</sub> from equilibrium. No part of the stiffness solver is used. "
        f"Flexibility f<sub>BB</sub> = {escape(_num(checks[0].flexibility, 6))} rad/(N·m) (SI). "
        f"Agreement required: relative difference ≤ {AGREEMENT_TOLERANCE:.0e}.</p>"
    )
    return intro + _table(
        [
            "result",
            f"θ_B0 [{units.label('angle')}]",
            f"R_A hand [{torque}]",
            f"R_A solver [{torque}]",
            f"R_B hand [{torque}]",
            f"R_B solver [{torque}]",
            "rel. difference",
            "verdict",
        ],
        rows,
        "hand-check",
    ), warnings


def _title_html(title_block: Mapping[str, Any], model: Model, signed: bool) -> str:
    rows = [[label, title_block.get(key, "—")] for key, label in TITLE_FIELDS.items()]
    banner = (
        ""
        if signed
        else '<p class="unsigned-banner">UNSIGNED — this record carries no signature; nothing '
        "proves who made it or that it is unchanged.</p>"
    )
    heading = title_block.get("subject") or model.title or "Calculation record"
    return (
        f"{banner}<h1>{escape(heading)}</h1>\n"
        '<p class="doc-kind">Calculation record — members in torsion</p>\n'
        + _table(["", ""], rows, "title-block")
    )


def _default_scope(model: Model) -> str:
    vibration = _has_inertia(model)
    fatigue = getattr(model.design, "fatigue", None) is not None
    left_out = ["bending", "axial load"]
    left_out += [] if fatigue else ["fatigue"]
    left_out += [] if vibration else ["vibration"]
    left_out.append("buckling")
    added = [
        *(
            ["torsional vibration (natural frequencies, separation from running speeds)"]
            if vibration
            else []
        ),
        *(["fatigue under the fluctuating torque named in the design"] if fatigue else []),
    ]
    text = f"Torsion only (no {', '.join(left_out[:-1])} or {left_out[-1]}); static loads"
    if added:
        text += "; also " + " and ".join(added)
    return text + "; the members, supports and loads listed under Inputs."


def _text_sections(title_block: Mapping[str, Any], model: Model) -> str:
    texts = {
        "purpose": title_block.get("purpose")
        or f"Check the shafts of “{model.title or 'the case'}” in torsion: support torques, "
        "internal torque, angle of twist and shear stress for every load case and combination, "
        "against the design criteria stated below.",
        "scope": title_block.get("scope") or _default_scope(model),
    }
    return "".join(
        f"<h3>{escape(key.capitalize())}</h3><p>{escape(texts[key])}</p>" for key in TEXT_FIELDS
    )


def _signature_html(signer: str, signed_at: str, fingerprint: str | None) -> str:
    if fingerprint is None:
        return '<p class="unsigned-banner">UNSIGNED — no signature was applied.</p>'
    return _table(
        ["", ""],
        [
            ["Signed by", signer or "not named"],
            ["Signed at (UTC)", signed_at],
            ["Key fingerprint (JWK thumbprint, RFC 7638)", fingerprint],
            ["Algorithm", "EdDSA (Ed25519), JWS compact serialization (RFC 7515, RFC 8037)"],
        ],
        "signature",
    )


def extra_sections(computation: Computation) -> list[str]:
    """The torsional vibration and fatigue sections, when the case asks for them."""
    out = []
    if computation.modes is not None or computation.modes_error is not None:
        out.append(_section("vibration", "Torsional vibration", _vibration_html(computation)))
    if computation.report.design.fatigue is not None:
        out.append(_section("fatigue", "Fatigue", _fatigue_html(computation)))
    return out


def render_body(
    computation: Computation,
    title_block: Mapping[str, Any],
    notebook_html: str,
    *,
    signer: str,
    signed_at: str,
    fingerprint: str | None,
    case_source: str,
) -> str:
    """The ``<main id="record-body">`` element: every section of the record.

    ``notebook_html`` must already be sanitized; every other string is escaped here.
    """
    model = computation.model
    hand_html, hand_warnings = _hand_check_html(computation)
    warnings = [*computation.report.notes, *hand_warnings]
    failing = [c for c in computation.report.checks if not c.passes]
    if failing:
        warnings.append(f"{len(failing)} check(s) fail; see Design checks")
    if fingerprint is None:
        warnings.append("the record is UNSIGNED")
    warning_html = (
        "<ul>" + "".join(f"<li>{escape(w)}</li>" for w in warnings) + "</ul>"
        if warnings
        else "<p>None.</p>"
    )
    history = title_block.get("revision_history") or []
    history_html = (
        _table(
            ["revision", "date", "by", "description"],
            [
                [
                    r.get("revision", ""),
                    r.get("date", ""),
                    r.get("by", ""),
                    r.get("description", ""),
                ]
                for r in history
            ],
        )
        if history
        else (f"<p>Revision {escape(title_block.get('revision', '—'))}: first issue.</p>")
    )
    software = (
        f"<p>workbench {escape(workbench.__version__)}. Case taken from the notebook's "
        f"{escape(case_source)}; every result and check in this record was recomputed from that "
        "case at export, not copied from cell outputs.</p>"
    )
    sections = [
        _section("title", "Title block", _title_html(title_block, model, fingerprint is not None)),
        _section("purpose", "Purpose and scope", _text_sections(title_block, model)),
        _section("inputs", "Inputs", _inputs_html(computation)),
        _section("method", "Method and assumptions", _method_html()),
        _section("results", "Results", _results_html(computation)),
        *extra_sections(computation),
        _section("checks", "Design checks", _checks_html(computation)),
        _section("hand-check", "Independent hand check", hand_html),
        _section("warnings", "Warnings", warning_html),
        _section("caution", "Caution", f'<p class="caution">{escape(CAUTION)}</p>'),
        _section("revisions", "Revision history", history_html),
        _section("signature", "Signature", _signature_html(signer, signed_at, fingerprint)),
        _section("software", "Software", software),
        _section("notebook", "Notebook", f'<div class="notebook-cells">{notebook_html}</div>'),
    ]
    return '<main id="record-body">\n' + "".join(sections) + "</main>\n"


def signature_block(
    payload: Mapping[str, Any],
    token: str | None,
    jwk: Mapping[str, str] | None,
    fingerprint: str | None,
) -> str:
    """The signature block: verification details, the JWS and the public key (or the payload).

    The verifier rebuilds this text from the token and key and compares it byte for byte.
    """
    how = (
        "Check this record with <code>workbench verify RECORD.html --public-key public.pem</code>"
        " (public.pem is the signer's published public key; compare its fingerprint with the one "
        "above). The content digest is the SHA-256 of this file's bytes with this verification "
        "block (from the comment <code>workbench-record-signature-block</code> to its closing "
        "comment) cut out; the results digest is the SHA-256 of the canonical (RFC 8785) results "
        "and checks rounded to 10 significant digits. The signature (EdDSA/Ed25519, JWS compact, "
        "RFC 7515/8037) covers both digests, the case, the title block, the signer and the time."
    )
    rows = [
        ["Status", "SIGNED" if token else "UNSIGNED"],
        ["Signed by", str(payload.get("signer") or "not named")],
        ["Signed at (UTC)", str(payload.get("signed_at", ""))],
        ["Key fingerprint", fingerprint or "—"],
        ["Content digest", str(payload.get("content_digest", ""))],
        ["Results digest", str(payload.get("results_digest", ""))],
        ["Software", f"workbench {payload.get('software', {}).get('workbench', '')}"],
    ]
    parts = [
        BLOCK_START,
        '<footer id="record-verification">',
        "<h2>Verification</h2>",
        _table(["", ""], rows, "verification"),
        f"<p>{how}</p>",
        "</footer>",
    ]
    if token is not None and jwk is not None:
        parts.append(f'<script type="application/jose" id="record-signature">{token}</script>')
        jwk_text = canonicalize(dict(jwk)).decode("ascii")
        parts.append(
            f'<script type="application/jwk+json" id="record-public-key">{jwk_text}</script>'
        )
    else:
        text = canonicalize(dict(payload)).decode("utf-8")
        # Inside a script element only "</" could end it early; JSON allows "\u003c" for "<".
        text = text.replace("<", "\\u003c")
        parts.append(f'<script type="application/json" id="record-payload">{text}</script>')
    parts.append(BLOCK_END)
    return "\n".join(parts) + "\n"


@lru_cache(maxsize=1)
def record_css() -> str:
    """The record's own stylesheet (screen and print)."""
    return (templates_dir() / "workbench_record" / "static" / "record.css").read_text("utf-8")


@lru_cache(maxsize=1)
def _page_template() -> Any:
    from jinja2 import Environment, FileSystemLoader  # noqa: PLC0415

    environment = Environment(
        loader=FileSystemLoader(str(templates_dir() / "workbench_record")),
        autoescape=True,
        keep_trailing_newline=True,
    )
    return environment.get_template("record.html.j2")


def render_page(title: str, body: str, extra_css: str = "") -> tuple[str, str]:
    """The record page around ``body``: ``(before block, after block)`` text.

    ``extra_css`` (the notebook cells' stylesheets) comes from templates, never from the
    notebook.
    """
    css = (extra_css + "\n" + record_css()) if extra_css else record_css()
    page = _page_template().render(
        title=title,
        csp=Markup(CSP),
        css=Markup(css),
        body=Markup(body),
        block=Markup("\x00BLOCK\x00"),
    )
    before, _, after = page.partition("\x00BLOCK\x00")
    return before, after


def render_record(
    computation: Computation,
    title_block: Mapping[str, Any],
    notebook_html: str,
    *,
    private_key: Any = None,
    signer: str = "",
    signed_at: str | None = None,
    case_source: str = "cell output",
    notebook_name: str = "",
    extra_css: str = "",
) -> str:
    """Write the whole record: body, page, digests, payload and (optionally) signature.

    Parameters
    ----------
    computation
        From :func:`compute`.
    title_block
        From :func:`workbench.record.notebook.title_block_from`.
    notebook_html
        Sanitized HTML of the notebook's cells.
    private_key
        Ed25519 private key, or ``None`` for an UNSIGNED record.
    signer
        Name of the signer (default: the title block's ``prepared_by``).
    signed_at
        ISO 8601 UTC time; default :func:`signing_time`.
    case_source, notebook_name
        Where the case came from; the notebook's file name.
    extra_css
        Stylesheets for the notebook cells (nbconvert's ``lab`` CSS), from templates only.

    Returns
    -------
    str
        The record file's text.
    """
    from workbench.signing import jwk_thumbprint, public_jwk, sign_compact  # noqa: PLC0415

    signed_at = signed_at or signing_time()
    signer = signer or str(title_block.get("prepared_by", ""))
    jwk = public_jwk(private_key.public_key()) if private_key is not None else None
    fingerprint = jwk_thumbprint(jwk) if jwk is not None else None
    body = render_body(
        computation,
        title_block,
        notebook_html,
        signer=signer,
        signed_at=signed_at,
        fingerprint=fingerprint,
        case_source=case_source,
    )
    title = str(title_block.get("subject") or computation.model.title or "Calculation record")
    before, after = render_page(title, body, extra_css)
    payload = {
        "format": FORMAT,
        "format_version": FORMAT_VERSION,
        "software": {"workbench": workbench.__version__},
        "signer": signer,
        "signed_at": signed_at,
        "notebook": notebook_name,
        "title_block": dict(title_block),
        "case": computation.case,
        "results_digest": computation.results_digest,
        "content_digest": content_digest(before + after),
        "content_rule": "sha256 of the file without its signature block",
    }
    token = None
    if private_key is not None:
        token = sign_compact(canonicalize(payload), private_key, {"typ": "JOSE"})
    return before + signature_block(payload, token, jwk, fingerprint) + after
