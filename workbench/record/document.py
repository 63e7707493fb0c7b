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
changed either. The digest covers the file's own bytes, so a record keeps verifying whatever
later versions change in the templates; only the sections the verifier rebuilds from the case
(results, checks, vibration, fatigue: see :mod:`workbench.record.verify`) must come out as
they always have.

The *results digest* is described in :mod:`workbench.record.computation`. The JWS payload
(RFC 8785 canonical JSON) holds the case, the title block, both digests, the signer, the time
of signing and the software version.

This module is the glue: it computes (:mod:`~workbench.record.computation`), renders
(:mod:`~workbench.record.render`, from the view models of :mod:`~workbench.record.view_model`
and the templates under ``templates/workbench_record/``), digests and signs.
"""

from __future__ import annotations

import os
import time
from collections.abc import Mapping
from typing import Any

import workbench
from workbench.record.computation import (
    Computation,
    compute,
    refuse_recalled_materials,
    results_digest,
)
from workbench.record.render import (
    BLOCK_END,
    BLOCK_START,
    CSP,
    footer_css,
    render_body,
    render_page,
    signature_block,
)
from workbench.record.templating import templates_dir
from workbench.record.view_model import heading, record_sections
from workbench.signing import canonicalize, content_digest

__all__ = [
    "BLOCK_END",
    "BLOCK_START",
    "CSP",
    "FORMAT",
    "Computation",
    "compute",
    "content_digest",
    "render_body",
    "render_record",
    "results_digest",
    "signature_block",
    "signing_time",
    "templates_dir",
]

FORMAT = "workbench-calculation-record"
FORMAT_VERSION = 1


def signing_time() -> str:
    """Now in UTC (ISO 8601, seconds), or ``SOURCE_DATE_EPOCH`` when set (reproducible builds)."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    seconds = int(epoch) if epoch and epoch.strip().isdigit() else int(time.time())
    return time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(seconds))


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
    study: dict[str, Any] | None = None,
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
    study
        A study to record and sign (:func:`workbench.record.study.study_payload`), or ``None``.

    Returns
    -------
    str
        The record file's text.

    Raises
    ------
    InputError
        A material's source says its values were recalled ("from memory").
    """
    from workbench.signing import jwk_thumbprint, public_jwk, sign_compact  # noqa: PLC0415

    refuse_recalled_materials(computation.model)
    signed_at = signed_at or signing_time()
    signer = signer or str(title_block.get("prepared_by", ""))
    jwk = public_jwk(private_key.public_key()) if private_key is not None else None
    fingerprint = jwk_thumbprint(jwk) if jwk is not None else None
    sections = record_sections(
        computation,
        title_block,
        notebook_html,
        signer=signer,
        signed_at=signed_at,
        fingerprint=fingerprint,
        case_source=case_source,
        study=study,
    )
    before, after = render_page(
        sections, heading(title_block, computation.model), extra_css, footer_css(title_block)
    )
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
    if study is not None:  # records without a study keep the payload they always had
        payload["study"] = study
    token = None
    if private_key is not None:
        token = sign_compact(canonicalize(payload), private_key, {"typ": "JOSE"})
    return before + signature_block(payload, token, jwk, fingerprint) + after
