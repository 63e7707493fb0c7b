"""SVG from notebook outputs: parsed with defusedxml, written back through an allow-list.

Independent references: the attacks are the classic XML ones (entity expansion, "billion
laughs"; external entities, XXE; external parameter entities) as the OWASP XML External Entity
Prevention Cheat Sheet describes them (from memory); the cleaned drawings are read back with
the standard library's minidom, another parser than the cleaner's; a real drawing comes from
matplotlib's SVG writer.
"""

from __future__ import annotations

import base64
import io
import re
import urllib.parse
from collections import Counter
from xml.dom import minidom

import nbformat
import pytest

from workbench.record.demo import demo_notebook
from workbench.record.exporter import RecordExporter
from workbench.record.sanitize import clean_svg, sanitize_notebook_html, svg_problem

SVG = 'xmlns="http://www.w3.org/2000/svg"'
LAUGHS = (
    '<?xml version="1.0"?><!DOCTYPE svg [<!ENTITY a "laughlaugh">'
    + "".join(
        f'<!ENTITY {name} "{("&" + previous + ";") * 10}">'
        for previous, name in zip("abcdefgh", "bcdefghi", strict=True)
    )
    + f"]><svg {SVG}><text>&i;</text></svg>"
)  # &i; expands to 10^9 words
EXTERNAL_ENTITY = (
    '<!DOCTYPE svg [<!ENTITY secret SYSTEM "file:///etc/passwd">]>'
    f"<svg {SVG}><text>&secret;</text></svg>"
)
EXTERNAL_PARAMETER_ENTITY = (
    '<!DOCTYPE svg [<!ENTITY % remote SYSTEM "http://example.invalid/x.dtd"> %remote;]>'
    f"<svg {SVG}/>"
)
HOSTILE = {
    "billion laughs": (LAUGHS, "declares XML entities"),
    "external entity": (EXTERNAL_ENTITY, "declares XML entities"),
    "external parameter entity": (EXTERNAL_PARAMETER_ENTITY, "declares XML entities"),
}


def _names(svg: str) -> Counter[str]:
    return Counter(node.localName for node in minidom.parseString(svg).getElementsByTagName("*"))


@pytest.mark.parametrize("kind", HOSTILE)
def test_entities_are_refused_with_a_reason(kind: str) -> None:
    svg, reason = HOSTILE[kind]
    assert clean_svg(svg) is None
    problem = svg_problem(svg)
    assert problem is not None and reason in problem


@pytest.mark.parametrize("kind", HOSTILE)
def test_refused_drawings_leave_a_note_in_every_form(kind: str) -> None:
    svg, reason = HOSTILE[kind]
    base64_uri = "data:image/svg+xml;base64," + base64.b64encode(svg.encode()).decode()
    quoted_uri = "data:image/svg+xml," + urllib.parse.quote(svg)
    forms = [
        f'<p>before</p><img alt="x" src="{base64_uri}"><p>after</p>',
        f"<p>before</p><img src='{quoted_uri}' alt='x'><p>after</p>",
    ]
    body = svg.split("]>")[-1]
    if "&" in body:  # inline, the DOCTYPE left to HTML: its entity is undefined there
        forms.append(f"<p>before</p>{body}<p>after</p>")
    for index, html in enumerate(forms):
        cleaned = sanitize_notebook_html(html)
        assert "<p>before</p>" in cleaned and "<p>after</p>" in cleaned
        assert '<p class="svg-dropped">[an SVG drawing is left out: ' in cleaned
        assert reason in cleaned if index < 2 else "not well-formed XML" in cleaned
        assert "data:image/svg" not in cleaned and "laugh" not in cleaned
        assert "ENTITY" not in cleaned and "passwd" not in cleaned


def test_exported_record_notes_a_refused_drawing() -> None:
    nb = demo_notebook(executed=True)
    cell = nbformat.v4.new_code_cell("draw()")
    cell.outputs = [
        nbformat.v4.new_output("display_data", data={"image/svg+xml": LAUGHS, "text/plain": "x"}),
        nbformat.v4.new_output(
            "display_data", data={"image/svg+xml": EXTERNAL_ENTITY, "text/plain": "x"}
        ),
    ]
    nb.cells.append(cell)
    text, _ = RecordExporter(execute=False).from_notebook_node(nb)
    notebook = text.split('<section class="record-section" id="notebook">')[1]
    assert notebook.count("[an SVG drawing is left out: it declares XML entities") == 2
    assert "laugh" not in text and "passwd" not in text


def test_only_allowed_elements_and_attributes_are_kept() -> None:
    # Source: W3C SVG 2 element and attribute indexes (from memory): rect, circle, g and their
    # geometry and paint attributes are static drawing; the rest is not SVG or not static.
    svg = (
        f'<svg {SVG} xmlns:x="urn:other" width="10" onload="go()" x:note="n">'
        '<g id="frame" data-note="x" fill="#123456">'
        '<rect width="4" height="2" onmouseover="go()" stroke="url(#edge)"/>'
        '<circle r="1" fill="url(http://example.invalid/p#x)" stroke="u\\72l(x)"/>'
        '<ruler length="3"><rect width="9"/></ruler>'
        '<x:tool><rect width="8"/></x:tool>'
        '<script>go()</script><animate attributeName="r" to="9"/>'
        '<foreignObject><p xmlns="http://www.w3.org/1999/xhtml">html</p></foreignObject>'
        "</g></svg>"
    )
    cleaned = clean_svg(svg)
    assert cleaned is not None
    assert _names(cleaned) == Counter({"svg": 1, "g": 1, "rect": 1, "circle": 1})
    document = minidom.parseString(cleaned)
    kept = {
        node.localName: {
            node.attributes.item(i).name: node.attributes.item(i).value
            for i in range(node.attributes.length)
        }
        for node in document.getElementsByTagName("*")
    }
    assert kept["svg"] == {
        "xmlns": "http://www.w3.org/2000/svg",
        "xmlns:xlink": "http://www.w3.org/1999/xlink",
        "width": "10",
    }
    assert kept["g"] == {"id": "frame", "fill": "#123456"}
    assert kept["rect"] == {"width": "4", "height": "2", "stroke": "url(#edge)"}
    assert kept["circle"] == {"r": "1"}  # a fetching url() and a CSS escape are struck out
    assert "html" not in cleaned and "go()" not in cleaned


def test_references_stay_inside_the_drawing() -> None:
    # Source: W3C SVG Integration, "secure static mode" (from memory): an SVG shown as an
    # image loads nothing; the cleaner keeps only what needs no loading.
    png = base64.b64encode(b"\x89PNG\r\n\x1a\n").decode()
    svg_uri = "data:image/svg+xml;base64," + base64.b64encode(f"<svg {SVG}/>".encode()).decode()
    svg = (
        f'<svg {SVG} xmlns:xlink="http://www.w3.org/1999/xlink">'
        f'<image id="bitmap" href="data:image/png;base64,{png}" width="1" height="1"/>'
        '<image id="remote" xlink:href="http://example.invalid/x.png"/>'
        f'<image id="nested" href="{svg_uri}"/>'
        '<use id="inside" xlink:href="#bitmap"/><use id="outside" href="other.svg#shape"/>'
        '<a id="script" href="javascript:go()"><rect width="1"/></a>'
        "</svg>"
    )
    cleaned = clean_svg(svg)
    assert cleaned is not None
    references = {
        node.getAttribute("id"): node.getAttribute("href") or node.getAttribute("xlink:href")
        for node in minidom.parseString(cleaned).getElementsByTagName("*")
        if node.getAttribute("id")
    }
    assert references == {
        "bitmap": f"data:image/png;base64,{png}",
        "remote": "",
        "nested": "",
        "inside": "#bitmap",
        "outside": "",
        "script": "",
    }
    assert "rect" in _names(cleaned)  # the link's drawing stays, the link goes


def test_style_sheets_keep_their_rules_but_fetch_nothing() -> None:
    svg = (
        f"<svg {SVG}><style>rect {{ fill: url(#paint) }} circle {{ fill: url(http://e.invalid/a) }}"
        "</style><style>@import url(http://e.invalid/b.css); g { fill: red }</style></svg>"
    )
    cleaned = clean_svg(svg)
    assert cleaned is not None
    assert "rect { fill: url(#paint) }" in cleaned and "circle { fill: none }" in cleaned
    assert "e.invalid" not in cleaned and "fill: red" not in cleaned


@pytest.mark.parametrize("fonttype", ["path", "none"])
def test_a_matplotlib_drawing_survives_whole(fonttype: str) -> None:
    # Outside source: matplotlib's SVG writer (paths, clip paths, markers through <use>, text,
    # an embedded PNG). Everything it draws is kept; only its RDF <metadata> is left out.
    import matplotlib
    import numpy as np
    from matplotlib.figure import Figure  # no pyplot: no backend is chosen for other tests

    with matplotlib.rc_context({"svg.fonttype": fonttype}):
        figure = Figure()
        axes = figure.subplots()
        x = np.linspace(0.0, 1.0, 20)
        axes.plot(x, x**2, "o-", label="angle of twist")
        axes.fill_between(x, x, alpha=0.3)
        axes.imshow(np.arange(16.0).reshape(4, 4), extent=(0, 0.3, 0, 0.3))
        axes.legend()
        axes.set_title("θ(x)")
        buffer = io.StringIO()
        figure.savefig(buffer, format="svg")
    drawing = buffer.getvalue()
    cleaned = clean_svg(drawing)
    assert cleaned is not None
    expected = _names(re.sub(r"<metadata>.*</metadata>", "", drawing, flags=re.S))
    assert _names(cleaned) == expected
    assert expected["path"] > 10 and expected["image"] == 1
