"""From a validated order to the one :class:`~windsheet.design.model.Design` every consumer reads.

This module only composes the physics modules; it holds no model of its
own.  The result is the typed design in SI units (see README, "The
prediction"), with its derived facts (:mod:`windsheet.design.derived`).
Rendering and sign-off read it and never recompute physics.
"""

from __future__ import annotations

import datetime as _dt
import math

import numpy as np

from windsheet.physics import coil_formulas as cf
from windsheet.physics import layout as lay
from windsheet.design import sizing
from windsheet.physics import stress
from windsheet.common.errors import InputError
from windsheet.physics.fast_front import DEFAULT_GROUND_CAPACITANCE_F
from windsheet.physics.flux_linkage import strand_sums, turn_linkage_matrix
from windsheet.physics import heating
from windsheet.physics.insulation import hipot_voltage
from windsheet.physics.leads import lead_routes
from .section_check import check_sections, with_sections
from .remedies import advice, find_remedies
from windsheet.physics.hookup import STRAND_IDS
from windsheet.physics.network import alternative_hookups, separate_windings, solve_network
from windsheet.order.document import BobbinForm, CylinderForm, Order, ToroidForm
from windsheet.order.wire_choice import resolve_wire
from .bench_tests import bench_tests
from .derived import complete
from .duty_heating import DutyCurrent, ac_ratio, thermal_section, winding_heat
from .construct import as_dict, construct
from .model import SCHEMA, Design, DesignCore
from .target_turns import solve_turns
from windsheet.physics.wire import copper_mass, dc_resistance


HOOKUP_TEXT = {
    "single": "one strand between the two terminals",
    "series-aiding": "strands in series, each finish joined to the next start: fields add",
    "series-opposing": "two strands in series with both finishes joined (hairpin): fields cancel, "
                       "non-inductive",
    "parallel": "strands in parallel: all starts joined, all finishes joined",
    "separate": "each strand a winding of its own, brought out on its own leads",
    "custom": "joins and terminals as listed in the order",
}


def _hz(x):
    for scale, unit in ((1e9, "GHz"), (1e6, "MHz"), (1e3, "kHz")):
        if x >= scale:
            return f"{x / scale:.3g} {unit}"
    return f"{x:.3g} Hz"


def _capacitance_note(capacitance, srf, turns: int) -> str:
    """Why no self-capacitance or self-resonance is predicted, in words; empty when both are."""
    if capacitance and srf:
        return ""
    if turns <= 1:
        return ("one turn per winding: no turn lies beside another of its own winding, so there is no "
                "turn-to-turn capacitance; the leads' stray capacitance (not modelled) sets its self-resonance, "
                "which is not predicted")
    return ("no capacitance found between the winding's own turns; its self-resonance is not predicted")


def _refuse_above_self_resonance(duty, srf):
    """At or above its self-resonance a winding is capacitive: not the inductor ordered."""
    if duty.frequency > 0 and srf is not None and duty.frequency >= srf:
        raise InputError("duty.frequency", f"{_hz(duty.frequency)} is at or above the winding's predicted "
                         f"self-resonance {_hz(srf)}: there the coil is not an inductor; lower the frequency, "
                         "or use fewer turns or a construction with less capacitance")


def _lead_routes(order: Order):
    r = order.doc.winding.leads
    return {k: v for k, v in (("start", r.start), ("finish", r.finish), ("joint", r.joint)) if v}


def _end(name: str):
    sid, which = name.split(".")
    return STRAND_IDS.index(sid), 0 if which == "start" else 1


def _edge(order: Order, net, turns: int):
    """The fast edge a pulse or ``rise_time`` duty puts on the terminals, for stress.edge_stress."""
    duty = order.doc.duty
    if duty.waveform != "pulse" and duty.rise_time is None:
        return None
    ends = np.asarray(net.end_potential, dtype=complex)
    if order.hookup_name == "separate":
        # Each winding on its own circuit takes the same edge (as the network drives them in phase).
        held = {(s, w): float(w) for s in range(ends.shape[0]) for w in (0, 1)}
    else:
        held = {_end(t): float(np.real(ends[_end(t)])) for t in net.terminals}
    ties = [(_end(a), _end(b)) for group in net.joins for a, b in zip(group[:-1], group[1:])]
    span = float(np.max(np.abs(ends[:, 1] - ends[:, 0]))) if ends.size else 1.0
    given = duty.ground_capacitance is not None
    return {"held": held, "ties": ties, "rise_time_s": duty.rise_time,
            "ground_F": duty.ground_capacitance if given else DEFAULT_GROUND_CAPACITANCE_F,
            "ground_given": given, "series_turns": int(round(turns / span)) if span > 0 else turns}


def _pairs(L, R, frequency):
    """What each pair of strands reads linked series-aiding and series-opposing before the joint."""
    out = {}
    S = len(R)
    for i in range(S):
        for j in range(i + 1, S):
            sub_L, sub_R = L[np.ix_([i, j], [i, j])], R[[i, j]]
            aid = solve_network(sub_L, sub_R, [["A.finish", "B.start"]], ["A.start", "B.finish"], frequency)
            opp = solve_network(sub_L, sub_R, [["A.finish", "B.finish"]], ["A.start", "B.start"], frequency)
            out[f"{STRAND_IDS[i]}-{STRAND_IDS[j]}"] = {
                "series_aiding_H": aid.inductance, "series_opposing_H": opp.inductance,
                "mutual_H": float(L[i, j]), "coupling": float(L[i, j] / math.sqrt(L[i, i] * L[j, j]))}
    return out


def _cross_section(layout, keep=6, potential=None, worst=(None, None)):
    """Slots of each layer for the sketch: the first and last few, and the worst pair's.

    With ``potential`` (each turn's peak potential from terminal 1 [V]), each
    slot carries ``potential_Vpk``; the turns of the worst neighbouring pair
    carry ``worst: true``.
    """
    out = []
    worst_turns = {int(t) for t in worst if t is not None}
    full = max(layout.turns_in_layer)
    # A sectioned winding: its first section drawn; the others are wound the same beside it.
    drawn = layout.layers_per_section[0] if layout.sections > 1 else layout.layers
    for lay_i in range(drawn):
        sel = np.flatnonzero(layout.layer == lay_i)
        slots = sorted(set(layout.slot[sel].tolist()))
        # A partial layer shows fewer slots after the ellipsis, in proportion to its turns.
        tail = keep if len(slots) >= full else max(1, round(keep * len(slots) / full) - 2)
        shown = slots if len(slots) <= keep + tail else slots[:keep] + slots[-tail:]
        extra = {int(layout.slot[t]) for t in worst_turns if layout.layer[t] == lay_i}
        shown = sorted(set(shown) | extra)
        rows = []
        for k in shown:
            for t in sel[layout.slot[sel] == k]:
                row = {"slot": int(k), "strand": STRAND_IDS[int(layout.strand[t])]}
                if potential is not None:
                    row["potential_Vpk"] = float(potential[t])
                if int(t) in worst_turns:
                    row["worst"] = True
                rows.append(row)
        out.append({"layer": lay_i + 1, "turns": len(slots), "slots": rows,
                    "elided": len(shown) < len(slots)})
    return {"layers": out, "tape_between_layers": layout.tape > 0 and layout.layers > 1,
            "kind": layout.kind, "sections": layout.sections,
            "potential_max_Vpk": float(np.max(potential)) if potential is not None and len(potential) else None}


def _outer_wrap(wrap):
    if wrap is None:
        return None
    ov = wrap.overlap
    return {"material": wrap.material, "thickness_m": wrap.thickness, "wraps": wrap.wraps,
            "overlap_m": ov.length if ov else None, "overlap_fraction": ov.fraction if ov else None}


def _sector_angles(sectors, most):
    """Per layer, each winding's turn angles in its own sector (degrees from the start mark)."""
    per_layer = {}
    for s, (a0, one) in enumerate(sectors):
        deg = np.degrees(one.theta)
        for lay_i in range(one.layers):
            sel = np.flatnonzero(one.layer == lay_i)
            sel = sel[np.argsort(one.index[sel])]
            pick = sel if sel.size <= most else sel[np.linspace(0, sel.size - 1, most).round().astype(int)]
            per_layer.setdefault(lay_i, {})[STRAND_IDS[s]] = [round(float(a0 + a), 2) for a in deg[pick]]
    return per_layer


def _ring(layout, sectors=None, most=90):
    """A toroid's turns round the ring, for the top view: each layer's turn angles.

    Angles are degrees from the start in the winding direction, one list per
    layer and strand (at most ``most`` a layer, evenly picked, for the
    drawing); ``gap_deg`` is the bare angle left between the first and the
    last turn's wire edges on the inside of the hole.
    """
    if layout.theta is None:
        return None
    deg = np.degrees(layout.theta)
    wire_deg = math.degrees(layout.overall_diameter / layout.ring_radius)
    layers = []
    for lay_i in range(layout.layers):
        per_strand = {}
        for s in range(layout.strands):
            sel = np.flatnonzero((layout.layer == lay_i) & (layout.strand == s))
            sel = sel[np.argsort(layout.index[sel])]
            pick = sel if sel.size <= most else sel[np.linspace(0, sel.size - 1, most).round().astype(int)]
            per_strand[STRAND_IDS[s]] = [round(float(a), 2) for a in deg[pick]]
        sel = layout.layer == lay_i
        rho = layout.ring_radius - float(layout.r[sel][0])
        a_turns = np.sort(deg[sel & (layout.strand == 0)])
        layers.append({"layer": lay_i + 1, "turns": int(layout.turns_in_layer[lay_i]),
                       "pitch_deg": float(np.diff(a_turns).mean()) if a_turns.size > 1 else 0.0,
                       "radius_m": rho, "build_m": layout.ring_radius - rho + layout.overall_diameter / 2,
                       "from_deg": float(deg[sel].min()), "to_deg": float(deg[sel].max()),
                       "angles_deg": per_strand})
    if sectors:
        # Each winding in its own sector: its turns' angles, and the bare angle left between sectors.
        by_layer = _sector_angles(sectors, most)
        for row in layers:
            angles = by_layer.get(row["layer"] - 1, {})
            row["angles_deg"] = angles
            flat = [a for v in angles.values() for a in v]
            if flat:
                row["from_deg"], row["to_deg"] = min(flat), max(flat)
        spans = [{"strand": STRAND_IDS[s], "from_deg": float(a0),
                  "to_deg": float(a0 + math.degrees(one.theta.max()) + wire_deg / 2)}
                 for s, (a0, one) in enumerate(sectors)]
        gaps = [(spans[(k + 1) % len(spans)]["from_deg"] + (360.0 if k + 1 == len(spans) else 0.0))
                - spans[k]["to_deg"] for k in range(len(spans))]
        return {"spread": "sectors", "ring_radius_m": layout.ring_radius, "wire_diameter_m": layout.overall_diameter,
                "span_deg": spans[-1]["to_deg"] - spans[0]["from_deg"], "gap_deg": float(min(gaps)),
                "sectors": spans, "layers": layers}
    return {"spread": layout.spread, "ring_radius_m": layout.ring_radius,
            "wire_diameter_m": layout.overall_diameter,
            "span_deg": float(deg.max() - deg.min() + wire_deg),
            "gap_deg": float(360.0 - (deg.max() - deg.min()) - wire_deg), "layers": layers}


def _air_temperature(temps, steady: bool, operating_C, class_C: float) -> float:
    """The temperature of the air between the turns, for the hot inception voltage. [°C]

    The heat balance's hot spot (or the order's running temperature, if higher); without a
    steady balance (no current to heat it, or a runaway) the running temperature the order
    states, else the class temperature, the safe side of an unknown.  Never above the class:
    beyond it the thermal verdict fails the job anyway.
    """
    if steady:
        air = max(temps["hot_spot_C"], operating_C or -273.15)
    elif temps is None and operating_C is not None:
        air = operating_C
    else:
        air = class_C
    return min(air, class_C)


def build_design(order: Order, today: _dt.date | None = None, remedies: bool = True) -> Design:
    """Size an order: the complete, typed design, SI units.

    With ``remedies``, an insulation verdict short of a pass lists the order
    changes that improve it, each found by sizing the changed order again
    (:mod:`windsheet.design.remedies`).
    """
    doc = order.doc
    wire = resolve_wire(order)
    warnings = list(wire.warnings)
    target = None
    if doc.winding.target_inductance is not None:
        turns, target = solve_turns(order, wire)
    else:
        turns = doc.winding.turns
    layout = sizing.layout_at(order, wire, turns)
    warnings.extend(layout.notes)
    sectors = None
    if doc.winding.arrangement.kind == "sectors":
        sectors = sizing.sector_layouts(order, wire, turns)
        warnings = [w for w in warnings if w not in layout.notes] + [
            f"each winding spread evenly over its own sector, {math.degrees(doc.form.gap):.0f}° left free "
            "between sectors (common practice)"]
        warnings.append("windings in sectors: the insulation check takes them side by side in every turn, "
                        "the worst case; in their sectors they meet only across the gaps between sectors")
    S = layout.strands
    linkage = None
    if doc.duty.frequency > 0 and sizing.core_al(order) is None:
        # An a.c. duty needs every turn's flux linkage for its voltage map; the strand matrix
        # is the same double sum gathered by strand, so the engine runs once.
        linkage = turn_linkage_matrix(layout)
        L = strand_sums(layout, linkage)
    else:
        L = sizing.inductance_matrix(order, wire, layout)
    length = sizing.strand_lengths(order, layout)
    duty = doc.duty
    R20 = dc_resistance(length, wire.copper_diameter, conductor=wire.conductor)
    net = sizing.network_at(order, L, R20, doc.test.frequency)
    current = DutyCurrent(order, wire, length, L, net.inductance)
    temps = winding_heat(order, wire, layout, length, L, current)
    steady = temps is not None and temps["converged"]
    if duty.operating_temperature is not None:
        t_op, t_basis = duty.operating_temperature, "given"
        if steady and duty.operating_temperature < temps["mean_C"] - 0.5:
            warnings.append(f"duty.operating_temperature {duty.operating_temperature:.0f} °C is below the "
                            f"{temps['mean_C']:.0f} °C the winding is computed to run at "
                            f"(hot spot {temps['hot_spot_C']:.0f} °C): hot resistance and losses may read low.")
    elif steady:
        # The order gives no running temperature: the heat balance's mean winding temperature is used.
        t_op, t_basis = temps["mean_C"], "heat balance"
    else:
        # Nothing heats the winding (no current), or it has no steady temperature: the resistance
        # at the ambient is the one stated, and the sheet says why.
        t_op, t_basis = duty.ambient, "ambient"
    Rhot = dc_resistance(length, wire.copper_diameter, t_op, conductor=wire.conductor)
    duty_net = sizing.network_at(order, L, Rhot, duty.frequency)
    tol = doc.tolerances
    diag = np.sqrt(np.diag(L))
    coupling = L / np.outer(diag, diag)

    current_sheet = None
    rosa = None
    if isinstance(doc.form, CylinderForm) and layout.layers == 1:
        r0 = float(layout.r[0])
        current_sheet = float(cf.current_sheet_inductance(r0, turns * layout.pitch, turns))
        rosa = float(cf.rosa_corrected_inductance(r0, layout.pitch, wire.copper_diameter, turns))

    # Terminal current at duty: only what the order gives (or its pulse train), never assumed.
    i_term = current.terminal(t_op)
    has_current = i_term is not None
    strand_i = np.abs(duty_net.strand_current) * (i_term or 0.0)
    ac = {**ac_ratio(order, wire, layout, t_op), "frequency_Hz": duty.frequency, "temperature_C": t_op}
    Rac = Rhot * ac["ratio"]
    ac_terminal = sizing.network_at(order, L, Rac, duty.frequency).resistance if ac["ratio"] != 1.0 else duty_net.resistance
    strand_loss = strand_i ** 2 * Rac
    thermal = thermal_section(temps, wire, strand_i, duty.operating_temperature, current.missing)
    if thermal["verdict"] in ("fail", "marginal"):
        warnings.append(thermal["reason"])

    # Each turn's share of its strand's voltage: its own resistance at the duty
    # temperature and the EMF of its own flux linkage (uniform per turn on a core).
    ohm_per_m = float(dc_resistance(1.0, wire.copper_diameter, t_op))
    cored = sizing.core_al(order) is not None
    drops = stress.winding_drops(layout, duty_net, duty.frequency, ohm_per_m, L, cored,
                                 doc.winding.lead_length, linkage)
    leads = lead_routes(layout, net.joins, net.terminals, _lead_routes(order), order.hookup_name)
    # The terminal capacitance is the winding's own: taken from the low-frequency (0 Hz) map.
    ohm_per_m20 = float(dc_resistance(1.0, wire.copper_diameter, conductor=wire.conductor))
    cap_net = sizing.network_at(order, L, R20, 0.0)
    cap_drops = stress.winding_drops(layout, cap_net, 0.0, ohm_per_m20, L, cored, 0.0, None)
    stress_args = dict(inductance_H=net.inductance, eps_r=doc.wire.permittivity,
                       tape_rating_V=order.tape_rating, derating=doc.insulation.derating,
                       pdiv_Vpk=doc.insulation.pdiv, pdiv_hot_margin=doc.insulation.hot_pdiv_derating,
                       leads=leads, impregnation=doc.winding.impregnation, lead_length=doc.winding.lead_length,
                       film_min=None if wire.min_increase is None else wire.min_increase / 2.0,
                       hot_spot_C=_air_temperature(temps, steady, duty.operating_temperature,
                                                   float(wire.thermal_class)))
    st = stress.assess(layout, duty_net, duty.voltage, duty.frequency, wire.breakdown, drops=drops,
                       edge=_edge(order, duty_net, turns), cap_network=cap_net, cap_drops=cap_drops,
                       **stress_args)
    if order.hookup_name == "separate" and S > 1:
        # Capacitance and resonance belong to one winding on its own; the
        # offset between windings only sets the insulation stress.
        own_net = separate_windings(L, Rhot)
        own_cap = separate_windings(L, R20)
        own = stress.assess(layout, own_net, duty.voltage, duty.frequency, wire.breakdown,
                            drops=stress.winding_drops(layout, own_net, duty.frequency, ohm_per_m, L,
                                                       cored, doc.winding.lead_length, linkage),
                            cap_network=own_cap, cap_drops=stress.winding_drops(
                                layout, own_cap, 0.0, ohm_per_m20, L, cored, 0.0, None),
                            **stress_args)
        st = {**st, "capacitance": {**own["capacitance"],
                                    "strand_to_strand_F": st["capacitance"]["strand_to_strand_F"]},
              "self_resonance_Hz": own["self_resonance_Hz"],
              # Resonance warnings must come from the same winding as the resonance reported.
              "warnings": [w for w in st["warnings"] if "self-resonance" not in w]
              + [w for w in own["warnings"] if "self-resonance" in w]}
    _refuse_above_self_resonance(duty, st["self_resonance_Hz"])
    warnings.extend(st.get("warnings", []))
    walls = None
    if layout.sections > 1:
        f0 = doc.form
        walls = check_sections(layout, st["turn_potential_Vpk"], doc.winding.section_wall,
                               doc.insulation.derating, duty.frequency > 0 and duty.waveform != "pulse",
                               f0.height if isinstance(f0, BobbinForm) else getattr(f0, "max_build", None),
                               potted=doc.winding.impregnation == "potted",
                               edge_potential=st.get("edge_turn_potential_Vpk"))
        st = {**st, "insulation": with_sections(st["insulation"], walls)}
    bench = bench_tests(L, R20, layout, wire, order.hookup_name, order.joins, order.terminals,
                        doc.test.frequency, st["capacitance"]["terminal_F"], doc.test.ring_capacitor,
                        doc.tolerances.inductance, doc.tolerances.resistance, sizing.core_al(order))

    ident = doc.winding.identification or {}
    strands = []
    for s in range(S):
        sid = STRAND_IDS[s]
        strands.append({
            "id": sid, "turns": int(turns),
            "identification": ident.get(sid, _default_ident(sid, S)),
            "wire_length_m": float(length[s]),
            "wire_length_with_scrap_m": float(length[s] * (1 + doc.winding.scrap_allowance)),
            "mass_kg": float(copper_mass(length[s] * (1 + doc.winding.scrap_allowance), wire.copper_diameter,
                                         conductor=wire.conductor)),
            "resistance_20C_ohm": float(R20[s]),
            "resistance_hot_ohm": float(Rhot[s]),
            "resistance_ac_ohm": float(Rac[s]),
            "loss_W": float(strand_loss[s]) if has_current else None,
            "current_density_A_per_mm2": float(heating.current_density(strand_i[s], wire.copper_diameter))
            if has_current else None,
            "inductance_H": float(L[s, s]),
            "current_A": float(strand_i[s]) if has_current else None,
            "resistance_ac_test_ohm": bench["strand_resistance_ac_ohm"][s],
            "q_test": bench["strand_q"][s],
        })
    f = doc.form
    job = doc.job
    energy = 0.5 * net.inductance * i_term ** 2 if has_current else None
    # A pulse is not ripple-free d.c.: its peak is held to the stricter a.c. figure.
    elv = 120.0 if duty.frequency == 0 and duty.waveform != "pulse" else 50.0
    highest_V = max(duty.voltage, duty.between_windings or 0.0)
    out = {
        "schema": SCHEMA,
        "job": {"number": job.number, "part": job.part, "customer": job.customer, "quantity": job.quantity,
                "revision": job.revision, "issued_by": job.issued_by,
                "issue_date": (job.issue_date or today or _dt.date.today()).isoformat(),
                "units": order.units, "notes": job.notes},
        "order_hash": order.sha256,
        "form": {"kind": f.kind, "material": f.material,
                 "diameter_m": getattr(f, "diameter", None), "traverse_m": getattr(f, "traverse", None),
                 "max_build_m": getattr(f, "max_build", None),
                 "inner_diameter_m": getattr(f, "inner_diameter", None),
                 "outer_diameter_m": getattr(f, "outer_diameter", None),
                 "height_m": getattr(f, "height", None), "width_m": getattr(f, "width", None),
                 "mean_turn_length_m": getattr(f, "mean_turn_length", None),
                 "al_H": sizing.core_al(order), "permeability": getattr(f, "permeability", None),
                 "gap_deg": math.degrees(f.gap) if isinstance(f, ToroidForm) else None,
                 "core_gap_m": f.gap.thickness if isinstance(f, BobbinForm) and f.gap is not None else None,
                 "core_gap_material": f.gap.material if isinstance(f, BobbinForm) and f.gap is not None else None,
                 "core_assembly": f.assembly if isinstance(f, BobbinForm) else None,
                 "margin_tape_thickness_m": order.margin_thickness if order.margin else None,
                 "pin_header": {"end": f.pin_header.end, "pitch_m": f.pin_header.pitch, "pins": f.pin_header.pins}
                 if getattr(f, "pin_header", None) else None,
                 "margin_tape_m": order.margin or None,
                 "margin_tape_material": order.margin_material if order.margin else None,
                 "conductive": f.conductive if f.conductive is not None else not isinstance(f, CylinderForm)},
        "wire": {"label": wire.label, "standard": wire.standard, "copper_diameter_m": wire.copper_diameter,
                 "overall_diameter_m": wire.overall_diameter, "grade": wire.grade,
                 "thermal_class_C": wire.thermal_class, "breakdown_V": wire.breakdown, "source": wire.source,
                 "conductor": wire.conductor, "min_overall_diameter_m": wire.min_overall_diameter,
                 "breakdown_test": wire.breakdown_test, "sources": list(wire.sources)},
        "winding": {"strands": S, "turns_per_strand": int(turns), "layers": layout.layers,
                    "layer_style": layout.layer_style, "strand_spacing": doc.winding.strand_spacing,
                    "impregnation": doc.winding.impregnation,
                    "turns_in_layer": list(layout.turns_in_layer), "pitch_m": layout.pitch,
                    "layers_per_section": list(layout.layers_per_section) if layout.sections > 1 else [],
                    "layer_tape_m": order.tape, "layer_tape_material": order.tape_material if order.tape else None,
                    "layer_tape_rating_V": order.tape_rating,
                    "lead_length_m": doc.winding.lead_length, "scrap_allowance": doc.winding.scrap_allowance,
                    "close_wound": doc.winding.pitch is None, "target": target,
                    "direction": doc.winding.direction, "spread": layout.spread or None,
                    "outer_wrap": _outer_wrap(doc.winding.outer_wrap),
                    "arrangement": doc.winding.arrangement.kind if isinstance(f, ToroidForm) and S > 1 else None},
        "ring": _ring(layout, sectors),
        "sheet_units": "imperial" if getattr(order, "imperial", False) else "metric",
        "hookup": {"name": order.hookup_name, "joins": net.joins, "terminals": net.terminals,
                   "description": HOOKUP_TEXT[order.hookup_name]},
        "terminations": [dict(t) for t in order.pins],
        "duty": {"voltage_V": duty.voltage, "voltage_form": duty.voltage_form, "waveform": duty.waveform,
                 "between_windings_V": duty.between_windings, "frequency_Hz": duty.frequency, "current_A": i_term or 0.0,
                 "current_given": duty.current > 0, "current_basis": current.basis,
                 "voltage_peak_V": duty.voltage_peak, "rise_time_s": duty.rise_time,
                 "repetition_rate_Hz": duty.repetition_rate, "pulse_width_s": duty.pulse_width,
                 "pulse_energy_J": duty.pulse_energy, "operating_temperature_basis": t_basis, "ambient_C": duty.ambient, "operating_temperature_C": t_op},
        "test": {"frequency_Hz": doc.test.frequency, "ring_capacitor_F": doc.test.ring_capacitor},
        "tolerances": {"inductance": tol.inductance, "resistance": tol.resistance,
                       "strand_balance": tol.strand_balance},
        "fit": {"slots_per_layer": layout.slots_per_layer, "traverse_used_m": layout.traverse_used,
                "traverse_m": getattr(f, "traverse", None) or getattr(f, "width", None),
                "build_m": layout.build_height, "max_build_m": getattr(f, "max_build", None)
                or (f.height if isinstance(f, BobbinForm) else None), "fits": True, "notes": list(layout.notes),
                "placement": None if isinstance(f, ToroidForm) else lay.traverse_placement(
                    getattr(f, "traverse", None) or f.width, layout.traverse_used, order.margin,
                    doc.winding.start.end, doc.winding.start.offset)},
        "strands": strands,
        "layers": layout.layers,
        "inductance_matrix_H": L.tolist(),
        "coupling_matrix": coupling.tolist(),
        "terminal": {
            "inductance_H": net.inductance, "resistance_ohm": net.resistance,
            "resistance_hot_ohm": duty_net.resistance,
            "resistance_ac_ohm": float(ac_terminal),
            "loss_W": float(np.sum(strand_loss)) if has_current else None,
            "capacitance_F": st["capacitance"]["terminal_F"],
            "self_resonance_Hz": st["self_resonance_Hz"],
            "capacitance_note": _capacitance_note(st["capacitance"]["terminal_F"], st["self_resonance_Hz"],
                                                  int(turns)),
            "accept": {**_inductance_accept(net.inductance, target, tol.inductance),
                       "resistance_min_ohm": net.resistance * (1 - tol.resistance),
                       "resistance_max_ohm": net.resistance * (1 + tol.resistance)},
            "resistance_ac_test_ohm": bench["terminal_resistance_ac_ohm"],
            "q_test": bench["terminal_q"],
        },
        "current_sheet_inductance_H": current_sheet,
        "current_sheet_rosa_corrected_H": rosa,
        "alternatives": alternative_hookups(L, R20, doc.test.frequency),
        "pairs": _pairs(L, R20, doc.test.frequency),
        "worst_adjacent": st["worst_adjacent"],
        "impulse": st["impulse"],
        "ac_resistance": ac,
        "thermal": thermal,
        "leads": st["leads"],
        "capacitance": st["capacitance"],
        "insulation": {**st["insulation"], "ir_min_ohm": doc.insulation.min_resistance},
        "hipot": {**st["hipot"], "voltage_V": hipot_voltage(highest_V)},
        "energy": {"magnetic_J": energy} if has_current else None,
        "cautions": {"above_elv": highest_V > elv, "highest_V": highest_V, "elv_limit_V": elv, "hipot": True,
                     "stored_energy_J": energy, "surface_C": thermal.get("surface_C"),
                     # A run-away winding has no steady surface temperature, and is hot all the same.
                     "hot_surface": thermal["converged"] is False
                     or (thermal.get("surface_C") or 0.0) >= heating.HOT_SURFACE_C,
                     "hot_surface_limit_C": heating.HOT_SURFACE_C},
        "cross_section": _cross_section(layout, potential=st.get("turn_potential_Vpk"),
                                        worst=st.get("worst_pair") or (None, None)),
        "sections": walls,
        "warnings": warnings,
        "shorted_turn": bench["shorted_turn"],
        "ring_wave": bench["ring_wave"],
    }
    # Computed here, so not validated again (design/construct.py); tests hold it equal to the validated design.
    core = construct(DesignCore, out)
    if remedies:
        found = find_remedies(order, core, lambda changed: build_design(changed, today, remedies=False))
        ins = core.insulation
        core = construct(DesignCore, {**dict(core), "insulation": {
            **as_dict(ins), "remedies": found, "reasons": list(ins.reasons) + advice(found, ins.verdict)}})
    return complete(core)


def _inductance_accept(predicted, target, tol):
    """Terminal inductance band: the ordered target +/- tolerance when the order gives
    one (the customer bought the target, not our estimate), else the prediction's."""
    centre = target["inductance_H"] if target else predicted
    return {"inductance_min_H": centre * (1 - tol), "inductance_max_H": centre * (1 + tol),
            "inductance_basis": "target" if target else "prediction",
            "inductance_centre_H": centre, "prediction_offset": predicted / centre - 1}


def _default_ident(sid: str, strands: int) -> str:
    return "single strand" if strands == 1 else f"sleeve or tag marked {sid} on both ends"
