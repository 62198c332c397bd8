"""Cylinders and bobbins on the traveller: where to start, which way to wind, partial layers, core gapping."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest

from windsheet.sheets import render
from windsheet.sheets.diagrams import cross_section_svg
from windsheet.order.document import parse_order
from windsheet.design.build import build_design

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
    return build_design(parse_order(BASE.format(form=form, turns=turns, extra=extra).encode()))


def test_partial_last_layer_is_drawn_partial_and_named():
    p = sized(turns=80)
    full, last = p.winding.turns_in_layer[0], p.winding.turns_in_layer[-1]
    assert last < full
    root = ET.fromstring(cross_section_svg(p.cross_section.model_dump()))
    texts = [t.text for t in root.iter() if t.get("data-partial")]
    assert texts == [f"{last} of {full} turns, partial"]
    circles = {}
    for g in root.iter():
        if g.get("data-layer"):
            circles[g.get("data-layer")] = sum(1 for c in g if c.get("data-slot") is not None)
    # Fewer slots are drawn for the partial layer than for a full one.
    assert circles[str(p.layers)] < circles["1"]


def test_start_position_and_direction_are_stated():
    p = sized(turns=20, extra=", direction: anticlockwise")
    steps = {s["title"]: s["detail"] for s in render.procedure_steps(p)}
    used, room = p.fit.traverse_used_m, p.fit.traverse_m
    assert "start flange" in steps["Anchor and label the start"]
    assert render.length(room - used) in steps["Anchor and label the start"]
    assert "anticlockwise seen from the start end" in steps["Wind"]


def test_bobbin_gets_a_core_assembly_step_with_the_accept_band():
    p = sized(form="{kind: bobbin, al: 250 nH, width: 12 mm, height: 5 mm, diameter: 10 mm}", turns=50)
    step = [s for s in render.procedure_steps(p) if s["title"] == "Assemble and gap the core"][0]
    acc = p.terminal.accept
    assert render.henry(acc.inductance_min_H) in step["detail"]
    assert render.henry(acc.inductance_max_H) in step["detail"]


def test_voltage_picture_shades_by_potential_and_marks_the_worst_pair():
    from pathlib import Path

    from windsheet.sheets.diagrams import potential_grey
    from windsheet.order.document import load_order

    p = build_design(load_order(Path(__file__).resolve().parent.parent / "samples" / "hl-0412-bifilar-aiding.yaml"))
    root = ET.fromstring(cross_section_svg(p.cross_section.model_dump(), shade=True))
    circles = [c for c in root.iter() if c.get("data-potential")]
    vmax = p.cross_section.potential_max_Vpk
    for c in circles:
        v = float(c.get("data-potential"))
        assert c.get("fill") == potential_grey(v / vmax)
    # Lightness falls with potential, so greyscale print keeps the order.
    greys = sorted((float(c.get("data-potential")), int(c.get("fill")[1:3], 16)) for c in circles)
    assert all(a[1] >= b[1] for a, b in zip(greys, greys[1:]))
    worst = [c for c in circles if c.get("data-worst")]
    wa = p.worst_adjacent
    assert {c.get("data-strand") for c in worst} == set(wa.strands)
    # The two marked turns are as far apart in potential as the worst neighbouring voltage.
    vs = sorted(float(c.get("data-potential")) for c in worst)
    assert vs[1] - vs[0] == pytest.approx(wa.voltage_Vpk, rel=1e-3)
    assert [el for el in root.iter() if el.get("data-scale") == "potential"]
    assert 'data-figure="voltage"' in render.render_traveller_html(p)


# --- where the winding sits, margin tape, core gap, pins --------------------------

BOBBIN = ("{kind: bobbin, al: 250 nH, width: 15 mm, height: 5 mm, mean_turn_length: 52 mm, "
          "gap: 0.3 mm, margin_tape: 2 mm}")


def test_margin_tape_and_start_offset_take_room_off_the_traverse():
    # Independent count: close-wound 0.5 mm grade-2 wire, one strand; slots = floor((width - d) / d) + 1.
    plain = sized(turns=20)
    d = plain.wire.overall_diameter_m
    assert plain.fit.slots_per_layer == int((0.030 - d) / d + 1e-9) + 1
    p = sized(form="{kind: cylinder, diameter: 20 mm, traverse: 30 mm, margin_tape: 3 mm}", turns=20,
              extra=", start: {from: start-end, offset: 2 mm}")
    usable = 0.030 - 2 * 0.003 - 0.002
    assert p.fit.slots_per_layer == int((usable - d) / d + 1e-9) + 1
    place = p.fit.placement
    assert place.first_turn_m == pytest.approx(0.005)
    # The three stretches of the traverse add back up to it.
    assert 2 * place.margin_m + place.bare_start_m + p.fit.traverse_used_m + place.bare_finish_m \
        == pytest.approx(0.030)
    steps = {s["title"]: s for s in render.procedure_steps(p)}
    assert "Lay the margin tape" in steps
    assert render.length(0.002) + " in from the margin tape" in steps["Anchor and label the start"]["detail"]
    assert "Margin tape" in {row["item"] for row in render.pick_list(p)}


def test_centred_and_finish_end_placements():
    centre = sized(turns=20, extra=", start: centre").fit.placement
    assert centre.bare_start_m == pytest.approx(centre.bare_finish_m)
    finish = sized(turns=20, extra=", start: {from: Finish-End, offset: 1 mm}").fit.placement
    assert finish.bare_finish_m == pytest.approx(0.001)


@pytest.mark.parametrize("extra, form, field", [
    (", start: {from: top}", CYL, "winding.start.from"),
    (", start: {from: centre, offset: 1 mm}", CYL, "winding.start.offset"),
    (", start: 30 mm", CYL, "winding.start.offset"),
    ("", "{kind: cylinder, diameter: 20 mm, traverse: 30 mm, margin_tape: 15 mm}", "form.margin_tape"),
    (", start: 1 mm", "{kind: toroid, inner_diameter: 20 mm, outer_diameter: 30 mm, height: 10 mm, al: 1 uH}",
     "winding.start"),
])
def test_bad_placement_is_refused_at_its_field(extra, form, field):
    from windsheet.common.errors import InputError

    with pytest.raises(InputError) as exc:
        sized(form=form, turns=20, extra=extra)
    assert exc.value.path == field


def test_bobbin_core_gap_is_stated_and_the_core_is_fitted_before_the_hipot():
    p = sized(form=BOBBIN, turns=35)
    titles = [s["title"] for s in render.procedure_steps(p)]
    step = [s for s in render.procedure_steps(p) if s["title"] == "Assemble and gap the core"][0]
    assert render.length(0.0003) in step["detail"]
    hipot = [t for t in titles if t.startswith("Hipot")]
    if hipot:  # the hipot tests winding to core, so the core must be on
        assert titles.index("Assemble and gap the core") < titles.index(hipot[0])
    assert ("Core gap", render.length(0.0003)) in render.form_rows(p.form)


BIFILAR = BASE.replace("hookup: single", "hookup: series-aiding\nterminations: {terms}")


def bifilar(terms):
    return build_design(parse_order(BIFILAR.format(form=BOBBIN, turns=35, extra=", strands: 2", terms=terms).encode()))


def test_terminations_reach_the_diagram_and_the_procedure():
    p = bifilar("{A.start: 1, a.finish: 2, B.start: 2, B.finish: 4}")
    assert [(t.pin, t.ends) for t in p.terminations] == [
        ("1", ["A.start"]), ("2", ["A.finish", "B.start"]), ("4", ["B.finish"])]
    assert len({t.node for t in p.terminations}) == 3  # three nodes, one pin each
    steps = {s["title"]: s for s in render.procedure_steps(p)}
    assert steps["Terminate on the pins"]["record"] == ["pin 1", "pin 2", "pin 4"]
    assert "pin 4 = B.finish (T2)" in steps["Terminate on the pins"]["detail"]
    assert steps["Make the joint A.finish + B.start"]["detail"].startswith("Made on pin 2")
    from windsheet.sheets.diagrams import wiring_svg
    from windsheet.sheets.wiring_words import pins_of_ends

    root = ET.fromstring(wiring_svg(p.hookup.model_dump(), ["A", "B"], pins=pins_of_ends(p)))
    pins = {el.get("data-pin") for el in root.iter() if el.get("data-pin")}
    assert pins == {"1", "2", "4"}


def test_a_joint_lead_on_a_pin_is_routed_to_that_pin():
    # The default joint route would say "joint made at the start end"; on a pin it ends there.
    p = bifilar("{A.start: 1, A.finish: 2, B.start: 2, B.finish: 4}")
    steps = {s["title"]: s for s in render.procedure_steps(p)}
    joint = steps["Make the joint A.finish + B.start"]["detail"]
    assert "to pin 2" in joint and "start end" not in joint
    from windsheet.sheets.wiring_words import lead_notes

    assert "start end" not in dict(lead_notes(p))["A.finish"]
    # Without pins the joint is made in the winding, at the start end.
    loose = build_design(parse_order(BIFILAR.replace("terminations: {terms}\n", "").format(
        form=BOBBIN, turns=35, extra=", strands: 2").encode()))
    steps = {s["title"]: s for s in render.procedure_steps(loose)}
    assert "joint made at the start end" in steps["Make the joint A.finish + B.start"]["detail"]


def test_a_node_spread_over_two_pins_is_linked_for_the_bench():
    # A joint whose ends sit on two pins is open until the board joins them (common practice
    # on PCB-mount parts): the operator links the pins for every bench test.
    p = bifilar("{A.start: 1, A.finish: 2, B.start: 3, B.finish: 4}")
    nodes = {t.pin: t.node for t in p.terminations}
    assert nodes["2"] == nodes["3"] and len(set(nodes.values())) == 3
    steps = {s["title"]: s for s in render.procedure_steps(p)}
    term = steps["Terminate on the pins"]
    assert "Pins 2 and 3 carry one node (A.finish + B.start)" in term["detail"]
    assert term["record"] == ["pin 1", "pin 2", "pin 3", "pin 4", "link 2+3"]
    assert "link them on the bench" in steps["Make the joint A.finish + B.start"]["detail"]
    # One pin per node: no link asked for.
    one = bifilar("{A.start: 1, A.finish: 2, B.start: 2, B.finish: 4}")
    assert not any(r.startswith("link") for s in render.procedure_steps(one) for r in s["record"])


@pytest.mark.parametrize("terms, field", [
    ("{A.start: 1, A.finish: 1, B.start: 2, B.finish: 4}", "terminations.A.finish"),  # shorts strand A
    ("{A.start: 1, A.finish: 2}", "terminations"),  # B.finish, a terminal, has no pin
    ("{A.start: 1, C.start: 2, B.finish: 3}", "terminations.C.start"),
    ("{A.start: true, B.finish: 2}", "terminations.A.start"),
    ("[1, 2]", "terminations"),
])
def test_bad_terminations_are_refused_at_their_field(terms, field):
    from windsheet.common.errors import InputError

    with pytest.raises(InputError) as exc:
        bifilar(terms)
    assert exc.value.path == field
