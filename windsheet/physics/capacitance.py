"""Capacitance of a winding: between neighbouring conductors, and at the terminals.

Pure functions on SI numbers.  Each pair of neighbours gets a capacitance
from its geometry: turns side by side by Massarini & Kazimierczuk's cell or
the two-wire line; turns in adjacent layers by the same flux tubes taken
with enamel and air (and any tape) in series, or, across a thick tape, by
parallel plates.  The terminal value is the energy method over all pairs,
``Σ C_ij |ΔV_ij|² / V²``; a single-layer solenoid adds Medhurst's
self-capacitance by the rule in :func:`single_layer_capacitance`.
"""

from __future__ import annotations

import csv
import math
from functools import lru_cache
from importlib import resources

import numpy as np

from .layout import Layout
from .neighbours import neighbour_pairs

from .conductor_capacitance import ENAMEL_EPS_R, TAPE_EPS_R, side_by_side_capacitance_per_length
from .layer_capacitance import layer_pair_capacitance_per_length, side_factor_beside_layers

@lru_cache(maxsize=1)
def medhurst_table():
    """Medhurst's shape factor table of a single-layer solenoid, ascending in ℓ/D.

    Returns
    -------
    length_over_diameter : ndarray
        Winding length over coil diameter, 0.1 to 50. [-]
    H : ndarray
        Self-capacitance per unit diameter at each ℓ/D. [pF/cm]

    References
    ----------
    .. [1] R. G. Medhurst, "H.F. resistance and self-capacitance of
       single-layer solenoids", Wireless Engineer 24, pp. 35–43 (Feb 1947)
       and pp. 80–92 (Mar 1947); the rows are in
       windsheet/physics/data/medhurst.csv with their sources.

    Examples
    --------
    >>> x, h = medhurst_table()
    >>> float(x[0]), float(x[-1]), float(h[list(x).index(2.0)])   # Medhurst 1947: H = 0.50 at ℓ/D = 2
    (0.1, 50.0, 0.5)
    """
    with resources.files("windsheet.physics").joinpath("data", "medhurst.csv").open(encoding="utf-8") as fh:
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

    Examples
    --------
    >>> round(medhurst_H(2.75), 3)        # between .56 at 2.5 and .61 at 3.0
    0.585
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
    """Whether a length over diameter lies within Medhurst's table (no extrapolation).

    Parameters
    ----------
    length_over_diameter : float
        Winding length over coil diameter. [-]

    Returns
    -------
    inside : bool
        True for 0.1 ≤ ℓ/D ≤ 50, the range Medhurst tabulated.

    References
    ----------
    .. [1] R. G. Medhurst, Wireless Engineer 24 (Feb/Mar 1947); table of H
       in windsheet/physics/data/medhurst.csv.

    Examples
    --------
    >>> medhurst_in_table(2.0), medhurst_in_table(50.0), medhurst_in_table(60.0)   # table runs 0.1–50
    (True, True, False)
    """
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

    Examples
    --------
    >>> round(float(medhurst_self_capacitance(0.1, 0.3)) * 1e12, 2)   # H = .61 at ℓ/D = 3, D = 10 cm
    6.1
    """
    h = medhurst_H(np.asarray(length, dtype=float) / np.asarray(diameter, dtype=float))
    return h * 1e-12 * np.asarray(diameter, dtype=float) * 100.0


def pair_capacitances(layout: Layout, eps_r=ENAMEL_EPS_R, tape_eps_r=TAPE_EPS_R, pairs=None):
    """Capacitance of each neighbour pair of conductors.

    Side pairs (and a toroid's start–finish pair across its gap): enamelled
    turns at the pair's centre spacing
    (:func:`side_by_side_capacitance_per_length`) over the mean turn length,
    less what the layers along the row take (:func:`side_factor_beside_layers`).
    Layer pairs that touch, or face each other straight across the tape:
    :func:`layer_pair_capacitance_per_length` over the mean turn length.
    Diagonal layer pairs that do not touch carry none of their own: the
    facing contacts' cells already hold the layer's field, and a two-wire
    line for them would count it again.

    Parameters
    ----------
    layout : Layout
        The winding.
    eps_r, tape_eps_r : float
        Relative permittivity of the enamel and the layer tape. [-]
    pairs : windsheet.physics.layout.Neighbours or None
        The layout's neighbours (found when not given).

    Returns
    -------
    i, j : ndarray of int
        Pair turn indices.
    kind : ndarray of str
    C : ndarray
        Capacitance of each pair. [F]
    layer_C : dict
        ``{(layer, layer + 1): C}``, the sum over each pair of layers. [F]

    References
    ----------
    See the functions named.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 10, layers=1)
    >>> i, j, kind, c, _ = pair_capacitances(lay)
    >>> round(float(c[0]) * 1e12, 2)           # 110.9 pF/m × 2π × 10.25 mm
    7.14
    """
    nb = neighbour_pairs(layout) if pairs is None else pairs
    i, j, kind = nb.i, nb.j, nb.kind
    c = np.zeros(i.size)
    d_cu, d_ov = layout.copper_diameter, layout.overall_diameter
    length = 0.5 * (layout.turn_length[i] + layout.turn_length[j])
    side = (kind == "side") | (kind == "lead")
    if side.any():
        c[side] = side_by_side_capacitance_per_length(nb.gap[side] + d_ov, d_cu, d_ov, eps_r) * length[side]
    facing_gap = np.where(nb.across_tape, layout.tape, 0.0)
    facing = (kind == "layer") & (nb.gap <= facing_gap + 1e-6 * d_ov)
    if facing.any():
        cl = layer_pair_capacitance_per_length(d_cu, d_ov, layout.layer_style, layout.layer_step,
                                               layout.pitch / layout.strands, eps_r, layout.tape,
                                               tape_eps_r)
        c[facing] = cl * length[facing]
    # One pass over the layer pairs (a string compare per layer was O(layers × pairs)).
    is_layer = kind == "layer"
    lower = np.minimum(layout.layer[i], layout.layer[j])[is_layer]
    if is_layer.any() and (kind == "side").any():
        # A layer along one side of two turns takes that side's field beyond their own cell.
        n_lay = layout.layers
        below = np.bincount(lower + 1, minlength=n_lay + 1)[:n_lay] > 0
        above = np.bincount(lower, minlength=n_lay)[:n_lay] > 0
        in_row = kind == "side"
        beside = (below.astype(int) + above.astype(int))[layout.layer[i[in_row]]]
        c[in_row] *= side_factor_beside_layers(d_cu, d_ov, beside, layout.layer_style, eps_r)
    sums = np.bincount(lower, weights=c[is_layer], minlength=max(layout.layers - 1, 0))
    present = np.bincount(lower, minlength=max(layout.layers - 1, 0)) > 0
    layer_C = {(lay, lay + 1): float(sums[lay]) for lay in range(layout.layers - 1) if present[lay]}
    return i, j, kind, c, layer_C


def single_layer_capacitance(medhurst_F, pair_C, pair_dV, reference_dV):
    """Terminal capacitance of a single-layer solenoid, Medhurst plus the hookup's excess.

    The rule: Medhurst's ``H·D`` is the whole self-capacitance of a
    single-strand, single-layer solenoid, the field between neighbouring
    turns included (his coils had spaced turns, each pair a share ``V/N``
    apart).  The energy method over neighbour pairs then adds only what the
    hookup stores between neighbours beyond that even share:
    ``C = C_Medhurst + max(0, Σ C_ij (|ΔV_ij|² − (V/N)²)) / V²``.  A
    single-strand coil adds nothing; a bifilar wound series-aiding adds
    about a quarter of its strand-to-strand capacitance.

    Parameters
    ----------
    medhurst_F : float
        Medhurst's self-capacitance of the coil. [F]
    pair_C : array_like
        Capacitance of each neighbour pair. [F]
    pair_dV : array_like
        Voltage across each pair per 1 V across the terminals. [V/V]
    reference_dV : float
        The even share per neighbour pair, ``1/N`` for ``N`` turns in the
        layer. [V/V]

    Returns
    -------
    C : float
        Terminal capacitance. [F]

    References
    ----------
    .. [1] R. G. Medhurst, Wireless Engineer 24, pp. 35–43 and 80–92 (1947):
       measured self-capacitance of spaced single-layer solenoids (memory for
       the pitches his coils had).
    .. [2] D. W. Knight, "The self-resonance and self-capacitance of solenoid
       coils" (2016): the inter-turn field of a single-strand coil is part
       of what Medhurst measured, not an addition to it (memory).

    Examples
    --------
    >>> single_layer_capacitance(2e-12, [10e-12] * 9, [0.1] * 9, 0.1)       # one strand
    2e-12
    >>> round(single_layer_capacitance(2e-12, [10e-12] * 9, [0.5] * 9, 0.1) * 1e12, 2)
    23.6
    """
    c = np.asarray(pair_C, dtype=float)
    dv = np.abs(np.asarray(pair_dV))
    excess = float(np.sum(c * (dv ** 2 - float(reference_dV) ** 2)))
    return float(medhurst_F) + max(0.0, excess)


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

    Examples
    --------
    >>> round(energy_method_capacitance([2e-12, 3e-12], [5.0, 10.0], 10.0) * 1e12, 3)
    3.5
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

    Examples
    --------
    >>> round(self_resonance(100e-6, 100e-12))
    1591549
    """
    lc = float(inductance) * float(capacitance)
    return math.inf if lc <= 0 else 1.0 / (2.0 * math.pi * math.sqrt(lc))


# --------------------------------------------------------------------------
# Insulation
# --------------------------------------------------------------------------
