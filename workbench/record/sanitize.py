"""Make notebook HTML safe to place in a calculation record.

Cell outputs and markdown may carry any HTML. The record keeps what reads as a document
(headings, paragraphs, lists, tables, images from ``data:`` URLs, code) and drops everything
that runs or loads: ``script``, ``style``, ``iframe``, ``object``… together with their content,
every event-handler attribute, and every URL that would fetch (only ``data:`` images stay).
The record's Content-Security-Policy forbids scripts and fetches anyway; the sanitizer makes
that a second, independent wall.

SVG drawings (``image/svg+xml`` outputs, and ``<svg>`` written inline in HTML or markdown) are
kept as pictures: each is parsed with defusedxml (no entity expansion, nothing external), written
back through an allow-list of static SVG (:func:`clean_svg`) and shown as
``<img src="data:image/svg+xml;base64,…">``; a drawing that cannot be read safely is replaced by
one line saying why. A browser draws an SVG loaded as an image with scripting off and without
fetching anything it references, so even a drawing that slipped through the cleaning could not
run or load; the cleaning keeps it inert when opened on its own.

References
----------
.. [1] W3C, *Content Security Policy Level 3*, Working Draft (2024).
.. [2] OWASP, *Cross Site Scripting Prevention Cheat Sheet*, rules 1–2 and "HTML sanitization".
.. [3] W3C, *SVG Integration*, Editor's Draft, §3 (the "secure static" and "secure animated"
   processing modes of SVG referenced as an image: no script, no external resources).
.. [4] OWASP, *XML External Entity Prevention Cheat Sheet* (entity expansion, external entities).
"""

from __future__ import annotations

import base64
import binascii
import re
import urllib.parse
from html import unescape
from xml.etree import ElementTree
from xml.sax.saxutils import escape as xml_escape
from xml.sax.saxutils import quoteattr

import nh3

from workbench.record.templating import render

__all__ = ["clean_svg", "sanitize_notebook_html", "svg_data_uri", "svg_problem"]

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

#: SVG elements kept: static drawing, text, paint servers, clipping, masking and filters.
#: Anything else (script, foreignObject, animation, media, fonts, metadata…) is left out with
#: its content.
_SVG_ELEMENTS = frozenset(
    """
    svg g defs symbol use switch title desc a style
    path rect circle ellipse line polyline polygon text tspan textPath image
    linearGradient radialGradient stop pattern clipPath mask marker
    filter feBlend feColorMatrix feComponentTransfer feComposite feConvolveMatrix
    feDiffuseLighting feDisplacementMap feDistantLight feDropShadow feFlood feFuncA feFuncB
    feFuncG feFuncR feGaussianBlur feImage feMerge feMergeNode feMorphology feOffset
    fePointLight feSpecularLighting feSpotLight feTile feTurbulence
    """.split()  # noqa: SIM905 - read as the SVG index lists them, not 190 lines
)
#: Attributes kept (as written out: ``xlink:href``, ``xml:space``). No event handler (``on…``)
#: is among them; values are checked further in :func:`_attribute_kept`.
_SVG_ATTRIBUTES = frozenset(
    """
    id class style lang xml:lang xml:space role aria-label aria-hidden transform
    width height viewBox preserveAspectRatio version x y x1 y1 x2 y2 cx cy r rx ry fx fy fr
    d points pathLength dx dy rotate textLength lengthAdjust startOffset method spacing side
    href xlink:href offset gradientUnits gradientTransform spreadMethod patternUnits
    patternContentUnits patternTransform clipPathUnits maskUnits maskContentUnits markerUnits
    markerWidth markerHeight refX refY orient filterUnits primitiveUnits in in2 result
    stdDeviation mode operator k1 k2 k3 k4 values type tableValues slope intercept amplitude
    exponent radius baseFrequency numOctaves seed stitchTiles scale xChannelSelector
    yChannelSelector order kernelMatrix divisor bias targetX targetY edgeMode kernelUnitLength
    preserveAlpha surfaceScale diffuseConstant specularConstant specularExponent azimuth
    elevation z pointsAtX pointsAtY pointsAtZ limitingConeAngle
    alignment-baseline baseline-shift clip clip-path clip-rule color color-interpolation
    color-interpolation-filters color-rendering direction display dominant-baseline fill
    fill-opacity fill-rule filter flood-color flood-opacity font-family font-size
    font-size-adjust font-stretch font-style font-variant font-weight image-rendering
    letter-spacing lighting-color marker-start marker-mid marker-end mask opacity overflow
    paint-order shape-rendering stop-color stop-opacity stroke stroke-dasharray
    stroke-dashoffset stroke-linecap stroke-linejoin stroke-miterlimit stroke-opacity
    stroke-width text-anchor text-decoration text-rendering transform-origin unicode-bidi
    vector-effect visibility word-spacing writing-mode
    """.split()  # noqa: SIM905 - read as the SVG index lists them, not 190 lines
)
#: What a reference (href) inside an SVG may point at: a fragment or an embedded bitmap.
_SAFE_REFERENCE = re.compile(r"#|data:image/(png|jpeg|gif|webp);base64,[A-Za-z0-9+/=\s]*$", re.I)
#: CSS that could fetch: url() to anything but a fragment (struck out of style sheets)…
_CSS_URL = re.compile(r"url\(\s*(?!['\"]?#)[^)]*\)", re.I)
#: …and what a simple pattern cannot follow (escapes, imports, image-set(), src(), the old
#: expression()): a style sheet or attribute holding any of it is dropped whole.
_CSS_REFUSED = re.compile(r"\\|@import|image-set|src\s*\(|expression\s*\(", re.I)
_SVG_TAG = re.compile(r"<(/?)svg\b[^>]*>", re.I)
#: An ``<img>`` whose quoted ``src`` is an SVG data URL (nbconvert writes SVG outputs so).
_SVG_IMG = re.compile(r"<img\b[^>]*?\ssrc\s*=\s*([\"'])(data:image/svg\+xml[^\"']*)\1[^>]*>", re.I)


def clean_svg(svg: str) -> str | None:
    """Clean an SVG document so that it can neither run nor load anything.

    The text is parsed with defusedxml, which refuses entity declarations (no "billion
    laughs") and external references (no external entity or DTD fetch). Only elements and
    attributes named in an allow-list of static SVG are written back; everything else is left
    out (elements with their content): scripts, ``foreignObject``, animation, event-handler
    attributes and any other vocabulary. A reference (``href``, ``xlink:href``) must be a
    ``#fragment`` or an embedded PNG/JPEG/GIF/WebP; an attribute or style sheet that could fetch
    (``url()`` to anything but a fragment) is struck out, and one using ``@import``,
    ``image-set()``, ``src()`` or CSS escapes is dropped whole.

    Parameters
    ----------
    svg
        The SVG text (untrusted).

    Returns
    -------
    str or None
        The cleaned SVG document, or ``None`` when it is not a readable SVG document
        (:func:`svg_problem` says why).

    References
    ----------
    .. [1] W3C, *Scalable Vector Graphics (SVG) 2*, Candidate Recommendation (2018), element
       and attribute indexes (the allow-lists).
    .. [2] OWASP, *XML External Entity Prevention Cheat Sheet* (entity expansion, XXE).
    """
    cleaned, _ = _clean_svg(svg)
    return cleaned


def svg_problem(svg: str) -> str | None:
    """Why :func:`clean_svg` refuses ``svg`` (one line), or ``None`` when it accepts it."""
    return _clean_svg(svg)[1]


def _clean_svg(svg: str) -> tuple[str | None, str | None]:
    from defusedxml import DefusedXmlException, EntitiesForbidden  # noqa: PLC0415
    from defusedxml.ElementTree import ParseError, fromstring  # noqa: PLC0415

    try:
        # A DOCTYPE alone is common (drawing programs write SVG 1.1's); entities are not.
        root = fromstring(svg, forbid_dtd=False, forbid_entities=True, forbid_external=True)
    except EntitiesForbidden:
        return None, "it declares XML entities, which could expand without end or read files"
    except DefusedXmlException:  # ExternalReferenceForbidden: a DTD or entity to fetch
        return None, "it refers to an external document"
    except ParseError as error:
        return None, f"it is not well-formed XML ({error})"
    if root.tag not in ("svg", f"{{{SVG_NAMESPACE}}}svg"):
        return None, "it is not an SVG document"
    parts: list[str] = []
    _write(root, parts, top=True)
    return "".join(parts), None


def _element_name(tag: str) -> str | None:
    """The SVG name to write an element under, or ``None`` to leave it out with its content."""
    if tag.startswith(f"{{{SVG_NAMESPACE}}}"):
        tag = tag[len(SVG_NAMESPACE) + 2 :]
    return tag if tag in _SVG_ELEMENTS else None  # inline SVG may omit the namespace


def _attribute_name(name: str) -> str:
    if not name.startswith("{"):
        return name
    namespace, _, local = name[1:].partition("}")
    return {_XLINK_NAMESPACE: "xlink:", _XML_NAMESPACE: "xml:"}.get(namespace, "\x00") + local


def _attribute_kept(name: str, value: str) -> bool:
    if name not in _SVG_ATTRIBUTES or _CSS_URL.search(value) or _CSS_REFUSED.search(value):
        return False
    return name not in ("href", "xlink:href") or bool(_SAFE_REFERENCE.match(value.strip()))


def _write(element: ElementTree.Element, parts: list[str], top: bool = False) -> None:
    """Write the element as SVG markup if the allow-list names it (with its content)."""
    name = _element_name(str(element.tag))  # comments and processing instructions: no str tag
    if name is None or not isinstance(element.tag, str):
        return
    attributes = "".join(
        f" {written}={quoteattr(value)}"
        for key, value in element.attrib.items()
        if _attribute_kept(written := _attribute_name(key), value)
    )
    if top:
        attributes = f' xmlns="{SVG_NAMESPACE}" xmlns:xlink="{_XLINK_NAMESPACE}"' + attributes
    parts.append(f"<{name}{attributes}>")
    if name == "style":
        # A style sheet is text: markup inside one (a link that markdown made of a URL) is
        # taken back to its text before the fetching parts are struck out.
        text = "".join(element.itertext())
        parts.append("" if _CSS_REFUSED.search(text) else xml_escape(_CSS_URL.sub("none", text)))
    else:
        if element.text:
            parts.append(xml_escape(element.text))
        for child in element:
            _write(child, parts)
            if child.tail:
                parts.append(xml_escape(child.tail))
    parts.append(f"</{name}>")


def svg_data_uri(svg: str) -> str | None:
    """``data:image/svg+xml;base64,…`` of the cleaned SVG, or ``None`` when it is unreadable."""
    cleaned = clean_svg(svg)
    return None if cleaned is None else _data_uri(cleaned)


def _data_uri(cleaned_svg: str) -> str:
    return _SVG_DATA + ";base64," + base64.b64encode(cleaned_svg.encode("utf-8")).decode("ascii")


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


def _svg_images_to_clean_images(html: str) -> str:
    """Replace each ``<img>`` of an SVG data URL by an image of the cleaned drawing or a note.

    Whatever this pattern misses still meets :func:`_attribute_filter`, which cleans the
    drawing or drops its ``src``.
    """
    if "data:image/svg+xml" not in html.lower():
        return html
    return _SVG_IMG.sub(lambda match: _svg_image(_decode_svg_uri(unescape(match.group(2)))), html)


def _svg_image(svg: str | None) -> str:
    """An image of the cleaned drawing, or one line saying why the drawing is left out."""
    cleaned, problem = (None, "its data URL cannot be decoded") if svg is None else _clean_svg(svg)
    if cleaned is None:
        return render("notebook/svg_drawing.html.j2", problem=str(problem), data_uri="")
    return render("notebook/svg_drawing.html.j2", problem=None, data_uri=_data_uri(cleaned))


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
        _inline_svgs_to_images(_svg_images_to_clean_images(html)),
        tags=_DOCUMENT_TAGS - _DROPPED_WITH_CONTENT,
        clean_content_tags=_DROPPED_WITH_CONTENT,
        attributes=_ATTRIBUTES,
        attribute_filter=_attribute_filter,
        strip_comments=True,
        url_schemes={"http", "https", "mailto", "data"},
        link_rel="noopener noreferrer nofollow",
    )
