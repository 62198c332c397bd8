"""The traveller's construction steps, as the operator at the bench follows them.

Each check reads the sheet's own words and compares them with the sized design or with a
count made here, independently of the sheet's code: the layer a lead ends on, the wraps of
margin tape a layer needs, the voltage a lead lies against, the pin header as drawn.
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET
from functools import lru_cache

import pytest

from conftest import SAMPLES
from windsheet.common.errors import InputError
from windsheet.design.build import build_design
from windsheet.order.document import load_order, parse_order
from windsheet.sheets import render


@lru_cache(maxsize=None)
def design(stem: str):
    return build_design(load_order(SAMPLES / f"{stem}.yaml"))


@lru_cache(maxsize=None)
def context(stem: str):
    return render.traveller_context(design(stem))


def steps(ctx) -> list[dict]:
    return [s for block in ctx["procedure"] if "steps" in block for s in block["steps"]]


def step(ctx, title_start: str) -> dict:
    return next(s for s in steps(ctx) if s["title"].startswith(title_start))


TWO_LAYERS = """
job: {number: T-2L, part: "two-layer air coil", customer: "test", quantity: 1, revision: A}
form: {kind: cylinder, diameter: 20 mm, traverse: 30 mm}
wire: {size: 0.50 mm, grade: 2}
winding: {turns: 100, layers: 2}
hookup: single
duty: {voltage: 24 V, frequency: 0 Hz, current: 0.5 A, ambient: 25 degC}
tolerances: {inductance: 10 %, resistance: 5 %}
"""


# --- where the finish lead really ends -----------------------------------------------------

@pytest.mark.parametrize("layers, ends_at", [(2, "start"), (3, "finish")])
def test_the_finish_lead_is_routed_from_where_the_last_layer_ends(layers, ends_at):
    # Layers go back and forth (common practice): an even count ends at the start end, an odd
    # count at the finish end.  Only a finish that ends away from the start end is laid back.
    p = build_design(parse_order(TWO_LAYERS.replace("layers: 2", f"layers: {layers}").encode()))
    assert p.layers == layers
    assert p.layer_plan[-1].from_end == ("finish-end" if layers % 2 == 0 else "start-end")
    finish = step(render.traveller_context(p), "Secure the finish")["detail"]
    if ends_at == "start":
        assert "laid back" not in finish
        assert "start end" in finish
    else:
        assert "laid back over the top layer to the start end" in finish


# --- the core before any reading -------------------------------------------------------------

def test_the_core_is_assembled_and_gapped_before_any_reading():
    ctx = context("hl-0430-mains-choke")
    titles = [s["title"] for s in steps(ctx)]
    core = titles.index("Assemble and gap the core")
    readings = [i for i, s in enumerate(steps(ctx))
                if s["title"].startswith(("Measure", "Final measurements", "Hipot", "Polarity"))]
    assert readings and min(readings) > core
    detail = steps(ctx)[core]["detail"]
    # The order's own construction: E/I butt-gapped with a 0.5 mm pressboard spacer.
    assert "E/I butt-gapped" in detail and "0.5\u00a0mm spacer of pressboard spacer" in detail


# --- a lead laid against turns is sleeved when it is laid ------------------------------------

def test_the_start_lead_up_the_flange_is_sleeved_when_laid_for_the_voltage_it_meets():
    p = design("hl-0430-mains-choke")
    ctx = context("hl-0430-mains-choke")
    # Independent count: 230 V rms sine, 1537 turns in 29 layers of 53, back and forth.  The start
    # lead (0 V) runs up the start flange past every layer; the highest turn it touches is the
    # first turn of layer 29, which starts at the start end: turn 28 x 53 + 1 = 1485.  One strand
    # far below self-resonance shares the voltage evenly by turn (common practice).
    v_turn = 230 * math.sqrt(2) * 1485 / 1537
    start = next(e for e in p.connections.ends if e.name == "A.start")
    assert start.sleeve_when_laid and start.crosses_turns == 28
    # It also lies beside the finish lead, laid over the top layer back to the start end: the whole
    # 230 V rms apart (circuit theory), above the turns it crosses, so that is what it must hold off.
    assert "A.finish" in next(ld for ld in p.leads if ld.lead == "A.start").beside_leads
    assert start.lead_Vpk == pytest.approx(max(v_turn, 230 * math.sqrt(2)), rel=0.01)
    text = step(ctx, "Anchor and label the start")["detail"]
    rated = float(re.search(r"rated at least ([0-9.]+)\u00a0V peak", text).group(1))
    # The sheet prints three figures: 325 V peak.
    assert rated == pytest.approx(230 * math.sqrt(2), rel=2e-3) and rated > v_turn
    assert "before the next layer goes on over it" in text
    row = next(r for r in ctx["termination_rows"] if r["end"] == "A.start")
    assert row["sleeve"].startswith("when laid (crosses 28 turns")


# --- the cover and the margin tape -----------------------------------------------------------

def test_an_outer_wrap_closes_the_winding_with_its_tape_wraps_and_overlap():
    ctx = context("hl-0430-mains-choke")
    wrap = step(ctx, "Outer wrap")["detail"]
    assert wrap.startswith("2 wraps of polyester tape 25 mm, 0.05\u00a0mm thick")
    assert "overlapping the seam by 10\u00a0mm" in wrap
    table = next(b["layers"] for b in ctx["procedure"] if "layers" in b)
    assert table[-1]["then"] == "outer wrap" and {r["then"] for r in table[:-1]} == {"tape"}


def test_margin_tape_builds_up_with_each_layer():
    p = design("hl-0430-mains-choke")
    ctx = context("hl-0430-mains-choke")
    # Each layer adds one wire (overall diameter) and one layer tape; margin tape 0.1 mm thick
    # must match it wrap for wrap: ceil((0.297 + 0.05) / 0.1) = 4 wraps per layer.
    per_layer = p.wire.overall_diameter_m + p.winding.layer_tape_m
    wraps = math.ceil(per_layer / p.form.margin_tape_thickness_m - 1e-9)
    assert wraps == 4
    assert {r["margin"] for r in next(b["layers"] for b in ctx["procedure"] if "layers" in b)} == {wraps}
    assert f"0.1\u00a0mm thick: {wraps} wraps at each end for every layer" in step(ctx, "Lay the margin tape")["detail"]


# --- pins need a header; the header is drawn ------------------------------------------------

def test_pins_on_a_plain_tube_are_refused_at_the_terminations():
    text = TWO_LAYERS + "terminations: {A.start: 1, A.finish: 2}\n"
    with pytest.raises(InputError) as err:
        parse_order(text.encode())
    assert err.value.path == "terminations" and "form.pin_header" in str(err.value)


def test_a_pin_number_off_the_header_is_refused():
    text = (TWO_LAYERS.replace("traverse: 30 mm}", "traverse: 30 mm, pin_header: {end: start-end, pitch: 5.08 mm, "
                               "pins: 2}}") + "terminations: {A.start: 1, A.finish: 3}\n")
    with pytest.raises(InputError) as err:
        parse_order(text.encode())
    assert err.value.path == "terminations.A.finish" and "pins 1 to 2" in str(err.value)


def test_the_pin_header_is_drawn_at_its_pitch_with_each_pins_ends():
    from windsheet.sheets.pin_diagrams import pin_header_svg

    p = design("hl-0430-mains-choke")
    svg = pin_header_svg(p.form.pin_header.model_dump(), [t.model_dump() for t in p.terminations],
                         {t.end: t.label for t in p.connections.terminals})
    root = ET.fromstring(svg)
    pins = {el.get("data-pin"): float(el.get("cx")) for el in root.iter() if el.get("data-pin")}
    assert sorted(pins) == ["1", "2", "3", "4"]
    xs = [pins[str(k)] for k in range(1, 5)]
    assert len({round(b - a, 6) for a, b in zip(xs, xs[1:])}) == 1   # one pitch, left to right
    labels = {}
    for el in root.iter():
        if el.get("data-pin-ends"):
            labels.setdefault(el.get("data-pin-ends"), []).append(el.text)
    assert labels == {"1": ["A.start (T1)"], "4": ["A.finish (T2)"]}
    assert "pitch 5.08\u00a0mm" in svg and "pin-1" in svg
    assert 'data-figure="pin-header"' in render.render_traveller_html(p)


# --- several windings on one toroid ----------------------------------------------------------

def test_windings_in_sectors_are_cut_first_and_each_end_is_in_the_termination_table():
    p = design("hl-0436-three-phase-choke")
    ctx = context("hl-0436-three-phase-choke")
    cut = step(ctx, "Cut the wire lengths first")
    assert cut["record"] == ["A cut", "B cut", "C cut"]
    for s in p.strands:
        # The length cut is the pick list's (turns, leads and scrap), never recounted here.
        assert f"{s.id} ({s.identification}): {render.length(s.wire_length_with_scrap_m)}" in cut["detail"]
        # Independent floor: each turn at least goes round the core's section, plus both leads.
        f = p.form
        section = 2 * (f.height_m + (f.outer_diameter_m - f.inner_diameter_m) / 2)
        assert s.wire_length_with_scrap_m > s.turns * section + 2 * p.winding.lead_length_m
    anchor = step(ctx, "Anchor and label the starts")["detail"]
    assert "side by side" not in anchor and "each at its own sector's mark" in anchor
    wind = step(ctx, "Wind")["detail"]
    layer = p.ring.layers[0]
    for sec in p.ring.sectors:
        a = layer.angles_deg[sec.strand]
        # The turns the sheet spreads lie inside the winding's own sector.
        assert sec.from_deg <= a[0] < a[-1] <= sec.to_deg
        assert f"{sec.strand} {a[0]:.0f}°–{a[-1]:.0f}°" in wind
    rows = {r["end"]: r for r in ctx["termination_rows"]}
    assert sorted(rows) == sorted(f"{s}.{e}" for s in "ABC" for e in ("start", "finish"))
    assert [rows[t.end]["to"] for t in p.connections.terminals] == [f"T{k}" for k in range(1, 7)]
    for sid in "ABC":
        a = layer.angles_deg[sid]
        assert rows[f"{sid}.start"]["lead"] == f"leaves the core at {a[0]:.0f}° from the start mark"
        assert rows[f"{sid}.finish"]["lead"] == f"leaves the core at {a[-1]:.0f}° from the start mark"
