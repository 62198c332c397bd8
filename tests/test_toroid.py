"""Toroids in earnest: turns counted on the inner circumference, layers building inward, even or
sector spread, the real start-finish angles, and the ring drawn from above and in section."""

from __future__ import annotations

import math
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest

from windsheet.common.errors import InputError
from windsheet.physics.layout import WindingDoesNotFit, toroid_layout
from windsheet.physics.neighbours import neighbour_pairs
from windsheet.order.document import load_order
from windsheet.design.build import build_design
from windsheet.sheets.ring_diagrams import ring_section_svg, ring_top_view_svg

SVG = "{http://www.w3.org/2000/svg}"
ID, OD, H = 14.8e-3, 25.3e-3, 10e-3  # the sample's ferrite ring
CU, OV = 0.8e-3, 0.884e-3

ORDER = """\
job: {{number: HL-0433, part: "Choke, {turns} t", customer: "Invented Ltd", quantity: 1, revision: A}}
form: {{kind: toroid, inner_diameter: 14.8 mm, outer_diameter: 25.3 mm, height: 10 mm, al: 4.2 uH, gap: 30 deg}}
wire: {{size: 0.80 mm, grade: 2}}
winding: {{turns: {turns}{extra}}}
hookup: single
duty: {{voltage: 10 V, frequency: 50 Hz, current: 1 A, ambient: 25 degC}}
tolerances: {{inductance: 25 %, resistance: 10 %}}
"""


def order(tmp_path, turns, extra=""):
    path = tmp_path / "t.yaml"
    path.write_text(ORDER.format(turns=turns, extra=extra), encoding="utf-8")
    return load_order(path)


def fit_by_placing(radius, arc_deg, d):
    """Brute force: lay touching wires one by one along an arc of ``radius`` until the next one overruns."""
    arc = radius * math.radians(arc_deg)
    n, edge = 0, 0.0
    while edge + d <= arc * (1 + 1e-12):
        n, edge = n + 1, edge + d
    return n


def test_turns_per_layer_come_from_the_inner_circumference_less_the_gap():
    lay = toroid_layout(ID, OD, H, CU, OV, 1, 150)
    rho0 = ID / 2 - OV / 2
    # Independent count: wires of 0.884 mm placed touching round 330° of the circle of their centres.
    assert lay.turns_in_layer[0] == fit_by_placing(rho0, 330.0, OV)
    # Each inner layer sits one nested step further in (d·√3/2), so it holds fewer.
    rho = [lay.ring_radius - lay.r[lay.layer == k][0] for k in range(lay.layers)]
    assert np.allclose(np.diff(rho), -OV * math.sqrt(3) / 2)
    caps = [fit_by_placing(r, 330.0, OV) for r in rho]
    assert all(n <= cap for n, cap in zip(lay.turns_in_layer, caps))
    assert list(lay.turns_in_layer[:-1]) == caps[:-1] or lay.layers == 1


def test_more_turns_than_one_circumference_holds_make_two_layers_and_a_top_view(tmp_path):
    cap = fit_by_placing(ID / 2 - OV / 2, 330.0, OV)
    p = build_design(order(tmp_path, cap + 10))
    assert p.layers == 2 and p.winding.turns_in_layer == [cap, 10]
    ring = p.ring
    assert [L.layer for L in ring.layers] == [1, 2]
    # Layer 2 lies further in: its conductor circle is smaller.
    assert ring.layers[1].radius_m < ring.layers[0].radius_m
    from windsheet.sheets import render

    html = render.render_traveller_html(p)
    assert 'data-figure="ring-top"' in html and 'data-figure="ring-section"' in html
    top = ET.fromstring(ring_top_view_svg(ring.model_dump(), p.form.model_dump()))
    layers_drawn = {g.get("data-layer") for g in top.iter(f"{SVG}g") if g.get("data-turn")}
    assert layers_drawn == {"1", "2"}


def test_even_spread_spaces_turns_equally_and_leaves_the_gap():
    lay = toroid_layout(ID, OD, H, CU, OV, 1, 12, gap_deg=30.0)
    deg = np.degrees(lay.theta)
    assert np.allclose(np.diff(deg), np.diff(deg)[0])
    # The bare angle between the last and the first wire's edges is the order's gap (geometry).
    wire_deg = math.degrees(OV / lay.ring_radius)
    assert 360.0 - (deg[-1] - deg[0]) - wire_deg == pytest.approx(30.0, abs=1e-9)


def test_a_sector_keeps_every_turn_inside_it():
    lay = toroid_layout(ID, OD, H, CU, OV, 1, 10, spread=120.0)
    deg = np.degrees(lay.theta)
    wire_deg = math.degrees(OV / lay.ring_radius)
    assert deg.min() - wire_deg / 2 >= -1e-9 and deg.max() + wire_deg / 2 <= 120.0 + 1e-9
    assert np.allclose(np.diff(deg), np.diff(deg)[0])
    with pytest.raises(WindingDoesNotFit):
        toroid_layout(ID, OD, H, CU, OV, 1, 200, spread=120.0, layers=1)


def offset_rectangle_perimeter(w, h, delta, n=20000):
    """Length of the curve at distance ``delta`` outside a w × h rectangle, summed from points."""
    pts = []
    for t in np.linspace(0, 2 * math.pi, n, endpoint=False):
        ux, uy = math.cos(t), math.sin(t)
        lo, hi = 0.0, w + h + 2 * delta  # bisection on the ray for distance == delta
        for _ in range(60):
            mid = (lo + hi) / 2
            x, y = mid * ux, mid * uy
            dx, dy = max(abs(x) - w / 2, 0.0), max(abs(y) - h / 2, 0.0)
            lo, hi = (mid, hi) if math.hypot(dx, dy) < delta else (lo, mid)
        pts.append((lo * ux, lo * uy))
    pts = np.array(pts + pts[:1])
    return float(np.hypot(*np.diff(pts, axis=0).T).sum())


def test_each_turns_length_follows_the_core_section_at_its_build():
    lay = toroid_layout(ID, OD, H, CU, OV, 1, 60)
    w = (OD - ID) / 2
    for k in range(lay.layers):
        delta = OV / 2 + k * lay.layer_step
        # Independent: the wire centre's path is the offset curve of the core's rectangular section.
        assert lay.turn_length[lay.layer == k][0] == pytest.approx(
            offset_rectangle_perimeter(w, H, delta), rel=1e-4)


def test_start_finish_distance_uses_the_real_angles():
    lay = toroid_layout(ID, OD, H, CU, OV, 1, 12, gap_deg=30.0)
    nb = neighbour_pairs(lay)
    lead = nb.kind == "lead"
    deg = np.degrees(lay.theta)
    # Chord between the first and last wire centres on their circle, less one wire: the bare gap.
    chord = 2 * lay.ring_radius * math.sin(math.radians(360.0 - (deg[-1] - deg[0])) / 2)
    assert nb.gap[lead][0] == pytest.approx(chord - OV, rel=1e-12)


def test_direction_and_spread_reach_the_sheet(tmp_path):
    p = build_design(order(tmp_path, 12, ", spread: 180 deg, direction: anticlockwise"))
    assert p.winding.direction == "anticlockwise" and p.ring.spread == "sector"
    from windsheet.sheets import render

    wind = [s for s in render.procedure_steps(p) if s["title"] == "Wind"][0]["detail"]
    assert "anticlockwise" in wind and "180° sector" in wind
    top = ET.fromstring(ring_top_view_svg(p.ring.model_dump(), p.form.model_dump(), "anticlockwise"))
    marks = {el.get("data-mark") for el in top.iter() if el.get("data-mark")}
    assert {"start", "finish", "gap", "sector", "direction"} <= marks
    section = ET.fromstring(ring_section_svg(p.ring.model_dump(), p.form.model_dump()))
    assert [el.get("data-layer-path") for el in section.iter() if el.get("data-layer-path")] == ["1"]


def test_spread_on_a_cylinder_is_refused_at_its_field(tmp_path):
    path = tmp_path / "c.yaml"
    path.write_text(ORDER.format(turns=12, extra=", spread: even").replace(
        "kind: toroid, inner_diameter: 14.8 mm, outer_diameter: 25.3 mm, height: 10 mm, al: 4.2 uH, gap: 30 deg",
        "kind: cylinder, diameter: 20 mm, traverse: 30 mm"), encoding="utf-8")
    with pytest.raises(InputError) as err:
        build_design(load_order(path))
    assert err.value.path == "winding.spread"
