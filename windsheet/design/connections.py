"""The ends a hookup brings out, counted once for every output.

Every strand end gets its terminal number (T1, T2, … as on the wiring
diagram), its joint, its pin and the words for its lead's route; the joints
and terminals are listed once, and the sleeving follows from them: one piece
over each terminal lead and one over each joint (common practice).  The pick
list, the leads section, the bill of materials and the register all print
these counts; none counts them again.
"""

from __future__ import annotations

from windsheet.physics.hookup import brought_out

from .model import Connections, Joint, PinLink, StrandEnd, TerminalLead

#: A joint lead's route in words when its joint is made on a pin, not in the winding.
_ROUTE_TO_PIN = {"back-over-winding": "laid back over the winding to pin {pin}, where the joint is made"}


def terminal_ends(hookup_name: str, terminals, strand_ids) -> list[str]:
    """The ends brought out as terminals, in T1, T2, … order.

    Examples
    --------
    >>> terminal_ends("series-aiding", ["A.start", "B.finish"], "AB")
    ['A.start', 'B.finish']
    >>> terminal_ends("separate", ["A.start", "A.finish"], "ABC")
    ['A.start', 'A.finish', 'B.start', 'B.finish', 'C.start', 'C.finish']
    """
    return brought_out(hookup_name, terminals, strand_ids)


def lead_route_text(lead: dict, pin_of: dict) -> str:
    """A lead's route in words; a joint lead ends on its joint's pin when the order names one.

    Examples
    --------
    >>> lead = {"lead": "A.finish", "route": "back-over-winding", "route_text": "laid back",
    ...         "joint": "A.finish + B.start"}
    >>> lead_route_text(lead, {"B.start": "2"})
    'laid back over the winding to pin 2, where the joint is made'
    >>> lead_route_text(lead, {})
    'laid back'
    """
    ends = [lead["lead"]] + [e.strip() for e in str(lead.get("joint") or "").split("+") if e.strip()]
    pin = next((pin_of[e] for e in ends if e in pin_of), None)
    if pin is not None and lead.get("joint") and lead.get("route") in _ROUTE_TO_PIN:
        return _ROUTE_TO_PIN[lead["route"]].format(pin=pin)
    return lead.get("route_text") or lead.get("route") or ""


def connections(hookup: dict, strand_ids, terminations=(), leads=(), terminal_Vpk=None) -> Connections:
    """Every strand end's terminal, joint, pin and lead route; the terminals, joints and sleeving.

    Parameters
    ----------
    hookup : dict
        ``name``, ``joins`` (lists of strand ends) and the two ``terminals``.
    strand_ids : sequence of str
        The strands wound, ``"A"``, ``"B"``, ….
    terminations : sequence of dict
        The order's pins: ``{"pin", "ends", "node"}`` each.
    leads : sequence of dict
        The routed leads: ``{"lead", "route", "route_text", "joint", "beside_turns", "worst_Vpk", …}`` each.
        A lead that lies against turns is sleeved when it is laid, before they go on over it or it
        over them (common practice); the same piece runs on to its terminal or over its joint.
    terminal_Vpk : float, optional
        The highest voltage between the leads brought out [V peak]: with the leads' own, the
        least the sleeving must hold off.

    Returns
    -------
    Connections

    Examples
    --------
    Three separate windings: six leads brought out, no joints, six sleeves a unit.

    >>> c = connections({"name": "separate", "joins": [], "terminals": ["A.start", "A.finish"]}, "ABC")
    >>> [t.label + " " + t.end for t in c.terminals][-1], c.sleeving_pieces_per_unit, c.wire_ends_per_unit
    ('T6 C.finish', 6, 6)
    """
    ids = list(strand_ids)
    name = hookup.get("name") or ""
    joins = [list(map(str, j)) for j in hookup.get("joins") or []]
    pin_of = {end: str(t["pin"]) for t in terminations for end in t["ends"]}
    out_ends = terminal_ends(name, hookup.get("terminals"), ids)
    label_of = {end: f"T{i + 1}" for i, end in enumerate(out_ends)}
    joint_of = {end: k for k, j in enumerate(joins) for end in j}
    route_of = {lead["lead"]: lead for lead in leads}
    ends = []
    for sid in ids:
        for which in ("start", "finish"):
            end = f"{sid}.{which}"
            lead = route_of.get(end)
            crosses = int(lead.get("beside_turns") or 0) if lead else 0
            ends.append(StrandEnd.computed(name=end, strand=sid, terminal=label_of.get(end),
                                           joint=joint_of.get(end),
                                           pin=pin_of.get(end), route=lead.get("route") if lead else None,
                                           route_text=lead_route_text(lead, pin_of) if lead else None,
                                           crosses_turns=crosses,
                                           lead_Vpk=float(lead.get("worst_Vpk") or 0.0) if crosses else None,
                                           sleeve_when_laid=crosses > 0))
    joints = [Joint.computed(ends=j, pins=sorted({pin_of[e] for e in j if e in pin_of})) for j in joins]
    by_node: dict = {}
    for t in terminations:
        if t.get("node") is not None:
            by_node.setdefault(t["node"], []).append(t)
    links = [PinLink.computed(pins=[str(t["pin"]) for t in ts], ends=[e for t in ts for e in t["ends"]])
             for ts in by_node.values() if len(ts) > 1]
    terminals = [TerminalLead.computed(label=label_of[e], end=e, pin=pin_of.get(e)) for e in out_ends]
    held = [e.lead_Vpk for e in ends if e.lead_Vpk is not None] + ([terminal_Vpk] if terminal_Vpk else [])
    return Connections.computed(ends=ends, terminals=terminals, joints=joints, linked_pins=links,
                                sleeving_rating_Vpk=max(held) if held else None,
                                wire_ends_per_unit=2 * len(ids), sleeving_pieces_per_unit=len(terminals) + len(joints))
