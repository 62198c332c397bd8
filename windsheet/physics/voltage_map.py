"""Voltage map: the potential of every turn, and the voltage between neighbours.

Pure functions on SI numbers.  The hookup network gives each strand's start
and finish potential (per 1 V across the terminals, terminal 2 at 0 V); the
turns in between share the strand's voltage in proportion to their own drop,

``drop_k = R'·ℓ_k·I_s + jω·Λ_k``

the resistive drop of the turn's own length ``ℓ_k`` and the EMF of its own
flux linkage ``Λ_k`` (:mod:`windsheet.physics.flux_linkage`).  A turn is represented
by the potential at its middle.  Quasi-static: valid well below
self-resonance, where the capacitive currents between turns are small.
"""

from __future__ import annotations

import numpy as np

from .layout import Layout
from .neighbours import neighbours

_STRAND_LETTERS = "ABCDEFGH"


def strand_letter(s: int) -> str:
    """``0 → "A"``, ``1 → "B"`` …

    Parameters
    ----------
    s : int
        Strand number, 0 = the first strand. [-]

    Returns
    -------
    letter : str
        The strand's letter as the sheets write it.

    References
    ----------
    Strands lettered A, B, … in winding order (the project's convention).

    Examples
    --------
    >>> strand_letter(0), strand_letter(np.int64(3))
    ('A', 'D')
    """
    return _STRAND_LETTERS[int(s)]


def turn_drops(layout: Layout, strand_current, frequency, ohm_per_m, flux_linkage=None):
    """Voltage drop across each turn, start to finish of its strand.

    Parameters
    ----------
    layout : Layout
        The winding.
    strand_current : array_like, complex, shape (strands,)
        Current in each strand, any common scale. [A]
    frequency : float
        Duty frequency, 0 for DC. [Hz]
    ohm_per_m : float
        Resistance of the wire per metre at the duty temperature. [Ω/m]
    flux_linkage : array_like, complex, shape (n_turns,) or None
        Flux linked by each turn for those currents. [Wb]  Ignored at DC.

    Returns
    -------
    drop : ndarray, complex, shape (n_turns,)
        ``R'·ℓ_k·I_s + j·2πf·Λ_k``. [V]

    References
    ----------
    Kirchhoff's voltage law round each turn with Faraday's law for its EMF
    (standard circuit theory); the resistance of a turn is that of its own
    length of wire (IEC 60028 resistivity, via :mod:`windsheet.physics.wire`).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 1e-3, 0.45e-3, 0.5e-3, 1, 4)   # 2 layers of 2
    >>> d = turn_drops(lay, [1.0], 0.0, 0.1)
    >>> [round(float(x), 6) for x in d.real]                      # outer turns are longer
    [0.00644, 0.00644, 0.006712, 0.006712]
    """
    current = np.asarray(strand_current, dtype=complex).reshape(layout.strands)[layout.strand]
    drop = float(ohm_per_m) * layout.turn_length * current
    if frequency > 0 and flux_linkage is not None:
        drop = drop + 2j * np.pi * float(frequency) * np.asarray(flux_linkage, dtype=complex)
    return drop


def turn_potentials(layout: Layout, end_potential, turn_drop=None, lead_drop=None) -> np.ndarray:
    """Potential of every turn for 1 V across the terminals.

    Parameters
    ----------
    layout : Layout
        The winding.
    end_potential : array_like, complex, shape (strands, 2)
        Potential of the [start, finish] of each strand for 1 V across the
        terminals. [V/V]
    turn_drop : array_like, complex, shape (n_turns,) or None
        Drop across each turn (:func:`turn_drops`), any scale per strand; by
        default every turn of a strand drops the same. [V]
    lead_drop : array_like, complex, shape (strands,) or None
        Drop along each of a strand's two leads, on the same scale; the
        strand's end potentials are taken at the far ends of its leads. [V]

    Returns
    -------
    v : ndarray, complex, shape (n_turns,)
        Potential of each turn's midpoint: the start potential less the
        share of the strand's voltage dropped before it,
        ``V_k = V_start + f_k (V_finish − V_start)``,
        ``f_k = (lead + Σ_{m<k} drop_m + drop_k/2) / (2·lead + Σ drop)``. [V/V]

    References
    ----------
    Quasi-static voltage distribution of a winding, common practice: each
    turn's share of the voltage is its own drop (Kirchhoff, Faraday).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 4, layers=1)
    >>> turn_potentials(lay, [[0.0, 1.0]]).real.tolist()
    [0.125, 0.375, 0.625, 0.875]
    """
    ends = np.asarray(end_potential, dtype=complex).reshape(layout.strands, 2)
    start = ends[layout.strand, 0]
    finish = ends[layout.strand, 1]
    if turn_drop is None:
        frac = (layout.index + 0.5) / layout.turns_per_strand
        return start + frac * (finish - start)
    drop = np.asarray(turn_drop, dtype=complex)
    lead = (np.zeros(layout.strands, dtype=complex) if lead_drop is None
            else np.asarray(lead_drop, dtype=complex).reshape(layout.strands))
    v = np.empty(layout.n_turns, dtype=complex)
    for s in range(layout.strands):
        sel = layout.strand_turns(s)
        d = drop[sel]
        total = 2.0 * lead[s] + d.sum()
        if abs(total) == 0.0:
            frac = (np.arange(sel.size) + 0.5) / sel.size
        else:
            frac = (lead[s] + np.cumsum(d) - 0.5 * d) / total
        v[sel] = start[sel] + frac * (finish[sel] - start[sel])
    return v


def pair_voltages(potentials, i, j, applied_peak):
    """Peak voltage between conductors ``i`` and ``j``.

    Parameters
    ----------
    potentials : ndarray, complex
        Conductor potentials per 1 V across the terminals. [V/V]
    i, j : ndarray of int
        Indices of the two conductors of each pair.
    applied_peak : float
        Peak voltage across the terminals (the DC value for DC duty). [V]

    Returns
    -------
    dv_peak : ndarray
        ``|V_i − V_j| × applied_peak``. [V]

    References
    ----------
    Common practice: the stress between neighbours is the magnitude of the
    difference of their phasor potentials.

    Examples
    --------
    >>> pair_voltages(np.array([0.0, 0.5j, 1.0]), np.array([0, 1]), np.array([1, 2]), 100.0).round(2).tolist()
    [50.0, 111.8]
    """
    v = np.asarray(potentials, dtype=complex)
    return np.abs(v[np.asarray(i)] - v[np.asarray(j)]) * float(applied_peak)


def adjacent_voltages(layout: Layout, potentials, applied_peak):
    """Peak voltage between every pair of neighbouring turns.

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
        Turn indices of each pair (see :func:`windsheet.physics.layout.neighbour_pairs`).
    kind : ndarray of str
        ``"side"``, ``"layer"`` or ``"lead"``.
    dv_peak : ndarray
        Peak voltage between the two conductors. [V]

    References
    ----------
    As :func:`pair_voltages`.

    Examples
    --------
    Bifilar, 5 turns a strand, series aiding at 100 V: strand A runs 100 → 50 V
    and B 50 → 0 V, 10 V a turn, so A and B of one slot are 50 V apart and B
    to the next slot's A 50 − 10 = 40 V.

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 2, 5, layers=1)
    >>> v = turn_potentials(lay, [[1.0, 0.5], [0.5, 0.0]])
    >>> i, j, kind, dv = adjacent_voltages(lay, v, 100.0)
    >>> dv.round(6).tolist()
    [50.0, 40.0, 50.0, 40.0, 50.0, 40.0, 50.0, 40.0, 50.0]
    """
    i, j, kind = neighbours(layout)
    return i, j, kind, pair_voltages(potentials, i, j, applied_peak)


def describe_turn(layout: Layout, t: int) -> str:
    """``"strand A turn 3"`` (1-based).

    Parameters
    ----------
    layout : Layout
        The winding.
    t : int
        Index of the turn into the layout arrays. [-]

    Returns
    -------
    text : str
        The turn's strand letter and its number along that strand from the start.

    References
    ----------
    Turns counted from the start lead, 1-based, as a winder counts them (common practice).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 2, 5, layers=1)
    >>> describe_turn(lay, 3)                          # bifilar: index 3 is slot 1's B
    'strand B turn 2'
    """
    return f"strand {strand_letter(layout.strand[t])} turn {int(layout.index[t]) + 1}"


def describe_pair(layout: Layout, i: int, j: int, kind: str) -> str:
    """Shop-floor words for where a pair of turns sits (1-based turn and layer numbers).

    Parameters
    ----------
    layout : Layout
        The winding.
    i, j : int
        Indices of the two turns into the layout arrays. [-]
    kind : str
        ``"side"``, ``"layer"`` or ``"lead"`` (see :func:`windsheet.physics.neighbours.neighbour_pairs`).

    Returns
    -------
    text : str
        Which turns, in which layers; a layer pair is "under" when their
        centres are less than half a diameter apart along the traverse,
        otherwise "diagonally under".

    References
    ----------
    Back-and-forth layer winding, common practice.

    Examples
    --------
    Two taped (stacked) layers of 2 turns: layer 2 winds back, so turn 4 lies
    straight over turn 1.

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 1e-3, 0.45e-3, 0.5e-3, 1, 4, tape=50e-6)
    >>> describe_pair(lay, 0, 3, "layer")
    'strand A turn 1 (layer 1) under strand A turn 4 (layer 2)'
    """
    li, lj = int(layout.layer[i]) + 1, int(layout.layer[j]) + 1
    if kind == "layer":
        lo, hi = (i, j) if li < lj else (j, i)
        over = ("under" if abs(layout.z[i] - layout.z[j]) < 0.5 * layout.overall_diameter
                else "diagonally under")
        return (f"{describe_turn(layout, lo)} (layer {min(li, lj)}) {over} {describe_turn(layout, hi)} "
                f"(layer {max(li, lj)})")
    if kind == "lead":
        return (f"{describe_turn(layout, i)} next to {describe_turn(layout, j)} across the "
                f"start-finish gap, layer {li}")
    return f"{describe_turn(layout, i)} next to {describe_turn(layout, j)}, layer {li}"


def pair_record(layout: Layout, i: int, j: int, kind: str, voltage) -> dict:
    """The JSON record of one pair of turns: voltage, strands, turns, layers, words.

    Parameters
    ----------
    layout : Layout
        The winding.
    i, j : int
        Indices of the two turns into the layout arrays. [-]
    kind : str
        ``"side"``, ``"layer"`` or ``"lead"``.
    voltage : float
        Peak voltage between the two turns. [V]

    Returns
    -------
    record : dict
        ``voltage_Vpk`` [V], ``i``, ``j``, ``kind``, ``strands`` (letters),
        ``turns`` and ``layers`` (1-based), ``layer`` (of turn ``i``) and
        ``where`` (:func:`describe_pair`).

    References
    ----------
    As :func:`describe_pair`.

    Examples
    --------
    A bifilar pair in slot 0 at 100 V series aiding: half the terminal voltage, 50 V.

    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 2, 5, layers=1)
    >>> rec = pair_record(lay, 0, 1, "side", 50.0)
    >>> rec["voltage_Vpk"], rec["strands"], rec["turns"], rec["where"]
    (50.0, ['A', 'B'], [1, 1], 'strand A turn 1 next to strand B turn 1, layer 1')
    """
    return {
        "voltage_Vpk": float(voltage),
        "i": int(i), "j": int(j), "kind": str(kind),
        "strands": [strand_letter(layout.strand[i]), strand_letter(layout.strand[j])],
        "turns": [int(layout.index[i]) + 1, int(layout.index[j]) + 1],
        "layer": int(layout.layer[i]) + 1,
        "layers": [int(layout.layer[i]) + 1, int(layout.layer[j]) + 1],
        "where": describe_pair(layout, i, j, kind),
    }


def worst_neighbour_voltage(layout: Layout, potentials, applied_peak, kinds=None) -> dict:
    """The largest peak voltage between neighbouring turns, and where it is.

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
        neighbouring pair, ``voltage_Vpk`` is 0 and the rest ``None``.

    References
    ----------
    Common practice (see :func:`pair_voltages`).

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 10, layers=1)
    >>> w = worst_neighbour_voltage(lay, turn_potentials(lay, [[0.0, 1.0]]), 100.0)
    >>> round(w["voltage_Vpk"], 6), w["kind"]
    (10.0, 'side')
    """
    i, j, kind, dv = adjacent_voltages(layout, potentials, applied_peak)
    if kinds is not None:
        keep = np.isin(kind, list(kinds))
        i, j, kind, dv = i[keep], j[keep], kind[keep], dv[keep]
    if dv.size == 0:
        return {"voltage_Vpk": 0.0, "i": None, "j": None, "kind": None, "strands": None,
                "turns": None, "layer": None, "layers": None, "where": None}
    w = int(np.argmax(dv))
    return pair_record(layout, int(i[w]), int(j[w]), str(kind[w]), dv[w])
