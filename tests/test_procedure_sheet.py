"""Cylinders and bobbins on the traveller: where to start, which way to wind, partial layers, core gapping."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

from windsheet import render
from windsheet.diagrams import cross_section_svg
from windsheet.order import parse_order
from windsheet.predict import predict

BASE = """\
job: {{number: HL-0450, part: "Coil", customer: "Invented Ltd", quantity: 1, revision: A}}
form: {form}
wire: {{size: 0.50 mm, grade: 2}}
winding: {{turns: {turns}{extra}}}
hookup: single
duty: {{voltage: 12 V, frequency: 50 Hz, current: 0.1 A, ambient: 25 degC}}
tolerances: {{inductance: 10 %, resistance: 5 %}}
"""
CYL = "{kind: cylinder, diameter: 20 mm, traverse: 30 mm}"


def sized(form=CYL, turns=80, extra=""):
    return predict(parse_order(BASE.format(form=form, turns=turns, extra=extra).encode()))


def test_partial_last_layer_is_drawn_partial_and_named():
    p = sized(turns=80)
    full, last = p["winding"]["turns_in_layer"][0], p["winding"]["turns_in_layer"][-1]
    assert last < full
    root = ET.fromstring(cross_section_svg(p["cross_section"]))
    texts = [t.text for t in root.iter() if t.get("data-partial")]
    assert texts == [f"{last} of {full} turns, partial"]
    circles = {}
    for g in root.iter():
        if g.get("data-layer"):
            circles[g.get("data-layer")] = sum(1 for c in g if c.get("data-slot") is not None)
    # Fewer slots are drawn for the partial layer than for a full one.
    assert circles[str(p["layers"])] < circles["1"]


def test_start_position_and_direction_are_stated():
    p = sized(turns=20, extra=", direction: anticlockwise")
    steps = {s["title"]: s["detail"] for s in render.procedure_steps(p)}
    used, room = p["fit"]["traverse_used_m"], p["fit"]["traverse_m"]
    assert "start flange" in steps["Anchor and label the start"]
    assert render.length(room - used) in steps["Anchor and label the start"]
    assert "anticlockwise seen from the start end" in steps["Wind"]


def test_bobbin_gets_a_core_assembly_step_with_the_accept_band():
    p = sized(form="{kind: bobbin, al: 250 nH, width: 12 mm, height: 5 mm, diameter: 10 mm}", turns=50)
    step = [s for s in render.procedure_steps(p) if s["title"] == "Assemble and gap the core"][0]
    acc = p["terminal"]["accept"]
    assert render.henry(acc["inductance_min_H"]) in step["detail"]
    assert render.henry(acc["inductance_max_H"]) in step["detail"]


def test_voltage_picture_shades_by_potential_and_marks_the_worst_pair():
    from pathlib import Path

    from windsheet.diagrams import potential_grey
    from windsheet.order import load_order

    p = predict(load_order(Path(__file__).resolve().parent.parent / "samples" / "hl-0412-bifilar-aiding.yaml"))
    root = ET.fromstring(cross_section_svg(p["cross_section"], shade=True))
    circles = [c for c in root.iter() if c.get("data-potential")]
    vmax = p["cross_section"]["potential_max_Vpk"]
    for c in circles:
        v = float(c.get("data-potential"))
        assert c.get("fill") == potential_grey(v / vmax)
    # Lightness falls with potential, so greyscale print keeps the order.
    greys = sorted((float(c.get("data-potential")), int(c.get("fill")[1:3], 16)) for c in circles)
    assert all(a[1] >= b[1] for a, b in zip(greys, greys[1:]))
    worst = [c for c in circles if c.get("data-worst")]
    wa = p["worst_adjacent"]
    assert {c.get("data-strand") for c in worst} == set(wa["strands"])
    # The two marked turns are as far apart in potential as the worst neighbouring voltage.
    vs = sorted(float(c.get("data-potential")) for c in worst)
    assert vs[1] - vs[0] == pytest.approx(wa["voltage_Vpk"], rel=1e-3)
    assert [el for el in root.iter() if el.get("data-scale") == "potential"]
    assert 'data-figure="voltage"' in render.render_traveller_html(p)
