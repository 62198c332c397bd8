"""Every sample's traveller, read as pictures: no text outside its drawing, no table wider than
the text block, no page under a fifth full but the last, no caption apart from its figure.

The measures are in tests/page_faults.py (text extents from the font's own advance widths,
read with fontTools; page fill from the PDF's text).  A4 in millimetres and Letter in inches
run on every change; the other two pairings run in ``make test-long`` (WINDSHEET_LONG=1).
"""

from __future__ import annotations

import io
import os

import pypdf
import pytest

from conftest import SAMPLES, sample_orders
from page_faults import page_fill, sheet_faults
from windsheet.design.build import build_design
from windsheet.order.document import load_order
from windsheet.sheets import render

PAIRINGS = [("a4", "metric"), ("letter", "imperial")]
if os.environ.get("WINDSHEET_LONG"):
    PAIRINGS += [("a4", "imperial"), ("letter", "metric")]


@pytest.mark.parametrize("paper, units", PAIRINGS)
@pytest.mark.parametrize("order", sample_orders(), ids=lambda p: p.stem)
def test_a_sample_traveller_has_no_page_faults(order, paper, units):
    p = build_design(load_order(order))
    # Forced: a failing sample still prints, its banner included, so every sheet is measured.
    faults, _ = sheet_faults(render.render_traveller_html(p, paper=paper, forced=True, units=units))
    assert faults == []


def test_the_29_layer_choke_fits_in_about_six_a4_pages():
    p = build_design(load_order(SAMPLES / "hl-0430-mains-choke.yaml"))
    faults, pdf = sheet_faults(render.render_traveller_html(p))
    assert faults == []
    assert len(pypdf.PdfReader(io.BytesIO(pdf)).pages) <= 7


def test_the_signatures_never_stand_alone_on_the_last_page():
    # The three-winding choke's QC record runs over a page on Letter: its last rows go over with
    # the signature block, so nobody signs a page of blank lines.
    p = build_design(load_order(SAMPLES / "hl-0436-three-phase-choke.yaml"))
    pdf = render.render_pdf(render.render_traveller_html(p, paper="letter"))
    last = pypdf.PdfReader(io.BytesIO(pdf)).pages[-1].extract_text()
    assert "Inspector" in last and "Signature" in last
    assert "Hipot" in last or "Insulation resistance" in last
    assert page_fill(pdf)[-1] > 0.05
