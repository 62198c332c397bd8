"""The winding procedure: the traveller's steps for one order, from its own fields.

Words only: every number and count comes from the design (:class:`windsheet.design.model.Design`).
"""

from __future__ import annotations

from windsheet.common.fmt import length
from .sheet_pdf import henry, volt
from .wiring_words import form_rows, pin_rows, route_words, terminal_names


def _step(title, detail="", record=()):
    return {"title": title, "detail": detail, "record": list(record)}


def _strand_list(ids):
    if len(ids) <= 1:
        return "".join(ids)
    return ", ".join(ids[:-1]) + " and " + ids[-1]


def procedure_steps(p) -> list[dict]:
    """The winding procedure for this order, step by step, from its own fields.

    Which steps appear depends on the order: strand count, layers and layer
    tape, toroid or cylinder, whether the hookup has joints, the duty.
    """
    form, wire, w = p.form, p.wire, p.winding
    strands = p.strands
    ids = p.strand_ids
    kind = form.kind or "cylinder"
    toroid = kind == "toroid"
    n = len(ids)
    joints = p.connections.joints
    turns_in_layer = list(w.turns_in_layer)
    layers = len(turns_in_layer) or p.layers
    tape = w.layer_tape_m > 0 and layers > 1
    lead = length(w.lead_length_m) if w.lead_length_m else "the lead length in the pick list"
    steps = []

    inspect = (f"Check it against the specification ({', '.join(v for _, v in form_rows(form)[1:]) or kind}). "
               "No burrs, cracks or sharp edges where wire will lie.")
    if toroid:
        inspect += " Break or cover sharp core edges; the coating must be whole."
    steps.append(_step("Prepare and inspect the form", inspect, ["form OK"]))
    steps.append(_step(
        "Check the wire against the pick list",
        f"{wire.label}: expect overall Ø {length(wire.overall_diameter_m)}, "
        f"copper Ø {length(wire.copper_diameter_m)}. Measure the overall diameter.",
        ["overall Ø measured"]))

    if form.margin_tape_m and not toroid:
        steps.append(_margin_tape_step(p))
    if n == 1:
        start_text = (f"Anchor the start of strand {ids[0]} leaving {lead}; "
                      f"tag it \"{ids[0]} start\".")
    else:
        marks = "; ".join(f"{s.id}: {s.identification or 'tag it'}" for s in strands)
        start_text = (f"Anchor the starts of strands {_strand_list(ids)} side by side, "
                      f"in that order from the start end, each leaving {lead}. "
                      f"Tag every start (\"A start\", …). Telling the strands apart: {marks}.")
    if toroid:
        start_text += (" Mark the start position on the core; the finish must stop short of it "
                       "by the gap shown below.")
    routes = {lead.lead: lead for lead in p.leads}
    start_routes = sorted({route_words(p, f"{s}.start") for s in ids if f"{s}.start" in routes})
    if start_routes:
        start_text += f" Start lead{'s' if n > 1 else ''}: {'; '.join(start_routes)}."
    if not toroid:
        start_text += " " + _where_to_start(p)
    steps.append(_step("Anchor and label the start" + ("s" if n > 1 else ""), start_text))

    for lay in range(layers):
        t = turns_in_layer[lay] if lay < len(turns_in_layer) else w.turns_per_strand
        way = w.direction or "clockwise"
        direction = (f"from the start end, the form turning so the wire goes on {way} seen from the "
                     "start end" if lay % 2 == 0 else
                     f"back towards the start end, still going on {way} seen from the start end")
        if toroid:
            direction = _toroid_direction(p, lay)
        together = ("" if n == 1 else
                    f", strands {_strand_list(ids)} side by side in every turn (never crossed)")
        pitch = ("close-wound, turns touching" if w.close_wound
                 else f"pitch {length(w.pitch_m)} per turn")
        if toroid:
            pitch = _toroid_spacing(p, lay)
        title = "Wind" if layers == 1 else f"Wind layer {lay + 1} of {layers}"
        per = " per strand" if n > 1 else ""
        steps.append(_step(title, f"{t} turns{per} {direction}{together}; {pitch}.",
                           ["turns counted"]))
        if tape and lay < layers - 1:
            steps.append(_step(f"Tape over layer {lay + 1}",
                               f"One wrap of {w.layer_tape_material or 'layer tape'}, "
                               f"{length(w.layer_tape_m)} thick, over "
                               f"the full traverse, overlapping at the seam; no wire visible."))
    if toroid:
        gap = p.ring.gap_deg if p.ring else form.gap_deg
        gap_text = f"about {float(gap):.0f}°" if gap is not None else "the gap in the specification"
        steps.append(_step("Leave the start/finish gap",
                           f"Stop so that {gap_text} of the core stays bare between the starts and "
                           "the finishes (common practice: 20–30°); start and finish leads must "
                           "not touch or cross.", ["gap checked"]))
    finish_routes = sorted({f"{end}: {route_words(p, end)}" for end in routes if end.endswith(".finish")})
    steps.append(_step("Secure the finish" + ("es" if n > 1 else ""),
                       f"Tape or tie the finish{'es' if n > 1 else ''} leaving {lead}; "
                       f"tag every finish (\"A finish\", …)."
                       + (f" Route: {'; '.join(finish_routes)}." if finish_routes else "")))

    if n == 1:
        steps.append(_step("Continuity check",
                           f"{ids[0]} start to {ids[0]} finish must be continuous.", ["✓"]))
    else:
        steps.append(_step(
            "Identify every end by continuity, before any joint",
            "Each strand's start to its own finish: continuous. Every pair of strands: open "
            "(no continuity). Correct any tag that does not agree.",
            [f"{s} ✓" for s in ids]))
    steps.append(_step("Measure each strand alone",
                       f"Inductance and DC resistance of strand{'s' if n > 1 else ''} "
                       f"{_strand_list(ids)}, with the ambient temperature; record in the QC record.",
                       ["ambient °C"]))
    alternatives = p.alternatives
    if joints and n >= 2:
        pairs = list(zip(ids, ids[1:]))
        expect = ""
        if n == 2:
            got = [f"{name} ≈ {henry(alternatives[name].inductance_H)}"
                   for name in ("series-aiding", "series-opposing") if name in alternatives]
            expect = f" Expect {'; '.join(got)}." if got else ""
        how = "; ".join(f"{a} finish to {b} start (aiding), then {a} finish to {b} finish (opposing)"
                        for a, b in pairs)
        steps.append(_step(
            "Measure series-aiding and series-opposing before joining",
            f"Link temporarily and measure at the test frequency, pair by pair: {how}. Remove the "
            f"links.{expect} Aiding must read well above opposing; if not, a start and finish "
            "are swapped in the tags.",
            [f"{a}+{b} aiding / opposing" for a, b in pairs]))
        pinned = {e.name for e in p.connections.ends if e.pin is not None}
        for joint in joints:
            j = joint.ends
            via = [route_words(p, e) for e in j if e in routes and e.endswith(".finish")
                   and routes[e].joint and ".start" in routes[e].joint]
            on = joint.pins
            how = ("Per the wiring diagram: strip the enamel, twist, solder; sleeve the joint." if not on else
                   f"Made on pin {' and pin '.join(on)}: strip each end, wrap it on its pin and solder "
                   "it there when terminating"
                   + (" (the board joins these pins; link them on the bench, see Terminate)"
                      if len(on) > 1 else "") + "."
                   + ("" if all(e in pinned for e in j) else
                      " Ends without a pin are twisted and soldered to the others first."))
            steps.append(_step(f"Make the joint {' + '.join(j)}",
                               how + (f" Joint lead {via[0]}." if via else ""), ["joined"]))
    steps.append(_terminate_step(p, ids))
    if kind == "bobbin":
        steps.append(_core_assembly_step(p))  # before the hipot: it tests winding to core
    hipot = p.qc_plan.line("hipot")
    if hipot is not None:
        dur = hipot.duration_s
        where = "between the winding and the core/form" + (
            " and between the separate windings" if p.hookup.name == "separate" else "")
        steps.append(_step(
            "Hipot test (authorised tester only)",
            f"{volt(hipot.test_voltage_V)}{f' for {float(dur):g} s' if dur else ''} {where}. "
            f"Basis: {p.hipot.basis or '—'}. See the cautions.",
            ["leakage", "result"]))
    steps.append(_step("Final measurements",
                       "Terminal inductance and DC resistance at the terminals "
                       f"{' – '.join(t for t, _ in terminal_names(p))}; insulation resistance; "
                       "record against each serial number in the QC record.", ["recorded"]))
    for i, s in enumerate(steps):
        s["number"] = i + 1
    return steps




def _toroid_direction(p, lay: int) -> str:
    """Which way round, as the operator sees the core: from its top face (the face marked)."""
    way = p.winding.direction or "clockwise"
    back = "anticlockwise" if way == "clockwise" else "clockwise"
    each = ("each turn down through the hole and back up over the outside, "
            "the same way through the hole every turn")
    if lay % 2 == 0:
        return f"advancing {way} round the ring seen from its top face, from the start mark; {each}"
    return f"back over the layer below, now advancing {back} seen from the top face towards the start; {each}"


def _toroid_spacing(p, lay: int) -> str:
    ring = p.ring
    if ring is None or lay >= len(ring.layers):
        return "spread evenly"
    L = ring.layers[lay]
    where = (f"over the {float(ring.span_deg or 0):.0f}° sector marked on the core"
             if ring.spread == "sector" else "evenly round the whole core")
    return (f"spread {where}, about {float(L.pitch_deg):.1f}° per turn "
            f"(from {float(L.from_deg):.0f}° to {float(L.to_deg):.0f}° from the start mark; see the top view)")


def _where_to_start(p) -> str:
    """Where on the traverse the first turn goes, and the room the winding leaves."""
    fit = p.fit
    place = fit.placement if fit else None
    used, room = (fit.traverse_used_m, fit.traverse_m) if fit else (None, None)
    if not used or not room or not place:
        return "Start hard against the start flange (the start end)."
    margin = place.margin_m or 0.0
    edge = "the margin tape at the start end" if margin else "the start flange (the start end)"
    before, after = place.bare_start_m, place.bare_finish_m
    where = (f"Start hard against {edge}" if before < 1e-5 else
             f"Start {length(before)} in from {edge}: measure and mark it, so the first turn's edge "
             f"lies {length(place.first_turn_m)} from the start end")
    inside = f" between the margin tapes ({length(margin)} each end)" if margin else ""
    return (f"{where}. The winding takes {length(used)} of the {length(room)} traverse, leaving "
            + (f"{length(before)} bare at the start end and " if before >= 1e-5 else "")
            + f"{length(after)} bare at the finish end{inside}.")


def _initial(text: str) -> str:
    return text[:1].upper() + text[1:]


def _margin_tape_step(p) -> dict:
    """Creepage margins: tape at each end of the traverse, as high as the winding."""
    form, fit = p.form, p.fit
    return _step("Lay the margin tape",
                 f"{_initial(form.margin_tape_material or 'margin tape')}, {length(form.margin_tape_m)} wide, "
                 "hard against each end of the traverse; build each up in wraps to the winding's height "
                 f"(about {length(fit.build_m)}) as the layers go on. No turn may ride up on a margin: "
                 "it sets the creepage distance from the winding to the core and flanges.",
                 ["start margin", "finish margin"])


def _terminate_step(p, ids) -> dict:
    """Sleeve the leads and bring them to the terminals, or to the pins the order names."""
    sleeve = ", ".join(f"{t} = {end}" for t, end in terminal_names(p))
    rows = pin_rows(p)
    if not rows:
        return _step("Sleeve and terminate", f"Sleeve every lead; terminate and mark the terminals: {sleeve}.",
                     ["marked"])
    links = [(link.pins, link.ends) for link in p.connections.linked_pins]
    link_text = "".join(
        f" Pins {' and '.join(pins)} carry one node ({' + '.join(ends)}) that only the board joins: "
        "link them with a short wire for every bench test, and remove the link before dispatch."
        for pins, ends in links)
    return _step("Terminate on the pins",
                 "Sleeve every lead up to its pin; wrap each end on its pin and solder it: "
                 + "; ".join(f"{pin} = {ends}" for pin, ends in rows)
                 + ". Check each pin against the wiring diagram before soldering; a lead on the wrong pin "
                 "reads as a wiring fault at sign-off." + link_text,
                 [pin for pin, _ in rows] + [f"link {'+'.join(pins)}" for pins, _ in links])


def _core_assembly_step(p) -> dict:
    """Fit the core to the wound bobbin; its gap sets the inductance the terminals read."""
    band = p.qc_plan.line("terminal.inductance")
    lo, hi = (band.low, band.high) if band else (None, None)
    gap = p.form.core_gap_m
    how = ("Fit the ungapped core halves through the bobbin, mating faces clean and touching; clamp or bond "
           "them." if gap == 0 else
           f"Fit the core halves with a gap of {length(gap)} (spacer in each outer leg or ground centre leg, "
           "per the core's data); clamp or bond them." if gap else
           "Fit the core halves through the bobbin and clamp them; if the core is gapped, adjust the "
           f"gap (spacers) until the inductance at the terminals reads {henry(lo)} – {henry(hi)} at the "
           "test frequency, then clamp or bond.")
    return _step("Assemble and gap the core", how + " The predicted inductance holds only with the "
                 "core as assembled here.", ["L after gapping"])
