"""Make notebook HTML safe to place in a calculation record.

Cell outputs and markdown may carry any HTML. The record keeps what reads as a document
(headings, paragraphs, lists, tables, images from ``data:`` URLs, code) and drops everything
that runs or loads: ``script``, ``style``, ``iframe``, ``object``… together with their content,
every event-handler attribute, and every URL that would fetch (only ``data:`` images stay).
The record's Content-Security-Policy forbids scripts and fetches anyway; the sanitizer makes
that a second, independent wall.

References
----------
.. [1] W3C, *Content Security Policy Level 3*, Working Draft (2024).
.. [2] OWASP, *Cross Site Scripting Prevention Cheat Sheet*, rules 1–2 and "HTML sanitization".
"""

from __future__ import annotations

import nh3

__all__ = ["sanitize_notebook_html"]

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


def _attribute_filter(tag: str, attribute: str, value: str) -> str | None:
    # A '<' or '>' in an attribute value is written out raw by the serializer; refuse it so
    # no markup-looking text (a stray "</main>") can appear in the record outside text nodes.
    if "<" in value or ">" in value:
        return None
    if tag == "img" and attribute == "src" and not value.startswith("data:image/"):
        return None  # an image from anywhere but the record itself would be a fetch
    return value


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
        handlers, ids or comments, images only from ``data:`` URLs, links only to
        ``http``/``https``/``mailto`` (following a link is the reader's act, not a fetch).
    """
    return nh3.clean(
        html,
        tags=_DOCUMENT_TAGS - _DROPPED_WITH_CONTENT,
        clean_content_tags=_DROPPED_WITH_CONTENT,
        attributes=_ATTRIBUTES,
        attribute_filter=_attribute_filter,
        strip_comments=True,
        url_schemes={"http", "https", "mailto", "data"},
        link_rel="noopener noreferrer nofollow",
    )
