"""Measures of a printed record: how blank each page is, and whether a word was split.

*Blank share of a page*: the page is rendered at 50 dpi in grey; inside the content area (the
page less the record's ``@page`` margins, 15 mm top and 16 mm bottom, so the footer is left
out) each pixel row holding ink (any pixel darker than 200 of 255) is taken with the 4 mm
above and below it, which bridges the spacing between lines of text and the rows of a table;
the blank share is the part of the content area's height that no such band covers. A full
page of text scores about 0, a page holding only a heading about 0.9 (common practice, no
source: the measure is ours).

*Split words*: the text of every page is read line by line (pdfium's text extraction); a word
was split when the last token of a line and the first of the next, joined, make a word of the
record's own text while one of the two alone is not. A line ending in a hyphen that the source
has (pdfium marks it U+FFFE) is not a split.
"""

from __future__ import annotations

import base64
import itertools
import re
from html.parser import HTMLParser
from pathlib import Path
from xml.etree import ElementTree

import numpy as np

#: The record's printed margins (mm), from its stylesheet's ``@page`` rule.
TOP_MARGIN_MM, BOTTOM_MARGIN_MM = 15.0, 16.0
#: How far a row of ink counts above and below itself (mm).
BAND_MM = 4.0
#: Grey level below which a pixel is ink (0 black, 255 white).
INK_LEVEL = 200
DPI = 50
#: pdfium's mark for a hyphen at the end of a line.
LINE_END_HYPHEN = "\ufffe"


class _VisibleText(HTMLParser):
    """The text a reader sees: outside script and style, plus the text of SVG pictures."""

    def __init__(self) -> None:
        super().__init__()
        self.hidden = 0
        self.parts: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag in ("script", "style"):
            self.hidden += 1
        source = dict(attrs).get("src") or ""
        if tag == "img" and source.startswith("data:image/svg+xml;base64,"):
            svg = base64.b64decode(source.split(",", 1)[1]).decode("utf-8")
            root = ElementTree.fromstring(svg)
            self.parts += [
                "".join(node.itertext()) for node in root.iter() if node.tag.endswith("text")
            ]

    def handle_endtag(self, tag: str) -> None:
        if tag in ("script", "style"):
            self.hidden -= 1

    def handle_data(self, data: str) -> None:
        if not self.hidden:
            self.parts.append(data)


def record_words(record_html: str) -> set[str]:
    """Every whitespace-separated token of the record's visible text."""
    parser = _VisibleText()
    parser.feed(record_html)
    return set(" ".join(parser.parts).split())


def blank_shares(pdf: Path) -> list[float]:
    """The blank share of each page, in order (see the module's docstring)."""
    import pypdfium2 as pdfium

    document = pdfium.PdfDocument(str(pdf))
    shares = []
    for page in document:
        height_pt = page.get_size()[1]
        grey = page.render(scale=DPI / 72, grayscale=True).to_numpy()
        grey = grey[..., 0] if grey.ndim == 3 else grey
        per_mm = grey.shape[0] / (height_pt / 72 * 25.4)
        top, bottom = (
            round(TOP_MARGIN_MM * per_mm),
            grey.shape[0] - round(BOTTOM_MARGIN_MM * per_mm),
        )
        ink = (grey[top:bottom] < INK_LEVEL).any(axis=1).astype(float)
        band = max(1, round(BAND_MM * per_mm))
        covered = np.convolve(ink, np.ones(2 * band + 1), mode="same") > 0
        shares.append(1.0 - float(covered.mean()))
    return shares


def page_lines(pdf: Path) -> list[list[str]]:
    """The lines of text of each page."""
    import pypdfium2 as pdfium

    document = pdfium.PdfDocument(str(pdf))
    return [re.split(r"\r?\n", page.get_textpage().get_text_range()) for page in document]


def split_words(pdf: Path, words: set[str]) -> list[str]:
    """``"first|second"`` for every word split across two lines (see the module's docstring)."""
    found = []
    for lines in page_lines(pdf):
        for line, following in itertools.pairwise(lines):
            tokens, next_tokens = line.split(), following.split()
            if not tokens or not next_tokens:
                continue
            first, second = tokens[-1], next_tokens[0]
            if first.endswith(LINE_END_HYPHEN):
                first = first[:-1] + "-"
                if first + second in words:
                    continue
            if first + second in words and (first not in words or second not in words):
                found.append(f"{first}|{second}")
    return found


def page_count(pdf: Path) -> int:
    """How many pages the PDF has."""
    import pypdfium2 as pdfium

    return len(pdfium.PdfDocument(str(pdf)))
