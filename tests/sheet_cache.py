"""Sheets laid out once per test process, for the modules that read them.

WeasyPrint's layout is the suite's largest cost, and the traveller tests, the page-fault
tests and the demo test read the same sample sheets.  ``conftest.py`` sends those three
modules to one worker, and here each distinct sheet (keyed by its HTML) is laid out once:
its pages read as text runs, its page faults measured, and its PDF written when a test asks.

The PDF is a pure function of the HTML (``render_pdf`` = layout, then ``write_pdf``), so a
sheet rendered here is the one the command writes; ``test_traveller`` holds the forked PDF
worker to the same bytes.
"""

from __future__ import annotations

import hashlib
import re
import unicodedata
from functools import lru_cache
from typing import NamedTuple, Optional

from conftest import SAMPLES


def normalise(text: str) -> str:
    # NFKC folds the micro sign and no-break spaces the sheet uses into plain forms.
    return re.sub(r"\s+", " ", unicodedata.normalize("NFKC", text)).strip()


class LaidOut(NamedTuple):
    pages: tuple        # (text, runs, height) per page, see box_pages
    faults: list        # page_faults.doc_faults of the sheet
    pdf: Optional[bytes]


_SHEETS: dict = {}


def box_pages(doc) -> tuple:
    """Each laid-out page as ``(text, runs, height)``: runs ``(y, x, text)`` of every line of text,
    at its baseline, in points from the page's foot (the PDF's own frame), height in points."""
    pages = []
    for page in doc.pages:
        runs = [(round((page.height - b.position_y - b.baseline) * 0.75, 1), round(b.position_x * 0.75, 1),
                 normalise(b.text))
                for b in page._page_box.descendants() if type(b).__name__ == "TextBox" and b.text.strip()]
        runs.sort(key=lambda r: (-r[0], r[1]))
        pages.append((" ".join(t for _, _, t in runs), runs, page.height * 0.75))
    return tuple(pages)


def laid_out(html: str, pdf: bool = False) -> LaidOut:
    """``html`` laid out (once per process), with its PDF when ``pdf``."""
    from page_faults import doc_faults, layout

    key = hashlib.sha256(html.encode("utf-8")).hexdigest()
    hit = _SHEETS.get(key)
    if hit is None or (pdf and hit.pdf is None):
        doc = layout(html)
        hit = _SHEETS[key] = LaidOut(box_pages(doc), doc_faults(html, doc), doc.write_pdf() if pdf else None)
    return hit


def render_pdf(html: str, *args, **kwargs) -> bytes:
    """``windsheet.sheets.render.render_pdf`` through the cache (for a test that runs a command)."""
    return laid_out(html, pdf=True).pdf


@lru_cache(maxsize=None)
def sample_design(stem: str):
    from windsheet.design.build import build_design
    from windsheet.order.document import load_order

    return build_design(load_order(SAMPLES / f"{stem}.yaml"))


@lru_cache(maxsize=None)
def sample_html(stem: str, paper: str = "a4", units: Optional[str] = None, forced: bool = False) -> str:
    from windsheet.sheets import render

    return render.render_traveller_html(sample_design(stem), paper=paper, units=units, forced=forced)


def sample_sheet(stem: str, paper: str = "a4", units: Optional[str] = None, pdf: bool = False,
                 forced: bool = False):
    """A sample's traveller: ``(html, LaidOut)``."""
    html = sample_html(stem, paper, units, forced)
    return html, laid_out(html, pdf)
