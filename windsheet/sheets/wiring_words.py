"""Ends, pins, leads and the form in a winder's words: shared by the traveller's tables and its procedure.

Every count and number comes from the design's connections
(:class:`windsheet.design.model.Connections`); this module only words them.
"""

from __future__ import annotations

from windsheet.common.fmt import eng, length


def end_of(p, name: str):
    """The design's record of one strand end (``"A.finish"``), or None."""
    return next((e for e in p.connections.ends if e.name == name), None)


def route_words(p, end: str) -> str:
    """How the lead of ``end`` is laid, in words (a joint lead on a pin says so)."""
    e = end_of(p, end)
    return (e.route_text or e.route or "") if e is not None else ""


def lead_notes(p) -> list[tuple[str, str]]:
    """``(end, route in words)`` for every lead the design routes, joints named."""
    out = []
    for lead in p.leads:
        how = route_words(p, lead.lead)
        if lead.joint:
            how = f"{how} (joint {lead.joint})"
        out.append((lead.lead, how))
    return out


def pins_of_ends(p) -> dict:
    """Strand end -> pin, from the order's terminations (empty when it names none)."""
    return {e.name: e.pin for e in p.connections.ends if e.pin is not None}


def terminal_names(p) -> list[tuple[str, str]]:
    """``[("T1", "A.start"), ...]``, numbered as on the wiring diagram."""
    return [(t.label, t.end) for t in p.connections.terminals]


def pin_rows(p) -> list[tuple[str, str]]:
    """``("pin 1", "A.start (T1)")`` per pin, terminals named as on the wiring diagram."""
    term = dict((end, label) for label, end in terminal_names(p))
    return [(f"pin {t.pin}", " + ".join(f"{e} ({term[e]})" if e in term else e for e in t.ends))
            for t in p.terminations]


def form_rows(form) -> list[tuple[str, str]]:
    """The form's specification as rows of the traveller."""
    rows = [("Kind", form.kind or "—")]
    if form.material:
        rows.append(("Material", form.material))
    for key, label in (("diameter_m", "Winding diameter"), ("traverse_m", "Traverse"),
                       ("max_build_m", "Maximum build"), ("inner_diameter_m", "Inner diameter"),
                       ("outer_diameter_m", "Outer diameter"), ("height_m", "Height"),
                       ("width_m", "Window width"), ("mean_turn_length_m", "Mean turn length")):
        if getattr(form, key) is not None:
            rows.append((label, length(getattr(form, key))))
    if form.al_H is not None:
        rows.append(("AL", eng(form.al_H, "H/turn²", sig=3)))
    if form.permeability is not None:
        rows.append(("Relative permeability", f"{float(form.permeability):g}"))
    if form.gap_deg is not None:
        rows.append(("Start–finish gap", f"{float(form.gap_deg):.0f}°"))
    if form.core_gap_m is not None:
        rows.append(("Core gap", length(form.core_gap_m) if form.core_gap_m else "none (ungapped)"))
    if form.margin_tape_m:
        rows.append(("Margin tape", f"{length(form.margin_tape_m)} at each end"))
    return rows


def termination_rows(p) -> list[dict]:
    """Every strand end: where it goes (terminal, joint, pin), how its lead is laid and when it is sleeved.

    A toroid's ends leave the core where their strand starts or finishes (the top view's angles).
    """
    from .sheet_pdf import volt

    joints = p.connections.joints
    marks = {s.id: s.identification or "—" for s in p.strands}
    leave = _toroid_exits(p)
    rows = []
    for e in p.connections.ends:
        if e.terminal:
            to = e.terminal
        elif e.joint is not None:
            others = [x for x in joints[e.joint].ends if x != e.name]
            to = "joint with " + " + ".join(others)
        else:
            to = "—"
        if e.sleeve_when_laid:
            sleeve = f"when laid (crosses {e.crosses_turns} turns, up to {volt(e.lead_Vpk)} peak)"
        elif e.terminal:
            sleeve = "at termination"
        elif e.joint is not None:
            sleeve = "over the joint"
        else:
            sleeve = "—"
        rows.append({"end": e.name, "marking": marks.get(e.strand, "—"), "to": to, "pin": e.pin or "—",
                     "lead": e.route_text or leave.get(e.name) or "—", "sleeve": sleeve})
    return rows


def _toroid_exits(p) -> dict:
    """Where each strand's ends leave a toroid, in degrees from the start mark (from the top view's data)."""
    ring = p.ring
    if ring is None or not ring.layers:
        return {}
    out = {}
    first, last = ring.layers[0].angles_deg, ring.layers[-1].angles_deg
    for sid in p.strand_ids:
        if first.get(sid):
            out[f"{sid}.start"] = f"leaves the core at {first[sid][0]:.0f}° from the start mark"
        if last.get(sid):
            out[f"{sid}.finish"] = f"leaves the core at {last[sid][-1]:.0f}° from the start mark"
    return out
