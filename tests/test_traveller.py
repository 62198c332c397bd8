"""The printable traveller: sections, numbers as the engine gave them, diagrams, paper, escaping."""

from __future__ import annotations

import io
import re
import xml.etree.ElementTree as ET
from functools import lru_cache
from pathlib import Path

import pypdf
import pytest
from typer.testing import CliRunner

from windsheet.sheets import render
from windsheet.cli.app import app
from windsheet.sheets.diagrams import cross_section_svg, wiring_svg
from windsheet.common.errors import InputError
from windsheet.order.document import load_order
from windsheet.design.build import build_design

from conftest import redesign, sample_orders
from page_faults import layout
from sheet_cache import box_pages, normalise, sample_design
from sheet_cache import sample_sheet as cached_sheet

SVG = "{http://www.w3.org/2000/svg}"

# --- the real engine on the samples --------------------------------------------------

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sample_orders()
SAMPLE_IDS = [p.stem for p in SAMPLES]


def sample_prediction(stem: str):
    return sample_design(stem)


def sample_sheet(stem: str, paper: str = "a4") -> tuple[str, bytes]:
    html, sheet = cached_sheet(stem, paper, pdf=True)
    return html, sheet.pdf


def order_yaml(tmp_path, name, text) -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


# An invented order whose series-aiding strands sit 1500 V rms apart on grade 1 enamel.
FAILING_ORDER = """\
job: {number: HL-0499, part: "Test coil", customer: "Invented Ltd", quantity: 2, revision: A, issued_by: "T. Test"}
form: {kind: cylinder, diameter: 30 mm, traverse: 60 mm}
wire: {size: 0.315 mm, grade: 1}
winding: {strands: 2, turns: 80, layers: 1}
hookup: series-aiding
duty: {voltage: 3000 V, frequency: 50 Hz, current: 0.05 A, ambient: 25 degC}
tolerances: {inductance: 10 %, resistance: 5 %}
"""

# Three strands in an unusual series: A, then C, then B backwards.
THREE_STRAND_ORDER = """\
job: {number: HL-0430, part: "Tapped coil", customer: "Invented Ltd", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 30 mm, traverse: 60 mm}
wire: {size: 0.315 mm, grade: 2}
winding: {strands: 3, turns: 20, layers: 1}
hookup: {joins: [[A.finish, C.start], [C.finish, B.finish]], terminals: [A.start, B.start]}
duty: {voltage: 10 V, frequency: 1 kHz, current: 0.05 A, ambient: 25 degC}
tolerances: {inductance: 10 %, resistance: 5 %}
"""


def bifilar_prediction():
    """The two-strand series-aiding sample's design (immutable: alter it with ``redesign``)."""
    return sample_prediction("hl-0412-bifilar-aiding")


def failing(p):
    return redesign(p, insulation={"verdict": "fail", "reasons": ["worst adjacent voltage over the allowed value"]})




@lru_cache(maxsize=64)
def pdf_pages_text(pdf: bytes) -> tuple[str, ...]:
    # Cached: reading a PDF's text was half of this module's time, the same sheets read by many tests.
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    return tuple(normalise(p.extract_text()) for p in reader.pages)


def test_there_are_samples_of_every_kind():
    kinds = {sample_prediction(s).form.kind for s in SAMPLE_IDS}
    hookups = {sample_prediction(s).hookup.name for s in SAMPLE_IDS}
    assert {"cylinder", "toroid"} <= kinds
    assert {"single", "series-aiding", "series-opposing"} <= hookups


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_every_section_is_in_the_pdf_in_job_flow_order(stem):
    text = " ".join(pdf_pages_text(sample_sheet(stem)[1]))
    positions = [text.find(normalise(h)) for h in render.SECTIONS]
    assert -1 not in positions, [h for h, at in zip(render.SECTIONS, positions) if at < 0]
    assert positions == sorted(positions)


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_job_number_revision_and_page_x_of_y_on_every_page(stem):
    p = sample_prediction(stem)
    pages = pdf_pages_text(sample_sheet(stem)[1])
    job = p.job
    for k, page in enumerate(pages, start=1):
        assert job.number in page
        assert f"Rev {job.revision}" in page
        assert f"Qty {job.quantity}" in page
        assert f"Issued {job.issue_date}" in page
        assert f"Page {k} of {len(pages)}" in page
        assert "Issued by:" in page


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_html_is_standalone_and_carries_the_same_sections(stem):
    html = sample_sheet(stem)[0]
    assert html.lstrip().lower().startswith("<!doctype html>")
    # The stylesheet is inlined: the HTML file needs nothing beside it.
    assert "<link" not in html and "@page" in html
    for heading in render.SECTIONS:
        assert heading in html


def _printed_values(p):
    """The engine's numbers as the sheet must print them, in the sheet's own unit system."""
    from windsheet.common.fmt import IMPERIAL

    token = IMPERIAL.set(render._units(p, None))
    try:
        return _values(p)
    finally:
        IMPERIAL.reset(token)


def _values(p):
    t = p.terminal
    values = [render.henry(t.inductance_H), render.ohm(t.resistance_ohm),
              render.ohm(t.resistance_hot_ohm), render.farad(t.capacitance_F),
              render.hertz(t.self_resonance_Hz),
              render.henry(t.accept.inductance_min_H), render.henry(t.accept.inductance_max_H),
              render.ohm(t.accept.resistance_min_ohm), render.ohm(t.accept.resistance_max_ohm),
              render.volt(p.worst_adjacent.voltage_Vpk)]
    for s in p.strands:
        values += [render.henry(s.inductance_H), render.ohm(s.resistance_20C_ohm),
                   render.ohm(s.resistance_hot_ohm), render.length(s.wire_length_m),
                   render.length(s.wire_length_with_scrap_m), render.mass(s.mass_kg)]
    return values


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_printed_predictions_equal_the_engines(stem):
    p = sample_prediction(stem)
    text = " ".join(pdf_pages_text(sample_sheet(stem)[1]))
    missing = [v for v in _printed_values(p) if normalise(v) not in text]
    assert not missing
    assert normalise(p.worst_adjacent.where) in text
    assert p.insulation.verdict.upper() in text


_SI = {"p": 1e-12, "n": 1e-9, "µ": 1e-6, "μ": 1e-6, "m": 1e-3, "": 1.0, "k": 1e3, "M": 1e6, "G": 1e9}


def parse_printed(text: str, unit: str) -> float:
    """Read a printed value back, independently of the formatter."""
    m = re.fullmatch(rf"(-?[0-9.]+)\s*([pnµμmkMG]?){re.escape(unit)}", normalise(text))
    assert m, text
    return float(m.group(1)) * _SI[m.group(2)]


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_printed_terminal_values_read_back_to_the_engines_within_rounding(stem):
    t = sample_prediction(stem).terminal
    # Four significant figures: rounding moves a value by at most half a unit in the 4th digit.
    for value, fmt, unit in ((t.inductance_H, render.henry, "H"),
                             (t.resistance_ohm, render.ohm, "Ω"),
                             (t.accept.inductance_min_H, render.henry, "H"),
                             (t.accept.resistance_max_ohm, render.ohm, "Ω")):
        assert parse_printed(fmt(value), normalise(unit)) == pytest.approx(value, rel=5e-4)


# SI prefixes as the SI Brochure (BIPM, 9th ed., table 7) defines them; 4 significant figures.
@pytest.mark.parametrize("value, unit, expected", [
    (61.2e-6, "H", "61.20 µH"),
    (1.234, "Ω", "1.234 Ω"),
    (0.8538, "Ω", "853.8 mΩ"),
    (13.4e6, "Hz", "13.40 MHz"),
    (2.31e-12, "F", "2.310 pF"),
    (999.96, "V", "1.000 kV"),
    (0.0, "A", "0 A"),
    (-0.5e-3, "A", "-500.0 µA"),
])
def test_engineering_notation(value, unit, expected):
    assert normalise(render.eng(value, unit)) == normalise(expected)


def test_lengths_print_in_millimetres_below_a_metre():
    # Shop practice (common practice): wire and form sizes in mm, wire lengths in m, each to the
    # reading of the tool that measures it: a micrometer 0.001 mm, a caliper 0.01 mm, a tape 1 cm.
    assert normalise(render.length(0.000578, fine=True)) == "0.578 mm"
    assert normalise(render.length(0.00005, fine=True)) == "0.05 mm"
    assert normalise(render.length(0.0003)) == "0.3 mm"
    assert normalise(render.length(0.0762)) == "76.2 mm"
    assert normalise(render.length(12.3)) == "12.3 m"
    assert normalise(render.mass(0.01699)) == "17.0 g"


def test_imperial_sheets_print_inches_and_fahrenheit_and_millimetres_only_when_asked():
    from windsheet.common.fmt import IMPERIAL, celsius, kelvin

    # 1 in = 25.4 mm exactly (international inch, 1959); °F = °C × 9/5 + 32.
    token = IMPERIAL.set("imperial")
    try:
        assert normalise(render.length(0.0381)) == "1.5 in"
        assert normalise(render.length(0.000508, fine=True)) == "0.02 in"
        assert normalise(celsius(60.0)) == "140 °F" and normalise(kelvin(10.0)) == "18 °F"
        assert "mm" not in render.length(0.0381)
    finally:
        IMPERIAL.reset(token)
    token = IMPERIAL.set("both")
    try:
        assert normalise(render.length(0.0381)) == "1.5 in (38.1 mm)"
        assert normalise(celsius(25.0)) == "77 °F (25 °C)"
    finally:
        IMPERIAL.reset(token)


@pytest.mark.parametrize("paper, size", [("a4", (595, 842)), ("letter", (612, 792))])
def test_paper_sizes(paper, size):
    # ISO 216 A4 is 210 x 297 mm = 595 x 842 pt; US Letter is 8.5 x 11 in = 612 x 792 pt.
    pdf = sample_sheet(SAMPLE_IDS[0], paper)[1]
    reader = pypdf.PdfReader(io.BytesIO(pdf))
    for page in reader.pages:
        box = page.mediabox
        assert (round(float(box.width)), round(float(box.height))) == size


def test_unknown_paper_is_a_located_input_error():
    with pytest.raises(InputError) as err:
        render.render_traveller_html(bifilar_prediction(), paper="A5")
    assert err.value.path == "--paper"


# --- wiring diagram ------------------------------------------------------------------

def parse_wiring(svg: str):
    root = ET.fromstring(svg)
    assert root.tag == f"{SVG}svg"
    ends = {}
    for el in root.iter(f"{SVG}circle"):
        if el.get("data-end"):
            ends[el.get("data-end")] = (float(el.get("cx")), float(el.get("cy")))
    joins = {}
    for g in root.iter(f"{SVG}g"):
        if g.get("data-join"):
            segs = [((float(ln.get("x1")), float(ln.get("y1"))), (float(ln.get("x2")), float(ln.get("y2"))))
                    for ln in g.iter(f"{SVG}line")]
            joins[g.get("data-join")] = segs
    terminals = {g.get("data-terminal"): g.get("data-connects")
                 for g in root.iter(f"{SVG}g") if g.get("data-terminal")}
    strands = [g.get("data-strand") for g in root.iter(f"{SVG}g") if g.get("data-strand")]
    dots = {el.get("data-polarity") for el in root.iter(f"{SVG}circle") if el.get("data-polarity")}
    return ends, joins, terminals, strands, dots


def _on_segment(pt, seg, eps=1e-6):
    (x1, y1), (x2, y2) = seg
    x, y = pt
    if abs((x2 - x1) * (y - y1) - (y2 - y1) * (x - x1)) > eps:
        return False
    return min(x1, x2) - eps <= x <= max(x1, x2) + eps and min(y1, y2) - eps <= y <= max(y1, y2) + eps


def drawn_connected(points, segs) -> bool:
    """Do the drawn segments join all ``points`` into one piece?"""
    n = len(segs)
    parent = list(range(n))

    def find(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for i in range(n):
        for j in range(i + 1, n):
            if any(_on_segment(e, segs[j]) for e in segs[i]) or any(_on_segment(e, segs[i]) for e in segs[j]):
                parent[find(i)] = find(j)
    touching = []
    for pt in points:
        hit = [i for i in range(n) if _on_segment(pt, segs[i])]
        if not hit:
            return False
        touching.append(find(hit[0]))
    return len(set(touching)) == 1


def check_wiring_against_hookup(svg, hookup, ids):
    ends, joins, terminals, strands, dots = parse_wiring(svg)
    assert strands == list(ids)
    assert set(ends) == {f"{s}.{w}" for s in ids for w in ("start", "finish")}
    assert dots == {f"{s}.start" for s in ids}
    assert {frozenset(k.split()) for k in joins} == {frozenset(j) for j in hookup["joins"]}
    for key, segs in joins.items():
        assert drawn_connected([ends[e] for e in key.split()], segs), key
    # Two different joints never share a drawn point (they would read as one node).
    pts = {k: {pt for seg in segs for pt in seg} for k, segs in joins.items()}
    keys = list(pts)
    for i, a in enumerate(keys):
        for b in keys[i + 1:]:
            assert not any(_on_segment(pt, seg) for pt in pts[a] for seg in joins[b])
    for k, end in enumerate(hookup["terminals"], start=1):
        assert terminals[f"T{k}"] == end
    return terminals


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_wiring_diagram_of_each_sample_matches_its_hookup(stem):
    p = sample_prediction(stem)
    ids = p.strand_ids
    svg = wiring_svg(p.hookup.model_dump(), ids)
    terminals = check_wiring_against_hookup(svg, p.hookup.model_dump(), ids)
    if p.hookup.name == "separate":
        # Each winding of a separate hookup brings out both of its ends.
        assert set(terminals.values()) == {f"{s}.{w}" for s in ids for w in ("start", "finish")}
    else:
        assert len(terminals) == 2


def test_wiring_diagram_of_a_three_strand_custom_hookup(tmp_path):
    p = build_design(load_order(order_yaml(tmp_path, "c3.yaml", THREE_STRAND_ORDER)))
    assert p.hookup.name == "custom"
    svg = wiring_svg(p.hookup.model_dump(), ["A", "B", "C"])
    check_wiring_against_hookup(svg, {"joins": [["A.finish", "C.start"], ["C.finish", "B.finish"]],
                                      "terminals": ["A.start", "B.start"]}, ["A", "B", "C"])
    html = render.render_traveller_html(p)
    assert 'data-join="A.finish C.start"' in html and 'data-join="C.finish B.finish"' in html


@pytest.mark.parametrize("hookup", [
    # four strands in series, one reversed; three-end star joint; parallel pair in series with a third
    {"name": "custom", "joins": [["A.finish", "B.start"], ["B.finish", "D.finish"], ["D.start", "C.start"]],
     "terminals": ["A.start", "C.finish"]},
    {"name": "custom", "joins": [["A.finish", "B.finish", "C.finish"]], "terminals": ["A.start", "B.start"]},
    {"name": "custom", "joins": [["A.start", "B.start"], ["A.finish", "B.finish", "C.start"]],
     "terminals": ["A.start", "C.finish"]},
    {"name": "parallel", "joins": [["A.start", "B.start"], ["A.finish", "B.finish"]],
     "terminals": ["A.start", "A.finish"]},
])
def test_wiring_diagram_of_unusual_hookups(hookup):
    ids = sorted({e.split(".")[0] for j in hookup["joins"] for e in j} | {t.split(".")[0] for t in hookup["terminals"]})
    check_wiring_against_hookup(wiring_svg(hookup, ids), hookup, ids)


def test_wiring_diagram_refuses_an_end_of_a_missing_strand():
    with pytest.raises(ValueError):
        wiring_svg({"joins": [["A.finish", "C.start"]], "terminals": ["A.start", "C.finish"]}, ["A", "B"])


# --- cross-section -------------------------------------------------------------------

@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_cross_section_shows_every_listed_slot_and_the_layer_tape(stem):
    cs = sample_prediction(stem).cross_section.model_dump()
    root = ET.fromstring(cross_section_svg(cs, sample_prediction(stem).form.kind))
    layers = [g for g in root.iter(f"{SVG}g") if g.get("data-layer")]
    numbers = [int(g.get("data-layer")) for g in layers]
    n = len(cs["layers"])
    if n > 8:
        # Many layers: the first and the last are drawn, the count between them stated.
        assert numbers[0] == 1 and numbers[-1] == n and len(numbers) < n and numbers == sorted(numbers)
        assert f"{n - len(numbers)} more layers" in ET.tostring(root, encoding="unicode")
    else:
        assert numbers == list(range(1, n + 1))
    for g, layer in zip(layers, [cs["layers"][k - 1] for k in numbers]):
        drawn = sorted((int(c.get("data-slot")), c.get("data-strand")) for c in g.iter(f"{SVG}circle"))
        listed = sorted((s["slot"], s["strand"]) for s in layer["slots"])
        assert drawn == listed
        # Each slot's letter is a stroked glyph that refers to its strand's path.
        marks = [u.get("data-mark") for u in g.iter(f"{SVG}use")]
        assert marks == [s for _, s in sorted((s["slot"], s["strand"]) for s in layer["slots"])]
    glyphs = {e.get("id") for e in root.iter(f"{SVG}path") if e.get("id", "").startswith("strand-")}
    assert glyphs == {f"strand-{s['strand']}" for layer in cs["layers"] for s in layer["slots"]}
    tapes = [r for r in root.iter(f"{SVG}rect") if r.get("data-tape")]
    # A tape between every two drawn neighbouring layers.
    pairs = sum(b == a + 1 for a, b in zip(numbers, numbers[1:]))
    assert len(tapes) == (pairs if cs["tape_between_layers"] else 0)


# --- procedure follows the order -------------------------------------------------------

def _titles(stem):
    return [s["title"] for s in render.procedure_steps(sample_prediction(stem))]


def _stem_where(cond):
    return next(s for s in SAMPLE_IDS if cond(sample_prediction(s)))


def test_procedure_depends_on_the_order():
    single = _stem_where(lambda p: p.winding.strands == 1 and p.layers == 1)
    bifilar = _stem_where(lambda p: p.hookup.joins and p.winding.strands == 2)
    taped = _stem_where(lambda p: p.cross_section.tape_between_layers)
    toroid = _stem_where(lambda p: p.form.kind == "toroid")
    sep = [t.lower() for t in _titles(single)]
    assert not any("series-aiding" in t or "joint" in t or "tape" in t or "gap" in t for t in sep)
    bif = [t.lower() for t in _titles(bifilar)]
    assert any("series-aiding" in t for t in bif)
    assert bif.index(next(t for t in bif if "identify every end" in t)) < bif.index(
        next(t for t in bif if "series-aiding" in t)) < bif.index(next(t for t in bif if t.startswith("make the joint")))
    # A taped multi-layer winding: one row per layer in the layer table, tape after every layer
    # but the last (which takes the outer wrap).
    layers = sample_prediction(taped).layers
    blocks = render.traveller_context(sample_prediction(taped))["procedure"]
    table = next(b["layers"] for b in blocks if "layers" in b)
    assert [r["layer"] for r in table] == list(range(1, layers + 1))
    assert [r["then"] for r in table][:-1] == ["tape"] * (layers - 1)
    tor = [t.lower() for t in _titles(toroid)]
    assert any("gap" in t for t in tor)
    # Every step gets a tick box and an initials blank on the sheet.
    html = sample_sheet(bifilar)[0]
    assert html.count('<td class="tick"><span class="box"></span></td><td class="init"></td>') == len(bif)


# --- QC record -----------------------------------------------------------------------

@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_qc_record_has_a_column_for_every_serial_number(stem):
    p = sample_prediction(stem)
    html = sample_sheet(stem)[0]
    units = p.job.units
    assert len(units) == p.job.quantity
    cols = re.findall(r'<th class="unit" data-unit="([^"]+)">', html)
    assert cols == units
    text = " ".join(pdf_pages_text(sample_sheet(stem)[1]))
    for u in units:
        assert u in text
    assert "Inspector" in text and "Date" in text



def test_qc_cells_carry_tick_boxes_only_where_the_item_is_judged():
    """P/F boxes are the cell's background (print.css); record-only items get none."""
    p = sample_prediction("hl-0412-bifilar-aiding")
    html = sample_sheet("hl-0412-bifilar-aiding")[0]
    items = render.qc_items(p)
    for it in items:
        row = re.search(rf'<tr data-qc="{re.escape(it["key"])}">.*?</tr>', html, re.S).group(0)
        cells = re.findall(r'<td class="unit (judged|recordonly)"></td>', row)
        assert cells == ["judged" if it["judged"] else "recordonly"] * len(p.job.units)
    assert any(not it["judged"] for it in items) and any(it["judged"] for it in items)
    # The stylesheet draws both boxes for judged cells and leaves record-only cells grey.
    css = (render.TEMPLATES_DIR / "print.css").read_text()
    rule = css[css.index("table.qc td.unit.judged"):]
    rule = rule[:rule.index("}")]
    assert rule.count("%3Crect x=") == 2 and "print-color-adjust: exact" in css

# --- escaping and the URL fetcher ---------------------------------------------------------

def test_markup_in_the_customer_name_prints_as_text():
    p = bifilar_prediction()
    p = redesign(p, job={"customer": '<b>Bold</b> & <script>alert(1)</script><img src="http://example.com/x.png">'},
                 hookup={"description": "<i>italic</i>"},
                 strands=[{**p.strands[0].model_dump(), "identification": "<u>red</u> sleeve"}]
                 + [s.model_dump() for s in p.strands[1:]])
    html = render.render_traveller_html(p)
    # The sheet's own drawings are <img> with data: URLs; the order's text never becomes a tag.
    assert "<script>" not in html and '<img src="http' not in html and "<i>italic" not in html
    # Also inside the wiring diagram's SVG, which is built outside Jinja.
    assert "<u>" not in html and "&lt;u&gt;red&lt;/u&gt; sleeve" in html
    assert "&lt;b&gt;Bold&lt;/b&gt; &amp; &lt;script&gt;" in html
    text = " ".join(pdf_pages_text(render.render_pdf(html)))
    assert "<b>Bold</b> & <script>alert(1)</script>" in text


def test_fetcher_refuses_the_network_and_files_outside_the_templates(tmp_path):
    fetcher = render.templates_only_fetcher()
    for url in ("http://example.com/x.css", "https://example.com/y.png", "ftp://example.com/z",
                (tmp_path / "secret.txt").as_uri(), "file:///etc/passwd",
                (render.TEMPLATES_DIR / ".." / "pyproject.toml").as_uri()):
        with pytest.raises(ValueError):
            fetcher.fetch(url)
    ok = fetcher.fetch((render.TEMPLATES_DIR / "print.css").as_uri())
    assert b"@page" in ok.read()
    ok.close()


def test_a_document_asking_for_outside_resources_still_renders_without_them(tmp_path):
    secret = tmp_path / "secret.png"
    secret.write_bytes(b"not an image")
    html = (f'<html><body><p>HL-0412</p><img src="{secret.as_uri()}">'
            '<img src="http://example.com/x.png"></body></html>')
    pdf = render.render_pdf(html)
    assert "HL-0412" in pdf_pages_text(pdf)[0]


# --- insulation verdict and issuing ------------------------------------------------------

def test_failing_check_prints_prominently_and_is_refused_unless_forced():
    p = failing(bifilar_prediction())
    with pytest.raises(InputError) as err:
        render.check_issuable(p)
    assert err.value.path == "insulation"
    render.check_issuable(p, force=True)
    plain = render.render_traveller_html(p)
    assert 'data-banner="fail"' in plain and 'data-verdict="fail"' in plain
    forced_pages = pdf_pages_text(render.render_pdf(render.render_traveller_html(p, forced=True)))
    assert "FORCED ISSUE" in forced_pages[0].split("1 Specification")[0]
    assert all("FORCED ISSUE" in page for page in forced_pages)
    assert not any("FORCED" in page for page in pdf_pages_text(render.render_pdf(plain)))


def test_passing_check_has_no_banner():
    html = render.render_traveller_html(bifilar_prediction())
    assert "data-banner" not in html


def test_cautions_follow_the_duty_and_always_defer():
    hv = bifilar_prediction()
    low = redesign(hv, cautions={"above_elv": False, "highest_V": 12.0, "elv_limit_V": 50.0, "hipot": False,
                                 "stored_energy_J": 2.0})
    titles_hv = [c["title"] for c in render.cautions(hv)]
    titles_low = [c["title"] for c in render.cautions(low)]
    assert "Above extra-low voltage" in titles_hv and "Above extra-low voltage" not in titles_low
    assert "Hipot test" in titles_hv and "Hipot test" not in titles_low
    stored = next(c for c in render.cautions(low) if c["title"] == "Stored magnetic energy")
    assert stored["level"] == "warning"
    text = " ".join(pdf_pages_text(render.render_pdf(render.render_traveller_html(hv))))
    # IEC 61140 extra-low-voltage band: 50 V a.c. rms, 120 V ripple-free d.c.
    assert "50 V a.c. rms, 120 V ripple-free d.c." in text
    assert normalise(render.DEFERRAL) in text


# --- the command ---------------------------------------------------------------------



def test_cli_refuses_a_failing_insulation_check_without_force(tmp_path):
    order = order_yaml(tmp_path, "fail.yaml", FAILING_ORDER)
    out = tmp_path / "fail.pdf"
    reg = tmp_path / "reg.db"
    res = CliRunner().invoke(app, ["traveller", str(order), "-o", str(out), "--register", str(reg)])
    assert res.exit_code == 2
    lines = [ln for ln in res.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1 and "insulation" in lines[0] and "--force" in lines[0]
    assert not out.exists()
    assert not reg.exists() or "HL-0499" not in CliRunner().invoke(
        app, ["register", "--register", str(reg)]).stdout

    res = CliRunner().invoke(app, ["traveller", str(order), "-o", str(out), "--force", "--register", str(reg)])
    assert res.exit_code == 0, res.output
    text = " ".join(pdf_pages_text(out.read_bytes()))
    assert "FORCED ISSUE" in text and "FAIL" in text


def test_cli_renders_a_folder_of_orders_and_records_the_issues(tmp_path):
    folder = tmp_path / "orders"
    folder.mkdir()
    for src in SAMPLES[:2]:
        (folder / src.name).write_bytes(src.read_bytes())
    (folder / "x.measured.yaml").write_text("not an order", encoding="utf-8")
    out = tmp_path / "out"
    reg = tmp_path / "reg.db"
    res = CliRunner().invoke(app, ["traveller", str(folder), "-o", str(out), "--html", "--paper", "letter",
                                   "--register", str(reg)])
    assert res.exit_code == 0, res.output
    written = sorted(p.name for p in out.iterdir())
    assert written == sorted(f"{s.stem}.html" for s in SAMPLES[:2])
    listing = CliRunner().invoke(app, ["register", "--register", str(reg)]).stdout
    for src in SAMPLES[:2]:
        number = sample_prediction(src.stem).job.number
        assert number in listing
        assert "size: letter" in (out / f"{src.stem}.html").read_text(encoding="utf-8")


# --- sign-off sheet --------------------------------------------------------------------

def _signoff(measured_name: str):
    from windsheet.qc.readings_file import load_measured
    from windsheet.qc.signoff import evaluate_signoff

    p = sample_prediction("hl-0412-bifilar-aiding")
    return p, evaluate_signoff(p, load_measured(ROOT / "samples" / measured_name))


@pytest.mark.parametrize("measured_name", ["HL-0412.measured.yaml", "HL-0412-reversed.measured.yaml"])
def test_signoff_sheet_prints_every_units_readings_and_the_diagnosis(measured_name):
    p, result = _signoff(measured_name)
    html = render.render_signoff_html(p, result, paper="letter")
    pdf = render.render_pdf(html)
    pages = pdf_pages_text(pdf)
    text = " ".join(pages)
    for heading in render.SIGNOFF_SECTIONS:
        assert normalise(heading) in text
    for k, page in enumerate(pages, start=1):
        assert p.job.number in page and f"Page {k} of {len(pages)}" in page
    assert result["verdict"].upper() in text
    for unit in result["units"]:
        assert unit["serial"] in text
        for line in unit["lines"]:
            if line["measured"] is not None:
                assert normalise(render.measured_text(line["measured"], line["unit"])) in text
        for finding in unit["diagnosis"]:
            assert normalise(finding["finding"]) in text
    # US Letter, 8.5 x 11 in.
    box = pypdf.PdfReader(io.BytesIO(pdf)).pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)


def test_signoff_sheet_marks_failing_lines():
    p, result = _signoff("HL-0412-reversed.measured.yaml")
    html = render.render_signoff_html(p, result)
    failed = [(u["serial"], ln["key"]) for u in result["units"] for ln in u["lines"] if ln["result"] == "fail"]
    assert failed  # the reversed strand sample has at least one failing reading
    assert html.count('class="fail"><td>') == len(failed)


def test_cli_missing_output_folder_is_one_line_and_records_nothing(tmp_path):
    reg = tmp_path / "reg.db"
    res = CliRunner().invoke(app, ["traveller", str(SAMPLES[0]), "-o", str(tmp_path / "nope" / "x.pdf"),
                                   "--register", str(reg)])
    assert res.exit_code == 2
    assert len([ln for ln in res.stderr.splitlines() if ln.strip()]) == 1
    assert not reg.exists()


def test_cli_bad_paper_is_refused(tmp_path):
    res = CliRunner().invoke(app, ["traveller", str(SAMPLES[0]), "-o", str(tmp_path / "x.pdf"),
                                   "--paper", "A5", "--register", str(tmp_path / "reg.db")])
    assert res.exit_code == 2 and "--paper" in res.stderr
    assert not (tmp_path / "x.pdf").exists()


# --- pagination: every sample on A4 and on Letter, read from its laid-out pages ----------------

def _body_runs(page) -> list[tuple[float, float, str]]:
    """The text runs between the running header and footer of a :func:`pdf_read` page, top to bottom."""
    _, runs, height = page
    # The page margins are 22 mm at the top and 20 mm at the bottom (print.css).
    top, bottom = height - 22 / 25.4 * 72, 20 / 25.4 * 72
    return sorted((r for r in runs if bottom < r[0] < top), key=lambda r: (-r[0], r[1]))


def _header_baselines(page) -> set[float]:
    _, runs, height = page
    return {round(y) for y, _, _ in runs if y >= height - 22 / 25.4 * 72}


def _headings(html: str) -> set[str]:
    import html as html_lib

    found = re.findall(r"<h[23][^>]*>(.*?)</h[23]>", html, flags=re.S)
    return {normalise(html_lib.unescape(re.sub(r"<[^>]+>", "", h))) for h in found}


@lru_cache(maxsize=None)
def _sheet_pages(stem: str, paper: str):
    """A sample's sheet as laid out: its HTML, each page's body runs, and its pages.

    Letter is read in inches, as a shop on Letter paper prints it (the page-fault tests lay out the same)."""
    html, sheet = cached_sheet(stem, paper, units="imperial" if paper == "letter" else None)
    return html, [_body_runs(pg) for pg in sheet.pages], sheet.pages


PAPERS = ("a4", "letter")


@pytest.mark.parametrize("paper", PAPERS)
@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_no_heading_is_left_at_the_foot_of_a_page(stem, paper):
    html, pages, _ = _sheet_pages(stem, paper)
    heads = _headings(html)
    for k, runs in enumerate(pages, start=1):
        assert runs, f"page {k} has no content"
        for y, x, text in runs:
            if text not in heads:
                continue
            # Common practice in print layout: a heading has its content below it on its page,
            # in its own column (the two-column blocks are about 90 mm wide).
            below = [t for yy, xx, t in runs if yy < y - 1 and abs(xx - x) < 120 and t not in heads]
            assert below, f"page {k}: the heading {text!r} has nothing below it"


@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_letter_page_one_carries_what_a4_page_one_does(stem):
    html, a4, _ = _sheet_pages(stem, "a4")
    _, letter, _ = _sheet_pages(stem, "letter")
    heads = _headings(html)
    on_a4 = {t for _, _, t in a4[0] if t in heads}
    on_letter = {t for _, _, t in letter[0] if t in heads}
    assert "1 Specification" in on_a4 and on_a4 <= on_letter, on_a4 - on_letter


@pytest.mark.parametrize("paper", PAPERS)
@pytest.mark.parametrize("stem", SAMPLE_IDS)
def test_qc_records_last_table_stays_with_the_signatures(stem, paper):
    _, pages, _ = _sheet_pages(stem, paper)
    labels = [normalise(it["label"]) for it in render.qc_items(sample_prediction(stem))]
    signed = [k for k, runs in enumerate(pages) if any(t.startswith("Inspector") for _, _, t in runs)]
    assert len(signed) == 1
    text = " ".join(t for _, _, t in pages[signed[0]])
    last_table = text.rsplit("Item Predicted Accept", 1)
    assert len(last_table) == 2, "the signatures are on a page without a QC table"
    # Each label may wrap in its cell; its first word starts the row.  A record longer than a
    # page runs on with its header repeated: the signature page holds at least its last rows.
    assert labels[-1].split()[0] in last_table[1]
    if all(normalise(lbl).split()[0] in last_table[1] for lbl in labels[:1]) is False:
        assert "Item Predicted Accept" in text and len(last_table[1].split()) > 8


FORCED_LONG_PART = FAILING_ORDER.replace('part: "Test coil"',
                                         'part: "Common-mode choke, 2 x 12 t on T25 ferrite, potted"')


@pytest.mark.parametrize("paper", PAPERS)
def test_running_header_stays_on_one_line_even_when_forced(tmp_path, paper):
    p = build_design(load_order(order_yaml(tmp_path, "forced.yaml", FORCED_LONG_PART)))
    for k, page in enumerate(box_pages(layout(render.render_traveller_html(p, paper=paper, forced=True))), start=1):
        assert len(_header_baselines(page)) == 1, f"page {k}: header on {_header_baselines(page)}"
        assert "FORCED ISSUE" in page[0]
    for stem in SAMPLE_IDS:
        for page in _sheet_pages(stem, paper)[2]:
            assert len(_header_baselines(page)) == 1, stem


def test_the_pdf_worker_gives_the_same_bytes_as_the_in_process_render():
    # The forked worker must be a pure speed-up: the same sheet, byte for byte.
    from windsheet.sheets.pdf_worker import PdfWorker

    html, in_process = sample_sheet(SAMPLE_IDS[0])
    worker = PdfWorker()
    try:
        assert worker(html) == in_process
    finally:
        worker.close()
    assert not worker._proc.is_alive()


def test_the_pdf_worker_falls_back_to_rendering_in_process_if_it_dies():
    from windsheet.sheets.pdf_worker import PdfWorker

    worker = PdfWorker()
    try:
        worker._proc.kill()
        worker._proc.join()
        html, in_process = sample_sheet(SAMPLE_IDS[0])
        assert worker(html) == in_process  # rendered here rather than lost
    finally:
        worker.close()


@pytest.mark.parametrize("argv, wanted", [
    (["traveller", "{order}", "-o", "x.pdf"], True),
    (["traveller", "{order}", "--out=x.pdf", "--paper", "letter"], True),
    (["traveller", "{order}", "-o", "x"], True),                      # no extension: PDF
    (["traveller", "{order}", "-o", "x.pdf", "--format", "html"], False),
    (["traveller", "{order}", "-o", "x.HTML"], False),
    (["traveller", "{order}", "-o", "x.pdf", "--html"], False),
    (["traveller", "{order}", "{order}", "-o", "out"], False),        # a batch has its own workers
    (["traveller", "{folder}", "-o", "out"], False),
    (["traveller", "samples/*.yaml", "-o", "out"], False),
    (["size", "{order}"], False),
    ([], False),
])
def test_the_early_pdf_worker_starts_only_for_one_pdf(argv, wanted, tmp_path):
    from windsheet.sheets.pdf_worker import wants_one_pdf

    order = tmp_path / "o.yaml"
    order.write_text("x")
    args = [a.format(order=order, folder=tmp_path) for a in argv]
    assert wants_one_pdf(args) is wanted


def test_an_early_worker_is_taken_over_or_stopped(monkeypatch, tmp_path):
    from windsheet.sheets import pdf_worker

    monkeypatch.setenv("WINDSHEET_PDF_WORKER", "1")
    monkeypatch.setattr(pdf_worker.os, "cpu_count", lambda: 2)
    argv = ["traveller", str(SAMPLES[0]), "-o", str(tmp_path / "x.pdf")]
    pdf_worker.start_early(argv)
    early = pdf_worker._early
    assert isinstance(early, pdf_worker.PdfWorker)
    html, in_process = sample_sheet(SAMPLE_IDS[0])
    with pdf_worker.pdf_renderer(True) as pdf:
        assert pdf is early and pdf(html) == in_process
    assert pdf_worker._early is None and not early._proc.is_alive()
    # Started, then not wanted (the order turned out to want HTML): stopped, and rendering is in process.
    pdf_worker.start_early(argv)
    early = pdf_worker._early
    with pdf_worker.pdf_renderer(False) as pdf:
        assert pdf is render.render_pdf
    assert pdf_worker._early is None and not early._proc.is_alive()


def test_a_refused_order_writes_nothing_with_the_pdf_worker_on(tmp_path, monkeypatch):
    monkeypatch.setenv("WINDSHEET_PDF_WORKER", "1")
    order = order_yaml(tmp_path, "fail.yaml", FAILING_ORDER)
    res = CliRunner().invoke(app, ["traveller", str(order), "-o", str(tmp_path / "x.pdf"),
                                   "--register", str(tmp_path / "reg.db")])
    assert res.exit_code == 2 and not (tmp_path / "x.pdf").exists()
