"""An order written in inches (or AWG) prints inches beside millimetres; --units overrides."""

from __future__ import annotations

import io
import re
import unicodedata

import pypdf
import pytest
from typer.testing import CliRunner

from windsheet.sheets import render
from windsheet.cli.app import app
from windsheet.common.errors import InputError
from windsheet.common.fmt import IMPERIAL, length
from windsheet.order.document import parse_order
from windsheet.design.build import build_design

INCH_ORDER = b"""\
job: {number: HL-0440, part: "Relay coil", customer: "Invented Ltd", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 0.75 in, traverse: 1.5 in}
wire: {size: 26 AWG, grade: 2}
winding: {turns: 40}
hookup: single
duty: {voltage: 12 V, frequency: 0 Hz, current: 0.1 A, ambient: 25 degC}
tolerances: {inductance: 10 %, resistance: 5 %}
"""


def text_of(pdf: bytes) -> str:
    pages = pypdf.PdfReader(io.BytesIO(pdf)).pages
    return re.sub(r"\s+", " ", unicodedata.normalize("NFKC", " ".join(p.extract_text() for p in pages)))


def test_inches_follow_millimetres_exactly():
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959); a caliper reads
    # 0.1 mm above 10 mm and a micrometer 0.001 mm (0.0001 in) on film and wire (common practice).
    token = IMPERIAL.set("both")
    try:
        assert length(0.01905) == "0.75\u00a0in (19.1\u00a0mm)"
        assert length(0.000404, fine=True) == "0.0159\u00a0in (0.404\u00a0mm)"
    finally:
        IMPERIAL.reset(token)
    token = IMPERIAL.set("imperial")
    try:
        assert length(0.0381) == "1.5\u00a0in"
    finally:
        IMPERIAL.reset(token)
    assert length(0.01905) == "19.1\u00a0mm"


@pytest.fixture(scope="module")
def inch_prediction():
    return build_design(parse_order(INCH_ORDER, "inch.yaml"))


def test_an_inch_order_prints_inches_and_its_awg_size(inch_prediction):
    assert inch_prediction.sheet_units == "imperial"
    text = text_of(render.render_pdf(render.render_traveller_html(inch_prediction, paper="letter")))
    # An order written in inches prints inches only (millimetres only where the shop asks for both).
    assert "0.75 in" in text and "1.5 in" in text and "19.1 mm" not in text
    assert "26 AWG" in text


def test_units_option_overrides_either_way(inch_prediction, tmp_path):
    metric = render.render_traveller_html(inch_prediction, units="metric")
    assert "38.1\u00a0mm" in metric and "0.75\u00a0in" not in metric and "1.5\u00a0in" not in metric
    mm_order = build_design(parse_order(INCH_ORDER.replace(b"0.75 in", b"19.05 mm").replace(b"1.5 in", b"38.1 mm")
                                   .replace(b"26 AWG", b"0.40 mm")))
    assert mm_order.sheet_units == "metric"
    assert "0.75\u00a0in" in render.render_traveller_html(mm_order, units="imperial")
    assert "0.75\u00a0in (19.1\u00a0mm)" in render.render_traveller_html(mm_order, units="both")
    with pytest.raises(InputError) as err:
        render.render_traveller_html(mm_order, units="furlongs")
    assert err.value.path == "--units"
    order = tmp_path / "inch.yaml"
    order.write_bytes(INCH_ORDER)
    out = tmp_path / "inch.html"
    res = CliRunner().invoke(app, ["traveller", str(order), "-o", str(out), "--html", "--units", "metric",
                                   "--register", str(tmp_path / "reg.db")])
    assert res.exit_code == 0, res.output
    assert "0.75\u00a0in" not in out.read_text(encoding="utf-8")
