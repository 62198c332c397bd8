"""Electrical stress: where every volt sits, the capacitance it charges, and
whether the insulation will stand it.

Pure functions on SI numbers.  The chain is

``end_potential`` (from the hookup network, per 1 V across the terminals)
→ :func:`turn_potentials` → :func:`adjacent_voltages` / :func:`worst_neighbour_voltage`
→ :func:`pair_capacitances` → :func:`energy_method_capacitance`
→ :func:`self_resonance` and :func:`insulation_verdict`, all gathered by
:func:`assess`.

Voltage-map convention
----------------------
Quasi-static: each turn of a strand carries the same EMF and the same
resistive drop, so the potential falls linearly along the strand.  A turn is
represented by the potential at its middle,
``V(k) = V_start + (k + 1/2) / N * (V_finish - V_start)`` for turn index
``k = 0 … N-1``; neighbouring turns of one strand then differ by exactly
``ΔV/N``.  Potentials are complex phasors for 1 V across the terminals
(terminal 2 at 0 V); peak volts are ``|ΔV| × applied peak``.
"""

from __future__ import annotations

import csv
import math
from functools import lru_cache
from importlib import resources

import numpy as np
from scipy import constants

from .layout import TOROID_GAP_DEG, Layout, neighbours

EPS0 = constants.epsilon_0

#: Relative permittivity of polyurethane / polyester-imide enamel films (memory: 3–4).
ENAMEL_EPS_R = 3.5
#: Relative permittivity of polyester (PET) layer tape (memory: about 3.2).
TAPE_EPS_R = 3.2
#: Working fraction of the wire's published minimum breakdown voltage
#: (common practice: a safety factor of 4, memory).
DERATING = 0.25
#: Paschen's minimum for air at 1 atm, about 327 V near a 7.5 µm gap (seen).
PASCHEN_MIN_VPK = 327.0
#: Twisted-pair partial-discharge inception voltage at 20 °C (memory: 500–900 V peak).
PDIV_VPK = 500.0
#: PDIV falls 20–30 % at running temperature (memory); 25 % is taken.
PDIV_HOT_FACTOR = 0.75
#: Duty frequency must stay below this fraction of self-resonance (common practice).
SRF_FRACTION = 1.0 / 3.0
#: Hipot test duration (common practice, 1 min).
HIPOT_DURATION_S = 60.0
HIPOT_BASIS = "2U + 1000 V for 1 min (common practice; the applicable standard governs)"

# Paschen constants for air, Townsend form (Bazelyan & Raizer; A = 15 /(cm·Torr),
# B = 365 V/(cm·Torr), gamma = 0.01), converted to SI.
_TORR_CM = constants.torr * 1e-2  # [Pa·m]
PASCHEN_A = 15.0 / _TORR_CM       # [1/(Pa·m)]
PASCHEN_B = 365.0 / _TORR_CM      # [V/(Pa·m)]
PASCHEN_GAMMA = 0.01

_STRAND_LETTERS = "ABCDEFGH"


def strand_letter(s: int) -> str:
    """``0 → "A"``, ``1 → "B"`` …"""
    return _STRAND_LETTERS[int(s)]


# --------------------------------------------------------------------------
# Voltage map
# --------------------------------------------------------------------------

def turn_potentials(layout: Layout, end_potential) -> np.ndarray:
    """Potential of every turn for 1 V across the terminals.

    Parameters
    ----------
    layout : Layout
        The winding.
    end_potential : array_like, complex, shape (strands, 2)
        Potential of the [start, finish] of each strand for 1 V across the
        terminals. [V/V]

    Returns
    -------
    v : ndarray, complex, shape (n_turns,)
        Potential of each turn's midpoint, ``V_start + (k + 1/2)/N (V_finish -
        V_start)`` for turn index ``k`` of ``N``. [V/V]

    References
    ----------
    Quasi-static voltage distribution of a winding (uniform EMF and resistive
    drop per turn), common practice; valid well below self-resonance.
    """
    ends = np.asarray(end_potential, dtype=complex).reshape(layout.strands, 2)
    start = ends[layout.strand, 0]
    finish = ends[layout.strand, 1]
    frac = (layout.index + 0.5) / layout.turns_per_strand
    return start + frac * (finish - start)


def adjacent_voltages(layout: Layout, potentials, applied_peak):
    """Peak voltage between every pair of physically adjacent conductors.

    Parameters
    ----------
    layout : Layout
        The winding.
    potentials : ndarray, complex
        Turn potentials per 1 V across the terminals, from :func:`turn_potentials`. [V/V]
    applied_peak : float
        Peak voltage across the terminals (the DC value for DC duty). [V]

    Returns
    -------
    i, j : ndarray of int
        Turn indices of each adjacent pair (see :func:`windsheet.layout.neighbours`).
    kind : ndarray of str
        ``"side"``, ``"layer"`` or ``"lead"``.
    dv_peak : ndarray
        Peak voltage between the two conductors. [V]

    References
    ----------
    Common practice: the stress between neighbours is the magnitude of the
    difference of their phasor potentials.
    """
    i, j, kind = neighbours(layout)
    v = np.asarray(potentials, dtype=complex)
    return i, j, kind, np.abs(v[i] - v[j]) * float(applied_peak)


def describe_pair(layout: Layout, i: int, j: int, kind: str) -> str:
    """Shop-floor words for where a pair of turns sits (1-based turn numbers)."""
    def turn(t):
        return f"strand {strand_letter(layout.strand[t])} turn {int(layout.index[t]) + 1}"

    li, lj = int(layout.layer[i]) + 1, int(layout.layer[j]) + 1
    if kind == "layer":
        lo, hi = (i, j) if li < lj else (j, i)
        return (f"{turn(lo)} (layer {min(li, lj)}) under {turn(hi)} "
                f"(layer {max(li, lj)})")
    if kind == "lead":
        return f"{turn(i)} next to {turn(j)} across the start-finish gap, layer {li}"
    return f"{turn(i)} next to {turn(j)}, layer {li}"


def worst_neighbour_voltage(layout: Layout, potentials, applied_peak, kinds=None) -> dict:
    """The largest peak voltage between adjacent conductors, and where it is.

    Parameters
    ----------
    layout : Layout
        The winding.
    potentials : ndarray, complex
        Turn potentials per 1 V across the terminals. [V/V]
    applied_peak : float
        Peak voltage across the terminals. [V]
    kinds : iterable of str or None
        Restrict to these neighbour kinds (e.g. ``{"layer"}``); all by default.

    Returns
    -------
    worst : dict
        ``voltage_Vpk`` [V], ``i``, ``j`` (array indices), ``kind``,
        ``strands`` (letters), ``turns`` (1-based), ``layer`` (1-based, of
        turn ``i``), ``layers`` (1-based, both) and ``where`` (text).  With no
        adjacent pair, ``voltage_Vpk`` is 0 and the rest ``None``.

    References
    ----------
    Common practice (see :func:`adjacent_voltages`).
    """
    i, j, kind, dv = adjacent_voltages(layout, potentials, applied_peak)
    if kinds is not None:
        keep = np.isin(kind, list(kinds))
        i, j, kind, dv = i[keep], j[keep], kind[keep], dv[keep]
    if dv.size == 0:
        return {"voltage_Vpk": 0.0, "i": None, "j": None, "kind": None, "strands": None,
                "turns": None, "layer": None, "layers": None, "where": None}
    w = int(np.argmax(dv))
    a, b, k = int(i[w]), int(j[w]), str(kind[w])
    return {
        "voltage_Vpk": float(dv[w]),
        "i": a, "j": b, "kind": k,
        "strands": [strand_letter(layout.strand[a]), strand_letter(layout.strand[b])],
        "turns": [int(layout.index[a]) + 1, int(layout.index[b]) + 1],
        "layer": int(layout.layer[a]) + 1,
        "layers": [int(layout.layer[a]) + 1, int(layout.layer[b]) + 1],
        "where": describe_pair(layout, a, b, k),
    }


# --------------------------------------------------------------------------
# Capacitance
# --------------------------------------------------------------------------

@lru_cache(maxsize=1)
def medhurst_table():
    """Medhurst's shape factor table: (ℓ/D array, H array [pF/cm])."""
    with resources.files("windsheet").joinpath("data", "medhurst.csv").open(encoding="utf-8") as fh:
        rows = sorted(csv.DictReader(fh), key=lambda r: float(r["length_over_diameter"]))
    x = np.array([float(r["length_over_diameter"]) for r in rows])
    h = np.array([float(r["H_pF_per_cm"]) for r in rows])
    return x, h


def medhurst_H(length_over_diameter):
    """Medhurst's shape factor H, interpolated linearly in his table.

    Parameters
    ----------
    length_over_diameter : float or ndarray
        Winding length over coil diameter. [-]

    Returns
    -------
    H : float or ndarray
        Self-capacitance per unit diameter. [pF/cm]  Outside the table
        (ℓ/D 0.1–50) the end segment is extended linearly; callers should warn.

    References
    ----------
    .. [1] R. G. Medhurst, "H.F. resistance and self-capacitance of
       single-layer solenoids", Wireless Engineer 24, pp. 35–43 (Feb 1947)
       and pp. 80–92 (Mar 1947).
    """
    x, h = medhurst_table()
    q = np.asarray(length_over_diameter, dtype=float)
    out = np.interp(q, x, h)
    lo_slope = (h[1] - h[0]) / (x[1] - x[0])
    hi_slope = (h[-1] - h[-2]) / (x[-1] - x[-2])
    out = np.where(q < x[0], h[0] + lo_slope * (q - x[0]), out)
    out = np.where(q > x[-1], h[-1] + hi_slope * (q - x[-1]), out)
    return float(out) if out.ndim == 0 else out


def medhurst_in_table(length_over_diameter) -> bool:
    x, _ = medhurst_table()
    return bool(x[0] <= length_over_diameter <= x[-1])


def medhurst_self_capacitance(diameter, length):
    """Self-capacitance of a single-layer solenoid, C = H·D pF with D in cm.

    Parameters
    ----------
    diameter : float or ndarray
        Coil diameter (to the turn centres). [m]
    length : float or ndarray
        Winding length. [m]

    Returns
    -------
    C : float or ndarray
        Self-capacitance. [F]  Medhurst claims about ±5 %.

    References
    ----------
    .. [1] R. G. Medhurst, Wireless Engineer 24 (Feb/Mar 1947); table of H
       in windsheet/data/medhurst.csv.
    """
    h = medhurst_H(np.asarray(length, dtype=float) / np.asarray(diameter, dtype=float))
    return h * 1e-12 * np.asarray(diameter, dtype=float) * 100.0


def two_wire_capacitance_per_length(spacing, diameter, eps_r=1.0):
    """Capacitance per length between two parallel round wires.

    Parameters
    ----------
    spacing : float or ndarray
        Centre-to-centre distance D. [m]
    diameter : float or ndarray
        Conductor (bare copper) diameter d. [m]
    eps_r : float
        Relative permittivity of the surrounding medium. [-]

    Returns
    -------
    C' : float or ndarray
        ``π ε0 εr / acosh(D/d)``. [F/m]

    Notes
    -----
    Exact for a uniform medium.  Enamelled turns sit in a mixed medium (two
    enamel films plus air); taking the enamel's εr throughout overstates C'
    about twofold for touching turns (208 pF/m for 0.45 mm copper, 0.50 mm
    overall, εr 3.5, against 111 pF/m from
    :func:`turn_to_turn_capacitance_per_length`).  Adjacent turns therefore
    use :func:`side_by_side_capacitance_per_length`; this function stays as
    the uniform-medium building block.

    References
    ----------
    .. [1] Two-wire transmission line capacitance, e.g. S. Ramo, J. R. Whinnery,
       T. Van Duzer, Fields and Waves in Communication Electronics (memory).
    """
    return math.pi * EPS0 * eps_r / np.arccosh(np.asarray(spacing, dtype=float) /
                                               np.asarray(diameter, dtype=float))


def _enamel_log_ratio(copper_diameter, overall_diameter):
    cu = np.asarray(copper_diameter, dtype=float)
    ov = np.asarray(overall_diameter, dtype=float)
    if np.any(ov <= cu):
        raise ValueError("overall diameter must exceed the copper diameter (enamelled wire)")
    return np.log(ov / cu)  # ln(1 + t/r)


def turn_to_turn_capacitance_per_length(copper_diameter, overall_diameter, eps_r=ENAMEL_EPS_R):
    """Capacitance per length between two touching enamelled round turns.

    Massarini & Kazimierczuk's turn-to-turn model: the field between the
    copper surfaces is split into elementary flux tubes at angle θ from the
    line of centres, each crossing two enamel films (coaxial, together
    ``ε0 εr / (2 ln(1 + t/r))`` per unit angle) in series with the air gap
    between the films, ``D_o (1 − cos θ)`` long (``ε0 / (2(1 − cos θ))`` per
    unit angle).  Each tube is given the smaller of the two: the films below
    the angle θ* where they are equal, the air above it.  The cell ends at
    θ = π/6, where the neighbours of close-packed round wire take over.
    Integrated over −π/6 … π/6:

    ``C' = ε0 [εr θ* / ln(1 + t/r) + cot(θ*/2) − cot(π/12)]``,
    ``θ* = arccos(1 − ln(1 + t/r) / εr)``.

    Parameters
    ----------
    copper_diameter : float or ndarray
        Bare conductor diameter, 2r. [m]
    overall_diameter : float or ndarray
        Diameter over the enamel, 2(r + t); must exceed ``copper_diameter``. [m]
    eps_r : float
        Relative permittivity of the enamel. [-]

    Returns
    -------
    C' : float or ndarray
        Capacitance per length of turn. [F/m]  Multiply by the mean turn
        length ``l_t`` for the turn-to-turn capacitance.

    Notes
    -----
    Where the films are so thick (or εr so low) that θ* would pass π/6, the
    whole cell is enamel-governed and θ* is held at π/6 (derived: the
    piecewise integrand is then ``εr / ln(1 + t/r)`` throughout).  Taking the
    smaller of the two series elements at each angle overstates the exact
    series integral, by at most 2× and about 1.35× for ordinary enamel
    (computed); expect it to err towards a lower self-resonance.
    0.45 mm copper, 0.50 mm overall, εr 3.5: 110.9 pF/m (computed).

    References
    ----------
    .. [1] A. Massarini, M. K. Kazimierczuk, "Self-capacitance of inductors",
       IEEE Trans. Power Electronics 12(4):671, July 1997 (title, authors,
       issue, date and first page seen on a stored copy, volume from memory;
       the expression seen in a third-party implementation and re-derived
       here, not read in the paper itself).
    """
    lnr = _enamel_log_ratio(copper_diameter, overall_diameter)
    cos_star = np.clip(1.0 - lnr / eps_r, math.cos(math.pi / 6.0), 1.0)
    theta = np.arccos(cos_star)
    c = EPS0 * (eps_r * theta / lnr + 1.0 / np.tan(theta / 2.0) - 1.0 / math.tan(math.pi / 12.0))
    return float(c) if np.ndim(c) == 0 else c


def enamelled_two_wire_capacitance_per_length(spacing, copper_diameter, overall_diameter,
                                              eps_r=ENAMEL_EPS_R):
    """Two-wire line of enamelled wires in air.

    Each wire's enamel is a coaxial film in series with a two-wire line in
    air between the enamel surfaces:
    ``C' = π ε0 / [acosh(D / D_o) + ln(D_o / d) / εr]``.

    Parameters
    ----------
    spacing : float or ndarray
        Centre-to-centre distance D; values below the overall diameter are
        taken as touching. [m]
    copper_diameter : float or ndarray
        Bare conductor diameter d. [m]
    overall_diameter : float or ndarray
        Diameter over the enamel D_o. [m]
    eps_r : float
        Relative permittivity of the enamel. [-]

    Returns
    -------
    C' : float or ndarray
        Capacitance per length. [F/m]

    Notes
    -----
    Derived (series combination).  It treats the enamel surfaces as
    equipotentials carrying charge all round, which holds once the spacing is
    well above the overall diameter (it tends to the exact line as D/D_o
    grows) and fails for touching wires, where it grows without bound as the
    air term vanishes.  With no enamel it is the two-wire line in air.

    References
    ----------
    .. [1] Two-wire line (see :func:`two_wire_capacitance_per_length`) and
       the coaxial capacitor ``2π ε0 εr / ln(b/a)`` per film (standard
       electrostatics, memory).
    """
    lnr = _enamel_log_ratio(copper_diameter, overall_diameter)
    ratio = np.maximum(np.asarray(spacing, dtype=float) / np.asarray(overall_diameter, dtype=float),
                       1.0)
    c = math.pi * EPS0 / (np.arccosh(ratio) + lnr / eps_r)
    return float(c) if np.ndim(c) == 0 else c


def side_by_side_capacitance_per_length(spacing, copper_diameter, overall_diameter,
                                        eps_r=ENAMEL_EPS_R):
    """Capacitance per length between two parallel enamelled turns, any spacing.

    The smaller of Massarini & Kazimierczuk's touching-turn value
    (:func:`turn_to_turn_capacitance_per_length`) and the enamelled two-wire
    line (:func:`enamelled_two_wire_capacitance_per_length`).

    Parameters
    ----------
    spacing : float or ndarray
        Centre-to-centre distance. [m]
    copper_diameter, overall_diameter : float or ndarray
        Bare and overall wire diameters. [m]
    eps_r : float
        Relative permittivity of the enamel. [-]

    Returns
    -------
    C' : float or ndarray
        Capacitance per length. [F/m]

    Notes
    -----
    Why the smaller: capacitance can only fall as two turns part, so the
    touching value bounds every spaced pair; the two-wire line overstates
    near contact and becomes right as the turns separate.  The rule is
    continuous and never rises with spacing.  It hands over where the two
    meet, a gap of a few per cent of the overall diameter for ordinary
    enamel (0.50 mm wire, grade 2, εr 3.5: about D = 1.03 D_o, computed);
    below that it holds the touching value, which overstates a small gap.

    References
    ----------
    .. [1] A. Massarini, M. K. Kazimierczuk, IEEE Trans. Power Electronics
       12(4):671, 1997 (see :func:`turn_to_turn_capacitance_per_length`).
    .. [2] Two-wire line with coaxial enamel films (derived; see
       :func:`enamelled_two_wire_capacitance_per_length`).
    """
    return np.minimum(turn_to_turn_capacitance_per_length(copper_diameter, overall_diameter, eps_r),
                      enamelled_two_wire_capacitance_per_length(spacing, copper_diameter,
                                                                overall_diameter, eps_r))


def equivalent_layer_gap(layer_spacing, copper_diameter, tape=0.0, eps_r=ENAMEL_EPS_R,
                         tape_eps_r=TAPE_EPS_R):
    """Equivalent parallel-plate gap between two layers of round wire.

    Each layer of round conductors is replaced by a plate at the face of
    Dowell's equal-area square conductor (side ``d·√π/2``); the space between
    the faces holds the tape and, for the rest, enamel and air taken at the
    enamel's permittivity.

    Parameters
    ----------
    layer_spacing : float
        Radial distance between the layers' conductor centres. [m]
    copper_diameter : float
        Bare conductor diameter. [m]
    tape : float
        Layer tape thickness. [m]
    eps_r, tape_eps_r : float
        Relative permittivity of the enamel and of the tape. [-]

    Returns
    -------
    gap : float
        Gap filled with a medium of relative permittivity ``eps_r`` giving the
        same capacitance per area. [m]

    Notes
    -----
    Derived, common practice; expect the layer capacitance it gives to be
    within some tens of percent of a field solution.

    References
    ----------
    .. [1] P. L. Dowell, "Effects of eddy currents in transformer windings",
       Proc. IEE 113(8):1387, 1966 (equal-area square conductor).
    """
    face = copper_diameter * math.sqrt(math.pi) / 2.0
    between = max(layer_spacing - face, 1e-12)
    tape = min(tape, between)
    return (between - tape) + tape * eps_r / tape_eps_r


def layer_capacitance(area, gap, eps_r=ENAMEL_EPS_R):
    """Parallel-plate capacitance between two layers.

    Parameters
    ----------
    area : float
        Facing area, overlap width × mean turn length. [m²]
    gap : float
        Equivalent gap, from :func:`equivalent_layer_gap`. [m]
    eps_r : float
        Relative permittivity the gap is expressed in. [-]

    Returns
    -------
    C : float
        ``ε0 εr A / gap``. [F]

    References
    ----------
    Parallel-plate capacitor (standard electrostatics); layer-plane model of a
    layer winding, common practice.
    """
    return EPS0 * eps_r * area / gap


def _lead_spacing(layout: Layout, i, j):
    # A full toroid layer spans (360 - gap)/360 of the circumference; the start
    # and finish face each other across the rest.  Fewer turns leave a wider
    # gap, so this is the closest (largest-capacitance) case.
    span = np.abs(layout.z[j] - layout.z[i]) + layout.overall_diameter
    circumference = span * 360.0 / (360.0 - TOROID_GAP_DEG)
    return np.maximum(circumference - np.abs(layout.z[j] - layout.z[i]),
                      layout.overall_diameter)


def pair_capacitances(layout: Layout, eps_r=ENAMEL_EPS_R, tape_eps_r=TAPE_EPS_R):
    """Capacitance of each adjacent pair of conductors.

    Side pairs (and a toroid's start–finish lead pair): enamelled turns at
    the pair's centre spacing (:func:`side_by_side_capacitance_per_length`:
    Massarini & Kazimierczuk when touching, two-wire line with air beyond the
    enamel when spaced) over the mean turn length.  Layer pairs: the
    parallel-plate capacitance between the two layers, shared equally among
    the pairs found between them.

    Parameters
    ----------
    layout : Layout
        The winding.
    eps_r, tape_eps_r : float
        Relative permittivity of the enamel and the layer tape. [-]

    Returns
    -------
    i, j : ndarray of int
        Pair turn indices (as :func:`windsheet.layout.neighbours`).
    kind : ndarray of str
    C : ndarray
        Capacitance of each pair. [F]
    layer_C : dict
        ``{(layer, layer + 1): C}`` whole-layer capacitances. [F]

    References
    ----------
    See :func:`side_by_side_capacitance_per_length`, :func:`layer_capacitance`,
    :func:`equivalent_layer_gap`.
    """
    i, j, kind = neighbours(layout)
    c = np.zeros(i.size)
    d_cu, d_ov = layout.copper_diameter, layout.overall_diameter
    length = 0.5 * (layout.turn_length[i] + layout.turn_length[j])

    side = kind == "side"
    spacing = np.hypot(layout.r[i] - layout.r[j], layout.z[i] - layout.z[j])
    c[side] = side_by_side_capacitance_per_length(spacing[side], d_cu, d_ov, eps_r) * length[side]

    lead = kind == "lead"
    if lead.any():
        c[lead] = side_by_side_capacitance_per_length(
            _lead_spacing(layout, i[lead], j[lead]), d_cu, d_ov, eps_r) * length[lead]

    layer_C = {}
    share = layout.pitch / layout.strands  # axial width each turn occupies
    lower = np.minimum(layout.layer[i], layout.layer[j])
    for lay in range(layout.layers - 1):
        sel = (kind == "layer") & (lower == lay)
        if not sel.any():
            continue
        za, zb = layout.z[layout.layer == lay], layout.z[layout.layer == lay + 1]
        overlap = (min(za.max(), zb.max()) - max(za.min(), zb.min())) + share
        mlt = 0.5 * (layout.turn_length[layout.layer == lay].mean()
                     + layout.turn_length[layout.layer == lay + 1].mean())
        h = abs(float(np.mean(layout.r[layout.layer == lay + 1]))
                - float(np.mean(layout.r[layout.layer == lay])))
        gap = equivalent_layer_gap(h, d_cu, layout.tape, eps_r, tape_eps_r)
        cl = layer_capacitance(max(overlap, share) * mlt, gap, eps_r)
        layer_C[(lay, lay + 1)] = cl
        c[sel] = cl / sel.sum()
    return i, j, kind, c, layer_C


def energy_method_capacitance(pair_C, pair_dV, V=1.0):
    """Equivalent terminal capacitance storing the same electric energy.

    Parameters
    ----------
    pair_C : array_like
        Capacitance of each adjacent pair. [F]
    pair_dV : array_like
        Voltage (amplitude, or phasor magnitude) across each pair. [V]
    V : float
        Voltage across the terminals, in the same measure. [V]

    Returns
    -------
    C_eq : float
        ``Σ C_ij |ΔV_ij|² / |V|²``. [F]

    References
    ----------
    Energy method for the equivalent capacitance of a winding, common
    practice (e.g. two strands series-aiding, V/2 apart everywhere, give a
    quarter of their strand-to-strand capacitance).
    """
    c = np.asarray(pair_C, dtype=float)
    dv = np.abs(np.asarray(pair_dV))
    return float(np.sum(c * dv ** 2) / abs(V) ** 2)


def self_resonance(inductance, capacitance):
    """Self-resonant frequency of the terminal L with its equivalent C.

    Parameters
    ----------
    inductance : float
        Terminal inductance. [H]
    capacitance : float
        Terminal capacitance. [F]

    Returns
    -------
    f : float
        ``1 / (2π √(LC))``. [Hz]  ``inf`` when either is zero.

    References
    ----------
    LC resonance, standard circuit theory.
    """
    lc = float(inductance) * float(capacitance)
    return math.inf if lc <= 0 else 1.0 / (2.0 * math.pi * math.sqrt(lc))


# --------------------------------------------------------------------------
# Insulation
# --------------------------------------------------------------------------

def paschen_breakdown(pd, A=PASCHEN_A, B=PASCHEN_B, gamma=PASCHEN_GAMMA):
    """Breakdown voltage of a uniform gas gap by Paschen's law.

    Parameters
    ----------
    pd : float or ndarray
        Pressure × gap. [Pa·m]
    A : float
        Saturation ionisation constant, air: 15 /(cm·Torr). [1/(Pa·m)]
    B : float
        Constant related to ionisation energy, air: 365 V/(cm·Torr). [V/(Pa·m)]
    gamma : float
        Secondary electron emission coefficient (0.01 usual). [-]

    Returns
    -------
    V : float or ndarray
        ``B pd / (ln(A pd) − ln ln(1 + 1/γ))``; ``inf`` left of the curve's
        asymptote, where the gap is too short for an avalanche. [V]

    References
    ----------
    .. [1] F. Paschen, Ann. Phys. 273(5):69, 1889.
    .. [2] Constants for air: E. M. Bazelyan, Yu. P. Raizer, Spark Discharge
       (1998); Yu. P. Raizer, Gas Discharge Physics (1991) (memory; also seen
       in secondary copies).
    """
    x = np.asarray(pd, dtype=float)
    denom = np.log(A * x) - math.log(math.log1p(1.0 / gamma))
    with np.errstate(divide="ignore", invalid="ignore"):
        v = np.where(denom > 0, B * x / np.where(denom > 0, denom, 1.0), np.inf)
    return float(v) if v.ndim == 0 else v


def paschen_minimum(A=PASCHEN_A, B=PASCHEN_B, gamma=PASCHEN_GAMMA):
    """Paschen's minimum, from d V/d(pd) = 0.

    Returns
    -------
    pd_min : float
        ``e ln(1 + 1/γ) / A``. [Pa·m]
    V_min : float
        ``e B ln(1 + 1/γ) / A``. [V]

    References
    ----------
    As :func:`paschen_breakdown`.
    """
    k = math.e * math.log1p(1.0 / gamma) / A
    return k, B * k


def _volts(v) -> str:
    """A voltage to 3 significant figures, never in exponent form: 4.37, 163, 1150."""
    v = float(v)
    if v == 0 or not math.isfinite(v):
        return f"{v:.0f}"
    r = round(v, 2 - math.floor(math.log10(abs(v))))
    return f"{r:.{max(0, 2 - math.floor(math.log10(abs(r))))}f}"


def insulation_verdict(worst_Vpk, breakdown_V, derating=DERATING, paschen_min_Vpk=PASCHEN_MIN_VPK,
                       pdiv_Vpk=PDIV_VPK, pdiv_hot_factor=PDIV_HOT_FACTOR, layer_Vpk=0.0,
                       tape_rating_V=None, ac=True) -> dict:
    """Judge turn and layer insulation: pass, marginal or fail.

    Policy
    ------
    * **fail** — worst adjacent peak above ``derating × breakdown``; layer-to-
      layer peak above the tape's rated voltage; on AC duty, worst adjacent
      peak above the hot PDIV (``pdiv × pdiv_hot_factor``): partial discharge
      then runs every cycle and erodes ordinary enamel.
    * **marginal** — worst adjacent peak above Paschen's minimum (partial
      discharge is possible in the air wedges between turns) but not a fail;
      on DC duty above Paschen's minimum (steady DC does not sustain
      discharge, switching surges may).
    * **pass** — otherwise.

    The wire's published breakdown (a minimum on straight new wire, by
    twisted-pair test) is compared with the peak working voltage as it
    stands; if the published figure is an rms test value, this is
    conservative by up to √2.

    Parameters
    ----------
    worst_Vpk : float
        Worst peak voltage between adjacent conductors. [V]
    breakdown_V : float
        Wire's published minimum breakdown voltage. [V]
    derating : float
        Fraction of the breakdown allowed in service. [-]
    paschen_min_Vpk : float
        Paschen's minimum for air. [V]
    pdiv_Vpk : float
        Partial-discharge inception voltage of the wire at 20 °C. [V]
    pdiv_hot_factor : float
        PDIV at running temperature over PDIV at 20 °C. [-]
    layer_Vpk : float
        Worst peak voltage between layers. [V]
    tape_rating_V : float or None
        Rated voltage of the layer tape; ``None`` skips that check. [V]
    ac : bool
        AC duty (``False`` for DC).

    Returns
    -------
    verdict : dict
        ``verdict``, ``reasons`` (text), and every number behind it.

    References
    ----------
    Paschen's minimum ~327 V (seen); PDIV 500–900 V peak, 20–30 % lower hot
    (memory); derating to a quarter of breakdown, common practice (memory).
    """
    allowed = derating * breakdown_V
    pdiv_hot = pdiv_Vpk * pdiv_hot_factor
    fails, marginals = [], []
    w = worst_Vpk
    if w > allowed:
        fails.append(f"Worst turn-to-turn voltage {_volts(w)} V peak is over the allowed "
                     f"{_volts(allowed)} V peak ({derating:.0%} of the wire's {_volts(breakdown_V)} V "
                     "breakdown): use a heavier enamel grade or change the hookup.")
    if tape_rating_V is not None and layer_Vpk > tape_rating_V:
        fails.append(f"Layer-to-layer voltage {_volts(layer_Vpk)} V peak is over the layer tape's "
                     f"{_volts(tape_rating_V)} V rating: use more tape wraps or a higher-rated tape.")
    if ac and w > pdiv_hot:
        fails.append(f"Worst turn-to-turn voltage {_volts(w)} V peak is over the hot partial-discharge "
                     f"inception voltage {_volts(pdiv_hot)} V peak ({_volts(pdiv_Vpk)} V at 20 °C less "
                     f"{1 - pdiv_hot_factor:.0%}): discharges will eat the enamel over time.")
    if not fails and w > paschen_min_Vpk:
        if ac:
            marginals.append(f"Worst turn-to-turn voltage {_volts(w)} V peak is above Paschen's minimum "
                             f"{_volts(paschen_min_Vpk)} V peak, so partial discharge between turns is "
                             f"possible, though below the hot inception voltage {_volts(pdiv_hot)} V peak.")
        else:
            marginals.append(f"Worst turn-to-turn voltage {_volts(w)} V DC is above Paschen's minimum "
                             f"{_volts(paschen_min_Vpk)} V: steady DC will not sustain discharge, but "
                             "switch-on and switch-off surges may.")
    if fails:
        verdict, reasons = "fail", fails
    elif marginals:
        verdict, reasons = "marginal", marginals
    else:
        verdict = "pass"
        reasons = [f"Worst turn-to-turn voltage {_volts(w)} V peak is below Paschen's minimum "
                   f"{_volts(paschen_min_Vpk)} V peak (no partial discharge can start between turns) "
                   f"and within the allowed {_volts(allowed)} V peak."]
        if tape_rating_V is not None and layer_Vpk > 0:
            reasons.append(f"Layer-to-layer voltage {_volts(layer_Vpk)} V peak is within the tape's "
                           f"{_volts(tape_rating_V)} V rating.")
    return {
        "verdict": verdict,
        "reasons": reasons,
        "worst_adjacent_Vpk": float(w),
        "breakdown_V": float(breakdown_V),
        "derating": float(derating),
        "allowed_Vpk": float(allowed),
        "margin": float(allowed / w) if w > 0 else None,
        "paschen_min_Vpk": float(paschen_min_Vpk),
        "pdiv_Vpk": float(pdiv_Vpk),
        "pdiv_hot_Vpk": float(pdiv_hot),
        "layer_Vpk": float(layer_Vpk),
        "tape_rating_V": None if tape_rating_V is None else float(tape_rating_V),
        "duty": "ac" if ac else "dc",
    }


def hipot_voltage(rated_V):
    """Suggested dielectric (hipot) test voltage, winding to core/frame.

    Parameters
    ----------
    rated_V : float
        Rated working voltage, rms (or the DC value). [V]

    Returns
    -------
    U_test : float
        ``2U + 1000``, applied for 1 min. [V rms]

    References
    ----------
    Common practice in the style of IEC 60034-1 (memory).  A labelled
    default only: the applicable product standard, local codes and licensed
    practice govern the test voltage, duration and safety.
    """
    return 2.0 * abs(float(rated_V)) + 1000.0


# --------------------------------------------------------------------------
# Everything together
# --------------------------------------------------------------------------

def _single_layer_solenoid(layout: Layout) -> bool:
    return layout.layers == 1 and layout.kind in ("cylinder", "bobbin")


def assess(layout: Layout, network, applied_V, frequency, wire_breakdown_V, *,
           inductance_H=None, eps_r=ENAMEL_EPS_R, tape_eps_r=TAPE_EPS_R, tape_rating_V=None,
           derating=DERATING, pdiv_Vpk=PDIV_VPK, pdiv_hot_factor=PDIV_HOT_FACTOR,
           paschen_min_Vpk=PASCHEN_MIN_VPK) -> dict:
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
    derating, pdiv_Vpk, pdiv_hot_factor, paschen_min_Vpk
        As :func:`insulation_verdict`.

    Returns
    -------
    result : dict
        ``worst_adjacent``, ``layer_Vpk``, ``capacitance`` {``self_F``,
        ``strand_to_strand_F``, ``layer_to_layer_F``, ``terminal_F``,
        ``method``}, ``self_resonance_Hz``, ``insulation``, ``hipot``,
        ``warnings``.  Plain floats, lists and strings (JSON-ready).

    Notes
    -----
    Terminal capacitance is the energy-method value over all adjacent pairs;
    for a single-layer solenoid Medhurst's self-capacitance is added, since
    the pair sum leaves out the stray field to the surroundings that his
    measurements capture.

    References
    ----------
    See the functions called; Medhurst 1947, Paschen 1889, Dowell 1966.
    """
    ac = frequency > 0
    peak = math.sqrt(2.0) * abs(applied_V) if ac else abs(applied_V)
    v = turn_potentials(layout, network.end_potential)
    worst = worst_neighbour_voltage(layout, v, peak)
    worst_layer = worst_neighbour_voltage(layout, v, peak, kinds={"layer"})
    layer_Vpk = worst_layer["voltage_Vpk"]

    i, j, kind, c, layer_C = pair_capacitances(layout, eps_r, tape_eps_r)
    pairs_C = energy_method_capacitance(c, v[i] - v[j], 1.0)
    warnings = []
    method = ("energy method over adjacent pairs (Massarini-Kazimierczuk between touching "
              "turns, two-wire line with air beyond the enamel between spaced ones, "
              "parallel-plate between layers)")
    self_F = None
    if _single_layer_solenoid(layout):
        diameter = 2.0 * float(np.mean(layout.r))
        length = float(layout.traverse_used)
        self_F = float(medhurst_self_capacitance(diameter, length))
        method += " plus Medhurst's self-capacitance of a single-layer solenoid"
        if not medhurst_in_table(length / diameter):
            warnings.append(f"Length/diameter {length / diameter:.2f} is outside Medhurst's table "
                            "(0.1-50): self-capacitance extrapolated.")
    terminal_F = pairs_C + (self_F or 0.0)

    other_strand = (kind == "side") & (layout.strand[i] != layout.strand[j])
    strand_F = float(c[other_strand].sum()) if layout.strands > 1 else None
    layers_F = float(sum(layer_C.values())) if layout.layers > 1 else None

    L = network.inductance if inductance_H is None else inductance_H
    srf = self_resonance(L, terminal_F)
    if ac and math.isfinite(srf):
        if frequency >= srf:
            warnings.append(f"ERROR: duty frequency {frequency:.4g} Hz is at or above the predicted "
                            f"self-resonance {srf:.4g} Hz: the coil will not act as an inductor.")
        elif frequency > SRF_FRACTION * srf:
            warnings.append(f"Duty frequency {frequency:.4g} Hz is above a third of the predicted "
                            f"self-resonance {srf:.4g} Hz: inductance will read high and the "
                            "turn voltages will not be evenly shared.")
    if layout.layers > 1 and layout.tape > 0 and tape_rating_V is None:
        warnings.append(f"Layer tape rating not given: layer-to-layer {_volts(layer_Vpk)} V peak "
                        "not checked against the tape.")

    insulation = insulation_verdict(worst["voltage_Vpk"], wire_breakdown_V, derating,
                                    paschen_min_Vpk, pdiv_Vpk, pdiv_hot_factor, layer_Vpk,
                                    tape_rating_V, ac=ac)
    worst_out = {k: worst[k] for k in ("voltage_Vpk", "where", "strands", "turns", "layer",
                                       "layers", "kind")}
    return {
        "worst_adjacent": worst_out,
        "layer_Vpk": float(layer_Vpk),
        "capacitance": {"self_F": self_F, "strand_to_strand_F": strand_F,
                        "layer_to_layer_F": layers_F, "terminal_F": float(terminal_F),
                        "method": method},
        "self_resonance_Hz": None if not math.isfinite(srf) else float(srf),
        "insulation": insulation,
        "hipot": {"voltage_V": hipot_voltage(applied_V), "duration_s": HIPOT_DURATION_S,
                  "basis": HIPOT_BASIS},
        "warnings": warnings,
    }
