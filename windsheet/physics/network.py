"""Hookup network: how the strand ends are joined, and what the terminals see.

Any hookup of up to four strands is a list of joins (groups of strand ends
tied together) and two terminals.  The named hookups are shorthands for it.
The network is solved by modified nodal analysis with the strands as coupled
branches, ``V_start - V_finish = (R + jwL) i``, so parallel strands share
current by impedance and any mix of series, parallel and reversed strands is
handled the same way.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

STRAND_IDS = "ABCD"
NAMED_HOOKUPS = ("single", "series-aiding", "series-opposing", "parallel", "separate")


class HookupError(ValueError):
    """A hookup that cannot be wired as written; ``where`` is the offending part."""

    def __init__(self, where: str, message: str):
        self.where = where
        super().__init__(message)


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


def named_hookup(name: str, strands: int):
    """Joins and terminals of a named hookup for ``strands`` strands.

    ``series-aiding`` chains every strand finish-to-start; ``series-opposing``
    (two strands) joins the finishes so the fields cancel; ``parallel`` ties
    all starts and all finishes; ``separate`` leaves each strand its own winding.

    Parameters
    ----------
    name : str
        One of :data:`NAMED_HOOKUPS`.
    strands : int
        Strands wound together (1–4). [-]

    Returns
    -------
    joins : list of list of str
        Groups of strand ends tied together, e.g. ``[["A.finish", "B.start"]]``.
    terminals : list of str
        The two ends brought out as terminal 1 and terminal 2.

    Raises
    ------
    HookupError
        An unknown name, or a name that does not fit the number of strands.

    References
    ----------
    Series-aiding, series-opposing and parallel connection of coupled
    windings, standard circuit theory (common practice for the names).

    Examples
    --------
    >>> named_hookup("series-aiding", 3)             # A → B → C, finish to start
    ([['A.finish', 'B.start'], ['B.finish', 'C.start']], ['A.start', 'C.finish'])
    >>> named_hookup("parallel", 2)
    ([['A.start', 'B.start'], ['A.finish', 'B.finish']], ['A.start', 'A.finish'])
    """
    ids = STRAND_IDS[:strands]
    if name == "single":
        if strands != 1:
            raise HookupError("hookup", f"'single' is for one strand; this winding has {strands}")
        return [], ["A.start", "A.finish"]
    if strands < 2 and name != "separate":
        raise HookupError("hookup", f"'{name}' needs at least two strands; winding.strands is 1")
    if name == "series-aiding":
        return [[f"{a}.finish", f"{b}.start"] for a, b in zip(ids, ids[1:])], [f"{ids[0]}.start", f"{ids[-1]}.finish"]
    if name == "series-opposing":
        if strands != 2:
            raise HookupError("hookup", "'series-opposing' is for two strands; "
                              "write other hookups as {joins: ..., terminals: ...}")
        return [["A.finish", "B.finish"]], ["A.start", "B.start"]
    if name == "parallel":
        return [[f"{s}.start" for s in ids], [f"{s}.finish" for s in ids]], ["A.start", "A.finish"]
    if name == "separate":
        return [], ["A.start", "A.finish"]
    raise HookupError("hookup", f"unknown hookup {name!r}; expected one of {', '.join(NAMED_HOOKUPS)} "
                      "or {joins: [[A.finish, B.start]], terminals: [A.start, B.finish]}")


def _end_index(end: str, strands: int, where: str) -> int:
    """Map ``"B.finish"`` to node slot 2*1+1."""
    if not isinstance(end, str) or "." not in end:
        raise HookupError(where, f"expected a strand end like 'A.start' or 'B.finish', got {end!r}")
    sid, _, which = end.partition(".")
    sid = sid.strip().upper()
    which = which.strip().lower()
    if sid not in STRAND_IDS[:strands] or len(sid) != 1:
        raise HookupError(where, f"strand {sid!r} does not exist; this winding has strands "
                          f"{', '.join(STRAND_IDS[:strands])}")
    if which not in ("start", "finish"):
        raise HookupError(where, f"a strand end is 'start' or 'finish', got {which!r}")
    return 2 * STRAND_IDS.index(sid) + (which == "finish")


def _nodes(joins, terminals, strands):
    """Union the joined ends into nodes; return node of each end and the terminal nodes."""
    parent = list(range(2 * strands))

    def find(x):
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x

    for g, group in enumerate(joins):
        if not isinstance(group, (list, tuple)) or len(group) < 2:
            raise HookupError(f"hookup.joins[{g}]", "a join lists two or more strand ends, like [A.finish, B.start]")
        idx = [_end_index(e, strands, f"hookup.joins[{g}][{k}]") for k, e in enumerate(group)]
        for k in idx[1:]:
            parent[find(k)] = find(idx[0])
    if not isinstance(terminals, (list, tuple)) or len(terminals) != 2:
        raise HookupError("hookup.terminals", "expected exactly two strand ends, like [A.start, B.finish]")
    t = [_end_index(e, strands, f"hookup.terminals[{k}]") for k, e in enumerate(terminals)]
    roots = sorted({find(i) for i in range(2 * strands)})
    node_of = np.array([roots.index(find(i)) for i in range(2 * strands)])
    return node_of, node_of[t[0]], node_of[t[1]], len(roots)


def check_hookup(joins, terminals, strands):
    """Refuse hookups that cannot work: shorted terminals or strands, floating strands.

    Parameters
    ----------
    joins : list of list of str
        Groups of strand ends tied together.
    terminals : list of str
        The two terminal ends.
    strands : int
        Number of strands. [-]

    Returns
    -------
    node_of : ndarray of int
        Node of each strand end, in the order A.start, A.finish, B.start, … [-]
    t1, t2 : int
        Nodes of terminal 1 and terminal 2. [-]
    n : int
        Number of nodes. [-]

    Raises
    ------
    HookupError
        Terminals joined together, a strand's own ends joined, an end left
        unconnected, or a strand not on a path between the terminals.

    References
    ----------
    Kirchhoff's laws: a strand with both ends on one node has no voltage
    across it, and one with an open end carries no current (standard circuit
    theory); connectivity by union-find and a graph search.

    Examples
    --------
    Two strands in series aiding: three nodes, the joint A.finish = B.start in the middle.

    >>> node_of, t1, t2, n = check_hookup([["A.finish", "B.start"]], ["A.start", "B.finish"], 2)
    >>> node_of.tolist(), int(t1), int(t2), n
    ([0, 1, 1, 2], 0, 2, 3)
    >>> check_hookup([], ["A.start", "A.finish"], 2)
    Traceback (most recent call last):
    ...
    windsheet.physics.network.HookupError: strand B start is left unconnected: the strand would float;
    join it or name it a terminal
    """
    node_of, t1, t2, n = _nodes(joins, terminals, strands)
    if t1 == t2:
        raise HookupError("hookup.terminals", "the two terminals are joined to each other: a short circuit")
    for s in range(strands):
        if node_of[2 * s] == node_of[2 * s + 1]:
            raise HookupError("hookup.joins", f"strand {STRAND_IDS[s]}'s start and finish are joined: "
                              "the strand is shorted out")
    degree = np.bincount(node_of, minlength=n)
    for s in range(strands):
        for end, name in ((2 * s, "start"), (2 * s + 1, "finish")):
            nd = node_of[end]
            if degree[nd] < 2 and nd not in (t1, t2):
                raise HookupError("hookup", f"strand {STRAND_IDS[s]} {name} is left unconnected: "
                                  "the strand would float; join it or name it a terminal")
    # Every strand must lie in the terminals' connected piece.
    adj = {i: set() for i in range(n)}
    for s in range(strands):
        a, b = node_of[2 * s], node_of[2 * s + 1]
        adj[a].add(b); adj[b].add(a)
    seen, stack = {t1}, [t1]
    while stack:
        for m in adj[stack.pop()] - seen:
            seen.add(m); stack.append(m)
    if t2 not in seen:
        raise HookupError("hookup", "no path joins the two terminals through the strands")
    for s in range(strands):
        if node_of[2 * s] not in seen:
            raise HookupError("hookup", f"strand {STRAND_IDS[s]} is not connected to the terminals")
    return node_of, t1, t2, n


def brought_out(name: str, terminals, strand_ids) -> list[str]:
    """The ends brought out as terminals, in T1, T2, … order.

    A ``separate`` hookup lists only the first winding's pair; every strand
    there is its own winding, so each strand's start and finish follow as
    T3/T4, T5/T6, ….

    Parameters
    ----------
    name : str
        The hookup's name (``"custom"`` for one written as joins).
    terminals : list of str
        The hookup's two terminal ends.
    strand_ids : iterable of str
        The strand letters, ``"AB"`` for two strands.

    Returns
    -------
    ends : list of str
        Every end that leaves the winding as a terminal lead.

    References
    ----------
    Terminal numbering of a wound component, T1/T2 per winding (common practice).

    Examples
    --------
    >>> brought_out("series-aiding", ["A.start", "B.finish"], "AB")   # the joint stays inside
    ['A.start', 'B.finish']
    >>> brought_out("separate", ["A.start", "A.finish"], "AB")        # two windings, four leads
    ['A.start', 'A.finish', 'B.start', 'B.finish']
    """
    out = [str(t) for t in terminals or []]
    if name == "separate":
        out += [e for s in strand_ids for e in (f"{s}.start", f"{s}.finish") if e not in out]
    return out


def _pin_label(value, where):
    if isinstance(value, bool) or not isinstance(value, (int, str)) or not re.fullmatch(
            r"[A-Za-z0-9][A-Za-z0-9+/-]{0,7}", str(value).strip()):
        raise HookupError(where, "expected a pin number or name, like 1 or S2 (up to 8 letters and digits)")
    return str(value).strip()


def pin_assignment(terminations, joins, terminals, brought_out, strands) -> list[dict]:
    """The pin each strand end is soldered to, checked against the hookup.

    Parameters
    ----------
    terminations : dict
        Strand end -> pin, as the order writes it (``{"A.start": 1, "B.finish": "S2"}``).
    joins, terminals : list
        The hookup's joins and its two terminals (normalised ends).
    brought_out : list of str
        Every end brought out as a terminal (a ``separate`` hookup: every end).
    strands : int
        Number of strands.

    Returns
    -------
    list of dict
        ``{"pin", "ends", "node"}`` per pin, in the order the pins are first named;
        ``node`` numbers the hookup's nodes, so pins with one ``node`` are joined
        only by what they are soldered into (the board, or a bench link).

    Raises
    ------
    HookupError
        At ``terminations.<end>``: an end that does not exist or is named twice,
        two ends on one pin that the hookup does not join (a short); at
        ``terminations``: a terminal left without a pin.

    References
    ----------
    Pin-out of a wound component on a bobbin or header (common practice): a
    pin carries one node; a joint may be made on its pin.

    Examples
    --------
    Series aiding on three pins, the joint A.finish–B.start made on pin 2:

    >>> joins, terms = [["A.finish", "B.start"]], ["A.start", "B.finish"]
    >>> pins = pin_assignment({"A.start": 1, "A.finish": 2, "B.start": 2, "B.finish": 3},
    ...                       joins, terms, terms, 2)
    >>> [(p["pin"], p["ends"], p["node"]) for p in pins]
    [('1', ['A.start'], 0), ('2', ['A.finish', 'B.start'], 1), ('3', ['B.finish'], 2)]
    """
    if not isinstance(terminations, dict) or not terminations:
        raise HookupError("terminations", "expected a mapping of strand end to pin, like {A.start: 1, A.finish: 2}")
    node_of = _nodes(joins, terminals, strands)[0]
    pins, node_at_pin, seen = {}, {}, {}
    for key, value in terminations.items():
        where = f"terminations.{key}"
        idx = _end_index(str(key), strands, where)
        end = f"{STRAND_IDS[idx // 2]}.{'finish' if idx % 2 else 'start'}"
        if end in seen:
            raise HookupError(where, f"{end} is given a pin twice")
        seen[end] = pin = _pin_label(value, where)
        if pin in node_at_pin and node_at_pin[pin] != node_of[idx]:
            raise HookupError(where, f"pin {pin} already carries {pins[pin][0]}, which the hookup does not "
                              f"join to {end}: the pin would short them")
        node_at_pin[pin] = node_of[idx]
        pins.setdefault(pin, []).append(end)
    missing = [e for e in brought_out if e not in seen]
    if missing:
        raise HookupError("terminations", f"gives no pin to {', '.join(missing)}; every lead brought out needs one")
    return [{"pin": pin, "ends": ends, "node": int(node_at_pin[pin])} for pin, ends in pins.items()]


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
