"""What a transformer's traveller shows, arranged from its design.

Words and layout only: every number comes from the
:class:`~windsheet.design.transformer_model.TransformerDesign`.  The build order
is a section of its own; each winding section is described from its own coil
design (layers, turns per layer, leads); the barriers come with their class,
wraps, margins and test voltage; every terminal, taps included, is in one
termination table.
"""

from __future__ import annotations

from markupsafe import Markup

from windsheet.common.fmt import celsius, eng, length, mass
from windsheet.physics.heating import HOT_SURFACE_C

from .sheet_pdf import farad, header_part, henry, ohm, volt
from .traveller_sheet import DEFERRAL, qc_items, svg_image, unit_tables
from .transformer_diagrams import build_svg, transformer_svg
from .wiring_words import form_rows

SECTIONS = (
    "1 Specification",
    "2 Build order",
    "3 Predictions",
    "4 Materials pick list",
    "5 Procedure",
    "6 Wiring diagram and terminations",
    "7 Insulation between windings",
    "8 Cautions",
    "9 QC record",
)


def transformer_context(d, forced: bool = False) -> dict:
    """Everything the transformer template shows."""
    return {
        "p": d, "job": d.job, "forced": bool(forced), "header_part": header_part(d.job, forced),
        "state": d.state.state, "form_rows": form_rows(d.form), "winding_rows": winding_rows(d),
        "build_rows": build_rows(d), "build_svg": svg_image(build_svg(d)),
        "wiring_svg": Markup(transformer_svg(d)), "terminals": termination_rows(d),
        "prediction_rows": prediction_rows(d), "picks": pick_list(d), "steps": procedure_steps(d),
        "barrier_rows": barrier_rows(d), "cautions": cautions(d), "deferral": DEFERRAL,
        "qc_items": transformer_qc_items(d), "unit_tables": unit_tables(d.job.units),
    }


def winding_rows(d) -> list[dict]:
    out = []
    for w in d.windings:
        out.append({"name": w.name, "wire": w.wire.label + (", triple-insulated" if w.triple_insulated else ""),
                    "turns": w.turns, "taps": ", ".join(str(t) for t in w.taps) or "—",
                    "duty": f"{eng(w.duty.voltage_V, 'V', trim=True)} rms, {eng(w.duty.current_A, 'A', trim=True)}",
                    "source": {"mains": "mains", "selv": "SELV", "earthed": "earthed",
                               "floating": "floating"}[w.duty.source]
                    + (f", {eng(w.duty.to_earth_V, 'V', trim=True)} to earth"
                       if w.duty.to_earth_V != w.duty.voltage_V else ""),
                    "identification": w.identification or "—"})
    return out


def build_rows(d) -> list[dict]:
    """The build, innermost first, as the operator winds it."""
    out = []
    for k, b in enumerate(d.build, start=1):
        if b.kind == "section":
            s = d.sections[b.section]
            what = (f"{b.turns} turns in {s.layers} layer(s) ({', '.join(str(n) for n in s.winding.turns_in_layer)} "
                    "per layer)")
        elif b.kind == "barrier":
            bar = next(x for x in d.barriers if b.label.endswith(f"{x.between[0]}–{x.between[1]}")
                       or b.label.endswith(f"{x.between[1]}–{x.between[0]}"))
            what = (f"{bar.tape_wraps} wrap(s) of {bar.tape_material or 'tape'}, {length(bar.tape_thickness_m)} thick"
                    + (f", rated {volt(bar.tape_rating_V)}" if bar.tape_rating_V else "") + f": {bar.insulation} "
                    "insulation")
        else:
            scr = next(x for x in d.screens if b.label.endswith(f"{x.between[0]}–{x.between[1]}")
                       or b.label.endswith(f"{x.between[1]}–{x.between[0]}"))
            what = f"one wrap of {scr.material}, {length(scr.foil_m)}, lead to {scr.lead}"
        out.append({"n": k, "label": b.label, "what": what, "below": length(b.build_below_m), "build": length(b.build_m)})
    return out


def termination_rows(d) -> list[tuple[str, str, str]]:
    """``(terminal, winding end, what it is)`` for every end brought out."""
    out = []
    for t in d.connections.terminals:
        name, _, which = t.end.partition(".")
        words = ("start (dot)" if which == "start" else "finish" if which == "finish"
                 else f"tap at turn {which[3:]}")
        out.append((t.label, t.end, f"{name} {words}"))
    return out


def prediction_rows(d) -> list[tuple[str, str]]:
    rows = []
    for w in d.windings:
        rows.append((f"{w.name}: resistance at 20 °C / hot", f"{ohm(w.resistance_20C_ohm)} / {ohm(w.resistance_hot_ohm)}"))
        rows.append((f"{w.name}: inductance, the others open", henry(w.inductance_H)))
        if w is not d.windings[0]:
            rows.append((f"{w.name}: open-circuit voltage (ratio {w.turns}/{d.windings[0].turns})",
                         f"{eng(w.open_circuit_voltage_V, 'V', sig=4)}"))
    for r in d.regulation:
        rows.append((f"Regulation of {r.winding} at its rated current", f"{r.regulation * 100:.1f} %"))
    for lk in d.leakage:
        rows.append((f"Leakage: {d.windings[0].name} with {lk.shorted} shorted", henry(lk.inductance_H)))
    for c in d.capacitance:
        rows.append((f"Capacitance {c.between[0]}–{c.between[1]}", farad(c.capacitance_F)))
    rows.append(("Core flux density", d.core.reason))
    if d.thermal:
        rows.append(("Temperatures (still air)", f"surface {celsius(d.thermal.surface_C)}, hot spot "
                     f"{celsius(d.thermal.hot_spot_C)}; {d.thermal.verdict.upper()}: {d.thermal.reason}"))
        rows.append(("Copper loss, every winding at its duty", eng(d.thermal.loss_W, "W", sig=3)))
    return rows


def pick_list(d) -> list[dict]:
    """What the operator draws for the job, from the bill of materials' own rows (so the two agree)."""
    from windsheet.records.materials import job_form, job_margin_tape, job_sleeving, job_tapes, job_wires

    qty = d.quantity
    picks = [{"item": "Form / core", "spec": job_form(d)["spec"], "qty": f"{qty}"}]
    for w, wr in zip(d.windings, job_wires(d)):
        picks.append({"item": f"Wire, {w.name}", "spec": w.wire.label + (f"; {w.identification}" if w.identification
                                                                         else ""),
                      "qty": f"{length(wr['length_per_unit_m'])} per unit, {mass(wr['mass_kg'] / qty)} per unit"})
    for t in job_tapes(d):
        where = t["where"]
        picks.append({"item": f"Barrier tape, {where[8:]}" if where.startswith("barrier ") else f"Layer tape, {where[10:]}",
                      "spec": t["spec"],
                      "qty": f"{t['wraps'] // qty} wrap(s) per unit"})
    for m in job_margin_tape(d):
        picks.append({"item": "Margin tape", "spec": m["spec"] + ", built up with the layers",
                      "qty": f"{m['strips'] // qty} strip(s) per unit"})
    for s in d.screens:
        picks.append({"item": f"Screen foil, {s.between[0]}–{s.between[1]}", "spec": f"{s.material}, {length(s.foil_m)}",
                      "qty": "1 wrap per unit, with its lead"})
    sl = job_sleeving(d)
    picks.append({"item": "Sleeving", "spec": sl["spec"] + ", over every lead and tap",
                  "qty": f"{sl['pieces_per_unit']} piece(s) per unit"})
    picks.append({"item": "Unit labels", "spec": "serial numbers " + (", ".join(d.job.units[:2])
                                                                    + (" …" if len(d.job.units) > 2 else "")),
                  "qty": f"{qty}"})
    return picks


def _step(title, detail="", record=()):
    return {"title": title, "detail": detail, "record": list(record)}


def procedure_steps(d) -> list[dict]:
    """The build, step by step, from the bobbin out; then terminations, the core and the tests."""
    steps = [_step("Prepare and inspect the bobbin and core",
                   f"{d.form.material or d.form.kind}: no burrs, cracks or sharp edges; the flange slots clear.",
                   ["form OK"])]
    for w in d.windings:
        steps.append(_step(f"Check the wire for {w.name}", f"{w.wire.label}: expect overall Ø "
                           f"{length(w.wire.overall_diameter_m)}. Measure it.", [f"{w.name} Ø"]))
    for b in d.build:
        if b.kind == "section":
            s = d.sections[b.section]
            w = d.winding(b.winding)
            per_layer = ", ".join(str(n) for n in s.winding.turns_in_layer)
            margin = (f" between the margin tapes ({length(s.form.margin_tape_m)} each end, built up with the layers)"
                      if s.form.margin_tape_m else "")
            start = next((lead.route_text for lead in s.leads if lead.lead.endswith(".start")), None)
            taps = [t for t in w.taps if b.label == w.name or b.label.startswith(w.name)]
            tap_text = (" Bring out a tap at turn " + ", ".join(str(t) for t in taps) + " as a sleeved loop; tag it "
                        f"'{w.name} tap'." if taps else "")
            steps.append(_step(
                f"Wind {b.label}",
                f"{b.turns} turns of {w.wire.label} in {s.layers} layer(s) ({per_layer} per layer){margin}, all "
                f"windings the same way from the start end. Mark the start with a dot ({w.name}.start)."
                + (f" Start lead {start}." if start else "")
                + (f" Layer tape {length(s.winding.layer_tape_m)} between layers." if s.winding.layer_tape_m else "")
                + tap_text, ["turns counted"]))
        elif b.kind == "barrier":
            bar = next(x for x in d.barriers if set(x.between) == set(b.label.split(" ", 1)[1].split("–")))
            steps.append(_step(
                f"Barrier {bar.between[0]}–{bar.between[1]} ({bar.insulation})",
                f"{bar.tape_wraps} wrap(s) of {bar.tape_material}, {length(bar.tape_thickness_m)} thick, over the whole "
                "width and onto both margins, each wrap overlapping its start by at least 10 mm (common practice); "
                f"no wire visible. It carries {volt(bar.working_voltage_V)} working and is tested at "
                f"{volt(bar.test_voltage_V)}.", ["wraps counted"]))
        else:
            scr = next(x for x in d.screens if set(x.between) == set(b.label.split(" ", 1)[1].split("–")))
            steps.append(_step(
                f"Screen {scr.between[0]}–{scr.between[1]}",
                f"One wrap of {scr.material} ({length(scr.foil_m)}), its two ends overlapping with tape between "
                "them: the foil must not close on itself (a shorted turn). Solder the lead at the middle and bring "
                f"it out to {scr.lead}; tape over the foil.", ["screen lead"]))
    steps.append(_step("Outer wrap", "Two wraps of the barrier tape over the last winding, to the flanges, "
                       "overlap at least 10 mm (common practice).", ["wraps"]))
    steps.append(_step("Sleeve and terminate", "Sleeve every lead and tap; terminate as the termination table: "
                       + "; ".join(f"{t} = {end}" for t, end, _ in termination_rows(d)) + ".",
                       [t for t, _, _ in termination_rows(d)]))
    if d.form.kind == "bobbin":
        steps.append(_step("Assemble the core", "Stack the laminations (or fit the core halves) through the bobbin as "
                           "the core's data says, clamp them; the magnetising inductance holds only with the core "
                           "assembled.", ["core assembled"]))
    steps.append(_step("Continuity and resistance", "Each winding start to finish (and each tap): continuous; "
                       "between windings: open. Resistance of each winding, with the ambient temperature.",
                       ["ambient °C"]))
    steps.append(_step("Ratio and polarity", f"Apply a low a.c. voltage to {d.windings[0].name}; read each "
                       "winding's voltage (the ratio) and the phase of its dotted end against "
                       f"{d.windings[0].name}'s dot (in phase).", ["recorded"]))
    for bar in d.barriers:
        steps.append(_step(f"Hipot {bar.between[0]}–{bar.between[1]} (authorised tester only)",
                           f"{volt(bar.test_voltage_V)} a.c. for 60 s between the two windings, each shorted on "
                           "itself; see the cautions.", ["leakage", "result"]))
    steps.append(_step("Final measurements", "Magnetising and leakage inductance, insulation resistance; record "
                       "against each serial number in the QC record.", ["recorded"]))
    for i, s in enumerate(steps):
        s["number"] = i + 1
    return steps


def barrier_rows(d) -> list[dict]:
    out = []
    for b in d.barriers:
        out.append({"between": f"{b.between[0]}–{b.between[1]}", "class": b.insulation,
                    "working": volt(b.working_voltage_V), "impulse": volt(b.impulse_voltage_V),
                    "creepage": f"{length(b.creepage_m)} (needs {length(b.creepage_required_m)})",
                    "clearance": f"needs {length(b.clearance_required_m)}",
                    "tape": (f"{b.tape_wraps} × {length(b.tape_thickness_m)}"
                             + (f", {volt(b.tape_rating_V)}" if b.tape_rating_V else "")) if b.tape_wraps else "none",
                    "test": volt(b.test_voltage_V), "verdict": b.verdict, "reasons": b.reasons})
    return out


def cautions(d) -> list[dict]:
    out = []
    mains = [w.name for w in d.windings if w.duty.source == "mains"]
    if mains:
        out.append({"level": "warning", "title": "Mains voltage",
                    "text": f"{', '.join(mains)} connect(s) to the mains: treat the finished transformer and its "
                            "leads as hazardous live when energised."})
    if d.barriers:
        out.append({"level": "warning", "title": "Hipot test",
                    "text": "Test voltages up to " + volt(max(b.test_voltage_V for b in d.barriers))
                            + ": only trained, authorised staff, in a marked test area, with an interlocked tester; "
                              "discharge and earth every winding after the test before touching it."})
    if d.thermal and d.thermal.surface_C >= HOT_SURFACE_C:
        out.append({"level": "warning", "title": "Hot surface",
                    "text": f"On its duty the surface is computed to reach about {celsius(d.thermal.surface_C)} "
                            "(still air): it burns on contact; let it cool before handling."})
    for c in d.cautions:
        out.append({"level": "note", "title": "Product standard", "text": c})
    return out


def transformer_qc_items(d) -> list[dict]:
    """The QC plan worded for the record; ratio lines show their predicted ratio."""
    items = qc_items(d)
    by_key = {ln.key: ln for ln in d.qc_plan.lines}
    for it in items:
        ln = by_key[it["key"]]
        if ln.key.endswith(".ratio") and ln.predicted is not None:
            it["predicted"] = f"{ln.predicted:.5f}" + (f" ({ln.note})" if ln.note else "")
    return items


__all__ = ["SECTIONS", "transformer_context"]
