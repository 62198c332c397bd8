"""What the shop's own bench tests read on this design: Q, one shorted turn, the ring wave.

Composes :mod:`windsheet.physics.shorted_turn`, :mod:`windsheet.physics.ring_wave`
and the hookup's nodal analysis; holds no model of its own.  Everything is at
the LCR meter's test frequency (``test.frequency``) and 20 °C, the bench's
temperature, except the ring, which is taken at the frequency it rings at.

The shorted turn is put at the winding's worst place *for the test*: of the
first, middle and last turns of each strand in the inner, middle and outer
layers, the one whose short changes Q least.  A short anywhere among them
reads at least as far from the prediction, so a band that catches this one
catches them.  The short is taken as a perfect contact; a short through
charred enamel with some resistance of its own shows less.
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np

from windsheet.physics import shorted_turn as st
from windsheet.physics.ac_resistance import winding_ac_ratio
from windsheet.physics.flux_linkage import cored_turn_flux_linkage
from windsheet.physics.hookup import STRAND_IDS, check_hookup
from windsheet.physics.network import solve_network, terminal_impedance
from windsheet.physics.ring_wave import ring_at_its_frequency
from windsheet.physics.wire import dc_resistance

#: Bench temperature the Q and ring predictions are made at. [°C]
BENCH_C = 20.0

RING_METHOD = ("series RLC free ring (the capacitor plus the winding's own capacitance, the winding's L and "
               "AC resistance at the ring frequency): f = (1/2π)·√(1/LC − (R/2L)²), decay exp(−(R/2L)/f)")

#: Below this predicted Q a Q reading says little beyond the resistance reading; no Q line is offered.
MIN_Q_LINE = 0.1


def q_tolerance(tol_L: float, tol_R: float) -> float:
    """Tolerance of Q = ωL/R: the inductance's and the resistance's, added (first order).

    Examples
    --------
    >>> q_tolerance(0.10, 0.05)
    0.15000000000000002
    """
    return tol_L + tol_R


def ring_tolerances(tol_L: float, tol_R: float) -> tuple[float, float]:
    """Tolerances of the ring frequency (f ∝ L^-1/2: half the inductance's) and of its log decrement
    (δ = R/(2L·f) ∝ R·L^-1/2: the resistance's plus half the inductance's).

    Examples
    --------
    >>> ring_tolerances(0.10, 0.05)
    (0.05, 0.1)
    """
    return tol_L / 2.0, tol_R + tol_L / 2.0


def _hookup_nodes(hookup_name, joins, terminals, strands):
    """Node of each strand end and the two terminal nodes; separate windings read winding A."""
    if hookup_name == "separate" or strands == 1 and not joins:
        return list(range(2 * strands)), 0, 1
    node_of, t1, t2, _ = check_hookup(joins, terminals, strands)
    return [int(k) for k in node_of], int(t1), int(t2)


def _candidates(layout) -> list[int]:
    """First, middle and last turn of each strand in the inner, middle and outer layers."""
    out = []
    for lay_i in sorted({0, (layout.layers - 1) // 2, layout.layers - 1}):
        for s in range(layout.strands):
            sel = np.flatnonzero((layout.layer == lay_i) & (layout.strand == s))
            if sel.size:
                sel = sel[np.argsort(layout.index[sel])]
                out += sorted({int(sel[0]), int(sel[sel.size // 2]), int(sel[-1])})
    return out


def _where(layout, k) -> str:
    sid = STRAND_IDS[int(layout.strand[k])]
    n = int(layout.index[k]) + 1
    of = int(np.sum(layout.strand == layout.strand[k]))
    place = "its first" if n == 1 else "its last" if n == of else f"turn {n} of {of}"
    return (f"strand {sid}, {place} turn" if place.startswith("its") else f"strand {sid}, {place}") + \
        (f", layer {int(layout.layer[k]) + 1} of {layout.layers}" if layout.layers > 1 else "")


def bench_tests(L, R20, layout, wire, hookup_name, joins, terminals, test_frequency: float,
                winding_capacitance: Optional[float], ring_capacitor: Optional[float],
                tol_L: float, tol_R: float, core_al: Optional[float] = None) -> dict:
    """Q of each strand and at the terminals, one shorted turn at the worst place, and the ring wave.

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R20 : ndarray, shape (S,)
        Strand DC resistances at 20 °C, leads included. [ohm]
    layout : windsheet.physics.layout.Layout
    wire : windsheet.physics.wire.Wire
    hookup_name, joins, terminals
        The hookup as ordered.
    test_frequency : float
        The LCR meter's test frequency. [Hz]
    winding_capacitance : float or None
        The winding's own capacitance at the terminals. [F]
    ring_capacitor : float or None
        The ring test's capacitor, when the order asks for the ring test. [F]
    tol_L, tol_R : float
        The order's inductance and resistance tolerances. [-]
    core_al : float or None
        The core's A_L on a cored winding. [H]

    Returns
    -------
    result : dict
        ``strand_q``, ``strand_resistance_ac_ohm``, ``terminal_q``,
        ``terminal_resistance_ac_ohm`` and the ``shorted_turn`` and
        ``ring_wave`` sections of the design.
    """
    S = len(R20)
    R20 = np.asarray(R20, float)
    L = np.asarray(L, float)
    d = wire.copper_diameter
    rho = float(dc_resistance(1.0, d, BENCH_C, conductor=wire.conductor)) * math.pi * d * d / 4
    spacing = layout.pitch / layout.strands

    def ratio(f):
        return winding_ac_ratio(f, d, rho, layout.radial_layers, spacing)["ratio"] if f > 0 else 1.0

    f = float(test_frequency)
    w = 2 * math.pi * f
    r_test = R20 * ratio(f)
    node_of, t1, t2 = _hookup_nodes(hookup_name, joins, terminals, S)

    def z_at(freq, r=None):
        return terminal_impedance(L, R20 * ratio(freq) if r is None else r, node_of, t1, t2, freq)

    z = z_at(f, r_test)
    strand_q = [float(st.quality_factor(f, L[s, s], r_test[s])) for s in range(S)]
    q = z.imag / z.real

    # Each candidate turn's flux linkage per ampere in each strand, its own inductance and resistance.
    cand = _candidates(layout)
    ohm_per_m = rho / (math.pi * d * d / 4)
    r_loop = layout.turn_length[cand] * ohm_per_m
    if core_al is not None:
        link = np.stack([cored_turn_flux_linkage(layout, L, np.eye(S)[s])[cand].real for s in range(S)], axis=1)
        l_loop = np.full(len(cand), float(core_al))
        model = "cored: the turn links the core's flux, A_L for its own inductance"
    else:
        link = st.turn_strand_linkage(layout, cand)
        l_loop = st.loop_self_inductance(layout.r[cand], d / 2)
        model = "air core: Maxwell's mutuals of coaxial circles, the round-wire loop's own inductance"
    current = _strand_share(L, r_test, hookup_name, joins, terminals, f, S)
    shifted = st.shorted_turn_shift(f, z, current, link, layout.strand[cand], l_loop, r_loop * ratio(f))
    pick = int(np.argmax(shifted.imag / shifted.real))
    k = cand[pick]

    def z_short(freq):
        L2, R2 = st.shorted_turn_matrices(L, R20 * ratio(freq), link[pick], float(l_loop[pick]),
                                          float(r_loop[pick]) * ratio(freq), int(layout.strand[k]))
        fresh = max(node_of) + 1
        return terminal_impedance(L2, R2, node_of + [fresh, fresh], t1, t2, freq)

    zs = z_short(f)
    q_low = q * (1 - q_tolerance(tol_L, tol_R))
    short = {"where": _where(layout, k), "strand": STRAND_IDS[int(layout.strand[k])],
             "layer": int(layout.layer[k]) + 1, "turn": int(layout.index[k]) + 1,
             "loop_inductance_H": float(l_loop[pick]), "loop_resistance_ohm": float(r_loop[pick] * ratio(f)),
             "mutual_H": float(link[pick] @ np.real(current) - np.real(current[int(layout.strand[k])])
                               * l_loop[pick]),
             "frequency_Hz": f, "inductance_H": zs.imag / w, "resistance_ac_ohm": zs.real,
             "q": zs.imag / zs.real, "inductance_change": (zs.imag / z.imag) - 1,
             "q_change": (zs.imag / zs.real) / q - 1, "q_caught": bool(zs.imag / zs.real < q_low),
             "shows_from_Hz": float(st.loop_corner_frequency(float(r_loop[pick]), float(l_loop[pick]))),
             "model": model, "contact": "a perfect short (no contact resistance)"}
    ring = None
    if ring_capacitor:
        c = ring_capacitor + (winding_capacitance or 0.0)
        f0 = 1 / (2 * math.pi * math.sqrt(z.imag / w * c))
        fr, decay, zr = ring_at_its_frequency(z_at, c, f0)
        frs, decays, zrs = ring_at_its_frequency(z_short, c, f0)
        tol_f, tol_d = ring_tolerances(tol_L, tol_R)
        ring = {"capacitor_F": ring_capacitor, "winding_capacitance_F": winding_capacitance,
                "frequency_Hz": fr, "decay": decay,
                "inductance_H": zr.imag / (2 * math.pi * fr) if fr else None,
                "resistance_ac_ohm": zr.real if fr else None,
                "frequency_tolerance": tol_f, "decrement_tolerance": tol_d, "method": RING_METHOD}
        short.update(ring_frequency_Hz=frs, ring_decay=decays)
        if fr:
            # A short that damps the ring out altogether is caught: the tester shows no ring.
            short["ring_caught"] = bool(frs is None or not fr * (1 - tol_f) <= frs <= fr * (1 + tol_f)
                                        or decays < decay_minimum(decay, tol_d))
    return {"strand_q": strand_q, "strand_resistance_ac_ohm": [float(x) for x in r_test],
            "terminal_q": q, "terminal_resistance_ac_ohm": z.real, "test_frequency_Hz": f,
            "shorted_turn": short, "ring_wave": ring}


def decay_minimum(decay: float, decrement_tolerance: float) -> float:
    """Least ratio of successive peaks accepted: the predicted log decrement plus its tolerance.

    Examples
    --------
    >>> round(decay_minimum(0.9691, 0.1), 4)
    0.9660
    """
    return math.exp(math.log(decay) * (1 + decrement_tolerance))


def _strand_share(L, R, hookup_name, joins, terminals, f, S):
    """Current in each strand per ampere at the terminals (winding A alone for separate windings)."""
    if hookup_name == "separate" or S == 1:
        return np.eye(S, dtype=complex)[0]
    return np.asarray(solve_network(L, R, joins, terminals, f).strand_current, dtype=complex)
