"""Remedies for an insulation verdict that is not a pass, each found by re-running the check.

A remedy is a change to the order written as field paths and values exactly
as an order writes them (``{"wire.grade": 3}``, ``{"winding.pitch":
"1.50 mm"}``).  Every candidate is applied to the order's own YAML mapping,
parsed again by :func:`windsheet.order.document.parse_order` and sized by the same
check as the order itself; only those that give a better verdict are
listed, with the verdict, worst voltage and inception voltage they gave.  A
script can paste ``set`` into the order and get that verdict.

What a winder would try, one kind at a time, cheapest kind first:

1. **lead route** — take the start lead out through the former, the finish
   or the joint out at the end flange: a few centimetres of sleeving, the
   winding itself is unchanged;
2. **tape** — layer tape where there is none; where there is, a tape of a
   higher rating (for a tape over its rating) or a thicker tape of a higher
   rating (for a layer pair near discharge): a different reel, the same
   winding;
3. **spacing** — the strands at a wider pitch, spread evenly: the same wire
   and turns, a slower and more careful traverse;
4. **layers** — more layers of fewer turns: a new build, new resistance and
   inductance;
5. **impregnation** — varnish, or potting: an added process (oven, vacuum,
   cure time) on every part;
6. **grade** — a heavier enamel grade: different wire stock to buy, and a
   larger overall diameter that changes the fit.

:func:`find_remedies` tries every single change first (a handful of
re-sizings, and they show which changes help at all).  Then pairs, then
triples, of changes of different kinds (the routes of two different leads
count as two changes), made only of single changes that helped, cheapest
first, within a budget of :data:`BUDGET` re-sizings per order.  A
combination is not tried when it contains a change that already passes, or
when a pass of the same kinds with no costlier option is known: it could only
change the job more.  Once a pass is found, no combination of more changes is
tried.  The remedies are ranked passes first, then by how little they change
the job: fewest changes, then the cheapest kinds (compared costliest kind
first, by the list above); at most :data:`SHOWN` are kept.  A sectioned or
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


#: The kinds of change, cheapest first (see the module docstring for why).
KINDS = ("lead route", "tape", "spacing", "layers", "sections", "impregnation", "grade")
#: Most re-sizings tried for one order (singles first, then pairs, then triples).
BUDGET = 40
#: Most remedies listed.
SHOWN = 5

# Tapes tried when the order's own tape is over-stressed or near discharge:
# a higher rating on the same thickness, or a thicker tape of a higher rating.
TAPE_RATINGS_V = (3e3, 5e3, 10e3)
THICKER_TAPES = ((0.1e-3, 5e3), (0.25e-3, 10e3))


def _mm(x: float) -> str:
    return f"{x * 1e3:.3g} mm"


def _kv(v: float) -> str:
    return f"{v / 1e3:g} kV"


def options(doc: dict, design) -> list[tuple[str, dict]]:
    """Single changes worth trying for this order, cheapest kind first.

    Parameters
    ----------
    doc : dict
        The order's YAML mapping, as written.
    design : windsheet.design.model.DesignCore
        The order's own design (its leads, layers, tape, pitch and grade).

    Returns
    -------
    options : list of (str, dict)
        ``(kind, {path: value})``, kind one of :data:`KINDS`; within a kind
        the smaller change first (3 kV before 5 kV, 1.5 before 2 diameters
        of pitch, varnish before potting).  A tape written as several fields
        (thickness, rating, material) is one change: one reel for another.

    Examples
    --------
    >>> KINDS.index("lead route") < KINDS.index("tape") < KINDS.index("grade")
    True
    """
    out = []
    wire = doc.get("wire") or {}
    winding = doc.get("winding") or {}
    strands = design.winding.strands
    layers = design.layers
    ov = design.wire.overall_diameter_m

    routes = (winding.get("leads") or {})
    for lead in design.leads:
        if lead.joint and " + " in lead.joint and lead.route != "end-flange" \
                and lead.lead.endswith(".finish") and routes.get("joint") != "end-flange":
            out.append(("lead route", {"winding.leads.joint": "end-flange"}))
        elif lead.lead.endswith(".finish") and not lead.joint and lead.route != "end-flange":
            out.append(("lead route", {"winding.leads.finish": "end-flange"}))
        elif lead.lead.endswith(".start") and lead.route != "through-form":
            out.append(("lead route", {"winding.leads.start": "through-form"}))

    if layers > 1:
        tape = float(design.winding.layer_tape_m or 0.0)
        rating = design.insulation.tape_rating_V
        if not tape > 0:
            out += [("tape", {"winding.layer_tape": "0.1 mm"}), ("tape", {"winding.layer_tape": "0.25 mm"})]
        else:
            if rating is not None:
                # The same tape at a higher rating: the next two ratings up.
                out += [("tape", {"winding.layer_tape.rating": _kv(r)})
                        for r in [r for r in TAPE_RATINGS_V if r > rating * (1 + 1e-9)][:2]]
            # One change of reel, written field by field; a named material is renamed, so the
            # traveller does not call for the old reel.
            named = isinstance(winding.get("layer_tape"), dict) and winding["layer_tape"].get("material")
            for t, r in THICKER_TAPES:
                if t > tape * (1 + 1e-6) and (rating is None or r >= rating):
                    change = {"winding.layer_tape.thickness": _mm(t), "winding.layer_tape.rating": _kv(r)}
                    if named:
                        change["winding.layer_tape.material"] = f"tape {_mm(t)}, rated {_kv(r)}"
                    out.append(("tape", change))

    pitch = float(design.winding.pitch_m or 0.0)
    for factor in (1.5, 2.0, 3.0):
        new = strands * ov * factor
        if new > pitch * (1 + 1e-6):
            change = {"winding.pitch": _mm(new)}
            if strands > 1:
                change["winding.strand_spacing"] = "even"
            out.append(("spacing", change))

    per_section = max(design.winding.layers_per_section or [layers])
    if layers > 1 and 2 * per_section * max(len(design.winding.layers_per_section), 1) <= 200:
        out.append(("layers", {"winding.layers": 2 * per_section}))

    # Walls across the traverse: each section takes about 1/N of the turns, and of the layer voltage.
    if design.form.kind in ("cylinder", "bobbin") and layers > 1:
        now = int(winding.get("sections") or 1)
        out += [("sections", {"winding.sections": n}) for n in (2, 4, 8) if n > now]

    imp = winding.get("impregnation") or "none"
    if imp == "none":
        out.append(("impregnation", {"winding.impregnation": "varnish"}))
    if imp != "potted":
        out.append(("impregnation", {"winding.impregnation": "potted"}))

    if not wire.get("catalog"):
        grade = int(design.wire.grade or wire.get("grade") or 2)
        out += [("grade", {"wire.grade": g}) for g in (2, 3) if g > grade]

    unique = []
    for c in out:
        if c not in unique:
            unique.append(c)
    return unique


def combinations(singles: list[tuple[str, dict]], most: int = 3) -> list[tuple[int, ...]]:
    """Every combination of up to ``most`` single changes of different kinds, cheapest first.

    Each combination is a tuple of indices into ``singles``.  Order: fewest
    changes, then the cost of the costliest kind, then of the next (so a
    lead route with a tape comes before a lead route with a heavier grade),
    then the order of ``singles``.  Two changes of one kind (two tapes, two
    pitches, two grades) are never combined, except the routes of two
    different leads (the start through the former and the finish out at
    the end flange), which count as two changes.

    Examples
    --------
    >>> s = [("lead route", {"a": 1}), ("tape", {"b": 1}), ("grade", {"c": 1})]
    >>> combinations(s, 2)
    [(0,), (1,), (2,), (0, 1), (0, 2), (1, 2)]
    """
    from itertools import combinations as pick

    def key(i):
        k, change = singles[i]
        return (k, tuple(change)) if k == "lead route" else (k,)

    out = []
    for n in range(1, most + 1):
        for idx in pick(range(len(singles)), n):
            kinds = [singles[i][0] for i in idx]
            if len({key(i) for i in idx}) == n:
                out.append(((n, sorted((KINDS.index(k) for k in kinds), reverse=True), idx), idx))
    out.sort(key=lambda t: t[0])
    return [idx for _, idx in out]


def over_limits(ins) -> tuple[float, float, float]:
    """Each judged quantity over the limit it must stay within for a pass: enamel, tape, discharge.

    Values above 1 keep the order from passing.  The discharge limit is the
    hot inception voltage, less the safety factor on AC duty
    (:func:`windsheet.physics.insulation.insulation_verdict`).
    """
    enamel = (ins.enamel_Vpk or 0.0) / ins.allowed_Vpk if ins.allowed_Vpk else 0.0
    tape = ins.layer_Vpk / ins.tape_rating_V if ins.tape_rating_V else 0.0
    pd = 0.0
    if ins.pdiv_hot_Vpk and ins.pd_pair is not None:
        factor = (ins.pd_safety_factor or 1.0) if ins.duty != "dc" else 1.0
        pd = ins.pd_pair.voltage_Vpk * factor / ins.pdiv_hot_Vpk
    return enamel, tape, pd


def _helps(before, after) -> bool:
    """A single change lowers at least one quantity that was over its limit (by 0.5 % or more)."""
    return any(b > 1.0 and a < b * 0.995 for b, a in zip(before, after))


def find_remedies(order, design, check, budget: int = BUDGET) -> list[dict]:
    """The changes, single or combined, that improve the order's insulation verdict.

    Every single change of :func:`options` is tried first.  Combinations
    (:func:`combinations`, pairs before triples) are then made only of
    single changes that helped: that improved the verdict, or lowered a
    judged quantity that was over its limit (:func:`over_limits`); lead
    routes always count as helping, since a second lead can hide what the
    first one's change did.  A combination is skipped when one that passes
    has the same kinds and no costlier option of any of them, or is
    contained in it; once a pass is found, no combination of more changes
    is tried.  At most ``budget`` re-sizings are made.

    Parameters
    ----------
    order : windsheet.order.document.Order
        The order as parsed (its YAML source is re-read and changed).
    design : windsheet.design.model.DesignCore
        The order's own design (verdict, wire, winding, leads).
    check : callable
        ``check(order) -> Design`` sizing a changed order exactly as the
        order itself was sized (without remedies of its own).
    budget : int
        Most calls of ``check`` for this order.

    Returns
    -------
    remedies : list of dict
        ``{"set": {path: value}, "verdict", "worst_Vpk", "pdiv_Vpk"}``, at
        most :data:`SHOWN`: passes first, then fewest changes, then the
        cheapest kinds (:data:`KINDS`).

    References
    ----------
    Each outcome is windsheet's own check re-run on the changed order.
    """
    from windsheet.order.document import parse_order, read_yaml_bytes

    now = VERDICT_RANK.get(design.insulation.verdict, 2)
    if now == VERDICT_RANK["pass"]:
        return []
    doc = read_yaml_bytes(order.source, "order", label=order.path or "order")
    singles = options(doc, design)
    before = over_limits(design.insulation)
    found, passing, helped = [], [], set()
    tried = 0

    def dominated(idx):
        for p in passing:
            if set(p) <= set(idx):
                return True     # contains a pass: only changes the job more
            if len(p) == len(idx) and all(singles[i][0] == singles[j][0] and i <= j for i, j in zip(p, idx)):
                return True     # the same kinds, each option at least as costly
        return False

    for rank, idx in enumerate(combinations(singles)):
        if tried >= budget or sum(r["verdict"] == "pass" for _, r in found) >= SHOWN:
            break
        if passing and len(idx) > max(len(p) for p in passing):
            break       # a pass with fewer changes is found: more changes are not what a winder wants
        if len(idx) > 1 and not set(idx) <= helped or dominated(idx):
            continue
        change = {}
        for i in idx:
            change.update(singles[i][1])
        tried += 1
        text = yaml.safe_dump(apply(doc, change), allow_unicode=True, sort_keys=False).encode()
        try:
            result = check(parse_order(text, order.path))
        except InputError:
            continue   # does not fit, or not an inductor at the duty: not a remedy
        got = result.insulation
        better = VERDICT_RANK[got.verdict] > now
        if len(idx) == 1 and (better or singles[idx[0]][0] == "lead route"
                              or _helps(before, over_limits(got))):
            helped.add(idx[0])
        if got.verdict == "pass":
            passing.append(idx)
        if better:
            found.append(((-VERDICT_RANK[got.verdict], rank), {
                "set": change, "verdict": got.verdict,
                "worst_Vpk": float(result.worst_adjacent.voltage_Vpk), "pdiv_Vpk": got.pdiv_Vpk}))
    # Tried in cost order, so within one verdict the earlier is the smaller change.
    return [r for _, r in sorted(found, key=lambda t: t[0])][:SHOWN]


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
        return ["None of the changes windsheet tries, alone or up to three together (lead routes, layer "
                "tape, spaced strands, more layers, impregnation, heavier grade), improves this verdict: "
                "change the hookup or the construction (a sectioned or progressive winding, for example)."]
    out = []
    for r in remedies:
        sets = ", ".join(f"{k}: {v}" for k, v in r["set"].items())
        pd = f", inception {volts(r['pdiv_Vpk'])} V peak" if r.get("pdiv_Vpk") else ", no air path"
        out.append(f"Remedy, checked by re-running this order: set {sets} → {r['verdict'].upper()} "
                   f"(worst {volts(r['worst_Vpk'])} V peak{pd}).")
    return out
