"""The record's HTML: its page, its sections and its signature block, from the templates.

Everything is rendered by the one autoescaped environment of
:mod:`workbench.record.templating` from the view models of :mod:`workbench.record.view_model`.
Four things pass unescaped, each marked safe in exactly one place, with the reason there: the
page's stylesheets and policy (:func:`render_page`), the sanitized notebook cells
(:func:`workbench.record.view_model.record_sections`), the drawings' ``data:`` URIs
(:func:`workbench.record.drawing.data_uri`) and the JSON inside the signature block's script
elements (:func:`signature_block`).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from functools import lru_cache
from typing import Any

from markupsafe import Markup

from workbench.record.computation import Computation
from workbench.record.templating import record_css, render
from workbench.record.view_model import Section, record_sections, verified_sections
from workbench.signing import BLOCK_END, BLOCK_MARKER, BLOCK_START, Link, canonicalize

__all__ = [
    "BLOCK_END",
    "BLOCK_MARKER",
    "BLOCK_START",
    "CSP",
    "css_string",
    "document_end",
    "footer_css",
    "render_body",
    "render_page",
    "render_sections",
    "signature_block",
]

#: The record's Content-Security-Policy: no fetch of any kind, no script at all.
CSP = "default-src 'none'; img-src data:; style-src 'unsafe-inline'"

# Where the page template places the signature block. Escaping leaves it as it is, and the page
# is split at its last occurrence: whatever a case or a notebook holds comes before it.
_BLOCK_PLACE = "\x00signature block\x00"


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

    ``notebook_html`` must already be sanitized; every other value is escaped by the templates.
    """
    sections = record_sections(
        computation,
        title_block,
        notebook_html,
        signer=signer,
        signed_at=signed_at,
        fingerprint=fingerprint,
        case_source=case_source,
    )
    return render("body.html.j2", sections=sections)


def css_string(text: str) -> str:
    """``text`` as a quoted CSS string that nothing in it can end early.

    Letters, digits and spaces stand as they are; every other character is written as a CSS
    escape of six hexadecimal digits and a space, which the escape consumes (CSS Syntax Level 3,
    § 4.3.7), so no quote, backslash, ``<`` or line break of a title block can close the string,
    the rule or the style element.
    """
    escaped = "".join(
        char if char.isalnum() or char == " " else f"\\{ord(char):06x} " for char in text
    )
    return f'"{escaped}"'


def footer_css(title_block: Mapping[str, Any]) -> str:
    """The printed pages' footer: project, calculation number and revision (bottom left).

    The page number and count (bottom right) are in the record's stylesheet.
    """
    parts = [str(title_block["project"])] if title_block.get("project") else []
    if title_block.get("calculation_number"):
        parts.append(f"calculation {title_block['calculation_number']}")
    if title_block.get("revision"):
        parts.append(f"revision {title_block['revision']}")
    text = " · ".join(parts) or "Calculation record"
    return render("page_footer.css.j2", footer=Markup(css_string(text)))


def render_page(
    sections: list[Section], title: Any, extra_css: str = "", footer: str = ""
) -> tuple[str, str]:
    """The whole page but its signature block: ``(text before the block, text after it)``.

    Parameters
    ----------
    sections
        From :func:`workbench.record.view_model.record_sections`.
    title
        The page's title (the record's heading).
    extra_css
        The notebook cells' stylesheets, from nbconvert's templates (never from the notebook).
    footer
        The page footer's rules, from :func:`footer_css`.
    """
    css = (extra_css + "\n" + record_css()) if extra_css else record_css()
    css += "\n" + footer if footer else ""
    page = render(
        "record.html.j2",
        title=title,
        # Marked safe here only: the policy is our constant (its quotes must stay quotes), and
        # the stylesheets are ours and nbconvert's, read from installed templates.
        csp=Markup(CSP),
        css=Markup(css),
        sections=sections,
        signature_block=_BLOCK_PLACE,
    )
    before, _, after = page.rpartition(_BLOCK_PLACE)
    return before, after


def render_section(section: Section) -> str:
    """One section as the record writes it."""
    return render(section.template, section=section)


def render_sections(computation: Computation, earlier: bool = False) -> list[tuple[str, str]]:
    """``(id, HTML)`` of the sections the verifier rebuilds: results, vibration, fatigue, checks.

    ``earlier``: as records signed before units were printed by the unit library wrote them
    (see :func:`workbench.record.view_model.verified_sections`).
    """
    sections = verified_sections(computation, earlier)
    return [(section.ident, render_section(section)) for section in sections]


def _script_json(value: Mapping[str, Any]) -> Markup:
    r"""Canonical JSON to stand inside a script element as data.

    A script element's content is not HTML: entities there would not be decoded, so the JSON
    is written as it is — and only ``</`` could end the element early, so every ``<`` is
    written as the JSON escape ``\\u003c``. This is the one place the block's data is marked
    safe.
    """
    return Markup(canonicalize(dict(value)).decode("utf-8").replace("<", "\\u003c"))


def signature_block(
    payload: Mapping[str, Any],
    token: str | None,
    jwk: Mapping[str, str] | None,
    fingerprint: str | None,
    countersignatures: Sequence[Link] = (),
) -> str:
    """The signature block: verification details, the JWS and the public key (or the payload).

    The verifier rebuilds this text from the token and key and compares it byte for byte.
    Countersignatures (:mod:`workbench.signing.chain`) go at its end, before the closing
    comment; without any, the block is exactly what it was before countersignatures existed.
    """
    facts = {
        "signer": str(payload.get("signer") or "not named"),
        "signed_at": str(payload.get("signed_at", "")),
        "content_digest": str(payload.get("content_digest", "")),
        "results_digest": str(payload.get("results_digest", "")),
        "software": str(payload.get("software", {}).get("workbench", "")),
    }
    signed = token is not None and jwk is not None
    block = render(
        "signature_block.html.j2",
        marker=BLOCK_MARKER,
        facts=facts,
        fingerprint=fingerprint,
        token=token,
        jwk=_script_json(jwk) if signed and jwk is not None else None,
        payload=None if signed else _script_json(payload),
    )
    if not countersignatures:
        return block
    end = block.rindex(BLOCK_END)
    added = render(
        "countersignatures.html.j2",
        rows=[
            ["prepared", facts["signer"], facts["signed_at"], fingerprint or "—"],
            *(
                [link.role, link.name, link.signed_at, link.fingerprint or "?"]
                for link in countersignatures
            ),
        ],
        countersignatures=[
            {"token": link.token or "", "jwk": _script_json(link.jwk or {})}
            for link in countersignatures
        ],
    )
    return block[:end] + added + block[end:]


@lru_cache(maxsize=1)
def document_end() -> str:
    """How every record ends: what the page template writes after the signature block."""
    return render(
        "record.html.j2",
        title="",
        csp="",
        css="",
        sections=[],
        signature_block=_BLOCK_PLACE,
    ).rpartition(_BLOCK_PLACE)[2]
