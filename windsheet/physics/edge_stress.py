"""A fast edge over the turns: every turn's potential before the inductance carries current.

Composes :mod:`windsheet.physics.fast_front` (the capacitive ladder's nodal
solution, α, the uniform winding's closed form) on the winding's neighbour
pairs, whose rungs are the partial capacitances of
:mod:`windsheet.physics.row_capacitance`; :func:`windsheet.physics.stress.assess`
judges each pair at the larger of this and its steady voltage.
"""

from __future__ import annotations

import math

import numpy as np

from windsheet.physics import capacitance as cap  # noqa: F401  (doctest)

from .fast_front import (capacitive_distribution, impulse_alpha, series_capacitance,
                         uniform_initial_distribution)
from .insulation import volts
from .layout import Layout
from .voltage_map import pair_record


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


def edge_stress(layout: Layout, nb, c, edge, peak, links=None):
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
    links : tuple of (ndarray, ndarray, ndarray) or None
        Further capacitances ``(i, j, c)`` [F] between turns that share the
        charge but are not judged as pairs: across a sectioned winding's walls
        (:func:`windsheet.physics.section_layout.wall_links`).

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
    # Links (a sectioned winding's walls) carry charge between turns but are not pairs to judge.
    li, lj, lc = (nb.i, nb.j, c) if links is None else (np.concatenate([nb.i, links[0]]),
                                                        np.concatenate([nb.j, links[1]]),
                                                        np.concatenate([c, links[2]]))
    v, _ = capacitive_distribution(n, li, lj, lc, cg, held, ties)
    line = [t for t, val in held.items() if val == max(held.values())]
    earth = [t for t, val in held.items() if val != max(held.values())]
    cs = series_capacitance(n, li, lj, lc, line, earth, ties) if earth else 0.0
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
              "method": "initial capacitive distribution: neighbour-pair capacitances (a spaced turn's "
                        "partial capacitance among its neighbours in a row, Maxwell's potential "
                        "coefficients) and the ground capacitance spread evenly over the turns "
                        "(inductance carries no current yet)"}
    return v, ends, dv, report


def edge_reason(rep):
    alpha = "" if rep["alpha"] is None else f", α = {rep['alpha']:.3g}"
    given = "given" if rep["ground_capacitance_given"] else "assumed, not given in the order"
    return (f"Under the fast edge ({volts(rep['edge_Vpk'])} V peak, initial capacitive distribution{alpha}, "
            f"ground capacitance {rep['ground_capacitance_F'] * 1e12:.3g} pF {given}) the first turn takes "
            f"{volts(rep['first_turn_Vpk'])} V peak against an even share of "
            f"{volts(rep['first_turn_uniform_Vpk'])} V, and the worst pair {volts(rep['worst_pair_Vpk'])} V peak "
            f"({rep['worst_pair_where']}); each pair is judged at the larger of this and its steady voltage.")
