"""Every sample's traveller, read as pictures: no text outside its drawing, no table wider than
the text block, no page under a fifth full but the last, no caption apart from its figure.

The measures are in tests/page_faults.py (text extents from the font's own advance widths,
read with fontTools; page fill from the laid-out boxes).  A4 in millimetres and Letter in inches
run on every change; the other two pairings run in ``make test-long`` (WINDSHEET_LONG=1).
"""

from __future__ import annotations

import os

import pytest

from conftest import SAMPLES, sample_orders
from page_faults import layout, page_fill, sheet_faults
from sheet_cache import sample_design, sample_sheet
from windsheet.design.build import build_design
from windsheet.order.document import load_order
from windsheet.sheets import render

PAIRINGS = [("a4", "metric"), ("letter", "imperial")]
if os.environ.get("WINDSHEET_LONG"):
    PAIRINGS += [("a4", "imperial"), ("letter", "metric")]


@pytest.mark.parametrize("paper, units", PAIRINGS)
@pytest.mark.parametrize("order", sample_orders(), ids=lambda p: p.stem)
def test_a_sample_traveller_has_no_page_faults(order, paper, units):
    # Forced where it fails: a failing sample still prints, its banner included, so every sheet is measured.
    forced = sample_design(order.stem).state.state == "failing"
    _, sheet = sample_sheet(order.stem, paper, units, forced=forced)
    assert sheet.faults == []


def test_the_29_layer_choke_fits_in_about_six_a4_pages():
    p = build_design(load_order(SAMPLES / "hl-0430-mains-choke.yaml"))
    faults, doc = sheet_faults(render.render_traveller_html(p))
    assert faults == []
    assert len(doc.pages) <= 7


def test_the_signatures_never_stand_alone_on_the_last_page():
    # The three-winding choke's QC record runs over a page on Letter: its last rows go over with
    # the signature block, so nobody signs a page of blank lines.
    p = build_design(load_order(SAMPLES / "hl-0436-three-phase-choke.yaml"))
    doc = layout(render.render_traveller_html(p, paper="letter"))
    last = " ".join(b.text for b in doc.pages[-1]._page_box.descendants() if type(b).__name__ == "TextBox")
    assert "Inspector" in last and "Signature" in last
    assert "Hipot" in last or "Insulation resistance" in last
    assert page_fill(doc)[-1] > 0.05


def test_the_fill_measure_finds_a_page_left_nearly_empty():
    # The measure itself, on a sheet made to fail: one line, a forced break, then a full page.
    # Checked against the page's own geometry: A4's text block is 297 - 22 - 20 = 255 mm tall.
    body = "<p>one line</p><p style='break-before: page'>" + "<br>".join(["x"] * 200) + "</p>"
    html = f"<!doctype html><html><head><style>@page {{ size: A4; margin: 22mm 20mm 20mm 20mm }}" \
           f"body, p {{ margin: 0 }} p {{ font: 12pt/20pt sans-serif }}</style></head><body>{body}</body></html>"
    doc = layout(html)
    fill = page_fill(doc)
    # One 20 pt line (its line height) of a 255 mm (722.8 pt) block: 2.8 % full; the next pages are full.
    assert fill[0] == pytest.approx(20 / (255 / 25.4 * 72), rel=0.02)
    assert min(fill[1:-1]) > 0.95
    faults, _ = sheet_faults(html)
    assert faults == [f"page 1 of {len(fill)} is 3% full"]
