"""Ends, pins, leads and the form in a winder's words: shared by the traveller's tables and its procedure."""

from __future__ import annotations

from windsheet.common.fmt import eng, length

from .diagrams import winding_terminals


#: A joint lead's route in words when its joint is made on a pin, not in the winding.
_ROUTE_TO_PIN = {"back-over-winding": "laid back over the winding to pin {pin}, where the joint is made"}


def lead_route_words(p: dict, lead: dict) -> str:
    """A lead's route in words; a joint lead ends on its joint's pin when the order names one."""
    pin_of = pins_of_ends(p)
    ends = [lead["lead"]] + [e.strip() for e in str(lead.get("joint") or "").split("+") if e.strip()]
    pin = next((pin_of[e] for e in ends if e in pin_of), None)
    if pin is not None and lead.get("joint") and lead.get("route") in _ROUTE_TO_PIN:
        return _ROUTE_TO_PIN[lead["route"]].format(pin=pin)
    return lead.get("route_text") or lead.get("route") or ""


def linked_pins(p: dict) -> list[tuple[list[str], list[str]]]:
    """``(pins, ends)`` for every node the order spreads over more than one pin.

    Such pins are joined only by the board they are soldered into, so on the
    bench they must be linked for every test.
    """
    by_node = {}
    for t in p.get("terminations") or []:
        if "node" in t:
            by_node.setdefault(t["node"], []).append(t)
    return [([str(t["pin"]) for t in ts], [e for t in ts for e in t["ends"]])
            for ts in by_node.values() if len(ts) > 1]


def lead_notes(p: dict) -> list[tuple[str, str]]:
    """``(end, route in words)`` for every lead the prediction routes, joints named."""
    out = []
    for lead in p.get("leads") or []:
        how = lead_route_words(p, lead)
        if lead.get("joint"):
            how = f"{how} (joint {lead['joint']})"
        out.append((lead["lead"], how))
    return out


def pins_of_ends(p: dict) -> dict:
    """Strand end -> pin, from the order's terminations (empty when it names none)."""
    return {end: t["pin"] for t in p.get("terminations") or [] for end in t["ends"]}


def pin_rows(p: dict) -> list[tuple[str, str]]:
    """``("pin 1", "A.start (T1)")`` per pin, terminals named as on the wiring diagram."""
    ids = [s["id"] for s in p.get("strands") or []]
    term = {end: t for t, end in terminal_names(p.get("hookup") or {}, ids)}
    return [(f"pin {t['pin']}", " + ".join(f"{e} ({term[e]})" if e in term else e for e in t["ends"]))
            for t in p.get("terminations") or []]


def terminal_names(hookup: dict, strand_ids=()) -> list[tuple[str, str]]:
    """``[("T1", "A.start"), ...]``, numbered as on the wiring diagram."""
    return [(f"T{i + 1}", t) for i, t in enumerate(winding_terminals(hookup, strand_ids))]


def form_rows(form: dict) -> list[tuple[str, str]]:
    rows = [("Kind", form.get("kind") or "—")]
    what = form.get("material") or form.get("description")
    if what:
        rows.append(("Material", what))
    for key, label in (("diameter_m", "Winding diameter"), ("traverse_m", "Traverse"),
                       ("max_build_m", "Maximum build"), ("inner_diameter_m", "Inner diameter"),
                       ("outer_diameter_m", "Outer diameter"), ("height_m", "Height"),
                       ("width_m", "Window width"), ("mean_turn_length_m", "Mean turn length")):
        if form.get(key) is not None:
            rows.append((label, length(form[key])))
    if form.get("al_H") is not None:
        rows.append(("AL", eng(form["al_H"], "H/turn²", sig=3)))
    if form.get("permeability") is not None:
        rows.append(("Relative permeability", f"{float(form['permeability']):g}"))
    if form.get("gap_deg") is not None:
        rows.append(("Start–finish gap", f"{float(form['gap_deg']):.0f}°"))
    if form.get("core_gap_m") is not None:
        rows.append(("Core gap", length(form["core_gap_m"]) if form["core_gap_m"] else "none (ungapped)"))
    if form.get("margin_tape_m"):
        rows.append(("Margin tape", f"{length(form['margin_tape_m'])} at each end"))
    return rows
