"""Hookup network: what the terminals see, and how current and voltage share out.

The hookup (:mod:`windsheet.physics.hookup`) is solved by modified nodal
analysis with the strands as coupled branches, ``V_start - V_finish = (R + jwL) i``,
so parallel strands share current by impedance and any mix of series, parallel
and reversed strands is handled the same way.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .hookup import STRAND_IDS, check_hookup, named_hookup


@dataclass(frozen=True)
class NetworkResult:
    """Terminal values of a hookup, and how current and voltage share out.

    Attributes
    ----------
    inductance : float
        Terminal inductance at the evaluation frequency. [H]
    resistance : float
        Terminal DC resistance (from the strand resistances given). [ohm]
    strand_current : ndarray of complex
        Current in each strand, start to finish, for 1 A into terminal 1. [A]
    end_potential : ndarray of complex, shape (strands, 2)
        Potential of each strand's start and finish for 1 V across the
        terminals, terminal 2 at 0 V. [V]
    """

    hookup: str
    joins: list
    terminals: list
    inductance: float
    resistance: float
    strand_current: np.ndarray
    end_potential: np.ndarray


def _mna_matrix(L, R, node_of, n, grounded, omega):
    """The modified-nodal-analysis matrix of the strands as coupled branches.

    Unknowns: the potentials of the nodes not in ``grounded`` (indexed by
    the returned ``col``), then the ``S`` branch currents.  Returns
    ``(A, col, nv)``, ``nv`` the number of node unknowns.
    """
    S = len(R)
    Z = np.diag(R).astype(complex) + 1j * omega * np.asarray(L, dtype=float)
    keep = [k for k in range(n) if k not in grounded]
    col = {k: i for i, k in enumerate(keep)}
    nv = len(keep)
    A = np.zeros((nv + S, nv + S), dtype=complex)
    for s in range(S):
        a_node, f_node = node_of[2 * s], node_of[2 * s + 1]
        # Branch equation: V_a - V_f - Z i = 0
        row = nv + s
        if a_node in col:
            A[row, col[a_node]] += 1
            A[col[a_node], nv + s] += 1   # KCL: current leaves a_node
        if f_node in col:
            A[row, col[f_node]] -= 1
            A[col[f_node], nv + s] -= 1   # and enters f_node
        A[row, nv:] -= Z[s]
    return A, col, nv


def _solve(L, R, node_of, t1, t2, n, omega):
    """MNA: node potentials (t2 grounded) and branch currents for 1 A into t1."""
    A, col, nv = _mna_matrix(L, R, node_of, n, {t2}, omega)
    b = np.zeros(A.shape[0], dtype=complex)
    b[col[t1]] = 1.0
    x = np.linalg.solve(A, b)
    v = np.zeros(n, dtype=complex)
    for k, i in col.items():
        v[k] = x[i]
    return v, x[nv:]


def solve_network(L, R, joins, terminals, frequency, hookup="custom") -> NetworkResult:
    """Terminal inductance and resistance of a strand hookup.

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R : ndarray, shape (S,)
        Strand resistances. [ohm]
    joins : list of list of str
        Groups of strand ends tied together, e.g. ``[["A.finish", "B.start"]]``.
    terminals : list of str
        The two terminal ends, e.g. ``["A.start", "B.finish"]``.
    frequency : float
        Frequency at which the terminal inductance and the current sharing
        are evaluated; 0 for DC. [Hz]

    Returns
    -------
    NetworkResult
        Terminal inductance [H] and DC resistance [ohm], strand currents per
        1 A in [A], strand-end potentials per 1 V across the terminals [V/V].

    References
    ----------
    .. [1] C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The modified nodal approach
       to network analysis", IEEE Trans. Circuits Syst. 22(6), 504-509, 1975.

    Examples
    --------
    Two strands of 100 µH and 1 Ω, coupled k = 1, series aiding read
    L1 + L2 + 2M = 400 µH and 2 Ω, with the joint at half the voltage:

    >>> L = [[100e-6, 100e-6], [100e-6, 100e-6]]
    >>> r = solve_network(L, [1.0, 1.0], [["A.finish", "B.start"]], ["A.start", "B.finish"], 1e3)
    >>> round(r.inductance * 1e6, 3), round(r.resistance, 6), round(float(abs(r.end_potential[0, 1])), 6)
    (400.0, 2.0, 0.5)

    The same strands at k = 0.5 in parallel read L(1 + k)/2 = 75 µH and R/2 = 0.5 Ω:

    >>> L = [[100e-6, 50e-6], [50e-6, 100e-6]]
    >>> r = solve_network(L, [1.0, 1.0], *named_hookup("parallel", 2), 1e3)
    >>> round(r.inductance * 1e6, 3), round(r.resistance, 6)
    (75.0, 0.5)
    """
    R = np.asarray(R, dtype=float)
    S = len(R)
    node_of, t1, t2, n = check_hookup(joins, terminals, S)
    v_dc, i_dc = _solve(L, R, node_of, t1, t2, n, 0.0)
    # The inductance an LCR meter reads needs a nonzero frequency; 1 kHz if DC.
    f_eval = frequency if frequency > 0 else 1e3
    omega = 2 * np.pi * f_eval
    v_ac, i_ac = _solve(L, R, node_of, t1, t2, n, omega)
    z = v_ac[t1]
    v_duty, i_duty = (v_ac, i_ac) if frequency > 0 else (v_dc, i_dc)
    z_duty = v_duty[t1]
    ends = np.array([[v_duty[node_of[2 * s]], v_duty[node_of[2 * s + 1]]] for s in range(S)]) / z_duty
    return NetworkResult(hookup=hookup, joins=[list(j) for j in joins], terminals=list(terminals),
                         inductance=float(z.imag / omega), resistance=float(v_dc[t1].real),
                         strand_current=i_duty, end_potential=ends)


def separate_windings(L, R, between=0.0) -> NetworkResult:
    """Each strand its own winding; strand A is reported at the terminals.

    Every winding is driven start 0 V to finish 1 V, in phase; neighbouring
    windings (B, D) are offset by ``between`` volts per volt of winding
    voltage, the working voltage between windings (the isolation duty).

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R : ndarray, shape (S,)
        Strand resistances. [ohm]
    between : float
        Offset of windings B and D from A and C, per volt of winding voltage. [V/V]

    Returns
    -------
    NetworkResult
        Winding A's own inductance ``L[0, 0]`` [H] and resistance ``R[0]``
        [ohm]; 1 A in every winding [A]; each winding's start and finish
        potential [V/V].

    References
    ----------
    Separate windings on one former, each on its own circuit (common practice).

    Examples
    --------
    >>> r = separate_windings([[100e-6, 50e-6], [50e-6, 100e-6]], [1.0, 2.0], between=0.5)
    >>> round(r.inductance * 1e6, 3), r.resistance, r.end_potential.real.tolist()
    (100.0, 1.0, [[0.0, 1.0], [0.5, 1.5]])
    """
    S = len(R)
    ends = np.array([[0.0, 1.0]] * S, dtype=complex) + np.array([[(s % 2) * between] * 2 for s in range(S)])
    # Each winding carries the duty current of its own circuit.
    cur = np.ones(S, dtype=complex)
    return NetworkResult(hookup="separate", joins=[], terminals=["A.start", "A.finish"],
                         inductance=float(np.asarray(L)[0, 0]), resistance=float(R[0]),
                         strand_current=cur, end_potential=ends)


def alternative_hookups(L, R, frequency):
    """What the terminals would read if the strands were wired the other common ways.

    Used by sign-off to recognise wiring mistakes.  For more than two strands,
    "one strand reversed" chains all strands with the last one reversed.

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R : ndarray, shape (S,)
        Strand resistances. [ohm]
    frequency : float
        Frequency of the inductance reading; 1 kHz when 0. [Hz]

    Returns
    -------
    readings : dict
        ``{wiring: {"inductance_H": [H], "resistance_ohm": [ohm]}}`` for
        series-aiding, parallel, series-opposing (two strands) or one strand
        reversed (more), and a single strand; empty for one strand.

    References
    ----------
    As :func:`solve_network`; the series and parallel values of coupled
    coils are standard circuit theory.

    Examples
    --------
    Two strands of 100 µH, 1 Ω, k = 0.5: series aiding 2L(1 + k) = 300 µH,
    series opposing 2L(1 − k) = 100 µH, parallel L(1 + k)/2 = 75 µH.

    >>> alt = alternative_hookups([[100e-6, 50e-6], [50e-6, 100e-6]], [1.0, 1.0], 1e3)
    >>> {k: (round(v["inductance_H"] * 1e6, 3), round(v["resistance_ohm"], 6)) for k, v in alt.items()}
    {'series-aiding': (300.0, 2.0), 'parallel': (75.0, 0.5), 'series-opposing': (100.0, 2.0),
     'single strand': (100.0, 1.0)}
    """
    S = len(R)
    if S < 2:
        return {}
    ids = STRAND_IDS[:S]
    out = {}
    variants = {
        "series-aiding": named_hookup("series-aiding", S),
        "parallel": named_hookup("parallel", S),
    }
    if S == 2:
        variants["series-opposing"] = named_hookup("series-opposing", 2)
    else:
        joins = [[f"{a}.finish", f"{b}.start"] for a, b in zip(ids[:-2], ids[1:-1])]
        joins.append([f"{ids[-2]}.finish", f"{ids[-1]}.finish"])
        variants["one strand reversed"] = (joins, [f"{ids[0]}.start", f"{ids[-1]}.start"])
    for name, (joins, terms) in variants.items():
        res = solve_network(L, R, joins, terms, frequency, hookup=name)
        out[name] = {"inductance_H": res.inductance, "resistance_ohm": res.resistance}
    out["single strand"] = {"inductance_H": float(np.asarray(L)[0, 0]), "resistance_ohm": float(R[0])}
    return out


def _components(node_of, n):
    """Connected pieces of the node graph, the strands as edges."""
    parent = list(range(n))

    def find(x):
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for s in range(len(node_of) // 2):
        parent[find(node_of[2 * s])] = find(node_of[2 * s + 1])
    return [find(k) for k in range(n)]


def _solve_loose(L, R, node_of, t1, t2, n, omega):
    """MNA like :func:`_solve`, tolerating what a miswired coil can be.

    A strand with both ends on one node is a shorted loop (it still couples);
    a piece of the network not joined to the terminals gets its own reference
    node, so its loops still carry induced current.  Returns the potential of
    ``t1`` for 1 A into it, or None when no path joins the terminals.
    """
    comp = _components(node_of, n)
    if comp[t1] != comp[t2]:
        return None
    refs = {comp[t2]: t2}
    for k in range(n):
        refs.setdefault(comp[k], k)
    A, col, nv = _mna_matrix(L, R, node_of, n, set(refs.values()), omega)
    b = np.zeros(A.shape[0], dtype=complex)
    if t1 not in col:
        return None
    b[col[t1]] = 1.0
    try:
        x = np.linalg.solve(A, b)
    except np.linalg.LinAlgError:
        return None
    return x[col[t1]]


def terminal_reading(L, R, node_of, t1, t2, frequency):
    """What an LCR meter and an ohmmeter read between two nodes of any wiring.

    Unlike :func:`solve_network` nothing is refused: strands may be shorted
    out, left floating or form loops of their own, as a wiring mistake makes
    them.  Used by sign-off to predict the readings of each wiring hypothesis.

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand inductance matrix. [H]
    R : ndarray, shape (S,)
        Strand resistances. [ohm]
    node_of : sequence of int, length 2 S
        Node of each strand end, in the order A.start, A.finish, B.start, ...
    t1, t2 : int
        The two nodes the meter is clipped to.
    frequency : float
        Frequency of the inductance reading; 1 kHz when 0. [Hz]

    Returns
    -------
    (inductance, resistance) : tuple of float
        [H], [ohm]; ``(None, inf)`` when no path joins the two nodes.

    References
    ----------
    .. [1] C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The modified nodal approach
       to network analysis", IEEE Trans. Circuits Syst. 22(6), 504-509, 1975.

    Examples
    --------
    Two identical strands, k = 0.5, in series aiding read 2 L (1 + k):

    >>> L = [[1e-4, 5e-5], [5e-5, 1e-4]]
    >>> l, r = terminal_reading(L, [1.0, 1.0], [0, 1, 1, 2], 0, 2, 1e3)
    >>> round(l * 1e6, 3), round(r, 6)
    (300.0, 2.0)
    """
    R = np.asarray(R, dtype=float)
    node_of = list(node_of)
    n = max(node_of + [t1, t2]) + 1
    if t1 == t2:
        return 0.0, 0.0
    v_dc = _solve_loose(L, R, node_of, t1, t2, n, 0.0)
    if v_dc is None:
        return None, float("inf")
    f_eval = frequency if frequency > 0 else 1e3
    omega = 2 * np.pi * f_eval
    v_ac = _solve_loose(L, R, node_of, t1, t2, n, omega)
    return float(v_ac.imag / omega), float(v_dc.real)


def terminal_impedance(L, R, node_of, t1, t2, frequency):
    """Complex impedance between two nodes of any wiring at ``frequency``, R taken as given.

    As :func:`terminal_reading`, with the strand resistances ``R`` at the
    frequency (AC resistance) and the whole impedance returned: a strand
    whose two ends share a node is a closed loop that still couples (a
    shorted turn).

    Parameters
    ----------
    L : ndarray, shape (S, S)
        Strand (branch) inductance matrix. [H]
    R : ndarray, shape (S,)
        Branch resistances at ``frequency``. [ohm]
    node_of : sequence of int, length 2 S
        Node of each branch end, in the order A.start, A.finish, B.start, ...
    t1, t2 : int
        The two nodes the meter is clipped to.
    frequency : float
        > 0. [Hz]

    Returns
    -------
    Z : complex or None
        [ohm]; None when no path joins the two nodes.

    References
    ----------
    .. [1] C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The modified nodal approach
       to network analysis", IEEE Trans. Circuits Syst. 22(6), 504-509, 1975.

    Examples
    --------
    A 10 µH coil of 1 Ω with a closed loop (1 µH, 0.1 Ω, k = 0.5) beside it at
    100 kHz; by hand Z = 1 + jωL1 + ω²M²/(R2 + jωL2), M = √(10·1)·0.5 µH:

    >>> M = 0.5 * math.sqrt(10e-6 * 1e-6)
    >>> z = terminal_impedance([[10e-6, M], [M, 1e-6]], [1.0, 0.1], [0, 1, 2, 2], 0, 1, 100e3)
    >>> w = 2 * math.pi * 100e3
    >>> bool(abs(z - (1 + 1j * w * 10e-6 + w * w * M * M / (0.1 + 1j * w * 1e-6))) < 1e-9)
    True
    """
    R = np.asarray(R, dtype=float)
    node_of = list(node_of)
    n = max(node_of + [t1, t2]) + 1
    if t1 == t2:
        return 0j
    z = _solve_loose(L, R, node_of, t1, t2, n, 2 * np.pi * frequency)
    return None if z is None else complex(z)
