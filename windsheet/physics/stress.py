"""Electrical stress of a winding on its duty: composes the chain

:mod:`windsheet.physics.voltage_map` (every turn's and lead's potential, the voltage
between neighbours) → :mod:`windsheet.physics.discharge` (each pair's
partial-discharge inception voltage from the construction) →
:mod:`windsheet.physics.capacitance` (pair and terminal capacitance, self-resonance)
→ :mod:`windsheet.physics.insulation` (the verdict), in :func:`assess`.

The neighbours come from the layout's geometry
(:func:`windsheet.physics.layout.neighbour_pairs`, found once per layout); the
leads and joint wires from :func:`windsheet.physics.leads.lead_routes`.
"""

from __future__ import annotations

import math

import numpy as np

from windsheet.physics import capacitance as cap
from .conductor_capacitance import turn_to_turn_capacitance_per_length
from .conductor_capacitance import ENAMEL_EPS_R, TAPE_EPS_R
from windsheet.physics.constants import ATMOSPHERE

from .discharge import air_density_ratio, construction_inception
from .edge_stress import edge_reason, edge_stress, end_turn  # noqa: F401  (end_turn: used by callers)
from .flux_linkage import cored_turn_flux_linkage, turn_linkage_matrix
from .insulation import (DERATING, HIPOT_BASIS, HIPOT_DURATION_S, PDIV_HOT_MARGIN, hipot_voltage,
                         insulation_verdict, volts)
from .layout import Layout
from .neighbours import neighbour_pairs
from .row_capacitance import edge_pair_capacitances
from .section_layout import wall_links
from .leads import BUNDLE_TEXT
from .voltage_map import describe_turn, pair_record, pair_voltages, turn_drops, turn_potentials

#: Duty frequency must stay below this fraction of self-resonance (common practice).
SRF_FRACTION = 1.0 / 3.0


def _single_layer_solenoid(layout: Layout) -> bool:
    return layout.layers == 1 and layout.kind in ("cylinder", "bobbin")


def winding_drops(layout: Layout, network, frequency, ohm_per_m, strand_matrix_H=None,
                  cored=False, lead_length=0.0, linkage=None):
    """Each turn's and each lead's voltage drop for the network's strand currents.

    Parameters
    ----------
    layout : Layout
        The winding.
    network : NetworkResult or similar
        Needs ``strand_current`` (strands,), complex, any scale.
    frequency : float
        Duty frequency, 0 for DC. [Hz]
    ohm_per_m : float
        Wire resistance per metre at the duty temperature. [Ω/m]
    strand_matrix_H : array_like or None
        Strand inductance matrix, needed on a core. [H]
    cored : bool
        Wound on a magnetic core (AL given): uniform EMF per turn of a strand.
    lead_length : float
        Length of each lead. [m]
    linkage : ndarray, shape (n_turns, strands), optional
        The layout's per-turn linkage matrix
        (:func:`windsheet.physics.flux_linkage.turn_linkage_matrix`) when the
        caller has it already; air core only.

    Returns
    -------
    turn_drop : ndarray, complex, shape (n_turns,)
    lead_drop : ndarray, complex, shape (strands,)
        Same scale as ``turn_drop``. [V]

    References
    ----------
    See :func:`windsheet.physics.voltage_map.turn_drops`,
    :func:`windsheet.physics.flux_linkage.turn_flux_linkage`.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 5, layers=1)
    >>> d, lead = winding_drops(lay, SimpleNamespace(strand_current=np.array([1.0])), 0.0, 0.1)
    >>> bool(np.allclose(d, 0.1 * lay.turn_length)), lead.tolist()
    (True, [0j])
    """
    current = np.asarray(network.strand_current, dtype=complex).reshape(layout.strands)
    flux = None
    if frequency > 0:
        if cored:
            flux = cored_turn_flux_linkage(layout, strand_matrix_H, current)
        else:
            flux = (linkage if linkage is not None else turn_linkage_matrix(layout)) @ current
    return (turn_drops(layout, current, frequency, ohm_per_m, flux),
            float(ohm_per_m) * float(lead_length) * current)


def _lead_report(layout, leads, end_potential, v, peak):
    """Each lead's worst voltage against the turns it touches, and where."""
    out, pairs = [], []
    for k, lead in enumerate(leads):
        v_lead = end_potential[lead.strand, lead.which]
        rec = {"lead": lead.end, "route": lead.route, "route_text": lead.route_text,
               "joint": lead.joint, "beside_turns": int(lead.beside.size), "worst_Vpk": 0.0, "where": None}
        if lead.beside.size:
            dv = np.abs(v_lead - v[lead.beside]) * peak
            w = int(np.argmax(dv))
            t = int(lead.beside[w])
            rec["worst_Vpk"] = float(dv[w])
            rec["where"] = (f"{lead.end} lead ({lead.route}) against {describe_turn(layout, t)}, "
                            f"layer {int(layout.layer[t]) + 1}")
            pairs.append((k, lead.beside, dv))
        out.append(rec)
    return out, pairs


def _hot_text(film, film_max, film_unknown, hot_C, density_factor, margin, basis):
    """How the hot inception voltage was reached, physics and margin named apart."""
    if density_factor is None:
        return None
    films = ("at the wire's film (its minimum not tabulated)" if film_unknown or film >= film_max else
             f"at the standard's minimum film, {film * 1e6:.1f} µm a side")
    return (f"{basis}, 20 °C {films}; × {density_factor:.2f} for the air's density at the "
            f"{hot_C:.0f} °C hot spot (Paschen's law, physics); less a {margin:.0%} margin "
            "(enamel permittivity rising with temperature, humidity)")


def _lead_lead_pairs(leads, end_potential, peak):
    """Every two leads that lie together (one bundle) and are not one joint: ``(a, b, voltage)``."""
    out = []
    for a, la in enumerate(leads):
        for b in range(a + 1, len(leads)):
            lb = leads[b]
            if la.bundle != lb.bundle or (la.joint is not None and la.joint == lb.joint):
                continue
            dv = abs(end_potential[la.strand, la.which] - end_potential[lb.strand, lb.which]) * peak
            out.append((a, b, float(dv)))
    return out


def _lead_lead_where(la, lb):
    return (f"{la.end} lead ({la.route}) against {lb.end} lead ({lb.route}), "
            f"{BUNDLE_TEXT.get(la.bundle, la.bundle)}")


def _lead_lead_record(la, lb, voltage):
    return {"voltage_Vpk": float(voltage), "i": None, "j": None, "kind": "lead-lead",
            "strands": [la.end.split(".")[0], lb.end.split(".")[0]], "turns": [None, None],
            "layer": None, "layers": [None, None], "where": _lead_lead_where(la, lb)}


def _with_lead_partners(reports, leads, lead_lead):
    """Each lead's report with the leads it lies beside, its worst taken over them too."""
    out = [dict(r, beside_leads=[]) for r in reports]
    for a, b, dv in lead_lead:
        for me, other in ((a, b), (b, a)):
            out[me]["beside_leads"].append(leads[other].end)
            if dv > out[me]["worst_Vpk"]:
                out[me]["worst_Vpk"] = dv
                out[me]["where"] = _lead_lead_where(leads[me], leads[other])
    return out


def _lead_pair_record(layout, lead, t, voltage, where):
    sid = lead.end.split(".")[0]
    return {"voltage_Vpk": float(voltage), "i": None, "j": int(t), "kind": "lead",
            "strands": [sid, "ABCD"[int(layout.strand[t])]], "turns": [None, int(layout.index[t]) + 1],
            "layer": int(layout.layer[t]) + 1, "layers": [None, int(layout.layer[t]) + 1], "where": where}


def assess(layout: Layout, network, applied_V, frequency, wire_breakdown_V, *,
           inductance_H=None, eps_r=ENAMEL_EPS_R, tape_eps_r=TAPE_EPS_R, tape_rating_V=None,
           derating=DERATING, pdiv_Vpk=None, pdiv_hot_margin=PDIV_HOT_MARGIN, drops=None,
           leads=(), impregnation="none", edge=None, film_min=None, hot_spot_C=None,
           cap_network=None, cap_drops=None, lead_length=0.0) -> dict:
    """Voltage map, capacitance, self-resonance and insulation verdict for a duty.

    Parameters
    ----------
    layout : Layout
        The winding.
    network : NetworkResult or similar
        Needs ``end_potential`` (strands, 2) complex per 1 V across the
        terminals, and ``inductance`` [H] unless ``inductance_H`` is given.
    applied_V : float
        Duty voltage across the terminals: rms for AC, the value for DC. [V]
    frequency : float
        Duty frequency, 0 for DC. [Hz]
    wire_breakdown_V : float
        Wire's published minimum breakdown voltage. [V]
    inductance_H : float or None
        Terminal inductance for the self-resonance. [H]
    eps_r, tape_eps_r : float
        Relative permittivity of enamel and layer tape. [-]
    tape_rating_V : float or None
        Rated voltage of the layer tape. [V]
    derating
        As :func:`windsheet.physics.insulation.insulation_verdict`.
    pdiv_hot_margin : float
        Margin taken off the hot inception voltage beyond the air's density
        (the enamel's permittivity rising with temperature, humidity). [-]
    film_min : float or None
        The thinnest enamel film the standard allows, half its minimum
        increase in diameter; inception is judged there (``None``: the
        layout's film, from the maximum overall diameter). [m]
    hot_spot_C : float or None
        The winding's hot-spot temperature, where the air's density sets the
        hot inception voltage (``None``: 20 °C). [degC]
    cap_network, cap_drops
        The hookup solved at 0 Hz and its ``(turn_drop, lead_drop)``: the
        low-frequency voltage map the terminal capacitance is taken from
        (leads' drops ignored), so that it does not move with the duty.
        ``None``: the duty's own map.
    lead_length : float
        Length of each lead; leads that lie together add a touching pair's
        capacitance per length over it (Massarini-Kazimierczuk). [m]
    pdiv_Vpk : float or None
        A measured PDIV at 20 °C of touching turns of this wire as built
        (a twisted pair, impregnated like the coil).  It replaces the
        estimate for touching pairs and scales the others in proportion;
        on a potted winding it is taken for every pair.  [V]
    drops : tuple or None
        ``(turn_drop, lead_drop)`` from :func:`winding_drops`; by default
        every turn of a strand drops the same.
    leads : sequence of windsheet.physics.leads.Lead
        The leads and joint wires with the turns they touch.
    impregnation : str
        ``"none"``, ``"varnish"`` or ``"potted"``.
    edge : dict or None
        A fast edge of the applied peak (:func:`edge_stress`): each pair is
        then judged at the larger of its quasi-static and its edge voltage,
        and partial discharge as on AC (every edge may start it).

    Returns
    -------
    result : dict
        ``impulse`` (the edge's report, or None), ``worst_adjacent``, ``layer_Vpk``, ``leads``, ``capacitance``
        {``self_F``, ``strand_to_strand_F``, ``layer_to_layer_F``,
        ``terminal_F``, ``method``}, ``self_resonance_Hz``, ``insulation``,
        ``hipot``, ``warnings``.  Plain floats, lists and strings (JSON-ready).

    References
    ----------
    See the functions called.

    Examples
    --------
    >>> from types import SimpleNamespace
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 50, layers=1)
    >>> net = SimpleNamespace(end_potential=np.array([[0, 1]], dtype=complex), inductance=50e-6)
    >>> out = assess(lay, net, 100.0, 50.0, 4600.0)
    >>> round(out["worst_adjacent"]["voltage_Vpk"], 2), out["insulation"]["verdict"]
    (2.83, 'pass')
    """
    ac = frequency > 0
    peak = math.sqrt(2.0) * abs(applied_V) if ac else abs(applied_V)
    ends = np.asarray(network.end_potential, dtype=complex).reshape(layout.strands, 2)
    turn_drop, lead_drop = drops if drops is not None else (None, None)
    v = turn_potentials(layout, ends, turn_drop, lead_drop)
    nb = neighbour_pairs(layout)
    dv = pair_voltages(v, nb.i, nb.j, peak)
    i, j, kind, c, layer_C = cap.pair_capacitances(layout, eps_r, tape_eps_r, nb)
    # A sectioned winding's walls couple the turns that face them: charge, not pairs to judge.
    links = wall_links(layout) if layout.sections > 1 else None
    impulse = None
    if edge is not None:
        # The ladder's rungs are partial capacitances: a spaced turn among its neighbours in a row.
        v_edge, ends_edge, dv_edge, impulse = edge_stress(layout, nb, edge_pair_capacitances(layout, nb, c, eps_r),
                                                          edge, peak, links)
        dv = np.maximum(dv, dv_edge)

    # Inception is judged at the thinnest film the standard allows (its minimum increase); the
    # layout's spacing stays at the maximum overall diameter.  Hot: Paschen at the air's density
    # at the hot spot (physics), then a stated margin.
    film_max = (layout.overall_diameter - layout.copper_diameter) / 2.0
    film = film_max if film_min is None else min(float(film_min), film_max)
    hot_C = 20.0 if hot_spot_C is None else max(float(hot_spot_C), 20.0)
    p_hot = ATMOSPHERE * air_density_ratio(hot_C)
    pdiv = construction_inception(nb.gap, nb.across_tape, film, eps_r, layout.tape, tape_eps_r,
                                  impregnation) if nb.size else np.zeros(0)
    pdiv_h = construction_inception(nb.gap, nb.across_tape, film, eps_r, layout.tape, tape_eps_r,
                                    impregnation, pressure=p_hot) if nb.size else np.zeros(0)
    lead_reports, lead_pairs = _lead_report(layout, leads, ends, v, peak)
    if edge is not None:
        edge_reports, edge_pairs = _lead_report(layout, leads, ends_edge, v_edge, peak)
        lead_reports = [e if e["worst_Vpk"] > q["worst_Vpk"] else q for q, e in zip(lead_reports, edge_reports)]
        lead_pairs = [(k, b, np.maximum(q, e)) for (k, b, q), (_, _, e) in zip(lead_pairs, edge_pairs)]
    # Leads that leave at one place lie together: each pair of them at its own voltage.
    lead_lead = _lead_lead_pairs(leads, ends, peak)
    if edge is not None:
        lead_lead = [(a, b, max(q, e)) for (a, b, q), (_, _, e)
                     in zip(lead_lead, _lead_lead_pairs(leads, ends_edge, peak))]
    lead_reports = _with_lead_partners(lead_reports, leads, lead_lead)
    touching = float(construction_inception([0.0], [False], film, eps_r, impregnation=impregnation)[0])
    touching_h = float(construction_inception([0.0], [False], film, eps_r, impregnation=impregnation,
                                              pressure=p_hot)[0])
    basis = "no air path" if impregnation == "potted" else "estimated"
    if pdiv_Vpk is not None:
        basis = "measured"
        if impregnation == "potted":
            # Voids in a potting are sealed: their gas keeps its density hot.
            pdiv = np.full(pdiv.shape, float(pdiv_Vpk))
            pdiv_h, touching_h = pdiv.copy(), float(pdiv_Vpk)
        else:
            scale = float(pdiv_Vpk) / touching
            pdiv, pdiv_h, touching_h = pdiv * scale, pdiv_h * scale, touching_h * scale
        touching = float(pdiv_Vpk)

    # Every stressed pair: turn pairs, each lead against the turns it touches, lead against lead.
    volts_all = [dv]
    pdiv_all, pdiv_hot_all = [pdiv], [pdiv_h]
    gap_all, across_all = [nb.gap], [nb.across_tape]
    taped = [nb.across_tape & (tape_rating_V is not None)]
    lead_sizes = [beside.size for _, beside, _ in lead_pairs] + ([len(lead_lead)] if lead_lead else [])
    for _, beside, ldv in lead_pairs:
        volts_all.append(ldv)
    if lead_lead:
        volts_all.append(np.array([x[2] for x in lead_lead]))
    for n in lead_sizes:          # every lead pair touches, enamel to enamel
        pdiv_all.append(np.full(n, touching))
        pdiv_hot_all.append(np.full(n, touching_h))
        gap_all.append(np.zeros(n))
        across_all.append(np.zeros(n, dtype=bool))
        taped.append(np.zeros(n, dtype=bool))
    pdiv_hot_all = np.concatenate(pdiv_hot_all)
    gap_all, across_all = np.concatenate(gap_all), np.concatenate(across_all)
    # Held by enamel alone: touching turns (no air, no tape between), pairs across an unrated tape
    # (the enamel is relied on) and every lead pair.  A spaced or diagonal pair has air between.
    touching_turns = (nb.gap <= 1e-3 * layout.overall_diameter) & ~nb.across_tape
    enamel_alone = [touching_turns | (nb.across_tape & (tape_rating_V is None))]
    enamel_alone += [np.ones(x.size, dtype=bool) for x in volts_all[1:]]
    enamel_alone = np.concatenate(enamel_alone)
    volts_all = np.concatenate(volts_all) if volts_all else np.zeros(0)
    pdiv_all = np.concatenate(pdiv_all) if pdiv_all else np.zeros(0)
    taped = np.concatenate(taped) if taped else np.zeros(0, dtype=bool)

    def record(k):
        if k < nb.size:
            return pair_record(layout, int(nb.i[k]), int(nb.j[k]), str(nb.kind[k]), volts_all[k])
        k -= nb.size
        for lead_k, beside, ldv in lead_pairs:
            if k < beside.size:
                lead = leads[lead_k]
                t = int(beside[k])
                where = (f"{lead.end} lead ({lead.route}) against {describe_turn(layout, t)}, "
                         f"layer {int(layout.layer[t]) + 1}")
                return _lead_pair_record(layout, lead, t, ldv[k], where)
            k -= beside.size
        a, b, lv = lead_lead[k]
        return _lead_lead_record(leads[a], leads[b], lv)

    if volts_all.size:
        worst = record(int(np.argmax(volts_all)))
    else:
        worst = {"voltage_Vpk": 0.0, "where": None, "strands": None, "turns": None, "layer": None,
                 "layers": None, "kind": None}
    layer_sel = nb.kind == "layer"
    layer_Vpk = float(dv[layer_sel].max()) if layer_sel.any() else 0.0
    layer_where = (record(int(np.flatnonzero(layer_sel)[np.argmax(dv[layer_sel])]))["where"]
                   if layer_sel.any() else None)
    enamel_Vpk, enamel_where = 0.0, None
    if enamel_alone.any():
        k_en = int(np.flatnonzero(enamel_alone)[np.argmax(volts_all[enamel_alone])])
        enamel_Vpk, enamel_where = float(volts_all[k_en]), record(k_en)["where"]
    finite = np.isfinite(pdiv_hot_all)
    pd_hot, pd_max_film, density_factor = math.inf, None, None
    if finite.any():
        ratio = np.where(finite, volts_all / np.where(finite, pdiv_hot_all, 1.0), -1.0)
        crit = int(np.argmax(ratio))
        pd_rec = record(crit)
        pd_V, pd_div, pd_where = float(volts_all[crit]), float(pdiv_all[crit]), pd_rec["where"]
        density_factor = float(pdiv_hot_all[crit] / pdiv_all[crit])
        pd_hot = float(pdiv_hot_all[crit]) * (1.0 - pdiv_hot_margin)
        pd_max_film = None if impregnation == "potted" else pd_div * float(construction_inception(
            [gap_all[crit]], [across_all[crit]], film_max, eps_r, layout.tape, tape_eps_r, impregnation)[0]
            / construction_inception([gap_all[crit]], [across_all[crit]], film, eps_r, layout.tape,
                                     tape_eps_r, impregnation)[0])
    else:
        pd_V, pd_div, pd_where = float(worst["voltage_Vpk"]), math.inf, worst["where"]

    # Capacitance: pairs by the energy method; Medhurst for a single-layer solenoid.
    # The capacitance that sets self-resonance belongs to the winding, not the duty: its voltage
    # map is the low-frequency one (f -> 0), the leads' resistance left out; the leads that lie
    # together then add their own capacitance, never take any away.
    ends_c = ends if cap_network is None else np.asarray(cap_network.end_potential,
                                                         dtype=complex).reshape(layout.strands, 2)
    v_c = turn_potentials(layout, ends_c, None if cap_drops is None else cap_drops[0], None)
    leads_F = 0.0
    if lead_lead and lead_length > 0:
        per_m = float(turn_to_turn_capacitance_per_length(layout.copper_diameter, layout.overall_diameter,
                                                          eps_r))
        dv_leads = [ends_c[leads[a].strand, leads[a].which] - ends_c[leads[b].strand, leads[b].which]
                    for a, b, _ in lead_lead]
        leads_F = cap.energy_method_capacitance(np.full(len(dv_leads), per_m * lead_length), dv_leads, 1.0)
    pairs_C = cap.energy_method_capacitance(c, v_c[i] - v_c[j], 1.0)
    if links is not None:
        pairs_C += cap.energy_method_capacitance(links[2], v_c[links[0]] - v_c[links[1]], 1.0)
    warnings = []
    method = ("energy method over neighbour pairs on the winding's low-frequency voltage map (Massarini-Kazimierczuk between touching "
              "turns, two-wire line with air beyond the enamel between spaced ones, flux tubes "
              "through enamel, air and tape in series, or series plates, between layers)")
    self_F = None
    terminal_F = pairs_C
    if _single_layer_solenoid(layout):
        diameter = 2.0 * float(np.mean(layout.r))
        length = float(layout.traverse_used)
        self_F = float(cap.medhurst_self_capacitance(diameter, length))
        terminal_F = cap.single_layer_capacitance(self_F, c, v_c[i] - v_c[j], 1.0 / layout.n_turns)
        method = ("Medhurst's self-capacitance of a single-layer solenoid, plus what the hookup "
                  "stores between neighbour pairs beyond an even share of V/N each (energy method on the "
                  "low-frequency voltage map; "
                  "Massarini-Kazimierczuk between touching turns, two-wire line between spaced ones)")
        if not cap.medhurst_in_table(length / diameter):
            warnings.append(f"Length/diameter {length / diameter:.2f} is outside Medhurst's table "
                            "(0.1-50): self-capacitance extrapolated.")

    other_strand = (kind == "side") & (layout.strand[i] != layout.strand[j])
    strand_F = float(c[other_strand].sum()) if layout.strands > 1 else None
    layers_F = float(sum(layer_C.values())) if layout.layers > 1 else None

    terminal_F = terminal_F + leads_F
    L = network.inductance if inductance_H is None else inductance_H
    srf = cap.self_resonance(L, terminal_F)
    if ac and math.isfinite(srf):
        if frequency >= srf:
            warnings.append(f"ERROR: duty frequency {frequency:.4g} Hz is at or above the predicted "
                            f"self-resonance {srf:.4g} Hz: the coil will not act as an inductor.")
        elif frequency > SRF_FRACTION * srf:
            warnings.append(f"Duty frequency {frequency:.4g} Hz is above a third of the predicted "
                            f"self-resonance {srf:.4g} Hz: inductance will read high and the "
                            "turn voltages will not be evenly shared.")
    if layout.layers > 1 and layout.tape > 0 and tape_rating_V is None:
        warnings.append(f"Layer tape rating not given: layer-to-layer {volts(layer_Vpk)} V peak "
                        "not checked against the tape (the enamel alone is relied on).")

    insulation = insulation_verdict(worst["voltage_Vpk"], wire_breakdown_V, derating=derating,
                                    enamel_Vpk=enamel_Vpk, layer_Vpk=layer_Vpk, worst_where=worst["where"],
                                    enamel_where=enamel_where, layer_where=layer_where,
                                    tape_rating_V=tape_rating_V, pd_Vpk=pd_V, pdiv_Vpk=pd_div,
                                    pdiv_hot_Vpk=pd_hot, hot_text=_hot_text(
                                        film, film_max, film_min is None, hot_C, density_factor,
                                        pdiv_hot_margin, basis), pd_where=pd_where,
                                    pdiv_basis=basis, ac=ac or edge is not None, impregnation=impregnation)
    if impulse is not None:
        insulation["reasons"] = list(insulation["reasons"]) + [edge_reason(impulse)]
    insulation["pdiv_touching_Vpk"] = touching if math.isfinite(touching) else None
    insulation.update({"pdiv_max_film_Vpk": pd_max_film, "pdiv_film_m": float(film),
                       "pdiv_hot_spot_C": float(hot_C), "pdiv_density_factor": density_factor,
                       "pdiv_hot_margin": float(pdiv_hot_margin)})
    insulation["layer_style"] = layout.layer_style
    worst_out = {k: worst[k] for k in ("voltage_Vpk", "where", "strands", "turns", "layer",
                                       "layers", "kind")}
    return {
        "impulse": impulse,
        "worst_adjacent": worst_out,
        "layer_Vpk": layer_Vpk,
        "leads": lead_reports,
        "capacitance": {"self_F": self_F, "strand_to_strand_F": strand_F,
                        "layer_to_layer_F": layers_F, "terminal_F": float(terminal_F),
                        "leads_F": float(leads_F),
                        "method": method},
        "self_resonance_Hz": None if not math.isfinite(srf) else float(srf),
        "insulation": insulation,
        "hipot": {"voltage_V": hipot_voltage(applied_V), "duration_s": HIPOT_DURATION_S,
                  "basis": HIPOT_BASIS},
        "warnings": warnings,
        # For the traveller's voltage picture: each turn's peak potential from terminal 1, and
        # the worst pair's turn indices (None when the worst is a lead).
        "turn_potential_Vpk": np.abs(v) * peak,
        # Under a fast edge, the initial capacitive distribution's (None without one).
        "edge_turn_potential_Vpk": None if edge is None else np.abs(v_edge) * peak,
        "worst_pair": (worst.get("i"), worst.get("j")),
    }
