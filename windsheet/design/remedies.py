"""Remedies for an insulation verdict that is not a pass, each found by re-running the check.

A remedy is a change to the order written as field paths and values exactly
as an order writes them (``{"wire.grade": 3}``, ``{"winding.pitch":
"1.50 mm"}``).  Every candidate is applied to the order's own YAML mapping,
parsed again by :func:`windsheet.order.document.parse_order` and sized by the same
check as the order itself; only those that give a better verdict are
listed, with the verdict, worst voltage and inception voltage they gave.  A
script can paste ``set`` into the order and get that verdict.

Candidates tried: a heavier enamel grade; the strands spaced at a wider
pitch (spread evenly); tape between layers; more layers of fewer turns;
impregnation; other routes for the leads and joints; and, when no single
change gives a pass, the heaviest grade together with each of the others.  A sectioned or
progressive winding would also lower the layer voltages, but windsheet does
not lay those out, so it is not offered.
"""

from __future__ import annotations

import copy

import yaml

from windsheet.common.errors import InputError

VERDICT_RANK = {"fail": 0, "marginal": 1, "pass": 2}


def set_path(doc: dict, path: str, value) -> dict:
    """A copy of the order mapping with the dotted ``path`` set to ``value``.

    Examples
    --------
    >>> set_path({"wire": {"size": "0.5 mm"}}, "wire.grade", 3)
    {'wire': {'size': '0.5 mm', 'grade': 3}}
    >>> set_path({"winding": {"layer_tape": "0.05 mm"}}, "winding.layer_tape.rating", "4 kV")
    {'winding': {'layer_tape': {'thickness': '0.05 mm', 'rating': '4 kV'}}}
    """
    out = copy.deepcopy(doc)
    node = out
    parts = path.split(".")
    for k, key in enumerate(parts[:-1]):
        nxt = node.get(key)
        if not isinstance(nxt, dict):
            # A bare layer-tape thickness becomes the mapping form when a field is added to it.
            nxt = {"thickness": nxt} if (key == "layer_tape" and nxt is not None) else {}
            node[key] = nxt
        node = nxt
    node[parts[-1]] = value
    return out


def apply(doc: dict, changes: dict) -> dict:
    """All of ``changes`` (``{path: value}``) applied to the order mapping."""
    for path, value in changes.items():
        doc = set_path(doc, path, value)
    return doc


def _mm(x: float) -> str:
    return f"{x * 1e3:.3g} mm"


def candidates(doc: dict, design) -> list[dict]:
    """Changes worth trying for this order, each ``{path: value}``, in the order offered."""
    out = []
    wire = doc.get("wire") or {}
    winding = doc.get("winding") or {}
    strands = design.winding.strands
    layers = design.layers
    ov = design.wire.overall_diameter_m
    if not wire.get("catalog"):
        grade = int(design.wire.grade or wire.get("grade") or 2)
        out += [{"wire.grade": g} for g in (2, 3) if g > grade]
    pitch = float(design.winding.pitch_m or 0.0)
    for factor in (1.5, 2.0, 3.0):
        new = strands * ov * factor
        if new > pitch * (1 + 1e-6):
            change = {"winding.pitch": _mm(new)}
            if strands > 1:
                change["winding.strand_spacing"] = "even"
            out.append(change)
    if layers > 1:
        if not design.winding.layer_tape_m > 0:
            out += [{"winding.layer_tape": "0.1 mm"}, {"winding.layer_tape": "0.25 mm"}]
        if 2 * layers <= 200:
            out.append({"winding.layers": 2 * layers})
    imp = winding.get("impregnation") or "none"
    if imp == "none":
        out.append({"winding.impregnation": "varnish"})
    if imp != "potted":
        out.append({"winding.impregnation": "potted"})
    routes = (winding.get("leads") or {})
    for lead in design.leads:
        if lead.joint and " + " in lead.joint and lead.route != "end-flange" \
                and lead.lead.endswith(".finish") and routes.get("joint") != "end-flange":
            out.append({"winding.leads.joint": "end-flange"})
        elif lead.lead.endswith(".finish") and not lead.joint and lead.route != "end-flange":
            out.append({"winding.leads.finish": "end-flange"})
        elif lead.lead.endswith(".start") and lead.route != "through-form":
            out.append({"winding.leads.start": "through-form"})
    unique = []
    for c in out:
        if c not in unique:
            unique.append(c)
    return unique


def find_remedies(order, design, check) -> list[dict]:
    """The candidate changes that improve the order's insulation verdict.

    Parameters
    ----------
    order : windsheet.order.document.Order
        The order as parsed (its YAML source is re-read and changed).
    design : windsheet.design.model.DesignCore
        The order's own design (verdict, wire, winding, leads).
    check : callable
        ``check(order) -> Design`` sizing a changed order exactly as the
        order itself was sized (without remedies of its own).

    Returns
    -------
    remedies : list of dict
        ``{"set": {path: value}, "verdict", "worst_Vpk", "pdiv_Vpk"}``,
        better verdicts first, then in the order tried.

    References
    ----------
    Each outcome is windsheet's own check re-run on the changed order.
    """
    from windsheet.order.document import parse_order, read_yaml_bytes

    now = VERDICT_RANK.get(design.insulation.verdict, 2)
    if now == VERDICT_RANK["pass"]:
        return []
    doc = read_yaml_bytes(order.source, "order", label=order.path or "order")
    found = []

    def attempt(k, change):
        text = yaml.safe_dump(apply(doc, change), allow_unicode=True, sort_keys=False).encode()
        try:
            result = check(parse_order(text, order.path))
        except InputError:
            return   # does not fit, or not an inductor at the duty: not a remedy
        got = result.insulation
        if VERDICT_RANK[got.verdict] > now:
            found.append((-VERDICT_RANK[got.verdict], k, {
                "set": change, "verdict": got.verdict,
                "worst_Vpk": float(result.worst_adjacent.voltage_Vpk), "pdiv_Vpk": got.pdiv_Vpk}))

    singles = candidates(doc, design)
    for k, change in enumerate(singles):
        attempt(k, change)
    if not any(r["verdict"] == "pass" for _, _, r in found):
        # No single change clears it: a heavier grade (breakdown) with a change
        # that keeps air out of the way (partial discharge).
        grades = [c for c in singles if "wire.grade" in c]
        others = [c for c in singles if "wire.grade" not in c and "winding.layers" not in c]
        for g in grades[-1:]:
            for k, other in enumerate(others):
                attempt(len(singles) + k, {**g, **other})
    return [r for _, _, r in sorted(found, key=lambda t: (t[0], t[1]))]


def advice(remedies: list[dict], verdict: str) -> list[str]:
    """The printed advice: one line per remedy found, or a line saying none was.

    Examples
    --------
    >>> advice([{"set": {"wire.grade": 3}, "verdict": "pass", "worst_Vpk": 812.0, "pdiv_Vpk": 1100.0}], "fail")
    ['Remedy, checked by re-running this order: set wire.grade: 3 → PASS (worst 812 V peak, inception 1100 V peak).']
    """
    from windsheet.physics.insulation import volts

    if verdict == "pass":
        return []
    if not remedies:
        return ["None of the changes windsheet tries (heavier grade, spaced strands, layer tape, more "
                "layers, impregnation, lead routes) improves this verdict: change the hookup or the "
                "construction (a sectioned or progressive winding, for example)."]
    out = []
    for r in remedies:
        sets = ", ".join(f"{k}: {v}" for k, v in r["set"].items())
        pd = f", inception {volts(r['pdiv_Vpk'])} V peak" if r.get("pdiv_Vpk") else ", no air path"
        out.append(f"Remedy, checked by re-running this order: set {sets} → {r['verdict'].upper()} "
                   f"(worst {volts(r['worst_Vpk'])} V peak{pd}).")
    return out
