"""The voltage a fast edge puts on a winding's turns before any current flows.

Pure functions on SI numbers.  In the first instants of a steep front the
winding's inductance carries no current, so the edge shares out over the
turns as over a network of capacitors alone: each pair of neighbouring turns
coupled by its own capacitance (:func:`windsheet.physics.capacitance.pair_capacitances`),
each turn coupled to ground (core, shield, chassis) by its share of the
ground capacitance.  With ground capacitance the line-end turns take far
more than their even share; a uniform winding's distribution is the classic
``V(x) = V0·sinh(α(1 − x))/sinh(α)``, ``α = sqrt(Cg/Cs)``.
"""

from __future__ import annotations

import math

import numpy as np

#: Capacitance from the whole winding to ground, core or shield when the
#: order gives none: an assumed small component's stray capacitance to its
#: mounting (an assumed default, not a measured value). [F]
DEFAULT_GROUND_CAPACITANCE_F = 10e-12

#: Joined strand ends are tied by a capacitance this many times the largest
#: pair's: a joint wire is a short conductor, at one potential under the edge.
_TIE_FACTOR = 1e6


def uniform_initial_distribution(x, alpha):
    """Initial potential along a uniform winding under a step, line end at x = 0.

    Parameters
    ----------
    x : float or ndarray
        Position along the winding from the line end, 0 … 1. [-]
    alpha : float
        sqrt(Cg/Cs) of the whole winding, > 0. [-]

    Returns
    -------
    v : float or ndarray
        Potential per volt of the step, sinh(α(1 − x))/sinh(α), far end earthed. [-]

    References
    ----------
    .. [1] K. W. Wagner, "Das Eindringen einer elektromagnetischen Welle in
       eine Spule mit Windungskapazität", Elektrotechnik und Maschinenbau 33
       (1915): the initial distribution of a uniform winding.
    .. [2] M. J. Heathcote, The J & P Transformer Book, 13th ed., Newnes
       (2007), §8.1 (the same distribution and α).

    Examples
    --------
    >>> round(float(uniform_initial_distribution(0.1, 10.0)), 4)      # 37 % at a tenth of the way
    0.3679
    """
    x = np.asarray(x, dtype=float)
    a = float(alpha)
    # Written with decaying exponentials so that a steep front (α in the hundreds) does not overflow.
    out = np.exp(-a * x) * (-np.expm1(-2.0 * a * (1.0 - x))) / (-math.expm1(-2.0 * a))
    return float(out) if out.ndim == 0 else out


def impulse_alpha(ground_F, series_F):
    """The distribution constant α = sqrt(Cg/Cs) of a winding.

    Parameters
    ----------
    ground_F : float
        Capacitance of the whole winding to ground. [F]
    series_F : float
        Capacitance between the winding's terminals through its turns, no
        ground (the series capacitance). [F]

    Returns
    -------
    alpha : float
        [-]

    References
    ----------
    As :func:`uniform_initial_distribution`.

    Examples
    --------
    >>> impulse_alpha(100e-12, 1e-12)
    10.0
    """
    return math.sqrt(float(ground_F) / float(series_F)) if series_F > 0 else math.inf


def capacitive_distribution(n_nodes, i, j, c_pair, c_ground, fixed, ties=()):
    """Node potentials of a network of capacitors with some nodes held.

    Solves the nodal equations ``(Σ C)·v = 0`` at every free node, the
    charge balance of the initial (capacitive) distribution.

    Parameters
    ----------
    n_nodes : int
        Number of nodes (turns).
    i, j : array_like of int
        Node pairs coupled by a capacitance.
    c_pair : array_like
        Capacitance of each pair. [F]
    c_ground : float or array_like
        Capacitance of each node to ground (0 V). [F]
    fixed : dict
        ``{node: potential}`` held by the source. [V]
    ties : sequence of (int, int)
        Nodes joined by a conductor (strand joints): held at one potential.

    Returns
    -------
    v : ndarray, shape (n_nodes,)
        Potential of every node. [V]
    K : scipy.sparse.csr_matrix
        The nodal capacitance matrix, ties included: ``K @ v`` is each
        node's charge (non-zero at the held nodes only). [F]

    References
    ----------
    .. [1] A. Greenwood, Electrical Transients in Power Systems, 2nd ed.,
       Wiley (1991), §14.3: the initial distribution as a capacitive network.

    Examples
    --------
    >>> v, _ = capacitive_distribution(3, [0, 1], [1, 2], [1e-12, 1e-12], 0.0, {0: 1.0, 2: 0.0})
    >>> [round(float(x), 3) for x in v]
    [1.0, 0.5, 0.0]
    """
    from scipy.sparse import coo_matrix      # lazy: only a fast-edge duty needs it
    from scipy.sparse.linalg import spsolve

    i = np.asarray(i, dtype=int)
    j = np.asarray(j, dtype=int)
    c = np.asarray(c_pair, dtype=float)
    scale = float(c.max()) if c.size else 1e-12
    if ties:
        t = np.asarray(ties, dtype=int).reshape(-1, 2)
        i, j = np.concatenate([i, t[:, 0]]), np.concatenate([j, t[:, 1]])
        c = np.concatenate([c, np.full(len(t), _TIE_FACTOR * scale)])
    cg = np.broadcast_to(np.asarray(c_ground, dtype=float), (n_nodes,)).copy()
    # A node coupled to nothing held would float: a vanishing ground keeps the system regular.
    cg = np.maximum(cg, 1e-9 * scale)
    rows = np.concatenate([i, j, i, j, np.arange(n_nodes)])
    cols = np.concatenate([j, i, i, j, np.arange(n_nodes)])
    vals = np.concatenate([-c, -c, c, c, cg])
    K = coo_matrix((vals, (rows, cols)), shape=(n_nodes, n_nodes)).tocsr()
    held = np.zeros(n_nodes, dtype=bool)
    v = np.zeros(n_nodes)
    for node, value in fixed.items():
        held[node] = True
        v[node] = value
    free = np.flatnonzero(~held)
    if free.size:
        rhs = -K[free][:, np.flatnonzero(held)] @ v[held]
        v[free] = np.atleast_1d(spsolve(K[free][:, free].tocsc(), rhs))
    return v, K


def series_capacitance(n_nodes, i, j, c_pair, line, earth, ties=()):
    """Capacitance between two terminals through a network of capacitors, no ground.

    Parameters
    ----------
    n_nodes : int
        Number of nodes.
    i, j, c_pair
        As :func:`capacitive_distribution`. [F]
    line, earth : sequence of int
        Nodes at the two terminals.
    ties : sequence of (int, int)
        Nodes joined by a conductor.

    Returns
    -------
    Cs : float
        Charge drawn from the line terminal per volt. [F]

    References
    ----------
    As :func:`capacitive_distribution`.

    Examples
    --------
    >>> series_capacitance(3, [0, 1], [1, 2], [2e-12, 2e-12], [0], [2]) * 1e12   # two in series
    1.0
    """
    fixed = {**{n: 1.0 for n in line}, **{n: 0.0 for n in earth}}
    v, K = capacitive_distribution(n_nodes, i, j, c_pair, 0.0, fixed, ties)
    # The charge the line terminal supplies: the held line nodes' charge, through ties as well.
    return float(np.sum((K @ v)[np.asarray(list(line), dtype=int)]))
