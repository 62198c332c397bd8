"""What the traveller shows: its context, arranged from the design (:class:`windsheet.design.model.Design`).

Rendering shows what ``windsheet.design.build.build_design`` says and computes no
physics.  It does choose words and layout: which cautions its duty calls for,
how numbers are written for people (``61.20 µH``, ``1.234 Ω``, ``12.30 m``).
"""

from __future__ import annotations

from markupsafe import Markup

from .diagrams import cross_section_svg, wiring_svg
from windsheet.common.fmt import NBSP, OHM, celsius, eng, kelvin, length, mass, percent
from .sheet_pdf import band, farad, header_part, henry, hertz, joule, ohm, thermal_class, volt
from .wiring_words import form_rows, pin_rows, pins_of_ends, terminal_names, termination_rows
from .procedure import procedure_blocks, procedure_steps

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

def traveller_context(p, forced: bool = False) -> dict:
    """Everything the template shows, arranged for it; values straight from the design ``p``."""
    ids = p.strand_ids
    labels = {s.id: s.identification for s in p.strands}
    cs = p.cross_section.model_dump() if p.cross_section else {}
    kind = p.form.kind or ""
    placement = p.fit.placement.model_dump() if p.fit and p.fit.placement else None
    return {
        "p": p,
        "job": p.job,
        "forced": bool(forced),
        "header_part": header_part(p.job, forced),
        "verdict": p.insulation.verdict if p.insulation else "unknown",
        "strand_ids": ids,
        "terminal_names": terminal_names(p),
        "terminal_heading": terminal_heading(p),
        "joints": p.connections.joints,
        "joins_text": [" + ".join(j.ends) for j in p.connections.joints],
        # Lead routes are in the termination table, where they wrap; the drawing holds the circuit only.
        "wiring_svg": natural_size(wiring_svg(p.hookup.model_dump(), ids, labels, None, pins_of_ends(p),
                                              terminals=[end for _, end in terminal_names(p)])),
        "pin_header_svg": _pin_header(p),
        "termination_rows": termination_rows(p),
        "pin_rows": pin_rows(p),
        "cross_section_svg": svg_image(cross_section_svg(cs, kind, placement=placement)),
        "section_wide": _widest_layer(cs) > 14,
        "ring_svgs": _ring_svgs(p),
        "voltage_svg": svg_image(cross_section_svg(cs, kind, shade=True)) if cs.get("potential_max_Vpk") else None,
        "form_rows": form_rows(p.form),
        "duty_rows": duty_rows(p.duty),
        "layer_counts": layer_counts(p.winding.turns_in_layer),
        "hot_resistance_label": hot_resistance_label(p),
        "picks": pick_list(p),
        "steps": procedure_steps(p),
        "procedure": procedure_blocks(p),
        "cautions": cautions(p),
        "deferral": DEFERRAL,
        "qc_items": qc_items(p),
        "unit_tables": unit_tables(p.job.units),
        "insulation_rows": insulation_rows(p.insulation),
        "duty_physics_rows": duty_physics_rows(p),
        "thermal": p.thermal,
        "impulse_rows": impulse_rows(p.impulse) + section_rows(p.sections),
    }


def layer_counts(turns_in_layer) -> str:
    """Turns per layer, runs of equal layers written once: ``66 (layers 1–28), 48 (layer 29)``."""
    runs = []
    for k, t in enumerate(turns_in_layer, start=1):
        if runs and runs[-1][0] == t:
            runs[-1][2] = k
        else:
            runs.append([t, k, k])
    if len(runs) == len(turns_in_layer) and len(runs) <= 6:
        return ", ".join(str(t) for t in turns_in_layer)
    return ", ".join(f"{t} (layer{'s' if a != b else ''} {a}{f'–{b}' if a != b else ''})" for t, a, b in runs)


def terminal_heading(p) -> str:
    """The heading of the terminal table: which terminals its values are read between.

    Separate windings are each a winding of their own: the values are one winding's,
    read between that winding's own pair of terminals.
    """
    if p.hookup.name == "separate" and len(p.strands) > 1:
        pairs = ", ".join(
            f"{sid} {'–'.join(e.terminal for e in p.connections.ends if e.strand == sid and e.terminal)}"
            for sid in p.strand_ids)
        return f"Each winding at its own terminals ({pairs}): the values are one winding's"
    return f"At the terminals ({' – '.join(label for label, _ in terminal_names(p))})"


def _widest_layer(cross_section: dict) -> int:
    layers = cross_section.get("layers") or []
    return max([len(l.get("slots") or [] if isinstance(l, dict) else l) for l in layers] + [0])


def is_dc(duty) -> bool:
    return not duty.frequency_Hz


def duty_rows(duty) -> list[tuple[str, str]]:
    """The duty as the order gave it: its waveform, and a pulse's rise time and repetition."""
    dc = is_dc(duty)
    pulse = duty.waveform == "pulse"
    form = " peak" if pulse else (" d.c." if dc else " rms")
    volts = duty.voltage_peak_V if pulse and duty.voltage_peak_V is not None else duty.voltage_V
    rows = [("Waveform", {"pulse": "pulse", "dc": "d.c."}.get(duty.waveform or "", "sine" if not dc else "d.c.")),
            ("Voltage", eng(volts, "V", trim=True) + form + (" per winding" if duty.between_windings_V is not None else ""))]
    if duty.between_windings_V is not None:
        rows.append(("Between windings", eng(duty.between_windings_V, "V", trim=True) + (" d.c." if dc else " rms")))
    if pulse:
        rows.append(("Rise time", eng(duty.rise_time_s, "s", sig=3, trim=True) if duty.rise_time_s else "—"))
        rows.append(("Repetition", eng(duty.repetition_rate_Hz, "Hz", sig=3, trim=True) + " (pulses per second)"
                     if duty.repetition_rate_Hz else "not given"))
        if duty.pulse_width_s:
            rows.append(("Pulse width", eng(duty.pulse_width_s, "s", sig=3, trim=True)))
        if duty.pulse_energy_J:
            rows.append(("Energy per pulse (left in the winding)", eng(duty.pulse_energy_J, "J", sig=3, trim=True)))
        if duty.frequency_Hz:
            rows.append(("Frequency", eng(duty.frequency_Hz, "Hz", trim=True)))
    else:
        rows.append(("Frequency", "d.c." if dc else eng(duty.frequency_Hz, "Hz", trim=True)))
    rows.append(("Current", current_words(duty)))
    rows.append(("Ambient", celsius(duty.ambient_C)))
    if duty.operating_temperature_C is not None and duty.operating_temperature_basis in (None, "given"):
        rows.append(("Operating temperature", celsius(duty.operating_temperature_C)))
    return rows


def current_words(duty) -> str:
    """The duty current as known: given, computed from the pulse train, or not known (never assumed)."""
    basis = getattr(duty, "current_basis", "given" if duty.current_given else None)
    if basis is None:
        return "not given (none assumed)"
    amps = eng(duty.current_A, "A", sig=3, trim=True) + ("" if is_dc(duty) and duty.waveform != "pulse" else " rms")
    return amps if basis == "given" else f"{amps}, from the {basis}"


def hot_resistance_label(p) -> str:
    """The hot resistance row's label: at which temperature, and why that one."""
    d = p.duty
    at = celsius(d.operating_temperature_C)
    why = {"given": "operating temperature", "heat balance": "running temperature (heat balance)",
           "ambient": "ambient: nothing heats the winding" if d.current_basis is None
           else "ambient: no steady running temperature"}.get(d.operating_temperature_basis or "given",
                                                             "operating temperature")
    return f"DC resistance at {at} ({why})"


def insulation_rows(ins) -> list[tuple[str, str]]:
    """The check's figures, in the order a reader follows the argument."""
    rows = []
    if ins is None:
        return rows

    def add(label, key, fmt):
        if getattr(ins, key) is not None:
            rows.append((label, fmt(getattr(ins, key))))

    add("Worst adjacent voltage", "worst_adjacent_Vpk", lambda v: volt(v) + " peak")
    add("Worst across enamel alone (touching)", "enamel_Vpk", lambda v: volt(v) + " peak")
    add("Enamel breakdown (minimum, grade)", "breakdown_V", volt)
    add("Derating applied", "derating", lambda v: f"{float(v):g}")
    add("Allowed across enamel alone", "allowed_Vpk", lambda v: volt(v) + " peak")
    add("Margin (allowed ÷ worst)", "margin", lambda v: f"{float(v):.2f}")
    add("Paschen minimum, air", "paschen_min_Vpk", lambda v: volt(v) + " peak")
    basis = {"estimated": "estimated", "measured": "measured"}.get(ins.pdiv_basis, "")
    if ins.pd_pair and ins.pd_pair.where:
        rows.append(("Pair nearest partial discharge", f"{ins.pd_pair.where}, {volt(ins.pd_pair.voltage_Vpk)} peak"))
    add(f"Its partial-discharge inception, 20 °C, thinnest film ({basis})" if basis else
        "Partial-discharge inception, 20 °C, thinnest film", "pdiv_Vpk", lambda v: volt(v) + " peak")
    add("Its inception, 20 °C, at the thickest film", "pdiv_max_film_Vpk", lambda v: volt(v) + " peak")
    add("Its partial-discharge inception, hot", "pdiv_hot_Vpk", lambda v: volt(v) + " peak")
    if ins.pdiv_density_factor is not None and ins.pdiv_hot_spot_C is not None:
        rows.append(("Hot: air density (physics), margin",
                     f"× {ins.pdiv_density_factor:.2f} at {ins.pdiv_hot_spot_C:.0f} °C, "
                     f"less {ins.pdiv_hot_margin or 0:.0%}"))
    add("Worst layer-to-layer voltage", "layer_Vpk", lambda v: volt(v) + " peak")
    add("Layer tape rating", "tape_rating_V", volt)
    return rows


def duty_physics_rows(p) -> list[tuple[str, str]]:
    """AC resistance, loss, temperatures and current density on the duty, as the design gives them.

    No temperature is printed that the design does not hold: without a current
    the rows say what is missing; a runaway is a runaway, not a temperature.
    """
    t, ac, th = p.terminal, p.ac_resistance, p.thermal
    rows = []
    if t.resistance_ac_ohm is not None and ac:
        f = ac.frequency_Hz
        rows.append((f"Resistance at the duty frequency ({hertz(f)}), at {celsius(ac.temperature_C)}" if f else
                     f"Resistance on the pulse duty, at {celsius(ac.temperature_C)} (d.c. value)"
                     if p.duty.waveform == "pulse" else f"Resistance on the d.c. duty, at {celsius(ac.temperature_C)}",
                     f"{ohm(t.resistance_ac_ohm)} (AC/DC {float(ac.ratio):.3f}; {ac.model})"))
    if t.loss_W is not None:
        rows.append(("Copper loss at the duty current", eng(t.loss_W, "W", sig=3)))
    if not th:
        return rows
    if th.hot_spot_C is not None:
        rows.append(("Temperature rise of the surface (still air)",
                     f"{kelvin(th.surface_rise_K)}, surface {celsius(th.surface_C)}"))
        rows.append(("Hot spot (estimate) / mean winding", f"{celsius(th.hot_spot_C)} / {celsius(th.mean_C)}"))
        rows.append(("Thermal check", f"{th.verdict.upper()}: {th.reason}"))
    elif th.converged is False:
        rows.append(("Thermal check", f"FAIL — RUNAWAY: {th.reason}"))
    else:
        rows.append(("Thermal check", f"NOT JUDGED: {th.reason}"))
    if th.current_density_A_per_mm2 is not None:
        lo, hi = th.current_density_range_A_per_mm2 or (None, None)
        rows.append(("Current density", f"{float(th.current_density_A_per_mm2):.2f} A/mm²"
                     + (f" (common practice {lo:g}–{hi:g} A/mm² for natural cooling)" if lo else "")))
    if th.hot_spot_C is not None or th.converged is False:
        rows.append(("Heat method", th.method))
    return rows


def impulse_rows(imp) -> list[tuple[str, str]]:
    """The fast edge's share on the first turns, when the duty has one."""
    if not imp:
        return []
    rows = [("Fast edge", f"{volt(imp.edge_Vpk)} peak"
             + (f", rise time {eng(imp.rise_time_s, 's', sig=3)}" if imp.rise_time_s else ""))]
    rows.append(("First turn under the edge", f"{volt(imp.first_turn_Vpk)} peak "
                 f"(even share {volt(imp.first_turn_uniform_Vpk)})"))
    rows.append(("Worst pair under the edge", f"{volt(imp.worst_pair_Vpk)} peak, {imp.worst_pair_where}"))
    if imp.alpha is not None:
        rows.append(("Distribution constant α = √(Cg/Cs)", f"{float(imp.alpha):.3g}"))
    rows.append(("Capacitance to ground / core / shield", farad(imp.ground_capacitance_F)
                 + ("" if imp.ground_capacitance_given else " (assumed: give duty.ground_capacitance)")))
    return rows


def section_rows(sec) -> list[tuple[str, str]]:
    """A sectioned winding's walls: what each must withstand, as the design judged it."""
    if not sec:
        return []
    rows = [("Sections", f"{sec.count} of {length(sec.width_m)}, walls {length(sec.wall_thickness_m)} "
                         f"{sec.wall_material} ({sec.wall_strength_V_per_m / 1e6:g} kV/mm"
                         + ("" if sec.wall_strength_given else ", assumed") + ")")]
    for w in sec.walls:
        rows.append((f"Wall {w.wall}", f"{w.verdict.upper()}: {w.reason} The crossover meets "
                     f"{volt(w.crossover_Vpk)} peak (sleeved)."))
    return rows


def pick_list(p) -> list[dict]:
    """Materials to draw from stores, one row each, with the quantity to pick."""
    wire, w, form, job, conn = p.wire, p.winding, p.form, p.job, p.connections
    qty = p.quantity
    picks = [{"item": "Form / core", "spec": form.material or form.kind or "—", "qty": f"{qty}"}]
    for s in p.strands:
        picks.append({
            "item": f"Wire, strand {s.id}",
            "spec": f"{wire.label}; {s.identification or 'no marking'}",
            "qty": f"{length(s.wire_length_with_scrap_m)} per unit (incl. {percent(w.scrap_allowance)} scrap), "
                   f"{mass(s.mass_kg)} per unit",
        })
    if w.layer_tape_m > 0 and p.layers > 1:
        rating = w.layer_tape_rating_V
        picks.append({"item": "Layer tape",
                      "spec": f"{w.layer_tape_material or 'insulating tape'}, {length(w.layer_tape_m)} thick"
                              + (f", rated {volt(rating)}" if rating else "") + ", full traverse width",
                      "qty": f"{sum(r.tape_after == 'layer-tape' for r in p.layer_plan)} wrap(s) per unit"})
    if form.margin_tape_m:
        picks.append({"item": "Margin tape",
                      "spec": f"{form.margin_tape_material or 'margin tape'}, {length(form.margin_tape_m)} wide, "
                              f"built to {length(p.fit.build_m)}",
                      "qty": "2 strips per unit (one at each end of the traverse)"})
    picks.append({"item": "Sleeving",
                  "spec": "over every joint and lead, rated for the duty and thermal class "
                          f"{thermal_class(wire.thermal_class_C)}",
                  "qty": f"{conn.sleeving_pieces_per_unit} piece(s) per unit: {len(conn.joints)} joint(s) + "
                         f"{len(conn.terminals)} lead(s)"})
    if p.sections:
        picks.append({"item": "Crossover sleeving",
                      "spec": f"through each wall's slot, rated at least {volt(p.sections.crossover_Vpk)} peak, "
                              f"thermal class {thermal_class(wire.thermal_class_C)}",
                      "qty": f"{p.sections.crossover_sleeves_per_unit} piece(s) per unit"})
    if w.lead_length_m:
        picks.append({"item": "Leads", "spec": f"{length(w.lead_length_m)} left at each of "
                                              f"{conn.wire_ends_per_unit} wire ends (included in wire length)",
                      "qty": f"{conn.wire_ends_per_unit} ends per unit"})
    picks.append({"item": "Unit labels", "spec": "serial numbers " + _serial_span(job), "qty": f"{qty}"})
    return picks


def _serial_span(job) -> str:
    units = job.units
    if not units:
        return "—"
    return units[0] if len(units) == 1 else f"{units[0]} … {units[-1]}"


# --- cautions -------------------------------------------------------------------------

def cautions(p) -> list[dict]:
    """Cautions the duty calls for; each ends by deferring to the governing rules."""
    duty, cau, hipot = p.duty, p.cautions, p.hipot
    out = []
    v = cau.highest_V if cau.highest_V is not None else duty.voltage_V
    if cau.above_elv:
        limit = cau.elv_limit_V or (ELV_DC_V if is_dc(duty) else ELV_AC_V)
        out.append({"level": "warning", "title": "Above extra-low voltage",
                    "text": f"The highest working voltage, {eng(v, 'V', trim=True)}"
                            f"{' peak (pulse)' if duty.waveform == 'pulse' else ' d.c.' if is_dc(duty) else ' rms'}, "
                            f"exceeds the extra-low-voltage limit of {eng(limit, 'V', trim=True)} "
                            f"(IEC 61140: 50 V a.c. rms, 120 V ripple-free d.c.). Treat the "
                            "finished coil and its leads as hazardous live when energised."})
    if cau.hipot:
        out.append({"level": "warning", "title": "Hipot test",
                    "text": f"Test voltage {volt(hipot.voltage_V)}: only trained, authorised "
                            "staff, in a marked test area, with an interlocked tester; one hand rule; "
                            "discharge and earth the winding after the test before touching it."})
    energy = cau.stored_energy_J
    if energy is None and p.energy:
        energy = p.energy.magnetic_J
    if energy is not None and energy >= STORED_ENERGY_CAUTION_J:
        out.append({"level": "warning", "title": "Stored magnetic energy",
                    "text": f"At the duty current the coil stores {joule(energy)} (½LI²). Opening "
                            "the circuit while current flows drives a high voltage across the "
                            "break: de-energise before disconnecting."})
    elif energy is not None:
        out.append({"level": "note", "title": "Stored magnetic energy",
                    "text": f"{joule(energy)} at the duty current (½LI²)."})
    if cau.hot_surface and cau.surface_C is None:
        out.append({"level": "warning", "title": "Hot surface",
                    "text": "On its duty the winding runs away thermally: no steady temperature below "
                            "1000 °C in still air. It will burn on contact and can destroy itself: the duty "
                            "must change before the coil is energised."})
    elif cau.hot_surface:
        out.append({"level": "warning", "title": "Hot surface",
                    "text": f"On its duty the winding's surface is computed to reach about "
                            f"{celsius(cau.surface_C)} (in still air): it burns on contact. Let it "
                            "cool before handling, and keep it guarded where people can touch it."})
    out.append({"level": "note", "title": "Ring-test fixtures",
                "text": "The capacitor of a ring (resonance) test fixture holds charge after the "
                        "test: discharge it through a resistor before handling (energy ½CV²)."})
    return out


# --- QC record -------------------------------------------------------------------------

_FORMAT = {"H": henry, "ohm": ohm, "Hz": hertz, "": lambda v: f"{v:.3g}"}


def qc_items(p, every: bool = False) -> list[dict]:
    """What the inspector measures on every unit, with what it should read: the design's QC plan, worded.

    Keys follow the sign-off's line keys.  ``judged`` items get pass/fail
    boxes; the others are only recorded (they feed the sign-off's diagnosis).
    The traveller prints the plan's ``printed`` lines; ``every`` gives the
    optional ones too (the bench page offers them).
    """
    items = []
    for ln in p.qc_plan.lines:
        if not (ln.printed or every):
            continue
        fmt = _FORMAT.get(ln.unit, lambda v: eng(v, ln.unit, sig=3, trim=True))
        predicted = fmt(ln.predicted) if ln.predicted is not None and ln.unit in _FORMAT else ""
        if ln.key == "terminal.inductance" and p.terminal.accept.inductance_basis == "target":
            predicted += f" ({p.terminal.accept.prediction_offset * 100:+.2f}{NBSP}% from target)"
        if ln.judged == "expect" and ln.expect == "open":
            predicted = "open"
        if ln.judged == "band":
            accept = band(ln.low, ln.high, fmt)
        elif ln.judged == "minimum":
            accept = f"≥ {eng(ln.low, OHM, sig=3, trim=True) if ln.unit == 'ohm' else fmt(ln.low)}"
        elif ln.judged == "expect":
            accept = ln.expect or ""
        else:
            accept = "record (°C)" if ln.unit == "degC" else "record"
        items.append({"key": ln.key, "label": ln.label, "predicted": predicted, "band": accept,
                      "judged": ln.judged != "record", "note": ln.note, "required": ln.required})
    return items


def unit_tables(units: list[str]) -> list[list[str]]:
    """Serial numbers in groups, one QC table per group."""
    units = [str(u) for u in units] or ["—"]
    return [units[i:i + UNITS_PER_QC_TABLE] for i in range(0, len(units), UNITS_PER_QC_TABLE)]




def natural_size(svg: str) -> Markup:
    """An inline drawing no larger than drawn (one unit a CSS pixel), so its text stays the size it was set."""
    import re

    width = re.search(r'width="([0-9.]+)"', svg)
    return Markup(svg.replace("<svg ", f'<svg style="max-width:{width.group(1)}px" ', 1) if width else svg)


def _pin_header(p):
    """The pin header drawing, when the order gives one."""
    if p.form.pin_header is None:
        return None
    from .pin_diagrams import pin_header_svg

    term = {t.end: t.label for t in p.connections.terminals}
    return svg_image(pin_header_svg(p.form.pin_header.model_dump(), [t.model_dump() for t in p.terminations], term))


def _ring_svgs(p):
    """A toroid's top view and section through the ring, or ``None`` for other forms."""
    if not p.ring:
        return None
    from .ring_diagrams import ring_section_svg, ring_top_view_svg

    ring, form = p.ring.model_dump(), p.form.model_dump()
    direction = p.winding.direction or "clockwise"
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
