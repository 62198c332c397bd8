"""Partial capacitance of a turn among its neighbours in a row, for the fast-edge network.

Pure functions on SI numbers.  Under a fast edge the turns form a capacitive
ladder; the capacitance of a rung is the *partial* (Maxwell mutual)
capacitance between two neighbours with every other turn present, which is
lower than the isolated two-wire line: the turns beyond take part of each
one's field.  It is found here by Maxwell's method of potential
coefficients on a long straight row of enamelled wires, each a line charge
at its centre inside a coaxial film.  Touching turns keep Massarini &
Kazimierczuk's cell, which already ends where the next neighbours' field
begins.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from .constants import EPSILON_0 as EPS0
from .conductor_capacitance import ENAMEL_EPS_R

#: Wires in the row whose middle pair is taken: the value is within 0.1 % of
#: the infinite row's from 41 on (computed: 7.081 pF/m at 41, 7.074 at 401,
#: 0.45/0.50 mm wire at 2 mm pitch).
ROW_WIRES = 41


@lru_cache(maxsize=256)
def _row_mutual(pitch, copper_diameter, overall_diameter, eps_r, wires):
    k = np.arange(wires)
    dist = np.abs(k[:, None] - k[None, :]) * pitch
    # Potential coefficients (per 2π ε0) of line charges, reference at 1 m: -ln(distance) between
    # wires; on a wire's own copper, -ln(R_o) through the air plus ln(R_o/r)/εr across its film.
    P = -np.log(np.where(dist > 0, dist, 1.0))
    np.fill_diagonal(P, -math.log(overall_diameter / 2) + math.log(overall_diameter / copper_diameter) / eps_r)
    C = np.linalg.inv(P / (2 * math.pi * EPS0))
    # A floating row carries no net charge: the limit of an infinitely distant reference.
    s = C.sum(axis=1)
    C = C - np.outer(s, s) / s.sum()
    m = (wires - 1) // 2
    return float(-C[m, m + 1])


def row_mutual_capacitance_per_length(pitch, copper_diameter, overall_diameter, eps_r=ENAMEL_EPS_R,
                                      wires=ROW_WIRES):
    """Partial (Maxwell mutual) capacitance per length of two neighbours in a long row of wires.

    Parameters
    ----------
    pitch : float
        Centre-to-centre distance of neighbouring wires; well above the
        overall diameter for the line-charge form to hold (spaced turns). [m]
    copper_diameter, overall_diameter : float
        Bare and overall wire diameters. [m]
    eps_r : float
        Relative permittivity of the enamel. [-]
    wires : int
        Wires in the row; the middle pair is taken. [-]

    Returns
    -------
    C' : float
        ``-C_{m,m+1}`` of the row's Maxwell capacitance matrix, the inverse
        of the potential-coefficient matrix reduced to no net charge. [F/m]

    Notes
    -----
    With two wires it is the enamelled two-wire line in the thin-wire form,
    ``π ε0 / [ln(D / R_o) + ln(D_o / d) / εr]``.  Against a 2-D
    finite-difference solution of a row of seven bare wires at four
    diameters' pitch: within 2 % (computed, tests/test_row_capacitance.py).

    References
    ----------
    .. [1] J. C. Maxwell, A Treatise on Electricity and Magnetism (1873),
       vol. 1, §86–87: coefficients of potential and of capacitance
       (induction) of a system of conductors.
    .. [2] Line-charge potential coefficients of parallel round conductors,
       as for overhead-line capacitance: J. J. Grainger, W. D. Stevenson,
       Power System Analysis (1994), ch. 5 (memory).

    Examples
    --------
    >>> round(row_mutual_capacitance_per_length(2e-3, 0.45e-3, 0.5e-3) * 1e12, 2)   # pF/m
    7.08
    >>> round(row_mutual_capacitance_per_length(2e-3, 0.45e-3, 0.5e-3, wires=2) * 1e12, 2)
    13.19
    """
    return _row_mutual(float(pitch), float(copper_diameter), float(overall_diameter), float(eps_r),
                       int(wires))


def edge_pair_capacitances(layout, nb, c, eps_r=ENAMEL_EPS_R):
    """The neighbour pairs' capacitances for the fast-edge ladder: spaced side pairs as in a row.

    Parameters
    ----------
    layout : windsheet.physics.layout.Layout
        The winding (copper and overall diameters [m], turn lengths [m]).
    nb : windsheet.physics.neighbours.Neighbours
        Its neighbour pairs (``kind``, ``gap`` [m]).
    c : ndarray
        Each pair's capacitance as the stress map takes it. [F]
    eps_r : float
        Relative permittivity of the enamel. [-]

    Returns
    -------
    c_edge : ndarray
        ``c`` with every spaced side pair (a gap between the films) taken as
        the smaller of its own value and the row's partial capacitance at its
        spacing, over its mean turn length. [F]

    References
    ----------
    :func:`row_mutual_capacitance_per_length`.

    Examples
    --------
    >>> from windsheet.physics.layout import cylinder_layout
    >>> from windsheet.physics.neighbours import neighbour_pairs
    >>> from windsheet.physics.capacitance import pair_capacitances
    >>> lay = cylinder_layout(0.02, 0.1, 0.45e-3, 0.5e-3, 1, 20, pitch=2e-3, layers=1)
    >>> nb = neighbour_pairs(lay)
    >>> c = pair_capacitances(lay, pairs=nb)[3]
    >>> bool(np.all(edge_pair_capacitances(lay, nb, c) < 0.6 * c))
    True
    """
    out = np.array(c, dtype=float, copy=True)
    d_cu, d_ov = layout.copper_diameter, layout.overall_diameter
    spaced = ((nb.kind == "side") & (nb.gap > 1e-3 * d_ov)).nonzero()[0]
    if spaced.size:
        length = 0.5 * (layout.turn_length[nb.i[spaced]] + layout.turn_length[nb.j[spaced]])
        gaps = np.round(nb.gap[spaced], 9)
        per_m = {g: row_mutual_capacitance_per_length(g + d_ov, d_cu, d_ov, eps_r) for g in np.unique(gaps)}
        row = np.array([per_m[g] for g in gaps]) * length
        out[spaced] = np.minimum(out[spaced], row)
    return out
