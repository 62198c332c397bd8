"""The procedure up to a wound, covered coil: the form, the wire, the starts, the layers, the finishes, the wrap.

Words only: every number and count comes from the design (:class:`windsheet.design.model.Design`),
its layer plan (``design.layer_plan``) and its connections (``design.connections``).
"""

from __future__ import annotations

from windsheet.common.fmt import length
from .procedure_words import initial, sleeve_words, step, strand_list
from .sheet_pdf import volt
from .wiring_words import end_of, form_rows, route_words


def preparation_steps(p) -> list[dict]:
    """Inspect the form, check the wire, cut the lengths a toroid needs, lay the margin tape."""
    form, wire = p.form, p.wire
    kind = form.kind or "cylinder"
    toroid = kind == "toroid"
    inspect = (f"Check it against the specification ({', '.join(v for _, v in form_rows(form)[1:]) or kind}). "
               "No burrs, cracks or sharp edges where wire will lie.")
    if toroid:
        inspect += " Break or cover sharp core edges; the coating must be whole."
    header = form.pin_header
    record = ["form OK"]
    if header is not None:
        inspect += (f" Pin header at the {header.end.replace('-', ' ')}: {header.pins} pins, "
                    f"{length(header.pitch_m)} apart, pin 1 at the marked corner (see the pin header drawing).")
        record.append("pin 1 found")
    steps = [step("Prepare and inspect the form", inspect, record),
             step("Check the wire against the pick list",
                  f"{wire.label}: expect overall Ø {length(wire.overall_diameter_m, fine=True)}, "
                  f"copper Ø {length(wire.copper_diameter_m, fine=True)}. Measure the overall diameter.",
                  ["overall Ø measured"])]
    if toroid:
        steps.append(_cut_lengths_step(p))
    if form.margin_tape_m and not toroid:
        steps.append(_margin_tape_step(p))
    return steps


def _cut_lengths_step(p) -> dict:
    """Each strand passes the hole turn by turn: its whole length is cut first and wound on a shuttle."""
    cuts = "; ".join(f"{s.id} ({s.identification or 'tag it'}): {length(s.wire_length_with_scrap_m)}"
                     for s in p.strands)
    return step("Cut the wire lengths first",
                "Every turn passes through the hole, so each strand is cut to length before winding and "
                f"wound on its own shuttle: {cuts} (turns, both leads and the scrap allowance). "
                "Label each length at both ends.", [f"{s.id} cut" for s in p.strands])


def _margin_tape_step(p) -> dict:
    """Creepage margins: tape at each end of the traverse, as high as the winding, in wraps per layer."""
    form, fit = p.form, p.fit
    t = form.margin_tape_m and form.margin_tape_thickness_m
    wraps = p.layer_plan[0].margin_wraps if p.layer_plan else None
    per = (f"{length(form.margin_tape_thickness_m, fine=True)} thick: {wraps} wrap{'s' if wraps != 1 else ''} "
           "at each end for every layer, as the layer table says, so each margin stands level with the layer "
           "beside it" if t and wraps else
           "thickness not given in the order: build each up in wraps level with each layer as it goes on")
    return step("Lay the margin tape",
                f"{initial(form.margin_tape_material or 'margin tape')}, {length(form.margin_tape_m)} wide, "
                f"hard against each end of the traverse, {per}; in all about {length(fit.build_m)} high. "
                "No turn may ride up on a margin: it sets the creepage distance from the winding to the core "
                "and flanges.", ["start margin", "finish margin"])


def start_step(p) -> dict:
    """Anchor the starts; a start lead that lies against the turns of later layers is sleeved now."""
    ids = p.strand_ids
    n = len(ids)
    toroid = (p.form.kind or "") == "toroid"
    w = p.winding
    lead = length(w.lead_length_m) if w.lead_length_m else "the lead length in the pick list"
    if n == 1:
        text = f"Anchor the start of strand {ids[0]} leaving {lead}; tag it \"{ids[0]} start\"."
    else:
        marks = "; ".join(f"{s.id}: {s.identification or 'tag it'}" for s in p.strands)
        sectors = toroid and w.arrangement == "sectors" and p.ring and p.ring.sectors
        together = "each at its own sector's mark" if sectors else "side by side, in that order from the start end"
        text = (f"Anchor the starts of strands {strand_list(ids)} {together}, "
                f"each leaving {lead}. Tag every start (\"A start\", …). Telling the strands apart: {marks}.")
    if toroid:
        if w.arrangement == "sectors" and p.ring and p.ring.sectors:
            where = "; ".join(f"{sec.strand} at {sec.from_deg:.0f}°" for sec in p.ring.sectors)
            text += (f" Each winding starts at its own sector's mark ({where} from the start mark, in the winding "
                     "direction): mark them on the core first (see the top view).")
        else:
            text += " Mark the start position on the core; the finish must stop short of it by the gap shown below."
    starts = [f"{s}.start" for s in ids]
    routes = sorted({route_words(p, e) for e in starts if route_words(p, e)})
    if routes:
        text += f" Start lead{'s' if n > 1 else ''}: {'; '.join(routes)}."
    sleeved = [end_of(p, e) for e in starts if end_of(p, e) is not None and end_of(p, e).sleeve_when_laid]
    if sleeved:
        text += " " + sleeve_words(p, sleeved, "before the next layer goes on over it")
    if not toroid:
        text += " " + where_to_start(p)
    return step("Anchor and label the start" + ("s" if n > 1 else ""), text,
                ["start sleeved"] if sleeved else [])


def winding_step(p) -> dict:
    """One layer in words; several as the layer table, which the step refers to."""
    w = p.winding
    ids = p.strand_ids
    n = len(ids)
    toroid = (p.form.kind or "") == "toroid"
    rows = p.layer_plan
    way = w.direction or "clockwise"
    together = "" if n == 1 else (f"; strands {strand_list(ids)} side by side in every turn (never crossed)"
                                  if w.arrangement != "sectors" else "; each winding in its own sector, one at a time")
    pitch = ("close-wound, turns touching" if w.close_wound else f"pitch {length(w.pitch_m)} per turn")
    per = " per strand" if n > 1 else ""
    if toroid:
        how = (f"advancing {way} round the ring seen from its top face; each turn down through the hole and back "
               "up over the outside, the same way through the hole every turn")
        pitch = _toroid_spacing(p, 0) if len(rows) <= 1 else "spread as the layer table and the top view show"
    else:
        how = f"the form turning so the wire goes on {way} seen from the start end"
    if len(rows) <= 1:
        t = rows[0].turns if rows else w.turns_per_strand
        where = "" if toroid else "from the start end, "
        return step("Wind", f"{t} turns{per} {where}{how}{together}; {pitch}.", ["turns counted"])
    text = (f"Wind layers 1 to {len(rows)} as the layer table below: each row gives the layer's turns{per}, the "
            "end it starts from (start or finish end of the traverse) and the turn counter at its end, counted "
            f"from the first turn (zero the counter there). Every layer {how}{together}; {pitch}. Check the "
            "counter at each layer's end and tick its row.")
    if p.sections is not None:
        text += " " + _section_words(p)
    tape = _layer_tape_words(p)
    if tape:
        text += " " + tape
    if rows[0].margin_wraps:
        text += f" Build up {rows[0].margin_wraps} margin-tape wrap(s) at each end with every layer."
    return step(f"Wind the {len(rows)} layers (layer table)", text,
                ["counter at end"] + (["tape"] if tape else []))


def _section_words(p) -> str:
    """How a sectioned winding goes on: section by section, the crossover through each wall sleeved."""
    sec = p.sections
    cross = max((w.crossover_Vpk for w in sec.walls), default=0.0)
    return (f"The former has {sec.count} sections of {length(sec.width_m)} between walls of "
            f"{length(sec.wall_thickness_m)} {sec.wall_material}; the table numbers each layer section.layer, "
            "and each section's start and finish sides are its own, the start side nearer the start end. Wind "
            "each section complete; at a row marked \"cross wall\" take the wire through the wall's slot to the "
            "bore of the next section, sleeved through the slot and against the turns beside it (it meets up to "
            f"{volt(cross)} peak there), never over the wall's top.")


def _layer_tape_words(p) -> str:
    w = p.winding
    if not any(r.tape_after == "layer-tape" for r in p.layer_plan):
        return ""
    rating = w.layer_tape_rating_V
    return (f"After each layer the table marks: one wrap of {w.layer_tape_material or 'layer tape'}, "
            f"{length(w.layer_tape_m, fine=True)} thick" + (f", rated {volt(rating)}" if rating else "")
            + ", over the full traverse, the ends overlapping at the seam; no wire visible.")


def layer_table(p) -> list[dict]:
    """The layer table's rows, in the winder's words; empty for a single layer."""
    rows = p.layer_plan
    if len(rows) <= 1:
        return []
    toroid = (p.form.kind or "") == "toroid"
    way = p.winding.direction or "clockwise"
    back = "anticlockwise" if way == "clockwise" else "clockwise"
    then = {"layer-tape": "tape", "outer-wrap": "outer wrap", "crossover": "cross wall", None: "—"}
    out = []
    for r in rows:
        if toroid:
            start = "start mark" if r.from_end == "start-mark" else "layer below's end"
            run = f"advance {way if r.layer % 2 else back}"
            spread = _toroid_spacing(p, r.layer - 1, short=True)
        else:
            start = "start" if r.from_end == "start-end" else "finish"
            run = "→ to finish" if r.from_end == "start-end" else "← to start"
            spread = ""
        out.append({"layer": r.layer if r.section is None else f"{r.section}.{r.layer}", "turns": r.turns, "start": start, "run": run, "spread": spread,
                    "counter": r.counter_end, "then": then.get(r.tape_after, r.tape_after or "—"),
                    "margin": r.margin_wraps})
    return out


def gap_step(p) -> dict:
    """A toroid's start-finish gap (and the gaps between sectors)."""
    ring = p.ring
    gap = ring.gap_deg if ring else p.form.gap_deg
    gap_text = f"about {float(gap):.0f}°" if gap is not None else "the gap in the specification"
    if ring and ring.sectors:
        return step("Leave the gaps between sectors",
                    f"Each winding stops short of the next sector's start by {gap_text} of bare core (common "
                    "practice between windings: 20–30°); leads of different windings must not touch or cross.",
                    ["gaps checked"])
    return step("Leave the start/finish gap",
                f"Stop so that {gap_text} of the core stays bare between the starts and the finishes (common "
                "practice: 20–30°); start and finish leads must not touch or cross.", ["gap checked"])


def finish_step(p) -> dict:
    """Secure the finishes where the last layer really ends; a lead laid over turns is sleeved as it is laid."""
    ids = p.strand_ids
    n = len(ids)
    w = p.winding
    lead = length(w.lead_length_m) if w.lead_length_m else "the lead length in the pick list"
    finishes = [f"{s}.finish" for s in ids]
    routed = [f"{e}: {route_words(p, e)}" for e in finishes if route_words(p, e)]
    text = (f"Tape or tie the finish{'es' if n > 1 else ''} leaving {lead}; tag every finish (\"A finish\", …)."
            + (f" Route: {'; '.join(routed)}." if routed else ""))
    sleeved = [end_of(p, e) for e in finishes if end_of(p, e) is not None and end_of(p, e).sleeve_when_laid]
    if sleeved:
        text += " " + sleeve_words(p, sleeved, "before it is laid over the turns")
    return step("Secure the finish" + ("es" if n > 1 else ""), text, ["finish sleeved"] if sleeved else [])


def outer_wrap_step(p):
    """The cover over the winding, from the order (its tape, wraps and overlap), or None."""
    wrap = p.winding.outer_wrap
    if wrap is None:
        return None
    thick = f", {length(wrap.thickness_m, fine=True)} thick" if wrap.thickness_m else ""
    toroid = (p.form.kind or "") == "toroid"
    if toroid:
        lap = f"{wrap.overlap_fraction * 100:.0f} %" if wrap.overlap_fraction else "half"
        how = (f"wound through the hole round the whole ring, each pass overlapping the last by {lap} of the "
               "tape's width")
    else:
        lap = length(wrap.overlap_m) if wrap.overlap_m else "at least 10 mm (common practice)"
        how = f"round the whole winding, the last wrap overlapping the seam by {lap}, the seam on the lead side"
    return step("Outer wrap",
                f"{wrap.wraps} wrap{'s' if wrap.wraps != 1 else ''} of {wrap.material}{thick}, {how}, over the "
                "laid leads; leads leave through it, none under its edge. Press it down: no wire visible.",
                ["wraps"])


def where_to_start(p) -> str:
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


def _toroid_spacing(p, lay: int, short: bool = False) -> str:
    ring = p.ring
    if ring is None or lay >= len(ring.layers):
        return "spread evenly"
    L = ring.layers[lay]
    if short:
        return f"{float(L.pitch_deg):.1f}° per turn, {float(L.from_deg):.0f}°–{float(L.to_deg):.0f}°"
    if ring.sectors and not short:
        # Each winding's own turns, read from the top view's angles: one pitch and one range per sector.
        spans = []
        for sec in ring.sectors:
            a = L.angles_deg.get(sec.strand) or []
            if a:
                step_deg = (a[-1] - a[0]) / (len(a) - 1) if len(a) > 1 else 0.0
                spans.append(f"{sec.strand} {float(a[0]):.0f}°–{float(a[-1]):.0f}°, about {step_deg:.1f}° per turn")
        return "spread each winding over its own sector (" + "; ".join(spans) + " from the start mark; see the top view)"
    where = (f"over the {float(ring.span_deg or 0):.0f}° sector marked on the core" if ring.spread == "sector"
             else "evenly round the whole core")
    return (f"spread {where}, about {float(L.pitch_deg):.1f}° per turn "
            f"(from {float(L.from_deg):.0f}° to {float(L.to_deg):.0f}° from the start mark; see the top view)")
