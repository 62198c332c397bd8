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
from .conductor_capacitance import ENAMEL_EPS_R, TAPE_EPS_R
from .discharge import construction_inception
from .fast_front import (capacitive_distribution, impulse_alpha, series_capacitance,
                         uniform_initial_distribution)
from .flux_linkage import cored_turn_flux_linkage, turn_linkage_matrix
from .insulation import (DERATING, HIPOT_BASIS, HIPOT_DURATION_S, PDIV_HOT_FACTOR, hipot_voltage,
                         insulation_verdict, volts)
from .layout import Layout
from .neighbours import neighbour_pairs
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


def _lead_pair_record(layout, lead, t, voltage, where):
    sid = lead.end.split(".")[0]
    return {"voltage_Vpk": float(voltage), "i": None, "j": int(t), "kind": "lead",
            "strands": [sid, "ABCD"[int(layout.strand[t])]], "turns": [None, int(layout.index[t]) + 1],
            "layer": int(layout.layer[t]) + 1, "layers": [None, int(layout.layer[t]) + 1], "where": where}


def end_turn(layout: Layout, strand: int, which: int) -> int:
    """Index of a strand's first (``which`` 0) or last (1) turn.

    Parameters
    ----------
    layout : Layout
        The winding.
    strand : int
        Strand number, 0 = A. [-]
    which : int
        0 for the start turn, 1 for the finish turn. [-]

    Returns
    -------
    t : int
        Index of that turn into the layout arrays. [-]

    References
    ----------
    Winding order of :func:`windsheet.physics.layout.cylinder_layout`: each
    slot holds strands A, B, … side by side, so in a bifilar winding slot
    ``k`` is turns ``2k`` (A) and ``2k + 1`` (B).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 2, 5, layers=1)   # bifilar, 5 slots
    >>> [end_turn(lay, s, w) for s in (0, 1) for w in (0, 1)]             # 2·0, 2·4, 2·0 + 1, 2·4 + 1
    [0, 8, 1, 9]
    """
    sel = np.flatnonzero(layout.strand == strand)
    return int(sel[np.argmin(layout.index[sel])] if which == 0 else sel[np.argmax(layout.index[sel])])


def edge_stress(layout: Layout, nb, c, edge, peak):
    """Every turn's potential under a fast edge, and the pair voltages it gives.

    Parameters
    ----------
    layout : Layout
        The winding.
    nb : windsheet.physics.layout.Neighbours
        Its neighbour pairs.
    c : ndarray
        Each pair's capacitance. [F]
    edge : dict
        ``held`` {(strand, end 0/1): potential per volt of the edge},
        ``ties`` [((strand, end), (strand, end))] joined ends,
        ``ground_F`` [F] from the whole winding to ground (spread evenly over
        the turns), ``ground_given`` (bool), ``rise_time_s`` [s],
        ``series_turns`` (turns between the terminals, for the even share).
    peak : float
        Height of the edge. [V]

    Returns
    -------
    v : ndarray
        Each turn's potential per volt of the edge. [-]
    ends : ndarray, shape (strands, 2)
        Each strand end's potential per volt. [-]
    dv : ndarray
        Voltage across each neighbour pair under the edge. [V]
    report : dict
        ``alpha``, ``series_capacitance_F``, ``ground_capacitance_F``,
        ``first_turn_Vpk``, ``first_turn_uniform_Vpk`` (the even share
        V/N), ``first_turn_uniform_winding_Vpk`` (the closed form at this α, single
        layers only),
        ``worst_pair_Vpk``, ``worst_pair_where``, ``edge_Vpk``, ``rise_time_s``.

    References
    ----------
    :mod:`windsheet.physics.fast_front`.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.neighbours import neighbour_pairs
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 50, layers=1)
    >>> nb = neighbour_pairs(lay)
    >>> c = cap.pair_capacitances(lay, pairs=nb)[3]
    >>> e = {"held": {(0, 0): 1.0, (0, 1): 0.0}, "ties": [], "ground_F": 10e-12, "ground_given": False,
    ...      "rise_time_s": 1e-7}
    >>> v, ends, dv, rep = edge_stress(lay, nb, c, e, 100.0)
    >>> rep["first_turn_Vpk"] > 5 * rep["first_turn_uniform_Vpk"]
    True
    """
    n = layout.n_turns
    held = {end_turn(layout, s, w): float(val) for (s, w), val in edge["held"].items()}
    ties = [(end_turn(layout, *a), end_turn(layout, *b)) for a, b in edge["ties"]]
    cg = float(edge["ground_F"]) / n
    v, _ = capacitive_distribution(n, nb.i, nb.j, c, cg, held, ties)
    line = [t for t, val in held.items() if val == max(held.values())]
    earth = [t for t, val in held.items() if val != max(held.values())]
    cs = series_capacitance(n, nb.i, nb.j, c, line, earth, ties) if earth else 0.0
    alpha = impulse_alpha(edge["ground_F"], cs) if cs > 0 else None
    dv = np.abs(v[nb.i] - v[nb.j]) * peak
    ends = np.array([[v[end_turn(layout, s, 0)], v[end_turn(layout, s, 1)]] for s in range(layout.strands)])
    # The first turn: the line-end turn against the next turn of its own strand.
    t0 = line[0]
    s0 = int(layout.strand[t0])
    k0 = int(layout.index[t0])
    same = np.flatnonzero(layout.strand == s0)
    nxt = same[np.argmin(np.abs(layout.index[same] - (k0 + 1 if k0 == 0 else k0 - 1)))]
    first = float(abs(v[t0] - v[nxt]) * peak)
    turns_between = max(1, int(edge.get("series_turns", n)))
    share = peak / turns_between
    closed = None
    # The closed form is a turn-by-turn ladder's: a check for a single layer only.
    if alpha is not None and math.isfinite(alpha) and layout.layers == 1:
        closed = float(peak * (1.0 - uniform_initial_distribution(1.0 / turns_between, alpha)))
    k = int(np.argmax(dv)) if dv.size else None
    where = pair_record(layout, int(nb.i[k]), int(nb.j[k]), str(nb.kind[k]), dv[k])["where"] if k is not None else None
    report = {"alpha": alpha, "series_capacitance_F": cs, "ground_capacitance_F": float(edge["ground_F"]),
              "ground_capacitance_given": bool(edge["ground_given"]), "rise_time_s": edge.get("rise_time_s"),
              "edge_Vpk": float(peak), "first_turn_Vpk": first, "first_turn_uniform_Vpk": float(share),
              "first_turn_uniform_winding_Vpk": closed,
              "worst_pair_Vpk": float(dv[k]) if k is not None else 0.0, "worst_pair_where": where,
              "method": "initial capacitive distribution: neighbour-pair capacitances and the ground "
                        "capacitance spread evenly over the turns (inductance carries no current yet)"}
    return v, ends, dv, report


def _edge_reason(rep):
    alpha = "" if rep["alpha"] is None else f", α = {rep['alpha']:.3g}"
    given = "given" if rep["ground_capacitance_given"] else "assumed, not given in the order"
    return (f"Under the fast edge ({volts(rep['edge_Vpk'])} V peak, initial capacitive distribution{alpha}, "
            f"ground capacitance {rep['ground_capacitance_F'] * 1e12:.3g} pF {given}) the first turn takes "
            f"{volts(rep['first_turn_Vpk'])} V peak against an even share of "
            f"{volts(rep['first_turn_uniform_Vpk'])} V, and the worst pair {volts(rep['worst_pair_Vpk'])} V peak "
            f"({rep['worst_pair_where']}); each pair is judged at the larger of this and its steady voltage.")


def assess(layout: Layout, network, applied_V, frequency, wire_breakdown_V, *,
           inductance_H=None, eps_r=ENAMEL_EPS_R, tape_eps_r=TAPE_EPS_R, tape_rating_V=None,
           derating=DERATING, pdiv_Vpk=None, pdiv_hot_factor=PDIV_HOT_FACTOR, drops=None,
           leads=(), impregnation="none", edge=None) -> dict:
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
    derating, pdiv_hot_factor
        As :func:`windsheet.physics.insulation.insulation_verdict`.
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
    impulse = None
    if edge is not None:
        v_edge, ends_edge, dv_edge, impulse = edge_stress(layout, nb, c, edge, peak)
        dv = np.maximum(dv, dv_edge)

    film = (layout.overall_diameter - layout.copper_diameter) / 2.0
    pdiv = construction_inception(nb.gap, nb.across_tape, film, eps_r, layout.tape, tape_eps_r,
                                  impregnation) if nb.size else np.zeros(0)
    lead_reports, lead_pairs = _lead_report(layout, leads, ends, v, peak)
    if edge is not None:
        edge_reports, edge_pairs = _lead_report(layout, leads, ends_edge, v_edge, peak)
        lead_reports = [e if e["worst_Vpk"] > q["worst_Vpk"] else q for q, e in zip(lead_reports, edge_reports)]
        lead_pairs = [(k, b, np.maximum(q, e)) for (k, b, q), (_, _, e) in zip(lead_pairs, edge_pairs)]
    touching = float(construction_inception([0.0], [False], film, eps_r, impregnation=impregnation)[0])
    basis = "no air path" if impregnation == "potted" else "estimated"
    if pdiv_Vpk is not None:
        basis = "measured"
        if impregnation == "potted":
            pdiv = np.full(pdiv.shape, float(pdiv_Vpk))
        else:
            pdiv = pdiv * (float(pdiv_Vpk) / touching)
        touching = float(pdiv_Vpk)

    # Every stressed pair: turn pairs, then each lead against the turns it touches.
    volts_all = [dv]
    pdiv_all = [pdiv]
    taped = [nb.across_tape & (tape_rating_V is not None)]
    for _, beside, ldv in lead_pairs:
        volts_all.append(ldv)
        pdiv_all.append(np.full(beside.size, touching))
        taped.append(np.zeros(beside.size, dtype=bool))
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
        raise IndexError(k)

    if volts_all.size:
        worst = record(int(np.argmax(volts_all)))
    else:
        worst = {"voltage_Vpk": 0.0, "where": None, "strands": None, "turns": None, "layer": None,
                 "layers": None, "kind": None}
    layer_sel = nb.kind == "layer"
    layer_Vpk = float(dv[layer_sel].max()) if layer_sel.any() else 0.0
    enamel_Vpk = float(volts_all[~taped].max()) if (~taped).any() else 0.0
    finite = np.isfinite(pdiv_all)
    if finite.any():
        ratio = np.where(finite, volts_all / np.where(finite, pdiv_all, 1.0), -1.0)
        crit = int(np.argmax(ratio))
        pd_rec = record(crit)
        pd_V, pd_div, pd_where = float(volts_all[crit]), float(pdiv_all[crit]), pd_rec["where"]
    else:
        pd_V, pd_div, pd_where = float(worst["voltage_Vpk"]), math.inf, worst["where"]

    # Capacitance: pairs by the energy method; Medhurst for a single-layer solenoid.
    pairs_C = cap.energy_method_capacitance(c, v[i] - v[j], 1.0)
    warnings = []
    method = ("energy method over neighbour pairs (Massarini-Kazimierczuk between touching "
              "turns, two-wire line with air beyond the enamel between spaced ones, flux tubes "
              "through enamel, air and tape in series, or series plates, between layers)")
    self_F = None
    terminal_F = pairs_C
    if _single_layer_solenoid(layout):
        diameter = 2.0 * float(np.mean(layout.r))
        length = float(layout.traverse_used)
        self_F = float(cap.medhurst_self_capacitance(diameter, length))
        terminal_F = cap.single_layer_capacitance(self_F, c, v[i] - v[j], 1.0 / layout.n_turns)
        method = ("Medhurst's self-capacitance of a single-layer solenoid, plus what the hookup "
                  "stores between neighbour pairs beyond an even share of V/N each (energy method; "
                  "Massarini-Kazimierczuk between touching turns, two-wire line between spaced ones)")
        if not cap.medhurst_in_table(length / diameter):
            warnings.append(f"Length/diameter {length / diameter:.2f} is outside Medhurst's table "
                            "(0.1-50): self-capacitance extrapolated.")

    other_strand = (kind == "side") & (layout.strand[i] != layout.strand[j])
    strand_F = float(c[other_strand].sum()) if layout.strands > 1 else None
    layers_F = float(sum(layer_C.values())) if layout.layers > 1 else None

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
                                    enamel_Vpk=enamel_Vpk, layer_Vpk=layer_Vpk,
                                    tape_rating_V=tape_rating_V, pd_Vpk=pd_V, pdiv_Vpk=pd_div,
                                    pdiv_hot_factor=pdiv_hot_factor, pd_where=pd_where,
                                    pdiv_basis=basis, ac=ac or edge is not None, impregnation=impregnation)
    if impulse is not None:
        insulation["reasons"] = list(insulation["reasons"]) + [_edge_reason(impulse)]
    insulation["pdiv_touching_Vpk"] = touching if math.isfinite(touching) else None
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
                        "method": method},
        "self_resonance_Hz": None if not math.isfinite(srf) else float(srf),
        "insulation": insulation,
        "hipot": {"voltage_V": hipot_voltage(applied_V), "duration_s": HIPOT_DURATION_S,
                  "basis": HIPOT_BASIS},
        "warnings": warnings,
        # For the traveller's voltage picture: each turn's peak potential from terminal 1, and
        # the worst pair's turn indices (None when the worst is a lead).
        "turn_potential_Vpk": np.abs(v) * peak,
        "worst_pair": (worst.get("i"), worst.get("j")),
    }
