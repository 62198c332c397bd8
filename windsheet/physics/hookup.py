"""Hookups: how the strand ends are joined, checked, brought out and pinned.

Any hookup of up to four strands is a list of joins (groups of strand ends
tied together) and two terminals; the named hookups are shorthands for it.
This module checks that a hookup can be wired as written and numbers its
nodes; :mod:`windsheet.physics.network` solves what the terminals see.
"""

from __future__ import annotations

import re

import numpy as np

STRAND_IDS = "ABCD"
NAMED_HOOKUPS = ("single", "series-aiding", "series-opposing", "parallel", "separate")


class HookupError(ValueError):
    """A hookup that cannot be wired as written; ``where`` is the offending part."""

    def __init__(self, where: str, message: str):
        self.where = where
        super().__init__(message)


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
    windsheet.physics.hookup.HookupError: strand B start is left unconnected: the strand would float;
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
