"""The record's markup comes from autoescaped templates only.

Independent references: the standard library's HTML parser (html.parser) and XML parser
(xml.etree) read the page and its drawings back, and Python's own ``ast`` reads the record's
modules; the Marin factors the record shows are compared with Shigley's formulas.
"""

from __future__ import annotations

import ast
import base64
import copy
import math
import re
from html.parser import HTMLParser
from pathlib import Path
from xml.etree import ElementTree

import pytest

from workbench.record.demo import DEMO_TITLE_BLOCK, FEED_DRIVE_CASE
from workbench.record.document import compute, render_record
from workbench.signing import generate_key

SCRIPT = "<script>alert(1)</script>"
IMAGE = '"><img src=x onerror=alert(2)>'
HOSTILE = f"{SCRIPT} {IMAGE}"
SIGNED_AT = "2025-03-01T12:00:00Z"
RECORD_PACKAGE = Path(__file__).resolve().parents[1] / "workbench" / "record"


def _hostile_case() -> dict:
    """The feed-drive demo with markup in the title, a material, the shaft and every name.

    A second support makes the hand check apply, so every section of the record shows names.
    """
    case = copy.deepcopy(FEED_DRIVE_CASE)
    shaft, material = f"feed {HOSTILE}", f"steel {HOSTILE}"
    start, running = f"start-up {HOSTILE}", f"running {HOSTILE}"
    case["title"] = f"Feed drive {HOSTILE}"
    case["materials"] = {material: case["materials"]["steel"]}
    case["materials"][material]["source"] = f"handbook {HOSTILE}"
    case["shafts"][0]["id"] = shaft
    for segment in case["shafts"][0]["segments"]:
        segment["material"] = material
    case["supports"].append({"shaft": "feed", "x": 700, "kind": "spring", "stiffness": 3000})
    for item in (*case["supports"], *case["discs"]):
        item["shaft"] = shaft
    case["operating_speeds"][0]["name"] = f"run {HOSTILE}"
    case["load_cases"][0]["name"], case["load_cases"][1]["name"] = start, running
    for load_case in case["load_cases"]:
        for torque in load_case["torques"]:
            torque["shaft"] = shaft
    case["combinations"] = [{"name": f"both {HOSTILE}", "factors": {start: 1.2}}]
    case["design"]["fatigue"]["extremes"] = [start, running]
    return case


def _hostile_title_block() -> dict:
    block = copy.deepcopy(DEMO_TITLE_BLOCK)
    for key in ("project", "subject", "prepared_by", "revision", "purpose", "scope"):
        block[key] = f"{block.get(key, key)} {HOSTILE}"
    block["revision_history"][0]["description"] = HOSTILE
    return block


class _Page(HTMLParser):
    """Every element of a page with its attributes, and its text (entities decoded)."""

    def __init__(self, text: str) -> None:
        super().__init__(convert_charrefs=True)
        self.elements: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []
        self.feed(text)
        self.close()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.elements.append((tag, dict(attrs)))

    def handle_data(self, data: str) -> None:
        self.text.append(data)


@pytest.fixture(scope="module", params=["signed", "unsigned"])
def hostile_record(request: pytest.FixtureRequest) -> str:
    key = generate_key() if request.param == "signed" else None
    return render_record(
        compute(_hostile_case()),
        _hostile_title_block(),
        "",
        private_key=key,
        signer=f"A. Signer {HOSTILE}",
        signed_at=SIGNED_AT,
        case_source=f"case file {HOSTILE}.json",
    )


def test_markup_in_names_creates_no_element(hostile_record: str) -> None:
    assert SCRIPT not in hostile_record
    assert "<img src=x" not in hostile_record
    page = _Page(hostile_record)
    scripts = [attrs.get("id") for tag, attrs in page.elements if tag == "script"]
    assert scripts in (["record-signature", "record-public-key"], ["record-payload"])
    for tag, attrs in page.elements:
        assert not any(name.startswith("on") for name in attrs), (tag, attrs)
        if tag == "img":
            assert set(attrs) <= {"class", "alt", "src", "width", "height"}
            assert (attrs["src"] or "").startswith("data:image/svg+xml;base64,")
    # The names are shown as text: the title, the material's source, the shaft, every result.
    text = "".join(page.text)
    for shown in (
        f"Line shaft torsion check {HOSTILE}",  # the heading (subject)
        f"handbook {HOSTILE}",
        f"Load case start-up {HOSTILE}",
        f"Combination both {HOSTILE}",
        f"run {HOSTILE}",
        f"A. Signer {HOSTILE}",
        f"case file {HOSTILE}.json",
    ):
        assert shown in text, shown
    assert text.count(f"feed {HOSTILE}") >= 10  # inputs, results, checks, fatigue, hand check
    assert text.count(SCRIPT) >= 40


def test_markup_in_names_stays_text_in_the_drawings(hostile_record: str) -> None:
    drawings = re.findall(r'src="data:image/svg\+xml;base64,([A-Za-z0-9+/=]+)"', hostile_record)
    # The elevation, 3 results × 1 shaft, 4 mode shapes, 3 fatigue diagrams and the equations.
    assert len(drawings) >= 11 + 8
    allowed = {"svg", "rect", "line", "polyline", "polygon", "path", "text", "circle"}
    shown = 0
    for encoded in drawings:
        svg = base64.b64decode(encoded).decode("utf-8")
        if "matplotlib" in svg:  # a shipped equation picture: fixed, no names in it
            continue
        root = ElementTree.fromstring(svg)
        tags = {element.tag.removeprefix("{http://www.w3.org/2000/svg}") for element in root.iter()}
        assert tags <= allowed, tags - allowed
        shown += HOSTILE in "".join(root.itertext())
    assert shown >= 8  # the elevation (loads, shaft), the results, the modes, fatigue diagrams


def test_title_block_shows_markup_as_text_in_the_page_title(hostile_record: str) -> None:
    title = hostile_record.split("<title>", 1)[1].split("</title>", 1)[0]
    assert title == (
        "Line shaft torsion check &lt;script&gt;alert(1)&lt;/script&gt; "
        "&#34;&gt;&lt;img src=x onerror=alert(2)&gt;"
    )


# --- no markup written by Python -----------------------------------------------------------

#: Elements the record writes. A string holding one of these opening tags in a module would be
#: markup built in Python, outside the autoescaped templates.
TAGS = (
    "a", "br", "circle", "code", "div", "em", "footer", "h1", "h2", "h3", "h4", "img", "line",
    "li", "main", "meta", "p", "path", "polygon", "polyline", "rect", "script", "section",
    "span", "strong", "style", "sub", "svg", "table", "tbody", "td", "text", "th", "thead",
    "title", "tr", "ul",
)  # fmt: skip
TAG = re.compile(r"<\s*(" + "|".join(TAGS) + r")(\s|>|/)", re.IGNORECASE)


def _strings(path: Path) -> list[tuple[int, str]]:
    """Every string constant of a module but its docstrings (line, text)."""
    tree = ast.parse(path.read_text("utf-8"))
    docstrings = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Module | ast.ClassDef | ast.FunctionDef | ast.AsyncFunctionDef):
            body = node.body
            if body and isinstance(body[0], ast.Expr) and isinstance(body[0].value, ast.Constant):
                docstrings.add(id(body[0].value))
    return sorted(
        (node.lineno, node.value)
        for node in ast.walk(tree)
        if isinstance(node, ast.Constant)
        and isinstance(node.value, str)
        and id(node) not in docstrings
    )


def test_no_record_module_writes_markup() -> None:
    modules = sorted(RECORD_PACKAGE.rglob("*.py"))
    assert len(modules) >= 15 and any(m.parent.name == "view_model" for m in modules)
    found = [
        f"{module.relative_to(RECORD_PACKAGE)}:{line}: {text[:60]!r}"
        for module in modules
        for line, text in _strings(module)
        if TAG.search(text)
    ]
    assert found == []


def test_the_markup_check_finds_markup(tmp_path: Path) -> None:
    """The check above can fail: it finds what a module of the old kind wrote."""
    old_kind = tmp_path / "old_kind.py"
    old_kind.write_text(
        '"""Cells: ``<td>`` in a docstring is prose."""\n'
        "def cell(value):\n"
        "    return f'<td>{value}</td>'\n"
        "ROW = '<tr class=\"x\">'\n"
        "NOTE = 'θ < 1 and τ<2, &lt;p&gt;'\n",
        encoding="utf-8",
    )
    found = [text for _, text in _strings(old_kind) if TAG.search(text)]
    assert found == ["<td>", '<tr class="x">']


def test_no_record_template_turns_escaping_off() -> None:
    from workbench.record.templating import environment, templates_dir

    assert environment().autoescape is True
    folder = templates_dir() / "workbench_record"
    # index.html.j2 is nbconvert's (the notebook's cells, cleaned afterwards by the sanitizer).
    ours = [path for path in folder.rglob("*.j2") if path.name != "index.html.j2"]
    assert len(ours) >= 20
    opt_out = re.compile(r"\|\s*safe\b|autoescape\s+false|Markup", re.IGNORECASE)
    assert [path.name for path in ours if opt_out.search(path.read_text("utf-8"))] == []


# --- the fatigue section reads the check's own endurance limits ------------------------------


def test_marin_factors_are_the_checks_own_and_match_shigley() -> None:
    # Feed-drive demo, segment 0: Ø45 mm, machined, Sut 620 MPa, 99 % reliability. Shigley's
    # Mechanical Engineering Design, 9th ed.: ka = 4.51·Sut^−0.265 (Table 6-2, machined),
    # kb = 1.24·d^−0.107 (eq. 6-20, d in mm, 2.79 ≤ d ≤ 51), kc = 0.59 (torsion), kd = 1 (room
    # temperature), ke = 0.814 (Table 6-5, 99 %), Se′ = 0.5·Sut (eq. 6-8).
    from workbench.record.render import render_sections

    computation = compute(FEED_DRIVE_CASE)
    point = computation.report.fatigue_points[0]
    limit = point.endurance_limit
    expected = (4.51 * 620**-0.265, 1.24 * 45**-0.107, 0.59, 1.0, 0.814)
    for factor, value in zip(limit.factors[:5], expected, strict=True):
        assert factor.value == pytest.approx(value, rel=5e-3), factor.symbol
    assert limit.rotating_beam_limit == pytest.approx(0.5 * 620e6)
    assert limit.value == pytest.approx(point.factors.endurance_shear)  # what the check used
    fatigue = dict(render_sections(computation))["fatigue"]
    row = fatigue.split("<h4>Marin factors</h4>")[1].split("<tbody><tr>", 1)[1].split("</tr>")[0]
    cells = re.findall(r"<td>(.*?)</td>", row)
    assert cells[:3] == ["feed", "0", "45"]
    assert [float(cell) for cell in cells[3:8]] == pytest.approx(expected, rel=5e-3)
    assert float(cells[9]) == pytest.approx(math.prod(expected) * 310, rel=5e-3)  # Sse, MPa
