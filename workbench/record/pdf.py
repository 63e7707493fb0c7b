"""The record printed to PDF by headless Chromium, offline.

The record's own print stylesheet lays the pages out (margins, the footer with project,
calculation number, revision and page n of N, where pages break); Chromium prints it as a reader
who chooses *Print → Save as PDF* would. Nothing is fetched: the page is given as text and every
request but for ``data:`` URIs is refused. Needs the ``playwright`` package and a Chromium on the
machine (the Debian package ``chromium``; never a browser download).
"""

from __future__ import annotations

import os
import re
import shutil
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from workbench.case.errors import InputError

__all__ = ["PAPER_SIZES", "chromium_path", "print_pdf", "printing_browser"]

#: Paper sizes the record is printed on (Chromium's names).
PAPER_SIZES = ("A4", "Letter")

#: Environment variable naming the Chromium to print with (default: found on the PATH).
CHROMIUM_VARIABLE = "WORKBENCH_CHROMIUM"

#: Chromium's switches for printing offline, without a sandbox (as root) or a GPU.
CHROMIUM_FLAGS = (
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
)


def chromium_path() -> str:
    """The Chromium to print with: ``$WORKBENCH_CHROMIUM``, else one on the PATH.

    Raises
    ------
    InputError
        When there is none.
    """
    named = os.environ.get(CHROMIUM_VARIABLE, "")
    if named:
        if not os.access(named, os.X_OK):
            raise InputError(CHROMIUM_VARIABLE, f"{named[:80]} is not an executable file")
        return named
    for name in ("chromium", "chromium-browser", "google-chrome"):
        found = shutil.which(name)
        if found:
            return found
    msg = f"no Chromium to print the PDF with: install chromium or set {CHROMIUM_VARIABLE}"
    raise InputError("pdf", msg)


@contextmanager
def printing_browser() -> Iterator[Any]:
    """A headless Chromium (Playwright ``Browser``) for :func:`print_pdf`, closed on exit.

    Raises
    ------
    InputError
        When Playwright or Chromium is missing.
    """
    try:
        from playwright.sync_api import sync_playwright  # noqa: PLC0415
    except ImportError:
        msg = "printing the PDF needs the playwright package (pip install playwright)"
        raise InputError("pdf", msg) from None
    executable = chromium_path()
    with sync_playwright() as driver:
        browser = driver.chromium.launch(
            executable_path=executable, headless=True, args=list(CHROMIUM_FLAGS)
        )
        try:
            yield browser
        finally:
            browser.close()


def _refuse_outside(route: Any) -> None:
    """Let ``data:`` URIs load; refuse every other request (the record needs none)."""
    if route.request.url.startswith("data:"):
        route.continue_()
    else:
        route.abort()


#: Chromium's time stamps in the PDF's information dictionary (UTC, as it writes them).
_PDF_DATES = re.compile(rb"/(CreationDate|ModDate) \(D:\d{14}\+00'00'\)")


def _stamped(pdf: bytes, created: str) -> bytes:
    """``pdf`` with its creation and modification times set to ``created`` (ISO 8601 UTC).

    The replacement has the same length as what it replaces, so the cross-reference table's
    byte offsets stay right; the same record printed twice then gives the same bytes.
    """
    digits = re.sub(r"\D", "", created)[:14].ljust(14, "0").encode("ascii")
    return _PDF_DATES.sub(lambda match: b"/" + match[1] + b" (D:" + digits + b"+00'00')", pdf)


def print_pdf(record_html: str, paper: str = "A4", browser: Any = None, created: str = "") -> bytes:
    """The record printed to PDF on ``paper`` (one of :data:`PAPER_SIZES`).

    Parameters
    ----------
    record_html
        The record's text.
    paper
        ``A4`` (210 × 297 mm) or ``Letter`` (8.5 × 11 in).
    browser
        An open :func:`printing_browser` to reuse; ``None`` opens one for this page.
    created
        ISO 8601 UTC time the PDF says it was made (the record's signing time); empty: now.

    Raises
    ------
    InputError
        For another paper size, or when Playwright or Chromium is missing.
    """
    if paper not in PAPER_SIZES:
        raise InputError("paper", f"must be one of {', '.join(PAPER_SIZES)}, not {paper[:20]!r}")
    if browser is None:
        with printing_browser() as opened:
            return print_pdf(record_html, paper, opened, created)
    context = browser.new_context(java_script_enabled=False, offline=True)
    try:
        page = context.new_page()
        page.route("**/*", _refuse_outside)
        page.set_content(record_html, wait_until="load")
        page.emulate_media(media="print")
        pdf: bytes = page.pdf(format=paper, print_background=True)
        return _stamped(pdf, created) if created else pdf
    finally:
        context.close()
