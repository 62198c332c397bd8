"""The procedure from a wound coil to a tested one: ends identified, core assembled, measured, joined, terminated.

Every reading that is checked against a prediction comes after the step that makes the
prediction true: a bobbin's core is assembled and gapped before any inductance is read.
Words only; every number comes from the design.
"""

from __future__ import annotations

from windsheet.common.fmt import length
from .procedure_words import step, strand_list
from .sheet_pdf import henry, volt
from .wiring_words import pin_rows, route_words, terminal_names


def identify_step(p) -> dict:
    ids = p.strand_ids
    if len(ids) == 1:
        return step("Continuity check", f"{ids[0]} start to {ids[0]} finish must be continuous.", ["✓"])
    return step("Identify every end by continuity, before any joint",
                "Each strand's start to its own finish: continuous. Every pair of strands: open "
                "(no continuity). Correct any tag that does not agree.", [f"{s} ✓" for s in ids])


def core_assembly_step(p) -> dict:
    """Fit the core to the wound bobbin, as the order names it; its gap sets the inductance every reading checks."""
    band = p.qc_plan.line("terminal.inductance")
    lo, hi = (band.low, band.high) if band else (None, None)
    form = p.form
    gap, spacer, assembly = form.core_gap_m, form.core_gap_material, form.core_assembly
    if assembly == "interleaved":
        how = ("E and I laminations interleaved: stack them alternately, E from one side then the other, each I "
               "closing the E beside it, no gap; press the stack tight and clamp it.")
    elif assembly == "butt-gapped":
        how = (f"E/I butt-gapped: all the E laminations from one side, all the I from the other, with a "
               f"{length(gap, fine=True)} spacer of {spacer or 'insulating film'} in the butt joint across every "
               "leg; clamp the stack with the spacer in place.")
    elif assembly == "ground-centre-leg":
        how = (f"Core halves with the gap ground in the centre leg ({length(gap, fine=True)}): fit the halves "
               "through the bobbin, outer legs touching, no spacer; clamp or bond them.")
    elif gap == 0:
        how = ("Fit the ungapped core halves through the bobbin, mating faces clean and touching; clamp or bond "
               "them.")
    elif gap:
        how = (f"Fit the core halves with a gap of {length(gap, fine=True)}"
               + (f" ({spacer} spacer" if spacer else " (spacer")
               + " in each outer leg or ground centre leg, per the core's data); clamp or bond them.")
    else:
        how = ("Fit the core halves through the bobbin and clamp them; if the core is gapped, adjust the gap "
               f"(spacers) until the inductance at the terminals reads {henry(lo)} – {henry(hi)} at the test "
               "frequency, then clamp or bond.")
    return step("Assemble and gap the core", how + " Every inductance the sheet predicts holds only with the "
                "core as assembled here: nothing is measured before this step.", ["core clamped"])


def measurement_steps(p) -> list[dict]:
    """Each strand alone, then each pair linked before the joint: against the prediction, with the core on."""
    ids = p.strand_ids
    n = len(ids)
    out = [step("Measure each strand alone",
                f"Inductance and DC resistance of strand{'s' if n > 1 else ''} {strand_list(ids)}, with the ambient "
                "temperature; record in the QC record.", ["ambient"])]
    if p.connections.joints and n >= 2:
        pairs = list(zip(ids, ids[1:]))
        expect = ""
        if n == 2:
            got = [f"{name} ≈ {henry(p.alternatives[name].inductance_H)}"
                   for name in ("series-aiding", "series-opposing") if name in p.alternatives]
            expect = f" Expect {'; '.join(got)}." if got else ""
        how = "; ".join(f"{a} finish to {b} start (aiding), then {a} finish to {b} finish (opposing)"
                        for a, b in pairs)
        out.append(step(
            "Measure series-aiding and series-opposing before joining",
            f"Link temporarily and measure at the test frequency, pair by pair: {how}. Remove the links.{expect} "
            "Aiding must read well above opposing; if not, a start and finish are swapped in the tags.",
            [f"{a}+{b} aiding / opposing" for a, b in pairs]))
    return out


def joint_steps(p) -> list[dict]:
    """Each joint, on its pin where the order names one; its lead's sleeve slides over it."""
    out = []
    routes = {lead.lead: lead for lead in p.leads}
    pinned = {e.name for e in p.connections.ends if e.pin is not None}
    sleeved = {e.name for e in p.connections.ends if e.sleeve_when_laid}
    for joint in p.connections.joints:
        j = joint.ends
        via = [route_words(p, e) for e in j if e in routes and e.endswith(".finish")
               and routes[e].joint and ".start" in routes[e].joint]
        on = joint.pins
        cover = ("slide the sleeve already on its lead over the joint" if any(e in sleeved for e in j)
                 else "sleeve the joint")
        how = (f"Per the wiring diagram: strip the enamel, twist, solder; {cover}." if not on else
               f"Made on pin {' and pin '.join(on)}: strip each end, wrap it on its pin and solder it there when "
               "terminating" + (" (the board joins these pins; link them on the bench, see Terminate)"
                                if len(on) > 1 else "") + "."
               + ("" if all(e in pinned for e in j) else " Ends without a pin are twisted and soldered to the "
                  "others first."))
        out.append(step(f"Make the joint {' + '.join(j)}", how + (f" Joint lead {via[0]}." if via else ""),
                        ["joined"]))
    return out


def terminate_step(p) -> dict:
    """Sleeve the leads and bring them to the terminals, or to the pins the order names: the termination table."""
    sleeve = ", ".join(f"{t} = {end}" for t, end in terminal_names(p))
    rows = pin_rows(p)
    table = " Every end is in the termination table (section 5)."
    if not rows:
        return step("Sleeve and terminate", f"Sleeve every lead not yet sleeved; terminate and mark the terminals: "
                    f"{sleeve}.{table}", ["marked"])
    links = [(link.pins, link.ends) for link in p.connections.linked_pins]
    link_text = "".join(
        f" Pins {' and '.join(pins)} carry one node ({' + '.join(ends)}) that only the board joins: "
        "link them with a short wire for every bench test, and remove the link before dispatch."
        for pins, ends in links)
    return step("Terminate on the pins",
                "Sleeve every lead up to its pin; wrap each end on its pin and solder it: "
                + "; ".join(f"{pin} = {ends}" for pin, ends in rows)
                + ". Check each pin against the wiring diagram before soldering; a lead on the wrong pin "
                "reads as a wiring fault at sign-off." + link_text + table,
                [pin for pin, _ in rows] + [f"link {'+'.join(pins)}" for pins, _ in links])


def test_steps(p) -> list[dict]:
    """The hipot (winding to core, with the core on) and the final readings at the terminals."""
    out = []
    hipot = p.qc_plan.line("hipot")
    if hipot is not None:
        dur = hipot.duration_s
        where = "between the winding and the core/form" + (
            " and between the separate windings" if p.hookup.name == "separate" else "")
        out.append(step("Hipot test (authorised tester only)",
                        f"{volt(hipot.test_voltage_V)}{f' for {float(dur):g} s' if dur else ''} {where}. "
                        f"Basis: {p.hipot.basis or '—'}. See the cautions.", ["leakage", "result"]))
    out.append(step("Final measurements",
                    "Terminal inductance and DC resistance at the terminals "
                    f"{' – '.join(t for t, _ in terminal_names(p))}; insulation resistance; record against each "
                    "serial number in the QC record.", ["recorded"]))
    return out
