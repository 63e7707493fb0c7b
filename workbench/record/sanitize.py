"""Make notebook HTML safe to place in a calculation record.

Cell outputs and markdown may carry any HTML. The record keeps what reads as a document
(headings, paragraphs, lists, tables, images from ``data:`` URLs, code) and drops everything
that runs or loads: ``script``, ``style``, ``iframe``, ``object``… together with their content,
every event-handler attribute, and every URL that would fetch (only ``data:`` images stay).
The record's Content-Security-Policy forbids scripts and fetches anyway; the sanitizer makes
that a second, independent wall.

SVG drawings (``image/svg+xml`` outputs, and ``<svg>`` written inline in HTML or markdown) are
kept as pictures: each is cleaned (:func:`clean_svg`) and shown as
``<img src="data:image/svg+xml;base64,…">``. A browser draws an SVG loaded as an image with
scripting off and without fetching anything it references, so even a drawing that slipped
through the cleaning could not run or load; the cleaning keeps it inert when opened on its own.

References
----------
.. [1] W3C, *Content Security Policy Level 3*, Working Draft (2024).
.. [2] OWASP, *Cross Site Scripting Prevention Cheat Sheet*, rules 1–2 and "HTML sanitization".
.. [3] W3C, *SVG Integration*, Editor's Draft, §3 (the "secure static" and "secure animated"
   processing modes of SVG referenced as an image: no script, no external resources).
"""

from __future__ import annotations

import base64
import binascii
import re
import urllib.parse
from xml.etree import ElementTree
from xml.sax.saxutils import escape as xml_escape
from xml.sax.saxutils import quoteattr

import nh3

__all__ = ["clean_svg", "sanitize_notebook_html", "svg_data_uri"]

_DOCUMENT_TAGS = (set(nh3.ALLOWED_TAGS) | {"tfoot", "section"}) - {"map", "area", "main", "footer"}
_DROPPED_WITH_CONTENT = {
    "script",
    "style",
    "iframe",
    "object",
    "embed",
    "noscript",
    "template",
    "svg",
    "math",
    "frame",
    "frameset",
    "applet",
    "link",
    "meta",
    "base",
    "form",
    "textarea",
    "select",
    "button",
    "audio",
    "video",
    "source",
    "track",
    "canvas",
}
_ATTRIBUTES = {
    "*": {"class", "title", "lang", "dir", "align"},
    "img": {"src", "alt", "width", "height"},
    "a": {"href"},
    "td": {"colspan", "rowspan", "align"},
    "th": {"colspan", "rowspan", "align", "scope"},
    "ol": {"start"},
}

SVG_NAMESPACE = "http://www.w3.org/2000/svg"
_XLINK_NAMESPACE = "http://www.w3.org/1999/xlink"
_XML_NAMESPACE = "http://www.w3.org/XML/1998/namespace"
_SVG_DATA = "data:image/svg+xml"

#: SVG elements that run, animate, embed other documents or media: removed with their content.
_SVG_DROPPED = {
    "script",
    "foreignobject",
    "iframe",
    "object",
    "embed",
    "handler",
    "listener",
    "animate",
    "animatemotion",
    "animatetransform",
    "animatecolor",
    "set",
    "discard",
    "audio",
    "video",
    "canvas",
}
#: What a reference (href, src) inside an SVG may point at: a fragment or an embedded bitmap.
_SAFE_REFERENCE = re.compile(r"#|data:image/(png|jpeg|gif|webp);base64,[A-Za-z0-9+/=\s]*$", re.I)
#: CSS that could fetch: url() to anything but a fragment (struck out)…
_CSS_URL = re.compile(r"url\(\s*(?!['\"]?#)[^)]*\)", re.I)
#: …and what a simple pattern cannot follow (escapes, imports, image-set(), src(), the old
#: expression()): a style sheet or attribute holding any of it is dropped whole.
_CSS_REFUSED = re.compile(r"\\|@import|image-set|src\s*\(|expression\s*\(", re.I)
_SVG_TAG = re.compile(r"<(/?)svg\b[^>]*>", re.I)


def _local(name: str) -> str:
    return name.rsplit("}", 1)[-1].lower()


def clean_svg(svg: str) -> str | None:
    """Clean an SVG document so that it can neither run nor load anything.

    Removes scripts, ``foreignObject``, animation and embedding elements (with their
    content), every ``on…`` event attribute, every reference (``href``, ``xlink:href``,
    ``src``) that is not a ``#fragment`` or an embedded bitmap, and CSS that could fetch
    (``url()`` to anything but a fragment; a style sheet with ``@import``, ``image-set()``,
    ``src()`` or escapes is dropped whole). Markup is parsed as XML; a document that declares entities (a DTD
    internal subset) is refused, so nothing expands.

    Parameters
    ----------
    svg
        The SVG text (untrusted).

    Returns
    -------
    str or None
        The cleaned SVG document, or ``None`` when it is not a readable SVG document.
    """
    if "<!ENTITY" in svg.upper():
        return None
    try:
        root = ElementTree.fromstring(svg)
    except ElementTree.ParseError:
        return None
    if root.tag not in ("svg", f"{{{SVG_NAMESPACE}}}svg"):
        return None
    _clean_element(root)
    parts: list[str] = []
    _write(root, parts, top=True)
    return "".join(parts)


def _element_name(tag: str) -> str | None:
    """The name to write an element under: SVG's own (inline SVG may omit the namespace)."""
    if tag.startswith(f"{{{SVG_NAMESPACE}}}"):
        return tag[len(SVG_NAMESPACE) + 2 :]
    return None if tag.startswith("{") else tag


def _attribute_name(name: str) -> str | None:
    if not name.startswith("{"):
        return name
    namespace, _, local = name[1:].partition("}")
    return {_XLINK_NAMESPACE: "xlink:", _XML_NAMESPACE: "xml:"}.get(namespace, "\x00") + local


def _write(element: ElementTree.Element, parts: list[str], top: bool = False) -> None:
    """Write the element as SVG markup.

    Elements and attributes of other vocabularies (editor metadata, RDF) are left out: they
    draw nothing.
    """
    name = _element_name(str(element.tag))
    if name is None:
        return
    attributes = "".join(
        f" {written}={quoteattr(value)}"
        for key, value in element.attrib.items()
        if (written := _attribute_name(key)) is not None and not written.startswith("\x00")
    )
    if top:
        attributes = f' xmlns="{SVG_NAMESPACE}" xmlns:xlink="{_XLINK_NAMESPACE}"' + attributes
    parts.append(f"<{name}{attributes}>")
    if element.text:
        parts.append(xml_escape(element.text))
    for child in element:
        _write(child, parts)
        if child.tail:
            parts.append(xml_escape(child.tail))
    parts.append(f"</{name}>")


def _clean_element(element: ElementTree.Element) -> None:
    if _local(str(element.tag)) == "style":
        # A style sheet is text: markup inside one (a link that markdown made of a URL) is
        # taken back to its text before the fetching parts are struck out.
        text = "".join(element.itertext())
        for child in list(element):
            element.remove(child)
        element.text = "" if _CSS_REFUSED.search(text) else _CSS_URL.sub("none", text)
    for child in list(element):
        if not isinstance(child.tag, str) or _local(child.tag) in _SVG_DROPPED:
            element.remove(child)  # comments, processing instructions, active elements
            continue
        _clean_element(child)
    for name in list(element.attrib):
        local, value = _local(name), element.attrib[name]
        if (
            local.startswith("on")
            or (local in ("href", "src") and not _SAFE_REFERENCE.match(value.strip()))
            or (local == "style" and (_CSS_URL.search(value) or _CSS_REFUSED.search(value)))
        ):
            del element.attrib[name]


def svg_data_uri(svg: str) -> str | None:
    """``data:image/svg+xml;base64,…`` of the cleaned SVG, or ``None`` when it is unreadable."""
    cleaned = clean_svg(svg)
    if cleaned is None:
        return None
    return _SVG_DATA + ";base64," + base64.b64encode(cleaned.encode("utf-8")).decode("ascii")


def _decode_svg_uri(uri: str) -> str | None:
    header, comma, payload = uri.partition(",")
    if not comma:
        return None
    try:
        if header.lower().endswith(";base64"):
            return base64.b64decode(payload, validate=False).decode("utf-8")
        return urllib.parse.unquote(payload, errors="strict")
    except (binascii.Error, UnicodeDecodeError, ValueError):
        return None


def _attribute_filter(tag: str, attribute: str, value: str) -> str | None:
    # A '<' or '>' in an attribute value is written out raw by the serializer; refuse it so
    # no markup-looking text (a stray "</main>") can appear in the record outside text nodes.
    if "<" in value or ">" in value:
        return None
    if tag == "img" and attribute == "src":
        if not value.startswith("data:image/"):
            return None  # an image from anywhere but the record itself would be a fetch
        if value[: len(_SVG_DATA)].lower() == _SVG_DATA:
            svg = _decode_svg_uri(value)
            return None if svg is None else svg_data_uri(svg)
    return value


def _inline_svgs_to_images(html: str) -> str:
    """Replace each outermost inline ``<svg>…</svg>`` by an image of the cleaned drawing."""
    if "<svg" not in html.lower():
        return html
    pieces: list[str] = []
    done = depth = start = 0
    for match in _SVG_TAG.finditer(html):
        closing, empty = match.group(1) == "/", match.group(0).endswith("/>")
        if closing and depth:
            depth -= 1
        elif not closing:
            if depth == 0:
                start = match.start()
            depth += 0 if empty else 1
        else:
            continue  # a stray closing tag: nh3 drops it
        if depth == 0:
            pieces += [html[done:start], _svg_image(html[start : match.end()])]
            done = match.end()
    pieces.append(html[done:])
    return "".join(pieces)


def _svg_image(svg: str) -> str:
    uri = svg_data_uri(svg)
    if uri is None:
        return (
            '<p class="svg-dropped">[an SVG drawing that could not be read safely is left out]</p>'
        )
    return f'<img alt="SVG drawing from the notebook" src="{uri}">'


def sanitize_notebook_html(html: str) -> str:
    """Clean notebook HTML for the record.

    Parameters
    ----------
    html
        HTML rendered from notebook cells (untrusted).

    Returns
    -------
    str
        The HTML with only document elements, no scripts, styles, frames, forms, event
        handlers, ids or comments, images only from ``data:`` URLs (SVG images cleaned by
        :func:`clean_svg`, inline ``<svg>`` turned into such images), links only to
        ``http``/``https``/``mailto`` (following a link is the reader's act, not a fetch).
    """
    return nh3.clean(
        _inline_svgs_to_images(html),
        tags=_DOCUMENT_TAGS - _DROPPED_WITH_CONTENT,
        clean_content_tags=_DROPPED_WITH_CONTENT,
        attributes=_ATTRIBUTES,
        attribute_filter=_attribute_filter,
        strip_comments=True,
        url_schemes={"http", "https", "mailto", "data"},
        link_rel="noopener noreferrer nofollow",
    )
