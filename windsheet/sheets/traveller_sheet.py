"""What the traveller shows: its context, arranged from the prediction dict.

Rendering shows what ``windsheet.design.build.predict`` says and computes no
physics.  It does choose words and layout: which cautions its duty calls for,
how numbers are written for people (``61.20 µH``, ``1.234 Ω``, ``12.30 m``).
"""

from __future__ import annotations

from markupsafe import Markup

from .diagrams import cross_section_svg, winding_terminals, wiring_svg
from windsheet.common.fmt import NBSP as _NBSP
from windsheet.common.fmt import OHM, celsius, eng, length, mass, percent
from .sheet_pdf import band, farad, header_part, henry, hertz, joule, ohm, volt
from .wiring_words import form_rows, lead_notes, pin_rows, pins_of_ends, terminal_names
from .procedure import procedure_steps

#: Section headings in job-flow order; the tests look for each in the PDF text.
SECTIONS = (
    "1 Specification",
    "2 Predictions",
    "3 Materials pick list",
    "4 Procedure",
    "5 Wiring diagram and cross-section",
    "6 Insulation check",
    "7 Cautions",
    "8 QC record",
)

#: Extra-low voltage band, IEC 61140: 50 V a.c. rms, 120 V ripple-free d.c.
ELV_AC_V = 50.0
ELV_DC_V = 120.0

#: Stored energy above which the sheet prints a boxed caution.  350 mJ is the
#: discharge-energy limit of IEC 60335-1 §8.1.4 (seen in a secondary copy);
#: used only to decide when to draw attention, never as a safe level.
STORED_ENERGY_CAUTION_J = 0.35

#: Units (serial numbers) per QC table; more units continue in further tables.
UNITS_PER_QC_TABLE = 4

DEFERRAL = ("These notes do not replace local electrical codes, the applicable "
            "product standard or licensed practice; where they differ, those govern.")


# --- what goes on the sheet ----------------------------------------------------------

def traveller_context(p: dict, forced: bool = False) -> dict:
    """Everything the template shows, arranged for it; values straight from ``p``."""
    strands = p.get("strands") or []
    ids = [s["id"] for s in strands]
    hookup = p.get("hookup") or {}
    labels = {s["id"]: s.get("identification") for s in strands}
    ins = p.get("insulation") or {}
    return {
        "p": p,
        "job": p.get("job") or {},
        "forced": bool(forced),
        "header_part": header_part(p.get("job") or {}, forced),
        "verdict": ins.get("verdict") or "unknown",
        "strand_ids": ids,
        "terminal_names": terminal_names(hookup, ids),
        "joins_text": [" + ".join(j) for j in hookup.get("joins") or []],
        "wiring_svg": Markup(wiring_svg(hookup, ids, labels, lead_notes(p), pins_of_ends(p))),
        "pin_rows": pin_rows(p),
        "cross_section_svg": svg_image(cross_section_svg(p.get("cross_section") or {},
                                                      (p.get("form") or {}).get("kind") or "",
                                                      placement=(p.get("fit") or {}).get("placement"))),
        "section_wide": _widest_layer(p.get("cross_section") or {}) > 14,
        "ring_svgs": _ring_svgs(p),
        "voltage_svg": svg_image(cross_section_svg(p.get("cross_section") or {},
                                                (p.get("form") or {}).get("kind") or "", shade=True))
        if (p.get("cross_section") or {}).get("potential_max_Vpk") else None,
        "form_rows": form_rows(p.get("form") or {}),
        "duty_rows": duty_rows(p.get("duty") or {}),
        "picks": pick_list(p),
        "steps": procedure_steps(p),
        "cautions": cautions(p),
        "deferral": DEFERRAL,
        "qc_items": qc_items(p),
        "unit_tables": unit_tables((p.get("job") or {}).get("units") or []),
        "insulation_rows": insulation_rows(ins),
        "duty_physics_rows": duty_physics_rows(p),
        "thermal": p.get("thermal") or {},
        "impulse_rows": impulse_rows(p.get("impulse")),
    }


def _widest_layer(cross_section: dict) -> int:
    layers = cross_section.get("layers") or []
    return max([len(l.get("slots") or [] if isinstance(l, dict) else l) for l in layers] + [0])


def is_dc(duty: dict) -> bool:
    return not duty.get("frequency_Hz")


def duty_rows(duty: dict) -> list[tuple[str, str]]:
    dc = is_dc(duty)
    rows = [("Voltage", eng(duty.get("voltage_V"), "V", trim=True) + (" d.c." if dc else " rms")
             + (" per winding" if duty.get("between_windings_V") is not None else ""))]
    if duty.get("between_windings_V") is not None:
        rows.append(("Between windings", eng(duty["between_windings_V"], "V", trim=True)
                     + (" d.c." if dc else " rms")))
    rows += [
            ("Frequency", "d.c." if dc else eng(duty.get("frequency_Hz"), "Hz", trim=True)),
            ("Current", eng(duty.get("current_A"), "A", trim=True) + ("" if dc else " rms")),
            ("Ambient", celsius(duty.get("ambient_C")))]
    if duty.get("operating_temperature_C") is not None:
        rows.append(("Operating temperature", celsius(duty["operating_temperature_C"])))
    return rows


def insulation_rows(ins: dict) -> list[tuple[str, str]]:
    """The check's figures, in the order a reader follows the argument."""
    rows = []

    def add(label, key, fmt):
        if ins.get(key) is not None:
            rows.append((label, fmt(ins[key])))

    add("Worst adjacent voltage", "worst_adjacent_Vpk", lambda v: volt(v) + " peak")
    add("Enamel breakdown (minimum, grade)", "breakdown_V", volt)
    add("Derating applied", "derating", lambda v: f"{float(v):g}")
    add("Allowed between adjacent turns", "allowed_Vpk", lambda v: volt(v) + " peak")
    add("Margin (allowed ÷ worst)", "margin", lambda v: f"{float(v):.2f}")
    add("Paschen minimum, air", "paschen_min_Vpk", lambda v: volt(v) + " peak")
    basis = {"estimated": "estimated", "measured": "measured"}.get(ins.get("pdiv_basis"), "")
    pair = (ins.get("pd_pair") or {}).get("where")
    if pair:
        rows.append(("Pair nearest partial discharge", f"{pair}, "
                     f"{volt((ins.get('pd_pair') or {}).get('voltage_Vpk'))} peak"))
    add(f"Its partial-discharge inception, 20 °C ({basis})" if basis else
        "Partial-discharge inception, 20 °C", "pdiv_Vpk", lambda v: volt(v) + " peak")
    add("Its partial-discharge inception, hot", "pdiv_hot_Vpk", lambda v: volt(v) + " peak")
    add("Worst layer-to-layer voltage", "layer_Vpk", lambda v: volt(v) + " peak")
    add("Layer tape rating", "tape_rating_V", volt)
    return rows


def duty_physics_rows(p: dict) -> list[tuple[str, str]]:
    """AC resistance, loss, temperatures and current density on the duty, as the prediction gives them."""
    t, ac, th = p.get("terminal") or {}, p.get("ac_resistance") or {}, p.get("thermal") or {}
    rows = []
    if t.get("resistance_ac_ohm") is not None and ac:
        f = ac.get("frequency_Hz")
        rows.append((f"Resistance at the duty frequency ({hertz(f)}), hot" if f else "Resistance on the d.c. duty, hot",
                     f"{ohm(t['resistance_ac_ohm'])} (AC/DC {float(ac.get('ratio', 1.0)):.3f}; {ac.get('model', '')})"))
    if t.get("loss_W") is not None:
        rows.append(("Copper loss at the duty current", eng(t["loss_W"], "W", sig=3)))
    if th:
        rows.append(("Temperature rise of the surface (still air)",
                     f"{float(th['surface_rise_K']):.1f} K, surface {celsius(th['surface_C'])}"))
        rows.append(("Hot spot (estimate) / mean winding",
                     f"{celsius(th['hot_spot_C'])} / {celsius(th['mean_C'])}"))
        rows.append(("Thermal check", f"{str(th.get('verdict', '')).upper()}: {th.get('reason', '')}"))
        lo, hi = th.get("current_density_range_A_per_mm2") or (None, None)
        rows.append(("Current density", f"{float(th['current_density_A_per_mm2']):.2f} A/mm²"
                     + (f" (common practice {lo:g}–{hi:g} A/mm² for natural cooling)" if lo else "")))
        rows.append(("Heat method", th.get("method", "")))
    return rows


def impulse_rows(imp) -> list[tuple[str, str]]:
    """The fast edge's share on the first turns, when the duty has one."""
    if not imp:
        return []
    rows = [("Fast edge", f"{volt(imp['edge_Vpk'])} peak"
             + (f", rise time {eng(imp['rise_time_s'], 's', sig=3)}" if imp.get("rise_time_s") else ""))]
    rows.append(("First turn under the edge", f"{volt(imp['first_turn_Vpk'])} peak "
                 f"(even share {volt(imp['first_turn_uniform_Vpk'])})"))
    rows.append(("Worst pair under the edge", f"{volt(imp['worst_pair_Vpk'])} peak, {imp.get('worst_pair_where')}"))
    if imp.get("alpha") is not None:
        rows.append(("Distribution constant α = √(Cg/Cs)", f"{float(imp['alpha']):.3g}"))
    rows.append(("Capacitance to ground / core / shield", farad(imp["ground_capacitance_F"])
                 + ("" if imp.get("ground_capacitance_given") else " (assumed: give duty.ground_capacitance)")))
    return rows


def pick_list(p: dict) -> list[dict]:
    """Materials to draw from stores, one row each, with the quantity to pick."""
    wire = p.get("wire") or {}
    w = p.get("winding") or {}
    form = p.get("form") or {}
    hookup = p.get("hookup") or {}
    job = p.get("job") or {}
    qty = int(job.get("quantity") or len(job.get("units") or []) or 1)
    picks = [{"item": "Form / core",
              "spec": form.get("material") or form.get("description") or form.get("kind") or "—",
              "qty": f"{qty}"}]
    for s in p.get("strands") or []:
        per_unit = s.get("wire_length_with_scrap_m")
        picks.append({
            "item": f"Wire, strand {s['id']}",
            "spec": f"{wire.get('label', '—')}; {s.get('identification') or 'no marking'}",
            "qty": f"{length(per_unit)} per unit (incl. {percent(w.get('scrap_allowance'))} scrap), "
                   f"{mass(s.get('mass_kg'))} per unit",
        })
    layers = int(p.get("layers") or w.get("layers") or 1)
    if (w.get("layer_tape_m") or 0) > 0 and layers > 1:
        rating = w.get("layer_tape_rating_V")
        picks.append({"item": "Layer tape",
                      "spec": f"{w.get('layer_tape_material') or 'insulating tape'}, "
                              f"{length(w['layer_tape_m'])} thick"
                              + (f", rated {volt(rating)}" if rating else "") + ", full traverse width",
                      "qty": f"{layers - 1} wrap(s) per unit"})
    if form.get("margin_tape_m"):
        picks.append({"item": "Margin tape",
                      "spec": f"{form.get('margin_tape_material') or 'margin tape'}, "
                              f"{length(form['margin_tape_m'])} wide, built to "
                              f"{length((p.get('fit') or {}).get('build_m'))}",
                      "qty": "2 strips per unit (one at each end of the traverse)"})
    ends = 2 * len(p.get("strands") or [])
    picks.append({"item": "Sleeving",
                  "spec": "over every joint and lead, rated for the duty and thermal class "
                          f"{(wire.get('thermal_class_C') or '—')} °C",
                  "qty": f"{len(hookup.get('joins') or [])} joint(s) + "
                         f"{len(hookup.get('terminals') or [])} lead(s) per unit"})
    if w.get("lead_length_m"):
        picks.append({"item": "Leads", "spec": f"{length(w['lead_length_m'])} left at each of "
                                              f"{ends} wire ends (included in wire length)",
                      "qty": f"{ends} ends per unit"})
    picks.append({"item": "Unit labels", "spec": "serial numbers " + _serial_span(job),
                  "qty": f"{qty}"})
    return picks


def _serial_span(job: dict) -> str:
    units = job.get("units") or []
    if not units:
        return "—"
    return units[0] if len(units) == 1 else f"{units[0]} … {units[-1]}"


# --- cautions -------------------------------------------------------------------------

def cautions(p: dict) -> list[dict]:
    """Cautions the duty calls for; each ends by deferring to the governing rules."""
    duty = p.get("duty") or {}
    cau = p.get("cautions") or {}
    hipot = p.get("hipot") or {}
    out = []
    v = cau.get("highest_V") if cau.get("highest_V") is not None else duty.get("voltage_V")
    if cau.get("above_elv"):
        limit = cau.get("elv_limit_V") or (ELV_DC_V if is_dc(duty) else ELV_AC_V)
        out.append({"level": "warning", "title": "Above extra-low voltage",
                    "text": f"The highest working voltage, {eng(v, 'V', trim=True)}"
                            f"{' d.c.' if is_dc(duty) else ' rms'}, "
                            f"exceeds the extra-low-voltage limit of {eng(limit, 'V', trim=True)} "
                            f"(IEC 61140: 50 V a.c. rms, 120 V ripple-free d.c.). Treat the "
                            "finished coil and its leads as hazardous live when energised."})
    if cau.get("hipot"):
        out.append({"level": "warning", "title": "Hipot test",
                    "text": f"Test voltage {volt(hipot.get('voltage_V'))}: only trained, authorised "
                            "staff, in a marked test area, with an interlocked tester; one hand rule; "
                            "discharge and earth the winding after the test before touching it."})
    energy = cau.get("stored_energy_J")
    if energy is None:
        energy = (p.get("energy") or {}).get("magnetic_J")
    if energy is not None and energy >= STORED_ENERGY_CAUTION_J:
        out.append({"level": "warning", "title": "Stored magnetic energy",
                    "text": f"At the duty current the coil stores {joule(energy)} (½LI²). Opening "
                            "the circuit while current flows drives a high voltage across the "
                            "break: de-energise before disconnecting."})
    elif energy is not None:
        out.append({"level": "note", "title": "Stored magnetic energy",
                    "text": f"{joule(energy)} at the duty current (½LI²)."})
    if cau.get("hot_surface"):
        out.append({"level": "warning", "title": "Hot surface",
                    "text": f"On its duty the winding's surface is computed to reach about "
                            f"{celsius(cau.get('surface_C'))} (in still air): it burns on contact. Let it "
                            "cool before handling, and keep it guarded where people can touch it."})
    out.append({"level": "note", "title": "Ring-test fixtures",
                "text": "The capacitor of a ring (resonance) test fixture holds charge after the "
                        "test: discharge it through a resistor before handling (energy ½CV²)."})
    return out


# --- QC record -------------------------------------------------------------------------

def _tol_band(value, tol, fmt) -> str:
    # Same arithmetic as the sign-off's band: predicted x (1 -/+ tolerance).
    if value is None or tol is None:
        return "—"
    return band(value * (1 - tol), value * (1 + tol), fmt)


def qc_items(p: dict) -> list[dict]:
    """What the inspector measures on every unit, with what it should read.

    Keys follow the sign-off's line keys.  ``judged`` items get pass/fail
    boxes; the others are only recorded (they feed the sign-off's diagnosis).
    """
    from windsheet.design.qc_plan import prediction_required_lines
    from windsheet.qc.signoff import DEFAULT_MIN_INSULATION_OHM

    term = p.get("terminal") or {}
    acc = term.get("accept") or {}
    tol = p.get("tolerances") or {}
    tol_L, tol_R = tol.get("inductance"), tol.get("resistance")
    strands = p.get("strands") or []
    ids = [s["id"] for s in strands]
    ins = p.get("insulation") or {}

    def item(key, label, predicted="", accept="record", judged=True):
        return {"key": key, "label": label, "predicted": predicted, "band": accept,
                "judged": judged}

    items = []
    # One strand alone is what the terminals read; its own rows would repeat them.
    for s in strands if len(strands) > 1 else []:
        sid = s["id"]
        alone = " alone" if len(strands) > 1 else ""
        items.append(item(f"strand.{sid}.inductance", f"Inductance, strand {sid}{alone}",
                          henry(s.get("inductance_H")), _tol_band(s.get("inductance_H"), tol_L, henry)))
        items.append(item(f"strand.{sid}.resistance", f"DC resistance, strand {sid} (at 20 °C)",
                          ohm(s.get("resistance_20C_ohm")),
                          _tol_band(s.get("resistance_20C_ohm"), tol_R, ohm)))
    if (p.get("hookup") or {}).get("joins") and len(strands) >= 2:
        pairs = p.get("pairs") or {}
        for a, b in zip(ids, ids[1:]):
            aid = (pairs.get(f"{a}-{b}") or {}).get("series_aiding_H")
            opp = (pairs.get(f"{a}-{b}") or {}).get("series_opposing_H")
            items.append(item(f"pair.{a}-{b}.series_aiding", f"Before joint: {a}+{b} series-aiding",
                              henry(aid) if aid else "", _tol_band(aid, tol_L, henry) if aid else "record",
                              judged=bool(aid)))
            items.append(item(f"pair.{a}-{b}.series_opposing", f"Before joint: {a}−{b} series-opposing",
                              henry(opp) if opp else "", "record (leakage)", judged=False))
    items += [
        item("terminal.inductance", "Inductance at the terminals" + (
             " (band: ordered target ± tolerance)" if acc.get("inductance_basis") == "target" else ""),
             henry(term.get("inductance_H")) + (
             f" ({acc['prediction_offset'] * 100:+.2f}{_NBSP}% from target)"
             if acc.get("inductance_basis") == "target" else ""),
             band(acc.get("inductance_min_H"), acc.get("inductance_max_H"), henry)),
        item("terminal.resistance", "DC resistance at the terminals (at 20 °C)",
             ohm(term.get("resistance_ohm")),
             band(acc.get("resistance_min_ohm"), acc.get("resistance_max_ohm"), ohm)),
    ]
    ir_min = ins.get("ir_min_ohm") or DEFAULT_MIN_INSULATION_OHM
    if len(strands) > 1:
        items.append(item("continuity.strand_to_strand", "Continuity between strands", "open", "open"))
        items.append(item("insulation.strand_to_strand", "Insulation resistance, strand to strand", "",
                          f"≥ {eng(ir_min, OHM, sig=3, trim=True)}"))
    items.append(item("insulation.to_core", "Insulation resistance to core/form", "",
                      f"≥ {eng(ir_min, OHM, sig=3, trim=True)}"))
    hipot = p.get("hipot") or {}
    if (p.get("cautions") or {}).get("hipot") and hipot.get("voltage_V"):
        dur = hipot.get("duration_s")
        items.append(item("hipot", f"Hipot {volt(hipot['voltage_V'])}"
                          + (f", {float(dur):g} s" if dur else "") + ": leakage, withstand",
                          "", "withstands"))
    items.append(item("ambient", "Ambient temperature at test", "", "record (°C)", judged=False))
    # The record prints exactly the lines the prediction requires, in its order.
    by_key = {i["key"]: i for i in items}
    return [by_key.get(k) or item(k, k) for k in prediction_required_lines(p)]


def unit_tables(units: list[str]) -> list[list[str]]:
    """Serial numbers in groups, one QC table per group."""
    units = [str(u) for u in units] or ["—"]
    return [units[i:i + UNITS_PER_QC_TABLE] for i in range(0, len(units), UNITS_PER_QC_TABLE)]




def _ring_svgs(p: dict):
    """A toroid's top view and section through the ring, or ``None`` for other forms."""
    ring = p.get("ring")
    if not ring:
        return None
    from .ring_diagrams import ring_section_svg, ring_top_view_svg

    form = p.get("form") or {}
    direction = (p.get("winding") or {}).get("direction") or "clockwise"
    return {"top": svg_image(ring_top_view_svg(ring, form, direction)),
            "section": svg_image(ring_section_svg(ring, form))}


def svg_image(svg: str) -> Markup:
    """An SVG drawing as an ``<img>`` with a ``data:`` URL, its label as the alt text.

    WeasyPrint then parses the drawing once, on its own, instead of matching
    the sheet's stylesheet against every line and circle in it (the HTML
    stays standalone).
    """
    import base64
    import html
    import re

    label = re.search(r'aria-label="([^"]*)"', svg)
    width = re.search(r'width="([0-9.]+)"', svg)
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return Markup(f'<img class="drawing" alt="{html.escape(label.group(1) if label else "drawing", quote=True)}" '
                  f'style="max-width:{width.group(1) if width else 400}px" '
                  f'src="data:image/svg+xml;base64,{data}">')
